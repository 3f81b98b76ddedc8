"""Selection panel: model → widget (the numbers shown) and widget → model (typed values)."""

import math

import numpy as np
import pytest
from PySide6.QtCore import Qt
from PySide6.QtTest import QTest

# The lettering document has 0.5 mm per user unit; the panel shows mm.
MM = 0.5


def _type(widget, text):
    widget.selectAll()
    widget.lineEdit().selectAll()
    QTest.keyClicks(widget.lineEdit(), text)
    QTest.keyClick(widget.lineEdit(), Qt.Key.Key_Return)


def test_panel_shows_point_handles_and_segments_in_mm(window):
    panel = window.panel
    window.session.set_selection([(0, 0, 1, 0)])  # on-curve point (50, 10), a smooth join
    # Coordinates: user units × mm_per_unit (SVG 1.1 §7.2 viewBox scaling).
    assert panel.x.value() == pytest.approx(50 * MM)
    assert panel.y.value() == pytest.approx(10 * MM)
    assert panel.x.suffix().strip() == "mm"
    assert panel.join.currentData() == "smooth"
    # Handles (30,10) and (70,10): length 20 units, directions 180° and 0° (closed form).
    assert panel.in_len.value() == pytest.approx(20 * MM)
    assert panel.out_len.value() == pytest.approx(20 * MM)
    assert panel.in_ang.value() == pytest.approx(180.0)
    assert panel.out_ang.value() == pytest.approx(0.0)
    # The line segment 3 of the bowl from (90,50) to (60,50): 30 units (closed form).
    window.session.set_selection([(0, 0, 2, 0)])
    assert panel.seg_out_kind.text() == "segment 2, line"
    assert panel.seg_out.text() == f"{30 * MM:.3f} mm"


def test_panel_follows_undo(window):
    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 1, 0)])
    s.set_point((0, 0, 1, 0), 52.0, 11.0)
    assert panel.x.value() == pytest.approx(52 * MM)
    s.undo()
    assert panel.x.value() == pytest.approx(50 * MM)


def test_typing_coordinates_is_one_undoable_command(window):
    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 1, 0)])
    before = s.document
    _type(panel.x, "30")  # 30 mm = 60 user units
    p = s.document.outlines[0].contours[0].segments[1][0]
    assert tuple(p) == (60.0, 10.0)
    # Its handles moved with it (MovePoints rule): outgoing handle was (70,10) → (80,10).
    assert tuple(s.document.outlines[0].contours[0].segments[1][1]) == (80.0, 10.0)
    assert window.isWindowModified()
    s.undo()
    assert s.document is before
    assert not window.isWindowModified()


def test_typing_a_handle_angle_keeps_a_smooth_join_collinear(window):
    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 1, 0)])
    _type(panel.out_ang, "30")
    seg_in, seg_out = s.document.outlines[0].contours[0].segments[0:2]
    p = seg_out[0]
    out = seg_out[1] - p
    inc = seg_in[2] - p
    # Screen angle 30° anticlockwise with y up: direction (cos 30°, −sin 30°) in SVG axes.
    assert math.degrees(math.atan2(-out[1], out[0])) == pytest.approx(30.0, abs=1e-9)
    assert np.hypot(*out) == pytest.approx(20.0)  # length kept
    # Smooth join: opposite handle points the other way (cross product 0, dot < 0).
    assert abs(out[0] * inc[1] - out[1] * inc[0]) < 1e-9 * 400
    assert float(out @ inc) < 0
    assert panel.in_ang.value() == pytest.approx(-150.0)


def test_choosing_join_intent_pushes_a_command(window):
    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 3, 0)])  # join 2 of the bowl is "corner"
    assert panel.join.currentData() == "corner"
    idx = panel.join.findData("smooth")
    panel.join.setCurrentIndex(idx)
    panel.join.activated.emit(idx)
    assert s.document.outlines[0].contours[0].joins[2] == "smooth"
    assert s.undo_label == "Make join smooth"


def test_the_wheel_over_a_number_field_does_not_edit(window):
    from PySide6.QtCore import QPoint, QPointF
    from PySide6.QtGui import QWheelEvent
    from PySide6.QtWidgets import QApplication

    s = window.session
    s.set_selection([(0, 0, 1, 0)])
    before = s.document
    field = window.panel.x
    pos = QPointF(field.width() / 2, field.height() / 2)
    ev = QWheelEvent(
        pos,
        field.mapToGlobal(pos),
        QPoint(0, 0),
        QPoint(0, 120),
        Qt.MouseButton.NoButton,
        Qt.KeyboardModifier.NoModifier,
        Qt.ScrollPhase.NoScrollPhase,
        False,
    )
    QApplication.sendEvent(field, ev)
    assert s.document is before


def test_several_points_show_their_box_and_move_together(window):
    panel = window.panel
    s = window.session
    # (90, 50) and (60, 50) and (20, 75): box 20..90 × 50..75 user units (0.5 mm each).
    s.set_selection([(0, 0, 2, 0), (0, 0, 3, 0), (0, 0, 4, 0)])
    assert not panel.box_group.isHidden()
    assert panel.box_left.value() == pytest.approx(20 * MM)
    assert panel.box_top.value() == pytest.approx(50 * MM)
    assert panel.box_size.text() == f"{70 * MM:.3f} × {25 * MM:.3f} mm"
    _type(panel.box_left, "15")  # 15 mm = 30 units: everything moves by +10 units in x
    c = s.document.outlines[0].contours[0]
    assert tuple(c.segments[2][0]) == (100.0, 50.0)
    assert tuple(c.segments[4][0]) == (30.0, 75.0)
    assert s.undo_label == "Move points"
    s.set_selection([(0, 0, 2, 0)])
    assert panel.box_group.isHidden()


# -- review fixes: typed values never round the others; handles that do not exist ----------


def test_typing_y_keeps_an_unshown_digit_of_x(window):
    panel = window.panel
    s = window.session
    s.set_point((0, 0, 1, 0), 50.00008, 10.0)  # x = 25.00004 mm: the field shows 25.000
    s.set_selection([(0, 0, 1, 0)])
    _type(panel.y, "6")  # 6 mm = 12 user units
    p = s.document.outlines[0].contours[0].segments[1][0]
    # Expected: x exactly as before (issue 6 / review item 1: only the typed field changes).
    assert float(p[0]) == 50.00008
    assert float(p[1]) == 12.0


def test_typing_a_handle_length_keeps_its_exact_angle(window):
    panel = window.panel
    s = window.session
    # Outgoing handle of (50, 10) put at 18.0041827° on screen (y up), length 20 units.
    a = math.radians(18.0041827)
    s.set_point((0, 0, 1, 1), 50 + 20 * math.cos(a), 10 - 20 * math.sin(a))
    s.set_selection([(0, 0, 1, 0)])
    _type(panel.out_len, "15")  # 15 mm = 30 units
    d = s.document.outlines[0].contours[0].segments[1][1] - np.array([50.0, 10.0])
    # numpy measurement: the angle is kept to round-off, not snapped to the 0.001° shown.
    assert math.degrees(math.atan2(-d[1], d[0])) == pytest.approx(18.0041827, abs=1e-9)
    assert float(np.hypot(*d)) == pytest.approx(30.0, rel=1e-12)


def test_a_missing_handle_is_shown_as_missing_when_a_handle_is_selected(window):
    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 1, 0)])  # both handles exist: incoming shows 10 mm
    assert panel.in_len.value() == pytest.approx(10.0)
    # Handle (60, 70) of segment 3: its point (60, 50) has a line (segment 2) coming in.
    s.set_selection([(0, 0, 3, 1)])
    assert not panel.in_len.isEnabled()
    assert panel.in_len.text() == "no handle (line)"  # the words _show_on_curve uses
    assert panel.out_len.value() == pytest.approx(20 * MM)  # |(60,70) − (60,50)| = 20 units


def test_contours_and_segments_are_numbered_as_the_check_command_does(window):
    from outlinebench.app.findings_panel import COLUMNS
    from outlinebench.diagnostics import check_document
    from outlinebench.diagnostics.report import format_finding

    s = window.session
    # The CLI's own line for the corner at (170, 20) of the stroke (the file's second contour).
    corner = next(f for f in check_document(s.document) if (f.x, f.y) == (170.0, 20.0))
    line = format_finding("f.svg", corner)
    assert "contour 1, join 0" in line
    assert corner.join == 0
    s.set_selection([(1, 0, 0, 3)])  # that point, the end of segment 0
    # The panel and the findings list (where_text) name it with the CLI's numbers.
    assert "contour 1, join 0 (segments 0 → 1)" in window.panel.summary.text()
    window.findings_panel.show_info.setChecked(True)  # the corner is an info finding
    model = window.findings_panel.model
    shown = next(f for f, _ in model.rows if (f.kind, f.join) == ("corner", 0) and f.contour == 1)
    # The list's words are the CLI's (outlinebench.diagnostics.place_text).
    assert model.cell_text(shown, COLUMNS.index("Where")) == "contour 1, join 0"


def test_typing_a_curve_length_scales_the_segment_about_its_start(window):
    import bezier

    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 1, 0)])  # outgoing segment 1: the cubic (50,10)…(90,50)
    seg = s.document.outlines[0].contours[0].segments[1]
    # Reference length from the bezier library (Gauss quadrature of |B'(t)|).
    before = bezier.Curve(np.asfortranarray(seg.T), degree=3).length
    assert panel.seg_out.value() == pytest.approx(before * MM, abs=1e-3)
    _type(panel.seg_out, "30")  # 30 mm = 60 user units
    new = s.document.outlines[0].contours[0].segments[1]
    assert bezier.Curve(np.asfortranarray(new.T), degree=3).length == pytest.approx(60.0)
    # Scaled about its start (closed form p0 + k (p_i − p0)): the start stays, shape similar.
    k = 60.0 / before
    assert np.allclose(new, seg[0] + k * (seg - seg[0]), atol=1e-9)
    assert s.undo_label == "Set segment length"
    s.undo()
    assert np.array_equal(s.document.outlines[0].contours[0].segments[1], seg)


def test_typing_a_line_length_moves_its_end_along_the_line(window):
    panel = window.panel
    s = window.session
    s.set_selection([(0, 0, 2, 0)])  # outgoing: the line (90,50) → (60,50), 30 units
    assert panel.seg_out.value() == pytest.approx(30 * MM)
    _type(panel.seg_out, "20")  # 40 units
    line = s.document.outlines[0].contours[0].segments[2]
    # Closed form: same start, same direction (−1, 0), length 40 → end at (50, 50).
    assert np.allclose(line, [[90, 50], [50, 50]], atol=1e-12)
    nxt = s.document.outlines[0].contours[0].segments[3]
    assert tuple(nxt[0]) == (50.0, 50.0)  # the next segment still starts there (G0 kept)


def test_typing_the_left_edge_does_not_move_the_points_vertically(window):
    panel = window.panel
    s = window.session
    s.set_point((0, 0, 2, 0), 90.0, 50.00008)  # top edge 25.00004 mm: the field shows 25.000
    s.set_point((0, 0, 3, 0), 60.0, 50.00008)
    keys = [(0, 0, 2, 0), (0, 0, 3, 0)]
    s.set_selection(keys)
    before = [s.document.outlines[0].contours[0].segments[k[2]][0].copy() for k in keys]
    _type(panel.box_left, "35")  # 35 mm = 70 units: left edge 60 → 70, +10 in x
    after = [s.document.outlines[0].contours[0].segments[k[2]][0] for k in keys]
    for b, a in zip(before, after, strict=True):
        # Closed form: x + 10, y exactly unchanged (review item 1, applied to the box fields).
        assert float(a[0]) == float(b[0]) + 10.0
        assert float(a[1]) == float(b[1])


def test_after_a_drag_the_fields_show_the_exact_point(window, qtbot):
    # Common practice, no source: during a drag the fields may lag (refreshed at most every
    # DRAG_REFRESH_MS), but once the drag ends they show the point as the model holds it.
    from PySide6.QtCore import QEvent, QPointF
    from PySide6.QtWidgets import QApplication
    from qt_mouse import _send, screen

    from outlinebench.app import point_keys as pk

    win, canvas, s = window, window.canvas, window.session
    key = (0, 0, 1, 0)
    point = pk.point_at(s.document, key)
    start = screen(canvas, point)
    s.set_tool("select")
    _send(canvas, QEvent.Type.MouseButtonPress, start)
    QApplication.processEvents()
    for k in range(1, 6):
        _send(canvas, QEvent.Type.MouseMove, start + QPointF(5.0 * k, 3.0 * k))
        QApplication.processEvents()
    _send(canvas, QEvent.Type.MouseButtonRelease, start + QPointF(25.0, 15.0))
    moved = pk.point_at(s.document, s.primary)
    assert not np.allclose(moved, point)
    # 1 user unit = MM mm (the document's own scale)
    assert win.panel.x.value() == pytest.approx(moved[0] * MM, abs=1e-3)
    assert win.panel.y.value() == pytest.approx(moved[1] * MM, abs=1e-3)


def test_labels_are_whole_at_1280_by_800_and_nothing_stale_after_deselecting(qtbot, tmp_path):
    from conftest import lettering_document
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QLabel

    from outlinebench.app.main_window import MainWindow

    win = MainWindow(QSettings(str(tmp_path / "s.ini"), QSettings.Format.IniFormat))
    qtbot.addWidget(win)
    win.resize(1280, 800)
    win.show()
    qtbot.waitExposed(win)
    win.session.load(lettering_document())
    panel = win.panel
    win.session.set_selection([(0, 0, 1, 0)])  # an on-curve point with two handles
    qtbot.wait(20)
    # Every label of the panel shows its whole text (Qt's size hint: the text's width).
    for label in panel.findChildren(QLabel):
        if label.isVisible() and label.text() and not label.wordWrap():
            assert label.width() >= label.sizeHint().width(), label.text()
    assert panel.x.text() != "" and "mm" in panel.x.text()
    # Deselect: no field keeps the numbers of the point shown before, none shows a 0.
    win.session.set_selection([])
    for field in (panel.x, panel.y, panel.in_len, panel.in_ang, panel.out_len, panel.out_ang,
                  panel.seg_in, panel.seg_out):  # fmt: skip
        assert field.text().strip() == "", field.text()
        assert not field.isEnabled() or field.text().strip() == ""
    assert panel.contour_info.text() == "" and panel.turn.text() == ""
    assert panel.seg_in_kind.text() == "" and panel.seg_out_kind.text() == ""
