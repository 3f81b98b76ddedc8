"""The command line: ``outlinebench SUBCOMMAND ...``.

Thin by design: it parses arguments, hands them to a subcommand module in
:mod:`outlinebench.subcommands`, and turns the result into an exit code.

Exit codes
----------
0  nothing of warning level or worse was found (or the command succeeded);
1  findings of warning level or worse, a tolerance exceeded, or part of a file not read or
   nothing in it to check;
2  bad input or usage: one line on stderr naming the file and the place, never a traceback;
3  an unexpected internal error (a defect of ours): one line; ``--debug`` adds the traceback.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
import traceback
import warnings
from collections.abc import Sequence
from types import ModuleType

import numpy as np

from outlinebench import __version__
from outlinebench.errors import OutlinebenchError, error_line
from outlinebench.subcommands import (
    EXIT_BAD_INPUT,
    EXIT_CODES_TEXT,
    EXIT_FINDINGS,
    EXIT_INTERNAL,
    EXIT_OK,
    SUBCOMMANDS,
)

__all__ = [
    "main",
    "build_parser",
    "EXIT_OK",
    "EXIT_FINDINGS",
    "EXIT_BAD_INPUT",
    "EXIT_INTERNAL",
]

_DEBUG_HELP = "on an internal error, print the traceback too"


class _Parser(argparse.ArgumentParser):
    """argparse exits with 2 on usage errors already; keep its one-line message."""


def _modules() -> list[ModuleType]:
    return [importlib.import_module(f"outlinebench.subcommands.{name}") for name in SUBCOMMANDS]


def build_parser() -> argparse.ArgumentParser:
    """The full argument parser, one sub-parser per subcommand module."""
    parser = _Parser(
        prog="outlinebench",
        description=(
            "Check, measure, repair, flatten and offset Bézier outlines in SVG files, fonts and "
            "font sources. Run 'outlinebench FILE.svg' (no subcommand) to open the editor, and "
            "'outlinebench render FILE -o OUT.png' to draw the editor's view into an image."
        ),
        epilog=EXIT_CODES_TEXT,
    )
    parser.add_argument("--version", action="version", version=f"outlinebench {__version__}")
    parser.add_argument("--debug", action="store_true", help=_DEBUG_HELP)
    sub = parser.add_subparsers(dest="subcommand", metavar="SUBCOMMAND")
    for mod in _modules():
        p = sub.add_parser(mod.NAME, help=mod.HELP, description=mod.HELP, epilog=EXIT_CODES_TEXT)
        mod.add_arguments(p)
        p.add_argument("--debug", action="store_true", default=argparse.SUPPRESS, help=_DEBUG_HELP)
        p.set_defaults(_run=mod.run)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    parser = build_parser()
    args = parser.parse_args(list(sys.argv[1:] if argv is None else argv))
    if not getattr(args, "_run", None):
        parser.print_help()
        return EXIT_OK
    try:
        # numpy's warnings never reach the user: a value that overflows is reported where it
        # matters (a read error for coordinates past COORDINATE_LIMIT, null in JSON)
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore", RuntimeWarning)
            return int(args._run(args))
    except OutlinebenchError as exc:
        inputs = _file_args(args)
        # every error line names the file: the error's own, or the first input
        print(
            f"outlinebench: error: {error_line(exc, inputs[0] if inputs else None)}",
            file=sys.stderr,
        )
        return EXIT_BAD_INPUT
    except BrokenPipeError:
        # The reader of our output went away (``outlinebench measure f.svg | head``): not an
        # input error. Point stdout at devnull so the interpreter's final flush stays quiet,
        # and exit 1 as the Python documentation on SIGPIPE recommends.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_FINDINGS
    except OSError as exc:
        where = f"{exc.filename}: " if exc.filename else ""
        print(f"outlinebench: error: {where}{exc.strerror or exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("outlinebench: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:  # noqa: BLE001 - a defect of ours: one line, not a traceback
        where = " ".join(str(a) for a in _file_args(args))
        print(
            f"outlinebench: internal error{f' on {where}' if where else ''}: "
            f"{type(exc).__name__}: {exc} (a defect; --debug shows the traceback)",
            file=sys.stderr,
        )
        if getattr(args, "debug", False):
            traceback.print_exc()
        return EXIT_INTERNAL


def _file_args(args: argparse.Namespace) -> list[str]:
    """The input files named on the command line, for the one-line internal error."""
    out: list[str] = []
    for name in ("file", "files", "curves", "polylines"):
        v = getattr(args, name, None)
        if isinstance(v, str):
            out.append(v)
        elif isinstance(v, list):
            out.extend(str(x) for x in v)
    return out
