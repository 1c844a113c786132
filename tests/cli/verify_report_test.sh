#!/bin/sh
# `freshet verify --out FILE.md`: the Markdown report carries the header, one table row per
# case, the closing count and the caution; with FRESHET_VERIFY_PERTURB the report is marked
# as a self-test and the perturbed case fails.
#
#   sh verify_report_test.sh <path-to-freshet> <scratch-directory>
freshet=$1
dir=$2
fail() { echo "verify_report_test: $*"; exit 1; }
rm -rf "$dir" && mkdir -p "$dir" || fail "cannot create $dir"
report="$dir/report.md"

"$freshet" verify --out "$report" > "$dir/stdout.txt" 2>&1 || fail "verify exited $?"
grep -q '^# freshet verification report$' "$report" || fail "title missing"
grep -q '^- freshet version: ' "$report" || fail "version line missing"
grep -q '^- date: [0-9]\{4\}-[0-9][0-9]-[0-9][0-9]T' "$report" || fail "date line missing"
grep -q '^- machine: ' "$report" || fail "machine line missing"
grep -q '^| case | quantity | unit | published | freshet | tolerance | status | source |$' \
  "$report" || fail "table header missing"
cases=$("$freshet" verify --list | tail -n +2 | wc -l)
rows=$(grep -c '^| [a-z0-9.-]* | .* | pass | ' "$report")
[ "$cases" -ge 10 ] || fail "only $cases cases listed"
[ "$rows" -eq "$cases" ] || fail "$rows passing rows for $cases cases"
grep -q "^$cases passed, 0 failed\$" "$report" || fail "closing line '$cases passed, 0 failed' missing"
grep -q '^CAUTION: ' "$report" || fail "caution missing"
grep -q 'SELF-TEST' "$report" && fail "unperturbed report marked as self-test"
cmp -s "$report" "$dir/stdout.txt" && fail "Markdown file identical to the text on stdout"

# Self-test: perturb one case, write a text report over the old file with --overwrite.
FRESHET_VERIFY_PERTURB=green-ampt-ponding-time "$freshet" verify --out "$dir/report.txt" \
  > /dev/null 2> "$dir/stderr.txt"
status=$?
[ "$status" -eq 5 ] || fail "perturbed run exited $status, expected 5"
grep -q 'green-ampt-ponding-time' "$dir/stderr.txt" || fail "failing case not named on stderr"
grep -q '^green-ampt-ponding-time .* FAIL ' "$dir/report.txt" || fail "case not marked FAIL"
grep -q "^$((cases - 1)) passed, 1 failed\$" "$dir/report.txt" || fail "closing count wrong"
grep -q 'SELF-TEST' "$dir/report.txt" || fail "perturbed report not marked as self-test"
# An existing report is refused before any case runs, and left as it was.
before=$(cksum < "$report")
"$freshet" verify --out "$report" > "$dir/again.txt" 2>&1
status=$?
[ "$status" -eq 4 ] || fail "verify over an existing report exited $status, expected 4"
grep -q 'already exists' "$dir/again.txt" || fail "refusal not explained"
grep -q 'passed, 0 failed' "$dir/again.txt" && fail "cases ran before the refusal"
[ "$(cksum < "$report")" = "$before" ] || fail "existing report changed"
echo "verify_report_test: passed"
exit 0
