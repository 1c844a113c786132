// Sampling parameter sets for an ensemble: plain Monte Carlo, or Latin hypercube (McKay,
// Beckman & Conover 1979, Technometrics 21(2), 239-245: each parameter's range split into n
// strata of equal probability, each stratum drawn once, the strata of different parameters
// paired by independent random permutations).
//
// Reproducible from the seed on every platform: the generator is std::mt19937_64, whose output
// sequence the C++ standard fixes, and uniforms and permutations are made here from its raw
// 64-bit output (the standard library's distributions are implementation-defined).
#pragma once

#include <cstdint>
#include <vector>

#include "freshet/uncertainty/distribution.hpp"

namespace freshet::uncertainty {

enum class SamplingMethod { monte_carlo, latin_hypercube };

// members x parameters: sample[m][k] is member m's value of parameter k.
using SampleTable = std::vector<std::vector<double>>;

[[nodiscard]] SampleTable draw_sample(const std::vector<Distribution>& parameters,
                                      std::size_t members, SamplingMethod method,
                                      std::uint64_t seed);

// The uniform probabilities behind draw_sample (same seed, same layout), before each
// parameter's quantile is applied: what the stratification test reads.
[[nodiscard]] SampleTable draw_probabilities(std::size_t parameter_count, std::size_t members,
                                             SamplingMethod method, std::uint64_t seed);

}  // namespace freshet::uncertainty
