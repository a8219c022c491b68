#!/bin/sh
# Checks for the system libraries WeasyPrint loads at run time (Pango, HarfBuzz and its font subsetter,
# fontconfig), the poppler/qpdf tools the tests use to read PDFs independently, and the PostgreSQL
# server (the register's tests and benchmark start a throwaway cluster from it to check the server
# back end; specgen itself needs no server). Installs them when we are root and apt-get exists;
# otherwise stops with the exact command to run.
need=""
have_lib() { ldconfig -p 2>/dev/null | grep -q "$1"; }
have_lib libpango-1.0.so    || need="$need libpango-1.0-0"
have_lib libpangoft2-1.0.so || need="$need libpangoft2-1.0-0"
have_lib libharfbuzz.so     || need="$need libharfbuzz0b"
have_lib libharfbuzz-subset.so || need="$need libharfbuzz-subset0"   # font subsetting: smaller PDFs
have_lib libfontconfig.so   || need="$need libfontconfig1"
command -v pdftoppm >/dev/null 2>&1 || need="$need poppler-utils"
command -v qpdf     >/dev/null 2>&1 || need="$need qpdf"
command -v sqlite3  >/dev/null 2>&1 || need="$need sqlite3"
fc-list 2>/dev/null | grep -qi dejavu || need="$need fonts-dejavu-core"
pg=""
ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 || pg=" postgresql"
need="$need$pg"
[ -z "$need" ] && exit 0
if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
  [ -n "$pg" ] && echo "sysdeps: installing the PostgreSQL server (postgresql) so the register tests can start a throwaway cluster on a local socket"
  echo "sysdeps: installing$need"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq >/dev/null && apt-get install -y -qq $need >/dev/null || {
    echo "sysdeps: apt-get failed; run: sudo apt-get install -y$need" >&2; exit 1; }
elif [ "$need" = "$pg" ]; then
  # only the server is missing: specgen runs without it; its tests of the server back end are skipped
  echo "sysdeps: no PostgreSQL server: the register's PostgreSQL tests will be skipped (sudo apt-get install -y postgresql)" >&2
else
  echo "sysdeps: missing system packages. Run:  sudo apt-get install -y$need" >&2
  echo "sysdeps: (on other systems install Pango >= 1.44, poppler-utils, qpdf, sqlite3 and a PostgreSQL server with your package manager)" >&2
  exit 1
fi
