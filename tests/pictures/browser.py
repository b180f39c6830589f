"""The HTML report in a real browser: headless Chromium (Debian's chromium and
chromium-driver, driven through Debian's python3-selenium), at a phone's width and at a
desktop's, and with the print stylesheet. Through the DOM: every section of the text
report is there and shown, every picture is there, drawn at a readable size and holds its
marks, and no element reaches past the page's width (an element inside a box that
scrolls on its own, such as a wide table, may; the box itself may not). A screenshot of
each width is kept.

usage: /usr/bin/python3 tests/pictures/browser.py REPORT.html REPORT.txt SHOTS_DIR
"""
import base64
import os
import sys

from selenium import webdriver
from selenium.webdriver.chrome.service import Service

REPORT, TEXT, SHOTS = sys.argv[1], sys.argv[2], sys.argv[3]
fails = []
count = [0]


def check(ok, what):
    count[0] += 1
    if not ok:
        fails.append(what)
    return ok


def text_headings(path):
    lines = open(path, encoding="utf-8").read().split("\n")
    return [l for i, l in enumerate(lines)
            if l and i + 1 < len(lines) and set(lines[i + 1]) == {"-"} and len(lines[i + 1]) == len(l)]


# Elements past the page's width, unless a box that scrolls or clips on its own holds
# them (that box is then checked itself).
OVERFLOW_JS = """
const vw = document.documentElement.clientWidth;
const out = [];
function clipped(e) {
  for (let a = e.parentElement; a && a !== document.body; a = a.parentElement) {
    const s = getComputedStyle(a);
    if (s.overflowX === 'auto' || s.overflowX === 'scroll' || s.overflowX === 'hidden') return true;
  }
  return false;
}
for (const e of document.querySelectorAll('body *')) {
  const r = e.getBoundingClientRect();
  if (r.width === 0 && r.height === 0) continue;
  if ((r.right > vw + 0.5 || r.left < -0.5) && !clipped(e)) {
    out.push(e.tagName.toLowerCase() + (e.id ? '#' + e.id : '') + (e.className && e.className.baseVal === undefined ? '.' + e.className : '')
             + ' ' + Math.round(r.left) + '..' + Math.round(r.right) + ' of ' + vw);
  }
}
return [document.documentElement.scrollWidth, vw, out.slice(0, 10)];
"""

DOM_JS = """
const secs = [...document.querySelectorAll('main section')].map(s => {
  const h = s.querySelector('h2'); const r = s.getBoundingClientRect();
  return [s.id, h ? h.textContent : null, r.height];
});
const figs = [...document.querySelectorAll('figure')].map(f => {
  const svg = f.querySelector('svg'); const r = svg ? svg.getBoundingClientRect() : null;
  const cap = f.querySelector('figcaption');
  return [svg ? svg.querySelector('title').textContent : null, r ? r.width : 0, r ? r.height : 0,
          svg ? svg.querySelectorAll('circle.mean').length : 0,
          svg ? svg.querySelectorAll('g.interval').length : 0,
          svg ? svg.querySelectorAll('circle.point').length : 0,
          cap ? cap.textContent.length : 0];
});
return [secs, figs, document.querySelectorAll('script').length];
"""


def main():
    opts = webdriver.ChromeOptions()
    opts.binary_location = "/usr/bin/chromium"
    for a in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--hide-scrollbars",
              "--disable-background-networking", "--no-first-run", "--lang=en-US"):
        opts.add_argument(a)
    drv = webdriver.Chrome(service=Service("/usr/bin/chromedriver"), options=opts)
    try:
        url = "file://" + os.path.abspath(REPORT)
        want = text_headings(TEXT)
        for name, width, height, mobile in (("phone", 390, 844, True), ("desktop", 1280, 900, False)):
            drv.execute_cdp_cmd("Emulation.setDeviceMetricsOverride",
                                {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": mobile})
            drv.get(url)
            secs, figs, scripts = drv.execute_script(DOM_JS)
            check(scripts == 0, "%s: the page has scripts" % name)
            check([s[1] for s in secs] == want, "%s: sections %s, want %s" % (name, [s[1] for s in secs], want))
            check(all(s[2] > 20 for s in secs), "%s: a section is not shown: %s" % (name, [s for s in secs if s[2] <= 20]))
            check(len(figs) == 5, "%s: %d pictures, want 5" % (name, len(figs)))
            titles = [f[0] or "" for f in figs]
            for i, (word, marks) in enumerate((("Means of", 3), ("Comparisons of", 4), ("Spread of", 5),
                                               ("against fitted values", 5), ("Normal probability", 5))):
                f = next((f for f in figs if word in (f[0] or "")), None)
                if not check(f is not None, "%s: no picture titled ...%s... among %s" % (name, word, titles)):
                    continue
                check(f[1] >= 340 and f[2] >= 150, "%s: the picture %r is drawn at %dx%d" % (name, f[0], f[1], f[2]))
                check(f[marks] > 0, "%s: the picture %r has no marks" % (name, f[0]))
                check(f[6] > 80, "%s: the picture %r has no caption" % (name, f[0]))
            sw, vw, over = drv.execute_script(OVERFLOW_JS)
            check(sw <= vw and not over, "%s: the page is %d px wide in a %d px view; past the edge: %s" % (name, sw, vw, over))
            # The whole page as one picture.
            size = drv.execute_cdp_cmd("Page.getLayoutMetrics", {})["cssContentSize"]
            shot = drv.execute_cdp_cmd("Page.captureScreenshot", {"format": "png", "captureBeyondViewport": True,
                                       "clip": {"x": 0, "y": 0, "width": width, "height": size["height"], "scale": 1}})
            path = os.path.join(SHOTS, "report-%s.png" % name)
            with open(path, "wb") as f:
                f.write(base64.b64decode(shot["data"]))
            check(os.path.getsize(path) > 10000, "%s: the screenshot %s is empty" % (name, path))
        # Print: an A4 page's width at 96 px per inch, less margins (about 700 px).
        drv.execute_cdp_cmd("Emulation.setDeviceMetricsOverride",
                            {"width": 700, "height": 1000, "deviceScaleFactor": 1, "mobile": False})
        drv.execute_cdp_cmd("Emulation.setEmulatedMedia", {"media": "print"})
        drv.get(url)
        sw, vw, over = drv.execute_script(OVERFLOW_JS.replace("s.overflowX === 'auto' || s.overflowX === 'scroll' || ", ""))
        check(sw <= vw and not over, "print: the page is %d px wide on a %d px sheet; past the edge: %s" % (sw, vw, over))
    finally:
        drv.quit()
    for f in fails:
        print("FAIL " + f)
    print("browser: %d passed, %d failed" % (count[0] - len(fails), len(fails)))
    return 1 if fails else 0


sys.exit(main())
