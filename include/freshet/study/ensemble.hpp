// The uncertain parameters a study declares ([uncertainty] in the basin file, docs/
// uncertainty.md) and the ensemble members drawn from them.
//
// Each [[uncertainty.vary]] entry is one sampled variable: a probability p drawn once per
// member (Monte Carlo or Latin hypercube, uncertainty/sampling.hpp) and applied to every
// element the entry names, so the elements of one entry move together (fully correlated) and
// different entries independently. A member's value for an element is
//   as = "value":  the distribution's quantile at p;
//   as = "factor": the element's own value times the distribution's quantile at p;
//   distribution = "antecedent-moisture" (field loss.curve_number): the element's curve number
//     for average conditions (AMC II) moved toward the dry (AMC I) or wet (AMC III) value of
//     NRCS (1972, National Engineering Handbook sec. 4, Table 10.1), as approximated by
//     CN_I = 4.2 CN_II / (10 - 0.058 CN_II) and CN_III = 23 CN_II / (10 + 0.13 CN_II) (Chow,
//     Maidment & Mays 1988, Applied Hydrology, eq. 5.5.4 and 5.5.5; from memory), on a
//     triangular distribution with its mode at CN_II (freshet's choice, no source).
// Values are in the basin file's units, as the key they replace.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "freshet/core/error.hpp"
#include "freshet/uncertainty/distribution.hpp"
#include "freshet/uncertainty/ensemble_summary.hpp"
#include "freshet/uncertainty/sampling.hpp"

namespace freshet::study {

enum class VaryAs { value, factor, antecedent_moisture };

struct VariedParameter {
  std::string name;                      // "vary[1] manning_n"
  std::vector<std::string> element_ids;  // the elements it applies to
  std::string field;                     // "manning_n", "loss.curve_number", "plane.slope"
  VaryAs as = VaryAs::value;
  uncertainty::Distribution distribution;  // unused for antecedent_moisture
  int line = 0;                            // of its table in the basin file
};

// A level whose exceedance the outputs report ([[uncertainty.threshold]]): the probability that
// a station's peak discharge or peak stage is above it. Value in SI (converted at load).
struct ThresholdDefinition : uncertainty::Threshold {
  int line = 0;  // of its table in the basin file
};

struct EnsembleDefinition {
  std::size_t members = 0;
  int line = 0;  // of the [uncertainty] table
  uncertainty::SamplingMethod method = uncertainty::SamplingMethod::latin_hypercube;
  std::uint64_t seed = 0;
  std::vector<double> percentiles = {5.0, 50.0, 95.0};
  std::vector<VariedParameter> parameters;
  std::vector<ThresholdDefinition> thresholds;
  uncertainty::SampleTable probabilities;  // [member][parameter], drawn at load
};

// One element's value of one varied parameter in one member.
struct MemberValue {
  std::string parameter;  // VariedParameter::name
  std::string element_id;
  std::string field;
  double value = 0.0;  // basin-file units
};

// CN for dry (AMC I) and wet (AMC III) antecedent conditions from CN for average (AMC II)
// conditions (the formulas above).
[[nodiscard]] double curve_number_dry(double cn_average);
[[nodiscard]] double curve_number_wet(double cn_average);

}  // namespace freshet::study
