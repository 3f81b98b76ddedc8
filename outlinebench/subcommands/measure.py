"""``outlinebench measure FILE``: lengths, areas and bounds of every contour.

Per contour: ``closed``, ``self_intersecting``, ``length``, ``area`` (absolute enclosed area
of a closed contour — for one that crosses itself, the union of its faces — null when open),
``bbox`` (tight), and per segment its ``kind`` and ``length``; with ``--joins``, every join's
gap, tangent turn angle and curvature on each side. Coordinates are the SVG root's
user units after all element transforms; ``--units mm`` (or in, pt, px) converts through the
root's width/height and viewBox. Contours are numbered in document order across the file, as
``outlinebench check`` numbers them. The JSON carries the reader's notes (elements not
converted, ...) under ``notes``; text output prints them on stderr.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any

import numpy as np

from outlinebench.diagnostics import check_document
from outlinebench.diagnostics.continuity import turn_angles
from outlinebench.diagnostics.enclosed_area import enclosed_area
from outlinebench.diagnostics.report import format_file_finding
from outlinebench.geometry import (
    KIND_BY_DEGREE,
    arc_length,
    bounding_box,
    end_curvatures,
    end_tangents,
    signed_area,
)
from outlinebench.model.document import Contour, Document
from outlinebench.subcommands import EXIT_FINDINGS, EXIT_OK
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    add_entity_option,
    note_line,
    read_svg_partly,
    unit_factor,
    unit_words,
    write_json,
)

__all__ = ["NAME", "HELP", "add_arguments", "run", "measure_document"]

NAME = "measure"
HELP = "lengths, areas, bounds and joins of every contour"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench measure``."""
    parser.add_argument("file", metavar="FILE", help="SVG file to measure")
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--joins", action="store_true", help="also list every join: gap, angle, curvatures"
    )
    add_entity_option(parser)
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of lengths and positions: the SVG root's user units (default) or mm, in, pt, px",
    )


def _joins(contour: Contour, f: float) -> list[dict[str, Any]]:
    segs = contour.segments
    out = []
    if not contour.joins:
        return out
    d_in, d_out, k_in, k_out, gaps = [], [], [], [], []
    for j in range(len(contour.joins)):
        a, b = contour.join_segments(j)
        sa, sb = segs[a], segs[b]
        d_in.append(end_tangents(sa)[1])
        d_out.append(end_tangents(sb)[0])
        k_in.append(end_curvatures(sa)[1])
        k_out.append(end_curvatures(sb)[0])
        gaps.append(float(np.hypot(*(sb[0] - sa[-1]))))
    angles = turn_angles(np.array(d_in), np.array(d_out))
    for j in range(len(contour.joins)):
        out.append(
            {
                "join": j,
                "x": float(segs[j][-1][0]) * f,
                "y": float(segs[j][-1][1]) * f,
                "intent": contour.joins[j],
                "gap": gaps[j] * f,
                "angle": float(angles[j]),
                "curvature_before": float(k_in[j]) / f + 0.0,
                "curvature_after": float(k_out[j]) / f + 0.0,
            }
        )
    return out


def _self_crossings(doc: Document) -> dict[int, list[list[float]]]:
    """Contours that cross themselves (global index) → per segment, the crossing parameters.

    From the self-intersection findings of :func:`outlinebench.diagnostics.check_document`
    (a loop inside a segment, and crossings between two segments of the same contour).
    """
    out: dict[int, list[list[float]]] = {}
    sizes = {ref.global_index: len(ref.contour.segments) for ref in doc.contour_refs()}
    for fnd in check_document(doc):
        if fnd.kind != "self-intersection" or fnd.other_contour != fnd.contour:
            continue
        cuts = out.setdefault(fnd.contour, [[] for _ in range(sizes[fnd.contour])])
        for seg, t in ((fnd.segment, fnd.t), (fnd.other_segment, fnd.other_t)):
            if seg is not None and t is not None:
                cuts[seg].append(float(t))
    return out


def measure_document(doc: Document, unit: str = "user", joins: bool = False) -> dict[str, Any]:
    """The measurements of every contour as a JSON-ready dict.

    Parameters
    ----------
    doc : Document
    unit : str
        One of ``"user"``, ``"mm"``, ``"in"``, ``"pt"``, ``"px"``.
    joins : bool
        Include the join table of each contour.

    Returns
    -------
    dict
        ``{"units", "contours": [...], "totals": {...}}``; lengths in ``unit``, areas in
        ``unit``², curvatures in 1/``unit``.

    Notes
    -----
    Lengths come from :func:`outlinebench.geometry.arc_length` (Gauss–Legendre quadrature to
    its default tolerance), areas from the exact signed area of
    :func:`outlinebench.geometry.signed_area` (Green's theorem) — or, for a contour that
    crosses itself (``self_intersecting``), the area of the union of its faces of non-zero
    winding number (:func:`outlinebench.diagnostics.enclosed_area.enclosed_area`, exact for
    the pieces between crossings; a figure-eight's two lobes add up), boxes from
    :func:`outlinebench.geometry.bounding_box` (end points and interior extrema).
    """
    f = unit_factor(doc, unit)
    crossings = _self_crossings(doc)
    contours = []
    total_len = 0.0
    total_segs = 0
    # every segment's length and tight box at once, one batch per degree
    segments = [s for ref in doc.contour_refs() for s in ref.contour.segments]
    seg_len = np.zeros(len(segments))
    seg_box = np.zeros((len(segments), 4))
    degree = np.array([s.shape[0] - 1 for s in segments], dtype=np.intp)
    for deg in (1, 2, 3):
        rows = np.flatnonzero(degree == deg)
        if rows.size:
            batch = np.stack([segments[r] for r in rows])
            seg_len[rows] = arc_length(batch)
            seg_box[rows] = bounding_box(batch)
    first = 0
    for ref in doc.contour_refs():
        c = ref.contour
        outline = doc.outlines[ref.outline]
        n = len(c.segments)
        lens = seg_len[first : first + n]
        seg_rows = [
            {"kind": KIND_BY_DEGREE[int(d)], "length": float(v) * f}
            for d, v in zip(degree[first : first + n], lens, strict=True)
        ]
        length = float(lens.sum())
        if n:
            b = seg_box[first : first + n]
            bbox: list[float] | None = [
                float(b[:, 0].min()) * f,
                float(b[:, 1].min()) * f,
                float(b[:, 2].max()) * f,
                float(b[:, 3].max()) * f,
            ]
        else:
            bbox = None
        first += n
        cuts = crossings.get(ref.global_index)
        if not c.closed:
            area = None  # an open contour encloses nothing
        elif not c.segments:
            area = 0.0  # a closed lone moveto ("M x y Z") draws a point
        elif cuts is None:
            area = abs(float(signed_area(list(c.segments)))) * f * f
        else:
            area = enclosed_area(c.segments, cuts) * f * f
        row: dict[str, Any] = {
            "contour": ref.global_index,
            "outline": outline.source_index if outline.source_index >= 0 else ref.outline,
            "element_id": outline.element_id,
            "closed": c.closed,
            "self_intersecting": cuts is not None,
            "length": length * f,
            "area": area,
            "bbox": bbox,
            "segments": seg_rows,
        }
        if not c.closed and c.segments:
            row["ends_distance"] = float(np.hypot(*(c.segments[-1][-1] - c.segments[0][0]))) * f
        if joins:
            row["joins"] = _joins(c, f)
        contours.append(row)
        total_len += length
        total_segs += len(c.segments)
    return {
        "units": unit,
        "contours": contours,
        "totals": {
            "contours": len(contours),
            "segments": total_segs,
            "length": total_len * f,
        },
    }


def _fmt(v: float | None) -> str:
    if v is None:
        return "n/a"
    text = f"{v:.6g}" if abs(v) < 1e5 else f"{v:.9g}"
    return "0" if text == "-0" else text


def _text(label: str, m: dict[str, Any]) -> str:
    unit_name = unit_words(m["units"])
    t = m["totals"]
    lines = [
        f"{label}: {t['contours']} contours, {t['segments']} segments, total length "
        f"{_fmt(t['length'])} (lengths in {unit_name})"
    ]
    for c in m["contours"]:
        name = f", id {c['element_id']}" if c["element_id"] else ""
        box = c["bbox"]
        box_s = (
            f"({_fmt(box[0])}, {_fmt(box[1])})–({_fmt(box[2])}, {_fmt(box[3])})" if box else "none"
        )
        state = "closed" if c["closed"] else f"open (ends {_fmt(c.get('ends_distance'))} apart)"
        if c["self_intersecting"]:
            state += ", crosses itself"
        area = f"area {_fmt(c['area'])}" if c["area"] is not None else "no area (open)"
        lines.append(
            f"contour {c['contour']} (outline {c['outline']}{name}): {state}, length "
            f"{_fmt(c['length'])}, {area}, bbox {box_s}"
        )
        for k, s in enumerate(c["segments"]):
            lines.append(f"  segment {k}: {s['kind']}, length {_fmt(s['length'])}")
        for j in c.get("joins", ()):
            intent = f", intent {j['intent']}" if j["intent"] else ""
            lines.append(
                f"  join {j['join']} at ({_fmt(j['x'])}, {_fmt(j['y'])}): gap {_fmt(j['gap'])}, "
                f"angle {j['angle']:.4g}°, curvature {_fmt(j['curvature_before'])} → "
                f"{_fmt(j['curvature_after'])}{intent}"
            )
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    """Measure one file as far as it can be read.

    Exit code 0 when all of it was read, 1 when part of it could not be read or it holds
    nothing to measure (every such error is printed and listed under ``findings``), 2 when
    nothing of it can be read.
    """
    read = read_svg_partly(args.file, allow_entities=args.allow_entities, allow_text=True)
    doc = read.document
    unit_factor(doc, args.units)  # refuses a unit the file's scale cannot give, before notes
    for note in read.notes:
        print(f"outlinebench: {note_line(note)}", file=sys.stderr)
    m = measure_document(doc, args.units, args.joins)
    problems = [f for f in read.file_findings if f.severity in ("error", "warning")]
    if args.json:
        write_json(
            {
                "file": args.file,
                "complete": not problems,
                **m,
                "findings": [f.to_dict() for f in read.file_findings],
                "notes": read.notes,
            }
        )
    else:
        for f in read.file_findings:
            print(format_file_finding(args.file, f))
        print(_text(args.file, m))
    return EXIT_FINDINGS if problems else EXIT_OK
