/*
 * fuzz_tape.c — tapes from arbitrary bytes: random operations (unknown ones included),
 * operand slots, constants, integer powers, parameters and outputs. As the binding does,
 * only tapes that tape_check accepts are evaluated, at one point, at a batch of points
 * as jets of orders 0..64 (of every slot, or of the slots up to one, as problem_jet
 * asks) and as value and derivative (tape_dual_upto); every buffer has exactly the size
 * tape.h states.
 * Nothing may crash or trip a sanitizer.
 */
#include "fuzz.h"
#include "tape.h"

enum { MAX_INS = 40, MAX_PARAMS = 4, MAX_OUT = 4, MAX_BATCH = 150, MAX_ORDER = 64 };

static int operand(fz *f, size_t j) {
  uint8_t b = fz_u8(f);
  if ((b & 0xc0) == 0xc0) return (int)(int8_t)fz_u8(f);   /* anything, valid or not */
  return j ? (int)(b % j) : -1;
}

static long power(fz *f) {
  uint8_t b = fz_u8(f);
  switch (b % 8) {
    case 0: return (long)(int64_t)fz_u64(f);                 /* LONG_MIN .. LONG_MAX */
    case 1: return (b & 8) ? 1000000000L : -1000000000L;      /* the binding's bounds */
    default: return (long)(int8_t)fz_u8(f) % 12;
  }
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  fz f = {data, size};
  uint8_t flags = fz_u8(&f);
  int normalize = flags & 1;    /* unused operands -1, as the binding's read_ins sets */
  int raw = (flags & 2) != 0;   /* constants may be NaN or infinite */
  size_t n = 1 + fz_below(&f, MAX_INS);
  size_t np = fz_below(&f, MAX_PARAMS + 1);
  size_t no = 1 + fz_below(&f, MAX_OUT);
  tape t;
  t.n = n;
  t.nparams = np;
  t.nout = no;
  t.ins = fz_alloc(n, sizeof *t.ins);
  t.out = fz_alloc(no, sizeof *t.out);
  t.varying = fz_alloc(n, 1);
  for (size_t j = 0; j < n; j++) {
    tape_ins *in = &t.ins[j];
    uint8_t o = fz_u8(&f);
    in->op = o % (OP_COUNT + 1) == OP_COUNT ? (int)(int8_t)fz_u8(&f) : o % (OP_COUNT + 1);
    in->a = operand(&f, j);
    in->b = operand(&f, j);
    in->k = 0;
    in->c = 0;
    if (in->op == OP_PARAM) in->k = (long)fz_below(&f, np + 2) - (fz_u8(&f) & 1);
    if (in->op == OP_POWI) in->k = power(&f);
    if (in->op == OP_CONST || in->op == OP_POWC) in->c = fz_cplx(&f, raw);
    if (normalize) {
      int ar = tape_arity(in->op);
      if (ar < 1) in->a = -1;
      if (ar < 2) in->b = -1;
    }
  }
  for (size_t o = 0; o < no; o++) {
    uint8_t b = fz_u8(&f);
    t.out[o] = (b & 0xe0) == 0xe0 ? (int)(int8_t)fz_u8(&f) : (int)(b % n);
  }
  const char *why = "";
  long bad = tape_check(&t, &why);
  if (bad < -1 || bad > (long)n) abort();   /* -1, or the index of a bad instruction */
  if (bad == -1) {
    cplx *params = fz_alloc(np, sizeof *params);
    for (size_t i = 0; i < np; i++) params[i] = fz_cplx(&f, raw);
    cplx x = fz_cplx(&f, raw);
    /* one point */
    cplx *out = fz_alloc(no, sizeof *out), *work = fz_alloc(n, sizeof *work);
    tape_eval(&t, x, params, out, work);
    free(out);
    free(work);
    /* a batch: more than one block of TAPE_BLOCK points as often as not */
    size_t m = fz_below(&f, MAX_BATCH + 1);
    cplx *xs = fz_alloc(m, sizeof *xs);
    for (size_t i = 0; i < m; i++)
      xs[i] = (fz_u8(&f) & 1) ? fz_cplx(&f, raw) : x + 0.01 * (double)i;
    out = fz_alloc(no * m, sizeof *out);
    work = fz_alloc(n * TAPE_BLOCK, sizeof *work);
    tape_eval_batch(&t, xs, m, params, out, work);
    free(out);
    free(work);
    free(xs);
    /* jets: a few orders and points */
    int njets = 1 + fz_u8(&f) % 3;
    for (int r = 0; r < njets; r++) {
      size_t order = fz_below(&f, MAX_ORDER + 1);
      cplx xj = (fz_u8(&f) & 1) ? fz_cplx(&f, raw) : x;
      cplx *jw = fz_alloc(n * (order + 1), sizeof *jw);
      cplx *scratch = fz_alloc(4 * (order + 1), sizeof *scratch);
      long badj = -2;
      uint8_t u = fz_u8(&f);   /* all slots, or those up to (and past) one of them */
      size_t upto = u & 1 ? (size_t)(u >> 1) % (n + 2) : n - 1;
      int st = u & 1 ? tape_jet_upto(&t, xj, params, order, jw, scratch, &badj, upto)
                     : tape_jet(&t, xj, params, order, jw, scratch, &badj);
      if (st != STEEP_OK && (badj < 0 || badj >= (long)n || (size_t)badj > upto)) abort();
      if (st < STEEP_OK || st > STEEP_NONFINITE) abort();
      free(jw);
      free(scratch);
    }
    /* first derivatives by forward mode, up to a slot as problem_dF asks */
    {
      cplx *v = fz_alloc(n, sizeof *v), *d = fz_alloc(n, sizeof *d);
      long badd = -2;
      size_t upto = (size_t)fz_below(&f, n + 2);
      int st = tape_dual_upto(&t, x, params, v, d, &badd, upto);
      if (st != STEEP_OK && (badd < 0 || badd >= (long)n || (size_t)badd > upto)) abort();
      if (st < STEEP_OK || st > STEEP_NONFINITE) abort();
      free(v);
      free(d);
    }
    free(params);
  }
  free(t.ins);
  free(t.out);
  free(t.varying);
  return 0;
}
