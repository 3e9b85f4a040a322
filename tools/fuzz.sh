#!/usr/bin/env bash
# Fuzzing Contrast Bench with libFuzzer (clang 14, AddressSanitizer + UndefinedBehaviorSanitizer).
#   bash tools/fuzz.sh build                  configure (-DCB_FUZZ=ON) and build the targets in $BUILD_DIR
#   bash tools/fuzz.sh smoke                  build, then run every target from its seed corpus for a bounded
#                                             time ($SMOKE_SECONDS each, default 20): what CI runs
#   bash tools/fuzz.sh long TARGET SECONDS    build, then run one target for SECONDS (a long run: hours are fine);
#                                             new inputs grow $BUILD_DIR/work/TARGET, crashes, leaks and hangs are
#                                             written to $BUILD_DIR/findings/TARGET/ (reproduce: TARGET FILE)
# Targets: FuzzWeight FuzzSchemeFile FuzzDataReader FuzzExport FuzzCliMatrix (sources and seed corpora in
# tests/fuzz/). Each finding becomes a regression test (tests/TestRegression.cpp) before it is fixed.
# Environment: BUILD_DIR (default build/fuzz), JOBS (default: number of cores), SMOKE_SECONDS.
set -euo pipefail
cd "$(dirname "$0")/.."

BUILD_DIR=${BUILD_DIR:-build/fuzz}
JOBS=${JOBS:-$(nproc)}
SMOKE_SECONDS=${SMOKE_SECONDS:-20}
TARGETS=(FuzzWeight FuzzSchemeFile FuzzDataReader FuzzExport FuzzCliMatrix)
export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1:abort_on_error=1}
export UBSAN_OPTIONS=${UBSAN_OPTIONS:-halt_on_error=1:print_stacktrace=1}

build() {
  bash tools/dev.sh deps # the one install list
  cmake -S . -B "$BUILD_DIR" -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_CXX_COMPILER=clang++-14 \
    -DCB_FUZZ=ON -DCB_BUILD_GUI=OFF -DCB_BUILD_BENCHMARKS=OFF -DBUILD_TESTING=OFF >/dev/null
  cmake --build "$BUILD_DIR" -j "$JOBS" --target "${TARGETS[@]}"
}

# run TARGET SECONDS WORKDIR: libFuzzer on the seeds, new inputs in WORKDIR; prints the executions.
run() {
  local target=$1 seconds=$2 work=$3 findings="$BUILD_DIR/findings/$1"
  local dict=()
  [ -f "tests/fuzz/$target.dict" ] && dict=(-dict="tests/fuzz/$target.dict")
  mkdir -p "$work" "$findings"
  local log="$BUILD_DIR/findings/$target.log"
  if ! "$BUILD_DIR/tests/fuzz/$target" "$work" "tests/fuzz/corpus/$target" "${dict[@]}" \
      -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=4096 -print_final_stats=1 \
      -artifact_prefix="$findings/" >"$log" 2>&1; then
    tail -n 60 "$log"
    echo "$target: FAILED (inputs in $findings/, log $log)"
    return 1
  fi
  local runs
  runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -n 1)
  echo "$target: ${runs:-?} executions in ${seconds} s, no finding"
}

case "${1:-}" in
  build)
    build
    ;;
  smoke)
    build
    status=0
    for t in "${TARGETS[@]}"; do
      work=$(mktemp -d)
      run "$t" "$SMOKE_SECONDS" "$work" || status=1
      rm -rf "$work"
    done
    exit $status
    ;;
  long)
    [ $# -eq 3 ] || { sed -n '2,11p' "$0"; exit 2; }
    build
    run "$2" "$3" "$BUILD_DIR/work/$2"
    ;;
  *)
    sed -n '2,11p' "$0"
    exit 2
    ;;
esac
