"""The batch-record parts of a charge sheet: the step's warnings above the charge table,
and under it the lines the operator fills in at the step's marked points (temperature,
date and time, result of the in-process check against its limit), the sign-off block
(start and end, who charged, checked and reviewed), and the sheet protection.

Layout only: the warnings come from ``plan.warnings`` (each :class:`~routeplan.errors.Problem`
whose ``step`` is the step), the marked points from ``Step.controls`` of the route.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.export.workbook_styles import Styles, lines_height, put, wrapped_lines

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan

__all__ = ["RECORD_HEADINGS", "SIGN_OFF_LABELS", "DEFAULT_POINT", "PROTECT_OPTIONS", "step_warnings",
           "write_warnings", "write_records", "write_sign_off", "protect"]

#: Headings of the record lines at the marked points, with the columns each spans
#: (first, last; 0-based).  The fill-in columns start at "temperature".
RECORD_HEADINGS = (
    ("marked point", 0, 2), ("in-process check", 3, 5), ("limit", 6, 7), ("temperature [°C]", 8, 9),
    ("date and time", 10, 11), ("result", 12, 14), ("initials", 15, 16),
)

#: The first record column that is filled in (index into :data:`RECORD_HEADINGS`).
_FIRST_FILL = 3

#: The one marked point of a step whose route gives no ``controls``.
DEFAULT_POINT = "end of reaction"

#: Lines of the sign-off block, in order.
SIGN_OFF_LABELS = ("batch started (date, time)", "batch ended (date, time)", "charged by", "checked by",
                   "product obtained [kg]", "reviewed by (name, date)", "remarks")

#: What a protected sheet still lets a person do (no password: a supervisor lifts it
#: from the spreadsheet's menu).
PROTECT_OPTIONS = {"select_locked_cells": True, "select_unlocked_cells": True, "format_rows": True,
                   "format_columns": True}


def step_warnings(plan: "Plan", sp: "StepPlan") -> list[str]:
    """Every warning of the plan about step ``sp``, as located sentences."""
    return [p.render() for p in plan.warnings if p.step == sp.id]


def write_warnings(ws, st: Styles, r: int, last_col: int, texts: list[str], width: float) -> int:
    """Write the step's warnings from row ``r``, one merged row each; return the next
    free row (``r`` when there are none)."""
    for text in texts:
        line = f"WARNING: {text}"
        ws.merge_range(r, 0, r, last_col, "", st.warning)
        ws.write_string(r, 0, line, st.warning)
        ws.set_row(r, lines_height(wrapped_lines(line, width, bold=True, columns=last_col + 1)))
        r += 1
    return r


def write_records(ws, st: Styles, r: int, step, spans_width) -> int:
    """The record lines at the step's marked points from row ``r`` (a subtitle, the
    headings, one line per control); return the last row written.

    ``spans_width(a, b)`` gives the width of columns ``a`` to ``b`` [character units].
    """
    put(ws, r, 0, "Records at the marked points (fill in at the vessel)", st.subtitle)
    r += 1
    for title, a, b in RECORD_HEADINGS:
        ws.merge_range(r, a, r, b, "", st.heading)
        ws.write_string(r, a, title, st.heading)
    ws.set_row(r, lines_height(1, 18))
    controls = step.controls or ()
    lines = [(c.point, c.check or "", c.limit or "") for c in controls] or [(DEFAULT_POINT, "", "")]
    for point, check, limit in lines:
        r += 1
        height = 1
        for i, (value, (_t, a, b)) in enumerate(zip((point, check, limit), RECORD_HEADINGS)):
            ws.merge_range(r, a, r, b, "", st.cell_text)
            put(ws, r, a, value, st.cell_text)
            height = max(height, wrapped_lines(value, spans_width(a, b), columns=b - a + 1))
        for _t, a, b in RECORD_HEADINGS[_FIRST_FILL:]:
            ws.merge_range(r, a, r, b, "", st.fill_note)
        ws.set_row(r, lines_height(height, 24))
    return r


def write_sign_off(ws, st: Styles, s: int, last_col: int, k: int | None, n: int) -> int:
    """The sign-off block from row ``s``; return its last row."""
    put(ws, s, 0, "Sign-off (fill in at the vessel)", st.subtitle)
    labels: tuple[str, ...] = SIGN_OFF_LABELS
    if k is None:
        labels = (f"batch number (1 to {n})",) + labels
    for j, label in enumerate(labels):
        r = s + 1 + j
        ws.merge_range(r, 0, r, 2, "", st.label)
        put(ws, r, 0, label, st.label)
        ws.merge_range(r, 3, r, last_col, "", st.fill_sign)
        ws.set_row(r, 22)
    return s + len(labels)


def protect(ws) -> None:
    """Protect ``ws`` without a password: locked cells (planned numbers, formulas,
    headings) cannot be typed over; the unlocked fill-in cells can."""
    ws.protect("", PROTECT_OPTIONS)
