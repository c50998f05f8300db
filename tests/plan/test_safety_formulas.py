"""The formulas of the heat and gas screening estimate (routeplan.plan.safety) against
their definitions and against reference values."""

from __future__ import annotations

import math

import pytest

from routeplan.plan.safety import (R_J_PER_MOL_K, criticality_class, delta_T_ad_K, gas_evolved_mol,
                                   ideal_gas_volume_L, mtsr_K, normal_volume_L, severity)
from routeplan.units import Q


def test_gas_constant_is_the_exact_2019_si_value():
    # CODATA 2018 / 2019 SI: R = N_A * k = 6.02214076e23 * 1.380649e-23, exact
    assert R_J_PER_MOL_K == pytest.approx(6.02214076e23 * 1.380649e-23, rel=1e-10)


def test_molar_volume_at_101_325_kPa():
    # CODATA 2018: molar volume of an ideal gas at 273.15 K and 101.325 kPa, 22.413 969 54 L/mol
    assert ideal_gas_volume_L(1.0, 273.15, 101325.0) == pytest.approx(22.41396954, rel=1e-9)
    assert normal_volume_L(1.0) == pytest.approx(22.41397, abs=5e-6)


def test_molar_volume_at_100_kPa():
    # CODATA 2018: molar volume of an ideal gas at 273.15 K and 100 kPa, 22.710 954 64 L/mol
    assert ideal_gas_volume_L(1.0, 273.15, 100000.0) == pytest.approx(22.71095464, rel=1e-9)


def test_volumes_in_cubic_metres_and_cubic_feet():
    # NIST SP 811 (2008), appendix B.9: 1 L = 1.0e-03 m3 (exact); 1 ft3 = 2.831 685 E-02 m3
    V_L = ideal_gas_volume_L(1000.0, 273.15, 101325.0)  # 1 kmol at normal conditions
    assert Q(V_L, "L").m_as("m**3") == pytest.approx(22.41397, abs=5e-6)
    assert Q(V_L, "L").m_as("ft**3") == pytest.approx(V_L * 1e-3 / 2.831685e-02, rel=1e-6)
    assert Q(V_L, "L").m_as("ft**3") == pytest.approx(791.5, abs=0.1)


def test_volume_is_proportional_to_n_and_T_and_inverse_to_p():
    V = ideal_gas_volume_L(2.0, 300.0, 2e5)
    assert ideal_gas_volume_L(4.0, 300.0, 2e5) == pytest.approx(2 * V)
    assert ideal_gas_volume_L(2.0, 600.0, 2e5) == pytest.approx(2 * V)
    assert ideal_gas_volume_L(2.0, 300.0, 4e5) == pytest.approx(V / 2)


def test_gas_evolved_follows_the_coefficients():
    # 2 ArOH + K2CO3 + 2 RBr -> ... + CO2: 1 CO2 per 2 mol of limiting ArOH
    assert gas_evolved_mol(1.0, 2.0, 10.0) == 5.0
    assert gas_evolved_mol(2.0, 1.0, 10.0) == 20.0


def test_delta_T_ad_definition_and_sign():
    # delta_T_ad = -dH * n / (m * cp) (ROUTE-FORMAT.md, Stoessel 2008)
    assert delta_T_ad_K(-132.0, 10.0, 6.6, 2.0) == pytest.approx(100.0)
    assert delta_T_ad_K(50.0, 10.0, 10.0, 2.0) == pytest.approx(-25.0)  # endothermic: not clamped
    assert delta_T_ad_K(0.0, 10.0, 10.0, 2.0) == 0.0


def test_mtsr_with_accumulation():
    assert mtsr_K(298.15, 100.0, 0.0) == 298.15  # nothing accumulated: MTSR = Tp
    assert mtsr_K(298.15, 100.0, 0.4) == pytest.approx(338.15)
    assert mtsr_K(298.15, 100.0) == pytest.approx(398.15)  # a batch step: all of it
    assert mtsr_K(298.15, -25.0) < 298.15  # endothermic


# Stoessel, Chem. Eng. Prog. 1993, 89(10), 68, as ROUTE-FORMAT.md writes the classes; ties go
# to the higher class.
@pytest.mark.parametrize("mtsr, mtt, td24, expected", [
    (99.9, 100.0, 150.0, 1),
    (100.0, 100.0, 150.0, 3),   # MTSR = MTT: class 3, not 1
    (149.9, 100.0, 150.0, 3),
    (150.0, 100.0, 150.0, 4),   # MTSR = TD24: class 4, not 3
    (300.0, 100.0, 150.0, 4),
    (99.9, 150.0, 100.0, 2),
    (100.0, 150.0, 100.0, 5),   # MTSR = TD24 with MTT above it: class 5, not 2
    (200.0, 150.0, 100.0, 5),
    (119.9, 120.0, 120.0, 2),   # MTT = TD24 counts as MTT >= TD24
    (120.0, 120.0, 120.0, 5),
    (20.0, 100.0, 150.0, 1),
])
def test_criticality_classes_and_ties(mtsr, mtt, td24, expected):
    assert criticality_class(mtsr, mtt, td24) == expected


def test_every_class_is_reached_and_none_without_both_temperatures():
    reached = {criticality_class(x, mtt, td24) for x in range(0, 400, 5)
               for mtt, td24 in ((100.0, 150.0), (150.0, 100.0))}
    assert reached == {1, 2, 3, 4, 5}
    assert criticality_class(50.0, None, 150.0) is None
    assert criticality_class(50.0, 100.0, None) is None


@pytest.mark.parametrize("dT, expected", [(-30.0, "low"), (0.0, "low"), (49.9, "low"), (50.0, "medium"),
                                          (199.9, "medium"), (200.0, "high"), (math.inf, "high")])
def test_severity_bounds(dT, expected):
    # ROUTE-FORMAT.md (Stoessel 2008): low below 50 K, medium from 50 K to below 200 K, high from 200 K
    assert severity(dT) == expected


def test_the_heat_formulas_are_dimensionally_sound_with_pint():
    # the same expressions on pint Quantities (the registry's own unit algebra) give kelvin
    dT = delta_T_ad_K(Q(-132.0, "kJ/mol"), Q(10.0, "mol"), Q(6.6, "kg"), Q(2.0, "kJ/(kg*K)"))
    assert dT.to("K").magnitude == pytest.approx(100.0)
    assert mtsr_K(Q(298.15, "K"), dT.to("K"), 0.4).to("K").magnitude == pytest.approx(338.15)
    V = Q(1.0, "mol") * Q(R_J_PER_MOL_K, "J/(mol*K)") * Q(273.15, "K") / Q(101325.0, "Pa")
    assert V.to("L").magnitude == pytest.approx(ideal_gas_volume_L(1.0, 273.15, 101325.0), rel=1e-12)
