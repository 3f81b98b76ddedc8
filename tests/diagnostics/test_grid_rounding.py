"""The grid-rounding rule: which kinks rounding the points to a grid could cause."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import linprog

from outlinebench.diagnostics import check_document
from outlinebench.diagnostics.findings import INFO, WARNING
from outlinebench.diagnostics.grid_rounding import (
    GRID_KINK,
    chebyshev_distance_to_segment,
    explained_by_rounding,
    grid_kink_findings,
    max_rounding_angle,
)
from outlinebench.model.document import Contour, Document, Outline

# Angles from the closed forms below agree with max_rounding_angle to rounding only.
ANGLE_TOL = 1e-9


def _turn(a, p, b) -> float:
    """Turn angle (degrees) between P − A and B − P (the checker's join angle)."""
    u, v = np.subtract(p, a), np.subtract(b, p)
    return math.degrees(math.atan2(abs(u[0] * v[1] - u[1] * v[0]), float(np.dot(u, v))))


def _preimage_lp(a, p, b, g: float, ts: np.ndarray) -> float:
    """Smallest extra half-width s ≥ 0 for which points A*, B* within g/2 + s of A, B and
    (1 − t) A* + t B* within g/2 + s of P exist, over a grid of t (scipy's linprog, an
    independent solver of the linear feasibility problem for each fixed t)."""
    best = math.inf
    h = g / 2
    for t in ts:
        # variables: A*x, A*y, B*x, B*y, s; minimise s
        c = [0, 0, 0, 0, 1]
        rows, rhs = [], []
        for axis in (0, 1):
            for sign in (1, -1):
                ea = [0, 0, 0, 0, -1]
                ea[axis] = sign
                rows.append(ea)
                rhs.append(sign * a[axis] + h)
                eb = [0, 0, 0, 0, -1]
                eb[2 + axis] = sign
                rows.append(eb)
                rhs.append(sign * b[axis] + h)
                ep = [0, 0, 0, 0, -1]
                ep[axis] = sign * (1 - t)
                ep[2 + axis] = sign * t
                rows.append(ep)
                rhs.append(sign * p[axis] + h)
        res = linprog(c, A_ub=rows, b_ub=rhs, bounds=[(None, None)] * 4 + [(0, None)])
        best = min(best, res.fun)
    return best


def test_axis_boundary_case_closed_form() -> None:
    # A = (−L, 0), P = (0, g), B = (L, 0): d∞(P, AB) = g exactly, the smooth preimage is the
    # line y = g/2 (every point moved by g/2). The turn is 2 atan(g/L) (closed form).
    g, length = 1.0, 100.0
    a, p, b = (-length, 0.0), (0.0, g), (length, 0.0)
    assert chebyshev_distance_to_segment(p, a, b) == g
    assert explained_by_rounding(a, p, b, g)
    assert not explained_by_rounding(a, (0.0, g * (1 + 1e-9)), b, g)
    turn = _turn(a, p, b)
    assert turn == pytest.approx(math.degrees(2 * math.atan(g / length)), abs=ANGLE_TOL)
    # θ_max for these handle lengths and a horizontal chord: sin(θ/2) = g / |P − A|
    h = math.hypot(length, g)
    assert max_rounding_angle(h, h, g, 0.0) == pytest.approx(turn, abs=ANGLE_TOL)


def test_diagonal_boundary_case_closed_form() -> None:
    # Chord along (1, 1): A = (−t, −t), B = (t, t), P = (−g, g). The L∞-nearest point of the
    # chord is the origin, at L∞ distance g (boundary), Euclidean distance √2 g; the turn is
    # 2 atan(g / t) — larger than the axis case for the same chord length, 2 atan(g / (√2 t)).
    g, t = 1.0, 60.0
    a, p, b = (-t, -t), (-g, g), (t, t)
    assert chebyshev_distance_to_segment(p, a, b) == pytest.approx(g, rel=1e-15)
    assert explained_by_rounding(a, p, b, g)
    assert not explained_by_rounding(a, (-g * 1.001, g * 1.001), b, g)
    turn = _turn(a, p, b)
    assert turn == pytest.approx(math.degrees(2 * math.atan(g / t)), abs=ANGLE_TOL)
    h = math.hypot(t - g, t + g)
    assert max_rounding_angle(h, h, g) == pytest.approx(turn, abs=ANGLE_TOL)  # worst case
    assert max_rounding_angle(h, h, g, math.pi / 4) == pytest.approx(turn, abs=ANGLE_TOL)
    assert max_rounding_angle(h, h, g, 0.0) < turn


def test_unequal_handles_closed_form() -> None:
    # Solving ab sinθ / |AB| = D for θ (module docstring) checked by putting the point at
    # that angle and measuring its distance to the chord: exactly D (Euclidean), so g.
    a_len, b_len, g = 30.0, 120.0, 1.0
    theta = math.radians(max_rounding_angle(a_len, b_len, g, 0.0))
    # place A, P, B with the chord AB horizontal
    u = np.array([math.cos(0.0), math.sin(0.0)])
    p = np.zeros(2)
    a = p - a_len * u
    rot = np.array([[math.cos(theta), -math.sin(theta)], [math.sin(theta), math.cos(theta)]])
    b = p + b_len * (rot @ u)
    chord = (b - a) / np.linalg.norm(b - a)
    back = np.array([[chord[0], chord[1]], [-chord[1], chord[0]]])  # rotate chord to x-axis
    a2, p2, b2 = back @ a, back @ p, back @ b
    assert abs(p2[1] - a2[1]) == pytest.approx(g, rel=1e-12)  # Euclidean = L∞ here
    assert chebyshev_distance_to_segment(p2, a2, b2) == pytest.approx(g, rel=1e-12)


def test_every_rounded_smooth_join_is_explained() -> None:
    # Soundness: smooth joins drawn anywhere, rounded with numpy to the grid (each coordinate
    # moved by at most g/2, by definition of rounding), are always explained.
    rng = np.random.default_rng(12)
    g = 1.0
    n = 20_000
    p = rng.uniform(-500, 500, (n, 2))
    phi = rng.uniform(0, 2 * np.pi, n)
    d = np.stack([np.cos(phi), np.sin(phi)], axis=1)
    la = np.exp(rng.uniform(np.log(0.2), np.log(300), n))[:, None]
    lb = np.exp(rng.uniform(np.log(0.2), np.log(300), n))[:, None]
    a, b = p - la * d, p + lb * d
    ra, rp, rb = np.round(a / g) * g, np.round(p / g) * g, np.round(b / g) * g
    assert np.all(explained_by_rounding(ra, rp, rb, g))
    # and the turns seen never exceed the worst-case bound for the rounded handle lengths
    turns = np.array([_turn(x, y, z) for x, y, z in zip(ra[:500], rp[:500], rb[:500], strict=True)])
    bounds = [
        max_rounding_angle(np.hypot(*(y - x)), np.hypot(*(z - y)), g)
        for x, y, z in zip(ra[:500], rp[:500], rb[:500], strict=True)
    ]
    assert np.all(turns <= np.array(bounds) + 1e-9)


def test_explained_joins_have_an_explicit_smooth_preimage() -> None:
    # Completeness: for grid points with d∞ < g the module's construction gives drawn points
    # that lie on one line, in order, and round (numpy) back to the same grid points.
    rng = np.random.default_rng(7)
    g = 1.0
    found = 0
    for _ in range(4000):
        p = rng.integers(-50, 50, 2).astype(float)
        a = p + rng.integers(-40, 40, 2)
        b = p + rng.integers(-40, 40, 2)
        d = chebyshev_distance_to_segment(p, a, b)
        if not d < g:
            continue
        ts = np.linspace(0, 1, 20001)
        q_all = a + ts[:, None] * (b - a)
        k = int(np.argmin(np.max(np.abs(q_all - p), axis=1)))
        q = q_all[k]
        e = (p - q) / 2
        a_s, b_s, p_s = a + e, b + e, q + e
        assert np.array_equal(np.round(a_s), a) and np.array_equal(np.round(b_s), b)
        assert np.array_equal(np.round(p_s), p)
        cross = (p_s - a_s)[0] * (b_s - p_s)[1] - (p_s - a_s)[1] * (b_s - p_s)[0]
        assert abs(cross) <= 1e-9 * (1 + np.abs(b - a).sum() ** 2)
        found += 1
    assert found > 100


@pytest.mark.parametrize(
    ("p", "explained"), [((0.0, 0.99), True), ((0.0, 1.01), False), ((0.7, 1.05), False)]
)
def test_rule_agrees_with_a_linear_programme(p, explained) -> None:
    # scipy's linprog decides, for each t on a fine grid, whether drawn points within g/2 of
    # A, B, P with P* = (1 − t) A* + t B* exist (an independent check of d∞ ≤ g).
    a, b, g = (-30.0, 0.0), (40.0, 0.0), 1.0
    slack = _preimage_lp(a, p, b, g, np.linspace(0, 1, 201))
    assert (slack <= 1e-9) == explained
    assert explained_by_rounding(a, p, b, g) == explained


def _doc(points: list[tuple[float, float]]) -> Document:
    segs = [[points[i], points[(i + 1) % len(points)]] for i in range(len(points))]
    return Document((Outline((Contour.from_points(segs, closed=True),), "part", 0),))


def test_kinks_become_grid_kinks_only_when_rounding_explains_them() -> None:
    # A plaque edge with its middle point lifted by 1 unit (a turn of 2 atan(1/100) ≈ 1.15°,
    # a kink between the 0.5° kink and 10° corner angles) and by 2 units (≈ 2.29°).
    for lift, kind, severity in ((1.0, GRID_KINK, INFO), (2.0, "kink", WARNING)):
        doc = _doc([(0, 0), (100, -lift), (200, 0), (200, 80), (0, 80)])
        kinks = [f for f in check_document(doc) if f.kind == "kink"]
        assert len(kinks) >= 1
        changed = grid_kink_findings(kinks, doc, 1.0)
        at_lift = [f for f in changed if (f.x, f.y) == (100.0, -lift)]
        assert len(at_lift) == 1
        f = at_lift[0]
        assert (f.kind, f.severity) == (kind, severity)
        expect = math.degrees(2 * math.atan(lift / 100))  # closed form of the turn
        assert f.value == pytest.approx(expect, abs=1e-9)
        if kind == GRID_KINK:
            assert f.limit >= f.value and "grid of 1 unit" in f.message
    # no grid step: nothing changes
    doc = _doc([(0, 0), (100, -1), (200, 0), (200, 80), (0, 80)])
    found = check_document(doc)
    assert grid_kink_findings(found, doc, None) == found
