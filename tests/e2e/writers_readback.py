#!/usr/bin/python3
"""writers_readback.py - the two writers read back by independent readers.

tool_writers ($HL_ROOT/$BUILD/tool_writers) writes a synthetic ledger as xlsx and
JSON; openpyxl, zipfile/ElementTree and Python's json read them back:
  - the sheets in order; each table sheet with panes frozen at B2 (header row, id column) and
    an autofilter on its header row; the Summary a form without either;
  - every numeric column of a table sheet has a unit "[..]" in its header
    (Summary: in the item label; Assumptions: a unit cell);
  - every =SUM() totals cell caches the sum of its range (1e-9 relative);
  - the Monthly charts exist, belong to the Monthly sheet and point at its plain
    month rows (not the totals row, not formula cells);
  - a run id "=1+1" is a string cell in the XML (t="s", no <f>);
  - two writes are byte-identical (xlsx and JSON), streaming mode gives the same cells;
  - JSON: the design section 5 keys, agreement with the workbook;
  - failures (missing folder, file-as-folder, /proc, /dev/full, a file-size limit
    standing in for a full disk, a read-only folder when not root, a NaN) exit 1,
    leave the previous file byte-identical and no temporary behind.
"""
import json
import os
import re
import resource
import shutil
import signal
import stat
import subprocess
import sys
import tempfile
import zipfile
import xml.etree.ElementTree as ET

import openpyxl

ROOT = os.environ.get("HL_ROOT", os.getcwd())
BUILD = os.environ.get("BUILD", "build")
TOOL = os.path.join(ROOT, BUILD, "tool_writers")
WRAP = os.environ.get("HL_WRAP", "").split()
SHEETS = ["Summary", "Runs", "Products", "Liquor by run", "Scrubber units", "Hourly load",
          "Column check", "Emissions by run", "Emissions by hour", "Permit checks", "Emission charts",
          "Orders", "Plan vs actual", "Stock checks", "Waste by run", "Spent liquor", "Reaction heat", "Monthly", "Monthly yields", "Charts",
          "Warnings", "Cautions", "Assumptions"]
TABLE_SHEETS = ["Runs", "Products", "Liquor by run", "Scrubber units", "Hourly load",
                "Column check", "Emissions by run", "Emissions by hour", "Permit checks", "Orders",
                "Waste by run", "Spent liquor", "Reaction heat", "Monthly"]
UNIT = re.compile(r"\[[^\]]+\]")
checks = 0
failures = []
SKIPPED = []  # checks not run here: exit 77 (tests/run.sh counts it as skipped)


def check(cond, what):
    global checks
    checks += 1
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args, limit=None):
    def pre():
        if limit is not None:
            signal.signal(signal.SIGXFSZ, signal.SIG_IGN)  # get EFBIG instead of a signal
            resource.setrlimit(resource.RLIMIT_FSIZE, (limit, limit))
    return subprocess.run(WRAP + [TOOL] + args, capture_output=True, text=True,
                          preexec_fn=pre if limit is not None else None)


def is_num(v):
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def read(path):
    with open(path, "rb") as f:
        return f.read()


def leftovers(d):
    return [n for n in os.listdir(d) if ".tmp-" in n]


def main():
    tmp = tempfile.mkdtemp(prefix="hl-writers-")
    try:
        body(tmp)
    finally:
        for dp, dn, fn in os.walk(tmp):
            os.chmod(dp, 0o700)
        shutil.rmtree(tmp, ignore_errors=True)
    if failures:
        print("%d of %d checks failed" % (len(failures), checks))
        sys.exit(1)
    if SKIPPED:
        print("writers read-back: %d checks passed, SKIPPED: %s" % (checks, ", ".join(SKIPPED)))
        sys.exit(77)
    print("writers read-back: %d checks passed" % checks)


def body(tmp):
    x1, j1 = os.path.join(tmp, "a.xlsx"), os.path.join(tmp, "a.json")
    x2, j2 = os.path.join(tmp, "b.xlsx"), os.path.join(tmp, "b.json")
    for x, j in ((x1, j1), (x2, j2)):
        r = run([x, j])
        check(r.returncode == 0, "tool_writers exit 0 (%s)" % r.stderr.strip())
        if r.returncode != 0:
            return
    check(read(x1) == read(x2), "two xlsx writes are byte-identical")
    check(read(j1) == read(j2), "two JSON writes are byte-identical")
    check(not leftovers(tmp), "no temporary files left after success")

    wb = openpyxl.load_workbook(x1)             # formulas
    wv = openpyxl.load_workbook(x1, data_only=True)  # cached values
    check(wb.sheetnames == SHEETS, "sheets in order: %s" % wb.sheetnames)
    led = json.loads(read(j1).decode("utf-8"))

    for name in SHEETS:
        ws = wb[name]
        if name in ("Charts", "Emission charts"):  # a title row and the chart drawings
            check(ws["A1"].value, "%s: has its title" % name)
            continue
        check(ws.max_row >= 2, "%s: has content" % name)
        if name == "Summary":
            check(ws.freeze_panes is None and not ws.auto_filter.ref, "Summary: a form, no panes or filter")
            continue
        check(ws.freeze_panes == "B2", "%s: header row and id column frozen (%s)" % (name, ws.freeze_panes))
        ref = ws.auto_filter.ref
        check(bool(ref) and re.match(r"^A1:[A-Z]+\d+$", ref or ""),
              "%s: autofilter on the header row (%s)" % (name, ref))

    # units in headers
    for name in TABLE_SHEETS:
        ws = wv[name]
        rows = list(ws.iter_rows(values_only=True))
        for c, head in enumerate(rows[0]):
            if not head:
                continue
            numeric = any(is_num(r[c]) for r in rows[1:] if c < len(r))
            if numeric:
                check(UNIT.search(head) or head.endswith("(dimensionless)"),
                      "%s: numeric column '%s' has a unit" % (name, head))
    for row in wv["Summary"].iter_rows(min_row=2, values_only=True):
        if any(is_num(v) for v in row[1:]):
            check(UNIT.search(row[0] or ""), "Summary: '%s' has a unit" % row[0])
    for row in wv["Assumptions"].iter_rows(min_row=2, values_only=True):
        if is_num(row[1]):
            check(bool(row[2]), "Assumptions: '%s' has a unit cell" % row[0])
    for row in wv["Cautions"].iter_rows(min_row=2, values_only=True):
        check(not any(is_num(v) for v in row), "Cautions: text only")

    # totals: every =SUM(range) caches the sum of its range
    nsum = 0
    sheets_with_totals = set()
    for name in SHEETS:
        ws, vs = wb[name], wv[name]
        for row in ws.iter_rows():
            for cell in row:
                f = cell.value
                if cell.data_type == "f":
                    m = re.fullmatch(r"=SUM\(([A-Z]+\d+)(?::([A-Z]+\d+))?\)", f)
                    check(m is not None, "%s!%s: formula is a plain SUM (%s)" % (name, cell.coordinate, f))
                    if not m:
                        continue
                    last = m.group(2) or m.group(1)
                    vals = [c.value for r in vs[m.group(1):last] for c in r]
                    check(all(is_num(v) for v in vals), "%s!%s: range is all numbers" % (name, cell.coordinate))
                    for r in ws[m.group(1):last]:
                        for c in r:
                            check(c.data_type != "f",
                                  "%s: summed cell %s is a plain number" % (name, c.coordinate))
                    want = sum(v for v in vals if is_num(v))
                    got = vs[cell.coordinate].value
                    ok = is_num(got) and abs(got - want) <= 1e-9 * max(abs(want), 1e-300)
                    check(ok, "%s!%s: cached %r == sum %r" % (name, cell.coordinate, got, want))
                    nsum += 1
                    sheets_with_totals.add(name)
    check(nsum >= 40, "at least 40 totals cells (%d)" % nsum)
    # Orders and Products have no totals row on purpose: their lines mix substances
    check(sheets_with_totals >= {"Runs", "Liquor by run", "Scrubber units", "Waste by run",
                                 "Spent liquor", "Monthly"}
          and not sheets_with_totals & {"Orders", "Products"},
          "totals on the sheets of like things only: %s" % sorted(sheets_with_totals))

    # run id "=1+1" stays text: in the sheet XML the cell is a string, not a formula
    z = zipfile.ZipFile(x1)
    names = z.namelist()
    ns = {"m": "http://schemas.openxmlformats.org/spreadsheetml/2006/main"}
    wbx = ET.fromstring(z.read("xl/workbook.xml"))
    order = [s.get("name") for s in wbx.find("m:sheets", ns)]
    check(order == SHEETS, "workbook.xml sheet order")
    runs_rows = list(wv["Runs"].iter_rows(min_row=2, values_only=True))
    idx = [i for i, r in enumerate(runs_rows) if r[0] == "=1+1"]
    check(len(idx) == 1, "run '=1+1' listed once on Runs")
    if idx:
        ref = "A%d" % (idx[0] + 2)
        sx = ET.fromstring(z.read("xl/worksheets/sheet2.xml"))
        cell = [c for c in sx.iter("{%s}c" % ns["m"]) if c.get("r") == ref]
        check(cell and cell[0].get("t") in ("s", "inlineStr") and cell[0].find("m:f", ns) is None,
              "Runs!%s holds '=1+1' as a string cell" % ref)
        check(wb["Runs"][ref].data_type == "s", "openpyxl sees Runs!%s as text" % ref)

    # charts: three or four, drawn on the Charts sheet, series on the Monthly month rows
    all_charts = sorted(n for n in names if re.fullmatch(r"xl/charts/chart\d+\.xml", n))
    charts = [c for c in all_charts if "Monthly!" in z.read(c).decode()]
    # the Emission charts sheet: each chart on the Hourly load or the Emissions by hour rows
    for ch in all_charts:
        if ch not in charts:
            refs = re.findall(r"<c:f>([^<]+)</c:f>", z.read(ch).decode())
            check(refs and all(r.startswith(("'Hourly load'!", "'Emissions by hour'!")) for r in refs),
                  "%s refers to Hourly load or Emissions by hour only: %s" % (ch, refs[:3]))
    check(len(charts) in (3, 4), "three or four chart parts (%s)" % charts)
    rel = "xl/worksheets/_rels/sheet%d.xml.rels" % (SHEETS.index("Charts") + 1)
    rels = z.read(rel).decode() if rel in names else ""
    check("drawing" in rels, "Charts (%s) carries the drawing" % rel)
    nmonths = len(led["months"])
    mv = wb["Monthly"]
    for ch in charts:
        text = z.read(ch).decode()
        refs = re.findall(r"<c:f>([^<]+)</c:f>", text)
        vals = re.findall(r"<c:val>.*?<c:f>([^<]+)</c:f>", text, re.S)
        check(refs and all(r.startswith("Monthly!") for r in refs), "%s refers to Monthly only" % ch)
        check(vals, "%s has series values" % ch)
        for r in vals:
            m = re.fullmatch(r"Monthly!\$([A-Z]+)\$(\d+):\$([A-Z]+)\$(\d+)", r)
            check(m and m.group(2) == "2" and int(m.group(4)) == nmonths + 1,
                  "%s series %s covers the %d month rows only" % (ch, r, nmonths))
            if m:
                for row in mv["%s2:%s%s" % (m.group(1), m.group(3), m.group(4))]:
                    for c in row:
                        check(is_num(c.value), "%s: series cell %s is a plain number" % (ch, c.coordinate))
    core = z.read("docProps/core.xml").decode()
    check("2027-02-15T00:00:00Z" in core, "creation time from the ledger, not the clock")

    # JSON: design section 5 keys and agreement with the workbook
    check(led["format"] == "haloledger-ledger/1", "JSON format tag")
    for k in ("title", "site", "file"):
        check(k in led["campaign"], "campaign.%s" % k)
    run_keys = ["id", "start", "reactor", "scrubber", "reagent", "temp_c", "reactor_mode",
                "substrate", "reagent_charged", "halogen_reacted_mol", "products", "byproducts",
                "vent", "element_balance"]
    for r in led["runs"]:
        for k in run_keys:
            check(k in r, "runs[].%s" % k)
        for k in ("name", "smiles", "formula", "molar_mass_g_mol", "kg", "mol"):
            check(k in r["substrate"], "runs[].substrate.%s" % k)
        for k in ("HCl_kg", "HBr_kg", "SO2_kg", "succinimide_kg"):
            check(k in r["byproducts"], "runs[].byproducts.%s" % k)
        for k in ("HCl_mol", "HBr_mol", "Cl2_mol", "Br2_mol", "SO2_mol", "acid_kmol_h"):
            check(k in r["vent"], "runs[].vent.%s" % k)
        for k in ("naoh_kg", "heat_kj", "temp_rise_k", "changeout_before"):
            check(k in r["scrubber"], "runs[].scrubber.%s" % k)
        check("max_rel_error" in r["element_balance"], "runs[].element_balance.max_rel_error")
        for p in r["products"]:
            for k in ("smiles", "formula", "degree", "mol", "kg", "mol_fraction", "role"):
                check(k in p, "products[].%s" % k)
            check(p["role"] in ("wanted", "isomer", "overhalogenated", "unreacted"), "role value")
            check(0 <= p["mol_fraction"] <= 1, "mol_fraction in 0..1")
    for m in led["months"]:
        for k in ("month", "runs", "product_kg", "reagents_kg", "vent_kg", "naoh_kg",
                  "changeouts", "waste_kg"):
            check(k in m, "months[].%s" % k)
        check("spent_liquor" in m["waste_kg"], "months[].waste_kg.spent_liquor")
        check(re.fullmatch(r"\d{4}-\d{2}", m["month"]), "month text")
    for o in led["orders"]:
        for k in ("month", "reagent", "demand_kg", "stock_start_kg", "to_order_kg", "container",
                  "containers", "order_by"):
            check(k in o, "orders[].%s" % k)
        check(re.fullmatch(r"\d{4}-\d{2}-\d{2}", o["order_by"]), "order_by is an ISO date")
    for s in led["scrubbers"]:
        for k in ("id", "peak_acid_kmol_h", "peak_at", "rated_acid_kmol_h", "overloaded",
                  "changeouts", "naoh_kg"):
            check(k in s, "scrubbers[].%s" % k)
    for w in led["warnings"]:
        check("run" in w and "message" in w, "warnings[] keys")
    check(len(led["runs"]) == 3 and led["runs"][1]["id"] == "=1+1", "JSON keeps the run id as text")
    check(re.fullmatch(r"\d{4}-\d{2}-\d{2}T\d{2}:\d{2}", led["runs"][0]["start"]), "ISO start")
    # the same numbers in both outputs
    rv = wv["Runs"]
    heads = [c.value for c in rv[1]]
    kgcol = heads.index("Reagent charged [kg]")
    for i, r in enumerate(led["runs"]):
        got = rv.cell(row=i + 2, column=kgcol + 1).value
        check(got == r["reagent_charged"]["kg"], "run %s charged kg equal in xlsx and JSON" % r["id"])
    # Summary: runs per month in the month columns of the key figures
    sumrow = [c.value for c in wv["Summary"]["A"]]
    runs_row, sec = sumrow.index("Runs [count]") + 1, sumrow.index("Key figures by month") + 1
    sv = wv["Summary"]
    per_month = {sv.cell(row=sec, column=c).value: sv.cell(row=runs_row, column=c).value
                 for c in range(2, 2 + min(6, len(led["months"])))}
    check(per_month == {m["month"]: m["runs"] for m in led["months"][:6]},
          "Summary runs per month %s vs JSON" % per_month)
    mvv = wv["Monthly"]
    mh = [c.value for c in mvv[1]]
    hcl = mh.index("HCl to scrubber [kg]") + 1
    for i, m in enumerate(led["months"]):
        check(abs(mvv.cell(row=i + 2, column=hcl).value - m["vent_kg"]["HCl"]) <= 1e-9 *
              max(1, m["vent_kg"]["HCl"]), "Monthly HCl equals JSON months[].vent_kg.HCl")
    check(led["scrubbers"][0]["overloaded"] is True, "synthetic overload flagged")

    # streaming (constant_memory) mode: same cell values
    xs = os.path.join(tmp, "s.xlsx")
    r = run(["--stream", "1", xs, "-"])
    check(r.returncode == 0, "streaming write exit 0 (%s)" % r.stderr.strip())
    if r.returncode == 0:
        ws2 = openpyxl.load_workbook(xs)
        check(ws2.sheetnames == SHEETS, "streaming: sheets in order")
        same = all([[c.value for c in row] for row in wb[n].iter_rows()] ==
                   [[c.value for c in row] for row in ws2[n].iter_rows()] for n in SHEETS)
        check(same, "streaming mode gives the same cells")
        zs = zipfile.ZipFile(xs)
        check(len([n for n in zs.namelist() if n.startswith("xl/charts/chart")]) == len(all_charts),
              "streaming: charts kept")

    # failures: exit 1, message, previous file intact, nothing left behind
    prev_x, prev_j = read(x1), read(j1)

    def refused(args, what, limit=None, keep=()):
        r = run(args, limit)
        check(r.returncode == 1, "%s: exit 1 (got %d)" % (what, r.returncode))
        check("tool_writers:" in r.stderr and len(r.stderr.strip()) > 20,
              "%s: clear message (%s)" % (what, r.stderr.strip()))
        for path, data in keep:
            check(read(path) == data, "%s: previous %s intact" % (what, os.path.basename(path)))
        return r.stderr

    refused([os.path.join(tmp, "no", "such", "dir", "o.xlsx"), "-"], "xlsx into a missing folder")
    refused(["-", os.path.join(tmp, "no", "such", "dir", "o.json")], "JSON into a missing folder")
    refused([os.path.join(x1, "o.xlsx"), "-"], "xlsx under a file used as folder", keep=[(x1, prev_x)])
    refused(["-", os.path.join(j1, "o.json")], "JSON under a file used as folder", keep=[(j1, prev_j)])
    refused(["/proc/hl-writers-test.xlsx", "-"], "xlsx into /proc")
    refused(["-", "/proc/hl-writers-test.json"], "JSON into /proc")
    for args in (["/dev/full", "-"], ["-", "/dev/full"]):
        refused(args, "write to /dev/full (%s)" % ("xlsx" if args[0] != "-" else "JSON"))
        st_ = os.stat("/dev/full")
        check(stat.S_ISCHR(st_.st_mode), "/dev/full is still a device")
    # full disk: a file-size limit makes every write past it fail (EFBIG)
    err = refused([x1, "-"], "xlsx on a full disk", limit=16 * 1024, keep=[(x1, prev_x)])
    check("cannot write" in err, "full disk: message names the write (%s)" % err.strip())
    refused(["-", j1], "JSON on a full disk", limit=4 * 1024, keep=[(j1, prev_j)])
    check(not leftovers(tmp), "no temporaries after the failures: %s" % leftovers(tmp))
    # a NaN never reaches either file
    err = refused(["--nan", x1, "-"], "xlsx with a NaN", keep=[(x1, prev_x)])
    check(re.search(r"SO2 to scrubbers? \[kg\]", err) and "non-finite" in err,
          "NaN message names the column (%s)" % err.strip())
    err = refused(["--nan", "-", j1], "JSON with a NaN", keep=[(j1, prev_j)])
    check("runs[2].vent.SO2_mol" in err, "NaN message names the JSON key")
    if os.geteuid() != 0:
        ro = os.path.join(tmp, "ro")
        os.mkdir(ro)
        px, pj = os.path.join(ro, "p.xlsx"), os.path.join(ro, "p.json")
        shutil.copy(x1, px)
        shutil.copy(j1, pj)
        os.chmod(ro, 0o500)
        refused([px, "-"], "xlsx into a read-only folder", keep=[(px, prev_x)])
        refused(["-", pj], "JSON into a read-only folder", keep=[(pj, prev_j)])
        os.chmod(ro, 0o700)
    else:
        print("note: running as root, chmod 0500 does not stop writes: read-only folder case "
              "covered by /proc and the file-as-folder path")
    check(not leftovers(tmp), "no temporaries left at the end")

    if shutil.which("soffice"):
        out = os.path.join(tmp, "lo")
        r = subprocess.run(["soffice", "-env:UserInstallation=file://" + os.path.join(tmp, "prof"),
                            "--headless", "--convert-to", "csv", "--outdir", out, x1],
                           capture_output=True, text=True, timeout=120)
        check(r.returncode == 0 and os.listdir(out), "LibreOffice converts the workbook")
    else:
        print("SKIPPED: LibreOffice not installed, conversion check not run")
        SKIPPED.append("LibreOffice conversion")


if __name__ == "__main__":
    main()
