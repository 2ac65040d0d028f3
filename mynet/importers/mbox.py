"""Mail importer: the header fields of an mbox file or of one ``.eml`` message.

Only the header block of each message is read (RFC 5322 section 2.2); bodies
are skipped over byte by byte and never decoded, parsed or kept. Each message
becomes one :class:`mynet.model.Interaction` of kind ``"message"``; no
:class:`mynet.model.Record` is produced.

Choices made here (the rest of mynet relies on them)
----------------------------------------------------
* An mbox message starts at a line beginning with ``From `` that is the first
  line of the file or follows a blank line, and whose next line looks like a
  header field (``Name:``) or which itself has the usual envelope shape
  (``From sender Mon Jan ...``). This reads mboxo and mboxrd alike: a body line
  ``From ...`` after a non-blank line, or a quoted ``>From ...``, never starts a
  message, and neither does a body paragraph that merely begins with "From".
* A missing or unreadable ``Date`` keeps the message with ``when=""``; one
  warning per file counts such messages and gives their lines.
* ``when`` is the Date converted to UTC, ``YYYY-MM-DDTHH:MM:SS+00:00``. A
  ``-0000`` zone (RFC 5322 section 3.3: "no information about the local time
  zone") is read as UTC.
* ``key`` is the Message-ID without angle brackets; without one it is
  ``"sha256:"`` and 32 hex digits of the From, Date and Subject fields, so the
  same message imported twice gets the same key.
* Header bytes that are not UTF-8 (raw 8-bit headers) are read as
  Windows-1252, a superset of Latin-1 for printable text; a warning says so.
* ``participants`` are the addresses of From, To and Cc (not Bcc, not
  Reply-To); the recipient count for the bulk rule counts To and Cc.
"""

from __future__ import annotations

import codecs
import hashlib
import re
from functools import lru_cache
from datetime import timezone
from email.errors import HeaderParseError
from email.header import decode_header
from email.parser import BytesHeaderParser
from email.policy import compat32
from email.utils import getaddresses, parsedate_to_datetime

from ..errors import InputError, RecordError
from ..model import Interaction, ParseResult, Skipped

__all__ = ["parse_mail", "decode_words", "bulk_reason", "iter_mbox_messages", "MAX_HEADER_BYTES"]

#: A header block larger than this is refused (the message is skipped): real
#: header blocks are a few kilobytes, a larger one means a missing blank line.
MAX_HEADER_BYTES = 1024 * 1024

_BOM = b"\xef\xbb\xbf"
_LEADING_BLANK = re.compile(rb"[\r\n]*")
_FROM_CANDIDATE = re.compile(rb"^From ", re.M)
# RFC 5322 section 3.6.8: a field name is printable US-ASCII except ":";
# whitespace before the colon is the obsolete syntax of section 4.5.
_HEADER_LINE = re.compile(rb"[!-9;-~]+[ \t]*:")
_ENVELOPE = re.compile(rb"From \S+[ \t]+(?:Mon|Tue|Wed|Thu|Fri|Sat|Sun)\b")
_BLANK_LINE = re.compile(rb"\n\r?\n")
_LINE_BREAK = re.compile(r"\r\n|\r|\n")
_ENCODED_WORD = re.compile(r"=\?[^?\s]+\?[qQbB]\?[^?\s]*\?=")
_MSG_ID = re.compile(r"<\s*([^<>\s]+?)\s*>")
_ADDRESS = re.compile(r"[^\s@<>,;:\"]+@[^\s@<>,;:\"]+")
_PARSER = BytesHeaderParser(policy=compat32)

#: Field names that only mail has; a file with none of them is not mail.
_MAIL_FIELDS = frozenset(
    "from to cc bcc date subject message-id received return-path sender reply-to in-reply-to "
    "references mime-version delivered-to x-mailer list-id".split()
)
_BULK_PRECEDENCE = frozenset({"bulk", "list", "junk"})
_UNKNOWN_CHARSETS = frozenset({"", "unknown-8bit", "x-unknown", "unknown"})


# --------------------------------------------------------------------------
# Encoded words (RFC 2047)
# --------------------------------------------------------------------------


def _decode_part(raw: bytes | str, charset: str | None) -> str:
    """Decode one piece returned by :func:`email.header.decode_header`."""
    if isinstance(raw, str):
        return raw
    if charset is None:
        # decode_header turns plain text between encoded words into bytes with
        # the raw-unicode-escape codec; this undoes it exactly.
        return raw.decode("raw-unicode-escape", errors="replace")
    name = charset.split("*", 1)[0].strip().lower()  # RFC 2231 adds "*language"
    if name not in _UNKNOWN_CHARSETS:
        try:
            codecs.lookup(name)
            return raw.decode(name, errors="replace")
        except (LookupError, ValueError):  # unknown charset, or not a text codec
            pass
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError:
        return raw.decode("cp1252", errors="replace")


def _decode_each(text: str) -> str:
    """Decode encoded words one at a time, keeping malformed ones as written."""
    out: list[str] = []
    pos, previous_ok = 0, False
    for match in _ENCODED_WORD.finditer(text):
        gap, word = text[pos : match.start()], match.group(0)
        try:
            decoded = "".join(_decode_part(raw, cs) for raw, cs in decode_header(word))
        except (HeaderParseError, ValueError, LookupError, UnicodeError):
            decoded = None
        if not (previous_ok and decoded is not None and not gap.strip()):
            out.append(gap)  # whitespace between two good words goes (RFC 2047 6.2)
        out.append(word if decoded is None else decoded)
        pos, previous_ok = match.end(), decoded is not None
    out.append(text[pos:])
    return "".join(out)


def decode_words(text: str) -> str:
    """Decode the RFC 2047 encoded words of a header value.

    Whitespace between two adjacent encoded words is dropped (RFC 2047
    section 6.2); text outside encoded words is kept as it is. A malformed
    encoded word is left as written and an unknown charset falls back to UTF-8,
    then Windows-1252, so this never raises.

    Parameters
    ----------
    text : str
        An unfolded header value (or a display name taken from one).

    Returns
    -------
    str
        The decoded text.
    """
    if "=?" not in text:
        return text
    try:
        return "".join(_decode_part(raw, cs) for raw, cs in decode_header(text))
    except (HeaderParseError, ValueError, LookupError, UnicodeError):
        # One bad word spoils decode_header for the whole value: decode the
        # words one at a time, keeping the bad ones as written.
        return _decode_each(text)


def _squash(text: str) -> str:
    """Collapse runs of whitespace (folding, tabs) to one space."""
    return " ".join(text.split())


# --------------------------------------------------------------------------
# Splitting an mbox and reading one header block
# --------------------------------------------------------------------------


def iter_mbox_messages(data: bytes):
    """Find the messages of an mbox, streaming once through the bytes.

    A message starts at a ``From `` line that opens the file or follows a blank
    line, and whose next line is a header field or which has the envelope
    shape ``From <sender> <weekday> ...`` (see the module notes).

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
    lead_end = _LEADING_BLANK.match(data).end()
    line, counted_to = 1, 0
    pending: tuple[int, int] | None = None
    for match in _FROM_CANDIDATE.finditer(data):
        pos = match.start()
        if pos != lead_end and data[pos - 2 : pos] != b"\n\n" and data[pos - 3 : pos] != b"\n\r\n":
            continue
        eol = data.find(b"\n", pos)
        after = len(data) if eol < 0 else eol + 1
        if not (_HEADER_LINE.match(data, after) or _ENVELOPE.match(data, pos)):
            continue
        line += data.count(b"\n", counted_to, pos)
        counted_to = pos
        if pending is not None:
            yield pending[0], pending[1], pos
        pending = (line, after)
    if pending is not None:
        yield pending[0], pending[1], len(data)


def _header_end(data: bytes, start: int, end: int) -> int:
    """Offset just past the header block starting at ``start`` (before ``end``)."""
    if data.startswith(b"\n", start) or data.startswith(b"\r\n", start):
        return start
    found = _BLANK_LINE.search(data, start, end)
    return found.start() + 1 if found else end


def _text_of(value: str) -> tuple[str, bool]:
    """Turn a raw header value into text; say whether it was non-UTF-8 8-bit."""
    value = _LINE_BREAK.sub("", value)  # unfold (RFC 5322 section 2.2.3)
    if value.isascii():
        return value, False
    raw = value.encode("utf-8", errors="surrogateescape")
    try:
        return raw.decode("utf-8"), False
    except UnicodeDecodeError:
        return raw.decode("cp1252", errors="replace"), True


def _read_headers(block: bytes) -> tuple[dict[str, list[str]], bool, bool]:
    """Parse a header block into ``{lower-case name: [unfolded values]}``.

    Returns the fields, whether some bytes were not UTF-8, and whether the
    parser met a line that is not a header field (the rest of the block is then
    lost, as in any RFC 5322 reader).
    """
    msg = _PARSER.parsebytes(block)
    fields: dict[str, list[str]] = {}
    latin = False
    for name, value in msg.raw_items():
        text, was_latin = _text_of(value)
        latin = latin or was_latin
        fields.setdefault(name.strip().lower(), []).append(text.strip())
    return fields, latin, bool(msg.defects)


# --------------------------------------------------------------------------
# From header fields to an interaction
# --------------------------------------------------------------------------


@lru_cache(maxsize=4096)
def _parse_field(value: str) -> tuple[tuple[tuple[str, str], ...], int]:
    """Addresses of one field value (cached: the same To or From recurs a lot)."""
    pairs: list[tuple[str, str]] = []
    bad = 0
    for name, addr in getaddresses([value]):
        addr = addr.strip().lower()
        if not addr:
            continue  # group syntax such as "undisclosed-recipients:;"
        if not _ADDRESS.fullmatch(addr):
            bad += 1
            continue
        name = _squash(decode_words(name)).strip("\"' ")
        if name.lower() == addr:
            name = ""
        pairs.append((name, addr))
    return tuple(pairs), bad


def _addresses(values: list[str]) -> tuple[list[tuple[str, str]], int]:
    """``(display name, lower-case address)`` pairs, and how many were not addresses."""
    pairs: list[tuple[str, str]] = []
    bad = 0
    for value in values:
        found, wrong = _parse_field(value)
        pairs.extend(found)
        bad += wrong
    return pairs, bad


def _first_id(value: str) -> str:
    """The first Message-ID in a field, without angle brackets."""
    found = _MSG_ID.search(value)
    if found:
        return found.group(1)
    tokens = value.split()
    return tokens[0].strip("<>") if tokens else ""


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


def bulk_reason(fields: dict[str, list[str]], recipients: int, max_recipients: int = 25) -> str:
    """Say why a message looks like bulk mail, or return ``""``.

    Parameters
    ----------
    fields : dict
        Lower-case field name -> list of values, as read from the header block.
    recipients : int
        Number of distinct To and Cc addresses.
    max_recipients : int
        More recipients than this make a message bulk.

    Returns
    -------
    str
        The first rule that matched (List-Id, List-Unsubscribe, Precedence,
        Auto-Submitted other than ``no`` (RFC 3834 section 5), too many
        recipients), or ``""``.
    """
    if any(v.strip() for v in fields.get("list-id", [])):
        return "List-Id header"
    if any(v.strip() for v in fields.get("list-unsubscribe", [])):
        return "List-Unsubscribe header"
    for value in fields.get("precedence", []):
        if value.strip().lower() in _BULK_PRECEDENCE:
            return f"Precedence: {value.strip().lower()}"
    for value in fields.get("auto-submitted", []):
        word = value.split(";", 1)[0].strip().lower()
        if word and word != "no":
            return f"Auto-Submitted: {word}"
    if recipients > max_recipients:
        return f"{recipients} recipients (more than {max_recipients})"
    return ""


class _Notes:
    """File-level warnings, one per kind of problem, listing the lines."""

    def __init__(self) -> None:
        self.lines: dict[str, list[int]] = {}

    def add(self, what: str, line: int) -> None:
        self.lines.setdefault(what, []).append(line)

    def render(self, path: str) -> list[str]:
        out = []
        for what, lines in self.lines.items():
            shown = ", ".join(str(n) for n in lines[:10]) + (", ..." if len(lines) > 10 else "")
            plural = "message" if len(lines) == 1 else "messages"
            out.append(f"{path}: {len(lines)} {plural} with {what} (line {shown})")
        return out


def _message(
    data: bytes,
    start: int,
    end: int,
    *,
    path: str,
    index: int,
    line: int,
    max_recipients: int,
    notes: _Notes,
) -> tuple[Interaction | None, str, bool]:
    """Read one message: ``(interaction or None, skip reason, has mail fields)``."""
    stop = _header_end(data, start, end)
    if stop - start > MAX_HEADER_BYTES:
        return None, f"header block is larger than {MAX_HEADER_BYTES // 1024} KiB (no blank line after the headers?)", False
    if stop == start:
        return None, "message has no header fields", False
    fields, latin, defects = _read_headers(data[start:stop])
    is_mail = not _MAIL_FIELDS.isdisjoint(fields)
    if latin:
        notes.add("header bytes that are not UTF-8, read as Windows-1252", line)
    if defects:
        notes.add("a line in the header block that is not a header field; the fields after it are ignored", line)
    senders, bad_from = _addresses(fields.get("from", []))
    recipients, bad_to = _addresses(fields.get("to", []) + fields.get("cc", []))
    if bad_from or bad_to:
        notes.add("an address that is not an e-mail address, left out", line)
    if not senders and not recipients:
        return None, "message has no From, To or Cc address", is_mail
    when = _when(fields.get("date", []))
    if when is None:
        what = "no Date" if not fields.get("date") else "a Date that cannot be read"
        notes.add(f"{what}, kept without a date", line)
        when = ""
    subject = _squash(decode_words(fields.get("subject", [""])[0]))
    key = _first_id(fields.get("message-id", [""])[0])
    if not key:
        basis = "\x00".join(_squash(fields.get(n, [""])[0]) for n in ("from", "date", "subject"))
        key = "sha256:" + hashlib.sha256(basis.encode("utf-8", errors="surrogatepass")).hexdigest()[:32]
    thread = _first_id(" ".join(fields.get("references", []))) or _first_id(" ".join(fields.get("in-reply-to", []))) or key
    names: dict[str, str] = {}
    for name, addr in senders + recipients:
        if name and addr not in names:
            names[addr] = name
    n_recipients = len({addr for _, addr in recipients})
    interaction = Interaction(
        kind="message",
        source=path,
        index=index,
        line=line,
        when=when,
        key=key,
        thread=thread,
        title=subject,
        sender=senders[0][1] if senders else "",
        participants=sorted({addr for _, addr in senders + recipients}),
        names=names,
        bulk=bool(bulk_reason(fields, n_recipients, max_recipients)),
    )
    return interaction, "", is_mail


def _looks_like_headers(data: bytes, start: int) -> bool:
    """Whether a header block with at least one mail field starts at ``start``."""
    if not _HEADER_LINE.match(data, start):
        return False
    stop = min(_header_end(data, start, len(data)), start + MAX_HEADER_BYTES)
    fields, _, _ = _read_headers(data[start:stop])
    return not _MAIL_FIELDS.isdisjoint(fields)


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
    lead = _LEADING_BLANK.match(data).end()
    if single:
        start = lead
        if data.startswith(b"From ", lead) and not _HEADER_LINE.match(data, lead):
            eol = data.find(b"\n", lead)  # an mbox envelope line in front of a message
            start = len(data) if eol < 0 else eol + 1
        if not _looks_like_headers(data, start):
            raise InputError(path, "is not an e-mail message (it does not start with header fields such as From:, To: or Date:)")
        spans = iter([(1, start, len(data))])
    else:
        spans = iter_mbox_messages(data)
        first = next(spans, None)
        if first is None:
            if not _looks_like_headers(data, lead):
                raise InputError(path, "is not a mailbox (no line starting with 'From ' opens a message, and it does not start with mail header fields)")
            result.warnings.append(f"{path}: has no 'From ' separator line; read as a single message")
            spans = iter([(1, lead, len(data))])
        else:
            from_start = data.rfind(b"\n", 0, max(first[1] - 1, 0)) + 1
            if data[lead:from_start].strip():
                result.warnings.append(f"{path}: text before the first 'From ' line (line {first[0]}) is ignored")
            spans = _chain(first, spans)

    notes = _Notes()
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
