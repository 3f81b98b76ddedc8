"""``outlinebench offset FILE --distance d``: toolpaths of the filled region, verified.

Each outline's closed contours are offset together as the region they fill under the
outline's fill rule (:func:`outlinebench.geometry.offset_region`): the region grows for d > 0
and shrinks for d < 0 by the tool radius |d|, and the toolpaths of one part never cross.
Where the material (shrinking) or the gap between parts (growing) is narrower than the tool,
that part vanishes: ``vanishes`` with the place and the width. Inside corners the tool rounds
are one ``tool-does-not-fit`` summary per outline (info: the normal case of routing, with the
count and the smallest radius), and individual findings only where the tool leaves material
deeper than the tolerance. Separate outlines whose toolpaths overlap (neighbouring letters)
are ``toolpaths-overlap`` errors with the place and area, or one merged region with
``--merge-outlines``. Open contours move to the side of their normal (T_y, −T_x).

Before anything is written the toolpaths are verified independently
(:func:`outlinebench.geometry.verify_toolpaths`): no toolpath crosses itself or another, every
point is |d| ± ε from the region. A violation is an ``unverified-toolpath`` error and no cut
file is written. ``--json`` prints the toolpaths as polylines with the findings and the
per-stage times; ``-o OUT.svg`` writes the cut file atomically, with the cutting caution.
Exit code 0 when no finding of warning level or worse, 1 otherwise, 2 for unreadable input
or a refused output.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path
from typing import Any

import numpy as np
import shapely

from outlinebench.diagnostics.findings import ERROR, INFO, WARNING, Finding, is_problem
from outlinebench.diagnostics.report import format_finding
from outlinebench.errors import OutlinebenchError
from outlinebench.geometry import (
    evaluate,
    merge_offsets,
    offset_contour,
    offset_overlaps,
    offset_region,
    remove_overlaps,
    verify_toolpaths,
)
from outlinebench.io import CUT_CAUTION, write_file_atomic
from outlinebench.model.document import Document
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    TOLERANCE_RULE,
    add_glyphs_option,
    cut_file_bytes,
    output_decimals,
    positive_float,
    read_document,
    refuse_overwrite,
    require_segments,
    tolerance_user,
    unit_factor,
    unit_words,
    write_json,
)

__all__ = ["NAME", "HELP", "add_arguments", "run"]

NAME = "offset"
HELP = "offset outlines by a tool radius and report where the tool cannot fit"


def _finite_float(text: str) -> float:
    try:
        v = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not math.isfinite(v):
        raise argparse.ArgumentTypeError(f"expected a finite number, got {text!r}")
    return v


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench offset``."""
    parser.add_argument("file", metavar="FILE", help="SVG file to offset")
    parser.add_argument(
        "--distance",
        type=_finite_float,
        required=True,
        metavar="D",
        help="offset distance in --units (the tool radius); > 0 outward for closed contours",
    )
    parser.add_argument(
        "--tolerance",
        type=positive_float,
        default=None,
        metavar="EPS",
        help=f"largest distance of the result from the exact offset, in --units ({TOLERANCE_RULE})",
    )
    parser.add_argument(
        "--merge-outlines",
        action="store_true",
        help="merge the toolpaths of separate outlines that overlap into one region (their "
        "union: touching lettering cut as one piece); by default overlaps are reported",
    )
    parser.add_argument("-o", "--output", metavar="OUT.svg", help="write the polylines here")
    add_glyphs_option(parser)
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of distance, tolerance and output: the SVG root's user units (default) "
        "or mm, in, pt, px",
    )


def _finding(
    kind: str,
    severity: str,
    outline: int,
    contour: int,
    segment: int | None,
    t: float | None,
    x: float,
    y: float,
    value: float | None,
    unit: str,
    message: str,
    limit: float | None = None,
) -> Finding:
    return Finding(
        kind=kind, severity=severity, outline=outline, contour=contour, segment=segment, t=t,
        x=x, y=y, value=value, unit=unit, message=message, limit=limit,
    )  # fmt: skip


def _severity(kind: str, value: float | None, count: int) -> str:
    if kind in ("vanishes", "self-intersection", "offset-failed"):
        return ERROR
    if kind == "tool-does-not-fit":
        # the summary of inside corners the tool rounds is the normal case of routing
        return INFO if count > 1 or value == 0.0 else WARNING
    return WARNING


def _source_contours(paths: list[Any], refs: list[Any], distance: float) -> list[int]:
    """For each toolpath, the input contour it runs along: the one whose distance from the
    toolpath's vertices is closest to |d| at the median (shapely distances to the contours
    flattened at 16 points a segment)."""
    if not paths:
        return []
    if len(refs) == 1:
        return [refs[0].global_index] * len(paths)
    t = np.linspace(0.0, 1.0, 17)[:-1]
    rings = []
    for r in refs:
        pts = np.vstack([evaluate(np.asarray(sg), t) for sg in r.contour.segments])
        rings.append(shapely.LinearRing(pts) if len(pts) >= 3 else shapely.Point(pts[0]))
    out = []
    for p in paths:
        pts = shapely.points(np.asarray(p)[:: max(1, len(p) // 64)])
        best = min(
            range(len(refs)),
            key=lambda k: abs(float(np.median(shapely.distance(rings[k], pts))) - abs(distance)),
        )
        out.append(refs[best].global_index)
    return out


def offset_document(
    doc: Document, distance: float, tolerance: float, *, merge: bool = False
) -> dict[str, Any]:
    """Offset the filled region of every outline (user units) and verify the toolpaths.

    Returns
    -------
    dict
        ``toolpaths`` (list of dicts ``{"outline", "contour", "closed", "points"}``),
        ``problems`` (list of (kind, severity, outline index, global contour, segment, t, x, y,
        value, message)), ``violations`` (list of ToolpathViolation), ``overlaps``
        (OffsetOverlap between outlines), ``times`` (seconds per stage, summed).

    Notes
    -----
    Closed contours of one outline are offset together as the region they fill under the
    outline's fill rule (:func:`outlinebench.geometry.offset_region`), so the toolpaths of
    one part never cross; the result is verified independently
    (:func:`outlinebench.geometry.verify_toolpaths`) before anything is written. Outlines
    whose toolpath regions overlap are reported (:func:`offset_overlaps`), or merged into
    one region (``merge``, :func:`merge_offsets`). Open contours are offset on their own to
    the side of their normal (:func:`outlinebench.geometry.offset_contour`).
    """
    toolpaths: list[dict[str, Any]] = []
    problems: list[tuple] = []
    violations: list[Any] = []
    regions: list[Any] = []
    region_outline: list[int] = []
    times: dict[str, float] = {}
    refs_by_outline: dict[int, list[Any]] = {}
    closed_refs: dict[int, list[Any]] = {}
    for ref in doc.contour_refs():
        refs_by_outline.setdefault(ref.outline, []).append(ref)
    for oi, refs in refs_by_outline.items():
        outline = doc.outlines[oi]
        closed: list[Any] = []
        for ref in refs:
            c = ref.contour
            if not c.segments:
                continue  # a lone moveto draws nothing
            pts = np.vstack(c.segments)
            if float(np.ptp(pts, axis=0).max()) <= tolerance:
                # all control points within the tolerance of one place: no length, no area,
                # no toolpath (common practice, no source: a dot is not cut)
                problems.append(
                    ("vanishes", WARNING, oi, ref.global_index, None, None, float(pts[0, 0]),
                     float(pts[0, 1]), 0.0,
                     "the contour has no length (all its points coincide): no toolpath")
                )  # fmt: skip
                continue
            if c.closed:
                closed.append(ref)
                continue
            res = offset_contour(c.segments, False, distance, tolerance)
            for oc in res.contours:
                toolpaths.append(
                    {"outline": oi, "contour": ref.global_index, "closed": oc.closed,
                     "points": oc.polyline}
                )  # fmt: skip
            for pr in res.problems:
                sev = ERROR if pr.kind in ("vanishes", "self-intersection") else (
                    INFO if pr.radius == 0.0 else WARNING)  # fmt: skip
                value = pr.error if pr.error is not None else pr.radius
                problems.append(
                    (pr.kind, sev, oi, ref.global_index, pr.segment, pr.t, pr.x, pr.y, value,
                     pr.message)
                )  # fmt: skip
        if not closed:
            continue
        closed_refs[oi] = closed
        reg = offset_region(
            [r.contour for r in closed], distance, fill_rule=outline.fill_rule,
            tolerance=tolerance,
        )  # fmt: skip
        for k, v in reg.times.items():
            times[k] = times.get(k, 0.0) + v
        regions.append(reg)
        region_outline.append(oi)
        for rf in reg.findings:
            gi = (
                closed[rf.contour].global_index
                if rf.contour is not None
                else closed[0].global_index
            )
            problems.append(
                (rf.kind, _severity(rf.kind, rf.value, rf.count), oi, gi, rf.segment, rf.t,
                 rf.x, rf.y, rf.value, rf.message)
            )  # fmt: skip
    overlaps = offset_overlaps(regions, tolerance=tolerance) if len(regions) > 1 else []
    if merge and regions:
        merged = merge_offsets(regions, tolerance=tolerance)
        all_region = remove_overlaps(
            [c for r in regions for c in r.region.contours], fill_rule="positive"
        )
        violations.extend(
            verify_toolpaths(all_region.contours, merged, distance, tolerance=tolerance)
        )
        for oc in merged:
            toolpaths.append({"outline": -1, "contour": -1, "closed": True, "points": oc.polyline})
        overlaps = []
    else:
        for reg, oi in zip(regions, region_outline, strict=True):
            violations.extend(
                verify_toolpaths(reg.region.contours, reg.contours, distance, tolerance=tolerance)
            )
            sources = _source_contours(
                [oc.polyline for oc in reg.contours], closed_refs[oi], distance
            )
            for oc, gi in zip(reg.contours, sources, strict=True):
                toolpaths.append(
                    {"outline": oi, "contour": gi, "closed": True, "points": oc.polyline}
                )
    return {
        "region_outline": region_outline,
        "toolpaths": toolpaths,
        "problems": problems,
        "violations": violations,
        "overlaps": overlaps,
        "times": times,
    }


def run(args: argparse.Namespace) -> int:
    """Offset every outline of ``args.file``; exit 1 when the tool does not fit somewhere or
    the toolpaths failed their verification (then nothing is written)."""
    if args.output:
        refuse_overwrite(args.output, [args.file])
    doc, notes = read_document(args.file, glyphs=args.glyphs)
    for note in notes:
        print(f"outlinebench: {note}", file=sys.stderr)
    require_segments(doc, args.file, "offset")
    f = unit_factor(doc, args.units)
    args.tolerance = tolerance_user(doc, args.tolerance, args.units) * f  # in --units
    d_user = args.distance / f
    # written coordinates are rounded (JSON in --units, the cut file in mm; see
    # outlinebench.subcommands.flatten): the offset is computed within the tolerance less
    # that rounding, so the written polylines stay within the tolerance
    k_json = output_decimals(args.tolerance)
    k_mm = output_decimals(args.tolerance / f * doc.mm_per_unit)
    rounding = max(10.0**-k_json / f, 10.0**-k_mm / doc.mm_per_unit)
    tol_user = args.tolerance / f - rounding
    result = offset_document(doc, d_user, tol_user, merge=args.merge_outlines)
    findings: list[Finding] = []
    for kind, sev, oi, gi, seg, t, x, y, value, message in result["problems"]:
        src = doc.outlines[oi].source_index
        findings.append(
            _finding(kind, sev, src if src >= 0 else oi, gi, seg, t, x * f, y * f,
                     None if value is None else value * f, args.units, message,
                     limit=abs(args.distance))
        )  # fmt: skip
    refs = {r.global_index: r for r in doc.contour_refs()}
    first_of = {}
    for r in refs.values():
        first_of.setdefault(r.outline, r.global_index)
    for ov in result["overlaps"]:
        a, b = ov.first, ov.second
        oa, ob = result_outline(result, a), result_outline(result, b)
        findings.append(
            _finding("toolpaths-overlap", ERROR, doc.outlines[ob].source_index,
                     first_of.get(ob, 0), None, None, ov.x * f, ov.y * f, ov.area * f * f,
                     f"{args.units}^2", f"the toolpaths of outline {oa} and outline {ob} "
                     f"overlap ({ov.area * f * f:.4g} {unit_words(args.units)}²): the cuts "
                     "run into each other; offset less, or merge them with --merge-outlines")
        )  # fmt: skip
    for v in result["violations"]:
        findings.append(
            _finding("unverified-toolpath", ERROR, -1, -1, None, None, v.x * f, v.y * f,
                     None if v.value is None else v.value * f, args.units,
                     f"{v.kind}: {v.message}")
        )  # fmt: skip
    verified = not result["violations"]
    contours = result["toolpaths"]
    if args.output:
        if not verified:
            raise OutlinebenchError(
                f"{args.output}: not written: the toolpaths failed their verification "
                f"({result['violations'][0].kind}: {result['violations'][0].message}); "
                "a cut file must be right or absent"
            )
        comment = (
            f"Offset of {Path(args.file).name} by {args.distance:g} {unit_words(args.units)} "
            f"with tolerance {args.tolerance:.6g} {unit_words(args.units)}, by outlinebench; "
            f"toolpaths verified (no crossings, distance within the tolerance); "
            f"{sum(is_problem(x) for x in findings)} findings of warning level or worse; "
            f"coordinates rounded to {10.0**-k_mm:.0e} mm (included in the tolerance)."
        )
        data = cut_file_bytes(
            doc,
            [c["points"] for c in contours],
            [c["closed"] for c in contours],
            comment,
            decimals=k_mm,
        )
        write_file_atomic(args.output, data)
    if args.json:
        write_json(
            {
                "file": str(args.file),
                "units": args.units,
                "distance": args.distance,
                "tolerance": args.tolerance,
                "resolution": 10.0**-k_json,
                "verified": verified,
                "caution": CUT_CAUTION,
                "times": result["times"],
                "contours": [
                    {**c, "points": np.round(np.asarray(c["points"]) * f, k_json).tolist()}
                    for c in contours
                ],
                "findings": [x.to_dict() for x in findings],
            }
        )
    else:
        for x in findings:
            print(f"{format_finding(args.file, x)}: {x.message}")
        print(
            f"{args.file}: {len(contours)} toolpaths, {len(findings)} findings "
            f"({sum(is_problem(x) for x in findings)} of warning level or worse); "
            + ("toolpaths verified" if verified else "toolpaths FAILED verification")
        )
        if args.output:
            print(f"wrote {args.output}")
        print(CUT_CAUTION)
    return 1 if any(is_problem(x) for x in findings) else 0


def result_outline(result: dict[str, Any], k: int) -> int:
    """The document outline of the k-th region offset."""
    return result["region_outline"][k]
