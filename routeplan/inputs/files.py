"""Reading the input files beside a route (stock lists, campaign records) into rows.

One home for what every such reader does first: read the bytes, parse YAML 1.2 with
positions (ruamel.yaml, duplicate keys refused), or turn a CSV or xlsx table into a list
of rows with a function that names a cell for messages (``row 3`` in a CSV,
``Lots!C3`` in a workbook).  Errors are raised as the caller's error class, located.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import Any, Callable

from routeplan.errors import Location, not_a_regular_file

__all__ = ["read_bytes", "yaml_document", "table_rows", "formula_cells", "refuse_unevaluated", "TABLE_SUFFIXES",
           "YAML_SUFFIXES"]

YAML_SUFFIXES = (".yaml", ".yml")
TABLE_SUFFIXES = (".csv", ".xlsx", ".xlsm")


def read_bytes(path: Path, error: type, what: str) -> bytes:
    """The file's bytes; ``error`` (a RouteplanError class) when it cannot be read, or when
    it is not a regular file (a named pipe or a device could keep the reader waiting)."""
    odd = not_a_regular_file(path)
    if odd is not None:
        raise error(f"the {what} {odd}", location=Location(str(path)), hint="give a .yaml, .csv or .xlsx file")
    try:
        return path.read_bytes()
    except OSError as exc:
        raise error(f"cannot read the {what}: {exc.strerror}", location=Location(str(path))) from None


def yaml_document(path: Path, data: bytes, error: type, what: str) -> Any:
    """Parse ``data`` as one YAML 1.2 document, keeping line and column of every node."""
    from ruamel.yaml import YAML
    from ruamel.yaml.error import YAMLError

    yaml = YAML(typ="rt", pure=True)
    yaml.allow_duplicate_keys = False
    try:
        return yaml.load(data.decode("utf-8"))
    except UnicodeDecodeError:
        raise error(f"the {what} is not UTF-8 text", location=Location(str(path))) from None
    except YAMLError as exc:
        mark = getattr(exc, "problem_mark", None)
        loc = Location(str(path), mark.line + 1, mark.column + 1) if mark else Location(str(path))
        raise error(f"not valid YAML: {getattr(exc, 'problem', exc)}", location=loc) from None


def table_rows(path: Path, data: bytes, error: type, what: str) -> tuple[list[list[Any]], Callable[[int, int], str]]:
    """The rows of a CSV file or of the first sheet of an xlsx workbook.

    Returns
    -------
    tuple
        (rows as lists of cell values: strings from a CSV, numbers or strings from a
        workbook; ``cell(r, c)`` naming 1-based row ``r`` and 0-based column ``c`` as
        ``"row r"`` for a CSV or ``"Sheet!B3"`` for a workbook).
    """
    suffix = path.suffix.lower()
    if suffix == ".csv":
        try:
            text = data.decode("utf-8-sig")
        except UnicodeDecodeError:
            raise error(f"the {what} is not UTF-8 text", location=Location(str(path))) from None
        return list(csv.reader(io.StringIO(text))), (lambda r, c: f"row {r}")
    import openpyxl
    from openpyxl.utils import get_column_letter

    try:
        wb = openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=True)
    except Exception as exc:  # openpyxl raises several kinds for a bad file
        raise error(f"not a readable xlsx workbook ({type(exc).__name__})", location=Location(str(path))) from None
    ws = wb.worksheets[0]
    rows = [list(r) for r in ws.iter_rows(values_only=True)]
    title = ws.title
    wb.close()
    return rows, (lambda r, c: f"{title}!{get_column_letter(c + 1)}{r}")


def formula_cells(path: Path, data: bytes) -> Callable[[int, int], str | None] | None:
    """For a workbook, ``formula(r, c)``: the formula a cell of the first sheet holds (1-based
    row, 0-based column), or None; None for a CSV file.

    A workbook written by a program may hold formulas whose values no spreadsheet has
    calculated: read with stored values, such a cell is empty.  The formulas are read only
    when a caller asks about an empty cell.
    """
    if path.suffix.lower() == ".csv":
        return None
    cache: dict[str, list] = {}

    def formula(r: int, c: int) -> str | None:
        import openpyxl

        if "cells" not in cache:
            wb = openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=False)
            cache["cells"] = [list(row) for row in wb.worksheets[0].iter_rows(values_only=True)]
            wb.close()
        cells = cache["cells"]
        value = cells[r - 1][c] if r - 1 < len(cells) and c < len(cells[r - 1]) else None
        return value if isinstance(value, str) and value.startswith("=") else None

    return formula


def refuse_unevaluated(formula, path: Path, r: int, c: int, value: Any, cell: Callable[[int, int], str],
                       error: type) -> None:
    """Raise ``error`` when the empty cell ``value`` at row ``r``, column ``c`` holds a formula
    that no spreadsheet has calculated (``formula`` from :func:`formula_cells`, or None)."""
    if formula is None or not (value is None or str(value).strip() == ""):
        return
    held = formula(r, c)
    if held:
        raise error(f"cell {cell(r, c)} holds the formula {held} but no value: no spreadsheet has calculated it "
                    "since it was written", location=Location(str(path), r, None, cell(r, c)),
                    hint="open the file in a spreadsheet and save it (that stores the values), or type the value "
                         "itself")
