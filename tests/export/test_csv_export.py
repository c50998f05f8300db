"""The plan's tables as CSV files: contents, neutralised formula text, atomic writing.

Neutralising follows the OWASP advice on CSV injection
(https://owasp.org/www-community/attacks/CSV_Injection): a field beginning with
``=``, ``+``, ``-``, ``@``, a tab or a carriage return is prefixed with ``'``.
"""

from __future__ import annotations

import csv
import hashlib
import math
from pathlib import Path

import pytest

from routeplan import CAUTION
from routeplan.export.csv import csv_field, neutralise, step_file_name, write_csv
from test_workbook import ROUTE_NAME, ROUTE_TEXT, WRITTEN, close, make_plan


@pytest.fixture(scope="module")
def plan():
    return make_plan()


@pytest.fixture(scope="module")
def out(plan, tmp_path_factory):
    folder = tmp_path_factory.mktemp("csv") / "tables"  # made by write_csv
    paths = write_csv(plan, folder, written=WRITTEN)
    return folder, paths


CAUTION_FIELD = "CAUTION: " + CAUTION


def read(path: Path) -> list[dict[str, str]]:
    """The data rows of a CSV file written by routeplan: its last row, the caution, is
    checked and dropped, as docs/charge-sheets.md tells readers to."""
    with open(path, encoding="utf-8", newline="") as fh:
        rows = list(csv.DictReader(fh))
    last = list(rows.pop().values())
    assert last == [CAUTION_FIELD] + [""] * (len(last) - 1), (path.name, last)
    return rows


def raw_rows(path: Path) -> list[list[str]]:
    with open(path, encoding="utf-8", newline="") as fh:
        return list(csv.reader(fh))


def num(text: str) -> float | None:
    return None if text == "" else float(text)


def test_files_written(plan, out):
    folder, paths = out
    names = [p.name for p in paths]
    assert names == ["summary.csv", "steps.csv", "charges-01-A_1_prep.csv", "charges-02-A_1_prep.csv",
                     "charges-03-a_step_id_that_is_far_longer_than_thirty.csv", "raw-materials.csv", "purchases.csv",
                     "materials.csv", "safety.csv", "waste.csv"]
    assert sorted(p.name for p in folder.iterdir()) == sorted(names)


def test_charges_equal_the_plan(plan, out):
    _folder, paths = out
    for sp, path in zip(plan.steps, paths[2:5]):
        rows = read(path)
        assert len(rows) == len(sp.charges)
        for row, c in zip(rows, sp.charges):
            assert row["step"] == sp.id
            assert row["material"] == c.material
            assert close(num(row["mass [kg]"]), c.mass.m_as("kg"))
            assert close(num(row["volume [L]"]), None if c.volume is None else c.volume.m_as("L"))
            assert close(num(row["amount [mol]"]), None if c.mol is None else c.mol.m_as("mol"))
            assert close(num(row["mass per batch [kg]"]), c.mass.m_as("kg") / sp.batches)
            assert int(row["batches [-]"]) == sp.batches


def test_full_precision(plan, out):
    """Numbers are written as Python's shortest round-trip repr: read back exactly."""
    _folder, paths = out
    c = plan.steps[0].charges[0]
    assert float(read(paths[2])[0]["mass [kg]"]) == c.mass.m_as("kg")


def test_raw_materials_and_materials(plan, out):
    folder, _paths = out
    raws = read(folder / "raw-materials.csv")
    assert [r["key"] for r in raws] == [r.material for r in plan.raw_materials]
    for row, raw in zip(raws, plan.raw_materials):
        assert close(num(row["mass [kg]"]), raw.mass.m_as("kg"))
        assert close(num(row["cost [EUR]"]), raw.cost)
    mats = read(folder / "materials.csv")
    assert [m["key"] for m in mats] == list(plan.route.materials)
    caustic = next(m for m in mats if m["key"] == "caustic")
    assert num(caustic["solution mass fraction [-]"]) == 0.5 and caustic["assay [-]"] == ""


def test_summary(plan, out):
    folder, _paths = out
    rows = {r["item"]: r for r in read(folder / "summary.csv")}
    # SHA-256 of the route text as UTF-8, from Python's hashlib (FIPS 180-4)
    assert rows["route file SHA-256"]["value"] == hashlib.sha256(ROUTE_TEXT.encode("utf-8")).hexdigest()
    assert rows["route file"]["value"] == ROUTE_NAME
    assert rows["caution"]["value"] == CAUTION
    assert rows["written"]["value"] == "2025-03-04 10:15 +00:00"
    assert math.isclose(float(rows["target amount"]["value"]), plan.target_mol.m_as("mol"), rel_tol=1e-12)
    assert rows["target amount"]["unit"] == "mol"


def test_formula_text_is_neutralised(out):
    folder, _paths = out
    text = "\n".join(p.read_text(encoding="utf-8") for p in sorted(folder.iterdir()))
    for field in ["'=1+2 test route", "'@SUM(1)", "'+flammable; corrosive", "'-highly flammable",
                  "'@lachrymator"]:
        assert field in text
    assert '"\'=HYPERLINK(""http://x"")"' in text  # RFC 4180 doubles the quotes
    every = [cell for p in folder.iterdir() for row in csv.reader(open(p, encoding="utf-8", newline=""))
             for cell in row]
    assert not [cell for cell in every if cell[:1] in ("=", "+", "-", "@", "\t", "\r")]


@pytest.mark.parametrize("text, expected", [
    ("=1+1", "'=1+1"), ("+1", "'+1"), ("-1", "'-1"), ("@A1", "'@A1"), ("\tx", "'\tx"), ("\rx", "'\rx"),
    ("a=b", "a=b"), ("", ""), ("1-2", "1-2"),
])
def test_neutralise(text, expected):
    assert neutralise(text) == expected


def test_numbers_stay_numbers():
    assert csv_field(-1.5) == -1.5 and csv_field(0) == 0
    assert csv_field("-1.5") == "'-1.5"
    assert csv_field(None) == "" and csv_field(True) == "true"


def test_step_file_names():
    assert step_file_name(1, "S1") == "charges-01-S1.csv"
    assert step_file_name(12, "../../etc/passwd") == "charges-12-etc_passwd.csv"
    assert step_file_name(2, "///") == "charges-02-step.csv"


def test_failure_part_way_keeps_earlier_files(plan, tmp_path, monkeypatch):
    import routeplan.export.csv as csv_out

    write_csv(plan, tmp_path, written=WRITTEN)
    before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    real = csv_out.csv_field
    calls = []

    def flaky(value):
        calls.append(1)
        if len(calls) == 20:  # part-way through summary.csv
            raise RuntimeError("failed part-way")
        return real(value)

    monkeypatch.setattr(csv_out, "csv_field", flaky)
    with pytest.raises(RuntimeError, match="part-way"):
        write_csv(plan, tmp_path, written=WRITTEN)
    after = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    assert after == before  # same files, byte for byte, and no temporary file left


def test_pandas_reads_numbers(plan, out):
    """Read as the documentation says, dropping the caution row, pandas gets numbers
    and booleans; read whole, the caution is the last row's first field."""
    import pandas as pd

    folder, paths = out
    frame = pd.read_csv(paths[2], skipfooter=1, engine="python")
    assert len(frame) == len(plan.steps[0].charges)
    assert frame["mass [kg]"].dtype.kind == "f"
    assert frame["made in route"].dtype.kind == "b"
    whole = pd.read_csv(paths[2])
    assert whole.iloc[-1, 0] == CAUTION_FIELD and whole.iloc[-1, 1:].isna().all()


def _csv_files(folder: Path) -> list[Path]:
    return sorted(folder.glob("*.csv"))


@pytest.mark.parametrize("which", ["plain", "stock"])
def test_every_csv_ends_with_the_caution(out, stock_out, which):
    """Every file, summary.csv as well, ends with one row: ``CAUTION: ...`` in the
    first field, the others empty, as many fields as the header has."""
    folder = out[0] if which == "plain" else stock_out[1]
    files = _csv_files(folder)
    expected = {"summary.csv", "steps.csv", "raw-materials.csv", "materials.csv", "safety.csv"} | (
        {"stock.csv"} if which == "stock" else set())
    assert expected <= {p.name for p in files}
    assert sum(p.name.startswith("charges-") for p in files) == 3
    for path in files:
        rows = raw_rows(path)
        assert len(rows) >= 3, path.name  # header, data, caution
        assert rows[-1] == [CAUTION_FIELD] + [""] * (len(rows[0]) - 1), path.name
        assert all(CAUTION_FIELD not in row for row in rows[:-1]), path.name  # only once, at the end
        assert path.read_bytes().endswith(b"," * (len(rows[0]) - 1) + b"\r\n"), path.name  # nothing after it


# --- stock.csv ---------------------------------------------------------------------------


@pytest.fixture(scope="module")
def stock_out(tmp_path_factory):
    from test_workbook_summary import make_stock_plan

    plan = make_stock_plan()
    folder = tmp_path_factory.mktemp("csv-stock")
    return plan, folder, write_csv(plan, folder, written=WRITTEN)


def test_stock_csv_equals_plan_stock(stock_out):
    plan, folder, paths = stock_out
    assert paths[-1] == folder / "stock.csv"
    s = plan.stock
    to_buy = {k: m.m_as("kg") for k, m in s.to_buy}
    rows = read(folder / "stock.csv")
    assert list(rows[0]) == ["key", "material", "need [kg]", "on hand [kg]", "to buy [kg]", "stock"]
    assert [r["key"] for r in rows] == [r.material for r in plan.raw_materials]
    for row, raw in zip(rows, plan.raw_materials):
        have = s.on_hand.get(raw.material)
        assert close(num(row["need [kg]"]), raw.mass.m_as("kg"))
        assert close(num(row["on hand [kg]"]), None if have is None else have.m_as("kg"))
        assert close(num(row["to buy [kg]"]), to_buy.get(raw.material, 0.0))
        assert (row["stock"] == "not in stock") == (have is None)
    ki = next(r for r in rows if r["key"] == "KI")
    assert ki["material"] == "'=HYPERLINK(\"http://x\")"  # neutralised like the other files


def test_summary_csv_says_what_the_stock_allows(stock_out):
    plan, folder, _paths = stock_out
    rows = {r["item"]: r for r in read(folder / "summary.csv")}
    assert close(float(rows["largest target the stock allows"]["value"]), plan.stock.max_target.m_as("kg"))
    assert rows["largest target the stock allows"]["unit"] == "kg"
    assert rows["limited by"]["value"] == plan.stock.limited_by
    items = list(rows)
    assert items.index("limited by") < items.index("caution")


def test_no_stock_csv_without_stock(out):
    folder, _paths = out
    assert not (folder / "stock.csv").exists()


def test_metrics_in_steps_and_summary(plan, out):
    folder, _ = out
    m = plan.metrics
    rows = {r["step"]: r for r in read(folder / "steps.csv")}
    assert set(rows) == set(m.pmi_by_step)
    for sid, value in m.pmi_by_step.items():
        assert close(num(rows[sid]["step PMI [kg/kg]"]), value)
        assert close(num(rows[sid]["cumulative PMI [kg/kg]"]), m.pmi_cumulative_by_step[sid])
    facts = {r["item"]: r for r in read(folder / "summary.csv")}
    assert close(num(facts["process mass intensity, route"]["value"]), m.pmi)
    assert facts["process mass intensity, route"]["unit"] == "kg/kg"
    assert close(num(facts["complete E-factor"]["value"]), m.e_factor_complete)
