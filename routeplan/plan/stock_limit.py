"""The largest target a stock allows when an intermediate is on the shelf.

With raw materials only, every raw-material need is proportional to the target amount
and the largest target has a closed form (:func:`routeplan.plan.stock.stock_plan`).  With
an intermediate in stock, the walk takes it first, so a need upstream of it is
``max(0, a * T - b)`` (``T`` the target amount [kg], ``a`` [kg/kg] and ``b`` [kg]
constants of the route and of the stock), and where several stocks meet it is piecewise
linear.  Each need is still non-decreasing in ``T``: the demand on every step grows with
``T`` and the moles taken from stock never exceed it.  So the set of targets the stock
covers is an interval ``(0, T_max]``, and ``T_max`` is found by bisection, one walk per
trial.

Bracket: the closed form over the stock-free needs is a lower bound (an intermediate on
the shelf never raises a raw-material need); from the requested amount the upper end is
doubled until the stock no longer covers it.  The bisection stops when the bracket is
within :data:`REL_TOL` of its upper end, or after :data:`MAX_WALKS` walks in all.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Mapping

from routeplan.units import unit

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.route.model import Route

__all__ = ["REL_TOL", "MAX_WALKS", "raw_needs", "largest_target"]

#: Relative width of the final bracket on the largest target [-].
REL_TOL = 1e-9

#: Most walks (plans without batches or metrics) one search may make [-].
MAX_WALKS = 80


def raw_needs(walked) -> dict[str, float]:
    """Mass of each bought material charged over a walk [kg] (a step that does not run charges nothing)."""
    out: dict[str, float] = {}
    for w in walked.steps.values():
        for c, (_n, m, _V) in zip(w.step.charges, w.charges):
            if not c.intermediate:
                out[c.material] = out.get(c.material, 0.0) + m
    return out


def largest_target(route: "Route", requested: "pint.Quantity", raw_on_hand: Mapping[str, "pint.Quantity"],
                   shelf: Mapping[str, "pint.Quantity"], *, yields: str = "expected"):
    """Largest target amount the raw materials in stock allow, intermediates used first.

    Parameters
    ----------
    route : Route
        The route.
    requested : pint.Quantity
        The requested target amount before overage [kg] (the ``--target`` number).
    raw_on_hand : Mapping[str, pint.Quantity]
        Raw materials in stock [kg] as supplied.
    shelf : Mapping[str, pint.Quantity]
        Intermediates in stock [kg] as isolated, at their assay.
    yields : {"expected", "low", "high"}
        The step yields the plan uses.

    Returns
    -------
    tuple
        (largest target amount before overage [kg] as a pint Quantity, key of the raw
        material that limits it), or (None, None) when no raw material of the list is
        needed by the route.  The amount returned is on the covered side of the
        bracket: planning it needs no more of any listed raw material than is on hand
        (to the bracket's width).
    """
    from routeplan.plan.walk import walk_route
    from routeplan.units import Q

    kg = unit("kg")
    t0 = float(requested.m_as(kg))
    shelf_kg = {k: float(v.m_as(kg)) for k, v in shelf.items()}

    def needs(t: float, stock) -> dict[str, float]:
        return raw_needs(walk_route(route, t, yields=yields, shelf_kg=stock))

    free = needs(t0, None)
    have = {k: float(v.m_as(kg)) for k, v in raw_on_hand.items() if free.get(k, 0.0) > 0}
    if not have:
        return None, None
    walks = 1

    def excess(t: float) -> tuple[float, str]:
        """Largest need over on hand among the listed raw materials at target ``t``, and which."""
        got = needs(t, shelf_kg)
        worst, key = 0.0, None
        for k, h in have.items():
            n = got.get(k, 0.0)
            ratio = n / h if h > 0 else (float("inf") if n > 0 else 0.0)
            if key is None or ratio > worst:
                worst, key = ratio, k
        return worst, key

    # lower end: the stock-free closed form, which the intermediate stock can only raise
    lo = t0 * min(h / free[k] for k, h in have.items())
    hi = max(t0, lo)
    ratio, limited_by = excess(hi)
    walks += 1
    while ratio <= 1.0 and walks < MAX_WALKS:
        lo, hi = hi, 2.0 * hi
        ratio, limited_by = excess(hi)
        walks += 1
    while hi - lo > REL_TOL * hi and walks < MAX_WALKS:
        mid = 0.5 * (lo + hi)
        r, k = excess(mid)
        walks += 1
        if r <= 1.0:
            lo = mid
        else:
            hi, limited_by = mid, k
    return Q(lo, kg), limited_by
