"""The Davis Southern Women network written as an iCalendar file, for tests.

Dataset: Davis, Gardner & Gardner (1941), *Deep South*, as shipped by networkx
(``networkx.davis_southern_women_graph()``): 18 women, 14 social events, an edge
when a woman attended an event. Here each event node becomes one VEVENT whose
ATTENDEEs are the women who attended; the e-mail addresses are invented from
the names (``"Evelyn Jefferson"`` -> ``evelyn.jefferson@davis.example``) and the
dates are invented too (one event a week from ``start``).

Reuse: ``davis_ics_bytes()`` gives the file, ``davis_expected()`` the
participant set per event UID, ``davis_email(name)`` the address of a woman.
"""

from __future__ import annotations

import datetime as dt
import re

import networkx as nx

DOMAIN = "davis.example"


def davis_graph() -> nx.Graph:
    """The bipartite women-events graph shipped by networkx."""
    return nx.davis_southern_women_graph()


def davis_email(name: str) -> str:
    """An invented address for a woman of the dataset: ``first.last@davis.example``."""
    return re.sub(r"[^a-z0-9]+", ".", name.lower()).strip(".") + "@" + DOMAIN


def davis_uid(event: str) -> str:
    return f"davis-{event.lower()}@{DOMAIN}"


def _events(graph: nx.Graph) -> list[str]:
    return sorted(graph.graph["bottom"], key=lambda e: int(e[1:]))


def _fold(line: str, width: int = 75) -> list[str]:
    """RFC 5545 section 3.1 folding: at most ``width`` octets, continuations start with a space."""
    out, rest = [line[:width]], line[width:]
    while rest:
        out.append(" " + rest[: width - 1])
        rest = rest[width - 1:]
    return out


def davis_ics_bytes(start: dt.date = dt.date(2024, 1, 8)) -> bytes:
    """One VEVENT per event node (UTC evenings, a week apart), attendees = the women."""
    graph = davis_graph()
    lines = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//mynet tests//davis//EN"]
    for i, event in enumerate(_events(graph)):
        day = start + dt.timedelta(days=7 * i)
        lines += [
            "BEGIN:VEVENT",
            f"UID:{davis_uid(event)}",
            "DTSTAMP:20240101T000000Z",
            f"DTSTART:{day:%Y%m%d}T190000Z",
            f"DTEND:{day:%Y%m%d}T220000Z",
            f"SUMMARY:Social event {event}",
        ]
        for woman in sorted(graph.neighbors(event)):
            lines += _fold(f"ATTENDEE;CUTYPE=INDIVIDUAL;PARTSTAT=ACCEPTED;CN={woman}:mailto:{davis_email(woman)}")
        lines.append("END:VEVENT")
    lines.append("END:VCALENDAR")
    return ("\r\n".join(lines) + "\r\n").encode("utf-8")


def davis_expected() -> dict[str, set[str]]:
    """Event UID -> the attendees' addresses, straight from the graph's neighbourhoods."""
    graph = davis_graph()
    return {davis_uid(e): {davis_email(w) for w in graph.neighbors(e)} for e in _events(graph)}


def davis_workspace(folder):
    """A workspace holding the women (a CSV of names and addresses) and the events (this file), imported."""
    from mynet.store import Store
    from mynet.workspace.importing import import_paths

    women = sorted(davis_graph().graph["top"])
    people = folder / "women.csv"
    people.write_text("Name,Email\n" + "".join(f"{w},{davis_email(w)}\n" for w in women), encoding="utf-8")
    cal = folder / "davis.ics"
    cal.write_bytes(davis_ics_bytes())
    store = Store(folder / "ws.sqlite")
    import_paths(store, [people, cal])
    return store
