"""Closing contours (issue 13): ends within the gap tolerance are merged instead of joined by
a short line, and dragging an open end onto its start closes the contour."""

import numpy as np
import pytest
from qt_mouse import drag, screen

from outlinebench.model.document import Contour, Document, Outline


def _open_doc(gap: float) -> Document:
    """A U-shaped open contour (mm) whose end stops ``gap`` short of its start."""
    c = Contour.from_points(
        [
            [[10, 10], [60, 10]],
            [[60, 10], [80, 10], [80, 40], [60, 40]],
            [[60, 40], [10, 40]],
            [[10, 40], [10, 10 + gap]],
        ],
        closed=False,
    )
    return Document(
        (Outline((c,), "u", 0),), width_mm=100.0, height_mm=60.0,
        view_box=(0.0, 0.0, 100.0, 60.0), mm_per_unit=1.0, units="mm",
    )  # fmt: skip


def test_close_merges_ends_within_the_gap_tolerance(window):
    s = window.session
    gap = window.live.settings.gap_mm  # 0.01 mm by default (diagnostics settings)
    s.load(_open_doc(0.4 * gap))
    assert s.close_gap == pytest.approx(gap)
    s.set_selection([(0, 0, 0, 0)])
    s.close_contours()
    c = s.document.outlines[0].contours[0]
    # Merged: still four segments, the last ends exactly on the start (no line of 0.004 mm).
    assert c.closed and len(c.segments) == 4
    np.testing.assert_array_equal(c.segments[-1][-1], c.segments[0][0])
    assert not [f for f in window.live.findings if f.kind in ("gap", "tiny-segment")]
    assert s.undo_label == "Close contour"
    s.undo()
    assert not s.document.outlines[0].contours[0].closed


def test_close_adds_a_line_when_the_ends_are_farther_apart(window):
    s = window.session
    s.load(_open_doc(5.0))  # 5 mm: far beyond the gap tolerance
    s.set_selection([(0, 0, 0, 0)])
    s.close_contours()
    c = s.document.outlines[0].contours[0]
    assert c.closed and len(c.segments) == 5
    np.testing.assert_array_equal(c.segments[-1], [[10, 15], [10, 10]])


def test_dragging_the_open_end_onto_the_start_closes_the_contour(window, qtbot):
    s, canvas = window.session, window.canvas
    s.load(_open_doc(6.0))
    canvas.fit_to_outline()
    end = screen(canvas, (10.0, 16.0))
    start = screen(canvas, (10.0, 10.0))
    from PySide6.QtCore import QPointF

    drag(canvas, end, start + QPointF(2.0, 1.0))  # dropped within the pick radius (7 px)
    c = s.document.outlines[0].contours[0]
    assert c.closed and len(c.segments) == 4
    np.testing.assert_array_equal(c.segments[-1][-1], [10.0, 10.0])
    # One gesture, one undo step, back to the open contour as it was.
    s.undo()
    c = s.document.outlines[0].contours[0]
    assert not c.closed
    np.testing.assert_array_equal(c.segments[-1][-1], [10.0, 16.0])


def test_dragging_the_end_elsewhere_only_moves_it(window):
    s, canvas = window.session, window.canvas
    s.load(_open_doc(6.0))
    canvas.fit_to_outline()
    from PySide6.QtCore import QPointF

    end = screen(canvas, (10.0, 16.0))
    drag(canvas, end, end + QPointF(0.0, 30.0))  # far from the start
    assert not s.document.outlines[0].contours[0].closed
