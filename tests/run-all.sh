#!/bin/sh
# Runs every test of avow and ends with one line: "N passed, N failed".
# usage: tests/run-all.sh BUILD_DIR
set -u
B=${1:-build}
pass=0; fail=0; failed=""
record() { # record NAME STATUS
    if [ "$2" -eq 0 ]; then pass=$((pass + 1)); else fail=$((fail + 1)); failed="$failed $1"; fi
}
for t in "$B"/tests/test_*; do
    [ -x "$t" ] || continue
    echo "== unit: $(basename "$t")"
    "$t"; record "$(basename "$t")" $?
done
for s in tests/*.sh; do
    case "$s" in tests/run-all.sh) continue ;; esac
    echo "== $(basename "$s")"
    AVOW="$B/avow" sh "$s"; record "$(basename "$s")" $?
done
for s in tests/ref/*.py; do
    [ -f "$s" ] || continue
    echo "== reference: $(basename "$s")"
    AVOW="$B/avow" AVOW_PROBES="$B/tests/tools" /usr/bin/python3 "$s"; record "$(basename "$s")" $?
done
echo
[ -n "$failed" ] && echo "failed suites:$failed"
echo "suites: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
