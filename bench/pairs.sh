#!/bin/sh
# Benchmark of the exploratory pairs: 100 levels (4,950 comparisons, Tukey-Kramer and
# Games-Howell) and each of 99 levels against a control (Dunnett), 20 rows per level.
# usage: sh bench/pairs.sh [path/to/avow]
set -eu
AVOW=${1:-build/avow}
dir=${AVOW_BENCH_DIR:-/tmp/avow-bench}
mkdir -p "$dir"
/usr/bin/python3 - "$dir" <<'PY'
import random, sys
d = sys.argv[1]
r = random.Random(100)
with open(d + "/pairs.csv", "w") as f:
    f.write("lot,y\n")
    for i in range(100):
        for _ in range(20):
            f.write("l%d,%.3f\n" % (i, 10 + 0.01 * i + r.gauss(0, 1)))
levels = " ".join("l%d" % i for i in range(100))
for name, extra in (("pairs", "explore pairs"), ("pairs-separate", "variances separate\nexplore pairs"),
                    ("versus", "explore versus l0")):
    with open("%s/%s.avow" % (d, name), "w") as f:
        f.write('study "pairs benchmark"\nresponse y\nfactor lot { %s }\ndata "pairs.csv"\n%s\n' % (levels, extra))
PY
for name in pairs pairs-separate versus; do
    "$AVOW" run "$dir/$name.avow" --format json >/dev/null   # warm up
    best=
    for i in 1 2 3; do
        t=$( { /usr/bin/time -f "%e" "$AVOW" run "$dir/$name.avow" --format json >/dev/null; } 2>&1 )
        if [ -z "$best" ] || awk "BEGIN { exit !($t < $best) }"; then best=$t; fi
    done
    echo "$name: best of 3 = $best s"
done
