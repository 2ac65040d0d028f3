"""The text layer of the iCalendar importer: bytes to unfolded lines, blocks, people (and a guard on broken zones).

Kept apart from :mod:`mynet.sources.ics` (dates, zones, recurrences) so each
file stays small. Nothing here is public API.
"""

from __future__ import annotations

import datetime as dt
import re
import urllib.parse
from dataclasses import dataclass, field

from vobject.base import ContentLine

from ..errors import InputError

BEGIN_END = re.compile(r"^(BEGIN|END)[ \t]*:[ \t]*([A-Za-z0-9_-]+)[ \t]*$", re.IGNORECASE)
NOT_MEETINGS = ("VTODO", "VJOURNAL", "VFREEBUSY")


@dataclass
class Block:
    """The lines of one component, as (physical line number, unfolded text)."""

    name: str
    line: int
    index: int = -1
    lines: list[tuple[int, str]] = field(default_factory=list)
    error: str = ""


# ----------------------------------------------------------------- text layer


def decode_bytes(data: bytes, path: str) -> bytes:
    """Turn UTF-16 input into UTF-8 bytes and drop a UTF-8 byte-order mark."""
    if data.startswith((b"\xff\xfe", b"\xfe\xff")) or b"\x00" in data[:64]:
        if data.startswith((b"\xff\xfe", b"\xfe\xff")):
            codec = "utf-16"
        else:
            codec = "utf-16-le" if data[1:2] == b"\x00" else "utf-16-be"
        try:
            data = data.decode(codec).encode("utf-8")
        except UnicodeDecodeError as exc:
            raise InputError(path, "contains NUL bytes but is not valid UTF-16; it is not an iCalendar file") from exc
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    return data


_LINE_END = re.compile(rb"\r*\n|\r")


def logical_lines(data: bytes) -> tuple[list[tuple[int, str]], int]:
    """Unfold physical lines (CRLF, LF, CR CR LF, CR; mixed in one file too) into (first line number, text).

    RFC 5545 (section 3.1) ends lines with CR LF and allows no other control
    character in a content line but tab, so a lone CR ends a line as well.

    Folding is undone on bytes, before decoding, so a fold inside a multi-byte
    UTF-8 character is mended. Each logical line is read as UTF-8 when valid and
    as Windows-1252 otherwise; the count of the latter is returned.
    """
    joined: list[tuple[int, bytearray]] = []
    for number, raw in enumerate(_LINE_END.split(data) if b"\r" in data else data.split(b"\n"), start=1):
        if not raw:
            continue
        if raw[:1] in (b" ", b"\t") and joined:
            joined[-1][1].extend(raw[1:])
        else:
            joined.append((number, bytearray(raw)))
    out: list[tuple[int, str]] = []
    not_utf8 = 0
    for number, raw in joined:
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError:
            not_utf8 += 1
            try:
                text = raw.decode("cp1252")
            except UnicodeDecodeError:
                text = raw.decode("latin-1")
        out.append((number, text.replace("\r", "").lstrip("\ufeff")))
    return out, not_utf8


@dataclass
class Scan:
    events: list[Block] = field(default_factory=list)
    zones: list[Block] = field(default_factory=list)
    ignored: dict[str, int] = field(default_factory=dict)
    stray: list[str] = field(default_factory=list)
    calendar: bool = False
    vcard: bool = False


def scan_blocks(lines: list[tuple[int, str]]) -> Scan:
    """Split the file into VEVENT and VTIMEZONE blocks, noting broken nesting."""
    scan = Scan()
    stack: list[str] = []
    event: Block | None = None
    event_depth = 0
    zone: Block | None = None
    zone_depth = 0
    for number, text in lines:
        m = BEGIN_END.match(text)
        if not m:
            if event is not None:
                event.lines.append((number, text))
            elif zone is not None:
                zone.lines.append((number, text))
            continue
        kind, comp = m.group(1).upper(), m.group(2).upper()
        if kind == "BEGIN":
            scan.calendar |= comp in ("VCALENDAR", "VEVENT")
            scan.vcard |= comp == "VCARD"
            if comp == "VEVENT":
                if event is not None:
                    event.error = f"it has no END:VEVENT (another BEGIN:VEVENT follows at line {number})"
                    del stack[event_depth - 1:]
                event = Block("VEVENT", number, index=len(scan.events))
                scan.events.append(event)
                stack.append(comp)
                event_depth = len(stack)
            elif comp == "VTIMEZONE" and event is None and zone is None:
                zone = Block("VTIMEZONE", number)
                scan.zones.append(zone)
                stack.append(comp)
                zone_depth = len(stack)
            else:
                if comp in NOT_MEETINGS and event is None:
                    scan.ignored[comp] = scan.ignored.get(comp, 0) + 1
                stack.append(comp)
            (event or zone or Block("", 0)).lines.append((number, text))
            continue
        if comp not in stack:
            scan.stray.append(f"line {number}: END:{comp} without a matching BEGIN:{comp}, ignored")
            continue
        at = len(stack) - 1 - stack[::-1].index(comp)
        unclosed = stack[at + 1:]
        del stack[at:]
        if event is not None:
            if at + 1 >= event_depth:
                event.lines.append((number, text))
                if unclosed:
                    event.error = f"BEGIN:{unclosed[0]} inside the event is never closed"
                if at + 1 == event_depth:
                    event = None
            else:
                event.error = f"it has no END:VEVENT (END:{comp} at line {number} comes first)"
                event = None
        if zone is not None:
            zone.lines.append((number, text))
            if at + 1 <= zone_depth:
                zone = None
    if event is not None:
        event.error = "it has no END:VEVENT (the file ends inside the event)"
    return scan


# -------------------------------------------------------------------- people

_EMAIL_RE = re.compile(r'^[^@\s<>()\[\],;:"]+@(?:[^@\s<>()\[\],;:".]+\.)+[^@\s<>()\[\],;:".]+$')
_RFC6868 = re.compile(r"\^([nN'^])")
_TEXT_ESCAPE = re.compile(r"\\(.)")
_NOT_PEOPLE = {"GROUP", "RESOURCE", "ROOM"}
_ABSENT = {"DECLINED", "DELEGATED"}


def decode_param(value: str) -> str:
    """A parameter value without its DQUOTEs, with RFC 6868 ``^n ^' ^^`` decoded."""
    value = value.strip()
    if len(value) >= 2 and value[0] == value[-1] == '"':
        value = value[1:-1]
    return _RFC6868.sub(lambda m: {"n": "\n", "N": "\n", "'": '"', "^": "^"}[m.group(1)], value)


def unescape_text(value: str) -> str:
    """RFC 5545 TEXT unescaping: ``\\n`` is a newline, ``\\, \\; \\\\`` are literal."""
    return _TEXT_ESCAPE.sub(
        lambda m: "\n" if m.group(1) in "nN" else m.group(1) if m.group(1) in '\\;,:"' else m.group(0), value
    )


def _normalise_email(text: str) -> str:
    """The lower-cased address of a ``mailto:`` URI (any case) or bare address; "" if none."""
    value = text.strip().strip('"').strip()
    while value[:7].lower() == "mailto:":
        value = value[7:].strip()
    value = value.strip("<>").split("?", 1)[0]
    if "%" in value:
        value = urllib.parse.unquote(value)
    value = value.strip().lower()
    return value if _EMAIL_RE.match(value) else ""


def _address(line: ContentLine) -> str:
    """An ORGANIZER/ATTENDEE address: the value, else an RFC 7986 EMAIL parameter."""
    found = _normalise_email(str(line.value))
    if not found and line.params.get("EMAIL"):
        found = _normalise_email(line.params["EMAIL"][0])
    return found


def _is_person_attending(line: ContentLine) -> bool:
    """False for attendees who declined or delegated, non-participants, groups, rooms, resources."""
    def first(name: str) -> str:
        values = line.params.get(name) or [""]
        return values[0].strip().upper()

    return not (first("PARTSTAT") in _ABSENT or first("CUTYPE") in _NOT_PEOPLE or first("ROLE") == "NON-PARTICIPANT")


def event_resources(attendees: list[ContentLine]) -> dict[str, str]:
    """Attendees that are rooms or resources (RFC 5545 section 3.2.3, CUTYPE=ROOM / RESOURCE): address -> kind.

    They are never people: mynet keeps their addresses only to know that, wherever else they show up.
    """
    out: dict[str, str] = {}
    for line in attendees:
        cutype = ((line.params.get("CUTYPE") or [""])[0] or "").strip().upper()
        if cutype in ("ROOM", "RESOURCE"):
            email = _address(line)
            if email:
                out[email] = cutype.lower()
    return out


def event_people(organizers: list[ContentLine], attendees: list[ContentLine]) -> tuple[str, list[str], dict[str, str]]:
    """Organizer address, sorted participant addresses and their CN names."""
    organizer = _address(organizers[0]) if organizers else ""
    chosen = organizers[:1] + [line for line in attendees if _is_person_attending(line)]
    names: dict[str, str] = {}
    people: set[str] = set()
    for line in chosen:
        email = _address(line)
        if not email:
            continue
        people.add(email)
        cn = (line.params.get("CN") or [""])[0].strip()
        if cn and email not in names:
            names[email] = cn
    return organizer, sorted(people), names


class GuardedZone(dt.tzinfo):
    """A VTIMEZONE read by dateutil that is never asked again once its rules could not be computed.

    dateutil raises from inside ``utcoffset`` on some broken RRULEs of a
    VTIMEZONE and then keeps an internal lock taken: asking that zone again
    would wait for ever. After the first failure every question raises at
    once, so each event in that zone is skipped with its reason (see
    :func:`_to_utc`) and the import goes on.
    """

    def __init__(self, inner: dt.tzinfo, tzid: str):
        self.inner, self.tzid, self.failure = inner, tzid, ""

    def _ask(self, method: str, when: dt.datetime | None):
        if not self.failure:
            try:
                return getattr(self.inner, method)(when.replace(tzinfo=self.inner) if when is not None else None)
            except (ValueError, TypeError, IndexError, OverflowError, KeyError, AttributeError) as exc:
                self.failure = str(exc) or type(exc).__name__
        raise ValueError(f"the rules of time zone {self.tzid!r} cannot be computed: {self.failure}")

    def utcoffset(self, when):
        return self._ask("utcoffset", when)

    def dst(self, when):
        return self._ask("dst", when)

    def tzname(self, when):
        return self._ask("tzname", when)

    def fromutc(self, when):
        return self._ask("fromutc", when).replace(tzinfo=self)
