#!/usr/bin/python3
"""rdkit_formula.py - formula parsing and molar masses of haloledger against RDKit.

For each row (name, SMILES, formula as a chemist types it) the formula text is fed
to $HL_ROOT/$BUILD/tool_formula, which prints our Hill formula and molar mass; they
are compared with rdMolDescriptors.CalcMolFormula and Descriptors.MolWt of the
SMILES (python3-rdkit).

Formula: RDKit writes C and H first even without carbon ("HCl"), where the Hill
system (Hill, J. Am. Chem. Soc. 22 (1900) 478) is alphabetical throughout ("ClH").
So the element counts are always compared, the text itself where carbon is present
(there both conventions agree), and the carbon-free text is checked to be
alphabetical.

Mass: RDKit's table holds older IUPAC weights for a few elements (Cl 35.453,
S 32.067 (32.065 in some releases), I 126.904) where haloledger uses the CIAAW
2021 abridged/conventional values (Cl 35.45, S 32.06, I 126.90); H, C, N, O, F, Na,
Br, P agree.  The allowed difference is therefore 1e-4 g/mol plus 0.004 per Cl,
0.008 per S and 0.005 per I atom - tight (1e-4) for molecules made only of
elements whose weights agree.
"""
import os
import re
import subprocess
import sys

from rdkit import Chem, RDLogger
from rdkit.Chem import Descriptors, rdMolDescriptors

RDLogger.DisableLog("rdApp.*")
ROOT = os.environ.get("HL_ROOT", os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BUILD = os.environ.get("BUILD", "build")
TOOL = os.path.join(ROOT, BUILD, "tool_formula")

ROWS = [
    # name, SMILES, formula as typed in a campaign
    ("methane", "C", "CH4"),
    ("chloromethane", "CCl", "CH3Cl"),
    ("dichloromethane", "ClCCl", "CH2Cl2"),
    ("chloroform", "ClC(Cl)Cl", "CHCl3"),
    ("carbon tetrachloride", "ClC(Cl)(Cl)Cl", "CCl4"),
    ("propane", "CCC", "C3H8"),
    ("1-chloropropane", "CCCCl", "CH3(CH2)2Cl"),
    ("2-methylpropane", "CC(C)C", "C4H10"),
    ("2-chloro-2-methylpropane", "CC(C)(C)Cl", "(CH3)3CCl"),
    ("toluene", "Cc1ccccc1", "C6H5CH3"),
    ("benzyl bromide", "BrCc1ccccc1", "C6H5CH2Br"),
    ("chlorobenzene", "Clc1ccccc1", "C6H5Cl"),
    ("ethylbenzene", "CCc1ccccc1", "C6H5C2H5"),
    ("(1-bromoethyl)benzene", "CC(Br)c1ccccc1", "C6H5CHBrCH3"),
    ("cyclohexane", "C1CCCCC1", "C6H12"),
    ("bromocyclohexane", "BrC1CCCCC1", "C6H11Br"),
    ("propene", "C=CC", "CH2CHCH3"),
    ("1-bromopropane", "BrCCC", "CH3CH2CH2Br"),
    ("allyl bromide", "C=CCBr", "C3H5Br"),
    ("dodecane", "CCCCCCCCCCCC", "CH3(CH2)10CH3"),
    ("N-bromosuccinimide", "O=C1CCC(=O)N1Br", "C4H4BrNO2"),
    ("succinimide", "O=C1CCC(=O)N1", "C4H5NO2"),
    ("sulfuryl chloride", "O=S(=O)(Cl)Cl", "SO2Cl2"),
    ("sulfur dioxide", "O=S=O", "SO2"),
    ("hydrogen chloride", "Cl", "HCl"),
    ("hydrogen bromide", "Br", "HBr"),
    ("chlorine", "ClCl", "Cl2"),
    ("bromine", "BrBr", "Br2"),
    ("water", "O", "H2O"),
    ("sodium hydroxide", "[Na+].[OH-]", "NaOH"),
    ("sodium hypochlorite", "[Na+].[O-]Cl", "NaOCl"),
    ("sodium hypobromite", "[Na+].[O-]Br", "NaOBr"),
    ("sodium sulfite", "[Na+].[Na+].[O-]S([O-])=O", "Na2SO3"),
    ("calcium hypochlorite", "[Ca+2].[O-]Cl.[O-]Cl", "Ca(OCl)2"),
    ("iodomethane", "CI", "CH3I"),
    ("triisopropylamine", "CC(C)N(C(C)C)C(C)C", "((CH3)2CH)3N"),
]

TERM = re.compile(r"([A-Z][a-z]?)(\d*)")


def counts(text):
    out = {}
    pos = 0
    for m in TERM.finditer(text):
        if m.start() != pos:
            raise ValueError("cannot read formula %r" % text)
        out[m.group(1)] = out.get(m.group(1), 0) + int(m.group(2) or 1)
        pos = m.end()
    if pos != len(text):
        raise ValueError("cannot read formula %r" % text)
    return out


def main():
    if not os.access(TOOL, os.X_OK):
        print("missing %s (run make unit)" % TOOL)
        return 1
    wrap = os.environ.get("HL_WRAP", "").split()
    text = "".join(f + "\n" for _, _, f in ROWS)
    res = subprocess.run(wrap + [TOOL], input=text, capture_output=True, text=True, timeout=60)
    lines = res.stdout.splitlines()
    fails = []
    if res.returncode != 0 or len(lines) != len(ROWS):
        fails.append("tool exit %d, %d lines for %d rows: %s" % (res.returncode, len(lines), len(ROWS), res.stderr.strip()))
    worst = 0.0
    for (name, smi, typed), line in zip(ROWS, lines):
        mol = Chem.MolFromSmiles(smi)
        if mol is None:
            fails.append("%s: RDKit cannot read %s" % (name, smi))
            continue
        parts = line.split()
        if len(parts) != 2 or parts[0] == "ERROR":
            fails.append("%s: tool said %r" % (name, line))
            continue
        hill, mass = parts[0], float(parts[1])
        rd = rdMolDescriptors.CalcMolFormula(mol).rstrip("+-")  # net charge 0 here
        rdc, ours = counts(rd), counts(hill)
        if rdc != ours:
            fails.append("%s: element counts %s vs RDKit %s" % (name, ours, rdc))
        if "C" in ours and hill != rd:
            fails.append("%s: Hill %s vs RDKit %s" % (name, hill, rd))
        if "C" not in ours and list(ours) != sorted(ours):
            fails.append("%s: %s is not alphabetical (Hill, no carbon)" % (name, hill))
        ref = Descriptors.MolWt(mol)
        tol = 1e-4 + 0.004 * ours.get("Cl", 0) + 0.008 * ours.get("S", 0) + 0.005 * ours.get("I", 0)
        worst = max(worst, abs(mass - ref))
        if abs(mass - ref) > tol:
            fails.append("%s: mass %.6f vs RDKit %.6f (tol %.4f)" % (name, mass, ref, tol))
    for f in fails:
        print("FAIL", f)
    print("rdkit_formula: %d substances, %d failures, max |mass - MolWt| = %.4f g/mol"
          % (len(ROWS), len(fails), worst))
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
