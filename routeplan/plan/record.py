"""A campaign record: actual yields, what is in hand, and where the campaign lands.

Pure computation on a route, the recorded lots (:mod:`routeplan.inputs.record`) and a
plan; the meanings are those of ROUTE-FORMAT.md, "Campaign record" and "Readings fixed
for the extensions / Campaign record".  Amounts are plain floats in mol and kg.

Per lot, with ``M`` molar masses [kg/mol], ``a`` assays [-] and ``nu`` the equation's
coefficients:

* limiting moles ``n_lim = charged * a_lim / M_lim`` (``charged`` as charged, at the
  limiting reagent's assay in the route) [mol];
* product moles ``n_p = isolated * a_lot / M_p`` (``a_lot`` the lot's assay, default
  the product's) [mol];
* actual yield ``y = (n_p / n_lim) * (nu_lim / nu_p)`` [-], the route's definition of
  ``yield``.  Above 100 % it is an error unless the step's ``high`` allows it (usually
  a wet or impure lot); more than :data:`FAR_BELOW` under the step's ``low`` (its
  expected yield without a range) it is flagged with a warning.

In hand of an isolated intermediate: moles made by its lots minus moles consumed by
lots of the steps that charge it, ``n_lim`` where it is their limiting reagent and
``equiv * n_lim`` otherwise (a mass-ratio charge: ``ratio * charged / (M / a)``); an
intermediate that reaches a lot in solution from a telescoped step is passed back
through that step at its planned yield (the lot stands for both steps).  Consumption is
counted at the route's assay; ``mass = n * M / a_route``.  Consuming more than was made
is an error, located at the lot that overdraws.  Lots of the target step are delivered.

The projection (:func:`record_plan`): a step with lots, and every step upstream of one,
does not run again; every other step runs forward from what arrives, at the plan's
yields; a step none of whose intermediates comes from a step with lots (a branch with no
lots) is made from raw materials as needed; a step taking several such intermediates is
limited by the scarcer per mole needed (arrived / equiv); an intermediate used by
several steps is shared in the proportion the plan gives each.  The delivered target
(as isolated) over ``1 + overage`` is ``projected_target_kg`` (the ``--target`` number).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Mapping

from routeplan.errors import Problem, RecordError
from routeplan.frozen import frozen
from routeplan.vocab import RecordYields

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.inputs.record import Lot, Record
    from routeplan.plan.model import Plan
    from routeplan.route.model import Route, Step

__all__ = ["FAR_BELOW", "RECORD_YIELDS", "LotResult", "InHand", "Account", "RecordPlan",
           "account_record", "record_plan"]

#: A lot is flagged when its yield is more than this below its step's ``low`` [-]
#: (5 percentage points; common practice, no source).
FAR_BELOW = 0.05

#: Yields at which the remaining batches of a step with lots are planned.
RECORD_YIELDS = tuple(RecordYields)

# relative slack for "above 100 %" and "beyond what was made" (rounding of the inputs)
_REL = 1e-9


@frozen
class LotResult:
    """One recorded lot with its actual yield.

    Attributes
    ----------
    step, lot : str, str or None
        Step id and lot number (as written).
    batch : int
        Batch number.
    charged_kg, limiting_mol : float
        Limiting reagent charged, as charged [kg], and its moles [mol].
    mass_kg, mol : float
        Product isolated, as isolated [kg], and its moles at the lot's assay [mol].
    assay : float
        The lot's assay [-].
    yield_, expected_yield : float
        Actual and expected yield [-].
    low : float or None
        The step's low yield [-].
    flagged : bool
        True when the yield is more than :data:`FAR_BELOW` under ``low`` (or expected).
    location : Location
        Where the lot is recorded.
    """

    step: str
    batch: int
    lot: str | None
    charged_kg: float
    limiting_mol: float
    mass_kg: float
    mol: float
    assay: float
    yield_: float
    expected_yield: float
    low: float | None
    flagged: bool
    location: object = None


@frozen
class InHand:
    """What is in hand of one isolated intermediate after the recorded lots.

    Attributes
    ----------
    material, step : str
        Intermediate and the step that makes it.
    made_mol, consumed_mol, mol : float
        Moles made by its lots, consumed by later lots, and in hand [mol].
    mass_kg : float
        ``mol * M / a_route``, as isolated at the route's assay [kg].
    lot_assay : float or None
        Mass-weighted assay of the lots that made it [-] (None when none did).
    lots : tuple of int
        Batch numbers of the lots that made it.
    lot_names : tuple of str
        Their lot numbers, where written.
    """

    material: str
    step: str
    made_mol: float
    consumed_mol: float
    mol: float
    mass_kg: float
    lot_assay: float | None
    lots: tuple[int, ...]
    lot_names: tuple[str, ...] = ()


@frozen
class Account:
    """The record worked out against the route, before any re-planning.

    Attributes
    ----------
    lots : tuple of LotResult
        In the order recorded.
    in_hand : tuple of InHand
        Per isolated intermediate that a lot makes or takes, in execution order.
    delivered_mol, delivered_kg : float
        Target made by lots of the target step [mol], as isolated at the route's assay [kg].
    actual_yields : Mapping[str, float]
        Per step with lots, its pooled yield ``sum(n_p) / sum(n_lim) * nu_lim / nu_p`` [-]
        (the assay-corrected mean of its lots, weighted by the moles charged).
    record_yields : str
        ``"actual"`` when the remaining batches of steps with lots are planned at
        ``actual_yields``, else ``"expected"``.
    warnings : tuple of Problem
        Lots far below their step's low yield.
    source : str or None
        The record file.
    """

    lots: tuple[LotResult, ...]
    in_hand: tuple[InHand, ...]
    delivered_mol: float
    delivered_kg: float
    actual_yields: Mapping[str, float]
    record_yields: str = "expected"
    warnings: tuple[Problem, ...] = ()
    source: str | None = None

    def shelf_kg(self, target: str) -> dict[str, float]:
        """What the re-plan takes first: intermediate (and target) -> mass as isolated [kg]."""
        out = {h.material: h.mass_kg for h in self.in_hand if h.mol > 0}
        if self.delivered_kg > 0:
            out[target] = self.delivered_kg
        return out

    def yields_for_walk(self) -> dict[str, float] | None:
        """Step -> yield for the re-plan's walk, or None at the route's yields."""
        return dict(self.actual_yields) if self.record_yields == "actual" else None


@frozen
class RecordPlan:
    """The record, the rest of the campaign and where it lands (``Plan.record``).

    Attributes
    ----------
    lots, in_hand, delivered_kg, actual_yields, record_yields, source
        As in :class:`Account`.
    required_target_kg : float
        The target amount before overage [kg] (the ``--target`` number).
    projected_target_kg : float or None
        Target amount before overage that what is in hand delivers [kg]; None when no
        lot lies upstream of the target (nothing in hand bounds it).
    gap_kg : float or None
        ``required - projected`` [kg]: above 0 short, at or below 0 covered.
    closes : tuple of (str, int)
        Steps with lots (or upstream of lots) that the re-plan runs again, and their
        batches: what closes the gap.
    remaining : tuple of (str, int)
        Every step the re-plan runs, and its batches.
    done : tuple of str
        Steps with lots and every step upstream of one (they do not run again in the
        projection).
    not_counted : tuple of str
        Intermediates in hand that the projection cannot use (every step taking them
        has lots); the re-plan takes them first.
    yield_basis : str
        Yields of the steps that run in the projection (the plan's basis).
    """

    lots: tuple[LotResult, ...]
    in_hand: tuple[InHand, ...]
    delivered_kg: float
    actual_yields: Mapping[str, float]
    record_yields: str
    source: str | None
    required_target_kg: float
    projected_target_kg: float | None
    gap_kg: float | None
    closes: tuple[tuple[str, int], ...]
    remaining: tuple[tuple[str, int], ...]
    done: tuple[str, ...]
    not_counted: tuple[str, ...]
    yield_basis: str = "expected"


def _form(route: "Route", key: str):
    """The material's conversion factors as supplied (:func:`routeplan.plan.core.material_form`)."""
    from routeplan.plan.core import material_form

    return material_form(route.materials[key])


def _kg_per_mol(route: "Route", key: str) -> float:
    """Mass as supplied or isolated per mole of compound, ``M / a`` [kg/mol]."""
    form = _form(route, key)
    if form.kg_per_mol is None:  # the loader forbids this for a molar material; kept as a guard
        raise RecordError(f"material '{key}' has no molar mass, so its lots cannot be counted in moles")
    return float(form.kg_per_mol)


def _molar_mass(route: "Route", key: str) -> float:
    """Molar mass [kg/mol]."""
    from routeplan.plan.core import molar_masses

    return molar_masses(route)[key]


def step_yield(step: "Step", yields: str = "expected") -> float:
    """The step's ``yields`` yield [-] (its expected yield without a range)."""
    chosen = getattr(step.yield_, yields)
    return step.yield_.expected if chosen is None else chosen


def _ratio(step: "Step") -> float:
    """``nu_product / nu_limiting`` [-]."""
    return step.equation.coefficient(step.product) / step.equation.coefficient(step.limiting)


def _consumption(route: "Route", step: "Step", n_lim: float, charged_kg: float | None,
                 yields: str, out: dict[str, float]) -> None:
    """Add to ``out`` the moles of each isolated intermediate one lot takes [mol].

    An intermediate made by a telescoped step is followed back through that step at its
    planned yield: ``n_lim(T) = n / (y_T * nu_p / nu_lim)``.
    """
    for c in step.charges:
        if not route.is_intermediate(c.material):
            continue
        if c.material == step.limiting and c.equiv is not None:
            n = n_lim
        elif c.equiv is not None:
            n = c.equiv * n_lim
        else:  # mass ratio or volumes of an intermediate: by mass of limiting reagent as charged
            m_lim = n_lim * _kg_per_mol(route, step.limiting) if charged_kg is None else charged_kg
            mass = c.value * m_lim
            if c.basis == "volumes":  # [L/kg] * [kg] = [L], over [L/kg]: [kg]
                mass = mass / _form(route, c.material).L_per_kg
            n = mass / _kg_per_mol(route, c.material)
        maker = route.step(route.maker[c.material])
        if not maker.isolated:
            n_lim_t = n / (step_yield(maker, yields) * _ratio(maker))
            _consumption(route, maker, n_lim_t, None, yields, out)
        else:
            out[c.material] = out.get(c.material, 0.0) + n


def account_record(route: "Route", record: "Record", *, yields: str = "expected",
                   record_yields: str = "expected") -> Account:
    """Work out each lot's actual yield and what is in hand.

    Parameters
    ----------
    route : Route
    record : Record
        The lots (:func:`routeplan.inputs.record.load_record`).
    yields : {"expected", "low", "high"}
        Yields at which a telescoped step between a lot and the intermediate it takes
        is counted.
    record_yields : {"expected", "actual"}
        Yields of the remaining batches of steps with lots.

    Raises
    ------
    RecordError
        A lot whose actual yield is above 100 % (and above the step's ``high``);
        consumption of an intermediate beyond what its lots made.
    """
    from routeplan.route.graph import execution_order

    if record_yields not in RECORD_YIELDS:  # StrEnum members equal their words
        raise RecordError(f"unknown record yield basis '{record_yields}'", hint="use expected or actual")
    results: list[LotResult] = []
    warnings: list[Problem] = []
    made: dict[str, float] = {}
    made_kg: dict[str, float] = {}
    made_pure_kg: dict[str, float] = {}
    sums: dict[str, list[float]] = {}
    consumed: dict[str, float] = {}
    overdraw: dict[str, "Lot"] = {}
    for lot in record.lots:
        step = route.step(lot.step)
        prod = route.materials[step.product]
        assay = prod.assay if lot.assay is None else lot.assay
        n_lim = lot.charged_kg / _kg_per_mol(route, step.limiting)  # [kg] / [kg/mol]
        n_p = lot.isolated_kg * assay / _molar_mass(route, step.product)
        y = n_p / n_lim / _ratio(step)
        high = step.yield_.high
        if y > 1 + _REL and not (high is not None and y <= high * (1 + _REL)):
            raise RecordError(
                f"lot {lot.batch} of step {step.id}: actual yield {y:.1%} is above 100 % "
                f"({lot.isolated_kg:g} kg of {step.product} at {assay:.1%} from {lot.charged_kg:g} kg of "
                f"{step.limiting}); usually a wet or impure lot",
                location=lot.where("isolated"), step=step.id,
                hint="check the isolated mass (dried to constant weight) and the assay; a step whose "
                     "yield can exceed 100 % says so in its yield's 'high'")
        low = step.yield_.low
        floor = (step.yield_.expected if low is None else low) - FAR_BELOW
        flagged = y < floor
        if flagged:
            ref = f"low yield {low:.1%}" if low is not None else f"expected yield {step.yield_.expected:.1%}"
            warnings.append(Problem("warning", f"lot {lot.batch} of step {step.id} gave {y:.1%}, far below the "
                                    f"step's {ref}", location=lot.location, step=step.id,
                                    hint="check the lot (losses, assay, mass) before planning on it"))
        results.append(LotResult(step=step.id, batch=lot.batch, lot=lot.lot, charged_kg=lot.charged_kg,
                                 limiting_mol=n_lim, mass_kg=lot.isolated_kg, mol=n_p, assay=assay, yield_=y,
                                 expected_yield=step.yield_.expected, low=low, flagged=flagged,
                                 location=lot.location))
        made[step.product] = made.get(step.product, 0.0) + n_p
        made_kg[step.product] = made_kg.get(step.product, 0.0) + lot.isolated_kg
        made_pure_kg[step.product] = made_pure_kg.get(step.product, 0.0) + lot.isolated_kg * assay
        s = sums.setdefault(step.id, [0.0, 0.0])
        s[0] += n_p
        s[1] += n_lim
        takes: dict[str, float] = {}
        _consumption(route, step, n_lim, lot.charged_kg, yields, takes)
        for key, n in takes.items():
            consumed[key] = consumed.get(key, 0.0) + n
            if key not in overdraw and consumed[key] > made.get(key, 0.0) * (1 + _REL) + 1e-12:
                overdraw[key] = lot
    # checked once every lot is in: a record need not be in time order
    for key, lot in overdraw.items():
        if consumed[key] > made.get(key, 0.0) * (1 + _REL) + 1e-12:
            maker = route.maker[key]
            raise RecordError(
                f"the lots consume {consumed[key] * _kg_per_mol(route, key):.4g} kg of {key} (at its route assay) "
                f"but the recorded lots of {maker} made only {made.get(key, 0.0) * _kg_per_mol(route, key):.4g} kg",
                location=lot.location, step=lot.step,
                hint=f"record every lot of {maker} that was used (a lot from an earlier campaign too, as a lot "
                     f"of {maker}), and check the charged masses")
    actual = {sid: n_p / n_lim / _ratio(route.step(sid)) for sid, (n_p, n_lim) in sums.items()}
    target = route.target.material
    in_hand = []
    for sid in execution_order(route):
        step = route.step(sid)
        key = step.product
        if key == target or not step.isolated or (key not in made and key not in consumed):
            continue
        n = made.get(key, 0.0) - consumed.get(key, 0.0)
        if n <= made.get(key, 0.0) * _REL:  # used up, to the rounding of the inputs
            n = 0.0
        batches = tuple(r.batch for r in results if r.step == sid)
        names = tuple(r.lot for r in results if r.step == sid and r.lot)
        in_hand.append(InHand(material=key, step=sid, made_mol=made.get(key, 0.0),
                              consumed_mol=consumed.get(key, 0.0), mol=n, mass_kg=n * _kg_per_mol(route, key),
                              lot_assay=(made_pure_kg[key] / made_kg[key]) if key in made_kg else None,
                              lots=batches, lot_names=names))
    delivered = made.get(target, 0.0)
    return Account(lots=tuple(results), in_hand=tuple(in_hand), delivered_mol=delivered,
                   delivered_kg=delivered * _kg_per_mol(route, target), actual_yields=actual,
                   record_yields=RecordYields(record_yields), warnings=tuple(warnings), source=record.source)


def _with_upstream(route: "Route", step_ids) -> set[str]:
    """``step_ids`` and every step upstream of them (:func:`routeplan.route.graph.steps_leading_to`)."""
    from routeplan.route.graph import steps_leading_to

    done: set[str] = set()
    for sid in step_ids:
        if sid not in done:
            done |= steps_leading_to(route, sid)
    return done


def project(route: "Route", account: Account, nominal, *, yields: str = "expected",
            shelf_mol: Mapping[str, float] | None = None) -> float | None:
    """Moles of target that what is in hand delivers, lots of the target step included [mol].

    Parameters
    ----------
    route : Route
    account : Account
    nominal : Walked
        The plan's walk without any shelf (:func:`routeplan.plan.walk.walk_route`): the
        share of an intermediate that several steps take, and each charge's equiv.
    yields : str
        Yields of the steps that run.
    shelf_mol : Mapping[str, float], optional
        Further intermediates on a shelf (a stock file) [mol], added to what is in hand.

    Returns
    -------
    float or None
        None when the target step lies on a branch with no lots (nothing bounds it).
    """
    from routeplan.route.graph import execution_order

    done = _with_upstream(route, (r.step for r in account.lots))
    arrived: dict[str, float] = {h.material: h.mol for h in account.in_hand}
    for key, n in (shelf_mol or {}).items():
        if route.maker.get(key) in done:
            arrived[key] = arrived.get(key, 0.0) + n
    # per step: intermediate -> (moles charged in the plan [mol], equiv [-])
    takes: dict[str, dict[str, list[float]]] = {}
    demand: dict[str, float] = {}
    users: dict[str, int] = {}
    for sid, w in nominal.steps.items():
        mine = takes.setdefault(sid, {})
        for c, (n, _m, _V) in zip(w.step.charges, w.charges):
            if not c.intermediate:
                continue
            entry = mine.setdefault(c.material, [0.0, 0.0])
            if n is not None:
                entry[0] += float(n)
                demand[c.material] = demand.get(c.material, 0.0) + float(n)
            if c.basis in ("equiv", "stoichiometric", "mol_percent"):
                entry[1] += float(c.factor)
        for key in mine:
            users[key] = users.get(key, 0) + 1
    bounded: set[str] = set(done)  # steps whose product is limited by what is in hand
    target_step = route.maker[route.target.material]
    made_target = 0.0
    for sid in execution_order(route):
        if sid in done:
            continue
        step = route.step(sid)
        need = {key: (n, equiv) for key, (n, equiv) in takes.get(sid, {}).items()
                if equiv > 0 and route.maker.get(key) in bounded}
        if not need:
            continue  # a branch with no lots: made from raw materials as needed
        bounded.add(sid)
        scale = None
        for key, (mine, equiv) in need.items():
            share = mine / demand[key] if demand.get(key, 0.0) > 0 else 1.0 / users[key]
            n = arrived.get(key, 0.0) * share / equiv
            scale = n if scale is None else min(scale, n)
        product = scale * step_yield(step, yields) * _ratio(step)
        arrived[step.product] = arrived.get(step.product, 0.0) + product
        if sid == target_step:
            made_target = product
    if target_step not in bounded:
        return None
    return account.delivered_mol + made_target


def record_plan(draft, account: Account, *, amount_kg: float, stock=None) -> RecordPlan:
    """The record's block of a plan re-planned with what is in hand first.

    Parameters
    ----------
    draft : Draft or Plan
        The re-plan (``plan_route(..., record=...)``): its steps are the rest of the
        campaign, so the steps it runs are what remains, and those of them that have lots
        (or lie upstream of lots) are the extra batches that close the gap.
    account : Account
    amount_kg : float
        The required target amount before overage [kg].
    stock : StockPlan, optional
        The stock comparison, whose intermediates count in the projection too.
    """
    from routeplan.plan.walk import walk_route

    route = draft.route
    overage = route.target.overage
    nominal = walk_route(route, amount_kg, yields=draft.yield_basis)
    shelf_mol = {}
    if stock is not None:
        for key, mass in stock.on_hand.items():
            if route.is_intermediate(key):
                shelf_mol[key] = float(mass.m_as("kg")) / _kg_per_mol(route, key)
    n = project(route, account, nominal, yields=draft.yield_basis, shelf_mol=shelf_mol)
    done = _with_upstream(route, (r.step for r in account.lots))
    projected = None if n is None else n * _kg_per_mol(route, route.target.material) / (1 + overage)
    gap = None if projected is None else amount_kg - projected
    remaining = tuple((sp.id, sp.batches) for sp in draft.steps if sp.runs and sp.batches > 0)
    short = gap is not None and gap > _REL * amount_kg
    closes = tuple((sid, b) for sid, b in remaining if sid in done) if short else ()
    not_counted = tuple(h.material for h in account.in_hand
                        if h.mol > 0 and all(u in done for u in route.consumers.get(h.material, ())))
    return RecordPlan(lots=account.lots, in_hand=account.in_hand, delivered_kg=account.delivered_kg,
                      actual_yields=account.actual_yields, record_yields=account.record_yields,
                      source=account.source, required_target_kg=amount_kg, projected_target_kg=projected,
                      gap_kg=gap, closes=closes, remaining=remaining,
                      done=tuple(sp.id for sp in draft.steps if sp.id in done), not_counted=not_counted,
                      yield_basis=draft.yield_basis)
