#!/bin/sh
# Dependency step of the build: every Debian package avow needs to build and test.
# Installs what is missing with apt-get when run as root; otherwise prints the exact
# command and stops.
set -u
packages="re2c lemon libgsl-dev libcmocka-dev libssl-dev libgmp-dev python3-scipy python3-numpy python3-mpmath make gcc"
missing=""
for pkg in $packages; do
    status=$(dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null)
    case "$status" in
        *"install ok installed"*) ;;
        *) missing="$missing $pkg" ;;
    esac
done
[ -z "$missing" ] && exit 0
if [ "$(id -u)" = 0 ]; then
    echo "avow: installing build dependencies:$missing" >&2
    export DEBIAN_FRONTEND=noninteractive
    if apt-get update -qq >&2 && apt-get install -y -qq --no-install-recommends $missing >&2; then
        exit 0
    fi
    echo "avow: apt-get failed; install by hand:  apt-get install -y$missing" >&2
    exit 1
fi
echo "avow: missing build dependencies:$missing" >&2
echo "avow: install them with:  sudo apt-get install -y$missing" >&2
echo "avow: then run make again." >&2
exit 1
