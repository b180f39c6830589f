#!/bin/sh
# Bash completion (editor-support/bash/avow): sourced into bash, the completion function
# is called with COMP_WORDS and COMP_CWORD set as bash sets them, and COMPREPLY must hold
# exactly the expected words. File names come from a scratch folder.
set -u
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
comp=$(pwd)/editor-support/bash/avow
w=$tmp/w
mkdir "$w" "$w/plans" "$w/plans.d"
: >"$w/cure.avow"; : >"$w/coating.avow"; : >"$w/cure.csv"; : >"$w/notes.txt"
: >"$w/plans/field.avow"
cat >"$tmp/run.bash" <<'EOS'
# complete WANT WORD... : the words of the command line, the last being completed;
# WANT lists the expected replies, sorted, separated by spaces.
complete_case() {
    local want=$1; shift
    COMP_WORDS=("$@"); COMP_CWORD=$(( $# - 1 )); COMPREPLY=()
    COMP_LINE="$*"; COMP_POINT=${#COMP_LINE}
    _avow avow "${COMP_WORDS[COMP_CWORD]}" "${COMP_WORDS[COMP_CWORD-1]-}"
    local got
    got=$(printf '%s\n' "${COMPREPLY[@]}" | LC_ALL=C sort | tr '\n' ' ')
    got=${got% }; [[ $got == " " ]] && got=""
    if [[ $got == "$want" ]]; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL avow ${*:2}|: want [$want], got [$got]"; fi
}
pass=0; fail=0
source "$COMP_FILE"
complete -p avow >/dev/null || { echo "FAIL no completion registered for avow"; fail=$((fail + 1)); }
# the command
complete_case "check fmt help run sheet" avow ""
complete_case "check" avow ch
complete_case "run" avow r
complete_case "--help --version" avow -
complete_case "--version" avow --v
# help COMMAND
complete_case "check fmt help run sheet" avow help ""
complete_case "sheet" avow help sh
complete_case "" avow help check ""
# the study: .avow files and folders, once
complete_case "coating.avow cure.avow plans plans.d" avow check ""
complete_case "cure.avow" avow run cu
complete_case "plans/field.avow" avow fmt plans/
complete_case "--format --help" avow check cure.avow ""
complete_case "--data --format --help --no-diagnostics --plots -o" avow run cure.avow ""
complete_case "--help --seed -o" avow sheet cure.avow ""
complete_case "--help -w" avow fmt cure.avow ""
# options of each command
complete_case "--format --help" avow check -
complete_case "--data --format --help --no-diagnostics --plots -o" avow run -
complete_case "--no-diagnostics" avow run cure.avow --no
complete_case "--help --seed -o" avow sheet -
complete_case "--help -w" avow fmt -
complete_case "" avow fmt cure.avow --d
complete_case "" avow check cure.avow -o
# option values
complete_case "json text" avow check cure.avow --format ""
complete_case "json" avow run --format j
complete_case "html json text" avow run cure.avow --format = ""
complete_case "html" avow run cure.avow --format h
complete_case "" avow check cure.avow --format h
complete_case "text" avow run cure.avow --format = t
complete_case "--format=json" avow check cure.avow --format=j
complete_case "coating.avow cure.avow cure.csv notes.txt plans plans.d" avow run cure.avow --data ""
complete_case "cure.avow cure.csv" avow run cure.avow --data cu
complete_case "notes.txt" avow run cure.avow -o n
complete_case "notes.txt" avow sheet cure.avow -o no
complete_case "" avow sheet cure.avow --seed ""
# after an option and its value, the study is still to come
complete_case "coating.avow cure.avow plans plans.d" avow run --format json ""
complete_case "coating.avow cure.avow plans plans.d" avow run --data cure.csv ""
complete_case "coating.avow cure.avow plans plans.d" avow run --format = json ""
complete_case "--data --format --help --no-diagnostics --plots -o" avow run --format = json cure.avow ""
# not a command
complete_case "" avow frobnicate ""
echo "completion: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
EOS
cd "$w" && COMP_FILE=$comp bash --norc --noprofile -u "$tmp/run.bash"
