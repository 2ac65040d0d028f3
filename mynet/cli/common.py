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
from typing import Any, Iterable, Sequence

import click

from ..evidence.network import AsOf, Network
from ..safetext import json_escape, shown
from ..workspace import Workspace, open_workspace


class Ctx:
    """Per-invocation state: the workspace path (``--workspace``) and the workspace, opened on first use."""

    def __init__(self, path: str | None):
        self.path = path
        self._workspace: Workspace | None = None

    def workspace(self, *, create: bool = True) -> Workspace:
        if self._workspace is None:
            self._workspace = open_workspace(self.path, create=create)
            click.get_current_context().call_on_close(self._workspace.close)
        return self._workspace


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
