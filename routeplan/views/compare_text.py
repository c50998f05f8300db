"""Sentences about a comparison of routes: the trade-off in one sentence."""

from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

from routeplan.plan.compare import LOWER, CompareRow, _join

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.compare import Comparison

__all__ = ["tradeoff_sentence", "tradeoff"]


def tradeoff(cmp: "Comparison") -> str:
    """The trade-off sentence of a comparison (:func:`tradeoff_sentence` of its rows)."""
    return tradeoff_sentence(cmp.labels, cmp.rows)


def tradeoff_sentence(labels: Sequence[str], rows: Sequence[CompareRow]) -> str:
    """One sentence saying which route wins on which measure.

    Examples
    --------
    >>> rows = [CompareRow("pmi", "PMI", "PMI", "kg/kg", "ratio", LOWER, (20.0, 30.0), best=(0,)),
    ...         CompareRow("batches", "batches", "batches", "-", "count", LOWER, (9, 6), best=(1,))]
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
            wins.setdefault(r.best, []).append(r.short)
        elif r.all_equal:
            equal.append(r.short)
        else:
            unranked.append(r.short)
    parts = []
    ranked_count = sum(len(v) for v in wins.values())
    for idx in sorted(wins, key=lambda k: (-len(wins[k]), k)):
        who = _join([labels[i] for i in idx])
        verb = "wins" if len(idx) == 1 else "share the best value"
        if len(idx) == 1 and len(wins) == 1 and not equal and not unranked:
            parts.append(f"{who} wins on every measure ranked ({_join(wins[idx])})")
        else:
            parts.append(f"{who} {verb} on {_join(wins[idx])}")
    if equal:
        parts.append(f"the routes are equal on {_join(equal)}")
    if unranked:
        parts.append(f"{_join(unranked)} cannot be ranked")
    if not ranked_count and not parts:
        return "No measure could be ranked."
    text = "; ".join(parts)
    return text[0].upper() + text[1:] + "."
