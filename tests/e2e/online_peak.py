"""End to end: orders[].containers_on_line_peak, the most gas containers on line at once in a
month, against a count by hand of the overlapping feeds of the campaign below, in the JSON ledger
and on the Orders sheet.

One container gives 7.5 kg/h (the campaign's own rate), so a run drawing K kg over H hours needs
ceil(K / H / 7.5) containers on line (peak factor 1). June:
  A 06:00-08:00, 45 kg / 2 h = 22.5 kg/h -> 3
  B 07:00-09:00, 15 kg / 2 h =  7.5 kg/h -> 1    A + B from 07:00: 4 (the peak, at 07:00)
  C 08:00-10:00, 30 kg / 2 h = 15.0 kg/h -> 2    A has ended at 08:00: B + C = 3
  X 07:30, cancelled: draws nothing and is not on line
July: D alone, 45 kg / 2 h -> 3.  June uses 90 kg, one 898 kg-usable container, and July draws
its 45 kg from what is left of it (0 bought): the peak on line (4 and 3) exceeds the containers
consumed (1 and 0), which is the point of the column.  X also checks that a cancelled run's
runs[].withdrawal says 0 containers on line.
"""
import json, os, subprocess, sys, tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, WRAP, Tally

T = Tally()


def run(rid, start, kg, **extra):
    r = {"id": rid, "start": start, "scrubber": "S1", "substrate": {"name": "methane", "smiles": "C"},
         "substrate_kg": 50.0, "reagent": "Cl2", "reagent_kg": kg, "temp_c": 30, "feed_h": 2}
    r.update(extra)
    return r


CAMPAIGN = {
    "format": "haloledger-campaign/1",
    "title": "containers on line by hand",
    "site": "test bench",
    "scrubbers": [{"id": "S1", "liquor": "naoh", "naoh_wt_pct": 18, "liquor_kg": 20000,
                   "rated_acid_kmol_h": 50, "max_liquor_temp_c": 150}],
    "containers": [{"reagent": "Cl2", "name": "test ton container", "net_kg": 907, "heel_kg": 9,
                    "gas_withdrawal_kg_h": 7.5}],
    "runs": [run("A", "2027-06-01T06:00", 45), run("B", "2027-06-01T07:00", 15),
             run("C", "2027-06-01T08:00", 30),
             run("X", "2027-06-01T07:30", 45, actual={"status": "cancelled"}),
             run("D", "2027-07-05T06:00", 45)],
}
EXPECTED = {"2027-06": (4, "2027-06-01T07:00", 1), "2027-07": (3, "2027-07-05T06:00", 0)}

with tempfile.TemporaryDirectory() as d:
    camp = os.path.join(d, "online.json")
    out = os.path.join(d, "online-ledger.json")
    book = os.path.join(d, "online.xlsx")
    with open(camp, "w") as f:
        json.dump(CAMPAIGN, f, indent=1)
    p = subprocess.run(WRAP + [BIN, "report", camp, "--today", "2027-06-15", "-o", out, "-o", book],
                       capture_output=True, text=True)
    T.check(p.returncode == 0, f"report exit {p.returncode}: {p.stderr[-400:]}")
    L = json.load(open(out)) if os.path.exists(out) else {"orders": []}
    rows = {}
    if os.path.exists(book):
        import openpyxl
        ws = openpyxl.load_workbook(book)["Orders"]
        head = [c.value for c in ws[1]]
        for row in ws.iter_rows(min_row=2, values_only=True):
            if row[1] == "Cl2":
                rows[row[0]] = dict(zip(head, row))

cl2 = {o["month"]: o for o in L["orders"] if o["reagent"] == "Cl2"}
T.check(set(cl2) == set(EXPECTED), f"Cl2 order lines {sorted(cl2)}")
for month, (peak, at, used) in EXPECTED.items():
    o = cl2.get(month, {})
    T.check(o.get("containers_on_line_peak") == peak, f"{month}: peak on line {o.get('containers_on_line_peak')!r}, expected {peak}")
    T.check(o.get("containers_on_line_peak_at") == at, f"{month}: busiest at {o.get('containers_on_line_peak_at')!r}, expected {at}")
    T.check(o.get("containers") == used, f"{month}: containers consumed {o.get('containers')!r}, expected {used}")
x = {r["id"]: r for r in L.get("runs", [])}.get("X", {}).get("withdrawal") or {}
T.check(x.get("containers_on_line") == 0, f"cancelled X: containers on line {x.get('containers_on_line')!r}")
T.check(len(rows) == 2, f"Orders sheet Cl2 rows: {sorted(rows)}")
for r in rows.values():
    peak = r.get("Containers on line, busiest moment [count]")
    T.check(peak in (4, 3), f"sheet peak on line {peak!r}")
T.check(sorted(r.get("Containers on line, busiest moment [count]") for r in rows.values()) == [3, 4],
        "the sheet shows June's 4 and July's 3")

for f in T.fails:
    print("FAIL:", f)
print(f"online_peak: {T.n - len(T.fails)}/{T.n} checks passed")
sys.exit(1 if T.fails else 0)
