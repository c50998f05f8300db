"""Frozen domain objects of a route: what the planner works on.

They are built from the parsed route file by :mod:`routeplan.route.load` after every
check has passed, so the planner can trust them: every key referenced exists, every
charge line is complete (the limiting reagent and any reactant without a line have
been given their stoichiometric line), and quantities carry pint units.
"""

from __future__ import annotations

import functools
from dataclasses import field
from types import MappingProxyType
from typing import TYPE_CHECKING, Mapping

from routeplan.errors import Location, Problem
from routeplan.frozen import frozen
from routeplan.vocab import Basis, Role

if TYPE_CHECKING:  # pragma: no cover
    import networkx as nx
    import pint

    from routeplan.chemistry.equation import Equation

__all__ = [
    "BASES",
    "ROLES",
    "STREAMS",
    "Solution",
    "Material",
    "Vessel",
    "Charge",
    "Control",
    "DEFAULT_CHARGE_TOLERANCE",
    "Yield",
    "Conditions",
    "Dosing",
    "Thermal",
    "Step",
    "Target",
    "Source",
    "WastePrices",
    "Route",
]

#: Charge bases of the route format, plus the one the loader fills in itself:
#: ``"stoichiometric"`` (a reactant with no basis: its coefficient ratio).  The members of
#: :class:`routeplan.vocab.Basis`, which compare equal to these words.
BASES: tuple[Basis, ...] = tuple(Basis)

#: How far a weighed charge may be from its mass to charge, either way, when the route
#: gives no ``charge_tolerance`` [-] (common practice, no source).
DEFAULT_CHARGE_TOLERANCE = 0.01

# the molar bases as module names: reading a member off its class (Basis.EQUIV) costs an
# enum lookup each time, and Charge.equiv is read for every charge of every plan
_EQUIV, _STOICHIOMETRIC, _MOL_PERCENT = Basis.EQUIV, Basis.STOICHIOMETRIC, Basis.MOL_PERCENT

#: Roles a charge line may have: the members of :class:`routeplan.vocab.Role`.
ROLES: tuple[Role, ...] = tuple(Role)

#: Waste streams a material may be sent to (``materials.<key>.stream``, ``waste_prices``).
STREAMS = ("aqueous", "organic", "halogenated")


@frozen
class Solution:
    """A reagent supplied as a solution of the material's compound.

    Exactly one of ``molarity`` and ``mass_fraction`` is set.

    Attributes
    ----------
    molarity : pint.Quantity or None
        Concentration of the compound [mol/L].
    mass_fraction : float or None
        Mass fraction of the compound in the solution [-].
    density : pint.Quantity
        Density of the whole solution [g/mL].
    """

    density: "pint.Quantity"
    molarity: "pint.Quantity | None" = None
    mass_fraction: float | None = None


@frozen
class Material:
    """A substance the route touches.

    Attributes
    ----------
    key : str
        Identifier used in equations and charges.
    name : str
        Display name.
    formula : str or None
        Molecular formula (of the solute, for a solution).
    smiles : str or None
        SMILES, an alternative to ``formula``.
    molar_mass : pint.Quantity or None
        Molar mass [g/mol]; from the formula, the SMILES or given explicitly.
    assay : float
        Mass fraction of the named compound as supplied [-]; 1.0 for a solution.
    density : pint.Quantity or None
        Density as supplied [g/mL].
    solution : Solution or None
        Set when supplied as a solution.
    price : float or None
        Price per kg as supplied, in the route's currency [currency/kg].
    hazards : tuple of str
        Free-text hazard notes, carried onto charge sheets.
    notes : str or None
        Free text.
    location : Location or None
        Where the material is defined in the route file.
    phase : str or None
        ``"solid"``, ``"liquid"`` or ``"gas"`` where the file says; a material is a gas
        only when it says ``phase: gas``.
    pack : pint.Quantity or None
        Size of one pack as sold: a mass [kg] or a volume [L]; None when not given.
    bought : bool
        False for a raw material the route marks as not bought (process water): it is
        charged, but left out of the purchase list.
    starting_material : bool
        Marked by the route as a starting material (its atoms end up in the target),
        besides the bought limiting reagents, which are starting materials anyway.
    stream : str or None
        Waste stream named in the route file (one of :data:`STREAMS`); None lets its
        formula decide (:mod:`routeplan.plan.waste`).
    """

    key: str
    name: str
    formula: str | None = None
    smiles: str | None = None
    molar_mass: "pint.Quantity | None" = None
    assay: float = 1.0
    density: "pint.Quantity | None" = None
    solution: Solution | None = None
    price: float | None = None
    hazards: tuple[str, ...] = ()
    notes: str | None = None
    location: Location | None = None
    phase: str | None = None
    pack: "pint.Quantity | None" = None
    bought: bool = True
    starting_material: bool = False
    stream: str | None = None


@frozen
class Vessel:
    """A vessel the route may use.

    Attributes
    ----------
    key : str
        Identifier.
    volume : pint.Quantity
        Nominal volume [L].
    max_fill : float
        Largest working fraction of ``volume`` [-], default 0.8.
    rate : float or None
        Cost of the vessel's time per hour, in the route's currency [currency/h].
    """

    key: str
    volume: "pint.Quantity"
    max_fill: float = 0.8
    location: Location | None = None
    rate: float | None = None


@frozen
class Charge:
    """One line of a step's charges, in order of addition.

    Attributes
    ----------
    material : str
        Key of the material charged.
    basis : Basis
        One of :data:`BASES` (a plain word is turned into its member).
    value : float
        The number for the basis: equiv [-], mol % [-], volumes [L/kg] or mass ratio
        [kg/kg]; for ``"stoichiometric"`` the coefficient ratio nu_i / nu_limiting [-].
    role : Role
        One of :data:`ROLES` (a plain word is turned into its member).
    implicit : bool
        True when the loader added the line (a reactant of the equation with no line).
    location : Location or None
        Where the line is in the route file.
    tolerance : float or None
        How far the mass weighed in may be from the mass to charge, either way [-];
        None: the route's ``charge_tolerance``.
    leaves : bool
        True for a work-up charge that leaves the vessel right after it is charged and
        worked (a wash layer separated and discarded, a filter aid filtered off), before
        the next line: it is not carried into the next step (``leaves: true``).
    """

    material: str
    basis: Basis
    value: float
    role: Role
    implicit: bool = False
    location: Location | None = None
    tolerance: float | None = None
    leaves: bool = False

    def __post_init__(self) -> None:
        if not isinstance(self.basis, Basis):
            object.__setattr__(self, "basis", Basis(self.basis))
        if not isinstance(self.role, Role):
            object.__setattr__(self, "role", Role(self.role))

    @property
    def equiv(self) -> float | None:
        """Moles per mole of limiting reagent [-], for the molar bases; else None."""
        basis = self.basis  # always a member (__post_init__): compared by identity, to the module's names
        if basis is _EQUIV or basis is _STOICHIOMETRIC:
            return self.value
        if basis is _MOL_PERCENT:
            return self.value / 100.0
        return None


@frozen
class Control:
    """A point of a step where the operator records temperature and time.

    Attributes
    ----------
    point : str
        Where in the step (``after dosing``).
    check : str or None
        The in-process check taken there (``HPLC conversion``).
    limit : str or None
        The result it must reach (``>= 98 %``), as written.
    """

    point: str
    check: str | None = None
    limit: str | None = None


@frozen
class Yield:
    """Molar yield of a step's product from its limiting reagent [-]."""

    expected: float
    low: float | None = None
    high: float | None = None


@frozen
class Conditions:
    """A step's reaction conditions, as written (``steps[].conditions``).

    Attributes
    ----------
    temperature : pint.Quantity or None
        Reaction temperature [K]; None when not given (the planner's default is 20 degC).
    pressure : pint.Quantity or None
        Absolute pressure [bar]; None when not given (default 1.01325 bar).
    """

    temperature: "pint.Quantity | None" = None
    pressure: "pint.Quantity | None" = None
    location: Location | None = None


@frozen
class Dosing:
    """The charge of a step that is dosed over a time (semi-batch).

    Attributes
    ----------
    material : str
        Key of the dosed charge (a charge of the step).
    time : pint.Quantity
        Dosing time [h].
    """

    material: str
    time: "pint.Quantity"
    location: Location | None = None


@frozen
class Thermal:
    """A step's thermal data (``steps[].thermal``), for a screening estimate.

    Attributes
    ----------
    reaction_enthalpy : pint.Quantity
        Heat of reaction per mole of limiting reagent converted [kJ/mol]; negative
        when exothermic.
    heat_capacity : pint.Quantity
        Specific heat capacity of the reaction mass [kJ/(kg*K)].
    process_temperature : pint.Quantity or None
        Tp [K]; None: the step's conditions.temperature.
    max_technical_temperature : pint.Quantity or None
        MTT [K].
    decomposition_temperature_24h : pint.Quantity or None
        TD24 [K].
    accumulation : float or None
        Largest fraction of the dosed reagent present unreacted [-]; None: 1.0.
    """

    reaction_enthalpy: "pint.Quantity"
    heat_capacity: "pint.Quantity"
    process_temperature: "pint.Quantity | None" = None
    max_technical_temperature: "pint.Quantity | None" = None
    decomposition_temperature_24h: "pint.Quantity | None" = None
    accumulation: float | None = None
    location: Location | None = None


@frozen
class Step:
    """One reaction of the route.

    Attributes
    ----------
    id : str
        Unique step identifier.
    name : str
        Display name (defaults to the id).
    equation : Equation
        Parsed equation over material keys.
    equation_text : str
        The equation as written.
    limiting : str
        Key of the limiting reagent.
    product : str
        Key of the main product.
    yield_ : Yield
        Molar yield of ``product`` from ``limiting`` [-].
    charges : tuple of Charge
        Complete charge lines in order of addition.
    isolated : bool
        False for a telescoped step whose product goes on in solution.
    vessel : str or None
        Key of the vessel used.
    demonstrated_batch : pint.Quantity or None
        Largest batch run so far, as mass of limiting reagent [kg].
    notes : str or None
        Free text.
    location : Location or None
        Where the step is defined.
    conditions : Conditions or None
        Temperature and pressure as written; None when the file gives none.
    dosing : Dosing or None
        The dosed charge (semi-batch); None for a batch step.
    thermal : Thermal or None
        Thermal data; None: the step is not screened.
    controls : tuple of Control
        Points where the operator records temperature and time, in order.
    cycle_time : pint.Quantity or None
        Vessel time for one batch, cleaning included [h].
    """

    id: str
    name: str
    equation: "Equation"
    equation_text: str
    limiting: str
    product: str
    yield_: Yield
    charges: tuple[Charge, ...]
    isolated: bool = True
    vessel: str | None = None
    demonstrated_batch: "pint.Quantity | None" = None
    notes: str | None = None
    location: Location | None = None
    conditions: Conditions | None = None
    dosing: Dosing | None = None
    thermal: Thermal | None = None
    controls: tuple[Control, ...] = ()

    def charge_tolerance(self, charge: Charge, route: "Route") -> float:
        """The tolerance of ``charge`` [-]: its own, else the route's."""
        return charge.tolerance if charge.tolerance is not None else route.charge_tolerance
    cycle_time: "pint.Quantity | None" = None

    def charge_of(self, material: str) -> Charge | None:
        """The charge line of ``material`` in this step, or None."""
        for c in self.charges:
            if c.material == material:
                return c
        return None


@frozen
class Target:
    """What the campaign must deliver.

    Attributes
    ----------
    material : str
        Key of the material to deliver.
    amount : pint.Quantity
        Mass to deliver as isolated (at the material's assay) [kg].
    overage : float
        Planning margin on top of ``amount`` [-].
    """

    material: str
    amount: "pint.Quantity"
    overage: float = 0.0
    location: Location | None = None


@frozen
class Source:
    """The file a route was read from: name and SHA-256 of its bytes."""

    path: str
    sha256: str


@frozen
class WastePrices:
    """Disposal cost per kg of each waste stream, in the route's currency [currency/kg].

    None for a stream the route file gives no price.
    """

    aqueous: float | None = None
    organic: float | None = None
    halogenated: float | None = None

    def price(self, stream: str) -> float | None:
        """The price of ``stream`` (one of :data:`STREAMS`) [currency/kg], or None."""
        return getattr(self, stream)


@frozen(eq=False)
class Route:
    """A whole, checked route.

    Two routes are equal only when they are the same object (identity equality and
    hash): a route holds mappings and cached derived data, and two loads of one file are
    two routes.

    Attributes
    ----------
    name : str
        Display name.
    target : Target
        What to deliver.
    materials : Mapping[str, Material]
        Every material by key (read-only mapping, in file order).
    steps : tuple of Step
        Steps in file order (the planner orders them).
    equipment : Mapping[str, Vessel]
        Vessels by key.
    currency : str or None
        ISO 4217 code of every price.
    format : int
        Route format version.
    source : Source or None
        The file the route came from.
    warnings : tuple of Problem
        Warnings found while loading.
    charge_tolerance : float
        How far a weighed charge may be from its mass to charge, either way, unless its
        line says otherwise [-]; default :data:`DEFAULT_CHARGE_TOLERANCE`.
    waste_prices : WastePrices or None
        Disposal prices of the waste streams; None when the route file gives none.
    """

    name: str
    target: Target
    materials: Mapping[str, Material]
    steps: tuple[Step, ...]
    equipment: Mapping[str, Vessel] = field(default_factory=lambda: MappingProxyType({}))
    currency: str | None = None
    format: int = 1
    source: Source | None = None
    warnings: tuple[Problem, ...] = ()
    charge_tolerance: float = DEFAULT_CHARGE_TOLERANCE
    waste_prices: WastePrices | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.materials, MappingProxyType):
            object.__setattr__(self, "materials", MappingProxyType(dict(self.materials)))
        if not isinstance(self.equipment, MappingProxyType):
            object.__setattr__(self, "equipment", MappingProxyType(dict(self.equipment)))

    @functools.cached_property
    def _steps_by_id(self) -> Mapping[str, Step]:
        return MappingProxyType({s.id: s for s in self.steps})

    def step(self, step_id: str) -> Step:
        """The step with id ``step_id``."""
        return self._steps_by_id[step_id]

    @functools.cached_property
    def consumers(self) -> Mapping[str, tuple[str, ...]]:
        """Material key -> ids of the steps that have it as a reactant of their equation."""
        out: dict[str, list[str]] = {}
        for s in self.steps:
            for t in s.equation.reactants:
                out.setdefault(t.key, []).append(s.id)
        return MappingProxyType({k: tuple(v) for k, v in out.items()})

    @functools.cached_property
    def producer(self) -> Mapping[str, str]:
        """Material key -> id of the step that produces it as its main product or by-product."""
        out: dict[str, str] = {}
        for s in self.steps:
            for t in s.equation.products:
                out.setdefault(t.key, s.id)
        return MappingProxyType(out)

    @functools.cached_property
    def maker(self) -> Mapping[str, str]:
        """Intermediate key -> id of the step that makes it as its main product."""
        return MappingProxyType({s.product: s.id for s in self.steps})

    @functools.cached_property
    def intermediates(self) -> frozenset[str]:
        """Keys of materials that are the main product of some step."""
        return frozenset(self.maker)

    def is_intermediate(self, key: str) -> bool:
        """True when some step makes ``key`` as its main product."""
        return key in self.intermediates

    @functools.cached_property
    def graph(self) -> "nx.DiGraph":
        """The route graph (see :mod:`routeplan.route.graph`)."""
        from routeplan.route.graph import build_graph

        return build_graph(self)
