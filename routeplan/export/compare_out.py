"""A route comparison written out: terminal table, JSON and workbook.

Reads a :class:`~routeplan.plan.compare.Comparison` and never recomputes it; the
words of its rows and notes come from :mod:`routeplan.views.compare_words`, the
terminal's text from :mod:`routeplan.views.compare_text`.  xlsxwriter is imported
inside the function that needs it.  Every output carries the safety caution.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any

from routeplan.views.compare_text import tradeoff
from routeplan.views.compare_words import note_texts, shown_rows

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.compare import Comparison
    from routeplan.views.compare_words import ShownRow
    from routeplan.views.display_units import DisplayUnits

__all__ = [
    "COMPARE_FORMAT",
    "comparison_to_dict",
    "comparison_to_json",
    "print_comparison",
    "write_comparison_xlsx",
]

#: The ``format`` value of the comparison JSON.
COMPARE_FORMAT = "routeplan-compare/1"

_SHOWN_UNIT = {"fraction": "%"}


def _shown_unit(row: "ShownRow") -> str:
    return _SHOWN_UNIT.get(row.kind, row.unit)


# ------------------------------------------------------------------------ JSON


def _row_dict(cmp: "Comparison", row: "ShownRow") -> dict[str, Any]:
    out: dict[str, Any] = {
        "key": row.key,
        "heading": row.heading,
        "unit": row.unit,
        "better": row.better,
        "values": list(row.values),
        "best": [cmp.labels[i] for i in row.best],
        "note": row.note,
    }
    if row.labels:
        out["labels"] = list(row.labels)
    return out


def comparison_to_dict(cmp: "Comparison") -> dict[str, Any]:
    """The comparison as plain JSON values (format ``routeplan-compare/1``).

    ``rows[i].values`` are in route order (``routes``) and in the row's ``unit``;
    ``rows[i].best`` lists the labels of the routes with the best value.
    """
    from routeplan import CAUTION, __version__

    routes = []
    for label, name, plan in zip(cmp.labels, cmp.names, cmp.plans):
        src = plan.route.source
        routes.append({"label": label, "name": name,
                       "file": None if src is None else src.path,
                       "sha256": None if src is None else src.sha256})
    return {
        "format": COMPARE_FORMAT,
        "target": {"material": cmp.target_material, "amount_kg": cmp.amount},
        "routes": routes,
        "currency": cmp.currency,
        "rows": [_row_dict(cmp, r) for r in shown_rows(cmp)],
        "tradeoff": tradeoff(cmp),
        "notes": list(note_texts(cmp)),
        "metrics": [p.metrics.to_dict() for p in cmp.plans],
        "caution": CAUTION,
        "generator": f"routeplan {__version__}",
    }


def comparison_to_json(cmp: "Comparison", *, indent: int = 2) -> str:
    """The comparison as a JSON text (UTF-8, no NaN)."""
    return json.dumps(comparison_to_dict(cmp), indent=indent, ensure_ascii=False, allow_nan=False) + "\n"


# -------------------------------------------------------------------- terminal


def print_comparison(cmp: "Comparison", *, file=None, width: int | None = None,
                     units: "DisplayUnits | None" = None, style: bool | None = None) -> None:
    """Print the comparison table, the trade-off sentence, notes and the caution.

    ``units`` defaults to the set that suits the comparison's target
    (:func:`routeplan.views.display_units.choose_units`); ``file``, ``width`` and
    ``style`` as for :func:`routeplan.export.terminal.print_blocks`.
    """
    from routeplan.export.terminal import print_blocks
    from routeplan.views.compare_text import comparison_blocks
    from routeplan.views.display_units import choose_units
    from routeplan.views.plan_text import caution_block

    u = units or choose_units(cmp.amount)
    print_blocks([*comparison_blocks(cmp, u), caution_block()], file=file, width=width, style=style)


# -------------------------------------------------------------------- workbook

_NUMBER_FORMATS = {"count": "0", "fraction": "0.0%", "ratio": "0.00", "money": "#,##0.00",
                   "mass": "#,##0.00"}


def write_comparison_xlsx(cmp: "Comparison", path) -> None:
    """Write the comparison to a workbook at ``path``, atomically.

    One sheet, ``comparison``: a title, the caution, one row per measure (heading,
    unit, which way is better, one column per route, the best routes), the text that
    goes with a value on the row below it, then the trade-off sentence and notes.
    Strings are written as strings (never read as formulas or links); best values are
    bold on a green fill.
    """
    import xlsxwriter

    from routeplan import CAUTION
    from routeplan.export.atomic import atomic_path

    with atomic_path(path, suffix=".xlsx") as tmp:
        wb = xlsxwriter.Workbook(str(tmp), {"strings_to_formulas": False, "strings_to_urls": False,
                                            "strings_to_numbers": False})
        try:
            _fill_sheet(wb, cmp, CAUTION)
        finally:
            wb.close()


#: Column widths of the comparison sheet [character units]: measure, unit, better, one
#: per route, best.  With up to four routes they add up to about 1,000 px, so the sheet
#: fitted to one landscape page wide prints at 90 % or more on Letter.
_COMPARE_WIDTHS = (34, 9, 9, 20, 24)


def _fill_sheet(wb, cmp: "Comparison", caution: str) -> None:
    """The comparison sheet: printed landscape, fitted to one page wide, its headings
    and long texts wrapped in rows tall enough to show them whole."""
    from routeplan.export.workbook_styles import lines_height, wrapped_lines

    ws = wb.add_worksheet("comparison")
    bold = wb.add_format({"bold": True, "valign": "top"})
    head = wb.add_format({"bold": True, "bottom": 1, "text_wrap": True, "valign": "top"})
    wrap = wb.add_format({"text_wrap": True, "valign": "top"})
    dim = wb.add_format({"italic": True, "font_color": "#555555", "text_wrap": True, "valign": "top"})
    plain = {k: wb.add_format({"num_format": f, "valign": "top"}) for k, f in _NUMBER_FORMATS.items()}
    best = {k: wb.add_format({"num_format": f, "bold": True, "bg_color": "#D5EDD0", "valign": "top"})
            for k, f in _NUMBER_FORMATS.items()}
    n = len(cmp.labels)
    last = 3 + n
    w_measure, w_unit, w_better, w_route, w_best = _COMPARE_WIDTHS
    widths = [w_measure, w_unit, w_better] + [w_route] * n + [w_best]
    for c, w in enumerate(widths):
        ws.set_column(c, c, w)

    def fit(r: int, cells: dict[int, tuple[str, int]], *, is_bold: bool = False) -> None:
        """Raise row ``r`` to the most lines any text wraps to (column -> (text, last column))."""
        lines = max((wrapped_lines(t, sum(widths[a:b + 1]), bold=is_bold, columns=b - a + 1)
                     for a, (t, b) in cells.items()), default=1)
        if lines > 1:
            ws.set_row(r, lines_height(lines))

    ws.write_string(0, 0, f"Routes to {cmp.target_material}, each planned for {cmp.amount:.6g} kg "
                          "(before overage)", bold)
    ws.merge_range(1, 0, 1, last, "", wrap)
    ws.write_string(1, 0, "CAUTION: " + caution, wrap)
    fit(1, {0: ("CAUTION: " + caution, last)})
    r = 3
    headings = ["measure", "unit", "better"] + list(cmp.labels) + ["best"]
    for c, h in enumerate(headings):
        ws.write_string(r, c, h, head)
    fit(r, {c: (h, c) for c, h in enumerate(headings)}, is_bold=True)
    shown = shown_rows(cmp)
    for row in shown:
        r += 1
        ws.write_string(r, 0, row.heading, wrap)
        ws.write_string(r, 1, _shown_unit(row), wrap)
        ws.write_string(r, 2, row.better or "", wrap)
        for i, v in enumerate(row.values):
            if v is not None:
                fmt = (best if i in row.best else plain)[row.kind]
                ws.write_number(r, 3 + i, float(v), fmt)
        best_text = ", ".join(cmp.labels[i] for i in row.best)
        ws.write_string(r, last, best_text, wrap)
        fit(r, {0: (row.heading, 0), last: (best_text, last)})
        if row.labels:
            r += 1
            ws.write_string(r, 0, f"{row.heading}: which", dim)
            for i, text in enumerate(row.labels):
                if text:
                    ws.write_string(r, 3 + i, text, dim)
            fit(r, {0: (f"{row.heading}: which", 0), **{3 + i: (t, 3 + i) for i, t in enumerate(row.labels) if t}})
    r += 2
    texts = [("trade-off", tradeoff(cmp), bold)] + [(row.short, row.note, wrap) for row in shown if row.note] \
        + [("note", note, wrap) for note in note_texts(cmp)]
    for label, text, fmt in texts:
        ws.write_string(r, 0, label, fmt)
        ws.merge_range(r, 1, r, last, "", wrap)
        ws.write_string(r, 1, text, wrap)
        fit(r, {1: (text, last)})
        r += 1
    ws.set_landscape()
    ws.fit_to_pages(1, 0)
    ws.repeat_rows(3)
    ws.print_area(0, 0, max(r - 1, 3), last)
    ws.set_margins(left=0.4, right=0.4, top=0.6, bottom=0.7)
    ws.set_footer("&L&7CAUTION: planning estimates only; see the sheet&R&8page &P of &N")
    ws.freeze_panes(4, 1)
