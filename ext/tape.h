/*
 * tape.h — compiled expressions: a flat array of instructions in SSA form.
 *
 * Instruction j writes slot j; its operands are earlier slots (a, b < j). One slot is
 * fed by the variable, others by named parameters (bound by index at evaluation) and
 * constants. A tape has one or more outputs (slots). It evaluates in three modes:
 * a value at one point, values at a batch of points (instruction-major over blocks of
 * points, so the dispatch cost is shared), and a jet: the Taylor coefficients to
 * order N at a point by truncated series arithmetic (Griewank & Walther 2008, ch. 13).
 */
#ifndef STEEP_TAPE_H
#define STEEP_TAPE_H

#include <stddef.h>
#include "steep.h"

enum tape_op {
  OP_CONST, OP_VAR, OP_PARAM,
  OP_ADD, OP_SUB, OP_MUL, OP_DIV, OP_NEG,
  OP_POWI,            /* a^k, integer k: binary powering */
  OP_POWC,            /* a^c, constant complex c: principal branch */
  OP_EXP, OP_LOG, OP_SQRT,
  OP_SIN, OP_COS, OP_TAN, OP_SINH, OP_COSH, OP_TANH, OP_ATAN,
  OP_COUNT
};

typedef struct tape_ins {
  int op;
  int a, b;     /* operand slots (unused ones are -1) */
  long k;       /* OP_PARAM: parameter index; OP_POWI: exponent */
  cplx c;       /* OP_CONST: value; OP_POWC: exponent */
} tape_ins;

typedef struct tape {
  size_t n;                 /* instructions = slots */
  size_t nparams;
  size_t nout;
  tape_ins *ins;            /* n */
  int *out;                 /* nout output slots */
  unsigned char *varying;   /* n flags: slot depends on the variable */
} tape;

/* Number of operands (0, 1 or 2) of an op; -1 for an unknown op. */
int tape_arity(int op);
const char *tape_op_name(int op);
int tape_op_lookup(const char *name);   /* -1 if unknown */

/* Checks operands (unused ones must be -1), parameter indices and outputs; fills
 * t->varying. Returns -1 when the tape is well formed, else the index of the first bad
 * instruction (n for bad outputs), with a reason in *why. */
long tape_check(tape *t, const char **why);

/* Values of the outputs at x: out[nout]. work: n entries. */
void tape_eval(const tape *t, cplx x, const cplx *params, cplx *out, cplx *work);

/* Values of the outputs at x and a first-order bound on each one's rounding error: err[o]
 * for output o, propagated through the instructions from the unit roundoff of each
 * operation and the operands' own bounds (a running error analysis, N. J. Higham,
 * Accuracy and Stability of Numerical Algorithms, 2nd ed. (2002), sec. 3.3). The
 * variable and the parameters are taken as exact. work: n entries; ework: n entries. */
void tape_eval_rounding(const tape *t, cplx x, const cplx *params, cplx *out, double *err,
                        cplx *work, double *ework);

/* Block size of tape_eval_batch; work needs n * TAPE_BLOCK entries. */
#define TAPE_BLOCK 64

/* Values at m points: out[o * m + i] is output o at xs[i]. */
void tape_eval_batch(const tape *t, const cplx *xs, size_t m, const cplx *params,
                     cplx *out, cplx *work);

/* Jets of order N (N+1 coefficients) of every slot at x: jet slot j occupies
 * work[j*(N+1) .. j*(N+1)+N]; scratch needs 4*(N+1) entries. Returns STEEP_OK or the
 * status of the first failing instruction, whose index goes to *bad. */
int tape_jet(const tape *t, cplx x, const cplx *params, size_t order, cplx *work,
             cplx *scratch, long *bad);

/* As tape_jet, but only instructions 0..upto (those an output at slot upto can depend
 * on: operands always precede their users), so that a singular amplitude does not stop
 * the jet of the exponent compiled before it. */
int tape_jet_upto(const tape *t, cplx x, const cplx *params, size_t order, cplx *work,
                  cplx *scratch, long *bad, size_t upto);

/* Value and first derivative of slots 0..upto at x (forward mode): v[j] and d[j], each
 * array t->n entries. The order-1 case of tape_jet_upto without its series machinery,
 * which steepest paths, inverse maps and Newton's method call at every step. Returns
 * STEEP_OK or the status of the first failing instruction (as tape_jet_upto; index to
 * *bad). */
int tape_dual_upto(const tape *t, cplx x, const cplx *params, cplx *v, cplx *d, long *bad,
                   size_t upto);

/* Continues an evaluation at x whose slots 0..from-1 are in v (values: of tape_eval, or of
 * tape_dual_upto) with slots from..upto by value (as tape_eval computes them), and
 * returns slot upto's value. Slots up to `from` are not touched. */
cplx tape_eval_from(const tape *t, cplx x, const cplx *params, cplx *v, size_t from,
                    size_t upto);

#endif
