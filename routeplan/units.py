"""The single pint unit registry of routeplan, and the parsers for user quantities.

The registry is built on first use and cached for the life of the process; pint's own
cache folder (``cache_folder=":auto:"``) keeps the parsed definitions on disk so that a
later process starts fast.  Everything else in routeplan builds quantities with
:func:`Q` (value and unit separately, never by parsing a string in a loop).

Quantity strings in route files follow the route format: a number and a unit in one
string (``"25 kg"``, ``"0.889 g/mL"``).  Percent fields take ``"85 %"`` or a plain
fraction in [0, 1].
"""

from __future__ import annotations

import functools
import math
import re
from typing import TYPE_CHECKING, Any

from routeplan.errors import Location, QuantityError

if TYPE_CHECKING:  # pragma: no cover
    import pint

__all__ = ["registry", "Q", "unit", "magnitude", "DIMENSIONS", "parse_quantity", "parse_fraction", "dimension_name"]

#: Named dimensions a route file may ask for: name -> (pint dimensionality, example).
DIMENSIONS: dict[str, tuple[str, str]] = {
    "mass": ("[mass]", "25 kg"),
    "volume": ("[length] ** 3", "250 L"),
    "amount": ("[substance]", "12.5 mol"),
    "density": ("[mass] / [length] ** 3", "0.889 g/mL"),
    "molar mass": ("[mass] / [substance]", "151.16 g/mol"),
    "molarity": ("[substance] / [length] ** 3", "2.5 mol/L"),
    "temperature": ("[temperature]", "25 degC"),
    "time": ("[time]", "4 h"),
    "pressure": ("[mass] / [length] / [time] ** 2", "1.01325 bar"),
    "molar enthalpy": ("[mass] * [length] ** 2 / [time] ** 2 / [substance]", "-150 kJ/mol"),
    "heat capacity": ("[length] ** 2 / [time] ** 2 / [temperature]", "1.9 kJ/(kg*K)"),
    # named so that a wrong dimension is said in words ("'-150 kJ' is an energy")
    "energy": ("[mass] * [length] ** 2 / [time] ** 2", "150 kJ"),
    "specific energy": ("[length] ** 2 / [time] ** 2", "1.9 kJ/kg"),
}

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_QUANTITY_RE = re.compile(rf"^\s*(?P<num>{_NUMBER})\s*(?P<unit>.*?)\s*$")
_DECIMAL_COMMA_RE = re.compile(r"^\s*[+-]?\d+,\d")
# '1,000 L': a thousands separator or a decimal comma; the two readings differ 1000-fold
_THOUSANDS_RE = re.compile(r"^\s*(?P<sign>[+-]?)(?P<head>\d{1,3})(?P<groups>(?:,\d{3})+)(?![\d.,])(?P<rest>.*)$")


def _comma_error(text: str, where, expect: str | None = None, *, dimension: str | None = None) -> QuantityError:
    """The error for a number written with a comma: both readings where the comma may
    separate thousands (``1,000 L``), else the decimal point to write."""
    m = _THOUSANDS_RE.match(text)
    if m:
        rest = m.group("rest").strip()
        unit = f" {rest}" if rest else ""
        whole = m.group("sign") + m.group("head") + m.group("groups").replace(",", "")
        parts = m.group("groups").split(",")[1:]
        decimal = m.group("sign") + m.group("head") + "." + "".join(parts) if len(parts) == 1 else None
        if decimal is not None:
            message = (f"'{text.strip()}' can be read two ways: {whole}{unit} (a thousands separator) or "
                       f"{decimal}{unit} (a decimal comma)")
        else:
            message = f"'{text.strip()}' has thousands separators ({whole}{unit}?), which are not read"
        return QuantityError(message, location=where, text=text, dimension=dimension,
                             hint="write the amount meant without a comma")
    return QuantityError(f"'{text}' uses a decimal comma" + (f"; expected {expect}" if expect else ""),
                         location=where, text=text, dimension=dimension, hint=f"write '{text.replace(',', '.', 1).strip()}' with a decimal point")
# a percent or a bare count inside a quantity would be multiplied in silently ('10 % kg')
_NOT_IN_A_QUANTITY = re.compile(r"%|\bpercent\b|\bdimensionless\b|\bppm\b|\bppb\b")
_TON = re.compile(r"\btons?\b")
# a length unit followed by 2 or 3 is a power, as chemists write cm3 for cm³
_POWER = re.compile(r"\b(mm|cm|dm|m|km|in|ft)([23])\b")
_PERCENT_RE = re.compile(rf"^\s*(?P<num>{_NUMBER})\s*(?P<unit>%|percent)\s*$")


@functools.lru_cache(maxsize=1)
def registry() -> "pint.UnitRegistry":
    """Return the one pint registry of routeplan (built once, then cached)."""
    import pint

    try:
        ureg = pint.UnitRegistry(cache_folder=":auto:", autoconvert_offset_to_baseunit=True)
    except Exception:  # pragma: no cover - an unwritable cache folder must not stop us
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.formatter.default_format = "~P"
    return ureg


def Q(value: Any, unit: "str | pint.Unit", what: Any = None) -> "pint.Quantity":
    """Build a quantity from a value and a unit name.

    ``what`` is ignored: it lets ``Q`` serve as the number factory of
    :func:`routeplan.plan.core.compile_route`, which names each constant.

    Examples
    --------
    >>> print(Q(18.015, "g/mol").to("kg/mol").magnitude)
    0.018015
    """
    return registry().Quantity(value, unit_(unit) if isinstance(unit, str) else unit)


@functools.lru_cache(maxsize=256)
def unit(name: str) -> "pint.Unit":
    """The pint unit called ``name``, parsed once and cached.

    Converting with a unit object (``q.to(unit("kg"))``) skips pint's string parsing,
    which is most of the cost of a conversion in the planner's loops.
    """
    return registry().Unit(name)


@functools.lru_cache(maxsize=1024)
def _factor(units, name: str) -> float | None:
    """The factor from ``units`` (pint's ``UnitsContainer`` of a quantity) to the unit
    ``name`` [-], or None for an offset unit (degC)."""
    reg = registry()
    one = reg.Quantity(1.0, units)
    if not one._is_multiplicative:
        return None
    return float(one.m_as(unit(name)))


def magnitude(quantity: "pint.Quantity | None", name: str) -> float | None:
    """The magnitude of ``quantity`` in unit ``name`` as a float, or None for None.

    Where a plan's numbers are written out (JSON, tables, metrics) and where the planner
    reads a route's quantities, this is the one conversion: a factor from the quantity's
    unit to ``name`` is computed once per pair of units and cached, so a conversion in a
    loop is one multiplication (an offset unit such as degC goes through pint each time).

    Examples
    --------
    >>> magnitude(Q(1.5, "kg"), "g")
    1500.0
    """
    if quantity is None:
        return None
    # the quantity's UnitsContainer keys the cache: hashed once, no Unit object built per call
    factor = _factor(quantity._units, name)
    if factor is None:
        return float(quantity.m_as(unit(name)))
    return float(quantity.magnitude) * factor


def dimension_name(quantity: "pint.Quantity") -> str:
    """Name the dimension of ``quantity`` in words (``"a volume"``), or pint's notation."""
    dim = quantity.dimensionality
    ureg = registry()
    for name, (spec, _example) in DIMENSIONS.items():
        if dim == ureg.get_dimensionality(spec):
            return name
    if dim == ureg.get_dimensionality("[]"):
        return "a plain number"
    return str(dim)


def _article(name: str) -> str:
    return ("an " if name[0] in "aeiou" else "a ") + name


def parse_quantity(text: Any, dimension: str, *, where: Location | None = None) -> "pint.Quantity":
    """Read a user's quantity string for an expected dimension.

    Parameters
    ----------
    text : str
        A number and a unit, e.g. ``"25 kg"`` or ``"55 lb"``.
    dimension : str
        A key of :data:`DIMENSIONS`, e.g. ``"mass"``.
    where : Location, optional
        Where the text comes from, for the error message.

    Returns
    -------
    pint.Quantity
        The quantity, in the unit the user wrote.

    Raises
    ------
    QuantityError
        Unreadable text, a decimal comma, an unknown unit or a wrong dimension.

    Examples
    --------
    >>> print(parse_quantity("1.5 kg", "mass").to("g").magnitude)
    1500.0
    """
    spec, example = DIMENSIONS[dimension]
    expect = f"{_article(dimension)} such as '{example}'"
    if isinstance(text, bool) or not isinstance(text, (str, int, float)):
        raise QuantityError(f"expected {expect}, got {text!r}", location=where, text=text, dimension=dimension)
    if isinstance(text, (int, float)):
        raise QuantityError(
            f"{text!r} has no unit; {_article(dimension)} needs one",
            location=where, text=text, dimension=dimension,
            hint=f"write it with its unit, e.g. '{text} {example.split()[1]}'",
        )
    if _DECIMAL_COMMA_RE.match(text):
        raise _comma_error(text, where, expect, dimension=dimension)
    m = _QUANTITY_RE.match(text)
    if not m:
        raise QuantityError(f"'{text}' is not a number followed by a unit; expected {expect}",
                            location=where, text=text, dimension=dimension)
    unit = m.group("unit")
    if not unit:
        raise QuantityError(
            f"'{text}' has no unit; {_article(dimension)} needs one",
            location=where, text=text, dimension=dimension,
            hint=f"write it with its unit, e.g. '{m.group('num')} {example.split()[1]}'",
        )
    bad = _NOT_IN_A_QUANTITY.search(unit)
    if bad:
        raise QuantityError(f"'{text}': '{bad.group(0)}' does not belong in {_article(dimension)}",
                            location=where, text=text, dimension=dimension, hint=f"write {expect}")
    if _TON.search(unit):
        raise QuantityError(f"'{text}': 'ton' is ambiguous (a US ton is 907.18 kg, a metric one 1000 kg)",
                            location=where, text=text, dimension=dimension,
                            hint="write 't' or 'tonne' for 1000 kg, or 'short_ton' / 'long_ton'")
    unit = _POWER.sub(r"\1**\2", unit)  # cm3 and m3 as chemists write them
    ureg = registry()
    try:
        units, fits = _units_of(unit, spec)
    except Exception:
        raise QuantityError(f"'{text}': unknown unit '{unit}'; expected {expect}",
                            location=where, text=text, dimension=dimension) from None
    value = float(m.group("num"))
    if not math.isfinite(value) or (value != 0 and not 1e-30 < abs(value) < 1e30):
        raise QuantityError(f"'{text}': {m.group('num')} is out of any sensible range",
                            location=where, text=text, dimension=dimension,
                            hint=f"write {expect}")
    q = ureg.Quantity(value, units)
    if not fits:
        found = dimension_name(q)
        found = found if found.startswith(("a ", "[")) else _article(found)
        raise QuantityError(f"'{text}' is {found}, but {expect} is needed",
                            location=where, text=text, dimension=dimension)
    return q


@functools.lru_cache(maxsize=1024)
def _units_of(text: str, spec: str) -> "tuple[pint.Unit, bool]":
    """pint's units for the unit ``text`` of a quantity, and whether they have the
    dimensionality ``spec``; parsed once per pair (pint parses a compound unit such as
    ``g/mL`` afresh each time, 50-80 us).  Raises what pint raises for an unknown unit."""
    ureg = registry()
    units = ureg.parse_units(text)
    return units, ureg.get_dimensionality(units) == ureg.get_dimensionality(spec)


def parse_fraction(value: Any, *, where: Location | None = None, allow_zero: bool = True,
                   allow_above_one: bool = False) -> float:
    """Read a percent field: ``"85 %"`` or a plain fraction in [0, 1].

    Parameters
    ----------
    value : str or float
        ``"85 %"``, ``"85%"``, ``"85 percent"`` or a number such as ``0.85``.
    allow_zero : bool
        Whether 0 is acceptable (a yield of 0 is not).
    allow_above_one : bool
        Whether more than 100 % is acceptable (an overage may be).

    Returns
    -------
    float
        The fraction [-].

    Raises
    ------
    QuantityError
        A bare number above 1 (suggests ``"85 %"``), a negative value, a decimal comma,
        or text that is not a percent.

    Examples
    --------
    >>> parse_fraction("85 %")
    0.85
    >>> parse_fraction(0.5)
    0.5
    """
    if isinstance(value, bool):
        raise QuantityError(f"expected a percent such as '85 %' or a fraction such as 0.85, got {value!r}",
                            location=where, text=value)
    if isinstance(value, (int, float)):
        frac = float(value)
        if frac != frac or frac in (float("inf"), float("-inf")):
            raise QuantityError(f"expected a percent such as '85 %', got {value!r}", location=where, text=value)
        if frac > 1:
            if frac > 100 and not allow_above_one:
                hint = "a percent here is at most 100 %"
            elif frac > 100:
                hint = f"write '{value:g} %' for percent"
            else:
                hint = f"write '{value:g} %' for percent, or {frac / 100:g} as a fraction"
            raise QuantityError(f"{value!r} is above 1; a plain number here is a fraction",
                                location=where, text=value, hint=hint)
    elif isinstance(value, str):
        if _DECIMAL_COMMA_RE.match(value):
            raise _comma_error(value, where)
        m = _PERCENT_RE.match(value)
        if m:
            frac = float(m.group("num")) / 100.0
        else:
            try:
                frac = float(value.strip())
            except ValueError:
                raise QuantityError(
                    f"'{value}' is not a percent; expected e.g. '85 %' or a fraction such as 0.85",
                    location=where, text=value) from None
            return parse_fraction(frac, where=where, allow_zero=allow_zero, allow_above_one=allow_above_one)
        if frac > 1 and not allow_above_one:
            raise QuantityError(f"'{value}' is above 100 %", location=where, text=value)
    else:
        raise QuantityError(f"expected a percent such as '85 %' or a fraction such as 0.85, got {value!r}",
                            location=where, text=value)
    if frac < 0:
        raise QuantityError(f"{value!r} is negative; expected a percent between 0 and 100 %",
                            location=where, text=value)
    if frac == 0 and not allow_zero:
        raise QuantityError(f"{value!r} is zero; expected a percent above 0", location=where, text=value)
    return frac


unit_ = unit  # Q's parameter is called ``unit``; this name reaches the function
