#!/usr/bin/python3
"""memlimit.py - a report under an address-space limit fails cleanly, never by a signal (issue 16.7).

libxlsxwriter does not check every allocation: under `ulimit -v` of some 14 to 28 MB a workbook
report of a 600-run campaign used to die of a segmentation fault inside it, leaving its staged
file.  Here a report of that campaign is run (bash `ulimit -v` in a subshell) for every limit from
the smallest at which the binary starts at all (found by running --version, so the range follows
the binary and its libraries) upwards in 2 MiB steps, for a workbook and a JSON ledger, until both
succeed at three limits in a row.  At each limit: exit 0 (output written) or exit 1 with only
"haloledger: " lines on stderr, never a signal; the previous output intact on failure; no file of
ours left.  The walk must see at least one exit 1 (else it tested nothing) and end in success.
Skipped, and said so, under ASan (its shadow memory cannot live under an address-space limit)
and under HL_WRAP (valgrind's own memory).
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

SMALL = os.path.join(ROOT, 'campaigns', 'small-scrubber-stress.json')
OURS = re.compile(r'^\..*\.tmp-\d+-\d+$')
OLD = {'.json': b'{"previous": "ledger"}\n', '.xlsx': b'PK\x03\x04 previous workbook bytes\n'}
STEP_KB = 2048
T = Tally()


def limited(kb, args, **kw):
    return subprocess.run(['bash', '-c', 'ulimit -v %d; exec "$0" "$@"' % kb, BIN] + args,
                          capture_output=True, timeout=600, **kw)


def is_asan(path):
    with open(path, 'rb') as f:
        return b'__asan_init' in f.read()


def main():
    if WRAP or is_asan(BIN):
        print('memlimit: SKIPPED (%s: an address-space limit cannot hold the checker)'
              % ('HL_WRAP' if WRAP else 'ASan build'))
        return 77  # tests/run.sh: skipped, not passed
    floor = None
    for kb in range(STEP_KB, 256 * 1024, STEP_KB):
        if limited(kb, ['--version']).returncode == 0:
            floor = kb
            break
    if not T.check(floor is not None, 'the binary does not start under any limit up to 256 MiB'):
        print('FAIL ' + T.fails[0])
        return 1
    with tempfile.TemporaryDirectory(prefix='hl-mem-') as d:
        doc = json.load(open(SMALL))
        for r in doc['runs']:
            r['repeat'] = {'count': 300, 'every_days': 0.25}
        camp = os.path.join(d, 'c600.json')
        with open(camp, 'w') as f:
            json.dump(doc, f)
        outs = {}
        for ext in OLD:
            sub = os.path.join(d, ext[1:])
            os.mkdir(sub)
            outs[ext] = os.path.join(sub, 'out' + ext)
        failures, passes_in_row, kb, tried = 0, 0, floor, 0
        signals = []
        while passes_in_row < 3 and kb < 512 * 1024:
            all_ok = True
            for ext, target in outs.items():
                with open(target, 'wb') as f:
                    f.write(OLD[ext])
                p = limited(kb, ['report', camp, '-o', target])
                tried += 1
                err = p.stderr.decode('utf-8', 'replace')
                tag = 'ulimit -v %d (%s)' % (kb, ext)
                left = [n for n in os.listdir(os.path.dirname(target)) if OURS.match(n)]
                T.check(not left, '%s: left behind %s' % (tag, left))
                if p.returncode < 0:
                    signals.append(tag)
                T.check(p.returncode in (0, 1), '%s: exit %d (%s)' % (tag, p.returncode, err.strip()[-300:]))
                if p.returncode == 1:
                    failures += 1
                    all_ok = False
                    T.check(err.strip() and all(l.startswith('haloledger: ') for l in err.splitlines()),
                            '%s: stderr not in our format: %r' % (tag, err[-400:]))
                    T.check(open(target, 'rb').read() == OLD[ext], '%s: previous output changed' % tag)
                elif p.returncode == 0:
                    T.check(open(target, 'rb').read() != OLD[ext], '%s: exit 0 but nothing written' % tag)
                else:
                    all_ok = False
            passes_in_row = passes_in_row + 1 if all_ok else 0
            kb += STEP_KB
        T.check(failures > 0, 'no limit made the report fail: the walk tested nothing')
        T.check(passes_in_row == 3, 'the report never succeeded up to %d KiB' % kb)
    for f in T.fails:
        print('FAIL ' + f)
    print('memlimit: %s: limits %d..%d KiB, %d reports, %d failed cleanly (exit 1), %d signal deaths, %d problems'
          % ('ok' if not T.fails else 'FAILED', floor, kb - STEP_KB, tried, failures, len(signals), len(T.fails)))
    return 1 if T.fails else 0


if __name__ == '__main__':
    sys.exit(main())
