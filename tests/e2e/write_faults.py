#!/usr/bin/python3
"""write_faults.py - a write failure at any write call of either writer is reported (issue 16).

$BUILD/shim_wfail.so (tests/tools/shim_wfail.c, LD_PRELOAD) makes the Nth call that puts bytes
on a file fail with ENOSPC (write, fwrite, fputs, fputc, putc, fprintf and their _chk forms,
fflush, fseek, fsync, fclose on regular files, and rename), the Nth only.  It counts at the C
library boundary, so it holds whatever the writers become (a streamed JSON writer, a
constant-memory workbook) and counts the calls of forked writer children in the same sequence.
A clean pass counts the calls; then every N from 1 to that count is walked for a one-run
campaign and each output kind (.json, .xlsx), over the files that have a name (the staged
outputs).  libxlsxwriter's unlinked scratch files (it writes each sheet there and reads it
back into the zip) carry thousands of calls; they are walked one in SCRATCH_STRIDE, with the
failure persisting from call N on (HL_WFAIL_PERSIST: a disk that stays full).  A single failed
call into a scratch file is not walked: libxlsxwriter 1.1.4 does not check those writes (nor the
stream's error flag before reading it back), so such a failure yields a damaged workbook that
nothing above the library can see; a full disk is still caught when the zip is written.
Every failing pass must: exit 1; print only "haloledger: " lines (no raw library "[ERROR]"),
one naming the target; leave the previous output byte-identical; leave no file of ours.
Under ASan the preload needs ASAN_OPTIONS=verify_asan_link_order=0 (set here), so the walk runs
in `make sanitize` too; under HL_WRAP (valgrind) one point in VG_STRIDE is walked.
Env: HALOLEDGER, HL_ROOT, BUILD, HL_WRAP; HL_WFAIL_STRIDE overrides the scratch stride.
"""
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from _hl import BIN, BUILD, ROOT, WRAP, Tally  # noqa: E402

SHIM = os.path.join(ROOT, BUILD, 'shim_wfail.so') if not os.path.isabs(BUILD) else os.path.join(BUILD, 'shim_wfail.so')
SMALL = os.path.join(ROOT, 'campaigns', 'small-scrubber-stress.json')
OURS = re.compile(r'^\..*\.tmp-\d+-\d+$')
OLD = {'.json': b'{"previous": "ledger"}\n', '.xlsx': b'PK\x03\x04 previous workbook bytes\n'}
SCRATCH_STRIDE = int(os.environ.get('HL_WFAIL_STRIDE', '211'))
VG_STRIDE = 25
LSAN_SUPP = os.path.join(ROOT, 'tests', 'tools', 'lsan_minizip.supp')
T = Tally()


def is_asan(path):
    with open(path, 'rb') as f:
        return b'__asan_init' in f.read()


def env_for(at, scope, report):
    env = dict(os.environ)
    env['HL_WFAIL_PERSIST'] = '1' if scope == 'all' else '0'
    env['LD_PRELOAD'] = SHIM
    env['HL_WFAIL_AT'] = str(at)
    env['HL_WFAIL_SCOPE'] = scope
    env['HL_WFAIL_REPORT'] = report
    if is_asan(BIN):
        env['ASAN_OPTIONS'] = (env.get('ASAN_OPTIONS', '') + ':verify_asan_link_order=0').lstrip(':')
        # minizip (libminizip1, through libxlsxwriter) leaks its file-entry buffer when a write
        # inside zipOpenNewFileInZip4_64 fails: a library leak on its error path, in the
        # writer child that exits right after; suppressed for that library only
        env['LSAN_OPTIONS'] = (env.get('LSAN_OPTIONS', '') + ':suppressions=' + LSAN_SUPP + ':print_suppressions=0').lstrip(':')
    return env


def one(camp, target, ext, at, scope, report):
    with open(target, 'wb') as f:
        f.write(OLD[ext])
    if os.path.exists(report):
        os.unlink(report)
    p = subprocess.run(WRAP + [BIN, 'report', camp, '-o', target], capture_output=True,
                       env=env_for(at, scope, report), timeout=600)
    rep = open(report).read() if os.path.exists(report) else ''
    return p, rep


def count(camp, target, ext, scope, report):
    p, rep = one(camp, target, ext, 0, scope, report)
    m = re.search(r'^calls (\d+)$', rep, re.M)
    ok = T.check(p.returncode == 0 and m is not None,
                 'clean pass (%s, %s): exit %d, report %r, %s' % (ext, scope, p.returncode, rep, p.stderr[-300:]))
    return int(m.group(1)) if ok else 0


def walk(camp, d, ext, scope, points):
    target = os.path.join(d, 'out' + ext)
    report = os.path.join(os.path.dirname(d), 'wfail-report.txt')
    walked, funcs = 0, {}
    for n in points:
        p, rep = one(camp, target, ext, n, scope, report)
        err = p.stderr.decode('utf-8', 'replace')
        tag = '%s, %s call %d' % (ext, scope, n)
        m = re.search(r'^failed (\d+) (\S+)$', rep, re.M)
        if not T.check(m is not None and int(m.group(1)) == n, '%s: call %d never made (report %r)' % (tag, n, rep)):
            continue
        walked += 1
        funcs[m.group(2)] = funcs.get(m.group(2), 0) + 1
        tag += ' (%s)' % m.group(2)
        T.check(p.returncode == 1, '%s: exit %d, expected 1; stderr %r' % (tag, p.returncode, err[-300:]))
        lines = err.splitlines()
        T.check(all(l.startswith('haloledger: ') for l in lines), '%s: line outside our format: %r' % (tag, err[-400:]))
        T.check(any(l.startswith('haloledger: cannot write %s' % target) for l in lines),
                '%s: no message naming %s: %r' % (tag, target, err[-300:]))
        T.check(open(target, 'rb').read() == OLD[ext], '%s: previous output changed' % tag)
        left = sorted(set(os.listdir(d)) - {'out' + ext})
        T.check(not left, '%s: left behind %s' % (tag, left))
        for n2 in left:
            os.unlink(os.path.join(d, n2))
    return walked, funcs


def main():
    if not os.path.exists(SHIM):
        print('write_faults: %s is missing (make unit builds it)' % SHIM)
        return 1
    summary = []
    with tempfile.TemporaryDirectory(prefix='hl-wfail-') as top:
        doc = json.load(open(SMALL))
        doc['runs'] = doc['runs'][:1]
        doc['runs'][0].pop('repeat', None)
        camp = os.path.join(top, 'one-run.json')
        with open(camp, 'w') as f:
            json.dump(doc, f)
        for ext in ('.json', '.xlsx'):
            d = os.path.join(top, ext[1:])
            os.mkdir(d)
            named = count(camp, os.path.join(d, 'out' + ext), ext, 'named', os.path.join(top, 'r.txt'))
            every = count(camp, os.path.join(d, 'out' + ext), ext, 'all', os.path.join(top, 'r.txt'))
            T.check(named >= 5, '%s: only %d write calls counted: the shim does not see the writer' % (ext, named))
            stride = VG_STRIDE if WRAP else 1
            w1, f1 = walk(camp, d, ext, 'named', range(1, named + 1, stride))
            # the same count over all files: the named calls are among them, in the same order;
            # the scratch-file calls in between are sampled
            w2, f2 = walk(camp, d, ext, 'all', range(1, every + 1, SCRATCH_STRIDE * stride)) if every > named else (0, {})
            summary.append('%s: %d named-file calls walked%s (%s); %d of %d calls on all files (stride %d, persisting)'
                           % (ext, w1, '' if stride == 1 else ' (stride %d)' % stride,
                              ', '.join('%s %d' % kv for kv in sorted(f1.items())), w2, every, SCRATCH_STRIDE * stride))
    for f in T.fails[:60]:
        print('FAIL ' + f)
    print('write_faults: %s: %s; %d problems'
          % ('ok' if not T.fails else 'FAILED', '; '.join(summary), len(T.fails)))
    return 1 if T.fails else 0


if __name__ == '__main__':
    sys.exit(main())
