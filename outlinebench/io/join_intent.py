"""Join intent written as our own namespaced attribute (the writing half of the codec).

Each contour's joins become one letter each (``s`` smooth, ``c`` corner, ``-`` no stated
intent), contours separated by ``;``. The reading half (``_read_joins``) and the letters
(``_JOIN_LETTER``) live in :mod:`outlinebench.io.svg_read`.
"""

from __future__ import annotations

from collections.abc import Sequence

from outlinebench.io.svg_read import _JOIN_LETTER, JOINS_NS, JOINS_PREFIX
from outlinebench.model.document import Contour

__all__ = ["JOINS_NS", "JOINS_PREFIX", "joins_text"]


def joins_text(contours: Sequence[Contour]) -> str | None:
    """The join-intent attribute value, or None when no join states an intent."""
    if not any(j is not None for c in contours for j in c.joins):
        return None
    return ";".join("".join(_JOIN_LETTER[j] for j in c.joins) for c in contours)
