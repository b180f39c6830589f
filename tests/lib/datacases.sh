# datacases.sh: the case helpers shared by tests/data-errors.sh and tests/broken.sh,
# sourced after the caller sets AVOW (the binary), PY (python3), D (the folder of the
# NAME.expected files), tmp (an empty temporary folder) and pass=0 fail=0.
#
# err NAME EXIT STUDY [ARGS...]: `avow run STUDY ARGS` must fail with status EXIT;
#   standard error plus an "exit: N" line, with $tmp/ shown as TMP/, must equal
#   $D/NAME.expected byte for byte (UPDATE=1 rewrites it: read every one before
#   committing); standard error must be valid UTF-8 without control characters (the
#   data cannot drive a terminal through avow's messages); nothing may reach standard
#   output; the run must take less than 20 s; and the same run with
#   `--format json -o FILE` must print the same and leave neither FILE nor a temporary
#   file behind.
# ok NAME WANT STUDY [ARGS...]: the run must succeed with nothing on standard error;
#   WANT is a JSON object of expected data.* members of the JSON report, plus
#   "n": {level: count} and "mean": {level: mean}. The text report is left in $tmp/text.
# check NAME WHAT COMMAND...: a plain assertion (WHAT says what failed).
mkdir "$tmp/o"

# clean FILE: valid UTF-8, and no control character but line feeds.
clean() {
    $PY - "$1" <<'PYEOF'
import sys, unicodedata
b = open(sys.argv[1], "rb").read()
try:
    t = b.decode("utf-8")
except UnicodeDecodeError as e:
    print("  not valid UTF-8 at byte %d" % e.start); sys.exit(1)
bad = [c for c in t if c != "\n" and unicodedata.category(c) == "Cc"]
if bad:
    print("  control characters: %r" % bad[:5]); sys.exit(1)
PYEOF
}

err() {
    name=$1; want_rc=$2; shift 2
    exp=$D/$name.expected
    problems=""
    start=$(date +%s)
    timeout 60 "$AVOW" run "$@" >"$tmp/out" 2>"$tmp/raw"
    rc=$?
    took=$(($(date +%s) - start))
    clean "$tmp/raw" >"$tmp/why" || problems="$problems; standard error is not clean text: $(cat "$tmp/why")"
    echo "exit: $rc" >>"$tmp/raw"
    sed "s|$tmp/|TMP/|g" "$tmp/raw" >"$tmp/err"
    if [ "${UPDATE:-0}" = 1 ]; then cp "$tmp/err" "$exp"; fi
    [ "$rc" -eq "$want_rc" ] || problems="$problems; exit status $rc, not $want_rc"
    cmp -s "$tmp/err" "$exp" || problems="$problems; standard error differs from $exp"
    [ -s "$tmp/out" ] && problems="$problems; something was printed on standard output"
    [ "$took" -lt 20 ] || problems="$problems; took $took s"
    # Again as JSON into a file: the same errors, and no file at all afterwards.
    timeout 60 "$AVOW" run "$@" --format json -o "$tmp/o/report.json" >"$tmp/out" 2>"$tmp/raw"
    echo "exit: $?" >>"$tmp/raw"
    sed "s|$tmp/|TMP/|g" "$tmp/raw" >"$tmp/err2"
    cmp -s "$tmp/err2" "$tmp/err" || problems="$problems; with -o the errors or the status differ"
    [ -s "$tmp/out" ] && problems="$problems; with -o something was printed on standard output"
    [ -e "$tmp/o/report.json" ] && problems="$problems; -o wrote a report"
    left=$(ls -A "$tmp/o")
    [ -n "$left" ] && problems="$problems; files left in the -o folder: $left"
    rm -rf "$tmp/o"; mkdir "$tmp/o"
    if [ -z "$problems" ]; then pass=$((pass + 1))
    else
        fail=$((fail + 1)); echo "FAIL $name${problems#;}"
        cmp -s "$tmp/err" "$exp" || diff "$exp" "$tmp/err" | head -20
    fi
}

ok() {
    name=$1; want=$2; shift 2
    "$AVOW" run "$@" --format json >"$tmp/json" 2>"$tmp/err"
    rc=$?
    "$AVOW" run "$@" >"$tmp/text" 2>>"$tmp/err"
    if [ "$rc" -ne 0 ] || [ -s "$tmp/err" ]; then
        fail=$((fail + 1)); echo "FAIL $name: exit status $rc (want 0), standard error:"; cat "$tmp/err"
        return
    fi
    if $PY - "$tmp/json" "$want" <<'PYEOF'
import json, sys
report = json.load(open(sys.argv[1]))
want = json.loads(sys.argv[2])
bad = []
for key, value in want.items():
    if key == "n":
        got = {lv["level"]: lv["n"] for lv in report["levels"]}
    elif key == "mean":
        got = {lv["level"]: lv["mean"] for lv in report["levels"]}
    else:
        got = report["data"].get(key, "(absent)")
    if got != value:
        bad.append("data.%s is %s, want %s" % (key, json.dumps(got), json.dumps(value)))
for b in bad:
    print("  " + b)
sys.exit(1 if bad else 0)
PYEOF
    then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL $name: row accounting"
    fi
}

check() {
    name=$1; what=$2; shift 2
    if "$@"; then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL $name: $what"; fi
}
