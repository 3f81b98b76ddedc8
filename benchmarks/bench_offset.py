"""Offset benchmark: accuracy and speed of cubic offsets against shapely's polygon buffer.

Seeded random star-shaped cubic outlines (self-intersecting ones skipped), closed, offset by
d ∈ {−2, 1, 3} at ε = 0.01 (coordinates in a 100-unit box). Prints the measured largest
| distance to the original − |d| | over ε (dense samples, shapely distance), cubics per
outline, and the time against shapely's round-join buffer of the flattened outline (the
reference: polygon only, no cubics, no findings).

Run: python benchmarks/bench_offset.py
"""

from __future__ import annotations

import time

import numpy as np
import shapely

from outlinebench.geometry.flatten import flatten_contours
from outlinebench.geometry.offset import offset_contour


def outlines(count: int, seed: int = 7) -> list[list[np.ndarray]]:
    rng = np.random.default_rng(seed)
    out = []
    while len(out) < count:
        n = int(rng.integers(3, 9))
        ang = np.sort(rng.uniform(0, 2 * np.pi, n))
        rad = rng.uniform(10, 40, n)
        p = np.stack([50 + rad * np.cos(ang), 50 + rad * np.sin(ang)], 1)
        segs = []
        for i in range(n):
            a, b = p[i], p[(i + 1) % n]
            segs.append(
                np.array(
                    [
                        a,
                        a + (b - a) / 3 + rng.normal(0, 4, 2),
                        a + 2 * (b - a) / 3 + rng.normal(0, 4, 2),
                        b,
                    ]
                )
            )
        if shapely.LinearRing(flatten_contours([(segs, True)], 0.05)[0]).is_simple:
            out.append(segs)
    return out


def samples(segs: list[np.ndarray], n: int) -> np.ndarray:
    t = np.linspace(0, 1, n)[:, None]
    s = 1 - t
    return np.vstack(
        [s**3 * c[0] + 3 * s * s * t * c[1] + 3 * s * t * t * c[2] + t**3 * c[3] for c in segs]
    )


def main() -> None:
    eps = 0.01
    shapes = outlines(60)
    print(f"{len(shapes)} closed random cubic outlines, eps = {eps}")
    print(f"{'d':>5} | {'max |dist-|d||/eps':>18} {'cubics/outline':>14} {'time/shapely':>12}")
    for d in (-2.0, 1.0, 3.0):
        t0 = time.perf_counter()
        results = [offset_contour(s, True, d, eps) for s in shapes]
        t_ours = time.perf_counter() - t0
        polys = [shapely.Polygon(flatten_contours([(s, True)], eps / 2)[0]) for s in shapes]
        t0 = time.perf_counter()
        for p in polys:
            p.buffer(d, quad_segs=32, join_style="round")
        t_ref = time.perf_counter() - t0
        worst = 0.0
        cubics = 0
        for s, res in zip(shapes, results, strict=True):
            orig = shapely.LineString(samples(s, 2000))
            for c in res.contours:
                cubics += len(c.segments)
                pts = np.vstack([c.polyline, samples(c.segments, 40)])
                dist = shapely.distance(shapely.points(pts), orig)
                worst = max(worst, float(np.max(np.abs(dist - abs(d)))))
        print(f"{d:5.1f} | {worst / eps:18.3f} {cubics / len(shapes):14.1f} {t_ours / t_ref:12.1f}")


if __name__ == "__main__":
    main()
