"""Canvas gestures driven by real mouse and key events through the canvas's event handlers."""

import math

import bezier
import numpy as np
import pytest
from PySide6.QtCore import QEvent, QPoint, QPointF, Qt
from PySide6.QtGui import QMouseEvent, QWheelEvent
from PySide6.QtTest import QTest
from PySide6.QtWidgets import QApplication
from qt_mouse import NO_MOD, _send, click, drag, screen

from outlinebench.model.document import documents_equal


def _angle_deg(v):
    return math.degrees(math.atan2(v[1], v[0]))


def test_dragging_a_handle_at_a_smooth_join_keeps_both_collinear(window):
    canvas, s = window.canvas, window.session
    start_doc = s.document
    c = start_doc.outlines[0].contours[0]
    p = c.segments[1][0]  # on-curve (50, 10), join 0 is "smooth"
    out_h = c.segments[1][1]  # outgoing handle (70, 10)
    in_len = float(np.hypot(*(c.segments[0][2] - p)))
    a = screen(canvas, out_h)
    drag(canvas, a, a + QPointF(-15, -40))
    c2 = s.document.outlines[0].contours[0]
    out_v = c2.segments[1][1] - c2.segments[1][0]
    in_v = c2.segments[0][2] - c2.segments[1][0]
    # The handle moved, and the opposite handle points exactly the other way: angles differ
    # by 180° (collinear through the point, closed form for a straight line).
    assert not np.array_equal(c2.segments[1][1], out_h)
    diff = (_angle_deg(out_v) - _angle_deg(in_v)) % 360.0
    assert diff == pytest.approx(180.0, abs=1e-9)
    # Its length is kept (MovePoints rule: rotate about the point).
    assert float(np.hypot(*in_v)) == pytest.approx(in_len, rel=1e-12)
    # One drag is one undo step.
    assert s.undo_label == "Drag handle"
    s.undo()
    assert documents_equal(s.document, start_doc)


def test_dragging_with_the_break_modifier_makes_a_corner(window):
    canvas, s = window.canvas, window.session
    c = s.document.outlines[0].contours[0]
    in_before = c.segments[0][2].copy()
    a = screen(canvas, c.segments[1][1])
    drag(canvas, a, a + QPointF(-15, -40), mods=Qt.KeyboardModifier.AltModifier)
    c2 = s.document.outlines[0].contours[0]
    out_v = c2.segments[1][1] - c2.segments[1][0]
    in_v = c2.segments[0][2] - c2.segments[1][0]
    diff = (_angle_deg(out_v) - _angle_deg(in_v)) % 360.0
    assert abs(diff - 180.0) > 1.0  # no longer collinear
    assert np.array_equal(c2.segments[0][2], in_before)  # the other handle stayed put
    assert c2.joins[0] == "corner"


def test_symmetric_modifier_mirrors_the_opposite_handle(window):
    canvas, s = window.canvas, window.session
    c = s.document.outlines[0].contours[0]
    a = screen(canvas, c.segments[1][1])
    drag(canvas, a, a + QPointF(30, -20), mods=Qt.KeyboardModifier.ControlModifier)
    c2 = s.document.outlines[0].contours[0]
    p = c2.segments[1][0]
    # Point reflection through the on-curve point: in = 2p − out (closed form).
    np.testing.assert_allclose(c2.segments[0][2], 2 * p - c2.segments[1][1], atol=1e-12)


def test_click_selects_shift_click_adds_and_band_selects(window):
    canvas, s = window.canvas, window.session
    c = s.document.outlines[0].contours[0]
    click(canvas, screen(canvas, c.segments[2][0]))  # (90, 50)
    assert s.selected_points() == {(0, 0, 2, 0)}
    click(canvas, screen(canvas, c.segments[3][0]), Qt.KeyboardModifier.ShiftModifier)
    assert s.selected_points() == {(0, 0, 2, 0), (0, 0, 3, 0)}
    # Rubber band around the open stroke (110..180 × 0..60 in user units) selects its three
    # on-curve points and nothing else.
    drag(canvas, screen(canvas, (105, -5)), screen(canvas, (185, 65)))
    assert s.selected_points() == {(1, 0, 0, 0), (1, 0, 1, 0), (1, 0, 1, 2)}
    # The panel follows the selection (model → widget).
    assert window.panel.x.value() == pytest.approx(
        s.document.outlines[1].contours[0].segments[1][2][0] * 0.5
    )


def test_insert_point_keeps_the_shape(window):
    canvas, s = window.canvas, window.session
    window.act_tools["insert"].trigger()
    assert s.tool_name == "insert"
    seg = s.document.outlines[0].contours[0].segments[0].copy()
    original = bezier.Curve.from_nodes(seg.T)
    # Click on the curve at t = 0.3 (evaluated by the bezier library).
    on_curve = original.evaluate(0.3)[:, 0]
    pos = screen(canvas, on_curve)
    _send(canvas, QEvent.Type.MouseMove, pos)  # hover shows where the point goes
    click(canvas, pos)
    c2 = s.document.outlines[0].contours[0]
    assert len(c2.segments) == 6
    left, right = c2.segments[0], c2.segments[1]
    t = float(original.locate(np.array(left[-1])[:, None]))
    assert 0.25 < t < 0.35
    # Each piece re-traces its part of the original: left(u) = B(t·u), right(u) =
    # B(t + (1−t)·u) (de Casteljau subdivision, Farin §4.4); sampled with the bezier library.
    u = np.linspace(0.0, 1.0, 33)
    ref_l = original.evaluate_multi(t * u).T
    ref_r = original.evaluate_multi(t + (1 - t) * u).T
    got_l = bezier.Curve.from_nodes(np.array(left).T).evaluate_multi(u).T
    got_r = bezier.Curve.from_nodes(np.array(right).T).evaluate_multi(u).T
    assert np.max(np.abs(got_l - ref_l)) < 1e-9  # t recovered by `locate` to ~1e-12
    assert np.max(np.abs(got_r - ref_r)) < 1e-9
    assert s.selected_points() == {(0, 0, 1, 0)}
    assert c2.joins[0] == "smooth"


def test_draw_a_closed_contour_with_clicks_and_drags(window):
    canvas, s = window.canvas, window.session
    before = s.document
    window.act_tools["draw"].trigger()
    # Empty space below the lettering (user units); positions go through the view map, so
    # compare against the exact inverse map of the pixels sent: d = (s − offset) / scale.
    A, B, C = screen(canvas, (20, 90)), screen(canvas, (60, 85)), screen(canvas, (40, 98))
    drag_to = B + QPointF(24, 0)

    def doc(pt):
        return np.array(canvas.to_doc(QPointF(pt)))

    click(canvas, A)  # corner
    drag(canvas, B, drag_to)  # smooth, outgoing handle at the release point
    click(canvas, C)  # corner
    click(canvas, A)  # on the first point: closes
    doc_after = s.document
    assert len(doc_after.outlines) == len(before.outlines) + 1
    new = doc_after.outlines[-1].contours[0]
    assert new.closed
    assert [seg.shape[0] for seg in new.segments] == [4, 4, 2]  # cubic, cubic, line
    np.testing.assert_allclose(new.segments[0][0], doc(A), atol=1e-9)
    np.testing.assert_allclose(new.segments[0][3], doc(B), atol=1e-9)
    np.testing.assert_allclose(new.segments[1][1], doc(drag_to), atol=1e-9)
    # The incoming handle mirrors the outgoing one through B (a smooth point).
    np.testing.assert_allclose(new.segments[0][2], 2 * doc(B) - doc(drag_to), atol=1e-9)
    np.testing.assert_allclose(new.segments[1][3], doc(C), atol=1e-9)
    np.testing.assert_allclose(new.segments[2][1], doc(A), atol=1e-9)
    assert new.joins == ("smooth", "corner", "corner")
    assert s.undo_label == "Draw contour"


def test_undo_everything_returns_the_opened_document(window):
    canvas, s = window.canvas, window.session
    opened = s.document
    c = opened.outlines[0].contours[0]
    a = screen(canvas, c.segments[1][1])
    drag(canvas, a, a + QPointF(10, 25))
    click(canvas, screen(canvas, c.segments[2][0]))
    canvas.setFocus()
    QTest.keyClick(canvas, Qt.Key.Key_Right)
    QTest.keyClick(canvas, Qt.Key.Key_Down, Qt.KeyboardModifier.ShiftModifier)
    window.act_toggle_join.trigger()
    window.act_reverse.trigger()
    window.act_tools["insert"].trigger()
    seg = s.document.outlines[1].contours[0].segments[0]
    click(canvas, screen(canvas, bezier.Curve.from_nodes(np.array(seg).T).evaluate(0.5)[:, 0]))
    window.act_delete.trigger()
    assert not documents_equal(s.document, opened)
    for _ in range(50):  # bounded: a disabled Undo action must fail the test, not hang it
        if not s.can_undo:
            break
        assert window.act_undo.isEnabled()
        window.act_undo.trigger()
    assert documents_equal(s.document, opened)
    assert not window.isWindowModified()
    for _ in range(50):
        if not s.can_redo:
            break
        assert window.act_redo.isEnabled()
        window.act_redo.trigger()
    assert not documents_equal(s.document, opened)


def test_arrow_nudges_by_a_tenth_of_a_millimetre(window):
    canvas, s = window.canvas, window.session
    s.set_selection([(0, 0, 2, 0)])  # (90, 50), a line's start: no handles follow
    canvas.setFocus()
    QTest.keyClick(canvas, Qt.Key.Key_Right)
    QTest.keyClick(canvas, Qt.Key.Key_Right)
    QTest.keyClick(canvas, Qt.Key.Key_Up, Qt.KeyboardModifier.ShiftModifier)
    p = s.document.outlines[0].contours[0].segments[2][0]
    # 0.1 mm and 1 mm at 0.5 mm per user unit are 0.2 and 2 units (SVG 1.1 §7.2 scaling).
    np.testing.assert_allclose(p, (90.4, 48.0), atol=1e-12)
    s.undo()  # consecutive nudges of the same point are one step
    np.testing.assert_allclose(s.document.outlines[0].contours[0].segments[2][0], (90, 50))


def test_delete_point_reports_the_measured_change(window):
    s = window.session
    messages = []
    s.message.connect(messages.append)
    s.set_selection([(0, 0, 1, 0)])
    window.act_delete.trigger()
    c = s.document.outlines[0].contours[0]
    assert len(c.segments) == 4
    assert messages and "shape changed by at most" in messages[-1]
    assert "mm" in messages[-1]


def test_refused_edit_is_reported_not_raised(window):
    s = window.session
    messages = []
    s.message.connect(messages.append)
    s.set_selection([(1, 0, 0, 0), (1, 0, 1, 0), (1, 0, 1, 2)])
    window.act_delete.trigger()  # would leave the open stroke with no segment
    assert messages and "not done" in messages[-1]
    assert len(s.document.outlines[1].contours[0].segments) == 2


def test_zoom_about_the_pointer_keeps_the_point_under_it(window):
    canvas = window.canvas
    pos = QPointF(300.0, 200.0)
    before = canvas.to_doc(pos)
    ev = QWheelEvent(
        pos,
        canvas.mapToGlobal(pos),
        QPoint(0, 0),
        QPoint(0, 240),
        Qt.MouseButton.NoButton,
        Qt.KeyboardModifier.ControlModifier,
        Qt.ScrollPhase.NoScrollPhase,
        False,
    )
    scale = canvas.view.scale
    QApplication.sendEvent(canvas, ev)
    # Two notches of 1.2 each (closed form: 1.2²), the document point under the pointer fixed.
    assert canvas.view.scale == pytest.approx(scale * 1.44)
    assert canvas.to_doc(pos) == pytest.approx(before, abs=1e-9)


def test_middle_drag_pans(window):
    canvas = window.canvas
    ox, oy = canvas.view.offset_x, canvas.view.offset_y
    QTest.mousePress(canvas, Qt.MouseButton.MiddleButton, NO_MOD, QPoint(100, 100))
    ev = QMouseEvent(
        QEvent.Type.MouseMove,
        QPointF(130, 90),
        canvas.mapToGlobal(QPointF(130, 90)),
        Qt.MouseButton.NoButton,
        Qt.MouseButton.MiddleButton,
        NO_MOD,
    )
    QApplication.sendEvent(canvas, ev)
    QTest.mouseRelease(canvas, Qt.MouseButton.MiddleButton, NO_MOD, QPoint(130, 90))
    assert (canvas.view.offset_x - ox, canvas.view.offset_y - oy) == pytest.approx((30, -10))


def test_drag_frames_match_a_full_repaint(window, qtbot):
    # During a drag the unchanged outlines come from a backdrop pixmap; the frame must look
    # exactly like painting the same document from scratch.
    from PySide6.QtGui import QImage

    canvas, s = window.canvas, window.session
    canvas.repaint()
    c = s.document.outlines[0].contours[0]
    a = screen(canvas, c.segments[1][1])
    _send(canvas, QEvent.Type.MouseButtonPress, a)
    for k in range(1, 4):
        _send(canvas, QEvent.Type.MouseMove, a + QPointF(5 * k, 3 * k))
        canvas.repaint()
    assert s.history.in_group and canvas._backdrop is not None
    during = canvas.grab().toImage().convertToFormat(QImage.Format.Format_RGB32)
    canvas._last_doc = None  # no gesture base: paints everything from scratch
    full = canvas.grab().toImage().convertToFormat(QImage.Format.Format_RGB32)
    _send(canvas, QEvent.Type.MouseButtonRelease, a + QPointF(15, 9))
    assert during == full


def test_enter_finishes_an_open_contour_and_escape_cancels(window):
    canvas, s = window.canvas, window.session
    n = len(s.document.outlines)
    window.act_tools["draw"].trigger()
    click(canvas, screen(canvas, (20, 90)))
    click(canvas, screen(canvas, (60, 95)))
    canvas.setFocus()
    QTest.keyClick(canvas, Qt.Key.Key_Return)
    new = s.document.outlines[-1].contours[0]
    assert len(s.document.outlines) == n + 1 and not new.closed
    assert [seg.shape[0] for seg in new.segments] == [2]
    click(canvas, screen(canvas, (20, 30)))
    QTest.keyClick(canvas, Qt.Key.Key_Escape)
    assert not s.tools["draw"].busy
    assert len(s.document.outlines) == n + 1


def test_space_drag_pans(window):
    canvas = window.canvas
    canvas.setFocus()
    QTest.keyPress(canvas, Qt.Key.Key_Space)
    ox = canvas.view.offset_x
    before = window.session.document
    drag(canvas, QPointF(200, 200), QPointF(260, 200))
    QTest.keyRelease(canvas, Qt.Key.Key_Space)
    assert canvas.view.offset_x - ox == pytest.approx(60.0)
    assert window.session.document is before  # panning never edits


def test_contour_and_segment_menu_edits(window):
    s = window.session
    messages = []
    s.message.connect(messages.append)
    s.set_selection([(1, 0, 0, 0)])  # the open stroke
    window.act_close_contour.trigger()
    stroke = s.document.outlines[1].contours[0]
    # SetClosed adds a line from the end (170, 60) back to the start (110, 20).
    assert stroke.closed and len(stroke.segments) == 3
    np.testing.assert_array_equal(stroke.segments[-1], [[170, 60], [110, 20]])
    s.set_selection([(1, 0, 2, 0)])  # start of that new line
    window.act_degree[3].trigger()
    line_as_cubic = s.document.outlines[1].contours[0].segments[2]
    # Exact degree elevation of a line: control points at thirds (Farin §6.1, closed form).
    np.testing.assert_allclose(
        line_as_cubic, [[170, 60], [150, 140 / 3], [130, 100 / 3], [110, 20]]
    )
    assert "at most 0.000 mm" in messages[-1]
    s.set_selection([(0, 0, 1, 0)])
    window.act_degree[1].trigger()  # a quarter-ellipse-like cubic cannot become a line
    assert "not done" in messages[-1]
    assert s.document.outlines[0].contours[0].segments[1].shape == (4, 2)
    window.act_delete_contour.trigger()
    assert s.document.outlines[0].contours == ()
    assert s.undo_label == "Delete contour"


# -- review fixes: sticky break toggle, confirmations, draft kept on tool change -------------


def test_break_joins_toggle_works_without_alt(window):
    canvas, s = window.canvas, window.session
    c = s.document.outlines[0].contours[0]
    in_before = c.segments[0][2].copy()
    # The toggle's own shortcut, B, pressed as a key event on the window.
    QTest.keyClick(window, Qt.Key.Key_B)
    assert window.act_break_joins.isChecked() and s.break_joins
    a = screen(canvas, c.segments[1][1])
    drag(canvas, a, a + QPointF(-15, -40))  # no modifier held
    c2 = s.document.outlines[0].contours[0]
    out_v = c2.segments[1][1] - c2.segments[1][0]
    in_v = c2.segments[0][2] - c2.segments[1][0]
    # Same outcome as the Alt drag (issue 6: "a modifier breaks the join"): angle between the
    # handles no longer 180° (numpy measurement), the other handle unmoved, join a corner.
    assert abs((_angle_deg(out_v) - _angle_deg(in_v)) % 360.0 - 180.0) > 1.0
    assert np.array_equal(c2.segments[0][2], in_before)
    assert c2.joins[0] == "corner"
    QTest.keyClick(window, Qt.Key.Key_B)
    assert not s.break_joins


def test_inserting_a_point_says_where(window):
    canvas, s = window.canvas, window.session
    window.act_tools["insert"].trigger()
    seg = s.document.outlines[1].contours[0].segments[1]  # the stroke: contour 1 of the file
    on_curve = bezier.Curve.from_nodes(np.array(seg).T).evaluate(0.5)[:, 0]
    click(canvas, screen(canvas, on_curve))
    # Numbers as `outlinebench check` gives them (contour 1 global, segments from 0).
    assert window.statusBar().currentMessage() == (
        "Inserted a point in contour 1: segment 1 was split into segments 1 and 2; "
        "the shape is unchanged"
    )


def test_drawing_a_contour_says_what_was_added(window):
    canvas = window.canvas
    window.act_tools["draw"].trigger()
    a, b, c = screen(canvas, (20, 90)), screen(canvas, (60, 85)), screen(canvas, (40, 98))
    for p in (a, b, c, a):
        click(canvas, p)
    # Two contours in the file before (0 and 1): the new one is contour 2, three lines.
    assert window.statusBar().currentMessage() == "Added contour 2 (closed, 3 segments)"


def test_changing_tool_keeps_a_draft_with_a_segment_as_an_open_contour(window):
    canvas, s = window.canvas, window.session
    window.act_tools["draw"].trigger()
    a, b = screen(canvas, (20, 90)), screen(canvas, (60, 85))
    click(canvas, a)
    click(canvas, b)
    window.act_tools["select"].trigger()
    new = s.document.outlines[-1].contours[0]
    assert not new.closed and len(new.segments) == 1
    np.testing.assert_allclose(new.segments[0][0], canvas.to_doc(QPointF(a)), atol=1e-9)
    assert window.statusBar().currentMessage() == "Added contour 2 (open, 1 segment)"


def test_changing_tool_with_a_single_point_says_the_draft_is_discarded(window):
    canvas, s = window.canvas, window.session
    before = s.document
    window.act_tools["draw"].trigger()
    click(canvas, screen(canvas, (20, 90)))
    window.act_tools["select"].trigger()
    assert s.document is before
    assert window.statusBar().currentMessage() == "Draft discarded (it had no segment yet)"
