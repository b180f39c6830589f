#!/bin/sh
# The HTML report of the main example in headless Chromium (tests/pictures/browser.py):
# every section and picture present, nothing past the page's width on a phone (390 px),
# a desktop (1280 px) or a printed sheet; screenshots kept in BUILD/browser/. Also the
# static checks of tests/pictures/check_html.py on every example and golden study.
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
B=$(dirname "$AVOW")
pass=0; fail=0
out="$B/browser"
mkdir -p "$out"
if AVOW="$AVOW" $PY tests/pictures/check_html.py examples/cure/cure.avow examples/coating/coating.avow \
        examples/seedlots/seedlots.avow tests/golden/*/study.avow; then pass=$((pass + 1))
else fail=$((fail + 1)); echo "FAIL check_html.py"; fi
S=examples/cure/cure.avow
if "$AVOW" run "$S" --format html -o "$out/report.html" && "$AVOW" run "$S" -o "$out/report.txt"; then
    if [ ! -x /usr/bin/chromium ] || [ ! -x /usr/bin/chromedriver ]; then
        echo "FAIL browser: /usr/bin/chromium or /usr/bin/chromedriver is missing (make installs them: mk/deps.sh)"
        fail=$((fail + 1))
    elif timeout 300 $PY tests/pictures/browser.py "$out/report.html" "$out/report.txt" "$out"; then
        pass=$((pass + 1)); echo "screenshots: $out/report-phone.png $out/report-desktop.png"
    else fail=$((fail + 1)); echo "FAIL browser.py"; fi
else
    fail=$((fail + 1)); echo "FAIL avow run --format html"
fi
echo "browser: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
