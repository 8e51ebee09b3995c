#!/usr/bin/python3
"""bad_csv.py - every malformed CSV schedule of tests/bad_csv/ is refused cleanly (design section 6).

For each tests/bad_csv/NAME.csv the binary runs `check plant.json --schedule NAME.csv`,
`report ... -o OUT.json` and `report ... -o OUT.xlsx` in a fresh folder where OUT.json and
OUT.xlsx already exist with known bytes.  Each run must exit 2, print a stderr line
matching NAME.expect (`haloledger: NAME.csv:LINE:COL: column NAME: message`; the line and
column were counted by hand in the file), leave both outputs byte-identical and create no
other file.  The same schedule named by the campaign's "schedule" key must give the same
message.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix, e.g. valgrind).
"""
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP  # noqa: E402

BAD = os.path.join(ROOT, "tests", "bad_csv")
OLD_JSON = b'{"previous": "ledger"}\n'
OLD_XLSX = b'PK\x03\x04 previous workbook bytes\n'


def one(name, pattern, args, work):
    before = sorted(os.listdir(work))
    try:
        p = subprocess.run(WRAP + [BIN] + args, cwd=work, capture_output=True, timeout=120)
    except subprocess.TimeoutExpired:
        return ["%s: timed out" % " ".join(args)]
    bad = []
    err = p.stderr.decode("utf-8", "replace")
    what = " ".join(args)
    if p.returncode != 2:
        bad.append("%s: exit %d, expected 2" % (what, p.returncode))
    if not any(re.match(pattern, line) for line in err.splitlines()):
        bad.append("%s: stderr does not match %r:\n    %s" % (what, pattern, err.strip()))
    for f, old in (("OUT.json", OLD_JSON), ("OUT.xlsx", OLD_XLSX)):
        with open(os.path.join(work, f), "rb") as fh:
            if fh.read() != old:
                bad.append("%s: %s changed" % (what, f))
    if sorted(os.listdir(work)) != before:
        bad.append("%s: files appeared or vanished" % what)
    return bad


def main():
    names = sorted(f[:-4] for f in os.listdir(BAD) if f.endswith(".csv"))
    fails, n = [], 0
    with open(os.path.join(BAD, "plant.json")) as fh:
        plant = json.load(fh)
    with tempfile.TemporaryDirectory() as tmp:
        for name in names:
            with open(os.path.join(BAD, name + ".expect")) as fh:
                pattern = fh.read().strip()
            work = os.path.join(tmp, name)
            os.mkdir(work)
            shutil.copyfile(os.path.join(BAD, name + ".csv"), os.path.join(work, name + ".csv"))
            shutil.copyfile(os.path.join(BAD, "plant.json"), os.path.join(work, "plant.json"))
            named = dict(plant, schedule=name + ".csv")
            with open(os.path.join(work, "named.json"), "w") as fh:
                json.dump(named, fh)
            for f, old in (("OUT.json", OLD_JSON), ("OUT.xlsx", OLD_XLSX)):
                with open(os.path.join(work, f), "wb") as fh:
                    fh.write(old)
            sched = ["--schedule", name + ".csv"]
            for args in (["check", "plant.json"] + sched, ["report", "plant.json", "-o", "OUT.json"] + sched,
                         ["report", "plant.json", "-o", "OUT.xlsx"] + sched, ["check", "named.json"]):
                n += 1
                fails += one(name, pattern, args, work)
    for f in fails:
        print("FAIL", f)
    print("bad_csv: %d schedules, %d runs, %d failed" % (len(names), n, len(fails)))
    return 1 if fails or len(names) < 25 else 0


if __name__ == "__main__":
    sys.exit(main())
