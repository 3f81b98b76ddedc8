"""One module per command-line subcommand; each defines ``NAME``, ``HELP``, ``add_arguments``
and ``run``. :mod:`outlinebench.cli` discovers them through ``SUBCOMMANDS``."""

# Module names under this package, in the order ``--help`` lists them.
SUBCOMMANDS: tuple[str, ...] = ("check", "measure", "flatten", "offset", "deviation", "repair")
