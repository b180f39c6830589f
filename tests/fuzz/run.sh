#!/bin/sh
# Runs the libFuzzer harnesses built by `make fuzz` (see tests/fuzz/README.md).
# usage: sh tests/fuzz/run.sh BUILD_DIR SECONDS NAME...
# Each harness runs for SECONDS on a working corpus in BUILD_DIR/corpus-NAME, seeded
# from tests/fuzz/corpus-NAME and tests/fuzz/regress-NAME (new inputs stay in BUILD_DIR,
# never in git), with the language's dictionary, a 10 s limit per input (a slower input
# counts as a hang) and LeakSanitizer on. An input that crashes, leaks, hangs or trips
# UndefinedBehaviorSanitizer is written to BUILD_DIR/artifacts/NAME-*; fix the source,
# then add the input to tests/fuzz/regress-NAME. Afterwards every regression input and
# seed is replayed once by the same binary. Prints one line per harness with its
# executions, time and crashes, and exits nonzero when anything failed.
set -u
B=$1; SECONDS_EACH=$2; shift 2
D=tests/fuzz
mkdir -p "$B/artifacts"
status=0
summary=""
for name in "$@"; do
    bin="$B/fuzz-$name"
    work="$B/corpus-$name"
    log="$B/fuzz-$name.log"
    mkdir -p "$work"
    before=$(ls "$B/artifacts" | grep -c "^$name-" || true)
    start=$(date +%s)
    # -max_len: the study and run harnesses take whole files; 16 KiB keeps them quick.
    "$bin" -max_total_time="$SECONDS_EACH" -timeout=10 -rss_limit_mb=2048 -max_len=16384 \
        -dict="$D/avow.dict" -print_final_stats=1 -artifact_prefix="$B/artifacts/$name-" \
        "$work" "$D/corpus-$name" "$D/regress-$name" >"$log" 2>&1
    rc=$?
    took=$(($(date +%s) - start))
    execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -n 1)
    after=$(ls "$B/artifacts" | grep -c "^$name-" || true)
    found=$((after - before))
    line="fuzz $name: ${execs:-?} executions in ${took} s, $found crash$( [ "$found" = 1 ] || echo es)"
    [ "$rc" -ne 0 ] && { line="$line (exit $rc; see $log)"; status=1; }
    echo "$line"
    summary="$summary$line
"
done
# The regression inputs and the seeds, once each, by the sanitized harnesses.
for name in "$@"; do
    if "$B/fuzz-$name" -runs=0 -artifact_prefix="$B/artifacts/replay-$name-" \
        "$D/regress-$name" "$D/corpus-$name" >"$B/replay-$name.log" 2>&1; then
        echo "replay $name: $(ls "$D/regress-$name" | wc -l) regression inputs and $(ls "$D/corpus-$name" | wc -l) seeds pass"
    else
        echo "replay $name: FAILED (see $B/replay-$name.log)"; status=1
    fi
done
exit $status
