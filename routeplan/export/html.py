"""The HTML report: one self-contained file (styles and pictures inside, no network at all).

Renders what :mod:`routeplan.views.report` and :mod:`routeplan.views.scheme` give with
jinja2 templates (autoescaping on: every name from a route file is shown as text), the
charts of :mod:`routeplan.export.html_charts` and the structures of
:mod:`routeplan.export.html_scheme`.  jinja2 is imported inside the functions.  The page
carries the caution on screen and at the foot of every printed page, and a content
security policy that forbids every fetch.
"""

from __future__ import annotations

import functools
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.compare import Comparison
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["plan_html", "compare_html", "write_plan_html", "write_compare_html", "NotebookReport",
           "notebook_report", "PLOTS_MISSING"]

#: What the report says in place of its charts when matplotlib is not installed.
PLOTS_MISSING = ("The charts need matplotlib, which is not installed here: "
                 "pip install 'routeplan[plots]' and write the report again.")


@functools.lru_cache(maxsize=1)
def _env():
    import jinja2

    from routeplan.export.html_scheme import formula_runs

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("routeplan.export", "templates"),
        autoescape=True, trim_blocks=True, lstrip_blocks=True, undefined=jinja2.StrictUndefined)
    env.filters["formula_runs"] = formula_runs
    env.filters["css_string"] = _css_string
    env.filters["num"] = _num_attr
    return env


def _css_string(text: str) -> str:
    """``text`` as the inside of a CSS string (quotes, backslashes, line ends escaped)."""
    out = []
    for ch in text:
        if ch in "\"\\" or ord(ch) < 32 or ch in "<>":
            out.append(f"\\{ord(ch):x} ")
        else:
            out.append(ch)
    return "".join(out)


def _num_attr(value: float | None) -> str:
    """A number for a ``data-value`` attribute: full precision, empty for None."""
    return "" if value is None else repr(float(value))


def _charts(report) -> tuple[dict[str, str], str | None]:
    try:
        from routeplan.export.html_charts import charts
    except ImportError:
        return {}, PLOTS_MISSING
    try:
        return charts(report.charts), None
    except ImportError:
        return {}, PLOTS_MISSING


def _scheme(plan: "Plan", units: "DisplayUnits | None" = None) -> dict[str, Any]:
    from routeplan.export.html_scheme import structure_svgs
    from routeplan.views.scheme import FONT_PX, scheme_layout

    scheme = scheme_layout(plan, units)
    return {"layout": scheme, "structures": structure_svgs(scheme), "font_px": FONT_PX}


def _common() -> dict[str, Any]:
    from routeplan import CAUTION, __version__

    return {"caution": CAUTION, "generator": f"routeplan {__version__}"}


def plan_html(plan: "Plan", *, fragment: bool = False, units: "DisplayUnits | None" = None) -> str:
    """The report of ``plan`` as one HTML page (or, with ``fragment``, a block for a notebook).

    Parameters
    ----------
    plan : Plan
        A finished plan.
    fragment : bool
        True for the summary and scheme only, without ``<html>``, for Jupyter.
    units : DisplayUnits, optional
        The units every amount, mass and volume of the plan is shown in, as on the
        terminal; default :func:`~routeplan.views.display_units.plan_units` (by the
        target's mass).
    """
    from routeplan.views.display_units import plan_units
    from routeplan.views.report import plan_report

    units = units or plan_units(plan)
    report = plan_report(plan, units)
    charts, charts_note = ({}, None) if fragment else _charts(report)
    src = plan.route.source
    return _env().get_template("fragment.html.j2" if fragment else "report.html.j2").render(
        r=report, scheme=_scheme(plan, units), charts=charts, charts_note=charts_note,
        source=None if src is None else {"path": src.path, "sha256": src.sha256}, **_common())


def compare_html(cmp: "Comparison", units: "DisplayUnits | None" = None) -> str:
    """The comparison of routes as one HTML page: schemes side by side, the measures, the trade-off.

    Values are written as the terminal's comparison writes them
    (:func:`routeplan.views.compare_text.value_text`), masses in ``units`` (default:
    chosen by the target's mass, as ``compare`` does without ``--units``).
    """
    from routeplan.views.compare_text import row_unit, tradeoff, value_text
    from routeplan.views.compare_words import note_texts, shown_rows
    from routeplan.views.display_units import choose_units
    from routeplan.views.report import plan_report

    units = choose_units(cmp.amount) if units is None else units

    routes = []
    for label, plan in zip(cmp.labels, cmp.plans):
        routes.append({"label": label, "report": plan_report(plan, units), "scheme": _scheme(plan, units)})
    rows = []
    for row in shown_rows(cmp):
        unit = row_unit(row, units)
        cells = []
        for i, v in enumerate(row.values):
            text = value_text(v, row.kind, units)
            if row.labels and i < len(row.labels) and row.labels[i]:
                text += f" ({row.labels[i]})"
            cells.append({"text": text, "value": v if isinstance(v, (int, float)) else None, "best": i in row.best})
        rows.append({"key": row.key, "heading": row.heading, "unit": "" if unit in ("-", "") else unit,
                     "better": row.better, "cells": cells, "note": row.note})
    return _env().get_template("compare.html.j2").render(
        cmp=cmp, tradeoff=tradeoff(cmp), notes=note_texts(cmp), routes=routes, rows=rows, **_common())


def write_plan_html(plan: "Plan", path, units: "DisplayUnits | None" = None) -> None:
    """Write the report of ``plan`` to ``path`` atomically (UTF-8), amounts, masses and
    volumes in ``units`` (default: chosen by the target's mass, as ``plan`` without ``--units``)."""
    from routeplan.export.atomic import write_text_atomic

    write_text_atomic(path, plan_html(plan, units=units))


def write_compare_html(cmp: "Comparison", path, units: "DisplayUnits | None" = None) -> None:
    """Write the comparison page to ``path`` atomically (UTF-8), masses in ``units``."""
    from routeplan.export.atomic import write_text_atomic

    write_text_atomic(path, compare_html(cmp, units))


class NotebookReport:
    """The summary and scheme of a plan, shown inline by Jupyter (``_repr_html_``).

    Made by :func:`routeplan.report`; ``str()`` of it is the full report page.
    """

    def __init__(self, plan: "Plan") -> None:
        self.plan = plan

    def _repr_html_(self) -> str:
        return plan_html(self.plan, fragment=True)

    def __str__(self) -> str:
        return plan_html(self.plan)

    def save(self, path) -> None:
        """Write the full report to ``path`` (atomically)."""
        write_plan_html(self.plan, path)


def notebook_report(plan: "Plan") -> NotebookReport:
    """An object that Jupyter shows as the plan's summary and scheme; ``.save(path)`` writes the report."""
    return NotebookReport(plan)
