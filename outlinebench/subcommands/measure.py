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

from outlinebench.api.measuring import measure_document
from outlinebench.diagnostics.report import format_file_finding, write_json_stream
from outlinebench.io.svg_write import one_line
from outlinebench.subcommands import EXIT_FINDINGS, EXIT_OK
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    add_entity_option,
    add_glyphs_option,
    note_line,
    read_svg_partly,
    unit_factor,
    unit_words,
)

__all__ = ["NAME", "HELP", "add_arguments", "run", "measure_document"]

NAME = "measure"
HELP = "lengths, areas, bounds and joins of every contour"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench measure``."""
    parser.add_argument("file", metavar="FILE", help="SVG file, font or font source to measure")
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--joins", action="store_true", help="also list every join: gap, angle, curvatures"
    )
    add_entity_option(parser)
    add_glyphs_option(parser)
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of lengths and positions: the SVG root's user units (default) or mm, in, pt, px",
    )


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
        name = f", id {one_line(c['element_id'])}" if c["element_id"] else ""
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
    read = read_svg_partly(
        args.file, allow_entities=args.allow_entities, allow_text=True, glyphs=args.glyphs
    )
    doc = read.document
    unit_factor(doc, args.units)  # refuses a unit the file's scale cannot give, before notes
    for note in read.notes:
        print(f"outlinebench: {note_line(note)}", file=sys.stderr)
    m = measure_document(doc, args.units, args.joins)
    problems = [f for f in read.file_findings if f.severity in ("error", "warning")]
    if args.json:
        write_json_stream(
            {
                "file": args.file,
                "complete": not problems,
                **m,
                "findings": [f.to_dict() for f in read.file_findings],
                "notes": read.notes,
            },
            sys.stdout,
        )
    else:
        for f in read.file_findings:
            print(format_file_finding(args.file, f))
        print(_text(args.file, m))
    return EXIT_FINDINGS if problems else EXIT_OK
