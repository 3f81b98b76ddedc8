"""OutlineBench: check, repair, measure, flatten and offset piecewise Bézier outlines.

The front door for library users (:mod:`outlinebench.api`)::

    import outlinebench as ob
    result = ob.check(ob.read("sign.svg"))
    print(result.clean, result.text())

``read``, ``check``, ``check_file``, ``measure``, ``flatten``, ``offset``, ``repair``,
``write`` and ``sample_path`` are loaded on first use, so ``import outlinebench`` stays cheap.
"""

from __future__ import annotations

from typing import Any

__version__ = "0.1.0"

_FRONT_DOOR = (
    "Drawing",
    "CheckResult",
    "Measurements",
    "Flattening",
    "OffsetResult",
    "RepairResult",
    "read",
    "check",
    "check_file",
    "measure",
    "flatten",
    "offset",
    "repair",
    "write",
    "sample_path",
)
__all__ = ["__version__", *_FRONT_DOOR]


def __getattr__(name: str) -> Any:
    if name in _FRONT_DOOR:
        from outlinebench import api

        return getattr(api, name)
    raise AttributeError(f"module 'outlinebench' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
