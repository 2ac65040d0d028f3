"""The browser: one Textual app over one workspace, shared by ``mynet browse`` and the tests.

The app keeps a :class:`~mynet.tui.data.Snapshot` of the network and its
analysis. Loading and every edit run in thread workers, each with its own
workspace connection; results come back to the main thread, which swaps the
snapshot and redraws whatever is on screen. Edits are written at once, each in
one transaction of the core functions, so a CLI run elsewhere sees them.
"""

from __future__ import annotations

import time
from datetime import date
from pathlib import Path
from typing import Any, Callable

from textual import events
from textual.app import App, ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.reactive import reactive
from textual.widgets import ContentSwitcher, Input

from ..errors import MynetError
from ..safetext import shown
from ..workspace import ChangeWatch, Workspace, resolve_workspace_path
from .data import Extras, Snapshot, load_extras, load_snapshot, peek_snapshot, with_workspace
from .look import THEME, Static
from .page import AppAccess, Page, View

__all__ = ["MynetApp", "create_app", "VIEWS"]

#: The top-level views: (id, title), in the order of their number keys.
VIEWS = (("groups", "Groups"), ("map", "Map"), ("people", "People"), ("reach", "Reach"),
         ("duplicates", "Duplicates"), ("findings", "Findings"), ("plan", "Plan"))

#: What the status line says when another process (an import, a merge on the command line) changed the workspace.
CHANGED_ELSEWHERE = "Another mynet command changed the workspace (an import?); what you see is now up to date."


class ViewTab(AppAccess, Static):
    """One entry of the view bar; a click opens its view."""

    def __init__(self, number: int, view: str, title: str) -> None:
        super().__init__(f"{number} {title}", id=f"tab-{view}", classes="viewtab")
        self.view, self.title = view, title

    def on_click(self, event: events.Click) -> None:
        event.stop()
        self.mynet_app.action_view(self.view)


class MainScreen(Page):
    """The top-level views, one at a time, picked by number or by a click on the view bar."""

    @property
    def crumb(self) -> str:  # type: ignore[override]
        return dict(VIEWS).get(self.current, "Groups")

    def body(self) -> ComposeResult:
        from .views_main import GroupsView, MapView, PeopleView
        from .views_plan import PlanView
        from .views_work import DuplicatesView, FindingsView, ReachView

        with Horizontal(classes="viewbar"):
            for n, (view, title) in enumerate(VIEWS, 1):
                yield ViewTab(n, view, title)
        with ContentSwitcher(initial="groups", id="views"):
            yield GroupsView(id="groups")
            yield MapView(id="map")
            yield PeopleView(id="people")
            yield ReachView(id="reach")
            yield DuplicatesView(id="duplicates")
            yield FindingsView(id="findings")
            yield PlanView(id="plan")

    def on_mount(self) -> None:
        self.query_one("#tab-groups").add_class("-current")
        self.query_one("#groups").loading = True

    @property
    def current(self) -> str:
        try:
            return self.query_one(ContentSwitcher).current or "groups"
        except Exception:  # not composed yet
            return "groups"

    def show_view(self, view: str) -> None:
        self.query_one(ContentSwitcher).current = view
        for tab in self.query(ViewTab):
            tab.set_class(tab.view == view, "-current")
        widget = self.query_one(f"#{view}", View)
        widget.focus_default()
        if getattr(widget, "hint", "") and self.mynet_app.snapshot is not None:
            self.mynet_app.status_text = widget.hint

    def refresh_view(self, snap: Snapshot) -> None:
        self.query_one("#groups").loading = False
        if snap.preview:  # the groups as last analysed; the rest follows in a moment
            self.query_one("#groups", View).refresh_view(snap)
            return
        for view, _title in VIEWS:
            self.query_one(f"#{view}", View).refresh_view(snap)
        dupes = self.query_one("#tab-duplicates", ViewTab)
        n = len(snap.extras.suggestions) if snap.extras else None
        dupes.update(f"5 Duplicates{f' ({n})' if n else ''}")


class MynetApp(App):
    """Browse one workspace: groups, people, ties and their evidence, intro paths, duplicates, findings."""

    TITLE = "mynet"
    CSS_PATH = "mynet.tcss"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS = [
        Binding("1", "view('groups')", "Groups", show=False),
        Binding("2", "view('map')", "Map", show=False),
        Binding("3", "view('people')", "People", show=False),
        Binding("4", "view('reach')", "Reach", show=False),
        Binding("5", "view('duplicates')", "Duplicates", show=False),
        Binding("6", "view('findings')", "Findings", show=False),
        Binding("7", "view('plan')", "Plan", show=False),
        Binding("slash", "search", "Search"),
        Binding("question_mark", "help", "Help"),
        Binding("escape", "back", "Back", show=False),
        Binding("ctrl+r", "reload", "Reload", show=False),
        Binding("q", "quit", "Quit"),
    ]

    snapshot_version: reactive[int] = reactive(0)
    status_text: reactive[str] = reactive("")

    def __init__(self, path: Path, *, today: date | None = None, watch_interval: float = 1.5,
                 as_of: date | str | None = None) -> None:
        super().__init__()
        self.path = path
        self.today = today
        self.as_of = as_of
        self.snapshot: Snapshot | None = None
        self.busy_label = ""
        self.busy_since = 0.0
        self._jobs: dict[int, str] = {}
        self._job_seq = 0
        self._load_seq = 0
        self._applied_seq = 0
        self._watch_interval = watch_interval
        self._watch = ChangeWatch(path)
        #: The workspace's mark right after this window's own last change (never "changed elsewhere").
        self._own_mark: tuple[int, int] | None = None
        self.error: str = ""

    # -- life cycle ----------------------------------------------------------------
    def on_mount(self) -> None:
        self.register_theme(THEME)
        self.theme = THEME.name
        self.push_screen(MainScreen())
        self.reload("Opening the workspace…", peek=True)
        if self._watch_interval:
            self.set_interval(self._watch_interval, self._watch_tick)

    def on_unmount(self) -> None:
        self._watch.close()

    @property
    def main(self) -> MainScreen:
        return next(s for s in self.screen_stack if isinstance(s, MainScreen))

    # -- jobs --------------------------------------------------------------------------
    def _start_job(self, label: str) -> int:
        self._job_seq += 1
        self._jobs[self._job_seq] = label
        if not self.busy_label:
            self.busy_since = time.monotonic()
        self.busy_label = label
        return self._job_seq

    def _end_job(self, job: int) -> None:
        self._jobs.pop(job, None)
        self.busy_label = next(reversed(self._jobs.values()), "") if self._jobs else ""

    def _thread_status(self, job: int) -> Callable[[str], None]:
        def say(text: str) -> None:
            def apply() -> None:
                if job in self._jobs:
                    self._jobs[job] = text
                    self.busy_label = text
            try:
                self.call_from_thread(apply)
            except RuntimeError:
                pass
        return say

    def _from_thread(self, fn: Callable, *args: Any) -> None:
        try:
            self.call_from_thread(fn, *args)
        except RuntimeError:  # the app is closing
            pass

    def reload(self, label: str = "Loading the network…", *, peek: bool = False) -> None:
        """Load the network and analysis again in a worker (the view stays usable meanwhile).

        With ``peek``, the groups as last analysed are shown first, straight from the cache.
        """
        self._load_seq += 1
        seq = self._load_seq
        job = self._start_job(label)
        say = self._thread_status(job)

        def work() -> None:
            try:
                if peek:
                    early = peek_snapshot(self.path, self.today, self.as_of)
                    if early is not None:
                        self._from_thread(self._apply_preview, seq, early)
                snap = load_snapshot(self.path, self.today, status=say, as_of=self.as_of)
                self._from_thread(self._apply, seq, snap, job)
                extras = load_extras(self.path, snap, status=say)
                self._from_thread(self._apply_extras, seq, extras)
            except Exception as exc:  # shown to the user, never swallowed
                self._from_thread(self._failed, exc, job)

        self.run_worker(work, thread=True, group="load", exit_on_error=False, name="load")

    def edit(self, label: str, fn: Callable[[Workspace], Any], *, reload: bool = True,
             done: Callable[[Any], None] | None = None, said: str = "") -> None:
        """Write one change to the workspace in a worker, then reload when it changes the network."""
        job = self._start_job(label)
        say = self._thread_status(job)

        def work() -> None:
            try:
                result = with_workspace(self.path, fn, say)
            except Exception as exc:
                self._from_thread(self._failed, exc, job)
                return
            self._from_thread(self._edited, result, done, said, job, reload)

        self.run_worker(work, thread=True, group="edit", exit_on_error=False, name="edit")

    def _edited(self, result: Any, done: Callable[[Any], None] | None, said: str, job: int, reload: bool) -> None:
        self._end_job(job)
        if said:
            self.status_text = said
        if done is not None:
            done(result)
        if reload:
            self._own_mark = self._watch.settle()
            self.reload("Updating the network after your change…")
        else:  # the change is shown already: it is not one made elsewhere
            self._own_mark = self._rebaseline()
            snap = self.snapshot
            if self._own_mark is not None and snap is not None and self._own_mark[0] == snap.data_version:
                snap.decisions_seen = self._own_mark[1]

    def _apply_preview(self, seq: int, snap: Snapshot) -> None:
        if self.snapshot is None and seq >= self._applied_seq:
            self.snapshot = snap
            self.main.refresh_view(snap)
            self.snapshot_version += 1

    def _apply(self, seq: int, snap: Snapshot, job: int) -> None:
        self._end_job(job)
        if seq < self._applied_seq:
            return
        self._applied_seq = seq
        old_extras = self.snapshot.extras if self.snapshot and not self.snapshot.preview else None
        snap.extras = old_extras
        self.snapshot = snap
        self.redraw()
        self._rebaseline(snap)
        if not self.status_text or self.status_text.startswith("The workspace is busy"):
            self.status_text = self.greeting(snap)

    def _apply_extras(self, seq: int, extras: Extras) -> None:
        if self.snapshot is None or seq < self._applied_seq:
            return
        self.snapshot.extras = extras
        self.redraw()

    def _failed(self, exc: BaseException, job: int) -> None:
        self._end_job(job)
        text = str(exc) if isinstance(exc, MynetError) else f"Something went wrong: {type(exc).__name__}: {exc}"
        self.error = text
        self.status_text = text
        self.notify(shown(text), severity="error", timeout=8, markup=False)
        if self.snapshot is None:
            self.main.query_one("#groups").loading = False

    def greeting(self, snap: Snapshot) -> str:
        if not snap.contacts:
            return "This workspace has no contacts yet. Import your exports first: mynet import FILE"
        when = snap.net.as_of
        if when.note:
            return f"Seen from {when.day.isoformat()}, your newest meeting or mail (mynet browse --as-of to change)"
        if when.explicit:
            return f"Seen from {when.day.isoformat()}: later meetings and mail are left out"
        named = sum(1 for g in snap.analysis.groups if g.user_named)
        if snap.analysis.groups and not named:
            return "Enter opens · n names the group · ~ marks a suggested label · ? all keys"
        return "Enter opens · Escape goes back · / searches everyone · ? lists every key"

    def redraw(self) -> None:
        snap = self.snapshot
        if snap is None:
            return
        self.snapshot_version += 1
        for screen in list(self.screen_stack):
            if isinstance(screen, Page):
                screen.refresh_view(snap)

    # -- seeing changes made elsewhere ------------------------------------------------------
    def _rebaseline(self, snap: Snapshot | None = None) -> tuple[int, int] | None:
        """Remember the workspace's state; with ``snap``, reload at once if it changed while ``snap`` was read.

        An import by another process while the network was loading (the first
        seconds after opening, say) would otherwise be taken as already shown. A
        change this window made itself (a rename while the network was loading)
        reloads quietly: it was not made elsewhere.
        """
        mark = self._watch.settle()
        if mark is not None and snap is not None and mark != (snap.data_version, snap.decisions_seen):
            if mark == self._own_mark:
                self.reload("Updating the network after your change…")
            else:
                self._changed_elsewhere()
        return mark

    def _changed_elsewhere(self) -> None:
        self.status_text = CHANGED_ELSEWHERE
        self.reload("Loading changes made elsewhere…")

    def _watch_tick(self) -> None:
        """Reload when another process changed the network or the decisions (cheap when nothing did)."""
        if self._jobs or self.snapshot is None:
            return
        if self._watch.changed():
            self._changed_elsewhere()

    # -- actions -------------------------------------------------------------------------
    def ready(self) -> bool:
        """Whether the whole network is loaded (not only the preview of the groups)."""
        if self.snapshot is None or self.snapshot.preview:
            self.status_text = "Still loading the network; one moment…"
            return False
        return True

    def _to_main(self) -> MainScreen:
        while not isinstance(self.screen, MainScreen) and len(self.screen_stack) > 1:
            self.pop_screen()
        return self.main

    def action_view(self, view: str) -> None:
        if view == "groups" or self.ready():
            self._to_main().show_view(view)

    def action_search(self) -> None:
        if not self.ready():
            return
        main = self._to_main()
        main.show_view("people")
        from .views_main import PeopleView

        main.query_one("#people", PeopleView).start_search()

    def action_help(self) -> None:
        from .screens import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_back(self) -> None:
        if isinstance(self.focused, Input):
            handler = getattr(self.focused.parent, "leave_input", None)
            if handler is not None:
                handler()
                return
        if not isinstance(self.screen, MainScreen) and len(self.screen_stack) > 2:
            self.pop_screen()
        elif isinstance(self.screen, MainScreen) and self.main.current != "groups":
            self.main.show_view("groups")

    def action_reload(self) -> None:
        self.status_text = ""
        self.reload("Loading the workspace again…")

    def open_group(self, gid: int | None) -> None:
        from .screens import GroupScreen

        if not self.ready():
            return
        self.push_screen(GroupScreen(gid))

    def open_links(self, gid: int) -> None:
        from .screens import LinksScreen

        if not self.ready():
            return
        self.push_screen(LinksScreen(gid))

    def open_person(self, cid: int) -> None:
        from .person import PersonScreen

        if self.ready() and self.snapshot and cid in self.snapshot.net.by_id:
            self.push_screen(PersonScreen(cid))

    def reach_for(self, query_kind: str, value: str, label: str) -> None:
        main = self._to_main()
        main.show_view("reach")
        from .views_work import ReachView

        main.query_one("#reach", ReachView).run_query(query_kind, value, label)

    def rename_group(self, gid: int, name: str) -> None:
        """Give a group the user's name (empty: back to the suggested label); saved at once."""
        def done(_result: Any) -> None:
            snap = self.snapshot
            g = snap.group(gid) if snap else None
            if g is not None:
                g.name, g.user_named = (name.strip(), True) if name.strip() else (g.label, False)
            self.redraw()

        said = f"Saved: group {gid} is now called {name.strip()!r}." if name.strip() else \
            f"Saved: group {gid} goes back to its suggested label."
        self.edit("Saving the name…", lambda ws: ws.name_group(gid, name), reload=False, done=done, said=said)


def create_app(workspace_path: str | Path | None = None, *, today: date | None = None,
               watch_interval: float = 1.5, as_of: date | str | None = None) -> MynetApp:
    """The browser for a workspace (``None``: ``$MYNET_WORKSPACE`` or the default place).

    Parameters
    ----------
    workspace_path : path-like, optional
        The workspace file; it must exist.
    today : datetime.date, optional
        The day warmth is measured on (tests freeze it; default: today).
    watch_interval : float
        Seconds between checks for changes made by another process (0: never).
    as_of : datetime.date or str, optional
        See the network from this day (see :meth:`mynet.workspace.Workspace.as_of`).
    """
    path = resolve_workspace_path(workspace_path)
    with Workspace(path, create=False) as ws:  # a clear error now, rather than inside the app
        if as_of is not None:
            ws.as_of(as_of)  # a bad date is refused before the screen opens
    return MynetApp(path, today=today, watch_interval=watch_interval, as_of=as_of)
