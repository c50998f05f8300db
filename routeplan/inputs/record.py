"""Campaign records: read what the campaign has made so far into plain lots.

A record (``routeplan plan ROUTE --record FILE``) lists one entry per isolated batch,
as in ROUTE-FORMAT.md, "Campaign record":

* YAML: a mapping with one key, ``lots``, a list of mappings with the keys ``step``,
  ``batch``, ``charged``, ``isolated`` and, optionally, ``assay`` and ``lot``::

      lots:
        - {step: S1, batch: 1, charged: 8.0 kg, isolated: 10.2 kg, assay: 97.5 %}

* CSV or xlsx (first sheet): a first row naming the columns ``step``, ``batch``,
  ``charged``, ``isolated`` and, optionally, ``assay``, ``unit`` and ``lot`` (any order,
  any case).  A mass carries its unit in the cell (``8.0 kg``), or the row's ``unit``
  cell gives the unit of both bare masses (``8.0`` with ``kg``); a unit in both places
  is refused rather than guessed.  An assay is ``97.5 %`` or a fraction (``0.975``; a
  percent-formatted spreadsheet cell is a fraction already); a bare ``97.5`` is refused
  with the hint to write ``97.5 %``.

``charged`` is the mass of the step's limiting reagent charged in that batch, as
charged (at its assay); ``isolated`` the product as isolated; ``assay`` the product
lot's assay, default the product material's; ``lot`` an optional lot number (text),
carried onto the charge sheets.  Every lot keeps where it was written (file:line:column
in YAML, the row in a CSV, ``Sheet!B3`` in a workbook) for the messages of the
computation (:mod:`routeplan.plan.record`).

Refused here, each located: an unknown step (the nearest id suggested), a step with
``isolated: false``, a batch recorded twice (same step and batch), a zero or negative
mass, an assay of zero or above 100 %, a missing or unknown key or column.
"""

from __future__ import annotations

import difflib
from dataclasses import field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Mapping

from routeplan.errors import Location, RecordError
from routeplan.frozen import frozen
from routeplan.inputs.files import TABLE_SUFFIXES, YAML_SUFFIXES, read_bytes, table_rows, yaml_document

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.route.model import Route

__all__ = ["Lot", "Record", "read_record", "load_record", "RECORD_KEYS", "TABLE_COLUMNS"]

#: Keys of one lot: required first, then optional.
RECORD_KEYS = ("step", "batch", "charged", "isolated", "assay", "lot")
_REQUIRED = ("step", "batch", "charged", "isolated")
#: Columns a record table may have (``unit`` gives the unit of bare masses in its row).
TABLE_COLUMNS = RECORD_KEYS + ("unit",)
_WHAT = "record file"


@frozen
class Lot:
    """One isolated batch of one step, as recorded.

    Attributes
    ----------
    step : str
        Step id.
    batch : int
        Batch number, from 1.
    charged_kg : float
        Limiting reagent charged, as charged (at its assay) [kg].
    isolated_kg : float
        Product isolated, as isolated [kg].
    assay : float or None
        Assay of the product lot [-]; None for the product material's assay.
    lot : str or None
        Lot number, as written.
    location : Location
        Where the entry is (its first line, row or cell).
    fields : Mapping[str, Location]
        Where each key's value is, for messages about one of them.
    """

    step: str
    batch: int
    charged_kg: float
    isolated_kg: float
    assay: float | None = None
    lot: str | None = None
    location: Location = field(default_factory=Location)
    fields: Mapping[str, Location] = field(default_factory=dict, compare=False)

    def where(self, key: str) -> Location:
        """Where the value of ``key`` is written (the entry's place when unknown)."""
        return self.fields.get(key, self.location)


@frozen
class Record:
    """The lots of a campaign record, in the order written, and the file they came from."""

    lots: tuple[Lot, ...]
    source: str | None = None


def _nearest(word: str, options, what: str) -> str:
    near = difflib.get_close_matches(word, list(options), n=1, cutoff=0.5)
    return f"did you mean '{near[0]}'?" if near else f"use one of: {', '.join(options)}"


def _mass_kg(value: Any, unit_text: str | None, where: Location, key: str) -> float:
    """A recorded mass [kg] from ``"8.0 kg"``, or a bare number and its row's unit."""
    from routeplan.units import parse_quantity

    if isinstance(value, bool):
        raise RecordError(f"{key} {value!r} is not a mass", location=where, hint="write e.g. '8.0 kg'")
    if unit_text:
        text = str(value).strip() if isinstance(value, str) else value
        try:
            number = float(text)
        except (TypeError, ValueError):
            raise RecordError(f"{key} '{value}' carries its own unit and the row's unit column says "
                              f"'{unit_text}'", location=where,
                              hint="give the unit once: in the cell or in the unit column") from None
        value = f"{number!r} {unit_text}"
    q = parse_quantity(value, "mass", where=where)
    kg = float(q.m_as("kg"))
    if not kg > 0:
        raise RecordError(f"{key} mass {value} is {'zero' if kg == 0 else 'negative'}", location=where,
                          hint=f"a lot's {key} mass is above 0 kg")
    return kg


def _assay(value: Any, where: Location) -> float | None:
    from routeplan.units import parse_fraction

    if value is None or (isinstance(value, str) and not value.strip()):
        return None
    frac = parse_fraction(value, where=where, allow_zero=False, allow_above_one=True)
    if frac > 1:
        raise RecordError(f"assay {value} is above 100 %", location=where,
                          hint="an assay is the mass fraction of the compound, at most 100 %")
    return frac


def _batch(value: Any, where: Location) -> int:
    if isinstance(value, bool):
        value = None
    try:
        number = float(str(value).strip()) if value is not None else None
    except ValueError:
        number = None
    if number is None or not number.is_integer() or number < 1:
        raise RecordError(f"batch {value!r} is not a batch number", location=where,
                          hint="number the batches of each step 1, 2, 3, ...")
    return int(number)


def _make_lot(route: "Route", values: Mapping[str, Any], where: Mapping[str, Location], entry: Location,
              unit_text: str | None = None) -> Lot:
    """Check one entry's values against the route and build its :class:`Lot`."""
    for key in _REQUIRED:
        if values.get(key) is None or (isinstance(values.get(key), str) and not values[key].strip()):
            raise RecordError(f"the lot has no {key}", location=where.get(key, entry),
                              hint="a lot gives step, batch, charged and isolated")
    step_id = str(values["step"]).strip()
    ids = [s.id for s in route.steps]
    if step_id not in ids:
        raise RecordError(f"unknown step '{step_id}'", location=where["step"], hint=_nearest(step_id, ids, "step"))
    step = route.step(step_id)
    if not step.isolated:
        raise RecordError(f"step {step_id} is telescoped (isolated: false): its product goes on in solution "
                          "and is never isolated, so it has no lots", location=where["step"],
                          hint=f"record the lot of the step that takes {step.product} on, which stands for both")
    lot_text = values.get("lot")
    return Lot(
        step=step_id,
        batch=_batch(values["batch"], where["batch"]),
        charged_kg=_mass_kg(values["charged"], unit_text, where["charged"], "charged"),
        isolated_kg=_mass_kg(values["isolated"], unit_text, where["isolated"], "isolated"),
        assay=_assay(values.get("assay"), where.get("assay", entry)),
        lot=None if lot_text is None or str(lot_text).strip() == "" else str(lot_text).strip(),
        location=entry,
        fields=dict(where),
    )


def _read_yaml(route: "Route", path: Path, data: bytes) -> list[Lot]:
    doc = yaml_document(path, data, RecordError, _WHAT)
    top = Location(str(path), 1, 1)
    if not isinstance(doc, dict) or "lots" not in doc:
        raise RecordError("a YAML record is a mapping with the key 'lots', a list of lots", location=top,
                          hint="lots:\n  - {step: S1, batch: 1, charged: 8.0 kg, isolated: 10.2 kg}")
    for key in doc:
        if key != "lots":
            line, col = doc.lc.key(key)
            raise RecordError(f"unknown key '{key}'", location=Location(str(path), line + 1, col + 1, str(key)),
                              hint="a record holds only 'lots'")
    items = doc["lots"]
    line, col = doc.lc.key("lots")
    if not isinstance(items, list) or not items:
        raise RecordError("'lots' is an empty list or not a list", location=Location(str(path), line + 1, col + 1, "lots"),
                          hint="one entry per isolated batch")
    lots = []
    for i, item in enumerate(items):
        line, col = items.lc.item(i)
        entry = Location(str(path), line + 1, col + 1, f"lots[{i + 1}]")
        if not isinstance(item, dict):
            raise RecordError("a lot is a mapping such as {step: S1, batch: 1, charged: 8.0 kg, isolated: 10.2 kg}",
                              location=entry)
        where = {}
        for key in item:
            kl, kc = item.lc.key(key)
            if key not in RECORD_KEYS:
                raise RecordError(f"unknown key '{key}'", location=Location(str(path), kl + 1, kc + 1, f"lots[{i + 1}].{key}"),
                                  hint=_nearest(str(key), RECORD_KEYS, "key"))
            vl, vc = item.lc.value(key)
            where[key] = Location(str(path), vl + 1, vc + 1, f"lots[{i + 1}].{key}")
        lots.append(_make_lot(route, item, where, entry))
    return lots


def _read_table(route: "Route", path: Path, data: bytes) -> list[Lot]:
    rows, cell = table_rows(path, data, RecordError, _WHAT)
    is_csv = path.suffix.lower() == ".csv"

    def place(r: int, c: int, column: str) -> Location:
        if is_csv:
            return Location(str(path), r, None, column)
        return Location(str(path), None, None, f"{cell(r, c)} ({column})")

    if not rows:
        raise RecordError("the record table is empty; its first row names the columns "
                          + ", ".join(_REQUIRED), location=Location(str(path)))
    header = [str(h).strip().lower() if h is not None else "" for h in rows[0]]
    for c, name in enumerate(header):
        if name and name not in TABLE_COLUMNS:
            raise RecordError(f"unknown column '{rows[0][c]}'", location=place(1, c, str(rows[0][c])),
                              hint=_nearest(name, TABLE_COLUMNS, "column"))
        if name and header.index(name) != c:
            raise RecordError(f"column '{name}' appears twice", location=place(1, c, name))
    missing = [c for c in _REQUIRED if c not in header]
    if missing:
        hint = ("the fields are separated by ';'; a record CSV uses commas" if len(header) == 1 and ";" in header[0]
                else "the first row must name: " + ", ".join(_REQUIRED) + " (and optionally assay, unit, lot)")
        raise RecordError(f"missing column{'s' if len(missing) > 1 else ''} {', '.join(missing)}",
                          location=Location(str(path), 1), hint=hint)
    idx = {name: c for c, name in enumerate(header) if name}
    lots = []
    for r, row in enumerate(rows[1:], start=2):
        if all(v is None or str(v).strip() == "" for v in row):
            continue
        if len(row) > len(header) and any(str(v).strip() for v in row[len(header):] if v is not None):
            raise RecordError(f"row {r} has more fields than the first row names", location=Location(str(path), r),
                              hint="a decimal comma or a stray comma splits a field; quote it or remove it")
        values = {k: (row[c] if c < len(row) else None) for k, c in idx.items()}
        where = {k: place(r, c, k) for k, c in idx.items()}
        unit_text = values.pop("unit", None)
        unit_text = None if unit_text is None or str(unit_text).strip() == "" else str(unit_text).strip()
        lots.append(_make_lot(route, values, where, place(r, idx["step"], "step"), unit_text))
    if not lots:
        raise RecordError("the record table has no lots under its first row", location=Location(str(path), 1))
    return lots


def _check_duplicates(lots: list[Lot]) -> None:
    seen: dict[tuple[str, int], Lot] = {}
    for lot in lots:
        key = (lot.step, lot.batch)
        if key in seen:
            first = seen[key].location.prefix().rstrip(": ") or "above"
            raise RecordError(f"batch {lot.batch} of step {lot.step} is recorded twice (first at {first})",
                              location=lot.where("batch"), hint="one entry per isolated batch; renumber or remove one")
        seen[key] = lot


def read_record(route: "Route", path: str | Path) -> Record:
    """Read a campaign record for ``route`` (YAML, CSV or xlsx).

    Raises
    ------
    RecordError
        Unreadable file, a missing or unknown key or column, an unknown or telescoped
        step, a batch recorded twice, a zero or negative mass, an assay of 0 or above
        100 %, a unit given twice.
    QuantityError
        A mass without a unit, with a decimal comma or of the wrong dimension (located).
    """
    path = Path(path)
    data = read_bytes(path, RecordError, _WHAT)
    suffix = path.suffix.lower()
    if suffix in YAML_SUFFIXES:
        lots = _read_yaml(route, path, data)
    elif suffix in TABLE_SUFFIXES:
        lots = _read_table(route, path, data)
    else:
        raise RecordError(f"unknown record file type '{path.suffix}'", location=Location(str(path)),
                          hint="use .yaml, .csv or .xlsx")
    _check_duplicates(lots)
    return Record(lots=tuple(lots), source=str(path))


def load_record(route: "Route", record: "str | Path | Record") -> Record:
    """A record file read (:func:`read_record`), or a :class:`Record` checked for duplicates."""
    if isinstance(record, (str, Path)):
        return read_record(route, record)
    _check_duplicates(list(record.lots))
    return record
