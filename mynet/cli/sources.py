"""Commands about the files you import: ``mynet import`` and ``mynet sources``."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

import click

from ..errors import InputError

if TYPE_CHECKING:
    from ..workspace import ImportReport
from .common import confirm_or_refuse, echo, emit_json, json_option, note, plural, table


def region_words(why: str) -> str:
    """Why a country was assumed, in words that finish "read as GB numbers (...)"."""
    return "as you said with --region" if why == "--region" else why


def print_files(report: ImportReport) -> None:
    """One line per file: what it held, what was skipped, and the notes about it (on stderr)."""
    for f in report.files:
        if f.status == "unchanged":
            echo(f"{f.path}: unchanged since the last import")
            continue
        if f.status == "refused":
            echo(f"{f.path}: refused: {f.error}")
            continue
        what = plural(f.records, "record") if f.kind in ("vcard", "csv") else \
            plural(f.interactions, "event" if f.kind == "ics" else "message")
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


def print_totals(report: ImportReport) -> None:
    """The workspace after the import: contacts, merges, people found in mail, the phone region, who you are."""
    extra = ""
    if report.you_records:
        extra += f"; {report.you_records} record{'s are' if report.you_records != 1 else ' is'} you"
    if report.not_people:
        extra += (f"; {report.not_people} " + ("are organisation or group cards" if report.not_people != 1
                                               else "is an organisation or group card"))
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


@click.command("import")
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--strict", is_flag=True, help="Stop at the first malformed record instead of skipping it.")
@click.option("--map", "maps", multiple=True, metavar="FIELD=COLUMN", help="CSV: read FIELD from COLUMN.")
@click.option("--mapping-file", type=click.Path(exists=True, dir_okay=False),
              help="CSV: a file of FIELD = COLUMN lines.")
@click.option("--region", metavar="CC", help="Country for phone numbers written without one (e.g. GB, US).")
@click.option("--as-of", "as_of", metavar="YYYY-MM-DD",
              help="When these files were current (older ones give past employers).")
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
    from ..workspace.importing import check_region, read_mapping

    mapping = read_mapping(mapping_file, maps)
    check_region(region)  # before the workspace is opened (and created)
    ws = obj.workspace()
    try:
        report = ws.import_files(paths, strict=strict, mapping=mapping or None, region=region, as_of=as_of,
                                 skip_bad_files=skip_bad_files, new_contacts=not no_new_contacts,
                                 progress=None if as_json else note)
    except InputError as exc:
        one_file = len(paths) == 1 and not Path(paths[0]).is_dir()
        hint = "" if strict or skip_bad_files or one_file else \
            "; nothing was imported (--skip-bad-files imports the other files)"
        raise InputError(exc.path, exc.reason + hint, exc.line) from exc
    if as_json:
        emit_json(report.to_dict())
    else:
        print_files(report)
        print_totals(report)
    if report.refused:
        more = len(report.refused) - 1
        raise InputError(report.refused[0].path,
                         f"and {more} other file(s) were refused" if more else "was refused (see above)")


@click.command("sources")
@click.option("--remove", "remove", metavar="FILE", help="Remove this source and everything only it supported.")
@click.option("--yes", is_flag=True, help="Do not ask for confirmation.")
@json_option
@click.pass_obj
def sources_cmd(obj, remove, yes, as_json):
    """List the imported files (or remove one)."""
    ws = obj.workspace()
    if remove:
        if not yes:
            confirm_or_refuse(f"Remove {remove} and everything only it supported from the workspace?")
        rep = ws.remove_source(remove)
        if as_json:
            emit_json(dict(rep))
            return
        echo(f"Removed {rep['source']}: {rep['records']} records, {rep['interactions']} events/messages, "
             f"{rep['decisions']} decisions about people only it held (your decisions about people still "
             f"in other files are kept: {rep['decisions_kept']}); the workspace file was compacted.")
        return
    rows = ws.sources()
    if as_json:
        emit_json([{k: r[k] for k in ("id", "path", "kind", "sha256", "as_of", "imported_at", "n_records", "n_skipped")}
                   for r in rows])
        return
    if not rows:
        echo("No sources yet: mynet import FILE...")
        return
    echo(table(["id", "kind", "records", "skipped", "as of", "file"],
               [(r["id"], r["kind"], r["n_records"], r["n_skipped"], r["as_of"] or "", r["path"]) for r in rows]))


COMMANDS = (import_cmd, sources_cmd)
