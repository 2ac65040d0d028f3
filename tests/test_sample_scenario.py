"""The invented sample scenario: reproducible, encoded as declared, consistent with its ground truth."""

from __future__ import annotations

import csv
import email.header
import io
import json
import mailbox
import quopri
import re
import subprocess
import sys
import unicodedata
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_contacts"
GENERATED = ["phone.vcf", "phone-recent.vcf", "old-work.vcf", "conference.csv", "club-members.csv",
             "calendar.ics", "mail.mbox", "ground_truth.json"]
RECORD_FILES = ["phone.vcf", "phone-recent.vcf", "old-work.vcf", "conference.csv", "club-members.csv"]
EMAIL_RE = re.compile(r"[A-Za-z0-9._%+'-]+@([A-Za-z0-9-]+(?:\.[A-Za-z0-9-]+)+)")
URL_RE = re.compile(r"https?://([A-Za-z0-9.-]+)")
# Fictitious telephone ranges (recalled from memory): Ofcom drama numbers 07700 900xxx, 020 7946 0xxx,
# 011x / 01x1 496 0xxx; North American 555-0100..0199.
FICTITIOUS_PHONE = re.compile(
    r"^(\+447700900\d{3}|\+442079460\d{3}|\+44(11[3-8]|1[2-6]1)4960\d{3}|\+1\d{3}55501\d{2})$")


def _text(name: str, encoding: str = "utf-8") -> str:
    """A sample file's text with its line ends kept as they are on disk."""
    return (SAMPLE / name).read_bytes().decode(encoding)


def _generate(out: Path) -> None:
    result = subprocess.run([sys.executable, str(SAMPLE / "generate.py"), "--out", str(out)],
                            capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr


@pytest.fixture(scope="module")
def truth() -> dict:
    return json.loads((SAMPLE / "ground_truth.json").read_text(encoding="utf-8"))


def _reserved(domain: str) -> bool:
    # RFC 2606 section 2 and 3 / RFC 6761 section 6.5: .example and example.com/.net/.org.
    domain = domain.lower().rstrip(".")
    return domain.endswith(".example") or domain in ("example.com", "example.net", "example.org") or \
        domain.endswith((".example.com", ".example.net", ".example.org"))


def _cards(text: str) -> list[str]:
    return re.findall(r"BEGIN:VCARD\r\n.*?END:VCARD\r\n", text, flags=re.S)


def _unfold_21(card: str) -> list[str]:
    """Logical lines of a vCard 2.1 card: quoted-printable soft breaks joined (vCard 2.1 spec, section 2.1.3)."""
    out: list[str] = []
    pending = ""
    for line in card.split("\r\n"):
        if pending:
            line, pending = pending + line, ""
        if "QUOTED-PRINTABLE" in line.split(":", 1)[0].upper() and line.endswith("="):
            pending = line[:-1]
            continue
        out.append(line)
    return [line for line in out if line]


def _fold(text: str) -> str:
    text = "".join({"ł": "l", "Ł": "L", "đ": "d", "Đ": "D", "ı": "i", "ø": "o", "Ø": "O"}.get(c, c) for c in text)
    return "".join(c for c in unicodedata.normalize("NFKD", text) if not unicodedata.combining(c)).lower()


def _decode_21(line: str) -> tuple[str, str]:
    """(property name, decoded value) of one unfolded 2.1 line whose value text is str from cp1252."""
    head, value = line.split(":", 1)
    params = head.upper().split(";")
    charset = next((p.split("=", 1)[1] for p in params if p.startswith("CHARSET=")), "windows-1252")
    raw = value.encode("cp1252")
    if "ENCODING=QUOTED-PRINTABLE" in params:
        raw = quopri.decodestring(raw)
    return params[0], raw.decode("utf-8" if charset == "UTF-8" else "cp1252")


# -- reproducibility ----------------------------------------------------------------------------------------
def test_generator_is_deterministic_and_matches_committed_files(tmp_path):
    _generate(tmp_path / "a")
    _generate(tmp_path / "b")
    for name in GENERATED:
        first = (tmp_path / "a" / name).read_bytes()
        assert first == (tmp_path / "b" / name).read_bytes(), f"{name} differs between two runs"
        stale = f"committed {name} is stale: run python sample_contacts/generate.py"
        assert first == (SAMPLE / name).read_bytes(), stale


def test_generator_is_stdlib_only():
    allowed = set(sys.stdlib_module_names) | {"_activity", "_formats", "_listmail", "_names", "_scenario", "_sources"}
    for path in SAMPLE.glob("*.py"):
        for match in re.finditer(r"^\s*(?:from|import)\s+([A-Za-z_][A-Za-z0-9_]*)", path.read_text(), flags=re.M):
            assert match.group(1) in allowed, f"{path.name} imports {match.group(1)}"
        assert len(path.read_text().splitlines()) < 600, f"{path.name} is too long"


# -- encodings ----------------------------------------------------------------------------------------------
@pytest.mark.parametrize("name", ["phone.vcf", "phone-recent.vcf", "calendar.ics"])
def test_utf8_content_lines_are_crlf_and_folded_at_75_octets(name):
    data = (SAMPLE / name).read_bytes()
    data.decode("utf-8")
    assert data.count(b"\n") == data.count(b"\r\n")
    lines = data.split(b"\r\n")
    # RFC 6350 section 3.2 / RFC 5545 section 3.1: lines SHOULD NOT be longer than 75 octets.
    assert max(len(line) for line in lines) <= 75
    folded = [line for line in lines if line.startswith(b" ")]
    assert folded, "the file should exercise folding"
    if name != "phone-recent.vcf":
        assert any(re.search(rb"[\xc0-\xff]", line) for line in lines), "some non-ASCII text expected"


def test_phone_exports_have_the_declared_versions_and_features():
    phone = _text("phone.vcf")
    recent = _text("phone-recent.vcf")
    assert len(_cards(phone)) == phone.count("VERSION:3.0")
    assert len(_cards(recent)) == recent.count("VERSION:4.0")
    for needle in ("item1.EMAIL", "item1.X-LABEL", "CATEGORIES:", "NOTE:", "TEL;", "ADR;"):
        assert needle in phone
    for needle in ("KIND:group", "KIND:org", "RELATED;TYPE=spouse:urn:uuid:", "MEMBER:urn:uuid:", "tel:+44-"):
        assert needle in recent


def test_old_work_is_cp1252_vcard21_with_quoted_printable(truth):
    data = (SAMPLE / "old-work.vcf").read_bytes()
    with pytest.raises(UnicodeDecodeError):
        data.decode("utf-8")  # raw windows-1252 bytes, as declared
    text = data.decode("cp1252")
    assert text.count("\n") == text.count("\r\n")
    cards = _cards(text)
    assert len(cards) == text.count("VERSION:2.1") == truth["files"]["old-work.vcf"]["records"]
    # Soft line breaks whose continuation does not start with whitespace (vCard 2.1 quoted-printable).
    assert re.search(r"=\r\n[^ \t\r]", text)
    people = {p["id"]: p for p in truth["people"]}
    people["you"] = truth["you"]
    owner = {r["index"]: r["person"] for r in truth["records"] if r["file"] == "old-work.vcf"}
    accented = 0
    for i, card in enumerate(cards):
        props: dict[str, str] = {}
        for line in _unfold_21(card):
            if ":" in line and not line.startswith("END"):
                name, value = _decode_21(line)
                props.setdefault(name, value)  # the first of each property
        family, given = props["N"].split(";")[:2]
        accented += not (family + given).isascii()
        person = people[owner[i]]
        true_given, true_family = person["name"].split(" ", 1)
        assert _fold(given) == _fold(true_given), (i, given, person["name"])
        assert _fold(family) in {_fold(true_family), _fold(person.get("former_family_name", ""))}, (i, family)
        assert props["EMAIL"].lower() in person["emails"]
    assert accented >= 5


@pytest.mark.parametrize("name, encoding, delimiter", [("conference.csv", "utf-8-sig", ","),
                                                       ("club-members.csv", "cp1252", ";")])
def test_csv_files_decode_and_rows_match_their_people(truth, name, encoding, delimiter):
    data = (SAMPLE / name).read_bytes()
    if encoding == "utf-8-sig":
        assert data.startswith(b"\xef\xbb\xbf")
    else:
        with pytest.raises(UnicodeDecodeError):
            data.decode("utf-8")
    rows = list(csv.reader(io.StringIO(data.decode(encoding), newline=""), delimiter=delimiter))
    header, rows = rows[0], rows[1:]
    assert len(header) == 6 and len(rows) == truth["files"][name]["records"]
    people = {p["id"]: p for p in truth["people"]}
    people["you"] = truth["you"]
    owner = {r["index"]: r["person"] for r in truth["records"] if r["file"] == name}
    email_col = header.index("Email" if name == "conference.csv" else "E-mail")
    for i, row in enumerate(rows):
        person = people[owner[i]]
        for address in filter(None, (a.strip().lower() for a in row[email_col].split(";"))):
            assert address in person["emails"], (name, i, address)
        if name == "club-members.csv" and row[3]:
            digits = re.sub(r"\D", "", row[3])
            assert any(digits.endswith(p[-9:]) for p in person["phones"]), (i, row[3])


def test_mbox_headers_decode(truth):
    data = (SAMPLE / "mail.mbox").read_bytes()
    data.decode("ascii")
    box = mailbox.mbox(SAMPLE / "mail.mbox")
    messages = list(box)
    assert len(messages) > 100
    assert sum(1 for m in messages if m["Precedence"] == "bulk" and m["List-Id"]) == 2
    names = {p["name"] for p in truth["people"] + truth["found_people"]}
    names |= {f"{n} via Freight data" for n in names}  # what the list relay writes in From (common practice)
    decoded = [str(email.header.make_header(email.header.decode_header(m["From"]))) for m in messages
               if "=?" in m["From"]]
    assert decoded and all(not d.isascii() for d in decoded)
    assert {d.rsplit(" <", 1)[0] for d in decoded} <= names
    ids = {m["Message-ID"] for m in messages}
    assert all(m["In-Reply-To"] in ids for m in messages if m["In-Reply-To"])


# -- ground truth -------------------------------------------------------------------------------------------
def test_every_record_is_mapped_once_and_in_range(truth):
    counts = {name: truth["files"][name]["records"] for name in RECORD_FILES}
    phone = _text("phone.vcf")
    recent = _text("phone-recent.vcf")
    assert counts["phone.vcf"] == len(_cards(phone)) and counts["phone-recent.vcf"] == len(_cards(recent))
    seen = {(r["file"], r["index"]) for r in truth["records"]}
    assert len(seen) == len(truth["records"])
    assert seen == {(name, i) for name, n in counts.items() for i in range(n)}
    ids = {p["id"] for p in truth["people"]} | {"you"}
    for r in truth["records"]:
        assert r["person"] in ids or (r["person"] is None and r["kind"] in ("organisation", "group"))
    covered = {r["person"] for r in truth["records"]}
    assert ids <= covered, "every person appears in at least one address file"


def test_duplicates_ties_and_targets_are_consistent(truth):
    people = {p["id"]: p for p in truth["people"]}
    owner = {(r["file"], r["index"]): r["person"] for r in truth["records"]}
    for group in truth["duplicates"]:
        assert len(group["records"]) >= 2
        assert all(owner[(r["file"], r["index"])] == group["person"] for r in group["records"])
    assert 2 <= sum(not g["exact_link"] for g in truth["duplicates"]) <= 6
    for near in truth["near_duplicates"]:
        a, b = (people[pid] for pid in near["people"][:2])
        assert a["name"] == b["name"] and a["org"] != b["org"]
        assert not set(a["emails"]) & set(b["emails"]) and not set(a["phones"]) & set(b["phones"])
    assert len(truth["near_duplicates"]) >= 2
    found = {f["id"] for f in truth["found_people"]}
    for tie in truth["ties"]:
        assert tie["a"] < tie["b"] and {tie["a"], tie["b"]} <= set(people) | found and tie["reasons"]
    for cluster in truth["clusters"].values():
        assert cluster["members"] and set(cluster["members"]) <= set(people)
    tied = {(t["a"], t["b"]) for t in truth["ties"]}
    for target in truth["targets"]:
        assert target["bridges"] and set(target["bridges"]) <= set(target["people"])
        for pid in target["people"]:
            assert people[pid]["org"] == target["org"]
            if pid not in target["bridges"]:
                stats = people[pid]["interactions"]
                assert stats["meetings"] == stats["messages"] == 0, f"{pid} should be reachable only via a bridge"
                assert any(tuple(sorted((pid, b))) in tied for b in target["bridges"])


def test_identifiers_are_reserved_or_fictitious(truth):
    for p in truth["people"] + [truth["you"]]:
        for phone in p["phones"]:
            assert FICTITIOUS_PHONE.match(phone), phone
    for name in GENERATED + ["README.md"]:
        path = SAMPLE / name
        text = path.read_bytes().decode("cp1252" if name in ("old-work.vcf", "club-members.csv") else "utf-8")
        text = text.replace("\r\n ", "").replace("=\r\n", "")  # unfold (RFC 6350 3.2) and join QP soft breaks
        domains = {m.group(1) for m in EMAIL_RE.finditer(text)} | {m.group(1) for m in URL_RE.finditer(text)}
        assert domains, name
        bad = sorted(d for d in domains if not _reserved(d))
        assert not bad, f"{name}: non-reserved domains {bad}"


def test_calendar_and_mail_addresses_are_known(truth):
    text = _text("calendar.ics").replace("\r\n ", "")
    for needle in ("BEGIN:VTIMEZONE", "RRULE:FREQ=WEEKLY", "EXDATE;TZID=", "RECURRENCE-ID", "PARTSTAT=DECLINED",
                   "STATUS:CANCELLED", "CUTYPE=ROOM"):
        assert needle in text
    known = {e for p in truth["people"] for e in p["emails"]} | set(truth["you"]["emails"])
    # Lists, desks, robots, and the archive and relay forms of people's addresses are known too.
    known |= set(truth["not_people"]) | {a.lower() for a in truth["list_mail"]["aliases"]}
    strangers = {n["email"] for n in truth["non_contacts"]}
    events = text.split("BEGIN:VEVENT")[1:]
    assert len(events) >= 200
    sizes = [e.count("ATTENDEE") for e in events]
    assert max(sizes) >= 70  # the all-hands, a broadcast event
    for address in re.findall(r"(?i)mailto:([^\s\r\n]+)", text):
        assert address.lower() in known | strangers, address
    mbox = _text("mail.mbox", "ascii")
    for address in re.findall(r"<(?:mailto:)?([^<>@\s:]+@[^<>\s?]+)[^<>]*>", mbox):
        if not re.fullmatch(r"[0-9a-f.]+@.*", address):  # Message-IDs
            assert address.lower() in known | strangers, address
