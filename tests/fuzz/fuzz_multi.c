/*
 * fuzz_multi.c — the several-variable kernels on tapes from arbitrary bytes: jets in
 * total degree (mjet_tape) with random variable slots, points and directions; the
 * expansion terms (mexpand_terms) from those jets with random coordinate kinds and
 * covariances; Newton's method (mcrit_newton, deflated by random points) and a few
 * homotopy paths (mcrit_track). As bind_multi.c does, only tapes that tape_check accepts
 * are used, 1 to 4 variables, each a distinct parameter slot; every buffer has exactly
 * the size the headers state. Nothing may crash or trip a sanitizer, and every status
 * must be one of the enumerated ones.
 */
#include "fuzz.h"
#include "tape.h"
#include "mjet.h"
#include "mexpand.h"
#include "mcrit.h"

enum { MAX_INS = 24, MAX_PARAMS = 6, MAX_DEG = 8, MAX_M = 4 };

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  fz f = {data, size};
  uint8_t flags = fz_u8(&f);
  int raw = (flags & 2) != 0;
  size_t n = 1 + fz_below(&f, MAX_INS);
  int nv = 1 + (int)fz_below(&f, MJET_MAX_VARS);
  size_t np = (size_t)nv + fz_below(&f, MAX_PARAMS - MJET_MAX_VARS + 1);
  size_t no = 1 + fz_below(&f, 2);
  tape t;
  t.n = n;
  t.nparams = np;
  t.nout = no;
  t.ins = fz_alloc(n, sizeof *t.ins);
  t.out = fz_alloc(no, sizeof *t.out);
  t.varying = fz_alloc(n, 1);
  for (size_t j = 0; j < n; j++) {
    tape_ins *in = &t.ins[j];
    in->op = (int)(fz_u8(&f) % OP_COUNT);
    int ar = tape_arity(in->op);
    in->a = ar >= 1 && j ? (int)fz_below(&f, j) : -1;
    in->b = ar >= 2 && j ? (int)fz_below(&f, j) : -1;
    in->k = 0;
    in->c = 0;
    if (in->op == OP_PARAM) in->k = (long)fz_below(&f, np);
    if (in->op == OP_POWI) in->k = (long)(int8_t)fz_u8(&f) % 9;
    if (in->op == OP_CONST || in->op == OP_POWC) in->c = fz_cplx(&f, raw);
  }
  for (size_t o = 0; o < no; o++) t.out[o] = (int)fz_below(&f, n);
  const char *why = "";
  if (tape_check(&t, &why) == -1) {
    int slots[MJET_MAX_VARS];
    for (int k = 0; k < nv; k++) slots[k] = k;   /* distinct slots, as the binding checks */
    cplx *params = fz_alloc(np, sizeof *params);
    for (size_t i = 0; i < np; i++) params[i] = fz_cplx(&f, raw);
    cplx x0[MJET_MAX_VARS], dir[MJET_MAX_VARS];
    for (int k = 0; k < nv; k++) { x0[k] = fz_cplx(&f, raw); dir[k] = (fz_u8(&f) & 1) ? fz_cplx(&f, raw) : 1; }
    /* jets */
    int M = (int)fz_below(&f, MAX_M + 1);
    int D = 3 * M > M + 2 ? 3 * M : M + 2;
    int d = (int)fz_below(&f, MAX_DEG + 1);
    if (d > D) D = d;
    size_t lyb = mlayout_bytes(nv, D);
    if (lyb == 0) abort();
    void *lm = fz_alloc(lyb, 1);
    mlayout ly;
    mlayout_init(&ly, nv, D, lm);
    size_t len = mlayout_len(&ly, d);
    cplx *w = fz_alloc(n * len, sizeof *w);
    cplx *scr = fz_alloc(mjet_scratch_len(&ly, &t, d), sizeof *scr);
    long bad = -2;
    size_t upto = fz_below(&f, n + 1);
    int st = mjet_tape(&ly, &t, params, slots, x0, (flags & 4) ? dir : NULL, d, upto, w, scr, &bad);
    if (st < STEEP_OK || st > STEEP_NONFINITE) abort();
    if (st != STEEP_OK && (bad < 0 || (size_t)bad > upto)) abort();
    free(w);
    free(scr);
    /* expansion terms from the jets of degree M + 2 (F) and M (g) */
    size_t lj = mlayout_len(&ly, M + 2);
    w = fz_alloc(n * lj, sizeof *w);
    scr = fz_alloc(mjet_scratch_len(&ly, &t, M + 2), sizeof *scr);
    st = mjet_tape(&ly, &t, params, slots, x0, dir, M + 2, n - 1, w, scr, &bad);
    if (st == STEEP_OK) {
      cplx *Fj = fz_alloc(ly.N, sizeof *Fj), *gj = fz_alloc(ly.N, sizeof *gj);
      memcpy(Fj, w + (size_t)t.out[0] * lj, lj * sizeof *Fj);
      memcpy(gj, w + (size_t)t.out[no - 1] * lj, lj * sizeof *gj);
      int kinds[MJET_MAX_VARS];
      cplx sigma[MJET_MAX_VARS * MJET_MAX_VARS];
      for (int k = 0; k < nv; k++) kinds[k] = (int)fz_below(&f, 3);
      for (int k = 0; k < nv * nv; k++) sigma[k] = fz_cplx(&f, raw);
      cplx terms[MAX_M + 1];
      double bound[MAX_M + 1];
      cplx *ms = fz_alloc(mexpand_scratch_len(&ly), sizeof *ms);
      /* (with and without the rounding bound: the same terms) */
      st = mexpand_terms(&ly, Fj, gj, kinds, sigma, M, terms, (fz_u8(&f) & 1) ? bound : NULL, ms);
      if (st < STEEP_OK || st > STEEP_NONFINITE) abort();
      free(ms);
      free(Fj);
      free(gj);
    }
    free(w);
    free(scr);
    free(lm);
    /* Newton, deflated by a few points, and two homotopy paths */
    mproblem mp;
    void *pm = fz_alloc(mproblem_bytes(&t, nv), 1);
    mproblem_init(&mp, &t, params, slots, nv, pm);
    int nk = (int)fz_below(&f, 3);
    cplx known[2 * MJET_MAX_VARS], root[MJET_MAX_VARS];
    for (int k = 0; k < nk * nv; k++) known[k] = fz_cplx(&f, raw);
    int it = 0;
    double maxstep = (flags & 8) ? INFINITY : fabs(fz_real(&f, raw));
    st = mcrit_newton(&mp, x0, known, nk, maxstep, 1e-13, 20, root, &it);
    if (st < MCRIT_OK || st > MCRIT_FAILED || it < 1 || it > 20) abort();
    int degs[MJET_MAX_VARS];
    for (int k = 0; k < nv; k++) degs[k] = 1 + (int)fz_below(&f, 4);
    for (int r = 0; r < 2; r++) {
      cplx start[MJET_MAX_VARS], end[MJET_MAX_VARS];
      for (int k = 0; k < nv; k++) start[k] = (fz_u8(&f) & 1) ? 1 : fz_cplx(&f, raw);
      double rc = 0;
      int steps = 0;
      st = mcrit_track(&mp, degs, fz_cplx(&f, raw), start, 1e8, 60, end, &rc, &steps);
      if (st < MCRIT_OK || st > MCRIT_FAILED) abort();
    }
    free(pm);
    free(params);
  }
  free(t.ins);
  free(t.out);
  free(t.varying);
  return 0;
}
