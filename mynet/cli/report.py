"""``mynet report`` and ``mynet export``: the network as a page to read, or as files for other tools."""

from __future__ import annotations

from contextlib import contextmanager
from pathlib import Path

import click

from ..report.files import FORMATS, MAX_CONTACTS_DRAWN, STEPS
from .common import as_of_option, echo, note, when


@contextmanager
def _progress(label: str, steps: tuple[str, ...]):
    """A rich progress bar on stderr; yields a callback taking each step's name."""
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

    console = Console(stderr=True)
    with Progress(TextColumn("{task.description}"), BarColumn(), TextColumn("{task.fields[step]}"),
                  TimeElapsedColumn(), console=console, transient=True, disable=not console.is_terminal) as bar:
        task = bar.add_task(label, total=len(steps), step="")
        seen: list[str] = []

        def advance(step: str) -> None:
            if seen:
                bar.advance(task)
            seen.append(step)
            bar.update(task, step=step)

        yield advance
        bar.update(task, completed=len(steps))


@click.command("report")
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None,
              help="File to write (default: network.html, or network.md with --markdown).")
@click.option("--markdown", is_flag=True, help="Write Markdown, with the pictures as SVG files in <name>_files/.")
@click.option("--redact", is_flag=True, help="Replace names, organisations, addresses, tags and places by pseudonyms.")
@click.option("--seed", type=int, default=0, show_default=True, help="Seed of the picture's layout.")
@click.option("--max-contacts", type=int, default=MAX_CONTACTS_DRAWN, show_default=True,
              help="Above this many contacts the picture shows the map of groups.")
@as_of_option
@click.pass_obj
def report_cmd(obj, output, markdown, redact, seed, max_contacts, as_of):
    """Write a self-contained report on your network (opens offline, prints in grey)."""
    from ..report import write_report

    out = Path(output or ("network.md" if markdown else "network.html"))
    ws = obj.workspace()
    chosen = when(ws, as_of)
    with _progress("report", STEPS) as step:
        path = write_report(ws, out, markdown=markdown, redact=redact, seed=seed, max_contacts=max_contacts,
                            progress=step, as_of=chosen)
    echo(str(path))
    if not ws.people():
        note("This workspace has no contacts yet, so the report says only that. Import your exports first: "
             "mynet import FILE... (or see the whole job on invented people: mynet demo)")
    pictures = path.with_name(path.stem + "_files")
    ws.remember_written([str(path.resolve())] + ([str(pictures.resolve())] if markdown else []))
    if markdown:
        note(f"Pictures in {pictures}/")
    if ws.people():
        note("Redacted: names and addresses are pseudonyms." if redact
             else "The report holds your contacts' names: share it with care (or use --redact).")


@click.command("export")
@click.option("--format", "fmt", type=click.Choice(FORMATS), default=None,
              help="File format (default: from the output's suffix).")
@click.option("-o", "--output", type=click.Path(dir_okay=False), required=True,
              help="File to write; for csv, FILE.csv gives FILE-contacts.csv and FILE-ties.csv.")
@click.option("--redact", is_flag=True, help="Replace names, organisations, addresses, tags and places by pseudonyms.")
@as_of_option
@click.pass_obj
def export_cmd(obj, fmt, output, redact, as_of):
    """Write the network for other tools: GraphML, two CSV tables (contacts and ties) or one JSON document.

    The CSV columns say what they hold (contact_id, name, ... / contact_a, contact_b, strength, basis, ...);
    the JSON holds the same contacts and ties under the same names. Every column: mynet explain export.
    """
    from ..report.export import export_network

    ws = obj.workspace()
    chosen = when(ws, as_of)
    with _progress("export", ("export",)) as step:
        step("export")
        paths = export_network(ws, output, fmt, redact=redact, as_of=chosen)
    for p in paths:
        echo(str(p))
    if not ws.people():
        note("This workspace has no contacts yet, so the files hold no contacts and no ties: mynet import FILE...")
    ws.remember_written([str(Path(p).resolve()) for p in paths])


COMMANDS = (report_cmd, export_cmd)
