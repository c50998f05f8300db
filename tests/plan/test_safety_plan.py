"""Heat and gas per batch from a whole plan: a batch worked by hand, and the laws.

The route is ``tests/data/routes/safety.yaml``: sub (100 g/mol) + reag (50 g/mol) -> prod
(105.991 g/mol) + CO2, 80 % yield, for 847.928 g of prod, in a 10 L vessel.
"""

from __future__ import annotations


import pytest

from conftest import route_text
from routeplan.plan.planner import plan_route
from routeplan.route.load import load_route_text
from routeplan.units import Q

ROUTE = route_text("safety.yaml")
R = 8.314462618  # J/(mol K), exact in the 2019 SI (CODATA 2018)


def plan_of(text: str = ROUTE, target=None):
    return plan_route(load_route_text(text, "safety.yaml"), target)


def test_a_batch_worked_by_hand():
    sp = plan_of().step("G1")
    s = sp.safety
    t = s.thermal
    n_prod = 847.928 / 105.991          # 8.000 mol of product to make
    n_lim = n_prod / 0.80               # 10.00 mol of sub (yield 80 %)
    m_sub = n_lim * 100.0 / 1000        # 1.000 kg
    m_reag = 1.2 * n_lim * 50.0 / 1000  # 0.600 kg (1.2 equiv)
    m_solvent = 5 * m_sub * 1.0         # 5 L/kg x 1 kg x 1.0 kg/L = 5.000 kg
    m = m_sub + m_reag + m_solvent      # 6.600 kg reaction mass (one batch: 0.5 L + 5 L = 5.5 L <= 8 L)
    assert sp.batches == 1
    assert t.reaction_mass_kg_per_batch == pytest.approx(m, rel=1e-9)
    dT = 132.0 * n_lim / (m * 2.0)      # -dH n / (m cp) = 1320 kJ / 13.2 kJ/K = 100.0 K
    assert t.delta_T_ad_K == pytest.approx(dT, rel=1e-9) and dT == pytest.approx(100.0, rel=1e-6)
    assert t.severity == "medium"       # 50 K <= 100 K < 200 K
    assert t.accumulation == 0.40
    assert t.mtsr_C == pytest.approx(25.0 + 0.40 * dT, rel=1e-9)  # Tp + X_ac dTad = 65.0 degC
    assert t.criticality_class == 3     # MTT 60 <= MTSR 65 < TD24 120
    (g,) = s.gas_evolved
    n_gas = 1 / 1 * n_lim               # nu_CO2 / nu_sub x n_lim = 10.00 mol (full conversion)
    V = n_gas * R * 298.15 / 1e5 * 1000  # nRT/p at 25 degC, 1 bar = 247.896 L
    assert g.mol_per_batch == pytest.approx(n_gas, rel=1e-9)
    assert g.volume_L_per_batch == pytest.approx(V, rel=1e-9) and V == pytest.approx(247.8957, rel=1e-6)
    assert g.rate_L_per_min == pytest.approx(V / 120.0, rel=1e-9)  # V / dosing time (2 h)
    assert (g.temperature_C, g.pressure_bar) == (pytest.approx(25.0), pytest.approx(1.0))
    assert s.free_volume_L == pytest.approx(10.0 - 5.5)  # nominal volume less the batch volume


def test_its_warnings_name_the_class_and_the_gas_against_the_free_volume():
    text = "\n".join(p.render() for p in plan_of().warnings)
    assert "criticality class 3" in text
    assert "free volume of vessel R10 (4.5 L, 55.1 times)" in text
    assert text.count("never replaces calorimetry and a hazard assessment by qualified people") == 2
    assert "no dosing" not in text
    assert "safety.yaml:" in text and "steps[0]" in text


def test_doubling_the_target_with_the_same_batches_doubles_the_gas_and_keeps_dTad():
    one = plan_of(ROUTE.replace("volume: 10 L", "volume: 100 L"))
    two = plan_of(ROUTE.replace("volume: 10 L", "volume: 100 L"), Q(2 * 847.928, "g"))
    a, b = one.step("G1"), two.step("G1")
    assert a.batches == b.batches == 1
    assert b.safety.gas_evolved[0].mol_per_batch == pytest.approx(2 * a.safety.gas_evolved[0].mol_per_batch)
    assert b.safety.gas_evolved[0].volume_L_per_batch == pytest.approx(2 * a.safety.gas_evolved[0].volume_L_per_batch)
    assert b.safety.gas_evolved[0].rate_L_per_min == pytest.approx(2 * a.safety.gas_evolved[0].rate_L_per_min)
    assert b.safety.thermal.delta_T_ad_K == pytest.approx(a.safety.thermal.delta_T_ad_K)
    assert b.safety.thermal.mtsr_C == pytest.approx(a.safety.thermal.mtsr_C)


def test_twice_the_batches_halves_the_gas_per_batch_and_keeps_dTad():
    one = plan_of()  # 5.5 L in a 10 L vessel at 80 %: one batch
    two = plan_of(ROUTE.replace("volume: 10 L", "volume: 5 L"))  # 4 L usable: two batches
    a, b = one.step("G1"), two.step("G1")
    assert (a.batches, b.batches) == (1, 2)
    assert b.safety.gas_evolved[0].volume_L_per_batch == pytest.approx(a.safety.gas_evolved[0].volume_L_per_batch / 2)
    assert b.safety.thermal.reaction_mass_kg_per_batch == pytest.approx(a.safety.thermal.reaction_mass_kg_per_batch / 2)
    assert b.safety.thermal.delta_T_ad_K == pytest.approx(a.safety.thermal.delta_T_ad_K)


def test_no_accumulation_gives_mtsr_equal_to_tp():
    t = plan_of(ROUTE.replace("accumulation: 40 %", "accumulation: 0 %")).step("G1").safety.thermal
    assert t.mtsr_C == pytest.approx(t.process_temperature_C) and t.process_temperature_C == pytest.approx(25.0)
    assert t.criticality_class == 1


def test_a_batch_step_takes_the_whole_rise_and_is_warned_for_its_gas():
    text = ROUTE.replace("    dosing: {material: reag, time: 2 h}\n", "").replace("      accumulation: 40 %\n", "")
    plan = plan_of(text)
    s = plan.step("G1").safety
    assert s.thermal.accumulation is None and s.gas_evolved[0].rate_L_per_min is None
    assert s.thermal.mtsr_C == pytest.approx(25.0 + 100.0)
    assert s.thermal.criticality_class == 4  # MTSR 125 >= TD24 120 > MTT 60
    assert any("no dosing" in p.message for p in plan.warnings)


def test_endothermic_step_has_a_negative_rise_and_nothing_is_clamped():
    t = plan_of(ROUTE.replace("-132 kJ/mol", "66 kJ/mol")).step("G1").safety.thermal
    assert t.delta_T_ad_K == pytest.approx(-50.0)
    assert t.mtsr_C == pytest.approx(25.0 - 0.4 * 50.0)
    assert t.severity == "low"


def test_process_temperature_and_units_other_than_degC():
    text = ROUTE.replace("conditions: {temperature: 25 degC, pressure: 1 bar}",
                         "conditions: {temperature: 77 degF, pressure: 14.5038 psi}")
    g = plan_of(text).step("G1").safety.gas_evolved[0]
    assert g.temperature_C == pytest.approx(25.0)
    assert g.pressure_bar == pytest.approx(1.0, rel=1e-5)
    text = ROUTE.replace("      accumulation: 40 %\n", "      accumulation: 40 %\n      process_temperature: 303.15 K\n")
    assert plan_of(text).step("G1").safety.thermal.mtsr_C == pytest.approx(30.0 + 40.0)


def test_a_step_without_thermal_data_is_not_screened_but_its_gas_is_counted():
    text = ROUTE[: ROUTE.index("    thermal:")]
    s = plan_of(text).step("G1").safety
    assert s.thermal is None and not s.screened
    assert s.gas_evolved[0].mol_per_batch == pytest.approx(10.0)


def test_default_conditions_are_20_degC_and_1_01325_bar():
    text = ROUTE.replace("    conditions: {temperature: 25 degC, pressure: 1 bar}\n", "")
    g = plan_of(text).step("G1").safety.gas_evolved[0]
    assert (g.temperature_C, g.pressure_bar) == (pytest.approx(20.0), pytest.approx(1.01325))
    assert g.volume_L_per_batch == pytest.approx(10.0 * R * 293.15 / 101325.0 * 1000)


TELESCOPED = ROUTE.replace("    vessel: R10\n", "    vessel: R10\n    isolated: false\n", 1) + """
  - id: G2
    equation: prod + reag -> final
    yield: 100 %
    charges:
      - {material: prod}
      - {material: reag, equiv: 1.0}
    thermal:
      reaction_enthalpy: -10 kJ/mol
      heat_capacity: 2.0 kJ/(kg*K)
"""


def test_a_telescoped_mixture_counts_without_the_gas_its_step_evolved():
    text = TELESCOPED.replace("  material: prod\n  amount: 847.928 g", "  material: final\n  amount: 1247.928 g")
    text = text.replace("  CO2:\n", "  final:\n    molar_mass: 155.991 g/mol\n  CO2:\n")
    plan = plan_of(text)
    g1, g2 = plan.step("G1"), plan.step("G2")
    n_final = 1247.928 / 155.991                        # 8.000 mol; G2 at 100 % takes 8 mol of prod
    assert g2.limiting_mol.m_as("mol") == pytest.approx(n_final)
    charged_g1 = 1.0 + 0.6 + 5.0                        # everything charged to G1 [kg]
    co2 = 10.0 * 44.009 / 1000                          # CO2 evolved by G1 at full conversion [kg]
    reag_g2 = n_final * 50.0 / 1000                     # 1 equiv of reag in G2 [kg]
    m = charged_g1 - co2 + reag_g2                      # whole G1 product taken: share 1
    assert g2.safety.thermal.reaction_mass_kg_per_batch == pytest.approx(m, rel=1e-4)
    assert g1.safety.thermal.reaction_mass_kg_per_batch == pytest.approx(charged_g1)


HYDROGENATION = route_text("hydrogenation.yaml")


def test_gas_taken_up_is_counted_at_normal_conditions():
    plan = plan_of(HYDROGENATION)
    sp = plan.step("H1")
    (g,) = sp.safety.gas_taken_up
    n_aniline = 9312.9 / 93.129                          # about 100 mol (aniline about 93.13 g/mol, from memory)
    n_H2 = 3 * sp.limiting_mol.m_as("mol")               # 3 H2 per nitrobenzene, 100 % yield
    assert sp.limiting_mol.m_as("mol") == pytest.approx(n_aniline, rel=1e-3)
    assert g.mol_per_batch == pytest.approx(n_H2)
    assert g.normal_volume_L_per_batch == pytest.approx(n_H2 * 22.41397, rel=1e-6)  # CODATA 2018 molar volume
    assert g.vent == ("flammable",)
    assert sp.safety.gas_evolved == ()
    # the reaction mass holds the hydrogen and the catalyst (ROUTE-FORMAT.md readings)
    masses = sum(c.mass.m_as("kg") for c in sp.charges)
    assert sp.batch.reaction_mass.m_as("kg") == pytest.approx(masses)


@pytest.mark.parametrize("hazards, vent", [("[toxic, corrosive]", ("toxic",)), ("[asphyxiant]", ()),
                                           ("[non-toxic]", ()), ("[highly flammable, toxic]", ("flammable", "toxic"))])
def test_vent_notes_come_from_the_gas_hazards(hazards, vent):
    text = ROUTE.replace("    hazards: [asphyxiant]", f"    hazards: {hazards}")
    assert plan_of(text).step("G1").safety.gas_evolved[0].vent == vent
