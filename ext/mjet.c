/*
 * mjet.c — polynomials in several variables truncated in total degree, and tapes
 * evaluated on them; contracts in mjet.h.
 */
#include <math.h>
#include <string.h>
#include "mjet.h"
#include "series.h"

static size_t align16(size_t s) { return (s + 15) & ~(size_t)15; }

/* base^n, or 0 when it exceeds MJET_MAX_DENSE. */
static long dense_size(int n, int base) {
  long dense = 1;
  for (int k = 0; k < n; k++) {
    if (dense > MJET_MAX_DENSE / base) return 0;
    dense *= base;
  }
  return dense;
}

static size_t count_monomials(int n, int deg) {   /* binomial(n + deg, n), n <= 4 */
  size_t c = 1;
  for (int k = 1; k <= n; k++) c = c * (size_t)(deg + k) / (size_t)k;
  return c;
}

size_t mlayout_bytes(int n, int deg) {
  if (n < 1 || n > MJET_MAX_VARS || deg < 0 || deg > STEEP_MAX_ORDER) return 0;
  long dense = dense_size(n, deg + 1);
  if (dense == 0) return 0;
  size_t N = count_monomials(n, deg);
  return align16(N * (size_t)n) + align16(N * sizeof(int)) + align16(N * sizeof(long)) +
         align16((size_t)(deg + 2) * sizeof(size_t)) + align16((size_t)dense * sizeof(int));
}

void mlayout_init(mlayout *ly, int n, int deg, void *mem) {
  char *m = mem;
  long dense = dense_size(n, deg + 1);
  size_t N = count_monomials(n, deg);
  ly->n = n;
  ly->deg = deg;
  ly->base = deg + 1;
  ly->N = N;
  ly->exps = (unsigned char *)m;
  m += align16(N * (size_t)n);
  ly->degree = (int *)m;
  m += align16(N * sizeof(int));
  ly->code = (long *)m;
  m += align16(N * sizeof(long));
  ly->upto = (size_t *)m;
  m += align16((size_t)(deg + 2) * sizeof(size_t));
  ly->rank = (int *)m;
  long p = 1;
  for (int k = 0; k < MJET_MAX_VARS; k++) {
    ly->pow[k] = k < n ? p : 0;
    if (k < n) p *= ly->base;
  }
  /* count the monomials of each degree, then place them degree by degree (codes in
   * increasing order within a degree) */
  for (int d = 0; d <= deg + 1; d++) ly->upto[d] = 0;
  for (long c = 0; c < dense; c++) {
    long r = c;
    int tot = 0;
    for (int k = 0; k < n; k++) { tot += (int)(r % ly->base); r /= ly->base; }
    if (tot <= deg) ly->upto[tot + 1]++;
  }
  for (int d = 1; d <= deg + 1; d++) ly->upto[d] += ly->upto[d - 1];
  size_t next[STEEP_MAX_ORDER + 1];
  for (int d = 0; d <= deg; d++) next[d] = ly->upto[d];
  for (long c = 0; c < dense; c++) {
    long r = c;
    int tot = 0, e[MJET_MAX_VARS];
    for (int k = 0; k < n; k++) { e[k] = (int)(r % ly->base); tot += e[k]; r /= ly->base; }
    if (tot > deg) { ly->rank[c] = -1; continue; }
    size_t i = next[tot]++;
    ly->rank[c] = (int)i;
    ly->degree[i] = tot;
    ly->code[i] = c;
    for (int k = 0; k < n; k++) ly->exps[i * (size_t)n + (size_t)k] = (unsigned char)e[k];
  }
}

void mpoly_mul(const mlayout *ly, cplx *out, const cplx *a, const cplx *b, int maxdeg) {
  size_t len = ly->upto[maxdeg + 1];
  memset(out, 0, len * sizeof *out);
  for (size_t i = 0; i < len; i++) {
    cplx ai = a[i];
    if (ai == 0) continue;
    size_t lim = ly->upto[maxdeg - ly->degree[i] + 1];
    long ci = ly->code[i];
    for (size_t j = 0; j < lim; j++) out[ly->rank[ci + ly->code[j]]] += ai * b[j];
  }
}

void mpoly_compose(const mlayout *ly, cplx *out, const cplx *a, const cplx *f, int maxdeg,
                   cplx *work) {
  size_t len = ly->upto[maxdeg + 1];
  cplx *delta = work, *tmp = work + len;
  memcpy(delta, a, len * sizeof *delta);
  delta[0] = 0;
  memset(out, 0, len * sizeof *out);
  out[0] = f[maxdeg];
  for (int k = maxdeg - 1; k >= 0; k--) {
    mpoly_mul(ly, tmp, out, delta, maxdeg);
    memcpy(out, tmp, len * sizeof *out);
    out[0] += f[k];
  }
}

size_t mjet_scratch_len(const mlayout *ly, const tape *t, int d) {
  return 8 * (size_t)(d + 1) + 2 * ly->upto[d + 1] + t->n + t->nout + t->nparams + t->n / 16 + 1;
}

static int finite_poly(const cplx *a, size_t len) {
  for (size_t i = 0; i < len; i++)
    if (!isfinite(creal(a[i])) || !isfinite(cimag(a[i]))) return 0;
  return 1;
}

/* The univariate Taylor coefficients f[0..d] at a0 of the function of instruction `in`,
 * from the series kernels applied to u = a0 + t. */
static int unary_series(const tape_ins *in, cplx a0, int d, cplx *f, cplx *f2, cplx *u,
                        cplx *ss) {
  size_t n = (size_t)d + 1;
  memset(u, 0, n * sizeof *u);
  u[0] = a0;
  if (n > 1) u[1] = 1;
  switch (in->op) {
    case OP_DIV:   /* 1/(a0 + t), the reciprocal of the divisor */
      if (a0 == 0) return STEEP_SINGULAR;
      f[0] = 1 / a0;
      for (size_t k = 1; k < n; k++) f[k] = -f[k - 1] / a0;
      return STEEP_OK;
    case OP_POWI: return ser_powi(f, u, in->k, n, ss);
    case OP_POWC: return ser_pow(f, u, in->c, n);
    case OP_EXP: ser_exp(f, u, n); return STEEP_OK;
    case OP_LOG: return ser_log(f, u, n);
    case OP_SQRT: return ser_sqrt(f, u, n);
    case OP_SIN: ser_sincos(f, f2, u, n); return STEEP_OK;
    case OP_COS: ser_sincos(f2, f, u, n); return STEEP_OK;
    case OP_SINH: ser_sinhcosh(f, f2, u, n); return STEEP_OK;
    case OP_COSH: ser_sinhcosh(f2, f, u, n); return STEEP_OK;
    case OP_TAN: return ser_tan(f, u, n, ss);
    case OP_TANH: return ser_tanh(f, u, n, ss);
    case OP_ATAN: return ser_atan(f, u, n, ss);
    default: return STEEP_NONFINITE;
  }
}

/* mjet_tape and mjet_tape_linear: the variables seeded along dir (diagonal) or lin (a
 * whole linear map; then dir is not read) */
static int tape_jets(const mlayout *ly, const tape *t, const cplx *params, const int *varslot,
                     const cplx *x0, const cplx *dir, const cplx *lin, int d, size_t upto,
                     cplx *work, cplx *scratch, long *bad) {
  size_t len = ly->upto[d + 1], n1 = (size_t)d + 1;
  cplx *f = scratch, *f2 = f + n1, *u = f2 + n1, *ss = u + n1;   /* ss: 4 n1 entries */
  cplx *cw = ss + 4 * n1;                                         /* compose: 2 len */
  cplx *vals = cw + 2 * len, *outv = vals + t->n, *pbuf = outv + t->nout;
  unsigned char *varying = (unsigned char *)(pbuf + t->nparams);
  /* scalar values of every slot at x0: the constant terms, and the whole value of the
   * slots that do not depend on the variables */
  mjet_eval(t, params, varslot, ly->n, x0, outv, vals, pbuf);
  for (size_t j = 0; j <= upto && j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    cplx *w = work + j * len;
    const cplx *a = in->a >= 0 ? work + (size_t)in->a * len : NULL;
    const cplx *b = in->b >= 0 ? work + (size_t)in->b * len : NULL;
    int var = -1;
    if (in->op == OP_PARAM)
      for (int k = 0; k < ly->n; k++) if (varslot[k] == in->k) var = k;
    int ar = tape_arity(in->op);
    int va = ar >= 1 && varying[in->a], vb = ar >= 2 && varying[in->b];
    varying[j] = (unsigned char)(var >= 0 || va || vb);
    int st = STEEP_OK;
    memset(w, 0, len * sizeof *w);
    if (!varying[j]) {
      w[0] = vals[j];
    } else if (var >= 0) {
      w[0] = x0[var];
      if (d >= 1 && lin) {
        for (int k = 0; k < ly->n; k++) w[ly->rank[ly->pow[k]]] = lin[var * ly->n + k];
      } else if (d >= 1) {
        w[ly->rank[ly->pow[var]]] = dir ? dir[var] : 1;
      }
    } else {
      switch (in->op) {
        case OP_ADD: for (size_t i = 0; i < len; i++) w[i] = a[i] + b[i]; break;
        case OP_SUB: for (size_t i = 0; i < len; i++) w[i] = a[i] - b[i]; break;
        case OP_NEG: for (size_t i = 0; i < len; i++) w[i] = -a[i]; break;
        case OP_MUL:
          if (!va) for (size_t i = 0; i < len; i++) w[i] = a[0] * b[i];
          else if (!vb) for (size_t i = 0; i < len; i++) w[i] = a[i] * b[0];
          else mpoly_mul(ly, w, a, b, d);
          break;
        case OP_DIV:
          if (!vb) {
            if (b[0] == 0) { st = STEEP_SINGULAR; break; }
            for (size_t i = 0; i < len; i++) w[i] = a[i] / b[0];
            break;
          }
          st = unary_series(in, b[0], d, f, f2, u, ss);
          if (st != STEEP_OK) break;
          if (!va) {                     /* a constant: a0 / b */
            mpoly_compose(ly, w, b, f, d, cw);
            for (size_t i = 0; i < len; i++) w[i] *= a[0];
          } else {                       /* a * (1/b), the reciprocal kept in u's place */
            mpoly_compose(ly, w, b, f, d, cw);
            memcpy(cw, w, len * sizeof *w);
            mpoly_mul(ly, w, a, cw, d);
          }
          break;
        default:   /* a square is a product; other functions compose with a - a0 */
          if (in->op == OP_POWI && in->k == 2) { mpoly_mul(ly, w, a, a, d); break; }
          st = unary_series(in, a[0], d, f, f2, u, ss);
          if (st == STEEP_OK) mpoly_compose(ly, w, a, f, d, cw);
      }
    }
    if (st == STEEP_OK && !finite_poly(w, len)) st = STEEP_NONFINITE;
    if (st != STEEP_OK) { *bad = (long)j; return st; }
  }
  return STEEP_OK;
}

void mjet_eval(const tape *t, const cplx *params, const int *varslot, int n, const cplx *x,
               cplx *out, cplx *work, cplx *pbuf) {
  if (t->nparams) memcpy(pbuf, params, t->nparams * sizeof *pbuf);
  for (int k = 0; k < n; k++) pbuf[varslot[k]] = x[k];
  tape_eval(t, 0, pbuf, out, work);
}

int mjet_tape(const mlayout *ly, const tape *t, const cplx *params, const int *varslot,
              const cplx *x0, const cplx *dir, int d, size_t upto, cplx *work,
              cplx *scratch, long *bad) {
  return tape_jets(ly, t, params, varslot, x0, dir, NULL, d, upto, work, scratch, bad);
}

int mjet_tape_linear(const mlayout *ly, const tape *t, const cplx *params, const int *varslot,
                     const cplx *x0, const cplx *lin, int d, size_t upto, cplx *work,
                     cplx *scratch, long *bad) {
  return tape_jets(ly, t, params, varslot, x0, NULL, lin, d, upto, work, scratch, bad);
}
