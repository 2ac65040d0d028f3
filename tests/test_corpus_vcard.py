"""The vCard importer on every public test-suite and standards file of the shared corpus.

The files are read in place from ``../shared/corpus`` and never copied; the
whole module is skipped when that folder is absent. Every ``.vcf`` must either
parse or be refused with an :class:`InputError`, quickly; the spot checks name
the file they read (its path under ``corpus/wild``) beside each check.
"""

from __future__ import annotations

import time

import pytest
from conftest import CORPUS

from mynet.errors import InputError, RecordError
from mynet.model import ParseResult
from mynet.sources import parse_file
from mynet.sources.vcard import parse_vcard, unescape
from mynet.sources.vcard_text import read_cards

pytestmark = pytest.mark.corpus

FILES = sorted(CORPUS.rglob("*.vcf")) if CORPUS.is_dir() else []
ANDROID = "wild/CyanogenMod__android_frameworks_opt_vcard/tests/res/raw"
EZ = "wild/mangstadt__ez-vcard/src/test/resources/ezvcard"
ICAL4J = "wild/ical4j__ical4j-vcard/src/test/resources/samples"
LIMIT_SECONDS = 5.0


@pytest.fixture(autouse=True)
def _need_corpus(corpus_dir):
    """Every test here reads the corpus (skipped, with the reason, when it is absent)."""


def load(rel: str) -> ParseResult:
    path = CORPUS / rel
    return parse_vcard(path.read_bytes(), str(path))


def texts(rec) -> list[str]:
    """Every text a record holds, for checks that apply to all of them."""
    out = [rec.full_name, rec.given, rec.family, rec.additional, rec.prefix, rec.suffix, rec.uid, rec.card_kind]
    out += rec.nicknames + rec.emails + rec.phones + rec.orgs + rec.titles + rec.roles + rec.tags + rec.notes
    out += rec.urls + rec.members + [u for units in rec.org_units for u in units]
    out += [r.value for r in rec.related]
    out += [getattr(a, f) for a in rec.addresses for f in ("street", "locality", "region", "postcode", "country")]
    return out


def test_corpus_has_vcards():
    assert len(FILES) >= 40


@pytest.mark.parametrize("path", FILES, ids=[str(p.relative_to(CORPUS)) for p in FILES])
def test_every_file_parses_or_is_refused_clearly(path):
    for strict in (False, True):
        start = time.perf_counter()
        try:
            result = parse_file(path, strict=strict)
        except RecordError as exc:  # strict mode only
            assert strict and exc.line and str(exc).startswith(f"{path}:{exc.line}: ")
            continue
        except InputError as exc:
            assert str(exc).startswith(str(path)) and exc.reason
            continue
        finally:
            assert time.perf_counter() - start < LIMIT_SECONDS
        assert isinstance(result, ParseResult) and result.kind == "vcard"
        assert result.records or result.skipped
        for rec in result.records:
            assert rec.source == str(path) and rec.line >= 1 and rec.index >= 0
            for text in texts(rec):
                assert "\ufffd" not in text  # nothing was replaced by the decoder
                assert "base64," not in text and "/9j/" not in text  # no photo data anywhere
        indexes = [r.index for r in result.records] + [s.index for s in result.skipped]
        assert len(indexes) == len(set(indexes))


def test_corpus_totals():
    records = skipped = 0
    reasons = set()
    for path in FILES:
        result = parse_vcard(path.read_bytes(), str(path))
        records += len(result.records)
        skipped += len(result.skipped)
        reasons |= {(path.name, s.reason) for s in result.skipped}
    # 86 BEGIN:VCARD blocks read, plus 2 cards held inside AGENT values (RFC 2426 §3.5.4 example);
    # the only card skipped has nothing but an address (ical4j samples/valid/vcard-group.vcf)
    assert (records, skipped) == (88, 1)
    assert reasons == {("vcard-group.vcf", "card has no name, e-mail, phone or organisation")}


def test_v21_complicated():
    (rec,) = load(f"{ANDROID}/v21_complicated.vcf").records
    # v21_complicated.vcf: ORG with an escaped ';' inside a unit and three parts
    assert (rec.orgs, rec.org_units) == (["Gump Shrimp Co."], [["Sales Dept.;Manager", "Fish keeper"]])
    # v21_complicated.vcf: the QP NOTE whose continuation starts with a space, read whole
    assert rec.notes == ["The following note is the example from RFC 2045.",
                         "Now's the time for all folk to come to the aid of their country."]
    assert (rec.family, rec.given, rec.additional, rec.prefix, rec.suffix) == ("Gump", "Forrest", "Hoge", "Pos", "Tao")
    assert rec.phones == ["(111) 555-1212", "(404) 555-1212", "0311111111", "0322222222", "0333333333"]
    assert rec.emails == ["forrestgump@walladalla.com", "cell@example.com"]
    assert [a.street for a in rec.addresses] == ["100 Waters Edge", "42 Plantation St."]
    # v21_complicated.vcf: the QP LABELs with soft breaks and unescaped commas, in full
    scan = read_cards((CORPUS / ANDROID / "v21_complicated.vcf").read_bytes(), "v21_complicated.vcf")
    labels = [unescape(p.value, True) for p in scan.cards[0].props if p.name == "LABEL"]
    assert labels == ["100 Waters Edge\r\nBaytown, LA 30314\r\nUnited  States of America",
                      "42 Plantation St.\r\nBaytown, LA 30314\r\nUnited  States of America"]


def test_v21_backslash():
    (rec,) = load(f"{ANDROID}/v21_backslash.vcf").records
    # v21_backslash.vcf read by the 2.1 rule: a backslash escapes only a following ';'
    # (N:;A\;B\\;C\\\;;D;\:E;\\\\;  FN:A;B\C\;D:E\\). The suite this file comes from reads
    # '\\' as one backslash instead; the 2.1 specification names only '\;'.
    assert rec.full_name == "A;B\\C;D:E\\\\"
    assert rec.family == ""
    assert rec.given == "A;B\\;C\\\\;"
    assert rec.additional == "D"
    assert rec.prefix == "\\:E"
    assert rec.suffix == "\\\\\\;"


def test_v30_japanese():
    (rec,) = load(f"{ANDROID}/v30_japanese.vcf").records
    # v30_japanese.vcf: Shift_JIS (CHARSET=SHIFT_JIS) in a 3.0 card; a trail byte 0x5C must not act as a backslash
    raw = (CORPUS / ANDROID / "v30_japanese.vcf").read_bytes().split(b"\n")
    fn = raw[2].split(b":", 1)[1].decode("cp932")
    family, given, additional = raw[3].split(b":", 1)[1].decode("cp932").split(";")[:3]
    assert rec.full_name == fn and all("\u4e00" <= ch <= "\u9fff" or ch == " " for ch in fn)
    assert (rec.family, rec.given, rec.additional) == (family, given, additional)
    assert "\\" not in rec.full_name


def test_v21_japanese_qp_shift_jis():
    (rec,) = load(f"{ANDROID}/v21_japanese_2.vcf").records
    # v21_japanese_2.vcf: QP + CHARSET=SHIFT_JIS address over three physical lines, and a QP note
    expected = bytes.fromhex("938c8b9e93738f61924a8be68df78b7592ac").decode("cp932") + "26-1"
    assert rec.addresses[0].street.startswith(expected)
    assert rec.addresses[0].postcode == "150-8512"
    assert rec.notes == [bytes.fromhex("83818382").decode("cp932")]
    # v21_japanese_1.vcf: raw 8-bit Shift_JIS in N (CHARSET=SHIFT_JIS), not valid UTF-8
    (one,) = load(f"{ANDROID}/v21_japanese_1.vcf").records
    n_line = (CORPUS / ANDROID / "v21_japanese_1.vcf").read_bytes().split(b"\r\n")[2]
    assert one.family == n_line.split(b":", 1)[1].split(b";")[0].decode("cp932")
    assert one.phones == ["0300000000"] and not one.warnings


def test_v21_comment_lines_and_multiple_line_email():
    (rec,) = load(f"{ANDROID}/v21_invalid_comment_line.vcf").records
    # v21_invalid_comment_line.vcf: '#' comments dropped, the QP continuation that starts with '#' kept
    assert rec.notes == ["This is an (sharp ->#<- sharp) example. This message must NOT be ignored."]
    assert rec.uid == "357"
    (rec,) = load(f"{ANDROID}/v21_invalid_multiple_line.vcf").records
    # v21_invalid_multiple_line.vcf: '"Omega"' folded onto '<omega@example.com>'
    assert rec.emails == ["omega@example.com"]


def test_v21_nest_and_multiple_entries():
    result = load(f"{ANDROID}/v21_nest.vcf")
    # v21_nest.vcf: a card nested directly inside a card
    assert [(r.family, r.index, r.line) for r in result.records] == [("parent", 0, 1), ("nest1", 1, 4), ("nest2", 2, 8)]
    assert result.records[0].phones == ["1"]
    result = load(f"{ANDROID}/v21_multiple_entry.vcf")
    # v21_multiple_entry.vcf: three cards separated by blank lines, vendor TEL types
    assert [r.phones
            for r in result.records] == [["9", "10", "11", "12"], ["13", "14", "15", "16"], ["17", "18", "19", "20"]]


def test_v21_pref_handling_and_adr_lines():
    (rec,) = load(f"{ANDROID}/v21_pref_handling.vcf").records
    # v21_pref_handling.vcf: three ORG/TITLE pairs kept in order
    assert (rec.orgs, rec.titles) == (["Company", "Mystery", "Poetry"], ["Engineer", "Blogger", "Poet"])
    (rec,) = load(f"{ANDROID}/v21_adr_multiple_line.vcf").records
    # v21_adr_multiple_line.vcf: an ADR continued with trailing backslashes
    assert rec.addresses[1].street == "Hermann v. Brevern\n9999999\nPackstation 999"
    assert (rec.addresses[1].locality, rec.addresses[1].country) == ("Hamburg", "Deutschland")


def test_v30_ios_cr_cr_lf():
    (rec,) = load(f"{ANDROID}/v30_ios_613_multiline.vcf").records
    # v30_ios_613_multiline.vcf: CR CR LF line ends, item1.EMAIL, item2.URL, a 7 KB photo
    assert (rec.full_name, rec.emails, rec.urls) == ("Bob Smith", ["bob@smithauto.com"], ["www.smithauto.com"])
    assert rec.phones == ["(650) 555-1212"] and rec.orgs == ["Smith Auto Repair"]
    assert not any("\r" in t for t in texts(rec))


def test_gmail_single():
    (rec,) = load(f"{EZ}/io/text/gmail-single.vcf").records
    # gmail-single.vcf: X-ABRELATEDNAMES with labels, escaped colon in URL, ADR with \n and \,
    assert [(r.value, r.types) for r in rec.related] == [("MySpouse", ["spouse"]), ("MyCustom", ["CustomRelationship"])]
    assert rec.urls == ["http://TheProfile.com"]
    assert rec.addresses[0].street == "123 Home St\nHome City, HM 12345"
    assert rec.addresses[1].types == ["CustomAdrType"]
    assert rec.phones == ["555 555 1111", "555 555 2222"]
    assert rec.notes == ["This is GMail's note field.\nIt should be added as a NOTE type.\nACustomField: CustomField"]


def test_outlook_exports():
    (rec,) = load(f"{EZ}/io/text/outlook-2003.vcf").records
    # outlook-2003.vcf: unescaped comma in a 2.1 ORG; QP NOTE whose =0D= / =0A are split by a soft break
    assert (rec.orgs, rec.org_units) == (["Company, The"], [["TheDepartment"]])
    assert rec.notes == ["This is the note field!!\r\nSecond line\r\n\r\nThird line is empty\r\n"]
    assert rec.emails == ["jdoe@hotmail.com"]
    scan = read_cards((CORPUS / EZ / "io/text/outlook-2003.vcf").read_bytes(), "outlook-2003.vcf")
    label = next(p.value for p in scan.cards[0].props if p.name == "LABEL")
    assert label.endswith("United States of America")  # 'Ameri=' / 'ca' joined
    (rec,) = load(f"{EZ}/io/text/outlook-2007.vcf").records
    # outlook-2007.vcf: X-MS-MANAGER / ASSISTANT / SPOUSE relations; QP NOTE with CHARSET=us-ascii and a tab
    assert [(r.value, r.types) for r in rec.related] == [
        ("TheManagerName", ["manager"]), ("TheAssistantName", ["assistant"]), ("TheSpouse", ["spouse"])]
    assert rec.notes[0].startswith("This is the NOTE field\t\r\nI assume")
    assert rec.notes[0].endswith("It does not preserve the formatting")


def test_thunderbird_and_issue114():
    (rec,) = load(f"{EZ}/io/text/thunderbird-MoreFunctionsForAddressBook-extension.vcf").records
    # thunderbird-...-extension.vcf: escaped commas make one category (RFC 6350 §3.4: '\,' is a literal comma)
    assert rec.tags == ["category1, category2, category3"]
    assert rec.notes == [('This is the notes field.\nSecond Line\n\nFourth Line\n'
                          'You can put anything in the "note" field; even curse words.')]
    assert [(r.value, r.types) for r in rec.related] == [("TheSpouse", ["spouse"])]
    (rec,) = load(f"{EZ}/issue/issue114.vcf").records
    # issue114.vcf: FN with an escaped comma; an unquoted LABEL parameter containing ':' is reported
    assert rec.full_name == "Dummy, Dummy"
    assert rec.addresses[0].locality == "Bad Homburg" and rec.addresses[0].postcode == "61352"
    assert any("RFC 6868" in w for w in rec.warnings)


def test_ical4j_samples():
    (rec,) = load(f"{ICAL4J}/4b62872a-849-0.vcf").records
    # 4b62872a-849-0.vcf: lower-case names, VERSION at the end, empty FN/ORG/TITLE/TEL
    assert (rec.version, rec.uid, rec.full_name) == ("2.1", "4b62872a-849-0", "")
    assert (rec.family, rec.given) == ("Branntwein", "Franz")
    assert rec.phones == ["0221 12345678"] and rec.orgs == [] and rec.titles == []
    assert rec.addresses[0].locality == "Köln"
    (rec,) = load(f"{ICAL4J}/invalid/vcard-dirk-whitespaceafterbegin.vcf").records
    # vcard-dirk-whitespaceafterbegin.vcf: 'BEGIN:VCARD ' and 'END:VCARD ' with trailing spaces
    assert (rec.full_name, rec.emails) == ("Dirk", ["dirk@sap.com"])
    (rec,) = load(f"{ICAL4J}/invalid/vcard-incompletenproperty.vcf").records
    # vcard-incompletenproperty.vcf: N with four parts
    assert (rec.family, rec.given, rec.prefix, rec.suffix) == ("Mylka", "Antoni", "Mr.", "")
    result = load(f"{ICAL4J}/vcard-vCards-SAP.vcf")
    # vcard-vCards-SAP.vcf: 30 cards in raw ISO-8859-1 without CHARSET
    assert len(result.records) == 30
    names = {r.full_name for r in result.records}
    assert {"Ingrid Spaßlund", "Günther Blümchen", "Berit Müller"} <= names
    assert any(r.family == "Töcken" and r.card_kind == "org" for r in result.records)  # X-ABShowAs:COMPANY
    assert all(any("a guess" in w for w in r.warnings) for r in result.records if r.family == "Müller")


def test_antoni_undeclared_charset_is_a_flagged_guess():
    (rec,) = load(f"{ICAL4J}/vcard-antoni-outlook2003.vcf").records
    # vcard-antoni-outlook2003.vcf: QP '=F3' and '=B3' with no CHARSET; 'ó' reads the same in cp1250
    # and cp1252, '=B3' does not ('ł' or '³'), so the value is read with a whole-file guess and flagged
    scan = read_cards((CORPUS / ICAL4J / "vcard-antoni-outlook2003.vcf").read_bytes(), "antoni")
    label = [p.value for p in scan.cards[0].props if p.name == "LABEL"][1]
    assert label.startswith("Budryka 2/1110\r\nKraków, ma") and label.endswith("opolskie 30-072\r\nPolen")
    assert any(w.startswith("line(s) 16:") and "a guess" in w for w in rec.warnings)
    assert rec.notes == ["These are some notes about antoni.\r\n"]


def test_address_only_card_is_skipped_with_its_reason():
    result = load(f"{ICAL4J}/valid/vcard-group.vcf")
    # vcard-group.vcf: 'VERSION:4' and a grouped ADR only
    assert result.records == []
    assert [(s.line, s.index, s.reason) for s in result.skipped] == [
        (1, 0, "card has no name, e-mail, phone or organisation")]
