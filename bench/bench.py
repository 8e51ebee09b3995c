#!/usr/bin/python3
"""bench.py - `make bench`: time and memory of check, the JSON report and the workbook report on
generated campaigns of 10^3, 10^4, 10^5 runs (10^6 with BENCH_BIG=1), against two floors of a bare
libxlsxwriter program (bench/floor.c): as many numeric cells (the numeric floor), and the workbook's
own cells read back from it and written again (the content floor, up to 10^5 runs). See
bench/README.md.

Env: BUILD (build folder, default build; HALOLEDGER names the binary instead), BENCH_BIG=1 (add 10^6), BENCH_SIZES="1000 10000" (override),
BENCH_DIR (work folder, default $BUILD/bench), BENCH_ROUNDS (rounds of the workbook report and its
floors, default 3). Prints one table; exits non-zero only when a command fails (it is not a test of
speed).
"""
import html
import os
import re
import struct
import subprocess
import tempfile
import sys
import time
import zipfile

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
BUILD = os.environ.get("BUILD", "build")
BIN = os.environ.get("HALOLEDGER") or os.path.join(ROOT, BUILD, "haloledger")
FLOOR = os.path.join(os.path.dirname(BIN), "bench_floor")


def measure(argv, cwd, out=None):
    """Run argv; return (wall s, cpu s = user + sys, peak RSS in KB) from the child's rusage.
    With out a list, the command's stdout text is appended to it."""
    # stdout and stderr go to files, not pipes: wait4 before reading a pipe deadlocks once the
    # warnings fill the pipe buffer (64 KiB on Linux)
    with tempfile.TemporaryFile() as errf, tempfile.TemporaryFile() as outf:
        t0 = time.monotonic()
        p = subprocess.Popen(argv, cwd=cwd, stdout=outf if out is not None else subprocess.DEVNULL,
                             stderr=errf)
        _, status, ru = os.wait4(p.pid, 0)
        wall = time.monotonic() - t0
        errf.seek(0)
        err = errf.read().decode(errors="replace")
        outf.seek(0)
        if out is not None:
            out.append(outf.read().decode(errors="replace"))
    p.returncode = os.waitstatus_to_exitcode(status)
    if p.returncode not in (0, 3):
        raise RuntimeError(f"{' '.join(argv)}: exit {p.returncode}: {err[-400:]}")
    return wall, ru.ru_utime + ru.ru_stime, ru.ru_maxrss  # ru_maxrss is in KB on Linux


def cells_in(xlsx):
    """Cells written: <c> elements in every worksheet of the workbook."""
    n = 0
    with zipfile.ZipFile(xlsx) as z:
        for name in z.namelist():
            if name.startswith("xl/worksheets/sheet") and name.endswith(".xml"):
                tail = b""
                with z.open(name) as f:
                    while True:
                        chunk = f.read(1 << 20)
                        if not chunk:
                            break
                        data = tail + chunk
                        n += data.count(b"<c ") - tail.count(b"<c ")
                        tail = data[-2:]
    return n


CELL = re.compile(rb'<c r="([A-Z]+)([0-9]+)"(?: s="([0-9]+)")?(?: t="([a-zA-Z]+)")?(?:/>|>(.*?)</c>)', re.S)
VALUE = re.compile(rb'<v>([^<]*)</v>')
FORMULA = re.compile(rb'<f>([^<]*)</f>')
TEXT = re.compile(rb'<t(?: [^>]*)?>([^<]*)</t>')
SHEET = re.compile(rb'<sheet name="([^"]*)"')


def col_index(letters):
    k = 0
    for ch in letters:
        k = k * 26 + ch - 64
    return k - 1


def unescape(b):
    return html.unescape(b.decode()).encode() if b"&" in b else b


def extract_cells(xlsx, out):
    """Write the cells of every worksheet of xlsx into out, in bench/floor.c's CELLS format
    (sheets in the workbook's order, cells in the order of the XML); return the cell count."""
    n = 0
    with zipfile.ZipFile(xlsx) as z, open(out, "wb") as f:
        f.write(b"HLCELLS1")
        sst = []
        if "xl/sharedStrings.xml" in z.namelist():  # a workbook below the streaming size
            for si in re.findall(rb"<si>(.*?)</si>", z.read("xl/sharedStrings.xml"), re.S):
                sst.append(unescape(b"".join(TEXT.findall(si))))
        names = SHEET.findall(z.read("xl/workbook.xml"))
        for k, name in enumerate(names, 1):
            name = unescape(name)
            f.write(b"S" + struct.pack("<I", len(name)) + name + b"\0")
            tail = b""
            with z.open(f"xl/worksheets/sheet{k}.xml") as x:
                while True:
                    chunk = x.read(1 << 22)
                    data = tail + chunk
                    cut = data.rfind(b"</row>") + 6 if chunk else len(data)
                    if chunk and cut < 6:  # no row ends in this chunk yet
                        tail = data
                        continue
                    for m in CELL.finditer(data, 0, cut):
                        col, row, s, t, body = m.groups()
                        head = struct.pack("<III", int(row) - 1, col_index(col), int(s or 0))
                        body = body or b""
                        fm = FORMULA.search(body)
                        v = VALUE.search(body)
                        if fm:
                            text = unescape(fm.group(1))
                            f.write(b"F" + head + struct.pack("<dI", float(v.group(1)) if v else 0.0, len(text))
                                    + text + b"\0")
                        elif t in (b"s", b"inlineStr"):
                            text = sst[int(v.group(1))] if t == b"s" else unescape(b"".join(TEXT.findall(body)))
                            f.write(b"T" + head + struct.pack("<I", len(text)) + text + b"\0")
                        elif v:
                            f.write(b"N" + head + struct.pack("<d", float(v.group(1))))
                        else:
                            f.write(b"B" + head)
                        n += 1
                    tail = data[cut:]
                    if not chunk:
                        break
    return n


def median(v):
    v = sorted(v)
    return v[len(v) // 2] if len(v) % 2 else (v[len(v) // 2 - 1] + v[len(v) // 2]) / 2


def pick(ms):
    """The measurement of median CPU time among (wall, cpu, rss) rounds (the lower middle one of
    an even count), so that its wall time and memory are the same command's."""
    return sorted(ms, key=lambda m: m[1])[(len(ms) - 1) // 2]


def generate(n, path):
    if os.path.exists(path):
        return
    sites = 1 if n <= 300000 else -(-n // 300000)  # keep each site's span within the reader's limit
    subprocess.run([sys.executable, os.path.join(HERE, "gen_campaign.py"), str(n), path, str(sites)],
                   check=True)


def main():
    sizes = [int(x) for x in os.environ.get("BENCH_SIZES", "1000 10000 100000").split()]
    if os.environ.get("BENCH_BIG") == "1" and 1000000 not in sizes:
        sizes.append(1000000)
    work = os.environ.get("BENCH_DIR") or os.path.join(os.path.dirname(BIN), "bench")
    os.makedirs(work, exist_ok=True)
    rounds = max(1, int(os.environ.get("BENCH_ROUNDS", "3")))
    rows, rounds_said = [], []
    hdr = ("runs", "check s", "json s", "xlsx s", "floor s", "xlsx/floor", "content s", "xlsx/content",
           "check MB", "json MB", "xlsx MB", "check us/run", "json us/run", "cells", "json bytes/run")
    print("times are CPU seconds (user + sys) of each command; wall seconds in brackets; the workbook,\n"
          f"its floors and their ratios are medians of {rounds} rounds")
    print(" | ".join(hdr))
    for n in sizes:
        camp = os.path.join(work, f"campaign-{n}.json")
        generate(n, camp)
        c = measure([BIN, "check", camp], work)
        j = measure([BIN, "report", camp, "-o", os.path.join(work, f"ledger-{n}.json")], work)
        xl = os.path.join(work, f"ledger-{n}.xlsx")
        x = measure([BIN, "report", camp, "-o", xl], work)
        cells = cells_in(xl)
        # the content floor: the workbook's own cells replayed by bare libxlsxwriter (up to 10^5
        # runs; at 10^6 the cell file alone would take minutes and gigabytes)
        cf = os.path.join(work, f"cells-{n}.bin") if n <= 100000 else None
        if cf:
            replayed = extract_cells(xl, cf)
            if replayed != cells:
                raise RuntimeError(f"{xl}: {replayed} cells read back, {cells} counted")
        # The workbook and its floors in rounds, one after the other within a round (the first
        # report above only makes the workbook to count and read back): a shared machine's load
        # moves all three alike within a round, and the table prints the medians of the rounds
        # (of the times, and of the per-round ratios).
        xs, fs, cs = [], [], []
        for _ in range(rounds):
            xs.append(measure([BIN, "report", camp, "-o", xl], work))
            fs.append(measure([FLOOR, os.path.join(work, f"floor-{n}.xlsx"), str(cells)], work))
            if cf:
                said = []
                r = measure([FLOOR, "--replay", cf, os.path.join(work, f"content-{n}.xlsx")], work, said)
                load = float(re.search(r"load_cpu_s ([0-9.]+)", said[0]).group(1))
                cs.append((r[0], r[1] - load, r[2]))
        if cf and n >= 100000:
            os.remove(cf)  # hundreds of MB
        x, f = pick(xs), pick(fs)
        rx = median([a[1] / b[1] if b[1] > 0 else float("nan") for a, b in zip(xs, fs)])
        if cf:
            cm = pick(cs)
            rc = median([a[1] / b[1] if b[1] > 0 else float("nan") for a, b in zip(xs, cs)])
            content = f"{cm[1]:.2f} [{cm[0]:.2f}] | {rc:.2f}"
        else:
            content = "- | -"
        rounds_said.append(f"rounds {n} | " + " ".join(f"{a[1] / b[1]:.3f}" for a, b in zip(xs, fs)) + " | "
                           + (" ".join(f"{a[1] / b[1]:.3f}" for a, b in zip(xs, cs)) if cf else "-"))
        jbytes = os.path.getsize(os.path.join(work, f"ledger-{n}.json"))
        row = (n, c, j, x, f, cells, jbytes)
        rows.append(row)
        print(f"{n} | {c[1]:.2f} [{c[0]:.2f}] | {j[1]:.2f} [{j[0]:.2f}] | {x[1]:.2f} [{x[0]:.2f}] | "
              f"{f[1]:.2f} [{f[0]:.2f}] | {rx:.2f} | {content} | "
              f"{c[2] / 1024:.0f} | {j[2] / 1024:.0f} | {x[2] / 1024:.0f} | {c[1] / n * 1e6:.1f} | "
              f"{j[1] / n * 1e6:.1f} | {cells} | {jbytes / n:.0f}", flush=True)
        for k in ("ledger", "floor", "content"):
            for ext in (".json", ".xlsx"):
                p = os.path.join(work, f"{k}-{n}{ext}")
                if os.path.exists(p) and n >= 100000:
                    os.remove(p)  # hundreds of MB each
    print(f"xlsx/floor and xlsx/content of each round [{rounds} rounds]:")
    for line in rounds_said:
        print(line)
    if len(rows) > 1:
        print("peak RSS growth per run between sizes [bytes/run]: check, json, xlsx")
        for a, b in zip(rows, rows[1:]):
            d = b[0] - a[0]
            print(f"{a[0]} -> {b[0]} | " + " | ".join(f"{(b[k][2] - a[k][2]) * 1024 / d:.0f}" for k in (1, 2, 3)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
