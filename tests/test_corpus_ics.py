"""Every .ics and .txt file of the shared corpus, read in place by the iCalendar importer.

A file must give a ParseResult or an InputError with a clear message: never
another exception, never a hang (5 s each). Files that hold iCalendar content
(a BEGIN:VCALENDAR or BEGIN:VEVENT line) must parse. A few files are checked
for the values their SOURCES.md describes; the file is named beside each check.
"""

from __future__ import annotations

import datetime as dt
import re
import threading
import time
from pathlib import Path

import pytest
from conftest import CORPUS

from mynet.errors import InputError
from mynet.sources.ics import parse_ics

pytestmark = pytest.mark.corpus
TODAY = dt.date(2025, 6, 30)
LIMIT_S = 5.0
_ICAL = re.compile(rb"^(?:\xef\xbb\xbf)?\s*BEGIN:(VCALENDAR|VEVENT)\s*$", re.IGNORECASE | re.MULTILINE)


def _files() -> list[Path]:
    if not CORPUS.is_dir():
        return []
    return sorted(p for p in CORPUS.rglob("*") if p.is_file() and p.suffix.lower() in (".ics", ".txt"))


def _ids(path: Path) -> str:
    return str(path.relative_to(CORPUS))


def _run(data: bytes, name: str):
    """parse_ics in a worker thread, so a hang fails the test instead of stalling the run."""
    out: dict = {}

    def work():
        try:
            out["result"] = parse_ics(data, name, today=TODAY)
        except BaseException as exc:  # handed back to the test, which judges it
            out["error"] = exc

    worker = threading.Thread(target=work, daemon=True)
    start = time.perf_counter()
    worker.start()
    worker.join(LIMIT_S)
    assert not worker.is_alive(), f"{name}: parse_ics did not finish in {LIMIT_S} s"
    return out, time.perf_counter() - start


@pytest.fixture
def corpus(corpus_dir) -> Path:
    return corpus_dir


@pytest.mark.parametrize("path", _files() or [None], ids=lambda p: _ids(p) if p else "no-corpus")
def test_corpus_file_parses_or_is_refused_clearly(corpus, path):
    if path is None:
        pytest.skip("the corpus has no .ics or .txt files")
    data = path.read_bytes()
    name = _ids(path)
    out, seconds = _run(data, name)
    assert seconds < LIMIT_S
    if "error" in out:
        exc = out["error"]
        assert isinstance(exc, InputError), f"{name}: {type(exc).__name__}: {exc}"
        message = str(exc)
        assert message.startswith(name + ":") and ("iCalendar" in message or "empty" in message), message
        assert not _ICAL.search(data), f"{name} holds iCalendar content but was refused: {message}"
        return
    result = out["result"]
    assert _ICAL.search(data), f"{name} has no BEGIN:VCALENDAR/VEVENT but was read as iCalendar"
    assert result.kind == "ics" and result.records == []
    for m in result.interactions:
        assert m.kind == "meeting" and m.source == name and m.line >= 1 and m.index >= 0
        assert dt.date.fromisoformat(m.when[:10]) <= TODAY
        assert all(p == p.lower() and "@" in p for p in m.participants)
    for s in result.skipped:
        assert s.source == name and s.line >= 1 and s.reason


def _parse(corpus: Path, rel: str, **kw):
    path = corpus / rel
    if not path.is_file():
        pytest.skip(f"{path} is absent")
    return parse_ics(path.read_bytes(), rel, today=TODAY, **kw)


ICAL_TESTS = "wild/collective__icalendar/src/icalendar/tests"


def test_blackberry_upper_case_mailto(corpus):
    res = _parse(corpus, f"{ICAL_TESTS}/calendars/property_params.ics")
    (m,) = res.interactions
    # calendars/property_params.ics (wild/SOURCES.md): three ATTENDEEs with "MAILTO:" and quoted CN;
    # the ORGANIZER rembrand@daxlab.com is also one of them; an all-day DATE event.
    assert m.participants == ["rembrand@daxlab.com", "rembrand@xs4all.nl", "rembspam@xs4all.nl"]
    assert m.organizer == "rembrand@daxlab.com"
    assert m.names["rembrand@xs4all.nl"] == "RembrandXS"
    assert m.when == "2012-08-14"


def test_bare_vevent_with_umlaut_and_comma_in_quoted_cn(corpus):
    (m,) = _parse(corpus, f"{ICAL_TESTS}/events/issue_101_icalendar_chokes_on_umlauts_in_organizer.ics").interactions
    # events/issue_101_...ics (wild/SOURCES.md): bare VEVENT, ORGANIZER;CN="acme, ädmin".
    assert m.names == {"adm-acme@mydomain.de": "acme, ädmin"}
    assert m.when == "2013-04-16T10:00:00+00:00" and m.line == 1


def test_bom_empty_calendar(corpus):
    res = _parse(corpus, f"{ICAL_TESTS}/calendars/bom_calendar.ics")
    # calendars/bom_calendar.ics (wild/SOURCES.md): UTF-8 BOM, an empty calendar -> a warning, no error
    assert res.interactions == [] and any("no events" in w for w in res.warnings)


def test_empty_parameter_is_tolerated(corpus):
    (m,) = _parse(corpus, f"{ICAL_TESTS}/calendars/broken_ical.ics").interactions
    # calendars/broken_ical.ics (wild/SOURCES.md): "DTSTART;;VALUE=DATE-TIME:20140409T093000" (floating)
    assert m.when == "2014-04-09T09:30:00+00:00" and m.title == "An Event with too many semicolons"


def test_rfc6868_file_with_a_start_added(corpus):
    path = corpus / f"{ICAL_TESTS}/calendars/rfc_6868.ics"
    if not path.is_file():
        pytest.skip(f"{path} is absent")
    data = path.read_bytes()
    as_is = parse_ics(data, "rfc_6868.ics", today=TODAY)
    assert as_is.interactions == [] and "DTSTART" in as_is.skipped[0].reason  # the file's event has no date
    dated = data.replace(b"BEGIN:VEVENT\n", b"BEGIN:VEVENT\nDTSTART:20200101T100000Z\n")
    (m,) = parse_ics(dated, "rfc_6868.ics", today=TODAY).interactions
    # calendars/rfc_6868.ics (wild/SOURCES.md) and RFC 6868 section 3: ^' decodes to a double quote
    assert m.names == {"babe@example.com": 'George Herman "Babe" Ruth'}


def test_cyrillic_tzid_from_its_vtimezone(corpus):
    (m,) = _parse(corpus, "wild/py-vobject__vobject/test_files/tzid_8bit.ics").interactions
    # test_files/tzid_8bit.ics (wild/SOURCES.md): Cyrillic TZID defined by the file's VTIMEZONE
    # (+0600 in summer); 2008-05-30 15:00 local is 09:00 UTC.
    assert m.when == "2008-05-30T09:00:00+00:00" and m.key == "CyrillicTest#2008-05-30T09:00:00+00:00"
