"""Tests of outlinebench.geometry.extrema: extrema parameters and tight bounding boxes."""

from __future__ import annotations

import numpy as np
import pytest
import svgpathtools
import sympy
from geometry_cases import mixed_cubics, random_cubics
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.geometry.bezier import derivative_at, evaluate
from outlinebench.geometry.extrema import bounding_box, extrema_params, stationary_params

coord = st.floats(-100, 100, allow_nan=False, allow_infinity=False)
cubic_st = st.lists(st.tuples(coord, coord), min_size=4, max_size=4).map(np.array)


def test_quadratic_closed_form():
    # (0,0),(1,2),(2,0): y(t) = 4t(1 − t), maximum 1 at t = ½; x(t) = 2t has none.
    tx, ty = extrema_params(np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]]))
    assert tx.size == 0
    np.testing.assert_allclose(ty, [0.5])
    assert bounding_box(np.array([[0.0, 0.0], [1.0, 2.0], [2.0, 0.0]])) == (0.0, 0.0, 2.0, 1.0)


def test_cubic_extrema_against_sympy():
    # Reference: sympy solves x′(t) = 0 exactly for the loop cubic (0,0),(3/2,1),(−1/2,1),(1,0):
    # 7t² − 7t + 3/2 = 0 → t = ½ ± √7/14.
    p = np.array([[0.0, 0.0], [1.5, 1.0], [-0.5, 1.0], [1.0, 0.0]])
    t = sympy.symbols("t")
    x = sum(
        sympy.binomial(3, i) * (1 - t) ** (3 - i) * t**i * sympy.Rational(str(p[i, 0]))
        for i in range(4)
    )
    exact = sorted(float(r) for r in sympy.solve(sympy.diff(x, t), t) if 0 < r < 1)
    tx, ty = extrema_params(p)
    np.testing.assert_allclose(tx, exact, rtol=1e-15)
    np.testing.assert_allclose(ty, [0.5], rtol=1e-15)


def test_extrema_are_roots_of_the_derivative():
    for p in mixed_cubics(6):
        tx, ty = extrema_params(p)
        scale = np.abs(np.diff(p, axis=0)).max()
        if tx.size:
            assert np.abs(derivative_at(p, tx)[:, 0]).max() <= 1e-12 * scale
        if ty.size:
            assert np.abs(derivative_at(p, ty)[:, 1]).max() <= 1e-12 * scale


def test_bounding_box_against_svgpathtools():
    # Reference library: svgpathtools CubicBezier.bbox() -> (xmin, xmax, ymin, ymax).
    cubics = mixed_cubics(6)
    boxes = bounding_box(cubics)
    for p, box in zip(cubics, boxes, strict=True):
        xmin, xmax, ymin, ymax = svgpathtools.CubicBezier(*(complex(*q) for q in p)).bbox()
        np.testing.assert_allclose(box, [xmin, ymin, xmax, ymax], rtol=1e-12, atol=1e-12)


@given(cubic_st)
def test_bounding_box_is_tight_against_dense_sampling(p):
    # Common practice: 4001 samples; the sampled extremes lie inside the box and within the
    # sampling error O(h²·|B″|) of its sides.
    xmin, ymin, xmax, ymax = bounding_box(p)
    s = evaluate(p, np.linspace(0, 1, 4001))
    scale = max(np.abs(p).max(), 1.0)
    slack = 1e-12 * scale
    assert s[:, 0].min() >= xmin - slack and s[:, 0].max() <= xmax + slack
    assert s[:, 1].min() >= ymin - slack and s[:, 1].max() <= ymax + slack
    gap = 6 * np.abs(np.diff(p, 2, axis=0)).max() * (1 / 4000) ** 2 + slack
    assert s[:, 0].min() - xmin <= gap and xmax - s[:, 0].max() <= gap
    assert s[:, 1].min() - ymin <= gap and ymax - s[:, 1].max() <= gap


def test_degenerate_and_batch():
    assert bounding_box(np.full((4, 2), 2.5)) == (2.5, 2.5, 2.5, 2.5)
    tx, ty = extrema_params(np.full((4, 2), 2.5))
    assert tx.size == ty.size == 0
    # Constant y: no y extrema; collinear reversal in x: one x extremum at the turn.
    tx, ty = extrema_params(np.array([[0.0, 1.0], [3.0, 1.0], [-1.0, 1.0], [2.0, 1.0]]))
    assert ty.size == 0 and tx.size == 2
    assert bounding_box(np.array([[0.0, 0.0], [1.0, 1.0]])) == (0.0, 0.0, 1.0, 1.0)
    batch = random_cubics(7)
    boxes = bounding_box(batch)
    assert boxes.shape == (7, 4)
    for p, box in zip(batch, boxes, strict=True):
        assert tuple(box) == bounding_box(p)
    assert stationary_params(batch).shape == (7, 2, 2)


def test_double_root_is_not_an_extremum():
    # x(t) = (t − ½)³ + const: x′ = 3(t − ½)² touches zero at ½ without changing sign, so x has
    # no extremum; control points from the cubic's Bernstein form (closed form).
    p = np.array([[-0.125, 0.0], [0.125, 1.0], [-0.125, 2.0], [0.125, 3.0]])
    tx, _ = extrema_params(p)
    assert tx.size == 0
    assert bounding_box(p)[0] == -0.125 and bounding_box(p)[2] == 0.125


@pytest.mark.parametrize("scale", [1e-9, 1e9])
def test_extreme_scales(scale):
    p = np.array([[0.0, 0.0], [1.5, 1.0], [-0.5, 1.0], [1.0, 0.0]])
    np.testing.assert_allclose(np.array(bounding_box(p * scale)) / scale, bounding_box(p))
    np.testing.assert_allclose(extrema_params(p * scale)[0], extrema_params(p)[0])
