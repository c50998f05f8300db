"""Small helpers shared by the command modules (no heavy imports)."""

from __future__ import annotations

import click

from routeplan import CAUTION
from routeplan.vocab import Severity


def echo_err(text: str) -> None:
    """Write a line to standard error, after what is waiting for standard output.

    Flushing standard output first keeps the two in order where they meet (``2>&1``, a
    terminal): a warning never lands inside a line of the tables.
    """
    import sys

    try:
        sys.stdout.flush()
    except (OSError, ValueError):  # a closed standard output: the funnel reports it
        pass
    click.echo(text, err=True)


def echo_warnings(problems, *, strict: bool = False, units=None) -> None:
    """Print warnings to standard error, each once, in the order found.

    On a terminal a long warning is folded to its width with a hanging indent; otherwise
    each stays on one line (``file:line:column: ...``), as editors and ``grep`` read them.
    With ``units`` (a :class:`routeplan.views.display_units.DisplayUnits`), the amounts a
    plan's warning names are in the plan's units, as its tables are.
    """
    import sys

    from routeplan.export.terminal import is_terminal, output_width, wrap_text

    fold = is_terminal(sys.stderr)
    width = output_width(sys.stderr) if fold else 0
    seen: set[str] = set()
    for p in problems:
        text = f"{Severity.ERROR if strict else Severity.WARNING}: {p.render(None if units is None else units.text)}"
        if text in seen:
            continue
        seen.add(text)
        echo_err("\n".join(wrap_text(text, width, hang=4)) if fold else text)


def echo_caution(*, err: bool = False) -> None:
    """Print the safety caution as the last lines of standard output, folded to its width;
    with ``err``, as one line on standard error (standard output holds JSON, or nothing)."""
    if err:
        echo_err("CAUTION: " + CAUTION)
        return
    from routeplan.export.terminal import print_blocks
    from routeplan.views.plan_text import caution_block

    print_blocks([caution_block()])


#: Help text of ``--units``, written out so that ``--help`` loads no view; the sets and thresholds it
#: names are those of :mod:`routeplan.views.display_units` (a test holds the two together).
UNITS_HELP = ("Units of the whole printout, one per kind: 'auto' (default: lab = mmol, g, mL below 1 kg of "
              "target; kilo = mol, kg, L below 100 kg; plant = kmol, kg, L from 100 kg), 'lab', 'kilo', "
              "'plant', or units separated by commas, e.g. 'g,mmol,mL' or 't,m3' (from mmol, mol, kmol; mg, g, "
              "kg, t; mL, L, m3; a kind left out follows 'auto').")


def units_option(text: str | None) -> str | None:
    """Check a ``--units`` value before anything is planned; returns it unchanged.

    Raises
    ------
    QuantityError
        A value that names no set and no unit routeplan shows (located at ``--units``).
    """
    from routeplan.views.display_units import parse_units

    parse_units(text)
    return text


def target_option(target: str | None):
    """``--target`` as a mass (a pint Quantity [kg or any mass unit]), or None when not given.

    Raises
    ------
    QuantityError
        A value that is not a mass with its unit (located at ``--target``).
    """
    if target is None:
        return None
    from routeplan.errors import Location
    from routeplan.units import parse_quantity

    return parse_quantity(target, "mass", where=Location(key="--target"))


def record_yields_option(record_file: str | None, record_yields: str) -> None:
    """Refuse ``--record-yields`` other than ``expected`` without ``--record`` (a usage error)."""
    if record_yields != "expected" and record_file is None:
        raise click.UsageError("--record-yields applies to a campaign record; give --record FILE too")


def write_text_output(text: str, dest: str) -> None:
    """Write ``text`` to standard output (``dest == "-"``) or atomically to a file."""
    if dest == "-":
        click.echo(text, nl=False)
        return
    from routeplan.export.atomic import write_text_atomic

    write_text_atomic(dest, text)
    echo_err(f"wrote {dest}")


class _Outputs:
    """The outputs of one command: files and folders through an
    :class:`~routeplan.export.atomic.OutputSet`, standard output (``-``) held back until
    every file is in place, so that a failure leaves nothing half written anywhere."""

    def __init__(self) -> None:
        from routeplan.export.atomic import OutputSet

        self.files = OutputSet()
        self.stdout: list[str] = []

    def text(self, dest: str, text: str) -> None:
        if dest == "-":
            self.stdout.append(text)
        else:
            self.files.text(dest, text)

    def file(self, dest: str, *, suffix: str = ""):
        return self.files.file(dest, suffix=suffix)

    def folder(self, dest: str):
        return self.files.folder(dest)

    def __enter__(self) -> "_Outputs":
        return self

    def __exit__(self, kind, exc, tb) -> None:
        self.files.__exit__(kind, exc, tb)


def output_set() -> _Outputs:
    """A new set of outputs for one command (see :class:`_Outputs`)."""
    return _Outputs()


def finish_outputs(out: _Outputs) -> None:
    """Say what was written (standard error), then write what goes to standard output."""
    for line in out.files.report:
        echo_err(line)
    for text in out.stdout:
        click.echo(text, nl=False)


def check_output_paths(*, json_out: str | None = None, xlsx_out: str | None = None,
                       csv_dir: str | None = None, html_out: str | None = None) -> None:
    """Refuse an output path that cannot work, before anything is computed or written.

    Every output is then written to a temporary file and moved into place only when all
    are complete (:func:`output_set`); checking every path first means a mistake in the
    last one is found before anything is computed.

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


def confidence_option(confidence: str | None, draws: int | None, seed: int | None) -> float | None:
    """``--confidence`` as a fraction [-], with ``--draws`` and ``--seed`` checked beside it.

    Raises
    ------
    RouteplanError
        A confidence that is not a percent above 0 and below 100 %, draws or a seed out
        of range, or ``--draws`` / ``--seed`` without ``--confidence``; located at the option.
    """
    from routeplan.errors import Location, PlanError

    if confidence is None:
        for option, value in (("--draws", draws), ("--seed", seed)):
            if value is not None:
                raise PlanError("this option works only with --confidence", location=Location(key=option),
                                hint="add e.g. --confidence '90 %'")
        return None
    from routeplan.plan.uncertainty import DEFAULT_DRAWS, DEFAULT_SEED, check_options
    from routeplan.units import parse_fraction

    level = parse_fraction(confidence, where=Location(key="--confidence"))
    check_options(level, DEFAULT_DRAWS if draws is None else draws, DEFAULT_SEED if seed is None else seed)
    return level
