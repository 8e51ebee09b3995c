#!/usr/bin/python3
"""cli_files.py - the command line around the files it reads and writes (issues 8 and 16).

  - an output that is the campaign or the --catalog file (same name, symlink, hard link), or two
    outputs naming one file: exit 2, nothing written, the input byte-identical (8.4, 16.13);
  - report prints what check prints, then one "wrote" line per output (8.8, as README and --help say);
  - a write error on standard output or error is exit 1 with a message (16.9);
  - /dev/zero, a folder or an endless FIFO as the campaign or --catalog: exit 2 with the limit
    or the reason, without reading to the end (16.11, 16.13);
  - a catalog error names the catalog file with the catalog's line:column (16.12).
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import os
import re
import subprocess
import sys
import tempfile
import threading

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

SMALL = os.path.join(ROOT, 'campaigns', 'small-scrubber-stress.json')
T = Tally()


def run(args, **kw):
    return subprocess.run(WRAP + [BIN] + args, capture_output=True, timeout=600, **kw)


def text(b):
    return b.decode('utf-8', 'replace')


def snapshot(d):
    """Name -> bytes of every file in d (symlinks as their target text)."""
    out = {}
    for n in sorted(os.listdir(d)):
        p = os.path.join(d, n)
        if os.path.islink(p):
            out[n] = 'link:' + os.readlink(p)
        elif os.path.isfile(p):
            with open(p, 'rb') as f:
                out[n] = f.read()
    return out


def refused(tag, d, args, pattern):
    """Exit 2, a message matching pattern, and the folder exactly as before."""
    before = snapshot(d)
    p = run(args, cwd=d)
    err = text(p.stderr)
    T.check(p.returncode == 2, '%s: exit %d, expected 2 (%s)' % (tag, p.returncode, err.strip()))
    T.check(re.search(pattern, err) is not None, '%s: message %r does not match %r' % (tag, err, pattern))
    T.check(snapshot(d) == before, '%s: the folder changed' % tag)


def same_file_cases(d):
    camp = 'C.json'
    with open(SMALL, 'rb') as f, open(os.path.join(d, camp), 'wb') as g:
        g.write(f.read())
    os.symlink(camp, os.path.join(d, 'via-link.json'))
    os.link(os.path.join(d, camp), os.path.join(d, 'hard.json'))
    os.mkdir(os.path.join(d, 'sub'))
    with open(os.path.join(ROOT, 'templates', 'containers.json'), 'rb') as f, \
            open(os.path.join(d, 'cat.json'), 'wb') as g:
        g.write(f.read())
    refused('output is the campaign', d, ['report', camp, '-o', camp], r"output 'C\.json' is the campaign file")
    refused('output is the campaign by another path', d, ['report', camp, '-o', 'sub/../C.json'],
            'is the campaign file')
    refused('output is a symlink to the campaign', d, ['report', camp, '-o', 'via-link.json'],
            'is the campaign file')
    refused('output is a hard link of the campaign', d, ['report', camp, '-o', 'hard.json'],
            'is the campaign file')
    refused('campaign given through the symlink', d, ['report', 'via-link.json', '-o', camp],
            'is the campaign file')
    refused('output is the catalog', d, ['report', camp, '--catalog', 'cat.json', '-o', 'x.xlsx',
                                         '-o', 'cat.json'], r"'cat\.json' is the --catalog file")
    refused('two outputs, one new file', d, ['report', camp, '-o', 'new.json', '-o', './new.json'],
            r"outputs 'new\.json' and '\./new\.json' are the same file")
    refused('two outputs, same name', d, ['report', camp, '-o', 'a.xlsx', '-o', 'a.xlsx'],
            'are the same file')
    with open(os.path.join(d, 'old.json'), 'w') as f:
        f.write('{"previous": 1}\n')
    os.symlink('old.json', os.path.join(d, 'old-link.json'))
    refused('two outputs, one existing file through a symlink', d,
            ['report', camp, '-o', 'old.json', '-o', 'old-link.json'], 'are the same file')
    # the check must not refuse distinct files that merely look alike
    p = run(['report', camp, '-o', 'a.json', '-o', 'sub/a.json', '-o', 'a.xlsx'], cwd=d)
    T.check(p.returncode == 0 and os.path.getsize(os.path.join(d, 'sub', 'a.json')) > 0,
            'distinct outputs a.json, sub/a.json, a.xlsx: exit %d %s' % (p.returncode, text(p.stderr)))


def summary_cases(d):
    chk = run(['check', SMALL])
    rep = run(['report', SMALL, '-o', os.path.join(d, 's.json'), '-o', os.path.join(d, 's.xlsx')])
    T.check(chk.returncode == 0 and rep.returncode == 0, 'check/report exit %d/%d' % (chk.returncode, rep.returncode))
    lines = text(rep.stdout).splitlines()
    wrote = [l for l in lines if l.startswith('wrote ')]
    T.check(wrote == ['wrote ' + os.path.join(d, 's.json'), 'wrote ' + os.path.join(d, 's.xlsx')],
            'report: wrote lines %r' % wrote)
    rest = '\n'.join(l for l in lines if not l.startswith('wrote '))
    T.check(len(text(chk.stdout)) > 200 and rest == text(chk.stdout).rstrip('\n'),
            'report does not print what check prints:\n--- check\n%s\n--- report\n%s' % (text(chk.stdout), rest))
    T.check(text(chk.stderr) == text(rep.stderr), 'check and report warn differently')
    hlp = text(run(['--help']).stdout)
    T.check('prints the same summary as check' in hlp, '--help does not say what report prints')
    with open(os.path.join(ROOT, 'README.md')) as f:
        T.check('prints the same summary as `check`' in f.read(), 'README does not say what report prints')


def full_device_cases(d):
    if not os.path.exists('/dev/full'):
        print('SKIPPED /dev/full cases: no /dev/full')
        return 1
    for tag, args in (('check', ['check', SMALL]), ('--help', ['--help']), ('--version', ['--version']),
                      ('report', ['report', SMALL, '-o', os.path.join(d, 'full.json')])):
        with open('/dev/full', 'wb') as full:
            p = subprocess.run(WRAP + [BIN] + args, stdout=full, stderr=subprocess.PIPE, timeout=600)
        err = text(p.stderr)
        T.check(p.returncode == 1, '%s > /dev/full: exit %d, expected 1' % (tag, p.returncode))
        T.check('haloledger: cannot write standard output: No space left on device' in err,
                '%s > /dev/full: message %r' % (tag, err))
    # warnings that cannot be shown: stderr full
    with open('/dev/full', 'wb') as full:
        p = subprocess.run(WRAP + [BIN, 'check', SMALL], stdout=subprocess.DEVNULL, stderr=full, timeout=600)
    T.check(p.returncode == 1, 'check 2> /dev/full (the campaign warns): exit %d, expected 1' % p.returncode)
    return 0


def feed_forever(fifo, stop):
    """Writer end of a FIFO: blanks until the reader closes it."""
    try:
        with open(fifo, 'wb') as f:
            chunk = b' ' * 65536
            while not stop.is_set():
                f.write(chunk)
    except (BrokenPipeError, OSError):
        pass


def endless_cases(d):
    camp = os.path.join(d, 'C.json')
    cases = [('campaign /dev/zero', ['check', '/dev/zero'], r'^haloledger: /dev/zero: larger than the limit of 1073741824 bytes$'),
             ('--catalog /dev/zero', ['check', camp, '--catalog', '/dev/zero'],
              r'^haloledger: /dev/zero: larger than the limit of 16777216 bytes$'),
             ('campaign is a folder', ['check', d], r'^haloledger: %s: is a folder, not a file$' % re.escape(d)),
             ('--catalog is a folder', ['check', camp, '--catalog', d], 'is a folder, not a file')]
    for tag, args, pat in cases:
        p = run(args)
        err = text(p.stderr).strip()
        T.check(p.returncode == 2, '%s: exit %d, expected 2 (%s)' % (tag, p.returncode, err))
        T.check(re.search(pat, err) is not None, '%s: message %r' % (tag, err))
    for tag, args, pat in (('campaign FIFO', ['check', None], 'larger than the limit of 1073741824 bytes'),
                           ('--catalog FIFO', ['check', camp, '--catalog', None], 'larger than the limit of 16777216 bytes')):
        fifo = os.path.join(d, 'endless')
        os.mkfifo(fifo)
        stop = threading.Event()
        th = threading.Thread(target=feed_forever, args=(fifo, stop))
        th.start()
        p = run([a if a is not None else fifo for a in args])
        stop.set()
        th.join(60)
        os.unlink(fifo)
        err = text(p.stderr).strip()
        T.check(p.returncode == 2 and pat in err, '%s: exit %d, %r' % (tag, p.returncode, err))


def catalog_error_case(d):
    cat = os.path.join(d, 'bad-cat.json')
    with open(cat, 'w') as f:
        f.write('{"format": "haloledger-catalog/1",\n "containers": [{"reagent": "Cl2", "name": "x", "net_kg": -5}]}\n')
    p = run(['check', SMALL, '--catalog', cat])
    err = text(p.stderr)
    # line 2, column 59 is where -5 stands in the text written above
    T.check(p.returncode == 2 and err.startswith('haloledger: %s:2:59: catalog.containers[0].net_kg: ' % cat),
            'catalog error: exit %d, %r' % (p.returncode, err))


def main():
    skipped = 0
    with tempfile.TemporaryDirectory(prefix='hl-cli-') as d:
        same_file_cases(d)
    with tempfile.TemporaryDirectory(prefix='hl-cli-') as d:
        summary_cases(d)
        skipped += full_device_cases(d)
    with tempfile.TemporaryDirectory(prefix='hl-cli-') as d:
        with open(SMALL, 'rb') as f, open(os.path.join(d, 'C.json'), 'wb') as g:
            g.write(f.read())
        endless_cases(d)
        catalog_error_case(d)
    for f in T.fails:
        print('FAIL ' + f)
    print('cli_files: %s: %d checks, %d failed, %d SKIPPED'
          % ('ok' if not T.fails else 'FAILED', T.n, len(T.fails), skipped))
    return 1 if T.fails else 77 if skipped else 0  # tests/run.sh: 77 = skipped


if __name__ == '__main__':
    sys.exit(main())
