"""The step plans: the walk's numbers and the batches, laid into frozen StepPlans.

The arithmetic of each charge is :func:`routeplan.plan.core.charge_amounts` (the route
format's step 3); this module only places its numbers, those of the batch sizing
(:mod:`routeplan.plan.campaign`) and the route's names into :class:`StepPlan` and
:class:`ChargePlan`, once.
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
        for i, (c, cc, (n, m, _V), V) in enumerate(zip(step.charges, w.step.charges, w.charges, z.lines_V)):
            lines.append(ChargePlan(
                order=i + 1, material=c.material, name=materials[c.material].name, role=c.role,
                basis=c.basis, basis_value=c.value, equiv=c.equiv, n_mol=n, m_kg=m,
                V_L=V,  # a line carried in solution: the volume of mixture carried in
                intermediate=cc.intermediate, implicit=c.implicit,
                carried_from=cc.carried_from, batches=batches, leaves=c.leaves))
        m_prod = w.n_product * w.step.product_form.kg_per_mol  # as isolated, at its assay [kg]
        batch = BatchPlan(batches=batches, step_V_L=z.V_L, fill_fraction=z.fill, vessel=step.vessel,
                          limiting_n_mol=w.n_lim, limiting_m_kg=w.m_lim,
                          product_n_mol=w.n_product, product_m_kg=m_prod, reaction_m_kg=z.reaction_m_kg,
                          transfer_V_L=z.transfer_V_L, transfer_m_kg=z.transfer_m_kg)
        stock_n = w.n_taken
        not_run = walked.not_run.get(sid)
        lines = tuple(lines)
        out.append(StepPlan(
            id=sid, name=step.name, equation=step.equation_text, limiting=step.limiting,
            limiting_n_mol=w.n_lim, limiting_m_kg=w.m_lim, product=step.product,
            product_n_mol=w.n_product, product_m_kg=m_prod, yield_=w.step.yield_,
            isolated=step.isolated, charges=lines, batch=batch, vessel=step.vessel,
            notes=step.notes, stock_n_mol=stock_n,
            stock_m_kg=None if stock_n is None else stock_n * w.step.product_form.kg_per_mol,
            not_run=not_run,
            safety=None if safety is None else safety(sid, not_run is None, batch, lines)))
    return tuple(out)
