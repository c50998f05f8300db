"""The route metrics as lines of terminal text (plain, no markup); reads a Metrics only.

Ratios [kg/kg] to 3 significant figures, percentages to 3, money to 4
(:mod:`routeplan.views.numbers`); a step id and its value are kept on one line.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Mapping

from routeplan.views.numbers import money, pct, share

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.metrics import Metrics

__all__ = ["metrics_lines"]


def _by_step(values: Mapping[str, float | None], show) -> str:
    return " · ".join(f"{k} {show(v)}" for k, v in values.items())


def metrics_lines(m: "Metrics", target: str) -> list[str]:
    """The route metrics as short plain lines.

    Parameters
    ----------
    m : Metrics
        The plan's metrics.
    target : str
        Key of the target material.

    Returns
    -------
    list of str
        A blank line, a heading, then one line per metric (indented by two spaces); PMI
        and E-factors [kg/kg], atom economy and reaction mass efficiency in %, cost
        [currency/kg].
    """
    lines = [
        "",
        "Mass efficiency and cost (per kg of target as delivered)",
        f"  process mass intensity (PMI): {share(m.pmi)} kg/kg (raw materials per kg of {target})",
        f"  E-factor: complete {share(m.e_factor_complete)} kg/kg (PMI − 1), "
        f"simple {share(m.e_factor_simple)} kg/kg (solvents and water left out)",
        "  step PMI, kg/kg (inputs per kg of the step's own product; these do not add up): "
        + _by_step(m.pmi_by_step, share),
        "  cumulative PMI, kg/kg (raw materials up to and including the step): "
        + _by_step(m.pmi_cumulative_by_step, share),
        "  atom economy: " + _by_step(m.atom_economy_by_step, pct),
        "  reaction mass efficiency: " + _by_step(m.reaction_mass_efficiency_by_step, pct),
    ]
    if m.currency is None:
        lines.append("  raw-material cost: not computed (the route gives no currency)")
    elif m.cost_per_kg is None:
        lines.append("  raw-material cost: not computed (no raw material has a price)")
    elif m.unpriced:
        lines.append(f"  raw-material cost: at least {money(m.cost_per_kg)} {m.currency} "
                     f"per kg of {target}, priced materials only; no price for: " + ", ".join(m.unpriced))
    else:
        lines.append(f"  raw-material cost: {money(m.cost_per_kg)} {m.currency} per kg of {target}")
    top = sorted(m.mass_per_kg_target.items(), key=lambda kv: -kv[1])[:5]
    if top:
        lines.append(f"  largest raw materials, kg per kg of {target}: "
                     + " · ".join(f"{k} {share(v)}" for k, v in top))
    if m.from_stock_per_kg_target:
        lines.append(f"  intermediates from stock, counted as inputs in the PMI and E-factors, kg per kg of {target}: "
                     + " · ".join(f"{k} {share(v)}" for k, v in m.from_stock_per_kg_target.items()))
    lls = " → ".join(m.longest_linear_sequence)
    plural = "s" if m.step_count != 1 else ""
    lines.append(f"  {m.step_count} step{plural}; longest linear sequence "
                 f"{len(m.longest_linear_sequence)} ({lls})")
    return lines
