"""The backward walk of a route, as numbers: from the target mass to every charge.

The method is the one of the route format ("How the plan is computed"):

1. the target step must make ``n = amount * (1 + overage) * assay / M`` mol of target;
2. in reverse execution order, a step whose product is demanded at ``n_p`` mol needs
   ``n_lim = n_p / (yield * nu_product / nu_limiting)`` mol of limiting reagent, and
   demands on an intermediate from several steps add up;
3. each charge follows from its basis (:func:`routeplan.plan.core.charge_amounts`);
4. a charged intermediate is not bought: its moles become the demand on its maker;
5. an intermediate on the shelf is used first: the demand on its maker is reduced by the
   moles on hand (``mass * assay / M``), never below zero.

The arithmetic is :mod:`routeplan.plan.core`'s; this module adds which steps do not run
and the checks that every number is finite.  It is a leaf: it imports only the core.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Mapping

from routeplan.errors import PlanError
from routeplan.frozen import frozen
from routeplan.plan.core import CoreRoute, WalkStep, compile_route, target_amount, walk, with_yields

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.route.model import Route

__all__ = ["YIELD_BASES", "Walked", "walk_route", "shelf_moles"]

#: Which of each step's yields the walk uses.
YIELD_BASES = ("expected", "low", "high")


@frozen
class Walked:
    """The walk of a route for one target, in floats.

    Attributes
    ----------
    core : CoreRoute
        The compiled route.
    n_target_mol : float
        Moles of pure target to make [mol].
    steps : Mapping[str, WalkStep]
        Step id -> numbers, execution order.
    not_run : Mapping[str, str]
        Step id -> why it does not run (stock covers it, or it feeds only idle steps).
    """

    core: CoreRoute
    n_target_mol: float
    steps: Mapping[str, WalkStep]
    not_run: Mapping[str, str]


def shelf_moles(route: "Route", core: CoreRoute, shelf_kg: Mapping[str, float]) -> dict[str, float]:
    """Moles on the shelf of each intermediate [mol]: ``mass / (M / assay)``."""
    out = {}
    for key, m_kg in shelf_kg.items():
        maker = route.maker[key]
        out[key] = m_kg / core.step(maker).product_form.kg_per_mol  # [kg] / [kg/mol]
    return out


def walk_route(route: "Route", amount_kg: float, *, yields: str = "expected",
               shelf_kg: Mapping[str, float] | None = None,
               yield_of: Mapping[str, float] | None = None, shelf_name: str = "the stock") -> Walked:
    """Walk ``route`` backward for ``amount_kg`` [kg] of target as isolated, before overage.

    Parameters
    ----------
    route : Route
        A checked route.
    amount_kg : float
        Target amount before overage [kg] (the ``--target`` number).
    yields : {"expected", "low", "high"}
        Which yield of each step.
    shelf_kg : Mapping[str, float], optional
        Intermediates on the shelf: key -> mass as isolated, at its assay [kg].  A step
        whose demand the shelf covers does not run, and so does a step that feeds only
        steps that do not run.
    yield_of : Mapping[str, float], optional
        Step id -> yield [-] to plan that step at instead of its ``yields`` yield (the
        actual yield of a campaign record's lots, :mod:`routeplan.plan.record`).
    shelf_name : str
        What the shelf is, in the reason a covered step does not run (``"the stock"``;
        ``"what is in hand"`` for a campaign record's lots).

    Raises
    ------
    PlanError
        A charge whose numbers overflow (located at the step).
    """
    core = compile_route(route, yields)
    if yield_of:
        core = with_yields(core, yield_of)
    n_target = target_amount(amount_kg, core.overage, core.target_kg_per_mol_pure)
    shelf = None if shelf_kg is None else shelf_moles(route, core, shelf_kg)
    steps = walk(core, n_target, shelf)
    not_run: dict[str, str] = {}
    if shelf is not None:
        for s in reversed(core.steps):
            w = steps[s.id]
            demanded = w.n_product + (w.n_taken or 0.0)
            if w.n_taken is not None and demanded > 0 and w.n_product == 0:
                not_run[s.id] = f"{shelf_name} of {s.product} covers it"
            elif demanded == 0:
                users = [u for u in route.consumers.get(s.product, ()) if u in steps]
                if users and all(u in not_run for u in users):
                    not_run[s.id] = (f"it feeds only {', '.join(users)}, which "
                                     f"{'does' if len(users) == 1 else 'do'} not run")
    for s in core.steps:
        _check_finite(route, steps[s.id])
    return Walked(core, n_target, steps, not_run)


def _check_finite(route: "Route", w: WalkStep) -> None:
    """Refuse a step whose numbers overflow: never an ``inf`` or ``nan`` in a plan."""
    for n, m, V in w.charges:  # x - x == 0 only for a finite x: one pass without a call a number
        if not (m - m == 0 and (n is None or n - n == 0) and (V is None or V - V == 0)):
            break
    else:
        return
    for c, (n, m, V) in zip(w.step.charges, w.charges):
        for what, x in (("amount", n), ("mass", m), ("volume", V)):
            if x is not None and not math.isfinite(x):
                step = route.step(w.step.id)
                raise PlanError(f"step {step.id}: the {what} of {c.material} comes out as {x}; "
                                "a number in the route or the target is far out of range",
                                location=step.location, step=step.id,
                                hint="check the target amount, the equation's coefficients and the charge lines")
