"""The workspace file: permissions, migrations, transactions, concurrent readers."""

from __future__ import annotations

import os
import sqlite3
import stat
import subprocess
import sys

import pytest

from mynet.errors import WorkspaceError
from mynet.model import Record
from mynet.store import SCHEMA_VERSION, Store


def test_created_owner_only(tmp_path):
    path = tmp_path / "sub" / "ws.sqlite"
    with Store(path) as s:
        s.set_setting("x", 1)
        assert stat.S_IMODE(os.stat(path).st_mode) == 0o600
        for extra in (path.with_name(path.name + "-wal"), path.with_name(path.name + "-shm")):
            if extra.exists():
                assert stat.S_IMODE(os.stat(extra).st_mode) & 0o077 == 0
    assert stat.S_IMODE(os.stat(path.parent).st_mode) & 0o077 == 0


def test_existing_loose_permissions_are_tightened(tmp_path):
    path = tmp_path / "ws.sqlite"
    Store(path).close()
    os.chmod(path, 0o644)
    Store(path).close()
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o600


def test_schema_version_and_newer_refused(tmp_path):
    path = tmp_path / "ws.sqlite"
    with Store(path) as s:
        assert s.conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
        assert s.journal_mode == "wal"
    conn = sqlite3.connect(path)
    conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION + 1}")
    conn.commit()
    conn.close()
    with pytest.raises(WorkspaceError, match="newer mynet"):
        Store(path)


def test_not_a_database(tmp_path):
    path = tmp_path / "ws.sqlite"
    path.write_bytes(b"this is not sqlite at all" * 100)
    with pytest.raises(WorkspaceError, match="not a mynet workspace"):
        Store(path)


def test_missing_without_create(tmp_path):
    with pytest.raises(WorkspaceError, match="no workspace"):
        Store(tmp_path / "nope.sqlite", create=False)


def test_transaction_rolls_back_everything(tmp_path):
    s = Store(tmp_path / "ws.sqlite")
    rec = Record(kind="vcard", source="a.vcf", index=0, line=1, full_name="Ana Lind")
    with pytest.raises(RuntimeError):
        with s.transaction():
            s.replace_source("a.vcf", "vcard", "h", 1, [("k1", rec)], [], as_of=None, region=None, n_skipped=0)
            raise RuntimeError("boom")
    assert s.sources() == [] and s.records() == []
    assert s.data_version == 0


def test_cache_is_keyed_by_data_version(tmp_path):
    s = Store(tmp_path / "ws.sqlite")
    s.put_cache("k", {"v": 1})
    assert s.cached("k") == {"v": 1}
    s.set_setting("half_life_days", 90)
    assert s.cached("k") is None


def test_reader_never_sees_half_an_import(tmp_path):
    """A second process reading during an open write transaction sees the old state."""
    path = tmp_path / "ws.sqlite"
    s = Store(path)
    rec = Record(kind="vcard", source="a.vcf", index=0, line=1, full_name="Ana Lind")
    reader = (
        "import sys; from mynet.store import Store; s = Store(sys.argv[1], create=False);"
        "print(len(s.records()))"
    )
    with s.transaction():
        s.replace_source("a.vcf", "vcard", "h", 1, [("k1", rec)], [], as_of=None, region=None, n_skipped=0)
        out = subprocess.run([sys.executable, "-c", reader, str(path)], capture_output=True, text=True, timeout=60)
        assert out.returncode == 0, out.stderr
        assert out.stdout.strip() == "0"
    out = subprocess.run([sys.executable, "-c", reader, str(path)], capture_output=True, text=True, timeout=60)
    assert out.stdout.strip() == "1"


def test_second_writer_gets_clear_busy_error(tmp_path):
    path = tmp_path / "ws.sqlite"
    s = Store(path)
    other = Store(path, timeout=0.2)
    with s.transaction():
        with pytest.raises(WorkspaceError, match="busy"):
            with other.transaction():
                pass
