"""One unit per kind for a whole plan: the named sets, the choice by scale, ``--units``."""

from __future__ import annotations

import re

import pytest

from conftest import ROOT, run_cli
from routeplan.errors import QuantityError
from routeplan.views.display_units import (LAB_BELOW_KG, PLANT_FROM_KG, SETS, UNITS, choose_units, parse_units,
                                           scale_set)

DEMO = ROOT / "demo_routes" / "hx17-linear.yaml"


@pytest.mark.parametrize("kind, base", [("amount", "mol"), ("mass", "kg"), ("volume", "L")])
def test_every_factor_agrees_with_pint(kind, base):
    # pint's definitions follow NIST SP 811 (2008) and the SI prefixes; pint is the reference
    from routeplan.units import Q

    for u in UNITS[kind]:
        symbol = "m**3" if u.symbol == "m³" else u.symbol
        assert Q(1.0, symbol).m_as(base) == pytest.approx(u.factor, rel=1e-15), u.symbol


def test_each_named_set_keeps_molar_mass_and_density_readable():
    # in lab and kilo, mass over amount is a molar mass in kg/mol and mass over volume a
    # density in kg/L, so a row reads the same at both scales
    for name in ("lab", "kilo"):
        u = SETS[name]
        assert u.mass.factor / u.amount.factor == 1.0
        assert u.mass.factor / u.volume.factor == 1.0


@pytest.mark.parametrize("target_kg, name", [
    (0.05, "lab"), (LAB_BELOW_KG * 0.999, "lab"), (LAB_BELOW_KG, "kilo"), (25.0, "kilo"),
    (PLANT_FROM_KG * 0.999, "kilo"), (PLANT_FROM_KG, "plant"), (500.0, "plant"), (20_000.0, "plant"),
])
def test_the_scale_chooses_the_set(target_kg, name):
    # thresholds: common practice, no source (documented in docs/terminal.md)
    assert scale_set(target_kg).name == name


def test_a_list_replaces_only_the_kinds_it_names():
    u = choose_units(25.0, "t, m3")
    assert (u.amount.symbol, u.mass.symbol, u.volume.symbol) == ("mol", "t", "m³")
    assert u.name == "mol,t,m3"
    # written in full, in any order and case, a list that is a named set is that set
    assert choose_units(500.0, "ML, G, MMOL") is SETS["lab"]
    assert choose_units(0.01, "auto") is SETS["lab"] and choose_units(0.01, None) is SETS["lab"]
    assert choose_units(0.01, "Plant") is SETS["plant"]


@pytest.mark.parametrize("text, said", [
    ("lb", "'lb' is not a set or a unit routeplan shows"),
    ("g,kg", "two units of mass (g and kg)"),
    ("kg,,L", "an empty entry"),
    (" ", "needs a value"),
    ("kilos", "'kilos' is not a set"),
])
def test_a_bad_value_says_what_would_be_right(text, said):
    with pytest.raises(QuantityError) as info:
        parse_units(text)
    err = info.value
    assert said in err.message and err.key == "--units"
    assert "lab, kilo, plant" in err.render() or "one unit of each kind" in err.render()


@pytest.mark.parametrize("command", ["plan", "compare", "explain"])
def test_a_bad_value_exits_2_before_planning(command):
    args = {"plan": [DEMO], "compare": [DEMO, DEMO], "explain": [DEMO, "S1", "Ac2O"]}[command]
    result = run_cli(command, *args, "--units", "furlong")
    assert result.exit_code == 2, result.output
    assert "error: --units: 'furlong' is not a set or a unit routeplan shows" in result.stderr
    assert "mmol, mol, kmol (amount); mg, g, kg, t (mass); mL, L, m3 (volume)" in result.stderr
    assert "Traceback" not in result.output and result.stdout == ""


def test_help_names_the_choices():
    out = run_cli("plan", "--help").stdout
    assert "--units" in out and "g,mmol,mL" in " ".join(out.split())


def test_the_units_help_states_the_sets_and_thresholds_of_the_module():
    # the help text is written out in commands/common (so that --help loads no view); it
    # must say what this module does: each set's units, the thresholds, the units offered
    from routeplan.commands.common import UNITS_HELP

    for name, u in SETS.items():
        assert f"{name} = {u.amount.symbol}, {u.mass.symbol}, {u.volume.symbol} " in UNITS_HELP
    assert f"mL below {LAB_BELOW_KG:g} kg of target;" in UNITS_HELP
    assert f"L below {PLANT_FROM_KG:g} kg;" in UNITS_HELP and f"L from {PLANT_FROM_KG:g} kg)" in UNITS_HELP
    for units in UNITS.values():
        assert ", ".join("m3" if u.symbol == "m³" else u.symbol for u in units) in UNITS_HELP


@pytest.mark.parametrize("units", ["lab", "plant", "t,m3"])
def test_explain_closes_on_the_numbers_plan_prints_in_the_same_units(units):
    # the last line of explain is the plan's own row, digit for digit, whatever the units
    table = run_cli("plan", DEMO, "--units", units).stdout
    row = next(x for x in table.splitlines() if x.split()[:2] == ["2", "acetone"])
    out = run_cli("explain", DEMO, "S2", "acetone", "--units", units).stdout.splitlines()
    closing = next(x for x in out if x.startswith("= "))
    numbers = [part.rsplit(" ", 1)[0] for part in closing[2:].split(" acetone")[0].split(", ")]
    cells = re.split(r" {2,}", row.strip())  # columns are two spaces apart; 13 190 is one cell
    assert numbers == cells[4:7], (closing, row)
