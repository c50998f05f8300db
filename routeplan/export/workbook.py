"""Charge sheets as a workbook (``routeplan plan ROUTE --xlsx FILE``).

Sheets, in order:

``Summary``
    Route, target, overall yield, the route file's name and SHA-256, the date, the
    caution, the route metrics (PMI, E-factors, cost per kg of target), a line per
    step (batches, fill, yield, product, step metrics), the raw-material totals (mass,
    volume, amount, price, cost, with a live total), the stock comparison when the plan
    has one (with ``to buy`` as a live formula) and the warnings; see
    :mod:`routeplan.export.workbook_summary`.
one charge sheet per step and batch
    Named after the step id (``S1``, or ``S1 batch 2 of 3``), made valid and unique;
    see :mod:`routeplan.export.workbook_charges` for the layout and the print area, and
    :mod:`routeplan.export.workbook_charge_table` for the live formulas.  A step of more
    than :data:`MAX_BATCH_SHEETS` batches gets one sheet (``S1 all 596 batches``) headed
    "each of 596 batches (identical)", its quantities per batch: a vessel given in mL
    instead of L must not make a workbook of hundreds of sheets.
``Materials``
    Every material of the route: formula, molar mass, assay, density, solution data,
    price, hazards.
``Schedule``
    Only when the plan has a schedule (every step has a ``cycle_time``; otherwise the
    Summary says which steps lack one): every batch on its vessel in time, each
    vessel's busy and idle hours, and a timeline; see
    :mod:`routeplan.export.workbook_schedule`.

The workbook reads only the Plan (through :mod:`routeplan.views.tables`); it is
written with xlsxwriter into a temporary file beside the target, then renamed over it.
"""

from __future__ import annotations

import os
import re
from datetime import datetime, timezone
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan

__all__ = [
    "SUMMARY_SHEET",
    "MATERIALS_SHEET",
    "MAX_SHEET_NAME",
    "MAX_BATCH_SHEETS",
    "write_workbook",
    "charge_sheet_names",
    "safe_sheet_name",
    "written_text",
]

SUMMARY_SHEET = "Summary"
MATERIALS_SHEET = "Materials"

#: Most batches of one step that get a charge sheet each; a step of more batches gets
#: one sheet for all of them (they are identical) [-].
MAX_BATCH_SHEETS = 12

#: Longest sheet name a spreadsheet accepts [UTF-16 code units].
MAX_SHEET_NAME = 31

# Characters a sheet name may not hold, plus control characters.
_BAD_SHEET_CHARS = re.compile(r"[\[\]:*?/\\\x00-\x1f\x7f]")
# Names taken before any step: our own sheets, and one that spreadsheets reserve.
_RESERVED = (SUMMARY_SHEET, MATERIALS_SHEET, "History", "Schedule", "Derivation")


def _utf16_len(text: str) -> int:
    return len(text.encode("utf-16-le", "surrogatepass")) // 2


def _clip(text: str, units: int) -> str:
    while text and _utf16_len(text) > units:
        text = text[:-1]
    return text


def safe_sheet_name(base: str, suffix: str, taken: set[str]) -> str:
    """A valid sheet name from ``base`` + ``suffix``, unique among ``taken``.

    Characters a sheet name cannot hold (``[]:*?/\\`` and control characters) become
    ``_``; leading and trailing apostrophes and spaces go; ``base`` is shortened so the
    whole name fits in :data:`MAX_SHEET_NAME` UTF-16 units; a name already in
    ``taken`` (compared without case) gets `` (2)``, `` (3)``…  The name is added to
    ``taken`` (case-folded).

    Examples
    --------
    >>> safe_sheet_name("S1/a:b", "", set())
    'S1_a_b'
    """
    clean = _BAD_SHEET_CHARS.sub("_", base).strip(" '") or "step"
    n = 1
    while True:
        extra = suffix if n == 1 else f"{suffix} ({n})"
        name = _clip(clean, MAX_SHEET_NAME - _utf16_len(extra)).rstrip(" '")
        name = _clip((name or "step") + extra, MAX_SHEET_NAME)  # a suffix longer than a sheet name is cut
        if name.casefold() not in taken:
            taken.add(name.casefold())
            return name
        n += 1


def charge_sheet_names(plan: "Plan") -> list[tuple["StepPlan", int | None, str]]:
    """``(step, batch number, sheet name)`` of every charge sheet, in execution order.

    A step of one batch is named after its id; a step of ``n`` batches, ``n`` at most
    :data:`MAX_BATCH_SHEETS`, gives sheets ``"<id> batch k of n"``; a step of more
    batches gives one sheet ``"<id> all n batches"`` whose batch number is None (it
    stands for each of them).

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> [(k, name) for _sp, k, name in charge_sheet_names(NS(steps=[NS(id="S1", batches=2), NS(id="S2", batches=596)]))]
    [(1, 'S1 batch 1 of 2'), (2, 'S1 batch 2 of 2'), (None, 'S2 all 596 batches')]
    """
    taken = {name.casefold() for name in _RESERVED}
    out: list[tuple["StepPlan", int | None, str]] = []
    for sp in plan.steps:
        n = sp.batches
        if n > MAX_BATCH_SHEETS:
            out.append((sp, None, safe_sheet_name(sp.id, f" all {n} batches", taken)))
            continue
        for k in range(1, n + 1):
            suffix = f" batch {k} of {n}" if n > 1 else ""
            out.append((sp, k, safe_sheet_name(sp.id, suffix, taken)))
    return out


def written_text(when: datetime) -> str:
    """``when`` as ``YYYY-MM-DD HH:MM`` with its UTC offset where known."""
    text = when.strftime("%Y-%m-%d %H:%M")
    if when.tzinfo is not None:
        off = when.strftime("%z")
        text += f" {off[:3]}:{off[3:]}" if off else ""
    return text


def write_workbook(plan: "Plan", path: str | os.PathLike, *, written: datetime | None = None) -> Path:
    """Write the plan's charge sheets to the workbook ``path`` (xlsx), atomically.

    Parameters
    ----------
    plan : Plan
        The plan; only read.
    path : str or path-like
        The workbook to write; an existing file is replaced only once the new one is
        complete.
    written : datetime, optional
        Date and time shown as "written" (default: now, local time).

    Returns
    -------
    Path
        ``path``.

    Raises
    ------
    OutputError
        When the file cannot be written (its folder is missing, no permission).
    """
    import xlsxwriter
    from xlsxwriter.exceptions import FileCreateError

    from routeplan import CAUTION, __version__
    from routeplan.errors import OutputError
    from routeplan.export.atomic import atomic_path
    from routeplan.export.workbook_charges import page_texts, write_charge_sheet
    from routeplan.export.workbook_styles import WORKBOOK_OPTIONS, Styles
    from routeplan.export.workbook_summary import write_materials, write_summary

    when = written or datetime.now().astimezone()
    stamp = written_text(when)
    src = plan.route.source
    route_file = src.path.replace("\\", "/").rsplit("/", 1)[-1] if src else "(not read from a file)"
    sha = src.sha256 if src else ""
    texts = page_texts(plan.route.name, route_file, sha, "CAUTION: " + CAUTION)
    context = {
        "written": stamp,
        "route_line": f"{plan.route.name} · file {route_file} · SHA-256 {sha or '(none)'}",
        **texts,
    }
    target = Path(path)
    with atomic_path(target, suffix=".xlsx") as tmp:
        # xlsxwriter writes nothing before close(): a failure while the sheets are
        # built leaves only the empty temporary file, which atomic_path removes
        wb = xlsxwriter.Workbook(str(tmp), WORKBOOK_OPTIONS)
        # document properties take UTC
        created = when.astimezone(timezone.utc).replace(tzinfo=None) if when.tzinfo else when
        wb.set_properties({
            "title": f"Charge sheets: {plan.route.name}",
            "subject": f"{plan.target_material}, {plan.target_mass.m_as('kg'):g} kg",
            "author": f"routeplan {__version__}",
            "comments": "CAUTION: " + CAUTION,
            "created": created,
        })
        st = Styles(wb)
        names = charge_sheet_names(plan)
        summary = wb.add_worksheet(SUMMARY_SHEET)
        write_summary(summary, st, plan, stamp, context, names)
        for sp, k, name in names:
            write_charge_sheet(wb.add_worksheet(name), st, plan, sp, k, context)
        write_materials(wb.add_worksheet(MATERIALS_SHEET), st, plan, context)
        from routeplan.export.workbook_schedule import SCHEDULE_SHEET, write_schedule_sheet

        if plan.schedule is not None:
            from routeplan.export.workbook_records import protect

            schedule = wb.add_worksheet(SCHEDULE_SHEET)
            write_schedule_sheet(schedule, st, plan, context)
            protect(schedule)  # like every sheet: no password, nothing to type in
        if plan.derivation is not None:
            from routeplan.export.workbook_derivation import DERIVATION_SHEET, write_derivation
            from routeplan.export.workbook_records import protect

            derivation = wb.add_worksheet(DERIVATION_SHEET)
            write_derivation(derivation, st, plan, "CAUTION: " + CAUTION, context)
            protect(derivation)  # like every sheet: no password, nothing to type in
        summary.activate()
        try:
            wb.close()
        except FileCreateError as exc:
            raise OutputError(f"cannot write '{target}': {exc}", path=str(target)) from None
    return target
