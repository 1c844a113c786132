// The shared set-ups of the verification cases and the module tests (problems.hpp, which
// names each source).
#include "freshet/verification/problems.hpp"

#include <cmath>
#include <numbers>

#include "freshet/core/units.hpp"
#include "freshet/network/structures/outlets.hpp"
#include "freshet/network/structures/stage_storage.hpp"

namespace freshet::verification {

std::shared_ptr<const geometry::CrossSection> ChowTrapezoidExample::section() const {
  return geometry::make_section(
      geometry::section_spec_to_si(spec_ft, units::System::us_customary),
      "Chow example channel");
}

double ChowTrapezoidExample::discharge_m3s() const {
  return units::discharge_to_m3s(discharge_cfs, units::System::us_customary);
}

geometry::PowerLawFlux wide_channel() {
  return {std::sqrt(0.002) / (0.03 * std::pow(20.0, 2.0 / 3.0)), 5.0 / 3.0};
}

std::vector<double> RiemannProblem::initial_areas_m2(int cells) const {
  const double dx = length_m / cells;
  std::vector<double> a(static_cast<std::size_t>(cells));
  for (std::size_t i = 0; i < a.size(); ++i) {
    a[i] = (static_cast<double>(i) + 0.5) * dx < x_jump_m ? a_left_m2 : a_right_m2;
  }
  return a;
}

double RiemannProblem::shock_speed_m_s(const geometry::PowerLawFlux& law) const {
  return (law.discharge_m3s(a_left_m2) - law.discharge_m3s(a_right_m2)) /
         (a_left_m2 - a_right_m2);
}

double RiemannProblem::rarefaction_area_m2(const geometry::PowerLawFlux& law,
                                           double xi_m_s) const {
  if (xi_m_s <= law.celerity_m_s(a_left_m2)) return a_left_m2;
  if (xi_m_s >= law.celerity_m_s(a_right_m2)) return a_right_m2;
  const double m = law.exponent();
  return std::pow(xi_m_s / (m * law.alpha()), 1.0 / (m - 1.0));
}

double BurgersBump::initial_area_m2(double x_m) const {
  const double u = (x_m - centre_m) / width_m;
  return 1.0 + std::exp(-u * u);
}

double BurgersBump::breaking_time_s() const { return width_m * std::exp(0.5) / std::sqrt(2.0); }

double BurgersBump::breaking_position_m() const {
  const double origin = centre_m + width_m / std::sqrt(2.0);
  return origin + initial_area_m2(origin) * breaking_time_s();
}

double PonceReach::kinematic_boundary_rise_s() const {
  return kinematic_period_number * depth_m / (bed_slope * velocity_m_s) / 2.0;
}

hydrology::GreenAmptParameters silt_loam() {
  constexpr double kCm_m = 0.01, kHour_s = 3600.0;
  return {.hydraulic_conductivity_m_s = 0.65 * kCm_m / kHour_s,
          .suction_head_m = 16.7 * kCm_m,
          .porosity = 0.501,
          .effective_porosity = 0.486,
          .initial_effective_saturation = 0.3};
}

hydrology::OverlandPlaneSpec kinematic_test_plane(int cells) {
  return {.name = "test-lawn", .length_m = 100.0, .slope = 0.01, .manning_n = 0.1,
          .cell_count = cells};
}

ChowDetentionExample::ChowDetentionExample()
    : outflow_cfs{0,   3,   8,   17,  30,  43,  60,  78,  97,  117, 137,
                  156, 173, 190, 205, 218, 231, 242, 253, 264, 275},
      inflow_cfs{0, 60, 120, 180, 240, 300, 360, 320, 280, 240, 200,
                 160, 120, 80, 40, 0, 0, 0, 0, 0, 0, 0} {
  for (std::size_t k = 0; k < outflow_cfs.size(); ++k) {
    stage_ft.push_back(0.5 * static_cast<double>(k));
  }
}

std::vector<double> ChowDetentionExample::storage_m3() const {
  std::vector<double> out;
  for (double h : stage_ft) out.push_back(area_ft2 * h * units::kCubicMetresPerCubicFoot);
  return out;
}

std::vector<double> ChowDetentionExample::outflow_m3s() const {
  std::vector<double> out;
  for (double q : outflow_cfs) out.push_back(q * units::kCubicMetresPerCubicFoot);
  return out;
}

std::vector<double> ChowDetentionExample::inflow_m3s() const {
  std::vector<double> out;
  for (double q : inflow_cfs) out.push_back(q * units::kCubicMetresPerCubicFoot);
  return out;
}

network::structures::LevelPool linear_reservoir(double k_s,
                                                network::structures::LevelPoolOptions options) {
  using namespace network::structures;
  return LevelPool("linear reservoir", StageStorage::prismatic(0.0, 1.0, 0.0, "lr"),
                   [k_s](double h) { return h > 0.0 ? h / k_s : 0.0; }, options);
}

network::structures::LevelPool WeirPool::make(double max_substep_s) const {
  using namespace network::structures;
  const RectangularWeir weir{.crest_stage_m = crest_stage_m, .length_m = length_m,
                             .coefficient_si = coefficient_si};
  LevelPoolOptions options;
  options.max_substep_s = max_substep_s;
  return LevelPool("pond", StageStorage::prismatic(crest_stage_m, area_m2, 0.0, "pond"),
                   [weir](double h) { return weir.discharge_m3s(h); }, options);
}

double WeirPool::equilibrium_head_m(double inflow_m3s) const {
  return std::pow(inflow_m3s / (coefficient_si * length_m), 2.0 / 3.0);
}

double WeirPool::draining_head_m(double initial_head_m, double t_s) const {
  return initial_head_m /
         std::pow(1.0 + coefficient_si * length_m * std::sqrt(initial_head_m) * t_s /
                            (2.0 * area_m2),
                  2.0);
}

network::structures::CulvertSpec concrete_pipe(double d_m, double length_m, double fall_m) {
  using namespace network::structures;
  CulvertSpec s;
  s.shape = BarrelShape::circular;
  s.rise_m = d_m;
  s.length_m = length_m;
  s.inlet_invert_stage_m = 100.0;
  s.outlet_invert_stage_m = 100.0 - fall_m;
  s.manning_n = 0.012;
  s.inlet = InletType::concrete_square_edge_headwall;
  return s;
}

double hds5_submerged_headwater_m(double discharge_m3s, double d_m, double slope) {
  const double area = std::numbers::pi * d_m * d_m / 4.0;
  const double x = 1.811 * discharge_m3s / (area * std::sqrt(d_m));
  return d_m * (0.0398 * x * x + 0.67 - 0.5 * slope);
}

}  // namespace freshet::verification
