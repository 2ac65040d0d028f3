"""The top-level views where the user acts: intro paths, duplicate decisions, the audit's findings."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import Input, OptionList
from textual.widgets.option_list import Option
from textual.worker import WorkerState

from ..analysis.intro_routes import reach, resolve_targets
from ..errors import MynetError
from ..safetext import shown
from .data import Choice, Snapshot, tier_of, with_workspace
from .look import Static, plural, priority_tag, safe
from .page import View
from .rowlist import Col, Row, RowList

__all__ = ["ReachView", "DuplicatesView", "FindingsView", "match_choices", "path_text"]

KIND_WORD = {"person": "person", "organisation": "org", "tag": "tag"}


def match_choices(choices: list[Choice], text: str, limit: int = 8) -> list[Choice]:
    """Completions for what was typed: whole-word prefix matches first, then any substring."""
    from ..people.normalise import fold_text

    needle = fold_text(text)
    if not needle:
        return []
    starts, inside = [], []
    for ch in choices:
        if ch.folded.startswith(needle) or f" {needle}" in f" {ch.folded}":
            starts.append(ch)
        elif needle in ch.folded:
            inside.append(ch)
        if len(starts) >= limit:
            break
    return (starts + inside)[:limit]


def path_text(p: dict[str, Any]) -> Text:
    """Steps of one intro path, each explained, the weakest marked in words, and the suggested ask."""
    out = Text()
    names = ["you", *p["names"]]
    weakest = p["weakest_step"]["index"]
    for i, step in enumerate(p["steps"]):
        out.append(shown(f"{names[i]} → {step['to_name']}", one_line=True), style="bold")
        out.append(f"  {step['strength']:.2f}")
        if i == weakest and len(p["steps"]) > 1:
            out.append("  ◂ weakest step", style="bold #e3a33b")
        out.append(f"\n    {shown(step['why'] or 'linked', one_line=True)}\n")
    out.append("Ask: ", style="bold")
    out.append(shown(p["ask"]))
    return out


class ReachView(View, Vertical):
    """Type a person, an organisation or a tag; get the warmest chains of introductions."""

    hint = "Score = the step strengths multiplied (1 is best) · Escape leaves the box"

    BINDINGS = [Binding("down", "suggest(1)", "Next", show=False), Binding("up", "suggest(-1)", "Previous", show=False)]

    def __init__(self, **kw) -> None:
        super().__init__(**kw)
        self.result = None
        self.paths: list[dict[str, Any]] = []
        self.choices: list[Choice] = []

    def compose(self) -> ComposeResult:
        yield Input(placeholder="Reach whom? A person, an organisation or a tag", id="reach-input")
        yield OptionList(id="reach-options")
        yield Static("Type a name, organisation or tag; ↑ ↓ pick a suggestion; Enter asks.",
                     classes="count", id="reach-head")
        yield RowList([Col("#", 2, "right"), Col("Score", 5, "right"), Col("Path")], empty="No intro path yet.",
                      id="reach-paths")
        with VerticalScroll(classes="detail-scroll", id="reach-detail-box"):
            yield Static("", id="reach-detail")

    def on_mount(self) -> None:
        self.query_one(OptionList).display = False

    def focus_default(self) -> None:
        self.query_one(Input).focus()

    def leave_input(self) -> None:
        self.query_one(OptionList).display = False
        self.query_one(RowList).focus()

    def refresh_view(self, snap: Snapshot) -> None:
        self.paths = []
        if self.result is not None:
            self.query_one(RowList).set_rows([])
            self.query_one("#reach-detail", Static).update("")
            self.query_one("#reach-head", Static).update("The network changed; Enter in the box asks again.")
            self.result = None

    # -- completion -----------------------------------------------------------------
    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        snap: Snapshot | None = self.mynet_app.snapshot
        options = self.query_one(OptionList)
        if snap is None or not event.value.strip():
            options.display = False
            return
        self.choices = match_choices(snap.choices(), event.value)
        options.clear_options()
        for ch in self.choices:
            extra = f"  {plural(ch.count, 'person', 'people')}" if ch.kind != "person" else ""
            options.add_option(Option(safe(Text.assemble((f"{KIND_WORD[ch.kind]:<7}", "bold"), ch.label,
                                                         (extra, "italic")),
                                           one_line=True)))
        options.display = bool(self.choices)
        if self.choices:
            options.highlighted = 0

    def action_suggest(self, step: int) -> None:
        options = self.query_one(OptionList)
        if self.query_one(Input).has_focus and options.display and self.choices:
            options.highlighted = ((options.highlighted or 0) + step) % len(self.choices)
        elif self.query_one(Input).has_focus and step > 0:
            self.query_one(RowList).focus()
        else:
            lst = self.query_one(RowList)
            if lst.has_focus:
                lst.action_move(step)

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self._pick(self.choices[event.option_index])

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        options = self.query_one(OptionList)
        if options.display and self.choices:
            self._pick(self.choices[options.highlighted or 0])
        elif event.value.strip():
            self.run_query("organisation", event.value.strip(), event.value.strip())

    def _pick(self, ch: Choice) -> None:
        self.query_one(OptionList).display = False
        inp = self.query_one(Input)
        with inp.prevent(Input.Changed):
            inp.value = shown(ch.label if ch.kind != "person" else ch.label.split(" (")[0], one_line=True)
        self.run_query(ch.kind, ch.value, ch.label)

    # -- the query -----------------------------------------------------------------------
    def run_query(self, kind: str, value: str, label: str) -> None:
        """Find intro paths in a worker (the search is fast, but never blocks the view)."""
        snap: Snapshot | None = self.mynet_app.snapshot
        if snap is None:
            return
        inp = self.query_one(Input)
        if inp.value != shown(label.split(" (")[0] if kind == "person" else label, one_line=True):
            with inp.prevent(Input.Changed):
                inp.value = shown(label.split(" (")[0] if kind == "person" else label, one_line=True)
        self.query_one(OptionList).display = False
        self.query_one("#reach-head", Static).update(f"Looking for the warmest ways to {label}…")
        self.query_one(RowList).set_rows([])
        self.query_one(RowList).focus()

        def work():
            net = snap.net
            arg = {"person": "to", "organisation": "org", "tag": "tag"}[kind]
            try:
                targets = resolve_targets(net, **{arg: value}, find_contact=lambda q: net.by_id[int(q)])
            except MynetError as exc:
                if kind == "organisation":  # typed text that is no organisation: try it as a tag, then a name
                    for other in ("tag", "person"):
                        try:
                            if other == "person":
                                hits = snap.search(value)
                                if len(hits) != 1:
                                    raise MynetError(str(exc))
                                targets = resolve_targets(net, to=str(hits[0].id),
                                                          find_contact=lambda q: net.by_id[int(q)])
                            else:
                                targets = resolve_targets(net, tag=value)
                            break
                        except MynetError:
                            continue
                    else:
                        return snap, None, f"Nobody matches {value!r} as an organisation, a tag or a single person."
                else:
                    return snap, None, str(exc)
            hold = with_workspace(snap.path, lambda ws: ws.held_back(today=snap.today))  # asked recently: after others
            return snap, reach(net, targets, k=5, groups=snap.analysis.group_of, today=snap.today, hold=hold), ""

        self.run_worker(work, thread=True, exclusive=True, group="reach", exit_on_error=False)

    def on_worker_state_changed(self, event) -> None:
        if event.worker.group != "reach" or event.state not in (WorkerState.SUCCESS, WorkerState.ERROR):
            return
        event.stop()
        if event.state == WorkerState.ERROR:
            self.query_one("#reach-head", Static).update(f"The search failed: {event.worker.error}")
            return
        snap, result, problem = event.worker.result
        if problem:
            self.query_one("#reach-head", Static).update(problem)
            return
        self.show_result(snap, result)

    def show_result(self, snap: Snapshot, result) -> None:
        self.result = result
        self.paths = result.paths
        t = result.targets
        what = {"person": "", "organisation": "people at ", "tag": "people tagged ", "domain": "people at @"}[t.kind]
        head = f"Reaching {what}{', '.join(t.matched)}" + (f" ({len(t.members)})" if t.kind != "person" else "")
        insiders = [d for d in result.direct if d.get("insider")]
        if insiders:
            head += "; you already know " + ", ".join(f"{d['name']} ({d['warmth']:.2f})" for d in insiders[:3])
        elif result.known:
            d = result.known
            head += (f". You already know them (warmth {d['warmth']:.2f}, last {d['last'] or '–'}): ask them yourself"
                     + ("; below, alternatives through someone else, less sure" if result.paths else ""))
        elif result.direct and t.kind == "person":
            d = result.direct[0]
            head += f"; your own tie is weak or quiet (warmth {d['warmth']:.2f}, last {d['last'] or '–'})"
        if result.held_back:
            head += "; asked recently, so after others: " + ", ".join(h["name"] for h in result.held_back[:2])
        if not result.paths:
            head += ". No intro path within 2 intermediaries; add ties you know of from a person's page (t)."
        self.query_one("#reach-head", Static).update(head)
        rows = [Row(i, (str(i + 1), f"{p['score']:.3f}", " → ".join(["you", *p["names"]])))
                for i, p in enumerate(result.paths)]
        self.query_one(RowList).set_rows(rows, keep=False)
        self.query_one(RowList).focus()
        self.mynet_app.status_text = f"{plural(len(result.paths), 'intro path')}, best first."

    def on_row_list_highlighted(self, event: RowList.Highlighted) -> None:
        row = int(event.key)
        if 0 <= row < len(self.paths):
            self.query_one("#reach-detail", Static).update(path_text(self.paths[row]))

    def on_row_list_selected(self, event: RowList.Selected) -> None:
        p = self.paths[int(event.key)]
        self.mynet_app.open_person(p["path"][0])


def _side(snap: Snapshot, cid: int) -> Text:
    c = snap.net.by_id.get(cid)
    if c is None:
        return Text("(gone)")
    w, tier, last = tier_of(snap.net, cid)
    lines = [Text(shown(c.name, one_line=True), style="bold")]
    for label, values in (("works at", c.orgs), ("worked at", c.past_orgs), ("e-mail", c.emails), ("phone", c.phones),
                          ("tags", c.tags), ("place", c.localities),
                          ("files", sorted({s.rsplit('/', 1)[-1] for s in c.sources}))):
        if values:
            lines.append(Text(shown(f"{label:<9} {', '.join(values)}", one_line=True)))
    lines.append(Text(f"{'warmth':<9} {w:.2f} {tier}, last {last or '–'}"))
    return Text("\n").join(lines)


class DuplicatesView(View, Vertical):
    """Pairs that may be one person: merge them, keep them apart, or leave them for later."""

    hint = "Saved at once, kept across re-imports · M merges every pair 0.90 sure or more"

    BINDINGS = [
        Binding("m", "merge", "Merge"),
        Binding("k", "apart", "Keep apart"),
        Binding("s", "skip", "Skip"),
        Binding("M", "merge_sure", "Merge the surest"),
    ]

    #: The least score of a pair that ``M`` merges with the others (after a look at them and a yes).
    SURE = 0.9

    def __init__(self, **kw) -> None:
        super().__init__(**kw)
        self.decided: set[tuple[int, int]] = set()
        self.skipped: set[tuple[int, int]] = set()

    def compose(self) -> ComposeResult:
        yield Static("", classes="count", id="dupes-head")
        yield RowList([Col("Sure", 5, "right"), Col("One"), Col("Other"), Col("Why")],
                      empty="No duplicates left to decide.", id="dupes-list")
        with Horizontal(classes="compare", id="dupes-compare"):
            yield Static("", id="dupes-a")
            yield Static("", id="dupes-b")

    def focus_default(self) -> None:
        self.query_one(RowList).focus()

    def refresh_view(self, snap: Snapshot) -> None:
        lst = self.query_one(RowList)
        head = self.query_one("#dupes-head", Static)
        if snap.extras is None:
            head.update(" Looking for likely duplicates…")
            lst.set_rows([])
            return
        net = snap.net
        todo = [s for s in snap.extras.suggestions if (s.a, s.b) not in self.decided and s.a in net.by_id
                and s.b in net.by_id]
        rows = [Row((s.a, s.b), ("later" if (s.a, s.b) in self.skipped else f"{s.score:.2f}", net.name(s.a),
                                 net.name(s.b), s.reason)) for s in todo]
        lst.set_rows(rows)
        head.update(f" {plural(len(todo), 'pair')} that may be one person. m merges, k keeps them apart, s skips."
                    if todo else " Nothing to decide: no likely duplicates left.")
        self.compare(lst.current_key)

    def compare(self, key) -> None:
        snap = self.mynet_app.snapshot
        a, b = self.query_one("#dupes-a", Static), self.query_one("#dupes-b", Static)
        if snap is None or key is None:
            a.update("")
            b.update("")
            return
        a.update(_side(snap, key[0]))
        b.update(_side(snap, key[1]))

    def on_row_list_highlighted(self, event: RowList.Highlighted) -> None:
        self.compare(event.key)

    def _pair(self) -> tuple[int, int] | None:
        return self.query_one(RowList).current_key  # type: ignore[return-value]

    def _decide(self, doing: str, done: str, work) -> None:
        """Record a decision on the highlighted pair: hide it at once, save it in a worker."""
        pair = self._pair()
        snap = self.mynet_app.snapshot
        if pair is None or snap is None:
            return
        names = f"{snap.net.name(pair[0])} and {snap.net.name(pair[1])}"
        self.decided.add(pair)
        self.refresh_view(snap)
        self.mynet_app.edit(doing.format(names=names), lambda ws: work(ws, pair),
                      said=done.format(names=names))

    def action_merge(self) -> None:
        self._decide("Merging {names}…", "Merged {names} into one person.",
                     lambda ws, pair: ws.merge(list(pair)))

    def action_apart(self) -> None:
        self._decide("Keeping {names} apart…", "Kept apart: {names} will not be suggested again.",
                     lambda ws, pair: ws.apart(*pair))

    def action_merge_sure(self) -> None:
        """Every pair scoring :data:`SURE` or more, shown in a question; on yes merged in one step."""
        from .person import ConfirmScreen

        snap = self.mynet_app.snapshot
        if snap is None or snap.extras is None:
            return
        net = snap.net
        sure = [s for s in snap.extras.suggestions if s.score >= self.SURE and (s.a, s.b) not in self.decided
                and s.a in net.by_id and s.b in net.by_id]
        if not sure:
            self.mynet_app.status_text = f"No pair is {self.SURE:.2f} sure or more; decide them one by one."
            return
        listed = "\n".join(f"  {net.name(s.a)} / {net.name(s.b)}" for s in sure[:8])
        more = f"\n  and {len(sure) - 8} more" if len(sure) > 8 else ""
        question = (f"Merge these {len(sure)} pairs ({self.SURE:.2f} sure or more),\neach into one person?\n"
                    f"{listed}{more}\nA wrong one splits again: mynet unmerge ID")
        pairs = [(s.a, s.b) for s in sure]

        def answer(yes: bool | None) -> None:
            if not yes:
                self.mynet_app.status_text = "Nothing merged."
                return
            self.decided.update(pairs)
            self.refresh_view(snap)
            self.mynet_app.edit(f"Merging {plural(len(pairs), 'pair')}…",
                                lambda ws: ws.merge_suggested(self.SURE),
                                said=f"Merged {plural(len(pairs), 'pair')}, each into one person.")

        self.app.push_screen(ConfirmScreen(question), answer)

    def action_skip(self) -> None:
        pair = self._pair()
        snap = self.mynet_app.snapshot
        if pair is None or snap is None:
            return
        self.skipped.add(pair)
        lst = self.query_one(RowList)
        self.refresh_view(snap)
        lst.action_move(1)
        self.mynet_app.status_text = "Left for later."


class FindingsView(View, Vertical):
    """What the audit found about the shape of the network, most useful first."""

    hint = "The audit of your network's shape, the most useful finding first."

    def compose(self) -> ComposeResult:
        yield RowList([Col("What to do", 14), Col("Finding")], empty="No findings.", id="findings-list")
        with VerticalScroll(classes="detail-scroll", id="finding-box"):
            yield Static("", id="finding-detail")

    def focus_default(self) -> None:
        self.query_one(RowList).focus()

    def refresh_view(self, snap: Snapshot) -> None:
        lst = self.query_one(RowList)
        if snap.extras is None:
            lst.empty = "Reading the network for findings…"
            lst.set_rows([])
            return
        if snap.extras.findings is None:
            lst.empty = snap.extras.findings_error or "No findings."
            lst.set_rows([])
            return
        self.findings = snap.extras.findings
        lst.set_rows([Row(i, (priority_tag(f.get("severity", "low")), f.get("title", "")))
                      for i, f in enumerate(self.findings)])
        self.show(lst.current_key)

    def show(self, key) -> None:
        box = self.query_one("#finding-detail", Static)
        findings = getattr(self, "findings", [])
        if key is None or not 0 <= key < len(findings):
            box.update("")
            return
        f = findings[key]
        out = Text()
        out.append(shown(f.get("title", "")), style="bold")
        out.append("\n" + shown(f.get("detail", "")))
        numbers = f.get("numbers") or {}
        snap = self.mynet_app.snapshot
        people = numbers.get("people")
        if snap is not None and isinstance(people, list) and people and all(isinstance(p, int) for p in people):
            out.append(shown("\nPeople: " + ", ".join(snap.net.name(p) for p in people[:12])
                             + ("…" if len(people) > 12 else "")))
        if f.get("suggestion"):
            out.append("\nWhat to do: ", style="bold")
            out.append(shown(f["suggestion"]))
        out.append("\nWhat the words mean and the methods behind them: ? (help) or mynet explain findings",
                   style="italic")
        box.update(out)

    def on_row_list_highlighted(self, event: RowList.Highlighted) -> None:
        self.show(event.key)
