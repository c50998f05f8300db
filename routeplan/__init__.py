"""routeplan: plan the scale-up of multi-step synthesis routes.

From one route file and a target mass, routeplan walks the route backward and gives
every charge of every step in moles, kilograms and litres, sizes batches to the
vessels at hand, says what to buy, and reports yield, process mass intensity and cost.

Quantities from routeplan are planning estimates: verify them, assess thermal and
chemical hazards before scale-up, and follow site procedures, local codes and
licensed practice.

Importing the package is cheap: pint, networkx, pandas and the exporters are loaded
only when a function that needs them is called.
"""

from __future__ import annotations

from typing import Any

__version__ = "0.1.0"

__all__ = [
    "__version__",
    "CAUTION",
    "RouteplanError",
    "molar_mass",
    "element_counts",
    "load_route",
    "plan_route",
    "plan_to_dict",
    "plan_frame",
    "report",
]

#: The caution every human-facing output carries.
CAUTION = (
    "Planning estimates only: verify every quantity, assess thermal and chemical hazards "
    "before scale-up, and follow site procedures, local codes and licensed practice."
)

from routeplan.errors import RouteplanError  # noqa: E402  (light: no heavy imports)

_LAZY = {
    "molar_mass": ("routeplan.chemistry.formula", "molar_mass"),
    "element_counts": ("routeplan.chemistry.formula", "element_counts"),
    "load_route": ("routeplan.route.load", "load_route"),
    "plan_route": ("routeplan.plan.planner", "plan_route"),
    "plan_to_dict": ("routeplan.export.json", "plan_to_dict"),
    "plan_frame": ("routeplan.views.tables", "charges_frame"),
    "report": ("routeplan.export.html", "notebook_report"),
}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        import importlib

        module, attr = _LAZY[name]
        value = getattr(importlib.import_module(module), attr)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'routeplan' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
