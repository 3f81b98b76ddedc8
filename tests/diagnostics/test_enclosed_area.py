"""Enclosed area of a contour that crosses itself, and winding numbers, against closed forms."""

import numpy as np
import pytest
from diag_docs import circle

from outlinebench.diagnostics.enclosed_area import enclosed_area, winding_number
from outlinebench.geometry import to_cubic


def _lines(points):
    pts = [np.array(p, dtype=float) for p in points]
    return [np.stack([pts[i], pts[(i + 1) % len(pts)]]) for i in range(len(pts))]


def test_bow_tie_is_two_triangles():
    # (0,0)→(2,2)→(2,0)→(0,2): the diagonals cross at (1,1), t = ½ on both; two triangles
    # of area ½ · 2 · 1 = 1 each (closed form), while the signed area is 0
    segs = _lines([(0, 0), (2, 2), (2, 0), (0, 2)])
    assert enclosed_area(segs, [[0.5], [], [0.5], []]) == pytest.approx(2.0, abs=1e-12)


def test_simple_contour_gives_its_absolute_area():
    # unit square, either direction: area 1 (closed form)
    segs = _lines([(0, 0), (1, 0), (1, 1), (0, 1)])
    assert enclosed_area(segs, [[]] * 4) == pytest.approx(1.0, abs=1e-12)
    rev = _lines([(0, 0), (0, 1), (1, 1), (1, 0)])
    assert enclosed_area(rev, [[]] * 4) == pytest.approx(1.0, abs=1e-12)


def test_winding_number_of_a_circle():
    # a counter-clockwise circle winds once around its centre, not around outside points
    # (definition of the winding number); clockwise gives −1
    ccw = np.stack([to_cubic(s) for s in circle(0, 0, 5, ccw=True).segments])
    cw = np.stack([to_cubic(s) for s in circle(0, 0, 5, ccw=False).segments])
    assert winding_number(ccw, np.array([0.5, 0.2])) == 1
    assert winding_number(cw, np.array([0.5, 0.2])) == -1
    assert winding_number(ccw, np.array([6.0, 0.0])) == 0
    assert winding_number(ccw, np.array([-6.0, 0.0])) == 0
