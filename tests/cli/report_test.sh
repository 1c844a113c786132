#!/bin/sh
# The study report of `route` and `compare` (docs/outputs.md, "The study report"):
#  * route writes <out>/base/report.html, lists it, and it names the storm routed;
#  * a second route into the folder without --overwrite stops before routing: exit 4, the
#    message names report.html and says it exists, and no file of the second storm appears;
#  * with --overwrite the report is replaced by the second command's;
#  * compare writes <out>/report.html with every network it compared.
#
#   sh report_test.sh <path-to-freshet> <path-to-basin-file> <scratch-directory>
freshet=$1; basin=$2; dir=$3
fail() { echo "report_test: $*"; exit 1; }
rm -rf "$dir" && mkdir -p "$dir" || fail "cannot create $dir"
out="$dir/route"
"$freshet" --quiet route "$basin" --storm aep1-30min --out "$out" > "$dir/first.log" 2>&1 ||
  { cat "$dir/first.log"; fail "first route failed"; }
report="$out/base/report.html"
[ -s "$report" ] || fail "no $report"
grep -q "^  $report  (the study report" "$dir/first.log" || fail "report not listed on stdout"
grep -q 'storms aep1-30min;' "$report" || fail "report does not name the storm routed"

"$freshet" --quiet route "$basin" --storm aep1-60min --out "$out" > "$dir/again.log" 2>&1
status=$?
[ "$status" -eq 4 ] || { cat "$dir/again.log"; fail "second route exited $status, expected 4"; }
grep -q "report\.html.*exists" "$dir/again.log" || { cat "$dir/again.log"; fail "message does not name the existing report"; }
[ -z "$(find "$out" -name 'aep1-60min*')" ] || fail "the refused route wrote files"
grep -q 'storms aep1-30min;' "$report" || fail "the refused route changed the report"

"$freshet" --quiet route "$basin" --storm aep1-60min --out "$out" --overwrite > "$dir/over.log" 2>&1 ||
  { cat "$dir/over.log"; fail "route --overwrite failed"; }
grep -q 'storms aep1-60min;' "$report" || fail "--overwrite did not replace the report"

"$freshet" --quiet compare "$basin" --storm aep1-30min --out "$dir/compare" > "$dir/compare.log" 2>&1 ||
  { cat "$dir/compare.log"; fail "compare failed"; }
[ -s "$dir/compare/report.html" ] || fail "compare wrote no report.html"
grep -q 'networks base, twin-1500, box-3000x1500\.' "$dir/compare/report.html" ||
  fail "compare report does not name every network"
[ -z "$(find "$dir" -name '*partial*')" ] || fail "temporary file left behind"
echo "report_test: passed"
