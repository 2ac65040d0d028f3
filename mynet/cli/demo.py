"""``mynet demo``: the main job end to end on the bundled invented scenario."""

from __future__ import annotations

import json
import tempfile
from pathlib import Path

import click

from ..errors import MynetError
from ..workspace import import_paths, merge_suggestions, open_workspace, set_me
from ._common import note, table


def sample_dir() -> Path:
    """The bundled sample_contacts folder (installed package data, else the source tree)."""
    here = Path(__file__).resolve()
    for cand in (here.parents[1] / "sample_contacts", here.parents[2] / "sample_contacts", Path.cwd() / "sample_contacts"):
        if (cand / "ground_truth.json").is_file():
            return cand
    raise MynetError("the sample_contacts folder is missing from this installation")


CONTACT_FILES = ("phone.vcf", "phone-recent.vcf", "old-work.vcf", "conference.csv", "club-members.csv")


def register(cli: click.Group) -> None:
    @cli.command("demo")
    @click.option("--keep", type=click.Path(file_okay=False), help="Keep the demo workspace in this folder.")
    def demo_cmd(keep):
        """Run mynet on the bundled invented sample contacts, in a throw-away workspace."""
        src = sample_dir()
        truth = json.loads((src / "ground_truth.json").read_text(encoding="utf-8"))
        you = truth.get("you", {})
        folder = Path(keep) if keep else Path(tempfile.mkdtemp(prefix="mynet-demo-"))
        folder.mkdir(parents=True, exist_ok=True)
        ws = folder / "demo.sqlite"
        note(f"Demo workspace: {ws} (your own workspace is not touched)")
        with open_workspace(ws) as store:
            click.echo("== 1. Who you are")
            set_me(store, you.get("emails", []), [you.get("name", "")] if you.get("name") else [])
            click.echo(f"   mynet me --email {' --email '.join(you.get('emails', []))} --name \"{you.get('name', '')}\"")
            click.echo("\n== 2. Import the exports")
            files = [src / f for f in CONTACT_FILES if (src / f).exists()]
            report = import_paths(store, files, region="GB")
            for f in report.files:
                click.echo(f"   {f.path.rsplit('/', 1)[-1]:<20} {f.records:>4} records ({f.kind}){', ' + str(len(f.skipped)) + ' skipped' if f.skipped else ''}")
            click.echo(
                f"   {report.records_total} records -> {report.contacts_after} contacts; "
                f"{report.merged_records} duplicate records merged, {report.you_records} were you"
            )
            contacts = store.contacts()
            multi = sorted(contacts, key=lambda c: (-len(c.sources), c.id))[:5]
            click.echo("\n== 3. People found in several exports")
            click.echo(table(["id", "name", "works at", "worked at", "sources"], [
                (c.id, c.name, ", ".join(c.orgs), ", ".join(c.past_orgs), len(c.sources)) for c in multi
            ]))
            sugg = merge_suggestions(store)
            click.echo(f"\n== 4. Possible duplicates for you to decide ({len(sugg)})")
            names = {c.id: c.name for c in contacts}
            for s in sugg[:5]:
                click.echo(f"   {s.score:.2f}  {s.a} {names[s.a]}  /  {s.b} {names[s.b]}: {s.reason}")
        click.echo(f"\nTry it yourself: mynet --workspace {ws} contacts --search <name>")
