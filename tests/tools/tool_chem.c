/*
 * tool_chem.c - test probe: one SMILES per stdin line -> one JSON line on stdout.
 *
 * {"in", "ok", "formula", "molar_mass", "sym": [class per atom], "site": [site class
 *  per atom or -1], "written": SMILES from the writer, "cl2"/"nbs"/"hbr": [{"smiles",
 *  "fraction", "class"}] or {"error": msg}} or {"in", "ok": false, "col", "msg"}.
 * tests/e2e/rdkit_chem.py compares these with RDKit.  Lines starting '#' are skipped.
 */
#include "hlmem.h"
#include "reagents.h"
#include "selectivity.h"
#include "sites.h"
#include "smiles.h"

#include <cjson/cJSON.h>
#include <stdio.h>
#include <string.h>

static cJSON *products(const char *smi, int reagent, double temp_c)
{
    struct sel_result r;
    struct hl_err e;
    hl_err_clear(&e);
    cJSON *o;
    if (sel_predict(smi, NULL, reagent, temp_c, NULL, &r, &e)) {
        o = cJSON_CreateObject();
        cJSON_AddStringToObject(o, "error", e.msg);
        return o;
    }
    o = cJSON_CreateArray();
    for (int i = 0; i < r.niso; i++) {
        cJSON *p = cJSON_CreateObject();
        cJSON_AddStringToObject(p, "smiles", r.iso[i].smiles);
        cJSON_AddNumberToObject(p, "fraction", r.iso[i].fraction);
        cJSON_AddNumberToObject(p, "class", r.iso[i].site_class);
        cJSON_AddNumberToObject(p, "n_h", r.iso[i].n_h);
        cJSON_AddItemToArray(o, p);
    }
    sel_free(&r);
    return o;
}

static int one(const char *smi)
{
    struct smi_mol m;
    struct hl_err e;
    hl_err_clear(&e);
    cJSON *o = cJSON_CreateObject();
    cJSON_AddStringToObject(o, "in", smi);
    if (smiles_parse(smi, &m, &e)) {
        cJSON_AddFalseToObject(o, "ok");
        cJSON_AddNumberToObject(o, "col", e.col);
        cJSON_AddStringToObject(o, "msg", e.msg);
    } else {
        struct formula f;
        char hill[64], *w = NULL;
        smiles_formula(&m, &f);
        cJSON_AddTrueToObject(o, "ok");
        cJSON_AddStringToObject(o, "formula", formula_hill(&f, hill, sizeof hill));
        cJSON_AddNumberToObject(o, "molar_mass", smiles_molar_mass_g_mol(&m));
        int *cls = hl_malloc((size_t)m.natoms * sizeof *cls), nc = 0;
        if (!cls || sites_symmetry(&m, cls, &nc, &e)) {
            fprintf(stderr, "tool_chem: symmetry failed\n");
            return 1;
        }
        cJSON *sym = cJSON_CreateArray(), *site = cJSON_CreateArray();
        for (int i = 0; i < m.natoms; i++) {
            cJSON_AddItemToArray(sym, cJSON_CreateNumber(cls[i]));
            cJSON_AddItemToArray(site, cJSON_CreateNumber(sites_class(&m, i)));
        }
        cJSON_AddItemToObject(o, "sym", sym);
        cJSON_AddItemToObject(o, "site", site);
        hl_free(cls);
        if (smiles_write(&m, &w, &e) == HL_OK)
            cJSON_AddStringToObject(o, "written", w);
        hl_free(w);
        cJSON_AddItemToObject(o, "cl2", products(smi, RG_CL2, 25.0));
        cJSON_AddItemToObject(o, "nbs", products(smi, RG_NBS, 80.0));
        cJSON_AddItemToObject(o, "hbr", products(smi, RG_HBR, 25.0));
    }
    smiles_free(&m);
    char *text = cJSON_PrintUnformatted(o);
    if (text)
        puts(text);
    cJSON_free(text);
    cJSON_Delete(o);
    return text ? 0 : 1;
}

int main(void)
{
    hl_mem_hook_cjson();
    char line[4096];
    int rc = 0;
    while (fgets(line, sizeof line, stdin)) {
        line[strcspn(line, "\r\n")] = '\0';
        if (line[0] == '#' || line[0] == '\0')
            continue;
        rc |= one(line);
    }
    return rc;
}
