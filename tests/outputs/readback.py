"""Reads freshet's NetCDF output with independent readers (Debian's python3-xarray and
python3-netcdf4, not the library freshet writes with) and checks it against the CF
Conventions 1.11 (ch. 9, discrete sampling geometries, Appendix H.2 timeSeries) and against
the values the engine reported in its JSON summary."""
import json
import sys

import netCDF4
import numpy as np
import xarray as xr

folder = sys.argv[1]
nc_path = f"{folder}/base/burst.nc"
summary = json.load(open(f"{folder}/base/burst_summary.json"))
failures = []


def check(ok, what):
    if not ok:
        failures.append(what)


raw = netCDF4.Dataset(nc_path)
check(raw.Conventions.startswith("CF-1.11"), f"Conventions = {raw.Conventions}")
check(raw.featureType == "timeSeries", "featureType")
check("CAUTION" in raw.caution, "caution attribute")
check(raw["time"].units == "seconds since 2026-03-01 06:00:00", f"time units {raw['time'].units}")
check(raw["time"].calendar == "proleptic_gregorian", "calendar")
# ACDD 1.3 global attributes (Attribute Convention for Data Discovery 1.3, "Recommended"
# and "Suggested" attributes): time coverage of the 3 h run from 06:00 at 1 min outputs,
# the creator and licence the study file states, the rest as freshet writes them.
acdd = {"time_coverage_start": "2026-03-01T06:00:00Z", "time_coverage_end": "2026-03-01T09:00:00Z",
        "time_coverage_duration": "PT3H", "time_coverage_resolution": "PT1M",
        "creator_name": "Wren Dyke test team (invented)", "creator_email": "wren-dyke@example.org",
        "license": "CC-BY-4.0 (test value)"}
for name, value in acdd.items():
    check(getattr(raw, name, None) == value, f"{name} = {getattr(raw, name, None)!r}, expected {value!r}")
check("kinematic wave" in raw.keywords, f"keywords {raw.keywords!r}")
check(raw.processing_level.startswith("model output"), f"processing_level {raw.processing_level!r}")
check(raw.product_version[0].isdigit() and raw.product_version in raw.source, "product_version")
check("ACDD-1.3" in raw.Conventions, "Conventions names ACDD-1.3")
check(not hasattr(raw, "creator_institution"), "creator_institution written though not given")
roles = [v for v in raw.variables if getattr(raw[v], "cf_role", None) == "timeseries_id"]
check(roles == ["station_id"], f"cf_role variables {roles}")
q = raw["discharge"]
check(q.standard_name == "water_volume_transport_in_river_channel", "discharge standard_name")
check(q.units == "m3 s-1", "discharge units")
check(q.dimensions == ("time", "station"), f"discharge dimensions {q.dimensions}")
for name in ("stage", "depth", "velocity"):
    check(raw[name].units in ("m", "m s-1"), f"{name} units")
    check("station_id" in raw[name].coordinates, f"{name} coordinates")
raw.close()

ds = xr.open_dataset(nc_path)
by_id = ds.swap_dims({"station": "station_id"})
outfall = by_id.sel(station_id="wren-outfall")
times = ds["time"].values
check(times[0] == np.datetime64("2026-03-01T06:00:00"), f"first time {times[0]}")
check(times[1] - times[0] == np.timedelta64(60, "s"), "output interval")
check(len(times) == 181, f"{len(times)} records")

for station in summary["stations"]:
    sid = station["station_id"]
    if sid == "wren-field":  # subcatchments are in the second file
        continue
    series = by_id.sel(station_id=sid)["discharge"].values
    peak = float(np.nanmax(series))
    want = station["peak_discharge_m3s"]
    # float32 storage: 1e-6 relative
    check(abs(peak - want) <= 1e-6 * max(1.0, abs(want)), f"{sid} peak {peak} vs summary {want}")
    k = int(np.nanargmax(series))
    t = (times[k] - times[0]) / np.timedelta64(1, "s")
    check(abs(t - station["peak_time_s"]) < 1e-9, f"{sid} peak time {t} vs {station['peak_time_s']}")

# The inflow station carries the CSV triangle exactly: 3 m3/s at 40 min, linear between.
spring = by_id.sel(station_id="wren-spring")["discharge"].values
check(abs(spring[40] - 3.0) < 1e-6 and abs(spring[20] - 1.5) < 1e-6, "inflow triangle samples")

sub = xr.open_dataset(f"{folder}/base/burst_subcatchments.nc")
rain = sub.swap_dims({"subcatchment": "subcatchment_id"}).sel(subcatchment_id="wren-field")
check(sub["rainfall_intensity"].units == "mm h-1", "rain units")
check(float(rain["rainfall_intensity"].max()) > 0.0, "rain recorded")

# Geolocation: CF 1.11 sec. 4.1 and 4.2 (latitude and longitude coordinate variables: units
# degrees_north and degrees_east, standard names latitude and longitude), sec. 5.6 and
# Appendix F (grid mapping "latitude_longitude", named by each data variable's grid_mapping),
# read with netCDF4-python; the values are the study file's `location` tables.
located = {"wren-field": (-3.2071, 54.6183), "wren-dyke": (-3.1985, 54.6122),
           "wren-outfall": (-3.1985, 54.6122)}
for path, kind in ((nc_path, "station"), (f"{folder}/base/burst_subcatchments.nc", "subcatchment")):
    with netCDF4.Dataset(path) as geo:
        lon, lat = geo["lon"], geo["lat"]
        check(lon.standard_name == "longitude" and lon.units == "degrees_east", f"{path} lon attrs")
        check(lat.standard_name == "latitude" and lat.units == "degrees_north", f"{path} lat attrs")
        check(lon.dimensions == (kind,), f"{path} lon dimensions {lon.dimensions}")
        mapping = geo["discharge"].grid_mapping
        check(geo[mapping].grid_mapping_name == "latitude_longitude", f"{path} grid mapping")
        check(geo[mapping].semi_major_axis == 6378137.0, f"{path} WGS 84 semi-major axis")
        check(abs(geo[mapping].inverse_flattening - 298.257223563) < 1e-9, f"{path} WGS 84 1/f")
        check("lon lat" in geo["discharge"].coordinates, f"{path} coordinates attribute")
        ids = [str(x) for x in geo[f"{kind}_id"][:]]
        lons, lats = lon[:], lat[:]
        for k, sid in enumerate(ids):
            if sid in located:
                want = located[sid]
                check(abs(float(lons[k]) - want[0]) < 1e-12 and abs(float(lats[k]) - want[1]) < 1e-12,
                      f"{path} {sid} at ({lons[k]}, {lats[k]}), expected {want}")
            else:
                check(np.ma.is_masked(lons[k]) and np.ma.is_masked(lats[k]),
                      f"{path} {sid} has no location but lon/lat = ({lons[k]}, {lats[k]})")
# xarray takes lon/lat as coordinates of each station (CF coordinates attribute).
check("lon" in ds["discharge"].coords and "lat" in ds["discharge"].coords, "xarray coords lon/lat")

if failures:
    print("FAILED:\n  " + "\n  ".join(failures))
    sys.exit(1)
print(f"readback: all checks passed ({len(summary['stations'])} stations)")
