"""Heat and gas in every output: the JSON safety block (the contract's keys), the
terminal's safety lines, the charge sheets and the Summary (read back with openpyxl), the
CSV table; a step without thermal data is "not screened" everywhere."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import openpyxl
import pytest

from conftest import route_text, run_cli, words, write_route

HYDROGENATION = route_text("hydrogenation.yaml")
ROUTE = route_text("safety.yaml")

DEMO = Path(__file__).resolve().parents[2] / "demo_routes" / "hx17-linear.yaml"

# ROUTE-FORMAT.md, "JSON additions per step": the keys every safety block has
CONTRACT_GAS = {"material", "mol_per_batch", "volume_L_per_batch", "temperature_C", "pressure_bar", "rate_L_per_min"}
CONTRACT_TAKEN = {"material", "mol_per_batch", "normal_volume_L_per_batch"}
CONTRACT_THERMAL = {"reaction_mass_kg_per_batch", "delta_T_ad_K", "mtsr_C", "criticality_class", "severity"}


@pytest.fixture(scope="module")
def demo_json():
    result = run_cli("plan", DEMO, "--json", "-")
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def test_json_safety_block_follows_the_contract(demo_json):
    steps = {s["id"]: s for s in demo_json["steps"]}
    for s in steps.values():
        safety = s["safety"]
        assert {"gas_evolved", "gas_taken_up", "thermal"} <= set(safety)
        for g in safety["gas_evolved"]:
            assert CONTRACT_GAS <= set(g)
        for g in safety["gas_taken_up"]:
            assert CONTRACT_TAKEN <= set(g)
        if safety["thermal"] is not None:
            assert CONTRACT_THERMAL <= set(safety["thermal"])
    s2 = steps["S2"]["safety"]
    assert [g["material"] for g in s2["gas_evolved"]] == ["CO2"]
    assert s2["gas_evolved"][0]["rate_L_per_min"] == pytest.approx(s2["gas_evolved"][0]["volume_L_per_batch"] / 180)
    assert s2["thermal"]["criticality_class"] == 3
    assert steps["S3"]["safety"]["thermal"] is None and steps["S3"]["safety"]["screened"] is False
    assert steps["S4"]["safety"]["thermal"]["criticality_class"] is None  # no TD24 given
    assert steps["S1"]["safety"]["gas_evolved"] == [] and steps["S1"]["safety"]["gas_taken_up"] == []


def test_json_keeps_the_mass_of_a_gas_taken_up(tmp_path):
    result = run_cli("plan", write_route(tmp_path, HYDROGENATION), "--json", "-")
    data = json.loads(result.stdout)
    (step,) = data["steps"]
    h2 = next(c for c in step["charges"] if c["material"] == "H2")
    assert h2["mass_kg"] == pytest.approx(300.0 * 2.016 / 1000, rel=1e-3)  # 300 mol x 2.016 g/mol (CIAAW)
    assert step["safety"]["gas_taken_up"][0]["normal_volume_L_per_batch"] == pytest.approx(300.0 * 22.41397, rel=1e-3)


def test_terminal_shows_only_the_lines_that_apply(tmp_path):
    result = run_cli("plan", DEMO)
    out = words(result.stdout)  # the lines are folded to the width
    assert out.count("safety per batch, screening estimates, never a substitute for calorimetry") == 5
    assert out.count("heat: not screened") == 2  # S3 and S5
    assert out.count("gas evolved:") == 1 and "gas taken up" not in out
    assert "criticality class 3" in out
    hydro = words(run_cli("plan", write_route(tmp_path, HYDROGENATION)).stdout)
    assert "gas taken up: H2 300.0 mol per batch" in hydro and "at normal conditions" in hydro
    assert "vent: H2 is flammable" in hydro
    assert "gas evolved" not in hydro


def _texts(ws):
    return [c for row in ws.iter_rows(values_only=True) for c in row if isinstance(c, str)]


def test_every_charge_sheet_has_its_safety_block_and_the_summary_a_summary(tmp_path):
    book = tmp_path / "demo.xlsx"
    assert run_cli("plan", DEMO, "-q", "--xlsx", book).exit_code == 0
    wb = openpyxl.load_workbook(book)
    sheets = [n for n in wb.sheetnames if n in ("S1", "S2", "S3", "S4", "S5")]  # one charge sheet per step
    assert sheets == ["S1", "S2", "S3", "S4", "S5"]
    for name in sheets:
        texts = _texts(wb[name])
        assert any(t.startswith("Safety per batch: screening estimates") for t in texts), name
        if name in ("S3", "S5"):
            assert "not screened (no thermal data in the route file)" in texts
        else:
            assert "ΔTad per batch" in texts and "MTSR" in texts and "criticality class" in texts
        # the block lies between the charge table and the sign-off block
        rows = {c.value: c.row for row in wb[name].iter_rows() for c in row if isinstance(c.value, str)}
        safety_row = next(r for v, r in rows.items() if v.startswith("Safety per batch"))
        assert safety_row < rows["Sign-off (fill in at the vessel)"]
        # the sheet is protected and the block is planned text: locked, not a fill-in cell
        assert wb[name].protection.sheet
        block = [c for row in wb[name].iter_rows(min_row=safety_row, max_row=safety_row + 3) for c in row
                 if isinstance(c.value, str)]
        assert block and all(c.protection.locked for c in block)
    s2 = _texts(wb["S2"])
    assert "gas evolved: CO2" in s2
    assert any("1787 L per batch" in t and "mean rate 9.926 L/min" in t for t in s2)  # 4 significant figures
    summary = _texts(wb["Summary"])
    assert any(t.startswith("Safety per batch: screening estimates") for t in summary)
    assert "not screened (no thermal data): S3, S5" in summary
    assert any(t.startswith("heat: reaction mass") and "criticality class 3" in t for t in summary)


def test_a_gas_taken_up_is_charged_by_its_normal_volume_on_the_sheet(tmp_path):
    book = tmp_path / "h.xlsx"
    assert run_cli("plan", write_route(tmp_path, HYDROGENATION), "-q", "--xlsx", book).exit_code == 0
    ws = openpyxl.load_workbook(book)["H1"]
    heads = {c.value: c.column for row in ws.iter_rows() for c in row if isinstance(c.value, str)}
    row = next(c.row for r in ws.iter_rows() for c in r if c.value == "H2")
    volume = ws.cell(row, heads["volume to charge [L]"]).value
    assert volume == pytest.approx(300.0 * 22.41397, rel=1e-3)  # CODATA 2018 molar volume, 300 mol of H2
    role = ws.cell(row, heads["role"]).value
    assert "gas: charge the normal volume (0 °C, 101.325 kPa); mass not weighed" in role
    assert any("gas taken up: H2" == t for t in _texts(ws))


def test_csv_safety_table(tmp_path):
    folder = tmp_path / "csv"
    assert run_cli("plan", DEMO, "-q", "--csv", folder).exit_code == 0
    with open(folder / "safety.csv", encoding="utf-8", newline="") as fh:
        rows = list(csv.DictReader(fh))
    body = rows[:-1]
    assert rows[-1]["step"].startswith("CAUTION: ")
    assert [r["step"] for r in body] == ["S1", "S2", "S3", "S4", "S5"]
    assert body[2]["screened"] == "no: not screened" and body[2]["MTSR [degC]"] == ""
    assert body[1]["gas"] == "CO2" and float(body[1]["gas volume per batch [L]"]) > 0


def test_a_route_without_any_safety_keys_is_not_screened_anywhere(tmp_path, good_text):
    path = write_route(tmp_path, good_text)
    result = run_cli("plan", path, "--json", "-")
    data = json.loads(result.stdout)
    assert all(s["safety"]["thermal"] is None and not s["safety"]["screened"] for s in data["steps"] if s["runs"])
    out = run_cli("plan", path).stdout
    assert out.count("heat: not screened") == len(data["steps"])
