"""Input generators for fuzzing: grammar-aware SVG path data and mutated whole documents.

Shared by the seeded property tests in ``tests/fuzz/`` and by the large-budget campaign
``benchmarks/fuzz/campaign.py``. Every generator is a plain function of a
:class:`random.Random`, so one seed always gives the same input (the campaign prints the
seed of every failing input, and ``campaign.py --replay SEED`` rebuilds it); the hypothesis
strategies at the end wrap them.

Path data follows the BNF of W3C SVG 1.1 §8.3.9 and SVG 2 §9.3.9 ("The grammar for path
data"): commands ``MmZzLlHhVvCcSsQqTtAa``, implicit repetition of parameter groups,
comma-wsp separators, compact numbers (``.5.5``, ``1-2``, ``1e-3``) and single-character arc
flags. A small share of the generated data is then broken (a character deleted, inserted or
replaced, a lone sign, an out-of-range number, a trailing comma), since the reader's
behaviour on errors (SVG 2 §9.5.4, "render up to the error") is what is tested.

Document mutations start from the sample files in ``samples/``: bit flips, truncation,
inserted XML constructs (comments, CDATA, processing instructions, DOCTYPEs with internal
and external subsets, entity declarations and references), deep nesting, huge attributes,
transforms with zeros and extreme scales, ``use`` cycles and chains, extreme numbers,
ids holding newlines, declared encodings, degenerate contours.
"""

from __future__ import annotations

import random
import re
from pathlib import Path

__all__ = [
    "SAMPLES",
    "sample_bytes",
    "random_number",
    "random_path_data",
    "break_path_data",
    "mutate_document",
    "MUTATIONS",
    "path_data_strategy",
    "document_strategy",
]

SAMPLES = Path(__file__).resolve().parents[2] / "samples"
_SVG_NS = "http://www.w3.org/2000/svg"

_COMMANDS = "MmZzLlHhVvCcSsQqTtAa"
_ARITY = {"M": 2, "L": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "T": 2, "A": 7, "Z": 0}
_WSP = [" ", " ", " ", "  ", "\t", "\n", "\r\n", "\f"]
# Numbers at the edges of IEEE 754 binary64: the largest finite, the smallest normal and
# subnormal, values that overflow or underflow when read, and negative zero.
_EXTREME = [
    "0", "-0", "1e308", "-1e308", "1.7976931348623157e308", "2.2250738585072014e-308",
    "5e-324", "1e-320", "1e-400", "1e400", "1e999", "-1e999", "9007199254740993",
    "123456789012345678901234567890", "0.000000000000000000000000000001", "1e300", "-1e300",
    "1e-300", "1e20", "1e-20",
]  # fmt: skip


def sample_bytes() -> list[bytes]:
    """The bytes of every ``samples/*.svg`` file, sorted by name."""
    return [p.read_bytes() for p in sorted(SAMPLES.glob("*.svg"))]


def random_number(rng: random.Random, extreme: float = 0.05) -> str:
    """One number token of the path grammar, in one of its written forms."""
    r = rng.random()
    if r < extreme:
        return rng.choice(_EXTREME)
    if r < 0.3:
        text = str(rng.randint(-200, 200))
    elif r < 0.7:
        text = f"{rng.uniform(-200, 200):.{rng.randint(0, 6)}f}"
    elif r < 0.8:
        text = f"{rng.uniform(-9, 9):.{rng.randint(1, 4)}f}e{rng.randint(-12, 12)}"
    elif r < 0.9:
        # compact forms: ".5", "-.25", "3."
        text = rng.choice([".", "-.", "+."]) + str(rng.randint(0, 999))
        if rng.random() < 0.3:
            text = str(rng.randint(0, 99)) + "."
    else:
        text = repr(rng.uniform(-1e3, 1e3))
    return text


def _sep(rng: random.Random, prev: str, nxt: str) -> str:
    """A comma-wsp between two numbers, or nothing where the grammar allows it."""
    r = rng.random()
    # No separator is valid when the next token starts with a sign, or with "." after a
    # number that already holds a "." or an exponent (longest match, SVG 1.1 §8.3.9).
    if r < 0.2 and (nxt[:1] in "+-" or (nxt[:1] == "." and ("." in prev or "e" in prev))):
        return ""
    if r < 0.45:
        return ","
    if r < 0.55:
        return rng.choice(_WSP) + "," + rng.choice(["", " "])
    return rng.choice(_WSP)


def _params(rng: random.Random, letter: str) -> list[str]:
    up = letter.upper()
    if up == "A":
        r = rng.random()
        if r < 0.1:
            rx = ry = rng.choice(["1e300", "1e20", "1e308", "5e-324", "0", "1e-300"])
        elif r < 0.2:
            rx, ry = rng.choice(["-5", "-.5", "0"]), random_number(rng)
        else:
            rx, ry = random_number(rng, 0.02), random_number(rng, 0.02)
        return [
            rx,
            ry,
            random_number(rng, 0.02),
            rng.choice("01"),
            rng.choice("01"),
            random_number(rng),
            random_number(rng),
        ]
    return [random_number(rng) for _ in range(_ARITY[up])]


def random_path_data(rng: random.Random, max_commands: int = 12, long: bool = False) -> str:
    """Valid path data by the SVG path grammar (before any break is applied).

    Parameters
    ----------
    rng : random.Random
    max_commands : int
        Most command letters written.
    long : bool
        Repeat the data until it is over 2,048 characters (the reader's long-data route).
    """
    out = [rng.choice(["", " ", "\n  "]), rng.choice("Mm")]
    first = True
    n = rng.randint(1, max_commands)
    for _ in range(n):
        letter = out[-1] if first else rng.choice(_COMMANDS)
        if not first:
            out.append(rng.choice(["", " ", "\n"]) + letter + rng.choice(["", "", " "]))
        first = False
        arity = _ARITY[letter.upper()]
        if not arity:
            continue
        groups = 1 if rng.random() < 0.7 else rng.randint(2, 4)
        prev = ""
        pieces: list[str] = []
        for _ in range(groups):
            params = _params(rng, letter)
            for j, p in enumerate(params):
                if pieces:
                    # Arc flags may be written without any separator (SVG 2 §9.3.9).
                    flag_glue = letter.upper() == "A" and (j in (4, 5)) and rng.random() < 0.3
                    pieces.append("" if flag_glue else _sep(rng, prev, p))
                pieces.append(p)
                prev = p
        out.append("".join(pieces))
    d = "".join(out) + rng.choice(["", "", " ", "\n"])
    if long:
        body = d.strip()
        rest = body[1:].lstrip()
        while len(d) <= 2100:
            d += " " + (rng.choice("Ll") + " 1 2 " if rng.random() < 0.5 else "M") + rest
    return d


def break_path_data(rng: random.Random, d: str) -> str:
    """One error put into path data: a character changed, a lone sign, an overflowing
    number, a trailing comma, a cut, a stray letter."""
    if not d:
        return rng.choice(["-", ",", "x", "M", "z"])
    k = rng.randrange(len(d) + 1)
    r = rng.random()
    if r < 0.15:
        return d[:k] + rng.choice(["-", "+", " - ", " + ", "."]) + d[k:]
    if r < 0.3:
        return d[:k] + rng.choice([" 1e999", " -1e400 ", "1e309", " 1e-999"]) + d[k:]
    if r < 0.45:
        return d.rstrip() + rng.choice([",", " ,", ", ", ",,"])
    if r < 0.55:
        return d[:k]
    if r < 0.7:
        return d[:k] + rng.choice("xX#(),;eE.0A1zZ") + d[k:]
    if r < 0.85:
        return d[:k] + d[k + 1 :]
    return d[:k] + rng.choice(["e", "E", "e+", ".", ",", "--"]) + d[k:]


# -- documents ---------------------------------------------------------------------------------
def _svg(body: str, attrs: str = "", head: str = "") -> bytes:
    return (
        f'<?xml version="1.0" encoding="UTF-8"?>{head}\n'
        f'<svg xmlns="{_SVG_NS}" xmlns:xlink="http://www.w3.org/1999/xlink" '
        f'width="100mm" height="100mm" viewBox="0 0 100 100"{attrs}>\n{body}\n</svg>\n'
    ).encode()


def _bit_flips(rng: random.Random, data: bytes) -> bytes:
    b = bytearray(data)
    for _ in range(rng.randint(1, 8)):
        i = rng.randrange(len(b))
        b[i] ^= 1 << rng.randrange(8)
    return bytes(b)


def _byte_edits(rng: random.Random, data: bytes) -> bytes:
    b = bytearray(data)
    for _ in range(rng.randint(1, 6)):
        i = rng.randrange(len(b) + 1)
        r = rng.random()
        if r < 0.4:
            b[i:i] = bytes([rng.randrange(256)])
        elif r < 0.7 and i < len(b):
            del b[i]
        elif i < len(b):
            b[i] = rng.choice(b"<>&\"'=/;#-.0 eE\x00\xff\xc3")
    return bytes(b)


def _truncate(rng: random.Random, data: bytes) -> bytes:
    return data[: rng.randrange(len(data) + 1)]


_CONSTRUCTS = [
    b"<!-- a comment -- with dashes -->",
    b"<![CDATA[ <path d='M0 0 L1 1'/> ]]>",
    b"<?pi some processing instruction?>",
    b"&amp;&lt;&#65;&#x42;",
    b"&undefined;",
    b"&#0;",
    b"&#xD800;",
    b"<text>label</text>",
    b"<image href='data:,x'/>",
    b"<path/>",
    b"<path d=''/>",
    b"<path d='M5 5 L5 5'/>",
    b"<path d='M5 5 C5 5 5 5 5 5 Z'/>",
    b"<path d='M5 5 Z M5 5 z'/>",
    b"<path d='M0 0 L10 0 L10 10 L0 10 Z' transform='scale(0)'/>",
    b"<path d='M0 0 L10 0 L10 10 L0 10 Z' transform='scale(1e-200)'/>",
    b"<path d='M0 0 L10 0 L10 10 L0 10 Z' transform='scale(1e300)'/>",
    b"<path d='M0 0 L10 0 L10 10 L0 10 Z' transform='matrix(0 0 0 0 0 0)'/>",
    b"<path d='M0 0 L10 0 L10 10 L0 10 Z' transform='matrix(1 0 0 0 5 5)'/>",
    b"<path d='M1e-320 0 L3e-320 0 L3e-320 2e-320 Z'/>",
    b"<path d='M1e308 1e308 L-1e308 1e308 L-1e308 -1e308 Z'/>",
    b"<path d='M0 0 A1e300 1e300 0 0 1 10 0 L10 10 L0 10 Z'/>",
    b"<path d='M0 0 A1e308 1e308 0 1 1 10 0 L10 10 Z'/>",
    b"<path d='M0 0 L10 0 A5 5 0 0 1 10 10,'/>",
    b"<rect x='0' y='0' width='1e308' height='1e308'/>",
    b"<rect width='-5' height='5'/>",
    b"<circle r='1e-320'/>",
    b"<circle cx='5' cy='5' r='1e300'/>",
    b"<ellipse rx='0' ry='5'/>",
    b"<polygon points='0,0 1e400,0 5,5'/>",
    b"<polyline points='1 2 3'/>",
    b"<line x1='nan' y1='inf' x2='1' y2='1'/>",
    b"<g transform='rotate(1e308)'><path d='M0 0 L1 1'/></g>",
    b"<g transform='skewX(90)'><path d='M0 0 L1 0 L1 1 Z'/></g>",
    b"<g transform='translate(1e308 1e308)'><path d='M0 0 L1e308 0 L1 1 Z'/></g>",
    b"<path id='line\nbreak' d='M0 0 L1 1 L5'/>",
    b"<path id='a&#10;b' d='M0 0 L'/>",
    b"<use href='#nowhere'/>",
    b"<g id='cyc'><use href='#cyc'/></g>",
    b"<g id='c1'><use href='#c2'/></g><g id='c2'><use href='#c1'/></g>",
    b"<use xlink:href='#bracket' transform='scale(0)'/>",
    b"<use href='#bracket' x='1e308'/>",
    b"<symbol id='sym' viewBox='0 0 0 0'><path d='M0 0 L1 1'/></symbol>"
    b"<use href='#sym' width='10' height='10'/>",
    b"<style>path { fill: red }</style>",
    b"<defs><path id='p0' d='M0 0 C1 1 2 2 3 3'/></defs><use href='#p0'/>",
]


def _insert_construct(rng: random.Random, data: bytes) -> bytes:
    construct = rng.choice(_CONSTRUCTS)
    # Put it just after a tag ends, so most insertions stay well-formed.
    ends = [m.end() for m in re.finditer(rb">", data)]
    at = rng.choice(ends[1:-1] or ends or [len(data)])
    return data[:at] + construct + data[at:]


_DOCTYPES = [
    b'<!DOCTYPE svg PUBLIC "-//W3C//DTD SVG 1.1//EN" '
    b'"http://www.w3.org/Graphics/SVG/1.1/DTD/svg11.dtd">',
    b'<!DOCTYPE svg SYSTEM "file:///etc/passwd">',
    b"<!DOCTYPE svg>",
    b'<!DOCTYPE svg [<!ENTITY w "M0 0 L1 1">]>',
    b'<!DOCTYPE svg [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;">]>',
    b'<!DOCTYPE svg [<!ENTITY ext SYSTEM "file:///etc/hostname">]>',
    b'<!DOCTYPE svg [<!ENTITY % pe SYSTEM "http://example.invalid/x.dtd"> %pe;]>',
    b"<!DOCTYPE svg [<!ATTLIST path d CDATA 'M0 0 L9 9'>]>",
    b"<!DOCTYPE svg [<!ELEMENT svg ANY>]>",
]


def _doctype(rng: random.Random, data: bytes) -> bytes:
    dt = rng.choice(_DOCTYPES)
    m = re.search(rb"<svg\b", data)
    at = m.start() if m else 0
    out = data[:at] + dt + b"\n" + data[at:]
    if b"ENTITY w " in dt and rng.random() < 0.8:
        out = out.replace(b"</svg>", b'<path d="&w;"/></svg>', 1)
    if b"ENTITY b " in dt:
        out = out.replace(b"</svg>", b"<text>&b;</text></svg>", 1)
    if b"ENTITY ext " in dt:
        out = out.replace(b"</svg>", b"<text>&ext;</text></svg>", 1)
    return out


def _deep_nesting(rng: random.Random, data: bytes) -> bytes:
    depth = rng.choice([50, 500, 5000, 50000])
    inner = b"<path d='M0 0 L1 0 L1 1 Z'/>"
    if rng.random() < 0.5:
        nest = b"<g transform='translate(1 1)'>" * depth + inner + b"</g>" * depth
    else:
        nest = b"<g>" * depth + inner + b"</g>" * depth
    return data.replace(b"</svg>", nest + b"</svg>", 1)


def _huge_attribute(rng: random.Random, data: bytes) -> bytes:
    n = rng.choice([10_000, 100_000, 400_000])
    r = rng.random()
    if r < 0.4:
        d = "M0 0 " + " ".join(f"L{i % 97} {(i * 7) % 89}" for i in range(n // 8))
        el = f"<path d='{d}'/>".encode()
    elif r < 0.6:
        el = f"<path id='{'x' * n}' d='M0 0 L1 1'/>".encode()
    elif r < 0.8:
        el = f"<path d='M0 0 {'0' * n}1 1'/>".encode()
    else:
        el = ("<path d='M0 0" + " L1 1" * (n // 5) + " L2'/>").encode()
    return data.replace(b"</svg>", el + b"</svg>", 1)


_TRANSFORMS = [
    "scale(0)", "scale(0 1)", "scale(1e-200)", "scale(1e-320)", "scale(1e300)",
    "scale(1e308)", "matrix(0 0 0 0 0 0)", "matrix(1 2 2 4 0 0)", "matrix(1e300 0 0 1e-300 0 0)",
    "translate(1e308)", "rotate(90 1e308 0)", "skewY(89.9999999)", "scale(-1 1)",
    "scale(1e-8)", "scale(1e8)",
]  # fmt: skip


def _transform(rng: random.Random, data: bytes) -> bytes:
    t = rng.choice(_TRANSFORMS).encode()
    tags = [m for m in re.finditer(rb"<(svg|g|path|rect|circle|use)\b", data)]
    if not tags:
        return data
    m = rng.choice(tags)
    return data[: m.end()] + b' transform="' + t + b'"' + data[m.end() :]


_NUMBER_RE = re.compile(rb"-?\d+(?:\.\d+)?(?:e-?\d+)?")


def _extreme_numbers(rng: random.Random, data: bytes) -> bytes:
    spots = list(_NUMBER_RE.finditer(data))
    if not spots:
        return data
    out = bytearray()
    pos = 0
    chosen = sorted(rng.sample(spots, min(len(spots), rng.randint(1, 6))), key=lambda m: m.start())
    for m in chosen:
        out += data[pos : m.start()] + rng.choice(_EXTREME).encode()
        pos = m.end()
    out += data[pos:]
    return bytes(out)


def _use_forms(rng: random.Random, data: bytes) -> bytes:
    m = re.search(rb'id="([^"]+)"', data)
    ref = m.group(1) if m else b"bracket"
    r = rng.random()
    if r < 0.3:
        el = b"<use href='#" + ref + b"' transform='translate(3 3)'/>"
    elif r < 0.5:
        el = b"<g id='grp'><use href='#grp'/></g>"
    elif r < 0.7:
        k = rng.choice([10, 100, 1000])
        el = b"<g id='u0'>" + b"<use href='#" + ref + b"'/>" * k + b"</g>"
        for lvl in range(1, rng.randint(2, 4)):
            el += f"<g id='u{lvl}'>".encode() + f"<use href='#u{lvl - 1}'/>".encode() * 10
            el += b"</g>"
    else:
        el = b"<use href='#" + ref + b"' x='1e308' y='-1e308'/>"
    return data.replace(b"</svg>", el + b"</svg>", 1)


def _newline_id(rng: random.Random, data: bytes) -> bytes:
    text = rng.choice(
        [b"id\nfake.svg: line 1: error", b"a&#10;b", b"tab\there", b"\xc3\xa9t\xc3\xa9"]
    )
    data = re.sub(rb'id="[^"]*"', b'id="' + text + b'"', data, count=1)
    return data.replace(b' d="M', b' d="M 1 2 L 3', 1)


def _encoding(rng: random.Random, data: bytes) -> bytes:
    enc = rng.choice(
        [b"ISO-8859-1", b"latin-1", b"windows-1252", b"ascii", b"bogus-enc", b"UTF-16"]
    )
    data = data.replace(b'encoding="UTF-8"', b'encoding="' + enc + b'"', 1)
    if enc.upper().startswith((b"ISO", b"LATIN", b"WINDOWS")):
        data = data.replace(b"<title>", b"<title>Caf\xe9 \xa9 ", 1)
    return data


def _fresh_path(rng: random.Random, data: bytes) -> bytes:
    d = random_path_data(rng, long=rng.random() < 0.2)
    if rng.random() < 0.4:
        d = break_path_data(rng, d)
    esc = d.replace("&", "&amp;").replace("<", "&lt;").replace('"', "&quot;")
    el = f'<path id="fz" d="{esc}"/>'.encode()
    return data.replace(b"</svg>", el + b"</svg>", 1)


def _many_segments(rng: random.Random, data: bytes) -> bytes:
    n = rng.choice([2_000, 20_000, 100_000])
    if rng.random() < 0.5:  # zig-zag ring: many crossings candidates
        pts = " ".join(f"L{i % 2 * 10} {i * 0.01:.2f}" for i in range(n))
    else:  # smooth ring of short cubics
        pts = " ".join(
            f"Q{i * 0.01 + 0.005:.3f} {(i % 2) * 0.01:.3f} {i * 0.01 + 0.01:.3f} 0"
            for i in range(n)
        )
    return data.replace(b"</svg>", f"<path d='M0 0 {pts} Z'/></svg>".encode(), 1)


MUTATIONS = {
    "bit-flip": _bit_flips,
    "byte-edit": _byte_edits,
    "truncate": _truncate,
    "xml-construct": _insert_construct,
    "doctype-entity": _doctype,
    "deep-nesting": _deep_nesting,
    "huge-attribute": _huge_attribute,
    "transform": _transform,
    "extreme-number": _extreme_numbers,
    "use": _use_forms,
    "newline-id": _newline_id,
    "encoding": _encoding,
    "path-data": _fresh_path,
    "many-segments": _many_segments,
}
# How often each mutation is picked (expensive ones rarely).
_WEIGHTS = {
    "bit-flip": 10, "byte-edit": 10, "truncate": 6, "xml-construct": 14, "doctype-entity": 5,
    "deep-nesting": 2, "huge-attribute": 2, "transform": 10, "extreme-number": 12, "use": 6,
    "newline-id": 3, "encoding": 4, "path-data": 14, "many-segments": 1,
}  # fmt: skip


def mutate_document(
    rng: random.Random, samples: list[bytes] | None = None, heavy: bool = True
) -> tuple[bytes, list[str]]:
    """A sample file (or a minimal SVG) with one to three mutations applied.

    Parameters
    ----------
    rng : random.Random
    samples : list of bytes, optional
        Seeds (default: :func:`sample_bytes`).
    heavy : bool
        Allow the large mutations (deep nesting, huge attributes, 100k-segment rings).

    Returns
    -------
    (bytes, list of str)
        The document and the names of the mutations applied.
    """
    pool = samples if samples is not None else sample_bytes()
    data = (
        rng.choice(pool)
        if rng.random() < 0.85
        else _svg("<path id='bracket' d='M0 0 L9 0 L9 9 Z'/>")
    )
    names = [
        n
        for n in MUTATIONS
        if heavy or n not in ("deep-nesting", "huge-attribute", "many-segments")
    ]
    weights = [_WEIGHTS[n] for n in names]
    applied = rng.choices(names, weights, k=rng.choice([1, 1, 1, 2, 2, 3]))
    for name in applied:
        data = MUTATIONS[name](rng, data)
    return data, applied


# -- hypothesis strategies ---------------------------------------------------------------------
def path_data_strategy(broken: float = 0.4):  # noqa: ANN201 - hypothesis strategy
    """Hypothesis strategy of path data: valid by the grammar, or with one error put in."""
    from hypothesis import strategies as st

    @st.composite
    def build(draw):  # noqa: ANN001, ANN202
        rng = draw(st.randoms(use_true_random=False))
        d = random_path_data(
            rng,
            max_commands=draw(st.integers(1, 10)),
            long=draw(st.booleans()) and rng.random() < 0.3,
        )
        if rng.random() < broken:
            d = break_path_data(rng, d)
        return d

    return build()


def document_strategy(heavy: bool = False):  # noqa: ANN201 - hypothesis strategy
    """Hypothesis strategy of mutated sample documents (bytes, mutation names)."""
    from hypothesis import strategies as st

    samples = sample_bytes()
    return st.randoms(use_true_random=False).map(lambda rng: mutate_document(rng, samples, heavy))
