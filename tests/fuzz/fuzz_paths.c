/*
 * fuzz_paths.c — the landscape kernels on random exponents built as tapes: polynomials,
 * exp-polynomials, and polynomials plus log, a complex power or an elementary function
 * of a second polynomial, optionally with an amplitude (a pole, a polynomial, a square
 * root) as output 2. With small bounds, as the Lua layer calls them: root_newton from
 * random seeds, root_count on random circles, path_saddle_starts and path_trace
 * (maxsteps <= 200), path_saddle_quad on the first two rays traced (order 2, descent), invmap_circle, invmap_cubic and invmap_quartic (N <= 32), ring
 * samples, quadrature along a segment and the geometry of the traced path. Nothing may
 * crash or hang (libFuzzer's -timeout).
 */
#include "fuzz.h"
#include "geom.h"
#include "invmap.h"
#include "rings.h"
#include "path.h"
#include "problem.h"
#include "quad.h"
#include "roots.h"

enum { MAX_INS = 96, MAX_DEG = 6 };

typedef struct {
  tape t;
  tape_ins ins[MAX_INS];
  int out[2];
  unsigned char varying[MAX_INS];
} btape;

static int emit(btape *b, int op, int a, int c, long k, cplx v) {
  tape_ins *in = &b->ins[b->t.n];
  in->op = op;
  in->a = a;
  in->b = c;
  in->k = k;
  in->c = v;
  return (int)b->t.n++;
}

/* sum c_j t^j, j = 0..deg, by Horner's rule; the leading coefficient is scaled by the
 * parameter (slot `par`) so that the parameter path is exercised too */
static int poly(btape *b, fz *f, int var, int par) {
  int deg = 1 + (int)fz_below(f, MAX_DEG);
  int s = emit(b, OP_CONST, -1, -1, 0, fz_cplx(f, 0));
  s = emit(b, OP_MUL, s, par, 0, 0);
  for (int j = deg - 1; j >= 0; j--) {
    s = emit(b, OP_MUL, s, var, 0, 0);
    int c = emit(b, OP_CONST, -1, -1, 0, fz_cplx(f, 0));
    s = emit(b, OP_ADD, s, c, 0, 0);
  }
  return s;
}

static void build(btape *b, fz *f) {
  memset(b, 0, sizeof *b);
  b->t.ins = b->ins;
  b->t.out = b->out;
  b->t.varying = b->varying;
  b->t.nparams = 1;
  int var = emit(b, OP_VAR, -1, -1, 0, 0);
  int par = emit(b, OP_PARAM, -1, -1, 0, 0);
  int P = poly(b, f, var, par), F = P;
  uint8_t kind = fz_u8(f) % 7;
  if (kind > 0) {
    int Q = poly(b, f, var, par), e;
    switch (kind) {
      case 1: e = emit(b, OP_EXP, Q, -1, 0, 0); break;   /* exp-polynomial */
      case 2: e = emit(b, OP_LOG, Q, -1, 0, 0); break;   /* branch cuts */
      case 3: e = emit(b, OP_POWC, Q, -1, 0, fz_cplx(f, 0)); break;
      case 4: e = emit(b, OP_POWI, Q, -1, (long)(int8_t)fz_u8(f) % 6, 0); break;
      case 5: e = emit(b, OP_SIN + (int)fz_below(f, OP_ATAN - OP_SIN + 1), Q, -1, 0, 0); break;
      default: e = Q; break;
    }
    int c = emit(b, OP_CONST, -1, -1, 0, fz_cplx(f, 0));
    e = emit(b, OP_MUL, c, e, 0, 0);
    F = (fz_u8(f) & 1) ? emit(b, OP_ADD, P, e, 0, 0) : emit(b, OP_EXP, e, -1, 0, 0);
  }
  b->t.nout = 1;
  b->out[0] = F;
  uint8_t amp = fz_u8(f) % 4;
  if (amp) {
    int g;
    if (amp == 1) {   /* 1/(t - pole) */
      int pole = emit(b, OP_CONST, -1, -1, 0, fz_near(f, 4));
      int d = emit(b, OP_SUB, var, pole, 0, 0);
      int one = emit(b, OP_CONST, -1, -1, 0, 1);
      g = emit(b, OP_DIV, one, d, 0, 0);
    } else {
      g = poly(b, f, var, par);
      if (amp == 3) g = emit(b, OP_SQRT, g, -1, 0, 0);
    }
    b->t.nout = 2;
    b->out[1] = g;
  }
}

/* h = F or F' (as the binding's zero_jet: c_k(h) = (k+d)!/k! a_{k+d}) */
typedef struct { problem *p; int deriv; } zctx;

static int zero_jet(void *ctx, cplx t, size_t order, cplx *c) {
  zctx *z = ctx;
  cplx a[PROBLEM_MAX_JET + 1];
  size_t need = order + (size_t)z->deriv;
  if (need > PROBLEM_MAX_JET) return STEEP_NONFINITE;
  int st = problem_jet(z->p, t, need, 0, a);
  if (st != STEEP_OK) return st;
  for (size_t k = 0; k <= order; k++) {
    double m = 1;
    for (size_t j = k + 1; j <= k + (size_t)z->deriv; j++) m *= (double)j;
    c[k] = m * a[k + (size_t)z->deriv];
    if (!isfinite(creal(c[k])) || !isfinite(cimag(c[k]))) return STEEP_NONFINITE;
  }
  return STEEP_OK;
}

static cplx integrand(void *ctx, cplx t) {
  cplx F;
  return problem_integrand(ctx, t, &F);
}

static double positive(fz *f, double lo, double hi) {
  return lo * pow(hi / lo, fz_u16(f) / 65535.0);   /* log-uniform in [lo, hi] */
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  fz f = {data, size};
  btape b;
  build(&b, &f);
  const char *why = "";
  if (tape_check(&b.t, &why) != -1) abort();   /* built well formed */
  cplx param = fz_near(&f, 3);
  if (param == 0) param = 1;
  void *mem = fz_alloc(problem_bytes(&b.t), 1);
  problem p;
  problem_init(&p, &b.t, &param, mem);
  zctx z = {&p, fz_u8(&f) & 1};
  int ops = fz_u8(&f);
  cplx center = fz_near(&f, 3);
  double radius = positive(&f, 1e-3, 50), scale = positive(&f, 1e-3, 10);

  if (ops & 1) {   /* zeros of F or F' by Newton from a few seeds */
    int seeds = 1 + fz_u8(&f) % 4;
    for (int s = 0; s < seeds; s++) {
      cplx root = 0;
      int mult = 0;
      int st = root_newton(zero_jet, &z, center + fz_near(&f, radius), center, radius, scale,
                           1 + fz_u8(&f) % 100, &root, &mult);
      if (st < ROOT_OK || st > ROOT_ONCIRCLE) abort();
      if (st == ROOT_OK && (mult < 1 || mult > 8)) abort();
    }
  }
  if (ops & 2) {   /* zeros minus poles inside a circle */
    int count = 0;
    double dist = 0;
    int st = root_count(zero_jet, &z, center, radius, (int)fz_below(&f, 4000), &count, &dist);
    if (st < ROOT_OK || st > ROOT_ONCIRCLE) abort();
  }
  if (ops & 4) {   /* steepest paths out of a point (as if a saddle of order 2..4) */
    int order = 2 + fz_u8(&f) % 3;
    cplx t0 = center + fz_near(&f, 1), c = fz_cplx(&f, 0), starts[4], F0, dF0;
    if (c == 0) c = -1;
    int descent = fz_u8(&f) & 1;
    if (problem_dF(&p, t0, &F0, &dF0) == STEEP_OK &&
        isfinite(creal(F0)) && isfinite(cimag(F0)) &&
        path_saddle_starts(&p, t0, F0, order, c, descent, scale, starts) == STEEP_OK) {
      size_t maxpts = 2 + fz_below(&f, 255);
      cplx *pts = fz_alloc(maxpts, sizeof *pts), *Fs = fz_alloc(maxpts, sizeof *Fs);
      cplx stops[3];
      double stop_r[3];
      path_opts o;
      memset(&o, 0, sizeof o);
      o.descent = descent;
      o.cutoff = positive(&f, 0.1, 100);
      o.ref = creal(F0);
      o.center = center;
      o.radius = radius;
      o.scale = scale;
      o.maxsteps = 1 + (int)fz_below(&f, 200);
      o.coarse = fz_u8(&f) & 1;
      o.jumps = fz_u8(&f) & 1;
      o.nstops = fz_u8(&f) % 4;
      for (size_t j = 0; j < o.nstops; j++) {
        stops[j] = center + fz_near(&f, radius);
        stop_r[j] = positive(&f, 1e-4, 1);
      }
      o.stops = stops;
      o.stop_r = stop_r;
      /* (the first ray's points kept for path_saddle_quad with the second) */
      cplx *pts1 = fz_alloc(maxpts, sizeof *pts1), *Fs1 = fz_alloc(maxpts, sizeof *Fs1);
      size_t n1 = 0;
      for (int k = 0; k < order; k++) {
        size_t n = 0;
        int which = -2;
        int end = path_trace(&p, starts[k], F0, &o, pts, Fs, maxpts, &n, &which);
        if (k == 0 && n <= maxpts) {
          memcpy(pts1, pts, n * sizeof *pts);
          memcpy(Fs1, Fs, n * sizeof *Fs);
          n1 = n;
        }
        if (k == 1 && order == 2 && descent && n <= maxpts) {
          path_ray ra = {pts1, Fs1, n1}, rb = {pts, Fs, n};
          double *work = fz_alloc(PATH_SADDLE_QUAD_DOUBLES(n1, n), sizeof *work);
          cplx res = 0, pa = 0, pb = 0;
          double err = 0;
          if (path_saddle_quad(&p, t0, F0, 2 * c, ra, rb, 0, 1e-13, work, &res, &err, &pa,
                               &pb) == 0 &&
              (!isfinite(creal(res)) || !isfinite(cimag(res)) || !(err >= 0)))
            abort();
          free(work);
        }
        if (end < PATH_LOW || end > PATH_BOUND || n > maxpts) abort();
        if (end == PATH_STOP && (which < 0 || (size_t)which >= o.nstops)) abort();
        if (n >= 2) {   /* the geometry of what was traced */
          (void)geom_turning(pts, n, t0);
          (void)geom_distance(pts, n, center);
          cplx seg[2] = {center - radius, center + radius}, cross[4];
          size_t nc = 0;
          (void)geom_crossings(pts, n, seg, 2, cross, 4, &nc);
        }
      }
      free(pts);
      free(Fs);
      free(pts1);
      free(Fs1);
    }
  }
  if (ops & 8) {   /* the inverse map on a small circle */
    int m = 1 + fz_u8(&f) % 3;
    cplx t0 = center + fz_near(&f, 1), s = fz_cplx(&f, 0), F0, dF0;
    if (s == 0) s = 1;
    size_t N = 8 + fz_below(&f, 25);
    cplx *G = fz_alloc(N, sizeof *G);
    if (problem_dF(&p, t0, &F0, &dF0) == STEEP_OK) {
      int st = invmap_circle(&p, t0, F0, m, s, positive(&f, 1e-4, 2), N, G);
      if (st < INVMAP_OK || st > INVMAP_SINGULAR) abort();
    }
    free(G);
  }
  if (ops & 32) {   /* the cubic map of two nearby saddles: F(t1) = A + zeta ua - ua^3/3 */
    cplx t1 = center + fz_near(&f, 1), zeta = fz_near(&f, 2), tprime = fz_cplx(&f, 0), F1, dF1;
    cplx ua = (fz_u8(&f) & 1) ? -csqrt(zeta) : csqrt(zeta);
    if (fz_u8(&f) & 1) ua = fz_near(&f, 2);   /* not a saddle of the model */
    if (tprime == 0) tprime = 1;
    size_t N = 8 + fz_below(&f, 25);
    double rho = positive(&f, 1e-3, 4);
    cplx *G = fz_alloc(N, sizeof *G);
    if (problem_dF(&p, t1, &F1, &dF1) == STEEP_OK) {
      cplx A = F1 - zeta * ua + ua * ua * ua / 3.0;
      int st = invmap_cubic(&p, t1, A, zeta, ua, tprime, rho, N, G);
      if (st < INVMAP_OK || st > INVMAP_SINGULAR) abort();
    }
    free(G);
  }
  if (ops & 128) {   /* the quartic map of three nearby saddles: F(t1) = A - P(ua) */
    cplx t1 = center + fz_near(&f, 1), zeta = fz_near(&f, 2), eta = fz_near(&f, 2);
    cplx tprime = fz_cplx(&f, 0), ua = fz_near(&f, 2), F1, dF1;
    if (tprime == 0) tprime = 1;
    size_t N = 8 + fz_below(&f, 25);
    double rho = positive(&f, 1e-3, 4);
    cplx *G = fz_alloc(N, sizeof *G);
    if (problem_dF(&p, t1, &F1, &dF1) == STEEP_OK) {
      cplx A = F1 + ua * (ua * (0.25 * ua * ua - 0.5 * zeta) + eta);
      int st = invmap_quartic(&p, t1, A, zeta, eta, ua, tprime, rho, N, G);
      if (st < INVMAP_OK || st > INVMAP_SINGULAR) abort();
    }
    free(G);
  }
  if (ops & 64) {   /* samples on circles: growth between rings, spread of log |g e^F| */
    size_t n = 4 + fz_below(&f, 60);
    double r2 = positive(&f, 1e-3, 50), r3 = r2 * (1 + positive(&f, 1e-3, 4));
    cplx *work = fz_alloc(3 * n, sizeof *work), l2, l3;
    double growth;
    int deg = ring_power(&p, center + fz_near(&f, 1), r2, r3, (int)n, &growth, &l2, &l3, work);
    if (deg < 0 || deg > 1024) abort();
    (void)ring_log_spread(&p, center + fz_near(&f, 1), positive(&f, 1e-6, 10), (int)n);
    free(work);
  }
  if (ops & 16) {   /* quadrature of g e^F along a segment */
    cplx a = center + fz_near(&f, radius), e = center + fz_near(&f, radius), r;
    double err, rabs;
    long evals = 0;
    quad_gk15(integrand, &p, a, e, &r, &err, &rabs);
    (void)quad_adaptive(integrand, &p, a, e, 0, 1e-10, 1 + fz_below(&f, 50), &r, &err, &evals);
    (void)quad_tanhsinh(integrand, &p, a, e, 0, 1e-10, &r, &err, &evals);
  }
  free(mem);
  return 0;
}
