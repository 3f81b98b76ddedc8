"""What the cutter will get, computed for the editor's previews: flattened chords and tool offsets.

Qt-free, so the previews can be tested against the library directly:

- :func:`flatten_preview` flattens every contour with
  :func:`outlinebench.geometry.flatten_contours_bounded` (each chord admitted by a proven bound
  of its deviation) and finds where the largest deviation lies with
  :func:`outlinebench.geometry.polyline_deviation` on the contour whose bound is largest.
- :func:`compute_offset` is the one place the offset preview asks for offsets: the library's
  region offset (:func:`outlinebench.offset`: each outline's filled region by its fill rule),
  exactly as ``outlinebench offset`` does.
- :func:`cut_file_bytes` writes either as an SVG cut file in millimetres (the library's
  :func:`outlinebench.io.polylines_svg`, which carries the cutting caution), rounding the
  coordinates to a stated resolution, and :func:`verify_cut_file` reads the bytes back and
  checks every vertex before the file is written.
"""

from __future__ import annotations

import logging
import math
from dataclasses import dataclass, field

import numpy as np

from outlinebench import api
from outlinebench.errors import OutlinebenchError
from outlinebench.geometry import (
    flatten_contours_bounded,
    polyline_deviation,
)
from outlinebench.io import CUT_CAUTION, polylines_svg, read_svg
from outlinebench.model.document import Document

__all__ = [
    "FlattenPreview",
    "OffsetPlace",
    "OffsetPreview",
    "flatten_preview",
    "compute_offset",
    "offset_preview",
    "cut_decimals",
    "cut_file_bytes",
    "verify_cut_file",
    "CUT_CAUTION",
    "MAX_CUT_RESOLUTION_MM",
]

log = logging.getLogger(__name__)

# Coarsest resolution of a cut file's coordinates, mm; also at most 1/1000 of the tolerance
# (cut_decimals). The same rule as the command line's cut files (1e-6 mm: far finer than any
# cutter's step), so a file exported from the editor matches `outlinebench flatten -o`.
MAX_CUT_RESOLUTION_MM = 1e-6


@dataclass(frozen=True, eq=False)
class FlattenPreview:
    """Chords of every contour at one tolerance.

    Attributes
    ----------
    tolerance : float
        ε, user units.
    polylines : list of ndarray (P, 2)
        Per contour (document order); a closed one does not repeat its first vertex.
    closed : list of bool
    chords : int
        Number of chords drawn (a closed polyline of P vertices has P chords).
    bound : float
        Proven upper bound of the deviation (Hausdorff distance) over all contours, ≤ ε.
    bound_contour : int or None
        Global number of the contour with the largest bound.
    where : (x, y) or None
        Where that contour's polyline deviates most from its curve (measured).
    measured : float
        That measured deviation (≤ ``bound``).
    where_segment : int or None
        The segment of ``bound_contour`` nearest ``where``.
    """

    tolerance: float
    polylines: list[np.ndarray]
    closed: list[bool]
    chords: int
    bound: float
    bound_contour: int | None
    where: tuple[float, float] | None
    measured: float
    where_segment: int | None


def flatten_preview(doc: Document, tolerance: float) -> FlattenPreview:
    """Flatten every contour of ``doc`` within ``tolerance`` (user units) with proven bounds.

    Notes
    -----
    The chords are those of :func:`outlinebench.geometry.flatten_contours_bounded` (the
    command line's ``flatten``); its per-contour bound is the largest bound that admitted one
    of the contour's chords, an upper bound of the Hausdorff distance. The place shown is the
    farthest point of that contour from its polyline, measured by branch and bound
    (:func:`outlinebench.geometry.polyline_deviation`, accurate to 1/1000 of ε).
    """
    refs = [r for r in doc.contour_refs()]
    if not tolerance > 0 or not math.isfinite(tolerance):
        raise OutlinebenchError(f"a flattening tolerance must be above 0, got {tolerance!r}")
    polys, bounds = flatten_contours_bounded([r.contour for r in refs], tolerance)
    closed = [bool(r.contour.closed) for r in refs]
    chords = sum(max(len(p) - (0 if c else 1), 0) for p, c in zip(polys, closed, strict=True))
    chords -= sum(1 for p, c in zip(polys, closed, strict=True) if c and len(p) == 1)
    with_segments = [i for i, r in enumerate(refs) if r.contour.segments]
    if not with_segments:
        return FlattenPreview(tolerance, polys, closed, 0, 0.0, None, None, 0.0, None)
    k = max(with_segments, key=lambda i: float(bounds[i]))
    ref = refs[k]
    dev = polyline_deviation(
        ref.contour.segments, polys[k], closed=ref.contour.closed, tolerance=tolerance
    )
    return FlattenPreview(
        tolerance=tolerance,
        polylines=polys,
        closed=closed,
        chords=chords,
        bound=float(bounds[k]),
        bound_contour=ref.global_index,
        where=(dev.x, dev.y),
        measured=float(dev.distance),
        where_segment=int(dev.segment),
    )


@dataclass(frozen=True)
class OffsetPlace:
    """A place where the tool cannot follow the outline (``tool-does-not-fit``, ``vanishes``,
    ``self-intersection``, ``offset-inaccurate``), in user units."""

    kind: str
    contour: int
    segment: int | None
    x: float
    y: float
    message: str


@dataclass(frozen=True, eq=False)
class OffsetPreview:
    """The offset outline at one tool radius, and the places the tool cannot go."""

    distance: float
    tolerance: float
    polylines: list[np.ndarray]
    closed: list[bool]
    places: list[OffsetPlace] = field(default_factory=list)

    @property
    def vanished(self) -> list[OffsetPlace]:
        return [p for p in self.places if p.kind == "vanishes"]


def compute_offset(doc: Document, distance: float, tolerance: float) -> OffsetPreview:
    """Offset the filled region of every outline of ``doc`` by ``distance`` (user units; > 0:
    material grows), exactly as ``outlinebench offset`` does.

    The library's :func:`outlinebench.offset` (the region engine: each outline's region by
    its fill rule, toolpaths that never cross, verified independently); a toolpath set that
    fails verification is shown with an ``unverified-toolpath`` place, and export refuses it.
    """
    try:
        res = api.offset(doc, distance, tolerance=tolerance)
    except OutlinebenchError:
        raise
    except Exception as exc:  # noqa: BLE001 — a fault in the offset must not end editing
        log.exception("offset failed")
        message = f"the offset could not be computed ({type(exc).__name__}: {exc})"
        return OffsetPreview(
            distance, tolerance, [], [], [OffsetPlace("offset-failed", 0, None, 0.0, 0.0, message)]
        )
    polylines = [np.asarray(t["points"], dtype=float) for t in res.toolpaths]
    closed = [bool(t["closed"]) for t in res.toolpaths]
    keep = [k for k, p in enumerate(polylines) if len(p) >= 2]
    places = [
        OffsetPlace(kind, gi, seg, float(x), float(y), message)
        for kind, _sev, _o, gi, seg, _t, x, y, _v, message in res.problems
    ]
    if not res.verified:
        places.append(
            OffsetPlace(
                "unverified-toolpath", 0, None, 0.0, 0.0,
                "the toolpaths failed their independent verification: do not cut them",
            )
        )  # fmt: skip
    return OffsetPreview(
        distance, tolerance, [polylines[k] for k in keep], [closed[k] for k in keep], places
    )


def offset_preview(doc: Document, radius: float, tolerance: float) -> OffsetPreview:
    """The outside-cut preview: ``compute_offset(doc, radius, tolerance)`` for a tool of
    radius ``radius`` > 0 (user units)."""
    if not radius > 0 or not math.isfinite(radius):
        raise OutlinebenchError(f"a tool radius must be above 0, got {radius!r}")
    return compute_offset(doc, radius, tolerance)


def cut_decimals(tolerance_mm: float) -> int:
    """Decimals k of a cut file's millimetre coordinates: 10^-k ≤ min(1e-6 mm, ε/1000).

    Examples
    --------
    >>> cut_decimals(0.01)
    6
    >>> cut_decimals(1e-4)
    7
    """
    limit = min(MAX_CUT_RESOLUTION_MM, tolerance_mm / 1000.0)
    return max(6, int(math.ceil(-math.log10(limit) - 1e-9)))


def _to_mm(doc: Document, polylines: list[np.ndarray]) -> list[np.ndarray]:
    f = doc.mm_per_unit
    origin = np.array(doc.view_box[:2]) if doc.view_box else np.zeros(2)
    return [(np.asarray(p, dtype=float) - origin) * f for p in polylines]


def cut_file_bytes(
    doc: Document,
    polylines: list[np.ndarray],
    closed: list[bool],
    comment: str,
    tolerance: float,
) -> tuple[bytes, float]:
    """An SVG cut file of ``polylines`` (user units) in millimetres, and its resolution (mm).

    Coordinates are rounded to ``cut_decimals(tolerance in mm)`` decimals; a rounded vertex
    moves by at most half a step in x and in y, √2/2 · 10^-k, which the caller adds to its
    stated deviation. The file's first comment is the cutting caution
    (:data:`outlinebench.io.CUT_CAUTION`), the second ``comment``.
    """
    tol_mm = tolerance * doc.mm_per_unit
    k = cut_decimals(tol_mm)
    keep = [(p, c) for p, c in zip(polylines, closed, strict=True) if len(p) >= 2]
    pts = [np.round(p, k) for p in _to_mm(doc, [p for p, _ in keep])]
    width, height = doc.width_mm, doc.height_mm
    if not width or not height:
        if doc.view_box:
            width, height = doc.view_box[2] * doc.mm_per_unit, doc.view_box[3] * doc.mm_per_unit
        else:
            allp = np.vstack(pts) if pts else np.ones((1, 2))
            width = max(float(np.max(allp[:, 0])), 1.0)
            height = max(float(np.max(allp[:, 1])), 1.0)
    try:
        data = polylines_svg(
            pts,
            width_mm=float(width),
            height_mm=float(height),
            comment=comment,
            closed=[c for _, c in keep],
        )
    except ValueError as exc:
        raise OutlinebenchError(f"cannot write the cut file: {exc}") from None
    return data, 10.0**-k


def verify_cut_file(
    data: bytes, doc: Document, polylines: list[np.ndarray], resolution_mm: float
) -> None:
    """Read a cut file's bytes back and check it holds ``polylines`` (user units of ``doc``).

    Raises
    ------
    OutlinebenchError
        The caution is missing, the bytes do not read, or a vertex is more than the rounding
        (√2/2 of ``resolution_mm``, plus floating-point slack) from where it should be.
    """
    text = data.decode("utf-8")
    if CUT_CAUTION not in text:
        raise OutlinebenchError("the cut file lacks the cutting caution; not written")
    result = read_svg(data, on_unsupported="skip")
    if result.error is not None:
        raise OutlinebenchError(f"the cut file does not read back ({result.error}); not written")
    got = [
        np.vstack([s[0] for s in c.segments] + [c.segments[-1][-1]])
        for o in result.document.outlines
        for c in o.contours
        if c.segments
    ]
    want = [p for p in _to_mm(doc, polylines) if len(p) >= 2]
    if len(got) != len(want):
        raise OutlinebenchError(
            f"the cut file reads back {len(got)} polylines instead of {len(want)}; not written"
        )
    f = result.document.mm_per_unit
    slack = resolution_mm * math.sqrt(0.5) + 1e-9 * max(
        1.0, *(float(np.abs(w).max()) for w in want)
    )
    for i, (g, w) in enumerate(zip(got, want, strict=True)):
        g = g * f
        n = min(len(g), len(w))
        if n < len(w) or np.max(np.hypot(*(g[:n] - w[:n]).T)) > slack:
            raise OutlinebenchError(
                f"polyline {i} of the cut file does not read back within {slack:.2g} mm; "
                "not written"
            )
