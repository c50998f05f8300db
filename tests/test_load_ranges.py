"""Plain numbers far out of range are typos, reported where they stand."""

import pytest

from conftest import run_cli, write_route

BASE = """route: ranges
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
      - {material: MeOH, LINE}
"""


@pytest.mark.parametrize("line", ["equiv: 1e300", "volumes: 2e6", "mol_percent: 1e9", "mass_ratio: 1e7"])
def test_far_out_of_range_counts(tmp_path, line):
    result = run_cli("check", write_route(tmp_path, BASE.replace("LINE", line)))
    assert result.exit_code == 2
    assert "route.yaml:14:" in result.stderr and "far out of range" in result.stderr
    assert "Traceback" not in result.output


def test_large_but_sane_counts_pass(tmp_path):
    # 50 equiv of methanol used as its own solvent: large, but a real practice
    result = run_cli("check", write_route(tmp_path, BASE.replace("LINE", "equiv: 50")))
    assert result.exit_code == 0, result.output
