"""What every screen of the browser shares: the typed way to the app, the top bar, the status line, the page.

Widgets reach the app through :attr:`AppAccess.mynet_app`, typed as
:class:`~mynet.tui.app.MynetApp` (Textual's own ``self.app`` is a plain ``App``).
"""

from __future__ import annotations

import time
from typing import TYPE_CHECKING, cast

from textual.app import ComposeResult
from textual.dom import DOMNode
from textual.screen import Screen
from textual.widgets import Footer

from .data import Snapshot
from .look import Static, plural

if TYPE_CHECKING:
    from .app import MynetApp

__all__ = ["AppAccess", "View", "TopBar", "StatusLine", "Page", "SPINNER", "MOMENT"]

SPINNER = "◐◓◑◒"
#: Seconds before a running job shows its spinner ("more than a moment").
MOMENT = 0.25


class AppAccess:
    """For widgets and screens of the browser: the app they run in, with its type."""

    @property
    def mynet_app(self) -> "MynetApp":
        return cast("MynetApp", cast(DOMNode, self).app)


class View(AppAccess):
    """One top-level view of the main screen (a mixin for its container widget).

    ``hint`` is what the status line says when the view opens.
    """

    hint = ""

    def focus_default(self) -> None:
        """Put the focus where typing starts in this view (override)."""

    def refresh_view(self, snap: Snapshot) -> None:
        """Redraw from a new snapshot (override)."""


class TopBar(AppAccess, Static):
    """Workspace name, counts, and where you are."""

    def on_mount(self) -> None:
        self.watch(self.app, "snapshot_version", lambda _v: self.update_bar(), init=True)

    def update_bar(self) -> None:
        app = self.mynet_app
        snap = app.snapshot
        place = [str(getattr(s, "crumb", "")) for s in app.screen_stack if isinstance(s, Page) and s.crumb]
        head = f" mynet · {app.path.name}"
        if len(place) > 1:  # below the views: where you are
            self.update(head + " · " + " › ".join(place))
        elif snap is not None:
            people = len(snap.contacts) if snap.net is not None else len(snap.analysis.group_of)
            ties = len(snap.net.ties) if snap.net is not None else int(snap.analysis.summary.get("ties") or 0)
            self.update(head + f" · {plural(people, 'person', 'people')} · {plural(ties, 'tie')}"
                        f" · {plural(len(snap.analysis.groups), 'group')}")
        else:
            self.update(head)


class StatusLine(AppAccess, Static):
    """The last thing that happened, and a spinner while something is running."""

    def on_mount(self) -> None:
        self.watch(self.app, "status_text", lambda _v: self.show(), init=True)
        self.set_interval(0.12, self.show)

    def show(self) -> None:
        app = self.mynet_app
        if app.busy_label and time.monotonic() - app.busy_since >= MOMENT:
            frame = SPINNER[int(time.monotonic() * 8) % len(SPINNER)]
            self.update(f" {frame} {app.busy_label}")
            self.add_class("-busy")
        else:
            self.update(f" {app.status_text}" if app.status_text else "")
            self.remove_class("-busy")


class Page(AppAccess, Screen):
    """A screen with the top bar, a status line and the key footer around its body."""

    crumb = ""
    #: What the status line says when the screen opens: what its words mean.
    hint = ""

    def compose(self) -> ComposeResult:
        yield TopBar(classes="topbar")
        yield from self.body()
        yield StatusLine(classes="status")
        yield Footer()

    def body(self) -> ComposeResult:
        return iter(())

    def refresh_view(self, snap: Snapshot) -> None:
        """Redraw from a new snapshot (override)."""

    def on_screen_resume(self) -> None:
        for bar in self.query(TopBar):
            bar.update_bar()
        if self.hint:
            self.mynet_app.status_text = self.hint
