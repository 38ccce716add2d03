/*
 * series.h — truncated power series arithmetic (Taylor jets).
 *
 * A series of length n is the array c[0..n-1] of its first n Taylor coefficients,
 * i.e. it is known to order n-1. Every kernel below takes explicit lengths and writes
 * exactly n coefficients of its output unless said otherwise. Outputs must not alias
 * inputs unless the contract says so. Kernels that can fall short return a
 * steep_status; they never allocate: callers pass scratch space of the stated size.
 *
 * The recurrences are the classical ones for Taylor-mode automatic differentiation:
 * Griewank & Walther, "Evaluating Derivatives", 2nd ed., SIAM 2008, ch. 13
 * (Table 13.2 for the elementary functions). Each costs O(n^2) operations.
 */
#ifndef STEEP_SERIES_H
#define STEEP_SERIES_H

#include <stddef.h>
#include "steep.h"

/* out = a * b.  O(n^2). out must not alias a or b. */
void ser_mul(cplx *out, const cplx *a, const cplx *b, size_t n);

/* out = a / b.  Needs b[0] != 0 (else STEEP_SINGULAR, out untouched beyond garbage).
 * out may alias a, not b.  O(n^2). */
int ser_div(cplx *out, const cplx *a, const cplx *b, size_t n);

/* out = exp(a).  O(n^2). */
void ser_exp(cplx *out, const cplx *a, size_t n);

/* out = log(a), principal branch at a[0].  Needs a[0] != 0.  O(n^2). */
int ser_log(cplx *out, const cplx *a, size_t n);

/* out = a^p for a complex constant p, principal branch a[0]^p = exp(p log a[0]).
 * Needs a[0] != 0 (STEEP_BRANCH otherwise; integer powers go through ser_powi).
 * J.C.P. Miller's recurrence k a0 b_k = sum_{j=1..k} ((p+1) j - k) a_j b_{k-j}. O(n^2). */
int ser_pow(cplx *out, const cplx *a, cplx p, size_t n);

/* out = sqrt(a), principal branch; as ser_pow with p = 1/2 but b0 = csqrt(a0). */
int ser_sqrt(cplx *out, const cplx *a, size_t n);

/* out = a^m for an integer m by binary powering (negative m: reciprocal of a^|m|,
 * needs a[0] != 0).  work: 2n entries.  O(n^2 log|m|). */
int ser_powi(cplx *out, const cplx *a, long m, size_t n, cplx *work);

/* s = sin(a), c = cos(a) together (each needs the other).  O(n^2). */
void ser_sincos(cplx *s, cplx *c, const cplx *a, size_t n);

/* s = sinh(a), c = cosh(a) together.  O(n^2). */
void ser_sinhcosh(cplx *s, cplx *c, const cplx *a, size_t n);

/* out = tan(a) from tan' = a'(1 + tan^2).  work: n entries.  O(n^2).
 * STEEP_SINGULAR at a pole of tan (cos a0 = 0). */
int ser_tan(cplx *out, const cplx *a, size_t n, cplx *work);

/* out = tanh(a) from tanh' = a'(1 - tanh^2).  work: n entries.  O(n^2). */
int ser_tanh(cplx *out, const cplx *a, size_t n, cplx *work);

/* out = atan(a) from atan' = a'/(1 + a^2).  Needs 1 + a0^2 != 0 (a0 = +-i are branch
 * points).  work: 2n entries.  O(n^2). */
int ser_atan(cplx *out, const cplx *a, size_t n, cplx *work);

/* out = a(r(z)): composition; needs r[0] == 0 (checked by the caller).  Horner's rule
 * with truncated products.  work: 2n entries.  O(n^3). out must not alias a or r. */
void ser_compose(cplx *out, const cplx *a, const cplx *r, size_t n, cplx *work);

/* out = compositional inverse of a: a(out(z)) = z.  Needs a[0] == 0, a[1] != 0
 * (checked by the caller).  Term by term from a(h(w)) = w with the powers of the partial
 * inverse kept in a table (Knuth, TAOCP vol. 2, 4.7; the stable alternative to Lagrange
 * inversion, whose large powers lose digits when the inverse has a small radius).
 * work: n*n entries.  O(n^3 / 3). */
void ser_revert(cplx *out, const cplx *a, size_t n, cplx *work);

/* out[0..n-2] = d/dz a (length n-1). */
void ser_deriv(cplx *out, const cplx *a, size_t n);

/* out[0..n] = integral of a from 0 (length n+1, out[0] = 0). */
void ser_integ(cplx *out, const cplx *a, size_t n);

/* 1 if every coefficient is finite. */
int ser_isfinite(const cplx *a, size_t n);

#endif
