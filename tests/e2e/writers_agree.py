#!/usr/bin/python3
"""writers_agree.py - the JSON ledger and the workbook say the same thing, table by table.

Every table on a column list (include/ltable.h) is written by both writers from one entry
per field.  tool_ltable prints the lists (which JSON key goes with which sheet header, in
which sheet column); this script reports the demo campaigns and a campaign of its own (two
units, one a water liquor without a stack flow, permits in kg/h, mg/Nm3 and t/yr, stock
counts, a reagent with no container in a trimmed catalog) and those of tests/campaigns (a soda
ash liquor among them) to .json and .xlsx, reads the
JSON with Python's json module and the workbook with openpyxl, and checks, for every entry
with both a key and a header:
  - the sheet's header row has the entry's header in the entry's column, and no other column;
  - the sheet's autofilter spans as many data rows as the JSON table has records; on each the
    cell agrees with the JSON value: a number equal (1e-13 relative), a text equal, a date
    the same minute, true as "yes" or an alarm marker ("!..."), false as "no", a list of run
    ids as the ids joined with ", " (a long one cut with "..."), null as a blank or a text,
    a key left out as a blank cell.
Every table must have compared at least one row, or the check says so and fails.
Env: HALOLEDGER, HL_ROOT, BUILD, HL_WRAP.
"""
import datetime
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, BUILD, ROOT, WRAP, Tally  # noqa: E402

import openpyxl  # noqa: E402

T = Tally()
TOOL = os.path.join(ROOT, BUILD, "tool_ltable")
ABSENT = object()
DATE = re.compile(r"^\d{4}-\d\d-\d\d(T\d\d:\d\d)?$")


def run(rid, start, scrub, reagent, kg, feed_h=2):
    return {"id": rid, "start": start, "reactor": "R1", "scrubber": scrub,
            "substrate": {"name": "toluene", "smiles": "Cc1ccccc1"}, "substrate_kg": 900,
            "reagent": reagent, "reagent_kg": kg, "halogen_conversion": 0.95, "temp_c": 60,
            "feed_h": feed_h}


# Invented test bench: every branch of the shared tables' values appears at least once.
CAMPAIGN = {
    "format": "haloledger-campaign/1", "title": "writers agree", "site": "test bench",
    "scrubbers": [
        {"id": "VS-E", "liquor": "naoh", "naoh_wt_pct": 10, "liquor_kg": 400, "min_naoh_wt_pct": 1,
         "rated_acid_kmol_h": 1.5, "max_liquor_temp_c": 150, "stack_nm3_h": 900},
        {"id": "VS-W", "liquor": "water", "liquor_kg": 1000, "max_acid_wt_pct": 30,
         "rated_acid_kmol_h": 0.1},
    ],
    "permits": [
        {"scrubber": "VS-E", "species": "HCl", "max_kg_h": 0.5, "max_mg_nm3": 100, "max_t_yr": 5},
        {"scrubber": "VS-E", "species": "Br2", "max_kg_h": 1.0, "averaging": "day"},
        {"scrubber": "VS-W", "species": "HCl", "max_mg_nm3": 5},
    ],
    "stock": [{"reagent": "Cl2", "on_hand_kg": 100, "safety_kg": 50, "lead_days": 10}],
    "counts": [{"reagent": "Cl2", "date": "2027-03-04", "kg": 20},
               {"reagent": "Cl2", "date": "2027-03-20", "kg": 20}],
    "runs": [
        run("A", "2027-03-02T06:00", "VS-E", "Cl2", 80),
        run("B", "2027-03-02T07:00", "VS-E", "Cl2", 80),
        run("C", "2027-03-06T06:00", "VS-E", "SO2Cl2", 150),
        run("D", "2027-03-09T06:00", "VS-W", "Cl2", 10),
        run("E", "2027-03-12T06:00", "VS-E", "Cl2", 80),
    ],
}


def lists():
    """{sheet: (path, [(key, head, column)])} of the entries with a key and a header."""
    p = subprocess.run([TOOL], capture_output=True, text=True, timeout=60)
    T.check(p.returncode == 0, f"tool_ltable exit {p.returncode}: {p.stderr[-300:]}")
    out, cur, heads = {}, None, {}
    for line in p.stdout.splitlines():
        f = line.split("\t")
        if f[0] == "table":
            cur = f[2]
            out[cur] = (f[1], [])
            heads[cur] = 0
        elif f[0] == "col" and cur:
            key, head, col = f[1], f[2], int(f[3])
            if head != "-":
                heads[cur] += 1
            if key != "-" and head != "-":
                out[cur][1].append((key, head, col))
    return out, heads


def records(d, path):
    """The JSON records of a table path: "orders", "runs[].products" (every run's products in
    turn), "runs[actual]" (the runs whose "actual" is not null)."""
    m = re.match(r"^(\w+)\[(\w*)\](?:\.(\w+))?$", path)
    if not m:
        return d[path]
    outer, having, inner = m.groups()
    rows = [r for r in d[outer] if not having or r.get(having) is not None]
    return [x for r in rows for x in r[inner]] if inner else rows


SKIP = object()


def lookup(rec, key):
    """rec's value at a dotted key ("reaction.heat_kj"): ABSENT when the key is left out,
    SKIP when the object holding it is null (the JSON says nothing to hold the cell to)."""
    *groups, last = key.split(".")
    for g in groups:
        if g not in rec:
            return ABSENT
        rec = rec[g]
        if rec is None:
            return SKIP
    return rec.get(last, ABSENT)


def head_ok(head, cell):
    if not isinstance(cell, str):
        return False
    if "%s" not in head:
        return cell == head
    a, b = head.split("%s")
    return cell.startswith(a) and cell.endswith(b) and len(cell) > len(a) + len(b)


def minute(cell):
    if isinstance(cell, datetime.datetime):
        t = cell + datetime.timedelta(seconds=30)
        return t.strftime("%Y-%m-%dT%H:%M")
    return None


def agrees(jv, cell):
    if jv is ABSENT:
        return cell is None
    if jv is None:
        return cell is None or isinstance(cell, str)
    if isinstance(jv, bool):
        if jv:
            return cell == "yes" or (isinstance(cell, str) and cell.startswith("!"))
        return cell == "no"
    if isinstance(jv, (int, float)):
        return (isinstance(cell, (int, float)) and not isinstance(cell, bool)
                and abs(cell - jv) <= 1e-13 * max(abs(jv), 1e-300))
    if isinstance(jv, list):
        joined = ", ".join(jv)
        return cell == joined or (joined == "" and cell is None) or (
            isinstance(cell, str) and cell.endswith("...") and joined.startswith(cell[:-3]))
    if isinstance(jv, str) and DATE.match(jv) and isinstance(cell, datetime.datetime):
        m = minute(cell)
        return m == jv if "T" in jv else m[:10] == jv
    return cell == jv


def compare(tag, d, wb, tables, heads, seen):
    for sheet, (path, cols) in tables.items():
        recs = records(d, path)
        if not T.check(sheet in wb.sheetnames, f"{tag}: no sheet {sheet}"):
            continue
        ws = wb[sheet]
        row1 = [c.value for c in ws[1]]
        T.check(len([v for v in row1 if v is not None]) == heads[sheet],
                f"{tag}: {sheet} has {len(row1)} header cells, the list {heads[sheet]}")
        for key, head, col in cols:
            T.check(col >= 1 and head_ok(head, ws.cell(1, col).value),
                    f"{tag}: {sheet} column {col} is {ws.cell(1, col).value!r}, list says {head!r}")
        # the autofilter spans the header and the data rows
        ref = ws.auto_filter.ref or ""
        m = re.match(r"^A1:[A-Z]+(\d+)$", ref)
        T.check(bool(m) and int(m.group(1)) == len(recs) + 1,
                f"{tag}: {sheet} filters {ref!r}, the JSON has {len(recs)} records")
        for n, rec in enumerate(recs):
            for key, head, col in cols:
                jv = lookup(rec, key)
                if jv is SKIP:
                    continue
                cell = ws.cell(n + 2, col).value
                T.check(agrees(jv, cell), f"{tag}: {sheet} row {n + 2} {head!r} = {cell!r}, "
                        f"JSON {path}[{n}].{key} = {jv!r}")
            seen[sheet] = seen.get(sheet, 0) + 1


def report(camp, out_dir, tag, extra=()):
    js, xl = os.path.join(out_dir, tag + ".json"), os.path.join(out_dir, tag + ".xlsx")
    p = subprocess.run(WRAP + [BIN, "report", camp, *extra, "-o", js, "-o", xl],
                       capture_output=True, text=True, timeout=300)
    if not T.check(p.returncode == 0, f"{tag}: exit {p.returncode}: {p.stderr[-300:]}"):
        return None, None
    with open(js) as f:
        d = json.load(f)
    return d, openpyxl.load_workbook(xl)


def main():
    tables, heads = lists()
    T.check(len(tables) >= 10, f"tool_ltable lists {len(tables)} tables")
    seen = {}
    with tempfile.TemporaryDirectory() as tmp:
        # a catalog without SO2Cl2 containers: its order line has none
        with open(os.path.join(ROOT, "templates", "containers.json")) as f:
            cat = json.load(f)
        cat["containers"] = [c for c in cat["containers"] if c["reagent"] != "SO2Cl2"]
        with open(os.path.join(tmp, "catalog.json"), "w") as f:
            json.dump(cat, f)
        with open(os.path.join(tmp, "bench-campaign.json"), "w") as f:
            json.dump(CAMPAIGN, f)
        cases = [(os.path.join(tmp, "bench-campaign.json"), "bench",
                  ["--catalog", os.path.join(tmp, "catalog.json"), "--today", "2027-02-25"])]
        for name in sorted(os.listdir(os.path.join(ROOT, "campaigns"))):
            if name.endswith(".json"):
                cases.append((os.path.join(ROOT, "campaigns", name), name[:-5], ["--all-products"]))
        for name in sorted(os.listdir(os.path.join(ROOT, "tests", "campaigns"))):
            if name.endswith(".json"):
                cases.append((os.path.join(ROOT, "tests", "campaigns", name), "t-" + name[:-5], []))
        for camp, tag, extra in cases:
            d, wb = report(camp, tmp, tag, extra)
            if d is not None:
                compare(tag, d, wb, tables, heads, seen)
    for sheet in tables:
        T.check(seen.get(sheet, 0) > 0, f"sheet {sheet}: no row compared")
    for f in T.fails[:25]:
        print("FAIL", f)
    print(f"writers_agree: {len(tables)} tables, {sum(seen.values())} rows, {T.n} checks, "
          f"{len(T.fails)} failed")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
