"""Edit rules of the editor that are model questions: what a selection means, the order points
are deleted in, how a segment is given a length, and whether a join reads smooth.

These rules used to live in the editor's session (``outlinebench.app.session``); they are
Qt-free and take plain point names (:class:`~outlinebench.model.point_names.PointRef` or
4-tuples), so scripts and tests can ask them without a window.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np

from outlinebench.errors import CommandError
from outlinebench.model.commands import Command, SetPoint
from outlinebench.model.document import Contour, Document
from outlinebench.model.handle_rules import _tangents_agree
from outlinebench.model.point_names import PointRef, canonical_ref, is_on_curve

__all__ = [
    "selected_contours",
    "selected_segments",
    "deletion_order",
    "join_reads_smooth",
    "segment_length_commands",
]


def selected_contours(refs: Iterable[Sequence[int]]) -> list[tuple[int, int]]:
    """``(outline, contour)`` of every contour with a selected point or handle, in order."""
    return sorted({(int(r[0]), int(r[1])) for r in refs})


def selected_segments(
    doc: Document, refs: Iterable[Sequence[int]], primary: Sequence[int] | None = None
) -> list[tuple[int, int, int]]:
    """The segments a selection means for segment edits (degree, length).

    A segment is meant when one of its handles is selected, or both of its end points are;
    when no segment is meant that way, the segment the primary point starts (or, at the end
    of an open contour, ends) is.

    Returns
    -------
    list of (outline, contour, segment), sorted.
    """
    sel = {tuple(int(v) for v in r) for r in refs}
    segs: set[tuple[int, int, int]] = set()
    for o, c, s, i in sel:
        k = doc.outlines[o].contours[c].segments[s].shape[0]
        if 0 < i < k - 1:
            segs.add((o, c, s))
    for o, c in selected_contours(sel):
        contour = doc.outlines[o].contours[c]
        for s, seg in enumerate(contour.segments):
            a = tuple(canonical_ref(doc, PointRef(o, c, s, 0)))
            b = tuple(canonical_ref(doc, PointRef(o, c, s, seg.shape[0] - 1)))
            if a in sel and b in sel:
                segs.add((o, c, s))
    if not segs and primary is not None:
        o, c, s, _ = (int(v) for v in primary)
        segs.add((o, c, s))
    return sorted(segs)


def deletion_order(doc: Document, refs: Iterable[Sequence[int]]) -> list[PointRef]:
    """The selected on-curve points in the order they can be deleted one by one.

    Handles are left out (a handle is not deleted alone). Points go from the end of each
    contour backwards, so deleting one never renames a point still to be deleted: a point's
    name counts segments from the contour's start, and deleting node ``k`` only renumbers
    the segments after ``k``.
    """
    on_curve = [PointRef(*r) for r in refs if is_on_curve(doc, PointRef(*r))]
    return sorted(on_curve, reverse=True)


def join_reads_smooth(contour: Contour, join: int) -> bool:
    """Whether join ``join`` counts as smooth: stated smooth, or stated nothing while its two
    tangent directions agree within
    :data:`~outlinebench.model.handle_rules.SMOOTH_ANGLE_TOLERANCE_DEG` — the rule a handle
    drag follows (and the canvas's join marks show)."""
    intent = contour.joins[join]
    if intent is not None:
        return intent == "smooth"
    inc, out = contour.join_segments(join)
    return _tangents_agree(contour.segments[inc], contour.segments[out])


def segment_length_commands(
    doc: Document, segment: Sequence[int], length: float, current: float
) -> list[Command]:
    r"""Commands giving segment ``(outline, contour, segment)`` the arc length ``length``.

    Parameters
    ----------
    doc : Document
    segment : (outline, contour, segment)
    length : float
        The wanted arc length, document units (> 0).
    current : float
        The segment's arc length now (the caller's measure, e.g. the one it displays).

    Returns
    -------
    list of Command
        To be done in order as one undo step: the end point first (its other handle moves
        with it, the rule of :class:`~outlinebench.model.commands.SetPoint`), then this
        segment's handles exactly.

    Raises
    ------
    CommandError
        ``length`` or ``current`` is not a number greater than zero.

    Notes
    -----
    The segment is scaled about its start point: control point :math:`P_i` moves to
    :math:`P_0 + k (P_i - P_0)` with :math:`k = L / L_0`. Uniform scaling multiplies arc
    length by :math:`k` exactly (the integrand :math:`|B'(t)|` of
    :math:`L = \int_0^1 |B'(t)|\,dt` scales by :math:`k`), so no iteration is needed; a
    line's end point simply moves along the line.
    """
    if not (math.isfinite(length) and length > 0.0 and math.isfinite(current) and current > 0.0):
        raise CommandError("a segment length must be greater than zero")
    o, c, s = (int(v) for v in segment)
    points = doc.contour(o, c).segments[s]
    k = length / current
    p0 = points[0]
    targets = [p0 + k * (points[i] - p0) for i in range(1, points.shape[0])]
    last = points.shape[0] - 1
    order = [last, *range(1, last)]
    return [
        SetPoint(PointRef(o, c, s, i), tuple(float(v) for v in np.asarray(targets[i - 1])))
        for i in order
    ]
