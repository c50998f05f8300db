"""Heat and gas per batch: the screening estimates a safety review asks for first.

Pure computation on plain floats in fixed units (mol, kg, L, K, kJ, Pa, min) from the
per-batch numbers of the Plan (``BatchPlan.per_batch``, ``ChargePlan.n_mol_batch``), by the
method of ROUTE-FORMAT.md, "Extensions" (Stoessel, *Thermal Safety of Chemical
Processes*, Wiley-VCH 2008; criticality classes: Stoessel, Chem. Eng. Prog. 1993, 89(10),
68):

Gas evolved (a product with ``phase: gas``)
    ``n = nu_gas / nu_lim * n_lim`` per batch (full conversion of the limiting reagent,
    the safe side; not reduced by the yield); ``V = n R T / p`` at the step's conditions;
    for a dosed step the mean rate ``V / dosing.time``.
Gas taken up (a reactant with ``phase: gas``)
    moles per batch from its charge and the volume at normal conditions (0 degC,
    101.325 kPa).
Heat (a step with ``thermal``)
    ``delta_T_ad = -dH_r * n_lim / (m * cp)`` with ``m`` the reaction mass of the batch
    (:func:`routeplan.plan.core.contents`: a mixture carried in from a telescoped step
    counts what stays at its transfer, less the gas evolved and any charge that left);
    ``MTSR = Tp + X_ac * delta_T_ad``
    for a dosed step (``X_ac`` the accumulation, default 1), ``Tp + delta_T_ad`` for a
    batch step; the criticality class from MTSR, MTT and TD24; the severity from
    ``delta_T_ad``.  An endothermic step has a negative ``delta_T_ad``; nothing is
    clamped.  A step without ``thermal`` is not screened (``thermal`` None).

Everything here is a screening estimate: it never replaces calorimetry and a hazard
assessment by qualified people.  The warnings say so in their own words.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

from routeplan.errors import Problem
from routeplan.frozen import frozen
from routeplan.plan.campaign import nominal_volumes_L
from routeplan.plan.core import gas_keys
from routeplan.route.checks_safety import DEFAULT_PRESSURE_BAR, DEFAULT_TEMPERATURE_C
from routeplan.units import magnitude
from routeplan.vocab import Severity

if TYPE_CHECKING:  # pragma: no cover
    from typing import Sequence

    from routeplan.plan.model import BatchPlan, ChargePlan, StepPlan
    from routeplan.route.model import Route, Step

__all__ = [
    "R_J_PER_MOL_K",
    "ZERO_CELSIUS_K",
    "NORMAL_PRESSURE_PA",
    "SEVERITY_MEDIUM_K",
    "SEVERITY_HIGH_K",
    "GAS_FREE_VOLUME_RATIO",
    "SCREENING",
    "GasEvolved",
    "GasTakenUp",
    "ThermalScreen",
    "StepSafety",
    "ideal_gas_volume_L",
    "normal_volume_L",
    "gas_evolved_mol",
    "delta_T_ad_K",
    "mtsr_K",
    "criticality_class",
    "severity",
    "batch_safety",
    "safety_warnings",
]

#: Molar gas constant [J/(mol K)]: exact in the 2019 SI (N_A * k, both fixed; CODATA 2018).
R_J_PER_MOL_K = 8.314462618

#: 0 degC [K] (exact by the definition of the degree Celsius, NIST SP 811).
ZERO_CELSIUS_K = 273.15

#: Normal pressure, 1 atm [Pa] (exact, NIST SP 811).
NORMAL_PRESSURE_PA = 101325.0

#: delta_T_ad from which the severity is ``medium`` / ``high`` [K] (Stoessel 2008, as
#: ROUTE-FORMAT.md writes it).
SEVERITY_MEDIUM_K = 50.0
SEVERITY_HIGH_K = 200.0

#: Gas per batch this many times the vessel's free volume (nominal volume less the batch
#: volume) or more is warned about [-] (common practice, no source).
GAS_FREE_VOLUME_RATIO = 10.0

#: The words every heat and gas warning ends with.
SCREENING = "a screening estimate that never replaces calorimetry and a hazard assessment by qualified people"

#: Words in a gas's hazards that call for a vent or scrubber note.
_VENT_WORDS = re.compile(r"\b(toxic|flammable)\b", re.I)
_NOT_VENT = re.compile(r"\bnon-?\s*(toxic|flammable)\b|\bnot\s+(toxic|flammable)\b", re.I)


@frozen
class GasEvolved:
    """A gas given off by one batch of a step.

    Attributes
    ----------
    material : str
        Key of the gaseous product.
    mol_per_batch : float
        Amount evolved at full conversion [mol].
    volume_L_per_batch : float
        Its volume at the step's temperature and pressure [L].
    temperature_C, pressure_bar : float
        Those conditions [degC], [bar].
    rate_L_per_min : float or None
        Mean rate over the dosing time [L/min]; None for a batch step.
    vent : tuple of str
        The hazards of the gas that call for a vent or scrubber (``toxic``, ``flammable``).
    """

    material: str
    mol_per_batch: float
    volume_L_per_batch: float
    temperature_C: float
    pressure_bar: float
    rate_L_per_min: float | None
    vent: tuple[str, ...] = ()


@frozen
class GasTakenUp:
    """A gas taken up by one batch of a step (a hydrogenation, an oxidation).

    Attributes
    ----------
    material : str
        Key of the gaseous reactant.
    mol_per_batch : float
        Amount charged per batch [mol].
    normal_volume_L_per_batch : float
        Its volume at 0 degC and 101.325 kPa [L].
    vent : tuple of str
        Hazards that call for a vent or scrubber note.
    """

    material: str
    mol_per_batch: float
    normal_volume_L_per_batch: float
    vent: tuple[str, ...] = ()


@frozen
class ThermalScreen:
    """The heat of one batch, by Stoessel's method.

    Attributes
    ----------
    reaction_mass_kg_per_batch : float
        Reaction mass m [kg].
    delta_T_ad_K : float
        Adiabatic temperature rise [K] (negative for an endothermic step).
    process_temperature_C : float
        Tp [degC].
    mtsr_C : float
        Maximum temperature of the synthesis reaction [degC].
    mtt_C, td24_C : float or None
        MTT and TD24 where given [degC].
    accumulation : float or None
        Accumulation used for a dosed step [-]; None for a batch step.
    criticality_class : int or None
        1 to 5; None unless MTT and TD24 are both given.
    severity : str
        ``low``, ``medium`` or ``high``.
    """

    reaction_mass_kg_per_batch: float
    delta_T_ad_K: float
    process_temperature_C: float
    mtsr_C: float
    mtt_C: float | None
    td24_C: float | None
    accumulation: float | None
    criticality_class: int | None
    severity: str


@frozen
class StepSafety:
    """Heat and gas of one batch of one step.

    Attributes
    ----------
    gas_evolved : tuple of GasEvolved
        In the order of the equation; empty when no product says ``phase: gas``.
    gas_taken_up : tuple of GasTakenUp
        In the order of the equation.
    thermal : ThermalScreen or None
        None for a step without thermal data: it is *not screened*.
    dosed : str or None
        Key of the dosed charge; None for a batch step.
    dosing_time_min : float or None
        Dosing time [min].
    free_volume_L : float or None
        The vessel's nominal volume less the batch volume [L]; None without a vessel.
    runs : bool
        False for a step that does not run (no batch, nothing computed).
    """

    gas_evolved: tuple[GasEvolved, ...] = ()
    gas_taken_up: tuple[GasTakenUp, ...] = ()
    thermal: ThermalScreen | None = None
    dosed: str | None = None
    dosing_time_min: float | None = None
    free_volume_L: float | None = None
    runs: bool = True

    @property
    def screened(self) -> bool:
        """True when the step has thermal data (and runs)."""
        return self.thermal is not None


# ----------------------------------------------------------------------------- formulas

def ideal_gas_volume_L(n_mol: float, T_K: float, p_Pa: float) -> float:
    """Volume of ``n_mol`` of an ideal gas, ``V = n R T / p`` [L].

    Parameters
    ----------
    n_mol : float
        Amount [mol].
    T_K : float
        Temperature [K].
    p_Pa : float
        Absolute pressure [Pa].

    Examples
    --------
    >>> round(ideal_gas_volume_L(1.0, 273.15, 101325.0), 5)
    22.41397
    """
    return n_mol * R_J_PER_MOL_K * T_K / p_Pa * 1000.0


def normal_volume_L(n_mol: float) -> float:
    """Volume of ``n_mol`` of an ideal gas at 0 degC and 101.325 kPa [L]."""
    return ideal_gas_volume_L(n_mol, ZERO_CELSIUS_K, NORMAL_PRESSURE_PA)


def gas_evolved_mol(nu_gas: float, nu_lim: float, n_lim_mol: float) -> float:
    """Gas evolved at full conversion, ``n = nu_gas / nu_lim * n_lim`` [mol]."""
    return nu_gas / nu_lim * n_lim_mol


def delta_T_ad_K(dH_kJ_per_mol: float, n_lim_mol: float, m_kg: float, cp_kJ_per_kg_K: float) -> float:
    """Adiabatic temperature rise, ``-dH_r * n_lim / (m * cp)`` [K].

    Parameters
    ----------
    dH_kJ_per_mol : float
        Reaction enthalpy per mole of limiting reagent [kJ/mol]; negative: exothermic.
    n_lim_mol : float
        Limiting reagent in the batch [mol].
    m_kg : float
        Reaction mass [kg].
    cp_kJ_per_kg_K : float
        Specific heat capacity of the reaction mass [kJ/(kg K)].

    Examples
    --------
    >>> delta_T_ad_K(-100.0, 10.0, 10.0, 2.0)
    50.0
    """
    return -dH_kJ_per_mol * n_lim_mol / (m_kg * cp_kJ_per_kg_K)


def mtsr_K(Tp_K: float, dT_ad_K: float, accumulation: float = 1.0) -> float:
    """Maximum temperature of the synthesis reaction, ``Tp + X_ac * delta_T_ad`` [K]."""
    return Tp_K + accumulation * dT_ad_K


def criticality_class(mtsr: float, mtt: float | None, td24: float | None) -> int | None:
    """Criticality class 1 to 5 (Stoessel, Chem. Eng. Prog. 1993, 89(10), 68).

    All three temperatures in one unit.  With MTT < TD24: class 1 if MTSR < MTT, 3 if
    MTT <= MTSR < TD24, 4 if MTSR >= TD24; with MTT >= TD24: class 2 if MTSR < TD24, 5
    if MTSR >= TD24.  A tie counts as the higher class.  None unless both MTT and TD24
    are given.

    Examples
    --------
    >>> criticality_class(80.0, 100.0, 150.0)
    1
    >>> criticality_class(100.0, 100.0, 150.0)
    3
    """
    if mtt is None or td24 is None:
        return None
    if mtt < td24:
        if mtsr < mtt:
            return 1
        return 3 if mtsr < td24 else 4
    return 2 if mtsr < td24 else 5


def severity(dT_ad_K: float) -> str:
    """``low`` below 50 K, ``medium`` from 50 K to below 200 K, ``high`` from 200 K."""
    if dT_ad_K >= SEVERITY_HIGH_K:
        return "high"
    return "medium" if dT_ad_K >= SEVERITY_MEDIUM_K else "low"


def _vent(hazards) -> tuple[str, ...]:
    found = []
    for h in hazards:
        text = _NOT_VENT.sub("", h)
        for m in _VENT_WORDS.finditer(text):
            word = m.group(1).lower()
            if word not in found:
                found.append(word)
    return tuple(found)


def _gases(gas: frozenset[str], terms) -> list[tuple[str, float]]:
    """(key, coefficient) of the gases (keys in ``gas``) among equation ``terms``, in their order."""
    return [(t.key, t.coefficient) for t in terms if t.key in gas]


# ----------------------------------------------------------------------------- per step

def _conditions(step: "Step") -> tuple[float, float]:
    """Temperature [K] and absolute pressure [Pa] of the step (defaults 20 degC, 1.01325 bar)."""
    c = step.conditions
    T_K = magnitude(c.temperature, "K") if c is not None and c.temperature is not None else \
        DEFAULT_TEMPERATURE_C + ZERO_CELSIUS_K
    p_Pa = magnitude(c.pressure, "Pa") if c is not None and c.pressure is not None else DEFAULT_PRESSURE_BAR * 1e5
    return float(T_K), float(p_Pa)


def batch_safety(route: "Route", step_id: str, runs: bool, b: "BatchPlan | None",
                 charges: "Sequence[ChargePlan]") -> StepSafety:
    """Heat and gas of one batch of step ``step_id`` (its batches sized), from the parts
    of its StepPlan before that is built (the planner builds each StepPlan once, with its
    safety).

    Parameters
    ----------
    route : Route
    step_id : str
    runs : bool
        Whether the step runs (a step whose product is all in stock does not).
    b : BatchPlan or None
        The step's batches.
    charges : sequence of ChargePlan
        The step's charges (the gases taken up are read from them).

    Returns
    -------
    StepSafety
    """
    step = route.step(step_id)
    dosing = step.dosing
    dosing_min = None if dosing is None else magnitude(dosing.time, "min")
    if not runs or b is None or b.batches == 0:
        return StepSafety(dosed=None if dosing is None else dosing.material, dosing_time_min=dosing_min, runs=False)
    n_lim_mol = b.per_batch(b.limiting_n_mol)
    gas = gas_keys(route)
    t = step.thermal
    evolving = _gases(gas, step.equation.products) if gas else ()
    T_K = p_Pa = None
    if evolving or (t is not None and t.process_temperature is None):  # only then are the conditions read
        T_K, p_Pa = _conditions(step)

    evolved = []
    if evolving:
        nu_lim = step.equation.coefficient(step.limiting)
        for key, nu in evolving:
            n_mol = gas_evolved_mol(nu, nu_lim, n_lim_mol)
            V_L = ideal_gas_volume_L(n_mol, T_K, p_Pa)
            evolved.append(GasEvolved(material=key, mol_per_batch=n_mol, volume_L_per_batch=V_L,
                                      temperature_C=T_K - ZERO_CELSIUS_K, pressure_bar=p_Pa / 1e5,
                                      rate_L_per_min=None if dosing_min is None else V_L / dosing_min,
                                      vent=_vent(route.materials[key].hazards)))
    taken = []
    for key, _nu in (_gases(gas, step.equation.reactants) if gas else ()):
        n_mol = sum(c.n_mol_batch for c in charges if c.material == key and c.n_mol_batch is not None)
        taken.append(GasTakenUp(material=key, mol_per_batch=n_mol, normal_volume_L_per_batch=normal_volume_L(n_mol),
                                vent=_vent(route.materials[key].hazards)))

    free_L = None
    if b.vessel in route.equipment:
        free_L = nominal_volumes_L(route)[b.vessel] - b.batch_V_L  # [L], converted once per route

    thermal = None
    if t is not None:
        m_kg = b.per_batch(b.reaction_m_kg)
        dT = delta_T_ad_K(magnitude(t.reaction_enthalpy, "kJ/mol"), n_lim_mol, m_kg,
                          magnitude(t.heat_capacity, "kJ/(kg*K)"))
        Tp_K = magnitude(t.process_temperature, "K") if t.process_temperature is not None else T_K
        acc = (1.0 if t.accumulation is None else t.accumulation) if dosing is not None else None
        mtsr = mtsr_K(Tp_K, dT, 1.0 if acc is None else acc)
        mtt = None if t.max_technical_temperature is None else magnitude(t.max_technical_temperature, "K")
        td24 = None if t.decomposition_temperature_24h is None else \
            magnitude(t.decomposition_temperature_24h, "K")
        thermal = ThermalScreen(
            reaction_mass_kg_per_batch=m_kg, delta_T_ad_K=dT, process_temperature_C=Tp_K - ZERO_CELSIUS_K,
            mtsr_C=mtsr - ZERO_CELSIUS_K, mtt_C=None if mtt is None else mtt - ZERO_CELSIUS_K,
            td24_C=None if td24 is None else td24 - ZERO_CELSIUS_K, accumulation=acc,
            criticality_class=criticality_class(mtsr, mtt, td24), severity=severity(dT))
    return StepSafety(gas_evolved=tuple(evolved), gas_taken_up=tuple(taken), thermal=thermal,
                      dosed=None if dosing is None else dosing.material, dosing_time_min=dosing_min,
                      free_volume_L=free_L)


def _warnings(route: "Route", sp: "StepPlan", s: StepSafety) -> list[Problem]:
    """The heat and gas warnings of one step, located at the step."""
    step = route.step(sp.id)
    out = []

    def warn(message: "str | tuple", hint: str) -> None:
        parts = (message,) if isinstance(message, str) else message  # words, and (value, kind) amounts
        out.append(Problem.with_amounts(Severity.WARNING, (f"step {sp.id}: ", *parts, f"; {SCREENING}"),
                                        location=step.location, step=sp.id, hint=hint))

    t = s.thermal
    if t is not None and t.criticality_class is not None and t.criticality_class >= 3:
        warn(f"criticality class {t.criticality_class}: MTSR {t.mtsr_C:.4g} °C against MTT {t.mtt_C:.4g} °C "
             f"and TD24 {t.td24_C:.4g} °C",
             "measure the heat of reaction and the decomposition by calorimetry before scale-up")
    if t is not None and t.severity == "high":
        warn(f"adiabatic temperature rise {t.delta_T_ad_K:.4g} K per batch, severity high (200 K or more)",
             "dose the reagent, dilute the batch or cool it, and confirm by calorimetry")
    if s.free_volume_L is not None:
        for g in s.gas_evolved:
            if s.free_volume_L <= 0 or g.volume_L_per_batch >= GAS_FREE_VOLUME_RATIO * s.free_volume_L:
                times = "" if s.free_volume_L <= 0 else f", {g.volume_L_per_batch / s.free_volume_L:.3g} times"
                rate = "" if g.rate_L_per_min is None else \
                    f"; mean rate {g.rate_L_per_min:.4g} L/min over the {s.dosing_time_min:.4g} min of dosing"
                warn((f"the volume of {g.material} evolved, ", (g.volume_L_per_batch, "volume"), " per batch, is "
                      f"{GAS_FREE_VOLUME_RATIO:g} or more times the free volume of vessel {sp.vessel} (",
                      (max(s.free_volume_L, 0), "volume"), f"{times}){rate}"),
                     "size the vent and the off-gas line for it")
    if s.dosed is None:
        for g in s.gas_evolved:
            warn(((g.volume_L_per_batch, "volume"), f" of {g.material} per batch is evolved with everything charged "
                  "at once (no dosing): the gas comes as fast as the reaction runs"),
                 "dose a reagent ('dosing: {material: KEY, time: 2 h}') to control the gas")
    return out


def safety_warnings(route: "Route", steps: "tuple[StepPlan, ...]") -> list[Problem]:
    """The heat and gas warnings of every step that runs, in step order: criticality class
    3 or above, severity high, gas evolved 10 or more times the vessel's free volume per
    batch, and gas evolved in a step with no dosing."""
    warnings: list[Problem] = []
    for sp in steps:
        s = sp.safety
        # every warning is about the heat or a gas evolved: a step with neither has none
        if s is not None and s.runs and (s.thermal is not None or s.gas_evolved):
            warnings.extend(_warnings(route, sp, s))
    return warnings
