"""The workbook's figures read back with openpyxl against hand calculations from the campaign below,
one run of each reagent (Cl2, Br2, SO2Cl2, NBS, HBr): yield, substrate conversion, selectivity to
the wanted product and halogen efficiency per run (Runs sheet), per month and route (Monthly yields
sheet and the Summary), and the caustic basis of the changeouts (Liquor by run, Scrubber units,
Monthly): solution bought at the make-up strength, NaOH in it, dilution water per changeout.

Hand figures (never the program's JSON): CIAAW 2021 standard atomic weights (abridged, _hl.CIAAW),
so 16.043 kg of methane, 92.141 kg of toluene and 42.081 kg of propene are 1000 mol each.
- Methane with rate_ratios 1 : 3/4 : 1/2 : 1/4 (each step proportional to the H left) and toluene +
  NBS (3 benzylic H alike, over-halogenation factor 1) are the binomial limit of the batch degree
  model (design section 4): x_n = C(N, n) p^n (1 - p)^(N - n), p = halogen reacted / (N x
  substrate); wanted = the monohalide x_1, conversion = 1 - x_0.  Cl2, Br2 and SO2Cl2 all put one
  halogen on carbon per molecule reacted.
- Propene + HBr: one C=C, one step; wanted 1-bromopropane = HBr reacted.
- Halogen efficiency counts halogen atoms charged: 2 per Cl2, Br2 or SO2Cl2, 1 per NBS or HBr
  (design section 5).
- A fresh charge of liquor_kg at w_fresh from solution at w_makeup: solution = liquor_kg x w_fresh /
  w_makeup, water = liquor_kg - solution (NaOH is conserved on dilution).
"""
import json
import math
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, CIAAW, WRAP, Tally  # noqa: E402

import openpyxl  # noqa: E402

W = CIAAW
T = Tally()


def mm(**n):
    return sum(W[el] * k for el, k in n.items())


MM = {"CH4": mm(C=1, H=4), "C7H8": mm(C=7, H=8), "C3H6": mm(C=3, H=6),
      "CH3Cl": mm(C=1, H=3, Cl=1), "CH3Br": mm(C=1, H=3, Br=1), "C7H7Br": mm(C=7, H=7, Br=1),
      "C3H7Br": mm(C=3, H=7, Br=1)}
LIQUOR_KG, FRESH_PCT, MAKEUP_PCT = 300.0, 10.0, 40.0
RATIOS = {"rate_ratios": [1, 0.75, 0.5, 0.25]}


def binom(N, p, n):
    return math.comb(N, n) * p ** n * (1 - p) ** (N - n)


def run(rid, day, smiles, name, mol, reagent, eq, model=None, conv=None, scrub=True, feed_h=2):
    r = {"id": rid, "start": f"2027-06-{day:02d}T06:00", "substrate": {"name": name, "smiles": smiles},
         "substrate_kg": mol * MM[{"C": "CH4", "Cc1ccccc1": "C7H8", "C=CC": "C3H6"}[smiles]] / 1000.0,
         "reagent": reagent, "reagent_eq": eq, "temp_c": 25, "feed_h": feed_h}
    if model:
        r["model"] = model
    if conv is not None:
        r["halogen_conversion"] = conv
    if scrub:
        r["scrubber"] = "S1"
    return r


CAMPAIGN = {
    "format": "haloledger-campaign/1", "title": "workbook figures by hand", "site": "test bench",
    "issued": "2027-05-20",
    "scrubbers": [{"id": "S1", "liquor": "naoh", "naoh_wt_pct": FRESH_PCT, "liquor_kg": LIQUOR_KG,
                   "makeup_naoh_wt_pct": MAKEUP_PCT, "min_naoh_wt_pct": 2, "rated_acid_kmol_h": 50,
                   "max_liquor_temp_c": 150}],
    "runs": [run("CL-1", 1, "C", "methane", 1000, "Cl2", 0.4, RATIOS),
             run("CL-2", 3, "C", "methane", 2000, "Cl2", 0.8, RATIOS),
             run("BR-1", 5, "C", "methane", 1000, "Br2", 0.2, RATIOS),
             run("SC-1", 7, "C", "methane", 1000, "SO2Cl2", 0.4, RATIOS),
             run("NB-1", 9, "Cc1ccccc1", "toluene", 1000, "NBS", 0.6, {"overhalogenation_factor": 1}, scrub=False),
             run("HB-1", 11, "C=CC", "propene", 1000, "HBr", 1.0, conv=0.95)],
}

# hand figures per run: substrate mol, wanted mol, converted mol, halogen atoms charged, wanted formula
HAND = {}
for rid, mol, N, halogen, atoms_per in (("CL-1", 1000, 4, 400, 2), ("CL-2", 2000, 4, 1600, 2),
                                        ("BR-1", 1000, 4, 200, 2), ("SC-1", 1000, 4, 400, 2),
                                        ("NB-1", 1000, 3, 600, 1)):
    p = halogen / (N * mol)
    HAND[rid] = (mol, mol * binom(N, p, 1), mol * (1 - binom(N, p, 0)), halogen * atoms_per)
HAND["HB-1"] = (1000, 950.0, 950.0, 1000)
FORMULA = {"CL-1": "CH3Cl", "CL-2": "CH3Cl", "BR-1": "CH3Br", "SC-1": "CH3Cl", "NB-1": "C7H7Br",
           "HB-1": "C3H7Br"}


def figures(sub, wanted, conv, hal):
    """yield, conversion, selectivity, halogen efficiency [%]; the wanted product carries one halogen"""
    return 100 * wanted / sub, 100 * conv / sub, 100 * wanted / conv, 100 * wanted / hal


def close(a, b, what, rel=1e-9):
    ok = isinstance(a, (int, float)) and abs(a - b) <= rel * max(abs(b), 1e-12)
    T.check(ok, f"{what}: workbook {a!r}, by hand {b!r}")


def header(ws):
    return {c.value: c.column for c in ws[1] if isinstance(c.value, str)}


COLUMN = {"packing_factor_1_m": 300, "htu_m": 0.6, "removal_fraction": 0.99, "flood_fraction": 0.7,
          "carrier_kmol_h": 20, "liquor_kg_h": 2000, "gas_temp_c": 20}

with tempfile.TemporaryDirectory() as d:
    camp = os.path.join(d, "figures.json")
    book = os.path.join(d, "figures.xlsx")
    with open(camp, "w") as f:
        json.dump(CAMPAIGN, f, indent=1)
    p = subprocess.run(WRAP + [BIN, "report", camp, "-o", book], capture_output=True, text=True)
    if not T.check(p.returncode == 0, f"report exit {p.returncode}: {p.stderr}"):
        print("\n".join("FAIL: " + x for x in T.fails))
        print("workbook_figures_hand_calc: FAILED, no workbook")
        sys.exit(1)
    wb = openpyxl.load_workbook(book)
    # the same campaign with a packed column on S1, for the Column check sheet
    camp_c = json.loads(json.dumps(CAMPAIGN))
    camp_c["scrubbers"][0]["column"] = COLUMN
    with open(camp, "w") as f:
        json.dump(camp_c, f, indent=1)
    book_c = os.path.join(d, "figures-column.xlsx")
    p = subprocess.run(WRAP + [BIN, "report", camp, "-o", book_c], capture_output=True, text=True)
    wb_c = openpyxl.load_workbook(book_c) if T.check(p.returncode == 0, f"column report exit {p.returncode}") else None

# Hourly load: every run vents over its 2 h from 06:00 (peak factor 1), so the clock hours 06:00
# and 07:00 of its day carry vent mol / 2 h and every other hour between is 0.  Vent by hand:
# CL-1 400 mol HCl, CL-2 1600, BR-1 200 mol HBr, SC-1 400 HCl + 400 SO2, HB-1 the 5 % of 1000
# mol HBr left unreacted (50); NB-1 has no scrubber.
ws = wb["Hourly load"]
h = header(ws)
vent_mol = {1: 400, 3: 1600, 5: 200, 7: 800, 11: 50}
rows = [(ws.cell(r, h["Hour start (plant time)"]).value,
         ws.cell(r, h["Vent gas load, mean over the hour [kmol/h]"]).value) for r in range(2, ws.max_row + 1)]
T.check(len(rows) == 10 * 24 + 2 and rows[0][0].isoformat() == "2027-06-01T06:00:00" and
        rows[-1][0].isoformat() == "2027-06-11T07:00:00",
        f"Hourly load: {len(rows)} rows from {rows[0][0] if rows else None} to {rows[-1][0] if rows else None}")
for at, kmol_h in rows:
    want = vent_mol.get(at.day, 0) / 2 / 1000 if at.hour in (6, 7) else 0.0
    if want:
        close(kmol_h, want, f"Hourly load at {at.isoformat()}")
    else:
        T.check(kmol_h == 0, f"Hourly load at {at.isoformat()}: {kmol_h!r}, by hand 0")

# Column check by hand (design section 4): the gas at the instantaneous peak is the carrier plus
# CL-2's 1600 mol over 2 h (0.8 kmol/h, the largest vent rate; no runs overlap): 20.8 kmol/h,
# y_in = 0.8 / 20.8, y_out = y_in (1 - 0.99), NTU = ln(1 / (1 - 0.99)) = ln 100, height = HTU x NTU
if wb_c is not None:
    ws = wb_c["Column check"]
    h = header(ws)
    cells = {k: ws.cell(2, c).value for k, c in h.items()}
    T.check(cells.get("Scrubber") == "S1", f"Column check row 2: {cells}")
    for head, want in (("Gas flow at the instantaneous peak [kmol/h]", 20.8),
                       ("Acid gas in [mol/mol]", 0.8 / 20.8),
                       ("Acid gas out [mol/mol]", 0.8 / 20.8 * 0.01),
                       ("Transfer units, NTU (dimensionless)", math.log(100)),
                       ("Packed height [m]", 0.6 * math.log(100))):
        close(cells.get(head), want, f"Column check {head}")

# Runs: one row a run
ws = wb["Runs"]
h = header(ws)
cols = ("Yield [%]", "Substrate conversion [%]", "Selectivity to wanted product [%]", "Halogen efficiency [%]")
for c in cols + ("Wanted product (formula)", "Wanted product [kg]"):
    T.check(c in h, f"Runs lacks the column {c!r}")
rows = {ws.cell(r, 1).value: r for r in range(2, ws.max_row + 1)}
for rid, (sub, wanted, conv, hal) in HAND.items():
    r = rows.get(rid)
    if not T.check(r, f"Runs lacks {rid}"):
        continue
    for c, v in zip(cols, figures(sub, wanted, conv, hal)):
        close(ws.cell(r, h.get(c, 1)).value, v, f"Runs {rid} {c}")
    T.check(ws.cell(r, h.get("Wanted product (formula)", 1)).value == FORMULA[rid],
            f"Runs {rid} wanted product {ws.cell(r, h.get('Wanted product (formula)', 1)).value!r}")
    # kg from CIAAW abridged weights: the program's table may carry more digits
    close(ws.cell(r, h.get("Wanted product [kg]", 1)).value, wanted * MM[FORMULA[rid]] / 1000,
          f"Runs {rid} wanted product kg", 1e-4)

# Monthly yields: one row a route of June 2027; the Cl2 route sums CL-1 and CL-2 in moles
ws = wb["Monthly yields"]
h = header(ws)
routes = {("methane", "Cl2"): ("CL-1", "CL-2"), ("methane", "Br2"): ("BR-1",),
          ("methane", "SO2Cl2"): ("SC-1",), ("toluene", "NBS"): ("NB-1",), ("propene", "HBr"): ("HB-1",)}
mrows = {(ws.cell(r, h.get("Substrate", 1)).value, ws.cell(r, h.get("Reagent", 1)).value): r
         for r in range(2, ws.max_row + 1) if ws.cell(r, 1).value == "2027-06"}
T.check(len(mrows) == len(routes), f"Monthly yields: {len(mrows)} routes for 2027-06, expected {len(routes)}")
hand_month = {}
for key, ids in routes.items():
    tot = [sum(HAND[i][k] for i in ids) for k in range(4)]
    hand_month[key] = figures(*tot)
    r = mrows.get(key)
    if not T.check(r, f"Monthly yields lacks {key}"):
        continue
    T.check(ws.cell(r, h.get("Runs [count]", 1)).value == len(ids), f"Monthly yields {key} runs")
    close(ws.cell(r, h.get("Substrate charged [mol]", 1)).value, tot[0], f"Monthly yields {key} substrate mol", 1e-4)
    close(ws.cell(r, h.get("Wanted product [mol]", 1)).value, tot[1], f"Monthly yields {key} wanted mol", 1e-4)
    close(ws.cell(r, h.get("Halogen atoms charged [mol]", 1)).value, tot[3], f"Monthly yields {key} halogen atoms", 1e-4)
    for c, v in zip(cols, hand_month[key]):
        close(ws.cell(r, h.get(c, 1)).value, v, f"Monthly yields {key} {c}")

# Summary: the month column of the key figures holds each route's yield
ws = wb["Summary"]
lab = {ws.cell(r, 1).value: r for r in range(1, ws.max_row + 1) if isinstance(ws.cell(r, 1).value, str)}
sec = lab.get("Key figures by month")
mcol = {ws.cell(sec, c).value: c for c in range(2, ws.max_column + 1)} if sec else {}
T.check("2027-06" in mcol, f"Summary: no month column 2027-06 ({mcol})")
for (sub, rg), fig in hand_month.items():
    wanted = FORMULA[routes[(sub, rg)][0]]
    item = f"Yield, {sub} + {rg} to {wanted} [%]"
    r = lab.get(item)
    if T.check(r, f"Summary lacks the row {item!r}"):
        close(ws.cell(r, mcol.get("2027-06", 2)).value, fig[0], f"Summary {item}")

# Caustic: every changeout takes 75 kg of 40 wt% solution and 225 kg of water for 300 kg at 10 wt%
sol, water = LIQUOR_KG * FRESH_PCT / MAKEUP_PCT, LIQUOR_KG * (1 - FRESH_PCT / MAKEUP_PCT)
ws = wb["Liquor by run"]
h = header(ws)
hs = "Caustic solution bought, 40 wt% NaOH, for the fresh charge [kg]"
hw = "Dilution water for the fresh charge [kg]"
T.check(hs in h and hw in h, f"Liquor by run lacks {hs!r} or {hw!r}: {list(h)}")
changeouts = 0
for r in range(2, ws.max_row + 1):
    rid = ws.cell(r, 1).value
    if rid not in HAND:
        continue
    fresh = ws.cell(r, h.get("Liquor changed before run", 1)).value == "yes"
    changeouts += fresh
    close(ws.cell(r, h.get(hs, 1)).value, sol if fresh else 0.0, f"Liquor by run {rid} caustic solution")
    close(ws.cell(r, h.get(hw, 1)).value, water if fresh else 0.0, f"Liquor by run {rid} dilution water")
T.check(changeouts >= 1, "the campaign makes at least one changeout (else the caustic checks test nothing)")
ws = wb["Scrubber units"]
h = header(ws)
for c, v in (("Caustic make-up strength [wt% NaOH]", MAKEUP_PCT),
             ("Caustic solution bought per changeout, at make-up strength [kg]", sol),
             ("Dilution water per changeout [kg]", water), ("Liquor changeouts [count]", changeouts),
             ("Caustic solution bought, 40 wt% NaOH [kg]", changeouts * sol),
             ("Dilution water, all changeouts [kg]", changeouts * water)):
    close(ws.cell(2, h.get(c, 1)).value, v, f"Scrubber units {c}")
ws = wb["Monthly"]
h = header(ws)
for c, v in (("Caustic solution bought, 40 wt% NaOH [kg]", changeouts * sol),
             ("NaOH in the caustic bought, as 100 % [kg]", changeouts * sol * MAKEUP_PCT / 100),
             ("Dilution water for fresh charges [kg]", changeouts * water)):
    close(ws.cell(2, h.get(c, 1)).value, v, f"Monthly {c}")

for f in T.fails:
    print("FAIL:", f)
print(f"workbook_figures_hand_calc: {T.n - len(T.fails)}/{T.n} checks passed")
sys.exit(1 if T.fails else 0)
