/*
 * mexpand.c — expansion terms at one point in several variables; contracts in mexpand.h.
 */
#include <float.h>
#include <math.h>
#include <string.h>
#include "mexpand.h"

#define SQRT_2PI 2.50662827463100050241576528481104525

size_t mexpand_scratch_len(const mlayout *ly) {
  /* moments, P, P', R, the nonzero list of R (value + index) and weighted degrees, the
   * per-coordinate tables, and the moduli of P and P' (doubles, one slot for both) */
  return 9 * ly->N + 8 * (size_t)(ly->deg + 1) * MJET_MAX_VARS + 16;
}

double mexpand_cost(const mlayout *ly, int M) {
  int dp = 3 * M < ly->deg ? 3 * M : ly->deg, dr = M + 2 < ly->deg ? M + 2 : ly->deg;
  return (double)M * (double)ly->upto[dp + 1] * (double)ly->upto[dr + 1];
}

void mexpand_gauss_moments(const mlayout *ly, const int *kind, const cplx *Sigma, cplx *out) {
  int n = ly->n;
  for (size_t i = 0; i < ly->N; i++) {
    const unsigned char *e = ly->exps + i * (size_t)n;
    int other = 0, first = -1;
    for (int k = 0; k < n; k++) {
      if (e[k] && kind[k] != MEXP_FULL) other = 1;
      if (e[k] && kind[k] == MEXP_FULL && first < 0) first = k;
    }
    if (other) { out[i] = 0; continue; }
    if (first < 0) { out[i] = 1; continue; }
    /* E[s_i s^b] with b = a - e_i: sum over the pairings of s_i with each s_j in s^b */
    long cb = ly->code[i] - ly->pow[first];
    cplx s = 0;
    for (int j = 0; j < n; j++) {
      long bj = (cb / ly->pow[j]) % ly->base;
      if (bj == 0 || kind[j] != MEXP_FULL) continue;
      s += Sigma[first * n + j] * (double)bj * out[ly->rank[cb - ly->pow[j]]];
    }
    out[i] = s;
  }
}

int mexpand_terms(const mlayout *ly, const cplx *Fj, const cplx *gj, const int *kind,
                  const cplx *Sigma, int M, cplx *terms, double *bound, cplx *scratch) {
  int n = ly->n, D = ly->deg;
  size_t N = ly->N;
  cplx *mom = scratch, *P = mom + N, *Pn = P + N, *Rv = Pn + N;
  size_t *Ri = (size_t *)(Rv + N);                 /* N entries (<= 2N cplx slots) */
  int *wdeg = (int *)(Rv + 3 * N);                 /* N ints */
  cplx *tab = Rv + 4 * N;                          /* per coordinate: D + 1 entries */
  /* |P| and |P'| as built (sums of moduli), after the tables */
  double *Pa = (double *)(tab + (size_t)MJET_MAX_VARS * (size_t)(D + 1)), *Pna = Pa + N;
  /* weighted degree: an edge coordinate counts twice (it scales as 1/lambda) */
  for (size_t i = 0; i < N; i++) {
    const unsigned char *e = ly->exps + i * (size_t)n;
    int w = 0;
    for (int k = 0; k < n; k++) w += kind[k] == MEXP_EDGE ? 2 * e[k] : e[k];
    wdeg[i] = w;
  }
  /* one-dimensional moment tables: half-line Gaussian or exponential */
  for (int k = 0; k < n; k++) {
    cplx *t = tab + (size_t)k * (size_t)(D + 1);
    if (kind[k] == MEXP_HALF) {
      cplx s2 = Sigma[k * n + k];
      t[0] = 0.5;
      if (D >= 1) t[1] = csqrt(s2) / SQRT_2PI;
      for (int a = 2; a <= D; a++) t[a] = (double)(a - 1) * s2 * t[a - 2];
    } else if (kind[k] == MEXP_EDGE) {
      cplx c = -Fj[ly->rank[ly->pow[k]]];
      if (c == 0) return STEEP_SINGULAR;
      t[0] = 1;
      for (int a = 1; a <= D; a++) t[a] = t[a - 1] * (double)a / c;
    }
  }
  mexpand_gauss_moments(ly, kind, Sigma, mom);
  /* in place, from the top: the projection onto the Gaussian coordinates has a lower
   * rank (or the same, when nothing else is in the monomial) */
  for (size_t i = N; i-- > 0;) {
    const unsigned char *e = ly->exps + i * (size_t)n;
    long proj = 0;
    cplx f = 1;
    for (int k = 0; k < n; k++) {
      if (kind[k] == MEXP_FULL) proj += (long)e[k] * ly->pow[k];
      else f *= tab[(size_t)k * (size_t)(D + 1) + e[k]];
    }
    mom[i] = f == 0 ? 0 : f * mom[ly->rank[proj]];
  }
  /* R: F without its constant, its linear terms and its quadratic form in the Gaussian
   * coordinates; kept as a list of its nonzero monomials */
  size_t lenR = ly->upto[(M + 2 < D ? M + 2 : D) + 1], nR = 0;
  for (size_t i = 0; i < lenR; i++) {
    int d = ly->degree[i];
    if (d <= 1) continue;
    if (d == 2) {
      const unsigned char *e = ly->exps + i * (size_t)n;
      int edge = 0;
      for (int k = 0; k < n; k++) if (e[k] && kind[k] == MEXP_EDGE) edge = 1;
      if (!edge) continue;
    }
    if (Fj[i] == 0 || wdeg[i] > M + 2) continue;
    Rv[nR] = Fj[i];
    Ri[nR++] = i;
  }
  double *acc = bound;   /* (the moduli summed, in place; scaled at the end) */
  for (int m = 0; m <= M; m++) {
    terms[m] = 0;
    if (acc) acc[m] = 0;
  }
  size_t lenP = ly->upto[(3 * M < D ? 3 * M : D) + 1];
  memset(P, 0, lenP * sizeof *P);
  memset(Pa, 0, lenP * sizeof *Pa);
  for (size_t i = 0; i < ly->upto[M + 1]; i++)
    if (wdeg[i] <= M) P[i] = gj[i], Pa[i] = cabs(gj[i]);
  for (size_t i = 0; i < lenP; i++)
    if (P[i] != 0) {
      terms[wdeg[i]] += P[i] * mom[i];
      if (acc) acc[wdeg[i]] += 2 * Pa[i] * cabs(mom[i]);
    }
  for (int mu = 1; mu <= M; mu++) {
    int wmax = M + 2 * mu;
    memset(Pn, 0, lenP * sizeof *Pn);
    memset(Pna, 0, lenP * sizeof *Pna);
    for (size_t i = 0; i < lenP; i++) {
      cplx pi = P[i];
      if (pi == 0 || wdeg[i] + 3 > wmax) continue;
      long ci = ly->code[i];
      int room = wmax - wdeg[i];
      for (size_t r = 0; r < nR; r++) {
        size_t j = Ri[r];
        if (wdeg[j] > room) continue;
        size_t k = ly->rank[ci + ly->code[j]];
        Pn[k] += pi * Rv[r];
        Pna[k] += Pa[i] * cabs(Rv[r]);
      }
    }
    int any = 0;
    for (size_t i = 0; i < lenP; i++) {
      P[i] = Pn[i] / (double)mu;
      Pa[i] = Pna[i] / (double)mu;
      if (P[i] != 0) {
        any = 1;
        terms[wdeg[i] - 2 * mu] += P[i] * mom[i];
        /* (mu + 2 factors behind this product: the amplitude's, mu of R, the moment) */
        if (acc) acc[wdeg[i] - 2 * mu] += (double)(mu + 2) * Pa[i] * cabs(mom[i]);
      }
    }
    if (!any) break;
  }
  for (int m = 0; m <= M; m++) {
    if (!isfinite(creal(terms[m])) || !isfinite(cimag(terms[m]))) return STEEP_NONFINITE;
    if (acc) acc[m] *= 16 * DBL_EPSILON;
  }
  return STEEP_OK;
}
