#!/bin/sh
# bench/run.sh: the benchmark of `avow run` (`make bench`; not part of `make check`).
#
#   sh bench/run.sh PATH/TO/avow
#
# Generates (once, cached in $AVOW_BENCH_DIR, default /tmp/avow-bench) three data files
# of 100,000, 1,000,000 and 10,000,000 rows with their study files, then times on the
# 10,000,000-row file, with a warm page cache (each command runs once untimed, then the
# best of 3 timed runs is kept):
#   avow run STUDY --format json --no-diagnostics > /dev/null   (the analysis itself)
#   avow run STUDY --format json > /dev/null   (with the checks of the assumptions, which
#                                              keep every value: shown apart)
#   the Python baseline: pandas.read_csv + scipy.stats.f_oneway (bench/pipeline.py)
#   wc -l
# and avow alone on the two smaller files, to show how its memory grows with rows.
# Wall time and peak resident memory come from /usr/bin/time -f "%e %M" (%e is in
# hundredths of a second: short times, such as wc's, are coarse).
# Finally a sanity check (not timed): avow's F statistic against the pipeline's and the
# exact one. See bench/README.md.
set -eu

if [ $# -ne 1 ]; then
    echo "usage: sh bench/run.sh PATH/TO/avow" >&2
    exit 64
fi
AVOW=$1
case "$AVOW" in /*) ;; *) AVOW=$(pwd)/$AVOW ;; esac
[ -x "$AVOW" ] || { echo "bench: $AVOW is not an executable (run make first)" >&2; exit 1; }

HERE=$(cd "$(dirname "$0")" && pwd)
DIR=${AVOW_BENCH_DIR:-/tmp/avow-bench}
PY=/usr/bin/python3     # Debian's interpreter, where python3-pandas and python3-scipy live
CC=${CC:-cc}

# ---- what the benchmark needs ----------------------------------------------------

need_packages() {   # need_packages PKG...: install the missing ones as root, else stop
    missing=""
    for pkg in "$@"; do
        case "$(dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null)" in
            *"install ok installed"*) ;;
            *) missing="$missing $pkg" ;;
        esac
    done
    [ -z "$missing" ] && return 0
    if [ "$(id -u)" = 0 ]; then
        echo "bench: installing:$missing" >&2
        if DEBIAN_FRONTEND=noninteractive apt-get update -qq >&2 &&
           DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends $missing >&2; then
            return 0
        fi
        echo "bench: apt-get failed; install by hand:  apt-get install -y$missing" >&2
        exit 1
    fi
    echo "bench: missing packages:$missing" >&2
    echo "bench: install them with:  sudo apt-get install -y$missing" >&2
    echo "bench: then run make bench again." >&2
    exit 1
}
need_packages time python3-pandas python3-scipy
command -v "$CC" >/dev/null 2>&1 || need_packages gcc
if ! "$PY" -c 'import pandas, scipy.stats' 2>/dev/null; then
    echo "bench: $PY cannot import pandas and scipy.stats although the packages are installed" >&2
    exit 1
fi

mkdir -p "$DIR"
TMP=$(mktemp -d "${TMPDIR:-/tmp}/avow-bench-run.XXXXXX")
trap 'rm -rf "$TMP"' EXIT
trap 'exit 130' INT TERM

# ---- data (cached) ---------------------------------------------------------------

# The cache is valid while the generator is the same: a changed bench/gen.c clears it.
if ! cmp -s "$HERE/gen.c" "$DIR/gen.c" || [ ! -x "$DIR/gen" ]; then
    rm -f "$DIR"/hardness-*.csv "$DIR"/hardness-*.sums "$DIR"/hardness-*.avow "$DIR/gen" "$DIR/gen.c"
    "$CC" -O2 -std=c11 -Wall -Wextra -o "$DIR/gen.tmp" "$HERE/gen.c" -lm
    mv "$DIR/gen.tmp" "$DIR/gen"
    cp "$HERE/gen.c" "$DIR/gen.c"
fi

write_study() {   # write_study NAME: the study file for DIR/NAME.csv
    cat > "$DIR/$1.avow.tmp" <<EOF
# Benchmark data made by bench/gen.c: tablet hardness from eight presses.
study "Tablet hardness across eight presses (benchmark)"

response hardness "tablet hardness" unit "N"

factor press "tablet press" {
    p1
    p2
    p3
    p4
    p5
    p6
    p7
    p8
}

data "$1.csv" {
    press    from "press"
    hardness from "hardness"
}
EOF
    mv "$DIR/$1.avow.tmp" "$DIR/$1.avow"
}

for size in 100k 1m 10m; do
    case $size in
        100k) rows=100000 ;;
        1m)   rows=1000000 ;;
        10m)  rows=10000000 ;;
    esac
    name=hardness-$size
    if [ ! -f "$DIR/$name.csv" ] || [ ! -f "$DIR/$name.sums" ]; then
        echo "bench: generating $DIR/$name.csv ($rows rows)" >&2
        t0=$(date +%s%N)
        "$DIR/gen" "$rows" 20261201 "$DIR/$name.csv.tmp" "$DIR/$name.sums.tmp"
        mv "$DIR/$name.sums.tmp" "$DIR/$name.sums"
        mv "$DIR/$name.csv.tmp" "$DIR/$name.csv"
        t1=$(date +%s%N)
        awk -v ns=$((t1 - t0)) 'BEGIN { printf "bench:   written in %.2f s\n", ns / 1e9 }' >&2
    fi
    [ -f "$DIR/$name.avow" ] || write_study "$name"
done

# ---- timing ----------------------------------------------------------------------

# measure KEY OUT CMD...: runs CMD once untimed (warming the page cache; its standard
# output goes to OUT), then 3 times under /usr/bin/time with standard output to
# /dev/null. Appends "KEY seconds peak_kib" to $TMP/results: the best (smallest) wall
# time %e of the 3 runs and the largest peak resident set %M. Standard error of the
# best run is kept in $TMP/KEY.err.
measure() {
    key=$1 out=$2
    shift 2
    if ! "$@" > "$out" 2> "$TMP/$key.err"; then
        echo "bench: $key failed:" >&2
        cat "$TMP/$key.err" >&2
        exit 1
    fi
    best="" peak=0
    for run in 1 2 3; do
        if ! /usr/bin/time -f "%e %M" -o "$TMP/time" "$@" > /dev/null 2> "$TMP/$key.err.$run"; then
            echo "bench: $key failed:" >&2
            cat "$TMP/$key.err.$run" >&2
            exit 1
        fi
        read -r e kib < "$TMP/time"
        [ "$kib" -gt "$peak" ] && peak=$kib
        if [ -z "$best" ] || awk -v e="$e" -v b="$best" 'BEGIN { exit !(e < b) }'; then
            best=$e
            cp "$TMP/$key.err.$run" "$TMP/$key.err"
        fi
    done
    echo "$key $best $peak" >> "$TMP/results"
}

: > "$TMP/results"
echo "bench: timing (each command once untimed, then the best of 3); this takes about a minute" >&2
measure avow-100k "$TMP/avow-100k.json" "$AVOW" run "$DIR/hardness-100k.avow" --format json --no-diagnostics
measure avow-1m   "$TMP/avow-1m.json"   "$AVOW" run "$DIR/hardness-1m.avow" --format json --no-diagnostics
measure avow      "$TMP/avow-10m.json"  "$AVOW" run "$DIR/hardness-10m.avow" --format json --no-diagnostics
measure avow-diag "$TMP/avow-10m-diag.json" "$AVOW" run "$DIR/hardness-10m.avow" --format json
measure python    "$TMP/python-10m.out" "$PY" "$HERE/pipeline.py" "$DIR/hardness-10m.csv" press hardness
measure wc        "$TMP/wc-10m.out"     wc -l "$DIR/hardness-10m.csv"

# ---- report ----------------------------------------------------------------------

field() {   # field KEY COLUMN: a column of $TMP/results (2 seconds, 3 KiB)
    awk -v k="$1" -v c="$2" '$1 == k { print $c }' "$TMP/results"
}

bytes=$(wc -c < "$DIR/hardness-10m.csv")
echo
echo "avow benchmark, $(date +%Y-%m-%d)"
echo "machine: $(nproc) cores, $(awk -F': ' '/^model name/ { print $2; exit }' /proc/cpuinfo),"\
     "$(awk '/^MemTotal/ { printf "%.0f GiB", $2 / 1048576 }' /proc/meminfo)"
rev=""
if git -C "$HERE/.." rev-parse --short HEAD > "$TMP/rev" 2>/dev/null; then
    rev=" (git $(cat "$TMP/rev")"
    [ -n "$(git -C "$HERE/.." status --porcelain --untracked-files=no 2>/dev/null)" ] && rev="$rev + uncommitted changes"
    rev="$rev)"
fi
echo "versions: $("$AVOW" --version | head -n 1)$rev;" \
     "$("$PY" -c 'import sys, pandas, scipy, numpy; print("Python %d.%d.%d, pandas %s, NumPy %s, SciPy %s" % (sys.version_info[:3] + (pandas.__version__, numpy.__version__, scipy.__version__)))');" \
     "$(wc --version | head -n 1)"
echo "data: $DIR/hardness-10m.csv, 10,000,000 rows + header, 8 levels, $(awk -v b="$bytes" 'BEGIN { printf "%.1f MiB", b / 1048576 }')"
echo
a_s=$(field avow 2)
awk -v a="$a_s" -v file="$TMP/results" 'BEGIN {
    printf "%-40s %9s %13s %9s\n", "10,000,000 rows, warm cache, best of 3", "seconds", "ratio to avow", "peak MiB"
    while ((getline line < file) > 0) {
        split(line, f, " ")
        if (f[1] == "avow") name = "avow run --no-diagnostics"
        else if (f[1] == "avow-diag") name = "avow run (with the diagnostics)"
        else if (f[1] == "python") name = "pandas.read_csv + scipy f_oneway"
        else if (f[1] == "wc") name = "wc -l"
        else continue
        printf "%-40s %9.2f %13.2f %9.1f\n", name, f[2], f[2] / a, f[3] / 1024
    }
}'
if grep -q '^pipeline:' "$TMP/python.err"; then
    echo "  (inside the Python run: $(sed -n 's/^pipeline: //p' "$TMP/python.err"))"
fi
echo
printf '%-40s %9s %9s\n' "avow run by number of rows" "seconds" "peak MiB"
for key in avow-100k avow-1m avow; do
    case $key in
        avow-100k) label="    100,000 rows" ;;
        avow-1m)   label="  1,000,000 rows" ;;
        avow)      label=" 10,000,000 rows" ;;
    esac
    awk -v l="$label" -v s="$(field $key 2)" -v k="$(field $key 3)" \
        'BEGIN { printf "%-40s %9.2f %9.1f\n", l, s, k / 1024 }'
done
echo
w_s=$(field wc 2)
p_s=$(field python 2)
awk -v a="$a_s" -v w="$w_s" -v p="$p_s" \
    -v m1="$(field avow-100k 3)" -v m2="$(field avow-1m 3)" -v m3="$(field avow 3)" 'BEGIN {
    aw = a / w; pa = p / a
    m = m1; if (m2 > m) m = m2; if (m3 > m) m = m3
    printf "avow / wc -l       %6.2f   (target: 3 or less)         %s\n", aw, (aw <= 3 ? "met" : "MISSED")
    printf "python / avow      %6.2f   (target: 10 or more)        %s\n", pa, (pa >= 10 ? "met" : "MISSED")
    printf "avow peak memory   %6.1f MiB at most (target: under 32 MB at every size)   %s\n", m / 1024, ((m * 1024 < 32000000) ? "met" : "MISSED")
    if (w < 0.2) printf "(wc -l takes %.2f s, close to the 0.01 s resolution of %%e: this ratio is coarse)\n", w
}'
echo
echo "F statistic on the 10,000,000-row file (sanity check, not timed):"
"$PY" "$HERE/check.py" "$TMP/avow-10m.json" "$TMP/python-10m.out" "$DIR/hardness-10m.sums"
