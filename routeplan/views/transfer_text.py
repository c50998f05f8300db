"""What a telescoped step passes on, and what leaves before: the sentences every output shows.

Read from the Plan only (``BatchPlan.transfer_volume``, ``transfer_mass``,
``ChargePlan.leaves``, ``carried_from``); nothing is computed here.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.views.tables import display_quantity

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["LEAVES_NOTE", "separated_materials", "transfer_text", "carried_note"]

#: What a charge line that leaves says (role cells, tables).
LEAVES_NOTE = "separated and discarded right after this line, not transferred"


def separated_materials(sp: "StepPlan") -> list[str]:
    """Keys of the charges of ``sp`` that leave the vessel right after they are charged, in order."""
    return list(dict.fromkeys(c.material for c in sp.charges if c.leaves))


def transfer_text(plan: "Plan", sp: "StepPlan", units: "DisplayUnits | None" = None) -> str | None:
    """What a telescoped step passes on per batch, e.g. ``"goes on in solution to T2:
    46.12 L of mixture (40.39 kg) per batch; separated and discarded before the transfer:
    water"``; None for an isolated step or one that does not run.  ``units``: the plan's
    one set (the terminal's); else each quantity in the unit that suits it.

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> from routeplan.units import Q
    >>> b = NS(batches=2, transfer_volume=Q(46.12, "L"), transfer_mass=Q(40.39, "kg"))
    >>> sp = NS(isolated=False, runs=True, batch=b, product="ester",
    ...         charges=[NS(material="water", leaves=True)])
    >>> plan = NS(route=NS(consumers={"ester": ("T2",)}))
    >>> transfer_text(plan, sp)
    'goes on in solution to T2: 46.12 L of mixture (40.39 kg) per batch; separated and discarded before the transfer: water'
    """
    b = sp.batch
    if sp.isolated or not sp.runs or b is None or b.batches == 0:
        return None
    users = plan.route.consumers.get(sp.product, ())
    to = f" to {', '.join(users)}" if users else ""
    V, m = b.transfer_volume, b.transfer_mass
    what = ("mixture of no known volume" if V is None
            else f"{display_quantity(V.m_as('L'), 'volume', units=units)} of mixture")
    text = f"goes on in solution{to}: {what} ({display_quantity(m.m_as('kg'), 'mass', units=units)}) per batch"
    left = separated_materials(sp)
    if left:
        text += f"; separated and discarded before the transfer: {', '.join(left)}"
    return text


def carried_note(plan: "Plan", step_id: str) -> str:
    """How the mixture of telescoped step ``step_id`` is transferred: ``"transfer the whole
    mixture"``, or ``"transfer the mixture left after water was separated"``."""
    left = separated_materials(plan.step(step_id))
    if not left:
        return "transfer the whole mixture"
    return f"transfer the mixture left after {', '.join(left)} {'was' if len(left) == 1 else 'were'} separated"
