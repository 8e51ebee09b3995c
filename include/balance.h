/*
 * balance.h - the mass balance of one run.
 *
 * Takes one resolved run (substrate, reagent amount, conversion, model
 * parameters), asks selectivity.h for the first-step products and kinetics.h
 * for the degree distribution, and returns moles and kilograms in and out:
 * products by degree and isomer, HX, SO2, succinimide, unreacted reagent (to
 * the vent or left in the mass), and the element balance over C H N O S Cl Br.
 * The halogen reacted is min(charged x conversion, what the substrate can take).
 */
#ifndef BALANCE_H
#define BALANCE_H

#include "formula.h"
#include "hlerr.h"
#include "kinetics.h"
#include "reagents.h"
#include "selectivity.h"

/* ROLE_OTHER is never made here: the ledger sums the over-halogenated products below
 * its reporting threshold into one such row (ledger.h). */
enum bal_role { ROLE_WANTED, ROLE_ISOMER, ROLE_OVERHAL, ROLE_UNREACTED, ROLE_OTHER };

/* Elements the element balance closes over. */
enum { BAL_NEL = 7 };
extern const int bal_elements[BAL_NEL]; /* EL_C, EL_H, EL_N, EL_O, EL_S, EL_Cl, EL_Br */

struct bal_in {
    const char *smiles;          /* substrate SMILES, or NULL */
    const char *formula;         /* substrate formula text when no SMILES */
    const char *product_smiles;  /* wanted isomer, may be NULL */
    double substrate_kg;
    int reagent;                 /* enum reagent_id */
    int amount_is_kg;
    double reagent_eq, reagent_kg;
    double halogen_conversion;   /* 0..1 */
    double temp_c;
    enum kin_mode mode;
    double vent_retained_fraction;
    struct sel_reactivity user;  /* set_mask 0 = defaults */
    int has_phi; double phi;     /* overhalogenation_factor */
    const double *ratios; int nratios;
};

struct bal_product {
    char *smiles;                /* owned, NULL when no unambiguous structure */
    char formula[64];
    int degree;
    double molar_mass_g_mol, mol, kg, mol_fraction;
    enum bal_role role;
};

struct bal_out {
    char substrate_formula[64];
    double substrate_molar_mass_g_mol, substrate_mol;
    double reagent_mol, reagent_kg;      /* charged */
    double reagent_reacted_mol, reagent_unreacted_mol;
    double halogen_reacted_mol;          /* C-X bonds formed */
    int capped;                          /* reaction limited by what the substrate can take */
    int isomers_resolved;                /* 1 with a SMILES substrate; 0: formula only, every
                                          * monohalide is one "wanted" product */
    double mean_degree;                  /* halogen per mole of substrate */
    struct bal_product *products; int nproducts; /* degree 0 first, then wanted, isomers, higher degrees */
    double hx_kg[2];                     /* [0] HCl, [1] HBr formed */
    double so2_kg, succinimide_kg;
    double vent_mol[VS_COUNT];           /* to the scrubber */
    double retained_mol[VS_COUNT];       /* dissolved in the reaction mass */
    double reagent_left_kg;              /* unreacted reagent that stays in the mass (SO2Cl2, NBS) */
    double wanted_kg, isomer_kg, overhal_kg, unreacted_substrate_kg;
    /* Run figures (issue 15.3), moles of this run. halogen_charged_mol counts halogen atoms
     * charged: 2 per Cl2, Br2 or SO2Cl2, 1 per NBS or HBr (from the reagent formula);
     * halogen_in_wanted_mol = wanted mol x degree (halogen this run put on the product). */
    double wanted_mol, converted_mol;    /* substrate converted = charged - unreacted */
    double halogen_charged_mol, halogen_in_wanted_mol;
    double yield_pct;                    /* wanted / substrate charged x 100 */
    double conversion_pct;               /* converted / substrate charged x 100 */
    double selectivity_pct;              /* wanted / converted x 100; 0 when nothing converted */
    int selectivity_defined;             /* 0: nothing converted, selectivity has no value */
    double halogen_efficiency_pct;       /* halogen_in_wanted / halogen_charged x 100 */
    double el_in_mol[BAL_NEL], el_out_mol[BAL_NEL];
    double max_rel_error;
    /* the selectivity prediction (niso 0 for formula input); owned by this result after
     * bal_compute, by the cache after bal_compute_cached (sel_owned 0); NULL after bal_copy */
    struct sel_result *sel;
    int sel_owned;
    char warning[320];                   /* "" or why the run is capped / out of range */
};

/* Compute the balance of one run. On HL_ERR_INPUT, e->field names the input
 * ("smiles", "product_smiles", "formula", "reagent") and e->col the column inside
 * it (0 = the whole value); out is then left empty. On success out is owned by the
 * caller: bal_free. */
enum hl_status bal_compute(const struct bal_in *in, struct bal_out *out, struct hl_err *e);

/* Results shared between the runs of a campaign, so that each is worked out once: the
 * selectivity prediction per (substrate, wanted product, reagent, temperature, reactivity
 * overrides), the formulas and molar masses of its products, and the formulas the
 * element balance counts with. The balances are bit-identical to bal_compute's. */
struct bal_cache;

/* An empty cache, or NULL when out of memory. Owned by the caller: bal_cache_free. */
struct bal_cache *bal_cache_new(void);

/* Free a cache and every prediction in it; NULL is fine. Results computed with it keep
 * their products but their sel pointer dangles afterwards. */
void bal_cache_free(struct bal_cache *c);

/* Like bal_compute, taking the prediction (and product formulas) and the solved degree
 * distribution from the cache and adding them there when new; out->sel then belongs to
 * the cache. The result equals bal_compute's bit for bit; cache may be NULL. */
enum hl_status bal_compute_cached(const struct bal_in *in, struct bal_cache *cache,
                                  struct bal_out *out, struct hl_err *e);

/* Deep copy of a computed balance for an identical run (a repeat): products and their
 * structures are duplicated; the selectivity detail (sel) is not carried over (zeroed).
 * dst is owned by the caller (bal_free); on HL_ERR_NOMEM dst is left empty. */
enum hl_status bal_copy(struct bal_out *dst, const struct bal_out *src, struct hl_err *e);

/* Free what bal_compute allocated (products, their structures, the selectivity
 * result unless a cache owns it) and zero *out; safe on a zeroed or already freed result. */
void bal_free(struct bal_out *out);

#endif
