"""Tests of outlinebench.geometry.nearest: global nearest point on a segment."""

from __future__ import annotations

import numpy as np
import pytest
from geometry_cases import EXACT_CUSP, mixed_cubics
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

from outlinebench.geometry.bezier import evaluate
from outlinebench.geometry.nearest import distance_to, nearest_point

coord = st.floats(-10, 10, allow_nan=False, allow_infinity=False)
cubic_st = st.lists(st.tuples(coord, coord), min_size=4, max_size=4).map(np.array)
point_st = st.tuples(coord, coord).map(np.array)


def _brute_force(p, q):
    # Reference: 2001 samples, then scipy's bounded Brent search around the best one.
    ts = np.linspace(0, 1, 2001)
    d = np.linalg.norm(evaluate(p, ts) - q, axis=1)
    i = int(np.argmin(d))
    lo, hi = ts[max(i - 1, 0)], ts[min(i + 1, 2000)]
    res = minimize_scalar(
        lambda t: np.linalg.norm(evaluate(p, t) - q),
        bounds=(lo, hi),
        method="bounded",
        options={"xatol": 1e-12},
    )
    return min(res.fun, d[i])


def test_line_projection_closed_form():
    # Projection onto a line, clipped to the segment (closed form).
    line = np.array([[0.0, 0.0], [2.0, 0.0]])
    assert nearest_point(line, [0.5, 1.0])[:2] == (0.25, 1.0)
    t, d, pt = nearest_point(line, [-3.0, 4.0])
    assert (t, d) == (0.0, 5.0) and pt.tolist() == [0.0, 0.0]


def test_against_brute_force_on_hard_cubics():
    rng = np.random.default_rng(4)
    for p in mixed_cubics(5):
        lo, hi = p.min(axis=0) - 0.5, p.max(axis=0) + 0.5
        for q in rng.uniform(lo, hi, size=(6, 2)):
            t, d, pt = nearest_point(p, q)
            np.testing.assert_allclose(pt, evaluate(p, t), atol=1e-14)
            assert d == pytest.approx(np.linalg.norm(pt - q), abs=1e-15)
            assert d <= _brute_force(p, q) + 1e-12


@given(cubic_st, point_st)
def test_never_worse_than_samples(p, q):
    # Global: no sampled point of the curve is closer than the answer.
    _, d, _ = nearest_point(p, q)
    samples = np.linalg.norm(evaluate(p, np.linspace(0, 1, 257)) - q, axis=1)
    assert d <= samples.min() + 1e-9 * max(1.0, np.abs(p).max())


def test_many_points_and_cusp():
    qs = np.array([[0.5, 0.75], [0.5, 0.9], [2.0, 2.0]])
    t, d, pts = nearest_point(EXACT_CUSP, qs)
    assert t.shape == d.shape == (3,) and pts.shape == (3, 2)
    # B(½) = (½, ¾) is the cusp point itself (closed form from the control points). There
    # (B − p)·B′ has a triple root, which float64 resolves only to ~eps^(1/3) ≈ 6e-6 in t;
    # the distance, quadratic in the parameter error there, stays ~1e-11.
    assert t[0] == pytest.approx(0.5, abs=1e-5) and d[0] == pytest.approx(0.0, abs=1e-10)
    np.testing.assert_allclose(distance_to(EXACT_CUSP, qs), d)


def test_degenerate_segments():
    t, d, pt = nearest_point(np.full((4, 2), 1.0), [4.0, 5.0])
    assert (t, d) == (0.0, 5.0)
    # Collinear cubic running back: the nearest point to (2.5, 1) is at x = 2.5 on the line.
    back = np.array([[0.0, 0.0], [3.0, 0.0], [-1.0, 0.0], [2.0, 0.0]])
    assert nearest_point(back, [1.7, 1.0])[1] == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("scale", [1e-9, 1e9])
def test_extreme_scales(scale):
    p = np.array([[0.0, 0.0], [1.5, 1.0], [-0.5, 1.0], [1.0, 0.0]])
    q = np.array([0.2, 0.6])
    t, d, _ = nearest_point(p, q)
    ts, ds, _ = nearest_point(p * scale, q * scale)
    assert ts == pytest.approx(t, abs=1e-9)
    assert ds / scale == pytest.approx(d, rel=1e-9)
