// Streaming CF NetCDF-4 output: one file per set of reporting points, written record by record.
//
// Layout (docs/outputs.md has the full CDL): CF-1.11 discrete sampling geometry,
// featureType "timeSeries", orthogonal multidimensional representation (CF Conventions 1.11,
// ch. 9 and Appendix H.2). `time` is the UNLIMITED leading dimension ("seconds since <origin>",
// calendar proleptic_gregorian); the instance dimension is named after the set's kind
// ("station", "subcatchment", "cell"); data are float(time, <kind>), chunked along time and
// deflated. One file holds one kind, because CF allows one featureType and one cf_role per
// file: reach stations, subcatchments and along-reach profiles (one instance per cell) are
// three writers and three files.
//
// Life cycle: the constructor only reserves the path; begin() creates the temporary file (a
// unique hidden name, atomic_file.hpp) and defines everything; record() appends one time step
// (memory does not grow with run length: nothing is buffered beyond the HDF5 chunk being
// filled); commit() closes and renames into place (or completes the file in its OutputSet).
// A writer destroyed without commit() removes its temporary file. nc_sync is called on a
// wall-clock interval so a crash leaves a readable partial file.
//
// netCDF-C is not thread-safe (Unidata/netcdf-c #1373): every netCDF call made by this class
// holds netcdf_global_mutex(); any other freshet code calling netCDF must hold it too.
//
//   NetcdfTimeSeriesWriter out("out/run1.nc");
//   out.begin(metadata, stations, {OutputVariable::discharge, OutputVariable::stage});
//   for (each output time t) out.record(t, values);   // values[v * n_stations + i], SI
//   out.commit();
#pragma once

#include <cstddef>
#include <filesystem>
#include <limits>
#include <memory>
#include <mutex>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "freshet/io/atomic_file.hpp"

namespace freshet::io {

// What can be written. Values are handed to record() in SI; the file's units are:
//   discharge          m3 s-1  standard_name water_volume_transport_in_river_channel
//   stage              m       water_surface_height_above_reference_datum (only with a datum)
//   depth              m       long_name only (no CF name for in-channel depth)
//   velocity           m s-1   long_name only (no CF name for channel flow speed)
//   rainfall_intensity mm h-1  lwe_precipitation_rate (converted from m s-1)
//   rainfall_excess    mm h-1  long_name only (converted from m s-1)
enum class OutputVariable { discharge, stage, depth, velocity, rainfall_intensity, rainfall_excess };

// NetCDF variable name, e.g. "discharge".
std::string_view to_string(OutputVariable variable);

struct NetcdfRunMetadata {
  std::string title;         // required: what the run is
  std::string summary;       // ACDD paragraph (optional)
  std::string institution;   // optional
  std::string source;        // required: freshet version string
  std::string history;       // required: ISO date-time, then the command line
  std::string references;    // methods used and their references
  std::string comment;       // free text; the caution text is appended
  std::string time_origin;   // required: "YYYY-MM-DD", "YYYY-MM-DDThh:mm:ss[Z]" (UTC)
  std::string date_created;  // ISO 8601, optional
  // ACDD 1.3 (Attribute Convention for Data Discovery) attributes; each written when
  // non-empty. Time coverage as ISO 8601: start and end date-times, duration and resolution
  // as durations ("PT6H", "PT5M").
  std::string time_coverage_start;
  std::string time_coverage_end;
  std::string time_coverage_duration;
  std::string time_coverage_resolution;
  std::string keywords;          // comma-separated
  std::string processing_level;  // what kind of data this is
  std::string product_version;   // the freshet version that wrote it
  std::string license;           // of this output, as the study file states it
  std::string creator_name;
  std::string creator_email;
  std::string creator_institution;
};

// One reporting point. Optional numbers are NaN when unknown.
struct InstanceInfo {
  std::string id;        // unique, non-empty; becomes <kind>_id (cf_role timeseries_id)
  std::string name;      // human label; becomes <kind>_name
  std::string reach_id;  // reach the point lies on (empty: none)
  double chainage_m = std::numeric_limits<double>::quiet_NaN();  // from the reach's upstream end
  double x_m = std::numeric_limits<double>::quiet_NaN();         // projected easting
  double y_m = std::numeric_limits<double>::quiet_NaN();         // projected northing
  // WGS 84 geographic position (degrees east, degrees north). When any instance of a set has
  // one, the file holds `lon` and `lat` (CF standard names longitude and latitude, _FillValue
  // where unknown) and a `crs` grid mapping "latitude_longitude" on the WGS 84 ellipsoid.
  double longitude_deg = std::numeric_limits<double>::quiet_NaN();
  double latitude_deg = std::numeric_limits<double>::quiet_NaN();
};

// What the points of a file are; the instance dimension and its variables are named after it
// ("station", "subcatchment", "cell": station_id, subcatchment_name, ...).
enum class InstanceKind { station, subcatchment, cell };
[[nodiscard]] std::string_view to_string(InstanceKind kind);

struct InstanceSet {
  InstanceKind kind = InstanceKind::station;
  std::vector<InstanceInfo> instances;
  // Horizontal reference of x/y. Empty: x/y are local coordinates (long_name only). Otherwise
  // a `crs` grid-mapping variable carries this WKT and x/y get the projection standard names.
  std::string crs_wkt;
  // Vertical datum of stage, e.g. "NAVD88". Empty: stage has no standard_name and is described
  // as bed elevation plus depth in the basin file's vertical frame.
  std::string stage_datum;
};

struct NetcdfWriterOptions {
  Overwrite overwrite = Overwrite::no;
  double sync_interval_s = 60.0;  // wall-clock seconds between syncs to disk
  int deflate_level = 4;          // 0..9
  // The run's result set: the file is staged there and appears with the set's other files
  // (atomic_file.hpp). nullptr: the file is renamed into place on its own by commit().
  OutputSet* set = nullptr;
};

class NetcdfTimeSeriesWriter {
 public:
  // Reserves `path` (IoError if it exists and overwrite is no, or its directory is missing).
  explicit NetcdfTimeSeriesWriter(std::filesystem::path path, NetcdfWriterOptions options = {});
  ~NetcdfTimeSeriesWriter();  // noexcept: closes and removes the partial file if not committed
  NetcdfTimeSeriesWriter(const NetcdfTimeSeriesWriter&) = delete;
  NetcdfTimeSeriesWriter& operator=(const NetcdfTimeSeriesWriter&) = delete;

  // Validates (InputError listing every problem: missing metadata, bad time origin, empty or
  // duplicate ids, no variables, percentiles not increasing in [0, 100]), then creates the
  // partial file and writes all metadata. With `percentiles` (an ensemble's bands), every data
  // variable gains a third dimension `percentile` (time, <kind>, percentile), with a
  // coordinate variable of that name in percent.
  void begin(const NetcdfRunMetadata& metadata, const InstanceSet& instances,
             std::vector<OutputVariable> variables, std::vector<double> percentiles = {});
  // Appends one record. `values` is variable-major: values[v * n_instances + i], in SI, for
  // the variables in the order given to begin(); with percentiles,
  // values[(v * n_instances + i) * n_percentiles + p]. Non-finite values are written as
  // _FillValue.
  // Preconditions (asserted): size matches, time strictly increases.
  void record(double time_s, std::span<const double> values);
  // The file continues a run resumed from a saved state (docs/state-files.md): the first
  // record's interval (time_bnds) starts at `previous_time_s`, the run's last output time
  // before the resumed part, as it would in the unsplit run's file. Before the first record.
  void continue_after(double previous_time_s);
  // Flushes to disk now (also done automatically every sync_interval_s of wall-clock time).
  void sync();
  // Closes the file and renames it into place; IoError naming the path on failure.
  void commit();

  [[nodiscard]] std::size_t records_written() const noexcept;
  [[nodiscard]] const std::filesystem::path& final_path() const noexcept;
  [[nodiscard]] const std::filesystem::path& partial_path() const noexcept;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// The one lock that serialises every netCDF call in the process.
std::mutex& netcdf_global_mutex();

}  // namespace freshet::io
