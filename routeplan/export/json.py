"""The plan as JSON: the ``routeplan-plan/1`` contract of ROUTE-FORMAT.md.

Only reads the Plan; numbers are written in mol, kg and L as plain floats.  Documented
keys keep their meaning; extra keys (batches, metrics, stock, warnings) are additions.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any

from routeplan.units import magnitude

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["plan_to_dict", "plan_to_json", "uncertainty_to_dict"]


def _per(value: float | None, batches: int) -> float | None:
    """``value`` per batch; None for a step of no batches (it does not run)."""
    return None if value is None or batches == 0 else value / batches


def _charge(c, batches: int) -> dict[str, Any]:
    return {
        "material": c.material,
        "role": c.role,
        "equiv": c.equiv,
        "mol": magnitude(c.mol, "mol"),
        "mass_kg": magnitude(c.mass, "kg"),
        "volume_L": magnitude(c.volume, "L"),
        "basis": c.basis,
        "basis_value": c.basis_value,
        "intermediate": c.intermediate,
        "carried_from": c.carried_from,
        "leaves": c.leaves,
        "per_batch": {
            "mol": _per(magnitude(c.mol, "mol"), batches),
            "mass_kg": _per(magnitude(c.mass, "kg"), batches),
            "volume_L": _per(magnitude(c.volume, "L"), batches),
        },
    }


def _safety(sp) -> dict[str, Any] | None:
    """The step's ``safety`` block (ROUTE-FORMAT.md, "JSON additions per step"), plus
    ``screened``, ``dosed``, ``free_volume_L`` and the temperatures the MTSR was judged
    against."""
    s = sp.safety
    if s is None:
        return None
    t = s.thermal
    return {
        "gas_evolved": [{"material": g.material, "mol_per_batch": g.mol_per_batch,
                         "volume_L_per_batch": g.volume_L_per_batch, "temperature_C": g.temperature_C,
                         "pressure_bar": g.pressure_bar, "rate_L_per_min": g.rate_L_per_min,
                         "vent": list(g.vent)} for g in s.gas_evolved],
        "gas_taken_up": [{"material": g.material, "mol_per_batch": g.mol_per_batch,
                          "normal_volume_L_per_batch": g.normal_volume_L_per_batch, "vent": list(g.vent)}
                         for g in s.gas_taken_up],
        "thermal": None if t is None else {
            "reaction_mass_kg_per_batch": t.reaction_mass_kg_per_batch, "delta_T_ad_K": t.delta_T_ad_K,
            "mtsr_C": t.mtsr_C, "criticality_class": t.criticality_class, "severity": t.severity,
            "process_temperature_C": t.process_temperature_C, "mtt_C": t.mtt_C, "td24_C": t.td24_C,
            "accumulation": t.accumulation,
        },
        "screened": s.screened,
        "dosed": s.dosed,
        "dosing_time_min": s.dosing_time_min,
        "free_volume_L": s.free_volume_L,
    }


def _step(sp) -> dict[str, Any]:
    b = sp.batch
    batches = sp.batches
    out = {
        "id": sp.id,
        "name": sp.name,
        "equation": sp.equation,
        "limiting": sp.limiting,
        "product": {"material": sp.product, "mol": magnitude(sp.product_mol, "mol"),
                    "mass_kg": magnitude(sp.product_mass, "kg")},
        "yield": sp.yield_,
        "isolated": sp.isolated,
        "vessel": sp.vessel,
        "batches": batches,
        "batch_volume_L": None if b is None else magnitude(b.batch_volume, "L"),
        "fill_fraction": None if b is None else b.fill_fraction,
        "transfer_volume_L": None if b is None else magnitude(b.transfer_volume, "L"),
        "transfer_mass_kg": None if b is None else magnitude(b.transfer_mass, "kg"),
        "charges": [_charge(c, batches) for c in sp.charges],
        "from_stock_mol": magnitude(sp.from_stock_mol, "mol"),
        "from_stock_kg": magnitude(sp.from_stock_mass, "kg"),
        "runs": sp.runs,
        "not_run": sp.not_run,
        "safety": _safety(sp),
    }
    return out


def plan_to_dict(plan: "Plan") -> dict[str, Any]:
    """The plan as plain Python values following the JSON contract."""
    from routeplan import CAUTION, __version__

    route = plan.route
    out: dict[str, Any] = {
        "format": "routeplan-plan/1",
        "route": route.name,
        "target": {"material": plan.target_material, "mass_kg": magnitude(plan.target_mass, "kg"),
                   "mol": magnitude(plan.target_mol, "mol")},
        "steps": [_step(sp) for sp in plan.steps],
        "raw_materials": [
            {"material": r.material, "mass_kg": magnitude(r.mass, "kg"), "volume_L": magnitude(r.volume, "L"),
             "mol": magnitude(r.mol, "mol"), "cost": r.cost, "steps": list(r.steps), **_buying(r)}
            for r in plan.raw_materials
        ],
        "overall_yield": {
            "longest_linear_sequence": list(plan.overall_yield.longest_linear_sequence),
            "yield": plan.overall_yield.yield_,
            "low": plan.overall_yield.low,
            "high": plan.overall_yield.high,
            "by_raw_material": dict(plan.overall_yield.by_raw_material),
        },
        "yield_basis": plan.yield_basis,
        "currency": route.currency,
        "warnings": [p.render() for p in plan.warnings],
        "caution": CAUTION,
        "generator": f"routeplan {__version__}",
    }
    if route.source is not None:
        out["source"] = {"file": route.source.path, "sha256": route.source.sha256}
    if plan.metrics is not None:
        out["metrics"] = plan.metrics.to_dict()
    from routeplan.export.json_time_waste import time_waste_dict

    out.update(time_waste_dict(plan))  # schedule, waste, cost of goods
    if plan.stock is not None:
        from routeplan.views.sheet_rows import not_in_stock

        s = plan.stock
        out["stock"] = {
            "max_target_kg": magnitude(s.max_target, "kg"),
            "limited_by": s.limited_by,
            "to_buy": [{"material": k, "mass_kg": magnitude(m, "kg")} for k, m in s.to_buy],
            "on_hand": [{"material": k, "mass_kg": magnitude(m, "kg")} for k, m in s.on_hand.items()],
            "not_in_stock": not_in_stock(plan),
            "intermediates": [
                {"material": sp.product, "step": sp.id, "on_hand_kg": magnitude(s.on_hand[sp.product], "kg"),
                 "taken_kg": magnitude(sp.from_stock_mass, "kg"), "taken_mol": magnitude(sp.from_stock_mol, "mol"),
                 "runs": sp.runs}
                for sp in plan.steps if sp.from_stock_mol is not None and sp.product in s.on_hand
            ],
            "file": s.source,
        }
    if plan.record is not None:
        out["record"] = _record(plan.record)
    if plan.uncertainty is not None:
        out["uncertainty"] = uncertainty_to_dict(plan.uncertainty)
    if plan.derivation is not None:
        from routeplan.views.derivation_text import charge_derivations

        for sp, step_out in zip(plan.steps, out["steps"]):
            for charge_out, rows in zip(step_out["charges"], charge_derivations(plan, sp.id)):
                charge_out["derivation"] = rows
    return out


def _record(rec) -> dict[str, Any]:
    """The ``record`` block: the contract's keys first, then additions."""
    return {
        "lots": [{"step": r.step, "batch": r.batch, "mass_kg": r.mass_kg, "mol": r.mol, "yield": r.yield_,
                  "expected_yield": r.expected_yield, "lot": r.lot, "charged_kg": r.charged_kg,
                  "limiting_mol": r.limiting_mol, "assay": r.assay, "low_yield": r.low, "flagged": r.flagged}
                 for r in rec.lots],
        "in_hand": [{"material": h.material, "mass_kg": h.mass_kg, "mol": h.mol, "step": h.step,
                     "made_mol": h.made_mol, "consumed_mol": h.consumed_mol, "lot_assay": h.lot_assay,
                     "lots": list(h.lots)}
                    for h in rec.in_hand],
        "projected_target_kg": rec.projected_target_kg,
        "required_target_kg": rec.required_target_kg,
        "gap_kg": rec.gap_kg,
        "delivered_kg": rec.delivered_kg,
        "closes": [{"step": sid, "batches": b} for sid, b in rec.closes],
        "remaining": [{"step": sid, "batches": b} for sid, b in rec.remaining],
        "done": list(rec.done),
        "not_counted": list(rec.not_counted),
        "record_yields": rec.record_yields,
        "actual_yields": dict(rec.actual_yields),
        "projection_yield_basis": rec.yield_basis,
        "file": rec.source,
    }


def uncertainty_to_dict(u) -> dict[str, Any]:
    """The ``uncertainty`` block of the route format's "Yield uncertainty", plus
    ``contributions``, ``contribution_method``, ``ranged_steps`` and ``notes``."""
    from routeplan.plan.uncertainty import CONTRIBUTION_METHOD
    from routeplan.views.uncertainty_text import uncertainty_notes

    return {
        "draws": u.draws,
        "seed": u.seed,
        "distribution": u.distribution,
        "delivered_kg": {"p10": u.p10_kg, "p50": u.p50_kg, "p90": u.p90_kg, "mean": u.mean_kg},
        "probability_of_target": u.probability_of_target,
        "for_confidence": {
            "confidence": u.confidence,
            "target_kg": u.target_kg,
            "raw_materials": [{"material": k, "mass_kg": kg} for k, kg in u.raw_materials],
        },
        "contributions": [{"step": sid, "share": share} for sid, share in u.contributions],
        "contribution_method": CONTRIBUTION_METHOD,
        "ranged_steps": list(u.ranged_steps),
        "notes": uncertainty_notes(u),
    }


def plan_to_json(plan: "Plan", *, indent: int = 2) -> str:
    """The plan as a JSON text (UTF-8, no NaN)."""
    return json.dumps(plan_to_dict(plan), indent=indent, ensure_ascii=False, allow_nan=False) + "\n"


def _buying(r) -> dict[str, Any]:
    """The buying keys of a raw material: ``bought``, ``stock_kg`` (what the stock gives,
    null without a stock list naming it), ``to_buy`` (``{"mass_kg", "volume_L"}``: the
    need less the stock), ``pack`` (``{"mass_kg": ...}`` or ``{"volume_L": ...}``, null
    without one), ``packs`` [-] (covering ``to_buy``) and ``ordered`` (the same form as
    ``pack``)."""

    def size(q):
        if q is None:
            return None
        return {"mass_kg": magnitude(q, "kg")} if q.check("[mass]") else {"volume_L": magnitude(q, "L")}

    return {"bought": r.bought, "stock_kg": r.stock_m_kg, "to_buy": {"mass_kg": r.buy_m_kg, "volume_L": r.buy_V_L},
            "pack": size(r.pack), "packs": r.packs, "ordered": size(r.ordered)}
