"""Whole SVG documents read into the document model.

Walks the element tree once, iteratively (no recursion, so thousands of nested groups are
fine), composing transforms; paths and basic shapes become outlines in root user units; ``use``
references are expanded with cycle detection and an instance budget; everything that is not
geometry (text, images, clip paths, masks, hidden elements) is counted and reported, and stays
in the file for the writer.

References
----------
W3C, *SVG 1.1 (Second Edition)*: §5.6 "The 'use' element", §7 "Coordinate Systems,
Transformations and Units", §8 "Paths", §9 "Basic Shapes"; *SVG 2*, §10.2-10.7 (the path
equivalent of each basic shape).
"""

from __future__ import annotations

import math
import os
import re
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import (
    OptionError,
    OutlinebenchError,
    SvgPathError,
    SvgReadError,
    UnsafeXmlError,
    UnsupportedSvgFeature,
)
from outlinebench.io._xml import MAX_BYTES, MAX_ENTITY_CHARS, XmlSource, one_line, parse_xml
from outlinebench.io.numbers import format_number
from outlinebench.io.svg_arc import ARC_TOLERANCE
from outlinebench.io.svg_path import _found, _token_at, read_path_data
from outlinebench.io.svg_style import StyleResolver, css_transform
from outlinebench.io.svg_transform import is_mirroring, parse_transform, translation
from outlinebench.io.svg_units import (
    PX_PER_INCH,
    parse_aspect,
    parse_length,
    parse_view_box,
    view_box_transform,
)
from outlinebench.limits import USE_SEGMENTS
from outlinebench.model.document import IDENTITY, Contour, Document, Outline

__all__ = [
    "SVG_NS",
    "XLINK_NS",
    "JOINS_NS",
    "JOINS_ATTR",
    "MAX_USE_INSTANCES",
    "MAX_USE_SEGMENTS",
    "ReadNote",
    "ReadResult",
    "ElementRef",
    "SvgSource",
    "read_svg",
    "load_svg",
    "shape_path_data",
]

SVG_NS = "http://www.w3.org/2000/svg"
XLINK_NS = "http://www.w3.org/1999/xlink"
# Our own namespace for join intent: one string per contour, one letter per join
# (s = smooth, c = corner, - = not stated), contours separated by ";".
JOINS_NS = "urn:outlinebench:join-intent"
JOINS_PREFIX = "ob"
JOINS_ATTR = f"{{{JOINS_NS}}}joins"
# Largest coordinate measured (user units): squares of lengths and products in the checks must
# stay below the largest double (about 1.8e308), with room for the sums of many segments.
COORDINATE_LIMIT = 1e150
# Most elements expanded through <use> references in one file (fan-out budget).
MAX_USE_INSTANCES = 100_000
# Most segments the <use> instances of one file may expand to: the budget counts the geometry
# an instance draws, not only instances, so a small file cannot expand without bound (a group
# of 100 paths used 10,000 times is 1.2 M segments from 300 KB). 250,000 segments check in
# about 10 s and take well under 500 MB; a drawing that really needs more instances can be
# expanded by its exporter.
MAX_USE_SEGMENTS = USE_SEGMENTS  # stated in outlinebench.limits

_GEOMETRY = {"path", "rect", "circle", "ellipse", "line", "polyline", "polygon"}
_CONTAINERS = {"svg", "g", "a", "switch"}
_NOT_RENDERED = {
    "defs", "symbol", "marker", "pattern", "linearGradient", "radialGradient", "filter",
    "style", "script", "title", "desc", "metadata",
}  # fmt: skip
_NOT_GEOMETRY = {
    "text": "text element(s) not converted to outlines",
    "image": "image(s): not geometry",
    "clipPath": "clip path(s): not applied to the outlines",
    "mask": "mask(s): not applied to the outlines",
    "foreignObject": "foreignObject element(s): not geometry",
}
_RELATIVE = ("%", "em", "ex")
_JOIN_CHARS = {"s": "smooth", "c": "corner", "-": None}
_JOIN_LETTER = {"smooth": "s", "corner": "c", None: "-"}
_STYLE_RE = re.compile(r"(?:^|;)\s*(display|visibility)\s*:\s*([A-Za-z-]+)")
_POINTS_RE = re.compile(r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?")
_TRAILING_DOT = re.compile(r"\.(?:$|[eE])")  # "23." or "1.e1": SVG 1.1 only
_POINTS_OK = re.compile(
    r"[ \t\r\n\f]*+(?:(?>[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)"
    r"[ \t\r\n\f]*+(?:,[ \t\r\n\f]*+)?+)*+"
)

Level = Literal["info", "warning", "error"]


@dataclass(frozen=True)
class ReadNote:
    """Something the reader noticed: converted, skipped or wrong, but not fatal.

    Attributes
    ----------
    level : {"info", "warning", "error"}
    message : str
        One line naming the file and the element(s).
    kind : str
        Short machine-readable key ("text", "arc", "trailing-dot", "use-cycle", ...).
    count : int
        How many occurrences the note stands for.
    """

    level: Level
    message: str
    kind: str = ""
    count: int = 1


@dataclass
class ReadResult:
    """A document read from SVG with its notes and, for bad path data, the first error.

    Attributes
    ----------
    document : Document
        Everything readable; for a bad path, its contours up to the error.
    notes : list of ReadNote
    error : SvgReadError or None
        The first bad-path error (message names file, element and offset).
    """

    document: Document
    notes: list[ReadNote] = field(default_factory=list)
    error: OutlinebenchError | None = None

    @property
    def all_notes(self) -> list[ReadNote]:
        """Every note, with the first bad-path error among them as an error note (first)."""
        if self.error is None:
            return list(self.notes)
        return [ReadNote("error", str(self.error), "path"), *self.notes]

    @property
    def errors(self) -> list[str]:
        """Every error message of the reading, in order (empty when all was read)."""
        return [n.message for n in self.all_notes if n.level == "error"]


@dataclass(eq=False)
class ElementRef:
    """Handle kept in ``Outline.source``: where the outline came from and what was read.

    Attributes
    ----------
    element : Element
        The path or shape element (for a ``use`` instance, the referenced element).
    use : Element or None
        The outermost ``use`` element this outline is an instance of.
    contours : tuple of Contour
        The contours as read; the writer compares the outline's contours with these by
        identity to tell untouched outlines (written back byte for byte) from edited ones.
    matrix : ndarray (3, 3)
        Element coordinates to root user units.
    path_error : bool
        The element's path data had an error (only the part before it was read).
    use_matrix : ndarray (3, 3) or None
        For a ``use`` instance: the use element's own coordinates (its ``transform`` applied,
        not its x/y) to root user units.
    use_direct : bool
        The ``use`` refers straight to this geometry element (no group, symbol or nested
        use in between), so the writer can turn the use into a path when it is edited.
    """

    element: Any
    use: Any
    contours: tuple[Contour, ...]
    matrix: NDArray[np.float64]
    path_error: bool = False
    use_matrix: NDArray[np.float64] | None = None
    use_direct: bool = False


@dataclass(eq=False)
class SvgSource:
    """Handle kept in ``Document.source``: the parsed file for writing back."""

    xml: XmlSource
    path: str | None
    px_per_inch: float


def _local(tag: Any) -> str:
    if not isinstance(tag, str):
        return ""
    if tag.startswith("{"):
        ns, _, name = tag[1:].partition("}")
        return name if ns == SVG_NS else f"{{{ns}}}{name}"
    return tag


def describe(el: Any, index: int | None = None, line: int | None = None) -> str:
    """``<path id="logo">``, ``<rect> #3`` (1-based position among geometry elements) or,
    for other elements, ``<g> at line 12``."""
    tag = _local(el.tag)
    eid = el.get("id")
    if eid:
        return f'<{tag} id="{one_line(eid)}">'
    if index is not None:
        return f"<{tag}> #{index + 1}"
    return f"<{tag}> at line {line}" if line is not None else f"<{tag}>"


# CSS "medium": the initial font-size, 16 px in every common renderer (CSS Fonts 3 §3.5
# leaves it to the user agent; common practice, no source for the number).
INITIAL_FONT_PX = 16.0
# CSS Fonts 3 §3.5, absolute-size keywords as factors of "medium".
_FONT_KEYWORDS = {
    "xx-small": 3 / 5, "x-small": 3 / 4, "small": 8 / 9, "medium": 1.0, "large": 6 / 5,
    "x-large": 3 / 2, "xx-large": 2.0, "xxx-large": 3.0,
}  # fmt: skip
# CSS Fonts 3 §3.5: "larger"/"smaller" step by a factor; 1.2 is the common choice.
_FONT_STEP = 1.2

Axis = Literal["x", "y", "xy"]
# (name, axis, default) -> user units; the default when the attribute is absent or "auto".
Resolve = Any


@dataclass(frozen=True, slots=True)
class _Frame:
    """What an element inherits: its parent's state while walking the tree."""

    matrix: NDArray[np.float64]
    hidden: bool
    chain: tuple[int, ...]  # ids of the elements instantiated by use on the way down
    use: Any  # (outer use element, its coordinate system, refers straight to geometry?)
    viewport: tuple[float, float] | None  # width, height of the nearest viewport, user units
    font: float  # computed font-size, user units
    fill_rule: str
    size: tuple[float | None, float | None] | None = None  # a use's width/height override


def _percent_base(viewport: tuple[float, float], axis: Axis) -> float:
    """SVG 1.1 §7.10: x and widths against the viewport width, y and heights against its
    height, other lengths against sqrt((w² + h²) / 2)."""
    w, h = viewport
    if axis == "x":
        return w
    if axis == "y":
        return h
    return math.sqrt((w * w + h * h) / 2.0)


def _to_user(
    ln: Any, axis: Axis, ppi: float, viewport: tuple[float, float] | None, font: float
) -> float | None:
    """A parsed length in user units; None when it is relative to a viewport we do not know."""
    if ln.unit == "%":
        return None if viewport is None else ln.value / 100.0 * _percent_base(viewport, axis)
    if ln.unit == "em":
        return ln.value * font
    if ln.unit == "ex":
        # CSS Values 3 §6.1.1: where the x-height cannot be determined, 0.5em is assumed.
        return ln.value * font * 0.5
    return ln.to_user(ppi)


def _absolute_resolver(el: Any, where: str, ppi: float) -> Resolve:
    """Lengths read from the element's attributes alone (absolute units, em against 16 px)."""

    def resolve(name: str, axis: Axis, default: float = 0.0) -> float:
        text = el.get(name)
        ln = parse_length(text, where)
        if ln is None:
            return default
        v = _to_user(ln, axis, ppi, None, INITIAL_FONT_PX)
        if v is None:
            raise SvgReadError(f"{where}: relative length {name}={text!r} is not supported")
        return v

    resolve.given = lambda name: parse_length(el.get(name), where) is not None  # type: ignore[attr-defined]
    return resolve


def shape_path_data(
    el: Any, where: str, ppi: float = PX_PER_INCH, resolve: Resolve | None = None
) -> str | None:
    """Path data equivalent to a basic shape (SVG 2 §10.2-10.7), or None if it renders nothing.

    Parameters
    ----------
    el : Element
    where : str
        For messages.
    ppi : float
        CSS pixels per inch.
    resolve : callable(name, axis, default) -> float, optional
        The lengths of the shape in user units (the reader's resolver knows the viewport for
        percentages, the font size for em and ex, and the CSS cascade); by default the
        element's attributes in absolute units.

    Raises
    ------
    SvgReadError
        Bad attribute values (negative sizes, bad lengths), or coordinates of the equivalent
        path (``x + width``, ``cx + r``, ...) that overflow a double.
    """
    try:
        return _shape_path_data(el, where, resolve or _absolute_resolver(el, where, ppi))
    except SvgReadError:
        raise
    except ValueError:  # format_number of an infinite sum
        raise SvgReadError(f"{where}: coordinates out of range (they overflow a double)") from None


def _shape_path_data(el: Any, where: str, L: Resolve) -> str | None:
    tag = _local(el.tag)
    f = format_number
    if tag == "rect":
        x, y = L("x", "x"), L("y", "y")
        w, h = L("width", "x"), L("height", "y")
        if w < 0 or h < 0:
            raise SvgReadError(f"{where}: negative rect width or height")
        if w == 0 or h == 0:
            return None
        rx = L("rx", "x") if L.given("rx") else None
        ry = L("ry", "y") if L.given("ry") else None
        if (rx is not None and rx < 0) or (ry is not None and ry < 0):
            raise SvgReadError(f"{where}: negative rect corner radius")
        # SVG 1.1 §9.2: a missing radius takes the other's value; clamp to half the size.
        if rx is None and ry is None:
            rx = ry = 0.0
        elif rx is None:
            rx = ry
        elif ry is None:
            ry = rx
        assert rx is not None and ry is not None
        rx, ry = min(rx, w / 2.0), min(ry, h / 2.0)
        if rx == 0.0 or ry == 0.0:
            return f"M{f(x)} {f(y)} H{f(x + w)} V{f(y + h)} H{f(x)} Z"
        parts = [f"M{f(x + rx)} {f(y)}"]
        if x + w - rx != x + rx:
            parts.append(f"H{f(x + w - rx)}")
        parts.append(f"A{f(rx)} {f(ry)} 0 0 1 {f(x + w)} {f(y + ry)}")
        if y + h - ry != y + ry:
            parts.append(f"V{f(y + h - ry)}")
        parts.append(f"A{f(rx)} {f(ry)} 0 0 1 {f(x + w - rx)} {f(y + h)}")
        if x + rx != x + w - rx:
            parts.append(f"H{f(x + rx)}")
        parts.append(f"A{f(rx)} {f(ry)} 0 0 1 {f(x)} {f(y + h - ry)}")
        if y + ry != y + h - ry:
            parts.append(f"V{f(y + ry)}")
        parts.append(f"A{f(rx)} {f(ry)} 0 0 1 {f(x + rx)} {f(y)} Z")
        return " ".join(parts)
    if tag in ("circle", "ellipse"):
        cx, cy = L("cx", "x"), L("cy", "y")
        if tag == "circle":
            rx = ry = L("r", "xy")
        else:
            has_rx, has_ry = L.given("rx"), L.given("ry")
            rx = L("rx", "x") if has_rx else None
            ry = L("ry", "y") if has_ry else None
            # SVG 2 §10.4: "auto" (or absent) takes the other radius
            rx = rx if rx is not None else (ry if ry is not None else 0.0)
            ry = ry if ry is not None else rx
        if rx < 0 or ry < 0:
            raise SvgReadError(f"{where}: negative radius")
        if rx == 0 or ry == 0:
            return None
        # SVG 2 §10.3-10.4: start at (cx + rx, cy), four arcs in the positive angle direction.
        a = f"A{f(rx)} {f(ry)} 0 0 1 "
        return (
            f"M{f(cx + rx)} {f(cy)} {a}{f(cx)} {f(cy + ry)} {a}{f(cx - rx)} {f(cy)} "
            f"{a}{f(cx)} {f(cy - ry)} {a}{f(cx + rx)} {f(cy)} Z"
        )
    if tag == "line":
        x1, y1 = L("x1", "x"), L("y1", "y")
        x2, y2 = L("x2", "x"), L("y2", "y")
        return f"M{f(x1)} {f(y1)} L{f(x2)} {f(y2)}"
    return None


def _read_joins(
    el: Any, contours: list[Contour], where: str, notes: list[ReadNote]
) -> list[Contour]:
    text = el.get(JOINS_ATTR)
    if text is None:
        return contours
    parts = text.split(";")
    if len(parts) != len(contours) or any(
        len(p) != c.join_count or set(p) - set(_JOIN_CHARS)
        for p, c in zip(parts, contours, strict=False)
    ):
        notes.append(
            ReadNote(
                "warning",
                f"{where}: join intent attribute does not match the path data; ignored",
                "join-intent",
            )
        )
        return contours
    return [
        Contour(c.segments, c.closed, tuple(_JOIN_CHARS[ch] for ch in p))
        for p, c in zip(parts, contours, strict=True)
    ]


def _href(el: Any) -> str | None:
    return el.get(f"{{{XLINK_NS}}}href") or el.get("href")


class _Reader:
    def __init__(
        self,
        where: str,
        ppi: float,
        on_unsupported: str,
        tolerance: float,
        languages: tuple[str, ...] = ("en",),
    ) -> None:
        self.where = where
        self.ppi = ppi
        self.on_unsupported = on_unsupported
        self.tolerance = tolerance
        self.languages = tuple(x.strip().lower() for x in languages if x.strip())
        self.notes: list[ReadNote] = []
        self.error: SvgReadError | None = None
        self.outlines: list[Outline] = []
        self.counts: dict[str, int] = {}
        self.examples: dict[str, str] = {}
        self.use_instances = 0
        self.use_segments = 0
        self.root: Any = None
        self.xml: XmlSource | None = None
        self.style: StyleResolver | None = None
        self._newlines: NDArray[np.intp] | None = None
        self._parents: dict[int, Any] | None = None

    def name(self, el: Any) -> str:
        """:func:`describe` with the element's line in the file when it has no id."""
        if el.get("id") or self.xml is None or id(el) not in self.xml.spans:
            return describe(el)
        if self._newlines is None:
            self._newlines = np.flatnonzero(np.frombuffer(self.xml.data, dtype=np.uint8) == 10)
        pos = self.xml.spans[id(el)][0]
        return describe(el, line=int(np.searchsorted(self._newlines, pos)) + 1)

    def count(self, kind: str, example: str, n: int = 1) -> None:
        self.counts[kind] = self.counts.get(kind, 0) + n
        self.examples.setdefault(kind, example)

    def note(self, level: Level, message: str, kind: str) -> None:
        self.notes.append(ReadNote(level, message, kind))

    def unsupported(self, kind: str, el: Any) -> None:
        if self.on_unsupported == "raise":
            raise UnsupportedSvgFeature(
                f"{self.where}: {self.name(el)}: {_NOT_GEOMETRY.get(kind, kind)}"
            )
        self.count(kind, self.name(el))

    # -- conditional processing (SVG 1.1 §5.8, SVG 2 §5.8) ------------------------------
    def conditions_hold(self, el: Any) -> bool:
        """requiredExtensions and systemLanguage on any element; requiredFeatures is ignored.

        SVG 2 §5.8.5: we implement no extension, so ``requiredExtensions`` — even empty —
        evaluates to false. ``systemLanguage`` is true when one of the user's languages
        (``languages=``) equals a listed tag or is its prefix followed by "-". SVG 2 removed
        ``requiredFeatures``: it no longer takes part (as in current renderers).
        """
        get = el.get
        if get("requiredExtensions") is not None:
            return False
        lang = get("systemLanguage")
        if lang is None:
            return True
        self.count("language", self.name(el))
        tags = [t.strip().lower() for t in lang.split(",") if t.strip()]
        return any(t == u or t.startswith(u + "-") for t in tags for u in self.languages)

    # -- lengths ------------------------------------------------------------------------
    def resolver(self, el: Any, decl: dict[str, Any], frame: _Frame, where: str) -> Resolve:
        """Lengths of this element's geometry properties (cascade, %, em, ex) in user units."""
        ppi = self.ppi

        def text_of(name: str) -> str | None:
            d = decl.get(name)
            if d is not None:
                return d[0]
            return el.get(name)  # attributes that are not CSS properties (x1, y1, ...)

        def resolve(name: str, axis: Axis, default: float = 0.0) -> float:
            text = text_of(name)
            ln = parse_length(text, where)
            if ln is None:
                return default
            v = _to_user(ln, axis, ppi, frame.viewport, frame.font)
            if v is None:
                raise SvgReadError(
                    f"{where}: {name}={text!r} is relative to a viewport whose size is not "
                    "known (the root svg has no viewBox and no absolute width/height)"
                )
            return v

        resolve.given = lambda name: parse_length(text_of(name), where) is not None  # type: ignore[attr-defined]
        return resolve

    def font_size(self, decl: dict[str, Any], parent: float, where: str) -> float:
        """The computed font-size (user units) from the declared value and the parent's."""
        d = decl.get("font-size")
        if d is None:
            return parent
        text = d[0].strip().lower()
        if text in ("inherit", "unset", ""):
            return parent
        if text == "initial":
            return INITIAL_FONT_PX
        if text in _FONT_KEYWORDS:
            return INITIAL_FONT_PX * _FONT_KEYWORDS[text]
        if text == "larger":
            return parent * _FONT_STEP
        if text == "smaller":
            return parent / _FONT_STEP
        ln = parse_length(text, where)
        if ln is None:
            return parent
        if ln.unit == "%":
            return parent * ln.value / 100.0
        if ln.unit in ("em", "ex"):
            return parent * ln.value * (0.5 if ln.unit == "ex" else 1.0)
        v = ln.to_user(self.ppi)
        return parent if v is None or v < 0 else v

    def transform_of(
        self, el: Any, decl: dict[str, Any], frame: _Frame, where: str
    ) -> NDArray[np.float64] | None:
        """The element's own transform (attribute or CSS), None when it has none."""
        d = decl.get("transform")
        if d is None or not d[0].strip():
            return None
        text, from_css = d
        if not from_css:
            return parse_transform(text, where)

        def to_px(value: float, unit: str) -> float | None:
            if unit in ("em", "ex"):
                return value * frame.font * (0.5 if unit == "ex" else 1.0)
            from outlinebench.io.svg_units import Length

            return Length(value, unit).to_user(self.ppi)

        m = css_transform(text, where, to_px)
        origin = decl.get("transform-origin")
        if origin is not None and origin[0].strip():
            # CSS Transforms 1 §7: the matrix applies about the origin, T(o) · M · T(−o);
            # for SVG elements the initial origin is 0 0 (transform-box: view-box).
            words = origin[0].replace(",", " ").split()
            keyword = {"left": 0.0, "top": 0.0, "center": None, "right": None, "bottom": None}
            if any(w.lower() in keyword for w in words):
                raise SvgReadError(
                    f"{where}: transform-origin {origin[0]!r}: keywords need the element's "
                    "box, which is not computed"
                )
            oy_text = words[1] if len(words) > 1 else "0"
            res = self.resolver(el, {"ox": (words[0], True), "oy": (oy_text, True)}, frame, where)
            ox, oy = res("ox", "x"), res("oy", "y")
            m = translation(ox, oy) @ m @ translation(-ox, -oy)
        return m

    # -- the walk -----------------------------------------------------------------------
    def walk(self, root: Any, ids: dict[str, Any], first: _Frame) -> None:  # noqa: C901 (older than the complexity gate; split when next changed)
        stack: list[tuple[Any, _Frame]] = [(root, first)]
        style = self.style
        assert style is not None
        while stack:
            el, frame = stack.pop()
            tag = _local(el.tag)
            if not tag:
                continue  # comment or processing instruction
            if tag in _NOT_RENDERED or tag.startswith("{"):
                continue
            decl = style.declared(el, tag)
            disp = decl.get("display")
            if disp is not None and disp[0].strip().lower() == "none":
                if tag in _GEOMETRY or tag in _CONTAINERS or tag in ("use", "text", "image"):
                    self.count("hidden", self.name(el))
                continue
            if not self.conditions_hold(el):
                self.count("conditional", self.name(el))
                continue
            if tag in _NOT_GEOMETRY:
                vis = decl.get("visibility")
                hidden_text = frame.hidden if vis is None else vis[0].strip().lower() in (
                    "hidden", "collapse"
                )  # fmt: skip
                if hidden_text and tag == "text":
                    self.count("hidden", self.name(el))
                else:
                    self.unsupported(tag, el)
                continue
            # the place for messages, looked up only where a message may need it (finding an
            # element's line costs a search in the file's line index)
            where = (
                f"{self.where}: {self.name(el)}"
                if tag in ("svg", "use") or "transform" in decl or "font-size" in decl
                else f"{self.where}: {describe(el)}"
            )
            font = self.font_size(decl, frame.font, where)
            matrix = frame.matrix
            if el is not self.root:
                try:
                    with np.errstate(over="ignore", invalid="ignore"):
                        own = self.transform_of(el, decl, frame, where)
                        if own is not None:
                            matrix = matrix @ own
                        if not np.isfinite(matrix).all():
                            own_t = decl.get("transform")
                            raise SvgReadError(
                                f"{where}: transform {own_t[0]!r} is out of range "
                                "(with its parents' it overflows a double)"
                                if own_t
                                else f"{where}: its position (its parents' transforms and "
                                "use offsets) overflows a double"
                            )
                except SvgReadError as exc:
                    self.note("error", f"{exc}; element skipped", "transform")
                    continue
            vis = decl.get("visibility")
            hidden = frame.hidden
            if vis is not None:
                v = vis[0].strip().lower()
                if v in ("hidden", "collapse"):
                    hidden = True
                elif v == "visible":
                    hidden = False
            fr = decl.get("fill-rule")
            fill_rule = frame.fill_rule
            if fr is not None and fr[0].strip().lower() in ("nonzero", "evenodd"):
                fill_rule = fr[0].strip().lower()
            here = _Frame(matrix, hidden, frame.chain, frame.use, frame.viewport, font, fill_rule)
            if tag in _CONTAINERS:
                if tag == "svg" and el is not self.root:
                    try:
                        vm, vp = self.viewport(el, decl, here, frame.size, where)
                    except SvgReadError as exc:
                        self.note("error", f"{exc}; element skipped", "svg")
                        continue
                    if vm is None:
                        self.count("empty-viewport", self.name(el))
                        continue
                    here = _Frame(matrix @ vm, hidden, frame.chain, frame.use, vp, font, fill_rule)
                children = [c for c in el if isinstance(c.tag, str)]
                if tag == "switch":
                    # SVG 1.1 §5.8.2 / SVG 2 §5.8.3: only the first direct child whose
                    # conditions evaluate to true is rendered.
                    children = [
                        c
                        for c in children
                        if _local(c.tag) not in _NOT_RENDERED and self.conditions_hold(c)
                    ][:1]
                for child in reversed(children):
                    stack.append((child, here))
                continue
            if tag == "use":
                self.expand_use(el, decl, here, ids, stack, where)
                continue
            if tag in _GEOMETRY:
                if hidden:
                    self.count("hidden", self.name(el))
                    continue
                self.read_geometry(el, tag, decl, here)

    def viewport(
        self,
        el: Any,
        decl: dict[str, Any],
        frame: _Frame,
        size: tuple[float | None, float | None] | None,
        where: str,
    ) -> tuple[NDArray[np.float64] | None, tuple[float, float] | None]:
        """A nested ``svg`` or a used ``symbol``: its viewport's matrix and size for its content.

        SVG 2 §5.1.2 and §8.2: x, y place the viewport (0 by default), width and height
        default to 100 % of the parent viewport ("auto"), and a ``use`` that references the
        element overrides them with its own width and height when it has them (§5.6.2);
        with a viewBox, preserveAspectRatio maps it onto the viewport (§8.5, §8.6). A width
        or height of zero disables rendering (None).
        """
        res = self.resolver(el, decl, frame, where)
        x, y = res("x", "x"), res("y", "y")
        vb = parse_view_box(el.get("viewBox"), where)
        w = size[0] if size is not None and size[0] is not None else None
        h = size[1] if size is not None and size[1] is not None else None
        if w is None and res.given("width"):
            w = res("width", "x")
        if h is None and res.given("height"):
            h = res("height", "y")
        if frame.viewport is not None:  # "auto": 100 % of the parent viewport
            w = frame.viewport[0] if w is None else w
            h = frame.viewport[1] if h is None else h
        if (w is not None and w < 0) or (h is not None and h < 0):
            raise SvgReadError(f"{where}: negative width or height")
        if w == 0 or h == 0:
            return None, None
        m = translation(x, y)
        if vb is not None:
            if w is None or h is None:
                raise SvgReadError(
                    f"{where}: the viewport's size is not known (100 % of a root without a "
                    "viewBox or absolute size), so its viewBox cannot be applied"
                )
            m = m @ view_box_transform(vb, w, h, parse_aspect(el.get("preserveAspectRatio")))
            return m, (vb[2], vb[3])
        # without a viewBox the content keeps its units: only percentages need the size
        return m, (w, h) if w is not None and h is not None else None

    def _is_ancestor(self, target: Any, el: Any) -> bool:
        """``target`` is ``el`` or one of its ancestors in the document tree."""
        if self._parents is None:
            self._parents = {id(c): p for p in self.root.iter() for c in p}
        node = el
        while node is not None:
            if node is target:
                return True
            node = self._parents.get(id(node))
        return False

    def expand_use(
        self,
        el: Any,
        decl: dict[str, Any],
        frame: _Frame,
        ids: dict[str, Any],
        stack: list,
        where: str,
    ) -> None:
        """A ``use`` element: its referenced element drawn at x, y (SVG 2 §5.6).

        A reference to an element that is the ``use`` itself or one of its ancestors, in the
        document or in the chain of uses that led here, is a circular reference: an error
        for that ``use`` only, which draws nothing (§5.6.2). A ``use`` whose target is
        another ``use`` is a chain, not a cycle.
        """
        href = _href(el)
        if not href:
            self.note("warning", f"{where}: use without a reference", "use")
            return
        if not href.startswith("#"):
            self.count("external", f"{self.name(el)} → {href}")
            return
        target = ids.get(href[1:])
        if target is None:
            self.note("error", f"{where}: reference {href} not found in the file", "use")
            return
        if id(target) in frame.chain or self._is_ancestor(target, el):
            self.note(
                "error",
                f"{where}: reference {href} leads back to itself (a use cycle); this use "
                "draws nothing",
                "use-cycle",
            )
            return
        self.use_instances += 1
        if self.use_instances > MAX_USE_INSTANCES:
            if self.use_instances == MAX_USE_INSTANCES + 1:
                self.note(
                    "error",
                    f"{where}: more than {MAX_USE_INSTANCES} use instances; the rest were "
                    "not expanded",
                    "use-budget",
                )
            return
        try:
            res = self.resolver(el, decl, frame, where)
            ux, uy = res("x", "x"), res("y", "y")
            size = (
                res("width", "x") if res.given("width") else None,
                res("height", "y") if res.given("height") else None,
            )
        except SvgReadError as exc:
            self.note("error", f"{exc}; element skipped", "use")
            return
        with np.errstate(over="ignore", invalid="ignore"):
            m = frame.matrix @ translation(ux, uy)  # non-finite: refused where it is used
        chain = frame.chain + (id(target),)
        # The outermost use: (element, its coordinate system, refers straight to geometry?).
        ttag = _local(target.tag)
        if frame.use is None:
            outer = (el, frame.matrix, ttag in _GEOMETRY)
        else:
            outer = (frame.use[0], frame.use[1], False)
        inner = _Frame(m, frame.hidden, chain, outer, frame.viewport, frame.font,
                       frame.fill_rule, size)  # fmt: skip
        if ttag == "symbol":
            tdecl = self.style.declared(target, ttag) if self.style is not None else {}
            try:
                vm, vp = self.viewport(target, tdecl, inner, size, where)
            except SvgReadError as exc:
                self.note("error", f"{exc}; element skipped", "use")
                return
            if vm is None:
                self.count("empty-viewport", self.name(el))
                return
            content = _Frame(m @ vm, frame.hidden, chain, outer, vp, frame.font, frame.fill_rule)
            for child in reversed([c for c in target if isinstance(c.tag, str)]):
                stack.append((child, content))
            return
        if ttag not in ("svg",):
            inner = _Frame(m, frame.hidden, chain, outer, frame.viewport, frame.font,
                           frame.fill_rule)  # fmt: skip
        stack.append((target, inner))

    def read_geometry(self, el: Any, tag: str, decl: dict[str, Any], frame: _Frame) -> None:
        if frame.use is not None and self.use_segments > MAX_USE_SEGMENTS:
            self.count("use-segments", self.name(frame.use[0]))
            return
        index = len(self.outlines)
        where = f"{self.where}: {describe(el, index)}"
        matrix = frame.matrix
        m = None if np.array_equal(matrix, IDENTITY) else matrix
        path_error = False
        if tag in ("polyline", "polygon"):
            self.read_points(el, tag, index, where, m, frame)
            return
        try:
            if tag == "path":
                d = el.get("d") or ""
            else:
                d = shape_path_data(el, where, self.ppi, self.resolver(el, decl, frame, where))
        except SvgReadError as exc:
            self.note("error", f"{exc}; element skipped", "shape")
            if self.error is None and isinstance(exc, SvgPathError):
                self.error = exc
            return
        if d is None:
            self.count("empty-shape", describe(el, index))
            contours: list[Contour] = []
        else:
            res = read_path_data(d, matrix=m, tolerance=self.tolerance)
            contours = res.contours
            if res.error is not None:
                path_error = True
                err = SvgPathError(f"{where}: {res.error}", res.error.offset, res.error.token)
                if self.error is None:
                    self.error = err
                else:
                    self.note("error", str(err), "path")
            for key, n in res.counts.items():
                self.count(key, describe(el, index), n)
        self.add_outline(el, tag, index, where, m, frame, contours, path_error)

    def read_points(
        self,
        el: Any,
        tag: str,
        index: int,
        where: str,
        m: NDArray[np.float64] | None,
        frame: _Frame,
    ) -> None:
        """A polyline or polygon, read up to the first bad number of its ``points``.

        SVG 2 §10.6-10.7: bad points are in error like bad path data, so the pairs before the
        error are kept (§9.5.4) and the error names its offset in the ``points`` attribute.
        An odd number of coordinates is in error too, and there the standard says what to
        draw: "the user agent will drop the last, odd coordinate and otherwise render the
        shape" — a polygon stays closed — and the note says what was kept.
        """
        text = el.get("points") or ""
        ok_end = _POINTS_OK.match(text).end()
        found = [(v.start(), v.group()) for v in _POINTS_RE.finditer(text, 0, ok_end)]
        bad: tuple[int, str] | None = None  # (offset, what was expected or wrong)
        for k, (pos, value) in enumerate(found):
            if not math.isfinite(float(value)):
                bad = (pos, "number out of range")
                found = found[:k]
                break
        if bad is None and ok_end < len(text.rstrip(" \t\r\n\f")):
            bad = (ok_end, "expected a number")
        odd: tuple[int, str] | None = None
        if bad is None and len(found) % 2:
            odd = found[-1]
        found = found[: len(found) - len(found) % 2]
        dots = sum(1 for _, v in found if _TRAILING_DOT.search(v))
        if dots:
            self.count("trailing_dot", describe(el, index), dots)
        pairs = [(found[i][0], f"{found[i][1]} {found[i + 1][1]}") for i in range(0, len(found), 2)]
        contours: list[Contour] = []
        if len(pairs) >= 2:
            # One command letter per pair, so an error offset in d names its pair.
            parts, starts, at = [], [], 0
            for k, (_, pair) in enumerate(pairs):
                starts.append(at)
                parts.append(("M" if k == 0 else "L") + pair)
                at += len(parts[-1])
            d = "".join(parts) + ("Z" if tag == "polygon" and bad is None else "")
            res = read_path_data(d, matrix=m, tolerance=self.tolerance)
            contours = res.contours
            if res.error is not None:  # the transform overflows a double at this pair
                k = max(0, int(np.searchsorted(starts, res.error.offset, side="right")) - 1)
                bad = (pairs[k][0], "coordinates overflow")
        else:
            self.count("empty-shape", describe(el, index))
        if bad is not None:
            pos, what = bad
            token = _token_at(text, pos)
            err = SvgPathError(
                f"{where}: points: {what} at offset {pos}, {_found(token)}", pos, token
            )
            if self.error is None:
                self.error = err
            else:
                self.notes.append(ReadNote("error", str(err), "path"))
        if odd is not None:
            self.note(
                "error",
                f"{where}: points: odd number of coordinates ({len(found) + 1}); the last one, "
                f"{odd[1]!r} at offset {odd[0]}, is dropped and the {len(pairs)} point(s) "
                f"before it are drawn{' as a closed polygon' if tag == 'polygon' else ''} "
                "(SVG 2 §10.6-10.7)",
                "points-odd",
            )
        self.add_outline(el, tag, index, where, m, frame, contours, bad is not None)

    def add_outline(
        self,
        el: Any,
        tag: str,
        index: int,
        where: str,
        m: NDArray[np.float64] | None,
        frame: _Frame,
        contours: list[Contour],
        path_error: bool,
    ) -> None:
        use = frame.use
        if use is not None:
            self.use_segments += sum(len(c.segments) for c in contours)
        contours = _read_joins(el, contours, where, self.notes)
        if contours:
            big = max((float(np.abs(sg).max()) for c in contours for sg in c.segments), default=0.0)
            if big > COORDINATE_LIMIT:
                self.note(
                    "error",
                    f"{where}: coordinates reach {big:.3g} user units, beyond ±"
                    f"{COORDINATE_LIMIT:.0e}: lengths, areas and crossings past the largest "
                    "double cannot be measured; scale the drawing down",
                    "coordinates",
                )
        if m is not None and is_mirroring(m):
            self.count("mirror", describe(el, index))
        ref = ElementRef(
            el,
            use[0] if use is not None else None,
            tuple(contours),
            m if m is not None else IDENTITY,
            path_error,
            use[1] if use is not None else None,
            bool(use[2]) if use is not None else False,
        )
        self.outlines.append(
            Outline(
                tuple(contours),
                element_id=el.get("id") if use is None else use[0].get("id") or el.get("id"),
                source_index=index,
                tag=tag,
                transform=m if m is not None else IDENTITY,
                source=ref,
                fill_rule=frame.fill_rule,
            )
        )

    def summary_notes(self) -> None:
        c, ex = self.counts, self.examples
        w = self.where
        table = [
            ("text", "warning", "{n} text element(s) not converted to outlines (first: {e})"),
            ("image", "warning", "{n} image(s) kept in the file, not geometry (first: {e})"),
            ("clipPath", "warning", "{n} clip path(s) kept, not applied to outlines (first: {e})"),
            ("mask", "warning", "{n} mask(s) kept, not applied to outlines (first: {e})"),
            ("foreignObject", "warning", "{n} foreignObject element(s) kept, not geometry"),
            ("hidden", "info", "{n} hidden element(s) (display:none or visibility:hidden) kept, "
             "not read as outlines (first: {e})"),
            ("external", "error", "{n} external reference(s) not fetched: what they draw is "
             "not read (first: {e})"),
            ("arcs", "info", f"{{n}} arc(s) converted to cubics within {self.tolerance:g} of "
             "the radius (first in {e})"),
            ("arc_negative_radius", "warning", "{n} arc(s) with a negative radius: absolute "
             "value used (first in {e})"),
            ("arc_zero_radius", "info", "{n} arc(s) with a zero radius read as lines "
             "(first in {e})"),
            ("arc_omitted", "info", "{n} arc(s) ending where they start omitted (first in {e})"),
            ("arc_radii_scaled", "info", "{n} arc(s) with radii too small scaled up "
             "(SVG 1.1 F.6.6) (first in {e})"),
            ("trailing_dot", "warning", "{n} number(s) written like '23.' (valid in SVG 1.1, "
             "not SVG 2) (first in {e})"),
            ("mirror", "info", "{n} outline(s) under a mirroring transform: their winding is "
             "reversed in page coordinates (first: {e})"),
            ("empty-shape", "info", "{n} shape(s) with zero size render nothing (first: {e})"),
            ("use-segments", "error", f"{{n}} element(s) of use instances not expanded: the "
             f"instances already drew more than {MAX_USE_SEGMENTS:,} segments, the budget of "
             "one file (first: {e})"),
            ("empty-viewport", "info", "{n} viewport(s) of zero width or height render "
             "nothing (first: {e})"),
            ("conditional", "info", "{n} element(s) not rendered: their conditional "
             "attributes (requiredExtensions, systemLanguage) evaluate to false (first: {e})"),
            ("language", "warning", f"{{n}} element(s) with systemLanguage evaluated for the "
             f"language(s) {', '.join(self.languages) or 'none'}; a renderer set to another "
             "language may draw a different choice (first: {e})"),
        ]  # fmt: skip
        if self.on_unsupported == "skip":
            table = [t for t in table if t[0] not in _NOT_GEOMETRY]
        for kind, level, text in table:
            if kind in c:
                msg = text.format(n=c[kind], e=ex[kind])
                self.notes.append(ReadNote(level, f"{w}: {msg}", kind, c[kind]))


def _physical(root: Any, where: str, ppi: float, notes: list[ReadNote]) -> dict[str, Any]:
    width = parse_length(root.get("width"), f"{where}: <svg> width")
    height = parse_length(root.get("height"), f"{where}: <svg> height")
    vb = parse_view_box(root.get("viewBox"), f"{where}: <svg>")
    w_mm = width.to_mm(ppi) if width is not None else None
    h_mm = height.to_mm(ppi) if height is not None else None
    if vb is None and root.get("viewBox") is not None and root.get("viewBox").strip():
        notes.append(
            ReadNote(
                "warning",
                f"{where}: viewBox={root.get('viewBox')!r} has no area (SVG 1.1 §7.7); ignored",
                "units",
            )
        )
    relative = [
        f"{name}={root.get(name)!r}"
        for name, ln, mm in (("width", width, w_mm), ("height", height, h_mm))
        if ln is not None and mm is None
    ]
    if relative:
        known = "height" if h_mm is not None else "width" if w_mm is not None else None
        how = (
            f"taken from the {known} and the viewBox's aspect ratio"
            if known is not None and vb is not None
            else "unknown"
        )
        notes.append(
            ReadNote(
                "warning",
                f"{where}: relative {' and '.join(relative)}: physical size {how}",
                "units",
            )
        )
    if vb is not None:
        # CSS sizing: a missing dimension follows the viewBox's aspect ratio.
        if w_mm is None and h_mm is not None:
            w_mm = h_mm * vb[2] / vb[3]
        elif h_mm is None and w_mm is not None:
            h_mm = w_mm * vb[3] / vb[2]
    mm_per_px = 25.4 / ppi
    mm_per_unit = mm_per_px
    if vb is not None and w_mm is not None and h_mm is not None:
        m = view_box_transform(vb, w_mm, h_mm, parse_aspect(root.get("preserveAspectRatio")))
        sx, sy = float(m[0, 0]), float(m[1, 1])
        if sx == sy:
            mm_per_unit = sx
        else:
            mm_per_unit = math.sqrt(sx * sy)
            notes.append(
                ReadNote(
                    "warning",
                    f'{where}: preserveAspectRatio="none" scales x by {sx:.6g} and y by '
                    f"{sy:.6g} mm per unit; sizes use their geometric mean {mm_per_unit:.6g}",
                    "units",
                )
            )
    for name, value in (("width", w_mm), ("height", h_mm), ("viewBox", mm_per_unit)):
        if value is not None and not (math.isfinite(value) and value > 0.0):
            text = root.get(name) if name != "viewBox" else root.get("viewBox")
            raise SvgReadError(f"{where}: <svg> {name}: length out of range {text!r}")
    # The first of width and height written in an absolute unit names the editor's unit.
    absolute = [ln.unit for ln in (width, height) if ln and ln.unit and ln.unit not in _RELATIVE]
    unit = absolute[0] if absolute else ""
    return {
        "width_mm": w_mm,
        "height_mm": h_mm,
        "view_box": vb,
        "mm_per_unit": mm_per_unit,
        "units": unit or "px",
    }


def _root_frame(reader: _Reader, root: Any, phys: dict[str, Any], where: str) -> _Frame:
    """The state the root's content starts from.

    Coordinates of the model are the root's user units (inside its viewBox). A ``transform``
    on the root (SVG 2 allows it) acts on the root's viewport, outside the viewBox, so in user
    units it is V⁻¹ · T · V with V the viewBox-to-viewport matrix: applied once, here.
    Percentages resolve against the viewBox size, or the width and height in user units.
    """
    assert reader.style is not None
    decl = reader.style.declared(root, "svg")
    vb = phys["view_box"]
    ppi = reader.ppi
    width = parse_length(root.get("width"), f"{where}: <svg> width")
    height = parse_length(root.get("height"), f"{where}: <svg> height")
    w_px = width.to_user(ppi) if width is not None else None
    h_px = height.to_user(ppi) if height is not None else None
    if vb is not None:
        viewport: tuple[float, float] | None = (vb[2], vb[3])
        if w_px is None and h_px is None:
            w_px, h_px = vb[2], vb[3]
        elif w_px is None:
            w_px = h_px * vb[2] / vb[3]  # type: ignore[operator]
        elif h_px is None:
            h_px = w_px * vb[3] / vb[2]
    else:
        viewport = (w_px, h_px) if w_px is not None and h_px is not None else None
    font = reader.font_size(decl, INITIAL_FONT_PX, f"{where}: <svg>")
    fr = decl.get("fill-rule")
    fill_rule = fr[0].strip().lower() if fr and fr[0].strip().lower() == "evenodd" else "nonzero"
    first = _Frame(IDENTITY, False, (), None, viewport, font, fill_rule)
    with np.errstate(over="ignore", invalid="ignore"):
        own = reader.transform_of(root, decl, first, f"{where}: <svg>")
    matrix = IDENTITY
    if own is not None:
        if vb is not None and w_px and h_px:
            v = view_box_transform(vb, w_px, h_px, parse_aspect(root.get("preserveAspectRatio")))
            with np.errstate(over="ignore", invalid="ignore"):
                matrix = np.linalg.inv(v) @ own @ v
        else:
            matrix = own
        if not np.isfinite(matrix).all():
            raise SvgReadError(f"{where}: <svg> transform is out of range")
    return _Frame(matrix, False, (), None, viewport, font, fill_rule)


def read_svg(
    source: str | os.PathLike[str] | bytes,
    *,
    px_per_inch: float = PX_PER_INCH,
    on_unsupported: str = "warn",
    allow_entities: bool = False,
    max_bytes: int = MAX_BYTES,
    max_entity_chars: int = MAX_ENTITY_CHARS,
    tolerance: float = ARC_TOLERANCE,
    languages: tuple[str, ...] | list[str] = ("en",),
) -> ReadResult:
    """Read an SVG file (or its bytes) into a document, with notes and the first path error.

    Parameters
    ----------
    source : str, path-like or bytes
        A file name, or the file's bytes.
    px_per_inch : float
        CSS pixels per inch for unitless and ``px`` lengths (96 per CSS; some exporters
        assumed 90 or 72).
    on_unsupported : {"warn", "raise", "skip"}
        What to do with content that is not geometry (text, images, clip paths, masks):
        count it in notes, raise :class:`UnsupportedSvgFeature`, or say nothing. It always
        stays in the file.
    allow_entities : bool
        Allow harmless internal entity declarations (no nesting, no external ones, each at
        most ``max_entity_chars`` characters). Refused by default.
    max_bytes : int
        Largest file accepted.
    max_entity_chars : int
        Longest entity replacement text when entities are allowed.
    tolerance : float
        Arc-to-cubic error bound relative to each arc's larger radius.
    languages : sequence of str
        The user's languages for ``systemLanguage`` (BCP 47 tags, SVG 2 §5.8.5); what a
        renderer draws depends on its user's, so a note names the ones assumed.

    Returns
    -------
    ReadResult
        The document, notes, and the first bad-path error (the document then holds every
        outline, each bad path read up to its error, per SVG 2 §9.5.4).

    Raises
    ------
    UnsafeXmlError
        Entity declarations (unless allowed), external entities, a file over ``max_bytes``.
    SvgReadError
        Not well-formed XML, not an SVG root, bad root size attributes.
    ValueError
        ``on_unsupported`` is not one of its values.
    OSError
        The file cannot be read.
    """
    if on_unsupported not in ("warn", "raise", "skip"):
        raise OptionError(
            f"on_unsupported must be 'warn', 'raise' or 'skip', got {on_unsupported!r}"
        )
    if not (px_per_inch > 0 and math.isfinite(px_per_inch)):
        raise OptionError(f"px_per_inch must be a positive number, got {px_per_inch!r}")
    if isinstance(source, bytes | bytearray):
        data = bytes(source)
        where = "<bytes>"
        path = None
        if len(data) > max_bytes:
            raise UnsafeXmlError(f"{where}: {len(data)} bytes is over the limit of {max_bytes}")
    else:
        path = os.fspath(source)
        where = path  # as the caller named it
        size = os.stat(path).st_size
        if size > max_bytes:
            raise UnsafeXmlError(
                f"{where}: {size} bytes is over the limit of {max_bytes} (max_bytes=)"
            )
        with open(path, "rb") as fh:
            data = fh.read(max_bytes + 1)
        if len(data) > max_bytes:
            raise UnsafeXmlError(f"{where}: file grew over the limit of {max_bytes} bytes")
    xml = parse_xml(data, where, allow_entities=allow_entities, max_entity_chars=max_entity_chars)
    root = xml.root
    if _local(root.tag) != "svg":
        raise SvgReadError(f"{where}: the root element is <{_local(root.tag)}>, not <svg>")
    notes: list[ReadNote] = []
    phys = _physical(root, where, px_per_inch, notes)
    ids: dict[str, Any] = {}
    for el in root.iter():
        eid = el.get("id") if isinstance(el.tag, str) else None
        if eid and eid not in ids:
            ids[eid] = el
    reader = _Reader(where, px_per_inch, on_unsupported, tolerance, tuple(languages))
    reader.root = root
    reader.xml = xml
    reader.style = StyleResolver(root, reader.note, where)
    reader.walk(root, ids, _root_frame(reader, root, phys, where))
    reader.summary_notes()
    doc = Document(
        outlines=tuple(reader.outlines),
        width_mm=phys["width_mm"],
        height_mm=phys["height_mm"],
        view_box=phys["view_box"],
        mm_per_unit=phys["mm_per_unit"],
        units=phys["units"],
        source=SvgSource(xml, path, px_per_inch),
        path=path,
    )
    return ReadResult(doc, notes + reader.notes, reader.error)


def load_svg(path: str | os.PathLike[str] | bytes, **kwargs: Any) -> Document:
    """Read an SVG strictly: the document, or the first error raised.

    Parameters
    ----------
    path : str, path-like or bytes
    **kwargs
        As :func:`read_svg`.

    Raises
    ------
    SvgReadError
        Bad path data (message names the file, element and offset), and as :func:`read_svg`.
    """
    result = read_svg(path, **kwargs)
    if result.error is not None:
        raise result.error
    return result.document
