"""Nearest point on a Bézier segment to a given point, found globally.

References
----------
X.-D. Chen et al., "Computing the minimum distance between a point and a NURBS curve",
Computer-Aided Design 40, 2008 (the stationarity polynomial (B − p)·B′ and its roots).
A. Edelman and H. Murakami, "Polynomial roots from companion matrix eigenvalues", Math. Comp.
64, 1995 (companion-matrix root finding, numpy ``polyroots``).
"""

from __future__ import annotations

import numpy as np
from numpy.polynomial import polynomial as P
from numpy.typing import ArrayLike, NDArray

from outlinebench.geometry._batch import horner, segment_scale
from outlinebench.geometry.bezier import evaluate, power_coefficients

__all__ = ["nearest_point", "distance_to"]

FloatArray = NDArray[np.float64]

# Roots of the stationarity polynomial with |imaginary part| below this are tried as real
# (after clipping to [0, 1] and polishing): a double real root comes out of the eigenvalue
# solver with an imaginary part ~√eps ≈ 1e-8, so the bar is set well above that. Extra
# candidates cost one evaluation each and can never make the answer worse.
_IMAG_TOLERANCE = 1e-5


def _real_roots(coeffs: FloatArray) -> FloatArray:
    """Roots of many polynomials of one degree, non-real ones replaced by 0, shape (N, D).

    ``coeffs`` (N, D + 1), lowest power first, leading coefficients non-zero. The roots are
    the eigenvalues of each companion matrix, computed for all rows in one call.
    """
    n, k = coeffs.shape
    deg = k - 1
    monic = coeffs[:, :-1] / coeffs[:, -1:]
    comp = np.zeros((n, deg, deg))
    if deg > 1:
        comp[:, np.arange(1, deg), np.arange(deg - 1)] = 1.0
    comp[:, :, -1] = -monic
    roots = np.linalg.eigvals(comp)
    return np.where(np.abs(roots.imag) <= _IMAG_TOLERANCE, roots.real, 0.0)


def _nearest_many(pts: FloatArray, qs: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Nearest points of one segment to each of N query points: (t, distance, point)."""
    m = qs.shape[0]
    scale = float(segment_scale(pts[None])[0])
    if scale == 0.0 or m == 0:
        t = np.zeros((m, 1))
    elif pts.shape[0] == 2:
        # A line: the projection of each query point, clipped (closed form); inside the
        # segment the distance is |(p − P0) × d| / |d|, exact 0 for a point on the line.
        # Both vectors scaled by the same power of two (exact) so that d·d and the cross
        # product neither overflow nor underflow at coordinates near the ends of binary64.
        d = pts[1] - pts[0]
        rel = qs - pts[0]
        k = int(np.frexp(float(np.max(np.abs(d))))[1])
        d, rel = np.ldexp(d, -k), np.ldexp(rel, -k)
        t = np.clip(rel @ d / float(d @ d), 0.0, 1.0)
        on = evaluate(pts, t)
        dist = np.hypot(on[:, 0] - qs[:, 0], on[:, 1] - qs[:, 1])
        inside = (t > 0.0) & (t < 1.0)
        perp = np.abs(rel[:, 0] * d[1] - rel[:, 1] * d[0]) / float(np.hypot(d[0], d[1]))
        dist = np.where(inside, np.ldexp(perp, k), dist)
        return t, dist, on
    else:
        q = (pts - pts[0]) / scale  # unit size, starting at the origin
        r = (qs - pts[0]) / scale
        c = power_coefficients(q)
        d = P.polyder(c, axis=0)
        # f(t) = (B − p)·B′ = B·B′ − p·B′: the first part is shared by all queries.
        shared = P.polyadd(P.polymul(c[:, 0], d[:, 0]), P.polymul(c[:, 1], d[:, 1]))
        shared = np.trim_zeros(shared, "b")
        ends = np.stack([np.zeros(m), np.ones(m)], axis=1)
        if shared.size > 1:
            f = np.zeros((m, max(shared.size, d.shape[0])))
            f[:, : shared.size] = shared
            f[:, : d.shape[0]] -= r @ d.T
            f = f[:, : shared.size]  # p·B′ has a lower degree than B·B′
            t = np.clip(_real_roots(f), 0.0, 1.0)
            # Two Newton steps on f, f′ = |B′|² + (B − p)·B″, to polish.
            dd = P.polyder(d, axis=0)
            t = _polish(c, d, dd, r, t)
            t = np.concatenate([ends, t], axis=1)
        else:
            t = ends
    # Distances at every candidate, in the caller's coordinates; ties go to the smallest t.
    t = np.sort(t, axis=1)
    on = evaluate(pts, t.ravel()).reshape(m, t.shape[1], 2)
    dist = np.hypot(on[:, :, 0] - qs[:, None, 0], on[:, :, 1] - qs[:, None, 1])
    i = np.argmin(dist, axis=1)
    rows = np.arange(m)
    return t[rows, i], dist[rows, i], on[rows, i]


def _polish(c: FloatArray, d: FloatArray, dd: FloatArray, r: FloatArray, t: FloatArray):
    """Two Newton steps on f(t) = (B(t) − p)·B′(t) for each query's candidate parameters.

    ``c, d, dd``: power coefficients of B, B′, B″ (unit-sized); ``r`` (N, 2) the queries in
    the same coordinates; ``t`` (N, C).
    """
    for _ in range(2):
        b0 = horner(c[:, None, None, :], t[..., None]) - r[:, None, :]
        b1 = horner(d[:, None, None, :], t[..., None])
        b2 = horner(dd[:, None, None, :], t[..., None])
        fv = np.sum(b0 * b1, axis=2)
        fp = np.sum(b1 * b1, axis=2) + np.sum(b0 * b2, axis=2)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = np.where(fp > 0.0, fv / np.where(fp > 0.0, fp, 1.0), 0.0)
        t = np.clip(t - step, 0.0, 1.0)
    return t


def nearest_point(
    points: ArrayLike, p: ArrayLike
) -> tuple[float, float, FloatArray] | tuple[FloatArray, FloatArray, FloatArray]:
    """The point of one segment closest to p (global minimum, not a local search).

    Parameters
    ----------
    points : array_like, shape (K, 2)
    p : array_like, shape (2,) or (N, 2)

    Returns
    -------
    (t, distance, point)
        For one query point: float, float, ndarray (2,). For N: ndarrays (N,), (N,), (N, 2).
        Ties (p at the centre of a circular arc) resolve to the smallest t. A segment whose
        points all coincide gives t = 0.

    Notes
    -----
    Every interior minimum of |B(t) − p|² is a root of f(t) = (B(t) − p)·B′(t), a polynomial
    of degree 2n − 1 (5 for a cubic; Chen et al. 2008). All its roots come from the
    eigenvalues of the companion matrix (numpy ``polyroots``; Edelman & Murakami 1995);
    nearly real ones are clipped to [0, 1], polished by two Newton steps, and compared with
    both ends. Work is done with p at the origin and the segment scaled to unit size, so
    coordinates near 1e9 or 1e-9 keep their relative accuracy.

    Examples
    --------
    >>> nearest_point(np.array([[0.0, 0.0], [2.0, 0.0]]), [0.5, 1.0])
    (0.25, 1.0, array([0.5, 0. ]))
    """
    pts = np.asarray(points, dtype=np.float64)
    q = np.asarray(p, dtype=np.float64)
    t, dist, point = _nearest_many(pts, q.reshape(-1, 2))
    if q.ndim == 1:
        return float(t[0]), float(dist[0]), point[0]
    return t, dist, point


def distance_to(points: ArrayLike, p: ArrayLike) -> float | FloatArray:
    """Shortest distance from p (shape (2,) or (N, 2)) to one segment; see :func:`nearest_point`."""
    return nearest_point(points, p)[1]
