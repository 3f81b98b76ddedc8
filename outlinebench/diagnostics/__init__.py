"""Findings (G0/G1/G2 breaks, cusps, ...) computed from the model, incrementally (no Qt).

>>> from outlinebench.model import Document
>>> check_document(Document())           # a whole document at once
[]
>>> checker = Checker(CheckSettings())   # or, in an editor, after every edit:
>>> checker.update(Document())           # recomputes only what changed since the last call
[]
"""

from outlinebench.diagnostics.checker import Checker, check_document
from outlinebench.diagnostics.findings import (
    CHECK_KINDS,
    ERROR,
    INFO,
    KINDS,
    OFFSET_KINDS,
    SEVERITIES,
    WARNING,
    Finding,
    is_problem,
)
from outlinebench.diagnostics.grid_rounding import (
    GRID_KINK,
    explained_by_rounding,
    grid_kink_findings,
)
from outlinebench.diagnostics.profiles import (
    PROFILE_NAMES,
    CheckProfile,
    apply_profile,
    check_with_profile,
    default_profile_name,
    get_profile,
    profile_settings,
)
from outlinebench.diagnostics.report import (
    CAUTION,
    convert_units,
    json_report,
    place_text,
    sort_findings,
    summarize,
    text_report,
)
from outlinebench.diagnostics.settings import CheckSettings

__all__ = [
    "CAUTION",
    "place_text",
    "ERROR",
    "INFO",
    "CHECK_KINDS",
    "KINDS",
    "OFFSET_KINDS",
    "SEVERITIES",
    "WARNING",
    "CheckSettings",
    "Checker",
    "Finding",
    "check_document",
    "convert_units",
    "is_problem",
    "json_report",
    "sort_findings",
    "summarize",
    "text_report",
    "GRID_KINK",
    "explained_by_rounding",
    "grid_kink_findings",
    "PROFILE_NAMES",
    "CheckProfile",
    "apply_profile",
    "check_with_profile",
    "default_profile_name",
    "get_profile",
    "profile_settings",
]
