/*
 * liquor.c - scrubber data tables (see liquor.h).
 *
 * Molar masses are sums of the CIAAW 2021 conventional weights of elements.h, written
 * out so the table is static data; test_scrubber checks each against its formula.
 */
#include "liquor.h"

#include "elements.h"

static const struct liquor_salt salts[SALT_COUNT] = {
    [SALT_NACL] = {"NaCl", ELEM_W_NA + ELEM_W_CL},
    [SALT_NABR] = {"NaBr", ELEM_W_NA + ELEM_W_BR},
    [SALT_NAOCL] = {"NaOCl", ELEM_W_NA + ELEM_W_O + ELEM_W_CL},
    [SALT_NAOBR] = {"NaOBr", ELEM_W_NA + ELEM_W_O + ELEM_W_BR},
    [SALT_NA2SO3] = {"Na2SO3", 2 * ELEM_W_NA + ELEM_W_S + 3 * ELEM_W_O},
    [SALT_NA2SO4] = {"Na2SO4", 2 * ELEM_W_NA + ELEM_W_S + 4 * ELEM_W_O},
};

const struct liquor_salt *liquor_salt_get(int salt)
{
    return salt >= 0 && salt < SALT_COUNT ? &salts[salt] : NULL;
}
