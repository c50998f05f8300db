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
