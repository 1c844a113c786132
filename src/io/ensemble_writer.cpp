#include "freshet/io/ensemble_writer.hpp"

#include <cmath>
#include <memory>
#include <nlohmann/json.hpp>
#include <sstream>

#include "freshet/core/caution.hpp"
#include "freshet/io/csv_table.hpp"

namespace freshet::io {
namespace {

using uncertainty::EnsembleSummary;
using uncertainty::PeakQuantity;

constexpr PeakQuantity kQuantities[] = {
    PeakQuantity::discharge, PeakQuantity::stage, PeakQuantity::time, PeakQuantity::volume};

nlohmann::json number_or_null(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}

std::string describe(PeakQuantity q) {
  switch (q) {
    case PeakQuantity::discharge:
      return "peak discharge";
    case PeakQuantity::stage:
      return "peak stage (empty where the element has no stage)";
    case PeakQuantity::time:
      return "time of peak discharge";
    case PeakQuantity::volume:
      return "volume that left the element";
  }
  return "";  // not reached
}

// The columns of one percentile row: <quantity>_<pN> for each quantity and percentile.
void add_percentile_columns(std::vector<CsvColumn>& columns,
                            const EnsembleSummary& s,
                            const std::string& since) {
  for (const PeakQuantity q : kQuantities) {
    for (const double p : s.percentiles) {
      std::string unit(uncertainty::unit_name(q));
      if (q == PeakQuantity::time) unit += since;
      columns.push_back({std::string(uncertainty::column_name(q)) + "_" + percentile_label(p),
                         unit,
                         percentile_label(p).substr(1) +
                             "th percentile over the members "
                             "of the " +
                             describe(q)});
    }
  }
}

std::string percentile_cells(
    const std::array<std::vector<double>, uncertainty::kPeakQuantities>& values) {
  std::string row;
  for (const PeakQuantity q : kQuantities) {
    for (const double v : values[uncertainty::index(q)]) row += "," + csv_number(v);
  }
  return row;
}

std::string percentiles_csv(const EnsembleSummary& s,
                            const EnsembleDescription& d,
                            std::vector<CsvColumn>& columns,
                            const std::string& since) {
  columns = {{"station_id", "", "station (element) id", "string"},
             {"name", "", "station name", "string"}};
  add_percentile_columns(columns, s, since);
  std::string text;
  for (const CsvColumn& c : columns) text += (text.empty() ? "" : ",") + csv_field(c.name);
  text += "\n";
  for (std::size_t i = 0; i < s.stations.size(); ++i) {
    const std::string name = i < d.station_names.size() ? d.station_names[i] : "";
    text += csv_field(s.stations[i].id) + "," + csv_field(name) +
            percentile_cells(s.stations[i].values) + "\n";
  }
  return text;
}

std::string exceedance_csv(const EnsembleSummary& s, std::vector<CsvColumn>& columns) {
  columns = {{"threshold", "", "threshold name", "string"},
             {"station_id", "", "station (element) id", "string"},
             {"quantity", "", "peak_discharge_m3s or peak_stage_m", "string"},
             {"threshold_discharge_m3s", "m3 s-1", "discharge threshold (empty for a stage)"},
             {"threshold_stage_m", "m", "stage threshold (empty for a discharge)"},
             {"members", "", "members routed", "integer"},
             {"members_above", "", "members whose peak is strictly above the threshold", "integer"},
             {"probability", "1", "members_above / members"},
             {"standard_error", "1", "binomial standard error sqrt(p (1 - p) / members)"}};
  std::string text =
      "threshold,station_id,quantity,threshold_discharge_m3s,threshold_stage_m,members,"
      "members_above,probability,standard_error\n";
  for (const uncertainty::ExceedanceResult& e : s.exceedances) {
    const bool q = e.threshold.quantity == PeakQuantity::discharge;
    text += csv_field(e.threshold.name) + "," + csv_field(e.threshold.station_id) + "," +
            std::string(uncertainty::column_name(e.threshold.quantity)) + "," +
            (q ? csv_number(e.threshold.value_si) : "") + "," +
            (q ? "" : csv_number(e.threshold.value_si)) + "," + std::to_string(e.members) + "," +
            (std::isnan(e.probability) ? "" : std::to_string(e.exceeded)) + "," +
            csv_number(e.probability) + "," + csv_number(e.standard_error) + "\n";
  }
  return text;
}

std::string convergence_csv(const EnsembleSummary& s,
                            std::vector<CsvColumn>& columns,
                            const std::string& since) {
  columns = {{"members", "", "the first this many members", "integer"},
             {"station_id", "", "station (element) id", "string"}};
  add_percentile_columns(columns, s, since);
  std::string text;
  for (const CsvColumn& c : columns) text += (text.empty() ? "" : ",") + csv_field(c.name);
  text += "\n";
  // Rows of the summary come a quantity at a time: one CSV row per size and station.
  for (std::size_t k = 0; k + uncertainty::kPeakQuantities <= s.convergence.size();
       k += uncertainty::kPeakQuantities) {
    std::array<std::vector<double>, uncertainty::kPeakQuantities> values;
    for (std::size_t q = 0; q < uncertainty::kPeakQuantities; ++q) {
      values[uncertainty::index(s.convergence[k + q].quantity)] = s.convergence[k + q].values;
    }
    text += std::to_string(s.convergence[k].members) + "," +
            csv_field(s.convergence[k].station_id) + percentile_cells(values) + "\n";
  }
  return text;
}

std::string members_csv(const std::vector<uncertainty::MemberPeaks>& members,
                        std::vector<CsvColumn>& columns,
                        const std::string& since) {
  columns = {{"member", "", "member number, from 1", "integer"},
             {"station_id", "", "station (element) id", "string"}};
  for (const PeakQuantity q : kQuantities) {
    std::string unit(uncertainty::unit_name(q));
    if (q == PeakQuantity::time) unit += since;
    columns.push_back({std::string(uncertainty::column_name(q)), unit, describe(q)});
  }
  std::string text = "member,station_id";
  for (const PeakQuantity q : kQuantities) text += "," + std::string(uncertainty::column_name(q));
  text += "\n";
  const std::size_t n = members.empty() ? 0 : members.front().peak_discharge_m3s.size();
  for (std::size_t m = 0; m < n; ++m) {
    for (const uncertainty::MemberPeaks& station : members) {
      text += std::to_string(m + 1) + "," + csv_field(station.id);
      for (const PeakQuantity q : kQuantities) {
        text += "," + csv_number(uncertainty::values_of(station, q)[m]);
      }
      text += "\n";
    }
  }
  return text;
}

nlohmann::json percentile_json(
    const EnsembleSummary& s,
    const std::array<std::vector<double>, uncertainty::kPeakQuantities>& values) {
  nlohmann::json j = nlohmann::json::object();
  for (const PeakQuantity q : kQuantities) {
    nlohmann::json by = nlohmann::json::object();
    for (std::size_t p = 0; p < s.percentiles.size(); ++p) {
      by[percentile_label(s.percentiles[p])] = number_or_null(values[uncertainty::index(q)][p]);
    }
    j[std::string(uncertainty::column_name(q))] = std::move(by);
  }
  return j;
}

}  // namespace

std::string percentile_label(double q) { return "p" + csv_number(q); }

std::vector<std::filesystem::path> ensemble_table_paths(const std::filesystem::path& stem) {
  const std::string s = stem.string();
  return {s + "_percentiles.csv",
          s + "_exceedance.csv",
          s + "_convergence.csv",
          s + "_members.csv",
          s + ".json"};
}

std::string format_ensemble_json(const EnsembleSummary& s, const EnsembleDescription& d) {
  nlohmann::json j;
  j["format"] = "freshet ensemble summary";
  j["format_version"] = kOutputFormatVersion;
  j["title"] = d.title;
  j["source"] = d.source;
  j["time_origin"] =
      d.time_origin_iso.empty() ? nlohmann::json(nullptr) : nlohmann::json(d.time_origin_iso);
  j["caution"] = std::string(kCautionText);
  j["scenario"] = d.scenario.empty() ? std::string("base") : d.scenario;
  j["storm"] = d.storm;
  j["members"] = s.members;
  j["sampling"] = d.sampling;
  j["percentiles"] = s.percentiles;
  j["units"] = {{"discharge", "m3 s-1"}, {"time", "s"}, {"stage", "m"}, {"volume", "m3"}};
  nlohmann::json stations = nlohmann::json::array();
  for (std::size_t i = 0; i < s.stations.size(); ++i) {
    nlohmann::json st = percentile_json(s, s.stations[i].values);
    st["station_id"] = s.stations[i].id;
    st["name"] = i < d.station_names.size() ? d.station_names[i] : "";
    stations.push_back(std::move(st));
  }
  j["stations"] = std::move(stations);
  nlohmann::json exceedance = nlohmann::json::array();
  for (const uncertainty::ExceedanceResult& e : s.exceedances) {
    exceedance.push_back(
        {{"threshold", e.threshold.name},
         {"station_id", e.threshold.station_id},
         {"quantity", std::string(uncertainty::column_name(e.threshold.quantity))},
         {"value", e.threshold.value_si},
         {"members", e.members},
         {"members_above",
          std::isnan(e.probability) ? nlohmann::json(nullptr) : nlohmann::json(e.exceeded)},
         {"probability", number_or_null(e.probability)},
         {"standard_error", number_or_null(e.standard_error)}});
  }
  j["exceedance"] = std::move(exceedance);
  nlohmann::json convergence = nlohmann::json::array();
  for (const uncertainty::ConvergenceRow& r : s.convergence) {
    nlohmann::json values = nlohmann::json::object();
    for (std::size_t p = 0; p < s.percentiles.size(); ++p) {
      values[percentile_label(s.percentiles[p])] = number_or_null(r.values[p]);
    }
    convergence.push_back({{"members", r.members},
                           {"station_id", r.station_id},
                           {"quantity", std::string(uncertainty::column_name(r.quantity))},
                           {"percentiles", std::move(values)}});
  }
  j["convergence"] = std::move(convergence);
  return j.dump(2) + "\n";
}

std::vector<std::filesystem::path> write_ensemble_tables(
    const std::filesystem::path& stem,
    const EnsembleSummary& summary,
    const std::vector<uncertainty::MemberPeaks>& members,
    const EnsembleDescription& d,
    Overwrite overwrite,
    OutputSet* set) {
  const std::string since = d.time_origin_iso.empty() ? "" : " since " + d.time_origin_iso;
  const std::string what = d.storm + (d.scenario.empty() ? "" : ", scenario " + d.scenario);
  std::vector<CsvColumn> columns[4];
  const std::string texts[4] = {percentiles_csv(summary, d, columns[0], since),
                                exceedance_csv(summary, columns[1]),
                                convergence_csv(summary, columns[2], since),
                                members_csv(members, columns[3], since)};
  const char* titles[4] = {"ensemble percentiles",
                           "ensemble threshold exceedance",
                           "ensemble convergence of the percentiles",
                           "ensemble members"};
  const std::vector<std::filesystem::path> paths = ensemble_table_paths(stem);
  // Open all first, so an existing file stops the whole set before anything is written.
  std::vector<std::unique_ptr<AtomicFile>> files;
  for (const auto& path : paths) {
    files.push_back(std::make_unique<AtomicFile>(path, overwrite, set));
    if (path.extension() == ".csv") {
      files.push_back(std::make_unique<AtomicFile>(csv_metadata_path(path), overwrite, set));
    }
  }
  for (std::size_t i = 0; i < 4; ++i) {
    CsvDescription desc;
    desc.title = std::string("freshet ") + titles[i] + ": " + d.title + " (" + what + ")";
    desc.source = d.source;
    desc.time_origin_iso = d.time_origin_iso;
    desc.notes = {std::to_string(summary.members) + " members, " + d.sampling,
                  "percentiles by Hyndman & Fan (1996) definition 7 (numpy's default)"};
    desc.columns = columns[i];
    files[2 * i]->write(texts[i]);
    files[2 * i + 1]->write(format_csv_metadata(paths[i].filename().string(), desc));
  }
  files.back()->write(format_ensemble_json(summary, d));
  for (auto& f : files) f->commit();
  return paths;
}

}  // namespace freshet::io
