"""The words of a route comparison: row headings and short names, the texts beside values,
why a row is not ranked, and the notes.

:mod:`routeplan.plan.compare` gives data only (row keys, values, closed-vocabulary
qualifiers and reasons, note records); this module words them, once, for every writer:
the terminal (:mod:`routeplan.views.compare_text`), the JSON and the workbook
(:mod:`routeplan.export.compare_out`) and the HTML page (:mod:`routeplan.export.html`).
Each writer lays out :func:`shown_rows` and :func:`note_texts` and never words a row
itself.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.frozen import frozen
from routeplan.plan.compare import (OveragesDiffer, StepsWithoutYield, TargetFromFirst, YieldsDrawn,
                                    YieldsPlanned, who)
from routeplan.views.numbers import given_pct
from routeplan.views.text_blocks import join_words
from routeplan.vocab import UnrankedReason, ValueQualifier

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.compare import CompareNote, CompareRow, Comparison, Unranked
    from routeplan.vocab import BetterIs, ValueKind

__all__ = ["HEADINGS", "SHORT", "QUALIFIER_TEXT", "ShownRow", "heading", "value_labels", "unranked_text",
           "note_text", "note_texts", "shown_rows"]

#: Heading of each row, by key (``{level}``: the confidence asked, e.g. ``90 %``).
HEADINGS = {
    "target_mass": "target mass planned, overage included",
    "steps": "steps",
    "longest_linear_sequence": "longest linear sequence",
    "overall_yield": "overall yield along the longest linear sequence",
    "pmi": "process mass intensity (PMI)",
    "e_factor_complete": "complete E-factor (cEF)",
    "e_factor_simple": "simple E-factor (sEF)",
    "cost_per_kg": "raw-material cost per kg of target",
    "batches": "batches, all steps",
    "largest_raw_material": "largest single raw material",
    "campaign_h": "campaign duration, first batch to last",
    "halogenated_waste_per_kg": "halogenated waste per kg of target",
    "cost_of_goods_per_kg": "cost of goods per kg of target (materials, plant, waste)",
    "plant_cost_per_kg": "plant time per kg of target",
    "waste_cost_per_kg": "waste disposal per kg of target",
    "probability_of_target": "probability of delivering the target (yields drawn)",
    "confidence_target": "target to plan for {level} confidence, before overage",
}

#: Short name of each row, by key: what the trade-off sentence and the notes call it.
SHORT = {
    "target_mass": "target mass",
    "steps": "steps",
    "longest_linear_sequence": "longest linear sequence",
    "overall_yield": "overall yield",
    "pmi": "PMI",
    "e_factor_complete": "complete E-factor",
    "e_factor_simple": "simple E-factor",
    "cost_per_kg": "raw-material cost",
    "batches": "batches",
    "largest_raw_material": "largest single raw material",
    "campaign_h": "campaign duration",
    "halogenated_waste_per_kg": "halogenated waste",
    "cost_of_goods_per_kg": "cost of goods",
    "plant_cost_per_kg": "plant time",
    "waste_cost_per_kg": "waste disposal",
    "probability_of_target": "probability of delivering",
    "confidence_target": "confidence target",
}

#: The text beside a value bounded by a qualifier.
QUALIFIER_TEXT = {
    ValueQualifier.PRICED_MATERIALS_ONLY: "priced materials only",
    ValueQualifier.PRICED_ITEMS_ONLY: "priced items only",
    ValueQualifier.NO_UNCERTAINTY: "no yield ranges: carries no uncertainty",
}

#: How the data beside a value is written, by row key (default: as it is).
_WHICH_TEXT = {
    "longest_linear_sequence": lambda chain: " → ".join(chain),
    "campaign_h": lambda step: f"pace: {step}",
}


@frozen
class ShownRow:
    """A comparison row in words, as every writer lays it out.

    Attributes
    ----------
    key, unit, kind, better, values, best
        As in :class:`~routeplan.plan.compare.CompareRow`.
    heading : str
        The row's heading.
    short : str
        Its short name (the trade-off sentence, the not-ranked line).
    labels : tuple of str or None
        The text beside each value (a material, a chain of steps, the pace step, what
        bounds the value); empty when the row has none.
    note : str or None
        Why the row is not ranked.
    """

    key: str
    heading: str
    short: str
    unit: str
    kind: "ValueKind"
    better: "BetterIs | None"
    values: tuple[Any, ...]
    labels: tuple[str | None, ...]
    best: tuple[int, ...]
    note: str | None


def heading(row: "CompareRow", cmp: "Comparison") -> str:
    """The heading of ``row``; the confidence target's names the confidence the plans drew for."""
    text = HEADINGS[row.key]
    if "{level}" in text:
        text = text.format(level=f"{100 * cmp.plans[0].uncertainty.confidence:g} %")
    return text


def value_labels(row: "CompareRow") -> tuple[str | None, ...]:
    """The text beside each value of ``row`` (its data, then what bounds it); empty when none."""
    if not row.which and not row.qualifiers:
        return ()
    write = _WHICH_TEXT.get(row.key, str)
    out = []
    for i in range(len(row.values)):
        w = row.which[i] if row.which else None
        q = row.qualifiers[i] if row.qualifiers else None
        parts = [p for p in (None if w is None else write(w), None if q is None else QUALIFIER_TEXT[q]) if p]
        out.append(", ".join(parts) if parts else None)
    return tuple(out)


def unranked_text(why: "Unranked | None", cmp: "Comparison") -> str | None:
    """Why a row is not ranked, as a sentence (None when it is ranked or not rankable)."""
    if why is None:
        return None
    R = UnrankedReason
    r = why.reason
    if r == R.NO_VALUE:
        text = "a route has no value"
    elif r == R.CURRENCIES:
        named = ", ".join(str(c) for c in why.currencies if c is not None)
        none = None in why.currencies
        text = ("the routes give prices in different currencies ("
                + "; ".join(x for x in (named, "a route gives none" if none else "") if x) + ")")
    elif r == R.NO_COST:
        text = "a route has no cost (no currency or no prices)"
    elif r == R.NOTHING_PRICED:
        text = "a route has nothing priced here (no currency, prices, rates or waste prices)"
    elif r in (R.UNPRICED_MATERIALS, R.UNPRICED_ITEMS):
        listed = "; ".join(f"{cmp.names[i]}: {', '.join(items)}" for i, items in zip(why.routes, why.items))
        what = "raw materials" if r == R.UNPRICED_MATERIALS else "items"
        text = f"priced {what} only, some have no price ({listed})"
    elif r == R.NO_SCHEDULE:
        text = "a route has no schedule (a step without cycle_time)"
    elif r == R.NO_UNCERTAINTY:
        one = len(why.routes) == 1
        text = (f"{join_words(cmp.names[i] for i in why.routes)} {'carries' if one else 'carry'} no uncertainty "
                "(no step gives a yield range)")
    elif r == R.YIELDS_WITHOUT_CASE:
        text = (f"{', '.join(cmp.labels[i] for i in why.routes)} ha{'s' if len(why.routes) == 1 else 've'} "
                f"steps without a {why.yields} yield, planned at their expected yields")
    else:  # pragma: no cover - every reason is worded above
        raise ValueError(f"no words for the reason {r!r}")
    return f"not ranked: {text}"


def note_text(note: "CompareNote", cmp: "Comparison") -> str:
    """One note of a comparison as a sentence (routes named by file and name)."""
    def route(i: int) -> str:
        return who(cmp.plans[i].route)

    if isinstance(note, TargetFromFirst):
        asked = ", ".join(f"{route(i)} {kg:.6g} kg" for i, kg in note.asked)
        return (f"every route is planned for {note.amount_kg:.6g} kg, the target amount of the first route "
                f"{route(0)}; the others ask for other amounts ({asked})")
    if isinstance(note, OveragesDiffer):
        each = ", ".join(f"{route(i)} {given_pct(x)}" for i, x in enumerate(note.overages))
        return (f"the routes plan different overages ({each}), so the masses planned differ; "
                "ratios per kg of target are still comparable")
    if isinstance(note, YieldsPlanned):
        return f"every route is planned at its steps' {note.case} yields"
    if isinstance(note, StepsWithoutYield):
        many = len(note.steps) > 1
        return (f"{route(note.route)}: step{'s' if many else ''} {', '.join(note.steps)} "
                f"ha{'ve' if many else 's'} no {note.case} yield and {'are' if many else 'is'} planned at "
                "the expected yield; the rows that depend on yields are not ranked")
    if isinstance(note, YieldsDrawn):
        return f"every route's step yields are drawn {note.draws} times ({note.distribution}, seed {note.seed})"
    raise TypeError(f"not a comparison note: {note!r}")


def note_texts(cmp: "Comparison") -> tuple[str, ...]:
    """Every note of ``cmp`` as a sentence, in order."""
    return tuple(note_text(n, cmp) for n in cmp.notes)


def shown_rows(cmp: "Comparison") -> tuple[ShownRow, ...]:
    """Every row of ``cmp`` in words, in display order."""
    return tuple(ShownRow(r.key, heading(r, cmp), SHORT[r.key], r.unit, r.kind, r.better, r.values,
                          value_labels(r), r.best, unranked_text(r.unranked, cmp))
                 for r in cmp.rows)
