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

from outlinebench.geometry._batch import segment_scale
from outlinebench.geometry.bezier import evaluate, power_coefficients

__all__ = ["nearest_point", "distance_to"]

FloatArray = NDArray[np.float64]

# Roots of the stationarity polynomial with |imaginary part| below this are tried as real
# (after clipping to [0, 1] and polishing): a double real root comes out of the eigenvalue
# solver with an imaginary part ~√eps ≈ 1e-8, so the bar is set well above that. Extra
# candidates cost one evaluation each and can never make the answer worse.
_IMAG_TOLERANCE = 1e-5


def _nearest_one(pts: FloatArray, p: FloatArray) -> tuple[float, float, FloatArray]:
    scale = float(segment_scale(pts[None])[0])
    cands = [0.0, 1.0]
    if scale > 0.0 and pts.shape[0] > 2:
        q = (pts - p) / scale  # the query point at the origin, unit size
        c = power_coefficients(q)
        d = P.polyder(c, axis=0)
        f = P.polyadd(P.polymul(c[:, 0], d[:, 0]), P.polymul(c[:, 1], d[:, 1]))
        f = np.trim_zeros(f, "b")
        if f.size > 1 and np.any(f != 0.0):
            roots = P.polyroots(f)
            roots = roots[np.abs(roots.imag) <= _IMAG_TOLERANCE].real
            t = np.clip(roots, 0.0, 1.0)
            # Two Newton steps on f = (B − p)·B′, f′ = |B′|² + (B − p)·B″, to polish.
            dd = P.polyder(d, axis=0)
            for _ in range(2):
                b0 = P.polyval(t, c).T if t.size else np.zeros((0, 2))
                b1 = P.polyval(t, d).T if t.size else np.zeros((0, 2))
                b2 = P.polyval(t, dd).T if t.size else np.zeros((0, 2))
                fv = np.sum(b0 * b1, axis=1)
                fp = np.sum(b1 * b1, axis=1) + np.sum(b0 * b2, axis=1)
                with np.errstate(divide="ignore", invalid="ignore"):
                    step = np.where(fp > 0.0, fv / np.where(fp > 0.0, fp, 1.0), 0.0)
                t = np.clip(t - step, 0.0, 1.0)
            cands.extend(t.tolist())
    elif scale > 0.0:
        # A line: the projection of p, clipped (closed form).
        d = pts[1] - pts[0]
        cands.append(float(np.clip(np.dot(p - pts[0], d) / np.dot(d, d), 0.0, 1.0)))
    ts = np.array(sorted(set(cands)))
    pts_on = evaluate(pts, ts)
    dist = np.hypot(pts_on[:, 0] - p[0], pts_on[:, 1] - p[1])
    i = int(np.argmin(dist))  # the smallest t among equal distances (ts is sorted)
    return float(ts[i]), float(dist[i]), pts_on[i]


def nearest_point(points: ArrayLike, p: ArrayLike):
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
    if q.ndim == 1:
        return _nearest_one(pts, q)
    res = [_nearest_one(pts, row) for row in q.reshape(-1, 2)]
    t = np.array([r[0] for r in res])
    dist = np.array([r[1] for r in res])
    point = np.array([r[2] for r in res]).reshape(-1, 2)
    return t, dist, point


def distance_to(points: ArrayLike, p: ArrayLike):
    """Shortest distance from p (shape (2,) or (N, 2)) to one segment; see :func:`nearest_point`."""
    return nearest_point(points, p)[1]
