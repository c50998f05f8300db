"""The purchase list: rows and notes from the plan's raw-material totals.

What to order for the campaign, one row per bought material in order of first use: the
need as a mass [kg] and, where a density is known (a solution, a liquid), as a volume
[L]; with a stock list, what the stock gives [kg] and what is left to buy [kg] and [L];
the pack size; the packs to order (covering what is left to buy) and what they hold.  Materials the route marks
``bought: false`` are left out, and :func:`not_bought_note` says so.  Read from the Plan
only (``RawMaterialTotal.pack``, ``packs``, ``ordered``); nothing is computed here.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.units import magnitude
from routeplan.views.tables import Column

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["PURCHASE_COLUMNS", "STOCK_PURCHASE_COLUMNS", "purchase_columns", "purchase_rows",
           "not_bought_note", "pack_text"]

#: Columns of the purchase list.
PURCHASE_COLUMNS = (
    Column("material", "key"),
    Column("name", "material"),
    Column("need_kg", "needed", "kg"),
    Column("need_L", "needed", "L"),
    Column("pack", "pack"),
    Column("packs", "packs to order", "-"),
    Column("ordered", "ordered"),
)

#: The same with a stock list: what the stock gives and what is left to buy, before the pack.
STOCK_PURCHASE_COLUMNS = PURCHASE_COLUMNS[:4] + (
    Column("stock_kg", "from stock", "kg"),
    Column("buy_kg", "to buy", "kg"),
    Column("buy_L", "to buy", "L"),
) + PURCHASE_COLUMNS[4:]


def purchase_columns(plan: "Plan") -> tuple[Column, ...]:
    """:data:`STOCK_PURCHASE_COLUMNS` for a plan with a stock list, else :data:`PURCHASE_COLUMNS`."""
    return STOCK_PURCHASE_COLUMNS if plan.stock is not None else PURCHASE_COLUMNS


def pack_text(q) -> str | None:
    """A pack size or an ordered amount as text: ``'25 kg'``, ``'2.5 L'``; None for None.

    Examples
    --------
    >>> from routeplan.units import Q
    >>> pack_text(Q(2.5, "L"))
    '2.5 L'
    """
    if q is None:
        return None
    unit = "kg" if q.check("[mass]") else "L"
    return f"{q.m_as(unit):g} {unit}"


def purchase_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per bought raw material (see :data:`PURCHASE_COLUMNS`).

    ``need_kg`` [kg] and ``need_L`` [L] (None without a density) are the whole
    campaign's; ``stock_kg`` [kg] what the stock gives (0 when it does not name the
    material), ``buy_kg`` [kg] and ``buy_L`` [L] what is left to buy; ``pack`` and
    ``ordered`` are text with their unit (None without a pack); ``packs`` [-], covering
    what is left to buy, is None without a pack.
    """
    return [{
        "material": r.material,
        "name": r.name,
        "need_kg": magnitude(r.mass, "kg"),
        "need_L": magnitude(r.volume, "L"),
        "stock_kg": r.stock_m_kg or 0.0,
        "buy_kg": r.buy_m_kg,
        "buy_L": r.buy_V_L,
        "pack": pack_text(r.pack),
        "packs": r.packs,
        "ordered": pack_text(r.ordered),
    } for r in plan.raw_materials if r.bought]


def not_bought_note(plan: "Plan") -> str:
    """The sentence under the purchase list about materials not bought ("" when none).

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> not_bought_note(NS(raw_materials=[NS(material="water", name="process water", bought=False)]))
    "not bought, so not listed: process water (water); the route marks it 'bought: false'"
    """
    left = [r for r in plan.raw_materials if not r.bought]
    if not left:
        return ""
    names = ", ".join(r.name if r.name == r.material else f"{r.name} ({r.material})" for r in left)
    which = "it" if len(left) == 1 else "them"
    return f"not bought, so not listed: {names}; the route marks {which} 'bought: false'"
