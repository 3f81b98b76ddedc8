"""Single-segment checks against closed forms: cusps, loops, tiny segments, handles, extrema."""

import numpy as np
import pytest
from diag_docs import circle, doc_of, kinds, of_kind

from outlinebench.diagnostics import check_document
from outlinebench.diagnostics.segment_checks import monotone_mask, segment_table
from outlinebench.model.document import Contour


def cusp_cubic(t0: float, p0=(0.0, 0.0), a=(1.0, 0.0), b=(0.0, 3.0)):
    """Cubic with B′(t) = (t − t0)(a + b t): a cusp at t0 (closed form).

    B(t) = P0 + c1 t + c2 t² + c3 t³ with c1 = −t0 a, c2 = (a − t0 b)/2, c3 = b/3; Bernstein
    points P1 = P0 + c1/3, P2 = P0 + 2c1/3 + c2/3, P3 = P0 + c1 + c2 + c3 (Farin, monomial to
    Bernstein).
    """
    p0, a, b = np.array(p0), np.array(a), np.array(b)
    c1, c2, c3 = -t0 * a, (a - t0 * b) / 2, b / 3
    pts = [p0, p0 + c1 / 3, p0 + 2 * c1 / 3 + c2 / 3, p0 + c1 + c2 + c3]
    return [tuple(p) for p in pts], p0 + c1 * t0 + c2 * t0**2 + c3 * t0**3


def test_cusp_at_half_of_the_crossed_handles_cubic():
    # (0,0),(1,1),(0,1),(1,0): B′/3 = ((1−2t)², 1−2t) vanishes at t = ½; B(½) = (½, ¾)
    doc = doc_of(Contour.from_points([[(0, 0), (1, 1), (0, 1), (1, 0)]]))
    (f,) = of_kind(check_document(doc), "cusp")
    assert f.t == pytest.approx(0.5, abs=1e-9)
    assert (f.x, f.y) == pytest.approx((0.5, 0.75), abs=1e-9)
    assert f.value == pytest.approx(180.0, abs=0.5) and f.severity == "error"


@pytest.mark.parametrize("t0", [0.25, 0.6])
def test_cusp_at_a_known_parameter(t0):
    pts, tip = cusp_cubic(t0)
    doc = doc_of(Contour.from_points([pts]))
    (f,) = of_kind(check_document(doc), "cusp")
    assert f.t == pytest.approx(t0, abs=1e-7)
    assert (f.x, f.y) == pytest.approx(tuple(tip), abs=1e-9)


def test_loop_inside_one_cubic_is_a_self_intersection():
    # (0,0),(3,3),(-1,3),(2,0) is symmetric about x = 1, so the loop closes on that axis:
    # x(t) = 1 gives t and 1 − t (symmetry, closed form)
    doc = doc_of(Contour.from_points([[(0, 0), (3, 3), (-1, 3), (2, 0)]]))
    (f,) = of_kind(check_document(doc), "self-intersection")
    assert f.x == pytest.approx(1.0, abs=1e-7)
    assert f.t + f.other_t == pytest.approx(1.0, abs=1e-7)
    assert of_kind(check_document(doc), "cusp") == []


def test_tiny_segment_and_its_length():
    # a 0.004 mm line inside a contour (gap tolerance 0.01 mm by default)
    doc = doc_of(
        Contour.from_points([[(0, 0), (5, 0)], [(5, 0), (5.004, 0)], [(5.004, 0), (9, 0)]])
    )
    (f,) = of_kind(check_document(doc), "tiny-segment")
    assert f.segment == 1 and f.value == pytest.approx(0.004, rel=1e-9)
    assert f.unit == "user"


def test_degenerate_handles_at_both_ends():
    doc = doc_of(Contour.from_points([[(0, 0), (0, 0), (3, 3), (3, 3)]]))
    found = of_kind(check_document(doc), "degenerate-handle")
    assert sorted(f.t for f in found) == [0.0, 1.0]
    # a quadratic whose handle lies on its end point is degenerate too
    doc = doc_of(Contour.from_points([[(0, 0), (2, 2), (2, 2)]]))
    (f,) = of_kind(check_document(doc), "degenerate-handle")
    assert f.t == 1.0


def test_missing_extremum_of_an_arch():
    # (0,0),(0,1),(1,1),(1,0): y(t) = 3t(1 − t) peaks at t = ½ with y = ¾ (closed form), 0.75
    # beyond both ends; x is monotone (x′ ≥ 0), so only the y extremum is missing
    doc = doc_of(Contour.from_points([[(0, 0), (0, 1), (1, 1), (1, 0)]]))
    (f,) = of_kind(check_document(doc), "missing-extremum")
    assert f.t == pytest.approx(0.5) and f.value == pytest.approx(0.75)
    assert (f.x, f.y) == pytest.approx((0.5, 0.75)) and f.severity == "info"


def test_circle_with_points_at_extrema_is_clean():
    doc = doc_of(circle(0, 0, 10))
    assert check_document(doc) == []


def test_monotone_screen_never_hides_a_cusp():
    # property: every cubic with a cusp fails the screen (it is only a shortcut)
    rng = np.random.default_rng(3)
    for _ in range(200):
        pts, _ = cusp_cubic(rng.uniform(0.05, 0.95), a=rng.normal(size=2), b=rng.normal(size=2))
        assert not monotone_mask(np.array([pts]))[0]


def test_handle_within_the_gap_tolerance_takes_its_tangent_from_the_next_point():
    # M0,0 L10,0 C10,0.005 15,0 20,0 (review item 1): the handle lies 0.005 mm from its point,
    # inside the 0.01 mm gap tolerance, so it counts as retracted; B′(0) then comes from the
    # first non-zero derivative, along P2 − P0 = (5, 0) (Farin §4.5), and the line (1, 0)
    # runs straight on: turn 0°, no corner, no kink, only the degenerate handle.
    doc = doc_of(Contour.from_points([[(0, 0), (10, 0)], [(10, 0), (10, 0.005), (15, 0), (20, 0)]]))
    found = check_document(doc)
    assert kinds(found) == ["degenerate-handle", "open-contour"]  # open: no Z
    # the same at a segment's end: C… 5,0 10,-0.005 10,0 then a line on along +x
    doc = doc_of(Contour.from_points([[(0, 0), (5, 0), (10, -0.005), (10, 0)], [(10, 0), (20, 0)]]))
    assert kinds(check_document(doc)) == ["degenerate-handle", "open-contour"]
    # a handle of 0.02 (beyond the tolerance) still sets the tangent: a true 90° corner
    doc = doc_of(Contour.from_points([[(0, 0), (10, 0)], [(10, 0), (10, 0.02), (15, 0), (20, 0)]]))
    (f,) = of_kind(check_document(doc), "corner")
    assert f.value == pytest.approx(90.0, abs=1e-9)  # P1 − P0 = (0, 0.02) ⟂ (1, 0)


def test_retracted_handle_table_uses_the_next_control_point():
    # end directions of the table with the handle snapped onto its point (Farin §4.5)
    seg = np.array([[10.0, 0.0], [10.0, 0.005], [15.0, 1.0], [20.0, 0.0]])
    t = segment_table([seg], gap=0.01)
    assert t.d0[0] == pytest.approx(np.array([5.0, 1.0]) / np.hypot(5.0, 1.0))
    assert t.d1[0] == pytest.approx(np.array([5.0, -1.0]) / np.hypot(5.0, 1.0))
    assert segment_table([seg]).d0[0] == pytest.approx([0.0, 1.0])  # no gap: the drawn handle


@pytest.mark.parametrize("t0", [0.25, 0.6])
def test_cusp_tip_is_not_a_missing_extremum(t0):
    # B′(t) = (t − t0)(a + b t) (closed form above) makes x′ and y′ vanish together at t0: the
    # tip of a cusp, reported as a cusp; it is not an extremum a drafter can put a point on
    # (review item 6). The crossed-handles cubic likewise: B′(½) = 0.
    pts, _ = cusp_cubic(t0)
    found = check_document(doc_of(Contour.from_points([pts])))
    assert len(of_kind(found, "cusp")) == 1
    assert [f.t for f in of_kind(found, "missing-extremum") if abs(f.t - t0) < 1e-3] == []
    found = check_document(doc_of(Contour.from_points([[(0, 0), (1, 1), (0, 1), (1, 0)]])))
    assert len(of_kind(found, "cusp")) == 1 and of_kind(found, "missing-extremum") == []
