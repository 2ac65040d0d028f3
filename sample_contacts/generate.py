"""Write the invented sample scenario: address books, a club list, a conference list, a calendar, a mailbox.

Run ``python sample_contacts/generate.py`` from the project root to rewrite the
committed files in ``sample_contacts/``, or ``--out DIR`` to write them
elsewhere. Everything comes from one ``random.Random(2026)``, so two runs give
byte-identical files. The people, organisations, towns, e-mail domains
(``*.example``, ``example.org/.com/.net``) and telephone numbers (fictitious
ranges) are all invented. ``ground_truth.json`` says who every record really
is, which records are duplicates, who knows whom and why.
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import random
import sys
from pathlib import Path

from _activity import Activity, ics_text, mbox_text
from _formats import fold, vcard21, vcard30, vcard40
from _listmail import build_list_mail
from _names import PERSONAL_DOMAINS, name_key
from _scenario import World, build_world
from _sources import (
    CLUB_HEADER,
    CONF_HEADER,
    WORKFLOW_LABELS,
    Rec,
    club_rows,
    conference_rows,
    oldwork_export,
    phone_export,
    recent_export,
)

HERE = Path(__file__).resolve().parent
SEED = 2026
FILES = {
    "phone.vcf": {"format": "vCard 3.0", "encoding": "utf-8", "newline": "CRLF"},
    "phone-recent.vcf": {"format": "vCard 4.0", "encoding": "utf-8", "newline": "CRLF"},
    "old-work.vcf": {"format": "vCard 2.1 (quoted-printable, CHARSET=windows-1252)", "encoding": "cp1252",
                     "newline": "CRLF"},
    "conference.csv": {"format": "CSV, comma, all fields quoted, byte-order mark", "encoding": "utf-8-sig",
                       "newline": "CRLF"},
    "club-members.csv": {"format": "CSV, semicolon", "encoding": "cp1252", "newline": "CRLF"},
    "calendar.ics": {"format": "iCalendar (RFC 5545)", "encoding": "utf-8", "newline": "CRLF"},
    "mail.mbox": {"format": "mbox (headers only)", "encoding": "ascii", "newline": "LF"},
}
CLUSTERS = {
    "quillon": "Quillon Labs, your current employer",
    "harrowgate": "Harrowgate Logistics, your previous employer (old-work.vcf)",
    "brennick": "Brennick Maritime, your first employer",
    "lantern": "the Lantern client project: Corrimont Labs (client), Dunmere Consulting (partner), a Quillon crew",
    "aldermoor": "your MSc cohort at Aldermoor University (2012)",
    "club": "Kestrel Reach Rowing Club",
    "conference": "people met at the Tidewater Data Forum 2025",
    "family": "family",
    "neighbours": "neighbours on Larch Row, Kestlebury",
    "services": "the GP, a plumber, an accountant, a recruiter, a driving instructor",
    "velvane": "staff of Velvane Robotics (a target organisation)",
    "orsolan": "staff of Orsolan Biotech (a target organisation)",
    "thistlecombe": "staff of Thistlecombe Energy (a target organisation)",
}
TARGETS = {"Velvane Robotics": "velvane", "Orsolan Biotech": "orsolan", "Thistlecombe Energy": "thistlecombe"}
#: Clusters small and close enough that every member knows every other one.
CLOSE_CLUSTERS = ("family", "brennick", "velvane", "orsolan", "thistlecombe")


def _csv(header: list[str], recs: list[Rec], **kw) -> str:
    buf = io.StringIO(newline="")
    writer = csv.writer(buf, lineterminator="\r\n", **kw)
    writer.writerow(header)
    writer.writerows(r.data for r in recs)
    return buf.getvalue()


def render(out: Path) -> dict:
    """Draw the scenario and write every file into ``out``; return the ground truth."""
    rng = random.Random(SEED)
    w = build_world(rng)
    recs = {"phone.vcf": phone_export(w), "phone-recent.vcf": recent_export(w), "old-work.vcf": oldwork_export(w),
            "conference.csv": conference_rows(w), "club-members.csv": club_rows(w)}
    act = Activity(w)
    act.build_calendar()
    act.build_mail()
    lists = build_list_mail(act)
    act.messages.sort(key=lambda m: (m.when, m.msgid))
    blobs = {
        "phone.vcf": "".join(vcard30(r.data) for r in recs["phone.vcf"]).encode("utf-8"),
        "phone-recent.vcf": "".join(vcard40(r.data) for r in recs["phone-recent.vcf"]).encode("utf-8"),
        "old-work.vcf": b"".join(vcard21(r.data) for r in recs["old-work.vcf"]),
        "conference.csv": _csv(CONF_HEADER, recs["conference.csv"], quoting=csv.QUOTE_ALL).encode("utf-8-sig"),
        "club-members.csv": _csv(CLUB_HEADER, recs["club-members.csv"], delimiter=";").encode("cp1252"),
        "calendar.ics": ics_text(act.events, w.by_id["you"].name, fold).encode("utf-8"),
        "mail.mbox": mbox_text(act.messages).encode("ascii"),
    }
    truth = ground_truth(w, recs, act, lists)
    blobs["ground_truth.json"] = dump_json(truth).encode("utf-8")
    out.mkdir(parents=True, exist_ok=True)
    for name, data in blobs.items():
        (out / name).write_bytes(data)
    return truth


# -- ground truth -------------------------------------------------------------------------------------------
def _canon_ids(r: Rec) -> list[str]:
    ids = [f"email:{e}" for e in r.emails] + [f"tel:{t}" for t in r.phones]
    return ids + ([f"uid:{r.uid.lower()}"] if r.uid else [])


def _components(records: list[tuple[str, int, Rec]]) -> list[list[int]]:
    """Groups of a person's records that exact identifier matches (e-mail, number, UID) join together."""
    parent = list(range(len(records)))

    def find(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i
    seen: dict[str, int] = {}
    for i, (_, _, r) in enumerate(records):
        for ident in _canon_ids(r):
            if ident in seen:
                parent[find(i)] = find(seen[ident])
            else:
                seen[ident] = i
    groups: dict[int, list[int]] = {}
    for i in range(len(records)):
        groups.setdefault(find(i), []).append(i)
    return list(groups.values())


def ground_truth(w: World, recs: dict[str, list[Rec]], act: Activity, lists: dict) -> dict:
    you = w.by_id["you"]
    records, by_person, owners = [], {}, {}
    for fname, items in recs.items():
        for i, r in enumerate(items):
            entry = {"file": fname, "index": i, "person": r.pid}
            if r.kind != "person":
                entry["kind"] = r.kind
            records.append(entry)
            if r.pid:
                by_person.setdefault(r.pid, []).append((fname, i, r))
                for ident in _canon_ids(r):
                    if not ident.startswith("uid:"):
                        owners.setdefault(ident, [])
                        if r.pid not in owners[ident]:
                            owners[ident].append(r.pid)
    duplicates = []
    for pid, items in by_person.items():
        if len(items) < 2 or pid == "you":
            continue
        comps = _components(items)
        entry = {"person": pid, "records": [{"file": f, "index": i} for f, i, _ in items],
                 "exact_link": len(comps) == 1}
        if len(comps) > 1:
            entry["linked_only_by"] = "name and organisation"
            quirks = w.by_id[pid].quirks
            assert {"phone_twice", "conf_alias", "club_other_email"} & set(quirks), f"{pid}: unplanned name-only link"
        duplicates.append(entry)
    names: dict[str, list[str]] = {}
    for p in w.people:
        if p.pid != "you":
            names.setdefault(name_key(p.given, p.family), []).append(p.pid)
    near = [{"name": w.by_id[pids[0]].name, "people": pids} for pids in names.values() if len(pids) > 1]
    found = _found(w, act, lists)
    ties = _ties(w, act, found)
    people = []
    for p in w.people:
        if p.pid == "you":
            continue
        stats = act.stats.get(p.pid, {"meetings": 0, "broadcast_meetings": 0, "messages": 0, "last": ""})
        entry = {"id": p.pid, "name": p.name, "clusters": p.clusters, "teams": p.teams, "emails": p.emails(),
                 "phones": p.phones(), "org": p.org, "title": p.title,
                 "past_orgs": [job["org"] for job in p.past], "locality": p.locality, "country": p.country,
                 "interactions": stats}
        if p.nick:
            entry["nickname"] = p.nick
        if p.old_family:
            entry["former_family_name"] = p.old_family
        if p.pid in w.notes:
            entry["note"] = w.notes[p.pid]
        people.append(entry)
    targets = []
    for org, cluster in TARGETS.items():
        staff = [p for p in w.people if p.org == org]
        bridges = [p.pid for p in staff if set(p.clusters) - {cluster, "conference"}]
        direct = sum(act.stats.get(p.pid, {}).get("meetings", 0) + act.stats.get(p.pid, {}).get("messages", 0)
                     for p in staff if p.pid not in bridges)
        assert direct == 0, f"{org}: a non-bridge member interacts with you directly"
        targets.append({"org": org, "people": [p.pid for p in staff], "bridges": bridges,
                        "reached_only_through": [{"bridge": b, "clusters": w.by_id[b].clusters} for b in bridges]})
    return {
        "description": "Invented scenario, see sample_contacts/README.md; regenerate with "
                       "python sample_contacts/generate.py",
        "seed": SEED,
        "files": {name: dict(meta, records=len(recs[name])) if name in recs else meta for name, meta in FILES.items()},
        "you": {"id": "you", "name": you.name, "emails": you.emails(), "phones": you.phones(), "org": you.org,
                "past_orgs": [job["org"] for job in you.past],
                "records": [{"file": f, "index": i} for f, i, _ in by_person["you"]]},
        "personal_email_domains": list(PERSONAL_DOMAINS) + ["example.org"],
        "clusters": {c: {"description": d, "members": [p.pid for p in w.people if c in p.clusters]}
                     for c, d in CLUSTERS.items()},
        "targets": targets,
        "bridges": [{"person": p.pid, "clusters": p.clusters, "note": w.notes.get(p.pid, "")}
                    for p in w.people if len(p.clusters) > 1],
        "people": people,
        "records": records,
        "duplicates": duplicates,
        "near_duplicates": near,
        "shared_identifiers": [{"value": k, "people": v} for k, v in owners.items() if len(v) > 1],
        "non_contacts": [{"email": a, "name": s["name"], "occurrences": s["count"]}
                         for a, s in sorted(act.strangers.items())],
        "found_people": found,
        "not_people": dict(sorted((NOT_PEOPLE | lists["not_people"]).items())),
        "list_mail": {k: lists[k] for k in ("list", "list_id", "aliases", "threads")},
        "ties": ties,
        "workflow_labels": WORKFLOW_LABELS,
    }


#: Addresses in the calendar and the mailbox that stand for no person: a room, desks, lists.
NOT_PEOPLE = {"room-orchard@quillon.example": "room", "programme@tidewaterforum.example": "role",
              "bookings@talentmoor.example": "role", "news@kestrelreach.example": "list",
              "members@kestrelreach.example": "list", "all-staff@quillon.example": "list"}
SMALL_MEETING = 10  # people at a meeting, you included, for it to say you know each one


def _found(w: World, act: Activity, lists: dict) -> list[dict]:
    """The people in no address book whom you corresponded with: mail both ways, a thread in which both of
    you wrote, or two or more small meetings together. Lists, desks and robots are not people."""
    you = {e.lower() for e in w.by_id["you"].emails()}
    not_people = set(NOT_PEOPLE) | set(lists["not_people"])
    to_them, to_you, meetings = set(), set(), {}
    writers: dict[str, set[str]] = {}
    for m in act.messages:
        sender = m.sender[0].lower()
        if sender in not_people:
            continue
        writers.setdefault(m.thread, set()).add(sender)
        if m.list_id:
            continue  # list mail: only writing in one thread counts, not who was copied
        people = {a.lower() for a, _ in m.to + m.cc}
        if sender in you:
            to_them |= people
        elif people & you:
            to_you.add(sender)
    both = {a for ws in writers.values() if ws & you and len(ws) >= 2 for a in ws}
    for going in act.meetings_attended:
        people = set(going) - not_people
        if people & you and len(people) <= SMALL_MEETING:
            for a in people:
                meetings[a] = meetings.get(a, 0) + 1
    labels: dict[str, dict[str, int]] = {}
    for _kind, label, addresses in act.groups:
        for a in addresses:
            top = "conference" if label.startswith("list/") else label.split("/")[0]
            if top in CLUSTERS:
                labels.setdefault(a, {}).setdefault(top, 0)
                labels[a][top] += 1
    out = []
    for a, s in sorted(act.strangers.items()):
        if a in not_people:
            continue
        mail = a in to_them & to_you or a in both
        calendar = meetings.get(a, 0) >= 2
        if mail or calendar:
            counts = labels.get(a, {})
            out.append({"id": f"found:{a}", "name": s["name"], "email": a,
                        "found_in": [k for k, on in (("mail", mail), ("calendar", calendar)) if on],
                        "clusters": [max(counts, key=lambda c: (counts[c], c))] if counts else []})
    return out


def _ties(w: World, act: Activity, found: list[dict]) -> list[dict]:
    """Pairs who know each other: same team, same close cluster, or met or wrote in a small group."""
    reasons: dict[tuple[str, str], list[str]] = {}

    def add(a: str, b: str, why: str) -> None:
        if a == b or "you" in (a, b):
            return
        key = (a, b) if a < b else (b, a)
        found = reasons.setdefault(key, [])
        if why not in found:
            found.append(why)
    groups: dict[str, list[str]] = {}
    for p in w.people:
        for team in p.teams:
            groups.setdefault(f"team:{team}", []).append(p.pid)
        for c in p.clusters:
            if c in CLOSE_CLUSTERS:
                groups.setdefault(f"cluster:{c}", []).append(p.pid)
    for why, pids in groups.items():
        for i, a in enumerate(pids):
            for b in pids[i + 1:]:
                add(a, b, why)
    for (a, b), whys in act.pairs.items():
        for why in whys:
            add(a, b, why)
    # The people found in mail and calendars know those they met or wrote with in a small group.
    ids = {f["email"]: f["id"] for f in found}
    for kind, label, addresses in act.groups:
        for f in [a for a in addresses if a in ids]:
            for other in addresses:
                pid = act.owner.get(other) or ids.get(other)
                if pid and pid != ids[f]:
                    add(ids[f], pid, f"{kind[:-1]}:{label}")
    return [{"a": a, "b": b, "reasons": whys} for (a, b), whys in sorted(reasons.items())]


def dump_json(data: dict) -> str:
    """JSON with one list item per line, so that a change shows as a small diff."""
    parts = []
    for key, value in data.items():
        if isinstance(value, list) and value:
            body = ",\n".join("  " + json.dumps(v, ensure_ascii=False) for v in value)
            parts.append(f" {json.dumps(key)}: [\n{body}\n ]")
        else:
            parts.append(f" {json.dumps(key)}: " + json.dumps(value, ensure_ascii=False, indent=2).replace("\n", "\n "))
    return "{\n" + ",\n".join(parts) + "\n}\n"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=HERE, help="folder to write into (default: sample_contacts/)")
    args = parser.parse_args(argv)
    truth = render(args.out)
    print(f"wrote {len(FILES) + 1} files to {args.out}: {len(truth['people'])} people, "
          f"{len(truth['records'])} records, {len(truth['ties'])} ties")
    return 0


if __name__ == "__main__":
    sys.exit(main())
