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


def segment_length(points: NDArray[np.float64]) -> float:
    """Arc length of one segment, ``(K, 2)``, in document units."""
    if points.shape[0] == 2:
        return float(np.hypot(*(points[1] - points[0])))
    try:
        from outlinebench.geometry.arclength import arc_length
    except ImportError:
        pass
    else:
        return float(arc_length(points))
    edges = np.linspace(0.0, 1.0, _PIECES + 1)
    a, b = edges[:-1, None], edges[1:, None]
    t = ((b - a) / 2 * _NODES[None, :] + (a + b) / 2).ravel()
    w = ((b - a) / 2 * _WEIGHTS[None, :]).ravel()
    speed = np.hypot(*evaluate(derivative(points), t).T)
    return float(speed @ w)
