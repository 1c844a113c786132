#!/bin/sh
# `freshet route` on the Tansy Brook demo with one storm, end to end:
#  * exit 0, the summary table and the caution printed (the caution closes the output);
#  * the station and subcatchment NetCDF files, the summary CSVs and the JSON file exist, and
#    no temporary '.partial' file is left (outputs are renamed into place, docs/outputs.md);
#  * the NetCDF header carries the CF attributes checked with ncdump -h (CF-1.11 conventions,
#    discrete sampling geometry featureType timeSeries, CF standard name of discharge) and
#    the caution, 6 h at 5-min outputs gives 73 times (start included), and the time unit
#    counts from the study start of basins/tansy-brook.toml (2026-07-14T00:00:00Z);
#  * the station summary agrees with values computed by hand from the inputs: Quarry Spring
#    peaks at 2.5 m3/s at 90 min and carries 23 220 m3 (trapezoidal integral of
#    hydrographs/quarry-spring.csv, which is linear between rows), and the confluence passes
#    the sum of its two inflow volumes (continuity, no storage at a junction);
#  * a second run without --overwrite exits 4, says the file exists and leaves it untouched.
#
#   sh route_test.sh <path-to-freshet> <path-to-basin-file> <scratch-directory>
freshet=$1
basin=$2
dir=$3
fail() { echo "route_test: $*"; exit 1; }
rm -rf "$dir" && mkdir -p "$dir" || fail "cannot create $dir"
out="$dir/results"
log="$dir/route.log"

"$freshet" --quiet route "$basin" --storm aep1-30min --out "$out" > "$log" 2>&1
status=$?
[ "$status" -eq 0 ] || { cat "$log"; fail "route exited $status, expected 0"; }
grep -q '^Stations$' "$log" || fail "no station summary printed"
grep -q '^mill-lane  *Mill Lane culvert ' "$log" || fail "culvert row missing from the summary"
grep -q '^Mass balance$' "$log" || fail "no mass balance printed"
# The caution is the last paragraph (9 lines at 92 columns since it names every method).
tail -n 12 "$log" | grep -q '^CAUTION: ' || fail "the output does not end with the caution"

base="$out/base/aep1-30min"
for f in "$base.nc" "${base}_subcatchments.nc" "${base}_summary_stations.csv" \
         "${base}_summary_attenuation.csv" "${base}_summary_stretches.csv" "${base}_summary_checks.csv" "${base}_summary.json"; do
  [ -s "$f" ] || fail "missing or empty output $f"
  grep -q "$f" "$log" || fail "output $f not listed on stdout"
done
[ -z "$(find "$out" -name '*partial*')" ] || fail "temporary .partial file left behind"
grep -q '"caution": "CAUTION: ' "${base}_summary.json" || fail "JSON summary has no caution"

command -v ncdump > /dev/null || fail "ncdump not found (package netcdf-bin, see .ci/bootstrap)"
ncdump -h "$base.nc" > "$dir/header.txt" || fail "ncdump -h failed on $base.nc"
for pattern in ':Conventions = "CF-1.11' ':featureType = "timeSeries"' \
               'discharge:standard_name = "water_volume_transport_in_river_channel"' \
               'station_id:cf_role = "timeseries_id"' ':caution = "CAUTION: ' \
               'time = UNLIMITED ; // (73 currently)' \
               'time:units = "seconds since 2026-07-14 00:00:00'; do
  grep -qF "$pattern" "$dir/header.txt" || { cat "$dir/header.txt"; fail "header lacks: $pattern"; }
done

# Station summary columns: station_id,name,peak_discharge_m3s,peak_time_s,peak_stage_m,
# runoff_volume_m3,...
awk -F, '
  function rel(a, b) { d = a - b; if (d < 0) d = -d; return d / (b < 0 ? -b : b) }
  $1 == "quarry-spring" { q = $3; t = $4; v = $6 }
  $1 == "upper-tansy" { up = $6 } $1 == "bell-gill" { bell = $6 } $1 == "tansy-meet" { meet = $6 }
  END {
    if (rel(q, 2.5) > 1e-12 || t != 5400 || rel(v, 23220) > 1e-9) {
      printf "quarry-spring: peak %s m3/s at %s s, volume %s m3\n", q, t, v; exit 1 }
    if (rel(meet, up + bell) > 1e-9) {
      printf "tansy-meet volume %s m3, inflows %s + %s m3\n", meet, up, bell; exit 1 }
  }' "${base}_summary_stations.csv" || fail "station summary disagrees with the hand values"

# Again without --overwrite: refused with exit 4, the existing file unchanged.
cp "$base.nc" "$dir/first.nc"
"$freshet" --quiet route "$basin" --storm aep1-30min --out "$out" > "$dir/again.log" 2>&1
status=$?
[ "$status" -eq 4 ] || { cat "$dir/again.log"; fail "second route exited $status, expected 4"; }
grep -q 'exists' "$dir/again.log" || fail "message does not say the file exists"
cmp -s "$base.nc" "$dir/first.nc" || fail "existing NetCDF file was modified"
[ -z "$(find "$out" -name '*partial*')" ] || fail "temporary .partial file left after refusal"
echo "route_test: passed"
exit 0
