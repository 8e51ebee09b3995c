/*
 * smiles.h - SMILES (OpenSMILES v1.0 subset) to a molecule graph and back.
 *
 * Read: organic-subset atoms with implicit H by the normal-valence rule,
 * bracket atoms [isotope symbol chirality Hn charge :class], aromatic
 * lowercase atoms, bonds - = # : / \, branches and ring closures (0-9, %nn).
 * The reader is strict: every malformed string is refused with the 1-based
 * column and a reason.  One connected molecule only ('.' is refused).  An aromatic
 * system must have a Kekule structure, as RDKit requires (Cc1cccc1, c1ccnc1 are refused at
 * the system's first atom), and bracket atoms keep to their valences for their charge.
 * Stereo marks (@, /, \) are accepted and dropped: the models are
 * constitutional.  Write: any valid SMILES of the graph (not canonical).
 */
#ifndef SMILES_H
#define SMILES_H

#include "formula.h"
#include "hlerr.h"

#define SMI_AROMATIC 4 /* bond order code of an aromatic bond */

struct smi_atom {
    int el;       /* enum elem_id */
    int isotope;  /* mass number, 0 = natural abundance */
    int charge;
    int hcount;   /* hydrogens attached (implicit or bracket count), not graph atoms */
    int aromatic; /* written lowercase */
    int bracket;  /* given in [] in the source */
    int aclass;   /* atom class (:n), 0 = none */
    int in_ring;  /* on a cycle of the graph (set by smiles_reindex) */
    int col;      /* 1-based column in the source, 0 when made by code */
};

struct smi_bond {
    int a, b;     /* atom indices */
    int order;    /* 1, 2, 3 or SMI_AROMATIC */
    int in_ring;  /* not a bridge (set by smiles_reindex) */
};

struct smi_mol {
    struct smi_atom *atoms; int natoms, cap_atoms;
    struct smi_bond *bonds; int nbonds, cap_bonds;
    int *adj_start; /* CSR: bonds of atom i are adj[adj_start[i] .. adj_start[i+1]-1] */
    int *adj;       /* bond indices */
};

/* Parse text into *m (zeroed first). On HL_ERR_INPUT e->col is the 1-based column
 * of the fault (1 for an empty string) and e->msg the reason; e->field is left ""
 * for the caller to fill. m is owned by the caller: smiles_free (also after errors). */
enum hl_status smiles_parse(const char *text, struct smi_mol *m, struct hl_err *e);

/* Release the arrays of m and zero it; safe on a zeroed molecule. */
void smiles_free(struct smi_mol *m);

/* Element counts including hydrogens, and molar mass [g/mol] (CIAAW standard
 * weights: an isotope label does not change the mass used). */
void smiles_formula(const struct smi_mol *m, struct formula *f);
double smiles_molar_mass_g_mol(const struct smi_mol *m);

/* A valid SMILES for m into *out (caller frees with hl_free). Not canonical;
 * HL_ERR_INPUT if more than 99 ring closures would be open at once. */
enum hl_status smiles_write(const struct smi_mol *m, char **out, struct hl_err *e);

/* Editing, for product structures: deep copy; append an atom (no bonds, H 0;
 * returns its index or -1 on NOMEM); append a bond (HL_ERR_NOMEM); index of the
 * bond between a and b or -1. After edits call smiles_reindex (adjacency, rings). */
enum hl_status smiles_copy(const struct smi_mol *src, struct smi_mol *dst, struct hl_err *e);
int smiles_add_atom(struct smi_mol *m, int el);
enum hl_status smiles_add_bond(struct smi_mol *m, int a, int b, int order, struct hl_err *e);
int smiles_find_bond(const struct smi_mol *m, int a, int b);
enum hl_status smiles_reindex(struct smi_mol *m, struct hl_err *e);

/* Other end of bond b seen from atom a. */
static inline int smiles_other(const struct smi_mol *m, int b, int a)
{
    return m->bonds[b].a == a ? m->bonds[b].b : m->bonds[b].a;
}

/* Number of graph neighbours of atom a. */
static inline int smiles_degree(const struct smi_mol *m, int a)
{
    return m->adj_start[a + 1] - m->adj_start[a];
}

/* H that the normal-valence rule gives atom a from its bonds, as if it were
 * written without brackets; -1 if it is not an organic-subset atom or the bond
 * orders exceed every normal valence. */
int smiles_implicit_h(const struct smi_mol *m, int a);

#endif
