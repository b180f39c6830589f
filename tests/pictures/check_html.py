"""The HTML report of `avow run --format html`, checked without a browser: one
self-contained page (no script, no external reference, nothing fetched), its elements
closed in order, every inline picture an SVG that parses as XML, and the same content as
the text report: the same section headings in the same order and, outside the pictures,
the same words in the same order, the standing caution among them.

usage: AVOW=build/avow /usr/bin/python3 tests/pictures/check_html.py STUDY...
"""
import os
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

AVOW = os.environ.get("AVOW", "build/avow")
VOID = {"meta", "br", "hr", "img", "input", "link", "area", "base", "col", "embed", "source", "track", "wbr"}
# Inside an inline <svg> these may be written self-closed.
SVG_EMPTY = {"rect", "line", "circle", "path", "polygon", "polyline", "ellipse", "use", "stop"}
CAUTION = ("A statistically significant difference is not evidence that a product, process or treatment is safe. "
           "Where people can be hurt, decisions follow the applicable regulations, local codes and licensed review.")

fails = []
count = [0]


def check(ok, what):
    count[0] += 1
    if not ok:
        fails.append(what)
    return ok


class Page(HTMLParser):
    """Collects the problems of structure and the words outside the pictures."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack = []
        self.problems = []
        self.words = []         # words of <main> outside <figure> and picture sections
        self.h2 = []
        self.in_h2 = False
        self.figures = 0
        self.svgs = 0
        self.section = None
        self.style = ""
        self.in_style = False

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag in ("script", "iframe", "object", "embed", "img", "link", "base", "audio", "video", "source"):
            self.problems.append("a <%s> element" % tag)
        for k, v in attrs:
            if k in ("src", "href", "srcset", "xlink:href", "action", "formaction", "poster", "data") \
                    or k.startswith("on"):
                self.problems.append("attribute %s=%r on <%s>" % (k, v, tag))
            if v and re.search(r"url\(|https?:|//", v) and k != "xmlns":
                self.problems.append("a reference in %s=%r" % (k, v))
        if tag == "section":
            self.section = a.get("id")
        if tag == "figure":
            self.figures += 1
        if tag == "svg":
            self.svgs += 1
        if tag == "h2":
            self.in_h2 = True
            self.h2.append("")
        if tag == "style":
            self.in_style = True
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag, attrs):
        if tag not in VOID and not ("svg" in self.stack and tag in SVG_EMPTY):
            self.problems.append("<%s/> self-closed outside an svg" % tag)
        self.handle_starttag(tag, attrs)
        if tag not in VOID:
            self.stack.pop()

    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.problems.append("</%s> closes <%s>" % (tag, self.stack[-1] if self.stack else "nothing"))
            return
        self.stack.pop()
        if tag == "h2":
            self.in_h2 = False
        if tag == "style":
            self.in_style = False

    def handle_data(self, data):
        if self.in_style:
            self.style += data
        if self.in_h2:
            self.h2[-1] += data
        if "main" in self.stack and "figure" not in self.stack and not (self.section or "").startswith("picture-"):
            self.words.extend(data.split())


def text_headings(lines):
    return [l for i, l in enumerate(lines)
            if l and i + 1 < len(lines) and set(lines[i + 1]) == {"-"} and len(lines[i + 1]) == len(l)]


def text_words(report):
    """Words of the text report after its first line, outside the picture sections."""
    lines = report.split("\n")[1:]
    heads = set(text_headings(lines))
    words, skip = [], False
    for i, l in enumerate(lines):
        if l in heads and i + 1 < len(lines) and set(lines[i + 1]) == {"-"}:
            skip = l.startswith("Picture:")
        if not skip:
            words.extend(l.split())
    return words


def plain(words):
    """Words without dash rules and list bullets (a lone "-" that is no value is a bullet
    in the text and a list item in HTML; a missing value is "-" in both)."""
    return [w for w in words if set(w) != {"-"}]


def main():
    for study in sys.argv[1:]:
        name = study
        r = subprocess.run([AVOW, "run", study, "--format", "html"], capture_output=True, text=True)
        t = subprocess.run([AVOW, "run", study], capture_output=True, text=True)
        if not check(r.returncode == 0 and t.returncode == 0, "%s: avow run exited %d / %d" % (name, r.returncode, t.returncode)):
            continue
        html = r.stdout
        check(html.startswith("<!DOCTYPE html>\n"), "%s: no doctype" % name)
        page = Page()
        page.feed(html)
        page.close()
        check(not page.problems, "%s: %s" % (name, "; ".join(page.problems[:5])))
        check(not page.stack, "%s: elements left open: %s" % (name, page.stack))
        check("@import" not in page.style and "url(" not in page.style, "%s: the stylesheet fetches something" % name)
        check("@media print" in page.style, "%s: no print stylesheet" % name)
        check('name="viewport"' in html, "%s: no viewport for phones" % name)
        # The pictures: every figure holds one SVG that parses as XML.
        svgs = re.findall(r"<svg\b.*?</svg>", html, re.S)
        check(len(svgs) == page.svgs == page.figures, "%s: %d figures, %d svg elements" % (name, page.figures, len(svgs)))
        want = 5 if "Picture: the comparisons" in t.stdout else 4
        check(len(svgs) == want, "%s: %d pictures, want %d" % (name, len(svgs), want))
        for s in svgs:
            try:
                ET.fromstring(s)
            except ET.ParseError as err:
                check(False, "%s: an inline svg is not XML: %s" % (name, err))
        # The same content as the text report.
        lines = t.stdout.split("\n")
        check(page.h2 == text_headings(lines), "%s: the HTML sections %s are not the text report's %s"
              % (name, page.h2, text_headings(lines)))
        hw, tw = plain(page.words), plain(text_words(t.stdout))
        if hw != tw:
            i = next((k for k, (a, b) in enumerate(zip(hw, tw)) if a != b), min(len(hw), len(tw)))
            check(False, "%s: the words differ from the text report at word %d: HTML %r, text %r"
                  % (name, i, hw[i:i + 8], tw[i:i + 8]))
        else:
            check(True, "")
        check(CAUTION in " ".join(page.words), "%s: the caution is missing" % name)
    for f in fails:
        print("FAIL " + f)
    print("html report: %d passed, %d failed" % (count[0] - len(fails), len(fails)))
    return 1 if fails else 0


sys.exit(main())
