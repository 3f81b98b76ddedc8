"""SVG ``transform`` attribute lists parsed to 3×3 affine matrices.

References
----------
W3C, *SVG 1.1 (Second Edition)*, §7.6 "The 'transform' attribute" (grammar and the meaning of
``matrix``, ``translate``, ``scale``, ``rotate``, ``skewX``, ``skewY``).
"""

from __future__ import annotations

import math
import re

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import SvgReadError

__all__ = ["parse_transform", "translation", "is_mirroring"]

_NUM = r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?"
_NUM_RE = re.compile(_NUM)
_ITEM_RE = re.compile(
    r"[ \t\r\n\f]*(matrix|translate|scale|rotate|skewX|skewY)[ \t\r\n\f]*\(([^()]*)\)"
    r"[ \t\r\n\f]*,?"
)
_ARGS_RE = re.compile(rf"[ \t\r\n\f]*+(?:(?>{_NUM})[ \t\r\n\f]*+(?:,[ \t\r\n\f]*+)?+)*+")
_COUNTS = {
    "matrix": (6,),
    "translate": (1, 2),
    "scale": (1, 2),
    "rotate": (1, 3),
    "skewX": (1,),
    "skewY": (1,),
}


def translation(tx: float, ty: float) -> NDArray[np.float64]:
    """The 3×3 matrix of a translation by (tx, ty)."""
    m = np.eye(3)
    m[0, 2], m[1, 2] = tx, ty
    return m


def _item(name: str, v: list[float]) -> NDArray[np.float64]:
    m = np.eye(3)
    if name == "matrix":
        a, b, c, d, e, f = v
        m[:2] = [[a, c, e], [b, d, f]]
    elif name == "translate":
        return translation(v[0], v[1] if len(v) > 1 else 0.0)
    elif name == "scale":
        m[0, 0] = v[0]
        m[1, 1] = v[1] if len(v) > 1 else v[0]
    elif name == "rotate":
        a = math.radians(v[0])
        c, s = math.cos(a), math.sin(a)
        m[:2, :2] = [[c, -s], [s, c]]
        if len(v) == 3:  # rotate(a, cx, cy) = translate(cx, cy) rotate(a) translate(-cx, -cy)
            return translation(v[1], v[2]) @ m @ translation(-v[1], -v[2])
    elif name == "skewX":
        m[0, 1] = math.tan(math.radians(v[0]))
    else:
        m[1, 0] = math.tan(math.radians(v[0]))
    return m


def parse_transform(text: str | None, where: str = "") -> NDArray[np.float64]:
    """Parse an SVG transform list to one matrix.

    Parameters
    ----------
    text : str or None
        The attribute value, e.g. ``"translate(10 20) rotate(30, 5, 5)"``.
    where : str
        Place for error messages ("file.svg: element 'logo'").

    Returns
    -------
    ndarray, shape (3, 3)
        The product of the items from left to right (the rightmost applies first), mapping
        the element's coordinates to its parent's.

    Raises
    ------
    SvgReadError
        Unknown function, wrong argument count, bad number, or trailing text.

    Notes
    -----
    ``matrix(a b c d e f)`` is [[a c e], [b d f], [0 0 1]]; ``rotate(θ cx cy)`` equals
    ``translate(cx cy) rotate(θ) translate(−cx −cy)``; ``skewX(α)`` has tan α at (0, 1);
    SVG 1.1 §7.6 and §7.4.
    """
    out = np.eye(3)
    if not text or not text.strip(" \t\r\n\f"):
        return out
    pos = 0
    n = len(text)
    prefix = f"{where}: " if where else ""
    while pos < n:
        if not text[pos:].strip(" \t\r\n\f"):
            break
        m = _ITEM_RE.match(text, pos)
        if m is None:
            raise SvgReadError(
                f"{prefix}bad transform at offset {pos} of {text!r}: expected matrix, translate, "
                "scale, rotate, skewX or skewY"
            )
        name, args = m.group(1), m.group(2)
        am = _ARGS_RE.match(args)
        if am.end() != len(args) or args.rstrip(" \t\r\n\f").endswith(","):
            raise SvgReadError(f"{prefix}bad number in transform {m.group(0).strip()!r}")
        values = [float(x) for x in _NUM_RE.findall(args)]
        if len(values) not in _COUNTS[name]:
            want = " or ".join(str(c) for c in _COUNTS[name])
            raise SvgReadError(
                f"{prefix}{name}() takes {want} numbers, got {len(values)} in {text!r}"
            )
        if not all(math.isfinite(x) for x in values):
            raise SvgReadError(f"{prefix}number out of range in transform {text!r}")
        out = out @ _item(name, values)
        pos = m.end()
    return out


def is_mirroring(matrix: NDArray[np.float64]) -> bool:
    """True when the matrix reverses orientation (negative determinant of its 2×2 part)."""
    a, b, c, d = (
        float(matrix[0, 0]),
        float(matrix[1, 0]),
        float(matrix[0, 1]),
        float(matrix[1, 1]),
    )
    return a * d - c * b < 0.0  # Python floats: an overflow is ±inf, not a warning
