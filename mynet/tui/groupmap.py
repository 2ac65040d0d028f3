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
from textual.geometry import Size
from textual.message import Message
from textual.reactive import reactive
from textual.scroll_view import ScrollView
from textual.strip import Strip

from ..analysis.groups import group_ref
from .data import Snapshot
from .look import BOUNDS, RAMP, SHADES, SUGGESTED, clip, density_cell, pad

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


class GroupMap(ScrollView, can_focus=True):
    """A group-to-group matrix with a cell cursor, drawn line by line (large maps stay quick).

    The header line and the row labels stay in place while the cells scroll.
    """

    DEFAULT_CSS = """
    GroupMap { height: 1fr; padding: 0 1; }
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
        self._cells: dict[tuple[int, int], Text] = {}
        self._lines: dict[tuple, Strip] = {}

    def show(self, snap: Snapshot) -> None:
        self.snap = snap
        self._cells, self._lines = {}, {}
        self.gids = [g.id for g in snap.analysis.groups]
        self.row = min(self.row, max(0, len(self.gids) - 1))
        self.col = min(self.col, max(0, len(self.gids) - 1))
        self._fit()
        self.refresh()
        self._moved()

    def _fit(self) -> None:
        room = self.scrollable_content_region.width or 80
        self.label = max(LABEL, min(64, room - CELL * len(self.gids) - 1))
        self.virtual_size = Size(self.label + 1 + CELL * len(self.gids), len(self.gids) + 1)
        self._lines = {}

    def on_resize(self) -> None:
        self._fit()

    def cell(self, g: int, h: int) -> Text:
        """One cell (a fresh copy: the caller may style it)."""
        if (g, h) not in self._cells:
            self._cells[(g, h)] = self._cell(g, h)
        return self._cells[(g, h)].copy()

    def _cell(self, g: int, h: int) -> Text:
        snap = self.snap
        assert snap is not None
        if g == h:
            ties, density = snap.internal(g)
        else:
            link = snap.link(g, h)
            ties, density = (link["ties"], link["density"]) if link else (0, 0.0)
        if not ties:
            return Text("   ·   ", style="#56606e")
        mark = "!" if g != h and snap.fragile(g, h) else " "
        return density_cell(density) + Text(f"{ties:>4}" if ties < 10000 else " 10k") + Text(mark, style="bold #e3a33b")

    def render(self) -> Text:
        """The whole map as text (for tests and for reading; the screen draws it line by line)."""
        if self.snap is None or not self.gids:
            return Text(self._empty(), style="italic")
        return Text("\n").join(self._row_text(y) for y in range(len(self.gids) + 1))

    def _empty(self) -> str:
        return "No groups yet: the map needs ties between your contacts."

    def _row_text(self, y: int) -> Text:
        snap = self.snap
        assert snap is not None
        head = self.get_component_rich_style("groupmap--head")
        cursor = self.get_component_rich_style("groupmap--cursor")
        out = Text(no_wrap=True)
        if y == 0:
            out.append(" " * (self.label + 1))
            for j, gid in enumerate(self.gids):
                out.append(f"{group_ref(gid):^{CELL}}"[:CELL], style=head + (cursor if j == self.col else Style()))
            return out
        i = y - 1
        g = self.gids[i]
        info = snap.group(g)
        name = (("" if info.user_named else SUGGESTED) + info.name) if info else str(g)
        ref = f"{group_ref(g):>4} "
        out.append(pad(ref + clip(name, self.label - len(ref)), self.label), style=head
                   + (cursor if i == self.row else Style()))
        out.append(" ")
        for j, h in enumerate(self.gids):
            c = self.cell(g, h)
            if i == self.row and j == self.col:
                c.stylize(cursor if self.has_focus else Style(underline=True))
            out.append_text(c)
        return out

    def render_line(self, y: int) -> Strip:
        width = self.scrollable_content_region.width
        base = self.rich_style
        if self.snap is None or not self.gids:
            text = Text(self._empty() if y == 0 else "", style="italic")
            return Strip(list(text.render(self.app.console))).crop_extend(0, width, base).apply_style(base)
        line = y if y == 0 else y + int(self.scroll_offset.y)
        if line > len(self.gids):
            return Strip.blank(width, base)
        key = (line, self.row if line in (0, self.row + 1) else -1, self.col, self.has_focus, width,
               int(self.scroll_offset.x))
        if key not in self._lines:
            if len(self._lines) > 400:
                self._lines = {}
            strip = Strip(list(self._row_text(line).render(self.app.console))).apply_style(base)
            fixed = self.label + 1
            scroll_x = int(self.scroll_offset.x)
            left = strip.crop(0, fixed)
            right = strip.crop(fixed + scroll_x, fixed + scroll_x + max(0, width - fixed))
            self._lines[key] = Strip.join([left, right]).crop_extend(0, width, base)
        return self._lines[key]

    def _moved(self) -> None:
        if self.gids:
            self.post_message(self.Moved(self.gids[self.row], self.gids[self.col]))
            self._scroll_to_cursor()

    def _scroll_to_cursor(self) -> None:
        region = self.scrollable_content_region
        rows_visible = max(1, region.height - 1)
        cols_visible = max(1, (region.width - self.label - 1) // CELL)
        top, left = int(self.scroll_offset.y), int(self.scroll_offset.x) // CELL
        if self.row < top:
            top = self.row
        elif self.row >= top + rows_visible:
            top = self.row - rows_visible + 1
        if self.col < left:
            left = self.col
        elif self.col >= left + cols_visible:
            left = self.col - cols_visible + 1
        self.scroll_to(x=left * CELL, y=top, animate=False, immediate=True)

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
        i = offset.y - 1 + int(self.scroll_offset.y)
        j = (offset.x - self.label - 1 + int(self.scroll_offset.x)) // CELL
        if offset.y >= 1 and 0 <= i < len(self.gids):
            j = j if 0 <= j < len(self.gids) and offset.x > self.label else i
            again = (i, j) == (self.row, self.col)
            self.row, self.col = i, j
            self._moved()
            if again or event.chain >= 2:
                self.action_choose()

    def on_focus(self) -> None:
        self.refresh()

    def on_blur(self) -> None:
        self.refresh()
