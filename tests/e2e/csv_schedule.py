#!/usr/bin/python3
"""csv_schedule.py - a CSV schedule gives the ledger of the JSON campaign with the same runs.

Each example campaign's runs[] is written out as CSV rows (by Python's csv module, the
reference writer here, in the dialects spreadsheets write: RFC 4180 commas; semicolons
with a decimal comma, a UTF-8 byte-order mark and CRLF as LibreOffice Calc and Excel write
for a comma-decimal locale; tabs; cells quoted with embedded separators, quotes and line
ends; dates as "2027-03-02 06:00"), and the plant data kept as JSON with "schedule" or
the rows given with --schedule.  The JSON ledger of each variant must equal the ledger of
the original campaign in every key but campaign.file.  The template command's output
must read back as a schedule.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix).
"""
import csv
import io
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

CAMPAIGNS = ["campaigns/harrowmere-march.json", "campaigns/harrowmere-nbs-hbr.json",
             "tests/campaigns/overlap-two-month.json", "tests/campaigns/close-hand.json"]
COLUMNS = ["id", "start", "reactor", "scrubber", "substrate_name", "substrate_smiles",
           "substrate_formula", "product_smiles", "substrate_kg", "reagent", "reagent_eq",
           "reagent_kg", "halogen_conversion", "temp_c", "feed_h", "peak_factor",
           "vent_retained_fraction", "reactor_mode", "repeat_count", "repeat_every_days", "note",
           "solvent_kg", "mass_cp_kj_kg_k", "accumulation", "mtt_c", "td24_c",
           "actual_status", "actual_reagent_kg", "actual_product_kg", "actual_naoh_kg", "actual_end",
           "actual_note"]


def flat(run):
    """A runs[] entry as {column: value} (the CSV columns are the keys joined by '_')."""
    out = {}
    for k, v in run.items():
        if isinstance(v, dict):
            for k2, v2 in v.items():
                out[k + "_" + k2] = v2
        else:
            out[k] = v
    return out


def cell(v, decimal_comma, spaced_date, col):
    if v is None:
        return ""
    if isinstance(v, float) or isinstance(v, int):
        t = repr(v) if isinstance(v, float) else str(v)
        return t.replace(".", ",") if decimal_comma else t
    if col in ("start", "actual_end") and spaced_date and "T" in v:
        return v.replace("T", " ")
    return v


def write_csv(runs, path, sep, decimal_comma, bom, crlf, spaced_date, quote_all, note):
    buf = io.StringIO()
    w = csv.writer(buf, delimiter=sep, lineterminator="\r\n" if crlf else "\n",
                   quoting=csv.QUOTE_ALL if quote_all else csv.QUOTE_MINIMAL)
    w.writerow(COLUMNS)
    for i, r in enumerate(runs):
        f = flat(r)
        if note:
            f["note"] = 'line 1%s "two"\nline 2' % sep
        w.writerow([cell(f.get(c), decimal_comma, spaced_date and i % 2 == 0, c) for c in COLUMNS])
        if i == 0:
            w.writerow([""] * len(COLUMNS))  # the empty row a spreadsheet leaves
    data = buf.getvalue().encode("utf-8")
    with open(path, "wb") as fh:
        fh.write((b"\xef\xbb\xbf" if bom else b"") + data)


def ledger(args, out, cwd):
    p = subprocess.run(WRAP + [BIN, "report"] + args + ["-o", out], cwd=cwd, capture_output=True,
                       timeout=300)
    if p.returncode != 0:
        return None, p.stderr.decode("utf-8", "replace")
    with open(out) as fh:
        d = json.load(fh)
    d["campaign"].pop("file", None)
    return d, ""


DIALECTS = [  # sep, decimal comma, BOM, CRLF, "YYYY-MM-DD HH:MM", quote all, note with sep/quote/newline
    (",", False, False, False, False, False, False),
    (";", True, True, True, True, False, True),
    ("\t", True, False, True, False, False, False),
    (",", False, True, True, True, True, True),
]


def main():
    t = Tally()
    with tempfile.TemporaryDirectory() as tmp:
        for src in CAMPAIGNS:
            name = os.path.basename(src)[:-5]
            camp = json.load(open(os.path.join(ROOT, src)))
            ref, err = ledger([os.path.join(ROOT, src)], os.path.join(tmp, name + "-ref.json"), tmp)
            if not t.check(ref is not None, "%s: JSON report failed: %s" % (src, err)):
                continue
            for k, d in enumerate(DIALECTS):
                csvp = os.path.join(tmp, "%s-%d.csv" % (name, k))
                write_csv(camp["runs"], csvp, *d)
                plant = dict(camp)
                plant.pop("runs")
                plant["schedule"] = os.path.basename(csvp)
                pj = os.path.join(tmp, "%s-%d.json" % (name, k))
                with open(pj, "w") as fh:
                    json.dump(plant, fh)
                got, err = ledger([pj], os.path.join(tmp, "out.json"), tmp)
                if t.check(got is not None, "%s dialect %d: report failed: %s" % (src, k, err)):
                    t.check(got == ref, "%s dialect %d: ledger differs from the JSON campaign's" % (src, k))
                # the same rows from the command line, the campaign with runs: []
                plant.pop("schedule")
                plant["runs"] = []
                with open(pj, "w") as fh:
                    json.dump(plant, fh)
                sep = {",": ",", ";": ";", "\t": "tab"}[d[0]]
                got, err = ledger([pj, "--schedule", csvp, "--csv-sep", sep], os.path.join(tmp, "out.json"), tmp)
                if t.check(got is not None, "%s dialect %d --schedule: report failed: %s" % (src, k, err)):
                    t.check(got == ref, "%s dialect %d --schedule: ledger differs" % (src, k))
        # half the runs in runs[], the other half in the schedule: still the same ledger
        src = CAMPAIGNS[0]
        camp = json.load(open(os.path.join(ROOT, src)))
        ref, _ = ledger([os.path.join(ROOT, src)], os.path.join(tmp, "ref.json"), tmp)
        csvp = os.path.join(tmp, "half.csv")
        write_csv(camp["runs"][2:], csvp, ",", False, False, False, False, False, False)
        camp["runs"] = camp["runs"][:2]
        camp["schedule"] = ["half.csv"]
        with open(os.path.join(tmp, "half.json"), "w") as fh:
            json.dump(camp, fh)
        got, err = ledger([os.path.join(tmp, "half.json")], os.path.join(tmp, "out.json"), tmp)
        if t.check(got is not None, "half and half: %s" % err):
            t.check(got == ref, "half in runs[], half in the schedule: ledger differs")
        # the template's example reads as a schedule against a plant with VS-1
        p = subprocess.run(WRAP + [BIN, "schedule-template", "--example", "-o", "ex.csv"], cwd=tmp,
                           capture_output=True, timeout=60)
        t.check(p.returncode == 0, "schedule-template --example: exit %d" % p.returncode)
        rows = list(csv.reader(open(os.path.join(tmp, "ex.csv"), newline="")))
        t.check(len(rows) == 4 and all(len(r) == len(rows[0]) for r in rows),
                "template example: 1 header + 3 rows of equal width (got %s)" % [len(r) for r in rows])
        plant = {"format": "haloledger-campaign/1", "schedule": "ex.csv", "scrubbers": [
            {"id": "VS-1", "naoh_wt_pct": 18, "liquor_kg": 6000, "rated_acid_kmol_h": 5}]}
        with open(os.path.join(tmp, "ex.json"), "w") as fh:
            json.dump(plant, fh)
        got, err = ledger([os.path.join(tmp, "ex.json")], os.path.join(tmp, "ex-out.json"), tmp)
        if t.check(got is not None, "template example campaign: %s" % err):
            t.check([r["id"] for r in got["runs"]] == ["EX-1", "EX-2", "EX-3-1", "EX-3-2", "EX-3-3"],
                    "template example: run ids %s" % [r["id"] for r in got["runs"]])
        p = subprocess.run(WRAP + [BIN, "schedule-template"], cwd=tmp, capture_output=True, timeout=60)
        head = p.stdout.decode().rstrip("\r\n").split(",")
        t.check(p.returncode == 0 and head[:2] == ["id", "start"] and "substrate_smiles" in head,
                "schedule-template prints the header (got %r)" % head[:4])
    for f in t.fails:
        print("FAIL", f)
    print("csv_schedule: %d checks, %d failed" % (t.n, len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
