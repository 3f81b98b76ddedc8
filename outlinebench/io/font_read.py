"""Fonts read into the document model: OpenType/TrueType files and UFO sources, one outline a glyph.

Each selected glyph becomes one :class:`~outlinebench.model.Outline` whose ``element_id`` is
the glyph name and whose ``source_index`` is the glyph's index in the font's glyph order.
Outlines are built from the outline data the format stores:

- ``glyf`` (TrueType): quadratic segments. Between two consecutive off-curve points lies an
  implied on-curve point, their midpoint (OpenType specification, chapter "glyf — Glyph
  Data", simple glyph description; Apple *TrueType Reference Manual*, chapter 1 "Digitizing
  letterform designs"). Simple glyphs are decoded from the table's bytes (flags, then x and
  y deltas, as arrays) and the outlines of all of them built in one array pass; composite
  glyphs and the cubic ``glyf`` extension go through fontTools. Coordinates are the stored
  ones (fontTools' glyph sets shift a glyph by ``hmtx`` lsb − xMin when the two differ; the
  outline itself is the same). A contour of one point (an anchor) encloses nothing and has
  no segment: it is left out.
- ``CFF`` (PostScript outlines): cubic segments, read from the Type 2 charstrings by our
  reader of the path, hint and subroutine operators (Adobe Technical Notes #5176 and #5177);
  a charstring using anything else (arithmetic, ``seac`` accents) and ``CFF2`` fonts go
  through fontTools' interpreter and a pen. A variable font is read at its default
  instance.
- ``.ufo`` sources through ufoLib2: ``line``, ``curve`` and ``qcurve`` points (Unified Font
  Object 3, "glif" chapter), including a curve with more than two off-curve points (split
  the way fontTools' pens split it) and a quadratic run with implied on-curve points. A point
  marked ``smooth="yes"`` gives its join the intent "smooth".

Composite glyphs are decomposed (each component's transformation applied); every contour
remembers where it came from (:attr:`GlyphRef.origins`, e.g. ``"acute"`` for a contour of
the component ``acute``, ``"acute/dotaccent"`` one level deeper) so findings can name it
(:func:`contour_origin`). A glyph with no contours (a space) becomes an outline with no
contours.

Coordinates and y axis
----------------------
Fonts measure y upwards from the baseline; the document model, like SVG, measures y
downwards. A font point (x, y) is stored as (x, 0 − y): exact in floating point, so writing
back gives the font's numbers bit for bit, and the subtraction from +0.0 keeps a zero
coordinate +0.0. The glyph then shows upright in the editor and in SVG output, and a turning
sense seen on screen is the turning sense the font's designer drew: a TrueType outer contour
that runs clockwise in the font runs clockwise on screen, and has positive signed area by
:func:`outlinebench.geometry.signed_area` (positive = clockwise on screen in a y-down frame).

Lengths are in font units. The document's scale takes one font unit as one CSS pixel
(``mm_per_unit = 25.4 / 96``, ``units = "px"``), which is what a glyph exported to SVG in
font units gives; the units per em are stated in a read note (kind ``"units-per-em"``) and
in :attr:`FontSource.units_per_em`.

Glyph selection
---------------
``glyphs=`` takes a comma-separated text or a sequence of items; each item is one of

- a glyph name: ``A``;
- a range of glyph names in glyph order, inclusive: ``A-Z`` (a name that itself contains a
  hyphen is taken as a name first);
- glyph ids (glyph-order indices, from 0), inclusive: ``#3`` or ``#3-#40``;
- Unicode code points through the character map, inclusive: ``U+0041`` or
  ``U+0041-U+005A``.

The selected glyphs are read in glyph order, each once.

References
----------
Microsoft, *OpenType specification* 1.9: "glyf — Glyph Data", "CFF — Compact Font Format
table", "CFF2 — Compact Font Format (CFF) Version 2", "head — Font Header Table".
Unified Font Object specification 3: "glif", "contents.plist", "lib.plist"
(``public.glyphOrder``).
"""

from __future__ import annotations

import math
import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import FontReadError
from outlinebench.io.svg_read import ReadNote, ReadResult
from outlinebench.model.document import Contour, Document, JoinIntent, Outline

__all__ = [
    "FONT_SUFFIXES",
    "BINARY_FONT_SUFFIXES",
    "FONT_MM_PER_UNIT",
    "GlyphRef",
    "FontSource",
    "is_font_path",
    "select_glyphs",
    "read_font",
    "load_font",
    "contour_origin",
    "to_font_coordinates",
]

BINARY_FONT_SUFFIXES: tuple[str, ...] = (".ttf", ".otf")
FONT_SUFFIXES: tuple[str, ...] = (*BINARY_FONT_SUFFIXES, ".ufo")
# One font unit read as one CSS pixel (CSS Values and Units Level 3, §5.2: 1px = 1/96 in),
# as a glyph exported to SVG in font units would be.
FONT_MM_PER_UNIT = 25.4 / 96.0

Flavour = Literal["truetype", "cff", "cff2", "ufo"]
FloatArray = NDArray[np.float64]


@dataclass(eq=False)
class GlyphRef:
    """Handle kept in ``Outline.source`` for a glyph outline: where it came from, what was read.

    Attributes
    ----------
    name : str
        The glyph name.
    contours : tuple of Contour
        The contours as read; the UFO writer compares the outline's contours with these by
        identity to tell untouched glyphs (never rewritten) from edited ones.
    origins : tuple of (str or None)
        One entry per contour: None for the glyph's own contours, else the component path
        it was decomposed from (``"acute"``, ``"acute/dotaccent"``). Own contours come
        first, component contours after them.
    components : tuple of str
        Names of the glyph's direct components, in order.
    advance : float
        Advance width in font units.
    grid_step : float or None
        1.0 when every stored coordinate of the glyph (components placed) is an integer,
        else None. Implied on-curve points are not stored and do not count.
    """

    name: str
    contours: tuple[Contour, ...]
    origins: tuple[str | None, ...]
    components: tuple[str, ...] = ()
    advance: float = 0.0
    grid_step: float | None = 1.0


@dataclass(eq=False)
class FontSource:
    """Handle kept in ``Document.source`` for a document read from a font.

    Attributes
    ----------
    path : str
        The file or UFO folder as the caller named it.
    flavour : {"truetype", "cff", "cff2", "ufo"}
        Which outlines were read: ``glyf`` quadratics, ``CFF``/``CFF2`` cubics, or a UFO.
    units_per_em : float or None
        From ``head.unitsPerEm`` or the UFO's ``fontinfo.plist`` (None when it states none).
    glyph_order : tuple of str
        Every glyph of the font (or the UFO's default layer) in glyph order.
    grid_step : float or None
        1.0 when every selected glyph has integer coordinates, else None.
    writable : bool
        True for a UFO (glyphs can be written back), False for a binary font.
    font : Any
        For a UFO the ``ufoLib2.Font`` it was read with (the writer keeps every glyph's
        other data from it); None for a binary font (the file is closed after reading).
    layer_dir : str or None
        The UFO's default layer folder (``glyphs``).
    glif_files : dict of str to str
        Glyph name → ``.glif`` file name in the layer folder (from ``contents.plist``).
    """

    path: str
    flavour: Flavour
    units_per_em: float | None
    glyph_order: tuple[str, ...]
    grid_step: float | None = 1.0
    writable: bool = False
    font: Any = None
    layer_dir: str | None = None
    glif_files: dict[str, str] = field(default_factory=dict)


def is_font_path(path: str | os.PathLike[str]) -> bool:
    """True when the name ends in ``.ttf``, ``.otf`` or ``.ufo`` (any case)."""
    return Path(os.fspath(path).rstrip("/\\")).suffix.lower() in FONT_SUFFIXES


def to_font_coordinates(points: FloatArray) -> FloatArray:
    """Model coordinates back to font coordinates: (x, y) → (x, 0 − y), exact.

    The inverse of the reader's y flip (see module docstring); the map is its own inverse.
    """
    out = np.array(points, dtype=np.float64)
    out[..., 1] = 0.0 - out[..., 1]
    return out


# -- glyph selection ------------------------------------------------------------------------


def _code_point(text: str) -> int | None:
    t = text.strip()
    if len(t) > 2 and t[:2].upper() == "U+":
        try:
            value = int(t[2:], 16)
        except ValueError:
            return None
        return value if 0 <= value <= 0x10FFFF else None
    return None


def _glyph_id(text: str, count: int, where: str) -> int | None:
    t = text.strip()
    if not t.startswith("#"):
        return None
    try:
        gid = int(t[1:])
    except ValueError:
        return None
    if not 0 <= gid < count:
        raise FontReadError(f"{where}: glyph id {t} is outside 0-{count - 1}")
    return gid


def select_glyphs(
    spec: str | Iterable[str] | None,
    glyph_order: Sequence[str],
    cmap: dict[int, str] | None = None,
    where: str = "<font>",
) -> list[str]:
    """The glyph names a selection names, in glyph order, each once.

    Parameters
    ----------
    spec : str, iterable of str, or None
        Comma-separated items (see the module docstring: names, ``A-Z`` name ranges,
        ``#3-#40`` glyph-id ranges, ``U+0041-U+005A`` code-point ranges); a sequence gives
        one item each (not split at commas). None selects every glyph.
    glyph_order : sequence of str
    cmap : dict of int to str, optional
        Code point → glyph name, for ``U+`` items.
    where : str
        The file name, for messages.

    Returns
    -------
    list of str

    Raises
    ------
    FontReadError
        An item names no glyph, a range runs backwards, a glyph id is out of range, or no
        code point of a ``U+`` item is in the character map.

    Examples
    --------
    >>> select_glyphs("C, A-B", ["A", "B", "C", "D"])
    ['A', 'B', 'C']
    >>> select_glyphs(None, [])
    []
    """
    order = list(glyph_order)
    if spec is None:
        return order
    items = spec.split(",") if isinstance(spec, str) else list(spec)
    index = {name: i for i, name in enumerate(order)}
    picked: set[int] = set()
    for raw in items:
        item = raw.strip()
        if not item:
            continue
        if item in index:
            picked.add(index[item])
            continue
        first, sep, last = item.partition("-")
        # glyph ids
        if item.startswith("#"):
            lo = _glyph_id(first, len(order), where)
            hi = _glyph_id(last, len(order), where) if sep else lo
            if lo is None or hi is None:
                raise FontReadError(f"{where}: glyph selection {item!r}: expected #id or #id-#id")
            if hi < lo:
                raise FontReadError(f"{where}: glyph id range {item!r} runs backwards")
            picked.update(range(lo, hi + 1))
            continue
        # code points
        cp_lo = _code_point(first)
        if cp_lo is not None:
            cp_hi = _code_point(last) if sep else cp_lo
            if cp_hi is None:
                raise FontReadError(f"{where}: glyph selection {item!r}: expected U+hex-U+hex")
            if cp_hi < cp_lo:
                raise FontReadError(f"{where}: code point range {item!r} runs backwards")
            found = [
                index[n] for cp, n in (cmap or {}).items() if cp_lo <= cp <= cp_hi and n in index
            ]
            if not found:
                raise FontReadError(f"{where}: no glyph in the character map for {item!r}")
            picked.update(found)
            continue
        # name ranges: try every hyphen, so names containing hyphens still work
        done = False
        for k, ch in enumerate(item):
            if ch != "-":
                continue
            a, b = item[:k].strip(), item[k + 1 :].strip()
            if a in index and b in index:
                if index[b] < index[a]:
                    raise FontReadError(
                        f"{where}: glyph range {item!r} runs backwards in the glyph order"
                    )
                picked.update(range(index[a], index[b] + 1))
                done = True
                break
        if not done:
            raise FontReadError(f"{where}: no glyph named {item!r}")
    return [order[i] for i in sorted(picked)]


# -- outline building ----------------------------------------------------------------------


def _frozen(a: FloatArray) -> FloatArray:
    a.flags.writeable = False
    return a


def _quadratic_contours(
    xy: FloatArray, on: NDArray[np.bool_], ends: Sequence[int]
) -> tuple[list[Contour], list[int]]:
    """Closed contours from TrueType points (model coordinates), all contours of a glyph at once.

    Parameters
    ----------
    xy : ndarray, shape (N, 2)
    on : ndarray of bool, shape (N,)
        On-curve flags.
    ends : sequence of int
        Index of each contour's last point (``endPtsOfContours``).

    Returns
    -------
    contours : list of Contour
    kept : list of int
        Index of each returned contour among the glyph's contours (contours of fewer than
        two points are left out: they enclose nothing and have no segment).

    Notes
    -----
    Between consecutive off-curve points (cyclically) the midpoint is inserted as an
    on-curve point (OpenType "glyf"); each contour is then rotated to start at its first
    on-curve point and closed by repeating it. Segments are read-only views of one array
    per glyph, so neighbours share their end point's memory.
    """
    ends_arr = np.asarray(ends, dtype=np.intp)
    starts = np.concatenate(([0], ends_arr[:-1] + 1))
    lengths = ends_arr - starts + 1
    keep = np.flatnonzero(lengths >= 2)
    if keep.size == 0:
        return [], []
    if keep.size != lengths.size:
        rows = np.concatenate([np.arange(starts[k], ends_arr[k] + 1) for k in keep])
        xy, on = xy[rows], on[rows]
        lengths = lengths[keep]
        ends_arr = np.cumsum(lengths) - 1
        starts = ends_arr - lengths + 1
    n = xy.shape[0]
    nxt = np.arange(1, n + 1)
    nxt[ends_arr] = starts
    mid = ~on & ~on[nxt]
    if mid.any():
        rep = 1 + mid.astype(np.intp)
        pos = np.cumsum(rep) - rep
        total = int(pos[-1] + rep[-1])
        p2 = np.empty((total, 2))
        p2[pos] = xy
        o2 = np.ones(total, dtype=bool)
        o2[pos] = on
        mi = np.flatnonzero(mid)
        p2[pos[mi] + 1] = (xy[mi] + xy[nxt[mi]]) * 0.5
        counts = np.add.reduceat(rep, starts)
    else:
        p2, o2, counts = xy, on, lengths
    first = np.concatenate(([0], np.cumsum(counts)[:-1]))
    # first on-curve point of each contour (every contour has one after the insertion)
    on_idx = np.flatnonzero(o2)
    owner = np.searchsorted(first, on_idx, side="right") - 1
    head = np.concatenate(([True], owner[1:] != owner[:-1]))
    f_on = np.empty(counts.size, dtype=np.intp)
    f_on[owner[head]] = on_idx[head]
    # rotated and closed: contour c has counts[c] + 1 points
    sizes = counts + 1
    out_first = np.concatenate(([0], np.cumsum(sizes)[:-1]))
    local = np.arange(int(sizes.sum())) - np.repeat(out_first, sizes)
    c_of = np.repeat(np.arange(counts.size), sizes)
    src = first[c_of] + (f_on[c_of] - first[c_of] + local) % counts[c_of]
    seq = _frozen(p2[src])
    seq_on = o2[src]
    idx = np.flatnonzero(seq_on)
    same = c_of[idx[1:]] == c_of[idx[:-1]]
    a = idx[:-1][same]
    b = idx[1:][same] + 1
    per = np.bincount(c_of[a], minlength=counts.size)
    segs = [seq[i:j] for i, j in zip(a.tolist(), b.tolist(), strict=True)]
    contours = []
    at = 0
    for k in per.tolist():
        contours.append(Contour(tuple(segs[at : at + k]), True))
        at += k
    return contours, keep.tolist()


def _contour_from_segments(
    segs: list[list[tuple[float, float]]], closed: bool, joins: Sequence[JoinIntent | None] = ()
) -> Contour:
    """A contour from segments given as point lists in font coordinates (y up), sharing ends.

    The points are laid out in one array with each segment's end point stored once (a
    segment starts where the previous one ends), y flipped, and every segment a read-only
    view of that array.
    """
    flat: list[tuple[float, float]] = [segs[0][0]]
    bounds = []
    at = 0
    for s in segs:
        flat.extend(s[1:])
        bounds.append((at, at + len(s)))
        at += len(s) - 1
    arr = np.array(flat, dtype=np.float64)
    arr[:, 1] = 0.0 - arr[:, 1]
    _frozen(arr)
    return Contour(tuple(arr[i:j] for i, j in bounds), closed, tuple(joins))


def _contour_from_flat(flat: Sequence[float], sizes: Sequence[int], closed: bool) -> Contour:
    """A contour from flat font coordinates (x0, y0, x1, y1, ...; each segment's first point
    is the previous one's last, stored once) and each segment's control-point count.

    One read-only array holds the points, y flipped (module docstring); segments are views.
    """
    arr = np.array(flat, dtype=np.float64).reshape(-1, 2)
    arr[:, 1] = 0.0 - arr[:, 1]
    _frozen(arr)
    k = np.asarray(sizes, dtype=np.intp) - 1
    ends = np.cumsum(k).tolist()
    starts = [0, *ends[:-1]]
    return Contour(tuple(arr[a : b + 1] for a, b in zip(starts, ends, strict=True)), closed)


def _owner(segment: FloatArray) -> FloatArray:
    """The array a segment is a view of (every point of its contour or glyph), or itself."""
    base = segment.base
    return base if isinstance(base, np.ndarray) and base.ndim == 2 else segment


def _all_integer(values: Iterable[float]) -> bool:
    return all(float(v).is_integer() for v in values)


class _SegmentPen:
    """A fontTools segment pen collecting contours (font coordinates) for CFF/CFF2 glyphs.

    Components are drawn through the glyph set with their transformation, and every contour
    is tagged with the component path it came from.
    """

    def __init__(self, glyphset: Any, where: str) -> None:
        from fontTools.pens.basePen import BasePen

        outer = self

        class _Pen(BasePen):  # type: ignore[misc]
            def _moveTo(self, pt: tuple[float, float]) -> None:
                outer._start = pt
                outer._segs = []

            def _lineTo(self, pt: tuple[float, float]) -> None:
                outer._segs.append([self._getCurrentPoint(), pt])

            def _qCurveToOne(self, p1: Any, p2: Any) -> None:
                outer._segs.append([self._getCurrentPoint(), p1, p2])

            def _curveToOne(self, p1: Any, p2: Any, p3: Any) -> None:
                outer._segs.append([self._getCurrentPoint(), p1, p2, p3])

            def _closePath(self) -> None:
                outer._flush(True, self._getCurrentPoint())

            def _endPath(self) -> None:
                outer._flush(False, self._getCurrentPoint())

            def addComponent(self, name: str, transformation: Any) -> None:
                outer._component(name, transformation)

        self.pen = _Pen(glyphset)
        self.glyphset = glyphset
        self.where = where
        self.contours: list[Contour] = []
        self.origins: list[str | None] = []
        self.points: list[float] = []
        self._start: tuple[float, float] = (0.0, 0.0)
        self._segs: list[list[tuple[float, float]]] = []
        self._stack: list[str] = []

    def _flush(self, closed: bool, current: tuple[float, float] | None) -> None:
        segs = self._segs
        self._segs = []
        if not segs:
            return
        if closed and current is not None and tuple(current) != tuple(self._start):
            segs.append([current, self._start])
        for s in segs:
            for p in s:
                self.points.extend(p)
        self.contours.append(_contour_from_segments(segs, closed))
        self.origins.append("/".join(self._stack) if self._stack else None)

    def _component(self, name: str, transformation: Any) -> None:
        from fontTools.pens.transformPen import TransformPen

        if name in self._stack or len(self._stack) > 32:
            raise FontReadError(f"{self.where}: component {name!r} refers to itself")
        if name not in self.glyphset:
            raise FontReadError(f"{self.where}: component {name!r} is not in the font")
        self._stack.append(name)
        try:
            self.glyphset[name].draw(TransformPen(self.pen, transformation))
        finally:
            self._stack.pop()


def _ufo_segments(  # noqa: C901 (older than the complexity gate; split when next changed)
    points: Sequence[Any], where: str
) -> tuple[list[list[tuple[float, float]]], bool, list[JoinIntent | None]]:
    """Segments (font coordinates), closedness and join intent of one UFO contour.

    Parameters
    ----------
    points : sequence of ufoLib2 Point
        ``x``, ``y``, ``type`` (None for an off-curve point), ``smooth``.

    Notes
    -----
    UFO 3 "glif", point types: ``line`` (no off-curve points before it), ``curve`` (0 off-
    curve points: a line; 1: a quadratic; 2: a cubic; more: split as fontTools'
    ``decomposeSuperBezierSegment`` splits it), ``qcurve`` (any number, with implied
    on-curve points at the midpoints between off-curve points, as in TrueType). A contour
    whose first point is ``move`` is open; otherwise it is closed and its list wraps
    around. A closed contour of off-curve points only is a TrueType-style quadratic ring.
    """
    from fontTools.pens.basePen import decomposeQuadraticSegment, decomposeSuperBezierSegment

    pts = [((float(p.x), float(p.y)), p.type, bool(p.smooth)) for p in points]
    closed = bool(pts) and pts[0][1] != "move"
    if any(t == "move" for _, t, _ in pts[1:]):
        raise FontReadError(f"{where}: a 'move' point in the middle of a contour")
    if closed:
        on = [i for i, (_, t, _) in enumerate(pts) if t is not None]
        if not on:  # a quadratic ring of off-curve points
            if len(pts) < 2:
                return [], closed, []
            ring_pts = [p for p, _, _ in pts]
            start = (
                0.5 * (ring_pts[-1][0] + ring_pts[0][0]),
                0.5 * (ring_pts[-1][1] + ring_pts[0][1]),
            )
            ring: list[list[tuple[float, float]]] = []
            cur = start
            for a, b in decomposeQuadraticSegment([*ring_pts, start]):
                ring.append([cur, a, b])
                cur = b
            return ring, closed, [None] * len(ring)
        k = on[0]
        pts = pts[k + 1 :] + pts[: k + 1]  # the first on-curve point last: the walk ends there
        start_pt = pts[-1][0]
    else:
        start_pt = pts[0][0]
        pts = pts[1:]
    segs: list[list[tuple[float, float]]] = []
    joins: list[JoinIntent | None] = []
    cur = start_pt
    offs: list[tuple[float, float]] = []
    prev_smooth = False
    for p, t, smooth in pts:
        if t is None:
            offs.append(p)
            continue
        if t == "line":
            if offs:
                raise FontReadError(f"{where}: off-curve points before a 'line' point")
            pieces = [[cur, p]]
        elif t == "curve":
            if len(offs) == 0:
                pieces = [[cur, p]]
            elif len(offs) == 1:
                pieces = [[cur, offs[0], p]]
            elif len(offs) == 2:
                pieces = [[cur, offs[0], offs[1], p]]
            else:
                pieces = []
                c = cur
                for a, b, e in decomposeSuperBezierSegment([*offs, p]):
                    pieces.append([c, a, b, e])
                    c = e
        elif t == "qcurve":
            if not offs:
                pieces = [[cur, p]]
            else:
                pieces = []
                c = cur
                for a, b in decomposeQuadraticSegment([*offs, p]):
                    pieces.append([c, a, b])
                    c = b
        else:
            raise FontReadError(f"{where}: unknown point type {t!r}")
        if segs:
            joins.append("smooth" if prev_smooth else None)
        joins.extend([None] * (len(pieces) - 1))  # implied points inside one run
        segs.extend(pieces)
        prev_smooth = smooth
        cur = p
        offs = []
    if offs:
        raise FontReadError(f"{where}: an open contour ends with off-curve points")
    if closed and segs:
        joins.append("smooth" if prev_smooth else None)
    return segs, closed, joins


# -- readers -------------------------------------------------------------------------------


@dataclass
class _Glyph:
    name: str
    contours: list[Contour]
    origins: list[str | None]
    components: tuple[str, ...]
    advance: float
    integer: bool


def _first_error(error: Exception | None, new: Exception, notes: list[ReadNote]) -> Exception:
    """Keep the first glyph error as the result's error, later ones as error notes
    (:attr:`ReadResult.all_notes` lists the first one itself)."""
    if error is None:
        return new
    notes.append(ReadNote("error", str(new), "glyph"))
    return error


def _empty_note(where: str, empty: list[str]) -> ReadNote:
    first = ", ".join(empty[:3])
    return ReadNote(
        "info",
        f"{where}: {len(empty)} glyph(s) with no contours read as empty outlines (first: {first})",
        "empty-glyph",
        len(empty),
    )


class _Unsupported(Exception):
    """Raised by the fast decoders for data they leave to fontTools (read the slow way)."""


def _glyf_coordinates(data: bytes, where: str) -> tuple[FloatArray, NDArray[np.bool_], list[int]]:
    """Points, on-curve flags and contour ends of a simple ``glyf`` glyph, from its bytes.

    Parameters
    ----------
    data : bytes
        The glyph's data block (OpenType "glyf", simple glyph description).

    Returns
    -------
    xy : ndarray, shape (N, 2)
        Font coordinates (y up).
    on : ndarray of bool, shape (N,)
    ends : list of int
        ``endPtsOfContours``.

    Raises
    ------
    _Unsupported
        A composite glyph or one with cubic flags (fontTools reads those).
    FontReadError
        Flags or coordinates run past the end of the data.

    Notes
    -----
    Layout: numberOfContours (int16), the box (4 × int16), endPtsOfContours (uint16 each),
    instructionLength (uint16) and the instructions, then the flags (bit 3 REPEAT_FLAG: the
    next byte repeats it), x then y coordinates. Per coordinate, bit 1/2 (SHORT_VECTOR) means
    one unsigned byte whose sign is bit 4/5, otherwise bit 4/5 (IS_SAME) means no change and
    its absence a signed 16-bit delta. Deltas are summed from (0, 0). The flags are read in a
    loop, the coordinates as arrays.
    """
    size = len(data)
    if size < 12:
        raise FontReadError(f"{where}: glyph data of {size} bytes is too short")
    nc = int.from_bytes(data[0:2], "big", signed=True)
    if nc < 0:
        raise _Unsupported
    pos = 10 + 2 * nc
    if pos + 2 > size:
        raise FontReadError(f"{where}: glyph data ends inside its contour table")
    ends_arr = np.frombuffer(data, dtype=">u2", count=nc, offset=10).astype(np.intp)
    if nc and np.any(np.diff(ends_arr) < 0):
        raise FontReadError(f"{where}: contour end points are not in order")
    n = int(ends_arr[-1]) + 1 if nc else 0
    pos += 2 + int.from_bytes(data[pos : pos + 2], "big")
    buf = np.frombuffer(data, dtype=np.uint8)
    parts: list[NDArray[np.uint8]] = []
    j = 0
    while j < n:  # runs of plain flags at once; a loop step only per REPEAT_FLAG
        chunk = buf[pos : pos + (n - j)]
        if chunk.size < n - j and not np.any(chunk & 0x08):
            raise FontReadError(f"{where}: glyph flags run past the end of the data")
        rep = np.flatnonzero(chunk & 0x08)
        if rep.size == 0:
            parts.append(chunk)
            pos += chunk.size
            j += chunk.size
            break
        k = int(rep[0])
        if pos + k + 1 >= size:
            raise FontReadError(f"{where}: glyph flags run past the end of the data")
        r = int(buf[pos + k + 1]) + 1
        parts.append(chunk[:k])
        parts.append(np.full(r, chunk[k], dtype=np.uint8))
        pos += k + 2
        j += k + r
    if j != n:
        raise FontReadError(f"{where}: glyph flags repeat past the last point")
    fl = np.concatenate(parts) if len(parts) != 1 else parts[0]
    if np.any(fl & 0x80):
        raise _Unsupported
    out = np.empty((n, 2))
    for axis, short_bit, same_bit in ((0, 0x02, 0x10), (1, 0x04, 0x20)):
        short = (fl & short_bit) != 0
        same = (fl & same_bit) != 0
        step = np.where(short, 1, np.where(same, 0, 2))
        off = pos + np.cumsum(step) - step
        pos += int(step.sum())
        if pos > size:
            raise FontReadError(f"{where}: glyph coordinates run past the end of the data")
        last = size - 1
        b0 = buf[np.minimum(off, last)].astype(np.int64)
        b1 = buf[np.minimum(off + 1, last)].astype(np.int64)
        word = (b0 << 8) | b1
        word = np.where(word >= 32768, word - 65536, word)
        delta = np.where(short, np.where(same, b0, -b0), np.where(same, 0, word))
        out[:, axis] = np.cumsum(delta)
    return out, (fl & 1).astype(bool), ends_arr.tolist()


# Type 2 charstring operators the fast decoder reads (Adobe TN #5177, Appendix A).
_T2_BIAS = ((1240, 107), (33900, 1131))


def _t2_bias(count: int) -> int:
    for limit, bias in _T2_BIAS:
        if count < limit:
            return bias
    return 32768


class _T2Reader:
    """Type 2 charstring outlines (Adobe TN #5177, §4) read straight from the bytecode.

    Path operators, hints (skipped, counting stems for the hint masks), subroutine calls
    and the optional width are handled; arithmetic and storage operators, ``seac``-style
    ``endchar`` accents and CFF2's blend raise :class:`_Unsupported`, and fontTools'
    interpreter reads that glyph instead. Contours are returned as point lists of
    segments in font coordinates; each ``moveto`` and ``endchar`` closes the current one.
    """

    def __init__(self, local: Sequence[Any], global_: Sequence[Any]) -> None:
        self.local = local
        self.global_ = global_
        self.lbias = _t2_bias(len(local))
        self.gbias = _t2_bias(len(global_))

    def read(self, bytecode: bytes) -> list[tuple[list[float], list[int]]]:
        """Contours of one charstring: (flat x, y list with shared end points stored once,
        control-point count of each segment), in font coordinates."""
        self.contours: list[tuple[list[float], list[int]]] = []
        self.flat: list[float] = []
        self.sizes: list[int] = []
        self.start = (0.0, 0.0)
        self.x = 0.0
        self.y = 0.0
        self.stems = 0
        self.width_done = False
        self.open = False
        self.stack: list[float] = []
        self.ended = False
        self.run(bytecode, 0)
        if not self.ended:
            raise _Unsupported  # no endchar: leave the judgement to fontTools
        return self.contours

    def close(self) -> None:
        if self.open and self.sizes:
            if (self.x, self.y) != self.start:
                self.flat.extend(self.start)
                self.sizes.append(2)
            self.contours.append((self.flat, self.sizes))
        self.flat = []
        self.sizes = []
        self.open = False

    def width(self, expected_even: bool, count: int) -> None:
        if not self.width_done:
            self.width_done = True
            extra = (len(self.stack) % 2 == 1) if expected_even else len(self.stack) > count
            if extra:
                del self.stack[0]

    def line(self, dx: float, dy: float) -> None:
        self.x += dx
        self.y += dy
        self.flat.extend((self.x, self.y))
        self.sizes.append(2)

    def curve(self, a: float, b: float, c: float, d: float, e: float, f: float) -> None:
        x1 = self.x + a
        y1 = self.y + b
        x2 = x1 + c
        y2 = y1 + d
        self.x = x2 + e
        self.y = y2 + f
        self.flat.extend((x1, y1, x2, y2, self.x, self.y))
        self.sizes.append(4)

    def move(self, dx: float, dy: float) -> None:
        self.close()
        self.x += dx
        self.y += dy
        self.start = (self.x, self.y)
        self.flat = [self.x, self.y]
        self.open = True

    def run(self, code: bytes, depth: int) -> bool:  # noqa: C901 (older than the complexity gate; split when next changed)
        """Execute ``code``; True when ``endchar`` was reached."""
        if depth > 10:  # TN #5177: the subroutine nesting limit is 10
            raise FontReadError("charstring subroutines nest deeper than 10")
        st = self.stack
        i = 0
        n = len(code)
        while i < n:
            b0 = code[i]
            i += 1
            if b0 >= 32:
                if b0 <= 246:
                    st.append(b0 - 139)
                elif b0 <= 250:
                    st.append((b0 - 247) * 256 + code[i] + 108)
                    i += 1
                elif b0 <= 254:
                    st.append(-(b0 - 251) * 256 - code[i] - 108)
                    i += 1
                else:
                    st.append(int.from_bytes(code[i : i + 4], "big", signed=True) / 65536.0)
                    i += 4
                continue
            if b0 == 28:
                st.append(int.from_bytes(code[i : i + 2], "big", signed=True))
                i += 2
                continue
            if b0 == 8:  # rrcurveto
                for k in range(0, len(st) - 5, 6):
                    self.curve(*st[k : k + 6])
            elif b0 == 5:  # rlineto
                for k in range(0, len(st) - 1, 2):
                    self.line(st[k], st[k + 1])
            elif b0 in (6, 7):  # hlineto, vlineto
                horizontal = b0 == 6
                for v in st:
                    if horizontal:
                        self.line(v, 0.0)
                    else:
                        self.line(0.0, v)
                    horizontal = not horizontal
            elif b0 in (30, 31):  # vhcurveto, hvcurveto
                horizontal = b0 == 31
                k, m = 0, len(st)
                while k + 4 <= m:
                    last = st[k + 4] if m - k == 5 else 0.0
                    a, b, c, d = st[k : k + 4]
                    if horizontal:
                        self.curve(a, 0.0, b, c, last, d)
                    else:
                        self.curve(0.0, a, b, c, d, last)
                    k += 5 if m - k == 5 else 4
                    horizontal = not horizontal
            elif b0 == 27:  # hhcurveto
                k = 0
                dy1 = 0.0
                if len(st) % 2:
                    dy1 = st[0]
                    k = 1
                while k + 4 <= len(st):
                    self.curve(st[k], dy1, st[k + 1], st[k + 2], st[k + 3], 0.0)
                    dy1 = 0.0
                    k += 4
            elif b0 == 26:  # vvcurveto
                k = 0
                dx1 = 0.0
                if len(st) % 2:
                    dx1 = st[0]
                    k = 1
                while k + 4 <= len(st):
                    self.curve(dx1, st[k], st[k + 1], st[k + 2], 0.0, st[k + 3])
                    dx1 = 0.0
                    k += 4
            elif b0 == 24:  # rcurveline
                m = len(st) - 2
                for k in range(0, m - 5, 6):
                    self.curve(*st[k : k + 6])
                self.line(st[m], st[m + 1])
            elif b0 == 25:  # rlinecurve
                m = len(st) - 6
                for k in range(0, m - 1, 2):
                    self.line(st[k], st[k + 1])
                self.curve(*st[m : m + 6])
            elif b0 == 21:  # rmoveto
                self.width(False, 2)
                self.move(st[-2], st[-1])
            elif b0 == 22:  # hmoveto
                self.width(False, 1)
                self.move(st[-1], 0.0)
            elif b0 == 4:  # vmoveto
                self.width(False, 1)
                self.move(0.0, st[-1])
            elif b0 in (1, 3, 18, 23):  # hstem, vstem, hstemhm, vstemhm
                self.width(True, 0)
                self.stems += len(st) // 2
            elif b0 in (19, 20):  # hintmask, cntrmask (with an implied vstem before)
                if st:
                    self.width(True, 0)
                    self.stems += len(st) // 2
                self.width_done = True
                i += (self.stems + 7) // 8
            elif b0 in (10, 29):  # callsubr, callgsubr
                subrs, bias = (self.local, self.lbias) if b0 == 10 else (self.global_, self.gbias)
                index = int(st.pop()) + bias
                if not 0 <= index < len(subrs):
                    raise FontReadError(f"charstring calls subroutine {index}, not in the font")
                sub = subrs[index]
                code_sub = getattr(sub, "bytecode", None)
                if code_sub is None:
                    raise _Unsupported
                if self.run(code_sub, depth + 1):
                    return True
                continue  # the subroutine's operands stay on the stack
            elif b0 == 11:  # return
                return False
            elif b0 == 14:  # endchar
                if len(st) >= 4:
                    raise _Unsupported  # seac-style accented glyph (4 arguments)
                self.width(False, 0)
                self.close()
                self.ended = True
                return True
            elif b0 == 12:
                b1 = code[i]
                i += 1
                if b1 == 35:  # flex
                    self.curve(*st[0:6])
                    self.curve(*st[6:12])
                elif b1 == 34:  # hflex
                    dx1, dx2, dy2, dx3, dx4, dx5, dx6 = st[:7]
                    self.curve(dx1, 0.0, dx2, dy2, dx3, 0.0)
                    self.curve(dx4, 0.0, dx5, -dy2, dx6, 0.0)
                elif b1 == 36:  # hflex1
                    dx1, dy1, dx2, dy2, dx3, dx4, dx5, dy5, dx6 = st[:9]
                    self.curve(dx1, dy1, dx2, dy2, dx3, 0.0)
                    self.curve(dx4, 0.0, dx5, dy5, dx6, -(dy1 + dy2 + dy5))
                elif b1 == 37:  # flex1
                    args = st[:11]
                    dx = sum(args[0:10:2])
                    dy = sum(args[1:10:2])
                    self.curve(*args[0:6])
                    if abs(dx) > abs(dy):
                        self.curve(args[6], args[7], args[8], args[9], args[10], -dy)
                    else:
                        self.curve(args[6], args[7], args[8], args[9], -dx, args[10])
                else:
                    raise _Unsupported  # arithmetic, storage, dotsection...
            else:
                raise _Unsupported  # CFF2 blend / vsindex, reserved operators
            st.clear()
        return False


def _truetype_glyph(font: Any, name: str, where: str) -> _Glyph:
    glyf = font["glyf"]
    advance = float(font["hmtx"][name][0]) if name in font["hmtx"].metrics else 0.0
    if name in glyf.glyphs and not getattr(glyf.glyphs[name], "data", True):
        return _Glyph(name, [], [], (), advance, True)  # no data: an empty glyph
    raw = getattr(glyf.glyphs.get(name), "data", None)
    if raw:
        try:
            xy, on, ends = _glyf_coordinates(raw, f"{where}: glyph {name!r}")
            xy[:, 1] = 0.0 - xy[:, 1]
            contours, _ = _quadratic_contours(xy, on, ends)
            return _Glyph(name, contours, [None] * len(contours), (), advance, True)
        except _Unsupported:
            pass
    g = glyf[name]
    if g.numberOfContours == 0:
        return _Glyph(name, [], [], (), advance, True)
    coords, ends, flags = g.getCoordinates(glyf)
    fl = np.frombuffer(bytes(flags), dtype=np.uint8)
    if np.any(fl & 0x80):  # cubic glyf outlines (the glyf version 1 extension)
        return _pen_glyph(font.getGlyphSet(), name, where, advance)
    xy = np.array(coords.array if hasattr(coords, "array") else list(coords), dtype=np.float64)
    xy = xy.reshape(-1, 2)
    integer = bool(np.all(xy == np.round(xy)))
    xy[:, 1] = 0.0 - xy[:, 1]
    on = (fl & 1).astype(bool)
    contours, kept = _quadratic_contours(xy, on, list(ends))
    components: tuple[str, ...] = ()
    if g.isComposite():
        components = tuple(c.glyphName for c in g.components)
        try:
            every = _truetype_origins(glyf, name, None, 0)
        except FontReadError as exc:
            raise FontReadError(f"{where}: glyph {name!r}: {exc}") from None
        origins = [every[k] for k in kept]
    else:
        origins = [None] * len(contours)
    return _Glyph(name, contours, origins, components, advance, integer)


def _cff_glyph(
    font: Any, readers: dict[int, _T2Reader], name: str, where: str, advance: float
) -> _Glyph:
    """A CFF glyph through :class:`_T2Reader`, or fontTools' interpreter for what it leaves."""
    charstrings = font["CFF "].cff.topDictIndex[0].CharStrings
    cs = charstrings[name]
    code = getattr(cs, "bytecode", None)
    if code is not None:
        private = cs.private
        reader = readers.get(id(private))
        if reader is None:
            reader = _T2Reader(getattr(private, "Subrs", None) or [], cs.globalSubrs or [])
            readers[id(private)] = reader
        try:
            found = reader.read(code)
        except _Unsupported:
            found = None
        except (IndexError, ValueError) as exc:
            raise FontReadError(f"{where}: glyph {name!r}: bad charstring: {exc}") from None
        if found is not None:
            contours = [_contour_from_flat(flat, sizes, True) for flat, sizes in found]
            integer = all(
                bool(np.all(b == np.round(b)))
                for b in (_owner(c.segments[0]) for c in contours if c.segments)
            )
            return _Glyph(name, contours, [None] * len(contours), (), advance, integer)
    return _pen_glyph(font.getGlyphSet(), name, where, advance)


# Simple TrueType glyphs built together in one array pass: enough to spread the per-call
# cost of numpy over many glyphs, few enough that the pass's temporary arrays stay small
# next to the outlines (measured on benchmarks/bench_fonts.py's 150,000-segment font: peak
# memory of reading 239 bytes per segment with batches of 256 glyphs, 497 in one pass).
_GLYPH_BATCH = 256


def _simple_truetype(
    simple: list[tuple[int, str, FloatArray, NDArray[np.bool_], list[int]]],
    slots: list[_Glyph | None],
    hmtx: Any,
) -> None:
    """Outlines of every simple TrueType glyph at once (one :func:`_quadratic_contours` pass
    over all their points), put into their slots."""
    counts = [len(ends) for _, _, _, _, ends in simple]
    sizes = [xy.shape[0] for _, _, xy, _, _ in simple]
    xy_all = np.concatenate([xy for _, _, xy, _, _ in simple]) if simple else np.zeros((0, 2))
    xy_all[:, 1] = 0.0 - xy_all[:, 1]
    on_all = np.concatenate([on for _, _, _, on, _ in simple])
    base = np.concatenate(([0], np.cumsum(sizes)[:-1])).astype(np.intp)
    ends_all = (
        np.concatenate(
            [
                np.asarray(e, dtype=np.intp) + b
                for (_, _, _, _, e), b in zip(simple, base, strict=True)
            ]
        )
        if any(counts)
        else np.zeros(0, dtype=np.intp)
    )
    contours, kept = _quadratic_contours(xy_all, on_all, ends_all.tolist())
    glyph_of = np.repeat(np.arange(len(simple)), counts)[kept] if kept else np.zeros(0, np.intp)
    per = np.bincount(glyph_of, minlength=len(simple)).tolist()
    at = 0
    metrics = hmtx.metrics
    for (slot, name, _, _, _), k in zip(simple, per, strict=True):
        mine = contours[at : at + k]
        at += k
        advance = float(metrics[name][0]) if name in metrics else 0.0
        slots[slot] = _Glyph(name, mine, [None] * k, (), advance, True)


def _truetype_origins(glyf: Any, name: str, prefix: str | None, depth: int) -> list[str | None]:
    if depth > 32:
        raise FontReadError(f"component {name!r} nests too deep (a cycle?)")
    g = glyf[name]
    if not g.isComposite():
        return [prefix] * max(g.numberOfContours, 0)
    out: list[str | None] = []
    for comp in g.components:
        sub = comp.glyphName if prefix is None else f"{prefix}/{comp.glyphName}"
        out.extend(_truetype_origins(glyf, comp.glyphName, sub, depth + 1))
    return out


def _pen_glyph(glyphset: Any, name: str, where: str, advance: float) -> _Glyph:
    pen = _SegmentPen(glyphset, f"{where}: glyph {name!r}")
    glyphset[name].draw(pen.pen)
    return _Glyph(
        name,
        pen.contours,
        pen.origins,
        (),
        advance,
        _all_integer(pen.points),
    )


def _read_binary(
    path: str, where: str, glyphs: Any
) -> tuple[list[_Glyph], FontSource, list[ReadNote], Exception | None]:
    from fontTools.ttLib import TTFont

    try:
        font = TTFont(path, lazy=True)
        order = list(font.getGlyphOrder())
        upem = float(font["head"].unitsPerEm)
    except OSError:
        raise
    except Exception as exc:  # fontTools raises many types for a damaged file
        raise FontReadError(f"{where}: not a readable OpenType font: {exc}") from None
    notes: list[ReadNote] = []
    try:
        if "glyf" in font:
            flavour: Flavour = "truetype"
        elif "CFF " in font:
            flavour = "cff"
        elif "CFF2" in font:
            flavour = "cff2"
        else:
            raise FontReadError(f"{where}: the font has no glyf, CFF or CFF2 outlines")
        try:
            cmap = font.getBestCmap() or {}
        except Exception:  # a damaged cmap only matters for U+ selections
            cmap = {}
        names = select_glyphs(glyphs, order, cmap, where)
        if "fvar" in font:
            notes.append(
                ReadNote(
                    "info",
                    f"{where}: variable font: the default instance is read",
                    "variable-font",
                )
            )
        out: list[_Glyph] = []
        error: Exception | None = None
        glyphset = font.getGlyphSet() if flavour == "cff2" else None
        readers: dict[int, _T2Reader] = {}
        hmtx = font["hmtx"]
        simple: list[tuple[int, str, FloatArray, NDArray[np.bool_], list[int]]] = []
        slots: list[_Glyph | None] = []
        for name in names:
            try:
                if flavour == "truetype":
                    raw = getattr(font["glyf"].glyphs.get(name), "data", None)
                    if raw:
                        try:
                            xy, on, ends = _glyf_coordinates(raw, f"{where}: glyph {name!r}")
                            simple.append((len(slots), name, xy, on, ends))
                            slots.append(None)
                            if len(simple) == _GLYPH_BATCH:
                                _simple_truetype(simple, slots, hmtx)
                                simple = []
                            continue
                        except _Unsupported:
                            pass
                    slots.append(_truetype_glyph(font, name, where))
                elif flavour == "cff":
                    adv = float(hmtx[name][0]) if name in hmtx.metrics else 0.0
                    slots.append(_cff_glyph(font, readers, name, where, adv))
                else:
                    adv = float(hmtx[name][0]) if name in hmtx.metrics else 0.0
                    slots.append(_pen_glyph(glyphset, name, where, adv))
            except FontReadError as exc:
                error = _first_error(error, exc, notes)
            except Exception as exc:  # a damaged glyph: report it, read the others
                err = FontReadError(f"{where}: glyph {name!r} cannot be read: {exc}")
                error = _first_error(error, err, notes)
        if simple:
            _simple_truetype(simple, slots, hmtx)
        out = [g for g in slots if g is not None]
    finally:
        font.close()
    src = FontSource(path, flavour, upem, tuple(order))
    return out, src, notes, error


def _read_ufo(  # noqa: C901 (older than the complexity gate; split when next changed)
    path: str, where: str, glyphs: Any
) -> tuple[list[_Glyph], FontSource, list[ReadNote], Exception | None]:
    import ufoLib2
    from fontTools.misc.transform import Transform
    from fontTools.ufoLib import UFOReader

    if not os.path.isdir(path):
        if os.path.exists(path):
            raise FontReadError(f"{where}: a UFO source is a folder, this is a file")
        raise FileNotFoundError(2, "No such file or directory", path)
    try:
        font = ufoLib2.Font.open(path, lazy=True)
        layer = font.layers.defaultLayer
        reader = UFOReader(path, validate=False)
        glyph_set = reader.getGlyphSet()
        files = dict(glyph_set.contents)
        layer_dir = os.path.join(path, _default_layer_dir(reader))
    except OSError:
        raise
    except Exception as exc:
        raise FontReadError(f"{where}: not a readable UFO source: {exc}") from None
    names_in_layer = list(layer.keys())
    listed = [n for n in font.glyphOrder if n in files]
    seen = set(listed)
    order = listed + sorted(n for n in names_in_layer if n not in seen)
    cmap: dict[int, str] = {}
    notes: list[ReadNote] = []
    error: Exception | None = None
    wants_cmap = glyphs is not None and "u+" in (
        glyphs.lower() if isinstance(glyphs, str) else ",".join(glyphs).lower()
    )
    if wants_cmap:  # loading every glyph only to map code points: only when asked for
        for n in order:
            try:
                for u in layer[n].unicodes:
                    cmap.setdefault(u, n)
            except Exception:  # an unreadable glif is reported below when selected
                pass
    names = select_glyphs(glyphs, order, cmap, where)
    upem = font.info.unitsPerEm
    others = [ly.name for ly in font.layers if ly is not layer]
    if others:
        notes.append(
            ReadNote(
                "info",
                f"{where}: {len(others)} other layer(s) not read (first: {others[0]})",
                "layers",
                len(others),
            )
        )

    def contours_of(name: str, matrix: Any, prefix: str | None, depth: int, acc: _Glyph) -> None:
        if depth > 32:
            raise FontReadError(f"{where}: glyph {name!r}: components nest too deep (a cycle?)")
        g = layer[name]
        for k, c in enumerate(g.contours):
            segs, closed, joins = _ufo_segments(c.points, f"{where}: glyph {name!r} contour {k}")
            if not segs:
                continue
            if matrix is not None:
                tp = matrix.transformPoints
                segs = [tp(s) for s in segs]
            for s in segs:
                for p in s:
                    if not (float(p[0]).is_integer() and float(p[1]).is_integer()):
                        acc.integer = False
                    if not (math.isfinite(p[0]) and math.isfinite(p[1])):
                        raise FontReadError(f"{where}: glyph {name!r}: a coordinate is not finite")
            acc.contours.append(_contour_from_segments(segs, closed, joins))
            acc.origins.append(prefix)
        for comp in g.components:
            base = comp.baseGlyph
            if base not in layer:
                raise FontReadError(
                    f"{where}: glyph {name!r}: component {base!r} is not in the source"
                )
            t = Transform(*comp.transformation)
            m = t if matrix is None else matrix.transform(t)
            sub = base if prefix is None else f"{prefix}/{base}"
            contours_of(base, m, sub, depth + 1, acc)

    out: list[_Glyph] = []
    for name in names:
        try:
            g = layer[name]
            acc = _Glyph(
                name, [], [], tuple(c.baseGlyph for c in g.components), float(g.width), True
            )
            contours_of(name, None, None, 0, acc)
            out.append(acc)
        except FontReadError as exc:
            error = _first_error(error, exc, notes)
        except Exception as exc:
            err = FontReadError(f"{where}: glyph {name!r} cannot be read: {exc}")
            error = _first_error(error, err, notes)
    src = FontSource(
        path,
        "ufo",
        float(upem) if upem is not None else None,
        tuple(order),
        writable=True,
        font=font,
        layer_dir=layer_dir,
        glif_files=files,
    )
    return out, src, notes, error


def _default_layer_dir(reader: Any) -> str:
    try:
        name = reader.getDefaultLayerName()
        for layer_name, directory in reader._readLayerContents(False):  # noqa: SLF001
            if layer_name == name:
                return str(directory)
    except Exception:
        pass
    return "glyphs"


def read_font(
    path: str | os.PathLike[str], *, glyphs: str | Iterable[str] | None = None
) -> ReadResult:
    """Read a ``.ttf``/``.otf`` font or a ``.ufo`` source into a document, one outline a glyph.

    Parameters
    ----------
    path : str or path-like
        The font file or UFO folder.
    glyphs : str or iterable of str, optional
        Which glyphs (see :func:`select_glyphs`); default every glyph.

    Returns
    -------
    ReadResult
        The document (outlines in glyph order; see the module docstring for coordinates and
        scale), notes (units per em, composites decomposed, empty glyphs, variable font,
        other layers), and the first glyph that could not be read (``error``; that glyph has
        no outline, every other glyph is read).

    Raises
    ------
    FontReadError
        Not a font or UFO, no outlines, a bad glyph selection.
    OSError
        The file cannot be opened.

    Examples
    --------
    >>> read_font("missing.ttf")  # doctest: +SKIP
    Traceback (most recent call last):
    FileNotFoundError: ...
    """
    p = os.fspath(path)
    where = p
    if glyphs is not None and not isinstance(glyphs, str):
        glyphs = list(glyphs)  # read twice (code points asked for? then the selection)
    suffix = Path(p.rstrip("/\\")).suffix.lower()
    if suffix == ".ufo":
        found, src, notes, error = _read_ufo(p, where, glyphs)
    elif suffix in BINARY_FONT_SUFFIXES:
        found, src, notes, error = _read_binary(p, where, glyphs)
    else:
        raise FontReadError(
            f"{where}: not a font (expected a name ending in {', '.join(FONT_SUFFIXES)})"
        )
    index = {n: i for i, n in enumerate(src.glyph_order)}
    outlines = []
    empty: list[str] = []
    composite: list[str] = []
    integer = True
    lo = np.full(2, np.inf)
    hi = np.full(2, -np.inf)
    bases: dict[int, FloatArray] = {}
    for g in found:
        ref = GlyphRef(
            g.name,
            tuple(g.contours),
            tuple(g.origins),
            g.components,
            g.advance,
            1.0 if g.integer else None,
        )
        integer = integer and g.integer
        if not g.contours:
            empty.append(g.name)
        if g.components:
            composite.append(g.name)
        for c in g.contours:
            if c.segments:
                b = _owner(c.segments[0])
                bases[id(b)] = b
        outlines.append(
            Outline(
                tuple(g.contours),
                element_id=g.name,
                source_index=index.get(g.name, -1),
                tag="glyph",
                source=ref,
            )
        )
    src.grid_step = 1.0 if integer else None
    upem = src.units_per_em
    lead = [
        ReadNote(
            "info" if upem else "warning",
            f"{where}: {upem:g} units per em; lengths are in font units"
            if upem
            else f"{where}: the source states no units per em; lengths are in font units",
            "units-per-em",
        ),
        ReadNote(
            "info",
            f"{where}: y axis flipped: a font point (x, y) is read as (x, -y) so glyphs show "
            "upright",
            "y-flip",
        ),
    ]
    if composite:
        first_parts = next(g.components for g in found if g.name == composite[0])
        lead.append(
            ReadNote(
                "info",
                f"{where}: {len(composite)} composite glyph(s) decomposed (first: "
                f"{composite[0]} = {' + '.join(first_parts)})",
                "composite",
                len(composite),
            )
        )
    if empty:
        lead.append(_empty_note(where, empty))
    for b in bases.values():  # each point array once (several glyphs may share one)
        lo = np.minimum(lo, b.min(axis=0))
        hi = np.maximum(hi, b.max(axis=0))
    view_box = None
    if np.all(hi > lo):
        view_box = (float(lo[0]), float(lo[1]), float(hi[0] - lo[0]), float(hi[1] - lo[1]))
    doc = Document(
        outlines=tuple(outlines),
        view_box=view_box,
        mm_per_unit=FONT_MM_PER_UNIT,
        units="px",
        source=src,
        path=p,
    )
    return ReadResult(doc, lead + notes, error)  # type: ignore[arg-type]


def load_font(path: str | os.PathLike[str], **kwargs: Any) -> Document:
    """Read a font strictly: the document, or the first glyph error raised.

    Parameters
    ----------
    path : str or path-like
    **kwargs
        As :func:`read_font`.

    Raises
    ------
    FontReadError
        A glyph cannot be read, and as :func:`read_font`.
    """
    result = read_font(path, **kwargs)
    if result.error is not None:
        raise result.error
    return result.document


def contour_origin(doc: Document, outline: int, contour: int) -> str | None:
    """The glyph and component a contour comes from: ``"Aacute"`` or ``"Aacute/acute"``.

    Parameters
    ----------
    doc : Document
    outline : int
        Index of the outline in ``doc.outlines``.
    contour : int
        Index of the contour within that outline.

    Returns
    -------
    str or None
        None when the outline is not a glyph outline, or the contour was added after
        reading.
    """
    o = doc.outlines[outline]
    ref = o.source
    if not isinstance(ref, GlyphRef):
        return None
    c = o.contours[contour]
    for k, read in enumerate(ref.contours):
        if read is c:
            origin = ref.origins[k]
            return ref.name if origin is None else f"{ref.name}/{origin}"
    return ref.name
