/*
 * tape.c — checking and evaluating tapes; contracts in tape.h.
 */
#include <limits.h>
#include <math.h>
#include <string.h>
#include "tape.h"
#include "clog.h"
#include "series.h"
#include "cdiv.h"

static const struct { const char *name; int arity; } op_info[OP_COUNT] = {
  [OP_CONST] = {"const", 0}, [OP_VAR] = {"var", 0},   [OP_PARAM] = {"param", 0},
  [OP_ADD] = {"add", 2},     [OP_SUB] = {"sub", 2},   [OP_MUL] = {"mul", 2},
  [OP_DIV] = {"div", 2},     [OP_NEG] = {"neg", 1},   [OP_POWI] = {"powi", 1},
  [OP_POWC] = {"powc", 1},   [OP_EXP] = {"exp", 1},   [OP_LOG] = {"log", 1},
  [OP_SQRT] = {"sqrt", 1},   [OP_SIN] = {"sin", 1},   [OP_COS] = {"cos", 1},
  [OP_TAN] = {"tan", 1},     [OP_SINH] = {"sinh", 1}, [OP_COSH] = {"cosh", 1},
  [OP_TANH] = {"tanh", 1},   [OP_ATAN] = {"atan", 1},
};

int tape_arity(int op) { return op >= 0 && op < OP_COUNT ? op_info[op].arity : -1; }

const char *tape_op_name(int op) { return op >= 0 && op < OP_COUNT ? op_info[op].name : "?"; }

int tape_op_lookup(const char *name) {
  for (int op = 0; op < OP_COUNT; op++)
    if (strcmp(op_info[op].name, name) == 0) return op;
  return -1;
}

long tape_check(tape *t, const char **why) {
  for (size_t j = 0; j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    int ar = tape_arity(in->op);
    if (ar < 0) { *why = "unknown operation"; return (long)j; }
    if ((ar >= 1 && (in->a < 0 || (size_t)in->a >= j)) ||
        (ar == 2 && (in->b < 0 || (size_t)in->b >= j))) {
      *why = "operand is not an earlier slot";
      return (long)j;
    }
    /* the evaluators read any operand >= 0, so unused ones must be -1 */
    if ((ar < 1 && in->a != -1) || (ar < 2 && in->b != -1)) {
      *why = "unused operand is not -1";
      return (long)j;
    }
    if (in->op == OP_PARAM && (in->k < 0 || (size_t)in->k >= t->nparams)) {
      *why = "parameter index out of range";
      return (long)j;
    }
    switch (ar) {
      case 0: t->varying[j] = in->op == OP_VAR; break;
      case 1: t->varying[j] = t->varying[in->a]; break;
      default: t->varying[j] = t->varying[in->a] | t->varying[in->b]; break;
    }
  }
  if (t->nout == 0) { *why = "no output"; return (long)t->n; }
  for (size_t o = 0; o < t->nout; o++)
    if (t->out[o] < 0 || (size_t)t->out[o] >= t->n) {
      *why = "output is not a slot";
      return (long)t->n;
    }
  return -1;
}

/* z^m for an integer m by binary powering (exact for small integers). */
static cplx powi(cplx z, long m) {
  unsigned long e = m < 0 ? 0UL - (unsigned long)m : (unsigned long)m;
  cplx r = 1;
  while (e) {
    if (e & 1UL) r *= z;
    e >>= 1;
    if (e) z *= z;
  }
  return m < 0 ? cdiv(1.0, r) : r;
}

/* Principal-branch power with an exactly real result for a real base > 0 and real
 * exponent (cexp(c*log(a)) leaves a rounding-level imaginary part otherwise). */
static cplx powc(cplx a, cplx c) {
  if (cimag(a) == 0 && creal(a) > 0 && cimag(c) == 0) return pow(creal(a), creal(c));
  if (a == 0) return creal(c) > 0 ? 0 : (cplx)NAN;
  return cexp(c * steep_clog(a));
}

static cplx apply1(const tape_ins *in, cplx a, cplx b, cplx x, const cplx *params) {
  switch (in->op) {
    case OP_CONST: return in->c;
    case OP_VAR:   return x;
    case OP_PARAM: return params[in->k];
    case OP_ADD:   return a + b;
    case OP_SUB:   return a - b;
    case OP_MUL:   return a * b;
    case OP_DIV:   return cdiv(a, b);
    case OP_NEG:   return -a;
    case OP_POWI:  return powi(a, in->k);
    case OP_POWC:  return powc(a, in->c);
    case OP_EXP:   return cexp(a);
    case OP_LOG:   return steep_clog(a);
    case OP_SQRT:  return csqrt(a);
    case OP_SIN:   return csin(a);
    case OP_COS:   return ccos(a);
    case OP_TAN:   return ctan(a);
    case OP_SINH:  return csinh(a);
    case OP_COSH:  return ccosh(a);
    case OP_TANH:  return ctanh(a);
    case OP_ATAN:  return catan(a);
    default:       return NAN;
  }
}

void tape_eval(const tape *t, cplx x, const cplx *params, cplx *out, cplx *work) {
  for (size_t j = 0; j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    cplx a = in->a >= 0 ? work[in->a] : 0, b = in->b >= 0 ? work[in->b] : 0;
    work[j] = apply1(in, a, b, x, params);
  }
  for (size_t o = 0; o < t->nout; o++) out[o] = work[t->out[o]];
}

/* The rounding bound of one instruction's value v from its operands' values and bounds
 * (ea, eb). u is the unit roundoff; a complex product is within 2 sqrt(2) u of the exact
 * one, relatively (the classical bound, Higham sec. 3.6; Brent, Percival & Zimmermann,
 * Math. Comp. 76 (2007) 1469-1481, sharpen it to sqrt(5) u), a quotient within a few u,
 * and the library's elementary functions within a couple of ulps (common practice), their
 * arguments' own errors carried by the derivative. */
static double rounding1(const tape_ins *in, cplx a, double ea, cplx b, double eb, cplx v) {
  const double u = 1.1102230246251565e-16, mul = 2.8284271247461903 * u;
  double av = cabs(v), aa = cabs(a), ab = cabs(b);
  switch (in->op) {
    case OP_CONST: return u * av;
    case OP_VAR:
    case OP_PARAM: return 0;
    case OP_ADD:
    case OP_SUB:   return ea + eb + u * av;
    case OP_MUL:   return ab * ea + aa * eb + ea * eb + mul * av;
    case OP_DIV:   return ab > eb ? (ea + av * eb) / (ab - eb) + 4 * u * av : INFINITY;
    case OP_NEG:   return ea;
    case OP_POWI: {
      /* k a^(k-1) ea, and one product's rounding per squaring or multiplication of the
       * binary powering (at most 2 log2 k of them) */
      double k = fabs((double)in->k);
      return (aa > 0 ? k * av / aa * ea : 0) + 2 * floor(log2(k + 1)) * mul * av;
    }
    case OP_POWC:  /* exp(c log a) */
      return aa > ea ? av * (cabs(in->c) * ea / (aa - ea) + mul * (cabs(in->c * clog(a)) + 2))
                     : INFINITY;
    case OP_EXP:   return av * (ea + 2 * u);
    case OP_LOG:   return aa > ea ? ea / (aa - ea) + 2 * u * (av + 1) : INFINITY;
    case OP_SQRT:  return av > 0 ? ea / (2 * av) + 2 * u * av : sqrt(ea);
    case OP_SIN:
    case OP_COS:   return cosh(cimag(a)) * (ea + 2 * u);
    case OP_SINH:
    case OP_COSH:  return cosh(creal(a)) * (ea + 2 * u);
    case OP_TAN:
    case OP_TANH:  return (1 + av * av) * ea + 2 * u * (av + 1);
    case OP_ATAN:  {
      double d = cabs(1 + a * a);
      return d > 0 ? ea / d + 2 * u * (av + 1) : INFINITY;
    }
    default:       return INFINITY;
  }
}

void tape_eval_rounding(const tape *t, cplx x, const cplx *params, cplx *out, double *err,
                        cplx *work, double *ework) {
  for (size_t j = 0; j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    cplx a = in->a >= 0 ? work[in->a] : 0, b = in->b >= 0 ? work[in->b] : 0;
    double ea = in->a >= 0 ? ework[in->a] : 0, eb = in->b >= 0 ? ework[in->b] : 0;
    work[j] = apply1(in, a, b, x, params);
    ework[j] = rounding1(in, a, ea, b, eb, work[j]);
  }
  for (size_t o = 0; o < t->nout; o++) {
    out[o] = work[t->out[o]];
    err[o] = ework[t->out[o]];
  }
}

/* One instruction over a block of m <= TAPE_BLOCK points. The switch sits outside the
 * loop over points so the compiler can keep the loops tight. */
static void apply_block(const tape_ins *in, cplx *w, const cplx *a, const cplx *b,
                        const cplx *xs, size_t m, const cplx *params) {
  size_t i;
  switch (in->op) {
    case OP_CONST: for (i = 0; i < m; i++) w[i] = in->c; break;
    case OP_VAR:   for (i = 0; i < m; i++) w[i] = xs[i]; break;
    case OP_PARAM: for (i = 0; i < m; i++) w[i] = params[in->k]; break;
    case OP_ADD:   for (i = 0; i < m; i++) w[i] = a[i] + b[i]; break;
    case OP_SUB:   for (i = 0; i < m; i++) w[i] = a[i] - b[i]; break;
    case OP_MUL:   for (i = 0; i < m; i++) w[i] = a[i] * b[i]; break;
    case OP_DIV:   for (i = 0; i < m; i++) w[i] = cdiv(a[i], b[i]); break;
    case OP_NEG:   for (i = 0; i < m; i++) w[i] = -a[i]; break;
    case OP_POWI:
      if (in->k == 2) for (i = 0; i < m; i++) w[i] = a[i] * a[i];
      else if (in->k == 3) for (i = 0; i < m; i++) w[i] = a[i] * a[i] * a[i];
      else for (i = 0; i < m; i++) w[i] = powi(a[i], in->k);
      break;
    case OP_EXP:   for (i = 0; i < m; i++) w[i] = cexp(a[i]); break;
    case OP_LOG:   for (i = 0; i < m; i++) w[i] = steep_clog(a[i]); break;
    case OP_SQRT:  for (i = 0; i < m; i++) w[i] = csqrt(a[i]); break;
    default:       for (i = 0; i < m; i++) w[i] = apply1(in, a[i], b ? b[i] : 0, xs[i], params);
  }
}

void tape_eval_batch(const tape *t, const cplx *xs, size_t m, const cplx *params,
                     cplx *out, cplx *work) {
  for (size_t start = 0; start < m; start += TAPE_BLOCK) {
    size_t len = m - start < TAPE_BLOCK ? m - start : TAPE_BLOCK;
    for (size_t j = 0; j < t->n; j++) {
      const tape_ins *in = &t->ins[j];
      /* slots that do not depend on the variable keep their value from the first block */
      if (start > 0 && !t->varying[j]) continue;
      const cplx *a = in->a >= 0 ? work + (size_t)in->a * TAPE_BLOCK : NULL;
      const cplx *b = in->b >= 0 ? work + (size_t)in->b * TAPE_BLOCK : NULL;
      apply_block(in, work + j * TAPE_BLOCK, a, b, xs + start, len, params);
    }
    for (size_t o = 0; o < t->nout; o++)
      memcpy(out + o * m + start, work + (size_t)t->out[o] * TAPE_BLOCK, len * sizeof *out);
  }
}

/* Jet of one varying instruction. Operands that do not depend on the variable are
 * constants (only coefficient 0 is non-zero), which turns products into scalings. */
static int jet1(const tape *t, size_t j, cplx *w, const cplx *a, const cplx *b, size_t n,
                cplx x, cplx *scratch) {
  const tape_ins *in = &t->ins[j];
  int ca = in->a >= 0 && !t->varying[in->a], cb = in->b >= 0 && !t->varying[in->b];
  size_t k;
  switch (in->op) {
    case OP_VAR: memset(w, 0, n * sizeof *w); w[0] = x; if (n > 1) w[1] = 1; return STEEP_OK;
    case OP_ADD:
    case OP_SUB: {
      double sg = in->op == OP_ADD ? 1.0 : -1.0;
      if (ca) { for (k = 0; k < n; k++) w[k] = sg * b[k]; w[0] += a[0]; }
      else if (cb) { memcpy(w, a, n * sizeof *w); w[0] += sg * b[0]; }
      else for (k = 0; k < n; k++) w[k] = a[k] + sg * b[k];
      return STEEP_OK;
    }
    case OP_MUL:
      if (ca) for (k = 0; k < n; k++) w[k] = a[0] * b[k];
      else if (cb) for (k = 0; k < n; k++) w[k] = a[k] * b[0];
      else ser_mul(w, a, b, n);
      return STEEP_OK;
    case OP_DIV:
      if (cb) {
        if (b[0] == 0) return STEEP_SINGULAR;
        for (k = 0; k < n; k++) w[k] = a[k] / b[0];
        return STEEP_OK;
      }
      if (ca) {   /* a / b with constant a: a * (1/b) */
        memset(scratch, 0, n * sizeof *scratch);
        scratch[0] = a[0];
        return ser_div(w, scratch, b, n);
      }
      return ser_div(w, a, b, n);
    case OP_NEG: for (k = 0; k < n; k++) w[k] = -a[k]; return STEEP_OK;
    case OP_POWI:
      if (in->k == 2) { ser_mul(w, a, a, n); return STEEP_OK; }
      return ser_powi(w, a, in->k, n, scratch);
    case OP_POWC: return ser_pow(w, a, in->c, n);
    case OP_EXP: ser_exp(w, a, n); return STEEP_OK;
    case OP_LOG: return ser_log(w, a, n);
    case OP_SQRT: return ser_sqrt(w, a, n);
    case OP_SIN: ser_sincos(w, scratch, a, n); return STEEP_OK;
    case OP_COS: ser_sincos(scratch, w, a, n); return STEEP_OK;
    case OP_SINH: ser_sinhcosh(w, scratch, a, n); return STEEP_OK;
    case OP_COSH: ser_sinhcosh(scratch, w, a, n); return STEEP_OK;
    case OP_TAN: return ser_tan(w, a, n, scratch);
    case OP_TANH: return ser_tanh(w, a, n, scratch);
    case OP_ATAN: return ser_atan(w, a, n, scratch);
    default: return STEEP_NONFINITE;
  }
}

int tape_jet(const tape *t, cplx x, const cplx *params, size_t order, cplx *work,
             cplx *scratch, long *bad) {
  return tape_jet_upto(t, x, params, order, work, scratch, bad, t->n - 1);
}

int tape_jet_upto(const tape *t, cplx x, const cplx *params, size_t order, cplx *work,
                  cplx *scratch, long *bad, size_t upto) {
  size_t n = order + 1;
  for (size_t j = 0; j <= upto && j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    cplx *w = work + j * n;
    const cplx *a = in->a >= 0 ? work + (size_t)in->a * n : NULL;
    const cplx *b = in->b >= 0 ? work + (size_t)in->b * n : NULL;
    int st = STEEP_OK;
    if (!t->varying[j]) {
      memset(w, 0, n * sizeof *w);
      w[0] = apply1(in, a ? a[0] : 0, b ? b[0] : 0, x, params);
      if (!isfinite(creal(w[0])) || !isfinite(cimag(w[0]))) st = STEEP_NONFINITE;
    } else {
      st = jet1(t, j, w, a, b, n, x, scratch);
      if (st == STEEP_OK && !ser_isfinite(w, n)) st = STEEP_NONFINITE;
    }
    if (st != STEEP_OK) { *bad = (long)j; return st; }
  }
  return STEEP_OK;
}

static int finite2(cplx a, cplx b) {
  return isfinite(creal(a)) && isfinite(cimag(a)) && isfinite(creal(b)) && isfinite(cimag(b));
}

/* Value and derivative of one varying instruction from its operands' (a, da), (b, db). */
static int dual1(const tape_ins *in, cplx a, cplx da, cplx b, cplx db, cplx x, cplx *v,
                 cplx *d) {
  switch (in->op) {
    case OP_VAR: *v = x; *d = 1; return STEEP_OK;
    case OP_ADD: *v = a + b; *d = da + db; return STEEP_OK;
    case OP_SUB: *v = a - b; *d = da - db; return STEEP_OK;
    case OP_MUL: *v = a * b; *d = da * b + a * db; return STEEP_OK;
    case OP_DIV:
      if (b == 0) return STEEP_SINGULAR;
      *v = cdiv(a, b);
      *d = cdiv(da - *v * db, b);
      return STEEP_OK;
    case OP_NEG: *v = -a; *d = -da; return STEEP_OK;
    case OP_POWI:
      if (in->k < 0 && a == 0) return STEEP_SINGULAR;
      *v = powi(a, in->k);
      /* k a^(k-1) da; for the least long (k - 1 would overflow) as k a^k / a */
      if (in->k == 0) *d = 0;
      else if (in->k != LONG_MIN) *d = (double)in->k * powi(a, in->k - 1) * da;
      else *d = (double)in->k * cdiv(*v, a) * da;
      return STEEP_OK;
    case OP_POWC:
      if (a == 0) return STEEP_BRANCH;
      *v = cexp(in->c * steep_clog(a));   /* as ser_pow, so values match the jets' */
      *d = cdiv(in->c * *v, a) * da;
      return STEEP_OK;
    case OP_EXP: *v = cexp(a); *d = *v * da; return STEEP_OK;
    case OP_LOG:
      if (a == 0) return STEEP_SINGULAR;
      *v = steep_clog(a);
      *d = cdiv(da, a);
      return STEEP_OK;
    case OP_SQRT:
      if (a == 0) return STEEP_BRANCH;
      *v = csqrt(a);
      *d = cdiv(0.5 * da, *v);
      return STEEP_OK;
    case OP_SIN: *v = csin(a); *d = ccos(a) * da; return STEEP_OK;
    case OP_COS: *v = ccos(a); *d = -csin(a) * da; return STEEP_OK;
    case OP_SINH: *v = csinh(a); *d = ccosh(a) * da; return STEEP_OK;
    case OP_COSH: *v = ccosh(a); *d = csinh(a) * da; return STEEP_OK;
    case OP_TAN:
      if (ccos(a) == 0) return STEEP_SINGULAR;
      *v = ctan(a);
      *d = (1.0 + *v * *v) * da;
      return STEEP_OK;
    case OP_TANH:
      if (ccosh(a) == 0) return STEEP_SINGULAR;
      *v = ctanh(a);
      *d = (1.0 - *v * *v) * da;
      return STEEP_OK;
    case OP_ATAN:
      if (1.0 + a * a == 0) return STEEP_SINGULAR;
      *v = catan(a);
      *d = cdiv(da, 1.0 + a * a);
      return STEEP_OK;
    default: return STEEP_NONFINITE;
  }
}

int tape_dual_upto(const tape *t, cplx x, const cplx *params, cplx *v, cplx *d, long *bad,
                   size_t upto) {
  for (size_t j = 0; j <= upto && j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    cplx a = in->a >= 0 ? v[in->a] : 0, b = in->b >= 0 ? v[in->b] : 0;
    int st = STEEP_OK;
    if (!t->varying[j]) {
      v[j] = apply1(in, a, b, x, params);
      d[j] = 0;
    } else {
      cplx da = in->a >= 0 ? d[in->a] : 0, db = in->b >= 0 ? d[in->b] : 0;
      st = dual1(in, a, da, b, db, x, &v[j], &d[j]);
    }
    if (st == STEEP_OK && !finite2(v[j], d[j])) st = STEEP_NONFINITE;
    if (st != STEEP_OK) { *bad = (long)j; return st; }
  }
  return STEEP_OK;
}

cplx tape_eval_from(const tape *t, cplx x, const cplx *params, cplx *v, size_t from,
                    size_t upto) {
  for (size_t j = from; j <= upto && j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    cplx a = in->a >= 0 ? v[in->a] : 0, b = in->b >= 0 ? v[in->b] : 0;
    v[j] = apply1(in, a, b, x, params);
  }
  return v[upto];
}
