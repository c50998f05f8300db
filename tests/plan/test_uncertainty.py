"""Yield uncertainty: beta-PERT draws and the campaign run forward in every draw."""

import math

import numpy as np
import pytest
from scipy import stats

from routeplan.plan.planner import plan_route
from routeplan.plan.uncertainty import forward_structure, pert_mean, pert_shape, run_forward
from routeplan.route.load import load_route, load_route_text
from routeplan.units import Q

DRAWS = 20_000  # enough for the laws below; the scipy checks use more


def _yield(y) -> str:
    if isinstance(y, tuple):
        m, a, b = y
        return f"{{expected: {m * 100:g} %, low: {a * 100:g} %, high: {b * 100:g} %}}"
    return f"{y * 100:g} %"


def linear(yields, *, overage: str = "0 %") -> str:
    """A linear route of one esterification-like step per entry of ``yields``."""
    n = len(yields)
    lines = ["route: linear test", f"target: {{material: I{n}, amount: 10 kg, overage: {overage}}}", "materials:",
             "  MeOH: {formula: CH4O, density: 0.792 g/mL}", "  H2O: {formula: H2O, density: 1.0 g/mL}",
             "  THF: {formula: C4H8O, density: 0.889 g/mL}"]
    for k in range(n + 1):
        lines.append(f"  I{k}: {{formula: C{6 + k}H{6 + 2 * k}O, assay: 99 %}}")
    lines.append("steps:")
    for k, y in enumerate(yields, start=1):
        lines += [f"  - id: S{k}", f"    equation: I{k - 1} + MeOH -> I{k} + H2O", f"    yield: {_yield(y)}",
                  "    charges:", f"      - {{material: I{k - 1}}}", "      - {material: THF, volumes: 5}",
                  "      - {material: MeOH, equiv: 1.2}"]
    return "\n".join(lines) + "\n"


def convergent(y_a, y_b, y_c, equiv_b: float = 1.1) -> str:
    """Two branches A (makes IA) and B (makes IB) meeting in C: IA + IB -> T."""
    return f"""route: two branches
target: {{material: T, amount: 10 kg}}
materials:
  RA: {{formula: C6H6O}}
  RB: {{formula: C2H4O2}}
  MeOH: {{formula: CH4O, density: 0.792 g/mL}}
  H2O: {{formula: H2O, density: 1.0 g/mL}}
  THF: {{formula: C4H8O, density: 0.889 g/mL}}
  IA: {{formula: C7H8O}}
  IB: {{formula: C3H6O2}}
  T: {{formula: C10H12O2}}
steps:
  - id: A
    equation: RA + MeOH -> IA + H2O
    yield: {_yield(y_a)}
    charges: [{{material: RA}}, {{material: MeOH, equiv: 1.5}}]
  - id: B
    equation: RB + MeOH -> IB + H2O
    yield: {_yield(y_b)}
    charges: [{{material: RB}}, {{material: MeOH, equiv: 1.5}}]
  - id: C
    equation: IA + IB -> T + H2O
    yield: {_yield(y_c)}
    charges: [{{material: IA}}, {{material: IB, equiv: {equiv_b}}}, {{material: THF, volumes: 6}}]
"""


def plan_of(text: str, **kw):
    return plan_route(load_route_text(text), **kw)


# ------------------------------------------------------------------- beta-PERT


def test_pert_shape_is_the_contract_and_has_the_mode_and_mean_of_malcolm_1959():
    # Malcolm, Roseboom, Clark and Fazar, Operations Research 1959, 7, 646: the PERT beta
    # has mode m and mean (a + 4m + b)/6; shapes as ROUTE-FORMAT.md writes them
    a, m, b = 0.80, 0.90, 0.95
    alpha, beta = pert_shape(a, m, b)
    assert alpha == 1 + 4 * (m - a) / (b - a) and beta == 1 + 4 * (b - m) / (b - a)
    assert math.isclose(a + (b - a) * (alpha - 1) / (alpha + beta - 2), m, rel_tol=1e-12)
    # scipy.stats.beta as the reference for the mean of those shapes
    assert math.isclose(a + (b - a) * stats.beta(alpha, beta).mean(), pert_mean(a, m, b), rel_tol=1e-12)


def test_sample_mean_within_half_a_percent_of_the_pert_mean():
    # Malcolm et al. 1959: mean (a + 4m + b) / 6; one step, so delivered / required = Y / m
    a, m, b = 0.70, 0.88, 0.93
    p = plan_of(linear([(m, a, b)]), confidence=0.9, draws=DRAWS, seed=7)
    u = p.uncertainty
    sample_mean = u.mean_kg / u.required_kg * m
    assert abs(sample_mean - pert_mean(a, m, b)) <= 0.005 * pert_mean(a, m, b)


# ------------------------------------------------------------------ identities


def test_route_without_ranges_delivers_the_plan_in_every_draw():
    p = plan_of(linear([0.9, 0.8, 0.95], overage="5 %"), confidence=0.9, draws=1000)
    u = p.uncertainty
    target = p.target_mass.m_as("kg")
    assert u.p10_kg == u.p50_kg == u.p90_kg == u.mean_kg == target
    assert u.probability_of_target == 1.0
    assert math.isclose(u.target_kg, 10.0, rel_tol=1e-12)
    assert not u.carries_uncertainty and u.contributions == ()
    planned = {r.material: r.mass.m_as("kg") for r in p.raw_materials}
    assert dict(u.raw_materials).keys() == planned.keys()
    for k, kg in u.raw_materials:
        assert math.isclose(kg, planned[k], rel_tol=1e-12), k


@pytest.mark.parametrize("path", ["demo_routes/hx17-linear.yaml", "demo_routes/hx17-convergent.yaml"])
def test_the_forward_run_on_floats_gives_back_the_planned_target_exactly(path):
    p = plan_route(load_route(path))
    fw = forward_structure(p)
    r, delivered = run_forward(fw, [1.0] * len(fw.steps))
    assert delivered == 1.0
    assert all(x == 1.0 for x in r)
    assert delivered * fw.required_kg == p.target_mass.m_as("kg")


def test_one_step_p10_is_the_target_times_the_10th_percentile_yield_over_expected():
    # reference: scipy.stats.beta for the beta-PERT quantile (Malcolm et al. 1959 shapes)
    a, m, b = 0.75, 0.90, 0.96
    n = 100_000
    p = plan_of(linear([(m, a, b)]), confidence=0.9, draws=n, seed=3)
    dist = stats.beta(*pert_shape(a, m, b), loc=a, scale=b - a)
    expected_p10 = p.target_mass.m_as("kg") * dist.ppf(0.1) / m
    # sampling error of a quantile: sqrt(p (1 - p) / n) / f(x_p)
    se = math.sqrt(0.1 * 0.9 / n) / dist.pdf(dist.ppf(0.1)) * p.target_mass.m_as("kg") / m
    assert abs(p.uncertainty.p10_kg - expected_p10) < 4 * se


def test_same_seed_same_numbers_other_seed_other_numbers():
    text = linear([(0.9, 0.8, 0.95), (0.85, 0.7, 0.9)])
    one = plan_of(text, confidence=0.9, draws=DRAWS, seed=11).uncertainty
    two = plan_of(text, confidence=0.9, draws=DRAWS, seed=11).uncertainty
    other = plan_of(text, confidence=0.9, draws=DRAWS, seed=12).uncertainty
    assert one == two
    assert one.p10_kg != other.p10_kg


def test_convergent_step_is_limited_by_the_scarcer_branch_worked_by_hand():
    # A drawn, B and C fixed: C charges min(arrived IA / 1, arrived IB / 1.1) mol of IA
    # per planned mol; IB arrives exactly as planned, so the delivery is min(g_A, 1)
    p = plan_route(load_route_text(convergent((0.9, 0.8, 0.95), 0.9, 0.8)))
    fw = forward_structure(p)
    ids = [s.id for s in fw.steps]
    g = {"A": 1.0, "B": 1.0, "C": 1.0}
    # A does 5 % better than planned: IB (fixed) is scarcer, nothing more is delivered
    r, d = run_forward(fw, [{**g, "A": 1.05}[i] for i in ids])
    assert d == pytest.approx(1.0, rel=1e-15) and r[ids.index("C")] == pytest.approx(1.0, rel=1e-15)
    # A does 10 % worse: C can charge 0.9 of its IA, and so 0.9 of IB and of THF
    r, d = run_forward(fw, [{**g, "A": 0.9}[i] for i in ids])
    assert d == pytest.approx(0.9, rel=1e-12) and r[ids.index("C")] == pytest.approx(0.9, rel=1e-12)
    # both branches off: the scarcer per mole needed wins (IA 0.95, IB 0.92)
    r, d = run_forward(fw, [{"A": 0.95, "B": 0.92, "C": 1.0}[i] for i in ids])
    assert d == pytest.approx(0.92, rel=1e-12)
    # and the C step's own yield multiplies what it charges
    r, d = run_forward(fw, [{"A": 0.95, "B": 0.92, "C": 1.05}[i] for i in ids])
    assert d == pytest.approx(0.92 * 1.05, rel=1e-12)


def test_convergent_draws_against_scipy():
    # delivery = required * min(Y_A / m, 1): P(target) = P(Y_A >= m), P10 from the beta quantile
    a, m, b = 0.80, 0.90, 0.95
    n = 100_000
    p = plan_route(load_route_text(convergent((m, a, b), 0.9, 0.8)), confidence=0.9, draws=n, seed=5)
    u = p.uncertainty
    dist = stats.beta(*pert_shape(a, m, b), loc=a, scale=b - a)  # scipy as the reference
    prob = dist.sf(m)
    assert abs(u.probability_of_target - prob) < 4 * math.sqrt(prob * (1 - prob) / n)
    assert u.p90_kg == pytest.approx(u.required_kg, rel=1e-12)
    se = math.sqrt(0.1 * 0.9 / n) / dist.pdf(dist.ppf(0.1)) * u.required_kg / m
    assert abs(u.p10_kg - u.required_kg * dist.ppf(0.1) / m) < 4 * se


def test_an_intermediate_used_by_two_steps_is_shared_as_planned():
    # S1 makes I1; S2 turns I1 into I2; the target step takes both I1 and I2
    text = """route: diamond
target: {material: T, amount: 5 kg}
materials:
  R: {formula: C6H6O}
  MeOH: {formula: CH4O, density: 0.792 g/mL}
  H2O: {formula: H2O, density: 1.0 g/mL}
  I1: {formula: C7H8O}
  I2: {formula: C8H10O}
  T: {formula: C15H16O}
steps:
  - {id: S1, equation: R + MeOH -> I1 + H2O, yield: {expected: 90 %, low: 80 %, high: 95 %}}
  - {id: S2, equation: I1 + MeOH -> I2 + H2O, yield: 80 %}
  - id: S3
    equation: I1 + I2 -> T + H2O
    limiting: I2
    yield: 85 %
    charges: [{material: I2}, {material: I1, equiv: 1.2}]
"""
    p = plan_route(load_route_text(text))
    fw = forward_structure(p)
    r, d = run_forward(fw, [0.9, 1.0, 1.0])
    # each user of I1 gets 0.9 of its planned share, and what they take adds up to what S1 made
    made = 0.9 * p.step("S1").product_mol.m_as("mol")
    used = r[1] * p.step("S2").limiting_mol.m_as("mol") + r[2] * 1.2 * p.step("S3").limiting_mol.m_as("mol")
    assert r[1] == pytest.approx(0.9) and r[2] == pytest.approx(0.9) and d == pytest.approx(0.9)
    assert used == pytest.approx(made, rel=1e-12)


# ------------------------------------------------------------------------ laws


@pytest.mark.parametrize("ends", [[(0.88, 0.95), (0.85, 0.95), (0.80, 0.95), (0.70, 0.95)],
                                  [(0.85, 0.93), (0.85, 0.95), (0.85, 0.98), (0.85, 1.0)]],
                         ids=["lower low", "higher high"])
def test_widening_a_range_never_raises_p10(ends):
    p10 = []
    for low, high in ends:
        text = linear([(0.9, 0.85, 0.95), (0.92, low, high)])
        p10.append(plan_of(text, confidence=0.9, draws=DRAWS, seed=2).uncertainty.p10_kg)
    assert all(b < a for a, b in zip(p10, p10[1:])), p10


def test_confidence_target_and_purchases_rise_with_the_confidence():
    text = linear([(0.9, 0.8, 0.95), (0.85, 0.7, 0.9), (0.95, 0.9, 0.98)])
    runs = [plan_of(text, confidence=c, draws=DRAWS, seed=4).uncertainty for c in (0.5, 0.8, 0.9, 0.95)]
    targets = [u.target_kg for u in runs]
    assert all(b > a for a, b in zip(targets, targets[1:])), targets
    for i in range(len(runs[0].raw_materials)):
        needs = [u.raw_materials[i][1] for u in runs]
        assert all(b > a for a, b in zip(needs, needs[1:])), (runs[0].raw_materials[i][0], needs)


def test_confidence_target_at_50_percent_is_target_times_expected_over_median():
    # an independent estimate of the median delivery: scipy.stats.beta draws of the two
    # yields, multiplied (a linear route delivers required * prod(Y_s / m_s))
    steps = [(0.9, 0.8, 0.95), (0.85, 0.7, 0.9)]
    n = 100_000
    u = plan_of(linear(steps), confidence=0.5, draws=n, seed=9).uncertainty
    rs = np.random.RandomState(123)
    ratio = np.ones(n)
    for m, a, b in steps:
        ratio *= stats.beta(*pert_shape(a, m, b), loc=a, scale=b - a).rvs(size=n, random_state=rs) / m
    median = np.median(ratio)
    h = 0.01
    density = 2 * h / (np.quantile(ratio, 0.5 + h) - np.quantile(ratio, 0.5 - h))
    se = math.sqrt(0.25 / n) / density  # of each median estimate
    expected = 10.0 / median
    assert abs(u.target_kg - expected) < 4 * math.sqrt(2) * se * expected / median


def test_later_steps_need_more_when_earlier_ones_do_well():
    # only S1 is drawn: S1's own raw materials are fixed, S2's follow what S1 delivers
    p = plan_of(linear([(0.9, 0.8, 0.95), 0.9]), confidence=0.9, draws=DRAWS, seed=1)
    u = p.uncertainty
    planned = {r.material: r.mass.m_as("kg") for r in p.raw_materials}
    scale = u.target_kg / 10.0
    need = dict(u.raw_materials)
    # I0 is charged only in S1, at its planned mass times the scale
    assert need["I0"] == pytest.approx(planned["I0"] * scale, rel=1e-12)
    # THF is charged in S1 and S2; at 90 % the S2 share is larger than planned
    assert need["THF"] > planned["THF"] * scale


def test_the_forward_run_is_dimensionally_sound_with_pint():
    # the same expressions on pint Quantities: moles in mol, ratios dimensionless
    from dataclasses import replace

    p = plan_route(load_route_text(convergent((0.9, 0.8, 0.95), (0.85, 0.8, 0.9), 0.8)))
    fw = forward_structure(p)
    with_units = replace(fw, steps=tuple(replace(s, made_mol=Q(s.made_mol, "mol"), stock_mol=Q(s.stock_mol, "mol"))
                                         for s in fw.steps))
    g = [0.97, 0.93, 1.02]
    r_plain, d_plain = run_forward(fw, g)
    r_units, d_units = run_forward(with_units, [Q(x, "") for x in g])
    assert d_units.dimensionless and all(getattr(x, "dimensionless", True) for x in r_units)
    assert float(d_units.m_as("")) == pytest.approx(float(d_plain), rel=1e-15)


def test_step_shares_of_the_spread_follow_the_yield_variances_on_a_linear_route():
    # delivery = required * prod(g_s): to first order each step's share of the variance is
    # cv_s^2 / sum(cv^2), with cv the coefficient of variation of its yield (scipy.stats.beta
    # as the reference for the beta-PERT moments); the shares of independent steps add to ~1
    steps = [(0.9, 0.8, 0.95), (0.85, 0.6, 0.9), (0.95, 0.9, 0.98)]
    u = plan_of(linear(steps), confidence=0.9, draws=50_000, seed=6).uncertainty
    cv2 = []
    for m, a, b in steps:
        dist = stats.beta(*pert_shape(a, m, b), loc=a, scale=b - a)
        cv2.append(dist.var() / dist.mean() ** 2)
    share = dict(u.contributions)
    assert [sid for sid, _s in u.contributions] == ["S2", "S1", "S3"]
    for k, c in enumerate(cv2, start=1):
        assert share[f"S{k}"] == pytest.approx(c / sum(cv2), abs=0.03)
    assert sum(share.values()) == pytest.approx(1.0, abs=0.02)


def test_doubling_the_target_doubles_every_mass_and_keeps_the_probability():
    text = convergent((0.9, 0.8, 0.95), (0.85, 0.75, 0.9), (0.8, 0.7, 0.85))
    route = load_route_text(text)
    one = plan_route(route, Q(10, "kg"), confidence=0.9, draws=DRAWS, seed=8).uncertainty
    two = plan_route(route, Q(20, "kg"), confidence=0.9, draws=DRAWS, seed=8).uncertainty
    assert two.probability_of_target == one.probability_of_target
    assert [s for s, _ in two.contributions] == [s for s, _ in one.contributions]
    assert [x for _, x in two.contributions] == pytest.approx([x for _, x in one.contributions], rel=1e-9)
    for name in ("p10_kg", "p50_kg", "p90_kg", "mean_kg", "target_kg"):
        assert getattr(two, name) == pytest.approx(2 * getattr(one, name), rel=1e-12), name
    for (k1, m1), (k2, m2) in zip(one.raw_materials, two.raw_materials):
        assert k1 == k2 and m2 == pytest.approx(2 * m1, rel=1e-12)
