"""Tests for the mail importer (mbox files and single .eml messages).

All people, addresses and messages are invented (example.org / example.net),
except the RFC 2047 section 8 examples, which keep the RFC's own addresses.
"""

from __future__ import annotations

import base64
import time

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from mynet.errors import InputError, RecordError
from mynet.sources import iter_input_files, parse_file
from mynet.sources.mbox import FIELD_CAP, MAX_KEPT, bulk_reason, decode_words, iter_mbox_messages, parse_mail


def msg(*headers: str, body: str = "Hello.\n",
        envelope: str = "From sender@example.org Mon Jan  1 09:00:00 2024") -> str:
    """One mbox message: envelope line, header lines, blank line, body."""
    lines = ([envelope] if envelope else []) + list(headers)
    return "\n".join(lines) + "\n\n" + body + ("" if body.endswith("\n") else "\n") + "\n"


def mbox(*messages: str) -> bytes:
    return "".join(messages).encode("utf-8")


BASIC = (
    "From: Ada Quill <ada@example.org>",
    "To: Ben Orr <ben@example.org>",
    "Subject: Lunch",
    "Date: Tue, 2 Jan 2024 10:00:00 +0100",
    "Message-ID: <lunch-1@example.org>",
)


# --------------------------------------------------------------------------
# RFC 2047 encoded words
# --------------------------------------------------------------------------

def test_rfc2047_section8_header_examples_decode():
    # RFC 2047 §8: the first example message's header fields (addresses are the RFC's own).
    data = (
        b"From: =?US-ASCII?Q?Keith_Moore?= <moore@cs.utk.edu>\n"
        b"To: =?ISO-8859-1?Q?Keld_J=F8rn_Simonsen?= <keld@dkuug.dk>\n"
        b"CC: =?ISO-8859-1?Q?Andr=E9?= Pirard <PIRARD@vm1.ulg.ac.be>\n"
        b"Subject: =?ISO-8859-1?B?SWYgeW91IGNhbiByZWFkIHRoaXMgeW8=?=\n"
        b"    =?ISO-8859-2?B?dSB1bmRlcnN0YW5kIHRoZSBleGFtcGxlLg==?=\n"
        b"\n"
        b"body\n"
    )
    (m,) = parse_mail(data, "rfc2047.eml", single=True).interactions
    assert m.names["moore@cs.utk.edu"] == "Keith Moore"  # RFC 2047 §8
    assert m.names["keld@dkuug.dk"] == "Keld Jørn Simonsen"  # RFC 2047 §8
    assert m.names["pirard@vm1.ulg.ac.be"] == "André Pirard"  # RFC 2047 §8
    assert m.title == "If you can read this you understand the example."  # RFC 2047 §8
    assert m.sender == "moore@cs.utk.edu"
    assert m.participants == ["keld@dkuug.dk", "moore@cs.utk.edu", "pirard@vm1.ulg.ac.be"]


def test_rfc2047_section8_second_example_names():
    # RFC 2047 §8, second example message: encoded display name, and a name given only as an encoded comment.
    data = (
        b"From: =?ISO-8859-1?Q?Olle_J=E4rnefors?= <ojarnef@admin.kth.se>\n"
        b"To: ietf-822@dimacs.rutgers.edu, ojarnef@admin.kth.se\n"
        b"Subject: Test of new header generator\n\n"
    )
    (m,) = parse_mail(data, "a.eml", single=True).interactions
    assert m.names == {"ojarnef@admin.kth.se": "Olle Järnefors"}  # RFC 2047 §8
    assert m.participants == ["ietf-822@dimacs.rutgers.edu", "ojarnef@admin.kth.se"]  # RFC 2047 §8
    data = (b"From: Nathaniel Borenstein <nsb@thumper.bellcore.com>\n    (=?iso-8859-8?b?7eXs+SDv4SDp7Oj08A==?=)\n"
            b"To: x@example.org\n\n")
    (m,) = parse_mail(data, "b.eml", single=True).interactions
    assert m.names["nsb@thumper.bellcore.com"] == "Nathaniel Borenstein"  # RFC 2047 §8
    hebrew = base64.b64decode("7eXs+SDv4SDp7Oj08A==").decode("iso-8859-8")
    assert decode_words("(=?iso-8859-8?b?7eXs+SDv4SDp7Oj08A==?=)") == f"({hebrew})"  # RFC 2047 §8


@pytest.mark.parametrize(
    "encoded, shown",
    [
        # RFC 2047 §8, the table of encoded forms and how they are displayed.
        ("(=?ISO-8859-1?Q?a?=)", "(a)"),
        ("(=?ISO-8859-1?Q?a?= b)", "(a b)"),
        ("(=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=)", "(ab)"),
        ("(=?ISO-8859-1?Q?a?=  =?ISO-8859-1?Q?b?=)", "(ab)"),
        ("(=?ISO-8859-1?Q?a_b?=)", "(a b)"),
        ("(=?ISO-8859-1?Q?a?= =?ISO-8859-2?Q?_b?=)", "(a b)"),
    ],
)
def test_rfc2047_section8_whitespace_table(encoded, shown):
    assert decode_words(encoded) == shown  # RFC 2047 §8


def test_rfc2047_section8_folded_pair_in_a_subject():
    # RFC 2047 §8: "(=?ISO-8859-1?Q?a?=" CRLF "    =?ISO-8859-1?Q?b?=)" displays as "(ab)".
    data = b"From: x@example.org\nSubject: (=?ISO-8859-1?Q?a?=\n    =?ISO-8859-1?Q?b?=)\n\n"
    assert parse_mail(data, "a.eml", single=True).interactions[0].title == "(ab)"


@pytest.mark.parametrize(
    "value, expected",
    [
        ("=?x-no-such-charset?Q?Cora_Vale?=", "Cora Vale"),  # unknown charset: UTF-8 fallback
        ("=?unknown-8bit?Q?Jos=E9?=", "José"),  # not UTF-8: Windows-1252 fallback
        ("=?base64?Q?Dee?=", "Dee"),  # a codec that is not a text encoding
        ("=?utf-8?Q?Eve?= =?utf-8?B?QUJDR?=", "Eve =?utf-8?B?QUJDR?="),  # bad base64: kept as written
        ("=?utf-8?Q?Eve?= =?utf-8?B?QUJDR?= =?utf-8?Q?_Ode?=", "Eve =?utf-8?B?QUJDR?=  Ode"),
        ("=?utf-8?Q?Fay?= and =?utf-8?B?QUJDR?=", "Fay and =?utf-8?B?QUJDR?="),
        ("=?utf-8?q?G=C3=BCl?= =?utf-8?q?_Ay?=", "Gül Ay"),
        ("=?utf-8?B?w7Y=?==?utf-8?B?w7Y=?=", "öö"),
        ("=?UTF-8*en?Q?Hal?=", "Hal"),  # RFC 2231 language suffix
        ("=?utf-8?q?unterminated", "=?utf-8?q?unterminated"),
        ("plain text", "plain text"),
    ],
)
def test_malformed_encoded_words_never_raise(value, expected):
    assert decode_words(value) == expected


def test_multibyte_character_split_across_encoded_words():
    # "é" is C3 A9 in UTF-8; a writer split it over two words.
    assert decode_words("=?utf-8?B?Y2Fmw6k=?=") == "café"
    assert decode_words("=?utf-8?Q?caf=C3?= =?utf-8?Q?=A9?=") == "café"


def test_encoded_name_with_comma_stays_one_address():
    data = mbox(msg('From: "=?utf-8?Q?Orr=2C_Ben?=" <ben@example.org>', "To: ada@example.org"))
    (m,) = parse_mail(data, "a.mbox").interactions
    assert m.names == {"ben@example.org": "Orr, Ben"}
    assert m.participants == ["ada@example.org", "ben@example.org"]


# --------------------------------------------------------------------------
# Fields of one message
# --------------------------------------------------------------------------

def test_basic_fields_and_utc_date():
    (m,) = parse_mail(mbox(msg(*BASIC)), "in.mbox").interactions
    assert (m.kind, m.source, m.index, m.line) == ("message", "in.mbox", 0, 1)
    assert m.when == "2024-01-02T09:00:00+00:00"
    assert m.key == m.thread == "lunch-1@example.org"
    assert m.title == "Lunch"
    assert m.sender == "ada@example.org"
    assert m.names == {"ada@example.org": "Ada Quill", "ben@example.org": "Ben Orr"}
    assert m.bulk is False


def test_minus_zero_zone_is_utc(monkeypatch):
    # RFC 5322 §3.3: "-0000" means the time is UTC with no information about the local zone.
    # The machine's own zone must not leak in, so run this under a zone far from UTC.
    if not hasattr(time, "tzset"):
        pytest.skip("time.tzset is not available on this platform")
    monkeypatch.setenv("TZ", "Etc/GMT+5")
    time.tzset()
    try:
        data = mbox(msg("From: a@example.org", "Date: Tue, 2 Jan 2024 10:00:00 -0000"))
        assert parse_mail(data, "a.mbox").interactions[0].when == "2024-01-02T10:00:00+00:00"
    finally:
        monkeypatch.undo()
        time.tzset()


def test_cc_counted_bcc_and_reply_to_not():
    data = mbox(msg(
        "From: Ada Quill <ADA@Example.org>",
        "To: ben@example.org",
        "Cc: Cy Dunn <cy@example.net>, dee@example.net",
        "Bcc: hidden@example.org",
        "Reply-To: replies@example.org",
    ))
    (m,) = parse_mail(data, "a.mbox").interactions
    assert m.participants == ["ada@example.org", "ben@example.org", "cy@example.net", "dee@example.net"]
    assert "hidden@example.org" not in repr(m) and "replies@example.org" not in repr(m)
    assert m.names == {"ada@example.org": "Ada Quill", "cy@example.net": "Cy Dunn"}


def test_repeated_to_fields_group_syntax_and_junk_addresses():
    data = mbox(msg(
        "From: ada@example.org",
        "To: undisclosed-recipients:;",
        "To: Team: ben@example.org, cy@example.org;",
        "Cc: not an address",
    ))
    result = parse_mail(data, "a.mbox")
    assert result.interactions[0].participants == ["ada@example.org", "ben@example.org", "cy@example.org"]
    assert any("not an e-mail address" in w and "line 1" in w for w in result.warnings)


def test_name_equal_to_address_and_comment_form():
    data = mbox(msg('From: "ada@example.org" <ada@example.org>', "To: ben@example.org (Ben Orr)"))
    assert parse_mail(data, "a.mbox").interactions[0].names == {"ben@example.org": "Ben Orr"}


@pytest.mark.parametrize("date", [None, "Date: sometime next week", "Date: "])
def test_missing_or_bad_date_keeps_message_undated(date):
    headers = ["From: a@example.org", "To: b@example.org"] + ([date] if date else [])
    data = mbox(msg(*BASIC), msg(*headers))
    result = parse_mail(data, "a.mbox")
    assert [m.when for m in result.interactions] == ["2024-01-02T09:00:00+00:00", ""]
    line = result.interactions[1].line
    assert line == 10
    assert any("kept without a date" in w and f"line {line}" in w for w in result.warnings)


def test_missing_message_id_gets_stable_hash_key():
    a = msg("From: a@example.org", "Subject: One", "Date: Tue, 2 Jan 2024 10:00:00 +0000")
    b = msg("From: a@example.org", "Subject: Two", "Date: Tue, 2 Jan 2024 10:00:00 +0000")
    first = parse_mail(mbox(a, b), "x.mbox").interactions
    again = parse_mail(mbox(b, a), "y.mbox").interactions
    assert first[0].key.startswith("sha256:") and len(first[0].key) == len("sha256:") + 32
    assert first[0].key != first[1].key
    assert {m.key for m in first} == {m.key for m in again}
    assert first[0].thread == first[0].key


@pytest.mark.parametrize(
    "extra, root",
    [
        (("References: <root@example.org>\n <mid@example.org>", "In-Reply-To: <mid@example.org>"), "root@example.org"),
        (("In-Reply-To: <parent@example.org> (Ada's note of Tuesday)",), "parent@example.org"),
        (("In-Reply-To: Your message of Tue <parent@example.org>",), "parent@example.org"),
        (("References: ",), "own@example.org"),
        ((), "own@example.org"),
    ],
)
def test_thread_root(extra, root):
    data = mbox(msg("From: a@example.org", "Message-ID: < own@example.org >", *extra))
    (m,) = parse_mail(data, "a.mbox").interactions
    assert m.key == "own@example.org"
    assert m.thread == root


def test_thread_groups_a_conversation():
    data = mbox(
        msg("From: a@example.org", "To: b@example.org", "Message-ID: <t1@example.org>"),
        msg("From: b@example.org", "To: a@example.org", "Message-ID: <t2@example.org>",
            "In-Reply-To: <t1@example.org>"),
        msg("From: a@example.org", "To: b@example.org", "Message-ID: <t3@example.org>",
            "In-Reply-To: <t2@example.org>", "References: <t1@example.org> <t2@example.org>"),
        msg("From: c@example.org", "To: a@example.org", "Message-ID: <other@example.org>"),
    )
    threads = [m.thread for m in parse_mail(data, "a.mbox").interactions]
    assert threads == ["t1@example.org"] * 3 + ["other@example.org"]


# --------------------------------------------------------------------------
# Bulk mail
# --------------------------------------------------------------------------

@pytest.mark.parametrize(
    "header, bulk, mass",
    [
        # RFC 2919 section 3 (List-Id), RFC 2369 section 3.2 (List-Unsubscribe): list mail is only marked;
        # whether anyone answered decides later (see test_correspondence.py).
        ("List-Id: Garden club <garden.example.org>", False, True),
        ("List-Unsubscribe: <mailto:leave@example.org>", False, True),
        # Precedence is common practice (RFC 3834 section 2 tells responders to respect it): marked only.
        ("Precedence: bulk", False, True),
        ("Precedence: List", False, True),
        ("Precedence: junk", False, True),
        ("Precedence: first-class", False, False),
        # RFC 3834 section 5: any Auto-Submitted value other than "no" is an automatic message.
        ("Auto-Submitted: auto-replied", True, False),
        ("Auto-Submitted: auto-generated; owner-email=a@example.org", True, False),
        ("Auto-Submitted: no", False, False),
        ("X-Mailer: Example Mail 1.0", False, False),
    ],
)
def test_bulk_rules(header, bulk, mass):
    data = mbox(msg("From: ada@example.org", "To: you@example.org", header))
    result = parse_mail(data, "a.mbox")
    assert len(result.interactions) == 1  # bulk mail is kept, only marked
    assert result.interactions[0].bulk is bulk
    assert result.interactions[0].mass is mass


def test_bulk_by_recipient_count():
    def with_recipients(n: int) -> bytes:
        to = ", ".join(f"p{i}@example.org" for i in range(n - 1))
        return mbox(msg("From: a@example.org", f"To: {to}", "Cc: last@example.net",
                        "Bcc: z1@example.org, z2@example.org"))

    assert parse_mail(with_recipients(25), "a.mbox").interactions[0].bulk is False
    assert parse_mail(with_recipients(26), "a.mbox").interactions[0].bulk is True
    assert parse_mail(with_recipients(5), "a.mbox", max_recipients=4).interactions[0].bulk is True
    assert parse_mail(with_recipients(26), "a.mbox").interactions[0].recipients == 26
    assert bulk_reason({}, 26) == "26 recipients (more than 25)"
    assert bulk_reason({"precedence": ["Bulk "]}, 1) == ""
    assert bulk_reason({"auto-submitted": ["auto-generated"]}, 1) == "Auto-Submitted: auto-generated"


@pytest.mark.parametrize("sender", ["noreply@shop.example", "no-reply@shop.example", "mailer-daemon@mx.example",
                                    "jenkins@ci.build.example", "notifications@tracker.example"])
def test_robot_and_no_reply_authors_are_bulk(sender):
    (m,) = parse_mail(mbox(msg(f"From: Shop <{sender}>", "To: you@example.org")), "a.mbox").interactions
    assert m.bulk is True and m.not_people[sender] in ("machine", "bot", "feed")
    assert sender not in m.participants


# --------------------------------------------------------------------------
# Splitting an mbox
# --------------------------------------------------------------------------

def test_from_lines_in_bodies_do_not_split_messages():
    body = (
        "First paragraph\n"
        "From here on a body line after a non-blank line\n"
        ">From a quoted line (mboxrd)\n"
        "\n"
        ">From a quoted line after a blank line\n"
        "\n"
        "From the desk of a body paragraph after a blank line\n"
        "still body.\n"
    )
    data = mbox(msg(*BASIC, body=body), msg("From: ben@example.org", "To: ada@example.org"))
    result = parse_mail(data, "a.mbox")
    assert [m.line for m in result.interactions] == [1, 17]
    assert [m.index for m in result.interactions] == [0, 1]
    assert result.skipped == []


@pytest.mark.parametrize("eol", ["\n", "\r\n"])
def test_envelope_shaped_from_line_after_blank_line_splits_even_without_headers(eol):
    body = "no headers\nX-Looks: like a field\n"
    data = mbox(msg(*BASIC), "From someone@example.org Tue Jan  2 10:00:00 2024\n\n" + body + "\n", msg(*BASIC))
    data = data.replace(b"\n", eol.encode())
    result = parse_mail(data, "a.mbox")
    assert [m.line for m in result.interactions] == [1, 15]
    assert [(s.line, s.index, s.reason) for s in result.skipped] == [(10, 1, "message has no header fields")]


def test_whole_envelope_line_without_the_blank_line_before_it_opens_a_message():
    # Line ends mixed on the way: "Message-ID: x\r" then the blank line's "\n" read as one CR LF, so the
    # body runs straight into the next envelope line. A whole envelope line (sender, asctime date with
    # its year; the traditional mbox "From_" line) followed by a header field still opens a message.
    data = (b"From ada@example.org Mon Jan  5 10:00:00 2026\r\nFrom: ada@example.org\rTo: ben@example.org\r\n"
            b"Message-ID: <m1@example.org>\r\nbody\r\n"
            b"From ben@example.org Tue Jan  6 10:00:00 2026\nFrom: ben@example.org\nTo: ada@example.org\n\nbody\n")
    result = parse_mail(data, "a.mbox")
    assert [m.sender for m in result.interactions] == ["ada@example.org", "ben@example.org"]
    # a body line that merely starts like an envelope, or is one without a header after it, still does not
    body = "text\nFrom ada@example.org Mon Jan  5 10:00:00 2026\nnot a field\nFrom here on\n"
    assert len(parse_mail(mbox(msg(*BASIC, body=body)), "a.mbox").interactions) == 1


def test_crlf_mbox_reads_like_lf():
    text = "".join([msg(*BASIC, body="Body\nFrom inside\n"),
                    msg("From: ben@example.org", "To: ada@example.org", "Subject: x\n  y")])
    lf = parse_mail(text.encode(), "a.mbox").interactions
    crlf = parse_mail(text.replace("\n", "\r\n").encode(), "a.mbox").interactions
    assert [m.to_dict() for m in crlf] == [m.to_dict() for m in lf]
    assert [m.line for m in crlf] == [1, 11]
    assert crlf[1].title == "x y"


def test_iter_mbox_messages_lines_and_offsets():
    data = (b"\n\nFrom a Mon Jan  1 00:00:00 2024\nFrom: a@example.org\n\nbody\n\n"
            b"From b Tue Jan  2 00:00:00 2024\nTo: b@example.org\n")
    spans = list(iter_mbox_messages(data))
    assert [line for line, _, _ in spans] == [3, 8]
    assert data[spans[0][1]:].startswith(b"From: a@")
    assert spans[0][2] == data.index(b"From b")
    assert spans[1][2] == len(data)


def test_text_before_first_separator_is_reported():
    data = b"stray text\n\n" + mbox(msg(*BASIC))
    result = parse_mail(data, "a.mbox")
    assert [m.line for m in result.interactions] == [3]
    assert any("before the first 'From ' line" in w for w in result.warnings)


def test_mbox_without_separator_but_with_headers_is_one_message():
    data = "\n".join(BASIC).encode() + b"\n\nbody\n"
    result = parse_mail(data, "export.mbox")
    assert [m.key for m in result.interactions] == ["lunch-1@example.org"]
    assert any("no 'From ' separator" in w for w in result.warnings)


def test_many_messages(tmp_path):
    # 20,000 small messages; the split and header reading are linear (about 1.5 s here).
    n = 20000
    parts = [
        f"From p{i}@example.org Mon Jan  1 00:00:00 2024\nFrom: P{i} <p{i}@example.org>\nTo: you@example.org\n"
        f"Message-ID: <m{i}@example.org>\nDate: Mon, 1 Jan 2024 10:00:00 +0000\n\nbody\nFrom x\n\n"
        for i in range(n)
    ]
    result = parse_mail("".join(parts).encode(), "big.mbox")
    assert len(result.interactions) == n
    assert result.interactions[-1].line == 1 + 9 * (n - 1)
    assert result.interactions[-1].key == f"m{n - 1}@example.org"


# --------------------------------------------------------------------------
# Encodings, bodies, odd messages
# --------------------------------------------------------------------------

def test_raw_latin1_and_utf8_headers():
    data = (
        b"From a Mon Jan  1 00:00:00 2024\nFrom: J\xf6rg Vogt <jv@example.org>\nTo: b@example.org\nSubject: "
        b"\xe9t\xe9\n\n"
        b"From b Mon Jan  1 00:00:00 2024\nFrom: J\xc3\xb6rg Vogt <jv@example.org>\nTo: b@example.org\n\n"
    )
    result = parse_mail(data, "a.mbox")
    first, second = result.interactions
    assert first.names["jv@example.org"] == "Jörg Vogt" and first.title == "été"
    assert second.names["jv@example.org"] == "Jörg Vogt"
    assert any("not UTF-8" in w and "line 1)" in w for w in result.warnings)


def test_body_is_never_kept():
    secret = "ZQX-body-marker-7731"
    body = f"{secret}\nFrom: fake@example.org\nSubject: {secret}\n"
    data = mbox(msg(*BASIC, body=body), msg("From: b@example.org", body=secret))
    result = parse_mail(data, "a.mbox")
    assert len(result.interactions) == 2
    assert secret not in repr(result)
    assert "fake@example.org" not in repr(result)


def test_message_without_addresses_is_skipped_with_line():
    data = mbox(msg(*BASIC), msg("Subject: orphan", "Date: Tue, 2 Jan 2024 10:00:00 +0000"), msg(*BASIC))
    result = parse_mail(data, "a.mbox")
    assert [m.index for m in result.interactions] == [0, 2]
    (skip,) = result.skipped
    assert (skip.source, skip.line, skip.index) == ("a.mbox", 10, 1)
    assert skip.reason == "message has no From, To or Cc address"
    assert str(skip) == "a.mbox:10: message has no From, To or Cc address"


def test_strict_raises_at_the_first_bad_message():
    data = mbox(msg(*BASIC), msg("Subject: orphan"))
    with pytest.raises(RecordError) as err:
        parse_mail(data, "a.mbox", strict=True)
    assert err.value.line == 10
    assert str(err.value) == "a.mbox:10: message has no From, To or Cc address"
    assert len(parse_mail(mbox(msg(*BASIC)), "a.mbox", strict=True).interactions) == 1


def test_header_line_that_is_not_a_field_is_reported():
    data = mbox(msg("From: a@example.org", "this line has no colon", "To: lost@example.org"))
    result = parse_mail(data, "a.mbox")
    assert result.interactions[0].participants == ["a@example.org"]
    assert any("not a header field" in w for w in result.warnings)


def test_huge_header_fields_are_read_with_bounded_memory():
    filler = "X-Filler: " + "a" * 1000
    big = msg("From: a@example.org", *([filler] * 1100), "To: b@example.org")
    result = parse_mail(mbox(msg(*BASIC), big), "a.mbox")
    assert len(result.interactions) == 2 and not result.skipped
    assert result.interactions[1].participants == ["a@example.org", "b@example.org"]


def test_hundred_thousand_recipients_do_not_make_the_file_not_mail():
    to = "To: " + ",\n ".join(f"Person {i} <p{i}@crowd.example>" for i in range(100_000))
    data = mbox(msg("From: Ada Quill <ada@example.org>", to, "Subject: all of you"), msg(*BASIC))
    result = parse_mail(data, "crowd.mbox")
    first, second = result.interactions
    assert first.recipients == 100_000 and first.bulk is True
    assert len(first.participants) <= MAX_KEPT + 1 and "ada@example.org" in first.participants
    assert second.key == "lunch-1@example.org" and second.line > 100_000
    assert any("over" in w and "KiB" in w for w in result.warnings)
    assert FIELD_CAP < len(to)


# --------------------------------------------------------------------------
# Files that are empty or not mail
# --------------------------------------------------------------------------

@pytest.mark.parametrize("single", [False, True])
@pytest.mark.parametrize("data", [b"", b"\n\r\n  \n", b"\xef\xbb\xbf"])
def test_empty_file(data, single):
    with pytest.raises(InputError) as err:
        parse_mail(data, "empty.mbox", single=single)
    assert str(err.value) == "empty.mbox: is empty"


@pytest.mark.parametrize(
    "data, single",
    [
        (b"From the desk of the editor\nDear all,\nnothing here is mail.\n", False),
        (b"just some notes\nand more\n", False),
        (b"just some notes\nand more\n", True),
        (b"Title: a note\nAuthor: someone\n\ntext\n", True),
        (b"From x Mon Jan  1 00:00:00 2024\nTitle: a note\n\ntext\n", False),
    ],
)
def test_not_mail_is_refused_naming_the_file(data, single):
    with pytest.raises(InputError) as err:
        parse_mail(data, "notes.txt", single=single)
    assert str(err.value).startswith("notes.txt: is not")


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.binary(max_size=400), st.booleans())
def test_arbitrary_bytes_give_a_result_or_an_input_error(tail, single):
    data = b"From a@example.org Mon Jan  1 00:00:00 2024\nFrom: a@example.org\n" + tail
    try:
        result = parse_mail(data, "fuzz.mbox", single=single)
    except InputError:
        return
    assert all(m.kind == "message" for m in result.interactions)


# --------------------------------------------------------------------------
# Single .eml files and the dispatcher
# --------------------------------------------------------------------------

def test_single_eml(tmp_path):
    data = ("\r\n".join(BASIC)
            + "\r\n\r\nFrom the body\r\n\r\nFrom x Mon Jan  1 00:00:00 2024\r\nTo: z@example.org\r\n").encode()
    result = parse_mail(data, "one.eml", single=True)
    assert result.kind == "eml"
    (m,) = result.interactions
    assert (m.index, m.line, m.key) == (0, 1, "lunch-1@example.org")
    assert "z@example.org" not in m.participants


def test_single_eml_with_envelope_line():
    data = mbox(msg(*BASIC))
    (m,) = parse_mail(data, "one.eml", single=True).interactions
    assert (m.line, m.sender) == (1, "ada@example.org")


def test_dispatcher_reads_mbox_and_a_folder_of_eml(tmp_path):
    box = tmp_path / "archive.mbox"
    box.write_bytes(mbox(msg(*BASIC), msg("From: ben@example.org", "To: ada@example.org")))
    result = parse_file(box)
    assert result.kind == "mbox" and len(result.interactions) == 2
    folder = tmp_path / "mail"
    folder.mkdir()
    for i in range(3):
        (folder / f"{i}.eml").write_bytes(f"From: p{i}@example.org\nTo: you@example.org\nDate: Mon, 1 Jan 2024 "
                                          f"10:00:00 +0000\n\nhi\n".encode())
    results = [parse_file(p) for p in iter_input_files([folder])]
    assert [r.kind for r in results] == ["eml"] * 3
    assert [r.interactions[0].sender for r in results] == [f"p{i}@example.org" for i in range(3)]


def test_rfc5545_mime_headers_from_corpus(corpus_dir):
    path = corpus_dir / "standards" / "rfc5545-sec4-ex3-mime-headers.txt"
    (m,) = parse_mail(path.read_bytes(), str(path), single=True).interactions
    # RFC 5545 §4 example 3: the MIME header lines printed in front of the calendar.
    assert m.sender == "jdoe@example.com"
    assert m.participants == ["jdoe@example.com", "jsmith@example.com"]
    assert m.key == "id3@example.com"
    assert m.when == ""  # the RFC's header lines have no Date


@pytest.mark.parametrize("ending", [b"\r", b"\r\r\n"])
def test_lines_ended_by_cr_alone_or_cr_cr_lf_are_read(ending):
    # RFC 5322 section 2.1 wants CRLF; files from old Mac systems end lines with CR alone, and some exports
    # double the CR. Every message is read, with the line numbers of the file.
    def message(n, sender, to, reply=""):
        lines = [b"From x@y.example Mon Jan  1 00:00:00 2024", b"From: " + sender, b"To: " + to,
                 b"Date: Mon, 1 Jan 2024 1%d:00:00 +0000" % n, b"Subject: hi", b"Message-ID: <%d@x.example>" % n]
        if reply:
            lines.append(b"In-Reply-To: " + reply)
        return ending.join(lines + [b"", b"body", b""]) + ending

    data = message(1, b"Ana Lind <ana@orsolan.example>", b"Bo Ek <bo@orsolan.example>")
    data += message(2, b"Bo Ek <bo@orsolan.example>", b"Ana Lind <ana@orsolan.example>", b"<1@x.example>")
    res = parse_mail(data, "cr.mbox")
    assert [m.line for m in res.interactions] == [1, 10]
    assert [m.sender for m in res.interactions] == ["ana@orsolan.example", "bo@orsolan.example"]
    assert res.interactions[1].thread == res.interactions[0].thread
