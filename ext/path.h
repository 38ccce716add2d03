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

#endif
