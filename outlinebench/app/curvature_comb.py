"""The curvature comb: normals of length proportional to κ along every visible segment.

For each segment, parameters t are sampled (more of them the longer the segment is on
screen), and at each sample the comb draws a tooth from the curve point B(t) to the tip

    tip = B(t) + scale · κ(t) · N(t),

where κ is the signed curvature and N the unit normal turned +90° from the direction of
travel (:func:`outlinebench.geometry.curvature`), so the tooth stands on the side towards
which the curve bends, and its length is scale·|κ|. A line through the tips of each segment
shows how curvature varies along it; where two segments meet, the two end teeth coincide
when the join is curvature-continuous (G2) and differ when it is not, so a curvature jump
is a visible step in the comb. All sampling is vectorised over every segment of a contour
(one batch per sample count) and cached per contour object and zoom level; a drag resamples
only the contour it changes.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from PySide6.QtCore import QRectF
from PySide6.QtGui import QPainter, QPen

from outlinebench.app import style
from outlinebench.app.array_paths import lines_path
from outlinebench.app.view_transform import ViewTransform
from outlinebench.geometry.bezier import evaluate, to_cubic
from outlinebench.geometry.curvature import curvature, end_curvatures, unit_normal
from outlinebench.model.document import Contour, Document

__all__ = [
    "TOOTH_SPACING_PX",
    "MIN_TEETH",
    "MAX_TEETH",
    "MAX_TOOTH_PX",
    "MAX_COMB_SEGMENTS",
    "AUTO_TOOTH_FRACTION",
    "CombSamples",
    "sample_comb",
    "teeth_per_segment",
    "as_cubics",
    "comb_tips",
    "DIRECT_MIN_SPEED",
    "auto_comb_scale",
    "CombCache",
    "paint_comb",
]

# Wanted distance between neighbouring teeth on screen, logical px (one tooth every few
# pixels reads as a continuous comb without merging into a solid area). Common practice,
# no source.
TOOTH_SPACING_PX = 8.0
# Samples per segment: at least both ends and the middle, at most 65 (powers of two plus one,
# so the samples of a coarser level are a subset of the finer one's).
MIN_TEETH = 3
MAX_TEETH = 65
# Longest tooth drawn, logical px: at a cusp or a retracted handle κ is unbounded (±inf) and
# the tooth is cut to this length instead of leaving the screen.
MAX_TOOTH_PX = 60.0
# Above this many segments in view the comb is left out (like point marks, see
# style.MAX_MARKED_POINTS) so painting stays within a frame; zooming in brings it back.
MAX_COMB_SEGMENTS = 4000
# The automatic comb scale makes the teeth at the document's sharper bends (90th percentile
# of |κ| over segment ends) this fraction of a typical contour's size (median diagonal of the
# contours' boxes). Our choice, no source: long enough to see a 5 % jump, short enough not
# to cover neighbouring letters.
AUTO_TOOTH_FRACTION = 0.1

FloatArray = NDArray[np.float64]

# Segment samples kept beyond twice those in use before the cache is cleaned (a drag adds a
# few new segment arrays per mouse move).
SEGMENT_SLACK = 1000


@dataclass(frozen=True, slots=True)
class CombSamples:
    """Samples of one contour (or any list of segments).

    Attributes
    ----------
    points, normals : ndarray, shape (N, 2)
        B(t) and the unit normal N(t) at every sample, in document units.
    kappa : ndarray, shape (N,)
        Signed curvature at every sample (1/document unit; ±inf at a cusp).
    segment : ndarray of int, shape (N,)
        Index of the segment each sample belongs to; samples of one segment are contiguous
        and in increasing t.
    t : ndarray, shape (N,)
        Parameter of each sample on its segment.
    """

    points: FloatArray
    normals: FloatArray
    kappa: FloatArray
    segment: NDArray[np.intp]
    t: FloatArray


def as_cubics(segments: Sequence[FloatArray] | FloatArray) -> FloatArray:
    """The segments as one ``(M, 4, 2)`` batch of cubics, elevated exactly in batches of equal
    degree (:func:`outlinebench.geometry.bezier.to_cubic`)."""
    if isinstance(segments, np.ndarray) and segments.ndim == 3:
        return to_cubic(segments)
    out = np.empty((len(segments), 4, 2))
    sizes = np.array([s.shape[0] for s in segments], dtype=np.intp)
    for k in np.unique(sizes).tolist():
        rows = np.flatnonzero(sizes == k)
        out[rows] = to_cubic(np.stack([segments[r] for r in rows.tolist()]).astype(float))
    return out


def teeth_per_segment(
    segments: Sequence[FloatArray] | FloatArray, px_per_unit: float
) -> NDArray[np.intp]:
    """Samples per segment for a zoom of ``px_per_unit``: one every :data:`TOOTH_SPACING_PX`
    along the cubic control polygon (an upper bound of the arc length, Farin §5.5), rounded
    up to 2^k + 1 and kept within [:data:`MIN_TEETH`, :data:`MAX_TEETH`]."""
    cubic = as_cubics(segments)
    if cubic.shape[0] == 0:
        return np.zeros(0, dtype=np.intp)
    d = np.diff(cubic, axis=1)
    lengths = np.hypot(d[..., 0], d[..., 1]).sum(axis=1)
    want = np.maximum(lengths * px_per_unit / TOOTH_SPACING_PX, 1.0)
    k = np.ceil(np.log2(want))
    n = (2.0 ** np.clip(k, 1, math.log2(MAX_TEETH - 1))).astype(np.intp) + 1
    return np.clip(n, MIN_TEETH, MAX_TEETH)


def sample_comb(
    segments: Sequence[FloatArray] | FloatArray, teeth: NDArray[np.intp]
) -> CombSamples:
    """Points, normals and curvature at ``teeth[i]`` evenly spaced parameters of segment i.

    Segments are elevated exactly to cubics (:func:`as_cubics`) and evaluated in one batch
    per sample count.
    """
    m = len(segments)
    if m == 0:
        z = np.zeros((0, 2))
        return CombSamples(z, z, np.zeros(0), np.zeros(0, dtype=np.intp), np.zeros(0))
    cubic = as_cubics(segments)
    teeth = np.asarray(teeth, dtype=np.intp)
    counts = teeth
    offsets = np.concatenate([[0], np.cumsum(counts)])
    total = int(offsets[-1])
    points = np.empty((total, 2))
    normals = np.empty((total, 2))
    kappa = np.empty(total)
    tt = np.empty(total)
    seg = np.repeat(np.arange(m, dtype=np.intp), counts)
    for n in np.unique(teeth).tolist():
        rows = np.flatnonzero(teeth == n)
        t = np.linspace(0.0, 1.0, n)
        batch = cubic[rows]
        pts, nor, kap = _sample_cubics(batch, n)
        idx = (offsets[rows][:, None] + np.arange(n)[None, :]).ravel()
        points[idx] = pts.reshape(-1, 2)
        normals[idx] = nor.reshape(-1, 2)
        kappa[idx] = kap.ravel()
        tt[idx] = np.tile(t, len(rows))
    return CombSamples(points, normals, kappa, seg, tt)


# A segment is sampled on the direct path below only when its speed |B′(t)| stays above this
# fraction of its size at every sample (far above geometry.curvature's
# ZERO_DERIVATIVE_TOLERANCE, 1e-12) and its size is well inside the float range; otherwise
# geometry.curvature's one-sided limits are used.
DIRECT_MIN_SPEED = 1e-6
_DIRECT_SIZE_RANGE = (1e-100, 1e100)
_bases: dict[int, tuple[FloatArray, FloatArray, FloatArray]] = {}


def _cubic_bases(n: int) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Bernstein weights of B, B′ and B″ of a cubic at ``linspace(0, 1, n)``, ``(n, 4)``."""
    hit = _bases.get(n)
    if hit is None:
        t = np.linspace(0.0, 1.0, n)
        u = 1.0 - t
        b0 = np.stack([u**3, 3 * t * u**2, 3 * t**2 * u, t**3], axis=1)
        # B′ = 3 Σ b²_i (P_{i+1} − P_i), B″ = 6 Σ b¹_i (P_{i+2} − 2 P_{i+1} + P_i) (Farin §5.3)
        a, b, c = u**2, 2 * t * u, t**2
        b1 = 3 * np.stack([-a, a - b, b - c, c], axis=1)
        b2 = 6 * np.stack([u, t - 2 * u, u - 2 * t, t], axis=1)
        hit = _bases[n] = (b0, b1, b2)
    return hit


def _sample_cubics(batch: FloatArray, n: int) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Points, unit normals and signed curvature of ``(r, 4, 2)`` cubics at ``n`` evenly
    spaced parameters, ``(r, n, 2)``, ``(r, n, 2)``, ``(r, n)``.

    Notes
    -----
    Regular segments (see :data:`DIRECT_MIN_SPEED`) straight from the Bernstein form:
    N = B′⊥ / |B′| (B′ turned +90°), κ = (x′y″ − y′x″) / |B′|³ (do Carmo §1-5), the same
    quantities as :func:`outlinebench.geometry.curvature.unit_normal` and
    :func:`~outlinebench.geometry.curvature.curvature`, which handle the others (retracted
    handles, cusps) with their one-sided limits. A drag samples a few segments per move;
    this keeps it to a handful of array operations.
    """
    r = batch.shape[0]
    b0, b1, b2 = _cubic_bases(n)
    pts = np.einsum("ti,rik->rtk", b0, batch)
    d1 = np.einsum("ti,rik->rtk", b1, batch)
    d2 = np.einsum("ti,rik->rtk", b2, batch)
    speed = np.hypot(d1[..., 0], d1[..., 1])
    size = np.max(batch.max(axis=1) - batch.min(axis=1), axis=1)
    lo, hi = _DIRECT_SIZE_RANGE
    regular = (size > lo) & (size < hi) & np.all(speed > DIRECT_MIN_SPEED * size[:, None], axis=1)
    nor = np.empty((r, n, 2))
    kap = np.empty((r, n))
    if regular.any():
        sp, v, w = speed[regular], d1[regular], d2[regular]
        nor[regular, :, 0] = -v[..., 1] / sp
        nor[regular, :, 1] = v[..., 0] / sp
        kap[regular] = (v[..., 0] * w[..., 1] - v[..., 1] * w[..., 0]) / sp**3
    if not regular.all():
        t = np.linspace(0.0, 1.0, n)
        other = batch[~regular]
        m = other.shape[0]
        nor[~regular] = unit_normal(other, t).reshape(m, n, 2)
        kap[~regular] = np.asarray(curvature(other, t)).reshape(m, n)
        pts[~regular] = evaluate(other, t).reshape(m, n, 2)
    return pts, nor, kap


def comb_tips(samples: CombSamples, scale: float) -> FloatArray:
    """Tips ``B(t) + scale · κ(t) · N(t)`` in document units (infinite κ gives inf)."""
    with np.errstate(invalid="ignore"):
        return samples.points + samples.normals * (scale * samples.kappa)[:, None]


def auto_comb_scale(doc: Document) -> float:
    """A comb scale (document units²) that suits ``doc`` (see :data:`AUTO_TOOTH_FRACTION`);
    1.0 for a document without curves.

    The end curvatures of all curved segments are computed in one batch per degree
    (:func:`outlinebench.geometry.curvature.end_curvatures`).
    """
    sizes: list[float] = []
    by_k: dict[int, list[FloatArray]] = {3: [], 4: []}
    for outline in doc.outlines:
        for contour in outline.contours:
            if not contour.segments:
                continue
            allpts = np.concatenate(contour.segments)
            lo, hi = allpts.min(axis=0), allpts.max(axis=0)
            sizes.append(float(np.hypot(*(hi - lo))))
            for seg in contour.segments:
                if seg.shape[0] in by_k:
                    by_k[seg.shape[0]].append(seg)
    ends = [np.zeros(0)]
    for segs in by_k.values():
        if segs:
            k0, k1 = end_curvatures(np.stack(segs))
            ends.extend((np.abs(np.atleast_1d(k0)), np.abs(np.atleast_1d(k1))))
    k = np.concatenate(ends)
    k = k[np.isfinite(k) & (k > 0.0)]
    if not k.size or not sizes:
        return 1.0
    return AUTO_TOOTH_FRACTION * float(np.median(sizes)) / float(np.percentile(k, 90))


class CombCache:
    """Comb samples per contour object and zoom level (levels are powers of two of the
    scale, so zooming within a factor of two reuses the samples).

    Samples are also kept per segment array: an edit builds a new contour but keeps its
    untouched segments as the same arrays, so a drag samples only the segments it moved.
    """

    def __init__(self) -> None:
        self._items: dict[int, tuple[Contour, int, CombSamples]] = {}
        # id(segment array) -> (array, level, points, normals, kappa, t)
        self._segs: dict[int, tuple] = {}
        self.segments_sampled = 0  # segments sampled by the last `get` that missed

    @staticmethod
    def level(px_per_unit: float) -> int:
        return int(math.floor(math.log2(px_per_unit)))

    def get(self, contour: Contour, px_per_unit: float) -> CombSamples:
        lvl = self.level(px_per_unit)
        hit = self._items.get(id(contour))
        if hit is not None and hit[0] is contour and hit[1] == lvl:
            return hit[2]
        segs = contour.segments
        parts: list[tuple | None] = []
        missing: list[int] = []
        for k, seg in enumerate(segs):
            e = self._segs.get(id(seg))
            if e is not None and e[0] is seg and e[1] == lvl:
                parts.append(e)
            else:
                parts.append(None)
                missing.append(k)
        if missing:
            cubic = as_cubics([segs[k] for k in missing])
            new = sample_comb(cubic, teeth_per_segment(cubic, 2.0 ** (lvl + 1)))
            cuts = np.flatnonzero(np.diff(new.segment)) + 1
            pieces = zip(
                np.split(new.points, cuts),
                np.split(new.normals, cuts),
                np.split(new.kappa, cuts),
                np.split(new.t, cuts),
                strict=True,
            )
            for k, (pts, nor, kap, tt) in zip(missing, pieces, strict=True):
                e = (segs[k], lvl, pts, nor, kap, tt)
                self._segs[id(segs[k])] = e
                parts[k] = e
        self.segments_sampled = len(missing)
        done = [e for e in parts if e is not None]
        counts = [e[2].shape[0] for e in done]
        samples = CombSamples(
            np.concatenate([e[2] for e in done]) if done else np.zeros((0, 2)),
            np.concatenate([e[3] for e in done]) if done else np.zeros((0, 2)),
            np.concatenate([e[4] for e in done]) if done else np.zeros(0),
            np.repeat(np.arange(len(done), dtype=np.intp), counts),
            np.concatenate([e[5] for e in done]) if done else np.zeros(0),
        )
        self._items[id(contour)] = (contour, lvl, samples)
        return samples

    def holds(self, contour: Contour) -> bool:
        """Whether samples of this very contour object are cached (at any zoom level)."""
        hit = self._items.get(id(contour))
        return hit is not None and hit[0] is contour

    def prune(self, live: set[int]) -> None:
        """Keep only the contours whose ids are in ``live``.

        Segment samples are dropped only when they have grown to twice those the kept
        contours use: the contour a drag is changing is not cached yet when the document
        changes, and its untouched segments' samples must survive until the next frame.
        """
        for k in [k for k in self._items if k not in live]:
            del self._items[k]
        used = sum(len(c.segments) for c, _, _ in self._items.values())
        if len(self._segs) > 2 * used + SEGMENT_SLACK:
            keep = {id(seg) for c, _, _ in self._items.values() for seg in c.segments}
            for k in [k for k in self._segs if k not in keep]:
                del self._segs[k]


def _near_clip(
    base: FloatArray, tips: FloatArray, breaks: NDArray[np.bool_], clip: QRectF
) -> tuple[FloatArray, FloatArray, NDArray[np.bool_]]:
    """The teeth whose line, or a piece of the tip line to a neighbouring tip of the same
    segment, has a box meeting ``clip`` grown by 2 px (both ends of such a piece are kept, so
    the piece is drawn); the tip line restarts after a gap."""
    n = len(base)
    m = 2.0
    x0, y0 = clip.left() - m, clip.top() - m
    x1, y1 = clip.right() + m, clip.bottom() + m

    def meets(a: FloatArray, b: FloatArray) -> NDArray[np.bool_]:
        lo, hi = np.minimum(a, b), np.maximum(a, b)
        return (hi[:, 0] >= x0) & (lo[:, 0] <= x1) & (hi[:, 1] >= y0) & (lo[:, 1] <= y1)

    keep = meets(base, tips)
    # piece[i]: the tip line from tip i - 1 to tip i (same segment) meets the region
    piece = ~breaks & meets(np.roll(tips, 1, axis=0), tips)
    keep |= piece
    keep[:-1] |= piece[1:]
    # and one more tip on either side, so the line does not restart next to the region
    # (Qt's 1-px antialiased stroke covers a vertex differently where a line starts)
    grow = keep.copy()
    grow[1:] |= keep[:-1] & ~breaks[1:]
    grow[:-1] |= keep[1:] & ~breaks[1:]
    keep = grow
    gap = np.ones(n, dtype=bool)  # row i follows a dropped row (or starts the comb)
    gap[1:] = ~keep[:-1]
    return base[keep], tips[keep], (breaks | gap)[keep]


def paint_comb(
    p: QPainter,
    view: ViewTransform,
    doc: Document,
    contours: Sequence[tuple[int, int]],
    cache: CombCache,
    scale: float,
    clip: QRectF | None = None,
) -> int:
    """Paint the comb of the given (outline, contour) pairs; returns the teeth drawn.

    Tooth lengths on screen are cut at :data:`MAX_TOOTH_PX` (unbounded curvature). With
    ``clip`` (logical px, the part of the canvas being repainted) only the teeth and the
    pieces of the line through their tips that come near it are drawn.
    """
    base_parts, tip_parts, break_parts = [], [], []
    for oi, ci in contours:
        contour = doc.outlines[oi].contours[ci]
        if not contour.segments:
            continue
        s = cache.get(contour, view.scale)
        base = view.to_screen_array(s.points)
        with np.errstate(invalid="ignore"):
            length = np.clip(scale * s.kappa * view.scale, -MAX_TOOTH_PX, MAX_TOOTH_PX)
        length = np.nan_to_num(length, nan=0.0)
        tips = base + s.normals * length[:, None]
        brk = np.ones(len(s.segment), dtype=bool)
        brk[1:] = s.segment[1:] != s.segment[:-1]
        base_parts.append(base)
        tip_parts.append(tips)
        break_parts.append(brk)
    if not base_parts:
        return 0
    base = np.concatenate(base_parts)
    tips = np.concatenate(tip_parts)
    breaks = np.concatenate(break_parts)
    if clip is not None and len(base):
        base, tips, breaks = _near_clip(base, tips, breaks, clip)
        if not len(base):
            return 0
    p.save()
    p.setRenderHint(QPainter.RenderHint.Antialiasing, False)
    pen = QPen(style.COMB_TOOTH, 1.0)
    pen.setCosmetic(True)
    p.setPen(pen)
    p.drawPath(lines_path(base, tips))
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    # A cosmetic 1-px pen: Qt strokes it on its fast path (a 1.3-px pen took 20 ms for the
    # line through 3,600 tips, benchmarks/bench_editor.py).
    edge = QPen(style.COMB_EDGE, 1.0)
    edge.setCosmetic(True)
    p.setPen(edge)
    p.drawPath(lines_path(tips, None, breaks))
    p.restore()
    return int(base.shape[0])
