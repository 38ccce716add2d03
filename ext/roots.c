/*
 * roots.c — zeros of analytic functions in a disc; contracts in roots.h.
 */
#include <math.h>
#include <stdint.h>
#include "cdiv.h"
#include "cplx.h"
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

/* Newton's iteration of root_newton up to where it stops: ROOT_OK with *t the last iterate
 * and *converged whether it converged (or stopped converging linearly: a multiple zero),
 * or the failure. */
static int newton_steps(jet_fn jet, void *ctx, cplx *tp, cplx center, double radius,
                        double scale, int maxit, int *converged) {
  cplx t = *tp, c[2];
  double last = INFINITY;
  *converged = 0;
  for (int it = 0; it < maxit; it++) {
    if (jet(ctx, t, 1, c) != STEEP_OK) return ROOT_FAIL;
    if (c[0] == 0) { *converged = 1; break; }
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
    if (len <= 1e-15 * (cabs(t) + scale)) { *converged = 1; break; }
    if (len <= 1e-7 * scale && len > 0.3 * last && it > 6) break;   /* linear: multiple */
    last = len;
  }
  *tp = t;
  return ROOT_OK;
}

/* The rest of root_newton from the iterate t: multiplicity, polishing, the disc. */
static int newton_finish(jet_fn jet, void *ctx, cplx t, int converged, cplx center,
                         double radius, double scale, cplx *root, int *mult) {
  cplx c[MAX_MULT + 2];
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

int root_newton(jet_fn jet, void *ctx, cplx t0, cplx center, double radius, double scale,
                int maxit, cplx *root, int *mult) {
  cplx t = t0;
  int converged = 0;
  int st = newton_steps(jet, ctx, &t, center, radius, scale, maxit, &converged);
  if (st != ROOT_OK) return st;
  return newton_finish(jet, ctx, t, converged, center, radius, scale, root, mult);
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

typedef struct {
  jet_fn jet;
  void *ctx;
  long *evals;   /* the evaluation counter the jets advance */
  cplx center;
  double radius;
  cplx *at;
  int *mult;
  size_t n;
  long newton;   /* evaluations spent in Newton's method */
} search;

/* Is z within 1e-8 radius of a zero found already? */
static int known(const search *s, cplx z) {
  for (size_t k = 0; k < s->n; k++)
    if (plain_abs(s->at[k] - z) <= 1e-8 * s->radius) return 1;
  return 0;
}

/* Newton from one seed (root_newton). An iterate that lands on a zero found already ends
 * there: its multiplicity and polishing would only give that zero again (the jet of
 * order 9 they take is most of a run's cost, and most seeds find a known zero). */
static void try_seed(search *s, cplx seed) {
  cplx root = 0, t = seed;
  int m = 0, converged = 0;
  double scale = s->radius / 10;
  long before = *s->evals;
  int st = newton_steps(s->jet, s->ctx, &t, s->center, s->radius, scale, 60, &converged);
  if (st == ROOT_OK && known(s, t)) st = ROOT_NOCONV;
  else if (st == ROOT_OK)
    st = newton_finish(s->jet, s->ctx, t, converged, s->center, s->radius, scale, &root, &m);
  s->newton += *s->evals - before;
  if (st != ROOT_OK || known(s, root)) return;
  s->at[s->n] = root;
  s->mult[s->n] = m;
  s->n++;
}

static int inside_total(const search *s) {
  int n = 0;
  for (size_t k = 0; k < s->n; k++)
    if (plain_abs(s->at[k] - s->center) < s->radius) n += s->mult[k];
  return n;
}

void root_search(jet_fn jet, void *ctx, long *evals, cplx center, double radius, int grid,
                 const cplx *seeds, size_t nseeds, int count_pts, int poles, cplx *at,
                 int *mult, size_t *nfound, long *nevals, int *count_status, int *count) {
  const double pi = 3.141592653589793;
  search s = {jet, ctx, evals, center, radius, at, mult, 0, 0};
  *count_status = ROOT_FAIL;
  *count = 0;
  /* With a count to go by, the seeds the problem gives come first and the grid only where
   * they fall short of it: a zero the grid would find beyond them is one more than the
   * count allows (Newton's zeros all lie in the disc). */
  int counted = grid && count_pts > 0;
  if (counted) {
    double dist = 0;
    for (size_t k = 0; k < nseeds; k++)
      if (plain_abs(seeds[k] - center) < radius) try_seed(&s, seeds[k]);
    *count_status = root_count(jet, ctx, center, radius, count_pts, count, &dist);
    if (*count_status == ROOT_OK && inside_total(&s) >= *count + poles) grid = 0;
  }
  if (grid) {
    try_seed(&s, center);
    for (int ring = 1; ring <= 6; ring++) {
      double r = radius * ring / 6.5;
      int m = 8 * ring;
      for (int j = 0; j < m; j++)
        try_seed(&s, center + r * cexp(I * (2 * pi * (j + 0.5 * (ring % 2)) / m)));
    }
  }
  if (!counted) {
    for (size_t k = 0; k < nseeds; k++)
      if (plain_abs(seeds[k] - center) < radius) try_seed(&s, seeds[k]);
  }
  if (count_pts > 0) {
    double dist = 0;
    if (!counted) *count_status = root_count(jet, ctx, center, radius, count_pts, count, &dist);
    if (*count_status == ROOT_OK && counted) {
      /* the Lua side's generator: s -> (s a + c) mod 2^63, uniform (s >> 11) / 2^52 */
      uint64_t state = 12345;
      int want = *count + poles;
      for (int round = 1; round <= 4 && inside_total(&s) < want; round++) {
        for (int j = 0; j < 150; j++) {
          double u[2];
          for (int q = 0; q < 2; q++) {
            state = (state * 6364136223846793005ULL + 1442695040888963407ULL) &
                    0x7fffffffffffffffULL;
            u[q] = (double)(state >> 11) / 4503599627370496.0;
          }
          try_seed(&s, center + radius * sqrt(u[0]) * cexp(I * (2 * pi * u[1])));
        }
      }
    }
  }
  *nfound = s.n;
  *nevals = s.newton;
}

/* (lua/steep/landscape.lua ran this loop; the port keeps its arithmetic, so the roots are
 * the same to the bit: Smith's division, |z| by the plain formula.) */
int root_aberth(const cplx *a, int d, double bound, cplx *z) {
  const double pi = 3.141592653589793;
  for (int k = 1; k <= d; k++) z[k - 1] = bound * cexp(I * (2 * pi * (k - 1) / d + 0.4));
  int sweep;
  for (sweep = 1; sweep <= 500; sweep++) {
    double moved = 0;
    for (int k = 0; k < d; k++) {
      cplx x = z[k], p = a[d], dp = 0;
      for (int j = d - 1; j >= 0; j--) {
        dp = dp * x + p;
        p = p * x + a[j];
      }
      if (plain_abs(p) == 0) continue;
      cplx w = cdiv(p, dp), s = 0;
      for (int j = 0; j < d; j++) {
        if (j == k) continue;
        cplx diff = z[k] - z[j];
        if (plain_abs(diff) > 0) s = s + cdiv(1, diff);
      }
      cplx step = cdiv(w, 1 - w * s);
      if (!(plain_abs(step) < INFINITY)) step = w;
      z[k] = z[k] - step;
      moved = fmax(moved, plain_abs(step) / fmax(plain_abs(z[k]), 1e-300 + bound * 1e-15));
    }
    if (moved < 1e-15) break;
  }
  return sweep;
}
