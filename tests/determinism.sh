#!/bin/sh
# The report of `avow run` is a pure function of the study and data files:
#   1. the same run twice gives the same bytes (text and JSON);
#   2. the locale changes nothing: LC_ALL=C, C.UTF-8 and a comma-decimal locale
#      (de_DE.UTF-8, compiled here with localedef into a temporary LOCPATH) give the
#      same bytes; if no comma-decimal locale can be had, this is said, and counted as
#      a failure, and C against C.UTF-8 is still compared; nor does the time zone (TZ
#      unset, UTC, two zones far from it, and a zone that does not exist); the plan
#      review and the run sheet too;
#   3. -o FILE writes the bytes of standard output, replaces an existing file by a
#      rename (a hard link to the old file keeps the old bytes), leaves no temporary
#      file behind, and leaves an existing file alone when the run fails, whatever
#      stage fails (the study, the data file, the data, the analysis);
#   3b. avow opens neither the study nor the data for writing, and creates, renames or
#      removes nothing but its own temporary file beside -o FILE (traced with strace;
#      the inputs' bytes and change times are compared in any case);
#   4. --data FILE analyses FILE, and both reports name it (text, and JSON data.path);
#   5. the text report holds the study file verbatim, every line numbered, and the
#      standing caution that a significant difference is no evidence of safety.
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL $1: $2"; }
# same NAME FILE1 FILE2: the two files hold the same bytes (and are not empty).
same() {
    if [ -s "$2" ] && cmp -s "$2" "$3"; then ok
    else bad "$1" "$(basename "$2") and $(basename "$3") differ"; diff "$2" "$3" | head -10; fi
}
# run OUT ARGS...: avow run ARGS with standard output to OUT; must exit 0 with no errors.
run() {
    out=$1; shift
    "$AVOW" run "$@" >"$out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -ne 0 ] || [ -s "$tmp/err" ]; then bad "avow run $*" "exit status $rc"; cat "$tmp/err"; fi
}

STUDIES="examples/cure/cure.avow tests/data-errors/study.avow examples/coating/coating.avow examples/seedlots/seedlots.avow"

# ---- 1. Twice the same. ----
i=0
for s in $STUDIES; do
    i=$((i + 1))
    for f in text json html; do
        run "$tmp/$i.$f.1" "$s" --format "$f"
        run "$tmp/$i.$f.2" "$s" --format "$f"
        same "repeat $s $f" "$tmp/$i.$f.1" "$tmp/$i.$f.2"
    done
done

# ---- 2. Locales. ----
comma=""; locpath=""
mkdir "$tmp/locale"
comma_works() { # comma_works LOCPATH-or-empty NAME: does printf write 0,5 there?
    [ "$(env ${1:+LOCPATH="$1"} LC_ALL="$2" /usr/bin/printf '%.1f' 0.5 2>/dev/null)" = "0,5" ]
}
if comma_works "" de_DE.UTF-8; then
    comma="de_DE.UTF-8"; locpath=""
else
    localedef -i de_DE -f UTF-8 "$tmp/locale/de_DE.UTF-8" >/dev/null 2>&1
    if ! comma_works "$tmp/locale" de_DE.UTF-8 && [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
        # The locale sources come with the `locales` package.
        echo "note: installing the Debian package locales to compile de_DE.UTF-8"
        DEBIAN_FRONTEND=noninteractive timeout 600 apt-get install -y -q locales >/dev/null 2>&1
        localedef -i de_DE -f UTF-8 "$tmp/locale/de_DE.UTF-8" >/dev/null 2>&1
    fi
    if comma_works "$tmp/locale" de_DE.UTF-8; then comma="de_DE.UTF-8"; locpath="$tmp/locale"; fi
fi
if [ -z "$comma" ]; then
    echo "NOTE: no comma-decimal locale could be found or compiled (localedef -i de_DE -f UTF-8);"
    echo "      comparing only LC_ALL=C with LC_ALL=C.UTF-8"
    bad "comma locale" "not available, so the comma-decimal comparison did not run"
fi
echo "locales compared: C, C.UTF-8${comma:+ and $comma}${locpath:+ (compiled into a temporary LOCPATH)}"
i=0
for s in $STUDIES; do
    i=$((i + 1))
    for f in text json html; do
        LC_ALL=C run "$tmp/$i.$f.C" "$s" --format "$f"
        LC_ALL=C.UTF-8 run "$tmp/$i.$f.CU" "$s" --format "$f"
        same "LC_ALL=C vs C.UTF-8, $s $f" "$tmp/$i.$f.C" "$tmp/$i.$f.CU"
        same "LC_ALL=C vs environment, $s $f" "$tmp/$i.$f.C" "$tmp/$i.$f.1"
        if [ -n "$comma" ]; then
            env ${locpath:+LOCPATH="$locpath"} LC_ALL="$comma" LANG="$comma" \
                "$AVOW" run "$s" --format "$f" >"$tmp/$i.$f.de" 2>"$tmp/err" || { bad "$comma run" "failed"; cat "$tmp/err"; }
            same "LC_ALL=C vs $comma, $s $f" "$tmp/$i.$f.C" "$tmp/$i.$f.de"
        fi
    done
done

# Time zones: TZ unset, UTC, far east and west of it, and one that does not exist.
i=0
for s in $STUDIES; do
    i=$((i + 1))
    for f in text json html; do
        for tz in UTC Pacific/Kiritimati America/Adak Nowhere/Atlantis; do
            TZ=$tz run "$tmp/$i.$f.tz" "$s" --format "$f"
            same "TZ unset vs TZ=$tz, $s $f" "$tmp/$i.$f.1" "$tmp/$i.$f.tz"
        done
    done
done
# The plan review and the run sheet under the same changes of locale and time zone.
for s in $STUDIES; do
    "$AVOW" check "$s" >"$tmp/check.1" 2>/dev/null
    "$AVOW" sheet "$s" >"$tmp/sheet.1" 2>/dev/null || : >"$tmp/sheet.1"
    for env in "LC_ALL=C" "LC_ALL=C.UTF-8" "TZ=Pacific/Kiritimati" ${comma:+"LC_ALL=$comma"}; do
        env ${locpath:+LOCPATH="$locpath"} "$env" "$AVOW" check "$s" >"$tmp/check.2" 2>/dev/null
        same "avow check, $env, $s" "$tmp/check.1" "$tmp/check.2"
        if [ -s "$tmp/sheet.1" ]; then
            env ${locpath:+LOCPATH="$locpath"} "$env" "$AVOW" sheet "$s" >"$tmp/sheet.2" 2>/dev/null
            same "avow sheet, $env, $s" "$tmp/sheet.1" "$tmp/sheet.2"
        fi
    done
done

# ---- 3. -o FILE. ----
S=examples/cure/cure.avow
mkdir "$tmp/o"
for f in text json; do
    "$AVOW" run "$S" --format "$f" -o "$tmp/o/report.$f" >"$tmp/stdout" 2>"$tmp/err"
    rc=$?
    [ "$rc" -eq 0 ] && [ ! -s "$tmp/stdout" ] && [ ! -s "$tmp/err" ] && ok || bad "-o $f" "exit $rc or output on stdout/stderr"
    same "-o equals standard output ($f)" "$tmp/1.$f.1" "$tmp/o/report.$f"
done
# Replace an existing file that has a second name: the new report arrives by rename.
printf 'old report\n' >"$tmp/o/report.text"
ln "$tmp/o/report.text" "$tmp/o/old-link"
inode_before=$(stat -c %i "$tmp/o/report.text")
run "$tmp/stdout" "$S" -o "$tmp/o/report.text"
same "-o replaces an existing file" "$tmp/1.text.1" "$tmp/o/report.text"
[ "$(cat "$tmp/o/old-link")" = "old report" ] && ok || bad "-o atomic" "the old file was rewritten in place, not replaced"
[ "$(stat -c %i "$tmp/o/report.text")" != "$inode_before" ] && ok || bad "-o atomic" "same inode after replacing"
[ "$(stat -c %h "$tmp/o/report.text")" = 1 ] && ok || bad "-o atomic" "the new report shares the old file's links"
listing=$(cd "$tmp/o" && ls -A | tr '\n' ' ')
[ "$listing" = "old-link report.json report.text " ] && ok || bad "-o leaves no temporary file" "the folder holds: $listing"
# A failing run (its data file is not there) leaves the existing file as it was.
sed 's|^data "cure.csv"|data "absent.csv"|' "$S" >"$tmp/absent.avow"
grep -q '^data "absent.csv"' "$tmp/absent.avow" || bad "setup" "absent.avow not written"
cp "$tmp/o/report.text" "$tmp/before"
"$AVOW" run "$tmp/absent.avow" -o "$tmp/o/report.text" >/dev/null 2>&1
rc=$?
[ "$rc" -eq 2 ] && ok || bad "-o on error" "exit status $rc, want 2"
same "-o on error leaves the old file" "$tmp/before" "$tmp/o/report.text"
# Whatever stage fails, the existing file keeps its bytes and no temporary file is left.
listing_before=$(cd "$tmp/o" && ls -A | tr '\n' ' ')
printf 'study "t"\nresponse y\nfactor f { a b }\ncontrast x = a - qq\n' >"$tmp/bad-study.avow"
fail_stage() { # fail_stage NAME WANT-EXIT ARGS...: avow run ARGS -o report.text must fail
    name=$1; want=$2; shift 2
    "$AVOW" run "$@" -o "$tmp/o/report.text" >/dev/null 2>&1
    rc=$?
    [ "$rc" -eq "$want" ] && ok || bad "-o when $name fails" "exit status $rc, want $want"
    same "-o when $name fails: the old file keeps its bytes" "$tmp/before" "$tmp/o/report.text"
    listing=$(cd "$tmp/o" && ls -A | tr '\n' ' ')
    [ "$listing" = "$listing_before" ] && ok || bad "-o when $name fails" "the folder holds: $listing"
}
fail_stage "the study" 1 "$tmp/bad-study.avow" --data examples/cure/cure.csv
fail_stage "the data file" 2 "$tmp/absent.avow"
fail_stage "the data" 2 tests/data-errors/study.avow --data tests/data-errors/ragged.csv
fail_stage "the analysis" 2 tests/data-errors/study.avow --data tests/data-errors/beyond-double.csv

# Writing fails (the target is a folder): an error, and no temporary file is left.
mkdir "$tmp/o/folder"
"$AVOW" run "$S" -o "$tmp/o/folder" >"$tmp/stdout" 2>"$tmp/err"
rc=$?
[ "$rc" -ne 0 ] && grep -q "cannot write $tmp/o/folder" "$tmp/err" && ok || bad "-o onto a folder" "exit $rc: $(cat "$tmp/err")"
listing=$(cd "$tmp/o" && ls -A | tr '\n' ' ')
[ "$listing" = "folder old-link report.json report.text " ] && ok || bad "-o failure leaves no temporary file" "the folder holds: $listing"

# ---- 3b. The inputs are only read. ----
mkdir "$tmp/ro"
cp examples/cure/cure.avow examples/cure/cure.csv "$tmp/ro/"
stamp() { for f in "$tmp/ro/cure.avow" "$tmp/ro/cure.csv"; do sha256sum <"$f"; stat -c '%Y %Z %s %a' "$f"; done; }
sleep 1   # (change times have one-second resolution on some file systems)
stamp >"$tmp/stamp.before"
if command -v strace >/dev/null 2>&1; then
    only_reads() { # only_reads OUT: the traced command ($tmp/trace) changed nothing but OUT
        $PY - "$tmp/trace" "$1" <<'PYEOF'
import re, sys
out = sys.argv[2]
bad = []
for line in open(sys.argv[1]):
    m = re.match(r'\s*\d+\s+(\w+)\((.*)\)\s+=\s+(-?\d+)', line)
    if not m or int(m.group(3)) < 0:
        continue
    call, args = m.group(1), m.group(2)
    paths = re.findall(r'"((?:[^"\\]|\\.)*)"', args)
    mine = lambda p: out and p.startswith(out + ".tmp-")
    if call in ("open", "openat", "openat2", "creat"):
        if call == "creat" or re.search(r'O_WRONLY|O_RDWR|O_CREAT|O_TRUNC|O_APPEND', args):
            if not all(mine(p) for p in paths):
                bad.append(line.strip())
    elif call in ("rename", "renameat", "renameat2"):
        if not (len(paths) == 2 and mine(paths[0]) and paths[1] == out):
            bad.append(line.strip())
    elif call in ("unlink", "unlinkat"):
        if not all(mine(p) for p in paths):
            bad.append(line.strip())
    elif call in ("truncate", "chmod", "fchmodat", "chown", "fchownat", "lchown", "link", "linkat",
                  "symlink", "symlinkat", "mkdir", "mkdirat", "rmdir", "mknod", "mknodat",
                  "utime", "utimes", "utimensat", "futimesat", "setxattr", "lsetxattr", "removexattr"):
        bad.append(line.strip())
for b in bad:
    print("  changed something: " + b)
sys.exit(1 if bad else 0)
PYEOF
    }
    traced() { # traced NAME OUT ARGS...: avow ARGS under strace; checks what it changed
        name=$1; out=$2; shift 2
        strace -f -qq -e trace=%file,%desc -o "$tmp/trace" "$AVOW" "$@" >/dev/null 2>&1
        only_reads "$out" && ok || bad "inputs only read: $name" "see above"
    }
    traced "check" "" check "$tmp/ro/cure.avow"
    traced "check --format json" "" check --format json "$tmp/ro/cure.avow"
    traced "run" "" run "$tmp/ro/cure.avow"
    traced "run --format json --data" "" run "$tmp/ro/cure.avow" --format json --data "$tmp/ro/cure.csv"
    traced "run -o" "$tmp/o/traced.txt" run "$tmp/ro/cure.avow" -o "$tmp/o/traced.txt"
    traced "run -o, failing" "$tmp/o/traced.txt" run "$tmp/ro/cure.avow" --data tests/data-errors/ragged.csv -o "$tmp/o/traced.txt"
    traced "sheet -o" "$tmp/o/sheet.csv" sheet "$tmp/ro/cure.avow" -o "$tmp/o/sheet.csv"
    traced "fmt" "" fmt "$tmp/ro/cure.avow"
    # The check itself must see a write: `fmt -w` of a file that is not canonical.
    printf 'study "t" response y factor f { a b }\n' >"$tmp/o/messy.avow"
    strace -f -qq -e trace=%file,%desc -o "$tmp/trace" "$AVOW" fmt -w "$tmp/o/messy.avow" >/dev/null 2>&1
    only_reads "" >/dev/null && bad "inputs only read" "the trace check did not see fmt -w write its file" || ok
else
    echo "NOTE: strace is not installed; only the inputs' bytes and change times are compared"
fi
stamp >"$tmp/stamp.after"
same "the inputs' bytes, times and modes after every command" "$tmp/stamp.before" "$tmp/stamp.after"

# ---- 4. --data FILE. ----
other="$tmp/other data.csv"   # a space in the name on purpose
# The cure data without the rows of C01 to C05 and with C30 changed.
sed -e '/^C0[1-5],/d' -e 's/^C30,oven100,24.39$/C30,oven100,25.01/' examples/cure/cure.csv >"$other"
grep -q '^C30,oven100,25.01$' "$other" || bad "setup" "the other data file was not made"
run "$tmp/data.text" "$S" --data "$other"
run "$tmp/data.json" "$S" --data "$other" --format json
grep -q "^data file  *$other (given with --data)\$" "$tmp/data.text" && ok || bad "--data text" "the report does not name $other"
digest=$(sha256sum "$other" | cut -d ' ' -f 1)
grep -q "^  sha256  *$digest " "$tmp/data.text" && ok || bad "--data text" "the digest of $other is not shown"
$PY - "$tmp/data.json" "$other" "$digest" <<'PYEOF' && ok || bad "--data json" "data.* do not describe the other file"
import json, sys
d = json.load(open(sys.argv[1]))["data"]
want = {"path": sys.argv[2], "sha256": sys.argv[3], "from_option": True, "rows": 25, "used": 24}
bad = {k: d.get(k) for k in want if d.get(k) != want[k]}
if bad:
    print("  got", bad, "want", want)
sys.exit(1 if bad else 0)
PYEOF

# ---- 5. The study echo and the caution. ----
for s in $STUDIES; do
    n=$(echo "$STUDIES" | tr ' ' '\n' | grep -n -x "$s" | cut -d: -f1)
    $PY - "$tmp/$n.text.1" "$s" <<'PYEOF' && ok || bad "study echo $s" "the study is not echoed verbatim"
import sys
report = open(sys.argv[1], encoding="utf-8").read().split("\n")
study = open(sys.argv[2], encoding="utf-8").read()
lines = study.split("\n")
if lines and lines[-1] == "":
    lines.pop()
start = report.index("Study file as read") + 2
want = ["%5d  %s" % (i + 1, t) for i, t in enumerate(lines)]
got = report[start:start + len(want)]
if report[start - 1] != "-" * len("Study file as read") or got != want or report[start + len(want)] != "":
    for i, (g, w) in enumerate(zip(got + [""] * len(want), want)):
        if g != w:
            print("  line %d: got %r, want %r" % (i + 1, g, w))
            break
    sys.exit(1)
PYEOF
    $PY - "$tmp/$n.text.1" <<'PYEOF' && ok || bad "caution $s" "the safety caution is missing"
import sys
words = " ".join(open(sys.argv[1], encoding="utf-8").read().split())
caution = ("A statistically significant difference is not evidence that a product, process or "
           "treatment is safe. Where people can be hurt, decisions follow the applicable "
           "regulations, local codes and licensed review.")
sys.exit(0 if caution in words else 1)
PYEOF
done

echo "determinism: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
