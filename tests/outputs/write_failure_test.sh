#!/bin/sh
# A run whose output cannot be written (here: a file-size limit of 8 blocks, with SIGXFSZ
# ignored so that write() fails with EFBIG) must end with exit code 4 and leave no file
# under a final name (and no partial file either).
# usage: write_failure_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -u
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
( trap '' XFSZ; ulimit -f 8; "$freshet" route "$src/data/readback.toml" --out "$scratch/out" \
    --quiet > "$scratch/route.log" 2>&1 )
rc=$?
if [ "$rc" -ne 4 ]; then echo "expected exit 4, got $rc"; cat "$scratch/route.log"; exit 1; fi
left=$(find "$scratch/out" -type f | wc -l)
if [ "$left" -ne 0 ]; then echo "files left behind:"; find "$scratch/out" -type f; exit 1; fi
grep -q "freshet: NetCDF output file" "$scratch/route.log" || { echo "no I/O message"; exit 1; }
echo "write failure: exit 4, no file left"
