"""Lists, relays, archives, robots and the people you corresponded with, on invented list traffic.

Each header rule names its source beside the check: RFC 2369 (List-Post,
List-Help, List-Unsubscribe), RFC 2919 (List-Id), RFC 5322 (Sender,
In-Reply-To, References), RFC 3834 (Auto-Submitted), RFC 2142 (role mailboxes,
LIST-REQUEST); relay and archive rewriting and Precedence are common practice
of list servers, and said so.
"""

from __future__ import annotations

import json

import pytest
from mailfixtures import LIST, YOU, archive_mbox, list_mbox, message

from mynet.cli import main
from mynet.evidence.explain import explain_tie
from mynet.evidence.network import load_network
from mynet.people.correspondence import address_facts, clean, correspondents, thread_members
from mynet.sources.mailaddr import KIND_WORDS, archive_parts, machine_kind, reverse_relay, via_name
from mynet.sources.mbox import parse_mail
from mynet.store import Store
from mynet.workspace.importing import import_paths
from mynet.workspace.people import find_contact, set_me


def one(*headers: str):
    (m,) = parse_mail(message(*headers).encode(), "one.mbox").interactions
    return m


# --------------------------------------------------------------------------
# One message: what the header fields say
# --------------------------------------------------------------------------

def test_list_fields_mark_list_addresses_and_the_list():
    m = one("From: Ana Lind <ana@quillon.example>", "To: dev@lists.harbour.example", "Cc: Bo Ek <bo@velvane.example>",
            "List-Id: Harbour developers <dev.lists.harbour.example>",
            "List-Post: <mailto:dev@lists.harbour.example>",
            "List-Unsubscribe: <mailto:dev-request@lists.harbour.example?subject=unsubscribe>")
    # RFC 2919 section 3: the List-Id is "[phrase] <list-label.namespace>"; the identifier is inside the brackets.
    assert m.list_id == "dev.lists.harbour.example"
    # RFC 2369 section 3.4: List-Post names the posting address; it is the list, not a participant.
    assert m.not_people["dev@lists.harbour.example"] == "list"
    # RFC 2369 section 3.2 (List-Unsubscribe) names the list manager's address.
    assert m.not_people["dev-request@lists.harbour.example"] == "list"
    assert m.participants == ["ana@quillon.example", "bo@velvane.example"]
    assert m.mass is True and m.bulk is False  # list mail is marked, not dropped


def test_list_id_alone_names_the_posting_address_by_common_practice():
    # RFC 2919 does not require it, but list-label.namespace is label@namespace on every list server we know of.
    m = one("From: ana@quillon.example", "To: ops@lists.harbour.example", "List-Id: <ops.lists.harbour.example>")
    assert m.not_people == {"ops@lists.harbour.example": "list"} and m.participants == ["ana@quillon.example"]


def test_sender_owner_and_mailing_list_fields():
    # RFC 5322 section 3.6.2: Sender is the agent that sent the message for the author; "-owner" is a list manager.
    m = one("From: ana@quillon.example", "To: kernel@vger.example", "Sender: kernel-owner@vger.example")
    assert m.not_people["kernel-owner@vger.example"] == "list" and m.list_id == "kernel@vger.example"
    # Mailing-List is the ezmlm list manager's field (common practice): "contact LIST-help@domain; run by ezmlm".
    m = one("From: ana@quillon.example", "To: libc@lists.gnu.example",
            "Mailing-List: contact libc-help@lists.gnu.example; run by ezmlm")
    assert m.not_people["libc@lists.gnu.example"] == "list" and m.participants == ["ana@quillon.example"]


@pytest.mark.parametrize("address, kind", [
    ("dev-request@lists.harbour.example", "list"),  # RFC 2142 section 6: LIST-REQUEST administers LIST
    ("owner-dev@lists.harbour.example", "list"),  # common practice of list managers
    ("team-feedback-list@velvane.example", "list"),  # named a list (common practice)
    ("dev-bounces+ana=quillon.example@lists.harbour.example", "list"),
    ("noreply@shop.example", "machine"),
    ("MAILER-DAEMON@mx.example", "machine"),
    ("jenkins@ci.harbour.example", "bot"),
    ("build-bot@harbour.example", "bot"),
    ("notifications@tracker.example", "feed"),
    ("calendar-notification@cal.example", "feed"),
    ("info@velvane.example", "role"),  # RFC 2142 section 3: INFO, MARKETING, SALES, SUPPORT
    ("abuse@velvane.example", "role"),  # RFC 2142 section 4
    ("ana.lind@quillon.example", ""),
    ("talbot@quillon.example", ""),
])
def test_machine_and_role_addresses_by_form(address, kind):
    assert machine_kind(address.lower()) == kind


def test_relay_rewriting_is_undone():
    # Common practice since DMARC: the relay puts the list in From and the author in X-Original-From.
    m = one('From: "Bo Ek via Harbour developers" <dev@lists.harbour.example>', "To: dev@lists.harbour.example",
            "X-Original-From: Bo Ek <bo@velvane.example>", "List-Id: <dev.lists.harbour.example>")
    assert (m.sender, m.participants, m.names) == ("bo@velvane.example", ["bo@velvane.example"],
                                                   {"bo@velvane.example": "Bo Ek"})
    # Without X-Original-From, a single Reply-To that is not the list names the author.
    m = one('From: "Bo Ek via Harbour developers" <dev@lists.harbour.example>', "Reply-To: Bo Ek <bo@velvane.example>",
            "To: dev@lists.harbour.example", "List-Id: <dev.lists.harbour.example>")
    assert m.sender == "bo@velvane.example"
    # With neither, the author is unknown: the relay address is never taken for a person.
    m = one('From: "Bo Ek via Harbour developers" <dev@lists.harbour.example>', "To: you@quillon.example")
    assert m.sender == "" and "dev@lists.harbour.example" not in m.participants
    # A relay that writes user=domain@relay.
    m = one("From: Cy Moss <cy.moss=corrimont.example@lists.harbour.example>", "To: dev@lists.harbour.example",
            "List-Id: <dev.lists.harbour.example>")
    assert m.sender == "cy.moss@corrimont.example"
    assert m.not_people["cy.moss=corrimont.example@lists.harbour.example"] == "relay"


def test_relay_helpers():
    assert via_name("'Bo Ek' via Harbour developers") == ("Bo Ek", "Harbour developers")
    assert via_name("Bo Ek") is None
    assert reverse_relay("cy=corrimont.example@relay.example") == "cy@corrimont.example"
    # Sender-rewriting and list-manager forms are not authors.
    assert reverse_relay("srs0=ab12=q3=vger.example=kernel-owner@fwd.example") == ""
    assert reverse_relay("dev-unsubscribe-cy=corrimont.example@lists.example") == ""
    assert archive_parts("ana.lind-xk3pq9lm@archive.example", "ana.lind") == ("ana.lind", "xk3pq9lm")
    assert archive_parts("ana.lind-tadesse@other.example", "ana.lind") is None  # a word, not a token


def test_automatic_and_no_reply_mail_is_bulk():
    # RFC 3834 section 5: Auto-Submitted other than "no" marks an automatic message.
    assert one("From: Harbour CI <ci@harbour.example>", "To: dev@x.example", "Auto-Submitted: auto-generated").bulk
    assert not one("From: ana@quillon.example", "To: bo@x.example", "Auto-Submitted: no").bulk
    assert one("From: Shop <no-reply@shop.example>", "To: you@quillon.example").bulk


def test_in_reply_to_and_references_give_the_parent():
    # RFC 5322 section 3.6.4: In-Reply-To holds the parent; References ends with it.
    m = one("From: a@x.example", "Message-ID: <c@x>", "References: <a@x> <b@x>")
    assert (m.thread, m.in_reply_to) == ("a@x", "b@x")
    m = one("From: a@x.example", "Message-ID: <c@x>", "In-Reply-To: <b@x>", "References: <a@x> <z@x>")
    assert m.in_reply_to == "b@x"


# --------------------------------------------------------------------------
# Across the mailbox: facts, cleaned threads, correspondents
# --------------------------------------------------------------------------

@pytest.fixture
def mail():
    items = parse_mail(list_mbox(), "list.mbox").interactions + parse_mail(archive_mbox(), "archive.mbox").interactions
    facts = address_facts(items, {}, {YOU[1]})
    return items, facts, clean(items, facts, {YOU[1]})


def test_archive_copies_map_to_the_person_by_name_and_prefix(mail):
    _, facts, _ = mail
    assert facts.aliases["ana.lind-xk3pq9lm@archive.harbour.example"] == "ana.lind@quillon.example"
    assert facts.aliases["bo-qz81jd0w@archive.harbour.example"] == "bo@velvane.example"
    assert facts.aliases["robin-7hc2kq1z@archive.harbour.example"] == YOU[1]  # your own archive copy is you
    assert facts.archive_domains == ["archive.harbour.example"]


def test_archive_copy_is_not_matched_by_name_alone():
    items = parse_mail(message("From: Ana Lind <al-Xk3pQ9Lm@archive.example>", "To: x@y.example").encode() +
                       message("From: Ana Lind <ana@quillon.example>", "To: x@y.example").encode(),
                       "a.mbox").interactions
    assert address_facts(items).aliases == {}  # "al" is not the local part of ana@quillon.example


def test_a_list_thread_counts_among_the_people_who_wrote(mail):
    _, _, cleaned = mail
    members = thread_members(cleaned)
    # In-Reply-To joins Cy's message to the thread although its References were lost.
    (release,) = [m for t, m in members.items() if "ana.lind@quillon.example" in m and "cy.moss@corrimont.example" in m]
    assert release == {"ana.lind@quillon.example", YOU[1], "bo@velvane.example", "cy.moss@corrimont.example"}
    assert all(LIST not in m for m in members.values())


def test_bulk_is_what_nobody_answered(mail):
    _, _, cleaned = mail
    bulk = {m.key for m in cleaned if m.bulk}
    assert "ann@harbour.example" in bulk  # an announcement nobody answered (Precedence: list, one writer)
    assert "ed1@nam.example" in bulk
    assert {"ci1@ci.harbour.example", "ci2@harbour.example"} <= bulk  # a robot is no writer
    assert "n1@tracker.harbour.example" in bulk
    assert not {"t1@quillon.example", "t3@lists.harbour.example", "p1@quillon.example"} & bulk


def test_correspondents_are_people_you_wrote_with(mail):
    _, _, cleaned = mail
    found = correspondents(cleaned, {YOU[1]})
    assert set(found) == {"ana.lind@quillon.example", "bo@velvane.example", "cy.moss@corrimont.example",
                          "fay@ro.example"}
    assert "both of you wrote" in found["bo@velvane.example"].reason
    assert "wrote to each other" in found["fay@ro.example"].reason
    assert found["bo@velvane.example"].name == "Bo Ek"
    # Gus only ever wrote to you; Di and Ed wrote to the list but never with you: nobody found.


def test_shared_alias_and_desk_names_are_not_people():
    items = parse_mail(
        message("From: Ana Lind <trivial@harbour.example>", "To: bo@x.example").encode()
        + message("From: Cy Moss <trivial@harbour.example>", "To: bo@x.example").encode()
        + message("From: Harbour bookings <slots@harbour.example>", "To: bo@x.example").encode()
        + message("From: Ana Lind <ana@quillon.example>", "To: bo@x.example").encode(), "a.mbox").interactions
    facts = address_facts(items)
    assert KIND_WORDS[facts.kinds["trivial@harbour.example"]] == "an address used under several people's names"
    assert "Ana Lind" in facts.reasons["trivial@harbour.example"]
    assert facts.kinds["slots@harbour.example"] == "role"
    assert "ana@quillon.example" not in facts.kinds
    # Your address book says whose an address is: never taken for a shared alias.
    assert "trivial@harbour.example" not in address_facts(items, {"trivial@harbour.example": ["Ana Lind"]}).kinds


def test_rooms_in_calendars_are_not_people():
    from mynet.sources.ics import parse_ics

    ics = ("BEGIN:VCALENDAR\r\nVERSION:2.0\r\nBEGIN:VEVENT\r\nUID:u1\r\nDTSTART:20100302T100000Z\r\n"
           "ORGANIZER;CN=Ana Lind:mailto:ana@quillon.example\r\n"
           "ATTENDEE;CUTYPE=ROOM;CN=Ana Lind:mailto:orchard@quillon.example\r\n"
           "ATTENDEE;CUTYPE=RESOURCE:mailto:projector@quillon.example\r\nEND:VEVENT\r\nEND:VCALENDAR\r\n").encode()
    (ev,) = parse_ics(ics, "c.ics").interactions
    # RFC 5545 section 3.2.3: CUTYPE ROOM and RESOURCE are calendar users that are not individuals.
    assert ev.not_people == {"orchard@quillon.example": "room", "projector@quillon.example": "resource"}
    assert address_facts([ev]).kinds["orchard@quillon.example"] == "room"


# --------------------------------------------------------------------------
# Through the workspace and the command line
# --------------------------------------------------------------------------

@pytest.fixture
def ws(tmp_path):
    (tmp_path / "list.mbox").write_bytes(list_mbox())
    (tmp_path / "archive.mbox").write_bytes(archive_mbox())
    store = Store(tmp_path / "ws.sqlite")
    set_me(store, [YOU[1]], [YOU[0]])
    import_paths(store, [tmp_path / "list.mbox", tmp_path / "archive.mbox"])
    return store, tmp_path


def test_a_mailbox_alone_gives_the_people_you_corresponded_with(ws):
    store, _ = ws
    contacts = {c.name: c for c in store.contacts()}
    assert set(contacts) == {"Ana Lind", "Bo Ek", "Cy Moss", "Fay Ro"}
    assert all(c.found_in == ["mail"] for c in contacts.values())
    assert not any("lists." in e or "archive." in e or "ci." in e for c in contacts.values() for e in c.emails)
    assert "found in your mail" in contacts["Bo Ek"].address_from["bo@velvane.example"]


def test_thread_ties_among_writers_and_why_agrees(ws):
    store, _ = ws
    net = load_network(store)
    ana, bo = find_contact(store, "Ana Lind"), find_contact(store, "Bo Ek")
    pairs = {frozenset((int(a), int(b))) for a, b in zip(net.all_ties.a, net.all_ties.b)}
    fay = find_contact(store, "Fay Ro")
    assert frozenset((ana.id, bo.id)) in pairs and frozenset((ana.id, fay.id)) not in pairs
    ev = {e["kind"]: e for e in explain_tie(store, net, ana.id, bo.id)["evidence"]}
    i = [k for k, (a, b) in enumerate(zip(net.all_ties.a, net.all_ties.b)) if {int(a), int(b)} == {ana.id, bo.id}][0]
    # Both threads (the live one and the archive copy): the same count in ties and in why.
    assert ev["thread"]["count"] == int(net.all_ties.counts["thread"][i]) == 2
    assert "domain" not in ev  # an archive domain is never a shared-domain tie


def test_your_archive_copy_is_you(ws):
    store, tmp_path = ws
    assert "robin-7hc2kq1z@archive.harbour.example" in json.loads(store.meta("me_seen_as"))


def test_no_new_contacts_keeps_mail_out_of_the_contacts(tmp_path):
    (tmp_path / "list.mbox").write_bytes(list_mbox())
    store = Store(tmp_path / "ws.sqlite")
    set_me(store, [YOU[1]], [YOU[0]])
    rep = import_paths(store, [tmp_path / "list.mbox"], new_contacts=False)
    assert store.contacts() == [] and rep.found == 0
    rep = import_paths(store, [tmp_path / "list.mbox"])  # the same file, now allowed: read again
    assert rep.files[0].status == "updated" and rep.found == 4


def test_drop_address_is_kept_across_reimport(ws, capsys):
    store, tmp_path = ws
    bo = find_contact(store, "Bo Ek")
    assert main(["--workspace", str(tmp_path / "ws.sqlite"), "drop-address", str(bo.id), "bo@velvane.example"]) == 0
    assert f"{bo.name} ({bo.id}) was known only through bo@velvane.example" in capsys.readouterr().out
    store2 = Store(tmp_path / "ws.sqlite")
    assert all("bo@velvane.example" not in c.emails for c in store2.contacts())
    (tmp_path / "list.mbox").write_bytes(list_mbox() + message("From: x@y.example", "To: z@y.example").encode())
    import_paths(store2, [tmp_path / "list.mbox"])
    assert all("bo@velvane.example" not in c.emails for c in store2.contacts())


def test_forgotten_person_found_in_mail_stays_forgotten(ws):
    from mynet.workspace.privacy import forget_contact

    store, tmp_path = ws
    forget_contact(store, find_contact(store, "Fay Ro").id)
    (tmp_path / "list.mbox").write_bytes(list_mbox() + b"\n")
    import_paths(store, [tmp_path / "list.mbox"])
    assert "Fay Ro" not in {c.name for c in store.contacts()}
    assert all("fay@ro.example" not in it.participants for it in store.interactions())


def test_show_says_where_each_address_came_from(ws, capsys):
    store, tmp_path = ws
    capsys.readouterr()
    assert main(["--workspace", str(tmp_path / "ws.sqlite"), "show", "Bo Ek"]) == 0
    out = capsys.readouterr().out
    assert "Found in your mail" in out and "bo@velvane.example: found in your mail" in out
    assert "mynet drop-address" in out


def test_import_without_me_says_how_to_say_who_you_are(tmp_path, capsys):
    (tmp_path / "list.mbox").write_bytes(list_mbox())
    assert main(["--workspace", str(tmp_path / "w.sqlite"), "import", str(tmp_path / "list.mbox")]) == 0
    out = capsys.readouterr().out
    assert "mynet does not know who you are yet" in out and YOU[1] in out


def test_relay_and_archive_domains_are_no_employer_nor_group_name(tmp_path):
    from mynet.analysis.snapshot import analyse
    from mynet.workspace.settings import update_list_setting

    rows = ["Name,Email,Tags"] + [f"{n},{n.split()[0].lower()}@lists.harbour.example,rowing"
                                  for n in ("Ana Lind", "Bo Ek", "Cy Moss", "Di Park")]
    (tmp_path / "crew.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    import_paths(store, [tmp_path / "crew.csv"])
    net = load_network(store)
    assert net.all_ties.parts["domain"].any()  # without the setting, the shared domain is evidence
    update_list_setting(store, "mail_relay_domains", "lists.harbour.example")
    net = load_network(store)
    assert not net.all_ties.parts["domain"].any() and net.all_ties.parts["tag"].all()
    (group,) = analyse(store, net).groups
    assert "lists.harbour" not in group.label and "rowing" in group.label


def test_decisions_about_found_people_survive_removing_another_file_and_go_with_them(ws):
    from mynet.workspace.decisions import rate_contact
    from mynet.workspace.privacy import forget_contact, remove_source

    store, tmp_path = ws
    ana = find_contact(store, "Ana Lind")
    rate_contact(store, ana.id, 0.9)
    remove_source(store, str(tmp_path / "archive.mbox"))
    assert find_contact(store, "Ana Lind").id == ana.id  # still found in list.mbox
    assert [r["kind"] for r in store.decisions()] == ["rate"]
    forget_contact(store, ana.id)
    assert store.decisions() == []


def test_dropping_a_found_persons_only_address_does_not_spend_new_ids(ws):
    from mynet.people.refresh import refresh_contacts
    from mynet.workspace.people import detach_address

    store, _ = ws
    bo = find_contact(store, "Bo Ek")
    assert detach_address(store, bo.id, "bo@velvane.example") is None
    before = store.meta("next_contact_id")
    refresh_contacts(store)
    refresh_contacts(store)
    assert store.meta("next_contact_id") == before
    assert "Bo Ek" not in {c.name for c in store.contacts()}
    back = detach_address(store, None, "bo@velvane.example", undo=True)  # he is gone: undone by address
    assert back is not None and back.name == "Bo Ek"  # under a new id: ids are never reused
