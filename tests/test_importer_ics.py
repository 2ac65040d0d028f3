"""The iCalendar importer (RFC 5545): events to meeting interactions.

All people, addresses and events here are invented (example.org/.com/.net and
*.example domains), except the RFC 5545 examples read in place from the shared
corpus and the Davis Southern Women dataset shipped by networkx.
"""

from __future__ import annotations

import datetime as dt
import threading
import time

import networkx as nx
import pytest
from davis_ics import davis_email, davis_expected, davis_graph, davis_ics_bytes
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from mynet.errors import InputError, RecordError
from mynet.sources import parse_file
from mynet.sources.ics import parse_ics

TODAY = dt.date(2025, 6, 30)


def ics(*blocks: str, eol: str = "\r\n") -> bytes:
    """A VCALENDAR around the given blocks (each a string of LF-separated lines)."""
    lines = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//mynet tests//EN"]
    for block in blocks:
        lines += [ln for ln in block.strip("\n").split("\n")]
    lines.append("END:VCALENDAR")
    return (eol.join(lines) + eol).encode("utf-8")


def event(uid: str, start: str, *extra: str, summary: str = "Sync") -> str:
    return "\n".join(["BEGIN:VEVENT", f"UID:{uid}", f"DTSTART{start}", f"SUMMARY:{summary}", *extra, "END:VEVENT"])


def parse(data: bytes, **kw) -> object:
    kw.setdefault("today", TODAY)
    return parse_ics(data, "cal.ics", **kw)


def whens(result) -> list[str]:
    return [i.when for i in result.interactions]


@pytest.fixture
def rfc(corpus_dir):
    """Read one RFC example of the corpus's standards folder (bytes)."""
    def read(name: str) -> bytes:
        return (corpus_dir / "standards" / name).read_bytes()

    return read


# ---------------------------------------------------------------- RFC 5545 examples, read in place


def test_rfc5545_sec4_example1_organizer_only(rfc):
    res = parse_ics(rfc("rfc5545-sec4-ex1-conference.ics"), "ex1.ics", today=TODAY)
    (m,) = res.interactions
    # RFC 5545 section 4, example 1: ORGANIZER mailto:jsmith@example.com, no ATTENDEE,
    # UID uid1@example.com, DTSTART 19960918T143000Z, SUMMARY Networld+Interop Conference.
    assert m.kind == "meeting" and m.source == "ex1.ics"
    assert m.organizer == "jsmith@example.com"
    assert m.participants == ["jsmith@example.com"]
    assert m.title == "Networld+Interop Conference"
    assert m.when == "1996-09-18T14:30:00+00:00"
    assert m.key == "uid1@example.com#1996-09-18T14:30:00+00:00"
    assert (m.index, m.line) == (0, 4)  # BEGIN:VEVENT is the file's 4th line
    assert res.records == [] and res.kind == "ics" and res.skipped == []


def test_rfc5545_sec4_example2_group_attendee_is_not_a_person(rfc):
    res = parse_ics(rfc("rfc5545-sec4-ex2-group-meeting.ics"), "ex2.ics", today=TODAY)
    (m,) = res.interactions
    # RFC 5545 section 4, example 2: ATTENDEE employee-A@example.com has CUTYPE=GROUP (a group,
    # not a person) so only the ORGANIZER mrbig@example.com takes part.
    assert m.organizer == "mrbig@example.com"
    assert m.participants == ["mrbig@example.com"]
    # RFC 5545 section 4, example 2: DTSTART;TZID=America/New_York:19980312T083000 with the file's
    # VTIMEZONE (EST, -0500, until the DAYLIGHT rule of April) -> 13:30 UTC.
    assert m.when == "1998-03-12T13:30:00+00:00"
    assert m.key == "guid-1.example.com#1998-03-12T13:30:00+00:00"
    assert m.line == 19


def test_rfc5545_sec4_example3_attendee_with_rsvp(rfc):
    (m,) = parse_ics(rfc("rfc5545-sec4-ex3-mime-meeting.ics"), "ex3.ics", today=TODAY).interactions
    # RFC 5545 section 4, example 3: ORGANIZER jdoe@example.com, ATTENDEE;RSVP=TRUE jsmith@example.com.
    assert m.organizer == "jdoe@example.com"
    assert m.participants == ["jdoe@example.com", "jsmith@example.com"]
    assert m.title == "Calendaring Interoperability Planning Meeting"


@pytest.mark.parametrize(
    "name, component",
    [
        ("rfc5545-sec4-ex4-todo.ics", "VTODO"),  # RFC 5545 section 4, example 4
        ("rfc5545-sec4-ex5-journal.ics", "VJOURNAL"),  # RFC 5545 section 4, example 5
        ("rfc5545-sec4-ex6-freebusy.ics", "VFREEBUSY"),  # RFC 5545 section 4, example 6
    ],
)
def test_rfc5545_sec4_non_events_are_not_meetings(name, component, rfc):
    res = parse_ics(rfc(name), name, today=TODAY)
    assert res.interactions == [] and res.skipped == []
    assert any(component in w for w in res.warnings)
    assert any("no events" in w for w in res.warnings)


def test_rfc5545_sec3_8_4_attendee_fragments_wrapped_in_an_event(rfc):
    # RFC 5545 sections 3.8.4.1 and 3.8.4.3: the printed ATTENDEE/ORGANIZER lines, put inside a
    # VEVENT of our own here (the CONTACT lines of 3.8.4.2 and the comment markers are dropped).
    text = rfc("rfc5545-sec3.8.4-attendee-organizer-contact.txt").decode("utf-8")
    keep, on = [], False
    for line in text.splitlines():
        if line.startswith("; ---"):
            on = "Contact" not in line
            continue
        if on and line.strip():
            keep.append(line)
    body = "\n".join(["BEGIN:VEVENT", "UID:sec384@example.org", "DTSTART:20250101T100000Z", *keep, "END:VEVENT"])
    (m,) = parse(ics(body)).interactions
    # RFC 5545 section 3.8.4.1: iamboss is ROLE=NON-PARTICIPANT;PARTSTAT=DELEGATED (delegated to
    # hcabot); the fold inside "mailto:iamboss" / " @example.com" must still give one address.
    assert "iamboss@example.com" not in m.participants
    assert m.participants == sorted(
        ["joecool@example.com", "ildoit@example.com", "hcabot@example.com", "jdoe@example.com",
         "jimdo@example.com", "jsmith@example.com"]
    )
    # RFC 5545 section 3.8.4.1: "CN=Henry" folded onto " Cabot" unfolds strictly to "HenryCabot".
    assert m.names["hcabot@example.com"] == "HenryCabot"
    assert m.names["jdoe@example.com"] == "Jane Doe"
    # RFC 5545 section 3.8.4.3: the first ORGANIZER is jsmith@example.com with CN=John Smith.
    assert m.organizer == "jsmith@example.com"


def test_text_that_is_not_icalendar_is_refused():
    with pytest.raises(InputError, match="not an iCalendar file"):
        parse(b"Name,Email\nAda,ada@example.org\n")
    with pytest.raises(InputError, match="vCard"):
        parse(b"BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Ada\r\nEND:VCARD\r\n")
    with pytest.raises(InputError, match="is empty"):
        parse(b"  \r\n")


# ---------------------------------------------------------------- recurrences


def test_weekly_count_with_one_exdate_gives_nine():
    # Hand-counted: weekly from Monday 2025-01-06 with COUNT=10 is Jan 6, 13, 20, 27, Feb 3, 10,
    # 17, 24, Mar 3, 10; EXDATE removes Jan 20 -> 9 occurrences.
    data = ics(event("wk@example.org", ":20250106T100000Z", "RRULE:FREQ=WEEKLY;COUNT=10", "EXDATE:20250120T100000Z"))
    res = parse(data)
    assert [w[:10] for w in whens(res)] == [
        "2025-01-06", "2025-01-13", "2025-01-27", "2025-02-03", "2025-02-10",
        "2025-02-17", "2025-02-24", "2025-03-03", "2025-03-10",
    ]
    assert all(w.endswith("T10:00:00+00:00") for w in whens(res))
    assert len({i.key for i in res.interactions}) == 9
    assert res.interactions[1].key == "wk@example.org#2025-01-13T10:00:00+00:00"
    assert {i.index for i in res.interactions} == {0}


def test_monthly_first_monday_until():
    # Hand-counted: the first Mondays of Jan..Jun 2025 are Jan 6, Feb 3, Mar 3, Apr 7, May 5, Jun 2;
    # the next (Jul 7) is after UNTIL.
    data = ics(event("m@example.org", ":20250106T090000Z", "RRULE:FREQ=MONTHLY;BYDAY=1MO;UNTIL=20250630T235959Z"))
    res = parse(data, today=dt.date(2025, 12, 31))
    assert [w[:10]
            for w in whens(res)] == ["2025-01-06", "2025-02-03", "2025-03-03", "2025-04-07", "2025-05-05", "2025-06-02"]


def test_endless_rule_stops_at_today_and_at_the_cap():
    data = ics(event("d@example.org", ":20250101T120000Z", "RRULE:FREQ=DAILY", summary="Daily stand-up"))
    # Hand-counted: daily from Jan 1 up to today = Jan 31 is 31 occurrences, none after today.
    res = parse(data, today=dt.date(2025, 1, 31))
    assert len(res.interactions) == 31 and whens(res)[-1] == "2025-01-31T12:00:00+00:00"
    assert not any("recurs more than" in w for w in res.warnings)
    capped = parse(data, today=dt.date(2025, 1, 31), max_occurrences=10)
    # the latest 10 are kept: Jan 22 .. Jan 31
    assert [w[:10] for w in whens(capped)] == [f"2025-01-{d}" for d in range(22, 32)]
    (warning,) = [w for w in capped.warnings if "recurs more than" in w]
    assert "Daily stand-up" in warning and "d@example.org" in warning and "10" in warning
    with pytest.raises(ValueError):
        parse(data, max_occurrences=0)


def test_rdate_adds_and_dtstart_counts():
    data = ics(event("r@example.org", ":20250303T100000Z", "RDATE:20250310T100000Z,20250317T140000Z",
                     "RDATE;VALUE=PERIOD:20250401T080000Z/20250401T090000Z"))
    assert whens(parse(data)) == [
        "2025-03-03T10:00:00+00:00", "2025-03-10T10:00:00+00:00", "2025-03-17T14:00:00+00:00",
        "2025-04-01T08:00:00+00:00",
    ]


def test_recurrence_id_overrides_and_cancels_an_occurrence():
    master = event(
        "ov@example.org", ":20250203T100000Z", "RRULE:FREQ=WEEKLY;COUNT=4",
        "ORGANIZER:mailto:lead@example.org", "ATTENDEE:mailto:ana@example.org",
    )
    moved = event(
        "ov@example.org", ":20250211T150000Z", "RECURRENCE-ID:20250210T100000Z",
        "ORGANIZER:mailto:lead@example.org", "ATTENDEE:mailto:guest@example.net", summary="Sync (moved)",
    )
    cancelled = event("ov@example.org", ":20250217T100000Z", "RECURRENCE-ID:20250217T100000Z", "STATUS:CANCELLED")
    res = parse(ics(moved, master, cancelled))  # the override comes first in the file
    assert whens(res) == ["2025-02-03T10:00:00+00:00", "2025-02-11T15:00:00+00:00", "2025-02-24T10:00:00+00:00"]
    first, second, third = res.interactions
    # the moved occurrence keeps its original start in the key, and its own people and place
    assert second.key == "ov@example.org#2025-02-10T10:00:00+00:00"
    assert second.participants == ["guest@example.net", "lead@example.org"]
    assert (second.index, second.line, second.title) == (0, 4, "Sync (moved)")
    assert first.participants == ["ana@example.org", "lead@example.org"] and first.index == 1
    assert any("cancelled" in w for w in res.warnings)


def test_cancelled_and_future_events_are_not_interactions():
    data = ics(
        event("gone@example.org", ":20250110T100000Z", "STATUS:CANCELLED"),
        event("later@example.org", ":20300110T100000Z"),
        event("now@example.org", ":20250630T230000Z"),  # on "today": kept
    )
    res = parse(data)
    assert [i.key.split("#")[0] for i in res.interactions] == ["now@example.org"]
    assert any("after 2025-06-30" in w for w in res.warnings)


def test_duplicate_uid_keeps_highest_sequence():
    old = event("dup@example.org", ":20250110T100000Z", "SEQUENCE:1", summary="Old title")
    new = event("dup@example.org", ":20250110T110000Z", "SEQUENCE:2", summary="New title")
    res = parse(ics(new, old))
    assert [(i.title, i.when) for i in res.interactions] == [("New title", "2025-01-10T11:00:00+00:00")]


def test_too_fine_or_unreadable_rules_are_skipped_quickly():
    data = ics(
        event("fine@example.org", ":20000101T000000Z", "RRULE:FREQ=SECONDLY;BYMONTH=2;BYMONTHDAY=30"),
        event("bad@example.org", ":20250101T000000Z", "RRULE:FREQ=FORTNIGHTLY"),
        event("ok@example.org", ":20250101T000000Z"),
    )
    t0 = time.perf_counter()
    res = parse(data)
    assert time.perf_counter() - t0 < 2
    assert [s.index for s in res.skipped] == [0, 1]
    assert "too fine" in res.skipped[0].reason and "RRULE" in res.skipped[1].reason
    assert len(res.interactions) == 1


# ---------------------------------------------------------------- people


def test_attendees_declined_delegated_rooms_and_alarms():
    body = event(
        "p@example.org", ":20250301T100000Z",
        "ORGANIZER;CN=Lena Organiser:MAILTO:Lena@Example.ORG",
        "ATTENDEE;PARTSTAT=ACCEPTED;CN=Ana Ortiz:mailto:ana@example.org",
        "ATTENDEE;PARTSTAT=DECLINED;CN=Bo Decliner:mailto:bo@example.org",
        "ATTENDEE;PARTSTAT=DELEGATED:mailto:cy@example.org",
        "ATTENDEE;CUTYPE=ROOM;CN=Room 4:mailto:room4@example.org",
        "ATTENDEE;CUTYPE=RESOURCE:mailto:projector@example.org",
        "ATTENDEE;CUTYPE=GROUP:mailto:team@example.org",
        "ATTENDEE;ROLE=NON-PARTICIPANT:mailto:fyi@example.org",
        "ATTENDEE:urn:uuid:1b4e28ba-2fa1-11d2-883f-0016d3cca427",
        "ATTENDEE;EMAIL=eve@example.net:urn:uuid:2c4e28ba-2fa1-11d2-883f-0016d3cca427",
        "ATTENDEE;CN=Bare Address:dan@example.com",
        "ATTENDEE:mailto:ana@example.org",
        "BEGIN:VALARM", "ACTION:EMAIL", "TRIGGER:-PT15M", "SUMMARY:Reminder", "DESCRIPTION:x",
        "ATTENDEE:mailto:alarm-only@example.org", "END:VALARM",
    )
    (m,) = parse(ics(body)).interactions
    assert m.organizer == "lena@example.org"
    assert m.participants == ["ana@example.org", "dan@example.com", "eve@example.net", "lena@example.org"]
    assert m.names == {"lena@example.org": "Lena Organiser", "ana@example.org": "Ana Ortiz",
                       "dan@example.com": "Bare Address"}


def test_cn_rfc6868_escapes_and_quotes():
    body = event(
        "n@example.org", ":20250301T100000Z",
        "ATTENDEE;CN=\"Dana ^'DJ^' Example\":mailto:dana@example.org",
        "ATTENDEE;CN=\"Ortiz, Ana\":mailto:ana@example.org",
        "ATTENDEE;CN=Line^nTwo ^^ caret:mailto:lt@example.org",
        "SUMMARY:ignored second summary",
    )
    (m,) = parse(ics(body)).interactions
    # RFC 6868 section 3: ^' is a double quote, ^n a newline, ^^ a caret
    assert m.names == {"dana@example.org": 'Dana "DJ" Example', "ana@example.org": "Ortiz, Ana",
                       "lt@example.org": "Line\nTwo ^ caret"}


def test_summary_text_escapes_and_unescaped_commas_are_kept():
    (m,) = parse(ics(event("s@example.org", ":20250301T100000Z",
                           summary="Plan\\, review\\; next, then lunch\\nand more"))).interactions
    assert m.title == "Plan, review; next, then lunch\nand more"


# ---------------------------------------------------------------- time zones and all-day events

OFFICE_TZ = """BEGIN:VTIMEZONE
TZID:Head Office Time
BEGIN:STANDARD
DTSTART:19701025T030000
RRULE:FREQ=YEARLY;BYMONTH=10;BYDAY=-1SU
TZOFFSETFROM:+0200
TZOFFSETTO:+0100
TZNAME:HOT
END:STANDARD
BEGIN:DAYLIGHT
DTSTART:19700329T020000
RRULE:FREQ=YEARLY;BYMONTH=3;BYDAY=-1SU
TZOFFSETFROM:+0100
TZOFFSETTO:+0200
TZNAME:HOST
END:DAYLIGHT
END:VTIMEZONE"""


def test_tzid_from_our_own_vtimezone():
    data = ics(
        OFFICE_TZ,
        event("w@example.org", ';TZID="Head Office Time":20250115T090000'),
        event("s@example.org", ";TZID=Head Office Time:20240715T090000"),
    )
    # 09:00 at +0100 in winter is 08:00 UTC; at +0200 in summer 07:00 UTC
    assert whens(parse(data)) == ["2025-01-15T08:00:00+00:00", "2024-07-15T07:00:00+00:00"]


def test_olson_tzid_without_vtimezone_and_dst_in_a_recurrence():
    data = ics(
        event("b@example.org", ";TZID=Europe/Berlin:20250115T090000"),
        # weekly 09:00 Berlin across the change to summer time on 2025-03-30 (last Sunday of March)
        event("dst@example.org", ";TZID=Europe/Berlin:20250324T090000", "RRULE:FREQ=WEEKLY;COUNT=2"),
        event("moz@example.org", ";TZID=/mozilla.org/20050126_1/Europe/Berlin:20250115T090000"),
    )
    assert whens(parse(data)) == [
        "2025-01-15T08:00:00+00:00",
        "2025-03-24T08:00:00+00:00", "2025-03-31T07:00:00+00:00",
        "2025-01-15T08:00:00+00:00",
    ]


def test_vtimezone_in_the_file_wins_over_the_olson_name():
    fixed = ("BEGIN:VTIMEZONE\nTZID:Europe/Berlin\nBEGIN:STANDARD\nDTSTART:19700101T000000\nTZOFFSETFROM:+0300\n"
             "TZOFFSETTO:+0300\nEND:STANDARD\nEND:VTIMEZONE")
    (m,) = parse(ics(fixed, event("f@example.org", ";TZID=Europe/Berlin:20250115T090000"))).interactions
    assert m.when == "2025-01-15T06:00:00+00:00"


def test_floating_and_unknown_zones_are_read_as_utc_with_a_warning():
    res = parse(ics(event("fl@example.org", ":20250115T090000"),
                    event("uk@example.org", ";TZID=Nowhere/Special:20250115T090000")))
    assert whens(res) == ["2025-01-15T09:00:00+00:00", "2025-01-15T09:00:00+00:00"]
    assert any("floating" in w for w in res.warnings)
    assert any("Nowhere/Special" in w for w in res.warnings)


def test_all_day_events_are_dates():
    data = ics(
        event("ad@example.org", ";VALUE=DATE:20250304"),
        event("yr@example.org", ";VALUE=DATE:20230704", "RRULE:FREQ=YEARLY", "EXDATE;VALUE=DATE:20240704"),
    )
    res = parse(data)
    assert whens(res) == ["2025-03-04", "2023-07-04"]  # 2024 excluded, 2025-07-04 is after today
    assert res.interactions[0].key == "ad@example.org#2025-03-04"


# ---------------------------------------------------------------- broken input


def test_broken_events_are_skipped_with_their_line_and_the_rest_imports():
    data = ics(
        event("good1@example.org", ":20250101T100000Z"),
        "BEGIN:VEVENT\nUID:nodate@example.org\nSUMMARY:No date\nEND:VEVENT",
        event("baddate@example.org", ":2025-13-45"),
        event("good2@example.org", ":20250102T100000Z"),
        "BEGIN:VEVENT\nUID:open@example.org\nDTSTART:20250103T100000Z",  # never closed
        eol="\n",
    )
    res = parse(data)
    assert [i.key.split("#")[0] for i in res.interactions] == ["good1@example.org", "good2@example.org"]
    assert [(s.line, s.index) for s in res.skipped] == [(9, 1), (13, 2), (23, 4)]
    assert "DTSTART" in res.skipped[0].reason and "2025-13-45" in res.skipped[1].reason
    assert "END:VEVENT" in res.skipped[2].reason
    assert str(res.skipped[0]).startswith("cal.ics:9: ")
    with pytest.raises(RecordError) as err:
        parse(data, strict=True)
    assert err.value.line == 9 and "DTSTART" in str(err.value)


def test_unreadable_line_inside_an_event_is_a_warning_or_strict_error():
    data = ics(event("u@example.org", ":20250101T100000Z", "this line has no colon"))
    res = parse(data)
    assert len(res.interactions) == 1 and any("unreadable" in w for w in res.warnings)
    with pytest.raises(RecordError):
        parse(data, strict=True)


def test_bom_crcrlf_cp1252_and_folds():
    body = ics(event(
        "enc@example.org", ":20250101T100000Z",
        "ATTENDEE;CN=Zoë Example:mailto:zoe@example.org",
        "ATTENDEE;CN=Ren\x00:mailto:rene@example.org",
    ), eol="\r\r\n")
    # René's line in Windows-1252 (é = 0xE9), the rest UTF-8; a BOM in front
    data = b"\xef\xbb\xbf" + body.replace(b"Ren\x00", b"Ren\xe9")
    # fold the summary in the middle of a word, and Zoë's CN in the middle of the two bytes of "ë"
    data = data.replace(b"SUMMARY:Sync", b"SUMMARY:Sy\r\r\n nc").replace(b"Zo\xc3\xab", b"Zo\xc3\r\n \xab")
    res = parse(data)
    (m,) = res.interactions
    assert m.title == "Sync"
    assert m.names == {"zoe@example.org": "Zoë Example", "rene@example.org": "René"}
    assert any("Windows-1252" in w for w in res.warnings)


def test_mixed_line_ends_within_one_file():
    # RFC 5545 section 3.1 ends lines with CR LF; files mixing LF, CR LF and CR-only events are still read whole.
    first = event("m1@example.org", ":20250101T100000Z", "ORGANIZER:mailto:o@example.org").replace("\n", "\r\n")
    second = event("m2@example.org", ":20250102T100000Z", "ORGANIZER:mailto:o@example.org").replace("\n", "\r")
    third = event("m3@example.org", ":20250103T100000Z", "ORGANIZER:mailto:o@example.org")
    data = ("BEGIN:VCALENDAR\r\nVERSION:2.0\r\n" + first + "\r\n" + second + "\r" + third
            + "\nEND:VCALENDAR\r\n").encode()
    res = parse(data)
    assert [i.key.split("#")[0] for i in res.interactions] == ["m1@example.org", "m2@example.org", "m3@example.org"]
    assert [i.line for i in res.interactions] == [3, 9, 15]
    assert res.skipped == []


def test_bare_vevent_and_utf16_files():
    bare = event("bare@example.org", ":20250101T100000Z",
                 "ORGANIZER:mailto:o@example.org").replace("\n", "\r\n").encode()
    assert parse(bare).interactions[0].participants == ["o@example.org"]
    utf16 = ics(event("u16@example.org", ":20250101T100000Z")).decode().encode("utf-16")
    assert len(parse(utf16).interactions) == 1


def test_empty_calendar_and_todo_only_calendar_warn():
    res = parse(b"\xef\xbb\xbfBEGIN:VCALENDAR\r\nEND:VCALENDAR\r\n")
    assert res.interactions == [] and any("no events" in w for w in res.warnings)
    todo = parse(ics("BEGIN:VTODO\nUID:t@example.org\nSUMMARY:File taxes\nEND:VTODO",
                     event("e@example.org", ":20250101T100000Z")))
    assert len(todo.interactions) == 1 and any("VTODO" in w for w in todo.warnings)


def test_stray_end_lines_do_not_stop_the_file():
    data = ics("END:VALARM", event("a@example.org", ":20250101T100000Z"), "END:VTODO",
               event("b@example.org", ":20250102T100000Z"))
    res = parse(data)
    assert len(res.interactions) == 2 and sum("without a matching BEGIN" in w for w in res.warnings) == 2


def test_dispatcher_reads_ics(tmp_path):
    path = tmp_path / "meetings.ics"
    path.write_bytes(ics(event("disp@example.org", ":20250101T100000Z")))
    res = parse_file(path)
    assert res.kind == "ics" and len(res.interactions) == 1 and res.interactions[0].source == str(path)


_SAMPLE = ics(
    OFFICE_TZ,
    event("f1@example.org", ";TZID=Head Office Time:20250106T090000", "RRULE:FREQ=WEEKLY;COUNT=5",
          "ATTENDEE;CN=\"Ana\":mailto:ana@example.org", "EXDATE;TZID=Head Office Time:20250113T090000"),
    event("f2@example.org", ";VALUE=DATE:20250304", "ORGANIZER:mailto:o@example.org"),
)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.data())
def test_mangled_files_never_raise_anything_but_input_errors(data):
    """Cut, splice and corrupt a valid file: a ParseResult or an InputError, nothing else."""
    raw = bytearray(_SAMPLE)
    for _ in range(data.draw(st.integers(0, 6))):
        pos = data.draw(st.integers(0, len(raw)))
        op = data.draw(st.sampled_from(["delete", "insert", "flip"]))
        if op == "delete":
            del raw[pos:pos + data.draw(st.integers(1, 40))]
        elif op == "insert":
            raw[pos:pos] = data.draw(st.sampled_from([b"\r\n", b"\r\n ", b":", b";", b"\xff", b"^", b"\\",
                                                      b"BEGIN:VEVENT\r\n", b"END:VEVENT\r\n", b"Z",
                                                      b"RRULE:FREQ=DAILY\r\n"]))
        elif raw:
            raw[min(pos, len(raw) - 1)] ^= data.draw(st.integers(1, 255))
    try:
        res = parse(bytes(raw))
    except InputError:
        return
    for m in res.interactions:
        assert m.kind == "meeting" and m.line >= 1 and m.index >= 0
        dt.date.fromisoformat(m.when[:10])


# ---------------------------------------------------------------- Davis Southern Women


def test_davis_southern_women_events_round_trip():
    # Dataset: Davis, Gardner & Gardner (1941), Davis Southern Women, as shipped by networkx
    # (networkx.davis_southern_women_graph()); addresses and dates are invented (tests/davis_ics.py).
    res = parse(davis_ics_bytes())
    graph = davis_graph()
    expected = davis_expected()
    got = {m.key.split("#")[0]: set(m.participants) for m in res.interactions}
    assert len(res.interactions) == 14 and res.skipped == []
    assert got == expected
    # each event's participants are exactly its bipartite neighbourhood in the graph
    for ev in graph.graph["bottom"]:
        assert got[f"davis-{ev.lower()}@davis.example"] == {davis_email(w) for w in nx.neighbors(graph, ev)}
    evelyn = davis_email("Evelyn Jefferson")
    assert evelyn == "evelyn.jefferson@davis.example"
    assert sum(evelyn in m.participants for m in res.interactions) == graph.degree("Evelyn Jefferson")
    assert all(m.names[evelyn] == "Evelyn Jefferson" for m in res.interactions if evelyn in m.participants)


def test_parse_does_not_hang_on_a_large_file():
    big = ics(*[event(f"e{i}@example.org", f":2024{1 + i % 12:02d}{1 + i % 28:02d}T100000Z",
                      "RRULE:FREQ=WEEKLY;COUNT=20", f"ATTENDEE:mailto:p{i % 50}@example.org") for i in range(500)])
    out: dict = {}
    worker = threading.Thread(target=lambda: out.update(res=parse(big)), daemon=True)
    t0 = time.perf_counter()
    worker.start()
    worker.join(30)
    assert not worker.is_alive(), "parse_ics did not finish in 30 s"
    assert len(out["res"].interactions) == 500 * 20
    assert time.perf_counter() - t0 < 30


def test_broken_time_zone_rule_skips_its_events_only():
    # RFC 5545 section 3.3.10: BYMONTH is 1..12. A VTIMEZONE rule with BYMONTH=0 is accepted when the zone is
    # built and fails only when an offset is asked for; the events in that zone are skipped with a reason,
    # the others still import.
    broken = OFFICE_TZ.replace("BYMONTH=10", "BYMONTH=0")
    data = ics(broken, event("z1@example.org", ";TZID=Head Office Time:20250106T090000"),
               event("z2@example.org", ":20250107T090000Z"))
    res = parse(data)
    assert [m.key.split("#")[0] for m in res.interactions] == ["z2@example.org"]
    assert len(res.skipped) == 1 and "time zone cannot be used" in res.skipped[0].reason


def test_two_events_in_a_broken_time_zone_are_both_skipped_without_waiting_for_ever():
    # dateutil keeps a lock taken after a broken VTIMEZONE rule fails; asking the zone a second time must not hang.
    broken = OFFICE_TZ.replace("BYMONTH=10", "BYMONTH=0")
    data = ics(broken, event("z1@example.org", ";TZID=Head Office Time:20250106T090000"),
               event("z3@example.org", ";TZID=Head Office Time:20250108T090000"),
               event("z2@example.org", ":20250107T090000Z"))
    out: dict = {}
    worker = threading.Thread(target=lambda: out.update(res=parse(data)), daemon=True)
    worker.start()
    worker.join(20)
    assert not worker.is_alive(), "parse_ics waited for ever on a broken time zone"
    res = out["res"]
    assert [m.key.split("#")[0] for m in res.interactions] == ["z2@example.org"]
    assert len(res.skipped) == 2 and all("time zone cannot be used" in s.reason for s in res.skipped)
