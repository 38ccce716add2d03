/*
 * roots.h — zeros of an analytic function h in a disc: Newton's method from seeds, the
 * multiplicity of each zero from its Taylor coefficients (then polished as a simple zero
 * of the (m-1)-th derivative), and the number of zeros minus poles inside a circle by
 * the argument principle (Delves & Lyness, Math. Comp. 21 (1967) 543-560), computed as
 * the unwrapped change of arg h along the circle with adaptive refinement.
 *
 * h is given by its jets: jet(ctx, t, order, c) writes c[0..order], the Taylor
 * coefficients of h about t, and returns a steep_status.
 */
#ifndef STEEP_ROOTS_H
#define STEEP_ROOTS_H

#include <stddef.h>
#include "steep.h"

typedef int (*jet_fn)(void *ctx, cplx t, size_t order, cplx *c);

enum root_status {
  ROOT_OK = 0,
  ROOT_NOCONV,      /* Newton's iteration bound reached */
  ROOT_LEFT,        /* the iterate left the disc */
  ROOT_FAIL,        /* h could not be evaluated (singular, non-finite) */
  ROOT_ONCIRCLE     /* argument principle: h vanishes or is singular on the circle */
};

/* Newton from t0 for a zero of h within |t - center| <= radius, at most maxit steps.
 * On ROOT_OK *root is the zero polished to full precision and *mult its multiplicity
 * (at most 8; jets are asked up to order 9). `scale` is the length below which two
 * zeros are not told apart. */
int root_newton(jet_fn jet, void *ctx, cplx t0, cplx center, double radius, double scale,
                int maxit, cplx *root, int *mult);

/* Winding number of h around 0 along |t - center| = radius (zeros minus poles inside),
 * with at most maxpts evaluations. *count is the nearest integer; *dist how far the raw
 * sum was from it (a sign of an unresolved turn). */
int root_count(jet_fn jet, void *ctx, cplx center, double radius, int maxpts, int *count,
               double *dist);

#endif
