#!/bin/sh
# deps.sh - install what is missing of the Debian packages haloledger builds and tests with.
# Uses apt-get as root, else sudo; otherwise prints the exact command to run.
# `sh tools/deps.sh --list` prints the package list, one a line, and installs nothing.
#
# build: pkg-config, gcc, make and the -dev libraries;
#   libc6-dev: -lm and the C headers (gcc only recommends it, so --no-install-recommends drops it);
#   zlib1g-dev: libxlsxwriter's pkg-config data puts -lz on the link line and libxlsxwriter-dev does
#   not depend on zlib1g-dev, so without it `ld: cannot find -lz` (docs/library-notes.md). We keep
#   the link line as the library's pkg-config file states it rather than filtering flags out of it.
#   libcsv-dev: the CSV schedule reader (src/sched.c); it has no pkg-config file, so the Makefile
#   names -lcsv itself.
# tests: Debian's python3 with RDKit and openpyxl (reference readers), valgrind (allocation-failure
#   walk), clang + libFuzzer runtime (fuzz targets and their regression run), LibreOffice Calc
#   (cached formula values against a real recalculation; the PDF export of the printed pages),
#   poppler-utils (pdftotext -bbox, pdftoppm: text positions and page images of that PDF) and
#   fonts-crosextra-carlito (metric-compatible with Calibri, the workbook's default font, so the
#   pages LibreOffice lays out break where a spreadsheet program with Calibri would).
PKGS="pkg-config gcc libc6-dev make libxlsxwriter-dev zlib1g-dev libcjson-dev libcsv-dev libcunit1-dev
python3 python3-rdkit python3-openpyxl valgrind clang-14 libclang-rt-14-dev libreoffice-calc-nogui
poppler-utils fonts-crosextra-carlito"
if [ "${1:-}" = --list ]; then
    printf '%s\n' $PKGS
    exit 0
fi
missing=""
for p in $PKGS; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
[ -z "$missing" ] && exit 0
echo "haloledger: installing missing Debian packages:$missing"
if [ "$(id -u)" = 0 ]; then
    SUDO=""
elif command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then
    SUDO="sudo"
else
    echo "haloledger: cannot install packages (not root, no password-less sudo). Run as root:" >&2
    echo "  apt-get update && apt-get install -y$missing" >&2
    exit 1
fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq && $SUDO apt-get install -y -qq $missing >/dev/null || {
    echo "haloledger: apt-get failed; run: apt-get update && apt-get install -y$missing" >&2
    exit 1
}
