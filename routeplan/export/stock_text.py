"""Lines of text that say what the stock allows and what to buy (terminal)."""

from __future__ import annotations

from routeplan.export.tables import display_quantity

__all__ = ["stock_lines"]


def stock_lines(plan) -> list[str]:
    """Human sentences about the plan's stock comparison."""
    s = plan.stock
    lines = [""]
    tgt = plan.target_material
    in_stock = set(s.on_hand)
    missing = [r.material for r in plan.raw_materials if r.material not in in_stock]
    overage = plan.route.target.overage
    if s.max_target is None:
        lines.append("Stock: no raw material this plan needs is in the stock list.")
    else:
        most = display_quantity(s.max_target.m_as("kg"), "mass")
        lines.append(f"Stock: the materials on hand allow a target of at most {most} of {tgt}"
                     + (f" (plus the {overage * 100:.3g} % overage, so --target \"{most}\")" if overage else "")
                     + f", limited by {s.limited_by}"
                     + (", counting only the materials in stock" if missing else "") + ".")
    if missing:
        lines.append("  not in stock, to buy in full: " + ", ".join(missing))
    unused = sorted(k for k in in_stock if k not in {r.material for r in plan.raw_materials})
    if unused:
        lines.append("  in stock but not needed by this route: " + ", ".join(unused))
    if s.to_buy:
        asked = plan.target_mass.m_as("kg") / (1 + overage)
        lines.append(f"To buy for {display_quantity(asked, 'mass')} of {tgt}"
                     + (f" ({display_quantity(plan.target_mass.m_as('kg'), 'mass')} with the overage)"
                        if overage else "") + ":")
        for key, mass in s.to_buy:
            lines.append(f"  {key}: {display_quantity(mass.m_as('kg'), 'mass')}")
    else:
        lines.append("Nothing to buy: the stock covers the requested target.")
    return lines
