"""Joins judged against closed forms: exact G2, known curvature jumps, kinks of known angle."""

import math

import numpy as np
import pytest
from diag_docs import doc_of, of_kind, polygon
from hypothesis import given, settings
from hypothesis import strategies as st

from outlinebench.diagnostics import CheckSettings, check_document
from outlinebench.diagnostics.continuity import (
    INTENT_CORNER,
    INTENT_NONE,
    JOIN_CORNER,
    JOIN_CURVATURE_JUMP,
    JOIN_KINK,
    JOIN_OK,
    classify_joins,
    relative_curvature_jump,
    turn_angles,
)
from outlinebench.model.document import Contour

# y = x² on [0, 1] as a cubic (kurbo's test curve; Farin: degree elevation of the quadratic
# (0,0),(1/2,0),(1,1)), and on [1, 2]: quadratic (1,1),(3/2,2),(2,4) elevated.
PARABOLA_A = [(0, 0), (1 / 3, 0), (2 / 3, 1 / 3), (1, 1)]
PARABOLA_B = [(1, 1), (4 / 3, 5 / 3), (5 / 3, 8 / 3), (2, 4)]


def graph_curvature(f1: float, f2: float) -> float:
    # curvature of a graph y = f(x): κ = f″ / (1 + f′²)^{3/2} (closed form, do Carmo §1-5)
    return f2 / (1.0 + f1 * f1) ** 1.5


def test_exact_g2_cubic_cubic_join_has_no_finding():
    doc = doc_of(Contour.from_points([PARABOLA_A, PARABOLA_B]))
    assert of_kind(check_document(doc), "curvature-jump") == []
    assert of_kind(check_document(doc), "kink") == []
    # and the measured jump is zero to rounding: both sides κ = 2/5^{3/2} (graph formula)
    from outlinebench.geometry import end_curvatures

    k_in = end_curvatures(np.array(PARABOLA_A, float))[1]
    k_out = end_curvatures(np.array(PARABOLA_B, float))[0]
    assert k_in == pytest.approx(graph_curvature(2.0, 2.0), rel=1e-12)
    assert k_out == pytest.approx(graph_curvature(2.0, 2.0), rel=1e-12)
    assert relative_curvature_jump(np.array([k_in]), np.array([k_out]), 1e-9)[0] < 1e-12


def test_g1_join_with_known_curvature_jump():
    # y = x² on [0,1], then y = 1 + 2u + 3u² (u = x − 1) as a quadratic (1,1),(1.5,2),(2,6):
    # same slope 2 at x = 1, κ before 2/5^{3/2}, after 6/5^{3/2}: relative jump |2 − 6|/6 = 2/3
    doc = doc_of(Contour.from_points([PARABOLA_A, [(1, 1), (1.5, 2), (2, 6)]]))
    jumps = of_kind(check_document(doc), "curvature-jump")
    assert len(jumps) == 1
    f = jumps[0]
    assert f.value == pytest.approx(2 / 3, rel=1e-12)
    assert f.curvature_before == pytest.approx(graph_curvature(2, 2), rel=1e-12)
    assert f.curvature_after == pytest.approx(graph_curvature(2, 6), rel=1e-12)
    assert (f.x, f.y) == (1.0, 1.0)
    assert f.segment == 0 and f.join == 0 and f.severity == "warning"
    assert f.unit == "relative"


def test_straight_into_curve_gives_one_and_is_info():
    # a line along +x into a quarter circle of radius 2 starting tangentially: κ 0 → 1/2
    # (circle curvature 1/r), relative difference 1 by definition (issue text)
    k = 4 * (math.sqrt(2) - 1) / 3
    arc = [(1, 0), (1 + 2 * k, 0), (3, 2 - 2 * k), (3, 2)]
    doc = doc_of(Contour.from_points([[(0, 0), (1, 0)], arc]))
    (f,) = of_kind(check_document(doc), "curvature-jump")
    assert f.value == 1.0
    assert f.curvature_before == 0.0
    # the cubic quarter circle's end curvature: (2/3)|P1−P0 × P2−P1|/|P1−P0|³ (Farin end
    # curvature formula) with P1 − P0 = (2k, 0) and P2 − P1 = (3 − (1 + 2k), 2 − 2k):
    d1 = np.array([2 * k, 0.0])
    d2 = np.array([2 - 2 * k, 2 - 2 * k])
    expect = (2 / 3) * (d1[0] * d2[1] - d1[1] * d2[0]) / np.linalg.norm(d1) ** 3
    assert f.curvature_after == pytest.approx(expect, rel=1e-12)
    assert f.severity == "info"  # CheckSettings.straight_into_curve_severity default


@pytest.mark.parametrize("theta", [0.6, 3.0, 9.9])
def test_kink_of_known_angle(theta):
    # two lines turning by θ at (1, 0): the turn angle is θ exactly (construction)
    r = math.radians(theta)
    doc = doc_of(polygon([(0, 0), (1, 0), (1 + math.cos(r), math.sin(r))], closed=False))
    (f,) = of_kind(check_document(doc), "kink")
    assert f.value == pytest.approx(theta, abs=1e-9)
    assert f.unit == "degrees" and f.severity == "warning"


def test_angle_just_below_kink_tolerance_is_smooth_and_corner_from_corner_angle():
    r = math.radians(0.4)  # below the default kink angle 0.5°
    doc = doc_of(polygon([(0, 0), (1, 0), (1 + math.cos(r), math.sin(r))], closed=False))
    assert of_kind(check_document(doc), "kink") == []
    r = math.radians(45.0)
    doc = doc_of(polygon([(0, 0), (1, 0), (1 + math.cos(r), math.sin(r))], closed=False))
    (f,) = of_kind(check_document(doc), "corner")
    assert f.value == pytest.approx(45.0, abs=1e-9) and f.severity == "info"


def test_join_intent_from_the_file_wins():
    r3 = math.radians(3.0)
    pts = [(0, 0), (1, 0), (1 + math.cos(r3), math.sin(r3))]
    # "corner": never a kink; reported as an (intended) corner, info
    doc = doc_of(polygon(pts, closed=False, joins=("corner",)))
    found = check_document(doc)
    assert of_kind(found, "kink") == []
    assert of_kind(found, "corner")[0].severity == "info"
    # "smooth" with a 3° turn: a kink and an error; with 45°: a corner and an error
    doc = doc_of(polygon(pts, closed=False, joins=("smooth",)))
    assert of_kind(check_document(doc), "kink")[0].severity == "error"
    r = math.radians(45.0)
    doc = doc_of(polygon([(0, 0), (1, 0), (1 + math.cos(r), math.sin(r))], False, ("smooth",)))
    assert of_kind(check_document(doc), "corner")[0].severity == "error"


def test_classify_joins_table():
    # directions at 0°, 1°, 20° from +x; κ equal or not (hand-made table, closed form angles)
    def unit(deg):
        return [math.cos(math.radians(deg)), math.sin(math.radians(deg))]

    d_in = np.array([[1.0, 0.0]] * 5)
    d_out = np.array([unit(0), unit(1), unit(20), unit(1), unit(0)])
    k_in = np.array([1.0, 1.0, 1.0, 1.0, 1.0])
    k_out = np.array([1.0, 1.0, 1.0, 1.0, 1.5])
    intent = np.array([INTENT_NONE, INTENT_NONE, INTENT_NONE, INTENT_CORNER, INTENT_NONE])
    verdict, angle, jump = classify_joins(
        d_in, d_out, k_in, k_out, intent.astype(np.int8),
        kink_angle=0.5, corner_angle=10.0, curvature_jump=0.05, straight=1e-9,
    )  # fmt: skip
    assert verdict.tolist() == [JOIN_OK, JOIN_KINK, JOIN_CORNER, JOIN_CORNER, JOIN_CURVATURE_JUMP]
    assert angle == pytest.approx([0, 1, 20, 1, 0], abs=1e-12)
    assert jump[4] == pytest.approx(0.5 / 1.5)  # |1 − 1.5| / 1.5


def test_turn_angle_near_reversal_is_accurate():
    # atan2 form: a turn of 180° − 1e-7 rad is resolved (arccos of the dot product is not)
    eps = 1e-7
    a = turn_angles(np.array([[1.0, 0.0]]), np.array([[-math.cos(eps), math.sin(eps)]]))
    assert a[0] == pytest.approx(180.0 - math.degrees(eps), abs=1e-9)


def test_curvature_matches_svgpathtools():
    # reference library: svgpathtools CubicBezier.curvature (unsigned κ)
    svgpathtools = pytest.importorskip("svgpathtools")
    from outlinebench.diagnostics.segment_checks import segment_table

    rng = np.random.default_rng(7)
    segs = [rng.uniform(-10, 10, size=(4, 2)) for _ in range(30)]
    table = segment_table(segs)
    for s, k0, k1 in zip(segs, table.k0, table.k1, strict=True):
        c = svgpathtools.CubicBezier(*(complex(x, y) for x, y in s))
        assert abs(k0) == pytest.approx(c.curvature(0.0), rel=1e-9)
        assert abs(k1) == pytest.approx(c.curvature(1.0), rel=1e-9)


def test_degenerate_handle_tangent_comes_from_next_point():
    # cubic whose first handle sits on P0: its start direction is that of P2 − P0 (first
    # non-zero derivative, Farin), so a line arriving along that direction meets it smoothly
    cubic = [(1, 0), (1, 0), (2, 1), (3, 1)]
    doc = doc_of(Contour.from_points([[(0, -1), (1, 0)], cubic]))
    found = check_document(doc, CheckSettings())
    assert of_kind(found, "kink") == [] and of_kind(found, "corner") == []
    (h,) = of_kind(found, "degenerate-handle")
    assert (h.segment, h.t, h.value) == (1, 0.0, 0.0)


_coord = st.floats(-50, 50, allow_nan=False)
_len = st.floats(0.5, 20, allow_nan=False)


@settings(max_examples=25)
@given(
    st.floats(0, 2 * math.pi), _len, _len, _coord, _coord, _coord, _coord, _coord, _coord,
    _coord, _coord,
)  # fmt: skip
def test_collinear_handles_make_a_g1_join(theta, l1, l2, ax, ay, bx, by, cx, cy, dx, dy):
    # property: handles on opposite sides of the join along one direction u give equal unit
    # tangents (Farin: G1 condition for Bézier joins), so the join is never a kink or corner;
    # the curvatures reported match svgpathtools on both sides
    svgpathtools = pytest.importorskip("svgpathtools")
    u = np.array([math.cos(theta), math.sin(theta)])
    j = np.array([3.0, -2.0])
    a = [(ax, ay), (bx, by), tuple(j - l1 * u), tuple(j)]
    b = [tuple(j), tuple(j + l2 * u), (cx, cy), (dx, dy)]
    # (only the join inside the contour: random ends may also meet each other)
    found = [f for f in check_document(doc_of(Contour.from_points([a, b]))) if f.join == 0]
    assert not [f for f in found if f.kind in ("kink", "corner")]
    for f in of_kind(found, "curvature-jump"):
        ca = svgpathtools.CubicBezier(*(complex(*p) for p in a))
        cb = svgpathtools.CubicBezier(*(complex(*p) for p in b))
        assert abs(f.curvature_before) == pytest.approx(ca.curvature(1.0), rel=1e-6, abs=1e-9)
        assert abs(f.curvature_after) == pytest.approx(cb.curvature(0.0), rel=1e-6, abs=1e-9)
