"""Plain data shared by every layer: records, contacts, evidence, ties, interactions.

Only dataclasses and (de)serialisation live here; no I/O and no logic beyond
what a value needs to describe itself.
"""

from __future__ import annotations

import re
from dataclasses import asdict, dataclass, field, fields
from typing import Any

__all__ = [
    "Address",
    "Related",
    "Record",
    "Skipped",
    "ParseResult",
    "Contact",
    "Interaction",
    "Evidence",
    "Tie",
    "SORTS",
]

#: How a list of contacts can be ordered (``Workspace.contacts(sort=...)``, ``mynet contacts --sort``).
SORTS = ("id", "name", "warmth", "last")


_ADDRESS_ONLY = re.compile(r"^<?(?:mailto:)?[^\s@<>]+@[^\s@<>]+\.[^\s@<>]+>?$", re.IGNORECASE)


@dataclass
class Address:
    """A postal address, reduced to the parts the network uses."""

    street: str = ""
    locality: str = ""
    region: str = ""
    postcode: str = ""
    country: str = ""
    types: list[str] = field(default_factory=list)

    def is_empty(self) -> bool:
        return not any((self.street, self.locality, self.region, self.postcode, self.country))


@dataclass
class Related:
    """A relation named on a card (vCard 4.0 RELATED, vendor relation fields)."""

    value: str
    types: list[str] = field(default_factory=list)


@dataclass
class Record:
    """One raw entry of a source (a card, a row), with where it came from.

    Importers fill the text fields exactly as the file says (decoded, unescaped),
    without normalising: normalisation belongs to :mod:`mynet.people.identity`.

    Attributes
    ----------
    kind : str
        ``"vcard"`` or ``"csv"`` (later ``"ics"``, ``"mbox"``).
    source : str
        Path of the file as given to the importer.
    index : int
        0-based position of the record in its file (card number, data row number).
    line : int
        1-based physical line of the file where the record starts.
    orgs : list of str
        Organisation names, one per ORG property or company column. Units of a
        vCard ORG are kept apart in ``org_units`` (same length as ``orgs``).
    """

    kind: str
    source: str
    index: int
    line: int
    uid: str = ""
    full_name: str = ""
    given: str = ""
    family: str = ""
    additional: str = ""
    prefix: str = ""
    suffix: str = ""
    nicknames: list[str] = field(default_factory=list)
    emails: list[str] = field(default_factory=list)
    phones: list[str] = field(default_factory=list)
    orgs: list[str] = field(default_factory=list)
    org_units: list[list[str]] = field(default_factory=list)
    titles: list[str] = field(default_factory=list)
    roles: list[str] = field(default_factory=list)
    addresses: list[Address] = field(default_factory=list)
    tags: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    urls: list[str] = field(default_factory=list)
    related: list[Related] = field(default_factory=list)
    card_kind: str = ""
    members: list[str] = field(default_factory=list)
    version: str = ""
    rev: str = ""  # vCard REV (last revision, ISO 8601) when the card has one
    warnings: list[str] = field(default_factory=list)

    def display_name(self) -> str:
        """Best human name the record offers (FN, else N parts, else e-mail).

        An FN that is only an e-mail address (some phones write the address
        there) gives way to the name parts of N when the card has them.
        """
        fn = self.full_name.strip()
        parts = [self.prefix, self.given, self.additional, self.family, self.suffix]
        joined = " ".join(p.strip() for p in parts if p and p.strip())
        if fn and not (joined and _ADDRESS_ONLY.match(fn)):
            return fn
        if joined:
            return joined
        if fn:
            return fn
        if self.nicknames:
            return self.nicknames[0]
        if self.emails:
            return self.emails[0]
        if self.orgs:
            return self.orgs[0]
        return ""

    def to_dict(self) -> dict[str, Any]:
        # Faster than dataclasses.asdict (no deep copy): the values are str or lists of str.
        d = {name: getattr(self, name) for name in _RECORD_FIELDS}
        d["addresses"] = [a.__dict__.copy() for a in self.addresses]
        d["related"] = [r.__dict__.copy() for r in self.related]
        return d

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> "Record":
        known = _RECORD_KNOWN
        kwargs = {k: v for k, v in data.items() if k in known}
        kwargs["addresses"] = [Address(**a) for a in kwargs.get("addresses", [])]
        kwargs["related"] = [Related(**r) for r in kwargs.get("related", [])]
        return cls(**kwargs)


_RECORD_FIELDS = tuple(f.name for f in fields(Record))
_RECORD_KNOWN = frozenset(_RECORD_FIELDS)


@dataclass
class Skipped:
    """A record that could not be imported, with where and why."""

    source: str
    line: int
    reason: str
    index: int | None = None

    def __str__(self) -> str:
        return f"{self.source}:{self.line}: {self.reason}"


@dataclass
class ParseResult:
    """What one importer got out of one file."""

    path: str
    kind: str
    records: list[Record] = field(default_factory=list)
    skipped: list[Skipped] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    interactions: list["Interaction"] = field(default_factory=list)


@dataclass
class Contact:
    """One real person after duplicate records are merged."""

    id: int
    name: str
    emails: list[str] = field(default_factory=list)
    phones: list[str] = field(default_factory=list)
    orgs: list[str] = field(default_factory=list)
    past_orgs: list[str] = field(default_factory=list)
    org_units: list[list[str]] = field(default_factory=list)  # [organisation, unit] pairs (a vCard ORG's department)
    titles: list[str] = field(default_factory=list)
    tags: list[str] = field(default_factory=list)
    localities: list[str] = field(default_factory=list)
    nicknames: list[str] = field(default_factory=list)
    urls: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    sources: list[str] = field(default_factory=list)
    record_ids: list[int] = field(default_factory=list)
    found_in: list[str] = field(default_factory=list)  # "mail", "calendar": found there, in no address book
    address_from: dict[str, str] = field(default_factory=dict)  # e-mail -> where mynet got it, in plain words

    def to_dict(self) -> dict[str, Any]:
        return dict(self.__dict__)

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> "Contact":
        known = _CONTACT_KNOWN  # (dataclasses.fields on every call took half the time of loading 10,000 contacts)
        return cls(**{k: v for k, v in data.items() if k in known})


_CONTACT_KNOWN = frozenset(f.name for f in fields(Contact))


@dataclass
class Interaction:
    """A dated event (meeting, message) with its participants' addresses.

    ``participants`` are normalised e-mail addresses (lower case), ``names``
    maps an address to the display name the file gave it.

    Mail only: ``sender`` is the author (after undoing a list relay's
    rewriting), ``in_reply_to`` the Message-ID of the message answered
    (RFC 5322 section 3.6.4), ``list_id`` the list it went through (RFC 2919
    List-Id, else the RFC 2369 List-Post address), ``mass`` says the message
    went out through a list or bulk mailer (list fields, Precedence), so that a
    thread nobody answered is bulk. ``recipients`` counts the distinct To and
    Cc addresses even when ``participants`` was cut short. ``not_people``
    holds addresses in the headers (or a calendar's rooms) that are lists,
    relays, robots or resources rather than people: address -> kind (see
    :data:`mynet.sources.mailaddr.KIND_WORDS`).
    """

    kind: str  # "meeting" or "message"
    source: str
    index: int
    line: int
    when: str  # ISO 8601 date-time (UTC) or date
    key: str = ""  # event UID + occurrence, or Message-ID
    thread: str = ""  # thread root Message-ID for messages
    title: str = ""
    organizer: str = ""
    sender: str = ""
    participants: list[str] = field(default_factory=list)
    names: dict[str, str] = field(default_factory=dict)
    bulk: bool = False
    in_reply_to: str = ""
    list_id: str = ""
    mass: bool = False
    recipients: int = 0
    not_people: dict[str, str] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        # Faster than dataclasses.asdict (no deep copy): values are str, bool, int, lists and dicts of str.
        d = {name: getattr(self, name) for name in _INTERACTION_FIELDS}
        d["participants"] = list(self.participants)
        d["names"] = dict(self.names)
        d["not_people"] = dict(self.not_people)
        return d

    @classmethod
    def from_dict(cls, data: dict[str, Any]) -> "Interaction":
        known = _INTERACTION_KNOWN
        return cls(**{k: v for k, v in data.items() if k in known})


_INTERACTION_FIELDS = tuple(f.name for f in fields(Interaction))
_INTERACTION_KNOWN = frozenset(_INTERACTION_FIELDS)


@dataclass
class Evidence:
    """One reason to believe two contacts know each other, with its provenance."""

    a: int
    b: int
    kind: str
    detail: str
    count: int = 1
    weight: float = 0.0
    date: str | None = None
    provenance: list[str] = field(default_factory=list)

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


@dataclass
class Tie:
    """The link between two contacts, aggregated from its evidence."""

    a: int
    b: int
    strength: float
    evidence: list[Evidence] = field(default_factory=list)
    manual: bool = False
