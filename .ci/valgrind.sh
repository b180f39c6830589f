#!/bin/sh
# Memcheck over the end-to-end cases: every example and golden study, `avow check` and
# (where there are data) `avow run`, text, JSON, and HTML with the SVG pictures. Any
# memory error or any definitely or indirectly lost block fails (GMP, GSL and OpenSSL
# keep no state that should show as such a leak; .ci/valgrind.supp would name any
# exception and why).
# usage: sh .ci/valgrind.sh [BUILD_DIR]   (a plain build: valgrind does not mix with ASan)
set -u
B=${1:-build}
AVOW=$B/avow
VG="valgrind -q --error-exitcode=99 --leak-check=full --errors-for-leak-kinds=definite,indirect --suppressions=.ci/valgrind.supp"
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
pass=0; fail=0
# vg WANT-EXIT ARGS...: avow ARGS under memcheck; its exit status must be WANT-EXIT and
# memcheck must report nothing.
vg() {
    want=$1; shift
    $VG "$AVOW" "$@" >"$tmp/out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -eq "$want" ] && ! grep -q '^==[0-9]*==' "$tmp/err"; then pass=$((pass + 1))
    else
        fail=$((fail + 1)); echo "FAIL valgrind avow $* (exit $rc, want $want)"; head -40 "$tmp/err"
    fi
}
for s in examples/*/*.avow tests/golden/*/study.avow; do
    vg 0 check "$s"
    vg 0 check --format json "$s"
    dir=$(dirname "$s")
    if ls "$dir"/*.csv >/dev/null 2>&1; then
        vg 0 run "$s"
        vg 0 run --format json "$s"
        vg 0 run --format html --plots "$tmp/pictures" "$s"
    fi
done
# The error paths too: a study with errors, data that do not fit, a failed analysis.
vg 1 check tests/diag/dup-level.avow
vg 2 run tests/data-errors/study.avow --data tests/data-errors/ragged.csv
vg 2 run tests/data-errors/study.avow --data tests/data-errors/beyond-double.csv
vg 2 run tests/data-multi/blocks-from-data.avow --data tests/data-multi/confounded.csv
vg 0 sheet examples/seedlots/seedlots.avow -o "$tmp/sheet.csv"
vg 0 fmt examples/coating/coating.avow
echo "valgrind: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
