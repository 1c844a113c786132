#!/bin/sh
# Builds the libFuzzer targets under ASan and UBSan in ./build-fuzz (clang) and runs each one
# for a bounded time on its corpus; exits non-zero if any target crashes. Used by .ci/run
# (60 s a target) and for the longer runs recorded in docs/fuzzing.md.
#
#   sh tests/fuzz/run.sh [SECONDS_PER_TARGET] [TARGET ...]     # targets: study csv_series tables gauge_record
#
# Each target first replays its regressions (tests/fuzz/<target>/regressions, inputs that once
# crashed), then fuzzes from its seeds (tests/fuzz/<target>/seeds and the repository's data
# files: basins/, hydrographs/, tests/*/data/) with its dictionary. New
# inputs go to build-fuzz/corpus/<target> (kept between runs), crashing inputs to
# build-fuzz/artifacts/<target>/. Extra libFuzzer flags: FRESHET_FUZZ_FLAGS, e.g. "-jobs=2".
# An input that runs longer than FRESHET_FUZZ_TIMEOUT seconds (default 60) is a finding. The
# limit is wall-clock time: at `nice -n 19` on a busy machine, raise it (docs/fuzzing.md).
set -eu
cd "$(dirname "$0")/../.."

seconds="${1:-60}"
[ $# -gt 0 ] && shift
targets="${*:-study csv_series tables gauge_record}"
build=build-fuzz
timeout="${FRESHET_FUZZ_TIMEOUT:-60}"

echo "fuzz: configuring $build (clang, ASan + UBSan + libFuzzer)"
mkdir -p "$build"
cmake -S . -B "$build" -DCMAKE_BUILD_TYPE=RelWithDebInfo \
  -DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ -DFRESHET_FUZZ=ON \
  -DFRESHET_BUILD_TESTS=OFF -DFRESHET_BUILD_BENCHMARKS=OFF >"$build/configure.log" 2>&1 ||
  { cat "$build/configure.log"; exit 1; }
build_targets=""
for t in $targets; do build_targets="$build_targets fuzz_$t"; done
echo "fuzz: building$build_targets"
cmake --build "$build" -j"$(nproc)" --target $build_targets

failed=""
for t in $targets; do
  dir="tests/fuzz/$t"
  mkdir -p "$build/corpus/$t" "$build/artifacts/$t"
  dict=""
  [ -f "$dir/$t.dict" ] && dict="-dict=$dir/$t.dict"
  # The repository's own data files seed the targets too (read in place, never written).
  case "$t" in
    study) data_seeds="basins tests/outputs/data tests/cli/data" ;;
    csv_series) data_seeds="hydrographs tests/outputs/data" ;;
    gauge_record) data_seeds="basins/gauges" ;;
    *) data_seeds="" ;;
  esac
  still_failing=""
  for input in $(find "$dir/regressions" -type f ! -name '*.md' 2>/dev/null | sort); do
    if "$build/fuzz_$t" -timeout="$timeout" -rss_limit_mb=2048 "$input" >"$build/artifacts/$t/replay.log" 2>&1; then
      echo "fuzz: $t: regression $(basename "$input"): passes"
    else
      grep -E "^SUMMARY|freshet fuzz finding" "$build/artifacts/$t/replay.log" | head -n 3
      echo "fuzz: $t: regression $(basename "$input"): FAILS (run: $build/fuzz_$t $input)"
      still_failing="$still_failing $(basename "$input")"
    fi
  done
  if [ -n "$still_failing" ]; then
    failed="$failed $t"
    continue
  fi
  echo "fuzz: $t: fuzzing for ${seconds} s from $dir/seeds"
  # A target with no saved regression yet has no folder for them in a clean clone (git keeps
  # no empty folder), and libFuzzer stops on a corpus folder that does not exist.
  regressions=""
  [ -d "$dir/regressions" ] && regressions="$dir/regressions"
  # shellcheck disable=SC2086
  if "$build/fuzz_$t" -max_total_time="$seconds" -timeout="$timeout" -rss_limit_mb=2048 \
      -print_final_stats=1 -artifact_prefix="$build/artifacts/$t/" $dict \
      ${FRESHET_FUZZ_FLAGS:-} "$build/corpus/$t" "$dir/seeds" $data_seeds $regressions >"$build/artifacts/$t/fuzz.log" 2>&1; then
    runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$build/artifacts/$t/fuzz.log" | tail -n 1)
    echo "fuzz: $t: ok, ${runs:-?} executions, 0 crashes"
  else
    tail -n 60 "$build/artifacts/$t/fuzz.log"
    echo "fuzz: $t: CRASH (input saved under $build/artifacts/$t/, log $build/artifacts/$t/fuzz.log)"
    failed="$failed $t"
  fi
done

if [ -n "$failed" ]; then
  echo "fuzz: FAILED:$failed"
  exit 1
fi
echo "fuzz: all targets ran ${seconds} s with no crash:$targets"
