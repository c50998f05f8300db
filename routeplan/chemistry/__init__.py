"""Chemistry of routeplan: atomic weights, formulas, molar masses, equations and balance.

Names are loaded on first use (PEP 562), so ``import routeplan.chemistry`` is cheap and
never imports pint; only :func:`molar_mass` builds a pint quantity.

>>> from routeplan.chemistry import molar_mass_value
>>> round(molar_mass_value("H2O"), 3)
18.015
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.chemistry.balance import describe_imbalance, imbalance
    from routeplan.chemistry.elements import (
        ATOMIC_WEIGHTS_FILE,
        Element,
        atomic_weight,
        element,
    )
    from routeplan.chemistry.equation import Equation, Term, parse_equation
    from routeplan.chemistry.formula import (
        Formula,
        element_counts,
        hill_formula,
        molar_mass,
        molar_mass_value,
        parse_formula,
    )

_EXPORTS = {
    "ATOMIC_WEIGHTS_FILE": "elements",
    "Element": "elements",
    "atomic_weight": "elements",
    "element": "elements",
    "Formula": "formula",
    "parse_formula": "formula",
    "element_counts": "formula",
    "molar_mass": "formula",
    "molar_mass_value": "formula",
    "hill_formula": "formula",
    "Term": "equation",
    "Equation": "equation",
    "parse_equation": "equation",
    "imbalance": "balance",
    "describe_imbalance": "balance",
}

__all__ = list(_EXPORTS)


def __getattr__(name: str) -> Any:
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{module}"), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
