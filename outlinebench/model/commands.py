"""Every edit of a document as an undoable command object.

A command is a small object with a menu ``label`` and three methods:

``apply(doc) -> Document``
    The edited document. Untouched outlines, contours and segments stay the same objects.
``revert(doc) -> Document``
    Given the document ``apply`` returned, the identical (``is``) document it was applied to.
``merge(other) -> bool``
    Absorb a command that was applied right after this one into this one (consecutive moves
    of the same points become one undo step); False when they do not combine.

Commands remember the document they were applied to and the one they produced, so revert is
exact and cheap, and applying again to the same document (redo) returns the identical
result. Bad indices raise :class:`~outlinebench.errors.CommandError` naming what is missing.

Addressing points
-----------------
Points are named by :class:`PointRef` ``(outline, contour, segment, index)``; the naming
rules (canonical names, nodes) live in :mod:`outlinebench.model.point_names`, and the names
are exported here too.

Moving points
-------------
How handles follow a moved point (smooth joins keep their handles collinear, a line fixes the
tangent, ``break_join`` and ``symmetric``) is :mod:`outlinebench.model.handle_rules`.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import replace

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import CommandError, InvalidGeometryError
from outlinebench.geometry.bezier import KIND_BY_DEGREE, bernstein_matrix, elevate, split
from outlinebench.geometry.fit import (
    FIT_SAMPLES_PER_SEGMENT,
    fit_chain,
    max_deviation,
)
from outlinebench.model.document import (
    JOIN_INTENTS,
    Contour,
    Document,
    JoinIntent,
    Outline,
    documents_equal,
)
from outlinebench.model.handle_rules import (
    SMOOTH_ANGLE_TOLERANCE_DEG,
    _freeze,
    _move_in_contour,
)
from outlinebench.model.point_names import (
    PointRef,
    SegmentRef,
    _check_ref,
    _check_segment,
    _contour_at,
    _group_keys,
    _key,
    canonical_ref,
    handle_refs,
    is_on_curve,
    node_of,
    node_ref,
    on_curve_refs,
    point_position,
    point_refs,
)

__all__ = [
    "SMOOTH_ANGLE_TOLERANCE_DEG",
    "DEGREE_LOWERING_TOLERANCE",
    "PointRef",
    "SegmentRef",
    "canonical_ref",
    "node_ref",
    "node_of",
    "is_on_curve",
    "point_position",
    "on_curve_refs",
    "handle_refs",
    "point_refs",
    "Command",
    "CommandGroup",
    "MovePoints",
    "SetPoint",
    "InsertPoint",
    "DeletePoint",
    "ChangeDegree",
    "SetJoinIntent",
    "SetClosed",
    "ReverseContour",
    "AddContour",
    "DeleteContour",
]

FloatArray = NDArray[np.float64]

# Default largest shape change (document units, Hausdorff distance) allowed when lowering a
# segment's degree: 0.01 user units is 2.6 µm at 96 px per inch.
DEGREE_LOWERING_TOLERANCE = 0.01
# Samples (uniform in t) used for the least-squares degree lowering.
_LOWERING_SAMPLES = 65
# Units in the last place searched around each inner coordinate when looking for a
# lower-degree segment that elevates to exactly the given control points.
_EXACT_LOWERING_ULPS = 4


# -- command base ---------------------------------------------------------------------------


class Command:
    """Base of every edit. Subclasses implement ``_compute(doc) -> Document``."""

    label: str = "Edit"

    def __init__(self) -> None:
        self._before: Document | None = None
        self._after: Document | None = None

    def _compute(self, doc: Document) -> Document:  # pragma: no cover - abstract
        raise NotImplementedError

    def apply(self, doc: Document) -> Document:
        """The edited document (see the module docstring).

        Raises
        ------
        CommandError
            An index is out of range, or the edit cannot be made on this document.
        """
        if self._before is not None and doc is self._before:
            assert self._after is not None
            return self._after
        new = self._compute(doc)
        self._before, self._after = doc, new
        return new

    def revert(self, doc: Document) -> Document:
        """The document this command was last applied to.

        Raises
        ------
        CommandError
            The command was never applied, or ``doc`` is not the document it produced.
        """
        if self._after is None or self._before is None:
            raise CommandError(f"cannot undo '{self.label}': it was never applied")
        if doc is self._after or documents_equal(doc, self._after):
            return self._before
        raise CommandError(
            f"cannot undo '{self.label}': the document has changed since it was applied"
        )

    def merge(self, other: Command) -> bool:
        """Absorb ``other`` (applied right after this command); False if they do not combine."""
        return False

    def _absorb(self, other: Command) -> None:
        self._after = other._after

    def _follows(self, other: Command) -> bool:
        return self._after is not None and other._before is self._after

    def __repr__(self) -> str:
        return f"<{type(self).__name__} {self.label!r}>"


class CommandGroup(Command):
    """Several commands done and undone as one step (a drag, a multi-part repair)."""

    def __init__(self, label: str, commands: Sequence[Command] = ()) -> None:
        super().__init__()
        self.label = label
        self.commands: list[Command] = list(commands)

    def _compute(self, doc: Document) -> Document:
        for cmd in self.commands:
            doc = cmd.apply(doc)
        return doc

    def revert(self, doc: Document) -> Document:
        if self._after is not None and doc is self._after and self._before is not None:
            # Undo each part (checks the chain) and hand back the identical document.
            for cmd in reversed(self.commands):
                doc = cmd.revert(doc)
            return self._before
        for cmd in reversed(self.commands):
            doc = cmd.revert(doc)
        return doc

    def _record(self, before: Document, after: Document) -> None:
        self._before, self._after = before, after


def _replace_contours(doc: Document, changes: dict[tuple[int, int], Contour]) -> Document:
    by_outline: dict[int, dict[int, Contour]] = {}
    for (o, c), new in changes.items():
        by_outline.setdefault(o, {})[c] = new
    outlines = list(doc.outlines)
    for o, repl in by_outline.items():
        old = outlines[o]
        contours = tuple(repl.get(i, x) for i, x in enumerate(old.contours))
        outlines[o] = replace(old, contours=contours)
    return replace(doc, outlines=tuple(outlines))


def _as_xy(v: ArrayLike, what: str) -> FloatArray:
    try:
        a = np.array(v, dtype=np.float64).reshape(2)
    except (TypeError, ValueError):
        raise CommandError(f"{what} must be two numbers (x, y), got {v!r}") from None
    if not np.all(np.isfinite(a)):
        raise CommandError(f"{what} must be finite, got {tuple(a)}")
    return a


class MovePoints(Command):
    """Move control points by ``delta`` (handles follow on-curve points; see module notes).

    Parameters
    ----------
    refs : iterable of PointRef
        Points to move, in any name (duplicates and both names of one point count once).
    delta : (dx, dy)
        Translation in document units.
    break_join : bool
        A moved handle moves alone and its join becomes a corner.
    symmetric : bool
        The opposite handle mirrors a moved handle; its join becomes smooth.
    """

    def __init__(
        self,
        refs: Iterable[PointRef],
        delta: ArrayLike,
        *,
        break_join: bool = False,
        symmetric: bool = False,
    ) -> None:
        super().__init__()
        self.refs = tuple(PointRef(*r) for r in refs)
        self.delta = _as_xy(delta, "a move")
        self.break_join = break_join
        self.symmetric = symmetric
        self._keys: frozenset | None = None
        count = len({(r.outline, r.contour, r.segment, r.index) for r in self.refs})
        self.label = "Move point" if count == 1 else "Move points"

    def _compute(self, doc: Document) -> Document:
        groups = _group_keys(doc, self.refs)
        self._keys = frozenset((oc, k) for oc, ks in groups.items() for k in ks)
        changes = {
            oc: _move_in_contour(
                doc.contour(*oc),
                ks,
                self.delta,
                break_join=self.break_join,
                symmetric=self.symmetric,
            )
            for oc, ks in groups.items()
        }
        return _replace_contours(doc, changes)

    def merge(self, other: Command) -> bool:
        if (
            isinstance(other, MovePoints)
            and self._follows(other)
            and self._keys is not None
            and self._keys == other._keys
            and self.break_join == other.break_join
            and self.symmetric == other.symmetric
        ):
            self.delta = self.delta + other.delta
            self._absorb(other)
            return True
        return False


class SetPoint(Command):
    """Put one control point at exact coordinates (numeric entry).

    Parameters
    ----------
    ref : PointRef
    xy : (x, y)
        New position in document units; the point gets exactly these values.
    move_handles : bool
        For an on-curve point, its handles move by the same amount (default True).

    Notes
    -----
    Other handles follow the rules of :class:`MovePoints` (smooth joins stay collinear). A
    handle set next to a smooth join whose other side is a line is not projected onto the
    line's direction (it gets exactly ``xy``); when ``xy`` leaves that direction the join's
    intent becomes corner.
    """

    label = "Set point"

    def __init__(self, ref: PointRef, xy: ArrayLike, *, move_handles: bool = True) -> None:
        super().__init__()
        self.ref = PointRef(*ref)
        self.xy = _as_xy(xy, "a position")
        self.move_handles = move_handles

    def _compute(self, doc: Document) -> Document:
        c = _check_ref(doc, self.ref)
        key = _key(c, self.ref.segment, self.ref.index)
        old = c.segments[self.ref.segment][self.ref.index]
        delta = self.xy - old
        new = _move_in_contour(
            c, [key], delta, targets={key: self.xy.copy()}, move_handles=self.move_handles
        )
        return doc.replace_contour(self.ref.outline, self.ref.contour, new)

    def merge(self, other: Command) -> bool:
        if (
            isinstance(other, SetPoint)
            and self._follows(other)
            and other.ref == self.ref
            and other.move_handles == self.move_handles
        ):
            self.xy = other.xy
            self._absorb(other)
            return True
        return False


# -- structure of one contour ---------------------------------------------------------------


class InsertPoint(Command):
    """Split a segment at parameter t into two of the same kind (the shape is unchanged).

    Parameters
    ----------
    outline, contour, segment : int
    t : float
        Strictly between 0 and 1.

    Attributes
    ----------
    new_ref : PointRef
        The inserted on-curve point (start of segment ``segment + 1``).

    Notes
    -----
    de Casteljau subdivision (Farin, *Curves and Surfaces for CAGD*, §4.4) is exact: both
    pieces together trace the same curve. The new join's intent is smooth.
    """

    label = "Insert point"

    def __init__(self, outline: int, contour: int, segment: int, t: float) -> None:
        super().__init__()
        self.outline, self.contour, self.segment = outline, contour, segment
        self.t = float(t)
        self.new_ref = PointRef(outline, contour, segment + 1, 0)

    def _compute(self, doc: Document) -> Document:
        c = _contour_at(doc, self.outline, self.contour)
        seg = _check_segment(c, self.outline, self.contour, self.segment)
        if not 0.0 < self.t < 1.0:
            raise CommandError(f"a point is inserted at t strictly between 0 and 1, got {self.t}")
        left, right = split(seg, self.t)
        left[0] = seg[0]
        right[-1] = seg[-1]
        right[0] = left[-1]
        i = self.segment
        segments = c.segments[:i] + (_freeze(left), _freeze(right)) + c.segments[i + 1 :]
        joins = c.joins[:i] + ("smooth",) + c.joins[i:]
        return doc.replace_contour(self.outline, self.contour, c.with_segments(segments, joins))


class DeletePoint(Command):
    """Delete an on-curve point, joining its two segments into one fitted cubic.

    Parameters
    ----------
    ref : PointRef
        The on-curve point (any of its names).
    tolerance : float or None
        If given, refuse (CommandError) when the shape would change by more than this.

    Attributes
    ----------
    deviation : float or None
        Measured shape change after ``apply``: the largest distance between the old and the
        new curve (:func:`outlinebench.geometry.fit.max_deviation`), in document units.

    Notes
    -----
    The new cubic keeps the outer end points and end tangent directions and is fitted to
    the old two segments by least squares (Schneider, *Graphics Gems*, 1990; see
    :func:`outlinebench.geometry.fit.fit_chain`). Two lines are joined into one line. The end
    point of an open contour is removed with its segment.
    """

    label = "Delete point"

    def __init__(self, ref: PointRef, *, tolerance: float | None = None) -> None:
        super().__init__()
        self.ref = PointRef(*ref)
        self.tolerance = tolerance
        self.deviation: float | None = None

    def _compute(self, doc: Document) -> Document:
        c = _check_ref(doc, self.ref)
        key = _key(c, self.ref.segment, self.ref.index)
        if key[0] != "n":
            raise CommandError(
                f"point {self.ref.index} of segment {self.ref.segment} is a handle; "
                "only on-curve points can be deleted (lower the segment's degree instead)"
            )
        node = key[1]
        n = len(c.segments)
        if n < 2:
            raise CommandError(
                "a contour of one segment cannot lose a point; delete the contour instead"
            )
        if c.closed and n == 2:
            # One cubic from a point back to itself, keeping both end tangents, collapses
            # when the tangents are parallel (a smooth start) and is rarely what was meant.
            raise CommandError(
                "a closed contour of two segments cannot lose a point (one segment cannot "
                "close on itself with both tangents kept); delete the contour instead"
            )
        segs = list(c.segments)
        joins = list(c.joins)
        if not c.closed and node in (0, n):
            if node == 0:
                removed, kept = segs[0], segs[1]
                new_segs, new_joins = segs[1:], joins[1:]
                old_chain, new_chain = [removed, kept], [kept]
            else:
                removed, kept = segs[-1], segs[-2]
                new_segs, new_joins = segs[:-1], joins[:-1]
                old_chain, new_chain = [kept, removed], [kept]
        else:
            if c.closed and node == 0:
                # Rotate so that the point is interior: start at node 1.
                segs = segs[1:] + segs[:1]
                joins = joins[1:] + joins[:1]
                node = n - 1
            a, b = segs[node - 1], segs[node]
            if a.shape[0] == 2 and b.shape[0] == 2:
                merged = np.array([a[0], b[-1]])
            else:
                merged = fit_chain([a, b], samples_per_segment=FIT_SAMPLES_PER_SEGMENT)
            merged[0] = a[0]
            merged[-1] = b[-1]
            merged = _freeze(merged)
            new_segs = segs[: node - 1] + [merged] + segs[node + 1 :]
            new_joins = joins[: node - 1] + joins[node:]
            old_chain, new_chain = [a, b], [merged]
        self.deviation = max_deviation(old_chain, new_chain)
        if self.tolerance is not None and self.deviation > self.tolerance:
            raise CommandError(
                f"deleting this point changes the shape by {self.deviation:.6g}, more than the "
                f"tolerance {self.tolerance:.6g}"
            )
        new = replace(c, segments=tuple(new_segs), joins=tuple(new_joins))
        return doc.replace_contour(self.ref.outline, self.ref.contour, new)


def _exact_lower(seg: FloatArray, degree: int) -> FloatArray | None:
    """A segment of ``degree`` whose exact elevation is bit for bit ``seg``, or None.

    Inverting elevation (Farin §6.1) from the start, Q_i = (n P_i − i Q_{i−1}) / (n − i), or
    from the end, gives the lower-degree points up to rounding; the values within
    :data:`_EXACT_LOWERING_ULPS` units in the last place of either (and of their mean) are
    tried, each coordinate on its own (elevation does not mix x and y). Where several fit,
    the one with the shortest decimal form is kept.
    """
    if degree == 1:
        q = np.array([seg[0], seg[-1]])
    else:  # cubic to quadratic: one inner point
        ahead = (3.0 * seg[1] - seg[0]) / 2.0
        back = (3.0 * seg[2] - seg[3]) / 2.0
        if np.max(np.abs(ahead - back)) > 64.0 * np.spacing(np.max(np.abs(seg))):
            return None  # the two inversions disagree beyond rounding: not an elevation
        q = np.array([seg[0], ahead, seg[-1]])
        for d in (0, 1):
            fits = []
            for guess in (ahead[d], back[d], 0.5 * (ahead[d] + back[d])):
                for k in range(-_EXACT_LOWERING_ULPS, _EXACT_LOWERING_ULPS + 1):
                    v = float(guess)
                    for _ in range(abs(k)):
                        v = float(np.nextafter(v, math.copysign(math.inf, k)))
                    q[1, d] = v
                    e = elevate(q)
                    if e[1, d] == seg[1, d] and e[2, d] == seg[2, d]:
                        fits.append(v)
            if not fits:
                return None
            # Several values may elevate to the same bits: the shortest decimal is the one
            # most likely typed or read from a file.
            q[1, d] = min(fits, key=lambda v: (len(repr(v)), abs(v - ahead[d])))
    e = q
    while e.shape[0] < seg.shape[0]:
        e = elevate(e)
    return q if np.array_equal(e, seg) else None


def _lower(seg: FloatArray, degree: int) -> FloatArray:
    """Least-squares lower-degree segment with the same end points (same parametrisation)."""
    t = np.linspace(0.0, 1.0, _LOWERING_SAMPLES)
    target = bernstein_matrix(seg.shape[0] - 1, t) @ seg
    b = bernstein_matrix(degree, t)
    p0, pn = seg[0], seg[-1]
    out = np.empty((degree + 1, 2))
    out[0], out[-1] = p0, pn
    if degree >= 2:
        rhs = target - np.outer(b[:, 0], p0) - np.outer(b[:, -1], pn)
        inner, *_ = np.linalg.lstsq(b[:, 1:-1], rhs, rcond=None)
        out[1:-1] = inner
    return out


class ChangeDegree(Command):
    """Make a segment a line, quadratic or cubic.

    Parameters
    ----------
    ref : SegmentRef or PointRef
        The segment (a PointRef names its segment).
    degree : int
        1 (line), 2 (quadratic) or 3 (cubic).
    tolerance : float
        Largest shape change allowed when lowering (document units); default
        :data:`DEGREE_LOWERING_TOLERANCE`.

    Attributes
    ----------
    deviation : float or None
        Measured shape change after ``apply`` (0.0 for elevation, which is exact).

    Raises
    ------
    CommandError
        From ``apply``: the lowered segment would deviate by more than ``tolerance``; the
        message gives the measured deviation.

    Notes
    -----
    Elevation is exact (Farin §6.1). Lowering first looks for a lower-degree segment whose
    elevation is bit for bit the given one (nearly every segment made by elevating; a few
    leave no such preimage after rounding) and takes it, with deviation 0. Otherwise it is a
    least-squares fit with end points kept, in the same parametrisation (Farin §6.3 discusses
    degree reduction), whose deviation is measured.
    """

    def __init__(
        self,
        ref: SegmentRef | PointRef,
        degree: int,
        tolerance: float = DEGREE_LOWERING_TOLERANCE,
    ) -> None:
        super().__init__()
        self.ref = SegmentRef(ref[0], ref[1], ref[2])
        if degree not in KIND_BY_DEGREE:
            raise CommandError(f"degree must be 1, 2 or 3 (line, quad, cubic), got {degree}")
        self.degree = degree
        self.tolerance = float(tolerance)
        self.deviation: float | None = None
        self.label = f"Make {KIND_BY_DEGREE[degree]}"

    def _compute(self, doc: Document) -> Document:
        o, ci, s = self.ref
        c = _contour_at(doc, o, ci)
        seg = _check_segment(c, o, ci, s)
        have = seg.shape[0] - 1
        if have == self.degree:
            raise CommandError(f"segment {s} is already a {KIND_BY_DEGREE[have]}")
        if self.degree > have:
            new = seg
            while new.shape[0] - 1 < self.degree:
                new = elevate(new)
            self.deviation = 0.0
        elif (exact := _exact_lower(seg, self.degree)) is not None:
            new = exact
            self.deviation = 0.0
        else:
            new = _lower(seg, self.degree)
            self.deviation = max_deviation([seg], [new])
            if self.deviation > self.tolerance:
                raise CommandError(
                    f"segment {s} cannot become a {KIND_BY_DEGREE[self.degree]} within "
                    f"{self.tolerance:.6g}: the shape would change by {self.deviation:.6g}"
                )
        new = np.array(new)
        new[0], new[-1] = seg[0], seg[-1]
        segments = c.segments[:s] + (_freeze(new),) + c.segments[s + 1 :]
        return doc.replace_contour(o, ci, c.with_segments(segments, c.joins))


class SetJoinIntent(Command):
    """State what a join is meant to be: "smooth", "corner", or None (unstated).

    The geometry is not changed.
    """

    def __init__(self, outline: int, contour: int, join: int, intent: JoinIntent | None) -> None:
        super().__init__()
        if intent is not None and intent not in JOIN_INTENTS:
            raise CommandError(
                f"join intent must be one of {', '.join(JOIN_INTENTS)} or None, got {intent!r}"
            )
        self.outline, self.contour, self.join, self.intent = outline, contour, join, intent
        self.label = (
            "Make join smooth"
            if intent == "smooth"
            else ("Make join corner" if intent == "corner" else "Clear join intent")
        )

    def _compute(self, doc: Document) -> Document:
        c = _contour_at(doc, self.outline, self.contour)
        if not 0 <= self.join < len(c.joins):
            raise CommandError(
                f"join {self.join} does not exist in contour {self.contour} of outline "
                f"{self.outline} (it has {len(c.joins)} joins)"
            )
        joins = c.joins[: self.join] + (self.intent,) + c.joins[self.join + 1 :]
        return doc.replace_contour(self.outline, self.contour, c.with_segments(c.segments, joins))


def _closing_snap(segments: Sequence[FloatArray]) -> float:
    """Largest end-to-start distance treated as rounding when closing a contour.

    The rule of :meth:`Contour.from_points`: 1e-9 of the contour's size (at least 1e-9 unit)
    plus 8 units in the last place of its largest coordinate.
    """
    every = np.concatenate(segments)
    size = float(np.max(np.ptp(every, axis=0)))
    far = float(np.max(np.abs(every)))
    return 1e-9 * max(1.0, size) + 8.0 * float(np.spacing(far))


class SetClosed(Command):
    """Close or open a contour.

    Closing a contour whose ends do not coincide adds a line segment from its end to its
    start; the new joins have no stated intent. Ends apart by no more than rounding (the
    tolerance :meth:`Contour.from_points` uses to make ends coincide) are made to coincide
    instead, by moving the last segment's end onto the start. Opening keeps every segment
    (the join at the start point is removed).
    """

    def __init__(self, outline: int, contour: int, closed: bool) -> None:
        super().__init__()
        self.outline, self.contour, self.closed = outline, contour, bool(closed)
        self.label = "Close contour" if closed else "Open contour"

    def _compute(self, doc: Document) -> Document:
        c = _contour_at(doc, self.outline, self.contour)
        if c.closed == self.closed:
            raise CommandError(
                f"contour {self.contour} of outline {self.outline} is already "
                f"{'closed' if c.closed else 'open'}"
            )
        if not c.segments:
            raise CommandError("an empty contour cannot be closed")
        if not self.closed:
            new = Contour(c.segments, False, c.joins[:-1])
        else:
            start, end = c.segments[0][0], c.segments[-1][-1]
            segs = c.segments
            joins = c.joins
            if np.array_equal(start, end):
                pass
            elif float(np.max(np.abs(end - start))) <= _closing_snap(segs):
                # Ends apart by rounding only: move the end onto the start instead of
                # adding a line a few ulps long.
                last = segs[-1].copy()
                last[-1] = start
                segs = segs[:-1] + (_freeze(last),)
            else:
                segs = segs + (_freeze(np.array([end, start])),)
                joins = joins + (None,)
            new = Contour(segs, True, joins + (None,))
        return doc.replace_contour(self.outline, self.contour, new)


class ReverseContour(Command):
    """Traverse a contour the other way (a closed one keeps its start point)."""

    label = "Reverse contour"

    def __init__(self, outline: int, contour: int) -> None:
        super().__init__()
        self.outline, self.contour = outline, contour

    def _compute(self, doc: Document) -> Document:
        c = _contour_at(doc, self.outline, self.contour)
        segs = tuple(_freeze(s[::-1].copy()) for s in reversed(c.segments))
        if c.closed and c.joins:
            joins = tuple(reversed(c.joins[:-1])) + (c.joins[-1],)
        else:
            joins = tuple(reversed(c.joins))
        return doc.replace_contour(self.outline, self.contour, Contour(segs, c.closed, joins))


class AddContour(Command):
    """Add a contour to an outline, or as a new outline.

    Parameters
    ----------
    outline : int
        An existing outline, or ``len(doc.outlines)`` to add a new outline (element
        ``path``, no id, created in the editor) holding just this contour.
    contour : Contour or sequence of control-point arrays
        Plain arrays are validated with :meth:`Contour.from_points` (open).
    index : int or None
        Position among the outline's contours (default: last).
    """

    label = "Add contour"

    def __init__(self, outline: int, contour: Contour, index: int | None = None) -> None:
        super().__init__()
        if not isinstance(contour, Contour):
            try:
                contour = Contour.from_points(contour)
            except InvalidGeometryError as exc:
                raise CommandError(f"cannot add the contour: {exc}") from None
        self.outline, self.contour, self.index = outline, contour, index

    @property
    def new_ref(self) -> tuple[int, int]:
        """(outline, contour) of the added contour once applied."""
        if self._before is None:
            raise CommandError("the contour has not been added yet")
        if self.outline == len(self._before.outlines):
            return (self.outline, 0)
        n = len(self._before.outlines[self.outline].contours)
        return (self.outline, n if self.index is None else self.index)

    def _compute(self, doc: Document) -> Document:
        if self.outline == len(doc.outlines):
            return replace(doc, outlines=doc.outlines + (Outline((self.contour,)),))
        if not 0 <= self.outline < len(doc.outlines):
            raise CommandError(
                f"outline {self.outline} does not exist (the document has "
                f"{len(doc.outlines)} outlines; use {len(doc.outlines)} for a new one)"
            )
        o = doc.outlines[self.outline]
        n = len(o.contours)
        i = n if self.index is None else self.index
        if not 0 <= i <= n:
            raise CommandError(
                f"cannot add a contour at position {i} of outline {self.outline} "
                f"(it has {n} contours)"
            )
        contours = o.contours[:i] + (self.contour,) + o.contours[i:]
        return doc.replace_outline(self.outline, replace(o, contours=contours))


class DeleteContour(Command):
    """Remove a contour from its outline (the outline itself stays, possibly empty)."""

    label = "Delete contour"

    def __init__(self, outline: int, contour: int) -> None:
        super().__init__()
        self.outline, self.contour = outline, contour

    def _compute(self, doc: Document) -> Document:
        _contour_at(doc, self.outline, self.contour)
        o = doc.outlines[self.outline]
        contours = o.contours[: self.contour] + o.contours[self.contour + 1 :]
        return doc.replace_outline(self.outline, replace(o, contours=contours))
