"""The SVG pictures of `avow run --plots DIR`, checked against the JSON report and the
data files: every picture parses as XML, has one mark per level mean, one interval per
comparison and one point per observation, and every mark, tick and curve point sits
where the picture's own axis mapping (data-x-domain / data-x-range) puts its value,
within half a pixel. Expected values come from avow's JSON report (means, estimates,
intervals, residual mean square), from the data files with exact fractions (fitted
values and residuals of the model, by least squares), and from SciPy 1.10.1 (Student's
t density: scipy.stats.t.pdf; the normal quantile of Blom's plotting positions:
scipy.stats.norm.ppf; Blom 1958, "Statistical estimates and transformed beta-variables",
(r - 3/8) / (n + 1/4)).

usage: AVOW=build/avow /usr/bin/python3 tests/pictures/check_svg.py
"""
import csv
import json
import math
import os
import re
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET
from fractions import Fraction

from scipy import stats

AVOW = os.environ.get("AVOW", "build/avow")
SVG = "{http://www.w3.org/2000/svg}"
HALF_PIXEL = 0.5

# study, data file, treatment columns, block column, response column, missing tokens
CASES = [
    ("examples/cure/cure.avow", "examples/cure/cure.csv", ["schedule"], None, "shear_mpa", ["", "NA"]),
    ("examples/coating/coating.avow", "examples/coating/coating.csv", ["pretreatment", "oven"], None, "pull_mpa", []),
    ("examples/seedlots/seedlots.avow", "examples/seedlots/seedlots.csv", ["treatment"], "strip", "t_ha", ["", "NA"]),
    ("tests/golden/handbook/study.avow", "tests/golden/handbook/data.csv", ["level"], None, "y", []),
    ("tests/golden/nist-smls07/study.avow", "tests/golden/nist-smls07/data.csv", ["group"], None, "value", []),
    ("tests/golden/textbook-blocks/study.avow", "tests/golden/textbook-blocks/data.csv", ["pressure"], "batch",
     "flicks", []),
    ("tests/golden/textbook-two-factor/study.avow", "tests/golden/textbook-two-factor/data.csv",
     ["material", "temp"], None, "life", []),
]

fails = []
count = [0]


def check(ok, what):
    count[0] += 1
    if not ok:
        fails.append(what)
    return ok


def mapping(g, axis):
    """The map value -> pixel of a <g class="plot"> along axis "x" or "y"."""
    lo, hi = (float(v) for v in g.get("data-%s-domain" % axis).split())
    p0, p1 = (float(v) for v in g.get("data-%s-range" % axis).split())
    return lambda v: p0 + (v - lo) / (hi - lo) * (p1 - p0)


def classes(e):
    return (e.get("class") or "").split()


def find_class(root, cls, tag=None):
    return [e for e in root.iter() if cls in classes(e) and (tag is None or e.tag == SVG + tag)]


def path_points(d):
    return [(float(x), float(y)) for x, y in re.findall(r"(-?[0-9.]+),(-?[0-9.]+)", d)]


def near(a, b):
    return abs(a - b) <= HALF_PIXEL


def check_ticks(name, root, g):
    """Tick labels read their own value and sit where the mapping puts it; the ticks
    step by 1, 2 or 5 times a power of ten."""
    fx = mapping(g, "x")
    fy = mapping(g, "y") if g.get("data-y-domain") else None
    xticks = [float(t.get("x1")) for t in find_class(root, "tick") if t.get("x1") == t.get("x2")]
    for t in find_class(root, "ticklabel", "text"):
        v = float(t.get("data-value"))
        check(abs(float(t.text) - v) <= 1e-9 * max(1.0, abs(v)), "%s: tick label %r is not %r" % (name, t.text, v))
        if t.get("text-anchor") == "middle":
            check(near(float(t.get("x")), fx(v)), "%s: tick %s at x %s, mapping gives %.2f" % (name, t.text, t.get("x"), fx(v)))
        elif fy:
            check(near(float(t.get("y")) - 4, fy(v)), "%s: tick %s at y %s, mapping gives %.2f" % (name, t.text, t.get("y"), fy(v)))
    # The step from two neighbouring labels, in exact decimals, over the ticks between.
    labels = sorted((float(t.get("x")), Fraction(t.text)) for t in find_class(root, "ticklabel", "text")
                    if t.get("text-anchor") == "middle")
    if check(len(labels) >= 2, "%s: fewer than two labelled ticks" % name):
        (xa, va), (xb, vb) = labels[0], labels[1]
        k = sum(1 for x in set(xticks) if xa - 0.05 <= x <= xb + 0.05) - 1
        step = (vb - va) / k
        e = math.floor(math.log10(step))
        m = step / Fraction(10) ** e
        check(m in (1, 2, 5), "%s: tick step %s is not 1, 2 or 5 times a power of ten" % (name, step))


def parse(path):
    try:
        root = ET.parse(path).getroot()
    except ET.ParseError as err:
        check(False, "%s: not XML: %s" % (path, err))
        return None
    check(root.tag == SVG + "svg", "%s: the root is %s, not svg" % (path, root.tag))
    check(root.find(SVG + "title") is not None, "%s: no title" % path)
    return root


def expected_means(rep):
    """Panels of the means picture: the cells, then each factor's marginal means."""
    """(with a block, one factor's level means adjusted for the blocks: the margins)"""
    panels = [[(c["cell"], c["mean"], c["n"]) for c in rep["cells"]]]
    factors = []
    for lv in rep["margins"]:
        if lv["factor"] not in factors:
            factors.append(lv["factor"])
    for f in factors:
        panels.append([(lv["level"], lv["mean"], lv["se"]) for lv in rep["margins"] if lv["factor"] == f])
    return panels


def check_means(name, root, rep):
    mse = [a for a in rep["anova"] if a["kind"] == "residual"][0]["ms"]
    df = [a for a in rep["anova"] if a["kind"] == "residual"][0]["df"]
    g = find_class(root, "plot", "g")[0]
    fx = mapping(g, "x")
    check_ticks(name + " means", root, g)
    panels = find_class(root, "panel", "g")
    want = expected_means(rep)
    check(len(panels) == len(want), "%s: %d panels of means, want %d" % (name, len(panels), len(want)))
    for k, (panel, means) in enumerate(zip(panels, want)):
        marks = find_class(panel, "mean", "circle")
        check(len(marks) == len(means), "%s: panel %d has %d marks, want %d" % (name, k, len(marks), len(means)))
        for mark, (label, mean, _) in zip(marks, means):
            check(near(float(mark.get("cx")), fx(mean)),
                  "%s: mean of %s at x %s, want %.2f" % (name, label, mark.get("cx"), fx(mean)))
        rugs = find_class(panel, "rug", "path")
        check(len(rugs) == len(means), "%s: panel %d has %d marks under the curve, want %d" % (name, k, len(rugs), len(means)))
        for rug, (label, mean, _) in zip(rugs, means):
            check(near(path_points(rug.get("d"))[0][0], fx(mean)), "%s: rug mark of %s misplaced" % (name, label))
        # The reference curve: t(df) scaled by sqrt(MSE / n_h), drawn around the centre.
        if k == 0:
            scale = math.sqrt(mse * sum(1.0 / n for _, _, n in means) / len(means))
            centre = rep["fit"]["grand_mean"]
        else:
            scale = math.sqrt(sum(se * se for _, _, se in means) / len(means))
            centre = sum(m for _, m, _ in means) / len(means)
        curves = find_class(panel, "curve", "path")
        if not check(len(curves) == 1, "%s: panel %d has %d curves" % (name, k, len(curves))):
            continue
        c = curves[0]
        base, ht = float(c.get("data-baseline")), float(c.get("data-height"))
        pts = path_points(c.get("d"))
        check(len(pts) == 163, "%s: the curve has %d points, want 161 and two on the baseline" % (name, len(pts)))
        check(near(pts[0][1], base) and near(pts[-1][1], base), "%s: the curve does not start and end on its baseline" % name)
        peak = stats.t.pdf(0, df)
        bad = 0
        for i, (x, y) in enumerate(pts[1:-1]):
            u = -4 + 8 * i / 160
            if not (near(x, fx(centre + u * scale)) and near(y, base - ht * stats.t.pdf(u, df) / peak)):
                bad += 1
        check(bad == 0, "%s: %d points of the reference curve of panel %d are off (scale %.6g, %g df)" % (name, bad, k, scale, df))


def expected_intervals(rep):
    rows = [("planned", c["name"], c["estimate"], c["ci"]) for c in rep["contrasts"]]
    for e in rep["explore"]:
        for c in e["comparisons"]:
            rows.append(("exploratory", c["name"], c["estimate"], c["ci"]))
    return rows


def check_intervals(name, root, rep):
    g = find_class(root, "plot", "g")[0]
    fx = mapping(g, "x")
    p0, p1 = (float(v) for v in g.get("data-x-range").split())
    check_ticks(name + " intervals", root, g)
    got = [e for e in root.iter(SVG + "g") if "interval" in classes(e)]
    want = expected_intervals(rep)
    check(len(got) == len(want), "%s: %d intervals, want %d" % (name, len(got), len(want)))
    for e, (kind, label, est, ci) in zip(got, want):
        check(kind in classes(e), "%s: %s drawn as %s, want %s" % (name, label, e.get("class"), kind))
        check(e.get("data-label") == label, "%s: interval %r in the place of %r" % (name, e.get("data-label"), label))
        marks = find_class(e, "estimate")
        if not check(len(marks) == 1, "%s: %s has %d estimate marks" % (name, label, len(marks))):
            continue
        m = marks[0]
        if kind == "planned":
            check(m.tag == SVG + "circle" and m.get("fill") != "#ffffff", "%s: planned %s not a filled circle" % (name, label))
            x = float(m.get("cx"))
        else:
            xs = [p[0] for p in path_points(m.get("d"))]
            check(m.get("fill") == "#ffffff", "%s: exploratory %s not hollow" % (name, label))
            x = (min(xs) + max(xs)) / 2
        check(near(x, fx(est)), "%s: estimate of %s at %.2f, want %.2f" % (name, label, x, fx(est)))
        line = find_class(e, "ci", "line")[0]
        dashed = line.get("stroke-dasharray") is not None
        check(dashed == (kind == "exploratory"), "%s: %s line style does not say %s" % (name, label, kind))
        x1, x2 = float(line.get("x1")), float(line.get("x2"))
        opens = find_class(e, "open", "path")
        if ci[0] is None:
            check(x1 < p0 and len(opens) >= 1, "%s: %s is open below but not drawn so" % (name, label))
        else:
            check(near(x1, fx(ci[0])), "%s: %s lower end at %.2f, want %.2f" % (name, label, x1, fx(ci[0])))
        if ci[1] is None:
            check(x2 > p1 and len(opens) >= 1, "%s: %s is open above but not drawn so" % (name, label))
        else:
            check(near(x2, fx(ci[1])), "%s: %s upper end at %.2f, want %.2f" % (name, label, x2, fx(ci[1])))
    zero = find_class(root, "zero", "line")
    check(len(zero) >= 1 and all(near(float(z.get("x1")), fx(0)) for z in zero), "%s: no zero line at 0" % name)


def solve(a, b):
    """Exact Gauss-Jordan solution of a x = b (Fractions)."""
    n = len(a)
    m = [row[:] + [b[i]] for i, row in enumerate(a)]
    for c in range(n):
        piv = next(r for r in range(c, n) if m[r][c] != 0)
        m[c], m[piv] = m[piv], m[c]
        for r in range(n):
            if r != c and m[r][c] != 0:
                f = m[r][c] / m[c][c]
                m[r] = [x - f * y for x, y in zip(m[r], m[c])]
    return [m[i][n] / m[i][i] for i in range(n)]


def fitted_values(data, treat, block, resp, missing):
    """(line, cell key, fitted, residual) of every used row: the cell means model, plus
    additive block effects when there is a block, by exact least squares."""
    rows = []
    with open(data, newline="", encoding="utf-8") as f:
        rd = csv.reader(f)
        header = None
        for rec in rd:
            line = rd.line_num
            if header is None:
                if rec and rec[0].startswith("#"):
                    continue
                header = [h.strip() for h in rec]
                continue
            if not rec:
                continue
            d = dict(zip(header, (v.strip() for v in rec)))
            if d[resp] in missing or any(d[t] in missing for t in treat):
                continue
            rows.append((line, tuple(d[t] for t in treat), d[block] if block else None, Fraction(d[resp])))
    cells = sorted({r[1] for r in rows})
    blocks = sorted({r[2] for r in rows}) if block else []
    cols = [("c", c) for c in cells] + [("b", b) for b in blocks[1:]]
    x = [[Fraction(1 if (k == "c" and r[1] == v) or (k == "b" and r[2] == v) else 0) for k, v in cols] for r in rows]
    xtx = [[sum(xi[i] * xi[j] for xi in x) for j in range(len(cols))] for i in range(len(cols))]
    xty = [sum(xi[i] * r[3] for xi, r in zip(x, rows)) for i in range(len(cols))]
    beta = solve(xtx, xty)
    out = []
    for xi, r in zip(x, rows):
        fit = sum(a * b for a, b in zip(xi, beta))
        out.append((r[0], r[1], fit, r[3] - fit))
    return out


def check_residuals(name, dirpath, rep, data, treat, block, resp, missing):
    res = fitted_values(data, treat, block, resp, missing)
    by_line = {line: (cell, float(fit), float(e)) for line, cell, fit, e in res}
    n = len(res)
    check(n == rep["data"]["used"], "%s: %d rows from the data file, the report used %d" % (name, n, rep["data"]["used"]))
    # Blom's normal scores by rank, ties in file order.
    order = sorted(res, key=lambda t: (t[3], t[0]))
    score = {t[0]: stats.norm.ppf((r + 1 - 0.375) / (n + 0.25)) for r, t in enumerate(order)}
    for pic in ("residuals", "probability", "spread"):
        root = parse(os.path.join(dirpath, pic + ".svg"))
        if root is None:
            continue
        g = find_class(root, "plot", "g")[0]
        fx = mapping(g, "x")
        fy = mapping(g, "y") if g.get("data-y-domain") else None
        check_ticks("%s %s" % (name, pic), root, g)
        pts = find_class(g, "point", "circle")
        check(len(pts) == n, "%s %s: %d points, want %d" % (name, pic, len(pts), n))
        check(sorted(int(p.get("data-line")) for p in pts) == sorted(by_line),
              "%s %s: the points are not the rows of the data file" % (name, pic))
        rowy = {}
        bad = []
        for p in pts:
            line = int(p.get("data-line"))
            cell, fit, e = by_line[line]
            x, y = float(p.get("cx")), float(p.get("cy"))
            if pic == "residuals":
                ok = near(x, fx(fit)) and near(y, fy(e))
            elif pic == "probability":
                ok = near(x, fx(score[line])) and near(y, fy(e))
            else:
                ok = near(x, fx(e)) and rowy.setdefault(cell, y) == y
            if not ok:
                bad.append(line)
        check(not bad, "%s %s: points of lines %s are off" % (name, pic, bad[:5]))
        if pic == "spread":
            check(len(set(rowy.values())) == len(rowy), "%s spread: two cells share a row" % name)
        if pic == "probability":
            guide = find_class(g, "guide", "line")
            sd = rep["fit"]["residual_sd"]
            if check(len(guide) == 1, "%s probability: no guide line" % name):
                ln = guide[0]
                for xa, ya in (("x1", "y1"), ("x2", "y2")):
                    # invert the x mapping at the end and compare with sd * z
                    lo, hi = (float(v) for v in g.get("data-x-domain").split())
                    p0, p1 = (float(v) for v in g.get("data-x-range").split())
                    z = lo + (float(ln.get(xa)) - p0) * (hi - lo) / (p1 - p0)
                    check(near(float(ln.get(ya)), fy(sd * z)), "%s probability: the guide line's slope is not the residual SD" % name)


def main():
    tmp = tempfile.mkdtemp()
    for study, data, treat, block, resp, missing in CASES:
        name = os.path.basename(os.path.dirname(study))
        out = os.path.join(tmp, name)
        r = subprocess.run([AVOW, "run", study, "--format", "json", "--plots", out], capture_output=True, text=True)
        if not check(r.returncode == 0, "%s: avow run --plots exited %d: %s" % (name, r.returncode, r.stderr)):
            continue
        rep = json.loads(r.stdout)
        files = sorted(os.listdir(out))
        check(files == ["intervals.svg", "means.svg", "probability.svg", "residuals.svg", "spread.svg"],
              "%s: --plots wrote %s" % (name, files))
        root = parse(os.path.join(out, "means.svg"))
        if root is not None:
            check_means(name, root, rep)
        root = parse(os.path.join(out, "intervals.svg"))
        if root is not None:
            check_intervals(name, root, rep)
        check_residuals(name, out, rep, data, treat, block, resp, missing)
    for f in fails:
        print("FAIL " + f)
    print("svg pictures: %d passed, %d failed" % (count[0] - len(fails), len(fails)))
    return 1 if fails else 0


sys.exit(main())
