"""``routeplan check``: load route files, report every mistake, summarise the valid ones."""

from __future__ import annotations

import click

from routeplan.commands.common import echo_caution, echo_err, echo_warnings
from routeplan.views.numbers import given_pct
from routeplan.vocab import Severity


def planned_warnings(route) -> tuple:
    """The route's warnings and those of its plan at the route's own target.

    Planning at the target is what ``plan`` does, so a route that checks clean plans clean
    (a step far above its demonstrated batch, or needing many batches, is only seen there).

    Parameters
    ----------
    route : Route
        A loaded route.

    Returns
    -------
    tuple of Problem
        The plan's warnings (they include the route's own, first).

    Raises
    ------
    RouteplanError
        The route cannot be planned at its target.
    """
    from routeplan.plan.planner import plan_route

    return tuple(plan_route(route).warnings)


def summary(route, count: int, strict: bool = False) -> list[str]:
    """Lines that summarise a checked route: steps in execution order, materials, sequence.

    Parameters
    ----------
    route : Route
        A loaded route.
    count : int
        Warnings found (route and plan).
    strict : bool
        Checked with ``--strict``: a route with warnings is then not called valid.

    Returns
    -------
    list of str
    """
    from routeplan.route.graph import execution_order, longest_linear_sequence

    t = route.target
    amount = t.amount.to("kg").magnitude
    verdict = "not valid under --strict" if strict and count else "valid"
    lines = [f"{route.source.path if route.source else '<route>'}: {verdict}: {route.name}",
             f"  target: {amount:g} kg of {t.material}" + (f" (+{given_pct(t.overage)} overage)" if t.overage else "")]
    order = execution_order(route)
    lines.append("  steps in execution order:")
    width = max(len(s) for s in order)
    for n, sid in enumerate(order, 1):
        s = route.step(sid)
        extra = [f"yield {given_pct(s.yield_.expected)}"]
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
    if count:
        lines.append(f"  warnings: {count} (on standard error)")
    return lines


def _print_lines(lines: list[str]) -> None:
    """Lines to standard output, each folded to the width with a hanging indent."""
    from routeplan.export.terminal import print_blocks
    from routeplan.views.text_blocks import para_of_line

    print_blocks([para_of_line(x, hang=6 if x.lstrip()[:1].isdigit() else 4) for x in lines])


@click.command("check")
@click.argument("routes", nargs=-1, required=True, metavar="ROUTE...")
@click.option("--strict", is_flag=True, help="Treat every warning as an error (exit code 2).")
@click.pass_context
def check_cmd(ctx: click.Context, routes: tuple[str, ...], strict: bool) -> None:
    """Check each ROUTE file and explain every mistake found.

    Each valid route is also planned at its own target, and the plan's warnings (a step
    far above its demonstrated batch, many batches) are reported with the route's, so a
    route that checks clean plans clean.  For a valid route, prints a short summary (steps in execution order, raw materials,
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
            echo_warnings(exc.warnings, strict=strict)
            n, w = len(exc.problems), len(exc.warnings)
            also = f" and {w} warning{'s' if w != 1 else ''}" if w else ""
            echo_err(f"{path}: {n} error{'s' if n != 1 else ''}{also}, not a valid route")
            failed += 1
            continue
        except RouteplanError as exc:
            echo_err(f"{Severity.ERROR}: {exc.render()}")
            failed += 1
            continue
        try:
            warnings = planned_warnings(route)
        except RouteplanError as exc:
            echo_err(f"{Severity.ERROR}: {exc.render()}")
            echo_err(f"{path}: the route loads, but cannot be planned at its target")
            failed += 1
            continue
        valid += 1
        _print_lines(summary(route, len(warnings), strict))
        echo_warnings(warnings, strict=strict)
        if strict and warnings:
            n = len(warnings)
            echo_err(f"{path}: {n} warning{'s' if n != 1 else ''}, counted as errors under --strict")
            failed += 1
    if valid:
        echo_caution()
    if failed:
        ctx.exit(2)


def register(cli: click.Group) -> None:
    """Add ``check`` to the command line."""
    cli.add_command(check_cmd)
