"""Offset benchmark: accuracy and speed of cubic offsets against shapely's polygon buffer.

Seeded random star-shaped cubic outlines (self-intersecting ones skipped), closed, offset by
d ∈ {−2, 1, 3} at ε = 0.01 (coordinates in a 100-unit box). Prints the measured largest
| distance to the original − |d| | over ε (dense samples, shapely distance), cubics per
outline, and the time against shapely's round-join buffer of the flattened outline (the
reference: polygon only, no cubics, no findings).

A second table offsets whole regions (:func:`offset_region`: overlap removal, per-contour
offsets, their union where they meet) of the same outlines and of the two samples (the
bracket by −4.5 mm, the lettering by +3.5 mm), against shapely's buffer of the flattened
region (even-odd), with the largest distance error over ε and the time of each stage summed
over the set.

Run: python benchmarks/bench_offset.py
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np
import shapely

sys.path.insert(0, str(Path(__file__).parents[1]))  # this checkout's package first

from outlinebench.geometry.bezier import to_cubic  # noqa: E402
from outlinebench.geometry.flatten import flatten_contours  # noqa: E402
from outlinebench.geometry.offset import (  # noqa: E402
    offset_contour,
    offset_region,
    verify_toolpaths,
)


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


def region_table(name: str, regions: list, d: float, eps: float) -> None:
    """Region offsets of ``regions`` (lists of (segments, closed)) against shapely buffers."""
    stages: dict[str, float] = {}
    t0 = time.perf_counter()
    results = [offset_region(r, d, fill_rule="evenodd", tolerance=eps) for r in regions]
    t_ours = time.perf_counter() - t0
    for res in results:
        for k, v in res.times.items():
            stages[k] = stages.get(k, 0.0) + v
    flats = []
    for r in regions:
        g = None
        for p in flatten_contours(r, eps / 2):
            g = shapely.Polygon(p) if g is None else g.symmetric_difference(shapely.Polygon(p))
        flats.append(g)
    t0 = time.perf_counter()
    for g in flats:
        g.buffer(d, quad_segs=32, join_style="round")
    t_ref = time.perf_counter() - t0
    worst = 0.0
    bad = 0
    for r, res in zip(regions, results, strict=True):
        orig = shapely.MultiLineString(
            [samples([to_cubic(np.asarray(x, dtype=float)) for x in s], 2000) for s, _ in r]
        )
        for c in res.contours:
            pts = np.vstack([c.polyline, samples(c.segments, 40)])
            dist = shapely.distance(shapely.points(pts), orig)
            worst = max(worst, float(np.max(np.abs(dist - abs(d)))))
        bad += bool(verify_toolpaths(res.region.contours, res.contours, d, tolerance=eps))
    parts = " ".join(f"{k}={1e3 * v / len(regions):.1f}" for k, v in stages.items())
    print(
        f"{name:>22} {d:6.1f} | {worst / eps:9.3f} {t_ours / t_ref:9.1f} {bad:8d} | "
        f"ms/outline: {parts}"
    )


def main_regions() -> None:
    from outlinebench.io import read_svg

    eps = 0.01
    root = Path(__file__).parents[1] / "samples"
    print()
    print(f"region offsets, eps = {eps}")
    print(f"{'set':>22} {'d':>6} | {'maxerr/eps':>9} {'t/shapely':>9} {'rejected':>8} | stages")
    shapes = [[(s, True)] for s in outlines(30)]
    for d in (-2.0, 3.0):
        region_table("random outlines", shapes, d, eps)
    for file, dmm in (("workshop-bracket.svg", -4.5), ("signshop-lettering.svg", 3.5)):
        doc = read_svg(root / file).document
        regions = [[(c.segments, c.closed) for c in o.contours] for o in doc.outlines]
        region_table(file, regions, dmm / doc.mm_per_unit, eps)


def wavy_ring(n: int) -> list[np.ndarray]:
    """A closed ring of n line segments, radius 40 with a 7-lobed ripple of 0.5."""
    th = np.linspace(0, 2 * np.pi, n + 1)
    r = 40 + 0.5 * np.sin(7 * th)
    p = np.stack([50 + r * np.cos(th), 50 + r * np.sin(th)], 1)
    return [np.array([p[i], p[i + 1]]) for i in range(n)]


def main_scaling(sizes=(1_000, 4_000, 16_000)) -> None:
    """Growth of the offset's time with the segments, against shapely's buffer of the ring.

    Prints per size the time of :func:`offset_contour` (d = 1, ε = 0.01), shapely's
    round-join buffer of the same ring (the reference, measured in the same run) and their
    ratio, and the growth exponent log(t2/t1)/log(n2/n1) between sizes (1: linear, 2:
    quadratic; the trim was quadratic before the STRtree distances and linear chaining).
    """
    print("\noffset of a wavy ring of n segments, d = 1, eps = 0.01")
    print(f"{'n':>7} | {'ours (s)':>9} {'shapely (s)':>11} {'ratio':>7} {'exponent':>8}")
    prev = None
    for n in sizes:
        segs = wavy_ring(n)
        t0 = time.perf_counter()
        offset_contour(segs, True, 1.0, 0.01)
        t_ours = time.perf_counter() - t0
        ring = shapely.Polygon(np.vstack([s[0] for s in segs]))
        t0 = time.perf_counter()
        ring.buffer(1.0, quad_segs=16)
        t_ref = time.perf_counter() - t0
        expo = f"{np.log(t_ours / prev[1]) / np.log(n / prev[0]):8.2f}" if prev else " " * 8
        print(f"{n:7d} | {t_ours:9.2f} {t_ref:11.4f} {t_ours / t_ref:7.0f} {expo}")
        prev = (n, t_ours)


if __name__ == "__main__":
    main()
    main_regions()
    main_scaling()
