#include "freshet/io/study_run.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <functional>
#include <limits>
#include <map>
#include <optional>

#include "freshet/core/caution.hpp"
#include "freshet/io/csv_series.hpp"
#include "freshet/io/netcdf_writer.hpp"
#include "freshet/io/series_resample.hpp"
#include "freshet/io/summary_writer.hpp"
#include "freshet/network/elements.hpp"
#include "freshet/routing/applicability.hpp"
#include "reported_as.hpp"
#include "result_scale.hpp"
#include "run_watch.hpp"

namespace freshet::io {

namespace {

using network::ElementKind;
using network::StationSample;

using detail::is_pool;
using detail::is_reach;
using detail::is_subcatchment;
using detail::reported_as;
using detail::ReportedAs;

// Streams station samples to the two NetCDF files and keeps per-station accumulators.
class StudySink final : public network::RecordSink {
 public:
  StudySink(const std::vector<StationDescription>& stations, const network::Model& model,
            const CancelFn& cancel)
      : cancel_(cancel),
        stations_(stations),
        acc_(stations.size()),
        at_peak_(stations.size()),
        watch_(model, stations) {
    for (std::size_t i = 0; i < stations.size(); ++i) {
      (is_subcatchment(stations[i].kind) ? sub_index_ : channel_index_).push_back(i);
    }
  }

  void record(double time_s, std::span<const StationSample> samples) override {
    observe(time_s, samples);
    if (channel_) write_channel(time_s, samples);
    if (sub_) write_sub(time_s, samples);
    if (after_record) after_record(time_s);
  }

  std::function<void(double)> after_record;  // extra writers (profiles)
  void set_writers(NetcdfTimeSeriesWriter* channel, NetcdfTimeSeriesWriter* sub) {
    channel_ = channel;
    sub_ = sub;
  }

  // Every coupling step feeds the peak and volume accumulators (finer than the output).
  [[nodiscard]] bool observes_every_step() const override { return true; }
  void observe(double time_s, std::span<const StationSample> samples) override {
    if (cancel_ && cancel_()) throw RunInterrupted("the run was stopped before it finished");
    watch_.observe(time_s, samples);
    for (auto& [i, kept] : exports_) {
      kept.times_s.push_back(time_s);
      kept.discharge_m3s.push_back(samples[i].discharge_m3s);
      kept.volume_m3.push_back(samples[i].outflow_volume_m3);
    }
    for (std::size_t i = 0; i < samples.size(); ++i) {
      const StationSample& s = samples[i];
      const double peak_time_before = acc_[i].peak_time_s();
      acc_[i].add_sample(time_s, s.discharge_m3s, s.stage_m);
      if (acc_[i].sample_count() == 1 || acc_[i].peak_time_s() != peak_time_before) {
        at_peak_[i] = s;
      }
    }
  }

  [[nodiscard]] const SummaryAccumulator& accumulator(std::size_t i) const { return acc_[i]; }
  [[nodiscard]] const StationSample& at_peak(std::size_t i) const { return at_peak_[i]; }
  [[nodiscard]] const detail::RunWatch& watch() const { return watch_; }
  [[nodiscard]] const std::vector<std::size_t>& channel_index() const { return channel_index_; }
  [[nodiscard]] const std::vector<std::size_t>& sub_index() const { return sub_index_; }
  // Keeps the full discharge series of station i (every coupling step) for export, with the
  // volume that has left it so far (exact, from its ledger).
  void keep_series(std::size_t i) { exports_[i]; }
  [[nodiscard]] PiecewiseLinearSeries series(std::size_t i, const std::string& what) const {
    const KeptSeries& k = exports_.at(i);
    return PiecewiseLinearSeries(k.times_s, k.discharge_m3s, what);
  }
  [[nodiscard]] PiecewiseLinearSeries volume_series(std::size_t i, const std::string& what) const {
    const KeptSeries& k = exports_.at(i);
    return PiecewiseLinearSeries(k.times_s, k.volume_m3, what);
  }

 private:
  void write_channel(double time_s, std::span<const StationSample> samples) {
    const std::size_t n = channel_index_.size();
    row_.assign(4 * n, 0.0);
    for (std::size_t k = 0; k < n; ++k) {
      const StationSample& s = samples[channel_index_[k]];
      row_[k] = s.discharge_m3s;
      row_[n + k] = s.stage_m;
      row_[2 * n + k] = s.depth_m;
      row_[3 * n + k] = s.velocity_m_s;
    }
    channel_->record(time_s, row_);
  }

  void write_sub(double time_s, std::span<const StationSample> samples) {
    const std::size_t n = sub_index_.size();
    row_.assign(3 * n, 0.0);
    for (std::size_t k = 0; k < n; ++k) {
      const StationSample& s = samples[sub_index_[k]];
      row_[k] = s.discharge_m3s;
      row_[n + k] = s.rain_m_s;  // SI; the writer stores mm h-1
      row_[2 * n + k] = s.excess_m_s;
    }
    sub_->record(time_s, row_);
  }

  const CancelFn& cancel_;  // polled at every coupling step
  const std::vector<StationDescription>& stations_;
  NetcdfTimeSeriesWriter* channel_ = nullptr;
  NetcdfTimeSeriesWriter* sub_ = nullptr;
  std::vector<SummaryAccumulator> acc_;
  std::vector<StationSample> at_peak_;
  std::vector<std::size_t> channel_index_;
  std::vector<std::size_t> sub_index_;
  std::vector<double> row_;
  detail::RunWatch watch_;
  struct KeptSeries {
    std::vector<double> times_s, discharge_m3s, volume_m3;
  };
  std::map<std::size_t, KeptSeries> exports_;
};

std::string now_iso() {
  const std::time_t t = std::time(nullptr);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&t));
  return buf;
}

constexpr const char* kReferences =
    "Kinematic-wave routing: Lighthill & Whitham (1955) Proc. R. Soc. A 229; conservative "
    "upwind finite volumes: LeVeque (2002) Finite Volume Methods for Hyperbolic Problems; "
    "Manning's law and sections: Chow (1959) Open-Channel Hydraulics; losses and design storms: "
    "NRCS (1986) TR-55, Chow, Maidment & Mays (1988) Applied Hydrology, Keifer & Chu (1957); "
    "culverts: FHWA HDS-5 (Schall et al. 2012); applicability: Ponce, Li & Simons (1978).";

NetcdfRunMetadata metadata(const Study& study, const RunRequest& req, const std::string& what) {
  NetcdfRunMetadata m;
  m.title = study.settings().title + " - " + what + ", storm " + req.storm_id +
            (req.scenario_id.empty() ? ", base" : ", scenario " + req.scenario_id);
  m.summary = "Kinematic-wave routing results computed by freshet from " + study.file().string();
  m.source = req.source;
  m.history = now_iso() + " " + req.history;
  m.references = kReferences;
  m.comment = "Times are seconds since the study start; design storms begin at the study start.";
  m.time_origin = study.settings().start_iso;
  m.date_created = now_iso();
  return m;
}

InstanceSet instances(const std::vector<StationDescription>& stations,
                      const std::vector<std::size_t>& index,
                      std::string kind) {
  InstanceSet set;
  set.kind = std::move(kind);
  for (std::size_t i : index) {
    InstanceInfo info;
    info.id = stations[i].id;
    info.name = stations[i].name;
    if (is_reach(stations[i].kind)) info.reach_id = stations[i].id;
    set.instances.push_back(info);
  }
  // Stage mixes elevations and depths (see the variable's long_name), so no datum is claimed.
  return set;
}

}  // namespace

std::filesystem::path run_folder(const RunRequest& request) {
  return request.out_dir / (request.scenario_id.empty() ? "base" : request.scenario_id);
}

namespace {

// Where one run's files go, under their final names: planned_output_files() and the writers
// take every name from here.
struct RunPaths {
  std::filesystem::path folder;
  std::string storm;

  [[nodiscard]] std::filesystem::path stations_nc() const { return folder / (storm + ".nc"); }
  [[nodiscard]] std::filesystem::path subcatchments_nc() const {
    return folder / (storm + "_subcatchments.nc");
  }
  [[nodiscard]] std::filesystem::path profiles_nc() const {
    return folder / (storm + "_profiles.nc");
  }
  [[nodiscard]] std::filesystem::path summary_prefix() const {
    return folder / (storm + "_summary");
  }
  [[nodiscard]] std::filesystem::path summary_json() const {
    return folder / (storm + "_summary.json");
  }
  [[nodiscard]] std::filesystem::path export_csv(const std::string& station_id) const {
    return folder / (storm + "_" + station_id + "_hydrograph.csv");
  }
};

RunPaths run_paths(const RunRequest& request) { return {run_folder(request), request.storm_id}; }

}  // namespace

std::vector<std::filesystem::path> planned_output_files(const Study& study,
                                                        const RunRequest& request) {
  const RunPaths at = run_paths(request);
  std::vector<std::filesystem::path> files = summary_csv_paths(at.summary_prefix());
  files.push_back(at.summary_json());
  for (const auto& id : request.export_stations) files.push_back(at.export_csv(id));
  bool channel = false, subcatchment = false;
  for (const auto& s : study.stations(request.scenario_id)) {
    (is_subcatchment(s.kind) ? subcatchment : channel) = true;
  }
  if (channel) files.push_back(at.stations_nc());
  if (subcatchment) files.push_back(at.subcatchments_nc());
  if (!request.profile_reaches.empty()) files.push_back(at.profiles_nc());
  return files;
}

void check_run_request(const Study& study, const RunRequest& request) {
  const StormDefinition& storm = study.storm(request.storm_id);  // InputError if unknown
  if (storm.ends_after_run) throw InputError(*storm.ends_after_run);
  if (!request.scenario_id.empty()) (void)study.scenario(request.scenario_id);
  for (const auto& path : planned_output_files(study, request)) {
    require_absent(path, request.overwrite);
  }
}

namespace {

// Inflow against outflow of every element fed by exactly one other station. Subcatchment
// runoff entering along a reach is lateral inflow, not a station upstream (the pair's volume
// change then shows it); into any other element it is a feeder of its own. At a confluence
// the pair would compare a part with the whole, so confluences are left out.
void add_pairs(const network::Model& model, RunSummary& summary) {
  for (std::size_t i = 0; i < model.links.size(); ++i) {
    const bool lateral = model.elements[i]->takes_lateral_inflow();
    std::vector<std::size_t> feeders;
    for (std::size_t u : model.topology.upstream[i]) {
      if (!(lateral && model.links[u].kind == ElementKind::subcatchment)) feeders.push_back(u);
    }
    if (feeders.size() == 1) {
      summary.pairs.push_back(compare_stations(summary.stations[feeders[0]], summary.stations[i]));
    }
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

std::string shock_fate(const routing::ShockReport& s) {
  if (s.reached_outlet) {
    return "reached the outlet at t = " + format_fixed(s.outlet_arrival_time_s / 60.0, 1) + " min";
  }
  if (s.ended) {
    return "faded or merged in the reach after t = " + format_fixed(s.end_time_s / 60.0, 1) +
           " min";
  }
  return "did not reach the outlet";
}

void add_shocks(const network::Model& model, const std::vector<network::ElementReport>& reports,
                RunSummary& summary) {
  for (std::size_t i = 0; i < reports.size(); ++i) {
    if (!is_reach(reports[i].kind)) continue;
    for (const routing::ShockReport& s : reports[i].reach().significant_shocks) {
      ShockRecord r;
      r.element = model.links[i].id;
      r.time_s = s.formation_time_s;
      r.chainage_m = s.formation_position_m;
      r.message = "mean speed " + format_fixed(s.speed_m_s, 2) + " m/s (Rankine-Hugoniot " +
                  format_fixed(s.rankine_hugoniot_m_s, 2) + " m/s); " + shock_fate(s);
      summary.shocks.push_back(r);
    }
  }
}

// A pond whose level rises above the water level at the outlet of the reach feeding it backs
// water up the reach, which the kinematic wave cannot carry upstream.
void add_backwater_warning(const network::Model& model,
                           const StudySink& sink,
                           const std::vector<StationDescription>& stations,
                           std::size_t i,
                           RunSummary& summary) {
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
  const double excess_m = sink.watch().backwater_excess_m(i);
  if (!(excess_m > 0.0)) return;
  summary.warnings.push_back({id,
                              "the pond at '" + model.links[d].id + "' stood up to " +
                                  format_fixed(excess_m, 2) +
                                  " m above this reach's computed outlet water level (at t = " +
                                  format_fixed(sink.watch().backwater_time_s(i) / 60.0, 0) +
                                  " min): backwater into the "
                                  "reach is not represented by the kinematic wave"});
}

// Kinematic-wave applicability per reach, backwater from pools, conduits at capacity.
void add_warnings(const network::Model& model,
                  const std::vector<network::ElementReport>& reports,
                  const StudySink& sink,
                  const std::vector<StationDescription>& stations,
                  RunSummary& summary) {
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    if (!is_reach(reports[i].kind)) continue;
    const network::ReachFacts& reach = reports[i].reach();
    const StationSample& p = sink.at_peak(i);
    const SummaryAccumulator& acc = sink.accumulator(i);
    const double tp_s = acc.peak_time_s() -
                        sink.watch().rise_start_s(i, acc.peak_time_s(), acc.peak_discharge_m3s());
    const double slope = reach.bed_slope;
    if (p.depth_m > 0.0 && p.velocity_m_s > 0.0 && tp_s > 0.0 && slope > 0.0) {
      // Ponce (1989) in the time-of-rise form (routing/applicability.hpp).
      const routing::WaveApplicability a =
          routing::wave_applicability(tp_s, slope, p.velocity_m_s, p.depth_m);
      summary.wave_numbers.push_back(
          {model.links[i].id, tp_s, a.kinematic_number, a.diffusion_number});
      if (!a.kinematic_ok) {
        const auto number = [](double x) { return format_fixed(x, x < 10.0 ? 2 : 1); };
        std::string message =
            "time-of-rise number t_r S0 u0/d0 = " + number(a.kinematic_number) +
            " < 85 (Ponce, Li & Simons 1978; Ponce 1989): the kinematic wave may misstate "
            "attenuation here; ";
        message += a.diffusion_ok
                       ? "a diffusion wave would apply (t_r S0 (g/d0)^0.5 = " +
                             number(a.diffusion_number) + " >= 15)"
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
    add_backwater_warning(model, sink, stations, i, summary);
  }
}

// The clock of every run of a study: from time 0 to duration_h, samples at the output
// interval, elements coupled at the step the driver takes.
network::ClockOptions run_clock(const StudySettings& set) { return set.clock(); }

// Elements exchange flows once per coupling step and peaks are taken at step ends, so a rise
// shorter than two steps is under-resolved: its peak can be missed here and smoothed below.
// (Our criterion, no source: two steps is the fewest that can show a rise and a peak.)
void add_coupling_step_warnings(const StudySink& sink,
                                const std::vector<StationDescription>& stations,
                                double coupling_step_s,
                                RunSummary& summary) {
  for (std::size_t i = 0; i < stations.size(); ++i) {
    if (!is_reach(stations[i].kind) && !is_subcatchment(stations[i].kind)) continue;
    const SummaryAccumulator& acc = sink.accumulator(i);
    if (acc.sample_count() < 2 || !(acc.peak_discharge_m3s() > acc.first_discharge_m3s())) {
      continue;
    }
    const double rise_s =
        acc.peak_time_s() -
        sink.watch().rise_start_s(i, acc.peak_time_s(), acc.peak_discharge_m3s());
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
void add_end_of_run_warnings(const StudySink& sink,
                             const std::vector<StationDescription>& stations,
                             RunSummary& summary) {
  for (std::size_t i = 0; i < stations.size(); ++i) {
    const SummaryAccumulator& acc = sink.accumulator(i);
    if (acc.sample_count() < 2 || acc.peak_time_s() < acc.last_time_s()) continue;
    const double rise_m3s = acc.peak_discharge_m3s() - acc.first_discharge_m3s();
    if (!(rise_m3s > 1e-9 * std::max(1.0, acc.peak_discharge_m3s()))) continue;
    summary.warnings.push_back(
        {stations[i].id, "discharge is still at its highest when the run ends (t = " +
                             format_fixed(acc.last_time_s() / 3600.0, 2) +
                             " h): the peak may come later; lengthen duration_h"});
  }
}

RunSummary summarise(const Study& study,
                     const RunRequest& req,
                     const network::Model& model,
                     const network::RunSummary& numerics,
                     const std::vector<network::ElementReport>& reports,
                     const StudySink& sink,
                     const std::vector<StationDescription>& stations) {
  RunSummary s;
  s.title = study.settings().title + ", storm " + req.storm_id +
            (req.scenario_id.empty() ? " (base)" : ", scenario " + req.scenario_id);
  s.source = req.source;
  for (std::size_t i = 0; i < stations.size(); ++i) {
    // Centroid lag: from the centroid of the rainfall excess upstream of the station.
    StationSummary st = sink.accumulator(i).station_summary(
        stations[i].id, stations[i].name, sink.watch().excess_centroid_s(i));
    st.runoff_volume_m3 = numerics.balances[i].ledger.outflow_m3;  // exact, from the ledger
    s.stations.push_back(st);
  }
  add_pairs(model, s);
  add_shocks(model, reports, s);
  add_balances(numerics, s);
  add_warnings(model, reports, sink, stations, s);
  add_end_of_run_warnings(sink, stations, s);
  add_coupling_step_warnings(sink, stations, run_clock(study.settings()).coupling_step_s(), s);
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
  return s;
}

// Writes every cell of the chosen reaches at each output time.
class ProfileWriter {
 public:
  ProfileWriter(const network::Model& model, const std::vector<std::string>& reach_ids) {
    std::vector<Problem> problems;
    for (const auto& id : reach_ids) {
      const network::Element* found = nullptr;
      for (std::size_t i = 0; i < model.elements.size(); ++i) {
        if (model.links[i].id == id && is_reach(model.links[i].kind)) {
          found = model.elements[i].get();
        }
      }
      if (!found) {
        problems.push_back({"",
                            0,
                            0,
                            "profile output",
                            "reach",
                            "= '" + id + "': no reach of the basin has this id"});
      }
      reaches_.push_back(found);
    }
    if (!problems.empty()) throw InputError(std::move(problems));
  }

  [[nodiscard]] InstanceSet instances() const {
    InstanceSet set;
    set.kind = "cell";
    for (const auto* r : reaches_) {
      const std::vector<network::CellSample> cells = r->cell_samples();
      for (std::size_t k = 0; k < cells.size(); ++k) {
        InstanceInfo info;
        info.id = r->id() + "#" + std::to_string(k + 1);
        info.name = "cell " + std::to_string(k + 1) + " of reach " + r->id();
        info.reach_id = r->id();
        info.chainage_m = cells[k].chainage_m;
        set.instances.push_back(info);
      }
    }
    return set;
  }

  void write(NetcdfTimeSeriesWriter& out, double time_s) {
    cells_.clear();
    for (const auto* r : reaches_) {
      const std::vector<network::CellSample> cells = r->cell_samples();
      cells_.insert(cells_.end(), cells.begin(), cells.end());
    }
    const std::size_t n = cells_.size();
    row_.assign(3 * n, 0.0);
    for (std::size_t j = 0; j < n; ++j) {
      row_[j] = cells_[j].discharge_m3s;
      row_[n + j] = cells_[j].depth_m;
      row_[2 * n + j] = cells_[j].velocity_m_s;
    }
    out.record(time_s, row_);
  }

 private:
  std::vector<const network::Element*> reaches_;
  std::vector<network::CellSample> cells_;
  std::vector<double> row_;
};

std::vector<std::size_t> export_indices(const RunRequest& req,
                                        const std::vector<StationDescription>& stations) {
  std::vector<std::size_t> out;
  std::vector<Problem> problems;
  for (const auto& id : req.export_stations) {
    std::size_t k = 0;
    while (k < stations.size() && stations[k].id != id) ++k;
    if (k == stations.size()) {
      problems.push_back({"",
                          0,
                          0,
                          "hydrograph export",
                          "station",
                          "= '" + id + "': no element of the basin has this id"});
    } else {
      out.push_back(k);
    }
  }
  if (!problems.empty()) throw InputError(std::move(problems));
  return out;
}

// The export interval and its count over the run; InputError unless it divides the run.
std::pair<double, std::size_t> export_grid(const Study& study, const RunRequest& req) {
  const StudySettings& set = study.settings();
  const double dt_s = req.export_interval_s > 0.0 ? req.export_interval_s : set.output_interval_s;
  const auto n = static_cast<std::size_t>(std::llround(set.duration_s / dt_s));
  if (n < 1 || std::abs(static_cast<double>(n) * dt_s - set.duration_s) > 1e-9 * set.duration_s) {
    throw InputError(Problem{"",
                             0,
                             0,
                             "hydrograph export",
                             "interval",
                             "= " + format_value(dt_s) + " s: must divide the run length (" +
                                 format_value(set.duration_s) + " s) into whole intervals"});
  }
  return {dt_s, n};
}

// Exported peaks further than this from the routed peak are pointed out (our criterion, no
// source: a coarse interval can cut or, with a volume correction, raise a sharp peak).
constexpr double kExportPeakTolerance = 0.02;

std::filesystem::path write_export(const Study& study,
                                   const RunRequest& req,
                                   const StudySink& sink,
                                   std::size_t i,
                                   const StationDescription& station,
                                   OutputSet& results,
                                   RunSummary& summary) {
  const StudySettings& set = study.settings();
  const auto [dt_s, n] = export_grid(study, req);
  const PiecewiseLinearSeries q = sink.series(i, "station '" + station.id + "'");
  const PiecewiseLinearSeries volume = sink.volume_series(i, "station '" + station.id + "'");
  // Every form keeps the routed total volume exactly (io/series_resample.hpp); they differ
  // in shape. The one whose peak comes closest to the routed peak is written: at a short
  // interval that is usually the local correction (base flow untouched, peak kept), at a
  // coarse one the scaled samples (the sampled shape, one factor).
  struct Attempt {
    ResampleMethod method;
    const char* label;
  };
  const Attempt attempts[] = {
      {ResampleMethod::local_correction,
       "routed volume kept: each sample corrected by the volume its two intervals miss"},
      {ResampleMethod::interval_volumes, "routed volume kept in every interval"},
      {ResampleMethod::scaled_samples, "routed volume kept by scaling the samples"}};
  const double routed_peak_m3s = summary.stations[i].peak_discharge_m3s;
  std::optional<PiecewiseLinearSeries> r;
  std::string method;
  double best_miss = std::numeric_limits<double>::infinity();
  bool scaled_refused = false;
  for (const Attempt& a : attempts) {
    std::optional<PiecewiseLinearSeries> candidate =
        try_resample_preserving_volume(q, 0.0, dt_s, n, a.method, &volume);
    if (!candidate) {
      scaled_refused = a.method == ResampleMethod::scaled_samples;
      continue;
    }
    const auto values = candidate->values();
    const double miss =
        std::abs(*std::max_element(values.begin(), values.end()) - routed_peak_m3s);
    if (miss < best_miss) {
      best_miss = miss;
      r = std::move(candidate);
      method = a.label;
    }
  }
  if (!r && scaled_refused) {
    throw InputError(resample_refusal(dt_s, ResampleMethod::scaled_samples));
  }
  if (!r) {
    throw NumericalError("hydrograph export of station '" + station.id +
                         "': no resampled series could be formed (non-finite peak or volume)");
  }
  SeriesTable table;
  table.quantity = SeriesQuantity::discharge;
  table.times_s.assign(r->times_s().begin(), r->times_s().end());
  table.values_si.assign(r->values().begin(), r->values().end());
  table.metadata = {"station " + station.id + " (" + station.name + "), storm " + req.storm_id +
                        (req.scenario_id.empty() ? ", base" : ", scenario " + req.scenario_id),
                    "resampled to " + format_value(dt_s) + " s: " + method};
  const double exported_peak_m3s = *std::max_element(r->values().begin(), r->values().end());
  const double change = exported_peak_m3s / routed_peak_m3s - 1.0;
  if (routed_peak_m3s > 0.0 && std::abs(change) > kExportPeakTolerance) {
    const std::string note =
        "the exported peak " + format_fixed(exported_peak_m3s, 3) + " m3/s is " +
        format_fixed(100.0 * std::abs(change), 1) + " % " + (change < 0.0 ? "below" : "above") +
        " the routed peak " + format_fixed(routed_peak_m3s, 3) + " m3/s at this " +
        format_value(dt_s / 60.0) + "-min interval; a shorter export interval keeps it closer";
    table.metadata.push_back(note);
    summary.warnings.push_back({station.id, "hydrograph export: " + note});
  }
  CsvWriteOptions options;
  options.title = "freshet hydrograph";
  options.time_base = set.start_iso + " (study start)";
  options.overwrite = req.overwrite;
  options.set = &results;
  const auto path = RunPaths{results.folder(), req.storm_id}.export_csv(station.id);
  write_series_csv(path, table, options);
  return path;
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

// The NetCDF files of one run, open and defined, under their temporary names.
struct RunFiles {
  std::optional<NetcdfTimeSeriesWriter> stations, subcatchments, profiles;
  std::optional<ProfileWriter> profile_cells;
};

// One file per set of points that has members: stations, subcatchments, profile cells.
void open_run_files(const Study& study,
                    const RunRequest& req,
                    const network::Model& model,
                    const std::vector<StationDescription>& stations,
                    OutputSet& results,
                    StudySink& sink,
                    RunFiles& files) {
  const std::filesystem::path& folder = results.folder();
  NetcdfWriterOptions nc;
  nc.overwrite = req.overwrite;
  nc.set = &results;
  if (!sink.channel_index().empty()) {
    files.stations.emplace(RunPaths{folder, req.storm_id}.stations_nc(), nc);
    files.stations->begin(metadata(study, req, "stations"),
                          instances(stations, sink.channel_index(), "station"),
                          {OutputVariable::discharge,
                           OutputVariable::stage,
                           OutputVariable::depth,
                           OutputVariable::velocity});
  }
  if (!sink.sub_index().empty()) {
    files.subcatchments.emplace(RunPaths{folder, req.storm_id}.subcatchments_nc(), nc);
    files.subcatchments->begin(metadata(study, req, "subcatchments"),
                               instances(stations, sink.sub_index(), "subcatchment"),
                               {OutputVariable::discharge,
                                OutputVariable::rainfall_intensity,
                                OutputVariable::rainfall_excess});
  }
  sink.set_writers(files.stations ? &*files.stations : nullptr,
                   files.subcatchments ? &*files.subcatchments : nullptr);
  if (req.profile_reaches.empty()) return;
  files.profile_cells.emplace(model, req.profile_reaches);
  files.profiles.emplace(RunPaths{folder, req.storm_id}.profiles_nc(), nc);
  files.profiles->begin(
      metadata(study, req, "along-reach profiles"),
      files.profile_cells->instances(),
      {OutputVariable::discharge, OutputVariable::depth, OutputVariable::velocity});
  sink.after_record = [&files](double t) { files.profile_cells->write(*files.profiles, t); };
}

// Completes every file of the run in its result set: exports, NetCDF files, summary CSVs and
// the summary JSON. Nothing is under a final name until the set is committed.
void write_run_files(const Study& study,
                     const RunRequest& req,
                     const StudySink& sink,
                     const std::vector<StationDescription>& stations,
                     const std::vector<std::size_t>& exported,
                     OutputSet& results,
                     RunFiles& files,
                     RunOutcome& out) {
  // Exports first: what they note about their peaks goes into the summaries.
  for (std::size_t i : exported) {
    (void)write_export(study, req, sink, i, stations[i], results, out.summary);
  }
  for (auto* file : {&files.stations, &files.subcatchments, &files.profiles}) {
    if (*file) (*file)->commit();
  }
  const RunPaths at{results.folder(), req.storm_id};
  (void)write_summary_csv(at.summary_prefix(), out.summary, req.overwrite, &results);
  write_summary_json(at.summary_json(), out.summary, req.overwrite, &results);
}

// Drives the model. An input problem or numerical failure found while routing (it carries no
// file: the kernels know none) is located in the study file, storm and scenario.
network::RunSummary simulate_located(const Study& study,
                                     const RunRequest& req,
                                     network::Model& model,
                                     const network::ClockOptions& clock,
                                     StudySink& sink,
                                     const network::ProgressFn& progress) {
  const std::string where = "storm '" + req.storm_id + "'" +
                            (req.scenario_id.empty() ? "" : ", scenario '" + req.scenario_id + "'");
  try {
    return network::simulate(model, clock, sink, progress);
  } catch (const InputError& e) {
    std::vector<Problem> located = e.problems();
    for (Problem& p : located) {
      if (!p.file.empty()) continue;
      p.file = study.file().string();
      p.element = where + (p.element.empty() ? "" : ", " + p.element);
      p.message += " (found while routing: the value comes from this storm's rain and the "
                   "inputs of this element)";
    }
    throw InputError(std::move(located));
  } catch (const NumericalError& e) {
    throw NumericalError(study.file().string() + ", " + where + ": " + e.what());
  }
}

std::vector<std::pair<std::string, routing::RunDiagnostics>> reach_numerics(
    const network::Model& model, const std::vector<network::ElementReport>& reports) {
  std::vector<std::pair<std::string, routing::RunDiagnostics>> out;
  for (std::size_t i = 0; i < reports.size(); ++i) {
    if (is_reach(reports[i].kind)) out.emplace_back(model.links[i].id, reports[i].reach().diagnostics);
  }
  return out;
}

std::string shock_note(const routing::ShockReport& shock) {
  return "kinematic shock formed at t = " + format_fixed(shock.formation_time_s / 60.0, 1) +
         " min, " + format_fixed(shock.formation_position_m, 0) + " m downstream, mean speed " +
         format_fixed(shock.speed_m_s, 2) + " m/s (Rankine-Hugoniot " +
         format_fixed(shock.rankine_hugoniot_m_s, 2) + " m/s), " + shock_fate(shock);
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
    const network::Model& model, const std::vector<network::ElementReport>& reports) {
  std::vector<std::pair<std::string, std::string>> out;
  for (std::size_t i = 0; i < reports.size(); ++i) {
    const std::string& id = model.links[i].id;
    switch (reported_as(reports[i].kind)) {
      case ReportedAs::reach: {
        const network::ReachFacts& reach = reports[i].reach();
        for (const auto& shock : reach.significant_shocks) out.emplace_back(id, shock_note(shock));
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

RunOutcome run_study(const Study& study,
                     const RunRequest& req,
                     const network::ProgressFn& progress,
                     const CancelFn& cancel) {
  // One process at a time in the folder; released (and a folder it created removed again if
  // empty) when the run fails.
  const OutputFolderLock::Handle lock = OutputFolderLock::acquire(run_folder(req));
  check_run_request(study, req);
  network::Model model = study.build_model(req.scenario_id, study.storm(req.storm_id));
  const std::vector<StationDescription> stations = study.stations(req.scenario_id);
  const std::vector<std::size_t> exported = export_indices(req, stations);
  if (!exported.empty()) (void)export_grid(study, req);  // bad interval: fail before routing

  OutputSet results(lock->folder(), req.storm_id, req.overwrite);
  StudySink sink(stations, model, cancel);
  RunFiles files;
  open_run_files(study, req, model, stations, results, sink, files);
  for (std::size_t i : exported) sink.keep_series(i);

  const StudySettings& set = study.settings();
  const network::ClockOptions clock = run_clock(set);
  RunOutcome out;
  out.scenario_id = req.scenario_id;
  out.storm_id = req.storm_id;
  out.numerics = simulate_located(study, req, model, clock, sink, progress);
  std::vector<network::ElementReport> reports;
  for (const auto& e : model.elements) reports.push_back(e->report());
  out.summary = summarise(study, req, model, out.numerics, reports, sink, stations);
  out.peaks = station_peaks(reports, out.summary, stations);
  out.reach_numerics = reach_numerics(model, reports);
  out.notes = element_notes(model, reports);
  write_run_files(study, req, sink, stations, exported, results, files, out);
  // The commit point: every file is complete in the staging folder.
  if (cancel && cancel()) throw RunInterrupted("the run was stopped before its results were kept");
  out.files = results.commit(RunPaths{results.folder(), req.storm_id}.summary_json());
  return out;
}

}  // namespace freshet::io
