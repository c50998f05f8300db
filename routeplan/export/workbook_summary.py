"""The Summary and Materials sheets of the charge-sheet workbook.

Summary (columns A to H): title, caution, the plan's key facts (route, route file and
SHA-256, date, target, overall yield, cost), a line per step with the names of its
charge sheets, the raw-material totals with ``cost = mass * price`` as live formulas
and their total, and the warnings.

Materials: one row per material of the route (:data:`~routeplan.export.tables.MATERIAL_COLUMNS`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.export.tables import (Column, material_columns, material_rows, raw_export_columns,
                                     raw_export_rows, step_rows, summary_rows)
from routeplan.export.workbook_styles import Styles, put, set_widths, sheet_title

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["SUMMARY_LAST_COLUMN", "SUMMARY_STEP_COLUMNS", "write_summary", "write_materials"]

#: Last column (0-based) used on the Summary sheet.
SUMMARY_LAST_COLUMN = 7

#: Step lines on the Summary sheet (a subset of the step table, plus the sheet names).
SUMMARY_STEP_COLUMNS = (
    Column("step", "step"),
    Column("name", "name"),
    Column("batches", "batches", "-"),
    Column("batch_volume_L", "volume per batch", "L"),
    Column("fill_fraction", "vessel fill", "-"),
    Column("yield", "yield", "-"),
    Column("product_mass_kg", "product mass", "kg"),
    Column("sheets", "charge sheets"),
)


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
    if kind == "fraction":
        return st.value_percent
    if kind in ("mass", "amount"):
        return st.quantity(value, plain=True)
    if kind == "money":
        return st.value_money
    if kind == "count":
        return st.value_int
    return st.value_text


def write_summary(ws, st: Styles, plan: "Plan", written: str, context: dict[str, str],
                  sheet_names: list[tuple[Any, int, str]]) -> dict[str, int]:
    """Write the Summary sheet.

    Returns
    -------
    dict
        0-based rows: ``facts`` (first fact line), ``steps`` and ``raw`` (heading
        rows of the two tables), ``raw_total`` (the total cost line, -1 without one)
        and ``warnings`` (first warning line, -1 without one).
    """
    last = SUMMARY_LAST_COLUMN
    ws.write_string(0, 0, f"Charge sheets · {plan.route.name}", st.title)
    _caution(ws, st, 1, last)
    out: dict[str, int] = {}

    r = 3
    facts = [row for row in summary_rows(plan, written) if row["key"] not in ("caution", "warning")]
    out["facts"] = r
    for row in facts:
        unit = row["unit"]
        label = row["item"] + (f" [{unit}]" if unit and row["kind"] not in ("fraction", "count") else "")
        if row["kind"] == "fraction":
            label += " [%]"
        ws.merge_range(r, 0, r, 1, "", st.label)
        put(ws, r, 0, label, st.label)
        fmt = _value_format(st, row["kind"], row["value"])
        ws.merge_range(r, 2, r, last, "", fmt)
        put(ws, r, 2, row["value"], fmt)
        r += 1

    # steps
    r += 1
    put(ws, r, 0, "Steps, in execution order", st.subtitle)
    r += 1
    out["steps"] = r
    sheets_of: dict[str, list[str]] = {}
    for sp, _k, name in sheet_names:
        sheets_of.setdefault(sp.id, []).append(name)
    steps = step_rows(plan)
    for row in steps:
        names = sheets_of.get(row["step"], [])
        row["sheets"] = names[0] if len(names) == 1 else f"{names[0]} … {names[-1]}" if names else ""
    for i, col in enumerate(SUMMARY_STEP_COLUMNS):
        ws.write_string(r, i, sheet_title(col), st.heading)
    step_formats = {"batches": st.integer, "fill_fraction": st.percent, "yield": st.percent}
    for row in steps:
        r += 1
        for i, col in enumerate(SUMMARY_STEP_COLUMNS):
            v = row[col.key]
            fmt = step_formats.get(col.key) or (st.quantity(v) if isinstance(v, float) else st.cell_text)
            put(ws, r, i, v, fmt)

    # raw materials
    r += 2
    put(ws, r, 0, "Raw materials to charge, whole campaign", st.subtitle)
    r += 1
    out["raw"] = r
    raw_cols = raw_export_columns(plan)
    raws = raw_export_rows(plan)
    for i, col in enumerate(raw_cols):
        ws.write_string(r, i, sheet_title(col), st.heading)
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
    costs = [row["cost"] for row in raws if row["cost"] is not None]
    out["raw_total"] = -1
    if costs:
        r += 1
        put(ws, r, ci["name"], "total cost of priced materials", st.label)
        col = ci["cost"]
        ws.write_formula(r, col, f"=SUM({ref(first_raw, col)}:{ref(r - 1, col)})", st.money_bold, sum(costs))
        out["raw_total"] = r

    # warnings
    r += 2
    put(ws, r, 0, "Warnings" if plan.warnings else "Warnings: none", st.subtitle)
    out["warnings"] = r + 1 if plan.warnings else -1
    for p in plan.warnings:
        r += 1
        ws.merge_range(r, 0, r, last, "", st.value_text)
        put(ws, r, 0, p.render(), st.value_text)
        ws.set_row(r, 26)

    columns = []
    for i in range(last + 1):
        values: list[Any] = []
        heads = []
        if i < len(SUMMARY_STEP_COLUMNS):
            heads.append(sheet_title(SUMMARY_STEP_COLUMNS[i]))
            values += [row[SUMMARY_STEP_COLUMNS[i].key] for row in steps]
        if i < len(raw_cols):
            heads.append(sheet_title(raw_cols[i]))
            values += [row[raw_cols[i].key] for row in raws]
        columns.append((max(heads, key=len) if heads else "", values))
    set_widths(ws, columns, highest=36)
    ws.freeze_panes(2, 0)
    _page_setup(ws, (0, 1), context)
    return out


def write_materials(ws, st: Styles, plan: "Plan", context: dict[str, str]) -> int:
    """Write the Materials sheet; return the 0-based row of its headings."""
    cols = material_columns(plan)
    last = len(cols) - 1
    ws.write_string(0, 0, f"Materials · {plan.route.name}", st.title)
    _caution(ws, st, 1, last)
    h = 3
    for i, col in enumerate(cols):
        ws.write_string(h, i, sheet_title(col), st.heading)
    ws.set_row(h, 30)
    formats = {
        "molar_mass": st.molar_mass, "assay": st.percent, "density": st.density,
        "solution_molarity": st.density, "solution_mass_fraction": st.percent,
        "solution_density": st.density, "price": st.money,
    }
    rows = material_rows(plan)
    for j, row in enumerate(rows):
        r = h + 1 + j
        for i, col in enumerate(cols):
            put(ws, r, i, row[col.key], formats.get(col.key, st.cell_text))
    set_widths(ws, [(sheet_title(c), [row[c.key] for row in rows]) for c in cols])
    ws.freeze_panes(h + 1, 0)
    _page_setup(ws, (h, h), context)
    return h
