"""The workbook's Derivation sheet: every charge of every step, factor by factor.

Written only for a plan made with ``explain=True`` (``routeplan plan ROUTE --xlsx FILE
--explain``).  One row per factor, grouped by step, charge and line, with its value,
unit, what it is and its source, and the line's result; the rows come from
:func:`routeplan.views.derivation_text.plan_derivation_rows`, nothing is recomputed.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["DERIVATION_SHEET", "DERIVATION_COLUMNS", "write_derivation"]

DERIVATION_SHEET = "Derivation"

#: (heading, row key) of each column, left to right.
DERIVATION_COLUMNS = (
    ("step", "step"), ("#", "order"), ("material", "material"), ("line", "line"), ("op", "op"),
    ("value", "value"), ("unit", "unit"), ("what", "what"), ("source", "source"),
    ("result", "result"), ("result unit", "result_unit"), ("result is", "result_what"),
)


def write_derivation(ws, st, plan: "Plan", caution: str) -> int:
    """Fill ``ws`` with the derivation rows of ``plan``; returns the number of factor rows."""
    from routeplan.export.workbook_styles import put, set_widths
    from routeplan.views.derivation_text import plan_derivation_rows

    rows = plan_derivation_rows(plan)
    put(ws, 0, 0, f"Derivation of every charge: {plan.route.name}", st.title)
    put(ws, 1, 0, "Each line multiplies (x, /) or adds (+, -) its factors from the first; a factor "
                  "citing 'line k of this derivation' is the result of line k of the same charge.", st.note)
    put(ws, 2, 0, caution, st.caution)
    top = 4
    for col, (head, _key) in enumerate(DERIVATION_COLUMNS):
        put(ws, top, col, head, st.heading)
    for r, row in enumerate(rows, start=top + 1):
        for col, (_head, key) in enumerate(DERIVATION_COLUMNS):
            value = row[key]
            fmt = st.quantity(value) if key in ("value", "result") else st.cell_text
            put(ws, r, col, value, fmt)
    set_widths(ws, [(head, [row[key] for row in rows]) for head, key in DERIVATION_COLUMNS])
    ws.freeze_panes(top + 1, 0)
    return len(rows)
