/*
 * clog.h — the principal complex logarithm, inline. The C library's clog takes a slow
 * path where |z| is near 1 (to get log|z| to full relative accuracy it forms x^2 + y^2 - 1
 * exactly, sorting partial products), and the landscape's circles sample there all the
 * time (log(1 + z) and log z on circles about the origin). Here log|z| is log1p of
 * (|z| - 1)(|z| + 1)-style sums near 1 and log of the sum of squares elsewhere: an
 * absolute error of a few units of 2^-53 in Re log z, which is what exp(F) and every use
 * of F see (a relative error of e^F equal to the absolute error of F). arg z is atan2,
 * exactly as the library's. Zero gives -infinity; infinities and NaNs follow hypot and
 * atan2 (a NaN part may make both parts NaN).
 */
#ifndef STEEP_CLOG_H
#define STEEP_CLOG_H

#include <math.h>
#include "steep.h"

static inline cplx steep_clog(cplx z) {
  double x = creal(z), y = cimag(z), ax = fabs(x), ay = fabs(y);
  double big = ax > ay ? ax : ay, small = ax > ay ? ay : ax, re;
  if (big > 0x1p-500 && big < 0x1p500) {
    double r2 = big * big + small * small;
    /* near |z| = 1: big^2 - 1 as (big - 1)(big + 1), exact factors there (Sterbenz) */
    if (r2 > 0.5 && r2 < 2) re = 0.5 * log1p((big - 1) * (big + 1) + small * small);
    else re = 0.5 * log(r2);
  } else {
    re = log(hypot(x, y));
  }
  cplx w;   /* set by parts (C99 6.2.5: a complex is an array of its two parts) */
  ((double *)&w)[0] = re;
  ((double *)&w)[1] = atan2(y, x);
  return w;
}

#endif
