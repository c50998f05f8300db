"""Side-by-side comparison of routes to one target: rows, the best value per row, the trade-off.

Every route is planned for the same mass of the same target; the comparison then reads
each plan and its :class:`~routeplan.plan.metrics.Metrics` (it computes no metric of its
own) and lays them out as rows, one value per route.  In each ranked row the best value
is marked: lower is better, except for the overall yield.  A row is ranked only when
every route has a value that can be set beside the others (a cost needs one currency
and a price for every raw material); otherwise an :class:`Unranked` record says why not.

This module holds data only: keys, values, closed-vocabulary reasons and the data they
name.  Headings, the texts beside values, the not-ranked sentences and the notes are
worded in :mod:`routeplan.views.compare_words`.
"""

from __future__ import annotations

import math
from dataclasses import field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Sequence, Union

from routeplan.errors import CompareError, RouteplanError
from routeplan.frozen import frozen
from routeplan.vocab import BetterIs, UnrankedReason, ValueKind, ValueQualifier, YieldCase

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
    "Unranked",
    "Comparison",
    "CompareNote",
    "TargetFromFirst",
    "OveragesDiffer",
    "YieldsPlanned",
    "StepsWithoutYield",
    "YieldsDrawn",
    "who",
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
class Unranked:
    """Why a row that could be ranked is not: a reason and the data it names.

    Attributes
    ----------
    reason : UnrankedReason
    routes : tuple of int
        The routes concerned, as indices in route order: those with unpriced items
        (``UNPRICED_MATERIALS``, ``UNPRICED_ITEMS``), those that carry no uncertainty
        (``NO_UNCERTAINTY``), those with steps without a yield of the case planned
        (``YIELDS_WITHOUT_CASE``); empty for the other reasons.
    items : tuple of tuple of str
        With ``UNPRICED_*``: the keys without a price of each route in ``routes``.
    currencies : tuple of str or None
        With ``CURRENCIES``: the currencies the routes give (None for a route without
        one), each once, in the order of their words.
    yields : YieldCase or None
        With ``YIELDS_WITHOUT_CASE``: the yield case planned.
    """

    reason: UnrankedReason
    routes: tuple[int, ...] = ()
    items: tuple[tuple[str, ...], ...] = ()
    currencies: tuple[str | None, ...] = ()
    yields: YieldCase | None = None


@frozen
class CompareRow:
    """One measure, one value per route.

    Attributes
    ----------
    key : str
        Machine key (JSON), e.g. ``"pmi"``; the views word the row by it.
    unit : str
        Unit of ``values``: ``"-"`` for counts and fractions, ``"kg/kg"``, ``"h"``,
        ``"EUR/kg"`` (``"currency/kg"`` when the routes give none or differ), ``"kg"``.
    kind : ValueKind
        What a value is: a count, a fraction, a ratio, money or a mass.
    better : BetterIs or None
        :data:`LOWER`, :data:`HIGHER`, or None for a row that is not ranked by nature.
    values : tuple
        One value per route, in route order; None where there is none.
    which : tuple
        The data that goes with each value, in route order: the material key of the
        largest raw material, the step ids of the longest linear sequence (a tuple), the
        pace-setting step of the campaign; None for a route without; empty when the
        row has none.
    qualifiers : tuple of ValueQualifier or None
        What bounds each value (a cost over priced items only, no uncertainty carried),
        in route order; empty when no value is bounded.
    best : tuple of int
        Indices of the routes holding the best value; empty when the row is not ranked
        or every route has the same value.
    unranked : Unranked or None
        Why the row is not ranked, when it could be.
    """

    key: str
    unit: str
    kind: ValueKind
    better: BetterIs | None
    values: tuple[Any, ...]
    which: tuple[Any, ...] = ()
    qualifiers: tuple[ValueQualifier | None, ...] = ()
    best: tuple[int, ...] = ()
    unranked: Unranked | None = None

    @property
    def ranked(self) -> bool:
        """True when a best value is marked."""
        return bool(self.best)

    @property
    def all_equal(self) -> bool:
        """True when the row is rankable and every route has the same value."""
        return (self.better is not None and not self.best and self.unranked is None
                and all(v is not None for v in self.values))


# ----------------------------------------------------------------- the notes


@frozen
class TargetFromFirst:
    """Every route is planned for the first route's target amount; others asked otherwise.

    Attributes
    ----------
    amount_kg : float
        The first route's target amount, asked of every route [kg].
    asked : tuple of (int, float)
        Each other route whose amount differs: its index and the amount it asks [kg].
    """

    amount_kg: float
    asked: tuple[tuple[int, float], ...]


@frozen
class OveragesDiffer:
    """The routes plan different overages, so the masses planned differ.

    Attributes
    ----------
    overages : tuple of float
        Each route's overage, in route order [-].
    """

    overages: tuple[float, ...]


@frozen
class YieldsPlanned:
    """Every route is planned at its steps' low (or high) yields."""

    case: YieldCase


@frozen
class StepsWithoutYield:
    """Steps of one route without a yield of the case planned, planned at the expected one.

    Attributes
    ----------
    route : int
        Index of the route.
    steps : tuple of str
        Ids of the steps.
    case : YieldCase
        The yield case planned.
    """

    route: int
    steps: tuple[str, ...]
    case: YieldCase


@frozen
class YieldsDrawn:
    """Every route's step yields are drawn (``--confidence``).

    Attributes
    ----------
    draws, seed : int
        Number of draws [-] and the seed of the generator.
    distribution : str
        The distribution's name (``"beta-PERT"``).
    """

    draws: int
    distribution: str
    seed: int


#: What the reader of a comparison must know, as data (worded in the views).
CompareNote = Union[TargetFromFirst, OveragesDiffer, YieldsPlanned, StepsWithoutYield, YieldsDrawn]


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
    notes : tuple of CompareNote
        What the reader must know (the target mass chosen, differing overages, the yields
        planned or drawn), as records.
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
    notes: tuple[CompareNote, ...] = ()
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


def who(route: "Route") -> str:
    """How an error or a note names a route: ``'file' (name)``, or ``'name'`` without a file."""
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
                f"routes to different targets cannot be compared: {who(first)} makes "
                f"{_describe_target(first)} but {who(other)} makes {_describe_target(other)}; {what}",
                hint="compare routes to one target, with the same material key and formula in every file")


# ------------------------------------------------------------- planning them


def comparison_amount(routes: Sequence["Route"], target: "pint.Quantity | str | None" = None):
    """The mass to ask of every route [kg], and notes on how it was chosen.

    Without ``target`` the first route's ``target.amount`` is used for every route.

    Returns
    -------
    amount : pint.Quantity
        Mass to deliver [kg], before each route's overage.
    notes : list of CompareNote
        :class:`TargetFromFirst` when the other routes ask for other amounts,
        :class:`OveragesDiffer` when the routes' overages differ.
    """
    from routeplan.units import parse_quantity

    notes: list[CompareNote] = []
    if target is None:
        amount = routes[0].target.amount.to("kg")
        differ = [(i, r.target.amount.m_as("kg")) for i, r in enumerate(routes) if i
                  and not math.isclose(r.target.amount.m_as("kg"), amount.m_as("kg"), rel_tol=1e-12)]
        if differ:
            notes.append(TargetFromFirst(amount.m_as("kg"), tuple(differ)))
    elif isinstance(target, str):
        amount = parse_quantity(target, "mass").to("kg")
    else:
        amount = target.to("kg")
    if len({r.target.overage for r in routes}) > 1:
        notes.append(OveragesDiffer(tuple(r.target.overage for r in routes)))
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
    notes : list of CompareNote
        From :func:`comparison_amount`; then, at low or high yields, :class:`YieldsPlanned`
        and a :class:`StepsWithoutYield` per route with steps that lack that yield; with
        ``confidence``, :class:`YieldsDrawn`.
    """
    from routeplan.plan.planner import plan_route

    check_same_target(routes)
    amount, notes = comparison_amount(routes, target)
    plans = tuple(plan_route(r, amount, yields=yields, confidence=confidence, draws=draws, seed=seed)
                  for r in routes)
    if yields != YieldCase.EXPECTED:
        case = YieldCase(yields)
        notes = [*notes, YieldsPlanned(case)]
        notes += [StepsWithoutYield(i, tuple(p.yields_without_range), case)
                  for i, p in enumerate(plans) if p.yields_without_range]
    if confidence is not None:
        u = plans[0].uncertainty
        notes = [*notes, YieldsDrawn(u.draws, u.distribution, u.seed)]
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


def _row(key, unit, kind, better, values, which=(), qualifiers=(), unranked=None) -> CompareRow:
    values = tuple(values)
    best = best_indices(values, better) if unranked is None else ()
    if better is not None and unranked is None and any(v is None for v in values):
        unranked = Unranked(UnrankedReason.NO_VALUE)
    return CompareRow(key, unit, ValueKind(kind), better, values, tuple(which), tuple(qualifiers), best, unranked)


def _currencies(currencies) -> tuple[str | None, ...]:
    """The different currencies of the routes, each once, in the order of their words."""
    return tuple(sorted(currencies, key=str))


def _cost_row(plans: Sequence["Plan"]) -> CompareRow:
    ms = [p.metrics for p in plans]
    currencies = {m.currency for m in ms}
    currency = next(iter(currencies)) if len(currencies) == 1 else None
    unit = f"{currency}/kg" if currency else "currency/kg"
    values = [m.cost_per_kg for m in ms]
    unranked = None
    if len(currencies) > 1:
        unranked = Unranked(UnrankedReason.CURRENCIES, currencies=_currencies(currencies))
    elif any(v is None for v in values):
        unranked = Unranked(UnrankedReason.NO_COST)
    elif any(m.unpriced for m in ms):
        gaps = [(i, tuple(m.unpriced)) for i, m in enumerate(ms) if m.unpriced]
        unranked = Unranked(UnrankedReason.UNPRICED_MATERIALS, routes=tuple(i for i, _ in gaps),
                            items=tuple(g for _, g in gaps))
    qualifiers = [ValueQualifier.PRICED_MATERIALS_ONLY if m.unpriced and m.cost_per_kg is not None else None
                  for m in ms]
    return _row("cost_per_kg", unit, "money", LOWER, values, (), qualifiers if any(qualifiers) else (), unranked)


def _cog_row(plans: Sequence["Plan"], key: str, part: str | None) -> CompareRow:
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

    unranked = None
    if len(currencies) > 1:
        unranked = Unranked(UnrankedReason.CURRENCIES, currencies=_currencies(currencies))
    elif any(v is None for v in values):
        unranked = Unranked(UnrankedReason.NOTHING_PRICED)
    elif any(gaps(c) for c in cogs):
        listed = [(i, gaps(c)) for i, c in enumerate(cogs) if gaps(c)]
        unranked = Unranked(UnrankedReason.UNPRICED_ITEMS, routes=tuple(i for i, _ in listed),
                            items=tuple(g for _, g in listed))
    qualifiers = [ValueQualifier.PRICED_ITEMS_ONLY if gaps(c) and v is not None else None
                  for c, v in zip(cogs, values)]
    return _row(key, f"{currency}/kg" if currency else "currency/kg", "money", LOWER, values, (),
                qualifiers if any(qualifiers) else (), unranked)


def _time_waste_rows(plans: Sequence["Plan"]) -> tuple[CompareRow, ...]:
    """Campaign duration, halogenated waste and the cost of goods, whole and by part."""
    hours = [None if p.schedule is None else p.schedule.campaign_h for p in plans]
    unranked = Unranked(UnrankedReason.NO_SCHEDULE) if any(h is None for h in hours) else None
    halogenated = [None if p.waste is None else p.waste.total.halogenated_kg / p.waste.product_kg for p in plans]
    return (
        _row("campaign_h", "h", "ratio", LOWER, hours,
             [p.schedule.pace_step for p in plans] if unranked is None else (), (), unranked),
        _row("halogenated_waste_per_kg", "kg/kg", "ratio", LOWER, halogenated),
        _cog_row(plans, "cost_of_goods_per_kg", None),
        _cog_row(plans, "plant_cost_per_kg", "plant"),
        _cog_row(plans, "waste_cost_per_kg", "waste"),
    )


def _uncertainty_rows(plans: Sequence["Plan"]) -> tuple[CompareRow, ...]:
    """Probability of delivering and the confidence target, when the yields were drawn.

    A route whose steps give no yield range carries no uncertainty: it has no value in
    these rows (never a probability of 1), and the rows are then not ranked.
    """
    us = [p.uncertainty for p in plans]
    if any(u is None for u in us):
        return ()
    flat = tuple(i for i, u in enumerate(us) if not u.carries_uncertainty)
    unranked = Unranked(UnrankedReason.NO_UNCERTAINTY, routes=flat) if flat else None
    qualifiers = [None if u.carries_uncertainty else ValueQualifier.NO_UNCERTAINTY for u in us] if flat else ()
    return (
        _row("probability_of_target", "-", "fraction", HIGHER,
             [u.probability_of_target if u.carries_uncertainty else None for u in us], (), qualifiers, unranked),
        _row("confidence_target", "kg", "mass", LOWER,
             [u.target_kg if u.carries_uncertainty else None for u in us], (), qualifiers, unranked),
    )


def _rows(plans: Sequence["Plan"]) -> tuple[CompareRow, ...]:
    ms = [p.metrics for p in plans]
    largest = [m.largest_raw_material for m in ms]
    return (
        _row("target_mass", "kg", "mass", None, [p.target_mass.m_as("kg") for p in plans]),
        _row("steps", "-", "count", LOWER, [m.step_count for m in ms]),
        _row("longest_linear_sequence", "-", "count", LOWER, [len(m.longest_linear_sequence) for m in ms],
             [tuple(m.longest_linear_sequence) for m in ms]),
        _row("overall_yield", "-", "fraction", HIGHER, [p.overall_yield.yield_ for p in plans]),
        _row("pmi", "kg/kg", "ratio", LOWER, [m.pmi for m in ms]),
        _row("e_factor_complete", "kg/kg", "ratio", LOWER, [m.e_factor_complete for m in ms]),
        _row("e_factor_simple", "kg/kg", "ratio", LOWER, [m.e_factor_simple for m in ms]),
        _cost_row(plans),
        _row("batches", "-", "count", LOWER, [sum(sp.batches for sp in p.steps) for p in plans]),
        _row("largest_raw_material", "kg", "mass", LOWER, [None if x is None else x[1] for x in largest],
             [None if x is None else x[0] for x in largest]),
    ) + _time_waste_rows(plans) + _uncertainty_rows(plans)


def compare_plans(plans: Sequence["Plan"], notes: Sequence[CompareNote] = ()) -> Comparison:
    """Lay plans of routes to one target side by side.

    Parameters
    ----------
    plans : sequence of Plan
        Two or more plans, each with its metrics, planned for the same target mass.
    notes : sequence of CompareNote
        Notes to carry (how the target mass was chosen, the yields planned), as
        :func:`plan_for_comparison` gives them.

    Returns
    -------
    Comparison
        Rows with the best value of each marked (the views word them and the trade-off).

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
    rows = _unranked_without_ranges(plans, _rows(plans))
    currencies = {p.route.currency for p in plans}
    amounts = [p.asked_kg for p in plans]
    if any(not math.isclose(a, amounts[0], rel_tol=1e-9) for a in amounts):
        raise CompareError("plans for different target masses cannot be compared ("
                           + ", ".join(f"{who(p.route)} {a:.6g} kg" for p, a in zip(plans, amounts)) + ")",
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


def _unranked_without_ranges(plans, rows):
    """``rows`` with no best value marked where a yield-dependent row compares a route
    planned at the low (or high) yields with steps that have no such yield: those steps
    were planned at their expected yields, so the route would be ranked as if certain."""
    from dataclasses import replace

    gaps = [i for i, p in enumerate(plans) if p.yield_basis != "expected" and p.yields_without_range]
    if not gaps:
        return rows
    unranked = Unranked(UnrankedReason.YIELDS_WITHOUT_CASE, routes=tuple(gaps),
                        yields=YieldCase(plans[gaps[0]].yield_basis))
    return tuple(r if r.key in _YIELD_FREE_ROWS or r.better is None else replace(r, best=(), unranked=unranked)
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
