"""How every number is written for people: three or four significant figures, never more.

The one home of the rule the terminal (and any sentence a view builds) follows:

* a quantity with a unit (amount, mass, volume, money, a computed temperature, a gas
  rate) is written to **4** significant figures, trailing zeros kept (``20.20 kg``,
  ``0.6632 kg``, ``2667 mol``);
* a share or ratio without a unit (yields and other percentages, kg/kg ratios such as the
  PMI, equivalents) is written to **3** significant figures (``63.4 %``, ``92.0 %``,
  ``38.6``, ``1.10``);
* a number too large for its figures after the decimal point is rounded to them and
  written whole, the zeros after the last figure only holding the place (``1230`` for
  1234.5 at 3 figures); from 10 000 up its digits are grouped in threes by a space
  (``13 190``, ``1 234 000``).  Grouping by a space, never by a comma or a point, and not
  splitting a four-digit number, follows the SI Brochure (BIPM, 9th edition 2019,
  section 5.4.4);
* below 0.0001, and from 10^15 up, the number is written with an exponent (``1.234e-05``);
* zero is ``0``.

Counts (steps, batches, packs) and numbers copied from the route file (a pack size, a
vessel's volume, a cycle time, a temperature written there) are exact; they are written
as they are, not through these functions.
"""

from __future__ import annotations

import math


__all__ = ["sig", "share", "pct", "given_pct", "money", "grouped", "QUANTITY_FIGURES", "SHARE_FIGURES"]

#: Significant figures of a quantity with a unit [-].
QUANTITY_FIGURES = 4

#: Significant figures of a share or ratio without a unit [-].
SHARE_FIGURES = 3

_GROUP_FROM = 1e4
_EXPONENT_BELOW = 1e-4
_EXPONENT_FROM = 1e15


def grouped(whole: int) -> str:
    """A whole number with its digits in groups of three, separated by a space (a count
    such as the number of yield draws is written so too).

    >>> grouped(100000), grouped(-1234567)
    ('100 000', '-1 234 567')
    """
    text = f"{abs(whole):,}".replace(",", " ")
    return ("-" if whole < 0 else "") + text


def sig(value: float | None, figures: int = QUANTITY_FIGURES) -> str:
    """``value`` to ``figures`` significant figures, as the module's rule says.

    Parameters
    ----------
    value : float or None
        Any number, in the unit the caller shows; None gives an en dash.
    figures : int
        Significant figures [-], 3 or 4 by the rule.

    Examples
    --------
    >>> [sig(x) for x in (20.2, 0.6632, 2667.4, 13194.6, 0.0, 1e-6, None)]
    ['20.20', '0.6632', '2667', '13 190', '0', '1.000e-06', '–']
    >>> sig(9999.7), sig(0.63412, 3), sig(100.0, 3), sig(1234.5, 3)
    ('10 000', '0.634', '100', '1230')
    """
    if value is None:
        return "–"
    if not math.isfinite(value):
        return str(value)
    if value == 0:
        return "0"
    mag = abs(value)
    if mag < _EXPONENT_BELOW or mag >= _EXPONENT_FROM:
        return f"{value:.{figures - 1}e}"
    exponent = math.floor(math.log10(mag))
    rounded = round(value, figures - 1 - exponent)
    if abs(rounded) >= _GROUP_FROM:
        return grouped(int(rounded))
    if abs(rounded) >= 10 ** figures:  # whole, its last digits holding the place (1234 at 3 figures: 1230)
        return str(int(rounded))
    text = f"{rounded:#.{figures}g}"
    if "e" in text:  # 999.96 at 4 figures rounds to 1.000e+03
        return str(int(round(rounded)))
    return text.rstrip(".")


def share(value: float | None) -> str:
    """A ratio without a unit (PMI, kg/kg, equivalents) to 3 significant figures.

    >>> share(38.62), share(1.1), share(None)
    ('38.6', '1.10', '–')
    """
    return sig(value, SHARE_FIGURES)


def pct(fraction: float | None) -> str:
    """A fraction [-] as a percentage to 3 significant figures, with a space before ``%``.

    >>> [pct(x) for x in (0.634, 0.92, 1.0, 0.005)]
    ['63.4 %', '92.0 %', '100 %', '0.500 %']
    """
    if fraction is None:
        return "–"
    return f"{sig(100 * fraction, SHARE_FIGURES)} %"


def given_pct(fraction: float | None) -> str:
    """A fraction the route file gives [-] (an overage, a vessel's largest fill, a yield as
    typed) as a percentage as the file would write it: up to 4 significant figures, no
    trailing zeros, a space before ``%``.

    >>> [given_pct(x) for x in (0.02, 0.8, 0.925, 0.12345, None)]
    ['2 %', '80 %', '92.5 %', '12.35 %', '–']
    """
    if fraction is None:
        return "–"
    return f"{fraction * 100:.4g} %"


def money(value: float | None) -> str:
    """An amount of money (the route's currency) to 4 significant figures.

    >>> [money(x) for x in (1811.6, 342.47, 0.99, 96043.0)]
    ['1812', '342.5', '0.9900', '96 040']
    """
    return sig(value, QUANTITY_FIGURES)
