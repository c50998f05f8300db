"""Guards of the planner: numbers no campaign can have, and yield cases a route cannot give.

Each value of a route file passes its own check, yet together they can ask for more than
any plant holds: a yield of ``1e-300``, an assay of ``1e-300 %``, an overage of
``1e300 %``, a ``max_fill`` of ``1e-300``, or a target mass that overflows.  Outputs would
then hold ``inf``, ``nan`` or 1e300 kg, and sizing the batches would run for ever.  The
guards here stop the plan with a located error instead:

- every amount of the walk must be finite and at most :data:`MAX_MASS_KG` (mass) or the
  like in moles and litres (batch sizing refuses a step that needs more than
  :data:`routeplan.plan.campaign.MAX_BATCHES` batches).

They also say which steps have no yield range when the plan is asked for the low or the
high yields (:func:`steps_without_range`), so that no output presents such a plan as a
worst (or best) case.  Nothing here reads a file or prints.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from routeplan.errors import Location, PlanError, Problem
from routeplan.vocab import Severity

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.walk import Walked
    from routeplan.route.model import Route

__all__ = ["MAX_MASS_KG", "MAX_MOL", "MAX_VOLUME_L", "check_target", "check_amounts", "steps_without_range",
           "range_warning"]

#: Largest mass of one charge, product or target a plan may hold [kg]: a million tonnes,
#: far beyond any campaign of a kilo lab or pilot plant (common practice, no source).
MAX_MASS_KG = 1e9
#: Largest amount of substance of one charge [mol] (a million tonnes of hydrogen atoms is
#: about 1e12 mol; common practice, no source).
MAX_MOL = 1e12
#: Largest volume of one charge or one step [L] (a million cubic metres; common practice,
#: no source).
MAX_VOLUME_L = 1e9


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


def check_amounts(route: "Route", walked: "Walked") -> None:
    """Refuse a walk whose amounts are not finite or beyond any campaign.

    Parameters
    ----------
    route : Route
        The route planned.
    walked : Walked
        The backward walk (:func:`routeplan.plan.walk.walk_route`): per step the
        limiting reagent [kg], the product [mol] and per charge line
        ``(n [mol] or None, m [kg], V [L] or None)``.

    Raises
    ------
    PlanError
        At the first charge line (or step) with a mass above :data:`MAX_MASS_KG`, moles
        above :data:`MAX_MOL`, a volume above :data:`MAX_VOLUME_L`, or a value that is not
        finite; the hint names the route's values that can cause it.
    """
    for sid, ws in walked.steps.items():
        if not _within(ws):
            _refuse(route, sid, ws)


def _within(ws) -> bool:
    """True when every amount of the walked step ``ws`` is finite and within the limits.

    One comparison a number (``abs(x) <= limit`` is False for ``inf`` and ``nan``), so
    the common case costs no call a number; :func:`_refuse` finds the first one that is not.
    """
    if not (abs(ws.m_lim) <= MAX_MASS_KG and abs(ws.n_product) <= MAX_MOL):
        return False
    for n, m, V in ws.charges:
        if not (abs(m) <= MAX_MASS_KG and (n is None or abs(n) <= MAX_MOL)
                and (V is None or abs(V) <= MAX_VOLUME_L)):
            return False
    return True


def _refuse(route: "Route", sid: str, ws) -> None:
    """Raise the PlanError of the first amount of step ``sid`` out of its limit (in the
    order of the charge lines, then the limiting reagent and the product)."""
    limits = (("amount", "mol", MAX_MOL), ("mass", "kg", MAX_MASS_KG), ("volume", "L", MAX_VOLUME_L))
    step = route.step(sid)
    for j, numbers in enumerate(ws.charges):
        for (what, unit, limit), x in zip(limits, numbers):
            if x is not None and _bad(float(x), limit):
                c = step.charges[j] if j < len(step.charges) else None
                raise PlanError(f"step {sid}: the {what} of {c.material if c else 'a charge'} to charge would be "
                                f"{float(x):.4g} {unit}, beyond any campaign (more than {limit:.0e} {unit})",
                                location=(c.location if c else None) or step.location, step=sid,
                                hint=_hint(route, sid))
    for what, x, unit, limit in (("limiting reagent", ws.m_lim, "kg", MAX_MASS_KG),
                                 ("product", ws.n_product, "mol", MAX_MOL)):
        if _bad(float(x), limit):
            raise PlanError(f"step {sid}: the {what} would be {float(x):.4g} {unit}, beyond any campaign",
                            location=step.location, step=sid, hint=_hint(route, sid))


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
    return Problem(Severity.WARNING, f"--yields {yields}: {what}: this is not a {case} case",
                   location=first.location, step=first.id,
                   hint="give a range, e.g. 'yield: {expected: 88 %, low: 80 %, high: 92 %}'")
