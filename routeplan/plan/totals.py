"""Route totals: raw materials to buy and the overall yield."""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import OverallYield, RawMaterialTotal, StepPlan
    from routeplan.route.model import Route

__all__ = ["raw_material_totals", "overall_yield", "starting_materials", "downstream_factors", "stoichiometric_factor", "made_fraction"]


def raw_material_totals(route: "Route", steps: "tuple[StepPlan, ...]") -> "tuple[RawMaterialTotal, ...]":
    """Every bought material summed over the whole route, in order of first use.

    Mass [kg] and volume [L] are as supplied; cost is ``mass * price`` in the route's
    currency where both a price and a currency are given.  A step that does not run
    (its product's stock covers it) charges nothing and is left out.
    """
    from routeplan.plan.model import RawMaterialTotal

    acc: dict[str, list] = {}
    for sp in steps:
        if sp.not_run is not None:
            continue
        for c in sp.charges:
            if c.intermediate:
                continue
            a = acc.get(c.material)
            if a is None:  # mass [kg], volume [L], moles [mol], steps as an ordered set
                a = acc[c.material] = [0.0, None, None, {}]
            a[0] += c.m_kg
            if c.V_L is not None:
                a[1] = c.V_L if a[1] is None else a[1] + c.V_L
            if c.n_mol is not None:
                a[2] = c.n_mol if a[2] is None else a[2] + c.n_mol
            a[3][sp.id] = None
    out = []
    for key, (m, V, n, used) in acc.items():
        mat = route.materials[key]
        cost = m * mat.price if mat.price is not None and route.currency else None
        out.append(RawMaterialTotal(material=key, name=mat.name, m_kg=m, V_L=V, n_mol=n,
                                    cost=cost, steps=tuple(used)))
    return tuple(out)


def downstream_factors(route: "Route") -> dict[str, float]:
    """Theoretical moles of target per mole of each step's product [-] (1 for the target).

    The product over the steps from the product to the target of
    ``nu_product / nu_entering``, ``nu_entering`` the coefficient of the material that
    enters each step on the path.  Where an intermediate feeds several steps the most
    favourable path is taken (the largest factor).  One pass in reverse execution order,
    no recursion, so the cost is linear in the number of steps.
    """
    from routeplan.route.graph import execution_order

    target = route.target.material
    consumers = route.consumers
    out: dict[str, float] = {target: 1.0}
    for sid in reversed(execution_order(route)):
        product = route.step(sid).product
        if product == target:
            continue
        best = 0.0
        for user in consumers.get(product, ()):
            f = stoichiometric_factor(route, user, product, out)
            if f > best:
                best = f
        out[product] = best
    return out


def stoichiometric_factor(route: "Route", step_id: str, material: str,
                          downstream: dict[str, float] | None = None) -> float:
    """Theoretical moles of target per mole of ``material`` charged in ``step_id`` [-].

    ``nu_product / nu_material`` of the step times the factor of its product onward
    (:func:`downstream_factors`, computed once and passed in ``downstream``).
    """
    down = downstream_factors(route) if downstream is None else downstream
    step = route.step(step_id)
    factor = step.equation.coefficient(step.product) / step.equation.coefficient(material)
    return factor * down.get(step.product, 0.0)


def starting_materials(route: "Route") -> frozenset[str]:
    """The starting materials of the route: bought limiting reagents and those the route marks.

    They begin a branch (the first reactant of its first step, unless the step names
    another limiting reagent), so their atoms end up in the target; reagents, bases,
    acids and quench salts do not, and an overall yield "from" them would be noise.  A
    bought co-reactant whose atoms do end up in the target (an alkylating agent, say) is
    marked in the route file with ``starting_material: true``.
    """
    marked = {k for k, m in route.materials.items() if m.starting_material}
    made = route.intermediates
    return frozenset(s.limiting for s in route.steps if s.limiting not in made) | marked


def overall_yield(route: "Route", steps: "tuple[StepPlan, ...]", n_target: float) -> "OverallYield":
    """Overall yield along the longest linear sequence, and from each starting material.

    The yield along the longest linear sequence is the product of its expected step
    yields [-]; ``low`` and ``high`` are the products of the steps' low and high yields
    (the expected yield of a step that gives no range).  The yield from a bought reactant ``R`` is
    ``n_target * sum(1 / f_i) / sum(n_i)`` [-], with ``n_i`` the moles of ``R`` charged
    in each step that uses it and ``f_i`` the theoretical moles of target per mole of
    ``R`` there (:func:`stoichiometric_factor`); for one use, ``(n_target / n_R) / f_R``.
    An excess of ``R`` lowers it.  Where an intermediate is taken from stock, only the
    share of the target that the campaign makes from ``R`` counts: each ``1 / f_i`` is
    weighted by the fraction of the target made from step ``i``'s own product
    (:func:`made_fraction`), so that stock on the shelf does not show as a yield above
    theory.
    """
    from routeplan.plan.model import OverallYield
    from routeplan.route.graph import longest_linear_sequence

    lls = tuple(longest_linear_sequence(route))  # worked out once per route
    y = low = high = 1.0
    by_step = {sp.id: sp for sp in steps}
    for sid in lls:
        y *= by_step[sid].yield_
        step_yield = route.step(sid).yield_
        low *= step_yield.low if step_yield.low is not None else step_yield.expected
        high *= step_yield.high if step_yield.high is not None else step_yield.expected
    made = made_fraction(steps) if any(sp.stock_n_mol is not None for sp in steps) else None
    down = downstream_factors(route)
    starting = starting_materials(route)
    sum_n: dict[str, float] = {}
    sum_inv_f: dict[str, float] = {}
    n_t = n_target
    for sp in steps:
        for c in sp.charges:
            if c.intermediate or c.material not in starting or c.n_mol is None:
                continue
            f = stoichiometric_factor(route, sp.id, c.material, down)
            if f > 0:
                sum_n[c.material] = sum_n.get(c.material, 0.0) + c.n_mol
                weight = 1.0 if made is None else made[sp.id]
                sum_inv_f[c.material] = sum_inv_f.get(c.material, 0.0) + weight / f
    # used in several steps, the theoretical need is n_t * sum(1/f_i) mol
    per_raw = {k: n_t * sum_inv_f[k] / n for k, n in sum_n.items() if n > 0}
    return OverallYield(longest_linear_sequence=lls, yield_=y, by_raw_material=per_raw, low=low, high=high)


def made_fraction(steps: "tuple[StepPlan, ...]") -> dict[str, float]:
    """Fraction of the target that the campaign makes from each step's own product [-].

    ``phi(s) = alpha(s) * sum_c(n_c * phi(c)) / sum_c(n_c)`` over the steps ``c`` that
    charge the product of ``s`` (``n_c`` the moles each charges), with
    ``alpha(s) = made / (made + taken from stock)`` the share of that product the step
    makes; ``phi`` of the step that makes the target is its own ``alpha``.  Without
    stock every ``phi`` is 1; a step that does not run has ``phi = 0``.

    Parameters
    ----------
    steps : tuple of StepPlan
        In execution order.

    Returns
    -------
    dict[str, float]
        Step id -> fraction [-].
    """
    users: dict[str, list[tuple[str, float]]] = {}
    for sp in steps:
        for c in sp.charges:
            if c.intermediate and c.n_mol is not None:
                users.setdefault(c.material, []).append((sp.id, c.n_mol))
    out: dict[str, float] = {}
    for sp in reversed(steps):
        made = sp.product_n_mol
        taken = 0.0 if sp.stock_n_mol is None else sp.stock_n_mol
        alpha = made / (made + taken) if made + taken > 0 else 0.0
        used = [(u, n) for u, n in users.get(sp.product, ()) if u in out]
        total = sum(n for _u, n in used)
        downstream = sum(n * out[u] for u, n in used) / total if total > 0 else (0.0 if used else 1.0)
        out[sp.id] = alpha * downstream
    return out
