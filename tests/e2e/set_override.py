#!/usr/bin/python3
"""set_override.py - `--set KEY=VALUE` gives the ledger of a campaign edited by hand.

The reference is a copy of the campaign edited here with Python's json module (or a CSV
schedule rewritten with its csv module): the JSON ledger of `report --set` must equal the
edited copy's ledger byte for byte, except for the one "overrides" line that says it is a
what-if.  Both are written from folders where the campaign has the same name, so
campaign.file agrees.  Cases: a run-level key (an amount given in kg set in equivalents), an
entry with repeat (every copy), a model key, a scrubber key, a stock key and a run of a CSV
schedule.  Then the workbook says it is a what-if (openpyxl: Assumptions rows and the page
header), and bad --set values are refused with exit 2, a message that names the --set and
the part that is wrong, and nothing written.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix).
"""
import copy
import csv
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402
from csv_schedule import COLUMNS, cell, flat  # noqa: E402  (the schedule tests' CSV writer)

SRC = os.path.join(ROOT, "campaigns", "harrowmere-march.json")


def write_csv(runs, path):
    """The runs as an RFC 4180 schedule, with a model column besides the run keys."""
    cols = COLUMNS + ["model_overhalogenation_factor"]
    with open(path, "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(cols)
        for r in runs:
            f = flat(r)
            w.writerow([cell(f.get(c), False, False, c) for c in cols])


def run(args, cwd):
    p = subprocess.run(WRAP + [BIN] + args, cwd=cwd, capture_output=True, timeout=300)
    return p.returncode, p.stdout.decode("utf-8", "replace"), p.stderr.decode("utf-8", "replace")


def write(folder, name, camp):
    os.makedirs(folder, exist_ok=True)
    with open(os.path.join(folder, name), "w") as fh:
        json.dump(camp, fh, indent=1)


def report(folder, args):
    """The JSON ledger text of `report camp.json ARGS` run in folder (None + stderr on failure)."""
    out = os.path.join(folder, "ledger.json")
    if os.path.exists(out):
        os.unlink(out)
    rc, _, err = run(["report", "camp.json", "-o", "ledger.json"] + args, folder)
    if rc != 0:
        return None, err
    with open(out, encoding="utf-8") as fh:
        return fh.read(), ""


def entry(camp, rid):
    return next(r for r in camp["runs"] if r["id"] == rid)


def equal_case(t, tmp, name, camp, edit, sets, schedule=None):
    """camp with --set sets against the copy edit(camp) (edit changes the copy in place; for a
    schedule case it returns the rows to write instead)."""
    a, b = os.path.join(tmp, name, "set"), os.path.join(tmp, name, "edited")
    plan = copy.deepcopy(camp)
    edited = copy.deepcopy(camp)
    rows = edit(edited)
    if schedule:
        for folder, rws in ((a, schedule), (b, rows)):
            os.makedirs(folder, exist_ok=True)
            write_csv(rws, os.path.join(folder, "rows.csv"))
        plan["schedule"] = edited["schedule"] = "rows.csv"
    write(a, "camp.json", plan)
    write(b, "camp.json", edited)
    args = []
    for s in sets:
        args += ["--set", s]
    plan_ledger, _ = report(a, [])
    got, err = report(a, args)
    if not t.check(got is not None, "%s: report --set failed: %s" % (name, err)):
        return
    ref, err = report(b, [])
    if not t.check(ref is not None, "%s: report of the edited copy failed: %s" % (name, err)):
        return
    t.check(ref != plan_ledger, "%s: the edit changes nothing (the case proves nothing)" % name)
    line = '"overrides": [%s],\n' % ", ".join(json.dumps(s) for s in sets)
    t.check(got.count(line) == 1, "%s: the ledger lacks the line %r" % (name, line))
    t.check(got.replace(line, "", 1) == ref, "%s: --set ledger differs from the edited copy's" % name)
    t.check('"overrides"' not in ref, "%s: a plan's ledger has an overrides key" % name)


def equal_cases(t, tmp):
    camp = json.load(open(SRC))

    def amount(c):  # CH-1 charges 400 kg of SO2Cl2: now 1.2 equivalents
        r = entry(c, "CH-1")
        del r["reagent_kg"]
        r["reagent_eq"] = 1.2
    equal_case(t, tmp, "run", camp, amount, ["runs.CH-1.reagent_eq=1.2"])

    def repeat(c):  # every copy of the TC entry (6 runs) at 30 C, in CSTR mode
        r = entry(c, "TC")
        r["temp_c"] = 30
        r["reactor_mode"] = "cstr"
    equal_case(t, tmp, "repeat", camp, repeat, ["runs.TC.temp_c=30", "runs.TC.reactor_mode=cstr"])

    def model(c):  # the campaign has no model block: the file would gain one
        c["model"] = {"overhalogenation_factor": 0.5}
    equal_case(t, tmp, "model", camp, model, ["model.overhalogenation_factor=0.5"])

    def plant(c):
        c["scrubbers"][0]["liquor_kg"] = 5000
        next(s for s in c["stock"] if s["reagent"] == "Cl2")["safety_kg"] = 2500
    equal_case(t, tmp, "plant", camp, plant, ["scrubbers.SC-A.liquor_kg=5000",
                                              "stock.Cl2.safety_kg=2500"])

    rows = copy.deepcopy(camp["runs"])
    sched = copy.deepcopy(camp)
    del sched["runs"]

    def csv_rows(c):
        r = copy.deepcopy(rows)
        ib = next(x for x in r if x["id"] == "IB")
        ib["reagent_eq"] = 0.8
        ib["model"] = {"overhalogenation_factor": 2}
        return r
    equal_case(t, tmp, "schedule", sched, csv_rows,
               ["runs.IB.reagent_eq=0.8", "runs.IB.model.overhalogenation_factor=2"], schedule=rows)


def workbook_case(t, tmp):
    """The workbook of a what-if says so: Assumptions rows first, the page header."""
    folder = os.path.join(tmp, "book")
    write(folder, "camp.json", json.load(open(SRC)))
    rc, out, err = run(["report", "camp.json", "-o", "w.xlsx", "--set", "runs.CH-1.reagent_eq=1.2"], folder)
    if not t.check(rc == 0, "workbook --set: exit %d: %s" % (rc, err)):
        return
    t.check("what-if: --set runs.CH-1.reagent_eq=1.2" in out, "report's summary names the what-if")
    import openpyxl
    wb = openpyxl.load_workbook(os.path.join(folder, "w.xlsx"))
    ws = wb["Assumptions"]
    first = [ws.cell(row=r, column=1).value for r in range(1, 4)]
    t.check(any(v and "WHAT-IF" in v and "runs.CH-1.reagent_eq=1.2" in v for v in first),
            "Assumptions: the --set row at the top (got %r)" % first)
    for name in ("Summary", "Runs", "Assumptions"):
        centre = wb[name].oddHeader.center.text or ""
        t.check("WHAT-IF" in centre, "%s: page header says WHAT-IF (got %r)" % (name, centre))
    rc, _, _ = run(["report", "camp.json", "-o", "plan.xlsx"], folder)
    wb = openpyxl.load_workbook(os.path.join(folder, "plan.xlsx"))
    t.check(rc == 0 and "WHAT-IF" not in (wb["Runs"].oddHeader.center.text or ""),
            "a plan's workbook does not say WHAT-IF")


# (--set arguments, regex of the message); every case exits 2 and writes nothing
BAD = [
    (["runs.CH-1.reagent_eq"], r"--set runs\.CH-1\.reagent_eq: expected KEY=VALUE"),
    (["runs.CH-9.reagent_eq=1"], r"--set runs\.CH-9\.reagent_eq=1: runs\.CH-9: no run has id \"CH-9\" \(did you mean \"CH-1\"\?\)"),
    (["runs.TC-2.temp_c=30"], r"--set runs\.TC-2\.temp_c=30: .*copy made by the repeat of the entry \"TC\".*runs\.TC\.temp_c"),
    (["runs.CH-1.reagnt_eq=1"], r"--set runs\.CH-1\.reagnt_eq=1: runs\.CH-1\.reagnt_eq: unknown key \(did you mean 'reagent_eq'\?\)"),
    (["runs.CH-1.reagent_eq=-1"], r"--set runs\.CH-1\.reagent_eq=-1: runs\.CH-1\.reagent_eq: must be >= 1e-06 \(got -1\)"),
    (["runs.CH-1.temp_c=warm"], r"--set runs\.CH-1\.temp_c=warm: runs\.CH-1\.temp_c: must be a number \(got a string\)"),
    (["runs.CH-1.temp_c=30", "runs.CH-1.temp_c=40"], r"--set runs\.CH-1\.temp_c=40: repeats the key of --set runs\.CH-1\.temp_c=30"),
    (["runs.CH-1.reagent_eq=1", "runs.CH-1.reagent_kg=300"], r"--set runs\.CH-1\.reagent_kg=300: --set runs\.CH-1\.reagent_eq=1 sets the other"),
    (["model={}", "model.overhalogenation_factor=2"], r"--set model\.overhalogenation_factor=2: overlaps the key of --set model=\{\}"),
    (["modle.overhalogenation_factor=2"], r"--set modle\.overhalogenation_factor=2: modle\.overhalogenation_factor: unknown key \(did you mean 'model'\?\)"),
    (["model.overhalogenation_factor=0"], r"--set model\.overhalogenation_factor=0: model\.overhalogenation_factor: must be >= 0\.001"),
    (["scrubbers.SC-B.liquor_kg=5000"], r"--set scrubbers\.SC-B\.liquor_kg=5000: scrubbers\.SC-B: no scrubber has id \"SC-B\" \(did you mean \"SC-A\"\?\)"),
    (["runs.CH-1.substrate_kg.x=1"], r"--set runs\.CH-1\.substrate_kg\.x=1: runs\.CH-1\.substrate_kg: is not an object"),
    (["runs.CH-1.id=X"], r"--set runs\.CH-1\.id=X: runs\.CH-1\.id: the id selects the run and cannot be set"),
    (["runs.CH-1.substrate_kg=null"], r"--set runs\.CH-1\.substrate_kg=null: runs\.CH-1\.substrate_kg: missing \(required\)"),
    (["runs.CH-1.reagent_kg=null"], r"--set runs\.CH-1\.reagent_kg=null: runs\.CH-1\.reagent_kg: missing: give reagent_eq"),
    (["runs.CH-1.temp_c="], r"--set runs\.CH-1\.temp_c=: no VALUE after '='"),
    (["runs.CH-1.temp_c=1e400"], r"--set runs\.CH-1\.temp_c=1e400: the value holds a number that is not finite"),
    (["runs.CH-1.substrate.smiles=C1CC"], r"--set runs\.CH-1\.substrate\.smiles=C1CC: runs\.CH-1\.substrate\.smiles: ring bond 1 is not closed"),
    (["runs.CH-1.start=\"2027-13-01\""], r"--set runs\.CH-1\.start=\"2027-13-01\": runs\.CH-1\.start: \"2027-13-01\" is not a valid ISO 8601 date"),
    (["runs.CH-1.mtt_c=20"], r"--set runs\.CH-1\.mtt_c=20: runs\.CH-1\.mtt_c: .*temp_c"),
]


def bad_cases(t, tmp):
    folder = os.path.join(tmp, "bad")
    write(folder, "camp.json", json.load(open(SRC)))
    for sets, rx in BAD:
        args = []
        for s in sets:
            args += ["--set", s]
        for cmd in (["check", "camp.json"], ["report", "camp.json", "-o", "out.json"]):
            rc, _, err = run(cmd + args, folder)
            t.check(rc == 2, "%s %s: exit %d (want 2)" % (cmd[0], sets, rc))
            t.check(re.search(rx, err) is not None, "%s %s: message %r does not match %r" % (cmd[0], sets, err, rx))
            out = os.path.join(folder, "out.json")
            if not t.check(not os.path.exists(out), "%s %s: wrote out.json" % (cmd[0], sets)):
                os.unlink(out)  # so the next case is judged on its own
    # a schedule row's value: the message names the --set, not the CSV file
    sched = json.load(open(SRC))
    rows = sched.pop("runs")
    sched["schedule"] = "rows.csv"
    write(folder, "sched.json", sched)
    write_csv(rows, os.path.join(folder, "rows.csv"))
    rc, _, err = run(["check", "sched.json", "--set", "runs.EB.reagent_eq=0"], folder)
    t.check(rc == 2 and re.search(r"^haloledger: --set runs\.EB\.reagent_eq=0: runs\.EB\.reagent_eq: must be >= 1e-06", err, re.M),
            "schedule row: exit %d, %r" % (rc, err))
    rc, _, err = run(["check", "sched.json", "--set", "runs.EB.substrate_kg=null"], folder)
    t.check(rc == 2 and re.search(r"^haloledger: --set runs\.EB\.substrate_kg=null: runs\.EB\.substrate_kg: missing", err, re.M),
            "schedule row, key removed: exit %d, %r" % (rc, err))
    rc, _, err = run(["compare", "camp.json", "camp.json", "--set", "runs.CH-1.temp_c=30"], folder)
    t.check(rc == 2 and "--set belongs to check, report and sweep" in err, "compare --set: exit %d %r" % (rc, err))


def main():
    t = Tally()
    with tempfile.TemporaryDirectory() as tmp:
        equal_cases(t, tmp)
        workbook_case(t, tmp)
        bad_cases(t, tmp)
    for f in t.fails:
        print("FAIL", f)
    print("set_override: %d checks, %d failed" % (t.n, len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
