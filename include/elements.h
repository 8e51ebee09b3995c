/*
 * elements.h - CIAAW 2021 standard atomic weights (abridged, conventional values).
 *
 * Elements are addressed by a small dense index (enum elem_id) so that a
 * formula is a fixed array of counts.  The table covers the elements a
 * halogenation plant meets in substrates, reagents, scrubber salts and the
 * organic subset of SMILES.
 */
#ifndef ELEMENTS_H
#define ELEMENTS_H

#include <stddef.h>

/* The weights of the elements that static tables (reagents, vent gases, salts) sum at
 * compile time: the one copy of these values, which the table in elements.c uses too. */
#define ELEM_W_H 1.008
#define ELEM_W_C 12.011
#define ELEM_W_N 14.007
#define ELEM_W_O 15.999
#define ELEM_W_NA 22.990
#define ELEM_W_S 32.06
#define ELEM_W_CL 35.45
#define ELEM_W_BR 79.904

enum elem_id {
    EL_H, EL_He, EL_Li, EL_Be, EL_B, EL_C, EL_N, EL_O, EL_F, EL_Ne,
    EL_Na, EL_Mg, EL_Al, EL_Si, EL_P, EL_S, EL_Cl, EL_Ar, EL_K, EL_Ca,
    EL_Ti, EL_Cr, EL_Mn, EL_Fe, EL_Co, EL_Ni, EL_Cu, EL_Zn, EL_Ga, EL_Ge,
    EL_As, EL_Se, EL_Br, EL_Kr, EL_Rb, EL_Sr, EL_Ag, EL_Sn, EL_Sb, EL_Te,
    EL_I, EL_Xe, EL_Cs, EL_Ba, EL_Pt, EL_Au, EL_Hg, EL_Pb, EL_Bi,
    EL_COUNT
};

/* Element symbol ("Cl") of an index; NULL if out of range. Static string. */
const char *elem_symbol(int el);
/* Standard atomic weight [g/mol] (CIAAW 2021 abridged/conventional); 0 if out of range. */
double elem_weight_g_mol(int el);
/* Atomic number Z of an index; 0 if out of range. */
int elem_z(int el);
/* Index of a symbol given by its first len bytes (case-sensitive), -1 if unknown. */
int elem_lookup(const char *sym, size_t len);

#endif
