"""Screens opened from the views: a group's members, a group's connections, and help."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen

from ..analysis.groups import group_ref
from ..analysis.reading import TOPICS
from .data import Snapshot, tier_of
from .look import SUGGESTED, Label, Static, clip, density_cell, plural, warmth_bar
from .page import Page, TopBar
from .rowlist import Col, Row, RowList
from .views_main import NameEditor, group_facts, group_title

__all__ = ["GroupScreen", "LinksScreen", "HelpScreen", "help_sections"]


class GroupScreen(Page):
    """The members of one group: warmth, role and organisation."""

    hint = "Warmth: how close you are, 0-1, from meetings, mail or your own rating"

    BINDINGS = [
        Binding("n", "name", "Name group"),
        Binding("c", "connections", "Connections"),
        Binding("escape", "app.back", "Back"),
    ]

    def __init__(self, gid: int | None) -> None:
        super().__init__()
        self.gid = gid

    @property
    def crumb(self) -> str:  # type: ignore[override]
        snap = self.mynet_app.snapshot
        if snap is None:
            return "Group"
        g = snap.group(self.gid)
        if g is None:
            return "In no group"
        return group_ref(g.id) + " " + clip(("" if g.user_named else SUGGESTED) + g.name, 30)

    def body(self) -> ComposeResult:
        yield Static("", classes="head", id="group-head")
        yield RowList([Col("Name"), Col("Warmth", 10), Col("Role", 17), Col("Works at")], empty="Nobody here.",
                      id="member-list")
        yield NameEditor(id="member-name")

    def on_mount(self) -> None:
        self.query_one(NameEditor).display = False
        self.query_one(RowList).focus()
        if self.mynet_app.snapshot is not None:
            self.refresh_view(self.mynet_app.snapshot)

    def refresh_view(self, snap: Snapshot) -> None:
        g = snap.group(self.gid)
        if self.gid is not None and g is None:
            self.query_one("#group-head",
                           Static).update("This group no longer exists after the last change; Escape goes back.")
            self.query_one(RowList).set_rows([])
            return
        members = g.members if g else snap.ungrouped()
        net = snap.net
        members = sorted((m for m in members if m in net.by_id), key=lambda m: (-tier_of(net, m)[0], net.name(m)))
        def cells(c):
            return lambda: (c.name, warmth_bar(tier_of(net, c.id)[0], 4), snap.role(c.id),
                            ", ".join(c.orgs) or (f"({c.past_orgs[0]})" if c.past_orgs else ""))

        rows = [Row(m, cells(net.by_id[m])) for m in members]
        self.query_one(RowList).set_rows(rows)
        head = self.query_one("#group-head", Static)
        if g is None:
            head.update(Text.assemble(("In no group", "bold"),
                                      f"\n{plural(len(members), 'person', 'people')} with too few ties "
                                      "to belong to a group; warmest first."))
        else:
            title = group_title(snap, self.gid)
            title.stylize("bold")
            head.update(Text.assemble(title, "\n", group_facts(snap, self.gid).split("\n", 1)[1]))
        for bar in self.query(TopBar):
            bar.update_bar()

    def on_row_list_selected(self, event: RowList.Selected) -> None:
        self.mynet_app.open_person(event.key)

    def action_name(self) -> None:
        snap = self.mynet_app.snapshot
        if self.gid is None or snap is None:
            self.mynet_app.status_text = "These people are in no group; there is nothing to name."
            return
        lst = self.query_one(RowList)
        self.query_one(NameEditor).open(snap, self.gid, lst.focus)

    def action_connections(self) -> None:
        if self.gid is not None:
            self.mynet_app.open_links(self.gid)


def gateways(snap: Snapshot, gid: int, limit: int = 8) -> list[tuple[int, int, str]]:
    """Members tied into other groups: (contact, number of other groups reached, role), most first."""
    g = snap.group(gid)
    if g is None:
        return []
    out = []
    for m in g.members:
        others = {snap.group_of(o) for o, _s, _r in snap.ties_of(m)} - {gid, None}
        if others:
            out.append((m, len(others), snap.role(m)))
    out.sort(key=lambda x: (-x[1], -(snap.analysis.measures.get(x[0], {}).get("participation") or 0),
                            snap.net.name(x[0])))
    return out[:limit]


class LinksScreen(Page):
    """How one group connects to the rest: linked groups, bridges, members tied outside, the only ways in."""

    hint = "Bridges and members tied outside carry news and introductions. Enter opens."

    BINDINGS = [Binding("escape", "app.back", "Back")]

    def __init__(self, gid: int) -> None:
        super().__init__()
        self.gid = gid

    @property
    def crumb(self) -> str:  # type: ignore[override]
        snap = self.mynet_app.snapshot
        return "Connections of " + (f"{group_ref(self.gid)} {clip(snap.group_name(self.gid), 28)}" if snap
                                    else "a group")

    def body(self) -> ComposeResult:
        yield Static("", classes="head", id="links-head")
        yield RowList([Col("Who or what"), Col("How much", 9), Col("Detail")], empty="No connections.",
                      id="links-list")

    def on_mount(self) -> None:
        self.query_one(RowList).focus()
        if self.mynet_app.snapshot is not None:
            self.refresh_view(self.mynet_app.snapshot)

    def refresh_view(self, snap: Snapshot) -> None:
        gid, net = self.gid, snap.net
        g = snap.group(gid)
        head = self.query_one("#links-head", Static)
        if g is None:
            head.update("This group no longer exists after the last change; Escape goes back.")
            self.query_one(RowList).set_rows([])
            return
        rows: list[Row] = []
        links = sorted((x for x in snap.analysis.links if gid in (x["a"], x["b"])), key=lambda x: -x["ties"])
        carriers_here: set[int] = set()
        if links:
            rows.append(Row("h1", ("Groups it is tied to",), heading=True))
        for x in links:
            other = x["b"] if x["a"] == gid else x["a"]
            here, there = x.get("carriers") or ([], [])
            if x["a"] != gid:
                here, there = there, here
            carriers_here |= set(here)
            fragile = " (hangs on one person)" if snap.fragile(gid, other) else ""
            rows.append(Row(("group", other),
                            (group_title(snap, other), density_cell(x["density"]) + Text(f" {x['ties']:>5}"),
                                                f"{len(here)} here, {len(there)} there{fragile}")))
        bridges = [b for b in snap.analysis.bridges if gid in b["groups"]]
        if bridges:
            rows.append(Row("h2", ("Bridges: the ties between it and the others that matter most",), heading=True))
        # Ties arriving at the same outside person are shown together: that person is a way in.
        by_end: dict[int, list[tuple[int, dict]]] = {}
        for b in bridges:
            here, there = (b["a"], b["b"]) if snap.group_of(b["a"]) == gid else (b["b"], b["a"])
            by_end.setdefault(there, []).append((here, b))
        for there, ends in list(by_end.items())[:10]:
            where = group_ref(snap.group_of(there))
            if len(ends) == 1:
                here, b = ends[0]
                kind = "their only link, " if b.get("local_bridge") else ""
                rows.append(Row(("person", here, there),
                                (f"{net.name(here)} – {net.name(there)}", f"{b['strength']:.2f}",
                                                           f"{kind}to {where}")))
            else:
                names = ", ".join(net.name(h) for h, _b in ends[:2]) + (f" +{len(ends) - 2}" if len(ends) > 2 else "")
                rows.append(Row(("person", there, None), (f"{net.name(there)}, in {where}", f"{len(ends)} ties",
                                                           f"from {names}")))
        gws = gateways(snap, gid)
        if gws:
            rows.append(Row("h3", ("Members tied into other groups",), heading=True))
        for m, n, role in gws:
            rows.append(Row(("person", m), (net.name(m), f"{n} group{'s' if n != 1 else ''}", role)))
        access = [e for e in snap.analysis.access if e.get("member_of") == gid or gid in (e.get("groups") or [])]
        if access:
            rows.append(Row("h4", ("The only ways in: without them, people are cut off from you",),
                            heading=True))
        for e in access[:12]:
            outside = group_ref(e.get("member_of"))
            where = "member" if e.get("member_of") == gid else f"outside, in {outside}"
            n = len(e.get("groups") or [])
            reaches = f"{where}; the only way to {n} group{'s' if n != 1 else ''}" if n else where
            rows.append(Row(("person", e["person"]), (net.name(e["person"]), f"{len(e['cut_off'])} cut off", reaches)))
        self.query_one(RowList).set_rows(rows)
        head.update(Text.assemble((group_ref(gid) + " " + clip(("" if g.user_named else SUGGESTED) + g.name, 60),
                                   "bold"),
                                  f"\nTied to {plural(len(links), 'other group')} through {len(carriers_here)} of its "
                                  f"{g.size} members; "
                                  + (f"{plural(len(access), 'person', 'people')} alone "
                                     f"{'is' if len(access) == 1 else 'are'} the only way to some people."
                                     if access else "nobody alone is the only way in.")))

    def on_row_list_selected(self, event: RowList.Selected) -> None:
        key = event.key
        if isinstance(key, tuple) and key[0] == "group":
            self.mynet_app.open_group(key[1])
        elif isinstance(key, tuple) and key[0] == "person":
            self.mynet_app.open_person(key[1])


def help_sections(app) -> list[tuple[str, list[tuple[str, str]]]]:
    """Every key of the app, by where it works, read from the bindings themselves."""
    from .groupmap import GroupMap
    from .person import PersonScreen
    from .views_main import GroupsView, PeopleView
    from .views_plan import PlanView
    from .views_work import DuplicatesView, ReachView

    def keys(cls) -> list[tuple[str, str]]:
        out = []
        for b in cls.BINDINGS:
            key = b.key if isinstance(b, Binding) else b[0]
            desc = b.description if isinstance(b, Binding) else (b[2] if len(b) > 2 else b[1])
            out.append((app.get_key_display(Binding(key, "")), desc))
        return out

    return [
        ("Anywhere", keys(type(app))),
        ("Lists", keys(RowList)),
        ("Groups (1)", keys(GroupsView)),
        ("Map (2)", keys(GroupMap)),
        ("People (3)", keys(PeopleView)),
        ("Reach (4)", keys(ReachView)),
        ("Duplicates (5)", keys(DuplicatesView)),
        ("Plan (7)", keys(PlanView)),
        ("A group", keys(GroupScreen)),
        ("A person", keys(PersonScreen)),
    ]


class HelpScreen(ModalScreen):
    """Every key, by where it works."""

    BINDINGS = [Binding("escape", "dismiss", "Close"), Binding("question_mark", "dismiss", "Close"),
                Binding("q", "dismiss", "Close")]

    def compose(self) -> ComposeResult:
        out = Text()
        out.append("mynet browse: your network, from your own exports. Nothing leaves this machine.\n", style="bold")
        out.append("Below the keys: how to read this (what the words and numbers mean).\n")
        out.append("Every change (a group's name, a merge, a rating, a tie) is saved at once.\n"
                   "G7 is a group's id, the same everywhere; ~ marks a group label mynet suggested; ! on the map "
                   "marks a link that hangs on one person.\n"
                   "The mouse works too: click a row to highlight it, click it again to open it.\n")
        for title, keys in help_sections(self.app):
            out.append(f"\n{title}\n", style="bold underline")
            for key, desc in keys:
                out.append(f"  {key:<12}", style="bold")
                out.append(f"{desc}\n")
        out.append("\nHow to read this\n", style="bold underline")
        out.append("What the words and numbers on the screens mean, and the methods behind them "
                   "(also: mynet explain TOPIC).\n")
        for t in TOPICS:
            out.append(f"\n{t.title}\n", style="bold")
            out.append(f"{t.plain}\n")
            for word, meaning in t.words:
                out.append(f"  {word}", style="bold")
                out.append(f": {meaning}\n")
            out.append(f"Method: {t.method}\n", style="italic")
        with Vertical(id="help-box"):
            yield Label(" Keys, and how to read this  (Escape closes)", classes="head")
            with VerticalScroll():
                yield Static(out, id="help-text")

    def on_mount(self) -> None:
        self.query_one(VerticalScroll).focus()  # arrows and Page keys scroll the list of keys

    def action_dismiss(self) -> None:  # type: ignore[override]
        self.dismiss(None)
