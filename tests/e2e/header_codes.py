#!/usr/bin/python3
"""header_codes.py - a site or title holding header/footer codes is shown as text.

The workbook's page header carries the campaign's site and title.  In a header or footer
'&' starts a code (ECMA-376 Part 1, 18.3.1.46 headerFooter: &P page, &N pages, &A sheet,
&G picture, && a literal ampersand), and libxlsxwriter 1.1.4 also rewrites the long form
"&[Picture]" to "&G"; a header that names a picture without one is refused by that library
and freed twice (a crash that tests/fuzz/fuzz_workbook found).  Each campaign here must give
a workbook (exit 0) whose first sheet's header, read by openpyxl, shows the site and the
title literally (the title between the bold codes &B ... &B): after openpyxl's own reading of the codes, '&&' back to '&' and the
zero-width spaces (U+200B) that keep '&&' apart from 'G' and '[' removed, the text is the
campaign's.
"""
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, WRAP, Tally  # noqa: E402

try:
    import openpyxl
except ImportError:
    print("header_codes: SKIPPED: python3-openpyxl not installed")
    sys.exit(77)

TEXTS = ["Bay &[Picture] east", "&[Picture]", "A&&[Picture]", "&G&G", "R&D &[Page] of &[Pages]",
         "x&[Picture", "&[Tab] &[Date]"]


def campaign(site, title):
    return {"format": "haloledger-campaign/1", "site": site, "title": title,
            "runs": [{"id": "R1", "start": "2027-05-03T06:00", "substrate": {"smiles": "CC(C)C"},
                      "substrate_kg": 100, "reagent": "Cl2", "reagent_eq": 0.5,
                      "feed_h": 2, "temp_c": 30}]}


def shown(text):
    return (text or "").replace("\u200b", "").replace("&&", "&")


def main():
    t = Tally()
    with tempfile.TemporaryDirectory() as d:
        for k, s in enumerate(TEXTS):
            camp = os.path.join(d, "c%d.json" % k)
            book = os.path.join(d, "c%d.xlsx" % k)
            with open(camp, "w", encoding="utf-8") as f:
                json.dump(campaign(s, "Title " + s), f)
            p = subprocess.run(WRAP + [BIN, "report", camp, "-o", book], capture_output=True)
            if not t.check(p.returncode == 0 and os.path.exists(book),
                           "site %r: exit %d, %s" % (s, p.returncode, p.stderr.decode(errors="replace")[-300:])):
                continue
            ws = openpyxl.load_workbook(book).worksheets[0]
            left, centre = ws.oddHeader.left.text, ws.oddHeader.center.text
            t.check(shown(left) == s, "site %r: header left reads %r" % (s, left))
            # the title is set in bold: "&B...&B" (openpyxl keeps those codes in the text)
            bold = centre or ""
            bold = bold[2:-2] if bold.startswith("&B") and bold.endswith("&B") else None
            t.check(bold is not None and shown(bold) == "Title " + s, "title %r: header centre reads %r" % (s, centre))
    for f in t.fails:
        print("header_codes: FAIL: " + f)
    print("header_codes: %d checks, %d failed" % (t.n, len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
