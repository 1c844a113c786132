#!/bin/sh
# Two writers on one output folder, then a killed one.
#  1. While run A routes into a folder, run B into the same folder (with --overwrite) stops at
#     once with exit code 4 and a message naming the folder and A's process id; B writes
#     nothing and A is not disturbed.
#  2. A is killed with SIGKILL (which cannot be handled): nothing of A is under a final name,
#     only its staging folder is left.
#  3. The next run in that folder removes A's staging folder, says so, and writes its own
#     results; no temporary file is left.
# usage: concurrent_writers_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -u
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
. "$src/wait_for_run.sh"
out=$scratch/out
fail() { echo "FAIL: $*"; for f in "$scratch"/*.log; do echo "== $f"; cat "$f"; done; exit 1; }

"$freshet" route "$src/data/slow.toml" --out "$out" --overwrite --quiet > "$scratch/a.log" 2>&1 &
a=$!
wait_for_run "$out" "$a" || fail "run A never started routing"

"$freshet" route "$src/data/slow.toml" --out "$out" --overwrite --quiet > "$scratch/b.log" 2>&1
rc=$?
[ "$rc" -eq 4 ] || fail "run B: exit code $rc, expected 4"
grep -q "^freshet: output folder '$out/base' is in use by another freshet run (process $a holds" \
  "$scratch/b.log" || fail "run B: no message naming the folder and process $a"
[ "$(find "$out" -name ".*.freshet-*.partial" | wc -l)" -eq 1 ] || fail "run B left a temporary file"
kill -0 "$a" 2>/dev/null || fail "run A did not survive run B"

kill -KILL "$a"; wait "$a"
finals=$(find "$out" -type f ! -path "*.partial*" ! -name .freshet.lock)
[ -z "$finals" ] || fail "killed run A left files under final names: $finals"

"$freshet" route "$src/data/readback.toml" --out "$out" --quiet > "$scratch/c.log" 2>&1
rc=$?
[ "$rc" -eq 0 ] || fail "run C: exit code $rc, expected 0"
grep -q "^freshet: removed '$out/base/\.burst\.freshet-$a-[0-9a-f]*\.partial', left by an earlier run that was killed" \
  "$scratch/c.log" || fail "run C did not report removing A's staging folder"
left=$(find "$out" -name "*.partial*" -o -name .freshet.lock)
[ -z "$left" ] || fail "temporary files left: $left"
[ -f "$out/base/burst_summary.json" ] || fail "run C wrote no summary"
echo "two writers: B refused (exit 4, names process $a); A killed: no final file; C cleaned up"
