/*
 * liquor.c - scrubber data tables (see liquor.h): formation enthalpies, salts, property
 * tables and the liquor rows.
 *
 * Molar masses are sums of the CIAAW 2021 conventional weights of elements.h, written
 * out so the tables are static data; test_reagents checks each against its formula.
 * Adding a liquor is one row of `liquors` below (with the rows of the salts it forms and
 * the formation enthalpies its heats need) plus its tests: see DEVELOPERS.md.
 */
#include "liquor.h"

#include "elements.h"

#define M_H2O (2 * ELEM_W_H + ELEM_W_O)

/* ---- standard enthalpies of formation at 298.15 K, 1 bar [kJ/mol] ----
 * NBS = Wagman et al., "The NBS tables of chemical thermodynamic properties",
 *       J. Phys. Chem. Ref. Data 11, Suppl. 2 (1982).
 * CODATA = Cox, Wagman & Medvedev, CODATA Key Values for Thermodynamics (1989).
 * "aq" is the hypothetical 1 mol/kg standard state (infinite dilution); the
 * heats are therefore those of absorption into dilute liquor.  Salts whose
 * neutral aqueous value we could not confirm are sums of NBS ion values, and
 * ion values recalled without the table in hand are marked "from memory". */
/* ion values (NBS 1982): Na+(aq) -240.12; ClO-(aq) -107.1, BrO-(aq) -94.1, SO3^2-(aq) -635.5,
 * SO4^2-(aq) -909.27 (from memory; the CODATA 1989 key value is -909.34, from memory) */
#define DFH_NA_ION (-240.12)
static const struct liquor_dfh dfh[DFH_COUNT] = {
    [DFH_H2O] = {"H2O(l)", -285.830, "NBS 1982 (CODATA 1989 -285.830)"},
    [DFH_HCL_G] = {"HCl(g)", -92.307, "NBS 1982 (CODATA 1989 -92.31)"},
    [DFH_HCL_AQ] = {"HCl(aq)", -167.159, "NBS 1982"},
    [DFH_HBR_G] = {"HBr(g)", -36.29, "CODATA 1989 (NBS 1982 lists -36.40)"},
    [DFH_CL2_G] = {"Cl2(g)", 0.0, "reference state"},
    [DFH_BR2_G] = {"Br2(g)", 30.907, "NBS 1982 (Br2(l) = 0, reference state)"},
    [DFH_SO2_G] = {"SO2(g)", -296.830, "NBS 1982"},
    [DFH_NAOH_AQ] = {"NaOH(aq)", -470.114, "NBS 1982"},
    [DFH_NACL_AQ] = {"NaCl(aq)", -407.27, "NBS 1982"},
    [DFH_NABR_AQ] = {"NaBr(aq)", -361.67, "NBS 1982"},
    [DFH_NAOCL_AQ] = {"NaOCl(aq)", DFH_NA_ION - 107.1,
                    "Na+(aq) -240.12 (NBS 1982) + ClO-(aq) -107.1 (NBS 1982, from memory)"},
    [DFH_NAOBR_AQ] = {"NaOBr(aq)", DFH_NA_ION - 94.1,
                    "Na+(aq) -240.12 (NBS 1982) + BrO-(aq) -94.1 (NBS 1982, from memory)"},
    [DFH_NA2SO3_AQ] = {"Na2SO3(aq)", 2 * DFH_NA_ION - 635.5,
                     "2 Na+(aq) (NBS 1982) + SO3^2-(aq) -635.5 (NBS 1982, from memory)"},
    [DFH_NA2SO4_AQ] = {"Na2SO4(aq)", 2 * DFH_NA_ION - 909.27,
                     "2 Na+(aq) (NBS 1982) + SO4^2-(aq) -909.27 (NBS 1982, from memory); the "
                     "NBS entry Na2SO4(aq) -1389.51 is the same sum (from memory)"},
    /* HBr dissolving in a water liquor: both values from the NBS tables, so the heat of
     * solution is that of one table (as HCl(g) -> HCl(aq) above) */
    [DFH_HBR_G_NBS] = {"HBr(g), with HBr(ao)", -36.40,
                     "NBS 1982 (used with HBr(ao) for the heat of solution in water)"},
    [DFH_HBR_AQ] = {"HBr(ao)", -121.55, "NBS 1982, equal to Br-(ao) (H+(ao) = 0) (from memory)"},
    /* a carbonate base: CO2 given off as gas, and the dissolved carbonate as its ions */
    [DFH_CO2_G] = {"CO2(g)", -393.509, "NBS 1982 (CODATA 1989 -393.51) (from memory)"},
    [DFH_NA2CO3_AQ] = {"Na2CO3(aq)", 2 * DFH_NA_ION - 677.14,
                     "2 Na+(aq) (NBS 1982) + CO3^2-(aq) -677.14 (NBS 1982, from memory); the NBS "
                     "entry Na2CO3(ai) -1157.38 is the same sum (from memory)"},
};

const struct liquor_dfh *liquor_dfh_get(int i)
{
    return i >= 0 && i < DFH_COUNT ? &dfh[i] : NULL;
}

/* Sulfite and hypohalite cannot coexist in the liquor: SO3^2- + OX^- -> SO4^2- + X^- (fast
 * in alkaline solution; the same reaction that dechlorinates water with sulfite).
 * Hypochlorite goes first, being the stronger oxidant (standard potentials in base
 * ClO-/Cl- +0.89 V, BrO-/Br- +0.76 V, from memory): its row comes first. */
static const struct liquor_salt salts[SALT_COUNT] = {
    [SALT_NACL] = {"NaCl", ELEM_W_NA + ELEM_W_CL, DFH_NACL_AQ, -1, -1},
    [SALT_NABR] = {"NaBr", ELEM_W_NA + ELEM_W_BR, DFH_NABR_AQ, -1, -1},
    [SALT_NAOCL] = {"NaOCl", ELEM_W_NA + ELEM_W_O + ELEM_W_CL, DFH_NAOCL_AQ, SALT_NACL, -1},
    [SALT_NAOBR] = {"NaOBr", ELEM_W_NA + ELEM_W_O + ELEM_W_BR, DFH_NAOBR_AQ, SALT_NABR, -1},
    [SALT_NA2SO3] = {"Na2SO3", 2 * ELEM_W_NA + ELEM_W_S + 3 * ELEM_W_O, DFH_NA2SO3_AQ, -1,
                     SALT_NA2SO4},
    [SALT_NA2SO4] = {"Na2SO4", 2 * ELEM_W_NA + ELEM_W_S + 4 * ELEM_W_O, DFH_NA2SO4_AQ, -1, -1},
};

const struct liquor_salt *liquor_salt_get(int salt)
{
    return salt >= 0 && salt < SALT_COUNT ? &salts[salt] : NULL;
}

/* ---- property tables (linear interpolation, clamped at the ends) ---- */
struct pt { double x, y; };

static double interp(const struct pt *t, int n, double x)
{
    if (!(x > t[0].x))
        return t[0].y;
    if (x >= t[n - 1].x)
        return t[n - 1].y;
    int i = 1;
    while (t[i].x < x)
        i++;
    double f = (x - t[i - 1].x) / (t[i].x - t[i - 1].x);
    return t[i - 1].y + f * (t[i].y - t[i - 1].y);
}
#define NPT(t) ((int)(sizeof(t) / sizeof(t[0])))

/* Hydrochloric acid, density at 20 C [g/cm3] vs HCl mass percent: CRC Handbook of
 * Chemistry and Physics, "Concentrative properties of aqueous solutions" (the same
 * figures appear in Perry's Chemical Engineers' Handbook).  Values from memory of that
 * table; 0 % is water at 20 C, 0.99820 g/cm3. */
static const struct pt hcl_rho[] = {
    {0, 0.99820},  {2, 1.0082},  {4, 1.0181},  {6, 1.0279},  {8, 1.0376},  {10, 1.0474},
    {12, 1.0574},  {14, 1.0675}, {16, 1.0776}, {18, 1.0878}, {20, 1.0980}, {22, 1.1083},
    {24, 1.1187},  {26, 1.1290}, {28, 1.1392}, {30, 1.1493}, {32, 1.1593}, {34, 1.1691},
    {36, 1.1789},  {38, 1.1885}, {40, 1.1980}};

double liquor_hcl_acid_density_kg_m3(double wt) { return 1000.0 * interp(hcl_rho, NPT(hcl_rho), wt); }

/* Caustic soda solution, density at 20 C [g/cm3]: CRC Handbook, "Concentrative
 * properties of aqueous solutions"; values from memory of that table. */
static const struct pt naoh_rho[] = {{0, 0.99820}, {10, 1.1089}, {20, 1.2191},
                                     {30, 1.3277}, {40, 1.4300}, {50, 1.5253}};

double liquor_naoh_density_kg_m3(double wt) { return 1000.0 * interp(naoh_rho, NPT(naoh_rho), wt); }

/* Caustic soda solution heat capacity near 20 C [kJ/(kg K)] vs NaOH mass percent.
 * From memory (caustic producers' data sheets give about 0.78 Btu/(lb F) = 3.27 at
 * 50 %); about +-3 %.  0 % is liquid water, 4.18 (IAPWS-95 near 20 C).  Salts in
 * spent liquor lower it a little more; the rise is then slightly understated. */
static const struct pt naoh_cp[] = {{0, 4.18}, {10, 3.78}, {20, 3.59},
                                    {30, 3.48}, {40, 3.38}, {50, 3.27}};

double liquor_naoh_cp_kj_kg_k(double wt) { return interp(naoh_cp, NPT(naoh_cp), wt); }

/* Hydrochloric acid heat capacity [kJ/(kg K)]: from memory of Perry's table of heat
 * capacities of aqueous HCl (cal/(g K) 1.00, 0.72, 0.61, 0.58, 0.55 at 0, 9.09, 16.7,
 * 20.0, 25.9 mol % HCl), converted to mass percent and kJ/(kg K). */
static const struct pt hcl_cp[] = {{0, 4.18}, {16.8, 3.01}, {28.8, 2.55}, {33.6, 2.43},
                                   {41.5, 2.30}};

double liquor_hcl_acid_cp_kj_kg_k(double wt) { return interp(hcl_cp, NPT(hcl_cp), wt); }

/* Hydrobromic acid, density at 20 C [g/cm3] vs HBr mass percent: CRC Handbook of
 * Chemistry and Physics, "Concentrative properties of aqueous solutions"; values from
 * memory of that table (suppliers give about 1.49 for the 48 % commercial acid). */
static const struct pt hbr_rho[] = {{0, 0.99820}, {10, 1.0723}, {20, 1.1579}, {30, 1.2580},
                                    {40, 1.3772}, {50, 1.5173}, {60, 1.6787}};

double liquor_hbr_acid_density_kg_m3(double wt) { return 1000.0 * interp(hbr_rho, NPT(hbr_rho), wt); }

/* A water liquor holding both acids: each acid adds its own density increment over water
 * at its own strength (additive increments, an assumption good at the low strengths of a
 * scrubber liquor). */
double liquor_acid_density_kg_m3(double hcl_wt_pct, double hbr_wt_pct)
{
    double w = 1000.0 * hcl_rho[0].y;
    return liquor_hcl_acid_density_kg_m3(hcl_wt_pct) + liquor_hbr_acid_density_kg_m3(hbr_wt_pct) - w;
}

/* Heat capacity of a water liquor holding HCl and HBr.  No hydrobromic acid table was at
 * hand, so the hydrochloric acid table is read at the same acid mole fraction and the
 * molar heat capacity of the solution taken as equal (assumption): cp = cp_HCl(w') x
 * M' / M, w' the HCl mass fraction of that equivalent acid, M' and M the mean molar masses
 * of the equivalent and the real solution.  Without HBr this is the HCl table itself. */
double liquor_acid_cp_kj_kg_k(double hcl_wt_pct, double hbr_wt_pct)
{
    double m_hcl = ELEM_W_H + ELEM_W_CL, m_hbr = ELEM_W_H + ELEM_W_BR;
    double n1 = hcl_wt_pct / m_hcl, n2 = hbr_wt_pct / m_hbr;
    double nw = (100.0 - hcl_wt_pct - hbr_wt_pct) / M_H2O, n = n1 + n2 + nw;
    if (!(hbr_wt_pct > 0) || !(n > 0))
        return liquor_hcl_acid_cp_kj_kg_k(hcl_wt_pct);
    double x = (n1 + n2) / n;
    double m_eq = x * m_hcl + (1 - x) * M_H2O, m_real = (n1 * m_hcl + n2 * m_hbr + nw * M_H2O) / n;
    return liquor_hcl_acid_cp_kj_kg_k(100.0 * x * m_hcl / m_eq) * m_eq / m_real;
}

/* Boiling point at 1 atm [C] of caustic soda solution vs NaOH mass percent: from memory of
 * the CRC Handbook / Perry's tables of boiling points of aqueous NaOH (50 % boils near
 * 143 C).  The liquor is judged at its NaOH strength alone: the salts formed raise its
 * boiling point further, so the alarm comes early, never late (conservative). */
static const struct pt naoh_bp[] = {{0, 100.0}, {10, 102.8}, {20, 108.0}, {30, 117.0},
                                    {40, 128.0}, {50, 143.0}};

double liquor_naoh_boiling_point_c(double naoh_wt_pct) { return interp(naoh_bp, NPT(naoh_bp), naoh_wt_pct); }

/* Caustic soda viscosity at 20 C [mPa s], from memory (approximate); it enters the
 * flooding correlation only as mu^0.2, so a 2x error moves the diameter by ~4 %. */
static const struct pt naoh_mu[] = {{0, 1.00}, {10, 1.9}, {20, 4.5}, {30, 11.0},
                                    {40, 30.0}, {50, 80.0}};


/* ---- the liquors ---- */

static double caustic_cp(const struct liquor_comp *c) { return liquor_naoh_cp_kj_kg_k(c->base_wt_pct); }
static double caustic_bp(const struct liquor_comp *c) { return liquor_naoh_boiling_point_c(c->base_wt_pct); }
static double caustic_rho(const struct liquor_comp *c) { return liquor_naoh_density_kg_m3(c->base_wt_pct); }
static double caustic_visc(const struct liquor_comp *c) { return interp(naoh_mu, NPT(naoh_mu), c->base_wt_pct); }

static double water_cp(const struct liquor_comp *c)
{
    return liquor_acid_cp_kj_kg_k(c->gas_wt_pct[VS_HCL], c->gas_wt_pct[VS_HBR]);
}
/* A water liquor is taken to boil at 100 C, water at 1 atm: hydrochloric and hydrobromic
 * acid boil higher up to their maximum-boiling azeotropes (about 108.6 C at 20.2 wt% HCl,
 * 124.3 C at 47.6 wt% HBr, CRC Handbook azeotrope table, from memory), so below them
 * the alarm comes early, never late.  Past an azeotrope the acid boils lower and gives off
 * its gas: the changeout strengths keep a liquor under them by default. */
static double water_bp(const struct liquor_comp *c) { (void)c; return 100.0; }
static double water_rho(const struct liquor_comp *c) { (void)c; return LIQUOR_RHO_WATER_KG_M3; }
static double water_visc(const struct liquor_comp *c) { (void)c; return 1.0; }

/* Sodium carbonate solution (soda ash liquor), by Na2CO3 mass percent.  The tables stop at
 * 14 wt%, the strongest fresh liquor taken: under the solubility near 20 C (21.5 g per 100 g
 * water, 17.7 wt%; at 10 C only about 11 wt%, where the decahydrate crystallises; CRC
 * Handbook, "Aqueous solubility of inorganic compounds", from memory).  Density at 20 C
 * [g/cm3]: CRC Handbook, "Concentrative properties of aqueous solutions", from memory. */
static const struct pt na2co3_rho[] = {{0, 0.99820}, {1, 1.0086}, {2, 1.0190}, {4, 1.0398},
                                       {6, 1.0606}, {8, 1.0816}, {10, 1.1029}, {12, 1.1244},
                                       {14, 1.1463}};
/* Viscosity at 20 C [mPa s]: from memory, approximate (CRC concentrative properties table);
 * it enters the flooding correlation as mu^0.2 only. */
static const struct pt na2co3_mu[] = {{0, 1.00}, {5, 1.25}, {10, 1.60}, {14, 2.00}};

static double soda_rho(const struct liquor_comp *c) { return 1000.0 * interp(na2co3_rho, NPT(na2co3_rho), c->base_wt_pct); }
static double soda_visc(const struct liquor_comp *c) { return interp(na2co3_mu, NPT(na2co3_mu), c->base_wt_pct); }
/* Heat capacity: no table of sodium carbonate solutions was at hand, so the liquor is
 * credited with the heat capacity of the water in it only, 4.18 x (1 - w) [kJ/(kg K)]
 * (IAPWS-95 near 20 C for water); the caustic table above meets this rule within 1 % at 10
 * wt% NaOH.  About +-5 % (assumption): the dissolved salt's apparent heat capacity is small. */
static double soda_cp(const struct liquor_comp *c)
{
    double w = c->base_wt_pct < 0 ? 0 : c->base_wt_pct > 14 ? 14 : c->base_wt_pct;
    return 4.18 * (1.0 - w / 100.0);
}
/* Boiling point: taken as water's, 100 C at 1 atm.  The carbonate raises it by at most
 * about 2.4 K at 14 wt% (ideal dilute solution, three ions, ebullioscopic constant of water
 * 0.512 K kg/mol, from memory), and its salts further, so the alarm comes early, never
 * late. */
static double soda_bp(const struct liquor_comp *c) { (void)c; return 100.0; }

/* Default removal without column data or a given value: a packed caustic scrubber on a
 * halogenation vent is commonly specified for 99 % removal of HCl and HBr and 98 % of Cl2,
 * Br2 and SO2 (common practice: typical guarantee figures, not a design); a water scrubber
 * for 95 % of HCl and HBr (from memory).  Cl2, Br2 and SO2 pass a water liquor, so it
 * removes none of them. */
#define CAUSTIC_REM "packed caustic scrubber, typical specification (common practice)"
#define WATER_REM "water scrubber, typical specification (from memory)"
#define WATER_PASS "a water liquor does not absorb it (liquor model)"
/* A packed soda-ash scrubber: the acid gases as on caustic (a fast acid-base reaction) and SO2
 * (soda ash is a usual SO2 liquor), the halogens somewhat less (they react through hypohalous
 * acid, slower at the lower pH of carbonate): from memory, typical figures, not a design. */
#define SODA_REM "packed soda-ash scrubber, typical specification (from memory)"

/* Caustic liquor reactions of design section 4, per mole of vent gas:
 *   HCl + NaOH -> NaCl + H2O          HBr + NaOH -> NaBr + H2O
 *   Cl2 + 2 NaOH -> NaCl + NaOCl + H2O Br2 + 2 NaOH -> NaBr + NaOBr + H2O
 *   SO2 + 2 NaOH -> Na2SO3 + H2O
 * Water absorbs the acid gases (HCl(g) -> HCl(aq), HBr(g) -> HBr(ao)); Cl2, Br2 and SO2
 * pass it; its changeout strengths are the campaign's (campaign.c defaults, under the
 * azeotropes). */
#define REACT(base, s0, n0, s1, n1, g, rem)                                                    \
    {.uptake = LQ_REACTS, .base_mol = base, .salt = {s0, s1, -1}, .salt_mol = {n0, n1, 0},      \
     .water_mol = 1, .co2_mol = 0, .dfh_gas = g, .dfh_taken = -1, .removal = rem,               \
     .removal_origin = CAUSTIC_REM}
#define DISSOLVE(g, taken, rem, origin)                                                        \
    {.uptake = LQ_DISSOLVES, .salt = {-1, -1, -1}, .dfh_gas = g, .dfh_taken = taken,            \
     .removal = rem, .removal_origin = origin}
#define PASS(g)                                                                                \
    {.uptake = LQ_PASSES, .salt = {-1, -1, -1}, .dfh_gas = g, .dfh_taken = -1, .removal = 0.0,  \
     .removal_origin = WATER_PASS}
/* Soda ash liquor, the carbonate spent to CO2 (basis: the least carbonate per mole of gas;
 * while carbonate is in excess the first acid makes bicarbonate instead, which takes twice
 * the carbonate per mole of HCl and gives off no CO2 - see design section 4), per mole of
 * vent gas:
 *   2 HCl + Na2CO3 -> 2 NaCl + H2O + CO2      2 HBr + Na2CO3 -> 2 NaBr + H2O + CO2
 *   Cl2 + Na2CO3 -> NaCl + NaOCl + CO2        Br2 + Na2CO3 -> NaBr + NaOBr + CO2
 *   SO2 + Na2CO3 -> Na2SO3 + CO2 */
#define SODA(base, s0, n0, s1, n1, w, g, rem)                                                  \
    {.uptake = LQ_REACTS, .base_mol = base, .salt = {s0, s1, -1}, .salt_mol = {n0, n1, 0},      \
     .water_mol = w, .co2_mol = base, .dfh_gas = g, .dfh_taken = -1, .removal = rem,            \
     .removal_origin = SODA_REM}
static const struct liquor_info liquors[LQ_COUNT] = {
    /* 50 wt%: the end of the NaOH tables above and the usual commercial strength */
    [LQ_NAOH] = {"naoh", RG_NAOH, DFH_NAOH_AQ, LQ_KEYS_NAOH, 50, NULL, "caustic scrubber", "caustic",
                 {[VS_HCL] = REACT(1, SALT_NACL, 1, -1, 0, DFH_HCL_G, 0.99),
                  [VS_HBR] = REACT(1, SALT_NABR, 1, -1, 0, DFH_HBR_G, 0.99),
                  [VS_CL2] = REACT(2, SALT_NACL, 1, SALT_NAOCL, 1, DFH_CL2_G, 0.98),
                  [VS_BR2] = REACT(2, SALT_NABR, 1, SALT_NAOBR, 1, DFH_BR2_G, 0.98),
                  [VS_SO2] = REACT(2, SALT_NA2SO3, 1, -1, 0, DFH_SO2_G, 0.98)},
                 caustic_cp, caustic_bp, caustic_rho, caustic_visc,
                 "NaOH solution at the liquor's strength, salts ignored"},
    [LQ_WATER] = {"water", -1, -1, LQ_KEYS_NONE, 0, NULL, "water scrubber", NULL,
                  {[VS_HCL] = DISSOLVE(DFH_HCL_G, DFH_HCL_AQ, 0.95, WATER_REM),
                   /* both HBr values from the NBS tables, so the heat of solution is that of
                    * one table (as for HCl) */
                   [VS_HBR] = DISSOLVE(DFH_HBR_G_NBS, DFH_HBR_AQ, 0.95, WATER_REM),
                   [VS_CL2] = PASS(DFH_CL2_G), [VS_BR2] = PASS(DFH_BR2_G), [VS_SO2] = PASS(DFH_SO2_G)},
                  water_cp, water_bp, water_rho, water_visc,
                  "water: the acids boil higher up to their azeotropes"},
    [LQ_SODA_ASH] = {"soda_ash", RG_NA2CO3, DFH_NA2CO3_AQ, LQ_KEYS_BASE, 14,
                     "under the solubility of Na2CO3 near 20 C (about 17.7 wt%)",
                     "soda-ash scrubber", "soda ash",
                     {[VS_HCL] = SODA(0.5, SALT_NACL, 1, -1, 0, 0.5, DFH_HCL_G, 0.99),
                      [VS_HBR] = SODA(0.5, SALT_NABR, 1, -1, 0, 0.5, DFH_HBR_G, 0.99),
                      [VS_CL2] = SODA(1, SALT_NACL, 1, SALT_NAOCL, 1, 0, DFH_CL2_G, 0.95),
                      [VS_BR2] = SODA(1, SALT_NABR, 1, SALT_NAOBR, 1, 0, DFH_BR2_G, 0.95),
                      [VS_SO2] = SODA(1, SALT_NA2SO3, 1, -1, 0, 0, DFH_SO2_G, 0.98)},
                     soda_cp, soda_bp, soda_rho, soda_visc,
                     "water at 1 atm, the carbonate and salts ignored"},
};

const struct liquor_info *liquor_get(int liquor)
{
    return liquor >= 0 && liquor < LQ_COUNT ? &liquors[liquor] : NULL;
}

int liquor_has(int liquor, int uptake)
{
    const struct liquor_info *l = liquor_get(liquor);
    for (int v = 0; l && v < VS_COUNT; v++)
        if (l->gas[v].uptake == uptake)
            return 1;
    return 0;
}
