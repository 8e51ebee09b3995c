#!/usr/bin/python3
"""close_hand_calc.py - the month close of tests/campaigns/close-hand.json against a hand calculation.

The campaign is chosen so that every figure can be worked from its own numbers:
- chloroform (CHCl3, one H) + Cl2 -> CCl4 + HCl: the substrate takes one Cl only, so with a
  charge below one equivalent and conversion 1 every Cl2 charged makes one CCl4 and one HCl;
- ethylene + HBr -> bromoethane (radical addition, one C=C): conversion 0.9 of the HBr charged
  adds, the rest vents as HBr;
- the scrubber takes 1 NaOH per HCl or HBr (HX + NaOH -> NaX + H2O).
Molar masses from the CIAAW 2021 standard atomic weights, abridged (H 1.008, C 12.011,
O 15.999, Na 22.990, Cl 35.45, Br 79.904).  The stock book and the orders are worked from the
campaign's stock, deliveries, counts and draws (design section 4, month close).
"""
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

W = {"H": 1.008, "C": 12.011, "O": 15.999, "Na": 22.990, "Cl": 35.45, "Br": 79.904}
M_CL2 = 2 * W["Cl"]
M_CHCL3 = W["C"] + W["H"] + 3 * W["Cl"]
M_CCL4 = W["C"] + 4 * W["Cl"]
M_HBR = W["H"] + W["Br"]
M_C2H5BR = 2 * W["C"] + 5 * W["H"] + W["Br"]
M_NAOH = W["Na"] + W["O"] + W["H"]
SRC = os.path.join(ROOT, "tests", "campaigns", "close-hand.json")
T = Tally()


def near(a, b, what, rel=1e-9):
    ok = a is not None and abs(a - b) <= rel * max(abs(b), 1.0)
    return T.check(ok, "%s: got %r, expected %r" % (what, a, b))


def report(path, tmp, extra=()):
    out = os.path.join(tmp, "ledger.json")
    if os.path.exists(out):
        os.unlink(out)
    p = subprocess.run(WRAP + [BIN, "report", path, "-o", out] + list(extra), capture_output=True,
                       text=True, timeout=120)
    return p, out


def main():
    camp = json.load(open(SRC))
    sub_kmol = 1193.69 / M_CHCL3          # 10 kmol of chloroform per chlorination
    cl_plan_kmol = 500 / M_CL2            # every planned Cl2 run charges 500 kg
    ccl4_plan = cl_plan_kmol * M_CCL4     # one CCl4 per Cl2
    naoh_cl_plan = cl_plan_kmol * M_NAOH  # one HCl per Cl2, one NaOH per HCl
    hbr_plan_kmol = 647.296 / M_HBR
    brom_plan = 0.9 * hbr_plan_kmol * M_C2H5BR
    naoh_hb_plan = 0.1 * hbr_plan_kmol * M_NAOH

    with tempfile.TemporaryDirectory() as tmp:
        p, out = report(SRC, tmp, ["--today", "2027-03-31"])
        if not T.check(p.returncode == 0, "report exits 0 (got %d: %s)" % (p.returncode, p.stderr)):
            return finish()
        d = json.load(open(out))
        runs = {r["id"]: r for r in d["runs"]}

        # CL-1: drew 540 kg against 500 planned -> +40 kg, +8 % > 5 % tolerance: flagged
        v = runs["CL-1"]["variance"]
        near(v["reagent_kg_plan"], 500, "CL-1 reagent plan")
        near(v["reagent_kg"], 40, "CL-1 reagent variance kg")
        near(v["reagent_pct"], 8, "CL-1 reagent variance %")
        near(v["product_kg_plan"], ccl4_plan, "CL-1 product plan")
        near(v["product_kg"], 1150 - ccl4_plan, "CL-1 product variance kg")
        near(v["product_pct"], 100 * (1150 - ccl4_plan) / ccl4_plan, "CL-1 product variance %")
        near(v["yield_pct_plan"], 100 * cl_plan_kmol / sub_kmol, "CL-1 planned yield")
        near(v["yield_pct_actual"], 100 * (1150 / M_CCL4) / sub_kmol, "CL-1 actual yield")
        near(v["naoh_kg_plan"], naoh_cl_plan, "CL-1 NaOH plan")
        T.check(v["naoh_kg"] is None, "CL-1 gives no titration: naoh_kg null")
        T.check(v["flagged"] is True, "CL-1 flagged (8 % over the 5 % reagent tolerance)")
        # the actual draw drives the balance and the scrubber: 540 kg of Cl2 -> 540/M HCl
        near(runs["CL-1"]["reagent_charged"]["kg"], 540, "CL-1 balance charge is the draw")
        near(runs["CL-1"]["losses"]["wanted_kg"], 540 / M_CL2 * M_CCL4, "CL-1 CCl4 from the draw")
        near(runs["CL-1"]["scrubber"]["naoh_kg"], 540 / M_CL2 * M_NAOH, "CL-1 scrubber NaOH from the draw")

        # HB-1: +52.704 kg HBr (+8.14 %), product 700 against 784.56 (-10.8 % > 10 %)
        v = runs["HB-1"]["variance"]
        near(v["reagent_kg"], 700 - 647.296, "HB-1 reagent variance kg")
        near(v["reagent_pct"], 100 * (700 - 647.296) / 647.296, "HB-1 reagent variance %")
        near(v["product_kg_plan"], brom_plan, "HB-1 product plan")
        near(v["product_pct"], 100 * (700 - brom_plan) / brom_plan, "HB-1 product variance %")
        near(v["yield_pct_plan"], 100 * 0.9 * hbr_plan_kmol / (280.54 / (2 * W["C"] + 4 * W["H"])),
             "HB-1 planned yield")
        near(v["naoh_kg_plan"], naoh_hb_plan, "HB-1 NaOH plan (10 % of the HBr vents)")
        near(v["naoh_kg"], 30 - naoh_hb_plan, "HB-1 NaOH variance")
        near(v["naoh_pct"], 100 * (30 - naoh_hb_plan) / naoh_hb_plan, "HB-1 NaOH variance %")
        T.check(v["flagged"] is True, "HB-1 flagged")
        near(runs["HB-1"]["vent"]["HBr_mol"], 0.1 * 700 / M_HBR * 1000, "HB-1 vent from the draw")

        # CL-2 done without figures: booked at plan, not flagged
        v = runs["CL-2"]["variance"]
        T.check(v["reagent_kg"] is None and v["flagged"] is False, "CL-2: no figures, not flagged")
        T.check(runs["CL-2"]["actual"]["status"] == "done", "CL-2 status done")

        # CL-3 cancelled: draws nothing, vents nothing
        r = runs["CL-3"]
        T.check(r["actual"]["status"] == "cancelled", "CL-3 cancelled")
        T.check(r["variance"] is None, "CL-3 has no variance")
        T.check(r["reagent_charged"]["kg"] == 0, "CL-3 draws nothing")
        T.check(all(r["vent"][k] == 0 for k in ("HCl_mol", "HBr_mol", "Cl2_mol", "Br2_mol", "SO2_mol")),
                "CL-3 vents nothing")
        T.check(r["scrubber"]["naoh_kg"] == 0, "CL-3 takes no NaOH")
        T.check(runs["CL-4"]["actual"] is None, "CL-4 still planned: actual null")

        # scrubber total: every run's vent, the draws where weighed, nothing from CL-3
        naoh_total = (540 / M_CL2 + 500 / M_CL2 + 500 / M_CL2 + 1500 / M_CL2 + 0.1 * 700 / M_HBR) * M_NAOH
        near(d["scrubbers"][0]["naoh_kg"], naoh_total, "scrubber NaOH over the campaign")

        # month close, March: CL-1, CL-2, HB-1 done; CL-3 cancelled; CL-4 planned
        m = {x["month"]: x for x in d["months"]}
        c = m["2027-03"]["close"]
        T.check((c["runs_done"], c["runs_cancelled"], c["runs_planned"], c["closed"]) == (3, 1, 1, False),
                "March close counts: %r" % ((c["runs_done"], c["runs_cancelled"], c["runs_planned"], c["closed"]),))
        near(c["reagent_plan_kg"]["Cl2"], 1500, "March Cl2 plan of the runs with an actual")
        near(c["reagent_actual_kg"]["Cl2"], 540 + 500, "March Cl2 drawn (CL-2 at plan, CL-3 none)")
        near(c["reagent_plan_kg"]["HBr"], 647.296, "March HBr plan")
        near(c["reagent_actual_kg"]["HBr"], 700, "March HBr drawn")
        near(c["product_plan_kg"], 3 * ccl4_plan + brom_plan, "March product plan")
        near(c["product_actual_kg"], 1150 + ccl4_plan + 700, "March product actual")
        near(c["naoh_plan_kg"], 3 * naoh_cl_plan + naoh_hb_plan, "March NaOH plan")
        near(c["naoh_actual_kg"], 540 / M_CL2 * M_NAOH + naoh_cl_plan + 30, "March NaOH actual")
        near(c["unexplained_kg"]["Cl2"], 40 + 5, "March unexplained Cl2")
        c = m["2027-04"]["close"]
        T.check((c["runs_done"], c["runs_planned"], c["closed"]) == (0, 1, False), "April close")

        # stock checks: book = 2000 on hand + 500 received 03-04 - (540 + 500 + 0) drawn = 1460
        k = d["stock_checks"]
        T.check(len(k) == 2, "two stock checks")
        near(k[0]["book_kg"], 2000 + 500 - 540 - 500, "first book")
        near(k[0]["counted_kg"], 1420, "first count")
        near(k[0]["unexplained_kg"], 40, "40 kg of Cl2 missing")
        near(k[0]["unexplained_pct"], 100 * 40 / 1040, "missing share of the draws")
        T.check(k[0]["flagged"] is True and k[0]["since"] is None, "first check flagged, from the start")
        # second: from the first count (1420), CL-4 draws 500 at plan; PO-7 is only ordered
        near(k[1]["book_kg"], 1420 - 500, "second book")
        near(k[1]["unexplained_pct"], 100 * 5 / 500, "second share")
        T.check(k[1]["flagged"] is False and k[1]["since"] == "2027-03-10T00:00", "second not flagged")
        leak = [w["message"] for w in d["warnings"] if "stock check Cl2" in w["message"]]
        T.check(len(leak) == 1 and "leak" in leak[0] and "reportable" in leak[0] and "SDS" in leak[0],
                "Cl2 shortfall warns of a leak and a reportable release: %r" % leak)

        # orders from the latest count: 915 kg, PO-5 (300 kg, overdue, still expected) carried in,
        # PO-7 (1000 kg due April) on order, against 1500 + 200 safety
        o = {(x["month"], x["reagent"]): x for x in d["orders"]}
        T.check(("2027-03", "Cl2") not in o, "March Cl2 is past the count: no order line")
        a = o.get(("2027-04", "Cl2"))
        if T.check(a is not None, "April Cl2 order line"):
            near(a["stock_start_kg"], 915 + 300, "April Cl2 stock is the count and PO-5")
            near(a["on_order_kg"], 1000, "April Cl2 on order")
            T.check(a["to_order_kg"] == 0 and a["late"] is False, "placed order covers April: not late")
            near(a["stock_end_kg"], 915 + 300 + 1000 - 1500, "April Cl2 stock carried out")
        near(o[("2027-03", "HBr")]["demand_kg"], 700, "HBr demand is the draw")

        # the workbook carries the same hand figures (read back with openpyxl)
        import openpyxl
        xl = os.path.join(tmp, "close.xlsx")
        p = subprocess.run(WRAP + [BIN, "report", SRC, "--today", "2027-03-31", "-o", xl],
                           capture_output=True, text=True, timeout=120)
        if T.check(p.returncode == 0, "workbook written"):
            wb = openpyxl.load_workbook(xl)
            ws = wb["Plan vs actual"]
            h = {c.value: c.column for c in ws[1]}
            rows = {ws.cell(r, 1).value: r for r in range(2, ws.max_row + 1)}
            T.check(ws.freeze_panes == "B2", "Plan vs actual: header row and id column frozen")
            T.check(set(["CL-1", "CL-2", "CL-3", "HB-1"]) <= set(rows) and "CL-4" not in rows,
                    "Plan vs actual lists the runs with an actual: %r" % sorted(k for k in rows if k))
            near(ws.cell(rows["CL-1"], h["Reagent variance [kg]"]).value, 40, "xlsx CL-1 reagent variance")
            near(ws.cell(rows["HB-1"], h["Wanted product variance [% of plan]"]).value,
                 100 * (700 - brom_plan) / brom_plan, "xlsx HB-1 product variance %")
            near(ws.cell(rows["CL-3"], h["Reagent drawn, booked [kg]"]).value, 0, "xlsx CL-3 drew nothing")
            T.check(str(ws.cell(rows["CL-1"], h["Outside tolerance"]).value).startswith("!!")
                    and ws.cell(rows["CL-2"], h["Outside tolerance"]).value == "no",
                    "xlsx flag marked in text (prints in black and white)")
            ws = wb["Stock checks"]
            h = {c.value: c.column for c in ws[1]}
            near(ws.cell(2, h["Book stock [kg]"]).value, 1460, "xlsx first book")
            near(ws.cell(2, h["Unexplained [kg]"]).value, 40, "xlsx 40 kg missing")
            T.check(ws.cell(2, h["Outside tolerance"]).value == "!! CHECK FOR LEAK", "xlsx leak marker")
            ws = wb["Orders"]
            h = {c.value: c.column for c in ws[1]}
            r = [r for r in range(2, ws.max_row + 1) if ws.cell(r, 1).value == "2027-04"]
            T.check(len(r) == 1 and ws.cell(r[0], h["Placed orders due this month [kg]"]).value == 1000,
                    "xlsx Orders shows the placed order")
            ws = wb["Summary"]
            lab = {ws.cell(r, 1).value: r for r in range(1, ws.max_row + 1)}
            T.check("Cl2 unexplained at stock counts [kg]" in lab and
                    ws.cell(lab["Cl2 unexplained at stock counts [kg]"], 2).value == 45,
                    "Summary month close: unexplained Cl2")
            near(ws.cell(lab.get("Cl2 drawn, actual [kg]", 1), 2).value, 1040, "Summary Cl2 drawn actual")

        # without the placed order the same line is late: 1500 + 200 - 915 = 785 kg, 2 drums of 500
        nopo = dict(camp)
        nopo["deliveries"] = [x for x in camp["deliveries"] if x["status"] != "ordered"]
        path = os.path.join(tmp, "nopo.json")
        json.dump(nopo, open(path, "w"))
        p, out = report(path, tmp, ["--today", "2027-03-31"])
        if T.check(p.returncode == 0, "no-PO variant runs"):
            a = {(x["month"], x["reagent"]): x for x in json.load(open(out))["orders"]}[("2027-04", "Cl2")]
            near(a["to_order_kg"], 785, "to order without the placed order")
            T.check(a["containers"] == 2 and a["late"] is True, "late without the placed order")

        # --strict counts flagged variances and unexplained stock
        p = subprocess.run(WRAP + [BIN, "check", SRC, "--strict"], capture_output=True, text=True, timeout=120)
        T.check(p.returncode == 3, "--strict exits 3 (got %d)" % p.returncode)
        T.check("close: 3 done, 1 cancelled, 1 still planned" in p.stdout, "check prints the close")

        # a done run that has not started by --today is refused at its status, nothing written
        text = open(SRC).read()
        at = text.index('"status": "done"}')  # CL-2's actual, the second done run
        line = text.count("\n", 0, at) + 1
        col = at - text.rfind("\n", 0, at) + len('"status": ')
        p, out = report(SRC, tmp, ["--today", "2027-03-04"])
        want = re.compile(r"close-hand\.json:%d:%d: runs\[1\]\.actual\.status: run CL-2 is done but starts "
                          r"2027-03-05T06:00, after --today 2027-03-04" % (line, col))
        T.check(p.returncode == 2 and want.search(p.stderr), "actual after --today refused: %r" % p.stderr)
        T.check(not os.path.exists(out), "nothing written on a refused actual")
    return finish()


def finish():
    for f in T.fails:
        print("FAIL:", f)
    print("close_hand_calc: %d checks, %d failed" % (T.n, len(T.fails)))
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
