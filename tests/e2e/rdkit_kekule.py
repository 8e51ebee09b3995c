#!/usr/bin/python3
"""rdkit_kekule.py - aromatic SMILES are accepted exactly when RDKit can kekulize them (issue 16.3).

Reference: the verdict of RDKit's Chem.MolFromSmiles (python3-rdkit), which refuses an aromatic
system without a Kekule structure ("Can't kekulize mol").  Strings: a hand list (benzene, pyridine,
pyrrole c1cc[nH]c1, thiophene, furan, naphthalene, azulene, biphenyl, indole, purine tautomers,
pyridone, pyridinium, cyclopentadienide, odd and impossible rings such as Cc1cccc1, Cc1cc1,
Cc1cccccc1, c1ccnc1), then 3000 strings drawn with a fixed seed: one to three rings of 3 to 9
atoms from c, n, [nH], o, s, [n+], [cH-], [nH+], [o+], fused or joined by a single bond, some with
methyl, chloro or =O substituents.  Every string is run through $BUILD/tool_chem; haloledger must
accept it iff RDKit returns a molecule.  Strings haloledger refuses for reasons outside
aromaticity (none expected in this set) count as disagreements too.
"""
import json
import os
import random
import subprocess
import sys

from rdkit import Chem, RDLogger

RDLogger.DisableLog("rdApp.*")
ROOT = os.environ.get("HL_ROOT", os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BUILD = os.environ.get("BUILD", "build")
TOOL = os.path.join(ROOT, BUILD, "tool_chem")

HAND = """c1ccccc1 Cc1ccccc1 c1cc[nH]c1 [nH]1cccc1 c1ccncc1 c1ccsc1 s1cccc1 c1ccoc1 c1ccc2ccccc2c1
c1ccc2cccc2cc1 c1ccc(cc1)c1ccccc1 c1ccc(cc1)-c1ccccc1 c1ccc2[nH]ccc2c1 c1ccc2occc2c1
c1nc2[nH]cnc2n1 c1nc2nc[nH]c2n1 c1cnc[nH]1 O=c1cccc[nH]1 O=c1ccc(=O)cc1 C[n+]1ccccc1 c1cc[cH-]c1
c1cc[n-]c1 [o+]1ccccc1 Cn1cnc2c1c(=O)n(C)c(=O)n2C c1cc[se]c1 c1ccbcc1 c1cc[bH-]cc1 c1ccpcc1
[c]1ccccc1 c1ccc2c(c1)[nH]c1ccccc12 c1ccc2c(c1)Cc1ccccc12 c1cc2ccc3cccc4ccc(c1)c2c34
c1ccc2cc3ccccc3cc2c1 c1ccc-2c(c1)-c1ccccc-21 c1ccccccc1 c1ccc1
Cc1cccc1 Cc1cc1 Cc1cccccc1 c1cccc1 c1ccnc1 n1ccnc1 n1cccc1 c1ccccc1c1cccc1 c1cc2cc1cc2
c1ccc2ccccc2cc1 c1ccc2cccccc2c1 c1cc[CH]cc1 c1ccc2c(c1)cc1ccccc12 O=c1ccccc1 c1nc2nc[nH]c-2n1
c1cc[nH+]c1 c1cc[o+]c1 c1ccc[nH]1C""".split()

ATOMS = ["c", "c", "c", "c", "n", "[nH]", "o", "s", "[n+]", "[cH-]", "[nH+]", "[o+]"]


def ring(rng, size, label):
    atoms = [rng.choice(ATOMS) for _ in range(size)]
    sub = rng.random()
    if sub < 0.15:
        atoms[0] += "(C)"
    elif sub < 0.25:
        atoms[0] += "(Cl)"
    elif sub < 0.32 and atoms[0] == "c":
        atoms[0] += "(=O)"
    return atoms[0] + str(label) + "".join(atoms[1:-1]) + atoms[-1] + str(label)


def fused(rng):
    """Two rings sharing a bond: a1 X..X a2 written as c12...c1...2 style."""
    n1, n2 = rng.randint(3, 7), rng.randint(3, 7)
    a = [rng.choice(ATOMS) for _ in range(n1 - 2)]
    b = [rng.choice(ATOMS) for _ in range(n2 - 2)]
    j1, j2 = rng.choice(["c", "c", "n"]), rng.choice(["c", "c", "n"])
    return "%s12%s%s1%s2" % (j1, "".join(a), j2, "".join(b))


def generated(n):
    rng = random.Random(20261202)
    out = []
    while len(out) < n:
        r = rng.random()
        if r < 0.5:
            s = ring(rng, rng.randint(3, 9), 1)
        elif r < 0.8:
            s = fused(rng)
        else:
            s = ring(rng, rng.randint(4, 7), 1) + ring(rng, rng.randint(4, 7), 2)
        out.append(s)
    return out


def four_bond_c(s):
    """True if s writes an aromatic carbon with four sigma bonds and H (read without sanitizing)."""
    m = Chem.MolFromSmiles(s, sanitize=False)
    return m is not None and any(a.GetSymbol() == "C" and a.GetIsAromatic() and
                                 a.GetDegree() + a.GetNumExplicitHs() >= 4 for a in m.GetAtoms())


def main():
    strings = HAND + generated(3000)
    p = subprocess.run([TOOL], input="\n".join(strings) + "\n", capture_output=True, text=True, timeout=600)
    if p.returncode != 0:
        print("FAIL: tool_chem exit %d: %s" % (p.returncode, p.stderr[:500]))
        return 1
    rows = [json.loads(l) for l in p.stdout.splitlines() if l.strip()]
    if len(rows) != len(strings):
        print("FAIL: %d answers for %d strings" % (len(rows), len(strings)))
        return 1
    bad, acc, ref, known = [], 0, 0, 0
    for s, j in zip(strings, rows):
        rd = Chem.MolFromSmiles(s) is not None
        acc += j["ok"]
        ref += rd
        if not j["ok"] and rd and j.get("msg", "").startswith("too many bonds on carbon") and four_bond_c(s):
            # haloledger refuses a lowercase carbon with four sigma bonds (it cannot be aromatic);
            # RDKit reads it by kekulizing the ring without it and perceiving aromaticity again
            known += 1
            continue
        if bool(j["ok"]) != rd:
            bad.append("%s: RDKit %s, haloledger %s %s" % (s, "accepts" if rd else "refuses",
                       "accepts" if j["ok"] else "refuses", "" if j["ok"] else "(col %s: %s)" % (
                           j.get("col"), j.get("msg"))))
    for b in bad[:40]:
        print("FAIL " + b)
    print("rdkit_kekule: %d strings, RDKit accepts %d, haloledger %d, %d four-bond aromatic carbons "
          "refused by design, %d disagreements" % (len(strings), ref, acc, known, len(bad)))
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
