#!/bin/sh
# Terminal manners. Standard error is made a terminal with script(1) (util-linux, in
# Debian's bsdutils): there, diagnostics are in colour, with exactly the characters of
# the plain form; NO_COLOR (any value, even empty) or TERM=dumb turns the colour off, and
# a file or a pipe never gets it. `avow run` on a data file larger than 50 MB shows its
# progress on a terminal (a percentage, rewritten in place at most four times a second,
# then erased) and nothing anywhere else; the report does not change.
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
A=$(cd "$(dirname "$AVOW")" && pwd)/$(basename "$AVOW")

# tty OUT COMMAND: run the shell command with a terminal as standard input, output and
# error; what the terminal received goes to OUT (CR LF as the terminal writes it).
tty() {
    script -qec "$2" /dev/null </dev/null >"$1" 2>&1
}
# expect NAME CMD...: the command must succeed (a Python check).
expect() {
    name=$1; shift
    if "$@" >"$tmp/why" 2>&1; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL $name"; head -c 2000 "$tmp/why"; echo; fi
}
# compare TERMINAL-OUTPUT PLAIN-FILE MODE: MODE colour: the terminal shows SGR colour
# sequences, and without them (and with CR LF as LF) exactly the plain bytes; MODE plain:
# the terminal shows exactly the plain bytes, no escape at all.
compare() {
    "$PY" - "$1" "$2" "$3" <<'EOF'
import re, sys
term = open(sys.argv[1], "rb").read().replace(b"\r\n", b"\n")
plain = open(sys.argv[2], "rb").read()
sgr = re.compile(rb"\x1b\[[0-9;]*m")
if sys.argv[3] == "colour":
    for label, code in ((b"error:", b"1;31"), (b"warning:", b"1;35"), (b"note:", b"1;36"), (b"hint:", b"36")):
        if label in plain and b"\x1b[" + code + b"m" + label + b"\x1b[0m" not in term:
            sys.exit("no colour on %r: %r" % (label, term[:400]))
    if b"^" in plain and b"\x1b[32m" not in term:
        sys.exit("the carets are not green: %r" % term[:400])
    stripped = sgr.sub(b"", term)
else:
    if b"\x1b" in term:
        sys.exit("an escape sequence: %r" % term[:400])
    stripped = term
if stripped != plain:
    sys.exit("the characters differ:\n%r\n%r" % (stripped[:600], plain[:600]))
EOF
}
# plain STDERR-FILE: no escape sequence and no carriage return in the file.
noescape() {
    "$PY" -c 'import sys; b = open(sys.argv[1], "rb").read(); sys.exit("escape or CR: %r" % b[:300] if b"\x1b" in b or b"\r" in b else 0)' "$1"
}

# --- colour -------------------------------------------------------------------------
# study diagnostics (error, note, warning, hint), a data error, a sheet that cannot be laid out
cat >"$tmp/noreps.avow" <<'EOF'
study "No replicates"
response y
factor f { a b }
plan {
    seed 1
}
EOF
i=0
while read -r cmd; do
    i=$((i + 1))
    eval "TERM=xterm \"\$A\" $cmd" >/dev/null 2>"$tmp/plain$i"
    [ -s "$tmp/plain$i" ] || { fail=$((fail + 1)); echo "FAIL no diagnostics from: avow $cmd"; continue; }
    tty "$tmp/tty$i" "TERM=xterm \"$A\" $cmd >/dev/null"
    expect "colour on a terminal: avow $cmd" compare "$tmp/tty$i" "$tmp/plain$i" colour
    tty "$tmp/nc$i" "NO_COLOR=1 TERM=xterm \"$A\" $cmd >/dev/null"
    expect "NO_COLOR=1 turns the colour off: avow $cmd" compare "$tmp/nc$i" "$tmp/plain$i" plain
    tty "$tmp/ne$i" "NO_COLOR= TERM=xterm \"$A\" $cmd >/dev/null"
    expect "NO_COLOR set empty turns the colour off: avow $cmd" compare "$tmp/ne$i" "$tmp/plain$i" plain
    tty "$tmp/dumb$i" "TERM=dumb \"$A\" $cmd >/dev/null"
    expect "TERM=dumb turns the colour off: avow $cmd" compare "$tmp/dumb$i" "$tmp/plain$i" plain
    # standard output is the terminal, standard error a file or a pipe: no colour
    tty "$tmp/x" "TERM=xterm \"$A\" $cmd 2>\"$tmp/file$i\" >/dev/null"
    expect "no colour in a file: avow $cmd" cmp "$tmp/file$i" "$tmp/plain$i"
    tty "$tmp/x" "TERM=xterm \"$A\" $cmd 2>&1 >/dev/null | cat >\"$tmp/pipe$i\""
    expect "no colour in a pipe: avow $cmd" cmp "$tmp/pipe$i" "$tmp/plain$i"
done <<EOF
check tests/diag/at-clash.avow
check tests/diag/desc-next-line.avow
check tests/diag/unknown-level.avow
run tests/data-errors/study.avow --data tests/data-errors/unknown-level.csv
sheet $tmp/noreps.avow
EOF

# --- progress -------------------------------------------------------------------------
cat >"$tmp/big.avow" <<'EOF'
study "Progress probe"
response y
factor g { a b }
data "big.csv" {
    g from "g"
    y from "y"
}
EOF
# 600,000 rows of 98 bytes: 58.8 MB, above the 50 MB from which progress is shown
awk 'BEGIN { pad = sprintf("%85s", ""); gsub(/ /, "x", pad); print "g,y,note"
             for (i = 0; i < 600000; i++) printf "%s,%d.%d,%s\n", (i % 2 ? "a" : "b"), i % 97, i % 10, pad }' >"$tmp/big.csv"
size=$(wc -c <"$tmp/big.csv")
[ "$size" -gt 50000000 ] || { fail=$((fail + 1)); echo "FAIL the generated data file has only $size bytes"; }
"$A" run "$tmp/big.avow" -o "$tmp/report-plain.txt" 2>"$tmp/progress-err"
expect "no progress when standard error is not a terminal" test ! -s "$tmp/progress-err"
start=$(date +%s.%N)
tty "$tmp/progress" "\"$A\" run \"$tmp/big.avow\" -o \"$tmp/report-tty.txt\""
end=$(date +%s.%N)
expect "the report is the same with and without a terminal" cmp "$tmp/report-plain.txt" "$tmp/report-tty.txt"
expect "progress on a terminal: percentages rewritten in place, at most four a second, then erased" \
    "$PY" - "$tmp/progress" "$start" "$end" <<'EOF'
import re, sys
out = open(sys.argv[1], "rb").read()
m = re.fullmatch(rb"((?:\ravow: reading the data file, \d{1,3}%)+)\r( +)\r", out)
if not m:
    sys.exit("not a progress line, then its erasure: %r" % out[:300])
shown = re.findall(rb"\ravow: reading the data file, (\d+)%", m.group(1))
pcts = [int(p) for p in shown]
if pcts != sorted(pcts) or pcts[-1] > 100 or len(set(pcts)) != len(pcts):
    sys.exit("percentages not increasing: %r" % pcts)
width = len(b"avow: reading the data file, %d%%" % pcts[-1])
if len(m.group(2)) != width:
    sys.exit("erased %d columns, showed %d" % (len(m.group(2)), width))
elapsed = float(sys.argv[3]) - float(sys.argv[2])
if len(pcts) > 4 * elapsed + 2:
    sys.exit("%d updates in %.2f s" % (len(pcts), elapsed))
EOF
tty "$tmp/x" "\"$A\" run \"$tmp/big.avow\" --no-diagnostics -o \"$tmp/report-file.txt\" 2>\"$tmp/progress-file\""
expect "no progress in a file, even with a terminal on standard output" test ! -s "$tmp/progress-file"
tty "$tmp/small" "\"$A\" run examples/cure/cure.avow -o \"$tmp/report-small.txt\""
expect "no progress for a small data file" test ! -s "$tmp/small"
expect "no escape in the report files" noescape "$tmp/report-tty.txt"

echo "terminal: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
