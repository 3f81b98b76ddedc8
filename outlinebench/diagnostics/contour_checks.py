"""Checks that look at whole contours and at contours against each other.

gap and open-contour
    The ends of open contours (no ``Z``) are matched to the nearest other open end (the same
    contour's other end, or another open contour's end, anywhere in the document). Ends within
    the gap tolerance count as joined and their join is judged like any other
    (:mod:`outlinebench.diagnostics.continuity`); ends farther apart but within the search
    distance are a *gap* (G0 break); every open contour is also reported as open.
wrong-direction
    Holes must wind opposite to the contour around them (nonzero fill and cutters rely on it).
    Which contour lies inside which is decided by an even-odd point-in-polygon test of a point
    of one contour against a flattened copy of the other (W3C SVG 1.1 §11.3 "fill-rule"
    describes the ray-crossing rule); the winding sign is that of the exact signed area
    (:func:`outlinebench.geometry.signed_area`, Green's theorem). A contour's parent is the
    innermost closed contour of the same outline containing it.
self-intersection between segments
    Segment pairs whose control-point boxes overlap (a sort-and-sweep over the boxes) are
    intersected with :func:`outlinebench.geometry.intersections`; the shared end point of two
    neighbouring segments is a join, not a crossing. Neighbours that together move
    monotonically along one direction cannot cross and are skipped.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import shapely
from numpy.typing import NDArray

from outlinebench.diagnostics.continuity import (
    INTENT_NONE,
    JOIN_CORNER,
    JOIN_CURVATURE_JUMP,
    JOIN_KINK,
    classify_joins,
    turn_angles,
)
from outlinebench.diagnostics.findings import ERROR, INFO, WARNING, Finding
from outlinebench.diagnostics.messages import (
    curvature_jump_message,
    gap_message,
    open_contour_message,
)
from outlinebench.diagnostics.segment_checks import Limits, hull_boxes
from outlinebench.geometry import derivative_at, evaluate, intersections, split

__all__ = [
    "OpenEnd",
    "open_end_findings",
    "join_finding",
    "flattened",
    "point_in_polygon",
    "containment_pairs",
    "wrong_direction_findings",
    "overlapping_pairs",
    "lines_apart",
    "joins_monotone",
    "lines_may_meet",
    "narrow_pairs",
    "crossing_findings",
]

FloatArray = NDArray[np.float64]

# Parameters this close to 0 or 1 count as the segment's end when telling a join from a crossing.
_END_PARAM = 1e-6


@dataclass(frozen=True, slots=True)
class OpenEnd:
    """One end of an open contour.

    ``end`` is 0 for the contour's start and 1 for its end; ``direction`` points along the
    direction of travel; ``curvature`` is κ there (signed for the direction of travel).
    """

    outline: int
    contour: int
    segment: int
    end: int
    point: tuple[float, float]
    direction: tuple[float, float]
    curvature: float


def join_finding(
    outline: int,
    contour: int,
    segment: int,
    join: int | None,
    point: tuple[float, float],
    d_in: FloatArray,
    d_out: FloatArray,
    k_in: float,
    k_out: float,
    intent: int,
    limits: Limits,
    *,
    verdict: int | None = None,
    angle: float | None = None,
    jump: float | None = None,
    where: str = "",
) -> Finding | None:
    """The finding for one join (None when the join is fine).

    ``verdict``, ``angle`` and ``jump`` may come from a batched
    :func:`~outlinebench.diagnostics.continuity.classify_joins`; otherwise they are computed.
    """
    if verdict is None:
        v, a, j = classify_joins(
            np.asarray(d_in, dtype=float).reshape(1, 2),
            np.asarray(d_out, dtype=float).reshape(1, 2),
            np.array([k_in], dtype=float),
            np.array([k_out], dtype=float),
            np.array([intent], dtype=np.int8),
            kink_angle=limits.kink_angle,
            corner_angle=limits.corner_angle,
            curvature_jump=limits.curvature_jump,
            straight=limits.straight,
        )
        verdict, angle, jump = int(v[0]), float(a[0]), float(j[0])
    if verdict == 0:
        return None
    x, y = float(point[0]), float(point[1])
    smooth_intent = intent == 1
    if verdict == JOIN_CORNER:
        severity = ERROR if smooth_intent else INFO
        why = " although the file marks it smooth" if smooth_intent else ""
        return Finding(
            "corner", severity, outline, contour, segment, 1.0, x, y, angle, "degrees",
            f"{where}corner: the tangent turns {angle:.2f}°{why}",
            join=join, limit=limits.corner_angle,
        )  # fmt: skip
    if verdict == JOIN_KINK:
        severity = ERROR if smooth_intent else WARNING
        return Finding(
            "kink", severity, outline, contour, segment, 1.0, x, y, angle, "degrees",
            f"{where}kink: the tangent turns {angle:.2f}° (G1 break; smooth below "
            f"{limits.kink_angle:g}°, corner from {limits.corner_angle:g}°)",
            join=join, limit=limits.kink_angle,
        )  # fmt: skip
    if verdict == JOIN_CURVATURE_JUMP:
        a = 0.0 if abs(k_in) < limits.straight else k_in
        b = 0.0 if abs(k_out) < limits.straight else k_out
        straight_side = (a == 0.0) != (b == 0.0)
        severity = limits.straight_severity if straight_side else limits.jump_severity
        return Finding(
            "curvature-jump", severity, outline, contour, segment, 1.0, x, y, jump, "relative",
            curvature_jump_message(a, b, jump, where=where),
            join=join, limit=limits.curvature_jump,
            curvature_before=float(a) + 0.0, curvature_after=float(b) + 0.0,
        )  # fmt: skip
    return None


def open_end_findings(
    ends: list[OpenEnd], limits: Limits
) -> tuple[list[Finding], list[tuple[OpenEnd, OpenEnd]]]:
    """Gaps, joined ends and open contours among the open ends of a document.

    Parameters
    ----------
    ends : list of OpenEnd
        Both ends of every open contour (with at least one segment).
    limits : Limits

    Returns
    -------
    findings : list of Finding
        ``gap`` (error), ``open-contour`` (warning, or info when both its ends meet an end:
        its own other end, or those of other open contours in a chain), and the join findings
        of ends that meet within the gap tolerance.
    joined : list of (OpenEnd, OpenEnd)
        Pairs of ends that count as joined (the intersection test ignores them).

    Notes
    -----
    Each end is paired with its nearest other end (distances by brute force, or a k-d tree for
    many ends). A pair is reported once. For a joined pair the direction arriving at the
    meeting point is the end's direction of travel, or its reverse for a contour's start, and
    likewise for leaving.
    """
    findings: list[Finding] = []
    joined: list[tuple[OpenEnd, OpenEnd]] = []
    n = len(ends)
    if n == 0:
        return findings, joined
    pts = np.array([e.point for e in ends])
    if n > 1:
        if n <= 512:
            d = np.linalg.norm(pts[:, None, :] - pts[None, :, :], axis=2)
            np.fill_diagonal(d, np.inf)
            nearest = np.argmin(d, axis=1)
            dist = d[np.arange(n), nearest]
        else:
            from scipy.spatial import cKDTree

            dist2, idx = cKDTree(pts).query(pts, k=2)
            nearest, dist = idx[:, 1], dist2[:, 1]
    else:
        nearest, dist = np.array([0]), np.array([np.inf])
    seen: set[tuple[int, int]] = set()
    ends_joined: dict[int, int] = {}  # contour -> how many of its ends meet another end
    for i in range(n):
        j = int(nearest[i])
        if i == j or dist[i] > limits.gap_search:
            continue
        key = (min(i, j), max(i, j))
        if key in seen:
            continue
        seen.add(key)
        a, b = ends[key[0]], ends[key[1]]
        gap = float(dist[i])
        if gap > limits.gap:
            other = "its own start" if a.contour == b.contour else f"contour {b.contour}"
            findings.append(
                Finding(
                    "gap", ERROR, a.outline, a.contour, a.segment, float(a.end), a.point[0],
                    a.point[1], gap, "user",
                    gap_message(gap, other),
                    limit=limits.gap, other_contour=b.contour, other_segment=b.segment,
                    other_t=float(b.end),
                )
            )  # fmt: skip
            continue
        joined.append((a, b))
        ends_joined[a.contour] = ends_joined.get(a.contour, 0) + 1
        ends_joined[b.contour] = ends_joined.get(b.contour, 0) + 1
        # arrive along a, leave along b (reversing the direction of a start)
        d_in = np.array(a.direction) * (1.0 if a.end == 1 else -1.0)
        k_in = a.curvature if a.end == 1 else -a.curvature
        d_out = np.array(b.direction) * (1.0 if b.end == 0 else -1.0)
        k_out = b.curvature if b.end == 0 else -b.curvature
        f = join_finding(
            a.outline, a.contour, a.segment, None, a.point, d_in, d_out, k_in, k_out,
            INTENT_NONE, limits, where=f"where open ends meet (contour {b.contour}): ",
        )  # fmt: skip
        if f is not None:
            findings.append(f)
    end_point = {(e.contour, e.end): e.point for e in ends}
    for e in ends:
        if e.end != 0:
            continue
        q = end_point[(e.contour, 1)]
        span = float(np.hypot(q[0] - e.point[0], q[1] - e.point[1]))
        if ends_joined.get(e.contour, 0) >= 2:
            own = span <= limits.gap
            findings.append(
                Finding(
                    "open-contour", INFO, e.outline, e.contour, None, None, e.point[0],
                    e.point[1], span, "user",
                    "contour has no close command but its ends meet; close it to be sure"
                    if own
                    else "open contour whose ends meet other open contours' ends; join them "
                    "into one closed contour to be sure",
                )
            )  # fmt: skip
        else:
            findings.append(
                Finding(
                    "open-contour", WARNING, e.outline, e.contour, None, None, e.point[0],
                    e.point[1], span, "user",
                    open_contour_message(span),
                )
            )  # fmt: skip
    return findings, joined


def flattened(cubics: FloatArray, samples: int) -> FloatArray:
    """Points of a contour at ``samples`` uniform parameters per segment, shape (n·samples, 2).

    A polygon for containment tests only (no deviation bound; see ``geometry.flatten`` for
    that).
    """
    ts = np.arange(samples) / samples
    return evaluate(cubics, ts).reshape(-1, 2)


def point_in_polygon(p: FloatArray, poly: FloatArray) -> bool:
    """Even-odd ray-crossing test of point ``p`` (2,) against a closed polygon (N, 2).

    Notes
    -----
    Counts crossings of the ray from p towards +x with the edges, each edge counted when
    exactly one end lies above p (W. R. Franklin's PNPOLY rule).
    """
    x, y = float(p[0]), float(p[1])
    a = poly
    b = np.roll(poly, -1, axis=0)
    straddle = (a[:, 1] > y) != (b[:, 1] > y)
    if not straddle.any():
        return False
    a, b = a[straddle], b[straddle]
    xs = a[:, 0] + (y - a[:, 1]) * (b[:, 0] - a[:, 0]) / (b[:, 1] - a[:, 1])
    return bool(np.count_nonzero(xs > x) % 2)


def containment_pairs(
    probes: FloatArray,
    polygons: FloatArray,
    poly_start: NDArray[np.intp],
    poly_len: NDArray[np.intp],
    boxes: FloatArray,
    group: NDArray[np.intp],
) -> tuple[NDArray[np.intp], NDArray[np.intp]]:
    """Pairs (i, j) where closed contour i lies inside closed contour j of the same group.

    Parameters
    ----------
    probes : ndarray, shape (C, 2)
        A point on each contour.
    polygons : ndarray, shape (P, 2)
        All flattened contours, one after the other; contour c is
        ``polygons[poly_start[c] : poly_start[c] + poly_len[c]]``.
    poly_start, poly_len : ndarray of int, shape (C,)
    boxes : ndarray, shape (C, 4)
    group : ndarray of int, shape (C,)
        Outline of each contour; only contours of one outline are compared.

    Returns
    -------
    (inner, outer) : ndarrays of int

    Notes
    -----
    Candidates are pairs whose boxes nest; each is decided by the even-odd crossing count of
    the ray from the probe towards +x against the edges of the other polygon (see
    :func:`point_in_polygon`), all pairs in one pass over their edges.
    """
    i, j = overlapping_pairs(boxes, group, 0.0)
    if i.size == 0:
        return i, j
    bi, bj = boxes[i], boxes[j]
    i_in_j = (bj[:, 0] <= bi[:, 0]) & (bj[:, 1] <= bi[:, 1]) & (bj[:, 2] >= bi[:, 2])
    i_in_j &= bj[:, 3] >= bi[:, 3]
    j_in_i = (bi[:, 0] <= bj[:, 0]) & (bi[:, 1] <= bj[:, 1]) & (bi[:, 2] >= bj[:, 2])
    j_in_i &= bi[:, 3] >= bj[:, 3]
    inner = np.concatenate([i[i_in_j], j[j_in_i]])
    outer = np.concatenate([j[i_in_j], i[j_in_i]])
    if inner.size == 0:
        return inner, outer
    counts = poly_len[outer]
    total = int(counts.sum())
    pair_of_edge = np.repeat(np.arange(inner.size), counts)
    within = np.arange(total) - np.repeat(np.cumsum(counts) - counts, counts)
    e0 = poly_start[outer][pair_of_edge] + within
    e1 = poly_start[outer][pair_of_edge] + (within + 1) % counts[pair_of_edge]
    a, b = polygons[e0], polygons[e1]
    p = probes[inner][pair_of_edge]
    straddle = (a[:, 1] > p[:, 1]) != (b[:, 1] > p[:, 1])
    with np.errstate(divide="ignore", invalid="ignore"):
        xs = a[:, 0] + (p[:, 1] - a[:, 1]) * (b[:, 0] - a[:, 0]) / (b[:, 1] - a[:, 1])
    crossing = straddle & (xs > p[:, 0])
    hits = np.bincount(pair_of_edge, weights=crossing, minlength=inner.size)
    inside = (hits.astype(np.int64) % 2) == 1
    return inner[inside], outer[inside]


# Two closed contours are near duplicates when every point of each lies within this share of
# the contour's size (box diagonal) of the other, and within the gap-search distance: drawn
# on one another, they are one line a cutter would cut twice (common practice, no source).
DUPLICATE_SHARE = 0.01


def duplicate_pairs(
    polygons: FloatArray,
    poly_start: NDArray[np.intp],
    poly_len: NDArray[np.intp],
    boxes: FloatArray,
    areas: FloatArray,
    group: NDArray[np.intp],
    limit: float,
) -> list[tuple[int, int, float]]:
    """Pairs of closed contours of one outline that are exact or near duplicates.

    Parameters
    ----------
    polygons, poly_start, poly_len, boxes, group
        As :func:`containment_pairs`.
    areas : ndarray, shape (C,)
        Exact signed area of each contour.
    limit : float
        Largest distance considered (the gap-search distance, user units).

    Returns
    -------
    list of (i, j, distance)
        ``i < j``; ``distance`` is the Hausdorff distance between the two flattened contours
        (shapely, densified to a tenth of the box diagonal share), 0 when the polygons are the
        same point sets.

    Notes
    -----
    Screened by boxes that agree within the threshold d = min(limit, DUPLICATE_SHARE · size)
    and absolute areas that agree within d · perimeter (a band of width d around the
    contour holds any contour within d of it); measured on the candidates only.
    """
    i, j = overlapping_pairs(boxes, group, 0.0)
    out: list[tuple[int, int, float]] = []
    if i.size == 0:
        return out
    size = np.hypot(boxes[:, 2] - boxes[:, 0], boxes[:, 3] - boxes[:, 1])
    d = np.minimum(limit, DUPLICATE_SHARE * np.maximum(size[i], size[j]))
    close = np.all(np.abs(boxes[i] - boxes[j]) <= d[:, None], axis=1)
    for a, b, dd in zip(i[close].tolist(), j[close].tolist(), d[close].tolist(), strict=True):
        pa = polygons[poly_start[a] : poly_start[a] + poly_len[a]]
        pb = polygons[poly_start[b] : poly_start[b] + poly_len[b]]
        perim = float(np.hypot(*np.diff(np.vstack([pa, pa[:1]]), axis=0).T).sum())
        if abs(abs(float(areas[a])) - abs(float(areas[b]))) > dd * perim + 1e-12 * perim**2:
            continue
        la, lb = shapely.LinearRing(pa), shapely.LinearRing(pb)
        dist = float(shapely.hausdorff_distance(la, lb, densify=0.1))
        if dist <= dd:
            out.append((min(a, b), max(a, b), dist))
    return out


def same_closed_contour(a: tuple, b: tuple) -> bool:
    """Two closed contours draw exactly the same curve: the same segments, point for point,
    from any starting segment and in either direction."""
    n = len(a)
    if n != len(b) or n == 0:
        return False
    kinds = [s.shape[0] for s in a]
    for rev in (False, True):
        bb = [s[::-1] for s in reversed(b)] if rev else list(b)
        for shift in range(n):
            if all(
                kinds[k] == bb[(k + shift) % n].shape[0]
                and np.array_equal(a[k], bb[(k + shift) % n])
                for k in range(n)
            ):
                return True
    return False


def wrong_direction_findings(
    inner: NDArray[np.intp],
    outer: NDArray[np.intp],
    areas: FloatArray,
    probes: FloatArray,
    outline: NDArray[np.intp],
    contour: NDArray[np.intp],
) -> list[Finding]:
    """``wrong-direction`` findings from the containment pairs of closed contours.

    Parameters
    ----------
    inner, outer : ndarrays of int
        From :func:`containment_pairs`.
    areas : ndarray, shape (C,)
        Exact signed area of each contour.
    probes : ndarray, shape (C, 2)
        The point of each contour used for containment (segment 0 at t = ½).
    outline, contour : ndarrays of int, shape (C,)
        Labels for the findings (outline index, global contour index).

    Notes
    -----
    The parent of a contour is the deepest contour containing it (depth = how many contain
    it); the contour must wind opposite to its parent.
    """
    out: list[Finding] = []
    if inner.size == 0:
        return out
    depth = np.bincount(inner, minlength=areas.size)
    order = np.lexsort((depth[outer], inner))
    inner, outer = inner[order], outer[order]
    last = np.r_[inner[1:] != inner[:-1], True]
    for i, j in zip(inner[last].tolist(), outer[last].tolist(), strict=True):
        a, b = float(areas[i]), float(areas[j])
        if a != 0.0 and b != 0.0 and (a > 0) == (b > 0):
            out.append(
                Finding(
                    "wrong-direction", ERROR, int(outline[i]), int(contour[i]), 0, 0.5,
                    float(probes[i, 0]), float(probes[i, 1]), abs(a), "user^2",
                    f"contour lies inside contour {int(contour[j])} and winds the same way; "
                    "reverse it so the hole stays empty",
                    other_contour=int(contour[j]),
                )
            )  # fmt: skip
    return out


# The sort-and-sweep along x materialises every pair whose x intervals overlap; above this
# many such pairs per box (a ring or a zig-zag whose boxes share x ranges with thousands of
# others) the pairs come from a uniform grid instead, whose candidates stay near the number of
# truly overlapping boxes.
_SWEEP_PAIRS_PER_BOX = 16
# Candidate pairs examined at once by the grid (bounds the memory of one step).
_GRID_CHUNK = 1 << 21


def overlapping_pairs(
    boxes: FloatArray,
    group: NDArray[np.intp],
    pad: float,
    stats: dict[str, int] | None = None,
    keep: Callable[[NDArray[np.intp], NDArray[np.intp]], NDArray[np.bool_]] | None = None,
) -> tuple[NDArray[np.intp], NDArray[np.intp]]:
    """Pairs (i < j) of rows in the same group whose boxes overlap (grown by ``pad``).

    Parameters
    ----------
    boxes : ndarray, shape (M, 4)
        (xmin, ymin, xmax, ymax).
    group : ndarray of int, shape (M,)
        Only rows with equal group are paired (rows of one outline).
    pad : float
    stats : dict, optional
        Filled with ``"candidates"``: how many pairs the broad phase examined, and
        ``"method"``: 0 for the sweep, 1 for the grid.
    keep : callable, optional
        ``keep(i, j)`` → bool mask: a further screen applied to each chunk of overlapping
        pairs as they are found, so pairs it drops are never held all at once (see
        :func:`lines_apart`).

    Returns
    -------
    (i, j) : ndarrays of int

    Notes
    -----
    Sort and sweep along x (each group shifted to its own stretch of the line), then a y test
    (Baraff's sweep and prune; D. Baraff, *Dynamic simulation of non-penetrating rigid
    bodies*, PhD thesis, Cornell 1992, §6.2). The number of pairs the sweep would produce is
    known before they are made; when it passes ``_SWEEP_PAIRS_PER_BOX`` per box, a uniform
    grid is used instead (:func:`_grid_pairs`), so memory and time stay near
    n log n + (overlapping pairs) for rings and zig-zags whose boxes share x ranges.
    """
    m = boxes.shape[0]
    if stats is not None:
        stats["candidates"] = 0
        stats["method"] = 0
    if m < 2:
        return np.empty(0, np.intp), np.empty(0, np.intp)
    x0 = boxes[:, 0] - pad
    x1 = boxes[:, 2] + pad
    span = float(x1.max() - x0.min()) + 1.0
    base = x0.min()
    shift = group.astype(np.float64) * (2.0 * span)
    s0 = (x0 - base) + shift
    s1 = (x1 - base) + shift
    order = np.argsort(s0, kind="stable")
    s0o = s0[order]
    hi = np.searchsorted(s0o, s1[order], side="right")
    start = np.arange(m) + 1
    counts = np.maximum(hi - start, 0)
    total = int(counts.sum())
    if total > _SWEEP_PAIRS_PER_BOX * m + 4096:
        if stats is not None:
            stats["method"] = 1
        return _grid_pairs(boxes, group, pad, stats, keep)
    if stats is not None:
        stats["candidates"] = total
    if total == 0:
        return np.empty(0, np.intp), np.empty(0, np.intp)
    first = np.repeat(np.arange(m), counts)
    offs = np.arange(total) - np.repeat(np.cumsum(counts) - counts, counts)
    second = np.repeat(start, counts) + offs
    i, j = order[first], order[second]
    ok = (boxes[i, 1] - pad <= boxes[j, 3] + pad) & (boxes[j, 1] - pad <= boxes[i, 3] + pad)
    i, j = np.minimum(i[ok], j[ok]), np.maximum(i[ok], j[ok])
    if keep is not None:
        sel = keep(i, j)
        i, j = i[sel], j[sel]
    return i, j


def _sorted_pairs(
    i: NDArray[np.intp], j: NDArray[np.intp]
) -> tuple[NDArray[np.intp], NDArray[np.intp]]:
    order = np.lexsort((j, i))
    return i[order].astype(np.intp), j[order].astype(np.intp)


def _grid_pairs(
    boxes: FloatArray,
    group: NDArray[np.intp],
    pad: float,
    stats: dict[str, int] | None,
    keep: Callable[[NDArray[np.intp], NDArray[np.intp]], NDArray[np.bool_]] | None = None,
) -> tuple[NDArray[np.intp], NDArray[np.intp]]:
    """:func:`overlapping_pairs` by a uniform grid.

    Notes
    -----
    The cell size starts at the median box size and doubles until the boxes cover at most
    eight cells each on average. Each box is entered in every cell it covers; two boxes are
    candidates in each cell they share, and a pair is kept only in the one cell holding the
    lower-left corner of the intersection of their boxes, so it is reported once (the
    "reference point" rule of uniform-grid broad phases, e.g. C. Ericson, *Real-Time
    Collision Detection*, 2005, §7.1.6). Candidates are examined in chunks of
    ``_GRID_CHUNK``.
    """
    m = boxes.shape[0]
    lo = boxes[:, :2] - pad
    hi = boxes[:, 2:] + pad
    origin = lo.min(axis=0)
    ext = np.maximum(hi - lo, 0.0)
    size = float(np.median(ext.max(axis=1)))
    whole = float((hi.max(axis=0) - origin).max())
    cell = max(size, whole / 2.0**20, 1e-300)
    while True:
        c0 = np.floor((lo - origin) / cell).astype(np.int64)
        c1 = np.floor((hi - origin) / cell).astype(np.int64)
        per = (c1[:, 0] - c0[:, 0] + 1) * (c1[:, 1] - c0[:, 1] + 1)
        if int(per.sum()) <= 8 * m or cell >= whole:
            break
        cell *= 2.0
    ny = int(c1[:, 1].max()) + 1
    nx = int(c1[:, 0].max()) + 1
    # every (box, cell) entry: row-major over each box's cell rectangle
    total = int(per.sum())
    box_of = np.repeat(np.arange(m), per)
    within = np.arange(total) - np.repeat(np.cumsum(per) - per, per)
    w = (c1[:, 1] - c0[:, 1] + 1)[box_of]
    cx = c0[box_of, 0] + within // w
    cy = c0[box_of, 1] + within % w
    key = (group.astype(np.int64)[box_of] * nx + cx) * ny + cy
    order = np.argsort(key, kind="stable")
    key, box_of = key[order], box_of[order]
    del cx, cy, within, w, order
    # runs of one cell: entry e pairs with the entries after it in its run
    new_run = np.r_[True, key[1:] != key[:-1]]
    run_id = np.cumsum(new_run) - 1
    run_start = np.flatnonzero(new_run)
    run_end = np.r_[run_start[1:], total]
    partners = run_end[run_id] - np.arange(total) - 1
    csum = np.cumsum(partners)
    n_cand = int(csum[-1]) if total else 0
    if stats is not None:
        stats["candidates"] = n_cand
    out_i: list[NDArray[np.intp]] = []
    out_j: list[NDArray[np.intp]] = []
    e_lo = 0
    while e_lo < total:
        # entries [e_lo, e_hi) whose partners fit one chunk (at least one entry)
        done = int(csum[e_lo - 1]) if e_lo else 0
        e_hi = int(np.searchsorted(csum, done + _GRID_CHUNK, side="right"))
        e_hi = max(e_hi, e_lo + 1)
        cnt = partners[e_lo:e_hi]
        n = int(cnt.sum())
        if n:
            first = np.repeat(np.arange(e_lo, e_hi), cnt)
            second = first + 1 + (np.arange(n) - np.repeat(np.cumsum(cnt) - cnt, cnt))
            a, b = box_of[first], box_of[second]
            ok = np.all((lo[a] <= hi[b]) & (lo[b] <= hi[a]), axis=1)
            cell_key = key[first]
            a, b, cell_key = a[ok], b[ok], cell_key[ok]
            # the cell of the intersection's lower-left corner: floor is monotone, so it is
            # the larger of the two boxes' first cells
            ref = np.maximum(c0[a], c0[b])
            ref_key = (group.astype(np.int64)[a] * nx + ref[:, 0]) * ny + ref[:, 1]
            here = ref_key == cell_key
            a, b = np.minimum(a[here], b[here]), np.maximum(a[here], b[here])
            if keep is not None:
                sel = keep(a, b)
                a, b = a[sel], b[sel]
            out_i.append(a)
            out_j.append(b)
        e_lo = e_hi
    if not out_i:
        return np.empty(0, np.intp), np.empty(0, np.intp)
    return _sorted_pairs(np.concatenate(out_i), np.concatenate(out_j))


def lines_apart(
    cubics: FloatArray, degree: NDArray[np.int8], pad: float
) -> Callable[[NDArray[np.intp], NDArray[np.intp]], NDArray[np.bool_]]:
    """A screen for :func:`overlapping_pairs`: False for pairs where one segment is a line and
    every control point of the other lies farther than ``pad`` on one side of that line.

    Parameters
    ----------
    cubics : ndarray, shape (M, 4, 2)
    degree : ndarray of int8, shape (M,)
    pad : float
        The gap tolerance: what lies within it of the line may still touch it.

    Notes
    -----
    A segment lies in the convex hull of its control points (Farin, *Curves and Surfaces for
    CAGD*, ch. 5), so hull points all strictly on one side of a line never meet it. The sign
    test is that of the orientation predicate (Cormen et al., *Introduction to Algorithms*,
    §33.1), made conservative by ``pad``: a pair is dropped only when the distance of every
    control point from the line exceeds ``pad``.
    """

    def keep(i: NDArray[np.intp], j: NDArray[np.intp]) -> NDArray[np.bool_]:
        out = np.ones(i.size, dtype=bool)
        for line, other in ((i, j), (j, i)):
            q = np.flatnonzero(degree[line] == 1)
            if q.size == 0:
                continue
            p0 = cubics[line[q], 0]
            d = cubics[line[q], 3] - p0
            n = np.hypot(d[:, 0], d[:, 1])
            rel = cubics[other[q]] - p0[:, None, :]
            side = (d[:, None, 0] * rel[..., 1] - d[:, None, 1] * rel[..., 0]) / np.where(
                n > 0, n, 1.0
            )[:, None]
            # pad, plus a margin for the rounding of the test and the intersection tolerance
            tol = pad + 1e-8 * (n + np.abs(rel).max(axis=(1, 2)))
            far = tol[:, None]
            apart = (n > 0) & ((side > far).all(axis=1) | (side < -far).all(axis=1))
            out[q[apart]] = False
        return out

    return keep


def joins_monotone(cub_a: FloatArray, cub_b: FloatArray) -> NDArray[np.bool_]:
    """True where two consecutive cubics (a then b), taken together, move monotonically along
    one direction, so they meet only at their shared point.

    Parameters
    ----------
    cub_a, cub_b : ndarray, shape (P, 4, 2)

    Notes
    -----
    Tries c = (A3 − A0) + (B3 − B0) and c = the sum of the end tangent of a and the start
    tangent of b; see :func:`~outlinebench.diagnostics.segment_checks.monotone_mask`.
    """
    d = np.concatenate([np.diff(cub_a, axis=1), np.diff(cub_b, axis=1)], axis=1)  # (P, 6, 2)
    chord = (cub_a[:, 3] - cub_a[:, 0]) + (cub_b[:, 3] - cub_b[:, 0])

    def along(c: FloatArray) -> NDArray[np.bool_]:
        dots = np.einsum("mkj,mj->mk", d, c)
        nonneg = (dots >= 0.0).all(axis=1)
        # each segment must move strictly somewhere inside: its middle difference or both ends
        a_ok = (dots[:, 1] > 0) | ((dots[:, 0] > 0) & (dots[:, 2] > 0))
        b_ok = (dots[:, 4] > 0) | ((dots[:, 3] > 0) & (dots[:, 5] > 0))
        return nonneg & a_ok & b_ok

    ta = d[:, 2] / np.maximum(np.linalg.norm(d[:, 2], axis=1, keepdims=True), 1e-300)
    tb = d[:, 3] / np.maximum(np.linalg.norm(d[:, 3], axis=1, keepdims=True), 1e-300)
    return along(chord) | along(ta + tb)


def lines_may_meet(
    cub_a: FloatArray, cub_b: FloatArray, joined: NDArray[np.int8]
) -> NDArray[np.bool_]:
    """Which pairs of straight segments may meet anywhere except at their join.

    Parameters
    ----------
    cub_a, cub_b : ndarray, shape (P, 4, 2)
        Lines in cubic form (only the end points are used).
    joined : ndarray of int8, shape (P,)
        As in :func:`narrow_pairs` (1 or 2: neighbours sharing an end point; 0: not joined).

    Returns
    -------
    ndarray of bool, shape (P,)

    Notes
    -----
    Two segments cross or touch only if neither lies strictly on one side of the other's
    line (orientation test with cross products, e.g. Cormen et al., *Introduction to
    Algorithms*, §33.1). Neighbours meet elsewhere only if the second turns straight back
    along the first (parallel and opposite).
    """
    p1, p2 = cub_a[:, 0], cub_a[:, 3]
    q1, q2 = cub_b[:, 0], cub_b[:, 3]
    d1, d2 = p2 - p1, q2 - q1

    def cross(u: FloatArray, v: FloatArray) -> FloatArray:
        return u[:, 0] * v[:, 1] - u[:, 1] * v[:, 0]

    o1, o2 = cross(d1, q1 - p1), cross(d1, q2 - p1)
    o3, o4 = cross(d2, p1 - q1), cross(d2, p2 - q1)
    apart = (o1 * o2 > 0.0) | (o3 * o4 > 0.0)
    n1 = np.hypot(d1[:, 0], d1[:, 1])
    n2 = np.hypot(d2[:, 0], d2[:, 1])
    back = (np.einsum("ij,ij->i", d1, d2) < 0.0) & (np.abs(cross(d1, d2)) <= 1e-12 * n1 * n2)
    return np.where(joined == 0, ~apart, back)


def narrow_pairs(
    cub_a: FloatArray,
    cub_b: FloatArray,
    joined: NDArray[np.int8],
    pad: float,
    levels: int = 6,
    max_pieces: int = 400_000,
) -> NDArray[np.bool_]:
    """Which segment pairs may meet anywhere except at the end where they are joined.

    Parameters
    ----------
    cub_a, cub_b : ndarray, shape (P, 4, 2)
    joined : ndarray of int8, shape (P,)
        0: not joined; 1: a's end is b's start; 2: a's start is b's end; 3: joined otherwise
        (always kept).
    pad : float
        Boxes are grown by this much (the gap tolerance).
    levels : int
        Halvings of both segments.
    max_pieces : int
        Stop halving (keeping every live pair) when this many piece pairs are alive.

    Returns
    -------
    ndarray of bool, shape (P,)
        False only where the pair certainly does not meet (other than at its join).

    Notes
    -----
    Box culling by subdivision (T. W. Sederberg and T. Nishita, "Curve intersection using
    Bézier clipping", CAD 22(9), 1990, §2, the subdivision variant), run on all pairs at once
    as a screen before :func:`outlinebench.geometry.intersections` examines the survivors one
    by one. A piece pair at the join of two neighbours is dropped when the two pieces together
    move monotonically along one direction (:func:`joins_monotone`).
    """
    p = cub_a.shape[0]
    keep = np.zeros(p, dtype=bool)
    if p == 0:
        return keep
    keep[joined == 3] = True
    live = np.flatnonzero(joined != 3)
    a, b = cub_a[live], cub_b[live]
    owner = live
    kind = joined[live]
    a0 = np.ones(live.size, bool)  # piece of a touches a's start
    a1 = np.ones(live.size, bool)  # ... a's end
    b0 = np.ones(live.size, bool)
    b1 = np.ones(live.size, bool)
    for level in range(levels + 1):
        ba, bb = hull_boxes(a), hull_boxes(b)
        ok = (
            (ba[:, 0] - pad <= bb[:, 2]) & (bb[:, 0] - pad <= ba[:, 2])
            & (ba[:, 1] - pad <= bb[:, 3]) & (bb[:, 1] - pad <= ba[:, 3])
        )  # fmt: skip
        at1 = (kind == 1) & a1 & b0
        at2 = (kind == 2) & a0 & b1
        if at1.any():
            q = np.flatnonzero(ok & at1)
            ok[q[joins_monotone(a[q], b[q])]] = False
        if at2.any():
            q = np.flatnonzero(ok & at2)
            ok[q[joins_monotone(b[q], a[q])]] = False
        a, b, owner, kind = a[ok], b[ok], owner[ok], kind[ok]
        a0, a1, b0, b1 = a0[ok], a1[ok], b0[ok], b1[ok]
        if owner.size == 0 or level == levels or 4 * owner.size > max_pieces:
            break
        al, ar = split(a, 0.5)
        bl, br = split(b, 0.5)
        a = np.concatenate([al, al, ar, ar])
        b = np.concatenate([bl, br, bl, br])
        owner = np.tile(owner, 4)
        kind = np.tile(kind, 4)
        f = np.zeros_like(a0)
        a0, a1 = np.concatenate([a0, a0, f, f]), np.concatenate([f, f, a1, a1])
        b0, b1 = np.concatenate([b0, f, b0, f]), np.concatenate([f, b1, f, b1])
    keep[owner] = True
    return keep


def crossing_findings(
    seg_a: FloatArray,
    seg_b: FloatArray,
    where_a: tuple[int, int, int],
    where_b: tuple[int, int, int],
    connected: tuple[tuple[int, int], ...],
    limits: Limits,
) -> list[Finding]:
    """Self-intersection findings where two segments cross or touch.

    Parameters
    ----------
    seg_a, seg_b : ndarray, (K, 2)
    where_a, where_b : (outline, contour, segment)
    connected : tuple of (end_a, end_b)
        Segment ends (0 or 1) where the two segments are joined (neighbours in a contour, or
        open ends that meet); a hit there is the join itself and is ignored.
    limits : Limits
    """
    hits = intersections(seg_a, seg_b)
    out: list[Finding] = []
    kept: list[FloatArray] = []
    for ta, tb in np.atleast_2d(hits):
        at_join = False
        for ea, eb in connected:
            if abs(ta - ea) <= _END_PARAM and abs(tb - eb) <= _END_PARAM:
                at_join = True
        if at_join:
            continue
        p = evaluate(seg_a, float(ta))
        if any(np.hypot(*(p - q)) <= limits.gap for q in kept):
            continue
        kept.append(p)
        turn = turn_angles(
            derivative_at(seg_a, float(ta))[None], derivative_at(seg_b, float(tb))[None]
        )
        angle = float(min(turn[0], 180.0 - turn[0]))  # the acute angle between the curves
        o, c, s = where_a
        ob, cb, sb = where_b
        place = "itself" if c == cb else f"contour {cb}"
        out.append(
            Finding(
                "self-intersection", ERROR, o, c, s, float(ta), float(p[0]), float(p[1]),
                angle, "degrees",
                f"outline crosses {place} (segment {sb}, t = {tb:.4g}) at {angle:.1f}°",
                other_contour=cb, other_segment=sb, other_t=float(tb),
            )
        )  # fmt: skip
    return out
