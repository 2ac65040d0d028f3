"""The pictures of a report, drawn with matplotlib as self-contained SVG.

Figures are made with :class:`matplotlib.figure.Figure` directly (no pyplot,
so no global backend or figure state is touched) and saved inside an
``rc_context`` that draws text as paths (``svg.fonttype = "path"``: no font
is referenced) with a fixed id salt (``svg.hashsalt``) and no date, so the
same data gives the same bytes. The XML declaration, the DOCTYPE and the
metadata block are removed and every id is prefixed per picture, so several
pictures can sit inline in one HTML page. Matplotlib keeps each drawn text as
an XML comment beside its glyphs, which lets a scan for names see them.

Colours are a palette of our own: ten hues that differ in lightness as well
as in hue and never rely on red against green alone, so they stay apart for
the common forms of colour blindness. Each group also has its own marker
shape and hatch pattern, so the picture still reads when printed in grey.
"""

from __future__ import annotations

import functools
import io
import math
import re
from typing import Any

import matplotlib
from matplotlib.collections import LineCollection
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Circle, Patch

from ..analysis.snapshot import tie_graph
from .data import ReportData
from .layout import group_layout, place_discs
from .wording import xml_safe

__all__ = ["PALETTE", "MARKERS", "HATCHES", "group_style", "network_svg", "groups_svg", "timeline_svg", "tiers_svg",
           "targets_svg",
           "clean_svg", "MAX_EDGES_DRAWN", "LEGEND_GROUPS"]

PALETTE = ("#1f5a99", "#e69a1c", "#79b8e0", "#6f2c8f", "#f2d24b", "#16907f", "#c8553d", "#bfa3d6", "#3c3c3c", "#9c7a1a")
MARKERS = ("o", "s", "^", "D", "v", "P", "X", "*", "h", "<", ">", "p")
HATCHES = ("//", "\\\\", "..", "xx", "--", "||", "oo", "++", "//..", "\\\\..", "xx..", "--..")
NO_GROUP = "#9a9a9a"
#: At most this many ties are drawn (the strongest, ties between groups first).
MAX_EDGES_DRAWN = 4000
#: Groups named one by one in the legend (the rest are counted).
LEGEND_GROUPS = 14
_RC = {"svg.fonttype": "path", "font.family": "DejaVu Sans", "hatch.linewidth": 0.6, "axes.spines.top": False,
       "axes.spines.right": False, "figure.facecolor": "white", "axes.facecolor": "white",
       # Names are text, never formulas: a "$" in a name must not start matplotlib's math mode.
       "text.parse_math": False}


def group_style(index: int) -> tuple[str, str, str]:
    """(colour, marker, hatch) of the group drawn ``index``-th (distinct for the first 60)."""
    hatch = HATCHES[(index // len(PALETTE) + index) % len(HATCHES)]
    return PALETTE[index % len(PALETTE)], MARKERS[index % len(MARKERS)], hatch


#: The chart font has no Control Pictures (U+2400-U+2426): in a picture a control character shows as U+FFFD.
_NO_GLYPH = {c: 0xFFFD for c in range(0x2400, 0x2427)}


def clip(text: str, width: int) -> str:
    """One line of at most ``width`` characters, control characters shown as U+FFFD (see :func:`xml_safe`)."""
    text = " ".join(xml_safe(text).translate(_NO_GLYPH).split())
    return text if len(text) <= width else text[: width - 1] + "…"


def clean_svg(svg: str, prefix: str) -> str:
    """An SVG document made fit to sit inline in HTML: no prolog, no metadata, ids prefixed with ``prefix``."""
    svg = re.sub(r"<\?xml[^>]*\?>\s*", "", svg)
    svg = re.sub(r"<!DOCTYPE[^>]*>\s*", "", svg, flags=re.S)
    svg = re.sub(r"\s*<metadata>.*?</metadata>", "", svg, flags=re.S)
    ids = set(re.findall(r'\sid="([^"]+)"', svg))

    def sub_id(m: re.Match) -> str:
        return f'{m.group(1)}="{prefix}-{m.group(2)}"' if m.group(2) in ids else m.group(0)

    svg = re.sub(r'(\sid)="([^"]+)"', sub_id, svg)
    svg = re.sub(r'(xlink:href|href)="#([^"]+)"', lambda m: f'{m.group(1)}="#{prefix}-{m.group(2)}"'
                 if m.group(2) in ids else m.group(0), svg)
    svg = re.sub(r"url\(#([^)]+)\)", lambda m: f"url(#{prefix}-{m.group(1)})" if m.group(1) in ids else m.group(0), svg)
    return svg.strip() + "\n"


def _render(fig: Figure, prefix: str) -> str:
    buf = io.StringIO()
    with matplotlib.rc_context(_RC | {"svg.hashsalt": f"mynet-{prefix}"}):
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None}, bbox_inches="tight")
    return clean_svg(buf.getvalue(), prefix)


def _figure(w: float, h: float) -> Figure:
    return Figure(figsize=(w, h), dpi=100)


def _styled(func):
    """Run a drawing function inside our rc_context (axes read rcParams when they are made)."""

    @functools.wraps(func)
    def run(*args, **kwargs):
        with matplotlib.rc_context(_RC):
            return func(*args, **kwargs)

    return run


def _legend_groups(data: ReportData, order: list[int]) -> list[Any]:
    handles = []
    sizes = {g["id"]: g["size"] for g in data.groups}
    for i, gid in enumerate(order[:LEGEND_GROUPS]):
        col, mk, hatch = group_style(i)
        handles.append(Line2D([], [], linestyle="none", marker=mk, markersize=8, markerfacecolor=col,
                              markeredgecolor="#222222", markeredgewidth=0.6,
                              label=f"G{gid}  {clip(data.group_name(gid), 44)}  [{sizes.get(gid, 0)}]"))
    if len(order) > LEGEND_GROUPS:
        rest = order[LEGEND_GROUPS:]
        handles.append(Line2D([], [], linestyle="none", marker="", label=f"+ {len(rest)} smaller groups "
                              f"({sum(sizes.get(g, 0) for g in rest)} contacts), numbered on the picture"))
    return handles


def _select_edges(G, group_of: dict,
                  cap: int) -> tuple[list[tuple[int, int, float]], list[tuple[int, int, float]], int]:
    """(within, between, total): ties to draw, strongest first, ties between groups kept first."""
    within, between = [], []
    for a, b, w in G.edges(data="weight"):
        ga, gb = group_of.get(a), group_of.get(b)
        (between if ga != gb else within).append((a, b, float(w or 0.0)))
    total = len(within) + len(between)
    key = lambda e: (-e[2], e[0], e[1])  # noqa: E731
    between.sort(key=key)
    within.sort(key=key)
    between = between[:cap]
    within = within[: max(0, cap - len(between))]
    return within, between, total


@_styled
def network_svg(data: ReportData, *, seed: int = 0) -> tuple[str, str]:
    """The picture of the network and its caption: every contact, or the map of groups when too many."""
    if data.picture == "groups":
        return _group_map_svg(data, seed=seed)
    net, a = data.net, data.analysis
    G = data.graph if data.graph is not None else tie_graph(net)
    order = [g["id"] for g in data.groups]
    blocks = [(gid, list(a.group(gid).members)) for gid in order]
    loose = sorted(c for c, g in a.group_of.items() if g is None and c in G)
    loose += sorted(c.id for c in net.contacts if c.id not in a.group_of and c.id in G)
    if loose:
        blocks.append((None, loose))
    pos, discs = group_layout(G, blocks, seed=seed)
    fig = _figure(11.5, 8.0)
    ax = fig.add_axes((0.0, 0.0, 0.66, 1.0))
    ax.set_axis_off()
    ax.set_aspect("equal")
    style = {gid: group_style(i) for i, gid in enumerate(order)}
    for key, (x, y, r) in discs.items():
        col, _mk, hatch = style.get(key, (NO_GROUP, ".", ""))
        # Fill and hatch as two patches: an SVG pattern fill takes the fill's opacity, hatch lines included.
        ax.add_patch(Circle((x, y), r * 0.97, facecolor=matplotlib.colors.to_rgba(col, 0.08),
                            edgecolor=matplotlib.colors.to_rgba(col, 0.85), linewidth=1.2, zorder=0))
        if hatch:
            ax.add_patch(Circle((x, y), r * 0.97, facecolor="none", edgecolor=matplotlib.colors.to_rgba(col, 0.28),
                                hatch=hatch, linewidth=0, zorder=0))
        ax.text(x, y + r * 0.97, f"G{key}" if key is not None else "no group", ha="center", va="center", fontsize=8,
                fontweight="bold", zorder=5,
                bbox={"boxstyle": "round,pad=0.2", "facecolor": "white", "edgecolor": "#555555", "linewidth": 0.6})
    group_of = {c: a.group_of.get(c) for c in G}
    within, between, total = _select_edges(G, group_of, MAX_EDGES_DRAWN)
    top = {(min(b["a"], b["b"]), max(b["a"], b["b"])) for b in data.bridges[:5]}
    if within:
        ax.add_collection(LineCollection([(pos[u], pos[v]) for u, v, _ in within], colors=[(0.45, 0.45, 0.45, 0.22)],
                                         linewidths=[0.25 + 0.6 * w for _u, _v, w in within], zorder=1))
    if between:
        ax.add_collection(LineCollection([(pos[u], pos[v]) for u, v, _ in between], colors=[(0.15, 0.15, 0.15, 0.22)],
                                         linewidths=[0.3 + 0.7 * w for _u, _v, w in between], zorder=2))
    tops = [(pos[u], pos[v]) for u, v, _ in between if (min(u, v), max(u, v)) in top]
    if tops:
        ax.add_collection(LineCollection(tops, colors=["black"], linewidths=2.2, zorder=2.5))
    warm = {cid for cid, w in net.warmth.items() if w.warmth >= 0.3}
    for key, members in blocks:
        col, mk, _h = style.get(key, (NO_GROUP, ".", ""))
        members = [m for m in members if m in pos]
        xs = [pos[m][0] for m in members]
        ys = [pos[m][1] for m in members]
        ax.scatter(xs, ys, s=[34 if m in warm else 16 for m in members], marker=mk if key is not None else "o",
                   c=col, edgecolors=["black" if m in warm else "#ffffff" for m in members],
                   linewidths=[1.1 if m in warm else 0.3 for m in members], zorder=3)
    offsets = ((8, 8), (8, -14), (-8, 8), (-8, -14), (0, 16))
    for b, off in zip(data.brokers[:5], offsets):
        if b["id"] in pos:
            ax.annotate(clip(b["name"], 28), pos[b["id"]], xytext=off, textcoords="offset points", fontsize=7,
                        ha="left" if off[0] >= 0 else "right", arrowprops={"arrowstyle": "-", "linewidth": 0.6},
                        zorder=6,
                        bbox={"boxstyle": "round,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.85})
    ax.autoscale_view()
    handles = _legend_groups(data, order)
    if loose:
        handles.append(Line2D([], [], linestyle="none", marker="o", markersize=6, markerfacecolor=NO_GROUP,
                              markeredgecolor="white", label=f"no group ({len(loose)})"))
    handles += [
        Line2D([], [], linestyle="none", marker="o", markersize=7, markerfacecolor="white", markeredgecolor="black",
               markeredgewidth=1.4, label="warm contact (black outline)"),
        Line2D([], [], color=(0.45, 0.45, 0.45, 0.5), linewidth=1.0, label="tie within a group"),
        Line2D([], [], color=(0.15, 0.15, 0.15, 0.5), linewidth=1.0, label="tie between groups"),
        Line2D([], [], color="black", linewidth=2.4, label="top bridge"),
    ]
    fig.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.67, 0.98), fontsize=8, frameon=False,
               title="Groups: G number, name  [contacts]", title_fontsize=9, alignment="left")
    drawn = len(within) + len(between)
    caption = (f"{len(G):,} contacts in {len(order)} groups" + (f" and {len(loose)} without a group" if loose else "")
               + f"; {'all' if drawn == total else f'the {drawn:,} strongest of'} {total:,} ties drawn"
               + (" (ties between groups first)" if drawn < total else "")
               + ". Labels name the five top brokers.")
    return _render(fig, "net"), caption


@_styled
def _strongest_links(links: list[dict], groups: int) -> list[dict]:
    """The links worth drawing: the most tied ``max(40, 2 * groups)`` pairs plus each group's strongest link."""
    cap = max(40, 2 * groups)
    ranked = sorted(links, key=lambda l: (-l["ties"], l["a"], l["b"]))
    keep = {(l["a"], l["b"]) for l in ranked[:cap]}
    best: dict[int, dict] = {}
    for l in ranked:
        for g in (l["a"], l["b"]):
            best.setdefault(g, l)
    keep |= {(l["a"], l["b"]) for l in best.values()}
    return [l for l in ranked if (l["a"], l["b"]) in keep]


def _group_map_svg(data: ReportData, *, seed: int = 0) -> tuple[str, str]:
    """Groups as discs sized by their members, linked by the number of ties between them."""
    order = [g["id"] for g in data.groups]
    sizes = {g["id"]: g["size"] for g in data.groups}
    radii = [max(1.0, math.sqrt(sizes[g])) for g in order]
    centres = place_discs(radii, gap=max(2.0, max(radii, default=1) * 0.6))
    at = {g: (float(x), float(y)) for g, (x, y) in zip(order, centres)}
    fig = _figure(11.5, 8.0)
    ax = fig.add_axes((0.0, 0.0, 0.66, 1.0))
    ax.set_axis_off()
    ax.set_aspect("equal")
    every = [l for l in data.analysis.links if l["a"] in at and l["b"] in at]
    links = _strongest_links(every, len(order))
    most = max((l["ties"] for l in links), default=1)
    segs = [(at[l["a"]], at[l["b"]]) for l in links]
    if segs:
        ax.add_collection(LineCollection(segs, colors=[(0.15, 0.15, 0.15, 0.45)],
                                         linewidths=[0.5 + 5.5 * math.sqrt(l["ties"] / most) for l in links], zorder=1))
    for i, (g, r) in enumerate(zip(order, radii)):
        col, _mk, hatch = group_style(i)
        x, y = at[g]
        ax.add_patch(Circle((x, y), r, facecolor=col, edgecolor="#222222", hatch=hatch, linewidth=1.0, zorder=2))
        ax.text(x, y, f"G{g}", ha="center", va="center", fontsize=8, fontweight="bold", zorder=4,
                bbox={"boxstyle": "round,pad=0.2", "facecolor": "white", "edgecolor": "none", "alpha": 0.85})
    ax.autoscale_view()
    handles = []
    for i, g in enumerate(order[:LEGEND_GROUPS]):
        col, _mk, hatch = group_style(i)
        handles.append(Patch(facecolor=col, edgecolor="#222222", hatch=hatch,
                             label=f"G{g}  {clip(data.group_name(g), 44)}  [{sizes[g]}]"))
    if len(order) > LEGEND_GROUPS:
        handles.append(Patch(facecolor="white", edgecolor="white",
                             label=f"+ {len(order) - LEGEND_GROUPS} smaller groups, numbered on the map"))
    handles.append(Line2D([], [], color=(0.15, 0.15, 0.15, 0.7), linewidth=3,
                          label="ties between two groups (wider: more)"))
    fig.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.67, 0.98), fontsize=8, frameon=False,
               title="Groups: G number, name  [contacts]", title_fontsize=9, alignment="left")
    shown = (f"the {len(links)} most tied of the {len(every)} linked pairs of groups are drawn (and each group's "
             "strongest link)" if len(links) < len(every) else f"all {len(every)} linked pairs of groups are drawn")
    caption = (f"Map of {len(order)} groups ({sum(sizes.values()):,} of {len(data.net.contacts):,} contacts; "
               f"{data.unclustered:,} without a group are not drawn); {shown}.")
    return _render(fig, "map"), caption


@_styled
def groups_svg(data: ReportData, *, limit: int = 20) -> str:
    """Contacts and warm contacts per group (horizontal bars)."""
    rows = data.groups[:limit]
    labels = [f"G{g['id']}  {clip(g['name'], 30)}" for g in rows]
    totals = [g["size"] for g in rows]
    warms = [g["warm"] for g in rows]
    if data.unclustered:
        labels.append("no group")
        totals.append(data.unclustered)
        warms.append(sum(1 for c, g in data.analysis.group_of.items() if g is None and data.net.warmth.get(c)
                         and data.net.warmth[c].warmth >= 0.3))
    fig = _figure(8.5, 0.9 + 0.32 * max(1, len(labels)))
    ax = fig.add_subplot()
    ys = list(range(len(labels)))[::-1]
    ax.barh(ys, totals, height=0.7, color="#d9e4f0", edgecolor="#1f5a99", hatch="//", linewidth=0.8, label="contacts")
    ax.barh(ys, warms, height=0.4, color="#1f5a99", edgecolor="black", linewidth=0.6, label="warm contacts")
    for y, t, w in zip(ys, totals, warms):
        ax.text(t, y, f"  {w} of {t}", va="center", fontsize=7)
    ax.set_yticks(ys, labels, fontsize=8)
    ax.set_xlabel("contacts")
    ax.set_xlim(0, max(totals, default=1) * 1.18)
    ax.legend(loc="lower right", fontsize=8, frameon=False)
    ax.set_title("Contacts and warm contacts per group", fontsize=10, loc="left")
    return _render(fig, "groups")


@_styled
def timeline_svg(data: ReportData) -> str | None:
    """Meetings and messages per month, and how many contacts you were in touch with."""
    rows = data.timeline
    if not rows:
        return None
    xs = list(range(len(rows)))
    fig = _figure(9.0, 4.6)
    ax1, ax2 = fig.subplots(2, 1, sharex=True, gridspec_kw={"height_ratios": [3, 2]})
    meet = [r["meetings"] for r in rows]
    mail = [r["messages"] for r in rows]
    ax1.bar(xs, meet, color="#1f5a99", edgecolor="black", linewidth=0.3, label="meetings")
    ax1.bar(xs, mail, bottom=meet, color="#f2d24b", edgecolor="black", hatch="..", linewidth=0.3, label="messages")
    ax1.set_ylabel("interactions")
    ax1.legend(loc="upper left", fontsize=8, frameon=False)
    ax1.set_title("Interactions per month", fontsize=10, loc="left")
    ax2.plot(xs, [r["people"] for r in rows], color="#3c3c3c", marker="o", markersize=3, linewidth=1.2)
    ax2.set_ylabel("contacts met\nor written to", fontsize=8)
    step = max(1, len(rows) // 12)
    ax2.set_xticks(xs[::step], [r["month"] for r in rows][::step], rotation=45, ha="right", fontsize=7)
    return _render(fig, "time")


@_styled
def tiers_svg(data: ReportData) -> str:
    """How many contacts sit in each warmth layer."""
    names = {"closest": "closest (top 5)", "close": "close (to 15)", "regular": "regular (to 50)",
             "known": "known (to 150)", "beyond": "beyond 150", "none": "no contact recorded"}
    labels = [names.get(t, t) for t, _ in data.tiers]
    counts = [n for _, n in data.tiers]
    fig = _figure(7.5, 2.8)
    ax = fig.add_subplot()
    shades = ["#1f1f1f", "#3f3f3f", "#6a6a6a", "#959595", "#c0c0c0", "#e6e6e6"]
    ax.bar(range(len(counts)), counts, color=shades[: len(counts)], edgecolor="black", linewidth=0.6)
    for x, n in enumerate(counts):
        ax.text(x, n, str(n), ha="center", va="bottom", fontsize=8)
    ax.set_xticks(range(len(labels)), labels, rotation=20, ha="right", fontsize=8)
    ax.set_ylabel("contacts")
    ax.set_title("Contacts by warmth layer", fontsize=10, loc="left")
    return _render(fig, "tiers")


@_styled
def targets_svg(data: ReportData) -> str | None:
    """Your targets by the score of their best route and by how many people could open them; the plan below.

    Top: one bar per target, as long as the score of its best route (solid: every step observed; hatched:
    some step rests only on something shared), with how many people you are warm with could open it.
    Bottom: the people to ask, in order, and the targets each would open.
    """
    t = data.targets
    if not t:
        return None
    shown = sorted((x for x in t["targets"] if x["state"] in ("open", "no route")),
                   key=lambda x: (x["score"] is None, -(x["score"] or 0.0), x["label"]))
    asks = t["asks"]
    top_h, bottom_h = 0.6 + 0.3 * max(1, len(shown)), 0.6 + 0.34 * max(1, len(asks))
    fig = _figure(9.0, top_h + bottom_h + 0.6)
    ax, bx = fig.subplots(2, 1, gridspec_kw={"height_ratios": [top_h, bottom_h]})
    ys = list(range(len(shown)))[::-1]
    top = max([x["score"] or 0.0 for x in shown] + [0.05])
    for y, x in zip(ys, shown):
        if x["score"] is None:
            ax.text(0, y, "  no route yet", va="center", fontsize=7, style="italic")
            continue
        ax.barh(y, x["score"], height=0.6, color="#1f5a99" if x["observed"] else "white", edgecolor="#1f5a99",
                hatch=None if x["observed"] else "//", linewidth=0.8)
        ax.text(x["score"], y, f"  {x['score']:.2f}, {x['open']} could open it", va="center", fontsize=7)
    ax.set_yticks(ys, [clip(x["label"], 28) for x in shown], fontsize=8)
    ax.set_xlim(0, top * 1.6)
    ax.set_xlabel("score of the best route (1 is best)", fontsize=8)
    ax.legend(handles=[Patch(facecolor="#1f5a99", edgecolor="#1f5a99", label="every step observed"),
                       Patch(facecolor="white", edgecolor="#1f5a99", hatch="//",
                             label="some step rests only on something shared")],
              loc="lower right", fontsize=7, frameon=False)
    ax.set_title("Your targets: the best way in, and how many people could open it", fontsize=10, loc="left")
    ys = list(range(len(asks)))[::-1]
    counts = [len(a["targets"]) for a in asks]
    bx.barh(ys, counts, height=0.6, color="#f2d24b", edgecolor="black", hatch="..", linewidth=0.6)
    for y, a in zip(ys, asks):
        bx.text(len(a["targets"]), y, "  " + clip(", ".join(x["label"] for x in a["targets"]), 70), va="center",
                fontsize=7)
    bx.set_yticks(ys, [f"{i}. {clip(a['name'], 24)}" for i, a in enumerate(asks, 1)], fontsize=8)
    bx.set_xlim(0, max(counts + [1]) * 3.2)
    bx.set_xticks(range(0, max(counts + [1]) + 1))
    bx.set_xlabel("targets this ask would open", fontsize=8)
    bx.set_title("The plan: whom to ask, in order" if asks else "The plan: nobody to ask yet", fontsize=10,
                 loc="left")
    fig.subplots_adjust(hspace=0.5)
    return _render(fig, "targets")
