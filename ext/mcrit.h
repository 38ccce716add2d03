/*
 * mcrit.h — critical points of an exponent F of several variables: zeros of its
 * gradient, by Newton's method with deflation and, for polynomial exponents, by
 * total-degree homotopy continuation. Gradient and Hessian come from jets of degree 2
 * (mjet.h) on the same tape.
 *
 * Sources: deflation as in Farrell, Birkisson & Funke, SIAM J. Sci. Comput. 37 (2015)
 * A2026-A2045 (the deflated Newton step is the plain one scaled by 1/(1 - d log m)),
 * with m(x) = prod_r (|x - r|^-2 + 1) over the roots r already found; homotopy
 * continuation from the start system x_k^{d_k} = 1 with a random complex gamma (the
 * "gamma trick"), predictor-corrector tracking: Sommese & Wampler, The Numerical
 * Solution of Systems of Polynomials, World Scientific 2005, ch. 2 and 8.
 */
#ifndef STEEP_MCRIT_H
#define STEEP_MCRIT_H

#include "mjet.h"

/* The exponent (tape output 0) as a function of n variables at fixed parameters. */
typedef struct mproblem {
  const tape *t;
  const cplx *params;
  const int *varslot;  /* parameter slot of each variable */
  int n;
  mlayout ly;          /* degree 2 */
  cplx *work, *scratch;
  long evals;
} mproblem;

size_t mproblem_bytes(const tape *t, int n);
void mproblem_init(mproblem *p, const tape *t, const cplx *params, const int *varslot, int n,
                   void *mem);

/* F, its gradient (n) and Hessian (n*n, row-major) at x. grad and hess may be NULL. */
int mproblem_derivs(mproblem *p, const cplx *x, cplx *F, cplx *grad, cplx *hess);

/* Solves A y = b in place (b := y) by Gaussian elimination with partial pivoting; A
 * (n*n, row-major, n <= MJET_MAX_VARS) is overwritten. *rcond: the smallest over the
 * largest pivot modulus (a cheap conditioning indicator). STEEP_SINGULAR on a zero
 * pivot. */
int mcrit_solve(int n, cplx *A, cplx *b, double *rcond);

enum mcrit_status { MCRIT_OK = 0, MCRIT_NOCONV, MCRIT_SINGULAR, MCRIT_NONFINITE,
                    MCRIT_DIVERGED, MCRIT_FAILED };

/* Newton's method for grad F = 0 from x0 (n entries) into x, deflated by the nknown roots
 * in known (n each). Steps longer than maxstep are shortened to it. Converged when the
 * undeflated step is below tol (1 + |x|). *iters: iterations taken. */
int mcrit_newton(mproblem *p, const cplx *x0, const cplx *known, int nknown, double maxstep,
                 double tol, int maxit, cplx *x, int *iters);

/* One path of the homotopy H(x, t) = (1 - t) gamma G(x) + t grad F(x), G_k = x_k^{d_k} - 1,
 * from the start solution `start` at t = 0 to t = 1: RK4 predictor in t, Newton
 * corrector, step halved when the corrector needs more than three steps or its first
 * step is large; |x| above `diverge`, or above 1e-4 diverge once t > 0.9 or when the
 * step collapses, ends it (MCRIT_DIVERGED: a solution at infinity, whose path grows like
 * (1 - t)^(-1/m) and would stall the steps before reaching `diverge`).
 * At t = 1, Newton's method on grad F polishes the end; MCRIT_SINGULAR when the Hessian
 * there is numerically singular (*rcond below 1e-10: a multiple critical point).
 * MCRIT_FAILED: the step fell below 1e-14 or maxsteps was reached. */
int mcrit_track(mproblem *p, const int *degs, cplx gamma, const cplx *start, double diverge,
                int maxsteps, cplx *end, double *rcond, int *steps);

#endif
