"""The backward walk: from the target mass to every charge of every step.

The method is the one of the route format ("How the plan is computed"):

1. the target step must make ``n = amount * (1 + overage) * assay / M`` mol of target;
2. in reverse execution order, a step whose product is demanded at ``n_p`` mol needs
   ``n_lim = n_p / (yield * nu_product / nu_limiting)`` mol of limiting reagent, and
   demands on an intermediate from several steps add up;
3. each charge follows from its basis (:mod:`routeplan.plan.charges`);
4. a charged intermediate is not bought: its moles become the demand on its maker.

Quantities are pint quantities in mol, kg and L throughout.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.units import unit
from routeplan.errors import PlanError, Problem

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import Plan
    from routeplan.route.model import Route

__all__ = ["plan_route", "target_moles", "YIELD_BASES"]


def target_moles(route: "Route", amount: "pint.Quantity") -> "pint.Quantity":
    """Moles of pure target the final step must make [mol].

    ``n = amount * (1 + overage) * assay / M`` with ``amount`` the mass as isolated
    [kg], ``overage`` [-], ``assay`` [-] and ``M`` the molar mass [g/mol].
    """
    tgt = route.materials[route.target.material]
    if tgt.molar_mass is None:  # the loader forbids this; kept as a guard
        raise PlanError(f"target '{tgt.key}' has no molar mass")
    n = amount * (1 + route.target.overage) * tgt.assay / tgt.molar_mass
    return n.to(unit("mol"))


#: Which of each step's yields the walk uses.
YIELD_BASES = ("expected", "low", "high")


def plan_route(route: "Route", target: "pint.Quantity | str | None" = None, *, stock=None,
               yields: str = "expected") -> "Plan":
    """Plan a campaign: every charge of every step for a target mass.

    Parameters
    ----------
    route : Route
        A checked route from :func:`routeplan.load_route`.
    target : pint.Quantity or str, optional
        Mass to deliver as isolated [kg] (any mass unit, or a string such as
        ``"40 kg"``); default the route's ``target.amount``.
    stock : Mapping[str, pint.Quantity] or str or Path, optional
        Raw materials on hand [kg], or a stock file (YAML, CSV or xlsx); when given, the
        plan says the largest target the stock allows and what to buy.
    yields : {"expected", "low", "high"}
        Which yield of each step the walk uses; a step without a ``low`` or ``high``
        uses its expected yield.  Planning at the low yields sizes charges and purchases
        for a campaign in which every step does as badly as its range allows.

    Returns
    -------
    Plan
        Frozen results, steps in execution order.

    Raises
    ------
    PlanError
        When the route cannot be planned (e.g. a non-positive target).
    """
    from routeplan.plan.charges import compute_step
    from routeplan.plan.model import Plan, StepPlan
    from routeplan.plan.totals import overall_yield, raw_material_totals
    from routeplan.route.graph import execution_order
    from routeplan.units import Q, parse_quantity

    if yields not in YIELD_BASES:
        raise PlanError(f"unknown yield basis '{yields}'", hint="use expected, low or high")
    if target is None:
        amount = route.target.amount
    elif isinstance(target, str):
        amount = parse_quantity(target, "mass")
    else:
        amount = target
    amount = amount.to(unit("kg"))
    if not amount.magnitude > 0:
        raise PlanError(f"the target mass must be positive, got {amount:~P}",
                        hint="give a mass such as '25 kg'")

    warnings: list[Problem] = list(route.warnings)
    n_target = target_moles(route, amount)
    demand: dict[str, "pint.Quantity"] = {route.target.material: n_target}
    order = execution_order(route)
    planned: dict[str, StepPlan] = {}
    zero = Q(0.0, "mol")
    for sid in reversed(order):
        step = route.step(sid)
        n_p = demand.get(step.product)
        if n_p is None:
            # a step that does not lead to the target: the loader has warned already
            n_p = zero
        sp = compute_step(route, step, n_p, yields=yields)
        planned[sid] = sp
        for c in sp.charges:
            if c.intermediate and c.mol is not None:
                demand[c.material] = demand.get(c.material, zero) + c.mol
    steps = tuple(planned[sid] for sid in order)

    from routeplan.plan import campaign

    steps, batch_warnings = campaign.size_batches(route, steps)
    warnings.extend(batch_warnings)
    raws = raw_material_totals(route, steps)
    plan = Plan(
        route=route,
        target_material=route.target.material,
        target_mass=(amount * (1 + route.target.overage)).to(unit("kg")),
        target_mol=n_target,
        steps=steps,
        raw_materials=raws,
        overall_yield=overall_yield(route, steps, n_target),
        warnings=tuple(warnings),
        yield_basis=yields,
    )
    from dataclasses import replace

    from routeplan.plan.metrics import compute_metrics

    plan = replace(plan, metrics=compute_metrics(plan))
    if stock is not None:
        from routeplan.plan.stock import stock_plan

        plan = replace(plan, stock=stock_plan(plan, stock))
    return plan
