"""By-products and waste of every step, sorted into the streams a waste contractor takes.

Definitions (ROUTE-FORMAT.md, "Time, plant and waste" and its readings)
    *Inputs of a step*: every charge of the step at its mass as charged [kg]; the
    product of a telescoped step comes in as the compound (``ChargePlan.mass``), so the
    solvents of the telescoped step are waste of that step, not of the next.
    Masses are read from the plan's float fields (``ChargePlan.m_kg``, ``m_kg_batch``).
    *Product taken on*: the step's product as isolated (``StepPlan.product_m_kg``).
    *Waste of a step* = inputs - product taken on.  A work-up charge that leaves the
    vessel before the transfer (``leaves: true``, a wash run off) is the step's waste
    like its other solvents, in its stream; ``StepWaste.separated_kg`` says how much of
    the waste left that way.
    *Streams*: charges of role ``solvent`` or ``workup``, and every charge of a material
    that names a ``stream``, go to the stream :func:`stream_of` gives; an intermediate
    charged is never in a stream (it is the compound, taken on).
    *Residue* = waste - the three streams: by-products, unreacted reagents, salts, lost
    product, and solvent or work-up charges with no stream (no formula, inorganic).
    *By-products from the equation*: for each product of the step's equation other than
    its main product, ``n = nu_bp / nu_product * n_product`` (moles formed with the
    product made) and ``m = n * M`` [kg] (the compound itself).
    *Gas to the scrubber*: the by-products whose material says ``phase: gas``
    (:func:`gas_evolved_kg`); they are part of the residue.

Mass balance
    Over the route, inputs (raw materials charged and intermediates taken from stock)
    = product (the target delivered, with overage) + waste (streams + residue): every
    intermediate made is charged again by the steps that take it, at the same mass.
    By-products from the equation cannot exceed a step's waste; where they do, the
    equation or the yield is likely wrong, and the step gets a warning.

Plain floats in fixed units: masses [kg], amounts [mol].
"""

from __future__ import annotations

import functools
from dataclasses import field
from typing import TYPE_CHECKING, Mapping

from routeplan.chemistry.formula import CACHE_SIZE
from routeplan.errors import Problem
from routeplan.frozen import frozen
from routeplan.plan.core import gas_keys
from routeplan.route.model import STREAMS
from routeplan.units import magnitude

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan
    from routeplan.route.model import Material, Route

__all__ = [
    "STREAMS",
    "HALOGENS",
    "STREAM_ROLES",
    "ByProduct",
    "StreamMasses",
    "StepWaste",
    "Waste",
    "stream_of",
    "by_products",
    "gas_evolved_kg",
    "step_waste",
    "route_waste",
]

#: Elements that make a material halogenated waste (group 17 of the periodic table, less
#: astatine and tennessine, which no process charges).
HALOGENS = ("F", "Cl", "Br", "I")

#: Charge roles that go to a waste stream by their material (ROUTE-FORMAT.md readings).
STREAM_ROLES = ("solvent", "workup")

#: Relative slack before by-products count as exceeding the waste [-] (round-off only).
_SLACK = 1e-9


def stream_of(material: "Material") -> str | None:
    """The waste stream of ``material``, or None for the reaction residue.

    In this order: the material's ``stream`` key; water (formula H2O) or any solution:
    ``"aqueous"``; a formula holding F, Cl, Br or I: ``"halogenated"``; another formula
    holding carbon: ``"organic"``; anything else (no formula, an inorganic solid): None.

    Examples
    --------
    >>> from routeplan.route.model import Material
    >>> stream_of(Material(key="DCM", name="dichloromethane", formula="CH2Cl2"))
    'halogenated'
    >>> stream_of(Material(key="celite", name="filter aid")) is None
    True
    """
    from routeplan.plan.metrics import is_water

    if material.stream is not None:
        return material.stream
    if material.solution is not None or is_water(material):
        return "aqueous"
    if not material.formula:
        return None
    return _formula_stream(material.formula)


@functools.lru_cache(maxsize=CACHE_SIZE)
def _formula_stream(formula: str) -> str | None:
    """``"halogenated"``, ``"organic"`` or None by the elements of ``formula`` (worked out once per formula)."""
    from routeplan.chemistry.formula import element_counts

    try:
        counts = element_counts(formula)
    except Exception:  # noqa: BLE001 - an unreadable formula was refused at load; be safe
        return None
    if any(counts.get(x) for x in HALOGENS):
        return "halogenated"
    if counts.get("C"):
        return "organic"
    return None


@frozen
class ByProduct:
    """A by-product of a step from its equation.

    Attributes
    ----------
    material : str
        Material key.
    mol : float
        Moles formed with the product made [mol].
    mass_kg : float or None
        ``mol * M`` [kg]; None without a molar mass.
    gas : bool
        True when the material says ``phase: gas``.
    """

    material: str
    mol: float
    mass_kg: float | None
    gas: bool = False


@frozen
class StreamMasses:
    """Masses of waste by stream [kg].

    Attributes
    ----------
    aqueous_kg, organic_kg, halogenated_kg : float
        The three streams [kg].
    residue_kg : float
        The rest of the waste [kg].
    """

    aqueous_kg: float = 0.0
    organic_kg: float = 0.0
    halogenated_kg: float = 0.0
    residue_kg: float = 0.0

    def stream(self, name: str) -> float:
        """The mass of stream ``name`` (one of :data:`STREAMS`) [kg]."""
        return getattr(self, f"{name}_kg")

    @property
    def total_kg(self) -> float:
        """All of it: the three streams and the residue [kg]."""
        return self.aqueous_kg + self.organic_kg + self.halogenated_kg + self.residue_kg


@frozen
class StepWaste:
    """What leaves one step besides its product.

    Attributes
    ----------
    step : str
        Step id.
    batches : int
        Batches of the step [-] (0 when it does not run).
    inputs_kg : float
        Every charge at its mass as charged [kg].
    product_kg : float
        Product taken on, as isolated [kg].
    campaign : StreamMasses
        Waste of the step over the campaign, by stream [kg].
    per_batch : StreamMasses or None
        The same for one batch [kg]; None for a step that does not run.
    by_products : tuple of ByProduct
        From the equation, in its order.
    stream_materials : Mapping[str, tuple of str]
        Stream -> keys of the materials sent to it, in order of addition.
    gas_kg : float
        By-products that leave as gas to the scrubber [kg] (part of the residue).
    raw_kg : float
        The raw materials among the inputs (every charge but an intermediate) [kg].
    separated_kg : float
        The charges that leave the vessel right after they are charged
        (``ChargePlan.leaves``: washes run off, filter aids filtered off), part of the
        streams or the residue [kg].
    separated_materials : tuple of str
        Their keys, in order of addition.
    """

    step: str
    batches: int
    inputs_kg: float
    product_kg: float
    campaign: StreamMasses
    per_batch: StreamMasses | None
    by_products: tuple[ByProduct, ...] = ()
    stream_materials: Mapping[str, tuple[str, ...]] = field(default_factory=dict)
    gas_kg: float = 0.0
    raw_kg: float = 0.0
    separated_kg: float = 0.0
    separated_materials: tuple[str, ...] = ()

    @property
    def waste_kg(self) -> float:
        """Inputs - product taken on [kg]."""
        return self.inputs_kg - self.product_kg

    @property
    def by_products_kg(self) -> float:
        """By-products from the equation with a molar mass [kg]."""
        return sum(b.mass_kg for b in self.by_products if b.mass_kg is not None)


@frozen
class Waste:
    """Waste of the whole campaign.

    Attributes
    ----------
    steps : tuple of StepWaste
        In execution order.
    total : StreamMasses
        Over every step [kg].
    inputs_kg : float
        Raw materials charged plus intermediates taken from stock [kg].
    product_kg : float
        Target delivered, as isolated with overage [kg].
    gas_kg : float
        By-products that leave as gas to the scrubber, all steps [kg].
    warnings : tuple of Problem
        Steps whose by-products from the equation exceed their waste; residues below 0.
    """

    steps: tuple[StepWaste, ...]
    total: StreamMasses
    inputs_kg: float
    product_kg: float
    gas_kg: float = 0.0
    warnings: tuple[Problem, ...] = ()

    @property
    def waste_kg(self) -> float:
        """All waste: streams and residue [kg]."""
        return self.total.total_kg

    @property
    def balance_error(self) -> float:
        """``(inputs - product - waste) / inputs`` [-]; 0 when the balance holds."""
        return (self.inputs_kg - self.product_kg - self.waste_kg) / self.inputs_kg if self.inputs_kg else 0.0

    def step(self, step_id: str) -> StepWaste:
        """The waste of step ``step_id``."""
        return next(s for s in self.steps if s.step == step_id)


def by_products(route: "Route", step_id: str, product_mol: float) -> tuple[ByProduct, ...]:
    """By-products of a step formed with ``product_mol`` of its main product.

    ``n_bp = nu_bp / nu_product * product_mol`` [mol], ``m = n_bp * M`` [kg].

    Parameters
    ----------
    route : Route
    step_id : str
    product_mol : float
        Moles of main product made [mol].

    Returns
    -------
    tuple of ByProduct
        In the order of the equation.
    """
    return _by_products(route, route.step(step_id), product_mol, {})


def _by_products(route: "Route", step, product_mol: float, memo: dict) -> tuple[ByProduct, ...]:
    """:func:`by_products` of route step ``step``; ``memo`` keeps, per material key, its
    molar mass [g/mol] (None without one), read once per plan."""
    eq = step.equation
    main = step.product
    nu_p = eq.coefficient(main)
    gas = gas_keys(route)
    out = []
    for t in eq.products:
        key = t.key
        if key == main:
            continue
        if key in memo:
            M_g = memo[key]
        else:
            M_g = memo[key] = magnitude(route.materials[key].molar_mass, "g/mol")
        n = t.coefficient / nu_p * product_mol
        mass = None if M_g is None else n * M_g / 1000.0  # g -> kg
        out.append(ByProduct(key, n, mass, key in gas))
    return tuple(out)


def gas_evolved_kg(items: tuple[ByProduct, ...]) -> float:
    """Mass of the by-products that leave as gas to the scrubber [kg]."""
    return sum((b.mass_kg for b in items if b.gas and b.mass_kg is not None), 0.0)


def step_waste(route: "Route", sp: "StepPlan", memo: dict | None = None) -> StepWaste:
    """The waste of one planned step (see the module text).

    Parameters
    ----------
    route : Route
    sp : StepPlan
        The planned step, with its batches sized.
    memo : dict, optional
        What is read of each material once per plan, shared by its steps
        (:func:`route_waste`): under ``"streams"``, key -> (stream, names a stream);
        under ``"by_products"``, key -> molar mass [g/mol] (None without one).

    Returns
    -------
    StepWaste
    """
    if memo is None:
        memo = {}
    streams, by_memo = memo.setdefault("streams", {}), memo.setdefault("by_products", {})
    mats = route.materials
    product = sp.product_m_kg
    batch = sp.batch
    runs = sp.not_run is None  # StepPlan.runs
    by_batch = runs and batch is not None and batch.batches > 0
    kg = dict.fromkeys(STREAMS, 0.0)  # campaign [kg], each added in order of addition
    b_kg = dict.fromkeys(STREAMS, 0.0)  # one batch [kg]
    names: dict[str, dict[str, None]] = {}  # stream -> its materials, in order of addition
    masses, b_masses, raw, left = [], [], [], []
    for c in sp.charges:
        m = c.m_kg
        masses.append(m)
        if by_batch:
            n = c.batches
            mb = None if n == 0 else m / n  # ChargePlan.m_kg_batch
            b_masses.append(mb)
        if c.leaves:
            left.append(c)
        if c.intermediate:
            continue  # the compound, taken on: in no stream
        raw.append(m)
        key = c.material
        known = streams.get(key)
        if known is None:
            mat = mats[key]
            known = streams[key] = (stream_of(mat), mat.stream is not None)
        s = known[0] if known[1] or c.role in STREAM_ROLES else None
        if s is None:
            continue
        kg[s] += m
        if by_batch:
            b_kg[s] += mb
        seen = names.get(s)
        if seen is None:
            names[s] = {key: None}
        else:
            seen[key] = None  # a key seen before keeps its place
    inputs = sum(masses)
    per_batch = None
    if by_batch:
        per_batch = _with_residue(b_kg, sum(b_masses) - batch.per_batch(batch.product_m_kg))
    items = _by_products(route, route.step(sp.id), sp.product_n_mol, by_memo)
    separated_kg, separated = 0.0, ()
    if left:
        separated_kg = sum((c.m_kg for c in left), 0.0)
        separated = tuple(dict.fromkeys(c.material for c in left))
    return StepWaste(step=sp.id, batches=batch.batches if runs else 0, inputs_kg=inputs, product_kg=product,
                     raw_kg=sum(raw), separated_kg=separated_kg, separated_materials=separated,
                     campaign=_with_residue(kg, inputs - product), per_batch=per_batch, by_products=items,
                     stream_materials={k: tuple(names[k]) for k in STREAMS if k in names},
                     gas_kg=gas_evolved_kg(items))


def _with_residue(kg: dict[str, float], waste: float) -> StreamMasses:
    """The stream masses ``kg`` [kg] (stream -> mass) with the rest of ``waste`` [kg] as residue."""
    aq, org, hal = kg["aqueous"], kg["organic"], kg["halogenated"]
    return StreamMasses(aq, org, hal, waste - (aq + org + hal))


def _warnings(route: "Route", sw: StepWaste) -> list[Problem]:
    out = []
    if sw.by_products_kg > sw.waste_kg * (1 + _SLACK) + 1e-12:
        step = route.step(sw.step)
        out.append(Problem.with_amounts(
            "warning",
            (f"step {sw.step}: the by-products from its equation (", (sw.by_products_kg, "mass"),
             ") exceed its waste (", (sw.waste_kg, "mass"), ", everything charged less the product taken on)"),
            location=step.location, step=sw.step,
            hint="check the equation's coefficients and the step's yield"))
    if sw.campaign.residue_kg < -_SLACK * max(sw.inputs_kg, 1e-12):
        step = route.step(sw.step)
        out.append(Problem.with_amounts(
            "warning",
            (f"step {sw.step}: its solvent and work-up charges (", (sw.waste_kg - sw.campaign.residue_kg, "mass"),
             ") exceed its waste (", (sw.waste_kg, "mass"), "), so the residue is negative"),
            location=step.location, step=sw.step,
            hint="a material charged as solvent or work-up is also taken up in the product; check its role"))
    return out


def route_waste(plan: "Plan") -> Waste:
    """The waste of every step of a plan and of the campaign.

    Parameters
    ----------
    plan : Plan
        A plan with its batches sized.

    Returns
    -------
    Waste
        Per step and in total; ``inputs_kg`` counts raw materials and intermediates taken
        from stock, ``product_kg`` the target delivered.
    """
    route = plan.route
    memo: dict = {}
    steps = tuple(step_waste(route, sp, memo) for sp in plan.steps)
    aq = org = hal = res = 0.0  # the campaign's streams [kg], summed step by step
    warnings: list[Problem] = []
    for sw in steps:
        w = sw.campaign
        aq += w.aqueous_kg
        org += w.organic_kg
        hal += w.halogenated_kg
        res += w.residue_kg
        if sw.batches:
            warnings += _warnings(route, sw)
    inputs = sum(sw.raw_kg for sw in steps)
    inputs += sum(sp.stock_m_kg for sp in plan.steps if sp.stock_m_kg is not None)
    return Waste(steps=steps, total=StreamMasses(aq, org, hal, res), inputs_kg=inputs, product_kg=plan.target_kg,
                 gas_kg=sum((sw.gas_kg for sw in steps), 0.0), warnings=tuple(warnings))
