"""One module per command-line subcommand; each defines ``NAME``, ``HELP``, ``add_arguments``
and ``run``. :mod:`outlinebench.cli` discovers them through ``SUBCOMMANDS``.

Exit codes (every subcommand; the highest one wins when several files are checked):

- ``EXIT_OK`` (0): clean, or the command succeeded;
- ``EXIT_FINDINGS`` (1): findings of warning level or worse, a tolerance exceeded, or part of
  a file not read or nothing in it to check;
- ``EXIT_BAD_INPUT`` (2): a file cannot be read at all, bad options, or output refused;
- ``EXIT_INTERNAL`` (3): an unexpected internal error (a defect of ours), reported for its
  file in one line; ``--debug`` prints the traceback.
"""

# Module names under this package, in the order ``--help`` lists them.
SUBCOMMANDS: tuple[str, ...] = ("check", "measure", "flatten", "offset", "deviation", "repair")

EXIT_OK = 0
EXIT_FINDINGS = 1
EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3

# One line per exit code, for --help and the README.
EXIT_CODES_TEXT = (
    "exit codes: 0 clean; 1 findings of warning level or worse, a tolerance exceeded, part "
    "of a file not read or nothing to check; 2 a file cannot be read, bad options or output "
    "refused; 3 internal error (a defect: please report it; --debug shows the traceback). "
    "With several files the highest code wins."
)
