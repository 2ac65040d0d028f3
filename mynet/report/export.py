"""The network with every computed attribute, for other tools: GraphML, CSV or JSON.

One graph (:func:`mynet.workspace.frames.network_graph`, what ``ws.graph()`` returns) is the single source
of every format:

* **GraphML** (the open XML graph format that networkx and other graph tools read) via
  :func:`networkx.write_graphml`. Node ids are contact ids; attributes are
  plain strings, integers, floats and booleans: lists are joined with
  ``"; "`` and missing values are left out.
* **CSV**: two files, ``<stem>-contacts.csv`` (one row per contact, columns
  :data:`CONTACT_COLUMNS`: ``contact_id, name, ...``) and ``<stem>-ties.csv``
  (one row per tie, columns :data:`TIE_COLUMNS`: ``contact_a, contact_b,
  name_a, name_b, strength, basis, ...``), UTF-8 with a byte-order mark (so
  spreadsheets read accents right). Safe to open in a spreadsheet, after the
  OWASP guidance on CSV injection: every *text* cell that starts with ``=``,
  ``+``, ``-``, ``@``, a tab or a carriage return gets a single quote ``'``
  in front, so it is shown as text and never run as a formula; text cells are
  quoted (embedded quotes doubled). Numeric cells (measures, counts,
  strengths) are written as numbers and left alone, so ``-0.5`` stays a
  number. Booleans are written ``true`` / ``false``.
* **JSON**: the network as one document of contacts and ties,
  ``{"network": {...}, "contacts": [...], "ties": [...]}``, each contact and
  tie an object with the same names as the CSV columns (missing values left out).

Text attributes pass through :func:`mynet.safetext.shown`, so every file is
valid whatever the workspace holds (GraphML: XML 1.0's Char production; no
raw ESC or other control character in any cell).

In GraphML the tie strength is the edge attribute ``weight`` and the name the
node attribute ``label`` (the graph's own names); CSV and JSON call them
``strength`` and ``name``. Free-text notes and web
addresses are not exported. With ``redact=True`` the graph is built from the
redacted network (see :mod:`mynet.report.redact`). Files are written
owner-only (mode 0600).
"""

from __future__ import annotations

import csv
import io
import json
import os
from datetime import date
from pathlib import Path
from typing import Any, Iterable

from ..errors import MynetError
from ..lazy import lazy_module
from ..safetext import shown
from ..workspace import Workspace
from ..workspace.frames import MEASURES_FLOAT, MEASURES_INT, network_graph
from . import check_redacted
from .files import FORMATS, write_private
from .redact import redact_analysis, redact_network

nx = lazy_module("networkx")

__all__ = ["FORMATS", "CONTACT_COLUMNS", "TIE_COLUMNS", "shown_attributes", "graphml_text", "contact_rows",
           "tie_rows", "csv_texts", "json_text", "neutralise", "csv_paths", "export_network"]

_SUFFIX = {".graphml": "graphml", ".xml": "graphml", ".csv": "csv", ".json": "json"}
_RISKY = ("=", "+", "-", "@", "\t", "\r")

#: The columns of the contacts table, each saying what it holds (README, "Export columns").
CONTACT_COLUMNS = ("contact_id", "name", "emails", "phones", "organisations", "past_organisations", "titles", "tags",
                   "places", "group_id", "group_name", "role", *MEASURES_INT, *MEASURES_FLOAT, "warmth", "warmth_tier",
                   "meetings", "messages", "last_contact")
#: The columns of the ties table.
TIE_COLUMNS = ("contact_a", "contact_b", "name_a", "name_b", "strength", "basis", "organisation", "meeting", "thread",
               "domain", "tag", "related", "meetings", "threads", "manual", "overlap", "between_groups", "group_a",
               "group_b", "evidence")
#: The graph's attribute names that the tables call otherwise.
_CONTACT_NAMES = {"label": "name", "localities": "places", "group": "group_id"}
_TIE_NAMES = {"weight": "strength", "source_group": "group_a", "target_group": "group_b"}


def shown_attributes(G: nx.Graph) -> None:
    """Every text attribute passed through :func:`mynet.safetext.shown`.

    Whatever the workspace holds, the files then carry no control character
    but tab and newline: GraphML stays well-formed XML 1.0 and no CSV or JSON
    cell can act on the terminal that shows it.
    """
    for attrs in (G.graph, *(d for _n, d in G.nodes(data=True)), *(d for _a, _b, d in G.edges(data=True))):
        for key, value in attrs.items():
            if isinstance(value, str):
                attrs[key] = shown(value)


def graphml_text(G: nx.Graph) -> str:
    """``G`` as a GraphML document."""
    buf = io.BytesIO()
    nx.write_graphml(G, buf, encoding="utf-8", infer_numeric_types=True)
    return buf.getvalue().decode("utf-8")


def neutralise(value: Any) -> Any:
    """A CSV cell made safe for spreadsheets (OWASP CSV injection guidance).

    Text starting with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return
    gets a leading ``'``; numbers are returned unchanged; ``None`` becomes an
    empty cell and booleans ``true`` / ``false``.
    """
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return value
    text = str(value)
    return "'" + text if text.startswith(_RISKY) else text


def _csv(columns: Iterable[str], rows: Iterable[dict[str, Any]]) -> str:
    buf = io.StringIO()
    columns = list(columns)
    w = csv.writer(buf, quoting=csv.QUOTE_NONNUMERIC, lineterminator="\r\n")
    w.writerow(columns)
    for r in rows:
        w.writerow([neutralise(r.get(c)) for c in columns])
    return buf.getvalue()


def contact_rows(G: nx.Graph) -> list[dict[str, Any]]:
    """One row per contact of ``G``, keyed by :data:`CONTACT_COLUMNS` (missing values left out)."""
    return [{"contact_id": n, **{_CONTACT_NAMES.get(k, k): v for k, v in d.items()}}
            for n, d in sorted(G.nodes(data=True))]


def tie_rows(G: nx.Graph) -> list[dict[str, Any]]:
    """One row per tie of ``G`` (the lower contact id first), keyed by :data:`TIE_COLUMNS`."""
    name = dict(G.nodes(data="label"))
    rows = []
    for a, b, d in sorted(G.edges(data=True), key=lambda e: (min(e[:2]), max(e[:2]))):
        row = {"contact_a": a, "contact_b": b, "name_a": name.get(a), "name_b": name.get(b)}
        row.update({_TIE_NAMES.get(k, k): v for k, v in d.items()})
        rows.append({k: v for k, v in row.items() if v is not None})
    return rows


def csv_texts(G: nx.Graph) -> tuple[str, str]:
    """(contacts, ties) CSV documents of ``G``, neutralised (see :func:`neutralise`)."""
    return _csv(CONTACT_COLUMNS, contact_rows(G)), _csv(TIE_COLUMNS, tie_rows(G))


def json_text(G: nx.Graph) -> str:
    """``G`` as one JSON document: ``{"network": ..., "contacts": [...], "ties": [...]}`` (the CSV's names)."""
    data = {"network": dict(G.graph), "contacts": contact_rows(G), "ties": tie_rows(G)}
    return json.dumps(data, ensure_ascii=False, indent=1, allow_nan=False) + "\n"


def csv_paths(path: str | os.PathLike) -> tuple[Path, Path]:
    """Where ``-o net.csv`` writes: ``net-contacts.csv`` and ``net-ties.csv`` beside it."""
    p = Path(path)
    stem = p.stem if p.suffix.lower() == ".csv" else p.name
    return p.with_name(f"{stem}-contacts.csv"), p.with_name(f"{stem}-ties.csv")


def export_network(
    ws: Workspace,
    path: str | os.PathLike,
    fmt: str | None = None,
    *,
    redact: bool = False,
    today: date | None = None,
    as_of=None,
) -> list[Path]:
    """Write the network to ``path`` in ``fmt`` (default: from the suffix) and return the files written.

    Raises
    ------
    MynetError
        For an unknown format or a folder that does not exist.
    mynet.report.RedactionError
        With ``redact``, when an original identifier would remain (nothing is written).
    """
    p = Path(path)
    fmt = (fmt or _SUFFIX.get(p.suffix.lower(), "")).lower()
    if fmt not in FORMATS:
        raise MynetError(f"say which format to write with --format ({', '.join(FORMATS)}); "
                         f"{p.name!r} does not tell by its suffix")
    if not p.parent.is_dir():
        raise MynetError(f"cannot write {p}: the folder {p.parent} does not exist")
    net = ws.network(as_of, today=today)
    analysis = ws.analysis(net)
    ps = None
    if redact:
        net, ps = redact_network(net, ws.setting("webmail_domains"))
        analysis = redact_analysis(analysis, net)
    G = network_graph(net, analysis, redacted=redact)
    shown_attributes(G)
    if fmt == "graphml":
        out = {p: graphml_text(G)}
    elif fmt == "json":
        out = {p: json_text(G)}
    else:
        out = dict(zip(csv_paths(p), csv_texts(G)))
    check_redacted(out.values(), ps)
    for target, text in out.items():
        write_private(target, ("\ufeff" + text) if fmt == "csv" else text)
    return list(out)
