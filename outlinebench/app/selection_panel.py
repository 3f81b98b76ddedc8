"""The selection panel: exact numbers of the selected point, editable.

Shows the point's coordinates, its join's intent, the length and angle of its handles and the
length of the segments on either side, in the document's units. Typing a value and pressing
Enter (or leaving the field) pushes one undoable command; nothing here changes the document
directly.

During a drag the fields follow the moving point at most every :data:`DRAG_REFRESH_MS` (their
repaint would otherwise cost a millisecond or more on every mouse move); the exact values are
shown again as soon as the drag ends.
"""

from __future__ import annotations

import math
import time
from typing import TYPE_CHECKING

import numpy as np
from PySide6.QtCore import QSignalBlocker, Qt, QTimer
from PySide6.QtWidgets import (
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from outlinebench.app import point_keys as pk
from outlinebench.app.legend import MarkKey
from outlinebench.app.lengths import contour_length, segment_length
from outlinebench.model.point_names import PointRef

if TYPE_CHECKING:  # the session imports nothing from here; this is for type checkers
    from outlinebench.app.session import EditorSession

__all__ = ["SelectionPanel", "NumberField", "ANGLE_DECIMALS", "DRAG_REFRESH_MS", "global_contour"]

ANGLE_DECIMALS = 3  # degrees shown to 0.001°
# During a drag the fields are refreshed at most this often (milliseconds): 20 times a second
# is enough to read a moving value; the exact values follow when the drag ends.
DRAG_REFRESH_MS = 50
_BIG = 1e9

# Least width of a number field, logical px: its widest text, the special value "no handle
# (line)", whole at the default font; the panel's least width then leaves the canvas 40 % of a
# 1280 px window beside the findings list (test_main_window, test_selection_panel).
FIELD_MIN_WIDTH = 104
PANEL_MIN_WIDTH = 246

_JOIN_CHOICES = [
    ("smooth", "smooth"),
    ("corner", "corner"),
    (None, "not stated"),
]


def global_contour(doc, outline: int, contour: int) -> int:
    """The contour's number as ``outlinebench check`` and the findings list give it: counted
    from 0 through the whole file in document order."""
    return sum(len(o.contours) for o in doc.outlines[:outline]) + contour


class NumberField(QDoubleSpinBox):
    """A number field that the mouse wheel never changes (scrolling the panel must not edit
    the drawing); values are typed, or stepped with the arrow keys when focused."""

    def wheelEvent(self, event) -> None:  # noqa: N802 (Qt name)
        event.ignore()


def _note_label() -> QLabel:
    """A small grey line under a field, right-aligned under it."""
    label = QLabel("")
    label.setStyleSheet("color: #5b6670;")
    label.setAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
    return label


def _special(box: QDoubleSpinBox, text: str) -> None:
    """Set the text shown at the minimum value. Qt re-measures the field (and lays out the
    panel again, repainting all of it) on every call, even with the same text: during a drag
    that happens on every mouse move, so unchanged text is not set again."""
    if box.specialValueText() != text:
        box.setSpecialValueText(text)


def _spin(suffix: str, decimals: int, lo: float = -_BIG, hi: float = _BIG) -> QDoubleSpinBox:
    box = NumberField()
    box.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
    box.setRange(lo, hi)
    box.setDecimals(decimals)
    box.setSuffix(f" {suffix}")
    box.setKeyboardTracking(False)  # commit on Enter / focus out, not on every keystroke
    box.setButtonSymbols(QDoubleSpinBox.ButtonSymbols.NoButtons)
    box.setAlignment(Qt.AlignmentFlag.AlignRight)
    box.setMinimumWidth(FIELD_MIN_WIDTH)
    return box


class SelectionPanel(QWidget):
    """Panel bound to an :class:`EditorSession`.

    Parameters
    ----------
    editor : EditorSession
    """

    def __init__(self, editor: EditorSession, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._editor = editor
        self.setMinimumWidth(PANEL_MIN_WIDTH)  # labels and fields fit (test_selection_panel)
        lay = QVBoxLayout(self)
        self.summary = QLabel("Nothing selected. Click a point on the canvas.")
        self.summary.setWordWrap(True)
        lay.addWidget(self.summary)

        self.box_group = QGroupBox("All selected points")
        b = QFormLayout(self.box_group)
        self.box_left = _spin("", 3)
        self.box_top = _spin("", 3)
        self.box_size = QLabel("")
        b.addRow("Left edge", self.box_left)
        b.addRow("Top edge", self.box_top)
        b.addRow("Box size", self.box_size)
        for w in (self.box_left, self.box_top):
            w.setToolTip("Type a value to move every selected point together")
        lay.addWidget(self.box_group)

        self.point_box = QGroupBox("Point")
        f = QFormLayout(self.point_box)
        self.x = _spin("", 3)
        self.y = _spin("", 3)
        f.addRow("X (right)", self.x)
        f.addRow("Y (down)", self.y)
        self.join = QComboBox()
        for value, text in _JOIN_CHOICES:
            self.join.addItem(text, value)
        self.join.setItemData(0, "Tangents kept in line at this point", Qt.ItemDataRole.ToolTipRole)
        self.join.setItemData(1, "The outline may turn here", Qt.ItemDataRole.ToolTipRole)
        self.join.setItemData(
            2, "The file states no intent: judged by the angle", Qt.ItemDataRole.ToolTipRole
        )
        self.join_label = QLabel("Join intent")
        f.addRow(self.join_label, self.join)
        lay.addWidget(self.point_box)

        self.handles_box = QGroupBox("Handles")
        h = QFormLayout(self.handles_box)
        self.in_len = _spin("", 3, 0.0)
        self.in_ang = _spin("°", ANGLE_DECIMALS, -360.0, 360.0)
        self.out_len = _spin("", 3, 0.0)
        self.out_ang = _spin("°", ANGLE_DECIMALS, -360.0, 360.0)
        h.addRow("Incoming length", self.in_len)
        h.addRow("Incoming angle", self.in_ang)
        h.addRow("Outgoing length", self.out_len)
        h.addRow("Outgoing angle", self.out_ang)
        self.turn = QLabel("")
        h.addRow("Turn at join", self.turn)
        for w in (self.in_ang, self.out_ang):
            w.setToolTip("Degrees anticlockwise from the +x axis, as seen on screen")
        lay.addWidget(self.handles_box)

        self.segments_box = QGroupBox("Segments at this point")
        s = QFormLayout(self.segments_box)
        self.seg_in = _spin("", 3, 0.0)
        self.seg_out = _spin("", 3, 0.0)
        for w in (self.seg_in, self.seg_out):
            w.setToolTip(
                "Segment length along the curve. Type a value to scale the segment about its "
                "start point: its start stays, its end point moves."
            )
        self.seg_in_label = QLabel("Incoming")
        self.seg_out_label = QLabel("Outgoing")
        # Which segment each field measures ("segment 3, cubic") on its own line below it:
        # beside the short row label it would widen the panel past its place at 1280 px.
        self.seg_in_kind = _note_label()
        self.seg_out_kind = _note_label()
        s.addRow(self.seg_in_label, self.seg_in)
        s.addRow(self.seg_in_kind)
        s.addRow(self.seg_out_label, self.seg_out)
        s.addRow(self.seg_out_kind)
        # the segment each length field edits: (outline, contour, segment) or None
        self._seg_keys: tuple[tuple[int, int, int] | None, tuple[int, int, int] | None] = (
            None,
            None,
        )
        lay.addWidget(self.segments_box)

        self.contour_box = QGroupBox("Contour")
        c = QFormLayout(self.contour_box)
        self.contour_info = QLabel("")
        self.contour_info.setWordWrap(True)
        c.addRow(self.contour_info)
        lay.addWidget(self.contour_box)
        # The key to the canvas marks folds away (one click), so on short screens the numbers
        # above need no scrolling; the window opens it when there is room.
        self.key_button = QToolButton()
        self.key_button.setCheckable(True)
        self.key_button.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextBesideIcon)
        self.key_button.setText("Key to the marks")
        self.key_button.setToolTip("How points, joins and findings are drawn on the canvas")
        self.key_button.setStyleSheet("QToolButton { border: none; font-weight: bold; }")
        self.key_button.clicked.connect(self._on_key_clicked)
        lay.addWidget(self.key_button)
        self.key = MarkKey()
        lay.addWidget(self.key)
        lay.addStretch(1)
        self.key_toggled_by_user = False
        self.set_key_open(True)

        self.box_left.valueChanged.connect(lambda _v: self._commit_box(0))
        self.box_top.valueChanged.connect(lambda _v: self._commit_box(1))
        # Each field sends only its own value; the others come from the document, so typing
        # one number never rounds the rest to the digits shown.
        self.x.valueChanged.connect(lambda _v: self._commit_xy(0))
        self.y.valueChanged.connect(lambda _v: self._commit_xy(1))
        self.join.activated.connect(self._commit_join)
        self.in_len.valueChanged.connect(lambda _v: self._commit_handle("in", "length"))
        self.in_ang.valueChanged.connect(lambda _v: self._commit_handle("in", "angle"))
        self.out_len.valueChanged.connect(lambda _v: self._commit_handle("out", "length"))
        self.out_ang.valueChanged.connect(lambda _v: self._commit_handle("out", "angle"))
        self.seg_in.valueChanged.connect(lambda _v: self._commit_segment_length(0))
        self.seg_out.valueChanged.connect(lambda _v: self._commit_segment_length(1))

        self._last_shown = -math.inf  # time.perf_counter() of the last refresh
        self._later = QTimer(self)  # the refresh put off during a drag
        self._later.setSingleShot(True)
        self._later.timeout.connect(self._on_selection_changed)
        editor.changed.connect(self._on_document_changed)
        editor.selection_changed.connect(self._on_selection_changed)
        self._shown_key: PointRef | None = None
        self._box: tuple[float, float] | None = None
        self._handle_keys: tuple[PointRef | None, PointRef | None] = (None, None)
        self._on_selection_changed()

    def set_key_open(self, open_: bool) -> None:
        """Show or fold the key to the canvas marks."""
        self.key_button.setChecked(open_)
        self.key_button.setArrowType(Qt.ArrowType.DownArrow if open_ else Qt.ArrowType.RightArrow)
        self.key.setVisible(open_)

    def _on_key_clicked(self, checked: bool) -> None:
        self.key_toggled_by_user = True
        self.set_key_open(checked)

    # -- model → widget -----------------------------------------------------------------
    def _on_document_changed(self) -> None:
        if self._editor.history.in_group:  # a drag: at most every DRAG_REFRESH_MS
            if self._later.isActive():
                return
            wait_ms = DRAG_REFRESH_MS - (time.perf_counter() - self._last_shown) * 1e3
            if wait_ms > 0:
                self._later.start(max(1, math.ceil(wait_ms)))
                return
        self._on_selection_changed()

    def _on_selection_changed(self) -> None:
        self._later.stop()
        self._last_shown = time.perf_counter()
        ed = self._editor
        doc = ed.document
        units = ed.units
        key = ed.primary
        selected = ed.selected_points()
        self._shown_key = key
        spins = (
            self.x,
            self.y,
            self.in_len,
            self.out_len,
            self.box_left,
            self.box_top,
            self.seg_in,
            self.seg_out,
        )
        blockers = [QSignalBlocker(w) for w in (*spins, self.in_ang, self.out_ang, self.join)]
        self._show_box(doc, selected, units)
        try:
            if self.x.suffix() != f" {units.name}" or self.x.decimals() != units.decimals:
                for w in spins:
                    w.setSuffix(f" {units.name}")
                    w.setDecimals(units.decimals)
            if key is None or not pk.exists(doc, key):
                self.summary.setText(
                    f"{len(selected)} points selected."
                    if selected
                    else "Nothing selected. Click a point on the canvas, or drag a box around "
                    "points. Lengths are in " + units.name + "."
                )
                for box in (self.point_box, self.handles_box, self.segments_box, self.contour_box):
                    box.setEnabled(False)
                self._clear()
                return
            for box in (self.point_box, self.handles_box, self.segments_box, self.contour_box):
                box.setEnabled(True)
            o, c, s, i = key
            outline = doc.outlines[o]
            contour = outline.contours[c]
            p = pk.point_at(doc, key)
            self.x.setValue(units.show(float(p[0])))
            self.y.setValue(units.show(float(p[1])))
            name = outline.element_id or f"outline {o}"
            more = f" (+{len(selected) - 1} more selected)" if len(selected) > 1 else ""
            on_curve = pk.is_on_curve(doc, key)
            what = "on-curve point" if on_curve else "handle"
            # The numbering of `outlinebench check` and the findings list: contours counted
            # from 0 through the whole file in document order, segments from 0 in the contour.
            self.summary.setText(
                f"<b>{what.capitalize()}</b> in {name}, contour {global_contour(doc, o, c)}, "
                f"{self._place_text(doc, key)}{more}"
            )
            if on_curve:
                self._show_on_curve(doc, key, units)
            else:
                self._show_handle(doc, key, units)
            quick = ed.history.in_group  # a drag is in progress
            total = contour_length(contour.segments, quick=quick)
            self.contour_info.setText(
                f"{'closed' if contour.closed else 'open'}, {len(contour.segments)} segments, "
                f"length {units.text(total)}"
            )
        finally:
            del blockers

    def _show_box(self, doc, selected, units) -> None:
        """The bounding box of all selected points (shown when more than one is selected)."""
        self._box = None
        pts = [pk.point_at(doc, k) for k in selected if pk.exists(doc, k)]
        self.box_group.setVisible(len(pts) > 1)
        if len(pts) < 2:
            return
        arr = np.array(pts)
        lo, hi = arr.min(axis=0), arr.max(axis=0)
        self._box = (float(lo[0]), float(lo[1]))
        self.box_group.setTitle(f"All {len(pts)} selected points")
        self.box_left.setValue(units.show(self._box[0]))
        self.box_top.setValue(units.show(self._box[1]))
        w, h = units.show(float(hi[0] - lo[0])), units.show(float(hi[1] - lo[1]))
        self.box_size.setText(f"{w:.{units.decimals}f} × {h:.{units.decimals}f} {units.name}")

    def _clear(self) -> None:
        """Nothing selected: every field empty (never the numbers of the point selected
        before, nor a 0 that reads as a value)."""
        for w in (self.x, self.y, self.in_len, self.in_ang, self.out_len, self.out_ang):
            _special(w, " ")
            w.setValue(w.minimum())
        self.turn.setText("")
        self._seg_keys = (None, None)
        for w in (self.seg_in, self.seg_out):
            _special(w, " ")
            w.setValue(w.minimum())
        self.seg_in_kind.setText("")
        self.seg_out_kind.setText("")
        self.contour_info.setText("")
        self.join.setCurrentIndex(2)

    def _show_on_curve(self, doc, key, units) -> None:
        o, c, _s, _i = pk.normalize(doc, key)
        contour = doc.outlines[o].contours[c]
        j = pk.join_of(doc, key)
        self.join.setEnabled(j is not None)
        self.join_label.setText("Join intent" if j is not None else "Open end")
        if j is not None:
            intent = contour.joins[j]
            self.join.setCurrentIndex([v for v, _ in _JOIN_CHOICES].index(intent))
        p = pk.point_at(doc, key)
        inc, out = pk.handles_of(doc, key)
        self._handle_keys = (inc, out)
        self._show_handle_fields(doc, p, inc, out, units)
        self.turn.setText(self._turn_text(doc, key))
        nk = pk.normalize(doc, key)
        n = len(contour.segments)
        s = nk[2]
        at_end = nk[3] != 0
        incoming = s if at_end else ((s - 1) % n if (s > 0 or contour.closed) else None)
        outgoing = None if at_end else s
        self.segments_box.setTitle("Segments at this point")
        self._show_segment(self.seg_in, self.seg_in_label, "Incoming", o, c, incoming)
        self._show_segment(self.seg_out, self.seg_out_label, "Outgoing", o, c, outgoing)

    def _show_handle(self, doc, key, units) -> None:
        self.join.setEnabled(False)
        self.join_label.setText("Join intent")
        owner = pk.owner_of_handle(doc, key)
        j = pk.join_of(doc, owner)
        if j is not None:
            o, c, _, _ = owner
            intent = doc.outlines[o].contours[c].joins[j]
            self.join.setCurrentIndex([v for v, _ in _JOIN_CHOICES].index(intent))
        inc, out = pk.handles_of(doc, owner)
        self._handle_keys = (inc, out)
        p = pk.point_at(doc, owner)
        self._show_handle_fields(doc, p, inc, out, units)
        self.turn.setText(self._turn_text(doc, owner))
        o, c, s, _ = key
        self.segments_box.setTitle("Segment of this handle")
        self._show_segment(self.seg_in, self.seg_in_label, "This segment", o, c, s)
        self._show_segment(self.seg_out, self.seg_out_label, "", o, c, None)

    def _show_handle_fields(self, doc, p, inc, out, units) -> None:
        """Length and angle of both handles of the on-curve point ``p``; a side without a
        handle (a line segment, or the free end of an open contour) shows that in words."""
        for hk, ln, ang in ((inc, self.in_len, self.in_ang), (out, self.out_len, self.out_ang)):
            ln.setEnabled(hk is not None)
            ang.setEnabled(hk is not None)
            if hk is None:
                ln.setValue(ln.minimum())
                ang.setValue(ang.minimum())
                _special(ln, "no handle (line)")
                _special(ang, "—")
                continue
            length, angle = pk.polar(p, pk.point_at(doc, hk))
            _special(ln, "")
            _special(ang, "")
            ln.setValue(units.show(length))
            ang.setValue(angle)

    def _kind_label(self, field) -> QLabel:
        return self.seg_in_kind if field is self.seg_in else self.seg_out_kind

    def _show_segment(self, field, label, side: str, o: int, c: int, s: int | None) -> None:
        """One segment's kind and length in ``field`` (editable), or "—" when there is none."""
        index = 0 if field is self.seg_in else 1
        keys = list(self._seg_keys)
        field.setEnabled(s is not None)
        if s is None:
            keys[index] = None
            self._seg_keys = (keys[0], keys[1])
            label.setText(side)
            self._kind_label(field).setText("")
            field.setValue(field.minimum())
            _special(field, "—")
            return
        seg = self._editor.document.outlines[o].contours[c].segments[s]
        kind = {2: "line", 3: "quadratic", 4: "cubic"}[seg.shape[0]]
        keys[index] = (o, c, s)
        self._seg_keys = (keys[0], keys[1])
        label.setText(side)
        self._kind_label(field).setText(f"segment {s}, {kind}")
        _special(field, "")
        units = self._editor.units
        field.setValue(units.show(segment_length(seg, quick=self._editor.history.in_group)))

    @staticmethod
    def _place_text(doc, key) -> str:
        """Where the point is, in the words of the findings list: "join 2 (segments 1 → 2)"
        for an on-curve point where two segments meet, "segment 3" for a handle, "start of
        segment 0" / "end of segment 4" for the free ends of an open contour."""
        o, c, s, i = key
        if not pk.is_on_curve(doc, key):
            return f"segment {s}"
        j = pk.join_of(doc, key)
        if j is not None:
            a, b = doc.outlines[o].contours[c].join_segments(j)
            return f"join {j} (segments {a} → {b})"
        return f"{'start' if i == 0 else 'end'} of segment {s}"

    @staticmethod
    def _turn_text(doc, key) -> str:
        """Angle between the incoming and outgoing tangents at an on-curve point."""
        from outlinebench.app.contour_graphics import end_directions

        nk = pk.normalize(doc, key)
        j = pk.join_of(doc, nk)
        if j is None:
            return "— (open end)"
        o, c, _, _ = nk
        contour = doc.outlines[o].contours[c]
        a, b = contour.join_segments(j)
        d_in = end_directions(contour.segments[a])[1]
        d_out = end_directions(contour.segments[b])[0]
        cross = float(d_in[0] * d_out[1] - d_in[1] * d_out[0])
        dot = float(np.clip(d_in @ d_out, -1.0, 1.0))
        ang = math.degrees(math.atan2(cross, dot))
        return f"{abs(ang):.{ANGLE_DECIMALS}f}°" + (" (in line)" if abs(ang) < 1e-9 else "")

    # -- widget → model -----------------------------------------------------------------
    def _commit_xy(self, axis: int) -> None:
        """The typed coordinate replaces one axis; the other keeps the document's exact value."""
        key = self._shown_key
        if key is None or not pk.exists(self._editor.document, key):
            return
        u = self._editor.units
        xy = [float(v) for v in pk.point_at(self._editor.document, key)]
        xy[axis] = u.parse((self.x, self.y)[axis].value())
        self._editor.set_point(key, xy[0], xy[1])

    def _commit_box(self, axis: int) -> None:
        """Move the selection along one axis so that edge gets the typed value (the other
        axis does not move: its field shows a rounded value)."""
        if self._box is None:
            return
        u = self._editor.units
        delta = [0.0, 0.0]
        delta[axis] = u.parse((self.box_left, self.box_top)[axis].value()) - self._box[axis]
        self._editor.move_selection(delta[0], delta[1])

    def _commit_join(self, index: int) -> None:
        key = self._shown_key
        if key is None:
            return
        doc = self._editor.document
        owner = key if pk.is_on_curve(doc, key) else pk.owner_of_handle(doc, key)
        self._editor.set_join_intent(owner, self.join.itemData(index))

    def _commit_handle(self, side: str, which: str) -> None:
        """The typed length or angle replaces that one quantity; the other is the document's
        exact value (not the rounded one shown)."""
        key = self._shown_key
        if key is None:
            return
        hk = self._handle_keys[0 if side == "in" else 1]
        doc = self._editor.document
        if hk is None or not pk.exists(doc, hk):
            return
        u = self._editor.units
        length_box, angle_box = (
            (self.in_len, self.in_ang) if side == "in" else (self.out_len, self.out_ang)
        )
        owner = pk.owner_of_handle(doc, hk)
        length, angle = pk.polar(pk.point_at(doc, owner), pk.point_at(doc, hk))
        if which == "length":
            length = u.parse(length_box.value())
        else:
            angle = angle_box.value()
        self._editor.set_handle_polar(hk, length, angle)

    def _commit_segment_length(self, index: int) -> None:
        seg_key = self._seg_keys[index]
        if seg_key is None:
            return
        field = (self.seg_in, self.seg_out)[index]
        self._editor.set_segment_length(seg_key, self._editor.units.parse(field.value()))
