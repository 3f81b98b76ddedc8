"""Tests of outlinebench/io/numbers.py: shortest positional number formatting."""

import math
import struct

import pytest
from hypothesis import given
from hypothesis import strategies as st

from outlinebench.io.numbers import format_number


@pytest.mark.parametrize(
    ("value", "text"),
    [
        # Expected strings from Python's repr (shortest round-trip digits, David Gay's
        # algorithm) written out positionally; worked by hand.
        (0.0, "0"),
        (-0.0, "0"),
        (1.0, "1"),
        (-2.5, "-2.5"),
        (0.1, "0.1"),
        (1e-7, "0.0000001"),
        (-1.5e-10, "-0.00000000015"),
        (1e16, "10000000000000000"),
        (1.2345e20, "123450000000000000000"),
        (0.30000000000000004, "0.30000000000000004"),
        (5e-324, "0." + "0" * 323 + "5"),
    ],
)
def test_known_values(value, text):
    assert format_number(value) == text


@given(st.floats(allow_nan=False, allow_infinity=False))
def test_round_trip_is_exact_and_plain(x):
    # Exactness: float(text) must have the same bits (struct comparison); -0.0 is written 0.
    text = format_number(x)
    back = float(text)
    if x == 0.0:
        assert text == "0"
    else:
        assert struct.pack("<d", back) == struct.pack("<d", x)
    assert "e" not in text and "E" not in text
    assert not text.endswith(".") and not text.startswith("-0") or text.startswith("-0.")
    assert text != "-0"


@pytest.mark.parametrize("bad", [math.inf, -math.inf, math.nan])
def test_non_finite_is_refused(bad):
    with pytest.raises(ValueError, match="cannot write"):
        format_number(bad)
