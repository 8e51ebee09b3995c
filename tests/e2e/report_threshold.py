#!/usr/bin/python3
"""report_threshold.py - the reporting threshold (report.min_mol_fraction) and --all-products.

For each campaign under tests/data/ledger-ref (demo and test campaigns), the JSON ledger is
written twice: by default and with --all-products, then read back here (Python's json):
1. Every run's listed rows equal, key for key and in order, the --all-products rows that are
   not over-halogenated traces below the threshold (1e-4 mol/mol by default).
2. The one "other" row holds the sum of the rows left out (mol, kg, mol_fraction), their
   lowest degree, their mol-weighted mean degree and their count, read from --all-products.
3. The balances still close over the listed rows: total product mass equals the
   --all-products total, and the halogen atoms in the products (degree x mol, the mean degree
   for the "other" row) equal halogen_reacted_mol (each C-X bond formed adds one to a
   product's degree: design section 5, stoichiometry of section 4).
4. Nothing else in the ledger differs except the threshold's own assumption row.
5. report.min_mol_fraction in the campaign moves the threshold (0.01 lumps more; 0 lists every
   product, as --all-products does) and the Assumptions row shows the value in force.
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import copy
import json
import os
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, REF, ROOT, SOURCES, WRAP, Tally  # noqa: E402

T = Tally()
THRESH_WHAT = "Reporting threshold"


def rel(a, b):
    return abs(a - b) <= 1e-12 * max(abs(a), abs(b), 1e-300)


def report(camp_path, out, extra=()):
    p = subprocess.run(WRAP + [BIN, "report", os.path.basename(camp_path), "-o", out] + list(extra),
                       cwd=os.path.dirname(camp_path), capture_output=True, text=True, timeout=300)
    if not T.check(p.returncode == 0, f"{camp_path} {extra}: exit {p.returncode}: {p.stderr[-300:]}"):
        return None
    with open(out) as f:
        return json.load(f)


def threshold_row(led):
    rows = [a for a in led["assumptions"] if a["what"].startswith(THRESH_WHAT)]
    T.check(len(rows) == 1, f"one threshold assumption row (got {len(rows)})")
    return rows[0] if rows else None


def compare_run(tag, r, ra, thr):
    """r from the default ledger, ra the same run from --all-products."""
    left_out = [p for p in ra["products"] if p["role"] == "overhalogenated" and p["mol_fraction"] < thr]
    kept = [p for p in ra["products"] if p not in left_out]
    listed = [p for p in r["products"] if p["role"] != "other"]
    other = [p for p in r["products"] if p["role"] == "other"]
    T.check(listed == kept, f"{tag}: listed rows differ from the --all-products rows above the threshold")
    if not left_out:
        T.check(not other, f"{tag}: an 'other' row although nothing is below the threshold")
        return
    if not T.check(len(other) == 1 and r["products"][-1] is other[0],
                   f"{tag}: {len(other)} 'other' rows (want one, last)"):
        return
    o = other[0]
    mol = sum(p["mol"] for p in left_out)
    T.check(rel(o["mol"], mol), f"{tag}: other mol {o['mol']} != sum {mol}")
    T.check(rel(o["kg"], sum(p["kg"] for p in left_out)), f"{tag}: other kg != sum of the omitted")
    T.check(rel(o["mol_fraction"], sum(p["mol_fraction"] for p in left_out)),
            f"{tag}: other mol_fraction != sum of the omitted")
    lo = min(p["degree"] for p in left_out)
    T.check(o["degree"] == lo, f"{tag}: other degree {o['degree']} != lowest omitted {lo}")
    if mol > 0:
        mean = sum(p["degree"] * p["mol"] for p in left_out) / mol
        T.check(rel(o["mean_degree"], mean), f"{tag}: mean_degree {o['mean_degree']} != {mean}")
    T.check(o["rows_summed"] == len(left_out), f"{tag}: rows_summed {o['rows_summed']} != {len(left_out)}")
    T.check(o["label"] == f"other over-halogenated (degree >= {lo})", f"{tag}: label {o['label']!r}")
    T.check(o["smiles"] is None and o["formula"] is None, f"{tag}: a mixture has no structure or formula")
    T.check(rel(sum(p["kg"] for p in r["products"]), sum(p["kg"] for p in ra["products"])),
            f"{tag}: product mass changed by the threshold")
    x = sum((p["mean_degree"] if p["role"] == "other" else p["degree"]) * p["mol"]
            for p in r["products"])
    T.check(abs(x - r["halogen_reacted_mol"]) <= 1e-9 * max(r["halogen_reacted_mol"], 1.0),
            f"{tag}: halogen in listed products {x} != halogen reacted {r['halogen_reacted_mol']}")


def strip(led):
    """The ledger without run products and the threshold row: what must not change."""
    d = copy.deepcopy(led)
    for r in d["runs"]:
        r.pop("products")
    d["assumptions"] = [a for a in d["assumptions"] if not a["what"].startswith(THRESH_WHAT)]
    return d


def main():
    t0 = time.time()
    with tempfile.TemporaryDirectory() as tmp:
        nother = 0
        for name, folder in sorted(SOURCES.items()):
            camp = os.path.join(ROOT, folder, name + ".json")
            a = report(camp, os.path.join(tmp, name + "-all.json"), ["--all-products"])
            d = report(camp, os.path.join(tmp, name + ".json"))
            if not a or not d:
                continue
            ta, td = threshold_row(a), threshold_row(d)
            if ta and td:
                T.check(ta["value"] == 0 and "--all-products" in ta["origin"], f"{name}: --all-products row {ta}")
                T.check(td["value"] == 1e-4 and td["unit"] == "mol/mol", f"{name}: default row {td}")
            T.check(len(a["runs"]) == len(d["runs"]), f"{name}: run count differs")
            for r, ra in zip(d["runs"], a["runs"]):
                compare_run(f"{name} {r['id']}", r, ra, 1e-4)
                nother += any(p["role"] == "other" for p in r["products"])
            T.check(not any(p["role"] == "other" for r in a["runs"] for p in r["products"]),
                    f"{name}: --all-products has an 'other' row")
            T.check(strip(a) == strip(d), f"{name}: the threshold changed more than the product rows")
        T.check(nother >= 10, f"only {nother} runs have an 'other' row: the check above would be empty")

        # the campaign's own threshold
        src = os.path.join(ROOT, "campaigns", "harrowmere-march.json")
        with open(src) as f:
            base = json.load(f)
        for thr in (0.01, 0.0):
            c = copy.deepcopy(base)
            c["report"] = {"min_mol_fraction": thr}
            path = os.path.join(tmp, f"thr-{thr}.json")
            with open(path, "w") as f:
                json.dump(c, f)
            led = report(path, os.path.join(tmp, f"thr-{thr}-ledger.json"))
            all_led = report(path, os.path.join(tmp, f"thr-{thr}-all.json"), ["--all-products"])
            if not led or not all_led:
                continue
            row = threshold_row(led)
            T.check(row and row["value"] == thr and row["origin"] == "campaign report.min_mol_fraction",
                    f"threshold {thr}: assumption row {row}")
            for r, ra in zip(led["runs"], all_led["runs"]):
                compare_run(f"threshold {thr} {r['id']}", r, ra, thr)
            if thr == 0:
                T.check(strip(led) == strip(all_led) and
                        [r["products"] for r in led["runs"]] == [r["products"] for r in all_led["runs"]],
                        "threshold 0 differs from --all-products")
            else:
                T.check(any(p["role"] == "other" and p["degree"] == 3 for r in led["runs"] for p in r["products"]),
                        "threshold 0.01 should lump degree 3 of some run")
    for f in T.fails[:40]:
        print("FAIL:", f)
    print(f"report_threshold: {T.n - len(T.fails)}/{T.n} checks passed in {time.time() - t0:.1f} s")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
