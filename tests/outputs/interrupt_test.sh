#!/bin/sh
# SIGINT or SIGTERM during a run: freshet stops at its next coupling step, removes its
# temporary files and exits with 128 + the signal number (130 for SIGINT, 143 for SIGTERM, the
# shell's convention for a command ended by a signal). Nothing is left under a final name, no
# temporary file is left, and the output folder the run created is removed again.
# usage: interrupt_test.sh FRESHET SOURCE_DIR SCRATCH_DIR SIGNAL EXPECTED_EXIT
set -u
freshet=$1; src=$2; scratch=$3; sig=$4; want=$5
rm -rf "$scratch"; mkdir -p "$scratch"
. "$src/wait_for_run.sh"
fail() { echo "FAIL: $*"; cat "$scratch/route.log"; exit 1; }

# A non-interactive shell starts background jobs with SIGINT ignored (POSIX sh, "Signals and
# Error Handling"); env restores the default action, so freshet installs its handler.
env --default-signal=INT "$freshet" route "$src/data/slow.toml" --out "$scratch/out" --quiet \
  > "$scratch/route.log" 2>&1 &
pid=$!
wait_for_run "$scratch/out" "$pid" || fail "the run never started routing"
kill -"$sig" "$pid"
wait "$pid"; rc=$?
[ "$rc" -eq "$want" ] || fail "exit code $rc, expected $want"
grep -q "^freshet: stopped by SIG$sig; " "$scratch/route.log" || fail "no message naming SIG$sig"
left=$(find "$scratch" -mindepth 1 ! -name route.log)
[ -z "$left" ] || fail "left behind: $left"
echo "SIG$sig mid-run: exit $rc, no file left, output folder removed"
