#include "freshet/reporting/run_report.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <map>

#include "freshet/core/error.hpp"
#include "freshet/reporting/reported_as.hpp"
#include "freshet/routing/applicability.hpp"
#include "freshet/routing/routing_options.hpp"
#include "result_scale.hpp"

namespace freshet::reporting {

namespace {

using network::ElementKind;
using network::StationSample;

// Total inflow against outflow of every reach, pond and culvert (summary.hpp,
// AttenuationRecord): peaks from the recorder's hydrographs, volumes from the ledger.
void add_attenuation(const network::RunSummary& numerics, const RunRecorder& recorder,
                     RunSummary& summary) {
  const std::vector<StationDescription>& stations = recorder.stations();
  for (std::size_t i = 0; i < stations.size(); ++i) {
    if (!is_reach(stations[i].kind) && !is_pool(stations[i].kind)) continue;
    const SummaryAccumulator& in = recorder.inflow(i);
    const SummaryAccumulator& out = recorder.accumulator(i);
    const network::VolumeLedger& l = numerics.balances[i].ledger;
    AttenuationRecord r;
    r.element = stations[i].id;
    r.kind = std::string(network::to_string(stations[i].kind));
    r.peak_inflow_m3s = in.peak_discharge_m3s();
    r.peak_inflow_time_s = in.peak_time_s();
    r.peak_lateral_inflow_m3s = recorder.lateral_inflow(i).peak_discharge_m3s();
    r.peak_outflow_m3s = out.peak_discharge_m3s();
    r.peak_outflow_time_s = out.peak_time_s();
    r.attenuation_m3s = r.peak_inflow_m3s - r.peak_outflow_m3s;
    r.attenuation_percent =
        r.peak_inflow_m3s > 0.0 ? 100.0 * r.attenuation_m3s / r.peak_inflow_m3s : kNotApplicable;
    r.peak_delay_s = r.peak_outflow_time_s - r.peak_inflow_time_s;
    r.peak_storage_m3 = recorder.storage(i).peak_discharge_m3s();
    r.peak_storage_time_s = recorder.storage(i).peak_time_s();
    r.storage_at_outflow_peak_m3 = recorder.at_peak(i).storage_m3;
    r.inflow_volume_m3 = l.inflow_m3 + l.lateral_m3;
    r.lateral_volume_m3 = l.lateral_m3;
    r.outflow_volume_m3 = l.outflow_m3;
    r.storage_change_m3 = l.storage_m3 - l.initial_storage_m3;
    summary.attenuation.push_back(r);
  }
}

// The stretches the recorder watched (summary.hpp, StretchRecord).
void add_stretches(const network::RunSummary& numerics, const RunRecorder& recorder,
                   RunSummary& summary) {
  for (const RunRecorder::Stretch& st : recorder.stretches()) {
    const std::size_t up = st.path.front(), down = st.path.back();
    StretchRecord r;
    r.upstream_id = recorder.stations()[up].id;
    r.downstream_id = recorder.stations()[down].id;
    for (std::size_t i : st.path) r.path.push_back(recorder.stations()[i].id);
    r.upstream_peak_m3s = recorder.accumulator(up).peak_discharge_m3s();
    r.upstream_peak_time_s = recorder.accumulator(up).peak_time_s();
    r.downstream_peak_m3s = recorder.accumulator(down).peak_discharge_m3s();
    r.downstream_peak_time_s = recorder.accumulator(down).peak_time_s();
    r.peak_shift_s = r.downstream_peak_time_s - r.upstream_peak_time_s;
    double side_m3 = 0.0;  // exact, from the ledgers
    for (std::size_t k = 1; k < st.path.size(); ++k) {
      const network::VolumeLedger& l = numerics.balances[st.path[k]].ledger;
      side_m3 += l.inflow_m3 + l.lateral_m3 - numerics.balances[st.path[k - 1]].ledger.outflow_m3;
    }
    r.side_inflow_volume_m3 = side_m3;
    r.side_inflow_peak_m3s = st.side_inflow.peak_discharge_m3s();
    r.side_inflow_peak_time_s = st.side_inflow.peak_time_s();
    r.combined_inflow_peak_m3s = st.combined_inflow.peak_discharge_m3s();
    r.attenuation_m3s = r.combined_inflow_peak_m3s - r.downstream_peak_m3s;
    r.attenuation_percent = r.combined_inflow_peak_m3s > 0.0
                                ? 100.0 * r.attenuation_m3s / r.combined_inflow_peak_m3s
                                : kNotApplicable;
    summary.stretches.push_back(std::move(r));
  }
}

void add_balances(const network::RunSummary& numerics, RunSummary& summary) {
  for (std::size_t i = 0; i < numerics.balances.size(); ++i) {
    const network::VolumeLedger& l = numerics.balances[i].ledger;
    MassBalanceRecord r;
    r.element = numerics.balances[i].id;
    r.inflow_volume_m3 = l.supplied_m3();
    r.outflow_volume_m3 = l.outflow_m3 + l.loss_m3;
    r.storage_change_m3 = l.storage_m3 - l.initial_storage_m3;
    r.error_m3 = l.balance_error_m3();
    r.relative_error = network::relative_imbalance(l);  // as the run's check judges it
    summary.mass_balance.push_back(r);
  }
}

std::string minutes(double t_s) { return format_fixed(t_s / 60.0, 1) + " min"; }

std::string shock_fate(const routing::ShockReport& s, bool grid_free) {
  if (s.reached_outlet) return "reached the outlet at t = " + minutes(s.outlet_arrival_time_s);
  if (s.ended && s.merged) return "merged into a later shock at t = " + minutes(s.end_time_s);
  if (s.ended && grid_free) return "decayed in the reach at t = " + minutes(s.end_time_s);
  if (s.ended) return "faded or merged in the reach after t = " + minutes(s.end_time_s);
  return "still in the reach at the end of the run";
}

std::string fate_key(const routing::ShockReport& s, bool grid_free) {
  if (s.reached_outlet) return "outlet";
  if (s.ended && s.merged) return "merged";
  if (s.ended) return grid_free ? "decayed" : "faded or merged";
  return "in reach";
}

// The kinematic-wave elements of the run: every reach, and every overland plane of every
// subcatchment, with the id and plane name the reports give them.
struct WaveElement {
  std::size_t index = 0;
  std::string plane;  // empty for a reach
  const network::WaveFacts* wave = nullptr;
};
std::vector<WaveElement> wave_elements(const std::vector<network::ElementReport>& reports) {
  std::vector<WaveElement> out;
  for (std::size_t i = 0; i < reports.size(); ++i) {
    switch (reported_as(reports[i].kind)) {
      case ReportedAs::reach:
        out.push_back({i, "", &reports[i].reach().wave});
        break;
      case ReportedAs::subcatchment:
        for (const network::PlaneFacts& p : reports[i].subcatchment().planes) {
          out.push_back({i, p.name, &p.wave});
        }
        break;
      case ReportedAs::pool:
      case ReportedAs::passage:
        break;
    }
  }
  return out;
}

std::string where(const WaveElement& e) { return e.plane.empty() ? "reach" : "plane"; }

std::string breaking_message(const WaveElement& e) {
  const routing::PredictedBreaking& b = e.wave->breaking;
  const std::string length = format_fixed(e.wave->length_m, 0) + " m";
  if (!b.breaks) {
    return "the wave does not break within the " + where(e) + " (" + length +
           ") during the run: the characteristics of its inflow" +
           (e.plane.empty() ? " and lateral inflow" : " and rainfall excess") +
           " do not cross before the outlet by t = " + minutes(b.watched_to_s);
  }
  std::string text = "the wave breaks at t = " + minutes(b.time_s) + ", " +
                     format_fixed(b.chainage_m, 0) + " m below the upstream end (of " + length +
                     "), where the characteristics of its inflow first cross";
  if (b.onto_dry_bed || b.from_zero_inflow) {
    text += std::string(b.onto_dry_bed ? ": the wave runs onto a dry bed" : ": the inflow rises from zero") +
            ", so its leading edge is a shock from the start (with no jump at first; it grows "
            "as it absorbs the rise)";
  } else {
    text += " (launched at t = " + minutes(b.launch_time_s) + ", " +
            format_fixed(b.discharge_behind_m3s, 3) + (e.plane.empty() ? " m3/s" : " m2/s") + ")";
  }
  if (e.wave->grid_free && e.wave->significant_shocks.empty()) {
    text += "; the shock it forms stays below " +
            format_fixed(100.0 * network::kSignificantShockFraction, 0) +
            " % of the peak outflow";
  }
  return text;
}

void add_breaking(const network::Model& model, const std::vector<WaveElement>& waves,
                  RunSummary& summary) {
  for (const WaveElement& e : waves) {
    const routing::PredictedBreaking& b = e.wave->breaking;
    if (!b.watched) continue;
    summary.breaking.push_back({model.links[e.index].id, e.plane, b.breaks,
                                b.breaks ? b.time_s : kNotApplicable,
                                b.breaks ? b.chainage_m : kNotApplicable, e.wave->length_m,
                                breaking_message(e)});
  }
}

void add_shocks(const network::Model& model, const std::vector<WaveElement>& waves,
                RunSummary& summary) {
  for (const WaveElement& e : waves) {
    const bool grid_free = e.wave->grid_free;
    const std::string unit = e.plane.empty() ? " m3/s" : " m2/s";
    for (const network::ShockFacts& f : e.wave->significant_shocks) {
      const routing::ShockReport& s = f.shock;
      ShockRecord r;
      r.element = model.links[e.index].id;
      r.plane = e.plane;
      r.time_s = s.formation_time_s;
      r.chainage_m = s.formation_position_m;
      r.speed_m_s = s.speed_m_s;
      r.rankine_hugoniot_m_s = s.rankine_hugoniot_m_s;
      r.discharge_jump_m3s = f.discharge_jump_m3s;
      r.depth_jump_m = f.depth_jump_m;
      r.fate = fate_key(s, grid_free);
      r.end_time_s = s.reached_outlet ? s.outlet_arrival_time_s : s.end_time_s;
      r.found_by = grid_free ? "fronts" : "grid detector";
      for (std::size_t k = 0; k < s.path.size(); ++k) {
        const routing::ShockSample& p = s.path[k];
        r.path.push_back({p.time_s, p.position_m, p.rankine_hugoniot_m_s,
                          f.path_discharge_jump_m3s[k]});
      }
      r.message = "path speed " + format_fixed(s.speed_m_s, 2) + " m/s (Rankine-Hugoniot " +
                  format_fixed(s.rankine_hugoniot_m_s, 2) + " m/s); largest jump " +
                  format_fixed(f.discharge_jump_m3s, 2) + unit + " and " +
                  format_fixed(f.depth_jump_m, 2) + " m of depth at t = " +
                  minutes(f.jump_time_s) + "; " + shock_fate(s, grid_free) +
                  (grid_free ? " (from the fronts)" : " (from the grid detector)");
      summary.shocks.push_back(std::move(r));
    }
  }
}

// Where a grid cannot show a shock that the characteristics predict, or shows one they do
// not, the report says so instead of staying silent.
void add_resolution_warnings(const network::Model& model, const std::vector<WaveElement>& waves,
                             double coupling_step_s, RunSummary& summary) {
  for (const WaveElement& e : waves) {
    const network::WaveFacts& w = *e.wave;
    if (w.grid_free || !w.breaking.watched) continue;
    const std::string& id = model.links[e.index].id;
    const std::string what = e.plane.empty() ? "" : "plane " + e.plane + ": ";
    const std::string grid = std::to_string(w.cell_count) + " cells of " +
                             format_fixed(w.cell_width_m, 1) + " m, coupling step " +
                             format_fixed(coupling_step_s, 0) + " s";
    const routing::PredictedBreaking& b = w.breaking;
    if (b.breaks && w.length_m - b.chainage_m < w.front_cells * w.cell_width_m) {
      summary.warnings.push_back(
          {id, what + "the wave breaks " + format_fixed(w.length_m - b.chainage_m, 0) +
                   " m above the outlet, within the " + std::to_string(w.front_cells) +
                   " cells over which the " + w.scheme + " scheme smears a front (" + grid +
                   "): this grid cannot resolve the shock before it leaves; use shorter cells "
                   "or the characteristics scheme"});
    } else if (b.breaks && w.significant_shocks.empty() && !b.onto_dry_bed && !b.from_zero_inflow) {
      summary.warnings.push_back(
          {id, what + "the characteristics of the inflow cross at t = " + minutes(b.time_s) +
                   ", " + format_fixed(b.chainage_m, 0) +
                   " m below the upstream end, so a kinematic shock forms there, but this "
                   "grid (" + grid + ") showed no front of " +
                   format_fixed(100.0 * network::kSignificantShockFraction, 0) +
                   " % of the peak outflow or more: the shock stays small, or the grid cannot "
                   "resolve it; the characteristics scheme shows it from its fronts"});
    } else if (!b.breaks && !w.significant_shocks.empty()) {
      summary.warnings.push_back(
          {id, what + "the grid detector reported a shock, but the characteristics of the "
                      "inflow do not cross within the " + where(e) +
                      " during the run: it is more likely a steep front of the grid (" + grid +
                      ") than a shock"});
    }
  }
}

// A pond whose level rises above the water level at the outlet of the reach feeding it backs
// water up the reach, which the kinematic wave cannot carry upstream.
void add_backwater_warning(const network::Model& model,
                           const RunRecorder& recorder,
                           const std::vector<StationDescription>& stations,
                           std::size_t i,
                           const network::ReachFacts& reach,
                           RunSummary& summary,
                           bool diffusion_wave) {
  const std::ptrdiff_t down = model.topology.downstream[i];
  if (down < 0) return;
  const auto d = static_cast<std::size_t>(down);
  if (!is_pool(model.links[d].kind)) return;
  const std::string& id = model.links[i].id;
  if (!stations[i].stage_is_elevation) {
    summary.warnings.push_back({id,
                                "drains into the pond at '" + model.links[d].id +
                                    "' but has no outlet_invert, so "
                                    "backwater from the pond could not be checked"});
    return;
  }
  if (reach.backwater.represented) {
    // backwater = "level-pool": the drowned length follows the pool's level (its stations
    // report that level), so the warning says what was represented and what was not.
    const network::BackwaterFacts& b = reach.backwater;
    if (b.most_drowned_cells == 0) return;
    summary.warnings.push_back(
        {id, "the pond at '" + model.links[d].id + "' drowned up to " +
                 format_fixed(b.longest_drowned_m, 0) + " m of this reach's " +
                 format_fixed(reach.length_m, 0) + " m (at t = " +
                 format_fixed(b.time_longest_drowned_s / 60.0, 0) + " min, pond level " +
                 format_fixed(b.stage_then_m, 2) +
                 " m): represented as a level pool over the drowned length (flat water "
                 "surface, the reach's volume below the level added to the pond's storage); "
                 "the backwater curve above it is not: check with a dynamic-wave model where "
                 "stages upstream matter"});
    return;
  }
  const double excess_m = recorder.backwater_excess_m(i);
  if (!(excess_m > 0.0)) return;
  summary.warnings.push_back({id,
                              "the pond at '" + model.links[d].id + "' stood up to " +
                                  format_fixed(excess_m, 2) +
                                  " m above this reach's computed outlet water level (at t = " +
                                  format_fixed(recorder.backwater_time_s(i) / 60.0, 0) +
                                  " min): backwater into the "
                                  "reach is not represented by the kinematic wave (set "
                                  "backwater = \"level-pool\" in [study] to represent it as a "
                                  "level pool)" +
                                  (diffusion_wave ? " (nor by the diffusion wave this reach "
                                                    "was routed with)"
                                                  : std::string())});
}

// The reach was routed by a diffusion-wave scheme (muskingum-cunge), not a kinematic one.
bool routes_diffusion(const network::ReachFacts& reach) {
  return routing::routes_diffusion_wave(routing::parse_scheme_kind(reach.diagnostics.scheme));
}

// Which wave each reach was routed by, and why: here the basin file's choice; a run with
// wave_choice = "automatic" gives its own reasons (study_run.cpp).
void add_methods(const network::Model& model, const std::vector<network::ElementReport>& reports,
                 RunSummary& summary) {
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    if (!is_reach(reports[i].kind)) continue;
    const network::ReachFacts& reach = reports[i].reach();
    summary.methods.push_back({model.links[i].id, reach.diagnostics.scheme,
                               routes_diffusion(reach) ? "diffusion" : "kinematic",
                               "as given in the basin file"});
  }
}

// Kinematic-wave applicability per reach, backwater from pools, conduits at capacity.
void add_warnings(const network::Model& model,
                  const std::vector<network::ElementReport>& reports,
                  const RunRecorder& recorder,
                  const std::vector<StationDescription>& stations,
                  RunSummary& summary) {
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    if (!is_reach(reports[i].kind)) continue;
    const network::ReachFacts& reach = reports[i].reach();
    const StationSample& p = recorder.at_peak(i);
    const double tp_s = recorder.rise_duration_s(i);
    const double slope = reach.bed_slope;
    if (p.depth_m > 0.0 && p.velocity_m_s > 0.0 && tp_s > 0.0 && slope > 0.0) {
      // Ponce (1989) in the time-of-rise form (routing/applicability.hpp).
      const routing::WaveApplicability a =
          routing::wave_applicability(tp_s, slope, p.velocity_m_s, p.depth_m);
      summary.wave_numbers.push_back(
          {model.links[i].id, tp_s, a.kinematic_number, a.diffusion_number});
      const auto number = [](double x) { return format_fixed(x, x < 10.0 ? 2 : 1); };
      if (routes_diffusion(reach)) {
        // Routed by the diffusion wave: in doubt only outside the diffusion wave's range.
        if (!a.diffusion_ok) {
          summary.warnings.push_back(
              {model.links[i].id,
               "routed by the diffusion wave, but t_r S0 (g/d0)^0.5 = " +
                   number(a.diffusion_number) +
                   " < 15 (Ponce, Li & Simons 1978; Ponce 1989): inertia matters here and even "
                   "the diffusion wave is doubtful; check with a dynamic-wave model"});
        }
      } else if (!a.kinematic_ok) {
        std::string message =
            "time-of-rise number t_r S0 u0/d0 = " + number(a.kinematic_number) +
            " < 85 (Ponce, Li & Simons 1978; Ponce 1989): the kinematic wave may misstate "
            "attenuation here; ";
        message += a.diffusion_ok
                       ? "a diffusion wave would apply (t_r S0 (g/d0)^0.5 = " +
                             number(a.diffusion_number) +
                             " >= 15): route it with scheme = \"muskingum-cunge\", or set "
                             "wave_choice = \"automatic\""
                       : "even a diffusion wave is doubtful (t_r S0 (g/d0)^0.5 = " +
                             number(a.diffusion_number) + " < 15); check with a dynamic-wave model";
        summary.warnings.push_back({model.links[i].id, std::move(message)});
      }
    }
    if (reach.capacity_steps > 0) {
      std::string message =
          "conduit reached its part-full capacity; surcharge is not represented and inflow "
          "above capacity is held back in the reach";
      if (reach.peak_volume_above_full_m3 > 0.0) {
        message += ": it held up to " + format_fixed(reach.peak_volume_above_full_m3, 0) +
                   " m3 above its full volume of " + format_fixed(reach.full_volume_m3, 0) +
                   " m3 (at t = " +
                   format_fixed(reach.time_of_peak_volume_above_full_s / 60.0, 0) +
                   " min), water that would in fact surcharge the pipe or flood at manholes; "
                   "flows below it are delayed and lowered accordingly";
      }
      summary.warnings.push_back({model.links[i].id, std::move(message)});
    }
    add_backwater_warning(model, recorder, stations, i, reach, summary, routes_diffusion(reach));
  }
}

// Elements exchange flows once per coupling step and peaks are taken at step ends, so a rise
// shorter than two steps is under-resolved: its peak can be missed here and smoothed below.
// (Our criterion, no source: two steps is the fewest that can show a rise and a peak.)
void add_coupling_step_warnings(const RunRecorder& recorder,
                                const std::vector<StationDescription>& stations,
                                double coupling_step_s,
                                RunSummary& summary) {
  for (std::size_t i = 0; i < stations.size(); ++i) {
    if (!is_reach(stations[i].kind) && !is_subcatchment(stations[i].kind)) continue;
    const SummaryAccumulator& acc = recorder.accumulator(i);
    if (acc.sample_count() < 2 || !(acc.peak_discharge_m3s() > acc.first_discharge_m3s())) {
      continue;
    }
    const double rise_s = recorder.rise_duration_s(i);
    if (!(rise_s < 2.0 * coupling_step_s)) continue;
    summary.warnings.push_back(
        {stations[i].id, "its discharge rises to the peak in " + format_fixed(rise_s, 0) +
                             " s, less than two coupling steps (of " +
                             format_fixed(coupling_step_s, 1) + " s): the peak may be missed here "
                             "and smoothed downstream; set coupling_step_s to at most " +
                             format_value(std::max(1.0, std::floor(rise_s / 4.0))) + " s"});
  }
}

// A station whose discharge is still at its highest when the run ends may not have peaked.
void add_end_of_run_warnings(const RunRecorder& recorder,
                             const std::vector<StationDescription>& stations,
                             RunSummary& summary) {
  for (std::size_t i = 0; i < stations.size(); ++i) {
    const SummaryAccumulator& acc = recorder.accumulator(i);
    if (acc.sample_count() < 2 || acc.peak_time_s() < acc.last_time_s()) continue;
    const double rise_m3s = acc.peak_discharge_m3s() - acc.first_discharge_m3s();
    if (!(rise_m3s > 1e-9 * std::max(1.0, acc.peak_discharge_m3s()))) continue;
    summary.warnings.push_back(
        {stations[i].id, "discharge is still at its highest when the run ends (t = " +
                             format_fixed(acc.last_time_s() / 3600.0, 2) +
                             " h): the peak may come later; lengthen duration_h"});
  }
}

// The per-station peaks for the cross-storm and cross-scenario tables, with the road
// overtopping of every culvert crossing.
std::vector<StationPeak> station_peaks(const std::vector<network::ElementReport>& reports,
                                       const RunSummary& summary,
                                       const std::vector<StationDescription>& stations) {
  std::vector<StationPeak> peaks;
  for (std::size_t i = 0; i < stations.size(); ++i) {
    const StationSummary& st = summary.stations[i];
    StationPeak p{st.station_id,
                  st.name,
                  stations[i].kind,
                  st.peak_discharge_m3s,
                  st.peak_time_s,
                  st.peak_stage_m,
                  stations[i].stage_is_elevation,
                  st.runoff_volume_m3,
                  "",
                  kNotApplicable};
    if (is_pool(reports[i].kind) && reports[i].pool().crossing) {
      const network::structures::CrossingReport& r = *reports[i].pool().crossing;
      p.overtopping_s = r.road_overtopped ? r.overtopping_duration_s : 0.0;
      p.overtopping =
          r.road_overtopped ? format_fixed(r.overtopping_duration_s / 60.0, 0) + " min" : "no";
    }
    peaks.push_back(std::move(p));
  }
  return peaks;
}

std::vector<std::pair<std::string, routing::RunDiagnostics>> reach_numerics(
    const network::Model& model, const std::vector<network::ElementReport>& reports) {
  std::vector<std::pair<std::string, routing::RunDiagnostics>> out;
  for (std::size_t i = 0; i < reports.size(); ++i) {
    if (is_reach(reports[i].kind)) out.emplace_back(model.links[i].id, reports[i].reach().diagnostics);
  }
  return out;
}

std::string shock_note(const ShockRecord& r) {
  return std::string(r.plane.empty() ? "" : "plane " + r.plane + ": ") +
         "kinematic shock formed at t = " + minutes(r.time_s) + ", " +
         format_fixed(r.chainage_m, 0) + " m downstream; " + r.message;
}

std::string capacity_note(const network::ReachFacts& reach) {
  std::string text = "conduit at capacity for " + std::to_string(reach.capacity_steps) +
                     " coupling step(s): surcharge is not represented by the kinematic wave; "
                     "peak flows above capacity are held back";
  if (reach.peak_volume_above_full_m3 > 0.0) {
    text += "; up to " + format_fixed(reach.peak_volume_above_full_m3, 0) +
            " m3 above its full volume (" + format_fixed(reach.full_volume_m3, 0) +
            " m3) at t = " + format_fixed(reach.time_of_peak_volume_above_full_s / 60.0, 0) +
            " min";
  }
  return text;
}

std::string crossing_note(const network::structures::CrossingReport& r) {
  std::string text =
      "peak headwater " + format_fixed(r.peak_headwater_stage_m, 2) + " m (" +
      format_fixed(r.peak_headwater_depth_m, 2) +
      " m above the inlet invert) at t = " + format_fixed(r.time_of_peak_headwater_s / 60.0, 1) +
      " min, " + (r.control_at_peak == network::structures::Control::inlet ? "inlet" : "outlet") +
      " control; ";
  text += r.road_overtopped
              ? "road overtopped for " + format_fixed(r.overtopping_duration_s / 60.0, 1) +
                    " min (" + format_fixed(r.overtopping_discharge_at_peak_m3s, 2) +
                    " m3/s over the road at the peak)"
              : "road not overtopped";
  if (r.stage_beyond_rating) text += "; WARNING: headwater above the tabulated rating";
  return text;
}

std::string detention_note(const network::structures::DetentionReport& r,
                           double peak_inflow_m3s) {
  return "peak stage " + format_fixed(r.peak_stage_m, 2) + " m at t = " +
         format_fixed(r.time_of_peak_stage_s / 60.0, 1) + " min, peak storage " +
         format_fixed(r.peak_storage_m3, 0) + " m3, peak outflow " +
         format_fixed(r.peak_outflow_m3s, 3) + " m3/s (peak inflow " +
         format_fixed(peak_inflow_m3s, 3) + " m3/s)";
}

// What each element found (shocks, conduits at capacity, culvert headwater and overtopping,
// detention peaks), one line of text each, in network order.
std::vector<std::pair<std::string, std::string>> element_notes(
    const network::Model& model, const std::vector<network::ElementReport>& reports,
    const RunSummary& summary) {
  std::vector<std::pair<std::string, std::string>> out;
  for (std::size_t i = 0; i < reports.size(); ++i) {
    const std::string& id = model.links[i].id;
    for (const ShockRecord& r : summary.shocks) {
      if (r.element == id) out.emplace_back(id, shock_note(r));
    }
    switch (reported_as(reports[i].kind)) {
      case ReportedAs::reach: {
        const network::ReachFacts& reach = reports[i].reach();
        if (reach.capacity_steps > 0) out.emplace_back(id, capacity_note(reach));
        break;
      }
      case ReportedAs::pool: {
        const network::PoolFacts& pool = reports[i].pool();
        if (pool.crossing) out.emplace_back(id, crossing_note(*pool.crossing));
        if (pool.detention) {
          out.emplace_back(id, detention_note(*pool.detention, pool.peak_inflow_m3s));
        }
        break;
      }
      case ReportedAs::subcatchment:
      case ReportedAs::passage:
        break;
    }
  }
  return out;
}

}  // namespace

RunReport report_run(const network::Model& model, const network::RunSummary& numerics,
                     const RunRecorder& recorder, const ReportContext& context) {
  const std::vector<StationDescription>& stations = recorder.stations();
  std::vector<network::ElementReport> reports;
  reports.reserve(model.elements.size());
  for (const auto& e : model.elements) reports.push_back(e->report());
  RunReport out;
  RunSummary& s = out.summary;
  s.title = context.title;
  s.source = context.source;
  s.time_origin_iso = context.time_origin_iso;
  for (std::size_t i = 0; i < stations.size(); ++i) {
    // Centroid lag: from the centroid of the rainfall excess upstream of the station.
    StationSummary st = recorder.accumulator(i).station_summary(
        stations[i].id, stations[i].name, recorder.excess_centroid_s(i));
    st.runoff_volume_m3 = numerics.balances[i].ledger.outflow_m3;  // exact, from the ledger
    s.stations.push_back(st);
  }
  add_attenuation(numerics, recorder, s);
  add_stretches(numerics, recorder, s);
  const std::vector<WaveElement> waves = wave_elements(reports);
  add_breaking(model, waves, s);
  add_shocks(model, waves, s);
  add_balances(numerics, s);
  add_methods(model, reports, s);
  add_warnings(model, reports, recorder, stations, s);
  add_end_of_run_warnings(recorder, stations, s);
  add_coupling_step_warnings(recorder, stations, context.clock.coupling_step_s(), s);
  add_resolution_warnings(model, waves, context.clock.coupling_step_s(), s);
  detail::add_result_scale_warnings(model, reports, s);
  // Each element's warnings together, in network order.
  std::map<std::string, std::size_t, std::less<>> order;
  for (std::size_t i = 0; i < stations.size(); ++i) order.emplace(stations[i].id, i);
  std::stable_sort(s.warnings.begin(), s.warnings.end(),
                   [&order](const ApplicabilityWarning& a, const ApplicabilityWarning& b) {
                     const auto ia = order.find(a.element), ib = order.find(b.element);
                     const std::size_t ka = ia == order.end() ? order.size() : ia->second;
                     const std::size_t kb = ib == order.end() ? order.size() : ib->second;
                     return ka < kb;
                   });
  out.peaks = station_peaks(reports, s, stations);
  out.reach_numerics = reach_numerics(model, reports);
  out.notes = element_notes(model, reports, s);
  out.elements = std::move(reports);
  out.series = recorder.output_series();
  return out;
}

}  // namespace freshet::reporting
