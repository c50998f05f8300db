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

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

from routeplan.errors import PlanError
from routeplan.units import unit

if TYPE_CHECKING:  # pragma: no cover
    import pint

    from routeplan.plan.model import ChargePlan, StepPlan
    from routeplan.route.model import Charge, Material, Route, Step

__all__ = ["SuppliedForm", "supplied_form", "charge_from_moles", "charge_from_mass", "charge_from_volume", "compute_step"]


@dataclass(frozen=True)
class SuppliedForm:
    """Conversion factors of a material as supplied (solid, neat liquid or solution).

    Attributes
    ----------
    kg_per_mol : pint.Quantity or None
        Mass as supplied per mole of the compound [kg/mol]: ``M / assay``, ``M / w`` for
        a solution by mass fraction, ``rho / c`` for a solution by molarity; None without
        a molar mass.
    L_per_kg : pint.Quantity or None
        Volume per mass as supplied [L/kg], ``1 / rho``; None without a density.
    """

    kg_per_mol: "pint.Quantity | None"
    L_per_kg: "pint.Quantity | None"

    @property
    def mol_per_kg(self) -> "pint.Quantity | None":
        """Moles of compound per kg as supplied [mol/kg]."""
        return None if self.kg_per_mol is None else 1 / self.kg_per_mol


def supplied_form(mat: "Material") -> SuppliedForm:
    """The conversion factors of ``mat`` as supplied, computed once per material."""
    cached = mat.__dict__.get("_supplied_form")
    if cached is not None:
        return cached
    sol = mat.solution
    density = sol.density if sol is not None else mat.density
    kg_per_mol = None
    if sol is not None and sol.molarity is not None:
        kg_per_mol = (sol.density / sol.molarity).to(unit("kg/mol"))
    elif mat.molar_mass is not None:
        fraction = sol.mass_fraction if sol is not None else mat.assay
        kg_per_mol = (mat.molar_mass / fraction).to(unit("kg/mol"))
    L_per_kg = None if density is None else (1 / density).to(unit("L/kg"))
    form = SuppliedForm(kg_per_mol, L_per_kg)
    mat.__dict__["_supplied_form"] = form  # frozen dataclass: a private cache beside the fields
    return form


def charge_from_moles(mat: "Material", n: "pint.Quantity") -> tuple["pint.Quantity", "pint.Quantity | None"]:
    """Mass as charged [kg] and volume [L] for ``n`` [mol] of ``mat``'s compound.

    ``m = n * M / assay`` (or ``n * M / w`` for a solution by mass fraction, and
    ``m = (n / c) * rho`` for a solution by molarity); ``V = m / rho``.
    """
    form = supplied_form(mat)
    mass = n * form.kg_per_mol  # [mol] * [kg/mol] = [kg]
    volume = None if form.L_per_kg is None else mass * form.L_per_kg  # [kg] * [L/kg]
    return mass, volume


def charge_from_mass(mat: "Material", mass: "pint.Quantity") -> tuple["pint.Quantity | None", "pint.Quantity | None"]:
    """Moles of compound [mol] and volume [L] in ``mass`` [kg] of ``mat`` as supplied."""
    form = supplied_form(mat)
    volume = None if form.L_per_kg is None else mass * form.L_per_kg
    n = None if form.kg_per_mol is None else mass / form.kg_per_mol  # [kg] / [kg/mol]
    return n, volume


def charge_from_volume(mat: "Material", volume: "pint.Quantity") -> tuple["pint.Quantity | None", "pint.Quantity"]:
    """Moles [mol] and mass [kg] in ``volume`` [L] of ``mat`` as supplied (needs a density)."""
    form = supplied_form(mat)
    if form.L_per_kg is None:  # the loader forbids this; kept as a guard
        raise PlanError(f"material '{mat.key}' is charged by volume but has no density")
    mass = volume / form.L_per_kg  # [L] / [L/kg] = [kg]
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
        volume = m_lim * _per_kg(charge.value)  # [kg] * [L/kg] = [L]
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


def compute_step(route: "Route", step: "Step", n_product: "pint.Quantity", *,
                 yields: str = "expected", yield_value: float | None = None) -> "StepPlan":
    """Plan one step for a demand of ``n_product`` mol of its main product.

    ``n_lim = n_product / (yield * nu_product / nu_limiting)`` [mol], with the step's
    ``yields`` yield (``"expected"``, ``"low"`` or ``"high"``; the expected yield where
    the step gives no range), or ``yield_value`` [-] when given (a campaign record's
    actual yield of the step, :mod:`routeplan.plan.record`).
    """
    from routeplan.plan.model import StepPlan

    eq = step.equation
    nu_p = eq.coefficient(step.product)
    nu_l = eq.coefficient(step.limiting)
    chosen = getattr(step.yield_, yields)
    y = step.yield_.expected if chosen is None else chosen
    if yield_value is not None:
        y = yield_value
    if not y > 0:
        raise PlanError(f"step {step.id} has a yield of {y:g}; it must be above 0", step=step.id)
    n_lim = n_product / (y * nu_p / nu_l)  # [mol]
    lim = route.materials[step.limiting]
    m_lim, _v = charge_from_moles(lim, n_lim)
    lines = tuple(_line(route, step, c, i, n_lim, m_lim) for i, c in enumerate(step.charges, start=1))
    for line in lines:
        for what, q in (("amount", line.mol), ("mass", line.mass), ("volume", line.volume)):
            if q is not None and not math.isfinite(q.magnitude):
                raise PlanError(f"step {step.id}: the {what} of {line.material} comes out as {q.magnitude}; "
                                "a number in the route or the target is far out of range",
                                location=step.location, step=step.id,
                                hint="check the target amount, the equation's coefficients and the charge lines")
    prod = route.materials[step.product]
    product_mass = n_product * supplied_form(prod).kg_per_mol  # as isolated, at its assay [kg]
    return StepPlan(
        id=step.id,
        name=step.name,
        equation=step.equation_text,
        limiting=step.limiting,
        limiting_mol=n_lim,
        limiting_mass=m_lim,
        product=step.product,
        product_mol=n_product,
        product_mass=product_mass,
        yield_=y,
        isolated=step.isolated,
        charges=lines,
        vessel=step.vessel,
        notes=step.notes,
    )
