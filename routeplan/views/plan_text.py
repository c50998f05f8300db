"""The plan as the terminal shows it: paragraphs and tables, in one set of units.

:func:`plan_blocks` reads a finished Plan and returns :mod:`~routeplan.views.text_blocks`
blocks: a header, one table per step (with what it makes, its batches and its safety
screening), the raw materials, the purchase list, the overall yield, the metrics, the
schedule, waste and cost of goods, and what the stock, a campaign record or yield draws
add.  Every amount, mass and volume is written in the plan's one unit of its kind
(:mod:`routeplan.views.display_units`), every number by the rule of
:mod:`routeplan.views.numbers`.  The writer (:mod:`routeplan.export.terminal`) only lays
the blocks out.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.views.display_units import KIND_OF_BASE, DisplayUnits, plan_units
from routeplan.views.numbers import money, pct, share
from routeplan.views.tables import charge_label, raw_material_rows, step_charge_rows
from routeplan.views.text_blocks import Block, Col, Grid, Para, Pre, blank, join_words, para_of_line

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan
    from routeplan.route.model import Route

__all__ = ["plan_blocks", "caution_block", "header_text", "step_title", "charge_columns", "charge_cell",
           "CHARGE_UNITS", "CHARGE_TEXT_COLUMNS", "batch_notes", "yield_blocks", "timeline_columns", "TIMELINE_COLUMNS"]

#: Columns of the schedule's timeline at least, and at most [-].
TIMELINE_COLUMNS = (24, 96)


def _plural(n: int, word: str, many: str | None = None) -> str:
    return f"{n} {word if n == 1 else (many or word + 's')}"


def header_text(plan: "Plan", u: DisplayUnits) -> str:
    """The first line: route, target as delivered (and as asked, with the overage), steps."""
    tm = plan.target_kg
    overage = plan.route.target.overage
    asked = f"{u.mass_text(plan.asked_kg)} + {overage * 100:g} % overage, " if overage else ""
    text = (f"{plan.route.name}: {u.mass_text(tm)} of {plan.target_material} ({asked}"
            f"{u.amount_text(plan.target_n_mol)}), {_plural(len(plan.steps), 'step')}")
    if plan.yield_basis != "expected":
        text += f", planned at the steps' {plan.yield_basis} yields"
    return text


def step_title(sp: "StepPlan") -> str:
    """A step's title line: id, name, equation, the yield planned at."""
    title = f"{sp.id} · {sp.name}" if sp.name and sp.name != sp.id else sp.id
    text = f"{title}   {sp.equation}   yield {pct(sp.yield_)}"
    return text + ("   telescoped: the product goes on in solution" if not sp.isolated else "")


#: The base unit of each column of a step's charge table (keys of
#: :func:`~routeplan.views.tables.step_charge_rows`; "" for none, "-" for a pure number).
CHARGE_UNITS = {"order": "", "material": "", "role": "", "equiv": "-", "mol": "mol", "mass_kg": "kg",
                "volume_L": "L", "batch_mass_kg": "kg", "batch_volume_L": "L"}

#: The text columns of a step's charge table; the others hold numbers.
CHARGE_TEXT_COLUMNS = ("material", "role")


def charge_columns(sp: "StepPlan", u: DisplayUnits) -> tuple[tuple[str, str], ...]:
    """The columns of a step's charge table, the terminal's and the report's: (row key of
    :func:`~routeplan.views.tables.step_charge_rows`, heading in ``u``); the per-batch
    columns only for a step of several batches."""
    cols = [("order", "#"), ("material", "material"), ("role", "role"), ("equiv", "equiv"),
            ("mol", u.heading("n", "amount")), ("mass_kg", u.heading("m", "mass")),
            ("volume_L", u.heading("V", "volume"))]
    if sp.batches > 1:
        cols += [("batch_mass_kg", u.heading("m/batch", "mass")), ("batch_volume_L", u.heading("V/batch", "volume"))]
    return tuple(cols)


def charge_cell(row: dict, key: str, u: DisplayUnits, maker) -> str:
    """The text of column ``key`` of a charge row: amounts, masses and volumes [mol, kg,
    L] in ``u``, equivalents [-] to 3 significant figures; ``maker`` as
    :func:`~routeplan.views.tables.charge_label`."""
    if key == "order":
        return str(row["order"])
    if key == "material":
        return charge_label(row, maker)
    if key == "role":
        return row["role"]
    if key == "equiv":
        return share(row["equiv"])
    return u.number(row[key], KIND_OF_BASE[CHARGE_UNITS[key]])


def _step_grid(sp: "StepPlan", plan: "Plan", u: DisplayUnits) -> Grid:
    columns = charge_columns(sp, u)
    cols = tuple(Col(head, "left" if key in CHARGE_TEXT_COLUMNS else "right", wrap=key == "material")
                 for key, head in columns)
    maker = plan.route.maker
    return Grid(cols, tuple(tuple(charge_cell(r, key, u, maker) for key, _h in columns) for r in step_charge_rows(sp)))


def _legend(plan: "Plan") -> str:
    """What the columns and marks of the step tables mean: only the marks the plan uses."""
    charges = [c for sp in plan.steps for c in sp.charges]
    parts = ["n: amount of the compound, m: mass and V: volume as charged"]
    made = [plan.route.maker[c.material] for c in charges if c.intermediate and c.material in plan.route.maker]
    if made:  # the mark explained with a step of this route
        parts.append(f"({made[0]}) after a material: made in step {made[0]}")
    if any(c.carried_from is not None for c in charges):
        parts.append("in solution: V is the reaction mixture carried in")
    if any(c.leaves for c in charges):
        parts.append("(separated): run off right after it is charged, not carried on")
    return "; ".join(parts)


def batch_notes(sp: "StepPlan", u: DisplayUnits, route: "Route") -> list[str]:
    """What the step's volume carries in or leaves out, as notes for the reader.

    A charge carried in solution from a telescoped step brings that mixture's volume
    (``ChargePlan.V_L`` [L]), one note each; the charges without a density add no
    volume, named in one note.  A gas (``phase: gas``) is never in the liquid volume and
    is not named: its volume is in the step's safety lines.
    """
    notes, no_density = [], []
    for c in sp.charges:
        if c.carried_from is not None:
            notes.append(f"{c.material} comes in solution from {c.carried_from}: "
                         + ("its mixture, of no known volume, carried in" if c.V_L is None else
                            f"{u.volume_text(c.V_L)} of its mixture carried in"))
        elif c.V_L is None and route.materials[c.material].phase != "gas" and c.material not in no_density:
            no_density.append(c.material)
    if no_density:
        notes.append(f"the volume leaves out {join_words(no_density)} (no density in the route file)")
    return notes


def _step_footer(plan: "Plan", sp: "StepPlan", u: DisplayUnits) -> list[Para]:
    from routeplan.views.transfer_text import transfer_text

    out = [Para(f"makes {u.amount_text(sp.product_n_mol)} {sp.product} ({u.mass_text(sp.product_m_kg)} "
                + ("as isolated)" if sp.isolated else "in solution)"), indent=2)]
    b = sp.batch
    if b is not None and b.vessel is not None:
        out.append(Para(f"vessel {b.vessel}: {_plural(b.batches, 'batch', 'batches')} of "
                        f"{u.volume_text(b.batch_V_L)}, fill {pct(b.fill_fraction)} of nominal volume", indent=2))
    out += [Para(f"note: {note}", indent=2) for note in batch_notes(sp, u, plan.route)]
    transfer = transfer_text(plan, sp, u)
    if transfer:
        out.append(Para(transfer, indent=2))
    return out


def _stock_para(sp: "StepPlan", u: DisplayUnits) -> Para | None:
    """What the stock of the step's product does to the step (None when not in the stock list)."""
    taken = sp.stock_m_kg
    if not sp.runs:
        text = f"not run: {sp.not_run}"
        if taken:
            text += f" ({u.mass_text(taken)} of {sp.product} taken from stock)"
        return Para(text + "; nothing to charge", indent=2)
    if taken:
        return Para(f"{u.mass_text(taken)} of {sp.product} taken from stock; this step makes the rest", indent=2)
    return None


def _step_blocks(sp: "StepPlan", plan: "Plan", u: DisplayUnits) -> list[Block]:
    from routeplan.views.safety_text import step_safety_lines

    out: list[Block] = [Para(step_title(sp), style="heading")]
    if sp.runs:
        out.append(_step_grid(sp, plan, u))
        out += _step_footer(plan, sp, u)
        out += [para_of_line("  " + line) for line in step_safety_lines(sp, u)]
    stock = _stock_para(sp, u)
    if stock is not None:
        out.append(stock)
    out.append(blank())
    return out


def _raw_grid(plan: "Plan", u: DisplayUnits) -> Grid:
    cur = plan.route.currency
    cols = (Col("material", wrap=True), Col(u.heading("mass", "mass"), "right"),
            Col(u.heading("volume", "volume"), "right"), Col(f"cost [{cur}]" if cur else "cost", "right"),
            Col("used in", wrap=True))
    rows = tuple((r["material"], u.number(r["mass_kg"], "mass"), u.number(r["volume_L"], "volume"),
                  money(r["cost"]), r["steps"]) for r in raw_material_rows(plan))
    return Grid(cols, rows, title="Raw materials to charge, whole campaign")


def _purchase_blocks(plan: "Plan", u: DisplayUnits) -> list[Block]:
    """The purchase list (bought materials, need, packs to order) and the note on materials not bought."""
    from routeplan.views.purchase_rows import not_bought_note, purchase_rows

    stock = plan.stock is not None
    extra = (Col(u.heading("from stock", "mass"), "right"), Col(u.heading("to buy", "mass"), "right"),
             Col(u.heading("to buy", "volume"), "right")) if stock else ()
    cols = (Col("material", wrap=True), Col(u.heading("need", "mass"), "right"),
            Col(u.heading("need", "volume"), "right"), *extra, Col("pack", "right"), Col("packs", "right"),
            Col("ordered", "right"))
    rows = tuple((r["material"], u.number(r["need_kg"], "mass"), u.number(r["need_L"], "volume"),
                  *((u.number(r["stock_kg"], "mass"), u.number(r["buy_kg"], "mass"), u.number(r["buy_L"], "volume"))
                    if stock else ()),
                  r["pack"] or "–", "–" if r["packs"] is None else str(r["packs"]), r["ordered"] or "–")
                 for r in purchase_rows(plan))
    title = "To order, whole campaign" + (", less the stock on hand" if stock else "")
    out: list[Block] = [Grid(cols, rows, title=title)]
    note = not_bought_note(plan)
    if note:
        out.append(Para(note, indent=2))
    return out


def yield_blocks(plan: "Plan") -> list[Para]:
    """The overall yield, then one compact line on the starting materials.

    The per-starting-material yields are listed only where they differ (as shown) from
    the overall yield; those that do not are named together in the same line.
    """
    oy = plan.overall_yield
    overall = pct(oy.yield_)
    text = f"Overall yield along the longest linear sequence ({' -> '.join(oy.longest_linear_sequence)}): {overall}"
    if oy.low is not None and (oy.low, oy.high) != (oy.yield_, oy.yield_):
        text += f" ({pct(oy.low)} to {pct(oy.high)} with the steps' low and high yields)"
    out = [Para(text)]
    shown = [(k, pct(y)) for k, y in oy.by_raw_material.items()]
    differ = [(k, y) for k, y in shown if y != overall]
    same = [k for k, y in shown if y == overall]
    if differ:
        line = "from the starting materials: " + " · ".join(f"{k} {y}" for k, y in differ)
        if same:
            line += f"; the same from {', '.join(same)}"
        out.append(Para(line, indent=2))
    elif same:
        which = "its starting material" if len(same) == 1 else "each of its starting materials"
        out.append(Para(f"the same from {which}: {', '.join(same)}", indent=2))
    return out


def _section(lines: list[str]) -> list[Block]:
    """A heading line and the lines under it (indent from their leading spaces)."""
    if not lines:
        return []
    return [blank(), Para(lines[0], style="heading")] + [para_of_line(x) for x in lines[1:]]


def timeline_columns(plan: "Plan", width: int) -> int:
    """Columns of the schedule's timeline in a layout ``width`` columns wide [-]: what is
    left beside the lane names and room for the last hour mark, within
    :data:`TIMELINE_COLUMNS`."""
    from routeplan.views.schedule_text import lane_name

    s = plan.schedule
    pad = max((len(lane_name(v.vessel, v.steps)) for v in s.vessels), default=0) if s is not None else 0
    lo, hi = TIMELINE_COLUMNS
    return max(lo, min(hi, width - pad - 3 - 6))


def _schedule_blocks(plan: "Plan", width: int) -> list[Block]:
    from routeplan.views.schedule_text import schedule_parts

    head, lanes, rest = schedule_parts(plan, width=width)
    out: list[Block] = [blank(), Para(head, style="heading")]
    if lanes:
        out.append(Pre("\n".join(lanes)))
    return out + [para_of_line(x) for x in rest]


def plan_blocks(plan: "Plan", units: DisplayUnits | None = None, *, width: int = 120) -> list[Block]:
    """Everything the terminal shows of ``plan``, in order, as blocks.

    Parameters
    ----------
    plan : Plan
        A finished plan.
    units : DisplayUnits, optional
        The units of the whole plan; default :func:`~routeplan.views.display_units.plan_units`.
    width : int
        Columns the writer lays out to [-]; only the schedule's timeline, which is drawn
        here, is sized by it.

    Returns
    -------
    list of Para, Grid and Pre
        Without the safety caution (:func:`caution_block`), which the caller adds last.
    """
    from routeplan.views.metrics_text import metrics_lines
    from routeplan.views.waste_cost_text import cost_lines, waste_lines

    u = units or plan_units(plan)
    out: list[Block] = [
        Para(header_text(plan, u), style="heading"),
        Para(_legend(plan), style="dim"),
        Para(f"units of the whole plan: {u.legend()}", style="dim"),
        blank(),
    ]
    for sp in plan.steps:
        out += _step_blocks(sp, plan, u)
    out.append(_raw_grid(plan, u))
    out.append(blank())
    out += _purchase_blocks(plan, u)
    out.append(blank())
    out += yield_blocks(plan)
    if plan.metrics is not None:
        out += _section([x for x in metrics_lines(plan.metrics, plan.target_material) if x])
    out += _schedule_blocks(plan, timeline_columns(plan, width))
    out += _section(waste_lines(plan, u))
    out += _section(cost_lines(plan))
    if plan.stock is not None:
        from routeplan.views.stock_text import stock_lines

        out += [para_of_line(x) for x in stock_lines(plan, u)]
    if plan.record is not None:
        from routeplan.views.record_text import record_lines

        out += [para_of_line(x) for x in record_lines(plan, u)]
    if plan.uncertainty is not None:
        from routeplan.views.uncertainty_text import uncertainty_lines

        out.append(blank())
        out += [para_of_line(x) for x in uncertainty_lines(plan, u)]
    out.append(blank())
    return out


def caution_block() -> Para:
    """The safety caution, its label shown strongly."""
    from routeplan import CAUTION

    return Para(CAUTION, label="CAUTION:")
