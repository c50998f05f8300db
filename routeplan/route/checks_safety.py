"""Cross-checks of the keys a heat and gas screening estimate reads.

The schema reads each of ``phase``, ``conditions``, ``dosing`` and ``thermal`` on its own
(units and dimensions); the checks here look across the file:

- ``dosing.material`` must be a charge of its step (a listed charge line, or a reactant of
  the equation, which is charged even without a line);
- ``thermal.accumulation`` needs ``dosing``: the accumulation of a batch step is all of
  it, by definition;
- the MTT may not lie below the process temperature Tp (``thermal.process_temperature``,
  else ``conditions.temperature``, else 20 degC): the mixture would boil, or the relief
  open, before the reaction runs;
- a material with ``phase: gas`` needs a molar mass (``formula``, ``smiles`` or
  ``molar_mass``), for its mass in the batch.

Each function returns :class:`~routeplan.route.findings.Finding` objects;
:mod:`routeplan.route.checks` places them in the file.
"""

from __future__ import annotations

from typing import Any, Iterable

from routeplan.route.findings import Finding
from routeplan.units import unit
from routeplan.vocab import Severity

__all__ = ["DEFAULT_TEMPERATURE_C", "DEFAULT_PRESSURE_BAR", "gas_findings", "step_safety_findings"]

#: Reaction temperature of a step whose file gives none [degC] (ROUTE-FORMAT.md, "Extensions").
DEFAULT_TEMPERATURE_C = 20.0

#: Absolute pressure of a step whose file gives none [bar] (ROUTE-FORMAT.md, "Extensions";
#: 1 atm = 1.01325 bar exactly, NIST SP 811).
DEFAULT_PRESSURE_BAR = 1.01325


def _bad(m) -> frozenset:
    return getattr(m, "bad", frozenset())


def gas_findings(materials: dict[str, Any]) -> list[Finding]:
    """A material with ``phase: gas`` and no formula, SMILES or molar mass is an error."""
    out = []
    for key, m in materials.items():
        if m is None or getattr(m, "phase", None) != "gas":
            continue
        if any(getattr(m, k) is not None or k in _bad(m) for k in ("formula", "smiles", "molar_mass")):
            continue
        out.append(Finding(Severity.ERROR, ("materials", key, "phase"),
                           f"'{key}' is a gas (phase: gas) but has no formula or molar mass",
                           "give its formula (e.g. 'formula: CO2'): the moles and the mass of a gas per batch "
                           "need its molar mass"))
    return out


def _kelvin(q) -> float | None:
    return None if q is None else float(q.to(unit("K")).magnitude)


def _celsius(k: float) -> str:
    return f"{k - 273.15:.4g} degC"


def step_safety_findings(i: int, s, reactants: Iterable[str] | None) -> list[Finding]:
    """The cross-checks of step number ``i`` (0-based) of the file.

    Parameters
    ----------
    i : int
        Index of the step in the file.
    s : StepModel or a partly valid stand-in
        The step as parsed.
    reactants : iterable of str or None
        Keys of the reactants of its equation; None when the equation could not be read
        (the dosing check then counts the listed charge lines only, and says nothing when
        the dosed material is not among them).
    """
    here = ("steps", i)
    out: list[Finding] = []
    dosing = getattr(s, "dosing", None)
    thermal = getattr(s, "thermal", None)
    if dosing is not None and dosing.material is not None and reactants is not None and "charges" not in _bad(s):
        charged = [r for r in reactants if r not in [c.material for c in (s.charges or ()) if c is not None]]
        charged = list(dict.fromkeys([*charged, *(c.material for c in (s.charges or ()) if c is not None)]))
        if dosing.material not in charged:
            out.append(Finding(Severity.ERROR, here + ("dosing", "material"),
                               f"the dosed material '{dosing.material}' is not charged in step {s.id}",
                               "dose one of its charges: " + ", ".join(charged)))
    if thermal is None:
        return out
    if thermal.accumulation is not None and dosing is None and "dosing" not in _bad(s):
        out.append(Finding(Severity.ERROR, here + ("thermal", "accumulation"),
                           "accumulation applies to a dosed step only, and this step has no dosing",
                           "add 'dosing: {material: KEY, time: 2 h}' to the step, or remove accumulation "
                           "(a batch step accumulates everything)"))
    conditions = getattr(s, "conditions", None)
    tp = _kelvin(thermal.process_temperature)
    tp_from = "thermal.process_temperature"
    if tp is None and "process_temperature" not in _bad(thermal):
        if conditions is not None and conditions.temperature is not None:
            tp, tp_from = _kelvin(conditions.temperature), "conditions.temperature"
        elif conditions is None or "temperature" not in _bad(conditions):
            tp, tp_from = DEFAULT_TEMPERATURE_C + 273.15, "the default 20 degC"
    mtt = _kelvin(thermal.max_technical_temperature)
    if tp is not None and mtt is not None and mtt < tp:
        out.append(Finding(Severity.ERROR, here + ("thermal", "max_technical_temperature"),
                           f"the MTT {_celsius(mtt)} is below the process temperature Tp {_celsius(tp)} "
                           f"({tp_from})",
                           "the MTT is the boiling point of the mixture or the relief's set temperature, "
                           "at or above Tp; check both temperatures and their units"))
    return out
