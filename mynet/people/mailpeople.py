"""People in your mail and calendars: who becomes a contact, which addresses are whose, and why.

The identity step (:mod:`mynet.people.identity`) merges the records of your address
books. This module adds what mail and calendars say, over the whole workspace:

* :func:`found_records`: the people you corresponded with (see
  :func:`mynet.people.correspondence.correspondents`) who are in no address book
  become records of their own (``kind="found"``), with a stable key made from
  their address, so your merges, splits and ratings of them last.
* :func:`attach_by_name`: an address your meetings and mail use under a name
  of two words or more that matches exactly one contact is that contact's too
  (address books often keep a private address while the calendar uses the
  work one); a found person whose name matches exactly one contact is that
  contact. Never for an address that is not a person (a list, a robot, a
  shared alias) and never against your decision to detach it.
* :func:`address_origins`: where every address of a contact came from, in
  plain words, for ``mynet show``.
* :func:`infer_region`: the country assumed for phone numbers written without one.
"""

from __future__ import annotations

import hashlib
import json
import locale
import os
from collections import Counter, defaultdict
from typing import Iterable

from ..model import Contact, Interaction, Record
from ..sources.mailaddr import KIND_WORDS
from .correspondence import Found, MailFacts, clean
from .identity import Me, StoredRecord
from .normalise import name_key, normalise_email

__all__ = ["found_key", "found_records", "attach_by_name", "address_origins", "infer_region", "your_other_addresses",
           "mail_facts", "me_emails", "evidence_interactions", "not_employer_domains", "FOUND_PREFIX"]

FOUND_PREFIX = "found:"


def mail_facts(store) -> MailFacts:
    """The facts about addresses saved by the last identity refresh (see :mod:`mynet.people.correspondence`)."""
    return MailFacts.from_json(store.meta("mail_facts"))


def me_emails(store) -> set[str]:
    """Your declared addresses, plus those your meetings and mail show as yours (your full name, archive forms)."""
    raw = store.setting("me", {}) or {}
    declared = {normalise_email(e) for e in raw.get("emails", []) if normalise_email(e)}
    return declared | set(json.loads(store.meta("me_seen_as", "[]") or "[]"))


def evidence_interactions(store, interactions: list[Interaction] | None = None) -> list[Interaction]:
    """Meetings and messages as evidence sees them: aliases resolved, lists and robots out, bulk decided.

    Ties, warmth, explanations, the report and the terminal UI read these
    rather than the interactions as imported (see :func:`mynet.people.correspondence.clean`).
    """
    if interactions is None:
        interactions = store.interactions()
    return clean(interactions, mail_facts(store), me_emails(store))


def not_employer_domains(store) -> frozenset[str]:
    """Mail domains that say nothing about an employer: your webmail list, relay and archive domains."""
    return (frozenset(store.setting("webmail_domains", []) or [])
            | frozenset(store.setting("mail_relay_domains", []) or [])
            | frozenset(mail_facts(store).archive_domains))


def found_key(address: str) -> str:
    """The stable record key of a person found in mail or calendars (from their address alone)."""
    return FOUND_PREFIX + hashlib.sha1(address.encode("utf-8")).hexdigest()[:20]


def found_records(found: dict[str, Found]) -> list[StoredRecord]:
    """One record per person found in mail or calendars (record id 0: they are in no file's records)."""
    out = []
    for addr, f in sorted(found.items()):
        rec = Record(kind="found", source=f.source, index=-1, line=f.line, full_name=f.name, emails=[addr],
                     notes=[], tags=[])
        rec.warnings = [f.reason]
        rec.card_kind = ",".join(f.channels)
        out.append(StoredRecord(0, found_key(addr), f.source, "", "", rec))
    return out


def your_other_addresses(known: set[str], interactions: Iterable[Interaction], me: Me) -> list[str]:
    """Addresses your meetings and mail show under your own declared name (two words or more).

    You are declared by your addresses and your name; an address no card or
    row holds, written with your full name, is yours too (an old work address, say).
    """
    mine = {name_key(n) for n in me.names if len(n.split()) >= 2}
    if not mine:
        return []
    known = known | me.emails
    found = set()
    for it in interactions:
        for addr, display in (it.names or {}).items():
            if addr not in known and display and name_key(display) in mine:
                found.add(addr)
    return sorted(found)


def attach_by_name(
    contacts: list[Contact],
    mapping: dict[str, int],
    interactions: Iterable[Interaction],
    me: Me,
    facts: MailFacts,
    *,
    detached: set[tuple[int, str]] = frozenset(),  # type: ignore[assignment]
    apart: set[frozenset[int]] = frozenset(),  # type: ignore[assignment]
) -> tuple[list[Contact], dict[str, str]]:
    """Give contacts the addresses their calendar and mail use, when the name there is unmistakably theirs.

    Returns the contacts left (found people attached to a contact are merged
    into it) and, per attached address, where the name was seen.
    """
    from_book = [c for c in contacts if c.record_ids]
    by_name: dict[str, list[Contact]] = defaultdict(list)
    for c in from_book:
        for nm in {c.name, *c.nicknames}:
            k = name_key(nm)
            if k and len(k.split()) >= 2 and c not in by_name[k]:
                by_name[k].append(c)
    held = {e: c for c in contacts for e in c.emails}
    known = {e for c in from_book for e in c.emails} | me.emails
    where: dict[str, str] = {}
    linked: dict[str, Contact] = {}
    for it in interactions:
        for addr, display in (it.names or {}).items():
            if addr in known or addr in linked or not display or addr in facts.kinds:
                continue
            hits = by_name.get(name_key(display), [])
            if len(hits) == 1 and (hits[0].id, addr) not in detached:
                owner = held.get(addr)
                if owner is not None and frozenset((owner.id, hits[0].id)) in apart:
                    continue
                linked[addr] = hits[0]
                where[addr] = f"linked by the name {display!r} in {it.source.rsplit('/', 1)[-1]}:{it.line}"
    gone: set[int] = set()
    for addr, c in sorted(linked.items()):
        owner = held.get(addr)
        if owner is not None and owner is not c:
            if owner.record_ids:
                continue
            # A found person with this name: the same person as the contact.
            c.emails.extend(e for e in owner.emails if e not in c.emails)
            c.sources.extend(s for s in owner.sources if s not in c.sources)
            for k, v in mapping.items():
                if v == owner.id:
                    mapping[k] = c.id
            gone.add(owner.id)
            for e in owner.emails:
                held[e] = c
        elif owner is None:
            c.emails.append(addr)
            held[addr] = c
    return [c for c in contacts if c.id not in gone], where


def address_origins(
    contacts: list[Contact],
    stored: list[StoredRecord],
    mapping: dict[str, int],
    linked: dict[str, str],
    facts: MailFacts,
) -> None:
    """Fill each contact's ``address_from``: where mynet got each of its addresses, in plain words."""
    said: dict[tuple[int, str], list[str]] = defaultdict(list)
    for s in stored:
        cid = mapping.get(s.key)
        if cid is None:
            continue
        rec = s.record
        for e in rec.emails:
            addr = normalise_email(e)
            if not addr:
                continue
            if rec.kind == "found":
                why = rec.warnings[0] if rec.warnings else "you corresponded"
                said[(cid, addr)].append(f"found in your {'mail' if 'mail' in rec.card_kind else 'calendar'}: {why}"
                                         f" ({rec.source.rsplit('/', 1)[-1]}:{rec.line})")
            else:
                said[(cid, addr)].append(f"{'card' if rec.kind == 'vcard' else 'row'} "
                                         f"{s.source.rsplit('/', 1)[-1]}:{rec.line}")
    for c in contacts:
        origins = {}
        for e in c.emails:
            parts = said.get((c.id, e)) or ([linked[e]] if e in linked else [])
            text = "; ".join(dict.fromkeys(parts)) or "merged with this person's records"
            if e in facts.kinds:
                kind = facts.kinds[e]
                text += f"; not used as evidence: {KIND_WORDS.get(kind, kind)} ({facts.reasons.get(e, '')})"
            origins[e] = text
        c.address_from = origins
        c.found_in = []
        if not c.record_ids:
            kinds = [s.record.card_kind for s in stored if mapping.get(s.key) == c.id and s.record.kind == "found"]
            c.found_in = sorted({k for ks in kinds for k in ks.split(",") if k})


def _region_of(number: str) -> str:
    import phonenumbers

    try:
        code = phonenumbers.parse(number, None).country_code
    except phonenumbers.NumberParseException:
        return ""
    # The main country of the calling code (+1: US, +44: GB), whether or not the number is assigned.
    region = phonenumbers.region_code_for_country_code(code)
    return "" if region in ("ZZ", "001") else region


def _locale_region() -> str:
    """The country of the system's language setting (LC_ALL, LC_CTYPE, LANG: ``en_GB.UTF-8`` -> ``GB``)."""
    for var in ("LC_ALL", "LC_CTYPE", "LANG"):
        value = os.environ.get(var, "")
        if value:
            break
    else:
        value = (locale.getlocale()[0] or "")
    code = value.split(".", 1)[0].split("@", 1)[0]
    if "_" in code:
        region = code.split("_", 1)[1].upper()
        if len(region) == 2 and region.isalpha():
            return region
    return ""


def infer_region(setting: str, my_phones: Iterable[str], phones: Iterable[str], *,
                 sample: int = 5000) -> tuple[str, str]:
    """The country assumed for phone numbers written without one, and why (words that follow "read as GB numbers").

    In order: the ``region`` setting; the country of your own number
    (``mynet me --phone``); the most common country among the numbers with a
    country code in your imports (up to ``sample`` of them); the country of
    the system's language setting. ``("", reason)`` when none gives one.
    """
    import phonenumbers

    if setting and setting.upper() in phonenumbers.SUPPORTED_REGIONS:
        return setting.upper(), "as your region setting says"
    for p in my_phones:
        region = _region_of(p)
        if region:
            return region, f"like your own number {p}"
    counts: Counter[str] = Counter()
    for p in phones:
        t = p.strip()
        if t.startswith("00"):
            t = "+" + t[2:]
        if not t.startswith("+"):
            continue
        region = _region_of(t)
        if region:
            counts[region] += 1
            if sum(counts.values()) >= sample:
                break
    if counts:
        region, n = max(counts.items(), key=lambda kv: (kv[1], kv[0]))
        total = sum(counts.values())
        return region, f"like {n} of the {total} numbers with a country code in your imports"
    region = _locale_region()
    if region in phonenumbers.SUPPORTED_REGIONS:
        return region, "after your system's language setting"
    return "", "nothing says which country"
