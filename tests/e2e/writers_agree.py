#!/usr/bin/python3
"""writers_agree.py - the JSON ledger and the workbook say the same thing, table by table.

Every table on a column list (include/ltable.h) is written by both writers from one entry
per field.  tool_ltable prints the lists (which JSON key goes with which sheet header, in
which sheet column); this script reports the demo campaigns and a campaign of its own (two
units, one a water liquor without a stack flow, permits in kg/h, mg/Nm3 and t/yr, stock
counts, a reagent with no container in a trimmed catalog) and those of tests/campaigns (a soda
ash liquor among them) and a what-if to .json and .xlsx, reads the
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


LT_ROW, LT_FORM, LT_NAME, LT_VALUE = 128, 256, 512, 1024  # include/ltable.h enum lt_flag


def lists():
    """[table] of tool_ltable's lists, each {path, sheet, cols: [(key, head, column)] of the
    entries with a key and a header, heads: sheet columns, entries: every col and sub line as
    (kind, key, head, column, flags), form: a block of rows per record (LT_ROW)}."""
    p = subprocess.run([TOOL], capture_output=True, text=True, timeout=60)
    T.check(p.returncode == 0, f"tool_ltable exit {p.returncode}: {p.stderr[-300:]}")
    out, cur = [], None
    for line in p.stdout.splitlines():
        f = line.split("\t")
        if f[0] == "table":
            cur = {"path": f[1], "sheet": f[2], "cols": [], "heads": 0, "entries": [],
                   "form": False}
            out.append(cur)
        elif f[0] == "col" and cur:
            key, head, col, flags = f[1], f[2], int(f[3]), int(f[4])
            cur["entries"].append(("col", key, head, col, flags))
            cur["form"] |= bool(flags & LT_ROW)
            if head != "-" and not flags & LT_ROW:
                cur["heads"] += 1
            if key != "-" and head != "-" and not flags & LT_ROW:
                cur["cols"].append((key, head, col))
        elif f[0] == "sub" and cur:
            cur["entries"].append(("sub", f[1], f[2], 0, int(f[3])))
    return out


def records(d, path):
    """The JSON records of a table path: "orders", "runs[].products" (every run's products in
    turn), "runs[actual]" (the runs whose "actual" is not null)."""
    m = re.match(r"^(\w+)\[(\w*)\](?:\.([\w.]+))?$", path)
    if not m:
        return d[path]
    outer, having, inner = m.groups()
    rows = [r for r in d[outer] if not having or r.get(having) is not None]
    if not inner:
        return rows
    out = []
    for r in rows:  # "scrubbers[].hourly.kmol_h": every unit's array in turn
        for g in inner.split("."):
            r = r[g]
        out += r
    return out


SKIP = object()


def lookup(rec, key):
    """rec's value at a dotted key ("reaction.heat_kj"): ABSENT when the key is left out,
    SKIP when the object holding it is null (the JSON says nothing to hold the cell to); a
    record that is a bare value (hourly.kmol_h) is its one key's value."""
    if not isinstance(rec, dict):
        return rec
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
    if jv is None or jv == "":  # the sheet may say what the blank means ("dimensionless")
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


def form_blocks(t, recs):
    """Rows of each record's block in form t: a row per LT_ROW entry, a row per element of
    each array of another list's rows, in list order; [(rows, [(entry, array row)])]."""
    arrays = []
    for kind, key, head, col, flags in t["entries"]:
        if kind == "sub" and key.split(".")[0] not in arrays:
            arrays.append(key.split(".")[0])
    blocks = []
    for rec in recs:
        rows, done = [], set()
        for e in t["entries"]:
            kind, key = e[0], e[1]
            if kind == "sub" and key.split(".")[0] not in done:
                arr = key.split(".")[0]
                done.add(arr)
                rows += [(("sub", arr), x) for x in rec[arr]]
            elif kind == "col" and e[4] & LT_ROW:
                rows.append((e, None))
        blocks.append(rows)
    return blocks


def compare_form(tag, ws, t, recs, r0):
    """Form t's blocks from sheet row r0: every row of a record's block holds its keyed
    columns; an array row the array's keyed members in the columns of their headers; an
    LT_ROW entry's row its header in the LT_NAME column and its value in the LT_VALUE one."""
    col_of = {e[2]: e[3] for e in t["entries"] if e[0] == "col" and e[3] > 0}
    name = [e[3] for e in t["entries"] if e[0] == "col" and e[4] & LT_NAME]
    value = [e[3] for e in t["entries"] if e[0] == "col" and e[4] & LT_VALUE]
    if not T.check(len(name) == 1 and len(value) == 1, f"{t['path']}: a form without its "
                   f"name and value columns"):
        return r0
    r = r0
    for n, (rec, rows) in enumerate(zip(recs, form_blocks(t, recs))):
        for what, sub in rows:
            for key, head, col in t["cols"]:
                T.check(agrees(lookup(rec, key), ws.cell(r, col).value),
                        f"{tag}: {t['sheet']} row {r} {head!r} = {ws.cell(r, col).value!r}, "
                        f"JSON {t['path']}[{n}].{key} = {lookup(rec, key)!r}")
            if what[0] == "sub":
                for kind, key, head, _, _ in t["entries"]:
                    if kind == "sub" and key.startswith(what[1] + ".") and key[-2:] != ".-" \
                            and head != "-":
                        jv, cell = sub.get(key.split(".")[-1], ABSENT), ws.cell(r, col_of[head]).value
                        T.check(agrees(jv, cell), f"{tag}: {t['sheet']} row {r} {head!r} = "
                                f"{cell!r}, JSON {t['path']}[{n}].{key} = {jv!r}")
            else:
                key, head = what[1], what[2]
                T.check(ws.cell(r, name[0]).value == head,
                        f"{tag}: {t['sheet']} row {r} names {ws.cell(r, name[0]).value!r}, "
                        f"the list {head!r}")
                if key != "-":
                    jv, cell = lookup(rec, key), ws.cell(r, value[0]).value
                    T.check(agrees(jv, cell), f"{tag}: {t['sheet']} row {r} {head!r} = "
                            f"{cell!r}, JSON {t['path']}[{n}].{key} = {jv!r}")
            r += 1
    return r


def first_row(d, t):
    """The sheet row of t's first record: after the --set lines of a what-if (Assumptions)."""
    return 2 + (len(d.get("overrides", [])) if t["sheet"] == "Assumptions" else 0)


def compare(tag, d, wb, tables, seen):
    rows_used = {}  # a sheet shared by lists (Cautions): each list's rows follow the last's
    for t in tables:
        sheet, path, cols = t["sheet"], t["path"], t["cols"]
        recs = records(d, path)
        if not T.check(sheet in wb.sheetnames, f"{tag}: no sheet {sheet}"):
            continue
        ws = wb[sheet]
        row1 = [c.value for c in ws[1]]
        T.check(len([v for v in row1 if v is not None]) == t["heads"],
                f"{tag}: {sheet} has {len(row1)} header cells, the list {t['heads']}")
        for key, head, col in cols:
            T.check(col >= 1 and head_ok(head, ws.cell(1, col).value),
                    f"{tag}: {sheet} column {col} is {ws.cell(1, col).value!r}, list says {head!r}")
        r0 = rows_used.get(sheet, first_row(d, t))
        if t["form"]:
            r = compare_form(tag, ws, t, recs, r0)
            rows_used[sheet] = r if r > r0 else r0 + 1  # none in play: one row says so
        else:
            for n, rec in enumerate(recs):
                for key, head, col in cols:
                    jv = lookup(rec, key)
                    if jv is SKIP:
                        continue
                    cell = ws.cell(r0 + n, col).value
                    T.check(agrees(jv, cell), f"{tag}: {sheet} row {r0 + n} {head!r} = {cell!r}, "
                            f"JSON {path}[{n}].{key} = {jv!r}")
            rows_used[sheet] = r0 + len(recs)
        seen[path] = seen.get(path, 0) + len(recs)
    for sheet, r in rows_used.items():
        # the autofilter spans the header and the data rows of the lists on the sheet
        ref = wb[sheet].auto_filter.ref or ""
        m = re.match(r"^A1:[A-Z]+(\d+)$", ref)
        T.check(bool(m) and int(m.group(1)) == r - 1,
                f"{tag}: {sheet} filters {ref!r}, the JSON has {r - 2} rows for it")


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
    tables = lists()
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
        # a what-if: the Assumptions sheet lists its --set values above the assumptions
        cases.append((os.path.join(ROOT, "campaigns", "harrowmere-march.json"), "what-if",
                      ["--set", "runs.CH-1.reagent_eq=1.2"]))
        for camp, tag, extra in cases:
            d, wb = report(camp, tmp, tag, extra)
            if d is not None:
                compare(tag, d, wb, tables, seen)
    for t in tables:
        T.check(seen.get(t["path"], 0) > 0, f"{t['path']} / {t['sheet']}: no row compared")
    for f in T.fails[:25]:
        print("FAIL", f)
    print(f"writers_agree: {len(tables)} tables, {sum(seen.values())} rows, {T.n} checks, "
          f"{len(T.fails)} failed")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
