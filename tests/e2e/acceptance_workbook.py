#!/usr/bin/python3
"""acceptance_workbook.py - the workbook of every demo campaign (campaigns/*.json) through the real
binary, `haloledger report C -o X.xlsx -o X.json`, read back with openpyxl (python3-openpyxl) and
unzipped:
  * the sheets of SHEETS in that order; every table sheet (all but Summary) holds one table: one
    header row of text with no gap (no second table beside the first), no header repeated further
    down, frozen panes at B2 (header row and id column), a filter over the header row;
  * print setup: landscape on the campaign's paper (A4, or Letter from report.paper: a Letter copy
    of a demo is made), header row repeated on every page, the id column too on sheets wider than
    a page, narrow sheets fitted one page wide; a header with the site, the campaign title and the
    sheet (&A) and a footer with "Page &P of &N" and the ledger's issue date; the Summary fitted to
    one page with a sign-off block (prepared by, checked by, date);
  * totals only over like things: every totalled column names one substance, gas, energy or a count
    (TOTAL_OK), never a column of mixed products or reagents;
  * alarm columns (ALARMS) carry a conditional format over their data rows that keys on the text
    marker ("!!" alarm, "!" notice), every raised cell begins with the marker and agrees with the
    JSON ledger, other cells read "no"; the demos raise at least one alarm;
  * names: no header "[1]", every kmol/h header says peak, mean or rated, glossary names only
    (FORBIDDEN), "1 <plural>" nowhere; Assumptions values shown to at most four significant figures,
    origins naming publications, never a program file;
  * the chart of acid gas draws HCl and HBr only;
  * tabular sheets: every header cell above a column holding numbers carries a unit in [...]
    (dates are shown as "(plant time)"/"(date)" and are not numbers here); Summary is a label/value
    sheet whose labels carry the unit ("Runs [count]"), Assumptions has its own Unit column;
  * every formula is =SUM over the whole column block above it (first data row to the row above),
    sits in a "Total" row, and its cached value (openpyxl data_only=True) equals the sum of those
    cells to 1e-9 relative;
  * no cell (nor any <v> in the sheet XML) holds NaN or inf;
  * at least one chart in xl/charts/ draws from 'Monthly', its value series on plain number cells
    (not formula cells; libxlsxwriter caches formula cells as 0 in charts) with cached values equal
    to the cells;
  * the Cautions sheet names every reagent the campaign charges and every gas it vents, the
    hypochlorite liquor when Cl2 reaches a caustic scrubber, and defers to the SDS, regulations and
    a licensed engineer;
  * workbook numbers equal the JSON ledger (runs, products, scrubber, orders, monthly, summary);
  * the same report made twice (a second apart) gives byte-identical .xlsx and .json files.
Env: HALOLEDGER, HL_ROOT, BUILD, HL_WRAP.
"""
import datetime as dt
import glob
import json
import math
import os
import re
import subprocess
import sys
import tempfile
import time

from _hl import BIN, WRAP, Tally
import zipfile

import openpyxl
from openpyxl.utils import column_index_from_string, get_column_letter

T0 = time.time()
ROOT = os.environ.get("HL_ROOT", os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
SHEETS = ["Summary", "Runs", "Products", "Liquor by run", "Scrubber units", "Hourly load", "Column check",
          "Emissions by run", "Emissions by hour", "Permit checks", "Emission charts", "Orders", "Plan vs actual", "Stock checks", "Waste by run", "Spent liquor", "Reaction heat", "Monthly", "Monthly yields", "Charts", "Warnings", "Cautions", "Assumptions"]
# a total column must name one thing (its header starts with one of these) or count something
TOTAL_OK = ("HCl ", "HBr ", "Cl2 ", "Br2 ", "SO2 ", "SO2Cl2 ", "NBS ", "Succinimide", "NaOH ", "Heat to liquor",
            "Liquor [kg]", "Water [kg]", "NaCl ", "NaBr ", "NaOCl ", "NaOBr ", "Na2SO3 ", "Na2SO4 ",
            "Spent liquor", "Caustic solution bought", "Dilution water", "Na2CO3 ", "CO2 given off")
# (sheet, header, marker, JSON getter(led, key) -> bool or None, key column)
ALARMS = [("Runs", "Capped by substrate", "!"), ("Liquor by run", "Cooling needed", "!!"),
          ("Liquor by run", "Below minimum NaOH", "!!"),
          ("Scrubber units", "Overloaded (instantaneous peak over rating)", "!!"), ("Orders", "Late", "!!")]
# one name for one thing (DEVELOPERS.md glossary): the retired names
FORBIDDEN = ("Fresh liquor before run", "Heat released", "NaOH used", "Changeouts [count]", "Heat duty",
             "Caustic make-up bought", "Peak hourly load")
UNIT = re.compile(r"\[[^\]]+\]")
M_HCL = 1.008 + 35.45          # CIAAW 2021 abridged

TALLY = Tally()
check = TALLY.check
fails = TALLY.fails


def num(v):
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def same(a, b, tol=1e-12):
    return num(a) and num(b) and abs(a - b) <= tol * max(abs(a), abs(b), 1e-300)


def header_map(ws, row=1):
    """{header text: column index} for a header row; repeated titles keep their first column."""
    out = {}
    for c in ws[row]:
        if isinstance(c.value, str) and c.value not in out:
            out[c.value] = c.column
    return out


def blocks(ws):
    """Column blocks of row 1 split by empty header cells: [(first col, last col)]."""
    out, start = [], None
    for c in range(1, ws.max_column + 2):
        v = ws.cell(1, c).value if c <= ws.max_column else None
        if v is not None and start is None:
            start = c
        if v is None and start is not None:
            out.append((start, c - 1))
            start = None
    return out


def check_units(tag, ws):
    name = ws.title
    if name == "Summary":
        # a form: the label in column A of a row holding numbers carries their unit
        for r in range(1, ws.max_row + 1):
            a = ws.cell(r, 1).value
            if any(num(ws.cell(r, c).value) for c in range(2, ws.max_column + 1)):
                check(isinstance(a, str) and UNIT.search(a), f"{tag} Summary!A{r} {a!r}: numbers without [unit]")
        return
    if name == "Assumptions":
        h = header_map(ws)
        if not check("Value" in h and "Unit" in h, f"{tag} Assumptions headers {list(h)} lack Value/Unit"):
            return
        for r in range(2, ws.max_row + 1):
            v, u = ws.cell(r, h["Value"]).value, ws.cell(r, h["Unit"]).value
            if num(v):
                check(isinstance(u, str) and u.strip(), f"{tag} Assumptions row {r}: value {v} without a unit")
        return
    for c in range(1, ws.max_column + 1):
        head = ws.cell(1, c).value
        vals = [ws.cell(r, c).value for r in range(2, ws.max_row + 1)]
        if any(num(v) for v in vals):
            check(isinstance(head, str) and (UNIT.search(head) or head.endswith("(dimensionless)")),
                  f"{tag} {name}!{get_column_letter(c)}1 {head!r} heads numbers but has no [unit]")
        if isinstance(head, str):
            check("[1]" not in head, f"{tag} {name}!{get_column_letter(c)}1 {head!r}: '[1]' is no unit")
            check("[kmol/h]" not in head or re.search(r"peak|mean|rated|gas flow", head, re.I),
                  f"{tag} {name} {head!r}: a rate that says neither peak nor mean")


SUM = re.compile(r"^=SUM\(\$?([A-Z]+)\$?(\d+)(?::\$?([A-Z]+)\$?(\d+))?\)$")


def check_formulas(tag, ws, wv):
    name = ws.title
    nform = 0
    total_rows = set()
    for row in ws.iter_rows():
        for c in row:
            if isinstance(c.value, str) and c.value.strip() == "Total":
                total_rows.add(c.row)
            if c.data_type != "f":
                continue
            nform += 1
            f = str(c.value)
            m = SUM.match(f)
            where = f"{tag} {name}!{c.coordinate} {f}"
            if not check(m, f"{where}: not a plain =SUM"):
                continue
            c1, r1 = m.group(1), int(m.group(2))
            c2, r2 = (m.group(3) or c1), int(m.group(4) or r1)
            col = c.column
            check(column_index_from_string(c1) == col and column_index_from_string(c2) == col,
                  f"{where}: sums another column")
            check(r2 == c.row - 1, f"{where}: does not end right above the total")
            # first data row: the cell above the range start is the header (text)
            check(r1 >= 2 and isinstance(ws.cell(r1 - 1, col).value, str) and ws.cell(r1 - 1, col).data_type != "f",
                  f"{where}: does not start at the first data row")
            check(any(isinstance(x.value, str) and x.value.strip() == "Total" for x in ws[c.row]),
                  f"{where}: formula outside a Total row")
            head = ws.cell(1, col).value
            check(isinstance(head, str) and (head.startswith(TOTAL_OK) or head.endswith("[count]")),
                  f"{where}: a total over unlike things ({head!r})")
            cells = [ws.cell(r, col).value for r in range(r1, r2 + 1)]
            check(all(v is None or num(v) for v in cells), f"{where}: sums non-number cells")
            want = sum(v for v in cells if num(v))
            got = wv[c.coordinate].value
            check(num(got) and abs(got - want) <= 1e-9 * max(abs(want), 1e-300) + (0 if want else 1e-300),
                  f"{where}: cached {got!r} != sum {want!r}")
    for r in total_rows:
        check(any(x.data_type == "f" for x in ws[r]), f"{tag} {name} row {r}: 'Total' row without formulas")
    return nform


def check_finite(tag, ws):
    bad = [c.coordinate for row in ws.iter_rows() for c in row
           if isinstance(c.value, float) and not math.isfinite(c.value)]
    check(not bad, f"{tag} {ws.title}: non-finite cells {bad[:5]}")


def check_xml(tag, path, wb):
    with zipfile.ZipFile(path) as z:
        names = z.namelist()
        for n in names:
            if n.startswith("xl/worksheets/sheet") and n.endswith(".xml"):
                x = z.read(n).decode()
                bad = re.findall(r"<v>\s*-?(?:nan|inf)[^<]*</v>", x, re.I)
                check(not bad, f"{tag} {n}: non-finite values {bad[:3]}")
        charts = [n for n in names if re.match(r"xl/charts/chart\d+\.xml$", n)]
        monthly = 0
        for n in charts:
            x = z.read(n).decode()
            if "Acid gas" in x:  # acid gas means HCl and HBr: the series names point at those headers
                for ref in re.findall(r"<c:tx><c:strRef><c:f>'?Monthly'?!\$([A-Z]+)\$1</c:f>", x):
                    head = wb["Monthly"].cell(1, column_index_from_string(ref)).value
                    check(str(head).startswith(("HCl ", "HBr ")), f"{tag} {n}: acid gas chart draws {head!r}")
            if "Monthly!" not in x and "'Monthly'!" not in x:
                continue
            monthly += 1
            for val in re.findall(r"<c:val>(.*?)</c:val>", x, re.S):
                ref = re.search(r"<c:f>'?Monthly'?!\$([A-Z]+)\$(\d+)(?::\$([A-Z]+)\$(\d+))?</c:f>", val)
                if not check(ref, f"{tag} {n}: a value series not on Monthly"):
                    continue
                col = column_index_from_string(ref.group(1))
                r1, r2 = int(ref.group(2)), int(ref.group(4) or ref.group(2))
                cache = [float(v) for v in re.findall(r"<c:v>([^<]*)</c:v>", val)]
                ws = wb["Monthly"]
                cells = [ws.cell(r, col) for r in range(r1, r2 + 1)]
                check(all(c.data_type == "n" and num(c.value) for c in cells),
                      f"{tag} {n}: series {ref.group(0)} not on plain number cells")
                check(len(cache) == len(cells) and all(same(a, c.value, 1e-12) or a == c.value == 0 for a, c in zip(cache, cells)),
                      f"{tag} {n}: chart cache {cache} != cells {[c.value for c in cells]}")
                check(all(ws.cell(r, 1).value != "Total" for r in range(r1, r2 + 1)), f"{tag} {n}: series includes the Total row")
        check(monthly >= 1, f"{tag}: no chart in xl/charts/ draws from Monthly ({charts})")
    return len(charts)


def formula_names(s):
    m = re.search(r"\(([^)]*)\)", s or "")
    return {t.strip() for t in m.group(1).split(",")} if m else set()


def check_cautions(tag, wb, camp, led):
    ws = wb["Cautions"]
    named = set()
    text = []
    for row in ws.iter_rows(values_only=True):
        named |= formula_names(row[0] if row else None)
        text.extend(str(v) for v in row if v is not None)
    text = " ".join(text).lower()
    reagents = {r["reagent"] for r in camp["runs"]}
    vented = set()
    cl2_to_caustic = False
    for r in led["runs"]:
        for g in ("HCl", "HBr", "Cl2", "Br2", "SO2"):
            if r["vent"][g + "_mol"] > 0:  # every gas key is in every run's vent (design section 5)
                vented.add(g)
                if g == "Cl2" and r.get("scrubber_id"):
                    cl2_to_caustic = True
    want = reagents | vented | ({"NaOCl"} if cl2_to_caustic else set())
    check(want <= named, f"{tag}: Cautions sheet lacks {sorted(want - named)} (names {sorted(named)})")
    for kw in ("safety data sheet", "regulation", "licensed engineer"):
        check(kw in text, f"{tag}: Cautions sheet does not mention {kw!r}")
    for g in want:
        rows = [row for row in ws.iter_rows(values_only=True) if g in formula_names(row[0])]
        topics = " ".join(str(row[2]) for row in rows).lower()
        for t in ("niosh rel", "osha pel", "idlh", "acgih tlv"):
            check(t in topics, f"{tag}: Cautions for {g} lack the {t.upper()}")


def col_values(ws, head, key_col=1):
    h = header_map(ws)
    out = {}
    if head not in h:
        return out
    for r in range(2, ws.max_row + 1):
        k = ws.cell(r, key_col).value
        if k is not None and k != "Total":
            out.setdefault(k, []).append(ws.cell(r, h[head]).value)
    return out


def check_numbers(tag, wb, led):
    runs = {r["id"]: r for r in led["runs"]}
    ws = wb["Runs"]
    h = header_map(ws)
    check([ws.cell(r, 1).value for r in range(2, 2 + len(runs))] == [r["id"] for r in led["runs"]],
          f"{tag}: Runs sheet run order differs from the JSON ledger")
    pairs = {"Substrate [kg]": lambda r: r["substrate"]["kg"], "Substrate [mol]": lambda r: r["substrate"]["mol"],
             "Reagent charged [kg]": lambda r: r["reagent_charged"]["kg"],
             "Reagent charged [mol]": lambda r: r["reagent_charged"]["mol"],
             "HCl formed [kg]": lambda r: r["byproducts"]["HCl_kg"],
             "Succinimide formed [kg]": lambda r: r["byproducts"]["succinimide_kg"],
             "Vent gas to scrubber, peak rate [kmol/h]": lambda r: r["vent"]["acid_kmol_h"],
             "NaOH consumed, as 100 % [kg]": lambda r: r["scrubber"]["naoh_kg"],
             "Heat to liquor [kJ]": lambda r: r["scrubber"]["heat_kj"],
             "HCl to scrubber [kg]": lambda r: r["vent"]["HCl_mol"] * M_HCL / 1e3}
    for head, fn in pairs.items():
        if not check(head in h, f"{tag}: Runs sheet lacks {head!r}"):
            continue
        for rid, vals in col_values(ws, head).items():
            if rid in runs:
                check(same(vals[0], fn(runs[rid]), 1e-9), f"{tag} Runs {rid} {head}: {vals[0]!r} vs JSON {fn(runs[rid])!r}")
    # run figures [%] (design section 5); selectivity blank where the JSON has null
    for head, key in (("Yield [%]", "yield_pct"), ("Substrate conversion [%]", "conversion_pct"),
                      ("Selectivity to wanted product [%]", "selectivity_pct"),
                      ("Halogen efficiency [%]", "halogen_efficiency_pct")):
        if not check(head in h, f"{tag}: Runs sheet lacks {head!r}"):
            continue
        for rid, vals in col_values(ws, head).items():
            v = runs[rid][key] if rid in runs else None
            check((v is None and vals[0] is None) or same(vals[0], v, 1e-12) or vals[0] == v == 0,
                  f"{tag} Runs {rid} {head}: {vals[0]!r} vs JSON {v!r}")
    # Liquor by run (key column A = run): NaOH per run, changeout flag
    ws = wb["Liquor by run"]
    h = header_map(ws)
    seen = 0
    naoh = "NaOH consumed, as 100 % [kg]"
    for r in range(2, ws.max_row + 1):
        rid = ws.cell(r, 1).value
        if rid in runs:
            seen += 1
            jr = runs[rid]["scrubber"]
            g = ws.cell(r, h[naoh]).value
            check(same(g, jr["naoh_kg"], 1e-12) or jr["naoh_kg"] == g == 0, f"{tag} Liquor {rid} NaOH {g} vs JSON {jr['naoh_kg']}")
            check(ws.cell(r, h["Liquor changed before run"]).value == ("yes" if jr["changeout_before"] else "no"),
                  f"{tag} Liquor {rid} changeout flag")
    check(seen == sum(1 for r in led["runs"] if r.get("scrubber_id")), f"{tag}: Liquor by run lists {seen} runs")
    # Scrubber units: one row a unit
    ws = wb["Scrubber units"]
    hb = header_map(ws)
    for s in led["scrubbers"]:
        rows = [r for r in range(2, ws.max_row + 1) if ws.cell(r, 1).value == s["id"]]
        if not check(rows, f"{tag}: Scrubber units row for {s['id']} missing"):
            continue
        r = rows[0]
        for head, v in (("Peak hourly mean load [kmol/h]", s["peak_acid_kmol_h"]), ("Liquor changeouts [count]", s["changeouts"]),
                        (naoh, s["naoh_kg"]), ("Rated capacity [kmol/h]", s["rated_acid_kmol_h"]),
                        ("Peak instantaneous load [kmol/h]", s["peak_instant_kmol_h"]),
                        ("Hottest liquor, no cooling [°C]", s["max_liquor_temp_c"])):
            g = ws.cell(r, hb[head]).value if head in hb else None
            check(same(g, v) or g == v == 0, f"{tag} Scrubber units {s['id']} {head}: {g!r} vs JSON {v!r}")
        for head, v in (("Peak heat release [kW]", s["peak_heat_kw"]),
                        ("Dilution water per changeout [kg]", s["changeout_water_kg"]),
                        ("Dilution water, all changeouts [kg]", s["dilution_water_kg"])):
            g = ws.cell(r, hb[head]).value if head in hb else None
            check(same(g, v) or g == v == 0, f"{tag} Scrubber units {s['id']} {head}: {g!r} vs JSON {v!r}")
        g = ws.cell(r, hb.get("Runs venting at the heat release peak", 1)).value
        check((g or "") == ", ".join(s["peak_heat_runs"]), f"{tag} Scrubber units {s['id']} heat peak runs {g!r} vs {s['peak_heat_runs']}")
        if s["peak_heat_runs"]:
            g = ws.cell(r, hb.get("Heat release peak from (plant time)", 1)).value
            check(isinstance(g, dt.datetime) and g.strftime("%Y-%m-%dT%H:%M") == s["peak_heat_at"],
                  f"{tag} Scrubber units {s['id']} heat peak from {g!r} vs {s['peak_heat_at']}")
        g = ws.cell(r, hb.get("Peak hour start (plant time)", 1)).value
        check(isinstance(g, dt.datetime) and g.strftime("%Y-%m-%dT%H:%M") == s["peak_at"],
              f"{tag} Scrubber units {s['id']} peak hour {g!r} vs {s['peak_at']}")
    # Waste by run: losses and retained acid per run against the JSON (retained kg from mol with
    # CIAAW 2021 weights, so to 1e-4 relative)
    ws = wb["Waste by run"]
    h = header_map(ws)
    molar = {"HCl": M_HCL, "HBr": 1.008 + 79.904, "SO2": 32.06 + 2 * 15.999}
    for r in range(2, ws.max_row + 1):
        rid = ws.cell(r, 1).value
        if rid not in runs:
            continue
        jr = runs[rid]
        for head, v, tol in (("Over-halogenated products [kg]", jr["losses"]["overhalogenated_kg"], 1e-12),
                             ("Isomer products [kg]", jr["losses"]["isomer_kg"], 1e-12),
                             ("Unreacted substrate [kg]", jr["losses"]["unreacted_substrate_kg"], 1e-12)) + tuple(
                (f"{g} retained in mass [kg]", jr["retained"][g + "_mol"] * m / 1e3, 1e-4) for g, m in molar.items()):
            g = ws.cell(r, h[head]).value if head in h else None
            check(same(g, v, tol) or g == v == 0, f"{tag} Waste by run {rid} {head}: {g!r} vs JSON {v!r}")
    # Products: same rows, mol and kg and share
    ws = wb["Products"]
    h = header_map(ws)
    rows = [[ws.cell(r, c).value for c in range(1, ws.max_column + 1)] for r in range(2, ws.max_row + 1)]
    rows = [x for x in rows if x[0] in runs]
    jp = [(r["id"], p) for r in led["runs"] for p in r["products"]]
    if check(len(rows) == len(jp), f"{tag}: Products sheet {len(rows)} rows, JSON {len(jp)}"):
        for x, (rid, p) in zip(rows, jp):
            # the lumped row: "(mixture)" for a formula, its label and count as the structure
            other = p["role"] == "other"
            ok = (x[0] == rid and x[h["Role"] - 1] == p["role"]
                  and (x[h["Formula"] - 1] == "(mixture)" if other else x[h["Formula"] - 1] == p["formula"])
                  and (not other or (str(x[h["Structure (SMILES)"] - 1]).startswith(p["label"] + ": ")
                                     and f" {p['rows_summed']} product" in x[h["Structure (SMILES)"] - 1]))
                  and (p["smiles"] is None or x[h["Structure (SMILES)"] - 1] == p["smiles"])
                  and all(same(x[h[k] - 1], p[j], 1e-12) or x[h[k] - 1] == p[j] == 0 for k, j in
                          (("Amount [mol]", "mol"), ("Mass [kg]", "kg"),
                           ("Share of substrate charged [mol %]", "mol_fraction"))))
            check(ok, f"{tag}: Products row {x[:6]} differs from JSON {rid} {p}")
    # Orders
    ws = wb["Orders"]
    h = header_map(ws)
    wrows = {(ws.cell(r, 1).value, ws.cell(r, 2).value): r for r in range(2, ws.max_row + 1)}
    for o in led["orders"]:
        r = wrows.get((o["month"], o["reagent"]))
        if not check(r, f"{tag}: Orders sheet lacks {o['month']} {o['reagent']}"):
            continue
        check(same(ws.cell(r, h["Demand [kg]"]).value, o["demand_kg"]), f"{tag} order {o['month']} {o['reagent']} demand")
        check(ws.cell(r, h["Containers [count]"]).value == o["containers"], f"{tag} order {o['month']} {o['reagent']} containers")
        ob = ws.cell(r, h["Order by (date)"]).value
        check(isinstance(ob, dt.datetime) and ob.date().isoformat() == o["order_by"],
              f"{tag} order {o['month']} {o['reagent']} order-by {ob} vs {o['order_by']}")
        check(same(ws.cell(r, h["Stock at month start [kg]"]).value, o["stock_start_kg"]) or o["stock_start_kg"] == 0,
              f"{tag} order {o['month']} {o['reagent']} stock start")
    # Monthly
    ws = wb["Monthly"]
    h = header_map(ws)
    for m in led["months"]:
        rr = [r for r in range(2, ws.max_row + 1) if ws.cell(r, 1).value == m["month"]]
        if not check(rr, f"{tag}: Monthly lacks {m['month']}"):
            continue
        r = rr[0]
        for head, v in (("Runs [count]", m["runs"]), ("NaOH consumed, as 100 % [kg]", m["naoh_kg"]),
                        ("Liquor changeouts [count]", m["changeouts"]), ("HCl to scrubber [kg]", m["vent_kg"]["HCl"]),
                        ("HBr to scrubber [kg]", m["vent_kg"]["HBr"]), ("Cl2 charged [kg]", m["reagents_kg"]["Cl2"]),
                        ("Spent liquor [kg]", m["waste_kg"]["spent_liquor"])):
            g = ws.cell(r, h[head]).value if head in h else None
            check(same(g, v) or g == v == 0, f"{tag} Monthly {m['month']} {head}: {g!r} vs JSON {v!r}")
    # Summary: month columns of the key figures (header row of the section), campaign items in B
    ws = wb["Summary"]
    lab = {ws.cell(r, 1).value: r for r in range(1, ws.max_row + 1)}
    sec = lab.get("Key figures by month")
    if check(sec, f"{tag}: Summary has no key figures by month"):
        mcol = {ws.cell(sec, c).value: c for c in range(2, ws.max_column + 1)}
        for m in led["months"][:6]:
            c = mcol.get(m["month"])
            if not check(c, f"{tag}: Summary lacks the month {m['month']}"):
                continue
            for item, v in (("Runs [count]", m["runs"]), ("NaOH consumed, as 100 % [kg]", m["naoh_kg"]),
                            ("HCl to scrubbers [kg]", m["vent_kg"]["HCl"]), ("Liquor changeouts [count]", m["changeouts"])):
                if item.startswith("HCl") and v == 0:
                    continue
                g = ws.cell(lab[item], c).value if item in lab else None
                check(same(g, v) or g == v == 0, f"{tag}: Summary {item} {m['month']} {g!r} vs JSON {v!r}")
    for s in led["scrubbers"]:
        for k, v in ((f"Peak hourly mean load at {s['id']} [kmol/h]", s["peak_acid_kmol_h"]),
                     (f"Peak instantaneous load at {s['id']} [kmol/h]", s["peak_instant_kmol_h"]),
                     (f"Hottest liquor at {s['id']} [°C]", s["max_liquor_temp_c"]),
                     (f"Peak heat release at {s['id']} [kW]", s["peak_heat_kw"])):
            g = ws.cell(lab[k], 2).value if k in lab else None
            check(same(g, v), f"{tag}: Summary {k} {g!r} vs {v}")
    g = ws.cell(lab["Warnings [count]"], 2).value if "Warnings [count]" in lab else None
    check(g == len(led["warnings"]), f"{tag}: Summary warnings count {g!r} vs {len(led['warnings'])}")
    over = sum(1 for s in led["scrubbers"] if s["overloaded"])
    g = ws.cell(lab["Scrubbers over their rating [count]"], 2).value if "Scrubbers over their rating [count]" in lab else None
    check(g == over, f"{tag}: Summary overload count {g!r} vs {over}")
    ws = wb["Warnings"]
    got = [(ws.cell(r, 1).value, ws.cell(r, 2).value) for r in range(2, 2 + len(led["warnings"]))]
    want = [(w["run"] or "(campaign)", w["message"]) for w in led["warnings"]]
    check(got == want or not want, f"{tag}: Warnings sheet differs from the JSON warnings")


def check_shape(tag, ws):
    """One table: a contiguous text header row, no repeated header below, panes and filter."""
    heads = [ws.cell(1, c).value for c in range(1, ws.max_column + 1)]
    check(heads and all(isinstance(h, str) and h for h in heads), f"{tag} {ws.title}: header row has gaps or non-text {heads}")
    for r in range(2, ws.max_row + 1):
        again = sum(1 for c, h in enumerate(heads, 1) if ws.cell(r, c).value == h)
        check(again < 2, f"{tag} {ws.title} row {r}: a second header row")
    check(ws.freeze_panes == "B2", f"{tag} {ws.title}: panes frozen at {ws.freeze_panes}, not B2 (header row and id column)")
    check(bool(ws.auto_filter.ref) and ws.auto_filter.ref.startswith("A1:"), f"{tag} {ws.title}: filter {ws.auto_filter.ref}")


def check_print(tag, ws, led, paper):
    ps = ws.page_setup
    check(ps.orientation == "landscape", f"{tag} {ws.title}: orientation {ps.orientation}")
    check(str(ps.paperSize) == paper, f"{tag} {ws.title}: paper {ps.paperSize}, want {paper}")
    hd, ft = ws.oddHeader, ws.oddFooter
    site = (led["campaign"]["site"] or "").replace("&", "&&")
    title = (led["campaign"]["title"] or "").replace("&", "&&")
    check(site[:40] in (hd.left.text or ""), f"{tag} {ws.title}: header left {hd.left.text!r} lacks the site")
    check(title[:40] in (hd.center.text or ""), f"{tag} {ws.title}: header centre {hd.center.text!r} lacks the title")
    check((hd.right.text or "") == "&A", f"{tag} {ws.title}: header right {hd.right.text!r} is not the sheet (&A)")
    check((ft.right.text or "") == "Page &P of &N", f"{tag} {ws.title}: footer right {ft.right.text!r}")
    issued = led.get("campaign", {}).get("issued") or ""
    check("Ledger issued" in (ft.left.text or "") and (not issued or issued[:10] in ft.left.text),
          f"{tag} {ws.title}: footer left {ft.left.text!r} lacks the issue date")
    fit = ws.sheet_properties.pageSetUpPr.fitToPage if ws.sheet_properties.pageSetUpPr else False
    if ws.title in ("Charts", "Emission charts"):  # chart pages, no table
        return
    if ws.title == "Summary":
        check(fit and (ps.fitToWidth in (None, 1)) and (ps.fitToHeight in (None, 1)),
              f"{tag} Summary: not fitted to one page ({fit} {ps.fitToWidth} {ps.fitToHeight})")
        return
    check(ws.print_title_rows == "$1:$1", f"{tag} {ws.title}: print titles rows {ws.print_title_rows}")
    # wide = the columns do not fit a third more than a page: then the id column repeats instead
    width = sum((ws.column_dimensions[get_column_letter(c)].width or 8.43) for c in range(1, ws.max_column + 1))
    page = ((297.0 if paper == "9" else 279.4) - 25.4) / 25.4 * 96 / 7   # ECMA-376 18.3.1.13, ~5 px padding aside
    if width <= page * 1.2:
        check(fit and ps.fitToWidth in (None, 1) and ps.fitToHeight == 0, f"{tag} {ws.title}: narrow ({width:.0f} chars) but not one page wide")
    elif width > page * 1.45:
        check(not fit and ws.print_title_cols == "$A:$A", f"{tag} {ws.title}: wide ({width:.0f} chars) without repeated id column")


def alarm_json(led, sheet, head):
    """{key: raised} from the JSON ledger for an alarm column, keys as in the sheet's column A."""
    if sheet == "Runs":
        return {r["id"]: r.get("capped") for r in led["runs"]}
    if sheet == "Liquor by run":
        k = "too_hot" if head == "Cooling needed" else "exhausted"
        return {r["id"]: r["scrubber"].get(k) for r in led["runs"] if r.get("scrubber_id")}
    if sheet == "Scrubber units":
        return {s["id"]: s["overloaded"] for s in led["scrubbers"]}
    return None


def check_alarms(tag, wb, led):
    raised = 0
    for sheet, head, marker in ALARMS:
        ws = wb[sheet]
        h = header_map(ws)
        if not check(head in h, f"{tag} {sheet}: no alarm column {head!r}"):
            continue
        col = get_column_letter(h[head])
        n = sum(1 for r in range(2, ws.max_row + 1) if ws.cell(r, 1).value not in (None, "Total")
                and not str(ws.cell(r, 1).value).startswith(("No ", "(")))
        cfs = [(str(cf.sqref), rule) for cf in ws.conditional_formatting for rule in cf.rules]
        want_ref = f"{col}2:{col}{n + 1}" if n > 1 else f"{col}2"
        ok = [rule for ref, rule in cfs if ref == want_ref and rule.type == "beginsWith"
              and rule.text == marker and rule.dxf is not None and rule.dxf.fill is not None]
        check(n == 0 or ok, f"{tag} {sheet}!{col}: no marker format over {col}2:{col}{n + 1} ({cfs})")
        js = alarm_json(led, sheet, head)
        for r in range(2, n + 2):
            v = ws.cell(r, h[head]).value
            check(v == "no" or (isinstance(v, str) and v.startswith(marker + " ") and (marker == "!!" or not v.startswith("!!"))),
                  f"{tag} {sheet}!{col}{r}: {v!r} is neither 'no' nor marked {marker!r}")
            raised += isinstance(v, str) and v.startswith("!")
            k = ws.cell(r, 1).value
            if js is not None and k in js and js[k] is not None:
                check(bool(js[k]) == (v != "no"), f"{tag} {sheet} {k} {head}: {v!r} vs JSON {js[k]!r}")
        if sheet == "Orders":
            late = {(o["month"], o["reagent"]): o.get("late") for o in led["orders"]}
            for r in range(2, n + 2):
                k = (ws.cell(r, 1).value, ws.cell(r, 2).value)
                if k in late and late[k] is not None:
                    check(bool(late[k]) == (ws.cell(r, h[head]).value != "no"), f"{tag} Orders {k} late flag")
    return raised


PLURAL = re.compile(r"(?<![\d.,])1 (changeouts|runs|containers|warnings|hours|orders|scrubbers|products|rows|routes)\b")


def check_names(tag, wb):
    for ws in wb.worksheets:
        for row in ws.iter_rows():
            for c in row:
                if not isinstance(c.value, str):
                    continue
                for f in FORBIDDEN:
                    check(f not in c.value, f"{tag} {ws.title}!{c.coordinate}: retired name {f!r}")
                # the Warnings messages are the ledger's own text, pinned by the reference ledgers
                if ws.title != "Warnings":
                    check(not PLURAL.search(c.value), f"{tag} {ws.title}!{c.coordinate}: {c.value!r} counts 1 in the plural")


def shown_decimals(fmt):
    m = re.search(r"0\.(0+)", fmt or "")
    return len(m.group(1)) if m else 0


def check_assumptions(tag, ws):
    h = header_map(ws)
    for r in range(2, ws.max_row + 1):
        v, fmt = ws.cell(r, h["Value"]).value, ws.cell(r, h["Value"]).number_format
        if num(v) and v != 0:
            if "E" in fmt:
                check(shown_decimals(fmt) <= 3, f"{tag} Assumptions row {r}: {v} shown as {fmt}")
            else:
                most = max(0, 3 - math.floor(math.log10(abs(v))))
                check(fmt != "General" and shown_decimals(fmt) <= most,
                      f"{tag} Assumptions row {r}: {v} shown as {fmt!r} (more than 4 significant figures)")
        o = ws.cell(r, h["Origin"]).value or ""
        check(not re.search(r"\b[\w-]+\.(c|h|py|json)\b|src/|include/", o), f"{tag} Assumptions row {r}: origin names a program file: {o!r}")


def check_summary(tag, ws):
    text = [str(c.value) for row in ws.iter_rows() for c in row if c.value is not None]
    for want in ("Prepared by (name, signature)", "Checked by (name, signature)", "Date:", "Alarms", "Key figures by month"):
        check(want in text, f"{tag} Summary: no {want!r}")
    check(ws.freeze_panes is None and not ws.auto_filter.ref, f"{tag} Summary: a form, not a filtered table")


def make(camp, outdir, env):
    os.makedirs(outdir, exist_ok=True)
    base = os.path.join(outdir, os.path.basename(camp)[:-5])
    p = subprocess.run(WRAP + [BIN, "report", camp, "-o", base + ".xlsx", "-o", base + ".json"],
                       capture_output=True, text=True, env=env, cwd=ROOT)
    return p, base


def main():
    env = dict(os.environ)
    env.pop("SOURCE_DATE_EPOCH", None)
    camps = sorted(glob.glob(os.path.join("campaigns", "*.json"), root_dir=ROOT))
    # and the acceptance campaigns of this folder's siblings (tests/campaigns)
    camps += sorted(glob.glob(os.path.join("tests", "campaigns", "*.json"), root_dir=ROOT))
    check(sum(c.startswith("campaigns") for c in camps) >= 2, f"demo campaigns: {camps}")
    nform = ncharts = nalarm = 0
    with tempfile.TemporaryDirectory() as tmp:
        first = {}
        t_first = time.time()
        for c in camps:
            tag = os.path.basename(c)[:-5]
            p, base = make(c, os.path.join(tmp, "a"), env)
            if not check(p.returncode == 0, f"{tag}: report exit {p.returncode}: {p.stderr.strip()}"):
                continue
            first[c] = base
            wb = openpyxl.load_workbook(base + ".xlsx")
            wv = openpyxl.load_workbook(base + ".xlsx", data_only=True)
            with open(base + ".json") as f:
                led = json.load(f)
            with open(os.path.join(ROOT, c)) as f:
                camp = json.load(f)
            check(wb.sheetnames == SHEETS, f"{tag}: sheets {wb.sheetnames}")
            for name in SHEETS:
                if name not in wb.sheetnames:
                    continue
                ws = wb[name]
                if name not in ("Summary", "Charts", "Emission charts"):
                    check_shape(tag, ws)
                check_print(tag, ws, led, "9")
                check_units(tag, ws)
                nform += check_formulas(tag, ws, wv[name])
                check_finite(tag, ws)
            ncharts += check_xml(tag, base + ".xlsx", wb)
            check_cautions(tag, wb, camp, led)
            check_numbers(tag, wb, led)
            nalarm += check_alarms(tag, wb, led)
            check_names(tag, wb)
            check_assumptions(tag, wb["Assumptions"])
            check_summary(tag, wb["Summary"])
        check(nalarm > 0, "the demo workbooks raise no alarm: the alarm checks would pass on nothing")
        # report.paper = Letter: every sheet on US Letter (paper size 1)
        with open(os.path.join(ROOT, camps[0])) as f:
            letter = json.load(f)
        letter["report"] = {"paper": "Letter"}
        lp = os.path.join(tmp, "letter.json")
        with open(lp, "w") as f:
            json.dump(letter, f)
        p, base = make(lp, os.path.join(tmp, "l"), env)
        if check(p.returncode == 0, f"letter copy: report exit {p.returncode}: {p.stderr.strip()}"):
            wb = openpyxl.load_workbook(base + ".xlsx")
            with open(base + ".json") as f:
                led = json.load(f)
            for ws in wb.worksheets:
                check_print("letter", ws, led, "1")
        # the same report again, at least a second later: byte-identical files
        time.sleep(max(0.0, 1.05 - (time.time() - t_first)))
        for c, base in first.items():
            tag = os.path.basename(c)[:-5]
            p, base2 = make(c, os.path.join(tmp, "b"), env)
            if not check(p.returncode == 0, f"{tag}: second report exit {p.returncode}"):
                continue
            for ext in (".xlsx", ".json"):
                with open(base + ext, "rb") as f1, open(base2 + ext, "rb") as f2:
                    check(f1.read() == f2.read(), f"{tag}{ext}: second report differs byte-wise")
    for f in fails:
        print("FAIL:", f)
    print(f"acceptance_workbook: {TALLY.n - len(fails)}/{TALLY.n} checks passed ({len(camps)} campaigns, "
          f"{nform} total formulas, {ncharts} charts) in {time.time() - T0:.1f} s")
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
