"""mutations_apply.py - every seeded error of tests/mutations.txt still applies (fast; `make mutate`
is the slow run that builds and tests each one). An entry applies when its file exists, its find:
text occurs exactly once there (else STALE or AMBIGUOUS), it has file/find/repl/what, its repl:
differs from its find:, and each try: name is a test. Sources move under refactoring; this keeps
the list from drifting between runs of `make mutate`.

The reader (tools/mutlist.py) is first held against small lists written out below with the
problems each must report, so a reader that lets a stale entry through fails here too."""
import os
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import ROOT, Tally  # noqa: E402

sys.path.insert(0, os.path.join(ROOT, "tools"))
import mutlist  # noqa: E402

t = Tally()

# ---- the reader against hand-written lists ----
with tempfile.TemporaryDirectory() as tmp:
    for d in ("src", "tests/unit", "tests/e2e"):
        os.makedirs(os.path.join(tmp, d))
    with open(os.path.join(tmp, "src", "a.c"), "w") as f:
        f.write("int x = 1;\nint y = 2;\nint y = 2;\n")
    open(os.path.join(tmp, "tests", "unit", "test_a.c"), "w").close()
    open(os.path.join(tmp, "tests", "e2e", "a_hand.py"), "w").close()

    def listed(text):
        p = os.path.join(tmp, "list.txt")
        with open(p, "w") as f:
            f.write(text)
        return p

    good = ("# comment\n\nfile: src/a.c\nfind: int x = 1;\nrepl: int x = 2;\nwhat: off by one\n"
            "try: test_a a_hand.py\n")
    recs = mutlist.parse(listed(good))
    t.check(len(recs) == 1 and recs[0]["id"] == "M01" and recs[0]["line"] == 3,
            "one entry, M01, from line 3: %r" % recs)
    t.check(mutlist.problems(recs, tmp) == [], "a good entry has no problems: %r"
            % mutlist.problems(recs, tmp))

    # (list text, the word each reported problem must contain)
    cases = [
        ("file: src/a.c\nfind: int z = 3;\nrepl: int z = 4;\nwhat: w\n", "STALE"),
        ("file: src/a.c\nfind: int y = 2;\nrepl: int y = 3;\nwhat: w\n", "AMBIGUOUS"),
        ("file: src/b.c\nfind: int x = 1;\nrepl: int x = 2;\nwhat: w\n", "no such file"),
        ("file: src/a.c\nfind: int x = 1;\nrepl: int x = 1;\nwhat: w\n", "equals find"),
        ("file: src/a.c\nfind: int x = 1;\nrepl: int x = 2;\nwhat: w\ntry: test_b\n", "names no test"),
    ]
    for text, word in cases:
        got = mutlist.problems(mutlist.parse(listed(text)), tmp)
        t.check(len(got) == 1 and word in got[0], "%s expected, got %r" % (word, got))

    for text, word in [("file: src/a.c\nfind: int x = 1;\nrepl: x\n", "lacks what"),
                       ("file: src/a.c\nfile: src/a.c\n", "given twice"),
                       ("file: src/a.c\nfnid: int x = 1;\n", "expected")]:
        try:
            mutlist.parse(listed(text))
            t.check(False, "malformed list accepted (%s expected)" % word)
        except mutlist.ListError as e:
            t.check(word in str(e), "%s expected, got %s" % (word, e))

# ---- the real list ----
path = os.path.join(ROOT, "tests", "mutations.txt")
try:
    recs = mutlist.parse(path)
except mutlist.ListError as e:
    recs = []
    t.check(False, str(e))
bad = mutlist.problems(recs, ROOT)
for b in bad:
    t.check(False, b)
# issue 9 asks for at least 40 seeded errors
t.check(len(recs) >= 40, "only %d entries in tests/mutations.txt (40 wanted)" % len(recs))

for f in t.fails:
    print("FAIL: " + f)
print("mutations_apply: %d entries, %d checks, %d failed" % (len(recs), t.n, len(t.fails)))
sys.exit(1 if t.fails else 0)
