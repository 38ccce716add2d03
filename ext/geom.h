/*
 * geom.h — plane geometry of polylines in the complex plane: winding numbers and signed
 * intersection counts, the two facts that decide how a contour deforms (which residues
 * it picks up, which saddles it passes through).
 */
#ifndef STEEP_GEOM_H
#define STEEP_GEOM_H

#include <stddef.h>
#include "steep.h"

/* (1/2pi) times the change of arg(t - z) along the polyline p[0..n-1] (not closed
 * unless p[n-1] == p[0]): the winding number for a closed curve. Returns NAN if the
 * curve passes through z. */
double geom_turning(const cplx *p, size_t n, cplx z);

/* Signed number of crossings of polylines a[0..na-1] and b[0..nb-1]: each crossing
 * counts +1 when b crosses a from right to left (Im(conj(da) db) > 0), -1 otherwise.
 * Sides are decided by orientation tests with "on the line" counted as "right", so a
 * crossing at a vertex of either polyline counts exactly once.
 * If pts is not NULL, up to maxpts crossing points are written and *npts counts all.
 * O(na nb). */
int geom_crossings(const cplx *a, size_t na, const cplx *b, size_t nb, cplx *pts,
                   size_t maxpts, size_t *npts);

/* Distance from z to the polyline p[0..n-1]; *seg (if not NULL) gets the index k of
 * the first segment p[k]..p[k+1] at that distance (0 when n < 2). */
double geom_nearest(const cplx *p, size_t n, cplx z, size_t *seg);

/* Distance from z to the polyline p[0..n-1]. */
double geom_distance(const cplx *p, size_t n, cplx z);

#endif
