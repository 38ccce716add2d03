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

/* The same rule split in two, for integrands evaluated in batches: the 15 nodes of a -> b
 * into t[0..14] (a fixed order), and the result, error and size from the integrand's
 * values fv[0..14] at them (quad_gk15 is these two around the evaluations). */
void quad_gk15_nodes(cplx a, cplx b, cplx *t);
void quad_gk15_values(const cplx *fv, cplx a, cplx b, cplx *res, double *err, double *resabs);

/* Adaptive bisection of a -> b (the interval with the largest error first) until
 * err <= max(abstol, reltol*|res|, rounding floor 100 eps * integral of |f|), at most
 * `limit` (<= QUAD_MAX_SUB) subintervals. *nevals counts the evaluations added. */
int quad_adaptive(quad_fn f, void *ctx, cplx a, cplx b, double abstol, double reltol,
                  size_t limit, cplx *res, double *err, long *nevals);

/* The integrand at m points at once: f[i] at t[i]. */
typedef void (*quad_batch_fn)(void *ctx, const cplx *t, size_t m, cplx *f);

/* Segments per batch of quad_polyline's first pass (15 points each). */
#define QUAD_BATCH 64

/* Scratch quad_polyline needs: per segment a complex result and an error, and the
 * batch of nodes and values. */
#define QUAD_POLYLINE_BYTES(nseg) \
  ((nseg) * (sizeof(cplx) + sizeof(double)) + 2 * 15 * QUAD_BATCH * sizeof(cplx))

/* The integral along the polyline pts[0..n-1], segment by segment, in time linear in
 * the number of segments: one 15-point rule per segment (the integrand through fb, in
 * batches of QUAD_BATCH segments; f alone when fb is NULL) gives the size of the
 * integral; then every segment whose error exceeds its share target/(n-1) of
 * target = max(abstol, reltol * integral of |f|) is bisected (quad_adaptive through f,
 * at most `limit` subintervals), while fewer than `budget` evaluations were spent (past
 * it the one-rule estimates stay: QUAD_LIMIT). With sing0 (sing1) the first (last)
 * segment takes the tanh-sinh rule (an integrable singularity at that end). scratch:
 * QUAD_POLYLINE_BYTES(n - 1) bytes. *res, *err; *nevals counts the evaluations added. */
int quad_polyline(quad_fn f, quad_batch_fn fb, void *ctx, const cplx *pts, size_t n,
                  double abstol, double reltol, size_t limit, long budget, int sing0,
                  int sing1, void *scratch, cplx *res, double *err, long *nevals);

/* The vertices to integrate along when consecutive segments of a traced descent path
 * pts[0..n-1] (F's values at them in levels, Re F falling) may be joined: from each
 * vertex kept, the farthest point k such that Re F falls by at most `drop` from it, every
 * segment up to k turns by at most 0.25 rad from the first one out of it, and each of the
 * points avoid[0..navoid-1] (poles the chord must not pass near) lies farther from the
 * chord than its length. The first and last points are always kept. Writes the kept
 * indices to keep[] (room for n) and returns their number. O(n navoid). */
size_t quad_merge_vertices(const cplx *pts, const cplx *levels, size_t n, double drop,
                           const cplx *avoid, size_t navoid, size_t *keep);

/* Tanh-sinh rule on a -> b, never evaluating at the endpoints (so integrable endpoint
 * singularities are fine); halves the step until two levels agree to the tolerance, at
 * most 10 levels. The error: the two levels' difference, plus the parts between each end
 * and the nearest node there (read from the power law of the two nearest nodes). */
int quad_tanhsinh(quad_fn f, void *ctx, cplx a, cplx b, double abstol, double reltol,
                  cplx *res, double *err, long *nevals);

#endif
