"""A comparison of routes for people: the trade-off in one sentence, and the terminal's
table (:func:`comparison_blocks`) in the comparison's one set of units.  The rows' words
come from :mod:`routeplan.views.compare_words`."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Sequence

from routeplan.views.compare_words import SHORT, note_texts, shown_rows
from routeplan.views.numbers import money, pct, share
from routeplan.views.text_blocks import Col, Grid, Para, blank, join_words

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.compare import CompareRow, Comparison
    from routeplan.views.compare_words import ShownRow
    from routeplan.views.display_units import DisplayUnits
    from routeplan.views.text_blocks import Block

__all__ = ["tradeoff_sentence", "tradeoff", "BEST_MARK", "value_text", "row_unit", "comparison_blocks"]

#: Mark put after the best value of a row.
BEST_MARK = "*"


def tradeoff(cmp: "Comparison") -> str:
    """The trade-off sentence of a comparison (:func:`tradeoff_sentence` of its rows)."""
    return tradeoff_sentence(cmp.labels, cmp.rows)


def tradeoff_sentence(labels: Sequence[str], rows: "Sequence[CompareRow]") -> str:
    """One sentence saying which route wins on which measure (each row by its short name).

    Examples
    --------
    >>> from routeplan.plan.compare import LOWER, CompareRow
    >>> rows = [CompareRow("pmi", "kg/kg", "ratio", LOWER, (20.0, 30.0), best=(0,)),
    ...         CompareRow("batches", "-", "count", LOWER, (9, 6), best=(1,))]
    >>> tradeoff_sentence(["A", "B"], rows)
    'A wins on PMI; B wins on batches.'
    """
    wins: dict[tuple[int, ...], list[str]] = {}
    equal: list[str] = []
    unranked: list[str] = []
    for r in rows:
        if r.better is None:
            continue
        if r.best:
            wins.setdefault(r.best, []).append(SHORT[r.key])
        elif r.all_equal:
            equal.append(SHORT[r.key])
        else:
            unranked.append(SHORT[r.key])
    parts = []
    ranked_count = sum(len(v) for v in wins.values())
    for idx in sorted(wins, key=lambda k: (-len(wins[k]), k)):
        who = join_words([labels[i] for i in idx])
        verb = "wins" if len(idx) == 1 else "share the best value"
        if len(idx) == 1 and len(wins) == 1 and not equal and not unranked:
            parts.append(f"{who} wins on every measure ranked ({join_words(wins[idx])})")
        else:
            parts.append(f"{who} {verb} on {join_words(wins[idx])}")
    if equal:
        parts.append(f"the routes are equal on {join_words(equal)}")
    if unranked:
        parts.append(f"{join_words(unranked)} cannot be ranked")
    if not ranked_count and not parts:
        return "No measure could be ranked."
    text = "; ".join(parts)
    return text[0].upper() + text[1:] + "."


def value_text(value: Any, kind: str, units: "DisplayUnits") -> str:
    """A value of a comparison row as the terminal shows it, without its unit.

    Counts whole; fractions as percentages and ratios [kg/kg, h] to 3 significant
    figures; money and masses (in ``units``) to 4 (:mod:`routeplan.views.numbers`).

    >>> from routeplan.views.display_units import SETS
    >>> [value_text(v, k, SETS["kilo"]) for v, k in ((5, "count"), (0.634, "fraction"), (23.75, "ratio"),
    ...                                               (342.47, "money"), (427.5, "mass"), (None, "ratio"))]
    ['5', '63.4 %', '23.8', '342.5', '427.5', '–']
    """
    if value is None:
        return "–"
    if kind == "count":
        return f"{int(value)}"
    if kind == "fraction":
        return pct(value)
    if kind == "money":
        return money(value)
    if kind == "mass":
        return units.number(value, "mass")
    return share(value)


def row_unit(row: "ShownRow", units: "DisplayUnits") -> str:
    """The unit of a comparison row's values: ``%`` for fractions, ``units``' mass unit
    for masses, else the row's own (``kg/kg``, the currency per kg, ``-``)."""
    if row.kind == "fraction":
        return "%"
    if row.kind == "mass":
        return units.mass.symbol
    return row.unit


def comparison_blocks(cmp: "Comparison", units: "DisplayUnits") -> "list[Block]":
    """The comparison as the terminal shows it: a table with a column per route (the best
    value of each row marked with :data:`BEST_MARK`), what the mark means, the notes, the
    trade-off sentence.  Without the safety caution, which the caller adds last.

    Parameters
    ----------
    cmp : Comparison
    units : DisplayUnits
        One set for every route (masses in its unit of mass).
    """
    cols = (Col("measure", wrap=True), Col("unit")) + tuple(Col(label, "right", wrap=True) for label in cmp.labels)
    shown = shown_rows(cmp)
    rows, strong = [], set()
    for r, row in enumerate(shown):
        cells = [row.heading, row_unit(row, units)]
        for i, v in enumerate(row.values):
            text = value_text(v, row.kind, units) + (f" {BEST_MARK}" if i in row.best else "")
            if i in row.best:
                strong.add((r, 2 + i))
            if row.labels and row.labels[i]:
                text += "\n" + row.labels[i]
            cells.append(text)
        rows.append(tuple(cells))
    title = f"Routes to {cmp.target_material}, each planned for {units.mass_text(cmp.amount)} (before overage)"
    higher = [r.short for r in shown if r.better == "higher"]
    out: list[Block] = [Grid(cols, tuple(rows), title=title, strong=frozenset(strong)),
                        Para(f"{BEST_MARK} best in its row: lower is better, except {join_words(higher) or 'none'}.")]
    out += [Para(f"{row.short}: {row.note}", indent=2) for row in shown if row.note]
    out += [Para(f"note: {note}") for note in note_texts(cmp)]
    out += [blank(), Para(tradeoff(cmp), label="Trade-off:"), blank()]
    return out
