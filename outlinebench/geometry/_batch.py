"""Shape handling shared by the geometry modules: one segment or a batch, one t or many.

Private helpers. Public functions accept ``(K, 2)`` or ``(M, K, 2)`` control points and a scalar
or ``(T,)`` parameter; they work internally on ``(M, K, 2)`` and ``(T,)`` and give back the
shape the caller used.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "as_batch",
    "as_params",
    "unbatch",
    "segment_scale",
    "normalized",
    "cross",
    "horner",
]

FloatArray = NDArray[np.float64]


def as_batch(points: ArrayLike) -> tuple[FloatArray, bool]:
    """``(M, K, 2)`` float64 view of the control points and whether one segment was given."""
    # NOTE: shape and finiteness are trusted (validated with as_control_points at the boundary).
    pts = np.asarray(points, dtype=np.float64)
    if pts.ndim == 2:
        return pts[None], True
    return pts, False


def as_params(t: ArrayLike) -> tuple[FloatArray, bool]:
    """``(T,)`` float64 parameters and whether a scalar was given."""
    return np.atleast_1d(np.asarray(t, dtype=np.float64)).ravel(), np.ndim(t) == 0


def unbatch(out: np.ndarray, single: bool, scalar_t: bool | None = None) -> np.ndarray:
    """Drop the batch axis (axis 0) and/or the parameter axis (axis 1) the caller did not use."""
    if scalar_t:
        out = out[:, 0]
    if single:
        out = out[0]
    return out


def segment_scale(pts: FloatArray) -> FloatArray:
    """Size of each segment: the larger side of its control-point box, shape ``(M,)``."""
    return np.max(np.ptp(pts, axis=-2), axis=-1)


def normalized(pts: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Control points moved to start at the origin and scaled to unit size.

    Returns ``(q, scale)`` with ``q = (P − P0) / scale``; a segment whose points all coincide
    keeps ``scale = 0`` and gets ``q = 0``. Working on ``q`` keeps squared and cubed lengths
    inside float64's range for coordinates from 1e-150 to 1e150 (curvature, tangents). A
    span beyond the largest double (about 1.8e308) gives ``scale = inf`` and still finite
    ``q`` (computed from halved points).
    """
    with np.errstate(over="ignore", invalid="ignore"):
        scale = segment_scale(pts)
    if np.all(np.isfinite(scale)):
        safe = np.where(scale > 0.0, scale, 1.0)
        q = (pts - pts[:, :1, :]) / safe[:, None, None]
        return q, scale
    # Spans beyond the largest double (points near ±1.8e308): the same quotient from halved
    # points, (P/2 − P0/2) / (scale/2), in which no difference overflows; halving is exact.
    half = np.max(np.ptp(pts * 0.5, axis=-2), axis=-1)
    safe = np.where(half > 0.0, half, 1.0)
    q = (pts * 0.5 - pts[:, :1, :] * 0.5) / safe[:, None, None]
    with np.errstate(over="ignore"):
        return q, half * 2.0


def cross(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """z-component of the cross product of 2-vectors on the last axis: a_x b_y − a_y b_x."""
    return a[..., 0] * b[..., 1] - a[..., 1] * b[..., 0]


def horner(coeffs: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Σ_j coeffs[j] t^j by Horner's scheme; ``coeffs`` (k, …) broadcasts against ``t``.

    For instance monomial coefficients ``(k, 2)`` of one curve at parameters ``(N,)``:
    ``horner(c[:, None, :], t[:, None])`` → ``(N, 2)``; per-row coefficients ``(N, k)`` at
    per-row parameters ``(N, m)``: ``horner(c.T[:, :, None], t)`` → ``(N, m)``.
    """
    k = coeffs.shape[0]
    if k == 1:
        return np.zeros(np.broadcast_shapes(coeffs.shape[1:], np.shape(t))) + coeffs[0]
    v = coeffs[-1] * t
    v += coeffs[-2]
    for j in range(k - 3, -1, -1):
        v *= t
        v += coeffs[j]
    return v
