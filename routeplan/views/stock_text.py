"""Lines of text that say what the stock allows and what to buy (terminal)."""

from __future__ import annotations

from routeplan.views.purchase_rows import not_bought_note
from routeplan.views.sheet_rows import stock_not_needed
from routeplan.views.tables import display_quantity

__all__ = ["stock_lines"]


def stock_lines(plan) -> list[str]:
    """Human sentences about the plan's stock comparison."""
    s = plan.stock
    lines = [""]
    tgt = plan.target_material
    in_stock = set(s.on_hand)
    missing = [r.material for r in plan.raw_materials if r.material not in in_stock and r.bought]
    overage = plan.route.target.overage
    if s.max_target is None:
        lines.append("Stock: no raw material this plan needs is in the stock list.")
    else:
        most = display_quantity(s.max_target.m_as("kg"), "mass")
        lines.append(f"Stock: the materials on hand allow a target of at most {most} of {tgt}"
                     + (", using the intermediates in stock first" if _shelf(plan) else "")
                     + (f" (plus the {overage * 100:.3g} % overage, so --target \"{most}\")" if overage else "")
                     + f", limited by {s.limited_by}"
                     + (", counting only the materials in stock" if missing else "") + ".")
    if missing:
        lines.append("  not in stock, to buy in full: " + ", ".join(missing))
    for sp in plan.steps:
        if sp.from_stock_mass is not None and sp.product in in_stock:
            have = display_quantity(s.on_hand[sp.product].m_as("kg"), "mass")
            taken = display_quantity(sp.from_stock_mass.m_as("kg"), "mass")
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
        asked = plan.target_mass.m_as("kg") / (1 + overage)
        lines.append(f"To buy for {display_quantity(asked, 'mass')} of {tgt}"
                     + (f" ({display_quantity(plan.target_mass.m_as('kg'), 'mass')} with the overage)"
                        if overage else "") + ":")
        for key, mass in s.to_buy:
            lines.append(f"  {key}: {display_quantity(mass.m_as('kg'), 'mass')}")
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
