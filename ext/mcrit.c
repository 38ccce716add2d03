/*
 * mcrit.c — Newton with deflation and homotopy continuation for grad F = 0; contracts in
 * mcrit.h.
 */
#include <math.h>
#include <string.h>
#include "mcrit.h"

#define NMAX MJET_MAX_VARS

static size_t align16(size_t s) { return (s + 15) & ~(size_t)15; }

size_t mproblem_bytes(const tape *t, int n) {
  size_t lyb = mlayout_bytes(n, 2);
  size_t len = 1 + (size_t)n + (size_t)n * (size_t)(n + 1) / 2;   /* monomials, degree <= 2 */
  /* as mjet_scratch_len(ly, t, 2) */
  size_t scratch = 8 * 3 + 2 * len + t->n + t->nout + t->nparams + t->n / 16 + 1;
  return align16(lyb) + align16(t->n * len * sizeof(cplx)) + scratch * sizeof(cplx);
}

void mproblem_init(mproblem *p, const tape *t, const cplx *params, const int *varslot, int n,
                   void *mem) {
  char *m = mem;
  size_t lyb = mlayout_bytes(n, 2);
  mlayout_init(&p->ly, n, 2, m);
  m += align16(lyb);
  p->work = (cplx *)m;
  m += align16(t->n * p->ly.N * sizeof(cplx));
  p->scratch = (cplx *)m;
  p->t = t;
  p->params = params;
  p->varslot = varslot;
  p->n = n;
  p->evals = 0;
}

int mproblem_derivs(mproblem *p, const cplx *x, cplx *F, cplx *grad, cplx *hess) {
  long bad = 0;
  size_t out = (size_t)p->t->out[0];
  p->evals++;
  int st = mjet_tape(&p->ly, p->t, p->params, p->varslot, x, NULL, 2, out, p->work,
                     p->scratch, &bad);
  if (st != STEEP_OK) return st;
  const cplx *c = p->work + out * p->ly.N;
  const mlayout *ly = &p->ly;
  *F = c[0];
  for (int k = 0; k < p->n; k++) {
    if (grad) grad[k] = c[ly->rank[ly->pow[k]]];
    if (hess)
      for (int l = 0; l < p->n; l++)
        hess[k * p->n + l] = c[ly->rank[ly->pow[k] + ly->pow[l]]] * (k == l ? 2.0 : 1.0);
  }
  return STEEP_OK;
}

int mcrit_solve(int n, cplx *A, cplx *b, double *rcond) {
  double pmax = 0, pmin = INFINITY;
  for (int c = 0; c < n; c++) {
    int piv = c;
    for (int r = c + 1; r < n; r++) if (cabs(A[r * n + c]) > cabs(A[piv * n + c])) piv = r;
    double pm = cabs(A[piv * n + c]);
    if (!(pm > 0) || !isfinite(pm)) { if (rcond) *rcond = 0; return STEEP_SINGULAR; }
    if (pm > pmax) pmax = pm;
    if (pm < pmin) pmin = pm;
    if (piv != c) {
      for (int k = 0; k < n; k++) { cplx t = A[c * n + k]; A[c * n + k] = A[piv * n + k]; A[piv * n + k] = t; }
      cplx t = b[c]; b[c] = b[piv]; b[piv] = t;
    }
    for (int r = c + 1; r < n; r++) {
      cplx f = A[r * n + c] / A[c * n + c];
      if (f == 0) continue;
      for (int k = c; k < n; k++) A[r * n + k] -= f * A[c * n + k];
      b[r] -= f * b[c];
    }
  }
  for (int c = n - 1; c >= 0; c--) {
    cplx s = b[c];
    for (int k = c + 1; k < n; k++) s -= A[c * n + k] * b[k];
    b[c] = s / A[c * n + c];
  }
  if (rcond) *rcond = pmin / pmax;
  return STEEP_OK;
}

static double norm(int n, const cplx *x) {
  double s = 0;
  for (int k = 0; k < n; k++) s += creal(x[k]) * creal(x[k]) + cimag(x[k]) * cimag(x[k]);
  return sqrt(s);
}

static int finite_vec(int n, const cplx *x) {
  for (int k = 0; k < n; k++) if (!isfinite(creal(x[k])) || !isfinite(cimag(x[k]))) return 0;
  return 1;
}

/* The derivative of log m along d, m(x) = prod_r (|x - r|^-2 + 1): the deflation term. */
static double dlog_deflation(int n, const cplx *x, const cplx *known, int nknown,
                             const cplx *d) {
  double s = 0;
  for (int r = 0; r < nknown; r++) {
    const cplx *kr = known + (size_t)r * (size_t)n;
    double q = 0, re = 0;
    for (int k = 0; k < n; k++) {
      cplx e = x[k] - kr[k];
      q += creal(e) * creal(e) + cimag(e) * cimag(e);
      re += creal(conj(e) * d[k]);
    }
    if (q == 0) continue;
    s += (-2.0 * re / (q * q)) / (1.0 / q + 1.0);
  }
  return s;
}

int mcrit_newton(mproblem *p, const cplx *x0, const cplx *known, int nknown, double maxstep,
                 double tol, int maxit, cplx *x, int *iters) {
  int n = p->n;
  cplx g[NMAX], H[NMAX * NMAX], F;
  memcpy(x, x0, (size_t)n * sizeof *x);
  for (int it = 1; it <= maxit; it++) {
    *iters = it;
    int st = mproblem_derivs(p, x, &F, g, H);
    if (st != STEEP_OK) return MCRIT_NONFINITE;
    int zero = 1;
    for (int k = 0; k < n; k++) if (g[k] != 0) zero = 0;
    if (zero) return MCRIT_OK;
    for (int k = 0; k < n; k++) g[k] = -g[k];
    if (mcrit_solve(n, H, g, NULL) != STEEP_OK) return MCRIT_SINGULAR;
    double plain = norm(n, g);
    if (plain <= tol * (1 + norm(n, x))) {
      for (int k = 0; k < n; k++) x[k] += g[k];
      return finite_vec(n, x) ? MCRIT_OK : MCRIT_NONFINITE;
    }
    double tau = 1;
    if (nknown > 0) {
      double den = 1 - dlog_deflation(n, x, known, nknown, g);
      if (den != 0 && isfinite(den)) tau = 1 / den;
    }
    double len = fabs(tau) * plain;
    if (len > maxstep) tau *= maxstep / len;
    for (int k = 0; k < n; k++) x[k] += tau * g[k];
    if (!finite_vec(n, x)) return MCRIT_NONFINITE;
  }
  return MCRIT_NOCONV;
}

/* H, and the Jacobian Hx, of the homotopy at (x, t); Ht into ht when not NULL. */
static int homotopy(mproblem *p, const int *degs, cplx gamma, const cplx *x, double t,
                    cplx *h, cplx *Hx, cplx *ht) {
  int n = p->n;
  cplx F, g[NMAX];
  int st = mproblem_derivs(p, x, &F, g, Hx);
  if (st != STEEP_OK) return st;
  for (int k = 0; k < n; k++) {
    cplx xd1 = 1;
    for (int e = 1; e < degs[k]; e++) xd1 *= x[k];
    cplx G = xd1 * x[k] - 1.0;
    h[k] = (1 - t) * gamma * G + t * g[k];
    if (ht) ht[k] = g[k] - gamma * G;
    for (int l = 0; l < n; l++) Hx[k * n + l] *= t;
    Hx[k * n + k] += (1 - t) * gamma * (double)degs[k] * xd1;
  }
  return STEEP_OK;
}

/* dx/dt = -Hx^{-1} Ht at (x, t) into v. */
static int velocity(mproblem *p, const int *degs, cplx gamma, const cplx *x, double t, cplx *v) {
  cplx h[NMAX], Hx[NMAX * NMAX];
  if (homotopy(p, degs, gamma, x, t, h, Hx, v) != STEEP_OK) return STEEP_NONFINITE;
  for (int k = 0; k < p->n; k++) v[k] = -v[k];
  return mcrit_solve(p->n, Hx, v, NULL);
}

/* Newton on H(., t) from x (in place): at most 3 steps; 1 when converged to tol with a
 * first step no larger than `first`. */
static int correct(mproblem *p, const int *degs, cplx gamma, cplx *x, double t, double tol,
                   double first) {
  int n = p->n;
  cplx h[NMAX], Hx[NMAX * NMAX];
  for (int it = 0; it < 3; it++) {
    if (homotopy(p, degs, gamma, x, t, h, Hx, NULL) != STEEP_OK) return 0;
    for (int k = 0; k < n; k++) h[k] = -h[k];
    if (mcrit_solve(n, Hx, h, NULL) != STEEP_OK) return 0;
    double d = norm(n, h), sx = 1 + norm(n, x);
    if (it == 0 && d > first * sx) return 0;
    for (int k = 0; k < n; k++) x[k] += h[k];
    if (!finite_vec(n, x)) return 0;
    if (d <= tol * sx) return 1;
  }
  return 0;
}

int mcrit_track(mproblem *p, const int *degs, cplx gamma, const cplx *start, double diverge,
                int maxsteps, cplx *end, double *rcond, int *steps) {
  int n = p->n;
  cplx x[NMAX], y[NMAX], k1[NMAX], k2[NMAX], k3[NMAX], k4[NMAX];
  memcpy(x, start, (size_t)n * sizeof *x);
  double t = 0, h = 0.02;
  int good = 0;
  *rcond = 0;
  for (*steps = 0; t < 1 && *steps < maxsteps; (*steps)++) {
    if (h > 1 - t) h = 1 - t;
    int ok = velocity(p, degs, gamma, x, t, k1) == STEEP_OK;
    for (int k = 0; ok && k < n; k++) y[k] = x[k] + 0.5 * h * k1[k];
    ok = ok && velocity(p, degs, gamma, y, t + 0.5 * h, k2) == STEEP_OK;
    for (int k = 0; ok && k < n; k++) y[k] = x[k] + 0.5 * h * k2[k];
    ok = ok && velocity(p, degs, gamma, y, t + 0.5 * h, k3) == STEEP_OK;
    for (int k = 0; ok && k < n; k++) y[k] = x[k] + h * k3[k];
    ok = ok && velocity(p, degs, gamma, y, t + h, k4) == STEEP_OK;
    for (int k = 0; ok && k < n; k++) y[k] = x[k] + h / 6 * (k1[k] + 2 * k2[k] + 2 * k3[k] + k4[k]);
    ok = ok && correct(p, degs, gamma, y, t + h, 1e-10, 1e-3);
    if (!ok) {
      h *= 0.5;
      good = 0;
      if (h < 1e-14) {
        memcpy(end, x, (size_t)n * sizeof *x);
        /* a path heading for a solution at infinity grows like (1 - t)^(-1/m): its steps
         * collapse before |x| reaches `diverge` */
        return norm(n, x) > 1e-4 * diverge ? MCRIT_DIVERGED : MCRIT_FAILED;
      }
      continue;
    }
    memcpy(x, y, (size_t)n * sizeof *x);
    t += h;
    if (norm(n, x) > diverge || (t > 0.9 && norm(n, x) > 1e-4 * diverge)) {
      memcpy(end, x, (size_t)n * sizeof *x);
      return MCRIT_DIVERGED;
    }
    if (++good >= 3) { h = fmin(2 * h, 0.1); good = 0; }
  }
  if (t < 1) {
    memcpy(end, x, (size_t)n * sizeof *x);
    return norm(n, x) > 1e-4 * diverge ? MCRIT_DIVERGED : MCRIT_FAILED;
  }
  /* polish at t = 1 and judge the end by the Hessian there */
  int it;
  int st = mcrit_newton(p, x, NULL, 0, INFINITY, 1e-14, 30, end, &it);
  cplx F, g[NMAX], H[NMAX * NMAX];
  if (mproblem_derivs(p, end, &F, g, H) != STEEP_OK) return MCRIT_NONFINITE;
  if (mcrit_solve(n, H, g, rcond) != STEEP_OK || *rcond < 1e-10) return MCRIT_SINGULAR;
  return st;
}
