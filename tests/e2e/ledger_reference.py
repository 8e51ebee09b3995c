#!/usr/bin/python3
"""ledger_reference.py - the JSON ledger is byte-identical to reference ledgers written by the
writer it replaced (the cJSON-tree writer of commit 3a965eb, files in tests/data/ledger-ref).

Each reference campaign is reported with --all-products (the old writer listed every product)
and compared byte for byte after dropping the one line the new ledger adds on purpose: the
reporting threshold's assumption row. The references hold numbers printed by cJSON 1.7.15
(Debian's libcjson) and its string escapes, so this checks the streamed writer's number and
text formatting against the library, as well as every key, its order and its value.
When a change to the ledger is intended (a key added, a model corrected), regenerate the
references with the binary before and after and say so in the commit.
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import os
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, REF, ROOT, SOURCES, WRAP, Tally  # noqa: E402

T = Tally()


def main():
    t0 = time.time()
    with tempfile.TemporaryDirectory() as tmp:
        for name, folder in sorted(SOURCES.items()):
            camp = os.path.join(ROOT, folder, name + ".json")
            out = os.path.join(tmp, name + ".json")
            p = subprocess.run(WRAP + [BIN, "report", name + ".json", "-o", out, "--all-products"],
                               cwd=os.path.dirname(camp), capture_output=True, timeout=300)
            if not T.check(p.returncode == 0, f"{name}: exit {p.returncode}"):
                continue
            with open(out, "rb") as f:
                lines = f.read().split(b"\n")
            added = [ln for ln in lines if ln.startswith(b'  {"what":"Reporting threshold')]
            T.check(len(added) == 1, f"{name}: {len(added)} threshold rows")
            new = b"\n".join(ln for ln in lines if ln not in added)
            with open(os.path.join(REF, name + ".json"), "rb") as f:
                ref = f.read()
            if not T.check(new == ref, f"{name}: differs from the reference"):
                a, b = new.split(b"\n"), ref.split(b"\n")
                for k, (x, y) in enumerate(zip(a, b)):
                    if x != y:
                        i = next(j for j in range(min(len(x), len(y)) + 1) if x[j:j + 1] != y[j:j + 1])
                        print(f"{name} line {k + 1} byte {i + 1}:\n  new {x[max(0, i - 60):i + 60]!r}\n"
                              f"  ref {y[max(0, i - 60):i + 60]!r}")
                        break
                else:
                    print(f"{name}: {len(a)} lines, reference {len(b)}")
    for f in T.fails:
        print("FAIL:", f)
    print(f"ledger_reference: {T.n - len(T.fails)}/{T.n} checks passed in {time.time() - t0:.1f} s")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
