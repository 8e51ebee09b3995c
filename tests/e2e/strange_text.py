#!/usr/bin/python3
"""strange_text.py - the strangest text the campaign reader allows still gives a well-formed workbook.

XML 1.0 (Fifth Edition) section 2.2 allows in Char: tab, newline, CR, U+0020-U+D7FF,
U+E000-U+FFFD and U+10000-U+10FFFF.  The reader refuses controls, DEL, C1, U+FFFE and U+FFFF
(issue 16.4); this test puts the edges that remain allowed (U+D7FF, U+E000 private use, the
noncharacters U+FDD0 and U+1FFFE, U+FFFD, U+10FFFF), bidi overrides, joiners, combining marks,
XML specials (< > & ' " ]]>) and formula-looking starts (= + - @) into every text that reaches the
workbook: title, site, run id, reactor, substrate name, scrubber id, container name.  Then
  - every XML part of the .xlsx parses with ElementTree (an independent XML 1.0 parser);
  - openpyxl opens the workbook and finds the title and the run id verbatim, as text;
  - the JSON ledger gives the same strings back.
A campaign with U+FFFF in the title is refused with exit 2 and writes nothing.
Env: HALOLEDGER, HL_ROOT (see tests/run.sh).
"""
import json
import os
import subprocess
import sys
import tempfile
import zipfile
import xml.etree.ElementTree as ET

import openpyxl

BIN = os.environ.get('HALOLEDGER', 'build/haloledger')
EDGE = '\ud7ff\ue000\ufdd0\ufffd' + '\U0001fffe\U0010ffff'
TITLE = '=SUM(A1) ' + EDGE + ' \u202eevil\u202c \u200d\u0301e\u0301 <b>&amp; \'q\' "qq" ]]> \U0001f9ea'
RUN_ID = '+R' + EDGE + '<&>'
TEXTS = {
    'title': TITLE,
    'site': '@site ' + EDGE,
    'reactor': '-R ' + EDGE,
    'name': '\u00e9thane ' + EDGE + ' ]]>',
    'scrub': 'VS' + EDGE,
    'container': 'bottle ' + EDGE + ' <x/>',
}


def campaign():
    return {
        'format': 'haloledger-campaign/1', 'title': TEXTS['title'], 'site': TEXTS['site'],
        'issued': '2027-02-20',
        'scrubbers': [{'id': TEXTS['scrub'], 'naoh_wt_pct': 18, 'liquor_kg': 6000, 'rated_acid_kmol_h': 2}],
        'containers': [{'reagent': 'Cl2', 'name': TEXTS['container'], 'net_kg': 68, 'heel_kg': 1}],
        'runs': [{'id': RUN_ID, 'start': '2027-03-02T06:00', 'reactor': TEXTS['reactor'],
                  'scrubber': TEXTS['scrub'], 'substrate': {'name': TEXTS['name'], 'smiles': 'CC'},
                  'substrate_kg': 100, 'reagent': 'Cl2', 'reagent_eq': 0.5, 'temp_c': 25, 'feed_h': 2}],
    }


def main():
    fails = []
    checks = 0
    with tempfile.TemporaryDirectory(prefix='hl-text-') as tmp:
        src = os.path.join(tmp, 'c.json')
        with open(src, 'w', encoding='utf-8') as f:
            json.dump(campaign(), f, ensure_ascii=False)  # raw UTF-8, not escapes
        book, led = os.path.join(tmp, 'c.xlsx'), os.path.join(tmp, 'c.json.out.json')
        p = subprocess.run([BIN, 'report', src, '-o', book, '-o', led], capture_output=True)
        if p.returncode != 0:
            print('FAIL: report exit %d: %s' % (p.returncode, p.stderr.decode('utf-8', 'replace')))
            return 1
        with zipfile.ZipFile(book) as z:
            for n in z.namelist():
                if n.endswith('.xml') or n.endswith('.rels'):
                    checks += 1
                    try:
                        ET.fromstring(z.read(n))
                    except ET.ParseError as ex:
                        fails.append('%s is not well-formed XML: %s' % (n, ex))
        wb = openpyxl.load_workbook(book)
        cells = [c.value for ws in wb.worksheets for row in ws.iter_rows() for c in row
                 if isinstance(c.value, str)]
        for what, want in (('title', TEXTS['title']), ('run id', RUN_ID), ('substrate name', TEXTS['name']),
                           ('container', TEXTS['container'])):
            checks += 1
            if want not in cells:
                fails.append('openpyxl: the %s %r is in no cell as text' % (what, want))
        with open(led, encoding='utf-8') as f:
            j = json.load(f)
        for what, got, want in (('campaign.title', j['campaign']['title'], TEXTS['title']),
                                ('campaign.site', j['campaign']['site'], TEXTS['site']),
                                ('runs[0].id', j['runs'][0]['id'], RUN_ID),
                                ('runs[0].reactor', j['runs'][0]['reactor'], TEXTS['reactor'])):
            checks += 1
            if got != want:
                fails.append('JSON %s: %r, expected %r' % (what, got, want))
        # the forbidden neighbour of U+FFFD is refused before anything is written
        c = campaign()
        c['title'] = 'a\uffffb'
        with open(src, 'w', encoding='utf-8') as f:
            json.dump(c, f, ensure_ascii=False)
        os.remove(book)
        p = subprocess.run([BIN, 'report', src, '-o', book], capture_output=True)
        checks += 1
        if p.returncode != 2 or os.path.exists(book) or b'U+FFFF' not in p.stderr:
            fails.append('U+FFFF in the title: exit %d, workbook %s, stderr %r' % (
                p.returncode, 'written' if os.path.exists(book) else 'absent', p.stderr))
    for f in fails:
        print('FAIL ' + f)
    print('strange text: %d checks, %d failed' % (checks, len(fails)))
    return 1 if fails else 0


if __name__ == '__main__':
    sys.exit(main())
