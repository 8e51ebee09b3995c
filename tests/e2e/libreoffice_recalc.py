"""Every cached formula value in the workbook is what LibreOffice computes.

LibreOffice headless shows an xlsx's cached values unless its profile asks for a
recalculation on load (Calc setting Formula/Load/OOXMLRecalcMode = 0, "always"). Each demo
workbook is converted to CSV (one file per sheet) twice, with a recalculating profile and with
a default one; equal CSVs mean every cached total equals its formula's result and that the
file opens in an independent spreadsheet program. A self-check first proves the recalculating
profile does recalculate: a formula written by openpyxl carries no cached value, so only a
recalculation shows its result.
"""
import csv
import glob
import io
import os
import shutil
import subprocess
import sys
import tempfile

from _hl import BIN, ROOT, Tally

SOFFICE = shutil.which("soffice")
if not SOFFICE:
    print("libreoffice_recalc: SKIPPED (soffice not installed; make deps installs libreoffice-calc-nogui)")
    sys.exit(77)  # tests/run.sh: skipped (a failure under CI: a required check)

import openpyxl  # noqa: E402

CSV = "csv:Text - txt - csv (StarCalc):44,34,UTF8,1,,0,false,true,false,false,false,-1"
XCU = """<?xml version="1.0" encoding="UTF-8"?>
<oor:items xmlns:oor="http://openoffice.org/2001/registry" xmlns:xs="http://www.w3.org/2001/XMLSchema" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="OOXMLRecalcMode" oor:op="fuse"><value>0</value></prop></item>
</oor:items>
"""
T = Tally()


def same_csv(x, y):
    """Cell by cell: text equal, numbers equal to 1e-12 relative (a sum taken in another order
    may differ in its 15th digit)."""
    rx, ry = list(csv.reader(io.StringIO(x.decode()))), list(csv.reader(io.StringIO(y.decode())))
    if len(rx) != len(ry):
        return False
    for a, b in zip(rx, ry):
        if len(a) != len(b):
            return False
        for u, v in zip(a, b):
            if u == v:
                continue
            try:
                fu, fv = float(u), float(v)
            except ValueError:
                return False
            if abs(fu - fv) > 1e-12 * max(abs(fu), abs(fv)):
                return False
    return True


def convert(book, outdir, profile):
    os.makedirs(outdir, exist_ok=True)
    p = subprocess.run([SOFFICE, f"-env:UserInstallation=file://{profile}", "--headless",
                        "--convert-to", CSV, "--outdir", outdir, book],
                       capture_output=True, text=True, timeout=180)
    T.check(p.returncode == 0, f"soffice on {book}: exit {p.returncode} {p.stderr.strip()}")
    return {os.path.basename(f): open(f, "rb").read() for f in glob.glob(os.path.join(outdir, "*.csv"))}


with tempfile.TemporaryDirectory() as d:
    recalc, plain = os.path.join(d, "recalc-profile"), os.path.join(d, "plain-profile")
    os.makedirs(os.path.join(recalc, "user"))
    with open(os.path.join(recalc, "user", "registrymodifications.xcu"), "w") as f:
        f.write(XCU)
    # self-check: the recalculating profile computes a formula that has no cached value
    probe = os.path.join(d, "probe.xlsx")
    wb = openpyxl.Workbook()
    wb.active["A1"] = 2
    wb.active["A2"] = "=A1*3"
    wb.save(probe)
    r = convert(probe, os.path.join(d, "probe-r"), recalc)
    T.check(any(b"6" in v for v in r.values()), f"recalculating profile did not compute =A1*3: {r}")
    # the demo workbooks: cached values equal recalculated ones, sheet by sheet
    books = []
    for camp in sorted(glob.glob(os.path.join(ROOT, "campaigns", "*.json"))):
        name = os.path.basename(camp)[:-5]
        book = os.path.join(d, name + ".xlsx")
        p = subprocess.run([BIN, "report", camp, "-o", book], capture_output=True, text=True)
        if not T.check(p.returncode == 0, f"{name}: report exit {p.returncode}"):
            continue
        a = convert(book, os.path.join(d, name + "-r"), recalc)
        b = convert(book, os.path.join(d, name + "-p"), plain)
        T.check(len(a) == 23 and a.keys() == b.keys(), f"{name}: sheets {sorted(a)} / {sorted(b)}")
        for sheet in sorted(a):
            T.check(same_csv(a[sheet], b.get(sheet, b"")), f"{name}: {sheet} differs after recalculation")
        books.append(name)

for f in T.fails:
    print("FAIL:", f)
print(f"libreoffice_recalc: {T.n - len(T.fails)}/{T.n} checks passed ({len(books)} workbooks)")
sys.exit(1 if T.fails else 0)
