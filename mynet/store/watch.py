"""Noticing that another process changed a workspace, cheaply enough to ask every second or so.

SQLite's ``PRAGMA data_version`` changes on a read-only connection whenever
another connection commits; only then are the workspace's own marks (its data
version and its newest decision) read and compared.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path
from urllib.parse import quote

__all__ = ["ChangeWatch"]


class ChangeWatch:
    """A read-only connection that says whether the network or the decisions changed since :meth:`settle`.

    Parameters
    ----------
    path : path-like
        The workspace file.
    """

    def __init__(self, path: str | Path) -> None:
        self.path = Path(path)
        self._conn: sqlite3.Connection | None = None
        self._commit: int | None = None
        self.mark: tuple[int, int] | None = None

    def _connection(self) -> sqlite3.Connection:
        if self._conn is None:
            self._conn = sqlite3.connect(f"file:{quote(str(self.path.absolute()))}?mode=ro", uri=True, timeout=0.1)
        return self._conn

    def _read_mark(self, conn: sqlite3.Connection) -> tuple[int, int]:
        version = conn.execute("SELECT value FROM meta WHERE key = 'data_version'").fetchone()
        last = conn.execute("SELECT COALESCE(MAX(id), 0) FROM decisions").fetchone()
        return int(version[0]) if version else 0, int(last[0])

    def settle(self) -> tuple[int, int] | None:
        """Take the workspace as it is now as seen; returns its mark (data version, newest decision), or None."""
        try:
            conn = self._connection()
            self._commit = conn.execute("PRAGMA data_version").fetchone()[0]
            self.mark = self._read_mark(conn)
        except sqlite3.Error:
            self._commit = None
            return None
        return self.mark

    def changed(self) -> bool:
        """Whether the data version or the decisions changed since the last look (cheap when nothing was committed)."""
        if self._conn is None or self._commit is None:
            return False
        try:
            commit = self._conn.execute("PRAGMA data_version").fetchone()[0]
            if commit == self._commit:
                return False
            self._commit = commit
            mark = self._read_mark(self._conn)
        except sqlite3.Error:
            return False
        if mark != self.mark:
            self.mark = mark
            return True
        return False

    def close(self) -> None:
        if self._conn is not None:
            self._conn.close()
            self._conn = None
