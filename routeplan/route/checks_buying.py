"""Cross-checks of the buying keys of a route file: ``materials.<key>.pack`` and
``materials.<key>.bought``.

* A pack given as a volume (``2.5 L``) needs a density (the material's ``density`` or its
  solution's), so that the need, known as a mass, can be told in litres.
* An intermediate (the main product of a step) is made, not bought: it takes neither
  ``pack`` nor ``bought``.
* A material marked ``bought: false`` takes no ``pack``.

Each problem is located at the offending key.
"""

from __future__ import annotations

from routeplan.errors import Problem
from routeplan.route.yamlpos import Positions

__all__ = ["buying_problems"]


def buying_problems(parts, facts, pos: Positions) -> list[Problem]:
    """Errors in the buying keys of the validated pieces ``parts``.

    Parameters
    ----------
    parts : routeplan.route.checks.Parts
        The pieces of the file that passed schema validation.
    facts : routeplan.route.checks.Facts
        What the checks derived (the main product of each step).
    pos : Positions
        Where everything is in the file.

    Returns
    -------
    list of Problem
        Located errors.
    """
    made = set(facts.product.values())
    out: list[Problem] = []

    def error(key: str, field: str, message: str, hint: str) -> None:
        out.append(Problem("error", message, pos.at(("materials", key, field), key=True), hint=hint))

    for key, m in parts.materials.items():
        if m is None:
            continue
        pack = getattr(m, "pack", None)
        bought = getattr(m, "bought", True)
        if key in made:
            if pack is not None:
                error(key, "pack", f"'{key}' is made in the route (an intermediate), so it has no pack size",
                      "leave 'pack' out; only bought materials come in packs")
            if bought is False:
                error(key, "bought", f"'{key}' is made in the route (an intermediate); it is never bought anyway",
                      "leave 'bought' out")
            continue
        if pack is not None and bought is False:
            error(key, "pack", f"'{key}' is marked 'bought: false' but gives a pack size",
                  "drop 'pack', or drop 'bought: false' if it is bought")
        if pack is not None and not pack.check("[mass]"):
            solution = getattr(m, "solution", None)
            density = getattr(m, "density", None) or (getattr(solution, "density", None) if solution else None)
            if density is None:
                error(key, "pack", f"the pack of '{key}' is a volume ({pack:~P}) but '{key}' has no density, "
                      "so its need (a mass) cannot be told in litres",
                      "add 'density: ... g/mL' to the material, or give the pack as a mass ('25 kg')")
    return out
