"""Regression tests of issue 15 in outlinebench/io/_xml.py: what happens to DOCTYPEs."""

import pytest

from outlinebench.errors import UnsafeXmlError
from outlinebench.io import read_svg

BODY = b'<svg xmlns="http://www.w3.org/2000/svg"><path d="M0 0 L1 1"/><path/></svg>'


@pytest.mark.parametrize(
    "doctype",
    [
        b'<!DOCTYPE svg SYSTEM "file:///etc/passwd">',
        b'<!DOCTYPE svg PUBLIC "-//ACME//DTD Sign 1.0//EN" "http://example.invalid/sign.dtd">',
        b"<!DOCTYPE svg SYSTEM 'local.dtd' [<!ELEMENT svg ANY>]>",
    ],
    ids=["system-file", "public-unknown", "system-with-subset"],
)
def test_a_doctype_naming_an_external_dtd_is_refused(doctype):
    # Issue 15: the README says DTDs are refused, yet an external DTD was accepted (never
    # opened). XML 1.0 §2.8: an external DTD subset may declare attribute defaults
    # (§3.3.2), which would change the drawing unseen; it is refused, naming the DTD.
    with pytest.raises(UnsafeXmlError, match="the DOCTYPE names the external DTD"):
        read_svg(b'<?xml version="1.0"?>' + doctype + BODY)


@pytest.mark.parametrize(
    "public",
    [b"-//W3C//DTD SVG 1.0//EN", b"-//W3C//DTD SVG 1.1//EN", b"-//W3C//DTD SVG 1.1 Tiny//EN"],
)
def test_the_w3c_svg_dtds_are_accepted_and_never_fetched(public):
    # SVG 1.1 Second Edition, Appendix A.1 gives this public identifier as the one SVG
    # files declare; its defaults are the specification's, so the file reads as without it.
    doctype = b'<!DOCTYPE svg PUBLIC "' + public + b'" "http://www.w3.org/never-fetched.dtd">'
    res = read_svg(b'<?xml version="1.0"?>' + doctype + BODY)
    plain = read_svg(b'<?xml version="1.0"?>' + BODY)
    assert [len(o.contours) for o in res.document.outlines] == [
        len(o.contours) for o in plain.document.outlines
    ]


def test_an_internal_subset_applies_its_attribute_defaults():
    # XML 1.0 §3.3.2: a default declared in the internal subset is the attribute's value
    # where the element does not set it; the second path gets d from the ATTLIST.
    doctype = b"<!DOCTYPE svg [<!ATTLIST path d CDATA 'M0 0 L9 9'>]>"
    res = read_svg(b'<?xml version="1.0"?>' + doctype + BODY)
    segs = [o.contours[0].segments[0].tolist() for o in res.document.outlines]
    assert segs == [[[0, 0], [1, 1]], [[0, 0], [9, 9]]]
