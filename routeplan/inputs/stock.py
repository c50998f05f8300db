"""Stock files: read a stock list into material key -> mass on hand [kg].

A stock list names materials and the amount on the shelf, as a YAML mapping
(``aminophenol: 30 kg``), or as a CSV or xlsx table with the columns ``material``,
``amount`` and ``unit``.  An amount is a mass, or a volume for a material with a
density (or a solution).  A raw material's amount is as supplied; an intermediate's
(the main product of an isolated step, left from an earlier campaign) is as isolated,
at its assay, and the backward walk uses it first (:func:`routeplan.plan.walk.walk_route`).

What the stock allows and what to buy is computed in :mod:`routeplan.plan.stock`.
"""

from __future__ import annotations

import difflib
from pathlib import Path
from typing import TYPE_CHECKING, Any, Mapping

from routeplan.units import unit
from routeplan.errors import Location, QuantityError, StockError
from routeplan.inputs.files import (TABLE_SUFFIXES, YAML_SUFFIXES, formula_cells, read_bytes, refuse_unevaluated,
                                    table_rows, yaml_document)

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.route.model import Route

__all__ = ["read_stock", "load_stock"]

_COLUMNS = ("material", "amount", "unit")


def _suggest(word: str, options) -> str:
    near = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f"did you mean '{near[0]}'?" if near else "use a material key of the route file"


def _mass(route: "Route", key: str, text: str, where: Location) -> "pint.Quantity":
    """Turn one stock amount into a mass [kg], checking the material."""
    from routeplan.units import parse_quantity

    if key not in route.materials:
        raise StockError(f"unknown material '{key}'", location=where, material=str(key) or None,
                         hint=_suggest(key, route.materials))
    if route.is_intermediate(key):
        _check_intermediate(route, key, where)
    mat = route.materials[key]
    try:
        q = parse_quantity(text, "mass", where=where)
    except QuantityError as exc:
        try:
            q = parse_quantity(text, "volume", where=where)
        except QuantityError:
            raise StockError(exc.message, location=where, material=str(key) or None,
                             hint=exc.hint or "give a mass such as '30 kg', "
                             "or a volume such as '20 L' for a material with a density") from None
        density = mat.solution.density if mat.solution is not None else mat.density
        if density is None:
            raise StockError(f"'{text}' is a volume, but material '{key}' has no density",
                             location=where, material=str(key) or None,
                             hint="give the stock as a mass, or a density in the route file")
        q = q * density
    q = q.to(unit("kg"))
    if q.magnitude < 0:
        raise StockError(f"amount '{text}' of '{key}' is negative", location=where, material=str(key) or None,
                         hint="give the amount on the shelf, 0 or more")
    return q


def _check_intermediate(route: "Route", key: str, where: Location | None) -> None:
    """Refuse stock of an intermediate the plan cannot take from a shelf.

    The target is what the campaign delivers (plan the amount still to make with
    ``--target`` instead), and the product of a telescoped step is never isolated, so it
    has no mass as isolated to stand on a shelf.
    """
    if key == route.target.material:
        raise StockError(f"'{key}' is the target of the route; a stock list names raw materials and "
                         "intermediates", location=where, material=str(key) or None,
                         hint="plan the amount still to make with --target instead")
    maker = next(s for s in route.steps if s.product == key)
    if not maker.isolated:
        raise StockError(f"'{key}' is made in the route by telescoped step {maker.id} (isolated: false) and "
                         "goes on in solution; only an isolated intermediate can be taken from stock",
                         location=where, material=str(key) or None,
                         hint=f"remove '{key}' from the stock list, or isolate it in step {maker.id}")


def _read_yaml(route, path: Path, data: bytes) -> dict[str, Any]:
    doc = yaml_document(path, data, StockError, "stock file")
    if not isinstance(doc, dict) or not doc:
        raise StockError("a YAML stock list is a mapping of material to amount, e.g. 'toluene: 200 kg'",
                         location=Location(str(path)))
    out = {}
    for key, value in doc.items():
        line, col = doc.lc.key(key)
        where = Location(str(path), line + 1, col + 1, str(key))
        if value is None:
            raise StockError(f"'{key}' has no amount", location=where, material=str(key) or None,
                             hint="write e.g. '30 kg'")
        if not isinstance(value, str):
            raise StockError(f"amount {value!r} has no unit", location=where, material=str(key) or None,
                             hint=f"write e.g. '{value} kg'")
        out[str(key)] = _mass(route, str(key), value, where)
    return out


def _table(route, path: Path, rows: list[list[Any]], cell, formula=None) -> dict[str, Any]:
    """Read header + rows; ``cell(row, col)`` names a cell for messages; ``formula(row,
    col)`` gives the formula a workbook cell holds without a stored value (or None)."""
    if not rows:
        raise StockError("the stock table is empty; it needs the columns material, amount, unit",
                         location=Location(str(path)))
    header = [str(h).strip().lower() if h is not None else "" for h in rows[0]]
    missing = [c for c in _COLUMNS if c not in header]
    if missing and len(header) == 1 and ";" in header[0]:
        raise StockError("the fields are separated by ';', a stock CSV uses commas",
                         location=Location(str(path), 1),
                         hint="save it as CSV with commas, or as .xlsx: material, amount, unit")
    if missing:
        raise StockError(f"missing column{'s' if len(missing) > 1 else ''} {', '.join(missing)}; "
                         f"found {', '.join(h for h in header if h) or 'none'}",
                         location=Location(str(path), 1), hint="the first row must name: material, amount, unit")
    idx = {c: header.index(c) for c in _COLUMNS}
    out: dict[str, Any] = {}
    for r, row in enumerate(rows[1:], start=2):
        if all(v is None or str(v).strip() == "" for v in row):
            continue
        if len(row) > len(header) and any(str(v).strip() for v in row[len(header):] if v is not None):
            raise StockError(f"row {r} has {len(row)} fields but the first row names {len(header)} columns",
                             location=Location(str(path), r, None, cell(r, len(header))),
                             hint="a decimal comma or a stray comma splits a field; quote it or remove it")
        get = (lambda c: row[idx[c]] if idx[c] < len(row) else None)
        for name in _COLUMNS:
            refuse_unevaluated(formula, path, r, idx[name], get(name), cell, StockError)
        key = str(get("material") or "").strip()
        amount, unit = get("amount"), str(get("unit") or "").strip()
        where = Location(str(path), r, None, cell(r, idx["material"]))
        if not key:
            raise StockError("row has no material", location=where, material=str(key) or None)
        if amount is None or str(amount).strip() == "":
            raise StockError(f"row of '{key}' has no amount", location=where, material=str(key) or None)
        if not unit:
            raise StockError(f"row of '{key}' has no unit", location=where, material=str(key) or None,
                             hint="e.g. kg, lb or L")
        if key in out:
            raise StockError(f"'{key}' is listed twice", location=where, material=str(key) or None,
                             hint="give one row per material")
        text = f"{amount} {unit}" if not isinstance(amount, str) else f"{amount.strip()} {unit}"
        out[key] = _mass(route, key, text, where)
    return out


def read_stock(route: "Route", path: str | Path) -> dict[str, "pint.Quantity"]:
    """Read a stock list for ``route``: material key -> mass on hand [kg].

    Raw materials are as supplied; an isolated intermediate is as isolated, at its assay.

    Raises
    ------
    StockError
        Unreadable file, unknown material, the target or a telescoped intermediate, a
        wrong unit, a volume without a density, a negative amount, a missing column, a
        material listed twice.
    """
    path = Path(path)
    data = read_bytes(path, StockError, "stock file")
    suffix = path.suffix.lower()
    if suffix in YAML_SUFFIXES:
        return _read_yaml(route, path, data)
    if suffix in TABLE_SUFFIXES:
        rows, cell = table_rows(path, data, StockError, "stock file")
        return _table(route, path, rows, cell, formula_cells(path, data))
    raise StockError(f"unknown stock file type '{path.suffix}'", location=Location(str(path)),
                     hint="use .yaml, .csv or .xlsx")


def load_stock(route: "Route", stock: "str | Path | Mapping[str, pint.Quantity]"):
    """The stock on hand as material key -> mass [kg], and the file it came from.

    Parameters
    ----------
    route : Route
        The route the stock is for.
    stock : str, Path or Mapping[str, pint.Quantity]
        A stock file (:func:`read_stock`), or material key -> mass on hand [kg].

    Returns
    -------
    tuple
        (dict of key -> pint.Quantity [kg], file name or None).

    Raises
    ------
    StockError
        As :func:`read_stock`; for a mapping, an intermediate that cannot come from
        stock (the target, a telescoped product) or a negative amount of one.
    """
    if isinstance(stock, (str, Path)):
        return read_stock(route, stock), str(stock)
    on_hand = {k: v.to(unit("kg")) for k, v in stock.items()}
    for key, mass in on_hand.items():
        if route.is_intermediate(key):
            where = Location(key=key)
            _check_intermediate(route, key, where)
            if mass.magnitude < 0:
                raise StockError(f"amount {mass:~P} of '{key}' is negative", location=where, material=str(key) or None,
                                 hint="give the amount on the shelf, 0 or more")
    return on_hand, None


