/*
 * path.h — steepest descent and ascent paths of an exponent F: curves on which Im F is
 * constant and Re F falls (descent) or rises (ascent) fastest. Traced in arc length by
 * an adaptive Euler predictor along -+conj(F')/|F'| with a Newton corrector back onto
 * Im F = const after every step, so the error does not accumulate; F is followed by
 * continuity (jumps of the principal branch of log inside F are detected by comparing
 * the change of F with the trapezoidal integral of F' over the step, and undone).
 *
 * Every trace is bounded in steps and points and ends for a reason (enum path_end).
 */
#ifndef STEEP_PATH_H
#define STEEP_PATH_H

#include "problem.h"

enum path_end {
  PATH_LOW,        /* descent: the integrand fell below the cut-off (negligible) */
  PATH_HIGH,       /* ascent: Re F rose by more than the cut-off */
  PATH_EDGE,       /* left the region */
  PATH_STOP,       /* came within reach of one of the given stop points */
  PATH_SINGULAR,   /* F or F' not finite */
  PATH_FLAT,       /* F' vanished away from every stop point (an unlisted saddle) */
  PATH_BOUND       /* step or point bound reached */
};

typedef struct path_opts {
  int descent;            /* 1: descent, 0: ascent */
  double cutoff;          /* drop (descent, in log|integrand|) or rise (ascent, in Re F) */
  double ref;             /* descent: log|integrand| that the drop is measured from */
  cplx center;            /* the region */
  double radius;
  double scale;           /* typical length: initial and minimum steps derive from it */
  int maxsteps;
  int coarse;             /* 1: no cap on the change of Re F per step (for following a
                           * path far out once the integrand is negligible) */
  int jumps;              /* 1: F may jump across branch cuts (a log, root or non-integer
                           * power in it): each step's change of F is checked against F'
                           * (which for a fast F such as t^33 also keeps steps short); 0:
                           * F is single-valued, no check */
  const cplx *stops;      /* points where a path ends when it comes within stop_r[j] */
  const double *stop_r;
  size_t nstops;
} path_opts;

/* Traces from `start`, keeping Im F equal to Im of `level` (the continuous value of F at
 * the path's origin, e.g. the saddle's F). pts[0] = start. Writes at most maxpts points
 * and their continuous F values; *n the count, *which the stop index (PATH_STOP).
 * Returns the end reason. */
int path_trace(problem *p, cplx start, cplx level, const path_opts *o, cplx *pts, cplx *Fs,
               size_t maxpts, size_t *n, int *which);

/* Start points of the m = `order` descent (or ascent) directions out of a saddle of
 * order m at t0 with F = F0 and F - F0 ~ c (t - t0)^m: writes m points a small step out,
 * on the level curve Im F = Im F0, to starts[]. Returns a steep_status. */
int path_saddle_starts(problem *p, cplx t0, cplx F0, int order, cplx c, int descent,
                       double scale, cplx *starts);

/* A traced descent ray of a saddle for path_saddle_quad: its points after the saddle (in
 * order, outward) and F's values at them, continuous from the saddle's. */
typedef struct { const cplx *pts, *F; size_t n; } path_ray;

/* The integral of g e^F dt along the steepest descent path through a simple saddle t0
 * (F(t0) = F0, F''(t0) = F2), in along ray b and out along ray a: in the saddle's own
 * variable u, F0 - F(t(u)) = u^2 (u > 0 on ray a, u < 0 on ray b), the integrand
 * f = g e^F dt/du, dt/du = -2u / F'(t(u)), is analytic on the real line and falls like
 * e^{-u^2}, so the trapezoidal rule converges geometrically as its step halves
 * (Trefethen & Weideman, SIAM Review 56 (2014) 385-458). Each node's t(u) is solved by
 * Newton's method from the traced points (linear in u between them) and must land on the
 * segment it started from; near the saddle it is solved on F's Taylor polynomial at t0
 * (no cancellation in F0 - F) where that polynomial's truncation, estimated by the next
 * two coefficients, is the smaller error. Steps 1/2, 1/4, ... down to 1/256, each adding
 * the odd nodes, until two agree to max(abstol, reltol |value|) plus the rounding floor;
 * the nodes span the traced range (up to u = 30), the tails beyond bounded by
 * |f(u_end)| / (2 u_end). For an exponent without branch cuts (F's principal value is
 * the continuous one). The error written: the difference of the last two levels, the
 * floor (8 eps h sum |f|, and h sum |f| times each node's error: its solution's, and
 * e^F's rounding, 2 eps (|F0| + u^2 + 1)) and the tails. Writes the value, its error, the
 * parts on ray a (u > 0, with half the node u = 0) and on ray b (u < 0, likewise); returns
 * 0, or -1 when a node failed (Newton, a non-finite value, ray points not in order of
 * u), the jet at t0 failed or disagrees with F0, or the levels did not agree: the caller
 * integrates otherwise. Contract: a.n, b.n points and values each; work holds
 * PATH_SADDLE_QUAD_DOUBLES(a.n, b.n) doubles; at most 2 * 30 * 256 + 1 nodes. */
int path_saddle_quad(problem *p, cplx t0, cplx F0, cplx F2, path_ray a, path_ray b,
                     double abstol, double reltol, double *work, cplx *res, double *err,
                     cplx *part_a, cplx *part_b);

/* Scratch path_saddle_quad needs for rays of na and nb points (the u of each point). */
#define PATH_SADDLE_QUAD_DOUBLES(na, nb) ((na) + (nb) + 2)

#endif
