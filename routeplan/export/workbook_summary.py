"""The Summary and Materials sheets of the charge-sheet workbook.

Summary (columns A to L): title, caution, the plan's key facts (route, route file and
SHA-256, date, target, overall yield, cost), the route metrics read from
``plan.metrics`` (process mass intensity, complete and simple E-factor, raw-material
cost per kg of target and the raw materials without a price), the campaign's duration,
waste streams and cost of goods by part (:mod:`routeplan.views.waste_cost_text`), the
yield uncertainty when ``plan.uncertainty`` is set (percentiles of the delivery, its
probability, the target and purchases for the confidence, the step shares of the
spread), a line per step with the
names of its charge sheets and the step metrics (step and cumulative PMI, atom economy,
reaction mass efficiency) and, under a step that takes its product from stock or does
not run, a line that says so (a step that does not run has no charge sheet), the
raw-material totals with ``cost = mass * price`` as live
formulas and their total, the stock comparison when ``plan.stock`` is set (largest
target the stock allows, the limiting material, and per raw material need, on hand and
``to buy = MAX(0, need - on hand)`` as a live formula), the heat and gas of each step
per batch (screening estimates; the steps not screened named), and the warnings.

Materials: one row per material of the route (:data:`~routeplan.views.tables.MATERIAL_COLUMNS`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.safety_text import SCREENING_NOTE, safety_summary_rows
from routeplan.views.tables import Column
from routeplan.views.uncertainty_text import uncertainty_fact_rows
from routeplan.views.sheet_rows import STEP_METRIC_COLUMNS, STOCK_COLUMNS, material_columns, material_rows, metric_rows, raw_export_columns, raw_export_rows, step_metric_rows, step_rows, stock_rows, stock_summary_rows, summary_rows
from routeplan.export.workbook_records import protect
from routeplan.export.workbook_styles import Styles, fit_widths, lines_height, put, sheet_title, wrapped_lines
from routeplan.views.mass_intensity_rows import MASS_INTENSITY_COLUMNS, mass_intensity_rows, step_intensity_lines
from routeplan.views.purchase_rows import not_bought_note, purchase_columns, purchase_rows

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["SUMMARY_LAST_COLUMN", "SUMMARY_STEP_COLUMNS", "SUMMARY_WIDTH_BOUNDS", "MATERIAL_WIDTH_BOUNDS",
           "write_summary", "write_materials"]

#: Step lines on the Summary sheet (a subset of the step table, plus the sheet names),
#: then the step metrics.
SUMMARY_STEP_COLUMNS = (
    Column("step", "step"),
    Column("name", "name"),
    Column("batches", "batches", "-"),
    Column("batch_volume_L", "volume per batch", "L"),
    Column("fill_fraction", "vessel fill", "-"),
    Column("yield", "yield", "-"),
    Column("product_mass_kg", "product mass", "kg"),
    Column("sheets", "charge sheets"),
) + tuple(c for c in STEP_METRIC_COLUMNS if c.key not in ("step_pmi", "cumulative_pmi"))

#: Last column (0-based) used on the Summary sheet.
SUMMARY_LAST_COLUMN = len(SUMMARY_STEP_COLUMNS) - 1

#: Lowest and highest width of each Summary column [character units], shared by its
#: tables; the highest add up to 1180 px, within the charge sheets' print budget
#: (:data:`~routeplan.export.workbook_charges.PRINT_BUDGET_PX`), so the sheet prints at
#: about 80 % or more on a Letter page in landscape.
SUMMARY_WIDTH_BOUNDS = ((10, 16), (20, 26), (10, 12), (10, 12), (10, 12), (10, 12), (10, 12), (12, 18),
                        (12, 14), (13, 16))

#: Lowest and highest width of each Materials column [character units], by key; the
#: highest add up to 1192 px, within the charge sheets' print budget.
MATERIAL_WIDTH_BOUNDS = {
    "material": (8, 16), "name": (12, 18), "formula": (8, 12), "molar_mass": (8, 10), "assay": (7, 9),
    "density": (8, 9), "solution_molarity": (14, 15), "solution_mass_fraction": (9, 10),
    "solution_density": (9, 10), "price": (8, 10), "made_in": (8, 10), "hazards": (12, 17),
    "notes": (12, 15),
}

# the stock table's text column spans three columns, from its own
_STATUS_SPAN = 2


def _caution(ws, st: Styles, row: int, last_col: int) -> None:
    from routeplan import CAUTION

    ws.merge_range(row, 0, row, last_col, "", st.caution)
    ws.write_string(row, 0, "CAUTION: " + CAUTION, st.caution)
    ws.set_row(row, 30)


def _page_setup(ws, repeat: tuple[int, int], context: dict[str, str]) -> None:
    ws.set_landscape()
    ws.fit_to_pages(1, 0)
    ws.repeat_rows(*repeat)
    ws.set_margins(left=0.4, right=0.4, top=0.7, bottom=0.7)
    ws.set_header(context["header"])
    ws.set_footer(context["footer"])


def _value_format(st: Styles, kind: str, value: Any):
    if isinstance(value, str) or value is None:
        return st.value_text
    if kind == "fraction":
        return st.value_percent
    if kind in ("mass", "amount"):
        return st.quantity(value, plain=True)
    if kind == "money":
        return st.value_money
    if kind == "count":
        return st.value_int
    if kind == "ratio":
        return st.value_ratio
    return st.value_text


def _label(row: dict[str, Any]) -> str:
    unit = row["unit"]
    if row["kind"] == "fraction":
        return row["item"] + " [%]"
    if unit and row["kind"] != "count" and not isinstance(row["value"], str):
        return row["item"] + f" [{unit}]"
    return row["item"]


class _Sheet:
    """The Summary sheet being written: its column widths and a few writers."""

    def __init__(self, ws, st: Styles, widths: list[float]) -> None:
        self.ws, self.st, self.widths = ws, st, widths
        self.last = SUMMARY_LAST_COLUMN

    def span(self, a: int, b: int) -> float:
        return sum(self.widths[a:b + 1])

    def fact(self, r: int, row: dict[str, Any]) -> None:
        """A label (A to C), its value and, where the row has one, a note (F to the end)."""
        ws, st = self.ws, self.st
        ws.merge_range(r, 0, r, 2, "", st.label)
        put(ws, r, 0, _label(row), st.label)
        fmt = _value_format(st, row["kind"], row["value"])
        note = row.get("note") or ""
        value_end = 4 if note else self.last
        ws.merge_range(r, 3, r, value_end, "", fmt)
        put(ws, r, 3, row["value"], fmt)
        lines = wrapped_lines(row["value"], self.span(3, value_end), columns=value_end - 2)
        if note:
            ws.merge_range(r, 5, r, self.last, "", st.note)
            ws.write_string(r, 5, note, st.note)
            lines = max(lines, wrapped_lines(note, self.span(5, self.last), columns=self.last - 4))
        if lines > 1:
            ws.set_row(r, lines_height(lines))

    def headings(self, r: int, titles: list[str], fmt=None) -> None:
        lines = 1
        for i, title in enumerate(titles):
            if title is not None:
                self.ws.write_string(r, i, title, fmt or self.st.heading)
                lines = max(lines, wrapped_lines(title, self.widths[i], bold=True))
        self.ws.set_row(r, lines_height(lines))

    def fit_row(self, r: int, texts: dict[int, Any], spans: dict[int, int] | None = None) -> None:
        """Raise row ``r`` to the most lines any of ``texts`` (column -> value) wraps to."""
        spans = spans or {}
        lines = max((wrapped_lines(v, self.span(i, spans.get(i, i)), columns=spans.get(i, i) - i + 1)
                     for i, v in texts.items()), default=1)
        if lines > 1:
            self.ws.set_row(r, lines_height(lines))


def _steps(plan: "Plan", sheet_names) -> list[dict[str, Any]]:
    """The step rows with the names of their charge sheets (``sheets``): one name, the
    first and last of several, or for a step whose batches share one sheet, its name
    and "one sheet for each of n identical batches"."""
    sheets_of: dict[str, list[str]] = {}
    shared: set[str] = set()
    for sp, k, name in sheet_names:
        sheets_of.setdefault(sp.id, []).append(name)
        if k is None:
            shared.add(sp.id)
    rows = step_rows(plan)
    for row, metrics in zip(rows, step_metric_rows(plan)):
        names = sheets_of.get(row["step"], [])
        row["sheets"] = names[0] if len(names) == 1 else f"{names[0]} … {names[-1]}" if names else ""
        if row["not_run"] is not None:
            row["sheets"] = "none: the step does not run"
        if row["step"] in shared:
            row["sheets"] += f" (one sheet for each of {row['batches']} identical batches)"
        row.update({k: v for k, v in metrics.items() if k != "step"})
    return rows


def _stock_note(plan: "Plan", row: dict[str, Any]) -> str:
    """The line under a step that takes its product from stock or does not run ("" otherwise)."""
    from routeplan.views.tables import display_quantity

    step = plan.step(row["step"])
    if row["from_stock_kg"] is not None and row["from_stock_kg"] > 0:
        taken = f"{display_quantity(row['from_stock_kg'], 'mass')} of {step.product} taken from stock; "
        if row["not_run"] is None:
            return taken + "this step makes the rest"
        return taken + f"not run: {row['not_run']}; no charge sheet"
    if row["not_run"] is not None:
        return f"not run: {row['not_run']}; no charge sheet"
    return ""


def _widths(ws, tables: list[tuple[tuple[Column, ...], list[dict[str, Any]]]]) -> list[float]:
    specs = []
    for i, (lo, hi) in enumerate(SUMMARY_WIDTH_BOUNDS):
        heads, values = [], []
        for cols, rows in tables:
            if i < len(cols):
                heads.append(sheet_title(cols[i]))
                values += [row.get(cols[i].key) for row in rows]
        specs.append((max(heads, key=len) if heads else "", values, lo, hi))
    return fit_widths(ws, specs)


def write_summary(ws, st: Styles, plan: "Plan", written: str, context: dict[str, str],
                  sheet_names: list[tuple[Any, int, str]]) -> dict[str, int]:
    """Write the Summary sheet.

    Returns
    -------
    dict
        0-based rows: ``facts`` (first fact line), ``metrics`` (first metric line, -1
        without metrics), ``steps`` and ``raw`` (heading rows of the two tables),
        ``raw_total`` (the total cost line, -1 without one), ``time_waste`` (first line
        of the campaign time, waste and cost-of-goods facts, -1 without them), ``uncertainty`` (first
        line of the yield-uncertainty block, -1 without ``--confidence``), ``stock`` (heading row of
        the stock table, -1 without stock), ``safety`` (first line of the safety
        summary) and ``warnings`` (first warning line, -1 without one).
    """
    steps = _steps(plan, sheet_names)
    raw_cols, raws = raw_export_columns(plan), raw_export_rows(plan)
    stocks = stock_rows(plan)
    sh = _Sheet(ws, st, _widths(ws, [(SUMMARY_STEP_COLUMNS, steps), (raw_cols, raws),
                                     (STOCK_COLUMNS[:-1], stocks)]))
    last = SUMMARY_LAST_COLUMN
    ws.write_string(0, 0, f"Charge sheets · {plan.route.name}", st.title)
    _caution(ws, st, 1, last)
    out: dict[str, int] = {}

    r = 3
    out["facts"] = r
    for row in summary_rows(plan, written):
        if row["key"] not in ("caution", "warning"):
            sh.fact(r, row)
            r += 1

    out["metrics"] = -1
    metrics = metric_rows(plan)
    if metrics:
        r += 1
        put(ws, r, 0, "Mass efficiency and cost, per kg of target as delivered", st.subtitle)
        out["metrics"] = r + 1
        for row in metrics:
            r += 1
            sh.fact(r, row)

    from routeplan.views.waste_cost_text import waste_cost_facts

    out["time_waste"] = -1
    time_waste = waste_cost_facts(plan)
    if time_waste:
        r += 1
        put(ws, r, 0, "Campaign time, waste streams and cost of goods", st.subtitle)
        out["time_waste"] = r + 1
        for row in time_waste:
            r += 1
            sh.fact(r, row)

    out["uncertainty"] = -1
    drawn = uncertainty_fact_rows(plan)
    if drawn:
        r += 1
        put(ws, r, 0, "Yield uncertainty: step yields drawn within their ranges, plan at expected yields",
            st.subtitle)
        out["uncertainty"] = r + 1
        for row in drawn:
            r += 1
            sh.fact(r, row)
    r = _mass_intensity(sh, plan, r)

    # steps
    r += 2
    put(ws, r, 0, "Steps, in execution order", st.subtitle)
    r += 1
    out["steps"] = r
    sh.headings(r, [sheet_title(c) for c in SUMMARY_STEP_COLUMNS])
    step_formats = {"batches": st.integer, "fill_fraction": st.percent, "yield": st.percent,
                    "atom_economy": st.percent, "rme": st.percent}
    for row in steps:
        r += 1
        for i, col in enumerate(SUMMARY_STEP_COLUMNS):
            v = row[col.key]
            fmt = step_formats.get(col.key) or (st.quantity(v) if isinstance(v, float) else st.cell_text)
            put(ws, r, i, v, fmt)
        sh.fit_row(r, {0: row["step"], 1: row["name"], 7: row["sheets"]})
        note = _stock_note(plan, row)
        if note:
            r += 1
            ws.merge_range(r, 1, r, last, "", st.note)
            ws.write_string(r, 1, note, st.note)
            sh.fit_row(r, {1: note}, {1: last})

    # raw materials
    r += 2
    put(ws, r, 0, "Raw materials to charge, whole campaign", st.subtitle)
    r += 1
    out["raw"] = r
    sh.headings(r, [sheet_title(c) for c in raw_cols])
    first_raw = r + 1
    ci = {c.key: i for i, c in enumerate(raw_cols)}
    from xlsxwriter.utility import xl_rowcol_to_cell as ref

    for row in raws:
        r += 1
        for i, col in enumerate(raw_cols):
            v = row[col.key]
            if col.key == "cost":
                continue
            fmt = st.money if col.key == "price" else st.quantity(v) if isinstance(v, float) else st.cell_text
            put(ws, r, i, v, fmt)
        if row["cost"] is not None and row["price"] is not None:
            formula = f"={ref(r, ci['mass_kg'])}*{ref(r, ci['price'])}"
            ws.write_formula(r, ci["cost"], formula, st.money, row["cost"])
        else:
            put(ws, r, ci["cost"], None, st.money)
        sh.fit_row(r, {0: row["material"], 1: row["name"], ci["steps"]: row["steps"]})
    costs = [row["cost"] for row in raws if row["cost"] is not None]
    out["raw_total"] = -1
    if costs:
        r += 1
        put(ws, r, ci["name"], "total cost of priced materials", st.label)
        col = ci["cost"]
        ws.write_formula(r, col, f"=SUM({ref(first_raw, col)}:{ref(r - 1, col)})", st.money_bold, sum(costs))
        out["raw_total"] = r

    r = _purchases(sh, plan, r, out)

    out["stock"] = -1
    if plan.stock is not None:
        r = _facts_block(sh, r + 2, "Stock on hand, for the requested target", stock_summary_rows(plan))
        r += 1
        out["stock"] = r
        r = _stock_table(sh, r, stocks)

    # heat and gas, screening estimates
    r += 2
    put(ws, r, 0, f"Safety per batch: {SCREENING_NOTE}", st.subtitle)
    out["safety"] = r + 1
    for row in safety_summary_rows(plan):
        r += 1
        first = 1 if row["step"] else 0  # the closing row (steps not screened) spans the line
        if first:
            put(ws, r, 0, row["step"], st.cell_text)
        ws.merge_range(r, first, r, last, "", st.note)
        ws.write_string(r, first, row["text"], st.note)
        sh.fit_row(r, {first: row["text"]}, {first: last})

    out["record"] = -1
    if plan.record is not None:
        r = _record_block(sh, r, plan)
        out["record"] = r

    # warnings
    r += 2
    put(ws, r, 0, "Warnings" if plan.warnings else "Warnings: none", st.subtitle)
    out["warnings"] = r + 1 if plan.warnings else -1
    for p in plan.warnings:
        r += 1
        ws.merge_range(r, 0, r, last, "", st.value_text)
        put(ws, r, 0, p.render(), st.value_text)
        ws.set_row(r, lines_height(wrapped_lines(p.render(), sh.span(0, last), columns=last + 1)))

    ws.freeze_panes(2, 0)
    _page_setup(ws, (0, 1), context)
    protect(ws)
    return out


def _facts_block(sh: _Sheet, r: int, title: str, rows: list[dict[str, Any]]) -> int:
    """A subtitle on row ``r`` and one fact per line under it; return the last row."""
    put(sh.ws, r, 0, title, sh.st.subtitle)
    for row in rows:
        r += 1
        sh.fact(r, row)
    return r


def _record_block(sh: _Sheet, r: int, plan: "Plan") -> int:
    """The campaign record: its facts, then one line per lot; return the last row."""
    from routeplan.views.record_text import SUMMARY_LOT_COLUMNS, lot_rows, record_summary_rows

    ws, st = sh.ws, sh.st
    r = _facts_block(sh, r + 2, "Campaign record: the lots made so far; the charge sheets are the rest of the campaign",
                     record_summary_rows(plan))
    r += 2
    sh.headings(r, [sheet_title(c) for c in SUMMARY_LOT_COLUMNS])
    for row in lot_rows(plan):
        r += 1
        for i, col in enumerate(SUMMARY_LOT_COLUMNS):
            v = row[col.key]
            if col.key == "flagged":
                v = "yes" if v else ""
            fmt = (st.percent if col.key in ("assay", "yield", "expected_yield") else st.integer if col.key == "batch"
                   else st.quantity(v) if isinstance(v, float) else st.cell_text)
            put(ws, r, i, v, fmt)
    return r


def _stock_table(sh: _Sheet, r: int, rows: list[dict[str, Any]]) -> int:
    """The stock table with its headings on row ``r``; return its last row.

    ``to buy = MAX(0, need - on hand)`` is a live formula stored with the plan's number;
    an empty on-hand cell (not in stock) counts as 0.
    """
    from xlsxwriter.utility import xl_rowcol_to_cell as ref

    ws, st = sh.ws, sh.st
    ci = {c.key: i for i, c in enumerate(STOCK_COLUMNS)}
    status = ci["status"]
    sh.headings(r, [sheet_title(c) for c in STOCK_COLUMNS])
    ws.merge_range(r, status, r, status + _STATUS_SPAN, sheet_title(STOCK_COLUMNS[status]), st.heading)
    for row in rows:
        r += 1
        put(ws, r, ci["material"], row["material"], st.cell_text)
        put(ws, r, ci["name"], row["name"], st.cell_text)
        put(ws, r, ci["need_kg"], row["need_kg"], st.quantity(row["need_kg"]))
        put(ws, r, ci["on_hand_kg"], row["on_hand_kg"], st.input_quantity(row["on_hand_kg"]))
        need, have = ref(r, ci["need_kg"]), ref(r, ci["on_hand_kg"])
        if row["to_buy_kg"] is None:  # not bought: nothing to buy, whatever is on hand
            put(ws, r, ci["to_buy_kg"], None, st.cell_text)
        else:
            ws.write_formula(r, ci["to_buy_kg"], f"=MAX(0,{need}-{have})",
                             st.quantity(row["to_buy_kg"], bold=True), row["to_buy_kg"])
        ws.merge_range(r, status, r, status + _STATUS_SPAN, "", st.cell_text)
        put(ws, r, status, row["status"], st.cell_text)
        sh.fit_row(r, {0: row["material"], 1: row["name"], status: row["status"]},
                   {status: status + _STATUS_SPAN})
    return r


def _mass_intensity(sh: _Sheet, plan: "Plan", r: int) -> int:
    """The mass intensity in our layout: a table of kg per kg of target by raw material
    (with its share of the route PMI), and under it one line per step in words (inputs
    per kg of the step's product, raw materials up to the step per kg of it); return
    the last row written (``r`` without metrics)."""
    rows = mass_intensity_rows(plan)
    if not rows:
        return r
    ws, st = sh.ws, sh.st
    r += 2
    put(ws, r, 0, f"Mass intensity: kg of each input per kg of {plan.target_material} delivered", st.subtitle)
    r += 1
    sh.headings(r, [sheet_title(c) for c in MASS_INTENSITY_COLUMNS])
    for row in rows:
        r += 1
        for i, col in enumerate(MASS_INTENSITY_COLUMNS):
            v = row[col.key]
            fmt = (st.percent if col.key == "share" else st.ratio if isinstance(v, float) else
                   st.label if row["material"] is None else st.cell_text)
            put(ws, r, i, v, fmt)
        sh.fit_row(r, {0: row["material"], 1: row["name"]})
    last = sh.last
    for text in step_intensity_lines(plan):
        r += 1
        ws.merge_range(r, 0, r, last, "", st.value_text)
        ws.write_string(r, 0, text, st.value_text)
        sh.fit_row(r, {0: text}, {0: last})
    return r


def _purchases(sh: _Sheet, plan: "Plan", r: int, out: dict[str, int]) -> int:
    """The purchase list: bought materials, need in kg and in L (with a stock list, what
    the stock gives and what is left to buy), pack, packs to order and what they hold;
    then the note on materials not bought.  Return the last row."""
    ws, st = sh.ws, sh.st
    rows = purchase_rows(plan)
    cols = purchase_columns(plan)
    r += 2
    put(ws, r, 0, "To order, whole campaign (packs cover what is left to buy after the stock file's amounts)"
        if plan.stock is not None else "To order, whole campaign (packs cover the need)", st.subtitle)
    r += 1
    out["purchases"] = r
    sh.headings(r, [sheet_title(c) for c in cols])
    for row in rows:
        r += 1
        for i, col in enumerate(cols):
            v = row[col.key]
            fmt = (st.integer if col.key == "packs" else st.quantity(v) if isinstance(v, float) else st.cell_text)
            put(ws, r, i, v, fmt)
        sh.fit_row(r, {0: row["material"], 1: row["name"]})
    note = not_bought_note(plan)
    if note:
        r += 1
        ws.merge_range(r, 0, r, sh.last, "", st.note)
        ws.write_string(r, 0, note, st.note)
        sh.fit_row(r, {0: note}, {0: sh.last})
    return r


def write_materials(ws, st: Styles, plan: "Plan", context: dict[str, str]) -> int:
    """Write the Materials sheet; return the 0-based row of its headings."""
    cols = material_columns(plan)
    last = len(cols) - 1
    rows = material_rows(plan)
    widths = fit_widths(ws, [(sheet_title(c), [row[c.key] for row in rows], *MATERIAL_WIDTH_BOUNDS[c.key])
                             for c in cols])
    ws.write_string(0, 0, f"Materials · {plan.route.name}", st.title)
    _caution(ws, st, 1, last)
    h = 3
    for i, col in enumerate(cols):
        ws.write_string(h, i, sheet_title(col), st.heading)
    ws.set_row(h, lines_height(max(wrapped_lines(sheet_title(c), widths[i], bold=True)
                                   for i, c in enumerate(cols)), 30))
    formats = {
        "molar_mass": st.molar_mass, "assay": st.percent, "density": st.density,
        "solution_molarity": st.density, "solution_mass_fraction": st.percent,
        "solution_density": st.density, "price": st.money,
    }
    for j, row in enumerate(rows):
        r = h + 1 + j
        for i, col in enumerate(cols):
            put(ws, r, i, row[col.key], formats.get(col.key, st.cell_text))
        lines = max(wrapped_lines(row[c.key], widths[i]) for i, c in enumerate(cols))
        if lines > 1:
            ws.set_row(r, lines_height(lines))
    ws.freeze_panes(h + 1, 0)
    _page_setup(ws, (h, h), context)
    protect(ws)
    return h
