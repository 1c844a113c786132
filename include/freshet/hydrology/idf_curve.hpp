// Intensity-duration-frequency (IDF) relation of one return period: the average intensity
// i(t_d) of the most intense rain of duration t_d, and the depth P(t_d) = i(t_d) t_d.
//
// Two forms:
//   * the formula i = a / (t + b)^c, in the units it is usually published in: t in MINUTES,
//     i in MILLIMETRES PER HOUR, b in minutes, a in (mm/h) min^c; 0 < c <= 1, b >= 0;
//   * a table of (duration s, intensity m/s) points, interpolated linearly in log i vs log t
//     and extrapolated with the slope of the end segments.
// Every query takes and returns SI (seconds, m/s, m).
//
//   IdfCurve idf = IdfCurve::from_formula({.a = 2000.0, .b_min = 10.0, .c = 0.8}, "idf 'T10'");
//   idf.intensity_m_s(3600.0);   // 2000 / 70^0.8 mm/h, in m/s
//   idf.depth_m(3600.0);         // that intensity times one hour
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace freshet::hydrology {

// i [mm/h] = a / (t [min] + b_min)^c.
struct IdfFormula {
  double a = 0.0;      // (mm/h) * min^c, > 0
  double b_min = 0.0;  // min, >= 0
  double c = 0.0;      // dimensionless, in (0, 1] so that depth never decreases with duration
};

class IdfCurve {
 public:
  // Throw InputError naming `what` for parameters out of range (all problems at once).
  static IdfCurve from_formula(const IdfFormula& formula, const std::string& what = "idf");
  // At least two points; durations > 0 strictly increasing; intensities > 0 and finite; the
  // depth i*t must not decrease from one point to the next.
  static IdfCurve from_table(std::vector<double> durations_s, std::vector<double> intensity_m_s,
                             const std::string& what = "idf");

  // Average intensity (m/s) over the most intense window of duration_s > 0.
  [[nodiscard]] double intensity_m_s(double duration_s) const;
  // Depth P(t_d) = i(t_d) t_d (m); 0 for duration_s <= 0.
  [[nodiscard]] double depth_m(double duration_s) const;
  // The formula, when the curve was built from one.
  [[nodiscard]] const std::optional<IdfFormula>& formula() const { return formula_; }

 private:
  IdfCurve() = default;
  [[nodiscard]] double table_intensity_m_s(double duration_s) const;

  std::optional<IdfFormula> formula_;
  std::vector<double> log_duration_;   // table form: ln(t / 1 s)
  std::vector<double> log_intensity_;  // table form: ln(i / 1 m/s)
};

}  // namespace freshet::hydrology
