#!/bin/sh
# Hostile study files, generated here: each must end in a clean error (exit 1) with the
# expected first diagnostic, quickly, never a crash, hang or leak (leaks and memory
# errors are caught when this runs under `make sanitize`).
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
pass=0; fail=0
# expect NAME EXIT FIRST-LINE-OF-STDERR (with FILE standing for the path)
expect() {
    name=$1; want_rc=$2; want=$3
    f="$tmp/$name.avow"
    timeout 20 "$AVOW" check "$f" >/dev/null 2>"$tmp/err"
    rc=$?
    got=$(head -n 1 "$tmp/err")
    want=$(printf '%s' "$want" | sed "s|FILE|$f|")
    if [ "$rc" -eq "$want_rc" ] && [ "$got" = "$want" ]; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL $name: exit $rc (want $want_rc)"; echo "  got:  $got"; echo "  want: $want"; fi
}
head='study "t"\nresponse y\nfactor f { a b }\n'

$PY -c "import sys; sys.stdout.write('$head' + 'contrast x = ' + '('*10000 + 'a' + ')'*10000 + ' - b\n')" > "$tmp/parens.avow"
expect parens 1 "FILE:4:78: error: parentheses nest more than 64 deep"

$PY -c "import sys; sys.stdout.write('$head' + 'contrast x = ' + '- '*10000 + 'a - b\n')" > "$tmp/minus.avow"
expect minus 1 "FILE:4:2004: error: the expression nests too deeply"

$PY -c "import sys; sys.stdout.write('$head' + 'contrast x = ' + 'a + '*20000 + 'b\n')" > "$tmp/longexpr.avow"
expect longexpr 1 "FILE:4:20008: error: a statement of more than 10000 tokens"

$PY -c "import sys; sys.stdout.write('$head' + 'contrast ' + 'x'*(1<<20) + ' = a - b\n')" > "$tmp/bigident.avow"
expect bigident 1 "FILE:4:10: error: a name of 1048576 bytes; names are limited to 255 bytes"

$PY -c "import sys; sys.stdout.write('study \"' + 'x'*(1<<20) + '\"\nresponse y\nfactor f { a }\n')" > "$tmp/bigstring.avow"
expect bigstring 1 "FILE:3:8: error: factor \`f\` has 1 level; a comparison needs at least two"

$PY -c "import sys; sys.stdout.write('study \"t\"\nresponse y\nfactor f {' + ' '.join('l%d' % i for i in range(1001)) + '}\n')" > "$tmp/manylevels.avow"
expect manylevels 1 "FILE:3:8: error: factor \`f\` has 1001 levels; at most 1000 are supported"

$PY -c "import sys; sys.stdout.write('study \"t\"\nresponse y\nfactor f { a b }\nblock day {' + ' '.join('d%d' % i for i in range(1001)) + '}\n')" > "$tmp/manyblocklevels.avow"
expect manyblocklevels 1 "FILE:4:7: error: block \`day\` has 1001 levels; at most 1000 are supported"

$PY -c "import sys; sys.stdout.write('$head' + ''.join('contrast c%d = a - b\n' % i for i in range(1001)))" > "$tmp/manycontrasts.avow"
expect manycontrasts 1 "FILE:4:1: error: 1001 contrasts; at most 1000 are supported"

$PY -c "import sys; sys.stdout.write('study \"t\"\nresponse y\n' + ''.join('factor f%d { a%d b%d }\n' % (i, i, i) for i in range(9)))" > "$tmp/ninefactors.avow"
expect ninefactors 1 "FILE:11:1: error: a study may cross at most 8 treatment factors"

$PY -c "import sys; sys.stdout.write('study \"t\"\nresponse y\nfactor f {' + ' '.join('a%d' % i for i in range(100)) + '}\nfactor g {' + ' '.join('b%d' % i for i in range(41)) + '}\n')" > "$tmp/manycells.avow"
expect manycells 1 "FILE:4:1: error: the factors cross into more than 4096 treatment cells"

# Names: a bare name of exactly 255 bytes is fine; quoted names and strings have no limit
# of their own (the file's size bounds them).
$PY -c "import sys; sys.stdout.write('$head' + 'contrast ' + 'x'*255 + ' = a - b\n')" > "$tmp/ident255.avow"
expect ident255 0 ""
$PY -c "import sys; sys.stdout.write('study \"t\"\nresponse y\nfactor f { \"' + 'x'*(1<<20) + '\" b }\n')" > "$tmp/bigquotedname.avow"
expect bigquotedname 0 ""

# 64 KiB of pseudo-random bytes from a fixed linear congruential generator.
$PY -c "
import sys
x, out = 20261201, bytearray()
for _ in range(65536):
    x = (x * 6364136223846793005 + 1442695040888963407) % (1 << 64)
    out.append(x >> 56)
sys.stdout.buffer.write(bytes(out))" > "$tmp/binary.avow"
expect binary 1 "FILE:1:1: error: invalid UTF-8 byte 0xE0"

printf '\177ELF\002\001\001\000' > "$tmp/elf.avow"
expect elf 1 "FILE:1:1: error: unexpected control byte 0x7F"

# The size limit is on bytes: 16 MiB exactly is read, one byte more is not.
$PY -c "import sys; s = '$head' + 'contrast x = a - b\n'; sys.stdout.write(s + '#' * ((16<<20) - len(s) - 1) + '\n')" > "$tmp/exactlimit.avow"
expect exactlimit 0 ""
$PY -c "import sys; s = '$head' + 'contrast x = a - b\n'; sys.stdout.write(s + '#' * ((16<<20) - len(s)) + '\n')" > "$tmp/onebytemore.avow"
expect onebytemore 1 "avow: cannot read FILE: larger than the 16 MiB a study file may have"

$PY -c "import sys; sys.stdout.write('# ' + 'x'*(17<<20) + '\n')" > "$tmp/toolarge.avow"
expect toolarge 1 "avow: cannot read FILE: larger than the 16 MiB a study file may have"

: > "$tmp/empty.avow"
expect empty 1 "FILE:1:1: error: the file has no \`study\` statement"

printf 'study "t"\nresponse y\nfactor f { a b }\ncontrast x = a - b\r\n\r\n' > "$tmp/crlf.avow"
expect crlf 0 ""

expect_missing() {
    timeout 20 "$AVOW" check "$tmp/no-such-file.avow" >/dev/null 2>"$tmp/err"; rc=$?
    if [ "$rc" -eq 1 ] && grep -q "cannot read" "$tmp/err"; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL missing file"; fi
}
expect_missing

echo "hostile inputs: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
