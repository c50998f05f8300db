"""``routeplan plan ROUTE --record FILE`` on the command line: outputs and every bad record.

Each bad record must end with exit code 2, a message that says where (file:line:column,
the CSV row, or Sheet!cell) and what would be right, no traceback, and nothing written.
"""

import json

import pytest

from conftest import run_cli, words, write_route
from record_helpers import CAMP, RECORD_YAML

LOT = "{step: S1, batch: 1, charged: 20.0 kg, isolated: 27.0 kg, assay: 96 %}"


@pytest.fixture
def camp(tmp_path):
    return write_route(tmp_path, CAMP, "camp.yaml")


def record(tmp_path, text, name="record.yaml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_record_in_every_output(camp, tmp_path):
    rec = record(tmp_path, RECORD_YAML)
    out = tmp_path / "plan.json"
    res = run_cli("plan", camp, "--record", rec, "--json", out, "--csv", tmp_path / "csv",
                  "--xlsx", tmp_path / "plan.xlsx")
    assert res.exit_code == 0, res.output
    assert "Campaign record" in res.stdout and "Projected target" in res.stdout
    assert "planned at the route's expected yields" in words(res.stdout)  # folded to the width
    d = json.loads(out.read_text())
    assert d["record"]["record_yields"] == "expected" and len(d["record"]["lots"]) == 3
    assert (tmp_path / "csv" / "record-lots.csv").exists()
    import openpyxl

    wb = openpyxl.load_workbook(tmp_path / "plan.xlsx")
    summary = [v for row in wb["Summary"].iter_rows(values_only=True) for v in row if isinstance(v, str)]
    assert any(v.startswith("Campaign record") for v in summary)
    # the S2 sheet takes I1: the lots in hand and their assay are filled in on its line
    ws = wb["S2"]
    line = [row for row in ws.iter_rows(values_only=True) if row[1] == "I1"][0]
    assert any(isinstance(v, str) and v.startswith("in hand: S1 batches 1, 2") for v in line)
    assert (27.0 * 0.96 + 25.0 * 0.92) / 52.0 in line


def test_record_yields_actual_is_said(camp, tmp_path):
    res = run_cli("plan", camp, "--record", record(tmp_path, RECORD_YAML), "--record-yields", "actual")
    assert res.exit_code == 0, res.output
    # (S1: (172.8 + 153.33) / 370 = 88.1 %, S2: 148.5 / 190 = 78.2 %; see test_record_worked.py)
    assert "planned at their actual yields (S1 88.1 %, S2 78.2 %" in words(res.stdout)


def test_record_yields_without_record_is_refused(camp):
    res = run_cli("plan", camp, "--record-yields", "actual")
    assert res.exit_code == 2 and "give --record FILE too" in res.output


BAD = [
    # (record text, file name, words in the message, location text)
    ("lots:\n  - {step: S9, batch: 1, charged: 20 kg, isolated: 27 kg}\n", "r.yaml",
     ["unknown step 'S9'", "did you mean"], "r.yaml:2:"),
    (f"lots:\n  - {LOT}\n  - {LOT}\n", "r.yaml", ["batch 1 of step S1 is recorded twice"], "r.yaml:3:"),
    ("lots:\n  - {step: S1, batch: 1, charged: 0 kg, isolated: 27 kg}\n", "r.yaml", ["zero"], "r.yaml:2:"),
    ("lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: -3 kg}\n", "r.yaml", ["negative"], "r.yaml:2:"),
    ("lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: 27 kg, assay: 101 %}\n", "r.yaml",
     ["above 100 %"], "r.yaml:2:"),
    # 20 kg of A = 200 mol; 35 kg of I1 at 95 % = 221.7 mol: 110.8 %, above the high 95 %
    ("lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: 35 kg}\n", "r.yaml",
     ["actual yield 110.8% is above 100 %", "wet or impure"], "r.yaml:2:"),
    # S2 takes 60 kg of I1 (380 mol at 95 %) but S1 made 172.8 mol
    (f"lots:\n  - {LOT}\n  - {{step: S2, batch: 1, charged: 60 kg, isolated: 30 kg}}\n", "r.yaml",
     ["consume", "made only"], "r.yaml:3:"),
    ("lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: 27 kg, asay: 96 %}\n", "r.yaml",
     ["unknown key 'asay'", "did you mean 'assay'"], "r.yaml:2:"),
    ("lots:\n  - {step: S1, batch: 1, charged: 20 kg}\n", "r.yaml", ["no isolated"], "r.yaml:2:"),
    ("lots:\n  - {step: S1, batch: 1, charged: 20, isolated: 27 kg}\n", "r.yaml", ["has no unit"], "r.yaml:2:"),
    ("step,batch,charged,isolated\nS1,1,20 kg,27 kg\nS1,x,20 kg,27 kg\n", "r.csv",
     ["not a batch number"], "r.csv:3: batch"),
    ("step,batch,charged,isolated,asay\nS1,1,20 kg,27 kg,96 %\n", "r.csv", ["unknown column 'asay'"], "r.csv:1:"),
    ("step,batch,charged,isolated,unit\nS1,1,20 kg,27,kg\n", "r.csv", ["give the unit once"], "r.csv:2: charged"),
    ("step,batch,charged,isolated,assay\nS1,1,20 kg,27 kg,96\n", "r.csv", ["96 %"], "r.csv:2: assay"),
]


@pytest.mark.parametrize("text,name,words,where", BAD, ids=[f"{i}" for i in range(len(BAD))])
def test_bad_record(camp, tmp_path, text, name, words, where):
    rec = record(tmp_path, text, name)
    out = tmp_path / "plan.json"
    res = run_cli("plan", camp, "--record", rec, "--json", out)
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    assert where in res.stderr, res.stderr
    for w in words:
        assert w in res.stderr, res.stderr
    assert not out.exists()


def test_bad_xlsx_record_names_the_cell(camp, tmp_path):
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Lots"
    ws.append(["step", "batch", "charged", "isolated", "unit"])
    ws.append(["S1", 1, 20.0, -27.0, "kg"])
    wb.save(tmp_path / "r.xlsx")
    res = run_cli("plan", camp, "--record", tmp_path / "r.xlsx")
    assert res.exit_code == 2 and "Lots!D2 (isolated)" in res.stderr and "negative" in res.stderr


def test_lot_of_a_telescoped_step_is_refused(tmp_path):
    rec = record(tmp_path, "lots:\n  - {step: S3, batch: 1, charged: 10 kg, isolated: 9 kg}\n")
    res = run_cli("plan", "demo_routes/hx17-linear.yaml", "--record", rec)
    assert res.exit_code == 2 and "isolated: false" in res.stderr and "record.yaml:2:" in res.stderr


def test_a_lot_at_100_percent_passes_and_above_fails_even_with_high_100(tmp_path):
    # format 1 keeps every yield, ``high`` too, at or below 100 % (ROUTE-FORMAT.md, "Quantities"),
    # so no ``high`` allows a lot above 100 %: 20 kg of A = 200 mol; 31.5789 kg of I1 at 95 %
    # = 199.9997 mol (100.0 %) passes, 31.8 kg = 201.4 mol (100.7 %) does not
    text = CAMP.replace("{expected: 90 %, low: 85 %, high: 95 %}", "{expected: 95 %, low: 90 %, high: 100 %}")
    camp = write_route(tmp_path, text, "camp.yaml")
    ok = record(tmp_path, "lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: 31.5789 kg}\n")
    res = run_cli("plan", camp, "--record", ok, "-q")
    assert res.exit_code == 0, res.output
    bad = record(tmp_path, "lots:\n  - {step: S1, batch: 1, charged: 20 kg, isolated: 31.8 kg}\n")
    res = run_cli("plan", camp, "--record", bad, "-q")
    assert res.exit_code == 2 and "actual yield 100.7% is above 100 %" in res.stderr


def test_confidence_with_a_record_is_refused(camp, tmp_path):
    res = run_cli("plan", camp, "--record", record(tmp_path, RECORD_YAML), "--confidence", "90 %")
    assert res.exit_code == 2 and "--confidence" in res.stderr and "Traceback" not in res.output
