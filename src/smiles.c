/*
 * smiles.c - OpenSMILES v1.0 subset reader and a plain writer (see smiles.h).
 *
 * The reader is a single left-to-right pass with an explicit branch stack, so
 * nesting depth is limited only by memory.  Bonds written without a symbol
 * are resolved after the pass: aromatic when both ends are aromatic and the
 * bond lies on a ring, single otherwise (a bond between two aromatic rings,
 * as in biphenyl, is single).  Implicit hydrogens follow the OpenSMILES
 * normal-valence rule: the lowest normal valence >= the bond-order sum; for
 * an aromatic atom one more unit is taken by the pi system, so c in benzene
 * has 1 H and n in pyridine none (aromatic atoms use their lowest valence).
 * Bracket [H] atoms with one heavy neighbour are folded into that atom's
 * hydrogen count, as RDKit does by default.
 */
#include "smiles.h"
#include "elements.h"
#include "hlmem.h"

#include <stdio.h>
#include <string.h>

#define NRING 100 /* ring-closure numbers 0..99 */

/* Sets e to out of memory and returns HL_ERR_NOMEM. */
static enum hl_status nomem(struct hl_err *e) { return hl_err_set(e, HL_ERR_NOMEM, "out of memory"); }

/* Sets e to an input error at column col (fmt takes one %s: arg, or "" when NULL) and
 * returns HL_ERR_INPUT. */
static enum hl_status bad(struct hl_err *e, int col, const char *fmt, const char *arg)
{
    hl_err_at(e, HL_ERR_INPUT, 0, col, "", fmt, arg ? arg : "");
    return HL_ERR_INPUT;
}

void smiles_free(struct smi_mol *m)
{
    if (!m)
        return;
    hl_free(m->atoms);
    hl_free(m->bonds);
    hl_free(m->adj_start);
    hl_free(m->adj);
    memset(m, 0, sizeof *m);
}

int smiles_add_atom(struct smi_mol *m, int el)
{
    if (m->natoms == m->cap_atoms) {
        int cap = m->cap_atoms ? 2 * m->cap_atoms : 16;
        struct smi_atom *p = hl_realloc(m->atoms, (size_t)cap * sizeof *p);
        if (!p)
            return -1;
        m->atoms = p;
        m->cap_atoms = cap;
    }
    struct smi_atom *a = &m->atoms[m->natoms];
    memset(a, 0, sizeof *a);
    a->el = el;
    return m->natoms++;
}

enum hl_status smiles_add_bond(struct smi_mol *m, int a, int b, int order, struct hl_err *e)
{
    if (m->nbonds == m->cap_bonds) {
        int cap = m->cap_bonds ? 2 * m->cap_bonds : 16;
        struct smi_bond *p = hl_realloc(m->bonds, (size_t)cap * sizeof *p);
        if (!p)
            return nomem(e);
        m->bonds = p;
        m->cap_bonds = cap;
    }
    struct smi_bond *bd = &m->bonds[m->nbonds++];
    bd->a = a;
    bd->b = b;
    bd->order = order;
    bd->in_ring = 0;
    return HL_OK;
}

int smiles_find_bond(const struct smi_mol *m, int a, int b)
{
    if (m->adj_start) {
        for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++)
            if (smiles_other(m, m->adj[k], a) == b)
                return m->adj[k];
        return -1;
    }
    for (int i = 0; i < m->nbonds; i++)
        if ((m->bonds[i].a == a && m->bonds[i].b == b) || (m->bonds[i].a == b && m->bonds[i].b == a))
            return i;
    return -1;
}

enum hl_status smiles_copy(const struct smi_mol *src, struct smi_mol *dst, struct hl_err *e)
{
    memset(dst, 0, sizeof *dst);
    int na = src->natoms > 0 ? src->natoms : 1, nb = src->nbonds > 0 ? src->nbonds : 1;
    dst->atoms = hl_malloc((size_t)na * sizeof *dst->atoms);
    dst->bonds = hl_malloc((size_t)nb * sizeof *dst->bonds);
    if (!dst->atoms || !dst->bonds) {
        smiles_free(dst);
        return nomem(e);
    }
    if (src->natoms)
        memcpy(dst->atoms, src->atoms, (size_t)src->natoms * sizeof *dst->atoms);
    if (src->nbonds)
        memcpy(dst->bonds, src->bonds, (size_t)src->nbonds * sizeof *dst->bonds);
    dst->natoms = src->natoms;
    dst->cap_atoms = na;
    dst->nbonds = src->nbonds;
    dst->cap_bonds = nb;
    enum hl_status st = smiles_reindex(dst, e);
    if (st)
        smiles_free(dst);
    return st;
}

/* Bridges by Tarjan's low-link, iteratively: a bond is on a ring iff it is no bridge. */
static enum hl_status find_rings(struct smi_mol *m, struct hl_err *e)
{
    int n = m->natoms;
    int *disc = hl_malloc((size_t)(n ? n : 1) * 4 * sizeof *disc);
    if (!disc)
        return nomem(e);
    int *low = disc + n, *pbond = low + n, *it = pbond + n;
    int *stack = hl_malloc((size_t)(n ? n : 1) * sizeof *stack);
    if (!stack) {
        hl_free(disc);
        return nomem(e);
    }
    for (int i = 0; i < n; i++) {
        disc[i] = -1;
        pbond[i] = -1;
        it[i] = m->adj_start[i];
        m->atoms[i].in_ring = 0;
    }
    for (int i = 0; i < m->nbonds; i++)
        m->bonds[i].in_ring = 1;
    int t = 0;
    for (int r = 0; r < n; r++) {
        if (disc[r] >= 0)
            continue;
        int sp = 0;
        stack[sp++] = r;
        disc[r] = low[r] = t++;
        while (sp) {
            int v = stack[sp - 1];
            if (it[v] < m->adj_start[v + 1]) {
                int b = m->adj[it[v]++];
                if (b == pbond[v])
                    continue;
                int w = smiles_other(m, b, v);
                if (disc[w] < 0) {
                    pbond[w] = b;
                    disc[w] = low[w] = t++;
                    stack[sp++] = w;
                } else if (disc[w] < low[v]) {
                    low[v] = disc[w];
                }
            } else {
                sp--;
                if (pbond[v] >= 0) {
                    int u = smiles_other(m, pbond[v], v);
                    if (low[v] < low[u])
                        low[u] = low[v];
                    if (low[v] > disc[u])
                        m->bonds[pbond[v]].in_ring = 0;
                }
            }
        }
    }
    for (int i = 0; i < m->nbonds; i++)
        if (m->bonds[i].in_ring)
            m->atoms[m->bonds[i].a].in_ring = m->atoms[m->bonds[i].b].in_ring = 1;
    hl_free(stack);
    hl_free(disc);
    return HL_OK;
}

enum hl_status smiles_reindex(struct smi_mol *m, struct hl_err *e)
{
    hl_free(m->adj_start);
    hl_free(m->adj);
    m->adj = NULL;
    m->adj_start = hl_calloc((size_t)m->natoms + 1, sizeof *m->adj_start);
    if (!m->adj_start)
        return nomem(e);
    m->adj = hl_malloc((size_t)(m->nbonds ? 2 * m->nbonds : 1) * sizeof *m->adj);
    if (!m->adj) {
        hl_free(m->adj_start);
        m->adj_start = NULL;
        return nomem(e);
    }
    for (int i = 0; i < m->nbonds; i++) {
        m->adj_start[m->bonds[i].a + 1]++;
        m->adj_start[m->bonds[i].b + 1]++;
    }
    for (int i = 0; i < m->natoms; i++)
        m->adj_start[i + 1] += m->adj_start[i];
    int *fill = hl_malloc((size_t)(m->natoms ? m->natoms : 1) * sizeof *fill);
    if (!fill) {
        hl_free(m->adj_start);
        hl_free(m->adj);
        m->adj_start = m->adj = NULL;
        return nomem(e);
    }
    memcpy(fill, m->adj_start, (size_t)m->natoms * sizeof *fill);
    for (int i = 0; i < m->nbonds; i++) {
        m->adj[fill[m->bonds[i].a]++] = i;
        m->adj[fill[m->bonds[i].b]++] = i;
    }
    hl_free(fill);
    return find_rings(m, e);
}

/* ---- valence ---------------------------------------------------------------- */

/* Normal valences of the organic subset (OpenSMILES), ascending; 0 ends the list. */
static const int *normal_valences(int el)
{
    static const int v_b[] = {3, 0}, v_c[] = {4, 0}, v_n[] = {3, 5, 0}, v_o[] = {2, 0},
                     v_p[] = {3, 5, 0}, v_s[] = {2, 4, 6, 0}, v_x[] = {1, 0};
    switch (el) {
    case EL_B: return v_b;
    case EL_C: return v_c;
    case EL_N: return v_n;
    case EL_O: return v_o;
    case EL_P: return v_p;
    case EL_S: return v_s;
    case EL_F: case EL_Cl: case EL_Br: case EL_I: return v_x;
    default: return NULL;
    }
}

/* Valence units atom a spends on its bonds in m (an aromatic bond counts 1). */
static int bond_sum(const struct smi_mol *m, int a)
{
    int s = 0;
    for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++) {
        int o = m->bonds[m->adj[k]].order;
        s += o == SMI_AROMATIC ? 1 : o;
    }
    return s;
}

/* Highest valence of a bracket atom of the organic subset with the given charge, the
 * isoelectronic rule RDKit applies ([NH4+] as C, [O-] as F, [S+] as P); -1 when not checked. */
static int bracket_valence_max(int el, int charge)
{
    switch (el) {
    case EL_B: return charge == 0 ? 3 : charge == -1 ? 4 : charge == 1 ? 2 : -1;
    case EL_N: return charge == 0 ? 3 : charge == 1 ? 4 : charge == -1 ? 2 : -1;
    case EL_O: return charge == 0 ? 2 : charge == 1 ? 3 : charge == -1 ? 1 : -1;
    case EL_P: return charge == 0 ? 5 : charge == 1 ? 4 : charge == -1 ? 4 : -1;
    case EL_S: return charge == 0 ? 6 : charge == 1 ? 5 : charge == -1 ? 5 : -1;
    case EL_F: case EL_Cl: case EL_Br: case EL_I: return charge == 0 ? 1 : -1;
    default: return -1;
    }
}

/* 1 if aromatic atom a gives its pi unit to the ring: not when an exocyclic double bond
 * already takes it (the C=O carbon of 2-pyridone, O=c1cccc[nH]1, which RDKit reads). */
static int pi_unit(const struct smi_mol *m, int a)
{
    if (!m->atoms[a].aromatic)
        return 0;
    for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++)
        if (m->bonds[m->adj[k]].order == 2 || m->bonds[m->adj[k]].order == 3)
            return 0;
    return 1;
}

int smiles_implicit_h(const struct smi_mol *m, int a)
{
    const int *v = normal_valences(m->atoms[a].el);
    if (!v)
        return -1;
    int s = bond_sum(m, a);
    int vmax = 0;
    for (int i = 0; v[i]; i++)
        vmax = v[i];
    if (s > vmax)
        return -1;
    if (m->atoms[a].aromatic) {
        int h = v[0] - s - 1; /* the pi system takes one unit */
        return h > 0 ? h : 0;
    }
    for (int i = 0; v[i]; i++)
        if (v[i] >= s)
            return v[i] - s;
    return -1;
}

/* ---- reader ------------------------------------------------------------------- */

struct ring_open { int atom, order, col; };
struct parser {
    const char *s;
    struct smi_mol *m;
    int *bcol;        /* per bond: column of its symbol or of the later atom, for messages */
    int cap_bcol;
};

/* Element of the aromatic symbol at p (se, as, b c n o p s; *len its characters), or -1. */
static int aromatic_el(const char *p, int *len)
{
    *len = 1;
    if (p[0] == 's' && p[1] == 'e') { *len = 2; return EL_Se; }
    if (p[0] == 'a' && p[1] == 's') { *len = 2; return EL_As; }
    switch (p[0]) {
    case 'b': return EL_B;
    case 'c': return EL_C;
    case 'n': return EL_N;
    case 'o': return EL_O;
    case 'p': return EL_P;
    case 's': return EL_S;
    default: return -1;
    }
}

/* ASCII digit test, locale-free. */
static int is_digit(char c) { return c >= '0' && c <= '9'; }

/* Chirality after a bracket atom's symbol at s[*j] (accepted, not modelled): @, @@, @TH1-2,
 * @AL1-2, @SP1-3, @TB1-20, @OH1-30. Moves *j past it; nothing there is no error. */
static enum hl_status read_chirality(const char *s, int *pj, struct hl_err *e)
{
    int j = *pj;
    if (s[j] == '@') {
        int ccol = j + 1;
        j++;
        if (s[j] == '@') {
            j++;
        } else if (s[j] >= 'A' && s[j] <= 'Z' && s[j + 1] >= 'A' && s[j + 1] <= 'Z') {
            static const struct { const char *tag; int max; } tags[] = {
                {"TH", 2}, {"AL", 2}, {"SP", 3}, {"TB", 20}, {"OH", 30}};
            int found = -1;
            for (int t = 0; t < 5; t++)
                if (s[j] == tags[t].tag[0] && s[j + 1] == tags[t].tag[1])
                    found = t;
            if (found < 0 || !is_digit(s[j + 2]))
                return bad(e, ccol, "unknown chirality class%s", NULL);
            j += 2;
            int v = 0;
            while (is_digit(s[j]) && v <= 99)
                v = v * 10 + (s[j++] - '0');
            if (v < 1 || v > tags[found].max)
                return bad(e, ccol, "chirality class number out of range%s", NULL);
        }
    }
    *pj = j;
    return HL_OK;
}

/* Charge of a bracket atom at s[*j]: +, ++, -, --, +N or -N (N 1..15); gives *charge (0
 * when none) and moves *j past it. */
static enum hl_status read_charge(const char *s, int *pj, int *charge_out, struct hl_err *e)
{
    int j = *pj;
    int charge = 0;
    if (s[j] == '+' || s[j] == '-') {
        int ccol = j + 1;
        char sign = s[j++];
        int mag = 1;
        if (s[j] == sign) {
            j++;
            mag = 2;
            if (s[j] == sign || s[j] == '+' || s[j] == '-')
                return bad(e, ccol, "bad charge: write +3 rather than repeating the sign%s", NULL);
        } else if (is_digit(s[j])) {
            mag = 0;
            int nd = 0;
            while (is_digit(s[j])) {
                if (++nd > 2)
                    return bad(e, ccol, "bad charge: at most 15%s", NULL);
                mag = mag * 10 + (s[j++] - '0');
            }
            if (mag == 0 || mag > 15)
                return bad(e, ccol, "bad charge: magnitude must be 1..15%s", NULL);
        }
        if (s[j] == '+' || s[j] == '-')
            return bad(e, ccol, "bad charge%s", NULL);
        charge = sign == '+' ? mag : -mag;
    }
    *charge_out = charge;
    *pj = j;
    return HL_OK;
}

/* Atom class of a bracket atom at s[*j]: ':' and up to 6 digits; gives *aclass (0 when
 * none) and moves *j past it. */
static enum hl_status read_atom_class(const char *s, int *pj, int *aclass_out, struct hl_err *e)
{
    int j = *pj;
    int aclass = 0;
    if (s[j] == ':') {
        int ccol = j + 1;
        j++;
        if (!is_digit(s[j]))
            return bad(e, ccol, "atom class ':' needs a number%s", NULL);
        int nd = 0;
        while (is_digit(s[j])) {
            if (++nd > 6)
                return bad(e, ccol, "atom class number too long%s", NULL);
            aclass = aclass * 10 + (s[j++] - '0');
        }
    }
    *aclass_out = aclass;
    *pj = j;
    return HL_OK;
}

/* Bracket atom at s[i] == '[': adds the atom to P->m (*atom its index); *end is the index
 * after ']'. An error names the column. */
static enum hl_status read_bracket(struct parser *P, int i, int *end, int *atom, struct hl_err *e)
{
    const char *s = P->s;
    int open = i + 1, j = i + 1;
    int iso = 0, ndig = 0;
    while (is_digit(s[j])) {
        if (++ndig > 3)
            return bad(e, j + 1, "isotope mass number longer than 3 digits%s", NULL);
        iso = iso * 10 + (s[j] - '0');
        j++;
    }
    if (ndig && iso == 0)
        return bad(e, i + 2, "isotope mass number 0 is not a nuclide%s", NULL);
    int symcol = j + 1, el = -1, len = 0, arom = 0;
    if (s[j] >= 'A' && s[j] <= 'Z') {
        if (s[j + 1] >= 'a' && s[j + 1] <= 'z' && (el = elem_lookup(s + j, 2)) >= 0)
            len = 2;
        else if ((el = elem_lookup(s + j, 1)) >= 0)
            len = 1;
    } else if (s[j] >= 'a' && s[j] <= 'z') {
        el = aromatic_el(s + j, &len);
        arom = 1;
    } else if (s[j] == '*') {
        return bad(e, symcol, "wildcard atom '*' is not a substance%s", NULL);
    }
    if (el < 0) {
        char sym[3] = {s[j], 0, 0};
        if (s[j] && s[j + 1] >= 'a' && s[j + 1] <= 'z')
            sym[1] = s[j + 1];
        if (!s[j] || s[j] == ']')
            return bad(e, symcol, "bracket atom without an element symbol%s", NULL);
        return bad(e, symcol, "unknown element '%s'", sym);
    }
    j += len;
    if (iso && (iso < elem_z(el) || iso > 300)) {
        hl_err_at(e, HL_ERR_INPUT, 0, open + 1, "",
                  "isotope mass number %d is impossible for %s (Z = %d)", iso, elem_symbol(el),
                  elem_z(el));
        return HL_ERR_INPUT;
    }
    enum hl_status st;
    if ((st = read_chirality(s, &j, e)))
        return st;
    int h = 0;
    if (s[j] == 'H') {
        j++;
        h = 1;
        if (is_digit(s[j]))
            h = s[j++] - '0';
    }
    int charge;
    if ((st = read_charge(s, &j, &charge, e)))
        return st;
    int aclass;
    if ((st = read_atom_class(s, &j, &aclass, e)))
        return st;
    if (s[j] != ']') {
        if (!s[j])
            return bad(e, open, "bracket atom not closed with ']'%s", NULL);
        char c[2] = {s[j], 0};
        return bad(e, j + 1, "unexpected '%s' in bracket atom", c);
    }
    int a = smiles_add_atom(P->m, el);
    if (a < 0)
        return nomem(e);
    struct smi_atom *at = &P->m->atoms[a];
    at->isotope = iso;
    at->charge = charge;
    at->hcount = h;
    at->aromatic = arom;
    at->bracket = 1;
    at->aclass = aclass;
    at->col = open;
    *atom = a;
    *end = j + 1;
    return HL_OK;
}

/* Adds the bond a-b of the given order to P->m and keeps col (the column messages name for
 * it) in P->bcol, grown as needed (the parser owns it). HL_ERR_NOMEM on failure. */
static enum hl_status add_bond_col(struct parser *P, int a, int b, int order, int col, struct hl_err *e)
{
    if (P->m->nbonds == P->cap_bcol) {
        int cap = P->cap_bcol ? 2 * P->cap_bcol : 16;
        int *p = hl_realloc(P->bcol, (size_t)cap * sizeof *p);
        if (!p)
            return nomem(e);
        P->bcol = p;
        P->cap_bcol = cap;
    }
    P->bcol[P->m->nbonds] = col;
    return smiles_add_bond(P->m, a, b, order, e);
}

/* Order a bond symbol c stands for (1 for - / \, 2, 3, 5 for the refused '$',
 * SMI_AROMATIC for ':'), 0 when c is no bond symbol. */
static int bond_code(char c)
{
    switch (c) {
    case '-': case '/': case '\\': return 1;
    case '=': return 2;
    case '#': return 3;
    case '$': return 5; /* quadruple: recognised to give a clear refusal */
    case ':': return SMI_AROMATIC;
    default: return 0;
    }
}

/* Remove bracket [H] atoms that hang on one non-hydrogen atom: their count goes to it. */
static enum hl_status fold_hydrogens(struct smi_mol *m, struct hl_err *e)
{
    int n = m->natoms, removed = 0;
    int *map = hl_malloc((size_t)(n ? n : 1) * sizeof *map);
    if (!map)
        return nomem(e);
    for (int i = 0; i < n; i++) {
        map[i] = i;
        const struct smi_atom *a = &m->atoms[i];
        if (a->el != EL_H || a->isotope || a->charge || a->hcount || a->aclass ||
            smiles_degree(m, i) != 1)
            continue;
        int b = m->adj[m->adj_start[i]];
        int w = smiles_other(m, b, i);
        if (m->atoms[w].el == EL_H || m->bonds[b].order != 1)
            continue;
        m->atoms[w].hcount++;
        map[i] = -1;
        removed++;
    }
    if (!removed) {
        hl_free(map);
        return HL_OK;
    }
    int k = 0;
    for (int i = 0; i < n; i++)
        if (map[i] >= 0) {
            m->atoms[k] = m->atoms[i];
            map[i] = k++;
        }
    m->natoms = k;
    int nb = 0;
    for (int i = 0; i < m->nbonds; i++) {
        struct smi_bond bd = m->bonds[i];
        if (map[bd.a] < 0 || map[bd.b] < 0)
            continue;
        bd.a = map[bd.a];
        bd.b = map[bd.b];
        m->bonds[nb++] = bd;
    }
    m->nbonds = nb;
    hl_free(map);
    return smiles_reindex(m, e);
}

/* Kekule six-membered rings -> aromatic, so that C1=CC=CC=C1C and Cc1ccccc1 are one
 * molecule to the site and symmetry models. A ring qualifies when each of its six
 * atoms (C or N, uncharged) is already aromatic or has exactly one double bond and
 * its partner lies on the same ring; repeated until no ring changes (fused rings).
 * Five-membered Kekule rings (pyrrole, furan) are left as written. */
static int kek_candidate(const struct smi_mol *m, int a)
{
    const struct smi_atom *at = &m->atoms[a];
    if ((at->el != EL_C && at->el != EL_N) || at->charge || !at->in_ring)
        return 0;
    if (at->aromatic)
        return 1;
    int dbl = 0;
    for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++) {
        int o = m->bonds[m->adj[k]].order;
        if (o == 3)
            return 0;
        dbl += o == 2;
    }
    return dbl == 1;
}

/* 1 when the six-ring ring[0..5] of m can be taken as aromatic: each atom not yet aromatic
 * has its double bond to a ring neighbour. */
static int kek_ring_ok(const struct smi_mol *m, const int *ring)
{
    for (int i = 0; i < 6; i++) {
        int a = ring[i];
        if (m->atoms[a].aromatic)
            continue;
        int ok = 0;
        for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++) {
            int bd = m->adj[k];
            if (m->bonds[bd].order != 2)
                continue;
            int w = smiles_other(m, bd, a);
            ok = w == ring[(i + 1) % 6] || w == ring[(i + 5) % 6];
        }
        if (!ok)
            return 0;
    }
    return 1;
}

/* Marks the Kekule six-rings of m aromatic (atoms and ring bonds), repeated until no ring
 * changes, so that fused rings written with alternating bonds follow. */
static void aromatize_kekule(struct smi_mol *m)
{
    int changed = 1;
    while (changed) {
        changed = 0;
        for (int s0 = 0; s0 < m->natoms; s0++) {
            if (!kek_candidate(m, s0))
                continue;
            /* depth-first paths s0 - p1 - ... - p5 - s0 over candidate atoms > s0 */
            int path[6], it[6];
            path[0] = s0;
            it[0] = m->adj_start[s0];
            int d = 0;
            while (d >= 0) {
                int v = path[d];
                if (it[d] == m->adj_start[v + 1]) {
                    d--;
                    continue;
                }
                int bd = m->adj[it[d]++];
                int w = smiles_other(m, bd, v);
                if (!m->bonds[bd].in_ring)
                    continue;
                if (d == 5) {
                    if (w == s0 && path[1] < path[5] && kek_ring_ok(m, path)) {
                        int all = 1;
                        for (int i = 0; i < 6; i++)
                            all &= m->atoms[path[i]].aromatic;
                        if (!all) {
                            for (int i = 0; i < 6; i++) {
                                m->atoms[path[i]].aromatic = 1;
                                m->bonds[smiles_find_bond(m, path[i], path[(i + 1) % 6])].order =
                                    SMI_AROMATIC;
                            }
                            changed = 1;
                        }
                    }
                    continue;
                }
                if (w <= s0 || !kek_candidate(m, w))
                    continue;
                int dup = 0;
                for (int i = 1; i <= d; i++)
                    dup |= path[i] == w;
                if (dup)
                    continue;
                path[++d] = w;
                it[d] = m->adj_start[w];
            }
        }
    }
}

/* ---- kekulization check (issue 16.3) -------------------------------------------
 * An aromatic system is real only if it can be written with alternating single and double
 * bonds: every aromatic atom that still lacks one valence unit after its sigma bonds and H
 * (c in benzene, n in pyridine; not [nH], o, s or an n with three bonds) must get exactly one
 * double bond to such a neighbour over an aromatic bond, i.e. those atoms need a perfect
 * matching.  This is the test RDKit's kekulization applies ("Can't kekulize mol"): Cc1cccc1
 * (five such carbons), Cc1cc1 and c1ccnc1 have none.  Greedy matching, fewest free
 * neighbours first, settles ordinary systems; what it leaves goes to Edmonds' blossom search
 * (J. Edmonds, Can. J. Math. 1965, 17, 449), run per aromatic component so the work stays
 * within each ring system. */

/* 1 if aromatic atom a needs a double bond within the aromatic system. */
static int kek_needs_double(const struct smi_mol *m, int a)
{
    const struct smi_atom *at = &m->atoms[a];
    int used = at->hcount, q = at->charge, base, target;
    for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++) {
        int o = m->bonds[m->adj[k]].order;
        if (o == 2 || o == 3)
            return 0; /* an exocyclic C=O or similar already takes the pi unit */
        used += 1;
    }
    /* isoelectronic valences of a charged atom: N+ as C, O+ as N, C- as N, B- as C */
    switch (at->el) {
    case EL_B: base = 3; target = base - q; break;
    case EL_C: base = 4; target = base - (q < 0 ? -q : q); break;
    case EL_N: case EL_P: case EL_As: base = 3; target = base + q; break;
    case EL_O: case EL_S: case EL_Se: base = 2; target = base + q; break;
    default: return 0;
    }
    if ((at->el == EL_S || at->el == EL_P) && used > target)
        target += 2; /* hypervalent S(IV) or P(V) in the ring */
    return target - used >= 1;
}

struct kek {
    int n;
    const int *start, *nbr; /* local CSR */
    int *match, *par, *base, *q, *inq, *inb, *used;
};

/* Blossom search: the base of the blossom where the alternating paths from a and b meet
 * (K->used is scratch). */
static int kek_lca(struct kek *K, int a, int b)
{
    for (int i = 0; i < K->n; i++)
        K->used[i] = 0;
    for (;;) {
        a = K->base[a];
        K->used[a] = 1;
        if (K->match[a] < 0)
            break;
        a = K->par[K->match[a]];
    }
    for (;;) {
        b = K->base[b];
        if (K->used[b])
            return b;
        b = K->par[K->match[b]];
    }
}

/* Blossom search: marks the bases on the path from v up to base b as in the blossom and
 * points their parents across it (child: the atom v was reached from). */
static void kek_mark(struct kek *K, int v, int b, int child)
{
    while (K->base[v] != b) {
        K->inb[K->base[v]] = K->inb[K->base[K->match[v]]] = 1;
        K->par[v] = child;
        child = K->match[v];
        v = K->par[K->match[v]];
    }
}

/* Edmonds' search for an augmenting path from free vertex root; 1 if the matching grew. */
static int kek_augment(struct kek *K, int root)
{
    int n = K->n, qh = 0, qt = 0;
    for (int i = 0; i < n; i++) {
        K->par[i] = -1;
        K->base[i] = i;
        K->inq[i] = 0;
    }
    K->q[qt++] = root;
    K->inq[root] = 1;
    while (qh < qt) {
        int v = K->q[qh++];
        for (int k = K->start[v]; k < K->start[v + 1]; k++) {
            int to = K->nbr[k];
            if (K->base[v] == K->base[to] || K->match[v] == to)
                continue;
            if (to == root || (K->match[to] >= 0 && K->par[K->match[to]] >= 0)) {
                int cb = kek_lca(K, v, to);
                for (int i = 0; i < n; i++)
                    K->inb[i] = 0;
                kek_mark(K, v, cb, to);
                kek_mark(K, to, cb, v);
                for (int i = 0; i < n; i++)
                    if (K->inb[K->base[i]]) {
                        K->base[i] = cb;
                        if (!K->inq[i]) {
                            K->inq[i] = 1;
                            K->q[qt++] = i;
                        }
                    }
            } else if (K->par[to] < 0) {
                K->par[to] = v;
                if (K->match[to] < 0) { /* flip the path back to the root */
                    for (int u = to; u >= 0;) {
                        int pv = K->par[u], ppv = K->match[pv];
                        K->match[u] = pv;
                        K->match[pv] = u;
                        u = ppv;
                    }
                    return 1;
                }
                K->inq[K->match[to]] = 1;
                K->q[qt++] = K->match[to];
            }
        }
    }
    return 0;
}

/* One component of the atoms needing a double bond (need[]), over aromatic bonds, from root:
 * takes loc[] (-1 for atoms not yet in a component); gives its atoms comp[0..c-1] (root
 * first, breadth first), loc[atom] = its place there, and its adjacency over those places as
 * CSR start[0..c], nbr[]; returns c. The arrays are the caller's. */
static int kek_component(const struct smi_mol *m, const int *need, int root, int *loc, int *comp,
                         int *start, int *nbr)
{
    /* one component of the needing atoms over aromatic bonds, breadth first */
    int c = 0;
    comp[c] = root;
    loc[root] = c++;
    for (int h = 0; h < c; h++) {
        int v = comp[h];
        for (int k = m->adj_start[v]; k < m->adj_start[v + 1]; k++) {
            int bd = m->adj[k], w = smiles_other(m, bd, v);
            if (m->bonds[bd].order == SMI_AROMATIC && need[w] && loc[w] < 0) {
                comp[c] = w;
                loc[w] = c++;
            }
        }
    }
    int ne = 0;
    for (int h = 0; h < c; h++) {
        int v = comp[h];
        start[h] = ne;
        for (int k = m->adj_start[v]; k < m->adj_start[v + 1]; k++) {
            int bd = m->adj[k], w = smiles_other(m, bd, v);
            if (m->bonds[bd].order == SMI_AROMATIC && need[w])
                nbr[ne++] = loc[w];
        }
    }
    start[c] = ne;
    return c;
}

/* Greedy start of the matching on K (K->match all -1, nfree[h] = h's neighbour count): matches
 * atoms with few free neighbours first, so the augmenting search has little left to do.
 * freec[] (K->n places) is scratch. */
static void kek_greedy(struct kek *K, int *nfree, int *freec)
{
    const int *start = K->start, *nbr = K->nbr;
    int c = K->n;
    /* greedy: repeatedly match an atom with the fewest free neighbours (a bucket queue
     * would be exact; a stack of atoms left with one free neighbour is enough here) */
    int sp = 0;
    for (int h = 0; h < c; h++)
        if (nfree[h] == 1)
            freec[sp++] = h;
    for (int next = 0;;) {
        int v = -1;
        while (sp && v < 0) {
            int x = freec[--sp];
            if (K->match[x] < 0 && nfree[x] >= 1)
                v = x;
        }
        while (v < 0 && next < c) {
            if (K->match[next] < 0 && nfree[next] >= 1)
                v = next;
            next++;
        }
        if (v < 0)
            break;
        int w = -1;
        for (int k = start[v]; k < start[v + 1] && w < 0; k++)
            if (K->match[nbr[k]] < 0)
                w = nbr[k];
        if (w < 0) {
            nfree[v] = 0;
            continue;
        }
        K->match[v] = w;
        K->match[w] = v;
        for (int t = 0; t < 2; t++) {
            int x = t ? w : v;
            for (int k = start[x]; k < start[x + 1]; k++) {
                int y = nbr[k];
                if (K->match[y] < 0 && --nfree[y] == 1)
                    freec[sp++] = y;
            }
        }
    }
}

/* 0 with *bad_atom = -1 if every atom needing a double bond can get one, else *bad_atom = the
 * first atom of a system that cannot; -1 on NOMEM. */
static int kek_check(const struct smi_mol *m, int *bad_atom, struct hl_err *e)
{
    int n = m->natoms;
    *bad_atom = -1;
    int *need = hl_calloc((size_t)(n ? n : 1), sizeof *need);
    int *loc = hl_malloc((size_t)(n ? n : 1) * sizeof *loc);
    int *comp = hl_malloc((size_t)(n ? n : 1) * sizeof *comp);
    int *start = hl_malloc(((size_t)n + 1) * sizeof *start);
    int *nbr = hl_malloc((size_t)(m->nbonds ? 2 * m->nbonds : 1) * sizeof *nbr);
    int *work = hl_malloc((size_t)(n ? n : 1) * 8 * sizeof *work);
    int *freec = hl_malloc((size_t)(n ? n : 1) * sizeof *freec);
    int rc = 0;
    if (!need || !loc || !comp || !start || !nbr || !work || !freec) {
        rc = -1;
        goto out;
    }
    int any = 0;
    for (int a = 0; a < n; a++)
        any |= need[a] = m->atoms[a].aromatic && kek_needs_double(m, a);
    for (int a = 0; a < n; a++)
        loc[a] = -1;
    for (int root = 0; any && root < n && *bad_atom < 0; root++) {
        if (!need[root] || loc[root] >= 0)
            continue;
        int c = kek_component(m, need, root, loc, comp, start, nbr);
        struct kek K = {c, start, nbr, work, work + c, work + 2 * c, work + 3 * c, work + 4 * c,
                        work + 5 * c, work + 6 * c};
        int *nfree = work + 7 * c; /* unmatched neighbours, for the greedy order */
        for (int h = 0; h < c; h++) {
            K.match[h] = -1;
            nfree[h] = start[h + 1] - start[h];
        }
        kek_greedy(&K, nfree, freec);
        /* blamed: the first atom of the system in the text (comp[0], the lowest index) */
        for (int h = 0; h < c && *bad_atom < 0; h++)
            if (K.match[h] < 0 && !kek_augment(&K, h))
                *bad_atom = comp[0];
    }
out:
    hl_free(need);
    hl_free(loc);
    hl_free(comp);
    hl_free(start);
    hl_free(nbr);
    hl_free(work);
    hl_free(freec);
    if (rc)
        hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    return rc;
}

/* After the text is read: adjacency and rings of P->m, implicit bond orders, aromatic bond
 * checks, valences and H counts, Kekule rings aromatised, explicit [H] folded and the
 * Kekule check. An error names the column of the atom or bond at fault. */
static enum hl_status finish(struct parser *P, struct hl_err *e)
{
    struct smi_mol *m = P->m;
    enum hl_status st = smiles_reindex(m, e);
    if (st)
        return st;
    /* implicit bonds: aromatic between aromatic atoms on a ring, single otherwise */
    for (int i = 0; i < m->nbonds; i++) {
        struct smi_bond *b = &m->bonds[i];
        if (b->order == 0)
            b->order = (b->in_ring && m->atoms[b->a].aromatic && m->atoms[b->b].aromatic)
                           ? SMI_AROMATIC : 1;
        else if (b->order == SMI_AROMATIC && !b->in_ring)
            return bad(e, P->bcol[i], "aromatic bond ':' outside a ring%s", NULL);
        else if (b->order == SMI_AROMATIC && !(m->atoms[b->a].aromatic && m->atoms[b->b].aromatic))
            return bad(e, P->bcol[i], "aromatic bond ':' between non-aromatic atoms%s", NULL);
    }
    for (int a = 0; a < m->natoms; a++) {
        struct smi_atom *at = &m->atoms[a];
        if (at->aromatic && !at->in_ring)
            return bad(e, at->col, "aromatic atom not in a ring%s", NULL);
        if (!at->bracket) {
            int h = smiles_implicit_h(m, a);
            if (h < 0)
                return bad(e, at->col, "too many bonds on %s (above its normal valence)",
                           elem_symbol(at->el));
            at->hcount = h;
            /* an aromatic n or o has only its lowest valence (RDKit refuses c1cn(C)(C)cc1) */
            if (at->aromatic && (at->el == EL_N || at->el == EL_O || at->el == EL_B) &&
                bond_sum(m, a) > normal_valences(at->el)[0])
                return bad(e, at->col, "too many bonds on aromatic %s (above its valence)",
                           elem_symbol(at->el));
        } else if (at->el != EL_C && bracket_valence_max(at->el, at->charge) >= 0 &&
                   bond_sum(m, a) + at->hcount > bracket_valence_max(at->el, at->charge)) {
            return bad(e, at->col, "too many bonds on %s for its charge (above its highest valence)",
                       elem_symbol(at->el));
        } else if (at->el == EL_C) {
            /* carbon has four bonds whatever the charge ([CH3+] has three): more is no molecule */
            int total = bond_sum(m, a) + at->hcount + pi_unit(m, a);
            if (total > 4)
                return bad(e, at->col, "too many bonds on carbon (valence above 4)%s", NULL);
        }
    }
    aromatize_kekule(m);
    if ((st = fold_hydrogens(m, e)))
        return st;
    /* explicit [H] atoms were bonds until folded into H counts: check carbon again, or
     * c1ccccc1([H])[H] would pass as an aromatic carbon with two hydrogens */
    for (int a = 0; a < m->natoms; a++) {
        const struct smi_atom *at = &m->atoms[a];
        if (at->el == EL_C && bond_sum(m, a) + at->hcount + pi_unit(m, a) > 4)
            return bad(e, at->col, "too many bonds on carbon (valence above 4)%s", NULL);
    }
    int unmatched;
    if (kek_check(m, &unmatched, e))
        return HL_ERR_NOMEM;
    if (unmatched >= 0)
        return bad(e, m->atoms[unmatched].col, "aromatic system cannot be written with alternating "
                   "double bonds (no Kekule structure): check the ring size, and write the H of a "
                   "pyrrole-type nitrogen as [nH]%s", NULL);
    return HL_OK;
}

/* The reader's place in the text: the atom the next bond starts from (prev, -1 at the start),
 * a bond symbol waiting for its atom (bond, its column bond_col), the open branches (stack:
 * pairs of atom and column of its '(', sp of them, room for cap; owned, hl_free) and the open
 * ring bonds. */
struct walk {
    struct parser *P;
    struct ring_open ring[NRING];
    int *stack, sp, cap;
    int prev, bond, bond_col, just_opened;
};

/* An atom at s[i]: a bracket atom, or an organic-subset one (Cl and Br, B C N O P S F I, the
 * aromatic b c n o p s). Adds it to P->m: *atom its index and *len its characters. Any other
 * character gives *atom = -1 and no error; a letter that is no such atom is an error. */
static enum hl_status read_atom(struct parser *P, int i, int *atom, int *len, struct hl_err *e)
{
    const char *s = P->s;
    char c = s[i];
    int col = i + 1;
    int el = -1, arom = 0;
    *atom = -1;
    *len = 1;
    if (c == '[') {
        int end = i;
        enum hl_status st = read_bracket(P, i, &end, atom, e);
        if (st)
            return st;
        *len = end - i;
        return HL_OK;
    } else if (c >= 'A' && c <= 'Z') {
        if (c == 'C' && s[i + 1] == 'l') { el = EL_Cl; *len = 2; }
        else if (c == 'B' && s[i + 1] == 'r') { el = EL_Br; *len = 2; }
        else if (strchr("BCNOPSFI", c)) el = elem_lookup(s + i, 1);
        if (el < 0) {
            char sym[3] = {c, 0, 0};
            if (s[i + 1] >= 'a' && s[i + 1] <= 'z')
                sym[1] = s[i + 1];
            int known = elem_lookup(sym, strlen(sym)) >= 0 || elem_lookup(sym, 1) >= 0;
            return bad(e, col, known ? "element '%s' must be written in brackets"
                                     : "unknown element '%s'", sym);
        }
    } else if (c >= 'a' && c <= 'z') {
        el = aromatic_el(s + i, len);
        if (el < 0 || *len != 1) {
            char sym[2] = {c, 0};
            return bad(e, col, "'%s' is not an aromatic organic-subset atom (b c n o p s)", sym);
        }
        arom = 1;
    }
    if (el >= 0) {
        if ((*atom = smiles_add_atom(P->m, el)) < 0)
            return nomem(e);
        P->m->atoms[*atom].aromatic = arom;
        P->m->atoms[*atom].col = col;
    }
    return HL_OK;
}

/* The atom just read (at column col): bonded to W->prev by the waiting bond symbol, if there
 * is a previous atom; it becomes W->prev. */
static enum hl_status walk_atom(struct walk *W, int atom, int col, struct hl_err *e)
{
    enum hl_status st;
    if (W->prev >= 0 &&
        (st = add_bond_col(W->P, W->prev, atom, W->bond, W->bond ? W->bond_col : col, e)))
        return st;
    W->prev = atom;
    W->bond = 0;
    W->just_opened = 0;
    return HL_OK;
}

/* A bond symbol c at column col: it waits for the next atom or ring-closure number. */
static enum hl_status walk_bond(struct walk *W, char c, int col, struct hl_err *e)
{
    int bc = bond_code(c);
    if (W->prev < 0)
        return bad(e, col, "bond symbol with no atom before it%s", NULL);
    if (W->bond)
        return bad(e, col, "two bond symbols in a row%s", NULL);
    if (bc == 5)
        return bad(e, col, "quadruple bond '$' is not supported%s", NULL);
    W->bond = bc;
    W->bond_col = col;
    return HL_OK;
}

/* '(' at column col: pushes W->prev and the column on the branch stack (grown as needed). */
static enum hl_status walk_open(struct walk *W, int col, struct hl_err *e)
{
    if (W->prev < 0)
        return bad(e, col, "branch '(' with no atom before it%s", NULL);
    if (W->bond)
        return bad(e, W->bond_col, "bond symbol before '(': put it inside the branch%s", NULL);
    if (W->sp == W->cap) {
        int ncap = W->cap ? 2 * W->cap : 32;
        int *p = hl_realloc(W->stack, (size_t)ncap * 2 * sizeof *p);
        if (!p)
            return nomem(e);
        W->stack = p;
        W->cap = ncap;
    }
    W->stack[2 * W->sp] = W->prev;
    W->stack[2 * W->sp + 1] = col;
    W->sp++;
    W->just_opened = 1;
    return HL_OK;
}

/* ')' at column col: the atom before the matching '(' becomes W->prev again. */
static enum hl_status walk_close(struct walk *W, int col, struct hl_err *e)
{
    if (!W->sp)
        return bad(e, col, "')' without a matching '('%s", NULL);
    if (W->bond)
        return bad(e, W->bond_col, "bond symbol with no atom after it%s", NULL);
    if (W->just_opened)
        return bad(e, col, "empty branch '()'%s", NULL);
    W->prev = W->stack[2 * (--W->sp)];
    return HL_OK;
}

/* A ring-closure number at s[i] (a digit, or '%' and two digits; *len its characters): opens
 * the ring bond at W->prev, or closes it with the bond symbol given at either end. */
static enum hl_status walk_ring(struct walk *W, int i, int *len, struct hl_err *e)
{
    const char *s = W->P->s;
    char c = s[i];
    int col = i + 1;
    int num, bond = W->bond, bond_col = W->bond_col;
    *len = 1;
    if (c == '%') {
        if (!is_digit(s[i + 1]) || !is_digit(s[i + 2]))
            return bad(e, col, "'%%' must be followed by two digits%s", NULL);
        num = (s[i + 1] - '0') * 10 + (s[i + 2] - '0');
        *len = 3;
    } else {
        num = c - '0';
    }
    if (W->prev < 0)
        return bad(e, col, "ring-closure number with no atom before it%s", NULL);
    if (W->just_opened)
        return bad(e, col, "ring-closure number right after '('%s", NULL);
    struct ring_open *r = &W->ring[num];
    if (r->atom < 0) {
        r->atom = W->prev;
        r->order = bond;
        r->col = bond ? bond_col : col;
    } else {
        if (r->atom == W->prev)
            return bad(e, col, "ring bond from an atom to itself%s", NULL);
        if (r->order && bond && r->order != bond)
            return bad(e, bond_col, "ring-closure bond symbols disagree%s", NULL);
        if (smiles_find_bond(W->P->m, r->atom, W->prev) >= 0)
            return bad(e, col, "duplicate bond: these two atoms are already bonded%s", NULL);
        int order = bond ? bond : r->order;
        enum hl_status st = add_bond_col(W->P, r->atom, W->prev, order, bond ? bond_col : col, e);
        if (st)
            return st;
        r->atom = -1;
    }
    W->bond = 0;
    return HL_OK;
}

/* A character c at column col that starts nothing SMILES knows here: always an error. */
static enum hl_status stray(char c, int col, struct hl_err *e)
{
    if (c == '.')
        return bad(e, col, "'.' (disconnected structures) is not supported: give one molecule%s", NULL);
    if (c == ' ' || c == '\t' || c == '\n' || c == '\r')
        return bad(e, col, "white space inside SMILES%s", NULL);
    char cc[2] = {c, 0};
    return bad(e, col, (unsigned char)c < 32 || (unsigned char)c > 126 ? "unexpected byte%s"
                                                                        : "unexpected character '%s'",
               (unsigned char)c < 32 || (unsigned char)c > 126 ? "" : cc);
}

/* At the end of the text: no bond symbol waiting, no branch and no ring bond left open (the
 * ring bond opened first in the text is named). */
static enum hl_status walk_end(const struct walk *W, struct hl_err *e)
{
    if (W->bond)
        return bad(e, W->bond_col, "bond symbol with no atom after it%s", NULL);
    if (W->sp)
        return bad(e, W->stack[2 * (W->sp - 1) + 1], "branch '(' is not closed%s", NULL);
    int worst = -1;
    for (int r = 0; r < NRING; r++)
        if (W->ring[r].atom >= 0 && (worst < 0 || W->ring[r].col < W->ring[worst].col))
            worst = r;
    if (worst >= 0) {
        char num[16];
        snprintf(num, sizeof num, "%d", worst);
        return bad(e, W->ring[worst].col, "ring bond %s is not closed", num);
    }
    return HL_OK;
}

enum hl_status smiles_parse(const char *text, struct smi_mol *m, struct hl_err *e)
{
    memset(m, 0, sizeof *m);
    if (!text || !*text)
        return bad(e, 1, "empty SMILES%s", NULL);
    struct parser P = {.s = text, .m = m};
    struct walk W = {.P = &P, .prev = -1};
    for (int r = 0; r < NRING; r++)
        W.ring[r].atom = -1;
    enum hl_status st = HL_OK;
    const char *s = text;
    int i = 0;
    while (!st && s[i]) {
        char c = s[i];
        int col = i + 1;
        int len = 1, atom = -1;
        if ((st = read_atom(&P, i, &atom, &len, e)))
            break;
        if (atom >= 0)
            st = walk_atom(&W, atom, col, e);
        else if (bond_code(c))
            st = walk_bond(&W, c, col, e);
        else if (c == '(')
            st = walk_open(&W, col, e);
        else if (c == ')')
            st = walk_close(&W, col, e);
        else if (is_digit(c) || c == '%')
            st = walk_ring(&W, i, &len, e);
        else
            st = stray(c, col, e);
        i += len;
    }
    if (!st)
        st = walk_end(&W, e);
    if (!st)
        st = finish(&P, e);
    hl_free(W.stack);
    hl_free(P.bcol);
    return st;
}

/* ---- formula ------------------------------------------------------------------- */

void smiles_formula(const struct smi_mol *m, struct formula *f)
{
    memset(f, 0, sizeof *f);
    for (int i = 0; i < m->natoms; i++) {
        f->n[m->atoms[i].el]++;
        f->n[EL_H] += m->atoms[i].hcount;
    }
}

double smiles_molar_mass_g_mol(const struct smi_mol *m)
{
    struct formula f;
    smiles_formula(m, &f);
    return formula_molar_mass_g_mol(&f);
}

/* ---- writer -------------------------------------------------------------------- */

struct sbuf { char *p; size_t n, cap; int fail; };

/* Appends s to b (b->p owned by b's user, hl_free); sets b->fail and keeps b as it was when
 * it cannot grow. */
static void put(struct sbuf *b, const char *s)
{
    size_t k = strlen(s);
    if (b->fail)
        return;
    if (b->n + k + 1 > b->cap) {
        size_t cap = b->cap ? b->cap : 64;
        while (b->n + k + 1 > cap)
            cap *= 2;
        char *p = hl_realloc(b->p, cap);
        if (!p) {
            b->fail = 1;
            return;
        }
        b->p = p;
        b->cap = cap;
    }
    memcpy(b->p + b->n, s, k + 1);
    b->n += k;
}

/* Appends atom a of m to b: the bare symbol when the organic subset gives its H count, a
 * bracket atom (isotope, H, charge, class) otherwise. */
static void put_atom(struct sbuf *b, const struct smi_mol *m, int a)
{
    const struct smi_atom *at = &m->atoms[a];
    char sym[4];
    snprintf(sym, sizeof sym, "%s", elem_symbol(at->el));
    if (at->aromatic)
        for (char *q = sym; *q; q++)
            if (*q >= 'A' && *q <= 'Z')
                *q = (char)(*q - 'A' + 'a');
    int plain = !at->isotope && !at->charge && !at->aclass && smiles_implicit_h(m, a) == at->hcount;
    if (plain) {
        put(b, sym);
        return;
    }
    char buf[48];
    int k = 0;
    k += snprintf(buf + k, sizeof buf - (size_t)k, "[");
    if (at->isotope)
        k += snprintf(buf + k, sizeof buf - (size_t)k, "%d", at->isotope);
    k += snprintf(buf + k, sizeof buf - (size_t)k, "%s", sym);
    if (at->hcount == 1)
        k += snprintf(buf + k, sizeof buf - (size_t)k, "H");
    else if (at->hcount > 1)
        k += snprintf(buf + k, sizeof buf - (size_t)k, "H%d", at->hcount);
    if (at->charge == 1 || at->charge == -1)
        k += snprintf(buf + k, sizeof buf - (size_t)k, "%c", at->charge > 0 ? '+' : '-');
    else if (at->charge)
        k += snprintf(buf + k, sizeof buf - (size_t)k, "%c%d", at->charge > 0 ? '+' : '-',
                      at->charge > 0 ? at->charge : -at->charge);
    if (at->aclass)
        k += snprintf(buf + k, sizeof buf - (size_t)k, ":%d", at->aclass);
    snprintf(buf + k, sizeof buf - (size_t)k, "]");
    put(b, buf);
}

/* Symbol to write for bond bd: nothing where the reader's default gives the same order. */
static const char *bond_text(const struct smi_mol *m, int bd)
{
    const struct smi_bond *b = &m->bonds[bd];
    int both_arom = m->atoms[b->a].aromatic && m->atoms[b->b].aromatic;
    switch (b->order) {
    case 2: return "=";
    case 3: return "#";
    case SMI_AROMATIC: return both_arom && b->in_ring ? "" : ":";
    default: return both_arom && b->in_ring ? "-" : "";
    }
}

/* The writer's spanning tree, over n atoms (arrays of n unless said): pre-order (order[]),
 * each atom's place in it (visit[]), the tree bond to its parent (pbond[], -1 at the root),
 * a cursor per atom (it[]), a stack, subtree sizes (size[]); per bond, whether it closes a
 * ring (isring[]) and the digit it is written with (bdigit[]); digits in use (used[]). The
 * int arrays of n share one allocation (order owns it); isring and bdigit are their own. */
struct wtree {
    int *order, *visit, *pbond, *it, *stack, *size;
    int *isring, *bdigit;
    int used[100];
    int root;
};

/* Phase 1: depth-first tree; each non-tree bond becomes a ring closure opened at the atom
 * visited first. Takes m (n >= 1 atoms) and W with its arrays allocated; fills W's tree and
 * returns the number of atoms reached (n when m is connected). */
static int write_tree(const struct smi_mol *m, struct wtree *W)
{
    int n = m->natoms;
    int *order = W->order, *visit = W->visit, *pbond = W->pbond, *it = W->it, *stack = W->stack;
    for (int i = 0; i < n; i++) {
        visit[i] = -1;
        pbond[i] = -1;
        it[i] = m->adj_start[i];
    }
    /* Start at the last atom with one neighbour (an added halogen in a product:
     * "ClCC" rather than "C(C)Cl"), or atom 0 in a ring-only molecule. */
    int root = 0;
    for (int i = 0; i < n; i++)
        if (smiles_degree(m, i) <= 1)
            root = i;
    W->root = root;
    int t = 0, sp = 0;
    stack[sp++] = root;
    visit[root] = t;
    order[t++] = root;
    while (sp) {
        int v = stack[sp - 1];
        if (it[v] == m->adj_start[v + 1]) {
            sp--;
            continue;
        }
        int bd = m->adj[it[v]++];
        if (bd == pbond[v])
            continue;
        int w = smiles_other(m, bd, v);
        if (visit[w] < 0) {
            pbond[w] = bd;
            visit[w] = t;
            order[t++] = w;
            stack[sp++] = w;
        } else {
            W->isring[bd] = 1;
        }
    }
    return t;
}

/* The ring-closure digits of atom v, after its symbol: a closure to an atom written later
 * opens with the lowest free digit (and its bond symbol), one to an atom written earlier
 * closes with the digit it opened with. HL_ERR_INPUT past 99 open at once. */
static enum hl_status put_ring_digits(struct sbuf *b, const struct smi_mol *m, struct wtree *W,
                                      int v, struct hl_err *e)
{
    for (int k = m->adj_start[v]; k < m->adj_start[v + 1]; k++) {
        int bd = m->adj[k];
        if (!W->isring[bd])
            continue;
        int w = smiles_other(m, bd, v);
        char num[16];
        if (W->visit[w] > W->visit[v]) { /* open */
            int d = 1;
            while (d < 100 && W->used[d])
                d++;
            if (d == 100)
                return hl_err_set(e, HL_ERR_INPUT, "more than 99 open ring closures");
            W->used[d] = 1;
            W->bdigit[bd] = d;
            put(b, bond_text(m, bd));
        } else {
            W->used[W->bdigit[bd]] = 0;
        }
        if (W->bdigit[bd] < 10)
            snprintf(num, sizeof num, "%d", W->bdigit[bd]);
        else
            snprintf(num, sizeof num, "%%%d", W->bdigit[bd]);
        put(b, num);
    }
    return HL_OK;
}

/* The next child of v to write: the smallest unwritten subtree (-1: none left); *left is the
 * number of children still unwritten, this one included. */
static int next_child(const struct smi_mol *m, const struct wtree *W, int v, int *left)
{
    int child = -1;
    *left = 0;
    for (int k = m->adj_start[v]; k < m->adj_start[v + 1]; k++) {
        int bd = m->adj[k];
        int w = smiles_other(m, bd, v);
        if (W->pbond[w] != bd || W->visit[w] < W->visit[v] || W->it[w] >= 0)
            continue;
        (*left)++;
        if (child < 0 || W->size[w] < W->size[child])
            child = w;
    }
    return child;
}

/* Emission in pre-order; ring closures open at the ancestor end (written first whatever the
 * sibling order). Takes the finished tree W (its cursors and stack are reused: it[v] < 0, not
 * written yet); appends the text to b (b->fail on NOMEM). */
static enum hl_status write_text(const struct smi_mol *m, struct wtree *W, struct sbuf *b,
                                 struct hl_err *e)
{
    int n = m->natoms, *it = W->it, *stack = W->stack;
    enum hl_status st = HL_OK;
    for (int i = 0; i < n; i++)
        it[i] = -1;
    int sp = 0;
    stack[sp++] = W->root;
    while (sp && !b->fail && !st) {
        int v = stack[sp - 1] < 0 ? -stack[sp - 1] - 1 : stack[sp - 1];
        if (stack[sp - 1] < 0) { /* returning from a branch in parentheses */
            put(b, ")");
            stack[sp - 1] = v;
        }
        if (it[v] < 0) {
            if (W->pbond[v] >= 0)
                put(b, bond_text(m, W->pbond[v]));
            put_atom(b, m, v);
            st = put_ring_digits(b, m, W, v, e);
            it[v] = 0;
        }
        int left;
        int child = next_child(m, W, v, &left);
        if (child < 0) {
            sp--;
            continue;
        }
        if (left > 1) {
            put(b, "(");
            stack[sp - 1] = -v - 1; /* write ')' when control comes back to v */
        }
        stack[sp++] = child;
    }
    return st;
}

enum hl_status smiles_write(const struct smi_mol *m, char **out, struct hl_err *e)
{
    *out = NULL;
    int n = m->natoms;
    if (n == 0)
        return hl_err_set(e, HL_ERR_INPUT, "empty molecule");
    struct wtree W = {0};
    W.order = hl_malloc((size_t)n * 6 * sizeof *W.order);
    W.isring = hl_calloc((size_t)(m->nbonds ? m->nbonds : 1), sizeof *W.isring);
    if (!W.order || !W.isring) {
        hl_free(W.order);
        hl_free(W.isring);
        return nomem(e);
    }
    W.visit = W.order + n;
    W.pbond = W.visit + n;
    W.it = W.pbond + n;
    W.stack = W.it + n;
    W.size = W.stack + n;
    struct sbuf b = {0};
    enum hl_status st = HL_OK;
    if (write_tree(m, &W) != n) {
        st = hl_err_set(e, HL_ERR_INPUT, "molecule is not connected");
        goto done;
    }
    /* subtree sizes (reverse pre-order), so that small branches go in parentheses
     * and the largest continues the main chain */
    for (int i = 0; i < n; i++)
        W.size[i] = 1;
    for (int i = n - 1; i > 0; i--)
        W.size[smiles_other(m, W.pbond[W.order[i]], W.order[i])] += W.size[W.order[i]];
    W.bdigit = hl_malloc((size_t)(m->nbonds ? m->nbonds : 1) * sizeof *W.bdigit);
    if (!W.bdigit) {
        st = nomem(e);
        goto done;
    }
    st = write_text(m, &W, &b, e);
    if (!st && b.fail)
        st = nomem(e);
done:
    hl_free(W.order);
    hl_free(W.isring);
    hl_free(W.bdigit);
    if (st)
        hl_free(b.p);
    else
        *out = b.p;
    return st;
}
