#!/bin/sh
# `freshet storm --out`: the CSV export holds the design depth, refuses to overwrite an
# existing file without --overwrite (exit 4, file untouched) and leaves no temporary file.
#
#   sh storm_csv_test.sh <path-to-freshet> <scratch-directory>
freshet=$1
dir=$2
fail() { echo "storm_csv_test: $*"; exit 1; }
rm -rf "$dir" && mkdir -p "$dir" || fail "cannot create $dir"
csv="$dir/storm.csv"

# NRCS Type II, 100 mm in 30-min blocks: the depth column must add up to the design depth.
"$freshet" storm --method nrcs-24h --type II --depth-mm 100 --step-min 30 --out "$csv" >/dev/null ||
  fail "export exited $?"
[ -f "$csv" ] || fail "no file $csv"
head -n 1 "$csv" | grep -q '^time_min,depth_mm$' || fail "first line is not the header time_min,depth_mm"
grep -q '^#' "$csv" && fail "comment line in the CSV (metadata belongs in the sidecar)"
meta="$csv-metadata.json"
[ -f "$meta" ] || fail "no metadata sidecar $meta"
grep -q '"rdfs:comment": "CAUTION: ' "$meta" || fail "caution missing from the sidecar"
grep -q '"schema:unitText": "mm"' "$meta" || fail "depth unit missing from the sidecar"
# Rows after the header: time, depth fallen since the previous row (first row 0,0).
awk -F, 'body { n++; sum += $2; last = $1; if (n == 1 && ($1 != 0 || $2 != 0)) bad = 1 }
         /^time_min,/ { body = 1 }
         END { d = sum - 100; if (d < 0) d = -d;
               if (bad || n != 49 || last != 1440 || d > 1e-9) {
                 printf "rows %d, last time %s, total %.12g mm\n", n, last, sum; exit 1 } }' \
  "$csv" || fail "rows or total depth wrong (expected 49 rows to 1440 min, 100 mm)"

# A second export to the same name without --overwrite: exit 4, the file is unchanged.
cp "$csv" "$dir/first.csv" && cp "$meta" "$dir/first.meta"
"$freshet" storm --method nrcs-24h --type III --depth-mm 50 --step-min 60 --out "$csv" \
  > "$dir/second.log" 2>&1
status=$?
[ "$status" -eq 4 ] || fail "export over an existing file exited $status, expected 4"
grep -q 'exists' "$dir/second.log" || fail "message does not say the file exists"
cmp -s "$csv" "$dir/first.csv" || fail "existing file was modified"
cmp -s "$meta" "$dir/first.meta" || fail "existing sidecar was modified"

# With --overwrite and US units: replaced, depth in inches (100 mm = 100/25.4 in).
"$freshet" storm --method nrcs-24h --type II --depth-mm 100 --step-min 30 --units us \
  --out "$csv" --overwrite > /dev/null || fail "--overwrite export exited $?"
grep -q '^time_min,depth_in$' "$csv" || fail "header row time_min,depth_in missing"
awk -F, 'body { sum += $2 } /^time_min,/ { body = 1 }
         END { d = sum - 100 / 25.4; if (d < 0) d = -d; if (d > 1e-9) exit 1 }' "$csv" ||
  fail "total depth in inches wrong"
ls "$dir" | grep -q 'partial' && fail "temporary .partial file left behind"
echo "storm_csv_test: passed"
exit 0
