"""Checks of single segments, run on a whole batch at once.

Every segment is elevated exactly to cubic degree (:func:`outlinebench.geometry.to_cubic`) and
stacked in one ``(M, 4, 2)`` array; cheap array tests then pick the few segments that need a
closer look, which the geometry functions examine one by one:

tiny-segment
    Arc length below the gap tolerance. chord ≤ length ≤ control-polygon length, so only
    segments with chord ≤ tol and polygon > tol need :func:`~outlinebench.geometry.arc_length`.
degenerate-handle
    A handle within the gap tolerance of its on-curve point (the end tangent then comes from
    the next control point). Lines have no handles; tiny segments are reported as tiny.
cusp and self-intersection (a loop)
    Both need the hodograph B′ to turn back. If some direction c has B′(t) · c > 0 on (0, 1),
    which holds when the hodograph control points D0, D1, D2 all have D_i · c ≥ 0 (convex hull
    property of the Bernstein form, Farin ch. 5) and not all at 0, the segment moves
    monotonically along c and has neither. Only the others go to
    :func:`~outlinebench.geometry.cusps` and :func:`~outlinebench.geometry.self_intersections`.
missing-extremum
    An interior x or y extremum lying more than the overshoot tolerance beyond the segment's end
    points, other than the tip of a cusp (where B′ = 0 makes x′ and y′ vanish together). If
    every handle lies within the end points' range (plus tolerance) the convex hull property
    rules it out; for the others the simple roots of x′ and y′
    (:func:`outlinebench.geometry.extrema.stationary_params`, all at once) are evaluated.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from outlinebench.diagnostics.continuity import turn_angles
from outlinebench.diagnostics.findings import ERROR, INFO, WARNING, Finding
from outlinebench.diagnostics.messages import (
    degenerate_handle_message,
    missing_extremum_message,
    tiny_segment_message,
)
from outlinebench.diagnostics.settings import CheckSettings
from outlinebench.geometry import (
    arc_length,
    bernstein_matrix,
    cusps,
    derivative_at,
    end_curvatures,
    end_tangents,
    evaluate,
    self_intersections,
    to_cubic,
)
from outlinebench.geometry.extrema import stationary_params

__all__ = [
    "Limits",
    "SegmentTable",
    "hull_boxes",
    "segment_table",
    "handle_lengths",
    "monotone_mask",
    "segment_findings",
]

FloatArray = NDArray[np.float64]

# Step in t on each side of a cusp used to measure how far the tangent turns there; an x or y
# extremum within this step of a cusp is the cusp's tip and not reported as a missing extremum.
_CUSP_PROBE = 1e-4

# Parameters this close to 0 or 1 count as the segment's end.
_END_PARAM = 1e-6


@dataclass(frozen=True, slots=True)
class Limits:
    """Tolerances of :class:`CheckSettings` converted to one document's user units."""

    gap: float
    gap_search: float
    overshoot: float
    straight: float
    kink_angle: float
    corner_angle: float
    curvature_jump: float
    cusp_tolerance: float
    samples: int
    jump_severity: str
    straight_severity: str
    extremum_severity: str = INFO

    @classmethod
    def from_settings(cls, s: CheckSettings, mm_per_unit: float) -> Limits:
        """Lengths divided by mm per unit; curvature (1/length) multiplied by it."""
        return cls(
            gap=s.gap_mm / mm_per_unit,
            gap_search=s.gap_search_mm / mm_per_unit,
            overshoot=s.extremum_overshoot_mm / mm_per_unit,
            straight=s.straight_curvature_per_mm * mm_per_unit,
            kink_angle=s.kink_angle,
            corner_angle=s.corner_angle,
            curvature_jump=s.curvature_jump,
            cusp_tolerance=s.cusp_tolerance,
            samples=int(s.samples_per_segment),
            jump_severity=s.curvature_jump_severity,
            straight_severity=s.straight_into_curve_severity,
            extremum_severity=s.missing_extremum_severity,
        )


@dataclass(eq=False, slots=True)
class SegmentTable:
    """Per-segment arrays of a batch (row r is segment r of the batch).

    Attributes
    ----------
    cubics : (M, 4, 2)  exact cubic form of each segment
    degree : (M,) int8  1, 2 or 3 as drawn
    d0, d1 : (M, 2)     unit tangent at start and end (direction of travel)
    k0, k1 : (M,)       signed curvature at start and end (±inf at a retracted handle)
    box : (M, 4)        control-point box (xmin, ymin, xmax, ymax), contains the segment
    """

    cubics: FloatArray
    degree: NDArray[np.int8]
    d0: FloatArray
    d1: FloatArray
    k0: FloatArray
    k1: FloatArray
    box: FloatArray

    def __len__(self) -> int:
        return self.cubics.shape[0]

    def take(self, index: NDArray[np.intp] | slice) -> SegmentTable:
        """Rows ``index`` as a new table (views for a slice)."""
        return SegmentTable(
            self.cubics[index],
            self.degree[index],
            self.d0[index],
            self.d1[index],
            self.k0[index],
            self.k1[index],
            self.box[index],
        )

    @staticmethod
    def concat(tables: Sequence[SegmentTable]) -> SegmentTable:
        """Rows of several tables, one after the other."""
        if len(tables) == 1:
            return tables[0]
        return SegmentTable(
            *(np.concatenate([getattr(t, f) for t in tables]) for f in SegmentTable.__slots__)
        )


def hull_boxes(cubics: FloatArray) -> FloatArray:
    """Box (xmin, ymin, xmax, ymax) of each cubic's control points, shape (M, 4).

    The curve lies inside (convex hull property). Written as element-wise minima of the four
    points, which numpy runs several times faster than a reduction over the short middle axis.
    """
    lo = np.minimum(np.minimum(cubics[:, 0], cubics[:, 1]), np.minimum(cubics[:, 2], cubics[:, 3]))
    hi = np.maximum(np.maximum(cubics[:, 0], cubics[:, 1]), np.maximum(cubics[:, 2], cubics[:, 3]))
    return np.concatenate([lo, hi], axis=1)


def handle_lengths(cubics: FloatArray, degree: NDArray[np.int8]) -> tuple[FloatArray, FloatArray]:
    """Length of the start and the end handle of each segment as drawn, shapes (M,), (M,).

    The cubic form of a quadratic has its handles 2/3 of the way to the quadratic's middle
    point (degree elevation, Farin §5.1), so their lengths are scaled by 3/2 back to the
    drawn handle. Lines have no handles; their values mean nothing.
    """
    scale = np.where(degree == 2, 1.5, 1.0)
    h0 = np.linalg.norm(cubics[:, 1] - cubics[:, 0], axis=1) * scale
    h1 = np.linalg.norm(cubics[:, 3] - cubics[:, 2], axis=1) * scale
    return h0, h1


def _retract_handles(
    cubics: FloatArray, degree: NDArray[np.int8], gap: float
) -> tuple[NDArray[np.intp], FloatArray, NDArray[np.intp], FloatArray]:
    """Curved segments with a handle within ``gap`` of its on-curve point, and their cubics
    with that handle (and a following control point also within ``gap``) moved onto it."""
    h0, h1 = handle_lengths(cubics, degree)
    curved = degree >= 2
    r0 = np.flatnonzero(curved & (h0 <= gap))
    r1 = np.flatnonzero(curved & (h1 <= gap))
    c0 = cubics[r0].copy()
    c0[:, 1] = c0[:, 0]
    near = np.linalg.norm(c0[:, 2] - c0[:, 0], axis=1) <= gap
    c0[near, 2] = c0[near, 0]
    c1 = cubics[r1].copy()
    c1[:, 2] = c1[:, 3]
    near = np.linalg.norm(c1[:, 1] - c1[:, 3], axis=1) <= gap
    c1[near, 1] = c1[near, 3]
    return r0, c0, r1, c1


def segment_table(segments: Sequence[FloatArray], gap: float = 0.0) -> SegmentTable:
    """Build the per-segment arrays for a list of segments of any degrees.

    Parameters
    ----------
    segments : sequence of ndarray, each (K, 2)
    gap : float
        The gap tolerance in the segments' units. A handle within it of its on-curve point
        counts as retracted (a degenerate handle): the end tangent and curvature there are
        those of the segment with the handle moved onto its point.

    Returns
    -------
    SegmentTable
        Row r describes ``segments[r]``.

    Notes
    -----
    With P1 = P0 the start direction is that of the first non-zero derivative, P2 − P0 (or
    P3 − P0 when P2 is within ``gap`` of P0 too) (Farin §4.5), and κ(0) is ±inf unless P2 lies
    on the line P0P3 (:func:`outlinebench.geometry.end_curvatures`); the end mirrors it. A
    handle shorter than the tolerance cannot be seen or cut, while the direction it gives
    would make a false corner at the join.
    """
    m = len(segments)
    cubics = np.empty((m, 4, 2))
    degree = np.fromiter((s.shape[0] - 1 for s in segments), dtype=np.int8, count=m)
    for deg in (1, 2, 3):
        rows = np.flatnonzero(degree == deg)
        if rows.size:
            cubics[rows] = to_cubic(np.stack([segments[r] for r in rows]))
    if m:
        d0, d1 = end_tangents(cubics)
        k0, k1 = end_curvatures(cubics)
    else:
        d0 = d1 = np.zeros((0, 2))
        k0 = k1 = np.zeros(0)
    if m and gap > 0.0:
        r0, c0, r1, c1 = _retract_handles(cubics, degree, gap)
        if r0.size:
            d0 = d0.copy()
            k0 = k0.copy()
            d0[r0] = end_tangents(c0)[0]
            k0[r0] = end_curvatures(c0)[0]
        if r1.size:
            d1 = d1.copy()
            k1 = k1.copy()
            d1[r1] = end_tangents(c1)[1]
            k1[r1] = end_curvatures(c1)[1]
    box = hull_boxes(cubics)
    return SegmentTable(
        cubics, degree, np.asarray(d0), np.asarray(d1), np.asarray(k0), np.asarray(k1), box
    )


def _monotone_along(d: FloatArray, c: FloatArray) -> NDArray[np.bool_]:
    dots = np.einsum("mkj,mj->mk", d, c)
    return (dots >= 0.0).all(axis=1) & (
        (dots[:, 1] > 0.0) | ((dots[:, 0] > 0.0) & (dots[:, 2] > 0.0))
    )


def monotone_mask(cubics: FloatArray) -> NDArray[np.bool_]:
    """True where a cubic moves monotonically along some direction (no cusp, no loop).

    Parameters
    ----------
    cubics : ndarray, shape (M, 4, 2)

    Returns
    -------
    ndarray of bool, shape (M,)
        A sufficient test only: False means "look closer", not "has a cusp".

    Notes
    -----
    B′(t) = 3 Σ D_i B_{i,2}(t) with D_i = P_{i+1} − P_i; if every D_i · c ≥ 0 and the sum is not
    identically 0 on (0, 1), then B′(t) · c > 0 inside the segment. Two directions are tried:
    the chord P3 − P0 and the sum of the unit end tangents.
    """
    d = np.diff(cubics, axis=1)
    chord = cubics[:, 3] - cubics[:, 0]
    n0 = np.linalg.norm(d[:, 0], axis=1, keepdims=True)
    n2 = np.linalg.norm(d[:, 2], axis=1, keepdims=True)
    ends = d[:, 0] / np.where(n0 > 0, n0, 1.0) + d[:, 2] / np.where(n2 > 0, n2, 1.0)
    return _monotone_along(d, chord) | _monotone_along(d, ends)


def _polygon_and_chord(cubics: FloatArray) -> tuple[FloatArray, FloatArray]:
    poly = np.linalg.norm(np.diff(cubics, axis=1), axis=2).sum(axis=1)
    chord = np.linalg.norm(cubics[:, 3] - cubics[:, 0], axis=1)
    return poly, chord


def segment_findings(
    table: SegmentTable,
    segments: Sequence[FloatArray],
    limits: Limits,
    outline: NDArray[np.intp],
    contour: NDArray[np.intp],
    segment: NDArray[np.intp],
    *,
    loops_only: bool = False,
) -> list[tuple[int, Finding]]:
    """Run every single-segment check on a batch.

    Parameters
    ----------
    table : SegmentTable
        From :func:`segment_table` for ``segments``.
    segments : sequence of ndarray, each (K, 2)
        The segments as drawn (their own degree).
    limits : Limits
        Tolerances in the document's user units.
    outline, contour, segment : ndarray of int, shape (M,)
        Where each row sits (outline index, global contour index, index in the contour), used
        to label the findings.
    loops_only : bool
        Only the ``self-intersection`` findings of loops inside one segment (what measuring
        needs), skipping the other checks.

    Returns
    -------
    list of (row, Finding)
        Findings in row order, each with the row it belongs to.
    """
    out: list[tuple[int, Finding]] = []
    cub = table.cubics
    m = cub.shape[0]
    if m == 0:
        return out

    def place(r: int) -> tuple[int, int, int]:
        return int(outline[r]), int(contour[r]), int(segment[r])

    # -- tiny segments -------------------------------------------------------------------
    poly, chord = _polygon_and_chord(cub)
    maybe = np.flatnonzero(chord <= limits.gap)
    tiny = np.zeros(m, dtype=bool)
    if maybe.size:
        lengths = np.atleast_1d(arc_length(cub[maybe]))
        is_tiny = lengths < limits.gap
        tiny[maybe[is_tiny]] = True
        for r, length in zip(
            maybe[is_tiny], lengths[is_tiny] if not loops_only else [], strict=False
        ):
            o, c, s = place(r)
            x, y = evaluate(cub[r], 0.5)
            out.append(
                (
                    int(r),
                    Finding(
                        "tiny-segment", WARNING, o, c, s, 0.5, float(x), float(y),
                        float(length), "user",
                        tiny_segment_message(float(length), limits.gap),
                        limit=limits.gap,
                    ),
                )
            )  # fmt: skip

    # -- degenerate handles --------------------------------------------------------------
    h0, h1 = handle_lengths(cub, table.degree)
    curved = (table.degree >= 2) & ~tiny
    for end, hl in ((0, h0), (1, h1)) if not loops_only else ():
        for r in np.flatnonzero(curved & (hl <= limits.gap)):
            o, c, s = place(r)
            x, y = cub[r, 3 * end]
            which = "start" if end == 0 else "end"
            out.append(
                (
                    int(r),
                    Finding(
                        "degenerate-handle", WARNING, o, c, s, float(end), float(x), float(y),
                        float(hl[r]), "user",
                        degenerate_handle_message(which, float(hl[r])),
                        limit=limits.gap,
                    ),
                )
            )  # fmt: skip

    # -- cusps and loops inside one segment ----------------------------------------------
    look = np.flatnonzero((table.degree >= 2) & ~tiny & ~monotone_mask(cub))
    cusp_at: dict[int, NDArray[np.float64]] = {}  # row -> parameters of its cusps
    for r in look:
        seg = segments[r]
        size = float(np.max(np.ptp(seg, axis=0)))
        o, c, s = place(r)
        found_t = () if loops_only else cusps(seg, tolerance=limits.cusp_tolerance * size)
        if len(found_t):
            cusp_at[int(r)] = np.asarray(found_t, dtype=np.float64)
        for t in found_t:
            before = derivative_at(seg, max(t - _CUSP_PROBE, 0.0))[None]
            after = derivative_at(seg, min(t + _CUSP_PROBE, 1.0))[None]
            turn = float(turn_angles(before, after)[0])
            x, y = evaluate(seg, t)
            out.append(
                (
                    int(r),
                    Finding(
                        "cusp", ERROR, o, c, s, float(t), float(x), float(y), turn, "degrees",
                        f"the curve turns back on itself at t = {t:.4g} (tangent turns "
                        f"{turn:.1f}°); a cutter leaves a spike here",
                    ),
                )
            )  # fmt: skip
        if seg.shape[0] == 4:
            for t1, t2 in self_intersections(seg):
                if t1 <= _END_PARAM and t2 >= 1.0 - _END_PARAM:
                    continue  # the segment's own ends meet: a join, not a loop crossing
                x, y = evaluate(seg, t1)
                turn = turn_angles(derivative_at(seg, t1)[None], derivative_at(seg, t2)[None])
                angle = float(min(turn[0], 180.0 - turn[0]))  # acute angle between branches
                out.append(
                    (
                        int(r),
                        Finding(
                            "self-intersection", ERROR, o, c, s, float(t1), float(x), float(y),
                            angle, "degrees",
                            f"the segment loops and crosses itself (t = {t1:.4g} and "
                            f"{t2:.4g}) at {angle:.1f}°",
                            other_contour=c, other_segment=s, other_t=float(t2),
                        ),
                    )
                )  # fmt: skip

    if loops_only:
        return out
    # -- interior extrema without an on-curve point ----------------------------------------
    lo = np.minimum(cub[:, 0], cub[:, 3]) - limits.overshoot
    hi = np.maximum(cub[:, 0], cub[:, 3]) + limits.overshoot
    handles = cub[:, 1:3]
    outside = ((handles < lo[:, None]) | (handles > hi[:, None])).any(axis=(1, 2))
    cand = np.flatnonzero(outside & (table.degree >= 2) & ~tiny)
    if cand.size:
        c = cub[cand]
        ts = stationary_params(c, simple_only=True).reshape(cand.size, 4)  # x, x, y, y
        valid = np.isfinite(ts)
        basis = bernstein_matrix(3, np.where(valid, ts, 0.0).ravel()).reshape(cand.size, 4, 4)
        vals = np.einsum("mtk,mkd->mtd", basis, c)  # (C, 4, 2)
        axis = np.array([0, 0, 1, 1])
        coord = vals[:, np.arange(4), axis]
        end_lo = np.minimum(c[:, 0], c[:, 3])[:, axis]
        end_hi = np.maximum(c[:, 0], c[:, 3])[:, axis]
        over = np.maximum(coord - end_hi, end_lo - coord)
        hit_r, hit_k = np.nonzero(valid & (over > limits.overshoot))
        for q, k in zip(hit_r.tolist(), hit_k.tolist(), strict=True):
            r = int(cand[q])
            o, cc, s = place(r)
            t = float(ts[q, k])
            tips = cusp_at.get(r)
            if tips is not None and np.any(np.abs(tips - t) <= _CUSP_PROBE):
                continue  # B′ = 0 here: the tip of a cusp (reported as such), not an extremum
            ov = float(over[q, k])
            name = "xy"[axis[k]]
            out.append(
                (
                    r,
                    Finding(
                        "missing-extremum", limits.extremum_severity, o, cc, s, t,
                        float(vals[q, k, 0]),
                        float(vals[q, k, 1]), ov, "user",
                        missing_extremum_message(name, t, ov),
                        limit=limits.overshoot,
                    ),
                )
            )  # fmt: skip
    out.sort(key=lambda item: item[0])
    return out
