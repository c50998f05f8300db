"""Guards of the planner: numbers no campaign can have, and yield cases a route cannot give.

Each value of a route file passes its own check, yet together they can ask for more than
any plant holds: a yield of ``1e-300``, an assay of ``1e-300 %``, an overage of
``1e300 %``, a ``max_fill`` of ``1e-300``, or a target mass that overflows.  Outputs would
then hold ``inf``, ``nan`` or 1e300 kg, and sizing the batches would run for ever.  The
guards here stop the plan with a located error instead:

- every amount of the walk must be finite and at most :data:`MAX_MASS_KG` (mass) or the
  like in moles and litres;
- a step may need at most :data:`MAX_BATCHES` batches in its vessel.

They also say which steps have no yield range when the plan is asked for the low or the
high yields (:func:`steps_without_range`), so that no output presents such a plan as a
worst (or best) case.  Nothing here reads a file or prints.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from routeplan.errors import Location, PlanError, Problem

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import StepPlan
    from routeplan.route.model import Route

__all__ = ["MAX_MASS_KG", "MAX_MOL", "MAX_VOLUME_L", "MAX_BATCHES", "check_target", "check_amounts",
           "check_batches", "steps_without_range", "range_warning"]

#: Largest mass of one charge, product or target a plan may hold [kg]: a million tonnes,
#: far beyond any campaign of a kilo lab or pilot plant (common practice, no source).
MAX_MASS_KG = 1e9
#: Largest amount of substance of one charge [mol] (a million tonnes of hydrogen atoms is
#: about 1e12 mol; common practice, no source).
MAX_MOL = 1e12
#: Largest volume of one charge or one step [L] (a million cubic metres; common practice,
#: no source).
MAX_VOLUME_L = 1e9
#: Largest number of batches of one step: ten thousand batches is decades of plant time
#: (common practice, no source); beyond it the vessel or a number is wrong.
MAX_BATCHES = 10_000


def _bad(x: float, limit: float) -> bool:
    return not math.isfinite(x) or abs(x) > limit


def check_target(amount_kg: float, overage: float, location: Location | None) -> None:
    """Refuse a target mass [kg] or overage [-] whose product is not a mass a plant can make.

    Raises
    ------
    PlanError
        When ``amount_kg × (1 + overage)`` is not finite or above :data:`MAX_MASS_KG`.
    """
    total = amount_kg * (1.0 + overage)
    if _bad(amount_kg, MAX_MASS_KG) or _bad(total, MAX_MASS_KG):
        shown = f"{amount_kg:.4g} kg" + (f" with an overage of {overage * 100:.4g} %" if overage else "")
        raise PlanError(f"the target, {shown}, is beyond any campaign (more than {MAX_MASS_KG:.0e} kg)",
                        location=location, hint="check the target amount, its unit and the overage")


def _suspects(route: "Route", step_id: str | None) -> list[str]:
    """Values of the route that can blow an amount up, for the hint."""
    out = []
    t = route.target
    if t.overage > 10:
        out.append(f"target overage {t.overage * 100:.4g} %")
    for s in route.steps:
        for name in ("expected", "low", "high"):
            y = getattr(s.yield_, name)
            if y is not None and y < 1e-3:
                out.append(f"step {s.id} yield ({name}) {y * 100:.4g} %")
    for key, m in route.materials.items():
        if m.assay < 1e-3:
            out.append(f"assay of {key} {m.assay * 100:.4g} %")
    for key, v in route.equipment.items():
        if v.max_fill < 1e-3:
            out.append(f"max_fill of {key} {v.max_fill * 100:.4g} %")
    return out


def _hint(route: "Route", step_id: str | None) -> str:
    found = _suspects(route, step_id)
    if found:
        return "check " + "; ".join(found[:4])
    return "check the target, the yields, the assays and the equivalents"


def check_amounts(route: "Route", steps: "tuple[StepPlan, ...]") -> None:
    """Refuse a walk whose amounts are not finite or beyond any campaign.

    Parameters
    ----------
    route : Route
        The route planned.
    steps : tuple of StepPlan
        The steps of the walk (before batches are sized).

    Raises
    ------
    PlanError
        At the first charge line (or step) with a mass above :data:`MAX_MASS_KG`, moles
        above :data:`MAX_MOL`, a volume above :data:`MAX_VOLUME_L`, or a value that is not
        finite; the hint names the route's values that can cause it.
    """
    from routeplan.units import magnitude

    for sp in steps:
        step = route.step(sp.id)
        for c in sp.charges:
            for what, q, unit, limit in (("mass", c.mass, "kg", MAX_MASS_KG), ("amount", c.mol, "mol", MAX_MOL),
                                         ("volume", c.volume, "L", MAX_VOLUME_L)):
                x = magnitude(q, unit)
                if x is not None and _bad(x, limit):
                    location = step.charges[c.order - 1].location if 1 <= c.order <= len(step.charges) else None
                    raise PlanError(f"step {sp.id}: the {what} of {c.material} to charge would be {x:.4g} {unit}, "
                                    f"beyond any campaign (more than {limit:.0e} {unit})",
                                    location=location or step.location, step=sp.id, hint=_hint(route, sp.id))
        for what, q, unit, limit in (("product", sp.product_mass, "kg", MAX_MASS_KG),
                                     ("limiting reagent", sp.limiting_mass, "kg", MAX_MASS_KG)):
            x = magnitude(q, unit)
            if x is not None and _bad(x, limit):
                raise PlanError(f"step {sp.id}: the {what} would be {x:.4g} {unit}, beyond any campaign",
                                location=step.location, step=sp.id, hint=_hint(route, sp.id))


def check_batches(route: "Route", step_id: str, vessel, volume_L: float, usable_L: float) -> None:
    """Refuse a step that would need more than :data:`MAX_BATCHES` batches (or a count that
    cannot be computed) in ``vessel``: the batch count is never formed from such numbers.

    Parameters
    ----------
    volume_L : float
        Volume of the step over the campaign [L].
    usable_L : float
        Working volume of one batch, ``volume × max_fill`` [L].
    """
    ratio = volume_L / usable_L if usable_L > 0 else math.inf
    if not math.isfinite(ratio) or ratio > MAX_BATCHES:
        shown = f"{ratio:.4g}" if math.isfinite(ratio) else "an endless number of"
        raise PlanError(f"step {step_id} would need {shown} batches in vessel {vessel.key} "
                        f"({vessel.volume.m_as('L'):.4g} L at {vessel.max_fill * 100:.4g} % fill), more than "
                        f"{MAX_BATCHES:,}", location=vessel.location or route.step(step_id).location,
                        step=step_id, hint="check the vessel's volume and max_fill, and " +
                        _hint(route, step_id).removeprefix("check "))


def steps_without_range(route: "Route", yields: str) -> tuple[str, ...]:
    """Ids of the steps that have no ``low`` (``yields="low"``) or ``high`` yield, in file
    order; empty for ``"expected"``."""
    if yields not in ("low", "high"):
        return ()
    return tuple(s.id for s in route.steps if getattr(s.yield_, yields) is None)


def range_warning(route: "Route", yields: str, missing: tuple[str, ...]) -> Problem | None:
    """A warning that the steps ``missing`` are planned at their expected yields although
    the plan is asked for the ``yields`` case; None when nothing is missing."""
    if not missing:
        return None
    first = route.step(missing[0])
    case = "worst" if yields == "low" else "best"
    n = len(missing)
    if n == len(route.steps):
        what = f"no step of the route has a {yields} yield, so every step is planned at its expected yield"
    else:
        what = (f"{'steps' if n > 1 else 'step'} {', '.join(missing)} {'have' if n > 1 else 'has'} no {yields} "
                f"yield and {'are' if n > 1 else 'is'} planned at {'their' if n > 1 else 'its'} expected yield")
    return Problem("warning", f"--yields {yields}: {what}: this is not a {case} case",
                   location=first.location, step=first.id,
                   hint="give a range, e.g. 'yield: {expected: 88 %, low: 80 %, high: 92 %}'")
