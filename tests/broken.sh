#!/bin/sh
# Broken and hostile data files for `avow run`, beyond those of tests/data-errors.sh and
# tests/data-multi.sh (together the catalogue of docs in DEVELOPERS.md, "Hostile
# input"). The small files are in tests/broken/; the big ones (a 10 MB line, 100,000
# distinct labels) and those with NUL bytes are written here, into a temporary folder
# that messages show as TMP.
#
# Error cases (err) and cases that must succeed (ok) are checked as tests/lib/datacases.sh
# describes: standard error and exit status equal to tests/broken/NAME.expected byte for
# byte, valid UTF-8 without control characters (the data cannot drive a terminal through
# avow's messages), nothing on standard output, under 20 seconds, the same with
# `--format json -o FILE` and no file left; for a success, the row accounting of the JSON
# report and what the case is about in the text report.
# UPDATE=1 rewrites the expected files (read every one of them before committing).
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
D=tests/broken
S=tests/data-errors/study.avow      # one factor `line`: north, south, east (label E-3)
BS=$D/blocks.avow                   # factor `dose`, block `day` taken from the data
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT

. tests/lib/datacases.sh

# ---- The files must still hold the bytes the cases are about. ----
bytes() { od -An -tx1 "$1" | tr -d ' \n'; }
check file-empty "empty-file.csv is empty" test ! -s "$D/empty-file.csv"
check file-bom "bom-only.csv is a byte-order mark alone" [ "$(bytes "$D/bom-only.csv")" = efbbbf ]
check file-cr "cr-only.csv ends its lines with CR alone" sh -c '[ "$(tr -cd "\r" <"$1" | wc -c)" -eq 7 ] && [ "$(tr -cd "\n" <"$1" | wc -c)" -eq 0 ]' - "$D/cr-only.csv"
check file-utf8 "label-invalid-utf8.csv holds a byte 0xFF" sh -c 'bytes() { od -An -tx1 "$1" | tr -d " \n"; }; bytes "$1" | grep -q ff' - "$D/label-invalid-utf8.csv"
check file-esc "block-label-control.csv holds an escape (0x1B)" sh -c 'od -An -tx1 "$1" | grep -q 1b' - "$D/block-label-control.csv"
check file-c1 "block-label-c1.csv holds U+009B" sh -c 'od -An -tx1 "$1" | tr -d " \n" | grep -q c29b' - "$D/block-label-c1.csv"

# ---- The file's structure (exit 2) ----
err empty-file          2 "$S" --data "$D/empty-file.csv"
err bom-only            2 "$S" --data "$D/bom-only.csv"
# Not files: a device, and a study that names /dev/zero (which never ends: reading it
# would hang), and a named pipe (which cannot be read twice, by the digest and by the
# reader). Refused at once.
err dev-null            2 "$S" --data /dev/null
printf 'study "t"\nresponse y\nfactor f { a b }\ndata "/dev/zero"\n' >"$tmp/dev-zero.avow"
err dev-zero            2 "$tmp/dev-zero.avow"
mkfifo "$tmp/pipe.csv"
err fifo                2 "$S" --data "$tmp/pipe.csv"
err header-only         2 "$S" --data "$D/header-only.csv"
err comments-only       2 "$S" --data "$D/comments-only.csv"
err blank-header        2 "$S" --data "$D/blank-header.csv"
err header-invalid-utf8 2 "$S" --data "$D/header-invalid-utf8.csv"
err semicolon           2 "$S" --data "$D/semicolon.csv"
# A NUL byte in the header row (written here).
printf 'run,li\000ne,grams\nr01,north,10.2\n' >"$tmp/nul-in-header.csv"
err nul-in-header       2 "$S" --data "$tmp/nul-in-header.csv"

# ---- Labels (exit 2): shown with '?' for bytes that are not text ----
err label-case-space    2 "$S" --data "$D/label-case-space.csv"
err label-invalid-utf8  2 "$S" --data "$D/label-invalid-utf8.csv"
err label-control       2 "$S" --data "$D/label-control.csv"
# Block labels taken from the data are shown in the reports: they must be text.
err block-label-invalid-utf8 2 "$BS" --data "$D/block-label-invalid-utf8.csv"
err block-label-control      2 "$BS" --data "$D/block-label-control.csv"
err block-label-c1           2 "$BS" --data "$D/block-label-c1.csv"
err block-label-newline      2 "$BS" --data "$D/block-label-newline.csv"

# ---- Values (exit 2) ----
err exponent-overflow   2 "$S" --data "$D/exponent-overflow.csv"
err all-missing         2 "$S" --data "$D/all-missing.csv"

# ---- Big inputs, written here ----
# A 10 MB line: one label of 10 MiB (the message shows its first 40 characters).
$PY -c "
import sys
sys.stdout.write('run,line,grams\nr01,north,10.2\nr02,' + 'n' * (10 << 20) + ',11.0\nr03,south,12.4\n')" >"$tmp/long-label.csv"
err long-label          2 "$S" --data "$tmp/long-label.csv"
# A 10 MB header line: one column name of 10 MiB.
$PY -c "
import sys
sys.stdout.write('run,line,' + 'g' * (10 << 20) + '\nr01,north,10.2\n')" >"$tmp/long-header.csv"
err long-header         2 "$S" --data "$tmp/long-header.csv"
# 100,000 distinct labels of the factor: the first 20 errors, then their count.
$PY -c "
import sys
sys.stdout.write('run,line,grams\n' + ''.join('r%d,L%06d,1\n' % (i, i) for i in range(100000)))" >"$tmp/many-labels.csv"
err many-labels         2 "$S" --data "$tmp/many-labels.csv"
# 100,000 distinct block labels: at most 10,000 blocks.
$PY -c "
import sys
sys.stdout.write('dose,day,y\n' + ''.join('d%d,B%06d,1\n' % (i % 3, i) for i in range(100000)))" >"$tmp/many-blocks.csv"
err many-blocks         2 "$BS" --data "$tmp/many-blocks.csv"

# ---- Files that must be read (exit 0) ----
good='"n": {"north": 2, "south": 2, "east": 2}'
# Old Mac line ends (CR alone), and CR, LF and CRLF mixed with blank lines between.
ok cr-only '{"rows": 6, "used": 6, "blank_lines": 0, '"$good"', "mean": {"north": 10.6, "south": 12.65, "east": 9.95}}' "$S" --data "$D/cr-only.csv"
ok mixed-line-ends '{"rows": 6, "used": 6, "blank_lines": 2, '"$good"', "mean": {"north": 10.6, "south": 12.65, "east": 9.95}}' "$S" --data "$D/mixed-line-ends.csv"
# Leading +, a bare point at either end, -0, leading zeros, spaces around a label, and
# 1e-400 (below the smallest double, still exact): every value is taken exactly.
ok number-forms '{"rows": 7, "used": 7, "inexact_values": 0, "n": {"north": 2, "south": 2, "east": 3}, "mean": {"north": 10.6, "south": 2.75, "east": 4.166666666666667}}' "$S" --data "$D/number-forms.csv"
# Values beyond the exact range (more significant digits than 64 bits hold) fall back
# to the nearest binary64 number, and the report says so; no overflow, no error.
ok beyond-exact '{"rows": 6, "used": 6, "inexact_values": 1, "mean": {"north": 6.172839450617284e+23, "south": 12.65, "east": 9.95}}' "$S" --data "$D/beyond-exact.csv"
check beyond-exact-note "the report says that one value entered inexactly" \
    grep -q "^- 1 value had more digits than exact arithmetic holds" "$tmp/text"
ok long-digits '{"rows": 6, "used": 6, "inexact_values": 1, "mean": {"north": 5.766666666666667, "south": 12.65, "east": 9.95}}' "$S" --data "$D/long-digits.csv"
# Every value equal: no variation at all. The report says what F can and cannot say,
# shows no test, and prints no nan.
ok all-equal '{"rows": 6, "used": 6, '"$good"'}' "$S" --data "$D/all-equal.csv"
check all-equal-says "the report says that F is 0/0 and shows no difference" \
    sh -c 'tr -s " \n" "  " <"$1" | grep -q "Every observation has the same value: the means do not differ at all and there is no residual variation. F is 0/0, so no test is made: the data show no difference, but they cannot say how large a difference the run-to-run noise might hide."' - "$tmp/text"
check all-equal-no-nan "no nan or inf in the text report" sh -c '! grep -Eiw -- "-?(nan|inf)" "$1"' - "$tmp/text"
check all-equal-no-test "no contrast is declared different or not different" sh -c '! grep -Eq "no difference shown|differs from 0" "$1"' - "$tmp/text"
check all-equal-json "F and p are null in the JSON report" $PY -c '
import json, sys
r = json.load(open(sys.argv[1]))
rows = [a for a in r["anova"] if a["kind"] != "total"]
sys.exit(0 if all(a["f"] is None and a["p"] is None for a in rows) and all(c["p"] is None for c in r["contrasts"]) else 1)' "$tmp/json"

echo "broken inputs: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
