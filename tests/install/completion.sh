#!/usr/bin/env bash
# The generated bash completion of contrast-bench-cli, for a few prefixes.
#   completion.sh COMPLETION_FILE
set -uo pipefail
source "$1"
failures=0
# complete EXPECTED WORD... : the reply for the command line WORD... (the last word is being typed)
# is exactly EXPECTED (words separated by spaces).
complete_is() {
  local expected=$1; shift
  COMP_WORDS=("$@"); COMP_CWORD=$(($# - 1)); COMPREPLY=()
  _contrast_bench_cli
  if [ "${COMPREPLY[*]}" = "$expected" ]; then echo "ok: '$*' -> '$expected'"
  else echo "FAIL: '$*' -> '${COMPREPLY[*]}', expected '$expected'"; failures=$((failures + 1)); fi
}
# complete_has WORD... -- LINE...: the reply holds every WORD.
complete_has() {
  local want=()
  while [ "$1" != -- ]; do want+=("$1"); shift; done; shift
  COMP_WORDS=("$@"); COMP_CWORD=$(($# - 1)); COMPREPLY=()
  _contrast_bench_cli
  for w in "${want[@]}"; do
    if [[ " ${COMPREPLY[*]} " != *" $w "* ]]; then
      echo "FAIL: '$*' -> '${COMPREPLY[*]}' lacks '$w'"; failures=$((failures + 1)); return
    fi
  done
  echo "ok: '$*' -> has ${want[*]}"
}

complete_is analyze contrast-bench-cli an
complete_is power contrast-bench-cli po
complete_has analyze design export fit power --help --version -- contrast-bench-cli ''
complete_is --scheme contrast-bench-cli analyze --sch
complete_is "--format" contrast-bench-cli export --form
complete_is helmert contrast-bench-cli analyze --scheme hel
complete_is reverse-helmert contrast-bench-cli power --scheme rev
complete_is helmert contrast-bench-cli export --scheme = hel     # --scheme=hel
complete_has csv cpp r python julia matlab latex markdown -- contrast-bench-cli export --format ''
complete_is "latex" contrast-bench-cli export --format la
complete_is hypotheses contrast-bench-cli export --matrix hy
complete_is "bonferroni" contrast-bench-cli fit --adjust bon
complete_is "auto" contrast-bench-cli fit --header au
complete_is "" contrast-bench-cli analyze --levels a         # a value of the user's own
complete_is "" contrast-bench-cli nonsense --sch
# A file name after --file.
dir=$(mktemp -d)
touch "$dir/field-plan.cbstudy"
complete_is "$dir/field-plan.cbstudy" contrast-bench-cli analyze --file "$dir/field-p"
rm -rf "$dir"

[ "$failures" = 0 ] || { echo "$failures completion check(s) failed"; exit 1; }
