"""Entry point: ``outlinebench SUBCOMMAND ...`` runs the command line, ``outlinebench
[FILE.svg]`` opens the editor.

This is the one module that may reach both :mod:`outlinebench.cli` and :mod:`outlinebench.app`;
the command line itself never imports the editor.
"""

from __future__ import annotations

import sys
from collections.abc import Sequence

from outlinebench.subcommands import SUBCOMMANDS

__all__ = ["main"]


def main(argv: Sequence[str] | None = None) -> int:
    args = list(sys.argv[1:] if argv is None else argv)
    if args and (args[0] in SUBCOMMANDS or args[0].startswith("-")):
        from outlinebench.cli import main as cli_main

        return cli_main(args)
    try:
        from outlinebench.app.main_window import run_editor
    except ImportError as exc:
        print(f"outlinebench: error: the editor cannot start ({exc})", file=sys.stderr)
        return 2
    return run_editor(args)


if __name__ == "__main__":
    sys.exit(main())
