"""Cost of goods: raw materials, plant time and waste disposal, per kg of target.

Parts (ROUTE-FORMAT.md, "Time, plant and waste" and its readings), each in the route's
``currency``:

raw materials
    ``sum of mass as supplied [kg] x price [currency/kg]`` over the raw materials with a
    price (``RawMaterialTotal.cost``, the figure behind ``metrics.cost_per_kg``).
plant
    ``sum over the steps that run of batches [-] x cycle_time [h] x rate [currency/h]``
    of the step's vessel.  A step without a vessel, a cycle time, or whose vessel has no
    ``rate`` is unpriced.  Vessel time is charged for the batches only, not for a vessel
    waiting between steps (our own choice: a waiting vessel can be booked for other work).
waste
    ``sum over the streams of mass [kg] x waste_prices.<stream> [currency/kg]``; the
    residue has no price.  A stream with waste and no price is unpriced.

Each part counts what is priced and lists what is not (``unpriced``); a part is None
only when nothing in it is priced (or the route gives no currency).  ``per_kg`` is the
sum of the parts that are not None, per kg of target as delivered (with overage), like
``metrics.cost_per_kg``; None when every part is None.  Method: the ordinary cost build-up
of a batch campaign (common practice, no source).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.frozen import frozen
from routeplan.route.model import STREAMS
from routeplan.units import magnitude

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.plan.waste import Waste

__all__ = ["CostPart", "CostOfGoods", "raw_material_part", "plant_part", "waste_part", "cost_of_goods",
           "schedule_waste_cost"]


@frozen
class CostPart:
    """One part of the cost of goods.

    Attributes
    ----------
    amount : float or None
        What is priced, over the campaign [currency]; None when nothing is.
    unpriced : tuple of str
        What has no price: raw-material keys; vessel keys without a ``rate`` and ids of
        steps without a vessel or a cycle time; stream names without a waste price.
    """

    amount: float | None
    unpriced: tuple[str, ...] = ()


@frozen
class CostOfGoods:
    """The cost of goods of one plan.

    Attributes
    ----------
    currency : str or None
        ISO 4217 code of every amount; None when the route gives none (then every part
        is None).
    raw_materials, plant, waste : CostPart
        The three parts [currency].
    target_mass_kg : float
        Target delivered, as isolated with overage [kg].
    """

    currency: str | None
    raw_materials: CostPart
    plant: CostPart
    waste: CostPart
    target_mass_kg: float

    @property
    def parts(self) -> dict[str, CostPart]:
        """The parts by name: ``raw_materials``, ``plant``, ``waste``."""
        return {"raw_materials": self.raw_materials, "plant": self.plant, "waste": self.waste}

    @property
    def total(self) -> float | None:
        """Sum of the parts that are not None [currency]; None when all are."""
        known = [p.amount for p in self.parts.values() if p.amount is not None]
        return sum(known) if known else None

    @property
    def per_kg(self) -> float | None:
        """``total`` per kg of target as delivered [currency/kg]."""
        t = self.total
        return None if t is None or self.target_mass_kg <= 0 else t / self.target_mass_kg

    def part_per_kg(self, name: str) -> float | None:
        """One part per kg of target [currency/kg]."""
        a = self.parts[name].amount
        return None if a is None or self.target_mass_kg <= 0 else a / self.target_mass_kg

    @property
    def complete(self) -> bool:
        """True when every part is priced in full."""
        return all(p.amount is not None and not p.unpriced for p in self.parts.values())


def _part(amounts: list[float], unpriced: list[str]) -> CostPart:
    """A part from its priced amounts [currency] and its unpriced items.

    None when items need a price and none has one; 0 when nothing needs a price at all
    (a campaign with no stream waste costs nothing to dispose of).
    """
    if amounts:
        return CostPart(sum(amounts), tuple(unpriced))
    return CostPart(None if unpriced else 0.0, tuple(unpriced))


def raw_material_part(plan: "Plan") -> CostPart:
    """Raw materials: ``RawMaterialTotal.cost`` summed over those with a price [currency]."""
    priced = [r.cost for r in plan.raw_materials if r.cost is not None]
    unpriced = [r.material for r in plan.raw_materials if r.cost is None]
    return _part(priced, unpriced)


def plant_part(plan: "Plan") -> CostPart:
    """Plant time: ``batches x cycle_time [h] x rate [currency/h]`` over the steps that run."""
    route = plan.route
    amounts: list[float] = []
    unpriced: list[str] = []
    for sp in plan.steps:
        if not sp.runs or sp.batches == 0:
            continue
        step = route.step(sp.id)
        vessel = route.equipment.get(sp.vessel) if sp.vessel else None
        if vessel is None or step.cycle_time is None:
            unpriced.append(sp.id)
        elif vessel.rate is None:
            if vessel.key not in unpriced:
                unpriced.append(vessel.key)
        else:
            amounts.append(sp.batches * magnitude(step.cycle_time, "h") * vessel.rate)
    return _part(amounts, unpriced)


def waste_part(plan: "Plan", waste: "Waste") -> CostPart:
    """Waste disposal: ``stream mass [kg] x price [currency/kg]`` over the three streams."""
    prices = plan.route.waste_prices
    amounts: list[float] = []
    unpriced: list[str] = []
    for s in STREAMS:
        kg = waste.total.stream(s)
        if kg <= 0:
            continue
        price = None if prices is None else prices.price(s)
        if price is None:
            unpriced.append(s)
        else:
            amounts.append(kg * price)
    return _part(amounts, unpriced)


def cost_of_goods(plan: "Plan", waste: "Waste") -> CostOfGoods:
    """The cost of goods of ``plan`` with its ``waste`` (see the module text)."""
    target = plan.target_kg
    if not plan.route.currency:
        none = CostPart(None, ())
        return CostOfGoods(None, none, none, none, target)
    return CostOfGoods(plan.route.currency, raw_material_part(plan), plant_part(plan), waste_part(plan, waste),
                       target)


def schedule_waste_cost(draft) -> tuple:
    """The schedule, waste and cost of goods of a planned campaign, and the waste warnings.

    Parameters
    ----------
    draft : Draft or Plan
        The planner's draft (route, steps with their batches, raw-material totals,
        target mass), or a finished plan.

    Returns
    -------
    tuple
        (Schedule or None (None unless every step has a cycle time), Waste, CostOfGoods,
        tuple of Problem).
    """
    from routeplan.plan.schedule import schedule_plan
    from routeplan.plan.waste import route_waste

    waste = route_waste(draft)
    return schedule_plan(draft.route, draft.steps), waste, cost_of_goods(draft, waste), waste.warnings
