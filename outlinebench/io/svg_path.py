"""SVG path data (the ``d`` attribute): lexer, parser to contours, and writer.

The grammar is the one of W3C SVG 1.1 §8.3.9 (BNF) and SVG 2 §9.3 "Path data": commands
``M L H V C S Q T A Z`` in absolute (upper case) and relative (lower case) form, implicit
repetition of a command's parameter groups, an implicit line after the first pair of a moveto,
compact numbers (``.5.5``, ``-.5-.5``, ``1e-3``), single-character arc flags (``a1 1 0 00.5.5``)
and commands following ``z`` that start at the closed subpath's first point.

Reading is linear in the length of the data. A fast lexer works on the whole string with byte
operations: it separates numbers written together ("1-2", ".5.5"), checks the alphabet, the
commas and the number counts, and converts plain decimals through integers (exact, see
``_decimals``), other numbers with a correctly rounded strtod. Anything it cannot take
(unseparated arc flags, errors) goes through a per-command regular-expression lexer that is
still a single pass and finds the exact offset of the first error. Geometry is then built for
all parameter groups at once with numpy (short data: a sequential twin, bit-identical).

Error handling follows SVG 2 §9.5.4 ("render up to the error"): everything up to the last
complete parameter group before the first error is kept and returned together with the error.
"""

from __future__ import annotations

import math
import re
import warnings
from collections.abc import Sequence
from dataclasses import dataclass, field
from operator import itemgetter

import numpy as np
from numpy.typing import NDArray

from outlinebench.errors import SvgPathError
from outlinebench.io.numbers import format_number
from outlinebench.io.svg_arc import ARC_TOLERANCE, ArcResult, arc_to_cubics
from outlinebench.model.document import Contour

__all__ = [
    "PathData",
    "read_path_data",
    "parse_path_data",
    "format_path_data",
    "format_contour",
]

_COMMANDS = "MmZzLlHhVvCcSsQqTtAa"
_WSP = " \t\r\n\f"  # SVG 1.1 wsp (#x20 #x9 #xD #xA) plus form feed (SVG 2)
_NUM = r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?"
_NUM_RE = re.compile(_NUM)
_FLAG_RE = re.compile(r"[01]")
_SKIP_WSP = re.compile(r"[ \t\r\n\f]*+")
# Arguments of a non-arc command: numbers separated by optional comma-wsp. Possessive so a
# failure costs linear time (no backtracking into digit runs).
_ARGS_RE = re.compile(rf"[ \t\r\n\f]*+(?:(?>{_NUM})[ \t\r\n\f]*+(?:,[ \t\r\n\f]*+)?+)*+")
_SPLIT_RE = re.compile(r"([MmZzLlHhVvCcSsQqTtAa])")
_TOKEN_RE = re.compile(r"[^ \t\r\n\f,]{1,16}")

_ARITY = {"M": 2, "L": 2, "H": 1, "V": 1, "C": 6, "S": 4, "Q": 4, "T": 2, "A": 7, "Z": 0}
_ARITY_LUT = np.zeros(256, dtype=np.int64)
for _c, _n in _ARITY.items():
    _ARITY_LUT[ord(_c)] = _n
    _ARITY_LUT[ord(_c.lower())] = _n

# Byte classes for the fast lexer: 0 white space, 1 number character, 2 command, 3 comma.
_ASCII_ALLOWED = (_WSP + "0123456789.+-eE," + _COMMANDS).encode()
_CLASS = np.full(256, 9, dtype=np.int8)
for _ch in _WSP:
    _CLASS[ord(_ch)] = 0
for _ch in "0123456789.+-eE":
    _CLASS[ord(_ch)] = 1
for _ch in _COMMANDS:
    _CLASS[ord(_ch)] = 2
_CLASS[ord(",")] = 3
_CLASS_TABLE = bytes(_CLASS.astype(np.uint8).tolist())
_SIGN_TABLE = bytes(int(chr(b) in "+-") for b in range(256))
_MARKER_TABLE = bytes(int(chr(b) in ".eE") for b in range(256))
_GAP_TABLE = bytes(int(_CLASS[b] != 1) for b in range(256))
# Bytes after which a sign starts a new number: number characters other than an exponent's e.
_NUMBER_NOT_E = np.array([chr(b) in "0123456789.+-" for b in range(256)])
_TO_SPACE = bytes.maketrans((_COMMANDS + "," + _WSP).encode(), b" " * (len(_COMMANDS) + 6))
_NOT_COMMAND = bytes(b for b in range(256) if chr(b) not in _COMMANDS)
_GLUED_RE = re.compile(rb"[0-9.][-+]")  # a sign right after a number: no separator
_DROP_WSP = str.maketrans("", "", _WSP)
_POW10 = 10.0 ** np.arange(18)  # exact doubles up to 10^22; numbers here have ≤ 17 chars
_IS_DIGIT = np.zeros(256, dtype=bool)
_IS_DIGIT[ord("0") : ord("9") + 1] = True

# Row categories used while building geometry.
_CAT = {"M": 0, "L": 1, "H": 1, "V": 1, "C": 2, "S": 3, "Q": 4, "T": 5, "A": 6, "Z": 7}
_CAT_LUT = np.full(256, -1, dtype=np.int64)
for _c, _n in _CAT.items():
    _CAT_LUT[ord(_c)] = _n
    _CAT_LUT[ord(_c.lower())] = _n

# Column of the end point's x and y among a row's parameters, by upper-case command letter;
# H and V give one coordinate (the other column is ignored), Z none (column 0, ignored).
_END_X_LUT = np.zeros(128, dtype=np.int64)
_END_Y_LUT = np.zeros(128, dtype=np.int64)
for _letters, _ix, _iy in (("MLT", 0, 1), ("C", 4, 5), ("SQ", 2, 3), ("A", 5, 6), ("HV", 0, 0)):
    for _c in _letters:
        _END_X_LUT[ord(_c)] = _ix
        _END_Y_LUT[ord(_c)] = _iy

# Path data up to this many characters is built sequentially (numpy's per-call cost would
# dominate); longer data is built with whole-array operations.
_SMALL = 2048
# Key a builder adds to its counts when a coordinate is not finite (removed before returning).
_NONFINITE = "nonfinite"
# Levels of vectorised current-point resolution before falling back to one sequential pass.
_RESOLVE_LEVELS = 12


@dataclass
class _Tokens:
    """Commands, numbers per command and the numbers, for the valid part of the data."""

    commands: bytes
    counts: NDArray[np.int64]
    numbers: NDArray[np.float64]
    trailing_dot: int = 0
    error: SvgPathError | None = None


@dataclass
class PathData:
    """Contours read from one ``d`` attribute, with what the reader noticed.

    Attributes
    ----------
    contours : list of Contour
        Everything up to the first error (all of it when ``error`` is None).
    error : SvgPathError or None
        The first error, with ``offset`` and ``token``.
    counts : dict of str to int
        Events worth a note: "trailing_dot" (``23.`` numbers), "arcs" (converted to cubics),
        "arc_negative_radius", "arc_zero_radius", "arc_omitted", "arc_radii_scaled".
    """

    contours: list[Contour]
    error: SvgPathError | None = None
    counts: dict[str, int] = field(default_factory=dict)


def _token_at(d: str, offset: int) -> str:
    if offset >= len(d):
        return ""
    ch = d[offset]
    if ch in _WSP or ch == ",":
        return ch
    if ch in _COMMANDS and not (offset + 1 < len(d) and d[offset + 1].isalpha()):
        return ch
    m = _TOKEN_RE.match(d, offset)
    return m.group() if m else ch


def _found(token: str) -> str:
    return f"found {token!r}" if token else "found the end of the data"


def _error(d: str, offset: int, expected: str) -> SvgPathError:
    token = _token_at(d, offset)
    return SvgPathError(f"expected {expected} at offset {offset}, {_found(token)}", offset, token)


# -- lexing ------------------------------------------------------------------------------------
def _separate(raw: bytes) -> bytes:
    """Put a space where one number ends and the next begins without a separator.

    The grammar's longest-match reading (SVG 1.1 §8.3.9) starts a new number at a sign that
    does not follow an exponent's "e" ("1-2"; "1e-2" stays whole), and at a "." when the
    number so far already has a "." or an exponent (".5.5", "1e5.5"). Splitting there changes
    no valid data's meaning, and invalid data stays invalid (it then fails a later check and
    goes to the general lexer, which reports the error on the original text).
    """
    codes = np.frombuffer(raw, dtype=np.uint8)
    # Masks by bytes.translate (C speed): 1 where the byte is of the kind, else 0.
    signs = np.flatnonzero(np.frombuffer(raw.translate(_SIGN_TABLE), dtype=np.bool_))
    signs = signs[signs > 0]
    before = codes[signs - 1]
    glued = signs[_NUMBER_NOT_E[before]]
    markers = np.flatnonzero(np.frombuffer(raw.translate(_MARKER_TABLE), dtype=np.bool_))
    dots = markers[:0]
    if markers.size > 1:
        gap = np.frombuffer(raw.translate(_GAP_TABLE), dtype=np.bool_).copy()
        gap[glued] = True  # a glued sign begins a new number
        runs = np.cumsum(gap, dtype=np.int32)
        prev, cur = markers[:-1], markers[1:]
        dots = cur[(codes[cur] == ord(".")) & (runs[cur] == runs[prev])]
    if not glued.size and not dots.size:
        return raw
    where = np.union1d(glued, dots) if glued.size and dots.size else glued if glued.size else dots
    return np.insert(codes, where, ord(" ")).tobytes()


def _strtod(spaced: bytes) -> NDArray[np.float64] | None:
    """Numbers of space-separated text by numpy's reader (a correctly rounded strtod).

    The alphabet check before leaves only forms it reads exactly as the SVG grammar does;
    leftover text (a lone "e", "1-2", ".5.5") gives a warning (None here) or a count
    mismatch, and the caller then hands the data to the general lexer.
    """
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            return np.fromstring(spaced, dtype=np.float64, sep=" ")
    except (ValueError, DeprecationWarning):
        return None


def _decimals(
    spaced: bytes, codes: NDArray[np.uint8], numch: NDArray[np.bool_], starts: NDArray[np.int64]
) -> NDArray[np.float64] | None:
    """Exact values of plain decimals ``[sign]digits[.digits]`` through integers; None when
    any number is not of that form (the caller then uses :func:`_strtod`).

    Notes
    -----
    With the "." removed a number is an integer M with f digits after the point, and its
    value is M / 10^f. When |M| < 2^53 and f ≤ 22 both are exact doubles, so one IEEE
    division gives the correctly rounded value, the same double as strtod (W. D. Clinger,
    "How to read floating point numbers accurately", PLDI 1990, the fast path). Integers
    parse several times faster than floats in numpy's text reader. A lone sign would merge
    with the next number there, which shows as one number too few.
    """
    if b"e" in spaced or b"E" in spaced:
        return None
    ends = np.flatnonzero(numch[:-1] & ~numch[1:]) + 1
    if numch[-1]:
        ends = np.append(ends, numch.size)
    if ends.size != starts.size or not starts.size or int((ends - starts).max()) > 17:
        return None
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            mant = np.fromstring(spaced.translate(None, b"."), dtype=np.int64, sep=" ")
    except (ValueError, DeprecationWarning):
        return None
    if mant.size != starts.size or int(np.abs(mant).max()) >= 2**53:
        return None
    frac = np.zeros(starts.size, dtype=np.int64)
    dots = np.flatnonzero(codes == ord("."))
    if dots.size:
        owner = np.searchsorted(starts, dots, side="right") - 1
        if np.any(np.diff(owner) == 0):
            return None  # two points in one number
        frac[owner] = ends[owner] - dots - 1
    values = mant / _POW10[frac]
    zero = np.flatnonzero(mant == 0)
    if zero.size:  # "-0" and "-0.0" are negative zero, as strtod reads them
        values[zero[codes[starts[zero]] == ord("-")]] = -0.0
    return values


def _lex_fast(d: str) -> _Tokens | None:
    """Whole-string lexer for separated numbers; None when the general lexer is needed."""
    try:
        raw = d.encode("ascii")
    except UnicodeEncodeError:
        return None
    if raw.translate(None, _ASCII_ALLOWED):
        return None  # a character outside the grammar's alphabet
    commands = raw.translate(None, _NOT_COMMAND)
    if not commands:
        return None if raw.strip() else _Tokens(b"", np.zeros(0, np.int64), np.zeros(0))
    if commands[0] not in b"Mm":
        return None
    if _GLUED_RE.search(raw, 0, 4096):
        # The start already shows numbers run together ("1-2"): separate them first.
        return _lex_bytes(_separate(raw), commands)
    tok = _lex_bytes(raw, commands)
    if tok is None:
        # Numbers run together later on ("1-2", ".5.5"): separate them and try once more.
        spaced = _separate(raw)
        if spaced is not raw:
            tok = _lex_bytes(spaced, commands)
    return tok


def _lex_bytes(raw: bytes, commands: bytes) -> _Tokens | None:
    """The fast lexer proper, on ASCII bytes starting with a moveto."""
    codes = np.frombuffer(raw, dtype=np.uint8)
    # Byte classes by bytes.translate (C speed; a numpy table lookup is several times slower).
    cls = np.frombuffer(raw.translate(_CLASS_TABLE), dtype=np.uint8)
    if b"," in raw:
        sig = np.frombuffer(raw.translate(_CLASS_TABLE, _WSP.encode()), dtype=np.uint8)
        is_comma = sig == 3
        is_cmd = sig == 2
        if is_comma[0] or is_comma[-1]:
            return None
        if np.any(is_comma[1:] & (is_comma[:-1] | is_cmd[:-1])) or np.any(
            is_comma[:-1] & is_cmd[1:]
        ):
            return None
    numch = cls == 1
    starts = np.flatnonzero(numch[1:] & ~numch[:-1]) + 1
    if numch[0]:
        starts = np.concatenate(([0], starts))
    cpos = np.flatnonzero(cls == 2)
    if starts.size and starts[0] < cpos[0]:
        return None
    before = np.searchsorted(starts, cpos)
    counts = np.diff(before, append=starts.size).astype(np.int64)
    arity = _ARITY_LUT[np.frombuffer(commands, dtype=np.uint8)]
    if np.any(counts[arity == 0] != 0):
        return None
    has = arity > 0
    if np.any((counts[has] < arity[has]) | (counts[has] % np.maximum(arity[has], 1) != 0)):
        return None
    spaced = raw.translate(_TO_SPACE)
    numbers = _decimals(spaced, codes, numch, starts)
    if numbers is None:
        numbers = _strtod(spaced)
    if numbers is None or numbers.size != starts.size or not np.all(np.isfinite(numbers)):
        return None
    arc_cmds = np.flatnonzero(arity == 7)
    if arc_cmds.size:
        tokens = spaced.split()
        if len(tokens) != numbers.size:
            return None
        first = before[arc_cmds]
        for start, count in zip(first.tolist(), counts[arc_cmds].tolist(), strict=True):
            for g in range(start, start + count, 7):
                if tokens[g + 3] not in (b"0", b"1") or tokens[g + 4] not in (b"0", b"1"):
                    return None
    dots = np.flatnonzero(codes == ord("."))
    trailing = 0
    if dots.size:
        after = dots + 1
        at_end = int(after[-1] == codes.size)  # a final "." is followed by nothing
        nxt = codes[after[: after.size - at_end]]
        trailing = int(np.count_nonzero(~_IS_DIGIT[nxt])) + at_end
    return _Tokens(commands, counts, numbers, trailing)


def _lex_general(d: str) -> _Tokens:
    """Per-command lexer: handles every valid form and locates the first error exactly."""
    parts = _SPLIT_RE.split(d)
    commands: list[str] = []
    counts: list[int] = []
    texts: list[str] = []
    trailing = 0
    error: SvgPathError | None = None
    pre = parts[0]
    lead = len(pre) - len(pre.lstrip(_WSP))
    if lead < len(pre):
        return _Tokens(b"", np.zeros(0, np.int64), np.zeros(0), 0, _error(d, lead, "a moveto"))
    if len(parts) > 1 and parts[1] not in "Mm":
        err = _error(d, len(pre), "a moveto ('M' or 'm')")
        return _Tokens(b"", np.zeros(0, np.int64), np.zeros(0), 0, err)
    offset = len(pre)
    starts: list[int] = []  # per kept command: index of its first number in `texts`
    spans: list[tuple[int, str]] = []  # per kept command: (offset of its arguments, text)
    for i in range(1, len(parts), 2):
        cmd, args = parts[i], parts[i + 1]
        base = offset + 1
        offset = base + len(args)
        arity = _ARITY[cmd.upper()]
        got: list[str] = []
        if arity == 7:
            error = _lex_arc_args(d, args, base, got)
        elif arity == 0:
            m = _SKIP_WSP.match(args)
            if m.end() < len(args):
                error = _error(d, base + m.end(), "a command letter")
        else:
            got = _NUM_RE.findall(args)
            # Valid when the numbers cover every character that is not a separator and no
            # comma is involved (then the comma rules need the full pattern below).
            if "," in args or sum(map(len, got)) != len(args.translate(_DROP_WSP)):
                m = _ARGS_RE.match(args)
                end = m.end()
                got = _NUM_RE.findall(args, 0, end)
                if end < len(args):
                    error = _error(d, base + end, "a number")
                elif args.rstrip(_WSP).endswith(","):
                    error = _error(d, offset, "a number")
        bad = _first_out_of_range(got)
        if bad >= 0:
            # An out-of-range number ("1e999") is the error, at its own offset, even when
            # the command goes wrong later; the groups before it are kept.
            pos = _number_offset(d, base, args, arity, bad)
            token = _token_at(d, pos)
            error = SvgPathError(
                f"number out of range at offset {pos}, found {token!r}", pos, token
            )
            got = got[:bad]
        elif error is None and arity and (len(got) < arity or len(got) % arity):
            error = _error(d, offset, "a number")
        if arity:
            got = got[: len(got) - len(got) % arity]
        if got or arity == 0:
            if "." in args:
                joined = " ".join(got) + " "
                trailing += joined.count(". ") + joined.count(".e") + joined.count(".E")
            commands.append(cmd)
            counts.append(len(got))
            starts.append(len(texts))
            spans.append((base, args))
            texts.extend(got)
        if error is not None:
            break
    numbers = np.array(texts, dtype=np.float64) if texts else np.zeros(0)
    bad = np.flatnonzero(~np.isfinite(numbers))
    if bad.size:
        # Overflow ("1e999") is a bad number at its own offset; keep what precedes it.
        g = int(bad[0])
        j = int(np.searchsorted(starts, g, side="right")) - 1
        k = g - starts[j]
        base, args = spans[j]
        pos = _number_offset(d, base, args, _ARITY[commands[j].upper()], k)
        token = _token_at(d, pos)
        error = SvgPathError(f"number out of range at offset {pos}, found {token!r}", pos, token)
        arity = _ARITY[commands[j].upper()]
        keep = k - k % arity
        commands, counts = commands[: j + 1], counts[: j + 1]
        counts[j] = keep
        if keep == 0:
            commands, counts = commands[:j], counts[:j]
        numbers = numbers[: starts[j] + keep]
    return _Tokens(
        "".join(commands).encode("ascii"),
        np.array(counts, dtype=np.int64),
        numbers,
        trailing,
        error,
    )


def _first_out_of_range(texts: list[str]) -> int:
    """Index of the first number text that overflows binary64 ("1e999"), or -1."""
    for k, t in enumerate(texts):
        if ("e" in t or "E" in t or len(t) > 300) and not math.isfinite(float(t)):
            return k
    return -1


def _number_offset(d: str, base: int, args: str, arity: int, k: int) -> int:
    """Offset in ``d`` of the k-th number of a command whose arguments ``args`` start at
    ``base``."""
    if arity == 7:
        arc_starts: list[int] = []
        _lex_arc_args(d, args, base, [], arc_starts)
        return base + arc_starts[k]
    for i, m in enumerate(_NUM_RE.finditer(args)):
        if i == k:
            return base + m.start()
    return base + len(args)  # pragma: no cover - k always names a number that was read


def _lex_arc_args(
    d: str, args: str, base: int, out: list[str], starts: list[int] | None = None
) -> SvgPathError | None:
    """Parameter groups of an arc command (flags are single characters); ``starts`` gets
    each parameter's offset in ``args`` when given."""
    pos = _SKIP_WSP.match(args).end()
    n = len(args)
    while True:
        if pos >= n and out:
            return None
        group: list[str] = []
        for j in range(7):
            m = (_FLAG_RE if j in (3, 4) else _NUM_RE).match(args, pos)
            if m is None:
                what = "an arc flag (0 or 1)" if j in (3, 4) else "a number"
                out.extend(group)  # the caller keeps complete groups only
                return _error(d, base + pos, what)
            group.append(m.group())
            if starts is not None:
                starts.append(m.start())
            pos = _SKIP_WSP.match(args, m.end()).end()
            if pos < n and args[pos] == ",":
                pos = _SKIP_WSP.match(args, pos + 1).end()
                if pos >= n:
                    # A complete group before a trailing comma is kept, as for every other
                    # command (SVG 2 §9.5.4): the error is the missing next group.
                    out.extend(group)
                    return _error(d, base + n, "a number")
        out.extend(group)


def _lex(d: str) -> _Tokens:
    fast = _lex_fast(d)
    return fast if fast is not None else _lex_general(d)


# -- geometry ----------------------------------------------------------------------------------
def _resolve(values: NDArray[np.float64], dep: NDArray[np.int64]) -> NDArray[np.float64]:
    """out[i] = values[i] where dep[i] < 0, else out[dep[i]] + values[i] (dep[i] < i).

    The same additions in the same order as a sequential reading of the path, so the result
    is bit-identical to one; done a dependency level at a time with numpy, then sequentially
    for whatever long chains remain.
    """
    out = values.copy()
    pending = np.flatnonzero(dep >= 0)
    resolved = dep < 0
    for _ in range(_RESOLVE_LEVELS):
        if not pending.size:
            return out
        ready = resolved[dep[pending]]
        idx = pending[ready]
        out[idx] = out[dep[idx]] + values[idx]
        resolved[idx] = True
        pending = pending[~ready]
    if pending.size:
        # What is left are long chains of relative rows: each maximal run of consecutive
        # rows depending on the row before is one sequential np.add.accumulate.
        cut = np.flatnonzero((np.diff(pending) != 1) | (dep[pending[1:]] != pending[1:] - 1))
        for run in np.split(pending, cut + 1):
            a = int(run[0])
            first = out[dep[a]] + values[a]
            if run.size == 1:
                out[a] = first
            else:
                chain = np.concatenate(([first], values[run[1:]]))
                out[run] = np.add.accumulate(chain)
    return out


def _freeze(a: NDArray[np.float64]) -> NDArray[np.float64]:
    a.flags.writeable = False
    return a


def _apply(points: NDArray[np.float64], matrix: NDArray[np.float64] | None) -> NDArray[np.float64]:
    if matrix is None:
        return points
    out = np.empty_like(points)
    x, y = points[..., 0], points[..., 1]
    out[..., 0] = matrix[0, 0] * x + matrix[0, 1] * y + matrix[0, 2]
    out[..., 1] = matrix[1, 0] * x + matrix[1, 1] * y + matrix[1, 2]
    return out


def _count_arc(res: ArcResult, counts: dict[str, int]) -> None:
    """Tally what happened to one arc (for the reader's notes): omitted, made a line,
    converted; radii negated or scaled up."""
    keys = []
    if res.negative_radius:
        keys.append("arc_negative_radius")
    if res.radii_scaled:
        keys.append("arc_radii_scaled")
    keys.append({"none": "arc_omitted", "line": "arc_zero_radius"}.get(res.kind, "arcs"))
    for key in keys:
        counts[key] = counts.get(key, 0) + 1


def _build(  # noqa: C901 (older than the complexity gate; split when next changed)
    tok: _Tokens, matrix: NDArray[np.float64] | None, tolerance: float
) -> tuple[list[Contour], dict[str, int]]:
    counts_out: dict[str, int] = {}
    if not tok.commands:
        return [], counts_out
    codes = np.frombuffer(tok.commands, dtype=np.uint8)
    arity = _ARITY_LUT[codes]
    ngroups = np.where(arity > 0, tok.counts // np.maximum(arity, 1), 1)
    n = int(ngroups.sum())
    cmd_first_row = np.cumsum(ngroups) - ngroups
    num_start = np.cumsum(tok.counts) - tok.counts
    row_code = np.repeat(codes, ngroups).astype(np.int64)
    row_arity = np.repeat(arity, ngroups)
    within = np.arange(n) - np.repeat(cmd_first_row, ngroups)
    row_num = np.repeat(num_start, ngroups) + within * row_arity
    cat = _CAT_LUT[row_code]
    # Extra pairs after a moveto are lines (SVG 1.1 §8.3.2).
    extra_move = (cat == 0) & (within > 0)
    cat[extra_move] = 1
    rel = row_code >= ord("a")
    if n and cat[0] == 0:
        rel[0] = False  # a leading "m" is absolute (SVG 1.1 §8.3.2)
    params = np.zeros((n, 7))
    for j in range(7):
        mask = row_arity > j
        params[mask, j] = tok.numbers[row_num[mask] + j]
    upper = row_code & ~0x20
    # End point of every row, per axis: (value, depends on previous row?).
    rows = np.arange(n)
    ex = params[rows, _END_X_LUT[upper]]
    ey = params[rows, _END_Y_LUT[upper]]
    is_h = upper == ord("H")
    is_v = upper == ord("V")
    ex[is_v] = 0.0
    ey[is_h] = 0.0
    prev = np.arange(n) - 1
    dep_x = np.where(rel | is_v, prev, -1)
    dep_y = np.where(rel | is_h, prev, -1)
    is_z = cat == 7
    if is_z.any():
        move_rows = np.where(cat == 0, np.arange(n), 0)
        subpath_start = np.maximum.accumulate(move_rows)
        dep_x[is_z] = subpath_start[is_z]
        dep_y[is_z] = subpath_start[is_z]
        ex[is_z] = 0.0
        ey[is_z] = 0.0
    dep_x[0] = dep_y[0] = -1
    X = _resolve(ex, dep_x)
    Y = _resolve(ey, dep_y)
    if not (np.isfinite(X).all() and np.isfinite(Y).all()):
        # a current point beyond binary64, also one no segment starts from (a moveto)
        counts_out[_NONFINITE] = 1
    SX = np.concatenate(([0.0], X[:-1]))
    SY = np.concatenate(([0.0], Y[:-1]))
    bx = np.where(rel, SX, 0.0)
    by = np.where(rel, SY, 0.0)
    start = np.stack([SX, SY], axis=1)
    end = np.stack([X, Y], axis=1)
    p01 = np.stack([params[:, 0] + bx, params[:, 1] + by], axis=1)
    p23 = np.stack([params[:, 2] + bx, params[:, 3] + by], axis=1)

    # Segment arrays per kind; nseg[row] is how many segments a row makes (0, 1, or the
    # pieces of an arc), which fixes each segment's place in the contour order.
    nseg = np.zeros(n, dtype=np.int64)
    kinds: list[tuple[NDArray[np.int64], NDArray[np.float64]]] = []
    # Lines: L, H, V, extra moveto pairs, and Z when it moves.
    line_rows = (cat == 1) | (is_z & ((SX != X) | (SY != Y)))
    idx = np.flatnonzero(line_rows)
    if idx.size:
        kinds.append((idx, _apply(np.stack([start[idx], end[idx]], axis=1), matrix)))
    # Cubics: C, S.
    is_c = cat == 2
    is_s = cat == 3
    cub_idx = np.flatnonzero(is_c | is_s)
    if cub_idx.size:
        second = np.where(is_c[:, None], p23, p01)  # the second handle of C and S rows
        first = p01.copy()
        if is_s.any():
            s_idx = np.flatnonzero(is_s)
            prev_cubic = np.zeros(n, dtype=bool)
            prev_cubic[1:] = is_c[:-1] | is_s[:-1]
            refl = s_idx[prev_cubic[s_idx]]
            first[s_idx] = start[s_idx]
            first[refl] = 2.0 * start[refl] - second[refl - 1]
        segs = np.stack([start[cub_idx], first[cub_idx], second[cub_idx], end[cub_idx]], axis=1)
        kinds.append((cub_idx, _apply(segs, matrix)))
    # Quadratics: Q, T (T reflects the previous Q/T control point, sequentially).
    is_q = cat == 4
    is_t = cat == 5
    quad_idx = np.flatnonzero(is_q | is_t)
    if quad_idx.size:
        ctrl = p01.copy()
        if is_t.any():
            qt = is_q | is_t
            for i in np.flatnonzero(is_t).tolist():
                if i > 0 and qt[i - 1]:
                    ctrl[i] = 2.0 * start[i] - ctrl[i - 1]
                else:
                    ctrl[i] = start[i]
        segs = np.stack([start[quad_idx], ctrl[quad_idx], end[quad_idx]], axis=1)
        kinds.append((quad_idx, _apply(segs, matrix)))
    for rows_k, _ in kinds:
        nseg[rows_k] = 1
    # Arcs: converted in the element's own coordinates, then mapped (affine maps are exact
    # on Bézier control points, so the arc's radii are never transformed).
    arc_rows: list[int] = []
    arc_lines: list[int] = []
    arc_cubics: list[NDArray[np.float64]] = []
    for i in np.flatnonzero(cat == 6).tolist():
        p = params[i]
        x1, y1 = float(SX[i]), float(SY[i])
        res = arc_to_cubics(
            x1, y1, p[0], p[1], p[2], p[3] != 0.0, p[4] != 0.0, float(X[i]), float(Y[i]), tolerance
        )
        _count_arc(res, counts_out)
        if res.kind == "line":
            arc_lines.append(i)
            nseg[i] = 1
        elif res.kind != "none":
            arc_rows.append(i)
            arc_cubics.append(res.cubics)
            nseg[i] = len(res.cubics)
    if arc_lines:
        rows_l = np.array(arc_lines)
        kinds.append((rows_l, _apply(np.stack([start[rows_l], end[rows_l]], axis=1), matrix)))
    first_pos = np.cumsum(nseg) - nseg  # place of each row's first segment
    total = int(nseg.sum())
    pool: list[NDArray[np.float64]] = []
    perm = np.empty(total, dtype=np.int64)
    for rows_k, arr in kinds:
        if not np.isfinite(arr).all():
            counts_out[_NONFINITE] = 1
        perm[first_pos[rows_k]] = len(pool) + np.arange(len(rows_k))
        pool.extend(_freeze(arr))
    if arc_rows:
        arr = _freeze(_apply(np.concatenate(arc_cubics), matrix))
        if not np.isfinite(arr).all():
            counts_out[_NONFINITE] = 1
        pieces = nseg[arc_rows]
        where = np.repeat(first_pos[arc_rows], pieces) + (
            np.arange(pieces.sum()) - np.repeat(np.cumsum(pieces) - pieces, pieces)
        )
        perm[where] = len(pool) + np.arange(len(arr))
        pool.extend(arr)
    ordered = itemgetter(*perm.tolist())(pool) if total > 1 else tuple(pool)
    # Contours: a moveto starts one, a closepath ends one (and the next command after it
    # starts a new one at the same first point, SVG 1.1 §8.3.3).
    z_rows = np.flatnonzero(is_z)
    breaks = np.union1d(np.flatnonzero(cat == 0), np.append(z_rows + 1, n))
    closed_after = set(z_rows.tolist())
    positions = np.append(first_pos, total)
    contours: list[Contour] = []
    a = 0
    for b in breaks.tolist():
        if b <= a:
            continue
        lo, hi = int(positions[a]), int(positions[b])
        if hi > lo:
            contours.append(Contour(ordered[lo:hi], (b - 1) in closed_after))
        a = b
    if tok.trailing_dot:
        counts_out["trailing_dot"] = tok.trailing_dot
    return contours, counts_out


def _build_small(  # noqa: C901 (older than the complexity gate; split when next changed)
    tok: _Tokens, matrix: NDArray[np.float64] | None, tolerance: float
) -> tuple[list[Contour], dict[str, int]]:
    """Sequential twin of :func:`_build` for short data, where numpy's per-call cost
    dominates. Same arithmetic in the same order, so the results are bit-identical (tested).
    """
    counts_out: dict[str, int] = {}
    nums = tok.numbers.tolist()
    by_kind: dict[int, list[list[list[float]]]] = {2: [], 3: [], 4: []}
    order: list[tuple[int, int]] = []  # (kind, index) per segment, in path order
    bounds: list[tuple[int, int, bool]] = []  # (first segment, end segment, closed)

    def add(seg: list[list[float]]) -> None:
        lst = by_kind[len(seg)]
        order.append((len(seg), len(lst)))
        lst.append(seg)

    x = y = sx = sy = 0.0
    sub_first = 0
    prev_cat = -1
    c2x = c2y = qx = qy = 0.0  # last cubic second handle, last quadratic control point
    k = 0
    first_row = True
    for code, count in zip(tok.commands, tok.counts.tolist(), strict=True):
        letter = chr(code)
        up = letter.upper()
        rel = letter != up
        arity = _ARITY[up]
        groups = count // arity if arity else 1
        for g in range(groups):
            p = nums[k : k + arity]
            k += arity
            r = rel and not first_row
            first_row = False
            bx, by = (x, y) if r else (0.0, 0.0)
            cat = _CAT[up]
            if cat == 0 and g > 0:
                cat = 1
            x0, y0 = x, y
            if up in "ML":
                x, y = (x + p[0], y + p[1]) if r else (p[0], p[1])
            elif up == "H":
                x, y = (x + p[0] if r else p[0]), y + 0.0
            elif up == "V":
                x, y = x + 0.0, (y + p[0] if r else p[0])
            elif up == "Z":
                x, y = sx + 0.0, sy + 0.0
            else:
                ix = {"C": 4, "S": 2, "Q": 2, "T": 0, "A": 5}[up]
                x, y = (x + p[ix], y + p[ix + 1]) if r else (p[ix], p[ix + 1])
            if cat == 0:
                if len(order) > sub_first:
                    bounds.append((sub_first, len(order), False))
                sub_first = len(order)
                sx, sy = x, y
            elif cat == 1:
                add([[x0, y0], [x, y]])
            elif cat == 2:
                h1 = [p[0] + bx, p[1] + by]
                c2x, c2y = p[2] + bx, p[3] + by
                add([[x0, y0], h1, [c2x, c2y], [x, y]])
            elif cat == 3:
                if prev_cat in (2, 3):
                    h1 = [2.0 * x0 - c2x, 2.0 * y0 - c2y]
                else:
                    h1 = [x0, y0]
                c2x, c2y = p[0] + bx, p[1] + by
                add([[x0, y0], h1, [c2x, c2y], [x, y]])
            elif cat == 4:
                qx, qy = p[0] + bx, p[1] + by
                add([[x0, y0], [qx, qy], [x, y]])
            elif cat == 5:
                if prev_cat in (4, 5):
                    qx, qy = 2.0 * x0 - qx, 2.0 * y0 - qy
                else:
                    qx, qy = x0, y0
                add([[x0, y0], [qx, qy], [x, y]])
            elif cat == 6:
                res = arc_to_cubics(x0, y0, p[0], p[1], p[2], p[3] != 0.0, p[4] != 0.0, x, y,
                                    tolerance)  # fmt: skip
                _count_arc(res, counts_out)
                if res.kind == "line":
                    add([[x0, y0], [x, y]])
                elif res.kind != "none":
                    for piece in res.cubics.tolist():
                        add(piece)
            else:  # Z
                if x0 != x or y0 != y:
                    add([[x0, y0], [x, y]])
                if len(order) > sub_first:
                    bounds.append((sub_first, len(order), True))
                sub_first = len(order)
            prev_cat = cat
            if not (math.isfinite(x) and math.isfinite(y)):
                counts_out[_NONFINITE] = 1  # as in _build: a current point beyond binary64
    if len(order) > sub_first:
        bounds.append((sub_first, len(order), False))
    views: dict[int, list[NDArray[np.float64]]] = {}
    for kind, segs in by_kind.items():
        if segs:
            arr = _apply(np.array(segs, dtype=np.float64), matrix)
            if not np.isfinite(arr).all():
                counts_out[_NONFINITE] = 1
            views[kind] = list(_freeze(arr))
    ordered = [views[kind][i] for kind, i in order]
    contours = [Contour(tuple(ordered[a:b]), closed) for a, b, closed in bounds]
    if tok.trailing_dot:
        counts_out["trailing_dot"] = tok.trailing_dot
    return contours, counts_out


def read_path_data(
    d: str,
    *,
    matrix: NDArray[np.float64] | None = None,
    tolerance: float = ARC_TOLERANCE,
) -> PathData:
    """Read path data, keeping everything up to the first error.

    Parameters
    ----------
    d : str
        The ``d`` attribute.
    matrix : ndarray, shape (3, 3), optional
        Affine map applied to every control point (the element's transform to root units).
    tolerance : float
        Arc conversion error bound relative to the arc's larger radius
        (default :data:`~outlinebench.io.svg_arc.ARC_TOLERANCE`).

    Returns
    -------
    PathData
        Contours and, when the data is bad, the error (never raised).
    """
    tok = _lex_general(d) if len(d) <= _SMALL else _lex(d)
    built = _build_finite(tok, matrix, tolerance, len(d) <= _SMALL)
    if built is None:
        return _up_to_overflow(d, tok, matrix, tolerance)
    return PathData(built[0], tok.error, built[1])


def _build_finite(
    tok: _Tokens, matrix: NDArray[np.float64] | None, tolerance: float, small: bool
) -> tuple[list[Contour], dict[str, int]] | None:
    """Build the geometry, or None when a coordinate is not a finite double.

    Every number read is finite, but sums (relative commands), reflections, an arc's centre
    and radii, or the transform can overflow IEEE 754 binary64 (beyond ~1.797e308).
    """
    try:
        with np.errstate(over="ignore", invalid="ignore"):
            if small:
                contours, counts = _build_small(tok, matrix, tolerance)
            else:
                contours, counts = _build(tok, matrix, tolerance)
    except (ArithmeticError, ValueError):  # math.* on inf or nan in an arc's conversion
        return None
    if counts.pop(_NONFINITE, 0):
        return None
    return contours, counts


def _up_to_overflow(
    d: str, tok: _Tokens, matrix: NDArray[np.float64] | None, tolerance: float
) -> PathData:
    """The geometry before the first parameter group whose coordinates overflow, and that
    error (SVG 2 §9.5.4: everything up to the last good group is kept).

    Whether the first r groups build finite geometry only turns false once, so the group is
    found by bisection over the groups, on the tokens already read (a logarithmic number
    of builds, only on this error path).
    """
    codes = tok.commands
    arity = [_ARITY[chr(c).upper()] for c in codes]
    groups = [cnt // a if a else 1 for cnt, a in zip(tok.counts.tolist(), arity, strict=True)]
    cum = np.cumsum(groups) if groups else np.zeros(0, np.int64)
    num_start = np.cumsum(tok.counts) - tok.counts

    def head(rows: int) -> _Tokens:
        j = int(np.searchsorted(cum, rows, side="left"))  # command holding row rows - 1
        before = int(cum[j - 1]) if j else 0
        counts = tok.counts[: j + 1].copy()
        counts[j] = (rows - before) * arity[j]
        numbers = tok.numbers[: int(num_start[j]) + int(counts[j])]
        return _Tokens(codes[: j + 1], counts, numbers, tok.trailing_dot)

    lo, hi = 0, int(cum[-1]) if groups else 0  # the first lo rows build; the first hi do not
    best = PathData([], None, {})
    small = len(d) <= _SMALL
    while hi - lo > 1:
        mid = (lo + hi) // 2
        built = _build_finite(head(mid), matrix, tolerance, small)
        if built is None:
            hi = mid
        else:
            lo = mid
            best = PathData(built[0], None, built[1])
    # Row lo is the first bad one: command j, group g within it.
    j = int(np.searchsorted(cum, lo, side="right"))
    g = lo - (int(cum[j - 1]) if j else 0)
    letters = [m.start() for m in _SPLIT_RE.finditer(d)]
    pos = letters[j]
    if g:
        args_end = letters[j + 1] if j + 1 < len(letters) else len(d)
        pos = _number_offset(d, pos + 1, d[pos + 1 : args_end], arity[j], g * arity[j])
    token = _token_at(d, pos)
    best.error = SvgPathError(f"coordinates overflow at offset {pos}, found {token!r}", pos, token)
    return best


def parse_path_data(d: str, *, tolerance: float = ARC_TOLERANCE) -> list[Contour]:
    """Parse path data into contours, strictly.

    Parameters
    ----------
    d : str
        SVG path data.
    tolerance : float
        Arc conversion error bound relative to the arc's larger radius.

    Returns
    -------
    list of Contour
        One per subpath that has at least one segment; arcs become cubics.

    Raises
    ------
    SvgPathError
        At the first error, e.g. "expected a number at offset 17, found 'x'".

    Examples
    --------
    >>> [c.kinds() for c in parse_path_data("M0 0 L1 0 Q2 0 2 1z")]
    [['line', 'quad', 'line']]
    >>> parse_path_data("")
    []
    """
    res = read_path_data(d, tolerance=tolerance)
    if res.error is not None:
        raise res.error
    return res.contours


_CMD_BY_K = {2: "L", 3: "Q", 4: "C"}


def format_contour(contour: Contour, out: list[str]) -> None:
    """Append one contour's absolute path commands to ``out`` (see :func:`format_path_data`)."""
    segs = contour.segments
    if not segs:
        return
    f = format_number
    x0, y0 = segs[0][0]
    out.append(f"M{f(x0)} {f(y0)}")
    last = len(segs)
    if contour.closed and last >= 2:
        tail = segs[-1]
        # A closing line is recreated exactly by Z (it ends at the contour's first point).
        if tail.shape[0] == 2 and (tail[0][0] != tail[1][0] or tail[0][1] != tail[1][1]):
            last -= 1
    for s in segs[:last]:
        coords = " ".join(f"{f(x)} {f(y)}" for x, y in s[1:].tolist())
        out.append(f"{_CMD_BY_K[s.shape[0]]}{coords}")
    if contour.closed:
        out.append("Z")


def format_path_data(contours: Sequence[Contour]) -> str:
    """Write contours as SVG path data.

    Parameters
    ----------
    contours : sequence of Contour

    Returns
    -------
    str
        Absolute commands only (``M L Q C Z``), each written out (no implicit repeats),
        numbers in shortest round-trip positional form (see
        :func:`~outlinebench.io.numbers.format_number`), separated by single spaces.
        Reading the result back gives bit-identical control points.

    Examples
    --------
    >>> format_path_data(parse_path_data("m1e-7 0 h.5 v-.25z"))
    'M0.0000001 0 L0.5000001 0 L0.5000001 -0.25 Z'
    """
    out: list[str] = []
    for c in contours:
        format_contour(c, out)
    return " ".join(out)
