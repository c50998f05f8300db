"""Small helpers shared by the command modules (no heavy imports)."""

from __future__ import annotations

import click

from routeplan import CAUTION


def echo_err(text: str) -> None:
    """Write a line to standard error."""
    click.echo(text, err=True)


def echo_warnings(problems, *, strict: bool = False) -> None:
    """Print warnings to standard error, one per line."""
    for p in problems:
        echo_err(("error" if strict else "warning") + ": " + p.render())


def caution_line() -> str:
    """The safety caution, as one line."""
    return "CAUTION: " + CAUTION


def write_text_output(text: str, dest: str) -> None:
    """Write ``text`` to standard output (``dest == "-"``) or atomically to a file."""
    if dest == "-":
        click.echo(text, nl=False)
        return
    from routeplan.export.atomic import write_text_atomic

    write_text_atomic(dest, text)
    echo_err(f"wrote {dest}")


def check_output_paths(*, json_out: str | None = None, xlsx_out: str | None = None,
                       csv_dir: str | None = None, html_out: str | None = None) -> None:
    """Refuse an output path that cannot work, before anything is computed or written.

    Each output is written atomically on its own; checking every path first means a
    mistake in the last one does not leave the first ones written.

    Raises
    ------
    OutputError
        An empty name, a folder where a file is meant (or a file where a folder is),
        a folder that does not exist, ``-`` for a workbook, or a workbook name that does
        not end in ``.xlsx``.
    """
    from pathlib import Path

    from routeplan.errors import Location, OutputError

    def file_target(option: str, name: str) -> Path:
        if not name.strip():
            raise OutputError("needs a file name", location=Location(key=option))
        path = Path(name)
        if path.is_dir():
            raise OutputError(f"'{name}' is a folder, not a file name", location=Location(key=option))
        parent = path.parent if str(path.parent) else Path(".")
        if not parent.is_dir():
            raise OutputError(f"cannot write '{name}': folder '{parent}' does not exist",
                              location=Location(key=option))
        return path

    if json_out is not None and json_out != "-":
        file_target("--json", json_out)
    if xlsx_out is not None:
        if xlsx_out == "-":
            raise OutputError("a workbook cannot go to standard output", location=Location(key="--xlsx"),
                              hint="give a file name ending in .xlsx")
        if file_target("--xlsx", xlsx_out).suffix.lower() != ".xlsx":
            raise OutputError(f"'{xlsx_out}' does not end in .xlsx", location=Location(key="--xlsx"),
                              hint="a workbook is written as FILE.xlsx, so spreadsheets open it as one")
    if html_out is not None:
        if html_out == "-":
            raise OutputError("the report cannot go to standard output", location=Location(key="--html"),
                              hint="give a file name ending in .html")
        file_target("--html", html_out)
    if csv_dir is not None:
        if not csv_dir.strip():
            raise OutputError("needs a folder name", location=Location(key="--csv"))
        if Path(csv_dir).exists() and not Path(csv_dir).is_dir():
            raise OutputError(f"'{csv_dir}' is a file, not a folder", location=Location(key="--csv"),
                              hint="give --csv a folder name")
