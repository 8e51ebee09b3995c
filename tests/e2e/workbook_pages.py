"""The printed workbook: each demo workbook exported to PDF by LibreOffice, read back as text
positions (poppler's pdftotext -bbox-layout) and rendered to page images (pdftoppm) for a person
to look at, in $BUILD/pages/CAMPAIGN/page-NN.png.

Checks, per page of every demo workbook:
  * no overprinted text: no two word boxes on a page overlap by more than OVER_X points across
    and a third of the lower word's height down (words of one line sit side by side, lines of a
    wrapped cell one below the other; a text running into its neighbour's cell, or two texts
    printed at one place, overlap);
  * readable size: the median word height on the page is at least MIN_PT points (a sheet squeezed
    to one page wide prints microscopic);
  * the running header names the sheet at the right and the footer reads "Page N of M" with N the
    page and M the page count (LibreOffice expands &A, &P and &N);
  * the Summary prints on exactly one page, and every sheet prints at least one page.
A seeded overlap (two texts written at one place in a workbook made with openpyxl) must be found,
so the overlap check cannot pass on nothing.
"""
import glob
import os
import re
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

from _hl import BIN, BUILD, ROOT, Tally

SOFFICE, PDFTOTEXT, PDFTOPPM = (shutil.which(x) for x in ("soffice", "pdftotext", "pdftoppm"))
T = Tally()
if not (SOFFICE and PDFTOTEXT and PDFTOPPM):
    # not a pass: make deps installs libreoffice-calc-nogui and poppler-utils
    print("workbook_pages: FAILED, needs soffice, pdftotext and pdftoppm (run make deps)")
    sys.exit(1)

import openpyxl  # noqa: E402

OVER_X = 0.8      # points of horizontal overlap tolerated (kerning of adjacent boxes)
MIN_PT = 6.0      # median word height on a page [pt]
SHEETS = ["Summary", "Runs", "Products", "Liquor by run", "Scrubber units", "Hourly load", "Column check",
          "Emissions by run", "Emissions by hour", "Permit checks", "Emission charts", "Orders", "Plan vs actual", "Stock checks", "Waste by run", "Spent liquor", "Reaction heat", "Monthly", "Monthly yields", "Charts", "Warnings", "Cautions", "Assumptions"]
NS = "{http://www.w3.org/1999/xhtml}"


def to_pdf(book, outdir, profile):
    p = subprocess.run([SOFFICE, f"-env:UserInstallation=file://{profile}", "--headless",
                        "--convert-to", "pdf", "--outdir", outdir, book],
                       capture_output=True, text=True, timeout=300)
    pdf = os.path.join(outdir, os.path.basename(book)[:-5] + ".pdf")
    T.check(p.returncode == 0 and os.path.exists(pdf), f"soffice pdf of {book}: {p.returncode} {p.stderr.strip()}")
    return pdf


def pages(pdf):
    """[(width, height, [(xmin, ymin, xmax, ymax, text)])] from pdftotext -bbox-layout."""
    p = subprocess.run([PDFTOTEXT, "-bbox-layout", pdf, "-"], capture_output=True, text=True)
    T.check(p.returncode == 0, f"pdftotext {pdf}: {p.stderr.strip()}")
    root = ET.fromstring(p.stdout)
    out = []
    for pg in root.iter(NS + "page"):
        words = [(float(w.get("xMin")), float(w.get("yMin")), float(w.get("xMax")), float(w.get("yMax")), w.text or "")
                 for w in pg.iter(NS + "word")]
        out.append((float(pg.get("width")), float(pg.get("height")), words))
    return out


def overlaps(words):
    """Pairs of word boxes that overlap (sweep over x, so it stays fast on full pages)."""
    found = []
    ws = sorted(words)
    for i, a in enumerate(ws):
        for b in ws[i + 1:]:
            if b[0] >= a[2] - OVER_X:
                break
            ix = min(a[2], b[2]) - max(a[0], b[0])
            iy = min(a[3], b[3]) - max(a[1], b[1])
            if ix > OVER_X and iy > min(a[3] - a[1], b[3] - b[1]) / 3:
                found.append((a, b))
    return found


def check_book(name, pdf, imgdir):
    pg = pages(pdf)
    n = len(pg)
    T.check(n >= len(SHEETS), f"{name}: {n} pages for {len(SHEETS)} sheets")
    per_sheet = {}
    for k, (pw, ph, words) in enumerate(pg, 1):
        T.check(pw > ph, f"{name} page {k}: not landscape ({pw} x {ph})")
        bad = overlaps(words)
        T.check(not bad, f"{name} page {k}: overprinted text {[(a[4], b[4]) for a, b in bad[:4]]}")
        hs = sorted(w[3] - w[1] for w in words)
        T.check(hs and hs[len(hs) // 2] >= MIN_PT, f"{name} page {k}: median word height {hs[len(hs) // 2] if hs else 0:.1f} pt")
        head = [w for w in words if w[3] < 0.09 * ph]
        right = " ".join(w[4] for w in sorted(head, key=lambda w: w[0]) if w[0] > 0.75 * pw)
        sheet = next((s for s in sorted(SHEETS, key=len, reverse=True) if right.endswith(s)), None)
        T.check(sheet, f"{name} page {k}: header right {right!r} names no sheet")
        per_sheet[sheet] = per_sheet.get(sheet, 0) + 1
        foot = " ".join(w[4] for w in sorted((w for w in words if w[1] > 0.91 * ph), key=lambda w: w[0]))
        T.check(f"Page {k} of {n}" in foot, f"{name} page {k}: footer {foot!r} lacks 'Page {k} of {n}'")
        T.check("Ledger issued" in foot, f"{name} page {k}: footer {foot!r} lacks the issue date")
    T.check(per_sheet.get("Summary") == 1, f"{name}: the Summary prints on {per_sheet.get('Summary')} pages")
    T.check(all(per_sheet.get(s, 0) >= 1 for s in SHEETS), f"{name}: pages per sheet {per_sheet}")
    os.makedirs(imgdir, exist_ok=True)
    for f in glob.glob(os.path.join(imgdir, "page-*.png")):
        os.unlink(f)
    p = subprocess.run([PDFTOPPM, "-r", "40", "-png", pdf, os.path.join(imgdir, "page")], capture_output=True, text=True)
    T.check(p.returncode == 0 and len(glob.glob(os.path.join(imgdir, "page-*.png"))) == n,
            f"{name}: pdftoppm made {len(glob.glob(os.path.join(imgdir, 'page-*.png')))} of {n} images")
    return n


def self_check(d, profile):
    """The overlap test finds what it guards against: on boxes made up here, and on a real PDF of a
    workbook made with openpyxl whose wrapped text is given a row too low to hold it (the way wrapped
    Cautions once printed over the next row)."""
    fake = [(10, 10, 60, 20, "one"), (30, 11, 80, 21, "two"), (100, 10, 150, 20, "apart")]
    T.check(len(overlaps(fake)) == 1, "self-check: two words printed at one place are found")
    T.check(not overlaps([(10, 10, 60, 20, "a"), (60.5, 10, 90, 20, "b"), (10, 21, 60, 31, "c")]),
            "self-check: words side by side and lines one below the other are not overlaps")
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.column_dimensions["A"].width = 12
    ws["A1"] = "a wrapped text of many words that needs five lines or more at this width"
    ws["A1"].alignment = openpyxl.styles.Alignment(wrap_text=True, vertical="top")
    ws.row_dimensions[1].height = 15
    ws["A2"] = "next row text"
    ws["A2"].alignment = openpyxl.styles.Alignment(vertical="top")
    book = os.path.join(d, "seed.xlsx")
    wb.save(book)
    pdf = to_pdf(book, os.path.join(d, "seed"), profile)
    words = pages(pdf)[0][2] if os.path.exists(pdf) else []
    T.check(words and overlaps(words), f"self-check: a wrapped text in a too-low row is found ({len(words)} words)")


def main():
    outroot = os.path.join(ROOT, BUILD, "pages")
    npages = 0
    with tempfile.TemporaryDirectory() as d:
        profile = os.path.join(d, "profile")
        self_check(d, profile)
        books = 0
        for camp in sorted(glob.glob(os.path.join(ROOT, "campaigns", "*.json"))):
            name = os.path.basename(camp)[:-5]
            book = os.path.join(d, name + ".xlsx")
            p = subprocess.run([BIN, "report", camp, "-o", book], capture_output=True, text=True)
            if not T.check(p.returncode == 0, f"{name}: report exit {p.returncode}"):
                continue
            pdf = to_pdf(book, d, profile)
            if os.path.exists(pdf):
                npages += check_book(name, pdf, os.path.join(outroot, name))
                books += 1
    for f in T.fails:
        print("FAIL:", f)
    print(f"workbook_pages: {T.n - len(T.fails)}/{T.n} checks passed ({books} workbooks, {npages} pages; "
          f"images in {os.path.relpath(outroot, ROOT)}/)")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
