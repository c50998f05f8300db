"""Rows and sentences for a campaign record (``Plan.record``): terminal, CSV, workbook.

Reads :class:`routeplan.plan.record.RecordPlan` only; every number comes from it.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.numbers import pct
from routeplan.views.tables import Column, display_quantity

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["LOT_COLUMNS", "IN_HAND_COLUMNS", "lot_rows", "in_hand_rows", "record_lines", "yields_used_text",
           "lot_prefill"]

LOT_COLUMNS = (
    Column("step", "step"),
    Column("batch", "batch"),
    Column("lot", "lot number"),
    Column("charged_kg", "limiting reagent charged", "kg"),
    Column("limiting_mol", "limiting reagent", "mol"),
    Column("mass_kg", "product isolated", "kg"),
    Column("assay", "assay", "-"),
    Column("mol", "product", "mol"),
    Column("yield", "actual yield", "-"),
    Column("expected_yield", "expected yield", "-"),
    Column("low", "low yield", "-"),
    Column("flagged", "far below low"),
)

IN_HAND_COLUMNS = (
    Column("material", "material"),
    Column("step", "made in"),
    Column("lots", "lots"),
    Column("made_mol", "made", "mol"),
    Column("consumed_mol", "consumed by later lots", "mol"),
    Column("mol", "in hand", "mol"),
    Column("mass_kg", "in hand (at route assay)", "kg"),
    Column("lot_assay", "mean assay of its lots", "-"),
)


def lot_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per recorded lot: masses [kg], amounts [mol], yields and assay [-]."""
    return [{"step": r.step, "batch": r.batch, "lot": r.lot, "charged_kg": r.charged_kg,
             "limiting_mol": r.limiting_mol, "mass_kg": r.mass_kg, "assay": r.assay, "mol": r.mol,
             "yield": r.yield_, "expected_yield": r.expected_yield, "low": r.low, "flagged": r.flagged}
            for r in plan.record.lots]


def in_hand_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per intermediate that a lot makes or takes: amounts [mol], mass [kg]."""
    return [{"material": h.material, "step": h.step, "lots": ", ".join(str(b) for b in h.lots),
             "made_mol": h.made_mol, "consumed_mol": h.consumed_mol, "mol": h.mol, "mass_kg": h.mass_kg,
             "lot_assay": h.lot_assay}
            for h in plan.record.in_hand]


def yields_used_text(plan: "Plan") -> str:
    """Which yields the remaining batches of steps with lots are planned at."""
    rec = plan.record
    if rec.record_yields == "actual":
        parts = ", ".join(f"{sid} {pct(y)}" for sid, y in rec.actual_yields.items())
        return f"remaining batches of steps with lots planned at their actual yields ({parts}, mean of the lots)"
    return f"remaining batches planned at the route's {plan.yield_basis} yields"


def record_lines(plan: "Plan", units: "DisplayUnits | None" = None) -> list[str]:
    """Sentences about the record: lots, in hand, projection, gap and what closes it.

    ``units``: the plan's units (masses and amounts in them); default
    :func:`~routeplan.views.display_units.plan_units`.
    """
    from routeplan.views.display_units import plan_units

    rec = plan.record
    units = units or plan_units(plan)
    kg, mol = units.mass_text, units.amount_text

    lines = ["", f"Campaign record{f' ({rec.source})' if rec.source else ''}: {len(rec.lots)} "
             f"lot{'s' if len(rec.lots) != 1 else ''}; this plan is the rest of the campaign, "
             "what is in hand used first; " + yields_used_text(plan) + "."]
    for r in rec.lots:
        flag = "   FAR BELOW LOW" if r.flagged else ""
        name = f" (lot {r.lot})" if r.lot else ""
        lines.append(f"  {r.step} batch {r.batch}{name}: {kg(r.charged_kg)} charged -> {kg(r.mass_kg)} at "
                     f"{pct(r.assay)}; yield {pct(r.yield_)} (expected {pct(r.expected_yield)}"
                     + (f", low {pct(r.low)}" if r.low is not None else "") + f"){flag}")
    for h in rec.in_hand:
        lines.append(f"  in hand: {kg(h.mass_kg)} of {h.material} ({mol(h.mol)}; made "
                     f"{mol(h.made_mol)} in {h.step}, later lots took {mol(h.consumed_mol)})")
    if rec.delivered_kg > 0:
        lines.append(f"  delivered already: {kg(rec.delivered_kg)} of {plan.target_material}")
    tgt = plan.target_material
    if rec.projected_target_kg is None:
        lines.append(f"  Projected: no lot lies upstream of {tgt}, so what is in hand does not bound it.")
        return lines
    lines.append(f"  Projected target: {kg(rec.projected_target_kg)} of {tgt} (before overage, the number "
                 f"--target takes) if what is in hand goes on at the {rec.yield_basis} yields and steps "
                 f"{', '.join(rec.done)} do not run again; required {kg(rec.required_target_kg)}.")
    if rec.not_counted:
        lines.append(f"  not counted in the projection: {', '.join(rec.not_counted)} in hand (every step "
                     "taking it has lots); the re-plan takes it first.")
    if rec.gap_kg > 0 and rec.closes:
        what = ", ".join(f"{b} more batch{'es' if b != 1 else ''} of {sid}" for sid, b in rec.closes)
        lines.append(f"  Short by {kg(rec.gap_kg)}: closed by {what} (sized in the plan above).")
    elif rec.gap_kg > 0:
        lines.append(f"  Short by {kg(rec.gap_kg)}: the steps still to run close it.")
    else:
        lines.append(f"  Covered: what is in hand delivers {kg(-rec.gap_kg)} more than required.")
    still = ", ".join(f"{sid} ({b} batch{'es' if b != 1 else ''})" for sid, b in rec.remaining)
    lines.append(f"  Still to run: {still or 'nothing'}.")
    return lines


def lot_prefill(plan: "Plan", material: str) -> dict[str, Any] | None:
    """What a charge sheet fills in for an intermediate that the record has in hand.

    Returns ``{"lot": text naming the lots and the mass in hand, "assay": the lots'
    mean assay [-]}``, or None when nothing of ``material`` is in hand.
    """
    rec = plan.record
    if rec is None:
        return None
    h = next((h for h in rec.in_hand if h.material == material and h.mol > 0), None)
    if h is None:
        return None
    names = ", ".join(h.lot_names) if h.lot_names else ", ".join(str(b) for b in h.lots)
    word = "lots" if h.lot_names else ("batches" if len(h.lots) != 1 else "batch")
    return {"lot": f"in hand: {h.step} {word} {names}, {display_quantity(h.mass_kg, 'mass')}", "assay": h.lot_assay}


#: Columns of the lots table on the workbook's Summary sheet.
SUMMARY_LOT_COLUMNS = tuple(c for c in LOT_COLUMNS if c.key in (
    "step", "batch", "lot", "charged_kg", "mass_kg", "assay", "yield", "expected_yield", "flagged"))


def record_summary_rows(plan: "Plan") -> list[dict[str, Any]]:
    """The record as ``key``, ``item``, ``value``, ``unit``, ``kind``, ``note`` facts
    (Summary sheet): file, yields used, in hand [kg], projected and required target [kg],
    the gap [kg], what closes it and what is still to run."""
    rec = plan.record

    def fact(key, item, value, unit="", kind="text", note=""):
        return {"key": key, "item": item, "value": value, "unit": unit, "kind": kind, "note": note}

    rows = []
    if rec.source:
        from pathlib import Path

        rows.append(fact("record_file", "campaign record", Path(rec.source).name))
    rows.append(fact("record_yields", "yields of the rest", yields_used_text(plan)))
    for h in rec.in_hand:
        rows.append(fact("in_hand", f"{h.material} in hand", h.mass_kg, "kg", "mass",
                         f"made in {h.step} (batches {', '.join(str(b) for b in h.lots) or 'none'}), at the route's assay"))
    if rec.delivered_kg > 0:
        rows.append(fact("delivered", f"{plan.target_material} delivered already", rec.delivered_kg, "kg", "mass"))
    if rec.projected_target_kg is None:
        rows.append(fact("projected", "projected target", "not bounded: no lot lies upstream of the target"))
    else:
        rows.append(fact("projected", "projected target (before overage)", rec.projected_target_kg, "kg", "mass",
                         f"steps {', '.join(rec.done)} do not run again; the rest at the {rec.yield_basis} yields"))
        rows.append(fact("required", "required target (before overage)", rec.required_target_kg, "kg", "mass"))
        rows.append(fact("gap", "short by" if rec.gap_kg > 0 else "covered, with to spare",
                         abs(rec.gap_kg), "kg", "mass"))
    if rec.closes:
        rows.append(fact("closes", "closed by", ", ".join(f"{b} more batch{'es' if b != 1 else ''} of {sid}"
                                                          for sid, b in rec.closes)))
    rows.append(fact("remaining", "still to run", ", ".join(f"{sid} ({b})" for sid, b in rec.remaining) or "nothing",
                     note="step (batches); their charge sheets follow"))
    return rows
