"""The editing session behind one window: history, selection, the active tool, as Qt signals.

The session owns the model's :class:`~outlinebench.model.history.History`; every edit it makes
is a model command pushed there. Widgets listen to its signals and call its methods; none of
them changes a document directly. Core errors (:class:`OutlinebenchError`) from a command are
caught here and reported through the ``message`` signal, so a refused edit never takes the
editor down.
"""

from __future__ import annotations

import gc
from collections.abc import Iterable

import numpy as np
from PySide6.QtCore import QObject, Qt, Signal
from PySide6.QtGui import QKeyEvent, QMouseEvent

from outlinebench.app import point_keys as pk
from outlinebench.app.units import MM_PER_UNIT_NAME, DisplayUnits, display_units
from outlinebench.errors import OutlinebenchError
from outlinebench.model import commands as cmds
from outlinebench.model import edit_rules as rules
from outlinebench.model import tools
from outlinebench.model.document import Document
from outlinebench.model.history import History
from outlinebench.model.point_names import PointRef

__all__ = ["EditorSession", "TOOLS", "NUDGE_STEPS", "BREAK_JOIN_MODIFIER", "SYMMETRIC_MODIFIER"]

# Tool name → (menu text, shortcut, icon, status tip).
TOOLS: dict[str, tuple[str, str, str, str]] = {
    "select": (
        "Select and move",
        "S",
        "tool-select",
        "Click a point to select it, Shift+click to add, drag a box to select several; drag "
        "points or handles to move them (Alt, or B to toggle: break a smooth join; Ctrl: keep "
        "handles equal)",
    ),
    "insert": (
        "Insert point",
        "I",
        "tool-insert",
        "Click on a segment to split it there; the shape does not change",
    ),
    "draw": (
        "Draw contour",
        "D",
        "tool-draw",
        "Click for a corner point, press and drag for a smooth point with handles; click the "
        "first point to close; Enter ends an open contour, Esc cancels",
    ),
}

# Arrow-key nudge (plain, with Shift) in the displayed unit.
NUDGE_STEPS: dict[str, tuple[float, float]] = {
    "mm": (0.1, 1.0),
    "cm": (0.01, 0.1),
    "in": (0.005, 0.05),
    "pt": (0.5, 5.0),
    "pc": (0.05, 0.5),
    "px": (1.0, 10.0),
}

# While dragging a handle: Alt moves it alone and makes its join a corner; Ctrl mirrors the
# opposite handle (equal lengths) and makes the join smooth.
BREAK_JOIN_MODIFIER = Qt.KeyboardModifier.AltModifier
SYMMETRIC_MODIFIER = Qt.KeyboardModifier.ControlModifier
ADD_TO_SELECTION_MODIFIER = Qt.KeyboardModifier.ShiftModifier


def _settle_garbage_collector() -> None:
    """Collect what the previous document left, then exclude everything alive now (the new
    document, the window) from Python's cyclic garbage collector.

    Python's collector walks all container objects tracked in its oldest generation now and
    then; with a large document and its findings that walk took about 20 ms, a dropped frame
    in the middle of a drag (benchmarks/bench_editor.py). Objects that live as long as the
    document need not be walked (``gc.freeze``, Python documentation, module gc); they are
    released as usual when no longer referenced, and cycles among them are collected at the
    next load (``gc.unfreeze`` first).
    """
    gc.unfreeze()
    gc.collect()
    gc.freeze()


class EditorSession(QObject):
    """History, selection and tools of one open document.

    Parameters
    ----------
    document : Document
        The document to start with (counts as saved).

    Signals
    -------
    changed
        The document changed (edit, undo, redo, load).
    selection_changed
        The selected points, or the point under the pointer, changed.
    message(str)
        Something to tell the user in the status bar (results, refused edits).
    tool_changed(str)
        The active tool's name.
    """

    changed = Signal()
    selection_changed = Signal()
    message = Signal(str)
    tool_changed = Signal(str)

    def __init__(self, document: Document, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.history = History(document)
        self.history.subscribe(self._on_history_changed)
        self.selection = tools.Selection()
        self.selection.subscribe(self.selection_changed.emit)
        self.unit_name = ""  # "" = the unit the file was written in, else a unit name
        self._units = display_units(document)
        self._forced_dirty = False  # restored from a recovery file: unsaved until saved
        # Ends of an open contour within this distance (user units) are merged when the
        # contour is closed instead of joined by a short line; the window sets it to the
        # check's gap tolerance.
        self.close_gap = 0.0
        self.tools: dict[str, tools.Tool] = {
            "select": tools.SelectTool(self.history, self.selection),
            "insert": tools.InsertPointTool(self.history, self.selection),
            "draw": tools.DrawContourTool(self.history, self.selection),
        }
        self.tool_name = "select"
        # Sticky form of the Alt modifier (Points ▸ Break smooth joins while dragging): many
        # desktops take Alt+drag for moving windows, so the break never depends on Alt alone.
        self.break_joins = False
        self.set_tool("select")

    @property
    def tool(self) -> tools.Tool:
        return self.tools[self.tool_name]

    @property
    def primary(self) -> PointRef | None:
        return self.selection.primary

    @property
    def hover(self) -> PointRef | None:
        tool = self.tool
        return tool.hover if isinstance(tool, tools.SelectTool) else None

    # -- state --------------------------------------------------------------------------
    @property
    def document(self) -> Document:
        return self.history.document

    @property
    def units(self) -> DisplayUnits:
        return self._units

    @property
    def is_dirty(self) -> bool:
        return self.history.is_dirty or self._forced_dirty

    @property
    def can_undo(self) -> bool:
        return self.history.can_undo

    @property
    def can_redo(self) -> bool:
        return self.history.can_redo

    @property
    def undo_label(self) -> str:
        return self.history.undo_label or ""

    @property
    def redo_label(self) -> str:
        return self.history.redo_label or ""

    def mark_saved(self) -> None:
        self.history.mark_saved()
        self._forced_dirty = False
        self.changed.emit()

    def _units_for(self, document: Document) -> DisplayUnits:
        if self.unit_name in MM_PER_UNIT_NAME and document.mm_per_unit > 0:
            auto = display_units(document)
            if auto.name == self.unit_name:
                return auto
            factor = document.mm_per_unit / MM_PER_UNIT_NAME[self.unit_name]
            decimals = {"mm": 3, "cm": 4, "in": 4, "pt": 2, "pc": 3, "px": 2}[self.unit_name]
            return DisplayUnits(self.unit_name, factor, decimals)
        return display_units(document)

    def set_unit_name(self, name: str) -> None:
        """Show lengths in ``name`` (mm, cm, in, pt, pc, px), or "" for the file's own unit."""
        self.unit_name = name if name in MM_PER_UNIT_NAME else ""
        self._units = self._units_for(self.document)
        self.changed.emit()
        self.selection_changed.emit()

    def load(self, document: Document, *, dirty: bool = False) -> None:
        """Start over with another document (a file was opened); ``dirty``: it holds work
        not saved anywhere yet (restored from a recovery file)."""
        self._cancel_gesture()
        self._units = self._units_for(document)
        self._forced_dirty = dirty
        self.selection.clear()
        self.tools["select"].hover = None
        self.history.reset(document)
        _settle_garbage_collector()

    def _on_history_changed(self, old: Document, new: Document) -> None:
        # Selected points that no longer exist are dropped, the rest renamed canonically.
        self.selection.prune(new)
        select = self.tools["select"]
        if select.hover is not None and not pk.exists(new, select.hover):
            select.hover = None
        self.changed.emit()

    # -- selection ----------------------------------------------------------------------
    def selected_points(self) -> set[PointRef]:
        return set(self.selection.refs)

    def set_selection(self, keys: Iterable[PointRef], primary: PointRef | None = None) -> None:
        doc = self.document
        refs = [cmds.canonical_ref(doc, PointRef(*k)) for k in keys]
        if primary is not None:
            primary = cmds.canonical_ref(doc, PointRef(*primary))
        self.selection.set(refs, primary)

    def select_all(self) -> None:
        doc = self.document
        keys = [
            r
            for oi, o in enumerate(doc.outlines)
            for ci, _c in enumerate(o.contours)
            for r in cmds.point_refs(doc, oi, ci)
        ]
        self.set_selection(keys)
        self.message.emit(f"{len(keys)} points selected")

    def _selected_contours(self) -> list[tuple[int, int]]:
        return rules.selected_contours(self.selection.refs)

    def available_edits(self) -> dict[str, bool]:
        """Which menu edits can do something with the current selection.

        Keys: ``delete`` (an on-curve point is selected; handles alone cannot be deleted),
        ``join`` (a selected point or handle belongs to a join, not a free end), ``reverse``
        and ``delete_contour`` (anything selected), ``close`` (a selected contour is open),
        ``degree1``/``degree2``/``degree3`` (a selected segment has another degree).
        """
        doc = self.document
        refs = [k for k in self.selection.refs if pk.exists(doc, k)]
        on_curve = [k for k in refs if pk.is_on_curve(doc, k)]
        owners = on_curve + [pk.owner_of_handle(doc, k) for k in refs if k not in on_curve]
        contours = {(k[0], k[1]) for k in refs}
        degrees = (
            {doc.contour(o, c).segments[s].shape[0] - 1 for o, c, s in self._selected_segments()}
            if refs
            else set()
        )
        return {
            "delete": bool(on_curve),
            "join": any(pk.join_of(doc, k) is not None for k in owners),
            "reverse": bool(contours),
            "delete_contour": bool(contours),
            "close": any(not doc.contour(o, c).closed for o, c in contours),
            **{f"degree{d}": bool(degrees - {d}) for d in (1, 2, 3)},
        }

    # -- running commands ---------------------------------------------------------------
    def do(self, command: cmds.Command) -> bool:
        """Push one command; on a core error report it and leave the document as it was."""
        try:
            self.history.do(command)
        except OutlinebenchError as exc:
            self.message.emit(f"{command.label}: not done — {exc}")
            return False
        return True

    def _do_group(self, label: str, commands: Iterable[cmds.Command]) -> list[cmds.Command]:
        """Push several commands as one undo step; all or nothing."""
        done: list[cmds.Command] = []
        try:
            with self.history.group(label):
                for c in commands:
                    self.history.do(c)
                    done.append(c)
        except OutlinebenchError as exc:
            self.message.emit(f"{label}: not done — {exc}")
            return []
        return done

    def undo(self) -> None:
        self._cancel_gesture()
        if not self.history.can_undo:
            self.message.emit("Nothing to undo")
            return
        label = self.history.undo_label
        try:
            self.history.undo()
        except OutlinebenchError as exc:
            self.message.emit(f"Undo: not done — {exc}")
            return
        self.message.emit(f"Undone: {label}")

    def redo(self) -> None:
        self._cancel_gesture()
        if not self.history.can_redo:
            self.message.emit("Nothing to redo")
            return
        label = self.history.redo_label
        try:
            self.history.redo()
        except OutlinebenchError as exc:
            self.message.emit(f"Redo: not done — {exc}")
            return
        self.message.emit(f"Redone: {label}")

    # -- numeric edits (selection panel) ------------------------------------------------
    def set_point(self, key: PointRef, x: float, y: float) -> None:
        self.do(cmds.SetPoint(PointRef(*key), (x, y)))

    def move_selection(self, dx: float, dy: float) -> None:
        """Move every selected point by (dx, dy) document units, as one command."""
        if self.selection.refs and (dx or dy):
            self.do(cmds.MovePoints(self.selection.refs, (dx, dy)))

    def set_handle_polar(self, key: PointRef, length: float, angle_deg: float) -> None:
        """Put a handle at ``length`` and on-screen ``angle_deg`` from its on-curve point."""
        doc = self.document
        owner = pk.owner_of_handle(doc, key)
        p = pk.point_at(doc, owner)
        a = np.radians(angle_deg)
        # screen angle: anticlockwise with y up; document y points down
        target = (float(p[0] + length * np.cos(a)), float(p[1] - length * np.sin(a)))
        self.do(cmds.SetPoint(PointRef(*key), target))

    def set_segment_length(self, seg: tuple[int, int, int], length: float) -> None:
        """Give one segment the arc length ``length`` (document units), as one undoable step
        (the segment is scaled about its start point:
        :func:`outlinebench.model.edit_rules.segment_length_commands`)."""
        from outlinebench.app.lengths import segment_length

        o, c, s = seg
        current = segment_length(self.document.contour(o, c).segments[s])
        try:
            commands = rules.segment_length_commands(self.document, seg, length, current)
        except OutlinebenchError:
            self.message.emit("A segment length must be greater than zero")
            return
        if self._do_group("Set segment length", commands):
            self.message.emit(f"Segment {s} is now {self.units.text(length)} long")

    def set_join_intent(self, key: PointRef, intent: str | None) -> None:
        doc = self.document
        j = pk.join_of(doc, key)
        if j is None:
            self.message.emit("The free end of an open contour has no join")
            return
        self.do(cmds.SetJoinIntent(key[0], key[1], j, intent))

    # -- menu edits ---------------------------------------------------------------------
    def nudge(self, dx_steps: float, dy_steps: float, large: bool) -> None:
        """Move the selection by whole nudge steps (see :data:`NUDGE_STEPS`)."""
        if not self.selection.refs:
            return
        u = self.units
        step = u.parse(NUDGE_STEPS.get(u.name, (1.0, 10.0))[1 if large else 0])
        try:
            tools.nudge(self.history, self.selection, dx_steps * step, dy_steps * step)
        except OutlinebenchError as exc:
            self.message.emit(f"Nudge: not done — {exc}")

    def toggle_join_intent(self) -> None:
        doc = self.document
        todo = []
        for key in self.selection.refs:
            on = key if pk.is_on_curve(doc, key) else pk.owner_of_handle(doc, key)
            j = pk.join_of(doc, on)
            if j is None:
                continue
            o, c = on[0], on[1]
            smooth = rules.join_reads_smooth(doc.outlines[o].contours[c], j)
            todo.append((o, c, j, "corner" if smooth else "smooth"))
        todo = list(dict.fromkeys(todo))
        if not todo:
            self.message.emit("Select an on-curve point where two segments meet")
            return
        self._do_group(
            "Toggle join intent", [cmds.SetJoinIntent(o, c, j, new) for o, c, j, new in todo]
        )
        kinds = {t[3] for t in todo}
        self.message.emit(f"{len(todo)} join(s) now stated as {' / '.join(sorted(kinds))}")

    def _selected_segments(self) -> list[tuple[int, int, int]]:
        """The segments the selection means
        (:func:`outlinebench.model.edit_rules.selected_segments`)."""
        return rules.selected_segments(self.document, self.selection.refs, self.primary)

    def set_degree(self, degree: int) -> None:
        segs = self._selected_segments()
        doc = self.document
        segs = [
            s
            for s in segs
            if doc.outlines[s[0]].contours[s[1]].segments[s[2]].shape[0] - 1 != degree
        ]
        if not segs:
            self.message.emit("No selected segment needs changing")
            return
        done = self._do_group(
            f"Make {'line' if degree == 1 else 'quadratic' if degree == 2 else 'cubic'}",
            [cmds.ChangeDegree(cmds.SegmentRef(*s), degree) for s in segs],
        )
        if done:
            dev = max(c.deviation or 0.0 for c in done)
            self.message.emit(
                f"{len(done)} segment(s) changed; shape changed by at most {self.units.text(dev)}"
            )

    def delete_selection(self) -> None:
        on_curve = rules.deletion_order(self.document, self.selection.refs)
        if not on_curve:
            if self.selection.refs:
                self.message.emit(
                    "Handles cannot be deleted alone; make the segment a line instead (Ctrl+1)"
                )
            return
        done = self._do_group(
            "Delete points" if len(on_curve) > 1 else "Delete point",
            [cmds.DeletePoint(PointRef(*k)) for k in on_curve],
        )
        if done:
            dev = max(c.deviation or 0.0 for c in done)
            self.set_selection([])
            self.message.emit(
                f"Deleted {len(done)} point(s); neighbouring segments refitted, shape changed "
                f"by at most {self.units.text(dev)}"
            )

    def reverse_contours(self) -> None:
        todo = self._selected_contours()
        if todo and self._do_group("Reverse contour", [cmds.ReverseContour(o, c) for o, c in todo]):
            self.set_selection([])
            self.message.emit(f"Reversed {len(todo)} contour(s)")

    def close_contours(self) -> None:
        """Close the selected open contours. Ends within :attr:`close_gap` of each other are
        merged (the end point, with its handle, moves onto the start), else a line closes
        the contour."""
        doc = self.document
        todo = [(o, c) for o, c in self._selected_contours() if not doc.contour(o, c).closed]
        if not todo:
            self.message.emit("The selected contours are already closed")
            return
        commands: list[cmds.Command] = []
        merged = 0
        for o, c in todo:
            merge = self._merge_ends(doc, o, c)
            if merge is not None:
                commands.append(merge)
                merged += 1
            commands.append(cmds.SetClosed(o, c, True))
        if self._do_group("Close contour", commands):
            self.set_selection([])
            text = f"Closed {len(todo)} contour(s)"
            if merged:
                text += (
                    f"; {merged} had ends within the gap tolerance "
                    f"({self.units.text(self.close_gap)}), merged instead of joined by a line"
                )
            self.message.emit(text)

    def _merge_ends(self, doc: Document, o: int, c: int) -> cmds.Command | None:
        """The command moving an open contour's end onto its start when they lie within
        :attr:`close_gap` (but do not coincide), else None."""
        contour = doc.contour(o, c)
        if contour.closed or len(contour.segments) < 2:
            return None
        start, end = contour.segments[0][0], contour.segments[-1][-1]
        d = float(np.hypot(*(end - start)))
        if d == 0.0 or d > self.close_gap:
            return None
        last = len(contour.segments) - 1
        k = contour.segments[last].shape[0] - 1
        return cmds.SetPoint(PointRef(o, c, last, k), (float(start[0]), float(start[1])))

    def _end_dropped_on_start(self, x: float, y: float, radius: float) -> list[cmds.Command]:
        """When the select tool is about to drop one end of an open contour within
        ``radius`` of the contour's other end: the commands that put it exactly there and
        close the contour (run inside the drag's undo step), else []."""
        tool = self.tools["select"]
        if self.tool_name != "select" or not self.history.in_group:
            return []
        refs = getattr(tool, "_drag_refs", ())
        if len(refs) != 1:
            return []
        doc = self.document
        o, c, s, i = refs[0]
        try:
            contour = doc.contour(o, c)
        except IndexError:
            return []
        n = len(contour.segments)
        if contour.closed or n < 2:
            return []
        last_k = contour.segments[-1].shape[0] - 1
        key = cmds.canonical_ref(doc, PointRef(o, c, s, i))
        first = cmds.canonical_ref(doc, PointRef(o, c, 0, 0))
        final = cmds.canonical_ref(doc, PointRef(o, c, n - 1, last_k))
        if key == final:
            moving, target = PointRef(o, c, n - 1, last_k), contour.segments[0][0]
        elif key == first:
            moving, target = PointRef(o, c, 0, 0), contour.segments[-1][-1]
        else:
            return []
        here = contour.segments[moving.segment][moving.index]
        if float(np.hypot(*(here - target))) > radius:
            return []
        return [
            cmds.SetPoint(moving, (float(target[0]), float(target[1]))),
            cmds.SetClosed(o, c, True),
        ]

    def delete_contours(self) -> None:
        todo = sorted(self._selected_contours(), reverse=True)
        if todo and self._do_group("Delete contour", [cmds.DeleteContour(o, c) for o, c in todo]):
            self.set_selection([])
            self.message.emit(f"Deleted {len(todo)} contour(s)")

    def tool_hint(self) -> str:
        """One line telling what the mouse and keys do with the active tool."""
        if self.tool_name == "select":
            small, large = NUDGE_STEPS.get(self.units.name, (1.0, 10.0))
            u = self.units.name
            return (
                "Click: select · Shift: add · drag empty space: box · "
                + (
                    "handle drags break joins (B) · "
                    if self.break_joins
                    else "Alt/B: break join · "
                )
                + f"Ctrl: equal handles · arrows {small:g} {u} (Shift {large:g})"
            )
        if self.tool_name == "insert":
            return "Click on a segment to split it there (the shape does not change)"
        return (
            "Click: corner · drag: smooth point · click first point: close · Enter: finish "
            "open · Esc: cancel"
        )

    # -- tools --------------------------------------------------------------------------
    def set_tool(self, name: str) -> None:
        """Make ``name`` the active tool. A contour being drawn is not lost: with one segment
        or more it is added as an open contour, else the user is told it was discarded."""
        if name not in TOOLS:
            raise ValueError(f"unknown tool {name!r}; tools are {', '.join(TOOLS)}")
        draft_note = None
        draw = self.tools.get("draw") if hasattr(self, "tools") else None
        if draw is not None and name != self.tool_name == "draw" and draw.busy:
            if len(draw.nodes) >= 2:
                before = self.document
                draw.finish()
                draft_note = self._drawn_message(before) or draw.message
            else:
                draft_note = "Draft discarded (it had no segment yet)"
        self._cancel_gesture()
        self.tool_name = name
        self.tool_changed.emit(name)
        self.message.emit(TOOLS[name][3])
        if draft_note:
            self.selection_changed.emit()
            self.message.emit(draft_note)

    def _cancel_gesture(self) -> None:
        tool = self.tools.get(self.tool_name) if hasattr(self, "tools") else None
        if tool is not None and tool.busy:
            tool.cancel()
            self.selection_changed.emit()

    def overlay(self) -> tools.Overlay | None:
        """What the active gesture wants drawn over the document (rubber band, draft)."""
        return self.tool.overlay()

    def pointer(self, kind: str, x: float, y: float, event: QMouseEvent, canvas) -> None:
        """A mouse event from the canvas, in document coordinates, handed to the tool.

        Modifier meanings: Shift adds to the selection, Alt breaks a smooth join, Ctrl keeps
        the two handles of a join equal (see the module constants).
        """
        mods = event.modifiers()
        if kind == "move":
            held = event.buttons() & Qt.MouseButton.LeftButton
            button = "left" if held else "none"
        else:
            button = "left"
        ev = tools.PointerEvent(
            kind,  # type: ignore[arg-type]
            x,
            y,
            button=button,
            add_to_selection=bool(mods & ADD_TO_SELECTION_MODIFIER),
            break_join=bool(mods & BREAK_JOIN_MODIFIER) or self.break_joins,
            symmetric=bool(mods & SYMMETRIC_MODIFIER),
        )
        tool = self.tool
        tool.pick_radius = canvas.pick_radius()
        before = self.document
        closing = self._end_dropped_on_start(x, y, tool.pick_radius) if kind == "release" else []
        try:
            for command in closing:  # inside the drag's undo step, before it ends
                self.history.do(command)
            repaint = tool.handle(ev)
        except OutlinebenchError as exc:
            tool.cancel()
            self.message.emit(f"{TOOLS[self.tool_name][0]}: not done — {exc}")
            repaint = True
        if closing and not tool.message:
            self.message.emit("The end was dropped on the start: contour closed")
        if tool.message:
            self.message.emit(tool.message)
        elif self.document is not before and not self.history.in_group and not closing:
            done = self._inserted_message() if self.tool_name == "insert" else None
            done = done or (self._drawn_message(before) if self.tool_name == "draw" else None)
            if done:
                self.message.emit(done)
        if repaint:
            canvas.tool_changed()
            if kind != "move" or button == "none":
                self.selection_changed.emit()

    def finish_drawing(self) -> None:
        tool = self.tools["draw"]
        if tool.nodes:
            before = self.document
            tool.finish()
            text = tool.message or self._drawn_message(before)
            if text:
                self.message.emit(text)
            self.selection_changed.emit()

    # -- what a finished gesture did, in the numbering of the findings list --------------
    def global_contour(self, outline: int, contour: int) -> int:
        """Contour number as ``outlinebench check`` reports it (0-based, whole file)."""
        return sum(len(o.contours) for o in self.document.outlines[:outline]) + contour

    def _inserted_message(self) -> str | None:
        key = self.primary
        if key is None or not pk.exists(self.document, key):
            return None
        o, c, s, _ = key  # the new point starts the second half (InsertPoint.new_ref)
        return (
            f"Inserted a point in contour {self.global_contour(o, c)}: segment {s - 1} was "
            f"split into segments {s - 1} and {s}; the shape is unchanged"
        )

    def _drawn_message(self, before: Document) -> str | None:
        doc = self.document
        if len(doc.outlines) <= len(before.outlines) and doc.segment_count() <= (
            before.segment_count()
        ):
            return None
        # AddContour appends the new contour to the last outline (a new one by default).
        o = len(doc.outlines) - 1
        c = len(doc.outlines[o].contours) - 1
        contour = doc.outlines[o].contours[c]
        kind = "closed" if contour.closed else "open"
        n = len(contour.segments)
        return (
            f"Added contour {self.global_contour(o, c)} ({kind}, "
            f"{n} segment{'' if n == 1 else 's'})"
        )

    def key(self, event: QKeyEvent) -> bool:
        """A key pressed on the canvas; True when the session used it."""
        k = event.key()
        large = bool(event.modifiers() & Qt.KeyboardModifier.ShiftModifier)
        arrows = {
            Qt.Key.Key_Left: (-1, 0),
            Qt.Key.Key_Right: (1, 0),
            Qt.Key.Key_Up: (0, -1),
            Qt.Key.Key_Down: (0, 1),
        }
        if k in arrows and self.selection.refs:
            self.nudge(*arrows[k], large)
            return True
        if k in (Qt.Key.Key_Return, Qt.Key.Key_Enter) and self.tool_name == "draw":
            self.finish_drawing()
            return True
        if k == Qt.Key.Key_Escape:
            if self.tool.busy:
                self._cancel_gesture()
                self.message.emit("Cancelled")
            else:
                self.selection.clear()
            return True
        return False
