"""The campaign schedule: every batch of every step placed on its vessel in time.

Rules (ROUTE-FORMAT.md, "Time, plant and waste" and its readings)
    * Steps are placed in execution order: topological (a step after every step that
      feeds it), ties broken by step id in text order, never by their order in the file,
      so reordering a route file changes nothing.
    * A step's batches run one after another in its vessel, each for the step's
      ``cycle_time`` (vessel time for one batch, cleaning included).
    * A step starts when every step that feeds it (makes an intermediate it charges) has
      finished all its batches.
    * A vessel holds one batch at a time; its next free time only moves forward, so a
      later step never fills an earlier gap.
    * A step without a vessel has a vessel of its own (it waits for nothing but its
      feeding steps).
    * A step that does not run (``StepPlan.not_run``) takes no time: it starts and ends
      when its feeding steps have finished, and holds no vessel.
    * Each step is placed as early as these rules allow.

The step that sets the pace
    The campaign ends when its last batch ends.  Walking back from the step that ends
    last, each step's start was fixed either by a feeding step (the last one to finish)
    or by the step before it in the same vessel; following those links back to the
    start of the campaign gives the *critical chain* of steps, the chain with no slack.
    The step that sets the pace is the step on that chain that holds its vessel longest
    (``batches x cycle_time``); ties go to the earlier step in execution order.  Our own
    definition: shortening that step's batches or cycle time is what shortens the
    campaign most directly.

Everything here works on plain numbers: hours [h] as floats; no units, no text for people.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Mapping, Sequence

from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import StepPlan
    from routeplan.route.model import Route

__all__ = [
    "BatchSlot",
    "StepSlot",
    "VesselUse",
    "Schedule",
    "StepTiming",
    "schedule_order",
    "place_steps",
    "steps_without_cycle_time",
    "schedule_plan",
]

#: Times closer than this are the same instant [h] (round-off of sums of cycle times).
_SAME_TIME_H = 1e-9


@frozen
class StepTiming:
    """What the schedule needs of one step, in plain numbers.

    Attributes
    ----------
    id : str
        Step id.
    vessel : str or None
        Vessel key; None for a step without a vessel (it gets a vessel of its own).
    batches : int
        Number of batches [-]; 0 for a step that does not run.
    cycle_time_h : float
        Vessel time for one batch [h].
    feeds_from : tuple of str
        Ids of the steps that feed this one.
    """

    id: str
    vessel: str | None
    batches: int
    cycle_time_h: float
    feeds_from: tuple[str, ...] = ()


@frozen
class BatchSlot:
    """One batch in its vessel: number (from 1), start and end [h] from the campaign start."""

    batch: int
    start_h: float
    end_h: float


@frozen
class StepSlot:
    """One step on the schedule.

    Attributes
    ----------
    id : str
        Step id.
    vessel : str or None
        Vessel key; None for a step without a vessel (a vessel of its own).
    start_h, end_h : float
        Start of its first batch and end of its last [h] from the campaign start; equal
        for a step that does not run.
    ready_h : float
        When every feeding step had finished [h]; ``start_h - ready_h`` is the wait for
        the vessel.
    batches : tuple of BatchSlot
        Its batches in order; empty for a step that does not run.
    cycle_time_h : float
        Vessel time per batch [h].
    held_by : str or None
        What fixed the start: ``"feed"`` (a feeding step, named in ``after``),
        ``"vessel"`` (the step before it in the vessel, named in ``after``) or None
        (it starts at 0).
    after : str or None
        Id of the step that fixed the start.
    """

    id: str
    vessel: str | None
    start_h: float
    end_h: float
    ready_h: float
    batches: tuple[BatchSlot, ...]
    cycle_time_h: float
    held_by: str | None = None
    after: str | None = None

    @property
    def busy_h(self) -> float:
        """Vessel time the step takes: batches x cycle time [h]."""
        return len(self.batches) * self.cycle_time_h

    @property
    def runs(self) -> bool:
        """False for a step that does not run (no batches)."""
        return bool(self.batches)


@frozen
class VesselUse:
    """How one vessel is used over the campaign.

    Attributes
    ----------
    vessel : str or None
        Vessel key; None for the vessel of its own of a step without one (``steps``
        then names that one step).
    steps : tuple of str
        Ids of the steps that run in it, in the order they run.
    busy_h : float
        Hours it holds a batch [h].
    first_start_h, last_end_h : float
        When its first batch starts and its last ends [h].
    idle : tuple of (float, float)
        Gaps between ``first_start_h`` and ``last_end_h`` when it holds no batch, as
        (start, end) [h].
    """

    vessel: str | None
    steps: tuple[str, ...]
    busy_h: float
    first_start_h: float
    last_end_h: float
    idle: tuple[tuple[float, float], ...] = ()

    @property
    def idle_h(self) -> float:
        """Total idle hours between its first and last batch [h]."""
        return sum((b - a for a, b in self.idle), 0.0)


@frozen
class Schedule:
    """The campaign on its vessels.

    Attributes
    ----------
    campaign_h : float
        From the start of the first batch to the end of the last [h].
    steps : tuple of StepSlot
        In schedule order (:func:`schedule_order`).
    vessels : tuple of VesselUse
        Each vessel used, in order of first use; a step without a vessel has its own.
    pace_step : str or None
        Id of the step that sets the pace (see the module text); None when no step runs.
    critical_chain : tuple of str
        Step ids of the critical chain, first to last.
    """

    campaign_h: float
    steps: tuple[StepSlot, ...]
    vessels: tuple[VesselUse, ...]
    pace_step: str | None
    critical_chain: tuple[str, ...] = ()

    def step(self, step_id: str) -> StepSlot:
        """The slot of step ``step_id``."""
        for s in self.steps:
            if s.id == step_id:
                return s
        raise KeyError(step_id)


def schedule_order(timings: Sequence[StepTiming]) -> list[str]:
    """Step ids in schedule order: topological, ties broken by step id (text order).

    Examples
    --------
    >>> t = [StepTiming("S2", "R1", 1, 1.0, ("S1",)), StepTiming("S1", "R1", 1, 1.0)]
    >>> schedule_order(t)
    ['S1', 'S2']
    """
    from routeplan.route.graph import StepLinks, topological_order

    succ: dict[str, dict] = {t.id: {} for t in timings}
    pred: dict[str, dict] = {t.id: {} for t in timings}
    for t in timings:
        for f in t.feeds_from:
            succ[f][t.id] = pred[t.id][f] = None
    return topological_order(StepLinks(succ, pred), str)


def place_steps(timings: Sequence[StepTiming], order: Sequence[str] | None = None) -> Schedule:
    """Place every batch of every step on its vessel by the module's rules.

    Parameters
    ----------
    timings : sequence of StepTiming
        Every step, in any order; ``feeds_from`` must name steps of the sequence.
    order : sequence of str, optional
        The step ids in schedule order (:func:`schedule_order` of ``timings``), where
        the caller has it already; worked out from ``timings`` when left out.

    Returns
    -------
    Schedule
        Start and end of each step and batch [h], each vessel's use and idle gaps,
        the campaign's duration and the step that sets the pace.

    Examples
    --------
    Two batches of 10 h, then one of 5 h in the same vessel:

    >>> s = place_steps([StepTiming("S1", "R1", 2, 10.0), StepTiming("S2", "R1", 1, 5.0, ("S1",))])
    >>> s.campaign_h, s.step("S2").start_h, s.pace_step
    (25.0, 20.0, 'S1')
    """
    by_id = {t.id: t for t in timings}
    order = schedule_order(timings) if order is None else list(order)
    free: dict[str, tuple[float, str]] = {}  # vessel -> (next free time [h], step that last used it)
    slots: dict[str, StepSlot] = {}
    for sid in order:
        t = by_id[sid]
        # a step starts when every feeding step has finished (the last to finish is named)
        ready, feeder = 0.0, None
        for f in sorted(t.feeds_from):
            if feeder is None or slots[f].end_h > ready + _SAME_TIME_H:
                ready, feeder = max(ready, slots[f].end_h), f
        held_by, after = ("feed", feeder) if feeder is not None else (None, None)
        start = ready
        if t.batches > 0 and t.vessel is not None and t.vessel in free:
            vessel_free, last = free[t.vessel]
            if vessel_free > ready + _SAME_TIME_H:
                start, held_by, after = vessel_free, "vessel", last
        batches = tuple(BatchSlot(k + 1, start + k * t.cycle_time_h, start + (k + 1) * t.cycle_time_h)
                        for k in range(t.batches))
        end = batches[-1].end_h if batches else start
        if t.batches > 0 and t.vessel is not None:
            # the vessel's next free time only moves forward
            free[t.vessel] = (max(end, free.get(t.vessel, (0.0, sid))[0]), sid)
        slots[sid] = StepSlot(sid, t.vessel, start, end, ready, batches, t.cycle_time_h, held_by, after)
    steps = tuple(slots[sid] for sid in order)
    running = [s for s in steps if s.runs]
    campaign = max((s.end_h for s in running), default=0.0) - min((s.start_h for s in running), default=0.0)
    chain = _critical_chain(slots, running)
    pace = None
    if chain:
        place = {sid: k for k, sid in enumerate(order)}
        pace = max(chain, key=lambda sid: (slots[sid].busy_h, -place[sid]))
    return Schedule(campaign_h=campaign, steps=steps, vessels=_vessel_uses(running), pace_step=pace,
                    critical_chain=tuple(chain))


def _critical_chain(slots: Mapping[str, StepSlot], running: Sequence[StepSlot]) -> list[str]:
    if not running:
        return []
    last_end = max(s.end_h for s in running)
    current = next(s for s in running if s.end_h >= last_end - _SAME_TIME_H)
    chain = [current.id]
    while current.after is not None:
        current = slots[current.after]
        if current.runs:
            chain.append(current.id)
    return chain[::-1]


def _vessel_uses(running: Sequence[StepSlot]) -> tuple[VesselUse, ...]:
    lanes: dict[object, list[StepSlot]] = {}
    for s in running:
        lanes.setdefault(s.vessel if s.vessel is not None else ("own", s.id), []).append(s)
    out = []
    for key, slots in lanes.items():
        slots = sorted(slots, key=lambda s: s.start_h)
        idle = []
        for a, b in zip(slots, slots[1:]):
            if b.start_h > a.end_h + _SAME_TIME_H:
                idle.append((a.end_h, b.start_h))
        out.append(VesselUse(vessel=key if isinstance(key, str) else None, steps=tuple(s.id for s in slots),
                             busy_h=sum(s.busy_h for s in slots), first_start_h=slots[0].start_h,
                             last_end_h=slots[-1].end_h, idle=tuple(idle)))
    out.sort(key=lambda v: v.first_start_h)
    return tuple(out)


def steps_without_cycle_time(route: "Route") -> tuple[str, ...]:
    """Ids of the steps of ``route`` that give no ``cycle_time``, in text order of their ids."""
    return tuple(sorted((s.id for s in route.steps if s.cycle_time is None), key=str))


def schedule_plan(route: "Route", steps: "Sequence[StepPlan]") -> Schedule | None:
    """The schedule of a planned campaign, or None when a step has no ``cycle_time``.

    Parameters
    ----------
    route : Route
        The route (for each step's cycle time).
    steps : sequence of StepPlan
        The planned steps with their batches.

    Returns
    -------
    Schedule or None
        None unless every step of the route has a ``cycle_time``
        (:func:`steps_without_cycle_time` says which lack one).
    """
    if steps_without_cycle_time(route):
        return None
    from routeplan.route.graph import route_step_links, topological_order
    from routeplan.units import magnitude

    links = route_step_links(route)  # the steps planned are the route's; built once per route
    pred = links.pred
    timings = [StepTiming(id=sp.id, vessel=sp.vessel, batches=sp.batches if sp.runs else 0,
                          cycle_time_h=magnitude(route.step(sp.id).cycle_time, "h"),
                          feeds_from=tuple(sorted(pred[sp.id])))
               for sp in steps]
    # with every step of the route planned, the route's step links are the graph that
    # schedule_order would build from the timings: their order is theirs
    whole = len(timings) == len(pred)
    return place_steps(timings, order=topological_order(links, str) if whole else None)
