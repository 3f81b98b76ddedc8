"""Repairs at hand: one finding's fix measured before it is applied, and "fix all of a kind".

The fixes are the library's repair commands (:mod:`outlinebench.api.repairing`,
:mod:`outlinebench.model.repairs`); this module only asks for them, applies them to a copy
of the document for the preview, and words the outcome in the display unit. Nothing here
changes the session: the window applies ``FixPreview.command`` (one undo step) or
``FixAllResult.command`` (one group, one undo step) through
:meth:`outlinebench.app.session.EditorSession.do`.

A fix is refused, with one line saying why and the document untouched, when no repair fixes
the finding's kind, when the measured change exceeds the allowed change, when the finding is
still found after the fix, or when the fix would add a finding of warning level or worse in
the same outline (the same re-checks :func:`outlinebench.api.repairing.repair_document`
makes for "fix all" and the command line's ``repair``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from outlinebench.api.repairing import (
    ALLOWED_NEW_KINDS,
    TARGETS,
    added_problem,
    repair_document,
    repair_for_finding,
    same_place,
)
from outlinebench.app.units import DisplayUnits
from outlinebench.diagnostics import Checker, CheckSettings, Finding
from outlinebench.errors import CommandError
from outlinebench.model.commands import Command
from outlinebench.model.document import Contour, Document
from outlinebench.model.repairs import REPAIR_ORDER, SmoothKink

__all__ = [
    "FixPreview",
    "FixAllResult",
    "repair_kind_of",
    "preview_fix",
    "fix_all",
    "changed_contours",
    "change_text",
    "added_problem",
    "angle_text",
    "fix_note",
    "ALLOWED_NEW_KINDS",
]


def repair_kind_of(finding_kind: str) -> str | None:
    """The repair kind (``outlinebench repair --fix`` word) that targets a finding kind, or
    None when no repair fixes it (e.g. ``cusp``, ``degenerate-handle``)."""
    for kind in REPAIR_ORDER:
        if finding_kind in TARGETS.get(kind, ()):
            return kind
    return None


def change_text(units: DisplayUnits, value: float) -> str:
    """A measured change in the display unit: the unit's usual decimals, or two significant
    digits when that would print as zero (``"0.044 mm"``, ``"6.8e-06 mm"``, ``"0 mm"``)."""
    shown = units.show(value)
    if shown == 0.0:
        return f"0 {units.name}"
    if abs(shown) >= 10.0 ** (-units.decimals):
        return units.text(value)
    return f"{shown:.2g} {units.name}"


# A turn left after smoothing below this is shown as 0°: it is rounding, not a turn (a unit
# vector's direction carries about 1e-16 rad ≈ 6e-15° of double rounding; 1e-9° is far above
# that and far below anything a cutter or an eye resolves). Common practice, no source.
ZERO_ANGLE_DEG = 1e-9


def angle_text(degrees: float, digits: int = 3) -> str:
    """An angle for the fix bar: ``digits`` significant digits, or ``"0°"`` below
    :data:`ZERO_ANGLE_DEG` (``"0.333°"``, ``"0°"`` for a residual of 2.5e-14°)."""
    if abs(degrees) < ZERO_ANGLE_DEG:
        return "0°"
    return f"{degrees:.{digits}g}°"


def fix_note(cmd: Command, finding: Finding) -> str:
    """The fix's note for the fix bar, rendered from the command's fields where it has them.

    A kink or corner smoothed (:class:`~outlinebench.model.repairs.SmoothKink`) reads
    ``"turn 2.862° → 0°"``: the finding's turn and the command's residual angle through
    :func:`angle_text`. Other fixes keep the command's own note.
    """
    residual = getattr(cmd, "residual_angle", None)
    if (
        isinstance(cmd, SmoothKink)
        and residual is not None
        and finding.value is not None
        and finding.unit == "degrees"
    ):
        grid = " (best on the grid)" if cmd.grid else ""
        return f"turn {angle_text(finding.value, 4)} → {angle_text(residual)}{grid}"
    return getattr(cmd, "note", "") or ""


def changed_contours(before: Document, after: Document) -> tuple[list[Contour], list[Contour]]:
    """Contours of ``before`` that ``after`` no longer holds, and contours new in ``after``.

    Commands replace only the contours they change and keep the others as the same objects
    (:mod:`outlinebench.model.commands`), so identity tells which changed.
    """
    old_ids = {id(c) for o in before.outlines for c in o.contours}
    new_ids = {id(c) for o in after.outlines for c in o.contours}
    gone = [c for o in before.outlines for c in o.contours if id(c) not in new_ids]
    made = [c for o in after.outlines for c in o.contours if id(c) not in old_ids]
    return gone, made


@dataclass
class FixPreview:
    """One finding's fix, measured and not applied.

    Attributes
    ----------
    finding : Finding
        The finding (user units).
    before : Document
        The document the fix was computed on (the session's at the time).
    repair_kind : str or None
        The repair kind word, None when no repair fixes the finding's kind.
    command : Command or None
        The fix, already computed on ``before`` (``session.do`` reuses the result); None
        when refused.
    after : Document or None
        The repaired document (None when refused).
    change, change_lower : float or None
        The proven Hausdorff bound of the shape change (user units): upper and lower end.
    note : str
        The fix's own note (what it did, e.g. the residual angle).
    refusal : str or None
        One line saying why the fix is refused (None when it can be applied).
    old_contours, new_contours : list of Contour
        The contours the fix replaces and the ones it makes (for the canvas).
    """

    finding: Finding
    before: Document
    repair_kind: str | None
    command: Command | None = None
    after: Document | None = None
    change: float | None = None
    change_lower: float | None = None
    note: str = ""
    refusal: str | None = None
    old_contours: list[Contour] = field(default_factory=list)
    new_contours: list[Contour] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        """Whether the fix can be applied."""
        return self.refusal is None and self.command is not None

    def summary(self, units: DisplayUnits, max_change: float) -> str:
        """One line: the measured change and note, or the refusal."""
        name = self.repair_kind or "no repair"
        if not self.ok:
            return f"Fix {self.finding.kind} ({name}): refused — {self.refusal}"
        assert self.change is not None
        return (
            f"Fix {self.finding.kind} ({name}): the outline moves by at most "
            f"{change_text(units, self.change)} (proven; allowed "
            f"{change_text(units, max_change)}) — {self.note}"
        )


def _no_fix_reason(doc: Document, f: Finding, settings: CheckSettings, units: DisplayUnits):
    if repair_kind_of(f.kind) is None:
        return f"no repair fixes a {f.kind}"
    if f.kind == "open-contour":
        if f.value is None:
            return "its ends meet nothing: not a gap"
        search = settings.gap_search_mm / doc.mm_per_unit if doc.mm_per_unit > 0 else 0.0
        if f.value > search:
            return (
                f"its ends are {change_text(units, f.value)} apart, beyond the gap search "
                f"distance {change_text(units, search)}: not a gap"
            )
        return "its ends are joined through the gaps to other contours (fix those)"
    if f.kind == "gap" and f.other_contour is not None:
        return (
            f"the gap is to contour {f.other_contour} of another outline: joining outlines "
            "is not a repair"
        )
    return f"no {repair_kind_of(f.kind)} fix applies at this place"


def _refusal_text(exc: CommandError, cmd, max_change: float, units: DisplayUnits) -> str:
    change = getattr(cmd, "change", None)
    if change is not None and change.upper > max_change:
        return (
            f"the outline would move by up to {change_text(units, change.upper)}, more than "
            f"the allowed {change_text(units, max_change)}"
        )
    return str(exc)


def preview_fix(
    doc: Document,
    finding: Finding,
    *,
    max_change: float,
    units: DisplayUnits,
    settings: CheckSettings | None = None,
) -> FixPreview:
    r"""Compute (not apply) the fix of one finding and measure it.

    Parameters
    ----------
    doc : Document
        The session's document.
    finding : Finding
        A finding of ``doc`` (user units, as the checker gives it).
    max_change : float
        Allowed shape change, user units.
    units : DisplayUnits
        The unit refusals are worded in.
    settings : CheckSettings, optional
        The check's settings (gap tolerances; the re-check uses them).

    Returns
    -------
    FixPreview
        With the command and the repaired document, or the refusal.

    Notes
    -----
    The change is the command's proven two-sided Hausdorff bound between the old and new
    contours, :math:`d_H(A, B) = \max(\sup_{a\in A} d(a, B), \sup_{b\in B} d(b, A))`
    (Hausdorff distance; bound from :mod:`outlinebench.geometry.hausdorff`). After the fix the
    document is checked again and the fix refused if the finding is still there or if it
    adds a finding of warning level or worse in the same outline (:func:`added_problem`).
    """
    settings = settings or CheckSettings()
    kind = repair_kind_of(finding.kind)
    out = FixPreview(finding, doc, kind)
    cmd: Command | None
    try:
        cmd = repair_for_finding(doc, finding, max_change=max_change, settings=settings)
    except CommandError as exc:
        out.refusal = str(exc)
        return out
    if cmd is None:
        out.refusal = _no_fix_reason(doc, finding, settings, units)
        return out
    try:
        new = cmd.apply(doc)
    except CommandError as exc:
        change = getattr(cmd, "change", None)
        if change is not None:
            out.change, out.change_lower = float(change.upper), float(change.lower)
        out.refusal = _refusal_text(exc, cmd, max_change, units)
        return out
    change = getattr(cmd, "change", None)
    if change is not None:
        out.change, out.change_lower = float(change.upper), float(change.lower)
    out.note = fix_note(cmd, finding)
    checker = Checker(settings)
    found_before = list(checker.update(doc))
    after = list(checker.update(new))  # incremental: only the changed contours re-checked
    if any(same_place(finding, g) for g in after):
        out.refusal = f"the {finding.kind} is still found after the fix"
        return out
    worse = added_problem(cmd, doc, found_before, new, after)
    if worse is not None:
        out.refusal = f"it would add a {worse} finding in the same outline"
        return out
    out.command, out.after = cmd, new
    out.old_contours, out.new_contours = changed_contours(doc, new)
    return out


@dataclass
class FixAllResult:
    """What "fix all findings of this kind" did.

    Attributes
    ----------
    repair_kind : str or None
        The repair kind run (None: no repair fixes that finding kind).
    command : Command or None
        Every applied fix as one group (one undo step); None when nothing was fixed.
    fixed, refused : int
        Targeted findings fixed and refused.
    largest : float
        Largest measured change of the applied fixes (user units; 0 when none).
    reasons : list of str
        The refusals' one-line reasons, in order.
    """

    repair_kind: str | None
    command: Command | None
    fixed: int
    refused: int
    largest: float
    reasons: list[str]

    def summary(self, units: DisplayUnits, finding_kind: str, scope: str) -> str:
        if self.repair_kind is None:
            return f"Fix all {finding_kind} findings: no repair fixes a {finding_kind}"
        also = ", ".join(TARGETS[self.repair_kind])
        text = (
            f"Fix all {finding_kind} findings ({self.repair_kind}: {also}) in {scope}: "
            f"{self.fixed} fixed, {self.refused} refused"
        )
        if self.fixed:
            text += f"; largest change {change_text(units, self.largest)}"
        if self.reasons:
            text += f" (first refusal: {self.reasons[0]})"
        return text


def fix_all(
    doc: Document,
    finding_kind: str,
    *,
    max_change: float,
    settings: CheckSettings | None = None,
    contours: set[int] | None = None,
    units: DisplayUnits | None = None,
) -> FixAllResult:
    """Run the repair that targets ``finding_kind`` over the document or some contours.

    Parameters
    ----------
    doc : Document
    finding_kind : str
        A finding kind (``kink``, ``gap``, ...); its repair kind is :func:`repair_kind_of`.
    max_change : float
        Allowed shape change per fix, user units.
    settings : CheckSettings, optional
    contours : set of int, optional
        Global contour numbers (the selection); default every contour.
    units : DisplayUnits, optional
        The unit refusals past the allowed change are worded in (default: the library's
        words, in user units).

    Returns
    -------
    FixAllResult
        Counted from :func:`outlinebench.api.repairing.repair_document`'s outcomes for the
        findings of that repair kind.
    """
    kind = repair_kind_of(finding_kind)
    if kind is None:
        return FixAllResult(None, None, 0, 0, 0.0, [])
    run = repair_document(doc, [kind], max_change=max_change, settings=settings, contours=contours)
    targets = set(TARGETS[kind])
    mine = [o for o in run.outcomes if o.kind == kind or (o.finding in targets)]
    fixed = [o for o in mine if o.status == "fixed"]
    refused = [o for o in mine if o.status in ("refused", "left") and o.finding in targets]
    largest = max((o.change or 0.0 for o in fixed), default=0.0)
    command = run.command(f"Fix all {finding_kind} ({kind})") if run.commands else None
    return FixAllResult(
        kind,
        command,
        len(fixed),
        len(refused),
        largest if math.isfinite(largest) else 0.0,
        [_outcome_reason(o, max_change, units) for o in refused],
    )


def _outcome_reason(o, max_change: float, units: DisplayUnits | None) -> str:
    if units is not None and o.change is not None and o.change > max_change:
        return (
            f"the outline would move by up to {change_text(units, o.change)}, more than the "
            f"allowed {change_text(units, max_change)}"
        )
    return o.reason
