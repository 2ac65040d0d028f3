"""People in a workspace: who you are, finding a contact, merging, splitting, keeping apart, detaching an address.

Every decision is a row of the ``decisions`` table keyed by stable record keys,
so it survives re-imports; each runs in one transaction with the identity
refresh that follows it.
"""

from __future__ import annotations

import json
from typing import Sequence

from ..errors import AmbiguousError, MynetError, NotFoundError
from ..evidence.network import anchor_key
from ..model import Contact
from ..people.identity import Me, Suggestion, suggest_merges
from ..people.mailpeople import found_key, not_employer_domains
from ..people.normalise import fold_text, normalise_email, normalise_name, normalise_phone
from ..people.refresh import get_me, refresh_contacts
from ..store import Store

__all__ = ["set_me", "detach_address", "search_contacts", "find_contact", "merge_contacts", "merge_many",
           "unmerge_contact", "reject_suggestion", "merge_suggestions", "contact_records", "PeopleMixin"]


def set_me(store: Store, emails: Sequence[str], names: Sequence[str], *, replace: bool = False,
           phones: Sequence[str] = ()) -> Me:
    """Declare the user's own addresses, names and phone numbers; their cards become "you".

    Phone numbers must carry their country code (``+44 ...``): your own number
    tells which country to assume for numbers written without one.
    """
    bad = [e for e in emails if not normalise_email(e)]
    if bad:
        raise MynetError(f"not an e-mail address: {bad[0]!r}")
    numbers = []
    for p in phones:
        e164 = normalise_phone(p.strip()) if p.strip().startswith(("+", "00")) else ""
        if not e164:
            raise MynetError(f"give your phone number with its country code, e.g. +44 7700 900123 (got {p!r})")
        numbers.append(e164)
    raw = {} if replace else (store.setting("me", {}) or {})
    all_emails = sorted({*raw.get("emails", []), *(normalise_email(e) for e in emails)})
    all_names = sorted({*raw.get("names", []), *(n.strip() for n in names if n.strip())})
    all_phones = sorted({*raw.get("phones", []), *numbers})
    with store.transaction():
        store.set_setting("me", {"emails": all_emails, "names": all_names, "phones": all_phones})
        refresh_contacts(store)
    return get_me(store)


def detach_address(store: Store, contact_id: int | None, address: str, *, undo: bool = False) -> Contact | None:
    """Say that an address is not this person's (kept across re-imports), or take that back with ``undo``.

    With ``undo`` and no ``contact_id``, every detach of that address from a
    person who no longer exists (someone known only through it) is taken
    back. Returns the contact afterwards (None when the person existed only
    through that address).
    """
    addr = normalise_email(address)
    if not addr:
        raise MynetError(f"not an e-mail address: {address!r}")
    contact = store.contact(contact_id) if contact_id is not None else None
    if contact_id is not None and contact is None:
        raise NotFoundError(f"no contact with id {contact_id}")
    keys = _keys_of(store, contact_id) if contact_id is not None else [found_key(addr)]
    with store.transaction():
        if undo:
            cmap = store.contact_map()
            rows = [row["id"] for row in store.decisions("detach")
                    if (row["value"] or {}).get("address") == addr
                    and (row["a"] in keys or contact_id is None and row["a"] not in cmap)]
            if not rows:
                whom = f"{contact.name} ({contact_id})" if contact else "anyone who is gone"
                raise NotFoundError(f"{addr} was not detached from {whom}")
            for rid in rows:
                store.delete_decision(rid)
            store.bump_data_version()
        else:
            if contact is None or addr not in contact.emails:
                raise NotFoundError(f"{contact.name if contact else 'nobody'} ({contact_id}) has no address {addr}"
                                    f" (see: mynet show {contact_id})")
            store.add_decision("detach", anchor_key(store, contact_id), "", {"address": addr})
        refresh_contacts(store)
    cmap = store.contact_map()
    new_id = next((cmap[k] for k in keys if k in cmap), None)
    return store.contact(new_id) if new_id is not None else None


def search_contacts(contacts: list[Contact], text: str) -> list[Contact]:
    """Contacts whose name, e-mail, phone, organisation, tag or place contains ``text`` (accent- and case-blind)."""
    needle = fold_text(text)
    if not needle:
        return list(contacts)
    out = []
    for c in contacts:
        hay = " | ".join(
            [c.name, *c.nicknames, *c.emails, *c.phones, *c.orgs, *c.past_orgs, *c.titles, *c.tags, *c.localities]
        )
        folded = fold_text(hay)
        if needle in folded or needle.replace(" ", "") in "".join(c.phones):
            out.append(c)
    return out


def find_contact(store: Store, query: str) -> Contact:
    """One contact by id, e-mail or name (exact, then unique partial match).

    Raises
    ------
    NotFoundError, AmbiguousError
    """
    q = query.strip()
    if q.isdigit():
        c = store.contact(int(q))
        if c is None:
            raise NotFoundError(f"no contact with id {q} (see: mynet contacts)")
        return c
    contacts = store.contacts()
    email = normalise_email(q)
    if email:
        hits = [c for c in contacts if email in c.emails]
        if len(hits) == 1:
            return hits[0]
    norm = normalise_name(q)
    exact = [c for c in contacts if normalise_name(c.name) == norm or norm in (normalise_name(n) for n in c.nicknames)]
    if len(exact) == 1:
        return exact[0]
    hits = exact or [c for c in contacts if norm and norm in normalise_name(c.name)]
    if len(hits) == 1:
        return hits[0]
    if not hits:
        raise NotFoundError(f"no contact matches {query!r} (try: mynet contacts --search {query!r})")
    listing = "; ".join(f"{c.id} {c.name}" for c in hits[:8])
    more = f" and {len(hits) - 8} more" if len(hits) > 8 else ""
    raise AmbiguousError(f"{query!r} matches {len(hits)} contacts: {listing}{more}; use the id")


def _keys_of(store: Store, contact_id: int) -> list[str]:
    return store.keys_of(contact_id)


def merge_contacts(store: Store, ids: list[int]) -> Contact:
    """Merge several contacts into one (kept across re-imports). Returns the merged contact."""
    return merge_many(store, [ids])[0]


def merge_many(store: Store, sets: list[list[int]]) -> list[Contact]:
    """Merge each list of contacts into one person, all in one transaction and one refresh.

    Returns the merged contacts, one per list (the same contact twice when two lists share someone).
    """
    anchors = []
    for ids in sets:
        if len(set(ids)) < 2:
            raise MynetError("merge needs at least two different contacts")
    with store.transaction():
        for ids in sets:
            keys = []
            for cid in ids:
                if store.contact(cid) is None:
                    raise NotFoundError(f"no contact with id {cid}")
                keys.append(_keys_of(store, cid))
            anchor = keys[0][0]
            anchors.append(anchor)
            for other in keys[1:]:
                store.add_decision("same", anchor, other[0])
                # The user changed their mind: drop earlier "different" decisions between these people.
                for ka in [k for ks in keys for k in ks]:
                    for kb in other:
                        store.delete_decisions("different", ka, kb)
                        store.delete_decisions("different", kb, ka)
        refresh_contacts(store)
    cmap = store.contact_map()
    merged = [store.contact(cmap[a]) for a in anchors]
    assert all(m is not None for m in merged)
    return merged  # type: ignore[return-value]


def unmerge_contact(store: Store, contact_id: int, record_ids: list[int] | None = None) -> list[Contact]:
    """Split records off a contact (all of them when ``record_ids`` is empty).

    The split is kept across re-imports: the detached records are marked as
    different people from the ones that stay.
    """
    contact = store.contact(contact_id)
    if contact is None:
        raise NotFoundError(f"no contact with id {contact_id}")
    if len(contact.record_ids) < 2:
        raise MynetError(f"{contact.name} ({contact_id}) has only one record; there is nothing to split")
    rows = {rid: key for rid, key, _s, _r in store.records_by_id(contact.record_ids)}
    if record_ids:
        unknown = [r for r in record_ids if r not in rows]
        if unknown:
            raise NotFoundError(
                f"record {unknown[0]} is not one of {contact.name}'s records ({', '.join(map(str, sorted(rows)))})"
            )
        groups = [[rows[r] for r in record_ids], [k for r, k in rows.items() if r not in record_ids]]
        if not groups[1]:
            raise MynetError("that would detach every record; name the records to split off")
    else:
        groups = [[k] for k in rows.values()]
    with store.transaction():
        all_keys = list(rows.values())
        for a in all_keys:
            for b in all_keys:
                store.delete_decisions("same", a, b)
        for gi, ga in enumerate(groups):
            for gb in groups[gi + 1 :]:
                for a in ga:
                    for b in gb:
                        store.add_decision("different", a, b)
            for a, b in zip(ga, ga[1:]):
                store.add_decision("same", a, b)
        refresh_contacts(store)
    cmap = store.contact_map()
    ids = sorted({cmap[k] for k in rows.values() if k in cmap})
    return [c for c in (store.contact(i) for i in ids) if c]


def reject_suggestion(store: Store, a: int, b: int) -> None:
    """Mark two contacts as different people (the suggestion is not shown again)."""
    ka, kb = _keys_of(store, a), _keys_of(store, b)
    if not ka or not kb:
        raise NotFoundError(f"no contact with id {a if not ka else b}")
    with store.transaction():
        store.add_decision("different", ka[0], kb[0])
        refresh_contacts(store)


def merge_suggestions(store: Store) -> list[Suggestion]:
    """Likely duplicates for the user to accept or reject, best first."""
    cmap = store.contact_map()
    rejected = set()
    for row in store.decisions("different"):
        a, b = cmap.get(row["a"]), cmap.get(row["b"])
        if a and b:
            rejected.add((min(a, b), max(a, b)))
    held = [Suggestion(**s) for s in json.loads(store.meta("held_back", "[]") or "[]")]
    extra = not_employer_domains(store)
    return suggest_merges(store.contacts(), rejected, extra, held)


def contact_records(store: Store, contact: Contact):
    """The source records behind a contact: (record id, source path, record)."""
    return [(rid, src["path"], rec) for rid, _k, src, rec in store.records_by_id(contact.record_ids)]


class PeopleMixin:
    """People: who you are, finding, merging, splitting, keeping apart (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    def me(self) -> dict:
        """Who you said you are, the other addresses mynet found to be yours, and the phone region assumed.

        Returns ``{"emails", "names", "phones", "also_you", "phone_region", "declared"}``
        (``declared``: whether you ever said who you are).
        """
        raw = self.store.setting("me", {}) or {}
        return {"declared": bool(raw), "emails": raw.get("emails", []), "names": raw.get("names", []),
                "phones": raw.get("phones", []),
                "also_you": json.loads(self.store.meta("me_seen_as", "[]") or "[]"),
                "phone_region": json.loads(self.store.meta("region_assumed", "{}") or "{}") or {}}

    def set_me(self, emails: Sequence[str] = (), names: Sequence[str] = (), phones: Sequence[str] = (), *,
               replace: bool = False) -> Me:
        """Declare your own addresses, names and phone numbers (with their country code); your cards become you."""
        return set_me(self.store, list(emails), list(names), replace=replace, phones=list(phones))

    def people(self) -> list[Contact]:
        """Every contact, by id (the model objects; :meth:`contacts` gives them as rows with your warmth)."""
        return self.store.contacts()

    def person(self, contact_id: int) -> Contact | None:
        """The contact with this id, or None."""
        return self.store.contact(contact_id)

    def find(self, query: str | int) -> Contact:
        """One contact by id, e-mail address or name.

        Raises
        ------
        NotFoundError
            When nobody matches.
        AmbiguousError
            When several people match (the message lists them).
        """
        return find_contact(self.store, str(query))

    def search(self, text: str) -> list[Contact]:
        """Contacts whose name, e-mail, phone, organisation, title, tag or place contains ``text``."""
        return search_contacts(self.store.contacts(), text)

    def records_of(self, contact: Contact) -> list:
        """The source records behind a contact: (record id, file, record)."""
        return contact_records(self.store, contact)

    def suggestions(self) -> list[Suggestion]:
        """Likely duplicates for you to merge or keep apart, best first."""
        return merge_suggestions(self.store)

    def merge(self, ids: list[int]) -> Contact:
        """Merge contacts into one person (kept across re-imports); returns the merged contact."""
        return merge_contacts(self.store, list(ids))

    def merge_suggested(self, min_score: float) -> list[tuple[Suggestion, Contact]]:
        """Merge every suggested duplicate pair scoring ``min_score`` or more, in one step.

        Returns each suggestion with the person it became; ``unmerge`` splits any of them again.
        """
        chosen = [s for s in merge_suggestions(self.store) if s.score >= min_score]
        if not chosen:
            return []
        return list(zip(chosen, merge_many(self.store, [[s.a, s.b] for s in chosen])))

    def unmerge(self, contact_id: int, record_ids: list[int] | None = None) -> list[Contact]:
        """Split records off a contact (all of them by default); returns the contacts they now belong to."""
        return unmerge_contact(self.store, contact_id, list(record_ids or []))

    def apart(self, a: int, b: int) -> None:
        """Mark two contacts as different people: never suggested or merged again."""
        reject_suggestion(self.store, a, b)

    def detach_address(self, contact_id: int | None, address: str, *, undo: bool = False) -> Contact | None:
        """Say an address is not this person's (``undo`` takes it back); see :func:`detach_address`."""
        return detach_address(self.store, contact_id, address, undo=undo)
