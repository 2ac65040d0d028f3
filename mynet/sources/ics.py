"""Read iCalendar files (RFC 5545) into meetings: one interaction per occurrence.

The file is decoded and unfolded here, split into its VEVENT and VTIMEZONE
blocks by our own scanner (so one broken event never costs the rest of the
file), and each content line is parsed by vobject's line parser. Recurrences
are expanded with python-dateutil, which vobject depends on.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import io
import math
import re
import warnings
import zoneinfo
from dataclasses import dataclass
from typing import Iterable

from dateutil import rrule as du_rrule
from dateutil import tz as du_tz
from vobject.base import ContentLine, VObjectError, textLineToContentLine

from ..errors import InputError, RecordError
from ..model import Interaction, ParseResult, Skipped
from .ics_text import (
    BEGIN_END,
    Block,
    GuardedZone,
    decode_bytes,
    decode_param,
    event_people,
    event_resources,
    logical_lines,
    scan_blocks,
    unescape_text,
)

__all__ = ["parse_ics"]

UTC = dt.timezone.utc
_DATE_RE = re.compile(r"^(\d{4})(\d{2})(\d{2})(?:T(\d{2})(\d{2})(\d{2})?(?:[.,]\d+)?(Z)?)?$", re.IGNORECASE)
_UTC_NAMES = {"UTC", "Z", "GMT", "ETC/UTC", "ETC/GMT", "UNIVERSAL", "ZULU", "ETC/ZULU", "ETC/UCT", "UCT"}
_TZ_LINES = {"TZID", "DTSTART", "RRULE", "RDATE", "TZNAME", "TZOFFSETFROM", "TZOFFSETTO"}
_FREQ_SECONDS = {
    "YEARLY": 365 * 86400, "MONTHLY": 28 * 86400, "WEEKLY": 7 * 86400, "DAILY": 86400,
    "HOURLY": 3600, "MINUTELY": 60, "SECONDLY": 1,
}
_BY_RANGES = {  # RFC 5545 section 3.3.10 (absolute values; BYMONTH, BYHOUR... may not be negative)
    "BYMONTH": (1, 12), "BYMONTHDAY": (1, 31), "BYYEARDAY": (1, 366), "BYWEEKNO": (1, 53),
    "BYHOUR": (0, 23), "BYMINUTE": (0, 59), "BYSECOND": (0, 60), "BYSETPOS": (1, 366),
}
_SIGNED = {"BYMONTHDAY", "BYYEARDAY", "BYWEEKNO", "BYSETPOS"}
#: A recurrence that would step through more periods than this up to today is not
#: expanded (dateutil walks every period, even those that yield nothing).
MAX_PERIODS = 100_000
#: Generated occurrences per event before expansion stops (the latest are kept).
MAX_GENERATED = 50_000


class _EventError(Exception):
    """A reason why one event cannot be imported."""


@dataclass
class _Moment:
    """A DATE (``all_day``) or a wall-clock DATE-TIME with its zone (None: UTC)."""

    value: dt.datetime
    tz: dt.tzinfo | None
    all_day: bool
    floating: bool = False

    def local_in(self, tz: dt.tzinfo | None) -> dt.datetime:
        """This moment as naive wall-clock time in ``tz`` (None: UTC)."""
        if self.all_day or self.tz is tz:
            return self.value
        aware = self.value.replace(tzinfo=self.tz or UTC)
        return aware.astimezone(tz or UTC).replace(tzinfo=None)

    def stamp(self) -> str:
        return _stamp(self.value, self.tz, self.all_day)


def _to_utc(local: dt.datetime, tz: dt.tzinfo | None) -> dt.datetime:
    try:
        return local.replace(tzinfo=tz or UTC).astimezone(UTC)
    except (ValueError, OverflowError, TypeError, IndexError) as exc:
        # A VTIMEZONE whose own rules are broken fails only when asked for an offset.
        raise _EventError(f"its time zone cannot be used ({exc})") from exc


def _stamp(local: dt.datetime, tz: dt.tzinfo | None, all_day: bool) -> str:
    """ISO 8601: a date for all-day occurrences, else the UTC date-time."""
    if all_day:
        return local.date().isoformat()
    return _to_utc(local, tz).isoformat()


@dataclass
class _Event:
    block: Block
    uid: str
    summary: str
    status: str
    sequence: int
    start: _Moment
    recurrence_id: _Moment | None
    rrules: list[str]
    exrules: list[str]
    rdates: list[_Moment]
    exdates: list[_Moment]
    organizer: str
    participants: list[str]
    names: dict[str, str]
    resources: dict[str, str]

    def label(self) -> str:
        what = repr(self.summary) if self.summary else "event"
        return f"{what} (UID {self.uid}, line {self.block.line})" if self.uid else f"{what} (line {self.block.line})"


# ------------------------------------------------------------- dates and zones


class _Zones:
    """TZID -> tzinfo: the file's VTIMEZONEs first, then Olson names (zoneinfo)."""

    def __init__(self, blocks: list[Block], warnings_out: list[str]):
        self.defined: dict[str, dt.tzinfo | None] = {}
        self.cache: dict[str, dt.tzinfo | None] = {}
        self.warnings = warnings_out
        for block in blocks:
            self._define(block)

    def _define(self, block: Block) -> None:
        kept: list[str] = []
        tzid = ""
        for _number, text in block.lines:
            name = re.split(r"[;:]", text, maxsplit=1)[0].strip().upper()
            if name in ("BEGIN", "END") or name in _TZ_LINES:
                kept.append(text)
            if name == "TZID" and not tzid:
                tzid = text.split(":", 1)[1].strip() if ":" in text else ""
        if not tzid:
            self.warnings.append(f"line {block.line}: a VTIMEZONE without TZID was ignored")
            return
        try:
            info = du_tz.tzical(io.StringIO("\r\n".join(kept) + "\r\n")).get()
        except Exception as exc:  # noqa: BLE001 - dateutil's parser raises many kinds on bad input
            self.warnings.append(f"line {block.line}: VTIMEZONE {tzid!r} cannot be read ({exc}); its TZID is looked up "
                                 f"by name instead")
            return
        self.defined[tzid] = GuardedZone(info, tzid)

    def get(self, tzid: str) -> dt.tzinfo | None:
        """The zone for a TZID; None means UTC (an unknown TZID is warned about once)."""
        if tzid in self.cache:
            return self.cache[tzid]
        found = self._lookup(tzid)
        if found is False:
            self.warnings.append(f"unknown time zone {tzid!r}: its times were read as UTC")
            found = None
        self.cache[tzid] = found
        return found

    def _lookup(self, tzid: str) -> dt.tzinfo | None | bool:
        if tzid in self.defined:
            return self.defined[tzid]
        folded = {k.strip().lower(): v for k, v in self.defined.items()}
        if tzid.strip().lower() in folded:
            return folded[tzid.strip().lower()]
        name = tzid.strip().strip('"')
        if name.upper() in _UTC_NAMES:
            return None
        parts = [p for p in name.split("/") if p]
        for n in (len(parts), 3, 2, 1):  # "/mozilla.org/20050126_1/Europe/Berlin" -> "Europe/Berlin"
            candidate = "/".join(parts[-n:]) if 0 < n <= len(parts) else ""
            if not candidate or ".." in candidate:
                continue
            try:
                return zoneinfo.ZoneInfo(candidate)
            except (zoneinfo.ZoneInfoNotFoundError, ValueError, OSError):
                continue
        return False


def _parse_moment(text: str, params: dict, zones: _Zones) -> _Moment:
    """Read one DATE / DATE-TIME / PERIOD value (the start of a PERIOD)."""
    value = text.strip().split("/", 1)[0].replace("-", "").replace(":", "")
    m = _DATE_RE.match(value)
    if not m:
        raise _EventError(f"{text.strip()!r} is not an iCalendar date or date-time")
    year, month, day, hour, minute, second, zulu = m.groups()
    kinds = [v.upper() for v in params.get("VALUE", [])]
    if not 2 <= int(year) <= 9997:  # leaves room for any UTC offset
        raise _EventError(f"{text.strip()!r} is outside the years 0002-9997")
    try:
        if hour is None or "DATE" in kinds:
            return _Moment(dt.datetime(int(year), int(month), int(day)), None, True)
        when = dt.datetime(int(year), int(month), int(day), int(hour), int(minute), min(int(second or 0), 59))
    except ValueError as exc:
        raise _EventError(f"{text.strip()!r} is not a valid date ({exc})") from exc
    if zulu:
        return _Moment(when, None, False)
    tzids = params.get("TZID", [])
    if tzids and tzids[0].strip():
        return _Moment(when, zones.get(tzids[0]), False)
    return _Moment(when, None, False, floating=True)  # floating time: read as UTC


def _moments(line: ContentLine, zones: _Zones) -> list[_Moment]:
    return [_parse_moment(part, line.params, zones) for part in str(line.value).split(",") if part.strip()]


def _rule(text: str, start: _Moment, cutoff: dt.datetime) -> du_rrule.rrule:
    """A dateutil rule in the event's wall-clock time, ending at ``cutoff`` at the latest."""
    fields: dict[str, str] = {}  # a repeated part: the last one counts
    for part in text.strip().removeprefix("RRULE:").split(";"):
        key, _, value = part.partition("=")
        if key.strip():
            fields[key.strip().upper()] = value.strip().upper()
    until = fields.pop("UNTIL", None)
    spec = ";".join(f"{k}={v}" for k, v in fields.items())
    try:
        rule = du_rrule.rrulestr(spec, dtstart=start.value)
    except (ValueError, TypeError, KeyError, IndexError, OverflowError) as exc:
        raise _EventError(f"RRULE {text.strip()!r} cannot be read ({exc})") from exc
    for key, (low, high) in _BY_RANGES.items():
        for item in filter(None, fields.get(key, "").split(",")):
            number = item.lstrip("+-")
            if not number.isdigit() or not low <= int(number) <= high or (item[0] == "-" and key not in _SIGNED):
                raise _EventError(f"RRULE {text.strip()!r} cannot be read ({key}={item} is out of range)")
    interval = fields.get("INTERVAL", "1")
    if not (interval.isdigit() and int(interval) >= 1):
        raise _EventError(f"RRULE {text.strip()!r} cannot be read (INTERVAL must be a positive integer)")
    step = _FREQ_SECONDS.get(fields.get("FREQ", ""), 86400) * int(interval)
    periods = (cutoff - start.value).total_seconds() / step
    if periods > MAX_PERIODS:
        raise _EventError(
            f"RRULE {text.strip()!r} steps through {periods:,.0f} periods up to today "
            f"(more than {MAX_PERIODS:,}); too fine a recurrence to be a meeting"
        )
    if _never_occurs(rule, fields, start.value, step):
        raise _EventError(f"RRULE {text.strip()!r} never occurs")
    end = cutoff
    if until and until[:4].isdigit() and int(until[:4]) > 9997:
        until = None  # "until the end of time": today's cutoff is earlier anyway
    if until:
        try:
            limit = _parse_moment(until, {}, _Zones([], []))
        except _EventError as exc:
            raise _EventError(f"RRULE UNTIL {until!r} cannot be read") from exc
        if limit.all_day:
            limit_local = limit.value.replace(hour=23, minute=59, second=59)
        elif limit.floating:  # not UTC as RFC 5545 wants: read in the event's own wall-clock time
            limit_local = limit.value
        else:
            limit_local = limit.local_in(start.tz)
        end = min(end, limit_local)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            return rule.replace(until=end)
        except (ValueError, TypeError):
            return rule


def _never_occurs(rule: du_rrule.rrule, fields: dict[str, str], start: dt.datetime, step: int) -> bool:
    """True when a rule with BY* filters yields nothing, probed in the last 400 years before 9999.

    dateutil checks UNTIL only on dates that pass the filters, so an impossible
    rule (``FREQ=DAILY;BYMONTH=2;BYMONTHDAY=30``) walks every period up to year
    9999. The probe starts a whole number of intervals later, which keeps the
    rule's lattice (for months and years: a multiple of 400 years, the Gregorian
    cycle, so the start date stays valid), and so it ends quickly.
    """
    if not any(key.startswith("BY") for key in fields):
        return False
    last = dt.MAXYEAR - 400
    freq = fields.get("FREQ", "")
    if freq in ("MONTHLY", "YEARLY"):
        months = int(fields.get("INTERVAL", "1")) * (12 if freq == "YEARLY" else 1)
        years = math.lcm(months, 4800) // 12
        probe_start = start.replace(year=start.year + max((last - start.year) // years, 0) * years)
    else:
        periods = max(int((dt.datetime(last, 1, 1) - start).total_seconds() // step), 0)
        probe_start = start + dt.timedelta(seconds=periods * step)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            probe = rule.replace(dtstart=probe_start, until=None, count=1)
        return next(iter(probe), None) is None
    except (ValueError, OverflowError, TypeError, IndexError) as exc:
        raise _EventError(f"RRULE cannot be expanded ({exc})") from exc


def _expand(text: str, start: _Moment, cutoff: dt.datetime) -> tuple[list[dt.datetime], bool]:
    """The starts one RRULE/EXRULE gives up to ``cutoff``, and whether MAX_GENERATED cut them."""
    out: list[dt.datetime] = []
    try:
        for when in _rule(text, start, cutoff):
            if len(out) >= MAX_GENERATED:
                return out, True
            out.append(when)
    except (ValueError, OverflowError, TypeError, IndexError) as exc:  # dateutil at the ends of the calendar
        raise _EventError(f"RRULE {text.strip()!r} cannot be expanded ({exc})") from exc
    return out, False


def _local_starts(ev: _Event, cutoff: dt.datetime) -> tuple[list[dt.datetime], bool]:
    """Wall-clock starts of an event's occurrences up to ``cutoff`` (sorted, exdates removed)."""
    tz = ev.start.tz
    starts: set[dt.datetime] = {ev.start.value}
    starts.update(r.local_in(tz) for r in ev.rdates)
    truncated = False
    for text in ev.rrules:
        more, cut = _expand(text, ev.start, cutoff)
        starts.update(more)
        truncated |= cut
    for text in ev.exrules:
        starts.difference_update(_expand(text, ev.start, cutoff)[0])
    for ex in ev.exdates:
        if ex.all_day and not ev.start.all_day:
            starts = {s for s in starts if s.date() != ex.value.date()}
        else:
            starts.discard(ex.local_in(tz))
    return sorted(s for s in starts if s <= cutoff), truncated


# -------------------------------------------------------------------- events


def _read_event(block: Block, zones: _Zones, problems: list[str]) -> _Event:
    """Parse the top-level properties of one VEVENT block (nested VALARMs are left out)."""
    if block.error:
        raise _EventError(block.error)
    props: dict[str, list[ContentLine]] = {}
    depth = 0
    for number, text in block.lines[1:-1]:
        m = BEGIN_END.match(text)
        if m:
            depth += 1 if m.group(1).upper() == "BEGIN" else -1
            continue
        if depth:
            continue
        try:
            line = textLineToContentLine(text, number)
        except (VObjectError, ValueError, LookupError) as exc:
            problems.append(f"line {number}: unreadable line ignored ({str(exc).splitlines()[0][:120]})")
            continue
        line.params = {k.upper(): [decode_param(v) for v in vs] for k, vs in line.params.items()}
        props.setdefault(line.name.upper(), []).append(line)

    def text_of(name: str) -> str:
        return unescape_text(str(props[name][0].value)).strip() if name in props else ""

    if "DTSTART" not in props:
        raise _EventError("it has no DTSTART")
    start = _parse_moment(str(props["DTSTART"][0].value), props["DTSTART"][0].params, zones)
    rid = None
    if "RECURRENCE-ID" in props:
        rid = _parse_moment(str(props["RECURRENCE-ID"][0].value), props["RECURRENCE-ID"][0].params, zones)
    try:
        sequence = int(text_of("SEQUENCE") or 0)
    except ValueError:
        sequence = 0
    organizer, participants, names = event_people(props.get("ORGANIZER", [])[:1], props.get("ATTENDEE", []))
    return _Event(
        block=block,
        uid=text_of("UID"),
        summary=text_of("SUMMARY"),
        status=text_of("STATUS").upper(),
        sequence=sequence,
        start=start,
        recurrence_id=rid,
        rrules=[str(x.value) for x in props.get("RRULE", [])],
        exrules=[str(x.value) for x in props.get("EXRULE", [])],
        rdates=[m for x in props.get("RDATE", []) for m in _moments(x, zones)],
        exdates=[m for x in props.get("EXDATE", []) for m in _moments(x, zones)],
        organizer=organizer,
        participants=participants,
        names=names,
        resources=event_resources(props.get("ATTENDEE", [])),
    )


def _latest(events: Iterable[_Event]) -> tuple[list[_Event], int]:
    """Keep one event per key (UID, or UID + RECURRENCE-ID): the highest SEQUENCE, then the last."""
    best: dict[tuple, _Event] = {}
    dropped = 0
    for ev in events:
        key = (ev.uid, ev.recurrence_id.stamp() if ev.recurrence_id else None) if ev.uid else (id(ev),)
        if key in best:
            dropped += 1
            if ev.sequence < best[key].sequence:
                continue
        best[key] = ev
    return sorted(best.values(), key=lambda e: e.block.index), dropped


def _interaction(ev: _Event, source: str, when: str, occurrence: str) -> Interaction:
    uid = ev.uid or "nouid-" + hashlib.sha1(
        "\x1f".join((ev.start.stamp(), ev.summary, ev.organizer)).encode("utf-8")
    ).hexdigest()[:16]
    return Interaction(
        kind="meeting",
        source=source,
        index=ev.block.index,
        line=ev.block.line,
        when=when,
        key=f"{uid}#{occurrence}",
        title=ev.summary,
        organizer=ev.organizer,
        participants=list(ev.participants),
        names=dict(ev.names),
        not_people=dict(ev.resources),
    )


def _is_past(stamp: str, today: dt.date) -> bool:
    return dt.date.fromisoformat(stamp[:10]) <= today


def _occurrences(ev: _Event, overrides: dict[str, list[_Event]], cutoff: dt.datetime, today: dt.date,
                 max_occurrences: int) -> tuple[list[tuple[str, str, _Event]], int, bool]:
    """``(when, original start, event)`` of an event's past occurrences, how many moved ones were cancelled,
    and whether the expansion was cut at MAX_GENERATED.

    Raises :class:`_EventError` when the recurrence or the time zone cannot be used.
    """
    tz, all_day = ev.start.tz, ev.start.all_day
    starts, truncated = _local_starts(ev, cutoff) if ev.recurrence_id is None else ([ev.start.value], False)
    moved = {} if ev.recurrence_id is not None else {
        o.recurrence_id.local_in(tz): o for o in overrides.get(ev.uid, [])
    }
    occurrences: list[tuple[str, str, _Event]] = []
    for local in reversed(starts):  # latest first; one more than the cap tells that it bites
        if len(occurrences) > max_occurrences:
            break
        when = _stamp(local, tz, all_day)
        if local not in moved and _is_past(when, today):
            original = ev.recurrence_id.stamp() if ev.recurrence_id is not None else when
            occurrences.append((when, original, ev))
    cancelled = 0
    for original, o in moved.items():
        when = o.start.stamp()
        if o.status == "CANCELLED":
            cancelled += 1
        elif _is_past(when, today):
            occurrences.append((when, _stamp(original, tz, all_day), o))
    return occurrences, cancelled, truncated


def parse_ics(
    data: bytes,
    path: str,
    *,
    strict: bool = False,
    today: dt.date | None = None,
    max_occurrences: int = 500,
) -> ParseResult:
    """Read an iCalendar file into meeting interactions, one per past occurrence.

    Parameters
    ----------
    data : bytes
        The file's content. UTF-8 (with or without a byte-order mark), UTF-16,
        or lines that are not UTF-8 (read as Windows-1252, line by line); CRLF,
        LF or CR CR LF line ends; folded lines, also folds inside a word or a
        multi-byte character. Files of bare VEVENTs without a VCALENDAR are read.
    path : str
        The file's path, as reported in every interaction, warning and error.
    strict : bool
        Raise :class:`mynet.errors.RecordError` at the first event that cannot
        be read, instead of skipping it.
    today : datetime.date, optional
        Occurrences after this date are not interactions (default: today).
    max_occurrences : int
        At most this many occurrences per recurring event; when more fall on or
        before ``today``, the latest are kept and a warning names the event.

    Returns
    -------
    ParseResult
        ``kind="ics"``, no records; ``interactions`` holds one
        :class:`mynet.model.Interaction` (``kind="meeting"``) per occurrence in
        file order, then by time. ``when`` is ISO 8601 in UTC, or a date for
        all-day events; ``key`` is the UID, ``#`` and the occurrence's original
        start (its RECURRENCE-ID for a moved occurrence), in the same form.

    Raises
    ------
    InputError
        When the data is not iCalendar at all (no BEGIN:VCALENDAR or
        BEGIN:VEVENT line).
    RecordError
        In strict mode, for the first event that cannot be read.

    Notes
    -----
    * Time zones: a TZID is looked up in the file's VTIMEZONEs, then as an
      Olson name (zoneinfo); an unknown TZID, and a floating time (no TZID, no
      ``Z``), are read as UTC. DATE values are all-day events.
    * Recurrences (RRULE, RDATE, EXDATE, and the old EXRULE) are expanded in
      the event's own wall-clock time, so a 09:00 meeting stays at 09:00 across
      daylight-saving changes. DTSTART always counts as an occurrence. An
      occurrence overridden by a VEVENT with the same UID and a RECURRENCE-ID is
      replaced by it (RANGE=THISANDFUTURE is read as that one occurrence).
    * Participants are the organizer and every attendee who did not decline or
      delegate (PARTSTAT=DECLINED/DELEGATED) and is a person: CUTYPE GROUP,
      RESOURCE and ROOM and ROLE=NON-PARTICIPANT are left out. Attendees of a
      nested VALARM are alarm recipients, not participants.
    * Cancelled events and occurrences (STATUS:CANCELLED) are not interactions.
      VTODO, VJOURNAL and VFREEBUSY are not meetings and are ignored.
    """
    if max_occurrences < 1:
        raise ValueError(f"max_occurrences must be at least 1, not {max_occurrences}")
    if today is None:
        today = dt.date.today()
    result = ParseResult(path=str(path), kind="ics")
    if not data.strip():
        raise InputError(path, "is empty")
    lines, not_utf8 = logical_lines(decode_bytes(data, path))
    scan = scan_blocks(lines)
    if not scan.calendar:
        if scan.vcard:
            raise InputError(path, "is a vCard file, not an iCalendar file (it has BEGIN:VCARD, no BEGIN:VCALENDAR)")
        raise InputError(path, "is not an iCalendar file (it has no BEGIN:VCALENDAR or BEGIN:VEVENT line)")
    if not_utf8:
        result.warnings.append(f"{not_utf8} line(s) were not valid UTF-8 and were read as Windows-1252")
    result.warnings.extend(scan.stray)
    zone_notes: list[str] = []
    zones = _Zones(scan.zones, zone_notes)

    def skip(block: Block, reason: str) -> None:
        if strict:
            raise RecordError(path, f"event {block.index + 1} cannot be read: {reason}", block.line)
        result.skipped.append(Skipped(str(path), block.line, f"event cannot be read: {reason}", block.index))

    cutoff = dt.datetime.combine(today + dt.timedelta(days=1), dt.time(23, 59, 59))
    events: list[_Event] = []
    for block in scan.events:
        problems: list[str] = []
        try:
            ev = _read_event(block, zones, problems)
        except _EventError as exc:
            skip(block, str(exc))
            continue
        if problems and strict:
            raise RecordError(path, f"event {block.index + 1}: {problems[0]}", block.line)
        result.warnings.extend(problems)
        events.append(ev)
    events, duplicates = _latest(events)
    if duplicates:
        result.warnings.append(f"{duplicates} event(s) repeated a UID already seen; the highest SEQUENCE was kept")
    overrides: dict[str, list[_Event]] = {}
    for ev in events:
        if ev.recurrence_id is not None and ev.uid:
            overrides.setdefault(ev.uid, []).append(ev)
    masters = {ev.uid for ev in events if ev.recurrence_id is None and ev.uid}
    future = cancelled = floating = 0
    for ev in events:
        if ev.recurrence_id is not None and ev.uid in masters:
            continue  # read with its master below
        floating += ev.start.floating
        if ev.status == "CANCELLED":
            cancelled += 1
            continue
        try:
            occurrences, moved_cancelled, truncated = _occurrences(ev, overrides, cutoff, today, max_occurrences)
            upcoming = not occurrences and not _is_past(ev.start.stamp(), today)
        except _EventError as exc:
            skip(ev.block, str(exc))
            continue
        cancelled += moved_cancelled
        future += upcoming
        occurrences.sort(key=lambda item: item[0])
        if len(occurrences) > max_occurrences:
            occurrences = occurrences[-max_occurrences:]
            result.warnings.append(
                f"event {ev.label()} recurs more than {max_occurrences} times up to {today.isoformat()}; "
                f"only the latest {max_occurrences} occurrences were kept (max_occurrences={max_occurrences})"
            )
        elif truncated:
            result.warnings.append(f"event {ev.label()} was expanded to its first {MAX_GENERATED:,} occurrences only")
        for when, original, source_ev in occurrences:
            result.interactions.append(_interaction(source_ev, str(path), when, original))
    result.warnings.extend(zone_notes)
    if floating:
        result.warnings.append(f"{floating} event(s) have floating times (no time zone); they were read as UTC")
    if future:
        result.warnings.append(f"{future} event(s) after {today.isoformat()} were left out (not yet happened)")
    if cancelled:
        result.warnings.append(f"{cancelled} cancelled event(s) or occurrence(s) were left out")
    ignored = ", ".join(f"{n} {name}" for name, n in sorted(scan.ignored.items()))
    if ignored:
        result.warnings.append(f"{ignored} ignored: to-dos, journal entries and free/busy are not meetings")
    if not scan.events:
        result.warnings.append("the calendar has no events (no VEVENT)")
    return result
