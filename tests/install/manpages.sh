#!/usr/bin/env bash
# Every option that the programs' --help lists is on the man page, in the section of its command;
# and a page with one option taken out fails this check (so a hand-edited page cannot drift).
#   manpages.sh CONTRAST_BENCH_CLI CLI_PAGE [CONTRAST_BENCH GUI_PAGE]
set -euo pipefail
cli=$1 cli_page=$2 gui=${3:-} gui_page=${4:-}
export QT_QPA_PLATFORM=offscreen ASAN_OPTIONS=detect_leaks=0

# The option names of a help text: the first column of its entries that start with '-'.
options_in_help() {
  grep -E '^  -' | sed -E 's/^  //; s/ {2,}.*$//; s/ <[^>]*>$//' | tr ',' '\n' | sed -E 's/^ +//' | grep -E '^-'
}
# The roff of one section of a page: from the line HEADING to the next .SS or .SH.
section() {
  awk -v h="$2" '$0 == h { on = 1; next } on && /^\.(SS|SH) / { on = 0 } on' "$1"
}
# check PAGE HEADING HELP_TEXT: prints each option of HELP_TEXT that the section lacks.
check() {
  local body missing=0
  body=$(section "$1" "$2")
  [ -n "$body" ] || { echo "$1: no section '$2'"; return 1; }
  while read -r opt; do
    roff=${opt//-/\\-}
    if ! grep -qF -- "\\fB$roff\\fR" <<<"$body"; then
      echo "$1: '$2' lacks $opt"
      missing=1
    fi
  done < <(options_in_help <<<"$3")
  return $missing
}
check_all() { # CLI_PAGE [GUI_PAGE]
  local bad=0
  check "$1" ".SH OPTIONS" "$("$cli" --help)" || bad=1
  for command in $("$cli" --help | awk '/^Commands:/ { on = 1; next } on && /^$/ { exit } on { print $1 }'); do
    check "$1" ".SS $command" "$("$cli" "$command" --help)" || bad=1
  done
  if [ -n "${2:-}" ]; then
    check "$2" ".SH OPTIONS" "$("$gui" --help)" || bad=1
  fi
  return $bad
}

count=$("$cli" --help | awk '/^Commands:/ { on = 1; next } on && /^$/ { exit } on' | wc -l)
[ "$count" -ge 5 ] || { echo "contrast-bench-cli --help lists $count commands; expected at least 5"; exit 1; }
check_all "$cli_page" "$gui_page" || exit 1
echo "every option of every command is on the man pages"

# A hand-made drift: the page without the --scheme entry of 'export' must fail the check.
drifted=$(mktemp)
trap 'rm -f "$drifted"' EXIT
awk '/^\.SS export$/ { on = 1 } /^\.SS / && !/export/ { on = 0 }
     on && /^\\fB\\-\\-scheme\\fR/ { getline; skip = 1; next } { print }' "$cli_page" >"$drifted"
! cmp -s "$cli_page" "$drifted" || { echo "could not take --scheme out of the export section"; exit 1; }
if check_all "$drifted" >/dev/null; then
  echo "a page without 'export --scheme' passed the check"; exit 1
fi
echo "a page with an option taken out fails the check"
