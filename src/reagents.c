/*
 * reagents.c - reagent, vent-species and caution tables (see reagents.h).
 *
 * Molar masses are written as the sums of the CIAAW 2021 weights of
 * elements.c, so the table and formula_molar_mass_g_mol() agree (checked by
 * test_reagents.c to 1e-9).  Stoichiometry per mole of reagent reacted
 * follows design section 4.
 *
 * Exposure limits: NIOSH REL, OSHA PEL and IDLH as listed in the NIOSH Pocket
 * Guide to Chemical Hazards, DHHS (NIOSH) Publication 2005-149 (2007); they were
 * entered as recalled from that guide, without a copy at hand to re-read, so
 * check them against it before quoting them in a permit.  ACGIH TLVs are from
 * memory (the edition year could not be checked) and say so in their source
 * field, as do the "none established" rows for SO2Cl2, NBS and NaOCl.  Limits are revised: the current SDS and
 * the regulations in force take precedence (caution_deferral()).
 */
#include "reagents.h"

#include "elements.h"

#include <string.h>


static const struct reagent_info reagents[RG_COUNT] = {
    [RG_CL2] = {"Cl2", "Cl2", "chlorine", 2 * ELEM_W_CL, RK_SUBSTITUTION, EL_Cl,
                1.0, VS_HCL, 0.0, 0.0,
                /* unreacted chlorine leaves with the HCl to the scrubber */
                VS_CL2, "gas (liquefied under pressure)", CA_CL2,
                RG_SITES_SP3, EL_Cl, NULL, 1, RB_CLCL, RB_HCL, 1, 0, NULL},
    [RG_BR2] = {"Br2", "Br2", "bromine", 2 * ELEM_W_BR, RK_SUBSTITUTION, EL_Br,
                1.0, VS_HBR, 0.0, 0.0,
                /* Br2 boils at 59 C (from memory) and is swept out with the HBr
                 * off-gas; counting it at the scrubber is the conservative choice
                 * for liquor sizing (common practice) */
                VS_BR2, "liquid (fuming, bp about 59 C)", CA_BR2,
                RG_SITES_SP3, EL_Br, NULL, 0, RB_BRBR, RB_HBR, 0, 0, NULL},
    [RG_SO2CL2] = {"SO2Cl2", "Cl2O2S", "sulfuryl chloride", ELEM_W_S + 2 * ELEM_W_O + 2 * ELEM_W_CL,
                   RK_SUBSTITUTION, EL_Cl, 1.0, VS_HCL, 1.0, 0.0,
                   /* a liquid boiling at 69 C (from memory): what is not consumed
                    * stays in the reaction mass and must be quenched in work-up */
                   -1, "liquid (bp about 69 C)", CA_SO2CL2,
                   RG_SITES_SP3, EL_Cl,
                   "from memory: taken equal to Cl2 (Cl atoms carry the chain); SO2Cl radicals "
                   "can make SO2Cl2 somewhat more selective",
                   0, RB_SO2CL2, RB_HCL, 0,
                   /* boils at about 69 C (from memory) */
                   69.0, "SO2Cl2 + 4 NaOH -> Na2SO4 + 2 NaCl + 2 H2O in caustic"},
    [RG_NBS] = {"NBS", "C4H4BrNO2", "N-bromosuccinimide",
                4 * ELEM_W_C + 4 * ELEM_W_H + ELEM_W_BR + ELEM_W_N + 2 * ELEM_W_O, RK_NBS, EL_Br,
                /* the HBr of each abstraction step reacts with NBS to give the Br2
                 * that brominates: net RH + NBS -> RBr + succinimide, no HX vented */
                0.0, -1, 0.0, 1.0,
                /* a solid (succinimide and unreacted NBS are filtered off) */
                -1, "solid", CA_NBS,
                /* Br atoms abstract the H in NBS brominations (Goldfinger mechanism) */
                RG_SITES_ALLYL_BENZYL, EL_Br,
                "Br2 values: Br atoms abstract the H in NBS brominations (Goldfinger mechanism; "
                "common practice); Br2 value itself from memory",
                0, RB_NBR, RB_NH, 0, 0, NULL},
    [RG_HBR] = {"HBr", "BrH", "hydrogen bromide", ELEM_W_H + ELEM_W_BR, RK_ADDITION, EL_Br,
                /* the adduct takes the whole HBr: no acid gas formed */
                0.0, -1, 0.0, 0.0,
                /* excess HBr vents (design section 4) */
                VS_HBR, "gas (liquefied under pressure)", CA_HBR,
                0, -1, NULL, 0, RB_HBR, RB_NONE, 1, 0, NULL},
    [RG_NAOH] = {"NaOH", "HNaO", "sodium hydroxide (scrubber caustic make-up)",
                 ELEM_W_NA + ELEM_W_O + ELEM_W_H, RK_BASE, -1, 0.0, -1, 0.0, 0.0, -1,
                 "aqueous solution (caustic liquor)", CA_NAOH,
                 0, -1, NULL, 0, RB_NONE, RB_NONE, 0, 0, NULL},
    [RG_NA2CO3] = {"Na2CO3", "CNa2O3", "sodium carbonate (soda ash, scrubber make-up)",
                   2 * ELEM_W_NA + ELEM_W_C + 3 * ELEM_W_O, RK_BASE, -1, 0.0, -1, 0.0, 0.0, -1,
                   "solid (dense soda ash, dissolved on site)", CA_NA2CO3,
                   0, -1, NULL, 0, RB_NONE, RB_NONE, 0, 0, NULL},
};

const struct reagent_info *reagent_get(int id)
{
    return (id >= 0 && id < RG_COUNT) ? &reagents[id] : NULL;
}

int reagent_lookup(const char *name)
{
    if (!name)
        return -1;
    for (int i = 0; i < RG_COUNT; i++)
        if (strcmp(reagents[i].name, name) == 0)
            return i;
    return -1;
}

static const struct vent_info vents[VS_COUNT] = {
    /* HCl, HBr and SO2 dissolve in the reaction mass (vent_retained_fraction, design
     * section 3); the halogens are counted at the scrubber whole (common practice) */
    [VS_HCL] = {"HCl", "ClH", ELEM_W_H + ELEM_W_CL, CA_HCL, 1, 1},
    [VS_HBR] = {"HBr", "BrH", ELEM_W_H + ELEM_W_BR, CA_HBR, 1, 1},
    [VS_CL2] = {"Cl2", "Cl2", 2 * ELEM_W_CL, CA_CL2, 0, 0},
    [VS_BR2] = {"Br2", "Br2", 2 * ELEM_W_BR, CA_BR2, 0, 0},
    [VS_SO2] = {"SO2", "O2S", ELEM_W_S + 2 * ELEM_W_O, CA_SO2, 0, 1},
};

const struct vent_info *vent_get(int vs) { return (vs >= 0 && vs < VS_COUNT) ? &vents[vs] : NULL; }

const char *vent_name(int vs) { return (vs >= 0 && vs < VS_COUNT) ? vents[vs].name : NULL; }

const char *vent_formula(int vs) { return (vs >= 0 && vs < VS_COUNT) ? vents[vs].formula : NULL; }

double vent_molar_mass_g_mol(int vs)
{
    return (vs >= 0 && vs < VS_COUNT) ? vents[vs].molar_mass_g_mol : 0.0;
}

int vent_caution(int vs) { return (vs >= 0 && vs < VS_COUNT) ? vents[vs].caution : -1; }

#define SRC_NIOSH "NIOSH Pocket Guide to Chemical Hazards, DHHS (NIOSH) Publication 2005-149, 2007"
#define SRC_OSHA                                                                             \
    "OSHA 29 CFR 1910.1000 Table Z-1, as listed in the NIOSH Pocket Guide to Chemical "      \
    "Hazards, DHHS (NIOSH) Publication 2005-149, 2007"
#define SRC_ACGIH "ACGIH TLVs and BEIs (from memory; edition year not verified)"
#define SRC_NO_NIOSH                                                                         \
    "NIOSH Pocket Guide to Chemical Hazards, DHHS (NIOSH) Publication 2005-149, 2007: "      \
    "not listed (from memory)"
#define SRC_NO_OSHA "OSHA 29 CFR 1910.1000 Table Z-1: not listed (from memory)"
#define NONE "none established"

#define LIM4(rel, pel, idlh, tlv)                                                            \
    {{"NIOSH REL", rel, SRC_NIOSH}, {"OSHA PEL", pel, SRC_OSHA}, {"IDLH", idlh, SRC_NIOSH},  \
     {"ACGIH TLV", tlv, SRC_ACGIH}},                                                         \
        4
/* Same with the IDLH taken from a newer NIOSH IDLH value profile than the Pocket Guide. */
#define LIM4_IDLH(rel, pel, idlh, idlh_src, tlv)                                             \
    {{"NIOSH REL", rel, SRC_NIOSH}, {"OSHA PEL", pel, SRC_OSHA}, {"IDLH", idlh, idlh_src},   \
     {"ACGIH TLV", tlv, SRC_ACGIH}},                                                         \
        4
/* NIOSH revised these two IDLH values in 2025 (HCl 50 -> 45 ppm, HBr 30 -> 35 ppm); the
 * profiles' DHHS (NIOSH) publication numbers were not at hand, so only title and year. */
#define SRC_IDLH_HCL "NIOSH IDLH Value Profile: Hydrogen Chloride, 2025"
#define SRC_IDLH_HBR "NIOSH IDLH Value Profile: Hydrogen Bromide, 2025"
#define LIM_NONE                                                                             \
    {{"NIOSH REL", NONE, SRC_NO_NIOSH}, {"OSHA PEL", NONE, SRC_NO_OSHA},                     \
     {"IDLH", NONE, SRC_NO_NIOSH}, {"ACGIH TLV", NONE, SRC_ACGIH}},                          \
        4

static const struct caution_info cautions[CA_COUNT] = {
    [CA_CL2] = {
        "Chlorine (Cl2)", "7782-50-5",
        LIM4("C 0.5 ppm (1.45 mg/m3), 15-minute ceiling", "C 1 ppm (3 mg/m3)", "10 ppm",
             "TWA 0.1 ppm, STEL 0.4 ppm"),
        "Toxic, corrosive gas, heavier than air, that pools in low places; attacks eyes and "
        "airways, with lung oedema that can appear hours after a heavy exposure. A strong "
        "oxidiser that supports burning. Stored as a liquid under pressure, so a small liquid "
        "leak gives a large gas release. In radical chlorination, chlorine fed while initiation "
        "(light, heat, initiator) has stalled accumulates and can then react all at once: a "
        "runaway with a surge of HCl to the vent; feed only against proven consumption. "
        "Chlorine with hydrocarbon vapour in a headspace or vent line can form explosive "
        "mixtures (common practice).",
        "Ammonia and amines (explosive nitrogen chlorides), hydrogen, hydrocarbons and other "
        "organics (violent or explosive reaction, especially in light), finely divided metals; "
        "dry chlorine ignites titanium; wet chlorine corrodes steel. Hypochlorite liquor mixed "
        "with acid gives chlorine back.",
        "Closed transfer with leak-tested connections; fixed chlorine detectors and alarms; "
        "self-contained breathing apparatus for line breaking and emergencies; goggles, face "
        "shield and resistant gloves; the container supplier's emergency kit at hand.",
        "Cl2: toxic oxidising gas - NIOSH REL C 0.5 ppm, IDLH 10 ppm; keep from ammonia, "
        "hydrocarbons and acidified hypochlorite.",
    },
    [CA_BR2] = {
        "Bromine (Br2)", "7726-95-6",
        LIM4("TWA 0.1 ppm (0.7 mg/m3), ST 0.3 ppm (2 mg/m3)", "TWA 0.1 ppm (0.7 mg/m3)",
             "3 ppm", "TWA 0.1 ppm, STEL 0.2 ppm"),
        "Very toxic, dense fuming liquid whose vapour is much heavier than air; deep, slow-"
        "healing burns to skin and eyes (sometimes delayed); attacks the airways. Strong "
        "oxidiser. Bromine dosed while the radical chain has stalled accumulates and can react "
        "all at once, with a surge of HBr to the vent (common practice).",
        "Aluminium and several other metals (violent), alkali metals, ammonia, reducing agents, "
        "organic matter and hydrocarbons; moisture makes it corrosive to most metals. "
        "Hypobromite liquor mixed with acid gives bromine back.",
        "Closed transfer; goggles and face shield, gloves rated for bromine by their maker, "
        "acid-resistant suit for drum or cylinder changes; respirator or breathing apparatus "
        "as the SDS sets; thiosulfate or bisulfite solution ready for small spills (common "
        "practice).",
        "Br2: very toxic, corrosive liquid - NIOSH REL TWA 0.1 ppm, IDLH 3 ppm; keep from "
        "aluminium, ammonia and reducers.",
    },
    [CA_HCL] = {
        "Hydrogen chloride (HCl)", "7647-01-0",
        LIM4_IDLH("C 5 ppm (7 mg/m3)", "C 5 ppm (7 mg/m3)", "45 ppm", SRC_IDLH_HCL, "C 2 ppm"),
        "Corrosive gas that fumes in moist air; burns eyes, skin and airways. With water it "
        "forms hydrochloric acid, which corrodes most metals and gives off hydrogen with them.",
        "Bases and caustic (strong heat), hypochlorite liquor (releases chlorine), oxidisers, "
        "reactive metals (hydrogen), cyanides and sulfides (toxic gases).",
        "Goggles and face shield, acid-resistant gloves and clothing; acid-gas cartridge "
        "respirators only well below the IDLH, breathing apparatus above it; eyewash and "
        "shower near vent and scrubber equipment.",
        "HCl: corrosive acid gas - NIOSH REL C 5 ppm, IDLH 45 ppm (2025); never into hypochlorite "
        "liquor.",
    },
    [CA_HBR] = {
        "Hydrogen bromide (HBr)", "10035-10-6",
        LIM4_IDLH("C 3 ppm (10 mg/m3)", "TWA 3 ppm (10 mg/m3)", "35 ppm", SRC_IDLH_HBR,
                  "C 2 ppm"),
        "Corrosive gas, stored liquefied under pressure; fumes in moist air and burns eyes, "
        "skin and airways. Its aqueous acid corrodes most metals with hydrogen evolution. The "
        "radical (anti-Markovnikov) addition runs on peroxide or other radical initiators, "
        "which are themselves heat- and shock-sensitive; the addition is exothermic, and HBr "
        "fed while initiation has stalled accumulates (common practice).",
        "Bases and caustic (strong heat), oxidisers (bromine formed), hypochlorite liquor, "
        "reactive metals, cyanides and sulfides.",
        "Closed transfer; goggles and face shield, acid-resistant gloves and clothing; "
        "breathing apparatus for line breaking and emergencies.",
        "HBr: corrosive acid gas - NIOSH REL C 3 ppm, IDLH 35 ppm (2025); keep from oxidisers and "
        "hypochlorite liquor.",
    },
    [CA_SO2] = {
        "Sulfur dioxide (SO2)", "7446-09-5",
        LIM4("TWA 2 ppm (5 mg/m3), ST 5 ppm (13 mg/m3)", "TWA 5 ppm (13 mg/m3)", "100 ppm",
             "STEL 0.25 ppm"),
        "Toxic, irritant gas; constricts the airways (people with asthma react at low "
        "levels); forms sulfurous acid with water.",
        "Strong oxidisers, caustic (heat), powdered metals, halogens; it reduces and so "
        "consumes hypochlorite in scrubber liquor.",
        "Fixed detection where SO2 vents; goggles; acid-gas respirator below the IDLH, "
        "breathing apparatus above.",
        "SO2: toxic irritant gas - NIOSH REL TWA 2 ppm, IDLH 100 ppm.",
    },
    [CA_SO2CL2] = {
        "Sulfuryl chloride (SO2Cl2)", "7791-25-5",
        LIM_NONE,
        "Corrosive fuming liquid; reacts with water and moist air to give hydrogen chloride "
        "and sulfuric acid, and gives SO2 and chlorine on heating; vapour attacks eyes and "
        "lungs. With no limit of its own, judge exposure against the HCl, SO2 and Cl2 limits.",
        "Water (violent hydrolysis), bases, alcohols and amines, metals in the presence of "
        "moisture.",
        "Closed transfer under dry nitrogen; goggles and face shield, acid-resistant gloves "
        "and clothing; acid-gas respirator or breathing apparatus as the SDS sets.",
        "SO2Cl2: corrosive, water-reactive liquid (HCl, SO2) - no exposure limit of its own; "
        "keep dry.",
    },
    [CA_NBS] = {
        "N-Bromosuccinimide (NBS)", "128-08-5",
        LIM_NONE,
        "Oxidising, irritant to corrosive solid; its dust attacks eyes, skin and airways; "
        "harmful if swallowed. Decomposes with heat and light, releasing bromine and HBr; "
        "mixtures of NBS with some solvents and amines can decompose exothermically - screen "
        "new recipes by calorimetry (common practice).",
        "Reducing agents, strong bases, amines, moisture, iron and other metals; heat and "
        "light.",
        "Dust control or a particle respirator, goggles, chemical gloves; store cool, dry and "
        "dark, away from reducers.",
        "NBS: oxidising irritant solid - no exposure limit established; store cool and dark, "
        "check solvent compatibility.",
    },
    [CA_NAOCL] = {
        "Hypochlorite / hypobromite liquor (NaOCl, NaOBr: spent scrubber liquor)", "7681-52-9",
        LIM_NONE,
        "Corrosive, alkaline, oxidising liquor. Acidified, it releases chlorine gas (see the "
        "Cl2 limits). Decomposes with heat, light and traces of nickel, copper or cobalt, "
        "giving oxygen and chlorate; a hot liquor (above about 40 C, common practice) turns to "
        "chlorate faster and absorbs chlorine worse. Bromine on caustic gives hypobromite, "
        "which behaves alike and releases bromine with acid.",
        "Acids of any kind - chlorine is released: never route acid drains or acid gas into a "
        "hypochlorite tank, and keep the scrubber from running out of caustic. Ammonia and "
        "amines (chloramines), organic matter and reducers, nickel, copper and cobalt.",
        "Goggles and face shield, alkali-resistant gloves and apron; vented, labelled tanks; "
        "segregate from acids in storage and in drains.",
        "NaOCl/NaOBr liquor: oxidising alkali - with acid it releases Cl2/Br2; keep acids and "
        "ammonia away, keep it cool.",
    },
    [CA_NAOH] = {
        "Sodium hydroxide (caustic soda, NaOH)", "1310-73-2",
        LIM4("C 2 mg/m3", "TWA 2 mg/m3", "10 mg/m3", "C 2 mg/m3"),
        "Severely corrosive to eyes and skin; alkali burns penetrate deeply and may not hurt "
        "at first. Strong heat on dilution. Solutions attack aluminium, zinc and tin, "
        "releasing hydrogen.",
        "Acids (violent heat), aluminium, zinc, tin and galvanised parts (hydrogen), ammonium "
        "salts (ammonia), some halogenated organics.",
        "Goggles and face shield, alkali-resistant gloves and clothing; eyewash and shower "
        "within reach; dilute by adding caustic to water, never water to solid caustic "
        "(common practice).",
        "NaOH: corrosive alkali - NIOSH REL C 2 mg/m3; eye protection, keep from acids and "
        "aluminium.",
    },
    /* no exposure limit of its own in the NIOSH guide or Table Z-1 (from memory); as a dust
     * it falls under the limits for particulates not otherwise regulated */
    [CA_NA2CO3] = {
        "Sodium carbonate (soda ash, Na2CO3)", "497-19-8",
        LIM_NONE,
        "Alkaline irritant: the dust and the solution irritate the eyes seriously, and the skin "
        "and airways. In the scrubber the liquor gives off CO2 as it takes up acid gas and "
        "halogen: it foams, and CO2 gathers in low and enclosed spaces (sumps, pits, tank "
        "interiors) - an asphyxiation hazard; ventilate and test the air before entry (common "
        "practice). Its spent liquor holds hypochlorite and hypobromite, as a caustic "
        "liquor does.",
        "Acids (CO2 and foam, heat). A liquor whose carbonate is spent turns less alkaline "
        "(bicarbonate, pH near 8), where hypochlorite releases chlorine more readily: keep "
        "free carbonate in it, and the acids and ammonia of the hypochlorite caution away.",
        "Goggles, gloves and a dust mask for the dry ash; eyewash within reach; no entry to "
        "scrubber sumps or tanks without gas testing.",
        "Na2CO3: alkaline irritant - eye protection; its liquor gives off CO2 (ventilate and "
        "test sumps and pits before entry).",
    },
};

const struct caution_info *caution_get(int ca)
{
    return (ca >= 0 && ca < CA_COUNT) ? &cautions[ca] : NULL;
}

const char *caution_deferral(void)
{
    return "These notes are a reminder, not a safety assessment. The supplier's current "
           "Safety Data Sheet (SDS) governs handling, protective equipment and first aid; the "
           "local regulations and the site's permits decide which exposure limits and release "
           "rules apply; halogen handling, vent and scrubber systems need review and sign-off "
           "by a licensed engineer. Exposure limits change between editions (ACGIH values "
           "here are from memory): confirm them in the current sources before relying on "
           "them.";
}

/* What the estimates are and who decides: a stack emission is judged on what is measured, a
 * thermal risk on calorimetry (Stoessel, Thermal Safety of Chemical Processes, 2008). */
static const char *const estimate_cautions[][2] = {
    {"Emissions after the scrubber",
     "The emissions, concentrations and permit margins are planning estimates from stated removal "
     "fractions and the planned vent gas. A permit is judged on measured emissions, by the "
     "sampling and analysis method the authority prescribes; the site's permit and the local rules "
     "decide what is allowed and what must be reported."},
    {"Reaction heat and thermal risk",
     "Reaction heats come from bond enthalpies (gas phase) and the criticality class from the "
     "stated temperatures: a screening estimate. Reaction calorimetry and a process-safety study "
     "by qualified people decide whether and how a batch may run."},
};

int caution_estimate_count(void)
{
    return (int)(sizeof estimate_cautions / sizeof estimate_cautions[0]);
}

const char *caution_estimate_topic(int i)
{
    return i >= 0 && i < caution_estimate_count() ? estimate_cautions[i][0] : NULL;
}

const char *caution_estimate_text(int i)
{
    return i >= 0 && i < caution_estimate_count() ? estimate_cautions[i][1] : NULL;
}
