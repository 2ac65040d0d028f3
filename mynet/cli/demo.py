"""``mynet demo``: the main job end to end on the bundled invented scenario."""

from __future__ import annotations

import json
import tempfile
from pathlib import Path

import click

from ..errors import MynetError
from ..analysis.audit import audit
from ..analysis.snapshot import analyse
from ..evidence.network import load_network
from ..evidence.explain import describe, evidence_summary, explain_tie, tie_words
from ..analysis.intro_routes import reach, resolve_targets
from ..workspace.importing import import_paths, merge_suggestions, open_workspace, set_me
from ..workspace.settings import update_list_setting
from ._common import echo, note, table
from .contacts import region_words


def sample_dir() -> Path:
    """The bundled sample_contacts folder (installed package data, else the source tree)."""
    here = Path(__file__).resolve()
    for cand in (here.parents[1] / "sample_contacts", here.parents[2] / "sample_contacts", Path.cwd() / "sample_contacts"):
        if (cand / "ground_truth.json").is_file():
            return cand
    raise MynetError("the sample_contacts folder is missing from this installation")


SOURCE_FILES = ("phone.vcf", "phone-recent.vcf", "old-work.vcf", "conference.csv", "club-members.csv",
                "calendar.ics", "mail.mbox")


def heading(text: str) -> None:
    echo(f"\n== {text}")


def register(cli: click.Group) -> None:
    @cli.command("demo")
    @click.option("--keep", type=click.Path(file_okay=False), help="Keep the demo workspace in this folder.")
    def demo_cmd(keep):
        """Run mynet on the bundled invented sample contacts, in a throw-away workspace."""
        src = sample_dir()
        truth = json.loads((src / "ground_truth.json").read_text(encoding="utf-8"))
        you = truth.get("you", {})
        folder = Path(keep) if keep else Path(tempfile.mkdtemp(prefix="mynet-demo-"))
        folder.mkdir(parents=True, exist_ok=True)
        ws = folder / "demo.sqlite"
        note(f"Demo workspace: {ws} (your own workspace is not touched)")
        echo("mynet demo: an invented person's exports, turned into their network. Everyone here is made up.")
        with open_workspace(ws) as store:
            heading("1. Who you are")
            set_me(store, you.get("emails", []), [you.get("name", "")] if you.get("name") else [])
            echo(f"   You are {you.get('name')} <{', '.join(you.get('emails', []))}>")
            personal = truth.get("personal_email_domains", [])
            if personal:
                update_list_setting(store, "webmail_domains", ",".join(d for d in personal if d != "example.org"))
                echo("   This invented world's private mail domains are declared as webmail (they say nothing about "
                     f"an employer): mynet settings webmail_domains={','.join(d for d in personal if d != 'example.org')}")

            heading("2. Import the exports")
            files = [src / f for f in SOURCE_FILES if (src / f).exists()]
            report = import_paths(store, files)
            for f in report.files:
                what = f"{f.records} records" if f.kind in ("vcard", "csv") else f"{f.interactions} {'events' if f.kind == 'ics' else 'messages'}"
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
            contacts = store.contacts()
            names = {c.id: c.name for c in contacts}
            multi = sorted(contacts, key=lambda c: (-len(c.sources), c.id))[:4]
            heading("3. People found in several exports (mynet show ID lists every record behind one)")
            echo(table(["id", "name", "works at", "worked at", "files"], [
                (c.id, c.name, ", ".join(c.orgs), ", ".join(c.past_orgs), len(c.sources)) for c in multi
            ]))
            sugg = merge_suggestions(store)
            heading(f"4. Possible duplicates, for you to decide ({len(sugg)}; mynet merge A B / mynet apart A B)")
            for s in sugg[:5]:
                echo(f"   {s.score:.2f}  {s.a} {names[s.a]}  /  {s.b} {names[s.b]}: {s.reason}")

            net = load_network(store)
            heading(f"5. Who knows whom: {len(net.ties)} ties (mynet ties)")
            t = net.ties
            order = t.order()
            echo(table(["strength", "between", "and", "why"], [
                (f"{t.strength[i]:.2f}", net.name(int(t.a[i])), net.name(int(t.b[i])),
                 tie_words(evidence_summary(net, int(i), t)))
                for i in order[:6]
            ]))
            multiplex = next((int(i) for i in order if len({e["kind"] for e in evidence_summary(net, int(i), t)}) >= 3),
                             int(order[0]) if len(order) else None)
            if multiplex is not None:
                a, b = int(t.a[multiplex]), int(t.b[multiplex])
                ex = explain_tie(store, net, a, b)
                heading(f"6. Why? (mynet why {a} {b})")
                echo(f"   {ex['a_name']} and {ex['b_name']}: strength {ex['strength']:.2f}")
                for ev in ex["evidence"]:
                    prov = ev.get("provenance")
                    where = f" per {', '.join(prov[:3])}" if isinstance(prov, list) and prov else ""
                    echo(f"   - {describe(ev)}{where}")

            warm = sorted(net.warmth.values(), key=lambda w: (-w.warmth, w.contact_id))[:5]
            heading("7. Your warmest contacts (mynet contacts --sort warmth)")
            echo(table(["warmth", "tier", "name", "meetings", "mails", "last"], [
                (f"{w.warmth:.2f}", w.tier, names[w.contact_id], w.meetings, w.messages_from + w.messages_to, w.last or "-")
                for w in warm
            ]))
            analysis = analyse(store, net)
            heading(f"8. The groups of your network (mynet groups; modularity {analysis.modularity:.2f})")
            echo(table(["id", "size", "warm", "suggested name"], [
                (g.id, g.size, g.warm, g.name) for g in analysis.groups
            ]))
            gnames = {g.id: g.name for g in analysis.groups}
            if analysis.bridges:
                b = analysis.bridges[0]
                heading("9. A bridge between groups (mynet bridges)")
                pair = " and ".join(f"group {g} ({gnames.get(g, '?')})" for g in b["groups"])
                only = "the only tie" if b.get("ties_between") == 1 else "a tie"
                echo(f"   {net.name(b['a'])} - {net.name(b['b'])}: {only} between {pair}")
            findings = audit(store, net, analysis)
            heading("10. The audit, most useful findings first (mynet audit)")
            for i, f in enumerate(findings[:3], 1):
                echo(f"   {i}. {f['title']}")
                echo(f"      -> {f['suggestion']}")
            target = _demo_target(truth, net, analysis)
            if target:
                org, result = target
                heading(f"11. Who can introduce you to someone at {org}? (mynet reach --org \"{org}\")")
                for rank, p in enumerate(result.paths[:3], 1):
                    crossing = " [crosses groups]" if p.get("crosses_groups") else ""
                    echo(f"   {rank}. {' -> '.join(['you', *p['names']])}  score {p['score']:.2f}{crossing}")
                    echo(f"      {p['ask']}")
            from ..report import write_report

            report = write_report(store, folder / "network.html")
            heading("12. A report to keep (mynet report -o network.html; --redact for one to share)")
            echo(f"   Written to {report}")
        echo(f"\nTry it yourself: mynet --workspace {ws} browse   (or: groups, reach --org NAME, audit)")


def _demo_target(truth: dict, net, analysis):
    """The first target organisation of the scenario whose best intro path crosses groups."""
    for t in truth.get("targets", []) if isinstance(truth.get("targets"), list) else truth.get("targets", {}).values():
        org = t.get("org") if isinstance(t, dict) else None
        if not org:
            continue
        try:
            targets = resolve_targets(net, org=org)
        except MynetError:
            continue
        result = reach(net, targets, k=3, groups=analysis.group_of)
        if result.paths and result.paths[0].get("crosses_groups"):
            return org, result
    return None
