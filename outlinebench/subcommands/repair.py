"""``outlinebench repair FILE --fix KIND[,KIND…]``: fix what ``check`` finds, within a limit.

Each fix is one of the undoable repair commands of :mod:`outlinebench.model.repairs`; each
measures its shape change (a proven upper bound of the Hausdorff distance between the old and
the new outline) and is refused, leaving the outline as it was, when that exceeds
``--max-change``. A fix is also refused when the re-check still shows the finding it targets,
or shows a new problem (a kink, gap, cusp, ... that was not there) in the outline it changed.

Kinds (``--fix all`` applies every one, in this order): close-gaps, remove-overlaps,
fix-direction, fit-curves, remove-points, smooth-kinks, match-curvature, add-extrema.

The result is written (``-o OUT.svg``, or ``--in-place``) through the SVG write-back, which
keeps every byte of the file that no fix touched, atomically; the output is never the input
file (compared by file identity: device and inode) unless ``--in-place`` is given.
``--dry-run`` reports the same and writes nothing. Problems still found afterwards are listed
as ``left`` with the reason (no repair for that kind, or not among the chosen kinds). Exit
codes: 0 nothing of warning level or worse remains, 1 some fix was refused or problems
remain, 2 bad input or options.

Public helpers for the editor: :func:`repair_for_finding` (the command that fixes one finding)
and :func:`repair_document` (every fix of some kinds, as one undo step).
"""

from __future__ import annotations

import argparse
import os
import sys

from outlinebench.diagnostics import (
    CheckSettings,
    check_document,
    is_problem,
)
from outlinebench.errors import OutlinebenchError
from outlinebench.io import svg_bytes, write_file_atomic
from outlinebench.model.repairs import (
    REPAIR_ORDER,
)
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    add_entity_option,
    nonnegative_float,
    note_line,
    read_svg_file,
    unit_factor,
    write_json,
)

__all__ = [
    "NAME",
    "HELP",
    "add_arguments",
    "run",
    "DEFAULT_MAX_CHANGE_MM",
    "Outcome",
    "RepairRun",
    "parse_kinds",
    "repair_for_finding",
    "repair_document",
]

NAME = "repair"
HELP = "fix gaps, kinks, curvature jumps, directions and more, within an allowed shape change"

from outlinebench.api.repairing import (  # noqa: E402
    DEFAULT_MAX_CHANGE_MM,
    Outcome,
    RepairRun,
    parse_kinds,
    repair_document,
    repair_for_finding,
)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench repair``."""
    parser.add_argument("file", metavar="FILE", help="SVG file to repair")
    parser.add_argument(
        "--fix",
        required=True,
        metavar="KIND[,KIND...]",
        help=f"what to fix: {', '.join(REPAIR_ORDER)}, or all",
    )
    parser.add_argument(
        "--max-change",
        type=nonnegative_float,
        metavar="D",
        help="largest shape change a fix may make (Hausdorff distance, proven bound), in "
        f"--units (default {DEFAULT_MAX_CHANGE_MM} mm)",
    )
    where = parser.add_mutually_exclusive_group()
    where.add_argument("-o", "--output", metavar="OUT.svg", help="write the repaired file here")
    where.add_argument(
        "--in-place", action="store_true", help="replace FILE itself with the repaired file"
    )
    parser.add_argument(
        "--dry-run", action="store_true", help="report what would change; write nothing"
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of --max-change and of the reported changes: the SVG root's user units "
        "(default) or mm, in, pt, px",
    )
    add_entity_option(parser)


def _same_file(a: str, b: str) -> bool:
    """Whether two names are one file (same device and inode; hard and symbolic links too)."""
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def run(args: argparse.Namespace) -> int:
    """Repair ``args.file``; exit 0 nothing of warning level or worse is left, 1 some fix was
    refused or problems remain, 2 bad input."""
    kinds = parse_kinds(args.fix)
    if not args.dry_run and not args.output and not args.in_place:
        raise OutlinebenchError(
            f"{args.file}: say where to write: -o OUT.svg, --in-place, or --dry-run",
            file=str(args.file),
        )
    if args.output and not args.in_place and _same_file(args.output, args.file):
        raise OutlinebenchError(
            f"{args.output}: is the input file itself; use --in-place to replace it",
            file=str(args.output),
        )
    doc, notes = read_svg_file(args.file, allow_entities=args.allow_entities, option_hint=True)
    for note in notes:
        print(f"outlinebench: {note_line(note)}", file=sys.stderr)
    if not any(o.contours for o in doc.outlines):
        print(
            f"outlinebench: warning: {args.file}: no outlines found; 0 contours checked, "
            "nothing repaired",
            file=sys.stderr,
        )
    factor = unit_factor(doc, args.units)
    if args.max_change is None:
        max_change = DEFAULT_MAX_CHANGE_MM / doc.mm_per_unit
    else:
        max_change = args.max_change / factor
    settings = CheckSettings()
    result = repair_document(doc, kinds, max_change=max_change, settings=settings)
    changed = bool(result.commands)
    target = None
    if not args.dry_run:
        target = args.file if args.in_place else args.output
        if changed or not args.in_place:
            write_file_atomic(target, svg_bytes(result.document))
    remaining = [f for f in check_document(result.document, settings) if is_problem(f)]
    refused = [o for o in result.outcomes if o.status == "refused"]
    left = [o for o in result.outcomes if o.status == "left"]
    if args.json:
        write_json(
            {
                "file": str(args.file),
                "output": target,
                "dry_run": bool(args.dry_run),
                "units": args.units,
                "max_change": max_change * factor,
                "kinds": kinds,
                "fixes": [o.to_dict(factor) for o in result.outcomes],
                "fixed": sum(o.status == "fixed" for o in result.outcomes),
                "refused": len(refused),
                "left": len(left),
                "remaining_problems": len(remaining),
            }
        )
    else:
        for o in result.outcomes:
            change = "" if o.change is None else f" change ≤ {o.change * factor:.4g} {args.units}"
            what = f" {o.finding}" if o.finding else ""
            if o.status == "left":
                print(f"{args.file}: {o.where}:{what} left: {o.reason}")
                continue
            print(f"{args.file}: {o.where}:{what} {o.kind} {o.status}{change}: {o.reason}")
        fixed = sum(o.status == "fixed" for o in result.outcomes)
        verb = "would be " if args.dry_run else ""
        print(
            f"{args.file}: {fixed} fixes {verb}applied, {len(refused)} refused, allowed change "
            f"{max_change * factor:.4g} {args.units}; {len(remaining)} problems remain"
            + (f"; wrote {target}" if target and (changed or not args.in_place) else "")
        )
    return 1 if refused or remaining else 0
