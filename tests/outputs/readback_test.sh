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
