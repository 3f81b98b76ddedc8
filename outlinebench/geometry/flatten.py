"""Flattening: turning Bézier contours into polylines within a guaranteed deviation.

The deviation of a polyline from a curve is their Hausdorff distance (largest distance from
any point of either to the other). Every on-curve point (segment end) is kept as a vertex, so
segments are flattened independently and all segments of all contours are handled in one
vectorised batch.

Two flatteners are provided:

* :func:`flatten_contours` / :func:`flatten_contour` — few chords: chord parameters placed by
  equalising ∫ sqrt(|κ|) ds, then every chord's deviation *verified* and the failing chords
  split. The verification is the guarantee.
* :func:`flatten_contours_bounded` — the same polylines with each one's proven deviation
  bound (the largest bound that admitted one of its chords).
* :func:`flatten_uniform_wang` — uniform parameter steps whose count comes from Wang's
  formula; guaranteed by that formula, many more chords; the speed reference.

Measuring a given polyline against its curve (:func:`polyline_deviation`, :class:`Deviation`)
lives in :mod:`outlinebench.geometry.deviation`; the names are re-exported here.

References
----------
- Wang Guo-Zhao (1984), the subdivision bound for Bézier curves, as given by D. Filip,
  R. Magedson and R. Markot, "Surface algorithms using bounds on derivatives", *Computer Aided
  Geometric Design* 3 (1986) 295–311.
- R. Levien, "Flattening quadratic Béziers" (2019): chord count from the integral of
  sqrt(curvature); here the same density is applied to cubics directly, without the
  parabola approximation, and made safe by verification.
- The sagitta of a circular arc: h = κ Δs² / 8 for short arcs (any surveying handbook), which
  gives the asymptotic minimum chord count N* = ∫ sqrt(|κ(s)| / (8ε)) ds.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import as_control_points, power_coefficients, split_many, to_cubic

__all__ = [
    "DEFAULT_FLATTEN_TOLERANCE",
    "MAX_CHORDS",
    "flatten_contour",
    "flatten_contours",
    "flatten_contours_bounded",
    "flatten_uniform_wang",
    "chord_bound",
    "optimal_chord_count",
]

FloatArray = NDArray[np.float64]

# Default allowed deviation (Hausdorff distance between curve and polyline), in the
# document's user units. 0.01 unit is 0.01 mm in a millimetre drawing: finer than typical
# router, laser and vinyl cutter repeatability.
DEFAULT_FLATTEN_TOLERANCE = 0.01

# Number of parameter intervals per segment on which the chord density ∫ sqrt(|κ|) ds is
# integrated (trapezoid rule). Only the placement of chords depends on it, never the
# guarantee; 32 keeps placement within a few per cent of the optimum on the benchmark sets.
_DENSITY_GRID = 32

# Relative floating-point margin in the acceptance test: a chord passes when its computed
# deviation bound is ≤ ε − _ROUNDING_MARGIN · (coordinate size), covering rounding in the
# evaluation of the bound (a few ulps of the coordinates).
_ROUNDING_MARGIN = 64 * np.finfo(np.float64).eps

# Upper limit on verification rounds. Each round either proves a chord or splits it; a chord
# split by the Wang count is proved without another round, so 8 rounds are never reached in
# practice; the loop then falls back to the Wang split for anything left.
_MAX_ROUNDS = 8

# Rounds of re-placement with measured chord deviations before the final verification. Only
# the chord count depends on them.
_REPLACEMENT_ROUNDS = 3

# Weight of uniform-in-t steps against the old density's shape inside a measured chord.
_SHAPE_BLEND = 0.5

# Most chords one flattening call may make (all contours together). A tolerance so small
# that the chords would pass this is refused before any chord is placed, with an error that
# names the tolerance, the estimated count and the smallest tolerance that fits. Measured:
# a radius-10 circle at ε = 1e-10 gives 869,793 chords in 2.6 s and 330 MB above the start
# (about 380 bytes and 3 µs per chord), so the cap keeps one call under about 400 MB and a
# few seconds; a cut file of a million chords is already some 30 MB of text.
MAX_CHORDS = 1_000_000


# --------------------------------------------------------------------------------------------
# input handling
# --------------------------------------------------------------------------------------------
def _as_cubic_batch(segments: Sequence[ArrayLike]) -> FloatArray:
    """Validate segments of any degree and elevate them exactly to one (M, 4, 2) batch."""
    if len(segments) == 0:
        return np.zeros((0, 4, 2))
    out = np.empty((len(segments), 4, 2))
    for i, s in enumerate(segments):
        arr = s if isinstance(s, np.ndarray) and s.dtype == np.float64 else None
        if arr is None or arr.ndim != 2 or arr.shape[-1] != 2 or not np.all(np.isfinite(arr)):
            arr = as_control_points(s)
        elif arr.shape[0] not in (2, 3, 4):
            arr = as_control_points(s)  # raises with the standard message
        out[i] = arr if arr.shape[0] == 4 else to_cubic(arr)
    return out


def _eval_power(coef: FloatArray, t: FloatArray) -> FloatArray:
    """Horner evaluation of per-row coefficients (C, 4, 2) at per-row parameters (C,)."""
    tt = t[:, None]
    return ((coef[:, 3] * tt + coef[:, 2]) * tt + coef[:, 1]) * tt + coef[:, 0]


def _vertices(cubics: FloatArray, coef: FloatArray, seg: np.ndarray, t: FloatArray) -> FloatArray:
    """Curve points at (seg, t), with t = 0 and t = 1 giving the control points exactly."""
    pts = _eval_power(coef[seg], t)
    at0 = t == 0.0
    at1 = t == 1.0
    pts[at0] = cubics[seg[at0], 0]
    pts[at1] = cubics[seg[at1], 3]
    return pts


# --------------------------------------------------------------------------------------------
# the verification: an upper bound of each chord's deviation
# --------------------------------------------------------------------------------------------
def _quadratic_roots(a: FloatArray, b: FloatArray, c: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Real roots of a s² + b s + c clipped to [0, 1]; 0 stands in where there is none.

    Uses the cancellation-free form q = −(b + sign(b) sqrt(b² − 4ac)) / 2, roots q/a and c/q
    (Press et al., *Numerical Recipes*, 3rd ed., §5.6).
    """
    with np.errstate(all="ignore"):
        disc = b * b - 4.0 * a * c
        sq = np.sqrt(np.where(disc > 0.0, disc, 0.0))
        q = -0.5 * (b + np.where(b >= 0.0, sq, -sq))
        r1 = q / a
        r2 = c / q
    bad = disc < 0.0
    r1 = np.where(bad | ~np.isfinite(r1), 0.0, np.clip(r1, 0.0, 1.0))
    r2 = np.where(bad | ~np.isfinite(r2), 0.0, np.clip(r2, 0.0, 1.0))
    return r1, r2


def _cubic_range(k0, k1, k2, k3) -> tuple[FloatArray, FloatArray]:
    """Exact minimum and maximum over s ∈ [0, 1] of k0 + k1 s + k2 s² + k3 s³ (per row)."""
    r1, r2 = _quadratic_roots(3.0 * k3, 2.0 * k2, k1)
    vals = [k0, k0 + k1 + k2 + k3]
    for r in (r1, r2):
        vals.append(((k3 * r + k2) * r + k1) * r + k0)
    v = np.stack(vals)
    return v.min(axis=0), v.max(axis=0)


def _chord_bounds(
    coef: FloatArray, seg: np.ndarray, ta: FloatArray, tb: FloatArray, a: FloatArray, b: FloatArray
) -> FloatArray:
    """Upper bound D of the deviation of each curve piece [ta, tb] from its chord a–b.

    Notes
    -----
    The piece is re-expanded around ta in a local parameter s ∈ [0, 1] (Taylor coefficients
    c̃_k). With u the unit chord direction, the signed distance from the chord line
    h(s) = (B(s) − a) × u and the position along it a(s) = (B(s) − a) · u are cubics in s;
    their extremes are at the roots of their (quadratic) derivatives, found in closed form.
    With L the chord length and o = max(0, −min a, max a − L) the overshoot beyond the chord's
    ends, every point of the piece lies within D = sqrt(o² + max|h|²) of the chord segment.
    The chord lies within max|h| of the piece as well (the projection of the piece onto the
    chord covers it, since the piece runs from one end to the other), so D bounds the
    Hausdorff distance; it is exact when the piece does not overshoot the chord's ends.
    """
    c = coef[seg]
    dt = (tb - ta)[:, None]
    t0 = ta[:, None]
    c3 = c[:, 3]
    c2 = c[:, 2]
    c1 = c[:, 1]
    # derivatives at ta: B' = c1 + 2 c2 t + 3 c3 t², B''/2 = c2 + 3 c3 t
    d1 = c1 + (2.0 * c2 + 3.0 * c3 * t0) * t0
    d2 = c2 + 3.0 * c3 * t0
    k1 = d1 * dt
    k2 = d2 * dt * dt
    k3 = c3 * dt * dt * dt
    chord = b - a
    length = np.hypot(chord[:, 0], chord[:, 1])
    ok = length > 0.0
    safe = np.where(ok, length, 1.0)
    ux = np.where(ok, chord[:, 0] / safe, 1.0)
    uy = np.where(ok, chord[:, 1] / safe, 0.0)
    # the piece starts at B(ta), which is `a` up to rounding (a is the exact vertex)
    k0 = _eval_power(c, ta) - a

    def cross(v):
        return v[:, 0] * uy - v[:, 1] * ux

    def dot(v):
        return v[:, 0] * ux + v[:, 1] * uy

    hmin, hmax = _cubic_range(cross(k0), cross(k1), cross(k2), cross(k3))
    amin, amax = _cubic_range(dot(k0), dot(k1), dot(k2), dot(k3))
    h = np.maximum(np.abs(hmin), np.abs(hmax))
    over = np.maximum(0.0, np.maximum(-amin, amax - length))
    # the piece ends at B(tb), which is `b` up to rounding: count that difference too
    end_err = np.hypot(*(_eval_power(c, tb) - b).T)
    return np.hypot(over, h) + end_err


def chord_bound(points: ArrayLike, t0: float = 0.0, t1: float = 1.0) -> float:
    """Guaranteed upper bound of the deviation of one segment piece from its chord.

    Parameters
    ----------
    points : array_like, shape (K, 2)
        A line, quadratic or cubic segment.
    t0, t1 : float
        The piece [t0, t1] of the segment; the chord joins B(t0) and B(t1).

    Returns
    -------
    float
        D ≥ Hausdorff distance between the piece and the chord (exact when the piece does not
        overshoot the chord's ends). See Notes of the module's verification.

    Examples
    --------
    >>> chord_bound([[0, 0], [1, 0]])
    0.0
    """
    cub = _as_cubic_batch([points])
    coef = power_coefficients(cub)
    seg = np.zeros(1, dtype=np.intp)
    ta = np.array([float(t0)])
    tb = np.array([float(t1)])
    a = _vertices(cub, coef, seg, ta)
    b = _vertices(cub, coef, seg, tb)
    return float(_chord_bounds(coef, seg, ta, tb, a, b)[0])


# --------------------------------------------------------------------------------------------
# chord density
# --------------------------------------------------------------------------------------------
def _density(cubics: FloatArray, grid: int = _DENSITY_GRID) -> tuple[FloatArray, FloatArray]:
    """Cumulative ∫₀ᵗ sqrt(|κ|)|B′| dt on a uniform grid: parameters (G+1,), values (M, G+1).

    The integrand sqrt(|κ|)|B′| = sqrt(|B′ × B″| / |B′|) is bounded by sqrt(|B″|), also at
    cusps, so the trapezoid rule on a fixed grid is stable.
    """
    tg = np.linspace(0.0, 1.0, grid + 1)
    s = 1.0 - tg
    d = cubics[:, 1:] - cubics[:, :-1]  # (M, 3, 2)
    w1 = np.stack([s * s, 2.0 * s * tg, tg * tg], axis=1)  # (G+1, 3)
    d1 = 3.0 * np.einsum("gk,mkj->mgj", w1, d)
    dd = d[:, 1:] - d[:, :-1]  # (M, 2, 2)
    w2 = np.stack([s, tg], axis=1)
    d2 = 6.0 * np.einsum("gk,mkj->mgj", w2, dd)
    cr = np.abs(d1[..., 0] * d2[..., 1] - d1[..., 1] * d2[..., 0])
    sp = np.hypot(d1[..., 0], d1[..., 1])
    f = np.sqrt(np.divide(cr, sp, out=np.zeros_like(cr), where=sp > 0.0))
    cum = np.zeros_like(f)
    np.cumsum(0.5 * (f[:, 1:] + f[:, :-1]) / grid, axis=1, out=cum[:, 1:])
    return tg, cum


def optimal_chord_count(points: ArrayLike, tolerance: float) -> float:
    """Asymptotic minimum chord count N* = ∫ sqrt(|κ(s)| / (8ε)) ds of one segment.

    Parameters
    ----------
    points : array_like, shape (K, 2)
    tolerance : float
        ε, the allowed deviation.

    Returns
    -------
    float
        N*, integrated with the trapezoid rule on 1024 parameter intervals.

    Notes
    -----
    A chord of length Δs on a curve of curvature κ deviates by its sagitta κΔs²/8; setting
    that to ε and summing Δs over the curve gives N* (Levien 2019).
    """
    _check_tolerance(tolerance)
    _, cum = _density(_as_cubic_batch([points]), grid=1024)
    return float(cum[0, -1] / np.sqrt(8.0 * tolerance))


def _inverse_density(
    tg: FloatArray, cum: FloatArray, seg: np.ndarray, target: FloatArray
) -> FloatArray:
    """Parameters t with cum[seg](t) = target (piecewise-linear inverse), vectorised."""
    m, g1 = cum.shape
    total = cum[:, -1:]
    norm = np.divide(cum, total, out=np.zeros_like(cum), where=total > 0.0)
    key = (norm + 2.0 * np.arange(m)[:, None]).ravel()
    tnorm = np.divide(target, total[seg, 0], out=np.zeros_like(target), where=total[seg, 0] > 0)
    j = np.searchsorted(key, tnorm + 2.0 * seg, side="right") - 1
    j = np.clip(j, seg * g1, seg * g1 + g1 - 2)
    lo = key[j] - 2.0 * seg
    hi = key[j + 1] - 2.0 * seg
    span = hi - lo
    frac = np.divide(tnorm - lo, span, out=np.full_like(span, 0.5), where=span > 0.0)
    jj = j - seg * g1
    return tg[jj] + np.clip(frac, 0.0, 1.0) * (tg[jj + 1] - tg[jj])


def _forward_density(tg: FloatArray, cum: FloatArray, seg: np.ndarray, t: FloatArray):
    """cum[seg](t) by linear interpolation on the grid."""
    g = cum.shape[1] - 1
    x = np.clip(t, 0.0, 1.0) * g
    j = np.minimum(x.astype(np.intp), g - 1)
    frac = x - j
    return cum[seg, j] + frac * (cum[seg, j + 1] - cum[seg, j])


def _corrected_density(
    tg: FloatArray,
    cum: FloatArray,
    seg: np.ndarray,
    ta: FloatArray,
    tb: FloatArray,
    share: FloatArray,
) -> FloatArray:
    """A new cumulative density on the grid in which chord i carries ``share[i]``.

    Within each chord the old density's shape is kept; chord i is stretched so that its
    increment becomes share[i]. Chords are sorted by (seg, ta) and cover each segment.
    """
    m, g1 = cum.shape
    f_a = _forward_density(tg, cum, seg, ta)
    f_b = _forward_density(tg, cum, seg, tb)
    first = np.r_[True, seg[1:] != seg[:-1]]
    csum = np.cumsum(share)
    base = np.where(first, 0.0, np.r_[0.0, csum[:-1]])
    # exclusive cumulative share within each segment
    seg_start = np.maximum.accumulate(np.where(first, np.arange(len(seg)), 0))
    g_start = np.r_[0.0, csum][np.arange(len(seg))] - np.r_[0.0, csum][seg_start]
    del base
    key = ta + 2.0 * seg
    rows = np.repeat(np.arange(m), g1)
    tt = np.tile(tg, m)
    idx = np.searchsorted(key, tt + 2.0 * rows, side="right") - 1
    span_f = f_b[idx] - f_a[idx]
    span_t = tb[idx] - ta[idx]
    lin = np.divide(tt - ta[idx], span_t, out=np.zeros_like(tt), where=span_t > 0.0)
    ratio = np.divide(cum.ravel() - f_a[idx], span_f, out=lin.copy(), where=span_f > 0.0)
    # blend with uniform steps in t: where the old density missed a feature (a cusp's tip
    # has almost none), the measured share must still be spread over the whole chord
    ratio = _SHAPE_BLEND * lin + (1.0 - _SHAPE_BLEND) * ratio
    new = g_start[idx] + share[idx] * np.clip(ratio, 0.0, 1.0)
    new = new.reshape(m, g1)
    new[:, 0] = 0.0
    total = np.bincount(seg, weights=share, minlength=m)
    new[:, -1] = total
    return np.maximum.accumulate(new, axis=1)


def _check_tolerance(tolerance: float) -> None:
    if not (np.isfinite(tolerance) and tolerance > 0.0):
        raise InvalidGeometryError(f"the flattening tolerance must be > 0, got {tolerance!r}")


def _check_chord_count(estimate: float, tolerance: float, how: str) -> None:
    """Refuse a flattening whose chord count would pass :data:`MAX_CHORDS`.

    The count falls as 1/sqrt(ε) (both N* and Wang's count do), so ε·(estimate /
    MAX_CHORDS)² would just reach the cap; the suggested tolerance is twice that, leaving
    room (a factor √2 in chords) for the splits of the verification, which add up to about
    30 % on a circle.
    """
    if not estimate <= MAX_CHORDS:
        fits = 2.0 * tolerance * (estimate / MAX_CHORDS) ** 2 if np.isfinite(estimate) else np.inf
        raise InvalidGeometryError(
            f"flattening with tolerance {tolerance:g} needs about {estimate:,.0f} chords "
            f"({how}), over the cap of {MAX_CHORDS:,} chords per flattening; use a tolerance "
            f"of at least {fits:.3g}"
        )


# --------------------------------------------------------------------------------------------
# the flatteners
# --------------------------------------------------------------------------------------------
def _flatten_params(
    cubics: FloatArray, tolerance: float, exp: int = 0
) -> tuple[np.ndarray, FloatArray, FloatArray]:
    """Chord start parameters of every segment: (seg, t, bound) sorted by segment then t.

    Each segment's chords run from its t values to the next one's (or to 1). ``bound`` is each
    chord's proven deviation bound (≤ the tolerance): the verified :func:`_chord_bounds`
    value, or Wang's bound Δt² max|B″| / 8 for chords placed by Wang's count.
    """
    m = len(cubics)
    if m == 0:
        return np.zeros(0, dtype=np.intp), np.zeros(0), np.zeros(0)
    coef = power_coefficients(cubics)
    scale = float(np.max(np.abs(cubics))) if m else 0.0
    accept = tolerance - _ROUNDING_MARGIN * max(scale, 1.0)
    if accept <= 0.0:
        raise InvalidGeometryError(
            f"tolerance {float(np.ldexp(tolerance, exp))!r} is below the floating-point "
            f"resolution of coordinates of size {float(np.ldexp(scale, exp)):g}"
        )
    with np.errstate(over="ignore", invalid="ignore", under="ignore"):
        tg, cum = _density(cubics)
    cum = cum / np.sqrt(8.0 * tolerance)  # now in chords: cum[:, -1] is N* per segment
    if not np.all(np.isfinite(cum[:, -1])):
        raise InvalidGeometryError(
            f"coordinates of size {float(np.ldexp(scale, exp)):g} are too large to flatten "
            "(their curvature integral overflows binary64)"
        )
    shown = float(np.ldexp(tolerance, exp))  # the caller's tolerance, for messages
    _check_chord_count(float(np.sum(np.ceil(cum[:, -1]))), shown, "the sagitta estimate")
    done_seg: list[np.ndarray] = []
    done_t: list[FloatArray] = []
    done_b: list[FloatArray] = []

    # Placement rounds over the segments still open. A segment whose chords all pass is
    # final. A segment with a failing chord is placed again with one chord more (or with
    # the count its measured deviations ask for), equalising a density corrected by the
    # measured deviations: the sagitta formula is only asymptotic, and a chord with
    # deviation D uses sqrt(D/ε) of a chord's allowance (deviation ∝ length²).
    active = np.arange(m)
    n = np.maximum(1, np.ceil(cum[:, -1])).astype(np.intp)
    # a passing placement kept while one chord fewer is tried (segments "going down")
    has_fb = np.zeros(m, dtype=bool)
    fb_seg = np.zeros(0, dtype=np.intp)
    fb_t = np.zeros(0)
    fb_b = np.zeros(0)
    for rnd in range(_REPLACEMENT_ROUNDS + 1):
        total = cum[:, -1]
        loc = np.repeat(np.arange(len(active)), n)
        k = np.arange(len(loc)) - np.repeat(np.cumsum(n) - n, n)
        nn = n[loc]
        ta = _inverse_density(tg, cum, loc, k / nn * total[loc])
        ta[k == 0] = 0.0
        tb = np.empty_like(ta)
        tb[:-1] = ta[1:]
        tb[k == nn - 1] = 1.0
        seg = active[loc]
        if rnd == _REPLACEMENT_ROUNDS:
            break
        a = _vertices(cubics, coef, seg, ta)
        b = _vertices(cubics, coef, seg, tb)
        dev = _chord_bounds(coef, seg, ta, tb, a, b)
        failing = np.bincount(loc, weights=dev > accept, minlength=len(active)) > 0
        new_cum = _corrected_density(tg, cum, loc, ta, tb, np.sqrt(dev / accept))
        want = np.maximum(1, np.ceil(new_cum[:, -1])).astype(np.intp)
        fallback = failing & has_fb[active]
        down = ~failing & (want < n) & (rnd + 1 < _REPLACEMENT_ROUNDS)
        final = ~failing & ~down
        # failed attempts with one chord fewer: take back the kept placement
        back = np.isin(fb_seg, active[fallback])
        done_seg.append(fb_seg[back])
        done_t.append(fb_t[back])
        done_b.append(fb_b[back])
        keep = np.isin(fb_seg, active[down | fallback], invert=True)
        fb_seg, fb_t, fb_b = fb_seg[keep], fb_t[keep], fb_b[keep]
        fin = final[loc]
        done_seg.append(seg[fin])
        done_t.append(ta[fin])
        done_b.append(dev[fin])
        dn = down[loc]
        fb_seg = np.concatenate([fb_seg, seg[dn]])
        fb_t = np.concatenate([fb_t, ta[dn]])
        fb_b = np.concatenate([fb_b, dev[dn]])
        has_fb[active[down]] = True
        has_fb[active[final | fallback]] = False
        again = down | (failing & ~fallback)
        if not np.any(again):
            seg = seg[:0]
            ta = ta[:0]
            tb = tb[:0]
            break
        n = np.where(down, want, np.maximum(n + 1, want))[again]
        cum = new_cum[again]
        active = active[again]
    # the remaining chords keep the density of their segment for splitting
    dens = np.zeros((m, len(tg)))
    dens[active] = cum
    cum = dens

    # second derivative is linear in t for a cubic: max|B''| on [ta, tb] is at an end
    dd = 6.0 * (cubics[:, 2] - 2.0 * cubics[:, 1] + cubics[:, 0])
    dd1 = 6.0 * (cubics[:, 3] - 2.0 * cubics[:, 2] + cubics[:, 1])
    for rnd in range(_MAX_ROUNDS + 1):
        a = _vertices(cubics, coef, seg, ta)
        b = _vertices(cubics, coef, seg, tb)
        dev = _chord_bounds(coef, seg, ta, tb, a, b)
        good = dev <= accept
        done_seg.append(seg[good])
        done_t.append(ta[good])
        done_b.append(dev[good])
        bad = ~good
        if not np.any(bad):
            break
        seg, ta, tb, dev = seg[bad], ta[bad], tb[bad], dev[bad]
        # Wang's bound on the piece: |B − chord| ≤ Δt² max|B''| / 8, B'' linear in t
        s = seg
        b2a = np.hypot(*(dd[s] + (dd1[s] - dd[s]) * ta[:, None]).T)
        b2b = np.hypot(*(dd[s] + (dd1[s] - dd[s]) * tb[:, None]).T)
        bmax = np.maximum(b2a, b2b)
        n_wang = np.maximum(2.0, np.ceil((tb - ta) * np.sqrt(bmax / (8.0 * accept))))
        # deviation shrinks with the square of the chord length
        n_dev = np.maximum(2.0, np.ceil(np.sqrt(dev / accept)))
        use_wang = (n_wang <= n_dev) | (rnd == _MAX_ROUNDS)
        cnt_f = np.where(use_wang, n_wang, n_dev)
        placed = sum(len(x) for x in done_seg)
        _check_chord_count(float(placed + cnt_f.sum()), shown, "after verification")
        cnt = cnt_f.astype(np.intp)
        rs = np.repeat(np.arange(len(s)), cnt)
        kk = np.arange(len(rs)) - np.repeat(np.cumsum(cnt) - cnt, cnt)
        frac = kk / cnt[rs]
        sub_seg = s[rs]
        lo, hi = ta[rs], tb[rs]
        t_uniform = lo + frac * (hi - lo)
        f_lo = _forward_density(tg, cum, sub_seg, lo)
        f_hi = _forward_density(tg, cum, sub_seg, hi)
        t_dens = _inverse_density(tg, cum, sub_seg, f_lo + frac * (f_hi - f_lo))
        # within a failing chord the density is a poorer guide: blend with uniform steps
        t_dens = np.clip(0.5 * (t_dens + t_uniform), lo, hi)
        t_new = np.where(use_wang[rs], t_uniform, t_dens)
        t_new[kk == 0] = lo[kk == 0]
        t_end = np.empty_like(t_new)
        t_end[:-1] = t_new[1:]
        lastk = kk == cnt[rs] - 1
        t_end[lastk] = hi[lastk]
        proved = use_wang[rs]
        # pieces split by the Wang count are within tolerance by Wang's bound
        done_seg.append(sub_seg[proved])
        done_t.append(t_new[proved])
        # Wang's bound of each sub-piece: (Δt)² max|B''| / 8 with the parent piece's max
        step = (hi - lo) / cnt[rs]
        done_b.append((step * step * bmax[rs] / 8.0)[proved])
        seg, ta, tb = sub_seg[~proved], t_new[~proved], t_end[~proved]
        if len(seg) == 0:
            break
    all_seg = np.concatenate(done_seg)
    all_t = np.concatenate(done_t)
    all_b = np.concatenate(done_b)
    order = np.lexsort((all_t, all_seg))
    return all_seg[order], all_t[order], all_b[order]


def _assemble(
    cubics: FloatArray,
    seg: np.ndarray,
    t: FloatArray,
    seg_counts: Sequence[int],
    closed: Sequence[bool],
    exp: int = 0,
    exact: FloatArray | None = None,
) -> list[FloatArray]:
    """Polylines per contour from chord start parameters (closed: first vertex not repeated).

    With ``exp``, ``cubics`` were scaled by 2^-exp (see :func:`_unit_scale`): vertices are
    scaled back and the end points taken from ``exact``, the pieces at their own scale.
    """
    coef = power_coefficients(cubics) if len(cubics) else np.zeros((0, 4, 2))
    pts = _vertices(cubics, coef, seg, t) if len(seg) else np.zeros((0, 2))
    if exp:
        pts = np.ldexp(pts, exp)
        cubics = exact if exact is not None else np.ldexp(cubics, exp)
        at0 = t == 0.0
        pts[at0] = cubics[seg[at0], 0]
    per_seg = np.bincount(seg, minlength=len(cubics)) if len(seg) else np.zeros(0, np.intp)
    seg_end = np.cumsum(per_seg)
    out = []
    s0 = 0
    for count, is_closed in zip(seg_counts, closed, strict=True):
        if count == 0:
            out.append(np.zeros((0, 2)))
            continue
        s1 = s0 + count
        c0 = seg_end[s0 - 1] if s0 > 0 else 0
        c1 = seg_end[s1 - 1]
        poly = pts[c0:c1]
        if not is_closed:
            poly = np.vstack([poly, cubics[s1 - 1, 3]])
        out.append(poly)
        s0 = s1
    return out


def _split_at_sharp_turns(cubics: FloatArray, tolerance: float) -> tuple[FloatArray, np.ndarray]:
    """Split segments where they turn on a radius below the tolerance (near-cusps).

    There the chord density ∫ sqrt(|κ|) ds is almost nil while the tangent turns by up to
    180°, so no chord may span the turn: a vertex belongs at its tip. Tips are the interior
    local minima of the speed |B′| (found on a grid, refined by Newton's method on
    B′ · B″ = 0) where the radius of curvature 1/|κ| is below ε. Splitting is exact (de
    Casteljau), so the pieces are the same curve.

    Returns
    -------
    pieces : ndarray, shape (M', 4, 2)
    parent : ndarray of int, shape (M',)
        Index of the segment each piece comes from, in order.
    """
    m = len(cubics)
    if m == 0:
        return cubics, np.zeros(0, dtype=np.intp)
    coef = power_coefficients(cubics)
    grid = 32
    tg = np.linspace(0.0, 1.0, grid + 1)
    d1 = coef[:, None, 1] + tg[None, :, None] * (
        2.0 * coef[:, None, 2] + 3.0 * tg[None, :, None] * coef[:, None, 3]
    )
    sp = d1[..., 0] ** 2 + d1[..., 1] ** 2
    inner = (sp[:, 1:-1] <= sp[:, :-2]) & (sp[:, 1:-1] <= sp[:, 2:])
    rows, cols = np.nonzero(inner)
    if len(rows) == 0:
        return cubics, np.arange(m)
    cols = cols + 1
    t = tg[cols]
    lo = tg[cols - 1]
    hi = tg[cols + 1]
    c = coef[rows]
    for _ in range(12):
        b1 = c[:, 1] + t[:, None] * (2.0 * c[:, 2] + 3.0 * t[:, None] * c[:, 3])
        b2 = 2.0 * c[:, 2] + 6.0 * t[:, None] * c[:, 3]
        g = np.sum(b1 * b2, axis=1)
        gp = np.sum(b2 * b2, axis=1) + np.sum(b1 * 6.0 * c[:, 3], axis=1)
        step = np.divide(g, gp, out=np.zeros_like(g), where=gp > 0.0)
        t = np.clip(t - step, lo, hi)
    b1 = c[:, 1] + t[:, None] * (2.0 * c[:, 2] + 3.0 * t[:, None] * c[:, 3])
    b2 = 2.0 * c[:, 2] + 6.0 * t[:, None] * c[:, 3]
    cr = np.abs(b1[:, 0] * b2[:, 1] - b1[:, 1] * b2[:, 0])
    speed = np.hypot(b1[:, 0], b1[:, 1])
    # radius |B'|³ / |B' × B''| < ε, written without division (a true cusp has speed 0)
    sharp = (speed**3 < tolerance * cr) & (t > 0.0) & (t < 1.0)
    if not np.any(sharp):
        return cubics, np.arange(m)
    rows, t = rows[sharp], t[sharp]
    pieces: list[FloatArray] = []
    parent: list[int] = []
    prev = 0
    for r in np.unique(rows):
        pieces.extend(cubics[prev:r])
        parent.extend(range(prev, r))
        parts = split_many(cubics[r], t[rows == r])
        pieces.extend(parts)
        parent.extend([r] * len(parts))
        prev = r + 1
    pieces.extend(cubics[prev:])
    parent.extend(range(prev, m))
    return np.array(pieces), np.array(parent, dtype=np.intp)


def _contours_input(contours) -> tuple[FloatArray, list[int], list[bool]]:
    segs: list = []
    counts: list[int] = []
    closed: list[bool] = []
    for c in contours:
        if hasattr(c, "segments"):
            s, cl = c.segments, bool(c.closed)
        else:
            s, cl = c
        segs.extend(s)
        counts.append(len(s))
        closed.append(bool(cl))
    return _as_cubic_batch(segs), counts, closed


def flatten_contours(
    contours: Sequence, tolerance: float = DEFAULT_FLATTEN_TOLERANCE
) -> list[FloatArray]:
    """Flatten many contours at once into polylines within a guaranteed deviation.

    Parameters
    ----------
    contours : sequence
        Each item is an object with ``segments`` and ``closed`` (a model ``Contour``) or a
        pair ``(segments, closed)``; segments are ``(K, 2)`` control-point arrays, K = 2, 3, 4.
    tolerance : float
        ε > 0, the largest allowed deviation (Hausdorff distance) between each segment and its
        chords, in the coordinates' units.

    Returns
    -------
    list of ndarray, each shape (P, 2)
        One polyline per contour. Every segment end is a vertex, bit-identical to the control
        point. An open contour's polyline ends at its last point; a closed contour's polyline
        does not repeat its first vertex (the closing chord is implied).

    Raises
    ------
    InvalidGeometryError
        Bad control points, a tolerance that is not > 0 or is below the floating-point
        resolution of the coordinates, or one so small that the chords would pass
        :data:`MAX_CHORDS` (1,000,000 per call; the message names the tolerance, the
        estimated count and the smallest tolerance that fits).

    Notes
    -----
    Placement. N* = ∫ sqrt(|κ(s)| / (8ε)) ds is the asymptotic minimum number of chords
    (sagitta κΔs²/8 = ε; R. Levien, "Flattening quadratic Béziers", 2019). First, segments
    are split exactly at near-cusp tips (interior minima of |B′| with radius of curvature
    below ε), where the density is almost nil but the tangent turns sharply, so a vertex
    belongs there. Each piece then gets n = ceil(N*) chords whose ends split
    ∫ sqrt(|κ|) ds into equal parts; the integral is taken with the trapezoid rule on a
    32-interval grid in t, where the integrand sqrt(|B′ × B″| / |B′|) stays bounded even at
    cusps. Then up to three rounds re-place each piece from the measured deviations D of its
    chords (a chord uses sqrt(D/ε) of a chord's allowance): a piece whose chords all pass
    tries one chord fewer (kept only if that passes too); a piece with a failing chord is
    placed again with one chord more. Only the count depends on this; measured on seeded
    random, near-cusp and inflected cubics it is 1.04–1.08 × ΣN* (benchmarks/bench_flatten.py).

    Guarantee. Every chord is then verified: an upper bound D of its Hausdorff distance to the
    curve piece is computed exactly (see :func:`chord_bound`: extremes of two cubic
    polynomials found in closed form). Chords with D > ε are split, either into
    ceil(sqrt(D/ε)) parts (deviation falls with the square of the length) and checked again,
    or — when that is no fewer — uniformly into the count given by Wang's bound on the piece,
    Δt² max|B″| / 8 ≤ ε (Wang 1984; Filip, Magedson & Markot 1986), which needs no further
    check. So every output chord is within ε of its piece, either by the verified bound or by
    Wang's bound, and the whole polyline is within ε of the contour. The acceptance test
    subtracts a few ulps of the coordinate size to cover rounding in the bound.

    Examples
    --------
    >>> line = np.array([[0.0, 0.0], [3.0, 4.0]])
    >>> flatten_contours([([line], False)], 0.1)[0].tolist()
    [[0.0, 0.0], [3.0, 4.0]]
    >>> flatten_contours([([], False)], 0.1)[0].shape
    (0, 2)
    """
    return flatten_contours_bounded(contours, tolerance)[0]


def flatten_contours_bounded(
    contours: Sequence, tolerance: float = DEFAULT_FLATTEN_TOLERANCE
) -> tuple[list[FloatArray], FloatArray]:
    """Flatten like :func:`flatten_contours` and return each polyline's proven deviation.

    Parameters
    ----------
    contours : sequence
        As for :func:`flatten_contours`.
    tolerance : float
        ε > 0.

    Returns
    -------
    polylines : list of ndarray, each shape (P, 2)
        Exactly the result of :func:`flatten_contours`.
    bounds : ndarray, shape (C,)
        Per contour, the largest chord deviation bound: an upper bound of the Hausdorff
        distance between the contour and its polyline, ≤ ε (0 for an empty contour).

    Notes
    -----
    Each chord's bound is the one that admitted it (see :func:`flatten_contours`): the exact
    closed-form bound of :func:`chord_bound` (extremes of two cubics; exact when the piece
    does not overshoot the chord's ends), or Wang's bound Δt² max|B″| / 8 for chords placed
    by Wang's count. The Hausdorff distance of a union is at most the largest Hausdorff
    distance of its parts, so the contour's bound is the largest of its chords'.
    """
    _check_tolerance(tolerance)
    cubics, counts, closed = _contours_input(contours)
    exp = _unit_scale(cubics)
    tol = float(tolerance)
    work = cubics
    if exp:
        # Coordinates near the ends of binary64 (beyond 2^±400): flatten the same curves
        # scaled by a power of two, which is exact, so no power-basis coefficient or squared
        # speed overflows or underflows; the tolerance scales with them.
        work = np.ldexp(cubics, -exp)
        with np.errstate(over="ignore", under="ignore"):
            # a tolerance beyond 2^100 times the scaled curve (at most 1 across) changes
            # nothing: one chord per segment either way
            tol = min(float(np.ldexp(tol, -exp)), 2.0**100)
        if not tol > 0.0:
            raise InvalidGeometryError(
                f"tolerance {tolerance!r} is below the floating-point resolution of "
                f"coordinates of size {float(np.max(np.abs(cubics))):g}"
            )
    with np.errstate(over="ignore", invalid="ignore", under="ignore"):
        pieces, parent = _split_at_sharp_turns(work, tol)
    if len(pieces) != len(cubics):
        per_parent = np.bincount(parent, minlength=len(cubics))
        edges = np.cumsum([0, *counts])
        counts = [int(per_parent[a:b].sum()) for a, b in zip(edges[:-1], edges[1:], strict=True)]
    seg, t, bound = _flatten_params(pieces, tol, exp)
    per_piece = np.zeros(len(pieces))
    if len(seg):
        np.maximum.at(per_piece, seg, bound)
    edges = np.cumsum([0, *counts])
    per_contour = np.array(
        [per_piece[a:b].max() if b > a else 0.0 for a, b in zip(edges[:-1], edges[1:], strict=True)]
    )
    if not exp:
        return _assemble(pieces, seg, t, counts, closed), per_contour
    exact = np.ldexp(pieces, exp)
    first = np.ones(len(parent), dtype=bool)
    first[1:] = parent[1:] != parent[:-1]
    last = np.ones(len(parent), dtype=bool)
    last[:-1] = parent[1:] != parent[:-1]
    exact[first, 0] = cubics[parent[first], 0]  # segment ends bit for bit, as promised
    exact[last, 3] = cubics[parent[last], 3]
    polys = _assemble(pieces, seg, t, counts, closed, exp, exact)
    return polys, np.ldexp(per_contour, exp)


# Coordinates beyond 2^±_EXTREME_EXP are flattened at a power-of-two scale (exact): with
# |coordinates| ≤ 2^400 ≈ 2.6e120, cubes of speeds and squared second derivatives stay far
# from overflow, and above 2^-400 from underflow.
_EXTREME_EXP = 400


def _unit_scale(cubics: FloatArray) -> int:
    """0, or the exponent e with max |coordinate| in [2^(e−1), 2^e) when that lies outside
    2^±_EXTREME_EXP."""
    if not len(cubics):
        return 0
    big = float(np.max(np.abs(cubics)))
    if big == 0.0:
        return 0
    e = int(np.frexp(big)[1])
    return e if abs(e) > _EXTREME_EXP else 0


def flatten_contour(
    segments: Sequence[ArrayLike],
    closed: bool = False,
    tolerance: float = DEFAULT_FLATTEN_TOLERANCE,
) -> FloatArray:
    """Flatten one contour; see :func:`flatten_contours` for the method and guarantee.

    Parameters
    ----------
    segments : sequence of array_like, each (K, 2)
    closed : bool
    tolerance : float
        ε > 0, the largest allowed deviation.

    Returns
    -------
    ndarray, shape (P, 2)
    """
    return flatten_contours([(list(segments), closed)], tolerance)[0]


def flatten_uniform_wang(
    contours: Sequence, tolerance: float = DEFAULT_FLATTEN_TOLERANCE
) -> list[FloatArray]:
    """Flatten with uniform parameter steps counted by Wang's formula (the speed reference).

    Parameters
    ----------
    contours : sequence
        As for :func:`flatten_contours`.
    tolerance : float
        ε > 0.

    Returns
    -------
    list of ndarray, each shape (P, 2)
        As for :func:`flatten_contours`.

    Notes
    -----
    Wang's formula: a degree-d segment split into n = ceil(sqrt(d(d − 1) · max_i
    |P_{i+2} − 2P_{i+1} + P_i| / (8ε))) equal parameter steps deviates from its chords by at
    most ε (Wang Guo-Zhao 1984, as cited by Filip, Magedson & Markot 1986). Applied here to
    the exact cubic form of every segment (d = 3; elevation keeps the bound valid).
    """
    _check_tolerance(tolerance)
    cubics, counts, closed = _contours_input(contours)
    if len(cubics) == 0:
        return [np.zeros((0, 2)) for _ in counts]
    sd = cubics[:, 2:] - 2.0 * cubics[:, 1:-1] + cubics[:, :-2]
    lmax = np.max(np.hypot(sd[..., 0], sd[..., 1]), axis=1)
    nf = np.maximum(1.0, np.ceil(np.sqrt(6.0 * lmax / (8.0 * tolerance))))
    _check_chord_count(float(nf.sum()), tolerance, "Wang's count")
    n = nf.astype(np.intp)
    seg = np.repeat(np.arange(len(cubics)), n)
    k = np.arange(len(seg)) - np.repeat(np.cumsum(n) - n, n)
    t = k / n[seg]
    return _assemble(cubics, seg, t, counts, closed)
