/*
 * bind_multi.c — Lua bindings of the several-variable kernels: jets in total degree
 * (mjet.c), critical points (mcrit.c), expansion terms (mexpand.c), and the quadrature
 * of one variable along a circular arc that the iterated quadrature needs (quad.c).
 * They only convert arguments; lua/steep/multi*.lua decides what to compute.
 *
 * The tape is compiled with every symbol a parameter; `vars` lists the parameter slots
 * (1-based, as in tape:params()) that are the integration variables, and the parameter
 * table must bind every name (the variables' entries are ignored: the point sets them).
 * Points are lists of n numbers or complex values.
 */
#include <math.h>
#include <string.h>
#include "bind.h"
#include "mcrit.h"
#include "mexpand.h"
#include "problem.h"
#include "quad.h"

/* Largest M (terms T_0..T_M) of multi_expand, and the largest number of monomial pairs it
 * multiplies: beyond that the order asked for is refused (it would run for minutes). */
#define MULTI_MAX_M 60
#define MULTI_MAX_COST 3e9

static int check_n(lua_State *L, int idx, const tape *t, int *varslot) {
  luaL_checktype(L, idx, LUA_TTABLE);
  lua_Integer n = luaL_len(L, idx);
  if (n < 1 || n > MJET_MAX_VARS)
    luaL_error(L, "multi: %d variables (1 to %d supported)", (int)n, MJET_MAX_VARS);
  for (lua_Integer k = 1; k <= n; k++) {
    lua_geti(L, idx, k);
    int ok = 0;
    lua_Integer s = lua_tointegerx(L, -1, &ok);
    lua_pop(L, 1);
    if (!ok || s < 1 || (size_t)s > t->nparams)
      luaL_error(L, "multi: variable %d is not a parameter slot of the tape", (int)k);
    varslot[k - 1] = (int)(s - 1);
    for (lua_Integer j = 1; j < k; j++)
      if (varslot[j - 1] == varslot[k - 1]) luaL_error(L, "multi: variable %d repeated", (int)k);
  }
  return (int)n;
}

/* n complex numbers from the list at idx into x (what: the argument's name). */
static void check_point(lua_State *L, int idx, int n, cplx *x, const char *what) {
  luaL_checktype(L, idx, LUA_TTABLE);
  if (luaL_len(L, idx) != n) luaL_error(L, "multi: %s must have %d coordinates", what, n);
  for (int k = 0; k < n; k++) {
    lua_geti(L, idx, k + 1);
    if (!bind_tocomplex(L, -1, &x[k])) luaL_error(L, "multi: %s coordinate %d is not a number", what, k + 1);
    if (!isfinite(creal(x[k])) || !isfinite(cimag(x[k])))
      luaL_error(L, "multi: %s coordinate %d is not finite", what, k + 1);
    lua_pop(L, 1);
  }
}

static void push_point(lua_State *L, int n, const cplx *x) {
  lua_createtable(L, n, 0);
  for (int k = 0; k < n; k++) {
    bind_pushcomplex(L, x[k]);
    lua_rawseti(L, -2, k + 1);
  }
}

/* (an absent options argument: its index may hold scratch pushed since, never a table) */
static double optnum(lua_State *L, int t, const char *key, double dflt) {
  if (lua_type(L, t) != LUA_TTABLE) return dflt;
  lua_getfield(L, t, key);
  double v = luaL_optnumber(L, -1, dflt);
  lua_pop(L, 1);
  return v;
}

static long optint(lua_State *L, int t, const char *key, long dflt, long lo, long hi) {
  double v = optnum(L, t, key, (double)dflt);
  if (!(v >= (double)lo && v <= (double)hi))
    luaL_error(L, "option '%s' must be a whole number from %d to %d", key, (int)lo, (int)hi);
  return (long)v;
}

static const char *status_text(int st) {
  switch (st) {
    case STEEP_SINGULAR: return "is singular there";
    case STEEP_BRANCH: return "has a branch point there";
    default: return "gives a non-finite value there";
  }
}

/* An mproblem over (tape 1, params 2, vars 3), left on the stack as scratch. */
static mproblem *checkmproblem(lua_State *L, int *varslot) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  int n = check_n(L, 3, t, varslot);
  mproblem *p = bind_scratch(L, sizeof(mproblem));
  mproblem_init(p, t, params, varslot, n, bind_scratch(L, mproblem_bytes(t, n)));
  return p;
}

/* core.multi_eval(tape, params, vars, points) -> one cvec per output: the values at each
 * point (points: a list of points). */
static int multi_eval(lua_State *L) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  int varslot[MJET_MAX_VARS];
  int n = check_n(L, 3, t, varslot);
  luaL_checktype(L, 4, LUA_TTABLE);
  size_t m = (size_t)luaL_len(L, 4);
  cplx *vals = bind_scratch(L, (t->nout * m + 1) * sizeof(cplx));
  cplx *work = bind_scratch(L, (t->n + t->nout + t->nparams + 1) * sizeof(cplx));
  cplx *out = work + t->n, *pbuf = out + t->nout;
  cplx x[MJET_MAX_VARS];
  for (size_t i = 0; i < m; i++) {
    lua_geti(L, 4, (lua_Integer)i + 1);
    check_point(L, lua_gettop(L), n, x, "point");
    lua_pop(L, 1);
    mjet_eval(t, params, varslot, n, x, out, work, pbuf);
    for (size_t o = 0; o < t->nout; o++) vals[o * m + i] = out[o];
  }
  luaL_checkstack(L, (int)t->nout, "too many outputs");
  for (size_t o = 0; o < t->nout; o++) memcpy(bind_newcvec(L, m), vals + o * m, m * sizeof(cplx));
  return (int)t->nout;
}

/* core.multi_derivs(tape, params, vars, point) -> F, gradient (list), Hessian (list of
 * rows). */
static int multi_derivs(lua_State *L) {
  int varslot[MJET_MAX_VARS];
  mproblem *p = checkmproblem(L, varslot);
  int n = p->n;
  cplx x[MJET_MAX_VARS], F, g[MJET_MAX_VARS], H[MJET_MAX_VARS * MJET_MAX_VARS];
  check_point(L, 4, n, x, "point");
  int st = mproblem_derivs(p, x, &F, g, H);
  if (st != STEEP_OK) return luaL_error(L, "multi_derivs: the exponent %s", status_text(st));
  bind_pushcomplex(L, F);
  push_point(L, n, g);
  lua_createtable(L, n, 0);
  for (int k = 0; k < n; k++) {
    push_point(L, n, H + k * n);
    lua_rawseti(L, -2, k + 1);
  }
  return 3;
}

/* core.multi_jet(tape, params, vars, point, degree [, dirs [, output]]) -> coefficients
 * (list, graded order), exponents (list of lists): the Taylor polynomial of the output
 * (1-based, default 1) in the local coordinates x_k = point_k + dirs_k s_k. */
static int multi_jet(lua_State *L) {
  int nargs = lua_gettop(L);   /* before any scratch is pushed */
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  int varslot[MJET_MAX_VARS];
  int n = check_n(L, 3, t, varslot);
  cplx x[MJET_MAX_VARS], dir[MJET_MAX_VARS];
  check_point(L, 4, n, x, "point");
  lua_Integer d = luaL_checkinteger(L, 5);
  int hasdir = nargs >= 6 && !lua_isnil(L, 6);
  if (hasdir) check_point(L, 6, n, dir, "dirs");
  lua_Integer o = nargs >= 7 ? luaL_checkinteger(L, 7) : 1;
  luaL_argcheck(L, o >= 1 && (size_t)o <= t->nout, 7, "output out of range");
  size_t lyb = mlayout_bytes(n, (int)(d < 0 ? -1 : d));
  if (d < 0 || d > 64 || lyb == 0) return luaL_argerror(L, 5, "degree out of range");
  mlayout ly;
  mlayout_init(&ly, n, (int)d, bind_scratch(L, lyb));
  size_t len = ly.N;
  cplx *work = bind_scratch(L, t->n * len * sizeof(cplx));
  cplx *scratch = bind_scratch(L, mjet_scratch_len(&ly, t, (int)d) * sizeof(cplx));
  long bad = 0;
  size_t out = (size_t)t->out[o - 1];
  int st = mjet_tape(&ly, t, params, varslot, x, hasdir ? dir : NULL, (int)d, out, work,
                     scratch, &bad);
  if (st != STEEP_OK)
    return luaL_error(L, "multi_jet: %s (instruction %d) %s", tape_op_name(t->ins[bad].op),
                      (int)bad + 1, status_text(st));
  const cplx *c = work + out * len;
  lua_createtable(L, (int)len, 0);
  for (size_t i = 0; i < len; i++) {
    bind_pushcomplex(L, c[i]);
    lua_rawseti(L, -2, (lua_Integer)i + 1);
  }
  lua_createtable(L, (int)len, 0);
  for (size_t i = 0; i < len; i++) {
    lua_createtable(L, n, 0);
    for (int k = 0; k < n; k++) {
      lua_pushinteger(L, ly.exps[i * (size_t)n + (size_t)k]);
      lua_rawseti(L, -2, k + 1);
    }
    lua_rawseti(L, -2, (lua_Integer)i + 1);
  }
  return 2;
}

static const char *mcrit_text[] = {"ok", "noconv", "singular", "nonfinite", "diverged", "failed"};

/* core.multi_newton(tape, params, vars, seeds, opts) -> roots (list of points), info
 * {seeds =, converged =, statuses = {count by status}, iterations =}. opts: known (list of
 * points to deflate), maxstep, tol, maxit, same (roots closer than same (1 + |x|) are one).
 * Every new root joins the deflation of the later seeds. */
static int multi_newton(lua_State *L) {
  int varslot[MJET_MAX_VARS];
  mproblem *p = checkmproblem(L, varslot);
  int n = p->n;
  luaL_checktype(L, 4, LUA_TTABLE);
  int nseeds = (int)luaL_len(L, 4);
  double maxstep = optnum(L, 5, "maxstep", INFINITY), tol = optnum(L, 5, "tol", 1e-13);
  double same = optnum(L, 5, "same", 1e-8);
  int maxit = (int)optint(L, 5, "maxit", 60, 1, 10000);
  int nknown0 = 0;
  if (lua_type(L, 5) == LUA_TTABLE) {
    lua_getfield(L, 5, "known");
    if (lua_type(L, -1) == LUA_TTABLE) nknown0 = (int)luaL_len(L, -1);
    lua_pop(L, 1);
  }
  if (nseeds < 0 || nknown0 < 0 || nseeds > 100000 || nknown0 > 100000)
    return luaL_error(L, "multi_newton: too many seeds or known roots");
  cplx *known = bind_scratch(L, (size_t)(nknown0 + nseeds + 1) * (size_t)n * sizeof(cplx));
  int nknown = 0;
  if (nknown0 > 0) {
    lua_getfield(L, 5, "known");
    int kidx = lua_gettop(L);
    for (int r = 0; r < nknown0; r++) {
      lua_geti(L, kidx, r + 1);
      check_point(L, lua_gettop(L), n, known + (size_t)nknown * (size_t)n, "known root");
      lua_pop(L, 1);
      nknown++;
    }
    lua_pop(L, 1);
  }
  int counts[6] = {0}, found = 0;
  long iters_total = 0;
  lua_newtable(L);                      /* roots */
  int roots = lua_gettop(L);
  for (int s = 0; s < nseeds; s++) {
    cplx x0[MJET_MAX_VARS], x[MJET_MAX_VARS];
    lua_geti(L, 4, s + 1);
    check_point(L, lua_gettop(L), n, x0, "seed");
    lua_pop(L, 1);
    int it = 0;
    int st = mcrit_newton(p, x0, known, nknown, maxstep, tol, maxit, x, &it);
    iters_total += it;
    counts[st]++;
    if (st != MCRIT_OK) continue;
    int dup = 0;
    for (int r = 0; r < nknown && !dup; r++) {
      double d = 0, sx = 0;
      for (int k = 0; k < n; k++) {
        d += cabs(x[k] - known[(size_t)r * (size_t)n + (size_t)k]);
        sx += cabs(x[k]);
      }
      if (d <= same * (1 + sx)) dup = 1;
    }
    if (dup) continue;
    memcpy(known + (size_t)nknown * (size_t)n, x, (size_t)n * sizeof *x);
    nknown++;
    push_point(L, n, x);
    lua_rawseti(L, roots, ++found);
  }
  lua_createtable(L, 0, 4);
  lua_pushinteger(L, nseeds);
  lua_setfield(L, -2, "seeds");
  lua_pushinteger(L, iters_total);
  lua_setfield(L, -2, "iterations");
  lua_pushinteger(L, p->evals);
  lua_setfield(L, -2, "evals");
  lua_createtable(L, 0, 6);
  for (int k = 0; k < 4; k++) {
    lua_pushinteger(L, counts[k]);
    lua_setfield(L, -2, mcrit_text[k]);
  }
  lua_setfield(L, -2, "statuses");
  return 2;
}

/* core.multi_homotopy(tape, params, vars, degrees, gamma, opts) -> list of paths
 * {x = end point, status =, rcond =, steps =}, for the paths first .. first + count - 1
 * (opts.first, opts.count; path i starts at the roots of unity with mixed-radix digits
 * of i - 1 over the degrees). opts: diverge (|x| beyond which a path is at infinity),
 * maxsteps. */
static int multi_homotopy(lua_State *L) {
  int varslot[MJET_MAX_VARS];
  mproblem *p = checkmproblem(L, varslot);
  int n = p->n, degs[MJET_MAX_VARS];
  luaL_checktype(L, 4, LUA_TTABLE);
  if (luaL_len(L, 4) != n) return luaL_error(L, "multi_homotopy: %d degrees expected", n);
  double total = 1;
  for (int k = 0; k < n; k++) {
    lua_geti(L, 4, k + 1);
    int ok = 0;
    lua_Integer dk = lua_tointegerx(L, -1, &ok);
    lua_pop(L, 1);
    if (!ok || dk < 1 || dk > 1000) return luaL_error(L, "multi_homotopy: degree %d out of range", k + 1);
    degs[k] = (int)dk;
    total *= (double)dk;
  }
  cplx gamma = bind_checkcomplex(L, 5);
  long first = optint(L, 6, "first", 1, 1, 1000000000L);
  long count = optint(L, 6, "count", 1, 0, 1000000L);
  double diverge = optnum(L, 6, "diverge", 1e8);
  int maxsteps = (int)optint(L, 6, "maxsteps", 4000, 1, 1000000);
  if ((double)(first - 1 + count) > total) count = (long)(total - (double)(first - 1));
  if (count < 0) count = 0;
  lua_createtable(L, (int)count, 0);
  for (long i = 0; i < count; i++) {
    long idx = first - 1 + i, r = idx;
    cplx start[MJET_MAX_VARS], end[MJET_MAX_VARS];
    for (int k = 0; k < n; k++) {
      long digit = r % degs[k];
      r /= degs[k];
      double th = 6.283185307179586476925286766559 * (double)digit / (double)degs[k];
      start[k] = cos(th) + I * sin(th);
    }
    double rcond = 0;
    int steps = 0;
    int st = mcrit_track(p, degs, gamma, start, diverge, maxsteps, end, &rcond, &steps);
    lua_createtable(L, 0, 4);
    push_point(L, n, end);
    lua_setfield(L, -2, "x");
    lua_pushstring(L, mcrit_text[st]);
    lua_setfield(L, -2, "status");
    lua_pushnumber(L, rcond);
    lua_setfield(L, -2, "rcond");
    lua_pushinteger(L, steps);
    lua_setfield(L, -2, "steps");
    lua_rawseti(L, -2, (lua_Integer)i + 1);
  }
  return 1;
}

/* core.multi_expand(tape, params, vars, point, dirs, kinds, sigma, M [, lin]) -> T_0 .. T_M (a
 * list of M + 1 complex values), and a bound on each one's rounding (a list of M + 1
 * numbers): mexpand_terms at the point, in the local coordinates
 * x_k = point_k + dirs_k s_k, or with lin (n rows of n) x_k = point_k + sum_j lin_kj s_j;
 * kinds: list of "full" | "half" | "edge"; sigma: the inverse of -F'' over the Gaussian
 * coordinates (in those local ones), as n rows of n (other entries are not read). */
static int multi_expand(lua_State *L) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  int varslot[MJET_MAX_VARS];
  int n = check_n(L, 3, t, varslot);
  cplx x[MJET_MAX_VARS], dir[MJET_MAX_VARS], sigma[MJET_MAX_VARS * MJET_MAX_VARS];
  int kind[MJET_MAX_VARS];
  check_point(L, 4, n, x, "point");
  check_point(L, 5, n, dir, "dirs");
  luaL_checktype(L, 6, LUA_TTABLE);
  static const char *const kinds[] = {"full", "half", "edge", NULL};
  for (int k = 0; k < n; k++) {
    lua_geti(L, 6, k + 1);
    kind[k] = luaL_checkoption(L, -1, NULL, kinds);
    lua_pop(L, 1);
  }
  luaL_checktype(L, 7, LUA_TTABLE);
  for (int k = 0; k < n; k++) {
    lua_geti(L, 7, k + 1);
    check_point(L, lua_gettop(L), n, sigma + k * n, "sigma row");
    lua_pop(L, 1);
  }
  lua_Integer M = luaL_checkinteger(L, 8);
  luaL_argcheck(L, M >= 0 && M <= MULTI_MAX_M, 8, "number of terms out of range");
  /* lin (optional): the local coordinates x_k = point_k + sum_j lin_kj s_j instead of dirs */
  cplx lin[MJET_MAX_VARS * MJET_MAX_VARS];
  int haslin = !lua_isnoneornil(L, 9);
  if (haslin) {
    luaL_checktype(L, 9, LUA_TTABLE);
    for (int k = 0; k < n; k++) {
      lua_geti(L, 9, k + 1);
      check_point(L, lua_gettop(L), n, lin + k * n, "lin row");
      lua_pop(L, 1);
    }
  }
  int D = 3 * (int)M > (int)M + 2 ? 3 * (int)M : (int)M + 2;
  size_t lyb = mlayout_bytes(n, D);
  if (lyb == 0)
    return luaL_error(L, "multi_expand: %d terms in %d variables need jets of degree %d, "
                      "beyond what this build tabulates", (int)M, n, D);
  mlayout ly;
  mlayout_init(&ly, n, D, bind_scratch(L, lyb));
  if (mexpand_cost(&ly, (int)M) > MULTI_MAX_COST)
    return luaL_error(L, "multi_expand: %d terms in %d variables would take too long "
                      "(about %.2g products)", (int)M, n, mexpand_cost(&ly, (int)M));
  int dj = (int)M + 2;
  size_t len = mlayout_len(&ly, dj);
  cplx *work = bind_scratch(L, t->n * len * sizeof(cplx));
  cplx *scratch = bind_scratch(L, mjet_scratch_len(&ly, t, dj) * sizeof(cplx));
  /* jets in a degree-(M+2) prefix of the big layout: the graded order makes it one */
  size_t upto = (size_t)t->out[t->nout > 1 ? 1 : 0];
  if ((size_t)t->out[0] > upto) upto = (size_t)t->out[0];
  long bad = 0;
  int st = haslin ? mjet_tape_linear(&ly, t, params, varslot, x, lin, dj, upto, work, scratch, &bad)
                  : mjet_tape(&ly, t, params, varslot, x, dir, dj, upto, work, scratch, &bad);
  if (st != STEEP_OK)
    return luaL_error(L, "multi_expand: the jet at the point fails: %s (instruction %d) %s",
                      tape_op_name(t->ins[bad].op), (int)bad + 1, status_text(st));
  cplx *Fj = bind_scratch(L, ly.N * sizeof(cplx)), *gj = bind_scratch(L, ly.N * sizeof(cplx));
  memset(Fj, 0, ly.N * sizeof(cplx));
  memset(gj, 0, ly.N * sizeof(cplx));
  memcpy(Fj, work + (size_t)t->out[0] * len, len * sizeof(cplx));
  if (t->nout > 1) memcpy(gj, work + (size_t)t->out[1] * len, len * sizeof(cplx));
  else gj[0] = 1;
  cplx *terms = bind_scratch(L, (size_t)(M + 1) * sizeof(cplx));
  double *bound = bind_scratch(L, (size_t)(M + 1) * sizeof(double));
  cplx *ms = bind_scratch(L, mexpand_scratch_len(&ly) * sizeof(cplx));
  st = mexpand_terms(&ly, Fj, gj, kind, sigma, (int)M, terms, bound, ms);
  if (st == STEEP_SINGULAR)
    return luaL_error(L, "multi_expand: an edge coordinate has no slope (dF/ds = 0)");
  if (st != STEEP_OK) return luaL_error(L, "multi_expand: a term is not finite");
  lua_createtable(L, (int)M + 1, 0);
  for (lua_Integer m = 0; m <= M; m++) {
    bind_pushcomplex(L, terms[m]);
    lua_rawseti(L, -2, m + 1);
  }
  lua_createtable(L, (int)M + 1, 0);
  for (lua_Integer m = 0; m <= M; m++) {
    lua_pushnumber(L, bound[m]);
    lua_rawseti(L, -2, m + 1);
  }
  return 2;
}

/* ---- one variable along a circular arc ------------------------------------------- */

typedef struct { problem *p; cplx c; double r; } arc_ctx;

static cplx arc_integrand(void *ctx, cplx th) {
  arc_ctx *a = ctx;
  cplx e = cexp(I * creal(th)), F;
  return problem_integrand(a->p, a->c + a->r * e, &F) * (I * a->r * e);
}

static const char *quad_text[] = {"ok", "limit", "nonfinite"};

/* core.quad_arc(tape, params, center, radius, th0, th1, opts) -> value, error,
 * evaluations, status: the integral of g e^F dz along z = center + radius e^{i th}, th
 * from th0 to th1, by adaptive Gauss-Kronrod in th, to reltol (1e-13) times the integral
 * of |g e^F dz| or abstol (0). opts: reltol, abstol, limit (subintervals). */
static int quad_arc(lua_State *L) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  problem *p = bind_scratch(L, sizeof(problem));
  problem_init(p, t, params, bind_scratch(L, problem_bytes(t)));
  p->tally = bind_tapetally(L, 1);
  arc_ctx a = { p, bind_checkcomplex(L, 3), luaL_checknumber(L, 4) };
  double th0 = luaL_checknumber(L, 5), th1 = luaL_checknumber(L, 6);
  if (!(a.r > 0) || !isfinite(a.r) || !isfinite(th0) || !isfinite(th1))
    return luaL_error(L, "quad_arc: radius and angles must be finite (radius > 0)");
  double reltol = optnum(L, 7, "reltol", 1e-13), abstol = optnum(L, 7, "abstol", 0);
  size_t limit = (size_t)optint(L, 7, "limit", QUAD_MAX_SUB, 1, QUAD_MAX_SUB);
  cplx res = 0;
  double err = 0, rabs = 0;
  long evals = 15;
  /* the tolerance is relative to the integral of |f| (one Kronrod rule's estimate of it),
   * as core.quad_polyline's: a Cauchy coefficient far from its peak cancels to far below
   * that size, and chasing it relative to itself only hits the subdivision limit */
  quad_gk15(arc_integrand, &a, th0, th1, &res, &err, &rabs);
  int st = quad_adaptive(arc_integrand, &a, th0, th1, fmax(abstol, reltol * rabs), 0, limit,
                         &res, &err, &evals);
  if (!isfinite(creal(res)) || !isfinite(cimag(res))) st = QUAD_NONFINITE;
  bind_pushcomplex(L, res);
  lua_pushnumber(L, err);
  lua_pushinteger(L, evals);
  lua_pushstring(L, quad_text[st]);
  return 4;
}

typedef struct { problem *p; cplx a, u; double L; } ray_ctx;

/* The ray a + L t/(1 - t) u, t in [0, 1): the integrand times dz/dt = L u/(1 - t)^2. */
static cplx ray_integrand(void *ctx, cplx tc) {
  ray_ctx *r = ctx;
  double t = creal(tc), q = 1 - t;
  cplx F;
  cplx v = problem_integrand(r->p, r->a + r->L * (t / q) * r->u, &F);
  if (v == 0) return 0;   /* (an underflow far out: no 0 * inf) */
  return v * (r->L * r->u / (q * q));
}

/* core.quad_ray(tape, params, a, angle, L, opts) -> value, error, evaluations, status: the
 * integral of g e^F dz from a to infinity in direction angle, through z = a + L t/(1 - t)
 * e^{i angle} (t in [0, 1), never evaluated at 1), by adaptive Gauss-Kronrod in t to
 * reltol (1e-13) times the integral of |f| or abstol. L: the length scale (t = 1/2 at
 * distance L). A decay faster than 1/|z| is needed. opts: reltol, abstol, limit. */
static int quad_ray(lua_State *L) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  problem *p = bind_scratch(L, sizeof(problem));
  problem_init(p, t, params, bind_scratch(L, problem_bytes(t)));
  p->tally = bind_tapetally(L, 1);
  double angle = luaL_checknumber(L, 4);
  ray_ctx r = { p, bind_checkcomplex(L, 3), cos(angle) + I * sin(angle), luaL_checknumber(L, 5) };
  if (!(r.L > 0) || !isfinite(r.L) || !isfinite(angle))
    return luaL_error(L, "quad_ray: the length scale must be positive and the angle finite");
  double reltol = optnum(L, 6, "reltol", 1e-13), abstol = optnum(L, 6, "abstol", 0);
  size_t limit = (size_t)optint(L, 6, "limit", QUAD_MAX_SUB, 1, QUAD_MAX_SUB);
  cplx res = 0;
  double err = 0, rabs = 0;
  long evals = 15;
  quad_gk15(ray_integrand, &r, 0, 1, &res, &err, &rabs);
  int st = quad_adaptive(ray_integrand, &r, 0, 1, fmax(abstol, reltol * rabs), 0, limit, &res,
                         &err, &evals);
  if (!isfinite(creal(res)) || !isfinite(cimag(res))) st = QUAD_NONFINITE;
  bind_pushcomplex(L, res);
  lua_pushnumber(L, err);
  lua_pushinteger(L, evals);
  lua_pushstring(L, quad_text[st]);
  return 4;
}

/* core.quad_circle(tape, params, center, radius, opts) -> value, error, evaluations,
 * status: the integral of g e^F dz once around the circle (opts.dir = 1 counter-clockwise,
 * -1 clockwise) by the trapezoidal rule in the angle, the points doubling (each level
 * reuses the last: 16, 32, ...) until two levels agree to reltol times the integral of
 * |g e^F dz| and the level before agreed to 1e-2 of it (a peak the coarse levels missed
 * cannot pass). Exponentially convergent for an integrand analytic in a strip about the
 * circle (Trefethen & Weideman, SIAM Review 56 (2014) 385-458); the error is the last
 * difference. opts: reltol (1e-13), centre (the angle of the first point), maxn (2^16). */
static int quad_circle(lua_State *L) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  problem *p = bind_scratch(L, sizeof(problem));
  problem_init(p, t, params, bind_scratch(L, problem_bytes(t)));
  p->tally = bind_tapetally(L, 1);
  arc_ctx a = { p, bind_checkcomplex(L, 3), luaL_checknumber(L, 4) };
  if (!(a.r > 0) || !isfinite(a.r)) return luaL_error(L, "quad_circle: radius must be positive");
  double reltol = optnum(L, 5, "reltol", 1e-13), centre = optnum(L, 5, "centre", 0);
  double dir = optnum(L, 5, "dir", 1) < 0 ? -1 : 1;
  long maxn = optint(L, 5, "maxn", 1L << 16, 16, 1L << 22);
  const double twopi = 6.283185307179586476925286766559;
  cplx sum = 0;          /* sum of f(theta_j) dz/dtheta over the points so far */
  double sabs = 0;
  long n = 8, evals = 0;
  for (long j = 0; j < n; j++) {
    cplx v = arc_integrand(&a, centre + twopi * (double)j / (double)n);
    sum += v;
    sabs += cabs(v);
  }
  evals = n;
  cplx prev = sum * (twopi / (double)n);
  double dprev = INFINITY;
  int status = 1;   /* "limit" until it converges */
  for (n = 16; n <= maxn; n *= 2) {
    for (long j = 1; j < n; j += 2) {
      cplx v = arc_integrand(&a, centre + twopi * (double)j / (double)n);
      sum += v;
      sabs += cabs(v);
    }
    evals += n / 2;
    cplx cur = sum * (twopi / (double)n);
    double size = sabs * (twopi / (double)n), d = cabs(cur - prev);
    if (!isfinite(creal(cur)) || !isfinite(cimag(cur))) { status = 2; prev = cur; dprev = d; break; }
    prev = cur;
    if (d <= reltol * size + 1e-300 && dprev <= 1e-2 * size) { status = 0; dprev = d; break; }
    dprev = d;
  }
  bind_pushcomplex(L, dir * prev);
  lua_pushnumber(L, dprev + 8e-16 * sabs * (twopi / (double)(n > maxn ? maxn : n)));
  lua_pushinteger(L, evals);
  lua_pushstring(L, quad_text[status]);
  return 4;
}

static const luaL_Reg multi_funcs[] = {
  {"multi_eval", multi_eval}, {"multi_derivs", multi_derivs}, {"multi_jet", multi_jet},
  {"multi_newton", multi_newton}, {"multi_homotopy", multi_homotopy},
  {"multi_expand", multi_expand}, {"quad_arc", quad_arc}, {"quad_circle", quad_circle},
  {"quad_ray", quad_ray},
  {NULL, NULL}
};

void bind_multi_open(lua_State *L) {
  luaL_setfuncs(L, multi_funcs, 0);
  lua_pushinteger(L, MJET_MAX_VARS);
  lua_setfield(L, -2, "multi_max_vars");
}
