#!/bin/sh
# An output folder that cannot be written: exit code 4, a message naming the folder and the
# reason, and nothing left behind. Run as an unprivileged user when the test runs as root
# (root may write anywhere), through setpriv(1).
# usage: unwritable_folder_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -u
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch/ro/out/base"
fail() { echo "FAIL: $*"; cat "$scratch/route.log"; exit 1; }
as_user=""
if [ "$(id -u)" -eq 0 ]; then
  command -v setpriv > /dev/null || { echo "SKIP: root without setpriv"; exit 0; }
  as_user="setpriv --reuid=65534 --regid=65534 --clear-groups"
fi
chmod 0555 "$scratch/ro/out/base" "$scratch/ro/out" "$scratch/ro"
cp "$src/data/readback.toml" "$src/data/triangle.csv" "$scratch/"
chmod 0755 "$scratch"; chmod 0644 "$scratch/readback.toml" "$scratch/triangle.csv"

# An existing folder without write permission.
$as_user "$freshet" route "$scratch/readback.toml" --out "$scratch/ro/out" --quiet \
  > "$scratch/route.log" 2>&1
rc=$?
[ "$rc" -eq 4 ] || fail "exit code $rc, expected 4"
grep -q "^freshet: cannot write in output folder '$scratch/ro/out/base': Permission denied$" \
  "$scratch/route.log" || fail "no message naming the folder"
# A folder that cannot be created.
$as_user "$freshet" route "$scratch/readback.toml" --out "$scratch/ro/new" --quiet \
  > "$scratch/route.log" 2>&1
rc=$?
[ "$rc" -eq 4 ] || fail "exit code $rc, expected 4"
grep -q "^freshet: cannot create output folder '$scratch/ro/new/base': Permission denied$" \
  "$scratch/route.log" || fail "no message naming the folder"
chmod -R u+w "$scratch/ro"
left=$(find "$scratch/ro" -mindepth 1 ! -path "$scratch/ro/out" ! -path "$scratch/ro/out/base")
[ -z "$left" ] || fail "left behind: $left"
echo "unwritable folder: exit 4, folder named, nothing left"
