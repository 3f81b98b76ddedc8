"""Editing gestures as Qt-free state machines driven by pointer events.

The editor turns each mouse event into a :class:`PointerEvent` in document units and hands it
to the active tool's :meth:`Tool.handle`; tests drive the same tools headless. Every edit a
tool makes goes through the shared :class:`~outlinebench.model.history.History` as commands,
so it can be undone; a drag is one history group (one undo step).

API
---
``PointerEvent(kind, x, y, button="left", add_to_selection=False, break_join=False,
symmetric=False)``
    ``kind`` is "press", "move" or "release"; moves with no button held (hover) use
    ``button="none"``. The flags are the modifier keys' meanings, decided by the editor.
``Selection()``
    Ordered set of selected points under canonical names (:class:`PointRef`), with a
    ``primary`` (last picked) point: ``refs``, ``set(refs)``, ``add(refs)``, ``toggle(ref)``,
    ``clear()``, ``prune(doc)``, ``subscribe(callback)``; ``ref in selection``. Tools use only
    ``refs``, ``set``, ``add``, ``toggle``, ``clear`` and ``in``, so an editor may pass its own
    object with those members instead.
``SelectTool(history, selection, pick_radius=...)``
    Press on a point picks it (replacing the selection, or toggling it with
    ``add_to_selection``); press and drag moves the selection (or the picked point if it was
    not selected) — one undo step per drag, smooth joins kept, ``break_join`` / ``symmetric``
    as in :class:`MovePoints`. Press on empty space and drag draws a rubber band selecting the
    on-curve points inside on release (added with ``add_to_selection``); a click on empty
    space clears the selection. Hover sets ``hover`` (the point under the pointer).
``InsertPointTool(history, selection, pick_radius=...)``
    Hover shows the nearest point of the nearest segment within the pick radius
    (``overlay().segment_hit``); a press there splits the segment (:class:`InsertPoint`) and
    selects the new point.
``DrawContourTool(history, selection, pick_radius=...)``
    A click adds a corner point; press and drag adds a smooth point whose outgoing handle
    follows the pointer (the incoming one mirrors it); a click within the pick radius of the
    first point closes the contour and adds it to the document as one undo step.
    ``finish()`` adds an open contour (two points or more), ``cancel()`` drops the draft.
``nudge(history, selection, dx, dy)``
    Moves the selected points; consecutive nudges of the same points merge into one step.
Every tool has ``handle(event) -> bool`` (True when the document, selection or overlay
changed and the view should repaint), ``cancel()`` (takes back an unfinished gesture),
``overlay() -> Overlay`` (what to draw over the document), ``busy`` (a gesture is in
progress), ``message`` (last thing to tell the user, or None) and a mutable ``pick_radius``
in document units (set it when the zoom changes).

Helpers: :func:`pick_point`, :func:`points_in_rect`, :func:`nearest_segment` and
:class:`Selection` live in :mod:`outlinebench.model.picking` (exported here too).
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import CommandError, InvalidGeometryError
from outlinebench.model.commands import (
    AddContour,
    InsertPoint,
    MovePoints,
    PointRef,
    is_on_curve,
)
from outlinebench.model.document import Contour, Document, frozen_points
from outlinebench.model.history import History
from outlinebench.model.picking import (
    SegmentHit,
    Selection,
    nearest_segment,
    pick_point,
    points_in_rect,
)

__all__ = [
    "DEFAULT_PICK_RADIUS",
    "DRAG_THRESHOLD_FRACTION",
    "END_PARAMETER_MARGIN",
    "PointerEvent",
    "Selection",
    "SegmentHit",
    "Overlay",
    "Tool",
    "SelectTool",
    "InsertPointTool",
    "DrawContourTool",
    "pick_point",
    "points_in_rect",
    "nearest_segment",
    "nudge",
]

FloatArray = NDArray[np.float64]

# How close (document units) the pointer must be to a point or segment to pick it, when the
# editor has not set a radius from its zoom.
DEFAULT_PICK_RADIUS = 4.0
# A press becomes a drag once the pointer has moved this fraction of the pick radius.
DRAG_THRESHOLD_FRACTION = 0.25
# A point is not inserted closer than this (in t) to a segment's end points.
END_PARAMETER_MARGIN = 1e-6


@dataclass(frozen=True, slots=True)
class PointerEvent:
    """One pointer event in document units.

    Parameters
    ----------
    kind : "press", "move" or "release"
    x, y : float
        Position in document (root user) units.
    button : "left", "middle", "right" or "none"
        The button pressed or released; for moves, the button held ("none" when hovering).
    add_to_selection, break_join, symmetric : bool
        Modifier meanings (the editor maps keys to them).
    """

    kind: Literal["press", "move", "release"]
    x: float
    y: float
    button: Literal["left", "middle", "right", "none"] = "left"
    add_to_selection: bool = False
    break_join: bool = False
    symmetric: bool = False

    @property
    def xy(self) -> FloatArray:
        return np.array([self.x, self.y], dtype=np.float64)


@dataclass(frozen=True)
class Overlay:
    """What a tool wants drawn over the document (all in document units)."""

    rubber_band: tuple[float, float, float, float] | None = None
    hover_point: PointRef | None = None
    segment_hit: SegmentHit | None = None
    draft_segments: tuple[FloatArray, ...] = ()
    draft_points: tuple[tuple[float, float], ...] = ()
    draft_handles: tuple[tuple[tuple[float, float], tuple[float, float]], ...] = ()
    draft_to_pointer: FloatArray | None = None
    close_target: bool = False


def nudge(
    history: History, selection: Selection | Iterable[PointRef], dx: float, dy: float
) -> Document:
    """Move the selected points by (dx, dy); repeated nudges merge into one undo step."""
    refs = selection.refs if isinstance(selection, Selection) else tuple(selection)
    if not refs:
        return history.document
    return history.do(MovePoints(refs, (dx, dy)))


# -- tools ----------------------------------------------------------------------------------


class Tool:
    """Base of the gesture tools (see the module docstring for the shared API)."""

    name = "tool"

    def __init__(
        self, history: History, selection: Selection, *, pick_radius: float = DEFAULT_PICK_RADIUS
    ) -> None:
        self.history = history
        self.selection = selection
        self.pick_radius = float(pick_radius)
        self.message: str | None = None

    @property
    def busy(self) -> bool:
        return False

    def handle(self, event: PointerEvent) -> bool:  # pragma: no cover - abstract
        raise NotImplementedError

    def cancel(self) -> None:
        """Take back an unfinished gesture (Esc, switching tools)."""

    def overlay(self) -> Overlay:
        return Overlay()

    @property
    def drag_threshold(self) -> float:
        return self.pick_radius * DRAG_THRESHOLD_FRACTION


class SelectTool(Tool):
    """Pick, rubber-band select and drag points and handles (see the module docstring)."""

    name = "select"

    def __init__(
        self,
        history: History,
        selection: Selection,
        *,
        pick_radius: float = DEFAULT_PICK_RADIUS,
        pick_handles: bool = True,
    ) -> None:
        super().__init__(history, selection, pick_radius=pick_radius)
        self.pick_handles = pick_handles
        self.hover: PointRef | None = None
        self._state: Literal["idle", "point", "drag", "band"] = "idle"
        self._press: FloatArray | None = None
        self._last: FloatArray | None = None
        self._band_end: FloatArray | None = None
        self._drag_refs: tuple[PointRef, ...] = ()
        self._band_add = False

    @property
    def busy(self) -> bool:
        return self._state != "idle"

    def handle(self, event: PointerEvent) -> bool:
        self.message = None
        pos = event.xy
        if event.kind == "press":
            if event.button != "left" or self._state != "idle":
                return False
            return self._on_press(event, pos)
        if event.kind == "move":
            if self._state == "idle":
                hover = pick_point(
                    self.history.document, pos, self.pick_radius, handles=self.pick_handles
                )
                changed = hover != self.hover
                self.hover = hover
                return changed
            return self._on_drag(event, pos)
        if event.kind == "release" and event.button in ("left", "none"):
            return self._on_release(event, pos)
        return False

    def _on_press(self, event: PointerEvent, pos: FloatArray) -> bool:
        doc = self.history.document
        hit = pick_point(doc, pos, self.pick_radius, handles=self.pick_handles)
        self._press = pos
        self._last = pos
        if hit is None:
            self._state = "band"
            self._band_end = pos
            self._band_add = event.add_to_selection
            return True
        if event.add_to_selection:
            if not self.selection.toggle(hit):
                # Deselected by this click: nothing to drag.
                self._state = "idle"
                return True
        elif hit not in self.selection:
            self.selection.set([hit])
        else:
            self.selection.set(self.selection.refs, hit)
        self._drag_refs = self.selection.refs if hit in self.selection else (hit,)
        self._state = "point"
        return True

    def _on_drag(self, event: PointerEvent, pos: FloatArray) -> bool:
        assert self._press is not None and self._last is not None
        if self._state == "band":
            self._band_end = pos
            return True
        if self._state == "point":
            if np.hypot(*(pos - self._press)) < self.drag_threshold:
                return False
            doc = self.history.document
            single_handle = len(self._drag_refs) == 1 and not is_on_curve(doc, self._drag_refs[0])
            self.history.begin_group("Drag handle" if single_handle else "Move points")
            self._state = "drag"
        delta = pos - self._last
        if not np.any(delta):
            return False
        try:
            self.history.do(
                MovePoints(
                    self._drag_refs,
                    delta,
                    break_join=event.break_join,
                    symmetric=event.symmetric,
                )
            )
        except CommandError as exc:
            self.message = str(exc)
            self.cancel()
            return True
        self._last = pos
        return True

    def _on_release(self, event: PointerEvent, pos: FloatArray) -> bool:
        state = self._state
        self._state = "idle"
        if state == "drag":
            self.history.end_group()
            return True
        if state == "band":
            assert self._press is not None
            small = np.hypot(*(pos - self._press)) < self.drag_threshold
            rect = (self._press[0], self._press[1], pos[0], pos[1])
            self._band_end = None
            if small:
                if not self._band_add:
                    self.selection.clear()
                return True
            inside = points_in_rect(self.history.document, rect)
            if self._band_add:
                self.selection.add(inside)
            else:
                self.selection.set(inside)
            return True
        return state != "idle"

    def cancel(self) -> None:
        if self._state == "drag" and self.history.in_group:
            self.history.abort_group()
        self._state = "idle"
        self._band_end = None

    def overlay(self) -> Overlay:
        band = None
        if self._state == "band" and self._press is not None and self._band_end is not None:
            band = (
                float(self._press[0]),
                float(self._press[1]),
                float(self._band_end[0]),
                float(self._band_end[1]),
            )
        return Overlay(rubber_band=band, hover_point=self.hover)


class InsertPointTool(Tool):
    """Split the segment under the pointer at its nearest point (shape unchanged)."""

    name = "insert"

    def __init__(
        self, history: History, selection: Selection, *, pick_radius: float = DEFAULT_PICK_RADIUS
    ) -> None:
        super().__init__(history, selection, pick_radius=pick_radius)
        self.hit: SegmentHit | None = None

    def handle(self, event: PointerEvent) -> bool:
        self.message = None
        doc = self.history.document
        if event.kind == "move":
            hit = nearest_segment(doc, event.xy, self.pick_radius)
            changed = hit != self.hit
            self.hit = hit
            return changed
        if event.kind != "press" or event.button != "left":
            return False
        hit = nearest_segment(doc, event.xy, self.pick_radius)
        if hit is None:
            self.message = "Click on a segment to insert a point there"
            return False
        if not END_PARAMETER_MARGIN < hit.t < 1.0 - END_PARAMETER_MARGIN:
            self.message = "That is an existing on-curve point; click between two of them"
            return False
        cmd = InsertPoint(hit.outline, hit.contour, hit.segment, hit.t)
        try:
            self.history.do(cmd)
        except CommandError as exc:
            self.message = str(exc)
            return False
        self.selection.set([cmd.new_ref])
        self.hit = None
        return True

    def cancel(self) -> None:
        self.hit = None

    def overlay(self) -> Overlay:
        return Overlay(segment_hit=self.hit)


@dataclass
class _DraftNode:
    pos: FloatArray
    handle_in: FloatArray | None = None
    handle_out: FloatArray | None = None

    @property
    def smooth(self) -> bool:
        return self.handle_out is not None


def _draft_segment(a: _DraftNode, b: _DraftNode) -> FloatArray:
    """Line between two corner points, else a cubic; a missing handle points a third of the
    way towards the other side's nearest control point (so no handle has zero length)."""
    if a.handle_out is None and b.handle_in is None:
        return np.array([a.pos, b.pos])
    far_b = b.handle_in if b.handle_in is not None else b.pos
    p1 = a.handle_out if a.handle_out is not None else a.pos + (far_b - a.pos) / 3.0
    far_a = a.handle_out if a.handle_out is not None else a.pos
    p2 = b.handle_in if b.handle_in is not None else b.pos + (far_a - b.pos) / 3.0
    return np.array([a.pos, p1, p2, b.pos])


class DrawContourTool(Tool):
    """Draw a new contour point by point (see the module docstring).

    Parameters
    ----------
    target_outline : int or None
        Outline the finished contour joins; None (default) makes a new outline.
    """

    name = "draw"

    def __init__(
        self,
        history: History,
        selection: Selection,
        *,
        pick_radius: float = DEFAULT_PICK_RADIUS,
        target_outline: int | None = None,
    ) -> None:
        super().__init__(history, selection, pick_radius=pick_radius)
        self.target_outline = target_outline
        self.nodes: list[_DraftNode] = []
        self._pressed: _DraftNode | None = None
        self._press: FloatArray | None = None
        self._closing = False
        self._saved: tuple[FloatArray | None, FloatArray | None] = (None, None)
        self._pointer: FloatArray | None = None

    @property
    def busy(self) -> bool:
        return bool(self.nodes) or self._pressed is not None

    def _can_close(self) -> bool:
        if len(self.nodes) >= 3:
            return True
        return len(self.nodes) == 2 and any(n.smooth for n in self.nodes)

    def handle(self, event: PointerEvent) -> bool:
        self.message = None
        pos = event.xy
        if event.kind == "press":
            if event.button != "left" or self._pressed is not None:
                return False
            self._press = pos
            if self.nodes and np.hypot(*(pos - self.nodes[0].pos)) <= self.pick_radius:
                if self._can_close():
                    self._closing = True
                    self._pressed = self.nodes[0]
                    self._saved = (self.nodes[0].handle_in, self.nodes[0].handle_out)
                    return True
            if self.nodes and np.hypot(*(pos - self.nodes[-1].pos)) < self.drag_threshold:
                self.message = "A point is already there; press Enter to finish the contour"
                self._press = None
                return False
            self._pressed = _DraftNode(pos.copy())
            self._closing = False
            return True
        if event.kind == "move":
            self._pointer = pos
            node = self._pressed
            if node is None or self._press is None:
                return bool(self.nodes)
            if np.hypot(*(pos - self._press)) >= self.drag_threshold:
                node.handle_out = pos.copy()
                node.handle_in = 2.0 * node.pos - pos
            else:
                node.handle_in, node.handle_out = self._saved if self._closing else (None, None)
            return True
        if event.kind == "release" and self._pressed is not None:
            node = self._pressed
            self._pressed = None
            self._press = None
            if self._closing:
                self._closing = False
                return self._commit(closed=True)
            self.nodes.append(node)
            return True
        return False

    def finish(self) -> bool:
        """Add the draft as an open contour (needs two points or more); True if added."""
        if len(self.nodes) < 2:
            self.message = "A contour needs at least two points"
            self.cancel()
            return False
        return self._commit(closed=False)

    def cancel(self) -> None:
        self.nodes = []
        self._pressed = None
        self._press = None
        self._closing = False

    def draft_contour(self, closed: bool = False) -> Contour:
        """The contour the draft would become."""
        nodes = self.nodes
        pairs = list(zip(nodes, nodes[1:], strict=False))
        if closed:
            pairs.append((nodes[-1], nodes[0]))
        segs = [_draft_segment(a, b) for a, b in pairs]
        # Join k sits at node k + 1; a closed contour's last join at node 0.
        joins: list[str | None] = ["smooth" if n.smooth else "corner" for n in nodes[1 : len(segs)]]
        if closed:
            joins.append("smooth" if nodes[0].smooth else "corner")
        return Contour.from_points(segs, closed=closed, joins=joins)

    def _commit(self, closed: bool) -> bool:
        try:
            contour = self.draft_contour(closed)
        except InvalidGeometryError as exc:
            self.message = f"cannot add the contour: {exc}"
            return False
        doc = self.history.document
        outline = len(doc.outlines) if self.target_outline is None else self.target_outline
        cmd = AddContour(outline, contour)
        cmd.label = "Draw contour"
        try:
            self.history.do(cmd)
        except CommandError as exc:
            self.message = str(exc)
            return False
        self.cancel()
        self.selection.clear()
        return True

    def overlay(self) -> Overlay:
        nodes = list(self.nodes)
        if self._pressed is not None and not self._closing:
            nodes.append(self._pressed)
        segs = tuple(
            frozen_points(_draft_segment(a, b)) for a, b in zip(nodes, nodes[1:], strict=False)
        )
        handles = []
        for n in nodes:
            for h in (n.handle_in, n.handle_out):
                if h is not None:
                    handles.append(((float(n.pos[0]), float(n.pos[1])), (float(h[0]), float(h[1]))))
        to_pointer = None
        close_target = False
        if self.nodes and self._pressed is None and self._pointer is not None:
            last = self.nodes[-1]
            to_pointer = _draft_segment(last, _DraftNode(self._pointer))
            close_target = bool(
                np.hypot(*(self._pointer - self.nodes[0].pos)) <= self.pick_radius
                and self._can_close()
            )
        return Overlay(
            draft_segments=segs,
            draft_points=tuple((float(n.pos[0]), float(n.pos[1])) for n in nodes),
            draft_handles=tuple(handles),
            draft_to_pointer=to_pointer,
            close_target=close_target,
        )
