#!/usr/bin/python3
"""oom_walk.py - every allocation failure point of a report is handled (issue 5, item 7).

Runs $BUILD/tool_oom (tests/tools/tool_oom.c) on a campaign of campaigns/: it makes allocation
call n fail for n = 1, 2, ... through the whole report path and checks, for every failing pass,
the status (out of memory), the message, that no output appears or changes and that no temporary
file stays behind.  Leaks:
  - plain build: every point, with glibc's tcache off so that the tool's in-process heap count
    (mallinfo2) is exact: any byte not freed after a failing pass is reported at that point;
    then a short valgrind run (every STRIDE-th point) for invalid reads, if valgrind is installed;
  - sanitize build (ASan + LeakSanitizer, detected in the binary): every point, LSan at exit;
  - HL_WRAP=valgrind... (make valgrind): every STRIDE-th point under that wrapper.
Env: HL_ROOT, BUILD, HL_WRAP; HL_OOM_CAMPAIGN overrides the campaign, HL_OOM_VG_POINTS the number
of points walked under valgrind (default 150).
"""
import os
import re
import shlex
import shutil
import subprocess
import sys
import tempfile

ROOT = os.environ.get('HL_ROOT', os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BUILD = os.environ.get('BUILD', 'build')
TOOL = os.path.join(ROOT, BUILD, 'tool_oom')
WRAP = shlex.split(os.environ.get('HL_WRAP', ''))
CAMPAIGN = os.environ.get('HL_OOM_CAMPAIGN', os.path.join(ROOT, 'campaigns', 'small-scrubber-stress.json'))
VG_POINTS = int(os.environ.get('HL_OOM_VG_POINTS', '150'))
VALGRIND = ['valgrind', '-q', '--leak-check=full', '--errors-for-leak-kinds=definite,indirect',
            '--error-exitcode=99']
SUMMARY = re.compile(r'oom: (\d+) failure points walked \(of (\d+) allocation calls, stride (\d+)\)')


def is_asan(path):
    with open(path, 'rb') as f:
        return b'__asan_init' in f.read()


def run(argv, env, what):
    """Run the tool (with --trace, so a crash names its point); return (ok, walked, total, output)."""
    with tempfile.TemporaryDirectory(prefix='hl-oom-') as d:
        p = subprocess.run(argv + [CAMPAIGN, d, '--trace'], capture_output=True, env=env, timeout=900)
        left = os.listdir(d)
    err = p.stderr.decode('utf-8', 'replace').splitlines()
    points = [l for l in err if re.match(r'point \d+$', l)]
    rest = [l for l in err if not re.match(r'point \d+$', l)]
    out = p.stdout.decode('utf-8', 'replace') + '\n'.join(rest)
    m = SUMMARY.search(out)
    ok = p.returncode == 0 and m is not None and not left
    if not ok:
        print('FAIL %s: exit %d%s%s' % (what, p.returncode,
                                       ', crashed in the pass of %s' % points[-1] if points and not m else '',
                                       ', left behind: %s' % left if left else ''))
        print('\n'.join(out.strip().splitlines()[-40:]))
    else:
        print('ok   %s: %s' % (what, out.strip().splitlines()[-1]))
    return ok, int(m.group(1)) if m else 0, int(m.group(2)) if m else 0, out


def total_calls(env, wrap):
    """Allocation calls of one clean pass (a walk that starts past the end)."""
    ok, _, total, _ = run(wrap + [TOOL, '--first', '1000000000'], env, 'clean pass')
    return total if ok else 0


def main():
    if not os.path.exists(TOOL):
        print('oom_walk: %s is missing (make unit builds it)' % TOOL)
        return 1
    env = dict(os.environ)
    results, labels, skipped = [], [], False
    if WRAP:
        total = total_calls(env, WRAP)
        stride = max(1, total // VG_POINTS)
        results.append(run(WRAP + [TOOL, '--stride', str(stride)], env, 'under %s, stride %d' % (WRAP[0], stride)))
        labels.append('under %s (one point in %d)' % (os.path.basename(WRAP[0]), stride))
    elif is_asan(TOOL):
        results.append(run([TOOL], env, 'ASan + LeakSanitizer, every point'))
        labels.append('under ASan + LeakSanitizer (every point)')
    else:
        env['GLIBC_TUNABLES'] = 'glibc.malloc.tcache_count=0'
        results.append(run([TOOL], env, 'plain build, every point, heap count on'))
        labels.append('in the plain build (every point, heap count)')
        if shutil.which('valgrind'):
            venv = dict(os.environ)
            total = results[0][2] or total_calls(venv, [])
            stride = max(1, total // VG_POINTS)
            results.append(run(VALGRIND + [TOOL, '--stride', str(stride)], venv,
                               'valgrind, stride %d' % stride))
            labels.append('under valgrind (one point in %d)' % stride)
        else:
            print('SKIPPED: valgrind not installed: leak check by heap count only')
            skipped = True
    ok = all(r[0] for r in results)
    total = max(r[2] for r in results) if results else 0
    print('oom_walk: %s: %s; %d allocation calls in a clean report of %s'
          % ('ok' if ok else 'FAILED', ', '.join('%d failure points walked %s' % (r[1], w) for r, w in
                                                  zip(results, labels)), total, os.path.basename(CAMPAIGN)))
    return 1 if not ok else 77 if skipped else 0  # tests/run.sh: 77 = skipped


if __name__ == '__main__':
    sys.exit(main())
