"""Parameters of x and y extrema of Bézier segments, and their tight bounding boxes.

References
----------
G. Farin, *Curves and Surfaces for CAGD*, 5th ed., §5.3 (the hodograph: x′(t) and y′(t) are
Bézier polynomials of degree n − 1). W. H. Press et al., *Numerical Recipes*, 3rd ed., §5.6
(quadratic equation without cancellation).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.geometry._batch import as_batch
from outlinebench.geometry.bezier import bernstein_matrix

__all__ = ["extrema_params", "bounding_box", "stationary_params"]

FloatArray = NDArray[np.float64]

# A leading coefficient below this fraction of the largest coefficient of the derivative
# polynomial is treated as zero (the quadratic degenerates to a linear equation); the
# derivative's coefficients are differences of control points, so rounding is ~1e-16 of them.
_DEGENERATE = 1e-14


def stationary_params(points: ArrayLike, *, simple_only: bool = False) -> FloatArray:
    """Parameters in (0, 1) where x′(t) = 0 (column 0) or y′(t) = 0 (column 1), for a batch.

    Parameters
    ----------
    points : array_like, shape (K, 2) or (M, K, 2)
    simple_only : bool
        Keep only simple roots (where the coordinate really turns back). Double roots, where
        x′ touches zero without changing sign, are left out.

    Returns
    -------
    ndarray, shape (M, 2, 2) (or (2, 2) for one segment)
        ``out[m, axis]`` holds up to two parameters, NaN where there is none.

    Notes
    -----
    For a cubic, x′(t)/3 = a(1 − t)² + 2b t(1 − t) + c t² with a, b, c the differences of the
    x coordinates of consecutive control points, i.e. (a − 2b + c) t² + 2(b − a) t + a = 0
    (Farin §5.3), solved with the cancellation-free formula of Numerical Recipes §5.6. For a
    quadratic, x′ is linear: t = a / (a − b). Lines have none.
    """
    pts, single = as_batch(points)
    m, k, _ = pts.shape
    out = np.full((m, 2, 2), np.nan)
    if k == 2:
        return out[0] if single else out
    d = pts[:, 1:, :] - pts[:, :-1, :]  # (M, K−1, 2)
    # Differences are taken relative to the segment's size so tiny and huge curves behave alike.
    size = np.max(np.abs(d), axis=(1, 2))
    size = np.where(size > 0.0, size, 1.0)[:, None]
    for axis in (0, 1):
        c = d[:, :, axis] / size
        if k == 3:
            a, b = c[:, 0], c[:, 1]
            den = a - b
            with np.errstate(divide="ignore", invalid="ignore"):
                t = np.where(np.abs(den) > _DEGENERATE, a / np.where(den != 0, den, 1.0), np.nan)
            out[:, axis, 0] = t
            continue
        a, b, cc = c[:, 0], c[:, 1], c[:, 2]
        qa = a - 2.0 * b + cc
        qb = 2.0 * (b - a)
        qc = a
        big = np.maximum(np.maximum(np.abs(qa), np.abs(qb)), np.abs(qc))
        lin = np.abs(qa) <= _DEGENERATE * np.where(big > 0, big, 1.0)
        safe_qa = np.where(qa != 0.0, qa, 1.0)
        with np.errstate(divide="ignore", invalid="ignore"):
            t_lin = np.where(np.abs(qb) > _DEGENERATE, -qc / np.where(qb != 0, qb, 1.0), np.nan)
            disc = qb * qb - 4.0 * qa * qc
            # |disc| at rounding level: a double root (x′ touches zero).
            double = np.abs(disc) <= 8 * np.finfo(float).eps * (qb * qb + np.abs(4.0 * qa * qc))
            two = (disc > 0.0) & ~double
            sq = np.sqrt(np.where(two, disc, 0.0))
            s = -0.5 * (qb + np.copysign(sq, qb))
            safe_s = np.where(s != 0.0, s, 1.0)
            r1 = np.where(two, s / safe_qa, np.nan)
            r2 = np.where(two, qc / safe_s, np.nan)
            if not simple_only:
                r1 = np.where(double, -qb / (2.0 * safe_qa), r1)
        r1 = np.where(lin, t_lin, r1)
        r2 = np.where(lin, np.nan, r2)
        out[:, axis, 0] = r1
        out[:, axis, 1] = r2
    out = np.where((out > 0.0) & (out < 1.0), out, np.nan)
    out = np.sort(out, axis=-1)  # NaN last
    return out[0] if single else out


def extrema_params(points: ArrayLike) -> tuple[FloatArray, FloatArray]:
    """Interior parameters of one segment's x extrema and y extrema.

    Parameters
    ----------
    points : array_like, shape (K, 2)

    Returns
    -------
    (tx, ty) : ndarrays, sorted, each with 0 to 2 parameters in (0, 1)
        Where x (resp. y) has a local maximum or minimum inside the segment: simple roots
        of x′ (resp. y′). A coordinate that is constant, or that pauses without turning
        back (a double root), has none.

    Notes
    -----
    See :func:`stationary_params`.

    Examples
    --------
    >>> tx, ty = extrema_params(np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]]))
    >>> tx, ty
    (array([], dtype=float64), array([0.5]))
    """
    st = stationary_params(np.asarray(points, dtype=np.float64)[None], simple_only=True)[0]
    tx = st[0][np.isfinite(st[0])]
    ty = st[1][np.isfinite(st[1])]
    return tx, ty


def bounding_box(points: ArrayLike) -> tuple[float, float, float, float] | FloatArray:
    """Tight axis-aligned bounding box of the segment(s).

    Parameters
    ----------
    points : array_like, shape (K, 2) or (M, K, 2)

    Returns
    -------
    tuple of float (xmin, ymin, xmax, ymax), or ndarray of shape (M, 4)
        The box of the curve itself, not of its control polygon.

    Notes
    -----
    The extremes of each coordinate are among its values at t = 0, t = 1 and the interior
    roots of its derivative (Farin §5.3), all evaluated here at once; segments whose handles
    lie within their end points' range have their box from the end points alone (convex hull
    property).

    Examples
    --------
    >>> bounding_box(np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]]))
    (0.0, 0.0, 2.0, 1.0)
    """
    pts, single = as_batch(points)
    n = pts.shape[1] - 1
    ends = pts[:, [0, -1]]
    lo = ends.min(axis=1)
    hi = ends.max(axis=1)
    # Only where a handle lies beyond its end points' range can the curve leave it (convex
    # hull property, Farin §5.3): the interior roots are found and evaluated for those rows.
    inner = pts[:, 1:-1]
    look = np.flatnonzero(((inner < lo[:, None, :]) | (inner > hi[:, None, :])).any(axis=(1, 2)))
    if look.size:
        sub = pts[look]
        ts = stationary_params(sub).reshape(look.size, 4)
        valid = np.isfinite(ts)
        basis = bernstein_matrix(n, np.where(valid, ts, 0.0).ravel()).reshape(look.size, 4, n + 1)
        vals = np.einsum("mtk,mkd->mtd", basis, sub)
        lo[look] = np.minimum(lo[look], np.where(valid[..., None], vals, np.inf).min(axis=1))
        hi[look] = np.maximum(hi[look], np.where(valid[..., None], vals, -np.inf).max(axis=1))
    box = np.concatenate([lo, hi], axis=1)
    if single:
        return tuple(float(v) for v in box[0])
    return box
