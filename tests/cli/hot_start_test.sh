#!/bin/sh
# Hot start end to end (docs/state-files.md): routes the demo whole, routes it again saving its
# state at 0.75 h and 1.5 h, resumes from each, and has tests/cli/hot_start_check.py compare the
# outputs bit for bit (NetCDF values after the saved time, summary CSVs and JSON, exported
# hydrograph)
# and read the state file's layout with h5py, an HDF5 reader independent of freshet. Then the
# refusals: another storm, a truncated file and a changed byte (exit 2, file and mismatch named).
# usage: hot_start_test.sh FRESHET DEMO_BASIN SCRATCH PYTHON (Debian's, with python3-h5py)
set -eu
freshet=$1; demo=$2; scratch=$3; python=$4
here=$(dirname "$0")
rm -rf "$scratch"; mkdir -p "$scratch"
route() { "$freshet" --quiet route "$demo" --storm aep1-30min --export tansy-outfall "$@"; }
route --out "$scratch/whole" > "$scratch/whole.log"
route --out "$scratch/first" --save-state-at 0.75 --save-state-at 1.5 > "$scratch/first.log"
state="$scratch/first/base/aep1-30min_state_5400s.h5"
early="$scratch/first/base/aep1-30min_state_2700s.h5"
test -f "$state"; test -f "$early"
if ls "$scratch/first/base/" | grep -q 'freshet-'; then echo "temporary file left"; exit 1; fi
route --out "$scratch/resumed" --resume-from "$state" > "$scratch/resumed.log"
route --out "$scratch/resumed-early" --resume-from "$early" > "$scratch/resumed-early.log"
"$python" "$here/hot_start_check.py" "$demo" "$scratch" 5400 "$state" resumed
"$python" "$here/hot_start_check.py" "$demo" "$scratch" 2700 "$early" resumed-early

refused() {  # expected message, then the command
  pattern=$1; shift
  if "$@" > "$scratch/refused.log" 2>&1; then echo "accepted: $*"; exit 1; fi
  status=0; "$@" > /dev/null 2>&1 || status=$?
  if [ "$status" -ne 2 ]; then echo "exit $status, not 2: $*"; cat "$scratch/refused.log"; exit 1; fi
  if ! grep -q -- "$pattern" "$scratch/refused.log"; then
    echo "missing '$pattern' in:"; cat "$scratch/refused.log"; exit 1
  fi
}
refused "aep1-30min_state_5400s.h5: state file, field 'storm' = 'aep1-30min': the state was saved from storm 'aep1-30min', this run routes storm 'aep1-60min'" \
  "$freshet" --quiet route "$demo" --storm aep1-60min --out "$scratch/other-storm" --resume-from "$state"
head -c 3000 "$state" > "$scratch/cut.h5"
refused "cut.h5: state file, .*damaged or truncated" \
  "$freshet" --quiet route "$demo" --storm aep1-30min --out "$scratch/cut" --resume-from "$scratch/cut.h5"
"$python" "$here/hot_start_check.py" --flip "$state" "$scratch/flipped.h5"
refused "flipped.h5: state file, field 'content_sha256' = .*the file was changed or damaged after it was written" \
  "$freshet" --quiet route "$demo" --storm aep1-30min --out "$scratch/flipped" --resume-from "$scratch/flipped.h5"
echo "hot start: split runs equal the whole run; refusals named"
