"""The workspace's tables and how each version of the file becomes the next.

``MIGRATIONS[i]`` takes a file from version ``i`` to ``i + 1`` (index 0 creates
version 1). Each step is a tuple of single statements run in order inside one
transaction: statements are never found by splitting text on ";" (a trigger
or a string holding one would break).
"""

from __future__ import annotations

__all__ = ["MIGRATIONS", "SCHEMA_VERSION"]

MIGRATIONS: tuple[tuple[str, ...], ...] = (
    (
        "CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)",
        """CREATE TABLE sources (
            id INTEGER PRIMARY KEY,
            path TEXT NOT NULL UNIQUE,
            kind TEXT NOT NULL,
            sha256 TEXT NOT NULL,
            size INTEGER NOT NULL,
            as_of TEXT,
            region TEXT,
            imported_at TEXT NOT NULL,
            n_records INTEGER NOT NULL DEFAULT 0,
            n_skipped INTEGER NOT NULL DEFAULT 0
        )""",
        """CREATE TABLE records (
            id INTEGER PRIMARY KEY,
            source_id INTEGER NOT NULL REFERENCES sources(id) ON DELETE CASCADE,
            idx INTEGER NOT NULL,
            line INTEGER NOT NULL,
            rkey TEXT NOT NULL UNIQUE,
            data TEXT NOT NULL
        )""",
        "CREATE INDEX records_source ON records(source_id)",
        """CREATE TABLE interactions (
            id INTEGER PRIMARY KEY,
            source_id INTEGER NOT NULL REFERENCES sources(id) ON DELETE CASCADE,
            idx INTEGER NOT NULL,
            line INTEGER NOT NULL,
            kind TEXT NOT NULL,
            data TEXT NOT NULL
        )""",
        "CREATE INDEX interactions_source ON interactions(source_id)",
        "CREATE TABLE contact_map (rkey TEXT PRIMARY KEY, contact_id INTEGER NOT NULL)",
        "CREATE TABLE contacts (id INTEGER PRIMARY KEY, name TEXT NOT NULL, data TEXT NOT NULL)",
        """CREATE TABLE decisions (
            id INTEGER PRIMARY KEY,
            kind TEXT NOT NULL,
            a TEXT NOT NULL DEFAULT '',
            b TEXT NOT NULL DEFAULT '',
            value TEXT NOT NULL DEFAULT '',
            created_at TEXT NOT NULL
        )""",
        "CREATE INDEX decisions_kind ON decisions(kind)",
        "CREATE TABLE settings (key TEXT PRIMARY KEY, value TEXT NOT NULL)",
        "CREATE TABLE cache (key TEXT PRIMARY KEY, version INTEGER NOT NULL, data TEXT NOT NULL)",
    ),
    # 1 -> 2: which reader version read a source (a source read by an older reader is read again on the
    # next import of that file even when its bytes did not change: mail read before lists and relays were
    # understood keeps nothing of them), and whether the people you corresponded with there may become
    # contacts (import --no-new-contacts).
    (
        "ALTER TABLE sources ADD COLUMN reader TEXT NOT NULL DEFAULT ''",
        "ALTER TABLE sources ADD COLUMN new_contacts INTEGER NOT NULL DEFAULT 1",
    ),
    # 2 -> 3: the analysis kept in rows (a command reads the groups, or the measures of the contacts it
    # shows, not one document of the whole network), the data version and day it was last checked at,
    # derived arrays kept as bytes (the tie table loads without decoding text), and the events behind the ties
    # indexed by contact.
    (
        """CREATE TABLE analyses (
            key TEXT PRIMARY KEY,
            fingerprint TEXT NOT NULL,
            stamp TEXT NOT NULL,
            head TEXT NOT NULL
        )""",
        """CREATE TABLE analysis_groups (
            key TEXT NOT NULL,
            id INTEGER NOT NULL,
            rank INTEGER NOT NULL,
            data TEXT NOT NULL,
            PRIMARY KEY (key, id)
        )""",
        """CREATE TABLE analysis_contacts (
            key TEXT NOT NULL,
            contact_id INTEGER NOT NULL,
            group_id INTEGER,
            measures TEXT NOT NULL,
            PRIMARY KEY (key, contact_id)
        )""",
        "CREATE TABLE blobs (key TEXT PRIMARY KEY, version INTEGER NOT NULL, data BLOB NOT NULL)",
        # The meetings and threads behind the ties, and each contact's, so that `why` reads two rows.
        """CREATE TABLE event_rows (
            key TEXT NOT NULL,
            k INTEGER NOT NULL,
            data TEXT NOT NULL,
            PRIMARY KEY (key, k)
        )""",
        """CREATE TABLE event_members (
            key TEXT NOT NULL,
            contact_id INTEGER NOT NULL,
            events TEXT NOT NULL,
            PRIMARY KEY (key, contact_id)
        )""",
    ),
    # 3 -> 4: the people and places you want to reach (targets) and the introductions you asked for (asks),
    # with their outcomes. Both are your decisions: kept across re-imports. A person is named by a stable
    # record key (as in ``decisions``), so forgetting them or removing their file finds every row.
    (
        """CREATE TABLE targets (
            id INTEGER PRIMARY KEY,
            kind TEXT NOT NULL,
            query TEXT NOT NULL DEFAULT '',
            anchor TEXT NOT NULL DEFAULT '',
            created_at TEXT NOT NULL
        )""",
        "CREATE INDEX targets_anchor ON targets(anchor)",
        """CREATE TABLE asks (
            id INTEGER PRIMARY KEY,
            target_id INTEGER NOT NULL REFERENCES targets(id) ON DELETE CASCADE,
            via TEXT NOT NULL,
            asked_on TEXT NOT NULL,
            note TEXT NOT NULL DEFAULT '',
            outcome TEXT NOT NULL DEFAULT '',
            closed_on TEXT NOT NULL DEFAULT '',
            person TEXT NOT NULL DEFAULT '',
            created_at TEXT NOT NULL
        )""",
        "CREATE INDEX asks_via ON asks(via)",
        "CREATE INDEX asks_target ON asks(target_id)",
    ),
)

SCHEMA_VERSION = len(MIGRATIONS)
