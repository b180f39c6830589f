#!/bin/sh
# The fuzz harnesses of tests/fuzz/ without libFuzzer: each harness, built with a plain
# main() (tests/fuzz/replay.c) in the normal build (and with the sanitizers under
# `make sanitize`), runs once on every regression input (tests/fuzz/regress-NAME: inputs
# that once crashed, leaked, hung or broke a promise, fixed since) and every seed
# (tests/fuzz/corpus-NAME). A harness that crashes or aborts fails the suite, which
# names the input. `make fuzz` is the real fuzzing (tests/fuzz/README.md).
set -u
AVOW=${AVOW:-build/avow}
B=$(dirname "$AVOW")
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
for h in study data run; do
    bin=$B/tests/fuzz/replay-$h
    if [ ! -x "$bin" ]; then fail=$((fail + 1)); echo "FAIL $h: no $bin (make check builds it)"; continue; fi
    want=$(($(ls tests/fuzz/regress-$h | wc -l) + $(ls tests/fuzz/corpus-$h | wc -l)))
    timeout 600 "$bin" tests/fuzz/regress-$h tests/fuzz/corpus-$h >"$tmp/out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -eq 0 ] && [ "$(cat "$tmp/out")" = "replayed $want inputs" ]; then pass=$((pass + 1))
    else
        fail=$((fail + 1))
        echo "FAIL $h: exit status $rc; $(cat "$tmp/out"), want $want inputs; the last lines:"
        tail -n 8 "$tmp/err"
    fi
done
echo "fuzz regression inputs: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
