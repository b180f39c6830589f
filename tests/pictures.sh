#!/bin/sh
# The pictures of `avow run`:
#   1. tests/pictures/check_svg.py: every SVG of --plots parses as XML, has one mark per
#      mean, interval and observation, and every mark, tick and curve point maps back
#      to its value within half a pixel (values from the JSON report, the data files
#      and SciPy);
#   2. the text pictures in the report of each example with data are exactly
#      tests/pictures/expected/NAME.txt (UPDATE=1 regenerates; review the diff);
#   3. the SVG files and the HTML report are the same bytes on a rerun and in another
#      locale;
#   4. doc/cure-means.svg, the picture in the README, is the cure example's means.svg
#      as avow draws it now;
#   5. --plots makes missing folders, leaves out the pictures of the residuals under
#      --no-diagnostics and says why, and fails cleanly when the folder cannot be made.
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL $1: $2"; }

# ---- 1. The SVG files against their values. ----
if AVOW="$AVOW" $PY tests/pictures/check_svg.py; then ok; else bad "check_svg.py" "see above"; fi

# ---- 2. The text pictures of the examples. ----
for s in examples/*/*.avow; do
    dir=$(dirname "$s"); name=$(basename "$dir")
    ls "$dir"/*.csv >/dev/null 2>&1 || continue
    "$AVOW" run "$s" >"$tmp/report.txt" 2>"$tmp/err" || { bad "run $s" "$(cat "$tmp/err")"; continue; }
    # The sections whose heading begins "Picture:", up to the next heading.
    $PY - "$tmp/report.txt" >"$tmp/$name.txt" <<'PYEOF'
import sys
lines = open(sys.argv[1], encoding="utf-8").read().split("\n")
def heading(i):
    return i + 1 < len(lines) and lines[i] and set(lines[i + 1]) == {"-"} and len(lines[i + 1]) == len(lines[i])
keep = False
for i, l in enumerate(lines):
    if heading(i):
        keep = l.startswith("Picture:")
    if keep:
        print(l)
PYEOF
    want="tests/pictures/expected/$name.txt"
    [ "${UPDATE:-0}" = 1 ] && cp "$tmp/$name.txt" "$want"
    if [ -s "$tmp/$name.txt" ] && cmp -s "$tmp/$name.txt" "$want"; then ok
    else bad "text pictures of $name" "differ from $want"; diff "$want" "$tmp/$name.txt" | head -20; fi
done

# ---- 3. Same bytes on a rerun and in another locale. ----
S=examples/cure/cure.avow
"$AVOW" run "$S" --plots "$tmp/a" --format html -o "$tmp/a.html" 2>"$tmp/err" || bad "run --plots" "$(cat "$tmp/err")"
"$AVOW" run "$S" --plots "$tmp/b" --format html -o "$tmp/b.html" 2>"$tmp/err" || bad "run --plots" "$(cat "$tmp/err")"
LC_ALL=C.UTF-8 "$AVOW" run "$S" --plots "$tmp/c" --format html -o "$tmp/c.html" 2>"$tmp/err" || bad "run --plots" "$(cat "$tmp/err")"
# A comma-decimal locale, compiled into a temporary folder as tests/determinism.sh does
# (that suite says so when none can be had; here it is used when it can).
mkdir "$tmp/locale"
localedef -i de_DE -f UTF-8 "$tmp/locale/de_DE.UTF-8" >/dev/null 2>&1
if [ "$(LOCPATH="$tmp/locale" LC_ALL=de_DE.UTF-8 /usr/bin/printf '%.1f' 0.5 2>/dev/null)" = "0,5" ]; then
    LOCPATH="$tmp/locale" LC_ALL=de_DE.UTF-8 "$AVOW" run "$S" --plots "$tmp/d" --format html -o "$tmp/d.html" 2>"$tmp/err" \
        || bad "run --plots in de_DE.UTF-8" "$(cat "$tmp/err")"
    echo "locales compared: the environment's, C.UTF-8 and de_DE.UTF-8"
else
    cp -r "$tmp/c" "$tmp/d"; cp "$tmp/c.html" "$tmp/d.html"
    echo "locales compared: the environment's and C.UTF-8 (no comma-decimal locale here)"
fi
for f in means intervals residuals probability spread; do
    [ -s "$tmp/a/$f.svg" ] && cmp -s "$tmp/a/$f.svg" "$tmp/b/$f.svg" && cmp -s "$tmp/a/$f.svg" "$tmp/c/$f.svg" \
        && cmp -s "$tmp/a/$f.svg" "$tmp/d/$f.svg" && ok || bad "same bytes" "$f.svg differs between runs or locales"
done
[ -s "$tmp/a.html" ] && cmp -s "$tmp/a.html" "$tmp/b.html" && cmp -s "$tmp/a.html" "$tmp/c.html" \
    && cmp -s "$tmp/a.html" "$tmp/d.html" && ok || bad "same bytes" "the HTML report differs between runs or locales"

# ---- 4. The README's picture is current. ----
if cmp -s doc/cure-means.svg "$tmp/a/means.svg"; then ok
else bad "doc/cure-means.svg" "is not the picture avow draws now (make demo, then cp build/demo/means.svg doc/cure-means.svg)"; fi

# ---- 5. --plots folders and what is left out. ----
"$AVOW" run "$S" --plots "$tmp/deep/er/plots" >/dev/null 2>"$tmp/err"
rc=$?
[ "$rc" -eq 0 ] && [ -s "$tmp/deep/er/plots/means.svg" ] && [ ! -s "$tmp/err" ] && ok \
    || bad "--plots makes folders" "exit $rc, $(cat "$tmp/err")"
listing=$(cd "$tmp/deep/er/plots" && ls -A | tr '\n' ' ')
[ "$listing" = "intervals.svg means.svg probability.svg residuals.svg spread.svg " ] && ok \
    || bad "--plots leaves no temporary file" "the folder holds: $listing"
"$AVOW" run "$S" --no-diagnostics --plots "$tmp/nod" >"$tmp/out" 2>"$tmp/err"
rc=$?
listing=$(cd "$tmp/nod" && ls -A | tr '\n' ' ')
[ "$rc" -eq 0 ] && [ "$listing" = "intervals.svg means.svg " ] && ok \
    || bad "--no-diagnostics --plots" "exit $rc, the folder holds: $listing"
grep -q "^avow: note: residuals.svg, probability.svg and spread.svg not written: the pictures of the residuals need the checks of the assumptions (run without --no-diagnostics)$" "$tmp/err" && ok \
    || bad "--no-diagnostics --plots" "no note on standard error: $(cat "$tmp/err")"
grep -q "Analysis of variance" "$tmp/out" && ok || bad "--no-diagnostics --plots" "no report"
: >"$tmp/afile"
"$AVOW" run "$S" --plots "$tmp/afile/plots" >"$tmp/out" 2>"$tmp/err"
rc=$?
[ "$rc" -eq 1 ] && [ ! -s "$tmp/out" ] && grep -q "^avow: cannot make the folder $tmp/afile/plots" "$tmp/err" && ok \
    || bad "--plots under a file" "exit $rc: $(cat "$tmp/err")"
"$AVOW" run "$S" --plots >"$tmp/out" 2>"$tmp/err"
rc=$?
[ "$rc" -eq 64 ] && grep -q -- "--plots needs a folder name" "$tmp/err" && ok || bad "--plots without a folder" "exit $rc"
"$AVOW" check "$S" --format html >"$tmp/out" 2>"$tmp/err"
rc=$?
[ "$rc" -eq 64 ] && grep -q "unknown format \`html\`; the formats are text and json" "$tmp/err" && ok \
    || bad "check --format html" "exit $rc: $(cat "$tmp/err")"
"$AVOW" run "$S" --format xml >"$tmp/out" 2>"$tmp/err"
rc=$?
[ "$rc" -eq 64 ] && grep -q "the formats are text, json and html" "$tmp/err" && ok || bad "run --format xml" "exit $rc"

echo "pictures: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
