"""Derived results kept in rows: the analysis per key (its head, its groups, one row per contact) and arrays as bytes.

A command reads what it shows: the groups and who is in which (``mynet groups``,
``mynet contacts``), or every contact's measures (``mynet audit``), never one
JSON document of the whole network. Each analysis carries the digest of its
inputs (``fingerprint``, see :func:`mynet.analysis.snapshot.cache_inputs`) and
a ``stamp``: the data version and day at which that digest was last found
current, so a read at the same stamp needs neither the ties nor the digest.
The meetings and threads behind the ties are indexed by contact
(``event_members``, ``event_rows``) so that ``mynet why`` reads two rows and
the events the two share. Everything here is derived:
:meth:`DerivedMixin.drop_derived` (with every cache, on ``forget`` and
``compact``) removes it.
"""

from __future__ import annotations

import json
from typing import Any, Iterable

__all__ = ["DerivedMixin"]


class DerivedMixin:
    """Reads and writes of derived rows (part of :class:`mynet.store.Store`)."""

    conn: Any
    read_only: bool

    def transaction(self):  # pragma: no cover - provided by Store
        raise NotImplementedError

    # -- the analysis ---------------------------------------------------------------
    def put_analysis(self, key: str, fingerprint: str, stamp: str, head: dict[str, Any],
                     groups: Iterable[dict[str, Any]], contacts: Iterable[tuple[int, int | None, dict[str, Any]]]
                     ) -> None:
        """Replace the analysis under ``key`` (skipped on a read-only workspace)."""
        if self.read_only:
            return
        with self.transaction():
            self._drop_analysis(key)
            self.conn.execute("INSERT INTO analyses(key, fingerprint, stamp, head) VALUES (?, ?, ?, ?)",
                              (key, fingerprint, stamp, json.dumps(head)))
            self.conn.executemany("INSERT INTO analysis_groups(key, id, rank, data) VALUES (?, ?, ?, ?)",
                                  ((key, int(g["id"]), rank, json.dumps(g)) for rank, g in enumerate(groups)))
            self.conn.executemany(
                "INSERT INTO analysis_contacts(key, contact_id, group_id, measures) VALUES (?, ?, ?, ?)",
                ((key, int(c), g, json.dumps(m)) for c, g, m in contacts))

    def _drop_analysis(self, key: str) -> None:
        for table in ("analyses", "analysis_groups", "analysis_contacts"):
            self.conn.execute(f"DELETE FROM {table} WHERE key = ?", (key,))  # noqa: S608 (fixed names)

    def analysis_stamp(self, key: str) -> tuple[str, str] | None:
        """The fingerprint and stamp of the analysis under ``key``, or None."""
        row = self.conn.execute("SELECT fingerprint, stamp FROM analyses WHERE key = ?", (key,)).fetchone()
        return (row[0], row[1]) if row else None

    def set_analysis_stamp(self, key: str, stamp: str) -> None:
        """Note that the analysis under ``key`` was found current at ``stamp``."""
        if self.read_only:
            return
        with self.transaction():
            self.conn.execute("UPDATE analyses SET stamp = ? WHERE key = ?", (stamp, key))

    def analysis_head(self, key: str) -> dict[str, Any] | None:
        """The network-level part of the analysis (modularity, bridges, summary...), or None."""
        row = self.conn.execute("SELECT head FROM analyses WHERE key = ?", (key,)).fetchone()
        return json.loads(row[0]) if row else None

    def analysis_groups(self, key: str) -> list[dict[str, Any]]:
        """The groups, in their stored order (largest first)."""
        rows = self.conn.execute("SELECT data FROM analysis_groups WHERE key = ? ORDER BY rank", (key,))
        return [json.loads(d) for (d,) in rows]

    def analysis_group_of(self, key: str, ids: Iterable[int] | None = None) -> dict[int, int | None]:
        """Contact id -> group id (None: unclustered), for ``ids`` or for everyone."""
        if ids is None:
            rows = self.conn.execute("SELECT contact_id, group_id FROM analysis_contacts WHERE key = ?", (key,))
            return dict(rows)
        out = {}
        for cid in ids:
            row = self.conn.execute("SELECT group_id FROM analysis_contacts WHERE key = ? AND contact_id = ?",
                                    (key, int(cid))).fetchone()
            if row is not None:
                out[int(cid)] = row[0]
        return out

    def analysis_measures(self, key: str) -> dict[int, dict[str, Any]]:
        """Contact id -> that contact's measures."""
        rows = self.conn.execute("SELECT contact_id, measures FROM analysis_contacts WHERE key = ?", (key,))
        return {c: json.loads(m) for c, m in rows}

    # -- arrays as bytes --------------------------------------------------------------
    def put_blob(self, key: str, data: bytes, version: int) -> None:
        """Keep derived bytes under ``key`` at a data version (skipped on a read-only workspace)."""
        if self.read_only:
            return
        with self.transaction():
            self.conn.execute("INSERT OR REPLACE INTO blobs(key, version, data) VALUES (?, ?, ?)",
                              (key, version, data))

    def blob(self, key: str, version: int) -> bytes | None:
        """The bytes under ``key`` if they were kept at data version ``version``."""
        row = self.conn.execute("SELECT version, data FROM blobs WHERE key = ?", (key,)).fetchone()
        return bytes(row[1]) if row is not None and row[0] == version else None

    # -- the events behind the ties, by contact ---------------------------------------
    def put_event_index(self, key: str, version: int, events: Iterable[dict[str, Any]],
                        members: Iterable[tuple[int, list[int]]]) -> None:
        """Replace the event index under ``key`` (event ``k`` at position ``k``), built at data version ``version``."""
        if self.read_only:
            return
        with self.transaction():
            for table in ("event_rows", "event_members"):
                self.conn.execute(f"DELETE FROM {table} WHERE key = ?", (key,))  # noqa: S608 (fixed names)
            self.conn.executemany("INSERT INTO event_rows(key, k, data) VALUES (?, ?, ?)",
                                  ((key, k, json.dumps(ev)) for k, ev in enumerate(events)))
            self.conn.executemany("INSERT INTO event_members(key, contact_id, events) VALUES (?, ?, ?)",
                                  ((key, int(c), json.dumps(ks)) for c, ks in members))
            self.conn.execute("INSERT OR REPLACE INTO blobs(key, version, data) VALUES (?, ?, ?)",
                              (key, version, b""))

    def has_event_index(self, key: str, version: int) -> bool:
        """Whether the event index under ``key`` was built at data version ``version``."""
        return self.blob(key, version) is not None

    def events_of(self, key: str, contact_id: int) -> list[int]:
        """The events (by position) a contact is in."""
        row = self.conn.execute("SELECT events FROM event_members WHERE key = ? AND contact_id = ?",
                                (key, int(contact_id))).fetchone()
        return json.loads(row[0]) if row else []

    def events_at(self, key: str, ks: Iterable[int]) -> list[dict[str, Any]]:
        """The events at positions ``ks``."""
        out = []
        for k in ks:
            row = self.conn.execute("SELECT data FROM event_rows WHERE key = ? AND k = ?", (key, int(k))).fetchone()
            if row is not None:
                out.append(json.loads(row[0]))
        return out

    def drop_derived(self) -> None:
        """Remove every derived row (analyses, blobs, event index): they are computed again when next asked for."""
        with self.transaction():
            for table in ("analyses", "analysis_groups", "analysis_contacts", "blobs", "event_rows", "event_members"):
                self.conn.execute(f"DELETE FROM {table}")  # noqa: S608 (fixed names)
