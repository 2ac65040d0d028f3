"""Helpers shared by the CLI commands: the workspace of this run, JSON, tables, stderr notes, common options.

Every line the CLI prints goes through :func:`echo` (or :func:`note`,
:func:`table`, :func:`emit_json`, :func:`confirm`), which pass the text through
:func:`mynet.safetext.shown`: a name or a file name holding a terminal escape
sequence is shown, never obeyed. ``tests/test_hostile.py`` checks that no other
module of the CLI prints by itself.
"""

from __future__ import annotations

import json
import shutil
from bisect import bisect_left
from typing import TYPE_CHECKING, Any, Iterable, Sequence

import click

from ..lazy import lazy_module
from ..safetext import json_escape, shown

if TYPE_CHECKING:  # the workspace (and numpy, the analysis...) loads when a command runs, never for --help
    from ..evidence.network import AsOf, Network
    from ..workspace import Workspace


rich_cells = lazy_module("rich.cells")  # display widths (wide characters count two), loaded by the first table


class Ctx:
    """Per-invocation state: the workspace path (``--workspace``) and the workspace, opened on first use."""

    def __init__(self, path: str | None, *, progress: bool | None = None):
        self.path = path
        self.progress = progress
        self._workspace: Workspace | None = None

    def workspace(self, *, create: bool = True) -> Workspace:
        if self._workspace is None:
            from ..workspace import open_workspace

            self._workspace = open_workspace(self.path, create=create)
            ctx = click.get_current_context()
            ctx.call_on_close(self._workspace.close)
            if self.progress or (self.progress is None and click.get_text_stream("stderr").isatty()):
                bar = StepBar()
                self._workspace.progress = bar
                ctx.call_on_close(bar.close)
        return self._workspace


class StepBar:
    """The steps of a fresh analysis on stderr: a bar naming the step on a terminal, else one line per step.

    Nothing shows when the analysis comes from the workspace. stdout (``--json``) is never touched.
    """

    def __init__(self) -> None:
        self.bar: Any = None
        self.task: Any = None
        self.lines = not click.get_text_stream("stderr").isatty()

    def __call__(self, step: str) -> None:
        from ..analysis.snapshot import DONE, STEPS

        if step == DONE:
            self.close()
            return
        if self.lines:
            note(f"analysis: {step} ({STEPS.index(step) + 1 if step in STEPS else '?'}/{len(STEPS)})")
            return
        if self.bar is None:
            from rich.console import Console
            from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

            self.bar = Progress(TextColumn("analysis"), BarColumn(), TextColumn("{task.fields[step]}"),
                                TimeElapsedColumn(), console=Console(stderr=True), transient=True)
            self.bar.start()
            self.task = self.bar.add_task("analysis", total=len(STEPS), step="")
        else:
            self.bar.advance(self.task)
        self.bar.update(self.task, step=shown(step, one_line=True))

    def close(self) -> None:
        if self.bar is not None:
            self.bar.stop()
            self.bar = None


def echo(text: Any = "", *, nl: bool = True, err: bool = False) -> None:
    """Print text (stdout, or stderr with ``err``), control characters shown, never obeyed."""
    click.echo(shown(text), nl=nl, err=err)


def confirm(question: str) -> None:
    """Ask yes/no on the terminal (the question shown safely); "no" aborts."""
    click.confirm(shown(question, one_line=True), abort=True)


def prompt(question: str) -> str:
    """Ask for a line of text on the terminal (the question shown safely)."""
    return click.prompt(shown(question, one_line=True))


def emit_json(data: Any) -> None:
    """Print one JSON document on stdout (controls beyond JSON's own escaped as ``\\uXXXX``)."""
    click.echo(json_escape(json.dumps(data, ensure_ascii=False, indent=2, sort_keys=False)))


def note(text: str) -> None:
    """A diagnostic or progress line on stderr."""
    echo(text, err=True)


def cells(text: str) -> int:
    """The display width of ``text`` in terminal cells (wide characters count two; plain ASCII is its length)."""
    return len(text) if text.isascii() else rich_cells.cell_len(text)


def clip(text: str, width: int) -> str:
    """``text`` on one line in at most ``width`` terminal cells (wide characters count two), ``…`` when cut."""
    return _clip(" ".join(shown(text, one_line=True).split()), width)


def _clip(text: str, width: int) -> str:
    if cells(text) <= width:
        return text
    return rich_cells.set_cell_size(text, max(0, width - 1)).rstrip() + "…" if width > 0 else ""


def pad(text: str, width: int) -> str:
    """``text`` padded with spaces to ``width`` terminal cells."""
    return text + " " * max(0, width - cells(text))


def fit_widths(natural: Sequence[int], total: int, floors: Sequence[int],
               cells: Sequence[Sequence[int]] | None = None) -> list[int]:
    """Column widths within ``total`` cells, giving way one cell at a time.

    With ``cells`` (each column's cell widths) the column where one cell less cuts the fewest cells gives way
    (the widest on a tie), so one odd long name shrinks before a column whose every cell is long; without, the
    widest column. No column shrinks below its floor (its header, at most 12 cells), so an ellipsis only ever
    shows after the other columns gave up what they could.
    """
    widths = list(natural)
    excess = sum(widths) + 2 * (len(widths) - 1) - total
    ordered = [sorted(c) for c in cells] if cells is not None else None

    def cut(k: int) -> int:  # how many cells of column k one cell less would cut
        assert ordered is not None
        return len(ordered[k]) - bisect_left(ordered[k], widths[k])

    while excess > 0:
        movable = [k for k in range(len(widths)) if widths[k] > floors[k]]
        if not movable:
            break
        i = max(movable, key=lambda k: widths[k]) if ordered is None else \
            min(movable, key=lambda k: (cut(k), -widths[k]))
        widths[i] -= 1
        excess -= 1
    return widths


def table(headers: Sequence[str], rows: Iterable[Sequence[Any]], widths: Sequence[int] | None = None) -> str:
    """A plain aligned text table that fits the terminal, measured in terminal cells (wide characters count two).

    When the rows are wider than the terminal, a header of several words wraps onto a second line first; then
    the columns give way one cell at a time, the one where the fewest cells get cut first (see
    :func:`fit_widths`), never below their floor: a short column (an id, a number, a date: ten cells or less)
    is never cut, a longer one not below ten cells. The last column wraps onto lines of its own instead of being
    cut. So a cell is cut with ``…`` only after every other column gave up what it could.
    """
    rows = [[" ".join(shown(c, one_line=True).split()) if c is not None else "" for c in r] for r in rows]
    total = shutil.get_terminal_size((100, 24)).columns
    if widths is None:
        data = [[cells(r[i]) for r in rows] or [0] for i in range(len(headers))]
        words = [max((cells(w) for w in h.split()), default=0) for h in headers]
        natural = [max(max(d), cells(h)) for d, h in zip(data, headers)]
        floors = [max(words[i], min(max(data[i]), 10)) for i in range(len(headers))]
        # the last column wraps rather than being cut: it may give way first, down to what is left
        floors[-1] = max(words[-1], min(24, max(data[-1])))
        needed = [max(max(d), w) for d, w in zip(data, words)]
        widths = fit_widths(natural, total, needed)  # first: headers wrap onto a second line
        if sum(widths) + 2 * (len(widths) - 1) > total:
            widths = fit_widths(widths, total, floors, [*data[:-1], [0]])
    head = [wrap_cells(h, w) for h, w in zip(headers, widths)]
    depth = max(len(h) for h in head)
    lines = ["  ".join(pad(h[k] if k < len(h) else "", w) for h, w in zip(head, widths)).rstrip()
             for k in range(depth)]
    lines.append("  ".join("-" * w for w in widths))
    indent = sum(widths[:-1]) + 2 * (len(widths) - 1)
    for r in rows:
        last = wrap_cells(r[-1], widths[-1]) if r else [""]
        lines.append("  ".join([*(pad(_clip(c, w), w) for c, w in zip(r[:-1], widths[:-1])), last[0]]).rstrip())
        lines.extend(" " * indent + more for more in last[1:])
    return "\n".join(lines)


def wrap_cells(text: str, width: int) -> list[str]:
    """``text`` in lines of at most ``width`` cells, broken between words; a word longer than a line (an
    address) is broken inside, so nothing is cut."""
    lines: list[str] = []
    line = ""
    for word in text.split():
        joined = f"{line} {word}" if line else word
        if cells(joined) <= width:
            line = joined
            continue
        if line:
            lines.append(line)
        line = word
        while cells(line) > width > 0:
            head = rich_cells.set_cell_size(line, width).rstrip()
            head = head if cells(head) <= width and head else line[:1]
            lines.append(head)
            line = line[len(head):]
    return [*lines, line] if line or not lines else lines


json_option = click.option("--json", "as_json", is_flag=True, help="Print one JSON document on stdout.")


def _check_day(ctx, param, value):
    from datetime import date

    if value is None:
        return None
    try:
        date.fromisoformat(value.strip())
    except ValueError:
        raise click.BadParameter(f"{value!r} is not a date written YYYY-MM-DD") from None
    return value.strip()


as_of_option = click.option(
    "--as-of", "as_of", metavar="YYYY-MM-DD", default=None, callback=_check_day,
    help="Look from this day: meetings and mail after it are left out and warmth is measured on it "
         "(default today, or your newest interaction when that is more than a year old).")


def when(ws: Workspace, as_of: str | None) -> AsOf:
    """The day to analyse at (see :meth:`Workspace.as_of`); says so on stderr when mynet chose it."""
    chosen = ws.as_of(as_of)
    if chosen.note:
        note(chosen.note)
    return chosen


def load_net(ws: Workspace, as_of: str | None) -> Network:
    """The network at the day asked for (or chosen), with the one-line note on stderr."""
    return ws.network(when(ws, as_of))


def plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def confirm_or_refuse(question: str) -> None:
    """Ask on a terminal; without one, refuse clearly (add --yes) instead of waiting or aborting oddly."""
    import sys

    from ..errors import MynetError

    if not sys.stdin.isatty():
        raise MynetError("this changes your workspace for good; run it in a terminal to confirm, or add --yes")
    confirm(question)
