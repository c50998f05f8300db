"""The mass intensity in routeplan's own layout: kg of each input per kg of target, by
material, and one line in words per step.

Read from ``plan.metrics`` only (``mass_per_kg_target``, ``from_stock_per_kg_target``,
``pmi``, ``pmi_by_step``, ``pmi_cumulative_by_step``); the metrics and their sources are
in docs/metrics.md (process mass intensity: Jiménez-González, Ponder, Broxterman and
Manley, Org. Process Res. Dev. 2011, 15, 912).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.tables import Column

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["MASS_INTENSITY_COLUMNS", "mass_intensity_rows", "step_intensity_lines"]

#: Columns of the table by material.
MASS_INTENSITY_COLUMNS = (
    Column("material", "key"),
    Column("name", "input"),
    Column("kg_per_kg", "per kg of target", "kg/kg"),
    Column("share", "share of the route PMI", "-"),
)


def mass_intensity_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per raw material (order of first use), then per intermediate taken from
    stock, then the route PMI (``material`` None): ``kg_per_kg`` [kg/kg] and ``share``
    of the route PMI [-].  Empty without metrics."""
    m = plan.metrics
    if m is None:
        return []
    names = {r.material: r.name for r in plan.raw_materials}
    rows = []
    for key, value in m.mass_per_kg_target.items():
        rows.append({"material": key, "name": names.get(key, key), "kg_per_kg": value,
                     "share": value / m.pmi if m.pmi else None})
    for key, value in m.from_stock_per_kg_target.items():
        name = plan.route.materials[key].name if key in plan.route.materials else key
        rows.append({"material": key, "name": f"{name}, from stock", "kg_per_kg": value,
                     "share": value / m.pmi if m.pmi else None})
    rows.append({"material": None, "name": "route PMI (all inputs)", "kg_per_kg": m.pmi, "share": 1.0 if m.pmi else None})
    return rows


def _num(x: float) -> str:
    return f"{x:.4g}"


def step_intensity_lines(plan: "Plan") -> list[str]:
    """One sentence per step, in execution order: its step PMI and cumulative PMI in
    words [kg/kg].

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> plan = NS(metrics=NS(pmi_by_step={"S1": 10.0}, pmi_cumulative_by_step={"S1": 10.0}),
    ...           steps=[NS(id="S1", name="acetylation", product="amide")])
    >>> step_intensity_lines(plan)
    ['S1 (acetylation): 10 kg of inputs per kg of amide made in the step (step PMI); 10 kg of raw materials up to and including it per kg of amide (cumulative PMI)']
    """
    m = plan.metrics
    if m is None:
        return []
    out = []
    for sp in plan.steps:
        title = f"{sp.id} ({sp.name})" if sp.name and sp.name != sp.id else sp.id
        step, cum = m.pmi_by_step.get(sp.id), m.pmi_cumulative_by_step.get(sp.id)
        if step is None and cum is None:
            out.append(f"{title}: no step metrics (the step does not run, or a molar mass is missing)")
            continue
        parts = []
        if step is not None:
            parts.append(f"{_num(step)} kg of inputs per kg of {sp.product} made in the step (step PMI)")
        if cum is not None:
            parts.append(f"{_num(cum)} kg of raw materials up to and including it per kg of {sp.product} "
                         "(cumulative PMI)")
        out.append(f"{title}: " + "; ".join(parts))
    return out
