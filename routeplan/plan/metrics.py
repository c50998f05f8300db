"""Route metrics: mass intensity, E-factors, atom economy, reaction mass efficiency, cost.

Every metric is a plain number computed once from a finished :class:`~routeplan.plan.model.Plan`
and kept in a frozen :class:`Metrics`; exporters read it and never recompute it.  Each
function below names the paper that defines its metric; ``docs/metrics.md`` says the
same in prose.

Words used throughout
    *raw material*: a charge that is bought, i.e. a :class:`~routeplan.plan.model.ChargePlan`
    with ``intermediate=False`` (reactants, reagents, catalysts, solvents, work-up water);
    *input of a step*: every charge of the step, a charged intermediate included;
    *intermediate from stock*: what the walk takes of an intermediate on the shelf
    (``StepPlan.from_stock_mass``, as isolated); it enters the campaign like a raw
    material and counts as one in the route PMI and the E-factors, so that using stock
    does not make the route look greener than it is;
    *mass*: mass as charged [kg] (a solution's whole mass, a solid at its assay).
"""

from __future__ import annotations

import functools
from dataclasses import field
from types import MappingProxyType
from typing import TYPE_CHECKING, Any, Mapping

from routeplan.chemistry.formula import CACHE_SIZE
from routeplan.frozen import frozen
from routeplan.plan.core import molar_masses


if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import ChargePlan, Plan, StepPlan
    from routeplan.route.model import Material, Route, Step

__all__ = [
    "SOLVENT_ROLES",
    "Metrics",
    "compute_metrics",
    "route_pmi",
    "step_pmi",
    "cumulative_pmi",
    "simple_e_factor",
    "atom_economy",
    "reaction_mass_efficiency",
    "raw_material_cost",
    "is_water",
    "is_solvent_charge",
    "solution_split",
    "stock_input_kg",
]

#: Charge roles left out of the simple E-factor whole, besides any charge of water and a
#: work-up charge by volumes (Roschangar, Sheldon and Senanayake, Green Chem. 2015, 17,
#: 752: sEF ignores solvents and water).
SOLVENT_ROLES = ("solvent",)


def _ratio(num: float, den: float) -> float | None:
    return num / den if den > 0 else None


# --------------------------------------------------------------------------- PMI


def stock_input_kg(plan: "Plan") -> dict[str, float]:
    """Mass of each intermediate taken from stock [kg], as isolated; empty without any."""
    return {sp.product: sp.stock_m_kg for sp in plan.steps
            if sp.stock_m_kg is not None and sp.stock_m_kg > 0}


def route_pmi(plan: "Plan") -> float:
    """Process mass intensity of the whole route [kg/kg].

    ``PMI = (sum of the masses of every raw material charged in every step + mass of
    every intermediate taken from stock) / mass of target delivered``, with the target
    mass as isolated including overage (``plan.target_mass``).  Reactants, reagents,
    catalysts, solvents and work-up water all count; intermediates made in the route do
    not (their own raw materials are already counted), but an intermediate taken from
    the shelf does: it is material entering the campaign (our own choice).

    Source: C. Jimenez-Gonzalez, C. S. Ponder, Q. B. Broxterman and J. B. Manley,
    Org. Process Res. Dev. 2011, 15, 912 (PMI of a multi-step route counts every
    raw material of every step once, per mass of final product).

    Parameters
    ----------
    plan : Plan
        A finished plan.

    Returns
    -------
    float
        Route PMI [kg/kg].
    """
    raw = sum(c.m_kg for sp in plan.steps for c in sp.charges if not c.intermediate)
    shelf = stock_input_kg(plan)
    if shelf:
        raw += sum(shelf.values())
    return raw / plan.target_kg


def step_pmi(sp: "StepPlan") -> float | None:
    """Process mass intensity of one step [kg/kg].

    ``PMI_step = sum of the masses of every input of the step (a charged intermediate
    included) / mass of the step's product as isolated``.  Step PMIs do not add up to
    the route PMI: each step's PMI is per kg of its own product, and the intermediate
    it makes is counted again as an input of the next step.

    Source: Jimenez-Gonzalez et al., Org. Process Res. Dev. 2011, 15, 912.

    Returns
    -------
    float or None
        Step PMI [kg/kg]; None when the step makes nothing (it does not lead to the target).
    """
    return _ratio(sum(c.m_kg for c in sp.charges), sp.product_m_kg)


def _share(c: "ChargePlan", maker: "StepPlan") -> float:
    """Fraction of ``maker``'s product that charge ``c`` takes [-]."""
    if c.n_mol is not None and maker.product_n_mol > 0:
        return c.n_mol / maker.product_n_mol
    made = maker.product_m_kg
    return c.m_kg / made if made > 0 else 0.0


def _cumulative_raw_mass(plan: "Plan") -> dict[str, float]:
    """Raw material mass [kg] behind each step's whole product, steps in execution order.

    Where part of an intermediate comes from stock, a step that charges it takes its
    share of the maker's raw materials and of the stock's mass together, in proportion
    to the moles made plus the moles taken from stock.
    """
    out: dict[str, float] = {}
    for sp in plan.steps:  # execution order: every maker comes before its users
        total = 0.0
        for c in sp.charges:
            maker = plan.step_making(c.material) if c.intermediate else None
            if maker is None:
                if not c.intermediate:
                    total += c.m_kg
                continue
            if maker.stock_n_mol is None:
                total += _share(c, maker) * out[maker.id]
            else:
                total += _stock_share(c, maker) * (out[maker.id] + maker.stock_m_kg)
        out[sp.id] = total
    return out


def _stock_share(c: "ChargePlan", maker: "StepPlan") -> float:
    """Fraction of ``maker``'s product made and taken from stock that charge ``c`` takes [-]."""
    supply = maker.product_n_mol + maker.stock_n_mol
    if c.n_mol is not None and supply > 0:
        return c.n_mol / supply
    made = maker.product_m_kg + maker.stock_m_kg
    return c.m_kg / made if made > 0 else 0.0


def cumulative_pmi(plan: "Plan") -> dict[str, float | None]:
    """Cumulative process mass intensity of each step [kg/kg].

    ``PMI_cum(step) = raw materials charged in the step and in every step upstream of
    it / mass of the step's product``.  In a convergent route each branch's raw
    materials count once.  Where an intermediate feeds more than one step, its
    upstream raw materials are shared among those steps in proportion to the moles
    each takes, so that no raw material is counted twice; the cumulative PMI of the
    step that makes the target is then the route PMI.

    Source: Jimenez-Gonzalez et al., Org. Process Res. Dev. 2011, 15, 912 (the PMI of
    a convergent route sums each branch once); the proportional sharing of a shared
    intermediate is our own choice.

    Returns
    -------
    dict[str, float or None]
        Step id -> cumulative PMI [kg/kg], in execution order; None for a step that
        makes nothing.
    """
    raw = _cumulative_raw_mass(plan)
    return {sp.id: _ratio(raw[sp.id], sp.product_m_kg) for sp in plan.steps}


# --------------------------------------------------------------------- E-factors


def is_water(material: "Material") -> bool:
    """True when ``material`` is water: its formula is H2O (whatever its key).

    A material without a formula is not taken for water from its key or name (that would
    make a metric follow a spelling), and a solution is never water (its formula is the
    solute's; its solvent is counted by :func:`solution_split`).

    Examples
    --------
    >>> from routeplan.route.model import Material
    >>> is_water(Material(key="aqua", name="process water", formula="H2O"))
    True
    >>> is_water(Material(key="water", name="water"))
    False
    """
    if material.solution is not None or not material.formula:
        return False
    return _is_water_formula(material.formula)


@functools.lru_cache(maxsize=CACHE_SIZE)
def _is_water_formula(formula: str) -> bool:
    """True when ``formula`` reads as H2O (worked out once per formula)."""
    try:
        from routeplan.chemistry.formula import element_counts

        return element_counts(formula) == {"H": 2, "O": 1}
    except Exception:  # noqa: BLE001 - an unreadable formula is not water
        return False


def solution_split(material: "Material", c: "ChargePlan") -> tuple[float, float]:
    """The solute and the solvent in a charge [kg]: ``(m, 0)`` for anything but a solution.

    For a solution the solute is ``n * M`` (moles of the compound times its molar mass)
    and the solvent the rest of the charge's mass; without a molar mass the whole charge
    is taken for solute.
    """
    if material.solution is None or c.n_mol is None or material.molar_mass is None:
        return c.m_kg, 0.0
    from routeplan.units import magnitude

    solute = c.n_mol * magnitude(material.molar_mass, "kg/mol")  # [mol] * [kg/mol]
    return solute, c.m_kg - solute


def is_solvent_charge(material: "Material", c: "ChargePlan") -> bool:
    """True for a charge the simple E-factor leaves out whole: a solvent or water.

    A solvent is a charge of role ``solvent``, or a work-up charge measured by
    ``volumes`` (a wash or an extraction solvent); water is any charge of water
    (:func:`is_water`) whatever its role.  A work-up reagent charged by mass or by
    moles (a filter aid, charcoal, a quench salt) is not a solvent and stays in.
    """
    return is_water(material) or _is_solvent_role(c)


def _is_solvent_role(c: "ChargePlan") -> bool:
    """True for a charge of role ``solvent`` or a work-up charge by ``volumes`` (whatever its material)."""
    role = c.role
    return role == "solvent" or (role == "workup" and c.basis == "volumes")


def simple_e_factor(plan: "Plan") -> float:
    """Simple E-factor of the route [kg/kg].

    ``sEF = (mass of every raw material charged, solvents and water left out, + mass of
    intermediates taken from stock - mass of target) / mass of target``.  Left out: a
    solvent or water charge (:func:`is_solvent_charge`: role ``solvent``, a work-up
    charge by ``volumes``, any charge of water whatever its role) and the solvent part
    of a reagent bought as a solution (:func:`solution_split`: its solute counts as
    reagent).  Work-up reagents (a filter aid, charcoal, a quench salt) count.

    Source: F. Roschangar, R. A. Sheldon and C. H. Senanayake, Green Chem. 2015, 17,
    752 (sEF leaves out solvents and water; cEF counts them all, without recycling).

    Returns
    -------
    float
        sEF [kg/kg].
    """
    materials = plan.route.materials
    water: dict[str, bool] = {}  # material key -> is_water, worked out once per material
    kept = 0.0
    for sp in plan.steps:
        for c in sp.charges:
            if c.intermediate:
                continue
            key = c.material
            mat = materials[key]
            wet = water.get(key)
            if wet is None:
                wet = water[key] = is_water(mat)
            if wet or _is_solvent_role(c):
                continue
            kept += solution_split(mat, c)[0]
    shelf = stock_input_kg(plan)
    if shelf:
        kept += sum(shelf.values())
    target = plan.target_kg
    return (kept - target) / target


# ------------------------------------------------------- atom economy and RME


def atom_economy(route: "Route", step_id: str) -> float | None:
    """Atom economy of one step from its equation [-].

    ``AE = nu_p * M_p / sum_i(nu_i * M_i)`` over the reactants ``i`` of the equation,
    with ``p`` the step's main product, ``nu`` the stoichiometric coefficients [-] and
    ``M`` the molar masses [g/mol].

    Source: B. M. Trost, Science 1991, 254, 1471.

    Returns
    -------
    float or None
        AE [-]; None when a molar mass is missing.
    """
    return _atom_economy(route.step(step_id), molar_masses(route))


def _atom_economy(step: "Step", M: Mapping[str, float | None]) -> float | None:
    """:func:`atom_economy` of ``step`` with the route's molar masses ``M`` [kg/mol] at hand."""
    prod = M[step.product]
    if prod is None:
        return None
    den = 0.0
    for t in step.equation.reactants:
        m = M[t.key]
        if m is None:
            return None
        den += t.coefficient * m
    num = step.equation.coefficient(step.product) * prod
    return _ratio(num, den)


def reaction_mass_efficiency(route: "Route", sp: "StepPlan") -> float | None:
    """Reaction mass efficiency of one step [-].

    ``RME = m(product) / sum of m(reactant)`` over the reactants of the step's equation
    as charged (an excess counts), where each mass is that of the compound itself
    (moles x molar mass), so a lot's impurities and the solvent of a reagent solution
    are not counted as reactant; the product mass is that of the pure product made.
    For ``A + B -> C``: ``RME = m_C / (m_A + m_B)``.  RME folds yield, atom economy
    and excess into one number; solvents, catalysts and other reagents are outside it.

    Source: A. D. Curzons, D. J. C. Constable, D. N. Mortimer and V. L. Cunningham,
    Green Chem. 2001, 3, 1 (defined there as mass of product C x 100 / (mass of A +
    mass of B)); discussed in D. J. C. Constable, A. D. Curzons and V. L. Cunningham,
    Green Chem. 2002, 4, 521.

    Returns
    -------
    float or None
        RME [-]; None when a molar mass is missing or the step makes nothing.
    """
    return _reaction_mass_efficiency(route.step(sp.id), sp, molar_masses(route))


def _reaction_mass_efficiency(step: "Step", sp: "StepPlan", M: Mapping[str, float | None]) -> float | None:
    """:func:`reaction_mass_efficiency` of ``sp`` (the plan of ``step``) with the route's
    molar masses ``M`` [kg/mol] at hand."""
    prod = M[sp.product]
    if prod is None:
        return None
    reactants = {t.key for t in step.equation.reactants}
    den = 0.0
    for c in sp.charges:
        if c.material not in reactants:
            continue
        m = M[c.material]
        if m is None or c.n_mol is None:
            return None
        den += c.n_mol * m  # [mol] * [kg/mol]
    num = sp.product_n_mol * prod
    return _ratio(num, den) if num > 0 else None


# ------------------------------------------------------------------------ cost


def raw_material_cost(plan: "Plan") -> tuple[float | None, tuple[str, ...]]:
    """Raw-material cost per kg of target [currency/kg], and the unpriced raw materials.

    ``cost/kg = sum over priced raw materials of (mass as supplied [kg] x price
    [currency/kg]) / mass of target [kg]`` (``RawMaterialTotal.cost``).  Where some raw
    materials have no price the sum covers the priced ones only, and their keys are
    returned so that every output can say the figure is incomplete.  Method: the
    ordinary bill of raw materials (common practice, no source).

    Returns
    -------
    cost_per_kg : float or None
        [currency/kg]; None without a currency or without any price.
    unpriced : tuple of str
        Keys of raw materials without a price (empty without a currency).
    """
    if not plan.route.currency:
        return None, ()
    priced = [r.cost for r in plan.raw_materials if r.cost is not None]
    unpriced = tuple(r.material for r in plan.raw_materials if r.cost is None)
    if not priced:
        return None, unpriced
    return sum(priced) / plan.target_kg, unpriced


# --------------------------------------------------------------------- Metrics


@frozen(eq=False)
class Metrics:
    """The metrics of one plan; every ratio is per kg of target as delivered.

    Attributes
    ----------
    target_mass_kg : float
        Mass of target the ratios refer to, as isolated with overage [kg].
    pmi : float
        Route process mass intensity [kg/kg] (:func:`route_pmi`).
    pmi_by_step : Mapping[str, float or None]
        Step PMI [kg/kg] (:func:`step_pmi`), execution order.
    pmi_cumulative_by_step : Mapping[str, float or None]
        Cumulative PMI [kg/kg] (:func:`cumulative_pmi`).
    e_factor_complete : float
        Complete E-factor ``cEF = PMI - 1`` [kg/kg] (Roschangar, Sheldon and
        Senanayake, Green Chem. 2015, 17, 752).
    e_factor_simple : float
        Simple E-factor [kg/kg] (:func:`simple_e_factor`).
    atom_economy_by_step : Mapping[str, float or None]
        Atom economy [-] (:func:`atom_economy`).
    reaction_mass_efficiency_by_step : Mapping[str, float or None]
        Reaction mass efficiency [-] (:func:`reaction_mass_efficiency`).
    cost_per_kg : float or None
        Raw-material cost [currency/kg] (:func:`raw_material_cost`).
    currency : str or None
        ISO 4217 code of ``cost_per_kg``.
    unpriced : tuple of str
        Raw materials left out of ``cost_per_kg`` for want of a price.
    mass_per_kg_target : Mapping[str, float]
        Mass of each raw material as supplied per kg of target [kg/kg], in order of
        first use; with ``from_stock_per_kg_target`` the values add up to ``pmi``.
    largest_raw_material : tuple of (str, float) or None
        Key and mass [kg] of the raw material with the largest mass over the campaign.
    step_count : int
        Number of steps in the route [-].
    longest_linear_sequence : tuple of str
        Step ids of the longest chain of steps ending at the target.
    from_stock_per_kg_target : Mapping[str, float]
        Mass of each intermediate taken from stock, as isolated, per kg of target
        [kg/kg]; counted in ``pmi`` and the E-factors.  Empty without one.

    A step that does not run (``StepPlan.not_run``) has None for every step metric.
    """

    target_mass_kg: float
    pmi: float
    pmi_by_step: Mapping[str, float | None]
    pmi_cumulative_by_step: Mapping[str, float | None]
    e_factor_complete: float
    e_factor_simple: float
    atom_economy_by_step: Mapping[str, float | None]
    reaction_mass_efficiency_by_step: Mapping[str, float | None]
    cost_per_kg: float | None
    currency: str | None
    unpriced: tuple[str, ...]
    mass_per_kg_target: Mapping[str, float]
    largest_raw_material: tuple[str, float] | None
    step_count: int
    longest_linear_sequence: tuple[str, ...]
    from_stock_per_kg_target: Mapping[str, float] = field(default_factory=lambda: MappingProxyType({}))

    @property
    def cost_complete(self) -> bool:
        """True when a cost was computed and every raw material had a price."""
        return self.cost_per_kg is not None and not self.unpriced

    def to_dict(self) -> dict[str, Any]:
        """The metrics as plain JSON values (the ``metrics`` key of the plan JSON)."""
        largest = None
        if self.largest_raw_material is not None:
            largest = {"material": self.largest_raw_material[0],
                       "mass_kg": self.largest_raw_material[1]}
        return {
            "target_mass_kg": self.target_mass_kg,
            "pmi": self.pmi,
            "pmi_by_step": dict(self.pmi_by_step),
            "pmi_cumulative_by_step": dict(self.pmi_cumulative_by_step),
            "e_factor_complete": self.e_factor_complete,
            "e_factor_simple": self.e_factor_simple,
            "atom_economy_by_step": dict(self.atom_economy_by_step),
            "reaction_mass_efficiency_by_step": dict(self.reaction_mass_efficiency_by_step),
            "cost_per_kg": self.cost_per_kg,
            "currency": self.currency,
            "cost_complete": self.cost_complete,
            "unpriced": list(self.unpriced),
            "mass_per_kg_target": dict(self.mass_per_kg_target),
            "largest_raw_material": largest,
            "step_count": self.step_count,
            "longest_linear_sequence": {"count": len(self.longest_linear_sequence),
                                        "steps": list(self.longest_linear_sequence)},
            "from_stock_per_kg_target": dict(self.from_stock_per_kg_target),
        }


def compute_metrics(plan: "Plan") -> Metrics:
    """All metrics of a finished plan.

    Parameters
    ----------
    plan : Plan
        The plan, steps in execution order, raw materials totalled.

    Returns
    -------
    Metrics
        Frozen metrics; ``plan.metrics`` once :func:`~routeplan.plan.planner.plan_route` is done.
    """
    route = plan.route
    target = plan.target_kg
    pmi = route_pmi(plan)
    cost, unpriced = raw_material_cost(plan)
    largest = None
    if plan.raw_materials:
        big = max(plan.raw_materials, key=lambda r: r.m_kg)
        largest = (big.material, big.m_kg)
    # the step metrics, one pass over the steps; a step that does not run has none
    cumulative = cumulative_pmi(plan)
    M = molar_masses(route)  # [kg/mol]
    by_step: dict[str, float | None] = {}
    cum_by_step: dict[str, float | None] = {}
    ae_by_step: dict[str, float | None] = {}
    rme_by_step: dict[str, float | None] = {}
    for sp in plan.steps:
        sid = sp.id
        if sp.not_run is None:
            step = route.step(sid)
            by_step[sid] = step_pmi(sp)
            cum_by_step[sid] = cumulative[sid]
            ae_by_step[sid] = _atom_economy(step, M)
            rme_by_step[sid] = _reaction_mass_efficiency(step, sp, M)
        else:
            by_step[sid] = cum_by_step[sid] = ae_by_step[sid] = rme_by_step[sid] = None

    return Metrics(
        target_mass_kg=target,
        pmi=pmi,
        pmi_by_step=MappingProxyType(by_step),
        pmi_cumulative_by_step=MappingProxyType(cum_by_step),
        # cEF = PMI - 1 (Roschangar, Sheldon and Senanayake, Green Chem. 2015, 17, 752)
        e_factor_complete=pmi - 1.0,
        e_factor_simple=simple_e_factor(plan),
        atom_economy_by_step=MappingProxyType(ae_by_step),
        reaction_mass_efficiency_by_step=MappingProxyType(rme_by_step),
        cost_per_kg=cost,
        currency=route.currency,
        unpriced=unpriced,
        mass_per_kg_target=MappingProxyType({r.material: r.m_kg / target for r in plan.raw_materials}),
        largest_raw_material=largest,
        step_count=len(plan.steps),
        longest_linear_sequence=tuple(plan.overall_yield.longest_linear_sequence),
        from_stock_per_kg_target=MappingProxyType({k: v / target for k, v in stock_input_kg(plan).items()}),
    )
