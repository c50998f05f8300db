"""The charge table of a charge sheet: its columns, its live formulas and one row of it.

Columns, from A: the planned columns the plant reads (:data:`PRINTED_COLUMNS`: order,
material, role, basis, equiv, amount, planned assay, mass and volume to charge,
hazards), the plant's columns (:data:`FILL_IN_COLUMNS`: lot number, lot assay or titre,
actual mass, the tolerance flag, balance or vessel, checked by), and then, outside the
print area, the material data the formulas read (:data:`REFERENCE_COLUMNS`: key, molar
mass, concentration, density, tolerance).

The live formulas (``r`` is the row of the charge, ``lim`` the row of the limiting
reagent in the same sheet, ``N`` the header cell "limiting reagent charged [mol]"):

* ``N`` = the planned moles of limiting reagent until its actual mass is typed, then
  ``actual [kg] * 1000 * effective assay / M`` (for a limiting solution by molarity,
  ``actual / density * effective titre``);
* amount [mol] of a charge by equiv or mol %: ``equiv * N``; so once the limiting
  reagent is weighed in, every molar charge follows the moles actually charged;
  of a charge by volumes or mass ratio with a molar mass: ``mass * 1000 * assay / M``
  (a solution by molarity: ``volume * concentration``);
* a molar charge of a solid, a neat liquid or a solution by mass fraction::

      mass [kg]   = amount [mol] * M [g/mol] / 1000 / effective assay
      effective assay = the lot's assay (or measured mass fraction) when typed, else planned
      volume [L]  = mass [kg] / density [g/mL]          (where a density is known)

* a solution by molarity: ``volume = amount / effective titre`` (the lot's titre [mol/L]
  when typed, else the planned concentration), ``mass = volume * density``;
* ``volumes``: ``volume = volumes [L/kg] * limiting mass``, ``mass = volume * density``;
* ``mass_ratio``: ``mass = ratio [kg/kg] * limiting mass``, ``volume = mass / density``;
  where "limiting mass" is the limiting reagent's actual mass once typed, else its mass
  to charge (so a weaker lot, charged heavier, also raises the solvent);
* an intermediate in solution from a telescoped step (``rule == "carried"``): no
  formula.  The volume to charge is the plan's volume of that step's reaction mixture
  carried in [L], the mass cell the plan's content of the compound in it [kg]; nothing
  is weighed, and the lot and actual-mass cells are recorded only;
* the tolerance flag of a weighed charge: ``±1.0 %`` until the actual mass is typed,
  then ``within ±1.0 %`` or ``OUTSIDE ±1.0 %`` (``|actual - mass| <= tolerance * mass``),
  and the actual-mass cell turns red while it is outside.

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
    "INPUT_KEYS",
    "PRINTED_COLUMNS",
    "REFERENCE_COLUMNS",
    "SHEET_COLUMNS",
    "COL",
    "LAST_COLUMN",
    "PRINT_LAST_COLUMN",
    "charge_formulas",
    "limiting_mol_formula",
    "role_text",
    "write_charge_row",
]

#: Columns the plant fills in (and the flag that reads them), after the planned columns.
FILL_IN_COLUMNS = (
    Column("lot", "lot number"),
    Column("lot_assay", "lot assay or titre"),
    Column("actual_mass_kg", "actual mass charged", "kg"),
    Column("flag", "weighed within"),
    Column("balance", "balance or vessel"),
    Column("checked_by", "checked by"),
)

#: Keys of the fill-in columns whose cells are unlocked for typing.
INPUT_KEYS = ("lot", "lot_assay", "actual_mass_kg", "balance", "checked_by")

_BY_KEY = {c.key: c for c in BATCH_COLUMNS}

#: Planned columns that are printed, from column A: what the plant charges and how much.
PRINTED_COLUMNS = tuple(_BY_KEY[k] for k in (
    "order", "name", "role", "basis", "basis_value", "equiv", "mol", "assay", "mass_kg", "volume_L",
    "hazards"))

#: Columns right of the fill-in columns, outside the print area: the material data
#: the formulas read, for checking on screen.
REFERENCE_COLUMNS = tuple(_BY_KEY[k] for k in ("material", "molar_mass", "molarity", "density", "tolerance"))

#: Every column of the charge table, in sheet order from column A.
SHEET_COLUMNS = PRINTED_COLUMNS + FILL_IN_COLUMNS + REFERENCE_COLUMNS

#: Column index (0-based) of each column key.
COL = {c.key: i for i, c in enumerate(SHEET_COLUMNS)}

#: Last column index of the table.
LAST_COLUMN = len(SHEET_COLUMNS) - 1

#: Last column index of the print area (the last fill-in column).
PRINT_LAST_COLUMN = COL[FILL_IN_COLUMNS[-1].key]

# What the grey lot cell says when selected, by the rule of the charge.
_RECORDED_ONLY = ("This charge does not depend on the lot assay (charged by volume or by mass ratio): "
                  "record it only.")

#: Highest titre a lot cell accepts [mol/L] (no reagent solution is stronger than its
#: neat liquid; water itself is 55.5 mol/L; common practice, no source).
MAX_TITRE = 60.0


def _cell(row: int, key: str) -> str:
    from xlsxwriter.utility import xl_rowcol_to_cell

    return xl_rowcol_to_cell(row, COL[key])


def _effective(r: int, planned_key: str) -> str:
    lot = _cell(r, "lot_assay")
    return f"IF(ISNUMBER({lot}),{lot},{_cell(r, planned_key)})"


def limiting_mol_formula(row: dict[str, Any], lim_row: int) -> str | None:
    """The formula of the header cell "limiting reagent charged [mol]": the planned
    moles until the limiting reagent's actual mass is typed, then the moles in it (at
    the lot's assay or titre when typed).  None for a limiting reagent that is not
    weighed (carried in solution) or has no molar mass."""
    actual = _cell(lim_row, "actual_mass_kg")
    planned = repr(float(row["mol"])) if row["mol"] is not None else None
    if planned is None or row["rule"] == "carried":
        return None
    if row["rule"] == "molarity":
        return f"=IF(ISNUMBER({actual}),{actual}/{_cell(lim_row, 'density')}*{_effective(lim_row, 'molarity')},{planned})"
    if row["molar_mass"] is None or row["assay"] is None:
        return None
    return (f"=IF(ISNUMBER({actual}),{actual}*1000*{_effective(lim_row, 'assay')}/{_cell(lim_row, 'molar_mass')},"
            f"{planned})")


def charge_formulas(row: dict[str, Any], r: int, lim_row: int | None, lim_mass: float,
                    lim_mol: str | None = None) -> tuple[str | None, str | None, str | None]:
    """The mass, volume and amount formulas of a charge written on sheet row ``r``.

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
    lim_mol : str or None
        The cell holding the moles of limiting reagent charged (``"D12"``); None keeps
        the planned amounts as numbers.

    Returns
    -------
    tuple of (str or None, str or None, str or None)
        Mass formula (None when the mass is written as a plain number), volume formula
        (None when the volume is a plain number or no volume is known) and amount
        formula (None when the amount is a plain number).  An intermediate carried in
        solution (``rule == "carried"``) has none.
    """
    mol, mm, assay = _cell(r, "mol"), _cell(r, "molar_mass"), _cell(r, "assay")
    dens = _cell(r, "density")
    ratio, mass, vol = _cell(r, "basis_value"), _cell(r, "mass_kg"), _cell(r, "volume_L")
    if lim_row is not None:
        lim_actual, lim_planned = _cell(lim_row, "actual_mass_kg"), _cell(lim_row, "mass_kg")
        basis_mass = (lim_planned if lim_row == r or row["limiting"]
                      else f"IF(ISNUMBER({lim_actual}),{lim_actual},{lim_planned})")
    else:
        basis_mass = repr(float(lim_mass))
    has_density = row["density"] is not None
    has_volume = has_density and row["volume_L"] is not None
    rule = row["rule"]
    if rule in ("carried", "gas"):
        return None, None, None
    amount = None
    if row["mol"] is not None and row["equiv"] is not None and not row["limiting"] and lim_mol is not None:
        amount = f"={_cell(r, 'equiv')}*{lim_mol}"
    if rule == "molar":
        if row["mol"] is None or row["molar_mass"] is None or row["assay"] is None:
            return None, (f"={mass}/{dens}" if has_volume else None), None
        return f"={mol}*{mm}/1000/{_effective(r, 'assay')}", (f"={mass}/{dens}" if has_volume else None), amount
    if rule == "molarity":
        return f"={vol}*{dens}", f"={mol}/{_effective(r, 'molarity')}", amount
    by_mass = row["mol"] is not None and row["molar_mass"] is not None and row["assay"] is not None
    if by_mass:
        amount = f"={mass}*1000*{assay}/{mm}"
    if rule == "volumes":
        return f"={vol}*{dens}", f"={ratio}*{basis_mass}", amount
    # mass_ratio
    return f"={ratio}*{basis_mass}", (f"={mass}/{dens}" if has_volume else None), amount


def _flag_formula(r: int) -> str:
    actual, mass, tol = _cell(r, "actual_mass_kg"), _cell(r, "mass_kg"), _cell(r, "tolerance")
    band = f'"±"&FIXED({tol}*100,1)&" %"'
    return (f'=IF(ISNUMBER({actual}),IF(ABS({actual}-{mass})<={tol}*{mass},"within "&{band},'
            f'"OUTSIDE "&{band}),{band})')


def _outside_rule(r: int) -> str:
    actual, mass, tol = _cell(r, "actual_mass_kg"), _cell(r, "mass_kg"), _cell(r, "tolerance")
    return f"=AND(ISNUMBER({actual}),ABS({actual}-{mass})>{tol}*{mass})"


def role_text(row: dict[str, Any]) -> str:
    """The role cell of a charge: its role, ``limiting reagent``, where an intermediate
    comes from (``made in S1``, or for one carried in solution ``in solution from S3:
    transfer the whole mixture; mass = content, not weighed``, the transfer as the row's
    ``transfer`` says it), and for a charge that leaves the row's ``leaves_note``.

    Examples
    --------
    >>> role_text({"role": "reactant", "limiting": True, "made_in": "S3", "rule": "carried",
    ...            "transfer": "transfer the whole mixture"})
    'reactant, limiting reagent, in solution from S3: transfer the whole mixture; mass = content, not weighed'
    >>> role_text({"role": "workup", "limiting": False, "made_in": None, "rule": "volumes",
    ...            "leaves_note": "separated and discarded right after this line, not transferred"})
    'workup, separated and discarded right after this line, not transferred'
    """
    parts = [row["role"]]
    if row["limiting"]:
        parts.append("limiting reagent")
    if row.get("leaves_note"):
        parts.append(row["leaves_note"])
    if row["rule"] == "carried":
        parts.append(f"in solution from {row['made_in']}: {row['transfer']}; mass = content, not weighed")
    elif row["rule"] == "gas":
        parts.append("gas: charge the normal volume (0 °C, 101.325 kPa); mass not weighed")
    elif row["made_in"]:
        parts.append(f"made in {row['made_in']}")
    return ", ".join(parts)


def write_charge_row(ws, st: Styles, row: dict[str, Any], r: int, lim_row: int | None, lim_mass: float,
                     lim_mol: str | None = None) -> None:
    """Write one charge on sheet row ``r`` (0-based): planned cells (locked), the live
    formulas, the plant's cells (unlocked, pale green) with their checks, the tolerance
    flag and its red mark, and the material data right of the print area.

    Parameters
    ----------
    ws : xlsxwriter worksheet
    st : Styles
    row : dict
        A row of :func:`routeplan.views.sheet_rows.batch_charge_rows`.
    r : int
        0-based sheet row.
    lim_row : int or None
        0-based row of the limiting reagent's charge on the same sheet.
    lim_mass : float
        Mass of limiting reagent in the batch [kg], used only when ``lim_row`` is None.
    lim_mol : str or None
        The cell holding the moles of limiting reagent charged.
    """
    put(ws, r, COL["order"], row["order"], st.integer)
    put(ws, r, COL["material"], row["material"], st.cell_text)
    put(ws, r, COL["name"], row["name"], st.cell_text)
    put(ws, r, COL["role"], role_text(row), st.cell_text)
    put(ws, r, COL["basis"], row["basis"], st.cell_text)
    put(ws, r, COL["basis_value"], row["basis_value"], st.ratio)
    put(ws, r, COL["equiv"], row["equiv"], st.ratio)
    put(ws, r, COL["molar_mass"], row["molar_mass"], st.molar_mass)
    put(ws, r, COL["assay"], row["assay"], st.percent)
    put(ws, r, COL["molarity"], row["molarity"], st.density)
    put(ws, r, COL["density"], row["density"], st.density)
    put(ws, r, COL["hazards"], row["hazards"], st.cell_text)
    put(ws, r, COL["tolerance"], row["tolerance"], st.percent)

    carried = row["rule"] == "carried"
    mass_f, vol_f, mol_f = charge_formulas(row, r, lim_row, lim_mass, lim_mol)
    if mol_f is None:
        put(ws, r, COL["mol"], row["mol"], st.quantity(row["mol"]))
    else:
        ws.write_formula(r, COL["mol"], mol_f, st.quantity(row["mol"]), row["mol"])
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
    _lot_cell(ws, st, row, r, mass_f)
    put(ws, r, COL["balance"], None, st.fill_text)
    put(ws, r, COL["checked_by"], None, st.fill_text)
    actual = COL["actual_mass_kg"]
    if carried or row["rule"] == "gas":
        put(ws, r, actual, None, st.not_used)
        ws.data_validation(r, actual, r, actual, {
            "validate": "any", "input_title": "Not weighed",
            "input_message": ("A gas is charged by its normal volume: record the volume charged in the remarks."
                              if not carried else
                              "Transferred whole from the step before: record the mass only if it was weighed."),
        })
        put(ws, r, COL["flag"], "not weighed", st.cell_text)
        return
    put(ws, r, actual, None, st.fill_mass)
    ws.data_validation(r, actual, r, actual, {
        "validate": "decimal", "criteria": ">=", "value": 0,
        "error_title": "Actual mass", "error_message": "Type the mass charged in kg.",
    })
    tol = row["tolerance"]
    band = f"±{100 * tol:.1f} %"
    ws.write_formula(r, COL["flag"], _flag_formula(r), st.cell_text, band)
    ws.conditional_format(r, actual, r, actual, {"type": "formula", "criteria": _outside_rule(r),
                                                 "format": st.outside})
    ws.conditional_format(r, COL["flag"], r, COL["flag"], {"type": "formula", "criteria": _outside_rule(r),
                                                           "format": st.outside})


def _lot_cell(ws, st: Styles, row: dict[str, Any], r: int, mass_f: str | None) -> None:
    """The lot assay or titre cell: asked for (a percent, or a titre in mol/L) where the
    charge depends on it, else grey and recorded only."""
    lot_col = COL["lot_assay"]
    carried = row["rule"] == "carried"
    molarity_solution = row["rule"] == "molarity" and row["equiv"] is not None
    prefill = row.get("prefill")
    if row["rule"] == "molar" and mass_f is not None:
        put(ws, r, lot_col, None if prefill is None else prefill["assay"], st.fill_percent)
        ws.data_validation(r, lot_col, r, lot_col, {
            "validate": "decimal", "criteria": "between", "minimum": 0.0001, "maximum": 1,
            "input_title": "Lot assay",
            "input_message": "Type the lot's assay (for a solution, its measured mass fraction) as a percent, "
                             "e.g. 97.5 %. The amount, mass and volume recalculate; empty: the planned assay.",
            "error_title": "Lot assay",
            "error_message": "An assay is a percent above 0 % and at most 100 %.",
        })
    elif molarity_solution:
        put(ws, r, lot_col, None, st.fill_titre)
        ws.data_validation(r, lot_col, r, lot_col, {
            "validate": "decimal", "criteria": "between", "minimum": 0.0001, "maximum": MAX_TITRE,
            "input_title": "Lot titre [mol/L]",
            "input_message": "Type the lot's titrated concentration in mol/L, e.g. 5.85. The volume and mass "
                             "to charge recalculate; empty: the planned concentration.",
            "error_title": "Lot titre",
            "error_message": f"A titre is a concentration in mol/L above 0 and at most {MAX_TITRE:g}.",
        })
    else:
        put(ws, r, lot_col, None, st.not_used)
        message = (f"This charge is the reaction mixture of step {row['made_in']} "
                   f"({row['transfer']}): no lot assay applies." if carried else
                   "A gas is charged by its normal volume: no lot assay applies." if row["rule"] == "gas"
                   else _RECORDED_ONLY)
        ws.data_validation(r, lot_col, r, lot_col, {
            "validate": "any", "input_title": "Recorded only", "input_message": message[:255],
        })


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
