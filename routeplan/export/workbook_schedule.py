"""The Schedule sheet of the charge-sheet workbook.

Title and caution; the campaign's duration and the step that sets its pace; one row per
batch (:data:`~routeplan.views.schedule_text.BATCH_SLOT_COLUMNS`); one row per vessel
(:data:`~routeplan.views.schedule_text.VESSEL_USE_COLUMNS`); then a timeline: one row per
vessel, one column per slice of the campaign, a batch's cells filled and its first cell
naming the step.  Without a schedule the sheet says why.  Reads the views only.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from routeplan.export.workbook_styles import Styles, put, sheet_title

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["SCHEDULE_SHEET", "TIMELINE_COLUMNS", "write_schedule_sheet"]

SCHEDULE_SHEET = "Schedule"

#: Columns of the timeline grid [-] (each one campaign_h / TIMELINE_COLUMNS hours).
TIMELINE_COLUMNS = 48

# fills of the timeline, one per step in schedule order, repeating
_FILLS = ("#9CC3E6", "#A9D18E", "#F4B183", "#FFD966", "#C9A0DC", "#8FD3C7", "#E6A1A1", "#BFBFBF")


def write_schedule_sheet(ws, st: Styles, plan: "Plan", context: dict[str, str]) -> dict[str, int]:
    """Write the Schedule sheet; return the 0-based rows of its tables.

    Returns
    -------
    dict
        ``batches`` and ``vessels`` (heading rows, -1 without a schedule) and ``timeline``
        (first lane row, -1 without a schedule).
    """
    from routeplan import CAUTION
    from routeplan.views.schedule_text import (BATCH_SLOT_COLUMNS, VESSEL_USE_COLUMNS, batch_rows, pace_text,
                                               schedule_missing_text, timeline_data, vessel_rows)

    ws.write_string(0, 0, f"Schedule · {plan.route.name}", st.title)
    ws.merge_range(1, 0, 1, 9, "", st.caution)
    ws.write_string(1, 0, "CAUTION: " + CAUTION, st.caution)
    ws.set_row(1, 30)
    ws.set_landscape()
    ws.fit_to_pages(1, 0)
    ws.set_header(context.get("header", ""))
    ws.set_footer(context.get("footer", ""))
    out = {"batches": -1, "vessels": -1, "timeline": -1}
    if plan.schedule is None:
        ws.write_string(3, 0, schedule_missing_text(plan), st.text)
        ws.set_column(0, 0, 100)
        return out
    ws.write_string(3, 0, pace_text(plan), st.text)
    r = 5
    r = _table(ws, st, r, "Batches, in schedule order (hours from the campaign start)", BATCH_SLOT_COLUMNS,
               batch_rows(plan), out, "batches")
    ws.freeze_panes(out["batches"] + 1, 0)
    ws.repeat_rows(out["batches"], out["batches"])
    r = _table(ws, st, r + 1, "Vessels", VESSEL_USE_COLUMNS, vessel_rows(plan), out, "vessels")
    data = timeline_data(plan)
    per_col = data["campaign_h"] / TIMELINE_COLUMNS
    r += 1
    put(ws, r, 0, f"Timeline: one column = {per_col:.3g} h", st.subtitle)
    r += 1
    out["timeline"] = r
    order = [s.id for s in plan.schedule.steps]
    fills = {sid: ws_format(st, _FILLS[i % len(_FILLS)]) for i, sid in enumerate(order)}
    first = 1
    for lane in data["lanes"]:
        put(ws, r, 0, lane["lane"], st.label)
        for bar in lane["bars"]:
            a = int(math.floor(bar["start_h"] / per_col + 1e-9))
            b = max(a + 1, int(math.ceil(bar["end_h"] / per_col - 1e-9)))
            for c in range(a, min(b, TIMELINE_COLUMNS)):
                label = bar["step"] if c == a else ""
                ws.write_string(r, first + c, label, fills[bar["step"]])
        r += 1
    ws.set_column(0, 0, 14)
    ws.set_column(first, first + TIMELINE_COLUMNS - 1, 3.2)
    return out


def ws_format(st: Styles, colour: str):
    """A filled cell format for the timeline (made once per colour by :class:`Styles`)."""
    return st._make(bg_color=colour, font_size=8, border=1, border_color="#FFFFFF")


#: Timeline columns merged into one cell of a table column (the first is column A) [-].
_SPAN = 4


def _cell(ws, r: int, c: int, value, fmt) -> None:
    """Table column ``c``: column A for the first, then :data:`_SPAN` merged timeline columns each."""
    if c == 0:
        put(ws, r, 0, value, fmt)
        return
    a = 1 + (c - 1) * _SPAN
    ws.merge_range(r, a, r, a + _SPAN - 1, "", fmt)
    put(ws, r, a, value, fmt)


def _table(ws, st: Styles, r: int, title: str, columns, rows, out: dict[str, int], key: str) -> int:
    put(ws, r, 0, title, st.subtitle)
    r += 1
    out[key] = r
    for c, col in enumerate(columns):
        _cell(ws, r, c, sheet_title(col), st.heading)
    ws.set_row(r, 30)
    for row in rows:
        r += 1
        for c, col in enumerate(columns):
            value = row.get(col.key)
            if col.key == "utilisation" and value is not None:
                fmt = st.percent
            elif isinstance(value, (int, float)) and not isinstance(value, bool):
                fmt = st.integer if col.key == "batch" else st.ratio
            else:
                value, fmt = ("" if value is None else str(value)), st.cell_text
            _cell(ws, r, c, value, fmt)
    return r + 1
