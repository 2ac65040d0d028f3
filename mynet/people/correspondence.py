"""What your mail and calendars say about people, over every mailbox and calendar at once.

The importers read one message at a time; what an address *is* and whether a
list thread is a discussion only shows across all of them. Four plain steps:

1. :func:`address_facts` decides which addresses are not people (lists,
   relays, robots, rooms, shared aliases) and which are another form of a
   person's address (an archive copy, a relay's ``user=domain@relay`` form).
2. :func:`clean` rewrites the interactions with those facts: aliases become
   the person's address, addresses that are not people leave the meetings and
   messages, a list message counts among the people who wrote in its thread
   (not everyone subscribed), threads are joined through In-Reply-To and
   References, and mass mail nobody answered (newsletters, announcements) is
   bulk. Ties, warmth and explanations all read these cleaned interactions.
3. :func:`thread_members` gives each thread's members for the tie step.
4. :func:`correspondents` finds the people you corresponded with: mail both
   ways, a thread in which both of you wrote, or two or more small meetings.
   They become contacts, marked as found in mail or calendar.

Every rule here is common practice of mail and list software, or a judgement
call said as such; the header rules the facts start from cite their RFCs in
:mod:`mynet.sources.mail_headers`.
"""

from __future__ import annotations

import json
from collections import Counter, defaultdict
from dataclasses import dataclass, field, replace
from typing import Iterable, Mapping

from ..model import Interaction
from ..sources.mailaddr import KIND_WORDS, archive_parts, desk_name, machine_kind, reverse_relay
from .normalise import email_domain, fold_text, name_key

__all__ = [
    "MailFacts",
    "address_facts",
    "clean",
    "thread_members",
    "correspondents",
    "Found",
    "SMALL_MEETING",
    "NOT_PEOPLE_KINDS",
]

#: Meetings with at most this many people are small enough to say you know each one (a judgement call).
SMALL_MEETING = 10
#: Kinds of address that stand for no person (see :data:`mynet.sources.mailaddr.KIND_WORDS`).
NOT_PEOPLE_KINDS = frozenset(KIND_WORDS) - {"archive"}


@dataclass
class MailFacts:
    """Addresses that are not people, and addresses that are another form of a person's address."""

    kinds: dict[str, str] = field(default_factory=dict)  # address -> kind (list, relay, role, shared, ...)
    reasons: dict[str, str] = field(default_factory=dict)  # address -> plain words: why
    aliases: dict[str, str] = field(default_factory=dict)  # archive or relay form -> the person's address
    archive_domains: list[str] = field(default_factory=list)  # relay/archive domains (set or detected)

    def to_json(self) -> str:
        return json.dumps(self.__dict__, sort_keys=True)

    @classmethod
    def from_json(cls, text: str | None) -> "MailFacts":
        if not text:
            return cls()
        raw = json.loads(text)
        return cls(**{k: raw.get(k, v) for k, v in cls().__dict__.items()})

    def is_person(self, address: str) -> bool:
        return address not in self.kinds


def _words(name: str) -> set[str]:
    return set(fold_text(name).split())


def _different_people(names: Iterable[str]) -> tuple[str, str] | None:
    """Two full names (two words or more) that share no word: two people, not one person's spellings."""
    full = sorted({n for n in names if len(_words(n)) >= 2}, key=lambda n: (fold_text(n), n))
    for i, a in enumerate(full):
        wa = _words(a)
        for b in full[i + 1:]:
            if not wa & _words(b):
                return a, b
    return None


def address_facts(
    interactions: Iterable[Interaction],
    record_names: Mapping[str, Iterable[str]] = {},
    me_emails: Iterable[str] = (),
    relay_domains: Iterable[str] = (),
) -> MailFacts:
    """Decide which addresses in meetings and mail are not people, and which are another form of one.

    Parameters
    ----------
    interactions : iterable of Interaction
        Every meeting and message of the workspace, as imported.
    record_names : mapping
        Address -> names of the cards and rows that hold it (your address
        book says whose an address is: such an address is never a shared alias).
    me_emails : iterable of str
        Your own addresses (never taken for anything but you).
    relay_domains : iterable of str
        Domains that relay or archive other people's mail (the setting
        ``mail_relay_domains``): an address there is never a person of its own.

    Returns
    -------
    MailFacts
        ``kinds`` for addresses that are not people (from the headers the
        importer read, the form of the address, a relay domain, or use under
        the names of two different people); ``aliases`` for archive copies
        (``ana.lind-Xk3pQ9@archive.example`` with the display name of
        ``ana.lind@quillon.example``: same name, the local part plus a
        machine-made token) and relay forms (``ana=quillon.example@relay``);
        ``archive_domains`` where such copies live.
    """
    me = set(me_emails)
    relays = {d.lower().lstrip("@") for d in relay_domains}
    facts = MailFacts()
    author_names: dict[str, set[str]] = defaultdict(set)
    any_names: dict[str, set[str]] = defaultdict(set)
    seen: set[str] = set()
    for it in interactions:
        for addr, kind in (it.not_people or {}).items():
            if addr not in me and addr not in facts.kinds:
                facts.kinds[addr] = kind
                facts.reasons[addr] = _why_header(kind, it)
        seen.update(it.participants)
        if it.sender:
            seen.add(it.sender)
        for addr, name in (it.names or {}).items():
            any_names[addr].add(name)
            if addr == it.sender or (it.kind == "meeting" and addr == it.organizer):
                author_names[addr].add(name)
    for addr, names in record_names.items():
        seen.add(addr)
        any_names[addr].update(n for n in names if n and "@" not in n)
    # Another form of a person's address: a relay's user=domain form, or an archive copy (the address of
    # someone seen elsewhere under the same full name, with a token added to its local part).
    by_name: dict[str, set[str]] = defaultdict(set)
    for addr in seen:
        for name in any_names.get(addr, ()):
            key = name_key(name)
            if len(key.split()) >= 2:
                by_name[key].add(addr)
    archive_hits: Counter[str] = Counter()
    for addr in sorted(seen):
        domain = email_domain(addr)
        original = reverse_relay(addr) if domain in relays else ""
        if original and original != addr:
            facts.aliases[addr] = original
            continue
        targets = set()
        for name in any_names.get(addr, ()):
            key = name_key(name)
            if len(key.split()) < 2:
                continue
            for other in by_name.get(key, ()):
                if email_domain(other) != domain and archive_parts(addr, other.rpartition("@")[0]):
                    targets.add(other)
        if len(targets) == 1:
            facts.aliases[addr] = targets.pop()
            archive_hits[domain] += 1
    facts.archive_domains = sorted(relays | {d for d, n in archive_hits.items() if n >= 2})
    for addr in sorted(seen - me):
        if addr in facts.kinds or addr in facts.aliases:
            continue
        kind = machine_kind(addr)
        if kind:
            facts.kinds[addr] = kind
            facts.reasons[addr] = f"{KIND_WORDS[kind]} (by its form: {addr.rpartition('@')[0]}@)"
            continue
        if email_domain(addr) in relays:
            facts.kinds[addr] = "relay"
            facts.reasons[addr] = f"on {email_domain(addr)}, a relay or archive domain you listed (mail_relay_domains)"
            continue
        if addr in record_names:
            continue  # your address book says whose it is
        names = any_names.get(addr, set())
        if names and all(desk_name(n) for n in names):
            facts.kinds[addr] = "role"
            facts.reasons[addr] = f"named like a desk or a team ({sorted(names)[0]!r})"
            continue
        pair = _different_people(author_names.get(addr, ())) or _different_people(any_names.get(addr, ()))
        if pair:
            facts.kinds[addr] = "shared"
            facts.reasons[addr] = f"used under the names of different people ({pair[0]!r} and {pair[1]!r})"
    for addr in me:
        facts.kinds.pop(addr, None)
    return facts


def _why_header(kind: str, it: Interaction) -> str:
    where = f"{it.source.rsplit('/', 1)[-1]}:{it.line}"
    if kind == "list":
        return f"a mailing-list address (list header fields of the message at {where})"
    if kind == "relay":
        return f"a relay that rewrote the author's address (message at {where})"
    if kind in ("room", "resource"):
        return f"a meeting {kind} (CUTYPE={kind.upper()} in the event at {where})"
    return f"{KIND_WORDS.get(kind, kind)} (message at {where})"


class _Threads:
    """Union-find over Message-IDs: messages linked by In-Reply-To or References are one thread."""

    def __init__(self) -> None:
        self.parent: dict[str, str] = {}

    def find(self, x: str) -> str:
        root = x
        while self.parent.get(root, root) != root:
            root = self.parent[root]
        while self.parent.get(x, x) != root:
            self.parent[x], x = root, self.parent[x]
        return root

    def union(self, a: str, b: str) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            if rb < ra:
                ra, rb = rb, ra
            self.parent[rb] = ra


def clean(interactions: Iterable[Interaction], facts: MailFacts, me_emails: Iterable[str] = ()) -> list[Interaction]:
    """The interactions as evidence sees them (copies; the stored ones are left as imported).

    * Aliases become the person's address; addresses that are not people
      leave ``participants``, ``names``, ``sender`` and ``organizer``.
    * Messages linked by In-Reply-To or References share one ``thread`` (the
      smallest Message-ID of the linked set), whatever the References say.
    * A message that went through a list (``list_id``) keeps as participants
      only its author and you if you were addressed: the thread's members are
      then the people who wrote in it, not everyone subscribed.
    * Bulk: what the importer marked, mail from an address that is not a
      person, and mass mail (list or bulk mailer) in a thread in which fewer
      than two people wrote (newsletters, announcements nobody answered).
    """
    me = set(me_emails)
    alias, drop = facts.aliases, facts.kinds
    items = list(interactions)
    threads = _Threads()
    for it in items:
        if it.kind == "message" and it.key:
            threads.union(it.key, it.thread or it.key)
            if it.in_reply_to:
                threads.union(it.key, it.in_reply_to)
    out: list[Interaction] = []
    writers: dict[str, set[str]] = defaultdict(set)
    for it in items:
        local_drop = it.not_people or {}
        def keep(a: str) -> str:
            a = alias.get(a, a)
            return "" if (a in drop or a in local_drop) and a not in me else a
        people = {keep(p) for p in it.participants} - {""}
        sender = keep(it.sender) if it.sender else ""
        organizer = keep(it.organizer) if it.organizer else ""
        names = {}
        for a, n in (it.names or {}).items():
            k = keep(a)
            if k and k not in names:
                names[k] = n
        bulk = it.bulk or bool(it.sender and not sender)
        thread = threads.find(it.key) if it.kind == "message" and it.key else it.thread
        if it.kind == "message" and it.list_id:
            people = ({sender} if sender else set()) | (people & me)
        new = replace(it, participants=sorted(people), sender=sender, organizer=organizer, names=names, bulk=bulk,
                      thread=thread)
        if it.kind == "message" and sender and not bulk:
            writers[thread].add(sender)
        out.append(new)
    for it in out:
        if it.kind == "message" and it.mass and not it.bulk and len(writers.get(it.thread, ())) < 2:
            it.bulk = True
    return out


def thread_members(interactions: Iterable[Interaction]) -> dict[str, set[str]]:
    """Thread -> everyone in its messages (cleaned interactions; bulk mail left out)."""
    members: dict[str, set[str]] = defaultdict(set)
    for it in interactions:
        if it.kind == "message" and not it.bulk:
            members[it.thread or it.key].update(it.participants)
    return members


@dataclass
class Found:
    """Someone you corresponded with, as the mail and calendars show them."""

    address: str
    name: str
    channels: list[str]  # "mail", "calendar"
    reason: str  # plain words
    source: str  # where first seen (file)
    line: int


def correspondents(
    interactions: Iterable[Interaction],
    me_emails: Iterable[str],
    *,
    allowed_sources: set[str] | None = None,
    small_meeting: int = SMALL_MEETING,
) -> dict[str, Found]:
    """The people you corresponded with, by address (cleaned interactions).

    Someone counts when you wrote to them and they wrote to you, or both of
    you wrote in one thread, or you were both in two or more meetings of at
    most ``small_meeting`` people. Someone who only ever wrote to you (a
    one-way sender) does not. Only interactions whose ``source`` is in
    ``allowed_sources`` count (all when it is None).
    """
    me = set(me_emails)
    if not me:
        return {}
    to_them: Counter[str] = Counter()
    to_you: Counter[str] = Counter()
    meetings: Counter[str] = Counter()
    thread_writers: dict[str, set[str]] = defaultdict(set)
    first: dict[str, tuple[str, int]] = {}
    names: dict[str, Counter[str]] = defaultdict(Counter)
    for it in interactions:
        if it.bulk or (allowed_sources is not None and it.source not in allowed_sources):
            continue
        people = set(it.participants)
        for a, n in (it.names or {}).items():
            if a not in me and n:
                names[a][n] += 2 if a == it.sender else 1
        others = people - me
        for a in others:
            first.setdefault(a, (it.source, it.line))
        if it.kind == "meeting":
            if people & me and len(people) <= small_meeting:
                meetings.update(others)
            continue
        if it.sender:
            thread_writers[it.thread or it.key].add(it.sender)
            first.setdefault(it.sender, (it.source, it.line))
        if it.sender in me:
            to_them.update(others)
        elif it.sender and people & me:
            to_you[it.sender] += 1
    both_wrote: Counter[str] = Counter()
    for ws in thread_writers.values():
        if ws & me:
            both_wrote.update(ws - me)
    out: dict[str, Found] = {}
    for a in sorted(set(to_them) | set(both_wrote) | set(meetings)):
        reasons, channels = [], []
        if to_them[a] and to_you[a]:
            reasons.append(f"you wrote to each other ({to_them[a]} and {to_you[a]} messages)")
        if both_wrote[a]:
            reasons.append(f"both of you wrote in {both_wrote[a]} thread{'s' if both_wrote[a] != 1 else ''}")
        if reasons:
            channels.append("mail")
        if meetings[a] >= 2:
            reasons.append(f"{meetings[a]} small meetings together")
            channels.append("calendar")
        if not reasons:
            continue
        counted = names.get(a)
        name = max(counted, key=lambda n: (counted[n], len(n.split()), n)) if counted else ""
        src, line = first.get(a, ("", 0))
        out[a] = Found(a, name, channels, "; ".join(reasons), src, line)
    return out
