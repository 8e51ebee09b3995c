#!/usr/bin/python3
"""acceptance_workbook.py - the workbook of every demo campaign (campaigns/*.json) through the real
binary, `haloledger report C -o X.xlsx -o X.json`, read back with openpyxl (python3-openpyxl) and
unzipped:
  * the nine sheets Summary, Runs, Products, Scrubber, Orders, Waste, Monthly, Cautions,
    Assumptions, in that order, each with a frozen header row;
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
SHEETS = ["Summary", "Runs", "Products", "Scrubber", "Orders", "Waste", "Monthly", "Cautions", "Assumptions"]
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
        # label/value sheet: the label of a numeric value carries its unit
        for r in range(2, ws.max_row + 1):
            a, b = ws.cell(r, 1).value, ws.cell(r, 2).value
            if num(b):
                check(isinstance(a, str) and UNIT.search(a), f"{tag} Summary!A{r} {a!r}: value {b} without [unit]")
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
            check(isinstance(head, str) and UNIT.search(head),
                  f"{tag} {name}!{get_column_letter(c)}1 {head!r} heads numbers but has no [unit]")


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
            if r["vent"].get(g + "_mol", 0) > 0:
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
             "Vent gas to scrubber [kmol/h]": lambda r: r["vent"]["acid_kmol_h"],
             "NaOH used [kg]": lambda r: r["scrubber"]["naoh_kg"],
             "Heat to liquor [kJ]": lambda r: r["scrubber"]["heat_kj"],
             "HCl to scrubber [kg]": lambda r: r["vent"]["HCl_mol"] * M_HCL / 1e3}
    for head, fn in pairs.items():
        if not check(head in h, f"{tag}: Runs sheet lacks {head!r}"):
            continue
        for rid, vals in col_values(ws, head).items():
            if rid in runs:
                check(same(vals[0], fn(runs[rid]), 1e-9), f"{tag} Runs {rid} {head}: {vals[0]!r} vs JSON {fn(runs[rid])!r}")
    # Scrubber sheet (key column B = run): NaOH used per run, changeout flag
    ws = wb["Scrubber"]
    h = header_map(ws)
    seen = 0
    for r in range(2, ws.max_row + 1):
        rid = ws.cell(r, 2).value
        if rid in runs:
            seen += 1
            jr = runs[rid]["scrubber"]
            check(same(ws.cell(r, h["NaOH used [kg]"]).value, jr["naoh_kg"], 1e-12) or jr["naoh_kg"] == ws.cell(r, h["NaOH used [kg]"]).value == 0,
                  f"{tag} Scrubber {rid} NaOH used {ws.cell(r, h['NaOH used [kg]']).value} vs JSON {jr['naoh_kg']}")
            check(ws.cell(r, h["Fresh liquor before run"]).value == ("yes" if jr["changeout_before"] else "no"),
                  f"{tag} Scrubber {rid} changeout flag")
    check(seen == sum(1 for r in led["runs"] if r.get("scrubber_id")), f"{tag}: Scrubber sheet lists {seen} runs")
    # scrubber summary block: the row-1 block that holds "Peak hourly mean load [kmol/h]"
    blk = [b for b in blocks(ws) if any(ws.cell(1, c).value == "Peak hourly mean load [kmol/h]" for c in range(b[0], b[1] + 1))]
    if check(blk, f"{tag}: Scrubber sheet has no peak block"):
        b0, b1 = blk[0]
        hb = {ws.cell(1, c).value: c for c in range(b0, b1 + 1)}
        for s in led["scrubbers"]:
            rows = [r for r in range(2, ws.max_row + 1) if ws.cell(r, b0).value == s["id"]]
            if not check(rows, f"{tag}: Scrubber summary row for {s['id']} missing"):
                continue
            r = rows[0]
            for head, v in (("Peak hourly mean load [kmol/h]", s["peak_acid_kmol_h"]), ("Changeouts [count]", s["changeouts"]),
                            ("NaOH consumed [kg]", s["naoh_kg"]), ("Rated capacity [kmol/h]", s["rated_acid_kmol_h"]),
                            ("Peak instantaneous load [kmol/h]", s["peak_instant_kmol_h"]),
                            ("Hottest liquor, no cooling [°C]", s["max_liquor_temp_c"])):
                g = ws.cell(r, hb[head]).value if head in hb else None
                check(same(g, v) or g == v == 0, f"{tag} Scrubber {s['id']} {head}: {g!r} vs JSON {v!r}")
            g = ws.cell(r, hb.get("Overloaded (instantaneous peak over rating)", b0)).value
            check(g == ("yes" if s["overloaded"] else "no"), f"{tag} Scrubber {s['id']} Overloaded {g!r}")
            g = ws.cell(r, hb.get("Peak hour start (plant time)", b0)).value
            check(isinstance(g, dt.datetime) and g.strftime("%Y-%m-%dT%H:%M") == s["peak_at"],
                  f"{tag} Scrubber {s['id']} peak hour {g!r} vs {s['peak_at']}")
    # Products: same rows, mol and kg and share
    ws = wb["Products"]
    h = header_map(ws)
    rows = [[ws.cell(r, c).value for c in range(1, ws.max_column + 1)] for r in range(2, ws.max_row + 1)]
    rows = [x for x in rows if x[0] in runs]
    jp = [(r["id"], p) for r in led["runs"] for p in r["products"]]
    if check(len(rows) == len(jp), f"{tag}: Products sheet {len(rows)} rows, JSON {len(jp)}"):
        for x, (rid, p) in zip(rows, jp):
            ok = (x[0] == rid and x[h["Formula"] - 1] == p["formula"] and x[h["Role"] - 1] == p["role"]
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
        for head, v in (("Runs [count]", m["runs"]), ("NaOH consumed [kg]", m["naoh_kg"]),
                        ("Changeouts [count]", m["changeouts"]), ("HCl to scrubber [kg]", m["vent_kg"]["HCl"]),
                        ("HBr to scrubber [kg]", m["vent_kg"]["HBr"]), ("Cl2 charged [kg]", m["reagents_kg"]["Cl2"]),
                        ("Spent liquor [kg]", m["waste_kg"]["spent_liquor"])):
            g = ws.cell(r, h[head]).value if head in h else None
            check(same(g, v) or g == v == 0, f"{tag} Monthly {m['month']} {head}: {g!r} vs JSON {v!r}")
    # Summary: campaign totals
    ws = wb["Summary"]
    lab = {ws.cell(r, 1).value: ws.cell(r, 2).value for r in range(1, ws.max_row + 1)}
    tot_hcl = sum(m["vent_kg"]["HCl"] for m in led["months"])
    tot_hcl_runs = sum(r["vent"]["HCl_mol"] for r in led["runs"]) * M_HCL / 1e3
    check(same(lab.get("HCl to scrubbers [kg]"), tot_hcl, 1e-12) or tot_hcl == 0, f"{tag}: Summary HCl {lab.get('HCl to scrubbers [kg]')} vs JSON months {tot_hcl}")
    check(abs(tot_hcl - tot_hcl_runs) <= 1e-9 * max(tot_hcl, 1), f"{tag}: months HCl {tot_hcl} vs runs {tot_hcl_runs}")
    check(lab.get("Runs [count]") == len(led["runs"]), f"{tag}: Summary runs count")
    for s in led["scrubbers"]:
        for k, v in ((f"Peak hourly load at {s['id']} [kmol/h]", s["peak_acid_kmol_h"]),
                     (f"Peak instantaneous load at {s['id']} [kmol/h]", s["peak_instant_kmol_h"]),
                     (f"Hottest liquor at {s['id']} [°C]", s["max_liquor_temp_c"])):
            check(same(lab.get(k), v), f"{tag}: Summary {k} {lab.get(k)!r} vs {v}")
    tot_naoh = sum(s["naoh_kg"] for s in led["scrubbers"])
    check(same(lab.get("NaOH consumed in scrubbers [kg]"), tot_naoh, 1e-12), f"{tag}: Summary NaOH {lab.get('NaOH consumed in scrubbers [kg]')} vs {tot_naoh}")
    check(lab.get("Warnings [count]") == len(led["warnings"]), f"{tag}: Summary warnings count {lab.get('Warnings [count]')} vs {len(led['warnings'])}")


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
    nform = ncharts = 0
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
                check(ws.freeze_panes == "A2", f"{tag} {name}: header row not frozen ({ws.freeze_panes})")
                check(bool(ws.auto_filter.ref), f"{tag} {name}: no filter on the header row")
                check_units(tag, ws)
                nform += check_formulas(tag, ws, wv[name])
                check_finite(tag, ws)
            ncharts += check_xml(tag, base + ".xlsx", wb)
            check_cautions(tag, wb, camp, led)
            check_numbers(tag, wb, led)
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
