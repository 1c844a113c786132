#!/bin/sh
# `freshet --format json` (route, compare, check): stdout is one JSON document that a script
# parses with Python's json module, whatever the exit status: the peaks of every station in
# every run, the warnings, the caution, the files written (each exists) and the exit status.
# Values checked against the inputs: Quarry Spring peaks at 2.5 m3/s at 90 min (the row of
# hydrographs/quarry-spring.csv, a linear series), and a bad basin file gives exit 2 with the
# message in "error".
# usage: json_format_test.sh FRESHET DEMO_BASIN SCRATCH
set -u
freshet=$1; basin=$2; dir=$3
rm -rf "$dir"; mkdir -p "$dir"
fail() { echo "FAIL: $*"; exit 1; }
py=/usr/bin/python3

"$freshet" --quiet --format json route "$basin" --storm aep1-30min --out "$dir/route" \
  > "$dir/route.json" 2> "$dir/route.err"
[ $? -eq 0 ] || { cat "$dir/route.err"; fail "route --format json did not exit 0"; }
$py - "$dir/route.json" <<'PY' || fail "route JSON"
import json, os, sys
doc = json.load(open(sys.argv[1]))  # the whole of stdout is one document
assert doc["format"] == "freshet command result", doc["format"]
assert doc["command"] == "route" and doc["exit_status"] == 0 and doc["error"] is None, doc
assert doc["cautions"][0].startswith("CAUTION:"), doc["cautions"]
assert len(doc["runs"]) == 1, len(doc["runs"])
run = doc["runs"][0]
assert run["scenario"] == "base" and run["storm"] == "aep1-30min", run
peaks = {p["station_id"]: p for p in run["peaks"]}
spring = peaks["quarry-spring"]
assert abs(spring["peak_discharge_m3s"] - 2.5) < 1e-12, spring
assert spring["peak_time_s"] == 5400.0, spring
assert peaks["mill-lane"]["peak_stage_m"] > 0.0, peaks["mill-lane"]
assert all("element" in w and "message" in w for w in run["warnings"])
assert any(f.endswith("report.html") for f in doc["files"]), doc["files"]
assert any(f.endswith("_summary_attenuation.csv") for f in doc["files"]), doc["files"]
for f in doc["files"]:
    assert os.path.isfile(f), f
print("route: %d stations, %d warnings, %d files" % (len(peaks), len(run["warnings"]), len(doc["files"])))
PY

"$freshet" --format json check "$basin" > "$dir/check.json" 2> "$dir/check.err"
[ $? -eq 0 ] || fail "check --format json did not exit 0"
$py - "$dir/check.json" <<'PY' || fail "check JSON"
import json, sys
doc = json.load(open(sys.argv[1]))
assert doc["command"] == "check" and doc["exit_status"] == 0, doc
assert doc["storms"] == ["aep1-30min", "aep1-60min", "aep1-120min"], doc["storms"]
assert "twin-1500" in doc["scenarios"], doc["scenarios"]
assert doc["basin_facts"]["units"] == "si", doc["basin_facts"]
assert doc["runs"] == [] and doc["files"] == [], doc
PY

"$freshet" --quiet --format json compare "$basin" --storm aep1-30min --scenario twin-1500 \
  --out "$dir/compare" > "$dir/compare.json" 2> "$dir/compare.err"
[ $? -eq 0 ] || { cat "$dir/compare.err"; fail "compare --format json did not exit 0"; }
$py - "$dir/compare.json" <<'PY' || fail "compare JSON"
import json, os, sys
doc = json.load(open(sys.argv[1]))
assert doc["command"] == "compare" and doc["exit_status"] == 0, doc
assert [r["scenario"] for r in doc["runs"]] == ["base", "twin-1500"], doc["runs"]
assert any(f.endswith("comparison.csv") for f in doc["files"]), doc["files"]
for f in doc["files"]:
    assert os.path.isfile(f), f
PY

# A failure is a JSON document too, with the exit status and the message.
printf '[study]\ntitle = "broken"\n' > "$dir/bad.toml"
"$freshet" --format json check "$dir/bad.toml" > "$dir/bad.json" 2> "$dir/bad.err"
status=$?
[ $status -eq 2 ] || fail "check of a bad basin exited $status, expected 2"
$py - "$dir/bad.json" <<'PY' || fail "failure JSON"
import json, sys
doc = json.load(open(sys.argv[1]))
assert doc["exit_status"] == 2, doc["exit_status"]
assert "bad.toml" in doc["error"], doc["error"]
PY
echo "json_format_test: ok"
