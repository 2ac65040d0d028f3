"""The SQLite workspace file: opening it, migrating it, transactions, and every read and write mynet makes.

One file holds everything: the imported records (inputs), the user's decisions
(inputs that no re-import may lose), settings, the derived contacts and cached
analysis results keyed by a data version.

The file and its journal are readable by the owner only (mode 0600). Writes run
in ``BEGIN IMMEDIATE`` transactions in WAL mode, so a second process reading
the workspace sees either the state before an import or after it, never half.

A workspace that cannot be written (a read-only file, folder or mount) opens
read-only: SQLite's ``mode=ro``, or ``immutable=1`` when not even the WAL
index beside the file can be created. Reading works as usual (results that
would be cached are computed each time); a change raises
:class:`WorkspaceError` saying the workspace is read-only.
"""

from __future__ import annotations

import json
import os
import sqlite3
import stat
from contextlib import contextmanager
from datetime import datetime, timezone
from pathlib import Path
from typing import Any, Iterator
from urllib.parse import quote

from ..errors import WorkspaceError
from ..model import Contact, Interaction, Record
from .asks import AsksTables
from .derived import DerivedMixin
from .schema import MIGRATIONS, SCHEMA_VERSION

__all__ = ["Store", "SCHEMA_VERSION", "SourceRow"]


def _now() -> str:
    return datetime.now(timezone.utc).replace(microsecond=0).isoformat()


class SourceRow(dict):
    """A row of the sources table (a dict with attribute access)."""

    __getattr__ = dict.__getitem__


def _create_private_file(path: Path) -> None:
    """Create an empty file readable by the owner only, if it does not exist."""
    try:
        path.parent.mkdir(parents=True, exist_ok=True, mode=0o700)
        fd = os.open(path, os.O_CREAT | os.O_RDWR, 0o600)
    except OSError as exc:
        raise WorkspaceError(f"cannot create a workspace at {path}: {exc.strerror or exc}") from exc
    os.close(fd)


def _writable(path: Path) -> bool:
    """Whether the workspace file and its folder (where SQLite keeps its journal) can be written."""
    return os.access(path, os.W_OK) and os.access(path.parent if str(path.parent) else Path("."), os.W_OK)


def _read_only_failure(exc: sqlite3.Error) -> bool:
    """Whether SQLite failed because it could not write (the file, its journal or the folder)."""
    text = str(exc).lower()
    return "readonly" in text or "read-only" in text or "unable to open database file" in text


def _read_only_uris(path: Path) -> list[str]:
    """``mode=ro`` first; ``immutable=1`` when the WAL index cannot be created beside the file."""
    base = "file:" + quote(str(path.absolute()))
    return [base + "?mode=ro", base + "?mode=ro&immutable=1"]


class Store(DerivedMixin, AsksTables):
    """The workspace file.

    Parameters
    ----------
    path : path-like
        The SQLite file; created (mode 0600) when missing unless ``create`` is false.
    create : bool
        When false, a missing file raises :class:`WorkspaceError` instead.
    timeout : float
        Seconds to wait for another process's write transaction to finish.

    Attributes
    ----------
    read_only : bool
        True when the file, its folder or its mount cannot be written: reads
        work, :meth:`transaction` raises :class:`WorkspaceError`.
    """

    def __init__(self, path: str | os.PathLike, *, create: bool = True, timeout: float = 30.0):
        self.path = Path(path)
        if not self.path.exists():
            if not create:
                raise WorkspaceError(f"no workspace at {self.path}; import something first (mynet import FILE)")
            _create_private_file(self.path)
        self._tighten_permissions()
        self._in_tx = False
        self.read_only = False
        if _writable(self.path):
            try:
                self._open_writable(timeout)
                return
            except sqlite3.DatabaseError as exc:
                if not _read_only_failure(exc):
                    raise WorkspaceError(f"{self.path} is not a mynet workspace or is damaged ({exc})") from exc
                if getattr(self, "conn", None) is not None:
                    self.conn.close()
        self._open_read_only(timeout)

    def _open_writable(self, timeout: float) -> None:
        self.conn = sqlite3.connect(self.path, timeout=timeout, isolation_level=None)
        self.conn.row_factory = sqlite3.Row
        self.conn.execute("PRAGMA foreign_keys = ON")
        self.conn.execute("PRAGMA secure_delete = ON")
        self.journal_mode = self.conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
        self.conn.execute("PRAGMA synchronous = NORMAL")
        self._migrate()

    def _open_read_only(self, timeout: float) -> None:
        """Open with ``mode=ro`` (or ``immutable=1``); a workspace that needs creating or upgrading cannot be."""
        self.read_only = True
        last: sqlite3.Error | None = None
        for uri in _read_only_uris(self.path):
            try:
                self.conn = sqlite3.connect(uri, uri=True, timeout=timeout, isolation_level=None)
            except sqlite3.Error as exc:
                last = exc
                continue
            self.conn.row_factory = sqlite3.Row
            try:
                version = self.conn.execute("PRAGMA user_version").fetchone()[0]
                self.journal_mode = self.conn.execute("PRAGMA journal_mode").fetchone()[0]
            except sqlite3.DatabaseError as exc:
                self.conn.close()
                last = exc
                if _read_only_failure(exc):
                    continue
                break
            if version == 0 and not self.conn.execute("SELECT 1 FROM sqlite_master LIMIT 1").fetchone():
                self.conn.close()
                raise WorkspaceError(f"{self.path} is read-only and empty: nothing has been imported into it, "
                                     "and nothing can be (make the file and its folder writable)")
            if version > SCHEMA_VERSION:
                self.conn.close()
                raise WorkspaceError(f"{self.path} was written by a newer mynet (schema {version}, this one knows "
                                     f"{SCHEMA_VERSION}); upgrade mynet")
            if version < SCHEMA_VERSION:
                self.conn.close()
                raise WorkspaceError(f"{self.path} is read-only and needs upgrading to this mynet's format first "
                                     "(make the file and its folder writable once, then run any mynet command)")
            return
        raise WorkspaceError(f"{self.path} is not a mynet workspace or is damaged ({last})")

    # -- life cycle -----------------------------------------------------------
    def _tighten_permissions(self) -> None:
        """Take group and others' access away; the owner's own bits (a write-protected file) are kept."""
        try:
            st = self.path.stat()
            mode = stat.S_IMODE(st.st_mode)
            if mode & 0o077:
                os.chmod(self.path, mode & 0o700)
        except OSError:
            pass

    def close(self) -> None:
        self.conn.close()

    def __enter__(self) -> "Store":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def _migrate(self) -> None:
        version = self.conn.execute("PRAGMA user_version").fetchone()[0]
        if version > SCHEMA_VERSION:
            raise WorkspaceError(
                f"{self.path} was written by a newer mynet (schema {version}, this one knows {SCHEMA_VERSION}); "
                f"upgrade mynet"
            )
        if version == SCHEMA_VERSION:
            return
        with self.transaction():
            version = self.conn.execute("PRAGMA user_version").fetchone()[0]
            for target in range(version, SCHEMA_VERSION):
                for statement in MIGRATIONS[target]:  # one statement each: never split on ";"
                    self.conn.execute(statement)
                self.conn.execute(f"PRAGMA user_version = {target + 1}")
            self.conn.execute("INSERT OR IGNORE INTO meta(key, value) VALUES ('data_version', '0')")
            self.conn.execute("INSERT OR IGNORE INTO meta(key, value) VALUES ('next_contact_id', '1')")
            self.conn.execute("INSERT OR IGNORE INTO meta(key, value) VALUES ('created_at', ?)", (_now(),))

    @contextmanager
    def transaction(self) -> Iterator[sqlite3.Connection]:
        """One write transaction; nested calls join the outer one.

        Raises
        ------
        WorkspaceError
            When another process holds the write lock for longer than the timeout.
        """
        if self._in_tx:
            yield self.conn
            return
        if self.read_only:
            raise WorkspaceError(f"{self.path} is read-only (the file, its folder or the disk it is on cannot be "
                                 "written): it can be read, but this command changes it; nothing was changed")
        try:
            self.conn.execute("BEGIN IMMEDIATE")
        except sqlite3.OperationalError as exc:
            if "locked" in str(exc) or "busy" in str(exc):
                raise WorkspaceError(
                    f"{self.path} is busy: another mynet process is writing to it (an import?); try again when it is "
                    f"done"
                ) from exc
            raise
        self._in_tx = True
        try:
            yield self.conn
        except BaseException:
            self.conn.execute("ROLLBACK")
            raise
        else:
            self.conn.execute("COMMIT")
        finally:
            self._in_tx = False

    # -- meta, settings, cache -------------------------------------------------
    def meta(self, key: str, default: str | None = None) -> str | None:
        row = self.conn.execute("SELECT value FROM meta WHERE key = ?", (key,)).fetchone()
        return row[0] if row else default

    def set_meta(self, key: str, value: str) -> None:
        with self.transaction():
            self.conn.execute("INSERT OR REPLACE INTO meta(key, value) VALUES (?, ?)", (key, value))

    @property
    def data_version(self) -> int:
        return int(self.meta("data_version", "0") or 0)

    def bump_data_version(self) -> int:
        """Mark every cached result as stale (call inside the changing transaction)."""
        with self.transaction():
            new = self.data_version + 1
            self.conn.execute("UPDATE meta SET value = ? WHERE key = 'data_version'", (str(new),))
        return new

    def setting(self, key: str, default: Any = None) -> Any:
        row = self.conn.execute("SELECT value FROM settings WHERE key = ?", (key,)).fetchone()
        return json.loads(row[0]) if row else default

    def settings(self) -> dict[str, Any]:
        return {r[0]: json.loads(r[1]) for r in self.conn.execute("SELECT key, value FROM settings ORDER BY key")}

    def set_setting(self, key: str, value: Any) -> None:
        with self.transaction():
            self.conn.execute(
                "INSERT OR REPLACE INTO settings(key, value) VALUES (?, ?)", (key, json.dumps(value, sort_keys=True))
            )
            self.bump_data_version()

    def cached(self, key: str) -> Any:
        """The cached value for ``key`` if it was computed at the current data version."""
        row = self.conn.execute("SELECT version, data FROM cache WHERE key = ?", (key,)).fetchone()
        if row is None or row[0] != self.data_version:
            return None
        return json.loads(row[1])

    def cached_any(self, key: str) -> Any:
        """The cached value for ``key`` whatever data version it was computed at (the caller checks it)."""
        row = self.conn.execute("SELECT data FROM cache WHERE key = ?", (key,)).fetchone()
        return json.loads(row[0]) if row else None

    def has_cache(self, key: str) -> bool:
        """Whether anything is cached under ``key`` (at any data version)."""
        return self.conn.execute("SELECT 1 FROM cache WHERE key = ?", (key,)).fetchone() is not None

    def drop_caches(self) -> None:
        """Forget every cached result (they are derived: computed again when next asked for)."""
        with self.transaction():
            self.conn.execute("DELETE FROM cache")
            self.drop_derived()

    def compact(self) -> None:
        """Drop caches, truncate the write-ahead log and vacuum, so deleted rows leave no trace in the file."""
        self.drop_caches()
        self.conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        self.conn.execute("VACUUM")
        self.conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")

    def put_cache(self, key: str, value: Any, version: int | None = None) -> None:
        """Keep a derived result (skipped on a read-only workspace: it is computed again next time)."""
        if self.read_only:
            return
        with self.transaction():
            self.conn.execute(
                "INSERT OR REPLACE INTO cache(key, version, data) VALUES (?, ?, ?)",
                (key, self.data_version if version is None else version, json.dumps(value)),
            )

    # -- sources and records ---------------------------------------------------
    def sources(self) -> list[SourceRow]:
        rows = self.conn.execute("SELECT * FROM sources ORDER BY id").fetchall()
        return [SourceRow(dict(r)) for r in rows]

    def source_by_path(self, path: str) -> SourceRow | None:
        row = self.conn.execute("SELECT * FROM sources WHERE path = ?", (path,)).fetchone()
        return SourceRow(dict(row)) if row else None

    def replace_source(
        self,
        path: str,
        kind: str,
        sha256: str,
        size: int,
        records: list[tuple[str, Record]],
        interactions: list[Interaction],
        *,
        as_of: str | None,
        region: str | None,
        n_skipped: int,
        reader: str = "",
        new_contacts: bool = True,
    ) -> int:
        """Insert or replace one source with its records and interactions.

        ``records`` pairs each record with its stable key. ``reader`` names the
        version of the reader that read it; ``new_contacts`` says whether people
        found there may become contacts. Must run inside a transaction opened
        by the caller (the whole import is one transaction).
        """
        assert self._in_tx, "replace_source must run inside Store.transaction()"
        old = self.source_by_path(path)
        if old is not None:
            self.conn.execute("DELETE FROM records WHERE source_id = ?", (old["id"],))
            self.conn.execute("DELETE FROM interactions WHERE source_id = ?", (old["id"],))
            self.conn.execute(
                "UPDATE sources SET kind=?, sha256=?, size=?, as_of=?, region=?, imported_at=?, n_records=?, "
                "n_skipped=?,"
                " reader=?, new_contacts=? WHERE id=?",
                (kind, sha256, size, as_of, region, _now(), len(records) + len(interactions), n_skipped, reader,
                 int(new_contacts), old["id"]),
            )
            source_id = old["id"]
        else:
            cur = self.conn.execute(
                "INSERT INTO sources(path, kind, sha256, size, as_of, region, imported_at, n_records, n_skipped, "
                "reader,"
                " new_contacts) VALUES (?,?,?,?,?,?,?,?,?,?,?)",
                (path, kind, sha256, size, as_of, region, _now(), len(records) + len(interactions), n_skipped, reader,
                 int(new_contacts)),
            )
            source_id = cur.lastrowid
        self.conn.executemany(
            "INSERT INTO records(source_id, idx, line, rkey, data) VALUES (?, ?, ?, ?, ?)",
            ((source_id, r.index, r.line, key, json.dumps(r.to_dict(), ensure_ascii=False)) for key, r in records),
        )
        self.conn.executemany(
            "INSERT INTO interactions(source_id, idx, line, kind, data) VALUES (?, ?, ?, ?, ?)",
            ((source_id, i.index, i.line, i.kind, json.dumps(i.to_dict(), ensure_ascii=False)) for i in interactions),
        )
        self.bump_data_version()
        return int(source_id)

    def remove_source(self, source_id: int) -> None:
        with self.transaction():
            self.conn.execute("DELETE FROM sources WHERE id = ?", (source_id,))
            self.bump_data_version()

    def source_counts(self, source_id: int) -> tuple[int, int]:
        """How many records and how many meetings or messages a source holds."""
        n_rec = self.conn.execute("SELECT COUNT(*) FROM records WHERE source_id = ?", (source_id,)).fetchone()[0]
        n_int = self.conn.execute("SELECT COUNT(*) FROM interactions WHERE source_id = ?", (source_id,)).fetchone()[0]
        return int(n_rec), int(n_int)

    def record_keys(self) -> set[str]:
        """The key of every stored record."""
        return {k for (k,) in self.conn.execute("SELECT rkey FROM records")}

    def delete_records(self, ids: list[int]) -> None:
        with self.transaction():
            self.conn.executemany("DELETE FROM records WHERE id = ?", ((rid,) for rid in ids))

    def records(self) -> list[tuple[int, str, SourceRow, Record]]:
        """Every stored record as (record id, key, source row, record), in file order."""
        srcs = {s["id"]: s for s in self.sources()}
        out = []
        for rid, sid, rkey, data in self.conn.execute(
            "SELECT id, source_id, rkey, data FROM records ORDER BY source_id, idx"
        ):
            out.append((rid, rkey, srcs[sid], Record.from_dict(json.loads(data))))
        return out

    def records_by_id(self, ids: list[int]) -> list[tuple[int, str, SourceRow, Record]]:
        if not ids:
            return []
        srcs = {s["id"]: s for s in self.sources()}
        marks = ",".join("?" * len(ids))
        rows = self.conn.execute(
            f"SELECT id, source_id, rkey, data FROM records WHERE id IN ({marks}) ORDER BY source_id, idx", ids
        )
        return [(rid, rkey, srcs[sid], Record.from_dict(json.loads(d))) for rid, sid, rkey, d in rows]

    def interactions(self, *, with_source: bool = False) -> list:
        """Every meeting and message as imported, in file order.

        With ``with_source``, ``(source id, interaction)`` pairs.
        """
        rows = self.conn.execute("SELECT source_id, data FROM interactions ORDER BY source_id, idx")
        if with_source:
            return [(sid, Interaction.from_dict(json.loads(d))) for sid, d in rows]
        return [Interaction.from_dict(json.loads(d)) for _sid, d in rows]

    def interaction_rows(self) -> list[tuple[int, dict[str, Any]]]:
        """Every stored meeting and message as (row id, its stored fields), for rewriting in place."""
        return [(rid, json.loads(d)) for rid, d in self.conn.execute("SELECT id, data FROM interactions").fetchall()]

    def update_interaction(self, row_id: int, data: dict[str, Any]) -> None:
        with self.transaction():
            self.conn.execute("UPDATE interactions SET data = ? WHERE id = ?",
                              (json.dumps(data, ensure_ascii=False), row_id))

    def newest_interaction_day(self) -> str | None:
        """The day (``YYYY-MM-DD`` as stored) of the newest meeting or message that is not bulk mail."""
        row = self.conn.execute(
            "SELECT max(substr(json_extract(data, '$.when'), 1, 10)) FROM interactions "
            "WHERE coalesce(json_extract(data, '$.bulk'), 0) = 0"
        ).fetchone()
        return row[0] if row and row[0] else None

    # -- contacts ----------------------------------------------------------------
    def contact_map(self) -> dict[str, int]:
        return {k: v for k, v in self.conn.execute("SELECT rkey, contact_id FROM contact_map")}

    def write_contacts(self, contacts: list[Contact], mapping: dict[str, int], next_id: int) -> None:
        """Replace the derived contacts and the record -> contact map."""
        with self.transaction():
            self.conn.execute("DELETE FROM contacts")
            self.conn.execute("DELETE FROM contact_map")
            self.conn.executemany(
                "INSERT INTO contacts(id, name, data) VALUES (?, ?, ?)",
                ((c.id, c.name, json.dumps(c.to_dict(), ensure_ascii=False)) for c in contacts),
            )
            self.conn.executemany("INSERT INTO contact_map(rkey, contact_id) VALUES (?, ?)", mapping.items())
            self.conn.execute("UPDATE meta SET value = ? WHERE key = 'next_contact_id'", (str(next_id),))

    def keys_of(self, contact_id: int) -> list[str]:
        """The record keys (and keys of people found in mail) that make up a contact, sorted."""
        return [k for (k,) in self.conn.execute("SELECT rkey FROM contact_map WHERE contact_id = ? ORDER BY rkey",
                                                (contact_id,))]

    def delete_contact(self, contact_id: int) -> None:
        """Remove a contact and its keys (its records are removed separately)."""
        with self.transaction():
            self.conn.execute("DELETE FROM contact_map WHERE contact_id = ?", (contact_id,))
            self.conn.execute("DELETE FROM contacts WHERE id = ?", (contact_id,))

    def contacts(self, *, limit: int = 0) -> list[Contact]:
        """Every contact by id (the first ``limit`` only, when given)."""
        sql = "SELECT data FROM contacts ORDER BY id" + (" LIMIT ?" if limit else "")
        return [Contact.from_dict(json.loads(d)) for (d,) in self.conn.execute(sql, (limit,) if limit else ())]

    def contact_count(self) -> int:
        return self.conn.execute("SELECT COUNT(*) FROM contacts").fetchone()[0]

    def contact(self, contact_id: int) -> Contact | None:
        row = self.conn.execute("SELECT data FROM contacts WHERE id = ?", (contact_id,)).fetchone()
        return Contact.from_dict(json.loads(row[0])) if row else None

    # -- decisions -----------------------------------------------------------------
    def add_decision(self, kind: str, a: str = "", b: str = "", value: Any = "", *, bump: bool = True) -> int:
        """Record one user decision (an input that no re-import may lose).

        ``bump=False`` is for decisions no derived result depends on (a group's name).
        """
        with self.transaction():
            cur = self.conn.execute(
                "INSERT INTO decisions(kind, a, b, value, created_at) VALUES (?, ?, ?, ?, ?)",
                (kind, a, b, json.dumps(value), _now()),
            )
            if bump:
                self.bump_data_version()
        return int(cur.lastrowid)

    def decisions(self, kind: str | None = None) -> list[dict[str, Any]]:
        sql = "SELECT id, kind, a, b, value, created_at FROM decisions"
        args: tuple = ()
        if kind:
            sql += " WHERE kind = ?"
            args = (kind,)
        rows = self.conn.execute(sql + " ORDER BY id", args).fetchall()
        return [dict(r) | {"value": json.loads(r["value"])} for r in rows]

    def delete_decisions(self, kind: str, a: str | None = None, b: str | None = None) -> int:
        with self.transaction():
            sql = "DELETE FROM decisions WHERE kind = ?"
            args: list[Any] = [kind]
            if a is not None:
                sql += " AND a = ?"
                args.append(a)
            if b is not None:
                sql += " AND b = ?"
                args.append(b)
            n = self.conn.execute(sql, args).rowcount
            if n and kind != "group_name":
                self.bump_data_version()
        return n

    def last_decision_id(self) -> int:
        """The id of the newest decision (0 when there is none): a decision no data version marks changes it."""
        return int(self.conn.execute("SELECT COALESCE(MAX(id), 0) FROM decisions").fetchone()[0])

    def delete_decision(self, decision_id: int) -> int:
        with self.transaction():
            return self.conn.execute("DELETE FROM decisions WHERE id = ?", (decision_id,)).rowcount

    def delete_decisions_about(self, key: str) -> int:
        """Remove every decision naming ``key`` on either side; how many."""
        with self.transaction():
            return self.conn.execute("DELETE FROM decisions WHERE a = ? OR b = ?", (key, key)).rowcount

    def move_decision(self, decision_id: int, *, a: str | None = None, b: str | None = None) -> None:
        """Anchor a decision to other record keys (its ``a`` side, its ``b`` side or both)."""
        with self.transaction():
            if a is not None:
                self.conn.execute("UPDATE decisions SET a = ? WHERE id = ?", (a, decision_id))
            if b is not None:
                self.conn.execute("UPDATE decisions SET b = ? WHERE id = ?", (b, decision_id))
