/*
 * problem.h — the integrand of one integral at fixed parameter values: a tape whose
 * output 0 is the exponent F(t) and output 1 (if present) the amplitude g(t), with the
 * scratch memory its evaluations need and a count of evaluations. Every numerical
 * kernel of the landscape (roots, paths, quadrature) evaluates through this.
 */
#ifndef STEEP_PROBLEM_H
#define STEEP_PROBLEM_H

#include "tape.h"

/* Highest jet order the kernels ask for through a problem. */
#define PROBLEM_MAX_JET 16

typedef struct problem {
  const tape *t;
  const cplx *params;
  cplx *work;          /* t->n * (PROBLEM_MAX_JET + 1) entries */
  cplx *scratch;       /* 4 * (PROBLEM_MAX_JET + 1) entries */
  cplx *vals;          /* t->nout entries */
  long evals;          /* integrand or jet evaluations so far */
  long *tally;         /* NULL, or a running total the evaluations are added to as well */
} problem;

/* Bytes of memory a problem over tape t needs (for the caller to allocate). */
size_t problem_bytes(const tape *t);

/* Lays out p over mem (problem_bytes(t) bytes, 16-byte aligned). */
void problem_init(problem *p, const tape *t, const cplx *params, void *mem);

/* Taylor coefficients F[0..order] of output `out` at x (order <= PROBLEM_MAX_JET).
 * Returns a steep_status. */
int problem_jet(problem *p, cplx x, size_t order, int out, cplx *coef);

/* The integrand g(x) e^{F(x)} (g = 1 when the tape has one output), and F(x) in *F. */
cplx problem_integrand(problem *p, cplx x, cplx *F);

/* The integrand at m points at once, f[i] = g(xs[i]) e^{F(xs[i])}, by the tape's batch
 * evaluation (tape_eval_batch: one pass of the instructions per block of points).
 * work: t->n * TAPE_BLOCK entries; out: t->nout * m entries. Counts m evaluations. */
void problem_integrand_batch(problem *p, const cplx *xs, size_t m, cplx *f, cplx *work,
                             cplx *out);

/* The tape's outputs at m points (no exponential taken): out[o * m + i] is output o at
 * xs[i], by tape_eval_batch. work: t->n * TAPE_BLOCK entries. Counts m evaluations. */
void problem_values_batch(problem *p, const cplx *xs, size_t m, cplx *work, cplx *out);

/* F(x) and F'(x) by forward mode (tape_dual_upto). Returns a steep_status. */
int problem_dF(problem *p, cplx x, cplx *F, cplx *dF);

/* The amplitude g at the point of the last successful problem_dF (1 when the tape has
 * one output): that evaluation continued by value to g's slot (tape_eval_from), not a
 * new evaluation. */
cplx problem_amplitude_after_dF(problem *p, cplx x);

#endif
