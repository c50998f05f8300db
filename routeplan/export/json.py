"""The plan as JSON: the ``routeplan-plan/1`` contract of ROUTE-FORMAT.md.

Only reads the Plan; numbers are written in mol, kg and L as plain floats.  Documented
keys keep their meaning; extra keys (batches, metrics, stock, warnings) are additions.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["plan_to_dict", "plan_to_json"]


def _m(q, unit: str) -> float | None:
    return None if q is None else float(q.m_as(unit))


def _per(value: float | None, batches: int) -> float | None:
    """``value`` per batch; None for a step of no batches (it does not run)."""
    return None if value is None or batches == 0 else value / batches


def _charge(c, batches: int) -> dict[str, Any]:
    return {
        "material": c.material,
        "role": c.role,
        "equiv": c.equiv,
        "mol": _m(c.mol, "mol"),
        "mass_kg": _m(c.mass, "kg"),
        "volume_L": _m(c.volume, "L"),
        "basis": c.basis,
        "basis_value": c.basis_value,
        "intermediate": c.intermediate,
        "carried_from": c.carried_from,
        "per_batch": {
            "mol": _per(_m(c.mol, "mol"), batches),
            "mass_kg": _per(_m(c.mass, "kg"), batches),
            "volume_L": _per(_m(c.volume, "L"), batches),
        },
    }


def _step(sp) -> dict[str, Any]:
    b = sp.batch
    batches = sp.batches
    out = {
        "id": sp.id,
        "name": sp.name,
        "equation": sp.equation,
        "limiting": sp.limiting,
        "product": {"material": sp.product, "mol": _m(sp.product_mol, "mol"),
                    "mass_kg": _m(sp.product_mass, "kg")},
        "yield": sp.yield_,
        "isolated": sp.isolated,
        "vessel": sp.vessel,
        "batches": batches,
        "batch_volume_L": None if b is None else _m(b.batch_volume, "L"),
        "fill_fraction": None if b is None else b.fill_fraction,
        "charges": [_charge(c, batches) for c in sp.charges],
        "from_stock_mol": _m(sp.from_stock_mol, "mol"),
        "from_stock_kg": _m(sp.from_stock_mass, "kg"),
        "runs": sp.runs,
        "not_run": sp.not_run,
    }
    return out


def plan_to_dict(plan: "Plan") -> dict[str, Any]:
    """The plan as plain Python values following the JSON contract."""
    from routeplan import CAUTION, __version__

    route = plan.route
    out: dict[str, Any] = {
        "format": "routeplan-plan/1",
        "route": route.name,
        "target": {"material": plan.target_material, "mass_kg": _m(plan.target_mass, "kg"),
                   "mol": _m(plan.target_mol, "mol")},
        "steps": [_step(sp) for sp in plan.steps],
        "raw_materials": [
            {"material": r.material, "mass_kg": _m(r.mass, "kg"), "volume_L": _m(r.volume, "L"),
             "mol": _m(r.mol, "mol"), "cost": r.cost, "steps": list(r.steps)}
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
    if plan.stock is not None:
        s = plan.stock
        out["stock"] = {
            "max_target_kg": _m(s.max_target, "kg"),
            "limited_by": s.limited_by,
            "to_buy": [{"material": k, "mass_kg": _m(m, "kg")} for k, m in s.to_buy],
            "on_hand": [{"material": k, "mass_kg": _m(m, "kg")} for k, m in s.on_hand.items()],
            "not_in_stock": [r.material for r in plan.raw_materials if r.material not in s.on_hand],
            "intermediates": [
                {"material": sp.product, "step": sp.id, "on_hand_kg": _m(s.on_hand[sp.product], "kg"),
                 "taken_kg": _m(sp.from_stock_mass, "kg"), "taken_mol": _m(sp.from_stock_mol, "mol"),
                 "runs": sp.runs}
                for sp in plan.steps if sp.from_stock_mol is not None and sp.product in s.on_hand
            ],
            "file": s.source,
        }
    return out


def plan_to_json(plan: "Plan", *, indent: int = 2) -> str:
    """The plan as a JSON text (UTF-8, no NaN)."""
    return json.dumps(plan_to_dict(plan), indent=indent, ensure_ascii=False, allow_nan=False) + "\n"
