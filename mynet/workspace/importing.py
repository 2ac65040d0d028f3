"""Importing files into a workspace: read, leave out forgotten people, store, resolve identities, report.

An import is one store transaction, so a file that is refused leaves the
workspace exactly as it was.
"""

from __future__ import annotations

import json
import os
from dataclasses import dataclass, field
from datetime import date, datetime, timezone
from pathlib import Path
from typing import Callable, Iterable

from ..errors import InputError, MynetError
from ..model import Skipped
from ..people.forgotten import forgotten_filter, scrub_forgotten
from ..people.identity import record_keys
from ..people.refresh import get_me, refresh_contacts
from ..sources import READERS, iter_input_files, parse_file, read_bytes, source_digest
from ..sources.csv import load_mapping_file
from ..store import Store
from .people import merge_suggestions

__all__ = ["ImportReport", "FileReport", "import_paths", "MAIL_KINDS", "check_region", "read_mapping", "ImportingMixin"]

Progress = Callable[[str], None]


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
            "phone_region": {"region": self.region, "why": self.region_why,
                             "numbers_without_country_code": self.national_numbers},
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

    is_forgotten = forgotten_filter(store)
    assumed = (json.loads(store.meta("region_assumed", "{}") or "{}") or {}).get("region", "")
    with store.transaction():
        for (key_path, path, size, digest,
             result), fr in zip(parsed, [f for f in report.files if f.status in ("imported", "updated")]):
            kept = [r for r in result.records if not is_forgotten(r, (region or assumed or "").upper())]
            if len(kept) != len(result.records):
                fr.warnings.append(f"{len(result.records) - len(kept)} record(s) of people you asked mynet to forget "
                                   f"were left out")
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


def check_region(region: str | None) -> None:
    """Refuse a country code for phone numbers that phonenumbers does not know.

    Raises
    ------
    MynetError
        Naming the code given.
    """
    if region:
        import phonenumbers

        if region.upper() not in phonenumbers.SUPPORTED_REGIONS:
            raise MynetError(f"--region {region!r} is not a country code phonenumbers knows (e.g. GB, US, DE)")


def read_mapping(mapping_file: str | os.PathLike | None = None, pairs: Iterable[str] = ()) -> dict[str, str]:
    """A CSV column mapping from a file of ``FIELD = COLUMN`` lines and from ``FIELD=COLUMN`` texts (these win).

    Raises
    ------
    MynetError
        For a text that is not ``FIELD=COLUMN``.
    """
    mapping: dict[str, str] = {}
    if mapping_file:
        mapping.update(load_mapping_file(mapping_file))
    for item in pairs:
        if "=" not in item:
            raise MynetError(f"--map takes field=Column, got {item!r}")
        name, column = item.split("=", 1)
        mapping[name.strip()] = column.strip()
    return mapping


class ImportingMixin:
    """Importing files and the list of what was imported (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    def import_files(
        self,
        paths: Iterable[str | os.PathLike],
        *,
        strict: bool = False,
        mapping: dict[str, str] | None = None,
        region: str | None = None,
        as_of: str | None = None,
        skip_bad_files: bool = False,
        new_contacts: bool = True,
        progress: Progress | None = None,
    ) -> ImportReport:
        """Read contact exports, calendars and mailboxes into the workspace (one transaction).

        Parameters
        ----------
        paths : iterable of path-like
            Files and folders (read recursively; a Maildir or a folder of saved messages is one mailbox).
        strict : bool
            Stop at the first malformed record instead of skipping it.
        mapping : dict, optional
            CSV: read a field from a named column (see :func:`read_mapping`).
        region : str, optional
            Country for phone numbers written without one (``GB``, ``US``...).
        as_of : str, optional
            When these files were current (``YYYY-MM-DD``; older ones give past employers).
        skip_bad_files : bool
            Import the readable files even if others are refused (they are reported).
        new_contacts : bool
            Whether the people you corresponded with in these files may become contacts.
        progress : callable, optional
            Called with a line of text per file read.

        Raises
        ------
        InputError
            A file is unreadable or of unknown format, or (``strict``) holds a bad record; nothing is stored.
        """
        check_region(region)
        return import_paths(self.store, list(paths), strict=strict, mapping=mapping, region=region, as_of=as_of,
                            skip_bad_files=skip_bad_files, new_contacts=new_contacts, progress=progress)

    def sources(self) -> list[dict]:
        """The imported files: id, path, kind, sha256, as_of, imported_at, n_records, n_skipped..."""
        return [dict(row) for row in self.store.sources()]
