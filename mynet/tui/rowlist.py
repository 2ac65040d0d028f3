"""A fast list of rows with fixed columns, drawn line by line.

Only the visible lines are ever rendered, so ten thousand rows cost no more
than twenty. The row under the cursor carries a marker glyph as well as a
highlight, so it stays visible on a monochrome terminal.
"""

from __future__ import annotations

from bisect import bisect_left
from dataclasses import dataclass
from typing import Any, Callable, Hashable, Sequence

from rich.segment import Segment
from rich.style import Style
from rich.text import Text
from textual import events
from textual.binding import Binding
from textual.geometry import Region, Size
from textual.message import Message
from textual.reactive import reactive
from textual.scroll_view import ScrollView
from textual.strip import Strip

from .look import safe

__all__ = ["Col", "Row", "RowList", "shrink_to_fit"]

CURSOR_MARK = "▸"


@dataclass(frozen=True)
class Col:
    """A column: title, width in cells (0: takes the room left), alignment."""

    title: str
    width: int = 0
    align: str = "left"


@dataclass
class Row:
    """One row: a key the views use, its cells, and whether it is a section heading."""

    key: Hashable
    cells: Sequence[Any] | Callable[[], Sequence[Any]]  # a callable is evaluated only when drawn
    heading: bool = False

    def values(self) -> Sequence[Any]:
        return self.cells() if callable(self.cells) else self.cells


def shrink_to_fit(cells: dict[int, list[int]], room: int, floor: int = 8) -> dict[int, int]:
    """Widths for columns of cells (their display widths) within ``room``: each column starts at its widest cell;
    while they do not fit, the column where one cell less cuts the fewest cells gives way (the widest on a tie),
    never below ``floor`` (or its widest cell, when narrower)."""
    ordered = {i: sorted(c) for i, c in cells.items()}
    want = {i: c[-1] for i, c in ordered.items()}
    low = {i: min(floor, want[i]) for i in cells}
    while sum(want.values()) > room:
        movable = [i for i in cells if want[i] > low[i]]
        if not movable:
            break
        i = min(movable, key=lambda k: (len(ordered[k]) - bisect_left(ordered[k], want[k]), -want[k]))
        want[i] -= 1
    return want


class RowList(ScrollView, can_focus=True):
    """A scrolling list of rows with a cursor, keyboard and mouse driven."""

    COMPONENT_CLASSES = {"rowlist--header", "rowlist--cursor", "rowlist--cursor-blur", "rowlist--heading",
                         "rowlist--empty"}

    DEFAULT_CSS = """
    RowList { height: 1fr; background: $surface; overflow-x: hidden; }
    RowList > .rowlist--header { text-style: bold; color: $text-muted; background: $panel; }
    RowList > .rowlist--cursor { background: $primary 45%; text-style: bold; }
    RowList > .rowlist--cursor-blur { background: $primary 18%; }
    RowList > .rowlist--heading { text-style: bold underline; color: $secondary; }
    RowList > .rowlist--empty { color: $text-muted; text-style: italic; }
    """

    BINDINGS = [
        Binding("up", "move(-1)", "Up", show=False),
        Binding("down", "move(1)", "Down", show=False),
        Binding("pageup", "page(-1)", "Page up", show=False),
        Binding("pagedown", "page(1)", "Page down", show=False),
        Binding("home", "jump(0)", "First", show=False),
        Binding("end", "jump(-1)", "Last", show=False),
        Binding("enter", "choose", "Open", show=False),
    ]

    cursor: reactive[int] = reactive(0, always_update=True)

    class Highlighted(Message):
        """The cursor moved to a row."""

        def __init__(self, rowlist: "RowList", index: int, key: Hashable) -> None:
            super().__init__()
            self.rowlist, self.index, self.key = rowlist, index, key

        @property
        def control(self) -> "RowList":
            return self.rowlist

    class Selected(Highlighted):
        """A row was chosen (Enter, or a click on the highlighted row)."""

    def __init__(self, columns: Sequence[Col], *, empty: str = "Nothing to show.", header: bool = True,
                 name: str | None = None, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(name=name, id=id, classes=classes)
        self.columns = list(columns)
        self.rows: list[Row] = []
        self.empty = empty
        self.show_header = header
        self._widths: tuple[int, list[int]] = (-1, [])
        self._lines: dict[tuple, Strip] = {}  # drawn rows, kept until the rows, width or focus change

    # -- data -----------------------------------------------------------------
    def set_columns(self, columns: Sequence[Col]) -> None:
        """Show other columns (the rows follow with :meth:`set_rows`)."""
        self.columns = list(columns)
        self._widths = (-1, [])
        self._lines.clear()
        self.refresh()

    def set_rows(self, rows: Sequence[Row], *, keep: bool = True, cursor_key: Hashable | None = None) -> None:
        """Replace the rows; the cursor stays on the same key when it is still there."""
        old = self.current_key if keep else None
        want = cursor_key if cursor_key is not None else old
        self.rows = list(rows)
        self._lines.clear()
        self._widths = (-1, [])
        index = 0
        if want is not None:
            index = next((i for i, r in enumerate(self.rows) if r.key == want and not r.heading), 0)
        self.virtual_size = Size(0, len(self.rows) + self._top)
        self.cursor = self._settle(index, 1)
        self.refresh()

    def row_line(self, index: int) -> int:
        """The line of row ``index`` within this widget's parent (for editors that float over a row)."""
        return self.region.y - (self.parent.region.y if self.parent
                                else 0) + self._top + index - int(self.scroll_offset.y)

    @property
    def _top(self) -> int:
        return 1 if self.show_header else 0

    @property
    def current_key(self) -> Hashable | None:
        if 0 <= self.cursor < len(self.rows) and not self.rows[self.cursor].heading:
            return self.rows[self.cursor].key
        return None

    @property
    def keys(self) -> list[Hashable]:
        return [r.key for r in self.rows if not r.heading]

    def _settle(self, index: int, step: int) -> int:
        """The nearest selectable row from ``index`` in direction ``step`` (then the other way)."""
        n = len(self.rows)
        if n == 0:
            return 0
        index = max(0, min(n - 1, index))
        for direction in (step, -step):
            i = index
            while 0 <= i < n:
                if not self.rows[i].heading:
                    return i
                i += direction
        return index

    # -- cursor -----------------------------------------------------------------
    def watch_cursor(self, old: int, new: int) -> None:
        top = self.scroll_offset.y
        self._scroll_to_cursor()
        if self.scroll_offset.y == top and old != new:  # redraw just the two rows that changed
            width = self.size.width
            for index in (old, new):
                self.refresh(Region(0, index - int(top) + self._top, width, 1))
        else:
            self.refresh()
        if self.rows and 0 <= new < len(self.rows) and not self.rows[new].heading:
            self.post_message(self.Highlighted(self, new, self.rows[new].key))

    def _scroll_to_cursor(self) -> None:
        visible = max(1, self.scrollable_content_region.height - self._top)
        top = int(self.scroll_offset.y)
        if self.cursor < top:
            self.scroll_to(y=self.cursor, animate=False, immediate=True)
        elif self.cursor >= top + visible:
            self.scroll_to(y=self.cursor - visible + 1, animate=False, immediate=True)

    def on_resize(self, event: events.Resize) -> None:
        self._lines.clear()
        self.virtual_size = Size(0, len(self.rows) + self._top)
        self._scroll_to_cursor()

    def action_move(self, step: int) -> None:
        if self.rows:
            self.cursor = self._settle(self.cursor + step, step)

    def action_page(self, step: int) -> None:
        if self.rows:
            page = max(1, self.scrollable_content_region.height - self._top - 1)
            self.cursor = self._settle(self.cursor + step * page, step)

    def action_jump(self, where: int) -> None:
        if self.rows:
            self.cursor = self._settle(len(self.rows) - 1 if where < 0 else 0, 1 if where >= 0 else -1)

    def action_choose(self) -> None:
        key = self.current_key
        if key is not None:
            self.post_message(self.Selected(self, self.cursor, key))

    def on_click(self, event: events.Click) -> None:
        offset = event.get_content_offset(self)
        if offset is None:
            return
        index = int(self.scroll_offset.y) + offset.y - self._top
        if offset.y < self._top or not 0 <= index < len(self.rows) or self.rows[index].heading:
            return
        if index == self.cursor or event.chain >= 2:
            self.cursor = index
            self.action_choose()
        else:
            self.cursor = index

    # -- drawing -----------------------------------------------------------------
    #: Rows measured for the widths of the flexible columns (the first ones: a long list costs no more).
    MEASURED = 300

    def widths(self, total: int) -> list[int]:
        """Column widths for a total width: fixed columns as given, the flexible ones share the rest by need.

        Each flexible column wants the display width of its widest cell among the first rows (wide characters
        count two). When all wants fit, the room left goes to the last flexible column; when they do not, the
        columns give way one cell at a time, each time the one where the fewest cells get cut (the widest on a
        tie): a long column of one odd name shrinks before a column whose every cell is long, and a cell is cut
        (with an ellipsis) only after the other columns shrank as far as they could.
        """
        if self._widths[0] == total:
            return self._widths[1]
        gaps = len(self.columns)  # one cell before each column (the first holds the cursor mark)
        fixed = sum(c.width for c in self.columns)
        flex = [i for i, c in enumerate(self.columns) if c.width == 0]
        room = max(0, total - fixed - gaps)
        out = [c.width for c in self.columns]
        if flex:
            cells: dict[int, list[int]] = {i: [len(self.columns[i].title)] for i in flex}
            for row in self.rows[: self.MEASURED]:
                if row.heading:
                    continue
                values = row.values()
                for i in flex:
                    if i < len(values):
                        cells[i].append(safe(values[i], one_line=True).cell_len)
            want = shrink_to_fit({i: c for i, c in cells.items()}, room, floor=8)
            for i in flex:
                out[i] = want[i]
            out[flex[-1]] += max(0, room - sum(want.values()))
        self._widths = (total, out)
        return out

    def _line(self, cells: Sequence[Any], widths: list[int], mark: str) -> Text:
        line = Text(no_wrap=True, overflow="ellipsis")
        for n, (col, w, cell) in enumerate(zip(self.columns, widths, cells)):
            line.append(mark if n == 0 else " ")
            if w <= 0:
                continue
            t = safe(cell, one_line=True).copy()
            t.no_wrap = True
            if t.cell_len > w:
                t.truncate(w, overflow="ellipsis")
            elif col.align == "right":
                t = Text(" " * (w - t.cell_len)) + t
            else:
                t.pad_right(w - t.cell_len)
            line.append_text(t)
        return line

    def _strip(self, text: Text, width: int, style: Style) -> Strip:
        segments = list(text.render(self.app.console))
        return Strip(segments).crop_extend(0, width, style).apply_style(style)

    def render_line(self, y: int) -> Strip:
        width = self.scrollable_content_region.width
        base = self.rich_style
        widths = self.widths(width)
        if y < self._top:
            header = self._line([c.title for c in self.columns], widths, " ")
            return self._strip(header, width, base + self.get_component_rich_style("rowlist--header"))
        index = int(self.scroll_offset.y) + y - self._top
        if not self.rows:
            if y == self._top:
                return self._strip(Text(" ") + safe(self.empty, one_line=True), width, base
                                   + self.get_component_rich_style("rowlist--empty"))
            return Strip.blank(width, base)
        if index >= len(self.rows):
            return Strip.blank(width, base)
        at_cursor = index == self.cursor
        key = (index, at_cursor, at_cursor and self.has_focus, width)
        cached = self._lines.get(key)
        if cached is not None:
            return cached
        if len(self._lines) > 2000:
            self._lines.clear()
        self._lines[key] = strip = self._draw(self.rows[index], at_cursor, width, widths, base)
        return strip

    def _draw(self, row: Row, at_cursor: bool, width: int, widths: list[int], base: Style) -> Strip:
        if row.heading:
            first = row.values()[0]
            text = Text(" ") + safe(first, one_line=True)
            return self._strip(text, width, base + self.get_component_rich_style("rowlist--heading"))
        text = self._line(row.values(), widths, CURSOR_MARK if at_cursor else " ")
        if at_cursor:
            cls = "rowlist--cursor" if self.has_focus else "rowlist--cursor-blur"
            style = self.get_component_rich_style(cls)
            text.stylize(style)
            return Strip(list(Segment.apply_style(text.render(self.app.console),
                                                  base))).crop_extend(0, width, base + style)
        return self._strip(text, width, base)

    def on_focus(self) -> None:
        self.refresh()

    def on_blur(self) -> None:
        self.refresh()

    def notify_style_update(self) -> None:
        self._lines.clear()
        super().notify_style_update()
