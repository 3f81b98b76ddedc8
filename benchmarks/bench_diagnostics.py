"""Speed of the checks on a 100,000-segment document: full check, and the incremental update
after moving one point, with a full recheck in the same run for the ratio.

Targets (issue "Continuity diagnostics"): full check ≤ 1 s, update after a move ≤ 2 ms on a
2-core machine. Run: python benchmarks/bench_diagnostics.py
"""

from __future__ import annotations

import math
import time
from pathlib import Path

import numpy as np

from outlinebench.diagnostics import Checker, check_document
from outlinebench.io import read_svg
from outlinebench.model.document import Contour, Document, Outline, frozen_points

ROOT = Path(__file__).resolve().parents[1]
TARGET_SEGMENTS = 100_000


def lettering_document(target: int = TARGET_SEGMENTS) -> Document:
    """The sample sign lettering (samples/signshop-lettering.svg), repeated on a grid at
    slightly different sizes until it has about ``target`` segments; one outline per letter copy."""
    base = read_svg(ROOT / "samples" / "signshop-lettering.svg").document
    per_copy = base.segment_count()
    copies = math.ceil(target / per_copy)
    cols = int(math.ceil(math.sqrt(copies)))
    outlines = []
    for k in range(copies):
        dx, dy = (k % cols) * 340.0, (k // cols) * 90.0
        scale = 1.0 + (k % 7) * 0.01  # vary the geometry a little between copies
        for o in base.outlines:
            contours = []
            for c in o.contours:
                segs = [frozen_points(s * scale + (dx, dy)) for s in c.segments]
                contours.append(Contour(tuple(segs), c.closed, c.joins))
            outlines.append(Outline(tuple(contours), o.element_id, len(outlines)))
    return Document(tuple(outlines), mm_per_unit=base.mm_per_unit, units="mm")


def move_one_point(doc: Document, outline: int, contour: int, segment: int) -> Document:
    """Move the end point of one segment and the start of the next by (0.3, -0.2)."""
    c = doc.contour(outline, contour)
    segs = list(c.segments)
    a = segs[segment].copy()
    a[-1] += (0.3, -0.2)
    b = segs[(segment + 1) % len(segs)].copy()
    b[0] += (0.3, -0.2)
    segs[segment] = frozen_points(a)
    segs[(segment + 1) % len(segs)] = frozen_points(b)
    return doc.replace_contour(outline, contour, c.with_segments(segs, c.joins))


def best_of(fn, repeat: int) -> tuple[float, float]:
    """Best wall-clock time and best CPU time of this process over ``repeat`` runs (the CPU
    time shows the cost when other jobs share the cores)."""
    best, best_cpu = math.inf, math.inf
    for _ in range(repeat):
        t0, c0 = time.perf_counter(), time.process_time()
        fn()
        best = min(best, time.perf_counter() - t0)
        best_cpu = min(best_cpu, time.process_time() - c0)
    return best, best_cpu


def main() -> None:
    doc = lettering_document()
    n = doc.segment_count()
    contours = sum(1 for _ in doc.contour_refs())
    print(f"document: {n} segments, {len(doc.outlines)} outlines, {contours} contours")

    full, full_cpu = best_of(lambda: check_document(doc), 3)
    found = len(check_document(doc))
    print(
        f"full check: {full * 1e3:.1f} ms wall, {full_cpu * 1e3:.1f} ms CPU "
        f"({found} findings; target <= 1000 ms)"
    )

    checker = Checker()
    checker.update(doc)
    mid = len(doc.outlines) // 2
    moved = [move_one_point(doc, mid + k, 0, 2) for k in range(20)]
    results = {}
    for hint in (True, False):
        times, cpu = [], []
        for k, m in enumerate(moved):
            # each edit is one point moved in the document the checker saw last, as in an
            # editor; with the hint the caller names the outline it replaced
            touched = [mid + k] if hint else None
            t0, c0 = time.perf_counter(), time.process_time()
            checker.update(m, touched)
            times.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
            checker.update(doc, touched)  # back (undo), not timed
        results[hint] = float(np.median(times)), float(np.median(cpu))
    update = results[True][0]
    for hint, how in ((True, "naming the outline"), (False, "found by identity scan")):
        print(
            f"update after moving a point ({how}): {results[hint][0] * 1e3:.3f} ms wall "
            f"(median of 20), {results[hint][1] * 1e3:.3f} ms CPU; target <= 2 ms"
        )
    print(
        f"  recomputed: {checker.last_segments_computed} segments, "
        f"{checker.last_joins_computed} joins"
    )
    recheck, recheck_cpu = best_of(lambda: check_document(moved[0]), 3)
    print(
        f"full recheck of the moved document: {recheck * 1e3:.1f} ms wall, "
        f"{recheck_cpu * 1e3:.1f} ms CPU"
    )
    print(f"ratio update / full recheck = {update / recheck:.5f}")
    inc = sorted(map(repr, checker.update(moved[0])))
    same = inc == sorted(map(repr, check_document(moved[0])))
    print(f"incremental result equals full check: {same}")


if __name__ == "__main__":
    main()
