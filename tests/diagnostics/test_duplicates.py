"""Hole direction only where containment is proven; duplicate contours get their own finding.

Expected values are closed forms beside each check (areas of squares, distances between
parallel lines) and shapely's Hausdorff distance as the independent measurement.
"""

from __future__ import annotations

import pytest
import shapely

from outlinebench.diagnostics import check_document
from outlinebench.io import read_svg

NS = 'xmlns="http://www.w3.org/2000/svg"'


def findings(d: str, **kw):
    doc = read_svg(f'<svg {NS}><path d="{d}"/></svg>'.encode(), **kw).document
    return check_document(doc)


def kinds(fs):
    return sorted(f.kind for f in fs if f.kind not in ("corner",))


def test_exact_duplicate_is_one_finding_not_crossings_or_reverse_it():
    # the same square twice (10 × 10, area 100): one duplicate-contour at distance 0
    fs = findings("M0 0 H10 V10 H0 Z M0 0 H10 V10 H0 Z")
    (dup,) = [f for f in fs if f.kind == "duplicate-contour"]
    assert dup.value == 0.0 and dup.contour == 1 and dup.other_contour == 0
    assert dup.severity == "error" and "exact duplicate of contour 0" in dup.message
    assert "self-intersection" not in kinds(fs) and "wrong-direction" not in kinds(fs)


def test_duplicate_starting_elsewhere_and_reversed():
    # the same point set drawn from another corner, the other way round
    fs = findings("M0 0 H10 V10 H0 Z M10 10 H0 V0 H10 Z")
    (dup,) = [f for f in fs if f.kind == "duplicate-contour"]
    assert dup.value == 0.0


def test_near_duplicate_reports_its_distance():
    # a second square moved by 0.05 in x: Hausdorff distance 0.05 (closed form: parallel
    # sides 0.05 apart), checked with shapely; 0.05 is under 1 % of the 14.1 diagonal
    fs = findings("M0 0 H10 V10 H0 Z M0.05 0 H10.05 V10 H0.05 Z")
    (dup,) = [f for f in fs if f.kind == "duplicate-contour"]
    ref = shapely.Polygon([(0, 0), (10, 0), (10, 10), (0, 10)]).exterior.hausdorff_distance(
        shapely.Polygon([(0.05, 0), (10.05, 0), (10.05, 10), (0.05, 10)]).exterior
    )
    assert dup.value == pytest.approx(ref, abs=1e-9) and ref == pytest.approx(0.05)
    assert "self-intersection" not in kinds(fs)


def test_a_real_hole_winding_the_same_way_is_still_reported():
    # containment proven (the inner square does not cross the outer): reverse it
    fs = findings("M0 0 H10 V10 H0 Z M2 2 H8 V8 H2 Z")
    (wd,) = [f for f in fs if f.kind == "wrong-direction"]
    assert wd.contour == 1 and wd.value == pytest.approx(36.0)  # 6 × 6


def test_crossing_contours_get_no_direction_advice():
    # the inner square pokes out of the outer one: its probe point is inside, but the two
    # cross, so containment is not proven and "reverse it" would be a guess
    fs = findings("M0 0 H10 V10 H0 Z M2 2 H12 V8 H2 Z")
    assert "self-intersection" in kinds(fs)
    assert "wrong-direction" not in kinds(fs)
