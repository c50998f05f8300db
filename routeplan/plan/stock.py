"""Stock on hand: what it allows and what to buy (the file is read by :mod:`routeplan.inputs.stock`).

A stock list names materials and the amount on the shelf, as a YAML mapping
(``aminophenol: 30 kg``), or as a CSV or xlsx table with the columns ``material``,
``amount`` and ``unit``.  An amount is a mass, or a volume for a material with a
density (or a solution).  A raw material's amount is as supplied; an intermediate's
(the main product of an isolated step, left from an earlier campaign) is as isolated,
at its assay, and the backward walk uses it first (:func:`routeplan.plan.walk.walk_route`).

With raw materials only, every raw-material requirement of a plan is proportional to
the target mass (the backward walk is linear), so the largest target the stock allows
is ``T * min(on_hand / need)`` over the raw materials in stock, with ``T`` the requested
target amount before overage [kg] (the number ``--target`` takes; the plan adds the
route's overage to it).  With an intermediate in stock the needs are no longer
proportional, and the largest target is found by bisection
(:mod:`routeplan.plan.stock_limit`).  Raw materials that the list does not name are not
in stock: they are bought in full and are listed as such, never taken as unlimited in
silence.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Mapping

from routeplan.units import magnitude, unit

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import Plan, StockPlan
    from routeplan.route.model import Route

__all__ = ["intermediate_stock", "stock_plan"]


def intermediate_stock(route: "Route", on_hand: "Mapping[str, pint.Quantity]") -> dict[str, "pint.Quantity"]:
    """The intermediates of ``on_hand``: key -> mass as isolated, at its assay [kg]."""
    return {k: v for k, v in on_hand.items() if route.is_intermediate(k)}


def stock_plan(plan: "Plan", stock: "str | Path | Mapping[str, pint.Quantity]", *,
               source: str | None = None) -> "StockPlan":
    """Compare a plan's raw materials with the stock on hand.

    Parameters
    ----------
    plan : Plan
        A plan for the requested target, planned with the same stock's intermediates
        (``plan_route(..., stock=...)`` does both).
    stock : str, Path or Mapping[str, pint.Quantity]
        A stock file, or material key -> mass on hand [kg].
    source : str, optional
        The file ``stock`` was read from, when it is a mapping read already.

    Returns
    -------
    StockPlan
        ``max_target`` [kg] (the largest target amount, before the route's overage, as
        ``--target`` takes it; over the raw materials in stock, any intermediate in
        stock used first; None if none of them is needed), ``limited_by``, ``to_buy``
        (key, mass [kg]) for the requested target (materials not in stock in full;
        never a material marked ``bought: false``),
        and ``on_hand``.
    """
    from routeplan.plan.model import StockPlan

    from routeplan.inputs.stock import load_stock

    on_hand, read_from = load_stock(plan.route, stock)
    source = read_from or source
    # on the --target basis: the amount before overage, which the plan scales by (1 + overage)
    target = plan.asked_kg * unit("kg")
    best_ratio, limited_by = None, None
    to_buy = []
    from routeplan.plan.purchase import with_packs

    # what is left to buy after the stock has one home: with_packs (the plan's own raw
    # materials carry it already when planned with this stock; a plan made without it too)
    raws = with_packs(plan.route, plan.raw_materials, {k: magnitude(v, "kg") for k, v in on_hand.items()})
    for r in raws:
        need = r.mass
        have = on_hand.get(r.material)
        if have is None:
            if r.bought:  # a material marked 'bought: false' is never to buy
                to_buy.append((r.material, need))
            continue
        if need.magnitude > 0:
            ratio = magnitude(have / need, "")  # [-]: as m_as(""), by the cached factor
            if best_ratio is None or ratio < best_ratio:
                best_ratio, limited_by = ratio, r.material
        if r.bought and r.buy_m_kg > 0:  # need less stock (routeplan.plan.purchase.with_packs)
            to_buy.append((r.material, r.buy_mass))
    max_target = None if best_ratio is None else (target * best_ratio).to(unit("kg"))
    shelf = intermediate_stock(plan.route, on_hand)
    if any(m.magnitude > 0 for m in shelf.values()):
        # the needs are no longer proportional to the target: bisection on the target
        from routeplan.plan.stock_limit import largest_target

        raw_on_hand = {k: v for k, v in on_hand.items() if k not in shelf}
        max_target, limited_by = largest_target(plan.route, target, raw_on_hand, shelf,
                                                yields=plan.yield_basis)
    return StockPlan(max_target=max_target, limited_by=limited_by, to_buy=tuple(to_buy),
                     on_hand=on_hand, source=source)
