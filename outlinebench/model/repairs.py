"""Repairs: undoable commands that fix what the checks find, with a measured shape change.

Every repair is a :class:`~outlinebench.model.commands.Command` (``apply``/``revert``, a menu
``label``), so the editor's history undoes it as one step and the command line applies the
same objects. Each one measures how far it moved the outline: the two-sided Hausdorff
distance between the old and the new curve, as a *proven upper bound*
(:func:`outlinebench.geometry.hausdorff_bound`: flattening with proven deviation plus a
branch-and-bound polyline distance; nothing sampled). Only the changed segments are compared:
the unchanged rest of the contour is common to both, and H(A ∪ C, B ∪ C) ≤ H(A, B), so the
bound holds for the whole contour. A repair whose bound exceeds its ``max_change`` raises
:class:`~outlinebench.errors.CommandError` with a one-line reason and leaves the document as
it was (``apply`` returns nothing; the history pushes nothing).

Repairs (kind words in :data:`REPAIR_KINDS`, in the order :data:`REPAIR_ORDER` applies them)
--------------------------------------------------------------------------------------
close-gaps        :class:`CloseGap` (G0): an open contour whose ends are within the gap
                  tolerance becomes closed; the ends move to one shared point.
                  :class:`JoinContours`: two open contours whose ends meet become one.
fix-direction     :class:`FixDirection`: holes wound opposite to their outer contour where
                  containment is proven; exact duplicate contours removed.
fit-curves        :class:`FitCurves`: a polyline contour becomes few cubics (corners kept).
remove-points     :class:`RemoveRedundantPoints`: consecutive segments merged into one where
                  a fit stays within the allowed change.
smooth-kinks      :class:`SmoothKink` (G1): handles at a join made collinear.
match-curvature   :class:`MatchCurvature` (G2): equal curvature on both sides of a join.
add-extrema       :class:`AddExtremumPoints`: exact splits at interior x/y extrema.
remove-overlaps   :class:`RemoveOverlaps`: the union of an outline's contours (the boolean
                  engine, :func:`union_contours`).

References
----------
- G. Farin, *Curves and Surfaces for CAGD*, 5th ed., Morgan Kaufmann 2002: de Casteljau
  subdivision (§4.4), end derivatives (§4.5), end curvature (§11.2).
- P. J. Schneider, "An Algorithm for Automatically Fitting Digitized Curves", *Graphics
  Gems*, 1990 (curve fitting used by remove-points and fit-curves).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import replace

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import CommandError
from outlinebench.geometry.area import signed_area
from outlinebench.geometry.bezier import split_many
from outlinebench.geometry.boolean import remove_overlaps
from outlinebench.geometry.curvature import end_tangents
from outlinebench.geometry.extrema import extrema_params
from outlinebench.geometry.fit import DEFAULT_FIT_CORNER_ANGLE, fit_chain, fit_polyline
from outlinebench.geometry.flatten import flatten_contours_bounded
from outlinebench.geometry.hausdorff import HausdorffBound, hausdorff_bound
from outlinebench.model.commands import Command, _contour_at
from outlinebench.model.document import Contour, Document, JoinIntent

__all__ = [
    "REPAIR_KINDS",
    "REPAIR_ORDER",
    "DEFAULT_MAX_CHANGE",
    "CHANGE_ACCURACY",
    "RepairCommand",
    "CloseGap",
    "JoinContours",
    "SmoothKink",
    "MatchCurvature",
    "AddExtremumPoints",
    "RemoveRedundantPoints",
    "FitCurves",
    "FixDirection",
    "RemoveOverlaps",
    "union_contours",
    "on_integer_grid",
    "end_curvature_closed_form",
    "turn_angle",
]

FloatArray = NDArray[np.float64]

# Every repair kind, in the order a "fix all" applies them: gaps first (a contour must be
# closed before its direction means anything), direction next (reversal moves nothing),
# then the fits that change segment counts, then the join repairs, and extrema last (a
# later merge would remove the new points).
REPAIR_ORDER: tuple[str, ...] = (
    "close-gaps",
    "remove-overlaps",
    "fix-direction",
    "fit-curves",
    "remove-points",
    "smooth-kinks",
    "match-curvature",
    "add-extrema",
)
REPAIR_KINDS: tuple[str, ...] = REPAIR_ORDER

# Default largest shape change (Hausdorff distance, document user units) a repair may make.
# 0.05 unit is 0.05 mm in a millimetre drawing: within a router's or vinyl cutter's
# repeatability, and well under a drafter's visible change at sign sizes. Our choice, no
# source; the command line states it in mm.
DEFAULT_MAX_CHANGE = 0.05

# Accuracy of each measured change as a fraction of the allowed change: the proven upper
# bound is reported and compared, and lies within this fraction of the limit above the true
# value (so a repair within 99.9 % of its limit is never refused by measuring slack).
CHANGE_ACCURACY = 1e-3

# Handles the grid search looks at around the ideal position of each handle (±2 units per
# axis: 25 candidates a handle, 625 pairs); the residual angle reported is the best of them.
_GRID_RADIUS = 2

# A segment end with handle length below this fraction of the segment's size counts as a
# retracted handle: its direction comes from the next control point.
_RETRACTED = 1e-12


# --------------------------------------------------------------------------------------------
# helpers
# --------------------------------------------------------------------------------------------
def _freeze(a: FloatArray) -> FloatArray:
    a = np.array(a, dtype=np.float64)
    a.flags.writeable = False
    return a


def _unit(v: FloatArray) -> FloatArray:
    n = float(np.hypot(v[0], v[1]))
    return v / n if n > 0.0 else np.zeros(2)


def _cross(a: FloatArray, b: FloatArray) -> float:
    return float(a[0] * b[1] - a[1] * b[0])


def _rotate(v: FloatArray, theta: float) -> FloatArray:
    c, s = math.cos(theta), math.sin(theta)
    return np.array([c * v[0] - s * v[1], s * v[0] + c * v[1]])


def turn_angle(u: FloatArray, v: FloatArray) -> float:
    """Signed angle (radians) turning direction ``u`` into ``v``: atan2(u × v, u · v)."""
    return math.atan2(_cross(u, v), float(u[0] * v[0] + u[1] * v[1]))


def on_integer_grid(doc: Document) -> bool:
    """Whether every control point of the document has integer coordinates (a font's units).

    An empty document is not on a grid.
    """
    seen = False
    for o in doc.outlines:
        for c in o.contours:
            for s in c.segments:
                seen = True
                if not np.all(s == np.round(s)):
                    return False
    return seen


def end_curvature_closed_form(points: FloatArray) -> float:
    """Signed curvature at the start of a line, quadratic or cubic from its control points.

    Notes
    -----
    κ(0) = ((n − 1)/n) · (P₁ − P₀) × (P₂ − P₁) / |P₁ − P₀|³ (Farin §11.2): for a cubic
    κ = (2/3) h / L², for a quadratic κ = (1/2) h / L², where L = |P₁ − P₀| is the handle
    length and h = u × (P₂ − P₀) the signed distance of P₂ from the tangent line through P₀
    in direction u = (P₁ − P₀)/L. A line has κ = 0. This is what :class:`MatchCurvature`
    solves: with h fixed (P₂ kept), κ ∝ 1/L².

    Raises
    ------
    CommandError
        A retracted first handle (L = 0): the closed form does not apply.
    """
    n = points.shape[0] - 1
    if n == 1:
        return 0.0
    d = points[1] - points[0]
    length = float(np.hypot(d[0], d[1]))
    if length == 0.0:
        raise CommandError("a retracted handle has no end curvature in closed form")
    h = _cross(d / length, points[2] - points[0])
    return (n - 1) / n * h / (length * length)


# --------------------------------------------------------------------------------------------
# the base: measure, refuse beyond the limit
# --------------------------------------------------------------------------------------------
class RepairCommand(Command):
    """Base of the repairs: computes the repaired document, measures it, refuses past the limit.

    Parameters
    ----------
    max_change : float
        Largest allowed shape change (Hausdorff distance, document user units, ≥ 0).

    Attributes
    ----------
    change : HausdorffBound or None
        The measured change after ``apply`` (also set when the repair was refused).
    kind : str
        The repair kind (one of :data:`REPAIR_KINDS`).
    note : str
        One line on what was done (or would be), e.g. the residual angle on a grid.

    Notes
    -----
    Subclasses implement ``_repair(doc) -> (new_doc, old_parts, new_parts)``; ``old_parts``
    and ``new_parts`` are the segments that changed. The bound is computed with accuracy
    :data:`CHANGE_ACCURACY` × ``max_change`` and its upper end is compared with the limit.
    """

    kind = "repair"

    def __init__(self, max_change: float = DEFAULT_MAX_CHANGE) -> None:
        super().__init__()
        if not (math.isfinite(max_change) and max_change >= 0.0):
            raise CommandError(f"the allowed change must be a number ≥ 0, got {max_change!r}")
        self.max_change = float(max_change)
        self.change: HausdorffBound | None = None
        self.note = ""

    def _repair(
        self, doc: Document
    ) -> tuple[Document, list[FloatArray], list[FloatArray]]:  # pragma: no cover - abstract
        raise NotImplementedError

    def _measure(self, old: Sequence[FloatArray], new: Sequence[FloatArray]) -> HausdorffBound:
        if not old and not new:
            return HausdorffBound(0.0, 0.0)
        acc = CHANGE_ACCURACY * self.max_change if self.max_change > 0 else None
        return hausdorff_bound(list(old), list(new), accuracy=acc)

    def _compute(self, doc: Document) -> Document:
        new, old_parts, new_parts = self._repair(doc)
        self.change = self._measure(old_parts, new_parts)
        if self.change.upper > self.max_change:
            raise CommandError(
                f"{self.label.lower()}: the shape would change by up to "
                f"{self.change.upper:.6g}, more than the allowed {self.max_change:.6g}"
            )
        return new


def _with(c: Contour, segments: Sequence[FloatArray], joins: Sequence[JoinIntent | None]):
    return Contour(tuple(segments), c.closed, tuple(joins))


# --------------------------------------------------------------------------------------------
# G0: close a gap
# --------------------------------------------------------------------------------------------
def _on_grid(p: FloatArray, grid: float | None) -> FloatArray:
    return p if not grid else np.round(p / grid) * grid


def _move_start(seg: FloatArray, to: FloatArray) -> FloatArray:
    out = np.array(seg)
    delta = to - seg[0]
    out[0] = to
    if seg.shape[0] == 4:
        out[1] = seg[1] + delta  # the handle travels with its point
    return out


def _move_end(seg: FloatArray, to: FloatArray) -> FloatArray:
    out = np.array(seg)
    delta = to - seg[-1]
    out[-1] = to
    if seg.shape[0] == 4:
        out[2] = seg[2] + delta
    return out


class CloseGap(RepairCommand):
    """Close an open contour whose ends lie within the gap tolerance (G0).

    Parameters
    ----------
    outline, contour : int
        The contour (index of the outline in the document, index within the outline).
    gap_tolerance : float
        Largest distance between the two ends that is closed (document user units).
    max_change : float

    Notes
    -----
    Three shared points are tried: the start (the end moves onto it), the end (the start
    moves), and the midpoint (both move by half the gap). A cubic's end handle travels with its
    point (P₁ += Δ at the start, P₂ += Δ at the end), so tangent directions are kept; a
    quadratic's handle stays (it also holds the other end's tangent). The candidate with the
    smallest proven shape change is kept; ends that already coincide are simply closed. With
    a ``grid`` the shared point is rounded to it (handles move by the same grid vector).
    """

    kind = "close-gaps"
    label = "Close gap"

    def __init__(
        self,
        outline: int,
        contour: int,
        gap_tolerance: float,
        max_change: float = DEFAULT_MAX_CHANGE,
        grid: float | None = None,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour = outline, contour
        self.gap_tolerance = float(gap_tolerance)
        self.grid = grid

    def _repair(self, doc: Document):
        c = _contour_at(doc, self.outline, self.contour)
        if c.closed:
            raise CommandError(f"contour {self.contour} of outline {self.outline} is closed")
        segs = list(c.segments)
        if not segs or (len(segs) == 1 and segs[0].shape[0] == 2):
            raise CommandError("a single line cannot be closed into a contour")
        start, end = segs[0][0], segs[-1][-1]
        gap = float(np.hypot(*(end - start)))
        if gap > self.gap_tolerance:
            raise CommandError(
                f"close gap: the ends are {gap:.6g} apart, farther than the gap tolerance "
                f"{self.gap_tolerance:.6g}"
            )
        joins = c.joins + (None,)
        if gap == 0.0:
            self.note = "ends already coincide"
            return (
                doc.replace_contour(self.outline, self.contour, Contour(c.segments, True, joins)),
                [],
                [],
            )
        best = None
        for name, target in (("start", start), ("end", end), ("midpoint", 0.5 * (start + end))):
            target = _on_grid(target, self.grid)
            new = list(segs)
            if len(new) == 1:
                s = _move_end(_move_start(new[0], target), target)
                new[0] = s
                old_parts, new_parts = [segs[0]], [s]
            else:
                new[0] = _move_start(segs[0], target)
                new[-1] = _move_end(segs[-1], target)
                new[-1][-1] = new[0][0]
                old_parts, new_parts = [segs[0], segs[-1]], [new[0], new[-1]]
            bound = self._measure(old_parts, new_parts)
            if best is None or bound.upper < best[0].upper:
                best = (bound, name, new, old_parts, new_parts)
        assert best is not None
        _, name, new, old_parts, new_parts = best
        self.note = f"gap of {gap:.6g} closed at the {name}"
        contour = Contour(tuple(_freeze(s) for s in new), True, joins)
        return doc.replace_contour(self.outline, self.contour, contour), old_parts, new_parts


class JoinContours(RepairCommand):
    """Join two open contours of one outline whose ends lie within the gap tolerance (G0).

    Parameters
    ----------
    outline : int
    contour, other : int
        The two contours (indices within the outline); ``other`` is removed and its segments
        continue ``contour``.
    at_end, other_at_end : bool
        Which ends meet: the end (True) or the start (False) of each.
    gap_tolerance : float
    max_change : float

    Notes
    -----
    The contours are oriented so that the first's end meets the second's start (reversing
    either as needed: the same points, traversed the other way), then joined as in
    :class:`CloseGap`: the start, the end or the midpoint is tried as the shared point, handles
    travelling with their points, and the smallest proven change kept. The joined contour
    stays open (a later close-gaps step closes it when its own ends meet).
    """

    kind = "close-gaps"
    label = "Join contours"

    def __init__(
        self,
        outline: int,
        contour: int,
        other: int,
        at_end: bool,
        other_at_end: bool,
        gap_tolerance: float,
        max_change: float = DEFAULT_MAX_CHANGE,
        grid: float | None = None,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour, self.other = outline, contour, other
        self.at_end, self.other_at_end = bool(at_end), bool(other_at_end)
        self.gap_tolerance = float(gap_tolerance)
        self.grid = grid

    def _repair(self, doc: Document):
        a = _contour_at(doc, self.outline, self.contour)
        b = _contour_at(doc, self.outline, self.other)
        if self.contour == self.other or a.closed or b.closed or not a.segments or not b.segments:
            raise CommandError("join contours: needs two different open contours")
        if not self.at_end:
            a = _reversed_contour(a)
        if self.other_at_end:
            b = _reversed_contour(b)
        end, start = a.segments[-1][-1], b.segments[0][0]
        gap = float(np.hypot(*(start - end)))
        if gap > self.gap_tolerance:
            raise CommandError(
                f"join contours: the ends are {gap:.6g} apart, farther than the gap tolerance "
                f"{self.gap_tolerance:.6g}"
            )
        best = None
        for name, target in (("first", end), ("second", start), ("midpoint", 0.5 * (end + start))):
            target = _on_grid(target, self.grid)
            last = _move_end(a.segments[-1], target)
            first = _move_start(b.segments[0], target)
            first[0] = last[-1]
            old_parts = [a.segments[-1], b.segments[0]]
            new_parts = [last, first]
            bound = self._measure(old_parts, new_parts)
            if best is None or bound.upper < best[0].upper:
                best = (bound, name, last, first, old_parts)
        assert best is not None
        _, name, last, first, old_parts = best
        segs = a.segments[:-1] + (_freeze(last), _freeze(first)) + b.segments[1:]
        joined = Contour(segs, False, a.joins + (None,) + b.joins)
        o = doc.outlines[self.outline]
        contours = list(o.contours)
        contours[self.contour] = joined
        del contours[self.other]
        self.note = f"gap of {gap:.6g} joined at the {name} end point"
        new_doc = doc.replace_outline(self.outline, replace(o, contours=tuple(contours)))
        return new_doc, old_parts, [last, first]


# --------------------------------------------------------------------------------------------
# G1: smooth a kink
# --------------------------------------------------------------------------------------------
def _line_meet(p: FloatArray, d: FloatArray, q: FloatArray, e: FloatArray) -> float | None:
    """s with p + s·d on the line q + r·e, or None when parallel."""
    den = _cross(d, e)
    if abs(den) <= 1e-15 * max(1.0, float(np.hypot(*d)) * float(np.hypot(*e))):
        return None
    return _cross(q - p, e) / den


class SmoothKink(RepairCommand):
    """Make the tangents at a join agree (G1) by turning the handles about the on-curve point.

    Parameters
    ----------
    outline, contour, join : int
        The join (join j: segment j ends, segment j + 1 begins).
    max_change : float
    grid : float or None
        Grid spacing the coordinates must stay on (1.0 for font units), or None.

    Attributes
    ----------
    residual_angle : float or None
        Turn left at the join after the repair (degrees): 0 up to rounding off the grid, the
        best the grid allows on it.

    Notes
    -----
    With on-curve point P, arrival direction u = (P − H_in)/|P − H_in| and leaving direction
    v = (H_out − P)/|H_out − P|, the turn is Δ = atan2(u × v, u · v). A handle of length ℓ
    turned by θ moves by 2ℓ sin(θ/2) ≈ ℓθ; splitting Δ so that both handles move equally,
    θ_in = Δ · ℓ_out/(ℓ_in + ℓ_out) and θ_out = Δ − θ_in, minimises the larger move (the
    shorter handle turns more). Lengths are kept. A line side fixes the tangent: the other
    handle turns by the whole Δ. Where exactly one side's tangent is horizontal or vertical
    (the point is an x/y extremum), that side is kept first, so the point stays an extremum;
    the weighted split is used when that would change the shape more than allowed. A
    quadratic's handle also sets its other end's tangent, so it is moved along that tangent
    line to where it meets the new direction (far tangent kept).
    On a grid, every grid point within ±2 steps of each ideal handle is tried and the pair with
    the smallest residual turn kept (ties: the smaller move).
    """

    kind = "smooth-kinks"
    label = "Smooth kink"

    def __init__(
        self,
        outline: int,
        contour: int,
        join: int,
        max_change: float = DEFAULT_MAX_CHANGE,
        grid: float | None = None,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour, self.join = outline, contour, join
        self.grid = grid
        self.residual_angle: float | None = None

    def _repair(self, doc: Document):
        c = _contour_at(doc, self.outline, self.contour)
        if not 0 <= self.join < len(c.joins):
            raise CommandError(f"join {self.join} does not exist in contour {self.contour}")
        i, k = c.join_segments(self.join)
        a, b = c.segments[i], c.segments[k]
        if a.shape[0] == 2 and b.shape[0] == 2:
            raise CommandError(
                "smooth kink: two lines meet here; only moving the on-curve point could "
                "smooth it (try remove-points)"
            )
        p = a[-1]
        ha = a[-2] if a.shape[0] > 2 else a[0]
        hb = b[1] if b.shape[0] > 2 else b[-1]
        la, lb = float(np.hypot(*(p - ha))), float(np.hypot(*(hb - p)))
        size = max(float(np.max(np.ptp(np.vstack([a, b]), axis=0))), 1e-300)
        if la <= _RETRACTED * size or lb <= _RETRACTED * size:
            raise CommandError("smooth kink: a handle lies on its on-curve point (retracted)")
        u, v = (p - ha) / la, (hb - p) / lb
        delta = turn_angle(u, v)
        u_axis = bool(u[0] == 0.0 or u[1] == 0.0)
        v_axis = bool(v[0] == 0.0 or v[1] == 0.0)
        if a.shape[0] == 2:
            directions = [u]
        elif b.shape[0] == 2:
            directions = [v]
        else:
            directions = [_rotate(u, delta * lb / (la + lb))]
            if u_axis != v_axis:  # keep the extremum point's exact tangent if that fits
                directions.insert(0, u if u_axis else v)
        best = None
        for d in directions:
            new_a, new_b = np.array(a), np.array(b)
            if a.shape[0] > 2:
                new_a[-2] = self._place(a, p, -d, la, end=True)
            if b.shape[0] > 2:
                new_b[1] = self._place(b, p, d, lb, end=False)
            if self.grid:
                new_a, new_b = self._snap(a, b, new_a, new_b, p)
            bound = self._measure([a, b], [new_a, new_b])
            if best is None or (best[0].upper > self.max_change and bound.upper < best[0].upper):
                best = (bound, new_a, new_b)
        assert best is not None
        _, new_a, new_b = best
        ua = _unit(p - new_a[-2]) if a.shape[0] > 2 else u
        vb = _unit(new_b[1] - p) if b.shape[0] > 2 else v
        self.residual_angle = abs(math.degrees(turn_angle(ua, vb)))
        self.note = f"turn {abs(math.degrees(delta)):.4g}° → {self.residual_angle:.3g}°" + (
            " (best on the grid)" if self.grid else ""
        )
        segs = list(c.segments)
        segs[i], segs[k] = _freeze(new_a), _freeze(new_b)
        if i == k:  # pragma: no cover - one-segment closed contour
            raise CommandError("smooth kink: a contour of one segment joins itself")
        new_c = c.with_segments(segs, c.joins)
        return doc.replace_contour(self.outline, self.contour, new_c), [a, b], [segs[i], segs[k]]

    @staticmethod
    def _place(seg: FloatArray, p: FloatArray, d: FloatArray, length: float, end: bool):
        """The handle next to p on direction d (pointing from p to the handle)."""
        if seg.shape[0] == 4:
            return p + length * d
        # quadratic: keep the other end's tangent line, through the far end and the handle
        far = seg[0] if end else seg[-1]
        h = seg[1]
        s = _line_meet(p, d, far, h - far)
        if s is None or s <= 0.0:
            raise CommandError(
                "smooth kink: the quadratic's handle cannot turn there without turning its "
                "other end's tangent"
            )
        return p + s * d

    def _snap(self, a, b, new_a, new_b, p):
        g = float(self.grid or 1.0)
        offs = np.arange(-_GRID_RADIUS, _GRID_RADIUS + 1) * g
        grid_pts = np.stack(np.meshgrid(offs, offs), axis=-1).reshape(-1, 2)

        def around(x: FloatArray) -> FloatArray:
            return np.round(x / g) * g + grid_pts

        ca = around(new_a[-2]) if a.shape[0] > 2 else a[-2][None]
        cb = around(new_b[1]) if b.shape[0] > 2 else b[1][None]
        da = p - ca
        db = cb - p
        na = np.hypot(da[:, 0], da[:, 1])
        nb = np.hypot(db[:, 0], db[:, 1])
        ok_a, ok_b = na > 0, nb > 0
        cross = da[:, None, 0] * db[None, :, 1] - da[:, None, 1] * db[None, :, 0]
        dot = da[:, None, 0] * db[None, :, 0] + da[:, None, 1] * db[None, :, 1]
        ang = np.abs(np.arctan2(cross, dot))
        ang[~ok_a, :] = np.inf
        ang[:, ~ok_b] = np.inf
        move = np.hypot(*(ca - a[-2]).T)[:, None] + np.hypot(*(cb - b[1]).T)[None, :]
        order = np.lexsort((move.ravel(), np.round(ang.ravel(), 15)))
        ia, ib = np.unravel_index(order[0], ang.shape)
        out_a, out_b = np.array(new_a), np.array(new_b)
        if a.shape[0] > 2:
            out_a[-2] = ca[ia]
        if b.shape[0] > 2:
            out_b[1] = cb[ib]
        return out_a, out_b


# --------------------------------------------------------------------------------------------
# G2: match curvature
# --------------------------------------------------------------------------------------------
def _to_tangent_line(s: FloatArray, p: FloatArray, u: FloatArray) -> FloatArray:
    """A start-form cubic s (s[0] = p) with P₂ moved along the far tangent onto p + λu."""
    out = np.array(s)
    lam = _line_meet(s[3], s[2] - s[3], p, u)
    if lam is None or lam <= 0.0:
        raise CommandError(
            "match curvature: the inner handle cannot reach the tangent line without turning "
            "the segment's other end"
        )
    out[2] = s[3] + lam * (s[2] - s[3])
    return out


def _simple_side(s: FloatArray, p: FloatArray, want: float) -> FloatArray:
    """Start-form side with start curvature ``want`` by moving only the handle next to p.

    Used for quadratics, and for cubics where keeping the far end's curvature has no solution.
    κ = c·h/L² with h fixed gives L = sqrt(c·h/κ); κ = 0 needs h = 0 (P₂ slid along the far
    tangent line onto the tangent at p).
    """
    d = s[1] - s[0]
    u = d / float(np.hypot(*d))
    if want == 0.0:
        if s.shape[0] == 3:
            if end_curvature_closed_form(s) != 0.0:
                raise CommandError(
                    "match curvature: a quadratic next to a straight side cannot have zero end "
                    "curvature without moving an on-curve point"
                )
            return s
        return _to_tangent_line(s, p, u)
    n = s.shape[0] - 1
    h = _cross(u, s[2] - s[0])
    if h == 0.0 or (h > 0) != (want > 0):
        raise CommandError("match curvature: this side cannot bend the other way at the join")
    out = np.array(s)
    out[1] = p + math.sqrt((n - 1) / n * h / want) * u
    return out


# Newton steps allowed when solving for both handle lengths of a cubic side.
_NEWTON_STEPS = 60


def _cubic_with_end_curvature(s: FloatArray, want: float) -> FloatArray | None:
    """Start-form cubic with start curvature ``want`` and its far-end curvature kept.

    Both handles move along their own tangents: P₁ = P₀ + α·u, P₂ = P₃ + β·w (u, w the unit
    end directions into the segment). With A = u × (P₃ − P₀), B = u × w, C = w × (P₀ − P₃),
    D = w × u, the end curvatures are κ₀ = (2/3)(A + βB)/α² and κ₁ = (2/3)(C + αD)/β²
    (Farin §11.2, each end in its own start form). Newton's method on
    F(α, β) = ((2/3)(A + βB) − κ₀*α², (2/3)(C + αD) − κ₁β²) = 0 from the current lengths, with
    κ₁ the current far-end curvature. None when it does not converge to positive lengths.
    """
    p0, p3 = s[0], s[3]
    a0 = float(np.hypot(*(s[1] - p0)))
    b0 = float(np.hypot(*(s[2] - p3)))
    if a0 == 0.0 or b0 == 0.0:
        return None
    u = (s[1] - p0) / a0
    w = (s[2] - p3) / b0
    A, B = _cross(u, p3 - p0), _cross(u, w)
    C, D = _cross(w, p0 - p3), _cross(w, u)
    k1 = 2.0 / 3.0 * (C + a0 * D) / (b0 * b0)
    c = 2.0 / 3.0
    x = np.array([a0, b0])
    scale = max(a0, b0)
    for _ in range(_NEWTON_STEPS):
        al, be = float(x[0]), float(x[1])
        f = np.array([c * (A + be * B) - want * al * al, c * (C + al * D) - k1 * be * be])
        jac = np.array([[-2.0 * want * al, c * B], [c * D, -2.0 * k1 * be]])
        try:
            step = np.linalg.solve(jac, f)
        except np.linalg.LinAlgError:
            return None
        x = x - step
        if not np.all(np.isfinite(x)):
            return None
        if float(np.max(np.abs(step))) <= 1e-15 * scale:
            break
    else:
        return None
    al, be = float(x[0]), float(x[1])
    if al <= 0.0 or be <= 0.0:
        return None
    out = np.array(s)
    out[1] = p0 + al * u
    out[2] = p3 + be * w
    return out


class MatchCurvature(RepairCommand):
    """Make both sides of a tangent-continuous join equally curved (G2).

    Parameters
    ----------
    outline, contour, join : int
    max_change : float

    Attributes
    ----------
    curvatures : tuple of float or None
        (κ before the join, κ after the join) once applied, from the closed form.

    Notes
    -----
    Each side is written in start form s (starting at the join P and leaving it; the incoming
    segment reversed, which flips the sign of its curvature). Its end curvature is
    κ = c·h/L² (c = 2/3 for a cubic, 1/2 for a quadratic; :func:`end_curvature_closed_form`),
    with L the length of the handle next to P and h the distance of the next control point
    from the tangent line. For sides bending the same way, both are brought to the geometric
    mean K = sign · sqrt(|κ_in κ_out|); next to a line, or where the sides bend opposite ways
    (an inflection at the join), the common curvature is 0. A cubic side moves both its
    handles along their own tangents, solving for the two lengths so that its end curvature
    at P is K and at its far end stays what it was (:func:`_cubic_with_end_curvature`): both
    tangents, G1 at both ends and the far join's curvature are kept. Where that has no
    solution, and for a quadratic, only the handle next to P moves along the tangent
    (L = sqrt(c·h/K), h kept; for K = 0 a cubic's P₂ slides along its far tangent onto the
    tangent at P); a quadratic next to a straight side is refused.
    """

    kind = "match-curvature"
    label = "Match curvature"

    def __init__(
        self, outline: int, contour: int, join: int, max_change: float = DEFAULT_MAX_CHANGE
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour, self.join = outline, contour, join
        self.curvatures: tuple[float, float] | None = None

    def _repair(self, doc: Document):
        c = _contour_at(doc, self.outline, self.contour)
        if not 0 <= self.join < len(c.joins):
            raise CommandError(f"join {self.join} does not exist in contour {self.contour}")
        i, k = c.join_segments(self.join)
        if i == k:
            raise CommandError("match curvature: a contour of one segment joins itself")
        a, b = c.segments[i], c.segments[k]
        if a.shape[0] == 2 and b.shape[0] == 2:
            raise CommandError("match curvature: two lines meet here (both straight already)")
        p = a[-1]
        sa, sb = a[::-1].copy(), b.copy()  # start forms
        _, ta = end_tangents(a)
        tb, _ = end_tangents(b)
        if _cross(ta, tb) ** 2 > 1e-12 or float(np.dot(ta, tb)) <= 0:
            raise CommandError(
                "match curvature: the join is not tangent-continuous (smooth it first)"
            )
        for s in (sa, sb):
            if s.shape[0] > 2 and float(np.hypot(*(s[1] - s[0]))) == 0.0:
                raise CommandError("match curvature: a handle lies on its on-curve point")
        # curvature in the direction of travel of the contour
        ka = -end_curvature_closed_form(sa) if sa.shape[0] > 2 else 0.0
        kb = end_curvature_closed_form(sb) if sb.shape[0] > 2 else 0.0
        straight = a.shape[0] == 2 or b.shape[0] == 2 or ka == 0.0 or kb == 0.0
        if straight or (ka > 0) != (kb > 0):
            target = 0.0
        else:
            target = math.copysign(math.sqrt(ka * kb), ka)
        new_sides = []
        for s, sign in ((sa, -1.0), (sb, 1.0)):
            if s.shape[0] == 2:
                new_sides.append(s)
                continue
            want = sign * target  # this side's own start-form curvature
            if s.shape[0] == 4:
                solved = _cubic_with_end_curvature(s, want)
                if solved is not None:
                    new_sides.append(solved)
                    continue
            new_sides.append(_simple_side(s, p, want))
        new_a = new_sides[0][::-1].copy()
        new_b = new_sides[1]
        new_a[-1] = p
        new_b[0] = p
        ka_new = -end_curvature_closed_form(new_a[::-1].copy()) if a.shape[0] > 2 else 0.0
        kb_new = end_curvature_closed_form(new_b) if b.shape[0] > 2 else 0.0
        self.curvatures = (ka_new, kb_new)
        self.note = f"κ {ka:.6g} | {kb:.6g} → {ka_new:.6g} | {kb_new:.6g}"
        segs = list(c.segments)
        segs[i], segs[k] = _freeze(new_a), _freeze(new_b)
        new_c = c.with_segments(segs, c.joins)
        return doc.replace_contour(self.outline, self.contour, new_c), [a, b], [segs[i], segs[k]]


# --------------------------------------------------------------------------------------------
# points at extrema
# --------------------------------------------------------------------------------------------
class AddExtremumPoints(RepairCommand):
    """Split a segment at its interior x and y extrema (exact de Casteljau split).

    Parameters
    ----------
    outline, contour, segment : int
    max_change : float
    min_overshoot : float
        Only extrema whose coordinate lies more than this beyond both end points' range are
        split at (document user units; 0 splits at every interior extremum).

    Notes
    -----
    The extrema are the simple roots of x′(t) and y′(t) in (0, 1)
    (:func:`outlinebench.geometry.extrema_params`); the segment is split there by de Casteljau
    subdivision (Farin §4.4), which represents the same curve exactly, so the measured change
    is rounding only. At an x extremum the tangent is vertical: the two handles next to the new
    point get the point's x (and y at a y extremum), removing rounding residue so the new
    point is an extremum bit for bit. The new joins have no stated intent (they are smooth).
    """

    kind = "add-extrema"
    label = "Add points at extrema"

    def __init__(
        self,
        outline: int,
        contour: int,
        segment: int,
        max_change: float = DEFAULT_MAX_CHANGE,
        min_overshoot: float = 0.0,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour, self.segment = outline, contour, segment
        self.min_overshoot = float(min_overshoot)

    def _repair(self, doc: Document):
        c = _contour_at(doc, self.outline, self.contour)
        if not 0 <= self.segment < len(c.segments):
            raise CommandError(f"segment {self.segment} does not exist in contour {self.contour}")
        seg = c.segments[self.segment]
        tx, ty = extrema_params(seg)
        ts: list[tuple[float, int]] = []
        for axis, params in ((0, tx), (1, ty)):
            lo = min(seg[0][axis], seg[-1][axis])
            hi = max(seg[0][axis], seg[-1][axis])
            for t in params:
                val = float(_eval(seg, float(t))[axis])
                if val > hi + self.min_overshoot or val < lo - self.min_overshoot:
                    ts.append((float(t), axis))
        if not ts:
            raise CommandError(f"segment {self.segment} has no interior extremum to add a point at")
        ts.sort()
        pieces = [np.array(p) for p in split_many(seg, [t for t, _ in ts])]
        if len(pieces) != len(ts) + 1:
            raise CommandError("add extrema: two extrema fall at the same parameter")
        for n, (_, axis) in enumerate(ts):
            left, right = pieces[n], pieces[n + 1]
            q = left[-1]
            if left.shape[0] > 2:
                left[-2][axis] = q[axis]
            if right.shape[0] > 2:
                right[1][axis] = q[axis]
        pieces[0][0] = seg[0]
        pieces[-1][-1] = seg[-1]
        for n in range(1, len(pieces)):
            pieces[n][0] = pieces[n - 1][-1]
        new_segs = (
            c.segments[: self.segment]
            + tuple(_freeze(p) for p in pieces)
            + c.segments[self.segment + 1 :]
        )
        joins = list(c.joins)
        joins[self.segment : self.segment] = [None] * len(ts)
        self.note = f"{len(ts)} point{'s' if len(ts) > 1 else ''} added"
        new_c = _with(c, new_segs, joins)
        return doc.replace_contour(self.outline, self.contour, new_c), [seg], list(pieces)


def _eval(seg: FloatArray, t: float) -> FloatArray:
    from outlinebench.geometry.bezier import evaluate

    return evaluate(seg, np.array([t]))[0]


# --------------------------------------------------------------------------------------------
# remove redundant points
# --------------------------------------------------------------------------------------------
def _join_turn(a: FloatArray, b: FloatArray) -> float:
    _, u = end_tangents(a)
    v, _ = end_tangents(b)
    if not (u.any() and v.any()):
        return math.pi
    return abs(turn_angle(u, v))


def _at_extremum(a: FloatArray, b: FloatArray) -> bool:
    """Whether the join of two segments, at least one curved, is an x or y extremum point."""
    if a.shape[0] == 2 and b.shape[0] == 2:
        return False
    _, u = end_tangents(a)
    return bool(u[0] == 0.0 or u[1] == 0.0)


class RemoveRedundantPoints(RepairCommand):
    """Merge consecutive segments of a contour wherever one segment follows them closely enough.

    Parameters
    ----------
    outline, contour : int
    max_change : float
        Also the limit each merge is held to.
    corner_angle : float
        Joins turning by more than this (degrees), or stated corners, are kept (a stated
        corner between two lines running straight on is not a corner and may go).

    Notes
    -----
    Greedy along the contour: each join is tried in turn; two lines running straight on become
    one line; otherwise the original stretch of segments the two pieces stand for is fitted by
    one cubic keeping its end points and end directions (:func:`outlinebench.geometry
    .fit_chain`, Schneider 1990), so the neighbouring joins keep their tangents (G1 kept). A
    merge is kept when the proven Hausdorff distance between the original stretch and the cubic
    is within ``max_change``; stretches are disjoint, so the contour's change is the largest
    stretch's. Points at x/y extrema of curved pieces are kept, and so is a closed contour's
    start point.
    """

    kind = "remove-points"
    label = "Remove redundant points"

    def __init__(
        self,
        outline: int,
        contour: int,
        max_change: float = DEFAULT_MAX_CHANGE,
        corner_angle: float = 10.0,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour = outline, contour
        self.corner = math.radians(corner_angle)
        self.removed = 0

    def _mergeable(self, a: FloatArray, b: FloatArray, intent: JoinIntent | None) -> bool:
        turn = _join_turn(a, b)
        if a.shape[0] == 2 and b.shape[0] == 2:
            return turn <= self.corner and (intent != "corner" or turn == 0.0)
        return intent != "corner" and turn <= self.corner and not _at_extremum(a, b)

    def _repair(self, doc: Document):
        c = _contour_at(doc, self.outline, self.contour)
        pieces: list[tuple[FloatArray, list[FloatArray]]] = [(s, [s]) for s in c.segments]
        joins = list(c.joins)
        changed = False
        j = 0
        while len(pieces) > 1:
            # joins j = 0 … count − 2 (the start point of a closed contour stays where it is)
            if j >= len(pieces) - 1:
                break
            if c.closed and len(pieces) == 2:
                break  # a closed contour keeps two segments at least
            (a, oa), (b, ob) = pieces[j], pieces[j + 1]
            if not self._mergeable(a, b, joins[j]):
                j += 1
                continue
            stretch = oa + ob
            if a.shape[0] == 2 and b.shape[0] == 2:
                merged = np.array([a[0], b[-1]])
            else:
                merged = fit_chain(stretch)
            merged[0], merged[-1] = a[0], b[-1]
            bound = self._measure(stretch, [merged])
            if bound.upper > self.max_change:
                j += 1
                continue
            changed = True
            self.removed += 1
            pieces[j] = (merged, stretch)
            del pieces[j + 1]
            del joins[j]
        if not changed:
            raise CommandError(
                f"remove points: no point of contour {self.contour} can go within the allowed "
                f"change {self.max_change:.6g}"
            )
        segs = [_freeze(p) for p, _ in pieces]
        for n in range(1, len(segs)):
            if not np.array_equal(segs[n][0], segs[n - 1][-1]):  # pragma: no cover
                raise CommandError("remove points: the merged segments do not meet")
        self.note = f"{self.removed} point{'s' if self.removed != 1 else ''} removed"
        new_c = Contour(tuple(segs), c.closed, tuple(joins))
        old = [s for p, orig in pieces if len(orig) > 1 for s in orig]
        new = [p for p, orig in pieces if len(orig) > 1]
        return doc.replace_contour(self.outline, self.contour, new_c), old, new


# --------------------------------------------------------------------------------------------
# fit curves to polylines
# --------------------------------------------------------------------------------------------
# Fraction of the allowed change given to the fit as its own tolerance (the rest is head-room
# for the difference between the fit's sampled check and the proven measurement); halved on
# each retry when the proven change is still too large. Our choice, no source.
_FIT_SHARE = 0.9
_FIT_RETRIES = 3


class FitCurves(RepairCommand):
    """Replace a polyline contour (lines only) by few lines and cubics within the allowed change.

    Parameters
    ----------
    outline, contour : int
    max_change : float
        The fitting tolerance and the limit of the proven change.
    corner_angle : float
        Vertices turning by more than this (degrees) stay corners.

    Notes
    -----
    :func:`outlinebench.geometry.fit_polyline` (Schneider's least-squares fit with parameter
    correction, corners by angle, G1 at the splits), with tolerance 0.9 × ``max_change``;
    when the proven change still exceeds ``max_change`` the fit is repeated at half the
    tolerance, up to three times. Refused when the result has no fewer segments. Joins become
    unstated; where the contour stated intents, the new joins are stated too (corner where
    the turn exceeds the corner angle, smooth elsewhere).
    """

    kind = "fit-curves"
    label = "Fit curves to polyline"

    def __init__(
        self,
        outline: int,
        contour: int,
        max_change: float = DEFAULT_MAX_CHANGE,
        corner_angle: float = DEFAULT_FIT_CORNER_ANGLE,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.contour = outline, contour
        self.corner_angle = float(corner_angle)

    def _repair(self, doc: Document):
        c = _contour_at(doc, self.outline, self.contour)
        if not c.segments or any(s.shape[0] != 2 for s in c.segments):
            raise CommandError(f"fit curves: contour {self.contour} is not a polyline")
        if self.max_change <= 0.0:
            raise CommandError("fit curves: needs an allowed change above 0")
        pts = c.on_curve_points()
        tol = _FIT_SHARE * self.max_change
        for _ in range(_FIT_RETRIES + 1):
            segs = fit_polyline(pts, c.closed, tol, corner_angle=self.corner_angle)
            if len(segs) >= len(c.segments):
                raise CommandError(
                    f"fit curves: no fewer segments than the {len(c.segments)} lines it has"
                )
            bound = self._measure(list(c.segments), segs)
            if bound.upper <= self.max_change:
                break
            tol *= 0.5
        segs = [_freeze(s) for s in segs]
        n = len(segs)
        count = n if c.closed else n - 1
        joins: list[JoinIntent | None] = [None] * count
        if any(j is not None for j in c.joins):
            corner = math.radians(self.corner_angle)
            for j in range(count):
                a, b = segs[j], segs[(j + 1) % n]
                joins[j] = "corner" if _join_turn(a, b) > corner else "smooth"
        self.note = f"{len(c.segments)} lines → {n} segments"
        new_c = Contour(tuple(segs), c.closed, tuple(joins))
        return doc.replace_contour(self.outline, self.contour, new_c), list(c.segments), segs


# --------------------------------------------------------------------------------------------
# fix direction
# --------------------------------------------------------------------------------------------
def _reversed_contour(c: Contour) -> Contour:
    segs = tuple(_freeze(s[::-1].copy()) for s in reversed(c.segments))
    if c.closed and c.joins:
        joins = tuple(reversed(c.joins[:-1])) + (c.joins[-1],)
    else:
        joins = tuple(reversed(c.joins))
    return Contour(segs, c.closed, joins)


def _same_contour(a: Contour, b: Contour) -> bool:
    """Exact duplicates: the same segments bit for bit, also from another start or reversed."""
    if a.closed != b.closed or len(a.segments) != len(b.segments) or not a.segments:
        return False
    n = len(a.segments)

    def eq(x: FloatArray, y: FloatArray) -> bool:
        return x.shape == y.shape and bool(np.array_equal(x, y))

    for cand in (b, _reversed_contour(b)):
        shifts = range(n) if a.closed else [0]
        for s in shifts:
            if all(eq(a.segments[i], cand.segments[(i + s) % n]) for i in range(n)):
                return True
    return False


class FixDirection(RepairCommand):
    """Wind holes opposite to the contour around them, where containment is proven; remove
    exact duplicate contours.

    Parameters
    ----------
    outline : int
        The outline (index in the document) whose contours are put right.
    max_change : float

    Attributes
    ----------
    reversed : list of int
        Indices (within the outline) of the reversed contours.
    removed : list of int
        Indices of the removed duplicates.
    unproven : list of int
        Contours left as they are because their containment could not be proven.

    Notes
    -----
    Containment is proven, not guessed: each closed contour C is flattened to a polygon P_C
    within a proven deviation β_C (:func:`outlinebench.geometry.flatten_contours_bounded`).
    For two contours A, B, if the distance between P_A and P_B exceeds β_A + β_B then the
    curves do not touch, and for the on-curve point a of A (a vertex of P_A, with
    dist(a, P_B) > β_B) the curve B and the polygon P_B wind around a the same number of times
    (the straight homotopy from each curve point to its nearest chord point stays within β_B of
    P_B, so it never passes over a); so "A inside B" is decided exactly by the even-odd test
    of a against P_B (shapely). Pairs closer than that are not decided (at ε/10 once more),
    and contours with an undecided pair are left alone. A contour's parent is its innermost
    proven container; depth-0 contours keep their direction, deeper ones wind opposite to
    their parent's final direction (sign of the exact signed area, Green's theorem).
    Reversal and removing an exact duplicate leave the outline's point set as it was, so the
    shape change is 0 (the fill under nonzero can change: that is the point).
    """

    kind = "fix-direction"
    label = "Fix contour direction"

    def __init__(self, outline: int, max_change: float = DEFAULT_MAX_CHANGE) -> None:
        super().__init__(max_change)
        self.outline = outline
        self.reversed: list[int] = []
        self.removed: list[int] = []
        self.unproven: list[int] = []

    def _repair(self, doc: Document):
        import shapely

        if not 0 <= self.outline < len(doc.outlines):
            raise CommandError(f"outline {self.outline} does not exist")
        o = doc.outlines[self.outline]
        contours = list(o.contours)
        keep: list[int] = []
        for idx, c in enumerate(contours):
            if any(_same_contour(c, contours[j]) for j in keep):
                self.removed.append(idx)
            else:
                keep.append(idx)
        closed = [i for i in keep if contours[i].closed and contours[i].segments]
        flips: dict[int, bool] = {}
        if len(closed) > 1:
            every = np.concatenate([s for i in closed for s in contours[i].segments])
            size = max(float(np.max(np.ptp(every, axis=0))), 1e-300)
            inside: dict[tuple[int, int], bool] = {}
            undecided: set[int] = set()
            eps = 1e-4 * size
            for attempt in range(2):
                polys, bounds = flatten_contours_bounded([contours[i] for i in closed], eps)
                shapes = [shapely.Polygon(p) if len(p) >= 3 else None for p in polys]
                rings = [shapely.LinearRing(p) if len(p) >= 3 else None for p in polys]
                undecided = set()
                inside = {}
                for x, i in enumerate(closed):
                    for y, j in enumerate(closed):
                        if x == y:
                            continue
                        if rings[x] is None or rings[y] is None:
                            undecided.update((i, j))
                            continue
                        gap = float(shapely.distance(rings[x], rings[y]))
                        if gap <= float(bounds[x] + bounds[y]):
                            undecided.update((i, j))
                            continue
                        probe = shapely.Point(polys[x][0])
                        shape = shapes[y]
                        inside[(i, j)] = shape is not None and bool(shape.contains(probe))
                if not undecided or attempt == 1:
                    break
                eps /= 10.0
            self.unproven = sorted(undecided)
            area = {i: signed_area(contours[i].segments) for i in closed}
            decided = [i for i in closed if i not in undecided]
            containers = {i: [j for j in closed if inside.get((i, j), False)] for i in decided}
            depth = {i: len(containers[i]) for i in decided}
            final: dict[int, float] = {}
            for i in sorted(decided, key=lambda q: depth[q]):
                sign = math.copysign(1.0, area[i]) if area[i] != 0 else 0.0
                if depth[i] == 0 or sign == 0.0:
                    final[i] = sign
                    continue
                parent = max(containers[i], key=lambda q: depth.get(q, -1))
                psign = final.get(parent)
                if psign is None:
                    psign = math.copysign(1.0, area[parent]) if area[parent] != 0 else 0.0
                if psign == 0.0:
                    final[i] = sign
                    continue
                flips[i] = sign == psign
                final[i] = -psign
        self.reversed = sorted(i for i, f in flips.items() if f)
        if not self.reversed and not self.removed:
            why = (
                f"; containment of contour(s) {', '.join(map(str, self.unproven))} not proven"
                if self.unproven
                else ""
            )
            raise CommandError(f"fix direction: nothing to change in outline {self.outline}{why}")
        new_contours = [
            _reversed_contour(contours[i]) if i in self.reversed else contours[i] for i in keep
        ]
        parts = []
        if self.reversed:
            parts.append(f"reversed {', '.join(map(str, self.reversed))}")
        if self.removed:
            parts.append(f"removed duplicate {', '.join(map(str, self.removed))}")
        self.note = "; ".join(parts) + " (contour indices within the outline)"
        new_o = replace(o, contours=tuple(new_contours))
        return doc.replace_outline(self.outline, new_o), [], []


# --------------------------------------------------------------------------------------------
# remove overlaps: the union from the boolean engine
# --------------------------------------------------------------------------------------------
def union_contours(contours: Sequence[Contour], fill_rule: str) -> list[Contour]:
    """The region the closed contours fill under ``fill_rule``, as contours that neither
    cross nor overlap (:func:`outlinebench.geometry.remove_overlaps`), with their join intents;
    open contours are kept as they are (a region has no open edges)."""
    closed = [c for c in contours if c.closed and c.segments]
    others = [c for c in contours if not (c.closed and c.segments)]
    res = remove_overlaps(closed, fill_rule=fill_rule)
    out = [Contour(tuple(rc.segments), True, tuple(rc.joins)) for rc in res.contours]
    return out + [c for c in others if c.segments]


class RemoveOverlaps(RepairCommand):
    """Replace an outline's contours by their union (needs the boolean engine).

    Parameters
    ----------
    outline : int
    fill_rule : str
        "nonzero" (default) or "evenodd".
    max_change : float
        The union moves no point of the filled region's boundary, but it removes the parts of
        contours inside the region: the measured change is the Hausdorff distance between the
        old and new contour sets, and is usually large (whole inner pieces disappear). A
        separate limit is the caller's business; this command measures and reports it, and
        refuses past ``max_change`` like every repair.

    Notes
    -----
    The union is :func:`union_contours` (the boolean engine: curves split exactly at their
    crossings, the pieces on the region's boundary kept).
    """

    kind = "remove-overlaps"
    label = "Remove overlaps"

    def __init__(
        self,
        outline: int,
        fill_rule: str | None = None,
        max_change: float = DEFAULT_MAX_CHANGE,
    ) -> None:
        super().__init__(max_change)
        self.outline, self.fill_rule = outline, fill_rule

    def _repair(self, doc: Document):
        if not 0 <= self.outline < len(doc.outlines):
            raise CommandError(f"outline {self.outline} does not exist")
        o = doc.outlines[self.outline]
        new = union_contours(o.contours, self.fill_rule or o.fill_rule)
        old_parts = [s for c in o.contours for s in c.segments]
        new_parts = [s for c in new for s in c.segments]
        self.note = f"{len(o.contours)} contours → {len(new)}"
        return (
            doc.replace_outline(self.outline, replace(o, contours=tuple(new))),
            old_parts,
            new_parts,
        )
