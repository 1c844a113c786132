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

if failures:
    print("FAILED:\n  " + "\n  ".join(failures))
    sys.exit(1)
print(f"readback: all checks passed ({len(summary['stations'])} stations)")
