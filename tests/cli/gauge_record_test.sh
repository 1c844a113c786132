#!/bin/sh
# The Rookery Vale demonstration (basins/rookery-vale.toml, invented) routed from its two gauge
# records, then each record spoiled in one way: the route is refused with exit 2, the message
# names the record's file, line and column, and nothing is left in the output folder.
#
#   sh gauge_record_test.sh <freshet> <source-dir> <scratch>
freshet=$1
src=$2
dir=$3
fail() { echo "gauge_record_test: $*"; exit 1; }
fresh() {
  rm -rf "$dir" && mkdir -p "$dir/gauges" "$dir/observed" || fail "cannot create $dir"
  cp "$src/basins/rookery-vale.toml" "$dir/basin.toml" || fail "cannot copy the basin"
  cp "$src/basins/gauges/heron-hill.csv" "$src/basins/gauges/mill-cross.csv" "$dir/gauges/" ||
    fail "cannot copy the gauges"
  cp "$src/basins/observed/village-bridge.csv" "$dir/observed/" || fail "cannot copy the observed record"
}
# refused <file to edit> <sed expression> <regex>
refused() {
  fresh
  cp "$dir/$1" "$dir/before"
  sed -e "$2" "$dir/before" > "$dir/$1"
  cmp -s "$dir/before" "$dir/$1" && fail "the sed expression changed nothing: $2"
  "$freshet" --quiet route "$dir/basin.toml" --storm may-2026 --out "$dir/results" > "$dir/log" 2>&1
  status=$?
  [ "$status" -eq 2 ] || { cat "$dir/log"; fail "$2: route exited $status, expected 2"; }
  grep -E -q -e "$3" "$dir/log" || { cat "$dir/log"; fail "no line of the output matches: $3"; }
  if [ -d "$dir/results" ]; then
    left=$(find "$dir/results" -type f)
    [ -z "$left" ] || fail "files left in the output folder: $left"
  fi
  echo "gauge_record_test: refused as expected: $3"
}

fresh
"$freshet" --quiet route "$dir/basin.toml" --storm may-2026 --out "$dir/results" > "$dir/log" 2>&1 ||
  { cat "$dir/log"; fail "the demonstration did not route"; }
[ -f "$dir/results/base/may-2026.nc" ] || fail "no may-2026.nc written"
[ -f "$dir/results/base/may-2026_village-bridge_observed.csv" ] || fail "no observed CSV written"

# A repeated timestamp (line 7 of Mill Cross made equal to line 6).
refused gauges/mill-cross.csv 's/^2026-05-14T05:40:00Z;2,2$/2026-05-14T05:20:00Z;2,2/' \
  "gauges/mill-cross\.csv:6:1: storm 'may-2026' gauge 'mill-cross', timestamp '2026-05-14T05:20:00Z' repeats the one at line 5"
# A backwards one.
refused gauges/mill-cross.csv 's/^2026-05-14T06:20:00Z;5,3$/2026-05-14T05:50:00Z;5,3/' \
  "gauges/mill-cross\.csv:8:1: .*timestamp '2026-05-14T05:50:00Z' is earlier than the one at line 7"
# The gap under the refuse rule.
refused basin.toml 's/^missing = "linear".*/missing = "refuse"/' \
  "gauges/heron-hill\.csv:9:21: .*missing value \\(''\\) in column 'Rain \\(mm\\)'; the storm's rule is missing = \"refuse\""
# A bad date.
refused gauges/heron-hill.csv 's/^2026-05-14T07:20:00,4.0,ok$/2026-05-32T07:20:00,4.0,ok/' \
  "gauges/heron-hill\.csv:11:1: .*timestamp '2026-05-32T07:20:00': no such date"
# Weights that do not sum to 1.
refused basin.toml 's/heron-hill = 0.40, mill-cross = 0.60/heron-hill = 0.40, mill-cross = 0.50/' \
  "basin\.toml:[0-9]+:[0-9]+: storm 'may-2026' weights, field 'rookery-fields' weights sum to 0.9"
echo "gauge_record_test: all cases passed"
