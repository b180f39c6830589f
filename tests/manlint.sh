#!/bin/sh
# The manual pages render without a single groff warning: `groff -man -ww -z` (all
# warnings on, output discarded) must print nothing, for groff's default device and for
# the terminal devices man uses (-Tutf8, and -Tascii in the C locale). The same command
# must warn about a page with a known mistake, so that a silent groff cannot pass.
set -u
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
lint() { # lint PAGE: groff's warnings, or its failure
    for dev in "" -Tutf8 -Tascii; do
        LC_ALL=C groff -man -ww -z $dev "$1" 2>&1 || echo "groff $dev failed on $1 (exit $?)"
    done
}
for page in doc/avow.1 doc/avow.5; do
    out=$(lint "$page")
    if [ -z "$out" ]; then pass=$((pass + 1))
    else fail=$((fail + 1)); echo "FAIL $page:"; echo "$out"; fi
done
printf '.TH PROBE 1\n.SH NAME\nprobe \\- a page with a mistake\n.SH DESCRIPTION\n.BX undefined macro\n\\fQfont\\fP\n' >"$tmp/probe.1"
if [ -n "$(lint "$tmp/probe.1")" ]; then pass=$((pass + 1))
else fail=$((fail + 1)); echo "FAIL groff -man -ww reports nothing for a page with an undefined macro"; fi
echo "manual lint: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
