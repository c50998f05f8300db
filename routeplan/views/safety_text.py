"""Heat and gas of each batch in words and rows: the terminal, the charge sheets, the
workbook's Summary, the CSV table and any report read them from here.

Everything reads ``StepPlan.safety`` (:mod:`routeplan.plan.safety`) and recomputes
nothing.  Every text calls the figures a screening estimate (:data:`SCREENING_NOTE`); a
step without thermal data is *not screened* (:data:`NOT_SCREENED`), never blank and never
"safe".
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.numbers import pct, sig
from routeplan.views.tables import Column, display_quantity

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan, StepPlan
    from routeplan.views.display_units import DisplayUnits

__all__ = [
    "SCREENING_NOTE",
    "NOT_SCREENED",
    "SAFETY_COLUMNS",
    "step_safety_lines",
    "heat_text",
    "gas_evolved_text",
    "gas_taken_up_text",
    "vent_text",
    "sheet_safety_pairs",
    "gas_charges",
    "safety_rows",
    "safety_summary_rows",
    "safety_steps",
]

#: What every safety section says of its own figures.
SCREENING_NOTE = "screening estimates, never a substitute for calorimetry and a hazard assessment by qualified people"

#: What a step without thermal data shows.
NOT_SCREENED = "not screened (no thermal data in the route file)"


def _t(celsius: float | None) -> str:
    """A temperature from the route file, as written there (exact) [°C]."""
    return "–" if celsius is None else f"{celsius:.4g} °C"


def _tc(celsius: float) -> str:
    """A computed temperature, 4 significant figures [°C]."""
    return f"{sig(celsius)} °C"


def _volume(V_L: float, units: "DisplayUnits | None" = None) -> str:
    return display_quantity(V_L, "volume", units=units)


def _amount(mol: float, units: "DisplayUnits | None" = None) -> str:
    return units.amount_text(mol) if units is not None else f"{sig(mol)} mol"


def heat_text(sp: "StepPlan", units: "DisplayUnits | None" = None) -> str:
    """The heat of one batch in one sentence, or :data:`NOT_SCREENED`.

    ``units``: the plan's units for the reaction mass (else the unit that suits it).
    """
    s = sp.safety
    t = None if s is None else s.thermal
    if t is None:
        return NOT_SCREENED
    how = (f"Tp {_t(t.process_temperature_C)} + {pct(t.accumulation)} accumulation × ΔTad"
           if t.accumulation is not None else f"Tp {_t(t.process_temperature_C)} + ΔTad, batch step")
    text = (f"reaction mass {display_quantity(t.reaction_mass_kg_per_batch, 'mass', units=units)} per batch, "
            f"ΔTad {sig(t.delta_T_ad_K)} K (severity {t.severity}), MTSR {_tc(t.mtsr_C)} ({how})")
    if t.criticality_class is not None:
        text += f"; MTT {_t(t.mtt_C)}, TD24 {_t(t.td24_C)}: criticality class {t.criticality_class}"
    else:
        if t.mtt_C is not None:
            text += f"; MTT {_t(t.mtt_C)}"
        if t.td24_C is not None:
            text += f"; TD24 {_t(t.td24_C)}"
        text += "; no criticality class without both MTT and TD24"
    return text


def gas_evolved_text(sp: "StepPlan", g, units: "DisplayUnits | None" = None) -> str:
    """One gas evolved per batch: amount, volume at the conditions, mean rate.

    The mean rate stays in L/min, the unit a flow meter reads.
    """
    text = (f"{g.material} {_amount(g.mol_per_batch, units)}, {_volume(g.volume_L_per_batch, units)} per batch at "
            f"{_t(g.temperature_C)} and {g.pressure_bar:.4g} bar")
    if g.rate_L_per_min is not None:
        text += (f", mean rate {sig(g.rate_L_per_min)} L/min over {sp.safety.dosing_time_min:.4g} min "
                 f"of dosing {sp.safety.dosed}")
    else:
        text += ", all at once (no dosing)"
    return text


def gas_taken_up_text(g, units: "DisplayUnits | None" = None) -> str:
    """One gas taken up per batch, as the normal volume by which it is followed."""
    return (f"{g.material} {_amount(g.mol_per_batch, units)} per batch, "
            f"{_volume(g.normal_volume_L_per_batch, units)} at normal conditions (0 °C, 1 atm)")


def vent_text(g) -> str:
    """The vent or scrubber note of a toxic or flammable gas ("" for any other)."""
    if not g.vent:
        return ""
    text = f"{g.material} is {' and '.join(g.vent)} (its hazards): lead the off-gas to a scrubber or a safe vent"
    return text + (", and keep ignition sources away" if "flammable" in g.vent else "")


def step_safety_lines(sp: "StepPlan", units: "DisplayUnits | None" = None) -> list[str]:
    """The safety section of a step for the terminal: only the lines that apply.

    Empty for a step that does not run.  ``units``: the plan's units (amounts, masses
    and volumes per batch in them).
    """
    s = sp.safety
    if s is None or not s.runs:
        return []
    lines = [f"safety per batch, {SCREENING_NOTE}:", "  heat: " + heat_text(sp, units)]
    for g in s.gas_evolved:
        lines.append("  gas evolved: " + gas_evolved_text(sp, g, units))
    for g in s.gas_taken_up:
        lines.append("  gas taken up: " + gas_taken_up_text(g, units))
    if s.gas_evolved and s.free_volume_L is not None:
        lines.append(f"  vessel {sp.vessel} free volume {_volume(max(s.free_volume_L, 0.0), units)} per batch "
                     "(nominal volume less the batch)")
    for g in (*s.gas_evolved, *s.gas_taken_up):
        note = vent_text(g)
        if note:
            lines.append("  vent: " + note)
    return lines


def sheet_safety_pairs(sp: "StepPlan", units: "DisplayUnits | None" = None) -> list[tuple[str, str]]:
    """(label, text) pairs for the safety block of a charge sheet: class, ΔTad, MTSR,
    gas volume and rate per batch, gas taken up, vent notes.  ``units``: the plan's units
    for the reaction mass and the gases' amounts and volumes (else each in the unit that
    suits it); gas rates stay in L/min."""
    s = sp.safety
    if s is None or not s.runs:
        return []
    t = s.thermal
    pairs: list[tuple[str, str]] = []
    if t is None:
        pairs.append(("heat", NOT_SCREENED))
    else:
        pairs.append(("criticality class", "–, needs MTT and TD24" if t.criticality_class is None
                      else f"{t.criticality_class} (MTT {_t(t.mtt_C)}, TD24 {_t(t.td24_C)})"))
        pairs.append(("ΔTad per batch", f"{sig(t.delta_T_ad_K)} K, severity {t.severity} (reaction mass "
                                        f"{display_quantity(t.reaction_mass_kg_per_batch, 'mass', units=units)})"))
        pairs.append(("MTSR", _tc(t.mtsr_C) + (f" (Tp {_t(t.process_temperature_C)}, accumulation "
                                               f"{pct(t.accumulation)})" if t.accumulation is not None
                                              else f" (Tp {_t(t.process_temperature_C)}, batch step)")))
    for g in s.gas_evolved:
        pairs.append((f"gas evolved: {g.material}", gas_evolved_text(sp, g, units)))
    for g in s.gas_taken_up:
        pairs.append((f"gas taken up: {g.material}", gas_taken_up_text(g, units)))
    for g in (*s.gas_evolved, *s.gas_taken_up):
        if g.vent:
            pairs.append(("vent", vent_text(g)))
    return pairs


def gas_charges(sp: "StepPlan") -> dict[str, float]:
    """Material key -> normal volume per batch [L] of each gas taken up by the step: a
    charge sheet shows that volume instead of a mass to weigh."""
    s = sp.safety
    if s is None or not s.runs:
        return {}
    return {g.material: g.normal_volume_L_per_batch for g in s.gas_taken_up}


#: Columns of the CSV safety table (one row per step and gas, or one per step without gas).
SAFETY_COLUMNS = (
    Column("step", "step"),
    Column("screened", "screened"),
    Column("reaction_mass_kg", "reaction mass per batch", "kg"),
    Column("delta_T_ad_K", "adiabatic temperature rise", "K"),
    Column("process_temperature_C", "Tp", "degC"),
    Column("mtsr_C", "MTSR", "degC"),
    Column("mtt_C", "MTT", "degC"),
    Column("td24_C", "TD24", "degC"),
    Column("criticality_class", "criticality class"),
    Column("severity", "severity"),
    Column("gas", "gas"),
    Column("gas_direction", "evolved or taken up"),
    Column("gas_mol", "gas per batch", "mol"),
    Column("gas_volume_L", "gas volume per batch", "L"),
    Column("gas_rate_L_per_min", "mean gas rate", "L/min"),
)


def safety_rows(plan: "Plan") -> list[dict[str, Any]]:
    """Rows of :data:`SAFETY_COLUMNS`: for each running step, one row per gas (evolved at
    the step's conditions, taken up at normal conditions), or one row without gas."""
    rows = []
    for sp in plan.steps:
        s = sp.safety
        if s is None or not s.runs:
            continue
        t = s.thermal
        base = {"step": sp.id, "screened": "yes" if t is not None else "no: not screened",
                "reaction_mass_kg": None if t is None else t.reaction_mass_kg_per_batch,
                "delta_T_ad_K": None if t is None else t.delta_T_ad_K,
                "process_temperature_C": None if t is None else t.process_temperature_C,
                "mtsr_C": None if t is None else t.mtsr_C, "mtt_C": None if t is None else t.mtt_C,
                "td24_C": None if t is None else t.td24_C,
                "criticality_class": None if t is None else t.criticality_class,
                "severity": None if t is None else t.severity,
                "gas": None, "gas_direction": None, "gas_mol": None, "gas_volume_L": None,
                "gas_rate_L_per_min": None}
        gases = [dict(base, gas=g.material, gas_direction="evolved", gas_mol=g.mol_per_batch,
                      gas_volume_L=g.volume_L_per_batch, gas_rate_L_per_min=g.rate_L_per_min)
                 for g in s.gas_evolved]
        gases += [dict(base, gas=g.material, gas_direction="taken up (normal volume)", gas_mol=g.mol_per_batch,
                       gas_volume_L=g.normal_volume_L_per_batch) for g in s.gas_taken_up]
        rows.extend(gases or [base])
    return rows


def safety_steps(plan: "Plan") -> tuple[list, list[str]]:
    """The running steps that have a safety screening, and the ids of those among them
    without thermal data (not screened, never silently safe)."""
    running = [sp for sp in plan.steps if sp.safety is not None and sp.safety.runs]
    return running, [sp.id for sp in running if not sp.safety.screened]


def safety_summary_rows(plan: "Plan") -> list[dict[str, Any]]:
    """The route-level safety summary: one ``{"step", "text"}`` row per running step,
    then a row that names the steps not screened."""
    rows = []
    running, unscreened = safety_steps(plan)
    for sp in running:
        s = sp.safety
        parts = ["heat: " + heat_text(sp)]
        parts += ["gas evolved: " + gas_evolved_text(sp, g) for g in s.gas_evolved]
        parts += ["gas taken up: " + gas_taken_up_text(g) for g in s.gas_taken_up]
        parts += ["vent: " + vent_text(g) for g in (*s.gas_evolved, *s.gas_taken_up) if g.vent]
        rows.append({"step": sp.id, "text": "; ".join(parts)})
    rows.append({"step": "", "text": ("not screened (no thermal data): " + ", ".join(unscreened)) if unscreened
                 else "every step that runs has thermal data"})
    return rows
