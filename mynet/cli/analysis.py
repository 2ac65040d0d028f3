"""Commands about the shape of the network: groups, brokers, bridges, audit."""

from __future__ import annotations


import click

from ..analysis.audit import audit
from ..analysis.snapshot import analyse, name_group
from ..errors import MynetError, NotFoundError
from ._common import as_of_option, clip, echo, emit_json, json_option, load_net, note, table


def _load(store, as_of: str | None = None):
    net = load_net(store, as_of)
    return net, analyse(store, net)


def _org(net, cid: int) -> str:
    c = net.by_id.get(cid)
    if not c:
        return ""
    return ", ".join(c.orgs) or (f"(was {c.past_orgs[0]})" if c.past_orgs else "")


def describe_event(ev: dict, names: dict[int, str]) -> str:
    """A split or merge of groups since the last analysis, in words."""
    def ids(x):
        return x if isinstance(x, list) else [x]

    def label(g):
        return f"{g} ({names[g]})" if g in names else str(g)

    src, dst = ids(ev.get("from")), ids(ev.get("into"))
    if ev["kind"] == "split":
        return f"group {src[0]} split into groups {', '.join(label(g) for g in dst)}"
    return f"groups {', '.join(map(str, src))} merged into group {label(dst[0])}"


def audit_markdown(net, a, findings) -> str:
    lines = ["# Your network: audit", ""]
    s = a.summary
    lines.append(f"{s.get('nodes', 0)} contacts, {s.get('ties', 0)} ties, {len(a.groups)} groups "
                 f"(modularity {a.modularity:.2f}).")
    lines.append("")
    for i, f in enumerate(findings, 1):
        lines += [f"## {i}. {f['title']}", "", f"*{f['severity']}* — {f['detail']}", "", f"**Suggestion:** {f['suggestion']}", ""]
    lines += ["## Groups", "", "| id | name | size | warm |", "| --- | --- | --- | --- |"]
    for g in a.groups:
        lines.append(f"| {g.id} | {g.name.replace('|', '/')} | {g.size} | {g.warm} |")
    return "\n".join(lines) + "\n"


def register(cli: click.Group) -> None:
    @cli.group("groups", invoke_without_command=True)
    @as_of_option
    @json_option
    @click.pass_context
    def groups_cmd(ctx, as_of, as_json):
        """The clusters of your network (Louvain), with names you can give them."""
        if ctx.invoked_subcommand:
            return
        store = ctx.obj.store()
        net, a = _load(store, as_of)
        if as_json:
            emit_json({
                "modularity": round(a.modularity, 4), "resolution": a.resolution,
                "groups": [{"id": g.id, "name": g.name, "label": g.label, "user_named": g.user_named, "size": g.size,
                            "warm": g.warm, "members": g.members} for g in a.groups],
                "unclustered": sorted(c for c, g in a.group_of.items() if g is None),
                "events": a.events,
            })
            return
        if not a.groups:
            echo("No groups yet: groups appear once contacts are tied (mynet ties).")
            return
        echo(table(["id", "size", "warm", "name"], [
            (g.id, g.size, f"{g.warm} ({g.warm_share:.0%})", g.name + ("" if g.user_named else "  [suggested]"))
            for g in a.groups
        ]))
        loose = sum(1 for g in a.group_of.values() if g is None)
        echo(f"\nModularity {a.modularity:.2f}; {loose} contacts unclustered (few or no ties).")
        names = {g.id: g.name for g in a.groups}
        for ev in a.events:
            if ev.get("kind") in ("split", "merge"):
                echo("Note: " + describe_event(ev, names))
        note("Name one: mynet groups name ID \"Old team\"   Members: mynet groups show ID")

    @groups_cmd.command("name")
    @click.argument("gid", type=int)
    @click.argument("name", required=False)
    @click.option("--clear", is_flag=True, help="Go back to the suggested label.")
    @click.pass_obj
    def groups_name(obj, gid, name, clear):
        """Give group GID your own name (kept as its members change)."""
        store = obj.store()
        net, a = _load(store)
        g = a.group(gid)
        if g is None:
            raise NotFoundError(f"no group {gid} (see: mynet groups)")
        if not clear and not (name or "").strip():
            raise MynetError("give a name, or --clear to go back to the suggested label")
        name_group(store, gid, None if clear else name)
        echo(f"Group {gid}: {name if not clear else g.label}")

    @groups_cmd.command("show")
    @click.argument("gid", type=int)
    @as_of_option
    @json_option
    @click.pass_obj
    def groups_show(obj, gid, as_of, as_json):
        """List a group's members with their roles."""
        store = obj.store()
        net, a = _load(store, as_of)
        g = a.group(gid)
        if g is None:
            raise NotFoundError(f"no group {gid} (see: mynet groups)")
        rows = sorted(g.members, key=lambda c: (-(net.warmth[c].warmth if c in net.warmth else 0), c))
        if as_json:
            emit_json({"id": g.id, "name": g.name, "label": g.label, "size": g.size, "members": [
                {"id": c, "name": net.name(c), "role": a.measures.get(c, {}).get("role"),
                 "warmth": round(net.warmth[c].warmth, 4) if c in net.warmth else 0.0, "orgs": net.by_id[c].orgs}
                for c in rows]})
            return
        echo(f"Group {g.id}: {g.name}  ({g.size} people, {g.warm} warm)")
        if g.user_named:
            echo(f"  suggested label: {g.label}")
        echo(table(["id", "name", "role", "warmth", "organisation"], [
            (c, net.name(c), a.measures.get(c, {}).get("role", ""), f"{net.warmth[c].warmth:.2f}" if net.warmth[c].warmth else "-", _org(net, c))
            for c in rows
        ]))

    @cli.command("brokers")
    @click.option("--limit", type=int, default=15, show_default=True)
    @as_of_option
    @json_option
    @click.pass_obj
    def brokers_cmd(obj, limit, as_of, as_json):
        """Who holds the network together: betweenness, constraint, roles, single points of access.

        Betweenness reads a tie's strength w as a distance 1/w (strong ties are short steps): networkx's
        betweenness_centrality gives the same values with weight=1/w, not with the strength itself.
        --json adds every measure per person, eigenvector centrality included.
        """
        store = obj.store()
        net, a = _load(store, as_of)
        ranked = sorted(a.measures.items(), key=lambda kv: (-(kv[1].get("betweenness") or 0), kv[0]))
        if as_json:
            emit_json({"measures_info": a.measures_info, "contacts": [
                {"id": c, "name": net.name(c), "group": a.group_of.get(c)} | m for c, m in ranked[: limit or None]],
                "single_points_of_access": a.access})
            return
        info = a.measures_info
        echo(table(["id", "name", "role", "group", "betweenness", "constraint", "eff. size", "participation"], [
            (c, net.name(c), m.get("role", ""), a.group_of.get(c) if a.group_of.get(c) is not None else "-",
             f"{m.get('betweenness') or 0:.3f}", f"{m['constraint']:.2f}" if m.get("constraint") is not None else "-",
             f"{m['effective_size']:.1f}" if m.get("effective_size") is not None else "-", f"{m.get('participation') or 0:.2f}")
            for c, m in ranked[:limit]
        ]))
        if info.get("betweenness_sampled"):
            agree = info.get("betweenness_agreement")
            note(f"betweenness estimated from {info.get('betweenness_samples')} sampled sources (Brandes & Pich 2007)"
                 + (f"; about {agree:.0%} of the true top 10% are expected among the top 10% shown" if agree else ""))
        groups = {g.id: g.name for g in a.groups}
        spof = [x for x in a.access if x.get("groups")]
        if spof:
            echo("\nGroups you reach only through one person:")
            for x in spof:
                echo(f"  {net.name(x['person'])} -> " + "; ".join(groups.get(g, str(g)) for g in x["groups"])
                     + f" ({len(x.get('cut_off', []))} people cut off without them)")

    @cli.command("bridges")
    @click.option("--limit", type=int, default=15, show_default=True)
    @as_of_option
    @json_option
    @click.pass_obj
    def bridges_cmd(obj, limit, as_of, as_json):
        """The ties between groups that matter most (weak, low-overlap bridges first).

        The "seen" column says whether the tie rests on something that happened (a meeting, a thread, your word)
        or only on something the two share ("may know").
        """
        store = obj.store()
        net, a = _load(store, as_of)
        groups = {g.id: g.name for g in a.groups}
        if as_json:
            emit_json({"bridges": a.bridges[: limit or None], "links": a.links})
            return
        if not a.bridges:
            echo("No ties between groups.")
            return
        echo(table(["score", "between", "and", "seen", "groups", "strength", "overlap", "local bridge"], [
            (f"{b['score']:.2f}", net.name(b["a"]), net.name(b["b"]),
             "yes" if b.get("basis") == "observed" else "may know",
             " / ".join(clip(groups.get(g, str(g)), 22) for g in b["groups"]), f"{b['strength']:.2f}",
             f"{b['overlap']:.2f}", f"yes (span {b['span']})" if b.get("local_bridge") else "no")
            for b in a.bridges[:limit]
        ]))

    @cli.command("audit")
    @click.option("--markdown", is_flag=True, help="Print the audit as Markdown.")
    @as_of_option
    @json_option
    @click.pass_obj
    def audit_cmd(obj, markdown, as_of, as_json):
        """A readable report on the shape of your network, most useful finding first."""
        store = obj.store()
        net, a = _load(store, as_of)
        if not net.contacts:
            raise NotFoundError("there is nothing to audit yet: import your contacts first (mynet import FILE)")
        findings = audit(store, net, a, today=net.as_of.day)
        if as_json:
            emit_json({"findings": findings, "summary": a.summary, "modularity": a.modularity})
            return
        if markdown:
            echo(audit_markdown(net, a, findings), nl=False)
            return
        for i, f in enumerate(findings, 1):
            echo(f"{i}. [{f['severity']}] {f['title']}")
            echo(f"   {f['detail']}")
            echo(f"   -> {f['suggestion']}\n")
