"""Identity refresh: every record of your files, and the people found in your mail, -> contacts.

Runs after every import and every identity decision (merge, split, apart,
detach an address, who you are). It reads the whole workspace, so the
decisions and the people found in mail always agree with the files.
"""

from __future__ import annotations

import json

from ..model import Contact
from ..store import Store
from .correspondence import address_facts, clean, correspondents
from .forgotten import forgotten_address
from .identity import Decisions, Me, Resolution, StoredRecord, resolve
from .mailpeople import address_origins, attach_by_name, found_key, found_records, infer_region, your_other_addresses
from .normalise import normalise_email, normalise_name

__all__ = ["refresh_contacts", "get_me", "decisions_of"]


def decisions_of(store: Store) -> Decisions:
    """The user's merge and keep-apart decisions, as pairs of record keys."""
    d = Decisions()
    for row in store.decisions("same"):
        d.same.append((row["a"], row["b"]))
    for row in store.decisions("different"):
        d.different.append((row["a"], row["b"]))
    return d


def get_me(store: Store) -> Me:
    raw = store.setting("me", {}) or {}
    return Me(
        {normalise_email(e) for e in raw.get("emails", []) if normalise_email(e)},
        {normalise_name(n) for n in raw.get("names", []) if normalise_name(n)},
        set(raw.get("phones", [])),
    )


def _detached(store: Store) -> list[tuple[str, str]]:
    """Your "not this person's address" decisions: (anchor record key, address)."""
    return [(row["a"], (row["value"] or {}).get("address", "")) for row in store.decisions("detach")]


def _record_names(stored: list[StoredRecord]) -> dict[str, list[str]]:
    names: dict[str, list[str]] = {}
    for s in stored:
        for e in s.record.emails:
            addr = normalise_email(e)
            if addr:
                names.setdefault(addr, []).append(s.record.display_name())
    return names


def refresh_contacts(store: Store) -> Resolution:
    """Re-run identity resolution over every record (and the people found in mail) and store the contacts."""
    stored = [
        StoredRecord(rid, key, src["path"], src["as_of"] or "", src["region"] or "", rec)
        for rid, key, src, rec in store.records()
    ]
    with store.transaction():
        pairs = store.interactions(with_source=True)
        interactions = [it for _sid, it in pairs]
        me = get_me(store)
        names = _record_names(stored)
        facts = address_facts(interactions, names, me.emails, store.setting("mail_relay_domains", []) or [])
        me_all = Me(me.emails | {a for a, c in facts.aliases.items() if c in me.emails}, set(me.names), set(me.phones))
        cleaned = clean(interactions, facts, me_all.emails)
        seen_as = your_other_addresses(set(names), cleaned, me_all)
        me_all.emails |= set(seen_as)
        open_sources = {row["id"] for row in store.sources() if row.get("new_contacts", 1)}
        allowed = [it for (sid, _), it in zip(pairs, cleaned) if sid in open_sources]
        forgotten = forgotten_address(store)
        # A person found only through an address you detached from them stays away.
        dropped = {addr for key, addr in _detached(store) if key == found_key(addr)}
        found = {a: f for a, f in correspondents(allowed, me_all.emails).items()
                 if a not in names and a not in me_all.emails and a not in dropped and not forgotten(a)}
        region, why = infer_region(store.setting("region", "") or "", me.phones,
                                   (p for s in stored for p in s.record.phones))
        found_recs = found_records(found)
        res = resolve(
            stored + found_recs,
            store.contact_map(),
            decisions_of(store),
            me_all,
            int(store.meta("next_contact_id", "1") or 1),
            default_region=region,
            org_aliases=store.setting("org_aliases", {}) or {},
        )
        detached: set[tuple[int, str]] = set()
        for key, addr in _detached(store):
            cid = res.mapping.get(key)
            if cid is not None and addr:
                detached.add((cid, addr))
        apart = set()
        for a, b in decisions_of(store).different:
            ca, cb = res.mapping.get(a), res.mapping.get(b)
            if ca and cb and ca != cb:
                apart.add(frozenset((ca, cb)))
        contacts, linked = attach_by_name(res.contacts, res.mapping, cleaned, me_all, facts,
                                          detached=detached, apart=apart)
        contacts = _apply_detach(contacts, res.mapping, detached)
        address_origins(contacts, stored + found_recs, res.mapping, linked, facts)
        res.contacts = contacts
        store.set_meta("me_seen_as", json.dumps(sorted(me_all.emails - me.emails)))
        store.set_meta("mail_facts", facts.to_json())
        store.set_meta("region_assumed", json.dumps({"region": region, "why": why}))
        store.write_contacts(res.contacts, res.mapping, res.next_id)
        store.set_meta("held_back", json.dumps([s.__dict__ for s in res.held_back]))
        store.set_meta("me_keys", json.dumps(res.me_keys))
    return res


def _apply_detach(contacts: list[Contact], mapping: dict[str, int], detached: set[tuple[int, str]]) -> list[Contact]:
    """Take each detached address off its contact; a person found only through that address goes too."""
    by_id = {c.id: c for c in contacts}
    gone = set()
    for cid, addr in detached:
        c = by_id.get(cid)
        if c is None or addr not in c.emails:
            continue
        c.emails = [e for e in c.emails if e != addr]
        if not c.record_ids and not c.emails:
            gone.add(cid)
    if gone:
        for k in [k for k, v in mapping.items() if v in gone]:
            del mapping[k]
    return [c for c in contacts if c.id not in gone]
