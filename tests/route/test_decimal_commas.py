"""Decimal commas inside a {...} flow mapping, and thousands separators in a stock list.

YAML ends a flow mapping's value at a comma, so ``{equiv: 1,2}`` is ``equiv: 1`` and a key
``2``: routeplan recognises the pattern from the nodes' positions and says "decimal comma",
once, where the number is.  In a stock CSV ``"1,000",L`` may be 1000 L or 1.000 L: both
readings are shown, neither is chosen.
"""

from __future__ import annotations

import pytest

from conftest import run_cli, write_route
from routeplan.errors import RouteError
from routeplan.route.load import load_route_text
from route_edits import change


def _one_error(text: str):
    with pytest.raises(RouteError) as info:
        load_route_text(text, "route.yaml")
    assert len(info.value.problems) == 1, info.value.render()
    return info.value.problems[0]


def test_decimal_comma_in_flow_mapping_equiv(good_text):
    text = change(good_text, [("{material: Ac2O, equiv: 1.1}", "{material: Ac2O, equiv: 1,2}")])
    p = _one_error(text)
    line = next(i for i, t in enumerate(text.splitlines(), 1) if "equiv: 1,2" in t)
    column = text.splitlines()[line - 1].index("1,2") + 1
    assert (p.location.line, p.location.column) == (line, column)
    assert p.location.key == "steps[0].charges[2].equiv"
    assert "decimal comma" in p.render() and "write 1.2" in p.render()
    assert "unknown key" not in p.render()


def test_decimal_comma_in_flow_mapping_density(good_text):
    text = change(good_text, [("{mass_fraction: 50 %, density: 1.52 g/mL}",
                               "{mass_fraction: 50 %, density: 1,07 g/mL}")])
    p = _one_error(text)
    assert p.location.key == "materials.caustic.solution.density"
    assert "decimal comma" in p.render() and "write 1.07 g/mL" in p.render()
    assert "has no unit" not in p.render()


def test_decimal_comma_through_the_command_line(tmp_path, good_text):
    text = change(good_text, [("{material: Ac2O, equiv: 1.1}", "{material: Ac2O, equiv: 1,2}")])
    path = write_route(tmp_path, text)
    result = run_cli("plan", path)
    assert result.exit_code == 2
    assert "decimal comma, write 1.2" in result.stderr and "Traceback" not in result.output


@pytest.mark.parametrize("flow", [
    "{material: Ac2O, equiv: 1, role: reagent}",     # a comma and a space: two keys, as meant
    "{material: Ac2O, equiv: 1.1}",
])
def test_commas_between_keys_are_not_decimal_commas(good_text, flow):
    load_route_text(change(good_text, [("{material: Ac2O, equiv: 1.1}", flow)]), "route.yaml")


def _stock_error(tmp_path, good_text, amount: str) -> str:
    route = write_route(tmp_path, good_text)
    stock = tmp_path / "stock.csv"
    stock.write_text(f"material,amount,unit\nacetone,{amount},L\n", encoding="utf-8")
    result = run_cli("plan", route, "--stock", stock, "-q")
    assert result.exit_code == 2 and "Traceback" not in result.output
    return result.stderr


def test_thousands_separator_in_stock_csv_shows_both_readings(tmp_path, good_text):
    err = _stock_error(tmp_path, good_text, '"1,000"')
    assert "stock.csv:2:" in err
    assert "1000 L (a thousands separator) or 1.000 L (a decimal comma)" in err
    assert "write '1.000 L'" not in err  # never advised as one litre


def test_a_plain_decimal_comma_in_stock_csv_is_still_corrected(tmp_path, good_text):
    err = _stock_error(tmp_path, good_text, '"1,5"')
    assert "decimal comma" in err and "write '1.5 L'" in err
