#!/bin/sh
# Routes the test study and reads the outputs back with independent readers (readback.py).
# usage: readback_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -eu
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
"$freshet" route "$src/data/readback.toml" --out "$scratch/out" --quiet > "$scratch/route.log"
/usr/bin/python3 "$src/readback.py" "$scratch/out"
