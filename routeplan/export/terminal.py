"""The plan on the terminal: one table per step, raw-material totals, yield, caution.

Reads only the Plan (through :mod:`routeplan.views.tables`); rich is imported here,
and this module is imported only when printing.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich import box
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from routeplan.views.metrics_text import metrics_lines
from routeplan.views.safety_text import step_safety_lines
from routeplan.views.tables import charge_label, column_unit, fmt, raw_material_rows, step_charge_rows

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.plan.model import Plan

__all__ = ["print_plan", "fmt", "make_console", "PlainTable", "Printer"]


class _Console(Console):
    """A rich console that leaves quietly, with a shell's code 141, when its reader goes away."""

    def on_broken_pipe(self) -> None:
        import os

        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, 1)  # nothing more reaches the closed pipe
        raise SystemExit(141)  # 128 + SIGPIPE


def make_console() -> Console:
    """A console for standard output; 120 columns when piped to a file (no need to squeeze)."""
    con = _Console()
    return con if con.is_terminal else _Console(width=120)


class PlainTable:
    """A table laid out as plain text: the subset of rich's Table that the plan uses.

    Piped output (a file, another program) gets these: aligned columns, a rule of ``-``
    under the headings, no colour and no box characters, and a hundred times faster to
    lay out than a rich table.
    """

    def __init__(self, title: str | None = None, **_ignored) -> None:
        self.title = title
        self.columns: list[tuple[str, str]] = []
        self.rows: list[list[str]] = []

    def add_column(self, header: str, justify: str = "left") -> None:
        self.columns.append((header, justify))

    def add_row(self, *cells: str) -> None:
        self.rows.append(list(cells))

    def lines(self) -> list[str]:
        from rich.text import Text

        heads = [Text.from_markup(h).plain for h, _j in self.columns]
        body = [[Text.from_markup(c).plain for c in r] for r in self.rows]
        widths = [max([len(h)] + [len(r[i]) for r in body]) for i, h in enumerate(heads)]

        def line(cells):
            out = []
            for (_, justify), w, c in zip(self.columns, widths, cells):
                out.append(c.rjust(w) if justify == "right" else c.ljust(w))
            return "  " + "  ".join(out).rstrip()

        text = [] if not self.title else [Text.from_markup(self.title).plain]
        return text + [line(heads), "  " + "  ".join("-" * w for w in widths)] + [line(r) for r in body]


class Printer:
    """Prints markup lines and tables to a console: through rich on a terminal, as plain text otherwise."""

    def __init__(self, console: Console) -> None:
        self.console = console
        self.plain = not console.is_terminal

    def table(self, **kwargs):
        """A new table: rich's on a terminal, :class:`PlainTable` otherwise."""
        return PlainTable(**kwargs) if self.plain else Table(**kwargs)

    def __call__(self, item="") -> None:
        if not self.plain:
            self.console.print(item)
            return
        from rich.text import Text

        lines = item.lines() if isinstance(item, PlainTable) else [Text.from_markup(str(item)).plain]
        try:
            self.console.file.write("\n".join(lines) + "\n")
        except BrokenPipeError:
            self.console.on_broken_pipe()


def _step_table(sp, route, new_table=Table) -> Table:
    rows = step_charge_rows(sp)
    made_in = route.maker
    mu, mf = column_unit([r["mass_kg"] for r in rows], "mass")
    vu, vf = column_unit([r["volume_L"] for r in rows], "volume")
    nu, nf = column_unit([r["mol"] for r in rows], "amount")
    per_batch = sp.batches > 1
    t = new_table(box=box.SIMPLE_HEAD, pad_edge=False)
    t.add_column("#", justify="right")
    t.add_column("material")
    t.add_column("role")
    t.add_column("equiv", justify="right")
    t.add_column(escape(f"n [{nu}]"), justify="right")
    t.add_column(escape(f"m [{mu}]"), justify="right")
    t.add_column(escape(f"V [{vu}]"), justify="right")
    if per_batch:
        t.add_column(escape(f"m/batch [{mu}]"), justify="right")
        t.add_column(escape(f"V/batch [{vu}]"), justify="right")
    for r in rows:
        name = charge_label(r, made_in)
        cells = [
            str(r["order"]), name, r["role"], fmt(r["equiv"], 3),
            fmt(None if r["mol"] is None else r["mol"] / nf),
            fmt(r["mass_kg"] / mf),
            fmt(None if r["volume_L"] is None else r["volume_L"] / vf),
        ]
        if per_batch:
            cells += [fmt(r["batch_mass_kg"] / mf),
                      fmt(None if r["batch_volume_L"] is None else r["batch_volume_L"] / vf)]
        t.add_row(*[escape(x) for x in cells])
    return t


def _step_footer(plan, sp) -> str:
    from routeplan.views.transfer_text import transfer_text

    pm = sp.product_mass.m_as("kg")
    pu, pf = column_unit([pm], "mass")
    text = f"  makes {fmt(sp.product_mol.m_as('mol'))} mol {sp.product} ({fmt(pm / pf)} {pu}"
    text += " as isolated)" if sp.isolated else " in solution)"
    b = sp.batch
    if b is not None and b.vessel is not None:
        text += (f"\n  vessel {b.vessel}: {b.batches} batch{'es' if b.batches != 1 else ''} of "
                 f"{fmt(b.batch_volume.m_as('L'))} L, fill {b.fill_fraction:.0%} of nominal volume")
    if b is not None:
        for note in b.notes:
            text += f"\n  note: {note}"
    transfer = transfer_text(plan, sp)
    if transfer:
        text += f"\n  {transfer}"
    return text


def _stock_line(sp) -> str:
    """What the stock of the step's product does to the step ("" when not in the stock list)."""
    from routeplan.views.tables import display_quantity

    taken = None if sp.from_stock_mass is None else sp.from_stock_mass.m_as("kg")
    if not sp.runs:
        text = f"  not run: {sp.not_run}"
        if taken:
            text += f" ({display_quantity(taken, 'mass')} of {sp.product} taken from stock)"
        return text + "; nothing to charge"
    if taken:
        return f"  {display_quantity(taken, 'mass')} of {sp.product} taken from stock; this step makes the rest"
    return ""


def _raw_table(plan, new_table=Table) -> Table:
    rows = raw_material_rows(plan)
    mu, mf = column_unit([r["mass_kg"] for r in rows], "mass")
    vu, vf = column_unit([r["volume_L"] for r in rows], "volume")
    cur = plan.route.currency
    t = new_table(title="[bold]Raw materials to charge, whole campaign[/bold]", box=box.SIMPLE_HEAD,
                  title_justify="left", pad_edge=False)
    t.add_column("material")
    t.add_column(escape(f"mass [{mu}]"), justify="right")
    t.add_column(escape(f"volume [{vu}]"), justify="right")
    t.add_column(escape(f"cost [{cur}]") if cur else "cost", justify="right")
    t.add_column("used in")
    for r in rows:
        t.add_row(escape(r["material"]), fmt(r["mass_kg"] / mf),
                  fmt(None if r["volume_L"] is None else r["volume_L"] / vf),
                  f"{r['cost']:,.2f}" if r["cost"] is not None else "–", escape(r["steps"]))
    return t


def _print_purchases(con, plan) -> None:
    """The purchase list (bought materials, need in kg and L, packs to order) and the
    note on materials not bought."""
    from routeplan.views.purchase_rows import not_bought_note, purchase_rows

    rows = purchase_rows(plan)
    stock = plan.stock is not None
    title = "To order, whole campaign" + (", less the stock on hand" if stock else "")
    t = con.table(title=f"[bold]{title}[/bold]", box=box.SIMPLE_HEAD, title_justify="left",
                  pad_edge=False)
    extra = (("from stock [kg]", "right"), ("to buy [kg]", "right"), ("to buy [L]", "right")) if stock else ()
    for head, just in (("material", "left"), ("need [kg]", "right"), ("need [L]", "right"), *extra,
                       ("pack", "right"), ("packs", "right"), ("ordered", "right")):
        t.add_column(escape(head), justify=just)
    for r in rows:
        bought = (fmt(r["stock_kg"]), fmt(r["buy_kg"]), fmt(r["buy_L"])) if stock else ()
        t.add_row(escape(r["material"]), fmt(r["need_kg"]), fmt(r["need_L"]), *bought, escape(r["pack"] or "–"),
                  "–" if r["packs"] is None else str(r["packs"]), escape(r["ordered"] or "–"))
    con(t)
    note = not_bought_note(plan)
    if note:
        con(escape("  " + note))


def _print_time_waste_cost(con: "Printer", plan: "Plan") -> None:
    """The schedule's timeline, the waste streams and the cost of goods (headings in bold)."""
    from routeplan.views.schedule_text import schedule_lines
    from routeplan.views.waste_cost_text import cost_lines, waste_lines

    for block in (schedule_lines(plan), waste_lines(plan), cost_lines(plan)):
        if not block:
            continue
        con()
        con(f"[bold]{escape(block[0])}[/bold]")
        for line in block[1:]:
            if con.plain:
                con(escape(line))
            else:  # on a terminal too, a timeline lane must not be folded
                con.console.print(escape(line), soft_wrap=True)


def print_plan(plan: "Plan", *, console: Console | None = None, caution: bool = True) -> None:
    """Print the plan to the terminal (standard output by default).

    With ``caution=False`` the caller prints the safety caution itself (the command line
    prints the warnings first, then the caution).
    """
    from routeplan import CAUTION

    con = Printer(console or make_console())
    tm = plan.target_mass.m_as("kg")
    overage = plan.route.target.overage
    made_of = (f"{fmt(tm / (1 + overage))} kg + {overage * 100:.3g} % overage, " if overage else "")
    con(f"[bold]{escape(plan.route.name)}[/bold]: {fmt(tm)} kg of {escape(plan.target_material)} "
              f"({made_of}{fmt(plan.target_mol.m_as('mol'))} mol), "
              f"{len(plan.steps)} step{'s' if len(plan.steps) != 1 else ''}"
              + (f", planned at the steps' [bold]{plan.yield_basis}[/bold] yields" if plan.yield_basis != "expected"
                 else ""))
    con("[dim]n: amount of the compound, m: mass and V: volume as charged; "
              "(S1) after a material: made in step S1; in solution: V is the reaction mixture carried in; "
              "(separated): run off right after it is charged, not carried on[/dim]")
    con()
    for sp in plan.steps:
        title = f"{sp.id} · {sp.name}" if sp.name and sp.name != sp.id else sp.id
        con(f"[bold]{escape(title)}[/bold]   {escape(sp.equation)}   yield {sp.yield_:.0%}"
                  + ("   [italic]telescoped: the product goes on in solution[/italic]" if not sp.isolated else ""))
        if sp.runs:
            con(_step_table(sp, plan.route, con.table))
            con(escape(_step_footer(plan, sp)))
            for line in step_safety_lines(sp):
                con(escape("  " + line))
        stock_line = _stock_line(sp)
        if stock_line:
            con(escape(stock_line))
        con()
    con(_raw_table(plan, con.table))
    _print_purchases(con, plan)
    oy = plan.overall_yield
    con(escape(f"Overall yield along the longest linear sequence "
              f"({' -> '.join(oy.longest_linear_sequence)}): {oy.yield_:.1%}"
                     + (f" (from {oy.low:.1%} to {oy.high:.1%} with the steps' low and high yields)"
                        if oy.low is not None and (oy.low, oy.high) != (oy.yield_, oy.yield_) else "")))
    for key, y in oy.by_raw_material.items():
        con(escape(f"  from {key}: {y:.1%}"))
    if plan.metrics is not None:
        for line in metrics_lines(plan.metrics, plan.target_material):
            con(line)
    _print_time_waste_cost(con, plan)
    if plan.stock is not None:
        from routeplan.views.stock_text import stock_lines

        for line in stock_lines(plan):
            con(escape(line))
    if plan.record is not None:
        from routeplan.views.record_text import record_lines

        for line in record_lines(plan):
            con(escape(line))
    if plan.uncertainty is not None:
        from routeplan.views.uncertainty_text import uncertainty_lines

        con()
        for line in uncertainty_lines(plan):
            con(escape(line))
    con()
    if caution:
        con(f"[bold]CAUTION[/bold]: {CAUTION}")
