"""Stoichiometric equations over material keys, as written in a route file.

::

    Amine + Ac2O -> Amide + AcOH
    2 ArOH + K2CO3 -> 2 ArOK + H2O + CO2
    0.5 X -> Y

A material key is letters, digits, ``-``, ``_`` and ``.``, starting with a letter or a
digit.  A coefficient is a positive number from 1e-6 to 1e6 (:data:`COEFFICIENT_RANGE`)
followed by whitespace before its key; without one the coefficient is 1 (so ``2ArOH`` is
the key ``2ArOH``, not two ``ArOH``).  The arrow is ``->``; the Unicode arrow ``→``
(U+2192) is accepted as the same.  ``=``, ``=>``, ``-->`` and equilibrium arrows are
errors that suggest ``->``.  A key may appear once only.
"""

from __future__ import annotations

import functools
import re
from dataclasses import field

from routeplan.chemistry.formula import CACHE_SIZE
from routeplan.errors import EquationError
from routeplan.frozen import frozen

__all__ = ["Term", "Equation", "parse_equation", "COEFFICIENT_RANGE"]

#: Coefficients an equation may have [-], inclusive.  Real equations use small numbers
#: (1, 2, 0.5, 1/3 written as 0.333); outside this range a number is a typo, and at the
#: extremes of floating point it makes the planner divide by zero or overflow
#: (common practice, no source).
COEFFICIENT_RANGE = (1e-6, 1e6)

_KEY = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.\-]*")
_NUMBER = re.compile(r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?")
_ARROW = "->"
_ARROW_ALIASES = ("\u2192",)                              # →
_WRONG_ARROWS = ("<=>", "<->", "\u21cc", "\u21c4", "\u27f6", "-->", "=>", "=")
_KEY_CHARS_HINT = "a key has letters, digits, '-', '_' and '.', and starts with a letter or digit"


@frozen
class Term:
    """One side's term: a coefficient and a material key.

    Parameters
    ----------
    coefficient : float
        Stoichiometric coefficient [-] (mol per mol of reaction), positive.
    key : str
        Material key.
    """

    coefficient: float
    key: str

    def __str__(self) -> str:
        c = self.coefficient
        return self.key if c == 1 else f"{c:g} {self.key}"


@frozen
class Equation:
    """A parsed equation.

    Parameters
    ----------
    reactants, products : tuple[Term, ...]
        Terms in the order written.
    text : str
        The equation as written (not compared).
    """

    reactants: tuple[Term, ...]
    products: tuple[Term, ...]
    text: str = field(default="", compare=False)

    def __str__(self) -> str:
        return " + ".join(map(str, self.reactants)) + " -> " + " + ".join(map(str, self.products))

    @property
    def species(self) -> tuple[str, ...]:
        """All keys, reactants first, in the order written."""
        return tuple(t.key for t in self.reactants + self.products)

    def _find(self, key: str) -> tuple[str, Term]:
        for t in self.reactants:
            if t.key == key:
                return "reactant", t
        for t in self.products:
            if t.key == key:
                return "product", t
        raise KeyError(f"'{key}' is not in the equation '{self}'")

    def coefficient(self, key: str) -> float:
        """Coefficient of ``key`` [-] (positive on either side).

        Raises
        ------
        KeyError
            The key is not in the equation.
        """
        return self._find(key)[1].coefficient

    def side(self, key: str) -> str:
        """``"reactant"`` or ``"product"``.

        Raises
        ------
        KeyError
            The key is not in the equation.
        """
        return self._find(key)[0]


def _fail(text: str, what: str, hint: str | None = None) -> EquationError:
    return EquationError(f"equation '{text}': {what}", equation=text, hint=hint)


def _split_arrow(text: str) -> tuple[str, str]:
    s = text
    for alias in _ARROW_ALIASES:
        s = s.replace(alias, _ARROW)
    for wrong in _WRONG_ARROWS:           # longest first: '<=>' before '=>' before '='
        if wrong in s:
            raise _fail(text, f"'{wrong}' is not an arrow routeplan reads",
                        "write reactants -> products with '->'")
    n = s.count(_ARROW)
    if n == 0:
        raise _fail(text, "no arrow '->' between reactants and products",
                    "write e.g. 'A + B -> C'")
    if n > 1:
        raise _fail(text, f"{n} arrows; an equation has exactly one '->'",
                    "write one step per equation")
    left, right = s.split(_ARROW)
    return left, right


def _exp(x: float) -> str:
    """``1e-06`` -> ``1e-6``, ``1e+06`` -> ``1e6``: a range bound as one writes it."""
    return re.sub(r"e([+-])0*(\d)", lambda m: "e" + ("-" if m.group(1) == "-" else "") + m.group(2), f"{x:g}")


def _coefficient(text: str, written: str, key: str) -> float:
    """The coefficient ``written`` before ``key``, checked against :data:`COEFFICIENT_RANGE`.

    A number too large for a float (``1e999``, read as infinity) or too small (``1e-400``,
    read as 0 although its digits are not all zero) is out of range like any other.
    """
    mantissa = re.split(r"[eE]", written)[0]
    if written.startswith("-") or not re.search(r"[1-9]", mantissa):
        raise _fail(text, f"coefficient '{written}' of '{key}' is not positive",
                    "a coefficient is a positive number; move a species to the other side "
                    "instead of giving it a negative coefficient")
    coef = float(written)
    low, high = COEFFICIENT_RANGE
    if not low <= coef <= high:  # also catches inf (overflow) and 0.0 (underflow)
        raise _fail(text, f"coefficient '{written}' of '{key}' is out of range: a coefficient lies between "
                    f"{_exp(low)} and {_exp(high)}", "check for a misplaced exponent or decimal point; coefficients "
                    "are small numbers such as 1, 2 or 0.5")
    return coef


def _parse_side(text: str, side_text: str, side: str) -> list[Term]:
    if not side_text.strip():
        raise _fail(text, f"the {side} side is empty", "write e.g. 'A + B -> C'")
    terms = []
    pieces = side_text.split("+")
    for idx, piece in enumerate(pieces):
        words = piece.split()
        if not words:
            where = ("before the first '+'" if idx == 0 else
                     "after the last '+'" if idx == len(pieces) - 1 else "between two '+' signs")
            raise _fail(text, f"an empty term {where} on the {side} side",
                        "remove the extra '+'")
        if len(words) == 1:
            coef, key = 1.0, words[0]
        elif len(words) == 2:
            if not _NUMBER.fullmatch(words[0]):
                raise _fail(text, f"'{piece.strip()}' is not a term: '{words[0]}' is no number "
                            f"and a key has no spaces", "write a coefficient such as '2 X', or join "
                            "the key with '-' or '_'")
            coef, key = _coefficient(text, words[0], words[1]), words[1]
        else:
            raise _fail(text, f"'{piece.strip()}' is not a term (a coefficient, a space and a key)",
                        "a key has no spaces; join it with '-' or '_'")
        if _NUMBER.fullmatch(key):
            raise _fail(text, f"'{key}' is a number without a key after it",
                        "write a coefficient, a space and a key, e.g. '2 X'")
        if not _KEY.fullmatch(key):
            raise _fail(text, f"invalid material key '{key}'", _KEY_CHARS_HINT)
        terms.append(Term(coef, key))
    return terms


@functools.lru_cache(maxsize=CACHE_SIZE)
def _parse_cached(text: str) -> Equation:
    left, right = _split_arrow(text)
    reactants = _parse_side(text, left, "reactant")
    products = _parse_side(text, right, "product")
    seen: dict[str, str] = {}
    for side, terms in (("reactant", reactants), ("product", products)):
        for t in terms:
            if t.key in seen:
                where = (f"twice on the {side} side" if seen[t.key] == side
                         else "on both sides")
                raise _fail(text, f"'{t.key}' is used {where}",
                            "write each material once, with its net coefficient")
            seen[t.key] = side
    return Equation(tuple(reactants), tuple(products), text)


def parse_equation(text: str) -> Equation:
    """Parse a stoichiometric equation over material keys.

    Parameters
    ----------
    text : str
        E.g. ``"2 ArOH + K2CO3 -> 2 ArOK + H2O + CO2"``; ``→`` may stand for ``->``.

    Returns
    -------
    Equation
        Frozen reactant and product terms with coefficients [-] (cached per string).

    Raises
    ------
    EquationError
        Naming the offending text: no arrow or two arrows, ``=`` instead of ``->``, an
        empty side or term, a zero or negative coefficient or one outside
        :data:`COEFFICIENT_RANGE` (``1e308``, ``1e-320``, ``1e999``), an invalid key, a key
        used twice.

    Examples
    --------
    >>> eq = parse_equation("2 ArOH + K2CO3 -> 2 ArOK + H2O + CO2")
    >>> eq.coefficient("ArOK"), eq.side("CO2")
    (2.0, 'product')
    """
    if not isinstance(text, str):
        raise EquationError(f"an equation must be text, got {text!r}")
    if not text.strip():
        raise EquationError("equation is empty", hint="write e.g. 'A + B -> C'")
    return _parse_cached(text)
