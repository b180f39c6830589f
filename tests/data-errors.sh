#!/bin/sh
# End-to-end tests of the data reader of `avow run`, on the small synthetic studies and
# data files of tests/data-errors/ (and a few files made here, in a temporary folder that
# messages show as TMP).
#
# Error cases (err) and cases that must succeed (ok) are checked as tests/lib/datacases.sh
# describes: the exact standard error and exit status in NAME.expected, clean text,
# nothing on standard output, the same with `--format json -o FILE` and no file left;
# for a success, the row accounting of the JSON report (data.rows, used, missing,
# missing_lines, blank_lines, the n of each level).
# UPDATE=1 rewrites the expected files (read every one of them before committing).
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
D=tests/data-errors
S=$D/study.avow
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT

. tests/lib/datacases.sh

# ---- The files must still hold the bytes the cases are about. ----
crlf_ok() { [ "$(tr -cd '\r' <"$D/crlf.csv" | wc -c)" -eq "$(wc -l <"$D/crlf.csv")" ]; }
bom_ok() { [ "$(head -c 3 "$D/bom.csv" | od -An -tx1 | tr -d ' \n')" = efbbbf ]; }
tabs_ok() { [ "$(tr -cd '\t' <"$1" | wc -c)" -eq $((2 * $(wc -l <"$1"))) ] && ! grep -q , "$1"; }
check crlf-file "crlf.csv has CRLF on every line" crlf_ok
check bom-file "bom.csv starts with a UTF-8 byte-order mark" bom_ok
check tsv-file "tab.tsv is tab-separated" tabs_ok "$D/tab.tsv"
check txt-file "tab-delimiter.txt is tab-separated" tabs_ok "$D/tab-delimiter.txt"
check absent-file "tests/data-errors/absent.csv must not exist" test ! -e "$D/absent.csv"

# ---- Errors: the data do not fit the study (exit 2). ----
err unknown-level        2 "$S" --data "$D/unknown-level.csv"
err label-is-description 2 "$D/labels.avow"
err non-numeric          2 "$S" --data "$D/non-numeric.csv"
err non-finite           2 "$S" --data "$D/non-finite.csv"
err ragged               2 "$S" --data "$D/ragged.csv"
err empty-level          2 "$S" --data "$D/empty-level.csv"
err no-residual          2 "$S" --data "$D/no-residual.csv"
err no-factor-column     2 "$S" --data "$D/no-factor-column.csv"
err no-response-column   2 "$S" --data "$D/no-response-column.csv"
err duplicate-column     2 "$S" --data "$D/duplicate-column.csv"
err unterminated-quote   2 "$S" --data "$D/unterminated-quote.csv"
err quote-in-field       2 "$S" --data "$D/quote-in-field.csv"
err text-after-quote     2 "$S" --data "$D/text-after-quote.csv"
err too-many-errors      2 "$S" --data "$D/too-many-errors.csv"
err missing-file         2 "$D/missing-file.avow"
err data-is-directory    2 "$S" --data "$D"
err no-data-statement    2 "$D/no-data.avow"
# A value beyond binary64: the means and sums of squares could not be shown.
err beyond-double        2 "$S" --data "$D/beyond-double.csv"

# A NUL byte in the third line (written here: a NUL cannot be typed into a file).
printf 'run,line,grams\nr01,north,10.2\nr02,north,11\0000\nr03,south,12.4\n' >"$tmp/nul-byte.csv"
err nul-byte             2 "$S" --data "$tmp/nul-byte.csv"

# sha256 locks, on a study written here that locks good.csv.
mkdir "$tmp/lock"
digest=$(sha256sum "$D/good.csv" | cut -d ' ' -f 1)
lock_study() { # lock_study DIGEST: the shared study with a sha256 item, in $tmp/lock
    sed "s|^data \"good.csv\" {|&\n    sha256 \"$1\"|" "$S" >"$tmp/lock/study.avow"
    grep -q "sha256 \"$1\"" "$tmp/lock/study.avow"
}
check lock-study "the lock was written into the study" lock_study "$digest"
sed 's/^r04,south,12.9$/r04,south,13.9/' "$D/good.csv" >"$tmp/lock/good.csv"
check lock-changed "the copy of good.csv was changed" sh -c '! cmp -s "$1" "$2"' - "$D/good.csv" "$tmp/lock/good.csv"
err lock-mismatch        2 "$tmp/lock/study.avow"

cp "$D/good.csv" "$tmp/lock/good.csv"
ok lock-match '{"locked": true, "from_option": false, "rows": 6, "used": 6, "n": {"north": 2, "south": 2, "east": 2}}' "$tmp/lock/study.avow"
"$AVOW" run "$tmp/lock/study.avow" >"$tmp/text" 2>&1
check lock-match-text "the text report says the lock matches" grep -q "^  sha256    $digest (matches the lock in the study)\$" "$tmp/text"
lock_study "$(printf '%s' "$digest" | tr a-f A-F)"
ok lock-match-uppercase '{"locked": true, "rows": 6, "used": 6}' "$tmp/lock/study.avow"

# ---- Files that must be read (exit 0), with their row accounting. ----
good='"n": {"north": 2, "south": 2, "east": 2}'
ok good '{"path": "good.csv", "rows": 6, "used": 6, "missing": 0, "missing_lines": [], "blank_lines": 0, '"$good"'}' "$S"
ok crlf '{"rows": 7, "used": 6, "missing": 1, "missing_lines": [5], "blank_lines": 0, '"$good"'}' "$S" --data "$D/crlf.csv"
ok bom '{"rows": 6, "used": 6, "missing": 0, "missing_lines": [], "blank_lines": 0, '"$good"'}' "$S" --data "$D/bom.csv"
ok tsv-by-extension '{"rows": 7, "used": 6, "missing": 1, "missing_lines": [8], "blank_lines": 0, '"$good"'}' "$S" --data "$D/tab.tsv"
ok tsv-by-delimiter '{"path": "tab-delimiter.txt", "rows": 6, "used": 6, "missing": 0, "missing_lines": [], "blank_lines": 0, '"$good"'}' "$D/tab-delimiter.avow"
# Quoted fields with commas, doubled quotes and line breaks: the record after a
# multi-line field starts on the right physical line (r04 is on line 6).
ok quoted '{"rows": 7, "used": 6, "missing": 1, "missing_lines": [6], "blank_lines": 0, '"$good"'}' "$S" --data "$D/quoted.csv"
# Empty lines and a line of spaces, inside and at the end.
ok blank-lines '{"rows": 7, "used": 6, "missing": 1, "missing_lines": [10], "blank_lines": 5, '"$good"'}' "$S" --data "$D/blank-lines.csv"
# "", "NA" (also with spaces around it) and "n/a" in the response and in the level column.
ok missing-tokens '{"rows": 12, "used": 6, "missing": 6, "missing_response": 4, "missing_level": 2, "missing_lines": [3, 5, 7, 8, 11, 13], "blank_lines": 0, '"$good"'}' "$S" --data "$D/missing.csv"
# No data statement: --data names the file, and the columns are the factor and response names.
ok no-data-statement-with-data '{"path": "'"$D"'/no-data.csv", "from_option": true, "rows": 6, "used": 6, "n": {"north": 2, "south": 2, "east": 2}}' "$D/no-data.avow" --data "$D/no-data.csv"

# The lock is for the study's own file: with --data it is not checked, and the report
# does not claim that it matched.
lock_study "$digest"
ok lock-other-file '{"locked": true, "lock_checked": false, "from_option": true, "rows": 7}' "$tmp/lock/study.avow" --data "$D/crlf.csv"
"$AVOW" run "$tmp/lock/study.avow" --data "$D/crlf.csv" >"$tmp/text" 2>&1
check lock-other-text "the text report says the lock was not checked" grep -q "(the study's lock is for its own data file; not checked)" "$tmp/text"
check lock-other-no-claim "the text report does not claim a match" sh -c '! grep -q "matches the lock" "$1"' - "$tmp/text"

# Every value equals its level's mean: no residual variation, so no contrast test;
# the finding says so instead of "no difference".
ok no-variation '{"rows": 6, "used": 6}' "$S" --data "$D/no-variation.csv"
"$AVOW" run "$S" --data "$D/no-variation.csv" >"$tmp/text" 2>&1
check no-variation-finding "the findings are 'not defined'" grep -q "not defined" "$tmp/text"
check no-variation-no-claim "no 'no difference shown' without a test" sh -c '! grep -q "no difference shown" "$1"' - "$tmp/text"
"$AVOW" run "$S" --data "$D/no-variation.csv" --format json >"$tmp/json" 2>&1
check no-variation-json "p and reject of the contrasts are null and false" $PY -c '
import json, sys
r = json.load(open(sys.argv[1]))
sys.exit(0 if all(c["p"] is None and c["reject"] is False for c in r["contrasts"]) else 1)' "$tmp/json"

# Large finite values are shown in scientific notation, not as long runs of digits.
"$AVOW" run "$S" --data "$D/large-values.csv" >"$tmp/text" 2>&1
check large-values "sums of squares in scientific notation" grep -Eq "^   total +5 +[0-9]\.[0-9]{6}e\+41\$" "$tmp/text"

echo "data errors: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
