"""Charts of the report as inline SVG, drawn with matplotlib (the ``plots`` extra).

Each function takes series from :mod:`routeplan.views.report` and returns SVG text ready
to sit inside the HTML page: no XML header, element ids prefixed so that several charts
share one page, text kept as text (searchable, selectable, printed sharp).  matplotlib is
imported inside :func:`charts`; without it, :func:`charts` raises ImportError and the
report says so.  No pyplot: figures are built directly, so no global state is touched.
"""

from __future__ import annotations

import io
import re
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.views.report import ChartData

__all__ = ["charts", "PALETTE", "svg_for_page"]

#: Colours of the materials in the mass and cost charts (our own choice); "other" is grey.
PALETTE = ("#1f6f8b", "#e07a1f", "#3a9d5d", "#b8455a", "#7b5ea7", "#c9a227", "#4f8fc0", "#8c6d46")
_OTHER = "#a9a9a9"
_INK = "#222222"
_TOP = 7  # materials with a colour of their own; the rest are "other"

_RC = {"svg.fonttype": "none", "font.size": 8.5, "font.family": "sans-serif", "axes.edgecolor": "#666666",
       "axes.spines.top": False, "axes.spines.right": False, "svg.hashsalt": "routeplan"}


def svg_for_page(svg: str, prefix: str) -> str:
    """``svg`` without its XML header, every id prefixed with ``prefix`` (references too)."""
    svg = re.sub(r"<\?xml[^>]*\?>\s*", "", svg)
    svg = re.sub(r"<!DOCTYPE[^>]*>\s*", "", svg)
    ids = set(re.findall(r'\bid="([^"]+)"', svg))
    if ids:
        pattern = re.compile(r'(\bid="|url\(#|href="#)(' + "|".join(map(re.escape, sorted(ids, key=len, reverse=True)))
                             + r')(?=[")])')
        svg = pattern.sub(lambda m: m.group(1) + prefix + m.group(2), svg)
    return svg.strip()


def _to_svg(fig, prefix: str, labels=(), *, bottom_in: float = 0.5) -> str:
    """The figure as page-ready SVG, margins set from the longest y label (one drawing only)."""
    w, h = fig.get_size_inches()
    left_in = 0.3 + 0.075 * max((len(x) for x in labels), default=4)  # about 8.5 pt text (from memory)
    fig.subplots_adjust(left=min(left_in / w, 0.45), right=0.97, bottom=bottom_in / h, top=1 - 0.15 / h)
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    return svg_for_page(buf.getvalue(), prefix)


def _colours(materials):
    """Material -> colour: the heaviest get a colour of their own, the rest grey."""
    return {m: PALETTE[i % len(PALETTE)] if i < _TOP else _OTHER for i, m in enumerate(materials)}


def _mass_chart(data: "ChartData", Figure) -> str:
    """Mass intensity: the whole route by material on top, each step below, stacked by material."""
    order = [m for m, _v in data.mass_by_material]
    colour = _colours(order)
    rows = [("whole route", tuple(data.mass_by_material))] + [(f"step {sid}", parts) for sid, parts in data.mass_by_step]
    fig = Figure(figsize=(7.0, 1.3 + 0.3 * len(rows)))
    ax = fig.add_subplot()
    # one bar call per material over every row: a segment per row where it is charged
    values = [dict(parts) for _label, parts in rows]
    left = [0.0] * len(rows)
    heights = [0.8] + [0.62] * (len(rows) - 1)
    for mat in order + sorted({m for v in values for m in v} - set(order)):
        widths = [v.get(mat, 0.0) for v in values]
        drawn = [i for i, w in enumerate(widths) if w]  # only the rows that charge it: fewer patches
        if drawn:
            ax.barh(drawn, [widths[i] for i in drawn], left=[left[i] for i in drawn], color=colour.get(mat, _OTHER),
                    height=[heights[i] for i in drawn], edgecolor="white", linewidth=0.4)
            left = [a + b for a, b in zip(left, widths)]
    for i, total in enumerate(left):
        ax.text(total, i, f" {total:.3g}", va="center", ha="left", color=_INK, fontsize=7.5)
    ax.set_yticks(range(len(rows)), [r[0] for r in rows])
    ax.invert_yaxis()
    ax.axhline(0.5, color="#999999", linewidth=0.6)
    ax.set_xlabel("kg of raw material per kg of target")
    handles = []
    from matplotlib.patches import Patch

    for mat in order[:_TOP]:
        handles.append(Patch(color=colour[mat], label=mat))
    if len(order) > _TOP:
        handles.append(Patch(color=_OTHER, label=f"{len(order) - _TOP} others"))
    ax.legend(handles=handles, loc="lower right", fontsize=7, frameon=False, ncol=2)
    ax.margins(x=0.12)
    return _to_svg(fig, "mass-", [r[0] for r in rows])


def _cost_chart(data: "ChartData", Figure) -> str | None:
    """Raw-material cost over the campaign by material, dearest first."""
    if not data.cost_by_material:
        return None
    rows = list(data.cost_by_material)
    fig = Figure(figsize=(7.0, 1.0 + 0.28 * len(rows)))
    ax = fig.add_subplot()
    ax.barh(range(len(rows)), [v for _m, v in rows], color=PALETTE[1], height=0.62)
    for i, (_m, v) in enumerate(rows):
        ax.text(v, i, f" {v:,.0f}", va="center", ha="left", fontsize=7.5, color=_INK)
    ax.set_yticks(range(len(rows)), [m for m, _v in rows])
    ax.invert_yaxis()
    ax.set_xlabel(f"raw-material cost over the campaign [{data.currency}]")
    ax.margins(x=0.15)
    return _to_svg(fig, "cost-", [m for m, _v in rows])


def _yield_chart(data: "ChartData", Figure) -> str:
    """Yield along the longest linear sequence: each step's yield and the yield so far."""
    seq = list(data.yield_sequence)
    xs = list(range(len(seq) + 1))
    fig = Figure(figsize=(7.0, 2.6))
    ax = fig.add_subplot()
    ax.bar(xs[1:], [100 * y for _s, y, _c in seq], color="#d9e6ee", width=0.6, label="step yield")
    ax.step(xs, [100.0] + [100 * c for _s, _y, c in seq], where="post", color=PALETTE[0], linewidth=1.6,
            label="overall so far")
    ax.plot(xs[1:], [100 * c for _s, _y, c in seq], "o", color=PALETTE[0], markersize=3.5)
    for x, (_s, _y, c) in zip(xs[1:], seq):
        ax.annotate(f"{100 * c:.1f} %", (x, 100 * c), xytext=(0, -11), textcoords="offset points",
                    ha="center", va="top", fontsize=7, color=_INK)
    ax.set_xticks(xs, ["start"] + [s for s, _y, _c in seq], rotation=45 if len(seq) > 12 else 0,
                  fontsize=7 if len(seq) > 12 else 8.5)
    ax.set_ylim(0, 109)
    ax.set_ylabel("yield [%]")
    ax.legend(loc="lower left", fontsize=7, frameon=False)
    return _to_svg(fig, "yield-", ["100"], bottom_in=0.75 if len(seq) > 12 else 0.45)


def _delivery_chart(data: "ChartData", Figure) -> str:
    """Histogram of the delivered mass over the yield draws, the required mass and P10/P50/P90 marked."""
    d = data.delivery
    edges, share = d["edges_kg"], d["share"]
    fig = Figure(figsize=(7.0, 2.6))
    ax = fig.add_subplot()
    widths = [b - a for a, b in zip(edges, edges[1:])]
    ax.bar(edges[:-1], [100 * s for s in share], width=widths, align="edge", color="#c7dde8",
           edgecolor=PALETTE[0], linewidth=0.4)
    top = max(100 * s for s in share) if share else 1.0
    for key, label, style in (("p10_kg", "P10", ":"), ("p50_kg", "P50", "--"), ("p90_kg", "P90", ":")):
        ax.axvline(d[key], color="#555555", linestyle=style, linewidth=0.9)
        ax.text(d[key], top * 1.02, label, ha="center", va="bottom", fontsize=7, color="#555555")
    ax.axvline(d["required_kg"], color=PALETTE[3], linewidth=1.6)
    ax.text(d["required_kg"], top * 0.6, f" required\n {100 * d['probability_of_target']:.1f} % reach it",
            ha="left", va="center", fontsize=7, color=PALETTE[3])
    ax.set_ylim(0, top * 1.15)
    ax.set_xlabel("mass delivered [kg]")
    ax.set_ylabel("draws [%]")
    return _to_svg(fig, "delivery-", ["100"])


def _contributions_chart(data: "ChartData", Figure) -> str:
    """Each drawn step's share of the spread of the delivered mass, largest first."""
    rows = list(data.contributions)
    fig = Figure(figsize=(7.0, 1.0 + 0.28 * len(rows)))
    ax = fig.add_subplot()
    ax.barh(range(len(rows)), [100 * v for _s, v in rows], color=PALETTE[4], height=0.62)
    for i, (_s, v) in enumerate(rows):
        ax.text(100 * v, i, f" {100 * v:.1f} %", va="center", ha="left", fontsize=7.5, color=_INK)
    ax.set_yticks(range(len(rows)), [f"step {s}" for s, _v in rows])
    ax.invert_yaxis()
    ax.set_xlabel("share of the spread [%]")
    ax.margins(x=0.15)
    return _to_svg(fig, "contrib-", [f"step {s}" for s, _v in rows])


def _timeline_chart(data: "ChartData", Figure) -> str:
    """Vessels over the campaign: one lane per vessel, one bar per batch, critical-chain steps outlined."""
    t = data.timeline
    lanes = t["lanes"]
    days = t["campaign_h"] > 96
    scale = 24.0 if days else 1.0
    steps = list(dict.fromkeys(b["step"] for lane in lanes for b in lane["bars"]))
    colour = {sid: PALETTE[i % len(PALETTE)] for i, sid in enumerate(steps)}
    fig = Figure(figsize=(7.0, 1.0 + 0.42 * len(lanes)))
    ax = fig.add_subplot()
    span = max(t["campaign_h"], 1e-9) / scale
    for y, lane in enumerate(lanes):
        bars = lane["bars"]
        ax.broken_barh([(b["start_h"] / scale, (b["end_h"] - b["start_h"]) / scale) for b in bars], (y - 0.32, 0.64),
                       facecolors=[colour[b["step"]] for b in bars],
                       edgecolors=[_INK if b["critical"] else "white" for b in bars], linewidths=0.8)
        for b in bars:
            width = (b["end_h"] - b["start_h"]) / scale
            if width > span * 0.045:
                ax.text((b["start_h"] / scale) + width / 2, y, f"{b['step']}·{b['batch']}", ha="center", va="center",
                        fontsize=6.5, color="white")
    ax.set_yticks(range(len(lanes)), [lane["lane"] for lane in lanes])
    ax.invert_yaxis()
    ax.set_xlim(0, span * 1.02)
    ax.set_xlabel("days from the campaign start" if days else "hours from the campaign start")
    return _to_svg(fig, "timeline-", [lane["lane"] for lane in lanes])


def charts(data: "ChartData") -> dict[str, str]:
    """Every chart that applies, as SVG text: keys ``mass``, ``cost``, ``yield``, and
    ``delivery`` and ``contributions`` where the plan has yield uncertainty, ``timeline``
    where it has a schedule.

    Raises
    ------
    ImportError
        When matplotlib (the ``plots`` extra) is not installed.
    """
    import matplotlib
    from matplotlib.figure import Figure

    out: dict[str, str] = {}
    with matplotlib.rc_context(_RC):
        out["mass"] = _mass_chart(data, Figure)
        cost = _cost_chart(data, Figure)
        if cost is not None:
            out["cost"] = cost
        if data.yield_sequence:
            out["yield"] = _yield_chart(data, Figure)
        if data.delivery is not None:
            out["delivery"] = _delivery_chart(data, Figure)
        if data.contributions:
            out["contributions"] = _contributions_chart(data, Figure)
        if data.timeline is not None and data.timeline.get("lanes"):
            out["timeline"] = _timeline_chart(data, Figure)
    return out
