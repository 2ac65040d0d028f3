"""Forgetting: remove a person or a source from the workspace completely.

After :func:`forget_contact` or :func:`remove_source` no byte of the removed
data is left in the SQLite file: rows are deleted with ``secure_delete`` on,
every cache is dropped (it is derived and is recomputed), the write-ahead log
is checkpointed and truncated, and the file is vacuumed, which rewrites it
without free pages.

A forgotten person stays forgotten: a salted hash of each of their e-mail
addresses, phone numbers and names is kept (never the values themselves), and
a later import leaves out records that match one (:mod:`mynet.people.forgotten`).
"""

from __future__ import annotations

import json
from typing import Iterable

from ..errors import NotFoundError
from ..people.forgotten import remember_forgotten
from ..people.refresh import refresh_contacts
from ..store import Store

__all__ = ["forget_contact", "remove_source", "compact", "ForgetReport", "remember_written", "written_files",
           "PrivacyMixin"]

#: Meta key listing the reports and exports written from this workspace (paths only, no content).
WRITTEN_KEY = "written_files"
MAX_WRITTEN = 100


def remember_written(store: Store, paths: Iterable[str]) -> None:
    """Note where a report or an export was written, so that forgetting someone can name the files.

    Files outside the workspace cannot be cleaned by mynet; the list lets
    :func:`written_files` say which ones may still hold a forgotten person.
    Nothing is noted on a read-only workspace.
    """
    if store.read_only:
        return
    old = [p for p in json.loads(store.meta(WRITTEN_KEY, "[]") or "[]") if p not in set(map(str, paths))]
    new = (old + [str(p) for p in paths])[-MAX_WRITTEN:]
    store.set_meta(WRITTEN_KEY, json.dumps(new))


def written_files(store: Store) -> list[str]:
    """Reports and exports written from this workspace that still exist, oldest first."""
    import os

    return [p for p in json.loads(store.meta(WRITTEN_KEY, "[]") or "[]") if os.path.exists(p)]


class ForgetReport(dict):
    """What was removed (counts only: nothing personal)."""


def compact(store: Store) -> None:
    """Drop caches, truncate the write-ahead log and vacuum, so deleted rows leave no trace in the file."""
    store.compact()


def _scrub_interactions(store: Store, emails: set[str]) -> int:
    """Remove addresses (and their display names) from every stored meeting and message."""
    if not emails:
        return 0
    changed = 0
    for rid, d in store.interaction_rows():
        people = set(d.get("participants", []))
        if not people & emails and d.get("sender") not in emails and d.get("organizer") not in emails:
            continue
        d["participants"] = sorted(people - emails)
        d["names"] = {k: v for k, v in (d.get("names") or {}).items() if k not in emails}
        for key in ("sender", "organizer"):
            if d.get(key) in emails:
                d[key] = ""
        store.update_interaction(rid, d)
        changed += 1
    return changed


def _drop_from_group_state(store: Store, contact_id: int) -> None:
    """Remove a contact from the remembered group memberships and roles, keeping the group ids (and names)."""
    state = json.loads(store.meta("groups_state", "{}") or "{}")
    groups = state.get("groups", {})
    for gid, members in groups.items():
        groups[gid] = [m for m in members if m != contact_id]
    state["groups"] = groups
    state.get("roles", {}).pop(str(contact_id), None)
    store.set_meta("groups_state", json.dumps(state))


def _drop_decisions_about(store: Store, keys: Iterable[str]) -> int:
    """Remove the decisions, targets and asks naming any of ``keys``; how many rows."""
    keys = list(keys)
    n = 0
    for k in keys:
        n += store.delete_decisions_about(k)
        n += store.delete_asks_about(k)
    return n


def forget_contact(store: Store, contact_id: int) -> ForgetReport:
    """Remove a person completely: records, their addresses in meetings and mail, decisions, caches.

    Raises
    ------
    NotFoundError
        When there is no such contact.
    """
    contact = store.contact(contact_id)
    if contact is None:
        raise NotFoundError(f"no contact with id {contact_id}")
    rows = store.records_by_id(contact.record_ids)
    # Every key that stands for them, the keys of people found in mail included (they have no record).
    keys = sorted({k for _rid, k, _s, _r in rows} | {k for k, v in store.contact_map().items() if v == contact_id})
    emails = set(contact.emails)
    with store.transaction():
        store.delete_records([rid for rid, _k, _s, _r in rows])
        store.delete_contact(contact_id)
        scrubbed = _scrub_interactions(store, emails)
        dropped = _drop_decisions_about(store, keys)
        # Every address of the person, also those only mail or calendars gave (a person found there has no record).
        remember_forgotten(store, [(rec, src["region"] or "") for _rid, _k, src, rec in rows], emails)
        _drop_from_group_state(store, contact_id)
        store.bump_data_version()
        refresh_contacts(store)
    compact(store)
    return ForgetReport(records=len(rows), interactions_scrubbed=scrubbed, decisions=dropped)


def remove_source(store: Store, path: str) -> ForgetReport:
    """Remove an imported file and everything only it supported (its records, events, messages, and the
    decisions about records that no longer exist)."""
    from pathlib import Path

    candidates = [s for s in store.sources() if s["path"] == path or s["path"] == str(Path(path).resolve())
                  or Path(s["path"]).name == path]
    if not candidates:
        raise NotFoundError(f"no imported source {path!r} (see: mynet sources)")
    if len(candidates) > 1:
        raise NotFoundError(f"{path!r} matches several sources: " + ", ".join(s["path"] for s in candidates))
    src = candidates[0]
    with store.transaction():
        n_rec, n_int = store.source_counts(src["id"])
        before = store.contact_map()
        keys_of: dict[int, list[str]] = {}
        for k, cid in sorted(before.items()):
            keys_of.setdefault(cid, []).append(k)
        store.remove_source(src["id"])
        live = store.record_keys()
        # People found in mail are keyed by their address, not by a record: their decisions stay (they are
        # kept when the refresh below still finds them in another file).
        live |= {k for k in before if k.startswith("found:")}
        dropped = moved = 0
        for row in store.decisions():
            new = {}
            gone = False
            for col in ("a", "b"):
                key = row[col]
                if key in before and key not in live:
                    # The record the decision was anchored to is gone; the person may remain through
                    # another source: anchor the decision to one of their remaining records.
                    rest = [k for k in keys_of.get(before[key], []) if k in live]
                    if rest:
                        new[col] = rest[0]
                    else:
                        gone = True
            if gone:
                dropped += store.delete_decision(row["id"])
            elif new:
                store.move_decision(row["id"], **new)
                moved += 1
        dropped += _move_ask_anchors(store, before, keys_of, live)
        store.bump_data_version()
        refresh_contacts(store)
    compact(store)
    return ForgetReport(source=src["path"], records=n_rec, interactions=n_int, decisions=dropped, decisions_kept=moved)


def _move_ask_anchors(store: Store, before: dict[str, int], keys_of: dict[int, list[str]], live: set[str]) -> int:
    """Targets and asks anchored to a record that is gone: re-anchored to the person's remaining record, else
    removed (the person is gone with the file). Returns how many rows were removed."""
    dropped = 0
    for key in sorted(store.anchors_in_asks()):
        if key not in before or key in live:
            continue
        rest = [k for k in keys_of.get(before[key], []) if k in live]
        if rest:
            store.move_anchor(key, rest[0])
        else:
            dropped += store.delete_asks_about(key)
    return dropped


class PrivacyMixin:
    """Forgetting people and files (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    def forget(self, contact_id: int) -> ForgetReport:
        """Remove a person completely (records, their addresses in meetings and mail, decisions, caches)."""
        return forget_contact(self.store, contact_id)

    def remove_source(self, path: str) -> ForgetReport:
        """Remove an imported file and everything only it supported; ``path`` as imported, or its file name."""
        return remove_source(self.store, path)

    def compact(self) -> None:
        """Drop caches and vacuum the file, so deleted rows leave no trace."""
        compact(self.store)

    def remember_written(self, paths: Iterable[str]) -> None:
        """Note files written from this workspace (reports, exports), so forgetting someone can name them."""
        remember_written(self.store, paths)

    def written_files(self) -> list[str]:
        """Reports and exports written from this workspace that still exist, oldest first."""
        return written_files(self.store)
