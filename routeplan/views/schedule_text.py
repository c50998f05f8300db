"""The schedule for people and charts: rows, a text timeline and chart data from a Plan.

Reads ``plan.schedule`` (:mod:`routeplan.plan.schedule`) only; it computes no time of its
own.  :func:`timeline_data` is the data a chart draws (one lane per vessel, one bar per
batch); :func:`schedule_parts` draws the same lanes as plain text for the terminal;
:func:`batch_rows` and :func:`vessel_rows` are the tables of the workbook and the CSV.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from routeplan.views.tables import Column

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = [
    "BATCH_SLOT_COLUMNS",
    "VESSEL_USE_COLUMNS",
    "lane_name",
    "timeline_data",
    "batch_rows",
    "vessel_rows",
    "schedule_missing_text",
    "pace_text",
    "schedule_parts",
]

#: One row per batch on the schedule (workbook Schedule sheet, ``schedule.csv``).
BATCH_SLOT_COLUMNS = (
    Column("step", "step"),
    Column("vessel", "vessel"),
    Column("batch", "batch", "-"),
    Column("start_h", "start", "h"),
    Column("end_h", "end", "h"),
    Column("cycle_time_h", "cycle time", "h"),
)

#: One row per vessel (workbook Schedule sheet, ``vessels.csv``).
VESSEL_USE_COLUMNS = (
    Column("vessel", "vessel"),
    Column("steps", "steps, in order"),
    Column("busy_h", "busy", "h"),
    Column("idle_h", "idle between batches", "h"),
    Column("first_start_h", "first batch starts", "h"),
    Column("last_end_h", "last batch ends", "h"),
    Column("utilisation", "busy share of the campaign", "-"),
    Column("idle_gaps", "idle gaps [h]"),
)


def lane_name(vessel: str | None, steps: tuple[str, ...] | list[str] = ()) -> str:
    """Name of a lane: the vessel key, or ``"(S3's own)"`` for a step without a vessel."""
    if vessel is not None:
        return vessel
    return f"({steps[0]}'s own)" if steps else "(own vessel)"


def _h(x: float) -> str:
    return f"{x:.4g}"


def timeline_data(plan: "Plan") -> dict[str, Any] | None:
    """What a timeline chart draws; None without a schedule.

    Returns
    -------
    dict or None
        ``{"campaign_h", "pace_step", "critical_chain", "lanes": [{"lane", "vessel",
        "bars": [{"step", "batch", "start_h", "end_h", "pace", "critical"}],
        "idle": [[start_h, end_h]]}]}``, hours [h] from the campaign start, lanes in order
        of first use.
    """
    s = plan.schedule
    if s is None:
        return None
    lanes = []
    chain = set(s.critical_chain)
    for v in s.vessels:
        bars = [{"step": st.id, "batch": b.batch, "start_h": b.start_h, "end_h": b.end_h,
                 "pace": st.id == s.pace_step, "critical": st.id in chain}
                for sid in v.steps for st in [s.step(sid)] for b in st.batches]
        lanes.append({"lane": lane_name(v.vessel, v.steps), "vessel": v.vessel, "bars": bars,
                      "idle": [[a, b] for a, b in v.idle]})
    return {"campaign_h": s.campaign_h, "pace_step": s.pace_step, "critical_chain": list(s.critical_chain),
            "lanes": lanes}


def batch_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per batch, steps in schedule order (:data:`BATCH_SLOT_COLUMNS`); empty without a schedule."""
    s = plan.schedule
    if s is None:
        return []
    return [{"step": st.id, "vessel": lane_name(st.vessel, [st.id]), "batch": b.batch, "start_h": b.start_h,
             "end_h": b.end_h, "cycle_time_h": st.cycle_time_h}
            for st in s.steps for b in st.batches]


def vessel_rows(plan: "Plan") -> list[dict[str, Any]]:
    """One row per vessel used (:data:`VESSEL_USE_COLUMNS`); empty without a schedule."""
    s = plan.schedule
    if s is None:
        return []
    return [{"vessel": lane_name(v.vessel, v.steps), "steps": ", ".join(v.steps), "busy_h": v.busy_h,
             "idle_h": v.idle_h, "first_start_h": v.first_start_h, "last_end_h": v.last_end_h,
             "utilisation": v.busy_h / s.campaign_h if s.campaign_h > 0 else None,
             "idle_gaps": "; ".join(f"{_h(a)}–{_h(b)}" for a, b in v.idle)}
            for v in s.vessels]


def schedule_missing_text(plan: "Plan") -> str | None:
    """Why there is no schedule, or None when there is one."""
    from routeplan.plan.schedule import steps_without_cycle_time

    if plan.schedule is not None:
        return None
    missing = steps_without_cycle_time(plan.route)
    n = len(plan.route.steps)
    which = "no step gives one" if len(missing) == n else "no cycle_time for " + ", ".join(missing)
    return (f"schedule incomplete: every step needs a cycle_time (vessel time per batch); {which}. "
            "Add e.g. 'cycle_time: 14 h' to each step")


def pace_text(plan: "Plan") -> str | None:
    """One sentence on the campaign's length and the step that sets its pace; None without a schedule."""
    s = plan.schedule
    if s is None:
        return None
    days = s.campaign_h / 24
    text = f"campaign {_h(s.campaign_h)} h ({days:.3g} days of vessel time end to end)"
    if s.pace_step is not None:
        st = s.step(s.pace_step)
        n = len(st.batches)
        text += (f"; the pace is set by {st.id} ({n} batch{'es' if n != 1 else ''} × {_h(st.cycle_time_h)} h "
                 f"in {lane_name(st.vessel, [st.id])}), the longest step on the critical chain "
                 + " → ".join(s.critical_chain))
    return text


def _ticks(campaign_h: float) -> float:
    for step in (1, 2, 4, 6, 12, 24, 48, 72, 168, 336, 720):
        if campaign_h / step <= 6:
            return float(step)
    return float(10 ** len(str(int(campaign_h / 6))))


def schedule_parts(plan: "Plan", *, width: int = 64) -> tuple[str, list[str], list[str]]:
    """The schedule in three parts: its heading, the drawn lanes with the hour axis (to be
    laid out as they are, never folded), and the sentences under them, a line per step.

    In a lane each batch is drawn from ``|`` with its step id (and ``#k`` for batch k of
    several), ``.`` is the vessel idle between two of its batches.  Without a schedule,
    one line says why.

    Parameters
    ----------
    plan : Plan
    width : int
        Columns for the whole campaign in the lanes [-].

    Returns
    -------
    (str, list of str, list of str)
        Heading; lanes and axis (empty without a schedule); lines indented by two spaces.
    """
    s = plan.schedule
    if s is None:
        return "Schedule", [], ["  " + schedule_missing_text(plan)]
    if s.campaign_h <= 0:
        return "Schedule", [], ["  no step runs in this campaign: nothing to schedule"]
    per_col = s.campaign_h / width
    names = [lane_name(v.vessel, v.steps) for v in s.vessels]
    pad = max(len(n) for n in names)
    first = next(sp.id for sp in plan.steps if sp.runs)  # the mark explained with a step of this route
    head = (f"Schedule (one lane per vessel; |{first} marks the start of a batch of {first}, "
            f". the vessel idle; 1 column = {per_col:.3g} h)")
    lanes = []

    def col(t: float) -> int:
        return min(width, int(round(t / per_col)))

    for v, name in zip(s.vessels, names):
        cells = [" "] * width
        for a, b in v.idle:
            for i in range(col(a), col(b)):
                cells[i] = "."
        for sid in v.steps:
            st = s.step(sid)
            for bt in st.batches:
                a, b = col(bt.start_h), max(col(bt.end_h), col(bt.start_h) + 1)
                label = "|" + sid + (f"#{bt.batch}" if len(st.batches) > 1 else "")
                if len(label) > b - a:  # too short for its name: the start mark only
                    label = "|"
                seg = (label + "=" * (b - a))[: b - a]
                for i, ch in enumerate(seg):
                    if a + i < width:
                        cells[a + i] = ch
        lanes.append(f"  {name.ljust(pad)} {''.join(cells).rstrip()}")
    tick = _ticks(s.campaign_h)
    axis = [" "] * (width + 8)
    t = 0.0
    while t <= s.campaign_h + 1e-9:
        label = f"{t:g} h"
        c = col(t)
        if c + len(label) <= len(axis) and all(ch == " " for ch in axis[max(0, c - 1):c + len(label)]):
            axis[c:c + len(label)] = list(label)
        t += tick
    lanes.append(f"  {' ' * pad} {''.join(axis).rstrip()}")
    rest = ["  " + pace_text(plan)]
    for st in s.steps:
        n = len(st.batches)
        where = lane_name(st.vessel, [st.id])
        if not n:
            rest.append(f"  {st.id}: does not run, takes no time")
            continue
        wait = st.start_h - st.ready_h
        why = (f", waits {_h(wait)} h for {where} after {st.after}" if st.held_by == "vessel" and wait > 0
               else f", after {st.after}" if st.held_by == "feed" else "")
        rest.append(f"  {st.id}: {where}, {_h(st.start_h)}–{_h(st.end_h)} h, "
                    f"{n} batch{'es' if n != 1 else ''} × {_h(st.cycle_time_h)} h{why}")
    busy = "; ".join(f"{r['vessel']} busy {_h(r['busy_h'])} h" + (f", idle {_h(r['idle_h'])} h between batches"
                                                                   if r["idle_h"] else "")
                     for r in vessel_rows(plan))
    rest.append(f"  vessels: {busy}")
    return head, lanes, rest
