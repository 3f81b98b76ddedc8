"""Gaps, open contours, winding of holes and crossings between segments and contours."""

import math

import numpy as np
import pytest
from diag_docs import circle, doc_of, kinds, of_kind, polygon

from outlinebench.diagnostics import CheckSettings, check_document
from outlinebench.diagnostics.contour_checks import point_in_polygon
from outlinebench.model.document import Contour


def test_gap_to_own_start_of_known_size():
    # a 3-4-5 construction: the open end stops at (0.18, 0.24), 0.3 from the start (0, 0)
    c = polygon([(0, 0), (10, 0), (10, 10), (0.18, 0.24)], closed=False)
    found = check_document(doc_of(c))
    (g,) = of_kind(found, "gap")
    assert g.value == pytest.approx(0.3, rel=1e-12) and g.severity == "error"
    assert g.other_contour == g.contour == 0
    (o,) = of_kind(found, "open-contour")
    assert o.severity == "warning"


def test_gap_between_two_open_contours():
    a = polygon([(0, 0), (10, 0)], closed=False)
    b = polygon([(10.5, 0), (20, 0)], closed=False)  # 0.5 after a's end (construction)
    found = check_document(doc_of(a, b))
    (g,) = of_kind(found, "gap")
    assert g.value == pytest.approx(0.5) and {g.contour, g.other_contour} == {0, 1}
    assert len(of_kind(found, "open-contour")) == 2


def test_gap_beyond_search_distance_is_only_open():
    c = polygon([(0, 0), (10, 0), (10, 10), (0, 3)], closed=False)  # ends 3 apart > 2 mm
    found = check_document(doc_of(c))
    assert of_kind(found, "gap") == [] and kinds(found).count("open-contour") == 1


def test_ends_within_tolerance_are_joined_and_their_join_checked():
    # ends 0.005 apart (< 0.01): joined; the join there turns 90° (square corner) -> a corner
    c = polygon([(0, 0.005), (0, 10), (10, 10), (10, 0), (0, 0)], closed=False)
    found = check_document(doc_of(c))
    assert of_kind(found, "gap") == []
    corners = of_kind(found, "corner")
    assert len(corners) == 4  # three inside the contour, one where the ends meet
    (o,) = of_kind(found, "open-contour")
    assert o.severity == "info"


def test_two_open_contours_meeting_with_a_kink():
    r = math.radians(4.0)
    a = polygon([(0, 0), (10, 0)], closed=False)
    b = polygon([(10, 0), (10 + 10 * math.cos(r), 10 * math.sin(r))], closed=False)
    (k,) = of_kind(check_document(doc_of(a, b)), "kink")
    assert k.value == pytest.approx(4.0, abs=1e-9)


def test_hole_winding_the_same_way_is_wrong_direction():
    outer = circle(0, 0, 10, ccw=True)
    same = circle(0, 0, 4, ccw=True)
    other = circle(0, 0, 4, ccw=False)
    (f,) = of_kind(check_document(doc_of((outer, same))), "wrong-direction")
    assert f.contour == 1 and f.other_contour == 0 and f.severity == "error"
    # area of the hole: π r² for the exact circle; the cubic circle is 0.03 % larger
    assert f.value == pytest.approx(math.pi * 16, rel=1e-3)
    assert of_kind(check_document(doc_of((outer, other))), "wrong-direction") == []


def test_island_inside_a_hole_winds_like_the_outer_contour():
    outer = circle(0, 0, 10, ccw=True)
    hole = circle(0, 0, 6, ccw=False)
    island = circle(0, 0, 2, ccw=True)
    assert of_kind(check_document(doc_of((outer, hole, island))), "wrong-direction") == []
    bad_island = circle(0, 0, 2, ccw=False)
    (f,) = of_kind(check_document(doc_of((outer, hole, bad_island))), "wrong-direction")
    assert f.contour == 2 and f.other_contour == 1


def test_separate_outlines_do_not_count_as_holes():
    assert check_document(doc_of(circle(0, 0, 10), circle(0, 0, 4))) == []


def test_figure_eight_crossing_at_known_point():
    # A: (0,0),(1,2),(3,−2),(4,0) has y(t) = 6t(1−t)(1−2t); B runs back along A mirrored in
    # the x axis, so they cross where y = 0 inside: t = ½, at (2, 0) (closed form)
    a = [(0, 0), (1, 2), (3, -2), (4, 0)]
    b = [(4, 0), (3, 2), (1, -2), (0, 0)]
    c = Contour.from_points([a, b], closed=True)
    (f,) = of_kind(check_document(doc_of(c)), "self-intersection")
    assert (f.x, f.y) == pytest.approx((2.0, 0.0), abs=1e-7)
    assert f.t == pytest.approx(0.5, abs=1e-7) and f.other_t == pytest.approx(0.5, abs=1e-7)
    assert (f.segment, f.other_segment) == (0, 1)


def test_bowtie_of_lines():
    c = polygon([(0, 0), (1, 1), (1, 0), (0, 1)])
    (f,) = of_kind(check_document(doc_of(c)), "self-intersection")
    assert (f.x, f.y) == pytest.approx((0.5, 0.5)) and f.value == pytest.approx(90.0)


def test_contours_of_one_outline_crossing():
    a = polygon([(0, 0), (10, 0), (10, 10), (0, 10)])
    b = polygon([(5, 5), (15, 5), (15, 7), (5, 7)])  # crosses a's right side at y = 5 and 7
    found = of_kind(check_document(doc_of((a, b))), "self-intersection")
    assert sorted((round(f.x, 9), round(f.y, 9)) for f in found) == [(10, 5), (10, 7)]
    # the same contours in two different outlines are not checked against each other
    assert of_kind(check_document(doc_of(a, b)), "self-intersection") == []


def test_square_has_only_corners():
    found = check_document(doc_of(polygon([(0, 0), (10, 0), (10, 10), (0, 10)])))
    assert kinds(found) == ["corner"] * 4


def test_point_in_polygon_against_shapely():
    shapely = pytest.importorskip("shapely")
    from shapely.geometry import Point, Polygon

    rng = np.random.default_rng(11)
    ang = np.sort(rng.uniform(0, 2 * np.pi, 12))
    rad = rng.uniform(3, 10, 12)
    poly = np.stack([rad * np.cos(ang), rad * np.sin(ang)], axis=1)
    ref = Polygon(poly)
    for p in rng.uniform(-10, 10, size=(200, 2)):
        if ref.exterior.distance(Point(p)) < 1e-6:
            continue
        assert point_in_polygon(p, poly) == ref.contains(Point(p)), p
    assert shapely.__version__


def test_settings_scale_with_the_document_unit():
    # the same 0.3-unit gap is 0.3 mm at 1 mm/unit but 0.003 mm at 0.01 mm/unit (below the
    # 0.01 mm tolerance): then the ends count as joined
    c = polygon([(0, 0), (10, 0), (10, 10), (0.18, 0.24)], closed=False)
    assert of_kind(check_document(doc_of(c, mm_per_unit=1.0)), "gap")
    assert not of_kind(check_document(doc_of(c, mm_per_unit=0.01)), "gap")
    assert not of_kind(check_document(doc_of(c), CheckSettings(gap_mm=0.5)), "gap")


def test_line_folding_back_on_itself():
    # (0,0)→(10,0)→(5,0): the second line runs back over the first (construction): a 180°
    # corner at (10, 0) and an overlap reported as a self-intersection reaching (5, 0)
    found = check_document(doc_of(polygon([(0, 0), (10, 0), (5, 0), (5, 5)], closed=False)))
    assert [f.value for f in of_kind(found, "corner")][0] == pytest.approx(180.0)
    hits = of_kind(found, "self-intersection")
    assert hits and all((f.x, f.y) == pytest.approx((5.0, 0.0)) for f in hits)


def test_lines_may_meet_matches_shapely():
    # reference library: shapely LineString.intersects on random non-neighbouring lines
    pytest.importorskip("shapely")
    from shapely.geometry import LineString

    from outlinebench.diagnostics.contour_checks import lines_may_meet
    from outlinebench.geometry import to_cubic

    rng = np.random.default_rng(2)
    a = rng.uniform(0, 10, size=(300, 2, 2))
    b = rng.uniform(0, 10, size=(300, 2, 2))
    got = lines_may_meet(to_cubic(a), to_cubic(b), np.zeros(300, dtype=np.int8))
    ref = [LineString(p).intersects(LineString(q)) for p, q in zip(a, b, strict=True)]
    assert got.tolist() == ref


def test_open_contours_chained_into_a_loop_are_info():
    # two open halves of a square whose ends meet exactly: a closed chain, so "open" is only
    # info; both meeting points are 90° corners (construction)
    a = polygon([(0, 0), (10, 0), (10, 10)], closed=False)
    b = polygon([(10, 10), (0, 10), (0, 0)], closed=False)
    found = check_document(doc_of(a, b))
    assert [f.severity for f in of_kind(found, "open-contour")] == ["info", "info"]
    assert len(of_kind(found, "corner")) == 4 and of_kind(found, "gap") == []
