/*
 * fuzz.h — reading a libFuzzer input as a stream of small decisions, shared by the
 * harnesses in tests/fuzz/ (make fuzz). Past the end of the input every read yields 0,
 * so any byte string is a valid input. Sizes drawn here are bounded by the caller.
 */
#ifndef STEEP_FUZZ_H
#define STEEP_FUZZ_H

#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include "steep.h"

typedef struct { const uint8_t *p; size_t n; } fz;

static inline uint8_t fz_u8(fz *f) {
  if (f->n == 0) return 0;
  f->n--;
  return *f->p++;
}

static inline uint16_t fz_u16(fz *f) {
  uint16_t lo = fz_u8(f);
  return (uint16_t)(lo | (fz_u8(f) << 8));
}

static inline uint64_t fz_u64(fz *f) {
  uint64_t v = 0;
  for (int i = 0; i < 8; i++) v |= (uint64_t)fz_u8(f) << (8 * i);
  return v;
}

/* 0..n-1 (n >= 1) */
static inline size_t fz_below(fz *f, size_t n) { return (size_t)fz_u16(f) % n; }

/* A real number: mostly moderate, sometimes zero, huge, tiny or subnormal, and (when
 * `raw` is set) any bit pattern, NaN and infinities included. */
static inline double fz_real(fz *f, int raw) {
  uint8_t k = fz_u8(f);
  switch (k % 8) {
    case 0: return 0;
    case 1: return (double)(int8_t)fz_u8(f);
    case 2: return (int16_t)fz_u16(f) / 256.0;
    case 3: {   /* any finite magnitude: mantissa * 2^e, e in [-1100, 1000] */
      double m = (int16_t)fz_u16(f) / 32768.0;
      int e = (int)(fz_u16(f) % 2101) - 1100;
      return ldexp(m, e);
    }
    case 4:
      if (raw) {
        uint64_t bits = fz_u64(f);
        double d;
        memcpy(&d, &bits, sizeof d);
        return d;
      }
      return (k & 0x80) ? 1e300 : -1e-300;
    default: return (int16_t)fz_u16(f) / 4096.0;
  }
}

/* re + i im without arithmetic (CMPLX is C11; re + im*I turns inf into NaN): C99
 * lays a complex out as an array of its two parts. */
static inline cplx fz_make(double re, double im) {
  cplx z;
  ((double *)&z)[0] = re;
  ((double *)&z)[1] = im;
  return z;
}

static inline cplx fz_cplx(fz *f, int raw) {
  double re = fz_real(f, raw);
  double im = (fz_u8(f) & 3) == 0 ? 0 : fz_real(f, raw);   /* real values are common */
  return fz_make(re, im);
}

/* A moderate complex number with |re|, |im| <= lim. */
static inline cplx fz_near(fz *f, double lim) {
  double re = ((int16_t)fz_u16(f) / 32768.0) * lim;
  double im = ((int16_t)fz_u16(f) / 32768.0) * lim;
  return fz_make(re, im);
}

/* Allocations are exact in size, so AddressSanitizer sees any access past them.
 * malloc(0) may return NULL; ask for at least one element. */
static inline void *fz_alloc(size_t count, size_t size) {
  void *p = calloc(count ? count : 1, size);
  if (!p) abort();
  return p;
}

#endif
