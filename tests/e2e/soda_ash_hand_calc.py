#!/usr/bin/python3
"""soda_ash_hand_calc.py - the soda-ash scrubber of tests/campaigns/soda-ash.json against a hand
calculation.

Each run charges 141.8 kg Cl2 (2000 mol at 70.90 g/mol), all of which reacts (halogen_conversion
1): every substitution gives one HCl, so 2000 mol HCl go to the scrubber.  The soda-ash liquor
spends its carbonate to CO2 (design section 4): 2 HCl + Na2CO3 -> 2 NaCl + H2O + CO2, so per kg
HCl 105.988 / (2 x 36.458) = 1.45356 kg Na2CO3 are used, 58.44 / 36.458 = 1.60294 kg NaCl form
and 44.009 / (2 x 36.458) = 0.60356 kg CO2 go up the stack.  Heat: 2 HCl(g) + Na2CO3(aq) from
the NBS 1982 formation enthalpies (Wagman et al., J. Phys. Chem. Ref. Data 11 Suppl. 2):
(2 x -407.27 - 285.830 - 393.509) - (2 x -92.307 - 1157.38) = -151.885 kJ per 2 mol HCl
(CO2(g) -393.509, CO3^2-(aq) -677.14 from memory).  3000 kg of 10 wt% hold 300 kg Na2CO3; the
minimum is 2 wt% (the schema default): a changeout before the third run; the fresh charge is
300 kg of dry ash (makeup 100 wt%) and 2700 kg water.  Molar masses: CIAAW 2021 abridged.
"""
import json, re
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

W = {"H": 1.008, "C": 12.011, "O": 15.999, "Na": 22.990, "Cl": 35.45}
M_CL2 = 2 * W["Cl"]
M_HCL = W["H"] + W["Cl"]
M_NA2CO3 = 2 * W["Na"] + W["C"] + 3 * W["O"]
M_CO2 = W["C"] + 2 * W["O"]
M_NACL = W["Na"] + W["Cl"]
SRC = os.path.join(ROOT, "tests", "campaigns", "soda-ash.json")
T = Tally()


def near(a, b, what, rel=1e-9):
    ok = isinstance(a, (int, float)) and abs(a - b) <= rel * max(abs(b), 1.0)
    return T.check(ok, "%s: got %r, expected %r" % (what, a, b))


def main():
    hcl_mol = 141.8 * 1000 / M_CL2           # one HCl per Cl2, all reacted
    hcl_kg = hcl_mol * M_HCL / 1000
    na2co3 = hcl_mol / 2 * M_NA2CO3 / 1000   # 0.5 Na2CO3 per HCl
    co2 = hcl_mol / 2 * M_CO2 / 1000         # 0.5 CO2 per HCl
    nacl = hcl_mol * M_NACL / 1000
    heat = hcl_mol / 2 * -((2 * -407.27 - 285.830 - 393.509) - (2 * -92.307 + 2 * -240.12 - 677.14))
    near(hcl_mol, 2000, "HCl per run, mol")
    with tempfile.TemporaryDirectory() as tmp:
        out = os.path.join(tmp, "l.json")
        p = subprocess.run(WRAP + [BIN, "report", SRC, "-o", out], capture_output=True, text=True, timeout=120)
        if not T.check(p.returncode == 0, "report exits 0 (got %d: %s)" % (p.returncode, p.stderr)):
            return finish()
        d = json.load(open(out))
    T.check(len(d["runs"]) == 4, "four runs")
    for r in d["runs"]:
        s = r["scrubber"]
        near(r["vent"]["HCl_mol"], hcl_mol, r["id"] + " HCl to the scrubber")
        T.check(s["base"] == "Na2CO3", r["id"] + " base is Na2CO3 (got %r)" % s.get("base"))
        near(s["base_kg"], na2co3, r["id"] + " Na2CO3 used")
        near(s["co2_kg"], co2, r["id"] + " CO2 given off")
        near(s["salts_kg"]["NaCl"], nacl, r["id"] + " NaCl formed")
        near(s["base_kg"] / hcl_kg, 1.45356, r["id"] + " Na2CO3 per kg HCl", 1e-5)
        near(s["salts_kg"]["NaCl"] / hcl_kg, 1.60294, r["id"] + " NaCl per kg HCl", 1e-5)
        near(s["co2_kg"] / hcl_kg, 0.60356, r["id"] + " CO2 per kg HCl", 1e-5)
        near(s["heat_kj"], heat, r["id"] + " heat")
        near(s["naoh_kg"], 0, r["id"] + " no NaOH consumed (naoh_kg is NaOH's)")
        T.check(s["changeout_before"] == (r["id"] == "SA-3"), r["id"] + " changeout before SA-3 only")
        near(s["makeup_kg"], 300 if r["id"] == "SA-3" else 0, r["id"] + " ash bought for the fresh charge")
        near(s["caustic_solution_kg"], 0, r["id"] + " no caustic bought")
    # after SA-1 (and SA-3 on fresh liquor): 300 - 105.988 kg in 3000 + 72.916 - 44.009 kg
    left = 300 - na2co3
    near(d["runs"][0]["scrubber"]["base_wt_pct_after"], left / (3000 + hcl_kg - co2) * 100, "SA-1 strength after")
    m = d["months"][0]
    near(m["base_kg"]["Na2CO3"], 4 * na2co3, "month Na2CO3 consumed")
    near(m["base_kg"]["NaOH"], 0, "month NaOH consumed (as base)")
    near(m["co2_kg"], 4 * co2, "month CO2")
    near(m["reagents_kg"]["Na2CO3"], 300, "month soda ash bought")
    near(m["reagents_kg"]["NaOH"], 0, "month caustic bought")
    near(m["naoh_kg"], 0, "month NaOH consumed")
    near(m["dilution_water_kg"], 2700, "month dilution water")
    sc = d["scrubbers"][0]
    T.check(sc["base"] == "Na2CO3", "unit base")
    near(sc["base_kg"], 4 * na2co3, "unit Na2CO3 consumed")
    near(sc["co2_kg"], 4 * co2, "unit CO2")
    near(sc["makeup_kg"], 300, "unit ash bought")
    near(sc["changeout_makeup_kg"], 300, "ash per changeout")
    near(sc["makeup_base_wt_pct"], 100, "make-up strength: dry ash (schema default)")
    near(sc["caustic_solution_kg"], 0, "unit caustic bought")
    near(sc["peak_acid_kmol_h"], 1.0, "hourly peak: HCl only, 2 kmol over 2 h (CO2 is no acid gas)")
    ash = [o for o in d["orders"] if o["reagent"] == "Na2CO3"]
    T.check(len(ash) == 1 and ash[0]["containers"] == 1 and ash[0]["demand_kg"] == 300,
            "one bulk bag of soda ash ordered (got %r)" % ash)
    T.check(not any(o["reagent"] == "NaOH" for o in d["orders"]), "no caustic ordered")
    # the Assumptions quote the soda-ash reactions (stoichiometry written out), not caustic's
    A = {a["what"]: a for a in d["assumptions"]}
    for gas, base, co2 in (("HCl", 0.5, 0.5), ("HBr", 0.5, 0.5), ("Cl2", 1, 1), ("Br2", 1, 1), ("SO2", 1, 1)):
        a = A.get("Na2CO3 consumed per mol of " + gas)
        if T.check(a is not None, "assumption Na2CO3 per mol of " + gas):
            T.check(a["value"] == base, "Na2CO3 per mol of %s: %r (want %r)" % (gas, a["value"], base))
        a = A.get("CO2 given off per mol of %s (soda_ash liquor)" % gas)
        if T.check(a is not None, "assumption CO2 per mol of " + gas):
            T.check(a["value"] == co2, "CO2 per mol of %s: %r (want %r)" % (gas, a["value"], co2))
    a = A.get("Na2CO3 consumed per mol of HCl", {})
    T.check(a.get("origin", "").endswith("HCl + 0.5 Na2CO3 -> NaCl + 0.5 H2O + 0.5 CO2 (given off)"),
            "HCl reaction written out: %r" % a.get("origin"))
    a = A.get("Heat of absorption of HCl in soda_ash liquor")
    if T.check(a is not None, "assumption: heat of HCl in soda ash"):
        near(a["value"], heat / hcl_mol, "heat of HCl in soda ash per mol, NBS 1982 by hand", 1e-9)
    T.check(not any(w.startswith("NaOH consumed per mol") or w.endswith("in caustic liquor") for w in A),
            "no caustic reaction rows on a soda-ash-only campaign")
    # `check` names the base the liquor took, not NaOH: month and unit, 4 runs by hand
    q = subprocess.run(WRAP + [BIN, "check", SRC], capture_output=True, text=True, timeout=120)
    T.check(q.returncode == 0, "check exits 0 (got %d: %s)" % (q.returncode, q.stderr))
    used = "Na2CO3 consumed %.1f kg" % (4 * na2co3)
    T.check(re.search(r"^  2027-03  runs 4 .*  %s  changeouts 1$" % used, q.stdout, re.M) is not None,
            "check month line says %r: %r" % (used, q.stdout[:400]))
    T.check(re.search(r"^  scrubber SA-1: .*, 1 changeouts, %s$" % used, q.stdout, re.M) is not None,
            "check scrubber line says %r" % used)
    T.check("NaOH consumed" not in q.stdout, "check says no NaOH consumed on a soda-ash unit")
    return finish()


def finish():
    for f in T.fails:
        print("FAIL:", f)
    print("soda_ash_hand_calc: %d checks, %d failed" % (T.n, len(T.fails)))
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
