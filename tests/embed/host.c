/*
 * host.c — a C program that embeds Lua and steep, as an application would.
 *
 * The extension is linked into the program (no core.so is loaded): each lua_State opens
 * the standard libraries, registers steep.core with luaL_requiref, and finds the Lua part
 * of steep in <root>/lua. The analysis is Airy's integral
 *   J(x) = integral over the real line of exp(i (t^3/3 + x t)) dt = 2 pi Ai(x),
 * by quadrature (J:quad) and by a four-term expansion (J:expand) at x = 5 and x = 7.
 *
 * It runs the analysis once per x value in sequence, then in several rounds of two
 * lua_States in two threads at the same time, and compares every threaded result with
 * the sequential one bit for bit: the module keeps no state outside its lua_State.
 *
 * The host installs its own GSL error handler before loading steep, and checks after all
 * runs that it is still the one in force and still called on a GSL error: an embedded
 * module must leave the host's process-wide settings as it found them.
 *
 * Usage: host [root]   (root of the source tree, default "."). Output:
 *   airy <x> quad <re> <im> <error> expand <re> <im> <error>    (sequential runs)
 *   threads: <n> runs, <m> identical to the sequential runs
 *   gsl handler: kept | replaced, <k> calls
 * Exit status 0 when every run succeeded and every threaded result was identical.
 */
#define _POSIX_C_SOURCE 200809L
#include <pthread.h>
#include <stdio.h>
#include <string.h>
#include <lua.h>
#include <lauxlib.h>
#include <lualib.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_sf_log.h>

/* The host's own GSL error handler: it counts the errors it is told of (the host runs
 * GSL only from its main thread, after the threads have finished). */
static int host_gsl_errors = 0;
static void host_gsl_handler(const char *reason, const char *file, int line, int gsl_errno) {
  (void)reason; (void)file; (void)line; (void)gsl_errno;
  host_gsl_errors++;
}

int luaopen_steep_core(lua_State *L);

/* The chunk returns a function of x giving six numbers. */
static const char ANALYSIS[] =
  "local steep = require 'steep'\n"
  "assert(package.searchpath('steep.core', package.cpath) == nil, 'a core.so is reachable')\n"
  "local t, x = steep.var 't', steep.param 'x'\n"
  "local J = steep.integral { var = t, exponent = steep.I * (t ^ 3 / 3 + x * t),\n"
  "  contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = x }\n"
  "local function parts(v)\n"
  "  if type(v) == 'number' then return v, 0 end\n"
  "  return v:re(), v:im()\n"
  "end\n"
  "return function(xv)\n"
  "  local v, e = J:quad { x = xv }\n"
  "  local r = J:expand { x = xv, order = 4 }\n"
  "  local vr, vi = parts(v)\n"
  "  local er, ei = parts(r.value)\n"
  "  return vr, vi, e, er, ei, r.error\n"
  "end\n";

#define NOUT 6

typedef struct {
  const char *root;
  double x;
  double out[NOUT];
  int ok;
  char err[512];
} job;

/* Runs the analysis in a fresh lua_State; fills j->out or j->err. */
static void run(job *j) {
  lua_State *L = luaL_newstate();
  j->ok = 0;
  if (L == NULL) {
    snprintf(j->err, sizeof j->err, "luaL_newstate failed");
    return;
  }
  luaL_openlibs(L);
  luaL_requiref(L, "steep.core", luaopen_steep_core, 0);
  lua_pop(L, 1);
  lua_getglobal(L, "package");
  lua_pushfstring(L, "%s/lua/?.lua;%s/lua/?/init.lua", j->root, j->root);
  lua_setfield(L, -2, "path");
  lua_pushliteral(L, "");
  lua_setfield(L, -2, "cpath");
  lua_pop(L, 1);
  if (luaL_loadbuffer(L, ANALYSIS, sizeof ANALYSIS - 1, "=analysis") != LUA_OK
      || lua_pcall(L, 0, 1, 0) != LUA_OK) goto fail;
  lua_pushnumber(L, j->x);
  if (lua_pcall(L, 1, NOUT, 0) != LUA_OK) goto fail;
  for (int i = 0; i < NOUT; i++) {
    int isnum = 0;
    j->out[i] = lua_tonumberx(L, i - NOUT, &isnum);
    if (!isnum) {
      snprintf(j->err, sizeof j->err, "result %d is not a number", i + 1);
      lua_close(L);
      return;
    }
  }
  j->ok = 1;
  lua_close(L);
  return;
fail:
  snprintf(j->err, sizeof j->err, "%s", lua_tostring(L, -1));
  lua_close(L);
}

static void *thread_main(void *arg) {
  run((job *)arg);
  return NULL;
}

int main(int argc, char **argv) {
  const char *root = argc > 1 ? argv[1] : ".";
  static const double xs[2] = { 5, 7 };
  /* the x values (indices into xs) of the two threads in each round */
  static const int rounds[][2] = { { 0, 1 }, { 1, 0 }, { 0, 0 }, { 1, 1 } };
  const int nrounds = (int)(sizeof rounds / sizeof rounds[0]);
  job seq[2];
  int status = 0, runs = 0, same = 0;
  gsl_set_error_handler(host_gsl_handler);

  for (int i = 0; i < 2; i++) {
    memset(&seq[i], 0, sizeof seq[i]);
    seq[i].root = root;
    seq[i].x = xs[i];
    run(&seq[i]);
    if (!seq[i].ok) {
      fprintf(stderr, "host: sequential run at x = %g failed: %s\n", xs[i], seq[i].err);
      return 1;
    }
    printf("airy %g quad %.17g %.17g %.17g expand %.17g %.17g %.17g\n", xs[i],
           seq[i].out[0], seq[i].out[1], seq[i].out[2],
           seq[i].out[3], seq[i].out[4], seq[i].out[5]);
  }

  for (int r = 0; r < nrounds; r++) {
    job par[2];
    pthread_t th[2];
    int started[2] = { 0, 0 };
    for (int k = 0; k < 2; k++) {
      memset(&par[k], 0, sizeof par[k]);
      par[k].root = root;
      par[k].x = xs[rounds[r][k]];
      started[k] = pthread_create(&th[k], NULL, thread_main, &par[k]) == 0;
      if (!started[k]) {
        fprintf(stderr, "host: pthread_create failed\n");
        status = 1;
      }
    }
    for (int k = 0; k < 2; k++) {
      if (!started[k]) continue;
      pthread_join(th[k], NULL);
      runs++;
      const job *ref = &seq[rounds[r][k]];
      if (!par[k].ok) {
        fprintf(stderr, "host: threaded run at x = %g failed: %s\n", par[k].x, par[k].err);
        status = 1;
      } else if (memcmp(par[k].out, ref->out, sizeof ref->out) == 0) {
        same++;
      } else {
        fprintf(stderr, "host: round %d thread %d at x = %g differs from the sequential run\n",
                r, k, par[k].x);
        status = 1;
      }
    }
  }
  printf("threads: %d runs, %d identical to the sequential runs\n", runs, same);
  /* the handler in force is still the host's, and a GSL domain error (log of a negative
   * number) still reaches it */
  gsl_error_handler_t *now = gsl_set_error_handler(host_gsl_handler);
  int before = host_gsl_errors;
  gsl_sf_result res;
  int st = gsl_sf_log_e(-1.0, &res);
  int kept = now == host_gsl_handler && st != GSL_SUCCESS && host_gsl_errors == before + 1;
  printf("gsl handler: %s, %d calls\n", kept ? "kept" : "replaced", host_gsl_errors - before);
  if (!kept) status = 1;
  return status;
}
