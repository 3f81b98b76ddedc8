"""Segment lengths for display in the selection panel."""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from outlinebench.geometry.bezier import derivative, evaluate

__all__ = ["segment_length"]

# Fallback quadrature when the geometry package's arc length is not available: 16-point
# Gauss–Legendre on each of 8 equal parameter pieces (Abramowitz & Stegun 25.4.29); exact for
# lines, and for smooth cubics far below the 0.001-unit display precision.
_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(16)
_PIECES = 8


# Lengths of read-only segment arrays, keyed by identity (segments are shared between document
# versions, so a drag recomputes only the segments it changed). Entries keep their array alive
# so an id is never reused while cached; the cache is emptied when it grows past this size.
_CACHE: dict[int, tuple[NDArray[np.float64], float]] = {}
_CACHE_LIMIT = 200_000


def segment_length(points: NDArray[np.float64], *, quick: bool = False) -> float:
    """Arc length of one segment, ``(K, 2)``, in document units (cached for read-only
    arrays).

    ``quick=True`` (used while a drag is in progress) skips the adaptive arc length for an
    uncached segment and uses the fixed 8 × 16-point Gauss–Legendre rule below instead.
    """
    if quick and points.shape[0] > 2:
        hit = _CACHE.get(id(points))
        return hit[1] if hit is not None and hit[0] is points else _gauss_legendre(points)
    if points.flags.writeable:
        return _length(points)
    hit = _CACHE.get(id(points))
    if hit is not None and hit[0] is points:
        return hit[1]
    if len(_CACHE) >= _CACHE_LIMIT:
        _CACHE.clear()
    value = _length(points)
    _CACHE[id(points)] = (points, value)
    return value


def _length(points: NDArray[np.float64]) -> float:
    if points.shape[0] == 2:
        return float(np.hypot(*(points[1] - points[0])))
    try:
        from outlinebench.geometry.arclength import arc_length
    except ImportError:
        pass
    else:
        return float(arc_length(points))
    return _gauss_legendre(points)


def _gauss_legendre(points: NDArray[np.float64]) -> float:
    edges = np.linspace(0.0, 1.0, _PIECES + 1)
    a, b = edges[:-1, None], edges[1:, None]
    t = ((b - a) / 2 * _NODES[None, :] + (a + b) / 2).ravel()
    w = ((b - a) / 2 * _WEIGHTS[None, :]).ravel()
    speed = np.hypot(*evaluate(derivative(points), t).T)
    return float(speed @ w)
