"""Campaign sizing: the volume of each step and its batches in its vessel.

Volume of a step
    The largest volume in the vessel is taken as the sum of the volumes of every charge
    that has one (solvents, liquids with a density, solutions, and solids with a
    density), plus, for a step that charges the product of a telescoped step, the whole
    volume carried in from that step (in proportion to the share of that product the
    step takes).  Work-up charges (quench water, washes) count too: they are added to
    the same vessel, and counting them all is the safe side when the aqueous layer is
    not drained between additions.  A charge without a known volume (a solid without a
    density, an isolated intermediate without a density) is left out, with a note.

Batches
    ``batches = ceil(step volume / (vessel volume * max_fill))`` for a step with a
    vessel; one batch otherwise; none for a step that does not run (the stock of its
    product covers it).  Each batch charges the totals divided by the number of batches.  A batch filling less than 20 % of the nominal volume is too little to
    stir (common practice, no source); a batch of more than 10 times the largest batch
    run so far (``demonstrated_batch``) is a large scale-up jump (common practice, no
    source), and more than 12 batches of one step is worth a look at the vessel (common
    practice, no source).  All three are warnings.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING

from routeplan.units import unit
from routeplan.errors import Problem

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import StepPlan
    from routeplan.route.model import Route

__all__ = ["MIN_FILL", "MAX_SCALE_UP", "MANY_BATCHES", "step_volumes", "reaction_masses", "size_batches"]

#: Smallest batch volume over nominal vessel volume that can still be stirred [-]
#: (common practice, no source).
MIN_FILL = 0.20

#: Largest ratio of a planned batch to the largest batch run so far [-]
#: (common practice, no source).
MAX_SCALE_UP = 10.0

#: More batches of one step than this in one campaign is unusual enough to check the
#: vessel (often a unit slip such as 630 mL for 630 L) [-] (common practice, no source).
MANY_BATCHES = 12


def step_volumes(route: "Route", steps: "tuple[StepPlan, ...]"):
    """Volume in the vessel of each step over the whole campaign [L], and notes.

    Returns
    -------
    dict
        Step id -> (volume [L] as a pint Quantity, tuple of notes, mapping of charge
        order -> (id of the telescoped step, volume carried in [L]) for the charges that
        come in solution).
    """
    from routeplan.units import Q

    by_id = {sp.id: sp for sp in steps}
    maker = route.maker
    out: dict[str, tuple] = {}
    for sp in steps:  # execution order: a telescoped step is sized before its user
        total = Q(0.0, "L")
        notes: list[str] = []
        carried_in: dict[int, tuple] = {}
        for c in sp.charges:
            src = maker.get(c.material) if c.intermediate else None
            if src is not None and not by_id[src].isolated:
                carried = out[src][0]
                made = by_id[src].product_mol.m_as(unit("mol"))
                share = (c.mol.m_as(unit("mol")) / made) if made > 0 and c.mol is not None else 1.0
                total = total + carried * share
                carried_in[c.order] = (src, (carried * share).to(unit("L")))
                notes.append(f"{c.material} comes in solution from {src}: "
                             f"{carried.m_as(unit('L')) * share:.4g} L of its mixture carried in")
            elif c.volume is not None:
                total = total + c.volume
            else:
                notes.append(f"{c.material} has no density, so its volume is left out")
        out[sp.id] = (total.to(unit("L")), tuple(notes), carried_in)
    return out


def reaction_masses(route: "Route", steps: "tuple[StepPlan, ...]") -> dict[str, float]:
    """Mass that takes part in the reaction of each step over the campaign [kg].

    Every charge except ``role: workup`` counts at its mass as charged (a catalyst and
    a gas taken up included); the product of a telescoped step comes in as its whole
    mixture: everything charged to the step that made it (its work-up charges included)
    less the gas that step evolved (``phase: gas`` products at full conversion,
    :func:`routeplan.plan.safety.evolved_gas_mass_kg`), in proportion to the share of
    that step's product taken (ROUTE-FORMAT.md, "Readings fixed for the extensions").
    Divided by the batches, this is the ``m`` of the adiabatic temperature rise.
    """
    from routeplan.plan.safety import evolved_gas_mass_kg

    kg, mol = unit("kg"), unit("mol")
    by_id = {sp.id: sp for sp in steps}
    maker = route.maker
    charged: dict[str, float] = {}  # everything charged to a step [kg]
    out: dict[str, float] = {}
    for sp in steps:  # execution order: a telescoped step comes before its user
        m_rxn = m_all = 0.0
        for c in sp.charges:
            src = maker.get(c.material) if c.intermediate else None
            if src is not None and not by_id[src].isolated:
                made = by_id[src].product_mol.m_as(mol)
                share = c.mol.m_as(mol) / made if made > 0 and c.mol is not None else 1.0
                m = charged[src] * share
            else:
                m = c.mass.m_as(kg)
            m_all += m
            if c.role != "workup":
                m_rxn += m
        m_gas = evolved_gas_mass_kg(route, sp.id, sp.limiting_mol.m_as(mol))
        charged[sp.id], out[sp.id] = m_all - m_gas, m_rxn
    return out


def _per_batch_charge(c, batches: int):
    if batches == 0:
        return replace(c, mol_per_batch=None, mass_per_batch=None, volume_per_batch=None)
    return replace(c, mol_per_batch=None if c.mol is None else c.mol / batches,
                   mass_per_batch=c.mass / batches,
                   volume_per_batch=None if c.volume is None else c.volume / batches)


def size_batches(route: "Route", steps: "tuple[StepPlan, ...]"):
    """Give every step its batches; return the new steps and the warnings.

    Returns
    -------
    tuple
        (tuple of StepPlan with ``batch`` set, list of Problem).  A step that does not
        run (``StepPlan.not_run``) gets 0 batches, a volume of 0 L and no warning.
    """
    from routeplan.plan.model import BatchPlan

    from routeplan.units import Q

    volumes = step_volumes(route, steps)
    masses = reaction_masses(route, steps)
    warnings: list[Problem] = []
    out = []
    for sp in steps:
        volume, notes, carried_in = volumes[sp.id]
        charges = tuple(replace(c, carried_from=carried_in[c.order][0], volume=carried_in[c.order][1])
                        if c.order in carried_in else c for c in sp.charges)
        if sp.not_run is not None:  # no batch at all: nothing to size, warn about or divide
            out.append(replace(sp, charges=tuple(_per_batch_charge(c, 0) for c in charges), batch=BatchPlan(
                batches=0, step_volume=volume, batch_volume=volume * 0, fill_fraction=None, vessel=sp.vessel)))
            continue
        step = route.step(sp.id)
        vessel = route.equipment.get(sp.vessel) if sp.vessel else None
        if vessel is None:
            batches, fill = 1, None
        else:
            usable = (vessel.volume * vessel.max_fill).to(unit("L"))
            batches = max(1, math.ceil(volume.m_as(unit("L")) / usable.m_as(unit("L")) - 1e-9))
            fill = volume.m_as(unit("L")) / batches / vessel.volume.m_as(unit("L"))
            if batches > MANY_BATCHES:
                warnings.append(Problem(
                    "warning",
                    f"step {sp.id} needs {batches} batches in vessel {vessel.key} "
                    f"({vessel.volume.m_as(unit('L')):g} L): check the vessel's volume and its unit",
                    location=vessel.location or step.location, step=sp.id,
                    hint="use a larger vessel or split the campaign"))
            if 0 < fill < MIN_FILL:
                warnings.append(Problem(
                    "warning",
                    f"step {sp.id}: each batch fills {fill:.0%} of vessel {vessel.key} "
                    f"({vessel.volume.m_as(unit('L')):g} L), below {MIN_FILL:.0%}: too little to stir",
                    location=step.location, step=sp.id,
                    hint="use a smaller vessel or a larger target"))
        if step.demonstrated_batch is not None:
            per_batch = sp.limiting_mass.m_as(unit("kg")) / batches
            shown = step.demonstrated_batch.m_as(unit("kg"))
            if shown > 0 and per_batch > MAX_SCALE_UP * shown:
                warnings.append(Problem(
                    "warning",
                    f"step {sp.id}: a batch charges {per_batch:.4g} kg of {sp.limiting}, "
                    f"{per_batch / shown:.3g} times the largest batch run so far ({shown:.4g} kg)",
                    location=step.location, step=sp.id,
                    hint=f"scale up in stages of at most {MAX_SCALE_UP:g} times"))
        bp = BatchPlan(batches=batches, step_volume=volume, batch_volume=volume / batches,
                       fill_fraction=fill, vessel=sp.vessel, notes=notes,
                       limiting_mol=sp.limiting_mol / batches, limiting_mass=sp.limiting_mass / batches,
                       product_mol=sp.product_mol / batches, product_mass=sp.product_mass / batches,
                       reaction_mass=Q(masses[sp.id] / batches, unit("kg")))
        out.append(replace(sp, batch=bp, charges=tuple(_per_batch_charge(c, batches) for c in charges)))
    return tuple(out), warnings
