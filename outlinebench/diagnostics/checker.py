"""Run every check on a document, all at once or incrementally after an edit.

:func:`check_document` checks a whole document. :class:`Checker` keeps what it computed and,
given the next version of the document, recomputes only what the edit touched: documents
share unchanged contours and segment arrays by identity (see
:mod:`outlinebench.model.document`), so a contour that is the same object as before keeps its
findings, and inside a changed contour only the segments that are new objects, the joins next
to them and the intersections involving them are computed again. The checker holds the
previous document, so the ids it keys its caches by stay valid.

A change of structure (a contour or outline added, removed or moved, or a different scale)
makes the next update a full check; moving, inserting or deleting points inside a contour does
not.

Whole-document work is vectorised: all new segments are elevated to cubics and stacked in one
``(M, 4, 2)`` array, and joins, boxes and screening tests run as array operations; only
segments and pairs that fail a screening test are examined one by one.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
from numpy.typing import NDArray

from outlinebench.diagnostics.continuity import INTENT_CODE, classify_joins
from outlinebench.diagnostics.contour_checks import (
    ClosedShape,
    OpenEnd,
    crossing_findings,
    flattened,
    join_finding,
    joins_monotone,
    open_end_findings,
    overlapping_pairs,
    wrong_direction_findings,
)
from outlinebench.diagnostics.findings import Finding
from outlinebench.diagnostics.segment_checks import (
    Limits,
    SegmentTable,
    segment_findings,
    segment_table,
)
from outlinebench.diagnostics.settings import CheckSettings
from outlinebench.geometry import evaluate
from outlinebench.model.document import Contour, Document

__all__ = ["check_document", "Checker"]

# Above this many changed segments the box test uses a sort-and-sweep over all segments of the
# changed outlines instead of comparing each changed segment with every other one.
_SWEEP_THRESHOLD = 256


@dataclass(eq=False, slots=True)
class _ContourState:
    contour: Contour
    outline: int  # source index used in findings
    global_index: int
    table: SegmentTable
    seg_findings: dict[int, list[Finding]]
    join_findings: dict[int, Finding]
    shape: ClosedShape | None
    findings: list[Finding] = field(default_factory=list)

    def assemble(self) -> None:
        items: list[Finding] = []
        n = len(self.contour.segments)
        if len(self.seg_findings) + len(self.join_findings) == 0:
            self.findings = items
            return
        for s in sorted(set(self.seg_findings) | set(self.join_findings)):
            items.extend(self.seg_findings.get(s, ()))
            j = self.join_findings.get(s)
            if j is not None and s < n:
                items.append(j)
        self.findings = items


@dataclass(eq=False, slots=True)
class _OutlineState:
    hits: list[tuple[int, int, Finding]]  # (id of segment a, id of segment b, finding)
    pip_cache: dict[tuple[int, int], bool]
    direction: list[Finding]


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
        Grouped by outline and contour in document order; gaps between open contours last.

    Examples
    --------
    >>> check_document(Document())
    []
    """
    return Checker(settings).update(doc)


class Checker:
    """Incremental checks: ``update(doc)`` after each edit returns the findings of ``doc``.

    Parameters
    ----------
    settings : CheckSettings, optional

    Notes
    -----
    The result of ``update`` equals ``check_document(doc, settings)`` up to the order of
    findings within an outline.
    """

    def __init__(self, settings: CheckSettings | None = None) -> None:
        self.settings = settings or CheckSettings()
        self._doc: Document | None = None
        self._limits: Limits | None = None
        self._contours: list[_ContourState] = []
        self._outlines: list[_OutlineState] = []
        self._shape: list[tuple[int, int]] = []  # (source index, contour count) per outline
        self._gap_findings: list[Finding] = []
        self._joined: list[tuple[OpenEnd, OpenEnd]] = []
        self.findings: list[Finding] = []
        # Number of segments and joins computed by the last update (for tests and benchmarks).
        self.last_segments_computed = 0
        self.last_joins_computed = 0

    # ------------------------------------------------------------------------------------
    def update(self, doc: Document) -> list[Finding]:
        """Check ``doc``, reusing results for every contour and segment it shares with the
        document of the previous update. Returns the findings (also kept in ``.findings``)."""
        # NOTE: imported here until the geometry package exports it at import time.
        from outlinebench.geometry import signed_area

        shape = [
            (o.source_index if o.source_index >= 0 else i, len(o.contours))
            for i, o in enumerate(doc.outlines)
        ]
        if self._doc is None or shape != self._shape or doc.mm_per_unit != self._doc.mm_per_unit:
            self._contours = []
            self._outlines = []
            self._limits = Limits.from_settings(self.settings, doc.mm_per_unit)
        self._shape = shape
        limits = self._limits
        assert limits is not None
        old_states = self._contours

        # 1. which contours changed, and which of their segments are new objects
        refs = list(doc.contour_refs())
        dirty: list[tuple[int, int, Contour, _ContourState | None]] = []
        new_states: list[_ContourState | None] = []
        for ref in refs:
            old = old_states[ref.global_index] if old_states else None
            if old is not None and old.contour is ref.contour:
                new_states.append(old)
            else:
                new_states.append(None)
                dirty.append((ref.outline, ref.global_index, ref.contour, old))

        fresh_segments: list[np.ndarray] = []
        lab_outline: list[int] = []
        lab_contour: list[int] = []
        lab_segment: list[int] = []
        plans = []  # per dirty contour: (reuse map new index -> old index, fresh start row)
        for oi, gi, contour, old in dirty:
            src = shape[oi][0]
            reuse: dict[int, int] = {}
            if old is not None:
                old_ix = {id(s): k for k, s in enumerate(old.contour.segments)}
                for k, s in enumerate(contour.segments):
                    j = old_ix.get(id(s))
                    if j is not None:
                        reuse[k] = j
            start = len(fresh_segments)
            for k, s in enumerate(contour.segments):
                if k not in reuse:
                    fresh_segments.append(s)
                    lab_outline.append(src)
                    lab_contour.append(gi)
                    lab_segment.append(k)
            plans.append((reuse, start))

        # 2. all new segments at once
        fresh = segment_table(fresh_segments)
        per_row: dict[int, list[Finding]] = {}
        for row, f in segment_findings(
            fresh,
            fresh_segments,
            limits,
            np.array(lab_outline, dtype=np.intp),
            np.array(lab_contour, dtype=np.intp),
            np.array(lab_segment, dtype=np.intp),
        ):
            per_row.setdefault(row, []).append(f)
        self.last_segments_computed = len(fresh_segments)

        # 3. per dirty contour: its table, segment findings, and the joins to recompute
        join_rows_in: list[NDArray[np.intp]] = []
        join_rows_out: list[NDArray[np.intp]] = []
        join_intents: list[NDArray[np.int8]] = []
        join_owner: list[tuple[int, NDArray[np.intp]]] = []
        tables: list[SegmentTable] = []
        offset = 0
        changed_rows: dict[int, NDArray[np.intp]] = {}  # global contour -> changed seg indices
        for (oi, gi, contour, old), (reuse, start) in zip(dirty, plans, strict=True):
            n = len(contour.segments)
            n_fresh = n - len(reuse)
            src = shape[oi][0]
            if not reuse:
                table = fresh.take(slice(start, start + n))
                seg_f = {k: per_row[start + k] for k in range(n) if start + k in per_row}
                changed = np.arange(n)
            else:
                assert old is not None
                new_ix = [k for k in range(n) if k not in reuse]
                changed = np.array(new_ix, dtype=np.intp)
                src_rows = np.empty(n, dtype=np.intp)
                m_old = len(old.table)
                for k, j in reuse.items():
                    src_rows[k] = j
                src_rows[changed] = m_old + np.arange(n_fresh)
                both = SegmentTable.concat([old.table, fresh.take(slice(start, start + n_fresh))])
                table = both.take(src_rows)
                seg_f = {}
                for k, j in reuse.items():
                    fs = old.seg_findings.get(j)
                    if fs:
                        seg_f[k] = fs if j == k else [replace(f, segment=k) for f in fs]
                for q, k in enumerate(new_ix):
                    fs = per_row.get(start + q)
                    if fs:
                        seg_f[k] = fs
            changed_rows[gi] = changed
            joins_n = len(contour.joins)
            intents = np.fromiter(
                (INTENT_CODE[j] for j in contour.joins), dtype=np.int8, count=joins_n
            )
            # joins to recompute: next to a changed segment, or with a changed intent
            todo = np.ones(joins_n, dtype=bool)
            join_f: dict[int, Finding] = {}
            if reuse and old is not None:
                is_new = np.zeros(n, dtype=bool)
                is_new[changed] = True
                old_n = len(old.contour.segments)
                for jx in range(joins_n):
                    a, b = jx, (jx + 1) % n
                    if is_new[a] or is_new[b]:
                        continue
                    ja, jb = reuse[a], reuse[b]
                    if jb != (ja + 1) % old_n or ja >= len(old.contour.joins):
                        continue
                    if old.contour.joins[ja] != contour.joins[jx]:
                        continue
                    todo[jx] = False
                    f = old.join_findings.get(ja)
                    if f is not None:
                        join_f[jx] = f if ja == jx else replace(f, segment=jx, join=jx)
            idx = np.flatnonzero(todo)
            join_rows_in.append(offset + idx)
            join_rows_out.append(offset + (idx + 1) % max(n, 1))
            join_intents.append(intents[idx])
            join_owner.append((len(tables), idx))
            tables.append(table)
            offset += n
            shape_ = None
            if contour.closed and n:
                shape_ = ClosedShape(
                    src,
                    gi,
                    evaluate(table.cubics[0], 0.5),
                    flattened(table.cubics, limits.samples),
                    np.concatenate([table.box[:, :2].min(axis=0), table.box[:, 2:].max(axis=0)]),
                    float(signed_area(list(contour.segments))),
                    contour,
                )
            st = _ContourState(contour, src, gi, table, seg_f, join_f, shape_)
            new_states[gi] = st

        # 4. the joins, all at once
        if tables:
            allt = SegmentTable.concat(tables) if len(tables) > 1 else tables[0]
            rin = np.concatenate(join_rows_in)
            rout = np.concatenate(join_rows_out)
            verdict, angle, jump = classify_joins(
                allt.d1[rin],
                allt.d0[rout],
                allt.k1[rin],
                allt.k0[rout],
                np.concatenate(join_intents),
                kink_angle=limits.kink_angle,
                corner_angle=limits.corner_angle,
                curvature_jump=limits.curvature_jump,
                straight=limits.straight,
            )
            self.last_joins_computed = int(rin.size)
            flagged = np.flatnonzero(verdict)
            if flagged.size:
                owner_of = np.concatenate(
                    [np.full(idx.size, t, dtype=np.intp) for t, idx in join_owner]
                )
                jidx = np.concatenate([idx for _, idx in join_owner])
                dirty_states = [new_states[gi] for _, gi, _, _ in dirty]
                intents_all = np.concatenate(join_intents)
                for q in flagged:
                    st = dirty_states[owner_of[q]]
                    assert st is not None
                    jx = int(jidx[q])
                    r_in, r_out = int(rin[q]), int(rout[q])
                    f = join_finding(
                        st.outline, st.global_index, jx, jx, tuple(allt.cubics[r_in, 3]),
                        allt.d1[r_in], allt.d0[r_out], float(allt.k1[r_in]),
                        float(allt.k0[r_out]), int(intents_all[q]), limits,
                        verdict=int(verdict[q]), angle=float(angle[q]), jump=float(jump[q]),
                    )  # fmt: skip
                    if f is not None:
                        st.join_findings[jx] = f
        else:
            self.last_joins_computed = 0
        for _, gi, _, _ in dirty:
            st = new_states[gi]
            assert st is not None
            st.assemble()
        states: list[_ContourState] = new_states  # type: ignore[assignment]

        # 5. open ends: gaps and open contours (whole document, cheap)
        open_changed = any(
            c.closed is False or (old is not None and not old.contour.closed)
            for _, _, c, old in dirty
        )
        if open_changed or self._doc is None or not old_states:
            ends: list[OpenEnd] = []
            for st in states:
                c = st.contour
                if c.closed or not c.segments:
                    continue
                t = st.table
                last = len(c.segments) - 1
                ends.append(
                    OpenEnd(
                        st.outline, st.global_index, 0, 0, tuple(t.cubics[0, 0]),
                        tuple(t.d0[0]), float(t.k0[0]),
                    )
                )  # fmt: skip
                ends.append(
                    OpenEnd(
                        st.outline, st.global_index, last, 1, tuple(t.cubics[last, 3]),
                        tuple(t.d1[last]), float(t.k1[last]),
                    )
                )  # fmt: skip
            self._gap_findings, self._joined = open_end_findings(ends, limits)
        joined_ends: dict[tuple[int, int], list[tuple[int, int, int, int]]] = {}
        for a, b in self._joined:
            joined_ends.setdefault((a.contour, b.contour), []).append(
                (a.segment, a.end, b.segment, b.end)
            )
            joined_ends.setdefault((b.contour, a.contour), []).append(
                (b.segment, b.end, a.segment, a.end)
            )

        # 6. intersections and winding, per outline with a changed contour
        first_contour = []
        k = 0
        for _, count in shape:
            first_contour.append(k)
            k += count
        dirty_outlines = sorted({oi for oi, _, _, _ in dirty})
        outlines = self._outlines if self._outlines else [None] * len(shape)
        outlines = list(outlines)
        n_changed = sum(v.size for v in changed_rows.values())
        for oi in dirty_outlines:
            lo, hi = first_contour[oi], first_contour[oi] + shape[oi][1]
            o_states = states[lo:hi]
            old_o = outlines[oi]
            hits = self._outline_hits(
                o_states, old_o, changed_rows, joined_ends, limits, n_changed, old_states, lo
            )
            shapes = [st.shape for st in o_states if st.shape is not None]
            cache = old_o.pip_cache if old_o is not None else {}
            live = {id(s.key) for s in shapes}
            cache = {key: v for key, v in cache.items() if key[0] in live and key[1] in live}
            outlines[oi] = _OutlineState(hits, cache, wrong_direction_findings(shapes, cache))

        # 7. assemble
        result: list[Finding] = []
        for oi, (_, count) in enumerate(shape):
            lo = first_contour[oi]
            for st in states[lo : lo + count]:
                result.extend(st.findings)
            o = outlines[oi]
            if o is not None:
                result.extend(f for _, _, f in o.hits)
                result.extend(o.direction)
        result.extend(self._gap_findings)
        self._doc = doc
        self._contours = states
        self._outlines = outlines  # type: ignore[assignment]
        self.findings = result
        return result

    # ------------------------------------------------------------------------------------
    def _outline_hits(
        self,
        o_states: list[_ContourState],
        old_o: _OutlineState | None,
        changed_rows: dict[int, NDArray[np.intp]],
        joined_ends: dict[tuple[int, int], list[tuple[int, int, int, int]]],
        limits: Limits,
        n_changed: int,
        old_states: list[_ContourState],
        first: int,
    ) -> list[tuple[int, int, Finding]]:
        """Crossings within one outline: keep old ones between unchanged segments, compute the
        pairs that involve a changed segment."""
        seg_of: list[np.ndarray] = []
        where: list[tuple[int, int, int]] = []
        counts = []
        for st in o_states:
            for k, s in enumerate(st.contour.segments):
                seg_of.append(s)
                where.append((st.outline, st.global_index, k))
            counts.append(len(st.contour.segments))
        if not seg_of:
            return []
        starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.intp)
        box = np.concatenate([st.table.box for st in o_states])
        changed = np.zeros(len(seg_of), dtype=bool)
        for ci, st in enumerate(o_states):
            rows = changed_rows.get(st.global_index)
            if rows is not None:
                changed[starts[ci] + rows] = True

        kept: list[tuple[int, int, Finding]] = []
        if old_o is not None:
            gone: set[int] = set()
            for ci, st in enumerate(o_states):
                if st.global_index in changed_rows:
                    old = old_states[first + ci]
                    gone.update(id(s) for s in old.contour.segments)
            now_changed = {id(seg_of[r]) for r in np.flatnonzero(changed)}
            still = set()
            for st in o_states:
                if st.global_index in changed_rows:
                    still.update(id(s) for s in st.contour.segments)
            gone = (gone - still) | now_changed
            index_of = {}
            for st in o_states:
                if st.global_index in changed_rows:
                    for k, s in enumerate(st.contour.segments):
                        index_of[id(s)] = k
            for ia, ib, f in old_o.hits:
                if ia in gone or ib in gone:
                    continue
                sa, sb = index_of.get(ia, f.segment), index_of.get(ib, f.other_segment)
                if sa != f.segment or sb != f.other_segment:
                    f = replace(f, segment=sa, other_segment=sb)
                kept.append((ia, ib, f))

        # candidate pairs with at least one changed segment
        m = len(seg_of)
        if n_changed > _SWEEP_THRESHOLD:
            i, j = overlapping_pairs(box, np.zeros(m, dtype=np.intp), limits.gap)
            sel = changed[i] | changed[j]
            i, j = i[sel], j[sel]
        else:
            rows = np.flatnonzero(changed)
            pad = limits.gap
            b = box[rows]
            ov = (
                (b[:, None, 0] - pad <= box[None, :, 2])
                & (box[None, :, 0] - pad <= b[:, None, 2])
                & (b[:, None, 1] - pad <= box[None, :, 3])
                & (box[None, :, 1] - pad <= b[:, None, 3])
            )
            ri, cj = np.nonzero(ov)
            i, j = rows[ri], cj
            sel = (i != j) & ~(changed[j] & (j < i))
            i, j = i[sel], j[sel]
            i, j = np.minimum(i, j), np.maximum(i, j)
        if i.size == 0:
            return kept
        contour_of = np.repeat(np.arange(len(o_states)), counts)
        seg_ix = np.arange(m) - starts[contour_of]
        n_of = np.array(counts)[contour_of]
        closed_of = np.array([st.contour.closed for st in o_states])[contour_of]
        same = contour_of[i] == contour_of[j]
        nxt = (seg_ix[i] + 1 == seg_ix[j]) | (
            closed_of[i] & (seg_ix[i] == n_of[i] - 1) & (seg_ix[j] == 0)
        )
        prv = closed_of[i] & (seg_ix[i] == 0) & (seg_ix[j] == n_of[j] - 1)
        adjacent = same & (nxt | prv)
        # neighbours that together move monotonically cannot cross: skip them
        cub = np.concatenate([st.table.cubics for st in o_states])
        a_first = np.where(prv, j, i)
        b_second = np.where(prv, i, j)
        skip = np.zeros(i.size, dtype=bool)
        if adjacent.any():
            ad = np.flatnonzero(adjacent)
            skip[ad] = joins_monotone(cub[a_first[ad]], cub[b_second[ad]])
            # a closed contour of two segments: both joins connect them
            two = n_of[i[ad]] == 2
            skip[ad[two]] = False
        out = list(kept)
        for q in np.flatnonzero(~skip):
            ra, rb = int(i[q]), int(j[q])
            wa, wb = where[ra], where[rb]
            connected: list[tuple[int, int]] = []
            if adjacent[q]:
                if nxt[q]:
                    connected.append((1, 0))
                if prv[q] or (closed_of[ra] and n_of[ra] == 2):
                    connected.append((0, 1))
            for sa, ea, sb, eb in joined_ends.get((wa[1], wb[1]), ()):
                if sa == wa[2] and sb == wb[2]:
                    connected.append((ea, eb))
            for f in crossing_findings(seg_of[ra], seg_of[rb], wa, wb, tuple(connected), limits):
                out.append((id(seg_of[ra]), id(seg_of[rb]), f))
        return out
