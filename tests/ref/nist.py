#!/usr/bin/env python3
"""NIST StRD one-way ANOVA: avow's JSON report against the certified values.

Source: NIST Information Technology Laboratory, Statistical Reference Datasets,
"Analysis of Variance" collection (public domain); data and certified values copied in
tests/data/nist/ (see its README). The higher-difficulty sets SmLs07-SmLs09 are not
copied; they are built here by the collection's published construction (the SmLs01-03
values plus a constant 999999999999, i.e. 13 constant leading digits), for which the
collection certifies the same values as SmLs01-03.

Score: LRE = -log10(|computed - certified| / |certified|), capped at 15; every
certified value of every set must reach 13.
"""
import json
import math
import os
import subprocess
import sys
import tempfile
from decimal import Decimal

HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, "..", "data", "nist")
AVOW = os.environ.get("AVOW", "build/avow")
TARGET = 13.0


def lre(computed, certified):
    if computed is None:
        return 0.0
    c = float(certified)
    if c == 0:
        err = abs(computed)
        return 15.0 if err == 0 else min(15.0, -math.log10(err))
    err = abs(computed - c) / abs(c)
    return 15.0 if err == 0 else min(15.0, -math.log10(err))


def read_csv(path):
    rows = []
    with open(path) as f:
        next(f)
        for line in f:
            g, v = line.strip().split(",")
            rows.append((g, v))
    return rows


def run_avow(tmp, name, rows):
    groups = sorted({g for g, _ in rows}, key=int)
    data = os.path.join(tmp, name + ".csv")
    with open(data, "w") as f:
        f.write("group,value\n")
        for g, v in rows:
            f.write("%s,%s\n" % (g, v))
    study = os.path.join(tmp, name + ".avow")
    with open(study, "w") as f:
        f.write('study "NIST StRD %s"\nresponse value\n' % name)
        f.write("factor group { %s }\n" % ", ".join('"%s"' % g for g in groups))
        f.write('data "%s.csv"\n' % name)
    out = subprocess.run([AVOW, "run", study, "--format", "json"], capture_output=True, text=True)
    if out.returncode != 0:
        sys.stderr.write(out.stderr)
        raise SystemExit("avow failed on %s" % name)
    return json.loads(out.stdout)


def main():
    cert = json.load(open(os.path.join(DATA, "certified.json")))
    sets = {name: read_csv(os.path.join(DATA, name + ".csv")) for name in cert}
    # SmLs07-09: 13 constant leading digits, same certified values as SmLs01-03.
    for hard, base in (("SmLs07", "SmLs01"), ("SmLs08", "SmLs02"), ("SmLs09", "SmLs03")):
        sets[hard] = [(g, str(Decimal(v) + Decimal("999999999999"))) for g, v in sets[base]]
        cert[hard] = dict(cert[base], difficulty="higher")
    failures = 0
    worst = 99.0
    with tempfile.TemporaryDirectory() as tmp:
        for name in sorted(sets):
            rep = run_avow(tmp, name, sets[name])
            between, within = rep["anova"][0], rep["anova"][1]
            c = cert[name]
            checks = [
                ("between df", between["df"], c["between_df"]),
                ("between SS", between["ss"], c["between_ss"]),
                ("between MS", between["ms"], c["between_ms"]),
                ("F", between["f"], c["f"]),
                ("within df", within["df"], c["within_df"]),
                ("within SS", within["ss"], c["within_ss"]),
                ("within MS", within["ms"], c["within_ms"]),
                ("R-squared", rep["fit"]["r_squared"], c["r_squared"]),
                ("residual SD", rep["fit"]["residual_sd"], c["residual_sd"]),
            ]
            scores = []
            for label, got, want in checks:
                s = lre(got, want)
                scores.append(s)
                if s < TARGET:
                    failures += 1
                    print("FAIL %s %s: got %r, certified %s, LRE %.1f" % (name, label, got, want, s))
            worst = min(worst, min(scores))
            print("%-7s (%s) minimum LRE %.1f over %d certified values"
                  % (name, c["difficulty"], min(scores), len(scores)))
    print("worst LRE over all sets: %.1f" % worst)
    print("nist: %d passed, %d failed" % (len(sets) * 9 - failures, failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
