"""Commands about people and sources: me, import, sources, contacts, show, merge, unmerge, apart."""

from __future__ import annotations

import json
from pathlib import Path

import click

from ..errors import InputError, MynetError, NotFoundError
from ..model import Contact
from ..workspace.importing import (
    contact_records,
    find_contact,
    import_paths,
    merge_contacts,
    merge_suggestions,
    reject_suggestion,
    search_contacts,
    set_me,
    unmerge_contact,
)
from ._common import as_of_option, clip, confirm, echo, emit_json, json_option, note, table, when


def contact_json(c: Contact, extra: dict | None = None) -> dict:
    """The scripting contract for one contact (keep these names)."""
    out = {
        "id": c.id,
        "name": c.name,
        "emails": c.emails,
        "phones": c.phones,
        "orgs": c.orgs,
        "past_orgs": c.past_orgs,
        "titles": c.titles,
        "tags": c.tags,
        "localities": c.localities,
        "sources": sorted({s.rsplit("/", 1)[-1] for s in c.sources}),
    }
    if extra:
        out.update(extra)
    return out


def extra_fields(c: Contact, warmth) -> dict:
    """Your warmth to a contact and when you last interacted, for ``--json``."""
    w = warmth.get(c.id)
    return {
        "warmth": round(w.warmth, 4) if w else 0.0,
        "last_interaction": w.last if w else None,
        "tier": w.tier if w else "none",
    }


def _parse_map(items: tuple[str, ...]) -> dict[str, str]:
    mapping = {}
    for item in items:
        if "=" not in item:
            raise MynetError(f"--map takes field=Column, got {item!r}")
        field, column = item.split("=", 1)
        mapping[field.strip()] = column.strip()
    return mapping


def confirm_or_refuse(question: str) -> None:
    """Ask on a terminal; without one, refuse clearly (add --yes) instead of waiting or aborting oddly."""
    import sys

    if not sys.stdin.isatty():
        raise MynetError("this changes your workspace for good; run it in a terminal to confirm, or add --yes")
    confirm(question)


def plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def print_import_report(report, as_json: bool) -> None:
    if as_json:
        emit_json(report.to_dict())
        return
    for f in report.files:
        if f.status == "unchanged":
            echo(f"{f.path}: unchanged since the last import")
            continue
        if f.status == "refused":
            echo(f"{f.path}: refused: {f.error}")
            continue
        what = plural(f.records, "record") if f.kind in ("vcard", "csv") else plural(f.interactions, "event" if f.kind == "ics" else "message")
        if f.kind in ("maildir", "mailfolder"):
            what += " in a Maildir" if f.kind == "maildir" else " in a folder of saved messages"
        echo(f"{f.path}: {f.status}, {what} ({f.kind}){', ' + str(len(f.skipped)) + ' skipped' if f.skipped else ''}")
        for w in f.warnings:
            note(f"  note: {w}")
    if report.skipped:
        echo(f"Skipped {len(report.skipped)} record(s):")
        for s in report.skipped[:50]:
            echo(f"  {s.source}:{s.line}: {s.reason}")
        if len(report.skipped) > 50:
            echo(f"  ... and {len(report.skipped) - 50} more (see --json)")
    extra = ""
    if report.you_records:
        extra += f"; {report.you_records} record{'s are' if report.you_records != 1 else ' is'} you"
    if report.not_people:
        extra += f"; {report.not_people} {'are organisation or group cards' if report.not_people != 1 else 'is an organisation or group card'}"
    if report.found:
        extra += (f"; {report.found} {'people' if report.found != 1 else 'person'} you corresponded with "
                  "found in mail and calendars")
    echo(
        f"{report.records_total} records in the workspace -> {report.contacts_after} contacts: "
        f"{report.merged_records} duplicate records merged{extra}. "
        f"{report.suggestions} possible duplicates to review (mynet contacts --suggested)"
    )
    if report.national_numbers:
        if report.region:
            echo(f"Phone numbers without a country code ({report.national_numbers}) were read as {report.region} "
                       f"numbers ({region_words(report.region_why)}); another country: mynet import --region XX, "
                       "or mynet me --phone +CC...")
        else:
            echo(f"Phone numbers without a country code ({report.national_numbers}) could not be read: nothing says "
                       "which country they are in (mynet me --phone +CC... or mynet import --region XX)")
    if report.who_are_you:
        echo("mynet does not know who you are yet, so it cannot tell whom you corresponded with: "
                   f"mynet me --email ADDRESS (most of this mail is to or from {report.who_are_you})")


def region_words(why: str) -> str:
    """Why a country was assumed, in words that finish "read as GB numbers (...)"."""
    return "as you said with --region" if why == "--region" else why


def register(cli: click.Group) -> None:
    @cli.command("me")
    @click.option("--email", "emails", multiple=True, help="One of your own addresses (repeat for several).")
    @click.option("--name", "names", multiple=True, help="Your name as your contacts write it (repeatable).")
    @click.option("--phone", "phones", multiple=True, metavar="+CC NUMBER",
                  help="Your own phone number, with its country code: numbers without one are read in that country.")
    @click.option("--replace", is_flag=True, help="Forget the addresses, names and numbers given before.")
    @json_option
    @click.pass_obj
    def me_cmd(obj, emails, names, phones, replace, as_json):
        """Declare who you are; your own cards become you, never a contact."""
        store = obj.store()
        if emails or names or phones or replace:
            set_me(store, list(emails), list(names), replace=replace, phones=list(phones))
        raw = store.setting("me", {}) or {}
        seen = json.loads(store.meta("me_seen_as", "[]") or "[]")
        region = json.loads(store.meta("region_assumed", "{}") or "{}") or {}
        if as_json:
            emit_json({"emails": raw.get("emails", []), "names": raw.get("names", []), "phones": raw.get("phones", []),
                       "also_you": seen, "phone_region": region})
            return
        if not raw:
            echo("You have not said who you are yet: mynet me --email you@example.org --name \"Your Name\"")
            return
        echo(f"You: {', '.join(raw.get('names', [])) or '(no name)'} <{', '.join(raw.get('emails', []))}>")
        if raw.get("phones"):
            echo(f"Your phone: {', '.join(raw['phones'])}")
        if seen:
            echo(f"Also you (your name on these addresses in meetings and mail, or archive copies of yours): "
                       f"{', '.join(seen)}")
        if region.get("region"):
            echo(f"Numbers without a country code are read as {region['region']} numbers "
                       f"({region_words(region.get('why', ''))})")

    @cli.command("import")
    @click.argument("paths", nargs=-1, required=True, type=click.Path())
    @click.option("--strict", is_flag=True, help="Stop at the first malformed record instead of skipping it.")
    @click.option("--map", "maps", multiple=True, metavar="FIELD=COLUMN", help="CSV: read FIELD from COLUMN.")
    @click.option("--mapping-file", type=click.Path(exists=True, dir_okay=False), help="CSV: a file of FIELD = COLUMN lines.")
    @click.option("--region", metavar="CC", help="Country for phone numbers written without one (e.g. GB, US).")
    @click.option("--as-of", "as_of", metavar="YYYY-MM-DD", help="When these files were current (older ones give past employers).")
    @click.option("--skip-bad-files", is_flag=True, help="Import the readable files even if others are refused.")
    @click.option("--no-new-contacts", "no_new_contacts", is_flag=True,
                  help="People you corresponded with in these mailboxes and calendars do not become contacts.")
    @json_option
    @click.pass_obj
    def import_cmd(obj, paths, strict, maps, mapping_file, region, as_of, skip_bad_files, no_new_contacts, as_json):
        """Read contact exports (vCard, CSV; calendars and mail) into the workspace.

        Directories are read recursively: a Maildir, and a folder of saved
        messages without a suffix, are read as one mailbox each. People you
        corresponded with (mail both ways, a thread you both wrote in, two or
        more small meetings) become contacts; mailing lists, relays, robots and
        shared addresses never do. Re-importing a file replaces its records and
        keeps your decisions. Nothing is stored if a file is refused.
        """
        mapping = {}
        if mapping_file:
            from ..sources.csv import load_mapping_file

            mapping.update(load_mapping_file(mapping_file))
        mapping.update(_parse_map(maps))
        if region:
            import phonenumbers

            if region.upper() not in phonenumbers.SUPPORTED_REGIONS:
                raise MynetError(f"--region {region!r} is not a country code phonenumbers knows (e.g. GB, US, DE)")
        store = obj.store()
        try:
            report = import_paths(
                store,
                list(paths),
                strict=strict,
                mapping=mapping or None,
                region=region,
                as_of=as_of,
                skip_bad_files=skip_bad_files,
                new_contacts=not no_new_contacts,
                progress=None if as_json else note,
            )
        except InputError as exc:
            hint = "" if strict or skip_bad_files or len(paths) == 1 and not Path(paths[0]).is_dir() else \
                "; nothing was imported (--skip-bad-files imports the other files)"
            raise InputError(exc.path, exc.reason + hint, exc.line) from exc
        print_import_report(report, as_json)
        if report.refused:
            raise InputError(report.refused[0].path, f"and {len(report.refused) - 1} other file(s) were refused" if len(report.refused) > 1 else "was refused (see above)")

    @cli.command("sources")
    @click.option("--remove", "remove", metavar="FILE", help="Remove this source and everything only it supported.")
    @click.option("--yes", is_flag=True, help="Do not ask for confirmation.")
    @json_option
    @click.pass_obj
    def sources_cmd(obj, remove, yes, as_json):
        """List the imported files (or remove one)."""
        if remove:
            from ..workspace.privacy import remove_source

            if not yes:
                confirm_or_refuse(f"Remove {remove} and everything only it supported from the workspace?")
            rep = remove_source(obj.store(), remove)
            if as_json:
                emit_json(dict(rep))
                return
            echo(f"Removed {rep['source']}: {rep['records']} records, {rep['interactions']} events/messages, "
                 f"{rep['decisions']} decisions about people only it held (your decisions about people still "
                 f"in other files are kept: {rep['decisions_kept']}); the workspace file was compacted.")
            return
        rows = obj.store().sources()
        if as_json:
            emit_json([{k: r[k] for k in ("id", "path", "kind", "sha256", "as_of", "imported_at", "n_records", "n_skipped")} for r in rows])
            return
        if not rows:
            echo("No sources yet: mynet import FILE...")
            return
        echo(table(["id", "kind", "records", "skipped", "as of", "file"],
                         [(r["id"], r["kind"], r["n_records"], r["n_skipped"], r["as_of"] or "", r["path"]) for r in rows]))

    @cli.command("contacts")
    @click.option("--search", "search", metavar="TEXT", help="Only people whose name, e-mail, phone, organisation, tag or place contains TEXT.")
    @click.option("--suggested", is_flag=True, help="List possible duplicates to merge or keep apart instead.")
    @click.option("--unlisted", is_flag=True, help="List people you met or wrote with who are not in your address book.")
    @click.option("--sort", type=click.Choice(["id", "name", "warmth", "last"]), default="id", show_default=True)
    @click.option("--limit", type=int, default=0, help="Show at most this many.")
    @as_of_option
    @json_option
    @click.pass_obj
    def contacts_cmd(obj, search, suggested, unlisted, sort, limit, as_of, as_json):
        """List the people in your network, with your warmth to each."""
        store = obj.store()
        if unlisted:
            from ..people.mailpeople import evidence_interactions, me_emails
            from ..evidence.warmth import WarmthModel, unlisted_people

            threshold = WarmthModel.from_settings(store.setting("warmth_model", {})).unlisted_threshold
            people = unlisted_people(store.contacts(), evidence_interactions(store), me_emails(store), threshold)
            total = len(people)
            if limit:
                people = people[:limit]
            if as_json:
                emit_json(people)
                return
            if not people:
                echo(f"Nobody outside your address book shows up {threshold} or more times.")
                return
            echo(table(["seen", "last", "name", "e-mail"], [(p["count"], p["last"], p["name"], p["email"]) for p in people]))
            note(f"{total} people met {threshold}+ times who are not in your address book")
            return
        if suggested:
            sugg = merge_suggestions(store)
            names = {c.id: c for c in store.contacts()}
            if as_json:
                emit_json([{"a": s.a, "b": s.b, "score": round(s.score, 3), "reason": s.reason} for s in sugg])
                return
            if not sugg:
                echo("No possible duplicates to review.")
                return
            echo(table(["score", "a", "b", "why"], [
                (f"{s.score:.2f}", f"{s.a} {names[s.a].name}", f"{s.b} {names[s.b].name}", s.reason) for s in sugg
            ]))
            echo("\nSame person: mynet merge A B    Different people: mynet apart A B")
            return
        contacts = store.contacts()
        if search:
            contacts = search_contacts(contacts, search)
        from ..evidence.network import load_warmth

        warmth = load_warmth(store, today=when(store, as_of).day)
        if sort == "name":
            contacts.sort(key=lambda c: (c.name.casefold(), c.id))
        elif sort == "warmth":
            contacts.sort(key=lambda c: (-warmth[c.id].warmth, c.id))
        elif sort == "last":
            contacts.sort(key=lambda c: (warmth[c.id].last or "", c.id), reverse=True)
        if limit:
            contacts = contacts[:limit]
        if as_json:
            from .groups_support import group_of

            groups = group_of(store, None)
            emit_json([contact_json(c, extra_fields(c, warmth) | {"group": groups.get(c.id)}) for c in contacts])
            return
        if not contacts:
            echo("No contacts match." if search else "No contacts yet: mynet import FILE...")
            return
        echo(table(["id", "name", "organisation", "warmth", "last seen", "e-mail"], [
            (c.id, c.name, ", ".join(c.orgs) or (f"(was {c.past_orgs[0]})" if c.past_orgs else ""),
             f"{warmth[c.id].warmth:.2f}" if warmth[c.id].warmth else "-", warmth[c.id].last or "-",
             c.emails[0] if c.emails else (c.phones[0] if c.phones else ""))
            for c in contacts
        ]))
        note(f"{len(contacts)} contact(s)")

    @cli.command("show")
    @click.argument("who")
    @json_option
    @click.pass_obj
    def show_cmd(obj, who, as_json):
        """Show one person (by id, e-mail or name) with every record behind them."""
        store = obj.store()
        c = find_contact(store, who)
        recs = contact_records(store, c)
        if as_json:
            emit_json(contact_json(c, {
                "nicknames": c.nicknames, "urls": c.urls, "notes": c.notes,
                "found_in": c.found_in, "address_from": c.address_from,
                "records": [{"id": rid, "file": path, "line": r.line, "index": r.index, "kind": r.kind,
                             "name": r.display_name(), "emails": r.emails, "phones": r.phones, "orgs": r.orgs,
                             "titles": r.titles, "tags": r.tags} for rid, path, r in recs],
            }))
            return
        echo(f"{c.name}  (id {c.id})")
        fields = [
            ("also known as", ", ".join(c.nicknames)),
            ("works at", ", ".join(c.orgs)),
            ("worked at", ", ".join(c.past_orgs)),
            ("title", ", ".join(c.titles)),
            ("e-mail", ", ".join(c.emails)),
            ("phone", ", ".join(c.phones)),
            ("tags", ", ".join(c.tags)),
            ("places", ", ".join(c.localities)),
            ("web", ", ".join(c.urls)),
        ]
        for label, value in fields:
            if value:
                echo(f"  {label:<14}{value}")
        for n in c.notes:
            echo(f"  {'note':<14}{clip(n, 200)}")
        if c.found_in:
            echo(f"\nFound in your {' and '.join(c.found_in)}: in no address book, but you corresponded.")
        if c.address_from:
            echo("\nWhere each address came from:")
            for addr, why in c.address_from.items():
                echo(f"  {addr}: {why}")
            echo(f"Not this person's? mynet drop-address {c.id} ADDRESS")
        if recs:
            echo(f"\nRecords behind this person ({len(recs)}):")
        for rid, path, r in recs:
            bits = [r.display_name()] + r.emails[:2] + r.phones[:1] + r.orgs[:1]
            echo(f"  [{rid}] {path}:{r.line}  " + " | ".join(b for b in bits if b))
        if len(recs) > 1:
            echo(f"\nWrongly merged? mynet unmerge {c.id} --record ID")

    @cli.command("merge")
    @click.argument("who", nargs=-1, required=True)
    @click.option("--yes", is_flag=True, help="Merge even when the names differ, without asking.")
    @json_option
    @click.pass_obj
    def merge_cmd(obj, who, yes, as_json):
        """Merge two or more contacts into one person (kept across re-imports)."""
        store = obj.store()
        people = [find_contact(store, w) for w in who]
        from ..people.identity import names_compatible

        odd = [p for p in people[1:] if not names_compatible(people[0].name, p.name)]
        if odd and not yes:
            confirm_or_refuse(f"{people[0].name} and {', '.join(p.name for p in odd)} have different names. Merge anyway?")
        c = merge_contacts(store, [p.id for p in people])
        if as_json:
            emit_json(contact_json(c))
            return
        echo(f"Merged into {c.name} (id {c.id}), {len(c.record_ids)} records.")

    @cli.command("unmerge")
    @click.argument("who")
    @click.option("--record", "records", multiple=True, type=int, help="Record id to split off (see mynet show); default: all.")
    @json_option
    @click.pass_obj
    def unmerge_cmd(obj, who, records, as_json):
        """Split a wrongly merged person back into separate contacts (kept across re-imports)."""
        store = obj.store()
        c = find_contact(store, who)
        parts = unmerge_contact(store, c.id, list(records))
        if as_json:
            emit_json([contact_json(p) for p in parts])
            return
        echo("Now separate: " + "; ".join(f"{p.id} {p.name}" for p in parts))

    @cli.command("drop-address")
    @click.argument("who")
    @click.argument("address")
    @click.option("--undo", is_flag=True, help="Take back an earlier drop-address of this address.")
    @json_option
    @click.pass_obj
    def drop_address_cmd(obj, who, address, undo, as_json):
        """Say that an e-mail address is not this person's (kept across re-imports).

        The address stops counting as theirs: no meetings or mail through it,
        never linked to them again by name. --undo takes it back.
        """
        from ..workspace.importing import detach_address

        store = obj.store()
        try:
            c = find_contact(store, who)
        except NotFoundError:
            if not undo:
                raise
            # Someone known only through this address is gone since it was dropped: bring them back.
            after = detach_address(store, None, address, undo=True)
            if as_json:
                emit_json(contact_json(after) if after else {})
                return
            echo(f"{address} counts again" + (f": {after.name} (id {after.id})." if after else "."))
            return
        after = detach_address(store, c.id, address, undo=undo)
        if as_json:
            emit_json(contact_json(after) if after else {"id": c.id, "removed": True})
            return
        if after is None:
            echo(f"{c.name} ({c.id}) was known only through {address}; they are no longer a contact.")
        elif undo:
            echo(f"{address} counts as {after.name}'s again (id {after.id}).")
        else:
            echo(f"{address} is no longer {after.name}'s (id {after.id}); kept across re-imports "
                       f"(mynet drop-address {after.id} {address} --undo takes it back).")

    @cli.command("forget")
    @click.argument("who")
    @click.option("--yes", is_flag=True, help="Do not ask for confirmation.")
    @click.pass_obj
    def forget_cmd(obj, who, yes):
        """Remove a person from the workspace completely (records, meetings, mail, decisions, caches).

        Later imports of the same files leave them out (mynet keeps only salted
        hashes of their addresses, numbers and names, never the values).
        """
        from ..workspace.privacy import forget_contact, written_files

        store = obj.store()
        c = find_contact(store, who)
        if not yes:
            confirm_or_refuse(f"Forget {c.name} (id {c.id}) completely? This cannot be undone")
        files = written_files(store)
        rep = forget_contact(store, c.id)
        echo(f"Forgotten: {plural(rep['records'], 'record')} removed, {rep['interactions_scrubbed']} meetings/messages "
             f"cleaned, {rep['decisions']} decisions dropped; the workspace file was compacted.")
        if files:
            note(f"Files written earlier from this workspace may still name {c.name}; mynet does not change them. "
                 "Delete them or write them again:")
            for f in files:
                note(f"  {f}")
        else:
            note(f"Reports and exports written earlier (mynet report, mynet export) are separate files: any that name "
                 f"{c.name} still do until you delete them or write them again.")

    @cli.command("apart")
    @click.argument("a")
    @click.argument("b")
    @click.pass_obj
    def apart_cmd(obj, a, b):
        """Mark two contacts as different people, so they are never suggested or merged."""
        store = obj.store()
        ca, cb = find_contact(store, a), find_contact(store, b)
        reject_suggestion(store, ca.id, cb.id)
        echo(f"Kept apart: {ca.id} {ca.name} / {cb.id} {cb.name}")
