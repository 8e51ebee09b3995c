#!/usr/bin/python3
"""shared_runs.py - runs that share work (one selectivity prediction per substrate, reagent,
temperature and model; the Assumptions rows listed once) still each show their own inputs.

Four runs of one substrate and reagent: two at 25 C, one at 80 C, and two under model blocks of
their own with different overhalogenation_factor values. Read back from the JSON ledger:
1. every overhalogenation_factor given in the campaign file is listed on the Assumptions sheet
   (the value is the campaign's own input, design section 4), and the default 1 as well;
2. the per-H reactivity rows of both temperatures are listed: the 80 C value differs from the
   25 C value and equals r25^(298.15/353.15) (the temperature rule of design section 4);
3. the two runs at 25 C without model blocks have equal isomer shares; the run at 80 C does not.
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, WRAP, Tally  # noqa: E402

T = Tally()


def finish():
    for f in T.fails[:40]:
        print("FAIL:", f)
    print(f"shared_runs: {T.n - len(T.fails)}/{T.n} checks passed")
    return 1 if T.fails else 0


def run(i, temp, model=None):
    r = {"id": "S-%d" % i, "start": "2027-03-0%dT06:00" % (i + 1), "reactor": "R-1",
         "substrate": {"name": "propane", "smiles": "CCC"}, "substrate_kg": 500 + i,
         "reagent": "Cl2", "reagent_eq": 0.5, "temp_c": temp, "feed_h": 2}
    if model is not None:
        r["model"] = model
    return r


CAMP = {"format": "haloledger-campaign/1", "title": "shared work", "site": "Test site (invented)",
        "runs": [run(0, 25), run(1, 25), run(2, 80),
                 run(3, 25, {"overhalogenation_factor": 1.7}),
                 run(4, 25, {"overhalogenation_factor": 0.6})]}


def main():
    with tempfile.TemporaryDirectory() as d:
        camp = os.path.join(d, "c.json")
        with open(camp, "w") as f:
            json.dump(CAMP, f)
        out = os.path.join(d, "l.json")
        p = subprocess.run(WRAP + [BIN, "report", camp, "-o", out], capture_output=True, text=True,
                           timeout=120)
        T.check(p.returncode in (0, 3), "report exits 0 or 3 (got %d: %s)" % (p.returncode, p.stderr[-300:]))
        if p.returncode not in (0, 3):
            return finish()
        with open(out) as f:
            led = json.load(f)
    rows = led["assumptions"]
    phis = sorted(a["value"] for a in rows if a["what"] == "Cl2 overhalogenation_factor")
    T.check(phis == [0.6, 1.0, 1.7], "every overhalogenation_factor listed: %s" % phis)
    sec = {}
    for a in rows:
        w = a["what"]
        if w.startswith("Cl2 per-H reactivity, secondary, at "):
            sec[w.rsplit(" at ", 1)[1]] = a["value"]
    at25, at80 = "25 C (run)", "80 C (run)"
    T.check(set(sec) >= {at25, at80}, "secondary reactivity listed at 25 C and 80 C: %s" % sorted(sec))
    if {at25, at80} <= set(sec):
        want = sec[at25] ** (298.15 / 353.15)
        T.check(abs(sec[at80] - want) <= 1e-9 * want,
                "80 C value %r = r25^(298.15/353.15) = %r" % (sec[at80], want))
    runs = {r["id"]: r for r in led["runs"]}
    share = {k: [p["mol_fraction"] for p in runs[k]["products"] if p["degree"] == 1] for k in runs}
    def close(a, b, tol):
        return len(a) == len(b) and all(abs(x - y) <= tol * max(abs(x), abs(y)) for x, y in zip(a, b))
    T.check(close(share["S-0"], share["S-1"], 1e-12),
            "equal monohalide shares at 25 C: %s %s" % (share["S-0"], share["S-1"]))
    T.check(not close(share["S-0"], share["S-2"], 1e-3), "the run at 80 C has its own shares: %s" % share["S-2"])
    return finish()


if __name__ == "__main__":
    sys.exit(main())
