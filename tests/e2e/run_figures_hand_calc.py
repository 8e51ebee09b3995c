"""End to end: yield, conversion, selectivity and halogen efficiency per run and per month
(months[].products[]), and the caustic basis of changeouts, against hand calculations from the
campaign below.

Hand figures use CIAAW 2021 standard atomic weights (abridged, _hl.CIAAW), so 16.043 kg of
methane, 92.141 kg of toluene and 42.081 kg of propene are 1000 mol each.
- Methane + Cl2 with rate_ratios 1 : 3/4 : 1/2 : 1/4 (each step proportional to the H left) and
  toluene + NBS (3 benzylic H alike, over-halogenation factor 1) are the binomial limit of the
  batch degree model (design section 4): x_n = C(N, n) p^n (1 - p)^(N - n), p = halogen reacted /
  (N x substrate).  Wanted = the monohalide, x_1.
- Propene + HBr: one C=C, one step; wanted 1-bromopropane = HBr reacted.
- Halogen efficiency counts halogen atoms: 2 per Cl2, 1 per NBS or HBr (design section 5).
- A fresh charge of liquor_kg at w_fresh from solution at w_makeup: solution = liquor_kg x
  w_fresh / w_makeup, water = liquor_kg - solution (NaOH conserved on dilution).
"""
import json, math, os, re, subprocess, sys, tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, CIAAW, WRAP, Tally

W = CIAAW
T = Tally()


def close(a, b, what, rel=1e-9):
    ok = a is not None and abs(a - b) <= rel * max(abs(b), 1e-12)
    T.check(ok, f"{what}: got {a!r}, expected {b!r}")


def mm(**n):
    return sum(W[el] * k for el, k in n.items())


MM_CH4, MM_TOL, MM_C3H6 = mm(C=1, H=4), mm(C=7, H=8), mm(C=3, H=6)
MM_NAOH = mm(Na=1, O=1, H=1)
LIQUOR_KG, FRESH_PCT, MAKEUP_PCT = 300.0, 10.0, 40.0

CAMPAIGN = {
    "format": "haloledger-campaign/1",
    "title": "run figures by hand",
    "site": "test bench",
    "scrubbers": [{"id": "S1", "liquor": "naoh", "naoh_wt_pct": FRESH_PCT, "liquor_kg": LIQUOR_KG,
                   "makeup_naoh_wt_pct": MAKEUP_PCT, "min_naoh_wt_pct": 2,
                   "rated_acid_kmol_h": 50, "max_liquor_temp_c": 150}],
    "runs": [
        # 1000 mol methane, 400 mol Cl2, all reacting: p = 400 / (4 x 1000) = 0.1.
        # Each vents 400 mol HCl = 16.0 kg NaOH of the 30 kg charged: the second and third
        # runs each need a fresh charge (14 kg left < 16 kg needed).
        {"id": "M", "start": "2027-05-03T06:00", "scrubber": "S1",
         "substrate": {"name": "methane", "smiles": "C"}, "substrate_kg": MM_CH4,
         "reagent": "Cl2", "reagent_eq": 0.4, "temp_c": 25, "feed_h": 2,
         "model": {"rate_ratios": [1, 0.75, 0.5, 0.25]},
         "repeat": {"count": 3, "every_days": 2}},
        # 1000 mol toluene, 600 mol NBS: p = 600 / (3 x 1000) = 0.2
        {"id": "N-1", "start": "2027-05-04T06:00",
         "substrate": {"name": "toluene", "smiles": "Cc1ccccc1"}, "substrate_kg": MM_TOL,
         "reagent": "NBS", "reagent_eq": 0.6, "temp_c": 80, "feed_h": 3,
         "model": {"overhalogenation_factor": 1}},
        # 1000 mol propene, 1000 mol HBr of which 95 % reacts; then 2000 mol with 1000 mol HBr
        {"id": "H-1", "start": "2027-05-05T06:00", "scrubber": "S1",
         "substrate": {"name": "propene", "smiles": "C=CC"}, "substrate_kg": MM_C3H6,
         "reagent": "HBr", "reagent_eq": 1.0, "halogen_conversion": 0.95, "temp_c": 10,
         "feed_h": 2},
        {"id": "H-2", "start": "2027-05-20T06:00", "scrubber": "S1",
         "substrate": {"name": "propene", "smiles": "C=CC"}, "substrate_kg": 2 * MM_C3H6,
         "reagent": "HBr", "reagent_eq": 0.5, "temp_c": 10, "feed_h": 2},
    ],
}

with tempfile.TemporaryDirectory() as d:
    camp = os.path.join(d, "figures.json")
    out = os.path.join(d, "figures-ledger.json")
    with open(camp, "w") as f:
        json.dump(CAMPAIGN, f, indent=1)
    p = subprocess.run(WRAP + [BIN, "report", camp, "-o", out], capture_output=True, text=True)
    T.check(p.returncode == 0, f"report exit {p.returncode}: {p.stderr}")
    L = json.load(open(out)) if p.returncode == 0 else {"runs": [], "months": [], "scrubbers": [],
                                                        "orders": []}
    q = subprocess.run(WRAP + [BIN, "check", camp], capture_output=True, text=True)
    T.check(q.returncode == 0, f"check exit {q.returncode}: {q.stderr}")
    CHECK_TEXT = q.stdout

runs = {r["id"]: r for r in L["runs"]}
T.check(set(runs) == {"M-1", "M-2", "M-3", "N-1", "H-1", "H-2"}, f"run ids {sorted(runs)}")


def binom(N, p, n):
    return math.comb(N, n) * p ** n * (1 - p) ** (N - n)


# (run, substrate mol, wanted mol, substrate left mol, halogen atoms charged)
hand = {
    "M-1": (1000, 1000 * binom(4, 0.1, 1), 1000 * binom(4, 0.1, 0), 2 * 400),
    "N-1": (1000, 1000 * binom(3, 0.2, 1), 1000 * binom(3, 0.2, 0), 1 * 600),
    "H-1": (1000, 950, 50, 1 * 1000),
    "H-2": (2000, 1000, 1000, 1 * 1000),
}
# the binomial numbers spelled out: 29.16 %, 34.39 %; 38.4 %, 48.8 %
close(100 * hand["M-1"][1] / 1000, 29.16, "methane yield hand value", 1e-12)
close(100 * hand["N-1"][1] / 1000, 38.4, "toluene yield hand value", 1e-12)
for rid, (sub, want, left, hal) in hand.items():
    r = runs.get(rid)
    if not T.check(r is not None, f"run {rid} missing"):
        continue
    conv = sub - left
    close(r.get("yield_pct"), 100 * want / sub, f"{rid} yield_pct")
    close(r.get("conversion_pct"), 100 * conv / sub, f"{rid} conversion_pct")
    close(r.get("selectivity_pct"), 100 * want / conv, f"{rid} selectivity_pct")
    close(r.get("halogen_efficiency_pct"), 100 * want / hal, f"{rid} halogen_efficiency_pct")
    close(r.get("halogen_charged_mol"), hal, f"{rid} halogen_charged_mol")
    close(r.get("wanted_mol"), want, f"{rid} wanted_mol")
# the wanted products are the expected structures (SMILES as the program writes them)
wanted = {rid: [p["smiles"] for p in runs[rid]["products"] if p["role"] == "wanted"]
          for rid in runs}
T.check(wanted.get("M-1") == ["ClC"] or wanted.get("M-1") == ["CCl"], f"methane wanted {wanted.get('M-1')}")
T.check(len(wanted.get("H-1", [])) == 1 and wanted["H-1"][0] in ("BrCCC", "CCCBr"),
        f"HBr wanted {wanted.get('H-1')}")

# months[].products[]: one route per substrate/reagent/wanted product, in first-run order
months = L["months"]
T.check(len(months) == 1 and months[0]["month"] == "2027-05", "one month, 2027-05")
m = months[0] if months else {"products": []}
routes = m.get("products", [])
T.check([(x["substrate"], x["reagent"]) for x in routes] ==
        [("C", "Cl2"), ("Cc1ccccc1", "NBS"), ("C=CC", "HBr")], f"routes {routes}")
month_hand = {  # (runs, substrate mol, wanted mol, converted mol, halogen atoms charged)
    "Cl2": (3, 3000, 3 * hand["M-1"][1], 3 * (1000 - hand["M-1"][2]), 3 * 800),
    "NBS": (1, 1000, hand["N-1"][1], 1000 - hand["N-1"][2], 600),
    "HBr": (2, 3000, 1950, 1950, 2000),  # propene: 65 % yield, 97.5 % halogen efficiency
}
for x in routes:
    n, sub, want, conv, hal = month_hand[x["reagent"]]
    what = f"month route {x['reagent']}"
    T.check(x["runs"] == n, f"{what} runs {x['runs']}")
    close(x["substrate_mol"], sub, f"{what} substrate_mol")
    close(x["yield_pct"], 100 * want / sub, f"{what} yield_pct")
    close(x["conversion_pct"], 100 * conv / sub, f"{what} conversion_pct")
    close(x["selectivity_pct"], 100 * want / conv, f"{what} selectivity_pct")
    close(x["halogen_efficiency_pct"], 100 * want / hal, f"{what} halogen_efficiency_pct")
close(month_hand["HBr"][2] / month_hand["HBr"][1] * 100, 65.0, "propene month yield hand value")
# `check` prints the month's routes one a line (three unlike products are not one figure):
# "methane + Cl2 -> CH3Cl: 3 runs, wanted K kg, yield Y %", Y to 0.1 % from the hand figures
route_lines = {}
for ln in CHECK_TEXT.splitlines():
    mt = re.match(r"^ {11}(\S+) \+ (\S+) -> (\S+): (\d+) runs?, wanted ([\d.]+) kg, yield ([\d.]+) %$", ln)
    if mt:
        route_lines[mt.group(2)] = mt.groups()
T.check(re.search(r"^  2027-05  runs 6  wanted products [\d.]+ kg \(3 routes\)", CHECK_TEXT, re.M)
        is not None, f"check month line names 3 routes: {CHECK_TEXT[:300]!r}")
for reagent, (n, sub, want, conv, hal) in month_hand.items():
    g = route_lines.get(reagent)
    if not T.check(g is not None, f"check route line for {reagent}: {sorted(route_lines)}"):
        continue
    T.check(int(g[3]) == n, f"check route {reagent} runs {g[3]} (want {n})")
    T.check(g[5] == f"{100 * want / sub:.1f}", f"check route {reagent} yield {g[5]} "
            f"(want {100 * want / sub:.1f})")
T.check(route_lines.get("Cl2", ("",) * 3)[:3] == ("methane", "Cl2", "CH3Cl"),
        f"check route Cl2 names {route_lines.get('Cl2')}")

# caustic: NaOH as 100 % consumed per run, solution and dilution water per changeout
sol = LIQUOR_KG * FRESH_PCT / MAKEUP_PCT    # 75 kg of 40 wt% solution
water = LIQUOR_KG - sol                     # 225 kg
close(runs["M-1"]["scrubber"]["naoh_kg"], 400 * MM_NAOH / 1000, "M-1 NaOH as 100 %")
changed = [rid for rid in sorted(runs) if runs[rid]["scrubber"]["changeout_before"]]
T.check(changed[:2] == ["M-2", "M-3"], f"changeouts before {changed}")
for rid, r in runs.items():
    on = r["scrubber"]["changeout_before"]
    close(r["scrubber"]["caustic_solution_kg"], sol if on else 0.0, f"{rid} caustic_solution_kg")
    close(r["scrubber"]["dilution_water_kg"], water if on else 0.0, f"{rid} dilution_water_kg")
nco = len(changed)
close(m.get("caustic_solution_kg"), nco * sol, "month caustic_solution_kg")
close(m.get("caustic_solution_naoh_kg"), nco * sol * MAKEUP_PCT / 100, "month NaOH in the solution")
close(m.get("dilution_water_kg"), nco * water, "month dilution_water_kg")
# NaOH by hand, 1 per acid: 400 mol HCl from each methane run; H-1 vents the 5 % of its 1000 mol
# HBr that does not react (50 mol); H-2's HBr all reacts; N-1 has no scrubber
close(runs["H-1"]["scrubber"]["naoh_kg"], 50 * MM_NAOH / 1000, "H-1 NaOH for the unreacted HBr")
close(m.get("naoh_kg"), (3 * 400 + 50) * MM_NAOH / 1000, "month NaOH consumed")
s = L["scrubbers"][0] if L["scrubbers"] else {}
close(s.get("changeout_caustic_solution_kg"), sol, "scrubber solution per changeout")
close(s.get("changeout_water_kg"), water, "scrubber water per changeout")
close(s.get("dilution_water_kg"), s.get("changeouts", -1) * water, "scrubber dilution water")
T.check(s.get("makeup_naoh_wt_pct") == MAKEUP_PCT, "scrubber makeup strength")
naoh_orders = [o for o in L["orders"] if o["reagent"] == "NaOH"]
T.check(len(naoh_orders) == 1 and naoh_orders[0].get("naoh_wt_pct") == MAKEUP_PCT,
        f"NaOH order basis {naoh_orders}")
if naoh_orders:
    close(naoh_orders[0]["demand_kg"], nco * sol, "NaOH order demand = solution bought")

for f in T.fails:
    print("FAIL", f)
print(f"run figures: {T.n - len(T.fails)}/{T.n} checks passed")
sys.exit(1 if T.fails else 0)
