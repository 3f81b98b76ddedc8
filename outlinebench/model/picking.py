"""Selection and picking: which points are selected, and what lies under the pointer.

:class:`Selection` is an ordered set of selected control points under canonical names
(:class:`~outlinebench.model.point_names.PointRef`) with a primary (last picked) point.
:func:`pick_point`, :func:`points_in_rect` and :func:`nearest_segment` find points and
segments near a document position; they share an index of every control point and segment
bounding box, rebuilt cheaply after a local edit (unchanged contours keep their arrays).

Moved out of :mod:`outlinebench.model.tools` (which still exports these names).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import CommandError
from outlinebench.geometry.nearest import nearest_point
from outlinebench.model.document import Contour, Document
from outlinebench.model.point_names import PointRef, canonical_ref

__all__ = ["Selection", "SegmentHit", "pick_point", "points_in_rect", "nearest_segment"]

FloatArray = NDArray[np.float64]


class Selection:
    """Ordered set of selected control points under canonical names, with a primary point."""

    def __init__(self) -> None:
        self._refs: dict[PointRef, None] = {}
        self.primary: PointRef | None = None
        self._observers: list[Callable[[], None]] = []

    @property
    def refs(self) -> tuple[PointRef, ...]:
        return tuple(self._refs)

    def __contains__(self, ref: object) -> bool:
        return ref in self._refs

    def __len__(self) -> int:
        return len(self._refs)

    def subscribe(self, callback: Callable[[], None]) -> Callable[[], None]:
        """Call ``callback()`` after every change; returns an unsubscriber."""
        self._observers.append(callback)
        return lambda: self._observers.remove(callback) if callback in self._observers else None

    def _changed(self) -> None:
        for cb in list(self._observers):
            cb()

    def set(self, refs: Iterable[PointRef], primary: PointRef | None = None) -> None:
        new = {PointRef(*r): None for r in refs}
        if primary is None and new:
            primary = next(reversed(new))
        if list(new) == list(self._refs) and primary == self.primary:
            return
        self._refs, self.primary = new, primary
        self._changed()

    def add(self, refs: Iterable[PointRef]) -> None:
        self.set([*self._refs, *refs])

    def toggle(self, ref: PointRef) -> bool:
        """Add or remove one point; returns whether it is selected afterwards."""
        ref = PointRef(*ref)
        if ref in self._refs:
            rest = [r for r in self._refs if r != ref]
            self.set(rest, rest[-1] if rest else None)
            return False
        self.set([*self._refs, ref], ref)
        return True

    def clear(self) -> None:
        self.set([])

    def prune(self, doc: Document) -> None:
        """Drop points that no longer exist and rename the rest canonically."""
        kept = []
        for r in self._refs:
            try:
                kept.append(canonical_ref(doc, r))
            except CommandError:
                continue
        primary = self.primary
        if primary is not None:
            try:
                primary = canonical_ref(doc, primary)
            except CommandError:
                primary = None
        self.set(kept, primary if primary in kept else None)


@dataclass(frozen=True, slots=True)
class SegmentHit:
    """The nearest point of a segment to the pointer."""

    outline: int
    contour: int
    segment: int
    t: float
    point: tuple[float, float]
    distance: float


@dataclass(frozen=True, slots=True)
class _ContourEntry:
    contour: Contour
    coords: FloatArray  # (P, 2) every control point
    seg_idx: NDArray[np.int64]  # (P,)
    pt_idx: NDArray[np.int64]  # (P,)
    on: NDArray[np.bool_]  # (P,) on-curve mask
    lo: FloatArray  # (S, 2) control-point bounding box of each segment
    hi: FloatArray  # (S, 2)


def _contour_entry(contour: Contour) -> _ContourEntry:
    segs = contour.segments
    if not segs:
        empty = np.zeros(0, dtype=np.int64)
        none = np.zeros((0, 2))
        return _ContourEntry(contour, none, empty, empty, np.zeros(0, dtype=bool), none, none)
    sizes = np.array([s.shape[0] for s in segs])
    coords = np.concatenate(segs, axis=0)
    seg_idx = np.repeat(np.arange(len(segs)), sizes)
    starts = np.concatenate([[0], np.cumsum(sizes)[:-1]])
    pt_idx = np.arange(len(coords)) - np.repeat(starts, sizes)
    on = (pt_idx == 0) | (pt_idx == np.repeat(sizes, sizes) - 1)
    lo = np.minimum.reduceat(coords, starts, axis=0)
    hi = np.maximum.reduceat(coords, starts, axis=0)
    return _ContourEntry(contour, coords, seg_idx, pt_idx, on, lo, hi)


class _DocumentIndex:
    """Every control point and segment bounding box of a document in flat arrays.

    Built once per document; contours that did not change (same object) reuse the arrays of
    the previous index, so rebuilding after a local edit costs little.
    """

    def __init__(self, doc: Document, previous: _DocumentIndex | None = None) -> None:
        self.doc = doc
        old = previous.entries if previous is not None else {}
        self.entries: dict[int, _ContourEntry] = {}
        owners = []
        for ref in doc.contour_refs():
            e = old.get(id(ref.contour))
            if e is None or e.contour is not ref.contour:
                e = _contour_entry(ref.contour)
            self.entries[id(ref.contour)] = e
            owners.append((ref.outline, ref.index, e))
        if owners:
            self.coords = np.concatenate([e.coords for _, _, e in owners])
            self.outline = np.concatenate([np.full(len(e.coords), o) for o, _, e in owners])
            self.contour = np.concatenate([np.full(len(e.coords), c) for _, c, e in owners])
            self.seg_idx = np.concatenate([e.seg_idx for _, _, e in owners])
            self.pt_idx = np.concatenate([e.pt_idx for _, _, e in owners])
            self.on = np.concatenate([e.on for _, _, e in owners])
            self.lo = np.concatenate([e.lo for _, _, e in owners])
            self.hi = np.concatenate([e.hi for _, _, e in owners])
            self.seg_outline = np.concatenate([np.full(len(e.lo), o) for o, _, e in owners])
            self.seg_contour = np.concatenate([np.full(len(e.lo), c) for _, c, e in owners])
            self.seg_number = np.concatenate([np.arange(len(e.lo)) for _, _, e in owners])
        else:
            z = np.zeros(0, dtype=np.int64)
            self.coords = self.lo = self.hi = np.zeros((0, 2))
            self.outline = self.contour = self.seg_idx = self.pt_idx = z
            self.seg_outline = self.seg_contour = self.seg_number = z
            self.on = np.zeros(0, dtype=bool)


_LAST_INDEX: list[_DocumentIndex] = []


def _index(doc: Document) -> _DocumentIndex:
    """The index of ``doc``, kept for the last document asked about (hover, repeated picks)."""
    if _LAST_INDEX and _LAST_INDEX[0].doc is doc:
        return _LAST_INDEX[0]
    idx = _DocumentIndex(doc, _LAST_INDEX[0] if _LAST_INDEX else None)
    _LAST_INDEX[:] = [idx]
    return idx


def pick_point(
    doc: Document,
    xy: Iterable[float],
    radius: float,
    *,
    handles: bool = True,
) -> PointRef | None:
    """The control point nearest to ``xy`` within ``radius`` (canonical name), or None.

    On-curve points win ties with handles lying on them (a handle of zero length).
    """
    p = np.asarray(list(xy), dtype=np.float64)
    idx = _index(doc)
    d = np.hypot(idx.coords[:, 0] - p[0], idx.coords[:, 1] - p[1])
    ok = d <= radius
    if not handles:
        ok &= idx.on
    cand = np.flatnonzero(ok)
    if not len(cand):
        return None
    # Nearest first; on-curve (kind 0) before handles at equal distance.
    k = int(cand[np.lexsort((~idx.on[cand], d[cand]))[0]])
    name = PointRef(
        int(idx.outline[k]), int(idx.contour[k]), int(idx.seg_idx[k]), int(idx.pt_idx[k])
    )
    return canonical_ref(doc, name)


def points_in_rect(
    doc: Document, rect: tuple[float, float, float, float], *, handles: bool = False
) -> list[PointRef]:
    """Canonical names of the on-curve points (and handles, if asked) inside a rectangle.

    ``rect`` is two opposite corners ``(x0, y0, x1, y1)`` in any order; edges count as inside.
    """
    x0, x1 = sorted((rect[0], rect[2]))
    y0, y1 = sorted((rect[1], rect[3]))
    idx = _index(doc)
    c = idx.coords
    inside = (c[:, 0] >= x0) & (c[:, 0] <= x1) & (c[:, 1] >= y0) & (c[:, 1] <= y1)
    if not handles:
        inside &= idx.on
    out: dict[PointRef, None] = {}
    for k in np.flatnonzero(inside):
        name = PointRef(
            int(idx.outline[k]), int(idx.contour[k]), int(idx.seg_idx[k]), int(idx.pt_idx[k])
        )
        out[canonical_ref(doc, name)] = None
    return list(out)


def nearest_segment(doc: Document, xy: Iterable[float], radius: float) -> SegmentHit | None:
    """The nearest point on any segment within ``radius`` of ``xy``, or None.

    Notes
    -----
    Segments whose control-point bounding box is farther than ``radius`` are skipped (a
    Bézier segment lies in the convex hull of its control points, Farin §4.3); the rest are
    visited nearest box first, each searched globally with
    :func:`outlinebench.geometry.nearest.nearest_point`, and a segment whose box is farther
    than the best distance found so far is skipped too.
    """
    p = np.asarray(list(xy), dtype=np.float64)
    idx = _index(doc)
    # Distance from p to each box (0 inside it): a lower bound of the distance to the segment.
    gap = np.maximum(np.maximum(idx.lo - p, p - idx.hi), 0.0)
    box_dist = np.hypot(gap[:, 0], gap[:, 1])
    near = np.flatnonzero(box_dist <= radius)
    best: SegmentHit | None = None
    limit = radius
    for k in near[np.argsort(box_dist[near], kind="stable")]:
        if box_dist[k] > limit:
            break
        o, c, s = int(idx.seg_outline[k]), int(idx.seg_contour[k]), int(idx.seg_number[k])
        seg = doc.outlines[o].contours[c].segments[s]
        t, dist, q = nearest_point(seg, p)
        if dist <= limit and (best is None or dist < best.distance):
            best = SegmentHit(o, c, s, t, (float(q[0]), float(q[1])), dist)
            limit = dist
    return best
