/*
 * quad.h — quadrature of complex-valued integrands along straight segments in the
 * complex plane: adaptive Gauss-Kronrod (7/15 points, QUADPACK's error heuristic:
 * Piessens et al., QUADPACK, Springer 1983; the same rule as GSL's qag with key 1) and a
 * tanh-sinh rule for integrable endpoint singularities (Takahasi & Mori, Publ. RIMS 9
 * (1974) 721-741). Like GSL's routines, each writes a result and an error estimate and
 * returns a status saying why it fell short; none allocates.
 */
#ifndef STEEP_QUAD_H
#define STEEP_QUAD_H

#include <stddef.h>
#include "steep.h"

typedef cplx (*quad_fn)(void *ctx, cplx t);

enum quad_status {
  QUAD_OK = 0,
  QUAD_LIMIT,       /* subdivision (or level) bound reached before the tolerance */
  QUAD_NONFINITE    /* the integrand was not finite at a node */
};

/* Largest number of subintervals of quad_adaptive. */
#define QUAD_MAX_SUB 400

/* One 15-point Kronrod rule on the segment a -> b: *res, *err from the embedded
 * 7-point Gauss rule with QUADPACK's scaling, and *resabs the rule applied to |f| times
 * |b - a| (the size that rounding errors scale with). 15 evaluations. */
void quad_gk15(quad_fn f, void *ctx, cplx a, cplx b, cplx *res, double *err, double *resabs);

/* Adaptive bisection of a -> b (the interval with the largest error first) until
 * err <= max(abstol, reltol*|res|, rounding floor 100 eps * integral of |f|), at most
 * `limit` (<= QUAD_MAX_SUB) subintervals. *nevals counts the evaluations added. */
int quad_adaptive(quad_fn f, void *ctx, cplx a, cplx b, double abstol, double reltol,
                  size_t limit, cplx *res, double *err, long *nevals);

/* Tanh-sinh rule on a -> b, never evaluating at the endpoints (so integrable endpoint
 * singularities are fine); halves the step until two levels agree to the tolerance, at
 * most 10 levels. */
int quad_tanhsinh(quad_fn f, void *ctx, cplx a, cplx b, double abstol, double reltol,
                  cplx *res, double *err, long *nevals);

#endif
