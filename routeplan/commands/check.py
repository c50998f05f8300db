"""``routeplan check``: load route files, report every mistake, summarise the valid ones."""

from __future__ import annotations

import click

from routeplan.commands.common import caution_line, echo_err, echo_warnings
from routeplan.vocab import Severity


def _pct(x: float) -> str:
    return f"{x * 100:.4g} %"


def summary(route) -> list[str]:
    """Lines that summarise a checked route: steps in execution order, materials, sequence.

    Parameters
    ----------
    route : Route
        A loaded route.

    Returns
    -------
    list of str
    """
    from routeplan.route.graph import execution_order, longest_linear_sequence

    t = route.target
    amount = t.amount.to("kg").magnitude
    lines = [f"{route.source.path if route.source else '<route>'}: valid: {route.name}",
             f"  target: {amount:g} kg of {t.material}" + (f" (+{_pct(t.overage)} overage)" if t.overage else "")]
    order = execution_order(route)
    lines.append("  steps in execution order:")
    width = max(len(s) for s in order)
    for n, sid in enumerate(order, 1):
        s = route.step(sid)
        extra = [f"yield {_pct(s.yield_.expected)}"]
        if not s.isolated:
            extra.append("telescoped")
        if s.vessel:
            extra.append(f"in {s.vessel}")
        name = f" {s.name}:" if s.name != s.id else ""
        lines.append(f"    {n}. {sid:<{width}}{name} {s.equation_text}  ({', '.join(extra)})")
    used: list[str] = []
    for s in route.steps:
        for c in s.charges:
            if c.material not in used:
                used.append(c.material)
    made = route.intermediates
    products = {t.key for s in route.steps for t in s.equation.products}
    raw = [k for k in route.materials if k in used and k not in made]
    intermediates = [k for k in route.materials if k in made and k != t.material]
    byproducts = [k for k in route.materials if k in products and k not in made and k not in used]
    unused = [k for k in route.materials if k not in used and k not in products]
    lines.append("  raw materials: " + (", ".join(raw) or "none"))
    lines.append("  intermediates: " + (", ".join(intermediates) or "none"))
    if byproducts:
        lines.append("  by-products: " + ", ".join(byproducts))
    if unused:
        lines.append("  defined but not used: " + ", ".join(unused))
    lls = longest_linear_sequence(route)
    lines.append(f"  longest linear sequence: {' -> '.join(lls)} ({len(lls)} step{'s' if len(lls) != 1 else ''})")
    if route.warnings:
        lines.append(f"  warnings: {len(route.warnings)} (on standard error)")
    return lines


@click.command("check")
@click.argument("routes", nargs=-1, required=True, metavar="ROUTE...")
@click.option("--strict", is_flag=True, help="Treat every warning as an error (exit code 2).")
@click.pass_context
def check_cmd(ctx: click.Context, routes: tuple[str, ...], strict: bool) -> None:
    """Check each ROUTE file and explain every mistake found.

    For a valid route, prints a short summary (steps in execution order, raw materials,
    intermediates, longest linear sequence).  Errors and warnings go to standard error,
    each with file, line, column and key.  Exit code 0 when every file is valid (warnings
    allowed), 2 when any file has an error, or any warning under --strict.
    """
    from routeplan.errors import RouteError, RouteplanError
    from routeplan.route.load import load_route

    failed = 0
    valid = 0
    for path in routes:
        try:
            route = load_route(path)
        except RouteError as exc:
            for p in exc.problems:
                echo_err(f"{Severity.ERROR}: {p.render()}")
            n = len(exc.problems)
            echo_err(f"{path}: {n} error{'s' if n != 1 else ''}, not a valid route")
            failed += 1
            continue
        except RouteplanError as exc:
            echo_err(f"{Severity.ERROR}: {exc.render()}")
            failed += 1
            continue
        valid += 1
        for line in summary(route):
            click.echo(line)
        echo_warnings(route.warnings, strict=strict)
        if strict and route.warnings:
            n = len(route.warnings)
            echo_err(f"{path}: {n} warning{'s' if n != 1 else ''}, counted as errors under --strict")
            failed += 1
    if valid:
        click.echo(caution_line())
    if failed:
        ctx.exit(2)


def register(cli: click.Group) -> None:
    """Add ``check`` to the command line."""
    cli.add_command(check_cmd)
