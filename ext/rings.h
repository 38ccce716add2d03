/*
 * rings.h — the integrand sampled on circles: how fast F grows between two rings (the
 * valleys of a polynomial-type exponent follow from its leading term) and how much
 * |g e^F| varies around a small circle (whether a pole dominates it). The Lua side
 * (lua/steep/landscape.lua) decides what the numbers mean.
 */
#ifndef STEEP_RINGS_H
#define STEEP_RINGS_H

#include "problem.h"

/* Growth of F between the rings |t - c| = r2 and r3 (r2 < r3) at n equally spaced
 * angles: *growth is the median over the angles of log(|F(r3)| / |F(r2)|) / log(r3 / r2)
 * (upper median; only angles where both values are finite and non-zero count; NAN if
 * none does). When the growth is within 0.1 of a whole number m >= 1, lead2 and lead3
 * get the mean over each ring of F(t) / t^m (the leading coefficient a of F ~ a t^m,
 * fitted on each ring) and the result is m; else 0. work holds 3 n entries. */
int ring_power(problem *p, cplx c, double r2, double r3, int n, double *growth, cplx *lead2,
               cplx *lead3, cplx *work);

/* The spread max - min of log |g e^F| over n points (k + 1/2) 2 pi / n on |t - c| = rho,
 * or INFINITY if the integrand is zero, infinite or NaN at one of them. */
double ring_log_spread(problem *p, cplx c, double rho, int n);

/* The circles below are sampled at t_k = c + rho e^{i theta_k}, theta_k = 2 pi k / n (or
 * 2 pi (k + 1/2) / n where said), the angles computed as 2 pi (k [+ 1/2]) / n in that
 * order of operations, as the Lua side did before these kernels (so results match it to
 * the bit). */

/* The radius, among r_i = r0 2^(-i/3), i = 0..count-1, of the circle about c on which
 * the largest of log |g e^F| over its n points (k + 1/2) 2 pi / n, plus log(|c| + 2 r_i),
 * is least: where the trapezoidal rule for a residue at c loses least to rounding (its
 * error is about u max|f| rho, and its points' own rounding u |c| moves f by a relative
 * u |c| / rho near a pole). Writes that radius, the largest log |g e^F| plus log r there
 * (log of max|f| rho) and the spread max - min of log |g e^F| on its circle; a NaN level counts as +infinity. Returns 0 when no circle
 * gives a score below +infinity (outputs untouched), else 1. Evaluates count * n points
 * in batches; work: t->n * TAPE_BLOCK + t->nout * n entries. */
int ring_quietest(problem *p, cplx c, double r0, int count, int n, cplx *work, double *rho,
                  double *score, double *spread);

/* The coefficient a of a log(t - c) in F: (1/2 pi i) times the integral of F' round the
 * circle, by the trapezoidal rule on n points, (rho / n) sum_k F'(t_k) e^{i theta_k}
 * (the sum in order of k). Jets of order 1 of F alone. Returns a steep_status (the first
 * point where F' could not be evaluated stops it). */
int circle_log_coefficient(problem *p, cplx c, double rho, int n, cplx *a);

/* Laurent coefficients of F' about c by the trapezoidal rule on n points:
 * b[j] = ((1/n) sum_k F'(t_k) e^{-2 pi i k m / n}) rho^(-m) for m = -depth - 1 + j,
 * j = 0..depth + 1 (so b[depth + 1] is the coefficient of (t - c)^0). work: n entries.
 * Returns a steep_status (F' not finite at a point). O(n depth). */
int circle_dF_laurent(problem *p, cplx c, double rho, int n, int depth, cplx *work, cplx *b);

/* Laurent coefficients of the integrand g e^F about c by the trapezoidal rule on n points:
 * out[m + depth] = a_m rho^m = (1/n) sum_k f(t_k) e^{-2 pi i k m / n} for m = -depth..1,
 * and (n even) half[m + depth], the same from every other point (an n/2 rule on the same
 * samples: their difference estimates the error); *vmax = max |f(t_k)|. root holds the n
 * roots of unity e^{-2 pi i k / n}; work: t->n * TAPE_BLOCK + (t->nout + 2) * n entries.
 * The points are evaluated in batches; each sum steps through the table of roots. */
void circle_laurent(problem *p, cplx c, double rho, int n, int depth, const cplx *root,
                    cplx *work, cplx *out, cplx *half, double *vmax);

#endif
