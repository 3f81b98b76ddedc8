"""Seeded test curves and 30-digit mpmath references shared by the geometry tests.

The random set mixes plain cubics with the hard kinds: near-cusp (an exact cusp moved by
1e-2 … 1e-8, then mapped by a random affine map, under which cusps stay cusps), looping and
inflected (S-shaped) cubics. Every reference value here is computed with mpmath at 30
significant digits from the float64 control points, so it is independent of our code.
"""

from __future__ import annotations

import mpmath
import numpy as np

__all__ = [
    "EXACT_CUSP",
    "random_cubics",
    "near_cusp_cubics",
    "loop_cubics",
    "inflected_cubics",
    "mixed_cubics",
    "mp_derivatives",
    "mp_curvature",
    "mp_length",
]

# B′(1/2) = 0 for this cubic: B′(t)/3 = (1,1)(1−t)² + 2(−1,0)t(1−t) + (1,−1)t², which at t = ½
# is ¼[(1,1) − (2,0) + (1,−1)] = 0 (closed form, checked by hand).
EXACT_CUSP = np.array([[0.0, 0.0], [1.0, 1.0], [0.0, 1.0], [1.0, 0.0]])


def _affine(rng: np.random.Generator, pts: np.ndarray) -> np.ndarray:
    a = rng.normal(size=(2, 2))
    while abs(np.linalg.det(a)) < 0.3:
        a = rng.normal(size=(2, 2))
    return pts @ a.T + rng.uniform(-5, 5, size=2)


def random_cubics(n: int, seed: int = 1) -> np.ndarray:
    """``n`` cubics with control points uniform in [0, 1]², shape (n, 4, 2)."""
    return np.random.default_rng(seed).uniform(0.0, 1.0, size=(n, 4, 2))


def near_cusp_cubics(n: int, seed: int = 2) -> np.ndarray:
    """Cubics within 1e-2 … 1e-8 (relative) of an exact cusp, shape (n, 4, 2)."""
    rng = np.random.default_rng(seed)
    out = []
    for i in range(n):
        eps = 10.0 ** -(2 + (i % 4) * 2)
        p = EXACT_CUSP.copy()
        ang = rng.uniform(0, 2 * np.pi)
        p[3] += eps * np.array([np.cos(ang), np.sin(ang)])
        out.append(_affine(rng, p))
    return np.array(out)


def loop_cubics(n: int, seed: int = 3) -> np.ndarray:
    """Cubics with a self-intersection loop (crossed control polygon), shape (n, 4, 2)."""
    rng = np.random.default_rng(seed)
    base = np.array([[0.0, 0.0], [1.5, 1.0], [-0.5, 1.0], [1.0, 0.0]])
    return np.array([_affine(rng, base + rng.uniform(-0.1, 0.1, (4, 2))) for _ in range(n)])


def inflected_cubics(n: int, seed: int = 4) -> np.ndarray:
    """S-shaped cubics with two sign changes of curvature … or one, shape (n, 4, 2)."""
    rng = np.random.default_rng(seed)
    base = np.array([[0.0, 0.0], [1.0, 1.0], [2.0, -1.0], [3.0, 0.0]])
    return np.array([_affine(rng, base + rng.uniform(-0.2, 0.2, (4, 2))) for _ in range(n)])


def mixed_cubics(n_each: int = 8, seed: int = 0) -> np.ndarray:
    """Random, near-cusp, looping and inflected cubics together, shape (4 n_each, 4, 2)."""
    return np.concatenate(
        [
            random_cubics(n_each, seed + 1),
            near_cusp_cubics(n_each, seed + 2),
            loop_cubics(n_each, seed + 3),
            inflected_cubics(n_each, seed + 4),
        ]
    )


def _mp_coeffs(points: np.ndarray) -> list[tuple]:
    """Monomial coefficients (c_k) of B(t) in mpmath numbers, lowest power first."""
    from math import comb

    n = len(points) - 1
    pts = [(mpmath.mpf(float(x)), mpmath.mpf(float(y))) for x, y in points]
    out = []
    for k in range(n + 1):
        cx = sum(comb(n, k) * (-1) ** (k - i) * comb(k, i) * pts[i][0] for i in range(k + 1))
        cy = sum(comb(n, k) * (-1) ** (k - i) * comb(k, i) * pts[i][1] for i in range(k + 1))
        out.append((cx, cy))
    return out


def mp_derivatives(points: np.ndarray, t) -> tuple:
    """(x′, y′, x″, y″) at t as mpmath numbers (monomial form, exact arithmetic at 30 digits)."""
    c = _mp_coeffs(points)
    t = mpmath.mpf(t)
    dx = sum(k * c[k][0] * t ** (k - 1) for k in range(1, len(c)))
    dy = sum(k * c[k][1] * t ** (k - 1) for k in range(1, len(c)))
    ddx = sum(k * (k - 1) * c[k][0] * t ** (k - 2) for k in range(2, len(c)))
    ddy = sum(k * (k - 1) * c[k][1] * t ** (k - 2) for k in range(2, len(c)))
    return dx, dy, ddx, ddy


def mp_curvature(points: np.ndarray, t: float) -> float:
    """Signed curvature (x′y″ − y′x″)/|B′|³ at 30 digits (do Carmo §1-5)."""
    with mpmath.workdps(30):
        dx, dy, ddx, ddy = mp_derivatives(points, t)
        return float((dx * ddy - dy * ddx) / (dx * dx + dy * dy) ** mpmath.mpf(1.5))


def mp_length(points: np.ndarray, t0: float = 0.0, t1: float = 1.0) -> float:
    """∫ |B′(t)| dt over [t0, t1] by mpmath tanh-sinh quadrature at 30 digits.

    The interval is split at the local minima of the speed (roots of B′·B″, found by mpmath
    polyroots at 30 digits), so the kink of |B′| near a cusp sits at a sub-interval end,
    where tanh-sinh keeps its full accuracy.
    """
    with mpmath.workdps(30):
        c = _mp_coeffs(points)
        n = len(c) - 1
        t0m, t1m = mpmath.mpf(t0), mpmath.mpf(t1)

        def speed(t):
            dx = sum(k * c[k][0] * t ** (k - 1) for k in range(1, n + 1))
            dy = sum(k * c[k][1] * t ** (k - 1) for k in range(1, n + 1))
            return mpmath.sqrt(dx * dx + dy * dy)

        breaks = [t0m, t1m]
        if n >= 2:
            # g(t) = B′·B″ as a polynomial, highest power first for mpmath.polyroots.
            d1 = [[k * c[k][j] for k in range(1, n + 1)] for j in (0, 1)]
            d2 = [[k * (k + 1) * c[k + 1][j] for k in range(1, n)] for j in (0, 1)]
            g = [mpmath.mpf(0)] * (len(d1[0]) + len(d2[0]) - 1)
            for j in (0, 1):
                for a, ca in enumerate(d1[j]):
                    for b, cb in enumerate(d2[j]):
                        g[a + b] += ca * cb
            while len(g) > 1 and g[-1] == 0:
                g.pop()
            if len(g) > 1:
                try:
                    roots = mpmath.polyroots(g[::-1], maxsteps=200, extraprec=60)
                except mpmath.libmp.libhyper.NoConvergence:
                    roots = []
                for r in roots:
                    if abs(mpmath.im(r)) < mpmath.mpf("1e-20"):
                        r = mpmath.re(r)
                        if t0m < r < t1m:
                            breaks.append(r)
        breaks.sort()
        return float(mpmath.quad(speed, breaks))
