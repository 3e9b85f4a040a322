#!/usr/bin/env bash
# Instructions per edit in the window, counted by callgrind (valgrind): repeatable whatever else
# the machine is doing, unlike the milliseconds of BenchWindow. Prints one line per k and part:
#   bash tools/edit-cost.sh [BUILD_DIR]     (default build/dev; BenchWindow must be built)
# "models": from typing a weight until every model is current; "paint": the same, then the
# event loop runs once (layouts and painting), as BM_EditToPaint_Helmert measures.
set -euo pipefail
cd "$(dirname "$0")/.."
BUILD_DIR=${1:-build/dev}
bench="$BUILD_DIR/bench/BenchWindow"
[ -x "$bench" ] || { echo "edit-cost: $bench is not built (cmake --build $BUILD_DIR --target BenchWindow)" >&2; exit 2; }
command -v valgrind >/dev/null || { echo "edit-cost: valgrind is missing (bash tools/dev.sh deps)" >&2; exit 2; }
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
for k in 10 50; do
  for part in models paint; do
    CB_EDIT_COST=$part QT_QPA_PLATFORM=offscreen valgrind --tool=callgrind --instr-atstart=no \
      --callgrind-out-file="$out/cg.%p" "$bench" --benchmark_filter="EditToPaint_Helmert/$k\$" \
      --benchmark_min_time=0.001 >/dev/null 2>"$out/log" || { cat "$out/log" >&2; exit 1; }
    grep -h '^totals:' "$out"/cg.*.* | awk -v k="$k" -v part="$part" \
      '{ s += $2 } END { printf "k = %-3s %-7s %6.1f M instructions per edit\n", k, part, s / 20 / 1e6 }'
    rm -f "$out"/cg.*
  done
done
