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

#endif
