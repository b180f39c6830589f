#!/bin/sh
# Every example runs end to end: `avow check` exits 0 with a plan review, and `avow run`
# exits 0 with a report wherever the example ships its data. (The examples' data are
# invented demonstrations; nothing here checks their numbers.)
set -u
AVOW=${AVOW:-build/avow}
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
for s in examples/*/*.avow; do
    if "$AVOW" check "$s" >"$tmp/out" 2>"$tmp/err" && grep -q "plan review" "$tmp/out"; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL check $s"; cat "$tmp/err"; fi
    dir=$(dirname "$s")
    if ls "$dir"/*.csv >/dev/null 2>&1; then
        if "$AVOW" run "$s" >"$tmp/out" 2>"$tmp/err" && grep -q "Analysis of variance" "$tmp/out"; then pass=$((pass + 1))
        else fail=$((fail + 1)); echo "FAIL run $s"; cat "$tmp/err"; fi
    fi
done
echo "examples: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
