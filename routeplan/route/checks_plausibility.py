"""Plausibility checks of a route file: values that are valid one by one but cannot be real.

The schema accepts any positive density, molarity and molar mass, and an equation over
materials with molar masses but no formulas cannot be checked atom by atom.  The checks
here catch what such values betray, usually a unit or a decimal point gone wrong:

- a density outside :data:`DENSITY_RANGE` (no liquid or solid of a route lies outside it);
- a molar mass below that of a hydrogen atom;
- a solution whose solute would weigh as much as the solution or more (by ``molarity``
  times the molar mass, or a ``mass_fraction`` of 100 %);
- an equation whose products do not weigh what its reactants weigh (Σν·M), where the atom
  balance cannot run because a species has no formula;
- a charge line, a step yield, an assay or an overage outside the usual range of its basis and role
  (:data:`CHARGE_RANGES`, :data:`LOWEST_USUAL_YIELD`, :data:`LOWEST_USUAL_ASSAY`,
  :data:`HIGHEST_USUAL_OVERAGE`): a
  warning that says what is usual (an error under ``--strict``); a ``mol_percent`` above
  100 is an error, since it is more than one equivalent.

Each function returns :class:`Finding` objects; :mod:`routeplan.route.checks` places them
in the file.  Nothing here reads the file or prints.
"""

from __future__ import annotations

import math
import re
from typing import Any, Mapping

from routeplan.route.findings import Finding
from routeplan.units import unit
from routeplan.vocab import Severity

__all__ = ["Finding", "DENSITY_RANGE", "MASS_BALANCE_TOLERANCE", "MOLAR_MASS_TOLERANCE", "CHARGE_RANGES",
           "LOWEST_USUAL_YIELD", "LOWEST_USUAL_ASSAY", "HIGHEST_USUAL_OVERAGE", "charge_findings", "yield_findings",
           "assay_findings", "overage_findings", "density_findings", "molar_mass_findings",
           "solution_findings", "mass_balance_finding", "vessel_volume_findings",
           "SMALL_VESSEL_L", "LARGE_TARGET_KG"]

#: A vessel below this nominal volume [L] in a route whose target is above
#: :data:`LARGE_TARGET_KG` is taken for a unit slip (``630 mL`` for ``630 L``); common
#: practice, no source: no kilo campaign runs in a vessel smaller than a litre.
SMALL_VESSEL_L = 1.0

#: Target mass [kg] above which a vessel under :data:`SMALL_VESSEL_L` is suspect.
LARGE_TARGET_KG = 1.0

#: Densities a material or solution of a route may have [g/mL], inclusive.
#: Upper bound: osmium, the densest element, is 22.59 g/cm³ (CRC Handbook of Chemistry and
#: Physics, density of the elements; from memory, page not at hand); 25 g/mL leaves a margin.
#: Lower bound: common practice, no source; the lightest liquid, liquid hydrogen, is about
#: 0.07 g/mL (from memory), and no solvent, reagent or solid of a route comes near it.
DENSITY_RANGE = (0.05, 25.0)

#: Largest relative difference allowed between a given molar mass and the formula's [-]
#: (0.1 %, the route format's rule; also the margin below hydrogen's atomic weight).
MOLAR_MASS_TOLERANCE = 1e-3

#: Largest relative difference between the products' and the reactants' Σν·M, relative to
#: the reactants, below which an equation counts as balanced by mass [-] (0.5 %).  Molar
#: masses typed with four or five significant figures stay far inside it.
MASS_BALANCE_TOLERANCE = 5e-3

#: Highest usual value of a charge line, by basis and role [-]: ``(basis, role)`` -> (limit,
#: what is usual).  A role of None stands for every role not listed for that basis.  Each
#: limit is common practice, no source:
#:
#: - a catalyst by ``mass_ratio`` (Pd/C, Raney nickel) is charged at a few to 20 % of the
#:   substrate's mass; above 0.3 kg/kg (30 wt %) it is most often a loading typed ten times
#:   too big (0.5 for 0.05) or a percentage typed as a ratio (5 for 0.05);
#: - another material by ``mass_ratio`` (a filter aid, carbon, a salt) above 10 kg/kg;
#: - ``equiv`` above 10 on any line but a solvent (a reagent that is also the solvent is
#:   charged in large excess);
#: - ``volumes`` of a reaction solvent above 30 L/kg: reactions are usually run at 3 to
#:   20 volumes, so 40 is most often 4 typed with a zero too many; any other line (a wash,
#:   a work-up) above 50 L/kg: a step that dilute does not fit a plant vessel;
#: - ``mol_percent`` above 100 is more than one equivalent: an error, not a warning.
CHARGE_RANGES = {
    ("mass_ratio", "catalyst"): (0.3, "a catalyst by mass is usually 0.01 to 0.2 kg per kg of limiting reagent "
                                      "(1 to 20 wt %)"),
    ("mass_ratio", "solvent"): (50.0, "a solvent is usually up to 50 kg per kg of limiting reagent"),
    ("mass_ratio", None): (10.0, "a charge by mass ratio is usually up to 10 kg per kg of limiting reagent"),
    ("equiv", "solvent"): (None, ""),
    ("equiv", None): (10.0, "a material is usually charged at up to 10 equiv"),
    ("volumes", "solvent"): (30.0, "a reaction solvent is usually 3 to 20 volumes (L per kg of limiting "
                                   "reagent); check for a zero too many"),
    ("volumes", None): (50.0, "a step usually runs at up to 50 volumes (L per kg of limiting reagent)"),
    ("mol_percent", None): (100.0, "a catalyst is usually 0.01 to 20 mol %; 100 mol % is one equivalent"),
}

#: Lowest usual step yield [-]: a step below 10 % is a percent typed as a fraction or a
#: step no campaign would run (common practice, no source).
LOWEST_USUAL_YIELD = 0.10

#: Lowest usual assay of a material [-]: below 10 % the material would be mostly something
#: else; most often a fraction typed with a percent sign (``0.985 %`` for 98.5 %) (common
#: practice, no source).
LOWEST_USUAL_ASSAY = 0.10

#: Highest usual target overage [-]: a margin above 100 % plans twice the target
#: (common practice, no source).
HIGHEST_USUAL_OVERAGE = 1.0

#: A solute's mass per litre this close below the solution's still counts as equal [-]
#: (absorbs the rounding of unit conversions).
_EQUAL = 1e-9


def _g(x: float) -> str:
    """A number for a message, to 4 significant figures (``1882``, ``1.1``, ``0.00108``)."""
    return f"{x:.4g}"


def _written(q) -> str:
    """A quantity as its unit was written, in the usual symbols: ``1080 g/mL``, ``9 lb/gal``."""
    unit = f"{q.units:~P}"
    unit = re.sub(r"(?<![A-Za-z])([mµu]?)l(?![A-Za-z])", lambda m: m.group(1) + "L", unit)
    return f"{q.magnitude:g} {unit}"


def density_findings(path: tuple, density) -> list[Finding]:
    """An error when ``density`` is outside :data:`DENSITY_RANGE`.

    Parameters
    ----------
    path : tuple
        Key path of the density.
    density : pint.Quantity
        The density as written [mass/volume].

    Returns
    -------
    list of Finding
        Empty, or one error naming the value, its unit and, where dividing or multiplying
        by 1000 gives a density in range, that value (g/L and kg/m³ are 1000 times smaller
        than g/mL and kg/L).

    Examples
    --------
    >>> from routeplan.units import Q
    >>> density_findings(("density",), Q(1.08, "g/mL"))
    []
    """
    low, high = DENSITY_RANGE
    rho = float(density.m_as(unit("g/mL")))
    if low <= rho <= high:
        return []
    shown = _written(density)
    if not shown.endswith(" g/mL"):
        shown += f" ({_g(rho)} g/mL)"
    if rho > high:
        message = (f"density {shown} is more than any liquid or solid: osmium, the densest element, is "
                   f"22.59 g/mL")
        fixed, unit_words = rho / 1000, "g/L and kg/m³ are 1000 times smaller than g/mL"
    else:
        message = f"density {shown} is less than any liquid or solid in a route"
        fixed, unit_words = rho * 1000, "g/mL and kg/L are 1000 times larger than g/L"
    hint = f"a density lies between {low:g} and {high:g} g/mL"
    if low <= fixed <= high:
        hint = f"was {_g(fixed)} g/mL meant? {unit_words}"
    elif rho < low:
        hint += "; a gas charged by mass needs no density"
    return [Finding(Severity.ERROR, path, message, hint)]


def molar_mass_findings(path: tuple, molar_mass) -> list[Finding]:
    """An error when a given molar mass is below that of a hydrogen atom.

    Parameters
    ----------
    path : tuple
        Key path of the ``molar_mass``.
    molar_mass : pint.Quantity
        The molar mass as written [mass/amount].

    Returns
    -------
    list of Finding
        Empty, or one error.  The floor is the standard atomic weight of hydrogen from
        routeplan's IUPAC/CIAAW table (1.008 g/mol), the lightest of all species, less the
        0.1 % allowed between a given molar mass and a formula's.

    Examples
    --------
    >>> from routeplan.units import Q
    >>> molar_mass_findings(("molar_mass",), Q(18.015, "g/mol"))
    []
    """
    from routeplan.chemistry.elements import atomic_weight

    h = atomic_weight("H")
    m = float(molar_mass.m_as(unit("g/mol")))
    if m >= h * (1 - MOLAR_MASS_TOLERANCE):
        return []
    shown = _written(molar_mass)
    if not shown.endswith(" g/mol"):
        shown += f" ({_g(m)} g/mol)"
    hint = "check the unit and the decimal point"
    if m * 1000 >= h:
        hint = f"was {_g(m * 1000)} g/mol meant? " + hint
    return [Finding(Severity.ERROR, path, f"molar mass {shown} is less than that of a hydrogen atom, "
                                   f"{h:.4g} g/mol, the lightest of all", hint)]


def solution_findings(key: str, solution, molar_mass) -> list[Finding]:
    """Errors for a solution whose solute would weigh as much as the solution or more.

    A litre of solution weighs ``density`` × 1 L; the solute in it weighs
    ``molarity`` × ``M`` × 1 L (by molarity) or ``mass_fraction`` × ``density`` × 1 L.
    The solvent's share, the difference, must be positive.

    Parameters
    ----------
    key : str
        The material's key.
    solution : SolutionModel or a stand-in with ``molarity``, ``mass_fraction``, ``density``
        The solution as read (any of them may be None).
    molar_mass : pint.Quantity or None
        The solute's molar mass [g/mol]; without it the molarity is not checked.

    Returns
    -------
    list of Finding
        Errors at ``solution.molarity`` or ``solution.mass_fraction``.  A solution whose
        density is itself out of range is not checked here (that error says enough).
    """
    here = ("materials", key, "solution")
    density = solution.density
    if density is None or density_findings((), density):
        return []
    rho = float(density.m_as(unit("g/mL")))              # = kg of solution per litre
    out = []
    if solution.mass_fraction is not None and solution.mass_fraction >= 1 - _EQUAL:
        out.append(Finding(Severity.ERROR, here + ("mass_fraction",),
                           "a mass fraction of 100 % leaves no solvent: this is the neat compound, not a solution",
                           f"describe the neat material with 'density: {_g(rho)} g/mL' and no solution, "
                           f"or give the real mass fraction"))
    if solution.molarity is not None and molar_mass is not None:
        c = float(solution.molarity.m_as(unit("mol/L")))
        m = float(molar_mass.m_as(unit("g/mol")))
        solute = c * m / 1000                       # kg of solute per litre
        if solute >= rho * (1 - _EQUAL):
            limit = rho * 1000 / m                  # mol/L at which the solute would be all the mass
            out.append(Finding(Severity.ERROR, here + ("molarity",),
                               f"{_g(c)} mol/L × {_g(m)} g/mol is {_g(solute)} kg of solute per litre, but a litre "
                               f"of this solution, at {_g(rho)} g/mL, weighs only {_g(rho)} kg",
                               _molarity_hint(c, limit, rho)))
    return out


def _molarity_hint(c: float, limit: float, rho: float) -> str:
    """What to check when ``c`` [mol/L] reaches ``limit`` [mol/L], the ceiling at ``rho`` [g/mL]."""
    hint = f"at this density the molarity must be below {_g(limit)} mol/L"
    for k in (1, 2, 3):
        smaller = c / 10 ** k
        if smaller < limit:
            hint += f": was {_g(smaller)} mol/L meant, with the decimal point misplaced?"
            break
    return hint + " Else check that the formula is the solute's and the density the whole solution's"


def mass_balance_finding(path: tuple, step_id: str | None, equation,
                         molar_masses: Mapping[str, Any]) -> Finding | None:
    """A warning when the products' Σν·M differs from the reactants' by more than 0.5 %.

    Parameters
    ----------
    path : tuple
        Key path of the step's ``equation``.
    step_id : str or None
        The step's id, for the message.
    equation : Equation
        The parsed equation.
    molar_masses : Mapping[str, pint.Quantity]
        Molar mass [g/mol] of every species of the equation.

    Returns
    -------
    Finding or None
        E.g. ``step S1 does not balance by mass: the products weigh 350 g/mol more than the
        reactants (600 vs 250 g/mol)``; None when within :data:`MASS_BALANCE_TOLERANCE`.

    Examples
    --------
    >>> from routeplan.chemistry.equation import parse_equation
    >>> from routeplan.units import Q
    >>> mm = {"A": Q(100, "g/mol"), "B": Q(50, "g/mol"), "P": Q(200, "g/mol")}
    >>> mass_balance_finding(("equation",), "S1", parse_equation("2 A + B -> 3 P"), mm).message
    'step S1 does not balance by mass: the products weigh 350 g/mol more than the reactants (600 vs 250 g/mol)'
    """
    def side(terms) -> float:
        return math.fsum(t.coefficient * float(molar_masses[t.key].m_as(unit("g/mol"))) for t in terms)

    reactants, products = side(equation.reactants), side(equation.products)
    diff = products - reactants
    if abs(diff) <= MASS_BALANCE_TOLERANCE * reactants:
        return None
    who = f"step {step_id}" if step_id is not None else "the equation"
    how = "more" if diff > 0 else "less"
    return Finding(Severity.WARNING, path,
                   f"{who} does not balance by mass: the products weigh {_g(abs(diff))} g/mol {how} than the "
                   f"reactants ({_g(products)} vs {_g(reactants)} g/mol)",
                   "check the coefficients and the molar masses; atom economy would be wrong")


def vessel_volume_findings(target_amount, equipment: Mapping[str, Any]) -> list[Finding]:
    """Vessels too small for the campaign, most likely a unit slip (``630 mL`` for ``630 L``).

    Parameters
    ----------
    target_amount : pint.Quantity or None
        The route's target mass.
    equipment : mapping
        Vessel key -> a vessel with ``volume`` (a pint Quantity), or None.

    Returns
    -------
    list of Finding
        One warning at each vessel's ``volume`` under :data:`SMALL_VESSEL_L` when the
        target is above :data:`LARGE_TARGET_KG`, suggesting the same number in litres.
    """
    if target_amount is None or not float(target_amount.m_as(unit("kg"))) > LARGE_TARGET_KG:
        return []
    out = []
    for key, vessel in equipment.items():
        volume = getattr(vessel, "volume", None)
        if volume is None:
            continue
        V_L = float(volume.m_as(unit("L")))
        if 0 < V_L < SMALL_VESSEL_L:
            out.append(Finding(
                Severity.WARNING, ("equipment", key, "volume"),
                f"vessel {key} holds {_written(volume)} ({_g(V_L)} L), under {SMALL_VESSEL_L:g} L, for a target of "
                f"{_g(float(target_amount.m_as(unit('kg'))))} kg: it would need a great many batches",
                f"probably meant {volume.magnitude:g} L"))
    return out


def charge_findings(path: tuple, material: str, basis: str, value: float, role: str) -> list[Finding]:
    """A warning (an error for ``mol_percent``) when a charge line is above the usual range
    of its basis and role (:data:`CHARGE_RANGES`).

    Parameters
    ----------
    path : tuple
        Key path of the basis value, e.g. ``("steps", 0, "charges", 2, "equiv")``.
    material : str
        The material charged, for the message.
    basis : str
        ``equiv``, ``mol_percent``, ``volumes`` or ``mass_ratio``.
    value : float
        The value of the basis [-] (equiv, mol %, L/kg or kg/kg).
    role : str
        The line's role, given or by default.

    Examples
    --------
    >>> charge_findings(("equiv",), "Ac2O", "equiv", 1.1, "reagent")
    []
    >>> f = charge_findings(("equiv",), "Ac2O", "equiv", 11, "reagent")[0]
    >>> f.message
    'Ac2O is charged at equiv: 11, above the usual range (more than 10) for a reagent'
    >>> f.hint
    "a material is usually charged at up to 10 equiv; was 'equiv: 1.1' meant?"
    """
    limit, usual = CHARGE_RANGES.get((basis, role), CHARGE_RANGES.get((basis, None), (None, "")))
    if limit is None or value <= limit:
        return []
    if basis == "mol_percent":
        return [Finding(Severity.ERROR, path, f"{material} is charged at mol_percent: {_g(value)}, that is "
                                       f"{_g(value / 100)} equivalents, more than one",
                        f"{usual}; write 'equiv: {_g(value / 100)}' if that much is meant")]
    hint = usual
    if basis == "mass_ratio" and role == "catalyst" and value <= 1:
        hint += f"; was 'mass_ratio: {_g(value / 10)}' meant (a loading typed ten times too big)?"
    elif basis == "mass_ratio" and role == "catalyst" and value <= 100:
        hint += f"; for {_g(value)} wt % write 'mass_ratio: {_g(value / 100)}'"
    elif value / 10 <= limit:  # a decimal point one place off: 11 for 1.1, 40 for 4
        hint += f"; was '{basis}: {_g(value / 10)}' meant?"
    return [Finding(Severity.WARNING, path, f"{material} is charged at {basis}: {_g(value)}, above the usual range "
                                     f"(more than {_g(limit)}) for a {role}", hint)]


def _percent_slip(value: float) -> str:
    """The hint for a percentage below 1 % that reads like a fraction typed with ``%``
    (``0.9 %`` where the fraction 0.9, 90 %, was meant), or an empty string."""
    if 1e-4 <= value < 0.01:
        return f"; was the fraction {value * 100:.4g} ({value * 1e4:.4g} %) meant?"
    return ""


def yield_findings(path: tuple, step_id: str, which: str, value: float) -> list[Finding]:
    """A warning when a step yield (``which``: expected, low or high) is below
    :data:`LOWEST_USUAL_YIELD`.

    Examples
    --------
    >>> yield_findings(("yield",), "S1", "expected", 0.009)[0].message
    'step S1: a yield of 0.9 % is below the usual range (less than 10 %)'
    """
    if value >= LOWEST_USUAL_YIELD:
        return []
    shown = f"{value * 100:.4g} %"
    what = "a yield" if which == "expected" else f"a {which} yield"
    hint = "a step usually yields 10 to 100 %" + _percent_slip(value)
    return [Finding(Severity.WARNING, path, f"step {step_id}: {what} of {shown} is below the usual range "
                                     f"(less than {LOWEST_USUAL_YIELD * 100:g} %)", hint)]


def assay_findings(path: tuple, value: float) -> list[Finding]:
    """A warning when a material's assay is below :data:`LOWEST_USUAL_ASSAY`.

    An assay that low makes every mass of the material (as charged, or as isolated for an
    intermediate) tens or hundreds of times too large.

    Examples
    --------
    >>> f = assay_findings(("materials", "ester", "assay"), 0.00985)[0]
    >>> f.message
    'an assay of 0.985 % is below the usual range (less than 10 %)'
    >>> f.hint
    'a material is usually supplied or isolated at 10 to 100 %; was the fraction 0.985 (98.5 %) meant?'
    """
    if value >= LOWEST_USUAL_ASSAY:
        return []
    return [Finding(Severity.WARNING, path, f"an assay of {value * 100:.4g} % is below the usual range "
                                     f"(less than {LOWEST_USUAL_ASSAY * 100:g} %)",
                    "a material is usually supplied or isolated at 10 to 100 %" + _percent_slip(value))]


def overage_findings(path: tuple, overage: float) -> list[Finding]:
    """A warning when the target's overage is above :data:`HIGHEST_USUAL_OVERAGE`.

    Examples
    --------
    >>> overage_findings(("target", "overage"), 0.02)
    []
    """
    if overage <= HIGHEST_USUAL_OVERAGE:
        return []
    return [Finding(Severity.WARNING, path, f"an overage of {overage * 100:.4g} % is above the usual range "
                                     f"(more than {HIGHEST_USUAL_OVERAGE * 100:g} %): the plan makes "
                                     f"{1 + overage:.4g} times the target",
                    "a planning margin is usually 0 to 20 %")]
