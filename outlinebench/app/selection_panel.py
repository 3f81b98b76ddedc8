"""The selection panel: exact numbers of the selected point, editable.

Shows the point's coordinates, its join's intent, the length and angle of its handles and the
length of the segments on either side, in the document's units. Typing a value and pressing
Enter (or leaving the field) pushes one undoable command; nothing here changes the document
directly.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np
from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtWidgets import (
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QVBoxLayout,
    QWidget,
)

from outlinebench.app import point_keys as pk
from outlinebench.app.legend import MarkKey
from outlinebench.app.lengths import segment_length

if TYPE_CHECKING:  # the session imports nothing from here; this is for type checkers
    from outlinebench.app.session import EditorSession

__all__ = ["SelectionPanel", "NumberField", "ANGLE_DECIMALS"]

ANGLE_DECIMALS = 3  # degrees shown to 0.001°
_BIG = 1e9

_JOIN_CHOICES = [
    ("smooth", "smooth (tangents kept in line)"),
    ("corner", "corner"),
    (None, "not stated"),
]


class NumberField(QDoubleSpinBox):
    """A number field that the mouse wheel never changes (scrolling the panel must not edit
    the drawing); values are typed, or stepped with the arrow keys when focused."""

    def wheelEvent(self, event) -> None:  # noqa: N802 (Qt name)
        event.ignore()


def _spin(suffix: str, decimals: int, lo: float = -_BIG, hi: float = _BIG) -> QDoubleSpinBox:
    box = NumberField()
    box.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
    box.setRange(lo, hi)
    box.setDecimals(decimals)
    box.setSuffix(f" {suffix}")
    box.setKeyboardTracking(False)  # commit on Enter / focus out, not on every keystroke
    box.setButtonSymbols(QDoubleSpinBox.ButtonSymbols.NoButtons)
    box.setAlignment(Qt.AlignmentFlag.AlignRight)
    box.setMinimumWidth(120)
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
        self.setMinimumWidth(300)
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
        self.seg_in = QLabel("")
        self.seg_out = QLabel("")
        self.seg_in_label = QLabel("Incoming")
        self.seg_out_label = QLabel("Outgoing")
        s.addRow(self.seg_in_label, self.seg_in)
        s.addRow(self.seg_out_label, self.seg_out)
        lay.addWidget(self.segments_box)

        self.contour_box = QGroupBox("Contour")
        c = QFormLayout(self.contour_box)
        self.contour_info = QLabel("")
        self.contour_info.setWordWrap(True)
        c.addRow(self.contour_info)
        lay.addWidget(self.contour_box)
        lay.addStretch(1)
        key_box = QGroupBox("How points and findings are drawn")
        kl = QVBoxLayout(key_box)
        kl.addWidget(MarkKey())
        lay.addWidget(key_box)

        self.box_left.valueChanged.connect(lambda _v: self._commit_box())
        self.box_top.valueChanged.connect(lambda _v: self._commit_box())
        self.x.valueChanged.connect(lambda _v: self._commit_xy())
        self.y.valueChanged.connect(lambda _v: self._commit_xy())
        self.join.activated.connect(self._commit_join)
        self.in_len.valueChanged.connect(lambda _v: self._commit_handle("in"))
        self.in_ang.valueChanged.connect(lambda _v: self._commit_handle("in"))
        self.out_len.valueChanged.connect(lambda _v: self._commit_handle("out"))
        self.out_ang.valueChanged.connect(lambda _v: self._commit_handle("out"))

        editor.changed.connect(self._on_selection_changed)
        editor.selection_changed.connect(self._on_selection_changed)
        self._shown_key: pk.Key | None = None
        self._box: tuple[float, float] | None = None
        self._handle_keys: tuple[pk.Key | None, pk.Key | None] = (None, None)
        self._on_selection_changed()

    # -- model → widget -----------------------------------------------------------------
    def _on_selection_changed(self) -> None:
        ed = self._editor
        doc = ed.document
        units = ed.units
        key = ed.primary
        selected = ed.selected_points()
        self._shown_key = key
        spins = (self.x, self.y, self.in_len, self.out_len, self.box_left, self.box_top)
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
            name = outline.element_id or f"outline {o + 1}"
            more = f" (+{len(selected) - 1} more selected)" if len(selected) > 1 else ""
            on_curve = pk.is_on_curve(doc, key)
            what = "on-curve point" if on_curve else "handle"
            self.summary.setText(
                f"<b>{what.capitalize()}</b> in {name}, contour {c + 1}, segment {s + 1}{more}"
            )
            if on_curve:
                self._show_on_curve(doc, key, units)
            else:
                self._show_handle(doc, key, units)
            quick = ed.history.in_group  # a drag is in progress
            lengths = [segment_length(seg, quick=quick) for seg in contour.segments]
            self.contour_info.setText(
                f"{'closed' if contour.closed else 'open'}, {len(contour.segments)} segments, "
                f"length {units.text(sum(lengths))}"
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
        for w in (self.x, self.y, self.in_len, self.in_ang, self.out_len, self.out_ang):
            w.setValue(0.0)
        self.turn.setText("")
        self.seg_in.setText("")
        self.seg_out.setText("")
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
        for hk, ln, ang in ((inc, self.in_len, self.in_ang), (out, self.out_len, self.out_ang)):
            ln.setEnabled(hk is not None)
            ang.setEnabled(hk is not None)
            if hk is None:
                ln.setValue(ln.minimum())
                ang.setValue(ang.minimum())
                ln.setSpecialValueText("no handle (line)")
                ang.setSpecialValueText("—")
                continue
            length, angle = pk.polar(p, pk.point_at(doc, hk))
            ln.setSpecialValueText("")
            ang.setSpecialValueText("")
            ln.setValue(units.show(length))
            ang.setValue(angle)
        self.turn.setText(self._turn_text(doc, key))
        nk = pk.normalize(doc, key)
        n = len(contour.segments)
        s = nk[2]
        at_end = nk[3] != 0
        incoming = s if at_end else ((s - 1) % n if (s > 0 or contour.closed) else None)
        outgoing = None if at_end else s
        self.segments_box.setTitle("Segments at this point")
        self.seg_in_label.setText("Incoming")
        self.seg_out_label.setText("Outgoing")
        self.seg_in.setText(self._seg_text(contour, incoming, units))
        self.seg_out.setText(self._seg_text(contour, outgoing, units))

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
        for hk, ln, ang in ((inc, self.in_len, self.in_ang), (out, self.out_len, self.out_ang)):
            ln.setEnabled(hk is not None)
            ang.setEnabled(hk is not None)
            if hk is not None:
                length, angle = pk.polar(p, pk.point_at(doc, hk))
                ln.setValue(units.show(length))
                ang.setValue(angle)
        self.turn.setText(self._turn_text(doc, owner))
        o, c, s, _ = key
        contour = doc.outlines[o].contours[c]
        self.segments_box.setTitle("Segment of this handle")
        self.seg_in_label.setText(f"Segment {s + 1}")
        self.seg_out_label.setText("")
        self.seg_in.setText(self._seg_text(contour, s, units))
        self.seg_out.setText("")

    def _seg_text(self, contour, index: int | None, units) -> str:
        if index is None:
            return "—"
        seg = contour.segments[index]
        kind = {2: "line", 3: "quadratic", 4: "cubic"}[seg.shape[0]]
        length = segment_length(seg, quick=self._editor.history.in_group)
        return f"{kind}, length {units.text(length)}"

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
    def _commit_xy(self) -> None:
        key = self._shown_key
        if key is None:
            return
        u = self._editor.units
        self._editor.set_point(key, u.parse(self.x.value()), u.parse(self.y.value()))

    def _commit_box(self) -> None:
        if self._box is None:
            return
        u = self._editor.units
        dx = u.parse(self.box_left.value()) - self._box[0]
        dy = u.parse(self.box_top.value()) - self._box[1]
        self._editor.move_selection(dx, dy)

    def _commit_join(self, index: int) -> None:
        key = self._shown_key
        if key is None:
            return
        doc = self._editor.document
        owner = key if pk.is_on_curve(doc, key) else pk.owner_of_handle(doc, key)
        self._editor.set_join_intent(owner, self.join.itemData(index))

    def _commit_handle(self, side: str) -> None:
        key = self._shown_key
        if key is None:
            return
        hk = self._handle_keys[0 if side == "in" else 1]
        if hk is None:
            return
        u = self._editor.units
        length_box, angle_box = (
            (self.in_len, self.in_ang) if side == "in" else (self.out_len, self.out_ang)
        )
        self._editor.set_handle_polar(hk, u.parse(length_box.value()), angle_box.value())
