/*
 * emissions.c - stack emissions against permits (see emissions.h).
 *
 * Everything here is an estimate for planning: a permit is judged on measured emissions by
 * the method the authority prescribes, and the site's permit and local rules decide.
 * Cost: one pass over each unit's hours with emission per species, and one pass over the
 * runs per peak or check (a handful per unit), so linear in runs and hours.
 */
#include "emissions.h"

#include <math.h>
#include <string.h>

#include "hlmem.h"
#include "isodate.h"

double emis_mg_nm3(double kg_h, double nm3_h)
{
    /* 1 kg = 1e6 mg; both flows per hour */
    return nm3_h > 0 ? kg_h * 1e6 / nm3_h : 0.0;
}

const char *emis_limit_unit(int kind)
{
    return kind == EMIS_KG_H ? "kg/h" : kind == EMIS_MG_NM3 ? "mg/Nm3" : "t/yr";
}

/* a / b rounded toward minus infinity (b != 0). */
static int64_t floor_div(int64_t a, int64_t b) { return a / b - ((a % b != 0) && ((a < 0) != (b < 0))); }

/* Runs of unit u emitting species v whose vent window overlaps [t0, t1) by a positive
 * length, in the order of runs[] (two passes: count, fill). */
static enum hl_status runs_in(const struct emis_run *runs, int nruns, int u, int v, double t0,
                              double t1, int **out, int *n)
{
    *out = NULL;
    *n = 0;
    for (int pass = 0; pass < 2; pass++) {
        int k = 0;
        for (int i = 0; i < nruns; i++) {
            const struct emis_run *r = &runs[i];
            double a = (double)r->start_min > t0 ? (double)r->start_min : t0;
            double b = r->end_min < t1 ? r->end_min : t1;
            if (r->unit != u || !(r->kg[v] > 0) || !(b > a))
                continue;
            if (pass)
                (*out)[k] = i;
            k++;
        }
        if (pass == 0) {
            if (k == 0)
                return HL_OK;
            if (!(*out = hl_malloc((size_t)k * sizeof **out)))
                return HL_ERR_NOMEM;
        }
        *n = k;
    }
    return HL_OK;
}

/* Tonnes per calendar year from the hourly series (hours never straddle a year: both
 * begin on the clock hour). */
static enum hl_status years_of(const struct scrub_unit_out *o, const struct scrub_emis *m,
                               struct emis_species *sp)
{
    int cap = 0;
    int64_t next_year_min = 0;
    for (int k = 0; k < m->nhourly; k++) {
        int64_t t = o->hour0_min + (int64_t)m->hourly_hour[k] * 60;
        if (sp->nyears == 0 || t >= next_year_min) {
            int y;
            isodate_to_civil(t, &y, NULL, NULL, NULL, NULL);
            if (sp->nyears == cap) {
                cap = cap ? 2 * cap : 4;
                struct emis_year *p = hl_realloc(sp->years, (size_t)cap * sizeof *p);
                if (!p)
                    return HL_ERR_NOMEM;
                sp->years = p;
            }
            sp->years[sp->nyears++] = (struct emis_year){y, 0.0};
            next_year_min = isodate_from_civil(y + 1, 1, 1, 0, 0);
        }
        sp->years[sp->nyears - 1].t += m->hourly_kg_h[k] / 1000.0; /* kg in the hour */
    }
    return HL_OK;
}

/* Worst calendar-day mean [kg/h] and the day's start. */
static double worst_day(const struct scrub_unit_out *o, const struct scrub_emis *m, int64_t *at)
{
    double best = -1, sum = 0;
    int64_t day = 0;
    for (int k = 0; k <= m->nhourly; k++) {
        int64_t d = k < m->nhourly ? floor_div(o->hour0_min + (int64_t)m->hourly_hour[k] * 60, 1440) : 0;
        if (k > 0 && (k == m->nhourly || d != day)) {
            if (sum / 24.0 > best * (1 + 1e-12)) { /* earliest day wins a tie */
                best = sum / 24.0;
                *at = day * 1440;
            }
            sum = 0;
        }
        if (k < m->nhourly) {
            day = d;
            sum += m->hourly_kg_h[k];
        }
    }
    return best > 0 ? best : 0;
}

/* Appends x to *c (*n used of *cap, grown as needed; *c owned by the caller). On NOMEM x's
 * runs are freed and HL_ERR_NOMEM returned. */
static enum hl_status add_check(struct emis_check **c, int *n, int *cap, struct emis_check x)
{
    if (*n == *cap) {
        int nc = *cap ? 2 * *cap : 8;
        struct emis_check *p = hl_realloc(*c, (size_t)nc * sizeof *p);
        if (!p) {
            hl_free(x.runs);
            return HL_ERR_NOMEM;
        }
        *c = p;
        *cap = nc;
    }
    (*c)[(*n)++] = x;
    return HL_OK;
}

/* The checks of one permit: the worst window of its averaging against kg/h and mg/Nm3,
 * the worst calendar year against t/yr. */
static enum hl_status check_permit(const struct scrub_unit_out *units, const struct emis_unit *eu,
                                   const struct emis_run *runs, int nruns,
                                   const struct emis_permit *p, int ip, struct emis_check **c,
                                   int *n, int *cap)
{
    const struct scrub_unit_out *o = &units[p->unit];
    const struct scrub_emis *m = &o->emis[p->species];
    const struct emis_species *sp = &eu[p->unit].sp[p->species];
    double stack = eu[p->unit].stack_nm3_h;
    int64_t at = 0;
    double worst;
    if (p->averaging_day) {
        worst = worst_day(o, m, &at);
    } else {
        worst = sp->peak_kg_h;
        at = sp->peak_at_min;
    }
    int any = worst > 0;
    double t0 = (double)at, t1 = t0 + (p->averaging_day ? 1440.0 : 60.0);
    const double limit[3] = {p->max_kg_h, p->max_mg_nm3, p->max_t_yr};
    for (int kind = EMIS_KG_H; kind <= EMIS_T_YR; kind++) {
        if (!(limit[kind] > 0))
            continue;
        struct emis_check x = {.permit = ip, .unit = p->unit, .species = p->species, .kind = kind,
                               .averaging_day = p->averaging_day, .limit = limit[kind],
                               .has_value = 1, .has_at = any, .at_min = at};
        if (kind == EMIS_T_YR) {
            x.has_at = sp->nyears > 0;
            for (int k = 0; k < sp->nyears; k++)
                if (k == 0 || sp->years[k].t > x.value * (1 + 1e-12)) {
                    x.value = sp->years[k].t;
                    x.at_year = sp->years[k].year;
                }
            if (x.has_at) {
                t0 = (double)isodate_from_civil(x.at_year, 1, 1, 0, 0);
                t1 = (double)isodate_from_civil(x.at_year + 1, 1, 1, 0, 0);
                x.at_min = (int64_t)t0;
            }
        } else if (kind == EMIS_MG_NM3) {
            x.has_value = stack > 0;
            x.value = x.has_value ? emis_mg_nm3(worst, stack) : 0;
        } else {
            x.value = worst;
        }
        x.exceeded = x.has_value && x.value > limit[kind];
        if (x.has_at && runs_in(runs, nruns, p->unit, p->species, t0, t1, &x.runs, &x.nruns))
            return HL_ERR_NOMEM;
        if (add_check(c, n, cap, x))
            return HL_ERR_NOMEM;
    }
    return HL_OK;
}

enum hl_status emis_build(const struct scrub_unit_out *units, const double *stack_nm3_h, int nunits,
                          const struct emis_run *runs, int nruns,
                          const struct emis_permit *permits, int npermits,
                          struct emis_unit **unit_out, struct emis_check **checks, int *nchecks,
                          struct hl_err *e)
{
    *unit_out = NULL;
    *checks = NULL;
    *nchecks = 0;
    if (nunits < 0 || nruns < 0 || npermits < 0 || (nunits && (!units || !stack_nm3_h)) ||
        (nruns && !runs) || (npermits && !permits))
        return hl_err_set(e, HL_ERR_INPUT, "emis_build: bad arguments");
    for (int k = 0; k < npermits; k++)
        if (permits[k].unit < 0 || permits[k].unit >= nunits || permits[k].species < 0 ||
            permits[k].species >= VS_COUNT)
            return hl_err_set(e, HL_ERR_INPUT, "emis_build: permit %d names no unit or species", k);
    struct emis_unit *eu = hl_calloc((size_t)(nunits ? nunits : 1), sizeof *eu);
    struct emis_check *c = NULL;
    int n = 0, cap = 0;
    if (!eu)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the emission checks");
    for (int u = 0; u < nunits; u++) {
        const struct scrub_unit_out *o = &units[u];
        eu[u].stack_nm3_h = stack_nm3_h[u] > 0 ? stack_nm3_h[u] : 0;
        for (int v = 0; v < VS_COUNT; v++) {
            const struct scrub_emis *m = &o->emis[v];
            struct emis_species *sp = &eu[u].sp[v];
            sp->kg = m->kg;
            sp->peak_kg_h = m->peak_kg_h;
            sp->peak_at_min = m->peak_at_min;
            sp->peak_mg_nm3 = emis_mg_nm3(m->peak_kg_h, eu[u].stack_nm3_h);
            if (years_of(o, m, sp) ||
                (m->peak_kg_h > 0 && runs_in(runs, nruns, u, v, (double)m->peak_at_min,
                                             (double)m->peak_at_min + 60.0, &sp->peak_runs,
                                             &sp->npeak_runs)))
                goto nomem;
        }
    }
    for (int k = 0; k < npermits; k++)
        if (check_permit(units, eu, runs, nruns, &permits[k], k, &c, &n, &cap))
            goto nomem;
    *unit_out = eu;
    *checks = c;
    *nchecks = n;
    return HL_OK;
nomem:
    emis_free(eu, nunits, c, n);
    return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the emission checks");
}

void emis_free(struct emis_unit *u, int nunits, struct emis_check *c, int nchecks)
{
    for (int i = 0; u && i < nunits; i++)
        for (int v = 0; v < VS_COUNT; v++) {
            hl_free(u[i].sp[v].peak_runs);
            hl_free(u[i].sp[v].years);
        }
    hl_free(u);
    for (int k = 0; c && k < nchecks; k++)
        hl_free(c[k].runs);
    hl_free(c);
}
