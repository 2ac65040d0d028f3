"""Importers: one entry point that picks the reader by content and suffix.

Each reader takes the file's bytes and its path and returns a
:class:`mynet.model.ParseResult`; it never touches the workspace. A folder of
message files (a Maildir, or saved messages without a suffix) is one source,
read by :mod:`mynet.sources.maildir`.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Iterable, Iterator

from ..errors import InputError, UnknownFormatError
from ..model import ParseResult
from ..safetext import clean_result

__all__ = ["detect_kind", "parse_file", "iter_input_files", "source_digest", "MAX_FILE_BYTES", "KNOWN_SUFFIXES",
           "READERS"]

#: The version of the reader of each source kind. A source read by another version is read again on the
#: next import of the same file, even when its bytes did not change (the store keeps what read it).
READERS = {"mbox": "mail-2", "eml": "mail-2", "maildir": "mail-2", "mailfolder": "mail-2", "ics": "ics-2"}

#: Files larger than this are refused with a clear message (a contact export this
#: big is almost certainly the wrong file). 512 MiB.
MAX_FILE_BYTES = 512 * 1024 * 1024

KNOWN_SUFFIXES = {
    ".vcf": "vcard",
    ".vcard": "vcard",
    ".csv": "csv",
    ".tsv": "csv",
    ".txt": None,  # decided by content
    ".ics": "ics",
    ".ical": "ics",
    ".ifb": "ics",
    ".mbox": "mbox",
    ".eml": "eml",
}


def _sniff(head: bytes) -> str | None:
    """Guess a file's kind from its first bytes."""
    text = head.lstrip(b"\xef\xbb\xbf\xff\xfe\x00\r\n\t ")
    # UTF-16 files: drop NULs so the markers below still show.
    if b"\x00" in head[:200]:
        text = head.replace(b"\x00", b"").lstrip(b"\xef\xbb\xbf\xff\xfe\r\n\t ")
    upper = text[:4096].upper()
    if upper.startswith(b"BEGIN:VCARD") or b"\nBEGIN:VCARD" in upper[:2048]:
        return "vcard"
    if upper.startswith(b"BEGIN:VCALENDAR") or upper.startswith(b"BEGIN:VEVENT"):
        return "ics"
    if text.startswith(b"From ") and b"\n" in text:
        return "mbox"
    from .mbox import looks_like_message

    if looks_like_message(text):
        return "eml"
    return None


def detect_kind(path: str | os.PathLike, head: bytes) -> str:
    """Return the importer name for a file, from its content first, then its suffix.

    Raises
    ------
    UnknownFormatError
        When neither the content nor the suffix says what the file is.
    """
    kind = _sniff(head)
    suffix = Path(path).suffix.lower()
    by_suffix = KNOWN_SUFFIXES.get(suffix)
    if kind == "eml" and by_suffix in ("mbox", "csv"):
        return by_suffix  # header lines alone do not overrule a .mbox (one message) or a .csv name
    if kind:
        return kind
    if by_suffix in ("csv", "eml", "mbox"):
        return by_suffix
    if by_suffix in ("vcard", "ics"):
        raise UnknownFormatError(str(path),
                                 f"has a {suffix} name but no BEGIN:{'VCARD' if by_suffix == 'vcard' else 'VCALENDAR'} "
                                 f"line; it is not a {by_suffix} file")
    if b"\x00" in head[:1024] and not head.startswith((b"\xff\xfe", b"\xfe\xff")):
        raise UnknownFormatError(str(path), "is a binary file, not a contact export (vCard, CSV, iCalendar or mailbox)")
    # Plain text with separators on the first line reads as a table.
    first = head.split(b"\n", 1)[0]
    if any(sep in first for sep in (b",", b";", b"\t", b"|")) or b"\x00" in head[:4]:
        return "csv"
    if head[:2000].lower().startswith((b"from:", b"received:", b"return-path:", b"message-id:", b"date:",
                                       b"delivered-to:")):
        return "eml"
    raise UnknownFormatError(str(path), "is not a vCard, CSV, iCalendar or mailbox file (unknown format)")


def _walk(folder: Path) -> Iterator[Path]:
    """Inputs inside a folder: files with a known suffix, mboxes and single vCard/iCalendar files found by
    content, and folders of message files (each Maildir, and each folder's own suffix-less messages)."""
    from .maildir import is_maildir, message_files, sniff_message

    if is_maildir(folder):
        yield folder
        # Maildir++ keeps subfolders as ".Name" Maildirs inside the top one.
        for sub in sorted(folder.iterdir()):
            if sub.name.startswith(".") and sub.is_dir() and is_maildir(sub):
                yield sub
        return
    try:
        entries = sorted(folder.iterdir())
    except OSError as exc:
        raise InputError(str(folder), f"cannot be read ({exc.strerror})") from exc
    has_messages = False
    for sub in entries:
        if sub.name.startswith("."):
            continue
        if sub.is_dir():
            yield from _walk(sub)
        elif sub.is_file():
            suffix = sub.suffix.lower()
            if suffix in KNOWN_SUFFIXES and suffix != ".txt":
                yield sub
                continue
            if has_messages:
                continue  # the folder's message files are listed (and recognised) once, below
            kind = sniff_message(sub)
            if kind == "mbox":
                yield sub
            elif kind == "message":
                has_messages = True
            elif _sniff(_head(sub)) in ("vcard", "ics"):
                yield sub
    if has_messages:
        listed = set(message_files(folder, _SUFFIXES))
        for sub in entries:
            if sub.is_file() and sub not in listed and not sub.name.startswith(".") \
                    and sub.suffix.lower() not in _SUFFIXES and (sniff_message(sub) == "mbox"
                                                                  or _sniff(_head(sub)) in ("vcard", "ics")):
                yield sub
        if listed:
            yield folder


def _head(path: Path, size: int = 4096) -> bytes:
    try:
        with open(path, "rb") as f:
            return f.read(size)
    except OSError:
        return b""


_SUFFIXES = frozenset(k for k in KNOWN_SUFFIXES if k != ".txt")


def iter_input_files(paths: Iterable[str | os.PathLike]) -> Iterator[Path]:
    """Expand the paths a user gave: files as they are, directories recursively.

    Inside a directory, files with a known suffix are taken, and so are files
    whose content says they are an mbox, a vCard or a calendar; hidden files
    and folders are left out. A Maildir (and each Maildir++ subfolder), and a
    folder's own message files without a suffix, come out as the folder's
    path: one source of many messages (see :mod:`mynet.sources.maildir`).
    Order: each directory's entries sorted by name.
    """
    for p in paths:
        path = Path(p)
        if path.is_dir():
            yield from _walk(path)
        elif path.exists():
            yield path
        else:
            raise InputError(str(path), "no such file or directory")


def source_digest(path: Path, data: bytes | None = None) -> tuple[str, int]:
    """The content hash and size of a source: its bytes, or for a message folder its messages' names and sizes."""
    import hashlib

    if path.is_dir():
        from .maildir import folder_digest, message_files

        return folder_digest(path, message_files(path, _SUFFIXES))
    if data is None:
        data = read_bytes(path)
    return hashlib.sha256(data).hexdigest(), len(data)


def read_bytes(path: Path) -> bytes:
    """Read a whole input file, refusing unreadable or oversized ones clearly."""
    try:
        size = path.stat().st_size
    except OSError as exc:
        raise InputError(str(path), f"cannot be read ({exc.strerror})") from exc
    if size > MAX_FILE_BYTES:
        raise InputError(str(path),
                         f"is {size / 2**20:.0f} MiB, larger than the {MAX_FILE_BYTES // 2**20} MiB limit for one "
                         f"export")
    try:
        return path.read_bytes()
    except OSError as exc:
        raise InputError(str(path), f"cannot be read ({exc.strerror})") from exc


def parse_file(
    path: str | os.PathLike,
    *,
    strict: bool = False,
    mapping: dict[str, str] | None = None,
    data: bytes | None = None,
) -> ParseResult:
    """Parse one file with the importer its content and suffix call for.

    Parameters
    ----------
    path : path-like
        The file. Its text is read here unless ``data`` is given.
    strict : bool
        Raise :class:`mynet.errors.RecordError` at the first malformed record
        instead of skipping it.
    mapping : dict, optional
        CSV only: field name -> column header overrides (``--map``).

    Every text the importer returns is cleaned of control characters here
    (:func:`mynet.safetext.clean_result`), with a warning per changed record.
    """
    path = Path(path)
    if path.is_dir():
        from .maildir import parse_message_folder

        return parse_message_folder(path, strict=strict, known_suffixes=_SUFFIXES)
    if data is None:
        data = read_bytes(path)
    if not data.strip():
        raise InputError(str(path), "is empty")
    kind = detect_kind(path, data[:8192])
    result = _parse_kind(kind, path, data, strict=strict, mapping=mapping)
    clean_result(result)
    return result


def _parse_kind(kind: str, path: Path, data: bytes, *, strict: bool, mapping: dict[str, str] | None) -> ParseResult:
    if kind == "vcard":
        from .vcard import parse_vcard

        return parse_vcard(data, str(path), strict=strict)
    if kind == "csv":
        from .csv import parse_csv

        return parse_csv(data, str(path), strict=strict, mapping=mapping)
    if kind == "ics":
        from .ics import parse_ics

        return parse_ics(data, str(path), strict=strict)
    if kind in ("mbox", "eml"):
        from .mbox import parse_mail

        return parse_mail(data, str(path), strict=strict, single=(kind == "eml"))
    raise UnknownFormatError(str(path), "unknown format")
