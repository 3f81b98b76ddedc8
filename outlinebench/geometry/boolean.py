"""Boolean operations on regions bounded by Bézier contours, keeping the curves.

A region is the area an outline fills under a fill rule (W3C SVG 1.1 §11.3 "fill-rule"):
``nonzero`` (winding number w ≠ 0), ``evenodd`` (w odd) or ``positive`` (w > 0, used to
combine offsets). Union, intersection, difference and exclusive-or of two regions, and the
overlap-free version of one region, are returned as closed contours of lines, quadratics and
cubics: every input segment is split exactly where it meets another (with
:func:`outlinebench.geometry.intersect.intersections`), and the pieces that separate the result
from the rest are kept and chained. Curves stay curves of the same degree; the on-curve points
of the input that lie on the result's boundary stay where they are.

Decisions in degenerate cases (each one tested in ``tests/geometry/test_boolean.py``):

- **Coincident and overlapping edges**: ``intersections`` reports the two ends of a shared
  stretch; both segments are split there, and pieces joining the same two nodes that lie
  within the tolerance of each other are one edge whose winding weight is the sum of theirs
  (opposite directions cancel). Such an edge bounds the result only if the fill changes across
  it, so two squares sharing a side unite into one contour and a region minus itself is empty.
- **Tangential touching**: the contact point is a node; on both sides of it the windings are
  found separately, so circles touching from outside unite into two contours meeting there.
- **Crossings at an on-curve point**: a crossing within the tolerance of a segment's end is
  that end (the on-curve point keeps its exact coordinates); no extra split is made.
- **Exact duplicate contours**: found before any subdivision (equal control points, in either
  direction) and treated as coincident edges; the fill rule decides: under ``nonzero`` a
  contour drawn twice fills once, under ``evenodd`` its winding 2 is even, so it is empty.
- **Contours touching at a single point**: the result keeps them as separate contours that
  meet at that point, never one contour through it twice (at a node with several ways on,
  the walk turns as far left as it can, so each contour bounds one face).
- **Slivers**: nodes closer than the tolerance are one node (its position is an original
  on-curve point if one is among them); a result contour whose mean width 2|A|/P (area over
  half its control-polygon length) is at most the tolerance is dropped, so overlaps thinner
  than the tolerance add nothing and leave nothing.

References
----------
- J. Vatti, "A generic solution to polygon clipping", CACM 35(7), 1992 (winding-number fill
  rules decide which boundary pieces bound the result).
- G. Greiner and K. Hormann, "Efficient clipping of arbitrary polygons", ACM TOG 17(2), 1998
  (split both boundaries at their crossings, keep pieces by inside/outside status).
- D. Eberly, "Winding number of a point with respect to a closed curve" (ray crossing count,
  each crossing signed by the direction in which the curve passes the ray); the half-open
  sign convention is the one of W. R. Franklin's PNPOLY point-in-polygon test.
- M. de Berg et al., *Computational Geometry*, 3rd ed., §2.2 (doubly connected edge lists:
  the next edge of a face is the first one clockwise from the reversed incoming edge).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.area import segment_area_terms
from outlinebench.geometry.bezier import as_control_points, split_many, subsegment, to_cubic
from outlinebench.geometry.intersect import intersections_batch, self_intersections
from outlinebench.geometry.nearest import nearest_point

__all__ = [
    "DEFAULT_BOOLEAN_TOLERANCE",
    "BOOLEAN_OPERATIONS",
    "FILL_RULES",
    "SMOOTH_JOIN_ANGLE",
    "SegmentSource",
    "RegionContour",
    "BooleanResult",
    "boolean_op",
    "remove_overlaps",
    "winding_numbers",
]

FloatArray = NDArray[np.float64]

# Distance (user units) below which two nodes are one node, an edge is coincident with
# another, and a result contour counts as a sliver (mean width); 1e-4 is 0.1 µm in a
# millimetre drawing and 1e-7 of a 1000-unit em.
DEFAULT_BOOLEAN_TOLERANCE = 1e-4

BOOLEAN_OPERATIONS = ("union", "intersection", "difference", "xor")
FILL_RULES = ("nonzero", "evenodd", "positive")

# A new join (at a crossing or contact) whose tangent turns by at most this angle (radians)
# is marked smooth; the same 0.5° as the G1 kink angle of the checks
# (outlinebench.diagnostics.settings.DEFAULT_KINK_ANGLE).
SMOOTH_JOIN_ANGLE = math.radians(0.5)

# Directions of the winding rays: 1/π rad from the x axis and its perpendicular, so that rays
# from points of axis-aligned or 45° drawings do not run along their edges.
_RAY_ANGLE = 1.0 / math.pi
_RAYS = np.array(
    [
        [math.cos(_RAY_ANGLE), math.sin(_RAY_ANGLE)],
        [-math.sin(_RAY_ANGLE), math.cos(_RAY_ANGLE)],
    ]
)
# Bisection steps for a ray crossing inside a monotone piece: 2⁻⁵⁴ of the parameter range.
_BISECT = 54
# Parameter on each edge where its windings are measured (not ½: rays from the midpoints of
# symmetric drawings meet each other's nodes).
_SAMPLE_T = 0.4142135623730951
# Query points × edges handled per block in the winding count (memory bound).
_BLOCK = 4_000_000


@dataclass(frozen=True, slots=True)
class SegmentSource:
    """Where a result segment came from: operand 0 (``a``) or 1 (``b``), the contour and
    segment indices in that operand, and the parameter range ``t0 → t1`` on that segment
    (t0 > t1 when the result runs against the original)."""

    operand: int
    contour: int
    segment: int
    t0: float
    t1: float


@dataclass(frozen=True, eq=False)
class RegionContour:
    """One closed contour of a boolean result.

    Attributes
    ----------
    segments : tuple of ndarray, each (K, 2)
        Lines, quadratics and cubics, end to end; the last ends where the first begins.
    joins : tuple of str
        Join intent per join (join j: end of segment j → start of segment j + 1, the last
        closing the contour): an original join keeps the input's intent (or the geometric
        one when the input states none); a new node is ``"smooth"`` when the tangent turns
        by at most :data:`SMOOTH_JOIN_ANGLE`, else ``"corner"``.
    sources : tuple of SegmentSource
        Provenance of each segment.
    closed : bool
        Always True.
    """

    segments: tuple[FloatArray, ...]
    joins: tuple[str, ...]
    sources: tuple[SegmentSource, ...]
    closed: bool = True

    @property
    def area(self) -> float:
        """Signed area (Green's theorem): > 0 counter-clockwise in y-up axes (an outer
        contour of a result), < 0 for a hole."""
        o = self.segments[0][0]
        return float(sum(segment_area_terms(s - o) for s in self.segments))

    @property
    def is_hole(self) -> bool:
        """Whether the contour bounds a hole (clockwise in y-up axes)."""
        return self.area < 0.0


@dataclass(frozen=True, eq=False)
class BooleanResult:
    """Contours of a boolean result and what was decided on the way.

    Attributes
    ----------
    contours : list of RegionContour
        Outer contours counter-clockwise (y-up), holes clockwise: the region is on the left
        of every contour, its winding number is 1 inside and 0 outside.
    dropped_slivers : int
        Result contours dropped as thinner than the tolerance.
    crossings : int
        Nodes where segments of the input meet other than at their own joins.
    tolerance : float
        The tolerance the result was made with: the one asked for, or a larger one where
        stretches of the outlines about the tolerance apart left the result open there
        (each retry ×4, at most 256 × the tolerance asked for).
    """

    contours: list[RegionContour] = field(default_factory=list)
    dropped_slivers: int = 0
    crossings: int = 0
    tolerance: float = 0.0


# --------------------------------------------------------------------------------------------
# input
# --------------------------------------------------------------------------------------------
@dataclass
class _Input:
    segs: list[FloatArray]  # original degree
    op: list[int]
    contour: list[int]
    index: list[int]
    nxt: list[int]  # following segment in its contour
    intent: list[str | None]  # join at the end of each segment
    synthetic: list[bool]  # closing line added by us


def _read(contours: Sequence, operand: int, tol: float, into: _Input, where: str) -> None:
    for ci, item in enumerate(contours):
        if hasattr(item, "segments"):
            segs, closed = item.segments, bool(item.closed)
            joins = tuple(getattr(item, "joins", ()) or ())
        else:
            segs, closed = item[0], bool(item[1])
            joins = tuple(item[2]) if len(item) > 2 else ()
        arrs = []
        for si, s in enumerate(segs):
            try:
                arr = as_control_points(s)
            except InvalidGeometryError as exc:
                raise InvalidGeometryError(f"{where} contour {ci}, segment {si}: {exc}") from None
            arrs.append(arr.copy())
        keep = [i for i, a in enumerate(arrs) if np.ptp(a, axis=0).max() > 0.0]
        if not keep:
            continue
        for k in range(1, len(keep)):
            a, b = arrs[keep[k - 1]], arrs[keep[k]]
            gap = float(np.hypot(*(a[-1] - b[0])))
            if gap > tol:
                raise InvalidGeometryError(
                    f"{where} contour {ci}, segment {keep[k]} does not start where segment "
                    f"{keep[k - 1]} ends (gap {gap:.6g})"
                )
            b[0] = a[-1]
        first = len(into.segs)
        for k, i in enumerate(keep):
            into.segs.append(arrs[i])
            into.op.append(operand)
            into.contour.append(ci)
            into.index.append(i)
            into.synthetic.append(False)
            into.intent.append(
                joins[i] if i < len(joins) and (closed or k < len(keep) - 1) else None
            )
        start, end = into.segs[first][0], into.segs[-1][-1]
        gap = float(np.hypot(*(end - start)))
        if gap > tol or (not closed and gap > 0.0):
            # filled as if closed by a straight line (W3C SVG 1.1 §11.3, "fill")
            into.segs.append(np.array([end, start]))
            into.op.append(operand)
            into.contour.append(ci)
            into.index.append(-1)
            into.synthetic.append(True)
            into.intent.append("corner")
            into.intent[-2] = "corner" if not closed else into.intent[-2]
        else:
            into.segs[-1][-1] = start
        last = len(into.segs)
        into.nxt.extend(range(first + 1, last))
        into.nxt.append(first)


# --------------------------------------------------------------------------------------------
# crossings
# --------------------------------------------------------------------------------------------
def _candidate_pairs(segs: list[FloatArray], delta: float, tol: float):
    """Pairs of segments whose flattenings (within ``delta``) come within 2·delta + tol.

    The pair of chords at a join of consecutive segments is left out where the contour turns
    there by less than 90°; at sharper turns the segments may cross again near the join (a
    hairpin) or share a stretch (a fold), so the pair is intersected.
    """
    import shapely

    from outlinebench.geometry.flatten import flatten_contours

    polys = flatten_contours([([s], False) for s in segs], delta)
    counts = np.array([len(p) - 1 for p in polys])
    starts = np.vstack([p[:-1] for p in polys])
    ends = np.vstack([p[1:] for p in polys])
    owner = np.repeat(np.arange(len(segs)), counts)
    first = np.concatenate([[0], np.cumsum(counts)[:-1]])
    last = first + counts - 1
    tree = shapely.STRtree(shapely.linestrings(np.stack([starts, ends], axis=1)))
    qi, qj = tree.query(
        shapely.linestrings(np.stack([starts, ends], axis=1)),
        predicate="dwithin",
        distance=2 * delta + tol,
    )
    oi, oj = owner[qi], owner[qj]
    sel = oi < oj
    qi, qj, oi, oj = qi[sel], qj[sel], oi[sel], oj[sel]
    return _drop_join_chords(segs, qi, qj, oi, oj, first, last, starts, ends), polys


def _drop_join_chords(segs, qi, qj, oi, oj, first, last, starts, ends):
    pairs: set[tuple[int, int]] = set()
    for ci, cj, a, b in zip(qi.tolist(), qj.tolist(), oi.tolist(), oj.tolist(), strict=True):
        if (a, b) in pairs:
            continue
        join = None
        if ci == last[a] and cj == first[b] and np.array_equal(segs[a][-1], segs[b][0]):
            join = (ci, cj)
        elif ci == first[a] and cj == last[b] and np.array_equal(segs[a][0], segs[b][-1]):
            join = (cj, ci)
        if join is not None:
            d_in = ends[join[0]] - starts[join[0]]
            d_out = ends[join[1]] - starts[join[1]]
            n = float(np.hypot(*d_in) * np.hypot(*d_out))
            if n > 0 and float(d_in @ d_out) > 0.0:
                continue  # turning by less than 90°: the two chords meet only at the join
        pairs.add((a, b))
    return sorted(pairs)


def _crossings(segs: list[FloatArray], tol: float, size: float):
    """(segment, t, segment, t) for every meeting of two segments (or a cubic with itself)."""
    delta = max(tol, 1e-3 * size)
    found: list[tuple[int, float, int, float]] = []
    pairs, polys = _candidate_pairs(segs, delta, tol)
    rest: list[tuple[int, int]] = []
    for a, b in pairs:
        sa, sb = segs[a], segs[b]
        if sa.shape == sb.shape and np.array_equal(sa, sb):
            found += [(a, 0.0, b, 0.0), (a, 1.0, b, 1.0)]
            continue
        if sa.shape == sb.shape and np.array_equal(sa, sb[::-1]):
            found += [(a, 0.0, b, 1.0), (a, 1.0, b, 0.0)]
            continue
        rest.append((a, b))
    # All remaining pairs are intersected in one batch (same answers as pair by pair).
    answers = intersections_batch([segs[a] for a, _ in rest], [segs[b] for _, b in rest])
    for (a, b), ts in zip(rest, answers, strict=True):
        for ta, tb in ts.tolist():
            found.append((a, ta, b, tb))
    for a, s in enumerate(segs):
        if s.shape[0] == 4:
            for t1, t2 in self_intersections(s):
                found.append((a, float(t1), a, float(t2)))
    return found, polys, delta


class _Points:
    """Union–find over points on segments: joins, crossings and nearby points become nodes."""

    def __init__(self) -> None:
        self.parent: list[int] = []
        self.pos: list[FloatArray] = []
        self.original: list[bool] = []

    def add(self, p: FloatArray, original: bool) -> int:
        self.parent.append(len(self.parent))
        self.pos.append(p)
        self.original.append(original)
        return len(self.parent) - 1

    def find(self, i: int) -> int:
        while self.parent[i] != i:
            self.parent[i] = self.parent[self.parent[i]]
            i = self.parent[i]
        return i

    def union(self, i: int, j: int) -> None:
        ri, rj = self.find(i), self.find(j)
        if ri != rj:
            self.parent[max(ri, rj)] = min(ri, rj)


def _evaluate(p: FloatArray, t: float) -> FloatArray:
    if t == 0.0:
        return p[0].copy()
    if t == 1.0:
        return p[-1].copy()
    w = p
    for _ in range(p.shape[0] - 1):
        w = (1.0 - t) * w[:-1] + t * w[1:]
    return w[0]


# --------------------------------------------------------------------------------------------
# the planar graph
# --------------------------------------------------------------------------------------------
@dataclass
class _Edge:
    pts: FloatArray  # original degree, oriented as its source
    u: int
    v: int
    mult: NDArray[np.int64]  # winding weight per operand
    src: int  # input segment
    t0: float
    t1: float


def _build_edges(  # noqa: C901 (older than the complexity gate; split when next changed)
    inp: _Input, found, tol: float, polys, delta: float
) -> tuple[list[_Edge], list[FloatArray], int]:
    segs = inp.segs
    pts = _Points()
    start_id = [pts.add(s[0], True) for s in segs]
    end_id = [pts.add(s[-1], True) for s in segs]
    for i, j in enumerate(inp.nxt):
        pts.union(end_id[i], start_id[j])
    interior: list[list[tuple[float, int]]] = [[] for _ in segs]

    def point_on(i: int, t: float) -> int:
        s = segs[i]
        p = _evaluate(s, t)
        if t <= 0.0 or np.hypot(*(p - s[0])) <= tol:
            return start_id[i]
        if t >= 1.0 or np.hypot(*(p - s[-1])) <= tol:
            return end_id[i]
        k = pts.add(p, False)
        interior[i].append((t, k))
        return k

    crossings = 0
    for a, ta, b, tb in found:
        ia, ib = point_on(a, ta), point_on(b, tb)
        if not (pts.original[ia] and pts.original[ib]):
            crossings += 1
        pts.union(ia, ib)
    # points closer than the tolerance are one node
    import shapely

    def union_close() -> None:
        allpos = np.array(pts.pos)
        geoms = shapely.points(allpos)
        qi, qj = shapely.STRtree(geoms).query(geoms, predicate="dwithin", distance=tol)
        for i, j in zip(qi.tolist(), qj.tolist(), strict=True):
            if i < j:
                pts.union(i, j)

    union_close()
    # a node within the tolerance of a segment it is not on splits that segment there, so
    # that stretches closer than the tolerance (without crossing) end at common nodes
    seg_of: dict[int, int] = {start_id[i]: i for i in range(len(segs))}
    seg_of.update({end_id[i]: i for i in range(len(segs))})
    for i, lst in enumerate(interior):
        for _, k in lst:
            seg_of[k] = i
    groups: dict[int, list[int]] = {}
    for i in range(len(pts.parent)):
        groups.setdefault(pts.find(i), []).append(i)
    node_ids = list(groups)
    on = [{seg_of[m] for m in groups[r]} for r in node_ids]
    npos = np.array([pts.pos[groups[r][0]] for r in node_ids])
    lines = [shapely.LineString(p) for p in polys]
    ni, si = shapely.STRtree(lines).query(
        shapely.points(npos), predicate="dwithin", distance=tol + delta
    )
    by_seg: dict[int, list[int]] = {}
    for n, sg in zip(ni.tolist(), si.tolist(), strict=True):
        if sg not in on[n]:
            by_seg.setdefault(sg, []).append(n)
    for sg, ns in by_seg.items():
        ts, ds, _ = nearest_point(segs[sg], npos[ns])
        for n, t, dd in zip(
            ns, np.atleast_1d(ts).tolist(), np.atleast_1d(ds).tolist(), strict=True
        ):
            if dd <= tol:
                pts.union(point_on(sg, float(t)), groups[node_ids[n]][0])
    allpos = np.array(pts.pos)
    roots = np.array([pts.find(i) for i in range(len(pts.parent))])
    node_of_root: dict[int, int] = {}
    node_pos: list[FloatArray] = []
    node_sum: dict[int, list[FloatArray]] = {}
    for i, r in enumerate(roots.tolist()):
        node_sum.setdefault(r, []).append(i)
    for r, members in node_sum.items():
        orig = [m for m in members if pts.original[m]]
        p = allpos[orig[0]] if orig else allpos[members].mean(axis=0)
        node_of_root[r] = len(node_pos)
        node_pos.append(p)
    node = [node_of_root[r] for r in roots.tolist()]

    edges: list[_Edge] = []
    for i, s in enumerate(segs):
        cuts = sorted(interior[i])
        ts = [0.0] + [t for t, _ in cuts] + [1.0]
        ns = [node[start_id[i]]] + [node[k] for _, k in cuts] + [node[end_id[i]]]
        kt, kn = [ts[0]], [ns[0]]
        for t, n in zip(ts[1:-1], ns[1:-1], strict=True):
            if t > kt[-1]:
                kt.append(t)
                kn.append(n)
        kt.append(1.0)
        kn.append(ns[-1])
        pieces = split_many(s, kt[1:-1]) if len(kt) > 2 else s[None]
        for k, piece in enumerate(pieces):
            piece = piece.copy()
            u, v = kn[k], kn[k + 1]
            d0 = node_pos[u] - piece[0]
            d1 = node_pos[v] - piece[-1]
            piece[0] += d0
            piece[-1] += d1
            if piece.shape[0] > 2:
                piece[1] += d0
                piece[-2] += d1
            if u == v and np.max(np.hypot(*(piece - node_pos[u]).T)) <= 2 * tol:
                continue  # collapsed into its node
            m = np.zeros(2, dtype=np.int64)
            m[inp.op[i]] = 1
            edges.append(_Edge(piece, u, v, m, i, kt[k], kt[k + 1]))
    return edges, node_pos, crossings


def _coincident(a: FloatArray, b: FloatArray, tol: float, line_a=None, line_b=None) -> bool:
    """Whether two edges joining the same nodes lie within ``tol`` of each other (samples of
    each against a fine flattening of the other, within ``tol / 4``).

    ``line_a`` / ``line_b`` are those flattenings as shapely line strings where the caller
    has them already (made here otherwise).
    """
    import shapely

    from outlinebench.geometry.flatten import flatten_contours

    ts = np.linspace(0.0, 1.0, 9)[1:-1]
    for p, q, line in ((a, b, line_b), (b, a, line_a)):
        if line is None:
            line = shapely.LineString(flatten_contours([([q], False)], tol / 4)[0])
        sp = np.array([_evaluate(p, float(t)) for t in ts])
        if np.max(shapely.distance(shapely.points(sp), line)) > tol:
            return False
    return True


def _merge_coincident(edges: list[_Edge], tol: float) -> list[_Edge]:
    import shapely

    from outlinebench.geometry.flatten import flatten_contours

    groups: dict[tuple[int, int], list[int]] = {}
    for k, e in enumerate(edges):
        groups.setdefault((min(e.u, e.v), max(e.u, e.v)), []).append(k)
    # The fine flattening of every edge that shares its nodes with another, in one call.
    shared = [k for ks in groups.values() if len(ks) > 1 for k in ks]
    lines: dict[int, object] = {}
    if shared:
        flat = flatten_contours([([edges[k].pts], False) for k in shared], tol / 4)
        lines = {k: shapely.LineString(f) for k, f in zip(shared, flat, strict=True)}
    out: list[_Edge] = []
    for ks in groups.values():
        reps: list[tuple[_Edge, object]] = []
        for k in ks:
            e = edges[k]
            le = lines.get(k)
            for r, lr in reps:
                same = e.u == r.u and e.v == r.v
                if e.u == e.v:
                    ok = _coincident(e.pts, r.pts, tol, le, lr) or _coincident(
                        e.pts[::-1], r.pts, tol, le, lr
                    )
                    if ok:
                        # a loop: same direction if its area has the same sign
                        same = (
                            float(segment_area_terms(e.pts - e.pts[0]))
                            * float(segment_area_terms(r.pts - r.pts[0]))
                            >= 0
                        )
                else:
                    ok = _coincident(e.pts, r.pts, tol, le, lr)
                if ok:
                    r.mult = r.mult + (e.mult if same else -e.mult)
                    break
            else:
                reps.append((_Edge(e.pts, e.u, e.v, e.mult.copy(), e.src, e.t0, e.t1), le))
        out.extend(r for r, _ in reps if np.any(r.mult != 0))
    return out


# --------------------------------------------------------------------------------------------
# winding numbers
# --------------------------------------------------------------------------------------------
def _bern3(c: FloatArray, t: FloatArray) -> FloatArray:
    s = 1.0 - t
    return (
        s**3 * c[..., 0] + 3 * s * s * t * c[..., 1] + 3 * s * t * t * c[..., 2] + t**3 * c[..., 3]
    )


def _monotone_breaks(c: FloatArray) -> FloatArray:
    """Interior parameters where a scalar cubic in Bernstein form ``c`` (N, 4) turns, (N, 2)
    (NaN where none): roots in (0, 1) of its derivative, a quadratic."""
    d0, d1, d2 = c[:, 1] - c[:, 0], c[:, 2] - c[:, 1], c[:, 3] - c[:, 2]
    # d(t) = d0 (1−t)² + 2 d1 t(1−t) + d2 t² = A t² + B t + C
    qa = d0 - 2 * d1 + d2
    qb = 2 * (d1 - d0)
    qc = d0
    out = np.full((len(c), 2), np.nan)
    scale = np.abs(qa) + np.abs(qb) + np.abs(qc)
    lin = np.abs(qa) <= 1e-12 * scale
    with np.errstate(divide="ignore", invalid="ignore"):
        t_lin = -qc / qb
        disc = qb * qb - 4 * qa * qc
        sq = np.sqrt(np.where(disc >= 0, disc, np.nan))
        # numerically stable roots (Press et al., Numerical Recipes §5.6)
        q = -0.5 * (qb + np.copysign(sq, qb))
        r1 = q / qa
        r2 = qc / q
    out[:, 0] = np.where(lin, t_lin, r1)
    out[:, 1] = np.where(lin, np.nan, r2)
    out[~((out > 0) & (out < 1))] = np.nan
    return np.sort(out, axis=1)


def _ray_counts(
    cub: FloatArray, mult: FloatArray, p: FloatArray, u: FloatArray, own: NDArray[np.intp]
) -> FloatArray:
    """Signed crossings of rays p + s·u (s > 0) with all edges, weighted by ``mult``.

    ``cub`` (E, 4, 2) cubic control points, ``mult`` (E, W); ``p`` (Q, 2), ``u`` (2,) one
    direction for the whole batch; ``own[q]`` is the edge that p[q] lies on at parameter
    :data:`_SAMPLE_T` (−1 for none): its crossing at p itself is not counted.
    Half-open rule: a point exactly on the ray counts as being on its left (f ≥ 0), so a ray
    through a node counts it once, consistently for both edges meeting there.
    """
    v = np.array([-u[1], u[0]])
    fv = cub @ v  # (E, 4): f = (B − p)·v is a Bernstein cubic with these coefficients − p·v
    fu = cub @ u
    vmin, vmax, umax = fv.min(axis=1), fv.max(axis=1), fu.max(axis=1)
    pv, pu = p @ v, p @ u
    out = np.zeros((len(p), mult.shape[1]))
    rows = max(1, _BLOCK // max(1, len(cub)))
    for b0 in range(0, len(p), rows):
        sl = slice(b0, b0 + rows)
        mask = (vmin[None] <= pv[sl, None]) & (vmax[None] >= pv[sl, None])
        mask &= umax[None] >= pu[sl, None]
        qi, ei = np.nonzero(mask)
        qi = qi + b0
        if len(qi) == 0:
            continue
        c = fv[ei] - pv[qi, None]
        cu = fu[ei] - pu[qi, None]
        is_own = own[qi] == ei
        br = _monotone_breaks(c)
        star = np.where(is_own, _SAMPLE_T, np.nan)
        knots = np.sort(np.column_stack([np.zeros(len(c)), br, star, np.ones(len(c))]), axis=1)
        knots = np.where(np.isnan(knots), 1.0, knots)
        vals = _bern3(c[:, None, :], knots)
        vals[:, 0] = c[:, 0]
        vals[knots == 1.0] = np.repeat(c[:, 3:4], 5, axis=1)[knots == 1.0]
        at_star = is_own[:, None] & (knots == _SAMPLE_T)
        vals[at_star] = 0.0
        pos = vals >= 0.0
        change = pos[:, 1:] != pos[:, :-1]
        near_star = is_own[:, None] & ((knots[:, 1:] == _SAMPLE_T) | (knots[:, :-1] == _SAMPLE_T))
        change &= ~near_star
        pi, ki = np.nonzero(change)
        if len(pi) == 0:
            continue
        lo, hi = knots[pi, ki], knots[pi, ki + 1]
        up = pos[pi, ki + 1]  # from f < 0 to f ≥ 0: the edge passes the ray to its left
        cc = c[pi]
        for _ in range(_BISECT):
            mid = 0.5 * (lo + hi)
            fm = _bern3(cc, mid) >= 0.0
            go_hi = fm == up  # the change is at or before mid
            hi = np.where(go_hi, mid, hi)
            lo = np.where(go_hi, lo, mid)
        s = _bern3(cu[pi], 0.5 * (lo + hi))
        ahead = s > 0.0
        sign = np.where(up, 1.0, -1.0)[ahead]
        np.add.at(out, qi[pi[ahead]], sign[:, None] * mult[ei[pi[ahead]]])
    return out


def _edge_windings(edges: list[_Edge]) -> tuple[FloatArray, FloatArray]:
    """Winding numbers (per operand) just left and just right of every edge, (E, 2) each."""
    cub = np.array([to_cubic(e.pts) for e in edges])
    mult = np.array([e.mult for e in edges], dtype=np.float64)
    t = _SAMPLE_T
    s = 1.0 - t
    w = np.array([s**3, 3 * s * s * t, 3 * s * t * t, t**3])
    p = np.einsum("k,ekd->ed", w, cub)
    dw = np.array([-(s**2), s * s - 2 * s * t, 2 * s * t - t * t, t * t])
    d = np.einsum("k,ekd->ed", dw, cub)
    # the ray direction most across the edge, pointing to its left
    cr = d[:, None, 0] * _RAYS[None, :, 1] - d[:, None, 1] * _RAYS[None, :, 0]  # (E, 2)
    which = np.argmax(np.abs(cr), axis=1)
    flip = cr[np.arange(len(edges)), which] < 0
    left = np.zeros_like(mult)
    idx = np.arange(len(edges))
    for k in range(2):
        for f in (False, True):
            sel = (which == k) & (flip == f)
            if not np.any(sel):
                continue
            u = -_RAYS[k] if f else _RAYS[k]
            left[sel] = _ray_counts(cub, mult, p[sel], u, idx[sel])
    return left, left - mult


def winding_numbers(contours: Sequence, points) -> NDArray[np.int64]:
    """Winding numbers of points with respect to closed Bézier contours.

    Parameters
    ----------
    contours : sequence
        Objects with ``segments`` and ``closed``, or pairs ``(segments, closed)``; an open
        contour counts as closed by a straight line (as SVG fills it).
    points : array_like, shape (Q, 2)

    Returns
    -------
    ndarray of int, shape (Q,)
        Σ over contours of how many times each winds counter-clockwise (y-up axes) round the
        point. Points on a contour get the count of the side the ray leaves to.

    Notes
    -----
    Each point casts a ray in the direction 1/π rad from the x axis; a segment crosses it
    where the Bernstein cubic f(t) = (B(t) − p)·v (v normal to the ray) changes sign, found
    on the segment's monotone pieces (split where f′ = 0, in closed form) and placed by
    bisection; each crossing at s = (B(t) − p)·u > 0 adds +1 when f goes from < 0 to ≥ 0 and
    −1 the other way (Eberly; half-open rule of Franklin's PNPOLY).
    """
    inp = _Input([], [], [], [], [], [], [])
    _read(contours, 0, math.inf, inp, "")
    q = np.asarray(points, dtype=np.float64).reshape(-1, 2)
    if not inp.segs:
        return np.zeros(len(q), dtype=np.int64)
    cub = np.array([to_cubic(s) for s in inp.segs])
    mult = np.ones((len(cub), 1))
    counts = _ray_counts(cub, mult, q, _RAYS[0], np.full(len(q), -1))
    return np.rint(counts[:, 0]).astype(np.int64)


# --------------------------------------------------------------------------------------------
# selection and tracing
# --------------------------------------------------------------------------------------------
def _filled(w: FloatArray, rule: str) -> NDArray[np.bool_]:
    wi = np.rint(w).astype(np.int64)
    if rule == "nonzero":
        return wi != 0
    if rule == "evenodd":
        return (wi % 2) != 0
    return wi > 0


def _inside(wl: FloatArray, rules: tuple[str, str], op: str) -> NDArray[np.bool_]:
    a = _filled(wl[:, 0], rules[0])
    b = _filled(wl[:, 1], rules[1])
    if op == "union":
        return a | b
    if op == "intersection":
        return a & b
    if op == "difference":
        return a & ~b
    if op == "xor":
        return a ^ b
    return a  # "self": one operand


def _start_frame(c: FloatArray) -> tuple[float, float]:
    """Tangent angle and signed curvature at the start of a cubic (one-sided fallbacks)."""
    d = c[1] - c[0]
    if not np.any(d):
        d = c[2] - c[0]
    if not np.any(d):
        d = c[3] - c[0]
    ang = math.atan2(d[1], d[0])
    n = float(np.hypot(*d))
    a, b = c[1] - c[0], c[2] - c[1]
    k = 2.0 / 3.0 * float(a[0] * b[1] - a[1] * b[0]) / n**3 if n > 0 else 0.0
    return ang, k


def _trace(kept: list[tuple[FloatArray, int, int, int, float, float]]):
    """Chain directed edges (pts, u, v, src, t0, t1) into closed loops, each bounding one face.

    At a node with several edges leaving, the walk takes the first one clockwise from the
    reversed incoming edge (de Berg et al. §2.2), ties of tangent broken by curvature.
    """
    out_at: dict[int, list[int]] = {}
    frames_out, frames_in = [], []
    for k, (pts, u, _v, _s, _a, _b) in enumerate(kept):
        out_at.setdefault(u, []).append(k)
        c = to_cubic(pts)
        frames_out.append(_start_frame(c))
        frames_in.append(_start_frame(c[::-1]))  # the incoming edge reversed
    used = np.zeros(len(kept), dtype=bool)
    two_pi = 2.0 * math.pi

    def key(e_in: int, c: int) -> tuple[float, float]:
        a_in, k_in = frames_in[e_in]
        a_out, k_out = frames_out[c]
        delta = (a_in - a_out) % two_pi
        if delta < 1e-9 or delta > two_pi - 1e-9:
            delta = two_pi if k_out > k_in else 0.0
        return delta, -k_out

    loops = []
    for s in range(len(kept)):
        if used[s]:
            continue
        loop = [s]
        used[s] = True
        cur = s
        while True:
            v = kept[cur][2]
            cands = [c for c in out_at.get(v, []) if not used[c] or c == s]
            if not cands:
                break
            nxt = min(cands, key=lambda c, cur=cur: key(cur, c))
            if nxt == s:
                break
            if kept[nxt][1] != v:
                break
            loop.append(nxt)
            used[nxt] = True
            cur = nxt
        if kept[loop[-1]][2] == kept[loop[0]][1]:
            loops.extend(_simple_cycles(loop, kept))
    return loops


def _simple_cycles(loop: list[int], kept) -> list[list[int]]:
    """Split a closed walk that passes a node more than once into walks that do not.

    The pieces together wind round every point as the walk did (as 1-cycles they sum to
    it), and none touches itself: where a hole meets its outer contour at one node, or a
    contour pinches, the result is two contours meeting there.
    """
    out: list[list[int]] = []
    stack: list[int] = []
    at: dict[int, int] = {kept[loop[0]][1]: 0}
    for e in loop:
        stack.append(e)
        v = kept[e][2]
        if v in at:
            k = at[v]
            cycle = stack[k:]
            del stack[k:]
            for e2 in cycle[:-1]:
                at.pop(kept[e2][2], None)
            out.append(cycle)
            at[v] = k
        else:
            at[v] = len(stack)
    return out


def _turn(a: FloatArray, b: FloatArray) -> float:
    """Tangent turn (radians) from the end of segment a to the start of segment b."""
    ca, cb = to_cubic(a), to_cubic(b)
    ang_in = _start_frame(ca[::-1])[0] + math.pi
    ang_out = _start_frame(cb)[0]
    return abs((ang_out - ang_in + math.pi) % (2 * math.pi) - math.pi)


def _assemble(loop, kept, inp: _Input) -> RegionContour:
    """Segments of one loop, with pieces of one input segment that follow each other joined
    again, join intents and provenance."""
    items = [list(kept[k]) for k in loop]  # pts, u, v, src, t0, t1
    merged: list[list] = []
    for it in items:
        if merged:
            prev = merged[-1]
            if prev[3] == it[3] and prev[5] == it[4] and _continues(prev, it):
                _join_pieces(prev, it, inp)
                continue
        merged.append(it)
    if len(merged) > 1:
        first, last = merged[0], merged[-1]
        if last[3] == first[3] and last[5] == first[4] and _continues(last, first):
            _join_pieces(last, first, inp)
            merged[0] = last
            merged.pop()
    segs = [m[0] for m in merged]
    for i in range(len(segs)):
        segs[i][0] = segs[i - 1][-1]
    joins, sources = [], []
    n = len(merged)
    for i, m in enumerate(merged):
        nx = merged[(i + 1) % n]
        src = m[3]
        sources.append(
            SegmentSource(
                inp.op[src],
                inp.contour[src],
                inp.index[src],
                float(m[4]),
                float(m[5]),
            )
        )
        intent = None
        forward = m[5] == 1.0 and nx[4] == 0.0 and inp.nxt[src] == nx[3]
        backward = m[5] == 0.0 and nx[4] == 1.0 and inp.nxt[nx[3]] == src
        if forward:
            intent = inp.intent[src]
        elif backward:
            intent = inp.intent[nx[3]]
        if intent is None:
            intent = (
                "smooth" if _turn(segs[i], segs[(i + 1) % n]) <= SMOOTH_JOIN_ANGLE else "corner"
            )
        joins.append(intent)
    return RegionContour(tuple(segs), tuple(joins), tuple(sources))


def _continues(a, b) -> bool:
    """Whether piece b follows piece a on the same input segment in the same direction."""
    return (a[5] > a[4]) == (b[5] > b[4])


def _join_pieces(a: list, b: list, inp: _Input) -> None:
    """Replace piece a by a ∪ b (one piece of their input segment)."""
    t0, t1 = a[4], b[5]
    orig = inp.segs[a[3]]
    if min(t0, t1) == 0.0 and max(t0, t1) == 1.0:
        seg = orig.copy() if t1 > t0 else orig[::-1].copy()
    else:
        seg = subsegment(orig, t0, t1)
    d0, d1 = a[0][0] - seg[0], b[0][-1] - seg[-1]
    seg[0] += d0
    seg[-1] += d1
    if seg.shape[0] > 2:
        seg[1] += d0
        seg[-2] += d1
    a[0], a[2], a[5] = seg, b[2], t1


def _control_length(segs) -> float:
    return float(sum(np.sum(np.hypot(*np.diff(s, axis=0).T)) for s in segs))


# --------------------------------------------------------------------------------------------
# the operations
# --------------------------------------------------------------------------------------------
def _check_rule(rule: str) -> str:
    if rule not in FILL_RULES:
        raise InvalidGeometryError(
            f"unknown fill rule {rule!r}; expected one of {', '.join(FILL_RULES)}"
        )
    return rule


def _run(operands: list[Sequence], op: str, rules: tuple[str, str], tolerance: float):
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InvalidGeometryError(f"the boolean tolerance must be > 0, got {tolerance!r}")
    inp = _Input([], [], [], [], [], [], [])
    for k, contours in enumerate(operands):
        _read(contours, k, tolerance, inp, "ab"[k] + ":" if len(operands) > 1 else "")
    if not inp.segs:
        return BooleanResult(tolerance=tolerance)
    allpts = np.vstack(inp.segs)
    size = float(np.ptp(allpts, axis=0).max())
    tol = tolerance
    for _ in range(_RETRIES + 1):
        res, open_at = _run_at(inp, op, rules, tol, size)
        if open_at is None:
            return res
        # Stretches about the tolerance apart can leave kept edges that do not close into
        # loops (some of their nodes merged, others not): the whole operation is redone
        # with a larger tolerance, never returned with a contour missing.
        tol *= _RETRY_FACTOR
    raise InvalidGeometryError(
        f"the boolean result does not close near ({open_at[0]:.6g}, {open_at[1]:.6g}) even at "
        f"tolerance {tol / _RETRY_FACTOR:.3g}: the outlines run about that close without meeting"
    )


# Retries of an operation whose kept edges do not close (see _run) and the factor by which
# each one widens the tolerance: 4⁴ = 256 × the tolerance at most.
_RETRIES = 4
_RETRY_FACTOR = 4.0


def _run_at(inp: _Input, op: str, rules: tuple[str, str], tolerance: float, size: float):
    found, polys, delta = _crossings(inp.segs, tolerance, size)
    edges, _nodes, crossings = _build_edges(inp, found, tolerance, polys, delta)
    edges = _merge_coincident(edges, tolerance)
    if not edges:
        return BooleanResult([], 0, crossings, tolerance), None
    wl, wr = _edge_windings(edges)
    in_l = _inside(wl, rules, op)
    in_r = _inside(wr, rules, op)
    kept = []
    for e, il, ir in zip(edges, in_l.tolist(), in_r.tolist(), strict=True):
        if il == ir:
            continue
        if il:
            kept.append((e.pts.copy(), e.u, e.v, e.src, e.t0, e.t1))
        else:
            kept.append((e.pts[::-1].copy(), e.v, e.u, e.src, e.t1, e.t0))
    contours = []
    slivers = 0
    loops = _trace(kept)
    used = np.zeros(len(kept), dtype=bool)
    for loop in loops:
        used[loop] = True
    if not np.all(used):
        k = int(np.argmin(used))
        return None, kept[k][0][0]
    for loop in loops:
        rc = _assemble(loop, kept, inp)
        per = _control_length(rc.segments)
        if per == 0.0 or 2.0 * abs(rc.area) / per <= tolerance:
            slivers += 1
            continue
        contours.append(rc)
    return BooleanResult(contours, slivers, crossings, tolerance), None


def boolean_op(
    a: Sequence,
    b: Sequence,
    op: str,
    *,
    fill_rule: str | tuple[str, str] = "nonzero",
    tolerance: float = DEFAULT_BOOLEAN_TOLERANCE,
) -> BooleanResult:
    """Union, intersection, difference or exclusive-or of the regions of two outlines.

    Parameters
    ----------
    a, b : sequence
        The contours of each operand: objects with ``segments``, ``closed`` (and optionally
        ``joins``, the join intents, as model contours have), or tuples
        ``(segments, closed)`` / ``(segments, closed, joins)``; segments are ``(K, 2)``
        control-point arrays, K = 2, 3, 4, end to end. Open contours are filled as if closed
        by a straight line (W3C SVG 1.1 §11.3).
    op : {"union", "intersection", "difference", "xor"}
        ``difference`` is a − b.
    fill_rule : {"nonzero", "evenodd", "positive"} or a pair of them
        How each operand's winding number w decides its region (one rule for both, or one
        per operand): w ≠ 0, w odd, or w > 0.
    tolerance : float
        ε (user units): nodes closer than ε are one node; edges within ε of each other are
        coincident; result contours with mean width 2|A|/P ≤ ε are dropped.

    Returns
    -------
    BooleanResult
        Closed contours: outer ones counter-clockwise in y-up axes (clockwise on an SVG
        page), holes the other way; each with join intents and segment provenance.

    Raises
    ------
    InvalidGeometryError
        Bad control points (naming the operand, contour and segment), consecutive segments
        that do not meet, an unknown operation or fill rule, a tolerance not > 0.

    Notes
    -----
    1. All segment pairs whose flattenings (within max(ε, 10⁻³ of the drawing's size)) come
       close are intersected exactly (:func:`~outlinebench.geometry.intersect.intersections`;
       cubic loops by ``self_intersections``); equal segments are paired without
       subdivision.
    2. Every segment is split at its crossings; crossing points, joins and points closer than
       ε become nodes (union–find), pieces between nodes become edges, and coincident edges
       merge with summed winding weights.
    3. For each edge, the winding number of each operand just to its left is counted along a
       ray (see :func:`winding_numbers`), the crossing of the edge itself left out; the right
       side differs by the edge's weight. An edge is kept where the result's membership
       (``op`` applied to the two fill-rule tests) differs between its sides, oriented so
       that the result lies on its left.
    4. Kept edges are chained into faces (first way on clockwise from the reversed incoming
       edge; de Berg et al. §2.2); consecutive pieces of one input segment are joined back
       into one piece of it, so an input segment that crosses nothing comes out unchanged.
    See the module docstring for the decisions in degenerate cases.

    Examples
    --------
    >>> sq = lambda x, y: ([np.array([[x, y], [x + 2.0, y]]), np.array([[x + 2.0, y],
    ...     [x + 2.0, y + 2.0]]), np.array([[x + 2.0, y + 2.0], [x, y + 2.0]]),
    ...     np.array([[x, y + 2.0], [x, y]])], True)
    >>> r = boolean_op([sq(0.0, 0.0)], [sq(1.0, 1.0)], "union")
    >>> len(r.contours), round(r.contours[0].area, 12)
    (1, 7.0)
    >>> boolean_op([sq(0.0, 0.0)], [sq(5.0, 5.0)], "intersection").contours
    []
    """
    if op not in BOOLEAN_OPERATIONS:
        raise InvalidGeometryError(
            f"unknown boolean operation {op!r}; expected one of {', '.join(BOOLEAN_OPERATIONS)}"
        )
    rules = (fill_rule, fill_rule) if isinstance(fill_rule, str) else tuple(fill_rule)
    rules = (_check_rule(rules[0]), _check_rule(rules[1]))
    return _run([a, b], op, rules, tolerance)


def remove_overlaps(
    contours: Sequence,
    *,
    fill_rule: str = "nonzero",
    tolerance: float = DEFAULT_BOOLEAN_TOLERANCE,
) -> BooleanResult:
    """The region of one outline as contours that neither cross nor overlap.

    Parameters
    ----------
    contours : sequence
        As ``a`` of :func:`boolean_op`.
    fill_rule : {"nonzero", "evenodd", "positive"}
    tolerance : float
        As for :func:`boolean_op`.

    Returns
    -------
    BooleanResult
        The same region (the union of the outline with itself): self-crossing contours are
        cut at their crossings, overlapping contours merged, holes wound opposite to their
        outer contours. Contours that touch nothing come back with their segments unchanged
        (reversed if they ran the other way).

    Notes
    -----
    :func:`boolean_op`'s steps with one operand, an edge kept where the fill rule's verdict
    differs between its two sides.

    Examples
    --------
    >>> remove_overlaps([]).contours
    []
    """
    _check_rule(fill_rule)
    return _run([contours], "self", (fill_rule, fill_rule), tolerance)
