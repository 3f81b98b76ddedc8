"""Findings as text for people and as JSON for machines.

Lengths in findings are in the document's user units (unit ``"user"``); reports can convert
them to another length unit with a factor (user units → unit), which also converts areas
(factor²) and curvatures (1/factor).
"""

from __future__ import annotations

import json
import math
from collections import Counter
from collections.abc import Iterable, Iterator, Sequence
from typing import Any, TextIO

from outlinebench.diagnostics.file_findings import FileFinding
from outlinebench.diagnostics.findings import (
    ERROR,
    INFO,
    KINDS,
    SEVERITIES,
    SEVERITY_RANK,
    WARNING,
    Finding,
    is_problem,
)
from outlinebench.diagnostics.messages import message_in_unit

__all__ = [
    "CAUTION",
    "convert_units",
    "sort_findings",
    "summarize",
    "place_text",
    "format_finding",
    "format_file_finding",
    "unit_words",
    "UNIT_WORDS",
    "text_report",
    "json_report",
    "iter_json",
    "write_json_stream",
]

# Carried by machine-readable output that may feed a cutting job.
CAUTION = (
    "Verify toolpaths in the machine's own preview before cutting, and follow the machine "
    "maker's instructions, shop safety rules and local codes."
)


def convert_units(findings: Sequence[Finding], factor: float, unit: str) -> list[Finding]:
    """Findings with positions and lengths converted from user units to ``unit``.

    Parameters
    ----------
    findings : sequence of Finding
    factor : float
        Size of one user unit in ``unit`` (e.g. mm per user unit).
    unit : str
        Name of the target unit ("mm", "in", "pt", "px").

    Returns
    -------
    list of Finding
        ``x``, ``y``, lengths (unit ``"user"``) and their limits scaled by ``factor``; areas
        (``"user^2"``) by factor²; curvatures by 1/factor. Angles and ratios are unchanged.
        Messages that quote a length or curvature are written again in ``unit``
        (:func:`outlinebench.diagnostics.messages.message_in_unit`).
    """
    if factor == 1.0 and unit == "user":
        return list(findings)
    out = []
    for f in findings:
        changes: dict[str, Any] = {"x": f.x * factor, "y": f.y * factor}
        if f.unit == "user":
            changes["unit"] = unit
            if f.value is not None:
                changes["value"] = f.value * factor
            if f.limit is not None:
                changes["limit"] = f.limit * factor
        elif f.unit == "user^2":
            changes["unit"] = f"{unit}^2"
            if f.value is not None:
                changes["value"] = f.value * factor * factor
        if f.curvature_before is not None:
            changes["curvature_before"] = f.curvature_before / factor
        if f.curvature_after is not None:
            changes["curvature_after"] = f.curvature_after / factor
        g = f._replace(**changes)
        message = message_in_unit(g, unit)
        out.append(g._replace(message=message) if message is not f.message else g)
    return out


def sort_findings(findings: Sequence[Finding]) -> list[Finding]:
    """Findings in document order: contour, segment, t, then severity and kind."""

    def key(f: Finding) -> tuple:
        return (
            f.contour,
            -1 if f.segment is None else f.segment,
            -1.0 if f.t is None else f.t,
            SEVERITY_RANK[f.severity],
            KINDS.index(f.kind) if f.kind in KINDS else len(KINDS),
        )

    return sorted(findings, key=key)


def summarize(
    findings: Sequence[Finding], file_findings: Sequence[FileFinding] = ()
) -> dict[str, Any]:
    """Counts by severity and by kind, and whether anything of warning level or worse is there.

    Parameters
    ----------
    findings : sequence of Finding
    file_findings : sequence of FileFinding
        Findings about the file as a whole (what could not be read, nothing to check); they
        count like the others.

    Returns
    -------
    dict
        ``{"total", "errors", "warnings", "info", "by_kind": {kind: count}, "clean"}``;
        ``clean`` is True when no finding is a warning or an error.
    """
    sev = Counter(f.severity for f in findings)
    sev.update(f.severity for f in file_findings)
    kinds = Counter(f.kind for f in file_findings)
    kinds.update(f.kind for f in findings)
    order = [k for k in kinds if k not in KINDS] + [k for k in KINDS if kinds.get(k)]
    return {
        "total": len(findings) + len(file_findings),
        "errors": sev.get(ERROR, 0),
        "warnings": sev.get(WARNING, 0),
        "info": sev.get(INFO, 0),
        "by_kind": {k: kinds[k] for k in order},
        "clean": not any(is_problem(f) for f in findings)
        and not any(f.severity in (ERROR, WARNING) for f in file_findings),
    }


def _num(v: float | None) -> str:
    """A number for text reports: 4 significant digits, no ``-0``."""
    if v is None or not math.isfinite(v):
        return "n/a" if v is None else str(v)
    text = f"{v:.4g}"
    return "0" if text == "-0" else text


def _pos(v: float) -> str:
    """A coordinate for text reports: at least 4 significant digits and two decimals of the
    unit (``199999.53`` in a 200,000-unit font outline, ``27.12`` on a page), no ``-0``."""
    if not math.isfinite(v):
        return str(v)
    before = math.floor(math.log10(abs(v))) + 1 if v != 0.0 else 1
    text = f"{v:.{max(4, before + 2)}g}"
    return "0" if text == "-0" else text


def _value(f: Finding) -> str:
    if f.value is None:
        return ""
    if f.unit == "degrees":
        return f" {_num(f.value)}°"
    if f.unit == "relative":
        extra = ""
        if f.curvature_before is not None and f.curvature_after is not None:
            extra = f" (κ {_num(f.curvature_before)} → {_num(f.curvature_after)})"
        return f" {_num(f.value)}{extra}"
    if f.unit == "user":
        return f" {_num(f.value)}"  # document user units, named in the summary line
    if f.unit == "user^2":
        return f" {_num(f.value)} (area)"
    return f" {_num(f.value)} {f.unit}"


def _count(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def place_text(f: Finding) -> str:
    """Where a finding is, in the words every report uses: "contour 5, join 5",
    "contour 2, segment 1" or "contour 3" (the whole contour).

    The command line's text lines and the editor's findings list both call this, so one place
    has one name everywhere.
    """
    if f.join is not None:
        return f"contour {f.contour}, join {f.join}"
    if f.segment is not None:
        return f"contour {f.contour}, segment {f.segment}"
    return f"contour {f.contour}"


# How the text reports name each length unit ("lengths in inches", "0.01 user units").
UNIT_WORDS: dict[str, str] = {
    "user": "user units",
    "mm": "mm",
    "in": "inches",
    "pt": "pt",
    "px": "px",
}

# Kinds whose message names a second place (the other contour of a gap or crossing, the outer
# contour of a hole): text lines carry that explanation too, as JSON does.
_EXPLAINED = frozenset(
    {"gap", "self-intersection", "wrong-direction", "duplicate-contour", "overlap", "touch"}
)


def unit_words(unit: str) -> str:
    """The name of a length unit in report sentences: "user units", "mm", "inches", ..."""
    return UNIT_WORDS.get(unit, unit)


def format_finding(label: str, f: Finding) -> str:
    """``label: contour N, join J: kind value at (x, y) [severity]`` (one line), followed by
    the explanation for findings that involve a second place (``: crosses contour 2 ...``)."""
    where = place_text(f)
    line = f"{label}: {where}: {f.kind}{_value(f)} at ({_pos(f.x)}, {_pos(f.y)}) [{f.severity}]"
    if f.kind in _EXPLAINED and f.other_contour is not None:
        line += f": {f.message}"
    return line


def format_file_finding(label: str, f: FileFinding) -> str:
    """``label: kind: message [severity]`` (one line)."""
    return f"{label}: {f.kind}: {f.message} [{f.severity}]"


def text_report(
    label: str,
    findings: Sequence[Finding],
    *,
    unit: str = "user",
    show_info: bool = True,
    file_findings: Sequence[FileFinding] = (),
    profile: str | None = None,
) -> str:
    """One line per finding in document order, then a summary line.

    Parameters
    ----------
    label : str
        Usually the file name.
    findings : sequence of Finding
    unit : str
        The length unit the findings are in, named in the summary.
    show_info : bool
        List info findings (intended corners, straight-into-curve joins, ...) too; the summary
        counts them either way.
    file_findings : sequence of FileFinding
        Findings about the file as a whole, listed first.
    profile : str, optional
        The check profile used, named in the summary line.
    """
    lines = [
        format_file_finding(label, f)
        for f in file_findings
        if show_info or f.severity in (ERROR, WARNING)
    ]
    shown = findings if show_info else [f for f in findings if is_problem(f)]
    lines.extend(format_finding(label, f) for f in sort_findings(shown))
    s = summarize(findings, file_findings)
    used = f"; profile {profile}" if profile else ""
    if s["total"] == 0:
        lines.append(f"{label}: no findings{used}; clean")
    else:
        kinds = ", ".join(f"{k} {n}" for k, n in s["by_kind"].items())
        verdict = "clean" if s["clean"] else "not clean"
        lines.append(
            f"{label}: {_count(s['total'], 'finding')}: {_count(s['errors'], 'error')}, "
            f"{_count(s['warnings'], 'warning')}, {s['info']} info ({kinds}); "
            f"lengths in {unit_words(unit)}{used}; {verdict}"
        )
    return "\n".join(lines)


def json_report(
    label: str,
    findings: Sequence[Finding],
    *,
    unit: str = "user",
    file_findings: Sequence[FileFinding] = (),
) -> dict[str, Any]:
    """``{"file", "units", "clean", "findings": [...], "summary": {...}, "caution"}``.

    Every finding is listed, info ones included: first the file findings
    (:meth:`FileFinding.to_dict`, ``"place": "file"``), then the others in document order
    (:meth:`Finding.to_dict`).
    """
    summary = summarize(findings, file_findings)
    return {
        "file": label,
        "units": unit,
        "clean": summary["clean"],
        "findings": [f.to_dict() for f in file_findings]
        + [f.to_dict() for f in sort_findings(findings)],
        "summary": summary,
        "severities": list(SEVERITIES),
        "caution": CAUTION,
    }


# -- JSON written as it is produced ---------------------------------------------------------

_SCALARS = (str, int, float, bool, type(None))
_INDENT = "  "
_encode_str = json.encoder.encode_basestring  # type: ignore[attr-defined]
_flat_encoders: dict[int, json.JSONEncoder] = {}
# How much text is gathered before one write (a few thousand findings).
_CHUNK_CHARS = 1 << 16


def _flat_encoder(depth: int) -> json.JSONEncoder:
    """The standard library's C encoder, with separators that give indented lines at
    ``depth`` for a container whose items are all scalars."""
    enc = _flat_encoders.get(depth)
    if enc is None:
        enc = json.JSONEncoder(
            ensure_ascii=False,
            allow_nan=False,
            separators=(",\n" + _INDENT * (depth + 1), ": "),
        )
        _flat_encoders[depth] = enc
    return enc


def _finite(v: Any) -> Any:
    return None if isinstance(v, float) and not math.isfinite(v) else v


def _scalar(v: Any) -> str:
    if isinstance(v, str):
        return _encode_str(v)
    if v is None:
        return "null"
    if v is True:
        return "true"
    if v is False:
        return "false"
    if isinstance(v, int):
        return int.__repr__(v)
    if isinstance(v, float):
        return float.__repr__(v) if math.isfinite(v) else "null"
    raise TypeError(f"Object of type {type(v).__name__} is not JSON serializable")


def _key(k: Any) -> str:
    if isinstance(k, str):
        return _encode_str(k)
    if isinstance(k, bool) or k is None or isinstance(k, (int, float)):
        return _encode_str(_scalar(k))  # the standard library's key conversion
    raise TypeError(f"keys must be str, int, float, bool or None, not {type(k).__name__}")


def iter_json(obj: Any, depth: int = 0) -> Iterator[str]:
    r"""Pieces of ``json.dumps(obj, indent=2, ensure_ascii=False, allow_nan=False)`` in order,
    with non-finite floats written as ``null``; lists and tuples may also be any iterable
    (a generator of findings), consumed as it is written.

    Parameters
    ----------
    obj : dict, list, tuple, iterable or scalar
    depth : int
        Indentation level of ``obj`` itself.

    Yields
    ------
    str
        Their concatenation is the text of the standard library's indented encoder.

    Notes
    -----
    The layout is that of :func:`json.dumps` with ``indent=2`` (Python Standard Library,
    "json — JSON encoder and decoder"): each item of a non-empty container on its own line,
    indented one level deeper, empty containers as ``[]`` and ``{}``. A container whose
    items are all scalars is written in one call of the standard library's C encoder with the
    item separator ``",\n"`` plus the indentation (the same text, much faster than the
    pure-Python indented encoder).

    Examples
    --------
    >>> print("".join(iter_json({"a": [1, 2.5], "b": {}})))
    {
      "a": [
        1,
        2.5
      ],
      "b": {}
    }
    """
    if isinstance(obj, _SCALARS):
        yield _scalar(obj)
        return
    ind, ind_in = _INDENT * depth, _INDENT * (depth + 1)
    if isinstance(obj, dict):
        if not obj:
            yield "{}"
            return
        vals = obj.values()
        if all(isinstance(v, _SCALARS) for v in vals):
            try:
                text = _flat_encoder(depth).encode(obj)
            except ValueError:  # a non-finite float: written as null
                text = _flat_encoder(depth).encode({k: _finite(v) for k, v in obj.items()})
            yield "{\n" + ind_in + text[1:-1] + "\n" + ind + "}"
            return
        yield "{"
        sep = "\n"
        for k, v in obj.items():
            yield sep + ind_in + _key(k) + ": "
            yield from iter_json(v, depth + 1)
            sep = ",\n"
        yield "\n" + ind + "}"
        return
    if isinstance(obj, (list, tuple)):
        if not obj:
            yield "[]"
            return
        if all(isinstance(v, _SCALARS) for v in obj):
            try:
                text = _flat_encoder(depth).encode(list(obj))
            except ValueError:
                text = _flat_encoder(depth).encode([_finite(v) for v in obj])
            yield "[\n" + ind_in + text[1:-1] + "\n" + ind + "]"
            return
        items: Iterable[Any] = obj
    elif isinstance(obj, Iterable):
        items = obj
    else:
        raise TypeError(f"Object of type {type(obj).__name__} is not JSON serializable")
    opened = False
    for v in items:
        yield (",\n" if opened else "[\n") + ind_in
        opened = True
        yield from iter_json(v, depth + 1)
    yield ("\n" + ind + "]") if opened else "[]"


def write_json_stream(obj: Any, stream: TextIO) -> None:
    r"""Write ``obj`` as indented JSON and a newline, piece by piece as it is encoded.

    The text is that of ``json.dump(obj, stream, indent=2, ensure_ascii=False,
    allow_nan=False)`` with non-finite floats as ``null``, then ``"\n"``
    (:func:`iter_json`); it is written in chunks of about 64 k characters, so a report of
    many findings is never held as one string.
    """
    buf: list[str] = []
    size = 0
    for piece in iter_json(obj):
        buf.append(piece)
        size += len(piece)
        if size >= _CHUNK_CHARS:
            stream.write("".join(buf))
            buf.clear()
            size = 0
    buf.append("\n")
    stream.write("".join(buf))
