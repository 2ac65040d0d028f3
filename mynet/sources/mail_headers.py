"""Reading one message's header block: fields, addresses, and what the list fields say.

Only the header block is read (RFC 5322 section 2.2); the caller hands in its
bytes. Memory stays bounded whatever the size of a field: the fields mynet
does not use are skipped without being copied, and a used field longer than
:data:`FIELD_CAP` is cut (an address field is still counted in full, so a
message to 100,000 people is known to be a broadcast).
"""

from __future__ import annotations

import codecs
import re
from dataclasses import dataclass, field
from email.errors import HeaderParseError
from email.header import decode_header
from email.utils import getaddresses
from functools import lru_cache

from .mailaddr import list_local, machine_kind, reverse_relay, via_name

__all__ = ["decode_words", "read_fields", "Fields", "addresses", "first_id", "last_id", "MessageRoles",
           "message_roles", "FIELD_CAP"]

#: A used field is kept up to this many bytes (a longer address field is counted in full, then cut).
FIELD_CAP = 64 * 1024

_UNKNOWN_CHARSETS = frozenset({"", "unknown-8bit", "x-unknown", "unknown"})
_ENCODED_WORD = re.compile(r"=\?[^?\s]+\?[qQbB]\?[^?\s]*\?=")
_LINE_BREAK = re.compile(r"\r\n|\r|\n")
_MSG_ID = re.compile(r"<\s*([^<>\s]+?)\s*>")
_ADDRESS = re.compile(r"[^\s@<>,;:\"]+@[^\s@<>,;:\"]+")
_ADDRESS_B = re.compile(rb"[^\s@<>,;:\"()]+@[^\s@<>,;:\"()]+")
# RFC 5322 section 3.6.8: a field name is printable US-ASCII except ":"; whitespace before the colon is
# the obsolete syntax of section 4.5. A field runs on over folded lines that start with a space or tab
# (section 2.2.3).
_FIELD = re.compile(rb"([!-9;-~]+)[ \t]*:([^\n]*(?:\n[ \t][^\n]*)*)(?:\n|\Z)")
_MAILTO = re.compile(r"<\s*mailto:([^>?\s]+)", re.IGNORECASE)

#: Field names that only mail has; a header block with none of them is not mail.
MAIL_FIELDS = frozenset(
    "from to cc bcc date subject message-id received return-path sender reply-to in-reply-to "
    "references mime-version delivered-to x-mailer list-id".split()
)
#: The fields mynet reads; every other field is skipped without being copied.
USED = frozenset(
    "from to cc date subject message-id in-reply-to references sender reply-to x-original-from precedence "
    "auto-submitted list-id list-post list-help list-subscribe list-unsubscribe list-owner list-archive "
    "mailing-list x-mailing-list".split()
)


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
# The fields of one header block
# --------------------------------------------------------------------------


@dataclass
class Fields:
    """The used fields of one header block, decoded and unfolded: lower-case name -> values."""

    values: dict[str, list[str]] = field(default_factory=dict)
    is_mail: bool = False  # a field only mail has was seen (used or not)
    latin: bool = False  # some bytes were not UTF-8 and were read as Windows-1252
    defect: bool = False  # a line that is not a header field ended the block early
    counted: dict[str, int] = field(default_factory=dict)  # address fields cut short: name -> addresses seen
    cut: list[str] = field(default_factory=list)  # the (decoded) values of the address fields cut short

    def get(self, name: str) -> list[str]:
        return self.values.get(name, [])


def _text_of(raw: bytes) -> tuple[str, bool]:
    """Decode and unfold a raw field value (RFC 5322 section 2.2.3); say whether it was 8-bit non-UTF-8."""
    if raw.isascii():
        text, latin = raw.decode("ascii"), False
    else:
        try:
            text, latin = raw.decode("utf-8"), False
        except UnicodeDecodeError:
            text, latin = raw.decode("cp1252", errors="replace"), True
    return _LINE_BREAK.sub("", text).strip(), latin


def _cut_addresses(raw: bytes) -> bytes:
    """The head of a long address field, cut after the last complete address before the cap."""
    head = raw[:FIELD_CAP]
    comma = head.rfind(b",")
    return head[:comma] if comma > 0 else head


def read_fields(block: bytes) -> Fields:
    """Read the fields mynet uses from one header block (bytes up to the blank line).

    A line that is neither a field nor a folded continuation ends the block
    (``defect``), as in any RFC 5322 reader: the fields after it are lost.
    """
    out = Fields()
    pos, size = 0, len(block)
    if block[:1] in (b" ", b"\t"):  # a continuation with no field to continue
        out.defect = True
        return out
    while pos < size:
        m = _FIELD.match(block, pos)
        if m is None:
            if block[pos:].strip():
                out.defect = True
            break
        name = m.group(1).decode("ascii").lower()
        pos = m.end()
        if name in MAIL_FIELDS:
            out.is_mail = True
        if name not in USED:
            continue
        start, end = m.span(2)
        if end - start > FIELD_CAP:
            if name in ("to", "cc"):
                out.counted[name] = out.counted.get(name, 0) + sum(1 for _ in _ADDRESS_B.finditer(block, start, end))
                raw = _cut_addresses(block[start:end])
            else:
                raw = block[start:start + FIELD_CAP]
        else:
            raw = m.group(2)
        text, latin = _text_of(raw)
        out.latin = out.latin or latin
        out.values.setdefault(name, []).append(text)
        if end - start > FIELD_CAP and name in ("to", "cc"):
            out.cut.append(text)
    return out


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


def addresses(values: list[str]) -> tuple[list[tuple[str, str]], int]:
    """``(display name, lower-case address)`` pairs of some field values, and how many were not addresses."""
    pairs: list[tuple[str, str]] = []
    bad = 0
    for value in values:
        found, wrong = _parse_field(value)
        pairs.extend(found)
        bad += wrong
    return pairs, bad


def first_id(value: str) -> str:
    """The first Message-ID in a field, without angle brackets."""
    found = _MSG_ID.search(value)
    if found:
        return found.group(1)
    tokens = value.split()
    return tokens[0].strip("<>") if tokens else ""


def last_id(value: str) -> str:
    """The last Message-ID in a field (References ends with the parent, RFC 5322 section 3.6.4)."""
    found = _MSG_ID.findall(value)
    if found:
        return found[-1]
    tokens = value.split()
    return tokens[-1].strip("<>") if tokens else ""


# --------------------------------------------------------------------------
# Lists, relays and robots in one message
# --------------------------------------------------------------------------


@dataclass
class MessageRoles:
    """Who wrote one message and which of its addresses are not people."""

    author: tuple[str, str]  # (display name, address) after undoing a relay; ("", "") when unknown
    not_people: dict[str, str]  # address -> kind ("list", "relay", "machine", "bot", "feed", "role")
    list_id: str  # the list the message went through, "" for direct mail
    mass: bool  # sent through a list or bulk mailer (list fields or Precedence)
    rewritten: dict[str, str]  # relay form -> original address, for To and Cc


def _list_id(value: str) -> str:
    """The identifier of a List-Id field (RFC 2919 section 3: ``[phrase] <list-label.namespace>``)."""
    found = _MSG_ID.search(value)
    token = found.group(1) if found else (value.split()[-1] if value.split() else "")
    return token.strip().strip("<>").lower()


def _list_base(addr: str) -> str:
    """The posting address behind a list manager's address (``dev-owner@x`` -> ``dev@x``)."""
    local, _, domain = addr.rpartition("@")
    local = local.split("+", 1)[0]
    local = re.sub(r"^owner-", "", local)
    local = re.sub(r"-(?:owner|bounces?|request|admin)$", "", local)
    return f"{local}@{domain}"


def message_roles(fields: Fields, senders: list[tuple[str, str]], recipients: list[tuple[str, str]]) -> MessageRoles:
    """Read the list, relay and robot signs of one message.

    * RFC 2369 section 3.4: List-Post holds the list's posting address; sections
      3.1-3.3 and 3.5 (List-Help, List-Subscribe, List-Unsubscribe, List-Owner)
      hold the list manager's addresses. All of them are list addresses.
    * RFC 2919 section 3: List-Id names the list; its ``label.namespace`` form
      is, by common practice, the posting address ``label@namespace``.
    * RFC 5322 section 3.6.2: Sender is the agent that sent the message for
      the author; a Sender that is a list manager's address (``-owner``,
      ``-bounces``, RFC 2142 section 6 ``-request``) or the posting address is a list.
    * Mailing-List (the ezmlm list manager's field, common practice) names a
      ``-help`` address of the list.
    * Precedence ``bulk``, ``list`` or ``junk`` (common practice; RFC 3834
      section 2 tells responders to leave such mail alone) marks mass mail.
    * A list relay that rewrites From (common practice since DMARC) is undone:
      X-Original-From names the author; else, with a "Name via List" display
      name or a From that is the list itself, a single Reply-To that is not the
      list; else a ``user=domain@relay`` From (:func:`mynet.sources.mailaddr.reverse_relay`).
    """
    not_people: dict[str, str] = {}
    post: set[str] = set()
    for name in ("list-post", "list-help", "list-subscribe", "list-unsubscribe", "list-owner"):
        for value in fields.get(name):
            for addr in _MAILTO.findall(value):
                addr = addr.strip().lower()
                not_people[addr] = "list"
                if name == "list-post":
                    post.add(addr)
    list_id = ""
    for value in fields.get("list-id"):
        list_id = list_id or _list_id(value)
    in_headers = {a for _, a in senders} | {a for _, a in recipients}
    if list_id and "." in list_id:
        label, _, namespace = list_id.partition(".")
        guess = f"{label}@{namespace}"
        if guess in in_headers:
            not_people[guess] = "list"
            post.add(guess)
    for value in fields.get("mailing-list") + fields.get("x-mailing-list"):
        for addr in _ADDRESS.findall(value):
            addr = addr.strip("<>.;").lower()
            not_people[addr] = "list"
            base = re.sub(r"-(?:help|owner|request)@", "@", addr)
            list_id = list_id or base
            if base in in_headers:
                not_people[base] = "list"
                post.add(base)
    for _, addr in addresses(fields.get("sender"))[0]:
        if list_local(addr) or addr in post:
            not_people[addr] = "list"
            list_id = list_id or _list_base(addr)
    list_id = list_id or (sorted(post)[0] if post else "")
    for _, addr in senders + recipients:
        if addr not in not_people:
            kind = machine_kind(addr)
            if kind:
                not_people[addr] = kind
    precedence = {v.split(";", 1)[0].strip().lower() for v in fields.get("precedence")}
    mass = bool(list_id or post or fields.get("list-unsubscribe") or fields.get("list-help")
                or precedence & {"bulk", "list", "junk"})

    from_name, from_addr = senders[0] if senders else ("", "")
    author = (from_name, from_addr)
    via = via_name(from_name)
    original = addresses(fields.get("x-original-from"))[0]
    if original:
        name, addr = original[0]
        author = (name or (via[0] if via else from_name), addr)
    elif via or from_addr in post or not_people.get(from_addr) == "list":
        replies = [p for p in addresses(fields.get("reply-to"))[0]
                   if p[1] != from_addr and p[1] not in not_people and p[1] not in post]
        if len(replies) == 1:
            author = (replies[0][0] or (via[0] if via else ""), replies[0][1])
        elif via:
            author = ("", "")  # the author's address is gone; only the relay's is left
    if author[1] == from_addr and from_addr and (mass or via):
        original_addr = reverse_relay(from_addr)
        if original_addr:
            author = (via[0] if via else from_name, original_addr)
    if from_addr and author[1] != from_addr:
        not_people.setdefault(from_addr, "relay")
    elif via and from_addr:
        not_people.setdefault(from_addr, "relay")
    rewritten = {}
    if mass:
        for _, addr in recipients:
            original_addr = reverse_relay(addr)
            if original_addr:
                rewritten[addr] = original_addr
    return MessageRoles(author, not_people, list_id, mass, rewritten)
