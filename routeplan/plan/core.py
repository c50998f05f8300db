"""The arithmetic core of the plan: the route compiled to numbers, and the backward walk.

Every expression of the route format's "How the plan is computed" is written here once,
with plain arithmetic only, so that the same code runs on

* floats in fixed units (the plan: ``n_mol`` [mol], ``m_kg`` [kg], ``V_L`` [L],
  ``kg_per_mol`` [kg/mol], ``L_per_kg`` [L/kg]);
* numpy arrays of such floats (many yields or targets at once);
* pint Quantities, in a test: the route is compiled with every constant carrying its
  unit (:func:`compile_route` with ``quantity=Q``) and the same walk runs on them, which
  proves every expression dimensionally consistent.

The compiled route is cached on the Route (it is frozen), one per yield case, so a
second plan of the same route starts from numbers.
"""

from __future__ import annotations

import functools
from typing import TYPE_CHECKING, Any, Callable, Mapping

from routeplan.errors import PlanError
from routeplan.frozen import frozen, kept

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.route.model import Material, Route

__all__ = [
    "Form",
    "CoreCharge",
    "CoreStep",
    "CoreRoute",
    "compile_route",
    "with_yields",
    "molar_masses",
    "gas_keys",
    "material_form",
    "target_amount",
    "limiting_amount",
    "charge_amounts",
    "WalkStep",
    "walk",
    "Contents",
    "contents",
]

Number = Any  # float, numpy array or pint Quantity


def _plain(value: float, unit_name: str, what: Any = None) -> float:
    """The number factory of the plan: the magnitude alone, in the unit named beside it.

    ``what`` says which constant it is, ``(kind, route object, ...)``, for a factory that
    records it (:mod:`routeplan.plan.derivation`); the plan ignores it.
    """
    return value


@frozen
class Form:
    """Conversion factors of a material as supplied.

    Attributes
    ----------
    kg_per_mol : Number or None
        Mass as supplied per mole of the compound [kg/mol]: ``M / assay``, ``M / w``
        for a solution by mass fraction, ``rho / c`` for a solution by molarity; None
        without a molar mass.
    L_per_kg : Number or None
        Volume per mass as supplied [L/kg], ``1 / rho``; None without a density.
    """

    kg_per_mol: Number | None
    L_per_kg: Number | None


def _molar_mass(mat: "Material", quantity: Callable) -> Number:
    """The molar mass of ``mat`` [kg/mol] as ``quantity`` builds it (named ``molar_mass``)."""
    from routeplan.units import magnitude

    return quantity(magnitude(mat.molar_mass, "kg/mol"), "kg/mol", ("molar_mass", mat))


def material_form(mat: "Material", quantity: Callable = _plain, molar_mass_kg: float | None = None) -> Form:
    """The :class:`Form` of ``mat``, its numbers built by ``quantity(value, unit, what)``.

    ``M`` [g/mol] is read in kg/mol, densities [g/mL] in kg/L, molarities in mol/L.
    ``molar_mass_kg``, the molar mass already read in kg/mol [kg/mol] (:func:`molar_masses`),
    spares reading it again for the plan's own numbers (``quantity`` the default).
    """
    from routeplan.units import magnitude

    sol = mat.solution
    density = sol.density if sol is not None else mat.density
    kg_per_mol = None
    if sol is not None and sol.molarity is not None:
        rho = quantity(magnitude(sol.density, "kg/L"), "kg/L", ("solution_density", mat))
        c = quantity(magnitude(sol.molarity, "mol/L"), "mol/L", ("molarity", mat))
        kg_per_mol = rho / c  # [kg/L] / [mol/L] = [kg/mol]
    elif mat.molar_mass is not None:
        fraction = (quantity(sol.mass_fraction, "", ("mass_fraction", mat)) if sol is not None
                    else quantity(mat.assay, "", ("assay", mat)))
        M = molar_mass_kg if molar_mass_kg is not None and quantity is _plain else _molar_mass(mat, quantity)
        kg_per_mol = M / fraction  # [kg/mol] / [-]
    L_per_kg = None
    if density is not None:
        kind = "solution_density" if sol is not None else "density"
        L_per_kg = 1 / quantity(magnitude(density, "kg/L"), "kg/L", (kind, mat))  # [L/kg]
    return Form(kg_per_mol, L_per_kg)


@frozen
class CoreCharge:
    """One charge line as numbers.

    ``factor`` is the basis as a number with its unit: equiv [-] for the molar bases,
    volumes [L/kg] (litres per kg of limiting reagent as charged), mass ratio [kg/kg].
    ``carried_from`` is the id of the telescoped step whose mixture brings this
    intermediate in solution (None otherwise); ``leaves`` marks a work-up charge that
    leaves the vessel right after it is charged (``leaves: true``); ``workup`` a line of
    ``role: workup`` (not in the reaction mass).
    """

    material: str
    basis: str
    factor: Number
    form: Form
    intermediate: bool
    carried_from: str | None = None
    leaves: bool = False
    workup: bool = False


@frozen
class CoreStep:
    """One step as numbers: ``nu_ratio = nu_product / nu_limiting`` [-], ``yield_`` [-].

    ``gases`` holds, for each product of the equation with ``phase: gas`` and a molar
    mass, ``(nu_gas / nu_limiting [-], M [kg/mol])``: the gas evolved at full conversion
    leaves the mixture (:func:`contents`).
    """

    id: str
    product: str
    limiting: str
    nu_ratio: Number
    yield_: Number
    product_form: Form
    limiting_form: Form
    charges: tuple[CoreCharge, ...]
    gases: tuple = ()


@frozen
class CoreRoute:
    """The route as numbers: steps in execution order, the target's factors."""

    steps: tuple[CoreStep, ...]
    target: str
    target_form: Form
    target_kg_per_mol_pure: Number
    overage: Number

    @functools.cached_property
    def _steps_by_id(self) -> Mapping[str, CoreStep]:
        return {s.id: s for s in self.steps}

    def step(self, step_id: str) -> CoreStep:
        """The step with id ``step_id`` (a dict built on first use: no search a call)."""
        return self._steps_by_id[step_id]


def molar_masses(route: "Route") -> Mapping[str, float | None]:
    """Molar mass of every material [kg/mol] (None without one), computed once per route."""
    from routeplan.units import magnitude

    return kept(route, "_molar_masses_kg",
                lambda: {k: magnitude(m.molar_mass, "kg/mol") for k, m in route.materials.items()})


def gas_keys(route: "Route") -> frozenset[str]:
    """Keys of the route's materials that say ``phase: gas``, found once per route."""
    return kept(route, "_gas_keys", lambda: frozenset(k for k, m in route.materials.items() if m.phase == "gas"))


def compile_route(route: "Route", yields: str = "expected", quantity: Callable = _plain) -> CoreRoute:
    """The route as numbers for :func:`walk`.

    Parameters
    ----------
    route : Route
        A checked route.
    yields : {"expected", "low", "high"}
        Which yield of each step (the expected one where a step gives no range).
    quantity : callable, optional
        ``quantity(value, unit_name, what)`` builds each constant (``what``: which one,
        ``(kind, route object, ...)``); the default keeps the magnitude (the plan),
        ``routeplan.units.Q`` gives pint Quantities (the proof), and
        :mod:`routeplan.plan.derivation` records each constant with its source.

    Returns
    -------
    CoreRoute
        Cached on the route for the default ``quantity``.
    """
    from routeplan.route.graph import execution_order

    cache = None
    if quantity is _plain:
        cache = kept(route, "_core_cache", dict)  # yield case -> CoreRoute
        if yields in cache:
            return cache[yields]
    materials = route.materials
    known_M = molar_masses(route) if quantity is _plain else {}  # [kg/mol], shared with the metrics
    forms: dict[str, Form] = {}

    def form(key: str) -> Form:
        f = forms.get(key)
        if f is None:
            f = forms[key] = material_form(materials[key], quantity, known_M.get(key))
        return f

    steps = []
    maker = route.maker  # intermediate -> the step that makes it
    carried = {s.product: s.id for s in route.steps if not s.isolated}  # telescoped product -> its step
    case = str(yields)
    gas = gas_keys(route)
    for sid in execution_order(route):
        step = route.step(sid)
        chosen = getattr(step.yield_, case)
        y = step.yield_.expected if chosen is None else chosen
        if not y > 0:
            raise PlanError(f"step {step.id} has a yield of {y:g}; it must be above 0", step=step.id)
        charges = []
        for c in step.charges:
            basis = c.basis
            if basis == "volumes":
                factor = quantity(c.value, "L/kg", ("volumes", step, c))
            elif basis == "mass_ratio":
                factor = quantity(c.value, "kg/kg", ("mass_ratio", step, c))
            else:
                factor = quantity(c.equiv, "", ("equiv", step, c))
            key = c.material
            charges.append(CoreCharge(key, str(basis), factor, form(key), key in maker, carried.get(key),
                                      c.leaves, c.role == "workup"))
        eq = step.equation
        nu_lim = eq.coefficient(step.limiting)
        gases = []
        for t in eq.products:
            mat = materials[t.key]
            if t.key in gas and mat.molar_mass is not None:
                gases.append((quantity(t.coefficient / nu_lim, "", ("gas_ratio", step, t.key)),
                              _molar_mass(mat, quantity)))
        steps.append(CoreStep(  # id, product, limiting, nu_ratio, yield_, product_form, limiting_form, charges, gases
            sid, step.product, step.limiting, quantity(eq.coefficient(step.product) / nu_lim, "", ("nu_ratio", step)),
            quantity(y, "", ("yield", step, case if chosen is not None else "expected")),
            form(step.product), form(step.limiting), tuple(charges), tuple(gases)))
    tgt = route.materials[route.target.material]
    if tgt.molar_mass is None:  # the loader forbids this; kept as a guard
        raise PlanError(f"target '{tgt.key}' has no molar mass")
    core = CoreRoute(tuple(steps), tgt.key, form(tgt.key),
                     _molar_mass(tgt, quantity) / quantity(tgt.assay, "", ("assay", tgt)),
                     quantity(route.target.overage, "", ("overage", route.target)))
    if cache is not None:
        cache[yields] = core
    return core


def with_yields(core: CoreRoute, yield_of: Mapping[str, Number]) -> CoreRoute:
    """``core`` with each step named in ``yield_of`` planned at that yield [-] instead
    (the actual yields of a campaign record's lots, :mod:`routeplan.plan.record`)."""
    from dataclasses import replace

    return replace(core, steps=tuple(replace(s, yield_=yield_of[s.id]) if s.id in yield_of else s
                                     for s in core.steps))


# ------------------------------------------------------------------ the expressions


def target_amount(amount_kg: Number, overage: Number, kg_per_mol_pure: Number) -> Number:
    """Moles of pure target to make [mol]: ``amount * (1 + overage) * assay / M``.

    ``amount_kg`` [kg] as isolated, ``overage`` [-], ``kg_per_mol_pure = M / assay``
    [kg/mol].

    Examples
    --------
    >>> round(target_amount(18.015, 0.0, 0.018015), 9)  # 18.015 kg of water
    1000.0
    """
    return amount_kg * (1 + overage) / kg_per_mol_pure


def limiting_amount(n_product_mol: Number, yield_: Number, nu_ratio: Number) -> Number:
    """Moles of limiting reagent [mol]: ``n_lim = n_p / (yield * nu_p / nu_lim)``.

    Examples
    --------
    >>> limiting_amount(90.0, 0.9, 1.0)
    100.0
    """
    return n_product_mol / (yield_ * nu_ratio)


def charge_amounts(c: CoreCharge, n_lim_mol: Number, m_lim_kg: Number):
    """Moles [mol], mass as charged [kg] and volume [L] of one charge line.

    Molar bases: ``n = equiv * n_lim``, ``m = n * kg_per_mol``; ``volumes``:
    ``V = volumes * m_lim``, ``m = V / L_per_kg``; ``mass_ratio``: ``m = ratio * m_lim``.
    Any material with a density also gets ``V = m * L_per_kg``, any with a molar mass
    ``n = m / kg_per_mol``.
    """
    f = c.form
    if c.basis == "volumes":
        if f.L_per_kg is None:  # the loader forbids this; kept as a guard
            raise PlanError(f"material '{c.material}' is charged by volume but has no density")
        V = c.factor * m_lim_kg  # [L/kg] * [kg] = [L]
        m = V / f.L_per_kg  # [L] / [L/kg] = [kg]
        n = None if f.kg_per_mol is None else m / f.kg_per_mol
        return n, m, V
    if c.basis == "mass_ratio":
        m = c.factor * m_lim_kg  # [kg/kg] * [kg]
        n = None if f.kg_per_mol is None else m / f.kg_per_mol  # [kg] / [kg/mol]
    else:
        n = c.factor * n_lim_mol  # [-] * [mol]
        m = n * f.kg_per_mol  # [mol] * [kg/mol]
    V = None if f.L_per_kg is None else m * f.L_per_kg  # [kg] * [L/kg]
    return n, m, V


#: Relative shortfall of a shelf that still counts as covering the demand [-]: rounding
#: of masses and assays (a record of lots exactly as planned), not chemistry.
SHELF_REL = 1e-9


def _is_array(x: Any) -> bool:
    """True for a numpy array (not a pint Quantity, not a recording number)."""
    return getattr(x, "shape", ()) != () and not hasattr(x, "units") and hasattr(x, "dtype")


def _taken(on_shelf: Number, n_p: Number) -> Number:
    """Moles taken from the shelf [mol]: ``min(on shelf, n_p)``, and all of ``n_p`` when
    the shelf falls short of it by less than :data:`SHELF_REL` (no batch of crumbs)."""
    if _is_array(on_shelf) or _is_array(n_p):
        import numpy as np

        return np.where(on_shelf >= n_p * (1 - SHELF_REL), n_p, np.minimum(on_shelf, n_p))
    return n_p if on_shelf >= n_p * (1 - SHELF_REL) else on_shelf


@frozen
class WalkStep:
    """One step after the walk: demand, limiting reagent and every charge as numbers.

    ``n_product`` [mol] is what the step makes (the demand less what the stock gives),
    ``n_taken`` [mol] what the stock gives (None when the stock does not name the
    product), ``n_lim`` [mol] and ``m_lim`` [kg] the limiting reagent, ``charges`` one
    ``(n [mol] or None, m [kg], V [L] or None)`` per charge line, in order.
    """

    step: CoreStep
    n_product: Number
    n_taken: Number | None
    n_lim: Number
    m_lim: Number
    charges: tuple


def walk(core: CoreRoute, n_target_mol: Number, shelf_mol: Mapping[str, Number] | None = None) -> dict[str, WalkStep]:
    """The backward walk: every step for the demand on its product.

    In reverse execution order a step whose product is demanded at ``n_p`` [mol] takes
    ``min(n_p, on shelf)`` from the shelf (``shelf_mol``: intermediate -> moles on hand
    [mol]) and makes the rest, needing ``n_lim = n_p / (yield * nu_p / nu_lim)``; each
    intermediate it charges adds its moles to the demand on the step that makes it.  A
    step not leading to the target has no demand (0 mol).  No recursion: one pass.

    Returns
    -------
    dict
        Step id -> :class:`WalkStep`, in execution order.
    """
    zero = n_target_mol * 0
    demand: dict[str, Number] = {core.target: n_target_mol}
    out: dict[str, WalkStep] = {}
    for s in reversed(core.steps):
        n_p = demand.get(s.product, zero)
        taken = None
        if shelf_mol is not None and s.product in shelf_mol:
            taken = _taken(shelf_mol[s.product], n_p)
            n_p = n_p - taken
        n_lim = limiting_amount(n_p, s.yield_, s.nu_ratio)
        m_lim = n_lim * s.limiting_form.kg_per_mol  # [mol] * [kg/mol] = [kg]
        lines = []
        for c in s.charges:
            amounts = charge_amounts(c, n_lim, m_lim)
            lines.append(amounts)
            if c.intermediate and amounts[0] is not None:
                demand[c.material] = demand.get(c.material, zero) + amounts[0]
        out[s.id] = WalkStep(s, n_p, taken, n_lim, m_lim, tuple(lines))
    return {s.id: out[s.id] for s in core.steps}


# ------------------------------------------------------------- what each vessel holds


def _larger(a: Number | None, b: Number) -> Number:
    """The larger of ``a`` and ``b`` (``b`` when ``a`` is None; element by element on arrays)."""
    if a is None:
        return b
    if _is_array(a) or _is_array(b):
        import numpy as np

        return np.maximum(a, b)
    return b if b > a else a


def _plus(a: Number | None, b: Number) -> Number:
    """``a + b``, starting from ``b`` when ``a`` is None (no unitless zero to add to)."""
    return b if a is None else a + b


def _share(n: Number, made: Number) -> Number:
    """Share of a telescoped step's product that a line takes [-]: ``n / made``, 1 when
    nothing is made (a step with no demand carries nothing anyway)."""
    if n is made:  # the only line that takes it (a recording number: no "x n / n" in a derivation)
        return 1.0
    if _is_array(n) or _is_array(made):
        import numpy as np

        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(made > 0, n / np.where(made > 0, made, 1.0), 1.0)
    return n / made if made > made * 0 else 1.0  # a zero in made's own unit (pint, recording numbers)


@frozen
class Contents:
    """What the vessel of one step holds over the campaign.

    Attributes
    ----------
    lines_V : tuple
        Per charge line, the volume it brings into the vessel [L] or None (no density):
        its own volume, or for a line carried in solution from a telescoped step the
        volume of that step's mixture that comes with it.
    lines_m : tuple
        Per charge line, the mass it brings in [kg]: its mass as charged, or the mass of
        the mixture carried in.
    fullest_V : Number or None
        Largest volume in the vessel [L]: the lines in order of addition, each line that
        leaves taken out again right after it is charged; None when no line has a volume.
    transfer_V : Number or None
        Volume at the end, what goes on to the next step when the step is telescoped [L]:
        the lines that stay.
    transfer_m : Number
        Mass at the end [kg]: the lines that stay, less the gas evolved.
    reaction_m : Number
        Reaction mass [kg]: every line but ``role: workup``, a mixture carried in at its
        mass.
    gas_m : Number or None
        Gas evolved at full conversion [kg]; None for a step that evolves none.
    """

    lines_V: tuple
    lines_m: tuple
    fullest_V: Number | None
    transfer_V: Number | None
    transfer_m: Number
    reaction_m: Number
    gas_m: Number | None


def contents(core: CoreRoute, steps: Mapping[str, WalkStep]) -> dict[str, Contents]:
    """What every step's vessel holds, in execution order, from the walk's numbers.

    A line carried in solution from a telescoped step brings that step's mixture as it
    is at the transfer, in proportion to the share of its product the line takes
    (``share = n charged / n made``): ``V = transfer_V(src) * share``,
    ``m = transfer_m(src) * share``.  In order of addition the vessel gains each line's
    volume; a line that leaves (``leaves: true``) is taken out again right after it is
    charged, so it counts in the fullest volume but not in what is transferred.  At the
    end, ``transfer_V`` is the sum of the lines that stay and ``transfer_m`` their mass
    less the gas evolved (``nu_gas / nu_lim * n_lim * M`` at full conversion).  The
    reaction mass counts every line but ``role: workup``.  Plain arithmetic only, as
    the walk: floats, numpy arrays and pint Quantities alike.

    Parameters
    ----------
    core : CoreRoute
        The compiled route.
    steps : Mapping[str, WalkStep]
        The walk (:func:`walk`).

    Returns
    -------
    dict
        Step id -> :class:`Contents`, in execution order.
    """
    out: dict[str, Contents] = {}
    for s in core.steps:
        w = steps[s.id]
        held = fullest = stays_V = stays_m = m_rxn = None
        lines_V, lines_m = [], []
        for c, (n, m, V) in zip(s.charges, w.charges):
            if c.carried_from is not None:
                src = out[c.carried_from]
                share = _share(n, steps[c.carried_from].n_product)  # [mol] / [mol]
                V = None if src.transfer_V is None else src.transfer_V * share  # [L] * [-]
                m = src.transfer_m * share  # [kg] * [-]
            lines_V.append(V)
            lines_m.append(m)
            # the sums start from the first term (no unitless zero to add to): _plus, written out
            if V is not None:
                held = V if held is None else held + V  # [L]
            if c.leaves:
                if V is not None:  # the vessel is fullest just before a charge leaves, or at the end
                    fullest = _larger(fullest, held)
                    held = held - V  # separated right after it is charged [L]
                continue
            if V is not None:
                stays_V = V if stays_V is None else stays_V + V  # [L]
            stays_m = m if stays_m is None else stays_m + m  # [kg]
            if not c.workup:
                m_rxn = m if m_rxn is None else m_rxn + m  # [kg]
        gas = None
        for ratio, M in s.gases:
            gas = _plus(gas, ratio * w.n_lim * M)  # [-] * [mol] * [kg/mol] = [kg]
        if held is not None:  # volumes only add between leaving charges: no other peak
            fullest = _larger(fullest, held)
        out[s.id] = Contents(tuple(lines_V), tuple(lines_m), fullest, stays_V,
                             stays_m if gas is None else stays_m - gas, m_rxn, gas)
    return out
