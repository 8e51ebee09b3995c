#!/usr/bin/python3
"""seed.py ROOT OUT - gather the seed corpora of the fuzz targets into OUT/<target>/.

fuzz_campaign: campaigns/*.json, tests/campaigns/*.json, tests/bad/*.json, templates/*.json.
fuzz_pipeline, fuzz_workbook: campaigns/*.json, tests/campaigns/*.json and the tests/bad cases
               listed in tests/bad/NEEDS_MODELS (refused by the models, past the reader).
fuzz_smiles:   "smiles"/"product_smiles" values of those files, tests/data/*smiles*.txt lines,
               string literals of tests/ sources that look like SMILES, and long generated
               molecules around the campaign's 1,000-atom limit (chains, branches, rings,
               bracket atoms, aromatic rings) so the fuzzer starts past 1,024 bytes.
fuzz_sched:    tests/bad_csv/*.csv and a schedule in a spreadsheet's dialect.
fuzz_formula:  "formula" values of those files and string literals of tests/ sources that look
               like formulas.
Files are named by the SHA-1 of their bytes (as libFuzzer names its own), so reseeding is
idempotent.  Prints one line per target with the number of seeds.
"""
import glob
import hashlib
import os
import re
import sys

SMILES_RE = re.compile(r'^[A-Za-z0-9@+\-\[\]()=#$:/\\%.*]{1,200}$')
# A formula is capitals, lowercase, digits and parentheses, starting with a capital or '('.
FORMULA_RE = re.compile(r'^[A-Z(][A-Za-z0-9()]{0,80}$')
KEY_RE = re.compile(rb'"(smiles|product_smiles|formula)"\s*:\s*"((?:[^"\\]|\\.){0,300})"')
LIT_RE = re.compile(r'"((?:[^"\\\n]|\\.){1,200})"')
# an organic-subset atom or a bracket atom must be present for a literal to count as SMILES
SMILES_ATOM_RE = re.compile(r'(Cl|Br|[BCNOSPFI]|[bcnops]|\[)')


def put(outdir, data):
    """Write data under its hash; return 1 if new."""
    path = os.path.join(outdir, hashlib.sha1(data).hexdigest())
    if os.path.exists(path):
        return 0
    with open(path, 'wb') as f:
        f.write(data)
    return 1


def long_smiles():
    """Molecules of 999 to 8,000 atoms (the campaign refuses a SMILES at its 1,001st atom;
    smiles_parse itself has no such limit)."""
    out = set()
    for n in (999, 1000, 1001, 2000, 8000):
        out.add(b'C' * n)
    out.add(b'CC(C)' * 334)                      # 1,002 atoms, 334 branches
    out.add(b'c1ccc(cc1)' * 166 + b'C')          # 997 aromatic atoms + 1: kekulized as one
    out.add(b'[13CH2]' * 1001)                   # bracket atoms, 7,007 bytes
    out.add(b''.join(b'C%%%02dCC%%%02d' % (i % 90 + 10, i % 90 + 10) for i in range(334)))
    out.add(b'ClC(Br)(F)' + b'C(Cl)' * 499)      # halogens on a 500-carbon chain
    out.add(b'C=C' * 500 + b'C')                 # 1,001 atoms, alternating bonds
    return out


def main():
    root, out = sys.argv[1], sys.argv[2]
    dirs = {t: os.path.join(out, t) for t in ('fuzz_campaign', 'fuzz_smiles', 'fuzz_formula',
                                              'fuzz_pipeline', 'fuzz_workbook', 'fuzz_sched')}
    for d in dirs.values():
        os.makedirs(d, exist_ok=True)
    jsons = []
    for pat in ('campaigns/*.json', 'tests/campaigns/*.json', 'tests/bad/*.json',
                'templates/*.json'):
        jsons += sorted(glob.glob(os.path.join(root, pat)))
    pipeline = sorted(glob.glob(os.path.join(root, 'campaigns', '*.json')) +
                      glob.glob(os.path.join(root, 'tests', 'campaigns', '*.json')))
    with open(os.path.join(root, 'tests', 'bad', 'NEEDS_MODELS'), encoding='utf-8') as f:
        for line in f:
            name = line.split('#')[0].strip()
            if name:
                pipeline.append(os.path.join(root, 'tests', 'bad', name + '.json'))
    for path in pipeline:
        with open(path, 'rb') as f:
            data = f.read()
        put(dirs['fuzz_pipeline'], data)
        put(dirs['fuzz_workbook'], data)
    smiles, formulas = set(), set()
    for path in jsons:
        with open(path, 'rb') as f:
            data = f.read()
        put(dirs['fuzz_campaign'], data)
        for key, val in KEY_RE.findall(data):
            (formulas if key == b'formula' else smiles).add(val)
    for path in sorted(glob.glob(os.path.join(root, 'tests', 'data', '*smiles*.txt'))):
        with open(path, 'rb') as f:
            for line in f:
                line = line.strip()
                if line and not line.startswith(b'#'):
                    smiles.add(line.split()[0])
    sources = []
    for pat in ('tests/unit/*.c', 'tests/tools/*.c', 'tests/e2e/*.py'):
        sources += sorted(glob.glob(os.path.join(root, pat)))
    for path in sources:
        with open(path, encoding='utf-8', errors='replace') as f:
            text = f.read()
        for lit in LIT_RE.findall(text):
            if '%' in lit and not re.search(r'%\d\d', lit):
                continue  # printf formats
            if FORMULA_RE.match(lit):
                formulas.add(lit.encode())
            if SMILES_RE.match(lit) and SMILES_ATOM_RE.search(lit):
                smiles.add(lit.encode())
    smiles.update(long_smiles())
    for path in sorted(glob.glob(os.path.join(root, 'tests', 'bad_csv', '*.csv'))):
        with open(path, 'rb') as f:
            put(dirs['fuzz_sched'], f.read())
    put(dirs['fuzz_sched'], b'id;start;substrate_smiles;substrate_kg;reagent;reagent_eq;temp_c\r\n'
        b'A;2027-03-01 06:00;CC(C)C;100;Cl2;0,6;40\r\n"B";"2027-03-02";"C1CCCC=C1";"5";"NBS";"1";""\r\n')
    for s in sorted(smiles):
        put(dirs['fuzz_smiles'], s)
    for s in sorted(formulas):
        put(dirs['fuzz_formula'], s)
    for t, d in sorted(dirs.items()):
        print('seed %-14s %5d inputs in %s' % (t, len(os.listdir(d)), d))
    return 0


if __name__ == '__main__':
    sys.exit(main())
