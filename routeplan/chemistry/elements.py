"""Standard atomic weights of the elements, read from the data file shipped with routeplan.

The table lives in ``atomic_weights.csv`` beside this module; its header names the source
(CIAAW, *Standard atomic weights of the elements 2021*, Prohaska et al., Pure Appl. Chem.
2022, 94, 573-600, with the CIAAW 2024 revision of Gd, Lu and Zr) and the isotopes D and T
(AME2020).  The file is read on first use, through :mod:`importlib.resources`, and cached.

An atomic weight is a relative quantity [-]; numerically it is the molar mass of the element
in g/mol (the molar mass constant is 1 g/mol to within 4e-10 since the 2019 SI).
"""

from __future__ import annotations

import csv
import functools
import io
from importlib import resources
from types import MappingProxyType
from typing import Mapping

from routeplan.errors import FormulaError
from routeplan.frozen import frozen

__all__ = [
    "ATOMIC_WEIGHTS_FILE",
    "Element",
    "table",
    "element",
    "atomic_weight",
    "is_symbol",
    "has_standard_weight",
    "element_name",
    "hill_sort_key",
]

#: Name of the data file inside the ``routeplan.chemistry`` package.
ATOMIC_WEIGHTS_FILE = "atomic_weights.csv"

#: Elements that have no standard atomic weight (no stable isotope with a characteristic
#: terrestrial composition), symbol -> name.  Source: CIAAW 2021 report (above), which
#: lists no value for them; names per IUPAC (2016 for Z = 113, 115, 117, 118).
_NO_STANDARD_WEIGHT: Mapping[str, str] = MappingProxyType({
    "Tc": "technetium", "Pm": "promethium", "Po": "polonium", "At": "astatine",
    "Rn": "radon", "Fr": "francium", "Ra": "radium", "Ac": "actinium",
    "Np": "neptunium", "Pu": "plutonium", "Am": "americium", "Cm": "curium",
    "Bk": "berkelium", "Cf": "californium", "Es": "einsteinium", "Fm": "fermium",
    "Md": "mendelevium", "No": "nobelium", "Lr": "lawrencium", "Rf": "rutherfordium",
    "Db": "dubnium", "Sg": "seaborgium", "Bh": "bohrium", "Hs": "hassium",
    "Mt": "meitnerium", "Ds": "darmstadtium", "Rg": "roentgenium", "Cn": "copernicium",
    "Nh": "nihonium", "Fl": "flerovium", "Mc": "moscovium", "Lv": "livermorium",
    "Ts": "tennessine", "Og": "oganesson",
})


@frozen
class Element:
    """One row of the atomic weight table.

    Parameters
    ----------
    number : int
        Atomic number Z [-] (1 for the hydrogen isotopes D and T).
    symbol : str
        Symbol as written in formulas, e.g. ``"Cl"``; ``"D"`` and ``"T"`` for 2H and 3H.
    name : str
        IUPAC name, e.g. ``"chlorine"``.
    weight : float
        Standard atomic weight [-], numerically the molar mass [g/mol]; for D and T the
        atomic mass of the isotope [-].
    uncertainty : float
        Uncertainty of ``weight`` as given by the source [-].
    note : str
        The interval of an interval element, a revision, or the isotope.
    """

    number: int
    symbol: str
    name: str
    weight: float
    uncertainty: float
    note: str = ""

    @property
    def is_isotope(self) -> bool:
        """Whether this row is a single isotope (D, T) rather than an element."""
        return self.note.startswith("isotope")


def _read_table(text: str) -> dict[str, Element]:
    rows = csv.DictReader(io.StringIO("".join(line for line in text.splitlines(True)
                                              if not line.startswith("#"))))
    out: dict[str, Element] = {}
    for row in rows:
        el = Element(
            number=int(row["atomic_number"]),
            symbol=row["symbol"].strip(),
            name=row["name"].strip(),
            weight=float(row["weight"]),
            uncertainty=float(row["uncertainty"]),
            note=(row["note"] or "").strip(),
        )
        out[el.symbol] = el
    return out


@functools.lru_cache(maxsize=1)
def table() -> Mapping[str, Element]:
    """Return the atomic weight table, symbol -> :class:`Element` (read once, cached).

    Returns
    -------
    Mapping[str, Element]
        Read-only mapping in atomic-number order, D and T last.

    Examples
    --------
    >>> table()["O"].weight
    15.999
    """
    text = resources.files(__package__).joinpath(ATOMIC_WEIGHTS_FILE).read_text(encoding="utf-8")
    return MappingProxyType(_read_table(text))


def is_symbol(symbol: str) -> bool:
    """Whether ``symbol`` names an element (with or without a standard atomic weight) or D/T."""
    return symbol in table() or symbol in _NO_STANDARD_WEIGHT


def has_standard_weight(symbol: str) -> bool:
    """Whether ``symbol`` has an atomic weight in the table (D and T included)."""
    return symbol in table()


def element_name(symbol: str) -> str | None:
    """The IUPAC name of ``symbol``, or None if it is no element symbol."""
    el = table().get(symbol)
    if el is not None:
        return el.name
    return _NO_STANDARD_WEIGHT.get(symbol)


def element(symbol: str) -> Element:
    """Return the table row of ``symbol``.

    Raises
    ------
    FormulaError
        The symbol is no element, or the element has no standard atomic weight.
    """
    el = table().get(symbol)
    if el is not None:
        return el
    name = _NO_STANDARD_WEIGHT.get(symbol)
    if name is not None:
        raise FormulaError(
            f"element '{symbol}' ({name}) has no standard atomic weight",
            formula=symbol, token=symbol, position=1,
            hint="give the material an explicit molar_mass instead of a formula",
        )
    raise FormulaError(f"unknown element '{symbol}'", formula=symbol, token=symbol, position=1)


def atomic_weight(symbol: str) -> float:
    """Standard atomic weight of an element [-], numerically its molar mass [g/mol].

    Parameters
    ----------
    symbol : str
        Element symbol, e.g. ``"C"``; ``"D"`` or ``"T"`` for the hydrogen isotopes.

    Returns
    -------
    float
        Atomic weight [-] (= molar mass [g/mol]).

    Raises
    ------
    FormulaError
        Unknown symbol, or an element without a standard atomic weight (e.g. ``"Tc"``).

    Examples
    --------
    >>> atomic_weight("C")
    12.011
    """
    return element(symbol).weight


def hill_sort_key(symbol: str, has_carbon: bool) -> tuple[int, str]:
    """Sort key for Hill order: C, then H, then the rest alphabetically (if C is present);
    otherwise all alphabetically.  Source: E. A. Hill, J. Am. Chem. Soc. 1900, 22, 478."""
    if has_carbon:
        if symbol == "C":
            return (0, "")
        if symbol == "H":
            return (1, "")
    return (2, symbol)
