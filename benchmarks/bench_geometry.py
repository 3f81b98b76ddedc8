"""Speed and accuracy of the geometry core against bezier, svgpathtools and scipy, in one run.

Ours: outlinebench.geometry.arc_length, adaptive Gauss–Kronrod (G10/K21) refined across all
curves at once, cut at each curve's smallest speed and graded towards near-cusp dips.

Times, on the same machine and in the same run:
- arc length of 10,000 random cubics and of 1,000 near-cusp cubics;
- evaluation of 1,000 cubics at 1,000 parameters each;
- splitting 10,000 cubics at t = 0.37;
and prints throughput ratios (ours ÷ theirs, > 1 means ours is faster) and the largest
relative length errors against mpmath at 30 digits on a subset.

Targets (issue "Foundation … geometry core"): arc length ≤ 1e-12 relative error on random and
near-cusp cubics, batched throughput ≥ bezier's and ≥ 10× svgpathtools'; evaluation ≥ 1.5×
svgpathtools and ≥ 0.7× bezier.

Slow references run on a subset and are scaled to the full count; the table says so.
Run: python benchmarks/bench_geometry.py   (about a minute on 2 cores)
"""

from __future__ import annotations

import sys
import time
import warnings
from pathlib import Path

import bezier
import numpy as np
import svgpathtools
from scipy.integrate import quad

from outlinebench.geometry import arc_length, evaluate, split
from outlinebench.geometry.bezier import derivative
from outlinebench.geometry.quadrature import gauss_legendre

ROOT = Path(__file__).resolve().parents[1]
# The seeded curve sets and the 30-digit mpmath reference are shared with the tests.
sys.path.insert(0, str(ROOT / "tests" / "geometry"))
from geometry_cases import mp_length, near_cusp_cubics, random_cubics  # noqa: E402

N_RANDOM = 10_000
N_CUSP = 1_000
N_EVAL_CURVES = 1_000
N_EVAL_POINTS = 1_000
SVG_SUBSET = 500  # svgpathtools length is ~0.2 ms per curve: timed on a subset, scaled
QUAD_SUBSET = 300  # scipy.integrate.quad with a Python integrand: subset, scaled
MP_RANDOM = 60  # mpmath 30-digit references (about 20-100 ms each, by machine load)
MP_CUSP = 60


def best_of(fn, repeat=3):
    best = float("inf")
    out = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def timed(fn):
    t0 = time.perf_counter()
    out = fn()
    return time.perf_counter() - t0, out


def bezier_lengths(curves):
    return np.array(
        [bezier.Curve(np.asfortranarray(p.T), degree=3, copy=False).length for p in curves]
    )


def svg_lengths(curves):
    # svgpathtools' default: error=1e-12, min_depth=5 (recursive chord refinement).
    return np.array([svgpathtools.CubicBezier(*(complex(*q) for q in p)).length() for p in curves])


def quad_lengths(curves):
    out = []
    for p in curves:
        h = derivative(p)

        def speed(t, h=h):
            s = 1.0 - t
            d = s * s * h[0] + 2 * s * t * h[1] + t * t * h[2]
            return (d[0] * d[0] + d[1] * d[1]) ** 0.5

        with warnings.catch_warnings():
            # QUADPACK warns near cusps that 1e-12 is out of reach; its error column shows it.
            warnings.simplefilter("ignore")
            out.append(quad(speed, 0.0, 1.0, epsabs=0.0, epsrel=1e-12, limit=200)[0])
    return np.array(out)


def fixed_gl16_lengths(curves):
    x, w = gauss_legendre(16)
    d = evaluate(derivative(curves), x)
    return np.linalg.norm(d, axis=-1) @ w


def max_rel(got, want):
    return float(np.max(np.abs(got - want) / np.abs(want)))


def main() -> None:
    rows = []  # (task, method, seconds for the full count, note, ratio, err_random, err_cusp)
    rnd = random_cubics(N_RANDOM, seed=101)
    cusp = near_cusp_cubics(N_CUSP, seed=102)
    idx_r = np.arange(MP_RANDOM)
    idx_c = np.arange(MP_CUSP)
    t0 = time.perf_counter()
    ref_r = np.array([mp_length(p) for p in rnd[idx_r]])
    ref_c = np.array([mp_length(p) for p in cusp[idx_c]])
    t_mp = time.perf_counter() - t0

    # --- arc length -------------------------------------------------------------------------
    t_ours_r, ours_r = best_of(lambda: arc_length(rnd))
    t_ours_c, ours_c = best_of(lambda: arc_length(cusp))
    t_bz_r, bz_r = timed(lambda: bezier_lengths(rnd))
    t_bz_c, bz_c = timed(lambda: bezier_lengths(cusp))
    t_sv, sv_sub = timed(lambda: svg_lengths(rnd[:SVG_SUBSET]))
    t_sv_c, sv_c_sub = timed(lambda: svg_lengths(cusp[: min(SVG_SUBSET, N_CUSP)]))
    t_q, q_sub = timed(lambda: quad_lengths(rnd[:QUAD_SUBSET]))
    t_q_c, q_c_sub = timed(lambda: quad_lengths(cusp[:QUAD_SUBSET]))
    t_gl_r, gl_r = best_of(lambda: fixed_gl16_lengths(rnd))
    t_gl_c, gl_c = best_of(lambda: fixed_gl16_lengths(cusp))

    def errs(vals_r, vals_c):
        return max_rel(vals_r[idx_r], ref_r), max_rel(vals_c[idx_c], ref_c)

    svg_r_full = np.full(N_RANDOM, np.nan)
    svg_r_full[:SVG_SUBSET] = sv_sub
    svg_c_full = np.full(N_CUSP, np.nan)
    svg_c_full[: sv_c_sub.size] = sv_c_sub
    q_r_full = np.full(N_RANDOM, np.nan)
    q_r_full[:QUAD_SUBSET] = q_sub
    q_c_full = np.full(N_CUSP, np.nan)
    q_c_full[:QUAD_SUBSET] = q_c_sub
    scale_sv_r = N_RANDOM / SVG_SUBSET
    scale_sv_c = N_CUSP / sv_c_sub.size
    scale_q_r = N_RANDOM / QUAD_SUBSET
    scale_q_c = N_CUSP / QUAD_SUBSET
    ours_total = t_ours_r + t_ours_c

    def length_row(name, t_r, t_c, vals_r, vals_c, note=""):
        er, ec = errs(vals_r, vals_c)
        total = t_r + t_c
        rows.append(("arc length", name, total, note, total / ours_total, er, ec))

    length_row("outlinebench (batched adaptive GK21)", t_ours_r, t_ours_c, ours_r, ours_c)
    length_row("bezier Curve.length (QUADPACK)", t_bz_r, t_bz_c, bz_r, bz_c)
    length_row(
        "svgpathtools .length()",
        t_sv * scale_sv_r,
        t_sv_c * scale_sv_c,
        svg_r_full,
        svg_c_full,
        f"subset {SVG_SUBSET}+{sv_c_sub.size}, scaled",
    )
    length_row(
        "scipy quad loop (epsrel 1e-12)",
        t_q * scale_q_r,
        t_q_c * scale_q_c,
        q_r_full,
        q_c_full,
        f"subset {QUAD_SUBSET}+{QUAD_SUBSET}, scaled",
    )
    length_row("fixed 16-point GL (no adaptivity)", t_gl_r, t_gl_c, gl_r, gl_c)

    # --- evaluation -------------------------------------------------------------------------
    curves = rnd[:N_EVAL_CURVES]
    ts = np.linspace(0.0, 1.0, N_EVAL_POINTS)
    t_ev, ev = best_of(lambda: evaluate(curves, ts))
    t_ev_bz, ev_bz = timed(
        lambda: np.stack(
            [
                bezier.Curve(np.asfortranarray(p.T), degree=3, copy=False).evaluate_multi(ts).T
                for p in curves
            ]
        )
    )
    t_ev_sv, ev_sv = timed(
        lambda: np.stack(
            [svgpathtools.CubicBezier(*(complex(*q) for q in p)).points(ts) for p in curves]
        )
    )
    ev_sv = np.stack([ev_sv.real, ev_sv.imag], axis=-1)
    scale = np.abs(curves).max()
    rows.append(("evaluate 1000x1000", "outlinebench evaluate", t_ev, "", 1.0, 0.0, np.nan))
    rows.append(
        (
            "evaluate 1000x1000",
            "bezier evaluate_multi (loop)",
            t_ev_bz,
            "",
            t_ev_bz / t_ev,
            float(np.abs(ev - ev_bz).max() / scale),
            np.nan,
        )
    )
    rows.append(
        (
            "evaluate 1000x1000",
            "svgpathtools .points (loop)",
            t_ev_sv,
            "",
            t_ev_sv / t_ev,
            float(np.abs(ev - ev_sv).max() / scale),
            np.nan,
        )
    )

    # --- splitting --------------------------------------------------------------------------
    t_sp, (left, right) = best_of(lambda: split(rnd, 0.37))
    sub = 2000

    def bz_split(cs):
        out = []
        for p in cs:
            c = bezier.Curve(np.asfortranarray(p.T), degree=3, copy=False)
            out.append((c.specialize(0.0, 0.37).nodes.T, c.specialize(0.37, 1.0).nodes.T))
        return out

    def sv_split(cs):
        return [svgpathtools.CubicBezier(*(complex(*q) for q in p)).split(0.37) for p in cs]

    t_sp_bz, bz_parts = timed(lambda: bz_split(rnd[:sub]))
    t_sp_sv, sv_parts = timed(lambda: sv_split(rnd[:sub]))
    err_bz = max(
        float(np.abs(left[i] - bz_parts[i][0]).max() + np.abs(right[i] - bz_parts[i][1]).max())
        for i in range(sub)
    )
    rows.append(("split 10000 at 0.37", "outlinebench split", t_sp, "", 1.0, 0.0, np.nan))
    rows.append(
        (
            "split 10000 at 0.37",
            "bezier specialize x2 (loop)",
            t_sp_bz * N_RANDOM / sub,
            f"subset {sub}, scaled",
            t_sp_bz * N_RANDOM / sub / t_sp,
            err_bz,
            np.nan,
        )
    )
    rows.append(
        (
            "split 10000 at 0.37",
            "svgpathtools .split (loop)",
            t_sp_sv * N_RANDOM / sub,
            f"subset {sub}, scaled",
            t_sp_sv * N_RANDOM / sub / t_sp,
            float(
                max(
                    np.abs(left[i] - [[z.real, z.imag] for z in sv_parts[i][0].bpoints()]).max()
                    for i in range(sub)
                )
            ),
            np.nan,
        )
    )

    # --- table ------------------------------------------------------------------------------
    print(
        f"OutlineBench geometry benchmark: {N_RANDOM} random + {N_CUSP} near-cusp cubics; "
        f"errors vs mpmath 30 digits on {MP_RANDOM} random + {MP_CUSP} near-cusp "
        f"(references took {t_mp:.1f} s)"
    )
    print("speed-up = their time / our time on the same work (> 1: ours is faster)")
    head = f"{'task':<20} {'method':<36} {'time s':>9} {'speed-up':>9} "
    head += f"{'err random':>11} {'err cusp':>10}  note"
    print(head)
    print("-" * len(head))
    for task, name, secs, note, ratio, er, ec in rows:
        e1 = "-" if np.isnan(er) else f"{er:.1e}"
        e2 = "-" if np.isnan(ec) else f"{ec:.1e}"
        print(f"{task:<20} {name:<36} {secs:>9.4f} {ratio:>9.2f} {e1:>11} {e2:>10}  {note}")
    print()
    print("errors: arc length = max relative error vs mpmath; evaluate/split = max abs difference")
    print("from ours relative to the coordinates' size.")
    bz_total = t_bz_r + t_bz_c
    sv_total = t_sv * scale_sv_r + t_sv_c * scale_sv_c
    er_o, ec_o = errs(ours_r, ours_c)
    checks = [
        ("arc length error <= 1e-12 (random)", er_o <= 1e-12),
        ("arc length error <= 1e-12 (near-cusp)", ec_o <= 1e-12),
        (f"arc length throughput >= bezier ({bz_total / ours_total:.2f}x)", bz_total >= ours_total),
        (
            f"arc length >= 10x svgpathtools ({sv_total / ours_total:.1f}x)",
            sv_total >= 10 * ours_total,
        ),
        (f"evaluation >= 1.5x svgpathtools ({t_ev_sv / t_ev:.1f}x)", t_ev_sv >= 1.5 * t_ev),
        (f"evaluation >= 0.7x bezier ({t_ev_bz / t_ev:.1f}x)", t_ev_bz >= 0.7 * t_ev),
    ]
    for text, ok in checks:
        print(f"target {'met   ' if ok else 'MISSED'}  {text}")


if __name__ == "__main__":
    main()
