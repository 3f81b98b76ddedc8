"""Tests of outlinebench.geometry.intersect: segment–segment and self-intersections."""

from __future__ import annotations

import bezier
import numpy as np
import pytest
import sympy
from geometry_cases import EXACT_CUSP, loop_cubics, random_cubics

from outlinebench.geometry.bezier import evaluate, reverse, split, subsegment
from outlinebench.geometry.intersect import (
    intersections,
    line_intersection,
    self_intersections,
)

# Answers agree with the reference libraries to this (bezier documents ~1e-14 after its own
# Newton polish; we ask for 1e-9, the promised accuracy).
PARAM_TOL = 1e-9


def _bezier_pairs(a, b):
    ca = bezier.Curve(np.asfortranarray(a.T), degree=a.shape[0] - 1)
    cb = bezier.Curve(np.asfortranarray(b.T), degree=b.shape[0] - 1)
    got = ca.intersect(cb).T
    return got[np.lexsort((got[:, 1], got[:, 0]))] if got.size else got.reshape(0, 2)


def test_line_line_closed_form():
    # Diagonals of the unit square cross at their midpoints (Cramer's rule by hand).
    got = line_intersection(np.array([[0, 0], [1, 1.0]]), np.array([[0, 1], [1, 0.0]]))
    np.testing.assert_allclose(got, [[0.5, 0.5]])
    # Parallel apart: none. Collinear overlapping: the two ends of the shared stretch.
    assert line_intersection(np.array([[0, 0], [1, 0.0]]), np.array([[0, 1], [1, 1.0]])).size == 0
    got = intersections(np.array([[0, 0], [2, 0.0]]), np.array([[1, 0], [3, 0.0]]))
    np.testing.assert_allclose(got, [[0.5, 0.0], [1.0, 0.5]])
    # Touching at an end point.
    got = intersections(np.array([[0, 0], [1, 0.0]]), np.array([[1, 0], [1, 5.0]]))
    np.testing.assert_allclose(got, [[1.0, 0.0]])


def test_symmetric_cubics_against_sympy():
    # Both have x(t) = 3t, so they cross where y_a(t) = y_b(t), a cubic equation solved
    # exactly by sympy; then ta = tb.
    a = np.array([[0, 0], [1, 2], [2, -1], [3, 1.0]])
    b = np.array([[0, 1], [1, -1], [2, 2], [3, 0.0]])
    t = sympy.symbols("t")
    # A(t) − B(t): x equal for equal t; y difference is a cubic.
    ya = sum(sympy.binomial(3, i) * t**i * (1 - t) ** (3 - i) * int(a[i, 1]) for i in range(4))
    yb = sum(sympy.binomial(3, i) * t**i * (1 - t) ** (3 - i) * int(b[i, 1]) for i in range(4))
    roots = sorted(float(r) for r in sympy.solve(sympy.expand(ya - yb), t) if 0 <= r <= 1)
    got = intersections(a, b)
    np.testing.assert_allclose(got[:, 0], roots, atol=1e-12)
    np.testing.assert_allclose(got[:, 1], roots, atol=1e-12)


def test_random_pairs_against_bezier_package():
    # Reference library: bezier.Curve.intersect (its own subdivision + Newton).
    cubics = random_cubics(40, seed=12)
    total = 0
    for a, b in zip(cubics[::2], cubics[1::2], strict=True):
        got = intersections(a, b)
        want = _bezier_pairs(a, b)
        assert got.shape == want.shape
        np.testing.assert_allclose(got, want, atol=PARAM_TOL)
        if got.size:
            res = np.linalg.norm(evaluate(a, got[:, 0]) - evaluate(b, got[:, 1]), axis=1)
            assert res.max() <= 1e-9
        total += len(got)
    assert total > 10


def test_mixed_degrees_and_tangency():
    # Quadratic (0,0),(1,2),(2,0) has its top (1, 1) at t = ½; the line y = 1 only touches it.
    q = np.array([[0, 0], [1, 2], [2, 0.0]])
    got = intersections(q, np.array([[0, 1], [2, 1.0]]))
    np.testing.assert_allclose(got, [[0.5, 0.5]], atol=1e-7)
    # y = ½ crosses it twice: 4t(1 − t) = ½ → t = (2 ± √2)/4 (closed form).
    got = intersections(q, np.array([[0, 0.5], [2, 0.5]]))
    np.testing.assert_allclose(got[:, 0], [(2 - 2**0.5) / 4, (2 + 2**0.5) / 4], atol=1e-12)
    np.testing.assert_allclose(got[:, 1], got[:, 0], atol=1e-12)  # x(t) = 2t on both


def test_overlap_returns_the_shared_stretch_ends():
    a = np.array([[0, 0], [1, 2], [2, -1], [3, 1.0]])
    np.testing.assert_allclose(intersections(a, subsegment(a, 0.2, 0.7)), [[0.2, 0], [0.7, 1]])
    np.testing.assert_allclose(intersections(a, reverse(a)), [[0, 1], [1, 0]])
    np.testing.assert_allclose(intersections(a, a), [[0, 0], [1, 1]])


def test_degenerate_segments():
    pt = np.full((4, 2), 1.0)
    assert intersections(pt, np.array([[0, 0], [2, 2.0]])).shape == (1, 2)
    assert intersections(pt, np.array([[0, 0], [2, 0.0]])).size == 0
    # Far from the origin and tiny: the same crossing parameters.
    a = np.array([[0, 0], [1, 2], [2, -1], [3, 1.0]])
    b = np.array([[0, 1], [1, -1], [2, 2], [3, 0.0]])
    base = intersections(a, b)
    np.testing.assert_allclose(intersections(a * 1e-9, b * 1e-9), base, atol=1e-9)
    np.testing.assert_allclose(intersections(a + 1e9, b + 1e9), base, atol=1e-6)


def test_self_intersections_against_bezier_package():
    # Reference library: bezier.Curve.self_intersections.
    for p in loop_cubics(6):
        got = self_intersections(p)
        want = bezier.Curve(np.asfortranarray(p.T), degree=3).self_intersections().T
        assert got.shape == (1, 2)
        np.testing.assert_allclose(got, np.sort(want, axis=1), atol=PARAM_TOL)
        assert np.linalg.norm(evaluate(p, got[0, 0]) - evaluate(p, got[0, 1])) <= 1e-12


def test_self_intersection_closed_form_and_none():
    # (0,0),(3/2,1),(−1/2,1),(1,0) is symmetric about x = ½, so the loop closes at t and 1 − t
    # with x(t) = ½: 7t³ − (21/2)t² + (9/2)t − ½ = 0 → t = ½ − √21/14… solved by sympy.
    p = np.array([[0, 0], [1.5, 1], [-0.5, 1], [1, 0.0]])
    t = sympy.symbols("t")
    x = sum(
        sympy.binomial(3, i) * t**i * (1 - t) ** (3 - i) * sympy.Rational(str(p[i, 0]))
        for i in range(4)
    )
    roots = sorted(float(r) for r in sympy.solve(x - sympy.Rational(1, 2), t) if 0 < r < 0.5)
    got = self_intersections(p)
    np.testing.assert_allclose(got, [[roots[0], 1 - roots[0]]], atol=1e-13)
    # No loop: an S-curve, a cusp (the limit t1 = t2), quadratics, collinear, a point.
    assert self_intersections(np.array([[0, 0], [1, 1], [2, -1], [3, 0.0]])).size == 0
    assert self_intersections(EXACT_CUSP).size == 0
    assert self_intersections(np.array([[0, 0], [1, 2], [2, 0.0]])).size == 0
    assert self_intersections(np.array([[0, 0], [3, 0], [-1, 0], [2, 0.0]])).size == 0
    assert self_intersections(np.full((4, 2), 2.0)).size == 0


def test_smooth_join_is_reported_exactly():
    # The two halves of a split meet only at the split point, tangentially (a G1 join):
    # reported once, exactly as (1, 0) (de Casteljau halves share that point bit for bit).
    a = np.array([[0, 0], [1, 2], [2, -1], [3, 1.0]])
    left, right = split(a, 0.4)
    np.testing.assert_array_equal(intersections(left, right), [[1.0, 0.0]])
    b = np.array([[3, 1], [4, 3], [5, 0], [6, 1.0]])
    np.testing.assert_array_equal(intersections(a, b), [[1.0, 0.0]])


@pytest.mark.parametrize("gap", [0.0, 1e-12, -1e-12])
def test_tangential_touch_within_tolerance_is_one_point(gap):
    # The line y = 1 + gap touches the top (1, 1) of 4t(1 − t) at t = ½ (closed form); a gap
    # far inside the distance tolerance still counts as one touching point.
    q = np.array([[0, 0], [1, 2], [2, 0.0]])
    got = intersections(q, np.array([[0, 1 + gap], [2, 1 + gap]]))
    assert got.shape == (1, 2)
    np.testing.assert_allclose(got, [[0.5, 0.5]], atol=1e-5)
    assert intersections(q, np.array([[0, 1 + 1e-6], [2, 1 + 1e-6]])).size == 0


def test_regression_straight_segments_overlapping_on_one_line():
    # Defect: a straight (collinear) cubic or quadratic overlapping another straight segment
    # gave one point, or a false middle point, instead of the ends of the shared stretch.
    # Expected by closed form: these have uniform speed, x(t) = 3t (cubic with controls at
    # 0, 1, 2, 3; quadratic with 0, 1.5, 3), so the stretch ends follow from x alone.
    sc = np.array([[0, 0], [1, 0], [2, 0], [3, 0.0]])
    np.testing.assert_allclose(
        intersections(sc, np.array([[1.5, 0], [4.5, 0.0]])), [[0.5, 0], [1, 0.5]], atol=1e-12
    )
    np.testing.assert_allclose(intersections(sc, sc + [1.5, 0]), [[0.5, 0], [1, 0.5]], atol=1e-12)
    quad = np.array([[0, 0], [1.5, 0], [3, 0.0]])
    np.testing.assert_allclose(
        intersections(quad, np.array([[1, 0], [2, 0.0]])), [[1 / 3, 0], [2 / 3, 1]], atol=1e-12
    )
    np.testing.assert_allclose(intersections(sc, sc), [[0, 0], [1, 1]], atol=1e-12)
    # Uneven speed on a slanted line: x(t) = 6t(1−t)² + 7.5t²(1−t) + 3t³ reaches 1 at the
    # root of that cubic (numpy's polynomial roots as the reference); (3, 3) is the line's
    # middle (tb = 0.5).
    uneven = np.array([[0, 0], [2, 2], [2.5, 2.5], [3, 3.0]])
    roots = np.roots([1.5, -4.5, 6.0, -1.0])  # 1.5t³ − 4.5t² + 6t − 1 = 0, expanded by hand
    ta = float(roots[np.abs(roots.imag) < 1e-12].real[0])
    np.testing.assert_allclose(
        intersections(uneven, np.array([[1, 1], [5, 5.0]])), [[ta, 0], [1, 0.5]], atol=1e-9
    )
    # On one line but apart: nothing; touching end to end: one point.
    assert intersections(sc, sc + [3.5, 0]).size == 0
    np.testing.assert_allclose(intersections(sc, sc + [3, 0]), [[1, 0]], atol=1e-12)
    # Parallel lines apart are not on one line: nothing.
    assert intersections(sc, sc + [0, 1e-3]).size == 0


def test_regression_overlap_of_curves_is_fast():
    # Defect: the merging of candidate answers compared every pair in Python (~3 s here).
    # The answer is the closed form of subsegment: the stretch [0.2, 0.7] of a is all of b.
    # Speed is not asserted (tests never assert times); the work is bounded by counting the
    # answers kept, which may not exceed Bézout's bound + 1 before the overlap is declared.
    import outlinebench.geometry.intersect as mod

    a = np.array([[0, 0], [1, 2], [2, -1], [3, 1.0]])
    kept_sizes = []
    original = mod._dedupe

    def counting(*args, **kwargs):
        out = original(*args, **kwargs)
        kept_sizes.append(out.shape[0])
        return out

    mod._dedupe = counting
    try:
        got = intersections(a, subsegment(a, 0.2, 0.7))
    finally:
        mod._dedupe = original
    np.testing.assert_allclose(got, [[0.2, 0], [0.7, 1]], atol=1e-12)
    assert max(kept_sizes) <= 3 * 3 + 1
