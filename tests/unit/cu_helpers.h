/*
 * cu_helpers.h - CUnit glue shared by the unit-test binaries.
 *
 * CUnit 2.1-3's CU_basic_run_tests() returns success even when assertions
 * fail, and CU_ASSERT_DOUBLE_EQUAL is absolute and silent about the values:
 * CU_RUN_ALL reads the failure count, and ASSERT_REL prints both numbers.
 */
#ifndef CU_HELPERS_H
#define CU_HELPERS_H

#include <CUnit/Basic.h>
#include <math.h>
#include <stdio.h>

/* Relative check |a - e| <= tol * max(|e|, tiny); prints the values on failure. */
#define ASSERT_REL(a, e, tol)                                                         \
    do {                                                                              \
        double a_ = (a), e_ = (e), d_ = fabs(a_ - e_);                                \
        double s_ = fabs(e_) > 1e-300 ? fabs(e_) : 1e-300;                            \
        int ok_ = isfinite(a_) && d_ <= (tol) * s_;                                   \
        if (!ok_)                                                                     \
            printf("\n  %s:%d: %s = %.15g, expected %.15g (rel err %.3g > %.3g)",    \
                   __FILE__, __LINE__, #a, a_, e_, d_ / s_, (double)(tol));          \
        CU_ASSERT(ok_);                                                               \
    } while (0)

/* Absolute check with values printed. */
#define ASSERT_ABS(a, e, tol)                                                         \
    do {                                                                              \
        double a_ = (a), e_ = (e);                                                    \
        int ok_ = isfinite(a_) && fabs(a_ - e_) <= (tol);                             \
        if (!ok_)                                                                     \
            printf("\n  %s:%d: %s = %.15g, expected %.15g +- %.3g", __FILE__,         \
                   __LINE__, #a, a_, e_, (double)(tol));                              \
        CU_ASSERT(ok_);                                                               \
    } while (0)

struct cu_case { const char *name; void (*fn)(void); };

/* Run one suite of cases; returns the process exit status (0 = all passed). */
static inline int cu_run_all(const char *suite, const struct cu_case *cases, int n)
{
    if (CU_initialize_registry() != CUE_SUCCESS)
        return 2;
    CU_pSuite s = CU_add_suite(suite, NULL, NULL);
    for (int i = 0; s && i < n; i++)
        CU_add_test(s, cases[i].name, cases[i].fn);
    CU_basic_set_mode(CU_BRM_NORMAL);
    CU_basic_run_tests();
    unsigned failed = CU_get_number_of_failure_records();
    unsigned ran = CU_get_number_of_tests_run();
    CU_cleanup_registry();
    return (failed == 0 && ran == (unsigned)n) ? 0 : 1;
}
#define CU_RUN_ALL(suite, cases) cu_run_all(suite, cases, (int)(sizeof(cases) / sizeof(cases[0])))

#endif
