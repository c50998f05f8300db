"""Output paths that cannot work are refused before anything is planned or written."""

from pathlib import Path

import pytest

from conftest import run_cli

DEMO = Path(__file__).resolve().parents[2] / "demo_routes" / "hx17-linear.yaml"


@pytest.mark.parametrize("args, fragment", [
    (["--xlsx", "-"], "--xlsx: a workbook cannot go to standard output"),
    (["--json", ""], "--json: needs a file name"),
    (["--xlsx", "sheets.txt"], "does not end in .xlsx"),
    (["--xlsx", "."], "is a folder, not a file name"),
    (["--json", "no/such/folder/plan.json"], "folder 'no/such/folder' does not exist"),
    (["--csv", "plan.json"], "is a file, not a folder"),
])
def test_bad_output_paths(tmp_path, monkeypatch, args, fragment):
    monkeypatch.chdir(tmp_path)
    Path("plan.json").write_text("earlier")
    result = run_cli("plan", DEMO, *args)
    assert result.exit_code == 2
    assert fragment in result.stderr
    assert "Traceback" not in result.output


def test_nothing_is_written_when_a_later_output_is_bad(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    result = run_cli("plan", DEMO, "--json", "new.json", "--csv", "tables", "--xlsx", str(tmp_path))
    assert result.exit_code == 2
    assert not Path("new.json").exists() and not Path("tables").exists()


def test_compare_checks_its_outputs_too(tmp_path):
    convergent = DEMO.with_name("hx17-convergent.yaml")
    result = run_cli("compare", DEMO, convergent, "--xlsx", tmp_path / "nope" / "c.xlsx")
    assert result.exit_code == 2 and "does not exist" in result.stderr
