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
from typing import TYPE_CHECKING, Any, Iterable, Sequence

import click

from ..safetext import json_escape, shown

if TYPE_CHECKING:  # the workspace (and numpy, the analysis...) loads when a command runs, never for --help
    from ..evidence.network import AsOf, Network
    from ..workspace import Workspace


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


def emit_json(data: Any) -> None:
    """Print one JSON document on stdout (controls beyond JSON's own escaped as ``\\uXXXX``)."""
    click.echo(json_escape(json.dumps(data, ensure_ascii=False, indent=2, sort_keys=False)))


def note(text: str) -> None:
    """A diagnostic or progress line on stderr."""
    echo(text, err=True)


def clip(text: str, width: int) -> str:
    text = " ".join(shown(text, one_line=True).split())
    return text if len(text) <= width else text[: max(0, width - 1)] + "…"


def table(headers: Sequence[str], rows: Iterable[Sequence[Any]], widths: Sequence[int] | None = None) -> str:
    """A plain aligned text table that fits the terminal (last column takes the rest)."""
    rows = [[" ".join(shown(c, one_line=True).split()) if c is not None else "" for c in r] for r in rows]
    total = shutil.get_terminal_size((100, 24)).columns
    if widths is None:
        widths = [max([len(h)] + [len(r[i]) for r in rows]) for i, h in enumerate(headers)]
        fixed = sum(widths[:-1]) + 2 * (len(widths) - 1)
        widths = list(widths[:-1]) + [max(10, min(widths[-1], total - fixed))]
    lines = ["  ".join(clip(h, w).ljust(w) for h, w in zip(headers, widths)).rstrip()]
    lines.append("  ".join("-" * w for w in widths))
    for r in rows:
        lines.append("  ".join(clip(c, w).ljust(w) for c, w in zip(r, widths)).rstrip())
    return "\n".join(lines)


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
