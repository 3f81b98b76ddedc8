"""Offsetting contours by a distance (tool-radius compensation), with the places a tool cannot go.

The exact offset of a segment B is O(t) = B(t) + e·n(t), n = (T_y, −T_x) the unit normal to
the right of the unit tangent T (in y-up axes), e the signed offset. It is not a polynomial
curve, so it is approximated by cubic Béziers fitted to it within a tolerance. Round joins
(circular arcs of radius |e| about the corner) fill the gap at corners that turn away from
the offset side; loops that the offset of concave parts creates are cut away.

References
----------
- W. Tiller and E. G. Hanson, "Offsets of two-dimensional profiles", *IEEE Computer Graphics
  and Applications* 4(9), 1984, 36–46 (offset by fitting, splitting until within tolerance).
- G. Elber, I.-K. Lee and M.-S. Kim, "Comparing offset curve approximation methods", *IEEE
  CG&A* 17(3), 1997, 62–71 (error measured against the exact offset at sample points).
- T. Dokken, M. Dæhlen, T. Lyche, K. Mørken, "Good approximation of circles by
  curvature-continuous Bézier curves", *CAGD* 7 (1990) — the handle length 4/3·tan(φ/4) of a
  cubic circular arc and its radial error.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field, replace

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.area import signed_area
from outlinebench.geometry.curvature import end_tangents
from outlinebench.geometry.flatten import _as_cubic_batch, flatten_contours
from outlinebench.geometry.intersect import intersections, self_intersections
from outlinebench.geometry.offset_trim import _coef, _eval, _trim
from outlinebench.limits import FINDINGS_PER_KIND, OVERLAP_CANDIDATE_PAIRS

__all__ = [
    "DEFAULT_OFFSET_TOLERANCE",
    "OffsetProblem",
    "OffsetContour",
    "OffsetResult",
    "offset_contour",
    "offset_contours",
    "RegionFinding",
    "RegionOffset",
    "ToolpathViolation",
    "OffsetOverlap",
    "offset_region",
    "verify_toolpaths",
    "offset_overlaps",
    "merge_offsets",
]

FloatArray = NDArray[np.float64]

# Default largest distance between the fitted cubic offset and the exact offset, in the
# document's user units (0.01 mm in a millimetre drawing).
DEFAULT_OFFSET_TOLERANCE = 0.01

# Sample parameters per fitted piece at which the fit is compared with the exact offset.
_FIT_SAMPLES = 24

# Deepest halving of a piece that still misses the tolerance; 2⁻¹⁸ of a segment's parameter
# range is far below any drawing's resolution.
_MAX_FIT_DEPTH = 18

# Grid on which 1 + e·κ(t) is scanned for sign changes (cusps of the offset) per segment.
_CUSP_GRID = 64

# Radial error of the cubic quarter circle with handle 4/3·tan(π/8), relative to the radius
# (Dokken et al. 1990): about 2.7e-4; it scales with the sixth power of the arc's angle.
_QUARTER_ARC_ERROR = 2.73e-4

# Corners whose tangent turn is below this angle (radians) count as smooth joins.
_SMOOTH_ANGLE = 1e-6


@dataclass(frozen=True, slots=True)
class OffsetProblem:
    """A place where the tool cannot follow the outline.

    Attributes
    ----------
    kind : str
        ``"tool-does-not-fit"`` — the outline bends toward the tool side on a radius smaller
        than the tool radius |d|, or has a sharp corner there (radius 0); the tool rounds it
        off. ``"vanishes"`` — a part of the outline (or all of it) has no offset at all: the
        shape is narrower there than the tool. ``"self-intersection"`` — the contour crosses
        itself there, so it has no one inside and outside; no offset is made.
        ``"offset-inaccurate"`` — a fitted piece still misses the exact offset by more than
        the tolerance after the deepest halving; ``error`` holds the measured distance.
    segment : int or None
        Segment of the contour where it is (None for a whole vanished contour).
    t : float or None
        Parameter on that segment.
    x, y : float
        Position on the original outline.
    radius : float or None
        Radius of curvature there (0.0 for a sharp corner).
    message : str
        One sentence for people.
    """

    kind: str
    segment: int | None
    t: float | None
    x: float
    y: float
    radius: float | None
    message: str
    error: float | None = None


@dataclass(frozen=True, eq=False)
class OffsetContour:
    """One contour of the offset result.

    Attributes
    ----------
    segments : list of ndarray, each (4, 2)
        Cubic Béziers within the tolerance of the exact offset (arcs at round joins).
    closed : bool
    polyline : ndarray, shape (P, 2)
        The same contour flattened within the tolerance (closed: first vertex not repeated).
    """

    segments: list[FloatArray]
    closed: bool
    polyline: FloatArray


@dataclass(frozen=True, eq=False)
class OffsetResult:
    """Offset contours and the problems found on the way."""

    contours: list[OffsetContour] = field(default_factory=list)
    problems: list[OffsetProblem] = field(default_factory=list)


# --------------------------------------------------------------------------------------------
# exact offset and curvature, vectorised
# --------------------------------------------------------------------------------------------
def _offset_points(coef: FloatArray, t: FloatArray, e: float):
    """Exact offset points O = B + e·n, unit tangents and 1 + e·κ at t (R, S)."""
    p, d1, d2 = _eval(coef, t)
    sp = np.hypot(d1[..., 0], d1[..., 1])
    safe = np.where(sp > 0, sp, 1.0)
    tx = d1[..., 0] / safe
    ty = d1[..., 1] / safe
    cr = d1[..., 0] * d2[..., 1] - d1[..., 1] * d2[..., 0]
    kappa = np.where(sp > 0, cr / safe**3, 0.0)
    o = p + e * np.stack([ty, -tx], axis=-1)
    return o, np.stack([tx, ty], axis=-1), 1.0 + e * kappa, kappa


# --------------------------------------------------------------------------------------------
# fitting cubics to the exact offset
# --------------------------------------------------------------------------------------------
def _fit_pieces(coef, seg, t0, t1, e, t_start, t_end, tolerance):
    """Fit one cubic per piece (seg, [t0, t1]); return (cubics, error) per piece.

    End points are exact offset points; end tangents are the offset's (the original's,
    reversed where 1 + eκ < 0); the two handle lengths minimise the squared distance to
    exact offset samples at chord-length parameters (a 2×2 linear solve per piece). The
    error is max_j |F(u_j) − O(τ_j)| with τ_j the foot of F(u_j) on the original piece
    (Newton's method on (F − B(τ))·B′(τ) = 0), i.e. the distance from the fit to the exact
    offset measured along the original's normals.
    """
    c = coef[seg]
    ns = _FIT_SAMPLES
    s = np.linspace(0.0, 1.0, ns + 1)
    tt = t0[:, None] + (t1 - t0)[:, None] * s
    o, tan, fac, _ = _offset_points(c, tt, e)
    # end tangents of the offset: the original's (one-sided at the ends), flipped in reverse
    ta = t_start
    tb = t_end
    sgn = np.sign(fac[:, ns // 2])
    sgn = np.where(sgn == 0, 1.0, sgn)
    ta = ta * sgn[:, None]
    tb = tb * sgn[:, None]
    p0 = o[:, 0]
    p3 = o[:, -1]
    chord = np.hypot(*np.diff(o, axis=1).transpose(2, 0, 1))
    cum = np.concatenate([np.zeros((len(o), 1)), np.cumsum(chord, axis=1)], axis=1)
    total = cum[:, -1:]
    u = np.divide(cum, total, out=np.tile(s, (len(o), 1)), where=total > 0)
    b0 = (1 - u) ** 3
    b1 = 3 * u * (1 - u) ** 2
    b2 = 3 * u**2 * (1 - u)
    b3 = u**3
    r = o - (b0 + b1)[..., None] * p0[:, None] - (b2 + b3)[..., None] * p3[:, None]
    va = b1[..., None] * ta[:, None]
    vb = -b2[..., None] * tb[:, None]
    a11 = np.sum(va * va, axis=(1, 2))
    a12 = np.sum(va * vb, axis=(1, 2))
    a22 = np.sum(vb * vb, axis=(1, 2))
    r1 = np.sum(va * r, axis=(1, 2))
    r2 = np.sum(vb * r, axis=(1, 2))
    det = a11 * a22 - a12 * a12
    ok = np.abs(det) > 1e-12 * (a11 * a22 + 1e-300)
    sdet = np.where(ok, det, 1.0)
    ha = np.where(ok, (r1 * a22 - r2 * a12) / sdet, np.nan)
    hb = np.where(ok, (a11 * r2 - a12 * r1) / sdet, np.nan)
    length = total[:, 0]
    bad = ~np.isfinite(ha) | ~np.isfinite(hb) | (ha < 0) | (hb < 0)
    bad |= (ha > 2 * length) | (hb > 2 * length)
    ha = np.where(bad, length / 3, ha)
    hb = np.where(bad, length / 3, hb)
    cubics = np.stack([p0, p0 + ha[:, None] * ta, p3 - hb[:, None] * tb, p3], axis=1)
    # error against the exact offset, at sample parameters between the fit's own
    ue = (np.arange(2 * ns) + 0.5) / (2 * ns)
    fc = _coef(cubics)
    f, _, _ = _eval(fc, np.tile(ue, (len(cubics), 1)))
    tau = t0[:, None] + (t1 - t0)[:, None] * ue
    lo = t0[:, None]
    hi = t1[:, None]
    for _ in range(6):
        bp, bd1, bd2 = _eval(c, tau)
        g = np.sum((f - bp) * bd1, axis=-1)
        gp = np.sum(bd1 * bd1, axis=-1) - np.sum((f - bp) * bd2, axis=-1)
        step = np.divide(g, gp, out=np.zeros_like(g), where=np.abs(gp) > 0)
        tau = np.clip(tau + step, lo, hi)
    oe, _, _, _ = _offset_points(c, tau, e)
    err = np.max(np.hypot(*(f - oe).transpose(2, 0, 1)), axis=1)
    return cubics, err


def _cusp_params(coef: FloatArray, e: float) -> list[FloatArray]:
    """Per segment: parameters in (0, 1) where 1 + e·κ changes sign (the offset's cusps)."""
    g = np.linspace(0.0, 1.0, _CUSP_GRID + 1)
    t = np.tile(g, (len(coef), 1))
    _, _, fac, _ = _offset_points(coef, t, e)
    out: list[FloatArray] = []
    rows, cols = np.nonzero(np.sign(fac[:, 1:]) * np.sign(fac[:, :-1]) < 0)
    lo = g[cols]
    hi = g[cols + 1]
    flo = fac[rows, cols]
    for _ in range(50):
        mid = 0.5 * (lo + hi)
        _, _, fm, _ = _offset_points(coef[rows], mid[:, None], e)
        fm = fm[:, 0]
        left = np.sign(fm) == np.sign(flo)
        lo = np.where(left, mid, lo)
        hi = np.where(left, hi, mid)
    roots = 0.5 * (lo + hi)
    for i in range(len(coef)):
        out.append(np.sort(roots[rows == i]))
    return out


def _arc_cubics(center: FloatArray, start: FloatArray, sweep: float, r: float, tol: float):
    """Cubic Béziers for the circular arc of radius r about center from start by sweep."""
    if r <= 0 or abs(sweep) < 1e-15:
        return []
    # radial error r·E·(φ/(π/2))⁶ ≤ tol with E the quarter-circle error
    per = (math.pi / 2) * (tol / (r * _QUARTER_ARC_ERROR)) ** (1 / 6) if tol > 0 else 0.1
    per = min(per, math.pi / 2)
    n = max(1, math.ceil(abs(sweep) / per))
    phi = sweep / n
    k = 4.0 / 3.0 * math.tan(phi / 4.0)
    a0 = math.atan2(start[1] - center[1], start[0] - center[0])
    out = []
    for i in range(n):
        a = a0 + i * phi
        b = a + phi
        p0 = center + r * np.array([math.cos(a), math.sin(a)])
        p3 = center + r * np.array([math.cos(b), math.sin(b)])
        d0 = np.array([-math.sin(a), math.cos(a)])
        d3 = np.array([-math.sin(b), math.cos(b)])
        out.append(np.array([p0, p0 + k * r * d0, p3 - k * r * d3, p3]))
    return out


def _line_cubic(a: FloatArray, b: FloatArray) -> FloatArray:
    return np.array([a, a + (b - a) / 3, a + 2 * (b - a) / 3, b])


# --------------------------------------------------------------------------------------------
# the offset
# --------------------------------------------------------------------------------------------
def offset_contour(  # noqa: C901 (older than the complexity gate; split when next changed)
    segments: Sequence[ArrayLike],
    closed: bool,
    distance: float,
    tolerance: float = DEFAULT_OFFSET_TOLERANCE,
) -> OffsetResult:
    """Offset one contour by ``distance``, as fitted cubics and as a polyline.

    Parameters
    ----------
    segments : sequence of array_like, each (K, 2)
        The contour's segments (lines, quadratics, cubics), end to end.
    closed : bool
        Closed contours are offset outward for ``distance > 0`` (the side away from the
        enclosed area, decided by the sign of the contour's signed area); open contours to
        the side of the normal (T_y, −T_x): right of the direction of travel in y-up axes,
        which is the left on an SVG page (y down).
    distance : float
        d; |d| is the tool radius. d = 0 returns the contour itself (as cubics).
    tolerance : float
        ε > 0: each fitted cubic is within ε/2 of the exact offset (measured at dense
        parameters) and the polyline within ε/2 of the cubics, so within ε of the offset.

    Returns
    -------
    OffsetResult
        ``contours`` — zero (the contour vanishes), one, or several (it splits where it is
        narrower than the tool) clean contours; ``problems`` — where the tool cannot fit.

    Raises
    ------
    InvalidGeometryError
        Bad control points, a non-finite distance, a tolerance not > 0.

    Notes
    -----
    1. Each segment is split where 1 + e·κ = 0 (e the signed offset along n, κ the signed
       curvature): there the offset has a cusp, and where 1 + e·κ < 0 the outline bends
       toward the tool on a radius 1/|κ| < |d| — reported as ``tool-does-not-fit``.
    2. Each piece gets a cubic fitted to the exact offset (see ``_fit_pieces``); pieces whose
       measured error exceeds ε are halved and refitted (Tiller & Hanson 1984).
    3. At corners turning away from the tool a round join (cubic circular arcs about the
       corner, radial error ≤ ε) is added; at corners turning toward it a sharp corner is
       reported and the two offsets are joined the long way round the corner on radius |d|
       (closed contours; the part of that arc on the wrong side is cut away in step 4, the
       part round a tip that still sticks out is kept) or through the corner point (open).
    0. A contour that crosses itself has no one inside and outside: it is reported as
       ``self-intersection`` (each crossing, found on the flattening with shapely and confirmed
       on the segments by :func:`outlinebench.geometry.intersect.intersections`) and not
       offset.
    2a. A piece still missing ε/2 after :data:`_MAX_FIT_DEPTH` halvings is kept and reported
       as ``offset-inaccurate`` with its measured error (never silently).
    4. The raw offset's self-intersections are found on its flattening (shapely noding) and
       refined on the cubics; pieces whose midpoint lies nearer than |d| − ε to the original
       (loops of concave parts, parts of the shape narrower than the tool), or for closed
       contours on the wrong side of it, are cut away.
       Each crossing is solved on both cubics together (Newton's method on A(ta) = B(tb)),
       so the kept pieces meet exactly there; stubs that the cut by distance leaves just
       beyond a crossing are dropped, and the pieces are joined through the crossings into
       contours — a closed contour gives closed contours only (several where it splits).
       Near-cusp loops that stay inside the tolerance band (they hold a piece where
       1 + e·κ < 0) are cut out of the walk (see ``_chain``).
    """
    if not math.isfinite(distance):
        raise InvalidGeometryError(f"the offset distance must be a finite number, got {distance}")
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InvalidGeometryError(f"the offset tolerance must be > 0, got {tolerance!r}")
    cub = _as_cubic_batch(list(segments))
    if len(cub) == 0:
        return OffsetResult()
    crossings = _self_crossings(cub, closed, tolerance)
    if crossings:
        return OffsetResult([], crossings)
    if distance == 0:
        poly = flatten_contours([(list(cub), closed)], tolerance)[0]
        return OffsetResult([OffsetContour(list(cub), closed, poly)], [])
    sign = 1.0
    if closed:
        area = signed_area(list(cub))
        sign = 1.0 if area >= 0 else -1.0
    e = sign * distance
    r = abs(distance)
    whole = tolerance
    # half the tolerance for the fit, half for the flattening: the polyline then stays within
    # the whole tolerance of the exact offset
    tolerance = 0.5 * whole
    coef = _coef(cub)
    problems: list[OffsetProblem] = []

    # 1. cusps of the offset, and where the tool does not fit (1 + eκ < 0)
    cusp_t = _cusp_params(coef, e)
    pieces_seg, pieces_t0, pieces_t1 = [], [], []
    for i, roots in enumerate(cusp_t):
        knots = np.concatenate([[0.0], roots, [1.0]])
        for a, b in zip(knots[:-1], knots[1:], strict=True):
            if b - a <= 0:
                continue
            pieces_seg.append(i)
            pieces_t0.append(a)
            pieces_t1.append(b)
            mid = np.array([[0.5 * (a + b)]])
            _, _, fac, _ = _offset_points(coef[i : i + 1], mid, e)
            if fac[0, 0] < 0:
                # smallest radius in the piece: largest |κ|
                ts = np.linspace(a, b, 33)[None]
                pts, _, _, kap = _offset_points(coef[i : i + 1], ts, e)
                j = int(np.argmax(np.abs(kap[0])))
                tj = float(ts[0, j])
                p = _point(cub[i], tj)
                rad = 1.0 / abs(kap[0, j]) if kap[0, j] != 0 else 0.0
                problems.append(
                    OffsetProblem(
                        "tool-does-not-fit",
                        i,
                        tj,
                        float(p[0]),
                        float(p[1]),
                        float(rad),
                        f"segment {i} bends toward the tool on radius {rad:.4g}, smaller than "
                        f"the tool radius {r:.4g}: the tool cannot follow it",
                    )
                )

    seg = np.array(pieces_seg, dtype=np.intp)
    t0 = np.array(pieces_t0)
    t1 = np.array(pieces_t1)

    # 2. fit, halving pieces that miss the tolerance
    starts, ends = _piece_tangents(cub, coef, seg, t0, t1)
    fitted_seg, fitted_t0, fitted, fitted_rev = [], [], [], []
    for depth in range(_MAX_FIT_DEPTH + 1):
        cubics, err = _fit_pieces(coef, seg, t0, t1, e, starts, ends, tolerance)
        good = (err <= tolerance) | (depth == _MAX_FIT_DEPTH)
        if depth == _MAX_FIT_DEPTH and not np.all(err <= tolerance):
            problems.extend(_inaccurate(cub, seg, t0, t1, err, tolerance, whole))
        fitted_seg.append(seg[good])
        fitted_t0.append(t0[good])
        fitted.append(cubics[good])
        # pieces where the offset runs backwards (1 + eκ < 0, between two cusps)
        _, _, fac_mid, _ = _offset_points(coef[seg[good]], (0.5 * (t0 + t1))[good][:, None], e)
        fitted_rev.append(fac_mid[:, 0] < 0)
        if np.all(good):
            break
        seg, t0, t1 = seg[~good], t0[~good], t1[~good]
        tm = 0.5 * (t0 + t1)
        seg = np.repeat(seg, 2)
        t0, t1 = np.stack([t0, tm], 1).ravel(), np.stack([tm, t1], 1).ravel()
        starts, ends = _piece_tangents(cub, coef, seg, t0, t1)
    fs = np.concatenate(fitted_seg)
    ft = np.concatenate(fitted_t0)
    fc = np.concatenate(fitted)
    order = np.lexsort((ft, fs))
    fs, fc = fs[order], fc[order]
    frev = np.concatenate(fitted_rev)[order]

    # 3. joins
    raw: list[FloatArray] = []
    source: list[int] = []  # original segment of each raw piece; -1 for join pieces
    rev: list[bool] = []  # the raw piece runs backwards (1 + eκ < 0)
    n = len(cub)
    bounds = np.searchsorted(fs, np.arange(n + 1))
    joins = range(n if closed else n - 1)
    for i in range(n):
        raw.extend(fc[bounds[i] : bounds[i + 1]])
        source.extend([i] * int(bounds[i + 1] - bounds[i]))
        rev.extend(frev[bounds[i] : bounds[i + 1]].tolist())
        if i in joins or (closed and i == n - 1):
            j = (i + 1) % n
            corner = cub[i, 3]
            t_in = end_tangents(cub[i])[1]
            t_out = end_tangents(cub[j])[0]
            turn = math.atan2(
                t_in[0] * t_out[1] - t_in[1] * t_out[0], t_in[0] * t_out[0] + t_in[1] * t_out[1]
            )
            a = raw[-1][3]
            b = fc[bounds[j]][0]
            if abs(turn) <= _SMOOTH_ANGLE or np.hypot(*(a - b)) <= tolerance * 1e-3:
                continue
            if e * turn > 0:
                # turns away from the tool side: round join about the corner
                arc = _arc_cubics(corner, a, _sweep(corner, a, b, turn), r, tolerance)
                if arc:
                    arc[0][0] = a
                    arc[-1][3] = b
                raw.extend(arc)
                source.extend([-1] * len(arc))
                rev.extend([False] * len(arc))
            else:
                # turns toward the tool. A closed contour gets the long way round the corner
                # (radius |d|): where the corner still sticks out (a spike whose next segment
                # curls back) part of that arc is the offset; the rest lies inside (outward
                # offset) or outside (inward) and is cut away by the side test of the trim.
                # An open contour has no sides: the offsets are joined through the corner.
                arc = (
                    _arc_cubics(corner, a, _sweep(corner, a, b, -turn), r, tolerance)
                    if closed
                    else []
                )
                if arc:
                    arc[0][0] = a
                    arc[-1][3] = b
                else:
                    arc = [_line_cubic(a, corner), _line_cubic(corner, b)]
                raw.extend(arc)
                source.extend([-1] * len(arc))
                rev.extend([False] * len(arc))
                problems.append(
                    OffsetProblem(
                        "tool-does-not-fit",
                        i,
                        1.0,
                        float(corner[0]),
                        float(corner[1]),
                        0.0,
                        f"sharp corner at the end of segment {i} turns toward the tool: "
                        f"the tool leaves a radius of {r:.4g} there",
                    )
                )
    raw_arr = np.array(raw)
    # 4. trim loops and parts narrower than the tool
    chains, removed = _trim(
        raw_arr, np.array(rev, dtype=bool), closed, cub, r, tolerance, inward=distance < 0
    )
    contours = []
    polys = flatten_contours([(ch, cl) for ch, cl in chains], tolerance) if chains else []
    for (ch, cl), poly in zip(chains, polys, strict=True):
        contours.append(OffsetContour(ch, cl, poly))
    problems.extend(_vanished(removed, cub, problems, r, chains))
    return OffsetResult(contours, problems)


def _self_crossings(cub: FloatArray, closed: bool, tolerance: float) -> list[OffsetProblem]:
    """Places where the contour crosses or touches itself away from its joins.

    Candidates are pairs of crossing chords of the flattened contour (shapely STRtree,
    neighbouring chords excluded); each candidate pair of segments is confirmed exactly with
    :func:`intersections` (or :func:`self_intersections` within one segment), leaving out the
    shared end point of consecutive segments.
    """
    import shapely

    polys = flatten_contours([([c], False) for c in cub], tolerance)
    starts = np.vstack([p[:-1] for p in polys])
    ends = np.vstack([p[1:] for p in polys])
    owner = np.concatenate([np.full(len(p) - 1, i) for i, p in enumerate(polys)])
    if len(starts) < 2:
        return []
    lines = shapely.linestrings(np.stack([starts, ends], axis=1))
    tree = shapely.STRtree(lines)
    a, b = tree.query(lines, predicate="intersects")
    m = len(starts)
    keep = (a < b) & (b != a + 1) & ~(closed & (a == 0) & (b == m - 1))
    pairs = sorted({(int(owner[i]), int(owner[j])) for i, j in zip(a[keep], b[keep], strict=True)})
    # a join is shared by consecutive segments, also across segments shrunk to a point
    point_like = np.all(cub == cub[:, :1], axis=(1, 2))
    # solid[k]: segments before k that are not point-like (all point-like in [i, j) ⇔ equal)
    solid = np.concatenate([[0], np.cumsum(~point_like)])
    n_seg = len(cub)

    def all_point_like(i: int, j: int) -> bool:
        i, j = max(0, min(i, n_seg)), max(0, min(j, n_seg))
        return j <= i or solid[j] == solid[i]

    def joined(i: int, j: int, ta: float, tb: float) -> bool:
        end_i, start_j = ta > 1 - 1e-9, tb < 1e-9
        if end_i and start_j and all_point_like(i + 1, j):
            return True
        # the end of the last segment meets the start of the first: the closing join (an open
        # contour drawn back to its start touches itself there only)
        return ta < 1e-9 and tb > 1 - 1e-9 and all_point_like(j + 1, n_seg) and all_point_like(0, i)

    found: list[tuple[int, float, FloatArray]] = []
    # one crossing is enough to refuse the offset: candidates are confirmed until
    # FINDINGS_PER_KIND crossings are found, and the rest are counted in one more finding
    unexamined = 0
    for n_pair, (i, j) in enumerate(pairs):
        if len(found) >= FINDINGS_PER_KIND:
            unexamined = len(pairs) - n_pair
            break
        if i == j:
            for t1, _ in self_intersections(cub[i]):
                found.append((i, float(t1), _point(cub[i], float(t1))))
            continue
        if point_like[i] or point_like[j]:
            continue
        for ta, tb in intersections(cub[i], cub[j]):
            if not joined(i, j, float(ta), float(tb)):
                found.append((i, float(ta), _point(cub[i], float(ta))))
    out: list[OffsetProblem] = []
    # places already reported, in a hash grid of cell `tolerance`: one within the tolerance
    # lies in the 3 × 3 cells around (linear instead of quadratic in the crossings)
    grid: dict[tuple[float, float], list[FloatArray]] = {}
    for i, t, p in found:
        with np.errstate(over="ignore"):
            kx, ky = (float(v) for v in np.floor(p / tolerance))
        near = (
            q
            for dx in (-1.0, 0.0, 1.0)
            for dy in (-1.0, 0.0, 1.0)
            for q in grid.get((kx + dx, ky + dy), ())
        )
        if any(np.hypot(*(p - q)) <= tolerance for q in near):
            continue
        grid.setdefault((kx, ky), []).append(p)
        out.append(
            OffsetProblem(
                "self-intersection",
                i,
                t,
                float(p[0]),
                float(p[1]),
                None,
                f"the contour crosses itself on segment {i} at ({p[0]:.6g}, {p[1]:.6g}): it "
                "has no one inside and outside, so it is not offset; remove the crossing first",
            )
        )
    if unexamined and out:
        p0 = out[0]
        out.append(
            OffsetProblem(
                "self-intersection",
                p0.segment,
                p0.t,
                p0.x,
                p0.y,
                None,
                f"{unexamined} more candidate crossings of the contour with itself were not "
                f"examined (at most {FINDINGS_PER_KIND} crossings are listed): it is not offset",
            )
        )
    return out


def _inaccurate(cub, seg, t0, t1, err, tolerance: float, whole: float) -> list[OffsetProblem]:
    """One ``offset-inaccurate`` problem per segment whose deepest pieces miss the fit."""
    out: list[OffsetProblem] = []
    miss = ~(err <= tolerance)  # NaN (a failed fit) counts as missing
    for i in np.unique(seg[miss]):
        rows = np.nonzero(miss & (seg == i))[0]
        k = rows[int(np.argmax(err[rows]))]
        tm = 0.5 * float(t0[k] + t1[k])
        p = _point(cub[i], tm)
        worst = float(err[k])
        out.append(
            OffsetProblem(
                "offset-inaccurate",
                int(i),
                tm,
                float(p[0]),
                float(p[1]),
                None,
                f"after {_MAX_FIT_DEPTH} halvings the offset of segment {i} still misses the "
                f"exact offset by up to {worst + tolerance:.4g} (fit {worst:.4g} plus "
                f"flattening {tolerance:.4g}; tolerance {whole:.4g}): check the result there",
                worst + tolerance,
            )
        )
    return out


def _point(c: FloatArray, t: float) -> FloatArray:
    p, _, _ = _eval(_coef(c[None]), np.array([[t]]))
    return p[0, 0]


def _sweep(center, a, b, turn) -> float:
    """Signed angle from a to b about center, with the sign of the corner's turn."""
    va = a - center
    vb = b - center
    ang = math.atan2(va[0] * vb[1] - va[1] * vb[0], va[0] * vb[0] + va[1] * vb[1])
    if ang * turn < 0:
        ang += math.copysign(2 * math.pi, turn)
    return ang


def _piece_tangents(cub, coef, seg, t0, t1):
    """Unit tangents of the original at each piece's ends (one-sided at segment ends)."""
    _, d0, _ = _eval(coef[seg], t0[:, None])
    _, d1, _ = _eval(coef[seg], t1[:, None])
    d0 = d0[:, 0]
    d1 = d1[:, 0]
    out = []
    for d, tt, end in ((d0, t0, 0), (d1, t1, 1)):
        n = np.hypot(d[:, 0], d[:, 1])
        small = n <= 1e-12 * (1 + np.max(np.abs(cub[seg]), axis=(1, 2)))
        res = np.divide(d, n[:, None], out=np.zeros_like(d), where=n[:, None] > 0)
        for k in np.nonzero(small)[0]:
            if tt[k] in (0.0, 1.0):
                res[k] = end_tangents(cub[seg[k]])[0 if tt[k] == 0.0 else 1]
            else:
                _, _, d2 = _eval(coef[seg[k] : seg[k] + 1], np.array([[tt[k]]]))
                v = d2[0, 0] * (1 if end == 0 else -1)
                nv = np.hypot(*v)
                res[k] = v / nv if nv > 0 else np.array([1.0, 0.0])
        out.append(res)
    return out[0], out[1]


def _vanished(removed: FloatArray, orig: FloatArray, problems, r: float, chains):
    """Removed offset parts not explained by a reported tight spot: the shape is too narrow."""
    out: list[OffsetProblem] = []
    if not chains:
        p = orig[0, 0]
        out.append(
            OffsetProblem(
                "vanishes",
                None,
                None,
                float(p[0]),
                float(p[1]),
                None,
                f"the whole contour vanishes: it is nowhere wider than the tool (radius {r:.4g})",
            )
        )
        return out
    if len(removed) == 0:
        return out
    from scipy.spatial import cKDTree

    known = np.array([[q.x, q.y] for q in problems]) if problems else np.zeros((0, 2))
    mids = 0.125 * (removed[:, 0] + 3 * removed[:, 1] + 3 * removed[:, 2] + removed[:, 3])
    if len(known):
        # distance to the nearest reported place (k-d tree: exact Euclidean nearest)
        d, _ = cKDTree(known).query(mids)
        unexplained = mids[d > 3 * r]
    else:
        unexplained = mids
    if len(unexplained) == 0:
        return out
    # the original sampled once at 65 points a segment; nearest sample by a k-d tree
    ts = np.linspace(0, 1, 65)
    pts, _, _ = _eval(_coef(orig), np.tile(ts, (len(orig), 1)))
    samples = cKDTree(pts.reshape(-1, 2))
    # reported places in a hash grid of cell 2r: one within 2r lies in the 3 × 3 cells around
    cell = 2 * r
    grid: dict[tuple[float, float], list[FloatArray]] = {}
    for m in unexplained:
        with np.errstate(over="ignore"):
            kx, ky = (float(v) for v in np.floor(m / cell))
        if any(
            np.hypot(*(m - q)) < 2 * r
            for dx in (-1, 0, 1)
            for dy in (-1, 0, 1)
            for q in grid.get((kx + dx, ky + dy), ())
        ):
            continue
        grid.setdefault((kx, ky), []).append(m)
        # nearest point of the original
        _, flat_k = samples.query(m)
        si, ti = divmod(int(flat_k), len(ts))
        p = pts[si, ti]
        out.append(
            OffsetProblem(
                "vanishes",
                int(si),
                float(ts[ti]),
                float(p[0]),
                float(p[1]),
                None,
                f"near segment {si} the shape is narrower than the tool (diameter "
                f"{2 * r:.4g}): this part of the offset vanishes",
            )
        )
    return out


def offset_contours(
    contours: Sequence,
    distance: float,
    tolerance: float = DEFAULT_OFFSET_TOLERANCE,
) -> list[OffsetResult]:
    """Offset several contours, each on its own (see :func:`offset_contour`).

    Parameters
    ----------
    contours : sequence
        Objects with ``segments`` and ``closed`` (model contours) or pairs
        ``(segments, closed)``.
    distance, tolerance : float
        As for :func:`offset_contour`.

    Returns
    -------
    list of OffsetResult
        One per input contour, in order.
    """
    out = []
    for c in contours:
        segs, cl = (c.segments, c.closed) if hasattr(c, "segments") else c
        out.append(offset_contour(segs, bool(cl), distance, tolerance))
    return out


# --------------------------------------------------------------------------------------------
# offsets of whole regions
# --------------------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class RegionFinding:
    """Something found while offsetting a region, placed on the input outline.

    Attributes
    ----------
    kind : str
        ``"vanishes"`` — the material (shrinking) or the gap (growing) is narrower than the
        tool diameter there, so part of the toolpath vanishes or two toolpaths merge; ``value``
        is the width measured across it. ``"tool-does-not-fit"`` — the tool rounds an inside
        corner or a bend of smaller radius than |d|: one summary per region (``count``
        places, ``value`` the smallest radius), plus one finding per bend (radius > 0)
        where the material the tool cannot reach is deeper than the tolerance (``depth``).
        ``"offset-inaccurate"`` and ``"self-intersection"`` — as :class:`OffsetProblem`;
        ``"offset-failed"`` — a contour's offset did not close, so no toolpath was made
        from it (never silent: :func:`verify_toolpaths` also refuses the result).
    contour, segment, t : int, int, float or None
        Place on the input (contour and segment indices of the ``contours`` given; None
        where the place is not on one input segment, such as a closing line).
    x, y : float
        Position (user units).
    value : float or None
        Width (vanishes), radius (tool-does-not-fit), error (offset-inaccurate).
    count : int
        Places summarised by this finding (1 for a single place).
    depth : float or None
        For tool-does-not-fit: distance from the outline to the toolpath less |d| — how
        far the tool stays from the drawn outline there.
    message : str
        One sentence for people.
    """

    kind: str
    contour: int | None
    segment: int | None
    t: float | None
    x: float
    y: float
    value: float | None
    message: str
    count: int = 1
    depth: float | None = None


@dataclass(frozen=True, eq=False)
class RegionOffset:
    """Toolpaths of a region offset, findings and per-stage times.

    Attributes
    ----------
    contours : list of OffsetContour
        Closed toolpaths that never cross one another: outer ones counter-clockwise in y-up
        axes, holes clockwise; fitted cubics and polylines within the tolerance.
    findings : list of RegionFinding
    region : BooleanResult
        The input region without overlaps (the contours the offset started from).
    times : dict of str to float
        Seconds per stage: ``region`` (overlap removal), ``offset`` (per-contour fitting and
        trimming), ``combine`` (the positive-winding union of the offsets), ``flatten``,
        ``findings``.
    """

    contours: list[OffsetContour]
    findings: list[RegionFinding]
    region: object
    times: dict[str, float]


@dataclass(frozen=True, slots=True)
class ToolpathViolation:
    """A reason a set of toolpaths must not be written.

    ``kind`` is ``"toolpath-crosses-itself"``, ``"toolpaths-cross"``, ``"wrong-distance"``
    (``value`` the distance from the region's boundary, which should be |d| ± ε),
    ``"wrong-side"`` or ``"toolpath-missing"`` (``value`` the area where the toolpaths and an
    independent buffer of the region disagree).
    """

    kind: str
    x: float
    y: float
    value: float | None
    message: str


@dataclass(frozen=True, slots=True)
class OffsetOverlap:
    """Offsets of two separate outlines that overlap (neighbouring letters grown into each
    other): outline indices ``first`` < ``second`` as given, a point inside the overlap and
    its area. ``unlisted`` (on the last one listed only) counts the pairs past the caps of
    :mod:`outlinebench.limits`: overlapping pairs not listed and candidate pairs not
    examined."""

    first: int
    second: int
    x: float
    y: float
    area: float
    message: str
    unlisted: int = 0


def _boolean_tolerance(tolerance: float) -> float:
    return min(1e-4, tolerance * 1e-2)


def _map_place(region, ci: int, seg: int | None, t: float | None):
    """(contour, segment, t) on the input for a place on region contour ``ci``."""
    if seg is None:
        return None, None, None
    src = region.contours[ci].sources[seg]
    if src.segment < 0:
        return src.contour, None, None
    tt = None if t is None else src.t0 + float(t) * (src.t1 - src.t0)
    return src.contour, src.segment, tt


def _width_at(p: FloatArray, boundary, inward: FloatArray, reach: float) -> float | None:
    """Distance from p on the boundary along ``inward`` to the next boundary crossing."""
    import shapely

    ray = shapely.LineString([p + inward * reach * 1e-6, p + inward * reach])
    hit = shapely.intersection(ray, boundary)
    if hit.is_empty:
        return None
    pts = shapely.get_coordinates(hit)
    return float(np.min(np.hypot(*(pts - p).T)))


def offset_region(  # noqa: C901 (older than the complexity gate; split when next changed)
    contours: Sequence,
    distance: float,
    *,
    fill_rule: str = "nonzero",
    tolerance: float = DEFAULT_OFFSET_TOLERANCE,
) -> RegionOffset:
    """Offset the filled region of one outline (outer contours and holes together).

    Parameters
    ----------
    contours : sequence
        The outline's contours: objects with ``segments`` and ``closed`` or pairs
        ``(segments, closed)`` (open ones are filled as if closed, W3C SVG 1.1 §11.3).
    distance : float
        d: the region grows by d > 0 (outer contours move out, holes in) and shrinks for
        d < 0; |d| is the tool radius.
    fill_rule : {"nonzero", "evenodd"}
        The outline's fill rule, which says which contours are holes.
    tolerance : float
        ε: every toolpath point is within ε of the exact offset of the region.

    Returns
    -------
    RegionOffset
        Toolpaths that never cross one another, findings placed on the input, per-stage
        times.

    Raises
    ------
    InvalidGeometryError
        Bad control points, a non-finite distance, a tolerance not > 0, an unknown fill rule.

    Notes
    -----
    The offset of a region R by a disc of radius r is R ⊕ B_r (d > 0) or R ⊖ B_r (d < 0)
    (Minkowski sum and difference; J. Serra, *Image Analysis and Mathematical Morphology*,
    1982, ch. II). Its boundary lies on the offsets of R's boundary, so:

    1. R is rewritten without overlaps (:func:`~outlinebench.geometry.boolean.remove_overlaps`):
       outer contours counter-clockwise, holes clockwise, winding 1 inside.
    2. Each contour is offset on its own (:func:`offset_contour`) to its right, away from R
       for d > 0 (outer contours out, holes in) and into R for d < 0.
    3. Where offsets of different contours meet, their pieces are merged or cut by the
       boolean engine: the result is where the offsets' winding numbers sum to > 0 (each
       offset keeps its contour's orientation; a hole grown past the shrunk outer contour
       has winding −1 there, and overlapping grown outer contours add up).
    4. Findings: where offsets of two contours met (crossed, or one was swallowed whole by
       the union), the material (d < 0) or gap (d > 0) between them is narrower than 2|d|:
       ``vanishes`` at the narrowest place between the two contours, with that width; a
       contour whose offset vanishes or splits is reported with the width across the
       region along the inward normal there. Inside corners and
       tight bends (``tool-does-not-fit`` of :func:`offset_contour`) form one summary with
       the count and smallest radius; a bend (radius > 0) is also reported on its own where
       its depth — distance from the outline to the toolpaths minus |d| — exceeds ε.
    """
    import time

    import shapely

    from outlinebench.geometry.boolean import remove_overlaps

    if not math.isfinite(distance):
        raise InvalidGeometryError(f"the offset distance must be a finite number, got {distance}")
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InvalidGeometryError(f"the offset tolerance must be > 0, got {tolerance!r}")
    if fill_rule not in ("nonzero", "evenodd"):
        raise InvalidGeometryError(
            f"unknown fill rule {fill_rule!r}; expected one of nonzero, evenodd"
        )
    times: dict[str, float] = {}
    btol = _boolean_tolerance(tolerance)
    t0 = time.perf_counter()
    region = remove_overlaps(contours, fill_rule=fill_rule, tolerance=btol)
    times["region"] = time.perf_counter() - t0
    r = abs(distance)
    findings: list[RegionFinding] = []
    if distance == 0 or not region.contours:
        t0 = time.perf_counter()
        out = [
            OffsetContour(
                list(c.segments), True, flatten_contours([(list(c.segments), True)], tolerance)[0]
            )
            for c in region.contours
        ]
        times["flatten"] = time.perf_counter() - t0
        return RegionOffset(out, [], region, times)

    # 2. each contour to its right (away from the region for d > 0)
    t0 = time.perf_counter()
    per: list[OffsetResult] = []
    for c in region.contours:
        d_here = distance if c.area > 0 else -distance
        per.append(offset_contour(list(c.segments), True, d_here, tolerance))
    times["offset"] = time.perf_counter() - t0

    # 3. combine where offsets of different contours meet
    t0 = time.perf_counter()
    rings = [
        (ci, oc)
        for ci, res in enumerate(per)
        for oc in res.contours
        if oc.closed and len(oc.polyline) > 2
    ]
    lines = [shapely.LinearRing(oc.polyline) for _, oc in rings]
    ia, ib = (
        shapely.STRtree(lines).query(lines, predicate="intersects")
        if lines
        else (np.empty(0, dtype=int), np.empty(0, dtype=int))
    )
    meet = [(int(a), int(b)) for a, b in zip(ia, ib, strict=True) if a < b]
    if not meet and rings:
        # no crossings: the offsets already bound the result if every counter-clockwise
        # ring lies where the others wind 0 and every clockwise one where they wind 1
        # (a grown dot swallowed by a neighbour's offset, or a hole's offset outside the
        # shrunk outer contour, are not)
        areas = np.array([signed_area(oc.segments) for _, oc in rings])
        shapes = [shapely.Polygon(oc.polyline) for _, oc in rings]
        firsts = shapely.points(np.array([oc.polyline[0] for _, oc in rings]))
        pi, si = shapely.STRtree(shapes).query(firsts, predicate="within")
        wind = np.zeros(len(rings))
        for a, b in zip(pi.tolist(), si.tolist(), strict=True):
            if a != b:
                wind[a] += 1.0 if areas[b] > 0 else -1.0
        consistent = bool(np.all(np.where(areas > 0, wind == 0, wind == 1)))
    else:
        consistent = not rings
    if not consistent:
        combined = remove_overlaps(
            [(oc.segments, True) for _, oc in rings], fill_rule="positive", tolerance=btol
        )
        paths = [list(c.segments) for c in combined.contours]
        used = {src.contour for c in combined.contours for src in c.sources}
        dropped = [k for k in range(len(rings)) if k not in used]
    else:
        dropped = []
        paths = [oc.segments for _, oc in rings]
    times["combine"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    polys = flatten_contours([(p, True) for p in paths], 0.5 * tolerance) if paths else []
    out = [OffsetContour(p, True, poly) for p, poly in zip(paths, polys, strict=True)]
    times["flatten"] = time.perf_counter() - t0

    # 4. findings
    t0 = time.perf_counter()
    orig_polys = flatten_contours(
        [(list(c.segments), True) for c in region.contours], tolerance / 4
    )
    orig_rings = [shapely.LinearRing(p) for p in orig_polys]
    boundary = shapely.MultiLineString([np.vstack([p, p[:1]]) for p in orig_polys])
    seen_pairs: set[tuple[int, int]] = set()
    # an offset ring swallowed whole by another (no crossing): the material (or gap)
    # between its contour and the nearest other contour is narrower than the tool
    for k in dropped:
        ck = rings[k][0]
        others = [rings[j][0] for j in range(len(rings)) if rings[j][0] != ck]
        if others:
            dist = [orig_rings[ck].distance(orig_rings[j]) for j in others]
            meet.append(
                (
                    k,
                    next(
                        j for j in range(len(rings)) if rings[j][0] == others[int(np.argmin(dist))]
                    ),
                )
            )
    for a, b in meet:
        ca, cb = rings[a][0], rings[b][0]
        if ca == cb or (min(ca, cb), max(ca, cb)) in seen_pairs:
            continue
        seen_pairs.add((min(ca, cb), max(ca, cb)))
        line = shapely.shortest_line(orig_rings[ca], orig_rings[cb])
        (x0, y0), (x1, y1) = shapely.get_coordinates(line)
        width = float(math.hypot(x1 - x0, y1 - y0))
        what = "material" if distance < 0 else "gap"
        src_a = region.contours[ca].sources[0].contour
        src_b = region.contours[cb].sources[0].contour
        findings.append(
            RegionFinding(
                "vanishes",
                src_a,
                None,
                None,
                0.5 * (x0 + x1),
                0.5 * (y0 + y1),
                width,
                f"the {what} between contours {src_a} and {src_b} is {width:.4g} wide, "
                f"narrower than the tool ({2 * r:.4g}): the toolpath vanishes there",
            )
        )
    fits: list[RegionFinding] = []
    all_paths = (
        shapely.MultiLineString([np.vstack([o.polyline, o.polyline[:1]]) for o in out])
        if out
        else None
    )
    for ci, res in enumerate(per):
        c = region.contours[ci]
        for oc in res.contours:
            if not oc.closed:
                # the per-contour offset of a closed contour came out open: no toolpath is
                # made from it (verify_toolpaths then reports the missing part)
                x, y = (float(v) for v in oc.segments[0][0])
                findings.append(
                    RegionFinding(
                        "offset-failed",
                        c.sources[0].contour,
                        None,
                        None,
                        x,
                        y,
                        None,
                        f"the offset of contour {c.sources[0].contour} did not close near "
                        f"({x:.6g}, {y:.6g}); no toolpath is made from it",
                    )
                )
                break
        for p in res.problems:
            cont, seg, tt = _map_place(region, ci, p.segment, p.t)
            if cont is None:
                cont = c.sources[0].contour
            if p.kind == "vanishes":
                width = None
                if p.segment is None and len(orig_polys[ci]) > 2:
                    # the whole contour: its widest place is the largest circle inside it
                    # (shapely's maximum inscribed circle of the flattened contour)
                    mic = shapely.maximum_inscribed_circle(
                        shapely.Polygon(orig_polys[ci]), tolerance / 4
                    )
                    (cx, cy), (ex, ey) = shapely.get_coordinates(mic)
                    width = 2.0 * float(math.hypot(ex - cx, ey - cy))
                    what = "hole" if c.area < 0 else "contour"
                    findings.append(
                        RegionFinding(
                            "vanishes",
                            cont,
                            None,
                            None,
                            float(cx),
                            float(cy),
                            width,
                            f"the whole {what} vanishes: it is nowhere wider than the tool "
                            f"({2 * r:.4g}); its widest place is {width:.4g} across",
                        )
                    )
                    continue
                if p.segment is not None:
                    seg_pts = np.asarray(c.segments[p.segment], dtype=float)
                    cub = _as_cubic_batch([seg_pts])[0]
                    _, tan, _, _ = _offset_points(_coef(cub[None]), np.array([[p.t]]), 1.0)
                    tx, ty = tan[0, 0]
                    inward = np.array([-ty, tx])  # left of travel: into the region
                    width = _width_at(np.array([p.x, p.y]), boundary, inward, 4 * r + 1.0)
                msg = (
                    p.message
                    if width is None
                    else (f"{p.message} (width {width:.4g} across the region there)")
                )
                findings.append(RegionFinding("vanishes", cont, seg, tt, p.x, p.y, width, msg))
            elif p.kind == "tool-does-not-fit":
                depth = None
                if all_paths is not None:
                    depth = float(shapely.distance(shapely.Point(p.x, p.y), all_paths)) - r
                fits.append(
                    RegionFinding(
                        "tool-does-not-fit", cont, seg, tt, p.x, p.y, p.radius, p.message, 1, depth
                    )
                )
            else:
                findings.append(RegionFinding(p.kind, cont, seg, tt, p.x, p.y, p.error, p.message))
    if fits:
        smallest = min(fits, key=lambda f: f.value if f.value is not None else math.inf)
        deepest = max((f.depth for f in fits if f.depth is not None), default=None)
        findings.append(
            RegionFinding(
                "tool-does-not-fit",
                smallest.contour,
                smallest.segment,
                smallest.t,
                smallest.x,
                smallest.y,
                smallest.value,
                f"the tool (radius {r:.4g}) rounds {len(fits)} inside corner(s) or bend(s); "
                f"smallest radius {smallest.value:.4g}"
                + (f", the tool stays up to {deepest:.4g} from the outline" if deepest else ""),
                len(fits),
                deepest,
            )
        )
        for f in fits:
            if f.value and f.depth is not None and f.depth > tolerance:
                findings.append(f)
    times["findings"] = time.perf_counter() - t0
    return RegionOffset(out, findings, region, times)


def verify_toolpaths(
    region_contours: Sequence,
    toolpaths: Sequence,
    distance: float,
    *,
    tolerance: float = DEFAULT_OFFSET_TOLERANCE,
) -> list[ToolpathViolation]:
    """Check toolpaths against the region they were offset from, before they are cut.

    Parameters
    ----------
    region_contours : sequence
        Closed contours of the region that do not cross (``RegionOffset.region.contours``
        or any objects with ``segments``); the region is their even-odd fill.
    toolpaths : sequence
        Objects with ``polyline`` (P, 2) closed rings (``RegionOffset.contours``) or arrays.
    distance : float
        The offset d the toolpaths are meant to have.
    tolerance : float
        ε: the allowed distance error.

    Returns
    -------
    list of ToolpathViolation
        Empty when the toolpaths may be written.

    Notes
    -----
    Independent of the offset code, with shapely on flattenings:

    - every ring is simple (``LinearRing.is_simple``), and two rings meet nowhere except at
      common vertices (points where the boolean engine's contours touch);
    - every vertex and chord midpoint lies at |d| ± ε from the region's boundary (flattened
      within ε/10), on the outside of the region for d > 0 and inside for d < 0;
    - the toolpaths' region (even-odd) and shapely's round buffer of the flattened region
      (arcs within ε/10) differ by an area of at most ε × their perimeter, so no part is
      missing or extra (where the region vanishes, the buffer has nothing either).
    """
    import shapely

    r = abs(distance)
    out: list[ToolpathViolation] = []
    segs = [
        (list(c.segments), True) if hasattr(c, "segments") else (list(c[0]), True)
        for c in region_contours
    ]
    ref_polys = flatten_contours(segs, tolerance / 10) if segs else []
    region = None
    for p in ref_polys:
        if len(p) > 2:
            poly = shapely.Polygon(p)
            region = poly if region is None else region.symmetric_difference(poly)
    rings = [np.asarray(getattr(t, "polyline", t), dtype=float) for t in toolpaths]
    rings = [p for p in rings if len(p) > 2]
    if region is None:
        if rings:
            p = rings[0][0]
            out.append(
                ToolpathViolation(
                    "wrong-side", float(p[0]), float(p[1]), None, "toolpaths for an empty region"
                )
            )
        return out
    boundary = shapely.MultiLineString([np.vstack([p, p[:1]]) for p in ref_polys if len(p) > 2])
    lr = [shapely.LinearRing(p) for p in rings]
    for ring, p in zip(lr, rings, strict=True):
        if not ring.is_simple:
            q = shapely.get_coordinates(shapely.node(ring))
            x, y = q[0] if len(q) else p[0]
            out.append(
                ToolpathViolation(
                    "toolpath-crosses-itself",
                    float(x),
                    float(y),
                    None,
                    f"a toolpath crosses itself near ({x:.6g}, {y:.6g})",
                )
            )
    if lr:
        tree = shapely.STRtree(lr)
        ia, ib = tree.query(lr, predicate="intersects")
        for a, b in zip(ia.tolist(), ib.tolist(), strict=True):
            if a >= b:
                continue
            hit = shapely.get_coordinates(shapely.intersection(lr[a], lr[b]))
            va = {tuple(v) for v in rings[a]}
            vb = {tuple(v) for v in rings[b]}
            bad = [h for h in hit if not (tuple(h) in va and tuple(h) in vb)]
            if bad:
                x, y = bad[0]
                out.append(
                    ToolpathViolation(
                        "toolpaths-cross",
                        float(x),
                        float(y),
                        None,
                        f"two toolpaths cross near ({x:.6g}, {y:.6g})",
                    )
                )
    slack = tolerance * 1.1  # ε plus the reference's flattening ε/10
    for p in rings:
        q = np.vstack([p, 0.5 * (p + np.roll(p, -1, axis=0))])
        dist = shapely.distance(shapely.points(q), boundary)
        err = np.abs(dist - r)
        k = int(np.argmax(err))
        if err[k] > slack:
            out.append(
                ToolpathViolation(
                    "wrong-distance",
                    float(q[k, 0]),
                    float(q[k, 1]),
                    float(dist[k]),
                    f"a toolpath point at ({q[k, 0]:.6g}, {q[k, 1]:.6g}) is {dist[k]:.6g} from "
                    f"the outline, not {r:.6g} ± {tolerance:.3g}",
                )
            )
        inside = shapely.contains_xy(region, q[:, 0], q[:, 1])
        wrong = inside if distance > 0 else ~inside
        wrong &= err <= slack  # far points are already reported
        if np.any(wrong):
            k = int(np.argmax(wrong))
            out.append(
                ToolpathViolation(
                    "wrong-side",
                    float(q[k, 0]),
                    float(q[k, 1]),
                    None,
                    f"a toolpath point at ({q[k, 0]:.6g}, {q[k, 1]:.6g}) lies on the wrong side "
                    "of the outline",
                )
            )
    # completeness against an independent buffer
    quad = max(
        8, math.ceil(math.pi / 2 / math.acos(max(-1.0, 1 - tolerance / (10 * r)))) if r > 0 else 8
    )
    ref = region.buffer(distance, quad_segs=min(quad, 512), join_style="round")
    ours = None
    for p in rings:
        poly = shapely.Polygon(p)
        ours = poly if ours is None else ours.symmetric_difference(poly)
    ours = shapely.Polygon() if ours is None else ours
    if not ours.is_valid:
        ours = shapely.make_valid(ours)
    diff = ours.symmetric_difference(ref)
    limit = tolerance * (ours.length + ref.length)
    if diff.area > limit:
        parts = list(getattr(diff, "geoms", [diff]))
        big = max(parts, key=lambda g: g.area)
        c = big.representative_point()
        out.append(
            ToolpathViolation(
                "toolpath-missing",
                float(c.x),
                float(c.y),
                float(diff.area),
                f"the toolpaths and a buffer of the outline differ by area {diff.area:.4g} "
                f"(allowed {limit:.4g}), largest near ({c.x:.6g}, {c.y:.6g})",
            )
        )
    return out


def offset_overlaps(
    offsets: Sequence, *, tolerance: float = DEFAULT_OFFSET_TOLERANCE
) -> list[OffsetOverlap]:
    """Pairs of separate outlines whose toolpath regions overlap.

    Parameters
    ----------
    offsets : sequence
        Per outline, a :class:`RegionOffset` (or a list of objects with ``polyline``).
    tolerance : float
        Overlaps of area ≤ ε² are not reported (touching within the flattening).

    Returns
    -------
    list of OffsetOverlap
        One per overlapping pair, with a point inside the overlap and its area.

    Notes
    -----
    Each outline's toolpath region is the even-odd fill of its polylines (they do not cross);
    pairs are found with a shapely STRtree and measured by shapely's polygon intersection.
    At most ``OVERLAP_CANDIDATE_PAIRS`` candidate pairs are examined and
    ``FINDINGS_PER_KIND`` overlaps listed (:mod:`outlinebench.limits`); the candidate pairs
    past either cap are counted in ``unlisted`` of the last overlap listed.
    """
    import shapely

    polys = []
    for item in offsets:
        paths = item.contours if hasattr(item, "contours") else item
        g = None
        for pth in paths:
            p = np.asarray(getattr(pth, "polyline", pth), dtype=float)
            if len(p) > 2:
                poly = shapely.Polygon(p)
                g = poly if g is None else g.symmetric_difference(poly)
        polys.append(shapely.Polygon() if g is None else g)
    tree = shapely.STRtree(polys)
    ia, ib = tree.query(polys, predicate="intersects")
    keep = ia < ib
    ia, ib = ia[keep], ib[keep]
    # bounded work and output (outlinebench.limits): the rest is counted on the last listed
    unexamined = max(0, len(ia) - OVERLAP_CANDIDATE_PAIRS)
    ia, ib = ia[:OVERLAP_CANDIDATE_PAIRS], ib[:OVERLAP_CANDIDATE_PAIRS]
    out = []
    unlisted = 0
    for n_pair, (a, b) in enumerate(zip(ia.tolist(), ib.tolist(), strict=True)):
        if len(out) >= FINDINGS_PER_KIND:
            unlisted = len(ia) - n_pair  # candidate pairs left unexamined
            break
        inter = polys[a].intersection(polys[b])
        if inter.area <= tolerance * tolerance:
            continue
        pt = inter.representative_point()
        out.append(
            OffsetOverlap(
                a,
                b,
                float(pt.x),
                float(pt.y),
                float(inter.area),
                f"the offsets of outlines {a} and {b} overlap (area {inter.area:.4g}) near "
                f"({pt.x:.6g}, {pt.y:.6g}): their toolpaths cut into each other",
            )
        )
    if out and (unlisted or unexamined):
        out[-1] = replace(out[-1], unlisted=unlisted + unexamined)
    return out


def merge_offsets(
    offsets: Sequence, *, tolerance: float = DEFAULT_OFFSET_TOLERANCE
) -> list[OffsetContour]:
    """One toolpath region from the offsets of several outlines (their union).

    Parameters
    ----------
    offsets : sequence of RegionOffset (or lists of OffsetContour)
    tolerance : float
        ε of the polylines returned.

    Returns
    -------
    list of OffsetContour
        Toolpaths of the union (:func:`~outlinebench.geometry.boolean.remove_overlaps`
        with the positive fill rule: each region's contours wind once round it), which never
        cross.
    """
    from outlinebench.geometry.boolean import remove_overlaps

    items = []
    for item in offsets:
        paths = item.contours if hasattr(item, "contours") else item
        items.extend((list(p.segments), True) for p in paths)
    res = remove_overlaps(items, fill_rule="positive", tolerance=_boolean_tolerance(tolerance))
    paths = [list(c.segments) for c in res.contours]
    polys = flatten_contours([(p, True) for p in paths], 0.5 * tolerance) if paths else []
    return [OffsetContour(p, True, q) for p, q in zip(paths, polys, strict=True)]
