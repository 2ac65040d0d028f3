"""``mynet demo``: the main job end to end on the bundled invented scenario."""

from __future__ import annotations

import json
import tempfile
from pathlib import Path
from typing import TYPE_CHECKING

import click

from ..errors import MynetError
from .common import echo, note, table
from .sources import region_words

if TYPE_CHECKING:
    from ..evidence.network import Network
    from ..workspace import Workspace


def sample_dir() -> Path:
    """The bundled sample_contacts folder (installed package data, else the source tree)."""
    here = Path(__file__).resolve()
    for cand in (here.parents[1] / "sample_contacts", here.parents[2] / "sample_contacts",
                 Path.cwd() / "sample_contacts"):
        if (cand / "ground_truth.json").is_file():
            return cand
    raise MynetError("the sample_contacts folder is missing from this installation")


SOURCE_FILES = ("phone.vcf", "phone-recent.vcf", "old-work.vcf", "conference.csv", "club-members.csv",
                "calendar.ics", "mail.mbox")


def heading(text: str) -> None:
    echo(f"\n== {text}")


def who_you_are(ws: Workspace, truth: dict) -> None:
    you = truth.get("you", {})
    heading("1. Who you are")
    ws.set_me(you.get("emails", []), [you.get("name", "")] if you.get("name") else [])
    echo(f"   You are {you.get('name')} <{', '.join(you.get('emails', []))}>")
    personal = truth.get("personal_email_domains", [])
    if personal:
        ws.set_setting("webmail_domains", ",".join(d for d in personal if d != "example.org"))
        echo("   This invented world's private mail domains are declared as webmail (they say nothing about "
             f"an employer): mynet settings webmail_domains={','.join(d for d in personal if d != 'example.org')}")


def import_sample(ws: Workspace, src: Path) -> None:
    heading("2. Import the exports")
    report = ws.import_files([src / f for f in SOURCE_FILES if (src / f).exists()])
    for f in report.files:
        what = f"{f.records} records" if f.kind in ("vcard", "csv") else \
            f"{f.interactions} {'events' if f.kind == 'ics' else 'messages'}"
        skipped = f", {len(f.skipped)} skipped" if f.skipped else ""
        echo(f"   {Path(f.path).name:<18} {what:>14} ({f.kind}){skipped}")
    found = f", {report.found} found in mail and calendars (people you corresponded with)" if report.found else ""
    echo(
        f"   {report.records_total} records -> {report.contacts_after} contacts: "
        f"{report.merged_records} duplicate records merged, {report.you_records} were you{found}"
    )
    if report.national_numbers and report.region:
        echo(f"   Phone numbers without a country code ({report.national_numbers}) were read as "
             f"{report.region} numbers ({region_words(report.region_why)})")


def people_and_duplicates(ws: Workspace) -> None:
    contacts = ws.people()
    names = {c.id: c.name for c in contacts}
    multi = sorted(contacts, key=lambda c: (-len(c.sources), c.id))[:4]
    heading("3. People found in several exports (mynet show ID lists every record behind one)")
    echo(table(["id", "name", "works at", "worked at", "files"], [
        (c.id, c.name, ", ".join(c.orgs), ", ".join(c.past_orgs), len(c.sources)) for c in multi
    ]))
    sugg = ws.suggestions()
    heading(f"4. Possible duplicates, for you to decide ({len(sugg)}; mynet contacts --suggested)")
    echo(table(["sure", "id", "one", "id", "the other", "why"], [
        (f"{s.score:.2f}", s.a, names[s.a], s.b, names[s.b], s.reason) for s in sugg[:5]
    ]))
    sure = sum(1 for s in sugg if s.score >= 0.9)
    echo("   One by one: mynet merge A B (or mynet apart A B)"
         + (f"; the {sure} surest at once: mynet contacts --suggested --merge-above 0.9" if sure > 1 else ""))


def ties_and_why(ws: Workspace, net: Network) -> None:
    heading(f"5. Who knows whom: {len(net.ties)} ties (mynet ties)")
    rows = ws.ties(net=net)
    echo(table(["strength", "between", "and", "why"], [
        (f"{r['strength']:.2f}", r["a_name"], r["b_name"], r["words"]) for r in rows[:6]
    ]))
    multiplex = next((r for r in rows if len({e["kind"] for e in r["evidence"]}) >= 3), rows[0] if rows else None)
    if multiplex is not None:
        a, b = multiplex["a"], multiplex["b"]
        ex = ws.explain(a, b, net=net)
        heading(f"6. Why? (mynet why {handle(ws, net, a)} {handle(ws, net, b)})")
        from ..evidence.explain import describe

        echo(f"   {ex['a_name']} and {ex['b_name']}: strength {ex['strength']:.2f}")
        for ev in ex["evidence"]:
            prov = ev.get("provenance")
            where = f" per {', '.join(prov[:3])}" if isinstance(prov, list) and prov else ""
            echo(f"   - {describe(ev)}{where}")


def warmth_and_groups(ws: Workspace, net: Network):
    from ..analysis.groups import group_ref
    from ..analysis.reading import clarity_words

    warm = sorted(net.warmth.values(), key=lambda w: (-w.warmth, w.contact_id))[:5]
    heading("7. Your warmest contacts (mynet contacts --sort warmth)")
    echo(table(["warmth", "tier", "name", "meetings", "mails", "last"], [
        (f"{w.warmth:.2f}", w.tier, net.name(w.contact_id), w.meetings, w.messages_from + w.messages_to, w.last or "-")
        for w in warm
    ]))
    analysis = ws.analysis(net)
    heading(f"8. The groups of your network (mynet groups): they fall apart {clarity_words(analysis.modularity)}")
    echo(table(["group", "people", "warm", "suggested name"],
               [(group_ref(g.id), g.size, g.warm, g.name) for g in analysis.groups]))
    gnames = {g.id: g.name for g in analysis.groups}
    if analysis.bridges:
        b = analysis.bridges[0]
        heading("9. A bridge between groups (mynet bridges)")
        pair = " and ".join(f"{group_ref(g)} {gnames.get(g, '')}".rstrip() for g in b["groups"])
        only = "the only tie" if b.get("ties_between") == 1 else "a tie"
        echo(f"   {net.name(b['a'])} - {net.name(b['b'])}: {only} between {pair}")
    return analysis


def audit_and_reach(ws: Workspace, net: Network, analysis, truth: dict) -> None:
    from ..analysis.audit import PRIORITY

    findings = ws.audit(net=net, analysis=analysis)
    heading("10. The audit, most useful findings first (mynet audit)")
    for i, f in enumerate(findings[:3], 1):
        mark, words = PRIORITY[f["severity"]]
        echo(f"   {i}. {mark} {f['title']}  ({words})")
        echo(f"      What to do: {f['suggestion']}")
    target = _demo_target(ws, truth, net)
    if target:
        org, result = target
        heading(f"11. Who can introduce you to someone at {org}? (mynet reach --org \"{org}\")")
        for rank, p in enumerate(result.paths[:3], 1):
            crossing = " [crosses groups]" if p.get("crosses_groups") else ""
            echo(f"   {rank}. {' -> '.join(['you', *p['names']])}  score {p['score']:.2f}{crossing}")
            echo(f"      {p['ask']}")


@click.command("demo")
@click.option("--keep", type=click.Path(file_okay=False),
              help="Keep the demo's workspace and report in this folder (to browse them afterwards).")
def demo_cmd(keep):
    """See the whole job on invented people, in a throw-away workspace removed at the end (--keep FOLDER keeps it).

    Nothing of yours is read or changed. Without --keep the demo's workspace and report live in a temporary
    folder that is deleted when the demo ends, so runs leave nothing behind; with --keep they stay in FOLDER.
    """
    src = sample_dir()
    truth = json.loads((src / "ground_truth.json").read_text(encoding="utf-8"))
    if keep:
        folder = Path(keep)
        folder.mkdir(parents=True, exist_ok=True)
        run_demo(src, truth, folder, kept=True)
        return
    with tempfile.TemporaryDirectory(prefix="mynet-demo-") as tmp:
        run_demo(src, truth, Path(tmp), kept=False)
    note("The demo's workspace and report were in a temporary folder, now deleted: nothing is left behind. "
         "To look around afterwards: mynet demo --keep FOLDER")


def run_demo(src: Path, truth: dict, folder: Path, *, kept: bool) -> None:
    from ..report import write_report
    from ..workspace import open_workspace

    path = folder / "demo.sqlite"
    note(f"Demo workspace: {path} ({'kept' if kept else 'deleted at the end'}; your own workspace is not touched)")
    echo("mynet demo: an invented person's exports, turned into their network. Everyone here is made up.")
    with open_workspace(path) as ws:
        who_you_are(ws, truth)
        import_sample(ws, src)
        people_and_duplicates(ws)
        net = ws.network()
        ties_and_why(ws, net)
        analysis = warmth_and_groups(ws, net)
        audit_and_reach(ws, net, analysis, truth)
        report = write_report(ws, folder / "network.html")
        if kept:
            heading("12. A report to keep (mynet report -o network.html; --redact for one to share)")
            echo(f"   Written to {report}, kept with the demo's workspace")
        else:
            heading("12. A report (mynet report -o network.html; --redact for one to share)")
            echo(f"   Written to {report} (deleted with the demo; mynet demo --keep FOLDER keeps it)")
    if kept:
        echo(f"\nTry it yourself: mynet --workspace {path} browse   (or: groups, reach --org NAME, audit)")
        echo(f"When you are done: delete the folder {folder}")
    else:
        echo("\nTry it yourself: mynet demo --keep mynet-demo, then mynet --workspace mynet-demo/demo.sqlite browse")


def handle(ws: Workspace, net: Network, cid: int) -> str:
    """How a command line names a contact: the name in quotes when it is unique, else an address, else the id."""
    c = net.by_id.get(cid)
    if c is None:
        return str(cid)
    if sum(1 for o in net.contacts if o.name == c.name) == 1:
        return '"' + c.name.replace('"', "'") + '"'
    return c.emails[0] if c.emails else str(cid)


def _demo_target(ws: Workspace, truth: dict, net: Network):
    """The first target organisation of the scenario whose best intro path crosses groups."""
    for t in truth.get("targets", []) if isinstance(truth.get("targets"), list) else truth.get("targets", {}).values():
        org = t.get("org") if isinstance(t, dict) else None
        if not org:
            continue
        try:
            result = ws.reach(org=org, k=3, net=net)
        except MynetError:
            continue
        if result.paths and result.paths[0].get("crosses_groups"):
            return org, result
    return None


COMMANDS = (demo_cmd,)
