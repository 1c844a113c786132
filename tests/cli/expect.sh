#!/bin/sh
# Runs a command and checks its exit code and its output (stdout and stderr together).
#
#   sh expect.sh <exit-code> [<extended-regex> ...] -- <command> [<argument> ...]
#
# Every regex must match at least one line of the output (grep -E). On a mismatch the
# output is printed and the script exits 1, so CTest reports the test as failed.
expected=$1
shift
count=0
while [ "$#" -gt 0 ] && [ "$1" != "--" ]; do
  count=$((count + 1))
  eval "pattern_$count=\$1"
  shift
done
if [ "$#" -eq 0 ]; then
  echo "expect.sh: missing '--' before the command" >&2
  exit 1
fi
shift
output=$("$@" 2>&1)
status=$?
failed=0
if [ "$status" -ne "$expected" ]; then
  echo "expect.sh: exit code $status, expected $expected"
  failed=1
fi
i=1
while [ "$i" -le "$count" ]; do
  eval "pattern=\$pattern_$i"
  if ! printf '%s\n' "$output" | grep -E -q -e "$pattern"; then
    echo "expect.sh: no line of the output matches: $pattern"
    failed=1
  fi
  i=$((i + 1))
done
if [ "$failed" -ne 0 ]; then
  echo "---- command: $*"
  printf '%s\n' "$output"
  exit 1
fi
echo "expect.sh: exit code $status and $count pattern(s) as expected"
exit 0
