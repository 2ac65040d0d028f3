"""A workspace that cannot be written: read commands work, changes fail saying why (exit code 3).

Tests may run as root, for whom file modes do not stop writes. The real thing
(chmod) is tested when not root; the same code path is always tested by making
the store see the file as unwritable, after which SQLite itself opens it with
``mode=ro`` and would refuse any write.
"""

from __future__ import annotations

import os
import sqlite3
import stat

import pytest

import mynet.store.database as store_module
from mynet.cli import main
from mynet.errors import WorkspaceError
from mynet.store import Store
from mynet.workspace.importing import import_paths

ROOT_USER = hasattr(os, "geteuid") and os.geteuid() == 0

CARDS = ("BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Ana Lind\r\nEMAIL:ana@quillon.example\r\nORG:Quillon Labs\r\nEND:VCARD\r\n"
         "BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Bo Ek\r\nEMAIL:bo@quillon.example\r\nORG:Quillon Labs\r\nEND:VCARD\r\n"
         "BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Cy Moss\r\nEMAIL:cy@velvane.example\r\nORG:Velvane Robotics\r\n"
         "END:VCARD\r\n")


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture
def workspace(tmp_path):
    cards = tmp_path / "people.vcf"
    cards.write_text(CARDS, encoding="utf-8")
    ws = tmp_path / "data" / "ws.sqlite"
    with Store(ws) as store:
        import_paths(store, [cards])
    return ws


@pytest.fixture
def unwritable(monkeypatch):
    """Make the store see every workspace as unwritable (as a read-only file, folder or mount would be)."""
    monkeypatch.setattr(store_module, "_writable", lambda path: False)


def check_reads_work_and_writes_fail(capsys, ws, tmp_path):
    w = ["--workspace", str(ws)]
    for args in (["contacts"], ["contacts", "--json"], ["show", "Ana Lind"], ["ties"], ["groups"], ["brokers"],
                 ["why", "1", "2"], ["reach", "--org", "Quillon"], ["sources"], ["settings"], ["audit"]):
        code, out, err = run(capsys, *w, *args)
        assert code == 0, (args, err)
        assert "damaged" not in err
    assert "Ana Lind" in run(capsys, *w, "contacts")[1]
    assert run(capsys, *w, "export", "-o", str(tmp_path / "net.graphml"))[0] == 0
    other = tmp_path / "more.vcf"
    other.write_text(CARDS.replace("Ana Lind", "Di Park").replace("ana@", "di@"), encoding="utf-8")
    for args in (["import", str(other)], ["me", "--email", "me@e.example"], ["merge", "1", "2", "--yes"],
                 ["tie", "1", "3"], ["rate", "1", "0.5"], ["forget", "3", "--yes"], ["apart", "1", "2"]):
        code, out, err = run(capsys, *w, *args)
        assert code == WorkspaceError.exit_code == 3, (args, code, err)
        assert "is read-only" in err and "nothing was changed" in err, err


def test_read_only_workspace_reads_and_refuses_changes(workspace, unwritable, tmp_path, capsys):
    with Store(workspace, create=False) as store:
        assert store.read_only
        with pytest.raises(sqlite3.OperationalError, match="readonly"):
            store.conn.execute("DELETE FROM contacts")  # SQLite itself refuses: the connection is mode=ro
    check_reads_work_and_writes_fail(capsys, workspace, tmp_path)


def test_no_journal_beside_the_file_falls_back_to_immutable(workspace, unwritable, monkeypatch):
    # On a read-only folder or mount SQLite cannot create the WAL index, and mode=ro alone fails to open;
    # immutable=1 (no locking, no journal) then reads the file. The first URI is made to fail the same way.
    uris = store_module._read_only_uris
    monkeypatch.setattr(store_module, "_read_only_uris",
                        lambda path: ["file:" + str(path.parent / "no-such-dir" / "x.sqlite") + "?mode=ro",
                                      uris(path)[1]])
    with Store(workspace, create=False) as store:
        assert store.read_only
        assert [c.name for c in store.contacts()] == ["Ana Lind", "Bo Ek", "Cy Moss"]
        assert store.conn.execute("PRAGMA database_list").fetchone()[2].endswith("ws.sqlite")
        with pytest.raises(WorkspaceError, match="read-only"):
            store.set_meta("x", "y")


def test_an_empty_or_old_read_only_file_says_what_to_do(tmp_path, unwritable):
    empty = tmp_path / "empty.sqlite"
    empty.write_bytes(b"")
    with pytest.raises(WorkspaceError, match="read-only and empty"):
        Store(empty, create=False)
    old = tmp_path / "old.sqlite"
    conn = sqlite3.connect(old)
    conn.execute("CREATE TABLE t (x)")
    conn.close()
    with pytest.raises(WorkspaceError, match="needs upgrading"):
        Store(old, create=False)


def test_write_protection_is_kept_when_permissions_are_tightened(workspace):
    os.chmod(workspace, 0o444)
    Store(workspace, create=False).close()
    assert stat.S_IMODE(os.stat(workspace).st_mode) == 0o400  # others lose read, the owner keeps no write


@pytest.mark.skipif(ROOT_USER, reason="running as root: file modes do not stop root from writing "
                                      "(the same path is tested above by making the file look unwritable)")
def test_chmod_read_only_file_and_folder(workspace, tmp_path, capsys):
    os.chmod(workspace, 0o400)
    try:
        check_reads_work_and_writes_fail(capsys, workspace, tmp_path)
    finally:
        os.chmod(workspace, 0o600)
    folder = workspace.parent
    os.chmod(folder, 0o500)
    try:
        check_reads_work_and_writes_fail(capsys, workspace, tmp_path)
    finally:
        os.chmod(folder, 0o700)
