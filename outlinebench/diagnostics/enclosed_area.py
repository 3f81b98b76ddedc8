"""The area a closed contour encloses when it crosses itself: the union of its faces.

For a simple closed contour the enclosed area is |signed area| (Green's theorem). A contour
that crosses itself has faces of different winding numbers (a figure-eight: +1 and −1, signed
area 0), and what a fill or a cutter encloses is every face whose winding number is not 0.

The contour is cut at its crossing points into pieces. Each piece has a winding number w_L on
its left and w_R = w_L − 1 on its right. A piece bounds the enclosed region exactly when one
side has winding 0: with the region on its left (w_R = 0) it counts as drawn, with the region
on its right (w_L = 0) reversed. Green's theorem over that closed boundary gives the area:

    A = Σ_{w_R = 0} G(piece) − Σ_{w_L = 0} G(piece),   G = ½ ∫ (x y′ − y x′) dt,

exact for polynomial pieces (:func:`outlinebench.geometry.segment_area_terms`). Winding numbers
come from a probe point just beside each piece's middle, by counting signed crossings of a ray
in +x with every segment, from the real roots of y(t) = y_probe (the crossing-number rule,
O'Rourke, *Computational Geometry in C*, §7.4, extended to curves).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import NDArray

from outlinebench.geometry import (
    derivative_at,
    evaluate,
    power_coefficients,
    segment_area_terms,
    split_many,
    to_cubic,
)

__all__ = ["PROBE_OFFSET", "enclosed_area", "winding_number"]

FloatArray = NDArray[np.float64]

# Distance of the winding probe from a piece's middle, as a fraction of the contour's size
# (larger side of its box). Must be smaller than the distance from that middle to any other
# branch of the contour; our choice, no source.
PROBE_OFFSET = 1e-7

# Roots of y(t) = y_probe with |imaginary part| below this count as real.
_IMAG_TOL = 1e-9


def winding_number(cubics: FloatArray, p: FloatArray) -> int:
    """How many times the closed chain of cubics ``(M, 4, 2)`` winds around point ``p``.

    Signed crossings of the ray from ``p`` in +x: +1 where the curve crosses it moving up
    (y′ > 0), −1 moving down; parameters in [0, 1) so a crossing at a join counts once.
    """
    px, py = float(p[0]), float(p[1])
    lo = cubics[:, :, 1].min(axis=1)
    hi = cubics[:, :, 1].max(axis=1)
    right = cubics[:, :, 0].max(axis=1) > px
    total = 0
    for r in np.flatnonzero((lo <= py) & (hi >= py) & right).tolist():
        ys = cubics[r, :, 1]
        # scaled by a power of two so the power basis cannot overflow (roots are unchanged)
        scale = 2.0 ** -max(0, int(np.ceil(np.log2(max(float(np.abs(ys).max()), abs(py), 1.0)))))
        # power basis of y(t) − py (Bernstein to monomial, Farin §3), highest power first
        c = power_coefficients(np.column_stack([ys * scale, np.zeros(4)]))[:, 0]
        coef = [c[3], c[2], c[1], c[0] - py * scale]
        for t in np.roots(coef):
            if abs(t.imag) > _IMAG_TOL:
                continue
            t = float(t.real)
            if not 0.0 <= t < 1.0:
                continue
            x, _ = evaluate(cubics[r], t)
            if x <= px:
                continue
            dy = float(derivative_at(cubics[r], t)[1])
            total += 1 if dy > 0 else (-1 if dy < 0 else 0)
    return total


def enclosed_area(segments: Sequence[FloatArray], cuts: Sequence[Sequence[float]]) -> float:
    """Area of the union of the faces of a closed contour (winding number ≠ 0).

    Parameters
    ----------
    segments : sequence of ndarray, each (K, 2)
        The closed contour's segments in order.
    cuts : sequence of sequences of float
        For each segment, the parameters where the contour crosses itself (from the
        self-intersection findings); empty for a segment without crossings.

    Returns
    -------
    float
        The enclosed area (≥ 0). Equals |signed area| for a contour without crossings.
    """
    pieces: list[FloatArray] = []
    for seg, ts in zip(segments, cuts, strict=True):
        cub = to_cubic(np.asarray(seg, dtype=np.float64))
        inner = [t for t in ts if 0.0 < t < 1.0]
        if inner:
            pieces.extend(split_many(cub, inner))
        else:
            pieces.append(cub)
    whole = np.stack([to_cubic(np.asarray(s, dtype=np.float64)) for s in segments])
    size = float(np.max(np.ptp(whole.reshape(-1, 2), axis=0)))
    if size == 0.0:
        return 0.0
    eps = PROBE_OFFSET * size
    stack = np.stack(pieces)
    green = np.atleast_1d(segment_area_terms(stack))
    area = 0.0
    for k, piece in enumerate(pieces):
        d = derivative_at(piece, 0.5)
        n = float(np.hypot(d[0], d[1]))
        if n == 0.0:
            continue
        left = np.array([-d[1], d[0]]) / n
        w_left = winding_number(whole, evaluate(piece, 0.5) + eps * left)
        w_right = winding_number(whole, evaluate(piece, 0.5) - eps * left)
        if w_right == 0 and w_left != 0:
            area += float(green[k])
        elif w_left == 0 and w_right != 0:
            area -= float(green[k])
    return abs(area)
