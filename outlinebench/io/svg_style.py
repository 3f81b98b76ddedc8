"""CSS in SVG files: style sheets, ``style`` attributes and presentation attributes, cascaded.

The reader asks, for each element, the specified value of the few properties that decide
geometry (``display``, ``visibility``, ``transform``, ``transform-origin``, ``font-size``,
``fill-rule`` and the SVG 2 geometry properties ``x``, ``y``, ``width``, ``height``, ``rx``,
``ry``, ``cx``, ``cy``, ``r``). Style sheets are parsed with tinycss2 and their selectors
matched with cssselect2; inheritance is the reader's business (it walks the tree).

Cascade (W3C SVG 2 §6.4 "Presentation attributes"; CSS Cascading and Inheritance Level 4,
§6.1 "Cascade sorting order"): presentation attributes come first, as author declarations of
specificity 0 placed before every style sheet; then the rules of the ``<style>`` sheets by
specificity and, at equal specificity, by order; then the ``style`` attribute; ``!important``
declarations of sheets override every normal declaration, and ``!important`` in a ``style``
attribute overrides those.

References
----------
W3C, *SVG 2*, §6 "Styling" (§6.3 style sheets, §6.4 presentation attributes), §8.5 "The
transform property"; W3C, *CSS Cascading and Inheritance Level 4* §6; W3C, *CSS Transforms
Module Level 1* §7 "The transform-origin property" and §13 "Two Dimensional Transform
Functions"; W3C, *CSS Values and Units Level 3* §6 "Distance units", §7 "Other quantities"
(angles).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

import cssselect2
import numpy as np
import tinycss2
from numpy.typing import NDArray

from outlinebench.errors import SvgReadError

__all__ = ["PROPERTIES", "GEOMETRY_PROPERTIES", "Declared", "StyleResolver", "css_transform"]

# Properties the reader needs. The geometry properties are presentation attributes only on
# the elements that have those attributes (SVG 2 §6.4, table of presentation attributes).
GEOMETRY_PROPERTIES = frozenset({"x", "y", "width", "height", "rx", "ry", "cx", "cy", "r"})
PROPERTIES = (
    frozenset({"display", "visibility", "transform", "transform-origin", "font-size", "fill-rule"})
    | GEOMETRY_PROPERTIES
)

_GEOMETRY_ATTRS = {
    "rect": {"x", "y", "width", "height", "rx", "ry"},
    "circle": {"cx", "cy", "r"},
    "ellipse": {"cx", "cy", "rx", "ry"},
    "image": {"x", "y", "width", "height"},
    "svg": {"x", "y", "width", "height"},
    "symbol": {"x", "y", "width", "height"},
    "use": {"x", "y", "width", "height"},
    "foreignObject": {"x", "y", "width", "height"},
}
_PLAIN_ATTRS = ("display", "visibility", "transform", "transform-origin", "font-size", "fill-rule")

# A declared value: (text, from_css). ``from_css`` tells a ``transform`` written in CSS syntax
# (style sheet or style attribute) from the SVG attribute syntax.
Declared = tuple[str, bool]


def _local(tag: Any) -> str:
    if not isinstance(tag, str):
        return ""
    return tag.rpartition("}")[2]


def _declarations(tokens: Any) -> list[tuple[str, str, bool]]:
    """(name, value text, important) of the declarations we care about, in order."""
    out = []
    for item in tinycss2.parse_blocks_contents(tokens, skip_comments=True, skip_whitespace=True):
        if item.type != "declaration":
            continue
        name = item.lower_name
        if name not in PROPERTIES:
            continue
        value = tinycss2.serialize(item.value).strip()
        out.append((name, value, bool(item.important)))
    return out


_MEDIA_OK = ("", "all", "screen")


class StyleResolver:
    """Specified values of the geometry-deciding properties of each element of one file.

    Parameters
    ----------
    root : Element
        The ``svg`` root of the parsed tree.
    note : callable(level, message, kind)
        Where to report what the sheets hold that is not applied (external ``@import``,
        media other than screen, selectors not understood).
    where : str
        The file name, for messages.
    """

    def __init__(self, root: Any, note: Callable[[str, str, str], None], where: str) -> None:
        self._note = note
        self._where = where
        self._style_cache: dict[str, list[tuple[str, str, bool]]] = {}
        self._matcher: cssselect2.Matcher | None = None
        self._wrappers: dict[int, Any] = {}
        sheets = [
            el
            for el in root.iter()
            if _local(el.tag) == "style"
            and (el.get("type") or "text/css").strip().lower() == "text/css"
        ]
        if sheets:
            self._matcher = cssselect2.Matcher()
            order = 0
            for el in sheets:
                order = self._add_sheet("".join(el.itertext()), order)
            if order == 0:
                self._matcher = None
            else:
                wrapper = cssselect2.ElementWrapper.from_xml_root(root)
                self._wrappers = {id(w.etree_element): w for w in wrapper.iter_subtree()}

    def _add_sheet(self, text: str, order: int) -> int:
        assert self._matcher is not None
        rules = tinycss2.parse_stylesheet(text, skip_comments=True, skip_whitespace=True)
        stack = list(reversed(rules))
        while stack:
            rule = stack.pop()
            if rule.type == "at-rule":
                kw = rule.lower_at_keyword
                if kw == "media":
                    query = tinycss2.serialize(rule.prelude).strip().lower()
                    if query in _MEDIA_OK and rule.content is not None:
                        inner = tinycss2.parse_rule_list(
                            rule.content, skip_comments=True, skip_whitespace=True
                        )
                        stack.extend(reversed(inner))
                    else:
                        self._note(
                            "info",
                            f"{self._where}: <style>: @media {query} rules not applied "
                            "(the drawing is read as on screen)",
                            "css-media",
                        )
                elif kw == "import":
                    self._note(
                        "error",
                        f"{self._where}: <style>: @import of an external style sheet is not "
                        "fetched; styles from it are not applied",
                        "external",
                    )
                continue
            if rule.type != "qualified-rule":
                if rule.type == "error":
                    self._note(
                        "warning",
                        f"{self._where}: <style>: CSS error ({rule.message}); that rule is "
                        "ignored, as CSS requires",
                        "css",
                    )
                continue
            decls = _declarations(rule.content)
            if not decls:
                continue
            try:
                selectors = cssselect2.compile_selector_list(rule.prelude)
            except cssselect2.SelectorError as exc:
                text = tinycss2.serialize(rule.prelude).strip()
                self._note(
                    "warning",
                    f"{self._where}: <style>: selector {text!r} not understood ({exc}); its "
                    "rule is ignored, as CSS requires",
                    "css",
                )
                continue
            for sel in selectors:
                if sel.pseudo_element is not None:
                    continue
                self._matcher.add_selector(sel, (order, decls))
                order += 1
        return order

    def _style_attr(self, text: str) -> list[tuple[str, str, bool]]:
        got = self._style_cache.get(text)
        if got is None:
            got = _declarations(text)
            self._style_cache[text] = got
        return got

    def declared(self, el: Any, tag: str) -> dict[str, Declared]:
        """The cascaded specified values of :data:`PROPERTIES` declared on ``el``.

        Parameters
        ----------
        el : Element
        tag : str
            Its local name (which geometry presentation attributes it has).

        Returns
        -------
        dict
            property -> (value text, from_css); properties not declared are absent (the
            reader applies inheritance and initial values).
        """
        out: dict[str, Declared] = {}
        get = el.get
        for name in _PLAIN_ATTRS:
            v = get(name)
            if v is not None:
                out[name] = (v, False)
        geo = _GEOMETRY_ATTRS.get(tag)
        if geo:
            for name in geo:
                v = get(name)
                if v is not None:
                    out[name] = (v, False)
        style = get("style")
        if self._matcher is None and not style:
            return out
        # (important, level, specificity, order) -> later wins
        ranked: list[tuple[tuple[int, int, tuple[int, int, int], int], str, str]] = []
        if self._matcher is not None:
            w = self._wrappers.get(id(el))
            if w is not None:
                for spec, _order, pseudo, payload in self._matcher.match(w):
                    if pseudo is not None:
                        continue
                    order, decls = payload
                    for name, value, imp in decls:
                        ranked.append(((int(imp), 1, spec, order), name, value))
        if style:
            for k, (name, value, imp) in enumerate(self._style_attr(style)):
                ranked.append(((int(imp), 2, (0, 0, 0), k), name, value))
        ranked.sort(key=lambda r: r[0])
        for _, name, value in ranked:
            if name in GEOMETRY_PROPERTIES and (geo is None or name not in geo):
                continue  # a geometry property applies only to the elements that have it
            out[name] = (value, True)
        return out


# -- CSS transform syntax -------------------------------------------------------------------

_ANGLE = {"deg": math.pi / 180.0, "rad": 1.0, "grad": math.pi / 200.0, "turn": 2.0 * math.pi}


def _angle(tok: Any, where: str) -> float:
    if tok.type == "dimension" and tok.lower_unit in _ANGLE:
        return float(tok.value) * _ANGLE[tok.lower_unit]
    if tok.type == "number" and tok.value == 0:
        return 0.0
    raise SvgReadError(f"{where}: CSS transform: expected an angle, found {tok.serialize()!r}")


def _length(tok: Any, where: str, to_px: Callable[[float, str], float | None]) -> float:
    if tok.type == "number":
        # CSS requires a unit except for zero; unitless lengths are accepted in SVG content
        # by the common renderers (as user units), so they are read as px.
        return float(tok.value)
    if tok.type == "dimension":
        v = to_px(float(tok.value), tok.lower_unit)
        if v is not None:
            return v
    raise SvgReadError(
        f"{where}: CSS transform: expected an absolute length, found {tok.serialize()!r}"
    )


def _number(tok: Any, where: str) -> float:
    if tok.type == "number":
        return float(tok.value)
    if tok.type == "percentage":
        return float(tok.value) / 100.0
    raise SvgReadError(f"{where}: CSS transform: expected a number, found {tok.serialize()!r}")


def _args(fn: Any) -> list[Any]:
    return [
        t
        for t in fn.arguments
        if t.type not in ("whitespace", "comment") and not (t.type == "literal" and t.value == ",")
    ]


def css_transform(
    text: str, where: str, to_px: Callable[[float, str], float | None]
) -> NDArray[np.float64]:
    """The matrix of a CSS ``transform`` value (CSS Transforms 1 §13, 2-D functions).

    Parameters
    ----------
    text : str
        ``none`` or a list of transform functions (``translate(10px, 5px) rotate(30deg)``).
    where : str
        For messages.
    to_px : callable(value, unit) -> float or None
        Converts an absolute length to px (user units); None for a unit it cannot resolve.

    Returns
    -------
    ndarray (3, 3)

    Raises
    ------
    SvgReadError
        Unknown functions, wrong argument counts, percentages in ``translate`` (they refer to
        a reference box this reader does not compute).
    """
    m = np.eye(3)
    if text.strip().lower() == "none":
        return m
    for tok in tinycss2.parse_component_value_list(text, skip_comments=True):
        if tok.type == "whitespace":
            continue
        if tok.type != "function":
            raise SvgReadError(
                f"{where}: CSS transform {text!r}: expected a function, found {tok.serialize()!r}"
            )
        name, a = tok.lower_name, _args(tok)
        k = len(a)
        if name == "matrix" and k == 6:
            v = [_number(t, where) for t in a]
            f = np.array([[v[0], v[2], v[4]], [v[1], v[3], v[5]], [0.0, 0.0, 1.0]])
        elif name in ("translate", "translatex", "translatey") and 1 <= k <= 2:
            if any(t.type == "percentage" for t in a):
                raise SvgReadError(
                    f"{where}: CSS transform {text!r}: percentages in translate are not supported"
                )
            vals = [_length(t, where, to_px) for t in a]
            tx, ty = (vals[0], vals[1] if k == 2 else 0.0) if name == "translate" else (0.0, 0.0)
            if name == "translatex" and k == 1:
                tx = vals[0]
            elif name == "translatey" and k == 1:
                ty = vals[0]
            elif name != "translate":
                raise SvgReadError(f"{where}: CSS transform {text!r}: {name} takes one length")
            f = np.array([[1.0, 0.0, tx], [0.0, 1.0, ty], [0.0, 0.0, 1.0]])
        elif name in ("scale", "scalex", "scaley") and 1 <= k <= 2:
            vals = [_number(t, where) for t in a]
            if name == "scale":
                sx, sy = vals[0], vals[1] if k == 2 else vals[0]
            elif k == 1:
                sx, sy = (vals[0], 1.0) if name == "scalex" else (1.0, vals[0])
            else:
                raise SvgReadError(f"{where}: CSS transform {text!r}: {name} takes one number")
            f = np.diag([sx, sy, 1.0])
        elif name == "rotate" and k == 1:
            r = _angle(a[0], where)
            c, s = math.cos(r), math.sin(r)
            f = np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])
        elif name in ("skew", "skewx", "skewy") and 1 <= k <= (2 if name == "skew" else 1):
            ax = _angle(a[0], where) if name in ("skew", "skewx") else 0.0
            ay = _angle(a[1], where) if name == "skew" and k == 2 else 0.0
            if name == "skewy":
                ay = _angle(a[0], where)
            f = np.array([[1.0, math.tan(ax), 0.0], [math.tan(ay), 1.0, 0.0], [0.0, 0.0, 1.0]])
        else:
            raise SvgReadError(
                f"{where}: CSS transform {text!r}: unknown function or wrong arguments "
                f"{tok.serialize()!r}"
            )
        m = m @ f
    return m
