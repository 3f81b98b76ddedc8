"""Degenerate input through every public geometry function: defined, finite answers, no NaN.

Families (issue "Foundation … geometry core"): all control points equal, collinear controls
(also running back on themselves), handles lying on their on-curve points, coordinates near
1e9 and near 1e-9; for lines, quadratics and cubics. numpy warnings raised inside the package
are errors in this suite (pyproject filterwarnings), so a division by zero fails here too.
"""

from __future__ import annotations

import numpy as np
import pytest

from outlinebench import geometry as g

FAMILIES = {
    "point": np.full((4, 2), 3.25),
    "collinear": np.array([[0.0, 0.0], [1.0, 1.0], [2.0, 2.0], [3.0, 3.0]]),
    "collinear_back": np.array([[0.0, 0.0], [3.0, 0.0], [-1.0, 0.0], [2.0, 0.0]]),
    "start_handle_on_point": np.array([[0.0, 0.0], [0.0, 0.0], [1.0, 2.0], [3.0, 1.0]]),
    "both_handles_on_points": np.array([[0.0, 0.0], [0.0, 0.0], [3.0, 1.0], [3.0, 1.0]]),
    "huge": np.array([[1e9, 1e9], [1e9 + 3, 1e9 + 7], [1e9 + 8, 1e9 - 2], [1e9 + 10, 1e9]]),
    "tiny": np.array([[0.0, 0.0], [3e-9, 7e-9], [8e-9, -2e-9], [1e-8, 0.0]]),
    "huge_span": np.array([[-1e9, 0.0], [0.0, 1e9], [1e9, 0.0], [0.0, -1e9]]),
}
CASES = [(name, k) for name in FAMILIES for k in (2, 3, 4)]


def _segment(name, k):
    p = FAMILIES[name]
    return p if k == 4 else p[[0, -1]] if k == 2 else p[[0, 1, 3]]


@pytest.mark.parametrize(("name", "k"), CASES)
def test_every_function_gives_finite_answers(name, k):
    p = _segment(name, k)
    ts = np.linspace(0.0, 1.0, 9)
    assert np.isfinite(g.evaluate(p, ts)).all()
    assert np.isfinite(g.derivative_at(p, ts)).all()
    left, right = g.split(p, 0.5)
    assert np.isfinite(left).all() and np.isfinite(right).all()
    kappa = g.curvature(p, ts)
    assert not np.isnan(kappa).any()  # ±inf only at a zero-speed point that turns (documented)
    for arr in (g.unit_tangent(p, ts), g.unit_normal(p, ts), *g.end_tangents(p)):
        assert np.isfinite(arr).all()
        n = np.linalg.norm(arr, axis=-1)
        assert np.all((np.abs(n - 1) < 1e-12) | (n == 0))  # unit, or (0, 0) for a point
    assert not np.isnan(np.array(g.end_curvatures(p))).any()
    assert np.isfinite(g.inflections(p)).all() and np.isfinite(g.cusps(p)).all()
    length = g.arc_length(p)
    assert np.isfinite(length) and length >= 0
    assert np.isfinite(g.arc_length_between(p, 0.25, 0.75))
    assert np.isfinite(g.param_at_length(p, [0.0, length / 2, length])).all()
    tx, ty = g.extrema_params(p)
    assert np.isfinite(tx).all() and np.isfinite(ty).all()
    assert np.isfinite(g.bounding_box(p)).all()
    t, d, pt = g.nearest_point(p, p.mean(axis=0) + 0.5)
    assert np.isfinite([t, d]).all() and np.isfinite(pt).all()
    assert np.isfinite(g.self_intersections(p)).all()
    assert np.isfinite(g.intersections(p, p[::-1] + 1e-3)).all()
    area = g.signed_area([p, np.array([p[-1], p[0]])])
    assert np.isfinite(area)


def test_point_segment_answers():
    p = FAMILIES["point"]
    assert g.arc_length(p) == 0.0
    assert g.curvature(p, 0.5) == 0.0
    np.testing.assert_array_equal(g.unit_tangent(p, 0.5), [0.0, 0.0])
    assert g.bounding_box(p) == (3.25, 3.25, 3.25, 3.25)
    assert g.signed_area([p]) == 0.0
    assert g.nearest_point(p, [3.25, 4.25])[:2] == (0.0, 1.0)


def test_handles_on_points_give_the_chord_direction():
    # Both handles on their on-curve points: the segment is the straight chord, traversed with
    # zero speed at both ends; directions come from B‴ = 6(P3 − P0) (first non-zero
    # derivative), the length is the chord's (closed form: |(3, 1)| = √10).
    p = FAMILIES["both_handles_on_points"]
    s, e = g.end_tangents(p)
    np.testing.assert_allclose(s, np.array([3.0, 1.0]) / 10**0.5)
    np.testing.assert_allclose(e, np.array([3.0, 1.0]) / 10**0.5)
    assert g.arc_length(p) == pytest.approx(10**0.5, rel=1e-14)
    np.testing.assert_allclose(g.curvature(p, [0.0, 0.5, 1.0]), 0.0, atol=1e-9)


def test_intersections_of_a_point_and_of_identical_lines():
    p = FAMILIES["point"]
    got = g.intersections(p, p)
    assert got.shape[1] == 2 and np.isfinite(got).all()
    line = np.array([[0.0, 0.0], [1.0, 1.0]])
    np.testing.assert_allclose(g.intersections(line, line), [[0.0, 0.0], [1.0, 1.0]])
