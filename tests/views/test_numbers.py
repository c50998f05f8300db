"""How numbers are written for people: 3 or 4 significant figures, never more, never fewer."""

from __future__ import annotations

import math
import re

import pytest
from hypothesis import given
from hypothesis import strategies as st

from routeplan.views.numbers import QUANTITY_FIGURES, SHARE_FIGURES, money, pct, share, sig
from text_helpers import significant_figures


def test_worked_values():
    # the issue's own examples (issue 19): a mass of 0.02743 t is 27.43 kg; 2667 stays whole
    assert sig(27.43) == "27.43"
    assert sig(2667.0) == "2667"
    assert sig(20.2) == "20.20"  # four figures, the trailing zero kept
    assert sig(0.6632) == "0.6632"
    assert sig(134_560.0) == "134 600"
    assert share(38.62) == "38.6" and share(1.1) == "1.10"
    assert pct(0.634) == "63.4 %" and pct(1.0) == "100 %"
    assert money(8733.02) == "8733" and money(1811.60) == "1812" and money(0.99) == "0.9900"
    assert sig(None) == "–" and sig(0.0) == "0"


def test_digit_groups_follow_the_si_brochure():
    # SI Brochure (BIPM, 9th edition 2019), section 5.4.4: digits may be grouped in threes
    # separated by a space, never by a comma or a point; a four-digit number is not split.
    assert sig(1234.0) == "1234"
    assert sig(12_346.0) == "12 350"
    assert sig(1_234_567.0) == "1 235 000"
    assert "," not in sig(98_765_432.0) and "." not in sig(98_765_432.0)


def test_rounding_up_into_the_next_decade():
    assert sig(9999.7) == "10 000"
    assert sig(99.996) == "100.0"
    assert share(9.996) == "10.0"


def test_tiny_and_huge_take_an_exponent():
    assert sig(1.2345e-5) == "1.234e-05" or sig(1.2345e-5) == "1.235e-05"
    assert sig(2.5e16) == "2.500e+16"


@given(st.floats(min_value=-1e18, max_value=1e18, allow_nan=False, allow_infinity=False))
def test_law_never_more_than_four_nor_fewer_than_three(x):
    # issue 19: never a number with more than four significant figures or fewer than three
    if x == 0:
        assert sig(x) == "0"
        return
    assert significant_figures(sig(x), QUANTITY_FIGURES) == QUANTITY_FIGURES, sig(x)
    assert significant_figures(sig(x, SHARE_FIGURES), SHARE_FIGURES) == SHARE_FIGURES, sig(x, SHARE_FIGURES)


@given(st.floats(min_value=1e-4, max_value=1e14, allow_nan=False, allow_infinity=False))
def test_law_the_text_reads_back_within_half_a_unit_of_the_last_figure(x):
    text = sig(x).replace(" ", "")
    back = float(text)
    last = 10 ** (math.floor(math.log10(abs(x))) - QUANTITY_FIGURES + 1)
    assert abs(back - x) <= last / 2 * (1 + 1e-9) or math.isclose(back, x, rel_tol=5e-4)


@pytest.mark.parametrize("x", [0.001, 0.5, 7.0, 63.25, 999.94, 5000.0])
def test_plain_decimal_in_everyday_sizes(x):
    assert re.fullmatch(r"-?\d+(\.\d+)?", sig(x)), sig(x)
