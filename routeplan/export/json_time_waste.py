"""The ``schedule``, ``waste`` and ``cost_of_goods`` keys of the plan JSON.

The keys named in ROUTE-FORMAT.md ("Time, plant and waste") keep the contract's meaning;
the others are additions:

* ``schedule``: ``campaign_h`` and per step ``id``, ``vessel``, ``start_h``, ``end_h``
  (contract), plus ``ready_h``, ``cycle_time_h``, ``own_vessel`` and ``batches``
  (``[{batch, start_h, end_h}]``); ``vessels`` (busy hours and idle gaps), ``pace_step``
  and ``critical_chain``.  Null unless every step has a ``cycle_time``; then
  ``schedule_missing_cycle_time`` lists the steps without one (empty otherwise).
* ``waste``: ``aqueous_kg``, ``organic_kg``, ``halogenated_kg``, ``residue_kg``
  (contract), plus ``gas_kg`` (by-products leaving as gas, part of the residue),
  ``inputs_kg``, ``product_kg``, ``waste_kg`` and ``steps`` (per step, over the
  campaign and per batch, with the by-products from the equation and ``separated_kg``
  and ``separated_materials``: the charges that left the vessel right after they were
  charged, ``leaves: true``, part of the streams).
* ``cost_of_goods``: ``raw_materials``, ``plant``, ``waste``, ``per_kg`` (contract, in
  ``currency``), plus ``currency``, ``unpriced`` (per part, what has no price) and
  ``per_kg_by_part``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["time_waste_dict", "schedule_dict", "waste_dict", "cost_of_goods_dict"]


def schedule_dict(plan: "Plan") -> dict[str, Any] | None:
    """The ``schedule`` key: None unless every step has a cycle time."""
    s = plan.schedule
    if s is None:
        return None
    return {
        "campaign_h": s.campaign_h,
        "steps": [{"id": st.id, "vessel": st.vessel, "start_h": st.start_h, "end_h": st.end_h,
                   "ready_h": st.ready_h, "cycle_time_h": st.cycle_time_h, "own_vessel": st.vessel is None,
                   "batches": [{"batch": b.batch, "start_h": b.start_h, "end_h": b.end_h} for b in st.batches]}
                  for st in s.steps],
        "vessels": [{"vessel": v.vessel, "steps": list(v.steps), "busy_h": v.busy_h,
                     "first_start_h": v.first_start_h, "last_end_h": v.last_end_h,
                     "idle": [{"start_h": a, "end_h": b} for a, b in v.idle], "idle_h": v.idle_h}
                    for v in s.vessels],
        "pace_step": s.pace_step,
        "critical_chain": list(s.critical_chain),
    }


def _streams(m) -> dict[str, float]:
    return {"aqueous_kg": m.aqueous_kg, "organic_kg": m.organic_kg, "halogenated_kg": m.halogenated_kg,
            "residue_kg": m.residue_kg}


def waste_dict(plan: "Plan") -> dict[str, Any] | None:
    """The ``waste`` key [kg]."""
    w = plan.waste
    if w is None:
        return None
    return {
        **_streams(w.total),
        "gas_kg": w.gas_kg,
        "inputs_kg": w.inputs_kg,
        "product_kg": w.product_kg,
        "waste_kg": w.waste_kg,
        "steps": [{"step": sw.step, "batches": sw.batches, "inputs_kg": sw.inputs_kg,
                   "product_kg": sw.product_kg, "waste_kg": sw.waste_kg, **_streams(sw.campaign),
                   "gas_kg": sw.gas_kg,
                   "separated_kg": sw.separated_kg,
                   "separated_materials": list(sw.separated_materials),
                   "per_batch": None if sw.per_batch is None else _streams(sw.per_batch),
                   "stream_materials": {k: list(v) for k, v in sw.stream_materials.items()},
                   "by_products": [{"material": b.material, "mol": b.mol, "mass_kg": b.mass_kg, "gas": b.gas}
                                   for b in sw.by_products],
                   "by_products_kg": sw.by_products_kg}
                  for sw in w.steps],
    }


def cost_of_goods_dict(plan: "Plan") -> dict[str, Any] | None:
    """The ``cost_of_goods`` key [currency], [currency/kg]."""
    c = plan.cost_of_goods
    if c is None:
        return None
    return {
        "raw_materials": c.raw_materials.amount,
        "plant": c.plant.amount,
        "waste": c.waste.amount,
        "per_kg": c.per_kg,
        "currency": c.currency,
        "unpriced": {name: list(part.unpriced) for name, part in c.parts.items()},
        "per_kg_by_part": {name: c.part_per_kg(name) for name in c.parts},
    }


def time_waste_dict(plan: "Plan") -> dict[str, Any]:
    """Every key of this module, for :func:`routeplan.export.json.plan_to_dict`."""
    from routeplan.plan.schedule import steps_without_cycle_time

    return {
        "schedule": schedule_dict(plan),
        "schedule_missing_cycle_time": list(steps_without_cycle_time(plan.route)),
        "waste": waste_dict(plan),
        "cost_of_goods": cost_of_goods_dict(plan),
    }
