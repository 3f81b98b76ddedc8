"""Tests of outlinebench/io/svg_path.py: the path-data grammar, errors, writing, references."""

import math

import numpy as np
import pytest
import svgelements
import svgpathtools
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

from outlinebench.errors import SvgPathError, SvgReadError
from outlinebench.geometry.bezier import derivative
from outlinebench.io import format_path_data, parse_path_data, svg_path
from outlinebench.io.svg_path import read_path_data


def points(d):
    """Every contour as (closed, [control-point lists])."""
    return [(c.closed, [s.tolist() for s in c.segments]) for c in parse_path_data(d)]


def length(contours):
    # Independent length of our geometry: scipy's adaptive quadrature of |B'(t)|.
    total = 0.0
    for c in contours:
        for s in c.segments:
            h = derivative(s, 1)
            k = h.shape[0] - 1

            def speed(t, h=h, k=k):
                coef = [math.comb(k, i) * t**i * (1 - t) ** (k - i) for i in range(k + 1)]
                v = sum(c * p for c, p in zip(coef, h, strict=True))
                return float(np.hypot(*v))

            total += quad(speed, 0, 1, epsabs=1e-13, epsrel=1e-13, limit=200)[0]
    return total


# -- grammar cases of SVG 1.1 §8.3 (BNF in §8.3.9); expected geometry worked by hand from the
#    command definitions in §8.3.2-§8.3.8.
GRAMMAR = [
    # moveto with extra pairs: implicit lineto (§8.3.2)
    ("M1 2 3 4 5 6", [(False, [[[1, 2], [3, 4]], [[3, 4], [5, 6]]])]),
    # relative moveto extra pairs are relative lineto; a leading m is absolute
    ("m1 2 3 4 5 6", [(False, [[[1, 2], [4, 6]], [[4, 6], [9, 12]]])]),
    # H and V, absolute and relative
    (
        "M1 1 H5 v2 h-1 V0",
        [(False, [[[1, 1], [5, 1]], [[5, 1], [5, 3]], [[5, 3], [4, 3]], [[4, 3], [4, 0]]])],
    ),
    # closepath adds the closing line; a command after z starts at the first point (§8.3.3)
    (
        "M0 0 L4 0 L4 4 z l1 1",
        [
            (True, [[[0, 0], [4, 0]], [[4, 0], [4, 4]], [[4, 4], [0, 0]]]),
            (False, [[[0, 0], [1, 1]]]),
        ],
    ),
    # closepath where the last point is already the first: no extra segment
    ("M0 0 L4 0 L0 0 Z", [(True, [[[0, 0], [4, 0]], [[4, 0], [0, 0]]])]),
    # relative moveto after z is relative to the first point of the closed subpath
    (
        "M2 2 l2 0 z m1 1 l1 0",
        [(True, [[[2, 2], [4, 2]], [[4, 2], [2, 2]]]), (False, [[[3, 3], [4, 3]]])],
    ),
    # repeated parameter groups of C; S reflects the previous second handle (§8.3.6)
    (
        "M0 0 C0 1 1 1 1 0 2 -1 3 -1 3 0 S4 1 5 0",
        [
            (
                False,
                [
                    [[0, 0], [0, 1], [1, 1], [1, 0]],
                    [[1, 0], [2, -1], [3, -1], [3, 0]],
                    [[3, 0], [3, 1], [4, 1], [5, 0]],
                ],
            )
        ],
    ),
    # S after a non-cubic: first handle is the current point
    ("M0 0 L1 0 s1 1 2 0", [(False, [[[0, 0], [1, 0]], [[1, 0], [1, 0], [2, 1], [3, 0]]])]),
    # Q then T chain reflecting the control point (§8.3.7)
    (
        "M0 0 Q1 1 2 0 T4 0 T6 0",
        [(False, [[[0, 0], [1, 1], [2, 0]], [[2, 0], [3, -1], [4, 0]], [[4, 0], [5, 1], [6, 0]]])],
    ),
    # T after a non-quadratic: control point is the current point
    ("M0 0 t2 2", [(False, [[[0, 0], [0, 0], [2, 2]]])]),
    # compact numbers: ".5.5" is two numbers, "-.5-.5" too, exponents (§8.3.9 BNF)
    (
        "M.5.5L-.5-.5l1e-3-1E+1",
        [(False, [[[0.5, 0.5], [-0.5, -0.5]], [[-0.5, -0.5], [-0.499, -10.5]]])],
    ),
    # commas and mixed separators
    ("M 1,2 L3 , 4\t5\n6", [(False, [[[1, 2], [3, 4]], [[3, 4], [5, 6]]])]),
    # a bare moveto makes no contour; empty data is no path
    ("M1 1", []),
    ("", []),
    ("  \n", []),
]


@pytest.mark.parametrize(("d", "expected"), GRAMMAR)
def test_grammar_cases_give_the_expected_geometry(d, expected):
    assert points(d) == expected


def test_arc_flags_without_separators_are_single_characters():
    # SVG 2 §9.3.9: flags are one character each, so "00.5.5" is 0, 0, .5, .5 and
    # "0110 0" is 0, 1, 10, 0. Expected end points from that reading.
    (c,) = parse_path_data("M0 0 a1 1 0 00.5.5")
    assert c.segments[-1][-1].tolist() == [0.5, 0.5]
    (c,) = parse_path_data("M0 0 A5 5 0 0110 0")
    assert c.segments[-1][-1].tolist() == [10.0, 0.0]
    # sweep flag 1 from (0,0) to (10,0) with r=5 goes through y = -5 (positive angle direction
    # in y-down coordinates is clockwise on screen); the half circle's top is (5, -5).
    pts = np.concatenate([s for s in c.segments])
    assert pts[:, 1].min() == pytest.approx(-5.0 * (1 + 1e-3), rel=1e-2)


def test_arc_special_cases_follow_the_implementation_notes():
    # SVG 1.1 F.6.2: equal end points omit the arc; a zero radius is a straight line.
    res = read_path_data("M1 1 A5 5 0 0 1 1 1 L2 2")
    assert [c.kinds() for c in res.contours] == [["line"]]
    assert res.counts["arc_omitted"] == 1
    res = read_path_data("M1 1 A0 5 0 0 1 3 3")
    assert [s.tolist() for s in res.contours[0].segments] == [[[1, 1], [3, 3]]]
    # F.6.6: negative radii take their absolute value (noted).
    a = read_path_data("M0 0 A-5 -5 0 0 1 10 0")
    b = read_path_data("M0 0 A5 5 0 0 1 10 0")
    assert a.counts["arc_negative_radius"] == 1
    for s, t in zip(a.contours[0].segments, b.contours[0].segments, strict=True):
        assert np.array_equal(s, t)
    # F.6.6: radii too small are scaled up so the arc reaches the end point: a half circle
    # of radius 5 between (0,0) and (10,0).
    c = read_path_data("M0 0 A1 1 0 0 1 10 0")
    assert c.counts["arc_radii_scaled"] == 1
    assert length(c.contours) == pytest.approx(5 * math.pi, rel=1e-7)


@pytest.mark.parametrize(
    ("d", "offset", "token"),
    [
        # Numbers are ASCII only (SVG 1.1 §8.3.9 BNF: digit ::= "0"..."9").
        ("M0 0 L1 nan", 8, "nan"),
        ("M0 0 L1 inf", 8, "inf"),
        ("M0 0 L1 1_000", 9, "_000"),
        ("M0 0 L1 \uff11", 8, "\uff11"),  # fullwidth digit one
        ("M0 0 L1 \u0663", 8, "\u0663"),  # Arabic-Indic digit three
        ("M0 0 L1\u00a02", 7, "\u00a02"),  # no-break space is not white space in SVG
        ("M0 0 L1 x", 8, "x"),
        ("M0 0 L1,,2", 8, ","),
        ("M0 0 L,1 2", 6, ","),
        ("M0 0 L1 2,", 10, ""),
        ("M0 0 L1 2, L3 4", 11, "L"),
        ("M0 0 L1 2 3", 11, ""),
        ("M0 0 Z 5", 7, "5"),
        ("L1 2", 0, "L"),
        ("x", 0, "x"),
        ("M0 0 A1 1 0 2 0 3 3", 12, "2"),
        ("M0 0 L1e 2", 7, "e"),
    ],
)
def test_bad_data_reports_offset_and_token(d, offset, token):
    with pytest.raises(SvgPathError) as info:
        parse_path_data(d)
    assert info.value.offset == offset
    assert info.value.token.startswith(token)
    assert f"at offset {offset}" in str(info.value)


def test_overflowing_number_is_refused():
    # 1e999 overflows a double; Python's float() would give inf silently.
    with pytest.raises(SvgPathError, match="out of range at offset 8, found '1e999'"):
        parse_path_data("M0 0 L1 1e999")


# Each number below is a finite double, but a sum, a reflection, an arc's centre or a
# transform of them is not: IEEE 754 binary64 ends at about 1.797e308 (sys.float_info.max),
# so 1e308 + 1e308 is inf. Padding with lines puts the same data through the vectorised
# builder (more than 2,048 characters) as well as the sequential one.
_PAD = " L0 0" * 500


@pytest.mark.parametrize("pad", ["", _PAD], ids=["short", "long"])
@pytest.mark.parametrize(
    ("tail", "command"),
    [
        ("M1e308 0 l1e308 0", "l1e308"),  # relative sum overflows
        ("M1e308 0 C0 0 -1.7e308 0 1.5e308 0 S0 0 0 0", "S0"),  # reflected handle overflows
        ("M-1e308 1e308 A1 1 0 0 0 1e308 1e308", "A1"),  # scaled radius: bulges to y = 2e308
        ("M0 0 A1e308 1e308 0 1 1 1e308 0", "A1e308"),  # arc: its far side is beyond 1.8e308
    ],
)
def test_coordinates_that_overflow_are_an_error_at_their_command(pad, tail, command):
    d = "M0 0 L1 1" + pad + " " + tail + " L2 2"
    res = read_path_data(d)
    assert isinstance(res.error, SvgPathError)
    offset = d.index(command)
    assert res.error.offset == offset
    assert str(res.error).startswith(f"coordinates overflow at offset {offset}, found ")
    # Everything before that command is kept (SVG 2 §9.5.4), and every kept number is finite.
    kept = [s for c in res.contours for s in c.segments]
    assert kept[0].tolist() == [[0, 0], [1, 1]]
    assert all(np.all(np.isfinite(s)) for s in kept)
    assert len(kept) == 1 + 500 * bool(pad) + ("C0" in tail)


def test_a_transform_that_overflows_the_coordinates_is_an_error():
    m = np.diag([1e300, 1e300, 1.0])  # 1e300 · 1e10 overflows binary64
    res = read_path_data("M0 0 L1 1 L1e10 0", matrix=m)
    assert res.error is not None and res.error.offset == 10
    assert [s.tolist() for s in res.contours[0].segments] == [[[0, 0], [1e300, 1e300]]]


@pytest.mark.parametrize(
    "d", ["M0 0 L1 1 A5 5 0 0110 1e999", "M0 0 L1 1 A5 5 0 0 1 2 2 5 5 0 1010 1e999 L3 3"]
)
def test_overflowing_number_after_packed_arc_flags_is_found(d):
    # Arc flags are single characters (SVG 2 §9.3.8 grammar), so "0110" is two flags and a
    # 10; the overflow's offset must count them that way (it used to raise an IndexError).
    res = read_path_data(d)
    offset = d.index("1e999")
    assert res.error is not None and res.error.offset == offset
    assert str(res.error) == f"number out of range at offset {offset}, found '1e999'"
    assert sum(len(c.segments) for c in res.contours) == 1 + ("2 2" in d)


def test_message_names_what_was_expected():
    # Wording pinned by the project style guide ("expected a number at offset 17, found 'x'").
    with pytest.raises(SvgPathError, match=r"^expected a number at offset 17, found 'x'$"):
        parse_path_data("M 10 10 L 20 200 x")


def test_everything_before_the_error_is_kept():
    # SVG 2 §9.5.4: render up to the last complete segment before the error.
    res = read_path_data("M0 0 L1 0 L1 1 2 2 L3")
    assert res.error is not None and res.error.offset == 21
    assert [s.tolist() for s in res.contours[0].segments] == [
        [[0, 0], [1, 0]],
        [[1, 0], [1, 1]],
        [[1, 1], [2, 2]],
    ]


def test_trailing_dot_numbers_are_read_with_a_count():
    # "23." is a number in SVG 1.1's BNF (digit-sequence ".") but not in SVG 2.
    res = read_path_data("M23. 4 L5. 6.e1")
    assert res.error is None and res.counts["trailing_dot"] == 3
    assert res.contours[0].segments[0].tolist() == [[23, 4], [5, 60]]


REFERENCE_STRINGS = [
    "M0 0 L10 0 Q15 0 15 5 C15 10 10 15 5 15 Z",
    "M.5.5-.5-.5l1e-3,2e+1c.1.2.3.4.5.6s1-1 2-2Q3 3 4 4T5 5 6 6",
    "m10 10 h20 v20 h-20 z m5 5 c1 2 3 4 5 6 s7 8 9 10",
    "M0 0 A5 3 30 0 1 10 0 a4 4 0 1 0 -6 -6",
    "M0 0 a1 1 0 00.5.5A5 5 0 0110 0",
    "M3 3 A40 20 -45 1 1 80 50 L90 90 A10 30 90 0 0 10 100 Z",
]


@pytest.mark.parametrize("d", REFERENCE_STRINGS)
def test_lengths_agree_with_svgelements_and_svgpathtools(d):
    # Reference libraries parse the same strings; arcs are exact ellipse arcs there, cubics
    # within 1e-7 of the radius here, so lengths agree to about 1e-7 relative.
    ours = length(parse_path_data(d))
    ref_se = svgelements.Path(d).length(error=1e-12)
    ref_spt = svgpathtools.parse_path(d).length(error=1e-12)
    assert ours == pytest.approx(ref_se, rel=2e-7)
    assert ours == pytest.approx(ref_spt, rel=2e-7)


# -- property tests ------------------------------------------------------------------------
_coord = st.integers(-2000, 2000).map(lambda k: k / 8)


def _num(x):
    text = repr(x)
    return text[:-2] if text.endswith(".0") else text


def _compact_join(texts):
    """Join numbers the way size-minded exporters do: no separator where the grammar's
    longest match already ends a number (before a sign, or before "." after a "." or "e")."""
    out = texts[0]
    for prev, t in zip(texts, texts[1:], strict=False):
        glued = t[0] in "+-" or (t[0] == "." and ("." in prev or "e" in prev))
        out += t if glued else " " + t
    return out


def _short(text):
    # "0.5" → ".5", "-0.5" → "-.5" (both valid numbers in the BNF).
    if text.startswith("0."):
        return text[1:]
    if text.startswith("-0."):
        return "-" + text[2:]
    return text


@st.composite
def path_strings(draw, arcs=False):
    """Random valid path data (no arcs unless asked)."""
    letters = "LlHhVvCcSsQqTt" + ("Aa" if arcs else "")
    arity = {"L": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "T": 2, "A": 7}
    parts = [f"M{_num(draw(_coord))} {_num(draw(_coord))}"]
    for _ in range(draw(st.integers(1, 12))):
        c = draw(st.sampled_from(letters + "zM"))
        if c == "z":
            parts.append(draw(st.sampled_from(["z", "Z"])))
            continue
        if c == "M":
            parts.append(f"{draw(st.sampled_from('Mm'))}{_num(draw(_coord))},{_num(draw(_coord))}")
            continue
        groups = []
        for _ in range(draw(st.integers(1, 3))):
            vals = [_num(draw(_coord)) for _ in range(arity[c.upper()])]
            if c.upper() == "A":
                vals[0] = _num(abs(float(vals[0])) + 1)
                vals[1] = _num(abs(float(vals[1])) + 1)
                vals[3] = draw(st.sampled_from("01"))
                vals[4] = draw(st.sampled_from("01"))
            if draw(st.booleans()) and c.upper() != "A":
                groups.append(_compact_join([_short(v) for v in vals]))
            else:
                groups.append(draw(st.sampled_from([" ", ","])).join(vals))
        parts.append(c + " ".join(groups))
    return draw(st.sampled_from([" ", "", "\n"])).join(parts)


def _reference_segments(d):
    out = []
    for seg in svgpathtools.parse_path(d):
        name = type(seg).__name__
        if name == "Line":
            pts = [seg.start, seg.end]
        elif name == "QuadraticBezier":
            pts = [seg.start, seg.control, seg.end]
        else:
            pts = [seg.start, seg.control1, seg.control2, seg.end]
        out.append([[p.real, p.imag] for p in pts])
    return out


@given(path_strings())
def test_random_valid_data_matches_svgpathtools(d):
    # Reference: svgpathtools' parser on the same string (control points, in order). Not
    # svgelements here: it reflects a cubic's handle for a T after S, where SVG 1.1 §8.3.7
    # says the control point is the current point.
    ours = [s.tolist() for c in parse_path_data(d) for s in c.segments]
    ref = _reference_segments(d)
    assert len(ours) == len(ref)
    for a, b in zip(ours, ref, strict=True):
        np.testing.assert_allclose(a, b, rtol=1e-12, atol=1e-9)


@settings(max_examples=25)
@given(path_strings(arcs=True))
def test_random_data_with_arcs_has_svgpathtools_length(d):
    # Arc lengths: svgpathtools integrates the true ellipse arc; ours are cubics within
    # 1e-7 of the radius (radii here are at most ~250, so 1e-4 absolute covers it).
    # (svgpathtools rather than svgelements: see the note on S/T reflection above.)
    ref = svgpathtools.parse_path(d).length(error=1e-9)
    assert length(parse_path_data(d)) == pytest.approx(ref, rel=1e-6, abs=1e-4)


_junk_chars = st.text(
    alphabet="MmLlHhCcSsQqTtAaZzVv0123456789.,-+eE \t\n x_\u00a0\uff11", max_size=40
)
# Whole tokens random characters rarely make: numbers at and past the edge of a double
# (overflow, subnormals), packed arc flags, and arcs with extreme radii.
_junk_tokens = st.lists(
    st.sampled_from(
        [
            "1e999",
            "1e308",
            "-1.7e308",
            "4e-320",
            "1e-300",
            "0110",
            "A1 1 0 ",
            "a1e-300 1 0 ",
            "A1e308 1e308 0 1 1 ",
            "l",
            "c",
            "s",
            "t",
            "z",
            " ",
            ",",
            "5",
            "23.",
        ]
    ),
    max_size=16,
).map("".join)
_junk = st.one_of(_junk_chars, _junk_tokens.map(lambda t: "M0 0" + t))


@given(_junk)
def test_random_text_raises_only_our_read_error(d):
    # Invalid data raises SvgReadError (SvgPathError) and nothing else.
    try:
        parse_path_data(d)
    except SvgReadError as exc:
        assert isinstance(exc, SvgPathError)
        assert 0 <= exc.offset <= len(d)


@given(path_strings(arcs=True))
def test_written_data_reads_back_bit_identical(d):
    # Round trip: format_path_data then parse gives the same floats (shortest repr digits).
    first = parse_path_data(d)
    again = parse_path_data(format_path_data(first))
    assert len(first) == len(again)
    for a, b in zip(first, again, strict=True):
        assert a.closed == b.closed
        assert len(a.segments) == len(b.segments)
        for s, t in zip(a.segments, b.segments, strict=True):
            assert np.array_equal(s, t)


def test_written_data_is_plain():
    # Style asked of the writer (issue: many machine parsers choke on anything fancier):
    # absolute commands, positional numbers with the shortest round-trip digits (Python's
    # repr), no exponent, no "-0", no trailing ".". Expected strings worked by hand.
    text = format_path_data(parse_path_data("m1e-9 -0 l1e21 0 l-2e-9 5z"))
    assert text == "M0.000000001 0 L1000000000000000000000 0 L1000000000000000000000 5 Z"
    text = format_path_data(parse_path_data("M-0 -0.0 L1.5e-7 -2.50 Q .1 .2 .30000000000000004 3"))
    assert text == "M0 0 L0.00000015 -2.5 Q0.1 0.2 0.30000000000000004 3"


def test_a_long_path_reads_in_one_pass():
    # Tens of megabytes in production; 100,000 segments here keep the test fast. Both the
    # separated form (fast lexer) and the compact form (general lexer) must read fully.
    n = 100_000
    rng = np.random.default_rng(7)
    xy = np.round(rng.uniform(0, 100, size=(n, 2)), 3)
    spaced = "M0 0 " + " ".join(f"L{x} {y}" for x, y in xy)
    compact = "M0 0l" + "".join(f"{x:+.3f}{y:+.3f}" for x, y in xy)
    a = parse_path_data(spaced)
    b = parse_path_data(compact)
    assert len(a[0].segments) == n and len(b[0].segments) == n
    assert np.array_equal(a[0].segments[-1][1], xy[-1])


_lexer_text = st.one_of(
    path_strings(arcs=True),
    st.text(alphabet="MmLlHhCcAaZz0123456789.,-+eE \n", max_size=40).map(lambda t: "M0 0" + t),
)


@given(_lexer_text)
def test_fast_lexer_agrees_with_the_general_lexer(d):
    # The whole-string lexer must give exactly what the per-command lexer gives whenever it
    # accepts the data (it hands everything else to the general one). Our own invariant.
    fast = svg_path._lex_fast(d)
    if fast is None:
        return
    general = svg_path._lex_general(d)
    assert general.error is None
    assert fast.commands == general.commands
    assert fast.counts.tolist() == general.counts.tolist()
    assert np.array_equal(fast.numbers, general.numbers)
    assert fast.trailing_dot == general.trailing_dot


@given(path_strings(arcs=True), st.booleans())
def test_sequential_and_vectorised_builders_agree_bit_for_bit(d, transformed):
    # Short data is built by a sequential twin of the whole-array builder; both must give
    # the same floats (our own invariant; the arithmetic is the same in the same order).
    m = np.array([[0.3, -1.7, 5.0], [2.1, 0.9, -3.0], [0, 0, 1.0]]) if transformed else None
    tok = svg_path._lex_general(d)
    a, ca = svg_path._build_small(tok, m, svg_path.ARC_TOLERANCE)
    b, cb = svg_path._build(tok, m, svg_path.ARC_TOLERANCE)
    assert ca == cb and len(a) == len(b)
    for x, y in zip(a, b, strict=True):
        assert x.closed == y.closed and len(x.segments) == len(y.segments)
        for s, t in zip(x.segments, y.segments, strict=True):
            assert s.tobytes() == t.tobytes()


_decimal_text = st.one_of(
    st.floats(allow_nan=False, allow_infinity=False).map(repr),
    st.decimals(-1e6, 1e6, allow_nan=False, allow_infinity=False, places=3).map(str),
    st.decimals(-10, 10, allow_nan=False, allow_infinity=False, places=9).map(str),
    st.sampled_from(
        [
            "-0",
            "-0.0",
            "+0",
            "0.",
            "-.5",
            "+.25",
            "5.",
            "9007199254740993",
            "123456789012345.6",
            "0.30000000000000004",
            "00012.50",
        ]
    ),
)


@given(st.lists(_decimal_text, min_size=2, max_size=12).filter(lambda v: len(v) % 2 == 0))
def test_numbers_read_exactly_as_python_float(texts):
    # Reference: Python's float() (correctly rounded, David Gay's dtoa) on each token; the
    # fast lexer's integer route must give the same bits, negative zero included.
    d = "M" + " ".join(texts)
    got = svg_path._lex_fast(d)
    tok = got if got is not None else svg_path._lex_general(d)
    want = np.array([float(t) for t in texts])
    assert tok.numbers.tobytes() == want.tobytes()
