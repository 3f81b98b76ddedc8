"""``outlinebench union FILE -o OUT.svg``: every outline as the union of its contours.

Each outline whose closed contours cross, overlap or nest the same way round is replaced by
the region it fills under its fill rule, drawn as contours that neither cross nor overlap
(:func:`outlinebench.model.union_contours`, the boolean engine: curves stay curves, split
exactly at their crossings; holes wind opposite to their outer contour). Outlines whose union
is themselves are left as they were, byte for byte, and so is everything else of the file
(the file is written back like a save, atomically). ``--across`` also merges outlines that
overlap each other into the first of them. The written file is read back and checked: no
crossing is left, else nothing is written. Exit code 0 when written (or nothing to do), 2 bad
input, a refused output, or crossings left after the union (nothing written).
"""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from typing import Any

import numpy as np
import shapely

from outlinebench.diagnostics.outline_overlaps import outline_overlap_findings
from outlinebench.errors import OutlinebenchError
from outlinebench.geometry import flatten_contours
from outlinebench.io import svg_bytes, write_file_atomic
from outlinebench.model import union_contours
from outlinebench.model.document import Document
from outlinebench.subcommands._common import (
    add_entity_option,
    note_line,
    read_svg_file,
    refuse_overwrite,
    require_segments,
    write_json,
)

__all__ = ["NAME", "HELP", "add_arguments", "run", "union_document"]

NAME = "union"
HELP = "write each outline as the union of its contours (overlaps and crossings removed)"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench union``."""
    parser.add_argument("file", metavar="FILE", help="SVG file")
    where = parser.add_mutually_exclusive_group(required=True)
    where.add_argument("-o", "--output", metavar="OUT.svg", help="write the result here")
    where.add_argument("--in-place", action="store_true", help="replace FILE itself")
    parser.add_argument(
        "--across",
        action="store_true",
        help="also merge outlines that overlap each other into one (the first of them)",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    add_entity_option(parser)


def _signature(contours: Any) -> list[tuple]:
    return sorted(
        (len(c.segments), tuple(sorted(s.tobytes() for s in c.segments))) for c in contours
    )


def union_document(doc: Document, *, across: bool = False) -> tuple[Document, list[dict]]:
    """The document with every outline replaced by the union of its contours.

    Returns
    -------
    (document, changes)
        ``changes``: per changed outline ``{"outline", "contours_before", "contours_after"}``
        (and ``"merged"`` for outlines merged into it with ``across``).
    """
    changes: list[dict[str, Any]] = []
    outlines = list(doc.outlines)
    if across:
        tol = 0.01 / doc.mm_per_unit
        gi_to_outline = {r.global_index: r.outline for r in doc.contour_refs()}
        merged_into: dict[int, int] = {}
        for f in outline_overlap_findings(doc, tol):
            a = gi_to_outline[f.other_contour]
            b = gi_to_outline[f.contour]
            while a in merged_into:
                a = merged_into[a]
            if a == b:
                continue
            merged_into[b] = a
        for b, a in sorted(merged_into.items(), reverse=True):
            target = outlines[a]
            outlines[a] = replace(target, contours=target.contours + outlines[b].contours)
            outlines[b] = replace(outlines[b], contours=())
            changes.append({"outline": a, "merged": b})
    for k, o in enumerate(outlines):
        closed = [c for c in o.contours if c.closed and c.segments]
        if len(closed) == 0:
            continue
        new = union_contours(o.contours, o.fill_rule)
        if _signature(new) == _signature(o.contours) and not any(
            ch.get("outline") == k for ch in changes
        ):
            continue  # the union is the outline itself: leave it as it was
        outlines[k] = replace(o, contours=tuple(new))
        changes.append(
            {"outline": k, "contours_before": len(o.contours), "contours_after": len(new)}
        )
    if not changes:
        return doc, []
    return replace(doc, outlines=tuple(outlines)), changes


def _verify(doc: Document, outlines: list[int]) -> str | None:
    """Why the united outlines are not a valid region, or None.

    Independent of the engine, with shapely on flattenings within 1/1000 of each outline's
    size: every contour is a simple ring, and two contours either miss each other, touch at
    points, or one holds the other (the area their polygons share is 0 or all of the smaller).
    """
    for k in outlines:
        cs = [c for c in doc.outlines[k].contours if c.closed and c.segments]
        if not cs:
            continue
        pts = np.vstack([s for c in cs for s in c.segments])
        tol = 1e-3 * float(np.ptp(pts, axis=0).max() or 1.0)
        rings = [shapely.LinearRing(r) for r in flatten_contours(cs, tol) if len(r) >= 3]
        for r in rings:
            if not r.is_simple:
                return f"outline {k}: a contour of the union crosses itself"
        polys = [shapely.Polygon(r) for r in rings]
        for a in range(len(polys)):
            for b in range(a + 1, len(polys)):
                shared = polys[a].intersection(polys[b]).area
                small = min(polys[a].area, polys[b].area)
                if tol * polys[a].length < shared < small - tol * polys[b].length:
                    return f"outline {k}: two contours of the union overlap"
    return None


def run(args: argparse.Namespace) -> int:
    """Write the union of every outline; exit 0 (errors raise: exit 2)."""
    target = args.file if args.in_place else args.output
    if not args.in_place:
        refuse_overwrite(target, [args.file])
    doc, notes = read_svg_file(args.file, allow_entities=args.allow_entities, option_hint=True)
    for note in notes:
        print(f"outlinebench: {note_line(note)}", file=sys.stderr)
    require_segments(doc, args.file, "unite")
    new, changes = union_document(doc, across=args.across)
    bad = _verify(new, [c["outline"] for c in changes if "contours_after" in c])
    if bad:
        raise OutlinebenchError(
            f"{target}: not written: {bad}; a defect of the boolean engine, please report it",
            file=str(target),
        )
    if changes or not args.in_place:
        write_file_atomic(target, svg_bytes(new))
    if args.json:
        write_json({"file": args.file, "output": target, "changes": changes})
    else:
        for ch in changes:
            if "merged" in ch:
                print(f"{args.file}: outline {ch['merged']} merged into outline {ch['outline']}")
            else:
                print(
                    f"{args.file}: outline {ch['outline']}: {ch['contours_before']} contours → "
                    f"{ch['contours_after']}"
                )
        print(f"{args.file}: {len(changes)} change(s); wrote {target}")
    return 0
