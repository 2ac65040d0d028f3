"""The reads and writes of your targets and asks (tables ``targets`` and ``asks``, schema version 3).

Both are your decisions, never derived: a re-import keeps them. A person (a
person target, the one you asked, the one you were introduced to) is stored as
a stable record key, like the ``decisions`` table, so that forgetting a person
(:meth:`AsksTables.delete_asks_about`) and removing a file
(:meth:`AsksTables.move_anchor`) reach every row about them. Every change
marks the cached results stale (an outcome changes your warmth).
"""

from __future__ import annotations

from datetime import datetime, timezone
from typing import Any

__all__ = ["AsksTables"]

_TARGET_COLUMNS = "id, kind, query, anchor, created_at"
_ASK_COLUMNS = "id, target_id, via, asked_on, note, outcome, closed_on, person, created_at"


def _stamp() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="seconds")


class AsksTables:
    """Targets and asks (part of :class:`~mynet.store.Store`)."""

    conn: Any

    # -- targets -------------------------------------------------------------------
    def add_target(self, kind: str, query: str = "", anchor: str = "") -> int:
        """Keep one target: ``kind`` person (``anchor`` a record key) or organisation, tag, domain (``query``)."""
        with self.transaction():  # type: ignore[attr-defined]
            cur = self.conn.execute("INSERT INTO targets(kind, query, anchor, created_at) VALUES (?, ?, ?, ?)",
                                    (kind, query, anchor, _stamp()))
            self.bump_data_version()  # type: ignore[attr-defined]
        return int(cur.lastrowid)

    def targets(self) -> list[dict[str, Any]]:
        """Every target, oldest first."""
        return [dict(r) for r in self.conn.execute(f"SELECT {_TARGET_COLUMNS} FROM targets ORDER BY id")]

    def delete_target(self, target_id: int) -> int:
        """Remove a target and the asks about it; how many targets were removed (0 or 1)."""
        with self.transaction():  # type: ignore[attr-defined]
            self.conn.execute("DELETE FROM asks WHERE target_id = ?", (target_id,))
            n = self.conn.execute("DELETE FROM targets WHERE id = ?", (target_id,)).rowcount
            if n:
                self.bump_data_version()  # type: ignore[attr-defined]
        return n

    # -- asks ----------------------------------------------------------------------
    def add_ask(self, target_id: int, via: str, asked_on: str, note: str = "") -> int:
        """Keep one ask: you asked the person ``via`` (a record key) for an introduction to a target."""
        with self.transaction():  # type: ignore[attr-defined]
            cur = self.conn.execute(
                "INSERT INTO asks(target_id, via, asked_on, note, created_at) VALUES (?, ?, ?, ?, ?)",
                (target_id, via, asked_on, note, _stamp()))
            self.bump_data_version()  # type: ignore[attr-defined]
        return int(cur.lastrowid)

    def asks(self) -> list[dict[str, Any]]:
        """Every ask, oldest first (open ones have an empty ``outcome``)."""
        return [dict(r) for r in self.conn.execute(f"SELECT {_ASK_COLUMNS} FROM asks ORDER BY asked_on, id")]

    def close_ask(self, ask_id: int, outcome: str, closed_on: str, person: str = "") -> int:
        """Give an ask its outcome (``person``: the record key of whom you were introduced to); rows changed."""
        with self.transaction():  # type: ignore[attr-defined]
            n = self.conn.execute("UPDATE asks SET outcome = ?, closed_on = ?, person = ? WHERE id = ?",
                                  (outcome, closed_on, person, ask_id)).rowcount
            if n:
                self.bump_data_version()  # type: ignore[attr-defined]
        return n

    def reopen_ask(self, ask_id: int) -> int:
        """Take an outcome back (the ask is open again); rows changed."""
        return self.close_ask(ask_id, "", "", "")

    def delete_ask(self, ask_id: int) -> int:
        with self.transaction():  # type: ignore[attr-defined]
            n = self.conn.execute("DELETE FROM asks WHERE id = ?", (ask_id,)).rowcount
            if n:
                self.bump_data_version()  # type: ignore[attr-defined]
        return n

    # -- forgetting and re-anchoring -------------------------------------------------
    def delete_asks_about(self, key: str) -> int:
        """Remove every target and ask naming the record key ``key`` (a forgotten person); how many rows.

        An ask whose outcome named them as the person you met is removed too: the
        row would otherwise keep the fact that you were introduced to them.
        """
        with self.transaction():  # type: ignore[attr-defined]
            ids = [r[0] for r in self.conn.execute("SELECT id FROM targets WHERE anchor = ?", (key,))]
            n = 0
            for tid in ids:
                n += self.conn.execute("DELETE FROM asks WHERE target_id = ?", (tid,)).rowcount
                n += self.conn.execute("DELETE FROM targets WHERE id = ?", (tid,)).rowcount
            n += self.conn.execute("DELETE FROM asks WHERE via = ? OR person = ?", (key, key)).rowcount
            if n:
                self.bump_data_version()  # type: ignore[attr-defined]
        return n

    def anchors_in_asks(self) -> set[str]:
        """Every record key the targets and asks name."""
        out = {r[0] for r in self.conn.execute("SELECT anchor FROM targets WHERE anchor != ''")}
        out |= {r[0] for r in self.conn.execute("SELECT via FROM asks")}
        out |= {r[0] for r in self.conn.execute("SELECT person FROM asks WHERE person != ''")}
        return out

    def move_anchor(self, old: str, new: str) -> int:
        """Let the rows naming record key ``old`` name ``new`` instead (the person's record moved); rows changed."""
        with self.transaction():  # type: ignore[attr-defined]
            n = self.conn.execute("UPDATE targets SET anchor = ? WHERE anchor = ?", (new, old)).rowcount
            n += self.conn.execute("UPDATE asks SET via = ? WHERE via = ?", (new, old)).rowcount
            n += self.conn.execute("UPDATE asks SET person = ? WHERE person = ?", (new, old)).rowcount
        return n
