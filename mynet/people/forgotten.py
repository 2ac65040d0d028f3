"""People you asked mynet to forget: recognised again by salted hashes, never by their values.

A forgotten person's e-mail addresses, phone numbers and names are kept only as
salted SHA-256 hashes (the salt is the workspace's own). An import leaves out
records that match one, and the addresses are taken out of newly read
meetings and messages; the identity refresh never finds them in mail again.
"""

from __future__ import annotations

import hashlib
import json
import secrets
from typing import Iterable

from ..model import Record
from ..store import Store
from .identity import record_emails, record_phones  # same normalisation as merging
from .normalise import normalise_name

__all__ = ["forgotten_filter", "forgotten_address", "scrub_forgotten", "remember_forgotten"]


def _salt(store: Store) -> str:
    salt = store.meta("forget_salt")
    if not salt:
        salt = secrets.token_hex(16)
        store.set_meta("forget_salt", salt)
    return salt


def _digest(salt: str, kind: str, value: str) -> str:
    return hashlib.sha256(f"{salt}\x00{kind}\x00{value}".encode("utf-8")).hexdigest()


def _identifiers(r: Record, region: str = "") -> set[tuple[str, str]]:
    out = {("email", e) for e in record_emails(r)} | {("tel", p) for p in record_phones(r, region)}
    name = normalise_name(r.display_name())
    if name and "@" not in name:
        out.add(("name", name))
    return out


def forgotten_filter(store: Store):
    """A predicate telling whether a record belongs to a forgotten person (by e-mail or phone, or by name alone
    when the record has neither)."""
    hashes = set(json.loads(store.meta("forgotten", "[]") or "[]"))
    if not hashes:
        return lambda r, region="": False
    salt = _salt(store)

    def is_forgotten(r: Record, region: str = "") -> bool:
        ids = _identifiers(r, region)
        strong = [i for i in ids if i[0] != "name"]
        check = strong or list(ids)
        return any(_digest(salt, k, v) in hashes for k, v in check)

    return is_forgotten


def forgotten_address(store: Store):
    """A predicate telling whether an e-mail address belongs to a forgotten person."""
    hashes = set(json.loads(store.meta("forgotten", "[]") or "[]"))
    if not hashes:
        return lambda addr: False
    salt = _salt(store)
    return lambda addr: _digest(salt, "email", addr) in hashes


def scrub_forgotten(store: Store, interactions) -> int:
    """Take forgotten people's addresses out of newly read meetings and messages (in place); how many changed."""
    is_forgotten = forgotten_address(store)
    changed = 0
    for it in interactions:
        gone = {a for a in [*it.participants, it.sender, it.organizer, *(it.names or {})] if a and is_forgotten(a)}
        if not gone:
            continue
        it.participants = [a for a in it.participants if a not in gone]
        it.names = {a: n for a, n in (it.names or {}).items() if a not in gone}
        it.sender = "" if it.sender in gone else it.sender
        it.organizer = "" if it.organizer in gone else it.organizer
        changed += 1
    return changed


def remember_forgotten(store: Store, records: Iterable[tuple[Record, str]], emails: Iterable[str]) -> None:
    """Keep the salted hashes of a person's records (each with its source's phone region) and addresses."""
    salt = _salt(store)
    hashes = set(json.loads(store.meta("forgotten", "[]") or "[]"))
    for rec, region in records:
        hashes.update(_digest(salt, kind, value) for kind, value in _identifiers(rec, region))
    hashes.update(_digest(salt, "email", e) for e in emails)
    store.set_meta("forgotten", json.dumps(sorted(hashes)))
