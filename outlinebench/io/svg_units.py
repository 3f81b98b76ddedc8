"""SVG lengths, units, ``viewBox`` and ``preserveAspectRatio``: the physical scale of a file.

References
----------
W3C, *SVG 1.1 (Second Edition)*, §7.7 "The 'viewBox' attribute", §7.8
"The 'preserveAspectRatio' attribute", §7.10 "Units"; W3C, *CSS Values and Units Level 3*,
§5.2 "Absolute lengths" (1in = 2.54cm = 25.4mm = 72pt = 6pc = 96px).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import SvgReadError

__all__ = [
    "PX_PER_INCH",
    "MM_PER_UNIT",
    "Length",
    "parse_length",
    "parse_view_box",
    "parse_aspect",
    "view_box_transform",
]

# CSS reference pixel: 96 px per inch (CSS Values 3 §5.2). Some exporters assumed 90 or 72.
PX_PER_INCH = 96.0
# Millimetres per unit for the absolute units; "px" depends on px_per_inch.
MM_PER_UNIT = {"mm": 1.0, "cm": 10.0, "in": 25.4, "pt": 25.4 / 72.0, "pc": 25.4 / 6.0}

_LENGTH_RE = re.compile(
    r"[ \t\r\n\f]*([+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)"
    r"(px|mm|cm|in|pt|pc|em|ex|%)?[ \t\r\n\f]*",
    re.IGNORECASE,  # CSS units are ASCII case-insensitive
)
_NUMS_RE = re.compile(r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?")


@dataclass(frozen=True)
class Length:
    """A length as written: value and unit ("" for user units)."""

    value: float
    unit: str

    def to_mm(self, px_per_inch: float = PX_PER_INCH) -> float | None:
        """Millimetres, or None for relative units (%, em, ex)."""
        if self.unit in ("", "px"):
            return self.value * 25.4 / px_per_inch
        factor = MM_PER_UNIT.get(self.unit)
        return None if factor is None else self.value * factor

    def to_user(self, px_per_inch: float = PX_PER_INCH) -> float | None:
        """User units (px) outside any viewBox, or None for relative units."""
        if self.unit in ("", "px"):
            return self.value
        mm = self.to_mm(px_per_inch)
        return None if mm is None else mm * px_per_inch / 25.4


def parse_length(text: str | None, where: str = "") -> Length | None:
    """Parse an SVG length ("210mm", "8.5in", "300", "100%"); None when absent or "auto".

    Units are ASCII case-insensitive, as in CSS. "auto" (SVG 2) means what a missing value
    means for every attribute read with this function: 100% for the root's width and height,
    the other radius for rx/ry, zero for a rect's width and height.

    Raises
    ------
    SvgReadError
        Text that is not a length.
    """
    if text is None or not text.strip() or text.strip(" \t\r\n\f").lower() == "auto":
        return None
    m = _LENGTH_RE.fullmatch(text)
    if m is None:
        raise SvgReadError(f"{where}: bad length {text!r}" if where else f"bad length {text!r}")
    value = float(m.group(1))
    if not np.isfinite(value):
        raise SvgReadError(f"{where}: length out of range {text!r}")
    return Length(value, (m.group(2) or "").lower())


def parse_view_box(text: str | None, where: str = "") -> tuple[float, float, float, float] | None:
    """Parse ``viewBox="min-x min-y width height"``; None when absent or disabling.

    A zero or negative width or height disables the viewBox (SVG 1.1 §7.7): returns None.

    Raises
    ------
    SvgReadError
        Not four numbers.
    """
    if text is None or not text.strip():
        return None
    parts = [p for p in re.split(r"[ \t\r\n\f,]+", text.strip()) if p]
    if len(parts) != 4 or not all(_NUMS_RE.fullmatch(p) for p in parts):
        raise SvgReadError(f"{where}: viewBox needs four numbers, got {text!r}")
    x, y, w, h = (float(p) for p in parts)
    if not all(np.isfinite(v) for v in (x, y, w, h)):
        raise SvgReadError(f"{where}: viewBox out of range {text!r}")
    if w <= 0 or h <= 0:
        return None
    return (x, y, w, h)


def parse_aspect(text: str | None) -> tuple[str, str]:
    """Parse ``preserveAspectRatio`` into (align, meet_or_slice); default ("xMidYMid", "meet").

    Unknown values fall back to the default, as SVG 1.1 §7.8 asks for errors in this
    attribute.
    """
    if not text:
        return ("xMidYMid", "meet")
    words = text.split()
    if words and words[0] == "defer":
        words = words[1:]
    aligns = {
        "none",
        *(f"x{a}Y{b}" for a in ("Min", "Mid", "Max") for b in ("Min", "Mid", "Max")),
    }
    if not words or words[0] not in aligns:
        return ("xMidYMid", "meet")
    mode = words[1] if len(words) > 1 and words[1] in ("meet", "slice") else "meet"
    return (words[0], mode)


def view_box_transform(
    view_box: tuple[float, float, float, float],
    width: float,
    height: float,
    aspect: tuple[str, str],
) -> NDArray[np.float64]:
    """Matrix from viewBox coordinates to a viewport of ``width × height`` at its origin.

    Notes
    -----
    SVG 1.1 §7.8: scale sx = width / vb_w, sy = height / vb_h; with an alignment other than
    "none" both become min(sx, sy) ("meet") or max(sx, sy) ("slice"), and the content is
    shifted by 0, half or all of the leftover space for Min, Mid, Max. Then translate by
    −(min-x, min-y) scaled.
    """
    vx, vy, vw, vh = view_box
    sx, sy = width / vw, height / vh
    align, mode = aspect
    tx = ty = 0.0
    if align != "none":
        s = min(sx, sy) if mode == "meet" else max(sx, sy)
        sx = sy = s
        xa, ya = align[1:4], align[5:8]
        extra_w = width - vw * s
        extra_h = height - vh * s
        tx = {"Min": 0.0, "Mid": extra_w / 2.0, "Max": extra_w}[xa]
        ty = {"Min": 0.0, "Mid": extra_h / 2.0, "Max": extra_h}[ya]
    m = np.eye(3)
    m[0, 0], m[1, 1] = sx, sy
    m[0, 2] = tx - vx * sx
    m[1, 2] = ty - vy * sy
    return m
