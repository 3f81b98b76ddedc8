"""Safe XML parsing for SVG files, remembering where each element's tags are in the bytes.

Built on defusedxml's parser (expat underneath): DTD-declared entities are refused unless the
caller allows harmless internal ones, external entities are never resolved or fetched, and the
byte offsets of every start and end tag are kept so the writer can splice changes into the
original bytes and leave everything else exactly as it was.

Document type declarations, exactly:

- a DOCTYPE naming an external DTD (``SYSTEM`` or ``PUBLIC`` identifier) is refused with
  :class:`~outlinebench.errors.UnsafeXmlError`, except the W3C's own SVG 1.0 and 1.1 DTDs
  (:data:`SVG_DTD_PUBLIC_IDS`, the declaration exporters write), which are accepted and never
  fetched: their attribute defaults are the ones the SVG specification states, which the
  reader applies anyway. Another external DTD could declare defaults that change the
  drawing, and reading it would mean opening another file or the network;
- a DOCTYPE without an external identifier (``<!DOCTYPE svg>``, ``<!DOCTYPE svg [ ... ]>``)
  is accepted; in its internal subset, entity declarations are refused unless allowed
  (then short, non-nested internal ones only), parameter entities are always refused, and
  attribute-list declarations apply their defaults as XML 1.0 §3.3.2 requires.

References
----------
defusedxml documentation, "Attack vectors" (billion laughs, quadratic blowup, external entity
expansion, DTD retrieval).
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET
from dataclasses import dataclass, field
from typing import Any

from defusedxml.ElementTree import DefusedXMLParser

from outlinebench.errors import SvgReadError, UnsafeXmlError

__all__ = [
    "one_line",
    "MAX_BYTES",
    "MAX_ENTITY_CHARS",
    "SVG_DTD_PUBLIC_IDS",
    "XmlSource",
    "parse_xml",
]

# Largest file read (bytes): big enough for a tens-of-megabyte path, small enough to refuse
# absurd inputs before reading them.
MAX_BYTES = 256 * 1024 * 1024
# Longest replacement text of one internal entity when entities are allowed (characters);
# with nesting refused this caps expansion at this factor per reference.
MAX_ENTITY_CHARS = 1024
# Public identifiers of the W3C SVG DTDs (SVG 1.0 Recommendation, Appendix A; SVG 1.1 Second
# Edition, Appendix A.1 and the SVG Mobile 1.1 profiles): an external DTD with one of these
# is accepted and never fetched.
SVG_DTD_PUBLIC_IDS = frozenset(
    {
        "-//W3C//DTD SVG 1.0//EN",
        "-//W3C//DTD SVG 1.1//EN",
        "-//W3C//DTD SVG 1.1 Basic//EN",
        "-//W3C//DTD SVG 1.1 Tiny//EN",
        "-//W3C//DTD SVG 1.1 Full//EN",
    }
)


@dataclass
class XmlSource:
    """The parsed tree and what the writer needs to splice into the original bytes.

    Attributes
    ----------
    data : bytes
        The file's bytes as read.
    root : xml.etree.ElementTree.Element
    spans : dict
        ``id(element) -> [start_tag_offset, end_tag_offset]`` byte offsets; for an
        empty-element tag ``<x/>`` the end offset is where that tag ends (which can be where
        the parent's end tag begins), so tell the two kinds apart by the start tag's ``/>``.
    encoding : str
        Declared or detected encoding (the writer splices only ASCII-compatible ones).
    """

    data: bytes
    root: Any
    spans: dict[int, list[int]] = field(default_factory=dict)
    encoding: str = "utf-8"


class _Builder(ET.TreeBuilder):
    """The standard tree builder, told about the DOCTYPE (ElementTree's parser reports it to
    a target's ``doctype`` method; expat's own doctype handler is taken by that parser)."""

    def __init__(self, on_doctype: Any) -> None:
        super().__init__(insert_comments=True, insert_pis=True)
        self.on_doctype = on_doctype

    def doctype(self, name: str, pubid: str | None, system: str | None) -> None:
        self.on_doctype(name, system, pubid)


class _Parser(DefusedXMLParser):
    def __init__(self, allow_entities: bool, max_entity_chars: int, where: str) -> None:
        builder = _Builder(self._doctype)
        super().__init__(target=builder, forbid_dtd=False, forbid_entities=True)
        self.where = where
        self.allow_entities = allow_entities
        self.max_entity_chars = max_entity_chars
        self.spans: dict[int, list[int]] = {}
        p = self.parser
        p.EntityDeclHandler = self._entity_decl
        p.UnparsedEntityDeclHandler = self._unparsed_entity
        p.ExternalEntityRefHandler = self._external_ref
        start, end = p.StartElementHandler, p.EndElementHandler
        spans = self.spans

        def on_start(tag: str, attrs: list[str]) -> Any:
            pos = p.CurrentByteIndex
            el = start(tag, attrs)
            spans[id(el)] = [pos, pos]
            return el

        def on_end(tag: str) -> Any:
            pos = p.CurrentByteIndex
            el = end(tag)
            spans[id(el)][1] = pos
            return el

        p.StartElementHandler = on_start
        p.EndElementHandler = on_end

    def _entity_decl(
        self,
        name: str,
        is_parameter: bool,
        value: str | None,
        base: str | None,
        sysid: str | None,
        pubid: str | None,
        notation: str | None,
    ) -> None:
        w = self.where
        if sysid or pubid or value is None:
            raise UnsafeXmlError(
                f"{w}: external entity {name!r} ({sysid or pubid}) refused: OutlineBench never "
                "reads other files or the network while opening an SVG",
                reason="external",
            )
        if is_parameter:
            raise UnsafeXmlError(f"{w}: parameter entity {name!r} refused", reason="external")
        if not self.allow_entities:
            raise UnsafeXmlError(
                f"{w}: the file declares the internal entity {name!r}; entity declarations are "
                "refused by default (they can expand without bound); harmless ones can be "
                "allowed with an explicit option",
                reason="internal-entity",
            )
        if "&" in value or "%" in value:
            raise UnsafeXmlError(
                f"{w}: entity {name!r} refers to other entities; nested entities are refused "
                "(exponential expansion)",
                reason="nested-entity",
            )
        if len(value) > self.max_entity_chars:
            raise UnsafeXmlError(
                f"{w}: entity {name!r} expands to {len(value)} characters, over the limit of "
                f"{self.max_entity_chars}",
                reason="entity-size",
            )

    def _doctype(self, name: str, sysid: str | None, pubid: str | None) -> None:
        if not (sysid or pubid) or pubid in SVG_DTD_PUBLIC_IDS:
            return
        shown = " ".join(repr(x) for x in (pubid, sysid) if x)
        raise UnsafeXmlError(
            f"{self.where}: the DOCTYPE names the external DTD {shown}; external DTDs are "
            "refused (never fetched: they could change the drawing through attribute "
            "defaults), except the W3C SVG 1.0 and 1.1 DTDs",
            reason="external",
        )

    def _unparsed_entity(self, name: str, *args: Any) -> None:
        raise UnsafeXmlError(
            f"{self.where}: unparsed external entity {name!r} refused", reason="external"
        )

    def _external_ref(self, context: Any, base: Any, sysid: Any, pubid: Any) -> int:
        raise UnsafeXmlError(
            f"{self.where}: external entity reference {sysid or pubid!r} refused (never fetched)",
            reason="external",
        )


def parse_xml(
    data: bytes,
    where: str,
    *,
    allow_entities: bool = False,
    max_entity_chars: int = MAX_ENTITY_CHARS,
) -> XmlSource:
    """Parse XML bytes safely, keeping tag offsets.

    Raises
    ------
    UnsafeXmlError
        Entity declarations (unless allowed and harmless), external entities, a DOCTYPE
        naming an external DTD other than the W3C SVG DTDs (see the module notes).
    SvgReadError
        Malformed XML (message with line and column).
    """
    parser = _Parser(allow_entities, max_entity_chars, where)
    try:
        parser.feed(data)
        root = parser.close()
    except UnsafeXmlError:
        raise
    except ET.ParseError as exc:
        raise SvgReadError(f"{where}: not well-formed XML: {exc}") from None
    except SvgReadError:
        raise
    except Exception as exc:  # defusedxml's own refusals and expat errors
        name = type(exc).__name__
        if name in ("EntitiesForbidden", "ExternalReferenceForbidden", "DTDForbidden"):
            raise UnsafeXmlError(f"{where}: {exc}") from None
        raise SvgReadError(f"{where}: cannot parse XML: {exc}") from None
    encoding = "utf-8"
    head = data[:200]
    if head.startswith((b"\xff\xfe", b"\xfe\xff")) or (len(head) > 1 and head[1:2] == b"\x00"):
        encoding = "utf-16"
    else:
        m = re.match(
            rb"<\?xml[^>]*encoding=[\"']([A-Za-z0-9._-]+)[\"']", head.lstrip(b"\xef\xbb\xbf")
        )
        if m:
            encoding = m.group(1).decode("ascii").lower()
    return XmlSource(data, root, parser.spans, encoding)


_CONTROL_RE = re.compile(r"[\x00-\x1f\x7f\x85\u2028\u2029]")


def one_line(text: str) -> str:
    r"""``text`` with line breaks and other control characters written as escapes.

    An id or name from a file goes into one-line messages; a newline in it (allowed in
    XML attribute values as ``&#10;``) would split the message and could make its second
    line pose as a message about another file. ``"a\nb"`` is written ``a\nb``.

    Examples
    --------
    >>> one_line("logo\nfake.svg: error")
    'logo\\nfake.svg: error'
    """
    return _CONTROL_RE.sub(lambda m: repr(m.group())[1:-1], text)
