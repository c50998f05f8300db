"""Derivations for people: one line per chain of factors, and the same as plain data.

Reads only ``plan.derivation`` (:class:`routeplan.plan.derivation.Derivation`, made by the
plan's own core on recording numbers); nothing is recomputed here.  Every derivation for
people is an :class:`Explanation`: the ``explain`` command prints :func:`charge_text`,
:func:`target_text` and :func:`raw_text`; the HTML report lays out
:func:`step_explanations`, the workbook's Derivation sheet :func:`sheet_blocks` (the same
lines as rows for live formulas), and the JSON writer takes :func:`charge_derivations`
(one dict per factor, as the plan records them).
"""

from __future__ import annotations

from functools import lru_cache
from typing import TYPE_CHECKING, Any

from routeplan.frozen import frozen
from routeplan.views.display_units import KIND_OF_BASE, plan_units
from routeplan.views.numbers import sig
from routeplan.views.tables import fmt

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan
    from routeplan.views.display_units import DisplayUnits

__all__ = ["FactorView", "LineView", "Explanation", "line_views", "line_text", "charge_explanation",
           "charge_text", "target_text", "raw_text", "derivation_rows", "charge_derivations",
           "step_explanations", "sheet_blocks"]


def _num(value: float) -> str:
    """A factor to 6 significant figures, without exponent for everyday sizes."""
    text = f"{value:.6g}"
    if "e" in text and 1e-3 <= abs(value) < 1e6:
        text = f"{value:.0f}"
    return text


@frozen
class FactorView:
    """One factor as people read it.

    Attributes
    ----------
    op : str
        ``""`` for the first factor, else ``"x"``, ``"/"``, ``"+"`` or ``"-"``.
    value : float
        Magnitude in ``unit``.
    text : str
        The value to 6 significant figures.
    unit : str
        Its unit (``""`` for a pure number [-]).
    what, source : str
        What it is and where it comes from (the route file's line, a standard's table,
        ``"line 3"`` for an earlier line, ``"derived in S4"``).
    ref : int or None
        Index (0-based) of the earlier line of the same explanation whose result this is.
    elsewhere : int or None
        Index in ``plan.derivation.lines`` of the line whose result this is, where that
        line is derived with another step (an explanation cut at its step).
    """

    op: str
    value: float
    text: str
    unit: str
    what: str
    source: str
    ref: int | None = None
    elsewhere: int | None = None


@frozen
class LineView:
    """One line: factors and the result they give.

    Attributes
    ----------
    factors : tuple of FactorView
    value : float
        Result in ``base_unit`` (the derivation's own unit: mol, kg, L, ...).
    base_unit : str
    result : str
        Result to 4 significant figures in ``unit``, as the plan's tables print it.
    unit : str
        Unit shown (the plan table's column unit for the charge's own numbers).
    what : str
        What the result is (``"NaOH50 charged to S3"``).
    amount : str or None
        ``"n"``, ``"m"`` or ``"V"`` where the result is the charge's own moles, mass or
        volume as in the plan; else None.
    origin : int
        Index of the line in ``plan.derivation.lines``.
    """

    factors: tuple[FactorView, ...]
    value: float
    base_unit: str
    result: str
    unit: str
    what: str
    amount: str | None
    origin: int


@frozen
class Explanation:
    """How the plan gets one number: a title, the lines, the plan's own numbers and notes.

    Attributes
    ----------
    title : str
    lines : tuple of LineView
    amounts : tuple of (str, float, str, str)
        The plan's numbers this explains: kind (``"n"``, ``"m"``, ``"V"``), value in the
        base unit (mol, kg, L), text to 4 significant figures and unit shown; empty
        where the last line is the number itself (the moles of target to make).
    subject : str
        What the numbers are of (``"NaOH50 charged to S3"``).
    notes : tuple of str
    """

    title: str
    lines: tuple[LineView, ...]
    amounts: tuple[tuple[str, float, str, str], ...] = ()
    subject: str = ""
    notes: tuple[str, ...] = ()

    @property
    def closing(self) -> str:
        """``= 151.4 mol, 12.11 kg, 7.966 L NaOH50 charged to S3, as in the plan``."""
        return f"= {', '.join(f'{t} {u}' for _k, _v, t, u in self.amounts)} {self.subject}, as in the plan"

    def text(self) -> list[str]:
        """The explanation as the ``explain`` command prints it: the title, the numbered
        lines, the plan's numbers (where it has them) and the notes."""
        return ([self.title] + [f"{i + 1}. {line_text(x)}" for i, x in enumerate(self.lines)]
                + ([self.closing] if self.amounts else []) + list(self.notes))


def line_views(lines, origins=None, scales: dict[int, tuple[str, float]] | None = None,
               amounts: dict[int, str] | None = None, number=fmt) -> tuple[LineView, ...]:
    """Lines of a derivation for people.

    ``scales`` maps a line index to the ``(unit, factor)`` its result is shown in (the
    plan table's column unit; default the line's own unit); ``amounts`` maps a line index
    to the charge's number it is (``"n"``, ``"m"``, ``"V"``); ``origins`` gives each
    line's index in the plan's derivation; ``number`` writes a result.
    """
    scales = scales or {}
    amounts = amounts or {}
    out = []
    for i, line in enumerate(lines):
        facs = tuple(FactorView("" if f.op == "start" else f.op, f.value, _num(f.value), f.unit, f.what,
                                f"line {f.ref + 1}" if f.ref is not None else f.source, f.ref, f.line)
                     for f in line.factors)
        unit, factor = scales.get(i, (line.unit, 1.0))
        out.append(LineView(facs, line.value, line.unit, number(line.value / factor), unit, line.what,
                            amounts.get(i), i if origins is None else origins[i]))
    return tuple(out)


def line_text(line: LineView) -> str:
    """One line: ``25 kg (target mass of HX17, f line 11) x 1.02 (...) / 278.308 g/mol (...) = 91.17 mol HX17 to make``."""
    parts = []
    for f in line.factors:
        text = f.text + (f" {f.unit}" if f.unit else "")
        if f.ref is not None:
            text += f" {f.what} ({f.source})"
        else:
            text += f" ({f.what}, {f.source})" if f.source else f" ({f.what})"
        parts.append(f"{f.op} {text}" if f.op else text)
    return " ".join(parts) + f" = {line.result} {line.unit} {line.what}"


def _scales(units: "DisplayUnits") -> dict[str, tuple[str, float]]:
    """The unit each kind is shown in: base unit -> (shown unit, factor), by ``units``."""
    return {base: (units.unit(kind).symbol, units.unit(kind).factor) for base, kind in KIND_OF_BASE.items()}


def charge_explanation(plan: "Plan", step: str, index: int, *, within_step: bool = False,
                       units: "DisplayUnits | None" = None) -> Explanation:
    """How the plan gets charge ``index`` (0-based) of ``step``: moles, mass and volume.

    The charge's own results are shown in ``units`` (default
    :func:`~routeplan.views.display_units.plan_units`) by the rule of
    :mod:`routeplan.views.numbers`, so that they read digit for digit as the plan's
    tables print them.  With ``within_step``, the lines stop at the amounts another step
    derives (:meth:`routeplan.plan.derivation.Derivation.cut`).
    """
    d = plan.derivation
    keys = d.charge_keys(step, index)
    origins, lines = d.cut(*keys, step=step if within_step else None)
    c = plan.step(step).charges[index]
    scales = _scales(units or plan_units(plan))
    own = {d.named[k]: k[3] for k in keys}  # a carried line's "V" is the mixture carried in
    where = {o: i for i, o in enumerate(origins)}
    shown = {i: scales[line.unit] for i, line in enumerate(lines) if origins[i] in own and line.unit in scales}
    views = line_views(lines, origins, shown, {where[o]: x for o, x in own.items()}, sig)
    amounts = []
    for kind, unit, value in (("n", "mol", c.n_mol), ("m", "kg", c.m_kg), ("V", "L", c.V_L)):
        if value is not None:
            name, factor = scales[unit]
            amounts.append((kind, value, sig(value / factor), name))
    subject = f"{c.material} charged to {step}"
    notes = ()
    if c.carried_from is not None:
        notes = (f"(the volume is that of {c.carried_from}'s mixture carried in: every charge of "
                 f"{c.carried_from} that stays to the transfer, a charge that leaves before it not counted)",)
    return Explanation(f"{c.material} charged to {step}: how the plan gets its numbers", views, tuple(amounts),
                       subject, notes)


def charge_text(plan: "Plan", step: str, material: str, units: "DisplayUnits | None" = None) -> list[str]:
    """The derivation of a charge, one line per chain; its last lines are the plan's numbers
    (in ``units``, default the plan's own)."""
    from routeplan.plan.derivation import find_charge

    return charge_explanation(plan, step, find_charge(plan.route, step, material), units=units).text()


def target_text(plan: "Plan") -> list[str]:
    """The derivation of the moles of target to make."""
    return Explanation(f"{plan.target_material}: moles to make",
                       line_views(plan.derivation.chain(("target",)))).text()


def raw_text(plan: "Plan", material: str, units: "DisplayUnits | None" = None) -> list[str]:
    """The derivation of a raw material's mass over the campaign, every charge that adds to
    it; its total in ``units`` (default the plan's own) as the plan prints it."""
    from routeplan.plan.derivation import find_raw

    find_raw(plan.route, material, [r.material for r in plan.raw_materials])
    lines = plan.derivation.chain(("raw", material, "m"))
    scale = _scales(units or plan_units(plan))["kg"]
    total = next(r for r in plan.raw_materials if r.material == material).m_kg
    return Explanation(f"{material} over the campaign: how the plan gets its mass",
                       line_views(lines, scales={len(lines) - 1: scale}, number=sig),
                       (("m", total, sig(total / scale[1]), scale[0]),), f"{material} over the campaign").text()


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


def step_explanations(plan: "Plan", units: "DisplayUnits | None" = None):
    """Every charge of every running step explained within its step, and where each line is first shown.

    ``units``: the plan's units, as its charge tables (see :func:`charge_explanation`;
    default :func:`~routeplan.views.display_units.plan_units`).

    Returns
    -------
    (shown, first)
        ``shown``: a list of ``(step index, step id, charge index, ChargePlan,
        Explanation)`` for the charges that have a derivation, in the plan's order;
        ``first``: index of a line in ``plan.derivation.lines`` -> ``(k, line index)``,
        its first showing (``shown[k]``), where a factor derived with another step
        (:attr:`FactorView.elsewhere`) can point.  Both empty without a derivation.
    """
    shown, first = [], {}
    if plan.derivation is None:
        return shown, first
    units = units or plan_units(plan)
    for si, sp in enumerate(plan.steps):
        if not sp.runs:
            continue
        for ci, c in enumerate(sp.charges):
            ex = charge_explanation(plan, sp.id, ci, within_step=True, units=units)
            if ex.lines:
                for li, line in enumerate(ex.lines):
                    first.setdefault(line.origin, (len(shown), li))
                shown.append((si, sp.id, ci, c, ex))
    return shown, first


#: Where the factor that turns a product of units into the result's unit comes from.
UNIT_CONVERSION_SOURCE = "SI prefixes (NIST SP 811)"


@lru_cache(maxsize=None)
def _conversion(units: tuple[tuple[str, str], ...], result_unit: str) -> tuple[float, str]:
    """The number that turns the product of ``units`` (op, unit) into ``result_unit``, and the
    product's unit as text (``"kg·mol/g"``); pint's unit definitions (NIST SP 811).  A
    route has few distinct products of units: each is worked out once."""
    from routeplan.units import Q

    q = Q(1.0, "")
    for op, unit in units:
        q = q / Q(1.0, unit or "") if op == "/" else q * Q(1.0, unit or "")
    return float(q.m_as(result_unit or "")), ("" if q.dimensionless else f"{q.units:~P}")


def sheet_blocks(plan: "Plan") -> list[dict[str, Any]]:
    """The derivation of every charge as blocks of rows for a sheet with live formulas.

    One block per charge that has a derivation, in the plan's order of steps and charges:
    ``{"step", "order", "material", "lines"}``; each line ``{"rows", "value", "unit",
    "what", "amount"}`` (``value`` [``unit``] the result, ``amount`` ``n``/``m``/``V``
    where it is the plan's number of the charge); each row one factor ``{"op", "value",
    "unit", "what", "source", "ref", "at"}`` (``op`` as :attr:`FactorView.op`, ``""`` for
    the first): ``ref`` the index of an earlier line of the same block whose result it
    is, ``at`` the (block, line) that derives it with another step.  The lines stop at
    their step, as in the report (:func:`charge_explanation` ``within_step``).

    Where the product of a line's units is not the result's unit (kg / (g/mol) is 1000
    mol), a row ``x 1000 (unit conversion ...)`` follows, so that the product of the
    rows' values is the result; in a sum it follows the term it converts.  Rows read from
    the first: ``x`` and ``/`` apply to the term so far, ``+`` and ``-`` start a new term.
    """
    shown, first = step_explanations(plan)
    return [{"step": sid, "order": c.order, "material": c.material,
             "lines": [{"rows": _sheet_rows(line.factors, line.base_unit, first), "value": line.value,
                        "unit": line.base_unit, "what": line.what, "amount": line.amount}
                       for line in ex.lines]}
            for _si, sid, _ci, c, ex in shown]


def _sheet_rows(factors, result_unit: str, first: dict[int, tuple[int, int]]) -> list[dict[str, Any]]:
    """The rows of one line of :func:`sheet_blocks`, each term closed by its unit conversion."""
    rows: list[dict[str, Any]] = []
    term: list[tuple[str, str]] = []

    def close_term() -> None:
        if term:
            factor, product = _conversion(tuple(term), result_unit)
            if abs(factor - 1.0) > 1e-12:
                rows.append({"op": "x", "value": factor, "unit": "",
                             "what": f"unit conversion: {product or '1'} to {result_unit or '1'}",
                             "source": UNIT_CONVERSION_SOURCE, "ref": None, "at": None})
            term.clear()

    for f in factors:
        if f.op in ("+", "-"):
            close_term()
        term.append(("/" if f.op == "/" else "x", f.unit))
        rows.append({"op": f.op, "value": f.value, "unit": f.unit, "what": f.what, "source": f.source,
                     "ref": f.ref, "at": None if f.elsewhere is None else first[f.elsewhere]})
    close_term()
    return rows
