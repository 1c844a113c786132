#include "freshet/io/netcdf_writer.hpp"

#include <netcdf.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <chrono>
#include <cmath>
#include <netcdf>
#include <set>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"

namespace freshet::io {

std::string_view to_string(InstanceKind kind) {
  switch (kind) {
    case InstanceKind::station:
      return "station";
    case InstanceKind::subcatchment:
      return "subcatchment";
    case InstanceKind::cell:
      return "cell";
  }
  return "station";  // not reached: every kind is listed above
}

namespace nc = netCDF;

namespace {

// The netCDF default fill for float (NC_FILL_FLOAT, 9.9692099683868690e+36): far outside any
// physical value, and what generic readers already treat as missing.
constexpr float kFillFloat = NC_FILL_FLOAT;
constexpr double kFillDouble = NC_FILL_DOUBLE;
// WGS 84 geographic 2D, latitude and longitude in degrees (EPSG:4326), as OGC WKT 1.
constexpr std::string_view kWgs84Wkt =
    "GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563]],"
    "PRIMEM[\"Greenwich\",0],UNIT[\"degree\",0.0174532925199433],AUTHORITY[\"EPSG\",\"4326\"]]";
constexpr double kMetresPerSecondToMmPerHour = 1000.0 * 3600.0;

struct VariableSpec {
  OutputVariable variable;
  std::string_view name;
  std::string_view long_name;
  std::string_view units;
  std::string_view standard_name;  // empty: none exists in CF standard-name table v83
  double from_si;                  // multiply SI value by this before writing
  // CF 1.11 sec. 7.3: "time: point" for values at the time stamp, "time: mean" for the mean
  // over the interval that ends at the stamp (the time bounds, sec. 7.1, give the interval).
  std::string_view cell_methods;
};

// Standard names and canonical units: CF standard-name table v83 (2023-10-17,
// cfconventions.org); unit strings checked with the udunits2 tool (UDUNITS-2).
constexpr VariableSpec kSpecs[] = {
    {OutputVariable::discharge, "discharge", "discharge in the channel", "m3 s-1",
     "water_volume_transport_in_river_channel", 1.0, "time: point"},
    {OutputVariable::stage, "stage", "", "m", "", 1.0, "time: point"},  // text depends on the datum
    {OutputVariable::depth, "depth", "flow depth above the channel bed (deepest point)", "m", "",
     1.0, "time: point"},
    {OutputVariable::velocity, "velocity", "cross-section mean flow velocity (discharge / area)",
     "m s-1", "", 1.0, "time: point"},
    {OutputVariable::rainfall_intensity, "rainfall_intensity",
     "rainfall intensity, mean over the interval ending at the time stamp (time_bnds)", "mm h-1",
     "lwe_precipitation_rate", kMetresPerSecondToMmPerHour, "time: mean"},
    {OutputVariable::rainfall_excess, "rainfall_excess",
     "rainfall excess rate (rainfall minus losses, available for runoff), mean over the interval "
     "ending at the time stamp (time_bnds)",
     "mm h-1", "", kMetresPerSecondToMmPerHour, "time: mean"},
};

const VariableSpec& spec(OutputVariable v) { return kSpecs[static_cast<std::size_t>(v)]; }

// Chunks of about 256 KiB, a whole row wide where possible (common practice, no source): the
// number of records in one chunk of a data variable.
std::size_t chunk_rows(std::size_t n_instances) {
  return std::clamp<std::size_t>(65536 / std::min<std::size_t>(n_instances, 16384), 16, 1024);
}

// netcdf-cxx4's NcFile destructor retries close() and prints a failure to std::cerr ("NetCDF:
// HDF error" and "file: ncFile.cpp line:33"). After a failed close the handle is unusable and
// the failure has already been reported as an IoError naming the path, so forget() marks it
// closed and the destructor stays silent.
class OwnedNcFile final : public nc::NcFile {
 public:
  using nc::NcFile::NcFile;
  void forget() noexcept { nullObject = true; }
};

[[noreturn]] void rethrow_as_io_error(const std::filesystem::path& path,
                                      const nc::exceptions::NcException& e) {
  const int err = errno;  // left by the failed write under HDF5's generic "HDF error"
  std::string what = e.what();
  what = what.substr(0, what.find('\n'));  // drop netcdf-cxx4's "file: ... line:" suffix
  if (err == ENOSPC || err == EFBIG || err == EDQUOT) what += std::string(": ") + std::strerror(err);
  throw IoError("NetCDF output file '" + path.string() + "': " + what);
}

bool two_digits(std::string_view s, std::size_t at) {
  return at + 1 < s.size() && std::isdigit(static_cast<unsigned char>(s[at])) &&
         std::isdigit(static_cast<unsigned char>(s[at + 1]));
}

// "YYYY-MM-DD[(T| )hh:mm:ss[Z]]" -> "YYYY-MM-DD hh:mm:ss" (UTC), or "" when malformed. The 'Z'
// suffix is dropped because CF allows it only from 1.13; UDUNITS reads the rest as UTC.
std::string normalise_time_origin(std::string_view s) {
  const bool date = s.size() >= 10 && two_digits(s, 0) && two_digits(s, 2) && s[4] == '-' &&
                    two_digits(s, 5) && s[7] == '-' && two_digits(s, 8);
  if (!date) return "";
  if (s.size() == 10) return std::string(s) + " 00:00:00";
  const bool time = s.size() >= 19 && (s[10] == 'T' || s[10] == ' ') && two_digits(s, 11) &&
                    s[13] == ':' && two_digits(s, 14) && s[16] == ':' && two_digits(s, 17);
  if (!time || !(s.size() == 19 || (s.size() == 20 && s[19] == 'Z'))) return "";
  return std::string(s.substr(0, 10)) + " " + std::string(s.substr(11, 8));
}

void validate(const NetcdfRunMetadata& m, const InstanceSet& set,
              const std::vector<OutputVariable>& variables,
              const std::vector<double>& percentiles) {
  ProblemList p("NetCDF output");
  if (m.title.empty()) p.add("title", "is empty: a title is required");
  if (m.source.empty()) p.add("source", "is empty: the freshet version string is required");
  if (m.history.empty()) p.add("history", "is empty: date-time and command line are required");
  if (normalise_time_origin(m.time_origin).empty()) {
    p.add("time_origin", "= '" + m.time_origin +
                             "': must be YYYY-MM-DD or YYYY-MM-DDThh:mm:ss[Z] (UTC)");
  }
  if (set.instances.empty()) p.add("instances", "is empty: at least one is required");
  for (std::size_t k = 0; k < percentiles.size(); ++k) {
    const double q = percentiles[k];
    if (!(q >= 0.0 && q <= 100.0) || (k > 0 && !(q > percentiles[k - 1]))) {
      p.add("percentiles", "must increase within [0, 100]");
      break;
    }
  }
  if (variables.empty()) p.add("variables", "is empty: at least one is required");
  std::set<std::string> ids;
  for (std::size_t i = 0; i < set.instances.size(); ++i) {
    const std::string& id = set.instances[i].id;
    const std::string kind(to_string(set.kind));
    const std::string at = kind + "[" + std::to_string(i + 1) + "].id";
    if (id.empty()) p.add(at, "is empty: every " + kind + " needs an id");
    else if (!ids.insert(id).second) p.add(at, "= '" + id + "': duplicate id");
  }
  std::set<OutputVariable> seen;
  for (const auto v : variables) {
    if (!seen.insert(v).second) p.add("variables", "'" + std::string(to_string(v)) + "' twice");
  }
  p.throw_if_any();
}

}  // namespace

std::string_view to_string(OutputVariable variable) { return spec(variable).name; }

std::mutex& netcdf_global_mutex() {
  static std::mutex m;
  return m;
}

struct NetcdfTimeSeriesWriter::Impl {
  Impl(std::filesystem::path path, NetcdfWriterOptions opt)
      : output(std::move(path), opt.overwrite, opt.set), options(opt) {}

  AtomicOutputPath output;
  NetcdfWriterOptions options;
  std::unique_ptr<OwnedNcFile> file;
  nc::NcVar time_var;
  nc::NcVar bounds_var;  // time_bnds (time, nv): only in files with interval means
  std::vector<nc::NcVar> data_vars;
  std::vector<double> from_si;
  std::size_t n_instances = 0;
  // Values per instance in a record: 1, or the number of percentiles of an ensemble's bands.
  std::size_t n_percentiles = 1;
  nc::NcDim percentile_dim;  // null without percentiles
  [[nodiscard]] std::size_t row_width() const { return n_instances * n_percentiles; }
  std::size_t records = 0;
  // Records not yet written: block_rows rows (one chunk's length) of each variable, the rows
  // of variable v from block[v * block_rows * n_instances]; records from block_start on.
  std::size_t block_rows = 1;
  std::size_t block_start = 0;
  std::vector<float> block;
  std::vector<double> block_times;
  std::vector<double> block_bounds;  // two per record: interval start, interval end (the stamp)
  double last_time_s = 0.0;
  bool continues = false;  // continue_after(): the first record's interval starts at last_time_s
  std::chrono::steady_clock::time_point last_sync;

  void define(const NetcdfRunMetadata& m, const InstanceSet& set,
              const std::vector<OutputVariable>& variables,
              const std::vector<double>& percentiles);
  void define_percentiles(const std::vector<double>& percentiles);
  void put_global_attributes(const NetcdfRunMetadata& m);
  std::string define_instance_variables(const InstanceSet& set, const nc::NcDim& dim);
  void define_geographic_variables(const std::string& k);
  void define_data_variable(OutputVariable v, const InstanceSet& set, const nc::NcDim& time_dim,
                            const nc::NcDim& dim, const std::string& coordinates);
  void write_instance_values(const InstanceSet& set);
  void write_record(double time_s, std::span<const double> values);
  void flush_block();
};

void NetcdfTimeSeriesWriter::Impl::put_global_attributes(const NetcdfRunMetadata& m) {
  const std::string caution(kCautionText);
  file->putAtt("Conventions", "CF-1.11, ACDD-1.3");
  file->putAtt("featureType", "timeSeries");
  file->putAtt("cdm_data_type", "Station");
  file->putAtt("title", m.title);
  if (!m.summary.empty()) file->putAtt("summary", m.summary);
  if (!m.institution.empty()) file->putAtt("institution", m.institution);
  file->putAtt("source", m.source);
  file->putAtt("history", m.history);
  if (!m.references.empty()) file->putAtt("references", m.references);
  file->putAtt("comment", m.comment.empty() ? caution : m.comment + "\n" + caution);
  file->putAtt("caution", caution);
  if (!m.date_created.empty()) file->putAtt("date_created", m.date_created);
  const std::pair<const char*, const std::string*> acdd[] = {
      {"time_coverage_start", &m.time_coverage_start},
      {"time_coverage_end", &m.time_coverage_end},
      {"time_coverage_duration", &m.time_coverage_duration},
      {"time_coverage_resolution", &m.time_coverage_resolution},
      {"keywords", &m.keywords},
      {"processing_level", &m.processing_level},
      {"product_version", &m.product_version},
      {"license", &m.license},
      {"creator_name", &m.creator_name},
      {"creator_email", &m.creator_email},
      {"creator_institution", &m.creator_institution}};
  for (const auto& [name, value] : acdd) {
    if (!value->empty()) file->putAtt(name, *value);
  }
  file->putAtt("standard_name_vocabulary", "CF Standard Name Table v83");
}

std::string NetcdfTimeSeriesWriter::Impl::define_instance_variables(const InstanceSet& set,
                                                                    const nc::NcDim& dim) {
  const std::string k(to_string(set.kind));
  auto id = file->addVar(k + "_id", nc::ncString, dim);
  id.putAtt("cf_role", "timeseries_id");
  id.putAtt("long_name", k + " identifier");
  auto name = file->addVar(k + "_name", nc::ncString, dim);
  name.putAtt("standard_name", "platform_name");
  name.putAtt("long_name", k + " name");
  std::string coordinates = k + "_id " + k + "_name";
  const auto& in = set.instances;
  if (std::any_of(in.begin(), in.end(), [](const auto& s) { return !s.reach_id.empty(); })) {
    auto reach = file->addVar("reach_id", nc::ncString, dim);
    reach.putAtt("long_name", "identifier of the reach the " + k + " lies on");
    auto chainage = file->addVar("chainage", nc::ncDouble, dim);
    chainage.setFill(true, kFillDouble);
    chainage.putAtt("long_name", "distance downstream from the reach's upstream end");
    chainage.putAtt("units", "m");
    coordinates += " reach_id chainage";
  }
  const bool located = std::all_of(in.begin(), in.end(), [](const auto& s) {
    return std::isfinite(s.x_m) && std::isfinite(s.y_m);
  });
  if (located) {
    for (const char* axis : {"x", "y"}) {
      auto v = file->addVar(axis, nc::ncDouble, dim);
      v.putAtt("units", "m");
      v.putAtt("long_name", std::string(axis) + " coordinate of the " + k);
      if (!set.crs_wkt.empty()) {
        v.putAtt("standard_name", std::string("projection_") + axis + "_coordinate");
      }
    }
    coordinates += " x y";
    if (!set.crs_wkt.empty()) {
      auto crs = file->addVar("crs", nc::ncInt);
      crs.putAtt("crs_wkt", set.crs_wkt);
      crs.putAtt("long_name", "horizontal coordinate reference system of x and y");
    }
  }
  if (std::any_of(in.begin(), in.end(), [](const auto& s) {
        return std::isfinite(s.longitude_deg) && std::isfinite(s.latitude_deg);
      })) {
    define_geographic_variables(k);
    coordinates += " lon lat";
  }
  return coordinates;
}

// CF 1.11 sec. 4.1-4.2 (latitude and longitude coordinates) and sec. 5.6 with Appendix F
// (grid mapping "latitude_longitude"); the WGS 84 ellipsoid's defining constants a and 1/f
// are those of NIMA TR8350.2 (2000), World Geodetic System 1984, Table 3.1.
void NetcdfTimeSeriesWriter::Impl::define_geographic_variables(const std::string& k) {
  const nc::NcDim dim = file->getDim(k);
  const std::pair<const char*, const char*> axes[] = {{"lon", "longitude"}, {"lat", "latitude"}};
  for (const auto& [name, standard] : axes) {
    auto v = file->addVar(name, nc::ncDouble, dim);
    v.setFill(true, kFillDouble);
    v.putAtt("standard_name", standard);
    v.putAtt("long_name", std::string(standard) + " of the " + k + " (WGS 84)");
    v.putAtt("units", std::string(name) == "lon" ? "degrees_east" : "degrees_north");
  }
  auto crs = file->addVar("wgs84", nc::ncInt);
  crs.putAtt("grid_mapping_name", "latitude_longitude");
  crs.putAtt("semi_major_axis", nc::ncDouble, 6378137.0);
  crs.putAtt("inverse_flattening", nc::ncDouble, 298.257223563);
  crs.putAtt("longitude_of_prime_meridian", nc::ncDouble, 0.0);
  crs.putAtt("crs_wkt", std::string(kWgs84Wkt));
  crs.putAtt("long_name", "WGS 84 geographic coordinates of lon and lat (EPSG:4326)");
}

void NetcdfTimeSeriesWriter::Impl::define_data_variable(OutputVariable v, const InstanceSet& set,
                                                        const nc::NcDim& time_dim,
                                                        const nc::NcDim& dim,
                                                        const std::string& coordinates) {
  const VariableSpec& s = spec(v);
  std::vector<nc::NcDim> dims{time_dim, dim};
  const std::size_t width = std::min<std::size_t>(n_instances, 16384);
  const std::size_t length = chunk_rows(n_instances);
  std::vector<size_t> chunks{length, width};
  if (!percentile_dim.isNull()) {
    dims.push_back(percentile_dim);
    chunks.push_back(n_percentiles);
  }
  auto var = file->addVar(std::string(s.name), nc::ncFloat, dims);
  var.setChunking(nc::NcVar::nc_CHUNKED, chunks);
  var.setCompression(true, options.deflate_level > 0, options.deflate_level);
  var.setFill(true, kFillFloat);
  // A chunk cache of two chunks keeps memory flat: filled chunks are written out and evicted
  // instead of accumulating in the 16 MiB default cache (netCDF-C, nc_set_var_chunk_cache).
  var.setChunkCache(2 * length * width * n_percentiles * sizeof(float), 31, 1.0f);
  std::string long_name(s.long_name);
  if (v == OutputVariable::stage) {
    if (set.stage_datum.empty()) {
      long_name = "water level: water surface elevation in the vertical frame of the basin "
                  "file's elevations where the element has a bed or invert elevation, otherwise "
                  "the flow depth";
    } else {
      long_name = "water surface elevation above " + set.stage_datum;
      var.putAtt("standard_name", "water_surface_height_above_reference_datum");
      var.putAtt("vertical_datum", set.stage_datum);
    }
  } else if (v == OutputVariable::discharge && set.kind == InstanceKind::subcatchment) {
    // Runoff from a subcatchment is not channel flow: no CF standard name applies.
    long_name = "surface runoff discharge leaving the subcatchment";
  } else if (!s.standard_name.empty()) {
    var.putAtt("standard_name", std::string(s.standard_name));
  }
  if (!percentile_dim.isNull()) {
    long_name += "; pointwise percentile over the ensemble members (at each time and " +
                 std::string(to_string(set.kind)) + " separately: no member need follow it)";
  }
  var.putAtt("long_name", long_name);
  var.putAtt("units", std::string(s.units));
  var.putAtt("coordinates", coordinates);
  var.putAtt("cell_methods", std::string(s.cell_methods));
  var.putAtt("coverage_content_type", "modelResult");
  if (!set.crs_wkt.empty() && coordinates.find(" x y") != std::string::npos) {
    var.putAtt("grid_mapping", "crs");
  } else if (coordinates.find(" lon lat") != std::string::npos) {
    var.putAtt("grid_mapping", "wgs84");
  }
  data_vars.push_back(var);
  from_si.push_back(s.from_si);
}

// The percentile dimension of an ensemble's bands and its coordinate variable: a plain number
// in percent (CF 1.11 has no standard name for a percentile; UDUNITS-2 knows "percent").
void NetcdfTimeSeriesWriter::Impl::define_percentiles(const std::vector<double>& percentiles) {
  n_percentiles = percentiles.size();
  percentile_dim = file->addDim("percentile", n_percentiles);
  auto var = file->addVar("percentile", nc::ncDouble, percentile_dim);
  var.putAtt("long_name", "percentile of the ensemble members (Hyndman & Fan 1996 definition 7)");
  var.putAtt("units", "percent");
  var.putVar(percentiles.data());
}

void NetcdfTimeSeriesWriter::Impl::define(const NetcdfRunMetadata& m, const InstanceSet& set,
                                          const std::vector<OutputVariable>& variables,
                                          const std::vector<double>& percentiles) {
  n_instances = set.instances.size();
  // newFile (NC_NOCLOBBER): the temporary name is unique, and never taken over from another.
  file = std::make_unique<OwnedNcFile>(output.partial_path().string(), nc::NcFile::newFile,
                                       nc::NcFile::nc4);
  const nc::NcDim time_dim = file->addDim("time");  // no size: UNLIMITED
  const nc::NcDim dim = file->addDim(std::string(to_string(set.kind)), n_instances);
  time_var = file->addVar("time", nc::ncDouble, time_dim);
  std::vector<size_t> time_chunks{1024};
  time_var.setChunking(nc::NcVar::nc_CHUNKED, time_chunks);
  time_var.setChunkCache(2 * time_chunks[0] * sizeof(double), 31, 1.0f);
  time_var.putAtt("standard_name", "time");
  time_var.putAtt("long_name", "time");
  time_var.putAtt("units", "seconds since " + normalise_time_origin(m.time_origin));
  time_var.putAtt("calendar", "proleptic_gregorian");
  time_var.putAtt("axis", "T");
  // Interval means need the interval: time bounds (CF 1.11 sec. 7.1), [previous stamp, stamp];
  // the first record's interval is empty ([t0, t0]) and holds the value at t0.
  const bool means = std::any_of(variables.begin(), variables.end(), [](OutputVariable v) {
    return spec(v).cell_methods == "time: mean";
  });
  if (means) {
    const nc::NcDim nv = file->addDim("nv", 2);
    bounds_var = file->addVar("time_bnds", nc::ncDouble, std::vector<nc::NcDim>{time_dim, nv});
    std::vector<size_t> bounds_chunks{1024, 2};
    bounds_var.setChunking(nc::NcVar::nc_CHUNKED, bounds_chunks);
    bounds_var.setChunkCache(2 * 1024 * 2 * sizeof(double), 31, 1.0f);
    time_var.putAtt("bounds", "time_bnds");
  }
  const std::string coordinates = define_instance_variables(set, dim);
  if (!percentiles.empty()) define_percentiles(percentiles);
  for (const auto v : variables) define_data_variable(v, set, time_dim, dim, coordinates);
  put_global_attributes(m);
  write_instance_values(set);
  // At most 4 MiB of buffered values per variable (one chunk's rows, fewer for wide files).
  block_rows = std::clamp<std::size_t>((std::size_t{1} << 20) / row_width(), 1,
                                       chunk_rows(n_instances));
  block.assign(variables.size() * block_rows * row_width(), 0.0f);
  block_times.reserve(block_rows);
  block_bounds.reserve(2 * block_rows);
}

// Each instance variable is written whole, in one call: written one instance at a time, every
// call of a string variable made HDF5 allocate and clear its 1 MiB type-conversion buffer
// (H5Dwrite of variable-length strings), which took 30 s for 1000 stations (issue 16).
void NetcdfTimeSeriesWriter::Impl::write_instance_values(const InstanceSet& set) {
  const auto& in = set.instances;
  const auto put_strings = [&](const nc::NcVar& var, std::string InstanceInfo::*member) {
    std::vector<const char*> text(in.size());
    for (std::size_t i = 0; i < in.size(); ++i) text[i] = (in[i].*member).c_str();
    var.putVar(text.data());
  };
  const auto put_doubles = [&](const nc::NcVar& var, double InstanceInfo::*member, bool fill) {
    std::vector<double> values(in.size());
    for (std::size_t i = 0; i < in.size(); ++i) {
      const double v = in[i].*member;
      values[i] = fill && !std::isfinite(v) ? kFillDouble : v;
    }
    var.putVar(values.data());
  };
  const std::string k(to_string(set.kind));
  put_strings(file->getVar(k + "_id"), &InstanceInfo::id);
  put_strings(file->getVar(k + "_name"), &InstanceInfo::name);
  if (const auto reach = file->getVar("reach_id"); !reach.isNull()) {
    put_strings(reach, &InstanceInfo::reach_id);
    put_doubles(file->getVar("chainage"), &InstanceInfo::chainage_m, true);
  }
  if (const auto lon = file->getVar("lon"); !lon.isNull()) {
    put_doubles(lon, &InstanceInfo::longitude_deg, true);
    put_doubles(file->getVar("lat"), &InstanceInfo::latitude_deg, true);
  }
  if (const auto x = file->getVar("x"); !x.isNull()) {
    put_doubles(x, &InstanceInfo::x_m, false);
    put_doubles(file->getVar("y"), &InstanceInfo::y_m, false);
  }
}

// Records are kept in memory and written a block of chunk rows at a time (and at every sync
// and at the end), so each HDF5 write fills whole chunks instead of rewriting one chunk per
// record.
void NetcdfTimeSeriesWriter::Impl::write_record(double time_s, std::span<const double> values) {
  const std::size_t row_in_block = records - block_start;
  block_times.push_back(time_s);
  block_bounds.push_back(records == 0 && !continues ? time_s : last_time_s);
  block_bounds.push_back(time_s);
  for (std::size_t v = 0; v < data_vars.size(); ++v) {
    const std::size_t width = row_width();
    float* row = &block[(v * block_rows + row_in_block) * width];
    for (std::size_t i = 0; i < width; ++i) {
      const double value = values[v * width + i];
      row[i] = std::isfinite(value) ? static_cast<float>(value * from_si[v]) : kFillFloat;
    }
  }
  ++records;
  last_time_s = time_s;
  if (records - block_start == block_rows) flush_block();
}

void NetcdfTimeSeriesWriter::Impl::flush_block() {
  const std::size_t rows = records - block_start;
  if (rows == 0) return;
  time_var.putVar({block_start}, {rows}, block_times.data());
  if (!bounds_var.isNull()) bounds_var.putVar({block_start, 0}, {rows, 2}, block_bounds.data());
  for (std::size_t v = 0; v < data_vars.size(); ++v) {
    const float* first = &block[v * block_rows * row_width()];
    if (percentile_dim.isNull()) {
      data_vars[v].putVar({block_start, 0}, {rows, n_instances}, first);
    } else {
      data_vars[v].putVar({block_start, 0, 0}, {rows, n_instances, n_percentiles}, first);
    }
  }
  block_start = records;
  block_times.clear();
  block_bounds.clear();
}

NetcdfTimeSeriesWriter::NetcdfTimeSeriesWriter(std::filesystem::path path,
                                               NetcdfWriterOptions options)
    : impl_(std::make_unique<Impl>(std::move(path), options)) {
  FRESHET_ASSERT(options.deflate_level >= 0 && options.deflate_level <= 9,
                 "deflate_level must be in 0..9");
}

NetcdfTimeSeriesWriter::~NetcdfTimeSeriesWriter() {
  if (!impl_ || !impl_->file) return;  // AtomicOutputPath removes any partial file
  std::lock_guard lock(netcdf_global_mutex());
  try {
    impl_->file->close();
  } catch (...) {  // nothing to report from a destructor; the partial file is removed anyway
    impl_->file->forget();
  }
  impl_->file.reset();
}

void NetcdfTimeSeriesWriter::begin(const NetcdfRunMetadata& metadata, const InstanceSet& instances,
                                   std::vector<OutputVariable> variables,
                                   std::vector<double> percentiles) {
  FRESHET_ASSERT(!impl_->file, "NetcdfTimeSeriesWriter::begin called twice");
  validate(metadata, instances, variables, percentiles);
  std::lock_guard lock(netcdf_global_mutex());
  try {
    impl_->define(metadata, instances, variables, percentiles);
    impl_->file->sync();
  } catch (const nc::exceptions::NcException& e) {
    rethrow_as_io_error(impl_->output.final_path(), e);
  }
  impl_->last_sync = std::chrono::steady_clock::now();
}

void NetcdfTimeSeriesWriter::continue_after(double previous_time_s) {
  FRESHET_ASSERT(impl_->records == 0, "continue_after before the first record");
  impl_->continues = true;
  impl_->last_time_s = previous_time_s;
}

void NetcdfTimeSeriesWriter::record(double time_s, std::span<const double> values) {
  Impl& m = *impl_;
  FRESHET_ASSERT(m.file, "NetcdfTimeSeriesWriter::record before begin or after commit");
  FRESHET_ASSERT(values.size() == m.data_vars.size() * m.row_width(),
                 "record: values must hold n_variables * n_instances (* n_percentiles) entries");
  FRESHET_ASSERT(std::isfinite(time_s) && (m.records == 0 || time_s > m.last_time_s),
                 "record: output times must be finite and strictly increasing");
  {
    std::lock_guard lock(netcdf_global_mutex());
    try {
      m.write_record(time_s, values);
    } catch (const nc::exceptions::NcException& e) {
      rethrow_as_io_error(m.output.final_path(), e);
    }
  }
  const auto now = std::chrono::steady_clock::now();
  if (std::chrono::duration<double>(now - m.last_sync).count() >= m.options.sync_interval_s) {
    sync();
  }
}

void NetcdfTimeSeriesWriter::sync() {
  FRESHET_ASSERT(impl_->file, "NetcdfTimeSeriesWriter::sync before begin or after commit");
  std::lock_guard lock(netcdf_global_mutex());
  try {
    impl_->flush_block();
    impl_->file->sync();
  } catch (const nc::exceptions::NcException& e) {
    rethrow_as_io_error(impl_->output.final_path(), e);
  }
  impl_->last_sync = std::chrono::steady_clock::now();
}

void NetcdfTimeSeriesWriter::commit() {
  FRESHET_ASSERT(impl_->file, "NetcdfTimeSeriesWriter::commit before begin or twice");
  {
    std::lock_guard lock(netcdf_global_mutex());
    try {
      impl_->flush_block();
      impl_->file->close();
    } catch (const nc::exceptions::NcException& e) {
      try {  // a failed last block leaves the file open: close it, ignoring a second failure
        impl_->file->close();
      } catch (...) {
      }
      impl_->file->forget();
      impl_->file.reset();
      rethrow_as_io_error(impl_->output.final_path(), e);
    }
    impl_->file.reset();
  }
  impl_->output.commit();
}

std::size_t NetcdfTimeSeriesWriter::records_written() const noexcept { return impl_->records; }

const std::filesystem::path& NetcdfTimeSeriesWriter::final_path() const noexcept {
  return impl_->output.final_path();
}

const std::filesystem::path& NetcdfTimeSeriesWriter::partial_path() const noexcept {
  return impl_->output.partial_path();
}

}  // namespace freshet::io
