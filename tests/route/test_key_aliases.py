"""Spellings chemists often use for a key get the key routeplan reads as a suggestion."""

import pytest

from conftest import run_cli, write_route

BASE = """
route: aliases
target: {material: B, amount: 1 kg}
materials:
  A: {formula: C6H6O, density: 1.07 g/mL}
  B: {formula: C7H8O}
  MeOH: {formula: CH4O, density: 0.792 g/mL}
  W: {formula: H2O}
steps:
  - id: S1
    equation: A + MeOH -> B + W
    yield: 90 %
    charges:
      - {material: A}
      - {material: MeOH, KEY: 1.5}
"""


@pytest.mark.parametrize("written, meant", [("eq", "equiv"), ("equivalents", "equiv"), ("mol%", "mol_percent"),
                                            ("vol", "volumes"), ("vols", "volumes"), ("wt", "mass_ratio"),
                                            ("equi", "equiv")])
def test_charge_key_aliases(tmp_path, written, meant):
    path = write_route(tmp_path, BASE.replace("KEY", written))
    result = run_cli("check", path)
    assert result.exit_code == 2
    assert f"unknown key '{written}'" in result.stderr
    assert f"did you mean '{meant}'?" in result.stderr
    assert "route.yaml:15:26:" in result.stderr  # line and column of the misspelt key


def test_material_key_aliases(tmp_path):
    path = write_route(tmp_path, BASE.replace("KEY", "equiv").replace("{formula: C7H8O}", "{formula: C7H8O, MW: 108 g/mol}"))
    result = run_cli("check", path)
    assert result.exit_code == 2
    assert "unknown key 'MW' (did you mean 'molar_mass'?)" in result.stderr
