#!/usr/bin/env bash
# The fresh-machine guard (tools/check-install-list.py) on this build: it passes with the install
# list of tools/dev.sh as it is, and fails, naming the package, when a package the build needs is
# left out of the list (even though this machine has it installed).
# Usage: TestInstallList.sh PYTHON SOURCE_DIR BUILD_DIR
set -uo pipefail
python=$1 src=$2 build=$3
guard="$src/tools/check-install-list.py"
failures=0 passes=0

expect() { # expect NAME STATUS PATTERN -- ARGS...
  local name=$1 status=$2 pattern=$3; shift 4
  local out rc
  out=$("$python" "$guard" "$@" 2>&1); rc=$?
  if [ "$rc" -eq "$status" ] && grep -qE -- "$pattern" <<<"$out"; then
    echo "PASS: $name"; passes=$((passes + 1))
  else
    echo "FAIL: $name (exit $rc, expected $status and /$pattern/)"; echo "$out" | tail -n 20
    failures=$((failures + 1))
  fi
}

expect "the list covers every file the build used" 0 "comes from the install list" -- "$build"
expect "Qt's development files left out are named" 1 "missing from the install list \(tools/dev.sh\): qt6-base-dev" -- "$build" --drop qt6-base-dev
expect "GMP's C++ header left out is named with the file" 1 "missing from the install list \(tools/dev.sh\): libgmp-dev, which owns /usr/include/.*gmp" -- "$build" --drop libgmp-dev
expect "Eigen left out is named" 1 "libeigen3-dev" -- "$build" --drop libeigen3-dev
# statsmodels depends on SciPy, so both leave the list for SciPy to be missing.
expect "SciPy for the reference scripts left out is named" 1 "python3-scipy" -- "$build" --drop python3-scipy --drop python3-statsmodels

echo "$passes passed, $failures failed"
[ "$failures" -eq 0 ]
