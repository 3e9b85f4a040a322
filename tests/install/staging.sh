#!/usr/bin/env bash
# `cmake --install` of the build into a fresh staging prefix, then the installed-program checks there.
#   staging.sh BUILD_DIR [--no-gui]
set -euo pipefail
build=$1; shift
stage=$(mktemp -d)
trap 'rm -rf "$stage"' EXIT
cmake --install "$build" --prefix "$stage" >"$stage.log" 2>&1 || { cat "$stage.log" >&2; rm -f "$stage.log"; exit 1; }
rm -f "$stage.log"
bash "$(dirname "$0")/check-installed.sh" "$stage" --extra-demo "$@"
