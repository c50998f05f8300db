"""``routeplan plan``: plan a campaign from a route file and write it out."""

from __future__ import annotations

import click

from routeplan.commands.common import (UNITS_HELP, check_output_paths, confidence_option, echo_caution, echo_err,
                                       echo_warnings, finish_outputs, output_set, record_yields_option, target_option,
                                       units_option)
from routeplan.vocab import YieldCase


@click.command("plan")
@click.argument("route", type=click.Path(dir_okay=False, path_type=str))
@click.option("--target", "target", metavar="MASS",
              help='Mass to deliver, with its unit, e.g. "40 kg" or "90 lb" (default: the route file\'s target.amount).')
@click.option("--json", "json_out", metavar="FILE",
              help="Write the plan as JSON to FILE ('-' for standard output).")
@click.option("--xlsx", "xlsx_out", metavar="FILE",
              help="Write charge sheets (a workbook with live formulas) to FILE.")
@click.option("--csv", "csv_dir", metavar="DIR",
              help="Write the plan's tables as CSV files into folder DIR (made if missing).")
@click.option("--html", "html_out", metavar="FILE",
              help="Write the campaign report (one self-contained HTML page: scheme, tables, charts) to FILE.")
@click.option("--stock", "stock_file", metavar="FILE",
              help="Stock on hand (YAML, CSV or xlsx: material, amount, unit): say what it allows and what to buy.")
@click.option("--yields", "yields", type=click.Choice([str(y) for y in YieldCase]), default=str(YieldCase.EXPECTED),
              show_default=True,
              help="Which yield of each step to plan with; 'low' sizes charges and purchases for the worst "
                   "case the yield ranges allow (a step without a range uses its expected yield).")
@click.option("--confidence", "confidence", metavar="PERCENT",
              help='Draw every step\'s yield from its range (beta-PERT) and run the campaign forward in each draw: '
                   'report how sure the delivery is, and the target and purchases to be PERCENT sure, e.g. "90 %".')
@click.option("--draws", "draws", type=int, metavar="N",
              help="Number of yield draws with --confidence (default 100000).")
@click.option("--seed", "seed", type=int, metavar="S", help="Seed of the yield draws with --confidence (default 1).")
@click.option("--record", "record_file", metavar="FILE",
              help="Campaign record (YAML, CSV or xlsx: step, batch, charged, isolated, assay): the lots made so "
                   "far; plan the rest of the campaign with what is in hand used first, and project the target.")
@click.option("--record-yields", "record_yields", type=click.Choice(["expected", "actual"]), default="expected",
              show_default=True,
              help="With --record: plan the remaining batches of a step that has lots at the route's yield "
                   "('expected') or at the assay-corrected mean yield its recorded lots gave ('actual').")
@click.option("--explain", "explain", is_flag=True,
              help="With --json: add to each charge the derivation of its numbers (factors with value, unit, "
                   "what and source); with --xlsx: add a Derivation sheet with live formulas.  The --html "
                   "report always has them: a number of a charge table opens its derivation.")
@click.option("--units", "units", metavar="UNITS", help=UNITS_HELP)
@click.option("--strict", is_flag=True, help="Treat every warning as an error (exit code 2).")
@click.option("--quiet", "-q", is_flag=True, help="Do not print the tables (warnings and errors still go to standard error).")
def plan_cmd(route: str, target: str | None, json_out: str | None, xlsx_out: str | None,
             csv_dir: str | None, html_out: str | None, stock_file: str | None, yields: str,
             confidence: str | None, draws: int | None,
             seed: int | None, record_file: str | None, record_yields: str, strict: bool,
             quiet: bool, explain: bool = False, units: str | None = None) -> None:
    """Plan every charge of every step of ROUTE for the target mass.

    Prints one table per step in execution order, the raw materials to charge over the
    whole campaign, what to order and the overall yield, every amount, mass and volume
    in one unit of its kind for the whole plan (chosen by the target's mass, or by
    --units).  With --confidence, also how sure the delivery is when the step yields
    vary within their ranges.
    """
    from routeplan.plan.planner import plan_route
    from routeplan.route.load import load_route

    check_output_paths(json_out=json_out, xlsx_out=xlsx_out, csv_dir=csv_dir, html_out=html_out)
    units_option(units)
    record_yields_option(record_file, record_yields)
    amount = target_option(target)
    level = confidence_option(confidence, draws, seed)
    r = load_route(route)
    # the report always shows derivations (closed, and left out of print unless opened);
    # the JSON and the workbook carry them only when asked for
    plan = plan_route(r, amount, stock=stock_file, yields=YieldCase(yields), confidence=level, draws=draws,
                      seed=seed, record=record_file, record_yields=record_yields,
                      explain=explain or html_out is not None)
    bare = plan
    if not explain and plan.derivation is not None:
        from dataclasses import replace

        bare = replace(plan, derivation=None)
    from routeplan.views.display_units import plan_units

    shown = plan_units(plan, units)  # the warnings name amounts in the units of the tables
    if strict and plan.warnings:
        echo_warnings(plan.warnings, strict=True, units=shown)
        n = len(plan.warnings)
        echo_err(f"{route}: {n} warning{'s' if n != 1 else ''}, counted as errors under --strict; nothing written")
        raise click.exceptions.Exit(2)
    with output_set() as out:  # every output complete before any is moved into place
        if json_out is not None:
            from routeplan.export.json import plan_to_json

            out.text(json_out, plan_to_json(bare))
        if xlsx_out is not None:
            from routeplan.export.workbook import write_workbook

            write_workbook(bare, out.file(xlsx_out, suffix=".xlsx"))
        if html_out is not None:
            from routeplan.export.html import write_plan_html

            write_plan_html(plan, out.file(html_out, suffix=".html"), shown)
        if csv_dir is not None:
            from routeplan.export.csv import write_csv

            write_csv(bare, out.folder(csv_dir))
    finish_outputs(out)
    if json_out == "-" or quiet:
        echo_warnings(plan.warnings, units=shown)
        echo_caution(err=True)
    else:
        from routeplan.export.terminal import print_plan

        print_plan(plan, units=shown, caution=False)
        echo_warnings(plan.warnings, units=shown)  # after the tables, where the reader is
        echo_caution()


def register(cli: click.Group) -> None:
    """Add ``plan`` to the command line."""
    cli.add_command(plan_cmd)
