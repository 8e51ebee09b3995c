#!/usr/bin/python3
"""rdkit_chem.py - the SMILES reader, symmetry classes, site classes and product
structures of haloledger against RDKit (python3-rdkit).

Runs $HL_ROOT/$BUILD/tool_chem on tests/data/chem_smiles.txt and checks, per molecule:
  formula         == rdMolDescriptors.CalcMolFormula (charge suffix dropped; isotope-labelled
                     molecules compared as plain elements)
  molar mass      == Descriptors.MolWt within 2e-4 relative (RDKit's weights, e.g. Cl 35.453,
                     differ from the CIAAW 2021 conventional values the program uses, Cl 35.45)
  symmetry        same partition of heavy atoms as Chem.CanonicalRankAtoms(breakTies=False)
  site classes    re-derived here from RDKit's own aromaticity and bond perception
  written SMILES  canonicalises (Chem.MolToSmiles) to the input's canonical SMILES
  products        Cl2, NBS and HBr product sets == the sets built here by editing the RDKit
                  molecule (monosubstitution at each sp3 C-H; allylic termini with the double
                  bond shifted; Br on the less substituted end of each non-aromatic C=C);
                  (an allylic radical that is also benzylic shifts too);
                  every product valid, of the right formula, shares summing to 1.
"""
import json
import os
import subprocess
import sys

from rdkit import Chem, RDLogger
from rdkit.Chem import Descriptors, rdMolDescriptors

RDLogger.DisableLog("rdApp.*")
ROOT = os.environ.get("HL_ROOT", os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
BUILD = os.environ.get("BUILD", "build")
TOOL = os.path.join(ROOT, BUILD, "tool_chem")
DATA = os.path.join(ROOT, "tests", "data", "chem_smiles.txt")

PRIMARY, SECONDARY, TERTIARY, BENZYLIC, ALLYLIC, VINYL = range(6)


def nostereo(m):
    """Canonical SMILES without stereo marks: haloledger models constitution only."""
    m = Chem.Mol(m)
    Chem.RemoveStereochemistry(m)
    return Chem.MolToSmiles(m)


def canon(smi):
    m = Chem.MolFromSmiles(smi)
    return None if m is None else nostereo(m)


def is_cc_double(b):
    return (b.GetBondType() == Chem.BondType.DOUBLE and not b.GetIsAromatic()
            and b.GetBeginAtom().GetSymbol() == "C" and b.GetEndAtom().GetSymbol() == "C")


def allyl_partners(mol, a):
    out = []
    for nb in a.GetNeighbors():
        if nb.GetSymbol() != "C":
            continue
        for bd in nb.GetBonds():
            c = bd.GetOtherAtom(nb)
            if c.GetIdx() != a.GetIdx() and is_cc_double(bd):
                out.append((nb.GetIdx(), c.GetIdx()))
    return out


def site_class(mol, a):
    if a.GetSymbol() != "C" or a.GetTotalNumHs() == 0:
        return -1
    if a.GetIsAromatic() or any(b.GetBondType() != Chem.BondType.SINGLE for b in a.GetBonds()):
        return VINYL
    if any(n.GetIsAromatic() for n in a.GetNeighbors()):
        return BENZYLIC
    if allyl_partners(mol, a):
        return ALLYLIC
    nc = sum(1 for n in a.GetNeighbors() if n.GetSymbol() == "C")
    return PRIMARY if nc <= 1 else SECONDARY if nc == 2 else TERTIARY


def with_x(mol, at, x, shift=None):
    rw = Chem.RWMol(Chem.AddHs(mol))
    a = rw.GetAtomWithIdx(at)
    h = next(n.GetIdx() for n in a.GetNeighbors() if n.GetAtomicNum() == 1)
    rw.RemoveAtom(h)
    target = at
    if shift:
        b, c = shift
        rw.GetBondBetweenAtoms(at, b).SetBondType(Chem.BondType.DOUBLE)
        rw.GetBondBetweenAtoms(b, c).SetBondType(Chem.BondType.SINGLE)
        target = c
    xi = rw.AddAtom(Chem.Atom(x))
    rw.AddBond(target, xi, Chem.BondType.SINGLE)
    m = rw.GetMol()
    Chem.SanitizeMol(m)
    return nostereo(Chem.RemoveHs(m))


def expected_subst(mol, x, classes):
    out = set()
    for a in mol.GetAtoms():
        c = site_class(mol, a)
        if c not in classes:
            continue
        out.add(with_x(mol, a.GetIdx(), x))
        if c in (ALLYLIC, BENZYLIC):
            for sh in allyl_partners(mol, a):
                out.add(with_x(mol, a.GetIdx(), x, sh))
    return out


def expected_hbr(mol):
    out = set()
    for bd in mol.GetBonds():
        if not is_cc_double(bd):
            continue
        p, q = bd.GetBeginAtom(), bd.GetEndAtom()
        dp, dq = p.GetDegree(), q.GetDegree()
        ends = [p, q] if dp == dq else [p if dp < dq else q]
        for br in ends:
            other = q if br is p else p
            rw = Chem.RWMol(mol)
            rw.GetBondBetweenAtoms(p.GetIdx(), q.GetIdx()).SetBondType(Chem.BondType.SINGLE)
            o = rw.GetAtomWithIdx(other.GetIdx())
            o.SetNumExplicitHs(o.GetTotalNumHs() + 1)
            o.SetNoImplicit(True)
            b = rw.GetAtomWithIdx(br.GetIdx())
            b.SetNumExplicitHs(b.GetTotalNumHs())
            b.SetNoImplicit(True)
            xi = rw.AddAtom(Chem.Atom("Br"))
            rw.AddBond(br.GetIdx(), xi, Chem.BondType.SINGLE)
            m = rw.GetMol()
            Chem.SanitizeMol(m)
            out.add(nostereo(m))
    return out


def formula_of(smi):
    f = rdMolDescriptors.CalcMolFormula(Chem.MolFromSmiles(smi))
    return f.rstrip("+-0123456789") if f[-1] in "+-" or (len(f) > 1 and f[-2] in "+-") else f


def plain_formula(mol):
    m = Chem.Mol(mol)
    for a in m.GetAtoms():
        a.SetIsotope(0)
    f = rdMolDescriptors.CalcMolFormula(m)
    while f and (f[-1] in "+-" or (f[-1].isdigit() and ("+" in f or "-" in f))):
        f = f[:-1]
    return f


def partition(ids):
    groups = {}
    for i, c in enumerate(ids):
        groups.setdefault(c, set()).add(i)
    return sorted(sorted(g) for g in groups.values())


def main():
    lines = [l.strip() for l in open(DATA) if l.strip() and not l.startswith("#")]
    wrap = os.environ.get("HL_WRAP", "").split()
    res = subprocess.run(wrap + [TOOL], input="\n".join(lines) + "\n", capture_output=True,
                         text=True, timeout=120)
    if res.returncode != 0:
        print(res.stderr)
        print("tool_chem failed with status", res.returncode)
        return 1
    out = [json.loads(l) for l in res.stdout.splitlines()]
    if len(out) != len(lines):
        print(f"expected {len(lines)} lines, got {len(out)}")
        return 1
    fails = []
    counts = dict(formula=0, mass=0, sym=0, site=0, written=0, products=0)
    for smi, r in zip(lines, out):
        mol = Chem.MolFromSmiles(smi)
        if mol is None or not r.get("ok"):
            fails.append(f"{smi}: rdkit ok={mol is not None}, ours ok={r.get('ok')} {r.get('msg', '')}")
            continue
        iso = any(a.GetIsotope() for a in mol.GetAtoms())
        f = plain_formula(mol)
        if r["formula"] != f:
            fails.append(f"{smi}: formula {r['formula']} != RDKit {f}")
        else:
            counts["formula"] += 1
        mw = Descriptors.MolWt(mol)
        if not iso:
            if abs(r["molar_mass"] - mw) > 2e-4 * mw:
                fails.append(f"{smi}: molar mass {r['molar_mass']} vs RDKit {mw}")
            else:
                counts["mass"] += 1
        ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False))
        if len(r["sym"]) != mol.GetNumAtoms() or partition(r["sym"]) != partition(ranks):
            fails.append(f"{smi}: symmetry {partition(r['sym'])} vs RDKit {partition(ranks)}")
        else:
            counts["sym"] += 1
        sc = [site_class(mol, a) for a in mol.GetAtoms()]
        if sc != r["site"]:
            fails.append(f"{smi}: site classes {r['site']} vs {sc}")
        else:
            counts["site"] += 1
        if canon(r.get("written", "")) != nostereo(mol):
            fails.append(f"{smi}: written {r.get('written')} is not the same molecule")
        else:
            counts["written"] += 1
        ok = True
        for key, exp, x in (("cl2", expected_subst(mol, "Cl", {0, 1, 2, 3, 4}), "Cl"),
                            ("nbs", expected_subst(mol, "Br", {3, 4}), "Br"),
                            ("hbr", expected_hbr(mol), "Br")):
            got = r[key]
            if isinstance(got, dict):
                if exp:
                    fails.append(f"{smi}: {key} refused ({got['error']}) but RDKit finds {sorted(exp)}")
                    ok = False
                continue
            cs = [canon(p["smiles"]) for p in got]
            if None in cs:
                fails.append(f"{smi}: {key} product not valid SMILES: {[p['smiles'] for p in got]}")
                ok = False
                continue
            if set(cs) != exp or len(cs) != len(set(cs)):
                fails.append(f"{smi}: {key} products {sorted(cs)} vs RDKit {sorted(exp)}")
                ok = False
            tot = sum(p["fraction"] for p in got)
            if abs(tot - 1) > 1e-12:
                fails.append(f"{smi}: {key} shares sum to {tot}")
                ok = False
            # formula: one H traded for X (substitution) or HBr added
            base = Chem.AddHs(mol)
            nh = sum(1 for a in base.GetAtoms() if a.GetAtomicNum() == 1)
            for c in cs:
                pm = Chem.AddHs(Chem.MolFromSmiles(c))
                ph = sum(1 for a in pm.GetAtoms() if a.GetAtomicNum() == 1)
                px = sum(1 for a in pm.GetAtoms() if a.GetSymbol() == x) - \
                    sum(1 for a in base.GetAtoms() if a.GetSymbol() == x)
                dh = 1 if key == "hbr" else -1
                if ph - nh != dh or px != 1 or pm.GetNumHeavyAtoms() != mol.GetNumHeavyAtoms() + 1:
                    fails.append(f"{smi}: {key} product {c} has the wrong formula")
                    ok = False
        counts["products"] += ok
    for f in fails:
        print("FAIL", f)
    n = len(lines)
    summary = ", ".join(f"{k} {v}/{n}" for k, v in counts.items())
    print(f"rdkit_chem: {n} molecules; {summary}; {len(fails)} failures")
    return 1 if fails else 0


if __name__ == "__main__":
    sys.exit(main())
