"""Molecular formulas: parsing, element counts and molar masses.

Grammar (whitespace between tokens is ignored, but never inside a number)::

    formula  := part (SEP part)* charge?
    part     := count? item+              (no count before the first part)
    item     := Element count? | "(" item+ ")" count? | "[" item+ "]" count?
    SEP      := "·" | "." | "*"           (also "•", "∙", "⋅")
    count    := 12 | 0.5 | 1.5            (positive; integer or decimal)
    charge   := "-2" | "+3" | "+" | "--" | "^2-" | "^-2" | " 2-" (at the end)
              | "4-" right after a closing "]" at the end ("[Fe(CN)6]4-")

``CuSO4·5H2O``, ``CuSO4.5H2O`` and ``CuSO4*5H2O`` are copper sulfate pentahydrate;
``CaSO4·0.5H2O``, ``CaSO4*0.5H2O`` and ``CaSO4.0.5H2O`` the hemihydrate.  As the route
format says, a dot followed by a count and a formula starts a hydrate part: ``X4.5H2O``
is ``X4·5H2O``.  A decimal count therefore stands in a part only where it cannot start one:
below 1 (``Fe0.95O``), at the end of a part (``C2H4.5``), or followed by a space
(``Li1.2 Mn0.54O2``).  A dot that could be read either way (``C1.5.3H2O``) is an error.
A formula that begins with a count (``2H2O``) is an error, never read as a hydrate or an
isotope.  Unicode subscript digits and the minus sign U+2212 are read as digits and ``-``.

Three slips are refused rather than read: a count of two or more digits followed by one
sign at the end (``SO42-``: ``O4`` with charge 2−, or ``O42`` with charge 1−?) shows both
readings; a count with a leading zero (``N03``) is taken for a zero typed in place of the
letter O; and a count above :data:`MAX_COUNT`, or an element summed above it, is no real
compound.  Digits and a sign right after a closing square bracket at the end are the
charge of the bracketed ion (``[SO4]2-`` is sulfate, ``[Co(NH3)6]3+`` hexaamminecobalt(III)).

Molar masses use the standard atomic weights of :mod:`routeplan.chemistry.elements`; the
mass of the electrons gained or lost by an ion is neglected (5.5e-4 g/mol per charge).
"""

from __future__ import annotations

import functools
import re
from dataclasses import field
from decimal import Decimal
from fractions import Fraction
from types import MappingProxyType
from typing import TYPE_CHECKING, Mapping, Union

from routeplan.chemistry.elements import (
    element_name,
    has_standard_weight,
    hill_sort_key,
    is_symbol,
    table,
)
from routeplan.errors import FormulaError
from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    import pint

__all__ = [
    "MAX_COUNT",
    "Formula",
    "parse_formula",
    "element_counts",
    "molar_mass",
    "molar_mass_value",
    "hill_formula",
]

Number = Union[int, float]

_SEPARATORS = frozenset("·•∙⋅*.")
_DIGITS = frozenset("0123456789")
_TRANSLATE = str.maketrans({**{chr(0x2080 + d): str(d) for d in range(10)}, "\u2212": "-"})

#: Common abbreviations of organic chemistry, for hints only (never expanded).
_ABBREVIATIONS: Mapping[str, str] = MappingProxyType({
    "Ph": "C6H5", "Me": "CH3", "Et": "C2H5", "Bu": "C4H9", "Bn": "C6H5CH2",
    "Bz": "C6H5CO", "Ac": "CH3CO", "Ts": "CH3C6H4SO2", "Ms": "CH3SO2", "Tf": "CF3SO2",
    "Boc": "C5H9O2", "Cbz": "C8H7O2", "Py": "C5H5N", "Cp": "C5H5", "Cy": "C6H11",
})
#: Placeholders of structural drawings that are no elements.
_PLACEHOLDERS = frozenset({"R", "X", "L", "Nu", "E", "M", "Hal", "Ln"})

_CHARGE_PATTERNS = (
    re.compile(r"\^\s*(?P<n>[0-9]*)\s*(?P<sign>[+-])\s*"),   # ^2-  ^-
    re.compile(r"\^\s*(?P<sign>[+-])\s*(?P<n>[0-9]*)\s*"),   # ^-2  ^+
    re.compile(r"(?P<sign>[+-])(?P<n>[0-9]+)\s*"),           # -2   +3
    re.compile(r"(?P<signs>\++|-+)\s*"),                  # +    --   +++
)
#: Digits and one or more signs up to the end: the charge of a bracketed ion after ``]``.
_BRACKET_CHARGE = re.compile(r"(?P<n>[0-9]+)\s*(?P<sign>[+-])\s*$")
#: A count of two or more digits followed by a single sign up to the end (``SO42-``).
_AMBIGUOUS_CHARGE = re.compile(r"(?P<n>[0-9]+[1-9])(?P<sign>[+-])\s*$")

#: Largest number of atoms of one element a formula may hold [-].  The largest molecules
#: with a known formula, proteins such as titin, hold some 170 000 carbon atoms (from
#: memory); a million is far beyond any compound a route charges (common practice, no
#: source), and a count beyond it is a typo.
MAX_COUNT = 1_000_000
#: Longest count read [digits]; anything longer is refused before it is converted.
_MAX_DIGITS = len(str(MAX_COUNT)) + 6

_SPACED_CHARGE = re.compile(r"(?P<n>[0-9]+)\s*(?P<sign>[+-])\s*")  # " 2-" after a space


@frozen
class Formula:
    """A parsed formula: element counts and a charge.

    Parameters
    ----------
    counts : Mapping[str, int | float]
        Element symbol -> number of atoms [-], in Hill order; ints where whole.
    charge : int
        Net charge in elementary charges [-].
    text : str
        The formula as written (not compared).
    """

    counts: Mapping[str, Number]
    charge: int = 0
    text: str = field(default="", compare=False)

    def __post_init__(self) -> None:
        if not isinstance(self.counts, MappingProxyType):
            object.__setattr__(self, "counts", MappingProxyType(dict(self.counts)))

    def __hash__(self) -> int:
        return hash((tuple(self.counts.items()), self.charge))

    def hill(self) -> str:
        """The formula in Hill order, e.g. ``'CuH10O9S'`` (see :func:`hill_formula`)."""
        return hill_formula(self.counts, self.charge)


class _Parser:
    """Recursive-descent reader of one formula string (positions are 0-based inside)."""

    def __init__(self, text: str) -> None:
        self.text = text
        self.s = text.translate(_TRANSLATE)
        self.n = len(self.s)
        self.i = 0
        self.last_symbol: tuple[str, int] | None = None
        self.charge_at: int | None = None  # where a charge after a closing ']' begins

    # -- errors -----------------------------------------------------------------
    def fail(self, what: str, token: str, pos: int, hint: str | None = None) -> FormulaError:
        shown = self.text if len(self.text) <= 60 else f"{self.text[:40]}…({len(self.text)} characters)"
        return FormulaError(f"formula '{shown}': {what}", formula=self.text, token=token,
                            position=pos + 1, hint=hint)

    # -- scanning helpers -----------------------------------------------------------
    def peek(self, k: int = 0) -> str:
        j = self.i + k
        return self.s[j] if j < self.n else ""

    def skip_ws(self) -> None:
        while self.i < self.n and self.s[self.i].isspace():
            self.i += 1

    def digits(self, j: int) -> int:
        while j < self.n and self.s[j] in "0123456789":
            j += 1
        return j

    # -- grammar ------------------------------------------------------------------
    def parse(self) -> Formula:
        self.skip_ws()
        if self.i >= self.n:
            raise FormulaError("formula is empty" if not self.text else
                               f"formula '{self.text}' is empty", formula=self.text)
        total: dict[str, Fraction] = {}
        charge = 0
        first = True
        while True:
            if not first:
                c = self.peek()
                if c in _SEPARATORS:
                    sep_at = self.i
                    self.i += 1
                    self.skip_ws()
                    if self.i >= self.n:
                        raise self.fail(f"dangling '{c}' at position {sep_at + 1}", c, sep_at,
                                        "a hydrate needs a formula after the dot, "
                                        "e.g. 'CuSO4·5H2O'")
                    if self.peek() in _SEPARATORS:
                        raise self.fail(f"'{self.peek()}' at position {self.i + 1} follows another "
                                        f"'{c}'", self.peek(), self.i)
                elif c in "+-^":
                    charge = self.parse_charge()
                    break
                elif c in _DIGITS:
                    charge = self.parse_spaced_charge()
                    break
                else:
                    raise self.unexpected()
            elif self.peek() in _SEPARATORS:
                raise self.fail(f"'{self.peek()}' at position {self.i + 1} has no formula "
                                f"before it", self.peek(), self.i)
            for sym, k in self.parse_part(first).items():
                total[sym] = total.get(sym, 0) + k
            first = False
            self.skip_ws()
            if self.i >= self.n:
                break
        return _make(total, charge, self.text)

    def unexpected(self) -> FormulaError:
        c = self.peek()
        if not c:
            return self.fail("formula ends too early", "", self.n - 1)
        if c in ")]":
            return self.fail(f"'{c}' at position {self.i + 1} has no matching "
                             f"'{'(' if c == ')' else '['}'", c, self.i)
        if c == "=":
            return self.fail(f"unexpected '=' at position {self.i + 1}", c, self.i,
                             "a formula has no '='; is this an equation?")
        return self.fail(f"unexpected '{c}' at position {self.i + 1}", c, self.i)

    def parse_part(self, first: bool) -> dict[str, Fraction]:
        mult = Fraction(1)
        if self.peek() in _DIGITS:
            start = self.i
            end = self.digits(self.i)
            if end + 1 < self.n and self.s[end] == "." and self.s[end + 1] in _DIGITS:
                end = self.digits(end + 1)
            tok = self.s[start:end]
            if not first:
                self.check_count(start, self.digits(start), multiplier=True)
            if first:
                raise self.fail(
                    f"formula begins with a count '{tok}' at position {start + 1}", tok, start,
                    f"write a hydrate or solvate with a dot after the main formula, e.g. "
                    f"'CuSO4·{tok}H2O', or drop the count")
            mult = Fraction(tok)
            if mult == 0:
                raise self.fail(f"zero count '{tok}' at position {start + 1}", tok, start)
            self.i = end
            self.skip_ws()
            if not self.starts_item():
                raise self.fail(f"count '{tok}' at position {start + 1} has no formula after it",
                                tok, start, "write e.g. 'CuSO4·5H2O'")
        elif not self.starts_item():
            raise self.unexpected()
        counts = self.parse_items(None, -1)
        return {k: v * mult for k, v in counts.items()}

    def starts_item(self) -> bool:
        c = self.peek()
        return c != "" and (c.isupper() or c.islower() or c in "([")

    def parse_items(self, closer: str | None, open_at: int) -> dict[str, Fraction]:
        counts: dict[str, Fraction] = {}
        seen = False
        while True:
            before_ws = self.i
            self.skip_ws()
            c = self.peek()
            if not c:
                if closer:
                    raise self.fail(f"unclosed '{self.s[open_at]}' at position {open_at + 1}",
                                    self.s[open_at], open_at, f"add '{closer}'")
                return counts
            if c.isupper():
                sym, at = self.read_symbol()
                k = self.read_count()
                counts[sym] = counts.get(sym, 0) + k
            elif c.islower():
                raise self.lowercase_error()
            elif c in "([":
                at = self.i
                self.i += 1
                inner = self.parse_items(")" if c == "(" else "]", at)
                if c == "[" and _BRACKET_CHARGE.match(self.s, self.i):
                    self.charge_at, k = self.i, Fraction(1)
                else:
                    k = self.read_count()
                for sym, v in inner.items():
                    counts[sym] = counts.get(sym, 0) + v * k
            elif c in ")]":
                if closer is None:
                    raise self.unexpected()
                if c != closer:
                    raise self.fail(f"'{c}' at position {self.i + 1} does not close "
                                    f"'{self.s[open_at]}' at position {open_at + 1}", c, self.i,
                                    f"write '{closer}'")
                if not seen:
                    raise self.fail(f"empty brackets '{self.s[open_at]}{c}' at position "
                                    f"{open_at + 1}", self.s[open_at] + c, open_at)
                self.i += 1
                return counts
            elif c in _DIGITS:
                tok = self.s[self.i:self.digits(self.i)]
                if self.i == self.charge_at and closer is None:
                    return counts        # '[SO4]2-': the digits are the charge; the caller reads it
                if before_ws != self.i and closer is None:
                    self.i = before_ws   # maybe a charge written after a space: the caller decides
                    return counts
                if before_ws != self.i:
                    raise self.fail(f"count '{tok}' at position {self.i + 1} is separated from its "
                                    f"element by a space", tok, self.i)
                raise self.fail(f"count '{tok}' at position {self.i + 1} has no element before it",
                                tok, self.i)
            else:
                if closer is not None:
                    raise self.fail(f"unexpected '{c}' at position {self.i + 1} inside "
                                    f"'{self.s[open_at]}' at position {open_at + 1}", c, self.i,
                                    f"close it with '{closer}' first")
                return counts
            seen = True

    def read_symbol(self) -> tuple[str, int]:
        at = self.i
        j = at + 1
        while j < self.n and self.s[j].islower():
            j += 1
        sym = self.s[at:j]
        prev = self.last_symbol
        if not is_symbol(sym):
            raise self.unknown_element(sym, at, prev)
        self.i = j
        self.last_symbol = (sym, at)
        return sym, at

    def unknown_element(self, sym: str, at: int, prev: tuple[str, int] | None) -> FormulaError:
        hint = None
        if sym in _ABBREVIATIONS:
            hint = f"abbreviations are not expanded: write {sym} as {_ABBREVIATIONS[sym]}"
        elif (prev is not None and prev[1] + len(prev[0]) == at and len(prev[0]) == 1
              and len(sym) == 1 and is_symbol(prev[0] + sym.lower())):
            hint = f"did you mean '{prev[0] + sym.lower()}' instead of '{prev[0] + sym}'?"
        elif sym in _PLACEHOLDERS:
            hint = f"'{sym}' is a placeholder, not an element: write out the atoms it stands for"
        elif len(sym) > 2:
            hint = "an element symbol is one capital letter, with at most one small letter after it"
        return self.fail(f"unknown element '{sym}' at position {at + 1}", sym, at, hint)

    def lowercase_error(self) -> FormulaError:
        at = self.i
        j = at
        while j < self.n and self.s[j].islower():
            j += 1
        tok = self.s[at:j]
        hint = None
        for cand in (tok[:2].capitalize(), tok[:1].upper()):
            if is_symbol(cand):
                hint = f"did you mean '{cand}'?"
                break
        return self.fail(f"'{tok}' at position {at + 1}: an element symbol starts with a capital "
                         f"letter", tok, at, hint)

    def read_count(self) -> Fraction:
        """Read the count after an element or a closing bracket (1 if there is none)."""
        start = self.i
        if self.peek() not in _DIGITS or not self.peek():
            return Fraction(1)
        end = self.digits(start)
        whole = self.s[start:end]
        self.check_count(start, end)
        if end + 1 < self.n and self.s[end] == "." and self.s[end + 1] in _DIGITS:
            frac_end = self.digits(end + 1)
            frac = self.s[end + 1:frac_end]
            after = self.s[frac_end] if frac_end < self.n else ""
            if whole.strip("0") == "":
                end = frac_end                        # 0.95: a decimal below 1
            elif after != "" and (after.isalpha() or after in "(["):
                pass                                  # 4.5H2O: the dot starts a hydrate part
            elif after == ".":
                if not frac.startswith("0"):
                    tok = self.s[start:frac_end + 1]
                    raise self.fail(
                        f"ambiguous dots in '{tok}' at position {start + 1}", tok, start,
                        "write the hydrate dot as '·' or '*', e.g. 'CaSO4·1.5H2O'")
            else:
                end = frac_end                        # C2H4.5 at the end of a part
        tok = self.s[start:end]
        value = Fraction(tok)
        if value == 0:
            raise self.fail(f"zero count '{tok}' at position {start + 1}", tok, start,
                            "leave the element out instead")
        self.i = end
        return value

    def check_count(self, start: int, end: int, *, multiplier: bool = False) -> None:
        """Refuse the count ``s[start:end]`` (whole digits after an element or a bracket)
        where it is too large, starts with a zero, or may hold the charge."""
        whole = self.s[start:end]
        decimal = end + 1 < self.n and self.s[end] == "." and self.s[end + 1] in _DIGITS
        if len(whole) > _MAX_DIGITS or int(whole) > MAX_COUNT:
            shown = whole if len(whole) <= 12 else f"{whole[:6]}…({len(whole)} digits)"
            raise self.fail(f"count '{shown}' at position {start + 1} is beyond any real compound "
                            f"(more than {MAX_COUNT:,} atoms)", shown, start,
                            "check the digits of the formula")
        if len(whole) > 1 and whole[0] == "0" and not decimal:
            if multiplier:
                raise self.fail(f"count '{whole}' at position {start + 1} starts with a zero", whole, start,
                                f"write it as {int(whole)}")
            fixed = self.text[:start] + whole.replace("0", "O", 1) + self.text[end:]
            raise self.fail(f"count '{whole}' at position {start + 1} starts with a zero", whole, start,
                            f"a count never does: was the letter O meant, as in '{fixed}'?")
        m = _AMBIGUOUS_CHARGE.match(self.s, start)
        if m and not decimal:
            n, sign = m.group("n"), m.group("sign")
            word = "−" if sign == "-" else "+"
            head = self.text[:start]
            raise self.fail(
                f"'{n}{sign}' at position {start + 1} can be read two ways: count {n[:-1]} with charge "
                f"{n[-1]}{word}, or count {n} with charge 1{word}", n + sign, start,
                f"write '{head}{n[:-1]}^{n[-1]}{sign}' (or '[{head}{n[:-1]}]{n[-1]}{sign}') for the first, "
                f"'{head}{n}^{sign}' for the second")

    def parse_charge(self) -> int:
        at = self.i
        rest = self.s[at:]
        for pat in _CHARGE_PATTERNS:
            m = pat.fullmatch(rest)
            if m:
                break
        else:
            raise self.fail(f"cannot read the charge '{rest.strip()}' at position {at + 1}",
                            rest.strip(), at, "write the charge at the end, e.g. 'SO4-2', "
                            "'SO4^2-' or 'NH4+'")
        groups = m.groupdict()
        if "signs" in groups:
            signs = groups["signs"]
            value = len(signs)
            sign = signs[0]
        else:
            value = int(groups["n"]) if groups["n"] else 1
            sign = groups["sign"]
        if value == 0:
            raise self.fail(f"zero charge '{rest.strip()}' at position {at + 1}", rest.strip(), at,
                            "leave the charge out for a neutral formula")
        self.i = self.n
        return value if sign == "+" else -value

    def parse_spaced_charge(self) -> int:
        at = self.i
        m = _SPACED_CHARGE.fullmatch(self.s, at)
        if not m:
            tok = self.s[at:self.digits(at)]
            raise self.fail(f"count '{tok}' at position {at + 1} is separated from its element by "
                            f"a space", tok, at)
        value = int(m.group("n"))
        if value == 0:
            tok = self.s[at:].strip()
            raise self.fail(f"zero charge '{tok}' at position {at + 1}", tok, at)
        self.i = self.n
        return value if m.group("sign") == "+" else -value


def _number(x: Fraction) -> Number:
    return int(x) if x.denominator == 1 else float(x)


def _make(counts: Mapping[str, Fraction], charge: int, text: str) -> Formula:
    for sym, k in counts.items():
        if k > MAX_COUNT:
            raise FormulaError(f"formula '{text}' holds {float(k):.4g} atoms of {sym}, beyond any real "
                               f"compound (more than {MAX_COUNT:,})", formula=text, token=sym,
                               position=_position_of(sym, text), hint="check the counts and the brackets")
    has_c = "C" in counts
    ordered = sorted(counts, key=lambda s: hill_sort_key(s, has_c))
    return Formula(MappingProxyType({s: _number(counts[s]) for s in ordered}), charge, text)


#: Distinct texts (formulas, equations) whose parse is kept [-]: more than a route of
#: 10 000 steps holds, so that a long route is not parsed twice over (an LRU cache
#: smaller than the route misses on every text when it is read a second time).
CACHE_SIZE = 1 << 16


@functools.lru_cache(maxsize=CACHE_SIZE)
def _parse_cached(text: str) -> Formula:
    return _Parser(text).parse()


def parse_formula(formula: str) -> Formula:
    """Parse a molecular formula.

    Parameters
    ----------
    formula : str
        E.g. ``"C8H7BrO2"``, ``"Pd(C2H3O2)2"``, ``"CuSO4·5H2O"``, ``"SO4-2"``.

    Returns
    -------
    Formula
        Frozen element counts [-] in Hill order and the charge [-] (cached per string).

    Raises
    ------
    FormulaError
        Naming the offending token and its 1-based position.

    Examples
    --------
    >>> parse_formula("CuSO4·5H2O").hill()
    'CuH10O9S'
    >>> parse_formula("SO4^2-").charge
    -2
    """
    if isinstance(formula, Formula):
        return formula
    if not isinstance(formula, str):
        raise FormulaError(f"a formula must be text, got {formula!r}", formula=repr(formula))
    return _parse_cached(formula)


def element_counts(formula: str | Formula) -> dict[str, Number]:
    """Number of atoms of each element in a formula.

    Parameters
    ----------
    formula : str or Formula
        The formula, e.g. ``"CaSO4·0.5H2O"``.

    Returns
    -------
    dict[str, int | float]
        Element symbol -> atoms per formula unit [-], in Hill order; ints where whole.

    Examples
    --------
    >>> element_counts("CaSO4·0.5H2O")
    {'Ca': 1, 'H': 1, 'O': 4.5, 'S': 1}
    """
    return dict(parse_formula(formula).counts)


def _position_of(symbol: str, text: str) -> int:
    m = re.search(re.escape(symbol) + r"(?![a-z])", text)
    return m.start() + 1 if m else 1


def _mass_of(f: Formula) -> float:
    weights = table()
    terms = []
    for sym, k in f.counts.items():
        if not is_symbol(sym):
            raise FormulaError(f"formula '{f.text}': unknown element '{sym}'", formula=f.text,
                               token=sym)
        if not has_standard_weight(sym):
            hint = "give the material an explicit molar_mass instead"
            if sym in _ABBREVIATIONS:
                hint = (f"if '{sym}' is an abbreviation, write it as {_ABBREVIATIONS[sym]}; "
                        f"else {hint}")
            raise FormulaError(
                f"formula '{f.text or f.hill()}': element '{sym}' ({element_name(sym)}) has no "
                f"standard atomic weight", formula=f.text, token=sym,
                position=_position_of(sym, f.text), hint=hint)
        # decimal arithmetic: the table's weights are decimal numbers, so the sum is exact
        # and rounded to a float once (CuSO4·5H2O is 249.677, not 249.67700000000002)
        terms.append(Decimal(repr(k)) * Decimal(repr(weights[sym].weight)))
    return float(sum(terms, Decimal(0)))


@functools.lru_cache(maxsize=CACHE_SIZE)
def _mass_cached(text: str) -> float:
    return _mass_of(_parse_cached(text))


def molar_mass_value(formula: str | Formula) -> float:
    """Molar mass of a formula as a plain float [g/mol] (fast; no units).

    Sum of count × standard atomic weight; the electron mass of an ion's charge is neglected.

    Parameters
    ----------
    formula : str or Formula
        The formula, e.g. ``"H2O"``.

    Returns
    -------
    float
        Molar mass [g/mol].

    Raises
    ------
    FormulaError
        Unparseable formula, or an element without a standard atomic weight.

    Examples
    --------
    >>> round(molar_mass_value("H2O"), 3)
    18.015
    """
    if isinstance(formula, Formula):
        return _mass_of(formula)
    if not isinstance(formula, str):
        parse_formula(formula)  # raises the error for a non-string
    return _mass_cached(formula)


def molar_mass(formula: str | Formula) -> "pint.Quantity":
    """Molar mass of a formula as a quantity [g/mol].

    Parameters
    ----------
    formula : str or Formula
        The formula, e.g. ``"CuSO4·5H2O"``.

    Returns
    -------
    pint.Quantity
        Molar mass [g/mol], from CIAAW standard atomic weights (see
        :mod:`routeplan.chemistry.elements`); electron mass neglected.

    Examples
    --------
    >>> print(round(molar_mass("H2O").to("g/mol").magnitude, 3))
    18.015
    """
    from routeplan.units import Q

    return Q(molar_mass_value(formula), "g/mol")


def _format_count(k: Number) -> str:
    if isinstance(k, float) and k.is_integer():
        k = int(k)
    return "" if k == 1 else (str(k) if isinstance(k, int) else format(k, ".12g"))


def hill_formula(counts: Mapping[str, Number], charge: int = 0) -> str:
    """Write element counts as a formula in Hill order.

    Carbon first, then hydrogen, then the other elements alphabetically; without carbon,
    all alphabetically (E. A. Hill, J. Am. Chem. Soc. 1900, 22, 478).  The result reads
    back to the same counts with :func:`parse_formula`: a decimal count of 1 or more that
    is followed by another element gets a space after it (``C1.5 H3``).

    Parameters
    ----------
    counts : Mapping[str, int | float]
        Element symbol -> atoms [-]; zero counts are left out.
    charge : int
        Net charge [-], written at the end as ``+``, ``-``, ``+2``, ``-2`` (a charge of
        one after a count of two or more digits as ``^+``, ``^-``, so ``Ag12^+`` is not read
        as ``Ag1`` with charge 2+).

    Returns
    -------
    str
        E.g. ``'C2H6O'``.

    Raises
    ------
    ValueError
        A negative count.

    Examples
    --------
    >>> hill_formula({"O": 1, "H": 2})
    'H2O'
    >>> hill_formula({"S": 1, "O": 4}, charge=-2)
    'O4S-2'
    """
    has_c = bool(counts.get("C"))
    items = [(s, k) for s, k in counts.items() if k != 0]
    for s, k in items:
        if k < 0:
            raise ValueError(f"negative count {k} for {s}")
    items.sort(key=lambda sk: hill_sort_key(sk[0], has_c))
    out = []
    for idx, (s, k) in enumerate(items):
        text = _format_count(k)
        out.append(s + text)
        if "." in text and float(k) >= 1 and idx + 1 < len(items):
            out.append(" ")
    if charge:
        sign = "+" if charge > 0 else "-"
        if abs(charge) != 1:
            out.append(sign + str(abs(charge)))
        elif out and re.search(r"[0-9]{2}$", out[-1]):
            out.append("^" + sign)  # 'Ag12^+': 'Ag12+' could be read as Ag1 with charge 2+
        else:
            out.append(sign)
    return "".join(out)
