"""The built-in container catalog (templates/containers.json) and the campaign key `units`.

Checks:
  * every catalog entry says where its size comes from (`source`): "common practice", "from
    memory" or a named publication, never a file of the program; `units` is "metric", "us" or
    absent (both);
  * the metric sizes the catalog must carry are there: chlorine cylinders and drums, a bromine
    container, NBS drums, caustic in 1,000 L IBCs; each reagent has a container in each system;
  * a campaign's `units` picks the containers: a Cl2 demand of 400 kg and of 1,200 kg reported
    with "metric", "us" and no `units` is ordered in the container the design's rule gives
    (orders.h: fewest containers, then the least usable excess, then catalog order), worked
    here from the catalog file itself, only among the entries of that system; the workbook's
    Orders sheet names that container and its Assumptions sheet gives its net content with
    the catalog's source;
  * the metric demo campaign (campaigns/valmorane-may.json) orders only metric or untagged
    containers;
  * `units` outside "metric"/"us" is refused with exit 2 and the field named.
"""
import json
import math
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

import openpyxl  # noqa: E402

T = Tally()
CAT = json.load(open(os.path.join(ROOT, "templates", "containers.json")))["containers"]
PROGRAM_FILE = re.compile(r"\b(src|include|tests|templates|tools)/|\.(c|h|py|sh|json)\b")

for i, c in enumerate(CAT):
    src = c.get("source", "")
    T.check(src.strip(), f"catalog entry {i} ({c['name']}): no source")
    T.check(src.startswith(("common practice", "from memory")) or re.search(r"ADR|RID|UN \d|Euro Chlor|SDS|ISO|EN \d", src),
            f"catalog entry {i} ({c['name']}): source {src!r} is neither a publication nor marked")
    T.check(not PROGRAM_FILE.search(src), f"catalog entry {i}: source {src!r} names a program file")
    T.check(c.get("units", "both") in ("metric", "us", "both"), f"catalog entry {i}: units {c.get('units')!r}")


def system(units):
    return [c for c in CAT if c.get("units") in (None, units)]


metric = system("metric")
for reagent in ("Cl2", "Br2", "SO2Cl2", "NBS", "HBr", "NaOH"):
    for u in ("metric", "us"):
        T.check(any(c["reagent"] == reagent for c in system(u)), f"catalog: no {u} container for {reagent}")
T.check(any(c["reagent"] == "Cl2" and "cylinder" in c["name"] and c.get("units") == "metric" for c in CAT),
        "catalog: no metric chlorine cylinder")
T.check(any(c["reagent"] == "Cl2" and "drum" in c["name"] and c.get("units") == "metric" for c in CAT),
        "catalog: no metric chlorine drum")
T.check(any(c["reagent"] == "Br2" and c.get("units") == "metric" for c in CAT), "catalog: no metric bromine container")
T.check(any(c["reagent"] == "NBS" and re.search(r"drum|bag", c["name"]) for c in metric), "catalog: no NBS drum or bag")
T.check(any(c["reagent"] == "NaOH" and "1,000 L IBC" in c["name"] and c.get("units") == "metric" for c in CAT),
        "catalog: no 1,000 L caustic IBC")


def expected(units, demand_kg):
    """The design's choice (orders.h): fewest containers, then least usable excess, then list order."""
    best = None
    for i, c in enumerate(system(units)):
        if c["reagent"] != "Cl2":
            continue
        usable = c["net_kg"] - c.get("heel_kg", 0)
        n = math.ceil(demand_kg / usable - 1e-12)
        key = (n, n * usable - demand_kg, i)
        if best is None or key < best[0]:
            best = (key, c)
    return best[1], best[0][0]


def campaign(units, cl2_kg):
    c = {"format": "haloledger-campaign/1", "title": "container units", "site": "test bench",
         "issued": "2027-08-01",
         "runs": [{"id": "U-1", "start": "2027-09-06T06:00", "substrate": {"name": "toluene", "smiles": "Cc1ccccc1"},
                   "substrate_kg": 2000, "reagent": "Cl2", "reagent_kg": cl2_kg, "temp_c": 90, "feed_h": 4}]}
    if units:
        c["units"] = units
    return c


with tempfile.TemporaryDirectory() as d:
    for units in ("metric", "us", None):
        for demand in (400.0, 1200.0):
            tag = f"units={units} Cl2 {demand:g} kg"
            camp = os.path.join(d, "c.json")
            with open(camp, "w") as f:
                json.dump(campaign(units, demand), f)
            out, book = os.path.join(d, "c-ledger.json"), os.path.join(d, "c.xlsx")
            p = subprocess.run(WRAP + [BIN, "report", camp, "-o", out, "-o", book], capture_output=True, text=True)
            if not T.check(p.returncode == 0, f"{tag}: exit {p.returncode} {p.stderr}"):
                continue
            want, n = expected(units or "us", demand)
            lines = [o for o in json.load(open(out))["orders"] if o["reagent"] == "Cl2"]
            if T.check(len(lines) == 1, f"{tag}: {len(lines)} Cl2 order lines"):
                T.check(lines[0]["container"] == want["name"] and lines[0]["containers"] == n,
                        f"{tag}: ordered {lines[0]['containers']} x {lines[0]['container']!r}, "
                        f"by hand {n} x {want['name']!r}")
            wb = openpyxl.load_workbook(book)
            ws = wb["Orders"]
            h = {c.value: c.column for c in ws[1]}
            names = [ws.cell(r, h["Container"]).value for r in range(2, ws.max_row + 1)
                     if ws.cell(r, h["Item"]).value == "Cl2"]
            T.check(names == [want["name"]], f"{tag}: Orders sheet container {names}")
            ws = wb["Assumptions"]
            rows = [(ws.cell(r, 2).value, ws.cell(r, 4).value) for r in range(2, ws.max_row + 1)
                    if f'"{want["name"]}": net content' in str(ws.cell(r, 1).value)]
            T.check(rows == [(want["net_kg"], want["source"])],
                    f"{tag}: Assumptions row for {want['name']!r}: {rows}")
    # the metric demo orders only metric or untagged containers
    out = os.path.join(d, "valmorane.json")
    p = subprocess.run(WRAP + [BIN, "report", os.path.join(ROOT, "campaigns", "valmorane-may.json"), "-o", out],
                       capture_output=True, text=True)
    if T.check(p.returncode == 0, f"valmorane-may: exit {p.returncode} {p.stderr}"):
        names = {c["name"] for c in metric}
        ordered = [o["container"] for o in json.load(open(out))["orders"] if o["containers"] > 0]
        T.check(ordered and all(x in names for x in ordered), f"valmorane-may orders {ordered}: not all metric")
    # a units value outside the two systems
    camp = os.path.join(d, "bad.json")
    with open(camp, "w") as f:
        json.dump(campaign("imperial", 400), f)
    p = subprocess.run(WRAP + [BIN, "check", camp], capture_output=True, text=True)
    T.check(p.returncode == 2 and re.search(r':\d+:\d+: units: must be "us" or "metric" \(got "imperial"\)', p.stderr),
            f"units 'imperial': exit {p.returncode} {p.stderr.strip()!r}")

for f in T.fails:
    print("FAIL:", f)
print(f"container_units: {T.n - len(T.fails)}/{T.n} checks passed")
sys.exit(1 if T.fails else 0)
