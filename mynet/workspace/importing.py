"""Workspace operations: import files, resolve identities, record decisions.

This is the layer the CLI and the terminal UI call. Every change runs in one
store transaction, so a failure leaves the workspace exactly as it was.
"""

from __future__ import annotations

import json
import os
from dataclasses import dataclass, field
from datetime import date, datetime, timezone
from pathlib import Path
from typing import Callable

from ..errors import AmbiguousError, InputError, MynetError, NotFoundError
from ..people.identity import Me, Suggestion, record_keys, suggest_merges
from ..sources import iter_input_files, parse_file, read_bytes, source_digest
from .location import resolve_workspace_path
from ..people.mailpeople import evidence_interactions, mail_facts, not_employer_domains, your_other_addresses
from ..model import Contact, Skipped
from ..people.refresh import get_me, refresh_contacts
from ..people.normalise import fold_text, normalise_email, normalise_name
from ..store import Store

__all__ = [
    "open_workspace",
    "ImportReport",
    "import_paths",
    "refresh_contacts",
    "set_me",
    "get_me",
    "find_contact",
    "search_contacts",
    "merge_contacts",
    "unmerge_contact",
    "reject_suggestion",
    "merge_suggestions",
    "contact_records",
    "your_other_addresses",
    "evidence_interactions",
    "not_employer_domains",
    "mail_facts",
    "detach_address",
]

Progress = Callable[[str], None]


def open_workspace(path: str | os.PathLike | None = None, *, create: bool = True) -> Store:
    """Open (or create) the workspace at ``path``, ``$MYNET_WORKSPACE`` or the default place."""
    return Store(resolve_workspace_path(path), create=create)


@dataclass
class FileReport:
    path: str
    kind: str
    status: str  # "imported", "updated", "unchanged", "refused"
    records: int = 0
    interactions: int = 0
    skipped: list[Skipped] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    error: str = ""


@dataclass
class ImportReport:
    """What one import did, for the user and for ``--json``."""

    files: list[FileReport] = field(default_factory=list)
    contacts_before: int = 0
    contacts_after: int = 0
    records_total: int = 0
    merged_records: int = 0
    you_records: int = 0
    not_people: int = 0
    suggestions: int = 0
    found: int = 0  # contacts found in mail and calendars (people you corresponded with)
    region: str = ""  # the country assumed for phone numbers without one
    region_why: str = ""
    national_numbers: int = 0  # numbers without a country code (read with ``region``)
    who_are_you: str = ""  # mail was imported but you have not said who you are: a likely address of yours

    @property
    def skipped(self) -> list[Skipped]:
        return [s for f in self.files for s in f.skipped]

    @property
    def records_read(self) -> int:
        return sum(f.records for f in self.files)

    @property
    def refused(self) -> list[FileReport]:
        return [f for f in self.files if f.status == "refused"]

    def to_dict(self) -> dict:
        return {
            "files": [
                {
                    "path": f.path,
                    "kind": f.kind,
                    "status": f.status,
                    "records": f.records,
                    "interactions": f.interactions,
                    "skipped": len(f.skipped),
                    "warnings": f.warnings,
                    "error": f.error,
                }
                for f in self.files
            ],
            "records_read": self.records_read,
            "records_total": self.records_total,
            "contacts_before": self.contacts_before,
            "contacts_after": self.contacts_after,
            "duplicates_merged": self.merged_records,
            "you_records": self.you_records,
            "not_people": self.not_people,
            "suggested_merges": self.suggestions,
            "found_in_mail_or_calendar": self.found,
            "phone_region": {"region": self.region, "why": self.region_why, "numbers_without_country_code": self.national_numbers},
            "skipped": [
                {"file": s.source, "line": s.line, "index": s.index, "reason": s.reason} for s in self.skipped
            ],
        }


def _iso_date(text: str) -> str:
    """``YYYY-MM-DD`` from an ISO 8601 date or date-time, basic (20211223T...) or extended form; "" if none."""
    digits = "".join(ch for ch in text[:10] if ch.isdigit())
    if len(digits) >= 8:
        y, m, d = digits[:4], digits[4:6], digits[6:8]
        if "01" <= m <= "12" and "01" <= d <= "31":
            return f"{y}-{m}-{d}"
    return ""


def _as_of(path: Path, records, explicit: str | None) -> str:
    if explicit:
        return explicit
    revs = [d for d in (_iso_date(r.rev) for r in records if getattr(r, "rev", "")) if d]
    if revs:
        return max(revs)
    try:
        return datetime.fromtimestamp(path.stat().st_mtime, timezone.utc).date().isoformat()
    except OSError:
        return date.today().isoformat()


def import_paths(
    store: Store,
    paths: list[str | os.PathLike],
    *,
    strict: bool = False,
    mapping: dict[str, str] | None = None,
    region: str | None = None,
    as_of: str | None = None,
    skip_bad_files: bool = False,
    new_contacts: bool = True,
    progress: Progress | None = None,
) -> ImportReport:
    """Read files (and folders of mail) into the workspace in one transaction.

    Unchanged files (same path and content hash, read by the same reader) are
    left alone; a changed file replaces that source's records and keeps every
    user decision. When a file cannot be read or recognised, nothing is stored
    and the error names it, unless ``skip_bad_files`` is set, in which case it
    is reported as refused. With ``new_contacts`` false, the people you
    corresponded with in these files do not become contacts.

    Raises
    ------
    InputError
        A file is unreadable, of unknown format, or (``strict``) has a bad record.
    """
    from ..sources import READERS

    report = ImportReport(contacts_before=len(store.contacts()))
    parsed = []
    files = list(iter_input_files(paths))
    if not files:
        raise InputError(", ".join(str(p) for p in paths),
                         "holds no contact files (.vcf, .csv, .ics, .mbox, .eml, Maildir or saved mail messages)")
    for path in files:
        if progress:
            progress(f"reading {path}")
        key_path = str(path.resolve())
        try:
            data = None if path.is_dir() else read_bytes(path)
            digest, size = source_digest(path, data)
            old = store.source_by_path(key_path)
            if (old is not None and old["sha256"] == digest and not mapping
                    and old.get("reader", "") == READERS.get(old["kind"], "")
                    and bool(old.get("new_contacts", 1)) == new_contacts):
                report.files.append(FileReport(str(path), old["kind"], "unchanged", records=0))
                continue
            result = parse_file(path, strict=strict, mapping=mapping, data=data)
        except InputError as exc:
            if skip_bad_files and not strict:
                report.files.append(FileReport(str(path), "?", "refused", error=str(exc)))
                continue
            raise
        status = "updated" if old is not None else "imported"
        fr = FileReport(
            str(path), result.kind, status, len(result.records), len(result.interactions),
            list(result.skipped), list(result.warnings),
        )
        report.files.append(fr)
        parsed.append((key_path, path, size, digest, result))

    from ..people.forgotten import forgotten_filter, scrub_forgotten

    is_forgotten = forgotten_filter(store)
    assumed = (json.loads(store.meta("region_assumed", "{}") or "{}") or {}).get("region", "")
    with store.transaction():
        for (key_path, path, size, digest, result), fr in zip(parsed, [f for f in report.files if f.status in ("imported", "updated")]):
            kept = [r for r in result.records if not is_forgotten(r, (region or assumed or "").upper())]
            if len(kept) != len(result.records):
                fr.warnings.append(f"{len(result.records) - len(kept)} record(s) of people you asked mynet to forget were left out")
                fr.records = len(kept)
                result.records = kept
            if scrub_forgotten(store, result.interactions):
                fr.warnings.append("people you asked mynet to forget were left out of its meetings and messages")
            keys = record_keys(result.records, key_path)
            store.replace_source(
                key_path,
                result.kind,
                digest,
                size,
                list(zip(keys, result.records)),
                result.interactions,
                as_of=_as_of(path, result.records, as_of),
                region=(region or "").upper() or None,
                n_skipped=len(result.skipped),
                reader=READERS.get(result.kind, ""),
                new_contacts=new_contacts,
            )
        res = refresh_contacts(store)
    report.contacts_after = len(res.contacts)
    report.records_total = sum(len(c.record_ids) for c in res.contacts) + len(res.me_keys) + len(res.not_people)
    report.not_people = len(res.not_people)
    report.merged_records = sum(max(0, len(c.record_ids) - 1) for c in res.contacts)
    report.you_records = len(res.me_keys)
    report.found = sum(1 for c in res.contacts if c.found_in)
    report.suggestions = len(merge_suggestions(store))
    _region_report(store, report, region)
    if parsed and any(f.kind in MAIL_KINDS for f in report.files) and not get_me(store).emails:
        report.who_are_you = _likely_owner(store)
    return report


#: Source kinds that hold mail.
MAIL_KINDS = frozenset({"mbox", "eml", "maildir", "mailfolder"})


def _region_report(store: Store, report: "ImportReport", explicit: str | None) -> None:
    """Count the numbers written without a country code and say which country mynet assumed for them."""
    if explicit:
        report.region, report.region_why = explicit.upper(), "--region"
    else:
        assumed = json.loads(store.meta("region_assumed", "{}") or "{}") or {}
        report.region, report.region_why = assumed.get("region", ""), assumed.get("why", "")
    national = 0
    for _rid, _key, src, rec in store.records():
        if src["region"]:
            continue
        national += sum(1 for p in rec.phones if p.strip() and not p.strip().startswith(("+", "00")))
    report.national_numbers = national


def _likely_owner(store: Store) -> str:
    """The address most direct mail was written to or from: probably the mailbox owner's."""
    from collections import Counter

    counts: Counter[str] = Counter()
    for it in store.interactions():
        if it.kind == "message" and not it.mass and not it.bulk:
            counts.update(set(it.participants))
    return counts.most_common(1)[0][0] if counts else ""


def set_me(store: Store, emails: list[str], names: list[str], *, replace: bool = False,
           phones: list[str] = ()) -> Me:  # type: ignore[assignment]
    """Declare the user's own addresses, names and phone numbers; their cards become "you".

    Phone numbers must carry their country code (``+44 ...``): your own number
    tells which country to assume for numbers written without one.
    """
    from ..people.normalise import normalise_phone

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
    from ..people.mailpeople import found_key
    from ..evidence.network import anchor_key

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
    if len(set(ids)) < 2:
        raise MynetError("merge needs at least two different contacts")
    keys = []
    for cid in ids:
        if store.contact(cid) is None:
            raise NotFoundError(f"no contact with id {cid}")
        keys.append(_keys_of(store, cid))
    with store.transaction():
        anchor = keys[0][0]
        for other in keys[1:]:
            store.add_decision("same", anchor, other[0])
            # The user changed their mind: drop earlier "different" decisions between these people.
            for ka in [k for ks in keys for k in ks]:
                for kb in other:
                    store.delete_decisions("different", ka, kb)
                    store.delete_decisions("different", kb, ka)
        refresh_contacts(store)
    merged = store.contact(store.contact_map()[anchor])
    assert merged is not None
    return merged


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
