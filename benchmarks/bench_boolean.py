"""Boolean benchmark: time and failures of our curve booleans against skia-pathops and shapely.

One seeded run over three sets (coordinates in a 100-unit box):

- ``random``: pairs of star-shaped loops of lines, quadratics and cubics, some crossing
  themselves (wobble 6 and 25), all four operations under nonzero and even-odd;
- ``lettering``: overlapping strokes of invented block letters (rounded bars and bowls
  laid across each other), union and overlap removal;
- ``near-degenerate``: shared sides, duplicates, tangent circles, corner touches, shifts by
  10⁻⁹ … 10⁻⁵, crossings exactly at on-curve points.

A result fails when it is invalid (its flattening is not a valid shapely geometry) or when
its symmetric difference with the reference exceeds perimeter × ε (ε = 10⁻³): the reference
is shapely's polygonize of the flattened operands, faces classified by angle-sum winding
numbers (independent of all three engines). skia-pathops runs on the same control points;
shapely on polygons flattened within ε (the same tolerance), with ``make_valid`` where a
self-crossing ring is invalid (the even-odd reading). Prints time per operation and the
ratios, and the failures of each engine.

Run: python benchmarks/bench_boolean.py
"""

from __future__ import annotations

import math
import sys
import time
from pathlib import Path

import numpy as np
import pathops
import shapely

sys.path.insert(0, str(Path(__file__).parents[1] / "tests" / "geometry"))
sys.path.insert(0, str(Path(__file__).parents[1]))  # this checkout's package first
from boolean_cases import (  # noqa: E402
    circle,
    perimeter,
    random_outline,
    rect,
    reference_region,
    result_polygon,
    skia_path,
)

from outlinebench.geometry.boolean import boolean_op, remove_overlaps  # noqa: E402
from outlinebench.geometry.flatten import flatten_contours  # noqa: E402

EPS = 1e-3
SKIA = {
    "union": pathops.PathOp.UNION,
    "intersection": pathops.PathOp.INTERSECTION,
    "difference": pathops.PathOp.DIFFERENCE,
    "xor": pathops.PathOp.XOR,
}
SHAPELY = {
    "union": shapely.union,
    "intersection": shapely.intersection,
    "difference": shapely.difference,
    "xor": shapely.symmetric_difference,
}


def stroke(x0, y0, x1, y1, w):
    """A bar from (x0, y0) to (x1, y1) of width w with half-round ends (lines + cubic arcs)."""
    ang = math.atan2(y1 - y0, x1 - x0)
    n = np.array([-math.sin(ang), math.cos(ang)]) * w / 2
    a, b = np.array([x0, y0]), np.array([x1, y1])
    k = 4 / 3 * math.tan(math.pi / 8)
    t = np.array([math.cos(ang), math.sin(ang)]) * w / 2
    segs = [np.array([a - n, b - n])]
    segs.append(np.array([b - n, b - n + k * t, b + t - k * n, b + t]))
    segs.append(np.array([b + t, b + t + k * n, b + n + k * t, b + n]))
    segs.append(np.array([b + n, a + n]))
    segs.append(np.array([a + n, a + n - k * t, a - t + k * n, a - t]))
    segs.append(np.array([a - t, a - t - k * n, a - n - k * t, a - n]))
    return (segs, True)


def lettering_cases(rng):
    cases = []
    for _ in range(12):
        x = rng.uniform(10, 60)
        w = rng.uniform(4, 9)
        strokes = [
            stroke(x, 10, x, 80, w),
            stroke(x, 80, x + 25, 80 - rng.uniform(0, 10), w),
            stroke(x, 45, x + rng.uniform(15, 30), 45 + rng.uniform(-8, 8), w),
            (circle(rng.uniform(10, 15), x + 18, 62)[0], True),
        ]
        cases.append(("self", [strokes], "nonzero"))
        cases.append(("union", [strokes[:2], strokes[2:]], "nonzero"))
    return cases


def degenerate_cases():
    out = []
    for shift in (0.0, 1e-9, 1e-7, 1e-5):
        out.append(("union", [[rect(0, 0, 2, 2)], [rect(2 + shift, 0, 4, 2)]], "nonzero"))
        out.append(("intersection", [[rect(0, 0, 2, 2)], [rect(1, 2 - shift, 3, 4)]], "nonzero"))
        out.append(("union", [[circle(1.0)], [circle(1.0, 2.0 + shift, 0.0)]], "nonzero"))
        out.append(("difference", [[circle(2.0)], [circle(1.0, 1.0 - shift, 0.0)]], "nonzero"))
        out.append(("union", [[rect(0, 0, 1, 1)], [rect(1 + shift, 1, 2, 2)]], "nonzero"))
        out.append(("xor", [[circle(3.0)], [circle(3.0, shift, 0.0)]], "nonzero"))
    diamond = (
        [
            np.array([[2.0, 0.0], [3.0, 1.0]]),
            np.array([[3.0, 1.0], [2.0, 2.0]]),
            np.array([[2.0, 2.0], [1.0, 1.0]]),
            np.array([[1.0, 1.0], [2.0, 0.0]]),
        ],
        True,
    )
    for op in SKIA:
        out.append((op, [[rect(0, 0, 2, 2)], [diamond]], "nonzero"))
        out.append((op, [[circle(3.0)], [circle(3.0)]], "evenodd"))
    out.append(("self", [[circle(3.0), circle(3.0)]], "nonzero"))
    out.append(("self", [[circle(3.0), circle(3.0)]], "evenodd"))
    return out


def random_cases(rng):
    out = []
    for wobble in (6.0, 25.0):
        for _ in range(10):
            a = random_outline(rng, wobble=wobble)
            b = random_outline(rng, cx=rng.uniform(30, 70), cy=rng.uniform(30, 70), wobble=wobble)
            for rule in ("nonzero", "evenodd"):
                for op in SKIA:
                    out.append((op, [[a], [b]], rule))
    return out


def shapely_region(contours, rule):
    g = None
    for p in flatten_contours(contours, EPS):
        if len(p) < 3:
            continue
        poly = shapely.Polygon(p)
        if not poly.is_valid:
            poly = shapely.make_valid(poly)
        g = (
            poly
            if g is None
            else (g.symmetric_difference(poly) if rule == "evenodd" else g.union(poly))
        )
    return g if g is not None else shapely.Polygon()


def ok(poly, ref, per):
    return poly.is_valid and poly.symmetric_difference(ref).area <= per * EPS


def run(name, cases):
    t_ours = t_skia = t_shp = 0.0
    f_ours = f_skia = f_shp = 0
    for op, operands, rule in cases:
        ref = reference_region(operands, op, rule, EPS)
        per = perimeter([c for ops in operands for c in ops], EPS)
        t0 = time.perf_counter()
        try:
            res = (
                remove_overlaps(operands[0], fill_rule=rule)
                if op == "self"
                else boolean_op(operands[0], operands[1], op, fill_rule=rule)
            )
            good = ok(result_polygon(res, EPS), ref, per)
        except Exception:  # a crash counts as a failure
            good = False
        t_ours += time.perf_counter() - t0
        f_ours += not good
        paths = [skia_path(ops, rule) for ops in operands]
        t0 = time.perf_counter()
        try:
            sk = (
                pathops.simplify(paths[0])
                if op == "self"
                else pathops.op(paths[0], paths[1], SKIA[op])
            )
            t_skia += time.perf_counter() - t0
            f_skia += abs(abs(sk.area) - ref.area) > per * EPS
        except Exception:
            t_skia += time.perf_counter() - t0
            f_skia += 1
        polys = [shapely_region(ops, rule) for ops in operands]
        t0 = time.perf_counter()
        try:
            g = polys[0] if op == "self" else SHAPELY[op](polys[0], polys[1])
            t_shp += time.perf_counter() - t0
            f_shp += not ok(g, ref, per)
        except Exception:
            t_shp += time.perf_counter() - t0
            f_shp += 1
    n = len(cases)
    print(
        f"{name:>16} {n:5d} | {1e3 * t_ours / n:8.2f} {1e3 * t_skia / n:8.3f} "
        f"{1e3 * t_shp / n:8.3f} | {t_ours / t_skia:9.1f} {t_ours / t_shp:9.1f} | "
        f"{f_ours:5d} {f_skia:5d} {f_shp:5d}"
    )


def main() -> None:
    rng = np.random.default_rng(2026)
    print(f"eps = {EPS}; failures: invalid, or symmetric difference > perimeter x eps")
    print(
        f"{'set':>16} {'ops':>5} | {'ours ms':>8} {'skia ms':>8} {'shp ms':>8} | "
        f"{'ours/skia':>9} {'ours/shp':>9} | {'fail':>5} {'skia':>5} {'shp':>5}"
    )
    run("random", random_cases(rng))
    run("lettering", lettering_cases(rng))
    run("near-degenerate", degenerate_cases())
    print("skia failures are area mismatches with the reference (its result's area);")
    print("shapely's time excludes flattening, ours and skia's include everything.")


if __name__ == "__main__":
    main()
