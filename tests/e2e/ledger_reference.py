#!/usr/bin/python3
"""ledger_reference.py - the JSON ledger keeps every key and value of the reference ledgers
written by the writer it replaced (the cJSON-tree writer of commit 3a965eb, files in
tests/data/ledger-ref), in the same order: the ledger keys are a public interface that may be
extended, never renamed or removed (design section 5).

Each reference campaign is reported with --all-products (the old writer listed every product).
Both files are parsed with every number kept as its printed text, so numbers must match digit for
digit (the references hold numbers printed by cJSON 1.7.15, Debian's libcjson, which checks the
streamed writer's number formatting against the library). The reference must be contained in the
new ledger: every object key of the reference is present with a contained value and the keys keep
their relative order; every array of the reference is an in-order subsequence of the new array
(rows added on purpose, such as new assumption or caution rows, are allowed; a row changed or lost
is not). Keys and rows added by later features are allowed; nothing else is.
When a change to an existing value is intended (a model corrected), regenerate the references
and say so in the commit.
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import json
import os
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, REF, ROOT, SOURCES, WRAP, Tally  # noqa: E402

T = Tally()


def parse(data):
    """JSON with objects as key/value pair lists and numbers as their printed text."""
    return json.loads(data, object_pairs_hook=lambda pairs: ("obj", pairs),
                      parse_float=lambda t: ("num", t), parse_int=lambda t: ("num", t),
                      parse_constant=lambda t: ("num", t))


def contained(ref, new, path):
    """None when ref is contained in new (see the module text), else the path where it is not."""
    if isinstance(ref, tuple) and ref[0] == "obj":
        if not (isinstance(new, tuple) and new[0] == "obj"):
            return path + " (object expected)"
        keys = [k for k, _ in new[1]]
        at = -1
        for k, v in ref[1]:
            if k not in keys:
                return f"{path}.{k} (key missing)"
            i = keys.index(k)
            if i < at:
                return f"{path}.{k} (key out of order)"
            at = i
            bad = contained(v, new[1][i][1], f"{path}.{k}")
            if bad:
                return bad
        return None
    if isinstance(ref, list):
        if not isinstance(new, list):
            return path + " (array expected)"
        j = 0
        for i, r in enumerate(ref):
            while j < len(new) and contained(r, new[j], "") is not None:
                j += 1
            if j == len(new):
                first = contained(r, new[i], f"{path}[{i}]") if i < len(new) else f"{path}[{i}] (row lost)"
                return first or f"{path}[{i}] (row out of order)"
            j += 1
        return None
    return None if ref == new else f"{path} (reference {ref!r}, now {new!r})"


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
                new = parse(f.read())
            with open(os.path.join(REF, name + ".json"), "rb") as f:
                ref = parse(f.read())
            bad = contained(ref, new, "$")
            T.check(bad is None, f"{name}: differs from the reference at {bad}")
    for f in T.fails:
        print("FAIL:", f)
    print(f"ledger_reference: {T.n - len(T.fails)}/{T.n} checks passed in {time.time() - t0:.1f} s")
    return 1 if T.fails else 0


if __name__ == "__main__":
    sys.exit(main())
