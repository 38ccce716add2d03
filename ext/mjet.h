/*
 * mjet.h — truncated Taylor polynomials in several variables ("jets in total degree")
 * and the evaluation of a tape in several variables.
 *
 * A polynomial in n <= MJET_MAX_VARS variables known to total degree D is the array of
 * its coefficients over the monomials s^a (|a| <= D), in graded order: all monomials of
 * degree 0, then of degree 1, ... A layout (mlayout) lists the monomials and maps a
 * monomial's dense code, sum_k a_k (D+1)^k, to its rank in that order; since the code of
 * a product is the sum of the codes (no component exceeds D), products index in O(1).
 *
 * Several variables on the existing tapes: the expression is compiled with no variable,
 * so every symbol is a parameter; the caller names which parameter slots are the
 * integration variables (varslot[k], 0-based). The jet of slot j is the Taylor
 * polynomial of that slot in local coordinates s, x_k = x0_k + dir_k s_k. Elementary
 * functions act by composition: f(a) = sum_k f_k (a - a0)^k, with the univariate Taylor
 * coefficients f_k of f at a0 from the series kernels (series.h) and Horner's rule
 * (Griewank & Walther, Evaluating Derivatives, 2nd ed., SIAM 2008, ch. 13, for jets;
 * the composition form is their "univariate Taylor propagation" applied to a
 * multivariate argument). Kernels never allocate: callers pass memory of the stated size.
 */
#ifndef STEEP_MJET_H
#define STEEP_MJET_H

#include <stddef.h>
#include "steep.h"
#include "tape.h"

#define MJET_MAX_VARS 4
/* Largest dense code table (base^n entries): bounds the memory a layout may take. */
#define MJET_MAX_DENSE (1L << 22)

typedef struct mlayout {
  int n;               /* variables */
  int deg;             /* total degree bound D */
  int base;            /* D + 1 */
  size_t N;            /* monomials of degree <= D: binomial(n + D, n) */
  unsigned char *exps; /* N * n exponents, graded order */
  int *degree;         /* N: total degree of each monomial */
  long *code;          /* N: dense code */
  size_t *upto;        /* D + 2 entries: upto[d] = number of monomials of degree < d */
  int *rank;           /* base^n: dense code -> rank (-1: degree above D) */
  long pow[MJET_MAX_VARS]; /* base^k: the code of the variable s_k */
} mlayout;

/* Bytes a layout for n variables and degree D takes, or 0 when n is outside
 * 1..MJET_MAX_VARS, D outside 0..STEEP_MAX_ORDER or the dense table too large. */
size_t mlayout_bytes(int n, int deg);

/* Builds the layout in mem (mlayout_bytes(n, deg) bytes, 16-byte aligned). O(base^n). */
void mlayout_init(mlayout *ly, int n, int deg, void *mem);

/* Rank of the monomial with dense code c (c must be a valid code of degree <= D). */
static inline size_t mlayout_rank(const mlayout *ly, long c) { return (size_t)ly->rank[c]; }

/* Number of coefficients of a polynomial known to degree d (d <= D). */
static inline size_t mlayout_len(const mlayout *ly, int d) { return ly->upto[d + 1]; }

/* out = a * b to total degree maxdeg (<= D): writes mlayout_len(maxdeg) coefficients.
 * out must not alias a or b. O(pairs of monomials with degrees summing to <= maxdeg). */
void mpoly_mul(const mlayout *ly, cplx *out, const cplx *a, const cplx *b, int maxdeg);

/* out = f(a) to degree maxdeg, f given by its univariate Taylor coefficients
 * f[0..maxdeg] at a[0]: Horner's rule on a - a[0]. work: 2 * mlayout_len(maxdeg)
 * entries. out must not alias a. O(maxdeg products). */
void mpoly_compose(const mlayout *ly, cplx *out, const cplx *a, const cplx *f, int maxdeg,
                   cplx *work);

/* Scratch (in cplx entries) mjet_tape needs for a tape of n slots, degree d. */
size_t mjet_scratch_len(const mlayout *ly, const tape *t, int d);

/* Jets of every slot of t to degree d (<= D) at x0 along dir (local coordinates
 * x_k = x0_k + dir_k s_k), the variables being the parameter slots varslot[0..n-1]:
 * slot j's polynomial is work[j * mlayout_len(d) ...]. Only instructions 0..upto are
 * evaluated (an output's operands precede it). scratch: mjet_scratch_len entries.
 * Returns STEEP_OK or the status of the first failing instruction (index to *bad):
 * STEEP_SINGULAR (division by a polynomial with zero constant term, log 0, a pole of
 * tan), STEEP_BRANCH (sqrt or a non-integer power at 0), STEEP_NONFINITE. */
int mjet_tape(const mlayout *ly, const tape *t, const cplx *params, const int *varslot,
              const cplx *x0, const cplx *dir, int d, size_t upto, cplx *work,
              cplx *scratch, long *bad);

/* The same in the local coordinates x_k = x0_k + sum_j lin[k n + j] s_j (lin: n x n,
 * row-major): a Gaussian's whitened coordinates, in which the jets are balanced. */
int mjet_tape_linear(const mlayout *ly, const tape *t, const cplx *params, const int *varslot,
                     const cplx *x0, const cplx *lin, int d, size_t upto, cplx *work,
                     cplx *scratch, long *bad);

/* Values of the outputs at the point x (no jets): tape_eval with the variables' slots
 * of a copy of params (pbuf, t->nparams entries) set to x. work: t->n entries. */
void mjet_eval(const tape *t, const cplx *params, const int *varslot, int n, const cplx *x,
               cplx *out, cplx *work, cplx *pbuf);

#endif
