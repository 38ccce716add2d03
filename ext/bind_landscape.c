/*
 * bind_landscape.c — Lua bindings of the landscape kernels: zeros (roots.c), steepest
 * paths (path.c), quadrature along polylines (quad.c) and polyline geometry (geom.c).
 * They only convert arguments; the orchestration (seeds, classification, decomposition)
 * is in lua/steep/landscape.lua and lua/steep/integral.lua.
 *
 * Every function taking (tape, params, ...) evaluates the tape with the parameters bound
 * by name: output 1 is the exponent F, output 2 (if any) the amplitude g.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bind.h"
#include "cdiv.h"
#include "clog.h"
#include "cplx.h"
#include "geom.h"
#include "invmap.h"
#include "path.h"
#include "quad.h"
#include "rings.h"
#include "roots.h"

/* A problem over the tape at argument 1 with the parameters at argument 2. */
static problem *checkproblem(lua_State *L) {
  const tape *t = bind_checktape(L, 1);
  cplx *params = bind_tapeparams(L, 1, 2);
  problem *p = bind_scratch(L, sizeof(problem));
  problem_init(p, t, params, bind_scratch(L, problem_bytes(t)));
  p->tally = bind_tapetally(L, 1);
  return p;
}

static double optnum(lua_State *L, int t, const char *key, double dflt) {
  lua_getfield(L, t, key);
  double v = luaL_optnumber(L, -1, dflt);
  lua_pop(L, 1);
  return v;
}

/* An integer option in [lo, hi], checked before any conversion (a NaN or out-of-range
 * double cast to an integer type would be undefined behaviour). */
static long optint(lua_State *L, int t, const char *key, long dflt, long lo, long hi) {
  double v = optnum(L, t, key, (double)dflt);
  if (!(v >= (double)lo && v <= (double)hi))
    luaL_error(L, "option '%s' must be a whole number from %d to %d", key, (int)lo, (int)hi);
  return (long)v;
}

static cplx optcomplex(lua_State *L, int t, const char *key, cplx dflt) {
  lua_getfield(L, t, key);
  cplx v = dflt;
  if (!lua_isnil(L, -1) && !bind_tocomplex(L, -1, &v))
    luaL_error(L, "option '%s' must be a number or complex value", key);
  lua_pop(L, 1);
  return v;
}

/* ---- zeros ---------------------------------------------------------------------- */

/* h = the d-th derivative of tape output `out`: its Taylor coefficients at t follow from
 * the jet of the output, c_k(h) = (k+d)!/k! a_{k+d}. */
typedef struct {
  problem *p;
  int out, deriv;
} zero_fn;

static int zero_jet(void *ctx, cplx t, size_t order, cplx *c) {
  zero_fn *z = ctx;
  if (order == 0 && z->deriv == 1 && z->out == 0) {
    /* F' alone (the argument principle's samples of a saddle count): forward mode, a
     * quarter of the cost of a jet's series arithmetic */
    cplx F;
    int st = problem_dF(z->p, t, &F, &c[0]);
    if (st != STEEP_OK) return st;
    return isfinite(creal(c[0])) && isfinite(cimag(c[0])) ? STEEP_OK : STEEP_NONFINITE;
  }
  cplx a[PROBLEM_MAX_JET + 1];
  size_t need = order + (size_t)z->deriv;
  if (need > PROBLEM_MAX_JET) return STEEP_NONFINITE;
  int st = problem_jet(z->p, t, need, z->out, a);
  if (st != STEEP_OK) return st;
  for (size_t k = 0; k <= order; k++) {
    double f = 1;
    for (size_t j = k + 1; j <= k + (size_t)z->deriv; j++) f *= (double)j;
    c[k] = f * a[k + (size_t)z->deriv];
    if (!isfinite(creal(c[k])) || !isfinite(cimag(c[k]))) return STEEP_NONFINITE;
  }
  return STEEP_OK;
}

static void checkzerofn(lua_State *L, int idx, problem *p, zero_fn *z) {
  luaL_checktype(L, idx, LUA_TTABLE);
  z->p = p;
  z->out = (int)optint(L, idx, "out", 1, 1, 1 << 20) - 1;
  z->deriv = (int)optint(L, idx, "deriv", 0, 0, 4);
  if (z->out < 0 || (size_t)z->out >= p->t->nout) luaL_error(L, "zero: no such tape output");
  if (z->deriv < 0 || z->deriv > 4) luaL_error(L, "zero: derivative order out of range");
}

static const char *root_text[] = {"ok", "noconv", "left", "fail", "oncircle"};

/* core.zero(tape, params, {out=, deriv=}, seed, center, radius, scale, maxit)
 *   -> status, root, multiplicity, evaluations */
static int land_zero(lua_State *L) {
  problem *p = checkproblem(L);
  zero_fn z;
  checkzerofn(L, 3, p, &z);
  cplx seed = bind_checkcomplex(L, 4), center = bind_checkcomplex(L, 5);
  double radius = luaL_checknumber(L, 6), scale = luaL_checknumber(L, 7);
  int maxit = (int)luaL_optinteger(L, 8, 60);
  luaL_argcheck(L, radius > 0 && isfinite(radius), 6, "radius must be positive and finite");
  luaL_argcheck(L, scale > 0 && isfinite(scale), 7, "scale must be positive and finite");
  luaL_argcheck(L, maxit > 0 && maxit <= 10000, 8, "iteration bound out of range");
  cplx root = 0;
  int mult = 0;
  int st = root_newton(zero_jet, &z, seed, center, radius, scale, maxit, &root, &mult);
  lua_pushstring(L, root_text[st]);
  if (st != ROOT_OK) { lua_pushnil(L); lua_pushnil(L); }
  else { bind_pushcomplex(L, root); lua_pushinteger(L, mult); }
  lua_pushinteger(L, p->evals);
  return 4;
}

/* core.count(tape, params, {out=, deriv=}, center, radius, maxpts)
 *   -> status, zeros minus poles inside, distance of the raw winding from an integer */
static int land_count(lua_State *L) {
  problem *p = checkproblem(L);
  zero_fn z;
  checkzerofn(L, 3, p, &z);
  cplx center = bind_checkcomplex(L, 4);
  double radius = luaL_checknumber(L, 5);
  int maxpts = (int)luaL_optinteger(L, 6, 20000);
  luaL_argcheck(L, radius > 0 && isfinite(radius), 5, "radius must be positive and finite");
  int count = 0;
  double dist = 0;
  int st = root_count(zero_jet, &z, center, radius, maxpts, &count, &dist);
  lua_pushstring(L, root_text[st]);
  lua_pushinteger(L, count);
  lua_pushnumber(L, dist);
  return 3;
}

/* core.zeros(tape, params, {out=, deriv=}, center, radius, opts) -> roots (cvec),
 *   multiplicities (list), Newton's evaluations, count status (or nil), count (or nil)
 * opts: grid (boolean: seed from the grid, and search again by random seeds while the
 * count is not reached), seeds (points), count (at most that many points for the
 * argument principle; 0 or absent: no count), poles (added to the count). The zeros in
 * the order found, inside the disc or not (root_search in roots.h). */
static int land_zeros(lua_State *L) {
  problem *p = checkproblem(L);
  zero_fn z;
  checkzerofn(L, 3, p, &z);
  cplx center = bind_checkcomplex(L, 4);
  double radius = luaL_checknumber(L, 5);
  luaL_argcheck(L, radius > 0 && isfinite(radius), 5, "radius must be positive and finite");
  luaL_checktype(L, 6, LUA_TTABLE);
  lua_getfield(L, 6, "grid");
  int grid = lua_toboolean(L, -1);
  lua_pop(L, 1);
  int count_pts = (int)optint(L, 6, "count", 0, 0, 1000000);
  int poles = (int)optint(L, 6, "poles", 0, -1000000, 1000000);
  size_t ns = 0;
  lua_getfield(L, 6, "seeds");
  const cplx *seeds = lua_isnil(L, -1) ? NULL : bind_checkpoints(L, lua_gettop(L), &ns);
  size_t cap = ROOT_SEARCH_MAX(ns);
  cplx *at = bind_array(L, cap, sizeof(cplx));
  int *mult = bind_array(L, cap, sizeof(int));
  size_t n = 0;
  long newton = 0;
  int cst = ROOT_FAIL, count = 0;
  root_search(zero_jet, &z, &p->evals, center, radius, grid, seeds, ns, count_pts, poles, at,
              mult, &n, &newton, &cst, &count);
  memcpy(bind_newcvec(L, n), at, n * sizeof(cplx));
  lua_createtable(L, (int)n, 0);
  for (size_t k = 0; k < n; k++) {
    lua_pushinteger(L, mult[k]);
    lua_rawseti(L, -2, (lua_Integer)k + 1);
  }
  lua_pushinteger(L, newton);
  if (count_pts <= 0) return 3;
  lua_pushstring(L, root_text[cst]);
  if (cst == ROOT_FAIL) return 4;   /* (not a count's status: none was made) */
  lua_pushinteger(L, count);
  return 5;
}

/* core.aberth(coefficients, bound) -> roots (cvec), sweeps: the d roots of the monic
 * polynomial whose coefficients a_0..a_d (a_d = 1) are given, by root_aberth (roots.h). */
static int land_aberth(lua_State *L) {
  size_t n = 0;
  const cplx *a = bind_checkpoints(L, 1, &n);
  double bound = luaL_checknumber(L, 2);
  luaL_argcheck(L, n >= 2 && n <= 4097, 1, "2 to 4097 coefficients expected");
  luaL_argcheck(L, bound > 0 && isfinite(bound), 2, "bound must be positive and finite");
  int d = (int)n - 1;
  cplx *z = bind_newcvec(L, (size_t)d);
  lua_pushinteger(L, root_aberth(a, d, bound, z));
  return 2;
}

/* ---- paths ---------------------------------------------------------------------- */

static const char *end_text[] = {"low", "high", "edge", "stop", "singular", "flat", "bound"};

/* core.trace(tape, params, start, level, opts) -> points, F values (cvecs), end, which
 * opts: descent, coarse, jumps (booleans; jumps: F may jump across a branch cut, the
 *       default), cutoff, ref, center, radius, scale, maxsteps, maxpts,
 *       stops (points), stop_r (list of radii), skip (the index of a stop to leave out),
 *       near (a point: stops within twice their radius of it are left out); `which` is
 *       the index in the whole list of stops */
static int land_trace(lua_State *L) {
  problem *p = checkproblem(L);
  cplx start = bind_checkcomplex(L, 3), level = bind_checkcomplex(L, 4);
  luaL_checktype(L, 5, LUA_TTABLE);
  path_opts o;
  lua_getfield(L, 5, "descent");
  o.descent = lua_toboolean(L, -1);
  lua_getfield(L, 5, "coarse");
  o.coarse = lua_toboolean(L, -1);
  lua_getfield(L, 5, "jumps");
  o.jumps = lua_isnil(L, -1) || lua_toboolean(L, -1);
  lua_pop(L, 3);
  o.cutoff = optnum(L, 5, "cutoff", 50);
  o.ref = optnum(L, 5, "ref", creal(level));
  o.center = optcomplex(L, 5, "center", 0);
  o.radius = optnum(L, 5, "radius", 10);
  o.scale = optnum(L, 5, "scale", 1);
  o.maxsteps = (int)optint(L, 5, "maxsteps", 4000, 1, 1000000);
  size_t maxpts = (size_t)optint(L, 5, "maxpts", 4000, 2, 1000000);
  if (!(o.radius > 0 && o.scale > 0 && isfinite(o.radius) && isfinite(o.scale)))
    return luaL_error(L, "trace: radius and scale must be positive and finite");
  if (o.maxsteps < 1 || o.maxsteps > 1000000 || maxpts < 2 || maxpts > 1000000)
    return luaL_error(L, "trace: step or point bound out of range");
  size_t ns = 0;
  lua_getfield(L, 5, "stops");
  int si = lua_gettop(L);
  const cplx *stops = lua_isnil(L, si) ? NULL : bind_checkpoints(L, si, &ns);
  double *stop_r = bind_array(L, ns + 1, sizeof(double));
  lua_getfield(L, 5, "stop_r");
  for (size_t j = 0; j < ns; j++) {
    lua_geti(L, -1, (lua_Integer)j + 1);
    stop_r[j] = luaL_checknumber(L, -1);
    lua_pop(L, 1);
  }
  /* the stops kept (a saddle's own paths leave it out; a path that starts at a stop point
   * must leave it), with their indices in the whole list */
  long skip = optint(L, 5, "skip", 0, 0, (long)ns) - 1;
  lua_getfield(L, 5, "near");
  int has_near = !lua_isnil(L, -1);
  cplx near = has_near ? bind_checkcomplex(L, lua_gettop(L)) : 0;
  cplx *kept = bind_array(L, ns + 1, sizeof(cplx));
  double *kept_r = bind_array(L, ns + 1, sizeof(double));
  size_t *index = bind_array(L, ns + 1, sizeof(size_t)), nk = 0;
  for (size_t j = 0; j < ns; j++) {
    if ((long)j == skip || (has_near && plain_abs(stops[j] - near) <= 2 * stop_r[j])) continue;
    kept[nk] = stops[j];
    kept_r[nk] = stop_r[j];
    index[nk++] = j;
  }
  o.stops = kept;
  o.stop_r = kept_r;
  o.nstops = nk;
  cplx *pts = bind_buffer(L, bind_mulcount(L, 2 * maxpts, sizeof(cplx))), *Fs = pts + maxpts;
  int buffer = lua_gettop(L);
  size_t n = 0;
  int which = -1;
  int end = path_trace(p, start, level, &o, pts, Fs, maxpts, &n, &which);
  memcpy(bind_newcvec(L, n), pts, n * sizeof(cplx));
  memcpy(bind_newcvec(L, n), Fs, n * sizeof(cplx));
  bind_buffer_release(L, buffer);
  lua_pushstring(L, end_text[end]);
  if (which >= 0) lua_pushinteger(L, (lua_Integer)index[which] + 1);
  else lua_pushnil(L);
  lua_pushinteger(L, p->evals);
  return 5;
}

/* core.saddle_quad(tape, params, t0, F0, F2, points_a, F_a, points_b, F_b, opts)
 *   -> value, error, evaluations, part on ray a, part on ray b; or nil, evaluations
 * The path through a simple saddle in along ray b and out along ray a (their traced
 * points after the saddle and F's values there, cvecs or lists), by the trapezoidal rule
 * in the saddle's own variable (path_saddle_quad in path.h). opts: abstol, reltol. */
static int land_saddle_quad(lua_State *L) {
  problem *p = checkproblem(L);
  cplx t0 = bind_checkcomplex(L, 3), F0 = bind_checkcomplex(L, 4), F2 = bind_checkcomplex(L, 5);
  path_ray a, b;
  size_t naF = 0, nbF = 0;
  a.pts = bind_checkpoints(L, 6, &a.n);
  a.F = bind_checkpoints(L, 7, &naF);
  b.pts = bind_checkpoints(L, 8, &b.n);
  b.F = bind_checkpoints(L, 9, &nbF);
  if (naF != a.n) return luaL_argerror(L, 7, "as many values of F as points expected");
  if (nbF != b.n) return luaL_argerror(L, 9, "as many values of F as points expected");
  luaL_checktype(L, 10, LUA_TTABLE);
  double abstol = optnum(L, 10, "abstol", 0), reltol = optnum(L, 10, "reltol", 1e-13);
  double *work = bind_array(L, PATH_SADDLE_QUAD_DOUBLES(a.n, b.n), sizeof(double));
  cplx res = 0, pa = 0, pb = 0;
  double err = 0;
  if (path_saddle_quad(p, t0, F0, F2, a, b, abstol, reltol, work, &res, &err, &pa, &pb) != 0) {
    lua_pushnil(L);
    lua_pushinteger(L, p->evals);
    return 2;
  }
  bind_pushcomplex(L, res);
  lua_pushnumber(L, err);
  lua_pushinteger(L, p->evals);
  bind_pushcomplex(L, pa);
  bind_pushcomplex(L, pb);
  return 5;
}

/* core.saddle_starts(tape, params, t0, F0, order, c, descent, scale) -> list of points */
static int land_saddle_starts(lua_State *L) {
  problem *p = checkproblem(L);
  cplx t0 = bind_checkcomplex(L, 3), F0 = bind_checkcomplex(L, 4);
  int order = (int)luaL_checkinteger(L, 5);
  cplx c = bind_checkcomplex(L, 6);
  int descent = lua_toboolean(L, 7);
  double scale = luaL_checknumber(L, 8);
  luaL_argcheck(L, order >= 2 && order <= 9, 5, "saddle order must be 2..9");
  luaL_argcheck(L, c != 0, 6, "leading coefficient must not be zero");
  cplx starts[9];
  if (path_saddle_starts(p, t0, F0, order, c, descent, scale, starts) != STEEP_OK)
    return luaL_error(L, "saddle_starts: the exponent is singular next to the saddle");
  lua_createtable(L, order, 0);
  for (int k = 0; k < order; k++) {
    bind_pushcomplex(L, starts[k]);
    lua_rawseti(L, -2, k + 1);
  }
  return 1;
}

/* d within (tol in its real part, tol_angle in the sine of half its imaginary part) of
 * 2 pi i times an integer. */
static int multiple_of_2pi_i(cplx d, double tol, double tol_angle) {
  return fabs(creal(d)) <= tol && fabs(sin(cimag(d) / 2)) <= tol_angle;
}

/* core.branch_jump(tape, params, points, F, level) -> nil, or k, point, jump: the first
 * point of a traced path where the principal value of F differs from the value F[k]
 * followed by continuity along it by more than a harmless jump. Harmless: 2 pi i times
 * an integer (exp(F) is unchanged) -- a real part within 1e-6 max(1, |level|) and an
 * imaginary part within max(1e-6, 1e-12 |level|) of a multiple of 2 pi (rounding of F
 * grows with |F|; a fixed bound on the angle keeps a log cut's jump visible however large
 * F is) -- or where the integrand is negligible (Re F below Re level - 30). A path that
 * crosses a branch cut of the exponent would otherwise be integrated on the wrong sheet
 * there. With a sixth argument rho the tape's exponent is rho times the integral's (an
 * exponent turned in phase onto or past a Stokes line, |rho| = 1, Re rho > 1/2): a cut of
 * log that is harmless in the integral's own exponent (2 pi i k) makes the turned one jump
 * by rho 2 pi i k. The tracer carries a jump met along the path whole (F differs from
 * the traced value by rho 2 pi i k), one met at its start only in its imaginary part (a
 * saddle on the cut: the traced value holds Im F at the level, so the difference is
 * 2 pi i k Re rho); either form is harmless. (Both at once on one path, a saddle on one
 * cut whose path crosses another, is reported as a jump: a clear error, not a wrong
 * sheet.) */
static int land_branch_jump(lua_State *L) {
  problem *p = checkproblem(L);
  size_t n = 0, nF = 0;
  cplx *pts = bind_checkpoints(L, 3, &n), *Fc = bind_checkpoints(L, 4, &nF);
  cplx level = bind_checkcomplex(L, 5);
  cplx rho = 1;
  if (!lua_isnoneornil(L, 6)) {
    rho = bind_checkcomplex(L, 6);
    if (!(fabs(cabs(rho) - 1) <= 1e-12) || !(creal(rho) > 0.5))
      return luaL_argerror(L, 6, "a turn rho with |rho| = 1 and |arg rho| < pi/3 expected");
  }
  double lr = creal(level), tol = 1e-6 * fmax(1, cabs(level));
  double tol_angle = fmax(1e-6, 1e-12 * cabs(level));
  cplx *slots = p->vals + p->t->nout;   /* as problem_integrand lays them out */
  for (size_t k = 0; k < n && k < nF; k++) {
    tape_eval(p->t, pts[k], p->params, p->vals, slots);
    cplx d = p->vals[0] - Fc[k];
    double fr = creal(p->vals[0]), dr = creal(d);
    int harmless = multiple_of_2pi_i(d / rho, tol, tol_angle)
                   || multiple_of_2pi_i(d / creal(rho), tol, tol_angle) || !(fr > lr - 30);
    if (isfinite(dr) && !harmless) {
      lua_pushinteger(L, (lua_Integer)k + 1);
      bind_pushcomplex(L, pts[k]);
      bind_pushcomplex(L, d);
      return 3;
    }
  }
  lua_pushnil(L);
  return 1;
}

/* ---- quadrature ------------------------------------------------------------------ */

static cplx integrand(void *ctx, cplx t) {
  cplx F;
  return problem_integrand(ctx, t, &F);
}

static const char *quad_text[] = {"ok", "limit", "nonfinite"};

/* The integrand in batches (problem_integrand_batch) with its scratch memory, less the
 * poles' parts r_j / (t - p_j) of simple poles near the path (npoles of them: the
 * difference is regular there, and their integrals along the polyline are added back in
 * closed form, pole_logs). */
typedef struct {
  problem *p;
  cplx *work, *out;
  const cplx *poles, *residues;
  size_t npoles;
} batch_ctx;

static cplx pole_parts(const batch_ctx *c, cplx t) {
  cplx s = 0;
  for (size_t j = 0; j < c->npoles; j++) s += cdiv(c->residues[j], t - c->poles[j]);
  return s;
}

static void integrand_batch(void *ctx, const cplx *t, size_t m, cplx *f) {
  batch_ctx *c = ctx;
  problem_integrand_batch(c->p, t, m, f, c->work, c->out);
  if (c->npoles)
    for (size_t i = 0; i < m; i++) f[i] -= pole_parts(c, t[i]);
}

static cplx integrand_one(void *ctx, cplx t) {
  batch_ctx *c = ctx;
  cplx f = integrand(c->p, t);
  return c->npoles ? f - pole_parts(c, t) : f;
}

/* sum_j r_j times the integral of dt / (t - p_j) along the polyline: on each segment
 * log((b - p) / (a - p)), principal (a straight segment that misses p turns by less than
 * pi about it); *size gets sum |r_j| |log| (the scale of its rounding). */
static cplx pole_logs(const batch_ctx *c, const cplx *pts, size_t n, double *size) {
  cplx s = 0;
  *size = 0;
  for (size_t j = 0; j < c->npoles; j++)
    for (size_t k = 0; k + 1 < n; k++) {
      cplx l = steep_clog(cdiv(pts[k + 1] - c->poles[j], pts[k] - c->poles[j]));
      s += c->residues[j] * l;
      *size += cabs(c->residues[j]) * cabs(l);
    }
  return s;
}

/* core.quad_polyline(tape, params, points, opts) -> value, error, evaluations, status
 * opts: abstol, reltol, singular_start, singular_end (tanh-sinh on that segment), limit
 * (subintervals per segment), budget (evaluations in all; past it: status "limit"),
 * first, last (integrate the points first..last only, 1-based; default all); for a
 * traced descent path, levels (F at every point) and merge (the largest fall of Re F a
 * joined segment may span), avoid (points the joined chords keep clear of).
 * The two passes of quad_polyline (quad.h), the first with batch evaluation of the tape. */
static int land_quad_polyline(lua_State *L) {
  problem *p = checkproblem(L);
  size_t n = 0;
  cplx *pts = bind_checkpoints(L, 3, &n);
  luaL_checktype(L, 4, LUA_TTABLE);
  double abstol = optnum(L, 4, "abstol", 0), reltol = optnum(L, 4, "reltol", 1e-13);
  size_t limit = (size_t)optint(L, 4, "limit", QUAD_MAX_SUB, 1, QUAD_MAX_SUB);
  long budget = optint(L, 4, "budget", 2000000, 1, 2000000000);   /* evaluations in all */
  lua_getfield(L, 4, "singular_start");
  int sing0 = lua_toboolean(L, -1);
  lua_getfield(L, 4, "singular_end");
  int sing1 = lua_toboolean(L, -1);
  lua_pop(L, 2);
  if (n < 2) return luaL_error(L, "quad_polyline: needs at least 2 points");
  size_t first = (size_t)optint(L, 4, "first", 1, 1, (long)n - 1);
  size_t last = (size_t)optint(L, 4, "last", (long)n, (long)first + 1, (long)n);
  pts += first - 1;
  n = last - first + 1;
  /* a traced descent path: consecutive segments joined where F changes little
   * (quad_merge_vertices), with F's values at the points in `levels` */
  double drop = optnum(L, 4, "merge", 0);
  lua_getfield(L, 4, "levels");
  if (drop > 0 && !lua_isnil(L, -1) && first == 1 && last == n) {
    size_t nl = 0, na = 0;
    const cplx *levels = bind_checkpoints(L, lua_gettop(L), &nl);
    lua_getfield(L, 4, "avoid");
    const cplx *avoid = lua_isnil(L, -1) ? NULL : bind_checkpoints(L, lua_gettop(L), &na);
    if (nl == n) {
      size_t *keep = bind_array(L, n, sizeof(size_t));
      size_t m = quad_merge_vertices(pts, levels, n, drop, avoid, na, keep);
      cplx *merged = bind_array(L, m, sizeof(cplx));
      for (size_t k = 0; k < m; k++) merged[k] = pts[keep[k]];
      pts = merged;
      n = m;
    }
  }
  batch_ctx c = {p, bind_array(L, p->t->n, TAPE_BLOCK * sizeof(cplx)),
                 bind_array(L, p->t->nout, 15 * QUAD_BATCH * sizeof(cplx)), NULL, NULL, 0};
  /* simple poles near the path whose parts are taken out (poles, residues: cvecs) */
  lua_getfield(L, 4, "poles");
  if (!lua_isnil(L, -1)) {
    size_t np = 0, nr = 0;
    c.poles = bind_checkpoints(L, lua_gettop(L), &np);
    lua_getfield(L, 4, "residues");
    c.residues = bind_checkpoints(L, lua_gettop(L), &nr);
    if (nr != np) return luaL_error(L, "quad_polyline: as many residues as poles expected");
    c.npoles = np;
  }
  void *scratch = bind_array(L, QUAD_POLYLINE_BYTES(n - 1), 1);
  long evals = 0;
  cplx total;
  double etotal;
  int status = quad_polyline(integrand_one, integrand_batch, &c, pts, n, abstol, reltol, limit,
                             budget, sing0, sing1, scratch, &total, &etotal, &evals);
  if (c.npoles) {
    double size;
    total += pole_logs(&c, pts, n, &size);
    etotal += 8 * 2.220446049250313e-16 * size;
  }
  bind_pushcomplex(L, total);
  lua_pushnumber(L, etotal);
  lua_pushinteger(L, evals);
  lua_pushstring(L, quad_text[status]);
  return 4;
}

/* core.short_stretches(tape, params, points, opts) -> list of {from, to} (1-based point
 * indices): the stretches of consecutive segments of points[first..last] each no longer
 * than 16 times the local scale at both its ends, so that one rule per segment (and
 * bisection where its error says so) resolves them without grading; the segments left
 * between stretches are the long ones. The local scale at z is integral.lua's:
 * 0.1 max(radius, |z - center|), |z - saddle| + its width, and 1/|F'(z)| (not below 1e-3
 * of the rest). opts: first, last, center, radius, saddles (a cvec), widths (a cvec, the
 * real parts). One evaluation of F and F' a point. */
static int land_short_stretches(lua_State *L) {
  problem *p = checkproblem(L);
  size_t n = 0;
  cplx *pts = bind_checkpoints(L, 3, &n);
  luaL_checktype(L, 4, LUA_TTABLE);
  if (n < 2) return luaL_error(L, "short_stretches: needs at least 2 points");
  size_t first = (size_t)optint(L, 4, "first", 1, 1, (long)n - 1);
  size_t last = (size_t)optint(L, 4, "last", (long)n, (long)first + 1, (long)n);
  cplx center = optcomplex(L, 4, "center", 0);
  double radius = optnum(L, 4, "radius", 1);
  size_t ns = 0, nw = 0;
  lua_getfield(L, 4, "saddles");
  const cplx *sad = lua_isnil(L, -1) ? NULL : bind_checkpoints(L, lua_gettop(L), &ns);
  lua_getfield(L, 4, "widths");
  const cplx *wid = lua_isnil(L, -1) ? NULL : bind_checkpoints(L, lua_gettop(L), &nw);
  if (ns != nw) return luaL_error(L, "short_stretches: %d saddles but %d widths", (int)ns, (int)nw);
  double *scale = bind_array(L, last - first + 1, sizeof(double));
  for (size_t k = first - 1; k < last; k++) {
    cplx z = pts[k], F, dF;
    double sc = 0.1 * fmax(radius, cabs(z - center));
    for (size_t j = 0; j < ns; j++)
      if (isfinite(creal(wid[j]))) sc = fmin(sc, cabs(z - sad[j]) + creal(wid[j]));
    if (problem_dF(p, z, &F, &dF) == STEEP_OK) {
      double d = cabs(dF);
      if (d > 0 && isfinite(d)) sc = fmin(sc, fmax(1 / d, 1e-3 * sc));
    }
    scale[k - (first - 1)] = sc;
  }
  lua_newtable(L);
  lua_Integer count = 0;
  size_t from = 0;   /* 0: no stretch open */
  for (size_t k = first - 1; k + 1 < last; k++) {
    double len = cabs(pts[k + 1] - pts[k]);
    int is_short = len <= 16 * fmin(scale[k - (first - 1)], scale[k + 1 - (first - 1)]);
    if (is_short && !from) from = k + 1;
    if (from && (!is_short || k + 2 == last)) {
      size_t to = is_short ? k + 2 : k + 1;
      if (to > from) {
        lua_createtable(L, 2, 0);
        lua_pushinteger(L, (lua_Integer)from);
        lua_rawseti(L, -2, 1);
        lua_pushinteger(L, (lua_Integer)to);
        lua_rawseti(L, -2, 2);
        lua_rawseti(L, -2, ++count);
      }
      from = 0;
    }
  }
  return 1;
}

/* core.integrand_many(tape, params, points) -> cvec of g e^F (for maps and checks) */
static int land_integrand_many(lua_State *L) {
  problem *p = checkproblem(L);
  size_t n = 0;
  cplx *pts = bind_checkpoints(L, 3, &n);
  cplx *out = bind_newcvec(L, n);
  for (size_t k = 0; k < n; k++) out[k] = integrand(p, pts[k]);
  return 1;
}

/* ---- inverse map ---------------------------------------------------------------- */

static const char *invmap_text[] = {"ok", "newton", "notclosed", "singular"};

/* The N-th roots of unity e^{-2 pi i j/N}, j < N, into root (the sums below would
 * otherwise spend most of their time in sincos). */
static void unit_roots(size_t N, cplx *root) {
  for (size_t j = 0; j < N; j++) root[j] = cexp(-I * (6.283185307179586 * (double)j / (double)N));
}

/* Taylor coefficients from the values G[0..N-1] on |w| = rho (trapezoidal rule):
 * c_k = (1/(M rho^k)) sum_j G_{j stride} e^{-2 pi i jk/M}, k < n, M = N/stride, with
 * `stride` 1 (all points) or 2 (every other point, an N/2 rule for an aliasing check);
 * root holds unit_roots(N). Direct sums, O(M n). */
static void circle_coefs(const cplx *G, size_t N, size_t stride, double rho, size_t n,
                         const cplx *root, cplx *c) {
  size_t M = N / stride;
  for (size_t k = 0; k < n; k++) {
    cplx sum = 0;
    size_t idx = 0, step = k % M;   /* idx = j k mod M, stepped: no division per term */
    for (size_t j = 0; j < M; j++) {
      sum += G[j * stride] * root[idx * stride];
      idx += step;
      if (idx >= M) idx -= M;
    }
    c[k] = sum / ((double)M * pow(rho, (double)k));
  }
}

/* Pushes the coefficient cvecs for N and N/2 points and max|G| (for rounding levels). */
static int push_coefs(lua_State *L, const cplx *G, size_t N, double rho, lua_Integer n) {
  if (n < 1 || (size_t)n > N / 2) return luaL_error(L, "number of coefficients out of range");
  if (N % 2) return luaL_error(L, "coefficients need an even number of points (the N/2 rule)");
  double gmax = 0;
  for (size_t j = 0; j < N; j++) gmax = fmax(gmax, cabs(G[j]));
  cplx *root = bind_array(L, N, sizeof(cplx));
  unit_roots(N, root);
  circle_coefs(G, N, 1, rho, (size_t)n, root, bind_newcvec(L, (size_t)n));
  circle_coefs(G, N, 2, rho, (size_t)n, root, bind_newcvec(L, (size_t)n));
  lua_remove(L, -3);   /* the roots, no longer used */
  lua_pushnumber(L, gmax);
  return 3;
}

/* The results of an inverse-map binding, with the cvec of G values on the stack: status
 * and the values, or (ncoef > 0) status and push_coefs' three results. */
static int invmap_results(lua_State *L, int st, const cplx *G, size_t N, double rho,
                          lua_Integer ncoef) {
  lua_pushstring(L, invmap_text[st]);
  if (ncoef > 0) return st != INVMAP_OK ? 1 : 1 + push_coefs(L, G, N, rho, ncoef);
  lua_insert(L, -2);
  return 2;
}

/* core.invmap_circle(tape, params, t0, F0, m, s, rho, N [, ncoef]) -> status, cvec of G
 * values; with ncoef: status, coefficients (N points), coefficients (N/2 points), max|G| */
static int land_invmap(lua_State *L) {
  lua_settop(L, 9);   /* (an absent ncoef reads as nil, not as the scratch pushed next) */
  problem *p = checkproblem(L);
  cplx t0 = bind_checkcomplex(L, 3), F0 = bind_checkcomplex(L, 4);
  int m = (int)luaL_checkinteger(L, 5);
  cplx s = bind_checkcomplex(L, 6);
  double rho = luaL_checknumber(L, 7);
  lua_Integer N = luaL_checkinteger(L, 8);
  luaL_argcheck(L, m >= 1 && m <= 9, 5, "map order must be 1..9");
  luaL_argcheck(L, s != 0, 6, "leading coefficient must not be zero");
  luaL_argcheck(L, rho > 0 && isfinite(rho), 7, "radius must be positive and finite");
  luaL_argcheck(L, N >= 8 && N <= 65536, 8, "number of points must be 8..65536");
  lua_Integer ncoef = luaL_optinteger(L, 9, 0);
  cplx *G = bind_newcvec(L, (size_t)N);
  int st = invmap_circle(p, t0, F0, m, s, rho, (size_t)N, G);
  return invmap_results(L, st, G, (size_t)N, rho, ncoef);
}

/* core.invmap_cubic(tape, params, t1, A, zeta, ua, tprime, rho, N [, ncoef]) -> as
 * core.invmap_circle */
static int land_invmap_cubic(lua_State *L) {
  lua_settop(L, 10);   /* (as above) */
  problem *p = checkproblem(L);
  cplx t1 = bind_checkcomplex(L, 3), A = bind_checkcomplex(L, 4);
  cplx zeta = bind_checkcomplex(L, 5), ua = bind_checkcomplex(L, 6);
  cplx tprime = bind_checkcomplex(L, 7);
  double rho = luaL_checknumber(L, 8);
  lua_Integer N = luaL_checkinteger(L, 9);
  luaL_argcheck(L, tprime != 0, 7, "t'(u_a) must not be zero");
  luaL_argcheck(L, rho > 0 && isfinite(rho), 8, "radius must be positive and finite");
  luaL_argcheck(L, N >= 8 && N <= 65536, 9, "number of points must be 8..65536");
  lua_Integer ncoef = luaL_optinteger(L, 10, 0);
  cplx *G = bind_newcvec(L, (size_t)N);
  int st = invmap_cubic(p, t1, A, zeta, ua, tprime, rho, (size_t)N, G);
  return invmap_results(L, st, G, (size_t)N, rho, ncoef);
}

/* core.invmap_quartic(tape, params, t1, A, zeta, eta, ua, tprime, rho, N [, ncoef]) -> as
 * core.invmap_circle */
static int land_invmap_quartic(lua_State *L) {
  lua_settop(L, 11);   /* (as above) */
  problem *p = checkproblem(L);
  cplx t1 = bind_checkcomplex(L, 3), A = bind_checkcomplex(L, 4);
  cplx zeta = bind_checkcomplex(L, 5), eta = bind_checkcomplex(L, 6);
  cplx ua = bind_checkcomplex(L, 7), tprime = bind_checkcomplex(L, 8);
  double rho = luaL_checknumber(L, 9);
  lua_Integer N = luaL_checkinteger(L, 10);
  luaL_argcheck(L, tprime != 0, 8, "t'(u_a) must not be zero");
  luaL_argcheck(L, rho > 0 && isfinite(rho), 9, "radius must be positive and finite");
  luaL_argcheck(L, N >= 8 && N <= 65536, 10, "number of points must be 8..65536");
  lua_Integer ncoef = luaL_optinteger(L, 11, 0);
  cplx *G = bind_newcvec(L, (size_t)N);
  int st = invmap_quartic(p, t1, A, zeta, eta, ua, tprime, rho, (size_t)N, G);
  return invmap_results(L, st, G, (size_t)N, rho, ncoef);
}

/* core.laurent(tape, params, p, rho, N, depth) -> cvec of a_m rho^m for m = -depth..1
 * (entry m + depth + 1), max |integrand| on the circle, and (N even) the same cvec from
 * every other point (an N/2 rule on the same samples, for an error estimate): the
 * trapezoidal rule on |t - p| = rho (exponentially accurate for an integrand analytic
 * on an annulus); circle_laurent in rings.h. */
static int land_laurent(lua_State *L) {
  problem *p = checkproblem(L);
  cplx c = bind_checkcomplex(L, 3);
  double rho = luaL_checknumber(L, 4);
  lua_Integer N = luaL_checkinteger(L, 5), depth = luaL_checkinteger(L, 6);
  luaL_argcheck(L, rho > 0 && isfinite(rho), 4, "radius must be positive and finite");
  luaL_argcheck(L, N >= 8 && N <= 65536, 5, "number of points must be 8..65536");
  luaL_argcheck(L, depth >= 1 && depth <= 1024, 6, "depth must be 1..1024");
  cplx *root = bind_array(L, (size_t)N, sizeof(cplx));
  unit_roots((size_t)N, root);
  cplx *work = bind_array(L, bind_mulcount(L, p->t->n, TAPE_BLOCK) +
                                 bind_mulcount(L, p->t->nout + 2, (size_t)N), sizeof(cplx));
  int halves = N % 2 == 0;
  cplx *out = bind_newcvec(L, (size_t)depth + 2);
  double vmax = 0;
  cplx *half = halves ? bind_newcvec(L, (size_t)depth + 2) : NULL;
  circle_laurent(p, c, rho, (int)N, (int)depth, root, work, out, half, &vmax);
  if (halves) {
    lua_pushnumber(L, vmax);
    lua_insert(L, -2);
    return 3;
  }
  lua_pushnumber(L, vmax);
  return 2;
}

/* core.ring_quietest(tape, params, c, r0, count, n) -> rho, score, spread (or nil): the
 * circle about c, of radius r0 2^(-i/3) for i < count, where a residue at c is best
 * conditioned (ring_quietest in rings.h). */
static int land_ring_quietest(lua_State *L) {
  problem *p = checkproblem(L);
  cplx c = bind_checkcomplex(L, 3);
  double r0 = luaL_checknumber(L, 4);
  lua_Integer count = luaL_checkinteger(L, 5), n = luaL_checkinteger(L, 6);
  luaL_argcheck(L, r0 > 0 && isfinite(r0), 4, "radius must be positive and finite");
  luaL_argcheck(L, count >= 1 && count <= 1024, 5, "number of radii must be 1..1024");
  luaL_argcheck(L, n >= 4 && n <= 65536, 6, "number of points must be 4..65536");
  cplx *work = bind_array(L, bind_mulcount(L, p->t->n, TAPE_BLOCK) +
                                 bind_mulcount(L, p->t->nout + 1, (size_t)n), sizeof(cplx));
  double rho = 0, score = 0, spread = 0;
  if (!ring_quietest(p, c, r0, (int)count, (int)n, work, &rho, &score, &spread)) {
    lua_pushnil(L);
    return 1;
  }
  lua_pushnumber(L, rho);
  lua_pushnumber(L, score);
  lua_pushnumber(L, spread);
  return 3;
}

/* The error of a kernel that met a point where F' could not be evaluated. */
static int circle_error(lua_State *L, const char *what, cplx c, double rho) {
  char at[64];   /* lua_pushfstring has no %g */
  snprintf(at, sizeof at, "%.15g%+.15gi", creal(c), cimag(c));
  return luaL_error(L, "%s: F' is not finite on the circle of radius %g about %s", what, rho, at);
}

/* core.log_coefficient(tape, params, c, rho, n) -> the coefficient a of a log(t - c) in F
 * (circle_log_coefficient in rings.h) */
static int land_log_coefficient(lua_State *L) {
  problem *p = checkproblem(L);
  cplx c = bind_checkcomplex(L, 3);
  double rho = luaL_checknumber(L, 4);
  lua_Integer n = luaL_checkinteger(L, 5);
  luaL_argcheck(L, rho > 0 && isfinite(rho), 4, "radius must be positive and finite");
  luaL_argcheck(L, n >= 4 && n <= 65536, 5, "number of points must be 4..65536");
  cplx a = 0;
  if (circle_log_coefficient(p, c, rho, (int)n, &a) != STEEP_OK)
    return circle_error(L, "log_coefficient", c, rho);
  bind_pushcomplex(L, a);
  return 1;
}

/* core.dF_laurent(tape, params, c, rho, n, depth) -> cvec of the Laurent coefficients
 * b_m of F' about c, m = -depth - 1..0 (entry m + depth + 2), or nil where F' could not
 * be evaluated on the circle (circle_dF_laurent in rings.h) */
static int land_dF_laurent(lua_State *L) {
  problem *p = checkproblem(L);
  cplx c = bind_checkcomplex(L, 3);
  double rho = luaL_checknumber(L, 4);
  lua_Integer n = luaL_checkinteger(L, 5), depth = luaL_checkinteger(L, 6);
  luaL_argcheck(L, rho > 0 && isfinite(rho), 4, "radius must be positive and finite");
  luaL_argcheck(L, n >= 4 && n <= 65536, 5, "number of points must be 4..65536");
  luaL_argcheck(L, depth >= 0 && depth <= 1024, 6, "depth must be 0..1024");
  cplx *work = bind_array(L, (size_t)n, sizeof(cplx));
  cplx *b = bind_newcvec(L, (size_t)depth + 2);
  if (circle_dF_laurent(p, c, rho, (int)n, (int)depth, work, b) != STEEP_OK) lua_pushnil(L);
  return 1;
}

/* ---- rings ---------------------------------------------------------------------- */

/* core.ring_power(tape, params, c, r2, r3, n) -> growth, degree, lead2, lead3: see
 * ring_power in rings.h (lead2, lead3 nil when the growth is not a whole power). */
static int land_ring_power(lua_State *L) {
  problem *p = checkproblem(L);
  cplx c = bind_checkcomplex(L, 3);
  double r2 = luaL_checknumber(L, 4), r3 = luaL_checknumber(L, 5);
  lua_Integer n = luaL_checkinteger(L, 6);
  luaL_argcheck(L, r2 > 0 && r3 > r2 && isfinite(r3), 5, "radii must satisfy 0 < r2 < r3 < inf");
  luaL_argcheck(L, n >= 4 && n <= 65536, 6, "number of angles must be 4..65536");
  cplx *work = bind_array(L, 3 * (size_t)n, sizeof(cplx));
  double growth;
  cplx lead2, lead3;
  int deg = ring_power(p, c, r2, r3, (int)n, &growth, &lead2, &lead3, work);
  lua_pushnumber(L, growth);
  lua_pushinteger(L, deg);
  if (deg == 0) return 2;
  bind_pushcomplex(L, lead2);
  bind_pushcomplex(L, lead3);
  return 4;
}

/* core.log_spread(tape, params, c, rho, n) -> spread of log |g e^F| on the circle */
static int land_log_spread(lua_State *L) {
  problem *p = checkproblem(L);
  cplx c = bind_checkcomplex(L, 3);
  double rho = luaL_checknumber(L, 4);
  lua_Integer n = luaL_checkinteger(L, 5);
  luaL_argcheck(L, rho > 0 && isfinite(rho), 4, "radius must be positive and finite");
  luaL_argcheck(L, n >= 4 && n <= 65536, 5, "number of points must be 4..65536");
  lua_pushnumber(L, ring_log_spread(p, c, rho, (int)n));
  return 1;
}

/* ---- geometry ------------------------------------------------------------------- */

/* core.turning(points, z) -> change of arg(t - z) / 2pi along the polyline, or nil if
 * the polyline passes through z */
static int geo_turning(lua_State *L) {
  size_t n = 0;
  cplx *pts = bind_checkpoints(L, 1, &n);
  double w = geom_turning(pts, n, bind_checkcomplex(L, 2));
  if (isnan(w)) lua_pushnil(L);
  else lua_pushnumber(L, w);
  return 1;
}

/* core.crossings(a, b) -> signed count, list of crossing points */
static int geo_crossings(lua_State *L) {
  size_t na = 0, nb = 0, found = 0;
  cplx *a = bind_checkpoints(L, 1, &na), *b = bind_checkpoints(L, 2, &nb);
  enum { MAXP = 256 };
  cplx pts[MAXP];
  int total = geom_crossings(a, na, b, nb, pts, MAXP, &found);
  lua_pushinteger(L, total);
  size_t shown = found < MAXP ? found : MAXP;
  lua_createtable(L, (int)shown, 0);
  for (size_t k = 0; k < shown; k++) {
    bind_pushcomplex(L, pts[k]);
    lua_rawseti(L, -2, (lua_Integer)k + 1);
  }
  return 2;
}

/* core.distance(points, z) -> distance from z to the polyline */
static int geo_distance(lua_State *L) {
  size_t n = 0;
  cplx *pts = bind_checkpoints(L, 1, &n);
  lua_pushnumber(L, geom_distance(pts, n, bind_checkcomplex(L, 2)));
  return 1;
}

/* core.nearest(points, z) -> distance, k: the first segment points[k]..points[k+1]
 * nearest to z (1-based; the polyline needs two points) */
static int geo_nearest(lua_State *L) {
  size_t n = 0, seg = 0;
  cplx *pts = bind_checkpoints(L, 1, &n);
  cplx z = bind_checkcomplex(L, 2);
  luaL_argcheck(L, n >= 2, 1, "a polyline of at least two points expected");
  lua_pushnumber(L, geom_nearest(pts, n, z, &seg));
  lua_pushinteger(L, (lua_Integer)seg + 1);
  return 2;
}

static const luaL_Reg land_funcs[] = {
  {"zero", land_zero}, {"count", land_count}, {"zeros", land_zeros}, {"aberth", land_aberth},
  {"trace", land_trace},
  {"saddle_starts", land_saddle_starts}, {"saddle_quad", land_saddle_quad},
  {"quad_polyline", land_quad_polyline},
  {"short_stretches", land_short_stretches},
  {"integrand_many", land_integrand_many}, {"invmap_circle", land_invmap},
  {"invmap_cubic", land_invmap_cubic}, {"invmap_quartic", land_invmap_quartic},
  {"laurent", land_laurent},
  {"ring_quietest", land_ring_quietest}, {"log_coefficient", land_log_coefficient},
  {"dF_laurent", land_dF_laurent},
  {"branch_jump", land_branch_jump}, {"ring_power", land_ring_power}, {"log_spread", land_log_spread},
  {"turning", geo_turning}, {"crossings", geo_crossings}, {"distance", geo_distance},
  {"nearest", geo_nearest},
  {NULL, NULL}
};

void bind_landscape_open(lua_State *L) { luaL_setfuncs(L, land_funcs, 0); }
