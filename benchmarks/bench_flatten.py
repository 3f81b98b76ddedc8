"""Flattening benchmark: chord count, measured deviation and speed, in one run.

Per curve set (seeded random cubics, near-cusp cubics, inflected S-cubics; coordinates in a
100-unit box) and tolerance ε (0.1 and 0.01), prints

- chords/ΣN*: chords used over the asymptotic minimum N* = ∫ sqrt(|κ|/(8ε)) ds, integrated
  per curve by composite 8-point Gauss–Legendre on 512 panels (numpy's leggauss nodes;
  independent of the flattener's own 32-interval trapezoid grid), checked in each run against
  scipy.integrate.quad on 20 curves per set (printed as "quad check");
- bound/ε: the largest of the flattener's own proven deviation bounds, over every curve;
- dev/ε: the largest Hausdorff distance measured independently with shapely on every
  twentieth curve (dense samples both ways; a measurement, not the flattener's own bound);
- time/Wang: flattening time over that of the vectorised uniform flattener by Wang's formula
  on the same input (best of 3 each);
- the same numbers for Wang's flattener, and for uniform sampling with svgpathtools at our
  chord count per curve (reference library; its time per chord against ours).

Run: python benchmarks/bench_flatten.py
"""

from __future__ import annotations

import math
import time

import numpy as np
import shapely
from scipy import integrate

from outlinebench.geometry.flatten import (
    flatten_contours,
    flatten_contours_bounded,
    flatten_uniform_wang,
)

M = 2000  # curves per set
SVGPATHTOOLS_CURVES = 50  # svgpathtools is pure Python, and measured by shapely: a subset
QUAD_CHECK = 20  # curves per set whose Gauss–Legendre integral is checked against quad
MEASURE_EVERY = 40  # the shapely measurement runs on every 40th curve (50 per set)
CURVE_SAMPLES = 8001  # dense curve samples: within max|B''|/(8·8000²) ≈ 2e-6 of the curve
EDGE_SAMPLES = 16  # intervals per polyline edge for the polyline → curve direction


def curve_sets(seed: int = 20261201) -> dict[str, np.ndarray]:
    rng = np.random.default_rng(seed)
    random = rng.uniform(0, 100, (M, 4, 2))
    # near-cusp: P1 and P2 crossed so that the hodograph nearly passes through zero
    p0 = rng.uniform(0, 100, (M, 2))
    p3 = rng.uniform(0, 100, (M, 2))
    w = rng.uniform(-50, 50, (M, 2))
    jitter = rng.normal(0, 1.0, (M, 2))
    near_cusp = np.stack([p0, p3 + w + jitter, p0 + w, p3], axis=1)
    # inflected: S-shaped cubics with handles on opposite sides of the chord
    a = rng.uniform(0, 100, (M, 2))
    d = rng.uniform(20, 60, (M, 2))
    perp = np.stack([-d[:, 1], d[:, 0]], 1) / np.linalg.norm(d, axis=1)[:, None]
    h = rng.uniform(10, 40, (M, 1))
    inflected = np.stack([a, a + d / 3 + perp * h, a + 2 * d / 3 - perp * h, a + d], axis=1)
    return {"random": random, "near-cusp": near_cusp, "inflected": inflected}


def sqrt_curvature_integral(c: np.ndarray) -> float:
    """∫ sqrt(|κ|) ds over the cubic, by scipy.integrate.quad."""
    d1 = 3 * np.diff(c, axis=0)
    d2 = 2 * np.diff(d1, axis=0)

    def f(t: float) -> float:
        b1 = (1 - t) ** 2 * d1[0] + 2 * (1 - t) * t * d1[1] + t * t * d1[2]
        b2 = (1 - t) * d2[0] + t * d2[1]
        sp = math.hypot(b1[0], b1[1])
        if sp == 0.0:
            return 0.0
        return math.sqrt(abs(b1[0] * b2[1] - b1[1] * b2[0]) / sp)

    return integrate.quad(f, 0.0, 1.0, limit=400)[0]


def sqrt_curvature_integrals(curves: np.ndarray, panels: int = 512) -> np.ndarray:
    """∫ sqrt(|κ|) ds of each cubic (M, 4, 2): composite 8-point Gauss–Legendre, vectorised.

    The integrand sqrt(|B′ × B″| / |B′|) is bounded; its square-root kinks at inflections
    limit the order, so many panels: 512 × 8 nodes agree with scipy.integrate.quad to ~1e-6
    relative on the sum of each set (checked in every run on QUAD_CHECK curves).
    """
    x, w = np.polynomial.legendre.leggauss(8)
    h = 1.0 / panels
    t = (np.linspace(0.0, 1.0, panels + 1)[:-1, None] + (x + 1.0) / 2.0 * h).ravel()
    ww = np.tile(w * h / 2.0, panels)
    d1 = 3 * np.diff(curves, axis=1)
    d2 = 2 * np.diff(d1, axis=1)
    out = np.empty(len(curves))
    for i in range(0, len(curves), 250):
        a, b = d1[i : i + 250], d2[i : i + 250]
        s = (1 - t)[None, :, None]
        u = t[None, :, None]
        b1 = s * s * a[:, None, 0] + 2 * s * u * a[:, None, 1] + u * u * a[:, None, 2]
        b2 = s * b[:, None, 0] + u * b[:, None, 1]
        sp = np.hypot(b1[..., 0], b1[..., 1])
        cr = np.abs(b1[..., 0] * b2[..., 1] - b1[..., 1] * b2[..., 0])
        out[i : i + 250] = np.sqrt(np.divide(cr, sp, out=np.zeros_like(cr), where=sp > 0)) @ ww
    return out


def measured_deviation(c: np.ndarray, poly: np.ndarray, eps: float) -> float:
    """Hausdorff distance between curve and polyline, measured with shapely.

    Curve → polyline: exact distance of CURVE_SAMPLES curve samples to the polyline.
    Polyline → curve: every edge sampled at EDGE_SAMPLES + 1 points, exact distance of each
    sample to the nearest edge of the dense curve polyline (within ~2e-6 of the curve by
    Wang's bound for coordinates in a 100-unit box). Both are samples: lower estimates."""
    del eps
    ts = np.linspace(0, 1, CURVE_SAMPLES)
    s = 1 - ts
    pts = (
        (s**3)[:, None] * c[0]
        + (3 * s * s * ts)[:, None] * c[1]
        + (3 * s * ts * ts)[:, None] * c[2]
        + (ts**3)[:, None] * c[3]
    )
    line = poly if len(poly) > 1 else np.vstack([poly, poly])
    d1 = float(np.max(shapely.distance(shapely.points(pts), shapely.LineString(line))))
    e = np.diff(line, axis=0)
    f = np.linspace(0.0, 1.0, EDGE_SAMPLES + 1)
    samples = (line[:-1, None, :] + f[None, :, None] * e[:, None, :]).reshape(-1, 2)
    tree = shapely.STRtree(shapely.linestrings(np.stack([pts[:-1], pts[1:]], axis=1)))
    _, d2 = tree.query_nearest(shapely.points(samples), return_distance=True)
    return max(d1, float(np.max(d2)))


def best_time(fn, repeat: int = 3) -> float:
    best = math.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    from svgpathtools import CubicBezier

    print(f"{M} cubics per set, coordinates in [0, 100]; ratios measured in this run")
    print(
        f"bound/eps: our proven bound, all {M} curves; dev/eps: shapely measurement on every "
        f"{MEASURE_EVERY}th curve ({M // MEASURE_EVERY}, also for Wang); svgpathtools on the "
        f"first {SVGPATHTOOLS_CURVES}"
    )
    header = (
        f"{'set':10} {'eps':>5} | {'ours chords/N*':>14} {'bound/eps':>9} {'dev/eps':>8} "
        f"{'time/Wang':>9} |"
        f" {'Wang chords/N*':>14} {'dev/eps':>8} | {'svgpt dev/eps':>13} {'svgpt t/ours':>12}"
    )
    print(header)
    print("-" * len(header))
    for name, curves in curve_sets().items():
        integral = sqrt_curvature_integrals(curves)
        quad = np.array([sqrt_curvature_integral(c) for c in curves[:QUAD_CHECK]])
        quad_check = abs(float(np.sum(integral[:QUAD_CHECK]) / np.sum(quad)) - 1.0)
        contours = [([c], False) for c in curves]
        for eps in (0.1, 0.01):
            n_star = float(np.sum(integral)) / math.sqrt(8 * eps)
            ours, bounds = flatten_contours_bounded(contours, eps)
            wang = flatten_uniform_wang(contours, eps)
            t_ours = best_time(lambda c=contours, e=eps: flatten_contours(c, e))
            t_wang = best_time(lambda c=contours, e=eps: flatten_uniform_wang(c, e))
            chords = sum(len(p) - 1 for p in ours)
            wchords = sum(len(p) - 1 for p in wang)
            check = range(0, M, MEASURE_EVERY)
            dev = max(measured_deviation(curves[i], ours[i], eps) for i in check)
            wdev = max(measured_deviation(curves[i], wang[i], eps) for i in check)
            # svgpathtools: uniform parameter steps with our chord count per curve
            sub = range(SVGPATHTOOLS_CURVES)
            t0 = time.perf_counter()
            sv = []
            for i in sub:
                c = curves[i]
                bz = CubicBezier(*(complex(x, y) for x, y in c))
                n = len(ours[i]) - 1
                sv.append(
                    np.array([[p.real, p.imag] for p in (bz.point(k / n) for k in range(n + 1))])
                )
            t_sv = time.perf_counter() - t0
            sv_chords = sum(len(p) - 1 for p in sv)
            ours_per_chord = t_ours / chords
            sv_dev = max(measured_deviation(curves[i], sv[k], eps) for k, i in enumerate(sub))
            print(
                f"{name:10} {eps:5.2f} | {chords / n_star:14.3f} {bounds.max() / eps:9.4f} "
                f"{dev / eps:8.4f} "
                f"{t_ours / t_wang:9.2f} | {wchords / n_star:14.3f} {wdev / eps:8.4f} | "
                f"{sv_dev / eps:13.3f} {(t_sv / sv_chords) / ours_per_chord:12.1f}"
            )
        print(f"{'':10} quad check: Gauss–Legendre/quad − 1 = {quad_check:.1e} on {QUAD_CHECK}")
    print("target: ours chords/N* <= 1.10, bound/eps and dev/eps <= 1, time/Wang <= 20")


if __name__ == "__main__":
    main()
