#include "freshet/io/comparison_writer.hpp"

#include <cmath>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/io/csv_table.hpp"

namespace freshet::io {

using reporting::ComparisonRow;

namespace {

nlohmann::json json_number(double v) {
  return std::isnan(v) ? nlohmann::json(nullptr) : nlohmann::json(v);
}
std::string scenario_name(const ComparisonRow& r) {
  return r.scenario_id.empty() ? "base" : r.scenario_id;
}
const char* stage_datum(const ComparisonRow& r) {
  return std::isnan(r.peak_stage_m) ? "" : r.stage_is_elevation ? "elevation" : "depth";
}

CsvDescription comparison_description(const ComparisonHeader& h) {
  CsvDescription d;
  d.title = "freshet scenario comparison" + (h.title.empty() ? "" : ": " + h.title);
  d.source = h.source;
  d.time_origin_iso = h.time_origin_iso;
  d.notes = {"one row per storm, point and scenario (base first); the *_change_* and "
             "*_shift_* columns are the scenario minus the base, empty on base rows"};
  const std::string time_unit =
      h.time_origin_iso.empty() ? std::string("s") : "s since " + h.time_origin_iso;
  d.columns = {
      {"storm_id", "", "design storm id", "string"},
      {"station_id", "", "point (element) id", "string"},
      {"station_name", "", "point name", "string"},
      {"kind", "", "element kind: subcatchment, inflow, reach, junction, culvert, detention, outlet",
       "string"},
      {"scenario", "", "base, or the scenario id", "string"},
      {"peak_discharge_m3s", "m3 s-1", "peak discharge"},
      {"peak_discharge_change_m3s", "m3 s-1", "scenario peak minus base peak"},
      {"peak_time_s", time_unit, "time of the peak discharge"},
      {"peak_time_shift_s", "s", "scenario peak time minus base peak time"},
      {"peak_stage_m", "m", "peak water level: an elevation or a depth (stage_datum)"},
      {"stage_datum", "", "elevation or depth", "string"},
      {"peak_stage_change_m", "m",
       "scenario minus base; empty where the two are not on one datum"},
      {"volume_m3", "m3", "volume that passed the point"},
      {"volume_change_m3", "m3", "scenario volume minus base volume"},
      {"road_overtopping_s", "s", "time the road was overtopped (culverts only)"}};
  return d;
}

}  // namespace

ComparisonFiles comparison_files(const std::filesystem::path& folder) {
  const auto csv = folder / "comparison.csv";
  return {csv, csv_metadata_path(csv), folder / "comparison.json"};
}

std::string format_comparison_csv(const std::vector<ComparisonRow>& rows) {
  std::string out =
      "storm_id,station_id,station_name,kind,scenario,peak_discharge_m3s,"
      "peak_discharge_change_m3s,peak_time_s,peak_time_shift_s,peak_stage_m,stage_datum,"
      "peak_stage_change_m,volume_m3,volume_change_m3,road_overtopping_s\n";
  for (const ComparisonRow& r : rows) {
    out += csv_field(r.storm_id) + "," + csv_field(r.station_id) + "," +
           csv_field(r.station_name) + "," + std::string(network::to_string(r.kind)) + "," +
           csv_field(scenario_name(r)) + "," + csv_number(r.peak_discharge_m3s) + "," +
           csv_number(r.peak_discharge_change_m3s) + "," + csv_number(r.peak_time_s) + "," +
           csv_number(r.peak_time_shift_s) + "," + csv_number(r.peak_stage_m) + "," +
           stage_datum(r) + "," + csv_number(r.peak_stage_change_m) + "," +
           csv_number(r.volume_m3) + "," + csv_number(r.volume_change_m3) + "," +
           csv_number(r.overtopping_s) + "\n";
  }
  return out;
}

std::string format_comparison_json(const std::vector<ComparisonRow>& rows,
                                   const ComparisonHeader& header) {
  nlohmann::json j;
  j["format"] = "freshet scenario comparison";
  j["format_version"] = kOutputFormatVersion;
  j["title"] = header.title;
  j["source"] = header.source;
  j["time_origin"] =
      header.time_origin_iso.empty() ? nlohmann::json(nullptr) : nlohmann::json(header.time_origin_iso);
  j["caution"] = std::string(kCautionText);
  j["units"] = {{"discharge", "m3 s-1"}, {"time", "s"}, {"stage", "m"}, {"volume", "m3"}};
  nlohmann::json a = nlohmann::json::array();
  for (const ComparisonRow& r : rows) {
    a.push_back({{"storm_id", r.storm_id},
                 {"station_id", r.station_id},
                 {"station_name", r.station_name},
                 {"kind", std::string(network::to_string(r.kind))},
                 {"scenario", scenario_name(r)},
                 {"peak_discharge_m3s", json_number(r.peak_discharge_m3s)},
                 {"peak_discharge_change_m3s", json_number(r.peak_discharge_change_m3s)},
                 {"peak_time_s", json_number(r.peak_time_s)},
                 {"peak_time_shift_s", json_number(r.peak_time_shift_s)},
                 {"peak_stage_m", json_number(r.peak_stage_m)},
                 {"stage_datum", stage_datum(r)},
                 {"peak_stage_change_m", json_number(r.peak_stage_change_m)},
                 {"volume_m3", json_number(r.volume_m3)},
                 {"volume_change_m3", json_number(r.volume_change_m3)},
                 {"road_overtopping_s", json_number(r.overtopping_s)}});
  }
  j["rows"] = std::move(a);
  return j.dump(2) + "\n";
}

void write_comparison(const ComparisonFiles& files, const std::vector<ComparisonRow>& rows,
                      const ComparisonHeader& header, Overwrite overwrite) {
  // Open all three first, so an existing file stops the set before anything is written.
  AtomicFile csv(files.csv, overwrite);
  AtomicFile sidecar(files.csv_metadata, overwrite);
  AtomicFile json(files.json, overwrite);
  csv.write(format_comparison_csv(rows));
  sidecar.write(format_csv_metadata(files.csv.filename().string(), comparison_description(header)));
  json.write(format_comparison_json(rows, header));
  csv.commit();
  sidecar.commit();
  json.commit();
}

}  // namespace freshet::io
