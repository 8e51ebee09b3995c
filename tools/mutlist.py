"""mutlist.py - the one reader of tests/mutations.txt (format described at the top of that file).

Used by tools/mutate.sh (which applies the entries) and tests/e2e/mutations_apply.py (which only
checks that every entry still applies, in `make test`, so the list cannot drift while the sources
move). As a script:
    mutlist.py check LIST [ROOT]   print one line per problem, exit 1 if any
    mutlist.py rec LIST OUT        write the parsed entries, one per line, fields split by 0x1f
"""
import os
import sys

KEYS = ("file", "find", "repl", "what", "try", "harmless")
REQUIRED = ("file", "find", "repl", "what")


class ListError(Exception):
    """A malformed list (unknown key, key given twice, entry lacking a required key)."""


def parse(path):
    """Entries of the list as dicts (key -> value, plus "line": first line of the block and
    "id": M01, M02... in list order). Raises ListError on a malformed list."""
    recs, cur = [], {}

    def flush():
        if cur:
            for k in REQUIRED:
                if k not in cur:
                    raise ListError("%s:%d: entry %r lacks %s:" % (path, cur["line"], cur.get("what", "?"), k))
            cur["id"] = "M%02d" % (len(recs) + 1)
            recs.append(dict(cur))
        cur.clear()

    with open(path, encoding="utf-8") as f:
        for lineno, line in enumerate(f, 1):
            line = line.rstrip("\n")
            if line.startswith("#"):
                continue
            if not line.strip():
                flush()
                continue
            key, sep, val = line.partition(":")
            key = key.strip()
            if not sep or key not in KEYS:
                raise ListError("%s:%d: expected 'file|find|repl|what|try|harmless: value'" % (path, lineno))
            if key in cur:
                raise ListError("%s:%d: %s given twice in one entry" % (path, lineno, key))
            cur.setdefault("line", lineno)
            cur[key] = val[1:] if val.startswith(" ") else val
    flush()
    return recs


def test_names(root):
    """Names a "try:" may use: unit binaries (test_x, from tests/unit/test_x.c) and e2e scripts
    (with or without .py/.sh)."""
    names = set()
    unit = os.path.join(root, "tests", "unit")
    for n in os.listdir(unit):
        if n.startswith("test_") and n.endswith(".c"):
            names.add(n[:-2])
    e2e = os.path.join(root, "tests", "e2e")
    for n in os.listdir(e2e):
        if n.endswith((".py", ".sh")) and not n.startswith("_"):
            names.add(n)
            names.add(n[:-3])
    return names


def problems(recs, root):
    """Every reason an entry would not apply as written: STALE (find text gone), AMBIGUOUS (found
    more than once), a missing file, a no-op replacement, an empty what:, a try: naming no test."""
    out = []
    names = test_names(root)
    for r in recs:
        where = "%s (line %d, %s)" % (r["id"], r["line"], r["file"])
        p = os.path.join(root, r["file"])
        if not r["find"]:
            out.append("%s: empty find:" % where)
            continue
        try:
            with open(p, encoding="utf-8") as f:
                n = f.read().count(r["find"])
        except OSError:
            out.append("%s: no such file" % where)
            continue
        if n == 0:
            out.append("%s: STALE: find text not in the file: %r" % (where, r["find"]))
        elif n > 1:
            out.append("%s: AMBIGUOUS: find text occurs %d times: %r" % (where, n, r["find"]))
        if r["repl"] == r["find"]:
            out.append("%s: repl: equals find: (the mutant is the original)" % where)
        if not r["what"].strip():
            out.append("%s: empty what:" % where)
        for t in r.get("try", "").split():
            if t not in names:
                out.append("%s: try: names no test: %s" % (where, t))
    return out


def main(argv):
    if len(argv) >= 3 and argv[1] == "check":
        root = argv[3] if len(argv) > 3 else "."
        try:
            recs = parse(argv[2])
        except (ListError, OSError) as e:
            print("mutlist: %s" % e)
            return 1
        bad = problems(recs, root)
        for b in bad:
            print("mutlist: " + b)
        print("mutlist: %d entries, %d problems" % (len(recs), len(bad)))
        return 1 if bad else 0
    if len(argv) == 4 and argv[1] == "rec":
        try:
            recs = parse(argv[2])
        except (ListError, OSError) as e:
            print("mutate: %s" % e, file=sys.stderr)
            return 2
        with open(argv[3], "w", encoding="utf-8") as f:
            for r in recs:
                f.write("\x1f".join([r["id"], r["file"], r["find"], r["repl"], r["what"],
                                     r.get("try", ""), r.get("harmless", "")]) + "\n")
        print("mutate: %d mutations in %s" % (len(recs), argv[2]))
        return 0
    print(__doc__, file=sys.stderr)
    return 2


if __name__ == "__main__":
    sys.exit(main(sys.argv))
