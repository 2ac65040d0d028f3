"""The map: every group against every other, how densely they are tied and where they hang by a thread.

One row and one column per group. A cell shows a shade glyph for the density
of ties between the two groups (inside the group on the diagonal), the number
of ties, and ``!`` where the pair hangs on one person on either side or on a
local bridge. The glyphs carry the meaning; the colours only repeat it.
"""

from __future__ import annotations

from rich.style import Style
from rich.text import Text
from textual import events
from textual.binding import Binding
from textual.geometry import Region, Size
from textual.message import Message
from textual.reactive import reactive
from textual.widget import Widget

from .data import Snapshot
from .look import SHADES, SUGGESTED, BOUNDS, RAMP, clip, density_cell

__all__ = ["GroupMap", "legend"]

LABEL = 20  # narrowest row labels (they widen to fill the room left)
CELL = 7  # width of one cell: "▓▓ 123!"


def legend() -> Text:
    """What the glyphs mean (shown under the map)."""
    out = Text("density ")
    labels = [f"<{b:g}" for b in BOUNDS] + [f"≥{BOUNDS[-1]:g}"]
    for k, glyph in enumerate(SHADES):
        out.append(glyph * 2, style=RAMP[k])
        out.append(f" {labels[k]}  ")
    out.append("\n123 ties (diagonal: inside a group)  ! rests on one person or a local bridge")
    return out


class GroupMap(Widget, can_focus=True):
    """A group-to-group matrix with a cell cursor."""

    DEFAULT_CSS = """
    GroupMap { width: auto; height: auto; padding: 0 1; }
    GroupMap > .groupmap--cursor { text-style: reverse bold; }
    GroupMap > .groupmap--head { color: $text-muted; text-style: bold; }
    """
    COMPONENT_CLASSES = {"groupmap--cursor", "groupmap--head"}
    BINDINGS = [
        Binding("up", "move(0, -1)", "Up", show=False),
        Binding("down", "move(0, 1)", "Down", show=False),
        Binding("left", "move(-1, 0)", "Left", show=False),
        Binding("right", "move(1, 0)", "Right", show=False),
        Binding("enter", "choose", "Open", show=False),
    ]

    row: reactive[int] = reactive(0)
    col: reactive[int] = reactive(0)

    class Moved(Message):
        def __init__(self, g: int, h: int) -> None:
            super().__init__()
            self.g, self.h = g, h

    class Chosen(Moved):
        pass

    def __init__(self, **kw) -> None:
        super().__init__(**kw)
        self.snap: Snapshot | None = None
        self.gids: list[int] = []
        self.label = LABEL

    def _fit_label(self) -> None:
        room = (self.parent.size.width if self.parent else 80) - 4 - CELL * len(self.gids) - 1
        self.label = max(LABEL, min(34, room))

    def show(self, snap: Snapshot) -> None:
        self.snap = snap
        self.gids = [g.id for g in snap.analysis.groups]
        self.row = min(self.row, max(0, len(self.gids) - 1))
        self.col = min(self.col, max(0, len(self.gids) - 1))
        self._fit_label()
        self.refresh(layout=True)
        self._moved()

    def on_resize(self) -> None:
        old = self.label
        self._fit_label()
        if old != self.label:
            self.refresh(layout=True)

    def get_content_width(self, container: Size, viewport: Size) -> int:
        return self.label + 1 + CELL * max(1, len(self.gids))

    def get_content_height(self, container: Size, viewport: Size, width: int) -> int:
        return len(self.gids) + 1 if self.gids else 1

    def cell(self, g: int, h: int) -> Text:
        snap = self.snap
        assert snap is not None
        if g == h:
            ties, density = snap.internal(g)
        else:
            link = snap.link(g, h)
            ties, density = (link["ties"], link["density"]) if link else (0, 0.0)
        if not ties:
            return Text("   ·   ".ljust(CELL), style="#56606e")
        mark = "!" if g != h and snap.fragile(g, h) else " "
        out = density_cell(density) + Text(f"{ties:>4}"[-4:] if ties < 10000 else " 10k") + Text(mark, style="bold #e3a33b")
        return out

    def render(self) -> Text:
        snap = self.snap
        if snap is None or not self.gids:
            return Text("No groups yet: the map needs ties between your contacts.", style="italic")
        head_style = self.get_component_rich_style("groupmap--head")
        cursor = self.get_component_rich_style("groupmap--cursor")
        out = Text()
        out.append(" " * (self.label + 1))
        for j, gid in enumerate(self.gids):
            out.append(f"{j + 1:^{CELL}}", style=head_style + (cursor if j == self.col else Style()))
        for i, g in enumerate(self.gids):
            out.append("\n")
            info = snap.group(g)
            name = (("" if info.user_named else SUGGESTED) + info.name) if info else str(g)
            label = f"{i + 1:>2} {clip(name, self.label - 3)}".ljust(self.label)
            out.append(label, style=head_style + (cursor if i == self.row else Style()))
            out.append(" ")
            for j, h in enumerate(self.gids):
                c = self.cell(g, h)
                if i == self.row and j == self.col and self.has_focus:
                    c.stylize(cursor)
                elif i == self.row and j == self.col:
                    c.stylize("underline")
                out.append_text(c)
        return out

    def _moved(self) -> None:
        if self.gids:
            self.post_message(self.Moved(self.gids[self.row], self.gids[self.col]))
            self.scroll_visible_cell()

    def scroll_visible_cell(self) -> None:
        region = Region(self.label + 1 + self.col * CELL, self.row + 1, CELL, 1)
        self.call_after_refresh(self.scroll_to_region, region, animate=False)

    def watch_row(self) -> None:
        self.refresh()

    def watch_col(self) -> None:
        self.refresh()

    def action_move(self, dx: int, dy: int) -> None:
        if not self.gids:
            return
        n = len(self.gids)
        self.row = max(0, min(n - 1, self.row + dy))
        self.col = max(0, min(n - 1, self.col + dx))
        self._moved()

    def action_choose(self) -> None:
        if self.gids:
            self.post_message(self.Chosen(self.gids[self.row], self.gids[self.col]))

    def on_click(self, event: events.Click) -> None:
        offset = event.get_content_offset(self)
        if offset is None or not self.gids:
            return
        i, j = offset.y - 1, (offset.x - self.label - 1) // CELL
        if 0 <= i < len(self.gids):
            j = j if 0 <= j < len(self.gids) else i
            again = (i, j) == (self.row, self.col)
            self.row, self.col = i, j
            self._moved()
            if again or event.chain >= 2:
                self.action_choose()

    def on_focus(self) -> None:
        self.refresh()

    def on_blur(self) -> None:
        self.refresh()
