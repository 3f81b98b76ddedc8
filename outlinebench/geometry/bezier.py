"""Bézier segments as control-point arrays: validation, evaluation, splitting, hodographs.

A segment of degree n is a float64 array of shape ``(n + 1, 2)`` (written ``(K, 2)``): a line
has 2 control points, a quadratic 3, a cubic 4. Functions here also accept a batch of
same-degree segments of shape ``(M, K, 2)``; parameters ``t`` may be a scalar or a 1-D array of
shape ``(T,)``.

References
----------
G. Farin, *Curves and Surfaces for CAGD*, 5th ed., ch. 4-5 (de Casteljau algorithm,
hodograph, degree elevation).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError

__all__ = [
    "KIND_BY_DEGREE",
    "DEGREE_BY_KIND",
    "as_control_points",
    "degree",
    "evaluate",
    "derivative",
    "derivative_at",
    "split",
    "split_many",
    "subsegment",
    "reverse",
    "elevate",
    "to_cubic",
    "bernstein_matrix",
    "power_coefficients",
]

KIND_BY_DEGREE = {1: "line", 2: "quad", 3: "cubic"}
DEGREE_BY_KIND = {v: k for k, v in KIND_BY_DEGREE.items()}

FloatArray = NDArray[np.float64]


def as_control_points(points: ArrayLike, *, batch: bool = False) -> FloatArray:
    """Validate and convert control points to a float64 array.

    Parameters
    ----------
    points : array_like, shape (K, 2) or, with ``batch=True``, (M, K, 2)
        K is 2, 3 or 4 (line, quadratic, cubic).
    batch : bool
        Accept a stack of same-degree segments.

    Returns
    -------
    ndarray of float64
        A new array (the input is never aliased).

    Raises
    ------
    InvalidGeometryError
        Wrong shape, degree outside 1..3, or a coordinate that is not finite.

    Examples
    --------
    >>> as_control_points([[0, 0], [1, 1]]).shape
    (2, 2)
    """
    try:
        arr = np.array(points, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise InvalidGeometryError(f"control points are not numbers: {exc}") from None
    want = 3 if batch else 2
    if arr.ndim != want or arr.shape[-1] != 2:
        raise InvalidGeometryError(
            f"control points must have shape {'(M, K, 2)' if batch else '(K, 2)'}, got {arr.shape}"
        )
    if arr.shape[-2] not in (2, 3, 4):
        raise InvalidGeometryError(
            f"a segment needs 2, 3 or 4 control points (line, quad, cubic), got {arr.shape[-2]}"
        )
    if not np.all(np.isfinite(arr)):
        raise InvalidGeometryError("control points must be finite numbers")
    return arr


def degree(points: FloatArray) -> int:
    """Degree n of a segment or batch: number of control points minus one."""
    return points.shape[-2] - 1


def bernstein_matrix(n: int, t: ArrayLike) -> FloatArray:
    """Bernstein basis values ``B_{i,n}(t)`` as an array of shape ``(T, n + 1)``.

    Notes
    -----
    B_{i,n}(t) = C(n, i) tⁱ (1 − t)ⁿ⁻ⁱ. Used for batched evaluation, where a product with the
    control points gives the same point as de Casteljau's algorithm (Farin, §4.3).
    """
    t = np.atleast_1d(np.asarray(t, dtype=np.float64)).ravel()[:, None]
    s = 1.0 - t
    if n == 0:
        return np.ones_like(t)
    if n == 1:
        return np.hstack([s, t])
    if n == 2:
        return np.hstack([s * s, 2.0 * s * t, t * t])
    if n == 3:
        return np.hstack([s * s * s, 3.0 * s * s * t, 3.0 * s * t * t, t * t * t])
    from math import comb

    i = np.arange(n + 1)
    coeff = np.array([comb(n, k) for k in i], dtype=np.float64)
    return coeff * t**i * s ** (n - i)


def evaluate(points: FloatArray, t: ArrayLike) -> FloatArray:
    """Points on the segment(s) at parameter(s) t.

    Parameters
    ----------
    points : ndarray, shape (K, 2) or (M, K, 2)
    t : float or ndarray, shape (T,)

    Returns
    -------
    ndarray
        Shape (2,) for one segment and scalar t; (T, 2) for one segment and many t;
        (M, 2) for a batch and scalar t; (M, T, 2) for a batch and many t.

    Notes
    -----
    For a few points, de Casteljau's algorithm (Farin §4.2): repeated linear interpolation of
    the control polygon. For many, B(t) = Σ P_i B_{i,n}(t) with the Bernstein basis values
    (:func:`bernstein_matrix`) as one matrix product over all segments and parameters; the
    Bernstein form is as well conditioned as de Casteljau (Farouki & Rajan, "On the numerical
    condition of polynomials in Bernstein form", CAGD 4, 1987) and gives P0 and Pn exactly at
    t = 0 and t = 1.

    Examples
    --------
    >>> evaluate(np.array([[0.0, 0.0], [2.0, 2.0]]), 0.5)
    array([1., 1.])
    """
    # NOTE: inputs are trusted (validated with as_control_points at the boundary).
    scalar_t = np.ndim(t) == 0
    tt = np.atleast_1d(np.asarray(t, dtype=np.float64)).ravel()
    pts = np.asarray(points, dtype=np.float64)
    single = pts.ndim == 2
    if single:
        pts = pts[None]
    m, k, dim = pts.shape
    if scalar_t or tt.size * m < 64:
        # de Casteljau on (M, T, K, 2): cheapest for a handful of points.
        w = np.broadcast_to(pts[:, None, :, :], (m, tt.size, k, dim))
        tb = tt[None, :, None, None]
        sb = 1.0 - tb
        while w.shape[2] > 1:
            w = sb * w[:, :, :-1, :] + tb * w[:, :, 1:, :]
        out = w[:, :, 0, :]
    else:
        # One matrix product (T, K) @ (K, 2M) for everything at once.
        basis = bernstein_matrix(k - 1, tt)
        flat = basis @ pts.transpose(1, 0, 2).reshape(k, dim * m)
        out = flat.reshape(tt.size, m, dim).transpose(1, 0, 2)
    if scalar_t:
        out = out[:, 0, :]
    if single:
        out = out[0]
    return out


def derivative(points: FloatArray, order: int = 1) -> FloatArray:
    """Control points of the ``order``-th derivative (the hodograph).

    Returns
    -------
    ndarray, shape (K - order, 2) or (M, K - order, 2)
        For order ≥ K the derivative is identically zero and one zero point is returned.

    Notes
    -----
    B′(t) = n Σ (P_{i+1} − P_i) B_{i,n−1}(t) (Farin §5.3).
    """
    d = points
    for _ in range(order):
        n = d.shape[-2] - 1
        if n == 0:
            return np.zeros_like(d)
        d = n * (d[..., 1:, :] - d[..., :-1, :])
    return d


def derivative_at(points: FloatArray, t: ArrayLike, order: int = 1) -> FloatArray:
    """Value of the ``order``-th derivative at t (shapes as for :func:`evaluate`)."""
    return evaluate(derivative(points, order), t)


def split(points: FloatArray, t: float) -> tuple[FloatArray, FloatArray]:
    """Split segment(s) at t into the parts on [0, t] and [t, 1].

    Parameters
    ----------
    points : ndarray, shape (K, 2) or (M, K, 2)
    t : float

    Returns
    -------
    (left, right) : ndarrays of the same shape as ``points``

    Notes
    -----
    The left part's control points are the first points of each de Casteljau level, the right
    part's the last points, in reverse order (Farin §4.4). The shared point is bit for bit the
    point :func:`evaluate` gives for a scalar t (the same (1 − t)·a + t·b steps).
    """
    k = points.shape[-2]
    left = [points[..., 0, :]]
    right = [points[..., -1, :]]
    w = points
    s = 1.0 - t
    for _ in range(k - 1):
        w = s * w[..., :-1, :] + t * w[..., 1:, :]
        left.append(w[..., 0, :])
        right.append(w[..., -1, :])
    return np.stack(left, axis=-2), np.stack(right[::-1], axis=-2)


def split_many(points: FloatArray, ts: ArrayLike) -> FloatArray:
    """Split one segment at several parameters.

    Parameters
    ----------
    points : ndarray, shape (K, 2)
    ts : array_like, shape (T,)
        Parameters in [0, 1]; sorted and made unique here.

    Returns
    -------
    ndarray, shape (T' + 1, K, 2)
        The pieces in order; T' is the number of distinct interior parameters.
    """
    ts = np.unique(np.clip(np.asarray(ts, dtype=np.float64).ravel(), 0.0, 1.0))
    ts = ts[(ts > 0.0) & (ts < 1.0)]
    pieces = []
    rest = points
    prev = 0.0
    for t in ts:
        # parameter of t within the remaining piece [prev, 1]
        local = (t - prev) / (1.0 - prev)
        left, rest = split(rest, local)
        pieces.append(left)
        prev = t
    pieces.append(rest)
    return np.stack(pieces)


def subsegment(points: FloatArray, t0: float, t1: float) -> FloatArray:
    """The part of a segment on [t0, t1] as a segment of the same degree.

    If t0 > t1 the piece is returned reversed.
    """
    if t0 > t1:
        return reverse(subsegment(points, t1, t0))
    if t1 <= 0.0 or t0 >= 1.0 and t1 >= 1.0:
        p = evaluate(points, min(max(t0, 0.0), 1.0))
        return np.broadcast_to(p, points.shape).copy()
    _, right = split(points, t0) if t0 > 0.0 else (None, points)
    if t1 >= 1.0:
        return right.copy()
    local = (t1 - t0) / (1.0 - t0)
    left, _ = split(right, local)
    return left


def reverse(points: FloatArray) -> FloatArray:
    """The same curve traversed from end to start (control points in reverse order)."""
    return points[..., ::-1, :].copy()


def elevate(points: FloatArray) -> FloatArray:
    """Exact degree elevation by one (Farin §6.1).

    Q_i = (i / (n+1)) P_{i−1} + (1 − i / (n+1)) P_i for i = 0 … n+1.
    """
    n = points.shape[-2] - 1
    m = n + 1
    i = np.arange(1, m)[:, None] / m
    inner = i * points[..., :-1, :] + (1.0 - i) * points[..., 1:, :]
    return np.concatenate([points[..., :1, :], inner, points[..., -1:, :]], axis=-2)


def to_cubic(points: FloatArray) -> FloatArray:
    """Exactly elevate a line or quadratic (or a batch of them) to cubic degree."""
    while points.shape[-2] < 4:
        points = elevate(points)
    return points


def power_coefficients(points: ArrayLike) -> FloatArray:
    """Coefficients c_k of B(t) = Σ c_k t^k, shape (K, 2) (or (M, K, 2)), lowest power first.

    Notes
    -----
    c_k = C(n, k) Σ_{i=0}^{k} (−1)^{k−i} C(k, i) P_i (Farin §4.7, Bernstein to monomial).
    """
    from math import comb

    pts = np.asarray(points, dtype=np.float64)
    n = pts.shape[-2] - 1
    if n == 3:  # the same formula, written as forward differences (fewer roundings)
        p0, p1, p2, p3 = (pts[..., i, :] for i in range(4))
        return np.stack(
            [p0, 3.0 * (p1 - p0), 3.0 * (p2 - 2.0 * p1 + p0), p3 - 3.0 * p2 + 3.0 * p1 - p0],
            axis=-2,
        )
    m = np.zeros((n + 1, n + 1))
    for k in range(n + 1):
        for i in range(k + 1):
            m[k, i] = comb(n, k) * (-1) ** (k - i) * comb(k, i)
    return np.einsum("ki,...ij->...kj", m, pts)
