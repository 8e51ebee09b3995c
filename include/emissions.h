/*
 * emissions.h - what leaves each scrubber's stack, held against the site's permits.
 *
 * The scrubber model (scrubber.h) gives each run's emission per vent species and each
 * unit's hourly emission series.  This module turns them into what a permit is written
 * in: the peak hour and the runs that make it, mg/Nm3 in the stack gas (0 C, 101.325 kPa),
 * calendar-year totals in tonnes, and one check per permit limit (worst hour or day
 * average against kg/h and mg/Nm3, worst calendar year against t/yr).
 *
 * These are planning estimates: a permit is judged on measured emissions by the method the
 * authority prescribes; the site's permit and local rules decide.
 */
#ifndef EMISSIONS_H
#define EMISSIONS_H

#include <stdint.h>
#include "hlerr.h"
#include "reagents.h"
#include "scrubber.h"

struct emis_year { int year; double t; };   /* calendar year, tonnes emitted in it */

/* One species leaving one unit. */
struct emis_species {
    double kg;                  /* over the campaign */
    double peak_kg_h;           /* highest clock-hour mean [kg/h]; 0 when nothing leaves */
    int64_t peak_at_min;        /* start of that hour (valid when peak_kg_h > 0) */
    int *peak_runs; int npeak_runs; /* run indices emitting in that hour, owned */
    double peak_mg_nm3;         /* peak_kg_h in the stack flow (valid with a stack flow) */
    struct emis_year *years; int nyears; /* years with emission, ascending, owned */
};

struct emis_unit {
    double stack_nm3_h;         /* stack gas flow [Nm3/h], 0 = not given (no concentrations) */
    struct emis_species sp[VS_COUNT];
};

/* One run as the emission checks see it: its unit, vent window and emission per species. */
struct emis_run { int unit; int64_t start_min; double end_min; double kg[VS_COUNT]; };

/* A permit: limits 0 = not given; averaging_day: kg/h and mg/Nm3 as the worst calendar-day
 * mean (24 h) instead of the worst clock hour. */
struct emis_permit {
    int unit, species;
    double max_kg_h, max_mg_nm3, max_t_yr;
    int averaging_day;
};

enum emis_limit_kind { EMIS_KG_H, EMIS_MG_NM3, EMIS_T_YR };

/* One limit of one permit against the worst value. */
struct emis_check {
    int permit, unit, species, kind, averaging_day;
    double limit;
    int has_value;              /* 0: a mg/Nm3 limit on a unit without stack flow */
    double value;               /* worst hour or day mean [kg/h, mg/Nm3], or year total [t] */
    int has_at;                 /* 0: nothing of the species leaves the unit */
    int64_t at_min;             /* start of the worst hour or day */
    int at_year;                /* the worst year (t/yr) */
    int exceeded;               /* value > limit */
    int *runs; int nruns;       /* run indices emitting the species in that window, owned */
};

/* Concentration [mg/Nm3] of a mass flow kg_h [kg/h] in a stack gas flow nm3_h [Nm3/h]. */
double emis_mg_nm3(double kg_h, double nm3_h);

/* Text of a limit's unit: "kg/h", "mg/Nm3", "t/yr" (static). */
const char *emis_limit_unit(int kind);

/* Build every unit's emission figures and the permit checks.  units[nunits] are the
 * scrubber outputs (hourly emissions), stack_nm3_h[nunits] their stack flows (0 = none),
 * runs[nruns] in any order.  *unit_out (nunits entries) and *checks (*nchecks: one per
 * limit given, permits in order, kg/h, mg/Nm3, t/yr) are owned by the caller (emis_free).
 * Errors: out of memory, bad arguments. */
enum hl_status emis_build(const struct scrub_unit_out *units, const double *stack_nm3_h, int nunits,
                          const struct emis_run *runs, int nruns,
                          const struct emis_permit *permits, int npermits,
                          struct emis_unit **unit_out, struct emis_check **checks, int *nchecks,
                          struct hl_err *e);

/* Free what emis_build returned; NULL is fine. */
void emis_free(struct emis_unit *u, int nunits, struct emis_check *c, int nchecks);

#endif
