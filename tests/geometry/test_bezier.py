"""Tests of outlinebench.geometry.bezier: validation, evaluation, hodographs, split, elevation."""

from __future__ import annotations

import bezier
import numpy as np
import pytest
import svgpathtools
from geometry_cases import mixed_cubics, random_cubics
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import (
    as_control_points,
    bernstein_matrix,
    degree,
    derivative,
    derivative_at,
    elevate,
    evaluate,
    reverse,
    split,
    split_many,
    subsegment,
    to_cubic,
)

coord = st.floats(-1e3, 1e3, allow_nan=False, allow_infinity=False)
seg_st = st.integers(2, 4).flatmap(
    lambda k: st.lists(st.tuples(coord, coord), min_size=k, max_size=k).map(np.array)
)
# 8-bit-rounded coordinates and dyadic parameters: every de Casteljau step is exact in float64
# (bezier's test suite uses the same device), so split-then-evaluate must be bit-identical.
byte_coord = st.integers(-128, 127).map(lambda v: v / 16.0)
byte_seg_st = st.lists(st.tuples(byte_coord, byte_coord), min_size=4, max_size=4).map(np.array)
dyadic = st.integers(1, 15).map(lambda v: v / 16.0)

# Two float64 evaluations of the same polynomial by different but stable algorithms agree
# to a few ulps of the coordinates' size (Farouki & Rajan, CAGD 4, 1987).
REL = 1e-13


def _svg(p):
    cls = {2: svgpathtools.Line, 3: svgpathtools.QuadraticBezier, 4: svgpathtools.CubicBezier}
    return cls[len(p)](*(complex(*q) for q in p))


def test_validation_messages():
    assert as_control_points([[0, 0], [1, 1]]).dtype == np.float64
    with pytest.raises(InvalidGeometryError, match=r"shape \(K, 2\), got \(3,\)"):
        as_control_points([1, 2, 3])
    with pytest.raises(InvalidGeometryError, match="2, 3 or 4 control points.*got 5"):
        as_control_points(np.zeros((5, 2)))
    with pytest.raises(InvalidGeometryError, match="finite"):
        as_control_points([[0, 0], [np.inf, 1]])
    with pytest.raises(InvalidGeometryError, match="not numbers"):
        as_control_points([["a", 0], [1, 1]])
    assert as_control_points(np.zeros((3, 4, 2)), batch=True).shape == (3, 4, 2)
    src = np.zeros((2, 2))
    assert as_control_points(src) is not src  # never aliased


def test_bernstein_matrix_partition_of_unity_and_general_degree():
    # Σ_i B_{i,n}(t) = 1 (Farin §4.3); degree 5 uses the general formula.
    t = np.linspace(0, 1, 7)
    for n in range(0, 6):
        np.testing.assert_allclose(bernstein_matrix(n, t).sum(axis=1), 1.0, rtol=1e-15)
    assert degree(np.zeros((4, 2))) == 3


def test_evaluate_against_bezier_and_svgpathtools():
    # Reference libraries: bezier.Curve.evaluate_multi and svgpathtools .point(t).
    ts = np.linspace(0, 1, 33)
    for p in mixed_cubics(4):
        got = evaluate(p, ts)
        want = bezier.Curve(np.asfortranarray(p.T), degree=3).evaluate_multi(ts).T
        np.testing.assert_allclose(got, want, rtol=REL, atol=REL * np.abs(p).max())
        sv = np.array([[z.real, z.imag] for z in (_svg(p).point(t) for t in ts)])
        np.testing.assert_allclose(got, sv, rtol=REL, atol=REL * np.abs(p).max())


def test_evaluate_shapes_and_both_algorithms_agree():
    batch = random_cubics(30)
    ts = np.linspace(0, 1, 50)
    many = evaluate(batch, ts)  # the Bernstein-matrix branch
    assert many.shape == (30, 50, 2)
    few = np.stack([evaluate(batch, t) for t in ts], axis=1)  # de Casteljau, scalar t
    np.testing.assert_allclose(many, few, rtol=0, atol=1e-15)
    assert evaluate(batch[0], 0.3).shape == (2,)
    assert evaluate(batch[0], ts).shape == (50, 2)
    assert evaluate(batch, 0.3).shape == (30, 2)
    # Exact end points on both branches (B(0) = P0, B(1) = Pn).
    assert np.array_equal(many[:, 0], batch[:, 0]) and np.array_equal(many[:, -1], batch[:, -1])
    assert np.array_equal(evaluate(batch, 1.0), batch[:, -1])
    # Other dimensions than 2 (used for scalar polynomials).
    assert evaluate(np.ones((4, 1)), ts).shape == (50, 1)


def test_derivatives_against_hodograph_reference_and_finite_differences():
    # Reference library: bezier.Curve.evaluate_hodograph; and central differences (kurbo).
    for p in mixed_cubics(3):
        c = bezier.Curve(np.asfortranarray(p.T), degree=3)
        for t in (0.0, 0.3, 0.77, 1.0):
            want = c.evaluate_hodograph(t)[:, 0]
            np.testing.assert_allclose(derivative_at(p, t), want, rtol=1e-13, atol=1e-12)
        h = 1e-5
        for t in (0.25, 0.6):
            fd = (evaluate(p, t + h) - evaluate(p, t - h)) / (2 * h)
            np.testing.assert_allclose(derivative_at(p, t), fd, rtol=1e-7, atol=1e-7)
            fd2 = (derivative_at(p, t + h) - derivative_at(p, t - h)) / (2 * h)
            np.testing.assert_allclose(derivative_at(p, t, 2), fd2, rtol=1e-7, atol=1e-6)
    # Order above the degree: identically zero.
    np.testing.assert_array_equal(derivative(np.ones((4, 2)), 5), 0.0)
    assert derivative(np.zeros((5, 4, 2)), 2).shape == (5, 2, 2)


def test_split_against_bezier_and_svgpathtools():
    # Reference libraries: bezier.Curve.subdivide (t = ½) and svgpathtools .split(t).
    for p in mixed_cubics(3):
        left, right = split(p, 0.5)
        bl, br = bezier.Curve(np.asfortranarray(p.T), degree=3).subdivide()
        np.testing.assert_allclose(left, bl.nodes.T, rtol=REL, atol=1e-14)
        np.testing.assert_allclose(right, br.nodes.T, rtol=REL, atol=1e-14)
        left, right = split(p, 0.3)
        sl, sr = _svg(p).split(0.3)
        np.testing.assert_allclose(left, [[z.real, z.imag] for z in sl.bpoints()], atol=1e-14)
        np.testing.assert_allclose(right, [[z.real, z.imag] for z in sr.bpoints()], atol=1e-14)


@given(byte_seg_st, dyadic, dyadic)
def test_split_then_evaluate_is_bit_identical(p, t, u):
    # Exact arithmetic with 8-bit coordinates and dyadic parameters (see byte_coord above).
    left, right = split(p, t)
    assert np.array_equal(evaluate(left, u), evaluate(p, t * u))
    assert np.array_equal(evaluate(right, u), evaluate(p, t + (1 - t) * u))
    assert np.array_equal(left[-1], evaluate(p, t)) and np.array_equal(right[0], left[-1])


@given(seg_st, st.floats(0.01, 0.99))
def test_split_then_join_reproduces_the_curve(p, t):
    # Property: the halves, re-parametrised, trace the original (Farin §4.4).
    left, right = split(p, t)
    us = np.linspace(0, 1, 9)
    scale = max(np.abs(p).max(), 1.0)
    np.testing.assert_allclose(evaluate(left, us), evaluate(p, t * us), atol=1e-12 * scale)
    np.testing.assert_allclose(
        evaluate(right, us), evaluate(p, t + (1 - t) * us), atol=1e-12 * scale
    )
    assert np.array_equal(left[0], p[0]) and np.array_equal(right[-1], p[-1])


@given(seg_st)
def test_elevation_is_exact_and_reversal_runs_backwards(p):
    # Degree elevation keeps the curve (Farin §6.1); reversal is B(1 − t).
    us = np.linspace(0, 1, 11)
    scale = max(np.abs(p).max(), 1.0)
    if p.shape[0] < 4:
        np.testing.assert_allclose(evaluate(elevate(p), us), evaluate(p, us), atol=1e-12 * scale)
        assert to_cubic(p).shape == (4, 2)
        np.testing.assert_allclose(evaluate(to_cubic(p), us), evaluate(p, us), atol=1e-12 * scale)
    np.testing.assert_allclose(evaluate(reverse(p), us), evaluate(p, 1 - us), atol=1e-12 * scale)


def test_elevation_against_bezier_package():
    # Reference library: bezier.Curve.elevate.
    q = np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]])
    want = bezier.Curve(np.asfortranarray(q.T), degree=2).elevate().nodes.T
    np.testing.assert_allclose(elevate(q), want, rtol=1e-15)
    # Line to cubic: points at thirds (closed form).
    np.testing.assert_allclose(
        to_cubic(np.array([[0.0, 0.0], [3.0, 6.0]])), [[0, 0], [1, 2], [2, 4], [3, 6]]
    )
    assert elevate(np.zeros((5, 3, 2))).shape == (5, 4, 2)


def test_subsegment_and_split_many():
    p = mixed_cubics(1)[2]
    us = np.linspace(0, 1, 7)
    sub = subsegment(p, 0.2, 0.7)
    np.testing.assert_allclose(evaluate(sub, us), evaluate(p, 0.2 + 0.5 * us), atol=1e-13)
    np.testing.assert_allclose(subsegment(p, 0.7, 0.2), reverse(sub), atol=1e-15)
    np.testing.assert_allclose(subsegment(p, 0.0, 1.0), p)
    np.testing.assert_allclose(subsegment(p, -1.0, 2.0), p)  # clamped to the segment
    point = subsegment(p, 1.0, 1.0)
    np.testing.assert_allclose(point, np.broadcast_to(p[-1], p.shape))
    pieces = split_many(p, [0.75, 0.25, 0.5, 0.5, 0.0, 1.0])
    assert pieces.shape == (4, 4, 2)
    bounds = [0.0, 0.25, 0.5, 0.75, 1.0]
    for piece, t0, t1 in zip(pieces, bounds[:-1], bounds[1:], strict=True):
        np.testing.assert_allclose(
            evaluate(piece, us), evaluate(p, t0 + (t1 - t0) * us), atol=1e-13
        )
    assert np.array_equal(pieces[0, 0], p[0]) and np.array_equal(pieces[-1, -1], p[-1])


@pytest.mark.parametrize("scale", [1e-9, 1e9])
def test_extreme_coordinates_stay_finite(scale):
    p = mixed_cubics(1)[0] * scale
    assert np.isfinite(evaluate(p, np.linspace(0, 1, 100))).all()
    left, right = split(p, 0.5)
    np.testing.assert_allclose(left[-1], evaluate(p, 0.5), rtol=1e-15)
    np.testing.assert_allclose(evaluate(elevate(p), 0.3), evaluate(p, 0.3), rtol=1e-14)


def test_power_coefficients_reproduce_the_curve():
    # Σ c_k t^k (numpy polyval, monomial form) equals the Bernstein form (Farin §4.7);
    # for the parabola cubic, y(t) = t² exactly: coefficients (0, 0, 1, 0).
    from numpy.polynomial import polynomial as P

    from outlinebench.geometry.bezier import power_coefficients

    ts = np.linspace(0, 1, 11)
    for p in mixed_cubics(2):
        c = power_coefficients(p)
        np.testing.assert_allclose(P.polyval(ts, c).T, evaluate(p, ts), atol=1e-12)
    par = np.array([[0.0, 0.0], [1 / 3, 0.0], [2 / 3, 1 / 3], [1.0, 1.0]])
    np.testing.assert_allclose(power_coefficients(par)[:, 1], [0, 0, 1, 0], atol=1e-15)
    assert power_coefficients(random_cubics(3)).shape == (3, 4, 2)


def test_evaluate_and_split_against_mpmath_30_digits():
    # Reference: de Casteljau in mpmath at 30 digits from the same float64 control points,
    # on the seeded random, near-cusp, looping and inflected set.
    import mpmath

    def mp_casteljau(p, t):
        with mpmath.workdps(30):
            w = [[mpmath.mpf(float(v)) for v in row] for row in p]
            t = mpmath.mpf(t)
            left, right = [w[0]], [w[-1]]
            while len(w) > 1:
                w = [
                    [(1 - t) * a + t * b for a, b in zip(w[i], w[i + 1], strict=True)]
                    for i in range(len(w) - 1)
                ]
                left.append(w[0])
                right.append(w[-1])
            return (
                np.array(left, dtype=float),
                np.array(right[::-1], dtype=float),
            )

    for p in mixed_cubics(3):
        scale = np.abs(p).max()
        for t in (0.1, 0.37, 0.5, 0.93):
            left, right = mp_casteljau(p, t)
            np.testing.assert_allclose(evaluate(p, t), left[-1], rtol=0, atol=4e-16 * scale)
            got_l, got_r = split(p, t)
            np.testing.assert_allclose(got_l, left, rtol=0, atol=4e-16 * scale)
            np.testing.assert_allclose(got_r, right, rtol=0, atol=4e-16 * scale)
        ts = np.linspace(0, 1, 65)
        want = np.array([mp_casteljau(p, t)[0][-1] for t in ts])
        np.testing.assert_allclose(evaluate(p, ts), want, rtol=0, atol=4e-16 * scale)
