#!/bin/sh
# Routes the test study and reads the outputs back with independent readers (readback.py).
# usage: readback_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -eu
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
"$freshet" route "$src/data/readback.toml" --out "$scratch/out" --quiet > "$scratch/route.log"
/usr/bin/python3 "$src/readback.py" "$scratch/out"

# The demo study's output opens in xarray and a station is selected by its id (issue: outputs).
"$freshet" route "$src/../../basins/tansy-brook.toml" --storm aep1-30min --out "$scratch/demo" \
  --quiet > "$scratch/demo.log"
/usr/bin/python3 - "$scratch/demo/base/aep1-30min.nc" <<'PY'
import sys
import xarray as xr
ds = xr.open_dataset(sys.argv[1])
culvert = ds.swap_dims({"station": "station_id"}).sel(station_id="mill-lane")
peak = float(culvert["discharge"].max())
assert peak > 1.0, peak
assert culvert["stage"].attrs["units"] == "m"
print(f"demo: mill-lane selected by id, peak discharge {peak:.3f} m3/s")
PY

# The study report's culvert figure shows the discharge and headwater the NetCDF file holds.
/usr/bin/python3 "$src/report_readback.py" "$scratch/demo/base/report.html" \
  "$scratch/demo/base/aep1-30min.nc" mill-lane base aep1-30min

# Rain and excess are means over the interval that ends at each stamp (CF 1.11 sec. 7.3
# cell_methods "time: mean", with the interval in time_bnds, sec. 7.1): summed over the
# intervals, the rain means give back each subcatchment's rain volume of the mass balance
# (JSON summary) over its area (basin file), to float32 precision.
/usr/bin/python3 - "$scratch/demo/base" "$src/../../basins/tansy-brook.toml" <<'PY'
import json, sys, tomllib
import netCDF4
folder, basin = sys.argv[1], sys.argv[2]
areas_ha = {s["id"]: s["area"] for s in tomllib.load(open(basin, "rb"))["subcatchment"]}
rain_m3 = {r["element"]: r["inflow_volume_m3"]
           for r in json.load(open(f"{folder}/aep1-30min_summary.json"))["mass_balance"]}
with netCDF4.Dataset(f"{folder}/aep1-30min_subcatchments.nc") as ds:
    assert ds["time"].bounds == "time_bnds"
    assert ds["rainfall_intensity"].cell_methods == "time: mean"
    assert ds["discharge"].cell_methods == "time: point"
    bnds = ds["time_bnds"][:]
    t = ds["time"][:]
    assert (bnds[:, 1] == t).all() and (bnds[1:, 0] == t[:-1]).all() and bnds[0, 0] == t[0]
    hours = (bnds[:, 1] - bnds[:, 0]) / 3600.0
    ids = [str(x) for x in ds["subcatchment_id"][:]]
    for k, sid in enumerate(ids):
        depth_mm = float((ds["rainfall_intensity"][:, k] * hours).sum())
        expected_mm = rain_m3[sid] / (areas_ha[sid] * 1e4) * 1000.0
        assert abs(depth_mm - expected_mm) <= 1e-5 * expected_mm, (sid, depth_mm, expected_mm)
print(f"rain means over time_bnds give back the rain volumes of {len(ids)} subcatchments")
PY
