"""Duplicate merging on invented records, and the user's decisions over it."""

from __future__ import annotations

import pytest

from mynet.model import Record
from mynet.people.identity import Decisions, Me, StoredRecord, names_compatible, record_keys, resolve, suggest_merges


def rec(i, name="", emails=(), phones=(), orgs=(), source="a.vcf", uid="", rev=""):
    return Record(kind="vcard", source=source, index=i, line=i + 1, full_name=name, emails=list(emails),
                  phones=list(phones), orgs=list(orgs), uid=uid, rev=rev)


def stored(records, as_of="2026-01-01", region="GB"):
    keys = record_keys(records, "src")
    return [StoredRecord(i + 1, k, r.source, as_of, region, r) for i, (k, r) in enumerate(zip(keys, records))]


def test_shared_email_and_phone_merge_across_spellings():
    rs = stored([
        rec(0, "Ana Lind", ["Ana.Lind@Quillon.example"]),
        rec(1, "Lind, Ana", ["ana.lind@quillon.example"], ["07700 900123"]),
        rec(2, "Ána Lind", [], ["+44 7700 900123"]),
        rec(3, "Tom Reyes", ["tom@velvane.example"]),
    ])
    res = resolve(rs, {}, Decisions(), Me())
    assert len(res.contacts) == 2
    ana = next(c for c in res.contacts if "ana.lind@quillon.example" in c.emails)
    assert len(ana.record_ids) == 3 and ana.phones == ["+447700900123"]
    assert ana.name == "Ána Lind"  # the spelling with accents keeps more information
    assert res.auto_merges == 2


def test_shared_phone_with_different_names_is_held_back():
    rs = stored([rec(0, "Ana Lind", phones=["+44 7700 900123"]), rec(1, "Bo Karlsson", phones=["+44 7700 900123"])])
    res = resolve(rs, {}, Decisions(), Me())
    assert len(res.contacts) == 2
    assert len(res.held_back) == 1 and "names differ" in res.held_back[0].reason


def test_ids_are_stable_and_decisions_win():
    rs = stored([rec(0, "Ana Lind", ["ana@q.example"]), rec(1, "A. Lind", ["ana@q.example"]),
                 rec(2, "Bo Ek", ["bo@q.example"])])
    first = resolve(rs, {}, Decisions(), Me())
    ids = dict(first.mapping)
    # Re-resolving with the previous map keeps the ids.
    again = resolve(rs, ids, Decisions(), Me(), first.next_id)
    assert again.mapping == ids
    # Splitting record 1 off Ana is honoured even though they share an e-mail.
    d = Decisions(different=[(rs[0].key, rs[1].key)])
    split = resolve(rs, ids, d, Me(), first.next_id)
    assert split.mapping[rs[0].key] != split.mapping[rs[1].key]
    assert split.mapping[rs[0].key] == ids[rs[0].key]  # Ana keeps her id
    # A manual merge joins people who share nothing.
    d = Decisions(same=[(rs[0].key, rs[2].key)])
    merged = resolve(rs, ids, d, Me(), first.next_id)
    assert len({merged.mapping[r.key] for r in rs}) == 1


def test_you_are_not_a_contact():
    rs = stored([rec(0, "Robin Vale", ["you@example.org"]),
                 rec(1, "Robin Vale", ["robin@work.example"], ["+44 7700 900001"]),
                 rec(2, "Robin V.", [], ["+44 7700 900001"]), rec(3, "Ana Lind", ["ana@q.example"])])
    res = resolve(rs, {}, Decisions(), Me(emails={"you@example.org"}))
    assert [c.name for c in res.contacts] == ["Robin Vale", "Ana Lind"] and len(res.me_keys) == 1
    res = resolve(rs, {}, Decisions(), Me(emails={"you@example.org", "robin@work.example"}))
    assert len(res.me_keys) == 3 and [c.name for c in res.contacts] == ["Ana Lind"]


def test_current_and_past_organisations():
    rs = [
        StoredRecord(1, "k1", "old.vcf", "2019-05-01", "",
                     rec(0, "Ana Lind", ["ana@x.example"], orgs=["Corrimont Labs"])),
        StoredRecord(2, "k2", "new.vcf", "2026-01-01", "",
                     rec(0, "Ana Lind", ["ana@x.example"], orgs=["Quillon Labs Inc."])),
    ]
    c = resolve(rs, {}, Decisions(), Me()).contacts[0]
    assert c.orgs == ["Quillon Labs Inc."] and c.past_orgs == ["Corrimont Labs"]


def test_suggestions_need_name_and_org_or_domain_and_respect_rejections():
    rs = stored([
        rec(0, "Ana Lind", ["ana@home.example"], orgs=["Quillon Labs"]),
        rec(1, "Lind, Ana", ["a.lind@other.example"], orgs=["Quillon Labs Ltd"]),
        rec(2, "Ana Lind", ["ana.lind@gmail.com"], orgs=["Velvane"]),
        rec(3, "Ana Lind", ["al@gmail.com"], orgs=["Harrowgate"]),
    ])
    res = resolve(rs, {}, Decisions(), Me())
    sugg = suggest_merges(res.contacts)
    ids = {r.key: res.mapping[r.key] for r in rs}
    pair = tuple(sorted((ids[rs[0].key], ids[rs[1].key])))
    assert [(s.a, s.b) for s in sugg] == [pair]  # gmail.com says nothing about an employer
    assert sugg[0].score == 0.9
    assert suggest_merges(res.contacts, {pair}) == []


def test_names_compatible():
    assert names_compatible("Ana Lind", "Lind, Ana")
    assert names_compatible("Ana Lind", "Lind Ana")
    assert names_compatible("Ana Lind", "")
    assert names_compatible("A. Lind", "Ana Lind")
    assert names_compatible("Alex Moss", "Alexander Moss")
    assert names_compatible("Ana Lind", "Ana Berg")  # a surname change keeps the person
    assert not names_compatible("Ana Lind", "Bo Karlsson")
    assert not names_compatible("Ana Lind", "Bo Lind")  # family members share a surname, and often a landline
    assert not names_compatible("Mum", "Dad")


def test_record_keys_stable_under_edits():
    a = [rec(0, "Ana", ["ana@x.example"]), rec(1, "Bo", ["bo@x.example"])]
    b = [rec(0, "Bo Ek", ["bo@x.example"], phones=["+44 7700 900555"]), rec(1, "Ana Lind", ["ana@x.example"])]
    ka, kb = record_keys(a, "f"), record_keys(b, "f")
    assert ka[0] == kb[1] and ka[1] == kb[0]


def test_canonical_orgs_short_forms_and_aliases():
    from mynet.people.identity import canonical_orgs

    m = canonical_orgs(["Quillon Labs", "Quillon Labs Ltd", "Quillon", "QUILLON LABS", "Corrimont Labs",
                        "Corrimont Bank",
                        "Corrimont", "Velvane Robotics GmbH"])
    assert m["quillon"] == "Quillon Labs" and m["quillon labs"] == "Quillon Labs"
    assert m["corrimont"] == "Corrimont"  # two longer names start the same way: left alone
    m = canonical_orgs(["Velvane Robotics", "VR"], {"VR": "Velvane Robotics"})
    assert m["vr"] == "Velvane Robotics"


def test_organisation_and_group_cards_are_not_contacts():
    # RFC 6350 §6.1.4: KIND "group" and "org" cards stand for a group or an organisation, not a person.
    org = rec(0, "Velvane Robotics", ["info@velvane.example"])
    org.card_kind = "org"
    grp = rec(1, "Rowing crew")
    grp.card_kind = "group"
    res = resolve(stored([org, grp, rec(2, "Ana Lind", ["ana@x.example"])]), {}, Decisions(), Me())
    assert [c.name for c in res.contacts] == ["Ana Lind"] and len(res.not_people) == 2


def test_calendar_addresses_link_to_the_one_contact_with_that_name():
    from mynet.model import Contact, Interaction
    from mynet.people.correspondence import MailFacts
    from mynet.people.identity import Me
    from mynet.people.mailpeople import attach_by_name

    ana = Contact(id=1, name="Ana Lind", emails=["ana@home.example"], record_ids=[1])
    bo1 = Contact(id=2, name="Bo Ek", emails=["bo@a.example"], record_ids=[2])
    bo2 = Contact(id=3, name="Bo Ek", emails=["bo@b.example"], record_ids=[3])
    it = Interaction(kind="meeting", source="c.ics", index=0, line=1, when="2026-01-01",
                     participants=["ana.lind@work.example", "bo@c.example", "you@example.org"],
                     names={"ana.lind@work.example": "Lind, Ana", "bo@c.example": "Bo Ek", "you@example.org": "Me"})
    contacts, where = attach_by_name([ana, bo1, bo2], {}, [it], Me(emails={"you@example.org"}), MailFacts())
    assert len(contacts) == 3 and list(where) == ["ana.lind@work.example"]
    assert "c.ics:1" in where["ana.lind@work.example"]
    assert ana.emails == ["ana@home.example", "ana.lind@work.example"]
    assert bo1.emails == ["bo@a.example"] and bo2.emails == ["bo@b.example"]  # ambiguous name: not linked


def test_role_and_list_addresses_are_never_linked_by_name():
    from mynet.model import Contact, Interaction
    from mynet.people.correspondence import MailFacts
    from mynet.people.identity import Me
    from mynet.people.mailpeople import attach_by_name

    ana = Contact(id=1, name="Ana Lind", emails=["ana@home.example"], record_ids=[1])
    it = Interaction(kind="message", source="m.mbox", index=0, line=1, when="2026-01-01", sender="trivial@proj.example",
                     participants=["trivial@proj.example"], names={"trivial@proj.example": "Ana Lind"})
    facts = MailFacts(kinds={"trivial@proj.example": "role"})
    _, where = attach_by_name([ana], {}, [it], Me(), facts)
    assert not where and ana.emails == ["ana@home.example"]
    # A detached address is not linked back either.
    _, where = attach_by_name([ana], {}, [it], Me(), MailFacts(), detached={(1, "trivial@proj.example")})
    assert not where


def test_a_card_whose_fn_is_an_address_takes_its_name_from_n():
    from mynet.model import Record

    r = Record(kind="vcard", source="p.vcf", index=0, line=1, full_name="ana.lind@quillon.example",
               given="Ana", family="Lind", emails=["ana.lind@quillon.example"])
    assert r.display_name() == "Ana Lind"
    # Without N parts the address stays the only name it has; a real FN always wins.
    assert Record(kind="vcard", source="p.vcf", index=0, line=1,
                  full_name="ana@q.example").display_name() == "ana@q.example"
    assert Record(kind="vcard", source="p.vcf", index=0, line=1, full_name="Ana L.", given="Ana",
                  family="Lind").display_name() == "Ana L."


def test_the_same_full_name_under_different_addresses_is_suggested():
    rs = stored([rec(0, "Ana Lind", ["ana@home.example"]), rec(1, "Ana Lind", ["ana.lind@quillon.example"],
                                                               orgs=["Quillon Labs"]),
                 rec(2, "Bo", ["bo@a.example"]), rec(3, "Bo", ["bo@b.example"])])
    res = resolve(rs, {}, Decisions(), Me())
    (s,) = suggest_merges(res.contacts)  # one-word names say too little
    assert s.score == 0.6 and "same full name (Ana Lind) under different addresses" in s.reason


@pytest.mark.parametrize("setting, mine, phones, env, expected", [
    ("DE", ["+447700900123"], [], "en_US.UTF-8", ("DE", "as your region setting says")),
    ("", ["+447700900123"], ["+15555550100"], "en_US.UTF-8", ("GB", "like your own number +447700900123")),
    ("", [], ["+15555550100", "+447700900123", "+447700900124", "07700 900125"], "fr_FR.UTF-8",
     ("GB", "like 2 of the 3 numbers with a country code in your imports")),
    ("", [], ["07700 900125"], "fr_FR.UTF-8", ("FR", "after your system's language setting")),
    ("", [], [], "C", ("", "nothing says which country")),
])
def test_phone_region_is_inferred_in_order(monkeypatch, setting, mine, phones, env, expected):
    from mynet.people.mailpeople import infer_region

    for var in ("LC_ALL", "LC_CTYPE"):
        monkeypatch.delenv(var, raising=False)
    monkeypatch.setenv("LANG", env)
    # E.164 country codes (ITU-T E.164): +44 is the United Kingdom, +1 North America.
    assert infer_region(setting, mine, phones) == expected


def test_import_says_which_region_it_assumed(tmp_path, capsys):
    from mynet.cli import main

    csv = tmp_path / "people.csv"
    csv.write_text("Name,Phone\nAna Lind,07700 900123\nBo Ek,+44 7700 900124\n", encoding="utf-8")
    ws = str(tmp_path / "w.sqlite")
    assert main(["--workspace", ws, "import", str(csv)]) == 0
    out = capsys.readouterr().out
    assert ("Phone numbers without a country code (1) were read as GB numbers (like 1 of the 1 numbers with a "
            "country code in your imports)") in out
    assert main(["--workspace", ws, "me", "--phone", "+1 555 555 0100"]) == 0
    assert "read as US numbers (like your own number +15555550100)" in capsys.readouterr().out
    assert main(["--workspace", ws, "me", "--phone", "07700 900999"]) == 1
    assert "country code" in capsys.readouterr().err


def test_a_comma_in_a_card_name_is_read_by_n_not_guessed():
    # vCard N (RFC 6350 section 6.2.2) gives the family name: it decides whether "A, B" is "family, given".
    def card(i, fn, family="", given="", suffix=""):
        r = rec(i, fn, [f"p{i}@e.example"])
        r.family, r.given, r.suffix = family, given, suffix
        return r

    rs = stored([
        card(0, "Lind, Ana", "Lind", "Ana"),                 # N agrees: family first, shown "Ana Lind"
        card(1, "Bo Ek, MD", "Ek", "Bo", "MD"),              # N says otherwise: kept as written
        card(2, "Cy Moss, Jr.", "Moss", "Cy", "Jr."),
        card(3, "Vik, Di"),                                 # no N (as a CSV row): family first
    ])
    names = {c.name for c in resolve(rs, {}, Decisions(), Me()).contacts}
    assert names == {"Ana Lind", "Bo Ek, MD", "Cy Moss, Jr.", "Di Vik"}
