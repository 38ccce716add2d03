/*
 * series.c — truncated power series kernels; contracts in series.h.
 */
#include <math.h>
#include <string.h>
#include "series.h"
#include "clog.h"

void ser_mul(cplx *out, const cplx *a, const cplx *b, size_t n) {
  for (size_t k = 0; k < n; k++) {
    cplx s = 0;
    for (size_t j = 0; j <= k; j++) s += a[j] * b[k - j];
    out[k] = s;
  }
}

int ser_div(cplx *out, const cplx *a, const cplx *b, size_t n) {
  if (n == 0) return STEEP_OK;
  if (b[0] == 0) return STEEP_SINGULAR;
  cplx inv = 1.0 / b[0];
  for (size_t k = 0; k < n; k++) {
    cplx s = a[k];
    for (size_t j = 1; j <= k; j++) s -= b[j] * out[k - j];
    out[k] = s * inv;
  }
  return STEEP_OK;
}

void ser_exp(cplx *out, const cplx *a, size_t n) {
  if (n == 0) return;
  out[0] = cexp(a[0]);
  for (size_t k = 1; k < n; k++) {
    cplx s = 0;
    for (size_t j = 1; j <= k; j++) s += (double)j * a[j] * out[k - j];
    out[k] = s / (double)k;
  }
}

int ser_log(cplx *out, const cplx *a, size_t n) {
  if (n == 0) return STEEP_OK;
  if (a[0] == 0) return STEEP_SINGULAR;
  cplx inv = 1.0 / a[0];
  out[0] = steep_clog(a[0]);
  for (size_t k = 1; k < n; k++) {
    cplx s = 0;
    for (size_t j = 1; j < k; j++) s += (double)j * out[j] * a[k - j];
    out[k] = (a[k] - s / (double)k) * inv;
  }
  return STEEP_OK;
}

/* Miller's recurrence once b[0] is set. */
static void pow_tail(cplx *out, const cplx *a, cplx p, size_t n) {
  cplx inv = 1.0 / a[0];
  for (size_t k = 1; k < n; k++) {
    cplx s = 0;
    for (size_t j = 1; j <= k; j++)
      s += ((p + 1.0) * (double)j - (double)k) * a[j] * out[k - j];
    out[k] = s * inv / (double)k;
  }
}

int ser_pow(cplx *out, const cplx *a, cplx p, size_t n) {
  if (n == 0) return STEEP_OK;
  if (a[0] == 0) return STEEP_BRANCH;
  out[0] = cexp(p * steep_clog(a[0]));
  pow_tail(out, a, p, n);
  return STEEP_OK;
}

int ser_sqrt(cplx *out, const cplx *a, size_t n) {
  if (n == 0) return STEEP_OK;
  if (a[0] == 0) return n == 1 ? (out[0] = 0, STEEP_OK) : STEEP_BRANCH;
  out[0] = csqrt(a[0]);
  pow_tail(out, a, 0.5, n);
  return STEEP_OK;
}

int ser_powi(cplx *out, const cplx *a, long m, size_t n, cplx *work) {
  if (n == 0) return STEEP_OK;
  cplx *base = work, *tmp = work + n;
  unsigned long e = m < 0 ? 0UL - (unsigned long)m : (unsigned long)m;
  if (m < 0 && a[0] == 0) return STEEP_SINGULAR;
  memcpy(base, a, n * sizeof *a);
  memset(out, 0, n * sizeof *out);
  out[0] = 1;
  while (e) {
    if (e & 1UL) { ser_mul(tmp, out, base, n); memcpy(out, tmp, n * sizeof *tmp); }
    e >>= 1;
    if (e) { ser_mul(tmp, base, base, n); memcpy(base, tmp, n * sizeof *tmp); }
  }
  if (m < 0) {
    memcpy(base, out, n * sizeof *out);
    memset(tmp, 0, n * sizeof *tmp);
    tmp[0] = 1;
    return ser_div(out, tmp, base, n);
  }
  return STEEP_OK;
}

void ser_sincos(cplx *s, cplx *c, const cplx *a, size_t n) {
  if (n == 0) return;
  s[0] = csin(a[0]);
  c[0] = ccos(a[0]);
  for (size_t k = 1; k < n; k++) {
    cplx ss = 0, cc = 0;
    for (size_t j = 1; j <= k; j++) {
      ss += (double)j * a[j] * c[k - j];
      cc -= (double)j * a[j] * s[k - j];
    }
    s[k] = ss / (double)k;
    c[k] = cc / (double)k;
  }
}

void ser_sinhcosh(cplx *s, cplx *c, const cplx *a, size_t n) {
  if (n == 0) return;
  s[0] = csinh(a[0]);
  c[0] = ccosh(a[0]);
  for (size_t k = 1; k < n; k++) {
    cplx ss = 0, cc = 0;
    for (size_t j = 1; j <= k; j++) {
      ss += (double)j * a[j] * c[k - j];
      cc += (double)j * a[j] * s[k - j];
    }
    s[k] = ss / (double)k;
    c[k] = cc / (double)k;
  }
}

/* t' = a' (1 + sign t^2): shared recurrence of tan (sign = +1) and tanh (sign = -1). */
static void tan_like(cplx *t, const cplx *a, size_t n, cplx *u, double sign) {
  u[0] = 1.0 + sign * t[0] * t[0];
  for (size_t k = 1; k < n; k++) {
    cplx s = 0;
    for (size_t j = 1; j <= k; j++) s += (double)j * a[j] * u[k - j];
    t[k] = s / (double)k;
    cplx q = 0;
    for (size_t j = 0; j <= k; j++) q += t[j] * t[k - j];
    u[k] = sign * q;
  }
}

int ser_tan(cplx *out, const cplx *a, size_t n, cplx *work) {
  if (n == 0) return STEEP_OK;
  if (ccos(a[0]) == 0) return STEEP_SINGULAR;
  out[0] = ctan(a[0]);
  tan_like(out, a, n, work, 1.0);
  return ser_isfinite(out, n) ? STEEP_OK : STEEP_SINGULAR;
}

int ser_tanh(cplx *out, const cplx *a, size_t n, cplx *work) {
  if (n == 0) return STEEP_OK;
  if (ccosh(a[0]) == 0) return STEEP_SINGULAR;
  out[0] = ctanh(a[0]);
  tan_like(out, a, n, work, -1.0);
  return ser_isfinite(out, n) ? STEEP_OK : STEEP_SINGULAR;
}

int ser_atan(cplx *out, const cplx *a, size_t n, cplx *work) {
  if (n == 0) return STEEP_OK;
  cplx *d = work, *da = work + n;
  if (1.0 + a[0] * a[0] == 0) return STEEP_SINGULAR;
  out[0] = catan(a[0]);
  if (n == 1) return STEEP_OK;
  ser_mul(d, a, a, n - 1);
  d[0] += 1.0;
  ser_deriv(da, a, n);                      /* n-1 entries */
  int st = ser_div(da, da, d, n - 1);       /* aliasing a with out is allowed */
  if (st != STEEP_OK) return st;
  for (size_t k = 1; k < n; k++) out[k] = da[k - 1] / (double)k;
  return STEEP_OK;
}

void ser_compose(cplx *out, const cplx *a, const cplx *r, size_t n, cplx *work) {
  if (n == 0) return;
  cplx *tmp = work;
  memset(out, 0, n * sizeof *out);
  /* Horner: out = (...(a_{n-1} r + a_{n-2}) r + ...) r + a_0.  Since r_0 = 0, the k-th
   * step only needs n - k coefficients; keeping all n is simpler and still O(n^3).
   * Trailing zeros of a (a constant or a polynomial amplitude) cost nothing. */
  size_t top = n;
  while (top > 1 && a[top - 1] == 0) top--;
  for (size_t k = top; k-- > 0;) {
    ser_mul(tmp, out, r, n);
    memcpy(out, tmp, n * sizeof *tmp);
    out[0] += a[k];
  }
}

void ser_revert(cplx *out, const cplx *a, size_t n, cplx *work) {
  if (n == 0) return;
  out[0] = 0;
  if (n == 1) return;
  /* P[k][j] = [w^j] h^k for the partial inverse h; P[k][m] needs only c_1..c_{m-k+1},
   * so c_m follows from a1 c_m + sum_{k>=2} a_k P[k][m] = 0 once P[2..m][m] are formed
   * (P_k = h P_{k-1}). Unlike Lagrange's formula this extracts no small coefficient from
   * large powers, so it keeps its accuracy when the inverse has a small radius. */
  cplx *P = work;                           /* row k at P + k*n, k = 1..n-1 */
  for (size_t k = 0; k < n * n; k++) P[k] = 0;
  cplx inv1 = 1.0 / a[1];
  out[1] = inv1;
  P[1 * n + 1] = inv1;
  for (size_t m = 2; m < n; m++) {
    cplx s = 0;
    for (size_t k = 2; k <= m; k++) {
      cplx q = 0;
      const cplx *prev = P + (k - 1) * n;
      for (size_t j = 1; j + (k - 1) <= m; j++) q += out[j] * prev[m - j];
      P[k * n + m] = q;
      s += a[k] * q;
    }
    out[m] = -s * inv1;
    P[1 * n + m] = out[m];
  }
}

void ser_deriv(cplx *out, const cplx *a, size_t n) {
  for (size_t k = 1; k < n; k++) out[k - 1] = (double)k * a[k];
}

void ser_integ(cplx *out, const cplx *a, size_t n) {
  for (size_t k = n; k > 0; k--) out[k] = a[k - 1] / (double)k;
  out[0] = 0;
}

int ser_isfinite(const cplx *a, size_t n) {
  for (size_t k = 0; k < n; k++)
    if (!isfinite(creal(a[k])) || !isfinite(cimag(a[k]))) return 0;
  return 1;
}
