#!/usr/bin/env python3
"""fnlen.py - lengths of the C function definitions at file scope.

    python3 tools/fnlen.py [--max N] [--all] FILE...

Prints one line per function longer than N lines (default 100; --all prints every function):

    FILE:LINE: NAME LENGTH

LINE is the line of the function's name, LENGTH the lines from there to the closing brace, both
included (a signature over several lines counts; the comment above it does not).

The scan is a brace count, not a C parser. Comments, string literals and character literals are
blanked first (newlines kept), and so are preprocessor lines with their continuations, so a brace
inside any of them counts for nothing. At file scope a '{' opens a function body when the last
significant character before it is ')' and the text since the previous ';' or '}' at file scope
has no '=' (which would make it an initializer); the name is the identifier before the '(' that
matches that ')'. Both branches of an #if are scanned, so a function defined twice under #if/#else
is listed twice (the second as NAME#2).
"""
import re
import sys

IDENT = re.compile(r"[A-Za-z_][A-Za-z0-9_]*$")


def blank(text):
    """Text with comments, string and char literals and preprocessor lines turned to spaces
    (newlines kept, so positions and line numbers do not move)."""
    out = list(text)
    i, n = 0, len(text)
    line_start = True  # only blanks seen since the last newline
    while i < n:
        c = text[i]
        if c == "\n":
            line_start = True
            i += 1
            continue
        if line_start and c == "#":
            # a directive runs to the first newline not preceded by a backslash; a comment
            # inside it is blanked with it (a block comment that runs past its end is rare
            # enough in this code to ignore)
            j = i
            while j < n and not (text[j] == "\n" and text[j - 1] != "\\"):
                if text[j] != "\n":
                    out[j] = " "
                j += 1
            i = j
            continue
        if c not in " \t\r\f\v":
            line_start = False
        if text.startswith("/*", i):
            j = text.find("*/", i + 2)
            j = n if j < 0 else j + 2
            for k in range(i, j):
                if text[k] != "\n":
                    out[k] = " "
            i = j
        elif text.startswith("//", i):
            while i < n and text[i] != "\n":
                out[i] = " "
                i += 1
        elif c in "\"'":
            j = i + 1
            while j < n and text[j] != c and text[j] != "\n":
                j += 2 if text[j] == "\\" else 1
            j = min(j + 1, n)
            for k in range(i + 1, j - 1):  # keep the quotes, blank what is inside
                if text[k] != "\n":
                    out[k] = " "
            i = j
        else:
            i += 1
    return "".join(out)


def functions(text):
    """[(name, first_line, length)] of every function defined at file scope in the C text."""
    s = blank(text)
    found, seen = [], {}
    depth = 0
    stmt_start = 0  # where the current file-scope declaration began
    body = None     # (name, line of name) of the function whose body is open
    i, n = 0, len(s)
    while i < n:
        c = s[i]
        if c == "{":
            if depth == 0:
                body = head_of(s, stmt_start, i)
            depth += 1
        elif c == "}":
            depth = max(depth - 1, 0)
            if depth == 0:
                if body:
                    name, line = body
                    seen[name] = seen.get(name, 0) + 1
                    if seen[name] > 1:
                        name = "%s#%d" % (name, seen[name])
                    found.append((name, line, s.count("\n", 0, i) + 1 - line + 1))
                body = None
                stmt_start = i + 1
        elif c == ";" and depth == 0:
            stmt_start = i + 1
        i += 1
    return found


def head_of(s, start, brace):
    """(name, line) when the text s[start:brace] is a function's declarator, else None."""
    head = s[start:brace]
    j = len(head.rstrip())
    if j == 0 or head[j - 1] != ")" or "=" in head:
        return None
    # the '(' that matches the last ')'
    k, level = j - 1, 0
    while k >= 0:
        if head[k] == ")":
            level += 1
        elif head[k] == "(":
            level -= 1
            if level == 0:
                break
        k -= 1
    if k < 0:
        return None
    m = IDENT.search(head[:k].rstrip())
    if not m:
        return None
    pos = start + m.start()
    return m.group(0), s.count("\n", 0, pos) + 1


def main(argv):
    limit, show_all, files = 100, False, []
    args = iter(argv)
    for a in args:
        if a == "--max":
            limit = int(next(args))
        elif a == "--all":
            show_all = True
        else:
            files.append(a)
    if not files:
        sys.stderr.write(__doc__)
        return 2
    for path in files:
        with open(path, encoding="utf-8", errors="replace") as f:
            text = f.read()
        for name, line, length in functions(text):
            if show_all or length > limit:
                print("%s:%d: %s %d" % (path, line, name, length))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
