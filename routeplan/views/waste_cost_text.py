"""Waste streams and cost of goods for people: rows and lines from a Plan.

Reads ``plan.waste`` (:mod:`routeplan.plan.waste`) and ``plan.cost_of_goods``
(:mod:`routeplan.plan.cost_of_goods`) only.  :func:`waste_rows` is one row per step
(workbook, CSV); :func:`waste_cost_facts` the Summary's item/value/unit facts;
:func:`waste_lines` and :func:`cost_lines` the terminal's text.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.display_units import plan_units
from routeplan.views.numbers import money
from routeplan.views.tables import Column

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["WASTE_COLUMNS", "PART_NAMES", "waste_rows", "waste_cost_facts", "unpriced_text", "waste_lines",
           "cost_lines"]

#: One row per step: its waste by stream over the campaign and per batch [kg].
WASTE_COLUMNS = (
    Column("step", "step"),
    Column("batches", "batches", "-"),
    Column("inputs_kg", "everything charged", "kg"),
    Column("product_kg", "product taken on", "kg"),
    Column("waste_kg", "waste", "kg"),
    Column("aqueous_kg", "aqueous", "kg"),
    Column("organic_kg", "organic", "kg"),
    Column("halogenated_kg", "halogenated", "kg"),
    Column("residue_kg", "reaction residue", "kg"),
    Column("gas_kg", "gas to the scrubber (in the residue)", "kg"),
    Column("by_products_kg", "by-products from the equation", "kg"),
    Column("batch_aqueous_kg", "aqueous per batch", "kg"),
    Column("batch_organic_kg", "organic per batch", "kg"),
    Column("batch_halogenated_kg", "halogenated per batch", "kg"),
    Column("batch_residue_kg", "residue per batch", "kg"),
    Column("by_products", "by-products [kg]"),
)

#: How the cost parts are named for people.
PART_NAMES = {"raw_materials": "raw materials", "plant": "plant time", "waste": "waste disposal"}


def waste_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per step (:data:`WASTE_COLUMNS`), execution order; empty without waste."""
    w = plan.waste
    if w is None:
        return []
    out = []
    for sw in w.steps:
        c, b = sw.campaign, sw.per_batch
        out.append({
            "step": sw.step, "batches": sw.batches, "inputs_kg": sw.inputs_kg, "product_kg": sw.product_kg,
            "waste_kg": sw.waste_kg, "aqueous_kg": c.aqueous_kg, "organic_kg": c.organic_kg,
            "halogenated_kg": c.halogenated_kg, "residue_kg": c.residue_kg, "gas_kg": sw.gas_kg,
            "by_products_kg": sw.by_products_kg,
            "batch_aqueous_kg": None if b is None else b.aqueous_kg,
            "batch_organic_kg": None if b is None else b.organic_kg,
            "batch_halogenated_kg": None if b is None else b.halogenated_kg,
            "batch_residue_kg": None if b is None else b.residue_kg,
            "by_products": "; ".join(f"{x.material} {x.mass_kg:.4g}" if x.mass_kg is not None
                                     else f"{x.material} (no molar mass)" for x in sw.by_products),
        })
    return out


def unpriced_text(plan: "Plan", part: str) -> str:
    """What part ``part`` of the cost of goods has no price for, in words ("" when all is priced)."""
    c = plan.cost_of_goods
    if c is None or not c.parts[part].unpriced:
        return ""
    items = c.parts[part].unpriced
    if part == "plant":
        steps = {s.id for s in plan.route.steps}
        return ", ".join(f"step {k} (no vessel or no cycle_time)" if k in steps else f"vessel {k} (no rate)"
                         for k in items)
    if part == "waste":
        return ", ".join(f"{k} stream (no waste_prices.{k})" for k in items)
    return ", ".join(items)


def waste_cost_facts(plan: "Plan") -> list[dict[str, Any]]:
    """Summary facts (``key``, ``item``, ``value``, ``unit``, ``kind``): campaign length,
    waste by stream and the mass balance, cost of goods by part with what is unpriced."""
    out: list[dict[str, Any]] = []

    def fact(key, item, value, unit="", kind="text"):
        out.append({"key": key, "item": item, "value": value, "unit": unit, "kind": kind, "note": ""})

    from routeplan.views.schedule_text import schedule_missing_text

    s = plan.schedule
    if s is not None:
        fact("campaign_h", "campaign duration", s.campaign_h, "h", "ratio")
        fact("pace_step", "step that sets the pace", s.pace_step or "")
    else:
        fact("campaign_h", "campaign duration", schedule_missing_text(plan))
    w = plan.waste
    if w is not None:
        for name in ("aqueous", "organic", "halogenated"):
            fact(f"waste_{name}", f"{name} waste", w.total.stream(name), "kg", "mass")
        fact("waste_residue", "reaction residue", w.total.residue_kg, "kg", "mass")
        fact("waste_gas", "gas to the scrubber (in the residue)", w.gas_kg, "kg", "mass")
        fact("waste_total", "waste, all streams", w.waste_kg, "kg", "mass")
        fact("mass_inputs", "inputs (raw materials and intermediates from stock)", w.inputs_kg, "kg", "mass")
    c = plan.cost_of_goods
    if c is not None:
        cur = c.currency or ""
        for name, part in c.parts.items():
            if c.currency is None:
                fact(f"cog_{name}", f"cost of goods: {PART_NAMES[name]}", "not computed (no currency)")
                continue
            fact(f"cog_{name}", f"cost of goods: {PART_NAMES[name]}",
                 part.amount if part.amount is not None else "no price given", cur, "money")
            if part.unpriced:
                fact(f"cog_{name}_unpriced", f"  {PART_NAMES[name]} without a price", unpriced_text(plan, name))
        if c.currency is not None:
            fact("cog_per_kg", "cost of goods per kg of target" + ("" if c.complete else ", priced parts only"),
                 c.per_kg if c.per_kg is not None else "no price given", f"{cur}/kg", "money")
    return out


def waste_lines(plan: "Plan", units: "DisplayUnits | None" = None) -> list[str]:
    """The waste of the campaign as plain text lines (no markup).

    ``units``: the plan's units (every mass in its unit of mass); default
    :func:`~routeplan.views.display_units.plan_units`.
    """
    w = plan.waste
    if w is None:
        return []
    t = w.total
    kg = (units or plan_units(plan)).mass_text

    lines = ["Waste (whole campaign; everything charged less the product taken on)",
             f"  aqueous {kg(t.aqueous_kg)} · organic {kg(t.organic_kg)} · halogenated {kg(t.halogenated_kg)}"
             f" · reaction residue {kg(t.residue_kg)}"
             + (f" (of which gas to the scrubber {kg(w.gas_kg)})" if w.gas_kg else "")]
    for sw in w.steps:
        if not sw.batches:
            continue
        c = sw.campaign
        parts = [f"{name} {kg(c.stream(name))}" for name in ("aqueous", "organic", "halogenated")
                 if c.stream(name)]
        parts.append(f"residue {kg(c.residue_kg)}")
        by = ", ".join(f"{b.material} {kg(b.mass_kg)}" for b in sw.by_products if b.mass_kg is not None)
        per = f"; per batch {kg(sw.per_batch.total_kg)}" if sw.per_batch is not None and sw.batches > 1 else ""
        lines.append(f"  {sw.step}: {', '.join(parts)}{per}" + (f"; by-products from the equation {by}" if by else ""))
        lines.append(f"    balance: inputs {kg(sw.inputs_kg)} = product taken on {kg(sw.product_kg)}"
                     f" + by-products {kg(sw.by_products_kg)} + the rest {kg(sw.waste_kg - sw.by_products_kg)}")
    lines.append(f"  mass balance: inputs {kg(w.inputs_kg)} = product {kg(w.product_kg)} + waste {kg(w.waste_kg)}")
    return lines


def cost_lines(plan: "Plan") -> list[str]:
    """The cost of goods as plain text lines (no markup); amounts of money to 4 significant
    figures (:func:`routeplan.views.numbers.money`)."""
    c = plan.cost_of_goods
    if c is None:
        return []
    if c.currency is None:
        return ["Cost of goods: not computed (the route gives no currency)"]
    cur = c.currency
    head = f"Cost of goods ({cur}, whole campaign; per kg of {plan.target_material} as delivered)"

    def amount(x):
        return "no price" if x is None else money(x)

    parts = " · ".join(f"{PART_NAMES[name]} {amount(p.amount)}" for name, p in c.parts.items())
    total = c.per_kg
    lines = [head, f"  {parts}"]
    if total is None:
        lines.append("  per kg: not computed (nothing is priced)")
    else:
        lines.append(f"  total {amount(c.total)} {cur}: {money(total)} {cur} per kg"
                     + ("" if c.complete else ", priced parts only"))
    for name in c.parts:
        gap = unpriced_text(plan, name)
        if gap:
            lines.append(f"  {PART_NAMES[name]}, no price for: {gap}")
    return lines
