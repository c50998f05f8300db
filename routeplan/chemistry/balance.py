"""Atom and charge balance of an equation whose materials have formulas.

:func:`imbalance` counts every element on each side (coefficient × atoms per formula unit)
and returns products minus reactants; :func:`describe_imbalance` says the result in words
for an error or warning message.
"""

from __future__ import annotations

import math
from typing import Mapping, Union

from routeplan.chemistry.elements import hill_sort_key
from routeplan.chemistry.equation import Equation, Term, parse_equation
from routeplan.chemistry.formula import Formula, parse_formula
from routeplan.errors import EquationError

__all__ = ["CHARGE", "RELATIVE_TOLERANCE", "imbalance", "describe_imbalance"]

#: Key of the net charge in an imbalance.
CHARGE = "charge"
#: Differences at or below this fraction of the larger side's amount count as zero [-].
RELATIVE_TOLERANCE = 1e-9


def _side_totals(terms: tuple[Term, ...], formulas: Mapping[str, Union[str, Formula]],
                 eq: Equation) -> dict[str, float]:
    totals: dict[str, list[float]] = {}
    for term in terms:
        if term.key not in formulas or formulas[term.key] is None:
            raise EquationError(
                f"equation '{eq.text or eq}': no formula for '{term.key}', so its atoms "
                f"cannot be counted", equation=eq.text or str(eq), hint=f"give '{term.key}' a formula")
        f = parse_formula(formulas[term.key])
        for sym, k in f.counts.items():
            totals.setdefault(sym, []).append(term.coefficient * k)
        if f.charge:
            totals.setdefault(CHARGE, []).append(term.coefficient * f.charge)
    return {k: math.fsum(v) for k, v in totals.items()}


def imbalance(equation: Union[Equation, str],
              formulas: Mapping[str, Union[str, Formula]]) -> dict[str, float]:
    """Products minus reactants, per element and for the net charge.

    Parameters
    ----------
    equation : Equation or str
        The equation over material keys.
    formulas : Mapping[str, str or Formula]
        Formula of every key in the equation.

    Returns
    -------
    dict[str, float]
        Element symbol (and ``"charge"``) -> atoms [-] (elementary charges [-]) per mole of
        reaction, products minus reactants.  Only nonzero entries, elements in Hill order and
        ``"charge"`` last; a difference within :data:`RELATIVE_TOLERANCE` of the larger side's
        amount is zero.  Empty when the equation balances.

    Raises
    ------
    EquationError
        A key without a formula.
    FormulaError
        A formula that cannot be parsed.

    Examples
    --------
    >>> imbalance("2 H2 + O2 -> 2 H2O", {"H2": "H2", "O2": "O2", "H2O": "H2O"})
    {}
    >>> imbalance("H2 + O2 -> H2O", {"H2": "H2", "O2": "O2", "H2O": "H2O"})
    {'O': -1.0}
    """
    eq = parse_equation(equation) if isinstance(equation, str) else equation
    left = _side_totals(eq.reactants, formulas, eq)
    right = _side_totals(eq.products, formulas, eq)
    diff: dict[str, float] = {}
    for key in set(left) | set(right):
        a, b = left.get(key, 0.0), right.get(key, 0.0)
        d = b - a
        if abs(d) > RELATIVE_TOLERANCE * max(abs(a), abs(b)):
            diff[key] = d
    has_c = "C" in left or "C" in right
    order = sorted((k for k in diff if k != CHARGE), key=lambda s: hill_sort_key(s, has_c))
    if CHARGE in diff:
        order.append(CHARGE)
    return {k: diff[k] for k in order}


def _amount(x: float) -> str:
    r = round(x)
    return str(int(r)) if abs(x - r) <= 1e-9 * max(1.0, abs(x)) else format(x, ".6g")


def _join(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


def describe_imbalance(diff: Mapping[str, float], step_id: str | None) -> str:
    """Say an imbalance in words.

    Parameters
    ----------
    diff : Mapping[str, float]
        The result of :func:`imbalance` (products minus reactants) [-].
    step_id : str or None
        Id of the step, for the message.

    Returns
    -------
    str
        E.g. ``"step S2 is not balanced: the products have 2 H and 1 O fewer than the
        reactants"``; ``"... have 1 C more and 2 H fewer ..."`` when mixed.  Elements that
        are in excess come first, each group in the order of ``diff`` (Hill order).

    Examples
    --------
    >>> describe_imbalance({"H": -2.0, "O": -1.0}, "S2")
    'step S2 is not balanced: the products have 2 H and 1 O fewer than the reactants'
    """
    who = f"step {step_id}" if step_id is not None else "the equation"
    if not diff:
        return f"{who} is balanced"
    more = [f"{_amount(v)} {k}" for k, v in diff.items() if k != CHARGE and v > 0]
    fewer = [f"{_amount(-v)} {k}" for k, v in diff.items() if k != CHARGE and v < 0]
    parts = []
    if more:
        parts.append(f"{_join(more)} more")
    if fewer:
        parts.append(f"{_join(fewer)} fewer")
    clauses = []
    if parts:
        clauses.append(f"the products have {' and '.join(parts)} than the reactants")
    charge = diff.get(CHARGE, 0.0)
    if charge:
        how = f"{_amount(abs(charge))} {'higher' if charge > 0 else 'lower'}"
        clauses.append(f"their charge is {how}" if parts else
                       f"the charge of the products is {how} than that of the reactants")
    return f"{who} is not balanced: " + ", and ".join(clauses)
