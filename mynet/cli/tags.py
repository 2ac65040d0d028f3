"""``mynet tags``: every label your contacts carry, whether it counts as evidence and why; your decision per label."""

from __future__ import annotations

import click

from .common import echo, emit_json, json_option, note, table


@click.group("tags", invoke_without_command=True)
@json_option
@click.pass_context
def tags_cmd(ctx, as_json):
    """Every label (tag, category, spreadsheet group) with its use count and whether it counts as evidence.

    A label that names a circle (a club, a team, a class) is evidence that the people carrying it may know each
    other. A label of your own workflow ("follow up", "to call", "met at X", "VIP", "dinner") is not: mynet
    tells them by their wording (a word list in several languages: a rule of thumb) and by their use (put on
    people of unrelated organisations who share nothing else, although mynet sees them with others). Decide
    yourself with: mynet tags count LABEL / mynet tags ignore LABEL / mynet tags auto LABEL.
    """
    if ctx.invoked_subcommand:
        return
    labels = ctx.obj.workspace().labels()
    if as_json:
        emit_json(labels)
        return
    if not labels:
        echo("None of your contacts carries a label (tag, category or spreadsheet group).")
        return
    echo(table(["uses", "counts", "label", "why"], [
        (v["uses"], "yes" if v["counts"] else "no", v["label"], v["why"]) for v in labels
    ]))
    note("Decide yourself: mynet tags count LABEL, mynet tags ignore LABEL (mynet tags auto LABEL undoes it)")


def decide(obj, label: str, verdict: str | None) -> None:
    shown = obj.workspace().decide_label(label, verdict)
    if verdict is None:
        echo(f"{shown!r}: mynet judges it again")
    else:
        echo(f"{shown!r}: {'counts as evidence' if verdict == 'count' else 'ignored as evidence'} (your decision)")


@tags_cmd.command("count")
@click.argument("label")
@click.pass_obj
def tags_count(obj, label):
    """Count LABEL as evidence that the people carrying it may know each other."""
    decide(obj, label, "count")


@tags_cmd.command("ignore")
@click.argument("label")
@click.pass_obj
def tags_ignore(obj, label):
    """Never count LABEL as evidence (a note of your own, not a circle of people)."""
    decide(obj, label, "ignore")


@tags_cmd.command("auto")
@click.argument("label")
@click.pass_obj
def tags_auto(obj, label):
    """Forget your decision on LABEL: mynet judges it by its wording and use again."""
    decide(obj, label, None)


COMMANDS = (tags_cmd,)
