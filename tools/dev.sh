#!/usr/bin/env bash
# Contrast Bench developer entry point (Debian 12).
#   bash tools/dev.sh run    install what is missing, build, open the workbench on a demo study
#   bash tools/dev.sh test   install what is missing, build, run every test (what CI runs)
#   bash tools/dev.sh sanitize  the same with AddressSanitizer + UndefinedBehaviorSanitizer (leaks
#                            count as failures; tests/lsan.supp lists the only leaks forgiven)
#   bash tools/dev.sh deps   only install the packages
#   bash tools/dev.sh packages   print the install list (the one list; tools/fuzz.sh and the
#                            fresh-machine guard tools/check-install-list.py read it from here)
# Fuzzing: bash tools/fuzz.sh smoke (what CI runs), bash tools/fuzz.sh long TARGET SECONDS.
# The Debian package: bash tools/package-check.sh (builds, installs, checks and removes it).
# Environment: BUILD_DIR (default build/dev; build/asan for sanitize), JOBS (default: number of cores).
set -euo pipefail
cd "$(dirname "$0")/.."

PACKAGES=(
  build-essential cmake ninja-build pkg-config git
  qt6-base-dev libqt6svg6 qt6-svg-dev
  libqt6sql6-sqlite libqt6sql6-psql libqt6sql6-odbc postgresql
  unixodbc libsqliteodbc
  libeigen3-dev libboost-dev libboost-math-dev libgmp-dev
  libbenchmark-dev
  python3-numpy python3-scipy python3-pandas python3-statsmodels
  clang libclang-rt-14-dev llvm-14
  xvfb xauth fonts-dejavu-core valgrind
  poppler-utils chromium
  dpkg-dev desktop-file-utils appstream bash-completion shared-mime-info
)

as_root() {
  if [ "$(id -u)" -eq 0 ]; then "$@"; else sudo "$@"; fi
}

deps() {
  local missing=()
  for p in "${PACKAGES[@]}"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
  done
  if [ ${#missing[@]} -gt 0 ]; then
    echo "Installing: ${missing[*]}"
    as_root apt-get update -qq
    DEBIAN_FRONTEND=noninteractive as_root apt-get install -y -qq --no-install-recommends "${missing[@]}"
  fi
}

BUILD_DIR=${BUILD_DIR:-build/dev}
JOBS=${JOBS:-$(nproc)}

build() {
  cmake -S . -B "$BUILD_DIR" -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCB_WERROR=ON "$@"
  cmake --build "$BUILD_DIR" -j "$JOBS"
}

case "${1:-}" in
  deps)
    deps
    ;;
  packages)
    printf '%s\n' "${PACKAGES[@]}"
    ;;
  run)
    deps
    build
    if [ -x "$BUILD_DIR/app/contrast-bench" ]; then
      if [ -z "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ]; then
        echo "No display: starting the window under Xvfb (close it with Ctrl+C)."
        exec xvfb-run -a "$BUILD_DIR/app/contrast-bench" --demo irrigation
      fi
      exec "$BUILD_DIR/app/contrast-bench" --demo irrigation
    fi
    exec "$BUILD_DIR/app/contrast-bench-cli" analyze --file resources/demos/irrigation.json
    ;;
  test)
    deps
    build
    QT_QPA_PLATFORM=offscreen ctest --test-dir "$BUILD_DIR" --output-on-failure -j "$JOBS"
    ;;
  sanitize)
    deps
    BUILD_DIR=${SANITIZE_BUILD_DIR:-build/asan}
    build -DCB_SANITIZE=ON -DCB_BUILD_BENCHMARKS=OFF
    ASAN_OPTIONS=detect_leaks=1:abort_on_error=1:strict_string_checks=1:detect_stack_use_after_return=1 \
    LSAN_OPTIONS=suppressions="$PWD/tests/lsan.supp":print_suppressions=0 \
    UBSAN_OPTIONS=halt_on_error=1:print_stacktrace=1 \
    QT_QPA_PLATFORM=offscreen ctest --test-dir "$BUILD_DIR" --output-on-failure -j "$JOBS"
    ;;
  *)
    sed -n '2,12p' "$0"
    exit 2
    ;;
esac
