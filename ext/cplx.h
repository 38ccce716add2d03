/*
 * cplx.h — small complex helpers shared by the kernels, inline.
 */
#ifndef STEEP_CPLX_H
#define STEEP_CPLX_H

#include <math.h>
#include "steep.h"

/* |z| as lua/steep/complex.lua's hypot computes it: the plain formula where the squares
 * can neither overflow nor underflow, the library's hypot beyond. Kernels that took over a
 * Lua loop use it so that their decisions stay those of the loop; it is also faster. */
static inline double plain_abs(cplx z) {
  double re = creal(z), im = cimag(z);
  double r = sqrt(re * re + im * im);
  if (r < 1e150 && r > 1e-150) return r;
  return cabs(z);
}

/* The complex number re + i im, set by parts (C99 6.2.5: a complex is an array of its two
 * parts; CMPLX is C11, and re + I * im makes an infinite im a NaN real part). */
static inline cplx cplx_of(double re, double im) {
  cplx w;
  ((double *)&w)[0] = re;
  ((double *)&w)[1] = im;
  return w;
}

/* |z|^2 by the plain formula (may overflow to infinity: only for comparisons). */
static inline double abs2(cplx z) { return creal(z) * creal(z) + cimag(z) * cimag(z); }

#endif
