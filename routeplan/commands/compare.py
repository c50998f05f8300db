"""``routeplan compare``: routes to one target, planned for one target mass, side by side."""

from __future__ import annotations

import click

from routeplan.commands.common import (UNITS_HELP, check_output_paths, confidence_option, echo_caution, echo_warnings,
                                       finish_outputs, output_set, target_option, units_option)
from routeplan.vocab import YieldCase


@click.command("compare")
@click.argument("routes", nargs=-1, required=True, type=click.Path(dir_okay=False, path_type=str))
@click.option("--target", "target", metavar="MASS",
              help='Mass to deliver from every route, with its unit, e.g. "40 kg" (default: the '
                   "first route's target.amount, used for all routes).")
@click.option("--json", "json_out", metavar="FILE",
              help="Write the comparison as JSON to FILE ('-' for standard output).")
@click.option("--xlsx", "xlsx_out", metavar="FILE",
              help="Write the comparison as a workbook to FILE.")
@click.option("--html", "html_out", metavar="FILE",
              help="Write the comparison as one self-contained HTML page (schemes side by side) to FILE.")
@click.option("--yields", "yields", type=click.Choice([str(y) for y in YieldCase]), default=str(YieldCase.EXPECTED),
              show_default=True, help="Which yield of each step every route is planned with.")
@click.option("--confidence", "confidence", metavar="PERCENT",
              help='Draw every route\'s step yields from their ranges and compare the probability of delivering '
                   'and the target to plan for PERCENT confidence, e.g. "90 %".')
@click.option("--draws", "draws", type=int, metavar="N", help="Number of yield draws with --confidence (default 100000).")
@click.option("--seed", "seed", type=int, metavar="S", help="Seed of the yield draws with --confidence (default 1).")
@click.option("--units", "units", metavar="UNITS", help=UNITS_HELP)
def compare_cmd(routes: tuple[str, ...], target: str | None, json_out: str | None,
                xlsx_out: str | None, html_out: str | None, yields: str, confidence: str | None,
                draws: int | None, seed: int | None, units: str | None = None) -> None:
    """Compare two or more ROUTES to the same target, side by side.

    Every route is planned for the same mass of target: --target if given, else the
    target.amount of the FIRST route (a note says so when the other files ask for
    another amount); each route keeps its own overage.  The routes must make the same
    target: the same material key, formula and molar mass, or it is an error.

    Rows: steps, longest linear sequence, overall yield, process mass intensity,
    complete and simple E-factor, raw-material cost per kg, batches and the largest
    single raw material; with --confidence, the probability of delivering and the
    target to plan for that confidence.  The best value of each row is marked (lower is better,
    except overall yield and probability of delivering), and one sentence sums up the trade-off.
    """
    if len(routes) < 2:
        raise click.UsageError("give at least two route files to compare")
    from routeplan.plan.compare import compare_plans, plan_for_comparison
    from routeplan.route.load import load_route

    check_output_paths(json_out=json_out, xlsx_out=xlsx_out, html_out=html_out)
    units_option(units)
    amount = target_option(target)
    level = confidence_option(confidence, draws, seed)
    loaded = [load_route(path) for path in routes]
    plans, notes = plan_for_comparison(loaded, amount, yields=YieldCase(yields), confidence=level, draws=draws, seed=seed)
    cmp = compare_plans(plans, notes)
    from dataclasses import replace

    from routeplan.views.display_units import choose_units

    shown = choose_units(cmp.amount, units)
    for label, plan in zip(cmp.labels, plans):
        # a warning without a file in its location would not say which route it is about
        echo_warnings([p if p.location is not None and p.location.file
                       else replace(p, message=f"{label}: {p.message}",
                                    parts=(f"{label}: ", *p.parts) if p.parts else ())
                       for p in plan.warnings], units=shown)
    with output_set() as out:  # every output complete before any is moved into place
        if json_out is not None:
            from routeplan.export.compare_out import comparison_to_json

            out.text(json_out, comparison_to_json(cmp))
        if xlsx_out is not None:
            from routeplan.export.compare_out import write_comparison_xlsx

            write_comparison_xlsx(cmp, out.file(xlsx_out, suffix=".xlsx"))
        if html_out is not None:
            from routeplan.export.html import write_compare_html

            write_compare_html(cmp, out.file(html_out, suffix=".html"), shown)
    finish_outputs(out)
    if json_out == "-":
        echo_caution(err=True)
    else:
        from routeplan.export.compare_out import print_comparison

        print_comparison(cmp, units=shown)


def register(cli: click.Group) -> None:
    """Add ``compare`` to the command line."""
    cli.add_command(compare_cmd)
