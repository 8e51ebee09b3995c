#!/usr/bin/python3
"""compare_workbook.py - `compare A B -o diff.xlsx` holds what `-o diff.json` holds.

Both outputs of one compare are read back: the workbook with openpyxl (the reference reader),
the JSON with Python's json module.  The Differences sheet must list the JSON's differences
in order, Where and What as the same text, A and B as the same text or, where the text is a
number, as that number; the Compared sheet names A and B and the count.  The sheets print
(landscape A4, one page wide, the header row repeated and frozen, a page header and footer,
the header fill of the palette).  Cases: a campaign against one with a run changed (CH-1's
reagent_kg 400 -> 480, as compare_ledgers.py), against itself (the "No differences." row), a
hand-edited JSON ledger whose run id holds a byte that is not UTF-8 (both files must stay
valid: JSON decodes as UTF-8, openpyxl opens the workbook), and refusals: a bad A writes
nothing and leaves an existing output as it was, -o of another extension and the same file
twice exit 2.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix).
"""
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

SRC = os.path.join(ROOT, "campaigns", "harrowmere-march.json")


def run(args, cwd):
    return subprocess.run(WRAP + [BIN] + args, cwd=cwd, capture_output=True, timeout=300)


def is_number(text):
    try:
        float(text)
    except ValueError:
        return False
    return text[:1] in "+-.0123456789" and text[:1] != ""


def both(t, tmp, a, b, what):
    """compare a b -o d.json -o d.xlsx; (json document, workbook) or (None, None)."""
    for f in ("d.json", "d.xlsx"):
        if os.path.exists(os.path.join(tmp, f)):
            os.unlink(os.path.join(tmp, f))
    p = run(["compare", a, b, "-o", "d.json", "-o", "d.xlsx"], tmp)
    if not t.check(p.returncode == 0, "%s: exit %d %s" % (what, p.returncode, p.stderr.decode())):
        return None, None
    try:
        out = p.stdout.decode("utf-8")
    except UnicodeDecodeError:
        t.check(False, "%s: the text compare is not UTF-8" % what)
        out = p.stdout.decode("utf-8", "replace")
    t.check("wrote d.json" in out and "wrote d.xlsx" in out, "%s: both outputs named" % what)
    raw = open(os.path.join(tmp, "d.json"), "rb").read()
    try:
        doc = json.loads(raw.decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        t.check(False, "%s: d.json is not UTF-8 JSON: %s" % (what, exc))
        return None, None
    import openpyxl
    try:
        wb = openpyxl.load_workbook(os.path.join(tmp, "d.xlsx"))
    except Exception as exc:  # noqa: BLE001 - any failure to open is the finding
        t.check(False, "%s: openpyxl cannot open d.xlsx: %s" % (what, exc))
        return None, None
    return doc, wb


def same_content(t, doc, wb, what):
    t.check(wb.sheetnames == ["Compared", "Differences"], "%s: sheets %r" % (what, wb.sheetnames))
    ws = wb["Differences"]
    t.check([c.value for c in ws[1]] == ["Where", "What", "A", "B"], "%s: header %r" % (what, [c.value for c in ws[1]]))
    d = doc["differences"]
    rows = [[c.value for c in r] for r in ws.iter_rows(min_row=2)]
    if not d:
        t.check(rows == [["No differences.", None, None, None]], "%s: empty table row %r" % (what, rows))
    elif t.check(len(rows) == len(d), "%s: %d rows, JSON %d" % (what, len(rows), len(d))):
        bad = 0
        for row, x in zip(rows, d):
            ok = row[0] == x["where"] and row[1] == x["what"]
            for cell, text in ((row[2], x["a"]), (row[3], x["b"])):
                if is_number(text):
                    ok = ok and isinstance(cell, (int, float)) and not isinstance(cell, bool) and cell == float(text)
                else:
                    ok = ok and cell == text
            if not ok and bad < 3:
                t.check(False, "%s: row %r against JSON %r" % (what, row, x))
            bad += not ok
        t.check(bad == 0, "%s: %d rows differ from the JSON" % (what, bad))
        t.check(ws.auto_filter.ref == "A1:D%d" % (len(d) + 1), "%s: filter %r" % (what, ws.auto_filter.ref))
    info = {r[0].value: r[1].value for r in wb["Compared"].iter_rows(min_row=2)}
    t.check(info.get("A") == doc["a"] and info.get("B") == doc["b"], "%s: Compared names %r" % (what, info))
    t.check(info.get("Differences [count]") == len(d), "%s: count %r, JSON %d" % (what, info.get("Differences [count]"), len(d)))
    for name in wb.sheetnames:
        s = wb[name]
        t.check(s.page_setup.orientation == "landscape" and str(s.page_setup.paperSize) == "9",
                "%s %s: landscape A4 (%r, %r)" % (what, name, s.page_setup.orientation, s.page_setup.paperSize))
        t.check(s.print_title_rows == "1:1" or s.print_title_rows == "$1:$1", "%s %s: header row repeated %r" % (what, name, s.print_title_rows))
        t.check(s.freeze_panes == "A2", "%s %s: header row frozen %r" % (what, name, s.freeze_panes))
        t.check(s.sheet_properties.pageSetUpPr.fitToPage and s.page_setup.fitToWidth in (1, None),
                "%s %s: one page wide" % (what, name))
        t.check("Compared" in (s.oddHeader.left.text or "") and (s.oddFooter.right.text or "").startswith("Page"),
                "%s %s: page header %r footer %r" % (what, name, s.oddHeader.left.text, s.oddFooter.right.text))
        h = s["A1"]
        t.check(h.font.b and (h.fill.fgColor.rgb or "").endswith("DDE8E1"), "%s %s: header cell bold on the palette fill" % (what, name))


def main():
    t = Tally()
    with tempfile.TemporaryDirectory() as tmp:
        c = json.load(open(SRC))
        next(r for r in c["runs"] if r["id"] == "CH-1")["reagent_kg"] = 480
        with open(os.path.join(tmp, "b.json"), "w") as f:
            json.dump(c, f)
        doc, wb = both(t, tmp, SRC, "b.json", "changed run")
        if doc:
            t.check(any(x["where"] == "run CH-1" and x["what"] == "reagent_charged.kg" and x["a"] == "400"
                        and x["b"] == "480" for x in doc["differences"]), "changed run: CH-1 charge 400 -> 480 listed")
            same_content(t, doc, wb, "changed run")
            row = next(r for r in wb["Differences"].iter_rows(min_row=2, values_only=True)
                       if r[0] == "run CH-1" and r[1] == "reagent_charged.kg")
            t.check(row[2] == 400 and row[3] == 480, "changed run: the charge as numbers 400 and 480 (%r)" % (row,))
        doc, wb = both(t, tmp, SRC, SRC, "itself")
        if doc:
            t.check(doc["differences"] == [], "itself: no differences")
            same_content(t, doc, wb, "itself")
        # a ledger edited by hand: a run id with a byte that is not UTF-8
        p = run(["report", SRC, "-o", "a.json"], tmp)
        t.check(p.returncode == 0, "report a.json: %s" % p.stderr.decode())
        raw = open(os.path.join(tmp, "a.json"), "rb").read()
        t.check(raw.count(b'"id":"CH-1"') == 1, "a.json holds run CH-1 once")
        with open(os.path.join(tmp, "x.json"), "wb") as f:
            f.write(raw.replace(b'"id":"CH-1"', b'"id":"CH-\xff1"'))
        doc, wb = both(t, tmp, "a.json", "x.json", "not UTF-8")
        if doc:
            t.check(any(x["where"] == "run CH-?1" for x in doc["differences"]),
                    "not UTF-8: the byte shown as '?' (%r)" % [x["where"] for x in doc["differences"]][:4])
            same_content(t, doc, wb, "not UTF-8")
        # refusals: nothing written, an existing output left as it was
        with open(os.path.join(tmp, "old.xlsx"), "wb") as f:
            f.write(b"previous bytes")
        with open(os.path.join(tmp, "bad.json"), "w") as f:
            f.write('{"format": "haloledger-campaign/1", "runs": [{"id": 1}]}')
        before = sorted(os.listdir(tmp))
        p = run(["compare", "bad.json", SRC, "-o", "old.xlsx", "-o", "new.json"], tmp)
        t.check(p.returncode == 2, "bad A: exit %d" % p.returncode)
        t.check(open(os.path.join(tmp, "old.xlsx"), "rb").read() == b"previous bytes", "bad A: old.xlsx untouched")
        t.check(sorted(os.listdir(tmp)) == before, "bad A: no file made or removed")
        for args, what in ((["-o", "d.csv"], "another extension"), (["-o", "d.xlsx", "-o", "./d.xlsx"], "one file twice")):
            p = run(["compare", SRC, SRC] + args, tmp)
            t.check(p.returncode == 2, "%s: exit %d" % (what, p.returncode))
        t.check(sorted(os.listdir(tmp)) == before, "refusals: no file made or removed")
    for f in t.fails:
        print("FAIL", f)
    print("compare_workbook: %d checks, %d failed" % (t.n, len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
