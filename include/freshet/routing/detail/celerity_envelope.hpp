// Upper bound of the celerity over all areas up to A, for Courant checks without evaluating
// c in every cell (detail).
//
// bound(A) = max(c(A), 1.001 max_{A_j < A} c(A_j)) over a geometric table of areas A_j = 2^(j/16)
// m2, 2^-25 .. 2^25 m2, built once per reach. Since every cell has A_i <= max_i A_i,
// max_i c(A_i) <= bound(max_i A_i) up to the table's sampling of c between nodes (one
// sixteenth of an octave apart); for a law whose c never decreases, bound(A) = c(A) exactly.
// Laws whose c falls with A (a part-full pipe above 0.8 D, the capped region of a conduit)
// get a bound from the rising branch, so the Courant check stays conservative.
#pragma once

#include <algorithm>
#include <cmath>
#include <vector>

namespace freshet::routing::detail {

class CelerityEnvelope {
 public:
  static constexpr int kNodesPerOctave = 16;
  static constexpr int kOctaves = 25;
  // c between nodes can exceed both neighbours near a maximum of c (by 3e-4 for a pipe);
  // the margin covers that. A law with increasing c is unaffected: the neighbouring node
  // below is ~3 % slower, so bound(A) = c(A) still.
  static constexpr double kSamplingMargin = 1.001;

  CelerityEnvelope() = default;
  // When c rises from node to node over the whole table (a trapezoid), the running maximum
  // at node j is c at node j itself: nothing is stored and bound() evaluates c at that node
  // (the same value, bit for bit, for one more evaluation per call). A network of 10 000
  // reaches kept 64 MB of such tables.
  template <class F>
  explicit CelerityEnvelope(const F& law) : built_(true) {
    std::vector<double> table(kNodes);
    double m = 0.0;
    bool rises = true;
    for (std::size_t j = 0; j < table.size(); ++j) {
      const double c = law.celerity_m_s(node_area(static_cast<int>(j)));
      rises = rises && c >= m;
      m = std::max(m, c);
      table[j] = kSamplingMargin * m;
    }
    if (!rises) running_max_ = std::move(table);
  }

  // c_at_area is c(area_m2), evaluated by the caller from `law`, the law the envelope was
  // built from. Returns a negative value when area_m2 lies beyond the table (the caller then
  // evaluates every cell).
  template <class F>
  [[nodiscard]] double bound(const F& law, double area_m2, double c_at_area) const noexcept {
    if (!(area_m2 > node_area(0))) return std::max(c_at_area, 0.0);
    const int j = static_cast<int>(std::ceil(kNodesPerOctave * std::log2(area_m2))) +
                  kNodesPerOctave * kOctaves - 1;  // last node strictly below area_m2
    if (j >= static_cast<int>(kNodes)) return -1.0;
    const double below = running_max_.empty() ? kSamplingMargin * law.celerity_m_s(node_area(j))
                                              : running_max_[static_cast<std::size_t>(j)];
    return std::max(c_at_area, below);
  }
  [[nodiscard]] bool empty() const noexcept { return !built_; }
  [[nodiscard]] std::size_t memory_bytes() const noexcept {
    return running_max_.capacity() * sizeof(double);
  }

 private:
  static double node_area(int j) noexcept {
    return std::exp2(static_cast<double>(j - kNodesPerOctave * kOctaves) / kNodesPerOctave);
  }
  static constexpr std::size_t kNodes = 2 * kNodesPerOctave * kOctaves + 1;
  std::vector<double> running_max_;  // empty when c rises over the whole table
  bool built_ = false;
};

}  // namespace freshet::routing::detail
