#!/bin/sh
# Golden diagnostics: every tests/diag/NAME.avow is checked with `avow check`; its
# standard error and exit status must equal tests/diag/NAME.expected byte for byte.
# UPDATE=1 rewrites the expected files (review the diff before committing).
set -u
AVOW=${AVOW:-build/avow}
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
for f in tests/diag/*.avow; do
    exp=${f%.avow}.expected
    "$AVOW" check "$f" >/dev/null 2>"$tmp/err"
    echo "exit: $?" >>"$tmp/err"
    if [ "${UPDATE:-0}" = 1 ]; then cp "$tmp/err" "$exp"; fi
    if cmp -s "$tmp/err" "$exp"; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL $f"; diff "$exp" "$tmp/err" | head -20; fi
done
echo "diagnostics: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
