"""Tests of outlinebench.geometry.curvature: κ, tangents, normals, inflections, cusps."""

from __future__ import annotations

import bezier.hazmat.curve_helpers as bz
import numpy as np
import pytest
import svgpathtools
from geometry_cases import EXACT_CUSP, mixed_cubics, mp_curvature, near_cusp_cubics
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import derivative, derivative_at, evaluate, reverse
from outlinebench.geometry.curvature import (
    curvature,
    cusps,
    end_curvatures,
    end_tangents,
    inflections,
    unit_normal,
    unit_tangent,
)

# y = x² as a cubic: x(t) = t, y(t) = t² (closed form: elevate the quadratic (0,0),(½,0),(1,1)).
PARABOLA = np.array([[0.0, 0.0], [1 / 3, 0.0], [2 / 3, 1 / 3], [1.0, 1.0]])

# Relative agreement expected between two double-precision evaluations of the same formula.
REL_FORMULA = 1e-9

coord = st.floats(-100, 100, allow_nan=False, allow_infinity=False)
cubic_st = st.lists(st.tuples(coord, coord), min_size=4, max_size=4).map(np.array)


def _assert_close_rel(a, b, rel):
    a, b = np.asarray(a, float), np.asarray(b, float)
    assert np.all(np.abs(a - b) <= rel * np.maximum(1.0, np.abs(b))), (a, b)


def _curvature_rel_tol(cubics, ts):
    """Relative error float64 can make in κ at each (curve, t).

    Condition number of B′(t) in Bernstein form, Σ|D_i|B_i(t)/|B′(t)| (Farouki & Rajan,
    CAGD 4, 1987): evaluation can lose that factor times eps, and κ ~ |B′|⁻³ triples it.
    """
    hod = derivative(cubics, 1)
    speed = np.linalg.norm(evaluate(hod, ts), axis=-1)
    cond = evaluate(np.linalg.norm(hod, axis=-1)[..., None], ts)[..., 0] / speed
    return 1e-12 + 10 * cond * np.finfo(float).eps


def test_parabola_curvature_closed_form():
    # Closed form for y = x²: κ(x) = 2 / (1 + 4x²)^{3/2}; here x = t, and κ(0) = 2 (kurbo test).
    t = np.linspace(0, 1, 11)
    np.testing.assert_allclose(curvature(PARABOLA, t), 2 / (1 + 4 * t**2) ** 1.5, rtol=1e-14)
    assert curvature(PARABOLA, 0.0) == pytest.approx(2.0, rel=1e-15)


def test_end_curvature_closed_form_random():
    # Closed form (Farin §11.2): κ(0) = ((n−1)/n)(P1−P0)×(P2−P1)/|P1−P0|³, signed; the same
    # with the last three points at t = 1. n = 3 gives 2/3, n = 2 gives 1/2.
    rng = np.random.default_rng(11)
    for k, factor in ((4, 2 / 3), (3, 1 / 2)):
        pts = rng.uniform(-3, 3, size=(50, k, 2))
        a, b = pts[:, 1] - pts[:, 0], pts[:, 2] - pts[:, 1]
        want0 = factor * (a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0]) / np.linalg.norm(a, axis=1) ** 3
        c, d = pts[:, -2] - pts[:, -3], pts[:, -1] - pts[:, -2]
        want1 = factor * (c[:, 0] * d[:, 1] - c[:, 1] * d[:, 0]) / np.linalg.norm(d, axis=1) ** 3
        k0, k1 = end_curvatures(pts)
        np.testing.assert_allclose(k0, want0, rtol=1e-12)
        np.testing.assert_allclose(k1, want1, rtol=1e-12)
        np.testing.assert_allclose(curvature(pts, 0.0), want0, rtol=1e-12)


def test_curvature_against_mpmath_30_digits():
    # Reference: mpmath at 30 digits from the same float64 control points (geometry_cases).
    cubics = mixed_cubics(6)
    ts = np.array([0.0, 0.1, 0.37, 0.5, 0.81, 1.0])
    got = curvature(cubics, ts)
    rel = _curvature_rel_tol(cubics, ts)
    for i, p in enumerate(cubics):
        for j, t in enumerate(ts):
            want = mp_curvature(p, t)
            assert got[i, j] == pytest.approx(want, rel=rel[i, j], abs=1e-12), (i, t)


def test_curvature_against_bezier_package_signed():
    # Reference library: bezier.hazmat.curve_helpers.get_curvature (signed, B′×B″/|B′|³).
    cubics = mixed_cubics(5)
    ts = np.linspace(0.05, 0.95, 7)
    got = curvature(cubics, ts)
    rel = REL_FORMULA + _curvature_rel_tol(cubics, ts)
    for i, p in enumerate(cubics):
        nodes = np.asfortranarray(p.T)
        for j, t in enumerate(ts):
            tan = bz.evaluate_hodograph(t, nodes)
            want = bz.get_curvature(nodes, tan, t)
            _assert_close_rel(got[i, j], want, rel[i, j])


def test_curvature_against_svgpathtools_unsigned():
    # Reference library: svgpathtools CubicBezier.curvature gives |κ|.
    cubics = mixed_cubics(4)
    ts = np.linspace(0.05, 0.95, 5)
    got = curvature(cubics, ts)
    rel = REL_FORMULA + _curvature_rel_tol(cubics, ts)
    for i, p in enumerate(cubics):
        seg = svgpathtools.CubicBezier(*(complex(x, y) for x, y in p))
        for j, t in enumerate(ts):
            _assert_close_rel(abs(got[i, j]), seg.curvature(t), rel[i, j])


def test_unit_tangent_and_normal_against_finite_differences():
    # Central differences of evaluate (common practice): direction error O(h²).
    cubics = mixed_cubics(3)
    ts = np.array([0.2, 0.5, 0.7])
    h = 1e-6
    fd = evaluate(cubics, ts + h) - evaluate(cubics, ts - h)
    fd /= np.linalg.norm(fd, axis=-1, keepdims=True)
    tan = unit_tangent(cubics, ts)
    # near-cusp curves turn fast; compare only where the speed is not tiny.
    ok = np.linalg.norm(evaluate(cubics, ts + h) - evaluate(cubics, ts - h), axis=-1) > 1e-7
    np.testing.assert_allclose(tan[ok], fd[ok], atol=1e-6)
    nrm = unit_normal(cubics, ts)
    np.testing.assert_allclose(np.sum(nrm * tan, axis=-1), 0.0, atol=1e-15)
    np.testing.assert_allclose(tan[..., 0] * nrm[..., 1] - tan[..., 1] * nrm[..., 0], 1.0)


def test_shapes_follow_evaluate():
    batch = mixed_cubics(2)
    assert isinstance(curvature(PARABOLA, 0.3), float)
    assert curvature(PARABOLA, [0.1, 0.2]).shape == (2,)
    assert curvature(batch, 0.3).shape == (8,)
    assert curvature(batch, [0.1, 0.2, 0.3]).shape == (8, 3)
    assert unit_tangent(batch, [0.1, 0.2, 0.3]).shape == (8, 3, 2)
    assert unit_tangent(PARABOLA, 0.5).shape == (2,)
    s, e = end_tangents(batch)
    assert s.shape == e.shape == (8, 2)


def test_retracted_start_handle_uses_second_derivative():
    # P1 = P0: B′(0) = 0 and B″(0) = 6(P2 − P0), so the start direction is that of P2 − P0
    # (Farin §4.5 with the first non-zero derivative). Near t = 0, κ ≈ D2×D3/(2|D2|³ t) → ∞ with
    # the sign of D2×D3 (derived in curvature.py; checked here against κ at t = 1e-9).
    p = np.array([[0.0, 0.0], [0.0, 0.0], [1.0, 1.0], [2.0, 0.0]])
    s, e = end_tangents(p)
    np.testing.assert_allclose(s, [2**-0.5, 2**-0.5])
    np.testing.assert_allclose(e, [2**-0.5, -(2**-0.5)])
    k0 = curvature(p, 0.0)
    assert k0 == -np.inf
    # D2 = 6(1,1), D3 = 6(−1,−3): κ(1e-9) ≈ 36·(−2)/(2·(6√2)³·1e-9) ≈ −5.89e7.
    want = 36 * -2 / (2 * (6 * 2**0.5) ** 3 * 1e-9)
    assert curvature(p, 1e-9) == pytest.approx(want, rel=1e-6)


def test_retracted_end_handle_direction_of_arrival():
    # P2 = P3: arriving along P3 − P1 (the direction of travel just before t = 1).
    p = np.array([[0.0, 0.0], [1.0, 0.0], [3.0, 2.0], [3.0, 2.0]])
    _, e = end_tangents(p)
    np.testing.assert_allclose(e, np.array([2.0, 2.0]) / np.hypot(2, 2))
    fd = evaluate(p, 1.0) - evaluate(p, 1 - 1e-5)  # direction error O(h) here
    np.testing.assert_allclose(e, fd / np.linalg.norm(fd), atol=1e-4)


def test_both_start_handles_retracted_uses_third_derivative():
    # P0 = P1 = P2: B(t) = P0 + t³(P3 − P0), a straight line; direction P3 − P0, κ = 0.
    p = np.array([[1.0, 1.0], [1.0, 1.0], [1.0, 1.0], [4.0, 5.0]])
    s, _ = end_tangents(p)
    np.testing.assert_allclose(s, [0.6, 0.8])
    assert curvature(p, 0.0) == 0.0


def test_all_points_equal_are_defined():
    p = np.full((4, 2), 7.5)
    assert curvature(p, 0.5) == 0.0
    np.testing.assert_array_equal(unit_tangent(p, [0.0, 0.5, 1.0]), 0.0)
    assert end_curvatures(p) == (0.0, 0.0)
    assert inflections(p).size == 0
    assert cusps(p).size == 0


def test_collinear_controls_have_zero_curvature_and_no_inflections():
    p = np.array([[0.0, 0.0], [1.0, 1.0], [3.0, 3.0], [2.0, 2.0]])
    k = curvature(p, np.linspace(0, 1, 9))
    assert np.all(np.isfinite(k))
    np.testing.assert_allclose(k, 0.0, atol=1e-12)
    assert inflections(p).size == 0


@pytest.mark.parametrize("scale", [1e-9, 1e9])
def test_extreme_scales_scale_curvature(scale):
    # κ(λP) = κ(P)/λ (curvature has units 1/length; do Carmo §1-5).
    t = np.linspace(0, 1, 7)
    base = curvature(PARABOLA, t)
    np.testing.assert_allclose(curvature(PARABOLA * scale, t) * scale, base, rtol=1e-12)
    if scale > 1:
        # Far from the origin too: the points are moved to P0 before any product is formed.
        np.testing.assert_allclose(curvature(PARABOLA * scale + 3e9, t) * scale, base, rtol=1e-12)
    np.testing.assert_allclose(unit_tangent(PARABOLA * scale, t), unit_tangent(PARABOLA, t))


def test_no_nan_on_near_degenerate_input():
    rng = np.random.default_rng(5)
    pts = rng.uniform(0, 1, (200, 4, 2))
    pts[::4, 1] = pts[::4, 0]  # retracted start handles
    pts[1::4, 2] = pts[1::4, 3]  # retracted end handles
    pts[2::4] = pts[2::4, :1]  # all points equal
    pts[3::4] *= 1e-160  # tiny
    t = np.array([0.0, 0.5, 1.0])
    assert not np.isnan(curvature(pts, t)).any()
    assert np.isfinite(unit_tangent(pts, t)).all()


@given(cubic_st)
def test_reversal_negates_curvature(p):
    # B_rev(t) = B(1 − t): the tangent flips, so the signed curvature changes sign.
    t = np.array([0.0, 0.25, 0.6, 1.0])
    k = curvature(p, t)
    kr = curvature(reverse(p), 1.0 - t)
    finite = np.isfinite(k) & (np.abs(k) < 1e8)
    np.testing.assert_allclose(kr[finite], -k[finite], rtol=1e-7, atol=1e-9)


def test_inflections_of_symmetric_s_curve():
    # (0,0),(1,1),(2,−1),(3,0) is point-symmetric about B(½): the inflection is t = ½ (closed
    # form: the quadratic (b×c)t² + (a×c)t + a×b of Stone & DeRose has a = (1,1), b = (0,−3),
    # c = (0,6): b×c = 0, a×c = 6, a×b = −3 → t = ½).
    p = np.array([[0.0, 0.0], [1.0, 1.0], [2.0, -1.0], [3.0, 0.0]])
    np.testing.assert_allclose(inflections(p), [0.5], atol=1e-15)


def test_inflections_change_curvature_sign():
    # Definition of an inflection: κ changes sign there.
    rng = np.random.default_rng(8)
    n_found = 0
    for _ in range(100):
        p = rng.uniform(0, 1, (4, 2))
        for t in inflections(p):
            n_found += 1
            a, b = curvature(p, [t - 1e-6, t + 1e-6])
            assert a * b < 0
            # At the inflection B′ × B″ = 0 (the numerator of κ; Stone & DeRose 1989): the
            # sine of the angle between B′ and B″ there is zero up to rounding of t (measured
            # at most 8e-15 on these cubics; 1e-12 leaves room, and a root off by even 1e-10
            # in t would fail it).
            d1, d2 = derivative_at(p, t, 1), derivative_at(p, t, 2)
            sine = abs(d1[0] * d2[1] - d1[1] * d2[0]) / (np.hypot(*d1) * np.hypot(*d2))
            assert sine <= 1e-12
    assert n_found > 10


def test_loop_and_quadratic_have_no_inflections():
    # A looping cubic bends one way only (Stone & DeRose: loop ⇔ no real inflections).
    assert inflections(np.array([[0.0, 0.0], [1.5, 1.0], [-0.5, 1.0], [1.0, 0.0]])).size == 0
    assert inflections(np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]])).size == 0


def test_cusp_found_at_closed_form_parameter():
    # EXACT_CUSP has B′(½) = 0 (closed form in geometry_cases).
    np.testing.assert_allclose(cusps(EXACT_CUSP), [0.5], atol=1e-7)
    assert curvature(EXACT_CUSP, 0.5) == np.inf
    # Same cusp after scaling to 1e-9 and 1e9 and shifting far away.
    np.testing.assert_allclose(cusps(EXACT_CUSP * 1e-9), [0.5], atol=1e-7)
    np.testing.assert_allclose(cusps(EXACT_CUSP * 1e9 + 1e9), [0.5], atol=1e-6)


def test_near_cusp_respects_tolerance():
    # Moving P3 by 1e-2 rounds the tip to a radius ~1e-4 (measured): not a cusp by default,
    # a cusp when the tolerance allows that radius.
    p = EXACT_CUSP.copy()
    p[3, 0] += 1e-2
    assert cusps(p).size == 0
    assert cusps(p, tolerance=1e-2).size == 1
    assert cusps(near_cusp_cubics(1)[0], tolerance=1.0).size == 1


def test_line_reversal_is_a_cusp_and_regular_curve_has_none():
    # Quadratic (0,0),(2,0),(1,0) runs to x = 4/3 and back: B′ = 0 at t = 2/3 (closed form
    # B′(t) = 2[(2,0)(1−t) + (−1,0)t]).
    np.testing.assert_allclose(cusps(np.array([[0.0, 0.0], [2.0, 0.0], [1.0, 0.0]])), [2 / 3])
    assert cusps(PARABOLA).size == 0
    assert cusps(np.array([[0.0, 0.0], [1.0, 1.0]])).size == 0


def test_straight_segments_have_positive_zero_curvature():
    # A zero curvature is +0.0, never −0.0 (which reports print as "-0.0").
    line_down = np.array([[0.0, 0.0], [1.0, -1.0], [2.0, -2.0], [3.0, -3.0]])
    k = curvature(line_down, np.linspace(0, 1, 5))
    assert np.all(k == 0.0) and not np.signbit(k).any()
    assert not np.signbit(end_curvatures(line_down[::-1])[0])


def test_regression_inflections_and_cusps_refuse_a_batch():
    # Defect: a batch silently gave the answers of its first segment only. Expected: an
    # error, since each segment has its own number of answers.
    batch = np.stack([EXACT_CUSP, EXACT_CUSP + 1.0])
    with pytest.raises(InvalidGeometryError, match="one segment"):
        inflections(batch)
    with pytest.raises(InvalidGeometryError, match="one segment"):
        cusps(batch)


def test_end_tangents_equal_unit_tangent_at_the_ends():
    # end_tangents computes the ends from the hodograph end points directly (it is used on
    # every handle drag); unit_tangent at t = 0 and 1 is the definition it must match,
    # including the fallbacks for handles on their points (Farin §4.5).
    cases = [
        np.array([[0.0, 0.0], [0.0, 0.0], [1.0, 1.0], [2.0, 0.0]]),
        np.array([[0.0, 0.0], [0.0, 0.0], [0.0, 0.0], [2.0, 1.0]]),
        np.array([[0.0, 0.0], [1.0, 2.0], [3.0, 1.0], [3.0, 1.0]]),
        np.array([[1.0, 1.0], [1.0, 1.0], [1.0, 1.0], [1.0, 1.0]]),
        EXACT_CUSP,
        *mixed_cubics(6),
    ]
    for p in cases:
        start, end = end_tangents(p)
        np.testing.assert_allclose(start, unit_tangent(p, 0.0), atol=1e-15)
        np.testing.assert_allclose(end, unit_tangent(p, 1.0), atol=1e-15)
    batch = np.stack(cases)
    start, end = end_tangents(batch)
    np.testing.assert_allclose(start, unit_tangent(batch, 0.0), atol=1e-15)
    np.testing.assert_allclose(end, unit_tangent(batch, 1.0), atol=1e-15)
