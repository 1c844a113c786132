#include "freshet/io/csv_table.hpp"

#include <cmath>
#include <memory>
#include <nlohmann/json.hpp>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"

namespace freshet::io {

std::string csv_field(std::string_view text) {
  const bool edge_space = !text.empty() && (text.front() == ' ' || text.back() == ' ');
  if (!edge_space && text.find_first_of(",\"\r\n#") == std::string_view::npos) {
    return std::string(text);
  }
  std::string out = "\"";
  for (const char c : text) out += (c == '"') ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

std::string csv_number(double v) { return std::isnan(v) ? "" : format_value(v); }

std::filesystem::path csv_metadata_path(const std::filesystem::path& csv_path) {
  return csv_path.string() + "-metadata.json";
}

std::string format_csv_metadata(const std::string& csv_file_name, const CsvDescription& d) {
  // CSVW (W3C 2015): "@context", "url", "tableSchema" with "columns", each with "name",
  // "titles" and "datatype"; other members use the Dublin Core ("dc:") and schema.org
  // ("schema:") prefixes the recommendation predefines.
  nlohmann::json columns = nlohmann::json::array();
  for (const CsvColumn& c : d.columns) {
    nlohmann::json col = {{"name", c.name}, {"titles", c.name}, {"datatype", c.datatype}};
    if (!c.description.empty()) col["dc:description"] = c.description;
    if (!c.unit.empty()) col["schema:unitText"] = c.unit;
    columns.push_back(std::move(col));
  }
  nlohmann::json notes = nlohmann::json::array();
  if (!d.time_origin_iso.empty()) {
    notes.push_back("time 0 is " + d.time_origin_iso);
  }
  for (const std::string& n : d.notes) notes.push_back(n);
  nlohmann::json j;
  j["@context"] = "http://www.w3.org/ns/csvw";
  j["url"] = csv_file_name;
  j["dc:title"] = d.title;
  if (!d.source.empty()) j["dc:creator"] = d.source;
  if (!d.time_origin_iso.empty()) j["dc:temporal"] = d.time_origin_iso;
  j["schema:version"] = kOutputFormatVersion;
  j["dc:description"] = notes;
  j["rdfs:comment"] = std::string(kCautionText);
  j["dialect"] = {{"header", true}, {"delimiter", ","}, {"quoteChar", "\""}};
  j["null"] = "";
  j["tableSchema"] = {{"columns", columns}};
  return j.dump(2) + "\n";
}

std::filesystem::path write_csv_with_metadata(const std::filesystem::path& csv_path,
                                              std::string_view csv_text, const CsvDescription& d,
                                              Overwrite overwrite, OutputSet* set) {
  const std::string meta = format_csv_metadata(csv_path.filename().string(), d);
  // Open both first, so an existing file stops the pair before anything is written.
  AtomicFile csv(csv_path, overwrite, set);
  AtomicFile sidecar(csv_metadata_path(csv_path), overwrite, set);
  csv.write(csv_text);
  sidecar.write(meta);
  sidecar.commit();
  csv.commit();
  return csv_path;
}

}  // namespace freshet::io
