"""The workbook's Derivation sheet: every charge of every step, factor by factor, with live formulas.

Written only for a plan made with ``explain=True`` (``routeplan plan ROUTE --xlsx FILE
--explain``).  One block per charge, one row per factor, grouped by line; the rows come
from :func:`routeplan.views.derivation_text.sheet_blocks`, nothing is recomputed here.
Each line's result is a formula over its factor cells (``=F7*F8/F9*F10``, a sum
``=J12+J20``), and a factor that is an earlier result is a formula pointing at that
result's cell, in the same block or in the block of the step that derives it; so a
checker traces every number as in any spreadsheet, down to the route's own numbers.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["DERIVATION_SHEET", "DERIVATION_COLUMNS", "DERIVATION_TOP", "write_derivation", "result_formula"]

DERIVATION_SHEET = "Derivation"

#: (heading, row key) of each column, left to right.
DERIVATION_COLUMNS = (
    ("step", "step"), ("#", "order"), ("material", "material"), ("line", "line"), ("op", "op"),
    ("value", "value"), ("unit", "unit"), ("what", "what"), ("source", "source"),
    ("result", "result"), ("result unit", "result_unit"), ("result is", "result_what"),
)
_COL = {key: i for i, (_h, key) in enumerate(DERIVATION_COLUMNS)}

#: Row (0-based) of the column headings.
DERIVATION_TOP = 5

#: A factor's operator (``""`` for the first) as a spreadsheet writes it.
_FORMULA_OP = {"": "", "x": "*", "/": "/", "+": "+", "-": "-"}


def result_formula(ops: list[str], cells: list[str]) -> str:
    """The formula of a line: ``x`` and ``/`` apply to the term so far, ``+`` and ``-``
    start a new one; the first factor's ``op`` is ``""``.

    >>> result_formula(["", "x", "/"], ["F6", "F7", "F8"])
    '=F6*F7/F8'
    >>> result_formula(["", "+", "x", "-"], ["F6", "F7", "F8", "F9"])
    '=F6+F7*F8-F9'
    """
    return "=" + "".join(_FORMULA_OP[op] + cell for op, cell in zip(ops, cells))


def write_derivation(ws, st, plan: "Plan", caution: str, context: dict[str, str] | None = None) -> int:
    """Fill ``ws`` with the derivation blocks of ``plan``; returns the number of factor rows.

    ``context`` gives the printed page's ``header`` and ``footer`` (the caution), as on
    every sheet; the sheet prints landscape, one page wide, its headings on every page.
    """
    from xlsxwriter.utility import xl_rowcol_to_cell

    from routeplan.export.workbook_styles import put, set_widths
    from routeplan.views.derivation_text import sheet_blocks

    blocks = sheet_blocks(plan)
    put(ws, 0, 0, f"Derivation of every charge: {plan.route.name}", st.title)
    last = len(DERIVATION_COLUMNS) - 1
    notes = ((1, caution, st.caution, 30),
             (2, "Each line multiplies (x, /) its factors from the first, or adds (+, -) terms; its result is a "
                 "formula over the value cells. A value that is an earlier result points at that result's cell: "
                 "in the same block, or in the block of the step that derives it.", st.note, 28),
             (3, "A factor 'unit conversion' turns the product of the units into the result's unit "
                 "(kg / (g/mol) = 1000 mol).", st.note, 15))
    for row, text, fmt, height in notes:  # across the table's width, as on every sheet
        ws.merge_range(row, 0, row, last, "", fmt)
        ws.write_string(row, 0, text, fmt)
        ws.set_row(row, height)
    for col, (head, _key) in enumerate(DERIVATION_COLUMNS):
        put(ws, DERIVATION_TOP, col, head, st.heading)
    # where each line's result goes: the last row of the line
    result_row: dict[tuple[int, int], int] = {}
    r = DERIVATION_TOP + 1
    for b, block in enumerate(blocks):
        for li, line in enumerate(block["lines"]):
            r += len(line["rows"])
            result_row[(b, li)] = r - 1
    result_cell = {k: xl_rowcol_to_cell(v, _COL["result"], row_abs=True, col_abs=True) for k, v in result_row.items()}
    r = DERIVATION_TOP + 1
    widths: dict[str, list] = {key: [] for _h, key in DERIVATION_COLUMNS}
    for b, block in enumerate(blocks):
        for li, line in enumerate(block["lines"]):
            cells, ops = [], []
            for row in line["rows"]:
                shown = {"step": block["step"], "order": block["order"], "material": block["material"],
                         "line": li + 1, "op": row["op"], "unit": row["unit"], "what": row["what"],
                         "source": row["source"]}
                for key, value in shown.items():
                    put(ws, r, _COL[key], value, st.integer if key in ("order", "line") else st.cell_text)
                    widths[key].append(value)
                target = (b, row["ref"]) if row["ref"] is not None else row["at"]
                if target is not None:  # an earlier result: the value is that result's cell
                    ws.write_formula(r, _COL["value"], "=" + result_cell[tuple(target)], st.general, row["value"])
                else:
                    put(ws, r, _COL["value"], row["value"], st.general)
                widths["value"].append(row["value"])
                cells.append(xl_rowcol_to_cell(r, _COL["value"]))
                ops.append(row["op"])
                r += 1
            end = r - 1  # the line's last row holds its result
            ws.write_formula(end, _COL["result"], result_formula(ops, cells), st.quantity(line["value"], bold=True),
                             line["value"])
            put(ws, end, _COL["result_unit"], line["unit"], st.cell_text)
            put(ws, end, _COL["result_what"], line["what"], st.cell_text)
            for key, value in (("result", line["value"]), ("result_unit", line["unit"]),
                               ("result_what", line["what"])):
                widths[key].append(value)
    set_widths(ws, [(head, widths[key]) for head, key in DERIVATION_COLUMNS])
    ws.freeze_panes(DERIVATION_TOP + 1, 0)
    ws.set_landscape()
    ws.fit_to_pages(1, 0)
    ws.repeat_rows(DERIVATION_TOP)
    if context:
        ws.set_header(context.get("header", ""))
        ws.set_footer(context.get("footer", ""))
    return r - DERIVATION_TOP - 1
