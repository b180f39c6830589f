#!/usr/bin/env python3
"""avow against a published worked example and exact values derived from it.

Data: NIST/SEMATECH e-Handbook of Statistical Methods, section 7.4.3.4 (one-way ANOVA
worked by hand; three levels of five observations), in tests/golden/handbook/.
Checks:
  - the values printed in the handbook, to half a unit of the last printed digit
    (SST 27.897, SSE 17.452, total 45.349, MST 13.949, MSE 1.454, F 9.59);
  - the exact values (Python fractions on the same data; recorded in the project's
    reference notes, methods.md section 11 and section 7, CT-nist) to relative 1e-12:
    SST 20923/750, SSE 4363/250, F 41846/4363, p 0.0032482226008593 (mpmath 1.2.1),
    contrast L1 - mean(L2, L3): estimate -14/5, SE^2 4363/10000, SS 392/15,
    t -4.239019602185731, p 0.0011494579970668577, 95% interval
    (-4.239171434810681, -1.3608285651893188), Scheffe interval
    (-4.6412787404729565, -0.9587212595270428), Scheffe multiplier 2.7875773835545425
    (MC-scheffe-S).
"""
import json
import os
import subprocess
import sys

AVOW = os.environ.get("AVOW", "build/avow")
HERE = os.path.dirname(os.path.abspath(__file__))
STUDY = os.path.join(HERE, "..", "golden", "handbook", "study.avow")

out = subprocess.run([AVOW, "run", STUDY, "--format", "json"], capture_output=True, text=True)
if out.returncode != 0:
    sys.stderr.write(out.stderr)
    sys.exit(1)
r = json.loads(out.stdout)
between, within, total = r["anova"]
c = r["contrasts"][0]
e = r["explore"][0]["comparisons"][0]

passed = failed = 0


def check(label, got, want, abs_tol=None, rel_tol=None):
    global passed, failed
    ok = (abs_tol is not None and abs(got - want) <= abs_tol) or \
         (rel_tol is not None and abs(got - want) <= rel_tol * abs(want))
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL %s: got %r, want %r" % (label, got, want))


# Printed in the e-Handbook 7.4.3.4 table (half a unit of the last digit).
check("printed SST", between["ss"], 27.897, abs_tol=0.0005)
check("printed SSE", within["ss"], 17.452, abs_tol=0.0005)
check("printed total SS", total["ss"], 45.349, abs_tol=0.0005)
check("printed MST", between["ms"], 13.949, abs_tol=0.0005)
check("printed MSE", within["ms"], 1.454, abs_tol=0.0005)
check("printed F", between["f"], 9.59, abs_tol=0.005)
check("printed df", between["df"] + within["df"] * 100, 2 + 12 * 100, abs_tol=0)

# Exact (Python fractions) and high-precision (mpmath 1.2.1) values, methods.md.
check("exact SST", between["ss"], 20923 / 750, rel_tol=1e-12)
check("exact SSE", within["ss"], 4363 / 250, rel_tol=1e-12)
check("exact F", between["f"], 41846 / 4363, rel_tol=1e-12)
check("p of F (mpmath)", between["p"], 0.0032482226008593, rel_tol=1e-12)
check("contrast estimate", c["estimate"], -14 / 5, rel_tol=1e-12)
check("contrast SE^2", c["se"] ** 2, 4363 / 10000, rel_tol=1e-12)
check("contrast SS", c["ss"], 392 / 15, rel_tol=1e-12)
check("contrast t", c["t"], -4.239019602185731, rel_tol=1e-12)
check("contrast p", c["p"], 0.0011494579970668577, rel_tol=1e-12)
check("contrast CI low", c["ci"][0], -4.239171434810681, rel_tol=1e-12)
check("contrast CI high", c["ci"][1], -1.3608285651893188, rel_tol=1e-12)
check("Scheffe CI low", e["ci"][0], -4.6412787404729565, rel_tol=1e-12)
check("Scheffe CI high", e["ci"][1], -0.9587212595270428, rel_tol=1e-12)
check("Scheffe multiplier", r["explore"][0]["critical_value"], 2.7875773835545425, rel_tol=1e-12)

print("published example: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
