#!/bin/sh
# A run with one hostile value is refused and leaves no result behind:
#  * the fixture basin changed by one or more sed expressions is routed into scratch;
#  * the exit code is the expected one and every regex matches a line of the output;
#  * nothing is left in the output folder under any name (no result file, no temporary).
#
#   sh refused_run_test.sh <freshet> <fixture> <storm> <scratch> <exit-code> <sed-expression>... -- <regex>...
freshet=$1
fixture=$2
storm=$3
dir=$4
expected=$5
shift 5
fail() { echo "refused_run_test: $*"; exit 1; }
rm -rf "$dir" && mkdir -p "$dir" || fail "cannot create $dir"
cp "$fixture" "$dir/basin.toml" || fail "cannot copy $fixture"
while [ "$#" -gt 0 ] && [ "$1" != "--" ]; do
  cp "$dir/basin.toml" "$dir/before.toml"
  sed -e "$1" "$dir/before.toml" > "$dir/basin.toml" || fail "sed failed: $1"
  cmp -s "$dir/before.toml" "$dir/basin.toml" && fail "the sed expression changed nothing: $1"
  shift
done
[ "$#" -gt 0 ] || fail "missing '--' before the patterns"
shift
out="$dir/results"
log="$dir/route.log"
"$freshet" --quiet route "$dir/basin.toml" --storm "$storm" --out "$out" > "$log" 2>&1
status=$?
[ "$status" -eq "$expected" ] || { cat "$log"; fail "route exited $status, expected $expected"; }
for pattern in "$@"; do
  grep -E -q -e "$pattern" "$log" || { cat "$log"; fail "no line of the output matches: $pattern"; }
done
if [ -d "$out" ]; then
  left=$(find "$out" -type f)
  [ -z "$left" ] || { cat "$log"; fail "files left in the output folder: $left"; }
fi
echo "refused_run_test: exit $status, $# pattern(s), no file left"
