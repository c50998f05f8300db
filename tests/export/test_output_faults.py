"""Faults while writing and reading: the outputs of one run are one unit, a CSV folder is one
unit, a full disk or a file-size limit is a clear message (exit 2) with nothing half
written, and an input that is not a regular file is refused instead of read for ever."""

from __future__ import annotations

import errno
import os
import resource
import signal
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import run_cli

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_routes" / "hx17-linear.yaml"
CONVERGENT = ROOT / "demo_routes" / "hx17-convergent.yaml"


def _earlier(tmp_path: Path) -> dict[Path, bytes]:
    """Earlier outputs in ``tmp_path``: a JSON file, a workbook and a CSV folder."""
    result = run_cli("plan", DEMO, "--target", "10 kg", "--json", tmp_path / "plan.json",
                     "--xlsx", tmp_path / "sheets.xlsx", "--csv", tmp_path / "tables", "-q")
    assert result.exit_code == 0, result.output
    files = [tmp_path / "plan.json", tmp_path / "sheets.xlsx", *sorted((tmp_path / "tables").iterdir())]
    return {p: p.read_bytes() for p in files}


def _unchanged(tmp_path: Path, before: dict[Path, bytes]) -> None:
    for p, data in before.items():
        assert p.read_bytes() == data, p
    assert sorted(p.name for p in (tmp_path / "tables").iterdir()) == \
        sorted(p.name for p in before if p.parent.name == "tables")
    assert not [p for p in tmp_path.rglob(".*")], "temporary files left behind"


def _failing_after_a_partial_write(fault: Exception):
    """A stand-in workbook writer that writes part of its file, then meets ``fault``."""
    def write(plan, path, **_kw):
        Path(path).write_bytes(b"PK\x03\x04 half a workbook")
        raise fault
    return write


def test_two_outputs_where_the_second_fails_leave_every_earlier_output(tmp_path, monkeypatch):
    before = _earlier(tmp_path)
    import routeplan.export.workbook as workbook

    monkeypatch.setattr(workbook, "write_workbook", _failing_after_a_partial_write(
        OSError(errno.ENOSPC, "No space left on device", str(tmp_path / "sheets.xlsx"))))
    result = run_cli("plan", DEMO, "--json", tmp_path / "plan.json", "--xlsx", tmp_path / "sheets.xlsx",
                     "--csv", tmp_path / "tables", "-q")
    assert result.exit_code == 2
    assert "the disk is full" in result.stderr and "Traceback" not in result.output
    assert "wrote" not in result.stderr
    _unchanged(tmp_path, before)


def test_a_folder_that_fails_half_way_leaves_the_earlier_plan_whole(tmp_path, monkeypatch):
    before = _earlier(tmp_path)
    import routeplan.export.csv as csv_export

    real, calls = csv_export.write_table, []

    def write_table(path, columns, rows):
        calls.append(path)
        if len(calls) == 3:
            raise OSError(errno.EFBIG, "File too large", str(path))
        return real(path, columns, rows)

    monkeypatch.setattr(csv_export, "write_table", write_table)
    result = run_cli("plan", DEMO, "--json", tmp_path / "plan.json", "--csv", tmp_path / "tables", "-q")
    assert result.exit_code == 2 and "file-size limit" in result.stderr
    _unchanged(tmp_path, before)


def test_compare_outputs_are_one_unit_too(tmp_path, monkeypatch):
    (tmp_path / "c.json").write_text("earlier")
    import routeplan.export.compare_out as compare_out

    monkeypatch.setattr(compare_out, "write_comparison_xlsx", _failing_after_a_partial_write(
        OSError(errno.ENOSPC, "No space left on device", "c.xlsx")))
    result = run_cli("compare", DEMO, CONVERGENT, "--json", tmp_path / "c.json", "--xlsx", tmp_path / "c.xlsx")
    assert result.exit_code == 2
    assert (tmp_path / "c.json").read_text() == "earlier" and not (tmp_path / "c.xlsx").exists()
    assert not list(tmp_path.glob(".*"))


def test_csv_folder_replaces_an_earlier_plan_and_keeps_other_files(tmp_path):
    tables = tmp_path / "tables"
    # an earlier plan of the convergent route has other step files; a note of the user's
    assert run_cli("plan", CONVERGENT, "--csv", tables, "-q").exit_code == 0
    earlier = {p.name for p in tables.iterdir()}
    (tables / "my-notes.txt").write_text("keep me")
    result = run_cli("plan", DEMO, "--csv", tables, "-q")
    assert result.exit_code == 0
    now = {p.name for p in tables.iterdir()}
    fresh = run_cli("plan", DEMO, "--csv", tmp_path / "fresh", "-q")
    assert fresh.exit_code == 0
    written = {p.name for p in (tmp_path / "fresh").iterdir()}
    assert now == written | {"my-notes.txt"}
    stale = sorted(earlier - written)
    assert stale and f"removed from {tables} the files of the earlier plan" in result.stderr
    assert ", ".join(stale) in result.stderr and "other files are kept" in result.stderr
    assert (tables / "my-notes.txt").read_text() == "keep me"


def test_csv_folder_holding_only_an_earlier_plan_is_swapped_whole(tmp_path):
    tables = tmp_path / "tables"
    assert run_cli("plan", CONVERGENT, "--csv", tables, "-q").exit_code == 0
    assert run_cli("plan", DEMO, "--csv", tables, "-q").exit_code == 0
    assert run_cli("plan", DEMO, "--csv", tmp_path / "fresh", "-q").exit_code == 0
    assert {p.name for p in tables.iterdir()} == {p.name for p in (tmp_path / "fresh").iterdir()}
    assert not list(tmp_path.glob(".*"))


def _routeplan(*args, **kw):
    return subprocess.run([sys.executable, "-m", "routeplan", *map(str, args)], capture_output=True, text=True,
                          timeout=60, **kw)


def test_full_disk_on_standard_output_is_a_clear_message():
    # /dev/full answers every write with ENOSPC (Linux)
    with open("/dev/full", "w") as full:
        result = subprocess.run([sys.executable, "-m", "routeplan", "plan", str(DEMO), "--json", "-"],
                                stdout=full, stderr=subprocess.PIPE, text=True, timeout=60)
    assert result.returncode == 2, result.stderr
    assert "the disk is full" in result.stderr
    assert "Traceback" not in result.stderr and "internal error" not in result.stderr


def _file_size_limit(limit: int):
    def apply():
        signal.signal(signal.SIGXFSZ, signal.SIG_IGN)  # write() then fails with EFBIG
        resource.setrlimit(resource.RLIMIT_FSIZE, (limit, limit))
    return apply


def test_file_size_limit_is_a_clear_message_and_nothing_half_written(tmp_path):
    (tmp_path / "plan.json").write_text("earlier")
    result = _routeplan("plan", DEMO, "--json", tmp_path / "plan.json", "--xlsx", tmp_path / "s.xlsx", "-q",
                        preexec_fn=_file_size_limit(4096))
    assert result.returncode == 2, result.stderr
    assert "file-size limit" in result.stderr and "Traceback" not in result.stderr
    assert (tmp_path / "plan.json").read_text() == "earlier"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.json"]


@pytest.mark.parametrize("kind", ["fifo", "device"])
def test_a_route_that_is_not_a_regular_file_is_refused(tmp_path, kind):
    if kind == "fifo":
        path = tmp_path / "route.yaml"
        os.mkfifo(path)
    else:
        path = Path("/dev/zero")
    result = _routeplan("check", path)  # a subprocess: a hang would fail on the timeout
    assert result.returncode == 2
    assert "not a regular file" in result.stderr and "Traceback" not in result.stderr


def test_a_stock_file_that_is_not_a_regular_file_is_refused(tmp_path):
    path = tmp_path / "stock.csv"
    os.mkfifo(path)
    result = _routeplan("plan", DEMO, "--stock", path, "-q")
    assert result.returncode == 2
    assert "the stock file is a named pipe (FIFO), not a regular file" in result.stderr


def test_a_stock_xlsx_formula_without_a_stored_value_says_so(tmp_path):
    import xlsxwriter

    path = tmp_path / "stock.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("stock")
    ws.write_row(0, 0, ["material", "amount", "unit"])
    ws.write_row(1, 0, ["acetone", 100, "kg"])
    ws.write(2, 0, "toluene")
    ws.write_formula(2, 1, "=B2*2", None, "")  # no value stored, as a program writes it
    ws.write(2, 2, "kg")
    wb.close()
    result = run_cli("plan", DEMO, "--stock", path, "-q")
    assert result.exit_code == 2
    assert "cell stock!B3 holds the formula =B2*2 but no value" in result.stderr
    assert "open the file in a spreadsheet and save it" in result.stderr
    assert "no amount" not in result.stderr


def test_every_file_a_plan_writes_counts_as_a_plan_file(tmp_path):
    from routeplan.export.atomic import CSV_PLAN_FILES

    stock = ROOT / "demo_routes" / "stock.yaml"
    for route, extra in ((DEMO, ["--stock", stock]), (CONVERGENT, [])):
        folder = tmp_path / route.stem
        assert run_cli("plan", route, "--csv", folder, "-q", *extra).exit_code == 0
        names = [p.name for p in folder.iterdir()]
        assert "stock.csv" in names or route is CONVERGENT
        assert all(CSV_PLAN_FILES.match(n) for n in names), names
    assert not CSV_PLAN_FILES.match("my-notes.csv") and not CSV_PLAN_FILES.match("summary.csv.bak")
