#!/bin/sh
# Routes the demo, exports the outfall hydrograph, and feeds that CSV to a one-reach study as
# its inflow: the second study must load and route it (volume checked by the summary).
# usage: export_roundtrip_test.sh FRESHET DEMO_BASIN SCRATCH
set -eu
freshet=$1; demo=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
"$freshet" route "$demo" --storm aep1-30min --out "$scratch/demo" --export tansy-outfall \
  --export-interval-min 10 --quiet > "$scratch/demo.log"
csv="$scratch/demo/base/aep1-30min_tansy-outfall_hydrograph.csv"
test -f "$csv"
cat > "$scratch/downstream.toml" <<TOML
[study]
title = "Downstream of Tansy outfall (test)"
units = "si"
duration_h = 6.0
output_interval_min = 10.0
[[storm]]
id = "dry"
method = "alternating-block"
duration_min = 10
step_min = 10
idf = { a = 0.001, b = 10.0, c = 0.75 }
[[inflow]]
id = "from-tansy"
to = "reed-cut"
file = "demo/base/aep1-30min_tansy-outfall_hydrograph.csv"
[[reach]]
id = "reed-cut"
to = "reed-end"
length = 500.0
slope = 0.003
manning_n = 0.03
section = { shape = "rectangular", bottom_width = 6.0 }
[[outlet]]
id = "reed-end"
TOML
"$freshet" route "$scratch/downstream.toml" --out "$scratch/down" --quiet > "$scratch/down.log"
grep -q "^from-tansy " "$scratch/down.log"
echo "exported hydrograph read back and routed"
