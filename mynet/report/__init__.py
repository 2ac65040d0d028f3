"""The report: one self-contained HTML file (or Markdown with SVG pictures) about your network.

``write_report(ws, "network.html")`` gathers the audit findings, a picture
of the network, charts of groups, time and warmth, the top brokers and
bridges and the intro opportunities (:mod:`mynet.report.data`), draws the
pictures (:mod:`mynet.report.charts`) and writes the page
(:mod:`mynet.report.html`) or the Markdown and its picture folder
(:mod:`mynet.report.markdown`). Files are created owner-only (0600, folders
0700). With ``redact=True`` everything is built from pseudonyms
(:mod:`mynet.report.redact`) and the finished text is checked once more for
the original addresses, phones and full names before it is written.
"""

from __future__ import annotations

import html as _html
import os
from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING, Any, Callable, Iterable

from ..errors import MynetError
from .files import MAX_CONTACTS_DRAWN, STEPS, private_dir, write_private

if TYPE_CHECKING:  # loaded when a report is written: ``mynet --help`` reads only the constants above
    from ..workspace import Workspace
    from .redact import Pseudonyms

__all__ = ["write_report", "collect", "ReportData", "STEPS", "MAX_CONTACTS_DRAWN", "RedactionError", "check_redacted"]


def __getattr__(name: str) -> Any:
    """``collect`` and ``ReportData`` load on first use (with the analysis they need)."""
    if name in ("collect", "ReportData"):
        from . import data

        return getattr(data, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


class RedactionError(MynetError):
    """A redacted output still holds an original value (nothing was written)."""


def check_redacted(texts: Iterable[str], ps: Pseudonyms | None) -> None:
    """Raise :class:`RedactionError` when any text holds one of the identifiers ``ps`` replaced.

    Texts are checked as written and with HTML/XML entities resolved.
    """
    if ps is None:
        return
    from .redact import find_leaks

    for text in texts:
        for t in (text, _html.unescape(text)):
            leaks = find_leaks(t, ps.identifiers)
            if leaks:
                raise RedactionError(f"the redacted output would still hold {len(leaks)} original value(s); nothing "
                                     f"was written")


def write_report(
    ws: Workspace,
    path: str | os.PathLike,
    *,
    markdown: bool = False,
    redact: bool = False,
    today: date | None = None,
    seed: int = 0,
    max_contacts: int = MAX_CONTACTS_DRAWN,
    progress: Callable[[str], None] | None = None,
    as_of: date | str | None = None,
) -> Path:
    """Write the report on the workspace to ``path`` and return the path.

    Parameters
    ----------
    ws : Workspace
    path : path-like
        The HTML file, or with ``markdown`` the ``.md`` file; its pictures then
        go to the folder ``<stem>_files`` beside it.
    markdown : bool, default False
    redact : bool, default False
        Names, organisations, addresses, phones, notes, tags and places replaced
        by consistent pseudonyms.
    today : date, optional
        The report's date (warmth and dormancy depend on it).
    seed : int, default 0
        Seed of the picture's layout.
    max_contacts : int, default 2000
        Above this many contacts the picture is the map of groups (the report says so).
    progress : callable, optional
        Called with each step's name (``STEPS``) as it starts.
    as_of : date or str, optional
        See the network from this day (see :func:`mynet.evidence.network.resolve_as_of`).

    Raises
    ------
    RedactionError
        With ``redact``, when an original identifier would remain (nothing is written).
    MynetError
        When a file cannot be written.
    """
    step = progress or (lambda _s: None)
    out = Path(path)
    if out.parent and not out.parent.is_dir():
        raise MynetError(f"cannot write {out}: the folder {out.parent} does not exist")
    from .data import collect

    d = collect(ws, redact=redact, today=today, max_contacts=max_contacts, progress=step, as_of=as_of)
    step("picture")
    from . import charts

    pictures = {"network": charts.network_svg(d, seed=seed)}
    step("charts")
    pictures |= {"groups": charts.groups_svg(d), "time": charts.timeline_svg(d), "tiers": charts.tiers_svg(d),
                 "targets": charts.targets_svg(d)}
    step("write")
    if not markdown:
        from .html import render_html

        text = render_html(d, pictures)
        check_redacted([text], d.pseudonyms if redact else None)
        write_private(out, text)
        return out
    from .markdown import IMAGE_NAMES, render_markdown

    folder = out.with_name(out.stem + "_files")
    files = {IMAGE_NAMES["network"]: pictures["network"][0], IMAGE_NAMES["groups"]: pictures["groups"],
             IMAGE_NAMES["tiers"]: pictures["tiers"]}
    if pictures["time"]:
        files[IMAGE_NAMES["time"]] = pictures["time"]
    if pictures["targets"]:
        files[IMAGE_NAMES["targets"]] = pictures["targets"]
    text = render_markdown(d, {"network": pictures["network"][1]}, folder.name, has_time=bool(pictures["time"]))
    check_redacted([text, *files.values()], d.pseudonyms if redact else None)
    private_dir(folder)
    for name, svg in files.items():
        write_private(folder / name, svg)
    for key in ("time", "targets"):
        stale = folder / IMAGE_NAMES[key]
        if not pictures[key] and stale.exists():
            stale.unlink()
    write_private(out, text)
    return out
