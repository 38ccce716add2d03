/*
 * fuzz_series.c — the series kernels on arbitrary coefficient arrays of length 1..64
 * (zeros, huge, tiny and subnormal values, and NaN and infinities when the first byte
 * says so), each with outputs and scratch of exactly the size series.h states. Besides
 * not crashing, the kernels must report the documented statuses: a zero constant term
 * is STEEP_SINGULAR for div, log, negative powi and STEEP_BRANCH for pow.
 */
#include "fuzz.h"
#include <limits.h>
#include "series.h"

enum { MAX_N = 64 };

static void fill(fz *f, cplx *a, size_t n, int raw) {
  for (size_t k = 0; k < n; k++) a[k] = fz_cplx(f, raw);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  fz f = {data, size};
  uint8_t flags = fz_u8(&f);
  int raw = flags & 1;
  size_t n = 1 + fz_below(&f, MAX_N);
  int kernel = fz_u8(&f) % 16;
  cplx *a = fz_alloc(n, sizeof *a), *b = fz_alloc(n, sizeof *b);
  cplx *out = fz_alloc(n + 1, sizeof *out), *out2 = fz_alloc(n, sizeof *out2);
  fill(&f, a, n, raw);
  fill(&f, b, n, raw);
  if (flags & 2) a[0] = 0;
  if (flags & 4) b[0] = 0;
  int st = STEEP_OK;
  switch (kernel) {
    case 0: ser_mul(out, a, b, n); break;
    case 1:
      st = ser_div(out, a, b, n);
      if (b[0] == 0 && st != STEEP_SINGULAR) abort();
      break;
    case 2:   /* out may alias a */
      st = ser_div(a, a, b, n);
      if (b[0] == 0 && st != STEEP_SINGULAR) abort();
      break;
    case 3: ser_exp(out, a, n); break;
    case 4:
      st = ser_log(out, a, n);
      if (a[0] == 0 && st != STEEP_SINGULAR) abort();
      break;
    case 5: {
      cplx p = fz_cplx(&f, raw);
      st = ser_pow(out, a, p, n);
      if (a[0] == 0 && st != STEEP_BRANCH) abort();
      break;
    }
    case 6:
      st = ser_sqrt(out, a, n);
      if (a[0] == 0 && n > 1 && st != STEEP_BRANCH) abort();
      break;
    case 7: {   /* bounded exponent, or the extremes of long */
      uint8_t e = fz_u8(&f);
      long m = (e & 0xf0) == 0xf0 ? ((e & 1) ? (long)(int64_t)fz_u64(&f) : LONG_MIN)
                                  : (long)(int8_t)e % 40;
      cplx *work = fz_alloc(2 * n, sizeof *work);
      st = ser_powi(out, a, m, n, work);
      if (m < 0 && a[0] == 0 && st != STEEP_SINGULAR) abort();
      free(work);
      break;
    }
    case 8: ser_sincos(out, out2, a, n); break;
    case 9: ser_sinhcosh(out, out2, a, n); break;
    case 10: {
      cplx *work = fz_alloc(n, sizeof *work);
      st = ser_tan(out, a, n, work);
      free(work);
      break;
    }
    case 11: {
      cplx *work = fz_alloc(n, sizeof *work);
      st = ser_tanh(out, a, n, work);
      free(work);
      break;
    }
    case 12: {
      cplx *work = fz_alloc(2 * n, sizeof *work);
      st = ser_atan(out, a, n, work);
      free(work);
      break;
    }
    case 13: {   /* needs r[0] = 0 (the caller checks) */
      cplx *work = fz_alloc(2 * n, sizeof *work);
      b[0] = 0;
      ser_compose(out, a, b, n, work);
      free(work);
      break;
    }
    case 14: {   /* needs a[0] = 0, a[1] != 0 (the caller checks); work n*n */
      if (n >= 2 && a[1] == 0) a[1] = 1;
      a[0] = 0;
      cplx *work = fz_alloc(n * n, sizeof *work);
      ser_revert(out, a, n, work);
      free(work);
      break;
    }
    default: {
      cplx *d = fz_alloc(n - 1, sizeof *d);
      ser_deriv(d, a, n);
      ser_integ(out, a, n);   /* n + 1 entries */
      free(d);
      break;
    }
  }
  if (st < STEEP_OK || st > STEEP_NONFINITE) abort();
  (void)ser_isfinite(out, n);
  free(a);
  free(b);
  free(out);
  free(out2);
  return 0;
}
