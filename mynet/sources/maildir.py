"""Folders of message files: Maildir folders and folders of saved messages without a suffix.

A folder of message files is one source, like an mbox: its messages are read
with the same per-message reader (:func:`mynet.sources.mbox.read_message`),
one :class:`mynet.model.Interaction` each, with the message file as the
interaction's source and line 1 as its line.

Choices made here
-----------------
* A Maildir is a folder with a ``cur`` or ``new`` subfolder. Its messages are
  the files of ``cur`` and ``new``; ``tmp`` holds messages still being
  delivered and is left alone, as are names starting with a dot (the Maildir
  convention). Maildir++ subfolders (``.Sent``, ``.Lists.dev``) are Maildirs of
  their own and are found by :func:`mail_folders`.
* Any other folder's message files are its own files (not those of its
  subfolders) that have no known suffix and start with a message header block
  (or an mbox ``From `` line followed by one), such as MH folders and saved
  messages.
* A folder's content hash is taken over each message file's unique name (the
  Maildir name before the ``:2,`` flags, which change when mail is read) and
  size, so reading mail in a mail program does not make mynet read the folder
  again, while a new or deleted message does. Maildir files are never
  rewritten in place.
* Only the header block of each file is read, in chunks, up to
  :data:`MAX_HEAD_BYTES`; a longer header block is read that far.
"""

from __future__ import annotations

import hashlib
import os
import re
from pathlib import Path

from ..errors import InputError, RecordError
from ..model import ParseResult, Skipped

__all__ = ["is_maildir", "message_files", "folder_digest", "parse_message_folder", "sniff_message", "MAX_HEAD_BYTES"]

#: At most this much of one message file is read (its header block; bodies are never read).
MAX_HEAD_BYTES = 16 * 1024 * 1024
_CHUNK = 64 * 1024


def is_maildir(path: Path) -> bool:
    """Whether ``path`` is a Maildir (it has a ``cur`` or ``new`` subfolder)."""
    return (path / "cur").is_dir() or (path / "new").is_dir()


def _visible_files(folder: Path) -> list[Path]:
    try:
        entries = sorted(os.scandir(folder), key=lambda e: e.name)
    except OSError:
        return []
    return [Path(e.path) for e in entries if not e.name.startswith(".") and e.is_file()]


# A header field line (RFC 5322 section 3.6.8: a name of printable characters but ":", then ":"), and the
# name of a field only mail has, at the start of a line.
_FIELD_LINE = re.compile(rb"[!-9;-~]+[ \t]*:")
_MAIL_FIELD = re.compile(
    rb"^(?:from|to|cc|date|subject|message-id|received|return-path|sender|reply-to|in-reply-to|references"
    rb"|mime-version|delivered-to|x-mailer|list-id)[ \t]*:", re.IGNORECASE | re.MULTILINE)


def _header_start(head: bytes) -> bool:
    """Whether ``head`` starts with a header field and holds a field only mail has before its first blank line."""
    if not _FIELD_LINE.match(head):
        return False
    end = head.find(b"\n\n")
    end2 = head.find(b"\n\r\n")
    stop = min(e for e in (end, end2, len(head)) if e >= 0)
    return bool(_MAIL_FIELD.search(head, 0, stop))


def sniff_message(path: Path) -> str:
    """``"message"`` for a file holding one message, ``"mbox"`` for an mbox, ``""`` otherwise (by content).

    Only the first 4 KiB are looked at: a header field first, and a field only
    mail has (From, To, Date, Message-ID, Received, ...) before the first blank line.
    """
    try:
        with open(path, "rb") as f:
            head = f.read(4096)
    except OSError:
        return ""
    head = head.removeprefix(b"\xef\xbb\xbf").lstrip(b"\r\n")
    if head.startswith(b"From "):
        eol = head.find(b"\n")
        return "mbox" if eol >= 0 and _header_start(head[eol + 1:]) else ""
    return "message" if _header_start(head) else ""


_LISTED: dict[tuple[str, int], list[Path]] = {}


def message_files(folder: Path, known_suffixes: frozenset[str] | set[str] = frozenset()) -> list[Path]:
    """The message files of a folder: a Maildir's ``cur`` and ``new``, else its own suffix-less messages.

    A plain folder's files are recognised by content; the answer is kept while
    the folder's own modification time does not change (adding, removing or
    renaming a file changes it), so one import looks at each file once.
    """
    if is_maildir(folder):
        return [p for sub in ("cur", "new") for p in _visible_files(folder / sub)]
    try:
        key = (str(folder.resolve()), folder.stat().st_mtime_ns)
    except OSError:
        return []
    if key not in _LISTED:
        if len(_LISTED) > 64:
            _LISTED.clear()
        _LISTED[key] = [p for p in _visible_files(folder)
                        if p.suffix.lower() not in known_suffixes and sniff_message(p) == "message"]
    return list(_LISTED[key])


def _unique_name(path: Path) -> str:
    # Maildir: "<unique>:2,<flags>"; the flags change when a message is read or answered.
    return path.name.split(":2,", 1)[0].split("!2,", 1)[0]


def folder_digest(folder: Path, files: list[Path]) -> tuple[str, int]:
    """A content hash of a message folder (unique names and sizes) and its total size in bytes."""
    h = hashlib.sha256()
    total = 0
    rows = []
    for p in files:
        try:
            size = p.stat().st_size
        except OSError as exc:
            raise InputError(str(p), f"cannot be read ({exc.strerror})") from exc
        total += size
        rows.append(f"{_unique_name(p)}\x00{size}\n")
    for row in sorted(rows):
        h.update(row.encode("utf-8", errors="surrogateescape"))
    return h.hexdigest(), total


def _read_head(path: Path) -> bytes:
    """The header block of one message file (up to the first blank line), read in chunks."""
    parts: list[bytes] = []
    size = 0
    with open(path, "rb") as f:
        while size < MAX_HEAD_BYTES:
            chunk = f.read(_CHUNK)
            if not chunk:
                break
            parts.append(chunk)
            size += len(chunk)
            tail = b"".join(parts[-2:])
            if b"\n\n" in tail or b"\n\r\n" in tail:
                break
    return b"".join(parts)


def parse_message_folder(folder: Path, *, strict: bool = False, max_recipients: int = 25,
                         known_suffixes: frozenset[str] | set[str] = frozenset()) -> ParseResult:
    """Read every message file of a Maildir or of a folder of saved messages.

    Returns
    -------
    ParseResult
        ``kind`` ``"maildir"`` or ``"mailfolder"``; one interaction per
        readable message (its source is the message file, its line 1);
        unreadable messages in ``skipped`` with their file.

    Raises
    ------
    InputError
        The folder holds no message file at all.
    RecordError
        In strict mode, at the first message that cannot be read.
    """
    from .mbox import LEADING_BLANK, MessageNotes, header_end, read_message

    kind = "maildir" if is_maildir(folder) else "mailfolder"
    files = message_files(folder, known_suffixes)
    result = ParseResult(path=str(folder), kind=kind)
    if not files:
        raise InputError(str(folder), "holds no mail messages (a Maildir keeps them in cur/ and new/)")
    notes = MessageNotes()
    for index, path in enumerate(files):
        name = str(path)
        try:
            data = _read_head(path).removeprefix(b"\xef\xbb\xbf")
        except OSError as exc:
            reason = f"cannot be read ({exc.strerror})"
            if strict:
                raise RecordError(name, reason, 1) from exc
            result.skipped.append(Skipped(source=name, line=1, reason=reason, index=index))
            continue
        start = LEADING_BLANK.match(data).end()
        if data.startswith(b"From ", start):  # an mbox envelope line in front of a saved message
            eol = data.find(b"\n", start)
            start = len(data) if eol < 0 else eol + 1
        stop = header_end(data, start, len(data))
        interaction, reason, _ = read_message(data[start:stop], path=name, index=index, line=1,
                                              max_recipients=max_recipients, notes=notes, where=path.name)
        if interaction is not None:
            result.interactions.append(interaction)
            continue
        if strict:
            raise RecordError(name, reason, 1)
        result.skipped.append(Skipped(source=name, line=1, reason=reason, index=index))
    result.warnings.extend(notes.render(str(folder)))
    return result
