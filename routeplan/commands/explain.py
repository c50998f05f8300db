"""``routeplan explain``: the derivation of one number of the plan, factor by factor."""

from __future__ import annotations

import click

from routeplan.commands.common import (UNITS_HELP, echo_caution, echo_warnings, record_yields_option, target_option,
                                       units_option)
from routeplan.vocab import YieldCase


@click.command("explain")
@click.argument("route", type=click.Path(dir_okay=False, path_type=str))
@click.argument("what", metavar="STEP MATERIAL | target | raw MATERIAL", nargs=-1, required=True)
@click.option("--target", "target", metavar="MASS",
              help='Mass to deliver, with its unit, e.g. "40 kg" (default: the route file\'s target.amount).')
@click.option("--stock", "stock_file", metavar="FILE",
              help="Stock on hand (YAML, CSV or xlsx), as for plan: intermediates on the shelf are used first.")
@click.option("--yields", "yields", type=click.Choice([str(y) for y in YieldCase]), default=str(YieldCase.EXPECTED),
              show_default=True, help="Which yield of each step to plan with, as for plan.")
@click.option("--record", "record_file", metavar="FILE",
              help="Campaign record (YAML, CSV or xlsx), as for plan: explain the rest of the campaign.")
@click.option("--record-yields", "record_yields", type=click.Choice(["expected", "actual"]), default="expected",
              show_default=True, help="With --record: as for plan.")
@click.option("--units", "units", metavar="UNITS", help=UNITS_HELP + " The result is shown as plan shows it.")
def explain_cmd(route: str, what: tuple[str, ...], target: str | None, stock_file: str | None,
                yields: str, record_file: str | None, record_yields: str, units: str | None = None) -> None:
    """Show how the plan of ROUTE gets one number, one chain of factors per line.

    STEP MATERIAL: the charge of MATERIAL in STEP; target: the moles of target to make;
    raw MATERIAL: a raw material's mass over the campaign.  Every factor carries its unit
    and its source (the route file's line, the atomic weights table).
    """
    from routeplan.errors import Location, PlanError
    from routeplan.plan.planner import plan_route
    from routeplan.route.load import load_route
    from routeplan.views.derivation_text import charge_text, raw_text, target_text
    from routeplan.views.display_units import plan_units

    record_yields_option(record_file, record_yields)
    if what[0] not in ("target", "raw") and len(what) != 2 or what[0] == "target" and len(what) != 1 \
            or what[0] == "raw" and len(what) != 2:
        raise PlanError(f"cannot read '{' '.join(what)}'", location=Location(key="explain"),
                        hint="give STEP MATERIAL, 'target' or 'raw MATERIAL'")
    units_option(units)
    amount = target_option(target)
    r = load_route(route)
    plan = plan_route(r, amount, stock=stock_file, yields=YieldCase(yields), record=record_file,
                      record_yields=record_yields, explain=True)
    shown = plan_units(plan, units)
    if what[0] == "target":
        lines = target_text(plan)
    elif what[0] == "raw":
        lines = raw_text(plan, what[1], shown)
    else:
        lines = charge_text(plan, what[0], what[1], shown)
    from routeplan.export.terminal import print_blocks
    from routeplan.views.text_blocks import Para

    # each line of the chain folded to the width, its continuation indented under it
    print_blocks([Para(line, hang=3) for line in lines])
    echo_warnings(plan.warnings, units=shown)
    echo_caution()


def register(cli: click.Group) -> None:
    """Add ``explain`` to the command line."""
    cli.add_command(explain_cmd)
