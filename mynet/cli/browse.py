"""``mynet browse``: the terminal browser over the workspace."""

from __future__ import annotations

import click


def register(cli: click.Group) -> None:
    @cli.command("browse")
    @click.pass_obj
    def browse_cmd(obj):
        """Browse your network in the terminal: groups, people, ties, intro paths, duplicates, findings."""
        from ..tui import create_app

        app = create_app(obj.workspace)
        app.run()
        if app.error and app.snapshot is None:
            raise click.ClickException(app.error)
