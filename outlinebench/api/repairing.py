"""Repairs of a whole document: which fixes to try, in which order, and what came of each.

Each fix is an undoable model command (:mod:`outlinebench.model.repairs`) that measures its
shape change with a proven Hausdorff bound and is refused beyond the allowed change; a fix is
also refused when the re-check still shows the finding it targets.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from outlinebench.diagnostics import (
    Checker,
    CheckSettings,
    Finding,
    is_problem,
    place_text,
)
from outlinebench.errors import CommandError, OutlinebenchError
from outlinebench.model.commands import Command, CommandGroup
from outlinebench.model.document import Document
from outlinebench.model.repairs import (
    REPAIR_ORDER,
    AddExtremumPoints,
    CloseGap,
    FitCurves,
    FixDirection,
    JoinContours,
    MatchCurvature,
    RemoveOverlaps,
    RemoveRedundantPoints,
    RepairCommand,
    SmoothKink,
    on_integer_grid,
)

__all__ = [
    "DEFAULT_MAX_CHANGE_MM",
    "TARGETS",
    "Outcome",
    "RepairRun",
    "parse_kinds",
    "repair_for_finding",
    "same_place",
    "added_problem",
    "ALLOWED_NEW_KINDS",
    "repair_document",
]


# Default allowed shape change: 0.05 mm, within the repeatability of routers, lasers and vinyl
# cutters and below what a drafter sees at sign sizes. Our choice, no source.
DEFAULT_MAX_CHANGE_MM = 0.05

# The finding kinds each repair kind targets. fit-curves, remove-points and fix-direction's
# duplicate removal also run where no finding points (they tidy every contour they fit).
TARGETS: dict[str, tuple[str, ...]] = {
    "close-gaps": ("gap", "open-contour"),
    "remove-overlaps": ("self-intersection",),
    "fix-direction": ("wrong-direction",),
    "fit-curves": (),
    "remove-points": ("tiny-segment",),
    "smooth-kinks": ("kink", "corner"),
    "match-curvature": ("curvature-jump",),
    "add-extrema": ("missing-extremum",),
}

# A polyline contour (lines only) is fitted when it has at least this many lines and some
# vertex turns by a little (0 < turn ≤ the corner angle): chords of a curve, not a shape of
# straight sides. Our choice, no source.
MIN_POLYLINE_LINES = 6


@dataclass
class Outcome:
    """One fix: applied or refused, with the measured change and a one-line reason or note."""

    kind: str
    status: str  # "fixed", "refused", or "left" (still found, no chosen repair answered)
    where: str
    finding: str | None
    change: float | None
    reason: str
    at: tuple[float, float] | None = None  # the finding's position (user units)

    def to_dict(self, factor: float) -> dict[str, Any]:
        return {
            "x": None if self.at is None else self.at[0] * factor,
            "y": None if self.at is None else self.at[1] * factor,
            "kind": self.kind,
            "status": self.status,
            "where": self.where,
            "finding": self.finding,
            "change": None if self.change is None else self.change * factor,
            "reason": self.reason,
        }


@dataclass
class RepairRun:
    """The result of :func:`repair_document`."""

    before: Document
    document: Document
    outcomes: list[Outcome] = field(default_factory=list)
    commands: list[Command] = field(default_factory=list)

    def command(self, label: str = "Repair") -> CommandGroup:
        """Every applied fix as one undo step (apply it to ``before`` to get ``document``)."""
        group = CommandGroup(label, self.commands)
        group._record(self.before, self.document)
        return group


def parse_kinds(text: str) -> list[str]:
    """``"all"`` or comma-separated kind words, returned in the order they are applied.

    Raises
    ------
    OutlinebenchError
        An unknown word (the message lists the known ones).
    """
    words = [w.strip() for w in text.split(",") if w.strip()]
    if not words:
        raise OutlinebenchError("--fix needs at least one kind")
    if "all" in words:
        return list(REPAIR_ORDER)
    bad = [w for w in words if w not in REPAIR_ORDER]
    if bad:
        raise OutlinebenchError(
            f"--fix: unknown kind {bad[0]!r}; known kinds: {', '.join(REPAIR_ORDER)}, all"
        )
    return [k for k in REPAIR_ORDER if k in words]


def _locate(doc: Document, global_index: int) -> tuple[int, int]:
    for ref in doc.contour_refs():
        if ref.global_index == global_index:
            return ref.outline, ref.index
    raise CommandError(f"contour {global_index} does not exist")


def _gap_user(doc: Document, settings: CheckSettings) -> tuple[float, float]:
    return settings.gap_mm / doc.mm_per_unit, settings.gap_search_mm / doc.mm_per_unit


def repair_for_finding(
    doc: Document,
    finding: Finding,
    *,
    max_change: float,
    settings: CheckSettings | None = None,
) -> RepairCommand | None:
    """The repair command that targets one finding, or None when no repair fixes its kind.

    Parameters
    ----------
    doc : Document
        The document the finding was found in.
    finding : Finding
    max_change : float
        Allowed shape change, document user units.
    settings : CheckSettings, optional
        The check's settings (gap tolerances).

    Returns
    -------
    RepairCommand or None
        Not yet applied: ``apply(doc)`` gives the repaired document and sets ``change``, or
        raises CommandError with the reason it is refused.
    """
    settings = settings or CheckSettings()
    kind = finding.kind
    grid = 1.0 if on_integer_grid(doc) else None
    if kind in ("gap", "open-contour"):
        o, c = _locate(doc, finding.contour)
        gap, search = _gap_user(doc, settings)
        other = finding.other_contour
        if kind == "gap" and other is not None and other != finding.contour:
            o2, c2 = _locate(doc, other)
            if o2 != o:
                return None
            return JoinContours(
                o, c, c2, finding.t == 1.0, finding.other_t == 1.0, search, max_change, grid
            )
        if kind == "open-contour":
            ends = doc.contour(o, c)
            if finding.value is None or finding.value > search or finding.severity != "info":
                # a warning: its ends meet nothing (or are too far apart); an info open
                # contour whose ends meet other contours is joined through their gaps
                if finding.value is None or finding.value > search:
                    return None
            if ends.closed:
                return None
        return CloseGap(o, c, search, max_change, grid)
    if kind in ("kink", "corner") and finding.join is not None:
        o, c = _locate(doc, finding.contour)
        return SmoothKink(o, c, finding.join, max_change, grid)
    if kind == "curvature-jump" and finding.join is not None:
        o, c = _locate(doc, finding.contour)
        return MatchCurvature(o, c, finding.join, max_change)
    if kind == "missing-extremum" and finding.segment is not None:
        o, c = _locate(doc, finding.contour)
        return AddExtremumPoints(
            o, c, finding.segment, max_change, settings.extremum_overshoot_mm / doc.mm_per_unit
        )
    if kind == "wrong-direction":
        o, _ = _locate(doc, finding.contour)
        return FixDirection(o, max_change)
    if kind == "tiny-segment":
        o, c = _locate(doc, finding.contour)
        return RemoveRedundantPoints(o, c, max_change, settings.corner_angle)
    if kind == "self-intersection":
        o, _ = _locate(doc, finding.contour)
        return RemoveOverlaps(o, max_change=max_change)
    return None


def same_place(a: Finding, b: Finding) -> bool:
    """Whether two findings are the same one (before and after an edit)."""
    if a.kind != b.kind or a.contour != b.contour:
        return False
    if a.kind == "gap":  # contours are renumbered by joins: the place is the end point
        return abs(a.x - b.x) <= 1e-9 * max(1.0, abs(a.x)) and abs(a.y - b.y) <= 1e-9 * max(
            1.0, abs(a.y)
        )
    return a.join == b.join and (a.join is not None or a.segment == b.segment)


# Finding kinds a repair may add at the place it fixed without being refused, because a repair
# later in REPAIR_ORDER answers for them: closing a gap makes a new join, judged for G1/G2 like
# any other (smooth-kinks and match-curvature), and a kink made smooth is then judged for G2
# (match-curvature). One rule for the command line's repair_document and the editor's single
# fixes.
ALLOWED_NEW_KINDS: dict[str, tuple[str, ...]] = {
    "close-gaps": ("kink", "corner", "curvature-jump"),
    "smooth-kinks": ("curvature-jump",),
}


def _outline_problem_counts(
    findings: Sequence[Finding], doc: Document, outline: int
) -> dict[str, int]:
    """Findings of warning level or worse in one outline's contours, counted by kind."""
    mine = {r.global_index for r in doc.contour_refs() if r.outline == outline}
    counts: dict[str, int] = {}
    for f in findings:
        if is_problem(f) and f.contour in mine:
            counts[f.kind] = counts.get(f.kind, 0) + 1
    return counts


def added_problem(
    cmd: Any,
    before: Document,
    found_before: Sequence[Finding],
    after: Document,
    found_after: Sequence[Finding],
) -> str | None:
    r"""The first finding kind of warning level or worse a fix adds in its outline, or None.

    Parameters
    ----------
    cmd : Command
        The fix (a repair command with ``kind`` and ``outline``; others add nothing).
    before, after : Document
        The document before and after the fix.
    found_before, found_after : sequence of Finding
        Their findings.

    Returns
    -------
    str or None
        A kind counted more often in the outline after the fix than before, other than the
        kinds :data:`ALLOWED_NEW_KINDS` lets that repair kind add.

    Notes
    -----
    Counts per kind, :math:`n_k(\text{after}) > n_k(\text{before})`, over the findings with
    :func:`outlinebench.diagnostics.is_problem` in the contours of the fixed outline: the rule
    :func:`repair_document` applies to each fix (common practice,
    no source: a repair must not trade one defect for another).
    """
    outline = getattr(cmd, "outline", None)
    if outline is None:
        return None
    old = _outline_problem_counts(found_before, before, outline)
    new = _outline_problem_counts(found_after, after, outline)
    allowed = ALLOWED_NEW_KINDS.get(getattr(cmd, "kind", ""), ())
    for kind, n in new.items():
        if n > old.get(kind, 0) and kind not in allowed:
            return kind
    return None


def _problem_counts(findings: list[Finding], outline_contours: set[int]) -> dict[str, int]:
    out: dict[str, int] = {}
    for f in findings:
        if is_problem(f) and f.contour in outline_contours:
            out[f.kind] = out.get(f.kind, 0) + 1
    return out


def _contours_of(doc: Document, outline: int) -> set[int]:
    return {r.global_index for r in doc.contour_refs() if r.outline == outline}


def _polyline_like(contour: Any, corner_angle: float) -> bool:
    import math

    import numpy as np

    segs = contour.segments
    if len(segs) < MIN_POLYLINE_LINES or any(s.shape[0] != 2 for s in segs):
        return False
    d = np.array([s[1] - s[0] for s in segs])
    a, b = (d[:-1], d[1:]) if not contour.closed else (d, np.roll(d, -1, axis=0))
    turn = np.degrees(np.abs(np.arctan2(a[:, 0] * b[:, 1] - a[:, 1] * b[:, 0], (a * b).sum(1))))
    return bool(np.any((turn > 1e-9) & (turn <= min(corner_angle, 45.0 - math.ulp(45.0)))))


class _Runner:
    """Applies commands one by one, re-checking after each (incrementally)."""

    def __init__(self, doc: Document, settings: CheckSettings) -> None:
        self.before = doc
        self.doc = doc
        self.checker = Checker(settings)
        self.findings = list(self.checker.update(doc))
        self.outcomes: list[Outcome] = []
        self.commands: list[Command] = []

    def attempt(self, cmd: RepairCommand, where: str, target: Finding | None) -> None:
        label = None if target is None else f"{target.kind}"
        at = None if target is None else (target.x, target.y)
        try:
            new = cmd.apply(self.doc)
        except CommandError as exc:
            if target is not None:
                change = cmd.change.upper if cmd.change is not None else None
                self.outcomes.append(
                    Outcome(cmd.kind, "refused", where, label, change, str(exc), at)
                )
            return
        after = list(self.checker.update(new))
        reason = None
        if target is not None and any(same_place(target, f) for f in after):
            reason = f"the {target.kind} is still found after the fix"
        else:
            worse = added_problem(cmd, self.doc, self.findings, new, after)
            if worse is not None:
                reason = f"it would add a {worse} finding in the same outline"
        change = cmd.change.upper if cmd.change is not None else None
        if reason is not None:
            self.checker.update(self.doc)
            if target is not None or cmd.kind in ("fit-curves", "remove-points"):
                self.outcomes.append(Outcome(cmd.kind, "refused", where, label, change, reason, at))
            return
        self.doc = new
        self.findings = after
        self.commands.append(cmd)
        self.outcomes.append(Outcome(cmd.kind, "fixed", where, label, change, cmd.note, at))


def repair_document(
    doc: Document,
    kinds: list[str],
    *,
    max_change: float,
    settings: CheckSettings | None = None,
    contours: set[int] | None = None,
) -> RepairRun:
    """Apply every repair of the given kinds, in :data:`REPAIR_ORDER`, re-checking between.

    Parameters
    ----------
    doc : Document
    kinds : list of str
        Repair kinds (:data:`outlinebench.model.repairs.REPAIR_KINDS`).
    max_change : float
        Allowed shape change per fix, document user units.
    settings : CheckSettings, optional
        The check's settings; targeted findings are those of warning level or worse, and
        missing-extremum (info by design).
    contours : set of int, optional
        Global contour indices to repair (the editor's selection); default every contour.

    Returns
    -------
    RepairRun
        The repaired document, one outcome per targeted finding (fixed with its measured
        change, or refused with the reason) and the applied commands.
    """
    settings = settings or CheckSettings()
    run = _Runner(doc, settings)
    for kind in REPAIR_ORDER:
        if kind not in kinds:
            continue
        todo = [f for f in run.findings if _wanted(f, TARGETS[kind], contours)]
        if kind == "close-gaps":
            _close_gaps(run, kind, max_change, settings, contours)
        elif kind == "remove-overlaps":
            _remove_overlaps(run, todo, max_change)
        elif kind == "fix-direction":
            _fix_directions(run, todo, max_change, contours)
        elif kind in ("fit-curves", "remove-points"):
            _rewrite_contours(run, kind, todo, max_change, settings, contours)
        else:
            _fix_joins_and_segments(run, todo, max_change, settings)
    _report_left(run, kinds, contours)
    return RepairRun(doc, run.doc, run.outcomes, run.commands)


def _wanted(f: Finding, targets: tuple[str, ...], contours: set[int] | None) -> bool:
    """A finding one of the chosen repairs answers for (in the chosen contours)."""
    if f.kind not in targets or (contours is not None and f.contour not in contours):
        return False
    if f.kind == "open-contour":
        return True
    return is_problem(f) or f.kind == "missing-extremum"


def _close_gaps(
    run: _Runner,
    kind: str,
    max_change: float,
    settings: CheckSettings,
    contours: set[int] | None,
) -> None:
    """Gaps one at a time, re-checking after each: joining two contours renumbers them, and a
    joined chain's own ends may then meet."""
    targets = TARGETS[kind]
    tried: set[tuple[str, float, float]] = set()
    while True:
        todo = [f for f in run.findings if _wanted(f, targets, contours)]
        todo = [f for f in todo if (f.kind, f.x, f.y) not in tried]
        if not todo:
            return
        f = todo[0]
        tried.add((f.kind, f.x, f.y))
        where = place_text(f)
        cmd = repair_for_finding(run.doc, f, max_change=max_change, settings=settings)
        if cmd is not None:
            run.attempt(cmd, where, f if f.kind == "gap" else None)
            continue
        if f.kind == "open-contour":
            reason = f"its ends are {f.value:.6g} apart, beyond the gap search distance: not a gap"
        else:
            reason = (
                f"the gap is to contour {f.other_contour} of another outline: "
                "joining outlines is not a repair"
            )
        if f.kind == "gap" or (f.value or 0.0) > _gap_user(run.doc, settings)[1]:
            run.outcomes.append(Outcome(kind, "refused", where, f.kind, None, reason, (f.x, f.y)))


def _remove_overlaps(run: _Runner, todo: list[Finding], max_change: float) -> None:
    """One union per outline that has an overlap finding."""
    outlines = sorted({_locate(run.doc, f.contour)[0] for f in todo})
    for o in outlines:
        f = next(x for x in todo if _locate(run.doc, x.contour)[0] == o)
        run.attempt(RemoveOverlaps(o, max_change=max_change), place_text(f), f)


def _fix_directions(
    run: _Runner, todo: list[Finding], max_change: float, contours: set[int] | None
) -> None:
    """Every outline in the chosen contours, named by its first direction finding."""
    by_outline: dict[int, Finding] = {}
    for f in todo:
        by_outline.setdefault(_locate(run.doc, f.contour)[0], f)
    for o in range(len(run.doc.outlines)):
        if contours is not None and not (_contours_of(run.doc, o) & contours):
            continue
        found = by_outline.get(o)
        where = place_text(found) if found is not None else f"outline {o}"
        run.attempt(FixDirection(o, max_change), where, found)


def _rewrite_contours(
    run: _Runner,
    kind: str,
    todo: list[Finding],
    max_change: float,
    settings: CheckSettings,
    contours: set[int] | None,
) -> None:
    """Whole-contour rewrites (fit curves to polylines, remove redundant points)."""
    tiny = {f.contour: f for f in todo}
    for ref in list(run.doc.contour_refs()):
        if contours is not None and ref.global_index not in contours:
            continue
        c = run.doc.contour(ref.outline, ref.index)
        if kind == "fit-curves":
            if not _polyline_like(c, settings.corner_angle):
                continue
            job: RepairCommand = FitCurves(ref.outline, ref.index, max_change)
        else:
            job = RemoveRedundantPoints(ref.outline, ref.index, max_change, settings.corner_angle)
        found = tiny.get(ref.global_index)
        where = place_text(found) if found is not None else f"contour {ref.global_index}"
        run.attempt(job, where, found)


def _fix_joins_and_segments(
    run: _Runner, todo: list[Finding], max_change: float, settings: CheckSettings
) -> None:
    """Join and segment fixes: later segments first, so earlier indices stay valid."""
    todo.sort(key=lambda f: (f.contour, -(f.join if f.join is not None else f.segment or 0)))
    for f in todo:
        fresh = [g for g in run.findings if same_place(f, g)]
        if not fresh:
            continue  # an earlier fix already removed it
        cmd = repair_for_finding(run.doc, fresh[0], max_change=max_change, settings=settings)
        if cmd is not None:
            run.attempt(cmd, place_text(f), fresh[0])


def _report_left(run: _Runner, kinds: list[str], contours: set[int] | None) -> None:
    """What is still found and no chosen repair answered for: one outcome line each."""
    answered = {(o.where, o.finding) for o in run.outcomes}
    answered_at = {(o.finding, o.at) for o in run.outcomes if o.at is not None}
    targeted = {k for kind in kinds for k in TARGETS[kind]}
    for f in run.findings:
        if not is_problem(f) or (contours is not None and f.contour not in contours):
            continue
        if (place_text(f), f.kind) in answered or (f.kind, (f.x, f.y)) in answered_at:
            continue
        if f.kind in targeted:
            reason = "still found after the chosen repairs"
        elif any(f.kind in TARGETS[k] for k in REPAIR_ORDER):
            names = [k for k in REPAIR_ORDER if f.kind in TARGETS[k]]
            reason = f"not among the chosen kinds (--fix {','.join(names)})"
        else:
            reason = f"no repair fixes a {f.kind}"
        run.outcomes.append(Outcome("-", "left", place_text(f), f.kind, None, reason, (f.x, f.y)))


# --------------------------------------------------------------------------------------------
# the command line
# --------------------------------------------------------------------------------------------
