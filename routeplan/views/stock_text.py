"""Lines of text that say what the stock allows and what to buy (terminal)."""

from __future__ import annotations

from routeplan.views.display_units import plan_units
from routeplan.views.purchase_rows import not_bought_note
from routeplan.views.sheet_rows import not_in_stock, stock_not_needed

__all__ = ["stock_lines", "target_option"]


def target_option(kg: float, units) -> str:
    """A mass [kg] as ``--target`` takes it, in ``units``' unit of mass (a
    :class:`~routeplan.views.display_units.DisplayUnits`): the number without digit groups, its unit.

    >>> from routeplan.views.display_units import SETS
    >>> target_option(13194.6, SETS["kilo"])
    '13190 kg'
    """
    return f"{units.number(kg, 'mass').replace(' ', '')} {units.mass.symbol}"


def stock_lines(plan, units=None) -> list[str]:
    """Human sentences about the plan's stock comparison; masses in ``units`` (the plan's
    :class:`~routeplan.views.display_units.DisplayUnits`, default
    :func:`~routeplan.views.display_units.plan_units`)."""
    s = plan.stock
    units = units or plan_units(plan)
    mass = units.mass_text

    lines = [""]
    tgt = plan.target_material
    in_stock = set(s.on_hand)
    missing = not_in_stock(plan)
    overage = plan.route.target.overage
    if s.max_target is None:
        lines.append("Stock: no raw material this plan needs is in the stock list.")
    else:
        most = mass(s.max_target.m_as("kg"))
        lines.append(f"Stock: the materials on hand allow a target of at most {most} of {tgt}"
                     + (", using the intermediates in stock first" if _shelf(plan) else "")
                     + (f" (plus the {overage * 100:g} % overage, so --target "
                        f"\"{target_option(s.max_target.m_as('kg'), units)}\")" if overage else "")
                     + f", limited by {s.limited_by}"
                     + (", counting only the materials in stock" if missing else "") + ".")
    if missing:
        lines.append("  not in stock, to buy in full: " + ", ".join(missing))
    for sp in plan.steps:
        if sp.from_stock_mass is not None and sp.product in in_stock:
            have = mass(s.on_hand[sp.product].m_as("kg"))
            taken = mass(sp.stock_m_kg)
            then = f"step {sp.id} makes the rest" if sp.runs else f"step {sp.id} does not run"
            lines.append(f"  {sp.product} (intermediate, made in {sp.id}): {taken} of the {have} on hand "
                         f"taken from stock; {then}")
    unused, idle = stock_not_needed(plan)
    if unused:
        lines.append("  in stock but not needed by this route: " + ", ".join(unused))
    if idle:
        lines.append("  in stock, not needed for this target (charged only in steps that do not run): "
                     + ", ".join(idle))
    if s.to_buy:
        lines.append(f"To buy for {mass(plan.asked_kg)} of {tgt}"
                     + (f" ({mass(plan.target_kg)} with the overage)"
                        if overage else "") + ":")
        for key, need in s.to_buy:
            lines.append(f"  {key}: {mass(need.m_as('kg'))}")
    else:
        lines.append("Nothing to buy: the stock covers the requested target.")
    note = not_bought_note(plan)
    if note:
        lines.append("  " + note)
    return lines


def _shelf(plan) -> bool:
    """True when the stock list names an intermediate with some mass on hand."""
    route = plan.route
    return any(route.is_intermediate(k) and m.magnitude > 0 for k, m in plan.stock.on_hand.items())
