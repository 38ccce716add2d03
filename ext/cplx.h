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

/* |z|^2 by the plain formula (may overflow to infinity: only for comparisons). */
static inline double abs2(cplx z) { return creal(z) * creal(z) + cimag(z) * cimag(z); }

#endif
