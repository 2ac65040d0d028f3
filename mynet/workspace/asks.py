"""Your targets and asks: whom you want to reach, whom you asked for an introduction, and how it went.

Targets and asks are your decisions (kept across re-imports, removed with the
person by ``forget``). Closing an ask as *introduced* warms your tie to the
person you met and to the one who helped (:mod:`mynet.evidence.introductions`);
a recent open or declined ask makes reach and the plan prefer other first
people; a declined ask rules its helper out for that target.
"""

from __future__ import annotations

import csv
import io
from datetime import date, timedelta
from pathlib import Path
from typing import Any

from ..analysis.intro_routes import Targets, resolve_targets
from ..errors import InputError, MynetError, NotFoundError
from ..evidence.introductions import OUTCOMES, AskModel
from ..evidence.network import Network, anchor_key, contact_of_key
from ..people.normalise import fold_text
from ..store import Store

__all__ = ["KINDS", "add_target", "read_target_file", "remove_target", "target_row", "resolve_target_row",
           "find_target", "record_ask", "ask_rows", "close_ask", "hold_backs", "ask_model"]

#: The kinds of target and the option that names each (``mynet targets add --org`` ...).
KINDS = {"person": "to", "organisation": "org", "tag": "tag", "domain": "domain"}


def ask_model(store: Store) -> AskModel:
    """The settings of the ``asks`` group."""
    return AskModel.from_settings(store.setting("asks", {}))


def _label(store: Store, row: dict[str, Any], cmap: dict[str, int] | None = None) -> str:
    if row["kind"] == "person":
        cid = contact_of_key(cmap if cmap is not None else store.contact_map(), row["anchor"])
        c = store.contact(cid) if cid is not None else None
        return c.name if c else "(a person no longer in your contacts)"
    return row["query"]


def target_row(store: Store, row: dict[str, Any], cmap: dict[str, int] | None = None) -> dict[str, Any]:
    """A stored target as a plain row: id, kind, label, query, contact (a person target's id), added."""
    cmap = cmap if cmap is not None else store.contact_map()
    cid = contact_of_key(cmap, row["anchor"]) if row["kind"] == "person" else None
    return {"id": row["id"], "kind": row["kind"], "label": _label(store, row, cmap), "query": row["query"],
            "contact": cid, "added": row["created_at"][:10]}


def resolve_target_row(net: Network, store: Store, row: dict[str, Any], cmap: dict[str, int]) -> Targets:
    """The contacts a stored target stands for today (no members when nobody matches any more)."""
    if row["kind"] == "person":
        cid = contact_of_key(cmap, row["anchor"])
        if cid is None or cid not in net.by_id:
            return Targets("person", row["anchor"], [])
        return Targets("person", net.name(cid), [cid], [net.name(cid)])
    try:
        return resolve_targets(net, **{KINDS[row["kind"]]: row["query"]})
    except NotFoundError:
        return Targets(row["kind"], row["query"], [])


def add_target(store: Store, net: Network, kind: str, text: str, find_contact) -> tuple[dict[str, Any], bool]:
    """Keep a target (or find the same one kept before); returns its row and whether it is new.

    Raises
    ------
    NotFoundError, AmbiguousError
        When nobody matches (a person, an organisation, a tag or a domain nobody has).
    MynetError
        For an unknown kind or empty text.
    """
    if kind not in KINDS:
        raise MynetError(f"a target is one of {', '.join(KINDS)}, not {kind!r}")
    text = " ".join(str(text).split())
    if not text:
        raise MynetError("say which target: the text is empty")
    if kind == "person":
        contact = find_contact(text)
        anchor, query = anchor_key(store, contact.id), ""
    else:
        resolve_targets(net, **{KINDS[kind]: text})  # raises NotFoundError when nobody matches
        anchor, query = "", text
    cmap = store.contact_map()
    for row in store.targets():
        if row["kind"] != kind:
            continue
        if (kind == "person" and contact_of_key(cmap, row["anchor"]) == contact_of_key(cmap, anchor)) or (
                kind != "person" and fold_text(row["query"]) == fold_text(query)):
            return target_row(store, row, cmap), False
    tid = store.add_target(kind, query, anchor)
    return target_row(store, next(r for r in store.targets() if r["id"] == tid)), True


def read_target_file(path: str | Path, column: str | None = None) -> list[str]:
    """The targets named in a file: one per line, or the values of one column of a CSV file.

    Blank lines and lines starting with ``#`` are left out; so are repeated values.

    Raises
    ------
    InputError
        When the file cannot be read, or the column is not in its header.
    """
    p = Path(path)
    try:
        text = p.read_bytes().decode("utf-8-sig", errors="replace")
    except OSError as exc:
        raise InputError(str(p), f"cannot read it ({exc.strerror or exc})") from exc
    values: list[str] = []
    if column is not None:
        reader = csv.DictReader(io.StringIO(text))
        header = reader.fieldnames or []
        match = next((h for h in header if fold_text(h) == fold_text(column)), None)
        if match is None:
            raise InputError(str(p), f"no column {column!r} (the header has: {', '.join(header) or 'nothing'})")
        values = [row.get(match) or "" for row in reader]
    else:
        values = text.splitlines()
    out: list[str] = []
    seen = set()
    for v in values:
        v = " ".join(v.split())
        if v and not v.startswith("#") and fold_text(v) not in seen:
            seen.add(fold_text(v))
            out.append(v)
    return out


def find_target(store: Store, ref: str | int) -> dict[str, Any]:
    """A kept target by its id (``3`` or ``#3``) or its name, as a stored row.

    Raises
    ------
    NotFoundError
        When no kept target matches (the message lists them).
    """
    text = str(ref).strip().lstrip("#")
    rows = store.targets()
    if text.isdigit():
        for row in rows:
            if row["id"] == int(text):
                return row
    cmap = store.contact_map()
    hits = [r for r in rows if fold_text(_label(store, r, cmap)) == fold_text(text) or
            (r["query"] and fold_text(r["query"]) == fold_text(text))]
    if len(hits) == 1:
        return hits[0]
    if hits:
        raise NotFoundError(f"{ref!r} names several targets: " + ", ".join(f"#{r['id']}" for r in hits))
    known = ", ".join(f"#{r['id']} {_label(store, r, cmap)}" for r in rows[:8])
    raise NotFoundError(f"no target {ref!r}" + (f" (your targets: {known})" if known else
                                               " (you have none yet: mynet targets add --org NAME)"))


def remove_target(store: Store, ref: str | int) -> dict[str, Any]:
    """Remove a kept target and the asks about it; returns the target as it was."""
    row = find_target(store, ref)
    out = target_row(store, row)
    store.delete_target(row["id"])
    return out


def _day(on: date | str | None) -> date:
    if on is None:
        return date.today()
    if isinstance(on, date):
        return on
    try:
        return date.fromisoformat(str(on).strip())
    except ValueError:
        raise MynetError(f"{on!r} is not a date written YYYY-MM-DD") from None


def record_ask(store: Store, via_id: int, target_id: int, *, note: str = "", on: date | str | None = None) -> int:
    """Keep an ask: you asked contact ``via_id`` on ``on`` (default today) for an introduction to a target."""
    day = _day(on)
    return store.add_ask(target_id, anchor_key(store, via_id), day.isoformat(), " ".join(note.split()))


def ask_rows(store: Store, *, include_closed: bool = False, today: date | None = None) -> list[dict[str, Any]]:
    """Asks as rows: id, via, via_name, target, target_label, asked_on, days_waiting, follow_up_on, due,
    note, outcome, closed_on, person, person_name; open ones only unless ``include_closed``."""
    today = today or date.today()
    model = ask_model(store)
    cmap = store.contact_map()
    targets = {r["id"]: r for r in store.targets()}
    out = []
    for a in store.asks():
        if a["outcome"] and not include_closed:
            continue
        via = contact_of_key(cmap, a["via"])
        person = contact_of_key(cmap, a["person"]) if a["person"] else None
        asked = date.fromisoformat(a["asked_on"][:10])
        end = date.fromisoformat(a["closed_on"][:10]) if a["closed_on"] else today
        follow = asked + timedelta(days=model.follow_up_days)
        vc = store.contact(via) if via is not None else None
        pc = store.contact(person) if person is not None else None
        t = targets.get(a["target_id"])
        out.append({"id": a["id"], "via": via, "via_name": vc.name if vc else "", "target": a["target_id"],
                    "target_label": _label(store, t, cmap) if t else "", "asked_on": asked.isoformat(),
                    "days_waiting": max(0, (end - asked).days), "follow_up_on": follow.isoformat(),
                    "due": not a["outcome"] and today >= follow, "note": a["note"], "outcome": a["outcome"],
                    "closed_on": a["closed_on"], "person": person, "person_name": pc.name if pc else ""})
    return out


def close_ask(store: Store, ask_id: int, outcome: str, *, person_id: int | None = None,
              on: date | str | None = None) -> None:
    """Give an ask its outcome; ``introduced`` to an organisation, tag or domain needs ``person_id``.

    Raises
    ------
    NotFoundError
        When there is no such ask.
    MynetError
        For an unknown outcome, or an introduction to a group of people without saying whom you met.
    """
    if outcome not in OUTCOMES:
        raise MynetError(f"an ask's outcome is one of {', '.join(OUTCOMES)}, not {outcome!r}")
    rows = {a["id"]: a for a in store.asks()}
    if ask_id not in rows:
        raise NotFoundError(f"no ask #{ask_id} (see: mynet asks --all)")
    target = next((t for t in store.targets() if t["id"] == rows[ask_id]["target_id"]), None)
    person = ""
    if person_id is not None:
        person = anchor_key(store, person_id)
    elif outcome == "introduced" and target is not None and target["kind"] != "person":
        raise MynetError(f"ask #{ask_id} is about {target['query']!r}, not one person: say whom you were introduced "
                         "to (--person NAME)")
    day = _day(on)
    if day < date.fromisoformat(rows[ask_id]["asked_on"][:10]):
        raise MynetError(f"ask #{ask_id} was made on {rows[ask_id]['asked_on']}: it cannot be closed before that")
    store.close_ask(ask_id, outcome, day.isoformat(), person)


def hold_backs(store: Store, *, today: date | None = None) -> tuple[dict[int, dict[str, Any]], dict[int, set[int]]]:
    """Who is asked recently, and who declined which target.

    Returns
    -------
    (dict, dict)
        Contact id -> ``{"factor", "ask", "asked_on", "state", "target_label"}`` for everyone with an
        open ask, or a declined one, made within ``asks.recent_days`` (their newest such ask); and
        target id -> contact ids who declined an introduction to it (any time).
    """
    today = today or date.today()
    model = ask_model(store)
    held: dict[int, dict[str, Any]] = {}
    declined: dict[int, set[int]] = {}
    for a in ask_rows(store, include_closed=True, today=today):
        if a["via"] is None:
            continue
        if a["outcome"] == "declined":
            declined.setdefault(a["target"], set()).add(a["via"])
        if a["outcome"] not in ("", "declined"):
            continue
        age = (today - date.fromisoformat(a["asked_on"])).days
        if 0 <= age <= model.recent_days:
            held[a["via"]] = {"factor": model.hold_back, "ask": a["id"], "asked_on": a["asked_on"],
                              "state": "declined" if a["outcome"] else "open", "target_label": a["target_label"],
                              "name": a["via_name"]}
    return held, declined
