/*
 * sites.h - C-H site classes, symmetry classes and product structures.
 *
 * Symmetry classes come from iterative refinement of atom invariants
 * (element, heavy degree, H count, charge, isotope, ring membership,
 * aromaticity; then the multiset of neighbour classes with bond orders,
 * repeated until the number of classes is stable; computed with splitter queues in
 * O((n + m) log^2 n)), the grouping RDKit's
 * CanonicalRankAtoms(breakTies=False) gives on ordinary molecules.
 * Structure equality is graph isomorphism (backtracking over atoms in
 * breadth-first order, candidates pruned by the refined classes of the two
 * graphs refined together).
 */
#ifndef SITES_H
#define SITES_H

#include "hlerr.h"
#include "smiles.h"

/* Class of a C-H for radical abstraction. */
enum site_class {
    SITE_PRIMARY, SITE_SECONDARY, SITE_TERTIARY, SITE_BENZYLIC, SITE_ALLYLIC,
    SITE_VINYL_ARYL, /* unreactive to radical substitution */
    SITE_CLASS_COUNT
};


/* Symmetry class of every atom into cls[m->natoms] (ids 0..*nclass-1, equal id =
 * topologically equivalent). HL_ERR_NOMEM only. */
enum hl_status sites_symmetry(const struct smi_mol *m, int *cls, int *nclass, struct hl_err *e);

/* 1 if a and b are the same constitution (stereo is not represented), 0 if not,
 * -1 on NOMEM or when the search exceeded its step limit (e is set). Hydrogen
 * counts, charges and isotopes must agree; bond orders must agree, except that a
 * ring written in Kekule form matches its aromatic form (then orders 1, 2 and
 * aromatic count as one kind; the H count of each atom still fixes the molecule). */
int sites_same(const struct smi_mol *a, const struct smi_mol *b, struct hl_err *e);

/* Site class (enum site_class) of the H on atom a, or -1 when a is not a carbon
 * carrying H. sp3 C next to an aromatic atom: benzylic; next to a non-aromatic
 * C=C: allylic (benzylic wins); otherwise by carbon neighbours (0-1 primary,
 * 2 secondary, 3 tertiary). Any multiple or aromatic bond on a: vinylic/aryl. */
int sites_class(const struct smi_mol *m, int a);

/* 1 if bond bd is a non-aromatic C=C. */
int sites_is_cc_double(const struct smi_mol *m, int bd);

/* Allylic partners of sp3 carbon a: pairs (b, c) with a-b single and b=c a
 * non-aromatic C=C. Writes up to max pairs into b_out/c_out, returns the count. */
int sites_allyl_partners(const struct smi_mol *m, int a, int *b_out, int *c_out, int max);

/* Carbon(s) of C=C bond bd that receive Br in radical (anti-Markovnikov) HBr
 * addition: the end with fewer heavy neighbours; both ends on a tie. Returns 1 or 2. */
int sites_hbr_br_ends(const struct smi_mol *m, int bd, int *ends);

/* Products into *out (caller: smiles_free).
 * substitute: count H on carbon a replaced by element x_el.
 * allyl_shift: one H leaves a, x_el goes to c, a-b becomes double, b=c single.
 * hbr_adduct: for each of n C=C bonds[i], Br on br_at[i] and H on the other end. */
enum hl_status sites_substitute(const struct smi_mol *m, int a, int count, int x_el,
                                struct smi_mol *out, struct hl_err *e);
enum hl_status sites_allyl_shift(const struct smi_mol *m, int a, int b, int c, int x_el,
                                 struct smi_mol *out, struct hl_err *e);
enum hl_status sites_hbr_adduct(const struct smi_mol *m, const int *bonds, const int *br_at, int n,
                                struct smi_mol *out, struct hl_err *e);

#endif
