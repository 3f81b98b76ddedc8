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

from outlinebench.errors import SvgPathError, SvgReadError, UnsafeXmlError, UnsupportedSvgFeature
from outlinebench.io._xml import MAX_BYTES, MAX_ENTITY_CHARS, XmlSource, parse_xml
from outlinebench.io.numbers import format_number
from outlinebench.io.svg_arc import ARC_TOLERANCE
from outlinebench.io.svg_path import _found, _token_at, read_path_data
from outlinebench.io.svg_transform import is_mirroring, parse_transform, translation
from outlinebench.io.svg_units import (
    PX_PER_INCH,
    parse_aspect,
    parse_length,
    parse_view_box,
    view_box_transform,
)
from outlinebench.model.document import IDENTITY, Contour, Document, Outline

__all__ = [
    "SVG_NS",
    "XLINK_NS",
    "JOINS_NS",
    "JOINS_ATTR",
    "MAX_USE_INSTANCES",
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
# Most elements expanded through <use> references in one file (fan-out budget).
MAX_USE_INSTANCES = 100_000

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
    error: SvgReadError | None = None

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
        return f'<{tag} id="{eid}">'
    if index is not None:
        return f"<{tag}> #{index + 1}"
    return f"<{tag}> at line {line}" if line is not None else f"<{tag}>"


def _style_flags(el: Any) -> tuple[str | None, str | None]:
    display = el.get("display")
    visibility = el.get("visibility")
    style = el.get("style")
    if style and ("display" in style or "visibility" in style):
        for name, value in _STYLE_RE.findall(style):
            if name == "display":
                display = value
            else:
                visibility = value
    return display, visibility


def _length(el: Any, name: str, where: str, ppi: float, default: float = 0.0) -> float:
    ln = parse_length(el.get(name), where)
    if ln is None:
        return default
    value = ln.to_user(ppi)
    if value is None:
        raise SvgReadError(f"{where}: relative length {name}={el.get(name)!r} is not supported")
    return value


def shape_path_data(el: Any, where: str, ppi: float = PX_PER_INCH) -> str | None:
    """Path data equivalent to a basic shape (SVG 2 §10.2-10.7), or None if it renders nothing.

    Raises
    ------
    SvgReadError
        Bad attribute values (negative sizes, bad lengths), or coordinates of the equivalent
        path (``x + width``, ``cx + r``, ...) that overflow a double.
    """
    try:
        return _shape_path_data(el, where, ppi)
    except SvgReadError:
        raise
    except ValueError:  # format_number of an infinite sum
        raise SvgReadError(f"{where}: coordinates out of range (they overflow a double)") from None


def _shape_path_data(el: Any, where: str, ppi: float) -> str | None:
    tag = _local(el.tag)
    f = format_number
    if tag == "rect":
        x, y = _length(el, "x", where, ppi), _length(el, "y", where, ppi)
        w, h = _length(el, "width", where, ppi), _length(el, "height", where, ppi)
        if w < 0 or h < 0:
            raise SvgReadError(f"{where}: negative rect width or height")
        if w == 0 or h == 0:
            return None
        rx_given = parse_length(el.get("rx"), where) is not None and el.get("rx") != "auto"
        ry_given = parse_length(el.get("ry"), where) is not None and el.get("ry") != "auto"
        rx = _length(el, "rx", where, ppi) if rx_given else None
        ry = _length(el, "ry", where, ppi) if ry_given else None
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
        cx, cy = _length(el, "cx", where, ppi), _length(el, "cy", where, ppi)
        if tag == "circle":
            rx = ry = _length(el, "r", where, ppi)
        else:
            rx, ry = _length(el, "rx", where, ppi), _length(el, "ry", where, ppi)
            if el.get("rx") in (None, "auto") and el.get("ry") not in (None, "auto"):
                rx = ry
            if el.get("ry") in (None, "auto") and el.get("rx") not in (None, "auto"):
                ry = rx
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
        x1, y1 = _length(el, "x1", where, ppi), _length(el, "y1", where, ppi)
        x2, y2 = _length(el, "x2", where, ppi), _length(el, "y2", where, ppi)
        return f"M{f(x1)} {f(y1)} L{f(x2)} {f(y2)}"
    if tag in ("polyline", "polygon"):
        text = el.get("points") or ""
        m = _POINTS_OK.match(text)
        ok_text = text[: m.end()]
        values = _POINTS_RE.findall(ok_text)
        if m.end() < len(text.rstrip(" \t\r\n\f")) or len(values) % 2:
            raise SvgPathError(
                f"{where}: points: expected a number at offset {m.end()}", m.end(), text[m.end() :]
            )
        if len(values) < 4:
            return None
        pairs = [f"{values[i]} {values[i + 1]}" for i in range(0, len(values), 2)]
        return "M" + pairs[0] + " L" + " ".join(pairs[1:]) + (" Z" if tag == "polygon" else "")
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
    def __init__(self, where: str, ppi: float, on_unsupported: str, tolerance: float) -> None:
        self.where = where
        self.ppi = ppi
        self.on_unsupported = on_unsupported
        self.tolerance = tolerance
        self.notes: list[ReadNote] = []
        self.error: SvgReadError | None = None
        self.outlines: list[Outline] = []
        self.counts: dict[str, int] = {}
        self.examples: dict[str, str] = {}
        self.use_instances = 0
        self.root: Any = None
        self.xml: XmlSource | None = None
        self._newlines: NDArray[np.intp] | None = None

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

    def unsupported(self, kind: str, el: Any) -> None:
        if self.on_unsupported == "raise":
            raise UnsupportedSvgFeature(
                f"{self.where}: {self.name(el)}: {_NOT_GEOMETRY.get(kind, kind)}"
            )
        self.count(kind, self.name(el))

    def walk(self, root: Any, ids: dict[str, Any], root_matrix: NDArray[np.float64]) -> None:
        # Stack entries: (element, parent matrix, hidden, use chain, outer use element).
        stack: list[tuple[Any, NDArray[np.float64], bool, tuple[int, ...], Any]] = [
            (root, root_matrix, False, (), None)
        ]
        while stack:
            el, parent, hidden, chain, use = stack.pop()
            tag = _local(el.tag)
            if not tag:
                continue  # comment or processing instruction
            display, visibility = _style_flags(el)
            if display == "none":
                if tag in _GEOMETRY or tag in _CONTAINERS or tag in ("use", "text", "image"):
                    self.count("hidden", self.name(el))
                continue
            if tag in _NOT_RENDERED or tag.startswith("{"):
                continue
            if tag in _NOT_GEOMETRY:
                self.unsupported(tag, el)
                continue
            where = ""
            transform = el.get("transform")
            matrix = parent
            if transform:
                where = f"{self.where}: {self.name(el)}"
                try:
                    with np.errstate(over="ignore", invalid="ignore"):
                        matrix = parent @ parse_transform(transform, where)
                    if not np.isfinite(matrix).all():
                        raise SvgReadError(
                            f"{where}: transform {transform!r} is out of range (with its "
                            "parents' it overflows a double)"
                        )
                except SvgReadError as exc:
                    self.notes.append(ReadNote("error", f"{exc}; element skipped", "transform"))
                    continue
            if tag == "svg" or tag == "use":
                where = where or f"{self.where}: {self.name(el)}"
            if visibility in ("hidden", "collapse"):
                hidden_here = True
            elif visibility == "visible":
                hidden_here = False
            else:
                hidden_here = hidden
            if tag in _CONTAINERS:
                if tag == "svg" and el is not self.root:
                    try:
                        matrix = matrix @ self.nested_viewport(el, where)
                    except SvgReadError as exc:
                        self.notes.append(ReadNote("error", f"{exc}; element skipped", "svg"))
                        continue
                children = list(el)
                if tag == "switch":
                    # SVG 1.1 §5.8.2: only the first child whose conditions hold is rendered;
                    # we support no extensions and take any language.
                    children = [
                        c
                        for c in children
                        if isinstance(c.tag, str) and c.get("requiredExtensions") is None
                    ][:1]
                for child in reversed(children):
                    stack.append((child, matrix, hidden_here, chain, use))
                continue
            if tag == "use":
                self.expand_use(el, matrix, hidden_here, chain, use, ids, stack, where)
                continue
            if tag in _GEOMETRY:
                if hidden_here:
                    self.count("hidden", self.name(el))
                    continue
                self.read_geometry(el, tag, matrix, use)

    def nested_viewport(self, el: Any, where: str) -> NDArray[np.float64]:
        x = _length(el, "x", where, self.ppi)
        y = _length(el, "y", where, self.ppi)
        m = translation(x, y)
        vb = parse_view_box(el.get("viewBox"), where)
        if vb is not None:
            w = _length(el, "width", where, self.ppi, vb[2])
            h = _length(el, "height", where, self.ppi, vb[3])
            m = m @ view_box_transform(vb, w, h, parse_aspect(el.get("preserveAspectRatio")))
        return m

    def expand_use(
        self,
        el: Any,
        matrix: NDArray[np.float64],
        hidden: bool,
        chain: tuple[int, ...],
        use: Any,
        ids: dict[str, Any],
        stack: list,
        where: str,
    ) -> None:
        href = _href(el)
        if not href:
            self.notes.append(ReadNote("warning", f"{where}: use without a reference", "use"))
            return
        if not href.startswith("#"):
            self.count("external", f"{self.name(el)} → {href}")
            return
        target = ids.get(href[1:])
        if target is None:
            self.notes.append(
                ReadNote("error", f"{where}: reference {href} not found in the file", "use")
            )
            return
        if id(el) in chain or id(target) in chain:
            self.notes.append(
                ReadNote(
                    "error",
                    f"{where}: reference {href} leads back to itself (a use cycle); this element "
                    "was not expanded",
                    "use-cycle",
                )
            )
            return
        self.use_instances += 1
        if self.use_instances > MAX_USE_INSTANCES:
            if self.use_instances == MAX_USE_INSTANCES + 1:
                self.notes.append(
                    ReadNote(
                        "error",
                        f"{where}: more than {MAX_USE_INSTANCES} use instances; the rest were "
                        "not expanded",
                        "use-budget",
                    )
                )
            return
        ux = _length(el, "x", where, self.ppi)
        uy = _length(el, "y", where, self.ppi)
        m = matrix @ translation(ux, uy)
        new_chain = chain + (id(el), id(target))
        # The outermost use: (element, its coordinate system, refers straight to geometry?).
        if use is None:
            outer = (el, matrix, _local(target.tag) in _GEOMETRY)
        else:
            outer = (use[0], use[1], False)
        ttag = _local(target.tag)
        if ttag == "symbol":
            vb = parse_view_box(target.get("viewBox"), where)
            if vb is not None:
                w = _length(el, "width", where, self.ppi, vb[2])
                h = _length(el, "height", where, self.ppi, vb[3])
                m = m @ view_box_transform(
                    vb, w, h, parse_aspect(target.get("preserveAspectRatio"))
                )
            for child in reversed(list(target)):
                stack.append((child, m, hidden, new_chain, outer))
            return
        stack.append((target, m, hidden, new_chain, outer))

    def read_geometry(self, el: Any, tag: str, matrix: NDArray[np.float64], use: Any) -> None:
        index = len(self.outlines)
        where = f"{self.where}: {describe(el, index)}"
        m = None if np.array_equal(matrix, IDENTITY) else matrix
        path_error = False
        if tag in ("polyline", "polygon"):
            self.read_points(el, tag, index, where, m, use)
            return
        try:
            d = el.get("d") or "" if tag == "path" else shape_path_data(el, where, self.ppi)
        except SvgReadError as exc:
            self.notes.append(ReadNote("error", f"{exc}; element skipped", "shape"))
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
                    self.notes.append(ReadNote("error", str(err), "path"))
            for key, n in res.counts.items():
                self.count(key, describe(el, index), n)
        self.add_outline(el, tag, index, where, m, use, contours, path_error)

    def read_points(
        self,
        el: Any,
        tag: str,
        index: int,
        where: str,
        m: NDArray[np.float64] | None,
        use: Any,
    ) -> None:
        """A polyline or polygon, read up to the first bad number of its ``points``.

        SVG 2 §10.6-10.7: bad points are in error like bad path data, so the pairs before the
        error are kept (§9.5.4) and the error names its offset in the ``points`` attribute.
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
        elif bad is None and len(found) % 2:
            bad = (len(text), "expected a number")
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
        self.add_outline(el, tag, index, where, m, use, contours, bad is not None)

    def add_outline(
        self,
        el: Any,
        tag: str,
        index: int,
        where: str,
        m: NDArray[np.float64] | None,
        use: Any,
        contours: list[Contour],
        path_error: bool,
    ) -> None:
        contours = _read_joins(el, contours, where, self.notes)
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
            ("external", "warning", "{n} external reference(s) not fetched (first: {e})"),
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


def read_svg(
    source: str | os.PathLike[str] | bytes,
    *,
    px_per_inch: float = PX_PER_INCH,
    on_unsupported: str = "warn",
    allow_entities: bool = False,
    max_bytes: int = MAX_BYTES,
    max_entity_chars: int = MAX_ENTITY_CHARS,
    tolerance: float = ARC_TOLERANCE,
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
        raise ValueError(
            f"on_unsupported must be 'warn', 'raise' or 'skip', got {on_unsupported!r}"
        )
    if not (px_per_inch > 0 and math.isfinite(px_per_inch)):
        raise ValueError(f"px_per_inch must be a positive number, got {px_per_inch!r}")
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
    reader = _Reader(where, px_per_inch, on_unsupported, tolerance)
    reader.root = root
    reader.xml = xml
    root_matrix = parse_transform(root.get("transform"), f"{where}: <svg>")
    reader.walk(root, ids, root_matrix)
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
