#!/usr/bin/python3
"""compare_ledgers.py - `haloledger compare A B` on campaigns and JSON ledgers.

A campaign against itself, and against its own JSON ledger, has no differences (exit 0,
"no differences", an empty "differences" array with -o).  With run CH-1's reagent_kg changed
from 400 to 480 kg (the input, so the expected charge is known without the program), the
month's SO2Cl2 charge and the run's charge read 400 -> 480, the run's figures differ, nothing
is reported for runs left alone, and a run removed from B is reported as present in A only.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix).
"""
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402


def run(args, cwd):
    return subprocess.run(WRAP + [BIN] + args, cwd=cwd, capture_output=True, timeout=300)


def diffs(args, tmp, t, what):
    p = run(["compare"] + args + ["-o", "cmp.json"], tmp)
    if not t.check(p.returncode == 0, "%s: exit %d %s" % (what, p.returncode, p.stderr.decode())):
        return None, ""
    d = json.load(open(os.path.join(tmp, "cmp.json")))
    t.check(d["format"] == "haloledger-compare/1", "%s: format %r" % (what, d.get("format")))
    return d["differences"], p.stdout.decode()


def main():
    t = Tally()
    src = os.path.join(ROOT, "campaigns", "harrowmere-march.json")
    with tempfile.TemporaryDirectory() as tmp:
        d, out = diffs([src, src], tmp, t, "self")
        t.check(d == [] and "no differences" in out, "campaign against itself: %r" % (d or out)[:3])
        p = run(["report", src, "-o", "a.json"], tmp)
        t.check(p.returncode == 0, "report a.json")
        d, out = diffs(["a.json", src], tmp, t, "ledger vs campaign")
        t.check(d == [], "its own ledger against the campaign: %r" % (d or [])[:3])
        c = json.load(open(src))
        ch = next(r for r in c["runs"] if r["id"] == "CH-1")
        t.check(ch["reagent_kg"] == 400 and ch["reagent"] == "SO2Cl2", "CH-1 charges 400 kg SO2Cl2")
        ch["reagent_kg"] = 480
        with open(os.path.join(tmp, "b.json"), "w") as f:
            json.dump(c, f)
        d, out = diffs([src, "b.json"], tmp, t, "changed run")
        if d is not None:
            got = {(x["where"], x["what"]): (x["a"], x["b"]) for x in d}
            t.check(got.get(("month 2027-03 SO2Cl2", "charged_kg")) == ("400", "480"),
                    "month charge 400 -> 480: %r" % (got.get(("month 2027-03 SO2Cl2", "charged_kg")),))
            t.check(got.get(("run CH-1", "reagent_charged.kg")) == ("400", "480"),
                    "run charge 400 -> 480: %r" % (got.get(("run CH-1", "reagent_charged.kg")),))
            t.check(("run CH-1", "conversion_pct") in got, "CH-1 conversion differs")
            others = [k for k in got if k[0].startswith("run ") and k[0] != "run CH-1"]
            t.check(not others, "runs left alone reported: %r" % others[:3])
            t.check(any(k[0].startswith("scrubber SC-A") for k in got), "scrubber SC-A differs")
        c["runs"] = [r for r in c["runs"] if r["id"] != "CH-1"]
        with open(os.path.join(tmp, "c.json"), "w") as f:
            json.dump(c, f)
        d, out = diffs([src, "c.json"], tmp, t, "removed run")
        if d is not None:
            got = {(x["where"], x["what"]): (x["a"], x["b"]) for x in d}
            t.check(got.get(("run CH-1", "present")) == ("yes", "-"), "CH-1 only in A: %r" % (got.get(("run CH-1", "present")),))
        p = run(["compare", src], tmp)
        t.check(p.returncode == 2, "compare with one file: exit %d" % p.returncode)
    for f in t.fails:
        print("FAIL", f)
    print("compare_ledgers: %d checks, %d failed" % (t.n, len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
