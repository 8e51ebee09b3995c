/*
 * kinetics.c - degree distribution of consecutive halogenation (see kinetics.h).
 *
 * Batch / plug flow.  The chain dA/dtau = A Q (A a row vector, Q upper
 * bidiagonal: Q[n][n] = -k[n], Q[n][n+1] = k[n]) is a pure-birth Markov chain,
 * so A(tau) = A0 exp(Q tau).  Uniformization with L = max k and the stochastic
 * matrix P = I + Q/L gives
 *     A(tau) = sum_m Pois(m; L tau) A0 P^m,
 * a sum of non-negative terms: no (k_i - k_j) denominators, so coincident or
 * nearly equal constants cost no accuracy (Bateman's closed form loses every
 * digit there).
 *
 * Error bound.  A0 P^m is a probability vector, so dropping the terms m > M
 * changes each entry by at most the Poisson tail beyond M, and the entries by
 * that much in total.  The sum stops at the first M >= L tau - 1 where the
 * geometric bound  tail(M) <= w(M+1) / (1 - L tau/(M+2))  is below
 * KIN_TAIL min(1, L tau) (1e-17, scaled down for small L tau, where the mean
 * degree itself is of order L tau).  With rounding, the weights summed (= the
 * sum of the returned fractions) are within 1e-14 of 1 and every fraction is
 * within 1e-14 of the exact value; test_kinetics.c checks both over tau from
 * 1e-12 to 1e14 on both paths (measured: 7e-15 and 5e-15 for up to 64 steps).
 * Fractions far below 1e-15 are therefore not relatively accurate.
 *
 * Two paths, the same mathematics:
 *  - L tau <= KIN_DIRECT_MAX: the vector sum above.  w(0) = exp(-L tau) >=
 *    exp(-64) does not underflow, so the weights follow from the plain
 *    recurrence w(m+1) = w(m) L tau/(m+1) without log-space scaling.
 *  - larger L tau: scaling and squaring of the transition matrix
 *    T(tau) = exp(Q tau) = T(tau/2^s)^(2^s), the base piece by the matrix form
 *    of the same sum with L tau/2^s <= KIN_BASE_MAX.  T is upper triangular and
 *    non-negative, so squaring has no cancellation; its diagonal exp(-k_n dt)
 *    is set directly at every level because repeated squaring of a number
 *    close to 1 would lose the slow steps' digits (relative error ~2^s eps).
 *    Cost ~ s (N+1)^3/6 for s ~ log2(L tau): ~10 us for N = 12 even at
 *    L tau = 1e12, which uniformization alone could not reach.
 *  Far past the slowest step (every non-terminal fraction below 1e-330) the
 *  result is the all-terminal vector itself.
 *
 * CSTR: the product form of design section 4, exact in floating point.
 */
#include "kinetics.h"

#include <math.h>
#include <string.h>

#define KIN_TAIL 1e-17        /* Poisson tail dropped per sum */
#define KIN_DIRECT_MAX 64.0   /* largest L tau for the vector sum */
#define KIN_BASE_MAX 0.5      /* L dt of the base piece on the squaring path */
#define KIN_K_MIN 1e-200      /* accepted range of rate constants: keeps k/L and */
#define KIN_K_MAX 1e200       /* tau/2^s clear of underflow */
#define KIN_MAX_TERMS 100000  /* guard; never reached for L tau <= 64 */

#define NMAX (KIN_MAX_STEPS + 1)

/* HL_ERR_INPUT unless k[nsteps] and x are given, 1 <= nsteps <= KIN_MAX_STEPS and every
 * k lies in [KIN_K_MIN, KIN_K_MAX]. */
static enum hl_status check_args(const double *k, int nsteps, const double *x, struct hl_err *e)
{
    if (!k || !x)
        return hl_err_set(e, HL_ERR_INPUT, "kinetics: no rate constants or output given");
    if (nsteps < 1 || nsteps > KIN_MAX_STEPS)
        return hl_err_set(e, HL_ERR_INPUT, "kinetics: %d steps (allowed 1..%d)", nsteps,
                          KIN_MAX_STEPS);
    for (int i = 0; i < nsteps; i++)
        if (!(k[i] >= KIN_K_MIN && k[i] <= KIN_K_MAX))
            return hl_err_set(e, HL_ERR_INPUT,
                              "kinetics: rate constant k[%d] = %g outside 1e-200..1e200", i, k[i]);
    return HL_OK;
}

/* Largest of k[0..n-1] (n >= 1). */
static double max_k(const double *k, int n)
{
    double L = k[0];
    for (int i = 1; i < n; i++)
        if (k[i] > L)
            L = k[i];
    return L;
}

/* Poisson tail bound beyond term m, given w = w(m) and theta: geometric series
 * with ratio theta/(m+2) once m + 2 > theta; +inf before that. */
static double tail_after(double w, double theta, int m)
{
    /* relative to theta when small: the mean degree is then of order theta */
    if ((double)m + 2.0 <= theta)
        return INFINITY;
    return w * theta / (m + 1) / (1.0 - theta / (m + 2)) / fmin(theta, 1.0);
}

/* Vector uniformization (L tau <= KIN_DIRECT_MAX). */
static void batch_direct(const double *k, int N, double tau, double L, double *x)
{
    double go[NMAX], stay[NMAX], v[NMAX];
    for (int i = 0; i < N; i++) {
        go[i] = k[i] / L;
        stay[i] = (L - k[i]) / L; /* exact 0 for the fastest step */
    }
    stay[N] = 1.0;
    memset(v, 0, sizeof(double) * (size_t)(N + 1));
    memset(x, 0, sizeof(double) * (size_t)(N + 1));
    v[0] = 1.0;
    double theta = L * tau, w = exp(-theta);
    for (int m = 0; m < KIN_MAX_TERMS; m++) {
        int top = m < N ? m : N; /* v is zero above degree m */
        for (int j = 0; j <= top; j++)
            x[j] += w * v[j];
        if (tail_after(w, theta, m) <= KIN_TAIL)
            break;
        int hi = m + 1 < N ? m + 1 : N;
        for (int j = hi; j >= 1; j--)
            v[j] = v[j] * stay[j] + v[j - 1] * go[j - 1];
        v[0] *= stay[0];
        w = w * theta / (m + 1);
    }
}

/* Row-major upper-triangular (N+1)x(N+1) matrices. */
typedef double kmat[NMAX][NMAX];

/* Scaling and squaring (L tau > KIN_DIRECT_MAX). */
static void batch_squaring(const double *k, int N, double tau, double L, double *x)
{
    static const double ln2 = 0.69314718055994530942;
    /* s with L tau / 2^s <= KIN_BASE_MAX, computed in logs: L tau may overflow */
    int s = (int)ceil((log(L) + log(tau) - log(KIN_BASE_MAX)) / ln2);
    if (s < 1)
        s = 1;
    double dt = ldexp(tau, -s);
    double theta = L * dt;
    double go[NMAX], stay[NMAX];
    for (int i = 0; i < N; i++) {
        go[i] = k[i] / L;
        stay[i] = (L - k[i]) / L;
    }
    stay[N] = 1.0;

    kmat T, Y, R; /* only the leading (N+1)x(N+1) block is used */
    int n1 = N + 1;
    for (int i = 0; i < n1; i++)
        for (int j = 0; j < n1; j++)
            T[i][j] = 0.0, Y[i][j] = (i == j);
    /* base piece: T = sum_m w(m) P^m */
    double w = exp(-theta);
    for (int m = 0; m < KIN_MAX_TERMS; m++) {
        for (int i = 0; i < n1; i++) {
            int top = i + m < N ? i + m : N;
            for (int j = i; j <= top; j++)
                T[i][j] += w * Y[i][j];
        }
        if (tail_after(w, theta, m) <= KIN_TAIL)
            break;
        for (int i = 0; i < n1; i++) {
            int hi = i + m + 1 < N ? i + m + 1 : N;
            for (int j = hi; j > i; j--)
                Y[i][j] = Y[i][j] * stay[j] + Y[i][j - 1] * go[j - 1];
            Y[i][i] *= stay[i];
        }
        w = w * theta / (m + 1);
    }
    for (int i = 0; i < N; i++)
        T[i][i] = exp(-k[i] * dt);
    T[N][N] = 1.0;

    /* s - 1 full squarings (ping-pong between T and R), then row 0 of the last */
    double (*A)[NMAX] = T, (*B)[NMAX] = R;
    for (int r = 1; r < s; r++) {
        /* B = A A row by row; the inner loop runs over independent j (no
         * dependency chain through one accumulator, and it vectorises) */
        for (int i = 0; i < n1; i++) {
            double *bi = B[i];
            for (int j = i; j < n1; j++)
                bi[j] = 0.0;
            for (int l = i; l < n1; l++) {
                double a = A[i][l];
                const double *al = A[l];
                for (int j = l; j < n1; j++)
                    bi[j] += a * al[j];
            }
        }
        double dr = ldexp(dt, r);
        for (int i = 0; i < N; i++)
            B[i][i] = exp(-k[i] * dr);
        B[N][N] = 1.0;
        double (*t)[NMAX] = A;
        A = B;
        B = t;
    }
    for (int j = 0; j < n1; j++)
        x[j] = 0.0;
    for (int l = 0; l < n1; l++) {
        double a = A[0][l];
        for (int j = l; j < n1; j++)
            x[j] += a * A[l][j];
    }
    x[0] = exp(-k[0] * tau);
}

/* 1 when tau is so far past the slowest step that every non-terminal fraction
 * is below 1e-330 (zero in double): P(degree < N) <= P(Gamma(N, kmin) > tau)
 * <= N e^(-kmin tau) (kmin tau)^(N-1)/(N-1)!  for kmin tau >= N. */
static int past_all_steps(const double *k, int N, double tau)
{
    double kmin = k[0];
    for (int i = 1; i < N; i++)
        if (k[i] < kmin)
            kmin = k[i];
    double a = kmin * tau;
    if (!(a >= N))
        return 0;
    if (isinf(a))
        return 1;
    double logp = log((double)N) - a + (N - 1) * log(a) - lgamma((double)N);
    return logp < -760.0;
}

/* Batch (plug flow) degree fractions x[0..N] at tau for the step constants k[0..N-1]: the
 * exact ends at tau 0 and past all steps, the series below KIN_DIRECT_MAX, squaring above;
 * a dominant last state is taken as the complement. */
static void batch(const double *k, int N, double tau, double *x)
{
    double L = max_k(k, N);
    if (tau == 0.0) {
        memset(x, 0, sizeof(double) * (size_t)(N + 1));
        x[0] = 1.0;
    } else if (past_all_steps(k, N, tau)) {
        memset(x, 0, sizeof(double) * (size_t)(N + 1));
        x[N] = 1.0;
    } else if (L * tau <= KIN_DIRECT_MAX) {
        batch_direct(k, N, tau, L, x);
    } else {
        batch_squaring(k, N, tau, L, x);
    }
    /* Once the terminal state holds most of the mass, take it as the complement:
     * the other fractions are then accurate to their own size, the complement to
     * eps absolutely, and sum x = 1 holds to rounding - which keeps the mean
     * degree N - sum (N - n) x[n] smooth and monotone near full halogenation. */
    double below = 0.0;
    for (int n = 0; n < N; n++)
        below += x[n];
    if (below <= 0.5)
        x[N] = 1.0 - below;
}

/* CSTR degree fractions x[0..N] at tau: A_n = A_{n-1} k_{n-1} tau / (1 + k_n tau), the last
 * state what got past every step. */
static void cstr(const double *k, int N, double tau, double *x)
{
    double surv = 1.0; /* fraction that got past step n: prod k tau/(1 + k tau) */
    for (int n = 0; n < N; n++) {
        double r = k[n] * tau;
        x[n] = surv / (1.0 + r);
        surv *= 1.0 / (1.0 + 1.0 / r); /* r/(1+r), also right for r = 0 or inf */
    }
    x[N] = surv;
}

enum hl_status kin_distribution(enum kin_mode mode, const double *k, int nsteps, double tau,
                                double *x, struct hl_err *e)
{
    enum hl_status st = check_args(k, nsteps, x, e);
    if (st)
        return st;
    if (!(tau >= 0.0) || isinf(tau))
        return hl_err_set(e, HL_ERR_INPUT, "kinetics: tau = %g must be finite and >= 0", tau);
    if (mode == KIN_BATCH)
        batch(k, nsteps, tau, x);
    else if (mode == KIN_CSTR)
        cstr(k, nsteps, tau, x);
    else
        return hl_err_set(e, HL_ERR_INPUT, "kinetics: unknown reactor mode %d", (int)mode);
    return HL_OK;
}

/* Residual of the mean degree at u = ln tau and its derivative d/du.  Near the
 * top the residual is formed from the deficit sum (N - n) x[n] so that it keeps
 * its relative accuracy when mean_degree is close to N. */
struct eval {
    double r, dr; /* mean(tau) - target, d/du */
    double x[NMAX];
};

/* Fills ev at u = ln tau: the degree fractions of the mode, the residual mean degree -
 * target and its derivative d/du. */
static void evaluate(enum kin_mode mode, const double *k, int N, double u, double target,
                     struct eval *ev)
{
    double tau = exp(u);
    if (mode == KIN_BATCH)
        batch(k, N, tau, ev->x);
    else
        cstr(k, N, tau, ev->x);
    double mean = 0.0, deficit = 0.0, d = 0.0;
    for (int n = 0; n <= N; n++) {
        mean += n * ev->x[n];
        deficit += (N - n) * ev->x[n];
    }
    if (mode == KIN_BATCH) {
        /* d mean/dtau = sum of the step fluxes */
        for (int n = 0; n < N; n++)
            d += k[n] * ev->x[n];
        d *= tau;
    } else {
        /* mean = sum_{n>=1} S_n, S_n = prod_{j<n} f_j, d ln f_j/du = 1/(1 + k_j tau) */
        double S = 1.0, g = 0.0;
        for (int n = 1; n <= N; n++) {
            double r = k[n - 1] * tau;
            S *= 1.0 / (1.0 + 1.0 / r);
            g += 1.0 / (1.0 + r);
            d += S * g;
        }
    }
    ev->r = target > 0.5 * N ? (N - target) - deficit : mean - target;
    ev->dr = d;
}

enum hl_status kin_solve_extent(enum kin_mode mode, const double *k, int nsteps,
                                double mean_degree, double *x, double *tau_out,
                                struct hl_err *e)
{
    enum hl_status st = check_args(k, nsteps, x, e);
    if (st)
        return st;
    if (mode != KIN_BATCH && mode != KIN_CSTR)
        return hl_err_set(e, HL_ERR_INPUT, "kinetics: unknown reactor mode %d", (int)mode);
    int N = nsteps;
    double D = mean_degree;
    if (!(D >= 0.0) || D > N + 1e-12 * N)
        return hl_err_set(e, HL_ERR_INPUT, "kinetics: mean degree %g outside 0..%d", D, N);
    memset(x, 0, sizeof(double) * (size_t)(N + 1));
    if (D == 0.0) {
        x[0] = 1.0;
        if (tau_out)
            *tau_out = 0.0;
        return HL_OK;
    }
    if (D >= N - 1e-12 * N) {
        x[N] = 1.0;
        if (tau_out)
            *tau_out = INFINITY;
        return HL_OK;
    }

    /* Safeguarded Newton on u = ln tau.  mean(tau) is strictly increasing (each
     * survival probability P(degree >= n) is), so a sign change brackets the
     * root; Newton steps that leave the bracket are replaced by an expansion
     * (no bracket yet) or bisection. */
    const double tol = 2e-13 * D;
    double lo = -INFINITY, hi = INFINITY, step = 2.0;
    double u = fmin(fmax(log(D / k[0]), -700.0), 700.0); /* small extent: mean ~ k0 tau */
    struct eval ev, best;
    best.r = INFINITY;
    double best_u = u;
    for (int it = 0; it < 400; it++) {
        evaluate(mode, k, N, u, D, &ev);
        if (fabs(ev.r) < fabs(best.r)) {
            best = ev;
            best_u = u;
        }
        if (fabs(ev.r) <= tol)
            break;
        if (ev.r < 0.0)
            lo = u;
        else
            hi = u;
        double un = (ev.dr > 0.0 && isfinite(ev.dr)) ? u - ev.r / ev.dr : NAN;
        if (!(un > lo && un < hi)) {
            if (isinf(hi)) {
                un = u + step;
                step *= 2.0;
            } else if (isinf(lo)) {
                un = u - step;
                step *= 2.0;
            } else {
                un = 0.5 * (lo + hi);
            }
        }
        if (un == u || (isfinite(lo) && isfinite(hi) && hi - lo <= 4e-16 * fmax(fabs(u), 1.0)))
            break;
        /* tau = e^700 ~ 1e304 is past every step for k >= 1e-200 */
        u = fmin(fmax(un, -700.0), 700.0);
    }
    if (!(fabs(best.r) <= 1e-12 * D))
        return hl_err_set(e, HL_ERR_INTERNAL,
                          "kinetics: extent for mean degree %.17g not found (residual %g)", D,
                          best.r);
    memcpy(x, best.x, sizeof(double) * (size_t)(N + 1));
    if (tau_out)
        *tau_out = exp(best_u);
    return HL_OK;
}

/* A small overhalogenation factor makes phi^n underflow the accepted range on long
 * chains; those steps are never reached at any attainable extent, so they are held at
 * the floor instead of refusing the run. */
static double floor_k(double k) { return k > 0 && k < KIN_K_MIN ? KIN_K_MIN : k; }

int kin_step_constants(int h0, double mean_r, double phi, const double *ratios, int nratios,
                       double *k)
{
    if (h0 < 1 || !k || nratios < 0 || (nratios > 0 && !ratios))
        return -1;
    int n = h0 < KIN_MAX_STEPS ? h0 : KIN_MAX_STEPS;
    if (nratios > 0) {
        for (int i = 0; i < nratios; i++)
            if (!(ratios[i] > 0.0) || isinf(ratios[i]))
                return -1;
        int last = nratios - 1;
        for (int i = 0; i < n; i++)
            k[i] = i < nratios ? ratios[i]
                               : ratios[last] * (double)(h0 - i) / (double)(h0 - last);
    } else {
        if (!(mean_r > 0.0) || isinf(mean_r) || !(phi > 0.0) || isinf(phi))
            return -1;
        for (int i = 0; i < n; i++)
            k[i] = floor_k((double)(h0 - i) * mean_r * pow(phi, i));
    }
    for (int i = 0; i < n; i++)
        if (!(k[i] >= KIN_K_MIN && k[i] <= KIN_K_MAX))
            return -1;
    return n;
}

/* Why expected-value depletion rather than (H left) x (mean r): when one class is far
 * more reactive (benzylic H under Br2), the first halogen almost surely took one of
 * those H, so A1 keeps fewer of them than the average says; the plain H-count rule
 * then overstates the later steps (ethylbenzene + Br2 at 80 C: k1/k0 0.8 against about
 * 0.5 here). The split is the first-step isomer split of design section 4 applied to
 * what is left, a mean-field step that stays exact when all H are alike. */
int kin_step_constants_sites(const double *n_h, const double *r, int nclass, double phi,
                             double *k)
{
    enum { MAXC = 16 };
    double c[MAXC], total = 0;
    if (!n_h || !r || !k || nclass < 1 || nclass > MAXC || !(phi > 0.0) || isinf(phi))
        return -1;
    for (int j = 0; j < nclass; j++) {
        if (!(n_h[j] >= 0.0) || isinf(n_h[j]) || (n_h[j] > 0 && (!(r[j] > 0.0) || isinf(r[j]))))
            return -1;
        c[j] = n_h[j];
        total += n_h[j];
    }
    long h0 = lround(total);
    if (h0 < 1)
        return -1;
    int n = h0 < KIN_MAX_STEPS ? (int)h0 : KIN_MAX_STEPS;
    for (int i = 0; i < n; i++) {
        double rate = 0;
        for (int j = 0; j < nclass; j++)
            rate += c[j] * r[j];
        k[i] = floor_k(rate * pow(phi, i));
        if (!(k[i] >= KIN_K_MIN && k[i] <= KIN_K_MAX))
            return -1;
        /* remove one H: classes whose proportional share exceeds what they hold are
         * emptied first, the rest shared out again (at most nclass rounds) */
        double remove = 1.0;
        int active[MAXC];
        for (int j = 0; j < nclass; j++)
            active[j] = c[j] > 0;
        for (int round = 0; round <= nclass && remove > 0; round++) {
            double sum = 0;
            for (int j = 0; j < nclass; j++)
                if (active[j])
                    sum += c[j] * r[j];
            if (!(sum > 0))
                break;
            int clamped = 0;
            for (int j = 0; j < nclass; j++)
                if (active[j] && remove * r[j] >= sum) {
                    remove -= c[j];
                    c[j] = 0;
                    active[j] = 0;
                    clamped = 1;
                }
            if (clamped)
                continue;
            for (int j = 0; j < nclass; j++)
                if (active[j])
                    c[j] -= remove * c[j] * r[j] / sum;
            remove = 0;
        }
        for (int j = 0; j < nclass; j++)
            if (c[j] < 0)
                c[j] = 0;
    }
    return n;
}
