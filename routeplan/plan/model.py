"""Frozen results of planning: what every exporter reads and none recomputes.

Quantities carry pint units: moles in mol, masses in kg, volumes in L.  Fields that do
not apply are None (no molar mass, no density, no vessel).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Mapping

from routeplan.errors import Problem

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd
    import pint

    from routeplan.route.model import Route

__all__ = [
    "PlanFormat",
    "ChargePlan",
    "BatchPlan",
    "StepPlan",
    "RawMaterialTotal",
    "OverallYield",
    "StockPlan",
    "Plan",
]

#: The ``format`` value of the JSON plan.
PlanFormat = "routeplan-plan/1"


@dataclass(frozen=True)
class ChargePlan:
    """One charge of one step, for the whole campaign.

    Attributes
    ----------
    order : int
        Position in the order of addition, from 1.
    material : str
        Material key.
    name : str
        Material display name.
    role : str
        reactant, reagent, catalyst, solvent or workup.
    basis : str
        equiv, mol_percent, volumes, mass_ratio or stoichiometric.
    basis_value : float
        The number of the basis as written (equiv [-], mol % [-], volumes [L/kg],
        mass ratio [kg/kg]).
    equiv : float or None
        Moles per mole of limiting reagent [-], for molar bases; else None.
    mol : pint.Quantity or None
        Moles of the named compound [mol]; None without a molar mass.
    mass : pint.Quantity
        Mass as charged [kg] (a solution's whole mass, a solid at its assay).
    volume : pint.Quantity or None
        Volume as charged [L]; None where no density is known.
    intermediate : bool
        True when the material is made by an earlier step (not bought).
    implicit : bool
        True when the line was added by the loader (reactant with no charge line).
    carried_from : str or None
        Id of the telescoped step whose reaction mixture brings this intermediate in
        solution; ``volume`` is then the volume of mixture carried in [L] and ``mass`` the
        mass of the compound in it [kg] (the mixture is not weighed).
    mol_per_batch, mass_per_batch, volume_per_batch : pint.Quantity or None
        ``mol``, ``mass`` and ``volume`` divided by the step's batches [mol], [kg], [L],
        set once when batches are sized; None where the total is None or the step does
        not run (no batches).
    """

    order: int
    material: str
    name: str
    role: str
    basis: str
    basis_value: float
    equiv: float | None
    mol: "pint.Quantity | None"
    mass: "pint.Quantity"
    volume: "pint.Quantity | None"
    intermediate: bool = False
    implicit: bool = False
    carried_from: str | None = None
    mol_per_batch: "pint.Quantity | None" = None
    mass_per_batch: "pint.Quantity | None" = None
    volume_per_batch: "pint.Quantity | None" = None


@dataclass(frozen=True)
class BatchPlan:
    """How a step is split into batches in its vessel, and what one batch holds.

    Attributes
    ----------
    batches : int
        Number of batches [-].
    step_volume : pint.Quantity
        Largest volume in the vessel over the whole campaign [L].
    batch_volume : pint.Quantity
        ``step_volume / batches`` [L].
    fill_fraction : float or None
        ``batch_volume`` over the vessel's nominal volume [-]; None without a vessel.
    vessel : str or None
        Vessel key.
    notes : tuple of str
        What was left out of the volume (solids without density) and why.
    limiting_mol, limiting_mass : pint.Quantity or None
        Limiting reagent per batch [mol], as charged [kg]; None without batches.
    product_mol, product_mass : pint.Quantity or None
        Product per batch [mol], as isolated [kg]; None without batches.
    reaction_mass : pint.Quantity or None
        Mass in the vessel per batch that takes part in the reaction [kg]: every charge
        except ``role: workup``, a telescoped mixture at the mass carried in
        (:func:`routeplan.plan.campaign.reaction_masses`); None without batches.
    """

    batches: int
    step_volume: "pint.Quantity"
    batch_volume: "pint.Quantity"
    fill_fraction: float | None = None
    vessel: str | None = None
    notes: tuple[str, ...] = ()
    limiting_mol: "pint.Quantity | None" = None
    limiting_mass: "pint.Quantity | None" = None
    product_mol: "pint.Quantity | None" = None
    product_mass: "pint.Quantity | None" = None
    reaction_mass: "pint.Quantity | None" = None


@dataclass(frozen=True)
class StepPlan:
    """The plan of one step.

    Attributes
    ----------
    id, name : str
        Step id and display name.
    equation : str
        The equation as written.
    limiting : str
        Key of the limiting reagent.
    limiting_mol : pint.Quantity
        Moles of limiting reagent [mol].
    limiting_mass : pint.Quantity
        Mass of limiting reagent as charged [kg].
    product : str
        Key of the main product.
    product_mol : pint.Quantity
        Moles of product made [mol].
    product_mass : pint.Quantity
        Mass of product as isolated, at the product's assay [kg].
    yield_ : float
        Molar yield the walk used [-] (the expected one unless planned at low or high).
    isolated : bool
        False for a telescoped step.
    charges : tuple of ChargePlan
        In order of addition.
    vessel : str or None
        Vessel key.
    batch : BatchPlan or None
        Batch sizing, once computed.
    notes : str or None
        Free text from the route file.
    from_stock_mol : pint.Quantity or None
        Moles of the product taken from the stock on hand [mol] before the step is
        planned for the rest; None when the stock list does not name the product.
    from_stock_mass : pint.Quantity or None
        The same as a mass as isolated, at the product's assay [kg]; None likewise.
    not_run : str or None
        Why the step does not run in this campaign (the stock of its product covers
        the demand, or it feeds only steps that do not run); None when it runs.  A step
        that does not run has zero charges and zero batches.    safety : StepSafety or None
        Heat and gas of one batch (:mod:`routeplan.plan.safety`), once assessed; its
        ``thermal`` is None for a step that is not screened.
    """

    id: str
    name: str
    equation: str
    limiting: str
    limiting_mol: "pint.Quantity"
    limiting_mass: "pint.Quantity"
    product: str
    product_mol: "pint.Quantity"
    product_mass: "pint.Quantity"
    yield_: float
    isolated: bool
    charges: tuple[ChargePlan, ...]
    vessel: str | None = None
    batch: BatchPlan | None = None
    notes: str | None = None
    from_stock_mol: "pint.Quantity | None" = None
    from_stock_mass: "pint.Quantity | None" = None
    not_run: str | None = None
    safety: Any = None

    @property
    def batches(self) -> int:
        """Number of batches [-] (1 until sized; 0 for a step that does not run)."""
        return self.batch.batches if self.batch else 1

    @property
    def runs(self) -> bool:
        """False when the step does not run in this campaign (see ``not_run``)."""
        return self.not_run is None

    @property
    def covered_by_stock(self) -> bool:
        """True when the stock of the product covers the whole demand on the step."""
        return self.not_run is not None and self.from_stock_mol is not None and self.from_stock_mol.magnitude > 0


@dataclass(frozen=True)
class RawMaterialTotal:
    """A bought material, totalled over the whole route.

    Attributes
    ----------
    material, name : str
        Key and display name.
    mass : pint.Quantity
        Mass as supplied [kg].
    volume : pint.Quantity or None
        Volume as supplied [L], where a density is known.
    mol : pint.Quantity or None
        Moles of the compound [mol], where a molar mass is known.
    cost : float or None
        ``mass * price`` in the route's currency; None without a price or currency.
    steps : tuple of str
        Ids of the steps that charge it.
    """

    material: str
    name: str
    mass: "pint.Quantity"
    volume: "pint.Quantity | None"
    mol: "pint.Quantity | None"
    cost: float | None
    steps: tuple[str, ...]


@dataclass(frozen=True)
class OverallYield:
    """Overall yield of the route.

    Attributes
    ----------
    longest_linear_sequence : tuple of str
        Step ids of the longest linear sequence, in order.
    yield_ : float
        Product of the expected step yields along it [-].
    by_raw_material : Mapping[str, float]
        For each bought reactant of an equation: moles of target per mole charged,
        divided by the theoretical (stoichiometric) ratio along its path [-].
    low, high : float
        The same product over the steps' ``low`` and ``high`` yields, where a step gives
        them (its expected yield where it does not) [-].
    """

    longest_linear_sequence: tuple[str, ...]
    yield_: float
    by_raw_material: Mapping[str, float] = field(default_factory=dict)
    low: float | None = None
    high: float | None = None


@dataclass(frozen=True)
class StockPlan:
    """What the stock on hand allows, and what to buy.

    Attributes
    ----------
    max_target : pint.Quantity or None
        Largest target amount the raw materials in stock allow, before the route's
        overage (as ``--target`` takes it), with any intermediate stock used first [kg];
        None when no raw material of the list is needed.
    limited_by : str or None
        Raw material that limits it.
    to_buy : tuple of (str, pint.Quantity)
        Material key and mass to buy for the requested target [kg].
    on_hand : Mapping[str, pint.Quantity]
        Stock by material [kg]: raw materials as supplied, intermediates as isolated
        (at their assay).  What the plan takes of an intermediate is on the step that
        makes it (``StepPlan.from_stock_mol``, ``from_stock_mass``).
    source : str or None
        The stock file, when read from one.
    """

    max_target: "pint.Quantity | None"
    limited_by: str | None
    to_buy: tuple[tuple[str, "pint.Quantity"], ...]
    on_hand: Mapping[str, "pint.Quantity"] = field(default_factory=dict)
    source: str | None = None


@dataclass(frozen=True)
class Plan:
    """The plan of a whole campaign.

    Attributes
    ----------
    route : Route
        The route planned.
    target_material : str
        Key of the target.
    target_mass : pint.Quantity
        Mass delivered, as isolated, including overage [kg].
    target_mol : pint.Quantity
        Moles of pure target [mol].
    steps : tuple of StepPlan
        In execution order.
    raw_materials : tuple of RawMaterialTotal
        Every bought material, in order of first use.
    overall_yield : OverallYield
        Overall yield.
    warnings : tuple of Problem
        The route's warnings and the planner's.
    metrics : object or None
        Route metrics (see :mod:`routeplan.plan.metrics`), once computed.
    stock : StockPlan or None
        Stock comparison, when a stock list was given.
    yield_basis : str
        Which step yields the walk used: ``"expected"``, ``"low"`` or ``"high"``.
    uncertainty : Uncertainty or None
        Yield draws around the plan (:mod:`routeplan.plan.uncertainty`), when a
        confidence was asked for.
    """

    route: "Route"
    target_material: str
    target_mass: "pint.Quantity"
    target_mol: "pint.Quantity"
    steps: tuple[StepPlan, ...]
    raw_materials: tuple[RawMaterialTotal, ...]
    overall_yield: OverallYield
    warnings: tuple[Problem, ...] = ()
    metrics: Any = None
    stock: StockPlan | None = None
    yield_basis: str = "expected"
    uncertainty: Any = None

    def __hash__(self) -> int:
        return id(self)

    @functools.cached_property
    def _steps_by_id(self) -> Mapping[str, StepPlan]:
        return {s.id: s for s in self.steps}

    def step(self, step_id: str) -> StepPlan:
        """The plan of step ``step_id``."""
        return self._steps_by_id[step_id]

    def step_making(self, material: str) -> StepPlan | None:
        """The plan of the step whose main product is ``material``, or None."""
        sid = self.route.maker.get(material)
        return None if sid is None else self._steps_by_id.get(sid)

    def to_dict(self) -> dict[str, Any]:
        """The plan as the JSON contract (``routeplan-plan/1``), plain Python values."""
        from routeplan.export.json import plan_to_dict

        return plan_to_dict(self)

    def to_frame(self) -> "pd.DataFrame":
        """Every charge of every step as a pandas DataFrame, one row per charge."""
        from routeplan.views.tables import charges_frame

        return charges_frame(self)
