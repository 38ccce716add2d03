/*
 * quad.c — segment quadrature; contracts in quad.h.
 */
#include <float.h>
#include <math.h>
#include "quad.h"

/* Kronrod 15-point nodes and weights, and the 7-point Gauss weights, as tabulated in
 * QUADPACK's qk15 (Piessens et al. 1983). tests/c/test_kernels.c checks them through
 * the degrees of exactness (22 for Kronrod, 13 for Gauss). */
static const double xgk[8] = {
  0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
  0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
  0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
  0.207784955007898467600689403773245, 0.000000000000000000000000000000000};
static const double wgk[8] = {
  0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
  0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
  0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
  0.204432940075298892414161999234649, 0.209482141084727828012999174891714};
static const double wg[4] = {
  0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
  0.381830050505118944950369775488975, 0.417959183673469387755102040816327};

/* Node order: t[7] the midpoint, t[j] and t[14 - j] the pair at -+xgk[j], j < 7. */
void quad_gk15_nodes(cplx a, cplx b, cplx *t) {
  cplx mid = 0.5 * (a + b), half = 0.5 * (b - a);
  t[7] = mid;
  for (int j = 0; j < 7; j++) {
    t[j] = mid - half * xgk[j];
    t[14 - j] = mid + half * xgk[j];
  }
}

void quad_gk15_values(const cplx *fv, cplx a, cplx b, cplx *res, double *err,
                      double *resabs_out) {
  cplx half = 0.5 * (b - a);
  double scale = cabs(half);
  cplx fc = fv[7];
  cplx resk = fc * wgk[7], resg = fc * wg[3];
  double resabs = cabs(fc) * wgk[7];
  for (int j = 0; j < 7; j++) {
    cplx f1 = fv[j], f2 = fv[14 - j];
    resk += wgk[j] * (f1 + f2);
    resabs += wgk[j] * (cabs(f1) + cabs(f2));
    if (j % 2 == 1) resg += wg[j / 2] * (f1 + f2);
  }
  cplx mean = 0.5 * resk;
  double resasc = wgk[7] * cabs(fc - mean);
  for (int j = 0; j < 7; j++) resasc += wgk[j] * (cabs(fv[j] - mean) + cabs(fv[14 - j] - mean));
  double e = cabs(resk - resg) * scale;
  resasc *= scale;
  resabs *= scale;
  if (resasc != 0 && e != 0) e = resasc * fmin(1.0, pow(200 * e / resasc, 1.5));
  if (resabs > DBL_MIN / (50 * DBL_EPSILON)) e = fmax(50 * DBL_EPSILON * resabs, e);
  *res = resk * half;
  *err = e;
  *resabs_out = resabs;
}

void quad_gk15(quad_fn f, void *ctx, cplx a, cplx b, cplx *res, double *err, double *resabs_out) {
  cplx t[15], fv[15];
  quad_gk15_nodes(a, b, t);
  for (int j = 0; j < 15; j++) fv[j] = f(ctx, t[j]);
  quad_gk15_values(fv, a, b, res, err, resabs_out);
}

static int finite_c(cplx z) { return isfinite(creal(z)) && isfinite(cimag(z)); }

int quad_adaptive(quad_fn f, void *ctx, cplx a, cplx b, double abstol, double reltol,
                  size_t limit, cplx *res, double *err, long *nevals) {
  struct { cplx a, b, r; double e, abs; } iv[QUAD_MAX_SUB];
  if (limit < 1) limit = 1;
  if (limit > QUAD_MAX_SUB) limit = QUAD_MAX_SUB;
  size_t n = 1;
  iv[0].a = a;
  iv[0].b = b;
  quad_gk15(f, ctx, a, b, &iv[0].r, &iv[0].e, &iv[0].abs);
  *nevals += 15;
  cplx total = iv[0].r;
  double etotal = iv[0].e, atotal = iv[0].abs;
  while (finite_c(total) && isfinite(etotal) &&
         etotal > fmax(fmax(abstol, reltol * cabs(total)), 100 * DBL_EPSILON * atotal)) {
    if (n >= limit) { *res = total; *err = etotal; return QUAD_LIMIT; }
    size_t w = 0;
    for (size_t j = 1; j < n; j++) if (iv[j].e > iv[w].e) w = j;
    cplx m = 0.5 * (iv[w].a + iv[w].b);
    cplx r1, r2;
    double e1, e2, s1, s2;
    quad_gk15(f, ctx, iv[w].a, m, &r1, &e1, &s1);
    quad_gk15(f, ctx, m, iv[w].b, &r2, &e2, &s2);
    *nevals += 30;
    iv[n].a = m; iv[n].b = iv[w].b; iv[n].r = r2; iv[n].e = e2; iv[n].abs = s2;
    iv[w].b = m; iv[w].r = r1; iv[w].e = e1; iv[w].abs = s1;
    n++;
    /* re-summing (rather than updating) keeps rounding from accumulating */
    total = 0;
    etotal = 0;
    atotal = 0;
    for (size_t j = 0; j < n; j++) { total += iv[j].r; etotal += iv[j].e; atotal += iv[j].abs; }
  }
  *res = total;
  *err = etotal;
  return finite_c(total) && isfinite(etotal) ? QUAD_OK : QUAD_NONFINITE;
}

/* The part of the integral between an end and the rule's nearest node there, at
 * distance l1 (value f1; the next node l2, f2): for f ~ (t - end)^beta (log factors
 * included by the local slope) it is l1 |f1| / p with p = beta + 1 read from the two
 * nodes, p = log(l1 |f1| / (l2 |f2|)) / log(l1 / l2); at least p = 0.01 (a barely
 * integrable end). Where beta + 1 is small the nodes stop well before the part left is
 * negligible: t^-0.95 log^2 t on [0, ...) left 1e-15^(0.05) (690)^2 of its scale there,
 * 9e-9 against an estimate of 1e-9. */
static double end_part(double l1, double f1, double l2, double f2) {
  if (!(l1 > 0 && l2 > l1 && f1 > 0 && f2 > 0)) return 0;
  double p = log((l1 * f1) / (l2 * f2)) / log(l1 / l2);
  if (!(p > 0.01)) p = 0.01;
  return l1 * f1 / p;
}

/* Tanh-sinh: x = tanh(pi/2 sinh u), weight pi/2 cosh u / cosh^2(pi/2 sinh u); nodes at
 * distance d = 1 - |x| = 2 / (1 + exp(pi sinh|u|)) from the ends, computed directly so
 * that no node rounds onto an endpoint. */
int quad_tanhsinh(quad_fn f, void *ctx, cplx a, cplx b, double abstol, double reltol,
                  cplx *res, double *err, long *nevals) {
  const double pi2 = 1.5707963267948966;
  cplx half = 0.5 * (b - a);
  double h = 1.0, ahalf = cabs(half);
  cplx sum = f(ctx, a + half) * pi2;    /* u = 0: x = 0, weight pi/2 */
  (*nevals)++;
  cplx prev = 0;
  double diff = INFINITY;
  int first = 1;
  /* per end, the two nodes nearest it with finite values: distances and |f| */
  double la[2] = {0, 0}, fa[2] = {0, 0}, lb[2] = {0, 0}, fb[2] = {0, 0};
  for (int level = 0; level < 10; level++) {
    /* at level 0 all nodes u = k h (k >= 1); later only the odd multiples of the new h */
    for (int k = 1;; k += first ? 1 : 2) {
      double u = k * h;
      double s = pi2 * sinh(u), ch = cosh(s);
      double w = pi2 * cosh(u) / (ch * ch);
      double d = 2.0 / (1.0 + exp(2.0 * s));   /* 1 - x */
      if (w < 1e-300 || d == 0) break;
      cplx f1 = f(ctx, a + half * d), f2 = f(ctx, b - half * d);
      *nevals += 2;
      /* a node so close to a singular end that f overflows carries a negligible
       * weight: dropping it is the usual practice for this rule */
      double l = ahalf * d;
      if (finite_c(f1)) {
        sum += w * f1;
        if (la[0] == 0 || l < la[0]) { la[1] = la[0]; fa[1] = fa[0]; la[0] = l; fa[0] = cabs(f1); }
        else if (la[1] == 0 || l < la[1]) { la[1] = l; fa[1] = cabs(f1); }
      }
      if (finite_c(f2)) {
        sum += w * f2;
        if (lb[0] == 0 || l < lb[0]) { lb[1] = lb[0]; fb[1] = fb[0]; lb[0] = l; fb[0] = cabs(f2); }
        else if (lb[1] == 0 || l < lb[1]) { lb[1] = l; fb[1] = cabs(f2); }
      }
      if (u > 6.5) break;
    }
    cplx est = sum * h * half;
    if (!first) {
      diff = cabs(est - prev);
      if (diff <= fmax(abstol, reltol * cabs(est))) {
        *res = est;
        *err = diff + end_part(la[0], fa[0], la[1], fa[1]) + end_part(lb[0], fb[0], lb[1], fb[1]);
        return QUAD_OK;
      }
    }
    prev = est;
    first = 0;
    h *= 0.5;
  }
  *res = prev;
  *err = diff;
  return QUAD_LIMIT;
}

int quad_polyline(quad_fn f, quad_batch_fn fb, void *ctx, const cplx *pts, size_t n,
                  double abstol, double reltol, size_t limit, long budget, int sing0,
                  int sing1, void *scratch, cplx *res, double *err, long *nevals) {
  size_t nseg = n - 1;
  cplx *nodes = scratch, *vals = nodes + 15 * QUAD_BATCH, *sres = vals + 15 * QUAD_BATCH;
  double *serr = (double *)(sres + nseg);
  int status = QUAD_OK;
  double size = 0;
  for (size_t k0 = 0; k0 < nseg; k0 += QUAD_BATCH) {
    size_t k1 = k0 + QUAD_BATCH < nseg ? k0 + QUAD_BATCH : nseg;
    /* the rule's nodes of the regular segments of this batch, then their values */
    size_t m = 0;
    for (size_t k = k0; k < k1; k++) {
      int singular = (k == 0 && sing0) || (k == nseg - 1 && sing1);
      if (!singular) quad_gk15_nodes(pts[k], pts[k + 1], nodes + 15 * m++);
    }
    if (fb) fb(ctx, nodes, 15 * m, vals);
    else for (size_t i = 0; i < 15 * m; i++) vals[i] = f(ctx, nodes[i]);
    *nevals += (long)(15 * m);
    m = 0;
    for (size_t k = k0; k < k1; k++) {
      int singular = (k == 0 && sing0) || (k == nseg - 1 && sing1);
      if (singular) {
        int st = quad_tanhsinh(f, ctx, pts[k], pts[k + 1], abstol, reltol, &sres[k], &serr[k],
                               nevals);
        if (st != QUAD_OK) status = st;
        size += cabs(sres[k]);
      } else {
        double rabs;
        quad_gk15_values(vals + 15 * m++, pts[k], pts[k + 1], &sres[k], &serr[k], &rabs);
        size += rabs;
      }
    }
  }
  /* the target is relative to the integral of |f| (cancellation is not chased) */
  double target = fmax(abstol, reltol * size);
  cplx total = 0;
  double etotal = 0;
  for (size_t k = 0; k < nseg; k++) {
    int singular = (k == 0 && sing0) || (k == nseg - 1 && sing1);
    if (*nevals > budget) status = QUAD_LIMIT;   /* keep the one-rule estimates */
    else if (!singular && serr[k] > target / (double)nseg) {
      int st = quad_adaptive(f, ctx, pts[k], pts[k + 1], target / (double)nseg, 0, limit,
                             &sres[k], &serr[k], nevals);
      if (st != QUAD_OK) status = st;
    }
    total += sres[k];
    etotal += serr[k];
  }
  if (!finite_c(total) || !isfinite(etotal)) status = QUAD_NONFINITE;
  *res = total;
  *err = etotal;
  return status;
}

/* Distance from z to the segment a -> b. */
static double seg_distance(cplx z, cplx a, cplx b) {
  cplx d = b - a;
  double len2 = creal(d) * creal(d) + cimag(d) * cimag(d);
  double u = len2 > 0 ? creal((z - a) * conj(d)) / len2 : 0;
  if (u < 0) u = 0;
  if (u > 1) u = 1;
  return cabs(z - (a + u * d));
}

size_t quad_merge_vertices(const cplx *pts, const cplx *levels, size_t n, double drop,
                           const cplx *avoid, size_t navoid, size_t *keep) {
  size_t m = 0, i = 0;
  if (n == 0) return 0;
  keep[m++] = 0;
  while (i + 1 < n) {
    size_t best = i + 1;
    cplx first = pts[i + 1] - pts[i];
    for (size_t k = i + 2; k < n; k++) {
      if (!(creal(levels[i]) - creal(levels[k]) <= drop)) break;
      cplx seg = pts[k] - pts[k - 1];
      if (cabs(first) == 0 || cabs(seg) == 0 || fabs(carg(seg / first)) > 0.25) break;
      double len = cabs(pts[k] - pts[i]);
      int clear = 1;
      for (size_t j = 0; j < navoid && clear; j++)
        if (seg_distance(avoid[j], pts[i], pts[k]) <= len) clear = 0;
      if (!clear) break;
      best = k;
    }
    keep[m++] = best;
    i = best;
  }
  return m;
}
