"""What an e-mail address stands for: a person, or a list, relay, archive copy, role or machine.

Pure functions over one address or one display name; the mail importer uses
them on each message and :mod:`mynet.people.correspondence` over the whole workspace.
Every list of words here is a rule of thumb (common practice of mail servers,
list managers and build services) except where an RFC is named.
"""

from __future__ import annotations

import re
from functools import lru_cache

__all__ = [
    "machine_kind",
    "desk_name",
    "list_local",
    "reverse_relay",
    "archive_parts",
    "via_name",
    "looks_like_hash",
    "KIND_WORDS",
]

# RFC 2142 sections 3-5 name mailboxes for business roles (INFO, MARKETING, SALES, SUPPORT), network
# operations (ABUSE, NOC, SECURITY) and services (POSTMASTER, HOSTMASTER, USENET, NEWS, WEBMASTER, WWW,
# UUCP, FTP). The rest are shared desks in common use (a rule of thumb, kept short on purpose).
_ROLES = frozenset(
    """info marketing sales support abuse noc security postmaster hostmaster usenet webmaster www uucp ftp
    admin administrator office hello contact contacts team help helpdesk billing accounts jobs careers hr
    press enquiries inquiries feedback service services orders reception frontdesk desk staff all
    everyone bookings booking reservations appointments scheduling programme program events""".split()
)
# Last words of a display name that name a desk or a group, not a person ("Talentmoor bookings",
# "Forum programme team"): a rule of thumb.
_DESK_WORDS = frozenset(
    """team desk office bookings booking reservations support helpdesk service services admin administration
    notifications committee group list members staff secretariat reception programme program organisers
    organizers newsletter""".split()
)
# Machines that send mail and never read replies: mail-system daemons (RFC 5321 section 4.5.1 names
# postmaster; MAILER-DAEMON is the common sender of bounces), no-reply senders, notification robots.
_MAIL_SYSTEM = frozenset("mailer-daemon mailerdaemon daemon bounce bounces nobody devnull root".split())
_NOREPLY = re.compile(r"^(?:no[-_.]?reply|do[-_.]?not[-_.]?reply|dont[-_.]?reply|noreply[-_.].*|.*[-_.]no[-_.]?reply)$")
_NOTIFY = frozenset(
    """notifications notification notify notifier alerts alert updates update news newsletter newsletters
    digest announce announcements announcement mailer automailer auto automated reminders reminder""".split()
)
# Build and review robots (the common names of build services and of their accounts).
_BOTS = frozenset(
    """jenkins buildbot build builds builder autobuilder ci cibot bot bots robot robots gerrit zuul testbot
    buildfarm syzbot""".split()
)
_BOT_SUFFIX = re.compile(r"(?:^|[-_.])(?:bot|robot|ci|builds?|buildbot)$|robot$")
_BOT_HOST = re.compile(r"^(?:ci|jenkins|build|builds|buildbot|bots?|robots?)\.")
_CALENDAR = re.compile(r"^(?:calendar|calendar[-_.].*|.*[-_.]calendar|ical|events?)$")
_CALENDAR_HOST = re.compile(r"(?:^|\.)(?:calendar|calendars)\.")

#: Plain words for each kind of address that is not a person.
KIND_WORDS = {
    "list": "a mailing-list address",
    "relay": "a relay that forwards mail under its own address",
    "archive": "an archive copy of a person's address",
    "role": "a shared role address",
    "shared": "an address used under several people's names",
    "machine": "an automated sender (mail system or no-reply)",
    "bot": "a build or review robot",
    "feed": "a calendar feed or notification sender",
    "room": "a meeting room",
    "resource": "a calendar resource",
}

# RFC 2142 section 6: a list LIST@DOMAIN has the administrative address LIST-REQUEST@DOMAIN; list
# managers add -owner, owner-, -bounces, -admin and the ezmlm actions (-help, -subscribe, ...); a local
# part ending in "-list" or "-announce" names a list by common practice.
_LIST_LOCAL = re.compile(
    r"^owner-.+|.+-(?:request|owner|bounces?|admin|help|subscribe|unsubscribe|join|leave|return(?:-.*)?|confirm.*"
    r"|list|announce)$"
)


def _split(address: str) -> tuple[str, str]:
    local, _, domain = address.rpartition("@")
    return local.lower(), domain.lower()


def list_local(address: str) -> bool:
    """Whether the local part is a list manager's own address (``dev-request@``, ``owner-dev@``, ...).

    RFC 2142 section 6 makes ``LIST-REQUEST`` the administrative address of a
    list; the other suffixes are the common practice of list managers.
    """
    local, _ = _split(address)
    return bool(_LIST_LOCAL.match(local.split("+", 1)[0]))


def desk_name(display: str) -> bool:
    """Whether a display name names a desk, team or group rather than a person (by its last word)."""
    words = re.findall(r"[^\W\d_]+", (display or "").casefold())
    return bool(words) and words[-1] in _DESK_WORDS


@lru_cache(maxsize=65536)
def machine_kind(address: str) -> str:
    """The kind of a role or machine address from its form alone, or ``""`` for what may be a person.

    Returns one of ``"list"`` (a list manager's address, see :func:`list_local`),
    ``"machine"`` (mail system, no-reply), ``"bot"`` (build and review robots),
    ``"feed"`` (notifications, calendar feeds) or ``"role"`` (RFC 2142 role
    mailboxes and shared desks such as ``office@``).
    """
    local, domain = _split(address)
    if not local:
        return ""
    base = local.split("+", 1)[0]
    if list_local(address):
        return "list"
    if base in _MAIL_SYSTEM or _NOREPLY.match(base):
        return "machine"
    if base in _BOTS or _BOT_SUFFIX.search(base) or _BOT_HOST.match(domain):
        return "bot"
    if base in _NOTIFY or _CALENDAR.match(base) or _CALENDAR_HOST.search(domain):
        return "feed"
    if base in _ROLES:
        return "role"
    return ""


_RELAYED = re.compile(r"^([^=@+]+)=([a-z0-9](?:[a-z0-9-]*[a-z0-9])?(?:\.[a-z0-9](?:[a-z0-9-]*[a-z0-9])?)+)$")


_LIST_ACTION = re.compile(
    r"-(?:subscribe|unsubscribe|help|return|bounces?|request|owner|confirm|uc|sc|tc|digest)(?:-|$)")


def reverse_relay(address: str) -> str:
    """The original address behind a relay's ``user=domain@relay`` form, or ``""``.

    List relays that must not send under another domain's name (common
    practice since DMARC) rewrite ``ana@quillon.example`` as
    ``ana=quillon.example@relay.example``. Sender-rewriting (``SRS0=...``) and
    bounce addresses (``dev-bounces+...``) are not authors and give ``""``.
    """
    local, _ = _split(address)
    if not local or local.startswith(("srs0=", "srs1=", "btv1=", "prvs=")):
        return ""
    m = _RELAYED.match(local)
    if not m or list_local(m.group(1) + "@x") or _LIST_ACTION.search(m.group(1)):
        return ""
    user, domain = m.groups()
    if not re.search(r"\.[a-z]{2,}$", domain):
        return ""
    return f"{user}@{domain}"


_HASH = re.compile(r"^[A-Za-z0-9_]{6,}$")


def looks_like_hash(token: str) -> bool:
    """Whether a local-part suffix looks machine-made (a hash or counter), not a word of a name.

    At least six letters, digits or underscores, with a digit among letters, or
    mixed case (base64), or eight or more hexadecimal digits.
    """
    if not _HASH.match(token):
        return False
    has_digit = any(ch.isdigit() for ch in token)
    has_alpha = any(ch.isalpha() for ch in token)
    mixed = token != token.lower() and token != token.upper()
    hexish = len(token) >= 8 and all(ch in "0123456789abcdefABCDEF" for ch in token)
    return (has_digit and has_alpha) or mixed or hexish


_TOKEN = re.compile(r"^[a-z0-9_]{6,}$")


def _machine_made(token: str) -> bool:
    """A lower-case token that is no word of a name: it has a digit, or (eight letters or more) few vowels."""
    if any(ch.isdigit() for ch in token):
        return True
    vowels = sum(ch in "aeiouy" for ch in token)
    return len(token) >= 8 and vowels / len(token) < 0.3


def archive_parts(address: str, original_local: str | None = None) -> tuple[str, str] | None:
    """Split an archive-rewritten local part into (prefix, added token), or None.

    Public list archives hide addresses by adding a hash or counter to the
    local part (``ana.lind-Xk3pQ9@archive.example``). With ``original_local``
    the prefix must be exactly that local part, followed by ``-``, ``+``,
    ``=``, ``_`` or ``.`` and a machine-made token of six or more letters and
    digits (one with a digit, or of eight letters or more with few vowels: no
    word of a name); a person's address seen elsewhere under the same name
    says what the token hides. Without it, the last of those separators before a hash-like token
    (:func:`looks_like_hash`) splits the address.
    """
    local = address.rpartition("@")[0]
    if not local:
        return None
    if original_local is not None:
        ol, low = original_local.lower(), local.lower()
        if low.startswith(ol) and len(low) > len(ol) + 1 and low[len(ol)] in "-+=_.":
            token = low[len(ol) + 1:]
            return (ol, token) if _TOKEN.match(token) and _machine_made(token) else None
        return None
    for sep in "-+=_":
        if sep in local:
            prefix, token = local.rsplit(sep, 1)
            if prefix and looks_like_hash(token):
                return prefix.lower(), token
    return None


_VIA = re.compile(r"^\s*['\"]?(?P<name>.+?)['\"]?\s+via\s+(?P<relay>.+?)\s*$", re.IGNORECASE)


def via_name(display: str) -> tuple[str, str] | None:
    """``("Ana Lind", "Dev")`` for a relay's display name ``"Ana Lind via Dev"``, else None.

    List relays that rewrite From (common practice since DMARC) keep the
    author's name in front of " via " and the list's name after it.
    """
    m = _VIA.match(display or "")
    if not m:
        return None
    name = m.group("name").strip().strip("'\"").strip()
    if not name or "@" in name:
        return None
    return name, m.group("relay").strip()
