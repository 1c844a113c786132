#include "freshet/uncertainty/sampling.hpp"

#include <limits>
#include <numeric>
#include <random>

namespace freshet::uncertainty {
namespace {

// A uniform in the open interval (0, 1) from the top 53 bits of one 64-bit draw.
double open_uniform(std::mt19937_64& engine) {
  return (static_cast<double>(engine() >> 11) + 0.5) * 0x1.0p-53;
}

// An integer uniform in [0, bound), without modulo bias (rejection of the short last block).
std::uint64_t below(std::mt19937_64& engine, std::uint64_t bound) {
  const std::uint64_t limit = std::numeric_limits<std::uint64_t>::max() -
                              std::numeric_limits<std::uint64_t>::max() % bound;
  std::uint64_t x = engine();
  while (x >= limit) x = engine();
  return x % bound;
}

}  // namespace

SampleTable draw_probabilities(std::size_t parameter_count, std::size_t members,
                               SamplingMethod method, std::uint64_t seed) {
  std::mt19937_64 engine(seed);
  SampleTable p(members, std::vector<double>(parameter_count));
  if (method == SamplingMethod::monte_carlo) {
    for (auto& member : p) {
      for (double& u : member) u = open_uniform(engine);
    }
    return p;
  }
  // Latin hypercube: per parameter, a Fisher-Yates permutation of the strata, then one
  // uniform position inside each member's stratum.
  std::vector<std::size_t> stratum(members);
  const double width = 1.0 / static_cast<double>(members);
  for (std::size_t k = 0; k < parameter_count; ++k) {
    std::iota(stratum.begin(), stratum.end(), std::size_t{0});
    for (std::size_t i = members; i > 1; --i) {
      std::swap(stratum[i - 1], stratum[below(engine, i)]);
    }
    for (std::size_t m = 0; m < members; ++m) {
      p[m][k] = (static_cast<double>(stratum[m]) + open_uniform(engine)) * width;
    }
  }
  return p;
}

SampleTable draw_sample(const std::vector<Distribution>& parameters, std::size_t members,
                        SamplingMethod method, std::uint64_t seed) {
  SampleTable table = draw_probabilities(parameters.size(), members, method, seed);
  for (auto& member : table) {
    for (std::size_t k = 0; k < parameters.size(); ++k) {
      member[k] = quantile(parameters[k], member[k]);
    }
  }
  return table;
}

}  // namespace freshet::uncertainty
