"""Check profiles: a named set of tolerances and severities for one trade (``type``, ``cutting``).

The checker (:mod:`outlinebench.diagnostics.checker`) finds the same things for every file;
a profile decides how much each matters to the people who will use the file, and with which
tolerances it is looked for. :func:`check_with_profile` runs the checker with the profile's
tolerances and applies its rules; :func:`apply_profile` applies the rules to findings already
made. The default follows the input (:func:`default_profile_name`): fonts and font sources
get ``type``, everything else ``cutting``.

cutting
    Today's tolerances (:class:`~outlinebench.diagnostics.CheckSettings` defaults, in mm)
    and severities, unchanged: every crossing is an error, because a cutter follows each
    contour on its own and overlapping contours cut into each other.

type
    For glyph outlines, tolerances in font units (converted through the document's scale):

    - points closer than 0.5 unit are the same point (tiny segments, retracted handles);
      open ends up to 10 units apart are a gap; an extremum overshooting its segment's ends
      by 1 unit or more is a missing extremum point. Common type-checking practice, no
      source: outlines live on the integer grid, so less than a unit is below what the
      format can store.
    - Contours of one glyph that cross each other are one ``overlap`` finding per pair of
      contours, at info level: overlapping contours are normal in composite glyphs and in
      sources not yet flattened (remove-overlap is a build step), and font rasterizers fill
      them by the non-zero winding rule (OpenType specification, "glyf": the non-zero rule
      for TrueType outlines; Adobe Technical Note #5177, Type 2 charstrings, for CFF).
      A contour lying inside a contour from another component, winding the same way, is an
      overlap too, not a wrong direction.
    - Contours that only touch at a point (the crossing test sees each segment pair that
      meets there, so two to four "crossings at 0° or 90°") are one ``touch`` finding: info
      between two contours, warning for a contour touching itself (a pinch a rasterizer may
      drop). Common practice, no source.
    - A crossing of a contour with itself stays an error, merged to one finding per point.
    - Curvature jumps are info (glyph outlines are drawn with G1 joins; G2 is not a format
      requirement). Missing extremum points are warnings (common type-checking practice,
      no source: hinting and rasterizers expect on-curve points at x and y extrema).
    - Direction follows the format: TrueType (``glyf``) outer contours run clockwise, so the
      filled area lies to the right of the direction of travel (OpenType specification,
      "glyf — Glyph Data" and its TrueType fundamentals; Apple *TrueType Reference Manual*,
      ch. 1), PostScript outlines (``CFF``, ``CFF2``) and UFO sources counter-clockwise
      (OpenType specification, "CFF", which defers to Adobe TN #5176/#5177 and the Type 1
      convention of Adobe, *Type 1 Font Format*, ch. 3; UFO sources follow the PostScript
      convention by common practice). An outer contour the other way round is a warning
      ``wrong-direction``; a hole winding like its parent stays an error (it fills in).
    - Kinks that rounding the points to the integer grid can cause become ``grid-kink``
      findings at info level (:mod:`outlinebench.diagnostics.grid_rounding`); a kink beyond
      that stays a warning.

Directions are judged in the document's y-down frame; the font reader flips y so a turning
sense on screen is the turning sense in the font (see :mod:`outlinebench.io.font_read`):
clockwise means positive :func:`~outlinebench.geometry.signed_area` there.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
from numpy.typing import NDArray

from outlinebench.diagnostics.checker import check_document
from outlinebench.diagnostics.contour_checks import flattened, point_in_polygon
from outlinebench.diagnostics.findings import INFO, WARNING, Finding
from outlinebench.diagnostics.grid_rounding import grid_kink_findings
from outlinebench.diagnostics.settings import CheckSettings
from outlinebench.errors import OptionError
from outlinebench.geometry import (
    end_tangents,
    evaluate,
    segment_area_terms,
    signed_area,
    to_cubic,
    unit_tangent,
)
from outlinebench.io.font_read import FontSource, GlyphRef, is_font_path
from outlinebench.model.document import Contour, Document

__all__ = [
    "OVERLAP",
    "TOUCH",
    "PROFILE_KINDS",
    "PROFILE_NAMES",
    "CheckProfile",
    "TYPE",
    "CUTTING",
    "PROFILES",
    "get_profile",
    "default_profile_name",
    "profile_settings",
    "direction_convention",
    "outer_direction_findings",
    "merge_crossings",
    "apply_profile",
    "check_with_profile",
]

OVERLAP = "overlap"
TOUCH = "touch"
# Kinds a profile can give findings, beyond the checker's own (for reports and the glossary).
PROFILE_KINDS: tuple[str, ...] = (OVERLAP, TOUCH, "grid-kink")

Direction = Literal["clockwise", "counter-clockwise"]
FloatArray = NDArray[np.float64]

# Parameters this close to 0 or 1 put a crossing at the segment's end (a node).
_NODE_PARAM = 1e-6


@dataclass(frozen=True)
class CheckProfile:
    """A named set of tolerances and severities for one trade.

    Attributes
    ----------
    name : str
        ``"type"`` or ``"cutting"``.
    title : str
        One line for the report header.
    font_units : dict of str to float
        Tolerances in the document's own units (font units for glyphs), converted to mm
        through ``Document.mm_per_unit``: keys are :class:`CheckSettings` fields ending in
        ``_mm``. Empty: the :class:`CheckSettings` defaults in mm.
    settings : dict of str to Any
        Other :class:`CheckSettings` fields (angles, ratios, severities).
    severities : dict of str to str
        Severity given to every finding of a kind.
    overlaps : bool
        Crossings and touches between contours are merged and graded as type outlines need
        (``overlap``, ``touch``); False keeps every crossing as it is found.
    format_direction : bool
        Outer contours must run the way their format says (:func:`direction_convention`).
    grid_rounding : bool
        Kinks that rounding to the grid can cause become ``grid-kink`` findings.
    """

    name: str
    title: str
    font_units: Mapping[str, float] = field(default_factory=dict)
    settings: Mapping[str, Any] = field(default_factory=dict)
    severities: Mapping[str, str] = field(default_factory=dict)
    overlaps: bool = False
    format_direction: bool = False
    grid_rounding: bool = False


TYPE = CheckProfile(
    name="type",
    title=(
        "type: tolerances in font units; overlapping contours are info; outer contours "
        "run the way the format says; kinks from grid rounding are info"
    ),
    font_units={"gap_mm": 0.5, "gap_search_mm": 10.0, "extremum_overshoot_mm": 1.0},
    settings={
        "curvature_jump_severity": INFO,
        "straight_into_curve_severity": INFO,
        "missing_extremum_severity": WARNING,
    },
    severities={"curvature-jump": INFO, "missing-extremum": WARNING},
    overlaps=True,
    format_direction=True,
    grid_rounding=True,
)
CUTTING = CheckProfile(
    name="cutting",
    title="cutting: tolerances in mm; every crossing and overlap is an error",
)
PROFILES: dict[str, CheckProfile] = {p.name: p for p in (TYPE, CUTTING)}
PROFILE_NAMES: tuple[str, ...] = tuple(PROFILES)


def get_profile(name: str | CheckProfile) -> CheckProfile:
    """The profile of that name (a profile is returned as it is).

    Raises
    ------
    ValueError
        An unknown name; the message lists the known ones.
    """
    if isinstance(name, CheckProfile):
        return name
    try:
        return PROFILES[name]
    except KeyError:
        raise OptionError(
            f"unknown check profile {name!r}; choose one of: {', '.join(PROFILE_NAMES)}"
        ) from None


def default_profile_name(source: Document | str | os.PathLike[str] | None) -> str:
    """``"type"`` for a font, a font source or a document read from one; else ``"cutting"``.

    Examples
    --------
    >>> default_profile_name("sign.svg"), default_profile_name("Shop-Regular.ufo")
    ('cutting', 'type')
    """
    if isinstance(source, Document):
        return "type" if isinstance(source.source, FontSource) else "cutting"
    if source is None:
        return "cutting"
    return "type" if is_font_path(source) else "cutting"


def profile_settings(profile: str | CheckProfile, doc: Document) -> CheckSettings:
    """The checker tolerances of a profile for one document.

    Parameters
    ----------
    profile : str or CheckProfile
    doc : Document
        Its ``mm_per_unit`` converts the profile's tolerances in document units to mm.

    Returns
    -------
    CheckSettings
    """
    p = get_profile(profile)
    values: dict[str, Any] = dict(p.settings)
    for name, units in p.font_units.items():
        values[name] = units * doc.mm_per_unit
    return CheckSettings(**values)


def direction_convention(doc: Document) -> Direction | None:
    """Which way outer contours must run for the document's format, or None when it has none.

    ``"clockwise"`` for TrueType (``glyf``) outlines, ``"counter-clockwise"`` for CFF, CFF2
    and UFO sources (see the module docstring for the sources); None for SVG.
    """
    src = doc.source
    if not isinstance(src, FontSource):
        return None
    return "clockwise" if src.flavour == "truetype" else "counter-clockwise"


def _contour_table(doc: Document) -> dict[int, tuple[int, int, Contour]]:
    """Global contour index → (outline index, index in outline, contour)."""
    return {r.global_index: (r.outline, r.index, r.contour) for r in doc.contour_refs()}


def _outline_number(doc: Document, oi: int) -> int:
    o = doc.outlines[oi]
    return o.source_index if o.source_index >= 0 else oi


def outer_direction_findings(
    doc: Document, convention: Direction | None, severity: str = WARNING
) -> list[Finding]:
    """``wrong-direction`` findings for outer contours that run against the convention.

    Parameters
    ----------
    doc : Document
    convention : {"clockwise", "counter-clockwise"} or None
        As seen on screen (y down). None gives no findings.
    severity : str

    Returns
    -------
    list of Finding
        One per closed outer contour (inside no other closed contour of its outline) whose
        signed area has the wrong sign; ``value`` is its area (user²).

    Notes
    -----
    Clockwise on screen is positive signed area in the y-down frame (Green's theorem,
    :func:`~outlinebench.geometry.signed_area`). Containment: a contour's box must lie in
    another's box, then its probe point (segment 0 at t = ½, as the checker's hole test) is
    tested by the even-odd rule against the other contour flattened at the checker's sample
    density (:func:`~outlinebench.diagnostics.contour_checks.point_in_polygon`).
    """
    if convention is None:
        return []
    want = 1.0 if convention == "clockwise" else -1.0
    samples = CheckSettings().samples_per_segment
    refs = [r for r in doc.contour_refs() if r.contour.closed and r.contour.segments]
    if not refs:
        return []
    cubics, first, areas = _closed_contour_arrays(refs)
    counts = np.diff(np.append(first, cubics.shape[0]))
    lo = np.minimum.reduceat(cubics.min(axis=1), first)
    hi = np.maximum.reduceat(cubics.max(axis=1), first)
    out: list[Finding] = []
    wrong = np.flatnonzero((areas != 0.0) & ((areas > 0) != (want > 0)))
    outline_of = np.array([r.outline for r in refs], dtype=np.intp)
    # refs run in document order, so each outline's contours are one stretch of rows
    o_lo = np.searchsorted(outline_of, outline_of, side="left")
    o_hi = np.searchsorted(outline_of, outline_of, side="right")
    for k in wrong.tolist():
        area = float(areas[k])
        oi = int(outline_of[k])
        probe = evaluate(cubics[first[k]], 0.5)
        # closed contours of the same outline whose box holds this one's box
        a, b = int(o_lo[k]), int(o_hi[k])
        others = a + np.flatnonzero(
            np.all(lo[a:b] <= lo[k], axis=1) & np.all(hi[a:b] >= hi[k], axis=1)
        )
        inside = False
        for j in others.tolist():
            if j == k:
                continue
            ring = cubics[first[j] : first[j] + counts[j]]
            if point_in_polygon(probe, flattened(ring, samples)):
                inside = True
                break
        if inside:
            continue
        runs = "clockwise" if area > 0 else "counter-clockwise"
        fmt = "TrueType" if convention == "clockwise" else "PostScript (CFF) and UFO"
        out.append(
            Finding(
                "wrong-direction", severity, _outline_number(doc, oi), refs[k].global_index,
                0, 0.5, float(probe[0]), float(probe[1]), abs(area), "user^2",
                f"outer contour runs {runs}; {fmt} outer contours run {convention}",
            )
        )  # fmt: skip
    return out


# Coordinates beyond this size (relative to a contour's first point) leave the batched area
# to signed_area, which rescales by powers of two (products of such numbers overflow).
_BATCH_AREA_LIMIT = 1e150


def _closed_contour_arrays(
    refs: Sequence[Any],
) -> tuple[FloatArray, NDArray[np.intp], FloatArray]:
    """Every segment of the given contours as cubics ``(M, 4, 2)`` in order, each contour's
    first row, and each contour's exact signed area.

    Notes
    -----
    Lines and quadratics are elevated exactly (Farin, *Curves and Surfaces for CAGD*, §6.1).
    The area is Green's theorem summed over the segments
    (:func:`~outlinebench.geometry.segment_area_terms`, batched over all contours), each
    segment first moved by its contour's first point as
    :func:`~outlinebench.geometry.signed_area` does; contours with coordinates too large for
    the batched products are measured by :func:`~outlinebench.geometry.signed_area` itself.
    """
    segs = [s for r in refs for s in r.contour.segments]
    counts = np.fromiter((len(r.contour.segments) for r in refs), dtype=np.intp, count=len(refs))
    first = (np.cumsum(counts) - counts).astype(np.intp)
    owner = np.repeat(np.arange(len(refs)), counts)
    sizes = np.fromiter((s.shape[0] for s in segs), dtype=np.intp, count=len(segs))
    cubics = np.empty((len(segs), 4, 2))
    origin = np.array([r.contour.segments[0][0] for r in refs], dtype=np.float64)
    terms = np.zeros(len(segs))
    for k in (2, 3, 4):
        rows = np.flatnonzero(sizes == k)
        if rows.size == 0:
            continue
        batch = np.stack([segs[r] for r in rows.tolist()])
        cubics[rows] = to_cubic(batch) if k < 4 else batch
        with np.errstate(over="ignore", invalid="ignore"):
            terms[rows] = segment_area_terms(batch - origin[owner[rows]][:, None, :])
    areas = np.add.reduceat(terms, first) if len(segs) else np.zeros(0)
    # a contour whose last point is not its first is closed by a straight line (SVG "Z"):
    # from the last point to the first, the origin here, its term x_e·0 − y_e·0 is zero
    with np.errstate(over="ignore", invalid="ignore"):
        shift = np.abs(cubics - origin[owner][:, None, :]).max(axis=(1, 2))
    far = np.flatnonzero(
        ~(np.maximum.reduceat(shift, first) < _BATCH_AREA_LIMIT) | ~np.isfinite(areas)
    )
    for k in far.tolist():
        areas[k] = signed_area(list(refs[k].contour.segments))
    return cubics, first, areas


def _rays(contour: Contour, segment: int, t: float) -> list[FloatArray]:
    """Unit directions leaving a crossing point along a contour (two, or one at an open end)."""
    segs = contour.segments
    n = len(segs)
    if t >= 1.0 - _NODE_PARAM:
        before, after = segment, segment + 1
    elif t <= _NODE_PARAM:
        before, after = segment - 1, segment
    else:
        d = unit_tangent(segs[segment], t)
        return [-d, d]
    rays = []
    if before >= 0 or contour.closed:
        rays.append(-end_tangents(segs[before % n])[1])
    if after < n or contour.closed:
        rays.append(end_tangents(segs[after % n])[0])
    return rays


def _crosses(a: list[FloatArray], b: list[FloatArray]) -> bool:
    """Whether two paths through one point cross there: their rays interleave around it."""
    if len(a) != 2 or len(b) != 2:
        return False
    ang = [math.atan2(float(r[1]), float(r[0])) for r in (*a, *b)]
    a0, a1, b0, b1 = ang

    def between(x: float) -> int:  # strictly inside the turn from a0 to a1 (positive sense)
        span = (a1 - a0) % (2 * math.pi)
        off = (x - a0) % (2 * math.pi)
        if off < 1e-9 or abs(off - span) < 1e-9 or off > 2 * math.pi - 1e-9:
            return -1  # tangential: a ray on a ray
        return 1 if off < span else 0

    ib0, ib1 = between(b0), between(b1)
    if -1 in (ib0, ib1):
        return False
    return ib0 != ib1


def _end_distance(t: float | None) -> float:
    """How far a parameter is from the nearer end of its segment (½ when unknown)."""
    return 0.5 if t is None else min(t, 1.0 - t)


def merge_crossings(
    findings: Sequence[Finding], doc: Document, radius: float, between_severity: str = INFO
) -> list[Finding]:
    """Crossing findings merged and graded for type outlines (the ``type`` profile's rule).

    Parameters
    ----------
    findings : sequence of Finding
    doc : Document
    radius : float
        Crossings of the same contour pair closer than this (user units) are one point.
    between_severity : str
        Severity of ``overlap`` and ``touch`` between two contours.

    Returns
    -------
    list of Finding
        Other findings unchanged and in place; the ``self-intersection`` findings replaced,
        at the place of each group's first, by: one ``overlap`` (the pair crosses somewhere)
        or ``touch`` (only touches) per pair of different contours; per point of a contour
        meeting itself, one ``self-intersection`` (it crosses itself there, severity kept)
        or one ``touch`` (warning).

    Notes
    -----
    Whether the paths cross or touch at a point is decided from the directions leaving it:
    two rays along each contour (at a node, the incoming segment reversed and the outgoing
    one); the paths cross when the rays of one separate the rays of the other around the
    point. Rays lying on each other (a shared stretch, a tangency) count as touching.
    """
    table = _contour_table(doc)
    groups: dict[tuple[int, int, int], list[list[Finding]]] = {}
    order: list[tuple[int, int, int] | Finding] = []
    for f in findings:
        if f.kind != "self-intersection" or f.other_contour is None:
            order.append(f)
            continue
        key = (f.outline, min(f.contour, f.other_contour), max(f.contour, f.other_contour))
        if key not in groups:
            groups[key] = []
            order.append(key)
        for cluster in groups[key]:
            if math.hypot(cluster[0].x - f.x, cluster[0].y - f.y) <= radius:
                cluster.append(f)
                break
        else:
            groups[key].append([f])

    def crossing(cluster: list[Finding]) -> bool:
        if len(cluster) == 1 and not any(
            t is not None and (t <= _NODE_PARAM or t >= 1 - _NODE_PARAM)
            for t in (cluster[0].t, cluster[0].other_t)
        ):
            return True  # two segments crossing inside both
        f = min(cluster, key=lambda g: _end_distance(g.t))
        h = min(cluster, key=lambda g: _end_distance(g.other_t))
        if f.contour not in table or h.other_contour not in table:
            return True
        ca = table[f.contour][2]
        cb = table[h.other_contour][2]
        ra = _rays(ca, int(f.segment or 0), float(f.t if f.t is not None else 0.5))
        rb = _rays(
            cb, int(h.other_segment or 0), float(h.other_t if h.other_t is not None else 0.5)
        )
        return _crosses(ra, rb)

    out: list[Finding] = []
    for item in order:
        if isinstance(item, Finding):
            out.append(item)
            continue
        clusters = groups[item]
        first = clusters[0][0]
        kinds = [crossing(c) for c in clusters]
        if first.contour != first.other_contour:
            points = len(clusters)
            angle = max((g.value or 0.0) for c in clusters for g in c)
            other = first.other_contour
            if any(kinds):
                n_cross = sum(kinds)
                text = (
                    f"contour overlaps contour {other} (crossing at {n_cross} point(s)); "
                    "overlapping contours are normal in composite and unflattened glyphs"
                )
                out.append(first._replace(kind=OVERLAP, severity=between_severity,
                                          value=angle, message=text))  # fmt: skip
            else:
                text = f"contour touches contour {other} at {points} point(s) without crossing"
                out.append(first._replace(kind=TOUCH, severity=between_severity,
                                          value=angle, message=text))  # fmt: skip
            continue
        for c, crosses in zip(clusters, kinds, strict=True):
            head = c[0]
            if crosses:
                out.append(head)
            else:
                out.append(
                    head._replace(
                        kind=TOUCH,
                        severity=WARNING,
                        message="contour touches itself at a point without crossing",
                    )
                )
    return out


def _origin(doc: Document, table: dict[int, tuple[int, int, Contour]], g: int) -> object:
    oi, ci, c = table[g]
    ref = doc.outlines[oi].source
    if not isinstance(ref, GlyphRef):
        return None
    for k, read in enumerate(ref.contours):
        if read is c:
            return ref.origins[k] if ref.origins[k] is not None else ""
    return ""


def _grid_steps(doc: Document) -> dict[int, float | None] | None:
    src = doc.source
    if not isinstance(src, FontSource):
        return None
    out: dict[int, float | None] = {}
    for oi, o in enumerate(doc.outlines):
        ref = o.source
        step = ref.grid_step if isinstance(ref, GlyphRef) else src.grid_step
        out[_outline_number(doc, oi)] = step
    return out


def apply_profile(
    findings: Sequence[Finding],
    profile: str | CheckProfile,
    doc: Document,
    *,
    grid_step: float | None | Literal["auto"] = "auto",
) -> list[Finding]:
    """Apply a profile's rules to findings of ``doc``.

    Parameters
    ----------
    findings : sequence of Finding
        From :func:`~outlinebench.diagnostics.check_document` (best with
        :func:`profile_settings`), in its order.
    profile : str or CheckProfile
    doc : Document
    grid_step : float, None or "auto"
        Grid for the ``grid-kink`` rule: "auto" takes it from a font document (1 unit where
        every coordinate of the glyph is an integer), None turns the rule off.

    Returns
    -------
    list of Finding
        ``cutting``: the findings unchanged. ``type``: crossings merged and graded
        (:func:`merge_crossings`), same-direction nesting of contours from different
        components made an ``overlap``, severities by kind, outer contours judged by the
        format's direction (:func:`outer_direction_findings`, added after the outline's
        findings), grid kinks (:func:`~outlinebench.diagnostics.grid_rounding.grid_kink_findings`).
    """
    p = get_profile(profile)
    out = list(findings)
    if p.overlaps:
        radius = p.font_units.get("gap_mm", 0.0)
        out = merge_crossings(out, doc, max(radius, 1e-9))
        table = _contour_table(doc)
        for k, f in enumerate(out):
            if (
                f.kind == "wrong-direction"
                and f.other_contour is not None
                and f.contour in table
                and f.other_contour in table
                and _origin(doc, table, f.contour) != _origin(doc, table, f.other_contour)
            ):
                out[k] = f._replace(
                    kind=OVERLAP,
                    severity=INFO,
                    message=(
                        f"contour lies inside contour {f.other_contour} of another component "
                        "and winds the same way: overlapping components"
                    ),
                )
    if p.severities:
        sev = p.severities
        out = [f._replace(severity=sev[f.kind]) if f.kind in sev and f.severity != sev[f.kind]
               else f for f in out]  # fmt: skip
    if p.format_direction:
        extra = outer_direction_findings(doc, direction_convention(doc))
        if extra:
            out = _insert_by_outline(out, extra)
    if p.grid_rounding:
        steps: Any = _grid_steps(doc) if grid_step == "auto" else grid_step
        out = grid_kink_findings(out, doc, steps)
    return out


def _insert_by_outline(findings: list[Finding], extra: list[Finding]) -> list[Finding]:
    """``extra`` placed after the last finding of the same outline (else at the end)."""
    last: dict[int, int] = {}
    for k, f in enumerate(findings):
        last[f.outline] = k
    after: dict[int, list[Finding]] = {}
    tail: list[Finding] = []
    for f in extra:
        if f.outline in last:
            after.setdefault(last[f.outline], []).append(f)
        else:
            tail.append(f)
    out: list[Finding] = []
    for k, f in enumerate(findings):
        out.append(f)
        out.extend(after.get(k, ()))
    return out + tail


def check_with_profile(
    doc: Document, profile: str | CheckProfile | None = None
) -> tuple[CheckProfile, list[Finding]]:
    """Check a document with a profile's tolerances and rules.

    Parameters
    ----------
    doc : Document
    profile : str, CheckProfile or None
        Default: :func:`default_profile_name` of the document.

    Returns
    -------
    (CheckProfile, list of Finding)
        The profile used (for the report header) and the findings.

    Examples
    --------
    >>> profile, found = check_with_profile(Document())
    >>> profile.name, found
    ('cutting', [])
    """
    p = get_profile(profile if profile is not None else default_profile_name(doc))
    found = check_document(doc, profile_settings(p, doc))
    return p, apply_profile(found, p, doc)
