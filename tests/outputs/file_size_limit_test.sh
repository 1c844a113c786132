#!/bin/sh
# A file-size limit (RLIMIT_FSIZE, set with prlimit(1)) of 32 KiB: the summaries (about 4 KiB
# each) fit, the NetCDF series (about 45 KiB) do not. The run must end with exit code 4 and
# one message naming the NetCDF file and the reason, without the netCDF library's own
# "file: ncFile.cpp line:" lines, and leave nothing: no summary under a final name, no
# temporary file, no output folder. Once with SIGXFSZ at its default action (freshet ignores
# it itself) and once with it ignored by the parent (write() then fails with EFBIG).
# usage: file_size_limit_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -u
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
fail() { echo "FAIL ($case): $*"; cat "$scratch/route.log"; exit 1; }
for case in default ignored; do
  out=$scratch/out-$case
  if [ "$case" = ignored ]; then trap '' XFSZ; fi
  prlimit --fsize=32768 "$freshet" route "$src/data/readback.toml" --out "$out" --quiet \
    > "$scratch/route.log" 2>&1
  rc=$?
  trap - XFSZ
  [ "$rc" -eq 4 ] || fail "exit code $rc, expected 4"
  grep -q "^freshet: NetCDF output file '$out/base/burst.nc': NetCDF: HDF error: File too large$" \
    "$scratch/route.log" || fail "no message naming the NetCDF file and the reason"
  ! grep -q "ncFile.cpp" "$scratch/route.log" || fail "the netCDF library printed its own lines"
  [ ! -e "$out" ] || fail "left behind: $(find "$out")"
done
echo "file-size limit: exit 4, NetCDF file and reason named, nothing left"
