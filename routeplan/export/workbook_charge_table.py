"""The charge table of a charge sheet: its columns, its live formulas and one row of it.

Columns, from A: the planned columns the plant reads (:data:`PRINTED_COLUMNS`: order,
material, role, basis, equiv, amount, planned assay, mass and volume to charge,
hazards), the plant's fill-in columns (:data:`FILL_IN_COLUMNS`), and then, outside the
print area, the material data the formulas read (:data:`REFERENCE_COLUMNS`: key, molar
mass, concentration, density).

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
  ``volume = mass / density``;
* an intermediate in solution from a telescoped step (``rule == "carried"``): no
  formula.  The volume to charge is the plan's volume of that step's reaction mixture
  carried in [L], the mass cell the plan's content of the compound in it [kg]; both are
  plain numbers, nothing is weighed and the lot assay is recorded only.

Every formula is stored with the plan's number as its computed value.  With a campaign
record, an intermediate in hand has its lot cell and lot-assay cell filled in (the row's
``prefill``, :func:`routeplan.views.record_text.lot_prefill`), and its mass is stored at
that assay.
"""

from __future__ import annotations

from typing import Any

from routeplan.views.sheet_rows import BATCH_COLUMNS
from routeplan.views.tables import Column
from routeplan.export.workbook_styles import Styles, put

__all__ = [
    "FILL_IN_COLUMNS",
    "PRINTED_COLUMNS",
    "REFERENCE_COLUMNS",
    "SHEET_COLUMNS",
    "COL",
    "LAST_COLUMN",
    "PRINT_LAST_COLUMN",
    "charge_formulas",
    "role_text",
    "write_charge_row",
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

# What the grey lot-assay cell says when selected, by the rule of the charge.
_RECORDED_ONLY = ("This charge does not depend on the lot assay (charged by volume, "
                  "by mass ratio or as a solution by molarity).")


def _cell(row: int, key: str) -> str:
    from xlsxwriter.utility import xl_rowcol_to_cell

    return xl_rowcol_to_cell(row, COL[key])


def charge_formulas(row: dict[str, Any], r: int, lim_row: int | None, lim_mass: float) -> tuple[str | None, str | None]:
    """The mass and volume formulas of a charge written on sheet row ``r``.

    Parameters
    ----------
    row : dict
        A row of :func:`routeplan.views.sheet_rows.batch_charge_rows`.
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
        formula (None when the volume is a plain number or no volume is known).  An
        intermediate carried in solution (``rule == "carried"``) has neither.
    """
    mol, mm, assay = _cell(r, "mol"), _cell(r, "molar_mass"), _cell(r, "assay")
    lot, conc, dens = _cell(r, "lot_assay"), _cell(r, "molarity"), _cell(r, "density")
    ratio, mass, vol = _cell(r, "basis_value"), _cell(r, "mass_kg"), _cell(r, "volume_L")
    basis_mass = _cell(lim_row, "mass_kg") if lim_row is not None else repr(float(lim_mass))
    has_density = row["density"] is not None
    rule = row["rule"]
    if rule in ("carried", "gas"):
        return None, None
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


def role_text(row: dict[str, Any]) -> str:
    """The role cell of a charge: its role, ``limiting reagent``, and where an
    intermediate comes from (``made in S1``, or for one carried in solution
    ``in solution from S3: transfer the whole mixture; mass = content, not weighed``).

    Examples
    --------
    >>> role_text({"role": "reactant", "limiting": True, "made_in": "S3", "rule": "carried"})
    'reactant, limiting reagent, in solution from S3: transfer the whole mixture; mass = content, not weighed'
    """
    parts = [row["role"]]
    if row["limiting"]:
        parts.append("limiting reagent")
    if row["rule"] == "carried":
        parts.append(f"in solution from {row['made_in']}: transfer the whole mixture; mass = content, not weighed")
    elif row["rule"] == "gas":
        parts.append("gas: charge the normal volume (0 °C, 101.325 kPa); mass not weighed")
    elif row["made_in"]:
        parts.append(f"made in {row['made_in']}")
    return ", ".join(parts)


def write_charge_row(ws, st: Styles, row: dict[str, Any], r: int, lim_row: int | None, lim_mass: float) -> None:
    """Write one charge on sheet row ``r`` (0-based): planned cells, live formulas stored
    with the plan's numbers, the fill-in cells and their input checks.

    Parameters
    ----------
    ws : xlsxwriter worksheet
    st : Styles
    row : dict
        A row of :func:`routeplan.views.sheet_rows.batch_charge_rows`: amounts [mol],
        masses [kg], volumes [L] per batch.
    r : int
        0-based sheet row.
    lim_row : int or None
        0-based row of the limiting reagent's charge on the same sheet.
    lim_mass : float
        Mass of limiting reagent in the batch [kg], used only when ``lim_row`` is None.
    """
    put(ws, r, COL["order"], row["order"], st.integer)
    put(ws, r, COL["material"], row["material"], st.cell_text)
    put(ws, r, COL["name"], row["name"], st.cell_text)
    put(ws, r, COL["role"], role_text(row), st.cell_text)
    put(ws, r, COL["basis"], row["basis"], st.cell_text)
    put(ws, r, COL["basis_value"], row["basis_value"], st.ratio)
    put(ws, r, COL["equiv"], row["equiv"], st.ratio)
    put(ws, r, COL["mol"], row["mol"], st.quantity(row["mol"]))
    put(ws, r, COL["molar_mass"], row["molar_mass"], st.molar_mass)
    put(ws, r, COL["assay"], row["assay"], st.percent)
    put(ws, r, COL["molarity"], row["molarity"], st.density)
    put(ws, r, COL["density"], row["density"], st.density)
    put(ws, r, COL["hazards"], row["hazards"], st.cell_text)

    carried = row["rule"] == "carried"
    mass_f, vol_f = charge_formulas(row, r, lim_row, lim_mass)
    if carried:
        _write_carried(ws, st, row, r)
    elif row["rule"] == "gas":
        _write_gas(ws, st, row, r)
    else:
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

    prefill = row.get("prefill")
    put(ws, r, COL["lot"], None if prefill is None else prefill["lot"], st.fill_text)
    lot_col = COL["lot_assay"]
    if row["rule"] == "molar" and mass_f is not None:
        put(ws, r, lot_col, None if prefill is None else prefill["assay"], st.fill_percent)
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
        message = (f"This charge is the reaction mixture of step {row['made_in']}, transferred whole: "
                   "no lot assay applies." if carried else
                   "A gas is charged by its normal volume: no lot assay applies." if row["rule"] == "gas"
                   else _RECORDED_ONLY)
        ws.data_validation(r, lot_col, r, lot_col, {
            "validate": "any", "input_title": "Recorded only", "input_message": message[:255],
        })
    put(ws, r, COL["actual_mass_kg"], None, st.fill_mass)
    ws.data_validation(r, COL["actual_mass_kg"], r, COL["actual_mass_kg"], {
        "validate": "decimal", "criteria": ">=", "value": 0,
        "error_title": "Actual mass", "error_message": "Type the mass charged in kg.",
    })
    put(ws, r, COL["checked_by"], None, st.fill_text)


def _write_carried(ws, st: Styles, row: dict[str, Any], r: int) -> None:
    """Mass and volume cells of an intermediate carried in solution: the volume of
    mixture to transfer [L] in bold, as the quantity the plant charges, and the content
    of the compound in it [kg] in italics, not bold, with a note shown on selecting it.
    Both are the plan's numbers per batch, written as plain values."""
    mass_col = COL["mass_kg"]
    put(ws, r, mass_col, row["mass_kg"], st.quantity(row["mass_kg"], content=True))
    ws.data_validation(r, mass_col, r, mass_col, {
        "validate": "any", "input_title": "Content, not weighed",
        "input_message": (f"Mass of {row['material']} in the mixture from step {row['made_in']}. "
                          "Transfer the whole mixture (volume to charge); nothing is weighed.")[:255],
    })
    put(ws, r, COL["volume_L"], row["volume_L"], st.quantity(row["volume_L"], bold=True))


def _write_gas(ws, st: Styles, row: dict[str, Any], r: int) -> None:
    """Mass and volume cells of a gas taken up: its normal volume per batch (0 degC,
    101.325 kPa) [L] in bold, the quantity the plant charges from a cylinder or line,
    and its mass [kg] in italics, not weighed, with a note shown on selecting it."""
    mass_col = COL["mass_kg"]
    put(ws, r, mass_col, row["mass_kg"], st.quantity(row["mass_kg"], content=True))
    ws.data_validation(r, mass_col, r, mass_col, {
        "validate": "any", "input_title": "Gas, not weighed",
        "input_message": (f"Mass of {row['material']} per batch. Charge it by its normal volume "
                          "(volume to charge, at 0 °C and 101.325 kPa); nothing is weighed.")[:255],
    })
    put(ws, r, COL["volume_L"], row["volume_L"], st.quantity(row["volume_L"], bold=True))
