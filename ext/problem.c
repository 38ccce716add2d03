/*
 * problem.c — evaluation of an integrand through its tape; see problem.h.
 */
#include <string.h>
#include "problem.h"

size_t problem_bytes(const tape *t) {
  return (t->n * (PROBLEM_MAX_JET + 1) + 4 * (PROBLEM_MAX_JET + 1) + t->nout + t->n) *
         sizeof(cplx);
}

void problem_init(problem *p, const tape *t, const cplx *params, void *mem) {
  cplx *m = mem;
  p->t = t;
  p->params = params;
  p->work = m;
  p->scratch = m + t->n * (PROBLEM_MAX_JET + 1);
  p->vals = p->scratch + 4 * (PROBLEM_MAX_JET + 1);
  p->evals = 0;
  p->tally = NULL;
}

int problem_jet(problem *p, cplx x, size_t order, int out, cplx *coef) {
  long bad;
  if (order > PROBLEM_MAX_JET) order = PROBLEM_MAX_JET;
  p->evals++;
  if (p->tally) (*p->tally)++;
  int st = tape_jet_upto(p->t, x, p->params, order, p->work, p->scratch, &bad,
                         (size_t)p->t->out[out]);
  if (st != STEEP_OK) return st;
  memcpy(coef, p->work + (size_t)p->t->out[out] * (order + 1), (order + 1) * sizeof(cplx));
  return STEEP_OK;
}

cplx problem_integrand(problem *p, cplx x, cplx *F) {
  /* the scalar slots live after vals: t->n entries (see problem_bytes) */
  cplx *slots = p->vals + p->t->nout;
  p->evals++;
  if (p->tally) (*p->tally)++;
  tape_eval(p->t, x, p->params, p->vals, slots);
  *F = p->vals[0];
  cplx g = p->t->nout > 1 ? p->vals[1] : 1.0;
  return g * cexp(p->vals[0]);
}

void problem_integrand_batch(problem *p, const cplx *xs, size_t m, cplx *f, cplx *work,
                             cplx *out) {
  const tape *t = p->t;
  p->evals += (long)m;
  if (p->tally) *p->tally += (long)m;
  tape_eval_batch(t, xs, m, p->params, out, work);
  for (size_t i = 0; i < m; i++) f[i] = (t->nout > 1 ? out[m + i] : 1.0) * cexp(out[i]);
}

void problem_values_batch(problem *p, const cplx *xs, size_t m, cplx *work, cplx *out) {
  p->evals += (long)m;
  if (p->tally) *p->tally += (long)m;
  tape_eval_batch(p->t, xs, m, p->params, out, work);
}

int problem_dF(problem *p, cplx x, cplx *F, cplx *dF) {
  long bad;
  size_t out = (size_t)p->t->out[0];
  cplx *v = p->work, *d = p->work + p->t->n;   /* work holds t->n (MAX_JET + 1) entries */
  p->evals++;
  if (p->tally) (*p->tally)++;
  int st = tape_dual_upto(p->t, x, p->params, v, d, &bad, out);
  *F = v[out];
  *dF = d[out];
  return st;
}

cplx problem_amplitude_after_dF(problem *p, cplx x) {
  if (p->t->nout < 2) return 1;
  size_t out0 = (size_t)p->t->out[0], out1 = (size_t)p->t->out[1];
  if (out1 <= out0) return p->work[out1];
  return tape_eval_from(p->t, x, p->params, p->work, out0 + 1, out1);
}
