#include "freshet/study/study_run.hpp"
#include "observed_compare.hpp"
#include "run_metadata.hpp"

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
#include "freshet/io/state_file.hpp"
#include "freshet/io/summary_writer.hpp"
#include "freshet/reporting/hydrograph_export.hpp"
#include "freshet/reporting/reported_as.hpp"
#include "freshet/reporting/run_report.hpp"
#include "freshet/routing/applicability.hpp"

namespace freshet::study {

using io::CsvWriteOptions;
using io::InstanceInfo;
using io::InstanceSet;
using io::NetcdfRunMetadata;
using io::NetcdfTimeSeriesWriter;
using io::NetcdfWriterOptions;
using io::OutputFolderLock;
using io::OutputSet;
using io::OutputVariable;
using io::require_absent;
using io::SeriesQuantity;
using io::SeriesTable;
using io::summary_csv_paths;
using io::write_series_csv;
using io::write_summary_csv;
using io::write_summary_json;

namespace {

using network::StationSample;
using reporting::is_reach;
using reporting::is_subcatchment;
using reporting::RunSummary;

// The run's record (reporting::RunRecorder) plus the output files: every sample goes to the
// recorder, the samples at output times also to the NetCDF files. Polls the cancel function at
// every coupling step.
class StudySink final : public network::RecordSink {
 public:
  StudySink(reporting::RunRecorder& recorder, const CancelFn& cancel)
      : cancel_(cancel), recorder_(recorder) {
    const auto& stations = recorder.stations();
    for (std::size_t i = 0; i < stations.size(); ++i) {
      (is_subcatchment(stations[i].kind) ? sub_index_ : channel_index_).push_back(i);
    }
    rain_depth_m_.assign(sub_index_.size(), 0.0);
    excess_depth_m_.assign(sub_index_.size(), 0.0);
  }

  void record(double time_s, std::span<const StationSample> samples) override {
    if (cancel_ && cancel_()) throw RunInterrupted("the run was stopped before it finished");
    recorder_.record(time_s, samples);
    add_rain_depths(time_s, samples);
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
    recorder_.observe(time_s, samples);
    add_rain_depths(time_s, samples);
  }

  // Hot start: the recorder's state and the rain and excess depths since the last output time.
  void visit_state(StateVisitor& v) override {
    {
      StateGroup g(v, "recorder");
      recorder_.visit_state(v);
    }
    v.doubles("rain_depth_m", rain_depth_m_);
    v.doubles("excess_depth_m", excess_depth_m_);
    visit_optional(v, "last_step_s", last_step_s_);
    visit_optional(v, "last_record_s", last_record_s_);
    if (!v.saving() && last_record_s_) {  // resumed: the files continue after that time
      if (channel_) channel_->continue_after(*last_record_s_);
      if (sub_) sub_->continue_after(*last_record_s_);
    }
  }

  [[nodiscard]] const std::vector<std::size_t>& channel_index() const { return channel_index_; }
  [[nodiscard]] const std::vector<std::size_t>& sub_index() const { return sub_index_; }

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

  // Each coupling step's mean rain and excess rates times its length: the depths that fell
  // since the last output time, so the file holds exact means over each output interval.
  void add_rain_depths(double time_s, std::span<const StationSample> samples) {
    if (last_step_s_) {
      const double dt_s = time_s - *last_step_s_;
      for (std::size_t k = 0; k < sub_index_.size(); ++k) {
        rain_depth_m_[k] += samples[sub_index_[k]].rain_m_s * dt_s;
        excess_depth_m_[k] += samples[sub_index_[k]].excess_m_s * dt_s;
      }
    }
    last_step_s_ = time_s;
  }

  // Runoff at the output time; rain and excess as means over the interval since the last
  // output time (the file's time_bnds), or at the first output time the rates then.
  void write_sub(double time_s, std::span<const StationSample> samples) {
    const std::size_t n = sub_index_.size();
    row_.assign(3 * n, 0.0);
    const double interval_s = last_record_s_ ? time_s - *last_record_s_ : 0.0;
    for (std::size_t k = 0; k < n; ++k) {
      const StationSample& s = samples[sub_index_[k]];
      row_[k] = s.discharge_m3s;
      // SI; the writer stores mm h-1
      row_[n + k] = interval_s > 0.0 ? rain_depth_m_[k] / interval_s : s.rain_m_s;
      row_[2 * n + k] = interval_s > 0.0 ? excess_depth_m_[k] / interval_s : s.excess_m_s;
      rain_depth_m_[k] = excess_depth_m_[k] = 0.0;
    }
    last_record_s_ = time_s;
    sub_->record(time_s, row_);
  }

  static void visit_optional(StateVisitor& v, std::string_view name, std::optional<double>& x) {
    StateGroup g(v, name);
    bool has = x.has_value();
    double value = x.value_or(0.0);
    v.value("present", has);
    v.value("value", value);
    x = has ? std::optional<double>(value) : std::nullopt;
  }

  const CancelFn& cancel_;  // polled at every coupling step
  reporting::RunRecorder& recorder_;
  NetcdfTimeSeriesWriter* channel_ = nullptr;
  NetcdfTimeSeriesWriter* sub_ = nullptr;
  std::vector<std::size_t> channel_index_;
  std::vector<std::size_t> sub_index_;
  std::vector<double> row_;
  std::vector<double> rain_depth_m_, excess_depth_m_;  // per subcatchment, since the last output
  std::optional<double> last_step_s_, last_record_s_;
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

// An ISO 8601 duration of whole seconds: "PT6H", "PT5M", "P1DT2H30M", "PT90S"; fractions of a
// second are rounded.
std::string iso_duration(double seconds) {
  auto s = static_cast<long long>(std::llround(seconds));
  const long long d = s / 86400, h = s % 86400 / 3600, m = s % 3600 / 60;
  s %= 60;
  std::string out = "P" + (d ? std::to_string(d) + "D" : std::string());
  if (h || m || s || !d) out += "T";
  if (h) out += std::to_string(h) + "H";
  if (m) out += std::to_string(m) + "M";
  if (s || (!d && !h && !m)) out += std::to_string(s) + "S";
  return out;
}

// "YYYY-MM-DDThh:mm:ssZ" plus whole seconds, in the same form.
std::string iso_plus(const std::string& start_iso, double seconds) {
  int y = 0, mo = 0, d = 0, h = 0, mi = 0, s = 0;
  if (std::sscanf(start_iso.c_str(), "%d-%d-%dT%d:%d:%d", &y, &mo, &d, &h, &mi, &s) != 6) return "";
  using namespace std::chrono;
  const sys_days day{year_month_day{year{y}, month{static_cast<unsigned>(mo)},
                                    std::chrono::day{static_cast<unsigned>(d)}}};
  const sys_seconds t = day + hours{h} + minutes{mi} + std::chrono::seconds{s} +
                        std::chrono::seconds{std::llround(seconds)};
  const sys_days end_day = floor<days>(t);
  const year_month_day ymd{end_day};
  const hh_mm_ss hms{t - end_day};
  char buf[64];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02uT%02ld:%02ld:%02ldZ", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()),
                static_cast<long>(hms.hours().count()), static_cast<long>(hms.minutes().count()),
                static_cast<long>(hms.seconds().count()));
  return buf;
}

// The ACDD 1.3 attributes freshet knows (docs/outputs.md): time coverage of the run, keywords,
// processing level, product version, and the study file's creator and licence when it gives
// them.
void add_discovery_attributes(const StudySettings& s, const RunRequest& req, NetcdfRunMetadata& m) {
  m.time_coverage_start = s.start_iso;
  m.time_coverage_end = iso_plus(s.start_iso, s.duration_s);
  m.time_coverage_duration = iso_duration(s.duration_s);
  m.time_coverage_resolution = iso_duration(s.output_interval_s);
  m.keywords = "flood routing, kinematic wave, hydrograph, discharge, water level, rainfall, "
               "runoff, culvert, detention basin, design storm";
  m.processing_level = "model output: simulated by freshet, not observed, not reviewed";
  m.product_version =
      req.source.starts_with("freshet ") ? req.source.substr(8) : req.source;  // "0.1.0"
  m.license = s.license;
  m.creator_name = s.creator_name;
  m.creator_email = s.creator_email;
  m.creator_institution = s.creator_institution;
}

}  // namespace

namespace detail {

NetcdfRunMetadata run_metadata(const Study& study, const RunRequest& req,
                               const std::string& what) {
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
  add_discovery_attributes(study.settings(), req, m);
  return m;
}

InstanceSet run_instances(const std::vector<StationDescription>& stations,
                          const std::vector<std::size_t>& index, io::InstanceKind kind) {
  InstanceSet set;
  set.kind = kind;
  for (std::size_t i : index) {
    InstanceInfo info;
    info.id = stations[i].id;
    info.name = stations[i].name;
    if (is_reach(stations[i].kind)) info.reach_id = stations[i].id;
    info.longitude_deg = stations[i].longitude_deg;
    info.latitude_deg = stations[i].latitude_deg;
    set.instances.push_back(info);
  }
  // Stage mixes elevations and depths (see the variable's long_name), so no datum is claimed.
  return set;
}

}  // namespace detail

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
  [[nodiscard]] std::filesystem::path observed_csv(const std::string& station_id) const {
    return folder / (storm + "_" + station_id + "_observed.csv");
  }
};

RunPaths run_paths(const RunRequest& request) { return {run_folder(request), request.storm_id}; }

}  // namespace

std::filesystem::path state_file_path(const RunRequest& request, double time_s) {
  // Whole seconds as an integer (a time given in hours carries round-off: 0.1 h).
  const double whole = std::round(time_s);
  const std::string seconds = std::abs(whole - time_s) <= 1e-6 * std::max(1.0, std::abs(time_s))
                                  ? std::to_string(static_cast<long long>(whole))
                                  : format_value(time_s);
  return run_folder(request) / (request.storm_id + "_state_" + seconds + "s.h5");
}

std::vector<std::filesystem::path> planned_output_files(const Study& study,
                                                        const RunRequest& request) {
  const RunPaths at = run_paths(request);
  std::vector<std::filesystem::path> files = summary_csv_paths(at.summary_prefix());
  files.push_back(at.summary_json());
  for (const auto& id : request.export_stations) files.push_back(at.export_csv(id));
  for (const ObservedSeries& o : study.observed()) {
    if (o.storm_id == request.storm_id) files.push_back(at.observed_csv(o.station_id));
  }
  bool channel = false, subcatchment = false;
  for (const auto& s : study.stations(request.scenario_id)) {
    (is_subcatchment(s.kind) ? subcatchment : channel) = true;
  }
  if (channel) files.push_back(at.stations_nc());
  if (subcatchment) files.push_back(at.subcatchments_nc());
  if (!request.profile_reaches.empty()) files.push_back(at.profiles_nc());
  for (double t : request.save_state_at_s) files.push_back(state_file_path(request, t));
  const std::size_t n = files.size();
  for (std::size_t k = 0; k < n; ++k) {
    if (files[k].extension() == ".csv") files.push_back(io::csv_metadata_path(files[k]));
  }
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

// The clock of every run of a study: from time 0 to duration_h, samples at the output
// interval, elements coupled at the step the driver takes.
network::ClockOptions run_clock(const StudySettings& set) { return set.clock(); }

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
    set.kind = io::InstanceKind::cell;
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
    // Only --export-interval-min can fail here: the output interval already divides the run.
    throw InputError(Problem{"",
                             0,
                             0,
                             "command line",
                             "--export-interval-min",
                             "= " + format_value(dt_s / 60.0) + " min: must divide the run (" +
                                 format_value(set.duration_s / 60.0) +
                                 " min, duration_h in the basin file) into whole intervals"});
  }
  return {dt_s, n};
}

std::filesystem::path write_export(const Study& study,
                                   const RunRequest& req,
                                   const reporting::RunRecorder& recorder,
                                   std::size_t i,
                                   const StationDescription& station,
                                   OutputSet& results,
                                   RunSummary& summary) {
  const StudySettings& set = study.settings();
  const auto [dt_s, n] = export_grid(study, req);
  const reporting::ExportedHydrograph h =
      reporting::export_hydrograph(recorder, i, dt_s, n, summary.stations[i].peak_discharge_m3s);
  SeriesTable table;
  table.quantity = SeriesQuantity::discharge;
  table.times_s.assign(h.series.times_s().begin(), h.series.times_s().end());
  table.values_si.assign(h.series.values().begin(), h.series.values().end());
  table.metadata = {"station " + station.id + " (" + station.name + "), storm " + req.storm_id +
                        (req.scenario_id.empty() ? ", base" : ", scenario " + req.scenario_id),
                    "resampled to " + format_value(dt_s) + " s: " + h.method};
  if (!h.peak_note.empty()) {
    table.metadata.push_back(h.peak_note);
    summary.warnings.push_back({station.id, "hydrograph export: " + h.peak_note});
  }
  CsvWriteOptions options;
  options.title = "freshet hydrograph";
  options.time_base = "study start";
  options.time_origin_iso = set.start_iso;
  options.source = req.source;
  options.overwrite = req.overwrite;
  options.set = &results;
  const auto path = RunPaths{results.folder(), req.storm_id}.export_csv(station.id);
  write_series_csv(path, table, options);
  return path;
}

// The stations with an observed hydrograph for the request's storm.
std::vector<std::size_t> observed_indices(const Study& study, const RunRequest& req,
                                          const std::vector<StationDescription>& stations) {
  std::vector<std::size_t> out;
  for (const ObservedSeries& o : study.observed()) {
    if (o.storm_id != req.storm_id) continue;
    for (std::size_t k = 0; k < stations.size(); ++k) {
      if (stations[k].id == o.station_id) out.push_back(k);
    }
  }
  return out;
}

// Routed against observed: pairs, statistics, a note each, and the CSV of the pairs.
void compare_observed(const Study& study, const RunRequest& req,
                      const reporting::RunRecorder& recorder,
                      const std::vector<StationDescription>& stations, OutputSet& results,
                      RunOutcome& out) {
  for (const ObservedSeries& o : study.observed()) {
    if (o.storm_id != req.storm_id) continue;
    std::size_t i = 0;
    while (i < stations.size() && stations[i].id != o.station_id) ++i;
    if (i == stations.size()) continue;  // not in this scenario's network
    const PiecewiseLinearSeries routed =
        recorder.series(i, "station '" + o.station_id + "' discharge");
    reporting::ObservedFit fit =
        detail::pair_observed(o, routed, study.settings().duration_s);
    out.notes.emplace_back(o.station_id, detail::fit_note(fit));
    detail::write_observed_csv(RunPaths{results.folder(), req.storm_id}.observed_csv(o.station_id),
                               fit, study.settings().start_iso, req.source, req.overwrite,
                               &results);
    out.observed.push_back(std::move(fit));
  }
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
    files.stations->begin(detail::run_metadata(study, req, "stations"),
                          detail::run_instances(stations, sink.channel_index(), io::InstanceKind::station),
                          {OutputVariable::discharge,
                           OutputVariable::stage,
                           OutputVariable::depth,
                           OutputVariable::velocity});
  }
  if (!sink.sub_index().empty()) {
    files.subcatchments.emplace(RunPaths{folder, req.storm_id}.subcatchments_nc(), nc);
    files.subcatchments->begin(detail::run_metadata(study, req, "subcatchments"),
                               detail::run_instances(stations, sink.sub_index(), io::InstanceKind::subcatchment),
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
      detail::run_metadata(study, req, "along-reach profiles"),
      files.profile_cells->instances(),
      {OutputVariable::discharge, OutputVariable::depth, OutputVariable::velocity});
  sink.after_record = [&files](double t) { files.profile_cells->write(*files.profiles, t); };
}

// Completes every file of the run in its result set: exports, NetCDF files, summary CSVs and
// the summary JSON. Nothing is under a final name until the set is committed.
void write_run_files(const Study& study,
                     const RunRequest& req,
                     const reporting::RunRecorder& recorder,
                     const std::vector<StationDescription>& stations,
                     const std::vector<std::size_t>& exported,
                     OutputSet& results,
                     RunFiles& files,
                     RunOutcome& out) {
  // Exports first: what they note about their peaks goes into the summaries.
  for (std::size_t i : exported) {
    (void)write_export(study, req, recorder, i, stations[i], results, out.summary);
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
                                     const network::ProgressFn& progress,
                                     const network::HotStart& hot_start = {}) {
  const std::string where = "storm '" + req.storm_id + "'" +
                            (req.scenario_id.empty() ? "" : ", scenario '" + req.scenario_id + "'");
  try {
    return network::simulate(model, clock, sink, progress, network::SweepOptions{req.threads},
                             hot_start);
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

// Hot start: the coupling steps at which the request saves the run's state, the state files'
// header, and the state the run resumes from (checked against this study, scenario and storm).
class HotStartFiles {
 public:
  HotStartFiles(const Study& study, const RunRequest& req, const network::ClockOptions& clock)
      : req_(req) {
    if (req.save_state_at_s.empty() && req.resume_from.empty()) return;
    expected_.study_file = study.file().string();
    expected_.study_sha256 = io::file_sha256(study.file());
    expected_.scenario = req.scenario_id;
    expected_.storm = req.storm_id;
    expected_.program_version = req.source;
    hot_.save_after_steps = save_steps(clock);
    if (!hot_.save_after_steps.empty()) {
      hot_.save = [this](long long step, double time_s, const StateArchive& state) {
        io::StateFileHeader h = expected_;
        h.step = step;
        h.time_s = time_s;
        const std::filesystem::path path = state_file_path(req_, time_s);
        io::write_state_file(path, h, state);
        written_.push_back(path);
      };
    }
    if (!req.resume_from.empty()) {
      resumed_ = io::read_state_file(req.resume_from);
      io::check_state_file(resumed_, req.resume_from, expected_);
      hot_.resume = &resumed_.archive;
      hot_.resume_source = req.resume_from.string();
    }
  }
  [[nodiscard]] const network::HotStart& hot_start() const { return hot_; }
  [[nodiscard]] const std::vector<std::filesystem::path>& written() const { return written_; }

 private:
  // Each time must be the end of a coupling step strictly inside the run (to 1e-9 of a step).
  std::vector<long long> save_steps(const network::ClockOptions& clock) const {
    const double dt_s = clock.coupling_step_s();
    const double total = clock.coupling_step_count();
    std::vector<long long> steps;
    ProblemList problems("command line");
    for (double t : req_.save_state_at_s) {
      const double k = std::round(t / dt_s);
      if (!(std::abs(k * dt_s - t) <= 1e-6 * dt_s) || !(k >= 1.0) || !(k < total)) {
        problems.add("--save-state-at", "= " + format_value(t / 3600.0) + " h: must be the end "
                     "of a coupling step (a multiple of " + format_value(dt_s) + " s) after the "
                     "start and before the end of the run (" + format_value(clock.end_s / 3600.0) +
                     " h, duration_h in the basin file)");
        continue;
      }
      steps.push_back(static_cast<long long>(k));
    }
    problems.throw_if_any();
    return steps;
  }

  const RunRequest& req_;
  io::StateFileHeader expected_;
  io::StateFile resumed_;
  network::HotStart hot_;
  std::vector<std::filesystem::path> written_;
};

// The study report's series (reporting/run_series.hpp) are kept while they need no more than
// kReportSeriesBudget values (32 MiB at 4 values a station and output time, plus the cells);
// beyond that the report refers to the NetCDF files instead. Our choice, no source.
constexpr double kReportSeriesBudget = 4.0e6;

bool report_series_fit(const Study& study, const std::vector<StationDescription>& stations) {
  const network::ClockOptions clock = study.settings().clock();
  const double values = 4.0 * static_cast<double>(stations.size()) * (clock.output_count() + 1.0);
  return values <= kReportSeriesBudget;
}

// ---- wave_choice = "automatic" -------------------------------------------------------------

// Each reach's wave as Ponce's criteria judge the flood of a first pass routed with the
// kinematic wave, and the reason for each reach's choice.
struct WaveChoices {
  std::map<std::string, routing::WaveChoice, std::less<>> choice;  // reaches with a flood
  std::map<std::string, std::string, std::less<>> reason;
  routing::SchemeKind kinematic_scheme = routing::SchemeKind::kMusclHeun;

  // The scheme each reach is built with in the run that is reported.
  [[nodiscard]] ReachSchemeFn scheme_fn() const {
    return [this](const std::string& id, routing::SchemeKind given) {
      const auto it = choice.find(id);
      if (it != choice.end() && it->second != routing::WaveChoice::kKinematic) {
        return routing::SchemeKind::kMuskingumCunge;
      }
      return routing::routes_diffusion_wave(given) ? kinematic_scheme : given;
    };
  }
};

std::string number_text(double x) { return format_fixed(x, x < 10.0 ? 2 : 1); }

std::string choice_reason(routing::WaveChoice c, const reporting::WaveNumberRecord& w) {
  const std::string k = "t_r S0 u0/d0 = " + number_text(w.kinematic_number);
  const std::string d = "t_r S0 (g/d0)^0.5 = " + number_text(w.diffusion_number);
  switch (c) {
    case routing::WaveChoice::kKinematic:
      return "automatic: kinematic wave, " + k + " >= 85 (first pass)";
    case routing::WaveChoice::kDiffusion:
      return "automatic: diffusion wave, " + k + " < 85 and " + d + " >= 15 (first pass)";
    case routing::WaveChoice::kNeither:
      return "automatic: NEITHER criterion holds (" + k + " < 85, " + d +
             " < 15, first pass): routed by the diffusion wave, the nearer of the two; check "
             "with a dynamic-wave model";
  }
  return {};
}

// The first pass, in memory (no file): every reach on a kinematic scheme (its own, else
// channel_scheme, else muscl-heun), and Ponce's numbers of the flood it routed.
WaveChoices choose_waves(const Study& study, const RunRequest& req,
                         const network::ClockOptions& clock, const network::ProgressFn& progress,
                         const CancelFn& cancel) {
  WaveChoices out;
  const routing::SchemeKind channel = study.settings().channel_routing.scheme;
  if (!routing::routes_diffusion_wave(channel)) out.kinematic_scheme = channel;
  const ReachSchemeFn kinematic = [&out](const std::string&, routing::SchemeKind given) {
    return routing::routes_diffusion_wave(given) ? out.kinematic_scheme : given;
  };
  network::Model model = study.build_model(req.scenario_id, study.storm(req.storm_id), kinematic);
  reporting::RunRecorder recorder(model, study.stations(req.scenario_id));
  StudySink sink(recorder, cancel);
  const network::RunSummary numerics =
      simulate_located(study, req, model, clock, sink, progress);
  const reporting::RunReport first = reporting::report_run(
      model, numerics, recorder, {"", "", clock, study.settings().start_iso});
  for (const reporting::WaveNumberRecord& w : first.summary.wave_numbers) {
    routing::WaveApplicability a;
    a.kinematic_ok = w.kinematic_number >= routing::kKinematicApplicabilityLimit;
    a.diffusion_ok = w.diffusion_number >= routing::kDiffusionApplicabilityLimit;
    const routing::WaveChoice c = routing::choose_wave(a);
    out.choice[w.element] = c;
    out.reason[w.element] = choice_reason(c, w);
  }
  return out;
}

// The reasons of the automatic choice in the report; a reach that neither wave suits is
// warned about whatever the second pass's numbers say (never used silently).
void report_choices(const WaveChoices& choices, RunSummary& summary) {
  for (reporting::ReachMethodRecord& m : summary.methods) {
    const auto it = choices.reason.find(m.element);
    m.reason = it != choices.reason.end()
                   ? it->second
                   : "automatic: kinematic wave, no rising flood in the first pass to judge";
  }
  for (const auto& [element, c] : choices.choice) {
    if (c != routing::WaveChoice::kNeither) continue;
    const std::string& id = element;  // clang 14 cannot capture a structured binding
    const bool warned = std::any_of(summary.warnings.begin(), summary.warnings.end(),
                                    [&](const reporting::ApplicabilityWarning& w) {
                                      return w.element == id &&
                                             w.message.find("dynamic-wave") != std::string::npos;
                                    });
    if (!warned) summary.warnings.push_back({id, choices.reason.at(id)});
  }
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
  const StudySettings& set = study.settings();
  const network::ClockOptions clock = run_clock(set);
  // A state file from another study, scenario or storm is refused before anything is routed.
  HotStartFiles hot(study, req, clock);
  // Automatic choice: a first pass (the first half of the progress) judges every reach.
  std::optional<WaveChoices> choices;
  network::ProgressFn second_half = progress;
  if (set.automatic_wave_choice) {
    const network::ProgressFn first_half = [&](double f) { if (progress) progress(0.5 * f); };
    choices = choose_waves(study, req, clock, first_half, cancel);
    second_half = [&](double f) { if (progress) progress(0.5 + 0.5 * f); };
  }
  network::Model model = study.build_model(req.scenario_id, study.storm(req.storm_id),
                                           choices ? choices->scheme_fn() : ReachSchemeFn{});
  const std::vector<StationDescription> stations = study.stations(req.scenario_id);
  const std::vector<std::size_t> exported = export_indices(req, stations);
  if (!exported.empty()) (void)export_grid(study, req);  // bad interval: fail before routing

  OutputSet results(lock->folder(), req.storm_id, req.overwrite);
  reporting::RunRecorder recorder(model, stations);
  for (const StretchDefinition& st : study.stretches()) recorder.watch_stretch(st.path);
  StudySink sink(recorder, cancel);
  RunFiles files;
  open_run_files(study, req, model, stations, results, sink, files);
  for (std::size_t i : exported) recorder.keep_series(i);
  for (std::size_t i : observed_indices(study, req, stations)) recorder.keep_series(i);
  if (report_series_fit(study, stations)) recorder.keep_output_series();

  RunOutcome out;
  out.scenario_id = req.scenario_id;
  out.storm_id = req.storm_id;
  out.numerics = simulate_located(study, req, model, clock, sink, second_half, hot.hot_start());
  const std::string title =
      set.title + ", storm " + req.storm_id +
      (req.scenario_id.empty() ? " (base)" : ", scenario " + req.scenario_id);
  static_cast<reporting::RunReport&>(out) =
      reporting::report_run(model, out.numerics, recorder,
                            {title, req.source, clock, study.settings().start_iso});
  if (choices) report_choices(*choices, out.summary);
  compare_observed(study, req, recorder, stations, results, out);
  write_run_files(study, req, recorder, stations, exported, results, files, out);
  // The commit point: every file is complete in the staging folder.
  if (cancel && cancel()) throw RunInterrupted("the run was stopped before its results were kept");
  out.files = results.commit(RunPaths{results.folder(), req.storm_id}.summary_json());
  out.files.insert(out.files.end(), hot.written().begin(), hot.written().end());
  return out;
}

}  // namespace freshet::study
