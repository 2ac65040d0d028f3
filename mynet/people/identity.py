"""Duplicate merging: records -> contacts, honouring the user's own decisions.

Records that share a strong key (vCard UID, normalised e-mail, E.164 phone)
are merged automatically, unless their names clearly belong to different
people; records with the same normalised name and the same organisation or
work e-mail domain are only *suggested* for merging, with a score. The user's
merge / split / "different people" decisions override both and survive
re-imports because they refer to stable record keys, not to row numbers.
"""

from __future__ import annotations

import hashlib
from collections import Counter, defaultdict
from dataclasses import dataclass, field
from typing import Iterable

import numpy as np

from ..model import Contact, Record
from .normalise import (
    email_domain,
    fold_text,
    is_webmail,
    name_key,
    normalise_email,
    normalise_name,
    normalise_org,
    normalise_phone,
)

__all__ = [
    "record_keys",
    "Me",
    "StoredRecord",
    "Decisions",
    "Resolution",
    "Suggestion",
    "resolve",
    "suggest_merges",
    "names_compatible",
    "canonical_orgs",
]


def record_keys(records: Iterable[Record], source_path: str) -> list[str]:
    """Stable keys for the records of one source.

    A key depends on the source path and on the record's identity (UID, else
    first e-mail, else first phone, else name) plus an occurrence counter, so
    re-importing an edited file keeps the keys of unchanged people and the
    decisions that refer to them.
    """
    seen: Counter[str] = Counter()
    keys = []
    for r in records:
        ident = (
            r.uid.strip()
            or next((e for e in (normalise_email(x) for x in r.emails) if e), "")
            or next((p.strip() for p in r.phones if p.strip()), "")
            or normalise_name(r.display_name())
        )
        seen[ident] += 1
        raw = f"{source_path}\x00{ident}\x00{seen[ident]}"
        keys.append(hashlib.sha1(raw.encode("utf-8")).hexdigest()[:20])
    return keys


@dataclass
class Me:
    """Who the user is: their own addresses and names (never listed as a contact)."""

    emails: set[str] = field(default_factory=set)
    names: set[str] = field(default_factory=set)
    phones: set[str] = field(default_factory=set)  # E.164, from ``mynet me --phone``

    def matches(self, emails: set[str], name: str) -> bool:
        if emails & self.emails:
            return True
        return bool(not emails and name and normalise_name(name) in self.names)


@dataclass
class StoredRecord:
    """A record as the identity step sees it: id, stable key, source facts, parsed content."""

    id: int
    key: str
    source: str
    as_of: str
    region: str
    record: Record


@dataclass
class Decisions:
    """The user's identity decisions, as pairs of record keys."""

    same: list[tuple[str, str]] = field(default_factory=list)  # merge these
    different: list[tuple[str, str]] = field(default_factory=list)  # never merge these


@dataclass
class Suggestion:
    """Two contacts that may be one person, with a score in (0, 1] and the reason."""

    a: int
    b: int
    score: float
    reason: str


@dataclass
class Resolution:
    """Contacts built from records, plus the records that are the user."""

    contacts: list[Contact]
    mapping: dict[str, int]  # record key -> contact id
    me_keys: list[str]
    next_id: int
    auto_merges: int
    held_back: list[Suggestion]
    not_people: list[str] = field(default_factory=list)  # keys of organisation, group and place cards


class _Clusters:
    """Union-find over record positions with "cannot-link" constraints."""

    def __init__(self, n: int):
        self.parent = list(range(n))
        self.members: dict[int, set[int]] = {i: {i} for i in range(n)}
        self.forbid: dict[int, set[int]] = defaultdict(set)

    def find(self, i: int) -> int:
        while self.parent[i] != i:
            self.parent[i] = self.parent[self.parent[i]]
            i = self.parent[i]
        return i

    def forbid_pair(self, i: int, j: int) -> None:
        self.forbid[self.find(i)].add(j)
        self.forbid[self.find(j)].add(i)

    def allowed(self, i: int, j: int) -> bool:
        ri, rj = self.find(i), self.find(j)
        if ri == rj:
            return True
        return not (self.forbid[ri] & self.members[rj]) and not (self.forbid[rj] & self.members[ri])

    def union(self, i: int, j: int) -> bool:
        ri, rj = self.find(i), self.find(j)
        if ri == rj:
            return False
        if len(self.members[ri]) < len(self.members[rj]):
            ri, rj = rj, ri
        self.parent[rj] = ri
        self.members[ri] |= self.members.pop(rj)
        self.forbid[ri] |= self.forbid.pop(rj, set())
        return True


#: vCard 4.0 KIND values (RFC 6350 §6.1.4) that are not a person; such cards are not contacts.
NOT_PEOPLE = frozenset({"group", "org", "organization", "organisation", "location"})


def is_not_a_person(r: Record) -> bool:
    """Whether a record stands for an organisation, group or place rather than a person.

    Either its vCard KIND says so (RFC 6350 §6.1.4), or, as address books write
    a company entry, it has no name parts and its display name is its
    organisation (common practice in phone exports).
    """
    if r.card_kind.strip().lower() in NOT_PEOPLE:
        return True
    if r.given.strip() or r.family.strip() or not r.orgs:
        return False
    return bool(r.full_name.strip()) and normalise_org(r.full_name) == normalise_org(r.orgs[0])


def _given_compatible(x: str, y: str) -> bool:
    """Two given names that may be one person's: equal, an initial, a short form, or a near spelling."""
    if x == y:
        return True
    if len(x) == 1 or len(y) == 1:
        return x[0] == y[0]
    if min(len(x), len(y)) >= 3 and (x.startswith(y) or y.startswith(x)):
        return True
    from rapidfuzz import fuzz

    return fuzz.ratio(x, y) >= 85


def names_compatible(a: str, b: str) -> bool:
    """Whether two names may belong to one person.

    Used to refuse automatic merges through a shared phone or e-mail between
    people who are clearly different (a family landline, a shared inbox):
    the given names must agree (equal, an initial, a short form such as
    "Alex"/"Alexander", or a near spelling), whatever the surnames say, since
    surnames change and family members share them. "Lind, Ana" is read as
    "Ana Lind". A missing name is compatible with anything.
    """
    na, nb = normalise_name(a).split(), normalise_name(b).split()
    if not na or not nb:
        return True
    if _given_compatible(na[0], nb[0]):
        return True
    # One side may be a single word that is the other's given name or nickname-like surname order.
    if len(na) == 1 or len(nb) == 1:
        single, other = (na, nb) if len(na) == 1 else (nb, na)
        return single[0] in other and other.index(single[0]) == 0
    from rapidfuzz import fuzz

    # Same words in another order ("Lind Ana" exported without a comma).
    return fuzz.token_sort_ratio(" ".join(na), " ".join(nb)) >= 90


def _norm_uid(uid: str) -> str:
    """UIDs compare without case and without a ``urn:uuid:`` prefix (RFC 6350 §6.7.6 allows both forms)."""
    u = uid.strip().lower()
    return u[9:] if u.startswith("urn:uuid:") else u


def record_emails(r: Record) -> list[str]:
    return [e for e in (normalise_email(x) for x in r.emails) if e]


def record_phones(r: Record, region: str) -> list[str]:
    return [p for p in (normalise_phone(x, region or None) for x in r.phones) if p]


def resolve(
    stored: list[StoredRecord],
    previous: dict[str, int],
    decisions: Decisions,
    me: Me,
    next_id: int = 1,
    default_region: str = "",
    org_aliases: dict[str, str] | None = None,
) -> Resolution:
    """Merge records into contacts.

    Parameters
    ----------
    stored : list of StoredRecord
        Every record in the workspace, in a fixed order.
    previous : dict
        Record key -> contact id from the last resolution; ids carry over so
        that names, groups and decisions keep pointing at the same people.
    decisions : Decisions
        The user's merges (``same``) and splits (``different``); these win.
    me : Me
        The user's own addresses and names: matching records become "you".
    next_id : int
        The next unused contact id (ids are never reused after a person is forgotten).
    default_region : str
        Country for phone numbers written without one, when their source has none.
    org_aliases : dict, optional
        The user's organisation aliases (alias -> canonical name).
    """
    n = len(stored)
    uf = _Clusters(n)
    pos = {s.key: i for i, s in enumerate(stored)}
    for a, b in decisions.different:
        if a in pos and b in pos:
            uf.forbid_pair(pos[a], pos[b])
    for a, b in decisions.same:
        if a in pos and b in pos and uf.allowed(pos[a], pos[b]):
            uf.union(pos[a], pos[b])

    names = [s.record.display_name() for s in stored]
    emails = [record_emails(s.record) for s in stored]
    phones = [record_phones(s.record, s.region or default_region) for s in stored]
    by_key: dict[str, list[int]] = defaultdict(list)
    for i, s in enumerate(stored):
        uid = _norm_uid(s.record.uid)
        if uid:
            by_key["uid:" + uid].append(i)
        for e in emails[i]:
            by_key["email:" + e].append(i)
        for p in phones[i]:
            by_key["tel:" + p].append(i)

    held_back: dict[tuple[int, int], str] = {}
    auto = 0
    for key in sorted(by_key):
        idx = sorted(set(by_key[key]))
        first = idx[0]
        for j in idx[1:]:
            if uf.find(first) == uf.find(j):
                continue
            if not key.startswith("uid:") and not names_compatible(names[first], names[j]):
                held_back[(first, j)] = f"share {key.split(':', 1)[1]} but the names differ"
                continue
            if uf.allowed(first, j) and uf.union(first, j):
                auto += 1

    # Records that are the user.
    clusters: dict[int, list[int]] = defaultdict(list)
    for i in range(n):
        clusters[uf.find(i)].append(i)
    me_keys: list[str] = []
    people: list[list[int]] = []
    not_people: list[str] = []
    for root in sorted(clusters, key=lambda r: min(clusters[r])):
        members = clusters[root]
        if any(me.matches(set(emails[i]), names[i]) for i in members):
            me_keys.extend(stored[i].key for i in members)
        elif all(is_not_a_person(stored[i].record) for i in members):
            not_people.extend(stored[i].key for i in members)
        else:
            people.append(members)

    # Stable ids: each cluster takes the id most of its records had, biggest clusters first.
    taken: set[int] = set()
    ids: list[int | None] = [None] * len(people)
    order = sorted(range(len(people)), key=lambda k: (-len(people[k]), min(people[k])))
    for k in order:
        votes = Counter(previous[stored[i].key] for i in people[k] if stored[i].key in previous)
        for cid, _ in sorted(votes.items(), key=lambda kv: (-kv[1], kv[0])):
            if cid not in taken:
                ids[k] = cid
                taken.add(cid)
                break
    for k in order:
        if ids[k] is None:
            while next_id in taken:
                next_id += 1
            ids[k] = next_id
            taken.add(next_id)
            next_id += 1
    next_id = max([next_id, *[i + 1 for i in taken]]) if taken else next_id

    orgmap = canonical_orgs((o for s in stored for o in s.record.orgs), org_aliases)
    contacts = []
    mapping: dict[str, int] = {}
    for k, members in enumerate(people):
        cid = int(ids[k])  # type: ignore[arg-type]
        contacts.append(_build_contact(cid, [stored[i] for i in members], emails, phones, members, orgmap))
        for i in members:
            mapping[stored[i].key] = cid
    contacts.sort(key=lambda c: c.id)

    suggestions = []
    for (i, j), reason in sorted(held_back.items()):
        ci, cj = mapping.get(stored[i].key), mapping.get(stored[j].key)
        if ci and cj and ci != cj:
            suggestions.append(Suggestion(min(ci, cj), max(ci, cj), 0.5, reason))
    return Resolution(contacts, mapping, me_keys, next_id, auto, suggestions, not_people)


def canonical_orgs(names: Iterable[str], aliases: dict[str, str] | None = None) -> dict[str, str]:
    """Map every organisation spelling to one display name per organisation.

    Spellings that fold to the same text (case, accents, punctuation, legal
    forms) are one organisation, shown with the most frequent spelling. A name
    whose words begin exactly one longer name ("Quillon" and "Quillon Labs") is
    taken as a short form of it; when two longer names start the same way
    ("Corrimont Labs", "Corrimont Bank") the short form is left alone. The
    user's aliases (folded alias -> display name) come first.

    Returns
    -------
    dict
        folded name -> display name of its organisation.
    """
    counts: Counter[str] = Counter(n.strip() for n in names if n and n.strip())
    spellings: dict[str, Counter[str]] = defaultdict(Counter)
    for name, k in counts.items():
        folded = normalise_org(name)
        if folded:
            spellings[folded][name] += k
    display = {f: max(c, key=lambda s: (c[s], not s.isupper(), -len(s), s)) for f, c in spellings.items()}
    out = dict(display)
    tokens = {f: f.split() for f in display}
    for short, st in tokens.items():
        longer = [f for f, ft in tokens.items() if len(ft) > len(st) and ft[: len(st)] == st]
        if len(longer) == 1:
            out[short] = display[longer[0]]
    for alias, target in (aliases or {}).items():
        folded_alias, folded_target = normalise_org(alias), normalise_org(target)
        out[folded_alias] = display.get(folded_target, target)
        for f, d in list(out.items()):
            if normalise_org(d) == folded_alias:
                out[f] = out[folded_alias]
    return out


def _family_first(rec, before_comma: str) -> bool:
    """Whether a name written "A, B" puts the family name first.

    A card's structured name (vCard N) decides when it gives one: only when
    the part before the comma is N's family name ("Lind, Ana" with N
    ``Lind;Ana``); "Ana Lind, MD" with N ``Lind;Ana;;;MD`` stays as written.
    Without N (a CSV row), "Lind, Ana" is read family first, as exports write it.
    """
    if not (rec.family.strip() or rec.given.strip()):
        return True
    return fold_text(before_comma) == fold_text(rec.family)


def _pick_name(stored: list[StoredRecord]) -> str:
    """The most informative display name among a contact's records.

    Prefers names with more tokens, then with accents (an export that dropped
    them carries less), then the most frequent, then the newest source.
    """
    counts: Counter[str] = Counter()
    best: dict[str, tuple] = {}
    for s in stored:
        name = s.record.display_name()
        if not name or "@" in name:
            continue
        if "," in name and name.count(",") == 1 and not s.record.full_name.strip().endswith(","):
            last, first = name.split(",")
            if first.strip() and last.strip() and _family_first(s.record, last):
                name = f"{first.strip()} {last.strip()}"
        counts[name] += 1
        non_ascii = any(ord(ch) > 127 for ch in name)
        best[name] = max(best.get(name, ()), (len(name.split()), non_ascii, s.as_of or ""))
    if not counts:
        fallback = next((s.record.display_name() for s in stored if s.record.display_name()), "")
        return fallback or "(no name)"
    return max(counts, key=lambda nm: (best[nm][0], best[nm][1], counts[nm], best[nm][2], nm))


def _unique(items: Iterable[str]) -> list[str]:
    seen: dict[str, None] = {}
    for it in items:
        it = it.strip()
        if it and it not in seen:
            seen[it] = None
    return list(seen)


def _build_contact(cid: int, stored: list[StoredRecord], emails, phones, members, orgmap: dict[str, str]) -> Contact:
    """One contact from its records: union of values, current and past organisations.

    An organisation counts as *current* when it appears on a record of the
    contact's newest dated source (vCard REV, else the source's as-of date);
    organisations seen only on older records are *past*.
    """
    def when(s: StoredRecord) -> str:
        rev = s.record.rev
        if rev:
            digits = "".join(ch for ch in rev[:10] if ch.isdigit())[:8]
            if len(digits) == 8:
                return f"{digits[:4]}-{digits[4:6]}-{digits[6:8]}"
        return (s.as_of or "")[:10]

    with_orgs = [s for s in stored if s.record.orgs]
    newest = max((when(s) for s in with_orgs), default="")
    current, past = [], []
    seen_norm: dict[str, str] = {}
    for s in sorted(with_orgs, key=when, reverse=True):
        for org in s.record.orgs:
            norm = normalise_org(org)
            name = orgmap.get(norm, org.strip())
            norm = normalise_org(name)
            if not norm or norm in seen_norm:
                continue
            seen_norm[norm] = name
            (current if when(s) == newest else past).append(name)
    email_counts: Counter[str] = Counter(e for i in members for e in emails[i])
    phone_list = _unique(p for i in members for p in phones[i])
    raw_phones = _unique(
        p for s, i in zip(stored, members) if not phones[i] for p in s.record.phones
    )
    localities = _unique(
        a.locality for s in stored for a in s.record.addresses if a.locality
    )
    return Contact(
        id=cid,
        name=_pick_name(stored),
        emails=sorted(email_counts, key=lambda e: (-email_counts[e], e)),
        phones=phone_list + [p for p in raw_phones if p not in phone_list],
        orgs=current,
        past_orgs=past,
        org_units=_org_units(stored, orgmap),
        titles=_unique(t for s in stored for t in s.record.titles),
        tags=_unique(t for s in stored for t in s.record.tags),
        localities=localities,
        nicknames=_unique(nk for s in stored for nk in s.record.nicknames),
        urls=_unique(u for s in stored for u in s.record.urls),
        notes=_unique(nt for s in stored for nt in s.record.notes),
        sources=_unique(s.source for s in stored),
        record_ids=sorted(s.id for s in stored if s.id > 0),  # people found in mail have no record of a file
    )


def _org_units(stored: list[StoredRecord], orgmap: dict[str, str]) -> list[list[str]]:
    """[organisation, unit] for every department a record names (the first unit of a vCard ORG)."""
    out: list[list[str]] = []
    seen: set[tuple[str, str]] = set()
    for s in stored:
        for org, units in zip(s.record.orgs, s.record.org_units):
            unit = next((u.strip() for u in units if u.strip()), "")
            if not unit:
                continue
            name = orgmap.get(normalise_org(org), org.strip())
            key = (normalise_org(name), fold_text(unit))
            if key[0] and key not in seen:
                seen.add(key)
                out.append([name, unit])
    return out


def suggest_merges(
    contacts: list[Contact],
    rejected: set[tuple[int, int]] = frozenset(),  # type: ignore[assignment]
    extra_webmail: frozenset[str] = frozenset(),
    held_back: list[Suggestion] = (),  # type: ignore[assignment]
) -> list[Suggestion]:
    """Pairs of contacts that are probably one person; never merged without the user.

    Scores (a documented heuristic, not a published model): same normalised
    name and same organisation 0.9; same name and same work e-mail domain 0.8;
    near-identical name (token-set similarity >= 90) and same organisation
    0.7; the same full name (two words or more) under different addresses,
    unless both name an organisation and none is shared, 0.6; shared e-mail
    or phone with differing names 0.5.
    """
    from rapidfuzz import fuzz

    out: dict[tuple[int, int], Suggestion] = {}

    def add(a: int, b: int, score: float, reason: str) -> None:
        pair = (min(a, b), max(a, b))
        if pair in rejected or a == b:
            return
        if pair not in out or out[pair].score < score:
            out[pair] = Suggestion(pair[0], pair[1], score, reason)

    by_name: dict[str, list[Contact]] = defaultdict(list)
    by_org: dict[str, list[Contact]] = defaultdict(list)
    for c in contacts:
        nk = name_key(c.name)
        if nk:
            by_name[nk].append(c)
        for org in {normalise_org(o) for o in c.orgs + c.past_orgs} - {""}:
            by_org[org].append(c)
    shown = {normalise_org(o): o for c in contacts for o in c.orgs + c.past_orgs}
    for group in by_name.values():
        for i, a in enumerate(group):
            for b in group[i + 1 :]:
                orgs_a = {normalise_org(o) for o in a.orgs + a.past_orgs} - {""}
                orgs_b = {normalise_org(o) for o in b.orgs + b.past_orgs} - {""}
                dom_a = {email_domain(e) for e in a.emails} - {""}
                dom_b = {email_domain(e) for e in b.emails} - {""}
                work = {d for d in dom_a & dom_b if not is_webmail(d, extra_webmail)}
                if orgs_a & orgs_b:
                    add(a.id, b.id, 0.9, f"same name, both at {shown[sorted(orgs_a & orgs_b)[0]]}")
                elif work:
                    add(a.id, b.id, 0.8, f"same name, both use {sorted(work)[0]}")
                elif (len(name_key(a.name).split()) >= 2 and a.emails and b.emails
                      and not (orgs_a and orgs_b)):
                    # The same full name under different addresses: often one person's work and private
                    # mail, or an address only mail or the calendar knew; sometimes namesakes: the user
                    # decides. Two organisations that differ say namesakes more often than not: left out.
                    add(a.id, b.id, 0.6, f"same full name ({a.name}) under different addresses: "
                                         f"{a.emails[0]} / {b.emails[0]}")
    from rapidfuzz import process

    for org, group in by_org.items():
        if len(group) < 2 or len(group) > 5000:
            continue  # nothing to compare, or too coarse a block to compare pairwise
        folded = [normalise_name(c.name) for c in group]
        keys = [name_key(c.name) for c in group]
        # Block again by shared name word: a token-set similarity of 90 needs one.
        by_token: dict[str, list[int]] = defaultdict(list)
        for i, f in enumerate(folded):
            for tok in set(f.split()):
                by_token[tok].append(i)
        for members in by_token.values():
            if len(members) < 2 or len(members) > 2000:
                continue
            names = [folded[i] for i in members]
            # All pairwise similarities of the block at once (C++), keeping only >= 90.
            scores = process.cdist(names, names, scorer=fuzz.token_set_ratio, score_cutoff=90, workers=1)
            for x, y in zip(*np.nonzero(np.triu(scores, k=1))):
                i, j = members[x], members[y]
                if keys[i] != keys[j]:
                    a, b = group[i], group[j]
                    add(a.id, b.id, 0.7, f"similar names ({a.name} / {b.name}), both at {shown.get(org, org)}")
    for s in held_back:
        add(s.a, s.b, s.score, s.reason)
    return sorted(out.values(), key=lambda s: (-s.score, s.a, s.b))
