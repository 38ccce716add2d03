/*
 * invmap.h — the inverse of the local map F0 - F(t0 + h) = w^m on a circle |w| = rho,
 * for the coefficients of G(w) = g(t0 + h(w)) h'(w) by Cauchy's formula.
 *
 * Reverting the Taylor series of the map loses digits geometrically when G has a larger
 * radius of convergence than the map's own series (e.g. log's singularity limits the
 * series in h, not G): its n-th coefficient comes out with an absolute error of about
 * eps, against a true size of R^-n. On a circle of radius rho < R, G's values are
 * accurate to eps |G|, so the trapezoidal rule gives a_n to eps max|G| rho^-n and the
 * relative error grows only like (R/rho)^n (Trefethen & Weideman, SIAM Review 56 (2014)
 * 385-458, on the trapezoidal rule for Taylor coefficients). h(w) is followed by
 * continuation with Newton's method: out along the ray w > 0 from the series guess
 * h = w/s, then around the circle.
 */
#ifndef STEEP_INVMAP_H
#define STEEP_INVMAP_H

#include "problem.h"

enum invmap_status {
  INVMAP_OK = 0,
  INVMAP_NEWTON,     /* Newton's method failed even with small steps, or the trip needed
                      * more than 131072 + 16 N continuation steps in all */
  INVMAP_NOTCLOSED,  /* going round the circle did not return to the start: a branch
                      * point of h(w) lies inside (rho too large) */
  INVMAP_SINGULAR    /* F or g could not be evaluated on the way */
};

/* G[j] = g(t0 + h_j) h'(w_j) at w_j = rho exp(2 pi i j / N), j = 0..N-1, where
 * F0 - F(t0 + h) = w^m and h ~ w / s for small w (s^m = -f_m: the branch that sends
 * w > 0 along the chosen descent direction). Cost: about 3 evaluations of F and F' per
 * point (forward mode). */
int invmap_circle(problem *p, cplx t0, cplx F0, int m, cplx s, double rho, size_t N,
                  cplx *G);

/* The same for two saddles near each other, by the cubic map of Chester, Friedman &
 * Ursell (Proc. Camb. Phil. Soc. 53 (1957) 599-611):
 *   F(t) = A + zeta u - u^3/3,  saddle t1 <-> u_a (u_a^2 = zeta),
 * with t'(u_a) = tprime fixing the branch. G[j] = g(t(u_j)) t'(u_j) on |u| = rho (which
 * must enclose both saddles' images), for the Taylor coefficients of G about u = 0. */
int invmap_cubic(problem *p, cplx t1, cplx A, cplx zeta, cplx ua, cplx tprime, double rho,
                 size_t N, cplx *G);

/* The same for three saddles near each other, by the quartic map of the cusp (Connor &
 * Farrelly, J. Chem. Phys. 75 (1981), after Chester, Friedman & Ursell):
 *   F(t) = A - (u^4/4 - zeta u^2/2 + eta u),  saddle t1 <-> u_a (a root of
 *   u^3 - zeta u + eta), with t'(u_a) = tprime fixing the branch. G[j] = g(t(u_j)) t'(u_j)
 * on |u| = rho (which must enclose the three roots' images), for the Taylor coefficients
 * of G about u = 0. Start the trip from the root of largest modulus: the ray out of it
 * then meets no other root. */
int invmap_quartic(problem *p, cplx t1, cplx A, cplx zeta, cplx eta, cplx ua, cplx tprime,
                   double rho, size_t N, cplx *G);

#endif
