"""Commands about the shape of the network: brokers, bridges, audit."""

from __future__ import annotations

import click

from .common import as_of_option, echo, emit_json, json_option, load_net, note, table


def nothing_yet(a) -> bool:
    """Say in words that there is nothing to show yet (no contacts, or no ties); True when so."""
    if not a.measures:
        echo("No contacts yet, so nobody to show: mynet import FILE... (or try mynet demo).")
        return True
    if not a.summary.get("ties"):
        echo("None of your contacts are tied to each other yet, so nobody holds anything together: import "
             "calendars or mail, or add a tie you know of (mynet tie A B).")
        return True
    return False


def audit_markdown(a, findings) -> str:
    """The audit as a Markdown document: the findings, then the groups."""
    from ..analysis.audit import PRIORITY
    from ..analysis.groups import group_ref

    lines = ["# Your network: audit", ""]
    s = a.summary
    lines.append(f"{s.get('nodes', 0)} contacts, {s.get('ties', 0)} ties, {len(a.groups)} groups "
                 f"(group clarity {a.modularity:.2f}).")
    lines.append("")
    for i, f in enumerate(findings, 1):
        mark, words = PRIORITY[f["severity"]]
        lines += [f"## {i}. {f['title']}", "", f"*{mark} {words}* — {f['detail']}", "",
                  f"**What to do:** {f['suggestion']}", ""]
    lines += ["## Groups", "", "| group | name | people | warm |", "| --- | --- | --- | --- |"]
    for g in a.groups:
        lines.append(f"| {group_ref(g.id)} | {g.name.replace('|', '/')} | {g.size} | {g.warm} |")
    lines += ["", "What the words mean, and the methods behind them: `mynet explain findings`."]
    return "\n".join(lines) + "\n"


def print_single_points(net, a) -> None:
    """The groups you reach only through one person."""
    from ..analysis.groups import group_ref

    groups = {g.id: g.name for g in a.groups}
    spof = [x for x in a.access if x.get("groups")]
    if spof:
        echo("\nGroups you reach only through one person:")
        for x in spof:
            echo(f"  {net.name(x['person'])} -> " + "; ".join(f"{group_ref(g)} {groups.get(g, '')}".rstrip()
                                                              for g in x["groups"])
                 + f" ({len(x.get('cut_off', []))} people cut off without them)")


@click.command("brokers")
@click.option("--limit", type=int, default=15, show_default=True, help="Show at most this many people.")
@as_of_option
@json_option
@click.pass_obj
def brokers_cmd(obj, limit, as_of, as_json):
    """Who holds your network together: the people between others, with their roles.

    Columns: between others (the share of shortest routes between two other contacts through them),
    closed in (how much their contacts know each other; low links people who are apart), separate contacts,
    spread over groups. The methods behind them: mynet explain brokers; the roles: mynet explain roles.
    --json adds every measure per person under its method's name.
    """
    from ..analysis.groups import group_ref

    ws = obj.workspace()
    net = load_net(ws, as_of)
    a = ws.analysis(net)
    ranked = sorted(a.measures.items(), key=lambda kv: (-(kv[1].get("betweenness") or 0), kv[0]))
    ranked = [(c, m) for c, m in ranked if (m.get("betweenness") or 0) > 0]
    if as_json:
        emit_json({"measures_info": a.measures_info, "contacts": [
            {"id": c, "name": net.name(c), "group": a.group_of.get(c)} | m for c, m in ranked[: limit or None]],
            "single_points_of_access": a.access})
        return
    if nothing_yet(a):
        return
    if not ranked:
        echo("Nobody sits between others: every contact's ties stay within one close circle.")
        return
    info = a.measures_info
    echo(table(["id", "name", "role", "group", "between others", "closed in", "separate contacts", "spread"], [
        (c, net.name(c), m.get("role", ""), group_ref(a.group_of.get(c)),
         f"{m.get('betweenness') or 0:.3f}", f"{m['constraint']:.2f}" if m.get("constraint") is not None else "-",
         f"{m['effective_size']:.1f}" if m.get("effective_size") is not None else "-",
         f"{m.get('participation') or 0:.2f}")
        for c, m in ranked[:limit]
    ]))
    if info.get("betweenness_sampled"):
        agree = info.get("betweenness_agreement")
        note(f"'between others' is estimated from {info.get('betweenness_samples')} of your contacts"
             + (f"; about {agree:.0%} of the true top tenth are expected among the top tenth shown" if agree else "")
             + " (mynet explain brokers)")
    print_single_points(net, a)
    note("What the columns and roles mean: mynet explain brokers, mynet explain roles")


@click.command("bridges")
@click.option("--limit", type=int, default=15, show_default=True, help="Show at most this many ties.")
@as_of_option
@json_option
@click.pass_obj
def bridges_cmd(obj, limit, as_of, as_json):
    """The ties that link one group to another, the most useful first.

    "seen" says the tie rests on something that happened (a meeting, a thread, your word); "may know" that it
    rests only on something the two share. "shared contacts" is the share of their contacts they have in common
    (low: a real bridge); "only link" says their ends share no other contact. How: mynet explain bridges.
    """
    from ..analysis.groups import group_ref

    ws = obj.workspace()
    net = load_net(ws, as_of)
    a = ws.analysis(net)
    groups = {g.id: g.name for g in a.groups}
    if as_json:
        emit_json({"bridges": a.bridges[: limit or None], "links": a.links})
        return
    if nothing_yet(a):
        return
    if not a.bridges:
        echo("No ties between groups: " + ("your contacts form a single group." if len(a.groups) == 1 else
                                            "your groups are not tied to each other."))
        return
    shown_groups = sorted({g for b in a.bridges[:limit] for g in b["groups"]})
    echo(table(["between", "and", "groups", "seen", "strength", "shared contacts", "only link"], [
        (net.name(b["a"]), net.name(b["b"]), " - ".join(group_ref(g) for g in b["groups"]),
         "yes" if b.get("basis") == "observed" else "may know", f"{b['strength']:.2f}",
         f"{b['overlap']:.2f}", f"yes ({b['span']} steps apart without it)" if b.get("local_bridge") else "no")
        for b in a.bridges[:limit]
    ]))
    echo("\n" + "; ".join(f"{group_ref(g)} {groups.get(g, '')}".rstrip() for g in shown_groups))


@click.command("audit")
@click.option("--markdown", is_flag=True, help="Print the audit as Markdown.")
@as_of_option
@json_option
@click.pass_obj
def audit_cmd(obj, markdown, as_of, as_json):
    """What stands out in your network and what to do about it, most useful first.

    Each finding is marked » act on this, › worth a look or · for context (mynet explain findings).
    """
    from ..analysis.audit import PRIORITY

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
    if not net.contacts:
        echo("No contacts yet, so nothing to say about your network: mynet import FILE... (or try mynet demo).")
        return
    for i, f in enumerate(findings, 1):
        mark, words = PRIORITY[f["severity"]]
        echo(f"{i}. {mark} {f['title']}  ({words})")
        echo(f"   {f['detail']}")
        echo(f"   What to do: {f['suggestion']}\n")
    note("What the words mean, and the methods behind them: mynet explain findings")


COMMANDS = (brokers_cmd, bridges_cmd, audit_cmd)
