"""Entry point: ``outlinebench SUBCOMMAND ...`` runs the command line, ``outlinebench
[FILE.svg]`` opens the editor, ``outlinebench render FILE -o OUT.png`` draws the editor's
canvas into an image without a screen.

This is the one module that may reach both :mod:`outlinebench.cli` and :mod:`outlinebench.app`;
the command line itself never imports the editor.

What the first argument means:

- a subcommand name (:data:`outlinebench.subcommands.SUBCOMMANDS`) or an option: the command
  line;
- ``render``: :mod:`outlinebench.app.render` (Qt, but no display needed);
- nothing, or the path of an existing file: the editor, after checking that a window can be
  opened here (:func:`outlinebench.app.display.display_problem`), so a machine without a
  display gets one line instead of Qt's abort;
- anything else: one line on stderr and exit 2 — "unknown command 'chek'; did you mean
  'check'?" when it is close to a command name (:func:`difflib.get_close_matches`), else
  that there is no such file.
"""

from __future__ import annotations

import difflib
import sys
from collections.abc import Sequence
from pathlib import Path

from outlinebench.subcommands import SUBCOMMANDS

__all__ = ["main", "APP_COMMANDS", "command_names", "EXIT_USAGE"]

# Commands handled by the editor package rather than the command line.
APP_COMMANDS: tuple[str, ...] = ("render",)
EXIT_USAGE = 2
# How alike a mistyped word and a command must be to suggest it (difflib's ratio, 0..1;
# 0.6 is difflib's own default: "chek" → "check" scores 0.89, "flaten" → "flatten" 0.92).
SUGGEST_CUTOFF = 0.6


def command_names() -> tuple[str, ...]:
    """Every command word: the command line's subcommands, then the editor's."""
    return tuple(SUBCOMMANDS) + APP_COMMANDS


def _error(text: str) -> int:
    print(f"outlinebench: error: {text}", file=sys.stderr)
    return EXIT_USAGE


def _not_a_file(word: str) -> int:
    """Exit code and one line for a first argument that is neither a command nor a file."""
    names = command_names()
    path = Path(word)
    if path.is_dir():
        return _error(
            f"{word} is a folder; the editor opens one file (to check a folder: "
            f"outlinebench check {word})"
        )
    if path.suffix != "" or "/" in word or "\\" in word:  # meant as a file name
        return _error(f"{word}: no such file")
    close = difflib.get_close_matches(word, names, n=1, cutoff=SUGGEST_CUTOFF)
    if close:
        return _error(f"unknown command '{word}'; did you mean '{close[0]}'?")
    return _error(
        f"unknown command '{word}' and no file of that name; commands are "
        f"{', '.join(names)} (outlinebench --help)"
    )


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line, the renderer or the editor; returns the exit code."""
    args = list(sys.argv[1:] if argv is None else argv)
    if args and (args[0] in SUBCOMMANDS or args[0].startswith("-")):
        from outlinebench.cli import main as cli_main

        return cli_main(args)
    if args and args[0] in APP_COMMANDS:
        try:
            from outlinebench.app.render import main as render_main
        except ImportError as exc:
            return _error(f"rendering needs the editor's Qt libraries ({exc})")
        return render_main(args[1:])
    if args and not Path(args[0]).is_file():
        return _not_a_file(args[0])
    if len(args) > 1:
        return _error("the editor opens one file at a time (to check several: outlinebench check)")
    try:
        from outlinebench.app.display import display_problem
    except ImportError as exc:  # pragma: no cover (the app package has no import-time Qt)
        return _error(f"the editor cannot start ({exc})")
    problem = display_problem()
    if problem is not None:
        print(f"outlinebench: {problem}", file=sys.stderr)
        return EXIT_USAGE
    try:
        from outlinebench.app.main_window import run_editor
    except ImportError as exc:
        return _error(f"the editor cannot start ({exc})")
    return run_editor(args)


if __name__ == "__main__":
    sys.exit(main())
