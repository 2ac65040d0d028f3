"""Commands about ties and warmth: ties, why, tie, untie, rate, settings."""

from __future__ import annotations

import click

from ..errors import MynetError
from ..evidence.explain import basis, describe, evidence_summary, explain_tie, tie_words
from ..workspace.importing import find_contact
from ..workspace import settings as settings_schema
from ..workspace.decisions import add_tie, rate_contact, remove_tie
from ..workspace.settings import update_setting
from ._common import as_of_option, echo, emit_json, json_option, load_net, note, table


def register(cli: click.Group) -> None:
    @cli.command("ties")
    @click.option("--all", "show_all", is_flag=True, help="Every pair with any evidence, however weak (no threshold, no backbone filter).")
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
        store = obj.store()
        net = load_net(store, as_of)
        t = net.all_ties if show_all else net.ties
        order = t.order()
        if of:
            cid = find_contact(store, of).id
            order = order[(t.a[order] == cid) | (t.b[order] == cid)]
        total = len(order)
        if limit and not as_json:
            order = order[:limit]
        if as_json:
            out = []
            for i in order:
                ev = evidence_summary(net, int(i), t)
                out.append({"a": int(t.a[i]), "b": int(t.b[i]), "strength": round(float(t.strength[i]), 4),
                            "basis": basis(ev), "evidence": ev})
            emit_json(out)
            return
        if not total:
            echo("No ties yet: import exports that share organisations, tags, meetings or mail threads.")
            return
        echo(table(["strength", "between", "and", "why"], [
            (f"{t.strength[i]:.2f}", f"{net.name(int(t.a[i]))} ({t.a[i]})", f"{net.name(int(t.b[i]))} ({t.b[i]})",
             tie_words(evidence_summary(net, int(i), t)))
            for i in order
        ]))
        note(f"{len(order)} of {total} ties shown" + ("" if show_all else f" (strength >= {net.model.min_strength}; --all for every pair)"))

    @cli.command("why")
    @click.argument("a")
    @click.argument("b")
    @as_of_option
    @json_option
    @click.pass_obj
    def why_cmd(obj, a, b, as_of, as_json):
        """Explain why mynet thinks two people know each other, evidence by evidence."""
        store = obj.store()
        ca, cb = find_contact(store, a), find_contact(store, b)
        if ca.id == cb.id:
            raise MynetError(f"{a!r} and {b!r} are the same person ({ca.name})")
        net = load_net(store, as_of)
        ex = explain_tie(store, net, ca.id, cb.id)
        if as_json:
            emit_json(ex)
            return
        echo(f"{ca.name} ({ca.id}) and {cb.name} ({cb.id}): strength {ex['strength']:.2f}"
             + ("" if ex["in_graph"] or not ex["strength"] else " (below the threshold, not in the graph)"))
        if ex["basis"] == "assumed":
            echo("  They may know each other: they share something, but nothing shows they have met or written.")
        if not any(e.get("counted", True) for e in ex["evidence"]):
            for ev in ex["evidence"]:
                echo(f"  - {describe(ev)}")
            echo("  No evidence that they know each other.")
            echo(f"  If they do: mynet tie {ca.id} {cb.id} --note \"how they know each other\"")
            return
        for ev in ex["evidence"]:
            line = describe(ev)
            if ev.get("provenance") and isinstance(ev["provenance"], list):
                line += " per " + ", ".join(ev["provenance"][:6]) + ("..." if len(ev["provenance"]) > 6 else "")
            echo(f"  - {line}")
            for r in ev.get("recent", []):
                echo(f"      {r['date']}  {r.get('title') or r.get('subject') or ''}  ({r['provenance']})")
        if ex["contributions"]:
            parts = ", ".join(f"{k} {v:.2f}" for k, v in ex["contributions"].items())
            echo(f"  How the strength adds up: {parts}; combined as 1 - product of (1 - each) = {ex['strength']:.2f}")
        if ex["suppressed"]:
            echo(f"  You suppressed this tie; to say they do know each other: mynet tie {ca.id} {cb.id}")

    @cli.command("tie")
    @click.argument("a")
    @click.argument("b")
    @click.option("--note", default="", help="How they know each other.")
    @click.option("--strength", type=float, default=None, help="How strong the tie is, 0-1 (default 0.8).")
    @click.pass_obj
    def tie_cmd(obj, a, b, note, strength):
        """Add a tie you know of between two contacts (kept across re-imports)."""
        store = obj.store()
        ca, cb = find_contact(store, a), find_contact(store, b)
        add_tie(store, ca.id, cb.id, note, strength)
        echo(f"Tie added: {ca.name} - {cb.name}")

    @cli.command("untie")
    @click.argument("a")
    @click.argument("b")
    @click.pass_obj
    def untie_cmd(obj, a, b):
        """Suppress a wrong tie between two contacts (kept across re-imports)."""
        store = obj.store()
        ca, cb = find_contact(store, a), find_contact(store, b)
        remove_tie(store, ca.id, cb.id)
        echo(f"Tie suppressed: {ca.name} - {cb.name}")

    @cli.command("rate")
    @click.argument("who")
    @click.argument("closeness", required=False)
    @click.option("--clear", is_flag=True, help="Forget your rating; warmth comes from interactions again.")
    @click.pass_obj
    def rate_cmd(obj, who, closeness, clear):
        """Set your warmth to a person yourself, from 0 (not close) to 1 (closest); it overrides the computed one."""
        store = obj.store()
        c = find_contact(store, who)
        if clear:
            rate_contact(store, c.id, None)
            echo(f"Rating cleared for {c.name}")
            return
        if closeness is None:
            raise MynetError("give a warmth between 0 (not close) and 1 (closest), or --clear")
        try:
            value = float(closeness)
        except ValueError as exc:
            raise MynetError(f"warmth must be a number between 0 and 1, got {closeness!r}") from exc
        rate_contact(store, c.id, value)
        echo(f"{c.name}: warmth {value:.2f} (your rating)")

    @cli.command("settings")
    @click.argument("assignment", required=False, metavar="[NAME=VALUE]")
    @json_option
    @click.pass_obj
    def settings_cmd(obj, assignment, as_json):
        """Show or change settings: tie_model.broadcast_cap=40, webmail_domains=+mail.example, org_aliases=+QL=Quillon Labs.

        Each setting is checked before it is stored; the listing says what each one means
        and which values it takes.
        """
        store = obj.store()
        if assignment:
            if "=" not in assignment:
                raise MynetError("write the change as NAME=VALUE, e.g. warmth_model.half_life_days=90")
            name, text = assignment.split("=", 1)
            value = update_setting(store, name.strip(), text)
            if not as_json:
                echo(f"{name.strip()} = {_shown(value)}")
                return
        stored = store.settings()
        specs = settings_schema.schema()
        data: dict = {}
        for name, spec in specs.items():
            value = settings_schema.stored_value(stored, name)
            if "." in name:
                group, key = name.split(".", 1)
                data.setdefault(group, {})[key] = value
            else:
                data[name] = value
        if as_json:
            emit_json(data)
            return
        for name, spec in specs.items():
            value = settings_schema.stored_value(stored, name)
            changed = "" if value == spec.default else f"   (default {_shown(spec.default)})"
            echo(f"{name} = {_shown(value)}{changed}")
            echo(f"    {spec.meaning}; {spec.accepts()}")


def _shown(value) -> str:
    if isinstance(value, dict):
        return ", ".join(f"{k}={v}" for k, v in value.items()) or "(none)"
    if isinstance(value, list):
        return ", ".join(value) or "(none)"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return str(value)
