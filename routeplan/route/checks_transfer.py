"""Cross-checks of ``steps[].charges[].leaves``: which charge may leave the vessel.

A charge line with ``leaves: true`` leaves the vessel right after it is charged and
worked (a wash stirred, settled and its layer run off; a filter aid or charcoal filtered
off), before the next line is charged, and is not carried into the next step.  Only a
work-up charge can do that:

* the limiting reagent is what the step converts: it cannot leave;
* a reactant of the equation (an intermediate carried in among them) is consumed by the
  reaction: it cannot leave;
* any other line must say ``role: workup`` (a solvent, reagent or catalyst that leaves
  right after it is charged would leave before the reaction; a catalyst filtered off or
  a solvent distilled off at the end of the step is not yet expressible and stays in
  the mixture carried on, the safe side for the next vessel's fill).

``leaves`` is allowed on an isolated step as on a telescoped one: on an isolated step it
changes only the largest volume in the vessel (the wash is gone before the next line).
Each problem is located at the line's ``leaves`` key.
"""

from __future__ import annotations

from routeplan.errors import Problem
from routeplan.route.yamlpos import Positions
from routeplan.vocab import GIVEN_BASES

__all__ = ["leaving_problems"]

_WHAT_LEAVES = "only a work-up charge leaves (a wash that is separated, a filter aid filtered off)"


def leaving_problems(parts, facts, pos: Positions) -> list[Problem]:
    """Errors in the ``leaves`` keys of the validated pieces ``parts``.

    Parameters
    ----------
    parts : routeplan.route.checks.Parts
        The pieces of the file that passed schema validation.
    facts : routeplan.route.checks.Facts
        What the checks derived (equations, limiting reagents, main products).
    pos : Positions
        Where everything is in the file.

    Returns
    -------
    list of Problem
        Located errors, in file order.
    """
    from routeplan.route.checks import _default_role

    out: list[Problem] = []
    for i, s in enumerate(parts.steps):
        if s is None:
            continue
        leaving = [(j, c) for j, c in enumerate(getattr(s, "charges", None) or ())
                   if c is not None and getattr(c, "leaves", False) is True]
        if not leaving:
            continue
        sid = getattr(s, "id", None)
        eq = facts.equations.get(i)
        reactants = {t.key for t in eq.reactants} if eq is not None else set()
        for j, c in leaving:
            at = pos.at(("steps", i, "charges", j, "leaves"), key=True)
            if eq is not None and c.material == facts.limiting.get(i):
                message = f"step {sid}: the limiting reagent '{c.material}' cannot leave: it is what the step converts"
                hint = f"drop 'leaves'; {_WHAT_LEAVES}"
            elif c.material in reactants:
                message = (f"step {sid}: '{c.material}' is a reactant of the equation, consumed by the reaction, "
                           "so it cannot leave")
                hint = f"drop 'leaves'; {_WHAT_LEAVES}"
            else:
                basis = next((b for b in GIVEN_BASES if getattr(c, b, None) is not None), None)
                role = c.role if getattr(c, "role", None) is not None else _default_role(basis, False)
                if str(role) == "workup":
                    continue
                message = (f"step {sid}: this line of '{c.material}' is a {role}, and {_WHAT_LEAVES}: it "
                           "leaves right after it is charged, before the next line")
                hint = ("write 'role: workup' on the line if it is a wash or filter aid that is removed, "
                        "or drop 'leaves'")
            out.append(Problem("error", message, at, step=sid, hint=hint))
    return out
