/*
 * steep.h — limits, names and status codes shared by every C file of steep.core.
 *
 * Nothing here holds state: the module keeps no mutable static data, so several
 * lua_States in several threads may load it at once.
 */
#ifndef STEEP_H
#define STEEP_H

#include <complex.h>

typedef double complex cplx;

/* Largest truncation order of a jet or series (coefficients c_0 .. c_N). */
#define STEEP_MAX_ORDER 256

/* Largest tape (instructions) and largest number of named parameters. */
#define STEEP_MAX_TAPE   100000
#define STEEP_MAX_PARAMS 256

/* Largest list or vector of points (2^24, 256 MiB of complex values) and largest block
 * of scratch memory a binding asks for (1 GiB). Guards against absurd or lying sizes (a
 * table whose __len returns 2^60): every count is checked against them before it is
 * multiplied into a size, so no size can wrap round. */
#define STEEP_MAX_POINTS  ((size_t)1 << 24)
#define STEEP_MAX_SCRATCH ((size_t)1 << 30)

/* Statuses returned by numerical kernels (misuse is reported by the binding as a
 * Lua error before a kernel is called; a kernel that falls short says why). */
enum steep_status {
  STEEP_OK = 0,
  STEEP_SINGULAR,   /* division by a series/value with zero leading term, log(0), ... */
  STEEP_BRANCH,     /* non-integer power or sqrt of a series whose constant term is 0 */
  STEEP_NONFINITE   /* a NaN or infinity appeared */
};

/* Registry keys (addresses of these strings are unique per process and immutable). */
#define STEEP_COMPLEX_MT "steep.complex"   /* metatable of Lua-side complex values */
#define STEEP_SERIES_MT  "steep.series"
#define STEEP_TAPE_MT    "steep.tape"
#define STEEP_CVEC_MT    "steep.cvec"

#endif
