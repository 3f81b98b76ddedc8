"""Speed-up of ``outlinebench check`` on many files: all cores against one worker, same run.

Two inputs are generated in a temporary folder:

- a folder of 200 single-glyph SVG files (invented parts: a gear-like outer contour with a
  hole, drawn with cubic segments, each file with its own size, lobe count and phase);
- six whole fonts built with fontTools' FontBuilder as in ``bench_fonts.py`` (three TrueType,
  three CFF; invented gear glyphs), smaller than that benchmark's so one run takes seconds.

Each input is checked by the real command line, ``python -m outlinebench check --json``, as a
subprocess, once with ``--jobs 1`` and once with ``--jobs N`` (N = the cores of the machine),
timed as wall-clock (best of ``RUNS``); the outputs must be identical. The CPU time of the
subprocesses per wall second says how many cores the parallel run actually got (on a shared
machine, fewer than it has). A one-file-per-call
loop over the first 20 SVG files is timed too, to show what start-up costs per call.

Goal (issue 12): speed-up ≥ 1.7× on 2 cores for both inputs.

Run: python benchmarks/bench_many_files.py   (a minute or two on 2 busy cores)
"""

from __future__ import annotations

import math
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
import bench_fonts  # noqa: E402  (the font builder of the font benchmark)

ROOT = Path(__file__).resolve().parents[1]
N_SVG = 200
RUNS = 2
CPU_USED: list[float] = []  # CPU seconds per wall second of each call: the cores it got
FONT_GLYPHS = {True: 300, False: 500}  # about 37 k segments per font


def _gear_path(cx: float, cy: float, r: float, lobes: int, phase: float) -> str:
    """Path data of a closed gear outline: one cubic per quarter lobe (Catmull-Rom handles)."""
    n = 4 * lobes
    a = phase + 2 * math.pi * np.arange(n) / n
    rr = r * (1.0 + 0.12 * np.cos(lobes * a))
    pts = np.stack([cx + rr * np.cos(a), cy + rr * np.sin(a)], axis=1)
    parts = [f"M{pts[0, 0]:.3f} {pts[0, 1]:.3f}"]
    for k in range(n):
        p0, p1 = pts[k - 1], pts[k]
        p2, p3 = pts[(k + 1) % n], pts[(k + 2) % n]
        c1 = p1 + (p2 - p0) / 6.0
        c2 = p2 - (p3 - p1) / 6.0
        parts.append(f"C{c1[0]:.3f} {c1[1]:.3f} {c2[0]:.3f} {c2[1]:.3f} {p2[0]:.3f} {p2[1]:.3f}")
    return " ".join(parts) + "Z"


def write_svgs(folder: Path) -> int:
    """The 200 single-part files; returns their total segment count."""
    rng = np.random.default_rng(200)
    folder.mkdir()
    segments = 0
    for k in range(N_SVG):
        lobes = int(rng.integers(8, 40))
        r = float(rng.uniform(30, 45))
        phase = float(rng.uniform(0, 1))
        outer = _gear_path(50, 50, r, lobes, phase)
        hole = _gear_path(50, 50, 0.4 * r, max(4, lobes // 2), phase)
        segments += 4 * lobes + 4 * max(4, lobes // 2)
        (folder / f"part{k:03d}.svg").write_text(
            '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="100mm" '
            'viewBox="0 0 100 100">\n'
            f'  <path id="part{k:03d}" fill-rule="evenodd" d="{outer} {hole}"/>\n</svg>\n'
        )
    return segments


def write_fonts(folder: Path) -> list[Path]:
    folder.mkdir()
    out = []
    saved = dict(bench_fonts.N_GLYPHS)
    try:
        bench_fonts.N_GLYPHS.update(FONT_GLYPHS)
        for k in range(6):
            quadratic = k % 2 == 0
            path = folder / f"parts{k}.{'ttf' if quadratic else 'otf'}"
            bench_fonts.build(path, quadratic)
            out.append(path)
    finally:
        bench_fonts.N_GLYPHS.update(saved)
    return out


def _children_cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def run_check(args: list[str]) -> tuple[float, bytes]:
    """Wall time and output of one ``check`` call (its CPU time goes to ``CPU_USED``)."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    c0 = _children_cpu()
    t0 = time.perf_counter()
    done = subprocess.run(
        [sys.executable, "-m", "outlinebench", "check", "--json", *args],
        capture_output=True,
        env=env,
        check=False,
    )
    wall = time.perf_counter() - t0
    CPU_USED.append((_children_cpu() - c0) / wall)
    if done.returncode not in (0, 1):
        raise SystemExit(f"check failed ({done.returncode}): {done.stderr.decode()[:500]}")
    return wall, done.stdout


def best(args: list[str]) -> tuple[float, bytes]:
    times, out = [], b""
    for _ in range(RUNS):
        t, out = run_check(args)
        times.append(t)
    return min(times), out


def main() -> None:
    cores = os.cpu_count() or 1
    print(f"{cores} cores; wall-clock seconds, best of {RUNS}")
    with tempfile.TemporaryDirectory() as tmp:
        svg_dir = Path(tmp) / "parts"
        n_seg = write_svgs(svg_dir)
        fonts = write_fonts(Path(tmp) / "fonts")
        inputs = [
            (f"{N_SVG} single-part SVG files ({n_seg:,} segments)", [str(svg_dir)]),
            ("six whole fonts (3 TrueType, 3 CFF)", [str(p) for p in fonts]),
        ]
        for label, args in inputs:
            t1, out1 = best(["--jobs", "1", *args])
            CPU_USED.clear()
            tn, outn = best(["--jobs", str(cores), *args])
            got = max(CPU_USED)
            same = "identical output" if out1 == outn else "OUTPUTS DIFFER"
            print(
                f"{label}: 1 worker {t1:6.2f} s, {cores} workers {tn:6.2f} s, "
                f"speed-up {t1 / tn:4.2f}× (goal ≥ 1.7× on 2 cores); {same}; "
                f"the {cores}-worker run used {got:.2f} cores on average (the rest was "
                "taken by other work on the machine)"
            )
        files = sorted(svg_dir.iterdir())[:20]
        t0 = time.perf_counter()
        for f in files:
            run_check([str(f)])
        per_call = (time.perf_counter() - t0) / len(files)
        t_one, _ = run_check(["--jobs", "1", *map(str, files)])
        print(
            f"20 files one call each: {per_call:.3f} s per call; in one call {t_one:.3f} s "
            f"({per_call * len(files) / t_one:.1f}× faster in one call)"
        )


if __name__ == "__main__":
    main()
