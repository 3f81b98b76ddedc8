"""Segment and contour lengths for display in the selection panel.

Every length is the geometry package's arc length
(:func:`outlinebench.geometry.arclength.arc_length`, adaptive Gauss–Kronrod); this module only
caches it per segment array and batches the segments not yet known into one call per degree
(:func:`outlinebench.geometry.arclength.segment_lengths`).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import NDArray

from outlinebench.geometry.arclength import ARC_LENGTH_TOLERANCE, segment_lengths

__all__ = ["segment_length", "contour_length", "DRAG_TOLERANCE"]

# Relative error of a length shown while a drag is in progress: far below the 0.001-unit display
# precision on anything up to 10 km, and reached by the adaptive quadrature in fewer steps than
# the library's 1e-12. Our choice, no source. Such lengths are not cached (the drag's own
# segments are replaced at the next move; the release computes them at full precision).
DRAG_TOLERANCE = 1e-9

# Lengths of read-only segment arrays, keyed by identity (segments are shared between document
# versions, so a drag recomputes only the segments it changed). Entries keep their array alive
# so an id is never reused while cached; the cache is emptied when it grows past this size.
_CACHE: dict[int, tuple[NDArray[np.float64], float]] = {}
_CACHE_LIMIT = 200_000


def _cached(points: NDArray[np.float64]) -> float | None:
    hit = _CACHE.get(id(points))
    return hit[1] if hit is not None and hit[0] is points else None


def contour_length(segments: Sequence[NDArray[np.float64]], *, quick: bool = False) -> float:
    r"""Total arc length of a contour's segments, in document units.

    Parameters
    ----------
    segments : sequence of ndarray, each (K, 2)
        A contour's segments (lines, quadratics, cubics).
    quick : bool
        A drag is in progress: segments not cached are measured to :data:`DRAG_TOLERANCE`
        and not cached.

    Returns
    -------
    float
        :math:`\sum_i L_i`, :math:`L_i = \int_0^1 |B_i'(t)|\,dt`.

    Notes
    -----
    Cached lengths are reused; the others are measured in one batched call per degree
    (:func:`outlinebench.geometry.arclength.segment_lengths`; Gauss–Kronrod quadrature,
    Abramowitz & Stegun §25.4.29 for its Gauss part).
    """
    known: list[float] = []
    todo: list[NDArray[np.float64]] = []
    for seg in segments:
        value = None if seg.flags.writeable else _cached(seg)
        if value is None:
            todo.append(seg)
        else:
            known.append(value)
    if todo:
        tol = DRAG_TOLERANCE if quick else ARC_LENGTH_TOLERANCE
        measured = segment_lengths(todo, tol)
        if not quick:
            for seg, value in zip(todo, measured, strict=True):
                _store(seg, float(value))
        known.extend(float(v) for v in measured)
    return float(sum(known))


def segment_length(points: NDArray[np.float64], *, quick: bool = False) -> float:
    r"""Arc length of one segment, ``(K, 2)``, in document units (cached for read-only arrays).

    Parameters
    ----------
    points : ndarray, shape (K, 2)
    quick : bool
        As in :func:`contour_length`.

    Returns
    -------
    float
        :math:`L = \int_0^1 |B'(t)|\,dt` (:func:`outlinebench.geometry.arclength.arc_length`).
    """
    return contour_length([points], quick=quick)


def _store(points: NDArray[np.float64], value: float) -> None:
    if points.flags.writeable:
        return
    if len(_CACHE) >= _CACHE_LIMIT:
        _CACHE.clear()
    _CACHE[id(points)] = (points, value)
