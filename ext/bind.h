/*
 * bind.h — helpers shared by the binding files (bind_*.c): conversions between Lua
 * values and C numbers, and the registration functions each binding file exports.
 *
 * Complex values live on the Lua side as tables {re, im} whose metatable is registered
 * under STEEP_COMPLEX_MT (created in luaopen_steep_core, methods filled in by
 * lua/steep/complex.lua); C reads and creates them through these helpers.
 */
#ifndef STEEP_BIND_H
#define STEEP_BIND_H

#include <lua.h>
#include <lauxlib.h>
#include "steep.h"

/* Stores the complex metatable (on top of the stack, and left there) in the registry
 * under a light-userdata key, for the conversions below: no string lookup per point.
 * Called once, by luaopen_steep_core. */
void bind_keep_complex_mt(lua_State *L);

/* 1 and *z set if the value at idx is a number or a steep complex value. */
int bind_tocomplex(lua_State *L, int idx, cplx *z);

/* The complex value at argument arg, or a Lua argument error. */
cplx bind_checkcomplex(lua_State *L, int arg);

/* Pushes z as a steep complex value. */
void bind_pushcomplex(lua_State *L, cplx z);

/* An integer order in 0..STEEP_MAX_ORDER at argument arg, or an argument error. */
size_t bind_checkorder(lua_State *L, int arg);

/* Scratch memory owned by a fresh userdata on the stack (freed by the collector, so a
 * Lua error raised afterwards leaks nothing). */
void *bind_scratch(lua_State *L, size_t bytes);

/* Scratch for `count` elements of `size` bytes, or a Lua error when that exceeds
 * STEEP_MAX_SCRATCH: the count is checked before it is multiplied. */
void *bind_array(lua_State *L, size_t count, size_t size);

/* a * b, or a Lua error when the product would exceed STEEP_MAX_SCRATCH (a count of
 * elements built from two counts). */
size_t bind_mulcount(lua_State *L, size_t a, size_t b);

/* The length (#, __len honoured) of the table at argument idx as a count of at most
 * `max` entries, or an argument error naming `what` (a negative length counts as 0). */
size_t bind_checklen(lua_State *L, int idx, size_t max, const char *what);

/* A buffer of at least `bytes` for the large work arrays of a kernel call, reused from
 * call to call (kept in the registry of the Lua state, which its coroutines share): spares
 * the allocator a fresh block of that size at every call. It is pushed on the stack (so
 * the collector keeps it while in use) and taken out of the registry until
 * bind_buffer_release(L, its stack index) puts it back; a call in between (re-entrant, or
 * after an error skipped the release) simply gets a new one. */
void *bind_buffer(lua_State *L, size_t bytes);
void bind_buffer_release(lua_State *L, int idx);

/* A new steep.series userdata holding c[0..n-1] (bind_series.c). */
void bind_pushseries(lua_State *L, const cplx *c, size_t n);

/* Complex vectors (bind_cvec.c): the data of the steep.cvec at idx, or NULL; and a
 * new steep.cvec of n points pushed on the stack. */
cplx *bind_tocvec(lua_State *L, int idx, size_t *n);
cplx *bind_newcvec(lua_State *L, size_t n);

/* Points from a steep.cvec or a list of numbers/complex values at idx (a list is copied
 * into scratch memory left on the stack), or a Lua error naming the bad entry. */
cplx *bind_checkpoints(lua_State *L, int idx, size_t *n);

/* Tapes (bind_tape.c): the tape at idx (or an argument error), and its parameter
 * values read by name from the table at pidx (errors name unbound parameters). */
struct tape;
const struct tape *bind_checktape(lua_State *L, int idx);
cplx *bind_tapeparams(lua_State *L, int tidx, int pidx);

/* The tally of evaluations made through the tape at idx (tape:evals()): a binding that
 * evaluates through a problem points the problem's `tally` here. */
long *bind_tapetally(lua_State *L, int idx);

/* Per-file registration, called from luaopen_steep_core with the module table on top. */
void bind_series_open(lua_State *L);
void bind_tape_open(lua_State *L);
void bind_cvec_open(lua_State *L);
void bind_cmath_open(lua_State *L);
void bind_landscape_open(lua_State *L);
void bind_process_open(lua_State *L);
void bind_multi_open(lua_State *L);

#endif
