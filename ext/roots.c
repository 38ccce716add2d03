/*
 * roots.c — zeros of analytic functions in a disc; contracts in roots.h.
 */
#include <math.h>
#include "roots.h"

#define MAX_MULT 8

/* Multiplicity of a zero near t: the index of the dominant term of the Taylor
 * polynomial on a circle of radius r much smaller than the distance at which zeros are
 * told apart (by Rouche's theorem that is the number of zeros inside); 0 when the value
 * itself dominates (no zero here). */
static int multiplicity(const cplx *c, double scale) {
  double r = 1e-5 * scale, rk = 1, best = -1;
  int m = 0;
  for (int k = 0; k <= MAX_MULT + 1; k++, rk *= r) {
    double v = cabs(c[k]) * rk;
    if (v > best) { best = v; m = k; }
  }
  return m;
}

int root_newton(jet_fn jet, void *ctx, cplx t0, cplx center, double radius, double scale,
                int maxit, cplx *root, int *mult) {
  cplx t = t0, c[MAX_MULT + 2];
  double last = INFINITY;
  int converged = 0;
  for (int it = 0; it < maxit; it++) {
    if (jet(ctx, t, 1, c) != STEEP_OK) return ROOT_FAIL;
    if (c[0] == 0) { converged = 1; break; }
    if (c[1] == 0) {        /* a flat spot: step aside and go on */
      t += 1e-3 * scale * (1 + 0.7 * I);
      continue;
    }
    cplx step = c[0] / c[1];
    double len = cabs(step);
    if (!isfinite(len)) return ROOT_FAIL;
    if (len > 0.5 * radius) { step *= 0.5 * radius / len; len = 0.5 * radius; }
    t -= step;
    if (cabs(t - center) > 2 * radius) return ROOT_LEFT;
    if (len <= 1e-15 * (cabs(t) + scale)) { converged = 1; break; }
    if (len <= 1e-7 * scale && len > 0.3 * last && it > 6) break;   /* linear: multiple */
    last = len;
  }
  if (jet(ctx, t, MAX_MULT + 1, c) != STEEP_OK) return ROOT_FAIL;
  int m = multiplicity(c, scale);
  if (m > MAX_MULT) return ROOT_FAIL;   /* h vanishes to high order: treat as failure */
  if (m == 0 || (!converged && m == 1)) return ROOT_NOCONV;
  if (m > 1) {
    /* the zero of the (m-1)-th derivative is simple: h^(m-1)/(m-1)! = c[m-1] */
    for (int it = 0; it < 30; it++) {
      if (jet(ctx, t, (size_t)m, c) != STEEP_OK) return ROOT_FAIL;
      if (c[m] == 0) break;
      cplx step = c[m - 1] / ((double)m * c[m]);
      t -= step;
      if (cabs(step) <= 1e-15 * (cabs(t) + scale)) break;
    }
  }
  if (cabs(t - center) > radius) return ROOT_LEFT;
  *root = t;
  *mult = m;
  return ROOT_OK;
}

int root_count(jet_fn jet, void *ctx, cplx center, double radius, int maxpts, int *count,
               double *dist) {
  enum { START = 128, DEPTH = 40 };
  const double twopi = 6.283185307179586;
  struct { double th; cplx h; } stack[DEPTH + 2];
  cplx c[1];
  int used = 0;
  double total = 0;
  if (maxpts < START) maxpts = START;
  if (jet(ctx, center + radius, 0, c) != STEEP_OK || c[0] == 0) return ROOT_ONCIRCLE;
  cplx h0 = c[0], hprev = h0;
  double thprev = 0;
  for (int j = 1; j <= START; j++) {
    double th = twopi * j / START;
    cplx hj = h0;
    if (j < START) {
      if (jet(ctx, center + radius * cexp(I * th), 0, c) != STEEP_OK || c[0] == 0)
        return ROOT_ONCIRCLE;
      hj = c[0];
      used++;
    }
    /* refine [thprev, th] until each step turns arg h by less than pi/4 */
    int sp = 0;
    stack[sp].th = th;
    stack[sp].h = hj;
    double tha = thprev;
    cplx ha = hprev;
    while (sp >= 0) {
      double thb = stack[sp].th;
      cplx hb = stack[sp].h;
      double d = carg(hb / ha);
      if (fabs(d) > 0.785 && sp < DEPTH && used < maxpts) {
        double tm = 0.5 * (tha + thb);
        if (jet(ctx, center + radius * cexp(I * tm), 0, c) != STEEP_OK || c[0] == 0)
          return ROOT_ONCIRCLE;
        used++;
        sp++;
        stack[sp].th = tm;
        stack[sp].h = c[0];
        continue;
      }
      total += d;
      tha = thb;
      ha = hb;
      sp--;
    }
    thprev = th;
    hprev = hj;
  }
  double w = total / twopi;
  *count = (int)lround(w);
  *dist = fabs(w - *count);
  return used >= maxpts ? ROOT_NOCONV : ROOT_OK;
}
