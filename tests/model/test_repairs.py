"""Tests for outlinebench/model/repairs.py: every repair fixes its finding within the limit.

For every repair: the targeted finding is gone when re-checked with
outlinebench.diagnostics.check_document; the reported change (a proven upper bound) is within
the allowed change and agrees with an independent measurement (dense sampling + shapely
hausdorff_distance); past the limit the repair is refused and the document is identical
(documents_equal). Documents are in mm (one user unit is 1 mm) and invented.
"""

import math
from fractions import Fraction

import numpy as np
import pytest
import shapely
import sympy

from outlinebench.diagnostics import CheckSettings, check_document
from outlinebench.errors import CommandError
from outlinebench.geometry.area import signed_area
from outlinebench.geometry.bezier import evaluate
from outlinebench.geometry.curvature import end_tangents
from outlinebench.model import History
from outlinebench.model.document import Contour, Document, Outline, documents_equal
from outlinebench.model.repairs import (
    AddExtremumPoints,
    CloseGap,
    FitCurves,
    FixDirection,
    JoinContours,
    MatchCurvature,
    RemoveOverlaps,
    RemoveRedundantPoints,
    SmoothKink,
    end_curvature_closed_form,
    on_integer_grid,
)

SETTINGS = CheckSettings()
# Samples per outline for the independent measurement; the discrete shapely distance of the
# samples is within a sample step of the true distance (every curve point is within half a
# step of a sample, on either curve).
SAMPLES = 2400


def doc_of(*contours, mm=1.0):
    return Document((Outline(tuple(contours), element_id="o0", source_index=0),), mm_per_unit=mm)


def has(doc, kind, contour=0, join=None):
    return any(
        f.kind == kind and f.contour == contour and (join is None or f.join == join)
        for f in check_document(doc, SETTINGS)
    )


def sampled_change(old_doc, new_doc):
    """(shapely Hausdorff of dense samples, how far it can be off) for the first outline."""

    def pts(doc):
        segs = [s for c in doc.outlines[0].contours for s in c.segments]
        t = np.linspace(0.0, 1.0, max(8, SAMPLES // len(segs)) + 1)
        return np.vstack([evaluate(s, t) for s in segs])

    a, b = pts(old_doc), pts(new_doc)
    h = shapely.hausdorff_distance(shapely.MultiPoint(a), shapely.MultiPoint(b))
    step = max(float(np.max(np.hypot(*np.diff(p, axis=0).T))) for p in (a, b))
    return h, step  # consecutive samples across segment ends may jump: step is generous


def check_change(cmd, old, new):
    """The reported bound is within the limit and brackets the independent measurement."""
    assert cmd.change is not None
    assert cmd.change.upper <= cmd.max_change
    ref, slack = sampled_change(old, new)
    # reference: shapely.hausdorff_distance on dense samples of both outlines
    assert cmd.change.lower - slack <= ref <= cmd.change.upper + slack


def check_refused(cmd_factory, doc, limit):
    cmd = cmd_factory(limit)
    history = History(doc)
    with pytest.raises(CommandError, match="more than the allowed"):
        history.do(cmd)
    assert documents_equal(history.document, doc)
    assert history.document is doc


# ---------------------------------------------------------------------------------------------
def open_square_with_gap(gap):
    return Contour.from_points(
        [[[0, 0], [40, 0]], [[40, 0], [40, 40]], [[40, 40], [0, 40]], [[0, 40], [0, gap]]]
    )


def test_close_gap():
    doc = doc_of(open_square_with_gap(0.3))
    assert has(doc, "gap")
    cmd = CloseGap(0, 0, gap_tolerance=2.0, max_change=0.2)
    new = cmd.apply(doc)
    assert not has(new, "gap") and not has(new, "open-contour")
    assert new.outlines[0].contours[0].closed
    # closing at the midpoint moves each end by 0.15 (closed form: half the gap)
    assert cmd.change.upper == pytest.approx(0.15, abs=1e-3)
    check_change(cmd, doc, new)
    check_refused(lambda m: CloseGap(0, 0, 2.0, m), doc, 0.1)
    with pytest.raises(CommandError, match="farther than the gap tolerance"):
        CloseGap(0, 0, 0.2, 1.0).apply(doc)


def test_close_gap_handles_travel_with_their_point():
    c = Contour.from_points(
        [[[0, 0], [10, 0], [20, 10], [20, 20]], [[20, 20], [10, 30], [0, 20], [0.2, 0.1]]]
    )
    doc = doc_of(c)
    cmd = CloseGap(0, 0, 2.0, 1.0)
    new = cmd.apply(doc)
    s = new.outlines[0].contours[0].segments
    moved = s[-1][-1] - c.segments[-1][-1]
    # the end handle moved by the same vector as its point (the tangent direction is kept)
    np.testing.assert_allclose(s[-1][2] - c.segments[-1][2], moved, atol=1e-15)
    check_change(cmd, doc, new)


# ---------------------------------------------------------------------------------------------
def kinked_pair(angle_deg=3.0, scale=1.0):
    """Two cubics meeting at (50, 0) whose handles turn by ``angle_deg``."""
    th = math.radians(angle_deg)
    out = np.array([50 + 15 * math.cos(th), 15 * math.sin(th)])
    a = [[0, 0], [10, 30], [35, 0], [50, 0]]
    b = [[50, 0], out.tolist(), [90, 30], [100, 0]]
    return Contour.from_points([np.array(a) * scale, np.array(b) * scale])


def test_smooth_kink_off_grid():
    doc = doc_of(kinked_pair(3.0))
    assert has(doc, "kink", join=0)
    cmd = SmoothKink(0, 0, 0, max_change=0.5)
    new = cmd.apply(doc)
    assert not has(new, "kink")
    assert cmd.residual_angle < 1e-9
    seg_a, seg_b = new.outlines[0].contours[0].segments
    # lengths kept (the issue: rotate about the on-curve point, keep lengths)
    assert np.hypot(*(seg_a[3] - seg_a[2])) == pytest.approx(15.0, rel=1e-12)
    assert np.hypot(*(seg_b[1] - seg_b[0])) == pytest.approx(15.0, rel=1e-12)
    check_change(cmd, doc, new)
    check_refused(lambda m: SmoothKink(0, 0, 0, m), doc, 0.05)


def test_smooth_kink_next_to_a_line_keeps_the_line():
    c = Contour.from_points([[[0, 0], [50, 0]], [[50, 0], [60, 1], [90, 30], [100, 30]]])
    doc = doc_of(c)
    new = SmoothKink(0, 0, 0, max_change=1.0).apply(doc)
    seg = new.outlines[0].contours[0].segments[1]
    assert seg[1][1] == 0.0  # the handle turned onto the line's direction (+x)
    assert not has(new, "kink")


def test_smooth_kink_on_the_integer_grid():
    # integer coordinates: handle out turned by ~3°; the result stays on the grid
    c = Contour.from_points(
        [[[0, 0], [100, 300], [350, 0], [500, 0]], [[500, 0], [650, 8], [900, 300], [1000, 0]]]
    )
    doc = doc_of(c)
    assert on_integer_grid(doc)
    cmd = SmoothKink(0, 0, 0, max_change=20.0, grid=1.0)
    new = cmd.apply(doc)
    a, b = new.outlines[0].contours[0].segments
    assert np.all(a == np.round(a)) and np.all(b == np.round(b))
    # best the grid allows within ±2 units of the ideal handles: brute force (plain loops)
    best = math.inf
    p = np.array([500.0, 0.0])
    for dx1 in range(-2, 3):
        for dy1 in range(-2, 3):
            ha = np.round(a[2]) + [dx1, dy1]
            for dx2 in range(-2, 3):
                for dy2 in range(-2, 3):
                    hb = np.round(b[1]) + [dx2, dy2]
                    u, v = p - ha, hb - p
                    ang = abs(math.degrees(math.atan2(u[0] * v[1] - u[1] * v[0], u @ v)))
                    best = min(best, ang)
    assert cmd.residual_angle == pytest.approx(best, abs=1e-12)
    assert cmd.residual_angle < SETTINGS.kink_angle
    assert not has(new, "kink")


def test_two_lines_are_not_smoothed_by_turning_handles():
    c = Contour.from_points([[[0, 0], [50, 0]], [[50, 0], [100, 2]]])
    with pytest.raises(CommandError, match="two lines"):
        SmoothKink(0, 0, 0, 10.0).apply(doc_of(c))


# ---------------------------------------------------------------------------------------------
def exact_curvature(points, at_end):
    """Signed curvature at t = 0 or 1 in exact rationals (sympy), from the curve itself."""
    t = sympy.Symbol("t")
    n = len(points) - 1
    pts = [[sympy.Rational(Fraction(float(v))) for v in p] for p in points]
    x = sum(sympy.binomial(n, i) * t**i * (1 - t) ** (n - i) * pts[i][0] for i in range(n + 1))
    y = sum(sympy.binomial(n, i) * t**i * (1 - t) ** (n - i) * pts[i][1] for i in range(n + 1))
    tv = 1 if at_end else 0
    x1, y1 = sympy.diff(x, t).subs(t, tv), sympy.diff(y, t).subs(t, tv)
    x2, y2 = sympy.diff(x, t, 2).subs(t, tv), sympy.diff(y, t, 2).subs(t, tv)
    # κ = (x′y″ − y′x″)/|B′|³ (e.g. do Carmo, Differential Geometry of Curves, §1-5)
    return float((x1 * y2 - y1 * x2) / sympy.sqrt(x1**2 + y1**2) ** 3)


def g1_pair_with_jump():
    # tangent-continuous at (50, 0) (both handles on the x axis), curvatures differ
    a = [[0, 0], [10, 30], [35, 0], [50, 0]]
    b = [[50, 0], [62, 0], [90, 25], [100, 0]]
    c = [[100, 0], [110, -25], [20, -40], [0, 0]]
    return Contour.from_points([a, b, c], closed=True)


def test_match_curvature_equal_to_1e9_relative():
    doc = doc_of(g1_pair_with_jump())
    assert has(doc, "curvature-jump", join=0)
    old = doc.outlines[0].contours[0].segments
    cmd = MatchCurvature(0, 0, 0, max_change=2.0)
    new = cmd.apply(doc)
    a, b, _ = new.outlines[0].contours[0].segments
    ka, kb = exact_curvature(a, True), exact_curvature(b, False)
    # both sides equal (issue 11: 1e-9 relative), from sympy's exact rational evaluation
    assert abs(ka - kb) <= 1e-9 * max(abs(ka), abs(kb))
    assert cmd.curvatures[0] == pytest.approx(ka, rel=1e-12)
    # far ends keep their curvature (both handles move along their tangents)
    assert exact_curvature(a, False) == pytest.approx(exact_curvature(old[0], False), rel=1e-9)
    assert exact_curvature(b, True) == pytest.approx(exact_curvature(old[1], True), rel=1e-9)
    # tangents kept: G1 at the join and at the far ends
    for s_new, s_old in ((a, old[0]), (b, old[1])):
        for t_new, t_old in zip(end_tangents(s_new), end_tangents(s_old), strict=True):
            np.testing.assert_allclose(t_new, t_old, atol=1e-12)
    assert not has(new, "curvature-jump", join=0)
    check_change(cmd, doc, new)
    check_refused(lambda m: MatchCurvature(0, 0, 0, m), doc, 0.01)


def test_match_curvature_next_to_a_line_makes_it_zero():
    c = Contour.from_points([[[0, 0], [50, 0]], [[50, 0], [60, 0], [90, 20], [100, 30]]])
    doc = doc_of(c)
    new = MatchCurvature(0, 0, 0, max_change=20.0).apply(doc)
    seg = new.outlines[0].contours[0].segments[1]
    # κ(0) = 0 next to the line (closed form: P₂ on the tangent line, h = 0), checked exactly
    assert abs(exact_curvature(seg, False)) <= 1e-12
    assert end_curvature_closed_form(seg) == pytest.approx(0.0, abs=1e-15)


def test_end_curvature_closed_form_against_sympy():
    rng = np.random.default_rng(3)
    for k in (3, 4):
        pts = rng.uniform(-10, 10, (k, 2))
        # closed form (n−1)/n · h/L² against sympy's exact κ(0)
        assert end_curvature_closed_form(pts) == pytest.approx(
            exact_curvature(pts, False), rel=1e-12
        )


# ---------------------------------------------------------------------------------------------
def test_add_extremum_points():
    # one wide arc with its top (y maximum) inside: a missing extremum
    c = Contour.from_points([[[0, 0], [10, 40], [50, 40], [60, 0]], [[60, 0], [0, 0]]], closed=True)
    doc = doc_of(c)
    assert has(doc, "missing-extremum")
    cmd = AddExtremumPoints(0, 0, 0, max_change=0.01)
    new = cmd.apply(doc)
    assert not has(new, "missing-extremum")
    segs = new.outlines[0].contours[0].segments
    assert len(segs) == 3
    # the new point is the y maximum: the curve is symmetric about x = 30, so t = ½,
    # y = 3/4 · 40 = 30 (Bernstein weights 3/8 + 3/8 at t = ½; closed form)
    np.testing.assert_allclose(segs[0][-1], [30.0, 30.0], atol=1e-12)
    assert segs[0][2][1] == segs[0][3][1] == segs[1][1][1]
    check_change(cmd, doc, new)
    assert cmd.change.upper <= 1e-4  # an exact split: rounding and measuring accuracy only


# ---------------------------------------------------------------------------------------------
def test_remove_redundant_points_merges_a_split_cubic():
    from outlinebench.geometry.bezier import split

    whole = np.array([[0.0, 0.0], [10.0, 30.0], [40.0, 30.0], [50.0, 0.0]])
    left, right = split(whole, 0.4)
    c = Contour.from_points([left, right, [[50, 0], [0, 0]]], closed=True)
    doc = doc_of(c)
    cmd = RemoveRedundantPoints(0, 0, max_change=0.01)
    new = cmd.apply(doc)
    segs = new.outlines[0].contours[0].segments
    assert len(segs) == 2 and cmd.removed == 1
    # fitted back to the cubic it was split from (de Casteljau split is exact)
    np.testing.assert_allclose(segs[0], whole, atol=1e-6)
    check_change(cmd, doc, new)


def test_remove_redundant_points_removes_a_sliver():
    # a 0.005 mm sliver on a straight side (tiny-segment), stated corner intent kept elsewhere
    c = Contour.from_points(
        [[[0, 0], [20, 0]], [[20, 0], [20.005, 0]], [[20.005, 0], [40, 0]], [[40, 0], [40, 30]],
         [[40, 30], [0, 0]]],
        closed=True,
        joins=("corner",) * 5,
    )  # fmt: skip
    doc = doc_of(c)
    assert has(doc, "tiny-segment")
    cmd = RemoveRedundantPoints(0, 0, max_change=0.01)
    new = cmd.apply(doc)
    assert not has(new, "tiny-segment")
    assert len(new.outlines[0].contours[0].segments) == 3
    check_change(cmd, doc, new)
    # a bent side: removing the point changes the shape by 0.3 (closed form: its offset)
    bent = Contour.from_points(
        [[[0, 0], [20, 0.3]], [[20, 0.3], [40, 0]], [[40, 0], [40, 30]], [[40, 30], [0, 0]]],
        closed=True,
    )
    with pytest.raises(CommandError, match="no point"):
        RemoveRedundantPoints(0, 0, max_change=0.29).apply(doc_of(bent))
    cmd = RemoveRedundantPoints(0, 0, max_change=0.31)
    cmd.apply(doc_of(bent))
    assert cmd.change.upper == pytest.approx(0.3, abs=1e-3)


# ---------------------------------------------------------------------------------------------
def test_fit_curves_to_a_traced_circle():
    t = np.linspace(0, 2 * np.pi, 121)[:-1]
    pts = np.column_stack([30 + 20 * np.cos(t), 30 + 20 * np.sin(t)])
    segs = [[pts[i], pts[(i + 1) % len(pts)]] for i in range(len(pts))]
    doc = doc_of(Contour.from_points(segs, closed=True))
    cmd = FitCurves(0, 0, max_change=0.05)
    new = cmd.apply(doc)
    out = new.outlines[0].contours[0]
    assert out.closed and len(out.segments) <= 8
    check_change(cmd, doc, new)
    # G1 everywhere: no kink found (corners by angle only)
    assert not has(new, "kink")


# ---------------------------------------------------------------------------------------------
def square(x0, y0, s, ccw=True):
    pts = [(x0, y0), (x0 + s, y0), (x0 + s, y0 + s), (x0, y0 + s)]
    if not ccw:
        pts = pts[::-1]
    return Contour.from_points([[pts[i], pts[(i + 1) % 4]] for i in range(4)], closed=True)


def test_fix_direction_reverses_a_proven_hole():
    doc = doc_of(square(0, 0, 40), square(10, 10, 20))
    assert has(doc, "wrong-direction", contour=1)
    cmd = FixDirection(0)
    new = cmd.apply(doc)
    assert not any(f.kind == "wrong-direction" for f in check_document(new, SETTINGS))
    assert cmd.reversed == [1] and cmd.change.upper == 0.0
    # the set of points is the same: shapely agrees the distance is 0
    ref, _ = sampled_change(doc, new)
    assert ref == pytest.approx(0.0, abs=1e-9)


def test_fix_direction_leaves_unproven_containment_and_removes_duplicates():
    crossing = doc_of(square(0, 0, 40), square(30, 10, 20))  # they cross: nothing proven
    with pytest.raises(CommandError, match="not proven"):
        FixDirection(0).apply(crossing)
    dup = doc_of(square(0, 0, 40), square(0, 0, 40))
    cmd = FixDirection(0)
    new = cmd.apply(dup)
    assert cmd.removed == [1] and len(new.outlines[0].contours) == 1


def test_remove_overlaps_is_the_union():
    # two overlapping squares 40 × 40 at (0, 0) and 20 × 20 at (30, 10): the union's area is
    # 1600 + 400 − 10 × 20 = 1800 (closed form: inclusion–exclusion), checked with shapely
    import shapely

    doc = doc_of(square(0, 0, 40), square(30, 10, 20))
    cmd = RemoveOverlaps(0, max_change=100.0)
    new = cmd.apply(doc)
    (c,) = new.outlines[0].contours
    area = abs(signed_area(list(c.segments)))
    ref = shapely.union(shapely.box(0, 0, 40, 40), shapely.box(30, 10, 50, 30)).area
    assert area == pytest.approx(1800.0) and ref == pytest.approx(1800.0)
    # the pieces inside the union are gone: the farthest removed point is the midpoint
    # (30, 20) of the second square's side x = 30, 10√2 from the union's nearest corners
    # (40, 10) and (40, 30) (closed form)
    want = 10.0 * math.sqrt(2.0)
    assert cmd.change.lower <= want + 1e-9 and cmd.change.upper >= want - 1e-9
    assert not [f for f in check_document(new) if f.kind == "self-intersection"]


def test_undo_restores_the_identical_document():
    doc = doc_of(kinked_pair(3.0))
    history = History(doc)
    history.do(SmoothKink(0, 0, 0, 0.5))
    assert not documents_equal(history.document, doc)
    assert history.undo() is doc


def test_join_two_open_contours_then_close():
    a = Contour.from_points([[[10, 10], [70, 10]], [[70, 10], [70, 50]]])
    b = Contour.from_points([[[10, 10.2], [10, 50]], [[10, 50], [69.8, 50]]])
    doc = doc_of(a, b)
    assert has(doc, "gap")
    # A's start meets B's start: A is reversed, then joined
    cmd = JoinContours(0, 0, 1, at_end=False, other_at_end=False, gap_tolerance=2.0,
                       max_change=0.2)  # fmt: skip
    new = cmd.apply(doc)
    assert len(new.outlines[0].contours) == 1
    joined = new.outlines[0].contours[0]
    assert len(joined.segments) == 4 and not joined.closed
    # the ends move along the side x = 10 they lie on: at most half the gap off (closed form)
    assert cmd.change.upper <= 0.1 + 1e-3
    check_change(cmd, doc, new)
    close = CloseGap(0, 0, 2.0, 0.2)
    done = close.apply(new)
    assert done.outlines[0].contours[0].closed
    assert not any(f.kind in ("gap", "open-contour") for f in check_document(done, SETTINGS))
    with pytest.raises(CommandError, match="more than the allowed"):
        JoinContours(0, 0, 1, False, False, 2.0, 0.05).apply(doc)


def test_close_gap_on_the_integer_grid():
    # font units: the midpoint of (0, 0) and (0, 3) is (0, 1.5); on the grid it is rounded
    c = Contour.from_points([[[0, 3], [400, 0]], [[400, 0], [400, 400]], [[400, 400], [0, 0]]])
    doc = doc_of(c)
    assert on_integer_grid(doc)
    new = CloseGap(0, 0, 10.0, 5.0, grid=1.0).apply(doc)
    assert on_integer_grid(new)
    assert new.outlines[0].contours[0].closed


def test_smooth_kink_with_a_quadratic_keeps_its_far_tangent():
    q = [[0, 0], [25, 30], [50, 0]]
    b = [[50, 0], [60, -14], [90, -20], [100, 0]]
    doc = doc_of(Contour.from_points([q, b]))
    assert has(doc, "kink", join=0)
    cmd = SmoothKink(0, 0, 0, max_change=5.0)
    new = cmd.apply(doc)
    nq = new.outlines[0].contours[0].segments[0]
    # the quadratic's handle stays on its start tangent line through (0, 0) and (25, 30)
    assert abs(nq[1][0] * 30 - nq[1][1] * 25) <= 1e-9 * 30 * 25
    assert not has(new, "kink")
    check_change(cmd, doc, new)
