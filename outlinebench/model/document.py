"""The document model: documents, outlines, contours and join intent as immutable values.

Values are frozen dataclasses. Segments are float64 ``(K, 2)`` control-point arrays marked
read-only, so they can be shared between a document and the next version of it without
copying: an edit builds a new contour (and a new outline and document around it) and keeps
every untouched contour and segment as the same object. Code that needs to know what an edit
changed (incremental diagnostics, repainting) compares objects with ``is``.

Coordinates are the SVG root's user units after every element transform has been applied
(see ``Outline.transform`` for the way back to the element's own coordinates).

Joins
-----
Join ``j`` of a contour is where segment ``j`` ends and segment ``j + 1`` begins. An open
contour with n segments has n − 1 joins; a closed one has n, the last joining segment n − 1
back to segment 0. Consecutive segments share their end points exactly (the same float
values); a closed contour's last segment ends exactly where its first begins.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass, field, replace
from typing import Any, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from outlinebench.errors import InvalidGeometryError
from outlinebench.geometry.bezier import KIND_BY_DEGREE, as_control_points

__all__ = [
    "JoinIntent",
    "JOIN_INTENTS",
    "frozen_points",
    "Contour",
    "Outline",
    "Document",
    "ContourRef",
    "IDENTITY",
    "documents_equal",
]

JoinIntent = Literal["smooth", "corner"]
JOIN_INTENTS: tuple[str, ...] = ("smooth", "corner")

IDENTITY: NDArray[np.float64] = np.eye(3)
IDENTITY.flags.writeable = False


def frozen_points(points: ArrayLike) -> NDArray[np.float64]:
    """Validate control points and return them as a read-only float64 array.

    Raises
    ------
    InvalidGeometryError
        As :func:`outlinebench.geometry.as_control_points`.
    """
    arr = as_control_points(points)
    arr.flags.writeable = False
    return arr


def _frozen_matrix(m: ArrayLike) -> NDArray[np.float64]:
    arr = np.array(m, dtype=np.float64)
    if arr.shape != (3, 3) or not np.all(np.isfinite(arr)):
        raise InvalidGeometryError(f"a transform must be a finite 3×3 matrix, got {arr.shape}")
    arr.flags.writeable = False
    return arr


@dataclass(frozen=True, eq=False, slots=True)
class Contour:
    """An open or closed chain of line, quadratic and cubic segments.

    Parameters
    ----------
    segments : tuple of ndarray, each (K, 2), read-only
        Consecutive segments share end points exactly.
    closed : bool
        Whether the contour ends where it starts and is meant to be closed (``Z``).
    joins : tuple of (JoinIntent or None)
        One entry per join (see module docstring); None means no intent is stated, and checks
        infer it from the angle.
    """

    segments: tuple[NDArray[np.float64], ...]
    closed: bool = False
    joins: tuple[JoinIntent | None, ...] = ()

    def __post_init__(self) -> None:
        n = len(self.segments)
        want = n if self.closed else max(n - 1, 0)
        if len(self.joins) == 0 and want:
            object.__setattr__(self, "joins", (None,) * want)
        elif len(self.joins) != want:
            raise InvalidGeometryError(
                f"a {'closed' if self.closed else 'open'} contour of {n} segments has {want} "
                f"joins, got {len(self.joins)} join intents"
            )

    @classmethod
    def from_points(
        cls,
        segments: Iterable[ArrayLike],
        closed: bool = False,
        joins: Sequence[JoinIntent | None] = (),
    ) -> Contour:
        """Build a contour from plain control-point lists, validating and freezing them.

        End points are made to coincide exactly: each segment's first point is set to the
        previous segment's last point (and, when closed, the last segment's end to the first
        segment's start), after checking they agree within 1e-9 of the contour's size.
        """
        segs = [as_control_points(s) for s in segments]
        count = len(segs)
        if count:
            every = np.concatenate(segs)
            # Allowed mismatch: 1e-9 of the contour's size (at least 1e-9 unit), plus a few
            # units in the last place of its largest coordinate, so rounding far from the
            # origin is tolerated but a real gap is not hidden there.
            size = float(np.max(np.ptp(every, axis=0)))
            far = float(np.max(np.abs(every)))
            snap = 1e-9 * max(1.0, size) + 8.0 * float(np.spacing(far))
        for i in range(count - 1 + (1 if closed and count else 0)):
            a, b = segs[i], segs[(i + 1) % count]
            if np.max(np.abs(a[-1] - b[0])) > snap:
                raise InvalidGeometryError(
                    f"segment {i} ends at ({a[-1][0]:.17g}, {a[-1][1]:.17g}) but segment "
                    f"{(i + 1) % count} starts at ({b[0][0]:.17g}, {b[0][1]:.17g})"
                )
            b[0] = a[-1]
        frozen = []
        for s in segs:
            s.flags.writeable = False
            frozen.append(s)
        return cls(tuple(frozen), closed, tuple(joins))

    # -- derived, read-only views -------------------------------------------------------
    @property
    def segment_count(self) -> int:
        return len(self.segments)

    @property
    def join_count(self) -> int:
        return len(self.joins)

    def kinds(self) -> list[str]:
        """Segment kinds in order: "line", "quad" or "cubic"."""
        return [KIND_BY_DEGREE[s.shape[0] - 1] for s in self.segments]

    def join_segments(self, j: int) -> tuple[int, int]:
        """Indices (incoming, outgoing) of the segments meeting at join j."""
        n = len(self.segments)
        return j, (j + 1) % n

    def on_curve_points(self) -> NDArray[np.float64]:
        """Start point of every segment, then the end of the last one if the contour is open."""
        if not self.segments:
            return np.zeros((0, 2))
        pts = [s[0] for s in self.segments]
        if not self.closed:
            pts.append(self.segments[-1][-1])
        return np.array(pts)

    def with_segments(
        self, segments: Sequence[NDArray[np.float64]], joins: Sequence[JoinIntent | None]
    ) -> Contour:
        """A copy with other segments and joins (same closedness). Arrays must be frozen."""
        return replace(self, segments=tuple(segments), joins=tuple(joins))


@dataclass(frozen=True, eq=False, slots=True)
class Outline:
    """One SVG path or basic shape, with its contours.

    Parameters
    ----------
    contours : tuple of Contour
    element_id : str or None
        The element's ``id`` attribute, kept for reports and for writing back.
    source_index : int
        Position of the element among the file's geometry elements in document order
        (0-based); -1 for an outline created in the editor. Findings call this ``outline``.
    tag : str
        The SVG element it came from ("path", "rect", "circle", ...) or "path" when new.
    transform : ndarray, shape (3, 3), read-only
        Affine map from the element's own coordinates to the root's user units (the product
        of every ``transform`` on the way down). The writer applies its inverse.
    source : Any
        Opaque handle the SVG writer uses to find the element again (None when new).
    fill_rule : {"nonzero", "evenodd"}
        The SVG ``fill-rule`` the outline is drawn with (W3C SVG 2 §13.4.2): which parts of
        the plane its contours fill.
    """

    contours: tuple[Contour, ...]
    element_id: str | None = None
    source_index: int = -1
    tag: str = "path"
    transform: NDArray[np.float64] = field(default_factory=lambda: IDENTITY)
    source: Any = None
    fill_rule: str = "nonzero"

    def __post_init__(self) -> None:
        if self.transform is not IDENTITY:
            object.__setattr__(self, "transform", _frozen_matrix(self.transform))


@dataclass(frozen=True, eq=False, slots=True)
class Document:
    """A whole file's worth of outlines and its physical scale.

    Parameters
    ----------
    outlines : tuple of Outline
        In document order.
    width_mm, height_mm : float or None
        The root's width and height converted to millimetres (None when the file states
        neither).
    view_box : tuple of 4 floats or None
        ``(min_x, min_y, width, height)`` of the root ``viewBox``.
    mm_per_unit : float
        Millimetres per user unit, from width/height and viewBox, else 25.4 / 96 (CSS px).
    units : str
        The unit the file's width/height were written in ("mm", "in", "px", ...); the editor
        shows coordinates in it.
    source : Any
        Opaque handle the SVG writer uses to write back into the original XML tree.
    path : str or None
        The file it was read from.
    """

    outlines: tuple[Outline, ...] = ()
    width_mm: float | None = None
    height_mm: float | None = None
    view_box: tuple[float, float, float, float] | None = None
    mm_per_unit: float = 25.4 / 96.0
    units: str = "px"
    source: Any = None
    path: str | None = None

    def contour_refs(self) -> Iterator[ContourRef]:
        """Every contour with its outline index, index within the outline, and its global
        index in document order (the numbering reports use)."""
        k = 0
        for oi, outline in enumerate(self.outlines):
            for ci, contour in enumerate(outline.contours):
                yield ContourRef(oi, ci, k, contour)
                k += 1

    def contour(self, outline: int, contour: int) -> Contour:
        return self.outlines[outline].contours[contour]

    def segment_count(self) -> int:
        return sum(len(c.segments) for o in self.outlines for c in o.contours)

    def replace_contour(self, outline: int, index: int, new: Contour) -> Document:
        """A new document with one contour replaced (everything else shared)."""
        o = self.outlines[outline]
        contours = o.contours[:index] + (new,) + o.contours[index + 1 :]
        return self.replace_outline(outline, replace(o, contours=contours))

    def replace_outline(self, index: int, new: Outline) -> Document:
        """A new document with one outline replaced (everything else shared)."""
        outlines = self.outlines[:index] + (new,) + self.outlines[index + 1 :]
        return replace(self, outlines=outlines)


@dataclass(frozen=True, slots=True)
class ContourRef:
    """Where a contour sits: its outline, its index there, and its index in the document."""

    outline: int
    index: int
    global_index: int
    contour: Contour


def _contours_equal(a: Contour, b: Contour) -> bool:
    if a is b:
        return True
    if a.closed != b.closed or a.joins != b.joins or len(a.segments) != len(b.segments):
        return False
    return all(
        x is y or (x.shape == y.shape and np.array_equal(x, y))
        for x, y in zip(a.segments, b.segments, strict=True)
    )


def documents_equal(a: Document, b: Document) -> bool:
    """Exact equality of geometry, join intent, element identity and scale (bit for bit)."""
    if a is b:
        return True
    if (
        len(a.outlines) != len(b.outlines)
        or a.width_mm != b.width_mm
        or a.height_mm != b.height_mm
        or a.view_box != b.view_box
        or a.mm_per_unit != b.mm_per_unit
        or a.units != b.units
    ):
        return False
    for oa, ob in zip(a.outlines, b.outlines, strict=True):
        if oa is ob:
            continue
        if (
            oa.element_id != ob.element_id
            or oa.source_index != ob.source_index
            or oa.tag != ob.tag
            or not np.array_equal(oa.transform, ob.transform)
            or len(oa.contours) != len(ob.contours)
        ):
            return False
        if not all(_contours_equal(x, y) for x, y in zip(oa.contours, ob.contours, strict=True)):
            return False
    return True
