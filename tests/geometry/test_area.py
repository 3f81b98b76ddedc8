"""Tests of outlinebench.geometry.area: signed area of closed contours by Green's theorem."""

from __future__ import annotations

import numpy as np
import pytest
import shapely
import sympy

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.area import green_matrix, segment_area_terms, signed_area
from outlinebench.geometry.bezier import evaluate

K = 0.5522847498  # the usual 4-cubic circle handle length (common practice, no source needed)
CIRCLE = [
    np.array([[1, 0], [1, K], [K, 1], [0, 1]], float),
    np.array([[0, 1], [-K, 1], [-1, K], [-1, 0]], float),
    np.array([[-1, 0], [-1, -K], [-K, -1], [0, -1]], float),
    np.array([[0, -1], [K, -1], [1, -K], [1, 0]], float),
]


def _dense_polygon_area(segments, n=20000):
    # Reference: shapely polygon area of a dense flattening (error O(1/n²)).
    pts = np.concatenate([evaluate(s, np.linspace(0, 1, n)) for s in segments])
    return shapely.Polygon(pts).area * (1 if shapely.Polygon(pts).exterior.is_ccw else -1)


def test_polygons():
    # Shoelace formula (closed form): unit square 1, triangle ½; reversed → negative.
    square = [np.array([[0, 0], [1, 0]]), np.array([[1, 0], [1, 1]]), np.array([[1, 1], [0, 1]])]
    assert signed_area(square) == 1.0  # closed by the implicit chord (0,1) → (0,0)
    assert signed_area([s[::-1] for s in square[::-1]]) == -1.0
    assert signed_area([]) == 0.0


def test_parabola_region_closed_form():
    # Between y = x² (as a cubic) and the chord y = x: ∫₀¹ (x − x²) dx = 1/6, counter-clockwise.
    par = np.array([[0, 0], [1 / 3, 0], [2 / 3, 1 / 3], [1, 1]])
    assert signed_area([par, np.array([[1.0, 1.0], [0.0, 0.0]])]) == pytest.approx(1 / 6, 1e-15)


def test_green_matrix_against_sympy():
    # Reference: sympy integrates B_i^n (B_j^n)′ exactly.
    t = sympy.symbols("t")
    for n in (1, 2, 3):
        basis = [sympy.binomial(n, i) * t**i * (1 - t) ** (n - i) for i in range(n + 1)]
        want = [
            [float(sympy.integrate(bi * sympy.diff(bj, t), (t, 0, 1))) for bj in basis]
            for bi in basis
        ]
        np.testing.assert_allclose(green_matrix(n), want, atol=1e-16)


def test_circle_against_sympy_and_shapely():
    # Reference: sympy evaluates ½∮(x dy − y dx) exactly for the four cubics; shapely on a
    # dense polygon agrees to the flattening error.
    t = sympy.symbols("t")
    k = sympy.Rational(K)
    exact = 0
    for seg in CIRCLE:
        pts = [
            (
                sympy.Rational(x) if abs(x) != K else sympy.sign(x) * k,
                sympy.Rational(y) if abs(y) != K else sympy.sign(y) * k,
            )
            for x, y in seg.tolist()
        ]
        bx = sum(sympy.binomial(3, i) * t**i * (1 - t) ** (3 - i) * pts[i][0] for i in range(4))
        by = sum(sympy.binomial(3, i) * t**i * (1 - t) ** (3 - i) * pts[i][1] for i in range(4))
        exact += sympy.integrate(bx * sympy.diff(by, t) - by * sympy.diff(bx, t), (t, 0, 1)) / 2
    got = signed_area(CIRCLE)
    assert got == pytest.approx(float(exact), rel=1e-14)
    assert got == pytest.approx(_dense_polygon_area(CIRCLE), rel=1e-7)
    assert abs(got - np.pi) < 2e-3  # the 4-cubic circle is slightly larger than π


def test_mixed_degree_contour_against_shapely():
    segs = [
        np.array([[0.0, 0.0], [4.0, 0.0]]),
        np.array([[4.0, 0.0], [6.0, 2.0], [4.0, 4.0]]),
        np.array([[4.0, 4.0], [3.0, 6.0], [1.0, 2.0], [0.0, 4.0]]),
        np.array([[0.0, 4.0], [0.0, 0.0]]),
    ]
    assert signed_area(segs) == pytest.approx(_dense_polygon_area(segs), rel=1e-7)


def test_far_from_origin_and_tiny():
    # Translation leaves the enclosed area unchanged; scaling by λ multiplies it by λ².
    base = signed_area(CIRCLE)
    far = [s + 1e9 for s in CIRCLE]  # rounding the input itself moves points by ~1e-7
    back = [s - 1e9 for s in far]  # exact (Sterbenz): the same rounded shape near the origin
    assert signed_area(far) == pytest.approx(signed_area(back), rel=1e-12)
    assert signed_area(back) == pytest.approx(base, rel=1e-6)
    assert signed_area([s * 1e-9 for s in CIRCLE]) == pytest.approx(base * 1e-18, rel=1e-14)


def test_segment_terms_batch_and_all_points_equal():
    terms = segment_area_terms(np.stack(CIRCLE))
    assert terms.shape == (4,)
    assert terms.sum() == pytest.approx(signed_area(CIRCLE), rel=1e-15)
    assert signed_area([np.full((4, 2), 3.0)]) == 0.0


def test_bad_segment_is_named():
    with pytest.raises(InvalidGeometryError, match="segment 1 needs 2, 3 or 4"):
        signed_area([np.zeros((2, 2)), np.zeros((5, 2))])
    with pytest.raises(InvalidGeometryError, match="segment 0 has a coordinate"):
        signed_area([np.array([[0.0, np.nan], [1.0, 1.0]])])
