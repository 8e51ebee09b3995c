#!/usr/bin/python3
"""fn_length.py - no function in src/*.c passes 100 lines unless tests/fn_length_allow.txt
lists it, and the list only shrinks.

tools/fnlen.py measures each function from the line of its name to its closing brace. The
check fails when
  - a function not on the list is longer than 100 lines;
  - a listed function has grown past the length the list gives for it;
  - a listed function is 100 lines or fewer, or is gone (take its line off the list).
A listed function that got shorter but is still long passes, with a note to lower its figure.

First the scanner itself is held against constructed C texts whose lengths are counted by hand
(braces in comments, strings, character literals and macros; initializers; a signature over
several lines), and the comparison against constructed lists, so a scanner that miscounts or a
comparison that lets a long function through fails here before the real tree is looked at.
"""
import glob
import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import ROOT, Tally  # noqa: E402

sys.path.insert(0, os.path.join(ROOT, "tools"))
import fnlen  # noqa: E402

LIMIT = 100
ALLOW = os.path.join(ROOT, "tests", "fn_length_allow.txt")

# a: name on line 2, closing brace on line 11 -> 10 lines; every brace inside is in a comment,
# a string or a character literal
CASE_LITERALS = r'''/* a comment with { braces } and don't { */
static int a(int x)
{
    const char *s = "}{ \" } // {";
    char c = '}';
    char d = '\'';
    char q = '"';
    // } one more
    /* } */
    return x + s[0] + c + d + q;
}
'''

# b: name on line 7, closing brace on line 14 -> 8 lines; c: one line; the table, the struct,
# the variables and the macros are no functions, and the macros' braces do not count
CASE_SHAPES = r'''#define BLOCK(x) do { x; } while (0)
#define OPEN {
static const int tbl[] = { 1, 2 };
struct s { int a; };
static int counter = 0;
static int
b(int x,
  int y)
{
    if (x) {
        return y;
    }
    return 0;
}
#define LONG_MACRO(x) \
    { if (x) { \
        x; }
int c(void) { return 1; }
static void (*hook)(void) = 0;
enum e { E1, E2 };
'''


def read_allow(path):
    """{(file, name): length} from the allow-list; blank lines and '#' comments skipped."""
    allowed = {}
    with open(path, encoding="utf-8") as f:
        for n, line in enumerate(f, 1):
            line = line.split("#", 1)[0].strip()
            if not line:
                continue
            parts = line.split()
            if len(parts) != 3 or not parts[2].isdigit():
                raise SystemExit("%s:%d: want 'FILE NAME LENGTH', got %r" % (path, n, line))
            allowed[(parts[0], parts[1])] = int(parts[2])
    return allowed


def compare(found, allowed):
    """(failures, notes) of the measured {(file, name): length} against the allow-list."""
    fails, notes = [], []
    for key, length in sorted(found.items()):
        if length <= LIMIT:
            continue
        if key not in allowed:
            fails.append("%s %s is %d lines (over %d) and not on the allow-list: split it"
                         % (key[0], key[1], length, LIMIT))
        elif length > allowed[key]:
            fails.append("%s %s grew to %d lines (the allow-list says %d): the list only "
                         "shrinks" % (key[0], key[1], length, allowed[key]))
        elif length < allowed[key]:
            notes.append("%s %s is down to %d lines: lower its figure in the allow-list to %d"
                         % (key[0], key[1], length, length))
    for key, was in sorted(allowed.items()):
        if key not in found:
            fails.append("%s %s is on the allow-list (%d lines) but no longer found: take its "
                         "line off" % (key[0], key[1], was))
        elif found[key] <= LIMIT:
            fails.append("%s %s is %d lines now: take its line off the allow-list"
                         % (key[0], key[1], found[key]))
    return fails, notes


def self_test(t):
    """The scanner on the constructed texts, the comparison on constructed lists."""
    got = fnlen.functions(CASE_LITERALS)
    t.check(got == [("a", 2, 10)], "literals case: want [('a', 2, 10)], got %r" % (got,))
    got = fnlen.functions(CASE_SHAPES)
    t.check(got == [("b", 7, 8), ("c", 18, 1)],
            "shapes case: want [('b', 7, 8), ('c', 18, 1)], got %r" % (got,))
    # a 101-line function: name line, brace, 98 statements, closing brace
    long_fn = "int f(void)\n{\n" + "    ;\n" * 98 + "}\n"
    got = fnlen.functions(long_fn)
    t.check(got == [("f", 1, 101)], "101-line case: got %r" % (got,))
    k = ("src/x.c", "f")
    cases = [  # (found, allowed, failures expected, notes expected, what)
        ({k: 101}, {}, 1, 0, "a long function off the list"),
        ({k: 100}, {}, 0, 0, "a 100-line function off the list"),
        ({k: 101}, {k: 101}, 0, 0, "a listed function at its figure"),
        ({k: 102}, {k: 101}, 1, 0, "a listed function that grew"),
        ({k: 101}, {k: 120}, 0, 1, "a listed function that shrank but is still long"),
        ({k: 100}, {k: 120}, 1, 0, "a listed function that became short"),
        ({}, {k: 120}, 1, 0, "a listed function that is gone"),
    ]
    for found, allowed, nf, nn, what in cases:
        fails, notes = compare(found, allowed)
        t.check(len(fails) == nf and len(notes) == nn,
                "compare, %s: want %d failure(s) and %d note(s), got %r %r"
                % (what, nf, nn, fails, notes))


def main():
    t = Tally()
    self_test(t)
    found = {}
    files = sorted(glob.glob(os.path.join(ROOT, "src", "*.c")))
    t.check(len(files) > 0, "no src/*.c under %s" % ROOT)
    for path in files:
        rel = os.path.relpath(path, ROOT)
        with open(path, encoding="utf-8", errors="replace") as f:
            for name, _line, length in fnlen.functions(f.read()):
                found[(rel, name)] = length
    allowed = read_allow(ALLOW)
    fails, notes = compare(found, allowed)
    for what in fails:
        t.check(False, what)
    for what in notes:
        print("note:", what)
    for what in t.fails:
        print("FAIL", what)
    over = sum(1 for v in found.values() if v > LIMIT)
    print("fn_length: %d functions in %d files, %d over %d lines (%d allowed), %d failures"
          % (len(found), len(files), over, LIMIT, len(allowed), len(t.fails)))
    return 1 if t.fails else 0


if __name__ == "__main__":
    sys.exit(main())
