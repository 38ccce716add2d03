/*
 * bind_series.c — the steep.series userdata: a truncated power series with complex
 * coefficients c_0 .. c_N (N = its order). Arithmetic between series of different
 * orders truncates to the smaller order; numbers and complex values act as constant
 * series. The kernels are in series.c.
 */
#include <math.h>
#include <string.h>
#include "bind.h"
#include "series.h"

typedef struct {
  size_t n;          /* coefficients, order + 1 */
  cplx c[];
} series;

#define checkseries(L, i) ((series *)luaL_checkudata(L, i, STEEP_SERIES_MT))

static int finite_c(cplx z) { return isfinite(creal(z)) && isfinite(cimag(z)); }

static series *newseries(lua_State *L, size_t n) {
  series *s = lua_newuserdatauv(L, sizeof(series) + n * sizeof(cplx), 0);
  s->n = n;
  memset(s->c, 0, n * sizeof(cplx));
  luaL_setmetatable(L, STEEP_SERIES_MT);
  return s;
}

/* steep.series{c0, c1, ...}: coefficients as numbers or complex values. */
static int series_new(lua_State *L) {
  luaL_checktype(L, 1, LUA_TTABLE);
  lua_Integer len = luaL_len(L, 1);
  if (len < 1 || len > STEEP_MAX_ORDER + 1)
    return luaL_argerror(L, 1, lua_pushfstring(L, "expected 1 to %d coefficients, got %I",
                                               STEEP_MAX_ORDER + 1, len));
  series *s = newseries(L, (size_t)len);
  for (lua_Integer k = 1; k <= len; k++) {
    lua_geti(L, 1, k);
    if (!bind_tocomplex(L, -1, &s->c[k - 1]))
      return luaL_error(L, "bad argument #1 to 'series' (coefficient %I is a %s, "
                        "number or complex expected)", k, luaL_typename(L, -1));
    if (!finite_c(s->c[k - 1]))
      return luaL_error(L, "bad argument #1 to 'series' (coefficient %I is not finite: a NaN "
                        "or an infinity)", k);
    lua_pop(L, 1);
  }
  return 1;
}

/* Pushes a series view of argument i: the series itself, or a constant series of
 * length n for a number or complex value. */
static const cplx *operand(lua_State *L, int i, size_t n, size_t *len) {
  series *s = luaL_testudata(L, i, STEEP_SERIES_MT);
  if (s) { *len = s->n; return s->c; }
  cplx z;
  if (!bind_tocomplex(L, i, &z))
    luaL_error(L, "series arithmetic with a %s (number, complex or series expected)",
               luaL_typename(L, i));
  if (!finite_c(z))
    luaL_error(L, "series arithmetic with a value that is not finite (a NaN or an infinity)");
  cplx *c = bind_array(L, n, sizeof(cplx));
  memset(c, 0, n * sizeof(cplx));
  c[0] = z;
  *len = n;
  return c;
}

/* Common length of a binary operation: the smaller order of the series operands. */
static size_t binary_len(lua_State *L) {
  series *a = luaL_testudata(L, 1, STEEP_SERIES_MT), *b = luaL_testudata(L, 2, STEEP_SERIES_MT);
  if (a && b) return a->n < b->n ? a->n : b->n;
  return a ? a->n : b->n;
}

static int series_arith(lua_State *L, int op) {
  size_t n = binary_len(L), la, lb;
  const cplx *a = operand(L, 1, n, &la), *b = operand(L, 2, n, &lb);
  series *r = newseries(L, n);
  switch (op) {
    case '+': for (size_t k = 0; k < n; k++) r->c[k] = a[k] + b[k]; break;
    case '-': for (size_t k = 0; k < n; k++) r->c[k] = a[k] - b[k]; break;
    case '*': ser_mul(r->c, a, b, n); break;
    default:
      if (ser_div(r->c, a, b, n) != STEEP_OK)
        return luaL_error(L, "series division: the divisor's constant term is zero");
  }
  return 1;
}

static int series_add(lua_State *L) { return series_arith(L, '+'); }
static int series_sub(lua_State *L) { return series_arith(L, '-'); }
static int series_mul(lua_State *L) { return series_arith(L, '*'); }
static int series_div(lua_State *L) { return series_arith(L, '/'); }

static int series_unm(lua_State *L) {
  series *a = checkseries(L, 1), *r = newseries(L, a->n);
  for (size_t k = 0; k < a->n; k++) r->c[k] = -a->c[k];
  return 1;
}

/* s ^ p: integer p by binary powering, otherwise the principal branch (c_0 != 0). */
static int series_pow(lua_State *L) {
  series *a = checkseries(L, 1);
  cplx p = bind_checkcomplex(L, 2);
  if (!finite_c(p)) return luaL_error(L, "series power: the exponent is not finite (a NaN or an infinity)");
  size_t n = a->n;
  int isint = 0;
  lua_Integer m = lua_isinteger(L, 2) ? (isint = 1, lua_tointeger(L, 2)) : 0;
  if (!isint && cimag(p) == 0 && creal(p) == floor(creal(p)) && fabs(creal(p)) < 1e9) {
    isint = 1;
    m = (lua_Integer)creal(p);
  }
  if (isint && (m > 1000000000 || m < -1000000000))
    return luaL_error(L, "series power: exponent %I is too large", m);
  cplx *work = bind_array(L, 2 * n, sizeof(cplx));
  series *r = newseries(L, n);
  int st = isint ? ser_powi(r->c, a->c, (long)m, n, work) : ser_pow(r->c, a->c, p, n);
  if (st != STEEP_OK)
    return luaL_error(L, "series power: the constant term is zero, so %s",
                      isint ? "a negative power has no power series"
                            : "a non-integer power has a branch point here");
  return 1;
}

static int series_coef(lua_State *L) {
  series *s = checkseries(L, 1);
  lua_Integer k = luaL_checkinteger(L, 2);
  if (k < 0 || (size_t)k >= s->n)
    return luaL_argerror(L, 2, lua_pushfstring(L, "coefficient %I outside 0..%d", k,
                                               (int)s->n - 1));
  bind_pushcomplex(L, s->c[k]);
  return 1;
}

static int series_order(lua_State *L) {
  lua_pushinteger(L, (lua_Integer)checkseries(L, 1)->n - 1);
  return 1;
}

/* s:coefs() -> list of the coefficients as complex values. */
static int series_coefs(lua_State *L) {
  series *s = checkseries(L, 1);
  lua_createtable(L, (int)s->n, 0);
  for (size_t k = 0; k < s->n; k++) {
    bind_pushcomplex(L, s->c[k]);
    lua_rawseti(L, -2, (lua_Integer)k + 1);
  }
  return 1;
}

enum { F_EXP, F_LOG, F_SQRT, F_SIN, F_COS, F_TAN, F_SINH, F_COSH, F_TANH, F_ATAN };

static int series_fn(lua_State *L, int f, const char *name) {
  series *a = checkseries(L, 1);
  size_t n = a->n;
  cplx *work = bind_array(L, 2 * n, sizeof(cplx));
  series *r = newseries(L, n);
  int st = STEEP_OK;
  switch (f) {
    case F_EXP: ser_exp(r->c, a->c, n); break;
    case F_LOG: st = ser_log(r->c, a->c, n); break;
    case F_SQRT: st = ser_sqrt(r->c, a->c, n); break;
    case F_SIN: ser_sincos(r->c, work, a->c, n); break;
    case F_COS: ser_sincos(work, r->c, a->c, n); break;
    case F_SINH: ser_sinhcosh(r->c, work, a->c, n); break;
    case F_COSH: ser_sinhcosh(work, r->c, a->c, n); break;
    case F_TAN: st = ser_tan(r->c, a->c, n, work); break;
    case F_TANH: st = ser_tanh(r->c, a->c, n, work); break;
    default: st = ser_atan(r->c, a->c, n, work); break;
  }
  if (st != STEEP_OK) {
    char c0[64];   /* lua_pushfstring has no %g nor flags such as %+ */
    snprintf(c0, sizeof c0, "%.15g%+.15gi", creal(a->c[0]), cimag(a->c[0]));
    return luaL_error(L, "series %s: singular at the constant term %s", name, c0);
  }
  return 1;
}

#define SERIES_FN(f, F) static int series_##f(lua_State *L) { return series_fn(L, F, #f); }
SERIES_FN(exp, F_EXP)
SERIES_FN(log, F_LOG)
SERIES_FN(sqrt, F_SQRT)
SERIES_FN(sin, F_SIN)
SERIES_FN(cos, F_COS)
SERIES_FN(tan, F_TAN)
SERIES_FN(sinh, F_SINH)
SERIES_FN(cosh, F_COSH)
SERIES_FN(tanh, F_TANH)
SERIES_FN(atan, F_ATAN)

static int series_compose(lua_State *L) {
  series *a = checkseries(L, 1), *r = checkseries(L, 2);
  if (r->c[0] != 0)
    return luaL_argerror(L, 2, "inner series must have a zero constant term");
  size_t n = a->n < r->n ? a->n : r->n;
  cplx *work = bind_array(L, 2 * n, sizeof(cplx));
  series *out = newseries(L, n);
  ser_compose(out->c, a->c, r->c, n, work);
  return 1;
}

static int series_revert(lua_State *L) {
  series *a = checkseries(L, 1);
  if (a->n < 2) return luaL_error(L, "series revert: needs order >= 1");
  if (a->c[0] != 0) return luaL_error(L, "series revert: the constant term must be zero");
  if (a->c[1] == 0)
    return luaL_error(L, "series revert: the linear coefficient is zero (not invertible)");
  cplx *work = bind_array(L, bind_mulcount(L, a->n, a->n), sizeof(cplx));
  series *out = newseries(L, a->n);
  ser_revert(out->c, a->c, a->n, work);
  return 1;
}

static int series_deriv(lua_State *L) {
  series *a = checkseries(L, 1);
  if (a->n < 2) return luaL_error(L, "series deriv: a series of order 0 has no known derivative");
  series *out = newseries(L, a->n - 1);
  ser_deriv(out->c, a->c, a->n);
  return 1;
}

static int series_integ(lua_State *L) {
  series *a = checkseries(L, 1);
  if (a->n > STEEP_MAX_ORDER)
    return luaL_error(L, "series integ: the order would exceed %d", STEEP_MAX_ORDER);
  series *out = newseries(L, a->n + 1);
  ser_integ(out->c, a->c, a->n);
  return 1;
}

/* Appends " + c*z^k" in readable form: the sign pulled out of real coefficients, a unit
 * coefficient left out, complex ones in parentheses. */
static void add_term(luaL_Buffer *b, cplx c, size_t k, int first) {
  char buf[96];
  int len = 0;
  double re = creal(c), im = cimag(c);
  if (im == 0) {
    const char *sign = re < 0 ? (first ? "-" : " - ") : (first ? "" : " + ");
    double m = fabs(re);
    if (m == 1 && k > 0) len = snprintf(buf, sizeof buf, "%s", sign);
    else len = snprintf(buf, sizeof buf, "%s%.15g%s", sign, m, k > 0 ? "*" : "");
  } else {
    len = snprintf(buf, sizeof buf, "%s(%.15g%+.15gi)%s", first ? "" : " + ", re, im,
                   k > 0 ? "*" : "");
  }
  if (k == 1) snprintf(buf + len, sizeof buf - len, "z");
  else if (k > 1) snprintf(buf + len, sizeof buf - len, "z^%zu", k);
  luaL_addstring(b, buf);
}

static int series_tostring(lua_State *L) {
  series *s = checkseries(L, 1);
  luaL_Buffer b;
  luaL_buffinit(L, &b);
  int first = 1;
  for (size_t k = 0; k < s->n; k++) {
    if (s->c[k] == 0) continue;
    add_term(&b, s->c[k], k, first);
    first = 0;
  }
  if (first) luaL_addstring(&b, "0");
  lua_pushfstring(L, " + O(z^%d)", (int)s->n);
  luaL_addvalue(&b);
  luaL_pushresult(&b);
  return 1;
}

static int series_len(lua_State *L) {
  lua_pushinteger(L, (lua_Integer)checkseries(L, 1)->n);
  return 1;
}

static const luaL_Reg series_methods[] = {
  {"coef", series_coef}, {"coefs", series_coefs}, {"order", series_order},
  {"exp", series_exp}, {"log", series_log}, {"sqrt", series_sqrt},
  {"sin", series_sin}, {"cos", series_cos}, {"tan", series_tan},
  {"sinh", series_sinh}, {"cosh", series_cosh}, {"tanh", series_tanh},
  {"atan", series_atan}, {"compose", series_compose}, {"revert", series_revert},
  {"deriv", series_deriv}, {"integ", series_integ},
  {NULL, NULL}
};

static const luaL_Reg series_meta[] = {
  {"__add", series_add}, {"__sub", series_sub}, {"__mul", series_mul},
  {"__div", series_div}, {"__unm", series_unm}, {"__pow", series_pow},
  {"__tostring", series_tostring}, {"__len", series_len},
  {NULL, NULL}
};

/* Called with the module table on top: adds core.series and the metatable. */
void bind_series_open(lua_State *L) {
  luaL_newmetatable(L, STEEP_SERIES_MT);
  luaL_setfuncs(L, series_meta, 0);
  luaL_newlib(L, series_methods);
  lua_setfield(L, -2, "__index");
  lua_pushliteral(L, "steep.series");
  lua_setfield(L, -2, "__name");
  lua_pop(L, 1);
  lua_pushcfunction(L, series_new);
  lua_setfield(L, -2, "series");
}

/* For bind_tape.c: a new series userdata with the given coefficients. */
void bind_pushseries(lua_State *L, const cplx *c, size_t n) {
  series *s = newseries(L, n);
  memcpy(s->c, c, n * sizeof(cplx));
}
