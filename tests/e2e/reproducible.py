#!/usr/bin/python3
"""reproducible.py - the same campaign gives the same bytes; user text stays text (issue 5, 3-4).

1. `report` of campaigns/harrowmere-march.json (it has an "issued" date) to .xlsx and .json, in a
   fresh folder each time, must give byte-identical files: twice; with other TZ (UTC+05:45,
   UTC-03:30, UTC+14) and LC_ALL/LANG values; with SOURCE_DATE_EPOCH set (the issued date wins).
   The workbook's docProps/core.xml carries the issued date as dcterms:created, and every zip
   entry the fixed 1980-01-01 stamp (ZIP format: MS-DOS date, no earlier date exists).
2. The same campaign without "issued": two runs with one SOURCE_DATE_EPOCH are identical and
   created is that time (truncated to the minute, as the ledger keeps minutes); without
   SOURCE_DATE_EPOCH two runs a second apart are identical (no wall-clock time).
3. Run ids and substrate names that a spreadsheet would take for a formula ("=1+1", "@...",
   "-...", "+...") come back through openpyxl as text cells (data_type 's') and unchanged in the
   JSON ledger.
Env: HALOLEDGER, HL_ROOT, HL_WRAP (optional prefix, e.g. valgrind).
"""
import hashlib
import json
import os
import shlex
import subprocess
import sys
import tempfile
import time
import zipfile

ROOT = os.environ.get('HL_ROOT', os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BIN = os.environ.get('HALOLEDGER', os.path.join(ROOT, 'build', 'haloledger'))
WRAP = shlex.split(os.environ.get('HL_WRAP', ''))
CAMPAIGN = os.path.join(ROOT, 'campaigns', 'harrowmere-march.json')
SMALL = os.path.join(ROOT, 'campaigns', 'small-scrubber-stress.json')
FORMULA_LIKE_IDS = ['=1+1', '@SUM(A1:A2)', '-2+3', '+A1']
FORMULA_LIKE_NAMES = ['@cumene', '-methylbutane', '=HYPERLINK("x")', '+propane']

problems = []


def check(ok, what):
    if not ok:
        problems.append(what)
        print('FAIL ' + what)
    return ok


def report(src, tmp, tag, env_changes):
    """Copy src into a fresh folder under tmp, run report there; return (xlsx bytes, json bytes)."""
    work = os.path.join(tmp, tag)
    os.mkdir(work)
    with open(src, 'rb') as f:
        data = f.read()
    with open(os.path.join(work, 'campaign.json'), 'wb') as f:
        f.write(data)
    env = {k: v for k, v in os.environ.items() if k not in ('SOURCE_DATE_EPOCH', 'TZ', 'LC_ALL', 'LANG')}
    env.update({k: v for k, v in env_changes.items() if v is not None})
    p = subprocess.run(WRAP + [BIN, 'report', 'campaign.json', '-o', 'out.xlsx', '-o', 'out.json'],
                       cwd=work, env=env, capture_output=True, timeout=300)
    if not check(p.returncode == 0, '%s: exit %d: %s' % (tag, p.returncode, p.stderr.decode(errors='replace')[-500:])):
        return None, None
    with open(os.path.join(work, 'out.xlsx'), 'rb') as f:
        x = f.read()
    with open(os.path.join(work, 'out.json'), 'rb') as f:
        j = f.read()
    return x, j


def digest(b):
    return hashlib.sha256(b).hexdigest()[:16] if b else 'none'


def core_created(xlsx_path):
    with zipfile.ZipFile(xlsx_path) as z:
        core = z.read('docProps/core.xml').decode()
        stamps = {i.date_time for i in z.infolist()}
    start = core.find('<dcterms:created')
    end = core.find('</dcterms:created>')
    value = core[core.find('>', start) + 1:end] if start >= 0 and end > start else None
    return value, stamps


def same_bytes(tmp):
    base = {'TZ': 'UTC', 'LC_ALL': 'C'}
    variants = [
        ('again', base),
        ('tz-kathmandu', {'TZ': 'Asia/Kathmandu', 'LC_ALL': 'C.UTF-8'}),
        ('tz-posix-minus', {'TZ': 'NST+3:30', 'LANG': 'de_DE.UTF-8'}),
        ('tz-kiritimati-lc', {'TZ': 'Pacific/Kiritimati', 'LC_ALL': 'de_DE.UTF-8', 'LANG': 'fr_FR.UTF-8'}),
        ('sde-set', dict(base, SOURCE_DATE_EPOCH='1234567890')),
    ]
    x0, j0 = report(CAMPAIGN, tmp, 'first', base)
    if x0 is None:
        return 0
    n = 1
    for tag, env in variants:
        x, j = report(CAMPAIGN, tmp, tag, env)
        n += 1
        check(x == x0, '%s: xlsx bytes differ (%s vs %s)' % (tag, digest(x), digest(x0)))
        check(j == j0, '%s: json bytes differ (%s vs %s)' % (tag, digest(j), digest(j0)))
    created, stamps = core_created(os.path.join(tmp, 'first', 'out.xlsx'))
    issued = json.load(open(CAMPAIGN))['issued']
    check(created == issued + 'T00:00:00Z', 'core.xml created %r, expected the issued date %sT00:00:00Z'
          % (created, issued))
    check(stamps == {(1980, 1, 1, 0, 0, 0)}, 'zip entry stamps %s, expected only 1980-01-01 00:00' % sorted(stamps))
    print('ok   %d reports of %s: xlsx %s, json %s, created %s' % (n, os.path.basename(CAMPAIGN),
                                                                  digest(x0), digest(j0), created))
    return n


def without_issued(tmp):
    doc = json.load(open(CAMPAIGN))
    del doc['issued']
    src = os.path.join(tmp, 'no-issued.json')
    with open(src, 'w') as f:
        json.dump(doc, f, indent=1)
    sde = 1700000000  # 2023-11-14T22:13:20Z (POSIX `date -u -d @1700000000`)
    xa, ja = report(src, tmp, 'sde-a', {'SOURCE_DATE_EPOCH': str(sde), 'TZ': 'UTC'})
    xb, jb = report(src, tmp, 'sde-b', {'SOURCE_DATE_EPOCH': str(sde), 'TZ': 'America/New_York'})
    check(xa is not None and xa == xb, 'no issued, same SOURCE_DATE_EPOCH: xlsx differs')
    check(ja is not None and ja == jb, 'no issued, same SOURCE_DATE_EPOCH: json differs')
    created, _ = core_created(os.path.join(tmp, 'sde-a', 'out.xlsx'))
    check(created == '2023-11-14T22:13:00Z', 'SOURCE_DATE_EPOCH=%d: created %r, expected 2023-11-14T22:13:00Z'
          % (sde, created))
    xc, jc = report(src, tmp, 'plain-a', {'TZ': 'UTC'})
    time.sleep(1.1)  # a wall-clock stamp would now differ by at least a second
    xd, jd = report(src, tmp, 'plain-b', {'TZ': 'UTC'})
    check(xc is not None and xc == xd, 'no issued, no SOURCE_DATE_EPOCH: xlsx differs between runs')
    check(jc is not None and jc == jd, 'no issued, no SOURCE_DATE_EPOCH: json differs between runs')
    created2, _ = core_created(os.path.join(tmp, 'plain-a', 'out.xlsx'))
    print('ok   no issued date: SOURCE_DATE_EPOCH -> created %s; none -> fixed %s' % (created, created2))
    return 4


def text_cells(tmp):
    import openpyxl
    doc = json.load(open(SMALL))
    template = doc['runs'][0]
    runs = []
    for k, (rid, name) in enumerate(zip(FORMULA_LIKE_IDS, FORMULA_LIKE_NAMES)):
        r = dict(template)
        r.pop('repeat', None)
        r['id'] = rid
        r['substrate'] = dict(template['substrate'], name=name)
        r['start'] = '2027-05-%02dT06:00' % (3 + 2 * k)
        runs.append(r)
    doc['runs'] = runs
    src = os.path.join(tmp, 'formula-like.json')
    with open(src, 'w') as f:
        json.dump(doc, f, indent=1)
    x, j = report(src, tmp, 'text', {'TZ': 'UTC'})
    if x is None:
        return 0
    wb = openpyxl.load_workbook(os.path.join(tmp, 'text', 'out.xlsx'))
    want = FORMULA_LIKE_IDS + FORMULA_LIKE_NAMES
    found = {w: 0 for w in want}
    for ws in wb.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                if cell.value in found:
                    found[cell.value] += 1
                    check(cell.data_type == 's', '%s!%s holds %r as type %r, expected text'
                          % (ws.title, cell.coordinate, cell.value, cell.data_type))
    for w in FORMULA_LIKE_IDS:
        check(found[w] > 0, 'run id %r not found as a text cell in the workbook' % w)
    for w in FORMULA_LIKE_NAMES:
        check(found[w] > 0, 'substrate name %r not found as a text cell in the workbook' % w)
    ledger = json.loads(j)
    ids = [r['id'] for r in ledger['runs']]
    names = [r['substrate']['name'] for r in ledger['runs']]
    check(sorted(ids) == sorted(FORMULA_LIKE_IDS), 'JSON run ids %r' % ids)
    check(sorted(names) == sorted(FORMULA_LIKE_NAMES), 'JSON substrate names %r' % names)
    print('ok   formula-like text: %d cells checked, all text' % sum(found.values()))
    return 1


def main():
    with tempfile.TemporaryDirectory(prefix='hl-repro-') as tmp:
        n = same_bytes(tmp)
        n += without_issued(tmp)
        n += text_cells(tmp)
    print('reproducible: %s: %d reports compared, %d problems' % ('ok' if not problems else 'FAILED',
                                                                  n, len(problems)))
    return 1 if problems else 0


if __name__ == '__main__':
    sys.exit(main())
