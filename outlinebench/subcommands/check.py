"""``outlinebench check FILE...``: report every continuity break and other finding.

One line per finding (``file: contour N, join J: kind value at (x, y) [severity]``;
``--hide-info`` leaves the info ones out) and a summary per file, or with ``--json``
one object per file listing every finding (a list for several files). A folder is walked for
``*.svg`` files. A file read only in part is checked as far as it was read and reports every
error as a finding; it is not clean, nor is a file with nothing to check. Exit codes: see
:data:`outlinebench.subcommands.EXIT_CODES_TEXT`; one file that cannot be read, or that hits
a defect of ours, never stops the others. Several files are checked in parallel on all
cores.
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import sys
import traceback
import warnings
from concurrent.futures import ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from pathlib import Path
from typing import Any

import numpy as np

from outlinebench import api
from outlinebench.diagnostics import (
    CheckSettings,
    convert_units,
    json_report,
    summarize,
    text_report,
)
from outlinebench.diagnostics.profiles import (
    PROFILE_NAMES,
    default_profile_name,
    get_profile,
    profile_settings,
)
from outlinebench.diagnostics.report import iter_json
from outlinebench.diagnostics.settings import DEFAULT_GAP_MM, DEFAULT_GAP_SEARCH_MM
from outlinebench.errors import OptionError, OutlinebenchError, error_line
from outlinebench.model.document import Document
from outlinebench.subcommands import EXIT_BAD_INPUT, EXIT_FINDINGS, EXIT_INTERNAL, EXIT_OK
from outlinebench.subcommands._common import (
    LENGTH_UNITS,
    MM_PER,
    add_entity_option,
    add_glyphs_option,
    mm_per,
    nonnegative_float,
    note_line,
    positive_float,
    read_svg_partly,
    unit_factor,
)

__all__ = [
    "NAME",
    "HELP",
    "add_arguments",
    "run",
    "check_file",
    "guarded_check_file",
    "expand_files",
    "option_problem",
    "OptionMismatch",
]

NAME = "check"
HELP = "find gaps, kinks, corners, curvature jumps, cusps, self-intersections and more"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``outlinebench check``."""
    parser.add_argument(
        "files",
        nargs="+",
        metavar="FILE",
        help="SVG files to check; a folder is walked for *.svg files (sorted)",
    )
    parser.add_argument(
        "--json", action="store_true", help="print JSON instead of text (lists every finding)"
    )
    parser.add_argument(
        "--hide-info",
        action="store_true",
        help="leave info findings (intended corners, straight-into-curve joins, ...) out of "
        "the text report; the summary still counts them, and --json always lists them",
    )
    parser.add_argument(
        "--gap",
        type=positive_float,
        metavar="D",
        help=f"gap tolerance in --units: closer points are the same point "
        f"(default {DEFAULT_GAP_MM} mm)",
    )
    parser.add_argument(
        "--gap-search",
        type=positive_float,
        metavar="D",
        help=f"largest distance between open ends reported as a gap, in --units "
        f"(default {DEFAULT_GAP_SEARCH_MM} mm)",
    )
    defaults = CheckSettings()
    parser.add_argument(
        "--kink-angle",
        type=positive_float,
        metavar="DEG",
        default=None,
        help=f"smallest tangent turn at a join that is a G1 break (default {defaults.kink_angle}°)",
    )
    parser.add_argument(
        "--corner-angle",
        type=positive_float,
        metavar="DEG",
        default=None,
        help=f"smallest turn taken as an intended corner (default {defaults.corner_angle}°)",
    )
    parser.add_argument(
        "--curvature-jump",
        type=nonnegative_float,
        metavar="REL",
        default=None,
        help="largest relative curvature difference at a smooth join "
        f"(default {defaults.curvature_jump})",
    )
    parser.add_argument(
        "--profile",
        choices=PROFILE_NAMES,
        default=None,
        help="check profile: the tolerances and severities of a trade; 'type' for glyph "
        "outlines (overlaps and touches are info, direction by the font format, grid-rounding "
        "kinks), 'cutting' for cut files (every crossing is an error); default: type for "
        "fonts and font sources, cutting for SVG",
    )
    add_glyphs_option(parser)
    parser.add_argument(
        "--allow-text",
        action="store_true",
        help="live text (text elements not converted to outlines) is reported as info and "
        "does not block a pass; by default it is an error, since a cutter does not cut text",
    )
    add_entity_option(parser)
    parser.add_argument(
        "--jobs",
        type=_jobs,
        metavar="N",
        default=None,
        help="worker processes checking several files at once (default: one per core)",
    )
    parser.add_argument(
        "--units",
        choices=LENGTH_UNITS,
        default="user",
        help="unit of --gap/--gap-search and of reported lengths and positions: the SVG "
        "root's user units (default) or mm, in, pt, px",
    )


def _jobs(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        n = 0
    if n < 1:
        raise argparse.ArgumentTypeError(f"--jobs needs a whole number of at least 1, got {text!r}")
    return n


class OptionMismatch(OptionError):
    """The options do not fit one file (its scale puts --gap-search below the default gap)."""


def _unit_name(unit: str) -> str:
    return "user units" if unit == "user" else unit


def option_problem(args: dict[str, Any]) -> str | None:
    """What is wrong with the options as given, in the user's own units (None when nothing).

    Checked once, before any file is read: angles against each other and 180°, the
    curvature-jump ratio, and --gap-search against --gap (or against the default gap
    tolerance converted to --units when --gap is not given and the unit is a fixed length).
    """
    defaults = CheckSettings()
    kink = defaults.kink_angle if args["kink_angle"] is None else args["kink_angle"]
    corner = defaults.corner_angle if args["corner_angle"] is None else args["corner_angle"]
    jump = defaults.curvature_jump if args["curvature_jump"] is None else args["curvature_jump"]
    if corner > 180.0:
        return f"--corner-angle ({corner:g}) must be at most 180 degrees"
    if kink >= corner:
        return f"--kink-angle ({kink:g}) must be below --corner-angle ({corner:g})"
    unit = args["units"]
    name = _unit_name(unit)
    search = args["gap_search"]
    if search is not None:
        if args["gap"] is not None and search < args["gap"]:
            return f"--gap-search {search:g} {name} must not be below --gap {args['gap']:g} {name}"
        if args["gap"] is None and unit != "user":
            default = DEFAULT_GAP_MM / MM_PER[unit]
            if search < default:
                return (
                    f"--gap-search {search:g} {name} must not be below the default gap "
                    f"tolerance {default:.4g} {name} ({DEFAULT_GAP_MM:g} mm); give --gap too"
                )
    try:
        CheckSettings(kink_angle=kink, corner_angle=corner, curvature_jump=jump)
    except ValueError as exc:
        return str(exc)
    return None


def _settings(
    args: dict[str, Any], doc: Document, profile: str, doc_mm_per: float
) -> CheckSettings:
    """Settings for one file: the profile's, with the options given on the command line.

    Lengths given in --units become mm through that file's scale.

    Raises
    ------
    OptionMismatch
        --gap-search alone lands below the gap tolerance of this file.
    """
    base = profile_settings(profile, doc)
    changes: dict[str, Any] = {}
    gap = base.gap_mm if args["gap"] is None else args["gap"] * doc_mm_per
    changes["gap_mm"] = gap
    if args["gap_search"] is None:
        changes["gap_search_mm"] = max(base.gap_search_mm, gap)
    else:
        search = args["gap_search"] * doc_mm_per
        if search < gap:
            raise OptionMismatch(
                f"--gap-search {args['gap_search']:g} {_unit_name(args['units'])} is below "
                f"the gap tolerance of this file ({gap / doc_mm_per:.4g} "
                f"{_unit_name(args['units'])}); give --gap too"
            )
        changes["gap_search_mm"] = search
    for name in ("kink_angle", "corner_angle", "curvature_jump"):
        if args[name] is not None:
            changes[name] = args[name]
    return dataclasses.replace(base, **changes)


def check_file(path: str, options: dict[str, Any]) -> dict[str, Any]:
    """Check one file; a plain dict so it can travel back from a worker process.

    A file that could be read only in part is checked as far as it was read, and everything
    that could not be read is a file finding (:mod:`outlinebench.diagnostics.file_findings`),
    so the file is not clean; so is a file with nothing to check.

    Returns
    -------
    dict
        ``{"file", "error"}`` when nothing of the file can be read or the options do not fit
        it; otherwise ``{"file", "text" or "json", "problems", "notes"}``; ``notes`` are the
        reader's notes that are not findings (dicts, see
        :func:`~outlinebench.subcommands._common.read_svg_file`), and the JSON object carries
        them too.
    """
    try:
        read = read_svg_partly(
            path,
            allow_entities=options.get("allow_entities", False),
            allow_text=options.get("allow_text", False),
            glyphs=options.get("glyphs"),
        )
        doc = read.document
        unit = options["units"]
        factor = unit_factor(doc, unit)  # refuses a unit the file's scale cannot give
        profile = options.get("profile") or default_profile_name(doc)
        settings = _settings(options, doc, profile, mm_per(unit, doc))
        drawing = api.Drawing(doc, read.file_findings, [], path)
        findings = api.check(drawing, profile=profile, tolerances=settings).findings
    except (OutlinebenchError, OSError, OptionMismatch) as exc:
        return {"file": path, "error": error_line(exc, path)}
    shown = convert_units(findings, factor, unit)
    ff = read.file_findings
    out: dict[str, Any] = {
        "file": path,
        "problems": not summarize(findings, ff)["clean"],
        "notes": read.notes,
    }
    title = get_profile(profile).title
    if options["json"]:
        out["json"] = json_report(path, shown, unit=unit, file_findings=ff)
        out["json"]["profile"] = {"name": profile, "title": title}
        out["json"]["notes"] = read.notes
    else:
        out["text"] = text_report(
            path,
            shown,
            unit=unit,
            show_info=not options["hide_info"],
            file_findings=ff,
            profile=profile,
        )
    return out


def guarded_check_file(path: str, options: dict[str, Any]) -> dict[str, Any]:
    """:func:`check_file`, with an unexpected internal error reported for its file.

    Returns
    -------
    dict
        As :func:`check_file`, or ``{"file", "crash", "traceback"}`` for an exception that is
        not the project's own (a defect of ours: the other files are still checked).
    """
    try:
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore", RuntimeWarning)
            return check_file(path, options)
    except Exception as exc:  # noqa: BLE001 - one file's defect must not hide the others
        return {
            "file": path,
            "crash": f"{path}: internal error while checking ({type(exc).__name__}: {exc})",
            "traceback": traceback.format_exc(),
        }


def _encoded_check_file(path: str, options: dict[str, Any]) -> dict[str, Any]:
    """:func:`guarded_check_file`, with the JSON report already encoded as text
    (``"json_text"``, the text of :func:`~outlinebench.diagnostics.report.iter_json`), so the
    worker processes, not the parent, do the encoding and the parent receives one string."""
    r = guarded_check_file(path, options)
    if "json" in r:
        r["json_text"] = "".join(iter_json(r.pop("json")))
    return r


def _write_reports(items: list[Any], single: bool) -> None:
    """The JSON of one report, or of the list of them: the text of
    :func:`~outlinebench.diagnostics.report.write_json_stream` on the same objects.

    A report encoded at depth 0 becomes the list item at depth 1 by indenting every line
    after its first by one level (encoded strings hold no raw newline: JSON escapes them).
    """
    out = sys.stdout
    texts = (x if isinstance(x, str) else "".join(iter_json(x)) for x in items)
    if single:
        out.write(next(texts) + "\n")
        return
    out.write("[\n  ")
    for k, text in enumerate(texts):
        if k:
            out.write(",\n  ")
        out.write(text.replace("\n", "\n  "))
    out.write("\n]\n")


def _progress(done: int, total: int) -> None:
    width = 30
    filled = width * done // total
    sys.stderr.write(f"\rchecking [{'#' * filled}{'.' * (width - filled)}] {done}/{total}")
    if done == total:
        sys.stderr.write("\n")
    sys.stderr.flush()


_FILE_SUFFIXES = (".svg", ".ttf", ".otf")


def _walk(folder: Path) -> list[str]:
    """``*.svg`` files, font files and ``.ufo`` sources under a folder, sorted; a UFO source
    is one input (its own folders are not walked)."""
    out: list[str] = []
    for root, dirs, names in os.walk(folder):
        ufos = sorted(d for d in dirs if d.lower().endswith(".ufo"))
        out.extend(str(Path(root) / d) for d in ufos)
        dirs[:] = [d for d in dirs if d not in ufos]
        out.extend(
            str(Path(root) / n)
            for n in names
            if n.lower().endswith(_FILE_SUFFIXES) and (Path(root) / n).is_file()
        )
    return sorted(out)


def expand_files(paths: list[str]) -> list[str]:
    """The files to check: each file as given, each folder walked for ``*.svg`` (sorted).

    Raises
    ------
    OutlinebenchError
        A folder holds no SVG file.
    """
    out: list[str] = []
    for p in paths:
        if os.path.isdir(p) and not p.rstrip("/").lower().endswith(".ufo"):
            found = _walk(Path(p))
            if not found:
                raise OutlinebenchError(f"{p}: folder holds no .svg file (nor font)", file=p)
            out.extend(found)
        else:
            out.append(p)
    return out


def _run_all(
    files: list[str], options: dict[str, Any], progress: bool, jobs: int | None = None
) -> list[dict[str, Any]]:
    """Check every file, in parallel on all cores for several; one result per file, in order.

    A worker process that dies (killed, out of memory) is a crash of the file it was
    checking; the files of the broken pool that had not finished are checked again, one
    worker each, so one bad file never hides another.
    """
    if len(files) == 1:
        return [_encoded_check_file(files[0], options)]
    results: list[dict[str, Any] | None] = [None] * len(files)
    workers = min(len(files), jobs or os.cpu_count() or 1)
    with ProcessPoolExecutor(max_workers=workers) as pool:
        futures = [pool.submit(_encoded_check_file, f, options) for f in files]
        for k, fut in enumerate(futures):
            try:
                results[k] = fut.result()
            except BrokenProcessPool:
                pass
            if progress:
                _progress(k + 1, len(files))
    for k, r in enumerate(results):
        if r is not None:
            continue
        with ProcessPoolExecutor(max_workers=1) as pool:
            try:
                results[k] = pool.submit(_encoded_check_file, files[k], options).result()
            except BrokenProcessPool:
                results[k] = {
                    "file": files[k],
                    "crash": f"{files[k]}: internal error: the checking process died (killed "
                    "or out of memory)",
                    "traceback": "",
                }
    return [r for r in results if r is not None]


def run(args: argparse.Namespace) -> int:
    """Check every file; the exit code is the highest of the files' (see EXIT_CODES_TEXT)."""
    options = {
        k: getattr(args, k)
        for k in (
            "json",
            "hide_info",
            "allow_entities",
            "allow_text",
            "gap",
            "gap_search",
            "kink_angle",
            "corner_angle",
            "curvature_jump",
            "profile",
            "glyphs",
        )
    }
    options["units"] = args.units
    problem = option_problem(options)
    if problem is not None:
        print(f"outlinebench: error: {problem}", file=sys.stderr)
        return EXIT_BAD_INPUT
    files = expand_files(list(args.files))
    show_progress = len(files) > 1 and sys.stderr.isatty()
    results = _run_all(files, options, show_progress, getattr(args, "jobs", None))
    debug = getattr(args, "debug", False)

    code = EXIT_OK
    payload = []
    for r in results:
        if "crash" in r:
            print(f"outlinebench: error: {r['crash']}", file=sys.stderr)
            if debug and r["traceback"]:
                print(r["traceback"], file=sys.stderr, end="")
            code = max(code, EXIT_INTERNAL)
            payload.append({"file": r["file"], "clean": False, "internal_error": r["crash"]})
            continue
        if "error" in r:
            print(f"outlinebench: error: {r['error']}", file=sys.stderr)
            code = max(code, EXIT_BAD_INPUT)
            payload.append({"file": r["file"], "clean": False, "error": r["error"]})
            continue
        for note in r["notes"]:
            print(f"outlinebench: {note_line(note)}", file=sys.stderr)
        if r["problems"]:
            code = max(code, EXIT_FINDINGS)
        if args.json:
            payload.append(r["json_text"])
        else:
            print(r["text"])
    if args.json and payload:
        if len(files) == 1:
            if "json_text" in results[0]:
                _write_reports(payload, single=True)
        else:
            _write_reports(payload, single=False)
    return code
