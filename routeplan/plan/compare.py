"""Side-by-side comparison of routes to one target: rows, the best value per row, the trade-off.

Every route is planned for the same mass of the same target; the comparison then reads
each plan and its :class:`~routeplan.plan.metrics.Metrics` (it computes no metric of its
own) and lays them out as rows, one value per route.  In each ranked row the best value
is marked: lower is better, except for the overall yield.  A row is ranked only when
every route has a value that can be set beside the others (a cost needs one currency
and a price for every raw material); otherwise a note says why it is not.
"""

from __future__ import annotations

import math
from dataclasses import field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Sequence

from routeplan.errors import CompareError, RouteplanError
from routeplan.frozen import frozen
from routeplan.vocab import BetterIs, YieldCase

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import Plan
    from routeplan.route.model import Route

__all__ = [
    "LOWER",
    "HIGHER",
    "MOLAR_MASS_TOLERANCE",
    "CompareError",
    "CompareRow",
    "Comparison",
    "check_same_target",
    "comparison_amount",
    "plan_for_comparison",
    "compare_plans",
    "compare_routes",
    "best_indices",
]

#: A row whose lowest value is best / whose highest value is best.
LOWER = BetterIs.LOWER
HIGHER = BetterIs.HIGHER

#: Largest relative difference of two molar masses still taken as the same target [-]
#: (the route format's tolerance between a formula and an explicit molar mass, 0.1 %).
MOLAR_MASS_TOLERANCE = 1e-3

#: Relative difference below which two values tie for best [-] (round-off only).
_TIE = 1e-9


@frozen
class CompareRow:
    """One measure, one value per route.

    Attributes
    ----------
    key : str
        Machine key (JSON), e.g. ``"pmi"``.
    heading : str
        Heading shown to people.
    short : str
        Short name used in the trade-off sentence.
    unit : str
        Unit of ``values``: ``"-"`` for counts and fractions, ``"kg/kg"``,
        ``"EUR/kg"``, ``"kg"``.
    kind : str
        How to show a value: ``"count"``, ``"fraction"`` (shown as %), ``"ratio"``,
        ``"money"`` or ``"mass"``.
    better : BetterIs or None
        :data:`LOWER`, :data:`HIGHER`, or None for a row that is not ranked by nature.
    values : tuple
        One value per route, in route order; None where there is none.
    labels : tuple of str or None
        Text that goes with each value (the material of the largest raw material, the
        steps of the longest linear sequence); empty when there is none.
    best : tuple of int
        Indices of the routes holding the best value; empty when the row is not ranked
        or every route has the same value.
    note : str or None
        Why the row is not ranked, or what to bear in mind.
    """

    key: str
    heading: str
    short: str
    unit: str
    kind: str
    better: BetterIs | None
    values: tuple[Any, ...]
    labels: tuple[str | None, ...] = ()
    best: tuple[int, ...] = ()
    note: str | None = None

    @property
    def ranked(self) -> bool:
        """True when a best value is marked."""
        return bool(self.best)

    @property
    def all_equal(self) -> bool:
        """True when the row is rankable and every route has the same value."""
        return (self.better is not None and not self.best and self.note is None
                and all(v is not None for v in self.values))


@frozen(eq=False)
class Comparison:
    """Routes to one target, planned for one target mass, side by side.

    Attributes
    ----------
    labels : tuple of str
        Column label of each route (its name; made unique with the file name).
    names : tuple of str
        Route names as written in the route files.
    files : tuple of str or None
        Route files.
    target_material : str
        Key of the common target.
    amount : float
        Mass to deliver asked of every route, before each route's overage [kg].
    currency : str or None
        The routes' common currency; None when they give none or differ.
    rows : tuple of CompareRow
        The measures, in display order.
    notes : tuple of str
        What the reader must know (the target mass chosen, differing overages).
    plans : tuple of Plan
        The plans compared, in route order.
    """

    labels: tuple[str, ...]
    names: tuple[str, ...]
    files: tuple[str | None, ...]
    target_material: str
    amount: float
    currency: str | None
    rows: tuple[CompareRow, ...]
    notes: tuple[str, ...] = ()
    plans: tuple["Plan", ...] = field(default=(), repr=False)

    def row(self, key: str) -> CompareRow:
        """The row with key ``key``."""
        for r in self.rows:
            if r.key == key:
                return r
        raise KeyError(key)


# ------------------------------------------------------------------ the target


def _file(route: "Route") -> str | None:
    return route.source.path if route.source is not None else None


def _who(route: "Route") -> str:
    f = _file(route)
    return f"'{f}' ({route.name})" if f else f"'{route.name}'"


def _describe_target(route: "Route") -> str:
    mat = route.materials[route.target.material]
    parts = [p for p in (mat.formula,
                         None if mat.molar_mass is None else f"{mat.molar_mass.m_as('g/mol'):.6g} g/mol") if p]
    return f"{mat.key}" + (f" ({', '.join(parts)})" if parts else "")


def _same_formula(a: str, b: str) -> bool:
    from routeplan.chemistry.formula import element_counts

    try:
        return element_counts(a) == element_counts(b)
    except RouteplanError:
        return a.replace(" ", "") == b.replace(" ", "")


def check_same_target(routes: Sequence["Route"]) -> None:
    """Raise :class:`CompareError` unless every route makes the same target.

    The same target means the same material key, and the same compound: equal
    formulas (element by element) where both give one, and molar masses within
    :data:`MOLAR_MASS_TOLERANCE`.

    Raises
    ------
    CompareError
        Naming both routes, both targets and what differs.
    """
    if len(routes) < 2:
        raise CompareError(f"compare needs at least two routes, got {len(routes)}",
                           hint="give two or more route files")
    first = routes[0]
    m0 = first.materials[first.target.material]
    for other in routes[1:]:
        m1 = other.materials[other.target.material]
        what = None
        if m1.key != m0.key:
            what = "the target material keys differ"
        elif m0.formula and m1.formula and not _same_formula(m0.formula, m1.formula):
            what = "the target formulas differ"
        elif m0.molar_mass is not None and m1.molar_mass is not None:
            a, b = m0.molar_mass.m_as("g/mol"), m1.molar_mass.m_as("g/mol")
            if not math.isclose(a, b, rel_tol=MOLAR_MASS_TOLERANCE):
                what = "the target molar masses differ"
        if what is not None:
            raise CompareError(
                f"routes to different targets cannot be compared: {_who(first)} makes "
                f"{_describe_target(first)} but {_who(other)} makes {_describe_target(other)}; {what}",
                hint="compare routes to one target, with the same material key and formula in every file")


# ------------------------------------------------------------- planning them


def comparison_amount(routes: Sequence["Route"], target: "pint.Quantity | str | None" = None):
    """The mass to ask of every route [kg], and notes on how it was chosen.

    Without ``target`` the first route's ``target.amount`` is used for every route.

    Returns
    -------
    amount : pint.Quantity
        Mass to deliver [kg], before each route's overage.
    notes : list of str
        Sentences for the reader.
    """
    from routeplan.units import parse_quantity

    notes: list[str] = []
    if target is None:
        amount = routes[0].target.amount.to("kg")
        differ = [r for r in routes[1:] if not math.isclose(r.target.amount.m_as("kg"), amount.m_as("kg"),
                                                            rel_tol=1e-12)]
        if differ:
            asked = ", ".join(f"{_who(r)} {r.target.amount.m_as('kg'):.6g} kg" for r in differ)
            notes.append(f"every route is planned for {amount.m_as('kg'):.6g} kg, the target amount of the "
                         f"first route {_who(routes[0])}; the others ask for other amounts ({asked})")
    elif isinstance(target, str):
        amount = parse_quantity(target, "mass").to("kg")
    else:
        amount = target.to("kg")
    overages = {r.target.overage for r in routes}
    if len(overages) > 1:
        each = ", ".join(f"{_who(r)} {r.target.overage:.1%}" for r in routes)
        notes.append(f"the routes plan different overages ({each}), so the masses planned differ; "
                     "ratios per kg of target are still comparable")
    return amount, notes


def plan_for_comparison(routes: Sequence["Route"], target: "pint.Quantity | str | None" = None, *,
                        yields: YieldCase | str = YieldCase.EXPECTED, confidence: float | None = None,
                        draws: int | None = None, seed: int | None = None):
    """Check the routes share a target, then plan each for the same target mass.

    ``yields`` (a :class:`~routeplan.vocab.YieldCase` or its word) is the step-yield basis every
    route is planned at (see :func:`routeplan.plan.planner.plan_route`).  With
    ``confidence`` [-], every route's yields are drawn (``draws``, ``seed``) and the
    comparison gains the probability of delivering and the target for that confidence.

    Returns
    -------
    plans : tuple of Plan
        One plan per route, in order.
    notes : list of str
        From :func:`comparison_amount`.
    """
    from routeplan.plan.planner import plan_route

    check_same_target(routes)
    amount, notes = comparison_amount(routes, target)
    plans = tuple(plan_route(r, amount, yields=yields, confidence=confidence, draws=draws, seed=seed)
                  for r in routes)
    if yields != YieldCase.EXPECTED:
        notes = [*notes, f"every route is planned at its steps' {yields} yields"]
        for r, p in zip(routes, plans):
            if p.yields_without_range:
                notes.append(f"{_who(r)}: step{'s' if len(p.yields_without_range) > 1 else ''} "
                             f"{', '.join(p.yields_without_range)} ha{'ve' if len(p.yields_without_range) > 1 else 's'}"
                             f" no {yields} yield and {'are' if len(p.yields_without_range) > 1 else 'is'} planned at "
                             f"the expected yield; the rows that depend on yields are not ranked")
    if confidence is not None:
        u = plans[0].uncertainty
        notes = [*notes, f"every route's step yields are drawn {u.draws} times ({u.distribution}, seed {u.seed})"]
    return plans, notes


# --------------------------------------------------------------------- ranking


def best_indices(values: Sequence[float | None], better: BetterIs | str | None) -> tuple[int, ...]:
    """Indices of the best values: the lowest, or the highest for :data:`HIGHER`.

    Values within a relative 1e-9 of the best tie.  Empty when ``better`` is None,
    when any value is missing, or when every value ties (there is nothing to choose).

    Examples
    --------
    >>> best_indices([3.0, 1.5, 1.5, 2.0], "lower")
    (1, 2)
    >>> best_indices([0.4, 0.7], "higher")
    (1,)
    """
    if better is None or not values or any(v is None for v in values):
        return ()
    top = min(values) if better == LOWER else max(values)
    best = tuple(i for i, v in enumerate(values) if math.isclose(v, top, rel_tol=_TIE, abs_tol=1e-12))
    return () if len(best) == len(values) else best


def _join(words: Sequence[str]) -> str:
    """``a, b and c``: words joined for a note."""
    words = list(words)
    if len(words) <= 1:
        return "".join(words)
    return ", ".join(words[:-1]) + " and " + words[-1]


# ----------------------------------------------------------------------- rows


def _labels(plans: Sequence["Plan"]) -> tuple[str, ...]:
    names = [p.route.name for p in plans]
    out = []
    for i, p in enumerate(plans):
        label = names[i]
        if names.count(label) > 1:
            f = _file(p.route)
            label = f"{label} ({Path(f).name})" if f else f"{label} #{i + 1}"
        out.append(label)
    if len(set(out)) < len(out):  # same name and same file name: number them
        out = [f"{lab} #{i + 1}" for i, lab in enumerate(out)]
    return tuple(out)


def _row(key, heading, short, unit, kind, better, values, labels=(), note=None) -> CompareRow:
    values = tuple(values)
    best = best_indices(values, better) if note is None else ()
    if better is not None and note is None and any(v is None for v in values):
        note = "not ranked: a route has no value"
    return CompareRow(key, heading, short, unit, kind, better, values, tuple(labels), best, note)


def _cost_row(plans: Sequence["Plan"]) -> CompareRow:
    ms = [p.metrics for p in plans]
    currencies = {m.currency for m in ms}
    currency = next(iter(currencies)) if len(currencies) == 1 else None
    unit = f"{currency}/kg" if currency else "currency/kg"
    values = [m.cost_per_kg for m in ms]
    note = None
    if len(currencies) > 1:
        note = "not ranked: the routes give prices in different currencies (" + \
               ", ".join(sorted(str(c) for c in currencies)) + ")"
    elif any(v is None for v in values):
        note = "not ranked: a route has no cost (no currency or no prices)"
    elif any(m.unpriced for m in ms):
        gaps = "; ".join(f"{p.route.name}: {', '.join(p.metrics.unpriced)}" for p in plans if p.metrics.unpriced)
        note = f"not ranked: priced raw materials only, some have no price ({gaps})"
    labels = ["priced materials only" if m.unpriced and m.cost_per_kg is not None else None for m in ms]
    if not any(labels):
        labels = []
    return _row("cost_per_kg", "raw-material cost per kg of target", "raw-material cost", unit, "money",
                LOWER, values, labels, note)


def _cog_row(plans: Sequence["Plan"], key: str, heading: str, short: str, part: str | None) -> CompareRow:
    """A cost-of-goods row per kg of target: the whole (``part`` None) or one part."""
    cogs = [p.cost_of_goods for p in plans]
    currencies = {None if c is None else c.currency for c in cogs}
    currency = next(iter(currencies)) if len(currencies) == 1 else None
    values = [None if c is None else (c.per_kg if part is None else c.part_per_kg(part)) for c in cogs]

    def gaps(c) -> tuple[str, ...]:
        if c is None:
            return ()
        parts = c.parts.values() if part is None else [c.parts[part]]
        return tuple(k for p in parts for k in p.unpriced)

    note = None
    if len(currencies) > 1:
        note = "not ranked: the routes give prices in different currencies (" + \
               ", ".join(sorted(str(c) for c in currencies)) + ")"
    elif any(v is None for v in values):
        note = "not ranked: a route has nothing priced here (no currency, prices, rates or waste prices)"
    elif any(gaps(c) for c in cogs):
        listed = "; ".join(f"{p.route.name}: {', '.join(gaps(c))}" for p, c in zip(plans, cogs) if gaps(c))
        note = f"not ranked: priced items only, some have no price ({listed})"
    labels = ["priced items only" if gaps(c) and v is not None else None for c, v in zip(cogs, values)]
    return _row(key, heading, short, f"{currency}/kg" if currency else "currency/kg", "money", LOWER, values,
                labels if any(labels) else [], note)


def _time_waste_rows(plans: Sequence["Plan"]) -> tuple[CompareRow, ...]:
    """Campaign duration, halogenated waste and the cost of goods, whole and by part."""
    hours = [None if p.schedule is None else p.schedule.campaign_h for p in plans]
    note = ("not ranked: a route has no schedule (a step without cycle_time)"
            if any(h is None for h in hours) else None)
    halogenated = [None if p.waste is None else p.waste.total.halogenated_kg / p.waste.product_kg for p in plans]
    return (
        _row("campaign_h", "campaign duration, first batch to last", "campaign duration", "h", "ratio", LOWER,
             hours, [f"pace: {p.schedule.pace_step}" for p in plans] if note is None else [], note),
        _row("halogenated_waste_per_kg", "halogenated waste per kg of target", "halogenated waste", "kg/kg",
             "ratio", LOWER, halogenated),
        _cog_row(plans, "cost_of_goods_per_kg", "cost of goods per kg of target (materials, plant, waste)",
                 "cost of goods", None),
        _cog_row(plans, "plant_cost_per_kg", "plant time per kg of target", "plant time", "plant"),
        _cog_row(plans, "waste_cost_per_kg", "waste disposal per kg of target", "waste disposal", "waste"),
    )


def _uncertainty_rows(plans: Sequence["Plan"]) -> tuple[CompareRow, ...]:
    """Probability of delivering and the confidence target, when the yields were drawn.

    A route whose steps give no yield range carries no uncertainty: it has no value in
    these rows (never a probability of 1), and the rows are then not ranked.
    """
    us = [p.uncertainty for p in plans]
    if any(u is None for u in us):
        return ()
    flat = [p.route.name for p, u in zip(plans, us) if not u.carries_uncertainty]
    note = None
    if flat:
        note = (f"not ranked: {_join(flat)} {'carries' if len(flat) == 1 else 'carry'} no uncertainty "
                "(no step gives a yield range)")
    labels = [None if u.carries_uncertainty else "no yield ranges: carries no uncertainty" for u in us]
    if not flat:
        labels = []
    level = f"{100 * us[0].confidence:g} %"
    return (
        _row("probability_of_target", "probability of delivering the target (yields drawn)",
             "probability of delivering", "-", "fraction", HIGHER,
             [u.probability_of_target if u.carries_uncertainty else None for u in us], labels, note),
        _row("confidence_target", f"target to plan for {level} confidence, before overage",
             "confidence target", "kg", "mass", LOWER,
             [u.target_kg if u.carries_uncertainty else None for u in us], labels, note),
    )


def _rows(plans: Sequence["Plan"]) -> tuple[CompareRow, ...]:
    ms = [p.metrics for p in plans]
    largest = [m.largest_raw_material for m in ms]
    return (
        _row("target_mass", "target mass planned, overage included", "target mass", "kg", "mass", None,
             [p.target_mass.m_as("kg") for p in plans]),
        _row("steps", "steps", "steps", "-", "count", LOWER, [m.step_count for m in ms]),
        _row("longest_linear_sequence", "longest linear sequence", "longest linear sequence", "-", "count",
             LOWER, [len(m.longest_linear_sequence) for m in ms],
             [" → ".join(m.longest_linear_sequence) for m in ms]),
        _row("overall_yield", "overall yield along the longest linear sequence", "overall yield", "-",
             "fraction", HIGHER, [p.overall_yield.yield_ for p in plans]),
        _row("pmi", "process mass intensity (PMI)", "PMI", "kg/kg", "ratio", LOWER, [m.pmi for m in ms]),
        _row("e_factor_complete", "complete E-factor (cEF)", "complete E-factor", "kg/kg", "ratio", LOWER,
             [m.e_factor_complete for m in ms]),
        _row("e_factor_simple", "simple E-factor (sEF)", "simple E-factor", "kg/kg", "ratio", LOWER,
             [m.e_factor_simple for m in ms]),
        _cost_row(plans),
        _row("batches", "batches, all steps", "batches", "-", "count", LOWER,
             [sum(sp.batches for sp in p.steps) for p in plans]),
        _row("largest_raw_material", "largest single raw material", "largest single raw material", "kg",
             "mass", LOWER, [None if x is None else x[1] for x in largest],
             [None if x is None else x[0] for x in largest]),
    ) + _time_waste_rows(plans) + _uncertainty_rows(plans)


def compare_plans(plans: Sequence["Plan"], notes: Sequence[str] = ()) -> Comparison:
    """Lay plans of routes to one target side by side.

    Parameters
    ----------
    plans : sequence of Plan
        Two or more plans, each with its metrics, planned for the same target mass.
    notes : sequence of str
        Sentences to carry (how the target mass was chosen).

    Returns
    -------
    Comparison
        Rows with the best value of each marked, and the trade-off sentence.

    Raises
    ------
    CompareError
        Fewer than two plans, or plans of different targets.
    """
    plans = tuple(plans)
    check_same_target([p.route for p in plans])
    from routeplan.plan.metrics import compute_metrics

    plans = tuple(p if p.metrics is not None else _with_metrics(p, compute_metrics(p)) for p in plans)
    labels = _labels(plans)
    rows = _unranked_without_ranges(plans, labels, _rows(plans))
    currencies = {p.route.currency for p in plans}
    amounts = [p.target_mass.m_as("kg") / (1 + p.route.target.overage) for p in plans]
    if any(not math.isclose(a, amounts[0], rel_tol=1e-9) for a in amounts):
        each = ", ".join(f"{_who(p.route)} {a:.6g} kg" for p, a in zip(plans, amounts))
        raise CompareError(f"plans for different target masses cannot be compared ({each})",
                           hint="plan every route for the same mass, e.g. with plan_for_comparison")
    return Comparison(
        labels=labels,
        names=tuple(p.route.name for p in plans),
        files=tuple(_file(p.route) for p in plans),
        target_material=plans[0].target_material,
        amount=amounts[0],
        currency=next(iter(currencies)) if len(currencies) == 1 else None,
        rows=rows,
        notes=tuple(notes),
        plans=plans,
    )


#: Rows that do not depend on the step yields, ranked whatever yields were planned.
_YIELD_FREE_ROWS = ("target_mass", "steps", "longest_linear_sequence")


def _unranked_without_ranges(plans, labels, rows):
    """``rows`` with no best value marked where a yield-dependent row compares a route
    planned at the low (or high) yields with steps that have no such yield: those steps
    were planned at their expected yields, so the route would be ranked as if certain."""
    from dataclasses import replace

    gaps = [(label, p.yield_basis) for label, p in zip(labels, plans)
            if p.yield_basis != "expected" and p.yields_without_range]
    if not gaps:
        return rows
    note = (f"not ranked: {', '.join(label for label, _ in gaps)} ha{'s' if len(gaps) == 1 else 've'} steps "
            f"without a {gaps[0][1]} yield, planned at their expected yields")
    return tuple(r if r.key in _YIELD_FREE_ROWS or r.better is None else replace(r, best=(), note=note)
                 for r in rows)


def _with_metrics(plan: "Plan", metrics) -> "Plan":
    from dataclasses import replace

    return replace(plan, metrics=metrics)


def compare_routes(routes: Sequence["Route"], target: "pint.Quantity | str | None" = None) -> Comparison:
    """Plan routes to one target for the same target mass and compare them.

    Parameters
    ----------
    routes : sequence of Route
        Two or more loaded routes.
    target : pint.Quantity or str, optional
        Mass to deliver [kg]; default the first route's ``target.amount``.

    Returns
    -------
    Comparison
    """
    plans, notes = plan_for_comparison(routes, target)
    return compare_plans(plans, notes)
