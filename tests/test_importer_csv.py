"""Tests of the CSV importer. Every person, organisation and header set here is invented."""

from __future__ import annotations

import csv
import io
import json

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from mynet.errors import InputError, RecordError
from mynet.sources import parse_file
from mynet.sources.csv import MAPPABLE_FIELDS, classify_header, load_mapping_file, parse_csv


def table(rows: list[list[str]], delimiter: str = ",", lineterminator: str = "\r\n") -> str:
    buf = io.StringIO()
    csv.writer(buf, delimiter=delimiter, lineterminator=lineterminator).writerows(rows)
    return buf.getvalue()


PEOPLE = [
    ["Name", "Email", "Company"],
    ["Zoë Brønholt", "zoe@example.org", "Fjordlight Études"],
    ["Émile Ça", "emile@example.net", "Crème & Co"],
]


# --- encodings ---------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "encoding, raw_prefix",
    [
        ("utf-8", b""),
        ("utf-8", b"\xef\xbb\xbf"),
        ("utf-16-le", b"\xff\xfe"),
        ("utf-16-be", b"\xfe\xff"),
    ],
)
def test_unicode_encodings_with_and_without_bom(encoding, raw_prefix):
    data = raw_prefix + table(PEOPLE).encode(encoding)
    result = parse_csv(data, "people.csv")
    assert [r.full_name for r in result.records] == ["Zoë Brønholt", "Émile Ça"]
    # The BOM must not stick to the first header: "Name" is still recognised.
    assert result.records[0].emails == ["zoe@example.org"]
    assert result.warnings == []


def test_utf16_without_bom_is_recognised():
    data = table(PEOPLE).encode("utf-16-le")
    result = parse_csv(data, "people.csv")
    assert result.records[1].orgs == ["Crème & Co"]
    assert any("UTF-16-LE" in w for w in result.warnings)


def test_cp1252_file():
    rows = [["Name", "Email", "Notes"], ["Zoë Brønholt", "zoe@example.org", "owes me 5 € – “soon”"]]
    result = parse_csv(table(rows).encode("cp1252"), "old.csv")
    assert result.records[0].full_name == "Zoë Brønholt"
    assert result.records[0].notes == ["owes me 5 € – “soon”"]
    assert any("cp1252" in w for w in result.warnings)


def test_latin1_file_with_bytes_cp1252_leaves_undefined():
    # 0x81 is unassigned in cp1252, so only latin-1 decodes this file.
    data = "Name,Email\r\nRené Ölund\x81,rene@example.com\r\n".encode("latin-1")
    result = parse_csv(data, "older.csv")
    assert result.records[0].full_name == "René Ölund\x81"
    assert any("latin-1" in w for w in result.warnings)


def test_bad_utf16_unit_is_replaced_and_the_rows_are_kept():
    data = b"\xff\xfe" + "Name,Email\nAna Vik,a@example.org\n".encode("utf-16-le") + b"\x00\xd8"
    result = parse_csv(data, "broken.csv")
    assert [r.full_name for r in result.records] == ["Ana Vik"]
    assert any("line 3" in w and "UTF-16-LE" in w and "U+FFFD" in w for w in result.warnings)


# --- delimiters and line structure -------------------------------------------------------------


@pytest.mark.parametrize("delimiter", [",", ";", "\t", "|"])
def test_each_delimiter(delimiter):
    rows = [
        ["First Name", "Last Name", "E-mail", "Notes"],
        ["Ilse", "Varrow", "ilse@example.org", "likes , ; | and\ttabs"],
        ["Tomas", "Quill", "tq@example.net", "plain"],
    ]
    result = parse_csv(table(rows, delimiter).encode(), "d.csv")
    assert [(r.given, r.family) for r in result.records] == [("Ilse", "Varrow"), ("Tomas", "Quill")]
    assert result.records[0].notes == ["likes , ; | and\ttabs"]


def test_rfc4180_section_2_examples():
    # RFC 4180 section 2, rules 1-7 with their examples (CRLF line breaks; an optional header line;
    # fields in double quotes may hold commas, line breaks and doubled double quotes).
    from mynet.sources.csv import detect_delimiter
    from mynet.sources.csv_text import read_rows

    def cells(text):
        delimiter, start, first = detect_delimiter(text)
        assert delimiter == ","
        return [row.cells for row in read_rows(text, start, delimiter, first, "rfc.csv") if row.cells]

    assert cells("aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n") == [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]  # rule 1
    assert cells("aaa,bbb,ccc\r\nzzz,yyy,xxx") == [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]  # rule 2
    # rule 3
    assert cells("field_name,field_name,field_name\r\naaa,bbb,ccc\r\nzzz,yyy,xxx\r\n")[0] == ["field_name"] * 3
    assert cells('"aaa","bbb","ccc"\r\nzzz,yyy,xxx') == [["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]  # rule 5
    assert cells('"aaa","b\r\nbb","ccc"\r\nzzz,yyy,xxx') == [["aaa", "b\r\nbb", "ccc"], ["zzz", "yyy", "xxx"]]  # rule 6
    assert cells('"aaa","b""bb","ccc"') == [["aaa", 'b"bb', "ccc"]]  # rule 7
    # The same rules through the whole importer, with a header it knows.
    data = b'Name,Email,Notes\r\n"Lind, Ana",ana@example.org,"said ""hello""\r\non two lines"\r\n'
    (rec,) = parse_csv(data, "rfc.csv").records
    assert (rec.full_name, rec.emails,
            rec.notes) == ("Lind, Ana", ["ana@example.org"], ['said "hello"\r\non two lines'])


def test_delimiter_is_the_one_rows_agree_with_not_the_widest_header():
    # Semicolon-separated, with commas inside the header's and the rows' cells: split on commas the
    # header is wider (4 cells against 3), but no row has its width; split on semicolons every row does.
    data = ("Name, full;Email;Notes, remarks, more\r\n"
            "Lind, Ana;ana@example.org;tea\r\n"
            "Ek, Bo;bo@example.org;coffee\r\n").encode()
    from mynet.sources.csv import detect_delimiter

    assert detect_delimiter(data.decode())[0] == ";"
    result = parse_csv(data, "semi.csv",
                       mapping={"full_name": "Name, full", "emails": "Email", "notes": "Notes, remarks, more"})
    assert [(r.full_name, r.emails, r.notes) for r in result.records] == [
        ("Lind, Ana", ["ana@example.org"], ["tea"]), ("Ek, Bo", ["bo@example.org"], ["coffee"])]


def test_excel_sep_hint_line():
    data = b"sep=;\r\nName;Email\r\nIlse Varrow;ilse@example.org\r\n"
    result = parse_csv(data, "hint.csv")
    assert result.records[0].full_name == "Ilse Varrow"
    assert result.records[0].line == 3


@pytest.mark.parametrize("newline", ["\r\n", "\n", "\r"])
def test_multiline_notes_and_line_numbers(newline):
    rows = [
        ["Name", "Email", "Notes"],
        ["Ann One", "ann@example.org", f"met at the fair{newline}second line{newline}third line"],
        ["Bo Two", "bo@example.org", "short"],
        ["Cy Three", "cy@example.org", f"a{newline}b"],
        ["Di Four", "di@example.org", ""],
    ]
    text = table(rows, lineterminator=newline)
    result = parse_csv(text.encode(), "multi.csv")
    assert [r.line for r in result.records] == [2, 5, 6, 8]
    assert [r.index for r in result.records] == [0, 1, 2, 3]
    assert result.records[0].notes == [f"met at the fair{newline}second line{newline}third line"]


def test_blank_rows_are_ignored_and_not_counted():
    data = b"\r\nName,Email\r\n\r\nAnn One,ann@example.org\r\n,\r\n  ,  \r\nBo Two,bo@example.org\r\n\r\n"
    result = parse_csv(data, "gaps.csv")
    assert [(r.full_name, r.index, r.line) for r in result.records] == [("Ann One", 0, 4), ("Bo Two", 1, 7)]
    assert result.skipped == []


def test_space_before_a_quoted_cell_is_tolerated():
    data = b'Name, Email, Notes\nAnn One, ann@example.org, "one, two"\n'
    result = parse_csv(data, "spaced.csv")
    assert result.records[0].notes == ["one, two"]


def test_cells_are_kept_exactly_apart_from_surrounding_space():
    rows = [["Name", "Phone", "Notes", "Nickname"], ["  =HYPERLINK(1)  ", "+44 0012", "NA", "@null"]]
    rec = parse_csv(table(rows).encode(), "exact.csv").records[0]
    assert (rec.full_name, rec.phones, rec.notes, rec.nicknames) == ("=HYPERLINK(1)", ["+44 0012"], ["NA"], ["@null"])


# --- header synonyms ---------------------------------------------------------------------------


def test_synonyms_of_an_invented_english_export():
    rows = [
        ["Given name", "Middle", "Family name", "Honorific", "Name Suffix", "Known as", "E-mail 1", "E-mail 2 Address",
         "Mobile", "Office Phone", "Employer", "Unit", "Position", "Role", "Labels", "Remarks", "Office Street",
         "Office Town", "Office Province", "Office Postal Code", "Office Nation", "Home City", "Web site"],
        ["Ilse", "M.", "Varrow", "Dr", "Jr", "Izzy", "ilse@example.org", "ilse.v@example.net", "+1 555 0100",
         "+1 555 0199", "Quillworks Ltd", "Research", "Lead", "Reviewer", "board; alumni", "met 2021", "1 Dock Rd",
         "Harbourton", "North", "AB1 2CD", "Examplia", "Elmvale", "https://ilse.example.org"],
    ]
    result = parse_csv(table(rows).encode(), "eng.csv")
    rec = result.records[0]
    assert (rec.given, rec.additional, rec.family, rec.prefix, rec.suffix) == ("Ilse", "M.", "Varrow", "Dr", "Jr")
    assert rec.nicknames == ["Izzy"]
    assert rec.emails == ["ilse@example.org", "ilse.v@example.net"]
    assert rec.phones == ["+1 555 0100", "+1 555 0199"]
    assert rec.orgs == ["Quillworks Ltd"] and rec.org_units == [["Research"]]
    assert rec.titles == ["Lead"] and rec.roles == ["Reviewer"]
    assert rec.tags == ["board", "alumni"] and rec.notes == ["met 2021"]
    assert rec.urls == ["https://ilse.example.org"]
    work, home = rec.addresses
    assert (work.street, work.locality, work.region, work.postcode, work.country, work.types) == (
        "1 Dock Rd", "Harbourton", "North", "AB1 2CD", "Examplia", ["work"])
    assert (home.locality, home.types) == ("Elmvale", ["home"])
    assert result.warnings == []


def test_synonyms_of_an_invented_multilingual_export():
    rows = [
        ["Vorname", "Nachname", "E-Mail-Adresse", "Telefon geschäftlich", "Firma", "Abteilung", "Funktion",
         "Kategorien", "Notizen", "PLZ", "Ort", "Land"],
        ["Jörg", "Übel", "joerg@example.de", "+49 30 000000", "Beispiel GmbH", "Einkauf", "Leiter", "Messe|Kunden",
         "Notiz", "10115", "Beispielstadt", "Beispielland"],
    ]
    rec = parse_csv(table(rows, ";").encode(), "de.csv").records[0]
    assert (rec.given, rec.family, rec.emails, rec.phones) == ("Jörg", "Übel", ["joerg@example.de"], ["+49 30 000000"])
    assert (rec.orgs, rec.org_units, rec.titles,
            rec.tags) == (["Beispiel GmbH"], [["Einkauf"]], ["Leiter"], ["Messe", "Kunden"])
    assert (rec.addresses[0].postcode, rec.addresses[0].locality,
            rec.addresses[0].country) == ("10115", "Beispielstadt", "Beispielland")
    fr = [["Prénom", "Nom", "Courriel", "Téléphone portable", "Société"],
          ["Zoé", "Lacroix", "zoe@example.fr", "06 00 00 00 00", "Exemple SA"]]
    rec = parse_csv(table(fr).encode(), "fr.csv").records[0]
    assert (rec.given, rec.family, rec.emails, rec.phones,
            rec.orgs) == ("Zoé", "Lacroix", ["zoe@example.fr"], ["06 00 00 00 00"], ["Exemple SA"])


@pytest.mark.parametrize(
    "header, expected",
    [
        ("FULL_NAME", ("full_name", "")),
        ("display-name", ("full_name", "")),
        ("Surname", ("family", "")),
        ("Forename", ("given", "")),
        ("Work E-mail", ("emails", "work")),
        ("Personal Email", ("emails", "home")),
        ("Phone 3 - Value", ("phones", "")),
        ("Cell", ("phones", "")),
        ("Organisation 1 - Name", ("orgs", "")),
        ("Organization 1 - Title", ("titles", "")),
        ("Address 2 - City", ("locality", "")),
        ("Business Street 2", ("street", "work")),
        ("Zip", ("postcode", "")),
        ("Group Membership", ("tags", "")),
        ("Phone 3 - Type", None),
        ("Assistant's Phone", None),
        ("Previous Company", None),
        ("Former Employer", None),
        ("Spouse Name", None),
        ("Favourite colour", None),
    ],
)
def test_classify_header(header, expected):
    assert classify_header(header) == expected


def test_past_employer_and_unknown_columns_are_reported_unmapped():
    rows = [["Name", "Email", "Previous Company", "Shoe size"], ["Ann One", "ann@example.org", "Old Example Inc", "38"]]
    result = parse_csv(table(rows).encode(), "u.csv")
    assert result.records[0].orgs == []
    assert len(result.warnings) == 1
    assert "'Previous Company'" in result.warnings[0] and "'Shoe size'" in result.warnings[0]


# --- multi-valued cells ------------------------------------------------------------------------


@pytest.mark.parametrize(
    "cell", ["board ::: alumni ::: 2019 cohort", "board;alumni;2019 cohort", "board | alumni | 2019 cohort",
             "board, alumni, 2019 cohort", " board ;; alumni ; 2019 cohort ; "],
)
def test_tag_separators(cell):
    rec = parse_csv(table([["Name", "Tags"], ["Ann One", cell]]).encode(), "t.csv").records[0]
    assert rec.tags == ["board", "alumni", "2019 cohort"]


def test_quoted_comma_tags_in_comma_file_and_multi_email_cell():
    data = b'Name,Categories,Email,Phone,Notes\nAnn One,"vip,press",ann@example.org ::: ann.one@example.net,' \
        b'"+1 555 0100 ; +1 555 0101, ext 2","a, b; c"\n'
    rec = parse_csv(data, "t.csv").records[0]
    assert rec.tags == ["vip", "press"]
    assert rec.emails == ["ann@example.org", "ann.one@example.net"]
    assert rec.phones == ["+1 555 0100", "+1 555 0101, ext 2"]
    assert rec.notes == ["a, b; c"]  # free text is never split


def test_department_without_company_warns_on_the_record():
    rec = parse_csv(b"Name,Department\nAnn One,Research\n", "t.csv").records[0]
    assert rec.orgs == [] and rec.org_units == []
    assert rec.warnings == ["department 'Research' given without a company; not kept"]


# --- mapping overrides -------------------------------------------------------------------------


def test_mapping_overrides_and_adds_columns():
    rows = [["Name", "Alias name", "Reach me", "Shop"], ["A. One", "Ann One", "ann@example.org", "Kiosk Example"]]
    result = parse_csv(table(rows).encode(), "m.csv",
                       mapping={"name": "Alias name", "email": "reach me", "org": "Shop"})
    rec = result.records[0]
    assert (rec.full_name, rec.emails, rec.orgs) == ("Ann One", ["ann@example.org"], ["Kiosk Example"])
    # The automatically found "Name" column lost to the override and is reported.
    assert result.warnings == ["columns not used: 'Name' (use --map FIELD=COLUMN to import one)"]


def test_mapping_makes_an_unrecognised_file_usable():
    rows = [["Wer", "Kanal"], ["Ann One", "ann@example.org"]]
    rec = parse_csv(table(rows).encode(), "m.csv", mapping={"full_name": "Wer", "emails": "Kanal"}).records[0]
    assert (rec.full_name, rec.emails) == ("Ann One", ["ann@example.org"])


def test_mapping_errors_name_field_and_columns():
    data = table([["Name", "Email"], ["Ann One", "ann@example.org"]]).encode()
    with pytest.raises(InputError, match="unknown field 'shoe'.*mappable fields are: .*email"):
        parse_csv(data, "m.csv", mapping={"shoe": "Name"})
    with pytest.raises(InputError, match="'line' is set by the importer"):
        parse_csv(data, "m.csv", mapping={"line": "Name"})
    with pytest.raises(InputError) as info:
        parse_csv(data, "m.csv", mapping={"email": "Mail"})
    assert str(info.value) == "m.csv: --map email=Mail: no column named 'Mail'; the columns are: 'Name', 'Email'"


def test_mappable_fields_list():
    assert {"email", "phone", "org", "title", "tag", "note", "url", "locality", "region", "country", "street",
            "postcode", "first", "last", "middle", "name", "full_name", "emails"} <= set(MAPPABLE_FIELDS)
    assert "line" not in MAPPABLE_FIELDS


def test_mapping_file_lines_and_json(tmp_path):
    plain = tmp_path / "map.txt"
    plain.write_text('# my export\nname = Wer\n\nemail=Kanal\nnote = " Extra = info "\n', encoding="utf-8")
    assert load_mapping_file(plain) == {"name": "Wer", "email": "Kanal", "note": " Extra = info "}
    as_json = tmp_path / "map.json"
    as_json.write_text(json.dumps({"Name": "Wer", "phone": "Ruf"}), encoding="utf-8")
    assert load_mapping_file(as_json) == {"name": "Wer", "phone": "Ruf"}


@pytest.mark.parametrize(
    "content, message, line",
    [
        ("name = Wer\nthis line has no equals\n", "expected 'field = Column'", 2),
        ("name = Wer\n\nshoe = Size\n", "unknown field 'shoe'", 3),
        ("email = A\nemail = B\n", "mapped twice", 2),
        ("name =\n", "expected 'field = Column'", 1),
        ('{\n "name": "Wer",\n "email" "x"\n}', "not valid JSON", 3),
        ("# nothing\n", "no 'field = Column' lines", None),
        ('["name"]', "one JSON object", None),
    ],
)
def test_bad_mapping_files(tmp_path, content, message, line):
    path = tmp_path / "bad.map"
    path.write_text(content, encoding="utf-8")
    with pytest.raises(InputError, match=message) as info:
        load_mapping_file(path)
    assert info.value.line == line


# --- skipped rows, strict mode, unusable files ---------------------------------------------------


RAGGED = (
    "Name,Email,Notes\r\n"
    "Ann One,ann@example.org,ok\r\n"
    "Bo Two,bo@example.org\r\n"  # line 3: one cell short
    'Cy Three,cy@example.org,"two\r\nlines",extra\r\n'  # line 4: one cell too many
    "Di Four,di@example.org,fine,,\r\n"  # line 6: extra cells are empty, accepted
    ",,just a note\r\n"  # line 7: nobody
)


def test_ragged_and_unidentified_rows_are_skipped_with_lines():
    result = parse_csv(RAGGED.encode(), "r.csv")
    assert [(r.full_name, r.line, r.index) for r in result.records] == [("Ann One", 2, 0), ("Di Four", 6, 3)]
    assert [(s.line, s.index) for s in result.skipped] == [(3, 1), (4, 2), (7, 4)]
    assert result.skipped[0].reason == "row has 2 cells but the header has 3"
    assert str(result.skipped[2]) == "r.csv:7: row has no name, e-mail or phone"


def test_strict_mode_raises_at_the_first_bad_row():
    with pytest.raises(RecordError) as info:
        parse_csv(RAGGED.encode(), "r.csv", strict=True)
    assert (info.value.line, str(info.value)) == (3, "r.csv:3: row has 2 cells but the header has 3")


def test_unclosed_quote_keeps_the_rows_it_swallowed_and_is_named():
    data = b'Name,Email\nAnn One,ann@example.org\n"Bo Two,bo@example.org\nCy Three,cy@example.org\n'
    result = parse_csv(data, "q.csv")
    assert [(r.line, r.full_name) for r in result.records] == [(2, "Ann One"), (3, "Bo Two"), (4, "Cy Three")]
    assert result.skipped == []
    assert any(w.startswith("lines 3-4:") and "never closed" in w for w in result.warnings)
    with pytest.raises(RecordError, match="never closed"):
        parse_csv(data, "q.csv", strict=True)


def test_file_without_identifying_columns():
    data = b"Company,Town\nExample Ltd,Elmvale\n"
    with pytest.raises(InputError) as info:
        parse_csv(data, "orgs.csv")
    message = str(info.value)
    assert "no column gives a name, e-mail or phone" in message
    assert "'Company', 'Town'" in message and "--map name=COLUMN" in message
    assert info.value.line == 1


def test_headerless_file_gets_a_hint():
    with pytest.raises(InputError, match="looks like data"):
        parse_csv(b"Ann One,ann@example.org\nBo Two,bo@example.org\n", "nohead.csv")


def test_empty_table_has_no_header():
    with pytest.raises(InputError, match="no header row"):
        parse_csv(b"\r\n ,\r\n", "blank.csv")


def test_dispatcher_reaches_the_csv_importer(tmp_path):
    path = tmp_path / "people.tsv"
    path.write_bytes(table(PEOPLE, "\t").encode("utf-16"))
    result = parse_file(path, mapping={"org": "Company"})
    assert result.kind == "csv" and len(result.records) == 2
    assert result.records[0].source == str(path)


def test_a_few_thousand_rows_keep_their_lines():
    rows = [["Name", "Email", "Notes"]] + [[f"P{i}", f"p{i}@example.org", "x\ny"] for i in range(3000)]
    result = parse_csv(table(rows).encode(), "many.csv")
    assert len(result.records) == 3000
    assert result.records[-1].line == 2 + 2 * 2999 and result.records[-1].index == 2999


# --- property: any cell text survives the round trip ----------------------------------------------


CELL_TEXT = st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=60)


@settings(max_examples=150, deadline=None)
@given(text=CELL_TEXT, encoding=st.sampled_from(["utf-8", "utf-16"]), delimiter=st.sampled_from([",", ";", "\t", "|"]))
@example(text='=cmd|"/c x"!A1, ;\n"quoted"\r\n', encoding="utf-8", delimiter=",")
@example(text="  +44 (0) 12 ; @handle\t", encoding="utf-16", delimiter="\t")
@example(text="\x00\x85\u2028 \"", encoding="utf-8", delimiter="|")
def test_any_text_round_trips_through_a_cell(text, encoding, delimiter):
    # "Name" is found by its header, "Free text" only through a --map override.
    rows = [["Email", "Name", "Free text"], ["ann@example.org", text, text]]
    data = table(rows, delimiter).encode(encoding)
    rec = parse_csv(data, "prop.csv", mapping={"note": "Free text"}).records[0]
    kept = text.strip()
    assert rec.full_name == kept
    assert rec.notes == ([kept] if kept else [])
    assert rec.line == 2


# --- broken files: every good row survives ---------------------------------------------------------


def test_quote_closing_on_a_later_line_keeps_the_rows_it_would_merge():
    data = b'Full name,Email\n"Alice,a@e.example\nBob,b@e.example\n"Carl, "x,c@e.example\n'
    result = parse_csv(data, "u.csv")
    assert [(r.line, r.full_name, r.emails) for r in result.records] == [
        (2, "Alice", ["a@e.example"]), (3, "Bob", ["b@e.example"]), (4, "Carl, x", ["c@e.example"])]
    assert not any("\n" in r.full_name for r in result.records)
    assert [w for w in result.warnings if w.startswith("lines 2-4:") and "closes only on line 4" in w]
    with pytest.raises(RecordError, match="closes only on line 4") as info:
        parse_csv(data, "u.csv", strict=True)
    assert info.value.line == 2


def test_quote_swallowing_many_rows_keeps_each_of_them():
    body = "".join(f"P{i} Vik,p{i}@e.example\n" for i in range(8))
    data = (f'Full name,Email\nAna Lind,a@e.example\n"Bo Ek,b@e.example\n{body}Cy Moss",c@e.example\n'
            "Di Park,d@e.example\n")
    result = parse_csv(data.encode(), "u2.csv")
    names = [r.full_name for r in result.records]
    assert names == ["Ana Lind", "Bo Ek", *[f"P{i} Vik" for i in range(8)], "Cy Moss", "Di Park"]
    assert [r.line for r in result.records] == list(range(2, 14))
    assert any(w.startswith("lines 3-12:") for w in result.warnings)


@pytest.mark.parametrize("column", ["Notes", "Full name"])
def test_a_legitimate_quoted_line_break_stays_one_field(column):
    # RFC 4180 section 2, rule 6: a field holding a line break is enclosed in double quotes; it is one field.
    rows = [["Full name", "Email", "Notes"], ["Ana Vik", "a@e.example", "plain"], ["Bo Ek", "b@e.example", "plain"]]
    at = rows[0].index(column)
    rows[1][at] = "first line\nsecond, line, x" if column == "Notes" else "Ana\nVik"
    result = parse_csv(table(rows).encode(), "ml.csv")
    assert [r.line for r in result.records] == [2, 4]
    assert result.warnings == [] and result.skipped == []
    if column == "Notes":
        assert result.records[0].notes == ["first line\nsecond, line, x"]
    else:
        assert result.records[0].full_name == "Ana\nVik"


def test_utf8_bom_file_with_one_bad_byte_keeps_every_row_and_names_the_line():
    data = (b"\xef\xbb\xbfFull name,Email\r\nZo\xc3\xab Vik,a@e.example\r\nBo \xff Ek,b@e.example\r\n"
            b"Cy Moss,c@e.example\r\n")
    result = parse_csv(data, "bom.csv")
    assert [r.full_name for r in result.records] == ["Zoë Vik", "Bo \ufffd Ek", "Cy Moss"]
    assert [w for w in result.warnings if w.startswith("line 3:") and "UTF-8" in w and "U+FFFD" in w]


def test_mostly_utf8_file_without_bom_is_not_reread_as_cp1252():
    data = "Full name,Email\nZoë Brønholt,z@e.example\nÉmile Ça,e@e.example\n".encode() + b"Bo \xff Ek,b@e.example\n"
    result = parse_csv(data, "mostly.csv")
    assert [r.full_name for r in result.records] == ["Zoë Brønholt", "Émile Ça", "Bo \ufffd Ek"]
    assert any(w.startswith("line 4:") for w in result.warnings)


@pytest.mark.parametrize("multiline", [False, True])
def test_a_cell_over_the_reader_limit_skips_only_its_row(multiline):
    # The standard library's reader refuses a cell over csv.field_size_limit() (128 KiB by default).
    big = ("y" * 1000 + "\n") * 200 if multiline else "y" * 200_000
    data = f'Full name,Email,Notes\nAna Vik,a@e.example,short\nBo Ek,b@e.example,"{big}"\nCy Moss,c@e.example,\n'
    result = parse_csv(data.encode(), "wide.csv")
    assert [r.full_name for r in result.records] == ["Ana Vik", "Cy Moss"]
    assert [(s.line, "128 KiB" in s.reason) for s in result.skipped] == [(3, True)]
    assert result.records[1].line == (204 if multiline else 4)
