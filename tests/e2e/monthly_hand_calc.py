"""End to end: the monthly totals, the orders and the manager's figures of a two-month campaign,
every expected value worked out by hand in this file from the campaign's inputs (never from the
ledger's own figures).

Hand rules (design section 4): RH + X2 -> RX + HX; RH + SO2Cl2 -> RCl + SO2 + HCl;
RH + NBS -> RBr + succinimide. Formula substrates have all H alike, so with the
over-halogenation factor 1 the batch degree distribution is binomial,
x_n = C(N, n) p^n (1 - p)^(N - n), p = mean degree / N (analytic limit); toluene with NBS has one
site class (the three benzylic H), so it is binomial with N = 3. Liquor reactions:
HX + NaOH -> NaX + H2O, X2 + 2 NaOH -> NaX + NaOX + H2O, SO2 + 2 NaOH -> Na2SO3 + H2O; the liquor
gains exactly the mass of gas it absorbs. Weights: CIAAW 2021 standard atomic weights, abridged
(H 1.008, C 12.011, N 14.007, O 15.999, Na 22.990, S 32.06, Cl 35.45, Br 79.904).

The campaign:
  A 2027-03-10  propane 1000 mol, Cl2 1.0 eq, 90 % reacts, 20 % of the acid retained, on S1
  B 2027-03-20  ethane 2000 mol, Br2 0.5 eq, all reacts, 10 % retained, on S1
  C 2027-04-05  propane 1000 mol, SO2Cl2 1.0 eq, 90 % reacts, 50 C, on S1: S1's liquor (10 %
                NaOH, 2000 kg, minimum 2 %) cannot take it, so it is changed out before C
  D 2027-04-15  toluene 1000 mol, NBS 1.0 eq, 90 % reacts, no scrubber
"""
import json
import math
import os
import subprocess
import sys
import tempfile

from _hl import BIN, WRAP, Tally

T = Tally()
H, C, N, O, NA, S, CL, BR = 1.008, 12.011, 14.007, 15.999, 22.990, 32.06, 35.45, 79.904
M_HCL, M_HBR, M_CL2, M_BR2, M_SO2 = H + CL, H + BR, 2 * CL, 2 * BR, S + 2 * O
M_NAOH = NA + O + H
M_SO2CL2 = S + 2 * O + 2 * CL
M_NBS = 4 * C + 4 * H + BR + N + 2 * O
M_SUCC = 4 * C + 5 * H + N + 2 * O


def close(got, want, what, rel=1e-9):
    ok = isinstance(got, (int, float)) and not isinstance(got, bool) and \
        abs(got - want) <= rel * max(abs(want), 1e-12)
    T.check(ok, f"{what}: got {got!r}, expected {want!r}")


def binom(n, k, p):
    return math.comb(n, k) * p ** k * (1 - p) ** (n - k)


def degrees(n_sub, hn, mean, mass):
    """kg by role for a binomial run: (wanted, over-halogenated, unreacted); mass(d) in g/mol."""
    p = mean / hn
    kg = [n_sub * binom(hn, d, p) * mass(d) / 1e3 for d in range(hn + 1)]
    return kg[1], sum(kg[2:]), kg[0]


M_PROPANE, M_ETHANE, M_TOLUENE = 3 * C + 8 * H, 2 * C + 6 * H, 7 * C + 8 * H
CAMPAIGN = {
    "format": "haloledger-campaign/1", "title": "monthly hand calculation", "site": "bench",
    "scrubbers": [{"id": "S1", "liquor": "naoh", "naoh_wt_pct": 10, "liquor_kg": 2000,
                   "min_naoh_wt_pct": 2, "rated_acid_kmol_h": 10, "max_liquor_temp_c": 150}],
    "stock": [{"reagent": "Cl2", "on_hand_kg": 0, "safety_kg": 0, "lead_days": 10},
              {"reagent": "Br2", "on_hand_kg": 100, "safety_kg": 20, "lead_days": 3.5}],
    "containers": [{"reagent": "Cl2", "name": "drum", "net_kg": 50, "heel_kg": 5},
                   {"reagent": "Br2", "name": "bottle", "net_kg": 35.5, "heel_kg": 0.5}],
    "runs": [
        {"id": "A", "start": "2027-03-10T06:00", "scrubber": "S1",
         "substrate": {"name": "propane", "formula": "C3H8"}, "substrate_kg": M_PROPANE,
         "reagent": "Cl2", "reagent_eq": 1.0, "halogen_conversion": 0.9, "temp_c": 25,
         "feed_h": 2, "vent_retained_fraction": 0.2},
        {"id": "B", "start": "2027-03-20T06:00", "scrubber": "S1",
         "substrate": {"name": "ethane", "formula": "C2H6"}, "substrate_kg": 2 * M_ETHANE,
         "reagent": "Br2", "reagent_eq": 0.5, "halogen_conversion": 1.0, "temp_c": 25,
         "feed_h": 2, "vent_retained_fraction": 0.1},
        {"id": "C", "start": "2027-04-05T06:00", "scrubber": "S1",
         "substrate": {"name": "propane", "formula": "C3H8"}, "substrate_kg": M_PROPANE,
         "reagent": "SO2Cl2", "reagent_eq": 1.0, "halogen_conversion": 0.9, "temp_c": 50,
         "feed_h": 2},
        {"id": "D", "start": "2027-04-15T06:00",
         "substrate": {"name": "toluene", "smiles": "Cc1ccccc1"}, "substrate_kg": M_TOLUENE,
         "reagent": "NBS", "reagent_eq": 1.0, "halogen_conversion": 0.9, "temp_c": 80,
         "feed_h": 2},
    ],
}

with tempfile.TemporaryDirectory() as d:
    camp, out, book = (os.path.join(d, n) for n in ("m.json", "m-ledger.json", "m.xlsx"))
    with open(camp, "w") as f:
        json.dump(CAMPAIGN, f, indent=1)
    p = subprocess.run(WRAP + [BIN, "report", camp, "-o", out, "-o", book, "--today", "2027-03-16"],
                       capture_output=True, text=True)
    if p.returncode != 0:
        print(f"FAIL: report exit {p.returncode}: {p.stderr.strip()}")
        sys.exit(1)
    L = json.load(open(out))
    import openpyxl
    wb = openpyxl.load_workbook(book, data_only=True)

# ---- hand figures per run ----
# A: 1000 mol propane, 1000 Cl2, 900 react: 900 HCl, 180 retained, 720 vent; 100 Cl2 vent
A_w, A_o, A_u = degrees(1000, 8, 0.9, lambda k: M_PROPANE - k * H + k * CL)
# B: 2000 mol ethane, 1000 Br2 all react: 1000 HBr, 100 retained, 900 vent
B_w, B_o, B_u = degrees(2000, 6, 0.5, lambda k: M_ETHANE - k * H + k * BR)
# C: 1000 mol propane, 1000 SO2Cl2, 900 react: 900 SO2 + 900 HCl vent; 100 SO2Cl2 stay
C_w, C_o, C_u = degrees(1000, 8, 0.9, lambda k: M_PROPANE - k * H + k * CL)
# D: 1000 mol toluene, 1000 NBS, 900 react: 900 succinimide; 100 NBS stay; binomial N = 3
D_w, D_o, D_u = degrees(1000, 3, 0.9, lambda k: M_TOLUENE - k * H + k * BR)

# liquor of S1: 2000 kg, 200 kg NaOH. A and B absorb 720 HCl, 100 Cl2, 900 HBr
naoh_A = (720 + 2 * 100) * M_NAOH / 1e3
naoh_B = 900 * M_NAOH / 1e3
gas_AB = (720 * M_HCL + 100 * M_CL2 + 900 * M_HBR) / 1e3
# C would need (900 + 2 x 900) mol NaOH = 108.0 kg of the 127.2 kg left: 0.87 wt % < 2 -> changeout
naoh_C = (900 + 2 * 900) * M_NAOH / 1e3
left_before_C = 200 - naoh_A - naoh_B
gas_C = (900 * M_HCL + 900 * M_SO2) / 1e3
T.check((left_before_C - naoh_C) / (2000 + gas_AB + gas_C) * 100 < 2, "hand: C needs a changeout")
T.check((200 - naoh_C) / (2000 + gas_C) * 100 > 2, "hand: fresh liquor carries C")

want_months = {
    "2027-03": {"runs": 2, "product_kg": A_w + B_w, "isomer_kg": 0.0,
                "overhalogenated_kg": A_o + B_o, "unreacted_substrate_kg": A_u + B_u,
                "reagents_kg": {"Cl2": 1000 * M_CL2 / 1e3, "Br2": 1000 * M_BR2 / 1e3,
                                "SO2Cl2": 0.0, "NBS": 0.0, "HBr": 0.0, "NaOH": 0.0},
                "vent_kg": {"HCl": 720 * M_HCL / 1e3, "HBr": 900 * M_HBR / 1e3,
                            "Cl2": 100 * M_CL2 / 1e3, "Br2": 0.0, "SO2": 0.0},
                "naoh_kg": naoh_A + naoh_B, "changeouts": 0,
                "waste_kg": {"spent_liquor": 0.0, "succinimide": 0.0, "reagent_left": 0.0,
                             "retained_acid": (180 * M_HCL + 100 * M_HBR) / 1e3}},
    "2027-04": {"runs": 2, "product_kg": C_w + D_w, "isomer_kg": 0.0,
                "overhalogenated_kg": C_o + D_o, "unreacted_substrate_kg": C_u + D_u,
                # caustic make-up for the changeout: 200 kg NaOH as 50 % solution (default)
                "reagents_kg": {"Cl2": 0.0, "Br2": 0.0, "SO2Cl2": 1000 * M_SO2CL2 / 1e3,
                                "NBS": 1000 * M_NBS / 1e3, "HBr": 0.0, "NaOH": 400.0},
                "vent_kg": {"HCl": 900 * M_HCL / 1e3, "HBr": 0.0, "Cl2": 0.0, "Br2": 0.0,
                            "SO2": 900 * M_SO2 / 1e3},
                "naoh_kg": naoh_C, "changeouts": 1,
                # the liquor changed out before C, and the final one after C (both in April)
                "waste_kg": {"spent_liquor": (2000 + gas_AB) + (2000 + gas_C),
                             "succinimide": 900 * M_SUCC / 1e3,
                             "reagent_left": (100 * M_SO2CL2 + 100 * M_NBS) / 1e3,
                             "retained_acid": 0.0}},
}
months = {m["month"]: m for m in L["months"]}
T.check(sorted(months) == sorted(want_months), f"months {sorted(months)}")
for key, want in want_months.items():
    got = months.get(key, {})
    for k, v in want.items():
        if isinstance(v, dict):
            for kk, vv in v.items():
                close(got.get(k, {}).get(kk), vv, f"{key} {k}.{kk}", 1e-9 if vv else 0)
        elif isinstance(v, int):
            T.check(got.get(k) == v, f"{key} {k}: got {got.get(k)!r}, expected {v}")
        else:
            close(got.get(k), v, f"{key} {k}", 1e-9 if v else 0)

# ---- run figures as the JSON ledger writes them ----
R = {r["id"]: r for r in L["runs"]}
T.check(sorted(R) == ["A", "B", "C", "D"], f"runs {sorted(R)}")
want_runs = {
    "A": {"byproducts": {"HCl_kg": 900 * M_HCL / 1e3, "HBr_kg": 0.0, "SO2_kg": 0.0, "succinimide_kg": 0.0},
          "vent": {"HCl_mol": 720.0, "HBr_mol": 0.0, "Cl2_mol": 100.0, "Br2_mol": 0.0, "SO2_mol": 0.0},
          "retained": {"HCl_mol": 180.0, "HBr_mol": 0.0, "Cl2_mol": 0.0, "Br2_mol": 0.0, "SO2_mol": 0.0},
          "reagent_left_kg": 0.0},
    "B": {"byproducts": {"HCl_kg": 0.0, "HBr_kg": 1000 * M_HBR / 1e3, "SO2_kg": 0.0, "succinimide_kg": 0.0},
          "vent": {"HCl_mol": 0.0, "HBr_mol": 900.0, "Cl2_mol": 0.0, "Br2_mol": 0.0, "SO2_mol": 0.0},
          "retained": {"HCl_mol": 0.0, "HBr_mol": 100.0, "Cl2_mol": 0.0, "Br2_mol": 0.0, "SO2_mol": 0.0},
          "reagent_left_kg": 0.0},
    "C": {"byproducts": {"HCl_kg": 900 * M_HCL / 1e3, "HBr_kg": 0.0, "SO2_kg": 900 * M_SO2 / 1e3,
                         "succinimide_kg": 0.0},
          "vent": {"HCl_mol": 900.0, "HBr_mol": 0.0, "Cl2_mol": 0.0, "Br2_mol": 0.0, "SO2_mol": 900.0},
          "reagent_left_kg": 100 * M_SO2CL2 / 1e3},
    "D": {"byproducts": {"HCl_kg": 0.0, "HBr_kg": 0.0, "SO2_kg": 0.0, "succinimide_kg": 900 * M_SUCC / 1e3},
          "reagent_left_kg": 100 * M_NBS / 1e3},
}
for rid, want in want_runs.items():
    got = R.get(rid, {})
    for k, v in want.items():
        if isinstance(v, dict):
            for kk, vv in v.items():
                close(got.get(k, {}).get(kk), vv, f"run {rid} {k}.{kk}", 1e-9 if vv else 0)
        else:
            close(got.get(k), v, f"run {rid} {k}", 1e-9 if v else 0)
    T.check(got.get("element_balance", {}).get("max_rel_error", 1) <= 1e-9, f"run {rid} element closure")
close(R.get("C", {}).get("scrubber", {}).get("naoh_kg"), naoh_C, "run C NaOH")
T.check(R.get("C", {}).get("scrubber", {}).get("changeout_before") is True, "changeout before run C")
T.check(R.get("B", {}).get("scrubber", {}).get("changeout_before") is False, "no changeout before run B")

# ---- orders ----
orders = {(o["month"], o["reagent"]): o for o in L["orders"]}
# Cl2, March: 70.9 kg, none on hand: 2 drums of 45 kg usable; first use 03-10 minus 10 days;
# already late on 2027-03-16
o = orders.get(("2027-03", "Cl2"), {})
close(o.get("demand_kg"), 70.9, "Cl2 demand")
close(o.get("to_order_kg"), 70.9, "Cl2 to order")
T.check(o.get("containers") == 2 and o.get("container") == "drum", f"Cl2 containers {o.get('containers')}")
close(o.get("stock_end_kg"), 90 - 70.9, "Cl2 stock carried into April")
T.check(o.get("order_by") == "2027-02-28", f"Cl2 order_by {o.get('order_by')!r}")
T.check(o.get("late") is True, "Cl2 order late on 2027-03-16")
# Br2, March: 159.808 kg + 20 safety - 100 on hand = 79.808 to order; 35 kg usable a bottle:
# 2.28 -> 3 bottles; stock after = 100 + 105 - 159.808; lead 3.5 days rounds up to 4: 03-16,
# which is the --today date: an order placed on its order-by day is not late
o = orders.get(("2027-03", "Br2"), {})
close(o.get("demand_kg"), 159.808, "Br2 demand")
close(o.get("to_order_kg"), 159.808 + 20 - 100, "Br2 to order")
T.check(o.get("containers") == 3, f"Br2 containers {o.get('containers')}")
close(o.get("stock_end_kg"), 100 + 3 * 35 - 159.808, "Br2 stock carried over")
T.check(o.get("order_by") == "2027-03-16", f"Br2 order_by {o.get('order_by')!r}")
T.check(o.get("late") is False, "Br2 order on its order-by day is not late")
# caustic make-up, April: 400 kg of 50 % solution for the changeout before C
o = orders.get(("2027-04", "NaOH"), {})
close(o.get("demand_kg"), 400.0, "NaOH make-up demand")
for k in (("2027-04", "SO2Cl2"), ("2027-04", "NBS")):
    T.check(k in orders, f"order line {k}")

# ---- scrubber totals ----
sc = {s["id"]: s for s in L["scrubbers"]}.get("S1", {})
close(sc.get("naoh_kg"), naoh_A + naoh_B + naoh_C, "S1 NaOH used")
T.check(sc.get("changeouts") == 1, f"S1 changeouts {sc.get('changeouts')}")
close(sc.get("makeup_kg"), 400.0, "S1 caustic make-up bought")

# ---- the manager's figures: Summary sheet, one column a month (only like things: no sum over
# different products or reagents) ----
ws = wb["Summary"]
rows = {ws.cell(r, 1).value: r for r in range(1, ws.max_row + 1)}
sec = rows.get("Key figures by month")
T.check(sec is not None, "Summary has its key figures by month")
mcol = {ws.cell(sec, c).value: c for c in range(2, ws.max_column + 1)} if sec else {}
summary = {
    ("Runs [count]", "2027-03"): 2, ("Runs [count]", "2027-04"): 2,
    ("Cl2 charged [kg]", "2027-03"): 70.9, ("Br2 charged [kg]", "2027-03"): 159.808,
    ("Cl2 charged [kg]", "2027-04"): 0.0,
    ("HCl to scrubbers [kg]", "2027-03"): 720 * M_HCL / 1e3,
    ("HCl to scrubbers [kg]", "2027-04"): 900 * M_HCL / 1e3,
    ("HBr to scrubbers [kg]", "2027-03"): 900 * M_HBR / 1e3,
    ("SO2 to scrubbers [kg]", "2027-04"): 900 * M_SO2 / 1e3,
    ("NaOH consumed, as 100 % [kg]", "2027-03"): naoh_A + naoh_B,
    ("NaOH consumed, as 100 % [kg]", "2027-04"): naoh_C,
    ("Liquor changeouts [count]", "2027-03"): 0, ("Liquor changeouts [count]", "2027-04"): 1,
}
for (k, m), v in summary.items():
    T.check(k in rows and m in mcol, f"Summary row {k!r} / month {m} missing")
    got = ws.cell(rows[k], mcol[m]).value if k in rows and m in mcol else None
    close(got, v, f"Summary {k} {m}", 1e-9 if v else 0)

# ---- Waste by run: retained acid per gas and the losses, per run ----
ws = wb["Waste by run"]
head = {c.value: c.column for c in ws[1] if isinstance(c.value, str)}
for h in ("HCl retained in mass [kg]", "HBr retained in mass [kg]", "Over-halogenated products [kg]",
          "Unreacted substrate [kg]"):
    T.check(h in head, f"Waste by run column {h!r} among {sorted(head)}")
got = {ws.cell(r, 1).value: {h: ws.cell(r, c).value for h, c in head.items()} for r in range(2, ws.max_row + 1)}
close(got.get("A", {}).get("HCl retained in mass [kg]"), 180 * M_HCL / 1e3, "Waste retained HCl, run A")
close(got.get("B", {}).get("HBr retained in mass [kg]"), 100 * M_HBR / 1e3, "Waste retained HBr, run B")
for rid, o, u in (("A", A_o, A_u), ("B", B_o, B_u), ("C", C_o, C_u), ("D", D_o, D_u)):
    close(got.get(rid, {}).get("Over-halogenated products [kg]"), o, f"Waste over-halogenated, run {rid}", 1e-9 if o else 0)
    close(got.get(rid, {}).get("Unreacted substrate [kg]"), u, f"Waste unreacted substrate, run {rid}", 1e-9 if u else 0)

for f in T.fails:
    print("FAIL:", f)
print(f"monthly_hand_calc: {T.n - len(T.fails)}/{T.n} checks passed")
sys.exit(1 if T.fails else 0)
