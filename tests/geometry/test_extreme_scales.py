"""Regression tests of issue 15: geometry at subnormal and 1e300 scales (no warnings, no NaN).

pytest turns warnings raised from outlinebench into errors (pyproject ``filterwarnings``), so
each call below also checks that no numpy RuntimeWarning escapes.
"""

import math

import numpy as np
import pytest

from outlinebench.geometry import (
    curvature,
    end_curvatures,
    flatten_contours_bounded,
    nearest_point,
    signed_area,
)

# A cubic quarter circle of radius 0.75 (handles 4/3·tan(π/8)·r, Goldapp 1991): its largest
# coordinate lies in [0.5, 1), so scaling by 2^k changes only exponents.
_H = 4.0 / 3.0 * math.tan(math.pi / 8) * 0.75
QUARTER = np.array([[0.75, 0.0], [0.75, _H], [_H, 0.75], [0.0, 0.75]])


def _square(side, corner=0.0):
    p = [(corner, corner), (corner + side, corner), (corner + side, corner + side)]
    p.append((corner, corner + side))
    return [np.array([p[i], p[(i + 1) % 4]]) for i in range(4)]


@pytest.mark.parametrize(
    ("side", "corner", "area"),
    [
        (2.0**-531, 0.0, 2.0**-1062),  # side² is subnormal, exact (IEEE 754 gradual underflow)
        (2.0**500, 2.0**540, 2.0**1000),  # x·y near 2^1040 before the shift to the origin
        (2.0**600, 0.0, math.inf),  # 2^1200 passes the largest double: +inf, never NaN
        (1.5e308, -1.6e308, math.inf),  # the span 3.1e308 itself overflows
    ],
)
def test_signed_area_at_the_ends_of_binary64(side, corner, area):
    # Closed form: a square of side a has area a² (counter-clockwise in a y-up frame).
    assert signed_area(_square(side, corner)) == area


@pytest.mark.parametrize("k", [-1000, -600, 600, 1000])
def test_flattening_is_exact_under_power_of_two_scaling(k):
    # Scaling a curve and its tolerance by 2^k is exact in binary64, and the flattening is
    # a function of the shape: the same chords, every vertex scaled by exactly 2^k.
    ref_polys, ref_bounds = flatten_contours_bounded([([QUARTER], False)], 1e-4)
    polys, bounds = flatten_contours_bounded([([np.ldexp(QUARTER, k)], False)], 1e-4 * 2.0**k)
    assert np.array_equal(polys[0], np.ldexp(ref_polys[0], k))
    assert bounds[0] == np.ldexp(ref_bounds[0], k) and bounds[0] <= 1e-4 * 2.0**k
    assert np.array_equal(polys[0][0], np.ldexp(QUARTER, k)[0])  # segment ends bit for bit


def test_flattening_a_subnormal_curve_with_a_plain_tolerance():
    # A curve 2^-1070 across (subnormal coordinates) with ε = 0.01: a chord or two, within
    # ε, end points bit for bit, nothing non-finite.
    tiny = np.ldexp(QUARTER, -1070)
    polys, bounds = flatten_contours_bounded([([tiny], False)], 0.01)
    assert len(polys[0]) <= 3 and bounds[0] <= 0.01 and np.all(np.isfinite(polys[0]))
    assert np.array_equal(polys[0][[0, -1]], tiny[[0, -1]])


def test_curvature_of_a_subnormal_circle_is_inf_not_a_warning():
    # κ ≈ 1/r (circle, within 1 % for this cubic); r = 0.75·2^-1070 gives 1/r ≈ 1.8e321,
    # beyond the largest double: +inf, the documented value. At r = 0.75·2^-1000 κ is
    # finite and, κ scaling as 1/size, exactly 2^1000 times the unscaled cubic's.
    assert end_curvatures(np.ldexp(QUARTER, -1070)) == (math.inf, math.inf)
    k = curvature(np.ldexp(QUARTER, -1000), 0.5)
    assert k == curvature(QUARTER, 0.5) * 2.0**1000
    assert math.isclose(k, 2.0**1000 / 0.75, rel_tol=1e-2)


def test_nearest_point_on_a_line_near_the_largest_double():
    # The line from (0, 0) to (1e308, 0) and the point (5e307, 1e307): the foot of the
    # perpendicular is (5e307, 0) at t = 1/2, distance 1e307 (closed form). d·d = 1e616
    # overflowed before.
    line = np.array([[0.0, 0.0], [1e308, 0.0]])
    t, dist, point = nearest_point(line, np.array([5e307, 1e307]))
    assert t == 0.5 and dist == 1e307 and point.tolist() == [5e307, 0.0]
