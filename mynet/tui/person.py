"""One person: every field and where it came from, your warmth, their group and role, their ties with evidence."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.worker import WorkerState

from ..evidence.explain import basis, describe, evidence_summary
from ..safetext import shown
from .data import Snapshot, tier_of, with_workspace
from .dialogs import AskScreen
from .look import Label, Static, clip, plural, warmth_bar
from .page import Page
from .rowlist import Col, Row, RowList
from .views_main import group_title

__all__ = ["PersonScreen", "ConfirmScreen", "card_text", "evidence_text", "standing_words"]


def card_text(snap: Snapshot, cid: int, sources: list[str] | None) -> Text:
    """Everything known about one contact, one labelled line per kind."""
    net = snap.net
    c = net.by_id[cid]
    w = net.warmth.get(cid)
    out = Text()
    out.append(shown(c.name), style="bold")
    if c.nicknames:
        out.append(shown(f"  also {', '.join(c.nicknames)}"))

    def line(label: str, value: Any) -> None:
        if value:
            out.append(f"\n{label:<10}", style="bold")
            out.append_text(value if isinstance(value, Text) else Text(shown(str(value))))

    warmth, tier, last = tier_of(net, cid)
    bits = warmth_bar(warmth, 5) + Text(f" {tier}")
    if w is not None:
        if w.rated is not None:
            bits.append(f" · rated by you {w.rated:.2f}")
        if w.meetings:
            bits.append(f" · {plural(w.meetings, 'meeting')}")
        mails = w.messages_from + w.messages_to
        if mails:
            bits.append(f" · {plural(mails, 'mail')}")
        bits.append(f" · last {last}" if last else " · no interaction on record")
    line("Warmth", bits)
    m = snap.analysis.measures.get(cid) or {}
    line("Group", group_title(snap, snap.group_of(cid)) + Text(" · ") + Text(m.get("role") or "no ties", style="bold")
         + Text(f" · {plural(int(m.get('degree') or 0), 'tie')}"))
    line("Standing", standing_words(m.get("eigenvector")))
    titles = f" ({', '.join(c.titles)})" if c.titles else ""
    line("Works at", ", ".join(c.orgs) + titles if c.orgs else (titles.strip(" ()") or ""))
    line("Worked at", ", ".join(c.past_orgs))
    line("E-mail", ", ".join(c.emails))
    line("Phone", ", ".join(c.phones))
    line("Tags", ", ".join(c.tags))
    line("Place", ", ".join(c.localities))
    line("Web", ", ".join(c.urls))
    line("Id", Text(f"{c.id} (for commands: mynet show {c.id})", style="italic"))
    for note in c.notes[:3]:
        line("Note", clip(note, 200))
    if sources is None:
        line("Sources", Text("looking up the records…", style="italic"))
    else:
        line("Sources", ", ".join(sources) or ", ".join(sorted({s.rsplit('/', 1)[-1] for s in c.sources})))
    return out


def standing_words(eigenvector: float | None) -> Text:
    """Eigenvector centrality in plain words first, the number after (1: the best tied of their part of the network)."""
    if not eigenvector:
        return Text("no ties to anyone well tied")
    if eigenvector >= 0.7:
        words = "among the best tied to well-tied people"
    elif eigenvector >= 0.3:
        words = "tied to well-tied people"
    else:
        words = "further from the best-tied circle"
    return Text(words) + Text(f" · {eigenvector:.2f} of 1", style="italic")


SAME_WORDS = "may be the same person: decide in Duplicates (5)"


def evidence_text(ex: dict[str, Any], same: bool = False) -> Text:
    """The full explanation of one tie: each piece of evidence with the files and lines behind it.

    With ``same`` (the two are a suggested duplicate still to decide) the link is shown as that, not as a tie.
    """
    out = Text()
    if same:
        out.append(shown(f"{ex['a_name']} and {ex['b_name']} {SAME_WORDS}"), style="bold")
        out.append("\nWhat they share:")
    else:
        out.append(shown(f"{ex['a_name']} and {ex['b_name']}: strength {ex['strength']:.2f}"), style="bold")
    if ex.get("basis") == "assumed":
        out.append("\nThey may know each other: they share something, but nothing shows they have met or written.")
    if not ex["evidence"]:
        out.append("\nNo evidence on record.")
    for ev in ex["evidence"]:
        out.append(shown("\n• " + describe(ev)))
        prov = ev.get("provenance")
        if isinstance(prov, list) and prov:
            out.append(shown(f"  per {', '.join(prov[:4])}{'…' if len(prov) > 4 else ''}"), style="italic")
        for r in ev.get("recent", [])[:2]:
            out.append(shown(f"\n    {r['date']}  {clip(r.get('title') or r.get('subject') or '', 40)}  "
                             f"({r['provenance']})"),
                       style="italic")
    if ex.get("contributions"):
        parts = ", ".join(f"{k} {v:.2f}" for k, v in ex["contributions"].items())
        out.append(f"\nHow it adds up: {parts}; together {ex['strength']:.2f} (how: mynet explain ties)")
    if ex.get("suppressed"):
        out.append("\nYou suppressed this tie.")
    return out


class ConfirmScreen(ModalScreen):
    """A yes/no question: y confirms, n or Escape declines."""

    BINDINGS = [Binding("y", "answer(True)", "Yes"), Binding("n", "answer(False)", "No"),
                Binding("escape", "answer(False)", "No")]

    def __init__(self, question: str) -> None:
        super().__init__()
        self.question = question

    def compose(self) -> ComposeResult:
        with Vertical(id="ask-box"):
            yield Label(self.question, id="ask-question")
            yield Label("y: yes · n or Escape: no", classes="hint")

    def action_answer(self, yes: bool) -> None:
        self.dismiss(yes)


class PersonScreen(Page):
    """A person, their ties strongest first, and why mynet believes in each tie."""

    hint = "The highlighted tie's evidence is below the list, with the files it came from."

    BINDINGS = [
        Binding("w", "rate", "Set warmth"),
        Binding("t", "tie", "Add tie"),
        Binding("x", "untie", "Untie"),
        Binding("r", "reach", "Reach"),
        Binding("escape", "app.back", "Back"),
    ]

    def __init__(self, cid: int) -> None:
        super().__init__()
        self.cid = cid
        self.sources: list[str] | None = None
        self._explained: dict[int, dict[str, Any]] = {}
        self._want: int | None = None
        self._explaining = False
        self._timer = None

    @property
    def crumb(self) -> str:  # type: ignore[override]
        snap = self.mynet_app.snapshot
        return clip(snap.net.name(self.cid), 30) if snap else "Person"

    def body(self) -> ComposeResult:
        with VerticalScroll(id="person-card-box"):
            yield Static("", id="person-card")
        yield RowList([Col("Tie", 8), Col("With", 24), Col("Why")],
                      empty="No ties: nothing links this person to another.",
                      id="tie-list")
        with VerticalScroll(id="evidence-box", classes="detail-scroll"):
            yield Static("", id="evidence")

    def on_mount(self) -> None:
        self.query_one(RowList).focus()
        snap = self.mynet_app.snapshot
        if snap is not None:
            self.refresh_view(snap)
        self.load_sources()

    def on_resize(self) -> None:
        self.set_class(self.size.width >= 110, "-wide")

    def load_sources(self) -> None:
        snap = self.mynet_app.snapshot
        if snap is None or self.cid not in snap.net.by_id:
            return
        contact = snap.net.by_id[self.cid]

        def work() -> list[str]:
            rows = with_workspace(snap.path, lambda ws: ws.records_of(contact))
            return [f"{path.rsplit('/', 1)[-1]}:{rec.line}" for _rid, path, rec in rows]

        self.run_worker(work, thread=True, group="sources", exclusive=True, exit_on_error=False)

    def refresh_view(self, snap: Snapshot) -> None:
        self._explained = {}
        if self.cid not in snap.net.by_id:
            self.query_one("#person-card",
                           Static).update("This person is no longer in the workspace (merged?). Escape goes back.")
            self.query_one(RowList).set_rows([])
            return
        self.query_one("#person-card", Static).update(card_text(snap, self.cid, self.sources))
        net = snap.net
        rows = [Row(other, lambda o=other, s=strength, r=row: (
                    warmth_bar(s, 3), net.name(o), SAME_WORDS if snap.maybe_same(self.cid, o) else snap.why(r)))
                for other, strength, row in snap.ties_of(self.cid)]
        lst = self.query_one(RowList)
        lst.set_rows(rows)
        lst.border_title = f"{plural(len(rows), 'tie')}, strongest first (Enter opens the other person)"
        self.show_evidence(lst.current_key)

    def on_worker_state_changed(self, event) -> None:
        worker = event.worker
        if worker.group not in ("sources", "explain") or event.state not in (WorkerState.SUCCESS, WorkerState.ERROR):
            return
        event.stop()
        if worker.group == "explain":
            self._explaining = False
        if event.state == WorkerState.ERROR:
            self.mynet_app.status_text = f"Could not read the records: {worker.error!r}"
            return
        snap = self.mynet_app.snapshot
        if worker.group == "sources":
            self.sources = worker.result
            if snap is not None and self.cid in snap.net.by_id:
                self.query_one("#person-card", Static).update(card_text(snap, self.cid, self.sources))
        else:
            other, ex = worker.result
            self._explained[other] = ex
            if other == self.query_one(RowList).current_key:
                same = snap is not None and snap.maybe_same(self.cid, other)
                self.query_one("#evidence", Static).update(evidence_text(ex, same))
            elif self._want not in self._explained:
                self._explain()  # the cursor moved on meanwhile

    def show_evidence(self, other) -> None:
        snap = self.mynet_app.snapshot
        box = self.query_one("#evidence", Static)
        if snap is None or other is None:
            box.update("")
            return
        row = next((r for o, _s, r in snap.ties_of(self.cid) if o == other), None)
        same = snap.maybe_same(self.cid, other)
        quick = Text(shown(f"{snap.net.name(self.cid)} and {snap.net.name(other)}"
                           + (f" {SAME_WORDS}" if same else ""), one_line=True), style="bold")
        if row is not None:
            items = evidence_summary(snap.net, row)
            if basis(items) == "assumed":
                quick.append("\nmay know:")
            for ev in items:
                quick.append("\n• " + describe(ev))
        done = self._explained.get(other)
        if done is not None:
            box.update(evidence_text(done, same))
            return
        quick.append("\nfinding the files behind it…", style="italic")
        box.update(quick)
        # Look the files up once the cursor rests, one look-up at a time: each reads every record.
        self._want = other
        if self._timer is not None:
            self._timer.stop()
        self._timer = self.set_timer(0.25, self._explain)

    def _explain(self) -> None:
        snap = self.mynet_app.snapshot
        other, cid = self._want, self.cid
        if snap is None or other is None or self._explaining or other in self._explained:
            return
        self._explaining = True

        def work():
            return other, snap.explain(cid, other)

        self.run_worker(work, thread=True, group="explain", exit_on_error=False)

    def on_row_list_highlighted(self, event: RowList.Highlighted) -> None:
        self.show_evidence(event.key)

    def on_row_list_selected(self, event: RowList.Selected) -> None:
        self.mynet_app.open_person(event.key)

    # -- edits ---------------------------------------------------------------------------
    def action_rate(self) -> None:
        snap = self.mynet_app.snapshot
        if snap is None:
            return
        w = snap.net.warmth.get(self.cid)
        name = snap.net.name(self.cid)

        def answer(text: str | None) -> None:
            if text is None:
                return
            text = text.strip()
            try:
                value = None if not text else float(text)
            except ValueError:
                self.mynet_app.status_text = f"Not a number: {text!r}; nothing changed."
                return
            said = f"Saved: your warmth to {name} is {value:.2f} (your rating)." if value is not None else \
                f"Saved: your rating of {name} is cleared; warmth comes from your interactions."
            self.mynet_app.edit("Saving your rating…", lambda ws: ws.rate(self.cid, value), said=said)

        self.app.push_screen(AskScreen(f"Your warmth to {name}, from 0 (not close) to 1 (closest); empty clears it:",
                                       value=f"{w.rated:.2f}" if w and w.rated is not None else "",
                                       placeholder="e.g. 0.7"), answer)

    def action_tie(self) -> None:
        snap = self.mynet_app.snapshot
        if snap is None:
            return
        name = snap.net.name(self.cid)
        names = sorted({c.name for c in snap.contacts if c.id != self.cid})

        def who(text: str | None) -> None:
            if not text or not text.strip():
                return
            typed = text.strip().casefold()
            exact = [c for c in snap.contacts if c.id != self.cid
                     and typed in (c.name.casefold(), shown(c.name, one_line=True).casefold())]
            hits = exact or [c for c in snap.search(text) if c.id != self.cid]
            if len(hits) != 1:
                self.mynet_app.status_text = (f"Nobody matches {text!r}." if not hits else
                                        f"{text!r} matches {len(hits)} people; type more of the name.")
                return
            other = hits[0]

            def note(text2: str | None) -> None:
                if text2 is None:
                    return
                self.mynet_app.edit("Saving the tie…", lambda ws: ws.tie(self.cid, other.id, note=text2.strip()),
                              said=f"Saved: {name} and {other.name} know each other.")

            self.app.push_screen(AskScreen(f"How do {name} and {other.name} know each other? (optional)"), note)

        self.app.push_screen(AskScreen(f"Who else does {name} know? Type a name:", suggestions=names), who)

    def action_untie(self) -> None:
        snap = self.mynet_app.snapshot
        other = self.query_one(RowList).current_key
        if snap is None or other is None:
            return
        a, b = snap.net.name(self.cid), snap.net.name(other)

        def confirmed(yes: bool | None) -> None:
            if yes:
                self.mynet_app.edit("Removing the tie…", lambda ws: ws.untie(self.cid, other),
                              said=f"Saved: no tie between {a} and {b} (kept across re-imports; t adds it back).")

        self.app.push_screen(ConfirmScreen(f"Remove the tie between {a} and {b}, whatever the evidence says?"),
                             confirmed)

    def action_reach(self) -> None:
        snap = self.mynet_app.snapshot
        if snap is not None:
            self.mynet_app.reach_for("person", str(self.cid), snap.net.name(self.cid))
