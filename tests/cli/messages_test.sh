#!/bin/sh
# Command-line and run-time messages that must say what is wrong (issue: hostile input):
#  - an unknown subcommand is named, with the list of subcommands;
#  - `--out ''` is an error, not the default folder;
#  - a storm whose rain overflows to infinity names the basin file and the storm, and leaves no
#    (empty) output folder behind.
# usage: messages_test.sh FRESHET DEMO_BASIN SCRATCH_DIR
set -u
freshet=$1; demo=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
fail() { echo "FAIL: $*"; cat "$scratch/log"; exit 1; }
expect() {  # expect EXIT REGEX: the last command's exit code and a line of its output
  [ "$rc" -eq "$1" ] || fail "exit code $rc, expected $1"
  grep -E -q -e "$2" "$scratch/log" || fail "no line matches: $2"
}

"$freshet" frobnicate > "$scratch/log" 2>&1; rc=$?
expect 1 "^freshet: unknown subcommand 'frobnicate'; the subcommands are route, check, compare, ensemble, storm, verify, layers, version"
"$freshet" --quiet frobnicate --out x > "$scratch/log" 2>&1; rc=$?
expect 1 "unknown subcommand 'frobnicate'"

for cmd in route compare; do
  (cd "$scratch" && "$freshet" "$cmd" "$demo" --storm aep1-30min --out '' --quiet) \
    > "$scratch/log" 2>&1; rc=$?
  expect 1 "--out.*is empty"
  [ ! -e "$scratch/out" ] || fail "$cmd --out '' wrote to the default folder"
done
"$freshet" storm --method nrcs-24h --type II --depth-mm 100 --step-min 30 --out '' \
  > "$scratch/log" 2>&1; rc=$?
expect 1 "--out.*is empty"

# An IDF whose intensities overflow (a = 1e308 mm/h: physically meaningless), in a copy of
# the demo whose hydrograph path is made absolute.
hydrographs=$(cd "$(dirname "$demo")/../hydrographs" && pwd)
sed -e 's/^idf = { a = [0-9.]*,/idf = { a = 1e308,/' \
    -e "s|file = \"../hydrographs/|file = \"$hydrographs/|" "$demo" > "$scratch/overflow.toml"
grep -q "a = 1e308" "$scratch/overflow.toml" || fail "test setup: no IDF line replaced"
"$freshet" route "$scratch/overflow.toml" --storm aep1-30min --out "$scratch/res" --quiet \
  > "$scratch/log" 2>&1; rc=$?
expect 2 "overflow\.toml.*storm 'aep1-30min'"
[ ! -e "$scratch/res" ] || fail "the failed run left its output folder: $(find "$scratch/res")"
echo "messages: unknown subcommand named, empty --out refused, overflowing storm located"
