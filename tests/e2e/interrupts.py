#!/usr/bin/python3
"""interrupts.py - interrupted and limited reports leave no temporary file (issue 16.10, 16.13).

  - SIGINT, SIGTERM, SIGHUP sent while a large report is writing (the moment its staged file
    exists in the target folder, for a workbook and a JSON ledger): the process ends by that
    signal, the previous output is byte-identical and no file of ours is left;
  - `ulimit -f` far below the output size: exit 1 with a "File too large" message, not death by
    SIGXFSZ, previous output intact, nothing left;
  - a stale temporary of our naming whose process is gone is removed by the next report (and said
    so); one whose process is alive, and a look-alike of another user's naming, stay;
  - output names of 221 to 255 bytes are written (the staged name must still fit NAME_MAX), a
    256-byte name fails with our message, and no raw library "[ERROR]" line reaches stderr.
Env: HALOLEDGER, HL_ROOT, HL_WRAP.
"""
import json
import os
import re
import resource
import signal
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, ROOT, WRAP, Tally  # noqa: E402

SMALL = os.path.join(ROOT, 'campaigns', 'small-scrubber-stress.json')
OURS = re.compile(r'^\..*\.tmp-\d+-\d+$')  # afile.c: ".NAME.hl.tmp-PID-N" (and older ".NAME.tmp-PID-N")
OLD = {'.json': b'{"previous": "ledger"}\n', '.xlsx': b'PK\x03\x04 previous workbook bytes\n'}
T = Tally()


def text(b):
    return b.decode('utf-8', 'replace')


def big_campaign(d, count):
    doc = json.load(open(SMALL))
    for r in doc['runs']:
        r['repeat'] = {'count': count, 'every_days': 0.25}
    path = os.path.join(d, 'big-%d.json' % count)
    with open(path, 'w') as f:
        json.dump(doc, f)
    return path


def staged_in(d):
    return [n for n in os.listdir(d) if OURS.match(n)]


def interrupt(camp, d, ext, sig):
    """Start a report, send sig once its staged file exists; returns None if it finished first."""
    d = tempfile.mkdtemp(dir=d)  # a folder of its own: only the old output in it
    target = os.path.join(d, 'out' + ext)
    with open(target, 'wb') as f:
        f.write(OLD[ext])
    # stderr to a file: a pipe nobody reads while polling blocks the child once its warnings
    # fill the pipe buffer (64 KiB)
    errf = tempfile.TemporaryFile()
    p = subprocess.Popen(WRAP + [BIN, 'report', camp, '-o', target], stdout=subprocess.DEVNULL,
                         stderr=errf)
    seen = False
    while p.poll() is None:
        if staged_in(d):
            seen = True
            p.send_signal(sig)
            break
        time.sleep(0.001)  # polling for an event, not a timed expectation
    p.wait(timeout=600)
    errf.seek(0)
    err = errf.read()
    errf.close()
    if not seen:
        return None
    return p.returncode, text(err), open(target, 'rb').read(), staged_in(d), sorted(os.listdir(d))


def signal_cases(d, camp):
    for ext in ('.xlsx', '.json'):
        for sig in (signal.SIGINT, signal.SIGTERM, signal.SIGHUP):
            tag = '%s during a %s report' % (sig.name, ext)
            res = None
            for _ in range(3):  # the report can finish before the signal lands: try again
                res = interrupt(camp, d, ext, sig)
                if res and res[0] == -sig:
                    break
            if not T.check(res is not None, '%s: the staged file was never seen' % tag):
                continue
            rc, err, now, left, names = res
            T.check(rc == -sig, '%s: ended with %d, expected death by the signal (%s)' % (tag, rc, err.strip()))
            T.check(now == OLD[ext], '%s: the previous output changed' % tag)
            T.check(not left and names == ['out' + ext],
                    '%s: left behind %s' % (tag, names))
            print('ok   %s' % tag if rc == -sig and not left else 'FAIL %s' % tag)


def small_files():
    resource.setrlimit(resource.RLIMIT_FSIZE, (16384, 16384))  # SIGXFSZ left at its default


def fsize_cases(d, camp):
    for ext in ('.xlsx', '.json'):
        target = os.path.join(d, 'limited' + ext)
        with open(target, 'wb') as f:
            f.write(OLD[ext])
        p = subprocess.run(WRAP + [BIN, 'report', camp, '-o', target], capture_output=True,
                           preexec_fn=small_files, timeout=600)
        err = text(p.stderr)
        tag = 'ulimit -f 16 (%s)' % ext
        T.check(p.returncode == 1, '%s: exit %d, expected 1 (%s)' % (tag, p.returncode, err.strip()))
        T.check(re.search(r'^haloledger: cannot write %s: .*File too large' % re.escape(target), err, re.M),
                '%s: message %r' % (tag, err))
        T.check(not [l for l in err.splitlines() if not l.startswith('haloledger: ')],
                '%s: a line outside our format: %r' % (tag, err))
        T.check(open(target, 'rb').read() == OLD[ext], '%s: previous output changed' % tag)
        T.check(not staged_in(d), '%s: left behind %s' % (tag, staged_in(d)))


def dead_pid():
    p = subprocess.Popen(['true'])
    p.wait()
    return p.pid  # reaped: no process has this id until the kernel reuses it


def stale_cases(d):
    dead = dead_pid()
    stale = ['.out.json.hl.tmp-%d-0' % dead, '.out.xlsx.tmp-%d-3' % dead]  # ours, and an older version's
    keep = ['.out.json.hl.tmp-%d-0' % os.getpid(),   # a live process: may be another run writing
            '.out.json.hl.tmp-%d-0.bak' % dead,       # not our pattern
            'out.json.hl.tmp-%d-0' % dead]            # not hidden: not ours
    for n in stale + keep:
        with open(os.path.join(d, n), 'w') as f:
            f.write('partial')
    p = subprocess.run(WRAP + [BIN, 'report', SMALL, '-o', os.path.join(d, 'out.json')], capture_output=True, timeout=600)
    names = set(os.listdir(d))
    T.check(p.returncode == 0, 'stale sweep: exit %d %s' % (p.returncode, text(p.stderr)))
    T.check(not (set(stale) & names), 'stale sweep: still there: %s' % sorted(set(stale) & names))
    T.check(set(keep) <= names, 'stale sweep: removed what is not stale: %s' % sorted(set(keep) - names))
    T.check('haloledger: note: removed 2 temporary files of an interrupted earlier run' in text(p.stderr),
            'stale sweep: no note %r' % text(p.stderr))
    for n in keep:
        os.unlink(os.path.join(d, n))


def long_name_cases(d):
    for n in (221, 230, 240, 250, 255):
        for ext in ('.json', '.xlsx'):
            name = 'n' * (n - len(ext)) + ext
            p = subprocess.run(WRAP + [BIN, 'report', SMALL, '-o', os.path.join(d, name)], capture_output=True, timeout=600)
            err = text(p.stderr)
            ok = T.check(p.returncode == 0 and os.path.getsize(os.path.join(d, name)) > 0,
                         '%d-byte output name: exit %d %s' % (n, p.returncode, err.strip()[-300:]))
            T.check('[ERROR]' not in err, '%d-byte name: raw library line %r' % (n, err))
            T.check(not staged_in(d), '%d-byte name: left behind %s' % (n, staged_in(d)))
            if ok:
                os.unlink(os.path.join(d, name))
    for ext in ('.json', '.xlsx'):
        name = 'n' * (256 - len(ext)) + ext
        p = subprocess.run(WRAP + [BIN, 'report', SMALL, '-o', os.path.join(d, name)], capture_output=True, timeout=600)
        err = text(p.stderr)
        T.check(p.returncode == 1 and re.search(r'^haloledger: cannot write .*%s: .*File name too long$' % name, err, re.M),
                '256-byte name: exit %d %r' % (p.returncode, err[-300:]))
        T.check(not [l for l in err.splitlines() if not l.startswith('haloledger: ')],
                '256-byte name: a line outside our format: %r' % err)
        T.check(not staged_in(d), '256-byte name: left behind %s' % staged_in(d))


def main():
    with tempfile.TemporaryDirectory(prefix='hl-intr-') as d:
        camp = big_campaign(d, 1500)  # about 1.3 MB of workbook and 9 MB of JSON: writing takes a while
        signal_cases(d, camp)
    with tempfile.TemporaryDirectory(prefix='hl-intr-') as d:
        fsize_cases(d, big_campaign(d, 40))
    with tempfile.TemporaryDirectory(prefix='hl-intr-') as d:
        stale_cases(d)
    with tempfile.TemporaryDirectory(prefix='hl-intr-') as d:
        long_name_cases(d)
    for f in T.fails:
        print('FAIL ' + f)
    print('interrupts: %s: %d checks, %d failed' % ('ok' if not T.fails else 'FAILED', T.n, len(T.fails)))
    return 1 if T.fails else 0


if __name__ == '__main__':
    sys.exit(main())
