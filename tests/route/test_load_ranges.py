"""Plain numbers far out of range are typos, reported where they stand."""

import pytest

from conftest import run_cli, write_route

from test_key_aliases import BASE as _ALIASES

# the same small route, with the methanol line to fill in
BASE = _ALIASES.replace("KEY: 1.5", "LINE")


@pytest.mark.parametrize("line", ["equiv: 1e300", "volumes: 2e6", "mol_percent: 1e9", "mass_ratio: 1e7"])
def test_far_out_of_range_counts(tmp_path, line):
    result = run_cli("check", write_route(tmp_path, BASE.replace("LINE", line)))
    assert result.exit_code == 2
    assert "route.yaml:15:" in result.stderr and "far out of range" in result.stderr  # the methanol line
    assert "Traceback" not in result.output


def test_large_but_sane_counts_pass(tmp_path):
    # 50 equiv of methanol used as its own solvent: large, but a real practice
    result = run_cli("check", write_route(tmp_path, BASE.replace("LINE", "equiv: 50")))
    assert result.exit_code == 0, result.output
