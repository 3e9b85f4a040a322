#!/usr/bin/env bash
# The Debian package, end to end (CI runs it after `bash tools/dev.sh test`, as root or with sudo):
# builds contrast-bench_VERSION_ARCH.deb from an existing build folder with CPack (Depends computed by
# dpkg-shlibdeps), shows and checks its control fields and contents, installs it with apt-get, runs
# the installed-program checks (tests/install/check-installed.sh) on /usr, and removes it again.
#   bash tools/package-check.sh [BUILD_DIR]     (default build/dev, configured and built)
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build/dev}
[ -f "$build/CMakeCache.txt" ] || { echo "package-check: $build is not a configured build folder" >&2; exit 2; }
as_root() { if [ "$(id -u)" -eq 0 ]; then "$@"; else sudo "$@"; fi; }
fail() { echo "package-check: $*" >&2; exit 1; }

if dpkg-query -W -f='${Status}' contrast-bench 2>/dev/null | grep -q "install ok installed"; then
  fail "contrast-bench is installed already; remove it first (apt-get remove contrast-bench)"
fi

cmake --build "$build"
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
(cd "$build" && cpack -G DEB -B "$out" >"$out/cpack.log" 2>&1) || { cat "$out/cpack.log" >&2; fail "cpack -G DEB failed"; }
debs=("$out"/contrast-bench_*.deb)
[ ${#debs[@]} = 1 ] && [ -f "${debs[0]}" ] || fail "cpack made no contrast-bench_*.deb: $(ls "$out")"
deb=${debs[0]}
echo "== $(basename "$deb")"
dpkg-deb -I "$deb"
field() { dpkg-deb -f "$deb" "$1"; }
[ "$(field Package)" = contrast-bench ] || fail "Package is '$(field Package)'"
[ "$(field Section)" = science ] || fail "Section is '$(field Section)'"
[ -n "$(field Maintainer)" ] || fail "no Maintainer"
[ -n "$(field Description)" ] || fail "no Description"
version=$("$build/app/contrast-bench-cli" --version | cut -d' ' -f2)
[ "$(field Version)" = "$version" ] || fail "Version is '$(field Version)', the project's is $version"
# Depends come from dpkg-shlibdeps: versioned library packages, Qt's among them.
depends=$(field Depends)
grep -Eq 'libqt6core6 \(>= ' <<<"$depends" || fail "Depends lacks a versioned libqt6core6 (dpkg-shlibdeps not run?): $depends"
grep -Eq 'libgmp10 \(>= ' <<<"$depends" || fail "Depends lacks a versioned libgmp10: $depends"

dpkg-deb -c "$deb" >"$out/contents"
for path in ./usr/bin/contrast-bench-cli ./usr/bin/contrast-bench ./usr/share/applications/contrast-bench.desktop \
            ./usr/share/metainfo/org.contrastbench.ContrastBench.metainfo.xml ./usr/share/mime/packages/contrast-bench.xml \
            ./usr/share/icons/hicolor/48x48/apps/contrast-bench.png ./usr/share/icons/hicolor/scalable/apps/contrast-bench.svg \
            ./usr/share/man/man1/contrast-bench-cli.1 ./usr/share/man/man1/contrast-bench.1 \
            ./usr/share/bash-completion/completions/contrast-bench-cli ./usr/share/contrast-bench/demos/irrigation.json \
            ./usr/share/doc/contrast-bench/copyright; do
  grep -q " $path\$" "$out/contents" || fail "the package lacks $path"
done
if grep -Eq '/(Test|Bench|SaveLoop|WindowCrashChild|cb_render_icons)' "$out/contents"; then
  fail "the package holds a test or build helper: $(grep -E '/(Test|Bench|SaveLoop|WindowCrashChild|cb_render_icons)' "$out/contents")"
fi

echo "== apt-get install ./$(basename "$deb")"
chmod a+rx "$out" && chmod a+r "$deb" # apt's download user reads it
(cd "$out" && DEBIAN_FRONTEND=noninteractive as_root apt-get install -y -qq --no-install-recommends "./$(basename "$deb")")
removed=0
remove() { [ "$removed" = 1 ] || { DEBIAN_FRONTEND=noninteractive as_root apt-get remove -y -qq contrast-bench; removed=1; }; }
trap 'remove; rm -rf "$out"' EXIT
[ "$(command -v contrast-bench-cli)" = /usr/bin/contrast-bench-cli ] || fail "contrast-bench-cli is not on PATH at /usr/bin"
bash tests/install/check-installed.sh /usr
man -w contrast-bench-cli >/dev/null 2>&1 || [ -f /usr/share/man/man1/contrast-bench-cli.1.gz ] || [ -f /usr/share/man/man1/contrast-bench-cli.1 ] \
  || fail "no man page for contrast-bench-cli"

echo "== apt-get remove contrast-bench"
remove
[ ! -e /usr/bin/contrast-bench-cli ] && [ ! -e /usr/share/contrast-bench ] || fail "files were left behind after removal"
echo "package-check: $(basename "$deb") builds, installs, runs and removes cleanly"
