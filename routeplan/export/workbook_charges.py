"""One charge sheet: one batch of one step (or each of its many identical batches),
with live formulas and the plant's columns.

Layout (rows from the top): title with "batch k of n" (or "each of n batches
(identical)" for a step of more than
:data:`~routeplan.export.workbook.MAX_BATCH_SHEETS` batches, which gets one sheet), the
caution, a header block (step, name, equation, vessel, yield, limiting reagent, product
per batch, route, route file and its SHA-256, notes, the limiting reagent charged [mol] as
a live formula, the weighing tolerance), the plan's warnings about the step, then the
charge table — one row per charge in order of addition — and under it the safety block
of the batch (criticality class, ΔTad, MTSR, gas volume and rate per batch, gas taken up,
vent notes; "not screened" without thermal data; locked), the records at the step's
marked points and the sign-off block (:mod:`routeplan.export.workbook_records`).
Every sheet is protected without a password; the fill-in cells are unlocked.

The charge table's columns and live formulas are those of
:mod:`routeplan.export.workbook_charge_table`: the planned columns the plant reads
(:data:`PRINTED_COLUMNS`), the plant's fill-in columns, and then, outside the print
area, the material data the formulas read (:data:`REFERENCE_COLUMNS`).  Column widths
are capped (:data:`WIDTH_BOUNDS`) and long text wraps, so the print area fitted to one
landscape page wide prints at about 80 % or more on Letter or A4: 10-pt text at 8 pt
or larger (:data:`PRINT_BUDGET_PX`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.safety_text import SCREENING_NOTE, sheet_safety_pairs
from routeplan.views.sheet_rows import batch_charge_rows
from routeplan.views.transfer_text import transfer_text
from routeplan.export.workbook_charge_table import (COL, FILL_IN_COLUMNS, INPUT_KEYS, LAST_COLUMN,
                                                    PRINT_LAST_COLUMN, PRINTED_COLUMNS, REFERENCE_COLUMNS,
                                                    SHEET_COLUMNS, charge_formulas, limiting_mol_formula,
                                                    role_text, write_charge_row)
from routeplan.export.workbook_records import (protect, step_warnings, write_records, write_sign_off,
                                               write_warnings)
from routeplan.export.workbook_styles import (Styles, escape_header, fit_widths, lines_height, put, sheet_title,
                                              wrapped_lines)
from routeplan.views.numbers import given_pct, pct

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan

__all__ = [
    "FILL_IN_COLUMNS",
    "PRINTED_COLUMNS",
    "REFERENCE_COLUMNS",
    "SHEET_COLUMNS",
    "COL",
    "TABLE_HEADING_ROW",
    "LAST_COLUMN",
    "PRINT_LAST_COLUMN",
    "WIDTH_BOUNDS",
    "PRINT_BUDGET_PX",
    "write_charge_sheet",
    "charge_formulas",
    "batch_text",
    "page_texts",
]

#: Row index (0-based) of the charge table's headings when the step has no warning;
#: each warning about the step takes one more row above the table.
TABLE_HEADING_ROW = 13

#: Lowest and highest width of each column [character units]; longer text wraps.  The
#: highest widths of the printed columns add up to at most :data:`PRINT_BUDGET_PX`.
WIDTH_BOUNDS = {
    "order": (4, 4), "name": (12, 14), "role": (10, 12), "basis": (7, 10), "basis_value": (6, 7),
    "equiv": (6, 7), "mol": (8, 9), "assay": (7, 7), "mass_kg": (9, 10), "volume_L": (9, 10),
    "hazards": (11, 13), "lot": (9, 9), "lot_assay": (9, 9), "actual_mass_kg": (9, 9),
    "flag": (10, 10), "balance": (8, 8), "checked_by": (8, 8), "material": (8, 16), "molar_mass": (9, 10),
    "molarity": (14, 14), "density": (8, 9), "tolerance": (10, 10),
}

#: Widest the printed columns may be [px at 100 %] so that, fitted to the width of a
#: Letter page in landscape (11 in less 0.4 in margins each side, 96 px per inch), the
#: print scale would be 82 % or more.  LibreOffice was seen to print about 1.5 % below
#: that estimate, so 10-pt text prints at 8 pt or larger; A4 landscape is wider
#: (11.69 in) and prints larger still.
PRINT_BUDGET_PX = (11.0 - 0.8) * 96 / 0.82

# Columns whose text wraps: their line count sets the row's height.
_TEXT_KEYS = ("name", "role", "basis", "hazards", "material")
# Lowest height of a charge row [pt]: room to write by hand in the fill-in cells.
_CHARGE_ROW_HEIGHT = 24.0

# header block: a label over three cells, then a value; two pairs on a line
_LEFT = (0, 2, 3, 7)       # label first..last, value first..last
_RIGHT = (8, 10, 11, PRINT_LAST_COLUMN)
_WIDE = (0, 2, 3, PRINT_LAST_COLUMN)


def batch_text(k: int | None, n: int) -> str:
    """Which batch a charge sheet is for: ``"2 of 3"``, or for one sheet standing for
    every batch of a step (``k`` None) ``"each of 596 batches (identical)"``.

    Examples
    --------
    >>> batch_text(2, 3)
    '2 of 3'
    >>> batch_text(None, 596)
    'each of 596 batches (identical)'
    """
    return f"each of {n} batches (identical)" if k is None else f"{k} of {n}"


def _vessel_text(plan: "Plan", sp: "StepPlan", k: int | None) -> str:
    if sp.vessel is None:
        return "(none given)"
    vessel = plan.route.equipment.get(sp.vessel)
    if vessel is None:
        return sp.vessel
    text = f"{sp.vessel}: {vessel.volume.m_as('L'):g} L nominal, fill at most {given_pct(vessel.max_fill)}"
    if sp.batch is not None and sp.batch.fill_fraction is not None:
        which = "each batch" if k is None else "this batch"
        text += f"; {which} fills {pct(sp.batch.fill_fraction)}"
    return text


def write_charge_sheet(ws, st: Styles, plan: "Plan", sp: "StepPlan", k: int | None,
                       context: dict[str, str]) -> dict[str, Any]:
    """Write batch ``k`` of step ``sp`` on worksheet ``ws``, or, with ``k`` None, one
    sheet for each of its batches (they are identical: every quantity is per batch).

    Parameters
    ----------
    ws : xlsxwriter worksheet
    st : Styles
    plan : Plan
    sp : StepPlan
        The step.
    k : int or None
        Batch number, from 1; None for a sheet that stands for every batch of the
        step (headed "each of n batches (identical)", printed once per batch, with a
        line for the batch number in its sign-off block).
    context : dict
        ``written`` (date text), ``route_line`` (route name, file and SHA-256),
        ``header`` and ``footer`` (print texts).

    Returns
    -------
    dict
        ``first_row`` and ``last_row`` (0-based) of the charges, and ``rows`` (the
        rows of :func:`routeplan.views.sheet_rows.batch_charge_rows`).
    """
    from routeplan import CAUTION

    n = sp.batches
    rows = batch_charge_rows(plan, sp)
    widths = _set_widths(ws, rows)
    which = f"batch {k} of {n}" if k is not None else batch_text(None, n)
    ws.write_string(0, 0, f"Charge sheet · step {sp.id} · {which}", st.title)
    ws.merge_range(1, 0, 1, PRINT_LAST_COLUMN, "", st.caution)
    ws.write_string(1, 0, "CAUTION: " + CAUTION, st.caution)
    ws.set_row(1, 28)
    pair = _Pairs(ws, st, widths)
    pair(2, _LEFT, "step", sp.id)
    pair(2, _RIGHT, "batch", batch_text(k, n) + ("; print one copy per batch" if k is None else ""))
    pair(3, _LEFT, "name", sp.name)
    pair(3, _RIGHT, "written", context["written"])
    pair(4, _WIDE, "equation", sp.equation)
    pair(5, _WIDE, "vessel", _vessel_text(plan, sp, k))
    rec = getattr(plan, "record", None)
    from_lots = rec is not None and rec.record_yields == "actual" and sp.id in rec.actual_yields
    pair(6, _LEFT, "yield (mean of the recorded lots) [%]" if from_lots else "yield (expected) [%]", sp.yield_,
         st.value_percent)
    batch_volume = None if sp.batch is None else float(sp.batch.batch_volume.m_as("L"))
    pair(6, _RIGHT, "volume per batch [L]", batch_volume, st.quantity(batch_volume, plain=True))
    lim_mol = float(sp.limiting_mol.m_as("mol")) / n
    pair(7, _LEFT, "limiting reagent", sp.limiting)
    pair(7, _RIGHT, "limiting reagent per batch [mol]", lim_mol, st.quantity(lim_mol, plain=True))
    product_kg = float(sp.product_mass.m_as("kg")) / n
    made = "as isolated" if sp.isolated else (transfer_text(plan, sp) or "in solution, goes on to the next step")
    pair(8, _LEFT, "product", f"{sp.product}, {made}")
    pair(8, _RIGHT, "product per batch [kg]", product_kg, st.quantity(product_kg, plain=True))
    pair(9, _WIDE, "route", context["route_line"])
    pair(10, _WIDE, "notes", sp.notes or "")
    lim_i = next((i for i, row in enumerate(rows) if row["limiting"]), None)
    lim_text = "(not weighed: transferred whole)" if lim_i is not None and rows[lim_i]["rule"] == "carried" else None
    pair(11, _LEFT, "limiting reagent charged [mol]", lim_text or lim_mol, st.quantity(lim_mol, plain=True))
    tol = plan.route.charge_tolerance
    pair(11, _RIGHT, "weighing tolerance", f"±{100 * tol:.1f} % of the mass to charge, unless the line "
                                           "says otherwise (column 'weighed within')")
    pair.set_heights()
    warned = write_warnings(ws, st, 12, PRINT_LAST_COLUMN, step_warnings(plan, sp),
                            sum(widths[:PRINT_LAST_COLUMN + 1]))

    h = max(TABLE_HEADING_ROW, warned + 1)
    ref = COL[REFERENCE_COLUMNS[0].key]
    ws.merge_range(h - 1, ref, h - 1, LAST_COLUMN, "", st.ref_note)
    ws.write_string(h - 1, ref, "material data the formulas read (not printed)", st.ref_note)
    head_lines = 1
    for i, col in enumerate(SHEET_COLUMNS):
        fmt = st.heading_fill_in if col.key in INPUT_KEYS else st.heading
        ws.write_string(h, i, sheet_title(col), fmt)
        head_lines = max(head_lines, wrapped_lines(sheet_title(col), widths[i], bold=True))
    ws.set_row(h, lines_height(head_lines, 30))

    first = h + 1
    lim_row = next((first + i for i, row in enumerate(rows) if row["limiting"]), None)
    lim_mass = float(sp.limiting_mass.m_as("kg")) / n
    lim_cell = None
    if lim_row is not None:
        from xlsxwriter.utility import xl_rowcol_to_cell

        formula = limiting_mol_formula(rows[lim_row - first], lim_row)
        if formula is not None:
            lim_cell = xl_rowcol_to_cell(11, _LEFT[2])
            ws.write_formula(11, _LEFT[2], formula, st.quantity(lim_mol, plain=True), lim_mol)
    for i, row in enumerate(rows):
        r = first + i
        write_charge_row(ws, st, row, r, lim_row, lim_mass, lim_cell)
        lines = max(wrapped_lines(_text_of(row, key), widths[COL[key]]) for key in _TEXT_KEYS)
        ws.set_row(r, lines_height(lines, _CHARGE_ROW_HEIGHT))
    last = first + len(rows) - 1

    step = plan.route.step(sp.id)
    s = _safety_block(ws, st, sp, last + 2, widths)
    records_end = write_records(ws, st, s, step, lambda a, b: sum(widths[a:b + 1]))
    end = write_sign_off(ws, st, records_end + 2, PRINT_LAST_COLUMN, k, n)
    ws.freeze_panes(h + 1, 0)
    _page_setup(ws, h, end, context)
    protect(ws)
    return {"first_row": first, "last_row": last, "rows": rows, "heading_row": h, "limiting_mol_cell": lim_cell,
            "safety_row": last + 2 if sp.safety else -1}


def _safety_block(ws, st: Styles, sp: "StepPlan", r: int, widths: list[float]) -> int:
    """The safety block under the charge table, beside the hazards column: a heading
    and one label-value line each (:func:`routeplan.views.safety_text.sheet_safety_pairs`);
    return the row after it (two below its last line; ``r`` when there is nothing)."""
    pairs = sheet_safety_pairs(sp)
    if not pairs:
        return r
    put(ws, r, 0, f"Safety per batch: {SCREENING_NOTE}", st.subtitle)
    for j, (label, text) in enumerate(pairs, start=1):
        ws.merge_range(r + j, 0, r + j, 2, "", st.label)
        put(ws, r + j, 0, label, st.label)
        ws.merge_range(r + j, 3, r + j, PRINT_LAST_COLUMN, "", st.value_text)
        put(ws, r + j, 3, text, st.value_text)
        lines = max(wrapped_lines(label, sum(widths[0:3]), columns=3),
                    wrapped_lines(text, sum(widths[3:PRINT_LAST_COLUMN + 1]), columns=PRINT_LAST_COLUMN - 2))
        if lines > 1:
            ws.set_row(r + j, lines_height(lines))
    return r + len(pairs) + 2


def _text_of(row: dict[str, Any], key: str) -> Any:
    return role_text(row) if key == "role" else row.get(key)


def _set_widths(ws, rows: list[dict[str, Any]]) -> list[float]:
    """Fit the columns to the headings and this batch's values, within :data:`WIDTH_BOUNDS`."""
    specs = []
    for col in SHEET_COLUMNS:
        values = [] if col in FILL_IN_COLUMNS else [_text_of(row, col.key) for row in rows]
        if col.key == "basis":  # our own short words: wrap between them ("volumes" / "[L/kg]")
            values = [w for v in values for w in v.split()]
        specs.append((sheet_title(col), values, *WIDTH_BOUNDS[col.key]))
    return fit_widths(ws, specs)


class _Pairs:
    """Writes the header block's label-value pairs and then sizes each row to its
    longest wrapped value."""

    def __init__(self, ws, st: Styles, widths: list[float]) -> None:
        self.ws, self.st, self.widths = ws, st, widths
        self.lines: dict[int, int] = {}

    def __call__(self, r: int, span: tuple[int, int, int, int], label: str, value: Any, fmt=None) -> None:
        a, b, c, d = span
        ws, st = self.ws, self.st
        ws.merge_range(r, a, r, b, "", st.label)
        put(ws, r, a, label, st.label)
        fmt = fmt or st.value_text
        ws.merge_range(r, c, r, d, "", fmt)
        put(ws, r, c, value, fmt)
        lines = wrapped_lines(value, sum(self.widths[c:d + 1]), columns=d - c + 1)
        self.lines[r] = max(self.lines.get(r, 1), lines)

    def set_heights(self) -> None:
        for r, lines in self.lines.items():
            if lines > 1:
                self.ws.set_row(r, lines_height(lines))


def _page_setup(ws, heading_row: int, last_row: int, context: dict[str, str]) -> None:
    """Landscape, the printed columns (A to the last fill-in column) fitted to one page
    wide, headings repeated on every page."""
    ws.set_landscape()
    ws.print_area(0, 0, last_row, PRINT_LAST_COLUMN)
    ws.fit_to_pages(1, 0)
    ws.repeat_rows(heading_row)
    ws.set_margins(left=0.4, right=0.4, top=0.7, bottom=0.7)
    ws.set_header(context["header"])
    ws.set_footer(context["footer"])


def page_texts(route_name: str, route_file: str, sha256: str, caution: str) -> dict[str, str]:
    """Print header and footer texts: route, sheet and file on top; the caution (on two
    lines) and the page number at the bottom."""
    header = f"&L&8{escape_header(route_name, 60)}&C&8&A&R&8{escape_header(route_file, 40)} {sha256[:12]}"
    words = caution.split()
    half = len(caution) // 2
    cut, count = 0, 0
    for i, w in enumerate(words):  # break at the word boundary nearest the middle
        count += len(w) + 1
        if count >= half:
            cut = i + 1
            break
    two_lines = " ".join(words[:cut]) + "\n" + " ".join(words[cut:])
    footer = f"&L&7{escape_header(two_lines, 240)}&R&8page &P of &N"
    return {"header": header, "footer": footer}
