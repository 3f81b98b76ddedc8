"""Two-sided Hausdorff distance between two curves, with a proven upper bound.

Used to measure the shape change of a repair: the old and the new curve are each given as a
chain of line, quadratic and cubic segments (the changed part of a contour is enough: the
unchanged rest is common to both and can only lower the distance, see
:func:`hausdorff_bound`).

References
----------
- F. Hausdorff, *Grundzüge der Mengenlehre* (1914), the distance between sets; its
  triangle inequality H(A, C) ≤ H(A, B) + H(B, C) is what the bound rests on.
- Flattening with a proven deviation: :func:`outlinebench.geometry.flatten_contours_bounded`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import as_control_points
from outlinebench.geometry.deviation import _Edges, _polyline_to_edges
from outlinebench.geometry.flatten import flatten_contours_bounded

__all__ = [
    "HAUSDORFF_RELATIVE_ACCURACY",
    "HausdorffBound",
    "polyline_hausdorff",
    "hausdorff_bound",
]

FloatArray = NDArray[np.float64]

# Default accuracy of hausdorff_bound, as a fraction of the curves' size (the larger side of
# the box around both): upper − lower stays below it. Repairs pass their own accuracy (a
# fraction of the allowed change); this default is for plain measurement.
HAUSDORFF_RELATIVE_ACCURACY = 1e-3

# Never ask for an accuracy finer than this many units in the last place of the largest
# coordinate: the flattening and the distance computations round at that level.
_RESOLUTION_ULPS = 4096.0


@dataclass(frozen=True, slots=True)
class HausdorffBound:
    """The Hausdorff distance between two curves, enclosed in a proven interval.

    Attributes
    ----------
    upper : float
        Proven upper bound: the true distance is ≤ ``upper`` (up to rounding of a few units
        in the last place of the coordinates). This is the number to compare with a limit.
    lower : float
        Lower bound: an actual point of one curve lies this far (within the flattening
        bound) from the other.
    """

    upper: float
    lower: float

    @property
    def accuracy(self) -> float:
        """Width of the interval, ``upper − lower``."""
        return self.upper - self.lower


def _chain(poly: FloatArray) -> FloatArray:
    return np.vstack([poly, poly]) if len(poly) == 1 else poly


class _EdgeSet(_Edges):
    """The edges of several polylines at once (each an open chain of vertices)."""

    def __init__(self, chains: Sequence[FloatArray]) -> None:
        import shapely

        self.start = np.concatenate([c[:-1] for c in chains])
        self.end = np.concatenate([c[1:] for c in chains])
        self.tree = shapely.STRtree(shapely.linestrings(np.stack([self.start, self.end], axis=1)))


def _directed(source: Sequence[FloatArray], target: _Edges, slack: float) -> tuple[float, float]:
    """(best exact distance, proven upper bound) of max over the source chains of d(·, target)."""
    best = upper = 0.0
    for chain in source:
        d, _, _, u = _polyline_to_edges(chain, target, slack)
        best, upper = max(best, d), max(upper, u, d)
    return best, upper


def _chains_hausdorff(
    a: Sequence[FloatArray], b: Sequence[FloatArray], accuracy: float
) -> HausdorffBound:
    d1, u1 = _directed(a, _EdgeSet(b), accuracy)
    d2, u2 = _directed(b, _EdgeSet(a), accuracy)
    return HausdorffBound(upper=max(u1, u2), lower=max(d1, d2))


def polyline_hausdorff(a: ArrayLike, b: ArrayLike, *, accuracy: float) -> HausdorffBound:
    """Two-sided Hausdorff distance between two polylines (open chains of vertices).

    Parameters
    ----------
    a, b : array_like, shape (P, 2) and (Q, 2)
        Vertices in order; a closed polyline repeats its first vertex at the end.
    accuracy : float
        Largest allowed width of the returned interval (> 0).

    Returns
    -------
    HausdorffBound

    Notes
    -----
    h(A → B) = max_{p ∈ A} d(p, B), maximised over every point of every edge of A, not only
    the vertices. Distances to B are exact (point-to-segment, nearest edge found with a
    shapely STRtree). On an edge piece p(s) = (1 − s)·p₀ + s·p₁ of A, the distance to one
    edge e of B is a convex function of s, so d(p(s), B) ≤ d(p(s), e) ≤ max(d(p₀, e),
    d(p₁, e)) for the edges e nearest either end; and d(·, B) is 1-Lipschitz, so
    d(p(s), B) ≤ (d(p₀, B) + d(p₁, B) + |p₁ − p₀|) / 2. The smaller of the two bounds each
    piece; pieces whose bound exceeds the best exact value found by more than the accuracy
    are halved (branch and bound). H(A, B) = max(h(A → B), h(B → A)).

    Examples
    --------
    >>> polyline_hausdorff([[0, 0], [1, 0]], [[0, 0], [1, 0]], accuracy=1e-9).upper
    0.0
    """
    pa = _chain(np.asarray(a, dtype=np.float64).reshape(-1, 2))
    pb = _chain(np.asarray(b, dtype=np.float64).reshape(-1, 2))
    if len(pa) == 0 or len(pb) == 0:
        raise InvalidGeometryError("cannot measure a Hausdorff distance to an empty polyline")
    if not (np.isfinite(accuracy) and accuracy > 0.0):
        raise InvalidGeometryError(f"the accuracy must be > 0, got {accuracy!r}")
    return _chains_hausdorff([pa], [pb], accuracy)


def _segments(chain: Sequence[ArrayLike], name: str) -> list[FloatArray]:
    segs = [as_control_points(s) for s in chain]
    if not segs:
        raise InvalidGeometryError(f"cannot measure a Hausdorff distance: {name} has no segments")
    return segs


def _runs(segs: list[FloatArray]) -> list[list[FloatArray]]:
    """Split a list of segments into runs that share end points exactly."""
    runs: list[list[FloatArray]] = [[segs[0]]]
    for s in segs[1:]:
        if np.array_equal(runs[-1][-1][-1], s[0]):
            runs[-1].append(s)
        else:
            runs.append([s])
    return runs


def hausdorff_bound(
    segments_a: Sequence[ArrayLike],
    segments_b: Sequence[ArrayLike],
    *,
    accuracy: float | None = None,
) -> HausdorffBound:
    """Two-sided Hausdorff distance between two curves, with a proven upper bound.

    Parameters
    ----------
    segments_a, segments_b : sequence of array_like, each (K, 2)
        Each curve as its segments (lines, quadratics, cubics); runs of segments that share
        end points exactly are flattened as chains, and the curve is the union of its runs.
    accuracy : float, optional
        Largest allowed width ``upper − lower`` of the result (> 0), in the curves' units.
        Default :data:`HAUSDORFF_RELATIVE_ACCURACY` times the size of the curves' box. It is
        never taken finer than the floating-point resolution of the coordinates.

    Returns
    -------
    HausdorffBound
        ``lower ≤ H(A, B) ≤ upper`` with ``upper − lower ≤ accuracy``.

    Raises
    ------
    InvalidGeometryError
        Bad control points, or an empty curve.

    Notes
    -----
    With ε = accuracy / 8, each curve is flattened to a polyline P_A, P_B whose Hausdorff
    distance from it is *proven* ≤ β_A, β_B ≤ ε (closed-form chord bounds or Wang's bound,
    :func:`outlinebench.geometry.flatten_contours_bounded`). The polylines' distance is
    enclosed in [ℓ, u] by :func:`polyline_hausdorff` with accuracy/4. By the triangle
    inequality of the Hausdorff distance,

        H(A, B) ≤ β_A + H(P_A, P_B) + β_B ≤ u + β_A + β_B = upper,
        H(A, B) ≥ H(P_A, P_B) − β_A − β_B ≥ ℓ − β_A − β_B = lower,

    so upper − lower ≤ accuracy/4 + 4ε ≤ accuracy. Nothing is sampled: every step is a bound.

    For a local edit, pass only the changed segments: with C the unchanged rest,
    H(A ∪ C, B ∪ C) ≤ H(A, B) (every point of A ∪ C is within H(A, B) of B ∪ C), so the
    upper bound of the parts also bounds the change of the whole contour.

    Examples
    --------
    >>> line = [[0.0, 0.0], [1.0, 0.0]]
    >>> hausdorff_bound([line], [line]).upper
    0.0
    """
    segs_a = _segments(segments_a, "the first curve")
    segs_b = _segments(segments_b, "the second curve")
    every = np.concatenate(segs_a + segs_b)
    size = float(np.max(np.ptp(every, axis=0)))
    far = max(float(np.max(np.abs(every))), 1.0)
    floor = _RESOLUTION_ULPS * float(np.spacing(far))
    if accuracy is None:
        accuracy = HAUSDORFF_RELATIVE_ACCURACY * size
    elif not (np.isfinite(accuracy) and accuracy > 0.0):
        raise InvalidGeometryError(f"the accuracy must be > 0, got {accuracy!r}")
    accuracy = max(float(accuracy), floor)
    if len(segs_a) == len(segs_b) and all(
        x.shape == y.shape and np.array_equal(x, y) for x, y in zip(segs_a, segs_b, strict=True)
    ):
        return HausdorffBound(0.0, 0.0)
    eps = accuracy / 8.0
    runs_a, runs_b = _runs(segs_a), _runs(segs_b)
    polys, bounds = flatten_contours_bounded([(r, False) for r in runs_a + runs_b], eps)
    chains = [_chain(p) for p in polys]
    na = len(runs_a)
    poly = _chains_hausdorff(chains[:na], chains[na:], accuracy / 4.0)
    beta = float(np.max(bounds[:na])) + float(np.max(bounds[na:]))
    return HausdorffBound(upper=poly.upper + beta, lower=max(0.0, poly.lower - beta))
