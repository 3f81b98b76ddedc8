"""Tests of outlinebench.geometry.flatten: guaranteed deviation, chord counts, measurement."""

import math

import bezier
import numpy as np
import pytest
import shapely
from hypothesis import given
from hypothesis import strategies as st
from scipy import integrate

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.deviation import polyline_deviation
from outlinebench.geometry.flatten import (
    chord_bound,
    flatten_contour,
    flatten_contours,
    flatten_contours_bounded,
    flatten_uniform_wang,
    optimal_chord_count,
)

# Dense reference sampling of the true curve: with 4 000 parameters the sampled polyline
# lies within max|B''| / (8 n²) < 1e-5 of the curve for coordinates ≤ 100 (Wang's bound).
DENSE = 4_000
# Slack for comparing a measured deviation with ε: sampling error above plus float noise.
SLACK = 1e-5


def dense_curve(points):
    """Points of the curve from the `bezier` reference library (not our evaluator)."""
    curve = bezier.Curve.from_nodes(np.asarray(points, dtype=float).T)
    return curve.evaluate_multi(np.linspace(0.0, 1.0, DENSE)).T


def hausdorff(points_list, poly, closed=False, eps=0.01):
    """Both directed distances, measured with shapely (reference library).

    Curve → polyline: exact distance of each dense curve sample to the polyline. Polyline →
    curve: the polyline sampled every ε/4, each sample's exact distance to the nearest edge of
    the dense curve polyline. Both are measured values (samples), not bounds.
    """
    dense = np.vstack([dense_curve(p) for p in points_list])
    ring = np.vstack([poly, poly[:1]]) if closed else poly
    if len(ring) == 1:
        ring = np.vstack([ring, ring])
    d1 = float(np.max(shapely.distance(shapely.points(dense), shapely.LineString(ring))))
    e = np.diff(ring, axis=0)
    n = np.maximum(1, np.ceil(np.hypot(*e.T) / (eps / 4))).astype(int)
    idx = np.repeat(np.arange(len(e)), n)
    f = (np.arange(len(idx)) - np.repeat(np.cumsum(n) - n, n)) / n[idx]
    samples = np.vstack([ring[idx] + f[:, None] * e[idx], ring[-1:]])
    tree = shapely.STRtree(shapely.linestrings(np.stack([dense[:-1], dense[1:]], axis=1)))
    _, dist = tree.query_nearest(shapely.points(samples), return_distance=True)
    return max(d1, float(np.max(dist)))


def n_star(points, eps):
    """N* = ∫ sqrt(|κ|/(8ε)) ds by scipy.integrate.quad (independent of our grid)."""
    p = np.asarray(points, dtype=float)
    d1 = 3 * np.diff(p, axis=0)
    d2 = 2 * np.diff(d1, axis=0)

    def f(t):
        b1 = (1 - t) ** 2 * d1[0] + 2 * (1 - t) * t * d1[1] + t * t * d1[2]
        b2 = (1 - t) * d2[0] + t * d2[1]
        sp = math.hypot(*b1)
        if sp == 0:
            return 0.0
        k = abs(b1[0] * b2[1] - b1[1] * b2[0]) / sp**3
        return math.sqrt(k / (8 * eps)) * sp

    val, _ = integrate.quad(f, 0.0, 1.0, limit=400)
    return val


coord = st.floats(0.0, 100.0, allow_nan=False, allow_infinity=False)
cubic = st.lists(st.tuples(coord, coord), min_size=4, max_size=4)


@pytest.mark.slow
@given(cubic, st.sampled_from([0.5, 0.1, 0.02]))
def test_flattening_stays_within_tolerance(points, eps):
    # Measured against dense sampling by the `bezier` library and shapely's Hausdorff
    # distance; the guarantee is ε (module docstring), SLACK covers the sampling error.
    poly = flatten_contour([points], False, eps)
    assert hausdorff([points], poly, eps=eps) <= eps + SLACK
    # on-curve points are vertices, bit for bit
    assert tuple(poly[0]) == tuple(map(float, points[0]))
    assert tuple(poly[-1]) == tuple(map(float, points[-1]))


@pytest.mark.parametrize(
    "points",
    [
        [[0, 0], [100, 100], [0, 100], [100, 0]],  # self-intersecting loop
        [[0, 0], [100, 60], [0, 60], [100, 0]],  # near-cusp
        [[0, 0], [50, 50], [50, 50], [100, 0]],  # symmetric cusp-free, coincident handles
        [[10, 10], [10, 10], [10, 10], [90, 10]],  # degenerate handles, a straight line
        [[0, 0], [120, 0], [-20, 0], [100, 0]],  # straight but folding back on itself
        [[0, 0], [0, 0], [0, 0], [0, 0]],  # a point
    ],
)
@pytest.mark.parametrize("eps", [0.1, 0.005])
def test_adversarial_curves_stay_within_tolerance(points, eps):
    # Same reference as above: `bezier` samples and shapely Hausdorff distance.
    poly = flatten_contour([points], False, eps)
    assert hausdorff([points], poly, eps=eps) <= eps + SLACK


def test_wang_flattening_stays_within_tolerance_and_uses_more_chords():
    # Wang's bound is a theorem (Filip, Magedson & Markot 1986); measured the same way.
    rng = np.random.default_rng(7)
    curves = rng.uniform(0, 100, (15, 4, 2))
    eps = 0.05
    ours = flatten_contours([([c], False) for c in curves], eps)
    wang = flatten_uniform_wang([([c], False) for c in curves], eps)
    for c, p in zip(curves, wang, strict=True):
        assert hausdorff([c], p, eps=eps) <= eps + SLACK
    assert sum(len(p) for p in ours) < sum(len(p) for p in wang)


@pytest.mark.parametrize("eps", [0.1, 0.01])
def test_chord_count_is_close_to_the_asymptotic_minimum(eps):
    # Target of the issue: chords ≤ 1.10 × ΣN*, N* by scipy.integrate.quad (independent).
    rng = np.random.default_rng(2026)
    curves = rng.uniform(0, 100, (150, 4, 2))
    polys = flatten_contours([([c], False) for c in curves], eps)
    chords = sum(len(p) - 1 for p in polys)
    total = sum(n_star(c, eps) for c in curves)
    assert chords <= 1.10 * total
    # and never fewer than the curves need: at least one chord per curve
    assert chords >= len(curves)


def test_optimal_chord_count_matches_quadrature():
    # Reference: scipy.integrate.quad of the same integral.
    c = [[0, 0], [30, 80], [70, -40], [100, 20]]
    assert optimal_chord_count(c, 0.01) == pytest.approx(n_star(c, 0.01), rel=2e-3)


def test_circle_arc_chord_count_matches_sagitta_formula():
    # Quarter circle r = 50 as a cubic (handle 4/3·tan(π/8)·r, Dokken et al. 1990): chords of
    # an arc of radius r within ε subtend 2·acos(1 − ε/r) at most (sagitta, closed form).
    r, eps = 50.0, 0.01
    k = 4 / 3 * math.tan(math.pi / 8) * r
    c = [[r, 0], [r, k], [k, r], [0, r]]
    poly = flatten_contour([c], False, eps)
    need = math.ceil((math.pi / 2) / (2 * math.acos(1 - eps / r)))
    assert need <= len(poly) - 1 <= need + 2


def test_closed_contour_does_not_repeat_its_first_vertex():
    # Convention of flatten_contours (documented there).
    sq = [[[0, 0], [10, 0]], [[10, 0], [10, 10]], [[10, 10], [0, 10]], [[0, 10], [0, 0]]]
    poly = flatten_contour(sq, True, 0.1)
    assert poly.tolist() == [[0, 0], [10, 0], [10, 10], [0, 10]]


def test_chord_bound_is_an_upper_bound_and_exact_without_overshoot():
    # Reference: dense brute-force distance of curve samples (bezier library) to the chord.
    rng = np.random.default_rng(3)
    for _ in range(50):
        c = rng.uniform(0, 100, (4, 2))
        t0, t1 = sorted(rng.uniform(0, 1, 2))
        piece = bezier.Curve.from_nodes(c.T).specialize(t0, t1).nodes.T
        dense = dense_curve(piece)
        chord = shapely.LineString([piece[0], piece[-1]])
        true = float(np.max(shapely.distance(shapely.points(dense), chord)))
        b = chord_bound(c, t0, t1)
        assert b >= true - 1e-9
        a = piece[-1] - piece[0]
        proj = (dense - piece[0]) @ a / (a @ a)
        if proj.min() >= 0 and proj.max() <= 1:
            assert b == pytest.approx(true, rel=1e-6, abs=1e-9)


def test_polyline_deviation_of_a_parabola_and_its_chord():
    # Quadratic (0,0),(1,2),(2,0): y = 4t(1 − t) peaks at 1 over x = 1 (closed form), so its
    # Hausdorff distance to the chord from (0,0) to (2,0) is 1, at (1, 1) on the curve.
    dev = polyline_deviation([[[0, 0], [1, 2], [2, 0]]], [[0, 0], [2, 0]], tolerance=0.01)
    assert abs(dev.distance - 1.0) <= dev.accuracy
    assert dev.on == "curve"
    # the maximum is flat: its place is known to about sqrt(accuracy / curvature) ≈ 5e-3
    assert (dev.x, dev.y) == pytest.approx((1.0, 1.0), abs=1e-2)
    assert dev.t == pytest.approx(0.5, abs=1e-2)


def test_polyline_deviation_sees_a_polyline_that_wanders_off():
    # A line (0,0)-(10,0) against a polyline with a spike to (5, 3): the spike's tip is 3 from
    # the line (closed form), measured on the polyline.
    dev = polyline_deviation([[[0, 0], [10, 0]]], [[0, 0], [5, 3], [10, 0]], tolerance=0.01)
    assert abs(dev.distance - 3.0) <= dev.accuracy
    assert dev.on == "polyline"
    assert (dev.x, dev.y) == pytest.approx((5.0, 3.0), abs=1e-3)


def test_polyline_deviation_agrees_with_shapely_on_our_flattening():
    # Reference: shapely's densified Hausdorff distance against `bezier` samples.
    c = [[0, 0], [20, 90], [80, -60], [100, 30]]
    poly = flatten_contour([c], False, 0.05)
    dev = polyline_deviation([c], poly, tolerance=0.05)
    assert dev.distance <= 0.05 + dev.accuracy
    assert dev.distance == pytest.approx(hausdorff([c], poly, eps=0.05), abs=dev.accuracy + SLACK)


def test_bad_input_raises():
    # Errors named in the docstrings (outlinebench.errors).
    with pytest.raises(InvalidGeometryError, match="tolerance must be > 0"):
        flatten_contour([[[0, 0], [1, 1]]], False, 0.0)
    with pytest.raises(InvalidGeometryError, match="2, 3 or 4 control points"):
        flatten_contour([[[0, 0]] * 5], False, 0.1)
    with pytest.raises(InvalidGeometryError, match="no segments"):
        polyline_deviation([], [[0, 0]])


@pytest.mark.parametrize("eps", [0.1, 0.01])
def test_reported_bounds_cover_the_measured_deviation(eps):
    # Reference: shapely Hausdorff distance against `bezier` samples (measured, a lower
    # estimate of the true value within SLACK); the bound must cover it and stay ≤ ε.
    rng = np.random.default_rng(11)
    curves = rng.uniform(0, 100, (12, 4, 2))
    polys, bounds = flatten_contours_bounded([([c], False) for c in curves], eps)
    plain = flatten_contours([([c], False) for c in curves], eps)
    assert all(np.array_equal(a, b) for a, b in zip(polys, plain, strict=True))
    for c, p, b in zip(curves, polys, bounds, strict=True):
        measured = hausdorff([c], p, eps=eps)
        assert measured - SLACK <= b <= eps
        # the bound is tight (exact closed form for chords that do not overshoot)
        assert b <= measured + 0.05 * eps


def test_polyline_deviation_of_a_coarse_polyline_from_elsewhere():
    # A polyline made by other software: svgpathtools' points at 7 uniform parameters of a
    # cubic (reference library), shifted 0.3 off the curve in places. Measured against
    # shapely's densified Hausdorff distance to `bezier` samples (reference libraries).
    from svgpathtools import CubicBezier

    c = [[0, 0], [30, 80], [70, -40], [100, 20]]
    bz = CubicBezier(*(complex(x, y) for x, y in c))
    poly = np.array([[p.real, p.imag] for p in (bz.point(k / 6) for k in range(7))])
    poly[2:4, 1] += 0.3
    dev = polyline_deviation([c], poly, tolerance=0.05)
    assert dev.accuracy <= 0.05 * 1e-3 / 2
    ref = hausdorff([c], poly, eps=0.05)
    # the reference samples the polyline every ε/4, so it may miss up to ε/8 (1-Lipschitz)
    assert dev.distance == pytest.approx(ref, abs=dev.accuracy + 0.05 / 8 + SLACK)
    assert dev.distance >= ref - dev.accuracy - SLACK
