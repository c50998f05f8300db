"""Rows for the charge sheets, the materials and steps tables, the summary, the route
metrics and the stock comparison: what the workbook and the CSV files write.

Like :mod:`routeplan.views.tables` (the terminal's and pandas' rows), these read the
Plan only; numbers are in fixed units (mol, kg, L, g/mol, g/mL) and every column is
declared once with its heading and unit.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.tables import Column, raw_material_rows
from routeplan.units import magnitude

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan

__all__ = [
    "BATCH_COLUMNS",
    "MATERIAL_COLUMNS",
    "STEP_COLUMNS",
    "STEP_STOCK_COLUMNS",
    "SUMMARY_COLUMNS",
    "charge_rule",
    "batch_charge_rows",
    "material_columns",
    "material_rows",
    "step_rows",
    "raw_export_columns",
    "raw_export_rows",
    "summary_rows",
    "STEP_METRIC_COLUMNS",
    "step_metric_rows",
    "metric_rows",
    "STOCK_COLUMNS",
    "stock_rows",
    "stock_summary_rows",
    "from_stock_text",
    "not_in_stock",
    "stock_not_needed",
]


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
    Column("tolerance", "tolerance", "-"),
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

#: Columns that say what a step takes from stock and whether it runs (CSV steps table).
STEP_STOCK_COLUMNS = (
    Column("from_stock_mol", "product from stock", "mol"),
    Column("from_stock_kg", "product from stock", "kg"),
    Column("not_run", "not run because"),
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
    ``rule`` says how the mass follows (:func:`charge_rule`), or is ``"carried"`` for
    an intermediate that comes in solution from a telescoped step: its ``volume_L`` is
    then the volume of that step's mixture carried in [L] and ``mass_kg`` the mass of
    the compound in it [kg], nothing weighed.  ``limiting`` marks the limiting
    reagent's line; ``made_in`` names the step that makes an intermediate and
    ``in_solution`` is True when it is carried in solution.  A gas taken up
    (``phase: gas`` reactant) has ``rule`` ``"gas"``: its ``volume_L`` is the normal
    volume per batch at 0 degC and 101.325 kPa [L], the figure it is charged by, and
    ``mass_kg`` its mass, not weighed.  ``tolerance`` [-] is how far the mass weighed in
    may be from the mass to charge, either way (the line's own, else the route's
    ``charge_tolerance``).  ``leaves_note`` says that a charge leaves right after it is
    charged (None otherwise); ``transfer`` how a mixture carried in is transferred
    (:func:`routeplan.views.transfer_text.carried_note`; None for other lines).
    """
    from routeplan.views.safety_text import gas_charges
    from routeplan.views.transfer_text import LEAVES_NOTE, carried_note

    route = plan.route
    step = route.step(sp.id)
    n = sp.batches or 1  # a step that does not run gets no charge sheet; its rows are its zeros
    gases = gas_charges(sp)
    rows = []
    seen_limiting = False
    for c in sp.charges:
        mat = route.materials[c.material]
        sol = mat.solution
        rule = "carried" if c.carried_from is not None else "gas" if c.material in gases else \
            charge_rule(c.basis, mat)
        if sol is not None:
            assay = sol.mass_fraction
            density = sol.density
        else:
            assay = mat.assay
            density = mat.density
        made = plan.step_making(c.material) if c.intermediate else None
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
            "molar_mass": magnitude(mat.molar_mass, "g/mol"),
            "assay": assay,
            "molarity": magnitude(sol.molarity, "mol/L") if sol is not None and sol.molarity is not None else None,
            "density": magnitude(density, "g/mL"),
            "mass_kg": float(c.mass.m_as("kg")) / n,
            "volume_L": (gases[c.material] if rule == "gas" else
                         None if c.volume is None else float(c.volume.m_as("L")) / n),
            "hazards": "; ".join(mat.hazards),
            "tolerance": step.charge_tolerance(step.charges[c.order - 1], route),
            "rule": rule,
            "limiting": is_limiting,
            "made_in": c.carried_from or (None if made is None else made.id),
            "in_solution": c.carried_from is not None,
            "intermediate": c.intermediate,
            "leaves_note": LEAVES_NOTE if c.leaves else None,
            "transfer": None if c.carried_from is None else carried_note(plan, c.carried_from),
        })
        _prefill(plan, rows[-1])
    return rows


def _prefill(plan: "Plan", row: dict[str, Any]) -> None:
    """With a campaign record: the lot in hand of an intermediate, filled in (``prefill``:
    the lot text and the lots' assay [-]), and, for a charge whose mass follows from the
    lot assay, ``mass_kg`` and ``volume_L`` at that assay (what the sheet's own formula
    gives with the lot assay typed in: ``m = n * M / 1000 / lot assay``)."""
    from routeplan.views.record_text import lot_prefill

    row["prefill"] = None
    if not row["intermediate"] or row["rule"] != "molar" or plan.record is None:
        return
    fill = lot_prefill(plan, row["material"])
    if fill is None:
        return
    row["prefill"] = fill
    if fill["assay"] is not None and row["mol"] is not None and row["molar_mass"] is not None:
        row["mass_kg"] = row["mol"] * row["molar_mass"] / 1000 / fill["assay"]
        if row["density"] is not None and row["volume_L"] is not None:
            row["volume_L"] = row["mass_kg"] / row["density"]


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
    made_in = route.maker
    rows = []
    for mat in route.materials.values():
        sol = mat.solution
        rows.append({
            "material": mat.key,
            "name": mat.name,
            "formula": mat.formula,
            "molar_mass": magnitude(mat.molar_mass, "g/mol"),
            "assay": None if sol is not None else mat.assay,
            "density": magnitude(mat.density, "g/mL"),
            "solution_molarity": magnitude(sol.molarity, "mol/L") if sol is not None else None,
            "solution_mass_fraction": sol.mass_fraction if sol is not None else None,
            "solution_density": magnitude(sol.density, "g/mL") if sol is not None else None,
            "price": mat.price,
            "made_in": made_in.get(mat.key),
            "hazards": "; ".join(mat.hazards),
            "notes": mat.notes,
        })
    return rows


def step_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per step in execution order (see :data:`STEP_COLUMNS`).

    Volume per batch [L], vessel fill [-], yield [-], product amount [mol] and mass as
    isolated (or in solution) [kg], made by the step; and (:data:`STEP_STOCK_COLUMNS`)
    the product taken from stock [mol] and [kg] (None when the stock list does not name
    it) and why the step does not run (None when it runs).
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
            "batch_volume_L": None if b is None else magnitude(b.batch_volume, "L"),
            "fill_fraction": None if b is None else b.fill_fraction,
            "yield": sp.yield_,
            "limiting": sp.limiting,
            "product": sp.product,
            "product_mol": magnitude(sp.product_mol, "mol"),
            "product_mass_kg": magnitude(sp.product_mass, "kg"),
            "isolated": sp.isolated,
            "from_stock_mol": magnitude(sp.from_stock_mol, "mol"),
            "from_stock_kg": magnitude(sp.from_stock_mass, "kg"),
            "not_run": sp.not_run,
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
        row("target_mass", "target mass, with overage", magnitude(plan.target_mass, "kg"), "kg", "mass"),
        row("overage", "overage", route.target.overage, "fraction", "fraction"),
        row("target_mol", "target amount", magnitude(plan.target_mol, "mol"), "mol", "amount"),
        row("yield_basis", "step yields planned at", f"{plan.yield_basis} yields"),
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


# --- Route metrics and stock (workbook and CSV) ----------------------------------------

#: Per-step metrics from ``plan.metrics``, as extra columns of a step table.
STEP_METRIC_COLUMNS = (
    Column("step_pmi", "step PMI", "kg/kg"),
    Column("cumulative_pmi", "cumulative PMI", "kg/kg"),
    Column("atom_economy", "atom economy", "-"),
    Column("rme", "reaction mass efficiency", "-"),
)


def _fact(key, item, value, unit="", kind="text", note=""):
    return {"key": key, "item": item, "value": value, "unit": unit, "kind": kind, "note": note}


def step_metric_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per step in execution order: ``step`` and the keys of
    :data:`STEP_METRIC_COLUMNS`, read from ``plan.metrics`` (None where a metric was
    not computed, or without metrics). PMIs in [kg/kg], atom economy and reaction mass
    efficiency as fractions [-]."""
    m = plan.metrics

    def get(attr, sid):
        return None if m is None else getattr(m, attr).get(sid)

    return [{
        "step": sp.id,
        "step_pmi": get("pmi_by_step", sp.id),
        "cumulative_pmi": get("pmi_cumulative_by_step", sp.id),
        "atom_economy": get("atom_economy_by_step", sp.id),
        "rme": get("reaction_mass_efficiency_by_step", sp.id),
    } for sp in plan.steps]


def metric_rows(plan: "Plan") -> list[dict[str, Any]]:
    """The route's metrics from ``plan.metrics`` as ``key``, ``item``, ``value``,
    ``unit``, ``kind``, ``note`` rows (as :func:`summary_rows`, plus a short note).

    Keys: ``pmi``, ``e_factor_complete``, ``e_factor_simple`` [kg/kg]; ``cost_per_kg``
    [currency/kg] (text saying why when not computed); ``unpriced`` (the raw materials
    left out of the cost, when any). Empty without metrics.
    """
    m = plan.metrics
    if m is None:
        return []
    tgt = plan.target_material
    rows = [
        _fact("pmi", "process mass intensity, route", m.pmi, "kg/kg", "ratio",
              f"kg of raw materials per kg of {tgt} as delivered"),
        _fact("e_factor_complete", "complete E-factor", m.e_factor_complete, "kg/kg", "ratio",
              "PMI − 1: every raw material counts as waste"),
        _fact("e_factor_simple", "simple E-factor", m.e_factor_simple, "kg/kg", "ratio",
              "solvents and water left out"),
    ]
    if m.currency is None:
        rows.append(_fact("cost_per_kg", "raw-material cost per kg of target",
                          "not computed: the route gives no currency"))
    elif m.cost_per_kg is None:
        rows.append(_fact("cost_per_kg", "raw-material cost per kg of target",
                          "not computed: no raw material has a price"))
    else:
        note = "priced raw materials only" if m.unpriced else "every raw material priced"
        rows.append(_fact("cost_per_kg", "raw-material cost per kg of target", m.cost_per_kg,
                          f"{m.currency}/kg", "money", note))
    if m.unpriced:
        rows.append(_fact("unpriced", "raw materials without a price", ", ".join(m.unpriced),
                          note="left out of the cost"))
    return rows


#: The stock comparison, one row per raw material of the route.
STOCK_COLUMNS = (
    Column("material", "key"),
    Column("name", "material"),
    Column("need_kg", "need", "kg"),
    Column("on_hand_kg", "on hand", "kg"),
    Column("to_buy_kg", "to buy", "kg"),
    Column("status", "stock"),
)


def stock_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per raw material (order of first use) from ``plan.stock``; empty
    without a stock comparison.

    ``need_kg``: mass for the requested target [kg]; ``on_hand_kg``: mass in stock [kg]
    (None when the stock list does not name it); ``to_buy_kg``: the plan's mass to buy
    [kg] (0 when the stock covers the need; None for a material marked ``bought:
    false``); ``status``: ``not in stock``, ``in stock, enough``, ``in stock, short`` or
    ``not bought``, with ``; limits the target`` for the material that limits the largest
    target.
    """
    s = plan.stock
    if s is None:
        return []
    buy = {key: magnitude(mass, "kg") for key, mass in s.to_buy}
    rows = []
    for r in plan.raw_materials:
        have = s.on_hand.get(r.material)
        to_buy = buy.get(r.material, 0.0)
        if not r.bought:
            to_buy, status = None, "not bought (the route marks it 'bought: false')"
        elif have is None:
            status = "not in stock"
        else:
            status = "in stock, short" if to_buy > 0 else "in stock, enough"
        if r.material == s.limited_by:
            status += "; limits the target"
        rows.append({"material": r.material, "name": r.name, "need_kg": magnitude(r.mass, "kg"),
                     "on_hand_kg": magnitude(have, "kg"), "to_buy_kg": to_buy, "status": status})
    return rows


def stock_summary_rows(plan: "Plan") -> list[dict[str, Any]]:
    """What the stock allows, as ``key``, ``item``, ``value``, ``unit``, ``kind``,
    ``note`` rows; empty without a stock comparison.

    Keys: ``stock_file`` (when read from a file), ``max_target`` [kg] (text when no raw
    material is in stock), ``limited_by``, ``not_in_stock``, ``from_stock`` (one per
    intermediate in the stock list: the mass taken [kg], as isolated), ``not_used`` and
    ``not_needed`` (raw materials charged only in steps that do not run), when any.
    """
    s = plan.stock
    if s is None:
        return []
    missing = not_in_stock(plan)
    unused, idle = stock_not_needed(plan)
    rows = []
    if s.source:
        rows.append(_fact("stock_file", "stock list", _file_name(s.source)))
    if s.max_target is None:
        rows.append(_fact("max_target", "largest target the stock allows",
                          "none: no raw material of the route is in stock"))
    else:
        note = "counting only the materials in stock" if missing else "every raw material in stock"
        rows.append(_fact("max_target", "largest target the stock allows", magnitude(s.max_target, "kg"), "kg",
                          "mass", note))
        name = plan.route.materials[s.limited_by].name if s.limited_by in plan.route.materials else ""
        rows.append(_fact("limited_by", "limited by", s.limited_by,
                          note=name if name and name != s.limited_by else ""))
    if missing:
        rows.append(_fact("not_in_stock", "not in stock (buy in full)", ", ".join(missing)))
    for sp in plan.steps:
        if sp.from_stock_mass is None or sp.product not in s.on_hand:
            continue
        rows.append(_fact("from_stock", f"{sp.product} taken from stock", magnitude(sp.from_stock_mass, "kg"),
                          "kg", "mass", f"of {magnitude(s.on_hand[sp.product], 'kg'):.6g} kg on hand; "
                          + from_stock_text(sp)))
    if unused:
        rows.append(_fact("not_used", "in stock, not used by this route", ", ".join(unused)))
    if idle:
        rows.append(_fact("not_needed", "in stock, not needed for this target", ", ".join(idle),
                          note="charged only in steps that do not run"))
    return rows


def from_stock_text(sp: "StepPlan") -> str:
    """What the stock of a step's product means for the step, in words.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from_stock_text(NS(id="S1", product="acid", not_run=None))
    'step S1 makes the rest'
    """
    if sp.not_run is None:
        return f"step {sp.id} makes the rest"
    return f"step {sp.id} does not run: {sp.not_run}"


def not_in_stock(plan: "Plan") -> list[str]:
    """Raw materials to buy in full, in order of first use: bought (not ``bought: false``)
    and not in the stock list."""
    return [r.material for r in plan.raw_materials if r.material not in plan.stock.on_hand and r.bought]


def stock_not_needed(plan: "Plan") -> tuple[list[str], list[str]]:
    """Raw materials in stock that the plan does not charge, sorted: those no step of
    the route charges, and those charged only in steps that do not run."""
    needed = {r.material for r in plan.raw_materials}
    charged = {c.material for sp in plan.steps for c in sp.charges if not c.intermediate}
    spare = [k for k in sorted(plan.stock.on_hand) if k not in needed and not plan.route.is_intermediate(k)]
    return [k for k in spare if k not in charged], [k for k in spare if k in charged]
