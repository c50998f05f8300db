"""The route keys for charge sheets and buying: ``charge_tolerance``, ``charges[].tolerance``,
``steps[].controls``, ``materials.<key>.pack`` and ``bought``.

Read into the Route when right; when wrong, ``routeplan check`` exits 2 with a message
located at file:line:column and key path, and no traceback.
"""

from __future__ import annotations

import pytest

from conftest import run_cli, write_route
from routeplan.route.load import load_route_text
from routeplan.units import Q

BASE = """\
route: keys test
target: {material: P, amount: 1 kg}
materials:
  A: {formula: C6H7NO, pack: 25 kg}
  B: {formula: C4H6O3, density: 1.08 g/mL, pack: 2.5 L}
  W: {formula: H2O, density: 1.0 g/mL, bought: false}
  HCl6M: {formula: HCl, solution: {molarity: 6 mol/L, density: 1.10 g/mL}, pack: 25 L}
  P: {formula: C8H9NO2}
  AcOH: {formula: C2H4O2}
steps:
  - id: S1
    equation: A + B -> P + AcOH
    yield: 90 %
    charges:
      - {material: A}
      - {material: W, volumes: 3}
      - {material: B, equiv: 1.1, tolerance: 0.5 %}
      - {material: HCl6M, equiv: 0.1, role: workup}
    controls:
      - {point: after dosing, check: internal temperature, limit: below 30 °C}
      - {point: end of reaction}
"""


def test_keys_are_read():
    route = load_route_text(BASE.replace("route: keys test", "route: keys test\ncharge_tolerance: 2 %"))
    assert route.charge_tolerance == pytest.approx(0.02)
    step = route.step("S1")
    b = step.charge_of("B")
    assert step.charge_tolerance(b, route) == pytest.approx(0.005)
    assert step.charge_tolerance(step.charge_of("A"), route) == pytest.approx(0.02)
    assert [(c.point, c.check, c.limit) for c in step.controls] == [
        ("after dosing", "internal temperature", "below 30 °C"), ("end of reaction", None, None)]
    m = route.materials
    assert m["A"].pack == Q(25, "kg") and m["B"].pack == Q(2.5, "L") and m["W"].bought is False
    assert m["A"].bought is True and m["P"].pack is None


def test_default_tolerance_is_one_percent():
    route = load_route_text(BASE)
    assert route.charge_tolerance == 0.01  # common practice, no source


def _check(tmp_path, text):
    result = run_cli("check", write_route(tmp_path, text))
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    return result.stderr


@pytest.mark.parametrize("old, new, where, words", [
    ("pack: 25 kg}", "pack: 25 mol/L}", ":4:", ["materials.A.pack", "pack size"]),
    ("pack: 25 kg}", "pack: -3 kg}", ":4:", ["materials.A.pack"]),
    ("pack: 25 kg}", "pack: 25 L}", ":4:", ["materials.A.pack", "no density"]),
    ("bought: false}", "bought: maybe}", ":6:", ["materials.W.bought", "true or false"]),
    ("bought: false}", "bought: false, pack: 10 kg}", ":6:", ["materials.W.pack", "bought: false"]),
    ("P: {formula: C8H9NO2}", "P: {formula: C8H9NO2, pack: 5 kg}", ":8:", ["materials.P.pack", "intermediate"]),
    ("tolerance: 0.5 %", "tolerance: 150", ":17:", ["steps[0].charges[2].tolerance"]),
    ("route: keys test", "route: keys test\ncharge_tolerance: -1 %", ":2:", ["charge_tolerance"]),
    ("{point: end of reaction}", "{check: pH}", ":21:", ["steps[0].controls[1].point", "required"]),
    ("{point: end of reaction}", "{point: end, limit: pH 2}", ":21:", ["steps[0].controls[1]",
                                                                          "limit needs the check"]),
    ("{point: end of reaction}", "{point: end, when: later}", ":21:", ["unknown key 'when'"]),
    ("      - {point: after dosing", "      - {point: ''", ":20:", ["steps[0].controls[0].point", "empty"]),
])
def test_bad_keys_exit_2_located(tmp_path, old, new, where, words):
    assert old in BASE
    err = _check(tmp_path, BASE.replace(old, new, 1))
    assert "route.yaml" + where in err, err
    for w in words:
        assert w in err, err
