"""``mynet targets``, ``plan``, ``ask``, ``asks`` and ``dormant``: from single routes to a list you work through.

Keep the people and organisations you want to reach (targets), see whom to ask
first (the plan), keep each ask and how it went (asks), and find the people
worth getting back in touch with (dormant).
"""

from __future__ import annotations

import click

from ..errors import MynetError
from .common import as_of_option, echo, emit_json, json_option, load_net, note, plural, prompt, table

KIND_WORDS = {"person": "person", "organisation": "org", "tag": "tag", "domain": "domain"}


def _route_words(route: dict | None) -> str:
    return " -> ".join(["you", *route["names"]]) if route else ""


def _state_words(row: dict) -> str:
    state = row["state"]
    if state == "known":
        return "you know " + ", ".join(row["known"][:2]) + " there: ask yourself"
    if state == "waiting":
        return "waiting on an ask (mynet asks)"
    if state == "introduced":
        return "introduced"
    if state == "no route":
        return "no route yet (mynet plan says what would help)"
    if state == "nobody there":
        return "nobody in your contacts matches it now"
    return _route_words(row["best"])


@click.group("targets", invoke_without_command=True)
@click.option("--max-intermediaries", type=int, default=2, show_default=True,
              help="People between you and a target, at most.")
@as_of_option
@json_option
@click.pass_context
def targets_cmd(ctx, max_intermediaries, as_of, as_json):
    """The people and organisations you want to reach, each with its best way in.

    For each: the best route and its score, whether every step of it rests on something that happened
    (observed) or partly on something the two only share (assumed), and how many people you are warm with
    could open it.
    """
    if ctx.invoked_subcommand:
        return
    ws = ctx.obj.workspace()
    rows = ws.targets(net=load_net(ws, as_of), max_intermediaries=max_intermediaries)
    if as_json:
        emit_json(rows)
        return
    if not rows:
        echo("No targets yet. Add some: mynet targets add --org NAME (or --to, --tag, --domain, --file).")
        return
    echo(table(["id", "target", "kind", "score", "evidence", "can open", "best way in"], [
        (r["id"], r["label"], KIND_WORDS[r["kind"]],
         f"{r['best']['score']:.2f}" if r["best"] and r["state"] == "open" else "",
         ("observed" if r["observed"] else "assumed") if r["best"] and r["state"] == "open" else "",
         r["first_people"] if r["state"] in ("open", "waiting") else "", _state_words(r)) for r in rows]))
    if any(r["state"] == "open" and not r["observed"] for r in rows):
        note("assumed: some step of the route rests only on a shared organisation, domain or label, not on a "
             "meeting or mail")
    note("Whom to ask first: mynet plan")


@targets_cmd.command("add")
@click.option("--to", "to", metavar="WHO", help="A person (id, name or e-mail).")
@click.option("--org", metavar="NAME", help="Anyone at this organisation, now or in the past.")
@click.option("--tag", metavar="TAG", help="Anyone carrying this tag.")
@click.option("--domain", metavar="DOMAIN", help="Anyone with an address at this mail domain.")
@click.option("--file", "path", type=click.Path(dir_okay=False), metavar="FILE",
              help="One target per line, or a CSV file with --column.")
@click.option("--column", metavar="NAME", help="With --file: the CSV column holding the targets.")
@click.option("--as", "kind", type=click.Choice(["org", "person", "tag", "domain"]), default="org",
              show_default=True, help="With --file: what each line names.")
@json_option
@click.pass_obj
def targets_add(obj, to, org, tag, domain, path, column, kind, as_json):
    """Keep a target: a person, an organisation, a tag or a mail domain (or many, from a file)."""
    ws = obj.workspace()
    if path:
        if to or org or tag or domain:
            raise MynetError("give either --file or one of --to, --org, --tag, --domain")
        kinds = {"org": "organisation", "person": "person", "tag": "tag", "domain": "domain"}
        got = ws.add_targets_from_file(path, kind=kinds[kind], column=column)
        if as_json:
            emit_json(got)
            return
        for r in got["added"]:
            echo(f"Added #{r['id']} {r['label']}")
        for r in got["already"]:
            echo(f"Already a target: #{r['id']} {r['label']}")
        for r in got["not_found"]:
            note(f"Not added: {r['text']}: {r['reason']}")
        echo(f"{plural(len(got['added']), 'target')} added, {len(got['already'])} already kept, "
             f"{len(got['not_found'])} not found.")
        return
    row = ws.add_target(to=to, org=org, tag=tag, domain=domain)
    if as_json:
        emit_json(row)
        return
    echo(("Added" if row["new"] else "Already a target:") + f" #{row['id']} {row['label']} ({KIND_WORDS[row['kind']]})")


@targets_cmd.command("remove")
@click.argument("ref", metavar="TARGET")
@click.pass_obj
def targets_remove(obj, ref):
    """Remove a target (by its id or name) and the asks about it."""
    row = obj.workspace().remove_target(ref)
    echo(f"Removed #{row['id']} {row['label']} and the asks about it.")


def _print_plan(p: dict) -> None:
    o = p["objective"]
    if p["asks"]:
        who = "1 person" if o["people"] == 1 else f"{o['people']} people"
        echo(f"Ask {who} to open {plural(o['opened'], 'target')} "
             f"(at most {o['capacity']} introductions each):")
    for i, a in enumerate(p["asks"], 1):
        echo(f"\n{i}. {a['name']} (warmth {a['warmth']:.2f}, last {a['last'] or '-'})")
        for t in a["targets"]:
            r = t["route"]
            basis = "" if r["basis"] == "observed" else "; a step rests only on something shared"
            echo(f"   for {t['label']}: {_route_words(r)}  score {r['score']:.2f}{basis}")
    if p["asks"]:
        first = p["asks"][0]
        echo(f"\nKeep each ask as you make it: mynet ask \"{first['name']}\" --for \"{first['targets'][0]['label']}\"")
    if p["held_back"]:
        echo("\nAsked recently, so other people come first (their routes ranked at "
             f"{p['held_back'][0]['factor']:.0%} of their score):")
        for h in p["held_back"]:
            echo(f"  {h['name']}: asked on {h['asked_on']} about {h['target_label']} ({h['state']})")
    if p["several_doors"]:
        echo("\nPeople who could open several of your targets (among the three best ways in):")
        for d in p["several_doors"]:
            echo(f"  {d['name']}: {d['count']} targets ({', '.join(d['targets'][:4])}"
                 f"{', ...' if d['count'] > 4 else ''})")
    if p["not_opened"]:
        echo("\nNot in this plan (everyone who could open them is already asked for enough; "
             "raise --max-per-person to include them):")
        for t in p["not_opened"]:
            echo(f"  {t['label']}: could be opened by {', '.join(t['people'])}")
    if p["no_route"]:
        echo("\nNo route yet:")
        for t in p["no_route"]:
            echo(f"  {t['label']}: {t['why']}")
            for d in t["dormant"]:
                echo(f"    get back in touch with {d['name']} (last {d['last'] or '-'}): "
                     f"{_route_words(d)}  score {d['score']:.2f}")
            for g in t["groups"]:
                echo(f"    nobody you are warm with is in G{g['group']} {g['name']} ({g['size']} people); "
                     "reviving one tie there would help")
    if p["known"]:
        echo("\nNo introduction needed (you know someone there): "
             + "; ".join(f"{k['label']} ({', '.join(k['people'][:2])})" for k in p["known"]))
    if p["waiting"]:
        echo("\nWaiting: " + "; ".join(f"{w['label']} (asked {w['asks'][0]['via_name']} "
                                        f"{w['asks'][0]['days_waiting']} days ago)" for w in p["waiting"]))
    if p["introduced"]:
        echo("\nIntroduced: " + ", ".join(t["label"] for t in p["introduced"]))


@click.command("plan")
@click.option("--max-per-person", type=int, default=None, metavar="K",
              help="Ask one person for at most K introductions (default: the setting asks.max_per_person).")
@click.option("--max-intermediaries", type=int, default=2, show_default=True,
              help="People between you and a target, at most.")
@as_of_option
@json_option
@click.pass_obj
def plan_cmd(obj, max_per_person, max_intermediaries, as_of, as_json):
    """Whom to ask, in order, so that the fewest and warmest asks open the most of your targets.

    People who open several targets come first; nobody is asked for more than K introductions; people
    you asked recently (an open or declined ask) come after others. Targets with no route say what would
    help: a dormant contact to get back in touch with, or a group where you know nobody warmly.
    """
    ws = obj.workspace()
    p = ws.plan(max_per_person=max_per_person, net=load_net(ws, as_of), max_intermediaries=max_intermediaries)
    if as_json:
        emit_json(p)
        return
    if not (p["asks"] or p["no_route"] or p["known"] or p["waiting"] or p["introduced"] or p["not_opened"]):
        echo("No targets yet. Add some: mynet targets add --org NAME")
        return
    _print_plan(p)


@click.command("ask")
@click.argument("via", metavar="VIA")
@click.option("--for", "target", required=True, metavar="TARGET",
              help="A target (id or name), a contact or an organisation (kept as a new target).")
@click.option("--note", default="", help="A note to keep with the ask.")
@click.option("--on", "on", metavar="YYYY-MM-DD", default=None, help="The day you asked (default today).")
@json_option
@click.pass_obj
def ask_cmd(obj, via, target, note, on, as_json):
    """Keep an ask: you asked VIA for an introduction to a target."""
    row = obj.workspace().ask(via, target, note=note, on=on)
    if as_json:
        emit_json(row)
        return
    echo(f"Ask #{row['id']}: {row['via_name']} for {row['target_label']}, on {row['asked_on']}; "
         f"follow up from {row['follow_up_on']}.")
    echo(f"When you hear back: mynet asks close {row['id']} --outcome introduced|declined|no-answer|not-needed")


def _print_asks(rows: list[dict], include_closed: bool) -> None:
    if not rows:
        echo("No asks" + ("" if include_closed else " waiting") + ". Keep one: mynet ask \"NAME\" --for TARGET")
        return
    echo(table(["id", "asked", "for", "asked on", "days", "follow up", "outcome / note"], [
        (r["id"], r["via_name"], r["target_label"], r["asked_on"], r["days_waiting"],
         ("now" if r["due"] else r["follow_up_on"]) if not r["outcome"] else "",
         (r["outcome"] + (f" ({r['person_name']})" if r["person_name"] else "") + f" on {r['closed_on']}")
         if r["outcome"] else r["note"]) for r in rows]))
    due = [r for r in rows if r["due"]]
    if due:
        note(f"{plural(len(due), 'ask')} waited long enough for a friendly follow-up.")


@click.group("asks", invoke_without_command=True)
@click.option("--all", "include_closed", is_flag=True, help="Closed asks too, with their outcome.")
@json_option
@click.pass_context
def asks_cmd(ctx, include_closed, as_json):
    """Your asks for introductions: days waiting, and when to follow up (setting asks.follow_up_days)."""
    if ctx.invoked_subcommand:
        return
    rows = ctx.obj.workspace().asks(include_closed=include_closed)
    if as_json:
        emit_json(rows)
        return
    _print_asks(rows, include_closed)


@asks_cmd.command("close")
@click.argument("ask_id", type=int, metavar="ID")
@click.option("--outcome", required=True, type=click.Choice(["introduced", "declined", "no-answer", "not-needed"]),
              help="How it went.")
@click.option("--person", metavar="WHO", help="Whom you were introduced to (needed for an organisation, tag or "
                                              "domain).")
@click.option("--on", "on", metavar="YYYY-MM-DD", default=None, help="The day it happened (default today).")
@click.pass_obj
def asks_close(obj, ask_id, outcome, person, on):
    """Give ask ID its outcome; an introduction becomes an observed tie between you and the person you met."""
    ws = obj.workspace()
    row = next((a for a in ws.asks(include_closed=True) if a["id"] == ask_id), None)
    if row is not None and outcome == "introduced" and not person:
        target = next((t for t in ws.targets() if t["id"] == row["target"]), None)
        if target is not None and target["kind"] != "person":
            import sys

            if not sys.stdin.isatty():
                raise MynetError(f"ask #{ask_id} is about {target['label']}, not one person: say whom you were "
                                 "introduced to (--person NAME)")
            person = prompt(f"Whom at {target['label']} were you introduced to (name, e-mail or id)")
    row = ws.close_ask(ask_id, outcome, person=person, on=on)
    echo(f"Ask #{row['id']} ({row['via_name']} for {row['target_label']}): {row['outcome']}.")
    if outcome == "introduced":
        met = row["person_name"] or row["target_label"]
        echo(f"You now have an observed tie to {met}; {row['via_name']} is a little warmer.")
    elif outcome == "declined":
        echo(f"The plan will not route {row['target_label']} through {row['via_name']} again, and prefers other "
             "people for a while.")


@asks_cmd.command("reopen")
@click.argument("ask_id", type=int, metavar="ID")
@click.pass_obj
def asks_reopen(obj, ask_id):
    """Take back the outcome of ask ID (it is open again)."""
    obj.workspace().reopen_ask(ask_id)
    echo(f"Ask #{ask_id} is open again.")


@click.command("dormant")
@click.option("--limit", type=int, default=20, show_default=True, help="Show at most this many (0: all).")
@as_of_option
@json_option
@click.pass_obj
def dormant_cmd(obj, limit, as_of, as_json):
    """People you were warm with once and have not heard from for long, most worth getting back in touch first.

    Ranked by how many of your targets they would open and how many groups where you know nobody warmly
    they belong to; each with your last interaction and what you shared.
    """
    ws = obj.workspace()
    net = load_net(ws, as_of)
    rows = ws.dormant(net=net, limit=limit)
    if as_json:
        emit_json(rows)
        return
    if not rows:
        echo("Nobody dormant: everyone you were warm with is still in touch (or was never warm).")
        return
    days = int(net.warmth_model.dormant_days)
    echo(f"Warm once (warmth at least 0.30 at your last contact), quiet for more than {days} days:")
    echo(table(["name", "then", "now", "last", "shared", "would reopen"], [
        (r["name"], f"{r['warmth_then']:.2f}", f"{r['warmth_now']:.2f}", r["last"] or "-",
         ", ".join(x for x in (plural(r["meetings"], "meeting") if r["meetings"] else "",
                               plural(r["mails"], "mail") if r["mails"] else "",
                               ", ".join(r["organisations"][:1])) if x),
         "; ".join(x for x in ((f"{plural(len(r['targets']), 'target')}: " + ", ".join(r["targets"]))
                               if r["targets"] else "",
                               ", ".join(f"G{g['group']} {g['name']}" for g in r["groups"])) if x) or "-")
        for r in rows]))
    note("then/now: your warmth at your last interaction and today; mynet dormant --json lists every target")


COMMANDS = (targets_cmd, plan_cmd, ask_cmd, asks_cmd, dormant_cmd)
