"""Derivations for people: one line per chain of factors, and the same as plain data.

Reads only ``plan.derivation`` (:class:`routeplan.plan.derivation.Derivation`, made by the
plan's own core on recording numbers); nothing is recomputed here.  The ``explain``
command prints :func:`charge_text`, :func:`target_text` and :func:`raw_text`; the JSON
writer, the workbook's Derivation sheet and the HTML report take :func:`derivation_rows`
(one dict per factor) from here, so a number in the report can open its derivation.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.display_units import plan_units
from routeplan.views.numbers import sig

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.derivation import Line
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["line_text", "lines_text", "charge_lines", "charge_text", "target_text", "raw_text",
           "derivation_rows", "charge_derivations", "plan_derivation_rows"]

_KIND = {"mol": "amount", "kg": "mass", "L": "volume"}
_OP = {"x": "x", "/": "/", "+": "+", "-": "-"}


def _num(value: float, digits: int = 6) -> str:
    """A factor to ``digits`` significant figures, without exponent for everyday sizes."""
    text = f"{value:.{digits}g}"
    if "e" in text and 1e-3 <= abs(value) < 1e6:
        text = f"{value:.0f}"
    return text


def _with_unit(value: float, unit: str, digits: int = 6) -> str:
    return _num(value, digits) + (f" {unit}" if unit else "")


def line_text(line: "Line", result_scale: tuple[str, float] | None = None) -> str:
    """One line: ``25 kg x 1.02 (1 + overage, f line 11) / 278.308 g/mol (...) = 91.17 mol HX17 to make``.

    ``result_scale`` is ``(unit, factor)`` in which the result is shown (the plan's unit
    of its kind), default the line's own unit; results have 4 significant figures, as the
    plan prints them (:func:`routeplan.views.numbers.sig`).  Factors keep 6, so that the
    arithmetic can be followed.
    """
    parts = []
    for f in line.factors:
        text = _with_unit(f.value, f.unit)
        if f.ref is not None:
            text += f" {f.what} (line {f.ref + 1})"
        else:
            text += f" ({f.what}, {f.source})" if f.source else f" ({f.what})"
        parts.append(text if f.op == "start" else f"{_OP[f.op]} {text}")
    unit, factor = result_scale or (line.unit, 1.0)
    return " ".join(parts) + f" = {sig(line.value / factor)} {unit} {line.what}"


def lines_text(lines, scales: dict[int, tuple[str, float]] | None = None) -> list[str]:
    """Numbered lines of a derivation."""
    scales = scales or {}
    return [f"{i + 1}. {line_text(line, scales.get(i))}" for i, line in enumerate(lines)]


def _scales(units: "DisplayUnits") -> dict[str, tuple[str, float]]:
    """The unit the plan shows each kind in: base unit -> (shown unit, factor)."""
    return {base: (units.unit(kind).symbol, units.unit(kind).factor) for base, kind in _KIND.items()}


def charge_lines(plan: "Plan", step: str, material: str):
    """The derivation lines of ``material``'s charge in ``step`` (PlanError with the nearest names)."""
    from routeplan.plan.derivation import find_charge

    index = find_charge(plan.route, step, material)
    return index, plan.derivation.charge(step, index)


def charge_text(plan: "Plan", step: str, material: str, units: "DisplayUnits | None" = None) -> list[str]:
    """The derivation of a charge, one line per chain; its last lines are the plan's numbers.

    ``units``: the units the plan is printed in (default :func:`plan_units`), so that the
    last line reads as the plan's table does.
    """
    index, lines = charge_lines(plan, step, material)
    scales = _scales(units or plan_units(plan))
    # the results of the charge itself (its last lines) in the units of the plan's table
    own = {plan.derivation.lines[plan.derivation.named[k]].what for k in plan.derivation.named
           if k[:3] == ("charge", step, index)}
    shown = {i: scales[line.unit] for i, line in enumerate(lines) if line.what in own and line.unit in scales}
    out = [f"{material} charged to {step}: how the plan gets its numbers"] + lines_text(lines, shown)
    c = plan.step(step).charges[index]
    amounts = []
    for unit, value in (("mol", c.n_mol), ("kg", c.m_kg), ("L", c.V_L)):
        if value is not None:
            name, factor = scales[unit]
            amounts.append(f"{sig(value / factor)} {name}")
    out.append(f"= {', '.join(amounts)} {material} charged to {step}, as in the plan")
    if c.carried_from is not None:
        out.append(f"(the volume in the plan is the whole mixture carried in from {c.carried_from}, "
                   f"sized with the batches, not this line's volume)")
    return out


def target_text(plan: "Plan") -> list[str]:
    """The derivation of the moles of target to make."""
    return [f"{plan.target_material}: moles to make"] + lines_text(plan.derivation.chain(("target",)))


def raw_text(plan: "Plan", material: str, units: "DisplayUnits | None" = None) -> list[str]:
    """The derivation of a raw material's mass over the campaign, every charge that adds to it
    (its total in ``units``, default :func:`plan_units`, as the plan prints it)."""
    from routeplan.plan.derivation import find_raw

    find_raw(plan.route, material, [r.material for r in plan.raw_materials])
    lines = plan.derivation.chain(("raw", material, "m"))
    scale = _scales(units or plan_units(plan))["kg"]
    total = next(r for r in plan.raw_materials if r.material == material)
    return ([f"{material} over the campaign: how the plan gets its mass"]
            + lines_text(lines, {len(lines) - 1: scale})
            + [f"= {sig(total.m_kg / scale[1])} {scale[0]} {material} over the campaign, as in the plan"])


def derivation_rows(lines) -> list[dict[str, Any]]:
    """Plain data of a derivation: one dict per line (``factors`` of value, unit, what, source)."""
    out = []
    for line in lines:
        out.append({
            "factors": [{"op": f.op, "value": f.value, "unit": f.unit, "what": f.what, "source": f.source,
                         "ref": f.ref} for f in line.factors],
            "value": line.value, "unit": line.unit, "what": line.what,
        })
    return out


def charge_derivations(plan: "Plan", step: str) -> list[list[dict[str, Any]]]:
    """:func:`derivation_rows` of every charge of ``step``, in order (empty without a derivation)."""
    if plan.derivation is None:
        return []
    sp = plan.step(step)
    return [derivation_rows(plan.derivation.charge(step, i)) for i in range(len(sp.charges))]


def plan_derivation_rows(plan: "Plan") -> list[dict[str, Any]]:
    """Flat rows for a sheet or a report: step, charge, line, op, value, unit, what, source, result."""
    rows = []
    if plan.derivation is None:
        return rows
    for sp in plan.steps:
        for i, c in enumerate(sp.charges):
            for k, line in enumerate(plan.derivation.charge(sp.id, i)):
                for f in line.factors:
                    rows.append({"step": sp.id, "order": i + 1, "material": c.material, "line": k + 1,
                                 "op": f.op, "value": f.value, "unit": f.unit, "what": f.what,
                                 "source": f.source, "result": line.value, "result_unit": line.unit,
                                 "result_what": line.what})
    return rows
