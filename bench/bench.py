#!/usr/bin/python3
"""bench.py - `make bench`: time and memory of check, the JSON report and the workbook report on
generated campaigns of 10^3, 10^4, 10^5 runs (10^6 with BENCH_BIG=1), against the floor of a bare
libxlsxwriter program writing as many numeric cells (bench/floor.c). See bench/README.md.

Env: BUILD (build folder, default build; HALOLEDGER names the binary instead), BENCH_BIG=1 (add 10^6), BENCH_SIZES="1000 10000" (override),
BENCH_DIR (work folder, default $BUILD/bench). Prints one table; exits non-zero only when a command
fails (it is not a test of speed).
"""
import os
import resource
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


def measure(argv, cwd):
    """Run argv; return (wall s, cpu s = user + sys, peak RSS in KB) from the child's rusage."""
    # stderr goes to a file, not a pipe: wait4 before reading a pipe deadlocks once the
    # warnings fill the pipe buffer (64 KiB on Linux)
    with tempfile.TemporaryFile() as errf:
        t0 = time.monotonic()
        p = subprocess.Popen(argv, cwd=cwd, stdout=subprocess.DEVNULL, stderr=errf)
        _, status, ru = os.wait4(p.pid, 0)
        wall = time.monotonic() - t0
        errf.seek(0)
        err = errf.read().decode(errors="replace")
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
    rows = []
    hdr = ("runs", "check s", "json s", "xlsx s", "floor s", "xlsx/floor", "check MB", "json MB",
           "xlsx MB", "check us/run", "json us/run", "cells", "json bytes/run")
    print("times are CPU seconds (user + sys) of each command; wall seconds in brackets")
    print(" | ".join(hdr))
    for n in sizes:
        camp = os.path.join(work, f"campaign-{n}.json")
        generate(n, camp)
        c = measure([BIN, "check", camp], work)
        j = measure([BIN, "report", camp, "-o", os.path.join(work, f"ledger-{n}.json")], work)
        xl = os.path.join(work, f"ledger-{n}.xlsx")
        x = measure([BIN, "report", camp, "-o", xl], work)
        cells = cells_in(xl)
        f = measure([FLOOR, os.path.join(work, f"floor-{n}.xlsx"), str(cells)], work)
        jbytes = os.path.getsize(os.path.join(work, f"ledger-{n}.json"))
        row = (n, c, j, x, f, cells, jbytes)
        rows.append(row)
        print(f"{n} | {c[1]:.2f} [{c[0]:.2f}] | {j[1]:.2f} [{j[0]:.2f}] | {x[1]:.2f} [{x[0]:.2f}] | "
              f"{f[1]:.2f} [{f[0]:.2f}] | {x[1] / f[1] if f[1] > 0 else float('nan'):.2f} | "
              f"{c[2] / 1024:.0f} | {j[2] / 1024:.0f} | {x[2] / 1024:.0f} | {c[1] / n * 1e6:.1f} | "
              f"{j[1] / n * 1e6:.1f} | {cells} | {jbytes / n:.0f}", flush=True)
        for k in ("ledger", "floor"):
            for ext in (".json", ".xlsx"):
                p = os.path.join(work, f"{k}-{n}{ext}")
                if os.path.exists(p) and n >= 100000:
                    os.remove(p)  # hundreds of MB each
    if len(rows) > 1:
        print("peak RSS growth per run between sizes [bytes/run]: check, json, xlsx")
        for a, b in zip(rows, rows[1:]):
            d = b[0] - a[0]
            print(f"{a[0]} -> {b[0]} | " + " | ".join(f"{(b[k][2] - a[k][2]) * 1024 / d:.0f}" for k in (1, 2, 3)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
