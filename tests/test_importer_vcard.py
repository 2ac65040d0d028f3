"""The vCard importer: invented cards reproducing each known pitfall, the RFC examples, round trips.

Every person, organisation and address here is invented (reserved example
domains). The RFC checks at the end read the standards folder of the shared
corpus in place and name the RFC section beside each check.
"""

from __future__ import annotations

import re
import subprocess
import sys
import time

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from mynet.errors import InputError, RecordError
from mynet.sources import parse_file
from mynet.sources.vcard import parse_vcard, split_value, unescape
from mynet.sources.vcard_text import read_cards

PATH = "test.vcf"


def crlf(text: str) -> bytes:
    """Cards are written with LF in this file for readability; real files use CRLF."""
    return text.replace("\n", "\r\n").encode("utf-8")


def parse(data: str | bytes, **kw):
    return parse_vcard(data if isinstance(data, bytes) else crlf(data), PATH, **kw)


def one(data: str | bytes, **kw):
    result = parse(data, **kw)
    assert len(result.records) == 1, (result.records, result.skipped)
    return result.records[0]


# ------------------------------------------------------------ quoted-printable


def test_qp_soft_breaks_whose_continuation_has_no_leading_space():
    rec = one(
        "BEGIN:VCARD\nVERSION:2.1\nFN:Ada Example\n"
        "NOTE;ENCODING=QUOTED-PRINTABLE:First line=0D=0ASecond li=\n"
        "ne goes on=\n"
        " with a space kept=0D=0A=\n"
        "#not a comment: part of the value\n"
        "END:VCARD\n"
    )
    assert rec.notes == ["First line\r\nSecond line goes on with a space kept\r\n#not a comment: part of the value"]


def test_qp_soft_break_between_cr_and_lf_escapes():
    rec = one("BEGIN:VCARD\nVERSION:2.1\nFN:Ada Example\nNOTE;ENCODING=QUOTED-PRINTABLE:one=0D=\n=0Atwo\nEND:VCARD\n")
    assert rec.notes == ["one\r\ntwo"]


def test_qp_with_charset_and_bare_parameter_forms():
    rec = one(
        "BEGIN:VCARD\nVERSION:2.1\n"
        "FN;CHARSET=UTF-8;ENCODING=QUOTED-PRINTABLE:Zo=C3=AB Exampl=C3=A9\n"
        "TITLE;QUOTED-PRINTABLE;CHARSET=ISO-8859-1:Caf=E9 owner\n"
        "LABEL;INTL;PARCEL,ENCODING=QUOTED-PRINTABLE:1 Example Way=0D=0AExampleton\n"
        "END:VCARD\n"
    )
    assert rec.full_name == "Zoë Examplé"
    assert rec.titles == ["Café owner"]
    # no ADR on the card, so the label becomes the address (comma between parameters, as some 2.1 writers print it)
    assert rec.addresses[0].street == "1 Example Way\r\nExampleton"


def test_v21_fold_keeps_its_whitespace_and_v3_fold_drops_one():
    # The vCard 2.1 specification folds long lines the RFC 822 way: wherever linear white space may
    # appear, CRLF followed by that white space may be inserted, and unfolding treats CRLF + LWSP as the
    # LWSP itself (the space stays). vCard 3.0 (RFC 2426 section 2.6) and 4.0 (RFC 6350 section 3.2)
    # instead drop the one white-space character after the line break.
    v21 = ("BEGIN:VCARD\r\nVERSION:2.1\r\nN:Example;Ada\r\nNOTE:Met at the harbour\r\n office opening\r\n"
           "TITLE:Chief\r\n\tengineer\r\nEND:VCARD\r\n")
    rec = one(v21)
    assert rec.notes == ["Met at the harbour office opening"]
    assert rec.titles == ["Chief\tengineer"]
    v30 = v21.replace("VERSION:2.1", "VERSION:3.0").replace("harbour\r\n office", "harbour \r\n office")
    rec = one(v30)
    assert rec.notes == ["Met at the harbour office opening"]
    assert rec.titles == ["Chiefengineer"]


# ------------------------------------------------------------ character sets


def test_cp1252_charset_and_undeclared_8bit_text():
    data = (
        b"BEGIN:VCARD\r\nVERSION:3.0\r\nN;CHARSET=ISO-8859-1:M\xfcller;J\xfcrgen;;;\r\n"
        b"FN;CHARSET=windows-1252:J\xfcrgen M\xfcller \x80\r\n"
        b"ORG:B\xe4ckerei Example\r\nEND:VCARD\r\n"
    )
    rec = one(data)
    assert (rec.family, rec.given) == ("Müller", "Jürgen")
    assert rec.full_name == "Jürgen Müller €"
    assert rec.orgs == ["Bäckerei Example"]
    # ORG names no CHARSET and is not UTF-8: read with a whole-file guess, and the user is told
    assert any("line(s) 5" in w and "a guess" in w for w in rec.warnings)


def test_shift_jis_bytes_with_backslash_trail_byte():
    # '表' is 0x95 0x5C in Shift_JIS: read as Latin-1 first, its second byte would act as a backslash escape
    name = "能見 表子"
    data = (
        b"BEGIN:VCARD\r\nVERSION:3.0\r\nFN;CHARSET=SHIFT_JIS:" + name.encode("cp932") + b"\r\n"
        b"N;CHARSET=SHIFT_JIS:" + "能見;表子;;;".encode("cp932") + b"\r\nEND:VCARD\r\n"
    )
    assert b"\x5c" in name.encode("cp932")
    rec = one(data)
    assert rec.full_name == name
    assert (rec.family, rec.given) == ("能見", "表子")
    assert not rec.warnings


def test_utf8_bom_and_utf16():
    card = "BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Bea Example\r\nEMAIL:bea@example.org\r\nEND:VCARD\r\n"
    assert one(b"\xef\xbb\xbf" + card.encode()).full_name == "Bea Example"
    assert one(card.encode("utf-16")).full_name == "Bea Example"  # with its byte-order mark
    assert one(card.encode("utf-16-le")).emails == ["bea@example.org"]  # without one


def test_cr_cr_lf_and_cr_only_line_ends():
    card = "BEGIN:VCARD\nVERSION:3.0\nFN:Cy Example\nNOTE:folded\n  note\nEMAIL:cy@example.org\nEND:VCARD\n"
    rec = one(card.replace("\n", "\r\r\n").encode())
    assert (rec.full_name, rec.notes, rec.emails) == ("Cy Example", ["folded note"], ["cy@example.org"])
    rec = one(card.replace("\n", "\r").encode())
    assert (rec.full_name, rec.notes) == ("Cy Example", ["folded note"])


@pytest.mark.parametrize("ends", [("\r\n", "\r\n", "\r"), ("\n", "\r", "\r\n"), ("\r", "\r\n", "\r\r\n"),
                                  ("\r\n", "\r", "\n")])
def test_mixed_line_ends_within_one_file(ends):
    # A CR-only card after CR LF cards (or any mix) is read, not dropped; lines are counted across the mix.
    cards = ["BEGIN:VCARD\nVERSION:3.0\nFN:Ana One\nNOTE:folded\n  note\nEMAIL:a1@example.org\nEND:VCARD\n",
             "BEGIN:VCARD\nVERSION:3.0\nFN:Bo Two\nEMAIL:b2@example.org\nEND:VCARD\n",
             "BEGIN:VCARD\nVERSION:3.0\nFN:Cy Three\nEMAIL:c3@example.org\nEND:VCARD\n"]
    data = "".join(card.replace("\n", end) for card, end in zip(cards, ends)).encode()
    result = parse_vcard(data, "mixed.vcf")
    assert [(r.line, r.full_name, r.emails) for r in result.records] == [
        (1, "Ana One", ["a1@example.org"]), (8, "Bo Two", ["b2@example.org"]), (13, "Cy Three", ["c3@example.org"])]
    assert result.records[0].notes == ["folded note"]
    assert result.skipped == [] and result.warnings == []


def test_line_ends_mixed_within_one_card():
    data = (b"BEGIN:VCARD\rVERSION:3.0\r\nN:Moss;Cara;;;\nFN:Cara Moss\rEMAIL:cara@example.org\rORG:Velvane\r\n"
            b"END:VCARD\r\nBEGIN:VCARD\r\nVERSION:3.0\rFN:Di Park\rEMAIL:di@example.org\r\nEND:VCARD\r")
    result = parse_vcard(data, "mixed.vcf")
    assert [(r.line, r.full_name, r.emails, r.orgs) for r in result.records] == [
        (1, "Cara Moss", ["cara@example.org"], ["Velvane"]), (8, "Di Park", ["di@example.org"], [])]


# ------------------------------------------------------------ structure


def test_nested_card_and_its_agent_relation():
    result = parse(
        "BEGIN:VCARD\nVERSION:2.1\nN:Example;Dana\nAGENT:\n"
        "BEGIN:VCARD\nVERSION:2.1\nN:Helper;Eli\nTEL:+1 555 0101\nEND:VCARD\n"
        "TEL:+1 555 0100\nEND:VCARD\n"
    )
    parent, child = result.records
    assert (parent.index, parent.line, child.index, child.line) == (0, 1, 1, 5)
    assert parent.phones == ["+1 555 0100"] and child.phones == ["+1 555 0101"]
    assert [(r.value, r.types) for r in parent.related] == [("Eli Helper", ["agent"])]


def test_agent_value_holding_a_whole_card():
    result = parse(
        "BEGIN:VCARD\nVERSION:3.0\nFN:Fay Example\n"
        "AGENT:BEGIN:VCARD\\nFN:Gus Assistant\\nEMAIL:gus@example.org\\nEND:VCARD\\n\nEND:VCARD\n"
    )
    fay, gus = result.records
    assert (gus.full_name, gus.emails, gus.line, gus.index) == ("Gus Assistant", ["gus@example.org"], 4, 1)
    assert [(r.value, r.types) for r in fay.related] == [("Gus Assistant", ["agent"])]


def test_begin_and_end_with_trailing_spaces_and_any_case():
    rec = one("begin:vcard \nVERSION:3.0\nFN:Hal Example\nEND:VCARD  \n")
    assert rec.full_name == "Hal Example"


def test_version_at_the_end_still_sets_the_escaping():
    rec = one("BEGIN:VCARD\nFN:Doe, Ida\nN:Doe;Ida\nEMAIL:ida@example.org\nVERSION:2.1\nEND:VCARD\n")
    assert (rec.version, rec.full_name) == ("2.1", "Doe, Ida")


def test_malformed_line_is_a_warning_and_strict_mode_names_it():
    card = "BEGIN:VCARD\nVERSION:3.0\nFN:Jo Example\nthis line is no property\nEMAIL:jo@example.org\nEND:VCARD\n"
    rec = one(card)
    assert rec.emails == ["jo@example.org"]
    assert any(w.startswith("line 4:") and "no property" in w for w in rec.warnings)
    with pytest.raises(RecordError) as err:
        parse(card, strict=True)
    assert err.value.line == 4
    assert str(err.value).startswith("test.vcf:4: ")


def test_one_bad_card_among_good_ones():
    text = (
        "BEGIN:VCARD\nVERSION:3.0\nFN:Kim Example\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:3.0\nnothing readable here\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:3.0\nFN:Lou Example\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:3.0\nFN:Max Unfinished\n"
    )
    result = parse(text)
    assert [r.full_name for r in result.records] == ["Kim Example", "Lou Example"]
    assert [r.index for r in result.records] == [0, 2]
    assert [(s.line, s.index) for s in result.skipped] == [(5, 1), (13, 3)]
    assert result.skipped[0].reason.startswith("card has no name, e-mail, phone or organisation")
    assert "line(s) 7 could not be read" in result.skipped[0].reason
    assert "no matching END:VCARD" in result.skipped[1].reason
    with pytest.raises(RecordError) as err:
        parse(text, strict=True)
    assert err.value.line == 7


def test_strict_mode_on_a_card_without_identity_or_end():
    with pytest.raises(RecordError) as err:
        parse("BEGIN:VCARD\nVERSION:4.0\nURL:http://example.org/\nEND:VCARD\n", strict=True)
    assert (err.value.line, err.value.reason) == (1, "card has no name, e-mail, phone or organisation")
    with pytest.raises(RecordError) as err:
        parse("BEGIN:VCARD\nVERSION:4.0\nFN:Ned Example\n", strict=True)
    assert err.value.line == 1 and "END:VCARD" in err.value.reason


def test_unfinished_card_does_not_swallow_the_following_ones():
    result = parse(
        "BEGIN:VCARD\nVERSION:3.0\nFN:Oda Unfinished\n"
        "BEGIN:VCARD\nVERSION:3.0\nFN:Pia Example\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:3.0\nFN:Quin Example\nEND:VCARD\n"
    )
    assert [r.full_name for r in result.records] == ["Pia Example", "Quin Example"]
    assert [(s.line, s.index) for s in result.skipped] == [(1, 0)]


def test_files_without_cards_are_refused_clearly():
    for data in (b"", b"hello\r\nworld\r\n", b"BEGIN:VCALENDAR\r\nEND:VCALENDAR\r\n", b"\x00\x01\x02binary"):
        with pytest.raises(InputError) as err:
            parse_vcard(data, PATH)
        assert "contains no vCard (no BEGIN:VCARD ... END:VCARD block)" in str(err.value)


def test_comment_lines_are_dropped_but_a_qp_continuation_starting_with_hash_is_kept():
    rec = one(
        "BEGIN:VCARD\nVERSION:2.1\nFN:Rae Example\n# a comment\n"
        "NOTE;ENCODING=QUOTED-PRINTABLE:before ->=\n#<- after\nEND:VCARD\n"
    )
    assert rec.notes == ["before ->#<- after"]
    assert any("comment line ignored" in w for w in rec.warnings)


def test_trailing_backslash_continues_an_address_on_the_next_line():
    rec = one("BEGIN:VCARD\nVERSION:2.1\nN:Example;Sam\nADR;HOME:;;c/o Tia Example\\\nBox 12\\\n1 Example "
              "Road;Exampleton;;12345;Exampleland\nEND:VCARD\n")
    assert rec.addresses[0].street == "c/o Tia Example\nBox 12\n1 Example Road"
    assert rec.addresses[0].country == "Exampleland"


# ------------------------------------------------------------ escaping per version


def test_unescaped_commas_in_21_are_text():
    rec = one(
        "BEGIN:VCARD\nVERSION:2.1\nFN:Doe, Uma\nN:Doe, Jr.;Uma\nORG:Company, The;Sales, North\n"
        "NOTE:one, two, three\nLABEL;WORK:1 Way, Exampleton\nEND:VCARD\n"
    )
    assert rec.full_name == "Doe, Uma"
    assert (rec.family, rec.given) == ("Doe, Jr.", "Uma")
    assert (rec.orgs, rec.org_units) == (["Company, The"], [["Sales, North"]])
    assert rec.notes == ["one, two, three"]
    assert rec.addresses[0].street == "1 Way, Exampleton"


def test_backslash_in_21_escapes_only_a_semicolon():
    rec = one("BEGIN:VCARD\nVERSION:2.1\nFN:A\\B;C\\;D\\\\E\nN:Smith\\;Jones;Val;;;\nORG:R\\&D\\;Lab;Unit\nEND:VCARD\n")
    assert rec.full_name == "A\\B;C;D\\\\E"
    assert (rec.family, rec.given) == ("Smith;Jones", "Val")
    assert (rec.orgs, rec.org_units) == (["R\\&D;Lab"], [["Unit"]])


def test_escapes_in_30_and_lists():
    rec = one(
        "BEGIN:VCARD\nVERSION:3.0\nFN:Vic Example\\, PhD\nN:Example;Vic;Ray,Lee;Dr.,Prof.;PhD,MBA\n"
        "NICKNAME:Vee,V\\,E\nCATEGORIES:alpha,beta\\, "
        "gamma,,delta\nNOTE:a\\nb\\\\n\\;c\nURL:http\\://example.org/x\nEND:VCARD\n"
    )
    assert rec.full_name == "Vic Example, PhD"
    assert (rec.additional, rec.prefix, rec.suffix) == ("Ray Lee", "Dr. Prof.", "PhD, MBA")
    assert rec.nicknames == ["Vee", "V,E"]
    assert rec.tags == ["alpha", "beta, gamma", "delta"]
    assert rec.notes == ["a\nb\\n;c"]
    assert rec.urls == ["http://example.org/x"]


def test_split_and_unescape_helpers():
    assert split_value("a\\;b;c", ";", v21=False) == ["a\\;b", "c"]
    assert split_value("a\\\\;b", ";", v21=False) == ["a\\\\", "b"]
    assert split_value("a\\\\;b", ";", v21=True) == ["a\\\\;b"]
    assert unescape("a\\\\;b", v21=True) == "a\\;b"
    assert unescape("x\\,y\\q", v21=False) == "x,y\\q"


# ------------------------------------------------------------ fields


def test_grouped_properties_and_address_book_labels():
    rec = one(
        "BEGIN:VCARD\nVERSION:3.0\nFN:Wes Example\n"
        "item1.EMAIL;type=INTERNET;type=pref:wes@example.org\nitem1.X-ABLabel:_$!<Work>!$_\n"
        "item2.ADR;type=WORK:;;2 Example Street;Exampleton;;54321;Exampleland\nitem2.X-ABLabel:Studio\n"
        "item3.X-ABRELATEDNAMES:Xia Example\nitem3.X-ABLabel:_$!<Manager>!$_\n"
        "item4.X-ABRELATEDNAMES:Yan Example\nitem4.X-ABLabel:Mentor\n"
        "X-MS-SPOUSE:Zed Example\n"
        "X-ANDROID-CUSTOM:vnd.android.cursor.item/relation;Abe Example;6;;;;;;;;;;;;;\n"
        "END:VCARD\n"
    )
    assert rec.emails == ["wes@example.org"]
    assert rec.addresses[0].types == ["work", "Studio"]
    assert [(r.value, r.types) for r in rec.related] == [
        ("Xia Example", ["manager"]),
        ("Yan Example", ["Mentor"]),
        ("Zed Example", ["spouse"]),
        ("Abe Example", ["friend"]),
    ]


def test_email_display_name_and_tel_uri():
    rec = one(
        'BEGIN:VCARD\nVERSION:2.1\nN:Example;Bo\nEMAIL;INTERNET:"Bo Example"\n  <bo@example.org>\n'
        "EMAIL:mailto:bo2@example.org\nTEL;VALUE=uri:tel:+1-555-0102;ext=7\nTEL;CELL:\nEND:VCARD\n"
    )
    assert rec.emails == ["bo@example.org", "bo2@example.org"]
    assert rec.phones == ["+1-555-0102;ext=7"]


def test_vcard40_related_kind_member_and_rfc6868():
    result = parse(
        "BEGIN:VCARD\nVERSION:4.0\nKIND:group\nFN:Example Reading Circle\n"
        "MEMBER:urn:uuid:00000000-0000-4000-8000-000000000001\nMEMBER:mailto:cal@example.org\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:4.0\nKIND:org\nFN:Example Works\nORG:Example Works\\, Ltd.;Research\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:4.0\nUID:urn:uuid:00000000-0000-4000-8000-000000000001\nFN:Cam Example\n"
        'RELATED;TYPE="colleague,friend":urn:uuid:00000000-0000-4000-8000-000000000002\n'
        "RELATED;VALUE=text;TYPE=spouse:Dee Example\n"
        'ADR;TYPE=home^^work;LABEL="^\'Home^\' of Cam^n1 Example Road":;;1 Example Road;Exampleton;;;\nEND:VCARD\n'
    )
    group, org, cam = result.records
    assert (group.card_kind, group.members) == (
        "group",
        ["urn:uuid:00000000-0000-4000-8000-000000000001", "mailto:cal@example.org"],
    )
    assert (org.card_kind, org.orgs, org.org_units) == ("org", ["Example Works, Ltd."], [["Research"]])
    assert cam.uid == "urn:uuid:00000000-0000-4000-8000-000000000001"
    assert [(r.value, r.types) for r in cam.related] == [
        ("urn:uuid:00000000-0000-4000-8000-000000000002", ["colleague", "friend"]),
        ("Dee Example", ["spouse"]),
    ]
    assert cam.addresses[0].types == ["home^work"]  # RFC 6868 ^^ is a caret
    props = read_cards(crlf("BEGIN:VCARD\nVERSION:4.0\nADR;LABEL=\"^'A^' ^^ B^nC\":;;x;;;;\nEND:VCARD\n"),
                       PATH).cards[0].props
    adr = next(p for p in props if p.name == "ADR")
    assert adr.params["LABEL"] == ['"A" ^ B\nC']  # RFC 6868 (section 3, from memory): ^' quote, ^^ caret, ^n newline


def test_base64_media_is_skipped_without_losing_what_follows():
    photo = "/9j/4AAQSkZJRgABAQEAYABgAAD/2wBDAAYEBQYFBAYGBQYHBwYIChAKCgkJChQODwwQFxQY"
    result = parse(
        "BEGIN:VCARD\nVERSION:2.1\nFN:Eve Example\nPHOTO;ENCODING=BASE64;TYPE=JPEG:\n"
        f" {photo}\n {photo}\n{photo}\n\nEMAIL:eve@example.org\nEND:VCARD\n"
        f"BEGIN:VCARD\nVERSION:3.0\nFN:Flo Example\nPHOTO;ENCODING=b;TYPE=JPEG:{photo}\n {photo}\nTEL:+1 555 "
        f"0103\nEND:VCARD\n"
        f"BEGIN:VCARD\nVERSION:4.0\nFN:Gil Example\nLOGO:data:image/jpeg;base64,{photo}\nNOTE:after, the "
        f"logo\nEND:VCARD\n"
        f"BEGIN:VCARD\nVERSION:2.1\nFN:Hap Example\nKEY;ENCODING=BASE64:not:base64:at:all\nTITLE:Keeper\nEND:VCARD\n"
    )
    eve, flo, gil, hap = result.records
    assert eve.emails == ["eve@example.org"] and flo.phones == ["+1 555 0103"]
    assert gil.notes == ["after, the logo"] and hap.titles == ["Keeper"]
    for rec in result.records:
        assert photo[:20] not in repr(rec) and not rec.warnings


def test_same_uid_on_two_cards_gives_two_records():
    # RFC 6350 §7.2.4: the identity layer merges them; the importer keeps both
    result = parse(
        "BEGIN:VCARD\nVERSION:4.0\nUID:urn:uuid:00000000-0000-4000-8000-00000000000a\nFN:Ivy "
        "Example\nEMAIL:ivy@example.org\nEND:VCARD\n"
        "BEGIN:VCARD\nVERSION:4.0\nUID:urn:uuid:00000000-0000-4000-8000-00000000000a\nFN:Ivy "
        "Example\nEMAIL:ivy@example.net\nEND:VCARD\n"
    )
    assert [r.uid for r in result.records] == ["urn:uuid:00000000-0000-4000-8000-00000000000a"] * 2
    assert [r.emails for r in result.records] == [["ivy@example.org"], ["ivy@example.net"]]


def test_dispatcher_reaches_the_importer(tmp_path):
    path = tmp_path / "people.vcf"
    path.write_bytes(crlf("BEGIN:VCARD\nVERSION:3.0\nFN:Jay Example\nEND:VCARD\n"))
    result = parse_file(path)
    assert (result.kind, result.records[0].full_name, result.records[0].source) == ("vcard", "Jay Example", str(path))


def test_nothing_printed_by_vobject_logging():
    code = (
        "import logging, mynet.sources.vcard as v\n"
        "logging.getLogger('vobject.base').error('this must not show')\n"
        "v.parse_vcard(b'BEGIN:VCARD\\r\\nFN:A\\r\\nbad line\\r\\nEND:VCARD\\r\\n', 'x.vcf')\n"
    )
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60, check=False)
    assert proc.returncode == 0, proc.stderr
    assert proc.stderr == "" and proc.stdout == ""


def test_pathological_headers_finish_quickly():
    bad = ["A" + ";a=b,c" * 3000 + ',":x', "X" + ";" * 5000 + ":v", "N;" + 'a="' * 3000 + ":x", "TEL;" + "a," * 5000
           + ":1"]
    start = time.perf_counter()
    for line in bad:
        assert one(f"BEGIN:VCARD\nVERSION:3.0\nFN:Kit Example\n{line}\nEND:VCARD\n").full_name == "Kit Example"
    assert time.perf_counter() - start < 5


# ------------------------------------------------------------ round trips (hypothesis)

# Any Unicode text but lone surrogates, with the characters that need escaping drawn more often.
ANY_TEXT = st.text(
    alphabet=st.one_of(st.sampled_from(list(',;\\\n\r:= #"^\t')), st.characters(blacklist_categories=("Cs",))),
    max_size=40,
)


def escape30(text: str) -> str:
    """Escape a text value as RFC 6350 §3.4 asks: backslash, comma, semicolon, newline."""
    return text.replace("\\", "\\\\").replace(",", "\\,").replace(";", "\\;").replace("\n", "\\n")


def fold(line: str, width: int) -> str:
    """Fold a content line every ``width`` characters (RFC 6350 §3.2: CRLF and one space)."""
    chunks = [line[i : i + width] for i in range(0, len(line), width)] or [""]
    return "\r\n ".join(chunks)


def qp_encode(text: str) -> str:
    """Quoted-printable for a 2.1 value: every byte but plain ASCII letters/digits/punctuation as =XX,
    ``:`` included (so no continuation line can read ``END:VCARD``), soft breaks every 60 characters."""
    out = "".join(chr(b) if 33 <= b <= 126 and b not in (0x3D, 0x3A) else f"={b:02X}" for b in text.encode("utf-8"))
    lines, cur = [], ""
    for token in re.findall(r"=[0-9A-F]{2}|.", out):
        if len(cur) + len(token) > 60:
            lines.append(cur + "=")
            cur = ""
        cur += token
    return "\r\n".join(lines + [cur])


def expected_lists(text):
    return [text] if text.strip() else []


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(fn=ANY_TEXT, note=ANY_TEXT, org=ANY_TEXT, title=ANY_TEXT, tag=ANY_TEXT,
       version=st.sampled_from(["3.0", "4.0"]), width=st.integers(min_value=1, max_value=80))
@example(fn="a\\", note="x\r", org="\r\r", title="\x85\u2028\x1c\x0c", tag=" ", version="3.0", width=1)
@example(fn="\nBEGIN:VCARD", note="END:VCARD", org="a\\\\\\", title="=", tag=",;", version="4.0", width=2)
def test_round_trip_30_40(fn, note, org, title, tag, version, width):
    lines = [f"{name}:{escape30(value)}" for name, value in
             (("FN", fn), ("NOTE", note), ("ORG", org), ("TITLE", title), ("CATEGORIES", tag))]
    body = "\r\n".join(fold(line, width) for line in lines)
    data = f"BEGIN:VCARD\r\nVERSION:{version}\r\nEMAIL:rt@example.org\r\n{body}\r\nEND:VCARD\r\n".encode()
    rec = one(data)
    assert rec.full_name == fn
    assert rec.notes == expected_lists(note)
    assert rec.orgs == expected_lists(org)
    assert rec.titles == expected_lists(title)
    assert rec.tags == expected_lists(tag)
    assert not rec.warnings


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(fn=ANY_TEXT, note=ANY_TEXT, org=ANY_TEXT, title=ANY_TEXT, tags=ANY_TEXT)
@example(fn="a\\;b;c\\", note="\r\n#x\r\n", org="Company, The;Unit", title="=0D=", tags="a,b\\,,c")
def test_round_trip_21_quoted_printable(fn, note, org, title, tags):
    # vCard 2.1: only ';' needs a backslash; commas are text (CATEGORIES is a comma list)
    def esc21(text):
        return text.replace(";", "\\;")

    lines = [f"{name};CHARSET=UTF-8;ENCODING=QUOTED-PRINTABLE:{qp_encode(esc21(value))}" for name, value in
             (("FN", fn), ("NOTE", note), ("ORG", org), ("TITLE", title), ("CATEGORIES", tags))]
    data = ("BEGIN:VCARD\r\nVERSION:2.1\r\nEMAIL:rt@example.org\r\n" + "\r\n".join(lines)
            + "\r\nEND:VCARD\r\n").encode()
    rec = one(data)
    assert rec.full_name == fn
    assert rec.notes == expected_lists(note)
    assert rec.orgs == expected_lists(org)
    assert rec.titles == expected_lists(title)
    assert rec.tags == [t for t in tags.split(",") if t.strip()]


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(body=st.binary(max_size=300), version=st.sampled_from(["2.1", "3.0", "4.0", ""]))
def test_arbitrary_bytes_inside_a_card_never_break_the_importer(body, version):
    data = b"BEGIN:VCARD\r\nVERSION:" + version.encode() + b"\r\n" + body + b"\r\nFN:Lee Example\r\nEND:VCARD\r\n"
    start = time.perf_counter()
    try:
        result = parse_vcard(data, PATH)
    except InputError:
        return
    assert time.perf_counter() - start < 5
    assert len(result.records) + len(result.skipped) >= 1


# ------------------------------------------------------------ RFC examples (shared corpus, read in place)


def std(corpus_dir, name):
    path = corpus_dir / "standards" / name
    return parse_vcard(path.read_bytes(), str(path))


def test_rfc6350_section_6_1_4_kind(corpus_dir):
    ind, org = std(corpus_dir, "rfc6350-sec6.1.4-kind.vcf").records
    # RFC 6350 §6.1.4: an individual and an organisation with ORG "ABC, Inc.;North American Division;Marketing"
    assert (ind.card_kind, ind.full_name) == ("individual", "Jane Doe")
    assert (org.card_kind, org.full_name) == ("org", "ABC Marketing")
    for rec in (ind, org):
        assert (rec.orgs, rec.org_units) == (["ABC, Inc."], [["North American Division", "Marketing"]])


def test_rfc6350_section_6_6_5_member(corpus_dir):
    family, john, jane, funky = std(corpus_dir, "rfc6350-sec6.6.5-member.vcf").records
    # RFC 6350 §6.6.5: group members resolve by UID to John Doe and Jane Doe
    assert family.card_kind == "group" and family.full_name == "The Doe family"
    assert family.members == [john.uid, jane.uid]
    assert (john.full_name, jane.full_name) == ("John Doe", "Jane Doe")
    assert john.uid == "urn:uuid:03a0e51f-d1aa-4385-8a53-e29025acd8af"
    # RFC 6350 §6.6.5: a list whose members are URIs, not cards
    assert funky.members == ["mailto:subscriber1@example.com", "xmpp:subscriber2@example.com",
                             "sip:subscriber3@example.com", "tel:+1-418-555-5555"]


def test_rfc6350_section_7_1_2_cards_without_name(corpus_dir):
    a, b = std(corpus_dir, "rfc6350-sec7.1.2-pid-matching.vcf").records
    # RFC 6350 §7.1.2: no FN, no N; the e-mail is the only identity
    assert (a.emails, b.emails) == (["jdoe@example.com"], ["john@example.com"])
    assert a.display_name() == "jdoe@example.com"


def test_rfc6350_section_7_2_creation_edit_merge(corpus_dir):
    (created,) = std(corpus_dir, "rfc6350-sec7.2.1-creation.vcf").records
    # RFC 6350 §7.2.1
    assert created.uid == "urn:uuid:4fbe8971-0bc3-424c-9c26-36c3e1eff6b1"
    assert (created.full_name, created.family, created.given,
            created.emails) == ("J. Doe", "Doe", "J.", ["jdoe@example.com"])
    (added,) = std(corpus_dir, "rfc6350-sec7.2.3-add-property.vcf").records
    assert added.phones == ["+1-555-555-5555"]  # RFC 6350 §7.2.3: tel: URI, VALUE=uri
    a, b = std(corpus_dir, "rfc6350-sec7.2.4-simultaneous-edit.vcf").records
    # RFC 6350 §7.2.4: two cards, one UID, kept apart for the identity layer to merge
    assert a.uid == b.uid == created.uid
    assert (a.emails, b.emails) == (["jdoe@example.com", "boss@example.com"], ["jdoe@example.com", "ceo@example.com"])
    assert a.phones == b.phones == ["+1-555-555-5555", "+1-666-666-6666"]
    (merged,) = std(corpus_dir, "rfc6350-sec7.2.4-merged.vcf").records
    # RFC 6350 §7.2.4 (the merged result)
    assert merged.emails == ["jdoe@example.com", "boss@example.com", "ceo@example.com"]
    assert merged.phones == ["+1-555-555-5555", "+1-666-666-6666"]
    (simple,) = std(corpus_dir, "rfc6350-sec7.2.5-simplified.vcf").records
    assert (simple.emails, simple.phones) == (merged.emails, merged.phones)  # RFC 6350 §7.2.5


def test_rfc6350_section_8_author_card(corpus_dir):
    (rec,) = std(corpus_dir, "rfc6350-sec8.vcf").records
    # RFC 6350 §8
    assert (rec.full_name, rec.family, rec.given) == ("Simon Perreault", "Perreault", "Simon")
    assert rec.suffix == "ing. jr, M.Sc."  # two suffix values
    assert rec.orgs == ["Viagenie"]
    adr = rec.addresses[0]
    assert (adr.locality, adr.region, adr.postcode, adr.country) == ("Quebec", "QC", "G1V 2M2", "Canada")
    assert "2875 Laurier" in adr.street and "Suite D2-630" in adr.street and adr.types == ["work"]
    assert rec.phones == ["+1-418-656-9254;ext=102", "+1-418-262-6501"]
    assert rec.emails == ["simon.perreault@viagenie.ca"]
    assert rec.urls == ["http://nomis80.org"]


def test_rfc6350_section_6_property_examples(corpus_dir):
    result = std(corpus_dir, "rfc6350-sec6-property-examples.wrapped.vcf")
    (rec,) = result.records
    # RFC 6350 §6.2.1 FN with an escaped comma; §6.2.2 N; §6.2.3 NICKNAME "Jim,Jimmie" is two nicknames
    assert rec.full_name == "Mr. John Q. Public, Esq."
    assert (rec.family, rec.given, rec.additional, rec.prefix,
            rec.suffix) == ("Public", "John", "Quinlan", "Mr.", "Esq.")
    assert rec.nicknames == ["Robbie", "Jim", "Jimmie", "Boss"]
    # RFC 6350 §6.6.6 RELATED; the text value is folded at a space with one leading space, so it unfolds to "JaneDoe"
    assert [(r.value, r.types) for r in rec.related] == [
        ("urn:uuid:f81d4fae-7dec-11d0-a765-00a0c91e6bf6", ["friend"]),
        ("http://example.com/directory/jdoe.vcf", ["contact"]),
        ("Please contact my assistant JaneDoe for any inquiries.", ["co-worker"]),
    ]
    # RFC 6350 §6.6.4 ORG, §6.7.1 CATEGORIES, §6.4.1 TEL with a quoted TYPE list
    assert (rec.orgs, rec.org_units) == (["ABC, Inc."], [["North American Division", "Marketing"]])
    assert rec.tags == ["TRAVEL AGENT", "INTERNET", "IETF", "INDUSTRY", "INFORMATION TECHNOLOGY"]
    assert rec.phones[:2] == ["+1-555-555-5555;ext=5555", "+33-01-23-45-67"]
    # RFC 6350 §6.7.2 NOTE folded with two spaces keeps one
    assert rec.notes == ["This fax number is operational 0800 to 1715 EST, Mon-Fri."]
    # the RFC's own "BDAY;19531015T231000Z" (a ';' for the ':') is reported, not silently dropped
    assert any("BDAY;19531015T231000Z" in w for w in rec.warnings)
    # PHOTO/LOGO/SOUND/KEY data: URIs contain a comma and are not kept anywhere
    assert "base64" not in repr(rec)


def test_rfc2426_section_7_authors(corpus_dir):
    frank, tim = std(corpus_dir, "rfc2426-sec7.vcf").records
    # RFC 2426 §7: BEGIN:vCard in mixed case, no N property
    assert (frank.full_name, frank.orgs) == ("Frank Dawson", ["Lotus Development Corporation"])
    adr = frank.addresses[0]
    assert (adr.street, adr.locality, adr.region, adr.postcode, adr.country) == (
        "6544 Battleford Drive", "Raleigh", "NC", "27613-3502", "U.S.A.")
    assert frank.phones == ["+1-919-676-9515", "+1-919-676-9564"]
    assert frank.emails == ["Frank_Dawson@Lotus.com", "fdawson@earthlink.net"]
    assert (tim.full_name, tim.orgs,
            tim.emails) == ("Tim Howes", ["Netscape Communications Corp."], ["howes@netscape.com"])
    # RFC 2426 §7: the folded ADR gives the postal code " 94043" with its leading space, kept as written
    assert (tim.addresses[0].street, tim.addresses[0].postcode) == ("501 E. Middlefield Rd.", " 94043")
    assert tim.phones == ["+1-415-937-3419", "+1-415-528-4164"]


def test_rfc2426_sections_2_3_property_examples(corpus_dir):
    result = std(corpus_dir, "rfc2426-sec2-3-property-examples.wrapped.vcf")
    rec = result.records[0]
    # RFC 2426 §3.1.1 FN, §3.1.2 N, §3.1.3 NICKNAME
    assert rec.full_name == "Mr. John Q. Public, Esq."
    assert (rec.family, rec.given, rec.additional, rec.prefix,
            rec.suffix) == ("Public", "John", "Quinlan", "Mr.", "Esq.")
    assert rec.nicknames == ["Robbie", "Jim", "Jimmie"]
    # RFC 2426 §3.2.1 ADR folded with a double space: "123 Main" + " Street"
    assert rec.addresses[0].street == "123 Main Street" and rec.addresses[0].postcode == "91921-1234"
    # RFC 2426 §3.3.1 TEL, §3.3.2 EMAIL, §3.5.1 TITLE, §3.5.5 ORG, §3.6.1 CATEGORIES
    assert rec.phones == ["+1-213-555-1234"]
    assert rec.emails == ["jqpublic@xyz.dom1.com", "jdoe@isp.net", "jane_doe@abc.com"]
    assert rec.titles == ["Director, Research and Development"]
    assert (rec.orgs, rec.org_units) == (["ABC, Inc."], [["North American Division", "Marketing"]])
    assert rec.tags == ["TRAVEL AGENT", "INTERNET", "IETF", "INDUSTRY", "INFORMATION TECHNOLOGY"]
    # RFC 2426 §3.5.4 AGENT: an escaped vCard inside the value becomes a card of its own
    agents = {r.full_name: r for r in result.records[1:]}
    assert agents["Susan Thomas"].phones == ["+1-919-555-1234"]  # the fold inside the number unfolds
    assert agents["Susan Thomas"].emails == ["sthomas@host.com"]
    assert "Joe Friday" in agents and agents["Joe Friday"].phones == ["+1-919-555-7878"]
    assert [r.value for r in rec.related if r.types == ["agent"]] == [
        "Joe Friday", "CID:JQPUBLIC.part3.960129T083020.xyzMail@host3.com", "Susan Thomas"]
