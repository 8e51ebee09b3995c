/* test_kinetics.c - the degree model against analytic solutions and published closed forms. */
#include "cu_helpers.h"
#include "kinetics.h"

#include <string.h>
#include <time.h>

#define NX (KIN_MAX_STEPS + 1)

/* Binomial coefficient by the multiplicative rule (relative error ~ n eps). */
static double choose(int n, int r)
{
    double c = 1.0;
    for (int i = 0; i < r; i++)
        c = c * (n - i) / (i + 1);
    return c;
}

static double sum_of(const double *x, int n)
{
    double s = 0.0;
    for (int i = 0; i <= n; i++)
        s += x[i];
    return s;
}

static double mean_of(const double *x, int n)
{
    double s = 0.0;
    for (int i = 0; i <= n; i++)
        s += i * x[i];
    return s;
}

/* Analytic limit (design section 4): N equivalent H, each lost with first-order
 * rate k, phi = 1, so k_n = (N - n) k and the degree is binomial with
 * p = 1 - exp(-k tau).  Covers both computation paths (L tau below and above 64). */
static void binomial_limit(void)
{
    static const int Ns[] = {1, 2, 3, 5, 12, 24, 64};
    double worst = 0.0, worst_sum = 0.0;
    for (size_t a = 0; a < sizeof Ns / sizeof Ns[0]; a++) {
        int N = Ns[a];
        double k[KIN_MAX_STEPS], x[NX];
        const double kk = 0.7;
        for (int n = 0; n < N; n++)
            k[n] = (N - n) * kk;
        for (double lt = -9.0; lt <= 3.0; lt += 0.05) {
            double tau = pow(10.0, lt);
            struct hl_err e;
            CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, N, tau, x, &e), HL_OK);
            double p = -expm1(-kk * tau), q = exp(-kk * tau);
            for (int n = 0; n <= N; n++) {
                double b = choose(N, n) * pow(p, n) * pow(q, N - n);
                double d = fabs(x[n] - b);
                if (d > worst)
                    worst = d;
                ASSERT_ABS(x[n], b, 1e-12);
            }
            double s = fabs(sum_of(x, N) - 1.0);
            if (s > worst_sum)
                worst_sum = s;
        }
    }
    printf("\n  binomial limit: max |x - binomial| = %.3g, max |sum x - 1| = %.3g", worst,
           worst_sum);
}

/* The truncation bound: the Poisson weights kept sum to >= 1 - 1e-14, seen as
 * sum x = 1 within 1e-14 (each A0 P^m sums to 1), over a wide tau range, for a
 * stiff chain (phi = 0.1) and a fast-rising one (phi = 3). */
static void weight_sum_bound(void)
{
    static const double phis[] = {0.1, 1.0, 3.0};
    static const int Ns[] = {1, 4, 12, 64};
    double worst = 0.0;
    for (size_t a = 0; a < 3; a++)
        for (size_t b = 0; b < 4; b++) {
            double k[KIN_MAX_STEPS], x[NX];
            int N = kin_step_constants(Ns[b], 1.0, phis[a], NULL, 0, k);
            CU_ASSERT_EQUAL(N, Ns[b]);
            if (N != Ns[b])
                continue;
            for (double lt = -12.0; lt <= 14.0; lt += 0.1) {
                CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, N, pow(10.0, lt), x, NULL), HL_OK);
                double s = fabs(sum_of(x, N) - 1.0);
                if (s > worst)
                    worst = s;
                ASSERT_ABS(sum_of(x, N), 1.0, 1e-14);
                for (int n = 0; n <= N; n++)
                    CU_ASSERT(x[n] >= 0.0);
            }
        }
    printf("\n  weight sum: max |sum x - 1| = %.3g", worst);
}

/* Levenspiel, Chemical Reaction Engineering, 3rd ed. (Wiley, 1999), irreversible
 * reactions in series A -> R -> S in batch/plug flow:
 *   C_R/C_A0 = (x^k - x)/(1 - k),  x = C_A/C_A0 = exp(-k1 tau),  k = k2/k1,
 * limit x ln(1/x) at k = 1; maximum C_R/C_A0 = k^(k/(1-k)) at k1 tau = ln k/(k - 1).
 * The reference is evaluated as x expm1((1-k) k1 tau)/(1-k), the same expression
 * rearranged so that it stays exact near k = 1. */
static double levenspiel_r(double kappa, double k1tau)
{
    double x = exp(-k1tau);
    if (kappa == 1.0)
        return x * k1tau;
    return x * expm1((1.0 - kappa) * k1tau) / (1.0 - kappa);
}

static void two_step_levenspiel(void)
{
    static const double kappas[] = {0.01, 0.3, 0.999999, 1.0 - 1e-12, 1.0, 1.0 + 1e-9,
                                    1.0001, 2.0, 4.7, 50.0};
    for (size_t a = 0; a < sizeof kappas / sizeof kappas[0]; a++) {
        double k[2] = {1.3, 1.3 * kappas[a]}, x[3];
        for (double lt = -6.0; lt <= 2.5; lt += 0.05) {
            double tau = pow(10.0, lt);
            CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 2, tau, x, NULL), HL_OK);
            double xa = exp(-k[0] * tau), xr = levenspiel_r(kappas[a], k[0] * tau);
            ASSERT_ABS(x[0], xa, 1e-14);
            ASSERT_ABS(x[1], xr, 1e-13);
            if (xr > 1e-200)
                ASSERT_REL(x[1], xr, 1e-10);
            ASSERT_ABS(x[2], 1.0 - xa - xr, 1e-13);
        }
    }
    /* the plain form at k far from 1, and the maximum of R */
    double k[2] = {1.0, 2.0}, x[3];
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 2, log(2.0), x, NULL), HL_OK);
    ASSERT_REL(x[1], 0.25, 1e-14); /* 2^(2/(1-2)) = 1/4 */
    double xa = exp(-0.37);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 2, 0.37, x, NULL), HL_OK);
    ASSERT_REL(x[1], (xa * xa - xa) / (1.0 - 2.0), 1e-14);
    /* k = 1 limit x ln(1/x) at its maximum 1/e (tau = 1) */
    k[1] = 1.0;
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 2, 1.0, x, NULL), HL_OK);
    ASSERT_REL(x[1], exp(-1.0), 1e-14);
}

/* Levenspiel (same book), series reactions in mixed flow:
 *   C_A/C_A0 = 1/(1 + k1 tau),  C_R/C_A0 = k1 tau/((1 + k1 tau)(1 + k2 tau)),
 * maximum C_R/C_A0 = 1/((k2/k1)^(1/2) + 1)^2 at tau = 1/sqrt(k1 k2). */
static void cstr_closed_form(void)
{
    double k[2] = {2.0, 0.5}, x[3];
    for (double lt = -8.0; lt <= 12.0; lt += 0.1) {
        double tau = pow(10.0, lt);
        CU_ASSERT_EQUAL(kin_distribution(KIN_CSTR, k, 2, tau, x, NULL), HL_OK);
        double a0 = 1.0 / (1.0 + k[0] * tau);
        double a1 = k[0] * tau / ((1.0 + k[0] * tau) * (1.0 + k[1] * tau));
        double a2 = k[0] * k[1] * tau * tau / ((1.0 + k[0] * tau) * (1.0 + k[1] * tau));
        ASSERT_REL(x[0], a0, 1e-14);
        ASSERT_REL(x[1], a1, 1e-14);
        ASSERT_REL(x[2], a2, 1e-14);
        ASSERT_ABS(sum_of(x, 2), 1.0, 1e-15);
    }
    CU_ASSERT_EQUAL(kin_distribution(KIN_CSTR, k, 2, 1.0 / sqrt(k[0] * k[1]), x, NULL), HL_OK);
    ASSERT_REL(x[1], 1.0 / pow(sqrt(k[1] / k[0]) + 1.0, 2.0), 1e-14);
    /* three steps: A_n = A_(n-1) k_(n-1) tau/(1 + k_n tau) written out */
    double k3[3] = {3.0, 2.0, 1.0}, y[4], t = 0.8;
    CU_ASSERT_EQUAL(kin_distribution(KIN_CSTR, k3, 3, t, y, NULL), HL_OK);
    double d0 = 1 + 3 * t, d1 = 1 + 2 * t, d2 = 1 + t;
    ASSERT_REL(y[0], 1 / d0, 1e-15);
    ASSERT_REL(y[1], 3 * t / (d0 * d1), 1e-15);
    ASSERT_REL(y[2], 3 * t * 2 * t / (d0 * d1 * d2), 1e-15);
    ASSERT_REL(y[3], 3 * t * 2 * t * t / (d0 * d1 * d2), 1e-15);
}

/* Coincident constants: k_n = k for every step gives the Poisson (Erlang) law
 * x_n = e^(-k tau) (k tau)^n/n! for n < N, the terminal state taking the rest
 * (analytic).  Bateman's form would divide by zero here. */
static void coincident_constants(void)
{
    static const int Ns[] = {1, 3, 12, 40};
    for (size_t a = 0; a < 4; a++) {
        int N = Ns[a];
        double k[KIN_MAX_STEPS], x[NX];
        for (int n = 0; n < N; n++)
            k[n] = 2.5;
        for (double lt = -6.0; lt <= 3.0; lt += 0.1) {
            double tau = pow(10.0, lt), kt = 2.5 * tau, term = exp(-kt), below = 0.0;
            CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, N, tau, x, NULL), HL_OK);
            for (int n = 0; n < N; n++) {
                ASSERT_ABS(x[n], term, 1e-14);
                if (term > 1e-6)
                    ASSERT_REL(x[n], term, 1e-12);
                below += term;
                term *= kt / (n + 1);
            }
            ASSERT_ABS(x[N], 1.0 - below, 1e-13);
        }
    }
}

/* Bateman (Proc. Cambridge Phil. Soc. 15 (1910) 423), distinct constants:
 * x_n = (prod_{j<n} k_j) sum_{i<=n} e^(-k_i tau) / prod_{j<=n, j!=i} (k_j - k_i),
 * in long double, on a stiff chain (each step 10x slower) where it is well
 * conditioned at large tau - the squaring path's range. */
static void stiff_chain_bateman(void)
{
    const int N = 5;
    double k[5], x[6];
    for (int n = 0; n < N; n++)
        k[n] = (double)(6 - n) * pow(0.1, n);
    for (double lt = 1.0; lt <= 6.0; lt += 0.05) {
        double tau = pow(10.0, lt);
        CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, N, tau, x, NULL), HL_OK);
        long double below = 0.0L;
        for (int n = 0; n < N; n++) {
            long double pre = 1.0L, s = 0.0L;
            for (int j = 0; j < n; j++)
                pre *= k[j];
            for (int i = 0; i <= n; i++) {
                long double den = 1.0L;
                for (int j = 0; j <= n; j++)
                    if (j != i)
                        den *= (long double)k[j] - (long double)k[i];
                s += expl(-(long double)k[i] * tau) / den;
            }
            double ref = (double)(pre * s);
            below += pre * s;
            if (ref > 1e-100)
                ASSERT_REL(x[n], ref, 1e-9);
            ASSERT_ABS(x[n], ref, 1e-13);
        }
        ASSERT_ABS(x[N], (double)(1.0L - below), 1e-13);
    }
}

/* Monotone: with tau rising, every P(degree >= n) and the mean degree rise. */
static void monotonicity(void)
{
    for (int mode = KIN_BATCH; mode <= KIN_CSTR; mode++) {
        double k[KIN_MAX_STEPS], x[NX];
        int N = kin_step_constants(12, 1.0, 0.6, NULL, 0, k);
        double prev_below[NX], prev_mean = -1.0;
        for (int n = 0; n < NX; n++)
            prev_below[n] = 1.0;
        for (double lt = -6.0; lt <= 10.0; lt += 0.02) {
            CU_ASSERT_EQUAL(kin_distribution((enum kin_mode)mode, k, N, pow(10.0, lt), x, NULL),
                            HL_OK);
            double m = mean_of(x, N);
            CU_ASSERT(m >= prev_mean - 4e-16 * N); /* the plain sum rounds */
            prev_mean = m;
            /* P(degree < n) = 1 - P(degree >= n) falls, to rounding of its own size */
            double below = 0.0;
            for (int n = 1; n <= N; n++) {
                below += x[n - 1];
                CU_ASSERT(below <= prev_below[n] * (1.0 + 1e-13) + 1e-300);
                prev_below[n] = below;
            }
        }
        /* at tau = 1e10: batch is complete; a CSTR still holds ~ sum 1/(k_n tau) */
        CU_ASSERT(prev_mean > N - (mode == KIN_BATCH ? 1e-12 : 1e-6));
    }
}

static void huge_tau(void)
{
    double k[KIN_MAX_STEPS], x[NX];
    int N = 12;
    for (int n = 0; n < 11; n++)
        k[n] = 12 - n;
    k[11] = 1e-11;
    /* halfway through the slowest step: L tau ~ 1e12 on the squaring path; all
     * earlier steps are long over, so A11 decays alone: A11 = 1/2 (analytic) */
    double tau = log(2.0) / k[11];
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, N, tau, x, NULL), HL_OK);
    ASSERT_REL(x[11], 0.5, 1e-9);
    ASSERT_REL(x[12], 0.5, 1e-9);
    ASSERT_ABS(sum_of(x, N), 1.0, 1e-14);
    N = kin_step_constants(12, 1.0, 0.1, NULL, 0, k); /* stiff: k_11 = 1e-11 */
    double big[] = {1e30, 1e100, 1e300, 1.7e308};
    for (int i = 0; i < 4; i++) {
        for (int mode = KIN_BATCH; mode <= KIN_CSTR; mode++) {
            CU_ASSERT_EQUAL(kin_distribution((enum kin_mode)mode, k, N, big[i], x, NULL), HL_OK);
            ASSERT_ABS(x[N], 1.0, 1e-14);
            ASSERT_ABS(sum_of(x, N), 1.0, 1e-14);
        }
    }
    /* tau = 0: all substrate */
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, N, 0.0, x, NULL), HL_OK);
    ASSERT_ABS(x[0], 1.0, 0.0);
    CU_ASSERT_EQUAL(kin_distribution(KIN_CSTR, k, N, 0.0, x, NULL), HL_OK);
    ASSERT_ABS(x[0], 1.0, 0.0);
}

/* One step: batch x1 = 1 - exp(-k tau), CSTR x1 = k tau/(1 + k tau); the extent
 * solver must give tau = -ln(1 - D)/k and D/(k (1 - D)). */
static void one_step(void)
{
    double k[1] = {3.0}, x[2], tau;
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 1, 0.2, x, NULL), HL_OK);
    ASSERT_REL(x[1], -expm1(-0.6), 1e-15);
    CU_ASSERT_EQUAL(kin_distribution(KIN_CSTR, k, 1, 0.2, x, NULL), HL_OK);
    ASSERT_REL(x[1], 0.6 / 1.6, 1e-15);
    static const double Ds[] = {1e-9, 0.01, 0.5, 0.9, 0.999999};
    for (int i = 0; i < 5; i++) {
        double D = Ds[i];
        CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 1, D, x, &tau, NULL), HL_OK);
        ASSERT_REL(x[1], D, 1e-12);
        ASSERT_REL(tau, -log1p(-D) / 3.0, 1e-9);
        CU_ASSERT_EQUAL(kin_solve_extent(KIN_CSTR, k, 1, D, x, &tau, NULL), HL_OK);
        ASSERT_REL(x[1], D, 1e-12);
        ASSERT_REL(tau, D / (3.0 * (1.0 - D)), 1e-9);
    }
}

/* The extent solver hits the mean degree to 1e-12 relative, for both modes,
 * flat, stiff and rising chains, from a trace to nearly full halogenation;
 * in the binomial case tau is known: p = D/N, tau = -ln(1 - p)/k. */
static void extent_solver(void)
{
    static const double phis[] = {0.1, 0.5, 1.0, 2.0};
    static const double fr[] = {1e-9, 1e-4, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99, 0.999999,
                                1.0 - 1e-10};
    int solved = 0;
    for (int mode = KIN_BATCH; mode <= KIN_CSTR; mode++)
        for (size_t a = 0; a < 4; a++)
            for (int h0 = 1; h0 <= 16; h0 += 3) {
                double k[KIN_MAX_STEPS], x[NX], tau;
                int N = kin_step_constants(h0, 2.0, phis[a], NULL, 0, k);
                CU_ASSERT_EQUAL(N, h0);
                for (size_t i = 0; i < sizeof fr / sizeof fr[0]; i++) {
                    double D = fr[i] * N;
                    struct hl_err e;
                    enum hl_status st =
                        kin_solve_extent((enum kin_mode)mode, k, N, D, x, &tau, &e);
                    CU_ASSERT_EQUAL(st, HL_OK);
                    if (st) {
                        printf("\n  mode %d phi %g N %d D %.17g: %s", mode, phis[a], N, D, e.msg);
                        continue;
                    }
                    solved++;
                    ASSERT_REL(mean_of(x, N), D, 1e-12);
                    ASSERT_ABS(sum_of(x, N), 1.0, 1e-14);
                    if (mode == KIN_BATCH && phis[a] == 1.0) {
                        /* binomial: mean = N p, d mean/dtau = N k (1 - p); the tau error
                         * allowed is what a 1e-12 relative error in the mean moves */
                        double p = D / N, tref = -log1p(-p) / 2.0;
                        double tol = 1e-12 * D / (N * 2.0 * (1.0 - p)) + 1e-13 * tref;
                        ASSERT_ABS(tau, tref, tol);
                    }
                    /* x is the distribution at the tau returned */
                    double y[NX];
                    CU_ASSERT_EQUAL(kin_distribution((enum kin_mode)mode, k, N, tau, y, NULL),
                                    HL_OK);
                    for (int n = 0; n <= N; n++)
                        ASSERT_ABS(y[n], x[n], 1e-13);
                }
            }
    CU_ASSERT(solved > 300);
}

/* mean degree 0 -> all substrate; N (or within 1e-12) -> all terminal. */
static void extent_limits(void)
{
    double k[KIN_MAX_STEPS], x[NX], tau = -1.0;
    int N = kin_step_constants(12, 1.0, 1.0, NULL, 0, k);
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, N, 0.0, x, &tau, NULL), HL_OK);
    ASSERT_ABS(x[0], 1.0, 0.0);
    ASSERT_ABS(tau, 0.0, 0.0);
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_CSTR, k, N, 12.0, x, &tau, NULL), HL_OK);
    ASSERT_ABS(x[12], 1.0, 0.0);
    CU_ASSERT(isinf(tau));
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, N, 12.0 - 1e-13, x, NULL, NULL), HL_OK);
    ASSERT_ABS(x[12], 1.0, 0.0);
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, N, 12.0 + 1e-13, x, NULL, NULL), HL_OK);
    ASSERT_ABS(x[12], 1.0, 0.0);
}

static void error_cases(void)
{
    double k[KIN_MAX_STEPS] = {1.0, 1.0, 1.0}, x[NX];
    struct hl_err e;
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 0, 1.0, x, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, KIN_MAX_STEPS + 1, 1.0, x, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 3, -1.0, x, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 3, NAN, x, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 3, INFINITY, x, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, NULL, 3, 1.0, x, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 3, 1.0, NULL, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_distribution((enum kin_mode)7, k, 3, 1.0, x, &e), HL_ERR_INPUT);
    k[1] = 0.0;
    CU_ASSERT_EQUAL(kin_distribution(KIN_BATCH, k, 3, 1.0, x, &e), HL_ERR_INPUT);
    CU_ASSERT(strstr(e.msg, "k[1]") != NULL);
    k[1] = NAN;
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 3, 1.0, x, NULL, &e), HL_ERR_INPUT);
    k[1] = -2.0;
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_CSTR, k, 3, 1.0, x, NULL, &e), HL_ERR_INPUT);
    k[1] = 1.0;
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 3, -0.1, x, NULL, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 3, 3.001, x, NULL, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 3, NAN, x, NULL, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 3, 1.0, x, NULL, NULL), HL_OK); /* e optional */
    CU_ASSERT_EQUAL(kin_solve_extent(KIN_BATCH, k, 3, 9.0, x, NULL, NULL), HL_ERR_INPUT);
}

/* Design section 3: k_n = (h0 - n) mean_r phi^n; rate_ratios replace it and
 * continue as k_last (h0 - n)/(h0 - last). */
static void step_constants(void)
{
    double k[KIN_MAX_STEPS];
    CU_ASSERT_EQUAL(kin_step_constants(4, 2.0, 0.5, NULL, 0, k), 4);
    ASSERT_REL(k[0], 8.0, 1e-15);
    ASSERT_REL(k[1], 3.0, 1e-15);
    ASSERT_REL(k[2], 1.0, 1e-15);
    ASSERT_REL(k[3], 0.25, 1e-15);
    static const double r[] = {1.0, 4.7, 3.2, 0.86};
    CU_ASSERT_EQUAL(kin_step_constants(4, 9.0, 9.0, r, 4, k), 4);
    for (int i = 0; i < 4; i++)
        ASSERT_REL(k[i], r[i], 1e-15);
    CU_ASSERT_EQUAL(kin_step_constants(7, 1.0, 1.0, r, 2, k), 7);
    ASSERT_REL(k[1], 4.7, 1e-15);
    ASSERT_REL(k[2], 4.7 * 5.0 / 6.0, 1e-15);
    ASSERT_REL(k[6], 4.7 * 1.0 / 6.0, 1e-15);
    CU_ASSERT_EQUAL(kin_step_constants(2, 1.0, 1.0, r, 4, k), 2); /* extra ratios unused */
    ASSERT_REL(k[1], 4.7, 1e-15);
    CU_ASSERT_EQUAL(kin_step_constants(100, 1.0, 1.0, NULL, 0, k), KIN_MAX_STEPS);
    ASSERT_REL(k[KIN_MAX_STEPS - 1], 100.0 - (KIN_MAX_STEPS - 1), 1e-15);
    CU_ASSERT_EQUAL(kin_step_constants(0, 1.0, 1.0, NULL, 0, k), -1);
    CU_ASSERT_EQUAL(kin_step_constants(3, 0.0, 1.0, NULL, 0, k), -1);
    CU_ASSERT_EQUAL(kin_step_constants(3, 1.0, -1.0, NULL, 0, k), -1);
    CU_ASSERT_EQUAL(kin_step_constants(3, 1.0, NAN, NULL, 0, k), -1);
    /* phi^n under the accepted range: held at the floor (never-reached steps), not refused */
    CU_ASSERT_EQUAL(kin_step_constants(3, 1.0, 1e-150, NULL, 0, k), 3);
    ASSERT_REL(k[0], 3.0, 1e-15);
    ASSERT_REL(k[1], 2e-150, 1e-12);
    ASSERT_REL(k[2], 1e-200, 1e-12);
    static const double bad[] = {1.0, -4.7};
    CU_ASSERT_EQUAL(kin_step_constants(3, 1.0, 1.0, bad, 2, k), -1);
    CU_ASSERT_EQUAL(kin_step_constants(3, 1.0, 1.0, NULL, 2, k), -1);
    CU_ASSERT_EQUAL(kin_step_constants(3, 1.0, 1.0, NULL, 0, NULL), -1);
}

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* Cost of one kin_solve_extent on a 12-step chain (design section 7: per-run
 * model work must stay small), over a sweep of extents up to near-full. */
static void timing(void)
{
    static const double phis[] = {0.1, 1.0, 3.0};
    for (int mode = KIN_BATCH; mode <= KIN_CSTR; mode++)
        for (int a = 0; a < 3; a++) {
            double k[KIN_MAX_STEPS], x[NX];
            int N = kin_step_constants(12, 1.0, phis[a], NULL, 0, k);
            int calls = 0;
            double t0 = now_s(), worst = 0.0;
            for (int rep = 0; rep < 3; rep++)
                for (double f = 0.001; f < 0.9999; f += 0.0125) {
                    double t1 = now_s();
                    CU_ASSERT_EQUAL(kin_solve_extent((enum kin_mode)mode, k, N, f * N, x, NULL,
                                                     NULL), HL_OK);
                    double dt = now_s() - t1;
                    if (dt > worst)
                        worst = dt;
                    calls++;
                }
            double per = (now_s() - t0) / calls;
            printf("\n  timing %s phi %.1f: %.1f us per kin_solve_extent (worst %.1f us)",
                   mode == KIN_BATCH ? "batch" : "cstr", phis[a], per * 1e6, worst * 1e6);
            CU_ASSERT(per < 20e-3); /* generous: also holds under valgrind */
        }
}

/* Site-depletion step constants. Analytic checks: with all r alike the rule must equal
 * the H-count rule (N - n) r phi^n; the removals add to one H per step; and a hand
 * computation for two classes (2 H at r = 100, 3 H at r = 1):
 *   k0 = 2(100) + 3 = 203; the step removes 200/203 of an H from class 1 and 3/203 from
 *   class 2, so k1 = (2 - 200/203) 100 + (3 - 3/203) = 104.46305418719...        */
static void site_depletion(void)
{
    double k[KIN_MAX_STEPS], kr[KIN_MAX_STEPS];
    double n1[3] = {6, 3, 1}, r1[3] = {2.5, 2.5, 2.5};
    int n = kin_step_constants_sites(n1, r1, 3, 0.7, k);
    CU_ASSERT_EQUAL(n, 10);
    CU_ASSERT_EQUAL(kin_step_constants(10, 2.5, 0.7, NULL, 0, kr), 10);
    for (int i = 0; i < n; i++)
        ASSERT_REL(k[i], kr[i], 1e-12);
    double n2[2] = {2, 3}, r2[2] = {100, 1};
    CU_ASSERT_EQUAL(kin_step_constants_sites(n2, r2, 2, 1.0, k), 5);
    ASSERT_REL(k[0], 203.0, 1e-15);
    ASSERT_REL(k[1], (2 - 200.0 / 203) * 100 + (3 - 3.0 / 203), 1e-13);
    /* the last step acts on exactly one H left: k4 between the smallest and largest r */
    CU_ASSERT(k[4] >= 1.0 - 1e-12 && k[4] <= 100.0 + 1e-12);
    for (int i = 1; i < 5; i++)
        CU_ASSERT(k[i] < k[i - 1]); /* fewer and less reactive H at every step */
    /* extreme contrast: the first two H come from the reactive class, so A1 keeps one
     * reactive H (k1 ~ 1e6) and A2 is left with the slow ones (k2 ~ 1e-5 of k1) */
    double n3[2] = {2, 3}, r3[2] = {1e6, 1};
    CU_ASSERT_EQUAL(kin_step_constants_sites(n3, r3, 2, 1.0, k), 5);
    ASSERT_REL(k[1], 1e6 + 3, 1e-5);
    CU_ASSERT(k[2] < 1e-5 * k[1] && k[2] > 3.0);
    /* bad input */
    double bad_r[2] = {0, 1};
    CU_ASSERT_EQUAL(kin_step_constants_sites(n2, bad_r, 2, 1.0, k), -1);
    double none[2] = {0, 0};
    CU_ASSERT_EQUAL(kin_step_constants_sites(none, r2, 2, 1.0, k), -1);
    CU_ASSERT_EQUAL(kin_step_constants_sites(n2, r2, 2, 0.0, k), -1);
    /* a small phi on a long chain: the far steps sit at the floor instead of failing */
    double n4[1] = {30}, r4[1] = {1};
    CU_ASSERT_EQUAL(kin_step_constants_sites(n4, r4, 1, 1e-9, k), 30);
    ASSERT_REL(k[29], 1e-200, 1e-12);
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"site depletion", site_depletion},
        {"binomial limit", binomial_limit},
        {"weight sum bound", weight_sum_bound},
        {"two-step Levenspiel", two_step_levenspiel},
        {"CSTR closed form", cstr_closed_form},
        {"coincident constants", coincident_constants},
        {"stiff chain vs Bateman", stiff_chain_bateman},
        {"monotonicity", monotonicity},
        {"huge tau", huge_tau},
        {"one step", one_step},
        {"extent solver", extent_solver},
        {"extent limits", extent_limits},
        {"error cases", error_cases},
        {"step constants", step_constants},
        {"timing", timing}};
    return CU_RUN_ALL("kinetics", cases);
}
