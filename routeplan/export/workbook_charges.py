"""One charge sheet: one batch of one step, with live formulas and the plant's columns.

Layout (rows from the top): title with "batch k of n", the caution, a header block
(step, name, equation, vessel, yield, limiting reagent, product per batch, route,
route file and its SHA-256, notes), then the charge table — one row per charge in
order of addition — and a short sign-off block under it.

Columns of the charge table, from A: the planned columns the plant reads
(:data:`PRINTED_COLUMNS`: order, material, role, basis, equiv, amount, planned assay,
mass and volume to charge, hazards), the plant's fill-in columns, and then, outside the
print area, the material data the formulas read (:data:`REFERENCE_COLUMNS`: key, molar
mass, concentration, density).  Column widths are capped (:data:`WIDTH_BOUNDS`) and
long text wraps, so the print area fitted to one landscape page wide prints at about
80 % or more on Letter or A4: 10-pt text at 8 pt or larger (:data:`PRINT_BUDGET_PX`).

The live formulas (``r`` is the row of the charge, ``lim`` the row of the limiting
reagent in the same sheet):

* charged on a molar basis (equiv, mol %, stoichiometric), a solid, a neat liquid or
  a solution by mass fraction::

      mass [kg]   = amount [mol] * M [g/mol] / 1000 / effective assay
      effective assay = lot assay when a number is typed in it, else the planned assay
      volume [L]  = mass [kg] / density [g/mL]          (where a density is known)

  (for a solution by mass fraction, the "assay" is its mass fraction, and the lot
  assay is the lot's measured mass fraction);
* a solution by molarity: ``volume = amount / concentration``,
  ``mass = volume * density``; the lot assay is recorded only;
* ``volumes``: ``volume = volumes [L/kg] * mass of limiting reagent in this batch``
  (the cell of that row, so a weaker lot of limiting reagent, charged heavier, also
  raises the solvent), ``mass = volume * density``;
* ``mass_ratio``: ``mass = ratio [kg/kg] * mass of limiting reagent in this batch``,
  ``volume = mass / density``.

Every formula is stored with the plan's number as its computed value.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.export.tables import Column
from routeplan.export.sheet_rows import BATCH_COLUMNS, batch_charge_rows
from routeplan.export.workbook_styles import (Styles, escape_header, fit_widths, lines_height, put, sheet_title,
                                              wrapped_lines)

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
    "page_texts",
]

#: Columns the plant fills in, after the planned columns.
FILL_IN_COLUMNS = (
    Column("lot", "lot number"),
    Column("lot_assay", "lot assay", "-"),
    Column("actual_mass_kg", "actual mass charged", "kg"),
    Column("checked_by", "checked by"),
)

_BY_KEY = {c.key: c for c in BATCH_COLUMNS}

#: Planned columns that are printed, from column A: what the plant charges and how much.
PRINTED_COLUMNS = tuple(_BY_KEY[k] for k in (
    "order", "name", "role", "basis", "basis_value", "equiv", "mol", "assay", "mass_kg", "volume_L",
    "hazards"))

#: Columns right of the fill-in columns, outside the print area: the material data
#: the formulas read, for checking on screen.
REFERENCE_COLUMNS = tuple(_BY_KEY[k] for k in ("material", "molar_mass", "molarity", "density"))

#: Every column of the charge table, in sheet order from column A.
SHEET_COLUMNS = PRINTED_COLUMNS + FILL_IN_COLUMNS + REFERENCE_COLUMNS

#: Column index (0-based) of each column key.
COL = {c.key: i for i, c in enumerate(SHEET_COLUMNS)}

#: Last column index of the table.
LAST_COLUMN = len(SHEET_COLUMNS) - 1

#: Last column index of the print area (the last fill-in column).
PRINT_LAST_COLUMN = COL[FILL_IN_COLUMNS[-1].key]

#: Row index (0-based) of the charge table's headings; charges start on the next row.
TABLE_HEADING_ROW = 11

#: Lowest and highest width of each column [character units]; longer text wraps.  The
#: highest widths of the printed columns add up to at most :data:`PRINT_BUDGET_PX`.
WIDTH_BOUNDS = {
    "order": (4, 4), "name": (12, 17), "role": (10, 14), "basis": (7, 12), "basis_value": (6, 8),
    "equiv": (6, 8), "mol": (8, 10), "assay": (7, 8), "mass_kg": (9, 10), "volume_L": (9, 10),
    "hazards": (14, 19), "lot": (12, 12), "lot_assay": (8, 8), "actual_mass_kg": (10, 10),
    "checked_by": (8, 8), "material": (8, 16), "molar_mass": (9, 10), "molarity": (14, 14),
    "density": (8, 9),
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


def _cell(row: int, key: str) -> str:
    from xlsxwriter.utility import xl_rowcol_to_cell

    return xl_rowcol_to_cell(row, COL[key])


def charge_formulas(row: dict[str, Any], r: int, lim_row: int | None, lim_mass: float) -> tuple[str | None, str | None]:
    """The mass and volume formulas of a charge written on sheet row ``r``.

    Parameters
    ----------
    row : dict
        A row of :func:`routeplan.export.sheet_rows.batch_charge_rows`.
    r : int
        Its 0-based sheet row.
    lim_row : int or None
        0-based row of the limiting reagent's charge on the same sheet.
    lim_mass : float
        Mass of limiting reagent in the batch [kg], used only when ``lim_row`` is None.

    Returns
    -------
    tuple of (str or None, str or None)
        Mass formula (None when the mass is written as a plain number) and volume
        formula (None where no volume is known).
    """
    mol, mm, assay = _cell(r, "mol"), _cell(r, "molar_mass"), _cell(r, "assay")
    lot, conc, dens = _cell(r, "lot_assay"), _cell(r, "molarity"), _cell(r, "density")
    ratio, mass, vol = _cell(r, "basis_value"), _cell(r, "mass_kg"), _cell(r, "volume_L")
    basis_mass = _cell(lim_row, "mass_kg") if lim_row is not None else repr(float(lim_mass))
    has_density = row["density"] is not None
    rule = row["rule"]
    if rule == "molar":
        if row["mol"] is None or row["molar_mass"] is None or row["assay"] is None:
            return None, (f"={mass}/{dens}" if has_density and row["volume_L"] is not None else None)
        m = f"={mol}*{mm}/1000/IF(ISNUMBER({lot}),{lot},{assay})"
        v = f"={mass}/{dens}" if has_density and row["volume_L"] is not None else None
        return m, v
    if rule == "molarity":
        return f"={vol}*{dens}", f"={mol}/{conc}"
    if rule == "volumes":
        return f"={vol}*{dens}", f"={ratio}*{basis_mass}"
    # mass_ratio
    return f"={ratio}*{basis_mass}", (f"={mass}/{dens}" if has_density and row["volume_L"] is not None else None)


def _role_text(row: dict[str, Any]) -> str:
    parts = [row["role"]]
    if row["limiting"]:
        parts.append("limiting reagent")
    if row["made_in"]:
        parts.append(f"in solution from {row['made_in']}" if row["in_solution"] else f"made in {row['made_in']}")
    return ", ".join(parts)


def _vessel_text(plan: "Plan", sp: "StepPlan") -> str:
    if sp.vessel is None:
        return "(none given)"
    vessel = plan.route.equipment.get(sp.vessel)
    if vessel is None:
        return sp.vessel
    text = f"{sp.vessel}: {vessel.volume.m_as('L'):g} L nominal, fill at most {vessel.max_fill:.0%}"
    if sp.batch is not None and sp.batch.fill_fraction is not None:
        text += f"; this batch fills {sp.batch.fill_fraction:.0%}"
    return text


def write_charge_sheet(ws, st: Styles, plan: "Plan", sp: "StepPlan", k: int, context: dict[str, str]) -> dict[str, Any]:
    """Write batch ``k`` of step ``sp`` on worksheet ``ws``.

    Parameters
    ----------
    ws : xlsxwriter worksheet
    st : Styles
    plan : Plan
    sp : StepPlan
        The step.
    k : int
        Batch number, from 1.
    context : dict
        ``written`` (date text), ``route_line`` (route name, file and SHA-256),
        ``header`` and ``footer`` (print texts).

    Returns
    -------
    dict
        ``first_row`` and ``last_row`` (0-based) of the charges, and ``rows`` (the
        rows of :func:`routeplan.export.sheet_rows.batch_charge_rows`).
    """
    from routeplan import CAUTION

    n = sp.batches
    rows = batch_charge_rows(plan, sp)
    widths = _set_widths(ws, rows)
    ws.write_string(0, 0, f"Charge sheet · step {sp.id} · batch {k} of {n}", st.title)
    ws.merge_range(1, 0, 1, PRINT_LAST_COLUMN, "", st.caution)
    ws.write_string(1, 0, "CAUTION: " + CAUTION, st.caution)
    ws.set_row(1, 28)
    pair = _Pairs(ws, st, widths)
    pair(2, _LEFT, "step", sp.id)
    pair(2, _RIGHT, "batch", f"{k} of {n}")
    pair(3, _LEFT, "name", sp.name)
    pair(3, _RIGHT, "written", context["written"])
    pair(4, _WIDE, "equation", sp.equation)
    pair(5, _WIDE, "vessel", _vessel_text(plan, sp))
    pair(6, _LEFT, "yield (expected) [%]", sp.yield_, st.value_percent)
    batch_volume = None if sp.batch is None else float(sp.batch.batch_volume.m_as("L"))
    pair(6, _RIGHT, "volume per batch [L]", batch_volume, st.quantity(batch_volume, plain=True))
    lim_mol = float(sp.limiting_mol.m_as("mol")) / n
    pair(7, _LEFT, "limiting reagent", sp.limiting)
    pair(7, _RIGHT, "limiting reagent per batch [mol]", lim_mol, st.quantity(lim_mol, plain=True))
    product_kg = float(sp.product_mass.m_as("kg")) / n
    made = "as isolated" if sp.isolated else "in solution, goes on to the next step"
    pair(8, _LEFT, "product", f"{sp.product}, {made}")
    pair(8, _RIGHT, "product per batch [kg]", product_kg, st.quantity(product_kg, plain=True))
    pair(9, _WIDE, "route", context["route_line"])
    pair(10, _WIDE, "notes", sp.notes or "")
    pair.set_heights()

    h = TABLE_HEADING_ROW
    ref = COL[REFERENCE_COLUMNS[0].key]
    ws.merge_range(h - 1, ref, h - 1, LAST_COLUMN, "", st.ref_note)
    ws.write_string(h - 1, ref, "material data the formulas read (not printed)", st.ref_note)
    head_lines = 1
    for i, col in enumerate(SHEET_COLUMNS):
        fmt = st.heading_fill_in if col in FILL_IN_COLUMNS else st.heading
        ws.write_string(h, i, sheet_title(col), fmt)
        head_lines = max(head_lines, wrapped_lines(sheet_title(col), widths[i], bold=True))
    ws.set_row(h, lines_height(head_lines, 30))

    first = h + 1
    lim_row = next((first + i for i, row in enumerate(rows) if row["limiting"]), None)
    lim_mass = float(sp.limiting_mass.m_as("kg")) / n
    for i, row in enumerate(rows):
        r = first + i
        _write_charge_row(ws, st, row, r, lim_row, lim_mass)
        lines = max(wrapped_lines(_text_of(row, key), widths[COL[key]]) for key in _TEXT_KEYS)
        ws.set_row(r, lines_height(lines, _CHARGE_ROW_HEIGHT))
    last = first + len(rows) - 1

    s = last + 2
    put(ws, s, 0, "Sign-off (fill in at the vessel)", st.subtitle)
    for j, label in enumerate(("batch started (date, time)", "charged by", "checked by",
                               "product obtained [kg]", "remarks")):
        r = s + 1 + j
        ws.merge_range(r, 0, r, 2, "", st.label)
        put(ws, r, 0, label, st.label)
        ws.merge_range(r, 3, r, COL["hazards"], "", st.fill_sign)
        ws.set_row(r, 22)
    ws.freeze_panes(h + 1, 0)
    _page_setup(ws, h, s + 5, context)
    return {"first_row": first, "last_row": last, "rows": rows}


def _text_of(row: dict[str, Any], key: str) -> Any:
    return _role_text(row) if key == "role" else row.get(key)


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


def _write_charge_row(ws, st: Styles, row: dict[str, Any], r: int, lim_row: int | None, lim_mass: float) -> None:
    put(ws, r, COL["order"], row["order"], st.integer)
    put(ws, r, COL["material"], row["material"], st.cell_text)
    put(ws, r, COL["name"], row["name"], st.cell_text)
    put(ws, r, COL["role"], _role_text(row), st.cell_text)
    put(ws, r, COL["basis"], row["basis"], st.cell_text)
    put(ws, r, COL["basis_value"], row["basis_value"], st.ratio)
    put(ws, r, COL["equiv"], row["equiv"], st.ratio)
    put(ws, r, COL["mol"], row["mol"], st.quantity(row["mol"]))
    put(ws, r, COL["molar_mass"], row["molar_mass"], st.molar_mass)
    put(ws, r, COL["assay"], row["assay"], st.percent)
    put(ws, r, COL["molarity"], row["molarity"], st.density)
    put(ws, r, COL["density"], row["density"], st.density)
    put(ws, r, COL["hazards"], row["hazards"], st.cell_text)

    mass_f, vol_f = charge_formulas(row, r, lim_row, lim_mass)
    mass_fmt = st.quantity(row["mass_kg"], bold=True)
    if mass_f is None:
        put(ws, r, COL["mass_kg"], row["mass_kg"], mass_fmt)
    else:
        ws.write_formula(r, COL["mass_kg"], mass_f, mass_fmt, row["mass_kg"])
    vol_fmt = st.quantity(row["volume_L"], bold=True)
    if vol_f is None or row["volume_L"] is None:
        put(ws, r, COL["volume_L"], None, vol_fmt)
    else:
        ws.write_formula(r, COL["volume_L"], vol_f, vol_fmt, row["volume_L"])

    put(ws, r, COL["lot"], None, st.fill_text)
    lot_col = COL["lot_assay"]
    if row["rule"] == "molar" and mass_f is not None:
        put(ws, r, lot_col, None, st.fill_percent)
        ws.data_validation(r, lot_col, r, lot_col, {
            "validate": "decimal", "criteria": "between", "minimum": 0.0001, "maximum": 1,
            "input_title": "Lot assay",
            "input_message": "Type the lot's assay as a percent, e.g. 97.5 %. The mass and "
                             "volume to charge recalculate; leave empty to use the planned assay.",
            "error_title": "Lot assay",
            "error_message": "An assay is a percent above 0 % and at most 100 %.",
        })
    else:
        put(ws, r, lot_col, None, st.not_used)
        ws.data_validation(r, lot_col, r, lot_col, {
            "validate": "any",
            "input_title": "Recorded only",
            "input_message": "This charge does not depend on the lot assay (charged by volume, "
                             "by mass ratio or as a solution by molarity).",
        })
    put(ws, r, COL["actual_mass_kg"], None, st.fill_mass)
    ws.data_validation(r, COL["actual_mass_kg"], r, COL["actual_mass_kg"], {
        "validate": "decimal", "criteria": ">=", "value": 0,
        "error_title": "Actual mass", "error_message": "Type the mass charged in kg.",
    })
    put(ws, r, COL["checked_by"], None, st.fill_text)


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
