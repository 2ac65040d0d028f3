"""``mynet settings``: every setting with its meaning and accepted values, and changing one."""

from __future__ import annotations

from typing import Any

import click

from ..errors import MynetError
from .common import echo, emit_json, json_option


def shown_value(value: Any) -> str:
    """A setting's value as a user writes it."""
    if isinstance(value, dict):
        return ", ".join(f"{k}={v}" for k, v in value.items()) or "(none)"
    if isinstance(value, list):
        return ", ".join(value) or "(none)"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return str(value)


@click.command("settings")
@click.argument("assignment", required=False, metavar="[NAME=VALUE]")
@json_option
@click.pass_obj
def settings_cmd(obj, assignment, as_json):
    """Show or change settings: tie_model.broadcast_cap=40, webmail_domains=+mail.example, org_aliases=+QL=Quillon Labs.

    Each setting is checked before it is stored; the listing says what each one means
    and which values it takes.
    """
    ws = obj.workspace()
    if assignment:
        if "=" not in assignment:
            raise MynetError("write the change as NAME=VALUE, e.g. warmth_model.half_life_days=90")
        name, text = assignment.split("=", 1)
        value = ws.set_setting(name.strip(), text)
        if not as_json:
            echo(f"{name.strip()} = {shown_value(value)}")
            return
    values = ws.settings()
    if as_json:
        data: dict = {}
        for name, value in values.items():
            if "." in name:
                group, key = name.split(".", 1)
                data.setdefault(group, {})[key] = value
            else:
                data[name] = value
        emit_json(data)
        return
    for name, spec in ws.settings_schema().items():
        value = values[name]
        changed = "" if value == spec.default else f"   (default {shown_value(spec.default)})"
        echo(f"{name} = {shown_value(value)}{changed}")
        echo(f"    {spec.meaning}; {spec.accepts()}")


COMMANDS = (settings_cmd,)
