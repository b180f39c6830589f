#!/bin/sh
# Dependency step of the build: every Debian package avow needs to build and test.
# Installs what is missing with apt-get when run as root; otherwise prints the exact
# command and stops.
#   build:            re2c lemon libgsl-dev libssl-dev libgmp-dev make gcc
#   unit tests:       libcmocka-dev
#   reference checks: python3-scipy python3-numpy python3-mpmath
#   install test:     pkg-config (links a program against the installed libavow)
#   manual lint:      groff-base (groff -man -ww)
#   editor files:     vim (syntax, indent), emacs-nox (byte-compiles avow-mode.el),
#                     nodejs and npm (the TextMate grammar, tokenized by vscode-textmate)
#   sh mk/deps.sh        what `make` and `make check` need
#   sh mk/deps.sh test   adds what only `make check` needs: headless Chromium, its
#                        driver and Python's selenium, for the browser test of the
#                        HTML report (tests/browser.sh)
#   sh mk/deps.sh fuzz   adds clang with its libFuzzer and sanitizer runtimes (`make fuzz`)
#   sh mk/deps.sh ci     adds all of the above and valgrind (.ci/run)
set -u
packages="re2c lemon libgsl-dev libcmocka-dev libssl-dev libgmp-dev python3-scipy python3-numpy python3-mpmath make gcc
pkg-config groff-base vim emacs-nox"
test_packages="chromium chromium-driver python3-selenium"
fuzz_packages="clang libclang-rt-14-dev"
case "${1:-}" in
    "") ;;
    test) packages="$packages $test_packages" ;;
    fuzz) packages="$packages $fuzz_packages" ;;
    ci) packages="$packages $test_packages $fuzz_packages valgrind" ;;
    *) echo "usage: sh mk/deps.sh [test|fuzz|ci]" >&2; exit 64 ;;
esac
# Checked by command rather than by package: Node.js from another source (one package
# that provides npm) serves as well as Debian's nodejs and npm.
commands="node:nodejs npm:npm"
missing=""
for pkg in $packages; do
    status=$(dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null)
    case "$status" in
        *"install ok installed"*) ;;
        *) missing="$missing $pkg" ;;
    esac
done
for pair in $commands; do
    command -v "${pair%%:*}" >/dev/null 2>&1 || missing="$missing ${pair#*:}"
done
[ -z "$missing" ] && exit 0
if [ "$(id -u)" = 0 ]; then
    echo "avow: installing build dependencies:$missing" >&2
    export DEBIAN_FRONTEND=noninteractive
    if apt-get -o DPkg::Lock::Timeout=600 update -qq >&2 && apt-get -o DPkg::Lock::Timeout=600 install -y -qq --no-install-recommends $missing >&2; then
        exit 0
    fi
    echo "avow: apt-get failed; install by hand:  apt-get install -y$missing" >&2
    exit 1
fi
echo "avow: missing build dependencies:$missing" >&2
echo "avow: install them with:  sudo apt-get install -y$missing" >&2
echo "avow: then run make again." >&2
exit 1
