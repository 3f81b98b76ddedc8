"""Writing edited glyph outlines back into the UFO source they were read from.

Only the ``.glif`` file of a glyph whose contours were edited is rewritten; every other file
of the source (other glyphs, ``contents.plist``, ``fontinfo.plist``, ``lib.plist``, features,
images, data, other layers) keeps its bytes. Which glyphs were edited is told by identity,
as the SVG writer does with its element handles: a glyph outline whose contours are the very
objects the reader made (:attr:`~outlinebench.io.font_read.GlyphRef.contours`) is untouched.

A rewritten ``.glif`` keeps the glyph's advance, unicodes, anchors, guidelines, note, image,
lib, components and GLIF format version; its contours are written from the model
(``line``, ``qcurve`` with one off-curve point, ``curve`` with two; ``smooth="yes"`` where the
join intent is smooth), y flipped back (see :mod:`outlinebench.io.font_read`). Numbers are
written as the shortest text that reads back to the same float, so the save check below is
bit-exact.

Saving is checked and atomic per file: every edited glyph is serialised and read back first
(the save check compares every control point bit for bit); only then is each file written
through :func:`outlinebench.io.write_file_atomic` (temporary file, fsync, ``os.replace``).
Binary fonts are read-only: a repair of one is written as a UFO or SVG.

References
----------
Unified Font Object specification 3: "glif" (point types, ``smooth``, components),
"contents.plist" (glyph name → file name), "layercontents.plist".
"""

from __future__ import annotations

import os
import re
import shutil
from collections.abc import Sequence
from dataclasses import replace
from pathlib import Path
from typing import Any

import numpy as np

from outlinebench.errors import FontWriteError, OutlinebenchError
from outlinebench.io.font_read import (
    FontSource,
    GlyphRef,
    _contour_from_segments,
    _ufo_segments,
    to_font_coordinates,
)
from outlinebench.io.svg_write import write_file_atomic
from outlinebench.model.document import Contour, Document, Outline

__all__ = ["edited_glyphs", "glif_bytes", "write_ufo_glyphs"]

_FORMAT_RE = re.compile(rb"""<glyph\b[^>]*?\bformat\s*=\s*["']([0-9]+)(?:\.([0-9]+))?["']""")


def _untouched(outline: Outline, ref: GlyphRef) -> bool:
    a, b = outline.contours, ref.contours
    return a is b or (len(a) == len(b) and all(x is y for x, y in zip(a, b, strict=True)))


def edited_glyphs(doc: Document) -> list[int]:
    """Indices of the glyph outlines whose contours differ (by identity) from what was read.

    Parameters
    ----------
    doc : Document
        Read by :func:`outlinebench.io.read_font`.

    Returns
    -------
    list of int
        Indices into ``doc.outlines``.
    """
    return [
        k
        for k, o in enumerate(doc.outlines)
        if isinstance(o.source, GlyphRef) and not _untouched(o, o.source)
    ]


def _own_contours(outline: Outline, ref: GlyphRef, where: str) -> list[Contour]:
    """The outline's contours that belong in the glyph's own outline (not its components).

    The reader puts a glyph's own contours first and its components' contours after them;
    the component contours must be the very objects read (a component lives in another
    glyph and is not rewritten here).
    """
    k = sum(1 for o in ref.origins if o is not None)
    if k == 0:
        return list(outline.contours)
    tail = outline.contours[-k:] if len(outline.contours) >= k else ()
    wanted = ref.contours[-k:]
    if len(tail) != k or not all(a is b for a, b in zip(tail, wanted, strict=True)):
        which = next(o for o in ref.origins if o is not None)
        raise FontWriteError(
            f"{where}: glyph {ref.name!r}: a contour from its component {which!r} was edited "
            "or removed; decompose the component in the source first, or save as SVG",
            file=where,
        )
    return list(outline.contours[: len(outline.contours) - k])


_TYPE = {2: "line", 3: "qcurve", 4: "curve"}


def _draw_contours(pen: Any, contours: Sequence[Contour]) -> None:
    """Draw model contours into a point pen in font coordinates (see module docstring)."""
    for c in contours:
        segs = [to_font_coordinates(s) for s in c.segments]
        if not segs:
            continue
        n = len(segs)
        pen.beginPath()

        def on(p: Any, kind: str, smooth: bool) -> None:
            pen.addPoint((_num(p[0]), _num(p[1])), kind, smooth=smooth)

        def offs(s: Any) -> None:
            for p in s[1:-1]:
                pen.addPoint((_num(p[0]), _num(p[1])), None)

        if c.closed:
            on(segs[0][0], _TYPE[len(segs[-1])], c.joins[n - 1] == "smooth")
            for i, s in enumerate(segs):
                offs(s)
                if i < n - 1:
                    on(s[-1], _TYPE[len(s)], c.joins[i] == "smooth")
        else:
            on(segs[0][0], "move", False)
            for i, s in enumerate(segs):
                offs(s)
                on(s[-1], _TYPE[len(s)], i < n - 1 and c.joins[i] == "smooth")
        pen.endPath()


def _num(v: float) -> float | int:
    f = float(v)
    return int(f) if f.is_integer() and abs(f) < 2**53 else f


def glif_bytes(outline: Outline, source: FontSource, where: str | None = None) -> bytes:
    """The ``.glif`` file of an edited glyph outline, checked by reading it back.

    Parameters
    ----------
    outline : Outline
        A glyph outline read from ``source`` (its ``source`` is a
        :class:`~outlinebench.io.font_read.GlyphRef`).
    source : FontSource
        The UFO it was read from.
    where : str, optional
        Name for messages (default ``source.path``).

    Returns
    -------
    bytes
        UTF-8 GLIF in the format version of the original file.

    Raises
    ------
    FontWriteError
        A component's contour was edited, the glyph is not in the source, or the result does
        not read back to the same contours bit for bit.
    """
    from fontTools.ufoLib import glifLib
    from ufoLib2.objects import Glyph

    where = where or source.path
    ref = outline.source
    if not isinstance(ref, GlyphRef):
        raise FontWriteError(
            f"{where}: outline {outline.element_id!r} is not a glyph outline", file=where
        )
    font = source.font
    layer = font.layers.defaultLayer
    if ref.name not in layer or ref.name not in source.glif_files or source.layer_dir is None:
        raise FontWriteError(f"{where}: glyph {ref.name!r} is not in the source", file=where)
    original = layer[ref.name]
    own = _own_contours(outline, ref, where)
    old_path = Path(source.layer_dir) / source.glif_files[ref.name]
    version: Any = None
    try:
        m = _FORMAT_RE.search(old_path.read_bytes()[:4096])
        if m:
            version = (int(m.group(1)), int(m.group(2) or 0))
    except OSError as exc:
        raise FontWriteError(
            f"{where}: cannot read {old_path.name}: {exc.strerror}", file=where
        ) from None

    def draw(pen: Any) -> None:
        _draw_contours(pen, own)
        for comp in original.components:
            pen.addComponent(comp.baseGlyph, tuple(comp.transformation))

    try:
        text = glifLib.writeGlyphToString(ref.name, original, draw, formatVersion=version)
    except Exception as exc:  # glifLib validates what it writes
        raise FontWriteError(
            f"{where}: glyph {ref.name!r} cannot be written: {exc}", file=where
        ) from None
    data = text.encode("utf-8")
    # save check: read the text back and compare every own contour bit for bit
    back = Glyph(ref.name)
    try:
        glifLib.readGlyphFromString(data, back, back.getPointPen())
        got = []
        for k, c in enumerate(back.contours):
            segs, closed, joins = _ufo_segments(c.points, f"{where}: {ref.name} contour {k}")
            got.append(_contour_from_segments(segs, closed, joins))
    except OutlinebenchError as exc:
        raise FontWriteError(f"{where}: save check failed: {exc}", file=where) from None
    except Exception as exc:
        raise FontWriteError(
            f"{where}: save check failed for {ref.name!r}: {exc}", file=where
        ) from None
    if not _same(own, got):
        raise FontWriteError(
            f"{where}: save check failed: glyph {ref.name!r} does not read back as written; "
            "nothing was changed",
            file=where,
        )
    if [c.baseGlyph for c in back.components] != [c.baseGlyph for c in original.components]:
        raise FontWriteError(
            f"{where}: save check failed: glyph {ref.name!r} lost a component", file=where
        )
    return data


def _same(a: Sequence[Contour], b: Sequence[Contour]) -> bool:
    if len(a) != len(b):
        return False
    for x, y in zip(a, b, strict=True):
        if x.closed != y.closed or len(x.segments) != len(y.segments):
            return False
        if tuple(j == "smooth" for j in x.joins) != tuple(j == "smooth" for j in y.joins):
            return False
        for s, t in zip(x.segments, y.segments, strict=True):
            if s.shape != t.shape or not np.array_equal(s, t):
                return False
    return True


def _target(src: FontSource, ufo_path: str | os.PathLike[str] | None) -> tuple[str, bool]:
    """The folder to write and whether it is a new copy of the source."""
    if ufo_path is None:
        return src.path, False
    target = os.fspath(ufo_path)
    if os.path.realpath(target) == os.path.realpath(src.path):
        return target, False
    if os.path.exists(target):
        raise FontWriteError(
            f"{target}: already exists and is not the source the glyphs were read from; "
            "it was not changed",
            file=str(target),
        )
    if Path(target).suffix.lower() != ".ufo":
        raise FontWriteError(f"{target}: a UFO source's name must end in .ufo", file=str(target))
    return target, True


def write_ufo_glyphs(doc: Document, ufo_path: str | os.PathLike[str] | None = None) -> Document:
    """Write the edited glyphs of a document back into its UFO source.

    Parameters
    ----------
    doc : Document
        Read from a ``.ufo`` by :func:`outlinebench.io.read_font`, then edited.
    ufo_path : str or path-like, optional
        The source itself (default), or a new ``.ufo`` name: the source is then copied
        there file for file first and the edited glyphs written into the copy. An existing
        folder other than the source is refused.

    Returns
    -------
    Document
        ``doc`` with the written glyph outlines' handles renewed, so a later call writes only
        what is edited after this one (the contours themselves are unchanged objects).

    Raises
    ------
    FontWriteError
        The document was read from a binary font (read-only: save a repair as a UFO or SVG)
        or not from a font; an outline that is not a glyph of the source; a component's
        contour edited; a failed save check (nothing is written then); a read-only file or
        a disk error (glyphs written before it are named in the message).

    Notes
    -----
    Every edited glyph is serialised and checked before the first file is written, and each
    file is replaced atomically, so a failure leaves every glyph file either old or new,
    never partly written.
    """
    src = doc.source
    where = doc.path or "<document>"
    if not isinstance(src, FontSource):
        raise FontWriteError(f"{where}: not read from a font source; save it as SVG", file=where)
    if not src.writable:
        raise FontWriteError(
            f"{where}: binary fonts ({src.flavour} outlines) are read-only here; write the "
            "repair to a UFO source or an SVG file",
            file=where,
        )
    for k, o in enumerate(doc.outlines):
        if not isinstance(o.source, GlyphRef):
            name = f'"{o.element_id}"' if o.element_id else f"#{k + 1}"
            raise FontWriteError(
                f"{where}: outline {name} is not a glyph of the source (new glyphs cannot be "
                "added by a save); save as SVG",
                file=where,
            )
    edited = edited_glyphs(doc)
    target, copy = _target(src, ufo_path)
    files = [(doc.outlines[k], glif_bytes(doc.outlines[k], src, where)) for k in edited]
    layer_dir = src.layer_dir
    assert layer_dir is not None
    rel = os.path.relpath(layer_dir, src.path)
    if copy:
        try:
            shutil.copytree(src.path, target)
        except OSError as exc:
            raise FontWriteError(
                f"{target}: cannot copy the source there: {exc}", file=str(target)
            ) from None
    written: list[str] = []
    for outline, data in files:
        ref = outline.source
        path = Path(target) / rel / src.glif_files[ref.name]
        try:
            write_file_atomic(path, data)
        except OutlinebenchError as exc:
            done = f" (written before the failure: {', '.join(written)})" if written else ""
            raise FontWriteError(f"{exc}{done}") from None
        written.append(ref.name)
    if not edited:
        return doc
    outlines = list(doc.outlines)
    for k in edited:
        o = outlines[k]
        ref = o.source
        origins = (
            ref.origins[-sum(1 for x in ref.origins if x is not None) :]
            if any(x is not None for x in ref.origins)
            else ()
        )
        own = len(o.contours) - len(origins)
        new_ref = replace(ref, contours=o.contours, origins=(None,) * own + tuple(origins))
        outlines[k] = replace(o, source=new_ref)
    new_src = replace(src, path=target) if copy else src
    if copy:
        new_src = replace(new_src, layer_dir=os.path.join(target, rel))
    return replace(doc, outlines=tuple(outlines), source=new_src, path=target if copy else doc.path)
