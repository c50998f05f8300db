"""Charge arithmetic of one step: moles, mass as charged and volume from each basis.

The rules are those of the route format, step 3 of "How the plan is computed":

* molar bases (``equiv``, ``mol_percent``, ``stoichiometric``): ``n = equiv * n_lim``;
  a solid or neat liquid is charged at ``n * M / assay``; a solution by molarity takes
  ``V = n / c`` and ``m = V * rho``; a solution by mass fraction takes ``m = n * M / w``
  and ``V = m / rho``;
* ``volumes``: ``V = volumes * m_lim`` with ``m_lim`` the mass of limiting reagent as
  charged [kg] and ``volumes`` in L/kg (mL/g); ``m = V * rho``;
* ``mass_ratio``: ``m = ratio * m_lim``;
* any material with a density (or a solution) also gets a volume, and any material with
  a molar mass also gets its moles.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from routeplan.units import unit
from routeplan.errors import PlanError

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import ChargePlan, StepPlan
    from routeplan.route.model import Charge, Material, Route, Step

__all__ = ["charge_from_moles", "charge_from_mass", "charge_from_volume", "compute_step"]


def charge_from_moles(mat: "Material", n: "pint.Quantity") -> tuple["pint.Quantity", "pint.Quantity | None"]:
    """Mass as charged [kg] and volume [L] for ``n`` mol of ``mat``'s compound."""
    sol = mat.solution
    if sol is not None:
        if sol.molarity is not None:
            volume = (n / sol.molarity).to(unit("L"))
            return (volume * sol.density).to(unit("kg")), volume
        mass = (n * mat.molar_mass / sol.mass_fraction).to(unit("kg"))
        return mass, (mass / sol.density).to(unit("L"))
    mass = (n * mat.molar_mass / mat.assay).to(unit("kg"))
    volume = (mass / mat.density).to(unit("L")) if mat.density is not None else None
    return mass, volume


def charge_from_mass(mat: "Material", mass: "pint.Quantity") -> tuple["pint.Quantity | None", "pint.Quantity | None"]:
    """Moles of compound [mol] and volume [L] in ``mass`` [kg] of ``mat`` as supplied."""
    sol = mat.solution
    density = sol.density if sol is not None else mat.density
    volume = (mass / density).to(unit("L")) if density is not None else None
    if mat.molar_mass is None:
        return None, volume
    if sol is not None:
        if sol.molarity is not None:
            return (volume * sol.molarity).to(unit("mol")), volume
        return (mass * sol.mass_fraction / mat.molar_mass).to(unit("mol")), volume
    return (mass * mat.assay / mat.molar_mass).to(unit("mol")), volume


def charge_from_volume(mat: "Material", volume: "pint.Quantity") -> tuple["pint.Quantity | None", "pint.Quantity"]:
    """Moles [mol] and mass [kg] in ``volume`` [L] of ``mat`` as supplied (needs a density)."""
    density = mat.solution.density if mat.solution is not None else mat.density
    if density is None:  # the loader forbids this; kept as a guard
        raise PlanError(f"material '{mat.key}' is charged by volume but has no density")
    mass = (volume * density).to(unit("kg"))
    n, _ = charge_from_mass(mat, mass)
    return n, mass


def _line(route: "Route", step: "Step", charge: "Charge", order: int, n_lim, m_lim) -> "ChargePlan":
    from routeplan.plan.model import ChargePlan

    mat = route.materials[charge.material]
    equiv = charge.equiv
    if equiv is not None:
        n = n_lim * equiv
        mass, volume = charge_from_moles(mat, n)
    elif charge.basis == "volumes":
        volume = (m_lim * _per_kg(charge.value)).to(unit("L"))  # [L/kg] * [kg]
        n, mass = charge_from_volume(mat, volume)
    elif charge.basis == "mass_ratio":
        mass = m_lim * charge.value
        n, volume = charge_from_mass(mat, mass)
    else:  # pragma: no cover - the loader allows no other basis
        raise PlanError(f"unknown basis '{charge.basis}'", step=step.id)
    return ChargePlan(
        order=order,
        material=mat.key,
        name=mat.name,
        role=charge.role,
        basis=charge.basis,
        basis_value=charge.value,
        equiv=equiv,
        mol=n,  # every helper above returns mol, kg and L already
        mass=mass,
        volume=volume,
        intermediate=route.is_intermediate(mat.key),
        implicit=charge.implicit,
    )


def _per_kg(volumes: float) -> "pint.Quantity":
    """``volumes`` as litres per kilogram of limiting reagent [L/kg] (mL/g)."""
    from routeplan.units import Q

    return Q(volumes, unit("L/kg"))


def compute_step(route: "Route", step: "Step", n_product: "pint.Quantity") -> "StepPlan":
    """Plan one step for a demand of ``n_product`` mol of its main product.

    ``n_lim = n_product / (yield * nu_product / nu_limiting)`` [mol].
    """
    from routeplan.plan.model import StepPlan

    eq = step.equation
    nu_p = eq.coefficient(step.product)
    nu_l = eq.coefficient(step.limiting)
    y = step.yield_.expected
    if not y > 0:
        raise PlanError(f"step {step.id} has a yield of {y:g}; it must be above 0", step=step.id)
    n_lim = (n_product / (y * nu_p / nu_l)).to(unit("mol"))
    lim = route.materials[step.limiting]
    m_lim, _v = charge_from_moles(lim, n_lim)
    lines = tuple(_line(route, step, c, i, n_lim, m_lim) for i, c in enumerate(step.charges, start=1))
    prod = route.materials[step.product]
    product_mass = (n_product * prod.molar_mass / prod.assay).to(unit("kg"))
    return StepPlan(
        id=step.id,
        name=step.name,
        equation=step.equation_text,
        limiting=step.limiting,
        limiting_mol=n_lim,
        limiting_mass=m_lim,
        product=step.product,
        product_mol=n_product.to(unit("mol")),
        product_mass=product_mass,
        yield_=y,
        isolated=step.isolated,
        charges=lines,
        vessel=step.vessel,
        notes=step.notes,
    )
