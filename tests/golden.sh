#!/bin/sh
# Golden end-to-end reports: for every tests/golden/CASE/study.avow, `avow run` must
# produce exactly CASE/expected.txt and CASE/expected.json. The numbers in them are
# checked against their sources by tests/ref/*.py; this suite guards the layout and
# catches any unintended change. UPDATE=1 regenerates (review the diff first).
set -u
AVOW=${AVOW:-build/avow}
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
for study in tests/golden/*/study.avow; do
    dir=$(dirname "$study")
    for fmt in txt json; do
        f=text; [ "$fmt" = json ] && f=json
        "$AVOW" run "$study" --format "$f" >"$tmp/out" 2>"$tmp/err"
        rc=$?
        [ "${UPDATE:-0}" = 1 ] && cp "$tmp/out" "$dir/expected.$fmt"
        if [ "$rc" -eq 0 ] && cmp -s "$tmp/out" "$dir/expected.$fmt"; then pass=$((pass + 1))
        else fail=$((fail + 1)); echo "FAIL $dir ($fmt), exit $rc"; cat "$tmp/err"; diff "$dir/expected.$fmt" "$tmp/out" | head -20; fi
    done
done
echo "golden reports: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
