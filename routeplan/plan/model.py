"""Frozen results of planning: what every view reads and none recomputes.

Numbers are stored as magnitudes in fixed units named in the field (``n_mol`` [mol],
``m_kg`` [kg], ``V_L`` [L]); attributes without a unit in their name (``mass``, ``mol``,
``volume``, ``limiting_mass``, ...) give the same numbers as pint Quantities.  Fields
that do not apply are None (no molar mass, no density, no vessel).  Per-batch amounts
are set once, when batches are sized, and only read after.
"""

from __future__ import annotations

import functools
from dataclasses import field
from typing import TYPE_CHECKING, Mapping

from routeplan.errors import Problem
from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd
    import pint

    from routeplan.plan.cost_of_goods import CostOfGoods
    from routeplan.plan.metrics import Metrics
    from routeplan.plan.derivation import Derivation
    from routeplan.plan.schedule import Schedule
    from routeplan.plan.uncertainty import Uncertainty
    from routeplan.plan.waste import Waste
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


def _q(value: float | None, name: str) -> "pint.Quantity | None":
    """``value`` [``name``] as a pint Quantity, or None for None."""
    if value is None:
        return None
    from routeplan.units import Q, unit

    return Q(value, unit(name))


class _Quantity:
    """A read-only attribute giving a float field of a frozen plan object as a pint Quantity.

    ``field`` holds the magnitude in ``unit``; with ``per_batch`` the owner's
    ``per_batch(total)`` divides it first.  None stays None.
    """

    def __init__(self, field: str, unit: str, doc: str, *, per_batch: bool = False) -> None:
        self.field, self.unit, self.per_batch = field, unit, per_batch
        self.__doc__ = f"{doc} (pint Quantity in {unit}; the magnitude is ``{field}``)"

    def __get__(self, obj, owner=None):
        if obj is None:
            return self
        value = getattr(obj, self.field)
        if self.per_batch:
            value = obj.per_batch(value)
        return _q(value, self.unit)


@frozen
class ChargePlan:
    """One charge of one step, for the whole campaign and per batch.

    The numbers are stored as magnitudes in fixed units (``n_mol`` [mol], ``m_kg`` [kg],
    ``V_L`` [L]); the attributes ``mol``, ``mass`` and ``volume`` (and their per-batch
    twins) give them as pint Quantities.

    Attributes
    ----------
    order : int
        Position in the order of addition, from 1.
    material : str
        Material key.
    name : str
        Material display name.
    role : str
        reactant, reagent, catalyst, solvent or workup (:class:`routeplan.vocab.Role`).
    basis : str
        equiv, mol_percent, volumes, mass_ratio or stoichiometric (:class:`routeplan.vocab.Basis`).
    basis_value : float
        The number of the basis as written (equiv [-], mol % [-], volumes [L/kg],
        mass ratio [kg/kg]).
    equiv : float or None
        Moles per mole of limiting reagent [-], for molar bases; else None.
    n_mol : float or None
        Moles of the named compound [mol]; None without a molar mass.
    m_kg : float
        Mass as charged [kg] (a solution's whole mass, a solid at its assay).
    V_L : float or None
        Volume as charged [L]; None where no density is known.
    intermediate : bool
        True when the material is made by an earlier step (not bought).
    implicit : bool
        True when the line was added by the loader (reactant with no charge line).
    carried_from : str or None
        Id of the telescoped step whose reaction mixture brings this intermediate in
        solution; ``V_L`` is then the volume of mixture carried in [L] (what stays in
        that step's vessel at the transfer, :func:`routeplan.plan.core.contents`) and
        ``m_kg`` the mass of the compound in it [kg] (the mixture is not weighed).
    batches : int
        Batches of the step [-] (0 for a step that does not run).
    leaves : bool
        True for a work-up charge that leaves the vessel right after it is charged (a
        wash separated and discarded, a filter aid filtered off; ``leaves: true``), so
        it is not carried into the next step: it is the step's waste.
    """

    order: int
    material: str
    name: str
    role: str
    basis: str
    basis_value: float
    equiv: float | None
    n_mol: float | None
    m_kg: float
    V_L: float | None
    intermediate: bool = False
    implicit: bool = False
    carried_from: str | None = None
    batches: int = 1
    leaves: bool = False

    mol = _Quantity("n_mol", "mol", "Moles of the named compound [mol]; None without a molar mass.")
    mass = _Quantity("m_kg", "kg", "Mass as charged [kg].")
    volume = _Quantity("V_L", "L", "Volume as charged [L]; None without a density.")

    def _per(self, value: float | None) -> float | None:
        return None if value is None or self.batches == 0 else value / self.batches

    @property
    def n_mol_batch(self) -> float | None:
        """Moles per batch [mol]; None without a molar mass or without batches."""
        return self._per(self.n_mol)

    @property
    def m_kg_batch(self) -> float | None:
        """Mass per batch [kg]; None without batches."""
        return self._per(self.m_kg)

    @property
    def V_L_batch(self) -> float | None:
        """Volume per batch [L]; None without a density or without batches."""
        return self._per(self.V_L)

    mol_per_batch = _Quantity("n_mol_batch", "mol", "``n_mol_batch`` as a Quantity [mol].")
    mass_per_batch = _Quantity("m_kg_batch", "kg", "``m_kg_batch`` as a Quantity [kg].")
    volume_per_batch = _Quantity("V_L_batch", "L", "``V_L_batch`` as a Quantity [L].")


@frozen
class BatchPlan:
    """How a step is split into batches in its vessel, and what one batch holds.

    Attributes
    ----------
    batches : int
        Number of batches [-] (0 for a step that does not run).
    step_V_L : float
        Largest volume in the vessel over the whole campaign [L]: the charges in order
        of addition, a charge that leaves taken out right after it is charged.
    fill_fraction : float or None
        Volume per batch over the vessel's nominal volume [-]; None without a vessel.
    vessel : str or None
        Vessel key.
    limiting_n_mol, limiting_m_kg : float
        Limiting reagent over the campaign [mol], as charged [kg].
    product_n_mol, product_m_kg : float
        Product over the campaign [mol], as isolated [kg].
    reaction_m_kg : float
        Mass that takes part in the reaction over the campaign [kg]: every charge
        except ``role: workup``, a telescoped mixture at the mass carried in
        (:func:`routeplan.plan.core.contents`).
    transfer_V_L, transfer_m_kg : float or None
        For a telescoped step, the mixture that goes on to the next step over the
        campaign: its volume [L] (None where no charge has one) and mass [kg], the
        charges that stay less the gas evolved; None for an isolated step.

    The per-batch attributes (``batch_volume``, ``limiting_mol``, ``limiting_mass``,
    ``product_mol``, ``product_mass``, ``reaction_mass``) are those totals divided by
    ``batches``, as pint Quantities; None for a step without batches (``batch_volume``
    is 0 L then).
    """

    batches: int
    step_V_L: float
    fill_fraction: float | None = None
    vessel: str | None = None
    limiting_n_mol: float = 0.0
    limiting_m_kg: float = 0.0
    product_n_mol: float = 0.0
    product_m_kg: float = 0.0
    reaction_m_kg: float = 0.0
    transfer_V_L: float | None = None
    transfer_m_kg: float | None = None

    def per_batch(self, total: float | None) -> float | None:
        """``total`` divided by the batches, or None for a step without batches (or for None)."""
        return None if total is None or self.batches == 0 else total / self.batches

    @property
    def batch_V_L(self) -> float:
        """Volume per batch [L] (0 without batches)."""
        return 0.0 if self.batches == 0 else self.step_V_L / self.batches

    step_volume = _Quantity("step_V_L", "L", "Largest volume in the vessel over the campaign [L].")
    batch_volume = _Quantity("batch_V_L", "L", "Volume per batch [L].")
    limiting_mol = _Quantity("limiting_n_mol", "mol", "Limiting reagent per batch [mol].", per_batch=True)
    limiting_mass = _Quantity("limiting_m_kg", "kg", "Limiting reagent per batch, as charged [kg].", per_batch=True)
    product_mol = _Quantity("product_n_mol", "mol", "Product per batch [mol].", per_batch=True)
    product_mass = _Quantity("product_m_kg", "kg", "Product per batch, as isolated [kg].", per_batch=True)
    reaction_mass = _Quantity("reaction_m_kg", "kg", "Reaction mass per batch [kg].", per_batch=True)
    transfer_volume = _Quantity("transfer_V_L", "L", "Mixture that goes on, per batch [L].", per_batch=True)
    transfer_mass = _Quantity("transfer_m_kg", "kg", "Mixture that goes on, per batch [kg].", per_batch=True)


@frozen
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
    limiting_n_mol : float
        Moles of limiting reagent [mol] (``limiting_mol`` as a Quantity).
    limiting_m_kg : float
        Mass of limiting reagent as charged [kg] (``limiting_mass``).
    product : str
        Key of the main product.
    product_n_mol : float
        Moles of product made [mol] (``product_mol``).
    product_m_kg : float
        Mass of product as isolated, at the product's assay [kg] (``product_mass``).
    yield_ : float
        Molar yield the walk used [-] (the expected one unless planned at low or high).
    isolated : bool
        False for a telescoped step.
    charges : tuple of ChargePlan
        In order of addition.
    batch : BatchPlan
        Batch sizing.
    vessel : str or None
        Vessel key.
    notes : str or None
        Free text from the route file.
    stock_n_mol, stock_m_kg : float or None
        Product taken from the stock on hand [mol], as isolated [kg], before the step
        is planned for the rest (``from_stock_mol``, ``from_stock_mass``); None when the
        stock list does not name the product.
    not_run : str or None
        Why the step does not run in this campaign (the stock of its product covers
        the demand, or it feeds only steps that do not run); None when it runs.  A step
        that does not run has zero charges and zero batches.
    safety : StepSafety or None
        Heat and gas of one batch (:func:`routeplan.plan.safety.batch_safety`), set when
        the StepPlan is built; its ``thermal`` is None for a step that is not screened.
    """

    id: str
    name: str
    equation: str
    limiting: str
    limiting_n_mol: float
    limiting_m_kg: float
    product: str
    product_n_mol: float
    product_m_kg: float
    yield_: float
    isolated: bool
    charges: tuple[ChargePlan, ...]
    batch: BatchPlan
    vessel: str | None = None
    notes: str | None = None
    stock_n_mol: float | None = None
    stock_m_kg: float | None = None
    not_run: str | None = None
    safety: Any = None

    @property
    def batches(self) -> int:
        """Number of batches [-] (0 for a step that does not run)."""
        return self.batch.batches

    limiting_mol = _Quantity("limiting_n_mol", "mol", "Moles of limiting reagent [mol].")
    limiting_mass = _Quantity("limiting_m_kg", "kg", "Mass of limiting reagent as charged [kg].")
    product_mol = _Quantity("product_n_mol", "mol", "Moles of product made [mol].")
    product_mass = _Quantity("product_m_kg", "kg", "Mass of product as isolated [kg].")
    from_stock_mol = _Quantity("stock_n_mol", "mol", "Product taken from stock [mol], or None.")
    from_stock_mass = _Quantity("stock_m_kg", "kg", "Product taken from stock as isolated [kg], or None.")

    @property
    def runs(self) -> bool:
        """False when the step does not run in this campaign (see ``not_run``)."""
        return self.not_run is None

    @property
    def covered_by_stock(self) -> bool:
        """True when the stock of the product covers the whole demand on the step."""
        return self.not_run is not None and self.stock_n_mol is not None and self.stock_n_mol > 0


@frozen
class RawMaterialTotal:
    """A bought material, totalled over the whole route.

    Attributes
    ----------
    material, name : str
        Key and display name.
    m_kg : float
        Mass as supplied [kg] (``mass`` as a Quantity).
    V_L : float or None
        Volume as supplied [L], where a density is known (``volume``).
    n_mol : float or None
        Moles of the compound [mol], where a molar mass is known (``mol``).
    cost : float or None
        ``mass * price`` in the route's currency; None without a price or currency.
    steps : tuple of str
        Ids of the steps that charge it.
    bought : bool
        False when the route marks the material as not bought (``bought: false``, e.g.
        process water): charged, but left out of the purchase list.
    pack_size : float or None
        Size of one pack as sold, in ``pack_unit`` [kg] or [L] (``pack`` as a Quantity);
        None when the route gives none.
    pack_unit : str or None
        ``"kg"`` for a pack by mass, ``"L"`` for one by volume.
    packs : int or None
        Fewest whole packs covering what is left to buy, ``buy_m_kg`` (a pack by mass)
        or ``buy_V_L`` (a pack by volume) [-]
        (:func:`routeplan.plan.purchase.packs_to_order`); None without a pack or when
        not bought.  ``ordered`` is ``packs * pack`` as a Quantity.
    stock_m_kg : float or None
        What the stock on hand gives of it, as supplied [kg]: ``min(on hand, m_kg)``;
        None without a stock list or when the list does not name it.
    """

    material: str
    name: str
    m_kg: float
    V_L: float | None
    n_mol: float | None
    cost: float | None
    steps: tuple[str, ...]
    bought: bool = True
    pack_size: float | None = None
    pack_unit: str | None = None
    packs: int | None = None
    stock_m_kg: float | None = None

    @property
    def buy_m_kg(self) -> float:
        """What is left to buy after the stock, as supplied [kg]: ``m_kg - stock_m_kg``."""
        return self.m_kg if self.stock_m_kg is None else self.m_kg - self.stock_m_kg

    @property
    def buy_V_L(self) -> float | None:
        """The same as a volume [L] (``V_L`` in proportion); None without a density."""
        if self.V_L is None or self.stock_m_kg is None:
            return self.V_L
        return self.V_L * (self.buy_m_kg / self.m_kg) if self.m_kg > 0 else 0.0

    @property
    def pack(self) -> "pint.Quantity | None":
        """Size of one pack [kg] or [L], or None."""
        return None if self.pack_size is None else _q(self.pack_size, self.pack_unit)

    @property
    def ordered(self) -> "pint.Quantity | None":
        """What the packs to order hold, ``packs * pack`` [kg] or [L], or None."""
        return None if self.packs is None else _q(self.packs * self.pack_size, self.pack_unit)

    mass = _Quantity("m_kg", "kg", "Mass as supplied [kg].")
    volume = _Quantity("V_L", "L", "Volume as supplied [L], or None.")
    mol = _Quantity("n_mol", "mol", "Moles of the compound [mol], or None.")
    buy_mass = _Quantity("buy_m_kg", "kg", "What is left to buy after the stock [kg].")
    buy_volume = _Quantity("buy_V_L", "L", "What is left to buy after the stock [L], or None.")


@frozen
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


@frozen
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


@frozen(eq=False)
class Plan:
    """The plan of a whole campaign, complete when built (:func:`routeplan.plan.planner.plan_route`).

    Equality is identity: two plans are the same plan only if they are one object.

    Attributes
    ----------
    route : Route
        The route planned.
    target_material : str
        Key of the target.
    target_kg : float
        Mass delivered, as isolated, including overage [kg] (``target_mass``).
    target_n_mol : float
        Moles of pure target [mol] (``target_mol``).
    steps : tuple of StepPlan
        In execution order.
    raw_materials : tuple of RawMaterialTotal
        Every bought material, in order of first use.
    overall_yield : OverallYield
        Overall yield.
    metrics : Metrics
        Route metrics (:mod:`routeplan.plan.metrics`).
    warnings : tuple of Problem
        The route's warnings and the planner's.
    stock : StockPlan or None
        Stock comparison, when a stock list was given.
    yield_basis : str
        Which step yields the walk used: ``"expected"``, ``"low"`` or ``"high"``.
    yields_without_range : tuple of str
        Ids of the steps without the ``low`` (or ``high``) yield asked for, planned at
        their expected yield instead; empty at the expected yields.
    schedule : Schedule or None
        Every batch on its vessel in time (:mod:`routeplan.plan.schedule`); None unless
        every step has a ``cycle_time``.
    waste : Waste or None
        By-products and waste streams (:mod:`routeplan.plan.waste`), once computed.
    cost_of_goods : CostOfGoods or None
        Raw materials, plant time and waste disposal (:mod:`routeplan.plan.cost_of_goods`),
        once computed.
    uncertainty : Uncertainty or None
        Yield draws around the plan (:mod:`routeplan.plan.uncertainty`), when a
        confidence was asked for.
    record : RecordPlan or None
        With a campaign record: lots and their actual yields, what is in hand, the
        projected target and what closes the gap (:class:`routeplan.plan.record.RecordPlan`);
        the steps are then the rest of the campaign.
    derivation : Derivation or None
        Every named amount with the chain of factors that made it
        (:mod:`routeplan.plan.derivation`), when an explanation was asked for.
    """

    route: "Route"
    target_material: str
    target_kg: float
    target_n_mol: float
    steps: tuple[StepPlan, ...]
    raw_materials: tuple[RawMaterialTotal, ...]
    overall_yield: OverallYield
    metrics: "Metrics"
    warnings: tuple[Problem, ...] = ()
    stock: StockPlan | None = None
    yield_basis: str = "expected"
    yields_without_range: tuple[str, ...] = ()
    schedule: "Schedule | None" = None
    waste: "Waste | None" = None
    cost_of_goods: "CostOfGoods | None" = None
    uncertainty: "Uncertainty | None" = None
    record: Any = None
    derivation: "Derivation | None" = None

    target_mass = _Quantity("target_kg", "kg", "Mass delivered, as isolated, including overage [kg].")
    target_mol = _Quantity("target_n_mol", "mol", "Moles of pure target [mol].")

    @property
    def asked_kg(self) -> float:
        """Mass asked for, before the overage [kg]: the number ``--target`` takes."""
        return self.target_kg / (1 + self.route.target.overage)

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
