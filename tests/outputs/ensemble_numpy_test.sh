#!/bin/sh
# `freshet ensemble` on the demo study: the percentiles it writes (the summary CSV, the
# convergence table and the JSON) against numpy.percentile (its default, linear, is Hyndman &
# Fan 1996 definition 7) on the same members, read from the members CSV; each threshold's
# exceedance against a count made here on those members; every CSV loads in pandas with no
# options and has the columns its sidecar lists; --format json holds the same summary; the
# percentile hydrographs in <storm>_ensemble_bands.nc read back with xarray (below).
# usage: ensemble_numpy_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -eu
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
"$freshet" --quiet --format json ensemble "$src/../../basins/tansy-brook.toml" \
  --storm aep1-30min --out "$scratch/out" > "$scratch/ensemble.json"
/usr/bin/python3 - "$scratch/out/base" "$scratch/ensemble.json" <<'PY'
import json, math, os, sys
import numpy as np
import pandas as pd
folder, stdout_json = sys.argv[1], sys.argv[2]
stem = os.path.join(folder, "aep1-30min_ensemble")
doc = json.load(open(stem + ".json"))
assert doc["caution"].startswith("CAUTION:")
qs = doc["percentiles"]
assert qs == [5, 50, 95], qs
members = pd.read_csv(stem + "_members.csv")
n = doc["members"]
assert n == 16 and members.member.max() == n, (n, members.member.max())
pct = pd.read_csv(stem + "_percentiles.csv")
conv = pd.read_csv(stem + "_convergence.csv")
exc = pd.read_csv(stem + "_exceedance.csv")
for path in (stem + s for s in ("_members.csv", "_percentiles.csv", "_convergence.csv",
                                "_exceedance.csv")):
    meta = json.load(open(path + "-metadata.json"))
    assert list(pd.read_csv(path).columns) == [c["name"] for c in meta["tableSchema"]["columns"]], path
quantities = ["peak_discharge_m3s", "peak_stage_m", "peak_time_s", "outflow_volume_m3"]
label = lambda q: "p%g" % q

def close(a, b):
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return abs(a - b) <= 1e-9 * max(1.0, abs(b))

checked = 0
spread = 0
for station, rows in members.groupby("station_id", sort=False):
    rows = rows.sort_values("member")
    row = pct[pct.station_id == station].iloc[0]
    js = next(s for s in doc["stations"] if s["station_id"] == station)
    for quantity in quantities:
        values = rows[quantity].to_numpy(dtype=float)
        expected = (np.full(len(qs), np.nan) if np.isnan(values).any()
                    else np.percentile(values, qs))
        for q, e in zip(qs, expected):
            got = row[quantity + "_" + label(q)]
            assert close(got, e), (station, quantity, q, got, e)
            j = js[quantity][label(q)]
            assert close(np.nan if j is None else j, e), (station, quantity, q, j, e)
            checked += 1
        for m in sorted(set(conv.members)):
            crow = conv[(conv.members == m) & (conv.station_id == station)].iloc[0]
            first = values[:m]
            expected_m = (np.full(len(qs), np.nan) if np.isnan(first).any()
                          else np.percentile(first, qs))
            for q, e in zip(qs, expected_m):
                assert close(crow[quantity + "_" + label(q)], e), (station, quantity, m, q)
        if quantity == "peak_discharge_m3s" and expected[2] > expected[0] * 1.01:
            spread += 1
assert sorted(set(conv.members)) == [2, 4, 8, 16], sorted(set(conv.members))
assert spread >= 5, "the demo's n and CN ranges should spread the peaks at most stations"
assert len(exc) == 2, exc
for _, t in exc.iterrows():
    values = members[members.station_id == t.station_id][t.quantity].to_numpy(dtype=float)
    level = t.threshold_stage_m if t.quantity == "peak_stage_m" else t.threshold_discharge_m3s
    count = int((values > level).sum())
    assert t.members_above == count and t.members == n, (t, count)
    assert close(t.probability, count / n), (t, count)
# The percentile hydrographs (<stem>_bands.nc), read back with xarray: a percentile dimension
# with its coordinate in percent, CF attributes and the caution; the pointwise bands are
# ordered (p5 <= p50 <= p95 at every time), and since each member's value at a time is at most
# its peak, the q-th pointwise band never rises above the q-th percentile of the peaks in the
# percentiles CSV (float32 in the file: 1e-5 relative).
import xarray as xr
ds = xr.open_dataset(stem + "_bands.nc")
assert ds.attrs["Conventions"].startswith("CF-1.11") and ds.attrs["featureType"] == "timeSeries"
assert ds.attrs["caution"].startswith("CAUTION:")
assert [float(q) for q in ds.percentile.values] == [float(q) for q in qs], ds.percentile.values
assert ds.percentile.attrs["units"] == "percent"
assert ds.discharge.dims == ("time", "station", "percentile"), ds.discharge.dims
assert ds.discharge.attrs["units"] == "m3 s-1" and ds.stage.dims == ds.discharge.dims
ids = [str(s) for s in ds.station_id.values]
assert "mill-lane" in ids and "hob-hill" not in ids, ids
for k, station in enumerate(ids):
    row = pct[pct.station_id == station].iloc[0]
    for name, column in (("discharge", "peak_discharge_m3s"), ("stage", "peak_stage_m")):
        band = ds[name].isel(station=k).values  # (time, percentile)
        if np.isnan(band).all():
            continue
        assert (np.diff(band, axis=1) >= -1e-5 * np.abs(band[:, 1:])).all(), (station, name)
        for j, q in enumerate(qs):
            peak = row[column + "_" + label(q)]
            top = np.nanmax(band[:, j])
            assert top <= peak + 1e-5 * abs(peak) + 1e-6, (station, name, q, top, peak)
mill = ds.discharge.isel(station=ids.index("mill-lane")).values
assert np.nanmax(mill[:, 2] - mill[:, 0]) > 0.1, "the bands at Mill Lane should spread"
print(f"bands of {len(ids)} stations read back with xarray")
out = json.load(open(stdout_json))
assert out["command"] == "ensemble" and out["exit_status"] == 0, out["exit_status"]
assert out["ensembles"][0]["stations"] == doc["stations"]
for f in out["files"]:
    assert os.path.isfile(f), f
print(f"{checked} percentiles of {n} members match numpy.percentile; "
      f"{len(exc)} exceedance counts match")
PY
