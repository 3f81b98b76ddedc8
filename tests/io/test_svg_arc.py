"""Tests of outlinebench/io/svg_arc.py: endpoint arcs to cubics and their error bound."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

from outlinebench.geometry.bezier import evaluate
from outlinebench.io.svg_arc import ARC_TOLERANCE, arc_piece_error, arc_pieces, arc_to_cubics
from outlinebench.io.svg_path import read_path_data
from outlinebench.io.svg_transform import parse_transform

T = np.linspace(0.0, 1.0, 41)


def ellipse_distance(p, cx, cy, rx, ry, phi):
    """Distance from p to the ellipse, by 1-D minimisation over the ellipse angle (scipy)."""
    c, s = math.cos(phi), math.sin(phi)
    dx, dy = p[0] - cx, p[1] - cy
    u, v = c * dx + s * dy, -s * dx + c * dy
    t0 = math.atan2(v / ry, u / rx)

    def dist(t):
        return math.hypot(u - rx * math.cos(t), v - ry * math.sin(t))

    res = minimize_scalar(
        dist, bounds=(t0 - 0.3, t0 + 0.3), method="bounded", options={"xatol": 1e-12}
    )
    return min(res.fun, dist(t0))


def f65_centre(x1, y1, rx, ry, phi_deg, fa, fs, x2, y2):
    """SVG 1.1 Appendix F.6.5 step by step (written out again for the test), including the
    F.6.6 radius correction."""
    phi = math.radians(phi_deg)
    c, s = math.cos(phi), math.sin(phi)
    x1p = c * (x1 - x2) / 2 + s * (y1 - y2) / 2
    y1p = -s * (x1 - x2) / 2 + c * (y1 - y2) / 2
    rx, ry = abs(rx), abs(ry)
    lam = x1p**2 / rx**2 + y1p**2 / ry**2
    if lam > 1:
        rx, ry = rx * math.sqrt(lam), ry * math.sqrt(lam)
    num = rx**2 * ry**2 - rx**2 * y1p**2 - ry**2 * x1p**2
    den = rx**2 * y1p**2 + ry**2 * x1p**2
    k = math.sqrt(max(num, 0) / den)
    if fa == fs:
        k = -k
    cxp, cyp = k * rx * y1p / ry, -k * ry * x1p / rx
    return c * cxp - s * cyp + (x1 + x2) / 2, s * cxp + c * cyp + (y1 + y2) / 2, rx, ry


def test_piece_error_formula_matches_the_measured_radial_error():
    # The standard cubic for a unit-circle arc of sweep θ (handles 4/3·tan(θ/4)) has largest
    # radial error ≈ θ⁶/55296; our bound (2/27)·sin⁶(θ/4)/cos²(θ/4) is that to leading order
    # and never below the measured error. For θ = π/2 the measured error is the well-known
    # 2.7253e-4, the commonly quoted 0.027 % (common practice, no source).
    for theta in [*np.linspace(0.05, math.pi / 2, 12).tolist(), math.pi / 2]:
        h = 4 / 3 * math.tan(theta / 4)
        pts = np.array(
            [
                [1, 0],
                [1, h],
                [math.cos(theta) + h * math.sin(theta), math.sin(theta) - h * math.cos(theta)],
                [math.cos(theta), math.sin(theta)],
            ]
        )
        r = np.hypot(*evaluate(pts, np.linspace(0, 1, 2001)).T)
        # 1e-15: rounding of the evaluation itself (a few ulps of 1).
        assert r.max() - 1 <= arc_piece_error(theta) + 1e-15
        assert r.max() - 1 == pytest.approx(arc_piece_error(theta), rel=2e-4, abs=1e-15)
        if theta == math.pi / 2:
            assert r.max() - 1 == pytest.approx(2.7253e-4, rel=1e-4)
        assert r.min() >= 1 - 1e-15


def test_piece_count_is_the_smallest_meeting_the_tolerance():
    for sweep in (0.1, 1.0, math.pi, 2 * math.pi - 0.01):
        n = arc_pieces(sweep)
        assert arc_piece_error(sweep / n) <= ARC_TOLERANCE
        if n > max(1, math.ceil(sweep / (math.pi / 2))):
            assert arc_piece_error(sweep / (n - 1)) > ARC_TOLERANCE
    # θ⁶/55296 ≤ 1e-7 gives θ ≈ 0.42 rad per piece: a full circle needs 15 (closed form).
    assert arc_pieces(2 * math.pi - 1e-9) == 15


@given(
    st.floats(-50, 50),
    st.floats(-50, 50),
    st.floats(0.5, 80),
    st.floats(0.5, 80),
    st.floats(-360, 360),
    st.booleans(),
    st.booleans(),
    st.floats(-50, 50),
    st.floats(-50, 50),
)
def test_conversion_error_against_the_true_ellipse(x1, y1, rx, ry, phi, fa, fs, x2, y2):
    # Every sampled point of every cubic lies within ARC_TOLERANCE·max(rx, ry) of the true
    # ellipse (centre and corrected radii from SVG 1.1 F.6.5/F.6.6, computed independently).
    if math.hypot(x2 - x1, y2 - y1) < 1e-3:
        return
    res = arc_to_cubics(x1, y1, rx, ry, phi, fa, fs, x2, y2)
    assert res.kind == "cubics"
    cx, cy, rrx, rry = f65_centre(x1, y1, rx, ry, phi, fa, fs, x2, y2)
    bound = ARC_TOLERANCE * max(rrx, rry)
    assert res.cubics[0, 0].tolist() == [x1, y1] and res.cubics[-1, -1].tolist() == [x2, y2]
    assert np.array_equal(res.cubics[1:, 0], res.cubics[:-1, 3])
    worst = 0.0
    for seg in res.cubics[:: max(1, len(res.cubics) // 4)]:
        for p in evaluate(seg, T[::4]):
            worst = max(worst, ellipse_distance(p, cx, cy, rrx, rry, math.radians(phi)))
    assert worst <= bound * 1.01 + 1e-12


def test_arcs_under_non_uniform_scale_skew_and_mirror_stay_on_the_mapped_ellipse():
    # Convert in element coordinates, then map control points (affine maps are exact on
    # Béziers): mapping the result back must land on the original ellipse.
    m = parse_transform("matrix(1 0.3 -0.2 0.5 7 -3) skewX(20) scale(-2 0.5)")
    res = read_path_data("M10 0 A10 5 30 1 1 -5 3", matrix=m)
    inv = np.linalg.inv(m)
    cx, cy, rrx, rry = f65_centre(10, 0, 10, 5, 30, 1, 1, -5, 3)
    for seg in res.contours[0].segments:
        pts = evaluate(seg, T)
        back = pts @ inv[:2, :2].T + inv[:2, 2]
        for p in back[::5]:
            assert ellipse_distance(p, cx, cy, rrx, rry, math.radians(30)) <= 1e-6 * 10 + 1e-9


def test_degenerate_arcs():
    # SVG 1.1 F.6.2: same end points → omitted; zero radius → line.
    assert arc_to_cubics(1, 1, 5, 5, 0, False, True, 1, 1).kind == "none"
    assert arc_to_cubics(1, 1, 0, 5, 0, False, True, 2, 2).kind == "line"
    r = arc_to_cubics(0, 0, -3, 4, 0, False, True, 2, 2)
    assert r.negative_radius and r.kind == "cubics"
    # Λ exactly at 1 (a half circle with the minimum radius): the clamp keeps sqrt real.
    r = arc_to_cubics(0, 0, 5, 5, 0, False, True, 10, 0)
    assert r.kind == "cubics" and np.all(np.isfinite(r.cubics))


@pytest.mark.parametrize("r", [1e-170, 1e-300, 4e-320])
def test_radii_far_too_small_scale_up_without_overflow(r):
    # SVG 1.1 F.6.6: radii too small to reach the end point are scaled by sqrt(Λ) until the
    # arc just reaches it, so any tiny equal radii give the half circle on the chord (radius
    # 5 here), the same as writing radius 5. Λ = (x1'/rx)² + ... overflows a double for these
    # radii; the scale factor must not.
    tiny = arc_to_cubics(0.0, 0.0, r, r, 0.0, False, True, 10.0, 0.0)
    exact = arc_to_cubics(0.0, 0.0, 5.0, 5.0, 0.0, False, True, 10.0, 0.0)
    assert tiny.kind == "cubics" and tiny.radii_scaled
    np.testing.assert_allclose(tiny.cubics, exact.cubics, rtol=0, atol=1e-12)


def test_huge_radii_keep_the_centre_where_the_implementation_notes_put_it():
    # SVG 1.1 F.6.5: for a quarter circle from (0, 0) to (r, r) with radius r, the centre is
    # (0, r) or (r, 0); at r = 1e200, rx² overflows a double, so the formula must be used in
    # its scaled form (1 − Λ)/Λ. Expected control points: the same arc at r = 1 scaled by r
    # (the construction is scale-invariant).
    r = 1e200
    big = arc_to_cubics(0.0, 0.0, r, r, 0.0, False, False, r, r)
    unit = arc_to_cubics(0.0, 0.0, 1.0, 1.0, 0.0, False, False, 1.0, 1.0)
    assert big.kind == "cubics" and not big.radii_scaled
    np.testing.assert_allclose(big.cubics / r, unit.cubics, rtol=0, atol=1e-12)
