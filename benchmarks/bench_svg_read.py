"""Speed of reading a 200,000-segment SVG path: ours against svgelements and svgpathtools.

Times, on the same machine and in the same run, as CPU time of this process (best of five
alternating runs for ours and svgpathtools, one run of svgelements):
- the path data alone: ``read_path_data(d)`` vs ``svgpathtools.parse_path(d)`` vs
  ``svgelements.Path(d)``;
- the whole file: ``read_svg(file)`` vs ``svgpathtools.svg2paths(file)`` vs
  ``svgelements.SVG.parse(file)``;
for a separated form (as most exporters write: one command letter per segment, mixed
absolute and relative L, C, Q, H, V) and a compact form (relative, implicit repeats, numbers
run together like "1.5-2.25", as size-minded exporters write), and prints ratios
(theirs ÷ ours, > 1 means ours is faster).

Target (issue "Document model … SVG import/export"): at least 3× faster than the faster of
the two references.

Run: python benchmarks/bench_svg_read.py   (a few minutes on 2 busy cores)
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

import numpy as np
import svgelements
import svgpathtools

from outlinebench.io import read_svg
from outlinebench.io.svg_path import read_path_data

N_SEGMENTS = 200_000
PAIRS = 5  # alternating runs of ours and svgpathtools (best of each kept)


def separated_path(n: int, rng: np.random.Generator) -> str:
    v = np.round(rng.uniform(0, 500, size=(n, 6)), 3)
    r = np.round(rng.uniform(-20, 20, size=(n, 6)), 3)
    parts = ["M250 250"]
    for i in range(n):
        k = i % 5
        if k == 0:
            parts.append(f"L{v[i, 0]} {v[i, 1]}")
        elif k == 1:
            parts.append("C{} {} {} {} {} {}".format(*v[i]))
        elif k == 2:
            parts.append("q{},{} {},{}".format(*r[i, :4]))
        elif k == 3:
            parts.append(f"h{r[i, 0]}")
        else:
            parts.append("c{} {} {} {} {} {}".format(*r[i]))
    return " ".join(parts)


def compact_path(n: int, rng: np.random.Generator) -> str:
    r = np.round(rng.uniform(-20, 20, size=(n, 6)), 3)
    # Every number carries its sign, so numbers run together without separators.
    body = "".join(f"{x:+g}" for x in r.ravel())
    return "M250 250c" + body.removeprefix("+")


def cpu_time(fn) -> float:
    """CPU seconds this process spent in fn (other processes on a shared machine do not
    count, unlike wall-clock time; everything timed here is single-threaded)."""
    t0 = time.process_time()
    fn()
    return time.process_time() - t0


def run(label: str, d: str, folder: Path) -> list[float]:
    file = folder / f"{label}.svg"
    file.write_text(
        '<svg xmlns="http://www.w3.org/2000/svg" width="500mm" height="500mm" '
        f'viewBox="0 0 500 500"><path id="long" d="{d}"/></svg>'
    )
    ours = read_path_data(d).contours
    count = sum(len(c.segments) for c in ours)
    spt_count = len(svgpathtools.parse_path(d))
    assert count == spt_count == N_SEGMENTS, (count, spt_count)
    cases = {
        "path data": (
            lambda: read_path_data(d),
            lambda: svgpathtools.parse_path(d),
            lambda: svgelements.Path(d),
        ),
        "whole file": (
            lambda: read_svg(file),
            lambda: svgpathtools.svg2paths(str(file)),
            lambda: list(svgelements.SVG.parse(str(file)).elements()),
        ),
    }
    ratios = []
    print(f"\n{label}: {N_SEGMENTS:,} segments, d = {len(d) / 1e6:.1f} MB")
    print(
        f"  {'':11s}{'ours':>9s}{'svgpathtools':>14s}{'svgelements':>13s}"
        f"{'spt/ours':>10s}{'se/ours':>9s}{'faster ref/ours':>17s}"
    )
    for name, (ours_fn, spt_fn, se_fn) in cases.items():
        t_ours = t_spt = float("inf")
        for _ in range(PAIRS):  # alternate ours / svgpathtools, keep each one's best
            t_ours = min(t_ours, cpu_time(ours_fn))
            t_spt = min(t_spt, cpu_time(spt_fn))
        t_se = cpu_time(se_fn)  # the slowest by far: timed once
        ratio = min(t_spt, t_se) / t_ours
        ratios.append(ratio)
        print(
            f"  {name:11s}{t_ours:8.3f}s{t_spt:13.3f}s{t_se:12.3f}s"
            f"{t_spt / t_ours:10.2f}{t_se / t_ours:9.2f}{ratio:17.2f}"
        )
    return ratios


def main() -> None:
    rng = np.random.default_rng(2026)
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        ratios = run("separated", separated_path(N_SEGMENTS, rng), folder)
        ratios += run("compact", compact_path(N_SEGMENTS, rng), folder)
    worst = min(ratios)
    verdict = "met" if worst >= 3.0 else "NOT met"
    print(f"\ntarget ≥ 3× the faster reference: {verdict} (worst ratio {worst:.2f})")


if __name__ == "__main__":
    main()
