"""Numbers for SVG output: the shortest positional decimal that reads back to the same float."""

from __future__ import annotations

import math
from decimal import Decimal

__all__ = ["format_number"]


def format_number(value: float) -> str:
    """Write a float in plain positional form, with the fewest digits that round-trip.

    Parameters
    ----------
    value : float
        A finite number.

    Returns
    -------
    str
        No exponent, no ``-0``, no trailing ``.`` and no trailing ``.0``; ``float(result)``
        equals ``value`` bit for bit (except that ``-0.0`` is written ``0``).

    Raises
    ------
    ValueError
        The value is not finite.

    Notes
    -----
    Python's ``repr(float)`` gives the shortest digit string that reads back to the same
    double (David Gay's algorithm, as in Python's ``float_repr_style = 'short'``). When repr
    chooses exponent form (``1e-07``, ``1e+16``) the same digits are written out positionally
    with :class:`decimal.Decimal`, which is exact for a finite digit string. Many cutter
    controllers reject exponents and ``-0``, hence the plain form.

    Examples
    --------
    >>> format_number(1e-07), format_number(-0.0), format_number(2.50)
    ('0.0000001', '0', '2.5')
    """
    if not math.isfinite(value):
        raise ValueError(f"cannot write {value!r} as an SVG number")
    if value == 0.0:
        return "0"
    text = repr(float(value))
    if "e" in text or "E" in text:
        text = format(Decimal(text), "f")
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text
