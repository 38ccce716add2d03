/*
 * airy.c — Airy functions of a complex argument with error estimates, and the valleys
 * of the cubic model; contracts and sources in airy.h.
 */
#include <float.h>
#include <math.h>
#include "airy.h"

#define PI 3.14159265358979323846

/* ---- double-double arithmetic ------------------------------------------------------
 * A value is hi + lo with |lo| <= ulp(hi)/2 (Dekker, Numer. Math. 18 (1971) 224-242;
 * the add and multiply of Hida, Li & Bailey, ARITH 15 (2001)). Each operation below is
 * within a few units of 2^-106 relative; the error bounds further on count 2^-100 per
 * step of a series (several operations) to stay on the safe side. The splitting product
 * is exact without a fused multiply-add (and exact with one, should a compiler contract
 * it). Magnitudes stay far from overflow here (|x| < 1e290 before a split). */
typedef struct { double hi, lo; } dd;
typedef struct { dd re, im; } cdd;

static dd two_sum(double a, double b) {
  double s = a + b, bb = s - a;
  return (dd){s, (a - (s - bb)) + (b - bb)};
}

static dd fast_two_sum(double a, double b) {   /* |a| >= |b| or a = 0 */
  double s = a + b;
  return (dd){s, b - (s - a)};
}

static dd two_prod(double a, double b) {
  const double c = 134217729.0;   /* 2^27 + 1 */
  double p = a * b;
  double t = c * a, ah = t - (t - a), al = a - ah;
  t = c * b;
  double bh = t - (t - b), bl = b - bh;
  return (dd){p, ((ah * bh - p) + ah * bl + al * bh) + al * bl};
}

static dd dd_add(dd a, dd b) {
  dd s = two_sum(a.hi, b.hi), t = two_sum(a.lo, b.lo);
  s.lo += t.hi;
  s = fast_two_sum(s.hi, s.lo);
  s.lo += t.lo;
  return fast_two_sum(s.hi, s.lo);
}

static dd dd_neg(dd a) { return (dd){-a.hi, -a.lo}; }

static dd dd_mul(dd a, dd b) {
  dd p = two_prod(a.hi, b.hi);
  p.lo += a.hi * b.lo + a.lo * b.hi;
  return fast_two_sum(p.hi, p.lo);
}

static dd dd_mul_d(dd a, double b) {
  dd p = two_prod(a.hi, b);
  p.lo += a.lo * b;
  return fast_two_sum(p.hi, p.lo);
}

static dd dd_div_d(dd a, double b) {
  double q1 = a.hi / b;
  dd p = two_prod(q1, b);
  double r = ((a.hi - p.hi) - p.lo) + a.lo;
  return fast_two_sum(q1, r / b);
}

static dd dd_of(double a) { return (dd){a, 0}; }

static cdd cdd_of(cplx z) { return (cdd){dd_of(creal(z)), dd_of(cimag(z))}; }

static cdd cdd_add(cdd a, cdd b) { return (cdd){dd_add(a.re, b.re), dd_add(a.im, b.im)}; }

static cdd cdd_mul(cdd a, cdd b) {
  return (cdd){dd_add(dd_mul(a.re, b.re), dd_neg(dd_mul(a.im, b.im))),
               dd_add(dd_mul(a.re, b.im), dd_mul(a.im, b.re))};
}

static cdd cdd_mul_dd(cdd a, dd b) { return (cdd){dd_mul(a.re, b), dd_mul(a.im, b)}; }

static cdd cdd_div_d(cdd a, double b) { return (cdd){dd_div_d(a.re, b), dd_div_d(a.im, b)}; }

static cplx cdd_value(cdd a) { return (a.re.hi + a.re.lo) + I * (a.im.hi + a.im.lo); }

static double cdd_abs(cdd a) { return hypot(a.re.hi, a.im.hi); }

/* Constants as double-doubles, hi the double nearest and lo the rest (computed to 50
 * digits with an arbitrary-precision calculator from Gamma(1/3) = 2.6789385347077476336...,
 * itself from Stirling's series after shifting the argument up by 80):
 *   Ai(0) = 3^{-2/3}/Gamma(2/3), Ai'(0) = -3^{-1/3}/Gamma(1/3) (DLMF 9.2.3-9.2.4),
 *   Bi(0) = 3^{-1/6}/Gamma(2/3), Bi'(0) = 3^{1/6}/Gamma(1/3) (DLMF 9.2.5-9.2.6),
 *   sqrt(3)/2 and 2/3. The kernel tests check them against the Wronskian (DLMF 9.2.7). */
static const dd AI0 = {0x1.6b8c7962715b8p-2, 2.0523363243621199e-17};
static const dd AIP0 = {-0x1.0907f42b70f8bp-2, 2.5222431116108322e-17};
static const dd BI0 = {0x1.3ad7a9b4a3eaap-1, -6.0123094667624237e-17};
static const dd BIP0 = {0x1.cb0c1a680c8a1p-2, -2.5363237774417307e-17};
static const dd HALF_SQRT3 = {0x1.bb67ae8584caap-1, 5.0175421109034513e-17};
static const dd TWO_THIRDS = {0x1.5555555555555p-1, 3.7007434154171885e-17};

#define EPS DBL_EPSILON

/* ---- Maclaurin series ---------------------------------------------------------------
 * The solution of y'' = w y with y(0) = c0, y'(0) = c1 is sum p_n with p_n = a_n w^n,
 * a_{n+3} = a_n / ((n+2)(n+3)), a_2 = 0; y' = sum q_n with q_n = n a_n w^{n-1}, and
 * q_{n+3} = p_n w^2 / (n+2), p_{n+3} = q_{n+3} w / (n+3). Terms come in pairs (n = 3k,
 * 3k+1). A term after k steps carries a relative error below (k+1) 2^-100, each partial
 * sum 2^-103; the sum stops when the pair is below 2^-110 of the sum of magnitudes and
 * the ratio of consecutive terms is at most 1/2 (the tail is then below the last pair). */
static void maclaurin(cdd w, dd c0, dd c1, cplx *y, cplx *yp, double *ey, double *eyp) {
  const double u100 = 0x1p-100, u103 = 0x1p-103, u110 = 0x1p-110;
  cdd w2 = cdd_mul(w, w);
  double r = cdd_abs(w), r3 = r * r * r;
  cdd pa = {c0, dd_of(0)}, pb = cdd_mul_dd(w, c1);
  cdd sy = cdd_add(pa, pb), sd = {c1, dd_of(0)};
  double Sy = cdd_abs(pa) + cdd_abs(pb), Sd = fabs(c1.hi);
  double Ey = u100 * Sy, Ed = u100 * Sd, tail_y = 0, tail_d = 0;
  for (int k = 0; k < 400; k++) {
    double n = 3.0 * k;
    cdd qa = cdd_div_d(cdd_mul(pa, w2), n + 2), qb = cdd_div_d(cdd_mul(pb, w2), n + 3);
    pa = cdd_div_d(cdd_mul(qa, w), n + 3);
    pb = cdd_div_d(cdd_mul(qb, w), n + 4);
    sy = cdd_add(cdd_add(sy, pa), pb);
    sd = cdd_add(cdd_add(sd, qa), qb);
    double my = cdd_abs(pa) + cdd_abs(pb), md = cdd_abs(qa) + cdd_abs(qb);
    Sy += my;
    Sd += md;
    Ey += u100 * (k + 2) * my + u103 * cdd_abs(sy);
    Ed += u100 * (k + 2) * md + u103 * cdd_abs(sd);
    double ratio = r3 / ((n + 5) * (n + 6));
    if (ratio <= 0.5 && my <= u110 * Sy && md <= u110 * Sd) {
      tail_y = my;
      tail_d = md;
      break;
    }
    if (k == 399) tail_y = tail_d = INFINITY;   /* not reached for |w| <= 16 */
  }
  *y = cdd_value(sy);
  *yp = cdd_value(sd);
  *ey = Ey + tail_y + EPS * cabs(*y);
  *eyp = Ed + tail_d + EPS * cabs(*yp);
}

/* ---- asymptotic expansions ----------------------------------------------------------- */

/* sqrt of a double-double complex: the double root refined by one Newton step whose
 * residual w - s^2 is formed in double-double. */
static cdd cdd_sqrt(cdd w) {
  cplx s = csqrt(cdd_value(w));
  if (s == 0) return cdd_of(0);
  dd rr = two_prod(creal(s), creal(s)), ii = two_prod(cimag(s), cimag(s));
  dd ri = two_prod(creal(s), cimag(s));
  dd s2re = dd_add(rr, dd_neg(ii)), s2im = dd_mul_d(ri, 2.0);
  cplx res = (dd_add(w.re, dd_neg(s2re)).hi + dd_add(w.re, dd_neg(s2re)).lo) +
             I * (dd_add(w.im, dd_neg(s2im)).hi + dd_add(w.im, dd_neg(s2im)).lo);
  cplx corr = res / (2.0 * s);
  return (cdd){fast_two_sum(creal(s), creal(corr)), fast_two_sum(cimag(s), cimag(corr))};
}

/* Ai(w), Ai'(w) by DLMF 9.7.5-9.7.6 for |ph w| <= 2pi/3 (w in double-double):
 *   Ai(w)  ~ e^{-zeta} / (2 sqrt(pi) w^{1/4}) sum_k (-1)^k u_k zeta^{-k},
 *   Ai'(w) ~ -w^{1/4} e^{-zeta} / (2 sqrt(pi)) sum_k (-1)^k v_k zeta^{-k},
 * u_k = u_{k-1} (6k-5)(6k-3)(6k-1) / ((2k-1) 216 k), v_k = u_k (6k+1)/(1-6k) (DLMF 9.7.2).
 * Each sum stops at its smallest term or below 2^-56 of the sum; the remainder is bounded
 * by the first neglected term times 2 chi(n) exp(sigma pi/(72 |zeta|)) for |ph w| <= pi/3
 * and 4 chi(n) exp(...) up to 2pi/3 (DLMF 9.7(iv); sigma = 5 for Ai and 7 for Ai'; the
 * constants from memory, and the kernel and Lua tests check the estimates against
 * independent values). */
static int ai_asymptotic(cdd w, cplx *ai, cplx *aip, double *eai, double *eaip) {
  cplx wv = cdd_value(w);
  double absw = cabs(wv);
  cdd zeta_dd;
  if (absw < 1e30) {
    zeta_dd = cdd_mul_dd(cdd_mul(w, cdd_sqrt(w)), TWO_THIRDS);
  } else {   /* (no splitting at this size: zeta in double, its error counted below) */
    zeta_dd = cdd_of(2.0 / 3.0 * wv * csqrt(wv));
  }
  cplx zeta = cdd_value(zeta_dd);
  double azeta = cabs(zeta);
  double extra = absw < 1e30 ? 0 : 4 * EPS * azeta;   /* relative, from zeta's rounding */
  cplx inv = 1.0 / zeta;
  /* the two sums */
  cplx su = 1, sv = 1, tu = 1, tv = 1;
  double uk = 1, absu = 1, absv = 1, next_u = 0, next_v = 0;
  int nu = 0, nv = 0, done_u = 0, done_v = 0;
  double prev_u = INFINITY, prev_v = INFINITY;
  cplx pw = 1;
  for (int k = 1; k < 200 && !(done_u && done_v); k++) {
    uk *= (6.0 * k - 5) * (6.0 * k - 3) * (6.0 * k - 1) / ((2.0 * k - 1) * 216.0 * k);
    double vk = uk * (6.0 * k + 1) / (1.0 - 6.0 * k);
    pw *= -inv;
    tu = uk * pw;
    tv = vk * pw;
    double mu = cabs(tu), mv = cabs(tv);
    if (!done_u) {
      if (mu >= prev_u || mu <= 0x1p-56 * cabs(su)) { done_u = 1; next_u = mu; nu = k; }
      else { su += tu; absu += mu; prev_u = mu; }
    }
    if (!done_v) {
      if (mv >= prev_v || mv <= 0x1p-56 * cabs(sv)) { done_v = 1; next_v = mv; nv = k; }
      else { sv += tv; absv += mv; prev_v = mv; }
    }
  }
  if (!done_u) { nu = 200; next_u = prev_u; }
  if (!done_v) { nv = 200; next_v = prev_v; }
  double phw = fabs(carg(wv));
  double sector = phw <= PI / 3 ? 2.0 : 4.0;
  double bound_u = sector * airy_chi_bound(nu) * exp(5 * PI / (72 * azeta)) * next_u;
  double bound_v = sector * airy_chi_bound(nv) * exp(7 * PI / (72 * azeta)) * next_v;
  /* prefactors: e^{-zeta} with zeta = hi + lo per part (the lo part to first order) */
  double zr = zeta_dd.re.hi, zrl = zeta_dd.re.lo, zi = zeta_dd.im.hi, zil = zeta_dd.im.lo;
  cplx w4 = csqrt(csqrt(wv));
  double c = cos(zi), s = sin(zi);
  cplx phase = (c - zil * s) - I * (s + zil * c);   /* e^{-i (zi + zil)}, to first order in zil */
  cplx mu_ = su / (2 * sqrt(PI) * w4), mv_ = -sv * w4 / (2 * sqrt(PI));
  double rel_u = bound_u / cabs(su) + 2 * EPS * absu / cabs(su) + (16 * EPS + extra);
  double rel_v = bound_v / cabs(sv) + 2 * EPS * absv / cabs(sv) + (16 * EPS + extra);
  /* log of the magnitudes, to see under- and overflow before they happen */
  double lu = -zr + log(cabs(mu_)), lv = -zr + log(cabs(mv_));
  int status = AIRY_OK;
  if (fabs(zr) < 700) {
    double m = exp(-zr) * (1 - zrl);
    *ai = m * phase * mu_;
    *aip = m * phase * mv_;
  } else {
    *ai = lu < 709 ? exp(lu) * (1 - zrl) * phase * (mu_ / cabs(mu_)) : INFINITY;
    *aip = lv < 709 ? exp(lv) * (1 - zrl) * phase * (mv_ / cabs(mv_)) : INFINITY;
  }
  if (lu >= 709 || lv >= 709) {
    *eai = *eaip = INFINITY;
    if (lu >= 709) *ai = INFINITY;
    if (lv >= 709) *aip = INFINITY;
    return AIRY_OVERFLOW;
  }
  *eai = rel_u * cabs(*ai);
  *eaip = rel_v * cabs(*aip);
  if (lu < -708 || lv < -708) {
    /* below the normal range: the value (0 or subnormal) is within DBL_MIN of the truth */
    if (lu < -708) { *eai = fmax(*eai, DBL_MIN); if (lu < -745) *ai = 0; }
    if (lv < -708) { *eaip = fmax(*eaip, DBL_MIN); if (lv < -745) *aip = 0; }
    status = AIRY_UNDERFLOW;
  }
  return status;
}

/* w e^{2 pi i/3} (sign +1) or w e^{-2 pi i/3} (sign -1) in double-double. */
static cdd rotate(cdd w, int sign) {
  dd h = {-0.5 * w.re.hi, -0.5 * w.re.lo}, g = {-0.5 * w.im.hi, -0.5 * w.im.lo};
  dd a = dd_mul(w.re, HALF_SQRT3), b = dd_mul(w.im, HALF_SQRT3);
  /* (re + i im)(-1/2 +- i sqrt3/2) = (-re/2 -+ im sqrt3/2) + i (+-re sqrt3/2 - im/2) */
  if (sign > 0) return (cdd){dd_add(h, dd_neg(b)), dd_add(a, g)};
  return (cdd){dd_add(h, b), dd_add(dd_neg(a), g)};
}

static const cplx OMEGA = -0.5 + 0.86602540378443864676 * I;      /* e^{2 pi i/3} */
static const cplx OMEGA_BAR = -0.5 - 0.86602540378443864676 * I;

/* The status of a value combined from two: overflow if either overflowed (the sum is
 * then reported as infinite, never as inf - inf), else the first non-ok one. */
static int combined_status(int s1, int s2, cplx *v, cplx *d, double *ev, double *ed) {
  if (s1 == AIRY_OVERFLOW || s2 == AIRY_OVERFLOW) {
    *v = *d = INFINITY;
    *ev = *ed = INFINITY;
    return AIRY_OVERFLOW;
  }
  return s1 ? s1 : s2;
}

/* Ai and Ai' at a large argument of any phase: DLMF 9.7.5-9.7.6 within 2pi/3 of the
 * positive axis, the connection formula DLMF 9.2.12,
 *   Ai(w) = -omega Ai(omega w) - omega^2 Ai(omega^2 w),
 *   Ai'(w) = -omega^2 Ai'(omega w) - omega Ai'(omega^2 w)   (omega = e^{2 pi i/3}),
 * beyond (both rotated arguments then lie within 2pi/3). For a real w the two terms are
 * conjugate: twice the real part of one. */
static int ai_large(cdd w, cplx *ai, cplx *aip, double *eai, double *eaip) {
  cplx wv = cdd_value(w);
  if (fabs(carg(wv)) <= 2 * PI / 3) return ai_asymptotic(w, ai, aip, eai, eaip);
  cplx a1, d1, a2 = 0, d2 = 0;
  double e1, f1, e2 = 0, f2 = 0;
  int st = ai_asymptotic(rotate(w, 1), &a1, &d1, &e1, &f1);
  if (cimag(wv) == 0 && w.im.lo == 0) {
    *ai = -2 * creal(OMEGA * a1);
    *aip = -2 * creal(OMEGA_BAR * d1);
    *eai = 2 * e1 + 4 * EPS * cabs(a1);
    *eaip = 2 * f1 + 4 * EPS * cabs(d1);
    return combined_status(st, AIRY_OK, ai, aip, eai, eaip);
  }
  int st2 = ai_asymptotic(rotate(w, -1), &a2, &d2, &e2, &f2);
  *ai = -OMEGA * a1 - OMEGA_BAR * a2;
  *aip = -OMEGA_BAR * d1 - OMEGA * d2;
  *eai = e1 + e2 + 4 * EPS * (cabs(a1) + cabs(a2));
  *eaip = f1 + f2 + 4 * EPS * (cabs(d1) + cabs(d2));
  return combined_status(st, st2, ai, aip, eai, eaip);
}

/* Below this radius the Maclaurin series is summed; above AIRY_ASYMPTOTIC_RADIUS the
 * expansions; in between both, and the one with the smaller error estimate is kept. */
#define MACLAURIN_RADIUS 12.0

static int finite_z(cplx z) { return isfinite(creal(z)) && isfinite(cimag(z)); }

int airy_ai(cplx z, cplx *ai, cplx *aip, double *err_ai, double *err_aip) {
  if (!finite_z(z)) {
    *ai = *aip = NAN;
    *err_ai = *err_aip = INFINITY;
    return AIRY_NONFINITE;
  }
  double r = cabs(z);
  int st = AIRY_OK;
  if (r >= AIRY_ASYMPTOTIC_RADIUS) st = ai_large(cdd_of(z), ai, aip, err_ai, err_aip);
  if (r < MACLAURIN_RADIUS) {
    cplx a, d;
    double ea, ed;
    maclaurin(cdd_of(z), AI0, AIP0, &a, &d, &ea, &ed);
    if (r < AIRY_ASYMPTOTIC_RADIUS ||
        ea / cabs(a) + ed / cabs(d) < *err_ai / cabs(*ai) + *err_aip / cabs(*aip)) {
      *ai = a, *aip = d, *err_ai = ea, *err_aip = ed;
      st = AIRY_OK;
    }
  }
  return st;
}

/* Bi by DLMF 9.2.10: Bi(z) = e^{pi i/6} Ai(omega z) + e^{-pi i/6} Ai(omega^2 z), and
 * Bi'(z) = e^{pi i/6} omega Ai'(omega z) + e^{-pi i/6} omega^2 Ai'(omega^2 z). */
int airy_bi(cplx z, cplx *bi, cplx *bip, double *err_bi, double *err_bip) {
  if (!finite_z(z)) {
    *bi = *bip = NAN;
    *err_bi = *err_bip = INFINITY;
    return AIRY_NONFINITE;
  }
  double r = cabs(z);
  if (r < AIRY_ASYMPTOTIC_RADIUS) {
    maclaurin(cdd_of(z), BI0, BIP0, bi, bip, err_bi, err_bip);
    return AIRY_OK;
  }
  const cplx e6 = 0.86602540378443864676 + 0.5 * I;   /* e^{pi i/6} */
  cplx a1, d1, a2, d2;
  double e1, f1, e2, f2;
  int st = ai_large(rotate(cdd_of(z), 1), &a1, &d1, &e1, &f1);
  if (cimag(z) == 0) {
    *bi = 2 * creal(e6 * a1);
    *bip = 2 * creal(e6 * OMEGA * d1);
    *err_bi = 2 * e1 + 4 * EPS * cabs(a1);
    *err_bip = 2 * f1 + 4 * EPS * cabs(d1);
    return combined_status(st, AIRY_OK, bi, bip, err_bi, err_bip);
  }
  int st2 = ai_large(rotate(cdd_of(z), -1), &a2, &d2, &e2, &f2);
  *bi = e6 * a1 + conj(e6) * a2;
  *bip = e6 * OMEGA * d1 + conj(e6) * OMEGA_BAR * d2;
  *err_bi = e1 + e2 + 4 * EPS * (cabs(a1) + cabs(a2));
  *err_bip = f1 + f2 + 4 * EPS * (cabs(d1) + cabs(d2));
  return combined_status(st, st2, bi, bip, err_bi, err_bip);
}

double airy_chi_bound(int n) { return sqrt(PI * (n + 2) / 2.0); }

/* ---- the cubic model's valleys ------------------------------------------------------- */

static double angle_diff(double a, double b) {
  double d = fmod(a - b, 2 * PI);
  if (d > PI) d -= 2 * PI;
  if (d < -PI) d += 2 * PI;
  return d;
}

int airy_model_valley(cplx zeta, cplx u0, double dir, int *other_hit) {
  *other_hit = 0;
  if (!finite_z(zeta) || !finite_z(u0) || !isfinite(dir)) return -3;
  cplx u1 = -u0, P2 = -2.0 * u0;
  double sep = cabs(u0 - u1);
  if (!(sep > 0)) return -3;
  /* the descent directions a and a + pi: arg P'' + 2a = pi */
  double a = 0.5 * (PI - carg(P2));
  double d1 = angle_diff(a, dir), d2 = angle_diff(a + PI, dir);
  if (fmin(fabs(d1), fabs(d2)) > PI / 3) return -1;
  double alpha = fabs(d1) <= fabs(d2) ? a : a + PI;
  cplx P0 = zeta * u0 - u0 * u0 * u0 / 3.0;
  double im0 = cimag(P0), re0 = creal(P0);
  double far = 4 * fmax(1.0, sep);
  cplx u = u0 + 0.25 * sep * cexp(I * alpha);
  for (int step = 0; step < 4000; step++) {
    /* back onto Im P = Im P(u0): two Newton steps along i conj(P') */
    for (int it = 0; it < 2; it++) {
      cplx dP = zeta - u * u, P = zeta * u - u * u * u / 3.0;
      double g = creal(dP) * creal(dP) + cimag(dP) * cimag(dP);
      if (!(g > 0)) return -3;
      u += I * conj(dP) * ((im0 - cimag(P)) / g);
    }
    double d0 = cabs(u - u0), dother = cabs(u - u1);
    if (dother < 1e-3 * sep) { *other_hit = 1; return -2; }
    double au = cabs(u);
    cplx P = zeta * u - u * u * u / 3.0;
    if (au > far && creal(P) < re0 - 1 && cos(3 * carg(u)) > 0.5) {
      double th = carg(u);
      if (fabs(angle_diff(th, 0)) < PI / 6) return 0;
      if (fabs(angle_diff(th, 2 * PI / 3)) < PI / 6) return 1;
      return 2;
    }
    /* a midpoint step of a tenth of the distance to the nearer saddle along the
     * descent direction -conj(P')/|P'| */
    double h = 0.1 * fmax(fmin(d0, dother), 0.05 * au);
    cplx dP = zeta - u * u;
    if (!(cabs(dP) > 0)) return -3;
    cplx dir1 = -conj(dP) / cabs(dP);
    cplx um = u + 0.5 * h * dir1, dPm = zeta - um * um;
    if (!(cabs(dPm) > 0)) return -3;
    u += h * (-conj(dPm) / cabs(dPm));
    if (!finite_z(u)) return -3;
  }
  return -3;
}
