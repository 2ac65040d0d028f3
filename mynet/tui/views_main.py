"""The top-level views about the shape of the network: groups, the map, and everyone (search)."""

from __future__ import annotations

from typing import Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Input

from ..analysis.groups import group_ref
from ..safetext import shown
from .data import Snapshot, tier_of
from .groupmap import GroupMap, legend
from .look import SUGGESTED, Label, Static, clip, plural, warmth_bar
from .page import AppAccess, View
from .rowlist import Col, Row, RowList

__all__ = ["GroupsView", "MapView", "PeopleView", "NameEditor", "group_title", "share_bar", "UNGROUPED"]

UNGROUPED = "none"


def share_bar(share: float, width: int = 5) -> Text:
    filled = int(round(max(0.0, min(1.0, share)) * width))
    return Text("■" * filled, style="#e3a33b") + Text("□" * (width - filled), style="#56606e") + Text(f" {share:>4.0%}")


def group_title(snap: Snapshot, gid: int | None, *, ref: bool = True) -> Text:
    """A group as every screen shows it: ``G7`` and its name; a label mynet suggested is marked with ``~``
    and set in italics. ``ref=False`` leaves the ``G7`` out (for a table that has it in a column of its own)."""
    g = snap.group(gid)
    if g is None:
        return Text("not in a group", style="italic")
    head = Text(f"{group_ref(g.id)} ", style="bold") if ref else Text()
    if g.user_named:
        return head + Text(shown(g.name, one_line=True))
    return head + Text(shown(SUGGESTED + g.name, one_line=True), style="italic")


def group_facts(snap: Snapshot, gid: int) -> str:
    """Three short lines about a group for the detail panel."""
    g = snap.group(gid)
    if g is None:
        return ""
    ties, density = snap.internal(gid)
    if g.user_named:
        first = f"{group_ref(gid)} {clip(g.name, 40)} · your name (mynet's label: {clip(g.label, 26)})"
    else:
        first = f"{group_ref(gid)} {SUGGESTED}{clip(g.name, 44)} · suggested label ({g.share:.0%} share it)"
    second = (f"{plural(g.size, 'person', 'people')} · {g.warm} warm with you ({g.warm_share:.0%}) · "
              + (f"{plural(ties, 'tie')} inside ({density:.0%} of all pairs)" if ties >= 0 else "counting ties…"))
    linked = sorted((x for x in snap.analysis.links if gid in (x["a"], x["b"])), key=lambda x: -x["ties"])
    if linked:
        top = linked[0]
        other = top["b"] if top["a"] == gid else top["a"]
        third = (f"Tied to {plural(len(linked), 'other group')}, most to {group_ref(other)} "
                 f"{clip(snap.group_name(other), 30)} "
                 f"({plural(top['ties'], 'tie')})")
    else:
        third = "No ties to any other group."
    return "\n".join((first, second, third))


class NameEditor(AppAccess, Horizontal):
    """The in-place editor for a group's name: Enter saves, Escape leaves it as it was."""

    def __init__(self, **kw) -> None:
        super().__init__(classes="name-editor", **kw)
        self.gid: int | None = None
        self.on_done: Callable[[], None] | None = None

    def compose(self) -> ComposeResult:
        yield Label("Name:", classes="name-label")
        yield Input(placeholder="your name for this group (empty: the suggested label)", id="name-input")

    def open(self, snap: Snapshot, gid: int, on_done: Callable[[], None]) -> None:
        """Show the editor below the list (the header and the rows stay in sight)."""
        g = snap.group(gid)
        if g is None:
            return
        self.gid, self.on_done = gid, on_done
        inp = self.query_one(Input)
        inp.value = shown(g.name, one_line=True) if g.user_named else ""
        inp.placeholder = shown(f"{g.label}  (Enter keeps it; Escape cancels)", one_line=True)
        self.display = True
        inp.focus()

    def close(self) -> None:
        self.display = False
        if self.on_done:
            self.on_done()

    def leave_input(self) -> None:
        self.mynet_app.status_text = "Name left as it was."
        self.close()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        if self.gid is not None:
            self.mynet_app.rename_group(self.gid, event.value)
        self.close()


class GroupsView(View, Vertical):
    """Every group with its size, name or suggested label, and how many of its people you are warm with."""

    hint = "Enter opens · n names the group · ~ marks a suggested label · ? all keys"

    BINDINGS = [
        Binding("n", "name", "Name group"),
        Binding("c", "connections", "Connections"),
    ]

    def compose(self) -> ComposeResult:
        yield RowList([Col("Group", 5), Col("Name"), Col("People", 6, "right"), Col("Warm with you", 13),
                       Col("Tied to", 7, "right")], empty="No groups yet.", id="group-list")
        yield NameEditor(id="group-name")
        yield Static("", classes="detail", id="group-detail")

    def on_mount(self) -> None:
        self.query_one(NameEditor).display = False

    def focus_default(self) -> None:
        self.query_one(RowList).focus()

    def refresh_view(self, snap: Snapshot) -> None:
        rows = []
        linked: dict[int, int] = {}
        for x in snap.analysis.links:
            linked[x["a"]] = linked.get(x["a"], 0) + 1
            linked[x["b"]] = linked.get(x["b"], 0) + 1
        for g in snap.analysis.groups:
            rows.append(Row(g.id, (group_ref(g.id), group_title(snap, g.id, ref=False), f"{g.size:,}",
                                   share_bar(g.warm_share),
                                   str(linked.get(g.id, 0)))))
        loose = snap.ungrouped()
        if loose:
            rows.append(Row(UNGROUPED,
                            ("", Text("in no group (too few ties)", style="italic"), f"{len(loose):,}", "", "")))
        lst = self.query_one(RowList)
        lst.empty = ("No groups: this workspace has no contacts yet (mynet import FILE)." if not snap.analysis.group_of
                     else "No groups: mynet found no ties between your contacts yet.")
        lst.set_rows(rows)
        self.show_detail(lst.current_key)

    def show_detail(self, key) -> None:
        snap = self.mynet_app.snapshot
        detail = self.query_one("#group-detail", Static)
        if snap is None or key is None:
            detail.update("")
        elif key == UNGROUPED:
            detail.update(f"{plural(len(snap.ungrouped()), 'person', 'people')} have too few ties to belong to a "
                          f"group.\n"
                          "Enter lists them.")
        else:
            detail.update(group_facts(snap, key))

    def on_row_list_highlighted(self, event: RowList.Highlighted) -> None:
        self.show_detail(event.key)

    def on_row_list_selected(self, event: RowList.Selected) -> None:
        self.mynet_app.open_group(None if event.key == UNGROUPED else event.key)

    def _current(self) -> int | None:
        key = self.query_one(RowList).current_key
        if key == UNGROUPED:
            self.mynet_app.status_text = "Those people are in no group; there is nothing to name or connect."
            return None
        return key  # type: ignore[return-value]

    def action_name(self) -> None:
        gid = self._current()
        snap = self.mynet_app.snapshot
        if gid is not None and snap is not None:
            self.query_one(NameEditor).open(snap, gid, self._editor_closed)

    def _editor_closed(self) -> None:
        self.query_one(RowList).focus()

    def action_connections(self) -> None:
        gid = self._current()
        if gid is not None:
            self.mynet_app.open_links(gid)


class MapView(View, Vertical):
    """The whole network on one screen: a group-to-group matrix."""

    hint = "Arrows move over the map; the panel below explains the highlighted pair."

    def compose(self) -> ComposeResult:
        yield GroupMap(id="map-grid")
        yield Static(legend(), classes="legend", id="map-legend")
        yield Static("", classes="detail", id="map-detail")

    def focus_default(self) -> None:
        self.query_one(GroupMap).focus()

    def refresh_view(self, snap: Snapshot) -> None:
        self.query_one(GroupMap).show(snap)

    def on_group_map_moved(self, event: GroupMap.Moved) -> None:
        snap = self.mynet_app.snapshot
        if snap is None:
            return
        g, h = event.g, event.h
        gi, hi = snap.group(g), snap.group(h)
        detail = self.query_one("#map-detail", Static)
        if gi is None or hi is None:
            return
        if g == h:
            ties, density = snap.internal(g)
            detail.update(f"{group_ref(g)} {'' if gi.user_named else SUGGESTED}{clip(gi.name, 40)}: "
                          f"{plural(gi.size, 'person', 'people')}, {plural(ties, 'tie')} inside "
                          f"({density:.0%} of all that could be).\nEnter opens the group.")
            return
        link = snap.link(g, h)
        if not link:
            detail.update(f"{group_ref(g)} {clip(gi.name, 30)} and {group_ref(h)} {clip(hi.name, 30)}: "
                          "no tie between them.")
            return
        here, there = link.get("carriers") or ([], [])
        if g > h:
            here, there = there, here
        lines = [f"{group_ref(g)} {clip(gi.name, 30)} ↔ {group_ref(h)} {clip(hi.name, 30)}: "
                 f"{plural(link['ties'], 'tie')} ({link['density']:.1%} of all that could be), "
                 f"carried by {len(here)} of {gi.size} and {len(there)} of {hi.size}."]
        best = snap.bridges_between(g, h)[:2]
        if best:
            lines.append("Bridges: " + "; ".join(
                f"{snap.net.name(b['a'])} – {snap.net.name(b['b'])} "
                f"({b['strength']:.2f}{', their only link' if b.get('local_bridge') else ''})"
                for b in best))
        lines.append("Enter shows how the row's group connects to the rest.")
        detail.update("\n".join(lines))

    def on_group_map_chosen(self, event: GroupMap.Chosen) -> None:
        if event.g == event.h:
            self.mynet_app.open_group(event.g)
        else:
            self.mynet_app.open_links(event.g)


SORTS = ("name", "warmth", "last contact")


class PeopleView(View, Vertical):
    """Everyone, searchable by name, organisation, tag, e-mail, phone or place."""

    hint = "/ types a search · Enter opens a person · s changes the order"

    BINDINGS = [Binding("s", "sort", "Sort")]

    def __init__(self, **kw) -> None:
        super().__init__(**kw)
        self.sort = 0

    def compose(self) -> ComposeResult:
        yield Input(placeholder="Search: name, organisation, tag, e-mail, place (Enter or ↓ to the list)", id="search")
        yield Static("", classes="count", id="people-count")
        yield RowList([Col("Name"), Col("Works at"), Col("Warmth", 10), Col("Last", 10), Col("Group")],
                      empty="Nobody matches.", id="people-list")

    def focus_default(self) -> None:
        self.query_one(RowList).focus()

    def start_search(self) -> None:
        self.query_one(Input).focus()

    def leave_input(self) -> None:
        self.query_one(RowList).focus()

    def refresh_view(self, snap: Snapshot) -> None:
        self.filter()

    def filter(self) -> None:
        snap = self.mynet_app.snapshot
        if snap is None:
            return
        text = self.query_one(Input).value
        hits = snap.search(text)
        net = snap.net
        if SORTS[self.sort] == "warmth":
            hits.sort(key=lambda c: (-tier_of(net, c.id)[0], c.name))
        elif SORTS[self.sort] == "last contact":
            hits.sort(key=lambda c: (tier_of(net, c.id)[2] or "", c.name), reverse=True)
        else:
            hits.sort(key=lambda c: c.name.casefold())

        def cells(c):
            return lambda: (c.name, ", ".join(c.orgs) or (f"({c.past_orgs[0]})" if c.past_orgs else ""),
                            warmth_bar(tier_of(net, c.id)[0], 4), tier_of(net, c.id)[2] or "–",
                            group_title(snap, snap.group_of(c.id)))

        self.query_one(RowList).set_rows([Row(c.id, cells(c)) for c in hits])
        what = f"matching {text.strip()!r}" if text.strip() else "in all"
        self.query_one("#people-count", Static).update(
            f" {plural(len(hits), 'person', 'people')} {what}, by {SORTS[self.sort]} (s changes the order)")

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        self.filter()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.query_one(RowList).focus()

    def key_down(self) -> None:
        if self.query_one(Input).has_focus:
            self.query_one(RowList).focus()

    def action_sort(self) -> None:
        self.sort = (self.sort + 1) % len(SORTS)
        self.filter()

    def on_row_list_selected(self, event: RowList.Selected) -> None:
        self.mynet_app.open_person(event.key)
