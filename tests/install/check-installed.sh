#!/usr/bin/env bash
# Checks an installed Contrast Bench under PREFIX (a staging folder from `cmake --install`, or /usr
# after installing the Debian package): the programs run from there on an installed demo, the window
# finds its demos beside itself, and the desktop entry, AppStream metadata, MIME type, icons, man
# pages, bash completion and copyright are in place and valid.
#   check-installed.sh PREFIX [--no-gui] [--extra-demo]
#   --extra-demo  also put a demo of its own into PREFIX/share/contrast-bench/demos (removed again)
#                 and open it with the window: only for a staging folder.
set -euo pipefail
prefix=$1; shift
gui=1 extra=0
for a in "$@"; do
  case $a in
    --no-gui) gui=0 ;;
    --extra-demo) extra=1 ;;
    *) echo "check-installed: unknown option $a" >&2; exit 2 ;;
  esac
done
share=$prefix/share
cli=$prefix/bin/contrast-bench-cli
work=$(mktemp -d)
cleanup() { rm -rf "$work"; [ "$extra" = 1 ] && rm -f "$share/contrast-bench/demos/zzstagedcheck.json"; return 0; }
trap cleanup EXIT
fail() { echo "check-installed: $*" >&2; exit 1; }
expect_file() { [ -s "$1" ] || fail "missing or empty: $1"; }

# The command line, on an installed demo.
version=$("$cli" --version) || fail "$cli --version failed"
[[ $version =~ ^contrast-bench-cli\ [0-9]+\.[0-9]+\.[0-9]+$ ]] || fail "--version printed '$version'"
report=$("$cli" analyze --file "$share/contrast-bench/demos/irrigation.json") || fail "analyze --file on the installed demo failed"
grep -q "What each coefficient estimates" <<<"$report" || fail "analyze --file printed no hypotheses"
for demo in irrigation roast onboarding hedgerow warmup; do
  "$cli" analyze --file "$share/contrast-bench/demos/$demo.json" --json >/dev/null || fail "analyze --file $demo.json failed"
done

# Man pages, completion, copyright.
expect_file "$share/man/man1/contrast-bench-cli.1"
expect_file "$share/bash-completion/completions/contrast-bench-cli"
expect_file "$share/doc/contrast-bench/copyright"
grep -q "^License: MIT" "$share/doc/contrast-bench/copyright" || fail "the copyright file names no licence"
reply=$(bash -c 'source "$1"; COMP_WORDS=(contrast-bench-cli an); COMP_CWORD=1; _contrast_bench_cli; echo "${COMPREPLY[*]}"' _ \
        "$share/bash-completion/completions/contrast-bench-cli")
[ "$reply" = analyze ] || fail "the installed completion gives '$reply' for 'contrast-bench-cli an'"

if [ "$gui" = 1 ]; then
  expect_file "$share/man/man1/contrast-bench.1"
  desktop=$share/applications/contrast-bench.desktop
  metainfo=$share/metainfo/org.contrastbench.ContrastBench.metainfo.xml
  expect_file "$desktop"
  expect_file "$metainfo"
  expect_file "$share/mime/packages/contrast-bench.xml"
  desktop-file-validate "$desktop" || fail "desktop-file-validate rejects $desktop"
  appstreamcli validate --no-net "$metainfo" >"$work/appstream.txt" 2>&1 || { cat "$work/appstream.txt" >&2; fail "appstreamcli rejects $metainfo"; }
  # The newest release in the metadata is the program's version.
  release=$(grep -o '<release version="[^"]*"' "$metainfo" | head -1 | cut -d'"' -f2)
  [ "contrast-bench-cli $release" = "$version" ] || fail "the metainfo's newest release is $release, the program says '$version'"
  for size in 16 22 24 32 48 64 128 256 512; do
    png=$share/icons/hicolor/${size}x${size}/apps/contrast-bench.png
    expect_file "$png"
    head -c 24 "$png" | od -An -tx1 | tr -d ' \n' | grep -q "^89504e470d0a1a0a" || fail "$png is not a PNG file"
    # The PNG header's width and height (bytes 17-24) are the folder's size.
    [ "$(od -An -tu1 -j16 -N8 "$png" | tr -s ' ' | sed 's/^ //')" = "0 0 $((size / 256)) $((size % 256)) 0 0 $((size / 256)) $((size % 256))" ] \
      || fail "$png is not ${size}x${size}"
    expect_file "$share/icons/hicolor/${size}x${size}/mimetypes/application-x-contrast-bench-study.png"
  done
  expect_file "$share/icons/hicolor/scalable/apps/contrast-bench.svg"

  # The window runs from the prefix and finds the demos installed beside it.
  export HOME=$work/home XDG_CONFIG_HOME=$work/config XDG_DATA_HOME=$work/data XDG_RUNTIME_DIR=$work/run
  mkdir -p "$HOME" "$XDG_RUNTIME_DIR" && chmod 700 "$XDG_RUNTIME_DIR"
  window=$prefix/bin/contrast-bench
  "$window" --version >/dev/null || fail "$window --version failed"
  "$window" --screenshot "$work/irrigation.png" --demo irrigation --size 800x600 || fail "the window did not open the irrigation demo"
  expect_file "$work/irrigation.png"
  if [ "$extra" = 1 ]; then
    cp "$share/contrast-bench/demos/roast.json" "$share/contrast-bench/demos/zzstagedcheck.json"
    "$window" --help | grep -q "zzstagedcheck" || fail "the window's --demo does not list a demo installed in $share/contrast-bench/demos"
    "$window" --screenshot "$work/extra.png" --demo zzstagedcheck --size 800x600 || fail "the window did not open a demo installed beside it"
    expect_file "$work/extra.png"
  fi
fi
echo "check-installed: $prefix is complete ($version)"
