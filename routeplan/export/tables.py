"""The one place that turns a Plan into rows: for the terminal, CSV, workbook and pandas.

Rows are lists of plain dicts with numbers in fixed units (mol, kg, L); each table
has its columns declared once, with the heading and unit shown to people.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd

    from routeplan.plan.model import Plan, StepPlan

__all__ = [
    "Column",
    "CHARGE_COLUMNS",
    "RAW_COLUMNS",
    "charge_rows",
    "step_charge_rows",
    "raw_material_rows",
    "charges_frame",
    "display_quantity",
    "BATCH_COLUMNS",
    "MATERIAL_COLUMNS",
    "STEP_COLUMNS",
    "SUMMARY_COLUMNS",
    "charge_rule",
    "batch_charge_rows",
    "material_columns",
    "material_rows",
    "step_rows",
    "raw_export_columns",
    "raw_export_rows",
    "summary_rows",
]


@dataclass(frozen=True)
class Column:
    """A table column: row key, heading and unit (empty for none)."""

    key: str
    heading: str
    unit: str = ""

    @property
    def title(self) -> str:
        """Heading with its unit, e.g. ``mass [kg]``."""
        return f"{self.heading} [{self.unit}]" if self.unit else self.heading


CHARGE_COLUMNS = (
    Column("step", "step"),
    Column("order", "#"),
    Column("material", "material"),
    Column("name", "name"),
    Column("role", "role"),
    Column("basis", "basis"),
    Column("equiv", "equiv", "-"),
    Column("mol", "amount", "mol"),
    Column("mass_kg", "mass", "kg"),
    Column("volume_L", "volume", "L"),
    Column("batches", "batches", "-"),
    Column("batch_mass_kg", "mass per batch", "kg"),
    Column("batch_volume_L", "volume per batch", "L"),
    Column("intermediate", "made in route"),
)

RAW_COLUMNS = (
    Column("material", "material"),
    Column("name", "name"),
    Column("mass_kg", "mass", "kg"),
    Column("volume_L", "volume", "L"),
    Column("mol", "amount", "mol"),
    Column("cost", "cost"),
    Column("steps", "used in"),
)


def _m(q, unit: str) -> float | None:
    return None if q is None else float(q.m_as(unit))


def step_charge_rows(sp: "StepPlan") -> list[dict[str, Any]]:
    """One row per charge of one step, in order of addition."""
    n = sp.batches
    rows = []
    for c in sp.charges:
        mass = _m(c.mass, "kg")
        vol = _m(c.volume, "L")
        rows.append({
            "step": sp.id,
            "order": c.order,
            "material": c.material,
            "name": c.name,
            "role": c.role,
            "basis": c.basis,
            "equiv": c.equiv,
            "mol": _m(c.mol, "mol"),
            "mass_kg": mass,
            "volume_L": vol,
            "batches": n,
            "batch_mass_kg": mass / n,
            "batch_volume_L": None if vol is None else vol / n,
            "intermediate": c.intermediate,
        })
    return rows


def charge_rows(plan: "Plan") -> list[dict[str, Any]]:
    """Every charge of every step, steps in execution order."""
    return [row for sp in plan.steps for row in step_charge_rows(sp)]


def raw_material_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per bought material, totalled over the route."""
    return [
        {
            "material": r.material,
            "name": r.name,
            "mass_kg": _m(r.mass, "kg"),
            "volume_L": _m(r.volume, "L"),
            "mol": _m(r.mol, "mol"),
            "cost": r.cost,
            "steps": ", ".join(r.steps),
        }
        for r in plan.raw_materials
    ]


def charges_frame(plan: "Plan") -> "pd.DataFrame":
    """Every charge as a pandas DataFrame; columns are titled with their units."""
    import pandas as pd

    rows = charge_rows(plan)
    frame = pd.DataFrame(rows, columns=[c.key for c in CHARGE_COLUMNS])
    return frame.rename(columns={c.key: c.title for c in CHARGE_COLUMNS})


# Display units, largest first: the first whose magnitude is at least 1 is used.
_DISPLAY = {
    "mass": (("t", 1000.0), ("kg", 1.0), ("g", 1e-3), ("mg", 1e-6)),
    "volume": (("m³", 1000.0), ("L", 1.0), ("mL", 1e-3)),
    "amount": (("kmol", 1000.0), ("mol", 1.0), ("mmol", 1e-3)),
}


def display_quantity(value: float | None, kind: str, *, digits: int = 4) -> str:
    """A readable string for ``value`` given in kg, L or mol: ``'26.3 kg'``, ``'450 g'``.

    Parameters
    ----------
    value : float or None
        Mass [kg], volume [L] or amount [mol]; None gives an empty string.
    kind : str
        ``"mass"``, ``"volume"`` or ``"amount"``.
    digits : int
        Significant figures.

    Examples
    --------
    >>> display_quantity(0.45, "mass")
    '450 g'
    >>> display_quantity(26.25, "mass")
    '26.25 kg'
    """
    if value is None:
        return ""
    scales = _DISPLAY[kind]
    if value == 0:
        return f"0 {scales[1][0]}"
    # tonnes and m³ only from 10 of them: plants speak of 2500 kg, not 2.5 t
    for unit, factor in scales:
        limit = 10.0 if factor > 1 else 1.0
        if abs(value) / factor >= limit or factor == scales[-1][1]:
            return f"{value / factor:.{digits}g} {unit}"
    return f"{value:.{digits}g}"  # pragma: no cover


def column_unit(values, kind: str) -> tuple[str, float]:
    """One readable unit for a whole column: ``(unit, factor)`` with value/factor shown.

    The unit is chosen so that the largest value of the column reads at least 1 (kg
    rather than t below 10 t).  ``values`` are in kg, L or mol; None entries are skipped.

    Examples
    --------
    >>> column_unit([0.2, 0.05], "mass")
    ('g', 0.001)
    """
    vals = [abs(v) for v in values if v is not None]
    scales = _DISPLAY[kind]
    top = max(vals) if vals else 0.0
    if top == 0:
        return scales[1]
    for unit, factor in scales:
        limit = 10.0 if factor > 1 else 1.0
        if top / factor >= limit:
            return unit, factor
    return scales[-1]


# --- Charge sheets, materials, steps and summary (workbook and CSV) -------------------

#: Columns of one batch's charge table: what the plan says to charge in one batch.
#: The workbook adds the plant's fill-in columns after these.
BATCH_COLUMNS = (
    Column("order", "#"),
    Column("material", "key"),
    Column("name", "material"),
    Column("role", "role"),
    Column("basis", "basis"),
    Column("basis_value", "basis value"),
    Column("equiv", "equiv", "-"),
    Column("mol", "amount", "mol"),
    Column("molar_mass", "molar mass", "g/mol"),
    Column("assay", "assay", "-"),
    Column("molarity", "concentration", "mol/L"),
    Column("density", "density", "g/mL"),
    Column("mass_kg", "mass to charge", "kg"),
    Column("volume_L", "volume to charge", "L"),
    Column("hazards", "hazards"),
)

MATERIAL_COLUMNS = (
    Column("material", "key"),
    Column("name", "material"),
    Column("formula", "formula"),
    Column("molar_mass", "molar mass", "g/mol"),
    Column("assay", "assay", "-"),
    Column("density", "density", "g/mL"),
    Column("solution_molarity", "solution concentration", "mol/L"),
    Column("solution_mass_fraction", "solution mass fraction", "-"),
    Column("solution_density", "solution density", "g/mL"),
    Column("price", "price", "currency/kg"),
    Column("made_in", "made in step"),
    Column("hazards", "hazards"),
    Column("notes", "notes"),
)

STEP_COLUMNS = (
    Column("step", "step"),
    Column("name", "name"),
    Column("equation", "equation"),
    Column("vessel", "vessel"),
    Column("batches", "batches", "-"),
    Column("batch_volume_L", "volume per batch", "L"),
    Column("fill_fraction", "vessel fill", "-"),
    Column("yield", "yield", "-"),
    Column("limiting", "limiting reagent"),
    Column("product", "product"),
    Column("product_mol", "product amount", "mol"),
    Column("product_mass_kg", "product mass", "kg"),
    Column("isolated", "isolated"),
)

SUMMARY_COLUMNS = (
    Column("item", "item"),
    Column("value", "value"),
    Column("unit", "unit"),
)

# How the basis of a charge line is named on sheets, with the unit of its number.
_BASIS_TEXT = {
    "equiv": "equiv",
    "stoichiometric": "stoichiometric",
    "mol_percent": "mol %",
    "volumes": "volumes [L/kg]",
    "mass_ratio": "mass ratio [kg/kg]",
}


def charge_rule(basis: str, material) -> str:
    """How the mass of a charge follows from its inputs.

    Returns ``"molar"`` (``m = n * M / assay``; a solution by mass fraction uses its
    mass fraction as the assay), ``"molarity"`` (``V = n / c``, ``m = V * rho``),
    ``"volumes"`` (``V = volumes * m_lim``, ``m = V * rho``) or ``"mass_ratio"``
    (``m = ratio * m_lim``), as in ROUTE-FORMAT.md, "How the plan is computed".
    """
    if basis in ("volumes", "mass_ratio"):
        return basis
    if material.solution is not None and material.solution.molarity is not None:
        return "molarity"
    return "molar"


def batch_charge_rows(plan: "Plan", sp: "StepPlan") -> list[dict[str, Any]]:
    """One row per charge of one batch of step ``sp``, in order of addition.

    Fractions (assay) are numbers from 0 to 1; sheets may show them as percent.

    Amounts, masses and volumes are the step's totals divided by its number of batches
    ([mol], [kg], [L]); material data come from the route: molar mass [g/mol], assay
    [-] (a solution's mass fraction, None for a solution by molarity), concentration of
    a solution by molarity [mol/L], density as supplied [g/mL] (a solution's own).
    ``rule`` says how the mass follows (:func:`charge_rule`); ``limiting`` marks the
    limiting reagent's line; ``made_in`` names the step that makes an intermediate and
    ``in_solution`` is True when that step is telescoped.
    """
    route = plan.route
    n = sp.batches
    maker = {s.product: s for s in plan.steps}
    rows = []
    seen_limiting = False
    for c in sp.charges:
        mat = route.materials[c.material]
        sol = mat.solution
        rule = charge_rule(c.basis, mat)
        if sol is not None:
            assay = sol.mass_fraction
            density = sol.density
        else:
            assay = mat.assay
            density = mat.density
        made = maker.get(c.material) if c.intermediate else None
        is_limiting = (not seen_limiting and c.material == sp.limiting and c.equiv is not None)
        seen_limiting = seen_limiting or is_limiting
        rows.append({
            "order": c.order,
            "material": c.material,
            "name": c.name,
            "role": c.role,
            "basis": _BASIS_TEXT.get(c.basis, c.basis),
            "basis_value": c.basis_value,
            "equiv": c.equiv,
            "mol": None if c.mol is None else float(c.mol.m_as("mol")) / n,
            "molar_mass": _m(mat.molar_mass, "g/mol"),
            "assay": assay,
            "molarity": _m(sol.molarity, "mol/L") if sol is not None and sol.molarity is not None else None,
            "density": _m(density, "g/mL"),
            "mass_kg": float(c.mass.m_as("kg")) / n,
            "volume_L": None if c.volume is None else float(c.volume.m_as("L")) / n,
            "hazards": "; ".join(mat.hazards),
            "rule": rule,
            "limiting": is_limiting,
            "made_in": None if made is None else made.id,
            "in_solution": made is not None and not made.isolated,
            "intermediate": c.intermediate,
        })
    return rows


def material_columns(plan: "Plan") -> tuple[Column, ...]:
    """:data:`MATERIAL_COLUMNS` with the price's unit in the route's currency."""
    from dataclasses import replace

    cur = plan.route.currency
    return tuple(replace(c, unit=f"{cur}/kg" if cur else "") if c.key == "price" else c
                 for c in MATERIAL_COLUMNS)


def material_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per material of the route, in file order (see :data:`MATERIAL_COLUMNS`).

    Molar mass [g/mol], assay [-], densities [g/mL], concentration [mol/L], mass
    fraction [-], price [currency/kg]; hazards joined with ``"; "``.
    """
    route = plan.route
    made_in = {sp.product: sp.id for sp in plan.steps}
    rows = []
    for mat in route.materials.values():
        sol = mat.solution
        rows.append({
            "material": mat.key,
            "name": mat.name,
            "formula": mat.formula,
            "molar_mass": _m(mat.molar_mass, "g/mol"),
            "assay": None if sol is not None else mat.assay,
            "density": _m(mat.density, "g/mL"),
            "solution_molarity": _m(sol.molarity, "mol/L") if sol is not None else None,
            "solution_mass_fraction": sol.mass_fraction if sol is not None else None,
            "solution_density": _m(sol.density, "g/mL") if sol is not None else None,
            "price": mat.price,
            "made_in": made_in.get(mat.key),
            "hazards": "; ".join(mat.hazards),
            "notes": mat.notes,
        })
    return rows


def step_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per step in execution order (see :data:`STEP_COLUMNS`).

    Volume per batch [L], vessel fill [-], yield [-], product amount [mol] and mass as
    isolated (or in solution) [kg].
    """
    rows = []
    for sp in plan.steps:
        b = sp.batch
        rows.append({
            "step": sp.id,
            "name": sp.name,
            "equation": sp.equation,
            "vessel": sp.vessel,
            "batches": sp.batches,
            "batch_volume_L": None if b is None else _m(b.batch_volume, "L"),
            "fill_fraction": None if b is None else b.fill_fraction,
            "yield": sp.yield_,
            "limiting": sp.limiting,
            "product": sp.product,
            "product_mol": _m(sp.product_mol, "mol"),
            "product_mass_kg": _m(sp.product_mass, "kg"),
            "isolated": sp.isolated,
        })
    return rows


def raw_export_columns(plan: "Plan") -> tuple[Column, ...]:
    """Columns of the raw-material totals for the workbook and CSV, with price and cost
    in the route's currency."""
    cur = plan.route.currency or ""
    return (
        Column("material", "key"),
        Column("name", "material"),
        Column("mass_kg", "mass", "kg"),
        Column("volume_L", "volume", "L"),
        Column("mol", "amount", "mol"),
        Column("price", "price", f"{cur}/kg" if cur else ""),
        Column("cost", "cost", cur),
        Column("steps", "used in"),
    )


def raw_export_rows(plan: "Plan") -> list[dict[str, Any]]:
    """:func:`raw_material_rows` with the price per kg [currency/kg] of each material
    (None where the route gives no price or no currency)."""
    rows = raw_material_rows(plan)
    cur = plan.route.currency
    for row in rows:
        price = plan.route.materials[row["material"]].price
        row["price"] = price if cur else None
    return rows


def summary_rows(plan: "Plan", written: str) -> list[dict[str, Any]]:
    """The plan's key facts as ``item``, ``value``, ``unit`` rows.

    Parameters
    ----------
    plan : Plan
        The plan.
    written : str
        When the output is written (ISO 8601 text).

    Returns
    -------
    list of dict
        Each with ``key`` (stable identifier), ``item``, ``value``, ``unit`` and
        ``kind`` (``"text"``, ``"fraction"``, ``"mass"``, ``"amount"`` or ``"money"``).
        Masses in kg, amounts in mol, fractions as numbers from 0 to 1.
    """
    from routeplan import CAUTION, __version__

    route = plan.route
    src = route.source
    tgt = route.materials[plan.target_material]
    oy = plan.overall_yield
    costs = [r.cost for r in plan.raw_materials if r.cost is not None]

    def row(key, item, value, unit="", kind="text"):
        return {"key": key, "item": item, "value": value, "unit": unit, "kind": kind}

    rows = [
        row("route", "route", route.name),
        row("route_file", "route file", _file_name(src.path) if src else "(not read from a file)"),
        row("route_sha256", "route file SHA-256", src.sha256 if src else ""),
        row("written", "written", written),
        row("version", "routeplan version", __version__),
        row("target", "target", plan.target_material),
        row("target_name", "target name", tgt.name),
        row("target_mass", "target mass, with overage", _m(plan.target_mass, "kg"), "kg", "mass"),
        row("overage", "overage", route.target.overage, "fraction", "fraction"),
        row("target_mol", "target amount", _m(plan.target_mol, "mol"), "mol", "amount"),
        row("overall_yield", "overall yield (longest linear sequence)", oy.yield_, "fraction", "fraction"),
        row("lls", "longest linear sequence", " → ".join(oy.longest_linear_sequence)),
        row("steps", "steps", len(plan.steps), "", "count"),
    ]
    if route.currency:
        rows.append(row("currency", "currency", route.currency))
    if costs:
        rows.append(row("cost", "raw-material cost (priced materials)", sum(costs), route.currency or "", "money"))
    rows.append(row("caution", "caution", CAUTION))
    for p in plan.warnings:
        rows.append(row("warning", "warning", p.render()))
    return rows


def _file_name(path: str) -> str:
    """The last part of ``path`` (POSIX or Windows separators)."""
    return path.replace("\\", "/").rsplit("/", 1)[-1] or path
