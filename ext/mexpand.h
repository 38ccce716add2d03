/*
 * mexpand.h — the terms of the asymptotic expansion of a Laplace / saddle integral in
 * several variables at one point, from the jets of the exponent F and the amplitude g
 * in local coordinates s (mjet.h).
 *
 * Each coordinate is of one of three kinds:
 *   MEXP_FULL  the point is interior along it: s over the whole line, Gaussian;
 *   MEXP_HALF  the point is at an end where dF/ds = 0: s >= 0, half of a Gaussian;
 *   MEXP_EDGE  the point is at an end where F falls off linearly inward, F ~ F0 - c s,
 *              s >= 0 (Watson's lemma, DLMF 2.3(ii)).
 * With A = -F'' over the Gaussian coordinates q, Sigma = A^{-1}, c_k = -dF/ds_k at the
 * edge coordinates u, and R = F - F0 + c.u + q.A q / 2 (what is left of F: every term
 * has weighted degree >= 3 when u counts twice and q once),
 *   integral ~ e^{F0} prod_k (1/c_k) (2 pi)^{|q|/2} det(A)^{-1/2} sum_m T_m,
 *   T_m = sum_{mu >= 0} (1/mu!) sum over monomials of weighted degree m + 2 mu of
 *         R^mu g  of  coefficient * moment,
 * moments being those of the product measure: exponential (c e^{-c u}: a!/c^a), Gaussian
 * with covariance Sigma (Isserlis' recursion, complex Sigma allowed: the formal Wick
 * pairing), half-Gaussian (a coordinate that Sigma leaves uncoupled: the half-line
 * moments h(a) = (a-1) sigma^2 h(a-2), h(0) = 1/2, h(1) = sigma/sqrt(2 pi)).
 * T_m is of the order lambda^{-m/2} when F = lambda phi. With only Gaussian coordinates
 * this is Hormander's formula (The Analysis of Linear Partial Differential Operators I,
 * Thm 7.7.5): his L_j u equals T_{2j} here, the operator <H^{-1}D,D>^nu acting on R^mu g
 * at the point being 2^nu nu! times the Gaussian moment of its degree-2nu part.
 */
#ifndef STEEP_MEXPAND_H
#define STEEP_MEXPAND_H

#include "mjet.h"

enum mexp_kind { MEXP_FULL = 0, MEXP_HALF = 1, MEXP_EDGE = 2 };

/* Scratch entries (cplx) mexpand_terms needs on a layout of degree >= 3M. */
size_t mexpand_scratch_len(const mlayout *ly);

/* The number of monomial pairs the expansion to M multiplies (for the caller to refuse
 * an order too costly before starting): an upper bound. */
double mexpand_cost(const mlayout *ly, int M);

/* T_0 .. T_M into terms. Fj: F's jet known to degree M + 2, gj: g's jet known to degree
 * M (both in ly's order; ly->deg >= 3M). kind[k] per coordinate; Sigma: n x n row-major
 * (only the entries between Gaussian coordinates are read; a half-line coordinate must
 * be uncoupled: the caller checks). The edge rates c_k are read from Fj. With `bound`
 * (M + 1 entries, or NULL), also a running bound on each term's rounding: the sum of the
 * moduli of everything added into it, each times the number of factors behind it, times
 * 16 u (the jets' own relative rounding included; each term is a sum of many products
 * that cancel, in several variables to 1e-5 of their moduli and below). Returns
 * STEEP_OK, or STEEP_SINGULAR when an edge rate is 0. O(mexpand_cost). */
int mexpand_terms(const mlayout *ly, const cplx *Fj, const cplx *gj, const int *kind,
                  const cplx *Sigma, int M, cplx *terms, double *bound, cplx *scratch);

/* The Gaussian moments E[s^a] of all monomials of degree <= ly->deg in the coordinates
 * with kind MEXP_FULL (others: 0 unless their exponent is 0), Isserlis' recursion
 * E[s_i s^b] = sum_j Sigma_ij b_j E[s^(b - e_j)]. out: ly->N entries. O(N n). */
void mexpand_gauss_moments(const mlayout *ly, const int *kind, const cplx *Sigma, cplx *out);

#endif
