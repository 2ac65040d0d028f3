"""Commands about ties and warmth: ties, why, tie, untie, rate."""

from __future__ import annotations

import click

from ..errors import MynetError
from .common import as_of_option, echo, emit_json, json_option, load_net, note, table

#: How a listing shows two contacts that are a suggested duplicate still to decide (never as a tie).
SAME_WORDS = "may be the same person"


@click.command("ties")
@click.option("--all", "show_all", is_flag=True,
              help="Every pair with any evidence, however weak (no threshold, no backbone filter).")
@click.option("--of", "of", metavar="WHO", help="Only the ties of this person.")
@click.option("--limit", type=int, default=30, show_default=True, help="Show at most this many (0: all).")
@as_of_option
@json_option
@click.pass_obj
def ties_cmd(obj, show_all, of, limit, as_of, as_json):
    """List inferred ties between your contacts, strongest first.

    A tie that rests only on something the two share (an organisation, a mail domain, a label) and on nothing
    that happened (a meeting, a thread, a card naming the other, your own word) reads "may know (...)".
    """
    ws = obj.workspace()
    net = load_net(ws, as_of)
    cid = ws.find(of).id if of else None
    rows = ws.ties(all_pairs=show_all, of=cid, limit=0 if as_json else limit, net=net)
    if as_json:
        emit_json([{"a": r["a"], "b": r["b"], "strength": round(r["strength"], 4), "basis": r["basis"],
                    "evidence": r["evidence"]} for r in rows])
        return
    if not rows.total:
        echo("No ties yet: import exports that share organisations, tags, meetings or mail threads.")
        return
    names = [c.name for c in net.contacts]
    twice = {n for n in names if names.count(n) > 1} if len(names) < 20000 else set()
    same = {frozenset((s.a, s.b)) for s in ws.suggestions()}

    def who(name: str, cid: int) -> str:
        return f"{name} (id {cid})" if name in twice else name

    echo(table(["strength", "between", "and", "why"], [
        (f"{r['strength']:.2f}", who(r["a_name"], r["a"]), who(r["b_name"], r["b"]),
         SAME_WORDS if frozenset((r["a"], r["b"])) in same else r["words"]) for r in rows
    ]))
    note(f"{len(rows)} of {rows.total} ties shown"
         + ("" if show_all else f" (strength >= {net.model.min_strength}; --all for every pair)"))


def print_evidence(ex: dict) -> None:
    """Each piece of evidence of :meth:`Workspace.explain`, where it came from, and how the strength adds up."""
    from ..evidence.explain import describe

    for ev in ex["evidence"]:
        line = describe(ev)
        if ev.get("provenance") and isinstance(ev["provenance"], list):
            line += " per " + ", ".join(ev["provenance"][:6]) + ("..." if len(ev["provenance"]) > 6 else "")
        echo(f"  - {line}")
        for r in ev.get("recent", []):
            echo(f"      {r['date']}  {r.get('title') or r.get('subject') or ''}  ({r['provenance']})")
    if ex["contributions"]:
        parts = ", ".join(f"{k} {v:.2f}" for k, v in ex["contributions"].items())
        echo(f"  How the strength adds up: {parts}; together {ex['strength']:.2f} (how: mynet explain ties)")


@click.command("why")
@click.argument("a")
@click.argument("b")
@as_of_option
@json_option
@click.pass_obj
def why_cmd(obj, a, b, as_of, as_json):
    """Explain why mynet thinks two people know each other, evidence by evidence."""
    ws = obj.workspace()
    ca, cb = ws.find(a), ws.find(b)
    if ca.id == cb.id:
        raise MynetError(f"{a!r} and {b!r} are the same person ({ca.name})")
    ex = ws.explain(ca.id, cb.id, net=load_net(ws, as_of))
    if as_json:
        emit_json(ex)
        return
    same = any({s.a, s.b} == {ca.id, cb.id} for s in ws.suggestions())
    if same:
        echo(f"{ca.name} (id {ca.id}) and {cb.name} (id {cb.id}) {SAME_WORDS}: mynet merge {ca.id} {cb.id} "
             f"or mynet apart {ca.id} {cb.id}. What they share:")
    else:
        echo(f"{ca.name} and {cb.name}: strength {ex['strength']:.2f}"
             + ("" if ex["in_graph"] or not ex["strength"] else " (below the threshold, not in the graph)"))
    if ex["basis"] == "assumed" and not same:
        echo("  They may know each other: they share something, but nothing shows they have met or written.")
    if not any(e.get("counted", True) for e in ex["evidence"]):
        from ..evidence.explain import describe

        for ev in ex["evidence"]:
            echo(f"  - {describe(ev)}")
        echo("  No evidence that they know each other.")
        echo(f"  If they do: mynet tie {ca.id} {cb.id} --note \"how they know each other\"")
        return
    print_evidence(ex)
    if ex["suppressed"]:
        echo(f"  You suppressed this tie; to say they do know each other: mynet tie {ca.id} {cb.id}")


@click.command("tie")
@click.argument("a")
@click.argument("b")
@click.option("--note", default="", help="How they know each other.")
@click.option("--strength", type=float, default=None, help="How strong the tie is, 0-1 (default 0.8).")
@click.pass_obj
def tie_cmd(obj, a, b, note, strength):
    """Add a tie you know of between two contacts (kept across re-imports)."""
    ws = obj.workspace()
    ca, cb = ws.find(a), ws.find(b)
    ws.tie(ca.id, cb.id, note=note, strength=strength)
    echo(f"Tie added: {ca.name} - {cb.name}")


@click.command("untie")
@click.argument("a")
@click.argument("b")
@click.pass_obj
def untie_cmd(obj, a, b):
    """Suppress a wrong tie between two contacts (kept across re-imports)."""
    ws = obj.workspace()
    ca, cb = ws.find(a), ws.find(b)
    ws.untie(ca.id, cb.id)
    echo(f"Tie suppressed: {ca.name} - {cb.name}")


@click.command("rate")
@click.argument("who")
@click.argument("closeness", required=False)
@click.option("--clear", is_flag=True, help="Forget your rating; warmth comes from interactions again.")
@click.pass_obj
def rate_cmd(obj, who, closeness, clear):
    """Set your warmth to a person yourself, from 0 (not close) to 1 (closest); it overrides the computed one."""
    ws = obj.workspace()
    c = ws.find(who)
    if clear:
        ws.rate(c.id, None)
        echo(f"Rating cleared for {c.name}")
        return
    if closeness is None:
        raise MynetError("give a warmth between 0 (not close) and 1 (closest), or --clear")
    try:
        value = float(closeness)
    except ValueError as exc:
        raise MynetError(f"warmth must be a number between 0 and 1, got {closeness!r}") from exc
    ws.rate(c.id, value)
    echo(f"{c.name}: warmth {value:.2f} (your rating)")


COMMANDS = (ties_cmd, why_cmd, tie_cmd, untie_cmd, rate_cmd)
