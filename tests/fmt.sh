#!/bin/sh
# `avow fmt` round trip on every example and every test study file that parses:
#   1. formatting is idempotent: fmt(fmt(x)) == fmt(x);
#   2. the formatted file checks to the same plan (avow.plan/1 JSON equal, apart from
#      the file path, the line:column of diagnostics and warnings about layout);
#   3. every comment survives, in order;
#   4. tests/fmt/NAME.avow formats to exactly tests/fmt/NAME.expected.
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
pass=0; fail=0
bad() { fail=$((fail + 1)); echo "FAIL $1: $2"; }
for f in examples/*/*.avow tests/fmt/*.avow tests/diag/*.avow; do
    "$AVOW" fmt "$f" >"$tmp/a.avow" 2>/dev/null || continue   # syntax errors: nothing to format
    "$AVOW" fmt "$tmp/a.avow" >"$tmp/b.avow" 2>"$tmp/err" || { bad "$f" "formatted file does not parse"; cat "$tmp/err"; continue; }
    cmp -s "$tmp/a.avow" "$tmp/b.avow" || { bad "$f" "not idempotent"; diff "$tmp/a.avow" "$tmp/b.avow" | head; continue; }
    "$AVOW" check --format json "$f" >"$tmp/p1.json" 2>/dev/null
    "$AVOW" check --format json "$tmp/a.avow" >"$tmp/p2.json" 2>/dev/null
    $PY - "$tmp/p1.json" "$tmp/p2.json" "$f" "$tmp/a.avow" <<'PYEOF' || { bad "$f" "plan or comments differ"; continue; }
import json, re, sys
def plan(path):
    d = json.load(open(path))
    d.get("study", {}).pop("path", None)
    # Errors must match; warnings may differ where one is about layout that the
    # formatter fixes (a description written on the line after its level).
    d["diagnostics"] = [x for x in d["diagnostics"] if x["severity"] == "error"]
    for x in d["diagnostics"]:
        x.pop("line"); x.pop("column")
    return d
def comments(path):
    text = open(path, encoding="utf-8").read()
    text = re.sub(r'"(?:[^"\\\n]|\\.)*"', '""', text)      # strings may hold '#'
    return [m.group(0).rstrip() for m in re.finditer(r'#[^\n]*', text)]
p1, p2 = plan(sys.argv[1]), plan(sys.argv[2])
if p1 != p2:
    print("plans differ"); sys.exit(1)
if comments(sys.argv[3]) != comments(sys.argv[4]):
    print("comments differ"); sys.exit(1)
PYEOF
    pass=$((pass + 1))
done
for f in tests/fmt/*.avow; do
    exp=${f%.avow}.expected
    "$AVOW" fmt "$f" | cmp -s - "$exp" && pass=$((pass + 1)) || { bad "$f" "differs from $exp"; "$AVOW" fmt "$f" | diff "$exp" - | head; }
done
# -w rewrites in place and leaves a canonical file untouched.
cp tests/fmt/messy.avow "$tmp/w.avow"
"$AVOW" fmt -w "$tmp/w.avow" && cmp -s "$tmp/w.avow" tests/fmt/messy.expected && pass=$((pass + 1)) || bad "-w" "rewrite differs"
touch -d '2000-01-01' "$tmp/w.avow"
"$AVOW" fmt -w "$tmp/w.avow" && [ "$(stat -c %Y "$tmp/w.avow")" = "$(date -d '2000-01-01' +%s)" ] && pass=$((pass + 1)) || bad "-w" "canonical file was rewritten"
echo "formatting: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
