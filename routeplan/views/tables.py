"""The one place that turns a Plan into rows: for the terminal, CSV, workbook and pandas.

Rows are lists of plain dicts with numbers in fixed units (mol, kg, L); each table
has its columns declared once, with the heading and unit shown to people.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd

    from routeplan.plan.model import Plan, StepPlan
    from routeplan.views.display_units import DisplayUnits

__all__ = [
    "Column",
    "CHARGE_COLUMNS",
    "RAW_COLUMNS",
    "charge_rows",
    "step_charge_rows",
    "raw_material_rows",
    "charges_frame",
    "display_quantity",
    "fmt",
    "charge_label",
]


@frozen
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
    Column("carried_from", "in solution from step"),
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


def step_charge_rows(sp: "StepPlan") -> list[dict[str, Any]]:
    """One row per charge of one step, in order of addition.

    Per-batch mass [kg] and volume [L] are None for a step of no batches (one that does
    not run because the stock of its product covers it).  Read from the plan's floats
    (``n_mol``, ``m_kg``, ``V_L``), never converted.
    """
    n = sp.batches
    return [{
        "step": sp.id,
        "order": c.order,
        "material": c.material,
        "name": c.name,
        "role": c.role,
        "basis": c.basis,
        "equiv": c.equiv,
        "mol": c.n_mol,
        "mass_kg": c.m_kg,
        "volume_L": c.V_L,
        "batches": n,
        "batch_mass_kg": None if n == 0 else c.m_kg / n,  # no batch: the step does not run
        "batch_volume_L": None if c.V_L is None or n == 0 else c.V_L / n,
        "intermediate": c.intermediate,
        "carried_from": c.carried_from,
        "leaves": c.leaves,
    } for c in sp.charges]


def charge_rows(plan: "Plan") -> list[dict[str, Any]]:
    """Every charge of every step, steps in execution order."""
    return [row for sp in plan.steps for row in step_charge_rows(sp)]


def raw_material_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per bought material, totalled over the route."""
    return [
        {
            "material": r.material,
            "name": r.name,
            "mass_kg": r.m_kg,
            "volume_L": r.V_L,
            "mol": r.n_mol,
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


def display_quantity(value: float | None, kind: str, *, units: "DisplayUnits | None" = None) -> str:
    """A readable string for ``value`` given in kg, L or mol: ``'26.3 kg'``, ``'450 g'``.

    With ``units`` (the plan's units, :mod:`routeplan.views.display_units`) the value is
    written in the unit of its kind there, by the rule of :mod:`routeplan.views.numbers`;
    without, in the unit that suits the value alone, to 4 significant figures.

    Parameters
    ----------
    value : float or None
        Mass [kg], volume [L] or amount [mol]; None gives an empty string.
    kind : str
        ``"mass"``, ``"volume"`` or ``"amount"``.
    units : DisplayUnits, optional
        One unit per kind for the whole plan.

    Examples
    --------
    >>> display_quantity(0.45, "mass")
    '450 g'
    >>> display_quantity(26.25, "mass")
    '26.25 kg'
    """
    if value is None:
        return ""
    if units is not None:
        return units.text(value, kind)
    name, factor = column_unit([value], kind)
    return f"{value / factor:.4g} {name}"


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


def fmt(value: float | None, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, without exponent for everyday sizes."""
    if value is None:
        return "–"
    if value == 0:
        return "0"
    if 1e-3 <= abs(value) < 1e6:
        text = f"{value:.{digits}g}"
        if "e" in text:  # e.g. 12345 at 4 digits
            text = f"{value:.0f}"
        return text
    return f"{value:.{digits - 1}e}"


def charge_label(row: dict[str, Any], maker) -> str:
    """The material of a charge row as people read it: ``acetamidophenol (B1)``.

    ``maker`` maps an intermediate to the step making it; a charge carried in solution
    reads ``salt (S2, in solution)``, a charge that leaves right after it is charged
    ``water (separated)``.
    """
    name = row["material"]
    if row.get("leaves"):
        return f"{name} (separated)"
    if row["carried_from"]:
        return f"{name} ({row['carried_from']}, in solution)"
    if row["intermediate"]:
        return f"{name} ({maker[row['material']]})"
    return name
