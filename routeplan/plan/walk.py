"""The backward walk: from the target mass to every charge of every step.

The method is the one of the route format ("How the plan is computed"):

1. the target step must make ``n = amount * (1 + overage) * assay / M`` mol of target;
2. in reverse execution order, a step whose product is demanded at ``n_p`` mol needs
   ``n_lim = n_p / (yield * nu_product / nu_limiting)`` mol of limiting reagent, and
   demands on an intermediate from several steps add up;
3. each charge follows from its basis (:mod:`routeplan.plan.charges`);
4. a charged intermediate is not bought: its moles become the demand on its maker;
5. an intermediate on the shelf is used first: the demand on its maker is reduced by the
   moles on hand (``mass * assay / M``), never below zero.

Quantities are pint quantities in mol, kg and L throughout.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.units import unit
from routeplan.errors import PlanError, Problem

if TYPE_CHECKING:  # pragma: no cover
    from typing import Mapping

    import pint

    from routeplan.plan.model import Plan, StepPlan
    from routeplan.route.model import Route

__all__ = ["walk_steps", "target_moles", "YIELD_BASES"]


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


#: Relative shortfall of an intermediate on the shelf that still counts as covering the
#: demand [-] (rounding of masses and assays, not chemistry).
SHELF_REL = 1e-9

#: Which of each step's yields the walk uses.
YIELD_BASES = ("expected", "low", "high")


def walk_steps(route: "Route", n_target: "pint.Quantity", *, yields: str = "expected",
               from_stock: "Mapping[str, pint.Quantity] | None" = None,
               yield_of: "Mapping[str, float] | None" = None) -> "tuple[StepPlan, ...]":
    """The backward walk: every step planned for the demand on its product, before batches.

    Parameters
    ----------
    route : Route
        A checked route.
    n_target : pint.Quantity
        Moles of pure target the final step must make [mol] (:func:`target_moles`).
    yields : {"expected", "low", "high"}
        Which yield of each step to use.
    from_stock : Mapping[str, pint.Quantity], optional
        Intermediates on the shelf: key -> mass as isolated, at its assay [kg].  When
        the walk reaches the step that makes one, it takes
        ``min(on hand * assay / M, demand)`` mol from the stock and plans the step for
        the rest.  A step whose demand the stock covers does not run (``not_run``), and
        so does a step that feeds only steps that do not run.
    yield_of : Mapping[str, float], optional
        Step id -> yield [-] to plan that step at instead of its ``yields`` yield (the
        actual yield of a campaign record's lots, :mod:`routeplan.plan.record`).

    Returns
    -------
    tuple of StepPlan
        In execution order, ``batch`` not yet set.  Without ``from_stock`` (or with no
        intermediate in it) the walk is exactly the route format's.
    """
    from dataclasses import replace

    from routeplan.plan.charges import compute_step, supplied_form
    from routeplan.route.graph import execution_order
    from routeplan.units import Q

    mol = unit("mol")
    demand: dict[str, "pint.Quantity"] = {route.target.material: n_target}
    planned: dict[str, "StepPlan"] = {}
    zero = Q(0.0, mol)
    order = execution_order(route)
    for sid in reversed(order):
        step = route.step(sid)
        n_p = demand.get(step.product)
        if n_p is None:
            # a step that does not lead to the target: the loader has warned already
            n_p = zero
        have = None if from_stock is None else from_stock.get(step.product)
        y_of = None if yield_of is None else yield_of.get(sid)
        if have is None:
            sp = compute_step(route, step, n_p, yields=yields, yield_value=y_of)
        else:
            kg_per_mol = supplied_form(route.materials[step.product]).kg_per_mol
            on_shelf = (have / kg_per_mol).to(mol)  # [kg] / [kg/mol]: mass * assay / M
            # a shelf within SHELF_REL of the demand covers it: amounts recorded from a plan
            # round-trip through masses and assays, and must not leave a batch of crumbs
            if on_shelf.m_as(mol) >= n_p.m_as(mol) * (1 - SHELF_REL):
                taken, rest = n_p, zero
            else:
                taken, rest = on_shelf, n_p - on_shelf
            sp = compute_step(route, step, rest, yields=yields, yield_value=y_of)
            sp = replace(sp, from_stock_mol=taken.to(mol), from_stock_mass=(taken * kg_per_mol).to(unit("kg")))
            if n_p.m_as(mol) > 0 and rest.m_as(mol) == 0:
                sp = replace(sp, not_run=f"the stock of {step.product} covers it")
        if sp.not_run is None and from_stock is not None:
            idle = _idle_users(route, step.product, n_p, planned)
            if idle:
                sp = replace(sp, not_run=f"it feeds only {', '.join(idle)}, which "
                                         f"{'does' if len(idle) == 1 else 'do'} not run")
        planned[sid] = sp
        for c in sp.charges:
            if c.intermediate and c.mol is not None:
                demand[c.material] = demand.get(c.material, zero) + c.mol
    return tuple(planned[sid] for sid in order)


def _idle_users(route: "Route", product: str, n_p: "pint.Quantity", planned) -> list[str]:
    """The steps that use ``product`` when all of them do not run and nothing is demanded."""
    if n_p.magnitude != 0:
        return []
    users = [u for u in route.consumers.get(product, ()) if u in planned]
    if users and all(planned[u].not_run is not None for u in users):
        return users
    return []
