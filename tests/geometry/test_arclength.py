"""Tests of outlinebench.geometry.arclength: lengths, sub-range lengths, inverse arc length."""

from __future__ import annotations

import bezier
import numpy as np
import pytest
import svgpathtools
from geometry_cases import (
    EXACT_CUSP,
    mixed_cubics,
    mp_length,
    near_cusp_cubics,
    random_cubics,
)
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.arclength import (
    ARC_LENGTH_TOLERANCE,
    arc_length,
    arc_length_between,
    param_at_length,
    quadratic_arc_length,
    segment_lengths,
)
from outlinebench.geometry.bezier import elevate, reverse, split

# Closed forms (see the module docstring of tests/geometry/test_curvature.py for y = x²).
PARABOLA = np.array([[0.0, 0.0], [1 / 3, 0.0], [2 / 3, 1 / 3], [1.0, 1.0]])
PARABOLA_LENGTH = 5**0.5 / 2 + np.log(2 + 5**0.5) / 4  # ∫₀¹ √(1 + 4x²) dx (kurbo's test)
QUAD = np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]])
QUAD_LENGTH = 5**0.5 + np.arcsinh(2.0) / 2  # bezier package docs, Curve.length example

# The accuracy promised by ARC_LENGTH_TOLERANCE, plus rounding of a few float64 sums.
REL = 2 * ARC_LENGTH_TOLERANCE

coord = st.floats(-100, 100, allow_nan=False, allow_infinity=False)
cubic_st = st.lists(st.tuples(coord, coord), min_size=4, max_size=4).map(np.array)


def _rel_err(got, want):
    got, want = np.asarray(got), np.asarray(want)
    return np.abs(got - want) / np.maximum(np.abs(want), 1e-300)


def test_closed_forms():
    assert arc_length(PARABOLA) == pytest.approx(PARABOLA_LENGTH, rel=1e-15)
    assert arc_length(QUAD) == pytest.approx(QUAD_LENGTH, rel=1e-15)
    assert quadratic_arc_length(QUAD) == pytest.approx(QUAD_LENGTH, rel=1e-15)
    # Line: |P1 − P0| exactly (3-4-5 triangle).
    assert arc_length(np.array([[0.0, 0.0], [3.0, 4.0]])) == 5.0


def test_random_and_hard_cubics_against_mpmath_30_digits():
    # Reference: mpmath tanh-sinh at 30 digits, split at the speed minima (geometry_cases).
    cubics = np.concatenate([mixed_cubics(6), near_cusp_cubics(16, seed=9), [EXACT_CUSP]])
    got, est = arc_length(cubics, return_error=True)
    want = np.array([mp_length(p) for p in cubics])
    assert _rel_err(got, want).max() <= REL
    assert est.max() <= ARC_LENGTH_TOLERANCE


def test_against_bezier_and_svgpathtools():
    # Reference libraries: bezier.Curve.length (QUADPACK) and svgpathtools CubicBezier.length
    # (error=1e-12 requested); both reach ~1e-9 on these ordinary cubics.
    cubics = random_cubics(20, seed=21)
    got = arc_length(cubics)
    bz = [bezier.Curve(np.asfortranarray(p.T), degree=3).length for p in cubics]
    sv = [svgpathtools.CubicBezier(*(complex(*q) for q in p)).length() for p in cubics]
    np.testing.assert_allclose(got, bz, rtol=1e-9)
    np.testing.assert_allclose(got, sv, rtol=1e-9)


def test_quadratic_closed_form_against_quadrature_and_mpmath():
    rng = np.random.default_rng(31)
    quads = rng.uniform(-1, 1, size=(40, 3, 2))
    quads[0] = [[0, 0], [1, 0], [2, 1e-3]]  # nearly straight: documented fallback
    quads[1] = [[0, 0], [2, 0], [1, 0]]  # runs back on itself: 4/3 + 1/3 (closed form)
    quads[2] = [[0, 0], [1, 0], [2, 0]]  # straight, uniform speed: 2
    want = np.array([mp_length(p) for p in quads])
    assert want[1] == pytest.approx(5 / 3, rel=1e-15)
    assert _rel_err(quadratic_arc_length(quads), want).max() <= 1e-13
    assert _rel_err(arc_length(quads), want).max() <= REL


def test_shapes_and_degenerate_input():
    assert isinstance(arc_length(PARABOLA), float)
    assert arc_length(random_cubics(5)).shape == (5,)
    assert arc_length(np.full((4, 2), 3.0)) == 0.0
    assert param_at_length(np.full((4, 2), 3.0), 1.0) == 0.0
    # Handles on the end points: a straight cubic from (0,0) to (3,4) traversed unevenly.
    assert arc_length(np.array([[0.0, 0], [0, 0], [3, 4], [3, 4]])) == pytest.approx(5.0, rel=1e-15)
    # Collinear controls running back: (0,0)→(1,0)… B′ changes sign; length = mpmath.
    back = np.array([[0.0, 0.0], [3.0, 0.0], [-1.0, 0.0], [2.0, 0.0]])
    assert arc_length(back) == pytest.approx(mp_length(back), rel=REL)


@pytest.mark.parametrize("scale", [1e-9, 1e9, 1e-150, 1e150])
def test_extreme_coordinates_scale_length(scale):
    # L(λP) = λ L(P) (length is homogeneous of degree 1).
    assert arc_length(PARABOLA * scale) / scale == pytest.approx(PARABOLA_LENGTH, rel=1e-15)
    # Far from the origin: moving to P0 first keeps the relative error of the coordinates.
    far = PARABOLA + 1e9
    assert arc_length(far) == pytest.approx(PARABOLA_LENGTH, rel=1e-6)


@given(cubic_st, st.floats(0.05, 0.95))
def test_length_is_additive_over_a_split(p, t):
    # Property: L = L(left) + L(right) for the de Casteljau halves (Farin §4.4).
    left, right = split(p, t)
    whole = arc_length(p)
    assert arc_length(left) + arc_length(right) == pytest.approx(whole, rel=1e-11, abs=1e-12)
    assert arc_length_between(p, 0.0, t) == pytest.approx(arc_length(left), rel=1e-11, abs=1e-12)


@given(cubic_st)
def test_reversal_and_elevation_keep_length(p):
    # The same point set traversed backwards / as a quartic has the same length.
    assert arc_length(reverse(p)) == pytest.approx(arc_length(p), rel=1e-12, abs=1e-12)
    quad = p[:3]
    assert arc_length(elevate(quad)) == pytest.approx(arc_length(quad), rel=1e-12, abs=1e-12)


def test_arc_length_between_shapes_and_order():
    cubics = random_cubics(3)
    got = arc_length_between(cubics, [0.0, 0.2, 0.9], [1.0, 0.5, 0.1])
    assert got.shape == (3,)
    assert got[0] == pytest.approx(arc_length(cubics[0]), rel=1e-14)
    assert got[2] == pytest.approx(arc_length_between(cubics[2], 0.1, 0.9), rel=1e-14)
    many = arc_length_between(PARABOLA, 0.0, np.linspace(0, 1, 5))
    assert many.shape == (5,)
    # y = x² from 0 to x: (x√(1+4x²))/2 + asinh(2x)/4 (closed form).
    x = np.linspace(0, 1, 5)
    np.testing.assert_allclose(many, x * np.sqrt(1 + 4 * x**2) / 2 + np.arcsinh(2 * x) / 4)


def test_param_at_length_inverts_length():
    for p in (PARABOLA, EXACT_CUSP, *near_cusp_cubics(4, seed=5), *random_cubics(4)):
        total = arc_length(p)
        s = np.linspace(0.0, total, 9)
        t = param_at_length(p, s)
        assert np.all(np.diff(t) >= 0)
        np.testing.assert_allclose(arc_length_between(p, 0.0, t), s, rtol=0, atol=2e-12 * total)
    # Clamping outside [0, L]; a line is linear in t.
    assert param_at_length(PARABOLA, [-1.0, 99.0]).tolist() == [0.0, 1.0]
    assert param_at_length(np.array([[0.0, 0.0], [4.0, 0.0]]), 1.0) == 0.25
    # The exact cusp sits at half the length by symmetry (EXACT_CUSP is mirror-symmetric).
    assert param_at_length(EXACT_CUSP, arc_length(EXACT_CUSP) / 2) == pytest.approx(0.5, abs=1e-9)


def test_segment_lengths_of_mixed_degrees_keep_order():
    segs = [PARABOLA, np.array([[0.0, 0.0], [3.0, 4.0]]), QUAD, PARABOLA * 2, np.zeros((3, 2))]
    want = [PARABOLA_LENGTH, 5.0, QUAD_LENGTH, 2 * PARABOLA_LENGTH, 0.0]  # closed forms above
    np.testing.assert_allclose(segment_lengths(segs), want, rtol=1e-15)
    assert segment_lengths([]).shape == (0,)


def test_regression_invalid_tolerance_or_nan_point_is_a_clear_error():
    # Defect: these died with MemoryError after minutes of halving (review item 1).
    # Expected: InvalidGeometryError at once (errors.py: bad input value).
    for bad in (0.0, -1.0, float("nan")):
        with pytest.raises(InvalidGeometryError, match="tolerance"):
            arc_length(PARABOLA, tolerance=bad)
        with pytest.raises(InvalidGeometryError, match="tolerance"):
            arc_length_between(PARABOLA, 0.0, 0.5, tolerance=bad)
        with pytest.raises(InvalidGeometryError, match="tolerance"):
            param_at_length(PARABOLA, 1.0, tolerance=bad)
    nan_point = np.array([[0.0, 0.0], [1.0, np.nan], [2.0, 0.0]])
    with pytest.raises(InvalidGeometryError, match="finite"):
        arc_length(nan_point)
    with pytest.raises(InvalidGeometryError, match="finite"):
        arc_length_between(PARABOLA, 0.0, np.nan)
    # A tolerance below float64's reach is worked to the floor instead (PARABOLA_LENGTH is
    # the closed form ∫₀¹ √(1 + 4x²) dx).
    assert arc_length(PARABOLA, tolerance=1e-300) == pytest.approx(PARABOLA_LENGTH, rel=1e-14)


def test_regression_param_at_length_refuses_a_batch():
    # Defect: a batch silently used its first segment only. Expected: an error naming the
    # shape, since each segment would need its own lengths.
    batch = np.array([[[0.0, 0.0], [1.0, 0.0]], [[0.0, 0.0], [10.0, 0.0]]])
    with pytest.raises(InvalidGeometryError, match="one segment"):
        param_at_length(batch, 0.5)
