"""Derivations for people: one line per chain of factors, and the same as plain data.

Reads only ``plan.derivation`` (:class:`routeplan.plan.derivation.Derivation`, made by the
plan's own core on recording numbers); nothing is recomputed here.  The ``explain``
command prints :func:`charge_text`, :func:`target_text` and :func:`raw_text`; the JSON
writer, the workbook's Derivation sheet and the HTML report take :func:`derivation_rows`
(one dict per factor) from here, so a number in the report can open its derivation.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.tables import column_unit, step_charge_rows

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.derivation import Line
    from routeplan.plan.model import Plan

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

    ``result_scale`` is ``(unit, factor)`` in which the result is shown (the plan table's
    column unit), default the line's own unit; results have 4 significant figures, as the
    plan prints them.
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
    return " ".join(parts) + f" = {_num(line.value / factor, 4)} {unit} {line.what}"


def lines_text(lines, scales: dict[int, tuple[str, float]] | None = None) -> list[str]:
    """Numbered lines of a derivation."""
    scales = scales or {}
    return [f"{i + 1}. {line_text(line, scales.get(i))}" for i, line in enumerate(lines)]


def _step_scales(plan: "Plan", step: str) -> dict[str, tuple[str, float]]:
    """The unit the plan's table of ``step`` shows each kind in: unit -> (shown unit, factor)."""
    rows = step_charge_rows(plan.step(step))
    out = {}
    for unit, col in (("mol", "mol"), ("kg", "mass_kg"), ("L", "volume_L")):
        out[unit] = column_unit([r[col] for r in rows], _KIND[unit])
    return out


def charge_lines(plan: "Plan", step: str, material: str):
    """The derivation lines of ``material``'s charge in ``step`` (PlanError with the nearest names)."""
    from routeplan.plan.derivation import find_charge

    index = find_charge(plan.route, step, material)
    return index, plan.derivation.charge(step, index)


def charge_text(plan: "Plan", step: str, material: str) -> list[str]:
    """The derivation of a charge, one line per chain; its last lines are the plan's numbers."""
    index, lines = charge_lines(plan, step, material)
    scales = _step_scales(plan, step)
    # the results of the charge itself (its last lines) in the units of the plan's table
    own = {plan.derivation.lines[plan.derivation.named[k]].what for k in plan.derivation.named
           if k[:3] == ("charge", step, index)}
    shown = {i: scales[line.unit] for i, line in enumerate(lines) if line.what in own and line.unit in scales}
    out = [f"{material} charged to {step}: how the plan gets its numbers"] + lines_text(lines, shown)
    c = plan.step(step).charges[index]
    amounts = []
    for unit, q in (("mol", c.mol), ("kg", c.mass), ("L", c.volume)):
        if q is not None:
            name, factor = scales[unit]
            amounts.append(f"{_num(q.m_as(unit) / factor, 4)} {name}")
    out.append(f"= {', '.join(amounts)} {material} charged to {step}, as in the plan")
    if c.carried_from is not None:
        out.append(f"(the volume is that of {c.carried_from}'s mixture carried in: every charge of "
                   f"{c.carried_from} that stays to the transfer, a charge that leaves before it not counted)")
    return out


def target_text(plan: "Plan") -> list[str]:
    """The derivation of the moles of target to make."""
    return [f"{plan.target_material}: moles to make"] + lines_text(plan.derivation.chain(("target",)))


def raw_text(plan: "Plan", material: str) -> list[str]:
    """The derivation of a raw material's mass over the campaign, every charge that adds to it."""
    from routeplan.plan.derivation import find_raw

    find_raw(plan.route, material, [r.material for r in plan.raw_materials])
    lines = plan.derivation.chain(("raw", material, "m"))
    scale = column_unit([r.m_kg for r in plan.raw_materials], "mass")
    total = next(r for r in plan.raw_materials if r.material == material)
    return ([f"{material} over the campaign: how the plan gets its mass"]
            + lines_text(lines, {len(lines) - 1: scale})
            + [f"= {_num(total.m_kg / scale[1], 4)} {scale[0]} {material} over the campaign, as in the plan"])


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
