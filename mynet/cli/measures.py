"""Commands about the shape of the network: brokers, bridges, audit."""

from __future__ import annotations

import click

from .common import as_of_option, clip, echo, emit_json, json_option, load_net, note, table


def audit_markdown(a, findings) -> str:
    """The audit as a Markdown document: the findings, then the groups."""
    lines = ["# Your network: audit", ""]
    s = a.summary
    lines.append(f"{s.get('nodes', 0)} contacts, {s.get('ties', 0)} ties, {len(a.groups)} groups "
                 f"(modularity {a.modularity:.2f}).")
    lines.append("")
    for i, f in enumerate(findings, 1):
        lines += [f"## {i}. {f['title']}", "", f"*{f['severity']}* — {f['detail']}", "",
                  f"**Suggestion:** {f['suggestion']}", ""]
    lines += ["## Groups", "", "| id | name | size | warm |", "| --- | --- | --- | --- |"]
    for g in a.groups:
        lines.append(f"| {g.id} | {g.name.replace('|', '/')} | {g.size} | {g.warm} |")
    return "\n".join(lines) + "\n"


def print_single_points(net, a) -> None:
    """The groups you reach only through one person."""
    groups = {g.id: g.name for g in a.groups}
    spof = [x for x in a.access if x.get("groups")]
    if spof:
        echo("\nGroups you reach only through one person:")
        for x in spof:
            echo(f"  {net.name(x['person'])} -> " + "; ".join(groups.get(g, str(g)) for g in x["groups"])
                 + f" ({len(x.get('cut_off', []))} people cut off without them)")


@click.command("brokers")
@click.option("--limit", type=int, default=15, show_default=True, help="Show at most this many people.")
@as_of_option
@json_option
@click.pass_obj
def brokers_cmd(obj, limit, as_of, as_json):
    """Who holds the network together: betweenness, constraint, roles, single points of access.

    Betweenness reads a tie's strength w as a distance 1/w (strong ties are short steps): networkx's
    betweenness_centrality gives the same values with weight=1/w, not with the strength itself.
    --json adds every measure per person, eigenvector centrality included.
    """
    ws = obj.workspace()
    net = load_net(ws, as_of)
    a = ws.analysis(net)
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
         f"{m['effective_size']:.1f}" if m.get("effective_size") is not None else "-",
         f"{m.get('participation') or 0:.2f}")
        for c, m in ranked[:limit]
    ]))
    if info.get("betweenness_sampled"):
        agree = info.get("betweenness_agreement")
        note(f"betweenness estimated from {info.get('betweenness_samples')} sampled sources (Brandes & Pich 2007)"
             + (f"; about {agree:.0%} of the true top 10% are expected among the top 10% shown" if agree else ""))
    print_single_points(net, a)


@click.command("bridges")
@click.option("--limit", type=int, default=15, show_default=True, help="Show at most this many ties.")
@as_of_option
@json_option
@click.pass_obj
def bridges_cmd(obj, limit, as_of, as_json):
    """The ties between groups that matter most (weak, low-overlap bridges first).

    The "seen" column says whether the tie rests on something that happened (a meeting, a thread, your word)
    or only on something the two share ("may know").
    """
    ws = obj.workspace()
    net = load_net(ws, as_of)
    a = ws.analysis(net)
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


@click.command("audit")
@click.option("--markdown", is_flag=True, help="Print the audit as Markdown.")
@as_of_option
@json_option
@click.pass_obj
def audit_cmd(obj, markdown, as_of, as_json):
    """A readable report on the shape of your network, most useful finding first."""
    ws = obj.workspace()
    net = load_net(ws, as_of)
    a = ws.analysis(net)
    findings = ws.audit(net=net, analysis=a)
    if as_json:
        emit_json({"findings": findings, "summary": a.summary, "modularity": a.modularity})
        return
    if markdown:
        echo(audit_markdown(a, findings), nl=False)
        return
    for i, f in enumerate(findings, 1):
        echo(f"{i}. [{f['severity']}] {f['title']}")
        echo(f"   {f['detail']}")
        echo(f"   -> {f['suggestion']}\n")


COMMANDS = (brokers_cmd, bridges_cmd, audit_cmd)
