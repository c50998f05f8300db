"""The plan's tables as CSV files (``routeplan plan ROUTE --csv DIR``), for other tools.

Files written into ``DIR`` (made if missing), each atomically; the command line writes
the whole folder as one unit (:class:`routeplan.export.atomic.OutputSet`):

``summary.csv``
    item, value, unit: route, route file and SHA-256, date, target, overall yield,
    cost, the campaign duration, the waste streams, the cost of goods by part (and what
    has no price), the caution and every warning.
``steps.csv``
    one line per step in execution order, with the step metrics and, last, the
    product taken from stock [mol] and [kg] (empty when the stock list does not name
    it) and why the step does not run (empty when it runs).
``charges-NN-<step>.csv``
    the charges of step number ``NN`` (execution order), whole campaign and per batch;
    a step that does not run has 0 batches, zero charges and empty per-batch fields.
``raw-materials.csv``
    bought materials totalled over the route, with price and cost.
``materials.csv``
    every material of the route.
``safety.csv``
    heat and gas of one batch of each step that runs, screening estimates (see
    docs/safety.md): one row per gas evolved (at the step's conditions) or taken up (at
    normal conditions), or one row without gas; a step without thermal data says "no:
    not screened" and leaves the heat fields empty.
``schedule.csv``, ``vessels.csv``
    only when the plan has a schedule (every step has a ``cycle_time``): one row per
    batch (step, vessel, batch, start and end [h]), and one per vessel (busy and idle
    hours, idle gaps).
``waste.csv``
    one row per step: everything charged, the product taken on, the waste by stream
    and the residue over the campaign and per batch, the by-products from the equation.
``stock.csv``
    only when the plan has a stock comparison (``plan.stock``): per raw material, the
    need, the mass on hand (empty when not in stock) and the mass to buy [kg], and
    whether it is in stock.  ``summary.csv`` then also says the largest target the
    stock allows and the material that limits it.
``record-lots.csv``, ``record-in-hand.csv``
    only with a campaign record (``plan.record``): one line per lot (charged, isolated,
    assay, actual and expected yield, flag) and per intermediate in hand (made,
    consumed, in hand [mol] and [kg]); the other files are then the rest of the campaign.

Every file ends with one row whose first field is ``CAUTION: `` and the caution
(:data:`routeplan.CAUTION`), its other fields empty: the files are read by people too.
A program reading the numbers drops that last row (pandas: ``skipfooter=1,
engine="python"``).

Numbers are written in full precision in the units of the headings (mol, kg, L, g/mol,
g/mL; fractions from 0 to 1 where the heading says ``[%]`` or ``[-]``); an empty field
means "does not apply".  Text that a spreadsheet would run as a formula — a field
beginning with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return — is written
with a leading apostrophe, as the OWASP advice on CSV injection recommends
(https://owasp.org/www-community/attacks/CSV_Injection).  Numbers are never altered.
"""

from __future__ import annotations

import csv
import os
import re
from datetime import datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any, Iterable, Sequence

from routeplan.views.tables import CHARGE_COLUMNS, Column, step_charge_rows
from routeplan.views.sheet_rows import (STEP_COLUMNS, STEP_METRIC_COLUMNS, STEP_STOCK_COLUMNS, STOCK_COLUMNS,
                                         SUMMARY_COLUMNS,
                                         material_columns, material_rows, metric_rows, raw_export_columns,
                                         raw_export_rows, step_metric_rows, step_rows, stock_rows,
                                         stock_summary_rows, summary_rows)

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["FORMULA_STARTS", "neutralise", "csv_field", "caution_row", "step_file_name", "write_table",
           "write_csv"]

#: First characters that make a spreadsheet treat a field as a formula (OWASP).
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")

_UNSAFE_FILE_CHARS = re.compile(r"[^A-Za-z0-9._-]+")


def neutralise(text: str) -> str:
    """``text`` with a leading ``'`` when a spreadsheet would read it as a formula.

    Examples
    --------
    >>> neutralise('=HYPERLINK("http://x")')
    '\\'=HYPERLINK("http://x")'
    >>> neutralise("acetone")
    'acetone'
    """
    return "'" + text if text.startswith(FORMULA_STARTS) else text


def csv_field(value: Any) -> Any:
    """A table value as a CSV field: None empty, booleans ``true``/``false``, numbers
    unchanged (full precision), text neutralised (:func:`neutralise`)."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return value
    return neutralise(str(value))


def caution_row(width: int) -> list[str]:
    """The last row of every CSV file: ``CAUTION: `` and the caution in the first of
    ``width`` fields, the others empty (neutralised like any text field).

    Examples
    --------
    >>> row = caution_row(3)
    >>> row[0].startswith("CAUTION: Planning estimates only"), row[1:]
    (True, ['', ''])
    """
    from routeplan import CAUTION

    return [neutralise("CAUTION: " + CAUTION)] + [""] * (width - 1)


def step_file_name(index: int, step_id: str) -> str:
    """File name of a step's charges: ``charges-NN-<id>.csv``, the id reduced to
    letters, digits, ``.``, ``_`` and ``-`` (at most 40 characters).

    Examples
    --------
    >>> step_file_name(3, "S3 / work-up")
    'charges-03-S3_work-up.csv'
    """
    safe = _UNSAFE_FILE_CHARS.sub("_", step_id).strip("._-")[:40] or "step"
    return f"charges-{index:02d}-{safe}.csv"


def write_table(path: str | os.PathLike, columns: Sequence[Column], rows: Iterable[dict[str, Any]]) -> Path:
    """Write ``rows`` under the headings of ``columns`` (titles with units) to the CSV
    file ``path``, atomically (UTF-8, comma-separated, RFC 4180 quoting), and the
    caution as the last row (:func:`caution_row`)."""
    from routeplan.export.atomic import atomic_path

    target = Path(path)
    with atomic_path(target, suffix=".csv") as tmp:
        with open(tmp, "w", encoding="utf-8", newline="") as fh:
            writer = csv.writer(fh)
            writer.writerow([neutralise(c.title) for c in columns])
            for row in rows:
                writer.writerow([csv_field(row.get(c.key)) for c in columns])
            writer.writerow(caution_row(len(columns)))
    return target


def write_csv(plan: "Plan", folder: str | os.PathLike, *, written: datetime | None = None) -> list[Path]:
    """Write the plan's tables as CSV files into ``folder`` (made if missing).

    Parameters
    ----------
    plan : Plan
        The plan; only read.
    folder : str or path-like
        Output folder.
    written : datetime, optional
        Date and time recorded in ``summary.csv`` (default: now, local time).

    Returns
    -------
    list of Path
        The files written, in the order above.

    Raises
    ------
    OutputError
        When the folder cannot be made or a file cannot be written.
    """
    from routeplan.errors import OutputError
    from routeplan.export.workbook import written_text

    out_dir = Path(folder)
    if out_dir.exists() and not out_dir.is_dir():
        raise OutputError(f"'{out_dir}' is a file, not a folder", path=str(out_dir),
                          hint="give --csv a folder name")
    try:
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise OutputError(f"cannot make folder '{out_dir}': {exc.strerror}", path=str(out_dir),
                          errno=exc.errno, strerror=exc.strerror) from None
    when = written or datetime.now().astimezone()
    facts = summary_rows(plan, written_text(when))
    at = next((i for i, row in enumerate(facts) if row["key"] == "caution"), len(facts))
    from routeplan.views.waste_cost_text import waste_cost_facts

    facts[at:at] = metric_rows(plan) + waste_cost_facts(plan) + stock_summary_rows(plan)  # before the caution
    summary = [{k: row[k] for k in ("item", "value", "unit")} for row in facts]
    paths = [
        write_table(out_dir / "summary.csv", SUMMARY_COLUMNS, summary),
        write_table(out_dir / "steps.csv", STEP_COLUMNS + STEP_METRIC_COLUMNS + STEP_STOCK_COLUMNS,
                    [{**row, **metrics} for row, metrics in zip(step_rows(plan), step_metric_rows(plan))]),
    ]
    for i, sp in enumerate(plan.steps, start=1):
        paths.append(write_table(out_dir / step_file_name(i, sp.id), CHARGE_COLUMNS, step_charge_rows(sp)))
    paths.append(write_table(out_dir / "raw-materials.csv", raw_export_columns(plan), raw_export_rows(plan)))
    from routeplan.views.purchase_rows import purchase_columns, purchase_rows

    paths.append(write_table(out_dir / "purchases.csv", purchase_columns(plan), purchase_rows(plan)))
    paths.append(write_table(out_dir / "materials.csv", material_columns(plan), material_rows(plan)))
    from routeplan.views.safety_text import SAFETY_COLUMNS, safety_rows

    paths.append(write_table(out_dir / "safety.csv", SAFETY_COLUMNS, safety_rows(plan)))
    paths += _time_waste_tables(plan, out_dir)
    if plan.stock is not None:
        paths.append(write_table(out_dir / "stock.csv", STOCK_COLUMNS, stock_rows(plan)))
    if plan.record is not None:
        from routeplan.views.record_text import IN_HAND_COLUMNS, LOT_COLUMNS, in_hand_rows, lot_rows

        paths.append(write_table(out_dir / "record-lots.csv", LOT_COLUMNS, lot_rows(plan)))
        paths.append(write_table(out_dir / "record-in-hand.csv", IN_HAND_COLUMNS, in_hand_rows(plan)))
    return paths


def _time_waste_tables(plan: "Plan", out_dir: Path) -> list[Path]:
    """``schedule.csv`` and ``vessels.csv`` (when the plan has a schedule) and ``waste.csv``."""
    from routeplan.views.schedule_text import BATCH_SLOT_COLUMNS, VESSEL_USE_COLUMNS, batch_rows, vessel_rows
    from routeplan.views.waste_cost_text import WASTE_COLUMNS, waste_rows

    paths = []
    if plan.schedule is not None:
        paths.append(write_table(out_dir / "schedule.csv", BATCH_SLOT_COLUMNS, batch_rows(plan)))
        paths.append(write_table(out_dir / "vessels.csv", VESSEL_USE_COLUMNS, vessel_rows(plan)))
    if plan.waste is not None:
        paths.append(write_table(out_dir / "waste.csv", WASTE_COLUMNS, waste_rows(plan)))
    return paths
