/*
 * cdiv.h — complex division by Smith's algorithm (Comm. ACM 5 (1962) 435), inline. The
 * C library's division (Annex G) also tries to turn some NaN results into infinities and
 * is an out-of-line call; the kernels treat any non-finite value as a failure anyway, and
 * divide at every step of their inner loops. Smith's scaling avoids overflow in |b|^2.
 * A zero divisor gives a non-finite result (NaN or infinity).
 */
#ifndef STEEP_CDIV_H
#define STEEP_CDIV_H

#include <math.h>
#include "steep.h"

static inline cplx cdiv(cplx a, cplx b) {
  double ar = creal(a), ai = cimag(a), br = creal(b), bi = cimag(b);
  if (fabs(br) >= fabs(bi)) {
    double r = bi / br, d = br + bi * r;
    return (ar + ai * r) / d + I * ((ai - ar * r) / d);
  }
  double r = br / bi, d = bi + br * r;
  return (ar * r + ai) / d + I * ((ai * r - ar) / d);
}

#endif
