"""``mynet reach``: the warmest chains of introductions to a person, organisation, tag or domain."""

from __future__ import annotations

from typing import TYPE_CHECKING

import click

from .common import as_of_option, echo, emit_json, json_option, load_net, note

if TYPE_CHECKING:
    from ..analysis.intro_routes import ReachResult
    from ..evidence.network import Network


def print_path(rank: int, p: dict) -> None:
    chain = " -> ".join(["you", *p["names"]])
    echo(f"{rank}. {chain}   score {p['score']:.3f}")
    for step in p["steps"]:
        frm = "you" if step["from"] == "you" else p["names"][p["path"].index(step["from"])]
        mark = "  <- weakest" if step is p["steps"][p["weakest_step"]["index"]] else ""
        echo(f"     {frm} -> {step['to_name']} ({step['strength']:.2f}): {step['why'] or 'linked'}{mark}")
    if p.get("assumed_steps"):
        n = p["assumed_steps"]
        echo(f"     note: {'one step' if n == 1 else f'{n} steps'} of this path {'rests' if n == 1 else 'rest'} only "
             "on something the two share; nothing shows they have met or written")
    if p.get("held_back"):
        h = p["held_back"]
        echo(f"     asked recently: you asked {p['names'][0]} on {h['asked_on']} about {h['about']} ({h['state']}), "
             "so paths through others come first")
    echo(f"     ask: {p['ask']}")


def print_answer(result: ReachResult, max_intermediaries: int) -> None:
    """Whom you already know there, the paths (or why there is none), and the direct routes."""
    targets = result.targets
    what = {"person": "", "organisation": "people at ", "tag": "people tagged ", "domain": "people at @"}[targets.kind]
    matched = ", ".join(targets.matched)
    echo(f"Reaching {what}{matched}" + (f" ({len(targets.members)})" if targets.kind != "person" else ""))
    if targets.kind == "organisation" and targets.query.strip().lower() != matched.lower():
        note(f"'{targets.query}' matched: {matched}")
    d = result.known
    if d:
        echo(f"You already know {d['name']} (warmth {d['warmth']:.2f}, last {d['last'] or '-'}): "
             "ask them yourself, that is your best way in.")
        if result.paths:
            echo("Alternatives, each through someone else and so less sure than asking them yourself:")
    insiders = [d for d in result.direct if d.get("insider")]
    if insiders:
        echo("You already know: " + "; ".join(f"{d['name']} (warmth {d['warmth']:.2f}, last {d['last'] or '-'})"
                                              for d in insiders))
    if result.held_back:
        echo("Asked recently, so paths through others come first: " + "; ".join(
            f"{h['name']} ({h['state']} ask of {h['asked_on']} about {h['target_label']})" for h in result.held_back))
    if not result.paths:
        echo("No intro path found" + (f" within {max_intermediaries} intermediaries" if max_intermediaries else "")
             + ". " + (result.why_none or "Try --max-intermediaries 3, fewer --avoid, or add ties you know of "
                                           "(mynet tie A B)."))
    for rank, p in enumerate(result.paths, 1):
        echo("")
        print_path(rank, p)
    for d in [d for d in result.direct if not d.get("insider") and (d["weak"] or d["dormant"])]:
        state = "dormant" if d["dormant"] else "weak"
        echo(f"\nDirect route for comparison: you -> {d['name']} (warmth {d['warmth']:.2f}, {state}, "
             f"last {d['last'] or '-'})")


def print_per_target(net: Network, result: ReachResult) -> None:
    from ..analysis.intro_routes import distinct_names

    """For a set of targets: the best way to each person, and those with no path."""
    if len(result.per_target) > 1:
        echo("\nBest way to each person there:")
        labels = distinct_names(net, [e["target"] for e in result.per_target])
        for e, label in zip(result.per_target, labels):
            b = e["best"]
            echo(f"  {label}{' (past)' if e['past'] else ''}: {' -> '.join(['you', *b['names']])}  "
                 f"score {b['score']:.3f}")
    if result.unreachable:
        labels = distinct_names(net, result.unreachable)
        echo(f"No path to: {', '.join(labels)}")
        if any(label != net.name(m) for label, m in zip(labels, result.unreachable)):
            note("Names shown with an id are separate contacts with the same name; if one person has two entries, "
                 "merge them (mynet contacts --suggested)")


@click.command("reach")
@click.option("--to", "to", metavar="WHO", help="A person (id, name or e-mail).")
@click.option("--org", metavar="NAME", help="Anyone at this organisation, now or in the past (fuzzy match).")
@click.option("--tag", metavar="TAG", help="Anyone carrying this tag.")
@click.option("--domain", metavar="DOMAIN", help="Anyone with an address at this mail domain.")
@click.option("-k", "--paths", "k", type=int, default=5, show_default=True,
              help="How many paths (each through a different person).")
@click.option("--max-intermediaries", type=int, default=2, show_default=True,
              help="People between you and the target, at most.")
@click.option("--avoid", multiple=True, metavar="WHO", help="Never go through this person (repeatable).")
@click.option("--min-strength", type=float, default=0.0, show_default=True, help="Use only steps at least this strong.")
@as_of_option
@json_option
@click.pass_obj
def reach_cmd(obj, to, org, tag, domain, k, max_intermediaries, avoid, min_strength, as_of, as_json):
    """Find who can introduce you, step by step, with a suggested ask.

    At an equal score, a path whose steps rest on meetings, mail or your own word comes before one resting on
    a shared organisation, domain or label; such steps are marked, and the ask says so.
    """
    ws = obj.workspace()
    net = load_net(ws, as_of)
    result = ws.reach(to=to, org=org, tag=tag, domain=domain, k=k, max_intermediaries=max_intermediaries,
                      avoid=avoid, min_strength=min_strength, net=net)
    if as_json:
        emit_json(result.paths)
        return
    print_answer(result, max_intermediaries)
    print_per_target(net, result)


COMMANDS = (reach_cmd,)
