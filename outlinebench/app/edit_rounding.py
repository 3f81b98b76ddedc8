"""Saved coordinates without float noise: edited points are rounded to a stated decimal grid.

A drag adds pointer steps to a coordinate, and 200.1 + 30.2 is 230.29999999999998 in binary
floating point (IEEE 754 double: neither decimal is representable); the writer prints the
shortest decimal that reads back to the same double, so that noise would reach the file.
Before saving (and autosaving), every segment an edit made — one not among the segments of the
document as it was opened, by identity, since an edit keeps untouched segments as the same
objects — is rounded to ``edit_decimals(doc)`` decimals of a user unit: the grid of
10^-k user units with 10^-k ≤ :data:`EDIT_RESOLUTION_MM` (0.1 µm). An end point shared with
an untouched neighbour takes the neighbour's exact value, so rounding never opens a gap.
Untouched segments keep every digit they were read with.

Rounding moves a point by at most √2/2 · 10^-k (half a step in x and in y), under 0.071 µm.

Qt-free; a candidate for the model (as an option of the edit commands).
"""

from __future__ import annotations

import math

import numpy as np

from outlinebench.model.document import Contour, Document

__all__ = ["EDIT_RESOLUTION_MM", "edit_decimals", "round_edits"]

# Coarsest step edited coordinates are rounded to, in mm: 0.1 µm, a thousand times finer than
# the 0.1 mm a drafter sees at the selection panel's three decimals and any cutter's step.
EDIT_RESOLUTION_MM = 1e-4


def edit_decimals(doc: Document) -> int:
    """Decimals k of a user unit such that 10^-k user units ≤ :data:`EDIT_RESOLUTION_MM`.

    Examples
    --------
    >>> from outlinebench.model.document import Document
    >>> edit_decimals(Document(mm_per_unit=1.0))  # millimetre drawing: 0.0001 mm
    4
    >>> edit_decimals(Document(mm_per_unit=25.4 / 96))  # CSS px: 1e-4 mm is 3.8e-4 px
    4
    """
    per_unit = doc.mm_per_unit if doc.mm_per_unit and doc.mm_per_unit > 0 else 1.0
    k = math.ceil(-math.log10(EDIT_RESOLUTION_MM / per_unit) - 1e-12)
    return min(max(k, 0), 12)


def _frozen(a: np.ndarray) -> np.ndarray:
    a = np.ascontiguousarray(a, dtype=np.float64)
    a.flags.writeable = False
    return a


def _round_contour(c: Contour, base_ids: set[int], k: int) -> Contour:
    segs = c.segments
    n = len(segs)
    untouched = [id(s) in base_ids for s in segs]
    if all(untouched):
        return c
    out = []
    for i, seg in enumerate(segs):
        if untouched[i]:
            out.append(seg)
            continue
        r = np.round(seg, k)
        prev = i - 1 if i > 0 else (n - 1 if c.closed else None)
        nxt = i + 1 if i < n - 1 else (0 if c.closed else None)
        if prev is not None and untouched[prev]:
            r[0] = segs[prev][-1]
        if nxt is not None and untouched[nxt]:
            r[-1] = segs[nxt][0]
        out.append(r if np.array_equal(r, seg) else _frozen(r))
    if all(a is b for a, b in zip(out, segs, strict=True)):
        return c
    return Contour(tuple(out), c.closed, c.joins)


def round_edits(doc: Document, base: Document | None) -> Document:
    """``doc`` with the segments edits made since ``base`` rounded (see the module notes).

    Parameters
    ----------
    doc : Document
        The document to save.
    base : Document or None
        The document as opened (None: everything was drawn in the editor, all is rounded).
        The caller keeps ``base`` alive, so the identities compared stay its own.
    """
    base_ids = (
        {id(s) for o in base.outlines for c in o.contours for s in c.segments} if base else set()
    )
    k = edit_decimals(doc)
    new = doc
    for oi, outline in enumerate(doc.outlines):
        for ci, contour in enumerate(outline.contours):
            rounded = _round_contour(contour, base_ids, k)
            if rounded is not contour:
                new = new.replace_contour(oi, ci, rounded)
    return new
