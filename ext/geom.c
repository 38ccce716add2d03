/*
 * geom.c — polyline geometry; contracts in geom.h.
 */
#include <math.h>
#include "geom.h"

double geom_turning(const cplx *p, size_t n, cplx z) {
  double total = 0;
  for (size_t k = 0; k + 1 < n; k++) {
    cplx u = p[k] - z, v = p[k + 1] - z;
    if (u == 0 || v == 0) return NAN;
    /* arg(v / u) without a division: the angle of v conj(u) (its products overflow or
     * underflow only for points beyond 1e140 or within 1e-140 of z, where the quotient is
     * taken instead) */
    double big = fmax(fmax(fabs(creal(u)), fabs(cimag(u))), fmax(fabs(creal(v)), fabs(cimag(v))));
    double small = fmin(fmax(fabs(creal(u)), fabs(cimag(u))), fmax(fabs(creal(v)), fabs(cimag(v))));
    double d = big < 1e140 && small > 1e-140
      ? atan2(creal(u) * cimag(v) - cimag(u) * creal(v), creal(u) * creal(v) + cimag(u) * cimag(v))
      : carg(v / u);
    /* a segment passing through z turns by exactly +-pi: z lies on the curve */
    if (fabs(fabs(d) - 3.141592653589793) < 1e-12) return NAN;
    total += d;
  }
  return total / 6.283185307179586;
}

static double cross(cplx u, cplx v) { return creal(u) * cimag(v) - cimag(u) * creal(v); }

/* Which side of the line through p along r the point z lies on: 1 left, 0 right or on
 * it. Deciding "on the line" as "right" once, for every use of the same vertex, makes
 * crossings at shared vertices count exactly once (a discrete form of simulation of
 * simplicity). */
static int left_of(cplx p, cplx r, cplx z) { return cross(r, z - p) > 0; }

/* The bounding box of the polyline p[0..n-1]: x0, x1, y0, y1. */
static void bbox(const cplx *p, size_t n, double box[4]) {
  box[0] = box[2] = INFINITY;
  box[1] = box[3] = -INFINITY;
  for (size_t k = 0; k < n; k++) {
    box[0] = fmin(box[0], creal(p[k])), box[1] = fmax(box[1], creal(p[k]));
    box[2] = fmin(box[2], cimag(p[k])), box[3] = fmax(box[3], cimag(p[k]));
  }
}

int geom_crossings(const cplx *a, size_t na, const cplx *b, size_t nb, cplx *pts,
                   size_t maxpts, size_t *npts) {
  int total = 0;
  size_t found = 0;
  /* only b's segments that touch a's bounding box can cross a: the stretch of b from the
   * first to the last of them */
  double abox[4];
  bbox(a, na, abox);
  size_t lo = nb, hi = 0;   /* b[lo..hi] spans every segment of b touching a's box */
  for (size_t j = 0; j + 1 < nb; j++) {
    if (fmax(creal(b[j]), creal(b[j + 1])) < abox[0] || fmin(creal(b[j]), creal(b[j + 1])) > abox[1] ||
        fmax(cimag(b[j]), cimag(b[j + 1])) < abox[2] || fmin(cimag(b[j]), cimag(b[j + 1])) > abox[3])
      continue;
    if (j < lo) lo = j;
    hi = j + 1;
  }
  if (lo >= nb) {
    if (npts) *npts = 0;
    return 0;
  }
  b += lo;
  nb = hi - lo + 1;
  for (size_t i = 0; i + 1 < na; i++) {
    cplx p = a[i], r = a[i + 1] - a[i];
    double ax0 = fmin(creal(a[i]), creal(a[i + 1])), ax1 = fmax(creal(a[i]), creal(a[i + 1]));
    double ay0 = fmin(cimag(a[i]), cimag(a[i + 1])), ay1 = fmax(cimag(a[i]), cimag(a[i + 1]));
    for (size_t j = 0; j + 1 < nb; j++) {
      /* bounding boxes first: most pairs are far apart */
      if (fmax(creal(b[j]), creal(b[j + 1])) < ax0 || fmin(creal(b[j]), creal(b[j + 1])) > ax1 ||
          fmax(cimag(b[j]), cimag(b[j + 1])) < ay0 || fmin(cimag(b[j]), cimag(b[j + 1])) > ay1)
        continue;
      cplx s = b[j + 1] - b[j];
      int b0 = left_of(p, r, b[j]), b1 = left_of(p, r, b[j + 1]);
      if (b0 == b1) continue;
      if (left_of(b[j], s, a[i]) == left_of(b[j], s, a[i + 1])) continue;
      total += b1 ? 1 : -1;   /* b went from the right of a to its left: +1 */
      if (pts && found < maxpts) {
        double den = cross(r, s);
        pts[found] = den != 0 ? p + (cross(b[j] - p, s) / den) * r : p;
      }
      found++;
    }
  }
  if (npts) *npts = found;
  return total;
}

double geom_nearest(const cplx *p, size_t n, cplx z, size_t *seg) {
  double best = n ? cabs(p[0] - z) : INFINITY;
  if (seg) *seg = 0;
  for (size_t k = 0; k + 1 < n; k++) {
    cplx d = p[k + 1] - p[k];
    /* a segment whose box lies farther than the best distance cannot be nearer */
    double dx = fmax(0, fmax(fmin(creal(p[k]), creal(p[k + 1])) - creal(z),
                             creal(z) - fmax(creal(p[k]), creal(p[k + 1]))));
    double dy = fmax(0, fmax(fmin(cimag(p[k]), cimag(p[k + 1])) - cimag(z),
                             cimag(z) - fmax(cimag(p[k]), cimag(p[k + 1]))));
    if (dx > best || dy > best) continue;
    double len2 = creal(d) * creal(d) + cimag(d) * cimag(d);
    double u = len2 > 0 ? creal(conj(d) * (z - p[k])) / len2 : 0;
    u = fmin(1, fmax(0, u));
    double dist = cabs(p[k] + u * d - z);
    if (dist < best) {
      best = dist;
      if (seg) *seg = k;
    }
  }
  return best;
}

double geom_distance(const cplx *p, size_t n, cplx z) { return geom_nearest(p, n, z, NULL); }
