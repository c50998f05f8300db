"""The planner: builds one complete, frozen Plan from a route and a target.

In this order it calls the backward walk (:mod:`routeplan.plan.walk`, numbers from
:mod:`routeplan.plan.core`), the batch sizing (:mod:`routeplan.plan.campaign`), the step
plans (:mod:`routeplan.plan.charges`, each with its heat and gas of one batch,
:mod:`routeplan.plan.safety`), the totals (:mod:`routeplan.plan.totals`), the metrics
(:mod:`routeplan.plan.metrics`) and the stock comparison (:mod:`routeplan.plan.stock`),
and constructs the Plan once, with every field final.  A new capability computed from a
plan (record, uncertainty, schedule, waste) is one more call here, on the draft, before
the Plan is built.
"""

from __future__ import annotations

import functools
from typing import TYPE_CHECKING, Mapping

from routeplan.collector import paused
from routeplan.errors import Location, PlanError, Problem
from routeplan.frozen import frozen
from routeplan.plan.walk import YIELD_BASES, walk_route

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import OverallYield, Plan, RawMaterialTotal, StepPlan
    from routeplan.route.model import Route

__all__ = ["plan_route", "Draft"]


@frozen(eq=False)
class Draft:
    """What the planner knows before the Plan is built: what the metrics, the stock and
    every later computation read (the same names as on :class:`Plan`)."""

    route: "Route"
    target_material: str
    target_kg: float
    target_n_mol: float
    steps: "tuple[StepPlan, ...]"
    raw_materials: "tuple[RawMaterialTotal, ...]"
    overall_yield: "OverallYield"
    yield_basis: str

    @functools.cached_property
    def _by_product(self) -> Mapping[str, "StepPlan"]:
        return {s.product: s for s in self.steps}

    def step_making(self, material: str) -> "StepPlan | None":
        """The plan of the step whose main product is ``material``, or None."""
        return self._by_product.get(material) if material in self.route.maker else None

    @property
    def target_mass(self) -> "pint.Quantity":
        """Mass delivered with overage [kg]."""
        from routeplan.units import Q, unit

        return Q(self.target_kg, unit("kg"))

    @property
    def asked_kg(self) -> float:
        """Mass asked for, before the overage [kg]: :attr:`Plan.asked_kg`, read from its one home."""
        from routeplan.plan.model import Plan

        return Plan.asked_kg.fget(self)


def _amount_kg(route: "Route", target) -> float:
    """The target amount before overage [kg], from a Quantity, a string or the route."""
    from routeplan.units import parse_quantity, unit

    if target is None:
        amount = route.target.amount
    elif isinstance(target, str):
        amount = parse_quantity(target, "mass")
    else:
        amount = target
    value = float(amount.m_as(unit("kg")))
    if not value > 0:
        raise PlanError(f"the target mass must be positive, got {amount:~P}",
                        hint="give a mass such as '25 kg'")
    return value


@paused()
def plan_route(route: "Route", target: "pint.Quantity | str | None" = None, *, stock=None,
               yields: str = "expected", confidence: float | None = None, draws: int | None = None,
               seed: int | None = None, record=None, record_yields: str = "expected",
               explain: bool = False) -> "Plan":
    """Plan a campaign: every charge of every step for a target mass.

    Parameters
    ----------
    route : Route
        A checked route from :func:`routeplan.load_route`.
    target : pint.Quantity or str, optional
        Mass to deliver as isolated [kg] (any mass unit, or a string such as
        ``"40 kg"``); default the route's ``target.amount``.
    stock : Mapping[str, pint.Quantity] or str or Path, optional
        Materials on hand [kg], or a stock file (YAML, CSV or xlsx, read by
        :mod:`routeplan.inputs.stock`); when given, the plan says the largest target the
        stock allows and what to buy.  Raw materials are as supplied; an intermediate
        (the product of an isolated step) is as isolated, at its assay, and is used
        first: the step that makes it is planned for the rest of the demand only.
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
    record : str or Path or Record, optional
        A campaign record (YAML, CSV or xlsx; :mod:`routeplan.inputs.record`): the lots
        made so far.  The plan is then the rest of the campaign, what is in hand used
        first (like an intermediate in stock, and added to one), and ``Plan.record``
        holds the lots' actual yields, what is in hand and the projected target
        (:mod:`routeplan.plan.record`).
    record_yields : {"expected", "actual"}
        With a record, the yield at which the remaining batches of a step with lots are
        planned: the route's, or the assay-corrected mean of its recorded lots.
    explain : bool
        With it, the plan's ``derivation`` holds the chain of factors of every amount
        (:func:`routeplan.plan.derivation.derive`: the same core, run on recording numbers).

    Returns
    -------
    Plan
        Frozen and complete, steps in execution order.

    Raises
    ------
    PlanError
        When the route cannot be planned (e.g. a non-positive target).
    """
    from routeplan.plan import guards
    from routeplan.plan.campaign import size_steps
    from routeplan.plan.charges import step_plans
    from routeplan.plan.metrics import compute_metrics
    from routeplan.plan.safety import batch_safety
    from routeplan.plan.safety import safety_warnings as safety_warnings_of
    from routeplan.plan.model import Plan
    from routeplan.plan.purchase import with_packs
    from routeplan.plan.totals import overall_yield, raw_material_totals
    from routeplan.units import unit

    if confidence is not None:
        from routeplan.plan.uncertainty import DEFAULT_DRAWS, DEFAULT_SEED, check_options

        draws = DEFAULT_DRAWS if draws is None else draws
        seed = DEFAULT_SEED if seed is None else seed
        check_options(confidence, draws, seed)
        if yields != "expected":
            raise PlanError(f"yield uncertainty is drawn around the plan at the expected yields, not the {yields} ones",
                            location=Location(key="--yields"), hint="leave out --yields with --confidence")
    if confidence is not None and record is not None:
        raise PlanError("yield draws are not run on the rest of a recorded campaign: they would start from the "
                        "planned charges, not from what is in hand", location=Location(key="--confidence"),
                        hint="use --confidence on the plan without --record, or --record without --confidence")
    if yields not in YIELD_BASES:
        raise PlanError(f"unknown yield basis '{yields}'", hint="use expected, low or high")
    amount_kg = _amount_kg(route, target)
    guards.check_target(amount_kg, route.target.overage, route.target.location)
    on_hand, source, shelf_kg, raw_on_hand = None, None, None, None
    if stock is not None:
        from routeplan.inputs.stock import load_stock
        from routeplan.plan.stock import intermediate_stock

        on_hand, source = load_stock(route, stock)
        shelf = intermediate_stock(route, on_hand)
        shelf_kg = {k: float(v.m_as(unit("kg"))) for k, v in shelf.items()} or None
        raw_on_hand = {k: float(v.m_as(unit("kg"))) for k, v in on_hand.items() if k not in shelf}

    account, shelf_kg, yield_of = _record_inputs(route, record, shelf_kg, yields, record_yields)
    shelf_name = "the stock" if account is None else "what is in hand" if stock is None else "the stock and what is in hand"
    walked = walk_route(route, amount_kg, yields=yields, shelf_kg=shelf_kg, yield_of=yield_of, shelf_name=shelf_name)
    guards.check_amounts(route, walked)
    no_range = guards.steps_without_range(route, yields)
    sized, batch_warnings = size_steps(route, walked)
    steps = step_plans(route, walked, sized,
                       safety=lambda sid, runs, batch, lines: batch_safety(route, sid, runs, batch, lines))
    safety_warnings = safety_warnings_of(route, steps)
    draft = Draft(route=route, target_material=route.target.material,
                  target_kg=amount_kg * (1 + route.target.overage), target_n_mol=walked.n_target_mol,
                  steps=steps, raw_materials=with_packs(route, raw_material_totals(route, steps), raw_on_hand),
                  overall_yield=overall_yield(route, steps, walked.n_target_mol), yield_basis=yields)
    warnings: list[Problem] = [*route.warnings, *batch_warnings, *safety_warnings,
                               *(() if account is None else account.warnings)]
    if no_range:
        warnings.append(guards.range_warning(route, yields, no_range))
    stock_plan = None
    if stock is not None:
        from routeplan.plan.stock import stock_plan as compare_stock

        stock_plan = compare_stock(draft, on_hand, source=source)
    from routeplan.plan.cost_of_goods import schedule_waste_cost

    schedule, waste, cost_of_goods, waste_warnings = schedule_waste_cost(draft)
    warnings.extend(waste_warnings)
    uncertainty = None
    if confidence is not None:
        from routeplan.plan.uncertainty import yield_uncertainty

        uncertainty = yield_uncertainty(draft, confidence=confidence, draws=draws, seed=seed)
    record_plan = None
    if account is not None:
        from routeplan.plan.record import record_plan as plan_record

        record_plan = plan_record(draft, account, amount_kg=amount_kg, stock=stock_plan)
    derivation = None
    if explain:
        from routeplan.plan.derivation import derive

        derivation = derive(route, amount_kg, yields=yields, shelf_kg=shelf_kg,
                            target_source=None if target is None else "--target",
                            stock_source=None if source is None else str(source), yield_of=yield_of,
                            record=record)
    return Plan(
        route=route, target_material=draft.target_material, target_kg=draft.target_kg,
        target_n_mol=draft.target_n_mol, steps=steps, raw_materials=draft.raw_materials,
        overall_yield=draft.overall_yield, metrics=compute_metrics(draft),
        warnings=tuple(warnings), stock=stock_plan, yield_basis=yields, uncertainty=uncertainty,
        yields_without_range=no_range,
        schedule=schedule, waste=waste, cost_of_goods=cost_of_goods,
        record=record_plan,
        derivation=derivation,
    )


def _record_inputs(route: "Route", record, shelf_kg, yields: str, record_yields: str):
    """A campaign record worked out (or None), the shelf the walk takes first (stock
    intermediates plus what the record has in hand, and the target delivered [kg]) and
    the yields of the steps with lots (None at the route's)."""
    if record is None:
        return None, shelf_kg, None
    from routeplan.inputs.record import load_record
    from routeplan.plan.record import account_record

    account = account_record(route, load_record(route, record), yields=yields, record_yields=record_yields)
    shelf = dict(shelf_kg or {})
    for key, kg in account.shelf_kg(route.target.material).items():
        shelf[key] = shelf.get(key, 0.0) + kg
    return account, (shelf or None), account.yields_for_walk()
