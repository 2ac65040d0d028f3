"""Normalisation of e-mails, phones, names and organisations."""

from __future__ import annotations

import pytest

from mynet.people.normalise import (
    email_domain,
    fold_text,
    is_webmail,
    name_key,
    normalise_email,
    normalise_name,
    normalise_org,
    normalise_phone,
)


@pytest.mark.parametrize(
    "raw, expected",
    [
        ("  Ana.Lind@Quillon.Example ", "ana.lind@quillon.example"),
        ('"Omega" <omega@example.com>', "omega@example.com"),
        ("MAILTO:Tom@Example.org", "tom@example.org"),
        ("mailto:tom@example.org?subject=hi", "tom@example.org"),
        ("not an address", ""),
        ("", ""),
    ],
)
def test_normalise_email(raw, expected):
    assert normalise_email(raw) == expected


def test_email_domain():
    assert email_domain("a@b.example") == "b.example"
    assert is_webmail("gmail.com") and not is_webmail("quillon.example")
    assert is_webmail("corp.example", {"corp.example"})


@pytest.mark.parametrize(
    "raw, region, expected",
    [
        # UK drama numbers (Ofcom's reserved 07700 900xxx range) in several spellings.
        ("+44 7700 900123", None, "+447700900123"),
        ("+44 (0)7700-900-123", None, "+447700900123"),
        ("07700 900123", "GB", "+447700900123"),
        ("0044 7700 900123", None, "+447700900123"),
        ("tel:+44-7700-900123", None, "+447700900123"),
        ("07700 900123", None, ""),  # no country: cannot be placed
        ("12", None, ""),
    ],
)
def test_normalise_phone(raw, region, expected):
    assert normalise_phone(raw, region) == expected


@pytest.mark.parametrize(
    "raw, expected",
    [
        ("Lind, Ana", "ana lind"),
        ("Dr. Ána Lind", "ana lind"),
        ("ANA  LIND PhD", "ana lind"),
        ("Søren Dahl", "soren dahl"),
        ("Zoë O'Brien-Marsh", "zoe o brien marsh"),
        ("Đức Phạm", "duc pham"),
    ],
)
def test_normalise_name(raw, expected):
    assert normalise_name(raw) == expected


def test_name_key_ignores_order():
    assert name_key("Lind Ana") == name_key("Ana Lind")


@pytest.mark.parametrize(
    "raw, expected",
    [
        ("The Quillon Labs, Inc.", "quillon labs"),
        ("QUILLON LABS LTD", "quillon labs"),
        ("Velvane Robotics GmbH", "velvane robotics"),
        ("Corrimont S.A.", "corrimont"),
        ("Harrow & Sons LLC", "harrow and sons"),
        ("Inc", "inc"),  # a lone legal word is kept: better than nothing
    ],
)
def test_normalise_org(raw, expected):
    assert normalise_org(raw) == expected


def test_org_aliases():
    assert normalise_org("QL", (("ql", "quillon labs"),)) == "quillon labs"


def test_fold_text():
    assert fold_text("  Ærø Straße ") == "aero strasse"
