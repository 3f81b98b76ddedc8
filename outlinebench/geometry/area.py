"""Signed area enclosed by a closed contour of line, quadratic and cubic segments.

References
----------
Green's theorem, A = ½ ∮ (x dy − y dx) (any calculus text, e.g. Apostol, *Calculus* vol. II,
§11.19). G. Farin, *Curves and Surfaces for CAGD*, 5th ed., §4 (Bernstein polynomials:
∫₀¹ B_i^n B_k^m dt = C(n,i) C(m,k) / (C(n+m, i+k) (n+m+1))).
"""

from __future__ import annotations

from collections.abc import Sequence
from fractions import Fraction
from functools import lru_cache
from math import comb

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError

__all__ = ["signed_area", "segment_area_terms", "green_matrix"]

FloatArray = NDArray[np.float64]
# Coordinates beyond 2^±_EXTREME_EXP are summed at a power-of-two scale (see signed_area).
_EXTREME_EXP = 400


@lru_cache(maxsize=8)
def green_matrix(n: int) -> FloatArray:
    """Matrix G with ∫₀¹ x(t) y′(t) dt = xᵀ G y for a degree-n segment, shape (n+1, n+1).

    Notes
    -----
    G[i, j] = ∫₀¹ B_i^n (B_j^n)′ dt, with (B_j^n)′ = n (B_{j−1}^{n−1} − B_j^{n−1}) and the
    Bernstein product integral (Farin §4). Entries are exact rationals converted to float64.
    """

    def prod(i: int, k: int) -> Fraction:  # ∫ B_i^n B_k^{n−1}
        if k < 0 or k > n - 1:
            return Fraction(0)
        return Fraction(comb(n, i) * comb(n - 1, k), comb(2 * n - 1, i + k) * (2 * n))

    g = np.zeros((n + 1, n + 1))
    for i in range(n + 1):
        for j in range(n + 1):
            g[i, j] = float(n * (prod(i, j - 1) - prod(i, j)))
    g.setflags(write=False)
    return g


def segment_area_terms(points: ArrayLike) -> FloatArray:
    """½ ∫₀¹ (x y′ − y x′) dt for segment(s): each one's share of the enclosed area.

    Parameters
    ----------
    points : array_like, shape (K, 2) or (M, K, 2)

    Returns
    -------
    float or ndarray, shape (M,)

    Notes
    -----
    ½ (xᵀ G y − yᵀ G x) with G from :func:`green_matrix`: exact for polynomial segments up
    to float64 rounding. The shares depend on the origin; their sum over a closed contour
    does not.
    """
    pts = np.asarray(points, dtype=np.float64)
    g = green_matrix(pts.shape[-2] - 1)
    x, y = pts[..., 0], pts[..., 1]
    xgy = np.einsum("...i,ij,...j->...", x, g, y)
    ygx = np.einsum("...i,ij,...j->...", y, g, x)
    out = 0.5 * (xgy - ygx)
    return float(out) if np.ndim(out) == 0 else out


def signed_area(segments: Sequence[ArrayLike]) -> float:
    """Signed area enclosed by a closed contour of mixed-degree segments.

    Parameters
    ----------
    segments : sequence of array_like, each of shape (K, 2) with K in 2..4
        The contour's segments in order. If the last end point differs from the first start
        point, the contour is closed with a straight line (as SVG's ``Z`` does).

    Returns
    -------
    float
        Positive when the contour runs counter-clockwise in a y-up frame (clockwise on
        screen in SVG's y-down frame); 0 for an empty contour. A figure-eight contour gives
        the difference of its lobes, as Green's theorem does.

    Raises
    ------
    InvalidGeometryError
        A segment of the wrong shape or with a coordinate that is not finite.

    Notes
    -----
    A = ½ ∮ (x dy − y dx) (Green's theorem), summed segment by segment with the exact
    Bernstein formula of :func:`segment_area_terms`. All points are first moved so the
    contour's first point is the origin: the sum is unchanged for a closed contour, and far
    from the origin (coordinates ~1e9) no large products cancel. Coordinates beyond 2^±400
    are scaled by a power of two first (exact), so products neither overflow nor underflow;
    the result is ±inf only when the area itself passes the largest double (a contour some
    1e154 across), never NaN.

    Examples
    --------
    >>> signed_area([np.array([[0.0, 0.0], [1.0, 0.0]]), np.array([[1.0, 0.0], [0.0, 1.0]])])
    0.5
    >>> signed_area([])
    0.0
    """
    segs = []
    for index, seg in enumerate(segments):
        arr = np.asarray(seg, dtype=np.float64)
        if arr.ndim != 2 or arr.shape[1] != 2 or arr.shape[0] not in (2, 3, 4):
            raise InvalidGeometryError(
                f"segment {index} needs 2, 3 or 4 control points of (x, y), got shape {arr.shape}"
            )
        if not np.all(np.isfinite(arr)):
            raise InvalidGeometryError(f"segment {index} has a coordinate that is not finite")
        segs.append(arr)
    if not segs:
        return 0.0
    origin = segs[0][0].copy()
    with np.errstate(over="ignore", invalid="ignore"):
        shifted = [arr - origin for arr in segs]
    exp2 = 0  # the area is total · 2^exp2
    if not all(np.all(np.isfinite(a)) for a in shifted):
        # a span beyond the largest double: halved points (exact), area × 4
        shifted = [arr * 0.5 - origin * 0.5 for arr in segs]
        exp2 = 2
    big = max(float(np.max(np.abs(a))) for a in shifted)
    e = int(np.frexp(big)[1]) if big > 0.0 else 0
    if abs(e) > _EXTREME_EXP:
        # near the ends of binary64 the products x·y over- or underflow: work at a
        # power-of-two scale (exact) and scale the area back by its square
        shifted = [np.ldexp(a, -e) for a in shifted]
        exp2 += 2 * e
    total = 0.0
    for arr in shifted:
        total += segment_area_terms(arr)
    end, start = shifted[-1][-1], shifted[0][0]
    if np.any(end != start):
        total += 0.5 * (end[0] * start[1] - end[1] * start[0])
    with np.errstate(over="ignore", under="ignore"):
        return float(np.ldexp(total, exp2)) if exp2 else float(total)
