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

/* All the zeros Newton's method finds in the disc |t - center| < radius from a set of
 * seeds, told apart at 1e-8 radius (a zero met again from another seed is kept once, with
 * the multiplicity of its first finding), in the order first found; each Newton run as
 * root_newton with scale radius/10 and 60 steps (an iterate that lands on a zero found
 * already stops there). Seeds: with `grid`, the center and 6 rings of 8, 16, ..., 48 points
 * at radii k/6.5 (odd rings turned by half a step); the extra seeds inside the disc. With
 * count_pts > 0 the argument principle (root_count with that many points at most) counts
 * the zeros inside less the poles; with `grid` as well, the extra seeds go first, then the
 * count, and the grid only where they found fewer than count + poles zeros (with
 * multiplicity), then up to 4 rounds of 150 pseudo-random seeds (a fixed generator: the
 * same disc gets the same seeds) while that is still so. Without a count, the grid first.
 * at[], mult[]: room for ROOT_SEARCH_MAX(nseeds) zeros; *nfound their number, *nevals
 * the evaluations of Newton's method (the count's not included); *count_status a
 * root_status of the count (ROOT_FAIL when none was made), *count its result.
 * Cost: one Newton run per seed (a few jets of order 1, one of order 9 at the end). */
#define ROOT_SEARCH_MAX(nseeds) ((size_t)(169 + 600) + (nseeds))
void root_search(jet_fn jet, void *ctx, long *evals, cplx center, double radius, int grid,
                 const cplx *seeds, size_t nseeds, int count_pts, int poles, cplx *at,
                 int *mult, size_t *nfound, long *nevals, int *count_status, int *count);

/* The d roots of the monic polynomial z^d + a[d-1] z^(d-1) + ... + a[0] (a[d] = 1) by the
 * Aberth-Ehrlich iteration (O. Aberth, Math. Comp. 27 (1973) 339-344), Gauss-Seidel style
 * (each root updated in place, in order), started at z_k = bound e^{i (2 pi (k-1)/d + 0.4)}
 * (bound > 0: a bound on every root's modulus), at most 500 sweeps, stopping when no
 * root moved by more than 1e-15 relative. Writes z[0..d-1]; returns the sweeps made.
 * O(d^2) per sweep. */
int root_aberth(const cplx *a, int d, double bound, cplx *z);

#endif
