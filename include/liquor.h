/*
 * liquor.h - the scrubber data tables: one row per salt formed in a liquor (and, as the
 * liquor model grows into it, one row per liquor).  Data only, no model: scrubber.c
 * computes with these rows, the writers name the salts from them.
 */
#ifndef LIQUOR_H
#define LIQUOR_H

/* Salts / products in the liquor. */
enum scrub_salt { SALT_NACL, SALT_NABR, SALT_NAOCL, SALT_NAOBR, SALT_NA2SO3, SALT_NA2SO4, SALT_COUNT };

struct liquor_salt {
    const char *name;          /* formula as shown and as the JSON key ("NaOCl") */
    double molar_mass_g_mol;   /* CIAAW 2021 conventional weights (elements.h) */
};

/* Row of a salt; NULL out of range. Static data. */
const struct liquor_salt *liquor_salt_get(int salt);

#endif
