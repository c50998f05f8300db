"""What the HTML report shows, from a Plan: rows, sentences and chart series.

Every number is read from the Plan (through :mod:`routeplan.views.tables` where the
terminal reads it too); nothing here computes a charge, a yield or a metric.  Amounts,
masses and volumes are shown as the terminal shows them: in one set of units for the
whole plan (:mod:`routeplan.views.display_units`), by the rule of
:mod:`routeplan.views.numbers`.  Each cell keeps its number in a fixed unit (kg, L, mol,
[-]) beside the text shown, so that the writer can put it in a ``data-value`` attribute
and a test can read the report back.
:mod:`routeplan.export.html` only lays this out.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.frozen import frozen
from routeplan.views.display_units import KIND_OF_BASE, DisplayUnits, plan_units
from routeplan.views.numbers import pct
from routeplan.views.tables import fmt, raw_material_rows, step_charge_rows

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan

__all__ = ["Cell", "Table", "Section", "ChargeDerivation", "StepSection", "ChartData", "Report", "plan_report",
           "charge_table", "charge_derivations_view", "chart_data", "fact_table", "columns_table"]



@frozen
class Cell:
    """A table cell: text shown, the number behind it in the column's base unit, and the
    anchor of the line that derives it (``link``), where the report shows derivations."""

    text: str
    value: float | None = None
    numeric: bool = False
    link: str | None = None


@frozen
class Table:
    """A table: column keys, headings (with units) and rows of cells; ``keys_by_row``
    names each row where rows are facts (``p10``, ``buy:water``)."""

    keys: tuple[str, ...]
    headings: tuple[str, ...]
    rows: tuple[tuple[Cell, ...], ...]
    units: tuple[str, ...] = ()
    keys_by_row: tuple[str, ...] = ()


@frozen
class Section:
    """A section from an optional part of the Plan (uncertainty, safety, record, ...).

    Attributes
    ----------
    key : str
        The Plan field it shows, e.g. ``"uncertainty"``.
    heading : str
        Heading shown.
    lines : tuple of str
        Sentences.
    facts : Table or None
        Item, value and note rows, the value's number in ``data-value``.
    """

    key: str
    heading: str
    lines: tuple[str, ...] = ()
    facts: Table | None = None


@frozen
class ChargeDerivation:
    """How the plan gets the numbers of one charge, as the report shows it.

    Attributes
    ----------
    anchor : str
        Id of the block; ``anchor + "-" + k`` is the id of its line k (1-based).
    order : int
        The charge's number in its step.
    material : str
    explanation : Explanation
        The lines (:func:`routeplan.views.derivation_text.charge_explanation`, cut at
        the step: an amount another step derives links to it).
    links : tuple of (str or None)
        For each factor of each line, in order, the anchor of the line that derives it
        elsewhere in the report, else None; one tuple per line.
    """

    anchor: str
    order: int
    material: str
    explanation: Any
    links: tuple[tuple[str | None, ...], ...]


@frozen
class StepSection:
    """One step of the report.

    Attributes
    ----------
    id, title, equation : str
        Step id, heading and the equation as written.
    yield_ : float
        Yield used [-].
    telescoped : bool
        True when the product goes on in solution.
    charges : Table or None
        The charge table; None when the step does not run.
    facts : tuple of (str, str)
        Label and text: product made, batches, vessel and fill, notes.
    batches : int
        Batches [-].
    fill : float or None
        Fill of the vessel per batch [-].
    extra : tuple of Section
        Sections from optional Plan fields.
    derivations : tuple of ChargeDerivation
        How each charge's numbers are made, where the plan has a derivation; the
        numbers of the charge table link to their lines.
    """

    id: str
    title: str
    equation: str
    yield_: float
    telescoped: bool
    charges: Table | None
    facts: tuple[tuple[str, str], ...]
    batches: int
    fill: float | None
    extra: tuple[Section, ...] = ()
    derivations: tuple[ChargeDerivation, ...] = ()


@frozen
class ChartData:
    """Series for the charts, every value in the unit named.

    Attributes
    ----------
    mass_by_material : tuple of (str, float)
        Raw material and its mass per kg of target [kg/kg], largest first.
    mass_by_step : tuple of (str, tuple of (str, float))
        Step id and the mass of each raw material charged in it per kg of target [kg/kg].
    pmi : float or None
        Route process mass intensity [kg/kg] (``plan.metrics.pmi``).
    cost_by_material : tuple of (str, float)
        Raw material and its cost over the campaign [currency], largest first.
    currency : str or None
        Currency of the costs.
    unpriced : tuple of str
        Raw materials without a price.
    yield_sequence : tuple of (str, float, float)
        Along the longest linear sequence: step id, step yield [-], yield so far [-].
    overall_yield : float
        ``plan.overall_yield.yield_`` [-].
    delivery : dict or None
        The delivered-mass histogram of the yield draws
        (:func:`routeplan.views.uncertainty_text.histogram_data`: bin edges [kg], counts,
        required mass and percentiles [kg]); None without uncertainty or without ranges.
    contributions : tuple of (str, float)
        Each drawn step's share of the spread [-], largest first; empty without.
    timeline : dict or None
        Vessels and batches over the campaign (``timeline_data`` of
        :mod:`routeplan.views.schedule_text`: lanes of bars, hours [h]); None without a schedule.
    """

    mass_by_material: tuple[tuple[str, float], ...]
    mass_by_step: tuple[tuple[str, tuple[tuple[str, float], ...]], ...]
    pmi: float | None
    cost_by_material: tuple[tuple[str, float], ...]
    currency: str | None
    unpriced: tuple[str, ...]
    yield_sequence: tuple[tuple[str, float, float], ...]
    overall_yield: float
    delivery: dict | None = None
    contributions: tuple[tuple[str, float], ...] = ()
    timeline: dict | None = None


@frozen
class Report:
    """Everything the report of one plan shows; ``units`` are the units its amounts,
    masses and volumes are shown in."""

    title: str
    target_material: str
    target_name: str
    summary: tuple[tuple[str, str, str, float | None], ...]
    steps: tuple[StepSection, ...]
    raw_materials: Table
    metrics: tuple[str, ...]
    stock: tuple[str, ...]
    warnings: tuple[str, ...]
    charts: ChartData
    extra: tuple[Section, ...] = ()
    units: DisplayUnits | None = None


def charge_table(sp: "StepPlan", route, units: DisplayUnits, links: dict[tuple[int, str], str] | None = None
                 ) -> Table:
    """The charge table of one step: the terminal's rows, columns and units.

    Columns (:func:`~routeplan.views.plan_text.charge_columns`): #, material, role, equiv
    [-], amount, mass and volume (in ``units``, the plan's one set), and per batch when
    the step has several.  The numbers behind the cells are in mol, kg and L.  ``links`` maps
    (row, column key) to the anchor of the line deriving that number.
    """
    from routeplan.views.plan_text import CHARGE_TEXT_COLUMNS, CHARGE_UNITS, charge_cell, charge_columns

    links = links or {}
    columns = charge_columns(sp, units)

    def cell(i: int, r: dict, key: str) -> Cell:
        text = charge_cell(r, key, units, route.maker)
        if key in CHARGE_TEXT_COLUMNS:
            return Cell(text)
        value = r[key]
        return Cell(text, value, True, None if value is None else links.get((i, key)))

    out = tuple(tuple(cell(i, r, key) for key, _h in columns) for i, r in enumerate(step_charge_rows(sp)))
    return Table(tuple(k for k, _h in columns), tuple(h for _k, h in columns), out,
                 tuple(CHARGE_UNITS[k] for k, _h in columns))


#: The charge table's column of each of a charge's numbers.
_AMOUNT_COLUMN = {"n": "mol", "m": "mass_kg", "V": "volume_L"}


def charge_derivations_view(plan: "Plan", units: DisplayUnits | None = None
                            ) -> dict[str, tuple[tuple[ChargeDerivation, ...], dict]]:
    """Step id -> (the derivation of each charge, the charge table's links to their lines).

    Each charge's lines stop at the amounts another step derives (the demand on the
    step, from the step that uses its product); such a factor links to the line that
    derives it, in that step's charge.  A charge's results are in ``units`` (the plan's,
    as its charge table; default :func:`~routeplan.views.display_units.plan_units`).
    Empty when the plan has no derivation.
    """
    from routeplan.views.derivation_text import step_explanations

    shown, first = step_explanations(plan, units)
    anchors = [f"d{si + 1}-{ci + 1}" for si, _sid, ci, _c, _ex in shown]
    home = {origin: f"{anchors[k]}-{li + 1}" for origin, (k, li) in first.items()}
    out: dict[str, tuple[list, dict]] = {}
    for anchor, (_si, sid, ci, c, ex) in zip(anchors, shown):
        derivations, links = out.setdefault(sid, ([], {}))
        derivations.append(ChargeDerivation(
            anchor, c.order, c.material, ex,
            tuple(tuple(None if f.elsewhere is None else home.get(f.elsewhere) for f in line.factors)
                  for line in ex.lines)))
        for k, line in enumerate(ex.lines, 1):
            if line.amount is not None:
                links[(ci, _AMOUNT_COLUMN[line.amount])] = f"{anchor}-{k}"
    return {sid: (tuple(d), links) for sid, (d, links) in out.items()}


def _step_facts(plan: "Plan", sp: "StepPlan", u: DisplayUnits) -> tuple[tuple[str, str], ...]:
    from routeplan.views.plan_text import batch_notes
    from routeplan.views.transfer_text import transfer_text

    facts = []
    if sp.runs:
        pm = sp.product_m_kg
        how = "as isolated" if sp.isolated else "in solution, carried on"
        facts.append(("makes", f"{u.amount_text(sp.product_n_mol)} {sp.product} ({u.mass_text(pm)} {how})"))
        b = sp.batch
        if b is not None:
            n = b.batches
            text = f"{n} batch{'es' if n != 1 else ''} of {u.volume_text(b.batch_V_L)}"
            if b.vessel is not None:
                text += f" in {b.vessel}"
                if b.fill_fraction is not None:
                    text += f", fill {pct(b.fill_fraction)} of nominal volume"
            facts.append(("batches", text))
            limiting_kg = b.per_batch(b.limiting_m_kg)
            if limiting_kg is not None and n > 1:
                facts.append(("per batch", f"{u.mass_text(limiting_kg)} of {sp.limiting} charged, "
                                           f"{u.mass_text(b.per_batch(b.product_m_kg))} of {sp.product} made"))
            for note in batch_notes(sp, u, plan.route):
                facts.append(("note", note))
        transfer = transfer_text(plan, sp, u)
        if transfer:
            facts.append(("goes on", transfer))
    else:
        facts.append(("not run", sp.not_run))
    if sp.stock_m_kg is not None and sp.stock_m_kg > 0:
        facts.append(("from stock", f"{u.mass_text(sp.stock_m_kg)} of {sp.product} taken from stock"))
    if sp.notes:
        facts.append(("notes", sp.notes))
    return tuple(facts)


_HEADINGS = {"uncertainty": "Yield uncertainty", "safety": "Safety screening", "record": "Campaign record",
             "schedule": "Schedule", "waste": "Waste", "cost_of_goods": "Cost of goods"}


def fact_table(rows, units: DisplayUnits) -> Table | None:
    """Rows of ``key, item, value, unit, kind, note`` (the sheets' fact rows) as a table;
    a mass [kg] is shown in ``units`` (the plan's)."""
    if not rows:
        return None
    u = units
    out = []
    for r in rows:
        v, kind = r["value"], r.get("kind", "text")
        if kind == "mass" and isinstance(v, (int, float)):
            cell = Cell(u.mass_text(v), v, True)
        elif kind == "fraction" and isinstance(v, (int, float)):
            cell = Cell(f"{100 * v:.1f} %", v, True)
        elif isinstance(v, (int, float)) and not isinstance(v, bool):
            cell = Cell(f"{fmt(v)} {r.get('unit', '')}".strip(), v, True)
        else:
            cell = Cell("" if v is None else str(v))
        out.append((Cell(r["item"]), cell, Cell(r.get("note", "") or "")))
    return Table(("item", "value", "note"), ("", "value", "note"), tuple(out),
                 keys_by_row=tuple(r["key"] for r in rows))


def columns_table(columns, rows, units: DisplayUnits | None = None) -> Table:
    """Rows of plain values as a table with the given :class:`~routeplan.views.tables.Column` s.

    Numbers are shown to four significant figures (fractions of a column with unit ``-``
    and a heading saying yield, assay or share as %), text as it is.  With ``units`` (the
    plan's), a column in mol, kg or L is shown in their unit of its kind, by the rule of
    :mod:`routeplan.views.numbers`; the numbers behind stay in mol, kg and L.
    """
    percent = {c.key for c in columns if c.unit == "-" and any(w in c.heading for w in ("yield", "assay", "share"))}
    kinds = {c.key: KIND_OF_BASE[c.unit] for c in columns if units is not None and c.unit in KIND_OF_BASE}
    out = []
    for r in rows:
        cells = []
        for c in columns:
            v = r.get(c.key)
            if isinstance(v, bool) or v is None or not isinstance(v, (int, float)):
                cells.append(Cell("" if v is None else ("yes" if v is True else "" if v is False else str(v))))
            elif c.key in percent:
                cells.append(Cell(f"{100 * v:.1f} %", float(v), True))
            elif c.key in kinds:
                cells.append(Cell(units.number(float(v), kinds[c.key]), float(v), True))
            else:
                cells.append(Cell(fmt(float(v)), float(v), True))
        out.append(tuple(cells))
    heads = tuple(f"{c.heading} [%]" if c.key in percent
                  else units.heading(c.heading, kinds[c.key]) if c.key in kinds else c.title for c in columns)
    return Table(tuple(c.key for c in columns), heads, tuple(out), tuple(c.unit for c in columns))


def _view(module: str):
    """The view module ``routeplan.views.<module>``, or None while the Plan part it shows is not built."""
    import importlib

    try:
        return importlib.import_module(f"routeplan.views.{module}")
    except ImportError:
        return None


def _uncertainty_section(plan: "Plan", u: DisplayUnits) -> Section | None:
    v = _view("uncertainty_text")
    return None if v is None else Section("uncertainty", _HEADINGS["uncertainty"],
                                          facts=fact_table(v.uncertainty_fact_rows(plan, u), u))


def _record_section(plan: "Plan", u: DisplayUnits) -> Section | None:
    v = _view("record_text")
    if v is None:
        return None
    return Section("record", _HEADINGS["record"],
                   lines=tuple(x.strip() for x in v.record_lines(plan, u) if x.strip()),
                   facts=columns_table(v.IN_HAND_COLUMNS, v.in_hand_rows(plan), u) if plan.record.in_hand else None)


def _schedule_section(plan: "Plan", u: DisplayUnits) -> Section | None:
    v = _view("schedule_text")
    if v is None:
        return None
    pace = v.pace_text(plan)
    return Section("schedule", _HEADINGS["schedule"], lines=(pace,) if pace else (),
                   facts=columns_table(v.VESSEL_USE_COLUMNS, v.vessel_rows(plan)))


def _waste_section(plan: "Plan", u: DisplayUnits) -> Section | None:
    v = _view("waste_cost_text")
    return None if v is None else Section("waste", _HEADINGS["waste"],
                                          lines=tuple(x.strip() for x in v.waste_lines(plan, u) if x.strip()))


def _cost_section(plan: "Plan", u: DisplayUnits) -> Section | None:
    v = _view("waste_cost_text")
    return None if v is None else Section("cost_of_goods", _HEADINGS["cost_of_goods"],
                                          lines=tuple(x.strip() for x in v.cost_lines(plan) if x.strip()))


#: Plan field -> the section that shows it (only where the Plan has the field set).
_SECTIONS = {"uncertainty": _uncertainty_section, "record": _record_section, "schedule": _schedule_section,
             "waste": _waste_section, "cost_of_goods": _cost_section}


def _plan_sections(plan: "Plan", u: DisplayUnits) -> tuple[Section, ...]:
    return tuple(sec for name, build in _SECTIONS.items()
                 if getattr(plan, name, None) is not None and (sec := build(plan, u)) is not None)


def _step_sections(plan: "Plan", sp: "StepPlan", u: DisplayUnits) -> tuple[Section, ...]:
    """The step's safety block (screening estimates) and its recorded lots, where the Plan has them."""
    out = []
    v = _view("safety_text") if getattr(sp, "safety", None) is not None else None
    if v is not None:
        pairs = v.sheet_safety_pairs(sp, u)
        if pairs:
            out.append(Section("safety", f"Safety per batch: {v.SCREENING_NOTE}",
                               facts=Table(("item", "value"), ("", ""),
                                           tuple((Cell(a), Cell(b)) for a, b in pairs))))
    v = _view("record_text") if getattr(plan, "record", None) is not None else None
    if v is not None:
        lots = [r for r in v.lot_rows(plan) if r["step"] == sp.id]
        if lots:
            out.append(Section("record", "Lots recorded", facts=columns_table(v.LOT_COLUMNS, lots, u)))
    return tuple(out)


def chart_data(plan: "Plan") -> ChartData:
    """The chart series of ``plan`` (see :class:`ChartData`)."""
    target = plan.target_kg
    m = plan.metrics
    by_material = sorted(((r.material, r.m_kg / target) for r in plan.raw_materials),
                         key=lambda kv: -kv[1])
    by_step = []
    for sp in plan.steps:
        parts: dict[str, float] = {}
        for c in sp.charges:
            if not c.intermediate:
                parts[c.material] = parts.get(c.material, 0.0) + c.m_kg / target
        by_step.append((sp.id, tuple(parts.items())))
    costs = sorted(((r.material, r.cost) for r in plan.raw_materials if r.cost is not None), key=lambda kv: -kv[1])
    unpriced = tuple(r.material for r in plan.raw_materials if r.cost is None) if plan.route.currency else ()
    seq, so_far = [], 1.0
    for sid in plan.overall_yield.longest_linear_sequence:
        y = plan.step(sid).yield_
        so_far *= y
        seq.append((sid, y, so_far))
    delivery, contributions = None, ()
    u = getattr(plan, "uncertainty", None)
    if u is not None and u.carries_uncertainty:
        from routeplan.views.uncertainty_text import contribution_rows, histogram_data

        delivery = histogram_data(u)
        contributions = tuple((r["step"], r["share"]) for r in contribution_rows(u))
    timeline = None
    if getattr(plan, "schedule", None) is not None:
        from routeplan.views.schedule_text import timeline_data

        timeline = timeline_data(plan)
    return ChartData(
        mass_by_material=tuple(by_material), mass_by_step=tuple(by_step),
        pmi=None if m is None else m.pmi, cost_by_material=tuple(costs), currency=plan.route.currency,
        unpriced=unpriced, yield_sequence=tuple(seq), overall_yield=plan.overall_yield.yield_,
        delivery=delivery, contributions=contributions, timeline=timeline)


def _raw_table(plan: "Plan", u: DisplayUnits) -> Table:
    cur = plan.route.currency
    out = []
    for r in raw_material_rows(plan):
        out.append((Cell(r["material"]), Cell(r["name"]),
                    Cell(u.number(r["mass_kg"], "mass"), r["mass_kg"], True),
                    Cell(u.number(r["volume_L"], "volume"), r["volume_L"], True),
                    Cell(f"{r['cost']:,.2f}" if r["cost"] is not None else "–", r["cost"], True),
                    Cell(r["steps"])))
    return Table(("material", "name", "mass_kg", "volume_L", "cost", "steps"),
                 ("material", "name", u.heading("mass", "mass"), u.heading("volume", "volume"),
                  f"cost [{cur}]" if cur else "cost", "used in"),
                 tuple(out), ("", "", "kg", "L", cur or "", ""))


def _metrics_lines(plan: "Plan") -> tuple[str, ...]:
    if plan.metrics is None:
        return ()
    from routeplan.views.metrics_text import metrics_lines

    lines = metrics_lines(plan.metrics, plan.target_material)  # the terminal's lines, plain text
    return tuple(x.strip() for x in lines if x.strip())[1:]


def _safety_facts(plan: "Plan") -> list[tuple[str, str, str, float | None]]:
    """Summary cards a safety review reads first: the highest criticality class and the
    steps not screened (never silently safe), and how many warnings the plan has."""
    from routeplan.views.safety_text import safety_steps

    running, unscreened = safety_steps(plan)
    classed = [(sp.safety.thermal.criticality_class, sp.id) for sp in running
               if sp.safety.thermal is not None and sp.safety.thermal.criticality_class is not None]
    parts = []
    top = None
    if classed:
        top = max(c for c, _ in classed)
        at = [sid for c, sid in classed if c == top]
        parts.append(f"highest criticality class {top} ({', '.join(at)})")
    elif running and len(unscreened) < len(running):
        parts.append("no criticality class (MTT and TD24 not both given)")
    if unscreened:
        parts.append(f"not screened: {', '.join(unscreened)}" if len(unscreened) < len(running)
                     else "no step screened (no thermal data)")
    out = []
    if running:
        screened = len(unscreened) < len(running)  # figures to qualify as screening estimates
        out.append(("heat screening", "; ".join(parts) + (" (screening estimates)" if screened else ""),
                    "max_criticality_class",
                    None if top is None else float(top)))
    n = len(plan.warnings)
    out.append(("warnings", f"{n}, listed below" if n else "none", "warnings", float(n)))
    return out


def plan_report(plan: "Plan", units: DisplayUnits | None = None) -> Report:
    """Everything the HTML report of ``plan`` shows.

    Parameters
    ----------
    plan : Plan
        A finished plan.
    units : DisplayUnits, optional
        The units of the whole plan, as the terminal shows it (``--units``); default
        :func:`~routeplan.views.display_units.plan_units` (by the target's mass).

    Returns
    -------
    Report
        Rows, sentences and chart series; numbers are the Plan's.
    """
    u = units or plan_units(plan)
    route = plan.route
    tm = plan.target_kg
    overage = route.target.overage
    oy = plan.overall_yield
    summary = [
        ("target", f"{u.mass_text(tm)} of {plan.target_material}"
                   + (f" ({u.mass_text(plan.asked_kg)} + {overage * 100:g} % overage)" if overage else ""),
         "target_mass_kg", tm),
        ("amount", u.amount_text(plan.target_n_mol), "target_mol", plan.target_n_mol),
        ("units", u.legend(), "units", None),
        ("steps", f"{len(plan.steps)}; longest linear sequence {len(oy.longest_linear_sequence)} "
                  f"({' → '.join(oy.longest_linear_sequence)})", "steps", float(len(plan.steps))),
        ("overall yield", f"{pct(oy.yield_)}"
         + (f" (from {pct(oy.low)} to {pct(oy.high)} with the steps' low and high yields)"
            if oy.low is not None and (oy.low, oy.high) != (oy.yield_, oy.yield_) else ""),
         "overall_yield", oy.yield_),
    ]
    if plan.metrics is not None:
        summary.append(("PMI", f"{fmt(plan.metrics.pmi, 3)} kg of raw materials per kg of {plan.target_material}",
                        "pmi", plan.metrics.pmi))
        if plan.metrics.cost_per_kg is not None:
            summary.append(("raw-material cost",
                            f"{plan.metrics.cost_per_kg:,.2f} {plan.metrics.currency} per kg"
                            + ("" if plan.metrics.cost_complete else " (priced materials only)"),
                            "cost_per_kg", plan.metrics.cost_per_kg))
    summary.append(("batches", f"{sum(sp.batches for sp in plan.steps)} over the campaign", "batches",
                    float(sum(sp.batches for sp in plan.steps))))
    if plan.yield_basis != "expected":
        summary.append(("planned at", f"the steps' {plan.yield_basis} yields", "yield_basis", None))
    summary.extend(_safety_facts(plan))
    steps = []
    derived = charge_derivations_view(plan, u)
    for sp in plan.steps:
        title = sp.id if not sp.name or sp.name == sp.id else f"{sp.id} · {sp.name}"
        extra = _step_sections(plan, sp, u)
        derivations, links = derived.get(sp.id, ((), {}))
        steps.append(StepSection(
            id=sp.id, title=title, equation=sp.equation, yield_=sp.yield_, telescoped=not sp.isolated,
            charges=charge_table(sp, route, u, links) if sp.runs else None, facts=_step_facts(plan, sp, u),
            batches=sp.batches, fill=None if sp.batch is None else sp.batch.fill_fraction, extra=extra,
            derivations=derivations))
    stock = ()
    if plan.stock is not None:
        from routeplan.views.stock_text import stock_lines

        stock = tuple(x for x in stock_lines(plan, u) if x.strip())
    mat = route.materials[plan.target_material]
    extra = _plan_sections(plan, u)
    return Report(
        title=route.name, target_material=plan.target_material, target_name=mat.name or plan.target_material,
        summary=tuple(summary), steps=tuple(steps), raw_materials=_raw_table(plan, u), metrics=_metrics_lines(plan),
        stock=stock, warnings=tuple(p.render(u.text) for p in plan.warnings), charts=chart_data(plan), extra=extra,
        units=u)
