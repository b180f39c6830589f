#!/bin/sh
# Dependency step of the build: every Debian package avow needs to build and test.
# Installs what is missing with apt-get when run as root; otherwise prints the exact
# command and stops.
set -u
missing=""
need() { # need PACKAGE TEST...
    pkg=$1; shift
    if ! "$@" >/dev/null 2>&1; then missing="$missing $pkg"; fi
}
need re2c           command -v re2c
need lemon          test -f /usr/share/lemon/lempar.c
need libgsl-dev     test -f /usr/include/gsl/gsl_cdf.h
need libcmocka-dev  test -f /usr/include/cmocka.h
need libssl-dev     test -f /usr/include/openssl/evp.h
need libgmp-dev     test -f /usr/include/gmp.h
need python3-scipy  /usr/bin/python3 -c 'import scipy.stats'
need python3-numpy  /usr/bin/python3 -c 'import numpy'
need make           command -v make
need gcc            command -v cc
[ -z "$missing" ] && exit 0
if [ "$(id -u)" = 0 ]; then
    echo "avow: installing build dependencies:$missing" >&2
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq >&2 && apt-get install -y -qq --no-install-recommends $missing >&2 || {
        echo "avow: apt-get failed; install by hand:  apt-get install -y$missing" >&2
        exit 1
    }
    exit 0
fi
echo "avow: missing build dependencies:$missing" >&2
echo "avow: install them with:  sudo apt-get install -y$missing" >&2
echo "avow: then run make again." >&2
exit 1
