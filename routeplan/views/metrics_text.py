"""The route metrics as lines of terminal text (rich markup); reads a Metrics only."""

from __future__ import annotations

from typing import TYPE_CHECKING, Mapping

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.metrics import Metrics

__all__ = ["metrics_lines"]



def _num(x: float | None, digits: int = 3) -> str:
    """``x`` to ``digits`` significant figures, or an en dash for None."""
    if x is None:
        return "–"
    text = f"{x:.{digits}g}"
    return f"{x:.0f}" if "e" in text and abs(x) >= 1 else text


def _pct(x: float | None) -> str:
    return "–" if x is None else f"{100 * x:.1f} %"


def _by_step(values: Mapping[str, float | None], show) -> str:
    from rich.markup import escape

    return " · ".join(f"{escape(k)} {show(v)}" for k, v in values.items())


def metrics_lines(m: "Metrics", target: str) -> list[str]:
    """The route metrics as short terminal lines with rich markup.

    Parameters
    ----------
    m : Metrics
        The plan's metrics.
    target : str
        Key of the target material.

    Returns
    -------
    list of str
        A blank line, a heading, then one line per metric; PMI and E-factors [kg/kg],
        atom economy and reaction mass efficiency in %, cost [currency/kg].
    """
    from rich.markup import escape

    tgt = escape(target)
    lines = [
        "",
        "[bold]Mass efficiency and cost[/bold] (per kg of target as delivered)",
        f"  process mass intensity (PMI): {_num(m.pmi)} kg of raw materials per kg of {tgt}",
        f"  E-factor: complete {_num(m.e_factor_complete)} kg/kg (PMI − 1), "
        f"simple {_num(m.e_factor_simple)} kg/kg (solvents and water left out)",
        "  step PMI, kg/kg (inputs per kg of the step's own product; these do not add up): "
        + _by_step(m.pmi_by_step, _num),
        "  cumulative PMI, kg/kg (raw materials up to and including the step): "
        + _by_step(m.pmi_cumulative_by_step, _num),
        "  atom economy: " + _by_step(m.atom_economy_by_step, _pct),
        "  reaction mass efficiency: " + _by_step(m.reaction_mass_efficiency_by_step, _pct),
    ]
    if m.currency is None:
        lines.append("  raw-material cost: not computed (the route gives no currency)")
    elif m.cost_per_kg is None:
        lines.append("  raw-material cost: not computed (no raw material has a price)")
    elif m.unpriced:
        lines.append(f"  raw-material cost: at least {_num(m.cost_per_kg, 4)} {escape(m.currency)} "
                     f"per kg of {tgt}, [bold]priced materials only[/bold]; no price for: "
                     + ", ".join(escape(k) for k in m.unpriced))
    else:
        lines.append(f"  raw-material cost: {_num(m.cost_per_kg, 4)} {escape(m.currency)} per kg of {tgt}")
    top = sorted(m.mass_per_kg_target.items(), key=lambda kv: -kv[1])[:5]
    if top:
        lines.append(f"  largest raw materials, kg per kg of {tgt}: "
                     + " · ".join(f"{escape(k)} {_num(v)}" for k, v in top))
    if m.from_stock_per_kg_target:
        lines.append(f"  intermediates from stock, counted as inputs in the PMI and E-factors, kg per kg of {tgt}: "
                     + " · ".join(f"{escape(k)} {_num(v)}" for k, v in m.from_stock_per_kg_target.items()))
    lls = " → ".join(escape(s) for s in m.longest_linear_sequence)
    plural = "s" if m.step_count != 1 else ""
    lines.append(f"  {m.step_count} step{plural}; longest linear sequence "
                 f"{len(m.longest_linear_sequence)} ({lls})")
    return lines
