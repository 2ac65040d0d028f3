"""``mynet browse``: the terminal browser over the workspace."""

from __future__ import annotations

import click

from .common import as_of_option, when


@click.command("browse")
@as_of_option
@click.pass_obj
def browse_cmd(obj, as_of):
    """Browse your network in the terminal: groups, people, ties, intro paths, duplicates, findings."""
    from ..tui import create_app

    when(obj.workspace(create=False), as_of)  # a bad date, or the day mynet chose, is said before the screen opens
    app = create_app(obj.path, as_of=as_of)
    app.run()
    if app.error and app.snapshot is None:
        raise click.ClickException(app.error)


COMMANDS = (browse_cmd,)
