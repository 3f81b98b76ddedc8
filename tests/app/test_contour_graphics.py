"""Drawing data of a contour: travel directions and join marks."""

import math

import bezier
import numpy as np
import pytest

from outlinebench.app.contour_graphics import build_graphics, end_directions
from outlinebench.model.document import Contour


def _unit(v):
    v = np.asarray(v, dtype=float).ravel()
    return v / np.hypot(*v)


def test_end_directions_match_the_hodograph():
    seg = np.array([[0.0, 0.0], [1.0, 3.0], [4.0, 2.0], [5.0, -1.0]])
    start, end = end_directions(seg)
    curve = bezier.Curve.from_nodes(seg.T)
    # Reference: the bezier library's hodograph at t = 0 and t = 1.
    np.testing.assert_allclose(start, _unit(curve.evaluate_hodograph(0.0)), atol=1e-15)
    np.testing.assert_allclose(end, _unit(curve.evaluate_hodograph(1.0)), atol=1e-15)


def test_zero_length_handle_falls_back_to_the_next_control_point():
    seg = np.array([[0.0, 0.0], [0.0, 0.0], [4.0, 2.0], [5.0, -1.0]])
    start, _ = end_directions(seg)
    curve = bezier.Curve.from_nodes(seg.T)
    # B'(0) = 0 here; the limit direction of B'(t) as t → 0 (bezier library, small t).
    np.testing.assert_allclose(start, _unit(curve.evaluate_hodograph(1e-9)), atol=1e-7)


def test_marks_tell_smooth_from_corner():
    square_ish = Contour.from_points(
        [
            [[0, 0], [10, 0]],
            [[10, 0], [15, 0], [20, 5], [20, 10]],  # tangent (1,0) at its start: smooth
            [[20, 10], [0, 10]],  # arrives going down (+y), leaves going left: 90°
            [[0, 10], [0, 0]],
        ],
        closed=True,
        joins=(None, None, "smooth", None),
    )
    g = build_graphics(square_ish)
    kinds = [(m.kind, m.stated) for m in g.marks]
    # Point k is where segment k starts: (0,0) corner inferred, (10,0) smooth inferred,
    # (20,10) turns 90° → corner inferred, (0,10) stated smooth (drawn filled, even though
    # its geometry turns: the panel and the checks report the mismatch).
    assert kinds == [("corner", False), ("smooth", False), ("corner", False), ("smooth", True)]
    # The corner at (0,0) points away from its two arms, out of the shape: (−1, −1)/√2
    # (bisector of the incoming and reversed outgoing directions, closed form).
    dx, dy = g.marks[0].direction
    assert (dx, dy) == pytest.approx((-math.sqrt(0.5), -math.sqrt(0.5)))
    # Handle lines: one cubic → two (on-curve, handle) pairs.
    assert g.handle_lines.shape == (2, 2, 2)
    np.testing.assert_array_equal(g.handle_lines[0], [[10, 0], [15, 0]])
    np.testing.assert_array_equal(g.handle_lines[1], [[20, 10], [20, 5]])
