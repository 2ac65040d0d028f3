"""Commands about people: me, contacts, show, merge, unmerge, apart, drop-address, forget."""

from __future__ import annotations

import click

from ..errors import NotFoundError
from ..model import SORTS
from .common import as_of_option, clip, confirm_or_refuse, echo, emit_json, json_option, note, plural, table, when
from .sources import region_words


def contact_fields(c, extra=None):
    """:func:`mynet.workspace.results.contact_fields`, imported when a command prints a contact."""
    from ..workspace.results import contact_fields as fields

    return fields(c, extra)


@click.command("me")
@click.option("--email", "emails", multiple=True, help="One of your own addresses (repeat for several).")
@click.option("--name", "names", multiple=True, help="Your name as your contacts write it (repeatable).")
@click.option("--phone", "phones", multiple=True, metavar="+CC NUMBER",
              help="Your own phone number, with its country code: numbers without one are read in that country.")
@click.option("--replace", is_flag=True, help="Forget the addresses, names and numbers given before.")
@json_option
@click.pass_obj
def me_cmd(obj, emails, names, phones, replace, as_json):
    """Declare who you are; your own cards become you, never a contact."""
    ws = obj.workspace()
    if emails or names or phones or replace:
        ws.set_me(emails, names, phones, replace=replace)
    me = ws.me()
    if as_json:
        emit_json({k: me[k] for k in ("emails", "names", "phones", "also_you", "phone_region")})
        return
    if not me["declared"]:
        echo("You have not said who you are yet: mynet me --email you@example.org --name \"Your Name\"")
        return
    echo(f"You: {', '.join(me['names']) or '(no name)'} <{', '.join(me['emails'])}>")
    if me["phones"]:
        echo(f"Your phone: {', '.join(me['phones'])}")
    if me["also_you"]:
        echo(f"Also you (your name on these addresses in meetings and mail, or archive copies of yours): "
             f"{', '.join(me['also_you'])}")
    region = me["phone_region"]
    if region.get("region"):
        echo(f"Numbers without a country code are read as {region['region']} numbers "
             f"({region_words(region.get('why', ''))})")


def print_unlisted(ws, limit: int, as_json: bool) -> None:
    """``contacts --unlisted``: people you met or wrote with who are not in your address book."""
    threshold = ws.setting("warmth_model.unlisted_threshold")
    people = ws.unlisted()
    total = len(people)
    if limit:
        people = people[:limit]
    if as_json:
        emit_json(people)
        return
    if not people:
        echo(f"Nobody outside your address book shows up {threshold} or more times.")
        return
    echo(table(["seen", "last", "name", "e-mail"], [(p["count"], p["last"], p["name"], p["email"]) for p in people]))
    note(f"{total} people met {threshold}+ times who are not in your address book")


def print_suggestions(ws, as_json: bool, merge_above: float | None = None, yes: bool = False) -> None:
    """``contacts --suggested``: possible duplicates, best first; ``--merge-above``: merge the sure ones at once."""
    sugg = ws.suggestions()
    if merge_above is not None:
        merge_suggested(ws, sugg, merge_above, yes, as_json)
        return
    if as_json:
        emit_json([{"a": s.a, "b": s.b, "score": round(s.score, 3), "reason": s.reason} for s in sugg])
        return
    if not sugg:
        echo("No possible duplicates to review.")
        return
    names = {c.id: c.name for c in ws.people()}
    echo(table(["sure", "id", "one", "id", "the other", "why"], [
        (f"{s.score:.2f}", s.a, names[s.a], s.b, names[s.b], s.reason) for s in sugg
    ]))
    echo("\nSame person: mynet merge A B    Different people: mynet apart A B")
    sure = sum(1 for s in sugg if s.score >= 0.9)
    if sure > 1:
        echo(f"The {sure} surest at once, after a look at the list: mynet contacts --suggested --merge-above 0.9")


def merge_suggested(ws, sugg, merge_above: float, yes: bool, as_json: bool) -> None:
    """Show the pairs scoring ``merge_above`` or more, ask, merge them in one step and say how to undo."""
    chosen = [s for s in sugg if s.score >= merge_above]
    if not chosen:
        if as_json:
            emit_json([])
        else:
            echo(f"No suggested duplicates score {merge_above:.2f} or more; nothing merged.")
        return
    names = {c.id: c.name for c in ws.people()}
    if not as_json:
        echo(f"These {len(chosen)} pairs would each become one person:")
        echo(table(["sure", "id", "one", "id", "the other", "why"], [
            (f"{s.score:.2f}", s.a, names[s.a], s.b, names[s.b], s.reason) for s in chosen
        ]))
    if not yes:
        confirm_or_refuse(f"Merge these {len(chosen)} pairs?")
    done = ws.merge_suggested(merge_above)
    if as_json:
        emit_json([{"a": s.a, "b": s.b, "score": round(s.score, 3)} | contact_fields(c) for s, c in done])
        return
    echo(f"Merged {plural(len(done), 'pair')}:")
    for _s, c in done:
        echo(f"  {c.name} (id {c.id}), {len(c.record_ids)} records")
    echo("Any of them wrong? mynet unmerge ID splits that person again.")


@click.command("contacts")
@click.option("--search", "search", metavar="TEXT",
              help="Only people whose name, e-mail, phone, organisation, tag or place contains TEXT.")
@click.option("--suggested", is_flag=True, help="List possible duplicates to merge or keep apart instead.")
@click.option("--merge-above", "merge_above", type=click.FloatRange(0, 1), metavar="SCORE",
              help="With --suggested: merge every pair this sure or surer (0-1), after showing them and asking.")
@click.option("--yes", is_flag=True, help="With --merge-above: merge without asking.")
@click.option("--unlisted", is_flag=True, help="List people you met or wrote with who are not in your address book.")
@click.option("--sort", type=click.Choice(SORTS), default="id", show_default=True,
              help="Order by id, name, your warmth (warmest first) or last interaction (latest first).")
@click.option("--limit", type=int, default=0, help="Show at most this many.")
@as_of_option
@json_option
@click.pass_obj
def contacts_cmd(obj, search, suggested, merge_above, yes, unlisted, sort, limit, as_of, as_json):
    """List the people in your network, with your warmth to each."""
    ws = obj.workspace()
    if unlisted:
        print_unlisted(ws, limit, as_json)
        return
    if merge_above is not None and not suggested:
        raise click.UsageError("--merge-above works with --suggested: mynet contacts --suggested --merge-above 0.9")
    if suggested:
        print_suggestions(ws, as_json, merge_above, yes)
        return
    rows = ws.contacts(search=search, sort=sort, limit=limit, as_of=when(ws, as_of), with_groups=as_json)
    if as_json:
        emit_json([r | {"warmth": round(r["warmth"], 4)} for r in rows])
        return
    if not rows:
        echo("No contacts match." if search else "No contacts yet: mynet import FILE...")
        return
    echo(table(["id", "name", "organisation", "warmth", "last seen", "e-mail or phone"], [
        (r["id"], r["name"], ", ".join(r["orgs"]) or (f"(was {r['past_orgs'][0]})" if r["past_orgs"] else ""),
         f"{r['warmth']:.2f}" if r["warmth"] else "-", r["last_interaction"] or "-",
         r["emails"][0] if r["emails"] else (r["phones"][0] if r["phones"] else ""))
        for r in rows
    ]))
    note(f"{len(rows)} contact(s)")


@click.command("show")
@click.argument("who")
@json_option
@click.pass_obj
def show_cmd(obj, who, as_json):
    """Show one person (by id, e-mail or name) with every record behind them."""
    ws = obj.workspace()
    c = ws.find(who)
    recs = ws.records_of(c)
    if as_json:
        emit_json(contact_fields(c, {
            "nicknames": c.nicknames, "urls": c.urls, "notes": c.notes,
            "found_in": c.found_in, "address_from": c.address_from,
            "records": [{"id": rid, "file": path, "line": r.line, "index": r.index, "kind": r.kind,
                         "name": r.display_name(), "emails": r.emails, "phones": r.phones, "orgs": r.orgs,
                         "titles": r.titles, "tags": r.tags} for rid, path, r in recs],
        }))
        return
    echo(f"{c.name}  (id {c.id})")
    for label, values in (("also known as", c.nicknames), ("works at", c.orgs), ("worked at", c.past_orgs),
                          ("title", c.titles), ("e-mail", c.emails), ("phone", c.phones), ("tags", c.tags),
                          ("places", c.localities), ("web", c.urls)):
        if ", ".join(values):
            echo(f"  {label:<14}{', '.join(values)}")
    for n in c.notes:
        echo(f"  {'note':<14}{clip(n, 200)}")
    if c.found_in:
        echo(f"\nFound in your {' and '.join(c.found_in)}: in no address book, but you corresponded.")
    if c.address_from:
        echo("\nWhere each address came from:")
        for addr, why in c.address_from.items():
            echo(f"  {addr}: {why}")
        echo(f"Not this person's? mynet drop-address {c.id} ADDRESS")
    if recs:
        echo(f"\nRecords behind this person ({len(recs)}):")
    for rid, path, r in recs:
        bits = [r.display_name()] + r.emails[:2] + r.phones[:1] + r.orgs[:1]
        echo(f"  [{rid}] {path}:{r.line}  " + " | ".join(b for b in bits if b))
    if len(recs) > 1:
        echo(f"\nWrongly merged? mynet unmerge {c.id} --record ID")


@click.command("merge")
@click.argument("who", nargs=-1, required=True)
@click.option("--yes", is_flag=True, help="Merge even when the names differ, without asking.")
@json_option
@click.pass_obj
def merge_cmd(obj, who, yes, as_json):
    """Merge two or more contacts into one person (kept across re-imports)."""
    ws = obj.workspace()
    people = [ws.find(w) for w in who]
    from ..people.identity import names_compatible

    odd = [p for p in people[1:] if not names_compatible(people[0].name, p.name)]
    if odd and not yes:
        confirm_or_refuse(f"{people[0].name} and {', '.join(p.name for p in odd)} have different names. Merge anyway?")
    c = ws.merge([p.id for p in people])
    if as_json:
        emit_json(contact_fields(c))
        return
    echo(f"Merged into {c.name} (id {c.id}), {len(c.record_ids)} records.")


@click.command("unmerge")
@click.argument("who")
@click.option("--record", "records", multiple=True, type=int,
              help="Record id to split off (see mynet show); default: all.")
@json_option
@click.pass_obj
def unmerge_cmd(obj, who, records, as_json):
    """Split a wrongly merged person back into separate contacts (kept across re-imports)."""
    ws = obj.workspace()
    parts = ws.unmerge(ws.find(who).id, list(records))
    if as_json:
        emit_json([contact_fields(p) for p in parts])
        return
    echo("Now separate: " + "; ".join(f"{p.id} {p.name}" for p in parts))


@click.command("drop-address")
@click.argument("who")
@click.argument("address")
@click.option("--undo", is_flag=True, help="Take back an earlier drop-address of this address.")
@json_option
@click.pass_obj
def drop_address_cmd(obj, who, address, undo, as_json):
    """Say that an e-mail address is not this person's (kept across re-imports).

    The address stops counting as theirs: no meetings or mail through it,
    never linked to them again by name. --undo takes it back.
    """
    ws = obj.workspace()
    try:
        c = ws.find(who)
    except NotFoundError:
        if not undo:
            raise
        # Someone known only through this address is gone since it was dropped: bring them back.
        after = ws.detach_address(None, address, undo=True)
        if as_json:
            emit_json(contact_fields(after) if after else {})
            return
        echo(f"{address} counts again" + (f": {after.name} (id {after.id})." if after else "."))
        return
    after = ws.detach_address(c.id, address, undo=undo)
    if as_json:
        emit_json(contact_fields(after) if after else {"id": c.id, "removed": True})
    elif after is None:
        echo(f"{c.name} ({c.id}) was known only through {address}; they are no longer a contact.")
    elif undo:
        echo(f"{address} counts as {after.name}'s again (id {after.id}).")
    else:
        echo(f"{address} is no longer {after.name}'s (id {after.id}); kept across re-imports "
             f"(mynet drop-address {after.id} {address} --undo takes it back).")


@click.command("forget")
@click.argument("who")
@click.option("--yes", is_flag=True, help="Do not ask for confirmation.")
@click.pass_obj
def forget_cmd(obj, who, yes):
    """Remove a person from the workspace completely (records, meetings, mail, decisions, caches).

    Later imports of the same files leave them out (mynet keeps only salted
    hashes of their addresses, numbers and names, never the values).
    """
    ws = obj.workspace()
    c = ws.find(who)
    if not yes:
        confirm_or_refuse(f"Forget {c.name} (id {c.id}) completely? This cannot be undone")
    files = ws.written_files()
    rep = ws.forget(c.id)
    echo(f"Forgotten: {plural(rep['records'], 'record')} removed, {rep['interactions_scrubbed']} meetings/messages "
         f"cleaned, {rep['decisions']} decisions dropped; the workspace file was compacted.")
    if files:
        note(f"Files written earlier from this workspace may still name {c.name}; mynet does not change them. "
             "Delete them or write them again:")
        for f in files:
            note(f"  {f}")
    else:
        note(f"Reports and exports written earlier (mynet report, mynet export) are separate files: any that name "
             f"{c.name} still do until you delete them or write them again.")


@click.command("apart")
@click.argument("a")
@click.argument("b")
@click.pass_obj
def apart_cmd(obj, a, b):
    """Mark two contacts as different people, so they are never suggested or merged."""
    ws = obj.workspace()
    ca, cb = ws.find(a), ws.find(b)
    ws.apart(ca.id, cb.id)
    echo(f"Kept apart: {ca.id} {ca.name} / {cb.id} {cb.name}")


COMMANDS = (me_cmd, contacts_cmd, show_cmd, merge_cmd, unmerge_cmd, drop_address_cmd, forget_cmd, apart_cmd)
