/*
 * airy.h — Airy functions of a complex argument, each value with an error estimate, and
 * the valleys of the cubic model e^{zeta u - u^3/3} that the two-saddle uniform form
 * integrates over.
 *
 * Methods (DLMF chapter 9):
 *   |z| < AIRY_ASYMPTOTIC_RADIUS: the Maclaurin series (DLMF 9.4.1-9.4.2, as the
 *     recurrence a_{n+3} = a_n / ((n+2)(n+3)) that Ai'' = z Ai gives) summed in
 *     double-double arithmetic (Dekker, Numer. Math. 18 (1971) 224-242): where Ai decays
 *     its terms are up to ~e^{(4/3)|z|^{3/2}} times larger than the sum, and 106 bits
 *     absorb that up to the switch;
 *   beyond: the asymptotic expansions DLMF 9.7.5-9.7.6 for |ph z| <= 2pi/3, truncated at
 *     the smallest term, with the bounds of DLMF 9.7(iv) on the remainder; for
 *     |ph z| > 2pi/3 the connection formula DLMF 9.2.12 through z e^{+-2pi i/3}. The
 *     argument's rotations and zeta = (2/3) z^{3/2} are formed in double-double, so the
 *     exponential carries no error proportional to |zeta| beyond what the double z itself
 *     implies.
 *   Bi by DLMF 9.2.10 (Bi(z) = e^{pi i/6} Ai(z e^{2 pi i/3}) + e^{-pi i/6} Ai(z e^{-2 pi i/3}))
 *     beyond the switch, and by its own Maclaurin series within.
 * Every result carries an absolute error estimate meant as a bound: rounding of the
 * double-double sums tracked term by term, the series tails, the remainder bounds, and
 * the final rounding to double. Values past the range of a double come out as 0 (error:
 * the smallest normal double) or infinity (error: infinity) with the status saying so.
 * Cost: up to ~40 double-double terms (Maclaurin) or ~40 double terms (asymptotic).
 */
#ifndef STEEP_AIRY_H
#define STEEP_AIRY_H

#include "steep.h"

/* |z| from which the asymptotic expansions are used (both methods' error bounds are
 * within a few units of 1e-15 relative there, in the worst direction, ph z = 0). */
#define AIRY_ASYMPTOTIC_RADIUS 9.0

enum airy_status {
  AIRY_OK = 0,
  AIRY_UNDERFLOW,   /* |value| below the smallest double: 0 returned */
  AIRY_OVERFLOW,    /* |value| beyond the largest double: infinity returned */
  AIRY_NONFINITE    /* z is not finite */
};

/* Ai(z), Ai'(z) and absolute error estimates; a status. */
int airy_ai(cplx z, cplx *ai, cplx *aip, double *err_ai, double *err_aip);

/* Bi(z), Bi'(z) and absolute error estimates; a status. */
int airy_bi(cplx z, cplx *bi, cplx *bip, double *err_bi, double *err_bip);

/* An upper bound of chi(n) = pi^{1/2} Gamma(n/2 + 1) / Gamma(n/2 + 1/2) (DLMF 9.7.3),
 * the factor of the remainder bounds: sqrt(pi (n + 2) / 2) (chi(n) ~ sqrt(pi n / 2),
 * DLMF 9.7.4; the kernel tests check it against DLMF Table 9.7.1). */
double airy_chi_bound(int n);

/* The cubic model of two saddles together, P(u) = zeta u - u^3/3 (saddles at u = +-v,
 * v^2 = zeta): which valley the steepest descent path of Re P leaving the saddle u0
 * (u0^2 = zeta) in the descent direction nearest the angle `dir` ends in. The valleys
 * are the sectors about the directions 0, 2pi/3, -2pi/3, numbered 0, 1, 2. Returns the
 * valley's number, or -1 when no descent direction lies within pi/3 of dir, -2 when the
 * path runs into the other saddle (a Stokes line of the model: *other_hit is set to 1),
 * -3 when the tracing fails. Traced by steps of a tenth of the distance to the nearer
 * saddle (or of |u|), each corrected back onto Im P = Im P(u0) by Newton's method;
 * at most 4000 steps. */
int airy_model_valley(cplx zeta, cplx u0, double dir, int *other_hit);

#endif
