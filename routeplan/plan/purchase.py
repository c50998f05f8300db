"""Buying in packs: how many packs of each raw material to order.

A material may give the size of one pack as sold (``pack: 25 kg`` or ``pack: 2.5 L``);
the packs to order are the fewest whole packs whose content covers what is left to buy
of that material (the campaign's need less what the stock on hand gives, with
``--stock``), a mass for a pack given as a mass and a volume for one given as a volume
(the volume in proportion to the mass, at the material's density).  A material marked ``bought: false`` (process water from the site's supply) is
charged but not bought: it gets no packs and the purchase list leaves it out.

Pure functions on plain numbers and Plan parts; nothing here formats or prints.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING, Mapping

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import RawMaterialTotal
    from routeplan.route.model import Route

__all__ = ["NEED_REL_TOL", "packs_to_order", "with_packs"]

#: Relative slack on the need before another pack is counted [-]: a need that is a
#: whole number of packs up to floating-point noise (100.00000000001 kg in 25 kg packs)
#: is 4 packs, not 5 (common practice, no source: far below any balance's resolution).
NEED_REL_TOL = 1e-9


def packs_to_order(need: float, pack: float) -> int:
    """The fewest whole packs of size ``pack`` whose content covers ``need``.

    Parameters
    ----------
    need : float
        What is needed [kg] or [L], 0 or more.
    pack : float
        Content of one pack, in the same unit as ``need`` [kg] or [L], positive.

    Returns
    -------
    int
        ``k`` [-] with ``k * pack >= need * (1 - NEED_REL_TOL)`` and
        ``(k - 1) * pack < need``; 0 for no need.

    Examples
    --------
    >>> packs_to_order(51.3, 25.0)
    3
    >>> packs_to_order(50.0, 25.0)
    2
    >>> packs_to_order(0.0, 25.0)
    0
    """
    if not (pack > 0 and math.isfinite(pack)):
        raise ValueError(f"a pack size must be positive, got {pack!r}")
    if not (need >= 0 and math.isfinite(need)):
        raise ValueError(f"a need must be 0 or more, got {need!r}")
    if need == 0:
        return 0
    k = math.ceil(need * (1 - NEED_REL_TOL) / pack)
    return max(k, 1)


def with_packs(route: "Route", raws: "tuple[RawMaterialTotal, ...]",
               on_hand_kg: "Mapping[str, float] | None" = None) -> "tuple[RawMaterialTotal, ...]":
    """The raw-material totals with what the stock gives, their pack size, the packs to
    order and whether bought.

    Parameters
    ----------
    route : Route
        The route (each material's ``pack`` and ``bought``).
    raws : tuple of RawMaterialTotal
        The totals over the campaign.
    on_hand_kg : Mapping[str, float], optional
        The stock on hand: material key -> mass as supplied [kg].

    Returns
    -------
    tuple of RawMaterialTotal
        The same totals with ``bought``, ``stock_m_kg`` (``min(on hand, need)`` [kg],
        None when the stock does not name the material), ``pack_size`` and
        ``pack_unit`` ([kg] or [L]) and ``packs`` [-] set: the fewest packs covering
        ``buy_m_kg`` or ``buy_V_L`` (need less stock); ``packs`` is None without a pack
        size or for a material not bought.
    """
    from routeplan.units import magnitude

    out = []
    for r in raws:
        mat = route.materials[r.material]
        have = None if on_hand_kg is None else on_hand_kg.get(r.material)
        r = replace(r, bought=mat.bought, stock_m_kg=None if have is None else min(have, r.m_kg))
        if mat.pack is None:
            if r.pack_size is not None or r.pack_unit is not None or r.packs is not None:
                r = replace(r, pack_size=None, pack_unit=None, packs=None)
            out.append(r)  # no pack: nothing more to set
            continue
        unit_ = "kg" if mat.pack.check("[mass]") else "L"
        size = magnitude(mat.pack, unit_)
        need = r.buy_m_kg if unit_ == "kg" else r.buy_V_L
        packs = packs_to_order(need, size) if mat.bought and need is not None else None
        out.append(replace(r, pack_size=size, pack_unit=unit_, packs=packs))
    return tuple(out)
