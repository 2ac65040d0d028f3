"""The command line: the only place that prints or exits.

Results go to stdout (plain text, or one JSON document with ``--json``);
progress and diagnostics go to stderr. A :class:`mynet.errors.MynetError`
becomes one line on stderr and its exit code; nothing is swallowed.
"""

from __future__ import annotations

import io
import sys

import click

from ..errors import MynetError
from . import asks, browse, demo, explain, groups, measures, people, reach, report, settings, sources, tags, ties
from .common import Ctx, echo

__all__ = ["main", "cli"]


#: ``mynet --help`` lists the commands in these sections, in a start-here order; a command in none of them
#: is listed last under "More".
SECTIONS = (
    ("Getting data in", ("demo", "import", "me", "sources")),
    ("People", ("contacts", "show", "merge", "unmerge", "apart", "drop-address", "rate", "forget")),
    ("Your network", ("groups", "brokers", "bridges", "audit", "changes", "ties", "why", "tie", "untie", "tags")),
    ("Introductions", ("reach", "targets", "plan", "ask", "asks", "dormant")),
    ("Sharing and looking around", ("browse", "report", "export")),
    ("Settings and words", ("settings", "explain")),
)

#: The one-line help of each command in ``mynet --help``: plain words that fit 80 columns.
LINES = {
    "demo": "See the whole job on invented people (nothing of yours is touched)",
    "import": "Read address books, spreadsheets, calendars and mail",
    "me": "Say who you are, so your own cards are never a contact",
    "sources": "The files you imported (or remove one)",
    "contacts": "Your contacts, your warmth to each, possible duplicates",
    "show": "One person, with every record behind them",
    "merge": "These are one person",
    "unmerge": "Split a wrongly merged person again",
    "apart": "These are different people: never suggest merging them",
    "drop-address": "This e-mail address is not this person's",
    "rate": "Say yourself how close you are to someone (0-1)",
    "forget": "Remove a person completely",
    "groups": "The groups your contacts fall into; name them",
    "brokers": "Who holds your network together, and their roles",
    "bridges": "The ties that link one group to another",
    "audit": "What stands out in your network, and what to do",
    "ties": "Who probably knows whom, strongest first",
    "why": "Why mynet thinks two people know each other",
    "tie": "Add a tie you know of",
    "untie": "Remove a wrong tie",
    "tags": "Labels on your cards, and whether they say who knows whom",
    "reach": "Who can introduce you to a person or organisation",
    "targets": "The people and organisations you want to reach, and how",
    "plan": "Whom to ask first, so the fewest warm asks open the most doors",
    "ask": "Note that you asked someone for an introduction",
    "asks": "Your asks: days waiting, when to follow up, outcomes",
    "dormant": "People you were close to once who would reopen doors",
    "browse": "Look around your network in the terminal",
    "report": "Write a report you can open in a browser or print",
    "export": "Write the network for other tools (GraphML, CSV, JSON)",
    "settings": "Show or change settings",
    "explain": "What the words and numbers mean, and the methods behind them",
}


class SectionedGroup(click.Group):
    """A command group whose help lists its commands by section (see :data:`SECTIONS`), not alphabetically."""

    def format_commands(self, ctx: click.Context, formatter: click.HelpFormatter) -> None:
        commands = {name: self.get_command(ctx, name) for name in self.list_commands(ctx)}
        commands = {n: c for n, c in commands.items() if c is not None and not c.hidden}
        listed: set[str] = set()
        limit = formatter.width - 6 - max((len(n) for n in commands), default=0)
        for title, names in (*SECTIONS, ("More", tuple(sorted(commands)))):
            rows = [(n, LINES.get(n) or commands[n].get_short_help_str(limit))
                    for n in names if n in commands and n not in listed]
            listed.update(n for n, _ in rows)
            if rows:
                with formatter.section(title):
                    formatter.write_dl(rows)


@click.group(cls=SectionedGroup, context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100})
@click.option(
    "--workspace",
    "workspace",
    type=click.Path(dir_okay=False),
    default=None,
    help="Workspace file to use (default: $MYNET_WORKSPACE, else your user data folder).",
)
@click.option("--progress/--no-progress", "progress", default=None,
              help="Show the steps of a long analysis on stderr (default: when stderr is a terminal).")
@click.version_option(package_name="mynet")
@click.pass_context
def cli(ctx: click.Context, workspace: str | None, progress: bool | None) -> None:
    """mynet: your contact exports, turned into your professional network, on your machine.

    New here? mynet demo shows the whole job on invented people; then mynet import YOUR-FILES.
    """
    ctx.obj = Ctx(workspace, progress=progress)


#: The command families, one module each; every module lists its commands in ``COMMANDS``.
FAMILIES = (sources, people, ties, settings, tags, groups, measures, reach, asks, report, browse, demo, explain)

for _family in FAMILIES:
    for _command in _family.COMMANDS:
        cli.add_command(_command)


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``mynet`` console script."""
    try:
        cli.main(args=argv, prog_name="mynet", standalone_mode=False)
    except MynetError as exc:
        echo(f"mynet: {exc}", err=True)
        return exc.exit_code
    except click.exceptions.Abort:
        echo("mynet: aborted", err=True)
        return 130
    except click.ClickException as exc:
        # click's own messages quote what was typed (a file name, say): shown safely like the rest.
        buf = io.StringIO()
        exc.show(file=buf)
        echo(buf.getvalue(), nl=False, err=True)
        return exc.exit_code
    except BrokenPipeError:
        return 0
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
