#!/usr/bin/python3
"""sweep_points.py - `haloledger sweep`: each point is what a campaign with that value gives,
and the points follow an analytic limit.

1. Analytic limit (the binomial check of design section 4): neopentane has 12 equivalent
   primary H; with overhalogenation_factor 1, every chlorine reacting (halogen_conversion 1)
   and a batch reactor, the degree distribution of consecutive first-order steps with
   k_n = (12 - n) k is binomial with p = reagent_eq / 12, so the unreacted fraction is
   (1 - p)^12 and the monochloride 12 p (1 - p)^11 (consecutive first-order kinetics of
   equivalent sites).  conversion_pct and wanted_kg of every point are held against these,
   with CIAAW 2021 atomic weights (tests/e2e/_hl.py) for the kilograms.
2. Separate reports: for every point of a temp_c sweep and of a reagent_eq sweep of run
   CH-1 of campaigns/harrowmere-march.json, the campaign is written with that value and
   reported to JSON; the point's figures must equal that ledger's run, month orders and
   scrubber peak.
3. A value outside the file's range is refused as the file would refuse it (exit 2).
4. Under --set the sweep is a what-if of a what-if: its JSON lists the overrides (a plain
   sweep has no such key), its workbook says so in a row and in the page header, and each
   point equals a report with the same --set and that value.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix).
"""
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, CIAAW, ROOT, WRAP, Tally  # noqa: E402


def run(args, cwd):
    return subprocess.run(WRAP + [BIN] + args, cwd=cwd, capture_output=True, timeout=300)


def rel(a, b):
    return abs(a - b) <= 1e-12 * max(1.0, abs(a), abs(b))


def mass(c, h, cl=0):
    return c * CIAAW["C"] + h * CIAAW["H"] + cl * CIAAW["Cl"]


def from_ledger(led, rid):
    r = next(x for x in led["runs"] if x["id"] == rid)
    roles = {}
    for p in r["products"]:
        role = "overhalogenated" if p["role"] == "other" else p["role"]
        roles[role] = roles.get(role, 0) + p["kg"]
    month = r["start"][:7]
    sc = next((s for s in led["scrubbers"] if s["id"] == r.get("scrubber_id", r["scrubber"].get("id"))), None)
    return {
        "wanted_kg": roles.get("wanted", 0), "isomer_kg": roles.get("isomer", 0),
        "overhalogenated_kg": roles.get("overhalogenated", 0),
        "unreacted_substrate_kg": roles.get("unreacted", 0),
        "selectivity_pct": r["selectivity_pct"], "conversion_pct": r["conversion_pct"],
        "acid_gas_kg": r["byproducts"]["HCl_kg"] + r["byproducts"]["HBr_kg"],
        "naoh_kg": r["scrubber"]["naoh_kg"],
        "containers": sum(o["containers"] for o in led["orders"]
                          if o["month"] == month and o["reagent"] == r["reagent"]),
        "peak_acid_kmol_h": sc["peak_acid_kmol_h"] if sc else None,
    }


def main():
    t = Tally()
    with tempfile.TemporaryDirectory() as tmp:
        # 1. analytic limit
        camp = {"format": "haloledger-campaign/1", "model": {"overhalogenation_factor": 1},
                "runs": [{"id": "NP", "start": "2027-03-02T06:00", "substrate": {"smiles": "CC(C)(C)C"},
                          "substrate_kg": 720, "reagent": "Cl2", "reagent_eq": 1, "temp_c": 40,
                          "feed_h": 4}]}
        with open(os.path.join(tmp, "np.json"), "w") as f:
            json.dump(camp, f)
        p = run(["sweep", "np.json", "--run", "NP", "--vary", "reagent_eq=0.6:3:0.6", "-o", "np-sweep.json"], tmp)
        if t.check(p.returncode == 0, "neopentane sweep: exit %d: %s" % (p.returncode, p.stderr.decode())):
            sw = json.load(open(os.path.join(tmp, "np-sweep.json")))
            t.check(sw["format"] == "haloledger-sweep/1" and sw["run"] == "NP" and sw["key"] == "reagent_eq",
                    "sweep header %r" % {k: sw.get(k) for k in ("format", "run", "key")})
            t.check([pt["value"] for pt in sw["points"]] == [0.6, 1.2, 1.8, 2.4, 3.0],
                    "values %s" % [pt["value"] for pt in sw["points"]])
            n_mol = 720e3 / mass(5, 12)
            for pt in sw["points"]:
                q = pt["value"] / 12.0
                conv = 100 * (1 - (1 - q) ** 12)
                wanted = n_mol * 12 * q * (1 - q) ** 11 * mass(5, 11, 1) / 1e3
                t.check(abs(pt["conversion_pct"] - conv) <= 1e-7 * conv,
                        "eq %g: conversion %.10g %%, binomial %.10g %%" % (pt["value"], pt["conversion_pct"], conv))
                t.check(abs(pt["wanted_kg"] - wanted) <= 1e-4 * wanted,
                        "eq %g: wanted %.8g kg, binomial %.8g kg" % (pt["value"], pt["wanted_kg"], wanted))
                t.check(pt["isomer_kg"] == 0, "eq %g: one site class, no isomer (got %g)" % (pt["value"], pt["isomer_kg"]))
        # 2. every point against a separate report
        src = json.load(open(os.path.join(ROOT, "campaigns", "harrowmere-march.json")))
        for key, spec, vals in (("temp_c", "20:80:20", [20, 40, 60, 80]), ("reagent_eq", "0.5,1,1.5", [0.5, 1, 1.5])):
            p = run(["sweep", os.path.join(ROOT, "campaigns", "harrowmere-march.json"), "--run", "CH-1",
                     "--vary", "%s=%s" % (key, spec), "-o", "sw.json", "-o", "sw.xlsx"], tmp)
            if not t.check(p.returncode == 0, "CH-1 %s sweep: %s" % (key, p.stderr.decode())):
                continue
            sw = json.load(open(os.path.join(tmp, "sw.json")))
            t.check([pt["value"] for pt in sw["points"]] == vals, "%s values %s" % (key, [pt["value"] for pt in sw["points"]]))
            for pt in sw["points"]:
                c = json.loads(json.dumps(src))
                r = next(x for x in c["runs"] if x["id"] == "CH-1")
                r[key] = pt["value"]
                if key == "reagent_eq":
                    r.pop("reagent_kg", None)
                with open(os.path.join(tmp, "one.json"), "w") as f:
                    json.dump(c, f)
                q = run(["report", "one.json", "-o", "one-ledger.json"], tmp)
                if not t.check(q.returncode == 0, "%s=%s report: %s" % (key, pt["value"], q.stderr.decode())):
                    continue
                ref = from_ledger(json.load(open(os.path.join(tmp, "one-ledger.json"))), "CH-1")
                for k, v in ref.items():
                    got = pt[k]
                    same = got == v if isinstance(v, int) or v is None else (got is not None and rel(got, v))
                    t.check(same, "%s=%s: %s sweep %r, report %r" % (key, pt["value"], k, got, v))
            t.check(os.path.getsize(os.path.join(tmp, "sw.xlsx")) > 0, "sweep workbook written")
            t.check(sw["best"] in [pt["value"] for pt in sw["points"]] and sw["tradeoff"], "best and trade-off given")
        t.check("overrides" not in sw, "a plain sweep lists no overrides")
        # 4. a sweep under --set
        camp_path = os.path.join(ROOT, "campaigns", "harrowmere-march.json")
        setting = "model.overhalogenation_factor=0.5"
        p = run(["sweep", camp_path, "--run", "CH-1", "--vary", "temp_c=20,60", "--set", setting,
                 "-o", "ws.json", "-o", "ws.xlsx"], tmp)
        t.check(p.returncode == 0, "sweep --set: exit %d %r" % (p.returncode, p.stderr))
        sw = json.load(open(os.path.join(tmp, "ws.json"))) if p.returncode == 0 else {"points": []}
        t.check(sw.get("overrides") == [setting], "sweep --set overrides %r" % sw.get("overrides"))
        t.check(len(sw["points"]) == 2, "sweep --set: %d points" % len(sw["points"]))
        for pt in sw["points"]:
            c = json.loads(json.dumps(src))
            next(x for x in c["runs"] if x["id"] == "CH-1")["temp_c"] = pt["value"]
            with open(os.path.join(tmp, "one.json"), "w") as f:
                json.dump(c, f)
            q = run(["report", "one.json", "--set", setting, "-o", "one-ledger.json"], tmp)
            if not t.check(q.returncode == 0, "report --set: %s" % q.stderr.decode()):
                continue
            ref = from_ledger(json.load(open(os.path.join(tmp, "one-ledger.json"))), "CH-1")
            for k, v in ref.items():
                got = pt[k]
                same = got == v if isinstance(v, int) or v is None else (got is not None and rel(got, v))
                t.check(same, "--set, temp_c=%s: %s sweep %r, report %r" % (pt["value"], k, got, v))
        import openpyxl  # python3-openpyxl (make deps)
        ws = openpyxl.load_workbook(os.path.join(tmp, "ws.xlsx"))["Sweep"]
        texts = [str(c.value) for row in ws.iter_rows() for c in row if isinstance(c.value, str)]
        t.check(any(x.startswith("!! WHAT-IF: --set " + setting) for x in texts), "what-if row in the workbook")
        t.check("WHAT-IF" in (ws.oddHeader.left.text or ""), "what-if page header %r" % ws.oddHeader.left.text)
        # 3. out of range, as the file refuses it
        p = run(["sweep", os.path.join(ROOT, "campaigns", "harrowmere-march.json"), "--run", "CH-1",
                 "--vary", "halogen_conversion=0.5:1.5:0.5"], tmp)
        t.check(p.returncode == 2 and b"halogen_conversion: must be <= 1 (got 1.5)" in p.stderr,
                "halogen_conversion 1.5: exit %d %r" % (p.returncode, p.stderr))
        p = run(["sweep", os.path.join(ROOT, "campaigns", "harrowmere-march.json"), "--run", "NOPE",
                 "--vary", "temp_c=20:30:10"], tmp)
        t.check(p.returncode == 2, "unknown run: exit %d" % p.returncode)
    for f in t.fails:
        print("FAIL", f)
    print("sweep_points: %d checks, %d failed" % (t.n, len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
