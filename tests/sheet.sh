#!/bin/sh
# `avow sheet`: the randomized run sheet.
#   1. For examples/cure (one factor, replicates 6, a seed), examples/seedlots (a block of
#      six declared strips, replicates 1) and examples/coating (two crossed factors,
#      replicates 4): exit 0, nothing on standard error; the provenance line (version,
#      the study's SHA-256 as sha256sum computes it, the seed, the generator); the header
#      row; runs numbered 1..N; every cell exactly its planned number of times (within
#      each block, blocks in declared order, for seedlots). The planned counts are read
#      from the study files themselves (their `replicates` and levels).
#   2. Reproducibility: the same seed twice gives the same bytes; another seed another
#      order; --seed overrides the plan's seed; a seed beyond 32 bits is reduced modulo
#      2^32 and says so.
#   3. Errors: no replicates, a block whose levels come from the data, no seed, too many
#      runs, study errors, an unreadable study (exit 1, nothing on standard output, no
#      file from -o and no temporary left); command-line misuse (exit 64).
#   4. -o writes the bytes of standard output atomically and leaves no temporary behind.
#   5. Delimiters and quoting: tab for a .tsv name, the study's delimiter, labels with a
#      comma, a quote or a leading space quoted (RFC 4180); the run column renamed when
#      the study uses "run".
#   6. End to end: a sheet with its response column filled in (any numbers, by awk) is
#      read by `avow run` (through --data, and through a copy of the study whose data
#      statement names it): exit 0 and every run used; a bad label in a filled sheet is
#      reported at its physical line, the comment line counted.
set -u
AVOW=${AVOW:-build/avow}
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL $1: $2"; }
# expect NAME WANT GOT: two strings are equal.
expect() {
    if [ "$2" = "$3" ]; then ok
    else bad "$1" "got:"; printf '%s\n' "$3" | head -12; echo "  want:"; printf '%s\n' "$2" | head -12; fi
}
# sheet OUT ARGS...: avow sheet ARGS into OUT; must exit 0 with nothing on standard error.
sheet() {
    out=$1; shift
    "$AVOW" sheet "$@" >"$out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -ne 0 ] || [ -s "$tmp/err" ]; then bad "avow sheet $*" "exit status $rc"; cat "$tmp/err"; fi
}
# runs FILE: the data rows of a sheet (after the comment line and the header).
runs() { tail -n +3 "$1"; }
# numbered FILE: "yes" when the runs are numbered 1..N in order.
numbered() { runs "$1" | awk -F, '$1 != NR { bad = 1 } END { print (bad || NR == 0) ? "no" : "yes" }'; }
# counts FILE COLS: how often each combination of the comma-separated columns COLS
# (awk field numbers) appears, as sorted "COUNT value|value" lines.
counts() {
    runs "$1" | awk -F, -v cols="$2" '{ n = split(cols, c, ","); k = $c[1]; for (i = 2; i <= n; i++) k = k "|" $c[i]; t[k]++ }
        END { for (k in t) print t[k], k }' | LC_ALL=C sort
}
# every N VALUES...: the sorted "N value" lines for each value.
every() { n=$1; shift; for v in "$@"; do echo "$n $v"; done | LC_ALL=C sort; }
sha() { sha256sum "$1" | cut -d' ' -f1; }

CURE=examples/cure/cure.avow
SEED=examples/seedlots/seedlots.avow
COAT=examples/coating/coating.avow

# ---- 1. The three examples. ----
sheet "$tmp/cure" "$CURE"
expect "cure provenance" \
    "# avow 0.1.0 run sheet; study sha256 $(sha "$CURE"); seed 20261201; generator mt19937 (GSL gsl_rng_mt19937) seeded with 20261201; order: Fisher-Yates shuffle (gsl_ran_shuffle) of all runs; 30 runs, no blocks" \
    "$(head -n 1 "$tmp/cure")"
expect "cure header" "run,schedule,shear_mpa" "$(sed -n 2p "$tmp/cure")"
expect "cure numbered 1..30" "yes 30" "$(numbered "$tmp/cure") $(runs "$tmp/cure" | wc -l)"
# cure.avow: five levels (uvflash is read from its code UV-F), replicates 6
expect "cure: each level 6 times" "$(every 6 room oven60 oven80 oven100 UV-F)" "$(counts "$tmp/cure" 2)"
expect "cure: response empty" "" "$(runs "$tmp/cure" | awk -F, 'NF != 3 || $3 != "" { print }')"

sheet "$tmp/seed" "$SEED"
expect "seedlots provenance" \
    "# avow 0.1.0 run sheet; study sha256 $(sha "$SEED"); seed 4471; generator mt19937 (GSL gsl_rng_mt19937) seeded with 4471; order: Fisher-Yates shuffle (gsl_ran_shuffle) within each block; 24 runs in 6 blocks of 4 (block strip)" \
    "$(head -n 1 "$tmp/seed")"
expect "seedlots header" "run,treatment,strip,t_ha" "$(sed -n 2p "$tmp/seed")"
expect "seedlots numbered 1..24" "yes 24" "$(numbered "$tmp/seed") $(runs "$tmp/seed" | wc -l)"
# seedlots.avow: strips s1..s6 declared in that order, four dressings (two read from
# codes), replicates 1: every dressing once in every strip, strip k on runs 4k-3..4k
expect "seedlots: each dressing once per strip" \
    "$(for s in s1 s2 s3 s4 s5 s6; do for t in untreated fungicide BIO FUN+BIO; do echo "1 $t|$s"; done; done | LC_ALL=C sort)" \
    "$(counts "$tmp/seed" 2,3)"
expect "seedlots: strips in declared order, contiguous" "" \
    "$(runs "$tmp/seed" | awk -F, '$3 != "s" int(($1 - 1) / 4 + 1) { print }')"

sheet "$tmp/coat" "$COAT"
expect "coating header" "run,pretreatment,oven,pull_mpa" "$(sed -n 2p "$tmp/coat")"
expect "coating numbered 1..24" "yes 24" "$(numbered "$tmp/coat") $(runs "$tmp/coat" | wc -l)"
# coating.avow: prep {blast phosphate zirconium} crossed with cure {c180 c200}, replicates 4
expect "coating: each cell 4 times" \
    "$(every 4 'blast|c180' 'blast|c200' 'phosphate|c180' 'phosphate|c200' 'zirconium|c180' 'zirconium|c200')" \
    "$(counts "$tmp/coat" 2,3)"

# ---- 2. Reproducibility. ----
for s in "$CURE" "$SEED" "$COAT"; do
    sheet "$tmp/a" "$s"; sheet "$tmp/b" "$s"
    if [ -s "$tmp/a" ] && cmp -s "$tmp/a" "$tmp/b"; then ok; else bad "same seed twice: $s" "the bytes differ"; fi
    sheet "$tmp/c" "$s" --seed 12345
    runs "$tmp/c" >"$tmp/c.rows"
    if runs "$tmp/a" | cmp -s - "$tmp/c.rows"; then bad "another seed: $s" "the same order"; else ok; fi
done
# --seed overrides the plan's seed: the plan's own seed given with --seed is the same
# sheet, byte for byte; another --seed is recorded and changes the order
sheet "$tmp/p" "$CURE" --seed 20261201
if cmp -s "$tmp/p" "$tmp/cure"; then ok; else bad "--seed 20261201 (the plan's seed)" "differs from the plan's sheet"; fi
sheet "$tmp/p" "$CURE" --seed=7
case "$(head -n 1 "$tmp/p")" in *"; seed 7; generator mt19937 (GSL gsl_rng_mt19937) seeded with 7;"*) ok ;;
    *) bad "--seed=7" "the provenance line does not record seed 7"; head -n 1 "$tmp/p" ;; esac
runs "$tmp/cure" >"$tmp/cure.rows"
if runs "$tmp/p" | cmp -s - "$tmp/cure.rows"; then bad "--seed 7" "the plan's order"; else ok; fi
# a seed beyond 32 bits: reduced modulo 2^32, and the line says so
sheet "$tmp/s1" "$CURE" --seed 1
sheet "$tmp/s2" "$CURE" --seed 4294967297
runs "$tmp/s2" >"$tmp/s2.rows"
if runs "$tmp/s1" | cmp -s - "$tmp/s2.rows"; then ok; else bad "seed 2^32 + 1" "not the order of seed 1"; fi
case "$(head -n 1 "$tmp/s2")" in *"; seed 4294967297; generator mt19937 (GSL gsl_rng_mt19937) seeded with 1 (the seed modulo 2^32);"*) ok ;;
    *) bad "seed 2^32 + 1" "the reduction is not stated"; head -n 1 "$tmp/s2" ;; esac
sheet "$tmp/s3" "$CURE" --seed 18446744073709551615
case "$(head -n 1 "$tmp/s3")" in *"; seed 18446744073709551615; generator mt19937 (GSL gsl_rng_mt19937) seeded with 4294967295 (the seed modulo 2^32);"*) ok ;;
    *) bad "seed 2^64 - 1" "wrong provenance"; head -n 1 "$tmp/s3" ;; esac
# 0 (and any multiple of 2^32): GSL's mt19937 starts a seed of 0 from 4357; said so
sheet "$tmp/z0" "$CURE" --seed 0
sheet "$tmp/z1" "$CURE" --seed 4357
runs "$tmp/z1" >"$tmp/z1.rows"
if runs "$tmp/z0" | cmp -s - "$tmp/z1.rows"; then ok; else bad "seed 0" "not the order of 4357"; fi
case "$(head -n 1 "$tmp/z0")" in *"; seed 0; generator mt19937 (GSL gsl_rng_mt19937) seeded with 4357 (GSL replaces a seed of 0 by 4357);"*) ok ;;
    *) bad "seed 0" "wrong provenance"; head -n 1 "$tmp/z0" ;; esac

# ---- 3. Errors. ----
mkdir "$tmp/o"
# fails STATUS NAME WANT-IN-STDERR ARGS...: exit STATUS, WANT on standard error,
# nothing on standard output; with -o, no file and nothing left in the folder.
fails() {
    want_rc=$1; name=$2; want=$3; shift 3
    "$AVOW" sheet "$@" >"$tmp/out" 2>"$tmp/err"
    rc=$?
    problems=""
    [ "$rc" -eq "$want_rc" ] || problems="$problems; exit status $rc, not $want_rc"
    grep -qF -- "$want" "$tmp/err" || problems="$problems; standard error lacks: $want"
    [ -s "$tmp/out" ] && problems="$problems; something on standard output"
    if [ "$want_rc" -ne 64 ]; then
        "$AVOW" sheet "$@" -o "$tmp/o/sheet.csv" >/dev/null 2>&1
        left=$(ls -A "$tmp/o")
        [ -n "$left" ] && problems="$problems; -o left files: $left"
        rm -rf "$tmp/o"; mkdir "$tmp/o"
    fi
    if [ -z "$problems" ]; then ok; else bad "$name" "${problems#; }"; cat "$tmp/err"; fi
}
cat >"$tmp/norep.avow" <<'EOF'
study "no replicates"
response y
factor f { a b c }
plan {
    sigma 1
    seed 5
}
EOF
fails 1 "no replicates" "error: a run sheet needs the planned replicates" "$tmp/norep.avow"
grep -qF 'hint: add `replicates N` to the plan block' "$tmp/err" && ok || bad "no replicates" "no hint"
grep -qF "norep.avow:4:1: error:" "$tmp/err" && ok || bad "no replicates" "not at the plan block (4:1)"
cat >"$tmp/noplan.avow" <<'EOF'
study "no plan block"
response y
factor f { a b c }
EOF
fails 1 "no plan block" "error: a run sheet needs the planned replicates" "$tmp/noplan.avow" --seed 3
cat >"$tmp/datablock.avow" <<'EOF'
study "blocks from the data"
response y
factor f { a b c }
block day
plan {
    replicates 2
    seed 5
}
EOF
fails 1 "block from data" "the levels of the block \`day\` are taken from the data" "$tmp/datablock.avow"
grep -qF "hint: declare the block's levels to lay out a sheet" "$tmp/err" && ok || bad "block from data" "no hint"
cat >"$tmp/noseed.avow" <<'EOF'
study "no seed"
response y
factor f { a b c }
plan {
    replicates 2
}
EOF
fails 1 "no seed" "error: a run sheet must be reproducible" "$tmp/noseed.avow"
grep -qF 'hint: give --seed N or `seed N` in the plan block' "$tmp/err" && ok || bad "no seed" "no hint"
sheet "$tmp/given" "$tmp/noseed.avow" --seed 99
expect "no seed in the plan, --seed given" "yes 6" "$(numbered "$tmp/given") $(runs "$tmp/given" | wc -l)"
cat >"$tmp/big.avow" <<'EOF'
study "too many runs"
response y
factor f { a b }
plan {
    replicates 500001
    seed 5
}
EOF
fails 1 "too many runs" "error: the plan holds 1000002 runs; a run sheet lays out at most 1000000" "$tmp/big.avow"
cat >"$tmp/broken.avow" <<'EOF'
study "broken"
response y
factor f { a b c }
contrast d = a - bb
plan {
    replicates 2
    seed 5
}
EOF
fails 1 "study errors" "1 error, 0 warnings; no sheet was written" "$tmp/broken.avow"
grep -qF "error: unknown level \`bb\`" "$tmp/err" && ok || bad "study errors" "the checker's message is missing"
fails 1 "no such study" "avow: cannot read $tmp/none.avow" "$tmp/none.avow"
fails 64 "no study" "sheet: which study file?"
fails 64 "--seed without value" "--seed needs a value" "$CURE" --seed
fails 64 "--seed not a number" "--seed takes a whole number from 0 to 18446744073709551615, not \`12a\`" "$CURE" --seed 12a
fails 64 "--seed negative" "not \`-1\`" "$CURE" --seed -1
fails 64 "--seed beyond 64 bits" "not \`18446744073709551616\`" "$CURE" --seed 18446744073709551616
fails 64 "--seed empty" "not \`\`" "$CURE" --seed=
fails 64 "--format" "sheet: unknown option \`--format\`" "$CURE" --format json
fails 64 "--data" "sheet: unknown option \`--data\`" "$CURE" --data x.csv
fails 64 "two studies" "sheet: one study file at a time" "$CURE" "$SEED"
fails 64 "-o without a name" "-o needs a file name" "$CURE" -o

# ---- 4. -o. ----
mkdir "$tmp/w"
echo "old" >"$tmp/w/sheet.csv"
"$AVOW" sheet "$CURE" -o "$tmp/w/sheet.csv" >"$tmp/out" 2>"$tmp/err"
rc=$?
if [ "$rc" -eq 0 ] && [ ! -s "$tmp/out" ] && [ ! -s "$tmp/err" ] && cmp -s "$tmp/w/sheet.csv" "$tmp/cure"; then ok
else bad "-o" "exit $rc, or the file is not the standard output's bytes"; fi
expect "-o leaves no temporary" "sheet.csv" "$(ls -A "$tmp/w")"

# ---- 5. Delimiters, quoting, the run column. ----
sheet "$tmp/t.tsv" "$CURE"   # standard output: by the study's data file name (cure.csv)
expect "stdout: comma for cure.csv" "run,schedule,shear_mpa" "$(sed -n 2p "$tmp/t.tsv")"
"$AVOW" sheet "$CURE" -o "$tmp/w/t.tsv" 2>"$tmp/err" || bad "-o t.tsv" "failed"
expect "-o t.tsv: tabs" "$(printf 'run\tschedule\tshear_mpa')" "$(sed -n 2p "$tmp/w/t.tsv")"
runs "$tmp/w/t.tsv" | tr '\t' ',' >"$tmp/t.rows"
expect "-o t.tsv: the same runs" "$(runs "$tmp/cure")" "$(cat "$tmp/t.rows")"
cat >"$tmp/odd.avow" <<'EOF'
study "labels that need quotes"
response y "yield, dry" unit "g"
factor f {
    plain
    comma  code "a, b"
    quote  code "say \"hi\""
    pad    code " pad"
}
data "odd.tsv" {
    f from "run"
}
plan {
    replicates 3
    seed 11
}
EOF
sheet "$tmp/odd" "$tmp/odd.avow"
expect "odd: header, run column renamed, tab by data name" "$(printf 'run2\trun\ty')" "$(sed -n 2p "$tmp/odd")"
cat >"$tmp/odd2.avow" <<'EOF'
study "labels that need quotes"
response y "yield"
factor f {
    plain
    comma  code "a, b"
    quote  code "say \"hi\""
    pad    code " pad"
}
data "odd.csv"
plan {
    replicates 3
    seed 11
}
EOF
sheet "$tmp/odd2" "$tmp/odd2.avow"
expect "odd: quoted labels (RFC 4180)" "$(every 3 '"a, b"' '" pad"' '"say ""hi"""' plain)" \
    "$(runs "$tmp/odd2" | sed 's/^[0-9]*,//; s/,$//' | sort | uniq -c | awk '{ c = $1; sub(/^ *[0-9]+ /, ""); print c, $0 }' | LC_ALL=C sort)"
cat >"$tmp/semi.avow" <<'EOF'
study "a delimiter"
response y
factor f { a b }
data "d.tsv" {
    delimiter ";"
}
plan {
    replicates 2
    seed 11
}
EOF
"$AVOW" sheet "$tmp/semi.avow" -o "$tmp/w/semi.tsv" 2>"$tmp/err" || bad "delimiter ;" "failed"
expect "the study's delimiter wins" "run;f;y" "$(sed -n 2p "$tmp/w/semi.tsv")"

# ---- 6. End to end. ----
# fill FILE DELIM: the sheet with its (last, empty) response column filled with numbers.
fill() { awk -F"$2" 'NR <= 2 { print; next } { print $0 (20 + (NR * 37) % 11 / 10) }' "$1"; }
# used STUDY DATA N: avow run reads DATA for STUDY, exit 0, rows and used both N.
used() {
    "$AVOW" run "$1" --data "$2" --format json >"$tmp/json" 2>"$tmp/err"
    rc=$?
    got=$(grep -o '"rows": [0-9]*, "used": [0-9]*' "$tmp/json")
    if [ "$rc" -eq 0 ] && [ ! -s "$tmp/err" ] && [ "$got" = "\"rows\": $3, \"used\": $3" ]; then ok
    else bad "avow run $1 --data $2" "exit $rc, $got (want $3 rows used)"; cat "$tmp/err"; fi
}
fill "$tmp/cure" , >"$tmp/cure-filled.csv"
used "$CURE" "$tmp/cure-filled.csv" 30
fill "$tmp/seed" , >"$tmp/seed-filled.csv"
used "$SEED" "$tmp/seed-filled.csv" 24
fill "$tmp/coat" , >"$tmp/coat-filled.csv"
used "$COAT" "$tmp/coat-filled.csv" 24
fill "$tmp/w/t.tsv" "$(printf '\t')" >"$tmp/w/t-filled.tsv"
used "$CURE" "$tmp/w/t-filled.tsv" 30
fill "$tmp/odd2" , >"$tmp/odd-filled.csv"
used "$tmp/odd2.avow" "$tmp/odd-filled.csv" 12
grep -qF '{"factor": "f", "level": "pad", "n": 3' "$tmp/json" && ok || bad "odd labels" "level pad does not have its 3 runs"
# a copy of the study whose data statement names the filled sheet
mkdir "$tmp/study"
cp "$tmp/cure-filled.csv" "$tmp/study/filled.csv"
sed 's|^data "cure.csv"|data "filled.csv"|' "$CURE" >"$tmp/study/cure.avow"
grep -q '^data "filled.csv"' "$tmp/study/cure.avow" || bad "study copy" "the data statement was not rewritten"
"$AVOW" run "$tmp/study/cure.avow" --format json >"$tmp/json" 2>"$tmp/err"
rc=$?
got=$(grep -o '"rows": [0-9]*, "used": [0-9]*' "$tmp/json")
if [ "$rc" -eq 0 ] && [ ! -s "$tmp/err" ] && [ "$got" = '"rows": 30, "used": 30' ]; then ok
else bad "avow run on a study naming the filled sheet" "exit $rc, $got"; cat "$tmp/err"; fi
# a bad label on run 3: physical line 5 (the comment line, the header, runs 1 and 2)
awk -F, 'NR == 5 { $2 = "oven9" } { print }' OFS=, "$tmp/cure-filled.csv" >"$tmp/badlabel.csv"
"$AVOW" run "$CURE" --data "$tmp/badlabel.csv" >/dev/null 2>"$tmp/err"
rc=$?
if [ "$rc" -eq 2 ] && grep -qF "$tmp/badlabel.csv:5:2: error: \"oven9\" is not a level of \`cure\`" "$tmp/err"; then ok
else bad "bad label in a filled sheet" "exit $rc, not at line 5"; cat "$tmp/err"; fi
# a header whose first name begins with # is read as a comment: the hint says so
printf '#id,schedule,shear_mpa\n1,room,20.1\n' >"$tmp/hash.csv"
"$AVOW" run "$CURE" --data "$tmp/hash.csv" >/dev/null 2>"$tmp/err"
rc=$?
if [ "$rc" -eq 2 ] && grep -qF 'hint: line 1 begins with # and was skipped as a comment' "$tmp/err"; then ok
else bad "header beginning with #" "exit $rc, no hint"; cat "$tmp/err"; fi

echo "run sheet: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
