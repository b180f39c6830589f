#!/bin/sh
# The command line: usage errors exit 64 with a message on standard error and nothing on
# standard output; help and version exit 0 on standard output.
set -u
AVOW=${AVOW:-build/avow}
S=examples/cure/cure.avow
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
# misuse EXPECTED-STDERR-START ARGS...
misuse() {
    want=$1; shift
    "$AVOW" "$@" >"$tmp/out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -eq 64 ] && [ ! -s "$tmp/out" ] && head -n 1 "$tmp/err" | grep -qF -- "$want"; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL avow $*: exit $rc"; head -n 2 "$tmp/err"; fi
}
# fine WANT-IN-STDOUT ARGS...
fine() {
    want=$1; shift
    "$AVOW" "$@" >"$tmp/out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -eq 0 ] && [ ! -s "$tmp/err" ] && grep -qF -- "$want" "$tmp/out"; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL avow $*: exit $rc"; head -n 2 "$tmp/err"; fi
}
misuse "usage: avow COMMAND"
misuse "unknown command \`frobnicate\`" frobnicate
misuse "check: which study file?" check
misuse "check: unknown option \`--data\`" check "$S" --data x.csv
misuse "unknown format \`xml\`" check "$S" --format xml
misuse "--format needs a value" check "$S" --format
misuse "run: one study file at a time" run "$S" "$S"
misuse "--data needs a file name" run "$S" --data
misuse "-o needs a file name" run "$S" -o
misuse "fmt: unknown option \`--format\`" fmt "$S" --format json
misuse "help: no command \`bogus\`" help bogus
misuse "sheet: which study file?" sheet
misuse "sheet: unknown option \`--format\`" sheet "$S" --format json
misuse "--seed takes a whole number" sheet "$S" --seed x
fine "usage: avow COMMAND" --help
fine "avow 0.1.0" --version
fine "usage: avow check" help check
fine "usage: avow run" help run
fine "usage: avow fmt" help fmt
fine "usage: avow sheet" help sheet
fine "usage: avow sheet" sheet --help
fine "sheet STUDY [--seed N] [-o FILE]" --help
fine "usage: avow run" run --help
echo "command line: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
