"""Mail as users keep it: Maildir folders, folders of saved messages without a suffix, mboxes found by content.

All messages are invented (reserved ``*.example`` domains). The Maildir layout
(``cur``, ``new``, ``tmp``; ``:2,`` flags after the unique name; Maildir++
``.Folder`` subfolders) is the common practice of mail servers and clients.
"""

from __future__ import annotations

import sqlite3

import pytest
from mailfixtures import YOU

from mynet.cli import main
from mynet.errors import InputError
from mynet.sources import iter_input_files, parse_file
from mynet.sources.maildir import is_maildir, message_files
from mynet.store import SCHEMA_VERSION, Store
from mynet.workspace.importing import import_paths


def note(sender: tuple[str, str], to: tuple[str, str], mid: str, *, reply: str = "", day: int = 2) -> bytes:
    lines = [f"Return-Path: <{sender[1]}>", f"From: {sender[0]} <{sender[1]}>", f"To: {to[0]} <{to[1]}>",
             f"Subject: {'Re: ' if reply else ''}Plans", f"Message-ID: <{mid}>",
             f"Date: Tue, {day} Feb 2009 10:00:00 +0000"]
    if reply:
        lines.append(f"In-Reply-To: <{reply}>")
    return ("\r\n".join(lines) + "\r\n\r\nA body that is never read.\r\n").encode()


ANA = ("Ana Lind", "ana@quillon.example")
BO = ("Bo Ek", "bo@velvane.example")


def make_maildir(root, name="INBOX"):
    box = root / name
    for sub in ("cur", "new", "tmp"):
        (box / sub).mkdir(parents=True)
    (box / "cur" / "1234567890.M1P1.host:2,S").write_bytes(note(ANA, (YOU[0], YOU[1]), "m1@q"))
    (box / "new" / "1234567891.M2P1.host").write_bytes(note(BO, (YOU[0], YOU[1]), "m2@v"))
    (box / "tmp" / "1234567892.M3P1.host").write_bytes(note(("Cy Moss", "cy@x.example"), (YOU[0], YOU[1]), "m3@x"))
    (box / "cur" / ".hidden").write_bytes(note(ANA, BO, "hidden@q"))
    return box


def test_maildir_reads_cur_and_new_not_tmp(tmp_path):
    box = make_maildir(tmp_path)
    assert is_maildir(box) and [p.parent.name for p in message_files(box)] == ["cur", "new"]
    result = parse_file(box)
    assert result.kind == "maildir"
    assert sorted(m.key for m in result.interactions) == ["m1@q", "m2@v"]
    assert all(m.line == 1 and m.source.startswith(str(box)) for m in result.interactions)


def test_folder_of_maildirs_and_maildirplusplus_subfolders(tmp_path):
    mail = tmp_path / "Mail"
    inbox = make_maildir(mail, "INBOX")
    sent = make_maildir(inbox, ".Sent")  # Maildir++: a subfolder is a Maildir whose name starts with a dot
    (mail / "notes.md").write_text("not mail\n")
    assert list(iter_input_files([mail])) == [inbox, sent]


def test_folder_of_suffixless_messages_is_one_source(tmp_path):
    saved = tmp_path / "saved"
    saved.mkdir()
    for i, (who, mid) in enumerate([(ANA, "s1@q"), (BO, "s2@v")], start=1):
        (saved / str(i)).write_bytes(note(who, (YOU[0], YOU[1]), mid))  # an MH-style folder: 1, 2, ...
    (saved / "README").write_text("These are saved messages.\n")
    (saved / "blob").write_bytes(b"\x00\x01\x02" * 100)
    (saved / "card.vcf").write_text("BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Di Park\r\nEND:VCARD\r\n")
    (saved / "old-mbox").write_bytes(b"From a@x.example Mon Jan  1 00:00:00 2009\n" + note(ANA, BO, "o1@q"))
    found = list(iter_input_files([saved]))
    assert found == [saved / "card.vcf", saved / "old-mbox", saved]
    result = parse_file(saved)
    assert result.kind == "mailfolder" and sorted(m.key for m in result.interactions) == ["s1@q", "s2@v"]
    assert parse_file(saved / "old-mbox").kind == "mbox"


def test_a_single_message_without_suffix(tmp_path):
    path = tmp_path / "message"
    path.write_bytes(note(ANA, BO, "one@q"))  # starts with Return-Path:, not From:
    assert parse_file(path).kind == "eml"


def test_unreadable_message_is_skipped_with_its_file(tmp_path):
    box = make_maildir(tmp_path)
    (box / "new" / "1234567899.M9P1.host").write_bytes(b"Subject: no address here\r\nX-Note: x\r\n\r\nbody\r\n")
    result = parse_file(box)
    (skip,) = result.skipped
    assert skip.source.endswith("1234567899.M9P1.host") and skip.line == 1
    assert len(result.interactions) == 2


def test_huge_recipient_list_in_a_maildir_message(tmp_path):
    box = make_maildir(tmp_path)
    to = ",\r\n ".join(f"p{i}@crowd.example" for i in range(100_000))
    (box / "new" / "1234567898.M8P1.host").write_bytes(
        f"From: a@b.example\r\nTo: {to}\r\nMessage-ID: <big@b>\r\n\r\nhi\r\n".encode())
    big = next(m for m in parse_file(box).interactions if m.key == "big@b")
    assert big.bulk and big.recipients == 100_000 and len(big.participants) <= 201


def test_import_of_a_maildir_finds_who_you_corresponded_with(tmp_path, capsys):
    box = make_maildir(tmp_path)
    (box / "cur" / "1234567893.M4P1.host:2,RS").write_bytes(note((YOU[0], YOU[1]), ANA, "r1@q", reply="m1@q"))
    ws = str(tmp_path / "ws.sqlite")
    assert main(["--workspace", ws, "me", "--email", YOU[1], "--name", YOU[0]]) == 0
    assert main(["--workspace", ws, "import", str(box)]) == 0
    out = capsys.readouterr().out
    assert "3 messages in a Maildir (maildir)" in out
    assert "1 person you corresponded with found in mail and calendars" in out
    store = Store(ws)
    (ana,) = store.contacts()  # Ana wrote and you answered; Bo only wrote to you
    assert ana.name == "Ana Lind" and ana.found_in == ["mail"]
    # Reading mail renames files (new flags): nothing to read again; a new message is.
    (box / "cur" / "1234567893.M4P1.host:2,RS").rename(box / "cur" / "1234567893.M4P1.host:2,RSF")
    assert import_paths(store, [box]).files[0].status == "unchanged"
    (box / "new" / "1234567894.M5P1.host").write_bytes(note((YOU[0], YOU[1]), BO, "r2@v", reply="m2@v"))
    assert import_paths(store, [box]).files[0].status == "updated"
    assert {c.name for c in store.contacts()} == {"Ana Lind", "Bo Ek"}


def test_nothing_in_a_folder_is_refused_clearly(tmp_path):
    empty = tmp_path / "empty"
    empty.mkdir()
    (empty / "notes").write_text("nothing\n")
    store = Store(tmp_path / "ws.sqlite")
    with pytest.raises(InputError, match="Maildir or saved mail messages"):
        import_paths(store, [empty])


def test_old_workspace_is_migrated_and_old_mail_read_again(tmp_path):
    path = tmp_path / "old.sqlite"
    conn = sqlite3.connect(path)
    from mynet.store.schema import MIGRATIONS

    for statement in MIGRATIONS[0]:
        conn.execute(statement)
    conn.execute("PRAGMA user_version = 1")
    conn.execute("INSERT INTO meta VALUES ('data_version', '0'), ('next_contact_id', '1')")
    box = tmp_path / "a.mbox"
    box.write_bytes(b"From a Tue Feb  3 00:00:00 2009\n" + note(ANA, BO, "x@q"))
    import hashlib

    conn.execute("INSERT INTO sources(path, kind, sha256, size, imported_at) VALUES (?, 'mbox', ?, 1, 'then')",
                 (str(box.resolve()), hashlib.sha256(box.read_bytes()).hexdigest()))
    conn.commit()
    conn.close()
    store = Store(path)
    assert SCHEMA_VERSION >= 3  # later versions (derived rows, targets and asks): the file reaches the newest
    assert store.conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    assert store.sources()[0]["reader"] == "" and store.sources()[0]["new_contacts"] == 1
    # Same bytes, but read by an older reader: read again.
    assert import_paths(store, [box]).files[0].status == "updated"
    assert import_paths(store, [box]).files[0].status == "unchanged"
