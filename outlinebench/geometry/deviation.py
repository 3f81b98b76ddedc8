"""Deviation measurement: the Hausdorff distance between a curve contour and a given polyline.

:func:`polyline_deviation` measures it in both directions, and where it occurs, for any
polyline (for example one produced by other software), by branch and bound on the curve and on
the polyline with exact nearest-edge distances.

References
----------
- The Hausdorff distance: F. Hausdorff, *Grundzüge der Mengenlehre* (1914); the 1-Lipschitz
  bound of a distance function along a straight piece is elementary (triangle inequality).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import power_coefficients
from outlinebench.geometry.flatten import (
    _ROUNDING_MARGIN,
    FloatArray,
    _as_cubic_batch,
    _check_tolerance,
    _chord_bounds,
    _flatten_params,
    _vertices,
)

__all__ = ["DEVIATION_ACCURACY", "Deviation", "polyline_deviation"]

# Accuracy of polyline_deviation, as a fraction of the measured scale (tolerance or size): the
# reported distance is within this of the true Hausdorff distance (Lipschitz bound, see there).
DEVIATION_ACCURACY = 1e-3

# Largest number of edge pieces refined per round when measuring a deviation; beyond it the
# measurement stops and reports the accuracy it has proven (keeps the deviation command fast).
_MAX_REFINE = 20_000


@dataclass(frozen=True, slots=True)
class Deviation:
    """The Hausdorff distance between a curve contour and a polyline, and where it occurs.

    Attributes
    ----------
    distance : float
        The measured Hausdorff distance.
    x, y : float
        The point (on the curve or on the polyline) farthest from the other.
    on : str
        "curve" when that point is on the curve, "polyline" when on the polyline.
    segment : int
        The curve segment nearest the point (the one it lies on when ``on == "curve"``).
    t : float
        Parameter on that segment.
    accuracy : float
        The true Hausdorff distance lies within ``distance ± accuracy``.
    """

    distance: float
    x: float
    y: float
    on: str
    segment: int
    t: float
    accuracy: float


class _Edges:
    """The edges of a polyline chain (V, 2), with exact nearest-edge queries (shapely STRtree)."""

    def __init__(self, chain: FloatArray) -> None:
        import shapely

        self.start = chain[:-1]
        self.end = chain[1:]
        self.tree = shapely.STRtree(shapely.linestrings(np.stack([self.start, self.end], axis=1)))

    def nearest(self, points: FloatArray) -> tuple[FloatArray, np.ndarray]:
        """Distance from each point (N, 2) to the nearest edge, and that edge's index."""
        import shapely

        out = np.full(len(points), np.inf)
        which = np.zeros(len(points), dtype=np.intp)
        if len(points) == 0:
            return out, which
        (pi, ei), dist = self.tree.query_nearest(
            shapely.points(points), return_distance=True, all_matches=False
        )
        out[pi] = dist
        which[pi] = ei
        return out, which

    def distance_to(self, points: FloatArray, edge: np.ndarray) -> FloatArray:
        """Distance from each point (N, 2) to the given edge (N,) (closest point on a segment)."""
        a = self.start[edge]
        ab = self.end[edge] - a
        ap = points - a
        ll = np.einsum("ij,ij->i", ab, ab)
        f = np.divide(np.einsum("ij,ij->i", ap, ab), ll, out=np.zeros(len(ll)), where=ll > 0.0)
        f = np.clip(f, 0.0, 1.0)
        d = ap - f[:, None] * ab
        return np.hypot(d[:, 0], d[:, 1])


def _piece_upper(edges: _Edges, pa, pb, da, db, wa, wb) -> FloatArray:
    """Upper bound of the distance to ``edges`` over each straight piece pa–pb.

    Distance to a segment is a convex function of the point, so along pa–pb the distance to
    edge k stays ≤ max(f_k(pa), f_k(pb)); used with the nearest edges wa, wb of both ends.
    Distance to a set is 1-Lipschitz, which gives (da + db + |pb − pa|) / 2 as well.
    """
    length = np.hypot(*(pb - pa).T)
    lip = 0.5 * (da + db + length)
    via_a = np.maximum(da, edges.distance_to(pb, wa))
    via_b = np.maximum(edges.distance_to(pa, wb), db)
    return np.minimum(lip, np.minimum(via_a, via_b))


def _split_params(lo: FloatArray, hi: FloatArray, parts: int) -> FloatArray:
    """(N, parts + 1) parameters splitting each [lo, hi] uniformly; the ends kept exactly."""
    frac = np.linspace(0.0, 1.0, parts + 1)
    ff = lo[:, None] + (hi - lo)[:, None] * frac
    ff[:, 0] = lo
    ff[:, -1] = hi
    return ff


def _curve_to_polyline(cub, coef, edges: _Edges, seg, ta, tb, slack: float):
    """Largest distance from the curve to the polyline ``edges``, by branch and bound.

    Pieces [ta, tb] of the curve: the piece lies within D of its chord (:func:`_chord_bounds`,
    exact closed form), so its distance to the polyline is ≤ D + the straight-piece bound of
    :func:`_piece_upper` on the chord. Pieces whose bound exceeds the best exact sample by more
    than ``slack`` are split in four until none does (or the work cap is reached).

    Returns (distance, point, segment, t, upper bound).
    """
    pa = _vertices(cub, coef, seg, ta)
    pb = _vertices(cub, coef, seg, tb)
    da, wa = edges.nearest(pa)
    db, wb = edges.nearest(pb)
    both = np.concatenate([da, db])
    i = int(np.argmax(both))
    n = len(da)
    j = i % n
    best = (
        float(both[i]),
        (pa if i < n else pb)[j],
        int(seg[j]),
        float((ta if i < n else tb)[j]),
    )
    bound = best[0]
    parts = 4
    for _ in range(200):
        dev = _chord_bounds(coef, seg, ta, tb, pa, pb)
        upper = dev + _piece_upper(edges, pa, pb, da, db, wa, wb)
        bound = max(best[0], float(np.max(upper))) if len(upper) else best[0]
        keep = upper > best[0] + slack
        if not np.any(keep) or np.count_nonzero(keep) > _MAX_REFINE:
            break
        seg, ta, tb = seg[keep], ta[keep], tb[keep]
        pa, pb, da, db, wa, wb = pa[keep], pb[keep], da[keep], db[keep], wa[keep], wb[keep]
        ff = _split_params(ta, tb, parts)
        mid = ff[:, 1:-1]
        ms = np.repeat(seg, parts - 1)
        mp = _vertices(cub, coef, ms, mid.ravel())
        md, mw = edges.nearest(mp)
        k = int(np.argmax(md))
        if md[k] > best[0]:
            best = (float(md[k]), mp[k], int(ms[k]), float(mid.flat[k]))
        mp = mp.reshape(len(seg), parts - 1, 2)
        md = md.reshape(len(seg), parts - 1)
        mw = mw.reshape(len(seg), parts - 1)
        allp = np.concatenate([pa[:, None], mp, pb[:, None]], axis=1)
        alld = np.concatenate([da[:, None], md, db[:, None]], axis=1)
        allw = np.concatenate([wa[:, None], mw, wb[:, None]], axis=1)
        seg = np.repeat(seg, parts)
        ta, tb = ff[:, :-1].ravel(), ff[:, 1:].ravel()
        pa, pb = allp[:, :-1].reshape(-1, 2), allp[:, 1:].reshape(-1, 2)
        da, db = alld[:, :-1].ravel(), alld[:, 1:].ravel()
        wa, wb = allw[:, :-1].ravel(), allw[:, 1:].ravel()
    return (*best, bound)


def _polyline_to_edges(chain: FloatArray, edges: _Edges, slack: float):
    """Largest distance from the polyline ``chain`` (V, 2) to ``edges``, by branch and bound.

    Edge pieces of the chain are straight, so :func:`_piece_upper` bounds each; pieces whose
    bound exceeds the best sample by more than ``slack`` are halved until none does.

    Returns (distance, point, nearest edge of ``edges``, upper bound).
    """
    d, w = edges.nearest(chain)
    i = int(np.argmax(d))
    best = (float(d[i]), chain[i], int(w[i]))
    pa, pb = chain[:-1], chain[1:]
    da, db, wa, wb = d[:-1], d[1:], w[:-1], w[1:]
    bound = best[0]
    parts = 2  # halving: fewer queries than quarters here (the slack is only δ/4)
    for _ in range(200):
        upper = _piece_upper(edges, pa, pb, da, db, wa, wb)
        bound = max(best[0], float(np.max(upper))) if len(upper) else best[0]
        keep = upper > best[0] + slack
        if not np.any(keep) or np.count_nonzero(keep) > _MAX_REFINE:
            break
        pa, pb, da, db, wa, wb = pa[keep], pb[keep], da[keep], db[keep], wa[keep], wb[keep]
        frac = np.linspace(0.0, 1.0, parts + 1)[1:-1]
        mp = pa[:, None] + frac[None, :, None] * (pb - pa)[:, None]
        md, mw = edges.nearest(mp.reshape(-1, 2))
        k = int(np.argmax(md))
        if md[k] > best[0]:
            best = (float(md[k]), mp.reshape(-1, 2)[k], int(mw[k]))
        md = md.reshape(len(pa), parts - 1)
        mw = mw.reshape(len(pa), parts - 1)
        allp = np.concatenate([pa[:, None], mp, pb[:, None]], axis=1)
        alld = np.concatenate([da[:, None], md, db[:, None]], axis=1)
        allw = np.concatenate([wa[:, None], mw, wb[:, None]], axis=1)
        pa, pb = allp[:, :-1].reshape(-1, 2), allp[:, 1:].reshape(-1, 2)
        da, db = alld[:, :-1].ravel(), alld[:, 1:].ravel()
        wa, wb = allw[:, :-1].ravel(), allw[:, 1:].ravel()
    return (*best, bound)


def polyline_deviation(
    segments: Sequence[ArrayLike],
    polyline: ArrayLike,
    *,
    closed: bool = False,
    tolerance: float | None = None,
) -> Deviation:
    """Hausdorff distance between a curve contour and a polyline, both directions, and where.

    Parameters
    ----------
    segments : sequence of array_like, each (K, 2)
        The contour's segments.
    polyline : array_like, shape (P, 2)
        The polyline (P ≥ 1); for ``closed=True`` the closing edge back to the first vertex is
        implied (a repeated first vertex is harmless).
    closed : bool
        Whether the contour and the polyline are closed.
    tolerance : float, optional
        The tolerance the result is compared with; sets the measuring accuracy to
        ``DEVIATION_ACCURACY · tolerance``. Without it the accuracy is
        ``DEVIATION_ACCURACY`` times the contour's size.

    Returns
    -------
    Deviation

    Raises
    ------
    InvalidGeometryError
        Bad control points, an empty contour or polyline.

    Notes
    -----
    Each directed distance is maximised by branch and bound with the measuring accuracy δ.

    Curve → polyline, on the curve itself: a curve piece lies within D of its chord (the exact
    closed-form bound of :func:`chord_bound`); distance to one polyline edge is a convex
    function of the point, so along the chord it stays ≤ the larger of its values at the
    chord's ends; taking the edges nearest either end, and the 1-Lipschitz bound
    (d₁ + d₂ + ℓ) / 2, gives an upper bound for the piece. Pieces that could beat the best
    exact sample (a curve point's distance to the polyline) by more than δ/2 are split.

    Polyline → curve: against a reference polyline R flattened with :func:`flatten_contours`
    within δ/4 of the curve (guaranteed), with the same convexity and Lipschitz bounds on the
    polyline's edge pieces and a stopping slack of δ/4.

    The reported distance is within the returned accuracy (≤ δ/2 unless the work cap of
    :data:`_MAX_REFINE` pieces per round was reached, when it is the proven remaining gap) of
    the Hausdorff distance. Distances to edges are exact (shapely STRtree nearest queries).
    """
    cub = _as_cubic_batch(list(segments))
    if len(cub) == 0:
        raise InvalidGeometryError("cannot measure deviation: the contour has no segments")
    poly = np.asarray(polyline, dtype=np.float64)
    if poly.ndim != 2 or poly.shape[-1] != 2 or len(poly) == 0 or not np.all(np.isfinite(poly)):
        raise InvalidGeometryError(
            f"a polyline must be a non-empty (P, 2) array of finite numbers, got {poly.shape}"
        )
    size = float(np.max(np.ptp(np.vstack([cub.reshape(-1, 2), poly]), axis=0)))
    if tolerance is not None:
        _check_tolerance(tolerance)
        acc = DEVIATION_ACCURACY * float(tolerance)
    else:
        acc = DEVIATION_ACCURACY * max(size, 1e-12)
    # never finer than the floating-point resolution of the coordinates allows
    scale = max(float(np.max(np.abs(cub))), float(np.max(np.abs(poly))), 1.0)
    acc = max(acc, 1e6 * _ROUNDING_MARGIN * scale)
    coef = power_coefficients(cub)
    chain = np.vstack([poly, poly[:1]]) if closed and len(poly) > 1 else poly
    if len(chain) == 1:
        chain = np.vstack([chain, chain])
    # curve → polyline, on the curve itself, starting from pieces within the accuracy scale
    start_seg, start_t, _ = _flatten_params(cub, max(acc / DEVIATION_ACCURACY / 4.0, acc))
    start_tb = np.append(start_t[1:], 1.0)
    start_tb[np.append(start_seg[1:] != start_seg[:-1], True)] = 1.0
    d1, p1, seg1, t1, u1 = _curve_to_polyline(
        cub, coef, _Edges(chain), start_seg, start_t, start_tb, acc / 2.0
    )
    # polyline → curve, against a reference polyline R within δ/4 of the curve
    ref_seg, ref_t, _ = _flatten_params(cub, acc / 4.0)
    ref = np.vstack([_vertices(cub, coef, ref_seg, ref_t), cub[-1, 3]])
    ref_seg_v = np.append(ref_seg, len(cub) - 1)
    ref_t_v = np.append(ref_t, 1.0)
    if len(ref) == 1:
        ref = np.vstack([ref, ref])
    d2, p2, w2, u2 = _polyline_to_edges(chain, _Edges(ref), acc / 4.0)
    # proven: the true value lies in [max(d1, d2 − δ/4), max(u1, u2 + δ/4)]
    distance = max(d1, d2)
    accuracy = max(acc / 4.0, max(u1, u2 + acc / 4.0) - distance)
    if d1 >= d2:
        return Deviation(d1, float(p1[0]), float(p1[1]), "curve", seg1, t1, accuracy)
    return Deviation(
        d2,
        float(p2[0]),
        float(p2[1]),
        "polyline",
        int(ref_seg_v[w2]),
        float(ref_t_v[w2]),
        accuracy,
    )
