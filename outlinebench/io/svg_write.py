"""Saving documents as SVG: write-back into the original bytes, fresh files.

Write-back splices changes into the file's original bytes: the start tag of an edited element
gets a new ``d`` (and, for a basic shape, becomes a ``path`` keeping its id and every other
attribute); join intent goes into our own namespaced attribute; new outlines go in before the
root's end tag. Every other byte (comments, text, images, styles, ids, unknown namespaces,
formatting, the XML declaration and doctype) stays exactly as it was.

Saving is atomic: serialise fully, re-read the result as a check, then write through
:func:`outlinebench.io.atomic.write_file_atomic`. Cut files are written by
:mod:`outlinebench.io.cut_file`, the join-intent attribute by :mod:`outlinebench.io.join_intent`;
their names are re-exported here for callers that import them from this module.
"""

from __future__ import annotations

import codecs
import os
import re
from collections.abc import Sequence
from typing import Any

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import SvgReadError, SvgWriteError
from outlinebench.io._xml import one_line
from outlinebench.io.atomic import write_file_atomic
from outlinebench.io.cut_file import CUT_CAUTION, polylines_svg
from outlinebench.io.join_intent import joins_text
from outlinebench.io.numbers import format_number
from outlinebench.io.svg_path import _apply, format_path_data
from outlinebench.io.svg_read import (
    JOINS_NS,
    JOINS_PREFIX,
    SVG_NS,
    XLINK_NS,
    ElementRef,
    SvgSource,
    read_svg,
)
from outlinebench.io.svg_transform import parse_transform
from outlinebench.model.document import IDENTITY, Contour, Document, Outline

__all__ = [
    "CUT_CAUTION",
    "svg_bytes",
    "write_svg",
    "write_file_atomic",
    "polylines_svg",
    "joins_text",
    "one_line",
]

# Largest distance, relative to the coordinates' size, accepted by the save check between an
# edited outline under a transform and its re-read geometry (the inverse transform cannot
# always give coordinates that map back bit for bit).
WRITE_CHECK_TOLERANCE = 1e-12

_SHAPE_ATTRS = {
    "rect": ("x", "y", "width", "height", "rx", "ry"),
    "circle": ("cx", "cy", "r"),
    "ellipse": ("cx", "cy", "rx", "ry"),
    "line": ("x1", "y1", "x2", "y2"),
    "polyline": ("points",),
    "polygon": ("points",),
}
_ATTR_RE = re.compile(rb"""\s+([^\s=/>]+)\s*=\s*("[^"]*"|'[^']*')""")
_TAG_NAME_RE = re.compile(rb"<([^\s/>]+)")
_END_TAG_RE = re.compile(rb"</([^\s>]+)")
_TAG_END_RE = re.compile(rb"\s*(/?)>")
_NS_DECL_RE = re.compile(r"xmlns:([A-Za-z_][\w.-]*)")


def _to_element(points: NDArray[np.float64], matrix: NDArray[np.float64]) -> NDArray[np.float64]:
    """Element coordinates q with matrix·q == points, bit for bit where a nearby float allows.

    The plain inverse is tried first; where mapping it forward (with the reader's arithmetic)
    does not give the same floats, neighbouring floats up to 4 ulps away are searched.
    """
    inv = np.linalg.inv(matrix)
    q = _apply(points, inv)
    back = _apply(q, matrix)
    bad = np.flatnonzero(np.any(back != points, axis=-1))
    if bad.size:
        steps = np.arange(-4, 5)
        qb, pb = q[bad], points[bad]
        best = qb.copy()
        found = np.zeros(bad.size, dtype=bool)
        for sx in steps:
            for sy in steps:
                cand = np.stack(
                    [
                        _nudge(qb[:, 0], int(sx)),
                        _nudge(qb[:, 1], int(sy)),
                    ],
                    axis=1,
                )
                ok = ~found & np.all(_apply(cand, matrix) == pb, axis=1)
                best[ok] = cand[ok]
                found |= ok
        q[bad] = best
    return _fewest_decimals(q, points, matrix)


# Decimal places tried when looking for short element coordinates (0.1 … 1e-15).
_MAX_DECIMALS = 15


def _fewest_decimals(
    q: NDArray[np.float64], points: NDArray[np.float64], matrix: NDArray[np.float64]
) -> NDArray[np.float64]:
    """Each point of q replaced by q rounded to the fewest decimals that still maps to the
    same root coordinates bit for bit (so "3.3" stays "3.3", not 3.2999999999999994)."""
    out = q.copy()
    todo = np.ones(len(q), dtype=bool)
    with np.errstate(over="ignore", invalid="ignore"):
        for decimals in range(_MAX_DECIMALS + 1):
            idx = np.flatnonzero(todo)
            if idx.size == 0:
                break
            cand = np.round(q[idx], decimals)
            ok = np.all(_apply(cand, matrix) == points[idx], axis=1)
            out[idx[ok]] = cand[ok]
            todo[idx[ok]] = False
    return out


def _nudge(x: NDArray[np.float64], steps: int) -> NDArray[np.float64]:
    out = x.copy()
    direction = np.inf if steps > 0 else -np.inf
    for _ in range(abs(steps)):
        out = np.nextafter(out, direction)
    return out


def _element_contours(outline: Outline, matrix: NDArray[np.float64]) -> list[Contour]:
    if matrix is IDENTITY or np.array_equal(matrix, IDENTITY):
        return list(outline.contours)
    every = [s for c in outline.contours for s in c.segments]
    if not every:
        return [Contour((), c.closed, c.joins) for c in outline.contours]
    # One call for all control points of the outline (numpy per-call cost dominates).
    flat = _to_element(np.concatenate(every).astype(np.float64, copy=False), matrix)
    cuts = np.cumsum([len(s) for s in every])[:-1]
    pieces = iter(np.split(flat, cuts))
    out = []
    for c in outline.contours:
        segs = []
        for _ in c.segments:
            segs.append(next(pieces).copy())
        # Shared end points stay shared: each segment starts where the previous one ended.
        for i in range(1, len(segs)):
            segs[i][0] = segs[i - 1][-1]
        if c.closed and segs:
            segs[-1][-1] = segs[0][0]
        for s in segs:
            s.flags.writeable = False
        out.append(Contour(tuple(segs), c.closed, c.joins))
    return out


def _codec(encoding: str) -> str:
    """The Python codec of a declared encoding; ASCII (with character references for the
    rest) when Python does not know the name."""
    try:
        return codecs.lookup(encoding).name
    except LookupError:
        return "ascii"


class _Splicer:
    def __init__(self, src: SvgSource) -> None:
        self.src = src
        self.data = src.xml.data
        self.edits: list[tuple[int, int, bytes]] = []
        self.prefix = self._joins_prefix()
        self.codec = _codec(src.xml.encoding)

    def encode(self, text: str) -> bytes:
        """Text spliced into the file, in the file's own encoding (XML 1.0 §4.3.3); a
        character the encoding cannot hold becomes a character reference (§4.1), which
        reads back as the same character."""
        return text.encode(self.codec, "xmlcharrefreplace")

    def _root_start(self) -> tuple[int, int]:
        start = self.src.xml.spans[id(self.src.xml.root)][0]
        return start, self._tag_end(start)

    def _joins_prefix(self) -> tuple[str, bool]:
        start, end = self._root_start()
        tag = self.data[start:end].decode("ascii", "replace")
        used = set()
        for m in re.finditer(r"""xmlns:([A-Za-z_][\w.-]*)\s*=\s*("[^"]*"|'[^']*')""", tag):
            if m.group(2)[1:-1] == JOINS_NS:
                return m.group(1), False
            used.add(m.group(1))
        prefix = JOINS_PREFIX
        k = 1
        while prefix in used:
            prefix = f"{JOINS_PREFIX}{k}"
            k += 1
        return prefix, True

    def _tag_end(self, start: int) -> int:
        m = _TAG_NAME_RE.match(self.data, start)
        pos = m.end()
        while True:
            a = _ATTR_RE.match(self.data, pos)
            if a is None:
                break
            pos = a.end()
        e = _TAG_END_RE.match(self.data, pos)
        if e is None:
            raise SvgWriteError("cannot find the end of a start tag while saving")
        return e.end()

    def set_attrs(
        self,
        el: Any,
        values: dict[str, str | None],
        remove: Sequence[str] = (),
        rename_to: str | None = None,
    ) -> None:
        """Rewrite one start tag: set/remove attributes (raw qualified names)."""
        start = self.src.xml.spans[id(el)][0]
        end = self._tag_end(start)
        tag = self.data[start:end]
        name_m = _TAG_NAME_RE.match(tag)
        raw_name = name_m.group(1)
        pieces = [b"<" + (self._renamed(raw_name, rename_to) if rename_to else raw_name)]
        pos = name_m.end()
        done = set()
        while True:
            a = _ATTR_RE.match(tag, pos)
            if a is None:
                break
            name = a.group(1).decode("ascii", "replace")
            if name in remove:
                pass
            elif name in values:
                if values[name] is not None:
                    q = a.group(2)[:1]
                    pieces.append(tag[pos : a.start(2)] + q + self.encode(values[name]) + q)
                done.add(name)
            else:
                pieces.append(tag[pos : a.end()])
            pos = a.end()
        for name, value in values.items():
            if name not in done and value is not None:
                pieces.append(self.encode(f' {name}="{value}"'))
        pieces.append(tag[pos:])
        self.edits.append((start, end, b"".join(pieces)))
        if rename_to:
            e = self.src.xml.spans[id(el)][1]
            if self.has_end_tag(el):
                m = _END_TAG_RE.match(self.data, e)
                if m is None:  # pragma: no cover - expat guarantees an end tag here
                    raise SvgWriteError("cannot find an end tag while saving")
                new = b"</" + self._renamed(m.group(1), rename_to)
                self.edits.append((e, m.end(), new))

    def fill(self, el: Any, content: bytes, name: str) -> None:
        """After :meth:`set_attrs` renamed ``el`` to ``name``: add ``content`` as its last
        children, opening an empty-element tag ``<x/>`` into ``<x>…</x>``."""
        if self.has_end_tag(el):
            e = self.src.xml.spans[id(el)][1]
            self.edits.append((e, e, content))
            return
        start, end, tag = self.edits.pop()
        raw = _TAG_NAME_RE.match(tag).group(1)
        opened = tag[:-2].rstrip() + b">" if tag.endswith(b"/>") else tag
        self.edits.append((start, end, opened + content + b"</" + raw + b">"))

    def has_end_tag(self, el: Any) -> bool:
        """Whether the element is written ``<x ...>…</x>`` rather than ``<x .../>``.

        Decided by the start tag itself: for an empty-element tag the parser's end position
        is where the tag ends, which may be where the parent's end tag begins.
        """
        start = self.src.xml.spans[id(el)][0]
        end = self._tag_end(start)
        return self.data[end - 2 : end] != b"/>"

    def raw_attr_names(self, el: Any) -> list[str]:
        """Attribute names as written in the element's start tag (with their prefixes)."""
        start = self.src.xml.spans[id(el)][0]
        tag = self.data[start : self._tag_end(start)]
        pos = _TAG_NAME_RE.match(tag).end()
        names = []
        while (a := _ATTR_RE.match(tag, pos)) is not None:
            names.append(a.group(1).decode("ascii", "replace"))
            pos = a.end()
        return names

    @staticmethod
    def _renamed(raw: bytes, local: str) -> bytes:
        prefix, colon, _ = raw.rpartition(b":")
        return prefix + colon + local.encode() if colon else local.encode()

    def joins_attr(self) -> str:
        return f"{self.prefix[0]}:joins"

    def declare_prefix(self) -> None:
        prefix, needed = self.prefix
        if not needed:
            return
        start, end = self._root_start()
        name_end = _TAG_NAME_RE.match(self.data, start).end()
        self.edits.append((name_end, name_end, f' xmlns:{prefix}="{JOINS_NS}"'.encode()))
        self.prefix = (prefix, False)

    def append(self, text: bytes) -> None:
        root = self.src.xml.root
        s, e = self.src.xml.spans[id(root)]
        if self.has_end_tag(root):
            self.edits.append((e, e, text))
        else:  # <svg .../>: open it up
            end = self._tag_end(s)
            close = self.data[s:end]
            name = _TAG_NAME_RE.match(close).group(1)
            opened = close[:-2].rstrip() + b">" if close.endswith(b"/>") else close
            self.edits.append((s, end, opened + b"\n" + text + b"</" + name + b">"))

    def result(self) -> bytes:
        out = []
        pos = 0
        # Insertions at the same offset keep their order; the prefix declaration goes first.
        for start, end, text in sorted(self.edits, key=lambda e: (e[0], e[1])):
            if start < pos:
                raise SvgWriteError("overlapping edits while saving (internal error)")
            out.append(self.data[pos:start])
            out.append(text)
            pos = end
        out.append(self.data[pos:])
        return b"".join(out)


def _untouched(outline: Outline, ref: ElementRef) -> bool:
    a, b = outline.contours, ref.contours
    return a is b or (len(a) == len(b) and all(x is y for x, y in zip(a, b, strict=True)))


def _same_segments(outline: Outline, ref: ElementRef) -> bool:
    a, b = outline.contours, ref.contours
    if len(a) != len(b):
        return False
    for x, y in zip(a, b, strict=True):
        if x.closed != y.closed or len(x.segments) != len(y.segments):
            return False
        if x.segments is not y.segments and not all(
            s is t for s, t in zip(x.segments, y.segments, strict=True)
        ):
            return False
    return True


def _path_element(d: str, joins: str | None, element_id: str | None, prefix: str) -> bytes:
    attrs = []
    if element_id:
        attrs.append(f'id="{_escape(element_id)}"')
    attrs.append(f'd="{d}"')
    if joins is not None:
        attrs.append(f'{prefix}:joins="{joins}"')
    return ("<path " + " ".join(attrs) + "/>\n").encode()


def _escape(text: str) -> str:
    return (
        text.replace("&", "&amp;").replace("<", "&lt;").replace('"', "&quot;").replace(">", "&gt;")
    )


def _replace_use(sp: _Splicer, outline: Outline, ref: ElementRef) -> None:
    """An edited instance of a use that refers straight to one shape becomes a path.

    The use keeps its id, transform and every other attribute except the reference and
    x/y/width/height; the referenced element's own plain presentation attributes (fill,
    stroke, class, style, ...) are copied where the use does not set them, so the path looks
    as the instance did. The referenced element and other uses of it are untouched.
    """
    assert ref.use_matrix is not None
    contours = _element_contours(outline, ref.use_matrix)
    values: dict[str, str | None] = {"d": format_path_data(contours)}
    joins = joins_text(outline.contours)
    if joins is not None:
        values[sp.joins_attr()] = joins
    skip = {"id", "d", "transform", *(_SHAPE_ATTRS.get(_local_name(ref.element.tag), ()))}
    for name, value in ref.element.attrib.items():
        if "{" not in name and name not in skip and ref.use.get(name) is None:
            values[name] = _escape(value)
    raw_names = sp.raw_attr_names(ref.use)
    remove = [n for n in raw_names if n in ("x", "y", "width", "height", "href")]
    remove += [n for n in raw_names if n.endswith(":href")]
    sp.set_attrs(ref.use, values, remove=remove, rename_to="path")


def _fork_use(sp: _Splicer, use: Any, outlines: Sequence[Outline]) -> None:
    """A use of a symbol or group with an edited instance becomes a ``g`` of paths.

    The ``g`` keeps the use's id, transform and every other attribute except the reference
    and x/y/width/height; it holds one path per outline of the instance, in document order,
    in the use's own coordinates (its x/y and a symbol's viewBox are in the numbers). Each
    path copies its source element's plain presentation attributes (fill, stroke, class,
    style, ...) but not its id (the symbol keeps that) nor its transform (in the numbers).
    Attributes set on groups inside the symbol are not copied. The symbol or group and its
    other instances are untouched.
    """
    parts = []
    for outline in outlines:
        ref = outline.source
        assert ref.use_matrix is not None
        contours = _element_contours(outline, ref.use_matrix)
        skip = {"id", "d", "transform", *(_SHAPE_ATTRS.get(_local_name(ref.element.tag), ()))}
        attrs = [
            f'{name}="{_escape(value)}"'
            for name, value in ref.element.attrib.items()
            if "{" not in name and name not in skip
        ]
        attrs.append(f'd="{format_path_data(contours)}"')
        joins = joins_text(outline.contours)
        if joins is not None:
            attrs.append(f'{sp.joins_attr()}="{joins}"')
        parts.append(f"<path {' '.join(attrs)}/>")
    raw_names = sp.raw_attr_names(use)
    remove = [n for n in raw_names if n in ("x", "y", "width", "height", "href")]
    remove += [n for n in raw_names if n.endswith(":href")]
    sp.set_attrs(use, {}, remove=remove, rename_to="g")
    sp.fill(use, sp.encode("".join(parts)), "g")


# Containers whose content is not drawn where it stands (checked no further for a fork).
_UNDRAWN = {
    "defs", "title", "desc", "metadata", "style", "script", "clipPath", "mask", "marker",
    "pattern", "linearGradient", "radialGradient", "filter",
}  # fmt: skip
_GEOMETRY_TAGS = {"path", "rect", "circle", "ellipse", "line", "polyline", "polygon"}


def _refuse_lossy_fork(src: SvgSource, members: Sequence[Outline]) -> None:
    """Refuse to fork a use whose symbol or group shows more than its outlines.

    Forking writes outlines only; text, images or shapes that are not outlines (hidden ones)
    inside the referenced content would vanish from that instance.

    Raises
    ------
    SvgWriteError
        Naming the use (id or line) and what it shows.
    """
    use = members[0].source.use
    href = use.get(f"{{{XLINK_NS}}}href") or use.get("href") or ""
    target = next(
        (e for e in src.xml.root.iter() if isinstance(e.tag, str) and e.get("id") == href[1:]),
        None,
    )
    if target is None:
        return
    drawn = {id(o.source.element) for o in members}
    found: list[str] = []
    stack = [target]
    while stack:
        el = stack.pop()
        name = _local_name(el.tag) if isinstance(el.tag, str) else ""
        if not name or name in _UNDRAWN:
            continue
        if name in ("text", "image", "foreignObject"):
            found.append(f"<{name}>")
            continue
        if name in _GEOMETRY_TAGS and id(el) not in drawn:
            found.append(f"a hidden <{name}>")
            continue
        stack.extend(el)
    if found:
        where = src.path or "<bytes>"
        eid = use.get("id")
        if eid:
            label = f'<use id="{one_line(eid)}">'
        else:
            line = src.xml.data.count(b"\n", 0, src.xml.spans[id(use)][0]) + 1
            label = f"<use> at line {line}"
        shown = ", ".join(sorted(set(found)))
        raise SvgWriteError(
            f"{where}: {label} also holds {shown} besides the edited outlines; saving the edit "
            "would drop it from that instance, so nothing was saved (undo the edit of this "
            "instance)",
            file=where,
        )


def _local_name(tag: str) -> str:
    return tag.rpartition("}")[2]


def _write_back(doc: Document, src: SvgSource) -> tuple[bytes, list[Outline]]:
    enc = src.xml.encoding
    if enc.startswith(("utf-16", "utf-32", "ucs")):
        raise SvgWriteError(
            f"{src.path or '<bytes>'}: saving back into a {enc} file is not supported; "
            "save it as UTF-8 first",
            file=src.path,
        )
    sp = _Splicer(src)
    root_matrix = np.eye(3)
    root = src.xml.root
    if root.get("transform"):
        root_matrix = parse_transform(root.get("transform"))
    written_old: list[tuple[int, Outline]] = []
    new: list[Outline] = []
    need_prefix = False
    # Uses of a symbol or group with at least one edited instance outline: forked whole.
    forked: dict[int, list[Outline]] = {}
    for outline in doc.outlines:
        ref = outline.source
        if (
            isinstance(ref, ElementRef)
            and ref.use is not None
            and not ref.use_direct
            and not _untouched(outline, ref)
        ):
            forked[id(ref.use)] = []
    for outline in doc.outlines:
        ref = outline.source
        if not isinstance(ref, ElementRef):
            new.append(outline)
            continue
        written_old.append((outline.source_index, outline))
        if ref.use is not None and id(ref.use) in forked:
            forked[id(ref.use)].append(outline)
            need_prefix = need_prefix or joins_text(outline.contours) is not None
            continue
        if _untouched(outline, ref):
            continue
        if ref.use is not None:
            if ref.use_matrix is None:  # pragma: no cover - the reader always sets it
                raise SvgWriteError(
                    f"{src.path or '<bytes>'}: a use instance lost its place", file=src.path
                )
            _replace_use(sp, outline, ref)
            need_prefix = need_prefix or joins_text(outline.contours) is not None
            continue
        tag = outline.tag
        joins = joins_text(outline.contours)
        values: dict[str, str | None] = {}
        if joins is not None or ref.element.get(f"{{{JOINS_NS}}}joins") is not None:
            need_prefix = need_prefix or joins is not None
            values[sp.joins_attr()] = joins  # None removes the attribute
        if _same_segments(outline, ref) and tag == "path":
            sp.set_attrs(ref.element, values)
            continue
        contours = _element_contours(outline, ref.matrix)
        values["d"] = format_path_data(contours)
        if tag == "path":
            sp.set_attrs(ref.element, values)
        else:
            sp.set_attrs(ref.element, values, remove=_SHAPE_ATTRS.get(tag, ()), rename_to="path")
    for members in forked.values():
        _refuse_lossy_fork(src, members)
        _fork_use(sp, members[0].source.use, members)
    if new:
        parts = []
        for outline in new:
            contours = _element_contours(outline, root_matrix @ outline.transform)
            joins = joins_text(outline.contours)
            need_prefix = need_prefix or joins is not None
            parts.append(
                _path_element(format_path_data(contours), joins, outline.element_id, sp.prefix[0])
            )
        sp.append(sp.encode(b"".join(parts).decode("utf-8")))
    if need_prefix:
        sp.declare_prefix()
    written_old.sort(key=lambda t: t[0])
    return sp.result(), [o for _, o in written_old] + new


def _fresh(doc: Document) -> tuple[bytes, list[Outline]]:
    f = format_number
    attrs = [f'xmlns="{SVG_NS}"']
    if any(j is not None for o in doc.outlines for c in o.contours for j in c.joins):
        attrs.append(f'xmlns:{JOINS_PREFIX}="{JOINS_NS}"')
    vb = doc.view_box
    if doc.width_mm is not None and doc.height_mm is not None:
        attrs.append(f'width="{f(doc.width_mm)}mm" height="{f(doc.height_mm)}mm"')
        if vb is None:
            vb = (0.0, 0.0, doc.width_mm / doc.mm_per_unit, doc.height_mm / doc.mm_per_unit)
    if vb is not None:
        attrs.append(f'viewBox="{" ".join(f(v) for v in vb)}"')
    lines = [b'<?xml version="1.0" encoding="UTF-8"?>\n', f"<svg {' '.join(attrs)}>\n".encode()]
    for outline in doc.outlines:
        contours = _element_contours(outline, outline.transform)
        lines.append(
            _path_element(
                format_path_data(contours),
                joins_text(outline.contours),
                outline.element_id,
                JOINS_PREFIX,
            )
        )
    lines.append(b"</svg>\n")
    return b"".join(lines), list(doc.outlines)


def _check(data: bytes, written: list[Outline], doc: Document, where: str) -> None:
    src = doc.source if isinstance(doc.source, SvgSource) else None
    ppi = src.px_per_inch if src is not None else 96.0
    try:
        back = read_svg(data, px_per_inch=ppi, on_unsupported="skip", allow_entities=True)
    except SvgReadError as exc:
        raise SvgWriteError(
            f"{where}: the serialised file does not read back: {exc}", file=where
        ) from None
    got = back.document.outlines
    if len(got) != len(written):
        raise SvgWriteError(
            f"{where}: save check failed: {len(written)} outlines written, {len(got)} read back",
            file=where,
        )
    # Elements rewritten in place: every use instance of them follows (SVG 1.1 §5.6).
    rewritten = {
        id(o.source.element): o
        for o in written
        if isinstance(o.source, ElementRef) and o.source.use is None and not _untouched(o, o.source)
    }
    for k, (want, have) in enumerate(zip(written, got, strict=True)):
        ref = want.source
        expect = ref.contours if isinstance(ref, ElementRef) and _untouched(want, ref) else None
        expect = expect if expect is not None else want.contours
        exact = not isinstance(ref, ElementRef) or (
            ref.use is None and np.array_equal(ref.matrix, IDENTITY)
        )  # a use instance is written through the inverse of the use's own matrix
        if isinstance(ref, ElementRef) and ref.use is not None and id(ref.element) in rewritten:
            if _untouched(want, ref):
                original = rewritten[id(ref.element)]
                expect = _mapped(
                    original.contours, ref.matrix @ np.linalg.inv(original.source.matrix)
                )
                exact = False
        if not _contours_match(expect, have.contours, exact):
            name = f'id "{want.element_id}"' if want.element_id else f"#{k + 1}"
            raise SvgWriteError(
                f"{where}: save check failed: outline {name} does not read back as written; "
                "the file was not changed",
                file=where,
            )


def _mapped(contours: Sequence[Contour], matrix: NDArray[np.float64]) -> list[Contour]:
    """Contours with every control point mapped by an affine matrix (for the save check)."""
    return [
        Contour(tuple(_apply(np.asarray(s), matrix) for s in c.segments), c.closed, c.joins)
        for c in contours
    ]


def _contours_match(a: Sequence[Contour], b: Sequence[Contour], exact: bool) -> bool:
    if len(a) != len(b):
        return False
    for x, y in zip(a, b, strict=True):
        if x.closed != y.closed or len(x.segments) != len(y.segments) or x.joins != y.joins:
            return False
        for s, t in zip(x.segments, y.segments, strict=True):
            if s.shape != t.shape:
                return False
            if exact:
                if not np.array_equal(s, t):
                    return False
            else:
                scale = max(1.0, float(np.max(np.abs(s))))
                if float(np.max(np.abs(s - t))) > WRITE_CHECK_TOLERANCE * scale:
                    return False
    return True


def svg_bytes(document: Document) -> bytes:
    """Serialise a document to SVG bytes, checked by reading them back.

    Parameters
    ----------
    document : Document
        Read from SVG (written back into its original bytes) or made from scratch (a fresh
        minimal SVG root).

    Returns
    -------
    bytes

    Raises
    ------
    SvgWriteError
        The result does not read back to the same geometry, an edited outline is a ``use``
        instance, or the original file's encoding cannot be spliced.
    """
    src = document.source
    where = document.path or "<document>"
    if isinstance(src, SvgSource):
        data, written = _write_back(document, src)
    else:
        data, written = _fresh(document)
    _check(data, written, document, where)
    return data


def write_svg(document: Document, path: str | os.PathLike[str] | None = None) -> None:
    """Save a document atomically.

    Parameters
    ----------
    document : Document
    path : str or path-like, optional
        Target file; default ``document.path``.

    Raises
    ------
    SvgWriteError
        No target, a read-only target (refused, never replaced), the save check failed, or
        a disk error; the old file is then left as it was.

    Notes
    -----
    Serialise fully and re-read as a check (:func:`svg_bytes`), then write through
    :func:`write_file_atomic`.
    """
    target_name = path if path is not None else document.path
    if target_name is None:
        raise SvgWriteError("no file name to save to")
    write_file_atomic(target_name, svg_bytes(document))
