"""Curvature comb: tooth length and side against svgpathtools, steps at G2 breaks, the toggle."""

import math

import numpy as np
import pytest
import svgpathtools
from PySide6.QtGui import QImage

from outlinebench.app.array_paths import lines_path
from outlinebench.app.curvature_comb import (
    MAX_TEETH,
    MIN_TEETH,
    comb_tips,
    sample_comb,
    teeth_per_segment,
)

# Invented test shapes: a cubic swash stroke, a quadratic and a line.
CUBIC = np.array([[10.0, 40.0], [25.0, 5.0], [55.0, 70.0], [80.0, 30.0]])
QUAD = np.array([[80.0, 30.0], [95.0, 0.0], [110.0, 35.0]])
LINE = np.array([[110.0, 35.0], [130.0, 35.0]])


def _svgpt(seg):
    z = [complex(x, y) for x, y in seg]
    if len(z) == 4:
        return svgpathtools.CubicBezier(*z)
    if len(z) == 3:
        return svgpathtools.QuadraticBezier(*z)
    return svgpathtools.Line(*z)


def test_tips_lie_at_scale_times_curvature_on_the_bending_side():
    segs = [CUBIC, QUAD, LINE]
    teeth = np.array([17, 9, 5])
    s = sample_comb(segs, teeth)
    scale = 37.5
    tips = comb_tips(s, scale)
    assert len(s.kappa) == teeth.sum()
    for k in range(len(s.kappa)):
        ref = _svgpt(segs[s.segment[k]])
        t = float(s.t[k])
        p = ref.point(t)
        # The sample point is the curve point (svgpathtools' evaluation).
        assert s.points[k] == pytest.approx([p.real, p.imag], abs=1e-9)
        # Tooth length = scale·κ with κ from svgpathtools (unsigned curvature,
        # |x′y″ − y′x″| / |B′|³).
        kappa_ref = float(ref.curvature(t))
        tooth = tips[k] - s.points[k]
        assert math.hypot(*tooth) == pytest.approx(scale * kappa_ref, rel=1e-9, abs=1e-12)
        if kappa_ref > 1e-9:
            # On the side the curve bends: the tooth points where B″ has its normal
            # component, i.e. towards the centre of curvature (do Carmo §1-5).
            d1 = ref.derivative(t)
            d2 = ref.derivative(t, n=2)
            along = (d2 * d1.conjugate()).real / abs(d1) ** 2 * d1
            towards = d2 - along
            assert tooth[0] * towards.real + tooth[1] * towards.imag > 0
            # And perpendicular to the tangent.
            assert abs(tooth[0] * d1.real + tooth[1] * d1.imag) < 1e-9 * abs(d1) * scale
    # Every segment is sampled from t = 0 to t = 1.
    for i, n in enumerate(teeth):
        ts = s.t[s.segment == i]
        np.testing.assert_allclose(ts, np.linspace(0.0, 1.0, n))


def test_teeth_follow_the_zoom():
    segs = [CUBIC, LINE]
    few = teeth_per_segment(segs, 0.01)  # both under 6 px on screen
    many = teeth_per_segment(segs, 20.0)
    assert (few == MIN_TEETH).all()
    assert (many >= few).all() and many[0] > few[0]
    assert (many <= MAX_TEETH).all()
    # Powers of two plus one: the coarser samples are a subset of the finer ones.
    assert all(((n - 1) & (n - 2)) == 0 for n in many.tolist())


def test_a_g2_break_shows_as_a_step_between_end_teeth(window):
    # The curvature-jump finding's own κ before and after the join must be the two end teeth
    # of the comb there, divided by the scale (sign included).
    from test_findings_panel import SAMPLE

    from outlinebench.io import load_svg

    doc = load_svg(SAMPLE)
    window.open_path(str(SAMPLE))
    jump = next(f for f in window.live.findings if f.kind == "curvature-jump"
                and f.severity == "warning")  # fmt: skip
    refs = list(doc.contour_refs())
    contour = refs[jump.contour].contour
    a = contour.segments[jump.join]
    b = contour.segments[(jump.join + 1) % len(contour.segments)]
    s = sample_comb([a, b], np.array([9, 9]))
    scale = 10.0
    tips = comb_tips(s, scale)
    end_a = tips[8] - s.points[8]
    start_b = tips[9] - s.points[9]
    np.testing.assert_allclose(s.points[8], s.points[9], atol=1e-9)  # the same join point
    assert math.hypot(*end_a) == pytest.approx(scale * abs(jump.curvature_before), rel=1e-3)
    assert math.hypot(*start_b) == pytest.approx(scale * abs(jump.curvature_after), rel=1e-3)
    assert abs(math.hypot(*end_a) - math.hypot(*start_b)) > 0.04 * math.hypot(*end_a)


def test_lines_path_holds_the_given_points():
    a = np.array([[0.0, 0.0], [5.0, 5.0], [2.5, -1.0]])
    b = a + np.array([[1.0, 2.0], [3.0, -4.0], [0.5, 0.25]])
    path = lines_path(a, b)
    assert path.elementCount() == 6
    for i in range(3):
        m, line = path.elementAt(2 * i), path.elementAt(2 * i + 1)
        assert m.isMoveTo() and line.isLineTo()
        assert (m.x, m.y, line.x, line.y) == (a[i, 0], a[i, 1], b[i, 0], b[i, 1])
    poly = lines_path(a, None, np.array([True, False, True]))
    assert [poly.elementAt(k).isMoveTo() for k in range(3)] == [True, False, True]


def test_comb_toggle_draws_teeth_and_scale_control_lengthens_them(window, qtbot):
    win, canvas = window, window.canvas
    canvas.render(QImage(canvas.size(), QImage.Format.Format_ARGB32))
    assert canvas.comb_teeth == 0
    win.act_comb.trigger()  # View ▸ Curvature comb
    assert win.act_comb.isChecked() and canvas.comb_on
    canvas.render(QImage(canvas.size(), QImage.Format.Format_ARGB32))
    assert canvas.comb_teeth > 0
    base = canvas.comb_scale
    win.act_comb_longer.trigger()
    assert canvas.comb_scale == pytest.approx(base * 2**0.5)  # one step is ×√2
    before = canvas.comb_teeth
    canvas.zoom(4.0)
    canvas.render(QImage(canvas.size(), QImage.Format.Format_ARGB32))
    assert canvas.comb_teeth > before  # adaptive: more teeth when zoomed in
    win.act_comb.trigger()
    assert not canvas.comb_on


def test_each_loaded_document_gets_its_own_automatic_scale(window):
    from test_findings_panel import _s_curve_document

    from outlinebench.app.curvature_comb import auto_comb_scale

    win = window
    win.set_comb_visible(True)
    assert win.canvas.comb_scale == pytest.approx(auto_comb_scale(win.session.document))
    other = _s_curve_document()
    win.session.load(other)
    assert win.canvas.comb_scale == pytest.approx(auto_comb_scale(other))
    # An edit keeps the scale (the comb must not jump while drawing).
    before = win.canvas.comb_scale
    win.session.set_point((0, 0, 1, 2), 70.0, 35.0)
    assert win.canvas.comb_scale == before


def test_comb_follows_a_drag_live(window):
    from PySide6.QtCore import QEvent, QPointF
    from qt_mouse import _send, screen

    win, canvas, s = window, window.canvas, window.session
    win.set_comb_visible(True)
    canvas.repaint()
    scale = canvas.comb_scale
    c = s.document.outlines[1].contours[0]  # the open stroke
    start = screen(canvas, c.segments[0][0])
    _send(canvas, QEvent.Type.MouseButtonPress, start)
    _send(canvas, QEvent.Type.MouseMove, start + QPointF(9.0, 14.0))
    assert s.history.in_group
    canvas.repaint()  # a frame mid-drag
    moved = s.document.outlines[1].contours[0]
    assert moved is not c
    assert canvas.comb_cache.holds(moved)  # the frame sampled the moved contour
    assert canvas.comb_cache.segments_sampled == 1  # only the segment the drag changed
    assert moved.segments[1] is c.segments[1]
    samples = canvas.comb_cache.get(moved, canvas.view.scale)
    first = samples.segment == 0
    # The comb's curve points are the moved segment's (svgpathtools evaluation).
    ref = _svgpt(moved.segments[0])
    got = samples.points[first]
    want = np.array([[ref.point(t).real, ref.point(t).imag] for t in samples.t[first]])
    np.testing.assert_allclose(got, want, atol=1e-9)
    assert canvas.comb_teeth > 0
    assert canvas.comb_scale == scale  # a drag never changes the comb scale
    _send(canvas, QEvent.Type.MouseButtonRelease, start + QPointF(9.0, 14.0))


def test_a_retracted_handle_is_sampled_with_its_one_sided_limits():
    # P1 = P0: B′(0) = 0, so the direct formulas do not apply at t = 0. Near 0 the curve
    # leaves along P2 − P0 = (1, 1) (first non-vanishing derivative, Farin §5.3: closed
    # form), so the normal there is (1, 1)/√2 turned +90°; the curve turns right (the
    # control polygon bends clockwise), and κ at a retracted handle whose neighbours are not
    # collinear is unbounded (its limit is −∞: κ ~ const/t as t → 0, closed form).
    seg = np.array([[0.0, 0.0], [0.0, 0.0], [1.0, 1.0], [2.0, 0.0]])
    s = sample_comb([seg], np.array([5]))
    np.testing.assert_allclose(s.normals[0], [-math.sqrt(0.5), math.sqrt(0.5)], atol=1e-12)
    assert s.kappa[0] == -math.inf
    # Elsewhere the samples are regular: κ from svgpathtools (unsigned) matches |κ|.
    ref = _svgpt(seg)
    for k in range(1, 5):
        t = float(s.t[k])
        assert abs(s.kappa[k]) == pytest.approx(float(ref.curvature(t)), rel=1e-9)
