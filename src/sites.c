/*
 * sites.c - site classes, symmetry classes, structure equality, products (see sites.h).
 *
 * Refinement is colour refinement (Weininger, Weininger & Weininger, J. Chem.
 * Inf. Comput. Sci. 1989, 29, 97: invariants, then neighbour ranks until the
 * partition is stable), computed as the coarsest equitable partition with
 * splitter queues (see refine), so a long chain costs n log n, not n rounds.
 */
#include "sites.h"
#include "elements.h"
#include "hlmem.h"

#include <stdint.h>
#include <string.h>

#define ISO_STEP_LIMIT 2000000L /* backtracking steps before sites_same gives up */
#define NINV 7

/* A plain graph view, so one refinement serves a molecule or two side by side. */
struct gview {
    int n;
    const int *start, *nbr, *bo; /* CSR over atoms: neighbour atom and bond-order code */
    const int *inv;              /* NINV ints per atom */
};

struct keyset {
    const int *key, *off, *len;
};

/* Order of the keys of a and b in k: element by element, a shorter key first on a tie. */
static int cmp_key(const struct keyset *k, int a, int b)
{
    const int *x = k->key + k->off[a], *y = k->key + k->off[b];
    int n = k->len[a] < k->len[b] ? k->len[a] : k->len[b];
    for (int i = 0; i < n; i++)
        if (x[i] != y[i])
            return x[i] < y[i] ? -1 : 1;
    return k->len[a] - k->len[b];
}

/* Bottom-up merge sort of idx[0..n-1] by key (stable; tmp has n slots). */
static void sort_idx(int *idx, int *tmp, int n, const struct keyset *k)
{
    for (int w = 1; w < n; w *= 2) {
        for (int lo = 0; lo < n; lo += 2 * w) {
            int mid = lo + w < n ? lo + w : n, hi = lo + 2 * w < n ? lo + 2 * w : n;
            int i = lo, j = mid, t = lo;
            while (i < mid && j < hi)
                tmp[t++] = cmp_key(k, idx[j], idx[i]) < 0 ? idx[j++] : idx[i++];
            while (i < mid)
                tmp[t++] = idx[i++];
            while (j < hi)
                tmp[t++] = idx[j++];
        }
        memcpy(idx, tmp, (size_t)n * sizeof *idx);
    }
}

/* Bottom-up merge sort of n (key, value) pairs by key (stable; tmp has 2n slots). */
static void sort_pairs(uint64_t *k, int *v, uint64_t *tk, int *tv, int n)
{
    for (int w = 1; w < n; w *= 2) {
        for (int lo = 0; lo < n; lo += 2 * w) {
            int mid = lo + w < n ? lo + w : n, hi = lo + 2 * w < n ? lo + 2 * w : n;
            int i = lo, j = mid, t = lo;
            while (i < mid && j < hi) {
                int pick = k[j] < k[i] ? j++ : i++;
                tk[t] = k[pick];
                tv[t++] = v[pick];
            }
            for (; i < mid; i++, t++) { tk[t] = k[i]; tv[t] = v[i]; }
            for (; j < hi; j++, t++) { tk[t] = k[j]; tv[t] = v[j]; }
        }
        memcpy(k, tk, (size_t)n * sizeof *k);
        memcpy(v, tv, (size_t)n * sizeof *v);
    }
}

/* The partition: cells are ranges of elems; cell[v] and pos[v] locate atom v. */
struct part {
    int *elems, *pos, *cell, *first, *size, *inq, *queue;
    int ncell, qh, qt, qcap;
};

/* Puts cell c on P's ring-buffer queue of cells to refine by, unless it is queued. */
static void enqueue(struct part *P, int c)
{
    if (P->inq[c])
        return;
    P->inq[c] = 1;
    P->queue[P->qt] = c;
    P->qt = (P->qt + 1) % P->qcap;
}

/* Split cell X: its t touched atoms tv[0..t) (sorted by count tk) go to the end of its range
 * and become new cells, one per count; atoms not touched (count 0) stay in X. */
static void split_cell(struct part *P, int X, const uint64_t *tk, const int *tv, int t)
{
    int end = P->first[X] + P->size[X];
    if (t == P->size[X] && (uint32_t)tk[0] == (uint32_t)tk[t - 1])
        return; /* every atom of X sees the splitter alike */
    for (int k = 0; k < t; k++) {
        int v = tv[k], p = end - t + k, w = P->elems[p];
        P->elems[P->pos[v]] = w;
        P->pos[w] = P->pos[v];
        P->elems[p] = v;
        P->pos[v] = p;
    }
    int was_queued = P->inq[X];
    int rest = P->size[X] - t, big = X, bigsize = rest;
    int k0 = 0;
    if (rest == 0) { /* the group with the lowest count keeps X */
        while (k0 < t && (uint32_t)tk[k0] == (uint32_t)tk[0])
            k0++;
        P->size[X] = k0;
        bigsize = k0;
    } else {
        P->size[X] = rest;
    }
    int firstnew = P->ncell;
    for (int k = k0; k < t;) {
        int j = k;
        while (j < t && (uint32_t)tk[j] == (uint32_t)tk[k])
            j++;
        int c = P->ncell++;
        P->first[c] = end - t + k;
        P->size[c] = j - k;
        P->inq[c] = 0;
        for (int i = k; i < j; i++)
            P->cell[tv[i]] = c;
        if (j - k > bigsize) {
            bigsize = j - k;
            big = c;
        }
        k = j;
    }
    /* Hopcroft's rule: a queued cell's pieces all wait; otherwise all but the largest
     * (refining by the union and by all but one piece implies the last one) */
    if (!was_queued && big != X)
        enqueue(P, X);
    for (int c = firstnew; c < P->ncell; c++)
        if (was_queued || c != big)
            enqueue(P, c);
}

/* Coarsest equitable partition refining the invariants: each class's atoms have, for every
 * class and bond order, the same number of such neighbours.  That is the fixed point of
 * iterated neighbour-class refinement (Weininger et al. above), reached here by splitter
 * queues with "all but the largest piece" (J. Hopcroft 1971; A. Cardon and M. Crochemore,
 * Theor. Comput. Sci. 1982, 19, 85), O((n + m) log^2 n) instead of one sort per round. */
static enum hl_status refine(const struct gview *g, int *cls, int *ncls, struct hl_err *e)
{
    int n = g->n;
    if (n == 0) {
        *ncls = 0;
        return HL_OK;
    }
    size_t N = (size_t)n;
    int *ib = hl_malloc((N * 13 + 2) * sizeof *ib);
    uint64_t *kb = hl_malloc(N * 2 * sizeof *kb);
    if (!ib || !kb) {
        hl_free(ib);
        hl_free(kb);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    struct part P = {ib, ib + N, ib + 2 * N, ib + 3 * N, ib + 4 * N, ib + 5 * N, ib + 6 * N, 0, 0, 0, n + 1};
    /* the queue has n + 1 slots (ib + 6N .. ib + 7N); the rest follow it */
    int *cnt = ib + 7 * N + 1, *snap = cnt + N, *tv = snap + N, *tv2 = tv + N, *idx = tv2 + N,
        *tmp = idx + N;
    uint64_t *tk = kb, *tk2 = kb + N;
    int *off = tv, *len = tv2; /* free until the first split */
    for (int i = 0; i < n; i++) {
        off[i] = i * NINV;
        len[i] = NINV;
        idx[i] = i;
        cnt[i] = 0;
    }
    struct keyset ks = {g->inv, off, len};
    sort_idx(idx, tmp, n, &ks);
    for (int i = 0; i < n; i++) {
        int v = idx[i];
        if (i == 0 || cmp_key(&ks, idx[i - 1], v) != 0) {
            P.first[P.ncell] = i;
            P.size[P.ncell] = 0;
            P.inq[P.ncell] = 0;
            P.ncell++;
        }
        P.elems[i] = v;
        P.pos[v] = i;
        P.cell[v] = P.ncell - 1;
        P.size[P.ncell - 1]++;
    }
    for (int c = 0; c < P.ncell; c++)
        enqueue(&P, c);
    while (P.qh != P.qt && P.ncell < n) {
        int S = P.queue[P.qh];
        P.qh = (P.qh + 1) % P.qcap;
        P.inq[S] = 0;
        int ns = P.size[S];
        memcpy(snap, P.elems + P.first[S], (size_t)ns * sizeof *snap);
        for (int colour = 1; colour <= SMI_AROMATIC; colour++) {
            int nt = 0;
            for (int a = 0; a < ns; a++) {
                int u = snap[a];
                for (int j = g->start[u]; j < g->start[u + 1]; j++) {
                    if (g->bo[j] != colour)
                        continue;
                    int v = g->nbr[j];
                    if (cnt[v]++ == 0)
                        tv[nt++] = v;
                }
            }
            if (!nt)
                continue;
            for (int k = 0; k < nt; k++)
                tk[k] = (uint64_t)(uint32_t)P.cell[tv[k]] << 32 | (uint32_t)cnt[tv[k]];
            sort_pairs(tk, tv, tk2, tv2, nt);
            for (int k = 0; k < nt;) {
                int j = k;
                while (j < nt && tk[j] >> 32 == tk[k] >> 32)
                    j++;
                split_cell(&P, (int)(tk[k] >> 32), tk + k, tv + k, j - k);
                k = j;
            }
            for (int k = 0; k < nt; k++)
                cnt[tv[k]] = 0;
        }
    }
    /* class ids in order of each class's first atom */
    int *id = idx;
    for (int c = 0; c < P.ncell; c++)
        id[c] = -1;
    int k = 0;
    for (int v = 0; v < n; v++) {
        int c = P.cell[v];
        if (id[c] < 0)
            id[c] = k++;
        cls[v] = id[c];
    }
    *ncls = k;
    hl_free(ib);
    hl_free(kb);
    return HL_OK;
}

/* Fill a view of molecule m at atom offset base into arrays sized for the total. */
static void view_fill(const struct smi_mol *m, int base, int bbase, int *start, int *nbr, int *bo,
                      int *inv, int lax)
{
    for (int i = 0; i < m->natoms; i++) {
        const struct smi_atom *a = &m->atoms[i];
        int *v = inv + (size_t)(base + i) * NINV;
        v[0] = elem_z(a->el);
        v[1] = smiles_degree(m, i);
        v[2] = a->hcount;
        v[3] = a->charge;
        v[4] = a->isotope;
        v[5] = a->in_ring;
        v[6] = lax ? 0 : a->aromatic;
        start[base + i] = bbase + m->adj_start[i];
        for (int k = m->adj_start[i]; k < m->adj_start[i + 1]; k++) {
            int bd = m->adj[k];
            int o = m->bonds[bd].order;
            nbr[bbase + k] = base + smiles_other(m, bd, i);
            bo[bbase + k] = (lax && o != 3) ? 1 : o;
        }
    }
}

enum hl_status sites_symmetry(const struct smi_mol *m, int *cls, int *nclass, struct hl_err *e)
{
    int n = m->natoms, nb2 = m->adj_start[n];
    int *buf = hl_malloc(((size_t)n * (NINV + 1) + 1 + 2 * (size_t)nb2 + 1) * sizeof *buf);
    if (!buf)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    int *start = buf, *inv = start + n + 1, *nbr = inv + (size_t)n * NINV, *bo = nbr + nb2;
    view_fill(m, 0, 0, start, nbr, bo, inv, 0);
    start[n] = nb2;
    struct gview g = {n, start, nbr, bo, inv};
    enum hl_status st = refine(&g, cls, nclass, e);
    hl_free(buf);
    return st;
}

/* Order of bond bd as the comparison sees it: every bond but a triple as single when lax
 * (Kekule and aromatic forms of one structure then compare equal). */
static int bond_order_view(const struct smi_mol *m, int bd, int lax)
{
    int o = m->bonds[bd].order;
    return (lax && o != 3) ? 1 : o;
}

/* Backtracking isomorphism a -> b with class constraints. 1, 0, or -1 (limit). */
static int match(const struct smi_mol *a, const struct smi_mol *b, const int *cls, int lax,
                 int *work)
{
    int n = a->natoms;
    int *ord = work, *parent = ord + n, *map = parent + n, *pos = map + n, *used = pos + n,
        *seen = used + n, *rank = seen + n;
    const int *cb = cls + n;
    /* breadth-first order of a, with the earlier neighbour each atom hangs on */
    for (int i = 0; i < n; i++)
        seen[i] = 0, map[i] = -1, pos[i] = 0, used[i] = 0;
    int h = 0, t = 0;
    ord[t++] = 0;
    seen[0] = 1;
    parent[0] = -1;
    while (h < t) {
        int v = ord[h++];
        for (int k = a->adj_start[v]; k < a->adj_start[v + 1]; k++) {
            int w = smiles_other(a, a->adj[k], v);
            if (!seen[w]) {
                seen[w] = 1;
                parent[t] = v;
                ord[t++] = w;
            }
        }
    }
    if (t != n)
        return 0;
    for (int i = 0; i < n; i++)
        rank[ord[i]] = i;
    long steps = 0;
    int i = 0;
    while (i >= 0 && i < n) {
        if (++steps > ISO_STEP_LIMIT)
            return -1;
        int v = ord[i];
        if (map[v] >= 0) {
            used[map[v]] = 0;
            map[v] = -1;
        }
        int found = -1;
        int ncand = parent[i] < 0 ? n : smiles_degree(b, map[parent[i]]);
        while (pos[i] < ncand && found < 0) {
            int c;
            if (parent[i] < 0) {
                c = pos[i]++;
            } else {
                int pb = map[parent[i]];
                c = smiles_other(b, b->adj[b->adj_start[pb] + pos[i]++], pb);
            }
            if (used[c] || cb[c] != cls[v])
                continue;
            int ok = 1;
            for (int k = a->adj_start[v]; ok && k < a->adj_start[v + 1]; k++) {
                int w = smiles_other(a, a->adj[k], v);
                if (rank[w] >= i)
                    continue;
                int bb = smiles_find_bond(b, c, map[w]);
                ok = bb >= 0 && bond_order_view(b, bb, lax) == bond_order_view(a, a->adj[k], lax);
            }
            if (ok)
                found = c;
        }
        if (found < 0) {
            pos[i] = 0;
            i--;
            continue;
        }
        map[v] = found;
        used[found] = 1;
        i++;
    }
    return i == n;
}

/* 1 when a and b (same atom and bond counts) are the same structure, 0 when not, -1 with e
 * set on NOMEM or the step limit; lax compares bond orders as bond_order_view. Atom
 * classes of both, refined together, must hold as many atoms of each, then an isomorphism
 * respecting them is searched. */
static int same_mode(const struct smi_mol *a, const struct smi_mol *b, int lax, struct hl_err *e)
{
    int n = a->natoms, nb2 = a->adj_start[n];
    int tot = 2 * n;
    int *buf = hl_malloc(((size_t)tot * (NINV + 2) + 1 + 4 * (size_t)nb2 + 7 * (size_t)n + 1) *
                         sizeof *buf);
    if (!buf) {
        hl_err_set(e, HL_ERR_NOMEM, "out of memory");
        return -1;
    }
    int *start = buf, *inv = start + tot + 1, *nbr = inv + (size_t)tot * NINV, *bo = nbr + 2 * nb2,
        *cls = bo + 2 * nb2, *work = cls + tot;
    view_fill(a, 0, 0, start, nbr, bo, inv, lax);
    view_fill(b, n, nb2, start, nbr, bo, inv, lax);
    start[tot] = 2 * nb2;
    struct gview g = {tot, start, nbr, bo, inv};
    int ncls, r;
    if (refine(&g, cls, &ncls, e)) {
        hl_free(buf);
        return -1;
    }
    /* each class must hold as many atoms of a as of b */
    int *cnt = work; /* ncls <= tot <= 2n slots, work has 7n */
    for (int i = 0; i < ncls; i++)
        cnt[i] = 0;
    for (int i = 0; i < n; i++) {
        cnt[cls[i]]++;
        cnt[cls[n + i]]--;
    }
    r = 1;
    for (int i = 0; i < ncls; i++)
        if (cnt[i])
            r = 0;
    if (r)
        r = match(a, b, cls, lax, work);
    if (r < 0)
        hl_err_set(e, HL_ERR_INTERNAL, "structure comparison exceeded its step limit");
    hl_free(buf);
    return r;
}

int sites_same(const struct smi_mol *a, const struct smi_mol *b, struct hl_err *e)
{
    if (a->natoms != b->natoms || a->nbonds != b->nbonds)
        return 0;
    if (a->natoms == 0)
        return 1;
    struct formula fa, fb;
    smiles_formula(a, &fa);
    smiles_formula(b, &fb);
    if (!formula_equal(&fa, &fb))
        return 0;
    int r = same_mode(a, b, 0, e);
    if (r != 0)
        return r;
    int arom = 0;
    for (int i = 0; i < a->natoms; i++)
        arom |= a->atoms[i].aromatic | b->atoms[i].aromatic;
    return arom ? same_mode(a, b, 1, e) : 0;
}

/* ---- classes ---------------------------------------------------------------- */

int sites_is_cc_double(const struct smi_mol *m, int bd)
{
    const struct smi_bond *b = &m->bonds[bd];
    return b->order == 2 && m->atoms[b->a].el == EL_C && m->atoms[b->b].el == EL_C &&
           !m->atoms[b->a].aromatic && !m->atoms[b->b].aromatic;
}

int sites_allyl_partners(const struct smi_mol *m, int a, int *b_out, int *c_out, int max)
{
    int n = 0;
    for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++) {
        int bnb = smiles_other(m, m->adj[k], a);
        if (m->bonds[m->adj[k]].order != 1 || m->atoms[bnb].el != EL_C)
            continue;
        for (int j = m->adj_start[bnb]; j < m->adj_start[bnb + 1]; j++) {
            int bd = m->adj[j];
            int c = smiles_other(m, bd, bnb);
            if (c != a && sites_is_cc_double(m, bd)) {
                if (n < max) {
                    b_out[n] = bnb;
                    c_out[n] = c;
                }
                n++;
            }
        }
    }
    return n < max ? n : max;
}

int sites_class(const struct smi_mol *m, int a)
{
    const struct smi_atom *at = &m->atoms[a];
    if (at->el != EL_C || at->hcount == 0)
        return -1;
    if (at->aromatic)
        return SITE_VINYL_ARYL;
    int benz = 0, ncarb = 0;
    for (int k = m->adj_start[a]; k < m->adj_start[a + 1]; k++) {
        int bd = m->adj[k];
        if (m->bonds[bd].order != 1)
            return SITE_VINYL_ARYL; /* sp2/sp carbon: vinylic, acyl or alkynyl H */
        int w = smiles_other(m, bd, a);
        if (m->atoms[w].aromatic)
            benz = 1;
        if (m->atoms[w].el == EL_C)
            ncarb++;
    }
    if (benz)
        return SITE_BENZYLIC;
    int bb, cc;
    if (sites_allyl_partners(m, a, &bb, &cc, 1))
        return SITE_ALLYLIC;
    return ncarb <= 1 ? SITE_PRIMARY : ncarb == 2 ? SITE_SECONDARY : SITE_TERTIARY;
}

int sites_hbr_br_ends(const struct smi_mol *m, int bd, int *ends)
{
    int p = m->bonds[bd].a, q = m->bonds[bd].b;
    int dp = smiles_degree(m, p), dq = smiles_degree(m, q);
    if (dp == dq) {
        ends[0] = p;
        ends[1] = q;
        return 2;
    }
    ends[0] = dp < dq ? p : q;
    return 1;
}

/* ---- products -------------------------------------------------------------- */

/* Adds a halogen atom x_el to o, bonded singly to atom at. HL_ERR_NOMEM on failure. */
static enum hl_status add_x(struct smi_mol *o, int at, int x_el, struct hl_err *e)
{
    int x = smiles_add_atom(o, x_el);
    if (x < 0)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    return smiles_add_bond(o, at, x, 1, e);
}

/* Sets the order of the bond p-q of o, when there is one. */
static void set_order(struct smi_mol *o, int p, int q, int order)
{
    int bd = smiles_find_bond(o, p, q);
    if (bd >= 0)
        o->bonds[bd].order = order;
}

enum hl_status sites_substitute(const struct smi_mol *m, int a, int count, int x_el,
                                struct smi_mol *out, struct hl_err *e)
{
    if (count < 1 || count > m->atoms[a].hcount)
        return hl_err_set(e, HL_ERR_INTERNAL, "substitution of %d H on an atom with %d", count,
                          m->atoms[a].hcount);
    enum hl_status st = smiles_copy(m, out, e);
    for (int i = 0; !st && i < count; i++)
        st = add_x(out, a, x_el, e);
    if (!st) {
        out->atoms[a].hcount -= count;
        out->atoms[a].bracket = 0;
        st = smiles_reindex(out, e);
    }
    if (st)
        smiles_free(out);
    return st;
}

enum hl_status sites_allyl_shift(const struct smi_mol *m, int a, int b, int c, int x_el,
                                 struct smi_mol *out, struct hl_err *e)
{
    if (m->atoms[a].hcount < 1)
        return hl_err_set(e, HL_ERR_INTERNAL, "allylic shift from a carbon without H");
    enum hl_status st = smiles_copy(m, out, e);
    if (!st) {
        set_order(out, a, b, 2);
        set_order(out, b, c, 1);
        out->atoms[a].hcount--;
        st = add_x(out, c, x_el, e);
    }
    if (!st)
        st = smiles_reindex(out, e);
    if (st)
        smiles_free(out);
    return st;
}

enum hl_status sites_hbr_adduct(const struct smi_mol *m, const int *bonds, const int *br_at, int n,
                                struct smi_mol *out, struct hl_err *e)
{
    enum hl_status st = smiles_copy(m, out, e);
    for (int i = 0; !st && i < n; i++) {
        int p = br_at[i], q = smiles_other(m, bonds[i], p);
        out->bonds[bonds[i]].order = 1;
        out->atoms[q].hcount++;
        st = add_x(out, p, EL_Br, e);
    }
    if (!st)
        st = smiles_reindex(out, e);
    if (st)
        smiles_free(out);
    return st;
}
