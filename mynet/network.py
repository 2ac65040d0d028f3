"""The network as the analysis sees it: contacts, ties with their evidence, your warmth.

Loads the inputs from the workspace, computes ties and warmth (cached in the
workspace under the current data version) and explains any one tie in full.
"""

from __future__ import annotations

import json
from collections import defaultdict
from dataclasses import dataclass, field
from datetime import date
from typing import Any

import numpy as np

from .model import Contact, Interaction
from .normalise import email_domain, fold_text, is_webmail, normalise_email, normalise_name, normalise_org
from .store import Store
from .correspondence import thread_members
from .mailpeople import evidence_interactions, me_emails, not_employer_domains
from .ties import KINDS, TieModel, TieTable, disparity_filter, infer_ties
from .warmth import Warmth, WarmthModel, compute_warmth

__all__ = ["Network", "load_network", "load_warmth", "describe", "explain_tie", "evidence_summary", "tie_decisions", "anchor_key", "contact_of_key"]

TIES_CACHE = "ties:v1"


@dataclass
class Network:
    """Everything the views need about the network at one data version."""

    contacts: list[Contact]
    by_id: dict[int, Contact]
    all_ties: TieTable  # every pair with any evidence
    ties: TieTable  # above min_strength (and through the backbone filter if on)
    warmth: dict[int, Warmth]
    model: TieModel
    warmth_model: WarmthModel
    me_emails: set[str]
    notes: dict[tuple[int, int], str] = field(default_factory=dict)  # manual tie notes

    def name(self, cid: int) -> str:
        c = self.by_id.get(cid)
        return c.name if c else f"#{cid}"


def anchor_key(store: Store, contact_id: int) -> str:
    """A stable record key standing for a contact in a decision."""
    row = store.conn.execute(
        "SELECT rkey FROM contact_map WHERE contact_id = ? ORDER BY rkey LIMIT 1", (contact_id,)
    ).fetchone()
    return row[0] if row else f"contact:{contact_id}"


def contact_of_key(cmap: dict[str, int], key: str) -> int | None:
    if key.startswith("contact:"):
        return int(key.split(":", 1)[1])
    return cmap.get(key)


def tie_decisions(store: Store):
    """The user's manual ties, suppressed ties and ratings, resolved to current contact ids."""
    cmap = store.contact_map()
    manual: dict[tuple[int, int], float] = {}
    notes: dict[tuple[int, int], str] = {}
    suppressed: set[tuple[int, int]] = set()
    ratings: dict[int, float] = {}
    for row in store.decisions():
        a = contact_of_key(cmap, row["a"]) if row["a"] else None
        b = contact_of_key(cmap, row["b"]) if row["b"] else None
        if row["kind"] in ("tie", "untie") and a and b and a != b:
            pair = (min(a, b), max(a, b))
            if row["kind"] == "tie":
                v = row["value"] or {}
                manual[pair] = float(v.get("strength") or 0)
                notes[pair] = v.get("note", "")
                suppressed.discard(pair)
            else:
                suppressed.add(pair)
                manual.pop(pair, None)
        elif row["kind"] == "rate" and a:
            if row["value"] is None:
                ratings.pop(a, None)
            else:
                ratings[a] = float(row["value"])
    return manual, notes, suppressed, ratings


def _related_pairs(store: Store, contacts: list[Contact]) -> list[tuple[int, int]]:
    """Pairs linked by RELATED (vCard 4.0) or vendor relation fields, resolved to contacts."""
    cmap = store.contact_map()
    by_uid: dict[str, int] = {}
    by_email: dict[str, int] = {}
    by_name: dict[str, list[int]] = defaultdict(list)
    for c in contacts:
        for e in c.emails:
            by_email.setdefault(e, c.id)
        by_name[normalise_name(c.name)].append(c.id)
    pending = []
    for _rid, key, _src, rec in store.records():
        cid = cmap.get(key)
        if cid is None:
            continue
        if rec.uid:
            by_uid[rec.uid.strip().lower()] = cid
        for rel in rec.related:
            pending.append((cid, rel.value.strip()))
    pairs = []
    for cid, value in pending:
        v = value.lower()
        other = by_uid.get(v) or by_uid.get(v.removeprefix("urn:uuid:")) or by_uid.get("urn:uuid:" + v)
        if other is None and normalise_email(value):
            other = by_email.get(normalise_email(value))
        if other is None:
            hits = by_name.get(normalise_name(value), [])
            other = hits[0] if len(hits) == 1 else None
        if other and other != cid:
            pairs.append((cid, other))
    return pairs


def _me_emails(store: Store) -> set[str]:
    """Your declared addresses, plus those your meetings and mail show as yours."""
    return me_emails(store)


def load_warmth(
    store: Store,
    contacts: list[Contact] | None = None,
    *,
    today: date | None = None,
    interactions: list[Interaction] | None = None,
    ratings: dict[int, float] | None = None,
) -> dict[int, Warmth]:
    """Your warmth to every contact, from the cache when it is current (it depends on today's date)."""
    today = today or date.today()
    wkey = f"warmth:v1:{today.isoformat()}"
    wcached = store.cached(wkey)
    if wcached is not None:
        return {int(k): Warmth(**v) for k, v in wcached.items()}
    if contacts is None:
        contacts = store.contacts()
    if ratings is None:
        ratings = tie_decisions(store)[3]
    if interactions is None:
        interactions = evidence_interactions(store)
    wmodel = WarmthModel.from_settings(store.setting("warmth_model", {}))
    warmth = compute_warmth(contacts, interactions, _me_emails(store), ratings, wmodel, today)
    store.put_cache(wkey, {str(k): v.to_dict() for k, v in warmth.items()})
    return warmth


def load_network(store: Store, *, today: date | None = None) -> Network:
    """Contacts, ties and warmth for the workspace, from the cache when it is current."""
    contacts = store.contacts()
    by_id = {c.id: c for c in contacts}
    model = TieModel.from_settings(store.setting("tie_model", {}))
    wmodel = WarmthModel.from_settings(store.setting("warmth_model", {}))
    me = _me_emails(store)
    manual, notes, suppressed, ratings = tie_decisions(store)
    cached = store.cached(TIES_CACHE)
    interactions: list[Interaction] | None = None
    if cached is not None:
        all_ties = TieTable.from_json(cached)
    else:
        interactions = evidence_interactions(store)
        all_ties = infer_ties(
            contacts, interactions, me, model,
            related=_related_pairs(store, contacts), manual=manual, suppressed=suppressed,
            extra_webmail=not_employer_domains(store),
        )
        store.put_cache(TIES_CACHE, all_ties.to_json())
    warmth = load_warmth(store, contacts, today=today, interactions=interactions, ratings=ratings)
    mask = all_ties.strength >= model.min_strength
    if all_ties.manual is not None:
        mask |= all_ties.manual
    ties = all_ties.select(mask)
    if model.backbone_alpha > 0:
        keep = disparity_filter(ties, model.backbone_alpha)
        if ties.manual is not None:
            keep |= ties.manual
        ties = ties.select(keep)
    return Network(contacts, by_id, all_ties, ties, warmth, model, wmodel, me, notes)


def _shared_orgs(a: Contact, b: Contact) -> list[tuple[str, bool]]:
    """(name, both current) for each organisation the two share."""
    cur_a = {normalise_org(o): o for o in a.orgs}
    cur_b = {normalise_org(o): o for o in b.orgs}
    all_a = cur_a | {normalise_org(o): o for o in a.past_orgs}
    all_b = cur_b | {normalise_org(o): o for o in b.past_orgs}
    out = []
    for norm in sorted(set(all_a) & set(all_b) - {""}):
        out.append((all_a[norm], norm in cur_a and norm in cur_b))
    return out


def evidence_summary(net: Network, i: int, table: TieTable | None = None) -> list[dict[str, Any]]:
    """Short evidence for row ``i`` of a tie table (for listings and ``--json``)."""
    t = table if table is not None else net.ties
    a, b = net.by_id[int(t.a[i])], net.by_id[int(t.b[i])]
    out: list[dict[str, Any]] = []
    if t.parts["organisation"][i] > 0:
        for name, current in _shared_orgs(a, b):
            out.append({"kind": "organisation", "name": name, "current": current})
    if t.counts["meeting"][i]:
        out.append({"kind": "meeting", "count": int(t.counts["meeting"][i]), "weight": round(float(t.parts["meeting"][i]), 4)})
    if t.counts["thread"][i]:
        out.append({"kind": "thread", "count": int(t.counts["thread"][i]), "weight": round(float(t.parts["thread"][i]), 4)})
    if t.parts["domain"][i] > 0:
        doms = sorted({email_domain(e) for e in a.emails} & {email_domain(e) for e in b.emails})
        for d in doms:
            if not is_webmail(d):
                out.append({"kind": "domain", "domain": d})
    if t.parts["tag"][i] > 0:
        ta = {fold_text(x): x for x in a.tags}
        for tag in sorted(set(ta) & {fold_text(x) for x in b.tags}):
            out.append({"kind": "tag", "tag": ta[tag]})
    if t.parts["related"][i] > 0:
        out.append({"kind": "related"})
    if t.manual is not None and t.manual[i]:
        pair = (int(t.a[i]), int(t.b[i]))
        out.append({"kind": "manual", "note": net.notes.get(pair, "")})
    return out


def describe(ev: dict[str, Any]) -> str:
    """One evidence item in plain words."""
    k = ev["kind"]
    if k == "organisation":
        return f"both at {ev['name']}" if ev.get("current") else f"both at {ev['name']} (past)"
    if k == "meeting":
        last = f", last {ev['last']}" if ev.get("last") else ""
        return f"{ev['count']} meeting{'s' if ev['count'] != 1 else ''} together{last}"
    if k == "thread":
        last = f", last {ev['last']}" if ev.get("last") else ""
        return f"in {ev['count']} mail thread{'s' if ev['count'] != 1 else ''} together{last}"
    if k == "domain":
        return f"both use @{ev['domain']}"
    if k == "tag":
        return f"both tagged {ev['tag']!r}"
    if k == "related":
        return "named as related on a card"
    if k == "manual":
        return "you said they know each other" + (f": {ev['note']}" if ev.get("note") else "")
    return k


@dataclass
class _EvidenceIndex:
    """Records per contact and interactions per address, built once per loaded network."""

    records: dict[int, list[tuple[str, Any]]]
    interactions: list[Interaction]
    by_email: dict[str, list[int]]
    threads_of: dict[str, set[str]]  # address -> the threads it is a member of
    members: dict[str, set[str]]  # thread -> its members (as the tie step counts them)


def _evidence_index(store: Store, net: Network) -> _EvidenceIndex:
    ix = getattr(net, "_evidence_ix", None)
    if ix is not None:
        return ix
    cmap = store.contact_map()
    records: dict[int, list[tuple[str, Any]]] = defaultdict(list)
    for _rid, key, src, rec in store.records():
        cid = cmap.get(key)
        if cid is not None:
            records[cid].append((f"{src['path'].rsplit('/', 1)[-1]}:{rec.line}", rec))
    interactions = evidence_interactions(store, store.interactions())
    by_email: dict[str, list[int]] = defaultdict(list)
    for k, it in enumerate(interactions):
        for p in it.participants:
            by_email[normalise_email(p) or p].append(k)
    threads_of: dict[str, set[str]] = defaultdict(set)
    members = thread_members(interactions)
    for thread, people in members.items():
        for p in people:
            threads_of[p].add(thread)
    ix = _EvidenceIndex(dict(records), interactions, dict(by_email), dict(threads_of), members)
    net._evidence_ix = ix  # type: ignore[attr-defined]
    return ix


def explain_tie(store: Store, net: Network, a_id: int, b_id: int) -> dict[str, Any]:
    """Every piece of evidence for the tie between two contacts, with where it came from."""
    a, b = net.by_id[a_id], net.by_id[b_id]
    lo, hi = sorted((a_id, b_id))
    t = net.all_ties
    rows = np.nonzero((t.a == lo) & (t.b == hi))[0]
    i = int(rows[0]) if rows.size else None
    ix = _evidence_index(store, net)
    # Provenance of organisations and tags: file:line of every record that says so.
    said: dict[tuple[int, str, str], list[str]] = defaultdict(list)
    for cid in (a_id, b_id):
        for where, rec in ix.records.get(cid, []):
            for o in rec.orgs:
                said[(cid, "org", normalise_org(o))].append(where)
            for tg in rec.tags:
                said[(cid, "tag", fold_text(tg))].append(where)
    evidence: list[dict[str, Any]] = []
    for name, current in _shared_orgs(a, b):
        norm = normalise_org(name)
        prov = sorted(set(said[(a_id, "org", norm)] + said[(b_id, "org", norm)]))
        evidence.append({"kind": "organisation", "name": name, "current": current, "provenance": prov})
    ea, eb = set(a.emails), set(b.emails)
    meetings, threads = [], defaultdict(list)
    shared = {k for e in ea for k in ix.by_email.get(e, ())} & {k for e in eb for k in ix.by_email.get(e, ())}
    for k in sorted(shared):
        it = ix.interactions[k]
        if not it.bulk and it.kind == "meeting" and len(it.participants) <= net.model.broadcast_cap:
            meetings.append(it)
    # Threads both are members of (a list thread: both wrote in it), as the tie step counts them.
    both = {t for e in ea for t in ix.threads_of.get(e, ())} & {t for e in eb for t in ix.threads_of.get(e, ())}
    both = {t for t in both if len(ix.members.get(t, ())) <= net.model.broadcast_cap}
    for it in ix.interactions:
        if it.kind == "message" and not it.bulk and (it.thread or it.key) in both:
            threads[it.thread or it.key].append(it)
    if meetings:
        meetings.sort(key=lambda m: m.when)
        evidence.append({
            "kind": "meeting", "count": len(meetings), "first": meetings[0].when[:10], "last": meetings[-1].when[:10],
            "recent": [{"date": m.when[:10], "title": m.title, "size": len(m.participants),
                        "provenance": f"{m.source.rsplit('/', 1)[-1]}:{m.line}"} for m in meetings[-3:][::-1]],
        })
    if threads:
        msgs = sorted((m for ms in threads.values() for m in ms), key=lambda m: m.when)
        evidence.append({
            "kind": "thread", "count": len(threads), "messages": len(msgs), "last": msgs[-1].when[:10],
            "recent": [{"date": m.when[:10], "subject": m.title, "provenance": f"{m.source.rsplit('/', 1)[-1]}:{m.line}"}
                       for m in msgs[-3:][::-1]],
        })
    if i is not None:
        for ev in evidence_summary(net, i, t):
            if ev["kind"] in ("domain", "related", "manual"):
                evidence.append(ev)
            elif ev["kind"] == "tag":
                norm = fold_text(ev["tag"])
                ev["provenance"] = sorted(set(said[(a_id, "tag", norm)] + said[(b_id, "tag", norm)]))
                evidence.append(ev)
    contributions = {}
    strength = 0.0
    if i is not None:
        scales = {"meeting": net.model.meeting_scale, "thread": net.model.thread_scale}
        for k in KINDS:
            x = float(t.parts[k][i]) / scales.get(k, 1.0)
            if x > 0:
                contributions[k] = round(float(-np.expm1(-x)), 4)
        strength = float(t.strength[i])
    return {
        "a": a_id, "b": b_id, "a_name": a.name, "b_name": b.name,
        "strength": round(strength, 4),
        "in_graph": bool(np.any((net.ties.a == lo) & (net.ties.b == hi))),
        "suppressed": i is None and bool(evidence),
        "evidence": evidence,
        "contributions": contributions,
    }
