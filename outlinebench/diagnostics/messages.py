"""The sentences of findings whose numbers carry a length unit, written in one place.

Checks build these messages in the document's user units; :func:`message_in_unit` builds the
same sentence again from a finding whose fields were converted to another unit
(:func:`outlinebench.diagnostics.convert_units`), so the message and the numbers agree.
Lengths in user units are written bare (reports name the unit in their summary); in any other
unit the unit follows the number ("0.5 mm"), and curvatures read "2 per mm".
"""

from __future__ import annotations

from outlinebench.diagnostics.findings import WARNING, Finding

__all__ = [
    "gap_message",
    "open_contour_message",
    "tiny_segment_message",
    "degenerate_handle_message",
    "missing_extremum_message",
    "curvature_jump_message",
    "duplicate_message",
    "CURVATURE_JUMP_USER",
    "message_in_unit",
]

_USER = "user"


def _length(v: float, unit: str) -> str:
    return f"{v:.4g}" if unit == _USER else f"{v:.4g} {unit}"


def _curvature(k: float, unit: str) -> str:
    return f"{k:.4g}" if unit == _USER else f"{k:.4g} per {unit}"


def gap_message(gap: float, other: str, unit: str = _USER) -> str:
    """``gap``: an open end stopping short of ``other`` ("its own start", "contour 3")."""
    return (
        f"open end stops {_length(gap, unit)} short of {other}; a cutter sees an unclosed outline"
    )


def open_contour_message(span: float, unit: str = _USER) -> str:
    """``open-contour`` (warning): the distance between the contour's two ends."""
    return (
        f"contour is open (its ends are {_length(span, unit)} apart); cutters and fills need "
        "closed outlines"
    )


def tiny_segment_message(length: float, limit: float, unit: str = _USER) -> str:
    """``tiny-segment``: its arc length against the gap tolerance."""
    return (
        f"segment is {_length(length, unit)} long, shorter than the gap tolerance "
        f"{_length(limit, unit)}; remove it or merge it with a neighbour"
    )


def degenerate_handle_message(which: str, length: float, unit: str = _USER) -> str:
    """``degenerate-handle``: ``which`` is "start" or "end"; ``length`` the handle's length."""
    return (
        f"the handle at the segment's {which} lies on its on-curve point "
        f"({_length(length, unit)} away); the tangent there comes from the next control point"
    )


def missing_extremum_message(axis: str, t: float, overshoot: float, unit: str = _USER) -> str:
    """``missing-extremum``: ``axis`` "x" or "y", reached at ``t``, ``overshoot`` beyond."""
    return (
        f"the segment reaches its {axis} extremum at t = {t:.4g}, {_length(overshoot, unit)} "
        "beyond its end points; an on-curve point there keeps the outline easy to edit"
    )


# The curvature-jump sentence in user units as a format string, for the checker's batch of
# tens of thousands of joins (one bound str.format call each): κ before, κ after, difference.
CURVATURE_JUMP_USER = "curvature jumps from {:.4g} to {:.4g} (relative difference {:.3g}; G2 break)"


def curvature_jump_message(
    k_before: float, k_after: float, jump: float, unit: str = _USER, where: str = ""
) -> str:
    """``curvature-jump``: curvature on each side (1/length) and the relative difference."""
    if unit == _USER:
        return where + CURVATURE_JUMP_USER.format(k_before, k_after, jump)
    return (
        f"{where}curvature jumps from {_curvature(k_before, unit)} to "
        f"{_curvature(k_after, unit)} (relative difference {jump:.3g}; G2 break)"
    )


def duplicate_message(distance: float, other: int, unit: str = _USER) -> str:
    """``duplicate-contour``: a closed contour lying on another of its outline."""
    if distance == 0.0:
        how = "an exact duplicate of"
    else:
        how = f"a near duplicate of (at most {_length(distance, unit)} from)"
    return f"contour is {how} contour {other}; a cutter would cut the line twice: remove one"


def message_in_unit(f: Finding, unit: str) -> str:
    """The message of ``f`` written again from its fields, which are in ``unit``.

    Parameters
    ----------
    f : Finding
        Already converted (``value``, ``limit``, curvatures in ``unit``).
    unit : str
        The length unit of its fields.

    Returns
    -------
    str
        For the kinds above, the same sentence with the converted numbers; other messages
        carry no length and are returned unchanged. Two words that are not fields are read
        back from the old message: the axis of a missing extremum and the place prefix of a
        curvature jump where open ends meet.
    """
    kind = f.kind
    if kind == "gap" and f.value is not None:
        other = "its own start" if f.other_contour == f.contour else f"contour {f.other_contour}"
        return gap_message(f.value, other, unit)
    if kind == "open-contour" and f.severity == WARNING and f.value is not None:
        return open_contour_message(f.value, unit)
    if kind == "duplicate-contour" and f.value is not None and f.other_contour is not None:
        return duplicate_message(f.value, f.other_contour, unit)
    if kind == "tiny-segment" and f.value is not None and f.limit is not None:
        return tiny_segment_message(f.value, f.limit, unit)
    if kind == "degenerate-handle" and f.value is not None:
        return degenerate_handle_message("start" if f.t == 0.0 else "end", f.value, unit)
    if kind == "missing-extremum" and f.value is not None and f.t is not None:
        axis = "y" if "its y extremum" in f.message else "x"
        return missing_extremum_message(axis, f.t, f.value, unit)
    if (
        kind == "curvature-jump"
        and f.value is not None
        and f.curvature_before is not None
        and f.curvature_after is not None
    ):
        where = f.message.split("curvature jumps", 1)[0]
        return curvature_jump_message(f.curvature_before, f.curvature_after, f.value, unit, where)
    return f.message
