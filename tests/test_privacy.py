"""Forgetting a person and removing a source leave no trace in the workspace file's bytes."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from mynet.cli import main

PEOPLE = """Name,Email,Phone,Company,Notes
Zebedee Quartermaine,zebedee.quartermaine@quillon.example,+44 7700 900777,Quillon Labs,Secret-note-Xylophonic
Ana Lind,ana@quillon.example,+44 7700 900123,Quillon Labs,
Bo Ek,bo@velvane.example,,Velvane Robotics,
"""

CAL = """BEGIN:VCALENDAR\r
VERSION:2.0\r
PRODID:-//mynet tests//EN\r
BEGIN:VEVENT\r
UID:e1@example.org\r
DTSTAMP:20250101T000000Z\r
DTSTART:20250301T100000Z\r
SUMMARY:Planning\r
ORGANIZER;CN=You:mailto:you@example.org\r
ATTENDEE;CN=Zebedee Quartermaine:mailto:zebedee.quartermaine@quillon.example\r
ATTENDEE;CN=Ana Lind:mailto:ana@quillon.example\r
END:VEVENT\r
END:VCALENDAR\r
"""

SECRETS = ["Zebedee", "Quartermaine", "zebedee.quartermaine", "900777", "Xylophonic"]


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def raw_bytes(ws: Path) -> bytes:
    data = b""
    for p in ws.parent.glob(ws.name + "*"):  # the file, its -wal and -shm if any
        data += p.read_bytes()
    return data


def test_forget_leaves_no_trace_and_stays_forgotten(tmp_path, capsys):
    ws = tmp_path / "ws.sqlite"
    people = tmp_path / "people.csv"
    people.write_text(PEOPLE, encoding="utf-8")
    cal = tmp_path / "cal.ics"
    cal.write_text(CAL, encoding="utf-8")
    base = ["--workspace", str(ws)]
    run(capsys, *base, "me", "--email", "you@example.org")
    assert run(capsys, *base, "import", str(people), str(cal))[0] == 0
    zeb = next(p for p in json.loads(run(capsys, *base, "contacts", "--json")[1])
               if p["name"] == "Zebedee Quartermaine")
    run(capsys, *base, "rate", str(zeb["id"]), "0.8")
    run(capsys, *base, "tie", str(zeb["id"]), "Bo Ek", "--note", "met at Xylophonic gala")
    run(capsys, *base, "ties", "--json")  # fill the caches with derived data about him
    # ... and the derived rows: the analysis (groups, measures), the event index `why` reads, your brokerage
    run(capsys, *base, "why", str(zeb["id"]), "Bo Ek")
    run(capsys, *base, "audit")
    assert all(s.encode() in raw_bytes(ws) for s in SECRETS[:3])
    code, out, _ = run(capsys, *base, "forget", str(zeb["id"]), "--yes")
    assert code == 0 and "Forgotten" in out
    raw = raw_bytes(ws)
    for secret in SECRETS:
        assert secret.encode() not in raw, secret
        assert secret.lower().encode() not in raw.lower(), secret
    names = [p["name"] for p in json.loads(run(capsys, *base, "contacts", "--json")[1])]
    assert names == ["Ana Lind", "Bo Ek"]
    # Re-importing the same (changed) export does not bring him back.
    people.write_text(PEOPLE + "Cy Moss,cy@quillon.example,,Quillon Labs,\n", encoding="utf-8")
    code, out, err = run(capsys, *base, "import", str(people))
    assert code == 0 and "forget" in err
    names = [p["name"] for p in json.loads(run(capsys, *base, "contacts", "--json")[1])]
    assert "Zebedee Quartermaine" not in names and "Cy Moss" in names


def test_remove_source_removes_what_only_it_supported(tmp_path, capsys):
    ws = tmp_path / "ws.sqlite"
    a = tmp_path / "a.csv"
    a.write_text("Name,Email,Notes\nAna Lind,ana@x.example,\nOnly "
                 "Inthisfile,only.inthisfile@x.example,Unique-Marker-Q\n",
                 encoding="utf-8")
    b = tmp_path / "b.csv"
    b.write_text("Name,Email\nAna Lind,ana@x.example\n", encoding="utf-8")
    base = ["--workspace", str(ws)]
    run(capsys, *base, "import", str(a), str(b))
    code, out, _ = run(capsys, *base, "sources", "--remove", "a.csv", "--yes")
    assert code == 0 and "Removed" in out
    people = json.loads(run(capsys, *base, "contacts", "--json")[1])
    assert [p["name"] for p in people] == ["Ana Lind"] and people[0]["sources"] == ["b.csv"]
    raw = raw_bytes(ws)
    assert b"Inthisfile" not in raw and b"Unique-Marker-Q" not in raw
    code, _, err = run(capsys, *base, "sources", "--remove", "nope.csv", "--yes")
    assert code == 4 and "no imported source" in err


@pytest.mark.parametrize("removed", ["a.csv", "b.csv"])  # one of the two holds the records decisions are anchored to
def test_remove_source_keeps_decisions_about_people_still_in_other_files(tmp_path, capsys, removed):
    ws = tmp_path / "ws.sqlite"
    a = tmp_path / "a.csv"
    a.write_text("Name,Email\nAna Lind,ana@x.example\nBo Ek,bo@x.example\n", encoding="utf-8")
    b = tmp_path / "b.csv"
    b.write_text("Name,Email\nBo Ek,bo@x.example\nAna Lind,ana@x.example\n", encoding="utf-8")
    base = ["--workspace", str(ws)]
    run(capsys, *base, "import", str(a), str(b))
    run(capsys, *base, "rate", "Ana Lind", "0.9")
    run(capsys, *base, "tie", "Ana Lind", "Bo Ek", "--note", "rowing")
    assert run(capsys, *base, "sources", "--remove", removed, "--yes")[0] == 0
    people = {p["name"]: p for p in json.loads(run(capsys, *base, "contacts", "--json")[1])}
    assert people["Ana Lind"]["warmth"] == 0.9
    code, out, _ = run(capsys, *base, "why", "Ana Lind", "Bo Ek")
    assert "you said they know each other: rowing" in out
