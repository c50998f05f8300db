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

from routeplan.errors import Location

__all__ = ["read_bytes", "yaml_document", "table_rows", "TABLE_SUFFIXES", "YAML_SUFFIXES"]

YAML_SUFFIXES = (".yaml", ".yml")
TABLE_SUFFIXES = (".csv", ".xlsx", ".xlsm")


def read_bytes(path: Path, error: type, what: str) -> bytes:
    """The file's bytes; ``error`` (a RouteplanError class) when it cannot be read."""
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
