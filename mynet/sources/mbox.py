"""Mail importer: the header fields of an mbox file or of one message file.

Only the header block of each message is read (RFC 5322 section 2.2); bodies
are skipped over byte by byte and never decoded, parsed or kept. Each message
becomes one :class:`mynet.model.Interaction` of kind ``"message"``; no
:class:`mynet.model.Record` is produced. Folders of message files (Maildir,
saved messages) are read by :mod:`mynet.sources.maildir` with the same
per-message reader, :func:`read_message`.

Choices made here (the rest of mynet relies on them)
----------------------------------------------------
* An mbox message starts at a line beginning with ``From `` that is the first
  line of the file or follows a blank line, and whose next line looks like a
  header field (``Name:``) or which itself has the usual envelope shape
  (``From sender Mon Jan ...``). This reads mboxo and mboxrd alike: a body line
  ``From ...`` after a non-blank line, or a quoted ``>From ...``, never starts a
  message, and neither does a body paragraph that merely begins with "From".
  The one exception: a whole envelope line (sender and asctime date with its
  year) followed by a header field starts a message even without the blank
  line before it, which files whose line ends were mixed up lose.
* A missing or unreadable ``Date`` keeps the message with ``when=""``; one
  warning per file counts such messages and gives their lines.
* ``when`` is the Date converted to UTC, ``YYYY-MM-DDTHH:MM:SS+00:00``. A
  ``-0000`` zone (RFC 5322 section 3.3: "no information about the local time
  zone") is read as UTC.
* ``key`` is the Message-ID without angle brackets; without one it is
  ``"sha256:"`` and 32 hex digits of the From, Date and Subject fields, so the
  same message imported twice gets the same key. ``thread`` is the first
  Message-ID of References, else of In-Reply-To, else the key; ``in_reply_to``
  is the message answered (In-Reply-To, else the last of References).
* Header bytes that are not UTF-8 (raw 8-bit headers) are read as
  Windows-1252, a superset of Latin-1 for printable text; a warning says so.
* ``participants`` are the author and the addresses of To and Cc (not Bcc,
  not Reply-To), less the addresses that are lists, relays or robots
  (``not_people``, see :func:`mynet.sources.mail_headers.message_roles`);
  the author is the From address, or the original one when a list relay
  rewrote From. ``recipients`` counts To and Cc for the bulk rule.
* A header block of any size is read with bounded memory; a message with more
  than :data:`MAX_KEPT` recipients keeps only the first of them (it is a
  broadcast whatever they are).
* ``bulk`` is set here only for mail no person wrote to the people in it:
  Auto-Submitted other than ``no`` (RFC 3834 section 5), a robot or no-reply
  author, or more recipients than ``max_recipients``. List and bulk-mailer
  mail is only marked (``mass``, ``list_id``): whether anyone answered is
  known once every mailbox is read (see :mod:`mynet.people.correspondence`).
"""

from __future__ import annotations

import hashlib
import re
from datetime import timezone
from email.utils import parsedate_to_datetime

from ..errors import InputError, RecordError
from ..model import Interaction, ParseResult, Skipped
from .mail_headers import (
    FIELD_CAP,
    Fields,
    addresses,
    decode_words,
    first_id,
    last_id,
    message_roles,
    read_fields,
)

__all__ = ["parse_mail", "decode_words", "bulk_reason", "iter_mbox_messages", "read_message", "looks_like_message",
           "MAX_KEPT", "FIELD_CAP"]

#: A message to more people than this keeps only the first of them as participants.
MAX_KEPT = 200

_BOM = b"\xef\xbb\xbf"
_LONE_CR = re.compile(rb"\r(?!\n)")
LEADING_BLANK = re.compile(rb"[\r\n]*")
_FROM_CANDIDATE = re.compile(rb"^From ", re.M)
# RFC 5322 section 3.6.8: a field name is printable US-ASCII except ":";
# whitespace before the colon is the obsolete syntax of section 4.5.
_HEADER_LINE = re.compile(rb"[!-9;-~]+[ \t]*:")
_ENVELOPE = re.compile(rb"From \S+[ \t]+(?:Mon|Tue|Wed|Thu|Fri|Sat|Sun)\b")
_BLANK_LINE = re.compile(rb"\n\r?\n")
# The whole envelope line as mbox writers put it (asctime: "Mon Jan  5 10:00:00 2026",
# an optional zone before the year): strong enough to open a message even where the
# blank line before it was lost (a file whose line ends were mixed up on the way).
_FULL_ENVELOPE = re.compile(
    rb"From \S+[ \t]+(?:Mon|Tue|Wed|Thu|Fri|Sat|Sun)[ \t]+"
    rb"(?:Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec)[ \t]+\d{1,2}[ \t]+"
    rb"\d{1,2}:\d{2}(?::\d{2})?(?:[ \t]+[A-Za-z0-9+-]+)?[ \t]+\d{4}[ \t]*\r?\n"
)


def _squash(text: str) -> str:
    """Collapse runs of whitespace (folding, tabs) to one space."""
    return " ".join(text.split())


# --------------------------------------------------------------------------
# Splitting an mbox
# --------------------------------------------------------------------------


def iter_mbox_messages(data: bytes):
    """Find the messages of an mbox, streaming once through the bytes.

    A message starts at a ``From `` line that opens the file or follows a blank
    line, and whose next line is a header field or which has the envelope
    shape ``From <sender> <weekday> ...`` (see the module notes). A whole
    envelope line (``From <sender> <asctime date>``) followed by a header field
    opens a message even without the blank line before it, which is lost when
    a file's line ends were mixed (a CR alone before an LF that ended the blank
    line reads as one CR LF).

    Parameters
    ----------
    data : bytes
        The whole mbox, without a byte-order mark.

    Yields
    ------
    tuple of int
        ``(line, header_start, end)``: the 1-based line of the ``From `` line,
        the offset just after it and the offset where the message ends.
    """
    lead_end = LEADING_BLANK.match(data).end()
    line, counted_to = 1, 0
    pending: tuple[int, int] | None = None
    for match in _FROM_CANDIDATE.finditer(data):
        pos = match.start()
        eol = data.find(b"\n", pos)
        after = len(data) if eol < 0 else eol + 1
        after_blank = pos == lead_end or data[pos - 2 : pos] == b"\n\n" or data[pos - 3 : pos] == b"\n\r\n"
        if not after_blank and not (_FULL_ENVELOPE.match(data, pos) and _HEADER_LINE.match(data, after)):
            continue
        if not (_HEADER_LINE.match(data, after) or _ENVELOPE.match(data, pos)):
            continue
        line += data.count(b"\n", counted_to, pos)
        counted_to = pos
        if pending is not None:
            yield pending[0], pending[1], pos
        pending = (line, after)
    if pending is not None:
        yield pending[0], pending[1], len(data)


def header_end(data: bytes, start: int, end: int) -> int:
    """Offset just past the header block starting at ``start`` (before ``end``)."""
    if data.startswith(b"\n", start) or data.startswith(b"\r\n", start):
        return start
    found = _BLANK_LINE.search(data, start, end)
    return found.start() + 1 if found else end


# --------------------------------------------------------------------------
# From header fields to an interaction
# --------------------------------------------------------------------------


def _when(values: list[str]) -> str | None:
    """UTC ISO 8601 of the first Date field; ``None`` when absent or unreadable."""
    if not values or not values[0].strip():
        return None
    try:
        moment = parsedate_to_datetime(values[0])
        if moment.tzinfo is None:  # "-0000": UTC, zone unknown (RFC 5322 3.3)
            moment = moment.replace(tzinfo=timezone.utc)
        return moment.astimezone(timezone.utc).isoformat(timespec="seconds")
    except (TypeError, ValueError, IndexError, OverflowError):
        return None


def bulk_reason(fields: Fields | dict[str, list[str]], recipients: int, max_recipients: int = 25) -> str:
    """Say why a message is bulk whatever its thread, or return ``""``.

    Parameters
    ----------
    fields : Fields or dict
        The message's fields (lower-case name -> list of values).
    recipients : int
        Number of distinct To and Cc addresses.
    max_recipients : int
        More recipients than this make a message bulk.

    Returns
    -------
    str
        ``"Auto-Submitted: <value>"`` for an automatic message (RFC 3834
        section 5: any value other than ``no``), ``"N recipients (more than
        M)"`` for a broadcast, else ``""``. List fields and Precedence do not
        make a message bulk by themselves: a list thread someone answered is a
        discussion (see :mod:`mynet.people.correspondence`).
    """
    get = fields.get
    for value in get("auto-submitted") or []:
        word = value.split(";", 1)[0].strip().lower()
        if word and word != "no":
            return f"Auto-Submitted: {word}"
    if recipients > max_recipients:
        return f"{recipients} recipients (more than {max_recipients})"
    return ""


class MessageNotes:
    """File-level warnings, one per kind of problem, listing the lines (or, in a folder, the files)."""

    def __init__(self) -> None:
        self.lines: dict[str, list[int | str]] = {}

    def add(self, what: str, where: int | str) -> None:
        self.lines.setdefault(what, []).append(where)

    def render(self, path: str) -> list[str]:
        out = []
        for what, lines in self.lines.items():
            shown = ", ".join(str(n) for n in lines[:10]) + (", ..." if len(lines) > 10 else "")
            plural = "message" if len(lines) == 1 else "messages"
            unit = "line" if isinstance(lines[0], int) else "in"
            out.append(f"{path}: {len(lines)} {plural} with {what} ({unit} {shown})")
        return out


def read_message(
    block: bytes,
    *,
    path: str,
    index: int,
    line: int,
    max_recipients: int,
    notes: MessageNotes,
    where: str = "",
) -> tuple[Interaction | None, str, bool]:
    """Read one header block: ``(interaction or None, skip reason, has mail fields)``.

    ``where`` names the message in notes (a file name in a folder); by default its line.
    """
    at: int | str = where or line
    if not block.strip():
        return None, "message has no header fields", False
    fields = read_fields(block)
    if fields.latin:
        notes.add("header bytes that are not UTF-8, read as Windows-1252", at)
    if fields.defect:
        notes.add("a line in the header block that is not a header field; the fields after it are ignored", at)
    senders, bad_from = addresses(fields.get("from"))
    recipients, bad_to = addresses(fields.get("to") + fields.get("cc"))
    if bad_from or bad_to:
        notes.add("an address that is not an e-mail address, left out", at)
    if not senders and not recipients:
        return None, "message has no From, To or Cc address", fields.is_mail
    when = _when(fields.get("date"))
    if when is None:
        what = "no Date" if not fields.get("date") else "a Date that cannot be read"
        notes.add(f"{what}, kept without a date", at)
        when = ""
    subject = _squash(decode_words((fields.get("subject") or [""])[0]))
    key = first_id((fields.get("message-id") or [""])[0])
    if not key:
        basis = "\x00".join(_squash((fields.get(n) or [""])[0]) for n in ("from", "date", "subject"))
        key = "sha256:" + hashlib.sha256(basis.encode("utf-8", errors="surrogatepass")).hexdigest()[:32]
    references = " ".join(fields.get("references"))
    replying = " ".join(fields.get("in-reply-to"))
    thread = first_id(references) or first_id(replying) or key
    parent = first_id(replying) or last_id(references)
    roles = message_roles(fields, senders, recipients)
    recipients = [(n, roles.rewritten.get(a, a)) for n, a in recipients]
    n_recipients = len({addr for _, addr in recipients})
    if fields.counted:  # cut fields: their addresses are counted in full, not parsed
        in_cut = {addr for value in fields.cut for _, addr in addresses([value])[0]}
        n_recipients += sum(fields.counted.values()) - len(in_cut)
    if fields.counted:
        notes.add(f"a To or Cc field over {FIELD_CAP // 1024} KiB; only its first addresses were kept", at)
    author_name, author = roles.author
    names: dict[str, str] = {}
    if author and author_name and author not in roles.not_people:
        names[author] = author_name
    kept = [(n, a) for n, a in recipients if a not in roles.not_people][:MAX_KEPT]
    for name, addr in senders[:1] + kept:
        if name and addr not in names and addr not in roles.not_people:
            names[addr] = name
    people = {addr for _, addr in kept} | ({author} if author and author not in roles.not_people else set())
    reason = bulk_reason(fields, n_recipients, max_recipients)
    if not reason and author and roles.not_people.get(author) in ("machine", "bot", "feed"):
        reason = "automated sender"
    interaction = Interaction(
        kind="message",
        source=path,
        index=index,
        line=line,
        when=when,
        key=key,
        thread=thread,
        title=subject,
        sender=author,
        participants=sorted(people),
        names=names,
        bulk=bool(reason),
        in_reply_to=parent if parent != key else "",
        list_id=roles.list_id,
        mass=roles.mass,
        recipients=n_recipients,
        not_people=dict(sorted(roles.not_people.items())),
    )
    return interaction, "", fields.is_mail


def _message(data: bytes, start: int, end: int, **kw) -> tuple[Interaction | None, str, bool]:
    stop = header_end(data, start, end)
    if stop == start:
        return None, "message has no header fields", False
    return read_message(data[start:stop], **kw)


def looks_like_message(data: bytes, start: int = 0) -> bool:
    """Whether a header block with at least one field only mail has starts at ``start``."""
    if not _HEADER_LINE.match(data, start):
        return False
    stop = header_end(data, start, min(len(data), start + 4 * FIELD_CAP))
    return read_fields(data[start:stop]).is_mail


def parse_mail(
    data: bytes,
    path: str,
    *,
    strict: bool = False,
    single: bool = False,
    max_recipients: int = 25,
) -> ParseResult:
    """Read the header fields of the messages of an mbox file or one ``.eml``.

    Parameters
    ----------
    data : bytes
        The file's bytes.
    path : str
        The file's path, used in messages and provenance.
    strict : bool
        Raise :class:`mynet.errors.RecordError` at the first message that would
        be skipped instead of skipping it.
    single : bool
        The file is one message (``.eml``), not an mbox.
    max_recipients : int
        A message with more distinct To and Cc addresses than this is bulk.

    Returns
    -------
    ParseResult
        ``kind`` ``"mbox"`` or ``"eml"``; one ``Interaction(kind="message")``
        per readable message in ``interactions`` (bulk mail included, with
        ``bulk=True``), unreadable ones in ``skipped``, no records.

    Raises
    ------
    InputError
        The file is empty or is not mail at all.
    RecordError
        In strict mode, at the first message without any address.
    """
    result = ParseResult(path=path, kind="eml" if single else "mbox")
    if data.startswith(_BOM):
        data = data[len(_BOM):]
    if not data.strip():
        raise InputError(path, "is empty")
    if b"\r" in data and _LONE_CR.search(data):
        # Lines ended by CR alone (old Mac files, or mixed within one file) and by CR CR LF are read as one
        # line end each, so line numbers stay those of the file.
        data = _LONE_CR.sub(b"\n", data.replace(b"\r\r\n", b"\r\n"))
    lead = LEADING_BLANK.match(data).end()
    if single:
        start = lead
        if data.startswith(b"From ", lead) and not _HEADER_LINE.match(data, lead):
            eol = data.find(b"\n", lead)  # an mbox envelope line in front of a message
            start = len(data) if eol < 0 else eol + 1
        if not looks_like_message(data, start):
            raise InputError(path,
                             "is not an e-mail message (it does not start with header fields such as From:, To: or "
                             "Date:)")
        spans = iter([(1, start, len(data))])
    else:
        spans = iter_mbox_messages(data)
        first = next(spans, None)
        if first is None:
            if not looks_like_message(data, lead):
                raise InputError(path,
                                 "is not a mailbox (no line starting with 'From ' opens a message, and it does not "
                                 "start with mail header fields)")
            result.warnings.append(f"{path}: has no 'From ' separator line; read as a single message")
            spans = iter([(1, lead, len(data))])
        else:
            from_start = data.rfind(b"\n", 0, max(first[1] - 1, 0)) + 1
            if data[lead:from_start].strip():
                result.warnings.append(f"{path}: text before the first 'From ' line (line {first[0]}) is ignored")
            spans = _chain(first, spans)

    notes = MessageNotes()
    any_mail = False
    for index, (line, start, end) in enumerate(spans):
        interaction, reason, is_mail = _message(
            data, start, end, path=path, index=index, line=line, max_recipients=max_recipients, notes=notes
        )
        any_mail = any_mail or is_mail
        if interaction is not None:
            result.interactions.append(interaction)
            continue
        if strict:
            raise RecordError(path, reason, line)
        result.skipped.append(Skipped(source=path, line=line, reason=reason, index=index))
    if not any_mail:
        raise InputError(path, "is not mail: no message in it has header fields such as From:, To: or Date:")
    result.warnings.extend(notes.render(path))
    return result


def _chain(first, rest):
    yield first
    yield from rest
