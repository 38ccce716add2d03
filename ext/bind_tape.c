/*
 * bind_tape.c — the steep.tape userdata: building a tape from the instruction list
 * that lua/steep/expr.lua emits, and evaluating it (value, batch, jet).
 *
 * Lua form of a tape (slots are 1-based on the Lua side):
 *   core.tape{ code = { {"var"}, {"const", c = 2}, {"mul", a = 1, b = 2},
 *                       {"param", k = 1}, {"powi", a = 3, k = 3}, ... },
 *              params = {"x", ...}, outputs = {5, ...} }
 * The parameter names live in the userdata's user value; everything else is in one
 * block of userdata memory, so a tape needs no __gc and cannot leak.
 */
#include <math.h>
#include <string.h>
#include "bind.h"
#include "tape.h"

#define checktape(L, i) ((tape *)luaL_checkudata(L, i, STEEP_TAPE_MT))

/* The userdata block starts with the tape and a tally of the evaluations made through it
 * by every binding (values, batches, jets, and the problems of the landscape kernels):
 * for benchmarks and tests that count work, never for decisions. */
typedef struct { tape t; long tally; } tape_block;

static size_t align16(size_t s) { return (s + 15) & ~(size_t)15; }

static lua_Integer field_int(lua_State *L, int tidx, const char *key, lua_Integer dflt,
                             lua_Integer j) {
  lua_Integer v = dflt;
  int t = lua_getfield(L, tidx, key);
  if (t != LUA_TNIL) {
    int ok = 0;
    v = lua_tointegerx(L, -1, &ok);
    if (!ok) luaL_error(L, "tape: instruction %I: field '%s' must be an integer", j, key);
  }
  lua_pop(L, 1);
  return v;
}

static lua_Integer table_len(lua_State *L, int idx, const char *what, lua_Integer max) {
  if (lua_type(L, idx) != LUA_TTABLE) luaL_error(L, "tape: '%s' must be a table", what);
  lua_Integer n = luaL_len(L, idx);
  if (n < 0 || n > max) luaL_error(L, "tape: '%s' has %I entries (at most %I)", what, n, max);
  return n;
}

/* Reads instruction j (1-based) from the table on top of the stack. */
static void read_ins(lua_State *L, tape_ins *in, lua_Integer j) {
  int top = lua_gettop(L);
  if (lua_type(L, top) != LUA_TTABLE) luaL_error(L, "tape: instruction %I is not a table", j);
  lua_geti(L, top, 1);
  const char *name = lua_tostring(L, -1);
  in->op = name ? tape_op_lookup(name) : -1;
  if (in->op < 0) luaL_error(L, "tape: instruction %I: unknown operation '%s'", j,
                             name ? name : luaL_typename(L, -1));
  lua_pop(L, 1);
  in->a = (int)field_int(L, top, "a", 0, j) - 1;
  in->b = (int)field_int(L, top, "b", 0, j) - 1;
  in->k = (long)field_int(L, top, "k", 0, j);
  if (in->op == OP_PARAM) in->k -= 1;
  if (in->op == OP_POWI && (in->k > 1000000000L || in->k < -1000000000L))
    luaL_error(L, "tape: instruction %I: integer power %d is too large", j, (int)in->k);
  in->c = 0;
  lua_getfield(L, top, "c");
  if (!lua_isnil(L, -1) && !bind_tocomplex(L, -1, &in->c))
    luaL_error(L, "tape: instruction %I: constant must be a number or complex", j);
  lua_pop(L, 1);
  if ((in->op == OP_CONST || in->op == OP_POWC) && !(isfinite(creal(in->c)) && isfinite(cimag(in->c))))
    luaL_error(L, "tape: instruction %I: constant is not finite", j);
  int ar = tape_arity(in->op);
  if (ar < 1) in->a = -1;
  if (ar < 2) in->b = -1;
}

static int tape_new(lua_State *L) {
  luaL_checktype(L, 1, LUA_TTABLE);
  lua_getfield(L, 1, "code");
  lua_getfield(L, 1, "params");
  lua_getfield(L, 1, "outputs");             /* stack: spec code params outputs */
  lua_Integer n = table_len(L, 2, "code", STEEP_MAX_TAPE);
  lua_Integer np = lua_isnil(L, 3) ? 0 : table_len(L, 3, "params", STEEP_MAX_PARAMS);
  lua_Integer no = table_len(L, 4, "outputs", STEEP_MAX_TAPE);
  if (n == 0) return luaL_error(L, "tape: empty code");
  size_t off_ins = align16(sizeof(tape_block));
  size_t off_out = off_ins + align16((size_t)n * sizeof(tape_ins));
  size_t off_var = off_out + align16((size_t)no * sizeof(int));
  char *mem = lua_newuserdatauv(L, off_var + (size_t)n, 1);   /* index 5 */
  tape *t = (tape *)mem;
  ((tape_block *)mem)->tally = 0;
  t->n = (size_t)n;
  t->nparams = (size_t)np;
  t->nout = (size_t)no;
  t->ins = (tape_ins *)(mem + off_ins);
  t->out = (int *)(mem + off_out);
  t->varying = (unsigned char *)(mem + off_var);
  for (lua_Integer j = 1; j <= n; j++) {
    lua_geti(L, 2, j);
    read_ins(L, &t->ins[j - 1], j);
    lua_pop(L, 1);
  }
  for (lua_Integer o = 1; o <= no; o++) {
    lua_geti(L, 4, o);
    int ok = 0;
    lua_Integer s = lua_tointegerx(L, -1, &ok);
    if (!ok) return luaL_error(L, "tape: output %I is not an integer", o);
    t->out[o - 1] = (s >= 1 && s <= n) ? (int)(s - 1) : -1;
    lua_pop(L, 1);
  }
  const char *why = "";
  long bad = tape_check(t, &why);
  if (bad >= 0)
    return bad == (long)n ? luaL_error(L, "tape: %s", why)
                          : luaL_error(L, "tape: instruction %d: %s", (int)bad + 1, why);
  lua_createtable(L, (int)np, 0);
  for (lua_Integer i = 1; i <= np; i++) {
    lua_geti(L, 3, i);
    if (lua_type(L, -1) != LUA_TSTRING) return luaL_error(L, "tape: parameter %I has no name", i);
    lua_rawseti(L, -2, i);
  }
  lua_setiuservalue(L, 5, 1);
  luaL_setmetatable(L, STEEP_TAPE_MT);
  return 1;
}

/* Reads the parameter values of tape t (userdata at index tidx) from the table at pidx,
 * by name. Unbound, non-numeric and non-finite values are errors naming the parameter. */
static cplx *params_of(lua_State *L, const tape *t, int tidx, int pidx) {
  if (t->nparams == 0) return bind_scratch(L, 0);
  /* Checked before the scratch below is pushed: with the argument absent, pidx would
   * otherwise name that scratch userdata. */
  if (lua_isnoneornil(L, pidx)) {
    lua_getiuservalue(L, tidx, 1);
    lua_rawgeti(L, -1, 1);
    luaL_error(L, "unbound parameter '%s' (no table of parameter values given)",
               lua_tostring(L, -1));
  }
  if (lua_type(L, pidx) != LUA_TTABLE)
    luaL_typeerror(L, pidx, "table of parameter values");
  cplx *p = bind_array(L, t->nparams, sizeof(cplx));
  lua_getiuservalue(L, tidx, 1);
  for (size_t i = 0; i < t->nparams; i++) {
    lua_rawgeti(L, -1, (lua_Integer)i + 1);
    const char *name = lua_tostring(L, -1);
    lua_gettable(L, pidx);   /* value under that name */
    if (lua_isnil(L, -1)) luaL_error(L, "unbound parameter '%s'", name);
    if (!bind_tocomplex(L, -1, &p[i]))
      luaL_error(L, "parameter '%s' must be a number or complex value, got %s", name,
                 luaL_typename(L, -1));
    if (!isfinite(creal(p[i])) || !isfinite(cimag(p[i])))
      luaL_error(L, "parameter '%s' is not finite", name);
    lua_pop(L, 1);
  }
  lua_pop(L, 1);
  return p;
}

static cplx *read_params(lua_State *L, const tape *t, int pidx) {
  return params_of(L, t, 1, pidx);
}

const tape *bind_checktape(lua_State *L, int idx) { return checktape(L, idx); }

long *bind_tapetally(lua_State *L, int idx) {
  return &((tape_block *)luaL_checkudata(L, idx, STEEP_TAPE_MT))->tally;
}

cplx *bind_tapeparams(lua_State *L, int tidx, int pidx) {
  return params_of(L, checktape(L, tidx), lua_absindex(L, tidx), lua_absindex(L, pidx));
}

/* tape:eval(x [, params]) -> one complex value per output. */
static int tape_eval_l(lua_State *L) {
  tape *t = checktape(L, 1);
  cplx x = bind_checkcomplex(L, 2);
  cplx *p = read_params(L, t, 3);
  cplx *work = bind_array(L, t->n + t->nout, sizeof(cplx));
  cplx *out = work + t->n;
  tape_eval(t, x, p, out, work);
  ((tape_block *)t)->tally++;
  luaL_checkstack(L, (int)t->nout, "too many outputs");
  for (size_t o = 0; o < t->nout; o++) bind_pushcomplex(L, out[o]);
  return (int)t->nout;
}

/* tape:eval_many(points [, params]): points a steep.cvec (result: one cvec per output)
 * or a list of numbers/complex values (result: one list per output). */
static int tape_eval_many(lua_State *L) {
  tape *t = checktape(L, 1);
  size_t m = 0;
  cplx *xs = bind_tocvec(L, 2, &m);
  int as_cvec = xs != NULL;
  cplx *p = read_params(L, t, 3);
  if (!as_cvec) {
    if (lua_type(L, 2) != LUA_TTABLE) return luaL_typeerror(L, 2, "steep.cvec or list of points");
    m = bind_checklen(L, 2, STEEP_MAX_POINTS, "points");
    xs = bind_array(L, m, sizeof(cplx));
    for (size_t i = 0; i < m; i++) {
      lua_geti(L, 2, (lua_Integer)i + 1);
      if (!bind_tocomplex(L, -1, &xs[i]))
        return luaL_argerror(L, 2, lua_pushfstring(L, "point %I is a %s", (lua_Integer)i + 1,
                                                   luaL_typename(L, -1)));
      lua_pop(L, 1);
    }
  }
  cplx *work = bind_array(L, bind_mulcount(L, t->n, TAPE_BLOCK), sizeof(cplx));
  cplx *out = bind_array(L, bind_mulcount(L, t->nout, m) + 1, sizeof(cplx));
  tape_eval_batch(t, xs, m, p, out, work);
  ((tape_block *)t)->tally += (long)m;
  luaL_checkstack(L, (int)t->nout + 2, "too many outputs");
  for (size_t o = 0; o < t->nout; o++) {
    if (as_cvec) {
      memcpy(bind_newcvec(L, m), out + o * m, m * sizeof(cplx));
    } else {
      lua_createtable(L, (int)m, 0);
      for (size_t i = 0; i < m; i++) {
        bind_pushcomplex(L, out[o * m + i]);
        lua_rawseti(L, -2, (lua_Integer)i + 1);
      }
    }
  }
  return (int)t->nout;
}

/* tape:rounding(points [, params]) -> for each output a list of bounds on the rounding
 * error of its value at the points (tape_eval_rounding); points a steep.cvec. */
static int tape_rounding_l(lua_State *L) {
  tape *t = checktape(L, 1);
  size_t m = 0;
  cplx *xs = bind_tocvec(L, 2, &m);
  if (!xs) return luaL_typeerror(L, 2, "steep.cvec");
  cplx *p = read_params(L, t, 3);
  cplx *work = bind_array(L, t->n + t->nout, sizeof(cplx));
  double *ework = bind_array(L, t->n + t->nout, sizeof(double));
  cplx *out = work + t->n;
  double *err = ework + t->n;
  luaL_checkstack(L, (int)t->nout + 2, "too many outputs");
  int first = lua_gettop(L) + 1;
  for (size_t o = 0; o < t->nout; o++) lua_createtable(L, (int)m, 0);
  for (size_t i = 0; i < m; i++) {
    tape_eval_rounding(t, xs[i], p, out, err, work, ework);
    for (size_t o = 0; o < t->nout; o++) {
      lua_pushnumber(L, err[o]);
      lua_rawseti(L, first + (int)o, (lua_Integer)i + 1);
    }
  }
  ((tape_block *)t)->tally += (long)m;
  return (int)t->nout;
}

static const char *status_text(int st) {
  switch (st) {
    case STEEP_SINGULAR: return "is singular there";
    case STEEP_BRANCH: return "has a branch point there";
    default: return "gives a non-finite value there";
  }
}

/* tape:jet(x, order [, params [, k]]) -> one steep.series of that order per output (or for
 * the first k outputs only). */
static int tape_jet_l(lua_State *L) {
  tape *t = checktape(L, 1);
  cplx x = bind_checkcomplex(L, 2);
  size_t order = bind_checkorder(L, 3);
  /* optional 5th argument: only the first k outputs (and the instructions they need) */
  lua_Integer k = luaL_optinteger(L, 5, (lua_Integer)t->nout);
  luaL_argcheck(L, k >= 1 && (size_t)k <= t->nout, 5, "number of outputs out of range");
  cplx *p = read_params(L, t, 4);
  size_t n = order + 1, upto = 0;
  for (lua_Integer o = 0; o < k; o++) if ((size_t)t->out[o] > upto) upto = (size_t)t->out[o];
  cplx *work = bind_array(L, bind_mulcount(L, t->n, n), sizeof(cplx));
  cplx *scratch = bind_array(L, 4 * n, sizeof(cplx));
  long bad = -1;
  int st = tape_jet_upto(t, x, p, order, work, scratch, &bad, upto);
  ((tape_block *)t)->tally++;
  if (st != STEEP_OK) {
    char at[64];   /* lua_pushfstring has no %g nor flags such as %+ */
    snprintf(at, sizeof at, "%.15g%+.15gi", creal(x), cimag(x));
    return luaL_error(L, "jet at %s: %s (instruction %d) %s", at,
                      tape_op_name(t->ins[bad].op), (int)bad + 1, status_text(st));
  }
  luaL_checkstack(L, (int)k, "too many outputs");
  for (lua_Integer o = 0; o < k; o++) bind_pushseries(L, work + (size_t)t->out[o] * n, n);
  return (int)k;
}

/* tape:dump() -> a listing, one instruction a line, like a disassembler. */
static int tape_dump(lua_State *L) {
  tape *t = checktape(L, 1);
  luaL_Buffer b;
  char line[160];
  lua_getiuservalue(L, 1, 1);   /* before the buffer: its stack use must stay balanced */
  int names = lua_gettop(L);
  luaL_buffinit(L, &b);
  for (size_t j = 0; j < t->n; j++) {
    const tape_ins *in = &t->ins[j];
    int len = snprintf(line, sizeof line, "%4zu%s %-6s", j + 1, t->varying[j] ? "*" : " ",
                       tape_op_name(in->op));
    switch (in->op) {
      case OP_CONST: case OP_POWC:
        if (in->op == OP_POWC) len += snprintf(line + len, sizeof line - len, " %d", in->a + 1);
        snprintf(line + len, sizeof line - len, " (%.17g%+.17gi)\n", creal(in->c), cimag(in->c));
        break;
      case OP_PARAM:
        lua_rawgeti(L, names, (lua_Integer)in->k + 1);
        snprintf(line + len, sizeof line - len, " %s\n", lua_tostring(L, -1));
        lua_pop(L, 1);
        break;
      case OP_POWI:
        snprintf(line + len, sizeof line - len, " %d ^%ld\n", in->a + 1, in->k);
        break;
      default:
        if (in->b >= 0) snprintf(line + len, sizeof line - len, " %d %d\n", in->a + 1, in->b + 1);
        else if (in->a >= 0) snprintf(line + len, sizeof line - len, " %d\n", in->a + 1);
        else snprintf(line + len, sizeof line - len, "\n");
    }
    lua_pushstring(L, line);   /* add from the stack: the buffer may sit on it */
    luaL_addvalue(&b);
  }
  luaL_addstring(&b, "out");
  for (size_t o = 0; o < t->nout; o++) {
    snprintf(line, sizeof line, " %d", t->out[o] + 1);
    luaL_addstring(&b, line);
  }
  luaL_addstring(&b, "\n");
  luaL_pushresult(&b);
  return 1;
}

/* tape:params() -> list of parameter names, in binding order. */
static int tape_params(lua_State *L) {
  tape *t = checktape(L, 1);
  lua_createtable(L, (int)t->nparams, 0);
  lua_getiuservalue(L, 1, 1);
  for (size_t i = 1; i <= t->nparams; i++) {
    lua_rawgeti(L, -1, (lua_Integer)i);
    lua_rawseti(L, -3, (lua_Integer)i);
  }
  lua_pop(L, 1);
  return 1;
}

static int tape_size(lua_State *L) {
  tape *t = checktape(L, 1);
  lua_pushinteger(L, (lua_Integer)t->n);
  lua_pushinteger(L, (lua_Integer)t->nout);
  return 2;
}

/* tape:evals() -> the evaluations made through this tape so far (every binding: values,
 * batches, jets, Newton, paths, quadrature, counts; a jet counts one). */
static int tape_evals(lua_State *L) {
  checktape(L, 1);
  lua_pushinteger(L, (lua_Integer)*bind_tapetally(L, 1));
  return 1;
}

static int tape_tostring(lua_State *L) {
  tape *t = checktape(L, 1);
  lua_pushfstring(L, "steep.tape (%d instructions, %d parameters, %d outputs)", (int)t->n,
                  (int)t->nparams, (int)t->nout);
  return 1;
}

static const luaL_Reg tape_methods[] = {
  {"eval", tape_eval_l}, {"eval_many", tape_eval_many}, {"jet", tape_jet_l},
  {"rounding", tape_rounding_l},
  {"dump", tape_dump}, {"params", tape_params}, {"size", tape_size}, {"evals", tape_evals},
  {NULL, NULL}
};

void bind_tape_open(lua_State *L) {
  luaL_newmetatable(L, STEEP_TAPE_MT);
  lua_pushcfunction(L, tape_tostring);
  lua_setfield(L, -2, "__tostring");
  luaL_newlib(L, tape_methods);
  lua_setfield(L, -2, "__index");
  lua_pop(L, 1);
  lua_pushcfunction(L, tape_new);
  lua_setfield(L, -2, "tape");
  lua_pushinteger(L, STEEP_MAX_TAPE);   /* so the Lua side can name the limit */
  lua_setfield(L, -2, "max_tape");
}
