#include "freshet/network/backwater.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "freshet/network/driver.hpp"
#include "freshet/network/elements.hpp"

namespace freshet::network {

ReachWedge::ReachWedge(std::shared_ptr<const geometry::CrossSection> section,
                       double outlet_invert_m, double bed_slope, double length_m)
    : section_(std::move(section)),
      outlet_invert_m_(outlet_invert_m),
      bed_slope_(bed_slope),
      length_m_(length_m),
      full_depth_m_(section_->full_depth_m().value_or(std::numeric_limits<double>::infinity())) {
  FRESHET_ASSERT(bed_slope_ > 0.0 && length_m_ > 0.0, "a reach's wedge needs slope and length");
}

double ReachWedge::area_integral_m3_per_m(double depth_m) const {
  if (!(depth_m > 0.0)) return 0.0;
  // Above a closed conduit's crown the section holds its full area: integrate to the crown
  // and add the rectangle beyond it.
  const double top = std::min(depth_m, full_depth_m_);
  double beyond = 0.0;
  if (depth_m > top) beyond = section_->area_m2(full_depth_m_) * (depth_m - top);
  // Composite 3-point Gauss-Legendre, 32 panels (Abramowitz and Stegun 1964, Handbook of
  // Mathematical Functions, table 25.4: nodes 0, +-sqrt(3/5), weights 8/9, 5/9).
  constexpr int kPanels = 32;
  const double node = std::sqrt(0.6);
  const double h = top / kPanels;
  double sum = 0.0;
  for (int p = 0; p < kPanels; ++p) {
    const double mid = (p + 0.5) * h;
    sum += (8.0 / 9.0) * section_->area_m2(mid) +
           (5.0 / 9.0) * (section_->area_m2(mid - 0.5 * h * node) +
                          section_->area_m2(mid + 0.5 * h * node));
  }
  return 0.5 * h * sum + beyond;
}

double ReachWedge::volume_m3(double stage_m) const {
  const double at_outlet_m = stage_m - outlet_invert_m_;
  if (!(at_outlet_m > 0.0)) return 0.0;
  const double at_head_m = at_outlet_m - bed_slope_ * length_m_;
  return (area_integral_m3_per_m(at_outlet_m) - area_integral_m3_per_m(at_head_m)) / bed_slope_;
}

std::vector<std::string> represent_backwater(Model& model) {
  std::vector<std::string> without_invert;
  FRESHET_ASSERT(model.topology.downstream.size() == model.elements.size(),
                 "represent_backwater needs the model's topology");
  const std::vector<std::ptrdiff_t>& down = model.topology.downstream;
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    auto* reach = dynamic_cast<ReachElement*>(model.elements[i].get());
    if (!reach || down[i] < 0) continue;
    const auto d = static_cast<std::size_t>(down[i]);
    auto* pool = dynamic_cast<PoolElement*>(model.elements[d].get());
    if (!pool) continue;
    if (!reach->outlet_invert_m()) {
      without_invert.push_back(reach->id());
      continue;
    }
    pool->add_backwater_storage(reach->wedge());
    reach->attach_backwater(*pool);
    model.backwater.push_back({i, d});
  }
  return without_invert;
}

void couple_backwater(Model& model, double time_s) {
  for (const BackwaterLink& link : model.backwater) {
    auto& reach = static_cast<ReachElement&>(*model.elements[link.reach]);
    auto& pool = static_cast<PoolElement&>(*model.elements[link.pool]);
    const double moved_m3 = reach.drown(pool.stage_m(), pool.storage_m3(), time_s);
    pool.exchange_volume(moved_m3);
  }
}

}  // namespace freshet::network
