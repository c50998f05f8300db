"""Campaign sizing: the volume of each step and its batches in its vessel.

Volume of a step
    The largest volume in the vessel over the campaign (:func:`routeplan.plan.core.contents`,
    the arithmetic core): the charges in order of addition, each adding its volume
    (solvents, liquids with a density, solutions, and solids with a density), a step that
    charges the product of a telescoped step adding the volume of that step's mixture as
    it is at the transfer (in proportion to the share of that product the step takes).
    Work-up charges (quench water, washes) count too: they are added to the same vessel.
    A work-up charge that leaves (``leaves: true``: a wash layer separated and
    discarded, a filter aid filtered off) is taken out right after it is charged, before
    the next line, so it counts while it is in the vessel and is not carried on.  A
    charge without a known volume (a solid without a density, an isolated intermediate
    without a density) is left out (its ``lines_V`` entry is None; the views say so).

Batches
    ``batches = ceil(step volume / (vessel volume * max_fill))`` for a step with a
    vessel; one batch otherwise; none for a step that does not run (the stock of its
    product covers it).  Each batch charges the totals divided by the number of batches.
    A batch filling less than 20 % of the nominal volume is too little to stir (common
    practice, no source); a batch of more than 10 times the largest batch run so far
    (``demonstrated_batch``) is a large scale-up jump (common practice, no source), and
    more than 12 batches of one step is worth a look at the vessel (common practice, no
    source).  All three are warnings.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from routeplan.errors import Problem
from routeplan.frozen import frozen, kept

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.walk import Walked
    from routeplan.route.model import Route

__all__ = ["MIN_FILL", "MAX_SCALE_UP", "MANY_BATCHES", "MAX_BATCHES", "Sized", "nominal_volumes_L", "size_steps"]

#: Smallest batch volume over nominal vessel volume that can still be stirred [-]
#: (common practice, no source).
MIN_FILL = 0.20

#: Largest ratio of a planned batch to the largest batch run so far [-]
#: (common practice, no source).
MAX_SCALE_UP = 10.0

#: More batches of one step than this in one campaign is unusual enough to check the
#: vessel (often a unit slip such as 630 mL for 630 L) [-] (common practice, no source).
MANY_BATCHES = 12

#: More batches of one step than this cannot be a campaign: the numbers are refused [-]
#: (a guard against runaway inputs, not a rule of the trade).
MAX_BATCHES = 1_000_000


@frozen
class Sized:
    """The vessel side of one step over the campaign.

    Attributes
    ----------
    V_L : float
        Largest volume in the vessel over the campaign [L] (its fullest).
    lines_V : tuple of float or None
        Per charge line, the volume it brings into the vessel [L] (for a line carried in
        solution from a telescoped step, the volume of that step's mixture), None where
        it has no known volume (:attr:`routeplan.plan.core.Contents.lines_V`).
    batches : int
        Number of batches [-] (0 for a step that does not run).
    fill : float or None
        Volume per batch over the vessel's nominal volume [-]; None without a vessel.
    reaction_m_kg : float
        Mass that takes part in the reaction over the campaign [kg]: every charge but
        ``role: workup`` (a catalyst and a gas taken up included); a telescoped mixture
        at everything charged to the step that made it less the gas that step evolved
        (``phase: gas`` products at full conversion) and any charge that left before the
        transfer, in proportion to the share of its product taken (ROUTE-FORMAT.md,
        "Readings fixed for the extensions").
    transfer_V_L, transfer_m_kg : float or None
        For a telescoped step, the volume [L] and mass [kg] of the mixture that goes on
        (the charges that stay, less the gas evolved); None for an isolated step (and
        the volume None where no charge has one).
    """

    V_L: float
    lines_V: tuple[float | None, ...]
    batches: int
    fill: float | None
    reaction_m_kg: float
    transfer_V_L: float | None = None
    transfer_m_kg: float | None = None


def nominal_volumes_L(route: "Route") -> dict[str, float]:
    """Vessel key -> nominal volume [L], converted once per route (kept on the frozen
    Route, read by the batch sizing and the safety screening alike); read it, never
    change it."""
    from routeplan.units import magnitude

    return kept(route, "_nominal_L", lambda: {k: magnitude(v.volume, "L") for k, v in route.equipment.items()})


def size_steps(route: "Route", walked: "Walked") -> tuple[dict[str, Sized], list[Problem]]:
    """Volumes, reaction masses and batches of every step, and the warnings.

    The volumes and masses are the core's (:func:`routeplan.plan.core.contents`); a step
    that does not run gets 0 batches, no fill and no warning.
    """
    from routeplan.units import unit

    from routeplan.plan.core import contents

    nominal_L = nominal_volumes_L(route)
    held = contents(walked.core, walked.steps)
    out: dict[str, Sized] = {}
    warnings: list[Problem] = []
    for sid, w in walked.steps.items():
        step = route.step(sid)
        h = held[sid]
        V_total = 0.0 if h.fullest_V is None else h.fullest_V
        if step.isolated:
            transfer_V = transfer_m = None
        else:
            transfer_V, transfer_m = h.transfer_V, h.transfer_m
        if sid in walked.not_run:
            out[sid] = Sized(V_total, h.lines_V, 0, None, h.reaction_m, transfer_V, transfer_m)
            continue
        vessel = route.equipment.get(step.vessel) if step.vessel else None
        if vessel is None:
            batches, fill = 1, None
        else:
            nominal = nominal_L[vessel.key]
            usable = nominal * vessel.max_fill
            needed = V_total / usable
            if not needed <= MAX_BATCHES:
                from routeplan.errors import PlanError

                raise PlanError(f"step {sid} would need {needed:.3g} batches in vessel {vessel.key} "
                                f"({nominal:g} L); no campaign runs that many",
                                location=vessel.location or step.location, step=sid,
                                hint="check the vessel's volume and its unit, and the target amount")
            batches = max(1, math.ceil(needed - 1e-9))
            fill = V_total / batches / nominal
            warnings.extend(_vessel_warnings(step, vessel, nominal, batches, fill))
        if step.demonstrated_batch is not None:
            per_batch = w.m_lim / batches
            shown = float(step.demonstrated_batch.m_as(unit("kg")))
            if shown > 0 and per_batch > MAX_SCALE_UP * shown:
                warnings.append(Problem.with_amounts(
                    "warning",
                    (f"step {sid}: a batch charges ", (per_batch, "mass"), f" of {step.limiting}, "
                     f"{per_batch / shown:.3g} times the largest batch run so far (", (shown, "mass"), ")"),
                    location=step.location, step=sid,
                    hint=f"scale up in stages of at most {MAX_SCALE_UP:g} times"))
        out[sid] = Sized(V_total, h.lines_V, batches, fill, h.reaction_m, transfer_V, transfer_m)
    return out, warnings


def _vessel_warnings(step, vessel, nominal: float, batches: int, fill: float) -> list[Problem]:
    """Too many batches, or a batch too small to stir, in ``vessel`` (``nominal`` [L])."""
    out = []
    if batches > MANY_BATCHES:
        out.append(Problem(
            "warning",
            f"step {step.id} needs {batches} batches in vessel {vessel.key} "
            f"({nominal:g} L): check the vessel's volume and its unit",
            location=vessel.location or step.location, step=step.id,
            hint="use a larger vessel or split the campaign"))
    if 0 < fill < MIN_FILL:
        out.append(Problem(
            "warning",
            f"step {step.id}: each batch fills {fill * 100:.3g} % of vessel {vessel.key} "
            f"({nominal:g} L), below {MIN_FILL * 100:g} %: too little to stir",
            location=step.location, step=step.id,
            hint="use a smaller vessel or a larger target"))
    return out
