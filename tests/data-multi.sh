#!/bin/sh
# `avow run` on studies with several factors or a block, against small test inputs in
# tests/data-multi/: the errors that only such studies have (an empty cell, a label of
# the second factor or of the block that is no level, a single block, a design that
# cannot estimate a term), with standard error and exit status equal to NAME.expected,
# and the row accounting of runs that must succeed. UPDATE=1 rewrites the expected
# files (read them before committing).
set -u
AVOW=${AVOW:-build/avow}
D=tests/data-multi
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT

err() { # err NAME EXIT STUDY DATA
    "$AVOW" run "$3" --data "$4" >"$tmp/out" 2>"$tmp/err"
    rc=$?
    echo "exit: $rc" >>"$tmp/err"
    [ "${UPDATE:-0}" = 1 ] && cp "$tmp/err" "$D/$1.expected"
    if [ "$rc" -eq "$2" ] && cmp -s "$tmp/err" "$D/$1.expected" && [ ! -s "$tmp/out" ]; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL $1 (exit $rc)"; diff "$D/$1.expected" "$tmp/err" | head; fi
}

ok() { # ok NAME EXPECTED-JSON-SUBSET STUDY DATA
    "$AVOW" run "$3" --data "$4" --format json >"$tmp/out" 2>"$tmp/err"
    rc=$?
    if [ "$rc" -eq 0 ] && /usr/bin/python3 - "$tmp/out" "$2" <<'PYEOF'
import json, sys
got = json.load(open(sys.argv[1]))
want = json.loads(sys.argv[2])
flat = dict(got["data"]); flat.update(got["model"])
flat["blocks"] = {b["block"]: b["n"] for b in got["blocks"]}
flat["cells"] = {c["cell"]: c["n"] for c in got["cells"]}
bad = {k: (flat.get(k), v) for k, v in want.items() if flat.get(k) != v}
if bad:
    print(bad); sys.exit(1)
PYEOF
    then pass=$((pass + 1)); else fail=$((fail + 1)); echo "FAIL $1 (exit $rc)"; cat "$tmp/err"; fi
}

err empty-cell        2 $D/two.avow $D/empty-cell.csv
err unknown-second    2 $D/two.avow $D/unknown-second.csv
err not-estimable     2 $D/additive.avow $D/level-missing.csv
err unknown-block     2 $D/blocked.avow $D/unknown-block.csv
err one-block         2 $D/blocks-from-data.avow $D/one-block.csv
err confounded        2 $D/blocks-from-data.avow $D/confounded.csv
ok additive-hole '{"rows": 7, "used": 7, "empty_cells": 1, "fit": "least-squares", "balanced": false}' $D/additive.avow $D/empty-cell.csv
ok blocks-declared '{"rows": 10, "used": 8, "missing": 2, "missing_level": 2, "empty_cells": 1, "blocks": {"mon": 3, "tue": 3, "wed": 2}, "df_within_cells": 0}' $D/blocked.avow $D/blocked-ok.csv
ok blocks-found '{"rows": 10, "used": 8, "blocks": {"mon": 3, "tue": 3, "wed": 2}, "cells": {"d0": 3, "d1": 3, "d2": 2}}' $D/blocks-from-data.avow $D/blocked-ok.csv
echo "several factors and blocks, data: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
