"""Yield uncertainty: how sure is the delivery, and what to plan for a chosen confidence.

Each step's yield is drawn from a beta-PERT distribution on ``[low, high]`` with mode
``expected`` (Malcolm, Roseboom, Clark and Fazar, *Operations Research* 1959, 7, 646):
shape ``alpha = 1 + 4 (m - a) / (b - a)``, ``beta = 1 + 4 (b - m) / (b - a)``, so that the
mean is ``(a + 4 m + b) / 6``.  Steps are independent; a step without a range keeps its
yield.  The draws are a numpy ``Generator`` seeded with ``seed``, run in chunks of
:data:`CHUNK` draws so that a million draws fit in memory.

In each draw the campaign planned at the expected yields runs *forward*
(:func:`run_forward`): a step that takes no intermediate is charged as planned; every
later step charges by its bases relative to what actually arrives, and a step that takes
two intermediates is limited by the scarcer one, counted per mole needed.  An
intermediate used by two steps is shared in the proportion the plan gives each.  The
forward structure is derived once from the Plan (:func:`forward_structure`) and the
per-draw arithmetic is written as plain array expressions, so the same code runs on
floats: with the expected yields it gives back the plan's target exactly.

Everything here is a ratio to the plan at the expected yields:

* ``g_s = Y_s / y_s``: drawn yield over the planned yield of step ``s`` [-];
* ``r_s``: the step's limiting moles as charged over those planned [-]; 1 for a step
  that takes no intermediate;
* ``q_I``: what arrives of intermediate ``I`` over what the plan needs of it [-],
  ``q_I = (g_t r_t P_t + S_I) / (P_t + S_I)`` with ``P_t`` the moles the making step
  ``t`` is planned to make [mol] and ``S_I`` the moles the plan takes from stock [mol].

A user ``s`` of ``I`` gets the share ``n_sI / D_I`` of what arrives, with ``n_sI`` the
moles it is planned to charge and ``D_I = P_t + S_I`` the plan's whole demand [mol]; it
needs ``n_sI / L_s`` mol of ``I`` per mole of its limiting reagent (the charge's equiv
relative to the limiting reagent, whatever its basis).  So it can charge
``(n_sI / D_I) * q_I * D_I / (n_sI / L_s) = q_I * L_s`` mol of limiting reagent from that
intermediate: ``r_s = min over its intermediates I of q_I`` (the scarcer one).  The
delivered target is ``q_target`` times the required mass, and each raw material's need
is ``sum_s m_s r_s`` with ``m_s`` its planned mass in step ``s`` [kg].
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any, Sequence

from routeplan.errors import Location, PlanError
from routeplan.frozen import frozen

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = [
    "DISTRIBUTION",
    "DEFAULT_DRAWS",
    "DEFAULT_SEED",
    "MAX_DRAWS",
    "MIN_DRAWS",
    "CHUNK",
    "REACHED_REL",
    "CONTRIBUTION_METHOD",
    "ForwardStep",
    "Forward",
    "Uncertainty",
    "pert_shape",
    "pert_mean",
    "check_options",
    "forward_structure",
    "run_forward",
    "yield_uncertainty",
]

#: Name of the distribution, as the JSON writes it.
DISTRIBUTION = "beta-PERT"
#: Draws by default (the route format's "Yield uncertainty").
DEFAULT_DRAWS = 100_000
#: Seed by default (the route format's "Yield uncertainty").
DEFAULT_SEED = 1
#: Fewest draws accepted: fewer cannot place a 10th percentile (common practice, no source).
MIN_DRAWS = 100
#: Most draws accepted (a run of about a minute on one core; common practice, no source).
MAX_DRAWS = 10_000_000
#: Draws per chunk: 65 536 draws of 30 steps hold about 16 MB per array.
CHUNK = 1 << 16
#: A draw delivers the required mass when it reaches it to this relative tolerance [-]
#: (the route format's readings for yield uncertainty).
REACHED_REL = 1e-9
#: How a step's share of the spread is measured.
CONTRIBUTION_METHOD = (
    "first-order share of variance: the squared Pearson correlation between the step's drawn "
    "yield and the delivered mass, which for independent inputs is the R² of a one-variable "
    "linear regression (Saltelli et al., Global Sensitivity Analysis: The Primer, Wiley 2008)")
#: Percentiles kept for the quantile line [-].
QUANTILE_LEVELS = (0.05, 0.10, 0.25, 0.50, 0.75, 0.90, 0.95)
#: Bins of the delivered-mass histogram.
HISTOGRAM_BINS = 24


@frozen
class ForwardStep:
    """One step of the forward structure (plain numbers, derived once from the Plan).

    Attributes
    ----------
    id : str
        Step id.
    planned_yield : float
        The yield the plan used, the expected one [-].
    low, high : float
        Ends of the yield range [-]; both equal to ``planned_yield`` without a range.
    made_mol : float
        Moles of product the step is planned to make, ``P`` [mol].
    stock_mol : float
        Moles of its product the plan takes from stock, ``S`` [mol].
    inputs : tuple of int
        Indices (in execution order) of the steps whose products it charges.
    """

    id: str
    planned_yield: float
    low: float
    high: float
    made_mol: float
    stock_mol: float
    inputs: tuple[int, ...]

    @property
    def ranged(self) -> bool:
        """True when the step's yield is drawn (``high > low``)."""
        return self.high > self.low


@frozen
class Forward:
    """The campaign as the forward run sees it.

    Attributes
    ----------
    steps : tuple of ForwardStep
        In execution order (every input comes before its user).
    target : int
        Index of the step that makes the target.
    required_kg : float
        Target to deliver with its overage, as isolated [kg].
    amount_kg : float
        The same before the overage, the number ``--target`` takes [kg].
    raw_need : tuple of (str, tuple of (int, float))
        Each bought material, in the plan's order, with its planned mass as charged in
        each step that charges it (step index, [kg]).
    """

    steps: tuple[ForwardStep, ...]
    target: int
    required_kg: float
    amount_kg: float
    raw_need: tuple[tuple[str, tuple[tuple[int, float], ...]], ...]


@frozen
class Uncertainty:
    """What the draws say about the campaign planned at the expected yields.

    Attributes
    ----------
    draws, seed : int
        Number of draws and the seed of the generator.
    distribution : str
        ``"beta-PERT"``.
    required_kg : float
        Target to deliver with its overage [kg].
    p10_kg, p50_kg, p90_kg, mean_kg : float
        Percentiles and mean of the delivered target, as isolated [kg].
    probability_of_target : float
        Share of draws that deliver ``required_kg`` (to a relative 1e-9) [-].
    confidence : float
        Confidence asked for [-].
    target_kg : float
        ``--target`` to plan at expected yields so that the ``1 - confidence`` percentile
        of delivery equals the required mass, before overage [kg].
    raw_materials : tuple of (str, float)
        Each raw material's ``confidence`` percentile of need at that scale [kg].
    contributions : tuple of (str, float)
        Step id and its share of the variance of the delivered mass [-], largest first;
        only steps with a range.
    quantiles_kg : tuple of (float, float)
        Level [-] and delivered mass at that percentile [kg] (:data:`QUANTILE_LEVELS`).
    histogram_edges_kg : tuple of float
        Bin edges of the delivered mass [kg].
    histogram_counts : tuple of int
        Draws in each bin [-].
    ranged_steps : tuple of str
        Ids of the steps whose yield is drawn; empty when the route carries no uncertainty.
    stock_in_full : bool
        True when intermediates are taken from stock: they arrive in full in every draw
        (an approximation the views state beside the figures).
    """

    draws: int
    seed: int
    distribution: str
    required_kg: float
    p10_kg: float
    p50_kg: float
    p90_kg: float
    mean_kg: float
    probability_of_target: float
    confidence: float
    target_kg: float
    raw_materials: tuple[tuple[str, float], ...]
    contributions: tuple[tuple[str, float], ...]
    quantiles_kg: tuple[tuple[float, float], ...]
    histogram_edges_kg: tuple[float, ...]
    histogram_counts: tuple[int, ...]
    ranged_steps: tuple[str, ...]
    stock_in_full: bool = False

    @property
    def carries_uncertainty(self) -> bool:
        """False when no step of the route has a yield range."""
        return bool(self.ranged_steps)


# ------------------------------------------------------------------ beta-PERT


def pert_shape(low: float, mode: float, high: float) -> tuple[float, float]:
    """Shape parameters of the beta-PERT distribution on ``[low, high]`` [-].

    ``alpha = 1 + 4 (m - a) / (b - a)``, ``beta = 1 + 4 (b - m) / (b - a)`` (Malcolm,
    Roseboom, Clark and Fazar, Operations Research 1959, 7, 646).

    Examples
    --------
    >>> [round(x, 4) for x in pert_shape(0.80, 0.90, 0.95)]
    [3.6667, 2.3333]
    """
    width = high - low
    return 1 + 4 * (mode - low) / width, 1 + 4 * (high - mode) / width


def pert_mean(low: float, mode: float, high: float) -> float:
    """Mean of the beta-PERT distribution, ``(a + 4 m + b) / 6`` [-] (Malcolm et al. 1959)."""
    return (low + 4 * mode + high) / 6


# -------------------------------------------------------------------- options


def check_options(confidence: float, draws: int, seed: int) -> None:
    """Refuse a confidence, a number of draws or a seed that cannot work.

    Raises
    ------
    PlanError
        A confidence not strictly between 0 and 100 %, draws outside
        [:data:`MIN_DRAWS`, :data:`MAX_DRAWS`], or a negative seed; located at the
        command-line option.
    """
    if isinstance(confidence, bool) or not isinstance(confidence, (int, float)) or not math.isfinite(confidence):
        raise PlanError(f"the confidence must be a percent, got {confidence!r}", location=Location(key="--confidence"),
                        hint="e.g. '90 %'")
    if not 0 < confidence < 1:
        raise PlanError(f"a confidence of {confidence * 100:g} % cannot be planned for",
                        location=Location(key="--confidence"),
                        hint="give a percent above 0 and below 100 %, e.g. '90 %'")
    if isinstance(draws, bool) or not isinstance(draws, int) or not MIN_DRAWS <= draws <= MAX_DRAWS:
        raise PlanError(f"{draws!r} draws cannot be used", location=Location(key="--draws"),
                        hint=f"give a whole number from {MIN_DRAWS:,} to {MAX_DRAWS:,}".replace(",", " "))
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise PlanError(f"the seed must be a whole number of 0 or more, got {seed!r}", location=Location(key="--seed"))


# -------------------------------------------------------------- the structure


def forward_structure(plan: "Plan") -> Forward:
    """The forward structure of a plan made at the expected yields (computed once).

    Parameters
    ----------
    plan : Plan
        Planned at the expected yields.

    Returns
    -------
    Forward
        Per step: planned yield and range, product planned [mol], taken from stock
        [mol], the steps whose products it charges; per raw material, its planned mass
        in each step [kg].
    """
    from routeplan.units import magnitude

    route = plan.route
    index = {sp.id: i for i, sp in enumerate(plan.steps)}
    steps = []
    for sp in plan.steps:
        y = route.step(sp.id).yield_
        low = y.low if y.low is not None else sp.yield_
        high = y.high if y.high is not None else sp.yield_
        inputs = sorted({index[route.maker[c.material]] for c in sp.charges
                         if c.intermediate and c.mol is not None and magnitude(c.mol, "mol") > 0})
        steps.append(ForwardStep(
            id=sp.id, planned_yield=sp.yield_, low=low, high=high,
            made_mol=magnitude(sp.product_mol, "mol"),
            stock_mol=magnitude(sp.from_stock_mol, "mol") or 0.0,
            inputs=tuple(inputs),
        ))
    need: dict[str, list[tuple[int, float]]] = {r.material: [] for r in plan.raw_materials}
    for i, sp in enumerate(plan.steps):
        if not sp.runs:
            continue
        for c in sp.charges:
            if not c.intermediate and c.material in need:
                need[c.material].append((i, magnitude(c.mass, "kg")))
    required = magnitude(plan.target_mass, "kg")
    return Forward(
        steps=tuple(steps),
        target=index[route.maker[plan.target_material]],
        required_kg=required,
        amount_kg=required / (1 + route.target.overage),
        raw_need=tuple((k, tuple(v)) for k, v in need.items()),
    )


def run_forward(fw: Forward, g: Sequence[Any]) -> tuple[list[Any], Any]:
    """Run the campaign forward for yield ratios ``g`` (floats or arrays of draws).

    Parameters
    ----------
    fw : Forward
        From :func:`forward_structure`.
    g : sequence
        Per step, the drawn yield over the planned yield [-]: a float (1.0 for a step
        whose yield is not drawn) or an array with one value per draw.

    Returns
    -------
    r : list
        Per step, limiting moles charged over those planned [-].
    delivered : float or array
        Target delivered over the required mass [-] (1.0 exactly at the planned yields).
    """
    import numpy as np

    r: list[Any] = []
    q: list[Any] = []
    for i, st in enumerate(fw.steps):
        ri = 1.0
        if st.inputs:
            ri = q[st.inputs[0]]
            for j in st.inputs[1:]:
                ri = np.minimum(ri, q[j])  # the scarcer intermediate, per mole needed
        r.append(ri)
        demand = st.made_mol + st.stock_mol  # [mol]
        q.append((g[i] * ri * st.made_mol + st.stock_mol) / demand if demand > 0 else 1.0)
    return r, q[fw.target]


# ------------------------------------------------------------------- the draws


def yield_uncertainty(plan: "Plan", *, confidence: float, draws: int = DEFAULT_DRAWS,
                      seed: int = DEFAULT_SEED) -> Uncertainty:
    """Draw the step yields and run the campaign forward in every draw.

    Parameters
    ----------
    plan : Plan
        Planned at the expected yields.
    confidence : float
        Confidence for the target and the purchases, strictly between 0 and 1 [-].
    draws : int
        Number of draws [-].
    seed : int
        Seed of the numpy generator.

    Returns
    -------
    Uncertainty

    Raises
    ------
    PlanError
        Bad options (:func:`check_options`) or a plan not made at the expected yields.
    """
    import numpy as np

    check_options(confidence, draws, seed)
    if plan.yield_basis != "expected":
        raise PlanError(f"yield uncertainty is drawn around the plan at the expected yields, not the "
                        f"{plan.yield_basis} ones", location=Location(key="--yields"),
                        hint="leave out --yields with --confidence")
    fw = forward_structure(plan)
    ranged = [i for i, st in enumerate(fw.steps) if st.ranged]
    low = np.array([fw.steps[i].low for i in ranged])
    high = np.array([fw.steps[i].high for i in ranged])
    mode = np.array([fw.steps[i].planned_yield for i in ranged])
    alpha, beta = pert_shape(low, mode, high)
    # g = Y / m = low / m + (high - low) / m * B with B ~ Beta(alpha, beta) [-]
    g_low, g_width = (low / mode)[:, None], ((high - low) / mode)[:, None]
    g_centre = (pert_mean(low, mode, high) / mode)[:, None]  # shifts the sums below (less round-off)
    used = {i for _m, uses in fw.raw_need for i, _kg in uses}
    stored = [i for i, st in enumerate(fw.steps) if st.inputs and i in used]
    col_of = {i: c for c, i in enumerate(stored)}

    rng = np.random.default_rng(seed)
    delivered = np.empty(draws)
    r_kept = np.empty((len(stored), draws))  # one row per step whose charges follow arrivals
    k = len(ranged)
    sy, syy, syd = np.zeros(k), np.zeros(k), np.zeros(k)
    sd = sdd = 0.0
    for start in range(0, draws, CHUNK):
        n = min(CHUNK, draws - start)
        g_drawn = g_low + g_width * rng.beta(alpha[:, None], beta[:, None], size=(k, n))  # one row per step
        g: list[Any] = [1.0] * len(fw.steps)
        for c, i in enumerate(ranged):
            g[i] = g_drawn[c]
        r, d = run_forward(fw, g)
        delivered[start:start + n] = d
        for i, c in col_of.items():
            r_kept[c, start:start + n] = r[i]
        # sums for the correlation of each drawn yield with the delivery (an affine
        # function of Y, so corr(g, D) = corr(Y, D))
        gc = g_drawn - g_centre
        dc = delivered[start:start + n] - 1.0
        sy += gc.sum(axis=1)
        syy += np.einsum("ij,ij->i", gc, gc)
        syd += gc @ dc
        sd += float(dc.sum())
        sdd += float(dc @ dc)

    required = fw.required_kg
    p10, p50, p90 = np.percentile(delivered, [10, 50, 90])
    reached = np.count_nonzero(delivered >= 1 - REACHED_REL) / draws
    q_low = float(np.percentile(delivered, 100 * (1 - confidence)))
    if not q_low > 0:  # yields are above 0, so only a far-out-of-range route gets here
        raise PlanError(f"at {confidence:.0%} confidence the draws deliver nothing, so no target can be planned",
                        location=Location(key="--confidence"), hint="check the steps' low yields")
    scale = 1 / q_low  # starting charges per planned starting charge [-]
    kept_pct = [np.percentile(row, 100 * confidence) for row in r_kept]  # row by row: one copy at a time
    raws = []
    for material, uses in fw.raw_need:
        fixed = sum(kg for i, kg in uses if i not in col_of)
        varying = [(col_of[i], kg) for i, kg in uses if i in col_of]
        if not varying:
            need = fixed
        elif len(varying) == 1:
            need = fixed + varying[0][1] * float(kept_pct[varying[0][0]])
        else:
            total = np.zeros(draws)
            for c, kg in varying:  # row by row, so no copy of the kept rows is made
                total += kg * r_kept[c]
            need = fixed + float(np.percentile(total, 100 * confidence))
        raws.append((material, scale * need))

    n = draws
    var_d = sdd / n - (sd / n) ** 2
    shares = []
    if k and var_d > 0:
        cov = syd / n - (sy / n) * (sd / n)
        var_y = syy / n - (sy / n) ** 2
        shares = [(fw.steps[i].id, float(cov[c] ** 2 / (var_y[c] * var_d)) if var_y[c] > 0 else 0.0)
                  for c, i in enumerate(ranged)]
        shares.sort(key=lambda t: -t[1])
    levels = np.percentile(delivered, [100 * lv for lv in QUANTILE_LEVELS]) * required
    lo, hi = float(delivered.min()), float(delivered.max())
    if hi > lo:
        counts, edges = np.histogram(delivered * required, bins=HISTOGRAM_BINS, range=(lo * required, hi * required))
    else:
        counts, edges = np.array([draws]), np.array([lo * required, hi * required])
    return Uncertainty(
        draws=draws, seed=seed, distribution=DISTRIBUTION, required_kg=required,
        p10_kg=float(p10) * required, p50_kg=float(p50) * required, p90_kg=float(p90) * required,
        mean_kg=(1.0 + sd / n) * required,
        probability_of_target=float(reached),
        confidence=float(confidence),
        target_kg=fw.amount_kg * scale,
        raw_materials=tuple(raws),
        contributions=tuple(shares),
        quantiles_kg=tuple((lv, float(v)) for lv, v in zip(QUANTILE_LEVELS, levels)),
        histogram_edges_kg=tuple(float(e) for e in edges),
        histogram_counts=tuple(int(c) for c in counts),
        ranged_steps=tuple(fw.steps[i].id for i in ranged),
        stock_in_full=any(st.stock_mol > 0 for st in fw.steps),
    )
