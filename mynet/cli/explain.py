"""``explain``: what the words on the screens mean, with the methods and sources behind them."""

from __future__ import annotations

import shutil
import textwrap

import click

from ..errors import MynetError
from .common import echo, emit_json, json_option


@click.command("explain")
@click.argument("name", required=False, metavar="[TOPIC]")
@json_option
@click.pass_obj
def explain_cmd(obj, name, as_json):
    """What a word on the screens means, and the method behind it (no TOPIC: the list of topics)."""
    from ..analysis.reading import TOPICS, topic, topic_names

    if not name:
        if as_json:
            emit_json([{"topic": t.name, "title": t.title} for t in TOPICS])
            return
        echo("Topics (mynet explain TOPIC):")
        for t in TOPICS:
            echo(f"  {t.name:<10}{t.title}")
        return
    t = topic(name)
    if t is None:
        raise MynetError(f"no topic {name!r}; topics: {', '.join(topic_names())}")
    if as_json:
        emit_json({"topic": t.name, "title": t.title, "plain": t.plain, "words": dict(t.words), "method": t.method})
        return
    cols = min(100, shutil.get_terminal_size((100, 24)).columns) - 1
    echo(t.title)
    echo("")
    echo(textwrap.fill(t.plain, cols))
    echo("")
    width = max(len(w) for w, _ in t.words)
    for word, meaning in t.words:
        echo(textwrap.fill(meaning, cols, initial_indent=f"  {word:<{width}}  ",
                           subsequent_indent=" " * (width + 4)))
    echo("")
    echo(textwrap.fill(f"Method: {t.method}", cols))


COMMANDS = (explain_cmd,)
