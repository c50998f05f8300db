"""The planner: builds one complete, frozen Plan from a route and a target.

It calls, in this order, the backward walk (:mod:`routeplan.plan.walk`), batch sizing
(:mod:`routeplan.plan.campaign`), totals (:mod:`routeplan.plan.totals`), metrics
(:mod:`routeplan.plan.metrics`) and the stock comparison (:mod:`routeplan.plan.stock`),
and constructs the Plan once with every field final.  A new capability computed from a
plan (safety, record, uncertainty, schedule, waste) is one more call here.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.errors import Location, PlanError, Problem
from routeplan.plan.walk import YIELD_BASES, target_moles, walk_steps
from routeplan.units import unit

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import Plan
    from routeplan.route.model import Route

__all__ = ["plan_route"]


def plan_route(route: "Route", target: "pint.Quantity | str | None" = None, *, stock=None,
               yields: str = "expected", confidence: float | None = None, draws: int | None = None,
               seed: int | None = None) -> "Plan":
    """Plan a campaign: every charge of every step for a target mass.

    Parameters
    ----------
    route : Route
        A checked route from :func:`routeplan.load_route`.
    target : pint.Quantity or str, optional
        Mass to deliver as isolated [kg] (any mass unit, or a string such as
        ``"40 kg"``); default the route's ``target.amount``.
    stock : Mapping[str, pint.Quantity] or str or Path, optional
        Materials on hand [kg], or a stock file (YAML, CSV or xlsx); when given, the
        plan says the largest target the stock allows and what to buy.  Raw materials
        are as supplied; an intermediate (the product of an isolated step) is as
        isolated, at its assay, and is used first: the step that makes it is planned
        for the rest of the demand only (see :func:`walk_steps`).
    yields : {"expected", "low", "high"}
        Which yield of each step the walk uses; a step without a ``low`` or ``high``
        uses its expected yield.  Planning at the low yields sizes charges and purchases
        for a campaign in which every step does as badly as its range allows.
    confidence : float, optional
        With it, the step yields are drawn and the campaign run forward in every draw
        (:func:`routeplan.plan.uncertainty.yield_uncertainty`): the plan's
        ``uncertainty`` holds the spread of the delivery, its probability, and the target
        and purchases for this confidence [-] (e.g. 0.9).  Needs ``yields="expected"``.
    draws : int, optional
        Number of draws (default 100 000).
    seed : int, optional
        Seed of the draws (default 1).

    Returns
    -------
    Plan
        Frozen results, steps in execution order.

    Raises
    ------
    PlanError
        When the route cannot be planned (e.g. a non-positive target).
    """
    from routeplan.plan.model import Plan
    from routeplan.plan.totals import overall_yield, raw_material_totals
    from routeplan.units import parse_quantity

    if confidence is not None:
        from routeplan.plan.uncertainty import DEFAULT_DRAWS, DEFAULT_SEED, check_options

        draws = DEFAULT_DRAWS if draws is None else draws
        seed = DEFAULT_SEED if seed is None else seed
        check_options(confidence, draws, seed)
        if yields != "expected":
            raise PlanError(f"yield uncertainty is drawn around the plan at the expected yields, not the {yields} ones",
                            location=Location(key="--yields"), hint="leave out --yields with --confidence")
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

    on_hand, source, from_stock = None, None, None
    if stock is not None:
        from routeplan.inputs.stock import load_stock
        from routeplan.plan.stock import intermediate_stock

        on_hand, source = load_stock(route, stock)
        from_stock = intermediate_stock(route, on_hand) or None

    warnings: list[Problem] = list(route.warnings)
    n_target = target_moles(route, amount)
    steps = walk_steps(route, n_target, yields=yields, from_stock=from_stock)

    from routeplan.plan import campaign

    steps, batch_warnings = campaign.size_batches(route, steps)
    warnings.extend(batch_warnings)
    from routeplan.plan.safety import assess_safety

    steps, safety_warnings = assess_safety(route, steps)
    warnings.extend(safety_warnings)
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

        plan = replace(plan, stock=stock_plan(plan, on_hand, source=source))
    if confidence is not None:
        from routeplan.plan.uncertainty import yield_uncertainty

        plan = replace(plan, uncertainty=yield_uncertainty(plan, confidence=confidence, draws=draws, seed=seed))
    return plan


