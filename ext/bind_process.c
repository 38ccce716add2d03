/*
 * bind_process.c — child processes for sweeps on every core (lua/steep/sweep.lua): the
 * number of processors, fork, wait, an immediate exit for a child, and a short sleep
 * while the parent polls. POSIX only; no state is kept here.
 *
 * A forked child holds a copy of the whole Lua state (the integral and its tapes
 * included), computes its share and leaves by core.child_exit, which skips the atexit
 * handlers and stdio flushing: the parent's buffered output is not written twice, and
 * files the parent holds open are left alone. Forking a process that runs other threads
 * is unsafe (locks held by them stay locked in the child): an embedding host with
 * threads should sweep with workers = 1.
 */
#define _POSIX_C_SOURCE 200809L   /* fork, nanosleep, sysconf */
#define _DEFAULT_SOURCE           /* wait4: the child's resource usage with its status */
#include <errno.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>
#include "bind.h"

/* core.cpu_count() -> the number of processors online (at least 1) */
static int proc_cpu_count(lua_State *L) {
  long n = sysconf(_SC_NPROCESSORS_ONLN);
  lua_pushinteger(L, n >= 1 ? n : 1);
  return 1;
}

/* core.fork() -> the child's pid in the parent, 0 in the child; nil and the reason on
 * failure */
static int proc_fork(lua_State *L) {
  pid_t pid = fork();
  if (pid < 0) {
    lua_pushnil(L);
    lua_pushstring(L, strerror(errno));
    return 2;
  }
  lua_pushinteger(L, (lua_Integer)pid);
  return 1;
}

/* core.wait(pid [, nohang]) -> "running" (nohang, not finished), or "exit" and the exit
 * code, or "signal" and the signal number, then the child's CPU time in seconds (user
 * and system); nil and the reason on failure */
static int proc_wait(lua_State *L) {
  lua_Integer pid = luaL_checkinteger(L, 1);
  luaL_argcheck(L, pid > 0, 1, "a child's pid expected");
  int nohang = lua_toboolean(L, 2), status = 0;
  struct rusage ru;
  memset(&ru, 0, sizeof ru);
  pid_t r;
  do r = wait4((pid_t)pid, &status, nohang ? WNOHANG : 0, &ru);
  while (r < 0 && errno == EINTR);
  if (r < 0) {
    lua_pushnil(L);
    lua_pushstring(L, strerror(errno));
    return 2;
  }
  if (r == 0) {
    lua_pushliteral(L, "running");
    return 1;
  }
  if (WIFEXITED(status)) {
    lua_pushliteral(L, "exit");
    lua_pushinteger(L, WEXITSTATUS(status));
  } else {
    lua_pushliteral(L, "signal");
    lua_pushinteger(L, WIFSIGNALED(status) ? WTERMSIG(status) : -1);
  }
  lua_pushnumber(L, (double)ru.ru_utime.tv_sec + 1e-6 * (double)ru.ru_utime.tv_usec +
                    (double)ru.ru_stime.tv_sec + 1e-6 * (double)ru.ru_stime.tv_usec);
  return 3;
}

/* core.child_exit(code): leaves the process at once (_exit), for a forked child only */
static int proc_child_exit(lua_State *L) {
  lua_Integer code = luaL_checkinteger(L, 1);
  _exit(code >= 0 && code <= 255 ? (int)code : 1);
  return 0;
}

/* core.sleep(seconds): sleeps up to 10 s (the parent's polling interval) */
static int proc_sleep(lua_State *L) {
  double s = luaL_checknumber(L, 1);
  luaL_argcheck(L, s >= 0 && s <= 10, 1, "0..10 seconds expected");
  struct timespec ts = {(time_t)s, (long)((s - (double)(time_t)s) * 1e9)};
  while (nanosleep(&ts, &ts) != 0 && errno == EINTR) {}
  return 0;
}

static const luaL_Reg proc_funcs[] = {
  {"cpu_count", proc_cpu_count}, {"fork", proc_fork}, {"wait", proc_wait},
  {"child_exit", proc_child_exit}, {"sleep", proc_sleep}, {NULL, NULL}
};

void bind_process_open(lua_State *L) { luaL_setfuncs(L, proc_funcs, 0); }
