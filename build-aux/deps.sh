#!/bin/sh
# deps.sh — makes sure the Debian packages bellcheck builds and tests with are installed.
# SPDX-License-Identifier: GPL-3.0-or-later
# Usage: deps.sh build|test|fuzz|valgrind|browser.  As root on a Debian-like system, installs what is
# missing with apt-get; otherwise prints the exact command to run and fails.
set -u
need_build="libglpk-dev libgmp-dev libcjson-dev libsuitesparse-dev nettle-dev libflint-dev pkg-config"
need_test="python3-numpy python3-scipy libxml2-utils" # libxml2-utils: xmllint checks the SVG and HTML
need_fuzz="clang libclang-rt-14-dev libomp-14-dev" # `make fuzz` only: libFuzzer, clang's sanitizers and OpenMP
need_valgrind="valgrind"               # `make test-valgrind` only
need_browser="chromium fonts-dejavu-core" # `make test-browser` only: renders the HTML report
case "${1:-build}" in
  build) pkgs="$need_build" ;;
  test)  pkgs="$need_build $need_test" ;;
  fuzz)  pkgs="$need_build $need_test $need_fuzz" ;;
  valgrind) pkgs="$need_build $need_test $need_valgrind" ;;
  browser) pkgs="$need_build $need_test $need_browser" ;;
  *) echo "deps.sh: usage: deps.sh build|test|fuzz|valgrind|browser" >&2; exit 2 ;;
esac
missing=""
if command -v dpkg-query >/dev/null 2>&1; then
  for p in $pkgs; do
    st=$(dpkg-query -W -f='${Status}' "$p" 2>/dev/null)
    case "$st" in *"install ok installed"*) ;; *) missing="$missing $p" ;; esac
  done
else
  echo "bellcheck: this is not a Debian-like system (no dpkg-query)." >&2
  echo "bellcheck: install the equivalents of:$pkgs" >&2
  exit 1
fi
[ -z "$missing" ] && exit 0
if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
  echo "bellcheck: installing missing packages:$missing" >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq >&2 || echo "bellcheck: apt-get update failed; trying the install with the package lists at hand" >&2
  # shellcheck disable=SC2086
  apt-get install -y -qq --no-install-recommends $missing >&2 || {
    echo "bellcheck: apt-get install failed for:$missing" >&2; exit 1; }
  exit 0
fi
echo "bellcheck: missing system packages:$missing" >&2
echo "bellcheck: run as root:  apt-get update && apt-get install -y$missing" >&2
exit 1
