"""Normalisation of the values people are matched on: e-mails, phones, names, organisations.

Each function is pure and cheap; :mod:`mynet.people.identity` uses them to merge
records, :mod:`mynet.evidence.ties` to compare organisations and domains.
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache

__all__ = [
    "normalise_email",
    "email_domain",
    "normalise_phone",
    "normalise_name",
    "name_key",
    "normalise_org",
    "fold_text",
    "WEBMAIL_DOMAINS",
    "LEGAL_SUFFIXES",
    "is_webmail",
    "PLACEHOLDER_ORGS",
    "GENERIC_TAGS",
    "is_real_org",
]

_EMAIL_RE = re.compile(r"^[^@\s<>]+@[^@\s<>]+\.[^@\s<>]+$")


def normalise_email(text: str) -> str:
    """Lower-cased bare address, or ``""`` when ``text`` holds no address.

    Strips ``mailto:``, angle brackets and a display name (``"Ana" <ana@x.org>``).
    The local part is lower-cased too: strictly it is case-sensitive (RFC 5321
    §2.4), but in practice no provider distinguishes case (common practice).
    """
    if not text:
        return ""
    t = text.strip()
    if "<" in t and ">" in t:
        t = t[t.rfind("<") + 1 : t.rfind(">")]
    t = t.strip().strip("<>\"' ")
    if t.lower().startswith("mailto:"):
        t = t[7:]
    t = t.split("?", 1)[0].strip().lower()
    return t if _EMAIL_RE.match(t) else ""


def email_domain(email: str) -> str:
    """The domain part of a normalised address."""
    return email.rsplit("@", 1)[1] if "@" in email else ""


# Public webmail and ISP domains that say nothing about an employer. A rule of
# thumb with no single source: the best-known free providers, kept short on
# purpose; users extend it with the setting "webmail_domains".
WEBMAIL_DOMAINS = frozenset(
    """gmail.com googlemail.com yahoo.com yahoo.co.uk yahoo.fr ymail.com hotmail.com hotmail.co.uk hotmail.fr
    outlook.com live.com msn.com aol.com icloud.com me.com mac.com proton.me protonmail.com pm.me gmx.de gmx.net
    gmx.com web.de mail.com mail.ru yandex.ru yandex.com zoho.com fastmail.com tutanota.com hey.com qq.com 163.com
    126.com naver.com orange.fr free.fr laposte.net t-online.de libero.it btinternet.com comcast.net verizon.net
    mailbox.org posteo.de seznam.cz wp.pl o2.pl interia.pl""".split()
)


def is_webmail(domain: str, extra: frozenset[str] | set[str] = frozenset()) -> bool:
    """Whether ``domain`` is a public mail provider (so it says nothing about an employer)."""
    return domain in WEBMAIL_DOMAINS or domain in extra


@lru_cache(maxsize=65536)
def normalise_phone(text: str, region: str | None = None) -> str:
    """E.164 form of a phone number (``+447700900123``), or ``""`` if it cannot be had.

    Numbers written without a country code need ``region`` (an ISO 3166 code such
    as ``"GB"``); without it they cannot be placed and ``""`` is returned.
    Uses the phonenumbers library (a port of libphonenumber's metadata).
    """
    import phonenumbers

    if not text:
        return ""
    t = text.strip()
    if t.lower().startswith("tel:"):
        t = t[4:]
    t = t.split(";", 1)[0]
    # "+44 (0)7700 900123": the trunk prefix in brackets is not dialled from abroad.
    t = re.sub(r"\(0\)", "", t)
    if sum(ch.isdigit() for ch in t) < 5:
        return ""
    if t.startswith("00"):
        t = "+" + t[2:]
    try:
        num = phonenumbers.parse(t, (region or "").upper() or None)
    except phonenumbers.NumberParseException:
        return ""
    if not phonenumbers.is_possible_number(num):
        return ""
    return phonenumbers.format_number(num, phonenumbers.PhoneNumberFormat.E164)


def fold_text(text: str) -> str:
    """Case-folded text without accents, punctuation or extra spaces (for matching)."""
    t = unicodedata.normalize("NFKD", text.casefold())
    t = "".join(ch for ch in t if not unicodedata.combining(ch))
    t = t.replace("ß", "ss").replace("ø", "o").replace("Ø", "o").replace("ł", "l").replace("Ł", "l")
    t = t.replace("ı", "i").replace("İ", "i")
    t = t.replace("æ", "ae").replace("Æ", "ae").replace("đ", "d").replace("ð", "d").replace("þ", "th")
    t = t.casefold()
    t = re.sub(r"[^\w\s]", " ", t)
    return " ".join(t.split())


_TITLES = frozenset("mr mrs ms miss mx dr prof sir dame rev fr herr frau sr sra srta mme mlle m".split())
_SUFFIXES = frozenset("jr sr ii iii iv phd md esq mba msc bsc".split())


@lru_cache(maxsize=65536)
def normalise_name(text: str) -> str:
    """A person's name folded for comparison, in "given family" order.

    ``"Lind, Ana"`` and ``"ana lind"`` and ``"Dr. Ána Lind"`` all give ``"ana lind"``.
    """
    if not text:
        return ""
    t = text.strip()
    if t.count(",") == 1:
        last, first = t.split(",")
        if first.strip() and last.strip() and len(last.split()) <= 3:
            t = f"{first} {last}"
    tokens = fold_text(t).split()
    while tokens and tokens[0] in _TITLES:
        tokens = tokens[1:]
    while tokens and tokens[-1] in _SUFFIXES:
        tokens = tokens[:-1]
    return " ".join(tokens)


def name_key(text: str) -> str:
    """Order-free key of a name (sorted tokens), so "Lind Ana" meets "Ana Lind"."""
    return " ".join(sorted(normalise_name(text).split()))


# Legal-form words dropped from organisation names. Common practice, not a
# standard; the list covers frequent English, German, French, Nordic, Dutch,
# Spanish and Italian forms.
LEGAL_SUFFIXES = frozenset(
    """inc incorporated ltd limited llc llp lp plc corp corporation co company gmbh ag kg ug sa sas sarl sàrl srl
    spa bv nv ab as asa oy oyj aps kk pty pvt sl sociedad limitada cie cia""".split()
)


@lru_cache(maxsize=65536)
def normalise_org(text: str, aliases: tuple[tuple[str, str], ...] = ()) -> str:
    """An organisation name folded for comparison.

    Case, accents, punctuation, "The" and legal forms (Inc, Ltd, GmbH, S.A.,
    LLC, ...) are dropped: ``"The Quillon Labs, Inc."`` gives ``"quillon labs"``.
    ``aliases`` maps folded alias names to folded canonical ones (the user's table).
    """
    if not text:
        return ""
    t = text.replace("&", " and ")
    # Dotted abbreviations such as S.A. or B.V. fold to "sa", "bv".
    t = re.sub(r"\b([A-Za-z])\.(?=[A-Za-z]\.)", r"\1", t)
    t = re.sub(r"\b([A-Za-z])\.([A-Za-z])\.", r"\1\2", t)
    tokens = fold_text(t).split()
    if tokens and tokens[0] == "the":
        tokens = tokens[1:]
    while len(tokens) > 1 and tokens[-1] in LEGAL_SUFFIXES:
        tokens = tokens[:-1]
    folded = " ".join(tokens)
    if aliases:
        table = dict(aliases)
        folded = table.get(folded, folded)
    return folded


# Values people type in an employer field that are not an organisation. Common
# practice (no standard list): sharing one of these says nothing about knowing
# each other.
PLACEHOLDER_ORGS = frozenset(
    {"retired", "self employed", "selfemployed", "self", "freelance", "freelancer", "none", "n a", "na", "student",
     "unemployed", "independent", "private", "home", "various", "unknown", "tbd", "contractor", "homemaker",
     "between jobs"}
)

# Address-book labels that almost everyone carries; sharing one is no evidence.
# Common practice, not a standard list. Rankings of your own ("VIP", "Favourites") are
# workflow labels: see mynet.evidence.labels.
GENERIC_TAGS = frozenset(
    {"work", "business", "personal", "other", "mycontacts", "my contacts", "imported", "contacts",
     "all contacts", "misc", "general"}
)


def is_real_org(folded: str) -> bool:
    """Whether a folded organisation name names an organisation (not "Retired", "Freelance", ...)."""
    return bool(folded) and folded not in PLACEHOLDER_ORGS
