#!/usr/bin/python3
"""bench_smoke.py - `make bench` cannot rot: its generator and its driver run on 10^3 runs.

Not a timed test: nothing here depends on speed. It checks that
1. bench/gen_campaign.py makes the campaign bench/README.md describes: N runs, one start every
   30 minutes, 12 reactors, 4 scrubbers (three reactors each), eight substrates, all five
   reagents, and that the binary accepts it (`check` exits 0, no warning about the site shape);
2. bench/bench.py runs check, the JSON and the workbook report and both floors, and prints its
   table: the 1000-run row has all 15 fields, with cell and byte counts equal to what is counted
   here from the files it leaves (cells: <c> elements of the worksheets, read with Python's
   zipfile; bytes: the JSON ledger's size), and its two ratios are the medians of the three
   rounds' ratios it lists;
3. the content floor writes the workbook's own cells: every worksheet of the replayed workbook
   holds the same <c> elements as the ledger's, byte for byte, once the style numbers (s="N",
   which only name formats) are taken out, and the same sheet names in the same order; and it
   uses as many distinct style numbers as the ledger, each a format of its own.
Env: HALOLEDGER, HL_ROOT.
"""
import json
import os
import re
import subprocess
import sys
import tempfile
import time
import zipfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, Tally  # noqa: E402

T = Tally()


def style_numbers(xlsx):
    """The distinct s="N" of every worksheet's cells."""
    with zipfile.ZipFile(xlsx) as z:
        return {m for n in z.namelist() if n.startswith("xl/worksheets/sheet")
                for m in re.findall(rb'<c [^>]*? s="([0-9]+)"', z.read(n))}


def sheets(xlsx):
    """[(sheet name, [cell XML less its style number, text resolved])] of every worksheet.
    A small workbook keeps its texts in the shared-string table, the content floor (streamed)
    inline: both are compared as <c r=..><is><t>text</t></is></c>."""
    with zipfile.ZipFile(xlsx) as z:
        sst = []
        if "xl/sharedStrings.xml" in z.namelist():
            sst = [b"".join(re.findall(rb"<t(?: [^>]*)?>([^<]*)</t>", si))
                   for si in re.findall(rb"<si>(.*?)</si>", z.read("xl/sharedStrings.xml"), re.S)]
        names = re.findall(rb'<sheet name="([^"]*)"', z.read("xl/workbook.xml"))
        out = []
        for k, name in enumerate(names, 1):
            xml = z.read(f"xl/worksheets/sheet{k}.xml")
            cells = []
            for c in re.findall(rb"<c .*?(?:/>|</c>)", xml, re.S):
                c = re.sub(rb' s="[0-9]+"', b"", c)
                m = re.match(rb'(<c r="[A-Z]+[0-9]+") t="s"><v>([0-9]+)</v></c>', c)
                if m:
                    c = m.group(1) + b' t="inlineStr"><is><t>' + sst[int(m.group(2))] + b"</t></is></c>"
                cells.append(re.sub(rb'<t xml:space="preserve">', b"<t>", c))
            out.append((name, cells))
    return out


def main():
    t0 = time.time()
    with tempfile.TemporaryDirectory() as tmp:
        camp = os.path.join(tmp, "campaign-1000.json")
        subprocess.run([sys.executable, os.path.join(ROOT, "bench", "gen_campaign.py"), "1000", camp], check=True)
        with open(camp) as f:
            c = json.load(f)
        runs = c["runs"]
        T.check(len(runs) == 1000, f"{len(runs)} runs")
        starts = sorted({r["start"] for r in runs})
        T.check(len(starts) == 1000, "one run per start time")
        T.check(starts[0] == "2027-01-01T00:00" and starts[1] == "2027-01-01T00:30"
                and starts[-1] == "2027-01-21T19:30", f"starts every 30 min: {starts[:2]} .. {starts[-1]}")
        T.check(len({r["reactor"] for r in runs}) == 12, "12 reactors")
        T.check(len(c["scrubbers"]) == 4 and len({r["scrubber"] for r in runs}) == 4, "4 scrubbers")
        per = {}
        for r in runs:
            per.setdefault(r["scrubber"], set()).add(r["reactor"])
        T.check(all(len(v) == 3 for v in per.values()), f"three reactors per scrubber: {per}")
        T.check(len({r["substrate"]["smiles"] for r in runs}) == 8, "eight substrates")
        T.check({r["reagent"] for r in runs} == {"Cl2", "Br2", "SO2Cl2", "NBS", "HBr"}, "all five reagents")
        p = subprocess.run([BIN, "check", camp], capture_output=True, text=True, timeout=300)
        T.check(p.returncode == 0, f"check exit {p.returncode}: {p.stderr[-300:]}")

        env = dict(os.environ, BENCH_SIZES="1000", BENCH_DIR=tmp, HALOLEDGER=BIN, BENCH_ROUNDS="3")
        p = subprocess.run([sys.executable, os.path.join(ROOT, "bench", "bench.py")], env=env,
                           capture_output=True, text=True, timeout=600)
        T.check(p.returncode == 0, f"bench.py exit {p.returncode}: {p.stderr[-500:]}")
        rows = [ln.split(" | ") for ln in p.stdout.splitlines() if ln.startswith("1000 |")]
        if T.check(len(rows) == 1 and len(rows[0]) == 15, f"table row: {p.stdout[-600:]}"):
            row = rows[0]
            cells = 0
            with zipfile.ZipFile(os.path.join(tmp, "ledger-1000.xlsx")) as z:
                for n in z.namelist():
                    if n.startswith("xl/worksheets/sheet"):
                        cells += z.read(n).count(b"<c ")
            T.check(cells > 10000 and int(row[13]) == cells, f"cells {row[13]} != counted {cells}")
            size = os.path.getsize(os.path.join(tmp, "ledger-1000.json"))
            T.check(round(size / 1000) == int(row[14]), f"json bytes/run {row[14]} != {size / 1000:.0f}")
            for k in (1, 2, 3, 4, 6):
                cpu, wall = row[k].split(" [")
                T.check(float(cpu) >= 0 and float(wall.rstrip("]")) > 0, f"time field {row[k]!r}")
            T.check(all(float(row[k]) > 0 for k in (5, 7)), f"ratio fields {row[5]}, {row[7]}")
            # the table's ratios are the medians of the three rounds' ratios it lists
            rnd = [ln.split(" | ") for ln in p.stdout.splitlines() if ln.startswith("rounds 1000 |")]
            if T.check(len(rnd) == 1 and len(rnd[0]) == 3, f"rounds line: {p.stdout[-600:]}"):
                for k, side in ((5, rnd[0][1]), (7, rnd[0][2])):
                    v = sorted(float(x) for x in side.split())
                    T.check(len(v) == 3 and abs(v[1] - float(row[k])) <= 0.0051,
                            f"table ratio {row[k]} is not the median of the rounds' {v}")
            T.check(all(float(row[k]) > 0 for k in (8, 9, 10)), f"peak RSS fields {row[8:11]}")
            fl = os.path.join(tmp, "floor-1000.xlsx")
            with zipfile.ZipFile(fl) as z:
                fc = sum(z.read(n).count(b"<c ") for n in z.namelist() if n.startswith("xl/worksheets/sheet"))
            T.check(fc == cells, f"floor wrote {fc} cells, not {cells}")
            styles = [style_numbers(os.path.join(tmp, w)) for w in ("ledger-1000.xlsx", "content-1000.xlsx")]
            T.check(len(styles[0]) > 5 and len(styles[1]) == len(styles[0]),
                    f"content floor: {len(styles[1])} style numbers, the ledger {len(styles[0])} (one format each)")
            led, rep = sheets(os.path.join(tmp, "ledger-1000.xlsx")), sheets(os.path.join(tmp, "content-1000.xlsx"))
            T.check([n for n, _ in led] == [n for n, _ in rep] and len(led) > 10,
                    f"content floor sheets {[n for n, _ in rep]} != {[n for n, _ in led]}")
            for (name, a), (_, b) in zip(led, rep):
                T.check(a == b and len(a) > 0, f"content floor sheet {name}: {len(b)} cells against the ledger's {len(a)}"
                        + next((f", first at {i}: {x[:120]!r} != {y[:120]!r}" for i, (x, y) in enumerate(zip(a, b)) if x != y), ""))
    for f in T.fails:
        print("FAIL:", f)
    print(f"bench_smoke: {T.n - len(T.fails)}/{T.n} checks passed in {time.time() - t0:.1f} s")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
