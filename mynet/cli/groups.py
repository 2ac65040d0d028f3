"""``mynet groups``: the clusters of your network, naming one, and listing its members."""

from __future__ import annotations

import click

from ..errors import MynetError, NotFoundError
from .common import as_of_option, echo, emit_json, json_option, load_net, note, plural, table, when


def describe_event(ev: dict, names: dict[int, str]) -> str:
    """A split or merge of groups since the last analysis, in words."""
    from ..analysis.groups import group_ref

    def ids(x):
        return x if isinstance(x, list) else [x]

    def label(g):
        return f"{group_ref(g)} {names[g]}" if g in names else group_ref(g)

    src, dst = ids(ev.get("from")), ids(ev.get("into"))
    if ev["kind"] == "split":
        return f"{group_ref(src[0])} split into {', '.join(label(g) for g in dst)}"
    return f"{', '.join(map(group_ref, src))} merged into {label(dst[0])}"


def organisation(net, cid: int) -> str:
    """A contact's organisations, or the last past one."""
    c = net.by_id.get(cid)
    if not c:
        return ""
    return ", ".join(c.orgs) or (f"(was {c.past_orgs[0]})" if c.past_orgs else "")


class GroupId(click.ParamType):
    """A group as ``G7`` (the way every screen shows it) or ``7``."""

    name = "GROUP"

    def convert(self, value, param, ctx):
        from ..analysis.groups import parse_group_ref

        gid = parse_group_ref(value)
        if gid is None:
            self.fail(f"{value!r} is not a group: give it as G7 (see: mynet groups)", param, ctx)
        return gid


@click.group("groups", invoke_without_command=True)
@as_of_option
@json_option
@click.pass_context
def groups_cmd(ctx, as_of, as_json):
    """The groups your contacts fall into, with names you can give them (how: mynet explain groups)."""
    from ..analysis.groups import group_ref
    from ..analysis.reading import clarity_words

    if ctx.invoked_subcommand:
        return
    ws = ctx.obj.workspace()
    a = ws.analysis(as_of=when(ws, as_of), measures=False)  # the kept groups: the ties are not loaded
    if as_json:
        emit_json({
            "modularity": round(a.modularity, 4), "resolution": a.resolution,
            "groups": [{"id": g.id, "name": g.name, "label": g.label, "user_named": g.user_named, "size": g.size,
                        "warm": g.warm, "members": g.members} for g in a.groups],
            "unclustered": sorted(c for c, g in a.group_of.items() if g is None),
            "events": a.events,
        })
        return
    if not a.group_of:
        echo("No contacts yet, so no groups: mynet import FILE... (or try mynet demo).")
        return
    if not a.groups:
        echo("No groups yet: groups appear once contacts are tied (mynet ties).")
        return
    echo(table(["group", "people", "warm", "name"], [
        (group_ref(g.id), g.size, f"{g.warm} ({g.warm_share:.0%})", g.name + ("" if g.user_named else "  [suggested]"))
        for g in a.groups
    ]))
    loose = sum(1 for g in a.group_of.values() if g is None)
    echo(f"\nYour contacts fall into groups {clarity_words(a.modularity)} (group clarity {a.modularity:.2f}); "
         f"{plural(loose, 'contact')} in no group (few or no ties).")
    names = {g.id: g.name for g in a.groups}
    for ev in a.events:
        if ev.get("kind") in ("split", "merge"):
            echo("Note: " + describe_event(ev, names))
    first = group_ref(a.groups[0].id)
    note(f"Name one: mynet groups name {first} \"Old team\"   Members: mynet groups show {first}")


@groups_cmd.command("name")
@click.argument("gid", type=GroupId())
@click.argument("name", required=False)
@click.option("--clear", is_flag=True, help="Go back to the suggested label.")
@click.pass_obj
def groups_name(obj, gid, name, clear):
    """Give group GID your own name (kept as its members change)."""
    from ..analysis.groups import group_ref

    ws = obj.workspace()
    g = ws.analysis(as_of=when(ws, None), measures=False).group(gid)
    if g is None:
        raise NotFoundError(f"no group {group_ref(gid)} (see: mynet groups)")
    if not clear and not (name or "").strip():
        raise MynetError("give a name, or --clear to go back to the suggested label")
    ws.name_group(gid, None if clear else name)
    echo(f"{group_ref(gid)}: {name if not clear else g.label}")


@groups_cmd.command("show")
@click.argument("gid", type=GroupId())
@as_of_option
@json_option
@click.pass_obj
def groups_show(obj, gid, as_of, as_json):
    """List a group's members with their roles."""
    from ..analysis.groups import group_ref

    ws = obj.workspace()
    net = load_net(ws, as_of)
    a = ws.analysis(net)
    g = a.group(gid)
    if g is None:
        raise NotFoundError(f"no group {group_ref(gid)} (see: mynet groups)")
    rows = sorted(g.members, key=lambda c: (-(net.warmth[c].warmth if c in net.warmth else 0), c))
    if as_json:
        emit_json({"id": g.id, "name": g.name, "label": g.label, "size": g.size, "members": [
            {"id": c, "name": net.name(c), "role": a.measures.get(c, {}).get("role"),
             "warmth": round(net.warmth[c].warmth, 4) if c in net.warmth else 0.0, "orgs": net.by_id[c].orgs}
            for c in rows]})
        return
    echo(f"{group_ref(g.id)} {g.name}  ({g.size} people, {g.warm} warm)")
    if g.user_named:
        echo(f"  suggested label: {g.label}")
    echo(table(["id", "name", "role", "warmth", "organisation"], [
        (c, net.name(c), a.measures.get(c, {}).get("role", ""),
         f"{net.warmth[c].warmth:.2f}" if net.warmth[c].warmth else "-", organisation(net, c))
        for c in rows
    ]))


COMMANDS = (groups_cmd,)
