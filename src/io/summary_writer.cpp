#include "freshet/io/summary_writer.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <functional>
#include <initializer_list>
#include <memory>
#include <string_view>
#include <utility>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/io/csv_table.hpp"

namespace freshet::io {

using reporting::ApplicabilityWarning;
using reporting::BreakingRecord;
using reporting::ShockPathPoint;
using reporting::kNotApplicable;
using reporting::MassBalanceRecord;
using reporting::AttenuationRecord;
using reporting::StretchRecord;
using reporting::ReachMethodRecord;
using reporting::RunSummary;
using reporting::ShockRecord;
using reporting::StationSummary;
using reporting::WaveNumberRecord;

namespace {

// ---- text table ---------------------------------------------------------------------------

std::string fixed(double v, int decimals) {
  return std::isnan(v) ? "-" : format_fixed(v, decimals);
}

// Columns padded to their widest cell; the first `text_columns` left-aligned (names), the
// others right-aligned (numbers).
std::string aligned(const std::vector<std::vector<std::string>>& rows, std::size_t text_columns) {
  std::vector<std::size_t> width;
  for (const auto& r : rows) {
    width.resize(std::max(width.size(), r.size()), 0);
    for (std::size_t c = 0; c < r.size(); ++c) width[c] = std::max(width[c], r[c].size());
  }
  std::string out;
  for (const auto& r : rows) {
    std::string line;
    for (std::size_t c = 0; c < r.size(); ++c) {
      const std::string pad(width[c] - r[c].size(), ' ');
      const std::string sep = c == 0 ? "" : "  ";
      line += sep + (c < text_columns ? r[c] + pad : pad + r[c]);
    }
    while (!line.empty() && line.back() == ' ') line.pop_back();
    out += line + "\n";
  }
  return out;
}

std::string station_table(const RunSummary& s) {
  std::vector<std::vector<std::string>> rows{{"station", "name", "peak Q (m3/s)", "peak at (h)",
                                              "peak stage (m)", "volume (m3)", "centroid lag (h)"}};
  for (const auto& r : s.stations) {
    rows.push_back({r.station_id, r.name, fixed(r.peak_discharge_m3s, 3),
                    fixed(r.peak_time_s / 3600.0, 3), fixed(r.peak_stage_m, 3),
                    fixed(r.runoff_volume_m3, 1), fixed(r.centroid_lag_s / 3600.0, 3)});
  }
  return aligned(rows, 2);
}

std::string attenuation_table(const RunSummary& s) {
  std::vector<std::vector<std::string>> rows{
      {"element", "kind", "peak in (m3/s)", "of it lateral (m3/s)", "peak out (m3/s)",
       "attenuation (%)", "delay (min)", "storage at peak out (m3)", "peak storage (m3)"}};
  for (const auto& r : s.attenuation) {
    rows.push_back({r.element, r.kind, fixed(r.peak_inflow_m3s, 3),
                    fixed(r.peak_lateral_inflow_m3s, 3), fixed(r.peak_outflow_m3s, 3),
                    fixed(r.attenuation_percent, 1), fixed(r.peak_delay_s / 60.0, 1),
                    fixed(r.storage_at_outflow_peak_m3, 0), fixed(r.peak_storage_m3, 0)});
  }
  return aligned(rows, 2);
}

std::string stretch_table(const RunSummary& s) {
  std::vector<std::vector<std::string>> rows{
      {"upstream", "downstream", "peak up (m3/s)", "side inflow (m3)", "side peak (m3/s)",
       "combined in (m3/s)", "peak down (m3/s)", "attenuation (%)", "shift (min)"}};
  for (const auto& r : s.stretches) {
    rows.push_back({r.upstream_id, r.downstream_id, fixed(r.upstream_peak_m3s, 3),
                    fixed(r.side_inflow_volume_m3, 0), fixed(r.side_inflow_peak_m3s, 3),
                    fixed(r.combined_inflow_peak_m3s, 3), fixed(r.downstream_peak_m3s, 3),
                    fixed(r.attenuation_percent, 1), fixed(r.peak_shift_s / 60.0, 1)});
  }
  return aligned(rows, 2);
}

// Breaks text at spaces into lines of at most `width` characters (console output).
std::string wrapped(std::string_view text, std::size_t width) {
  std::string out, line;
  std::size_t start = 0;
  while (start < text.size()) {
    const std::size_t end = std::min(text.find(' ', start), text.size());
    const std::string_view word = text.substr(start, end - start);
    if (!line.empty() && line.size() + 1 + word.size() > width) {
      out += line + "\n";
      line.clear();
    }
    line += (line.empty() ? "" : " ") + std::string(word);
    start = end + 1;
  }
  return out + line + "\n";
}

// "reach" or "subcatchment, plane P".
template <class Record>
std::string element_name(const Record& r) {
  return r.plane.empty() ? r.element : r.element + ", plane " + r.plane;
}

std::string check_lines(const RunSummary& s) {
  std::string out;
  if (!s.mass_balance.empty()) {
    std::vector<std::vector<std::string>> rows{{"element", "in (m3)", "out + loss (m3)",
                                                "storage change (m3)", "error (m3)",
                                                "relative error"}};
    for (const auto& r : s.mass_balance) {
      char rel[32];
      std::snprintf(rel, sizeof rel, "%.2e", r.relative_error);
      rows.push_back({r.element, fixed(r.inflow_volume_m3, 3), fixed(r.outflow_volume_m3, 3),
                      fixed(r.storage_change_m3, 3), fixed(r.error_m3, 6),
                      std::isnan(r.relative_error) ? "-" : rel});
    }
    out += "\nMass balance\n" + aligned(rows, 1);
  }
  if (!s.breaking.empty()) out += "\nBreaking (from the characteristics of each inflow)\n";
  for (const auto& r : s.breaking) out += "  " + element_name(r) + ": " + r.message + "\n";
  if (!s.shocks.empty()) out += "\nShocks\n";
  for (const auto& r : s.shocks) {
    out += "  " + element_name(r) + " formed at t = " + fixed(r.time_s / 3600.0, 3) +
           " h, chainage " + fixed(r.chainage_m, 1) + " m: " + r.message + "\n";
  }
  if (!s.methods.empty()) out += "\nRouting methods\n";
  for (const auto& r : s.methods) {
    out += "  " + r.element + ": " + r.scheme + " (" + r.wave + " wave): " + r.reason + "\n";
  }
  if (!s.warnings.empty()) out += "\nApplicability warnings\n" + format_warning_lines(s);
  return out;
}

// ---- CSV ----------------------------------------------------------------------------------

// The sidecar description shared by the three summary CSVs: what, the run's title, the time
// origin of the *_time_s columns, the caution (added by the sidecar writer).
CsvDescription summary_description(const RunSummary& s, const std::string& what,
                                   std::vector<CsvColumn> columns) {
  CsvDescription d;
  d.title = "freshet " + what + (s.title.empty() ? "" : ": " + s.title);
  d.source = s.source;
  d.time_origin_iso = s.time_origin_iso;
  const std::string since = s.time_origin_iso.empty() ? "" : " since " + s.time_origin_iso;
  for (auto& c : columns) {
    if (c.unit == "s" && c.name.ends_with("time_s")) c.unit += since;
  }
  d.columns = std::move(columns);
  return d;
}

CsvDescription stations_description(const RunSummary& s) {
  return summary_description(
      s, "station summary",
      {{"station_id", "", "station (element) id", "string"},
       {"name", "", "station name", "string"},
       {"peak_discharge_m3s", "m3 s-1", "peak discharge"},
       {"peak_time_s", "s", "time of the peak discharge"},
       {"peak_stage_m", "m", "peak water level (stage) where the element has one; empty otherwise"},
       {"runoff_volume_m3", "m3", "volume that passed the station"},
       {"centroid_time_s", "s", "time of the hydrograph's centroid"},
       {"centroid_lag_s", "s", "centroid lag from the centroid of the rainfall excess upstream"}});
}

CsvDescription attenuation_description(const RunSummary& s) {
  return summary_description(
      s, "attenuation of every reach, pond and culvert",
      {{"element", "", "element id", "string"},
       {"kind", "", "reach, culvert or detention", "string"},
       {"peak_inflow_m3s", "m3 s-1", "peak of the total inflow (upstream plus lateral, one hydrograph)"},
       {"peak_inflow_time_s", "s", "time of the total inflow peak"},
       {"peak_lateral_inflow_m3s", "m3 s-1", "peak of the lateral inflow along a reach alone"},
       {"peak_outflow_m3s", "m3 s-1", "peak outflow"},
       {"peak_outflow_time_s", "s", "time of the outflow peak"},
       {"attenuation_m3s", "m3 s-1", "peak inflow minus peak outflow"},
       {"attenuation_percent", "%", "attenuation as a share of the peak inflow"},
       {"peak_delay_s", "s", "outflow peak time minus inflow peak time"},
       {"peak_storage_m3", "m3", "largest volume stored in the element"},
       {"peak_storage_time_s", "s", "time of the largest storage"},
       {"storage_at_outflow_peak_m3", "m3", "volume stored at the time of the outflow peak"},
       {"inflow_volume_m3", "m3", "upstream plus lateral inflow over the run"},
       {"lateral_volume_m3", "m3", "lateral inflow over the run"},
       {"outflow_volume_m3", "m3", "outflow over the run"},
       {"storage_change_m3", "m3", "storage at the end minus storage at the start"}});
}

CsvDescription stretches_description(const RunSummary& s) {
  return summary_description(
      s, "stretches named in the study file",
      {{"upstream_id", "", "upstream element id", "string"},
       {"downstream_id", "", "downstream element id", "string"},
       {"path", "", "the elements of the flow path, upstream first, separated by ' > '", "string"},
       {"upstream_peak_m3s", "m3 s-1", "peak outflow of the upstream element"},
       {"upstream_peak_time_s", "s", "its time"},
       {"downstream_peak_m3s", "m3 s-1", "peak outflow of the downstream element"},
       {"downstream_peak_time_s", "s", "its time"},
       {"peak_shift_s", "s", "downstream peak time minus upstream peak time"},
       {"side_inflow_volume_m3", "m3", "volume entering the path between the two (lateral inflow and tributaries)"},
       {"side_inflow_peak_m3s", "m3 s-1", "peak of that side inflow, summed with no travel time"},
       {"side_inflow_peak_time_s", "s", "its time"},
       {"combined_inflow_peak_m3s", "m3 s-1", "peak of upstream outflow plus side inflow"},
       {"attenuation_m3s", "m3 s-1", "combined inflow peak minus downstream peak"},
       {"attenuation_percent", "%", "attenuation as a share of the combined inflow peak"}});
}

CsvDescription checks_description(const RunSummary& s) {
  return summary_description(
      s, "run checks",
      {{"kind", "",
        "breaking, shock, shock_path, mass_balance, wave_numbers, method or applicability",
        "string"},
       {"element", "", "element id", "string"},
       {"time_s", "s", "time of the finding"},
       {"chainage_m", "m", "distance from the element's upstream end"},
       {"inflow_volume_m3", "m3", "volume in"},
       {"outflow_volume_m3", "m3", "volume out plus losses"},
       {"storage_change_m3", "m3", "storage at the end minus storage at the start"},
       {"error_m3", "m3", "volume balance error"},
       {"relative_error", "1", "error over the larger of the volumes that passed"},
       {"message", "", "the finding in words", "string"},
       {"plane", "", "overland plane of a subcatchment; empty for a reach", "string"},
       {"breaks", "", "breaking rows: true when the wave breaks inside the element during the run",
        "string"},
       {"length_m", "m", "length of the reach or plane"},
       {"speed_m_s", "m s-1", "shock rows: least-squares speed of the shock's path"},
       {"rankine_hugoniot_m_s", "m s-1", "mean (Q_L - Q_R)/(A_L - A_R) along the path"},
       {"discharge_jump_m3s", "m3 s-1",
        "largest Q_L - Q_R along the path (m2 s-1 per metre of width on a plane)"},
       {"depth_jump_m", "m", "depth jump at the largest discharge jump"},
       {"fate", "", "outlet, merged, decayed, faded or merged, or in reach", "string"},
       {"end_time_s", "s", "when the shock reached the outlet or ended"},
       {"found_by", "", "fronts (characteristics scheme) or grid detector", "string"}});
}

std::string stations_csv(const RunSummary& s) {
  std::string out = "station_id,name,peak_discharge_m3s,peak_time_s,peak_stage_m,"
                    "runoff_volume_m3,centroid_time_s,centroid_lag_s\n";
  for (const auto& r : s.stations) {
    out += csv_field(r.station_id) + "," + csv_field(r.name) + "," +
           csv_number(r.peak_discharge_m3s) + "," + csv_number(r.peak_time_s) + "," +
           csv_number(r.peak_stage_m) + "," + csv_number(r.runoff_volume_m3) + "," +
           csv_number(r.centroid_time_s) + "," + csv_number(r.centroid_lag_s) + "\n";
  }
  return out;
}

std::string numbers_csv(std::initializer_list<double> values) {
  std::string out;
  for (double v : values) out += "," + csv_number(v);
  return out;
}

std::string attenuation_csv(const RunSummary& s) {
  std::string out = "element,kind,peak_inflow_m3s,peak_inflow_time_s,peak_lateral_inflow_m3s,"
                    "peak_outflow_m3s,peak_outflow_time_s,attenuation_m3s,attenuation_percent,"
                    "peak_delay_s,peak_storage_m3,peak_storage_time_s,storage_at_outflow_peak_m3,"
                    "inflow_volume_m3,lateral_volume_m3,outflow_volume_m3,storage_change_m3\n";
  for (const auto& r : s.attenuation) {
    out += csv_field(r.element) + "," + csv_field(r.kind) +
           numbers_csv({r.peak_inflow_m3s, r.peak_inflow_time_s, r.peak_lateral_inflow_m3s,
                        r.peak_outflow_m3s, r.peak_outflow_time_s, r.attenuation_m3s,
                        r.attenuation_percent, r.peak_delay_s, r.peak_storage_m3,
                        r.peak_storage_time_s, r.storage_at_outflow_peak_m3, r.inflow_volume_m3,
                        r.lateral_volume_m3, r.outflow_volume_m3, r.storage_change_m3}) +
           "\n";
  }
  return out;
}

std::string joined_path(const StretchRecord& r) {
  std::string out;
  for (const auto& id : r.path) out += (out.empty() ? "" : " > ") + id;
  return out;
}

std::string stretches_csv(const RunSummary& s) {
  std::string out = "upstream_id,downstream_id,path,upstream_peak_m3s,upstream_peak_time_s,"
                    "downstream_peak_m3s,downstream_peak_time_s,peak_shift_s,"
                    "side_inflow_volume_m3,side_inflow_peak_m3s,side_inflow_peak_time_s,"
                    "combined_inflow_peak_m3s,attenuation_m3s,attenuation_percent\n";
  for (const auto& r : s.stretches) {
    out += csv_field(r.upstream_id) + "," + csv_field(r.downstream_id) + "," +
           csv_field(joined_path(r)) +
           numbers_csv({r.upstream_peak_m3s, r.upstream_peak_time_s, r.downstream_peak_m3s,
                        r.downstream_peak_time_s, r.peak_shift_s, r.side_inflow_volume_m3,
                        r.side_inflow_peak_m3s, r.side_inflow_peak_time_s,
                        r.combined_inflow_peak_m3s, r.attenuation_m3s, r.attenuation_percent}) +
           "\n";
  }
  return out;
}

// The columns after `message` (breaking, shock and shock_path rows), in order.
struct WaveColumns {
  std::string plane;
  std::string breaks;  // "true", "false" or empty
  double length_m = kNotApplicable;
  double speed_m_s = kNotApplicable;
  double rankine_hugoniot_m_s = kNotApplicable;
  double discharge_jump_m3s = kNotApplicable;
  double depth_jump_m = kNotApplicable;
  std::string fate;
  double end_time_s = kNotApplicable;
  std::string found_by;
};
constexpr const char* kWaveColumnNames =
    ",plane,breaks,length_m,speed_m_s,rankine_hugoniot_m_s,discharge_jump_m3s,depth_jump_m,"
    "fate,end_time_s,found_by";
std::string csv_wave_columns(const WaveColumns& w) {
  return "," + csv_field(w.plane) + "," + w.breaks + "," + csv_number(w.length_m) + "," +
         csv_number(w.speed_m_s) + "," + csv_number(w.rankine_hugoniot_m_s) + "," +
         csv_number(w.discharge_jump_m3s) + "," + csv_number(w.depth_jump_m) + "," +
         csv_field(w.fate) + "," + csv_number(w.end_time_s) + "," + csv_field(w.found_by);
}
const std::string kNoWaveColumns = csv_wave_columns({});

std::string checks_csv(const RunSummary& s) {
  std::string out = std::string("kind,element,time_s,chainage_m,inflow_volume_m3,outflow_volume_m3,"
                                "storage_change_m3,error_m3,relative_error,message") +
                    kWaveColumnNames + "\n";
  for (const auto& r : s.breaking) {
    WaveColumns w;
    w.plane = r.plane;
    w.breaks = r.breaks ? "true" : "false";
    w.length_m = r.length_m;
    out += "breaking," + csv_field(r.element) + "," + csv_number(r.time_s) + "," +
           csv_number(r.chainage_m) + ",,,,,," + csv_field(r.message) + csv_wave_columns(w) +
           "\n";
  }
  for (const auto& r : s.shocks) {
    const WaveColumns w{r.plane,           "",          kNotApplicable,
                        r.speed_m_s,       r.rankine_hugoniot_m_s, r.discharge_jump_m3s,
                        r.depth_jump_m,    r.fate,      r.end_time_s,
                        r.found_by};
    out += "shock," + csv_field(r.element) + "," + csv_number(r.time_s) + "," +
           csv_number(r.chainage_m) + ",,,,,," + csv_field(r.message) + csv_wave_columns(w) +
           "\n";
    for (const auto& p : r.path) {
      WaveColumns pw;
      pw.plane = r.plane;
      pw.rankine_hugoniot_m_s = p.rankine_hugoniot_m_s;
      pw.discharge_jump_m3s = p.discharge_jump_m3s;
      pw.found_by = r.found_by;
      out += "shock_path," + csv_field(r.element) + "," + csv_number(p.time_s) + "," +
             csv_number(p.chainage_m) + ",,,,,," + csv_wave_columns(pw) + "\n";
    }
  }
  for (const auto& r : s.mass_balance) {
    out += "mass_balance," + csv_field(r.element) + ",,," + csv_number(r.inflow_volume_m3) + "," +
           csv_number(r.outflow_volume_m3) + "," + csv_number(r.storage_change_m3) + "," +
           csv_number(r.error_m3) + "," + csv_number(r.relative_error) + "," + kNoWaveColumns +
           "\n";
  }
  for (const auto& r : s.wave_numbers) {
    out += "wave_numbers," + csv_field(r.element) + ",,,,,,,," +
           csv_field("time_of_rise_s=" + csv_number(r.time_of_rise_s) +
                    "; kinematic_number=" + csv_number(r.kinematic_number) +
                    "; diffusion_number=" + csv_number(r.diffusion_number)) +
           kNoWaveColumns + "\n";
  }
  for (const auto& r : s.methods) {
    out += "method," + csv_field(r.element) + ",,,,,,,," +
           csv_field("scheme=" + r.scheme + "; wave=" + r.wave + "; reason=" + r.reason) +
           kNoWaveColumns + "\n";
  }
  for (const auto& r : s.warnings) {
    out += "applicability," + csv_field(r.element) + ",,,,,,,," + csv_field(r.message) +
           kNoWaveColumns + "\n";
  }
  return out;
}

// ---- JSON ---------------------------------------------------------------------------------

nlohmann::json number(double v) { return std::isnan(v) ? nlohmann::json(nullptr) : nlohmann::json(v); }

nlohmann::json to_json(const StationSummary& r) {
  return {{"station_id", r.station_id},
          {"name", r.name},
          {"peak_discharge_m3s", number(r.peak_discharge_m3s)},
          {"peak_time_s", number(r.peak_time_s)},
          {"peak_stage_m", number(r.peak_stage_m)},
          {"runoff_volume_m3", number(r.runoff_volume_m3)},
          {"centroid_time_s", number(r.centroid_time_s)},
          {"centroid_lag_s", number(r.centroid_lag_s)}};
}

nlohmann::json to_json(const AttenuationRecord& r) {
  return {{"element", r.element},
          {"kind", r.kind},
          {"peak_inflow_m3s", number(r.peak_inflow_m3s)},
          {"peak_inflow_time_s", number(r.peak_inflow_time_s)},
          {"peak_lateral_inflow_m3s", number(r.peak_lateral_inflow_m3s)},
          {"peak_outflow_m3s", number(r.peak_outflow_m3s)},
          {"peak_outflow_time_s", number(r.peak_outflow_time_s)},
          {"attenuation_m3s", number(r.attenuation_m3s)},
          {"attenuation_percent", number(r.attenuation_percent)},
          {"peak_delay_s", number(r.peak_delay_s)},
          {"peak_storage_m3", number(r.peak_storage_m3)},
          {"peak_storage_time_s", number(r.peak_storage_time_s)},
          {"storage_at_outflow_peak_m3", number(r.storage_at_outflow_peak_m3)},
          {"inflow_volume_m3", number(r.inflow_volume_m3)},
          {"lateral_volume_m3", number(r.lateral_volume_m3)},
          {"outflow_volume_m3", number(r.outflow_volume_m3)},
          {"storage_change_m3", number(r.storage_change_m3)}};
}

nlohmann::json to_json(const StretchRecord& r) {
  return {{"upstream_id", r.upstream_id},
          {"downstream_id", r.downstream_id},
          {"path", r.path},
          {"upstream_peak_m3s", number(r.upstream_peak_m3s)},
          {"upstream_peak_time_s", number(r.upstream_peak_time_s)},
          {"downstream_peak_m3s", number(r.downstream_peak_m3s)},
          {"downstream_peak_time_s", number(r.downstream_peak_time_s)},
          {"peak_shift_s", number(r.peak_shift_s)},
          {"side_inflow_volume_m3", number(r.side_inflow_volume_m3)},
          {"side_inflow_peak_m3s", number(r.side_inflow_peak_m3s)},
          {"side_inflow_peak_time_s", number(r.side_inflow_peak_time_s)},
          {"combined_inflow_peak_m3s", number(r.combined_inflow_peak_m3s)},
          {"attenuation_m3s", number(r.attenuation_m3s)},
          {"attenuation_percent", number(r.attenuation_percent)}};
}

nlohmann::json to_json(const BreakingRecord& r) {
  return {{"element", r.element},
          {"plane", r.plane},
          {"breaks", r.breaks},
          {"time_s", number(r.time_s)},
          {"chainage_m", number(r.chainage_m)},
          {"length_m", number(r.length_m)},
          {"message", r.message}};
}

nlohmann::json to_json(const ShockPathPoint& p) {
  return {{"time_s", number(p.time_s)},
          {"chainage_m", number(p.chainage_m)},
          {"rankine_hugoniot_m_s", number(p.rankine_hugoniot_m_s)},
          {"discharge_jump_m3s", number(p.discharge_jump_m3s)}};
}

nlohmann::json to_json(const ShockRecord& r) {
  nlohmann::json path = nlohmann::json::array();
  for (const auto& p : r.path) path.push_back(to_json(p));
  return {{"element", r.element},
          {"plane", r.plane},
          {"time_s", number(r.time_s)},
          {"chainage_m", number(r.chainage_m)},
          {"speed_m_s", number(r.speed_m_s)},
          {"rankine_hugoniot_m_s", number(r.rankine_hugoniot_m_s)},
          {"discharge_jump_m3s", number(r.discharge_jump_m3s)},
          {"depth_jump_m", number(r.depth_jump_m)},
          {"fate", r.fate},
          {"end_time_s", number(r.end_time_s)},
          {"found_by", r.found_by},
          {"path", std::move(path)},
          {"message", r.message}};
}

nlohmann::json to_json(const MassBalanceRecord& r) {
  return {{"element", r.element},
          {"inflow_volume_m3", number(r.inflow_volume_m3)},
          {"outflow_volume_m3", number(r.outflow_volume_m3)},
          {"storage_change_m3", number(r.storage_change_m3)},
          {"error_m3", number(r.error_m3)},
          {"relative_error", number(r.relative_error)}};
}

nlohmann::json to_json(const WaveNumberRecord& r) {
  return {{"element", r.element},
          {"time_of_rise_s", number(r.time_of_rise_s)},
          {"kinematic_number", number(r.kinematic_number)},
          {"diffusion_number", number(r.diffusion_number)}};
}

nlohmann::json to_json(const ReachMethodRecord& r) {
  return {{"element", r.element}, {"scheme", r.scheme}, {"wave", r.wave}, {"reason", r.reason}};
}

nlohmann::json to_json(const ApplicabilityWarning& r) {
  return {{"element", r.element}, {"message", r.message}};
}

}  // namespace

std::string format_warning_lines(const RunSummary& summary) {
  std::string out;
  for (const auto& r : summary.warnings) out += "  " + r.element + ": " + r.message + "\n";
  return out;
}

std::string format_summary_table(const RunSummary& summary, bool with_caution) {
  std::string out;
  if (!summary.title.empty()) out += summary.title + "\n\n";
  out += "Stations\n" + station_table(summary);
  if (!summary.attenuation.empty()) {
    out += "\nAttenuation (peak of the total inflow, upstream plus lateral, against peak outflow)\n" +
           attenuation_table(summary);
  }
  if (!summary.stretches.empty()) {
    out += "\nStretches (side inflow = lateral inflow and tributaries between the two)\n" +
           stretch_table(summary);
  }
  out += check_lines(summary);
  return with_caution ? out + "\n" + wrapped(kCautionText, 96) : out;
}

std::vector<std::filesystem::path> summary_csv_paths(const std::filesystem::path& prefix) {
  return {prefix.string() + "_stations.csv", prefix.string() + "_attenuation.csv",
          prefix.string() + "_stretches.csv", prefix.string() + "_checks.csv"};
}

std::vector<std::filesystem::path> write_summary_csv(const std::filesystem::path& prefix,
                                                     const RunSummary& summary,
                                                     Overwrite overwrite,
                                                     OutputSet* set) {
  // Each table is made only when its file is written: a 10 000-reach network's four tables
  // held 50 MB at once.
  using Table = std::string (*)(const RunSummary&);
  const Table tables[] = {stations_csv, attenuation_csv, stretches_csv, checks_csv};
  const CsvDescription descriptions[] = {stations_description(summary),
                                         attenuation_description(summary),
                                         stretches_description(summary),
                                         checks_description(summary)};
  const std::vector<std::filesystem::path> paths = summary_csv_paths(prefix);
  // Open all first, so an existing file stops the whole set before anything is written.
  std::vector<std::unique_ptr<AtomicFile>> files;
  for (const auto& path : paths) {
    files.push_back(std::make_unique<AtomicFile>(path, overwrite, set));
    files.push_back(std::make_unique<AtomicFile>(csv_metadata_path(path), overwrite, set));
  }
  for (std::size_t i = 0; i < paths.size(); ++i) {
    files[2 * i]->write(tables[i](summary));
    files[2 * i + 1]->write(format_csv_metadata(paths[i].filename().string(), descriptions[i]));
  }
  for (auto& f : files) f->commit();
  return paths;
}

namespace {

// `text` (a JSON value dumped with indent 2) with every line after the first indented by
// `indent` more spaces, as it reads nested at that depth.
void put_nested(std::string_view text, std::string_view indent,
                const std::function<void(std::string_view)>& put) {
  std::size_t from = 0;
  for (std::size_t nl = text.find('\n'); nl != std::string_view::npos; nl = text.find('\n', from)) {
    put(text.substr(from, nl + 1 - from));
    put(indent);
    from = nl + 1;
  }
  put(text.substr(from));
}

template <class T>
void put_array(const std::vector<T>& records, const std::function<void(std::string_view)>& put) {
  if (records.empty()) {
    put("[]");
    return;
  }
  put("[\n");
  for (std::size_t k = 0; k < records.size(); ++k) {
    put("    ");
    put_nested(to_json(records[k]).dump(2), "    ", put);
    put(k + 1 < records.size() ? ",\n" : "\n");
  }
  put("  ]");
}

// The summary document, the same text as one nlohmann::json object dumped with indent 2 (its
// members in the order of their names), written a record at a time: a 10 000-reach network's
// summary held 80 MB as one string and 74 MB more as a JSON tree.
void put_summary_json(const RunSummary& summary, const std::function<void(std::string_view)>& put) {
  nlohmann::json head;
  head["format"] = "freshet run summary";
  head["format_version"] = kOutputFormatVersion;
  head["title"] = summary.title;
  head["source"] = summary.source;
  head["time_origin"] = summary.time_origin_iso.empty() ? nlohmann::json(nullptr)
                                                        : nlohmann::json(summary.time_origin_iso);
  head["caution"] = std::string(kCautionText);
  head["units"] = {{"discharge", "m3 s-1"}, {"time", "s"},       {"stage", "m"},
                   {"volume", "m3"},        {"chainage", "m"},   {"percent", "%"}};
  using Member = std::pair<std::string_view, std::function<void()>>;
  std::vector<Member> members{
      {"stations", [&] { put_array(summary.stations, put); }},
      {"attenuation", [&] { put_array(summary.attenuation, put); }},
      {"stretches", [&] { put_array(summary.stretches, put); }},
      {"breaking", [&] { put_array(summary.breaking, put); }},
      {"shocks", [&] { put_array(summary.shocks, put); }},
      {"mass_balance", [&] { put_array(summary.mass_balance, put); }},
      {"wave_numbers", [&] { put_array(summary.wave_numbers, put); }},
      {"reach_methods", [&] { put_array(summary.methods, put); }},
      {"applicability_warnings", [&] { put_array(summary.warnings, put); }},
  };
  for (const auto& [key, value] : head.items()) {
    const std::string text = value.dump(2);
    members.emplace_back(key, [text, &put] { put_nested(text, "  ", put); });
  }
  std::sort(members.begin(), members.end(),
            [](const Member& a, const Member& b) { return a.first < b.first; });
  put("{\n");
  for (std::size_t k = 0; k < members.size(); ++k) {
    put("  \"");
    put(members[k].first);
    put("\": ");
    members[k].second();
    put(k + 1 < members.size() ? ",\n" : "\n");
  }
  put("}\n");
}

}  // namespace

std::string format_summary_json(const RunSummary& summary) {
  std::string out;
  put_summary_json(summary, [&out](std::string_view text) { out += text; });
  return out;
}

void write_summary_json(const std::filesystem::path& path, const RunSummary& summary,
                        Overwrite overwrite, OutputSet* set) {
  AtomicFile file(path, overwrite, set);
  put_summary_json(summary, [&file](std::string_view text) { file.write(text); });
  file.commit();
}

}  // namespace freshet::io
