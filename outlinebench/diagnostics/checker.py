"""Run every check on a document, all at once or incrementally after an edit.

:func:`check_document` checks a whole document. :class:`Checker` keeps what it computed and,
given the next version of the document, recomputes only what the edit touched: documents
share unchanged outlines, contours and segment arrays by identity (see
:mod:`outlinebench.model.document`), so an outline or contour that is the same object as
before keeps its findings, and inside a changed contour only the segments that are new
objects, the joins next to them and the intersections involving them are computed again.
Winding (holes) is redone for the changed outline only; gaps between open contours are redone
when an open contour changed. The checker holds the previous document, so the object ids it
compares stay valid.

A change of structure (an outline or contour added, removed or moved, or a different scale)
makes the next update a full check; moving, inserting or deleting points inside a contour and
changing join intent do not.

Whole-document work is vectorised: all new segments are elevated to cubics and stacked in one
``(M, 4, 2)`` array; joins, boxes, screening tests, containment of holes and the box culling of
segment pairs run as array operations, and only what fails a screening test is examined one
item at a time.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from itertools import chain, compress
from operator import is_not
from typing import Any

import numpy as np
from numpy.typing import NDArray

from outlinebench.diagnostics.continuity import (
    INTENT_CODE,
    JOIN_CORNER,
    JOIN_CURVATURE_JUMP,
    JOIN_KINK,
    classify_joins,
)
from outlinebench.diagnostics.contour_checks import (
    OpenEnd,
    containment_pairs,
    crossing_findings,
    duplicate_pairs,
    lines_apart,
    lines_may_meet,
    narrow_pairs,
    open_end_findings,
    overlapping_pairs,
    same_closed_contour,
    wrong_direction_findings,
)
from outlinebench.diagnostics.finding_sequence import FindingSequence
from outlinebench.diagnostics.findings import ERROR, INFO, WARNING, Finding
from outlinebench.diagnostics.messages import CURVATURE_JUMP_USER, duplicate_message
from outlinebench.diagnostics.segment_checks import (
    Limits,
    SegmentTable,
    segment_findings,
    segment_table,
)
from outlinebench.diagnostics.settings import CheckSettings
from outlinebench.geometry import evaluate, segment_area_terms
from outlinebench.model.document import Contour, Document

__all__ = ["check_document", "self_crossings", "Checker", "FindingSequence"]

# Above this many changed segments, candidate pairs come from a sort-and-sweep over all
# segments of the changed outlines rather than from comparing each changed segment's box with
# every other one (which costs changed × all).
_SWEEP_THRESHOLD = 256


# Marks "every segment of the contour changed" in the map of changed rows.
_ALL = np.zeros(0, dtype=np.intp)


@dataclass(eq=False, slots=True)
class _ContourState:
    contour: Contour
    outline: int  # outline number used in findings
    global_index: int
    base: SegmentTable  # the contour's rows are base[start : start + count]
    start: int
    count: int
    seg_findings: dict[int, list[Finding]]
    join_findings: dict[int, Finding]
    findings: list[Finding]
    _table: SegmentTable | None = None

    @property
    def table(self) -> SegmentTable:
        if self._table is None:
            if self.start == 0 and len(self.base) == self.count:
                self._table = self.base
            else:
                self._table = self.base.take(slice(self.start, self.start + self.count))
        return self._table

    def assemble(self) -> None:
        if not self.seg_findings:
            jf = self.join_findings
            self.findings = [jf[k] for k in sorted(jf)] if jf else []
            return
        items: list[Finding] = []
        for fs in self.seg_findings.values():
            items.extend(fs)
        items.extend(self.join_findings.values())
        items.sort(key=lambda f: (f.segment, f.t if f.t is not None else -1.0))
        self.findings = items


@dataclass(eq=False, slots=True)
class _OutlineState:
    hits: list[tuple[int, int, Finding]]  # (id of segment a, id of segment b, finding)
    direction: list[Finding]
    block: list[Finding] | None  # contour findings, then hits and direction (None: not built)


@dataclass(eq=False, slots=True)
class _Dirty:
    """A contour of a changed outline that is a new object."""

    outline: int  # outline index in the document
    global_index: int
    contour: Contour
    old: _ContourState | None  # the state of the contour it replaces (None: full check)
    reuse: dict[int, int]  # segment index → index in the old contour, for shared segments
    new_ix: list[int] | None  # the segments that are new objects (None: all of them)


@dataclass(eq=False, slots=True)
class _JoinRows:
    """Joins to classify: rows of the incoming and outgoing segments in one table, the
    intent code, the changed contour each belongs to and its join number there."""

    rows_in: NDArray[np.intp]
    rows_out: NDArray[np.intp]
    intent: NDArray[np.int8]
    owner: NDArray[np.intp]
    join: NDArray[np.intp]


def _join_rows(parts: Sequence[tuple[int, Contour, NDArray[np.intp] | None]]) -> _JoinRows:
    """The one builder of join rows: per changed contour (its first row in the table, the
    contour, the joins to compute or None for all of them).

    Join j of a contour of n segments joins segment j to segment (j + 1) mod n (a closed
    contour has n joins, an open one n − 1; :class:`~outlinebench.model.document.Contour`).
    """
    first = np.array([p[0] for p in parts], dtype=np.intp)
    n_seg = np.array([len(p[1].segments) for p in parts], dtype=np.intp)
    if all(p[2] is None for p in parts):
        counts = np.array([len(p[1].joins) for p in parts], dtype=np.intp)
        total = int(counts.sum())
        join = np.arange(total) - np.repeat(np.cumsum(counts) - counts, counts)
        code = INTENT_CODE
        intent = np.fromiter(
            (code[x] for p in parts for x in p[1].joins), dtype=np.int8, count=total
        )
    else:
        chosen = [np.arange(len(p[1].joins)) if p[2] is None else p[2] for p in parts]
        counts = np.array([c.size for c in chosen], dtype=np.intp)
        join = np.concatenate(chosen).astype(np.intp) if chosen else np.zeros(0, np.intp)
        code = INTENT_CODE
        intent = np.fromiter(
            (code[p[1].joins[j]] for p, c in zip(parts, chosen, strict=True) for j in c.tolist()),
            dtype=np.int8,
            count=int(counts.sum()),
        )
    owner = np.repeat(np.arange(len(parts)), counts)
    base = np.repeat(first, counts)
    rows_in = base + join
    rows_out = base + (join + 1) % np.maximum(np.repeat(n_seg, counts), 1)
    return _JoinRows(rows_in, rows_out, intent, owner, join)


def check_document(doc: Document, settings: CheckSettings | None = None) -> list[Finding]:
    """Every finding of a document.

    Parameters
    ----------
    doc : Document
    settings : CheckSettings, optional
        Defaults to ``CheckSettings()``.

    Returns
    -------
    list of Finding
        Grouped by outline in document order (contour findings, then crossings and winding);
        gaps and open contours last.

    Examples
    --------
    >>> check_document(Document())
    []
    """
    return list(Checker(settings).update(doc))


@dataclass(frozen=True, slots=True)
class _Place:
    contour: Contour
    outline: int
    global_index: int


def self_crossings(doc: Document, settings: CheckSettings | None = None) -> list[Finding]:
    """The ``self-intersection`` findings of contours crossing themselves, and nothing else.

    Parameters
    ----------
    doc : Document
    settings : CheckSettings, optional

    Returns
    -------
    list of Finding
        Exactly the findings of :func:`check_document` whose kind is ``self-intersection``
        and whose ``other_contour`` is their own contour (a loop inside one segment, or two
        segments of one contour crossing or touching), in document order of contours.

    Notes
    -----
    Runs only what those findings need: the segment table, the loop test of each segment
    (:func:`~outlinebench.diagnostics.segment_checks.segment_findings` with
    ``loops_only``), the open ends (ends that meet are joins, not crossings) and the crossing
    search (:func:`~outlinebench.diagnostics.contour_checks.overlapping_pairs`, then the
    narrow phase) with pairs restricted to one contour.

    Examples
    --------
    >>> self_crossings(Document())
    []
    """
    settings = settings or CheckSettings()
    limits = Limits.from_settings(settings, doc.mm_per_unit)
    refs = list(doc.contour_refs())
    places = [
        _Place(
            r.contour,
            doc.outlines[r.outline].source_index
            if doc.outlines[r.outline].source_index >= 0
            else r.outline,
            r.global_index,
        )
        for r in refs
    ]
    counts = np.fromiter(
        (len(p.contour.segments) for p in places), dtype=np.intp, count=len(places)
    )
    segments = [s for p in places for s in p.contour.segments]
    if not segments:
        return []
    table = segment_table(segments, limits.gap)
    contour_of = np.repeat(np.arange(len(places)), counts)
    cstart = (np.cumsum(counts) - counts).astype(np.intp)
    seg_ix = np.arange(len(segments)) - cstart[contour_of]
    gi = np.array([p.global_index for p in places], dtype=np.intp)
    outl = np.array([p.outline for p in places], dtype=np.intp)
    per_contour: dict[int, list[Finding]] = {}
    for _, f in segment_findings(
        table, segments, limits, outl[contour_of], gi[contour_of], seg_ix, loops_only=True
    ):
        per_contour.setdefault(f.contour, []).append(f)
    # ends of open contours that meet (their own other end included) are joins
    ends: list[OpenEnd] = []
    for c, p in enumerate(places):
        if p.contour.closed or not counts[c]:
            continue
        r0, r1 = int(cstart[c]), int(cstart[c] + counts[c] - 1)
        ends.append(
            OpenEnd(
                p.outline, p.global_index, 0, 0, tuple(table.cubics[r0, 0].tolist()),
                tuple(table.d0[r0].tolist()), float(table.k0[r0]),
            )
        )  # fmt: skip
        ends.append(
            OpenEnd(
                p.outline, p.global_index, r1 - r0, 1, tuple(table.cubics[r1, 3].tolist()),
                tuple(table.d1[r1].tolist()), float(table.k1[r1]),
            )
        )  # fmt: skip
    joined_ends: dict[tuple[int, int], list[tuple[int, int, int, int]]] = {}
    for a, b in open_end_findings(ends, limits)[1]:
        if a.contour == b.contour:
            joined_ends.setdefault((a.contour, b.contour), []).append(
                (a.segment, a.end, b.segment, b.end)
            )
            joined_ends.setdefault((b.contour, a.contour), []).append(
                (b.segment, b.end, a.segment, a.end)
            )
    i, j = overlapping_pairs(
        table.box, contour_of, limits.gap, keep=lines_apart(table.cubics, table.degree, limits.gap)
    )
    for _, (_, _, f) in _crossing_hits(
        places, contour_of, seg_ix, counts, contour_of, table, i, j, joined_ends, limits
    ):
        per_contour.setdefault(f.contour, []).append(f)
    return [f for g in sorted(per_contour) for f in per_contour[g]]


def _join_findings_batch(
    verdict: NDArray[np.int8],
    angle: NDArray[np.float64],
    jump: NDArray[np.float64],
    k_in: NDArray[np.float64],
    k_out: NDArray[np.float64],
    intent: NDArray[np.int8],
    points: NDArray[np.float64],
    outline: NDArray[np.intp],
    contour: NDArray[np.intp],
    join: NDArray[np.intp],
    limits: Limits,
) -> list[Finding]:
    """Findings for flagged joins, built in one loop over plain Python values (fast path of
    :func:`~outlinebench.diagnostics.contour_checks.join_finding`, same wording)."""
    out: list[Finding] = []
    straight = limits.straight
    ka = np.where(np.abs(k_in) < straight, 0.0, k_in) + 0.0
    kb = np.where(np.abs(k_out) < straight, 0.0, k_out) + 0.0
    rows = zip(
        verdict.tolist(), angle.tolist(), jump.tolist(), ka.tolist(), kb.tolist(),
        intent.tolist(), points[:, 0].tolist(), points[:, 1].tolist(), outline.tolist(),
        contour.tolist(), join.tolist(), strict=True,
    )  # fmt: skip
    corner_lim, kink_lim, jump_lim = limits.corner_angle, limits.kink_angle, limits.curvature_jump
    jump_text = CURVATURE_JUMP_USER.format  # same sentence as curvature_jump_message
    for v, a, jmp, k1, k2, it, x, y, o, c, j in rows:
        smooth = it == 1
        if v == JOIN_CORNER:
            if smooth:
                out.append(
                    Finding(
                        "corner", ERROR, o, c, j, 1.0, x, y, a, "degrees",
                        f"corner: the tangent turns {a:.2f}° although the file marks it smooth",
                        j, corner_lim,
                    )
                )  # fmt: skip
            else:
                out.append(
                    Finding(
                        "corner", INFO, o, c, j, 1.0, x, y, a, "degrees",
                        f"corner: the tangent turns {a:.2f}°", j, corner_lim,
                    )
                )  # fmt: skip
        elif v == JOIN_KINK:
            out.append(
                Finding(
                    "kink", ERROR if smooth else WARNING, o, c, j, 1.0, x, y, a, "degrees",
                    f"kink: the tangent turns {a:.2f}° (G1 break; smooth below "
                    f"{kink_lim:g}°, corner from {corner_lim:g}°)",
                    j, kink_lim,
                )
            )  # fmt: skip
        elif v == JOIN_CURVATURE_JUMP:
            sev = limits.straight_severity if (k1 == 0.0) != (k2 == 0.0) else limits.jump_severity
            out.append(
                Finding(
                    "curvature-jump", sev, o, c, j, 1.0, x, y, jmp, "relative",
                    jump_text(k1, k2, jmp),
                    j, jump_lim, k1, k2,
                )
            )  # fmt: skip
    return out


class Checker:
    """Incremental checks: ``update(doc)`` after each edit returns the findings of ``doc``.

    Parameters
    ----------
    settings : CheckSettings, optional

    Attributes
    ----------
    findings : FindingSequence
        The result of the last update (a read-only list of Finding).
    last_segments_computed, last_joins_computed : int
        How many segments and joins the last update examined (the rest was reused).

    Notes
    -----
    The result of ``update`` holds the same findings as ``check_document(doc, settings)``;
    within an outline their order may differ.
    """

    def __init__(self, settings: CheckSettings | None = None) -> None:
        self.settings = settings or CheckSettings()
        self._doc: Document | None = None
        self._limits: Limits | None = None
        self._contours: list[_ContourState] = []
        self._outlines: list[_OutlineState] = []
        self._first: list[int] = []  # global index of each outline's first contour
        self._result = FindingSequence.from_list([])  # outline blocks, then the gaps block
        self._gap_findings: list[Finding] = []
        self._joined: list[tuple[OpenEnd, OpenEnd]] = []
        self.findings: FindingSequence = self._result
        self.last_segments_computed = 0
        self.last_joins_computed = 0

    # ------------------------------------------------------------------------------------
    def _changed_outlines(self, doc: Document, touched: Iterable[int] | None) -> list[int] | None:
        """Outlines that are not the same objects as last time; None when the structure
        changed (then everything is checked again). ``touched`` limits the search."""
        old = self._doc
        if old is None or doc.mm_per_unit != old.mm_per_unit:
            return None
        if len(doc.outlines) != len(old.outlines):
            return None
        if touched is not None:
            new_o, old_o = doc.outlines, old.outlines
            changed = sorted({i for i in touched if new_o[i] is not old_o[i]})
        else:
            # C-level loop: which outlines are other objects than last time
            flags = map(is_not, doc.outlines, old.outlines)
            changed = list(compress(range(len(doc.outlines)), flags))
        for i in changed:
            a, b = doc.outlines[i], old.outlines[i]
            if len(a.contours) != len(b.contours) or a.source_index != b.source_index:
                return None
        return changed

    def update(self, doc: Document, touched: Iterable[int] | None = None) -> FindingSequence:
        """Check ``doc``, reusing results for everything it shares with the document of the
        previous update.

        Parameters
        ----------
        doc : Document
        touched : iterable of int, optional
            Indices of the outlines the edit may have replaced since the previous update, when
            the caller knows them (an editor command does). Every other outline must be the
            same object as in the previous document; this is trusted, not checked. Without it
            every outline is compared by identity (a C-level pass, about 0.2 ms per 8,000
            outlines).

        Returns
        -------
        FindingSequence
            The findings (also kept in ``.findings``), a read-only list that later updates
            never change.

        Notes
        -----
        The steps, each a method: :meth:`_changed_contours` (what is new),
        :meth:`_check_segments` (every new segment at once), :meth:`_contour_states` (each
        changed contour's table and reused findings, and the joins to compute, gathered by
        one builder, :func:`_join_rows`), :meth:`_check_joins`, :meth:`_check_open_ends`,
        :meth:`_outline_checks` (crossings and winding) and :meth:`_assemble`.
        """
        changed_outlines = self._changed_outlines(doc, touched)
        full = changed_outlines is None
        if full:
            changed_outlines = self._start_full(doc)
        limits = self._limits
        assert limits is not None and changed_outlines is not None
        outs = doc.outlines
        number = {
            i: outs[i].source_index if outs[i].source_index >= 0 else i for i in changed_outlines
        }
        dirty = self._changed_contours(doc, changed_outlines, full)
        fresh, seg_by = self._check_segments(dirty, number, limits)
        new_states, changed_rows, allt, joins = self._contour_states(dirty, fresh, seg_by, number)
        self._check_joins(new_states, allt, joins, limits)
        gaps_changed, joined_ends = self._check_open_ends(dirty, full, limits)
        dirty_outlines = sorted({d.outline for d in dirty})
        if dirty_outlines:
            self._outline_checks(
                doc, dirty_outlines, number, changed_rows, joined_ends, limits, full,
                fresh if full else None,
            )  # fmt: skip
        # an outline without contours (``d=""``, a lone moveto, a zero-size shape) has no
        # crossings and no winding, but still has its (empty) state
        for oi in changed_outlines:
            if self._outlines[oi] is None:
                self._outlines[oi] = _OutlineState([], [], None)
        self._assemble(doc, full, dirty_outlines, gaps_changed)
        self._doc = doc
        self.findings = self._result
        return self.findings

    # -- the steps of update --------------------------------------------------------------
    def _start_full(self, doc: Document) -> list[int]:
        """Forget everything: a full check of every outline follows."""
        self._limits = Limits.from_settings(self.settings, doc.mm_per_unit)
        self._contours = [None] * sum(len(o.contours) for o in doc.outlines)  # type: ignore[list-item]
        self._outlines = [None] * len(doc.outlines)  # type: ignore[list-item]
        first, k = [], 0
        for o in doc.outlines:
            first.append(k)
            k += len(o.contours)
        self._first = first
        return list(range(len(doc.outlines)))

    def _changed_contours(
        self, doc: Document, changed_outlines: list[int], full: bool
    ) -> list[_Dirty]:
        """The contours of the changed outlines that are new objects, with the segments they
        share with the contour they replace (``reuse``: new index → old index)."""
        states = self._contours
        dirty: list[_Dirty] = []
        for oi in changed_outlines:
            gi = self._first[oi]
            for contour in doc.outlines[oi].contours:
                old = None if full else states[gi]
                if old is not None and old.contour is contour:
                    gi += 1
                    continue
                reuse: dict[int, int] = {}
                if old is not None:
                    old_ix = {id(s): k for k, s in enumerate(old.contour.segments)}
                    for k, s in enumerate(contour.segments):
                        j = old_ix.get(id(s))
                        if j is not None:
                            reuse[k] = j
                n = len(contour.segments)
                new_ix = [k for k in range(n) if k not in reuse] if reuse else None
                dirty.append(_Dirty(oi, gi, contour, old, reuse, new_ix))
                gi += 1
        return dirty

    def _check_segments(
        self, dirty: list[_Dirty], number: dict[int, int], limits: Limits
    ) -> tuple[SegmentTable, dict[int, dict[int, list[Finding]]]]:
        """The table and the single-segment findings of every new segment, in one batch:
        contour → segment → findings."""
        fresh_segments: list[np.ndarray] = []
        lab_outline: list[int] = []
        lab_contour: list[int] = []
        lab_segment: list[int] = []
        for d in dirty:
            segs = d.contour.segments
            if d.new_ix is None:
                fresh_segments.extend(segs)
                lab_segment.extend(range(len(segs)))
                cnt = len(segs)
            else:
                fresh_segments.extend(segs[k] for k in d.new_ix)
                lab_segment.extend(d.new_ix)
                cnt = len(d.new_ix)
            lab_outline.extend([number[d.outline]] * cnt)
            lab_contour.extend([d.global_index] * cnt)
        fresh = segment_table(fresh_segments, limits.gap)
        seg_by: dict[int, dict[int, list[Finding]]] = {}
        for _, f in segment_findings(
            fresh,
            fresh_segments,
            limits,
            np.array(lab_outline, dtype=np.intp),
            np.array(lab_contour, dtype=np.intp),
            np.array(lab_segment, dtype=np.intp),
        ):
            seg_by.setdefault(f.contour, {}).setdefault(f.segment, []).append(f)
        self.last_segments_computed = len(fresh_segments)
        return fresh, seg_by

    def _contour_states(
        self,
        dirty: list[_Dirty],
        fresh: SegmentTable,
        seg_by: dict[int, dict[int, list[Finding]]],
        number: dict[int, int],
    ) -> tuple[list[_ContourState], dict[int, NDArray[np.intp]], SegmentTable, _JoinRows]:
        """Each changed contour's state (table, segment findings, join findings still valid),
        the rows that changed, one table holding every changed contour, and the joins to
        compute (rows into that table)."""
        states = self._contours
        new_states: list[_ContourState] = []
        changed_rows: dict[int, NDArray[np.intp]] = {}
        all_new = all(not d.reuse for d in dirty)
        tables: list[SegmentTable] = []
        parts: list[tuple[int, Contour, NDArray[np.intp] | None]] = []
        start = 0  # where the contour's new segments start in `fresh`
        offset = 0  # where the contour starts in the joint table
        for d in dirty:
            contour, gi, n = d.contour, d.global_index, len(d.contour.segments)
            if not d.reuse:
                st = _ContourState(
                    contour, number[d.outline], gi, fresh, start, n,
                    seg_by.get(gi, {}) if all_new else dict(seg_by.get(gi, {})), {}, [],
                )  # fmt: skip
                changed_rows[gi] = _ALL
                todo = None
                start += n
            else:
                st, changed, todo = self._partly_new(d, fresh, start, seg_by, number)
                changed_rows[gi] = changed
                start += len(changed)
            parts.append((start - n if all_new else offset, contour, todo))
            if not all_new:
                tables.append(st.table)
            offset += n
            new_states.append(st)
            states[gi] = st
        allt = fresh if all_new else (SegmentTable.concat(tables) if tables else fresh)
        return new_states, changed_rows, allt, _join_rows(parts)

    def _partly_new(
        self,
        d: _Dirty,
        fresh: SegmentTable,
        start: int,
        seg_by: dict[int, dict[int, list[Finding]]],
        number: dict[int, int],
    ) -> tuple[_ContourState, NDArray[np.intp], NDArray[np.intp]]:
        """State of a contour that keeps some segments of the one it replaces: its table
        from the old rows and the new ones, the old findings renumbered, and the joins to
        compute again."""
        old, reuse, contour = d.old, d.reuse, d.contour
        assert old is not None and d.new_ix is not None
        n = len(contour.segments)
        changed = np.array(d.new_ix, dtype=np.intp)
        src = np.empty(n, dtype=np.intp)
        for k, j in reuse.items():
            src[k] = j
        src[changed] = len(old.table) + np.arange(changed.size)
        table = SegmentTable.concat([old.table, fresh.take(slice(start, start + changed.size))])
        seg_f = dict(seg_by.get(d.global_index, {}))
        for k, j in reuse.items():
            fs = old.seg_findings.get(j)
            if fs:
                seg_f[k] = fs if j == k else [f._replace(segment=k) for f in fs]
        join_f, todo = self._reuse_joins(contour, old, reuse, changed)
        st = _ContourState(
            contour, number[d.outline], d.global_index, table.take(src), 0, n, seg_f, join_f, []
        )
        return st, changed, todo

    def _check_joins(
        self, new_states: list[_ContourState], allt: SegmentTable, rows: _JoinRows, limits: Limits
    ) -> None:
        """Classify the joins to compute, all at once, and give each changed contour its
        findings in order."""
        rin, rout = rows.rows_in, rows.rows_out
        self.last_joins_computed = int(rin.size)
        if rin.size:
            verdict, angle, jump = classify_joins(
                allt.d1[rin], allt.d0[rout], allt.k1[rin], allt.k0[rout], rows.intent,
                kink_angle=limits.kink_angle, corner_angle=limits.corner_angle,
                curvature_jump=limits.curvature_jump, straight=limits.straight,
            )  # fmt: skip
            q = np.flatnonzero(verdict)
            if q.size:
                owner = rows.owner[q]
                jx = rows.join[q]
                lab_o = np.array([st.outline for st in new_states], dtype=np.intp)[owner]
                lab_c = np.array([st.global_index for st in new_states], dtype=np.intp)[owner]
                found = _join_findings_batch(
                    verdict[q], angle[q], jump[q], allt.k1[rin[q]], allt.k0[rout[q]],
                    rows.intent[q], allt.cubics[rin[q], 3], lab_o, lab_c, jx, limits,
                )  # fmt: skip
                for d, j, f in zip(owner.tolist(), jx.tolist(), found, strict=True):
                    new_states[d].join_findings[j] = f
        for st in new_states:
            st.assemble()

    def _check_open_ends(
        self, dirty: list[_Dirty], full: bool, limits: Limits
    ) -> tuple[bool, dict[tuple[int, int], list[tuple[int, int, int, int]]]]:
        """Gaps and open contours (whole document; only when an open contour changed, since
        closed ones have no ends), and the ends that meet: (contour, contour) → their
        (segment, end, segment, end)."""
        gaps_changed = full or any(
            not d.contour.closed or (d.old is not None and not d.old.contour.closed) for d in dirty
        )
        if gaps_changed:
            self._open_ends(self._contours, limits)
        joined_ends: dict[tuple[int, int], list[tuple[int, int, int, int]]] = {}
        for a, b in self._joined:
            joined_ends.setdefault((a.contour, b.contour), []).append(
                (a.segment, a.end, b.segment, b.end)
            )
            joined_ends.setdefault((b.contour, a.contour), []).append(
                (b.segment, b.end, a.segment, a.end)
            )
        return gaps_changed, joined_ends

    def _assemble(
        self, doc: Document, full: bool, dirty_outlines: list[int], gaps_changed: bool
    ) -> None:
        """One list of every outline's block, then the gaps block; after an edit a new
        FindingSequence shares that list and replaces the changed blocks (sequences returned
        earlier are never changed afterwards)."""
        states = self._contours
        n_out = len(doc.outlines)
        if full:
            flat: list[Finding] = []
            lens = np.zeros(n_out + 1, dtype=np.intp)
            per_contour = np.fromiter(
                (len(st.findings) for st in states), dtype=np.intp, count=len(states)
            )
            owner = np.repeat(np.arange(n_out), [len(o.contours) for o in doc.outlines])
            lens[:n_out] = np.bincount(owner, weights=per_contour, minlength=n_out)
            extra = [oi for oi, o in enumerate(self._outlines) if o.hits or o.direction]
            if not extra:
                flat.extend(chain.from_iterable(st.findings for st in states))
            else:
                for oi, o in enumerate(self._outlines):
                    lo = self._first[oi]
                    for st in states[lo : lo + len(doc.outlines[oi].contours)]:
                        flat.extend(st.findings)
                    flat.extend(f for _, _, f in o.hits)
                    flat.extend(o.direction)
                    lens[oi] += len(o.hits) + len(o.direction)
            flat.extend(self._gap_findings)
            lens[n_out] = len(self._gap_findings)
            starts = np.zeros(n_out + 2, dtype=np.intp)
            np.cumsum(lens, out=starts[1:])
            self._result = FindingSequence(flat, starts)
        elif dirty_outlines or gaps_changed:
            blocks = {}
            for oi in dirty_outlines:
                o = self._outlines[oi]
                o.block = self._block(oi, o.hits, o.direction, len(doc.outlines[oi].contours))
                blocks[oi] = o.block
            if gaps_changed:
                blocks[n_out] = self._gap_findings
            self._result = self._result.replace_blocks(blocks)

    # ------------------------------------------------------------------------------------
    @staticmethod
    def _reuse_joins(
        contour: Contour, old: _ContourState, reuse: dict[int, int], changed: NDArray[np.intp]
    ) -> tuple[dict[int, Finding], NDArray[np.intp]]:
        """Old join findings still valid (both segments and the intent unchanged) and the
        joins that must be computed again."""
        n = len(contour.segments)
        is_new = np.zeros(n, dtype=bool)
        is_new[changed] = True
        old_n = len(old.contour.segments)
        old_joins = old.contour.joins
        join_f: dict[int, Finding] = {}
        todo: list[int] = []
        for jx in range(len(contour.joins)):
            a, b = jx, (jx + 1) % n
            if is_new[a] or is_new[b]:
                todo.append(jx)
                continue
            ja, jb = reuse[a], reuse[b]
            if jb != (ja + 1) % old_n or ja >= len(old_joins) or old_joins[ja] != contour.joins[jx]:
                todo.append(jx)
                continue
            f = old.join_findings.get(ja)
            if f is not None:
                join_f[jx] = f if ja == jx else f._replace(segment=jx, join=jx)
        return join_f, np.array(todo, dtype=np.intp)

    def _open_ends(self, states: list[_ContourState], limits: Limits) -> None:
        ends: list[OpenEnd] = []
        for st in states:
            c = st.contour
            if c.closed or not c.segments:
                continue
            t = st.table
            last = len(c.segments) - 1
            ends.append(
                OpenEnd(
                    st.outline, st.global_index, 0, 0, tuple(t.cubics[0, 0].tolist()),
                    tuple(t.d0[0].tolist()), float(t.k0[0]),
                )
            )  # fmt: skip
            ends.append(
                OpenEnd(
                    st.outline, st.global_index, last, 1, tuple(t.cubics[last, 3].tolist()),
                    tuple(t.d1[last].tolist()), float(t.k1[last]),
                )
            )  # fmt: skip
        self._gap_findings, self._joined = open_end_findings(ends, limits)

    def _outline_checks(  # noqa: C901 (older than the complexity gate; split when next changed)
        self,
        doc: Document,
        dirty_outlines: list[int],
        number: dict[int, int],
        changed_rows: dict[int, NDArray[np.intp]],
        joined_ends: dict[tuple[int, int], list[tuple[int, int, int, int]]],
        limits: Limits,
        full: bool,
        whole: SegmentTable | None,
    ) -> None:
        """Crossings between segments and winding of holes, for the given outlines at once.

        ``whole`` is the table of all their segments in order, when the caller has it."""
        cs: list[_ContourState] = []
        c_group: list[int] = []
        for oi in dirty_outlines:
            lo = self._first[oi]
            for st in self._contours[lo : lo + len(doc.outlines[oi].contours)]:
                cs.append(st)
                c_group.append(oi)
        counts = np.array([len(st.contour.segments) for st in cs], dtype=np.intp)
        if not cs or counts.sum() == 0:
            for oi in dirty_outlines:
                self._outlines[oi] = _OutlineState([], [], None)
            return
        table = whole if whole is not None else SegmentTable.concat([st.table for st in cs])
        m = len(table)
        cstart = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.intp)
        contour_of = np.repeat(np.arange(len(cs)), counts)
        seg_ix = np.arange(m) - cstart[contour_of]
        group = np.array(c_group, dtype=np.intp)[contour_of]
        changed = np.zeros(m, dtype=bool)
        for ci, st in enumerate(cs):
            rows = changed_rows.get(st.global_index)
            if rows is _ALL:
                changed[cstart[ci] : cstart[ci] + counts[ci]] = True
            elif rows is not None:
                changed[cstart[ci] + rows] = True

        # -- crossings ------------------------------------------------------------------
        kept: dict[int, list[tuple[int, int, Finding]]] = {oi: [] for oi in dirty_outlines}
        if not full:
            for oi in dirty_outlines:
                old_o = self._outlines[oi]
                if old_o is None:
                    continue
                gone: set[int] = set()
                index_of: dict[int, int] = {}
                for ci, st in enumerate(cs):
                    if c_group[ci] != oi or st.global_index not in changed_rows:
                        continue
                    now = {id(s): k for k, s in enumerate(st.contour.segments)}
                    index_of.update(now)
                    rows = changed_rows[st.global_index]
                    segs = st.contour.segments
                    gone.update(id(segs[r]) for r in (range(len(segs)) if rows is _ALL else rows))
                for ia, ib, f in old_o.hits:
                    if ia in gone or ib in gone:
                        continue
                    if f.contour in changed_rows or f.other_contour in changed_rows:
                        if ia not in index_of and f.contour in changed_rows:
                            continue  # that segment was removed
                        if ib not in index_of and f.other_contour in changed_rows:
                            continue
                        sa = index_of.get(ia, f.segment)
                        sb = index_of.get(ib, f.other_segment)
                        if sa != f.segment or sb != f.other_segment:
                            f = f._replace(segment=sa, other_segment=sb)
                    kept[oi].append((ia, ib, f))

        if changed.all() or changed.sum() > _SWEEP_THRESHOLD:
            i, j = overlapping_pairs(
                table.box, group, limits.gap,
                keep=lines_apart(table.cubics, table.degree, limits.gap),
            )  # fmt: skip
            sel = changed[i] | changed[j]
            i, j = i[sel], j[sel]
        else:
            rows = np.flatnonzero(changed)
            b = table.box[rows]
            box, pad = table.box, limits.gap
            ov = (b[:, None, 0] - pad <= box[None, :, 2]) & (box[None, :, 0] - pad <= b[:, None, 2])
            ov &= (b[:, None, 1] - pad <= box[None, :, 3]) & (
                box[None, :, 1] - pad <= b[:, None, 3]
            )
            ov &= group[rows][:, None] == group[None, :]
            ri, cj = np.nonzero(ov)
            i, j = rows[ri], cj
            sel = (i != j) & ~(changed[j] & (j < i))
            i, j = np.minimum(i[sel], j[sel]), np.maximum(i[sel], j[sel])
        for grp, hit in _crossing_hits(
            cs, contour_of, seg_ix, counts, group, table, i, j, joined_ends, limits
        ):
            kept[grp].append(hit)

        # -- winding of holes -----------------------------------------------------------
        closed = np.array([st.contour.closed and len(st.contour.segments) > 0 for st in cs])
        direction: dict[int, list[Finding]] = {oi: [] for oi in dirty_outlines}
        cl = np.flatnonzero(closed)
        if cl.size > 1:
            cn = counts[cl]
            rows = (
                np.repeat(cstart[cl], cn)
                + np.arange(int(cn.sum()))
                - np.repeat(np.cumsum(cn) - cn, cn)
            )
            samples = limits.samples
            poly = evaluate(table.cubics[rows], np.arange(samples) / samples).reshape(-1, 2)
            plen = counts[cl] * samples
            pstart = np.concatenate([[0], np.cumsum(plen)[:-1]]).astype(np.intp)
            probes = evaluate(table.cubics[cstart[cl]], 0.5)
            seg_start = np.concatenate([[0], np.cumsum(counts[cl])[:-1]]).astype(np.intp)
            areas = np.add.reduceat(segment_area_terms(table.cubics[rows]), seg_start)
            bmin = np.minimum.reduceat(table.box[rows, :2], seg_start)
            bmax = np.maximum.reduceat(table.box[rows, 2:], seg_start)
            cgroup = np.array(c_group, dtype=np.intp)[cl]
            boxes = np.concatenate([bmin, bmax], axis=1)
            inner, outer = containment_pairs(probes, poly, pstart, plen, boxes, cgroup)
            gi_cl = np.array([cs[c].global_index for c in cl], dtype=np.intp)
            # containment is proven only where the two contours do not cross, and duplicates
            # are neither holes nor crossings: they get their own finding
            crossing = {
                (min(f.contour, f.other_contour), max(f.contour, f.other_contour))
                for oi in dirty_outlines
                for _, _, f in kept[oi]
                if f.other_contour is not None and f.other_contour != f.contour
            }
            dups = duplicate_pairs(poly, pstart, plen, boxes, areas, cgroup, limits.gap_search)
            dup_keys = {(int(gi_cl[a]), int(gi_cl[b])) for a, b, _ in dups}
            if dups:
                outline_of_gi = {st.global_index: c_group[ci] for ci, st in enumerate(cs)}
                for a, b, dist in dups:
                    ga, gb = int(gi_cl[a]), int(gi_cl[b])
                    if same_closed_contour(cs[cl[a]].contour.segments, cs[cl[b]].contour.segments):
                        dist = 0.0
                    direction[outline_of_gi[gb]].append(
                        Finding(
                            "duplicate-contour", ERROR, cs[cl[b]].outline, gb, None, None,
                            float(probes[b, 0]), float(probes[b, 1]), dist, "user",
                            duplicate_message(dist, ga), limit=limits.gap_search,
                            other_contour=ga,
                        )
                    )  # fmt: skip
                for oi in dirty_outlines:
                    kept[oi] = [
                        h
                        for h in kept[oi]
                        if h[2].other_contour is None
                        or (
                            min(h[2].contour, h[2].other_contour),
                            max(h[2].contour, h[2].other_contour),
                        )
                        not in dup_keys
                    ]
            if inner.size and (crossing or dup_keys):
                keep = np.array(
                    [
                        (min(x, y), max(x, y)) not in crossing
                        and (min(x, y), max(x, y)) not in dup_keys
                        for x, y in zip(gi_cl[inner].tolist(), gi_cl[outer].tolist(), strict=True)
                    ],
                    dtype=bool,
                )
                inner, outer = inner[keep], outer[keep]
            found = wrong_direction_findings(
                inner, outer, areas, probes,
                np.array([cs[c].outline for c in cl]), np.array([cs[c].global_index for c in cl]),
            )  # fmt: skip
            if found:
                outline_of = {st.global_index: c_group[ci] for ci, st in enumerate(cs)}
                for f in found:
                    direction[outline_of[f.contour]].append(f)

        for oi in dirty_outlines:
            hits = kept[oi]
            self._outlines[oi] = _OutlineState(hits, direction[oi], None)

    def _block(
        self, oi: int, hits: list[tuple[int, int, Finding]], direction: list[Finding], n: int
    ) -> list[Finding]:
        lo = self._first[oi]
        block: list[Finding] = []
        for st in self._contours[lo : lo + n]:
            block.extend(st.findings)
        block.extend(f for _, _, f in hits)
        block.extend(direction)
        return block


def _crossing_hits(
    cs: Sequence[Any],
    contour_of: NDArray[np.intp],
    seg_ix: NDArray[np.intp],
    counts: NDArray[np.intp],
    group: NDArray[np.intp],
    table: SegmentTable,
    i: NDArray[np.intp],
    j: NDArray[np.intp],
    joined_ends: dict[tuple[int, int], list[tuple[int, int, int, int]]],
    limits: Limits,
) -> list[tuple[int, tuple[int, int, Finding]]]:
    """Crossings between the candidate segment pairs (rows i, j of ``table``).

    ``cs[c]`` has ``contour``, ``outline`` and ``global_index`` of the contour of rows
    ``contour_of == c``; ``seg_ix`` is each row's index in its contour, ``group`` its group
    (outline). Tiny segments are left out, straight pairs screened by orientation tests and
    curved ones by subdivision (:func:`narrow_pairs`) before the survivors are intersected.
    Returns (group, (id of segment a, id of segment b, finding)) per crossing.
    """
    out: list[tuple[int, tuple[int, int, Finding]]] = []
    if i.size:
        # a segment within the gap tolerance in both directions is reported as tiny; it
        # touches its neighbours everywhere, so it takes no part in crossings
        size = np.maximum(table.box[:, 2] - table.box[:, 0], table.box[:, 3] - table.box[:, 1])
        big = size > limits.gap
        sel = big[i] & big[j]
        i, j = i[sel], j[sel]
    if i.size:
        n_of = counts[contour_of]
        closed_of = np.array([st.contour.closed for st in cs])[contour_of]
        same = contour_of[i] == contour_of[j]
        nxt = same & (
            (seg_ix[i] + 1 == seg_ix[j])
            | (closed_of[i] & (seg_ix[i] == n_of[i] - 1) & (seg_ix[j] == 0))
        )
        prv = same & closed_of[i] & (seg_ix[i] == 0) & (seg_ix[j] == n_of[j] - 1)
        joined = np.where(nxt, 1, np.where(prv, 2, 0)).astype(np.int8)
        joined[same & (n_of[i] == 2) & (nxt | prv)] = 3
        if joined_ends:
            gi_of = np.array([st.global_index for st in cs])[contour_of]
            for q in np.flatnonzero(joined == 0).tolist():
                if (int(gi_of[i[q]]), int(gi_of[j[q]])) in joined_ends:
                    joined[q] = 3
        survive = np.ones(i.size, dtype=bool)
        lines = (table.degree[i] == 1) & (table.degree[j] == 1) & (joined != 3)
        if lines.any():
            survive[lines] = lines_may_meet(
                table.cubics[i[lines]], table.cubics[j[lines]], joined[lines]
            )
        curves = np.flatnonzero(~lines)
        if curves.size:
            survive[curves] = narrow_pairs(
                table.cubics[i[curves]], table.cubics[j[curves]], joined[curves], limits.gap
            )
        for q in np.flatnonzero(survive).tolist():
            ra, rb = int(i[q]), int(j[q])
            sta, stb = cs[contour_of[ra]], cs[contour_of[rb]]
            sa, sb = int(seg_ix[ra]), int(seg_ix[rb])
            wa = (sta.outline, sta.global_index, sa)
            wb = (stb.outline, stb.global_index, sb)
            connected: list[tuple[int, int]] = []
            if joined[q] in (1, 3) and nxt[q]:
                connected.append((1, 0))
            if joined[q] in (2, 3) and (prv[q] or (nxt[q] and n_of[ra] == 2)):
                connected.append((0, 1))
            for ea_seg, ea, eb_seg, eb in joined_ends.get((wa[1], wb[1]), ()):
                if ea_seg == sa and eb_seg == sb:
                    connected.append((ea, eb))
            seg_a, seg_b = sta.contour.segments[sa], stb.contour.segments[sb]
            for f in crossing_findings(seg_a, seg_b, wa, wb, tuple(connected), limits):
                out.append((int(group[ra]), (id(seg_a), id(seg_b), f)))

    return out
