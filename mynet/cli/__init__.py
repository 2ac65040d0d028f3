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
from . import asks, browse, demo, groups, measures, people, reach, report, settings, sources, tags, ties
from .common import Ctx, echo

__all__ = ["main", "cli"]


@click.group(context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100})
@click.option(
    "--workspace",
    "workspace",
    type=click.Path(dir_okay=False),
    default=None,
    help="Workspace file to use (default: $MYNET_WORKSPACE, else your user data folder).",
)
@click.version_option(package_name="mynet")
@click.pass_context
def cli(ctx: click.Context, workspace: str | None) -> None:
    """mynet: your contact exports, turned into your professional network, on your machine."""
    ctx.obj = Ctx(workspace)


#: The command families, one module each; every module lists its commands in ``COMMANDS``.
FAMILIES = (sources, people, ties, settings, tags, groups, measures, reach, asks, report, browse, demo)

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
