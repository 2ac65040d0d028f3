"""The plan view: your targets, whom to ask first, and the asks you are waiting on, keyboard first.

``t`` targets, ``p`` the plan, ``a`` asks. On a row of the plan, Enter keeps the ask
(you asked that person today). On an ask: ``i`` introduced, ``d`` declined,
``n`` no answer, ``x`` not needed, ``o`` open again. Everything is read and written
through the workspace in a worker (the plan takes a moment on a large network).
"""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.worker import WorkerState

from ..safetext import shown
from .data import Snapshot, with_workspace
from .dialogs import AskScreen
from .look import Static, plural
from .page import View
from .rowlist import Col, Row, RowList

__all__ = ["PlanView", "MODES"]

#: The three lists of the view: (mode, key, title).
MODES = (("targets", "t", "Targets"), ("plan", "p", "Plan"), ("asks", "a", "Asks"))

COLUMNS = {
    "targets": [Col("#", 3, "right"), Col("Target", 22), Col("Score", 5, "right"), Col("Basis", 8),
                Col("Open", 4, "right"), Col("Best way in")],
    "plan": [Col("", 1), Col("For", 22), Col("Score", 5, "right"), Col("Basis", 8), Col("Route")],
    "asks": [Col("#", 3, "right"), Col("Asked", 18), Col("For", 18), Col("Days", 4, "right"),
             Col("Follow up / outcome")],
}

OUTCOME_KEYS = {"i": "introduced", "d": "declined", "n": "no-answer", "x": "not-needed"}


def _route(route: dict | None) -> str:
    return " → ".join(["you", *route["names"]]) if route else ""


def _target_way(r: dict[str, Any]) -> str:
    state = r["state"]
    if state == "known":
        return "you know " + ", ".join(r["known"][:2]) + " there"
    if state == "open":
        return _route(r["best"])
    return {"waiting": "waiting on an ask", "introduced": "introduced", "no route": "no route yet",
            "nobody there": "nobody matches now"}.get(state, state)


class PlanView(View, Vertical):
    """Targets, the plan and open asks in one place."""

    hint = "t p a: lists · Enter on a plan row keeps the ask · i d n x: an ask's outcome"

    BINDINGS = [
        Binding("t", "mode('targets')", "Targets"),
        Binding("p", "mode('plan')", "Plan"),
        Binding("a", "mode('asks')", "Asks"),
        Binding("i", "outcome('i')", "Introduced", show=False),
        Binding("d", "outcome('d')", "Declined", show=False),
        Binding("n", "outcome('n')", "No answer", show=False),
        Binding("x", "outcome('x')", "Not needed", show=False),
        Binding("o", "reopen", "Open again", show=False),
    ]

    def __init__(self, **kw) -> None:
        super().__init__(**kw)
        self.mode = "plan"
        self.data: dict[str, Any] | None = None
        self.stale = True
        self.items: dict[Any, Any] = {}

    def compose(self) -> ComposeResult:
        yield Static("", classes="count", id="plan-tabs")
        yield Static("", classes="count", id="plan-head")
        yield RowList(COLUMNS["plan"], empty="Working out the plan…", id="plan-list")
        with VerticalScroll(classes="detail-scroll", id="plan-detail-box"):
            yield Static("", id="plan-detail")

    def on_mount(self) -> None:
        self._tabs()

    def focus_default(self) -> None:
        self.query_one(RowList).focus()
        if self.stale:
            self.load()

    def refresh_view(self, snap: Snapshot) -> None:
        self.stale = True
        if self.display and self.parent is not None and getattr(self.parent, "current", None) == self.id:
            self.load()

    # -- loading ---------------------------------------------------------------------
    def load(self) -> None:
        snap: Snapshot | None = self.mynet_app.snapshot
        if snap is None or snap.net is None:
            return
        self.stale = False
        self.query_one("#plan-head", Static).update(" Working out whom to ask…")

        def work():
            def read(ws):
                return {"targets": ws.targets(net=snap.net, today=snap.today),
                        "plan": ws.plan(net=snap.net, today=snap.today),
                        "asks": ws.asks(include_closed=True, today=snap.today)}
            return with_workspace(snap.path, read)

        self.run_worker(work, thread=True, exclusive=True, group="plan", exit_on_error=False)

    def on_worker_state_changed(self, event) -> None:
        if event.worker.group != "plan" or event.state not in (WorkerState.SUCCESS, WorkerState.ERROR):
            return
        event.stop()
        if event.state == WorkerState.ERROR:
            self.query_one("#plan-head", Static).update(f" The plan could not be made: {event.worker.error}")
            return
        self.data = event.worker.result
        self.show()

    # -- drawing ----------------------------------------------------------------------
    def _tabs(self) -> None:
        out = Text(" ")
        for mode, key, title in MODES:
            out.append(f"{key} {title}", style="bold reverse" if mode == self.mode else "")
            out.append("   ")
        self.query_one("#plan-tabs", Static).update(out)

    def action_mode(self, mode: str) -> None:
        self.mode = mode
        self._tabs()
        self.show()

    def show(self) -> None:
        lst = self.query_one(RowList)
        lst.set_columns(COLUMNS[self.mode])
        if self.data is None:
            lst.set_rows([])
            return
        rows, head = getattr(self, f"_{self.mode}_rows")(self.data)
        self.query_one("#plan-head", Static).update(head)
        lst.set_rows(rows, keep=False)
        self.detail(lst.current_key)

    def _targets_rows(self, data) -> tuple[list[Row], str]:
        rows = []
        for r in data["targets"]:
            self.items[("t", r["id"])] = r
            open_ = r["state"] == "open"
            rows.append(Row(("t", r["id"]), (str(r["id"]), r["label"], f"{r['best']['score']:.2f}" if open_ else "",
                                             ("observed" if r["observed"] else "assumed") if open_ else "",
                                             str(r["first_people"]) if open_ else "", _target_way(r))))
        n = len(rows)
        head = (f" {plural(n, 'target')}; Open = how many people you are warm with could open it" if n else
                " No targets yet: mynet targets add --org NAME (or --to, --tag, --domain, --file)")
        return rows, head

    def _plan_rows(self, data) -> tuple[list[Row], str]:
        p = data["plan"]
        rows = []
        for i, a in enumerate(p["asks"], 1):
            rows.append(Row(("h", a["person"]), (f"{i}. Ask {a['name']} (warmth {a['warmth']:.2f})", "", "", ""),
                            heading=True))
            for t in a["targets"]:
                key = ("p", a["person"], t["target"])
                self.items[key] = (a, t)
                rows.append(Row(key, ("", t["label"], f"{t['route']['score']:.2f}", t["route"]["basis"],
                                      _route(t["route"]))))
        if p["no_route"]:
            rows.append(Row(("h", "none"), ("No route yet", "", "", ""), heading=True))
            for t in p["no_route"]:
                key = ("n", t["target"])
                self.items[key] = t
                helps = [f"revive {d['name']}" for d in t["dormant"][:1]] + [f"G{g['group']} has nobody warm"
                                                                             for g in t["groups"][:1]]
                rows.append(Row(key, ("", t["label"], "", "", "; ".join(helps) or "see the details")))
        o = p["objective"]
        if o["people"]:
            head = (f" Ask {o['people']} {'person' if o['people'] == 1 else 'people'} to open "
                    f"{plural(o['opened'], 'target')} (at most {o['capacity']} each). Enter keeps an ask.")
        else:
            head = " Nothing to ask: " + ("add targets first (t)." if not data["targets"] else
                                          "every target is known, waiting or without a route.")
        if p["held_back"]:
            head += f" Asked recently, after others: {', '.join(h['name'] for h in p['held_back'][:2])}."
        return rows, head

    def _asks_rows(self, data) -> tuple[list[Row], str]:
        rows = []
        open_ = [a for a in data["asks"] if not a["outcome"]]
        for a in open_ + [a for a in data["asks"] if a["outcome"]]:
            self.items[("a", a["id"])] = a
            state = (f"{a['outcome']} on {a['closed_on']}" if a["outcome"] else
                     "follow up now" if a["due"] else f"follow up {a['follow_up_on']}")
            rows.append(Row(("a", a["id"]), (str(a["id"]), a["via_name"], a["target_label"], str(a["days_waiting"]),
                                             state)))
        head = (f" {plural(len(open_), 'open ask')}. i introduced · d declined · n no answer · x not needed · o open"
                if rows else " No asks yet: Enter on a row of the plan (p) keeps one.")
        return rows, head

    def detail(self, key) -> None:
        box = self.query_one("#plan-detail", Static)
        item = self.items.get(key) if key is not None else None
        out = Text()
        if item is None:
            box.update(out)
            return
        if key[0] == "t":
            out.append(shown(item["label"], one_line=True), style="bold")
            out.append(f"  {item['kind']}, {plural(item['members'], 'person', 'people')}\n")
            for r in item["routes"]:
                out.append(shown(f"{r['score']:.2f} {r['basis']:<8} {_route(r)}", one_line=True) + "\n")
            if item["state"] != "open":
                out.append(shown(_target_way(item)))
        elif key[0] == "p":
            a, t = item
            r = t["route"]
            out.append(shown(f"Ask {a['name']} for an introduction at {t['label']}", one_line=True), style="bold")
            out.append("\n" + shown(f"{_route(r)}  score {r['score']:.2f}", one_line=True))
            if r["basis"] != "observed":
                out.append("\nA step rests only on something the two share (organisation, domain, label).")
            out.append(f"\nLast in touch with {a['name']}: {a['last'] or '–'}")
        elif key[0] == "n":
            out.append(shown(item["label"], one_line=True), style="bold")
            out.append("\n" + shown(item["why"]))
            for d in item["dormant"]:
                out.append(shown(f"\nGet back in touch with {d['name']} (last {d['last'] or '–'}): {_route(d)}"))
            for g in item["groups"]:
                out.append(shown(f"\nNobody you are warm with is in G{g['group']} {g['name']} ({g['size']} people)."))
        else:
            out.append(shown(f"{item['via_name']} for {item['target_label']}", one_line=True), style="bold")
            out.append(f"\nAsked on {item['asked_on']}, {plural(item['days_waiting'], 'day')}")
            if item["note"]:
                out.append("\nNote: " + shown(item["note"]))
            if item["outcome"]:
                who = f" ({item['person_name']})" if item["person_name"] else ""
                out.append(shown(f"\n{item['outcome']}{who} on {item['closed_on']}"))
        box.update(out)

    def on_row_list_highlighted(self, event: RowList.Highlighted) -> None:
        if event.rowlist.id == "plan-list":
            self.detail(event.key)

    # -- acting ------------------------------------------------------------------------
    def on_row_list_selected(self, event: RowList.Selected) -> None:
        if event.rowlist.id != "plan-list":
            return
        event.stop()
        key = event.key
        if key and key[0] == "p":
            a, t = self.items[key]
            day = self.mynet_app.snapshot.today if self.mynet_app.snapshot else None
            self.mynet_app.edit(f"Keeping the ask of {a['name']}…",
                                lambda ws: ws.ask(a["person"], t["target"], on=day),
                                said=f"Kept: you asked {a['name']} about {t['label']}. It is in the asks (a).")
            self.stale = True
        elif key and key[0] == "t":
            r = self.items[key]
            if r["contact"] is not None:
                self.mynet_app.open_person(r["contact"])

    def _ask_key(self):
        key = self.query_one(RowList).current_key
        return key if self.mode == "asks" and key and key[0] == "a" else None

    def action_outcome(self, letter: str) -> None:
        key = self._ask_key()
        if key is None:
            self.mynet_app.status_text = "Outcomes are given in the asks (a): pick an ask, then i, d, n or x."
            return
        a = self.items[key]
        outcome = OUTCOME_KEYS[letter]
        day = self.mynet_app.snapshot.today if self.mynet_app.snapshot else None
        target = next((t for t in (self.data or {}).get("targets", []) if t["id"] == a["target"]), None)
        if outcome == "introduced" and target is not None and target["kind"] != "person":
            def answered(name: str) -> None:
                if name.strip():
                    self._close(a, outcome, day, name.strip())
            self.mynet_app.push_screen(AskScreen(f"Whom at {target['label']} were you introduced to?",
                                                 placeholder="a name, an e-mail or an id", on_answer=answered))
            return
        self._close(a, outcome, day, None)

    def _close(self, a, outcome, day, person) -> None:
        self.stale = True
        self.mynet_app.edit(f"Closing ask {a['id']}…",
                            lambda ws: ws.close_ask(a["id"], outcome, person=person, on=day),
                            said=f"Ask {a['id']} ({a['via_name']} for {a['target_label']}): {outcome}.")

    def action_reopen(self) -> None:
        key = self._ask_key()
        if key is None:
            return
        a = self.items[key]
        self.stale = True
        self.mynet_app.edit(f"Opening ask {a['id']} again…", lambda ws: ws.reopen_ask(a["id"]),
                            said=f"Ask {a['id']} is open again.")
