"""Tests for outlinebench/model/tools.py: gestures driven headless with PointerEvents."""

import math

import numpy as np
import pytest

from outlinebench.geometry.bezier import evaluate
from outlinebench.model import (
    Contour,
    Document,
    DrawContourTool,
    History,
    InsertPointTool,
    Outline,
    PointerEvent,
    PointRef,
    Selection,
    SelectTool,
    documents_equal,
    nearest_segment,
    nudge,
    pick_point,
    points_in_rect,
)

# Invented "Harbour Lane Signs" arrow: cubic, cubic (smooth join), line; open.
ARROW = [
    [[0.0, 0.0], [20.0, 0.0], [40.0, 20.0], [60.0, 20.0]],
    [[60.0, 20.0], [80.0, 20.0], [100.0, 0.0], [120.0, 0.0]],
    [[120.0, 0.0], [120.0, -40.0]],
]


def arrow_doc() -> Document:
    c = Contour.from_points(ARROW, joins=("smooth", "corner"))
    return Document((Outline((c,), element_id="arrow"),))


def ev(kind, x, y, button="left", **flags):
    return PointerEvent(kind, x, y, button, **flags)


def drag(tool, points, **flags):
    (x0, y0), *rest = points
    tool.handle(ev("press", x0, y0, **flags))
    for x, y in rest:
        tool.handle(ev("move", x, y, **flags))
    x1, y1 = points[-1]
    tool.handle(ev("release", x1, y1, **flags))


def setup(tool_cls=SelectTool, **kw):
    h = History(arrow_doc())
    sel = Selection()
    return h, sel, tool_cls(h, sel, pick_radius=2.0, **kw)


def test_pick_prefers_the_nearest_and_uses_canonical_names():
    doc = arrow_doc()
    assert pick_point(doc, (60.5, 19.8), 2.0) == PointRef(0, 0, 1, 0)
    assert pick_point(doc, (79.0, 20.5), 2.0) == PointRef(0, 0, 1, 1)
    assert pick_point(doc, (79.0, 20.5), 2.0, handles=False) is None
    assert pick_point(doc, (70.0, 50.0), 2.0) is None
    # Open contour end: named by the last segment's last index.
    assert pick_point(doc, (120.0, -40.0), 1.0) == PointRef(0, 0, 2, 1)


def test_points_in_rect_takes_on_curve_points_only_by_default():
    doc = arrow_doc()
    got = points_in_rect(doc, (130.0, 25.0, 50.0, -5.0))
    assert got == [PointRef(0, 0, 1, 0), PointRef(0, 0, 2, 0)]
    assert PointRef(0, 0, 1, 1) in points_in_rect(doc, (50, -5, 130, 25), handles=True)


def test_click_selects_shift_click_toggles_empty_click_clears():
    h, sel, tool = setup()
    drag(tool, [(60.0, 20.0)])
    assert sel.refs == (PointRef(0, 0, 1, 0),)
    drag(tool, [(120.0, 0.0)], add_to_selection=True)
    assert set(sel.refs) == {PointRef(0, 0, 1, 0), PointRef(0, 0, 2, 0)}
    drag(tool, [(60.0, 20.0)], add_to_selection=True)
    assert sel.refs == (PointRef(0, 0, 2, 0),)
    drag(tool, [(30.0, 50.0)])
    assert sel.refs == ()
    assert not h.can_undo  # selecting is not an edit


def test_rubber_band_selects_and_adds():
    h, sel, tool = setup()
    tool.handle(ev("press", -5.0, -5.0))
    tool.handle(ev("move", 65.0, 25.0))
    assert tool.overlay().rubber_band == (-5.0, -5.0, 65.0, 25.0)
    tool.handle(ev("release", 65.0, 25.0))
    assert set(sel.refs) == {PointRef(0, 0, 0, 0), PointRef(0, 0, 1, 0)}
    drag(tool, [(115.0, 5.0), (125.0, -45.0)], add_to_selection=True)
    assert len(sel) == 4
    assert tool.overlay().rubber_band is None


def test_drag_of_an_on_curve_point_is_one_undo_step_and_moves_its_handles():
    h, sel, tool = setup()
    start = h.document
    drag(tool, [(60.0, 20.0), (61.0, 21.0), (63.0, 24.0), (65.0, 30.0)])
    c = h.document.contour(0, 0)
    # Pointer moved by (5, 10): the point and both handles follow exactly (dyadic values).
    np.testing.assert_array_equal(c.segments[1][0], [65.0, 30.0])
    np.testing.assert_array_equal(c.segments[0][2], [45.0, 30.0])
    np.testing.assert_array_equal(c.segments[1][1], [85.0, 30.0])
    assert h.undo_label == "Move points"
    h.undo()
    assert h.document is start and not h.can_undo


def test_dragging_a_smooth_handle_keeps_the_opposite_collinear():
    h, sel, tool = setup()
    drag(tool, [(80.0, 20.0), (81.0, 24.0), (83.0, 30.0)])
    c = h.document.contour(0, 0)
    p, a, b = c.segments[1][0], c.segments[0][2], c.segments[1][1]
    # Measured angle between P−A and B−P (atan2 of cross and dot) is 0 for collinear handles.
    u, v = p - a, b - p
    assert abs(math.degrees(math.atan2(u[0] * v[1] - u[1] * v[0], np.dot(u, v)))) < 1e-9
    assert np.linalg.norm(p - a) == pytest.approx(20.0)  # opposite length kept
    assert h.undo_label == "Drag handle"


def test_break_and_symmetric_modifiers():
    h, sel, tool = setup()
    drag(tool, [(80.0, 20.0), (83.0, 30.0)], break_join=True)
    c = h.document.contour(0, 0)
    np.testing.assert_array_equal(c.segments[0][2], [40.0, 20.0])
    assert c.joins[0] == "corner"
    h.undo()
    drag(tool, [(80.0, 20.0), (83.0, 30.0)], symmetric=True)
    c = h.document.contour(0, 0)
    np.testing.assert_allclose(c.segments[0][2], 2 * c.segments[1][0] - c.segments[1][1])


def test_cancel_during_a_drag_restores_the_document():
    h, sel, tool = setup()
    start = h.document
    tool.handle(ev("press", 60.0, 20.0))
    tool.handle(ev("move", 70.0, 25.0))
    assert not documents_equal(h.document, start)
    tool.cancel()
    assert h.document is start and not h.can_undo and not tool.busy


def test_small_jitter_is_a_click_not_a_drag():
    h, sel, tool = setup()
    drag(tool, [(60.0, 20.0), (60.2, 20.1)])  # below 0.25 × pick radius
    assert not h.can_undo


def test_nudges_merge_into_one_step():
    h, sel, tool = setup()
    sel.set([PointRef(0, 0, 2, 0)])
    for _ in range(4):
        nudge(h, sel, 0.25, 0.0)
    np.testing.assert_array_equal(h.document.contour(0, 0).segments[2][0], [121.0, 0.0])
    h.undo()
    assert not h.can_undo


def test_insert_point_tool_splits_where_clicked_without_changing_shape():
    h, sel, tool = setup(InsertPointTool)
    old = h.document.contour(0, 0).segments[0]
    # A point on the first cubic, nudged off the curve by 0.5 along y.
    target = evaluate(old, 0.37)
    assert tool.handle(ev("move", target[0], target[1] + 0.5, "none"))
    hit = tool.overlay().segment_hit
    assert hit is not None and hit.segment == 0 and hit.distance <= 0.5
    tool.handle(ev("press", target[0], target[1]))
    c = h.document.contour(0, 0)
    assert len(c.segments) == 4 and c.joins[0] == "smooth"
    # Shape unchanged: the two pieces cover the old segment (de Casteljau, exact).
    u = np.linspace(0, 1, 50)
    t = hit.t if abs(hit.t - 0.37) < 1e-6 else 0.37
    np.testing.assert_allclose(evaluate(c.segments[0], u), evaluate(old, t * u), atol=1e-9)
    assert sel.refs == (PointRef(0, 0, 1, 0),)
    # Far from every segment: nothing happens, with a message.
    assert not tool.handle(ev("press", 60.0, 80.0))
    assert tool.message


def test_nearest_segment_matches_dense_sampling():
    doc = arrow_doc()
    hit = nearest_segment(doc, (100.0, 12.0), 10.0)
    seg = doc.contour(0, 0).segments[1]
    u = np.linspace(0, 1, 200001)
    d = np.hypot(*(evaluate(seg, u) - [100.0, 12.0]).T)
    # Reference: brute-force dense sampling (spacing 5e-6 in t).
    assert hit.segment == 1 and hit.distance == pytest.approx(d.min(), abs=1e-6)
    assert hit.t == pytest.approx(u[np.argmin(d)], abs=1e-4)


def test_draw_tool_corner_smooth_and_close():
    h, sel, tool = setup(DrawContourTool)
    drag(tool, [(0.0, 100.0)])  # corner
    drag(tool, [(50.0, 100.0), (60.0, 100.0)])  # smooth, handles at (60,100) and (40,100)
    drag(tool, [(50.0, 150.0)])  # corner
    tool.handle(ev("move", 0.5, 100.5, "none"))
    assert tool.overlay().close_target
    drag(tool, [(0.5, 100.5)])  # closes on the first point
    doc = h.document
    assert len(doc.outlines) == 2 and not tool.busy
    c = doc.contour(1, 0)
    assert c.closed and len(c.segments) == 3
    np.testing.assert_array_equal(c.segments[0][-2], [40.0, 100.0])  # mirrored in-handle
    np.testing.assert_array_equal(c.segments[1][1], [60.0, 100.0])  # out-handle at the drag
    np.testing.assert_array_equal(c.segments[2], [[50.0, 150.0], [0.0, 100.0]])
    assert c.joins == ("smooth", "corner", "corner")
    assert h.undo_label == "Draw contour"
    h.undo()
    assert len(h.document.outlines) == 1


def test_draw_tool_finish_open_and_cancel():
    h, sel, tool = setup(DrawContourTool)
    drag(tool, [(0.0, 0.0)])
    assert not tool.finish() and tool.message  # one point is not a contour
    drag(tool, [(0.0, 0.0)])
    drag(tool, [(10.0, 0.0)])
    drag(tool, [(10.0, 0.1)])  # on top of the last point: ignored
    assert len(tool.nodes) == 2
    assert len(tool.overlay().draft_segments) == 1
    assert tool.finish()
    c = h.document.contour(1, 0)
    assert not c.closed and len(c.segments) == 1
    drag(tool, [(5.0, 5.0)])
    tool.cancel()
    assert not tool.busy and len(h.document.outlines) == 2


def test_selection_prune_after_undo_of_an_insert():
    h, sel, tool = setup(InsertPointTool)
    old = h.document.contour(0, 0).segments[1]
    p = evaluate(old, 0.5)
    tool.handle(ev("press", p[0], p[1]))
    sel.add([PointRef(0, 0, 3, 1)])  # the end point of the open contour after the insert
    h.undo()
    sel.prune(h.document)
    # Names that still exist stay (pruning checks existence only); the other is dropped.
    assert sel.refs == (PointRef(0, 0, 2, 0),) and sel.primary == PointRef(0, 0, 2, 0)


def test_regression_nearest_segment_is_global_near_a_cusp():
    # Defect: hover and pick used a 64-seed local search, which here (a query between the
    # two branches of a near-cusp cubic) found a point 4.4e-4 too far, on the wrong branch.
    # Expected: scipy's bounded Brent minimum around the best of 20001 samples.
    from scipy.optimize import minimize_scalar

    cubic = np.array(
        [
            [-0.00020368345729456308, 0.0009018455896572225],
            [0.999164475163246, 0.9991867518597877],
            [0.0012641417299067655, 0.9983223650105039],
            [0.9995419399768671, 0.000482468795810782],
        ]
    )
    q = np.array([0.49985275141384133, 0.7445299140819821])
    grid = np.linspace(0, 1, 20001)
    k = int(np.argmin(np.hypot(*(evaluate(cubic, grid) - q).T)))
    ref = minimize_scalar(
        lambda s: float(np.hypot(*(evaluate(cubic, s) - q))),
        bounds=(grid[k - 1], grid[k + 1]),
        method="bounded",
        options={"xatol": 1e-13},
    )
    doc = Document((Outline((Contour.from_points([cubic]),)),))
    hit = nearest_segment(doc, q, 0.5)
    assert hit.distance <= ref.fun + 1e-12
    assert hit.t == pytest.approx(ref.x, abs=1e-6)
    # The nearer of two segments wins even when the farther one's box is visited first.
    far = np.array([[0.4, 0.7], [0.6, 0.7]])  # a line 0.045 below q, inside the cubic's box
    doc2 = Document((Outline((Contour.from_points([cubic]), Contour.from_points([far]))),))
    hit2 = nearest_segment(doc2, q, 0.5)
    best = min(ref.fun, 0.7445299140819821 - 0.7)
    assert hit2.distance == pytest.approx(best, abs=1e-12)
