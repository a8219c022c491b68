#!/bin/sh
# Checks for the system libraries WeasyPrint loads at run time (Pango, HarfBuzz and its font subsetter,
# fontconfig), the poppler/qpdf tools the tests use to read PDFs independently, and the PostgreSQL
# server (the register's tests and benchmark start a throwaway cluster from it to check the server
# back end; specgen itself needs no server). Installs them when we are root and apt-get exists, after
# one line that says what it installs and why; otherwise stops with the exact command to run.
need=""
why=""
add() { need="$need $1"; why="$why${why:+; }$1: $2"; }
have_lib() { ldconfig -p 2>/dev/null | grep -q "$1"; }
have_lib libpango-1.0.so       || add libpango-1.0-0 "text layout of the PDF documents"
have_lib libpangoft2-1.0.so    || add libpangoft2-1.0-0 "fonts for that layout"
have_lib libharfbuzz.so        || add libharfbuzz0b "text shaping in the PDFs"
have_lib libharfbuzz-subset.so || add libharfbuzz-subset0 "font subsetting: smaller PDFs"
have_lib libfontconfig.so      || add libfontconfig1 "finding the fonts"
command -v pdftoppm >/dev/null 2>&1 || add poppler-utils "tests read the PDFs as pictures"
command -v qpdf     >/dev/null 2>&1 || add qpdf "tests check the PDFs' structure"
command -v sqlite3  >/dev/null 2>&1 || add sqlite3 "to look into the register file by hand"
fc-list 2>/dev/null | grep -qi dejavu || add fonts-dejavu-core "the documents' font"
pg=""
if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1; then
  pg=" postgresql"
  add postgresql "the register's tests start a throwaway server on a local socket"
fi
browser=""
if ! test -x /usr/bin/chromium; then
  browser=" chromium"
  add chromium "the station's browser test drives the distribution's Chromium (no browser is downloaded)"
fi
[ -z "$need" ] && exit 0
if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
  echo "sysdeps: running apt-get as root to install system packages specgen needs ($why)"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq >/dev/null && apt-get install -y -qq $need >/dev/null || {
    echo "sysdeps: apt-get failed; run: sudo apt-get install -y$need" >&2; exit 1; }
elif [ "$need" = "$pg$browser" ]; then
  # only the server or the browser is missing: specgen runs without them; the tests that need them are skipped
  if [ -n "$pg" ]; then
    echo "sysdeps: no PostgreSQL server: the register's PostgreSQL tests will be skipped (sudo apt-get install -y postgresql)" >&2
  fi
  if [ -n "$browser" ]; then
    echo "sysdeps: no Chromium: the station's browser test will be skipped (sudo apt-get install -y chromium)" >&2
  fi
  exit 0
else
  echo "sysdeps: missing system packages ($why). Run:  sudo apt-get install -y$need" >&2
  echo "sysdeps: (on other systems install Pango >= 1.44, poppler-utils, qpdf, sqlite3 and a PostgreSQL server with your package manager)" >&2
  exit 1
fi
