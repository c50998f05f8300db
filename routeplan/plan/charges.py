"""The step plans: the walk's numbers and the batches, laid into frozen StepPlans.

The arithmetic of each charge is :func:`routeplan.plan.core.charge_amounts` (the route
format's step 3); this module only places its numbers, those of the batch sizing
(:mod:`routeplan.plan.campaign`), the heat and gas of one batch
(:func:`routeplan.plan.safety.batch_safety`) and the route's names into
:class:`StepPlan` and :class:`ChargePlan`, once.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable, Mapping

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.campaign import Sized
    from routeplan.plan.model import StepPlan
    from routeplan.plan.walk import Walked
    from routeplan.route.model import Route

__all__ = ["step_plans"]


def step_plans(route: "Route", walked: "Walked", sized: Mapping[str, "Sized"],
               safety: "Callable | None" = None) -> "tuple[StepPlan, ...]":
    """Every step's plan, in execution order, complete with its batches (and its safety).

    Parameters
    ----------
    route : Route
        The route.
    walked : Walked
        The backward walk (:func:`routeplan.plan.walk.walk_route`).
    sized : Mapping[str, Sized]
        Volumes and batches (:func:`routeplan.plan.campaign.size_steps`).
    safety : callable, optional
        ``safety(step_id, runs, batch, charges)`` gives the step's heat and gas of one
        batch (:func:`routeplan.plan.safety.batch_safety`), so that each StepPlan is
        built once, with it; without it ``safety`` is None.
    """
    from routeplan.plan.model import BatchPlan, ChargePlan, StepPlan

    materials = route.materials
    out = []
    for sid, w in walked.steps.items():
        step = route.step(sid)
        z = sized[sid]
        batches = z.batches
        lines = []
        for order, (c, cc, (n, m, _V), V) in enumerate(zip(step.charges, w.step.charges, w.charges, z.lines_V), 1):
            key = c.material
            # every field in ChargePlan's order (a 15-field keyword call binds at a third of the cost again):
            # order, material, name, role, basis, basis_value, equiv, n_mol, m_kg, V_L (a line carried in
            # solution: the volume of mixture carried in), intermediate, implicit, carried_from, batches, leaves
            lines.append(ChargePlan(order, key, materials[key].name, c.role, c.basis, c.value, c.equiv, n, m, V,
                                    cc.intermediate, c.implicit, cc.carried_from, batches, c.leaves))
        m_prod = w.n_product * w.step.product_form.kg_per_mol  # as isolated, at its assay [kg]
        # BatchPlan's fields in order: batches, step_V_L, fill_fraction, vessel, limiting_n_mol,
        # limiting_m_kg, product_n_mol, product_m_kg, reaction_m_kg, transfer_V_L, transfer_m_kg
        batch = BatchPlan(batches, z.V_L, z.fill, step.vessel, w.n_lim, w.m_lim, w.n_product, m_prod,
                          z.reaction_m_kg, z.transfer_V_L, z.transfer_m_kg)
        stock_n = w.n_taken
        not_run = walked.not_run.get(sid)
        lines = tuple(lines)
        # StepPlan's fields in order: id, name, equation, limiting, limiting_n_mol, limiting_m_kg, product,
        # product_n_mol, product_m_kg, yield_, isolated, charges, batch, vessel, notes, stock_n_mol,
        # stock_m_kg, not_run, safety
        out.append(StepPlan(
            sid, step.name, step.equation_text, step.limiting, w.n_lim, w.m_lim, step.product,
            w.n_product, m_prod, w.step.yield_, step.isolated, lines, batch, step.vessel, step.notes, stock_n,
            None if stock_n is None else stock_n * w.step.product_form.kg_per_mol, not_run,
            None if safety is None else safety(sid, not_run is None, batch, lines)))
    return tuple(out)
