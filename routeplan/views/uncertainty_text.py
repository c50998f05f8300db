"""Yield uncertainty for people: sentences, a text histogram, chart data and sheet rows.

Reads only ``plan.uncertainty`` (:class:`routeplan.plan.uncertainty.Uncertainty`);
nothing is recomputed here.  The terminal, the workbook Summary and the HTML report
take their lines, rows and chart data from this module.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.display_units import plan_units
from routeplan.views.numbers import grouped, pct

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.plan.uncertainty import Uncertainty
    from routeplan.views.display_units import DisplayUnits

__all__ = [
    "NO_UNCERTAINTY",
    "BARS",
    "sparkline",
    "histogram_data",
    "contribution_rows",
    "uncertainty_lines",
    "uncertainty_fact_rows",
]

#: What is said of a route whose steps give no yield range.
NO_UNCERTAINTY = "no step gives a yield range (low, high), so the route carries no uncertainty to draw"

#: Eighth blocks for the one-line histogram, lowest first.
BARS = " ▁▂▃▄▅▆▇█"


def _level(x: float) -> str:
    """A confidence as people write it: ``90 %``, ``97.5 %``."""
    return f"{100 * x:g} %"


def sparkline(counts, bars: str = BARS) -> str:
    """Counts as one line of block characters, the tallest bin a full block.

    Examples
    --------
    >>> sparkline([0, 1, 2, 4])
    ' ▂▄█'
    """
    top = max(counts) if counts else 0
    if top <= 0:
        return ""
    steps = len(bars) - 1
    return "".join(bars[0] if c == 0 else bars[max(1, round(steps * c / top))] for c in counts)


def histogram_data(u: "Uncertainty") -> dict[str, Any]:
    """Chart data of the delivered mass: bins, counts and the marks to draw.

    Returns
    -------
    dict
        ``edges_kg`` (bin edges [kg]), ``counts`` (draws per bin), ``share`` (counts
        over draws [-]), ``required_kg``, ``p10_kg``, ``p50_kg``, ``p90_kg``,
        ``mean_kg`` [kg], ``probability_of_target`` [-] and ``carries_uncertainty``.
    """
    return {
        "edges_kg": list(u.histogram_edges_kg),
        "counts": list(u.histogram_counts),
        "share": [c / u.draws for c in u.histogram_counts],
        "required_kg": u.required_kg,
        "p10_kg": u.p10_kg, "p50_kg": u.p50_kg, "p90_kg": u.p90_kg, "mean_kg": u.mean_kg,
        "probability_of_target": u.probability_of_target,
        "carries_uncertainty": u.carries_uncertainty,
    }


def contribution_rows(u: "Uncertainty") -> list[dict[str, Any]]:
    """Each drawn step's share of the spread, largest first: ``step``, ``share`` [-], ``method``."""
    from routeplan.plan.uncertainty import CONTRIBUTION_METHOD

    return [{"step": sid, "share": share, "method": CONTRIBUTION_METHOD} for sid, share in u.contributions]


def uncertainty_lines(plan: "Plan", units: "DisplayUnits | None" = None) -> list[str]:
    """The uncertainty as plain lines for the terminal (empty without ``plan.uncertainty``).

    ``units``: the plan's units (every mass in its unit of mass); default
    :func:`~routeplan.views.display_units.plan_units`.  Percentages to 3 significant figures.
    """
    from routeplan.views.stock_text import target_option

    u = plan.uncertainty
    if u is None:
        return []
    units = units or plan_units(plan)
    kg = units.mass_text

    req = kg(u.required_kg)
    head = (f"Yield uncertainty ({u.distribution}, {grouped(u.draws)} draws, seed {u.seed}), "
            "delivered as isolated by the plan at expected yields:")
    if not u.carries_uncertainty:
        return [head,
                f"  {NO_UNCERTAINTY}: every draw delivers the planned {req}; "
                "this is not a certainty, only the absence of ranges in the route file",
                f"  to deliver {req} at {_level(u.confidence)} confidence: the target as planned, "
                f"--target \"{target_option(u.target_kg, units)}\" (before overage)"]
    lines = [
        head,
        f"  P10 {kg(u.p10_kg)} · P50 {kg(u.p50_kg)} · P90 {kg(u.p90_kg)} · mean {kg(u.mean_kg)} "
        f"(required {req}, overage included)",
        f"  {kg(u.histogram_edges_kg[0])} {sparkline(u.histogram_counts)} "
        f"{kg(u.histogram_edges_kg[-1])}   (draws per bin)",
        "  " + " · ".join(f"P{100 * lv:.0f} {kg(v)}" for lv, v in u.quantiles_kg),
        f"  probability of delivering {req}: {pct(u.probability_of_target)}",
        f"  to be {_level(u.confidence)} sure of {req}: plan --target "
        f"\"{target_option(u.target_kg, units)}\" (before overage) and buy, at that confidence:",
    ]
    for material, need in u.raw_materials:
        lines.append(f"    {material}: {kg(need)}")
    if u.contributions:
        lines.append("  share of the spread by step (squared correlation of its yield with the delivered mass): "
                     + ", ".join(f"{sid} {pct(share)}" for sid, share in u.contributions))
    for note in uncertainty_notes(u):
        lines.append(f"  note: {note}")
    return lines


def uncertainty_notes(u) -> list[str]:
    """What the reader must know about the figures of the draws ``u`` (an Uncertainty)."""
    if u.stock_in_full:
        return ["intermediates taken from stock arrive in full in every draw; the target and purchases for "
                "the confidence scale the plan in proportion, the stock taken included"]
    return []


def _fact(key, item, value, unit="", kind="text", note=""):
    return {"key": key, "item": item, "value": value, "unit": unit, "kind": kind, "note": note}


def uncertainty_fact_rows(plan: "Plan", units: "DisplayUnits | None" = None) -> list[dict[str, Any]]:
    """The uncertainty as ``key``, ``item``, ``value``, ``unit``, ``kind``, ``note`` rows
    (as :func:`routeplan.views.sheet_rows.summary_rows`); empty without it.  ``units``:
    the plan's units for the mass a note names (the values stay in kg); else kg.

    Keys: ``draws``, ``p10``, ``p50``, ``p90``, ``mean`` [kg], ``probability_of_target``
    [-], ``confidence_target`` [kg], ``buy:<material>`` [kg], ``share:<step>`` [-];
    a route without ranges gets one ``no_uncertainty`` text row instead of the numbers.
    """
    u = plan.uncertainty
    if u is None:
        return []
    rows = [_fact("draws", "draws", f"{grouped(u.draws)} {u.distribution} draws, seed {u.seed}")]
    if not u.carries_uncertainty:
        rows.append(_fact("no_uncertainty", "yield uncertainty", NO_UNCERTAINTY))
        return rows
    for key, value in (("p10", u.p10_kg), ("p50", u.p50_kg), ("p90", u.p90_kg), ("mean", u.mean_kg)):
        rows.append(_fact(key, f"delivered, {key.upper() if key != 'mean' else 'mean'}", value, "kg", "mass",
                          "as isolated, plan at expected yields"))
    rows.append(_fact("probability_of_target", "probability of delivering the target", u.probability_of_target,
                      "-", "fraction", f"{u.required_kg:.6g} kg, overage included" if units is None
                      else f"{units.mass_text(u.required_kg)}, overage included"))
    rows.append(_fact("confidence_target", f"target to plan for {_level(u.confidence)} confidence", u.target_kg,
                      "kg", "mass", "before overage, as --target takes it"))
    for material, kg in u.raw_materials:
        rows.append(_fact(f"buy:{material}", f"to buy at {_level(u.confidence)} confidence: {material}", kg, "kg", "mass"))
    for sid, share in u.contributions:
        rows.append(_fact(f"share:{sid}", f"share of the spread, {sid}", share, "-", "fraction",
                          "squared correlation of the step's yield with the delivered mass"))
    for i, note in enumerate(uncertainty_notes(u)):
        rows.append(_fact(f"note:{i}", "note", note))
    return rows
