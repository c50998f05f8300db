"""A plan's warnings name their amounts in the units of the plan's tables (``--units``);
the JSON plan keeps them in its fixed units (kg, L, mol)."""

from __future__ import annotations

import json
import re

from conftest import ROOT, run_cli

DEMO = ROOT / "demo_routes" / "hx17-linear.yaml"
SCALE_UP = re.compile(r"a batch charges ([\d ]+(?:\.\d+)?) (g|kg) of acetamidophenol, 11\.2 times the largest "
                      r"batch run so far \(([\d ]+(?:\.\d+)?) (g|kg)\)")


def _amounts(text: str) -> tuple[float, str, float, str]:
    m = SCALE_UP.search(text)
    assert m, text
    return float(m.group(1).replace(" ", "")), m.group(2), float(m.group(3).replace(" ", "")), m.group(4)


def test_a_warning_names_its_masses_in_the_plans_units(tmp_path):
    out = tmp_path / "plan.json"
    # at 500 kg step S2 charges 11.2 times its demonstrated batch of 3 kg (the route's line)
    result = run_cli("plan", DEMO, "--target", "500 kg", "--units", "lab", "--json", out)
    assert result.exit_code == 0, result.output
    batch_g, unit_g, shown_g, unit_shown = _amounts(result.stderr)
    assert (unit_g, unit_shown) == ("g", "g")
    assert shown_g == 3000  # demonstrated_batch: 3 kg, in grams
    # the JSON keeps the plan's fixed units, as before
    (warning,) = [w for w in json.loads(out.read_text())["warnings"] if "a batch charges" in w]
    batch_kg, unit_kg, shown_kg, _ = _amounts(warning)
    assert (unit_kg, shown_kg) == ("kg", 3)
    # the same mass, 1000 g per kg (NIST SP 811, appendix B), to the 4 figures printed
    assert abs(batch_g - 1000 * batch_kg) <= 0.5 * 10 ** (len(str(int(batch_g))) - 4)


def test_the_default_units_of_a_kilo_plan_are_the_tables_ones():
    result = run_cli("plan", DEMO, "--target", "500 kg")
    # a 500 kg target is a plant plan: kmol, kg, L; masses stay in kg
    batch, unit, shown, unit_shown = _amounts(result.stderr)
    assert (unit, unit_shown, shown) == ("kg", "kg", 3)
    assert "3.000 kg" in result.stderr  # 4 significant figures, as in the tables


def test_explain_words_warnings_in_its_units():
    result = run_cli("explain", DEMO, "S2", "K2CO3", "--target", "500 kg", "--units", "g,mmol,mL")
    assert result.exit_code == 0, result.output
    batch, unit, shown, _ = _amounts(result.stderr)
    assert unit == "g" and shown == 3000


def test_gas_warnings_give_volumes_in_the_plans_units():
    route = ROOT / "tests" / "data" / "routes" / "safety.yaml"
    lab = run_cli("plan", route, "--quiet").stderr  # a small target: a lab plan, mL
    kilo = run_cli("plan", route, "--quiet", "--units", "kilo").stderr
    lab_line = next(x for x in lab.splitlines() if "the volume of CO2 evolved" in x)
    kilo_line = next(x for x in kilo.splitlines() if "the volume of CO2 evolved" in x)
    lab_V, lab_free, lab_rate = (float(v.replace(" ", "")) for v in re.search(
        r"evolved, ([\d ]+) mL per batch.*R10 \(([\d ]+) mL, .*mean rate ([\d.]+) L/min", lab_line).groups())
    kilo_V, kilo_free, kilo_rate = (float(v) for v in re.search(
        r"evolved, ([\d.]+) L per batch.*R10 \(([\d.]+) L, .*mean rate ([\d.]+) L/min", kilo_line).groups())
    # 1 L = 1000 mL (NIST SP 811, appendix B), to the 4 figures printed
    for mL, L in ((lab_V, kilo_V), (lab_free, kilo_free)):
        assert abs(mL - 1000 * L) <= 1e-3 * mL, (mL, L)
    # a gas rate stays in L/min in every unit set, as in the tables (what a flow meter reads)
    assert lab_rate == kilo_rate
