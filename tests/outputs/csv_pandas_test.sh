#!/bin/sh
# Every CSV a run writes loads in pandas with no options (header row first, RFC 4180 quoting),
# its columns are the ones its CSVW sidecar describes, and a peak read from the stations CSV
# equals the one in the run's JSON summary. A station name holding '#' and a comma keeps its
# row even when the reader is told to skip '#' comments.
# usage: csv_pandas_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -eu
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch/basins"
cp -R "$src/../../hydrographs" "$scratch/hydrographs"  # the demo's ../hydrographs/ files
sed 's/^name = "Mill Lane culvert"$/name = "Mill Lane culvert #2, west"/' \
  "$src/../../basins/tansy-brook.toml" > "$scratch/basins/tansy-brook.toml"
grep -q 'culvert #2, west' "$scratch/basins/tansy-brook.toml"
"$freshet" route "$scratch/basins/tansy-brook.toml" --storm aep1-30min --out "$scratch/out" \
  --export mill-lane --export lower-tansy --quiet > "$scratch/route.log"
/usr/bin/python3 - "$scratch/out/base" <<'PY'
import glob, json, math, os, sys
import pandas as pd
folder = sys.argv[1]
paths = sorted(glob.glob(os.path.join(folder, "*.csv")))
assert len(paths) >= 5, paths
for path in paths:
    df = pd.read_csv(path)  # no options at all
    meta = json.load(open(path + "-metadata.json"))
    names = [c["name"] for c in meta["tableSchema"]["columns"]]
    assert list(df.columns) == names, (path, list(df.columns), names)
    assert meta["rdfs:comment"].startswith("CAUTION:"), path
    assert len(df) > 0 or path.endswith("_stretches.csv"), path
summary = json.load(open(os.path.join(folder, "aep1-30min_summary.json")))
stations = pd.read_csv(os.path.join(folder, "aep1-30min_summary_stations.csv"))
for comment in (None, "#"):
    df = pd.read_csv(os.path.join(folder, "aep1-30min_summary_stations.csv"), comment=comment)
    row = df[df.station_id == "mill-lane"].iloc[0]
    assert row["name"] == "Mill Lane culvert #2, west", row["name"]
    expected = next(s for s in summary["stations"] if s["station_id"] == "mill-lane")
    assert row.peak_discharge_m3s == expected["peak_discharge_m3s"], (row, expected)
    assert row.peak_time_s == expected["peak_time_s"]
hydrograph = pd.read_csv(os.path.join(folder, "aep1-30min_lower-tansy_hydrograph.csv"))
peak = next(s for s in summary["stations"] if s["station_id"] == "lower-tansy")["peak_discharge_m3s"]
assert 0.9 * peak < hydrograph.discharge_m3s.max() <= peak * (1 + 1e-12), (hydrograph.max(), peak)
assert summary["format_version"] >= 2 and summary["time_origin"].endswith("Z"), summary["time_origin"]
print(f"{len(paths)} CSV files load in pandas with no options; mill-lane peak "
      f"{expected['peak_discharge_m3s']:.3f} m3/s matches the JSON")
PY

# `freshet compare` writes its difference table as CSV (with sidecar) and JSON; every change
# column is the scenario minus the base of the same storm and point.
"$freshet" compare "$scratch/basins/tansy-brook.toml" --storm aep1-30min --out "$scratch/cmp" \
  --quiet > "$scratch/compare.log"
/usr/bin/python3 - "$scratch/cmp" <<'PY'
import json, os, sys
import pandas as pd
folder = sys.argv[1]
df = pd.read_csv(os.path.join(folder, "comparison.csv"))
meta = json.load(open(os.path.join(folder, "comparison.csv-metadata.json")))
assert list(df.columns) == [c["name"] for c in meta["tableSchema"]["columns"]]
doc = json.load(open(os.path.join(folder, "comparison.json")))
assert len(doc["rows"]) == len(df) and doc["caution"].startswith("CAUTION:")
scenarios = set(df.scenario)
assert "base" in scenarios and len(scenarios) >= 2, scenarios
base = df[df.scenario == "base"].set_index("station_id")
for _, row in df[df.scenario != "base"].iterrows():
    b = base.loc[row.station_id]
    assert abs(row.peak_discharge_change_m3s - (row.peak_discharge_m3s - b.peak_discharge_m3s)) <= 1e-12 * max(1.0, b.peak_discharge_m3s)
mill = df[(df.station_id == "mill-lane")]
assert mill.station_name.iloc[0] == "Mill Lane culvert #2, west"
print(f"comparison.csv: {len(df)} rows, scenarios {sorted(scenarios)}")
PY
