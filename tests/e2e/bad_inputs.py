#!/usr/bin/python3
"""bad_inputs.py - every malformed campaign of tests/bad/ is refused cleanly (design section 6).

For each tests/bad/NAME.json the binary runs as `check FILE`, `report FILE -o OUT.json` and
`report FILE -o OUT.xlsx`, in a fresh folder where OUT.json and OUT.xlsx already exist with
known bytes.  Each run must exit 2, print a stderr line matching NAME.expect
(`haloledger: FILE:LINE:COL: FIELD: message`), leave both outputs byte-identical and create
no other file.  Cases listed in tests/bad/NEEDS_MODELS are refused by the chemistry modules;
while those are not built yet (HL_SKIP_MODELS=1) they are skipped and counted.
Env: HALOLEDGER (binary), HL_ROOT (repo root), HL_WRAP (optional prefix, e.g. valgrind).
"""
import os
import re
import shlex
import shutil
import subprocess
import sys
import tempfile

ROOT = os.environ.get('HL_ROOT', os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BIN = os.environ.get('HALOLEDGER', os.path.join(ROOT, 'build', 'haloledger'))
WRAP = shlex.split(os.environ.get('HL_WRAP', ''))
BAD = os.path.join(ROOT, 'tests', 'bad')
OLD_JSON = b'{"previous": "ledger"}\n'
OLD_XLSX = b'PK\x03\x04 previous workbook bytes\n'


def supports_check():
    """True when the binary knows `check` (the CLI may still be a placeholder)."""
    try:
        p = subprocess.run([BIN, '--help'], capture_output=True, timeout=60)
    except OSError as ex:
        print('cannot run %s: %s' % (BIN, ex))
        return False
    return b'check' in p.stdout + p.stderr


def one(name, pattern, args, tmp):
    """Run one command in tmp; return a list of problems."""
    work = os.path.join(tmp, 'w')
    if os.path.isdir(work):
        shutil.rmtree(work)
    os.mkdir(work)
    src = os.path.join(BAD, name + '.json')
    case = os.path.join(work, name + '.json')
    shutil.copyfile(src, case)
    with open(os.path.join(work, 'OUT.json'), 'wb') as f:
        f.write(OLD_JSON)
    with open(os.path.join(work, 'OUT.xlsx'), 'wb') as f:
        f.write(OLD_XLSX)
    before = sorted(os.listdir(work))
    argv = WRAP + [BIN] + [a.replace('FILE', name + '.json') for a in args]
    try:
        p = subprocess.run(argv, cwd=work, capture_output=True, timeout=120)
    except subprocess.TimeoutExpired:
        return ['%s: timed out' % ' '.join(args)]
    bad = []
    err = p.stderr.decode('utf-8', 'replace')
    what = ' '.join(a.replace('FILE', name + '.json') for a in args)
    if p.returncode != 2:
        bad.append('%s: exit %d, expected 2' % (what, p.returncode))
    if not any(re.match(pattern, line) for line in err.splitlines()):
        bad.append('%s: stderr does not match %r:\n    %s' % (what, pattern, err.strip().replace('\n', '\n    ')))
    with open(os.path.join(work, 'OUT.json'), 'rb') as f:
        if f.read() != OLD_JSON:
            bad.append('%s: OUT.json changed' % what)
    with open(os.path.join(work, 'OUT.xlsx'), 'rb') as f:
        if f.read() != OLD_XLSX:
            bad.append('%s: OUT.xlsx changed' % what)
    after = sorted(os.listdir(work))
    if after != before:
        bad.append('%s: files appeared or vanished: %s' % (what, sorted(set(after) ^ set(before))))
    return bad


def main():
    names = sorted(f[:-5] for f in os.listdir(BAD) if f.endswith('.json'))
    with open(os.path.join(BAD, 'NEEDS_MODELS')) as f:
        needs = {l.strip() for l in f if l.strip() and not l.startswith('#')}
    if not supports_check():
        print('FAIL: %s does not support `check` yet (no "check" in --help); %d cases not run'
              % (BIN, len(names)))
        return 1
    skip_models = os.environ.get('HL_SKIP_MODELS') == '1'
    runs = [['check', 'FILE'], ['report', 'FILE', '-o', 'OUT.json'], ['report', 'FILE', '-o', 'OUT.xlsx']]
    failures, skipped, passed, sampled_out = [], 0, 0, 0
    tmp = tempfile.mkdtemp(prefix='hl-bad-')
    try:
        for i, name in enumerate(names):
            if skip_models and name in needs:
                skipped += 1
                continue
            with open(os.path.join(BAD, name + '.expect')) as f:
                pattern = f.read().strip()
            probs = []
            # under a wrapper (valgrind: ~0.7 s a run) a quarter of the cases run `check`
            # and one in sixteen all three commands, to keep the suite within its time
            if WRAP and i % 4:
                sampled_out += 1
                continue
            todo = runs if not WRAP or i % 16 == 0 else runs[:1]
            for args in todo:
                probs += one(name, pattern, args, tmp)
            if probs:
                failures.append((name, probs))
            else:
                passed += 1
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    for name, probs in failures:
        print('FAIL %s' % name)
        for p in probs:
            print('  ' + p)
    print('bad inputs: %d/%d refused as expected (x3 commands), %d SKIPPED (need models), %d not sampled '
          'under HL_WRAP, %d failed' % (passed, len(names) - skipped - sampled_out, skipped, sampled_out,
                                         len(failures)))
    # tests/run.sh: 77 = skipped (cases left out with HL_SKIP_MODELS=1)
    return 1 if failures else 77 if skipped else 0


if __name__ == '__main__':
    sys.exit(main())
