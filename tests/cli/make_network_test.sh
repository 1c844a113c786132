#!/bin/sh
# tools/make_network.py writes studies that freshet accepts and routes:
#  * a complete binary tree of 15 reaches has 8 head reaches, hence 8 subcatchments, and
#    `freshet check` counts exactly those elements (1 outlet, 15 reaches);
#  * a random dendritic tree of 40 reaches (one subcatchment on each) routes a 30-min storm
#    with every element's volume balance closed to round-off (continuity: water supplied =
#    outflow + losses + storage change; the run prints its largest imbalance, which must be
#    below 1e-12 of the volume).
#
#   sh make_network_test.sh <python3> <make_network.py> <path-to-freshet> <scratch-directory>
python=$1
gen=$2
freshet=$3
dir=$4
fail() { echo "make_network_test: $*"; exit 1; }
rm -rf "$dir" && mkdir -p "$dir" || fail "cannot create $dir"

"$python" "$gen" --reaches 15 --shape binary --out "$dir/binary15.toml" || fail "binary: generator failed"
"$freshet" check "$dir/binary15.toml" > "$dir/check.log" 2>&1 || { cat "$dir/check.log"; fail "binary: check failed"; }
grep -q '^  elements: 1 outlet 15 reach 8 subcatchment$' "$dir/check.log" \
  || { cat "$dir/check.log"; fail "binary: expected 1 outlet, 15 reaches and 8 subcatchments"; }

"$python" "$gen" --reaches 40 --shape random --seed 7 --duration-h 1 --storm block:30 \
  --output-interval-min 5 --out "$dir/random40.toml" || fail "random: generator failed"
"$freshet" --quiet route "$dir/random40.toml" --out "$dir/out" > "$dir/route.log" 2>&1 \
  || { cat "$dir/route.log"; fail "random: route failed"; }
line=$(grep '^Numerics: ' "$dir/route.log") || { cat "$dir/route.log"; fail "no Numerics line"; }
imbalance=$(echo "$line" | sed -n 's/.*largest element volume imbalance \([^ ]*\) of .*/\1/p')
[ -n "$imbalance" ] || fail "cannot read the imbalance from: $line"
awk -v x="$imbalance" 'BEGIN { exit !(x + 0 < 1e-12) }' || fail "volume imbalance $imbalance >= 1e-12"
[ "$(grep -c ' cell updates' "$dir/route.log")" -eq 40 ] || fail "expected one line per reach (40)"
echo "make_network_test: passed (imbalance $imbalance)"
