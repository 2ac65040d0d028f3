"""A tie in words and with its provenance: the evidence behind it, observed or assumed, file by file.

:func:`evidence_summary` lists a tie's evidence briefly (listings, ``--json``),
:func:`tie_words` says it in plain words ("may know (...)" when nothing observed
backs it), :func:`explain_tie` gives everything with the file and line each
piece came from.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..model import Contact, Interaction
from ..people.mailpeople import evidence_interactions
from ..people.normalise import email_domain, fold_text, is_webmail, normalise_org
from ..store import Store
from .events import Event, shared_events
from .network import Network, interactions_until
from .ties import KINDS, OBSERVED_KINDS, EventIndex, TieTable

__all__ = ["evidence_summary", "basis", "tie_words", "describe", "explain_tie"]


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


def _shared_units(a: Contact, b: Contact, org: str) -> list[str]:
    """The units (departments) of ``org`` both contacts belong to."""
    norm = normalise_org(org)
    ua = {fold_text(u): u for o, u in a.org_units if normalise_org(o) == norm}
    ub = {fold_text(u) for o, u in b.org_units if normalise_org(o) == norm}
    return [ua[k] for k in sorted(set(ua) & ub)]


def _org_sizes(net: Network) -> dict[str, int]:
    if net.org_sizes is None:
        sizes: dict[str, int] = defaultdict(int)
        for c in net.contacts:
            for o in {normalise_org(x) for x in c.orgs + c.past_orgs} - {""}:
                sizes[o] += 1
        net.org_sizes = sizes
    return net.org_sizes


def _basis_of(kind: str) -> str:
    return "observed" if kind in OBSERVED_KINDS or kind == "manual" else "assumed"


def evidence_summary(net: Network, i: int, table: TieTable | None = None) -> list[dict[str, Any]]:
    """Short evidence for row ``i`` of a tie table (for listings and ``--json``).

    Every item says whether it is ``observed`` or ``assumed`` (its ``basis``);
    meetings and threads are counted by :func:`mynet.evidence.ties.infer_ties` over
    :func:`mynet.evidence.ties.evidence_events`, the same events :func:`explain_tie` lists.
    """
    t = table if table is not None else net.ties
    a, b = net.by_id[int(t.a[i])], net.by_id[int(t.b[i])]
    out: list[dict[str, Any]] = []
    if t.parts["organisation"][i] > 0:
        for name, current in _shared_orgs(a, b):
            ev: dict[str, Any] = {"kind": "organisation", "name": name, "current": current}
            units = _shared_units(a, b, name)
            if units:
                ev["units"] = units
            out.append(ev)
    if t.counts["meeting"][i]:
        out.append({"kind": "meeting", "count": int(t.counts["meeting"][i]),
                    "weight": round(float(t.parts["meeting"][i]), 4)})
    if t.counts["thread"][i]:
        out.append({"kind": "thread", "count": int(t.counts["thread"][i]),
                    "weight": round(float(t.parts["thread"][i]), 4)})
    if t.parts["domain"][i] > 0:
        doms = sorted({email_domain(e) for e in a.emails} & {email_domain(e) for e in b.emails})
        for d in doms:
            if not is_webmail(d):
                out.append({"kind": "domain", "domain": d})
    if t.parts["tag"][i] > 0:
        ta = {fold_text(x): x for x in a.tags}
        for tag in sorted(set(ta) & {fold_text(x) for x in b.tags}):
            if net.labels.get(tag, {}).get("counts", True):
                out.append({"kind": "tag", "tag": ta[tag]})
    if t.parts["related"][i] > 0:
        out.append({"kind": "related"})
    if t.manual is not None and len(t.manual) and t.manual[i]:
        pair = (int(t.a[i]), int(t.b[i]))
        out.append({"kind": "manual", "note": net.notes.get(pair, "")})
    for ev in out:
        ev["basis"] = _basis_of(ev["kind"])
    return out


def basis(evidence: list[dict[str, Any]]) -> str:
    """``"observed"`` when any counted item is observed, else ``"assumed"``."""
    counted = [e for e in evidence if e.get("counted", True)]
    return "observed" if any(_basis_of(e["kind"]) == "observed" for e in counted) else "assumed"


def tie_words(evidence: list[dict[str, Any]]) -> str:
    """A tie in plain words: its evidence, and "may know (...)" when nothing observed backs it."""
    counted = [e for e in evidence if e.get("counted", True)]
    words = "; ".join(describe(e) for e in counted)
    if not counted:
        return "linked"
    return words if basis(counted) == "observed" else f"may know ({words})"


def describe(ev: dict[str, Any]) -> str:
    """One evidence item in plain words."""
    k = ev["kind"]
    if k == "organisation":
        where = ev["name"] + (f", {', '.join(ev['units'])}" if ev.get("units") else "")
        text = f"both at {where}" if ev.get("current") else f"both at {where} (past)"
    elif k == "meeting":
        last = f", last {ev['last']}" if ev.get("last") else ""
        text = f"{ev['count']} meeting{'s' if ev['count'] != 1 else ''} together{last}"
    elif k == "thread":
        last = f", last {ev['last']}" if ev.get("last") else ""
        text = f"in {ev['count']} mail thread{'s' if ev['count'] != 1 else ''} together{last}"
    elif k == "domain":
        text = f"both use @{ev['domain']}"
    elif k == "tag":
        text = f"both tagged {ev['tag']!r}"
    elif k == "related":
        text = "named as related on a card"
    elif k == "manual":
        text = "you said they know each other" + (f": {ev['note']}" if ev.get("note") else "")
    else:
        text = k
    if ev.get("counted") is False:
        text += f" (not counted: {ev.get('why_not') or 'see mynet tags'})"
    return text


@dataclass
class _EvidenceIndex:
    """Records per contact and the shared-event index, built once per loaded network (every record and event read)."""

    records: dict[int, list[tuple[str, Any]]]
    events: EventIndex

    def records_of(self, store: Store, net: Network, cid: int) -> list[tuple[str, Any]]:
        return self.records.get(cid, [])

    def shared(self, store: Store, a: int, b: int, cap: int) -> dict[str, list[Event]]:
        return self.events.shared(a, b, cap)


_ITEM_FIELDS = ("kind", "source", "index", "line", "when", "key", "thread", "title", "participants")


class _KeptIndex:
    """The same answers from the index kept in the workspace: a pair's records and the events they share are
    read, nothing is scanned (``mynet why`` on 50,000 contacts). It holds no open store: a network outlives
    the workspace it was loaded through (the browser opens one per task)."""

    def __init__(self, key: str):
        self.key = key

    def records_of(self, store: Store, net: Network, cid: int) -> list[tuple[str, Any]]:
        c = net.by_id.get(cid)
        rows = store.records_by_id(c.record_ids) if c is not None else []
        return [(f"{src['path'].rsplit('/', 1)[-1]}:{rec.line}", rec) for _rid, _k, src, rec in rows]

    def shared(self, store: Store, a: int, b: int, cap: int) -> dict[str, list[Event]]:
        ks = sorted(set(store.events_of(self.key, a)) & set(store.events_of(self.key, b)))
        return shared_events((Event(d["kind"], d["key"], d["participants"],
                                    [Interaction.from_dict(it) for it in d["items"]])
                              for d in store.events_at(self.key, ks)), cap)


def _kept_row(ev: Event) -> dict[str, Any]:
    return {"kind": ev.kind, "key": ev.key, "participants": ev.participants,
            "items": [{f: getattr(it, f) for f in _ITEM_FIELDS} for it in ev.items]}


def _evidence_index(store: Store, net: Network) -> _EvidenceIndex | _KeptIndex:
    """The evidence index of ``net``: kept in the workspace per data version (built on first use), else in memory."""
    if isinstance(net.evidence_index, _KeptIndex) and not store.has_event_index(net.evidence_index.key,
                                                                                 net.data_version):
        net.evidence_index = None  # the workspace changed since: read everything again
    if net.evidence_index is not None:
        return net.evidence_index
    if net.data_version is None or net.data_version != store.data_version or store.read_only:
        net.evidence_index = _scan_index(store, net)
        return net.evidence_index
    key = "events:v1:" + (net.as_of.day.isoformat() if net.as_of.cut else "all")
    if store.has_event_index(key, net.data_version):
        net.evidence_index = _KeptIndex(key)
        return net.evidence_index
    full = _scan_index(store, net)
    store.put_event_index(key, net.data_version, (_kept_row(ev) for ev in full.events.events),
                          sorted((c, sorted(ks)) for c, ks in full.events.of.items()))
    net.evidence_index = full
    return full


def _scan_index(store: Store, net: Network) -> _EvidenceIndex:
    cmap = store.contact_map()
    records: dict[int, list[tuple[str, Any]]] = defaultdict(list)
    for _rid, key, src, rec in store.records():
        cid = cmap.get(key)
        if cid is not None:
            records[cid].append((f"{src['path'].rsplit('/', 1)[-1]}:{rec.line}", rec))
    interactions = evidence_interactions(store, store.interactions())
    if net.as_of.cut:
        interactions = interactions_until(interactions, net.as_of.day)
    return _EvidenceIndex(dict(records), EventIndex(net.contacts, interactions))


def _where(it: Interaction) -> str:
    return f"{it.source.rsplit('/', 1)[-1]}:{it.line}"


def explain_tie(store: Store, net: Network, a_id: int, b_id: int) -> dict[str, Any]:
    """Every piece of evidence for the tie between two contacts, with where it came from.

    Also lists what two contacts share that does not count (a workflow label, an
    organisation whose evidence the large-organisation limit left out), marked
    ``"counted": False`` with the reason in ``why_not``.
    """
    a, b = net.by_id[a_id], net.by_id[b_id]
    lo, hi = sorted((a_id, b_id))
    t = net.all_ties
    rows = np.nonzero((t.a == lo) & (t.b == hi))[0]
    i = int(rows[0]) if rows.size else None
    summary = evidence_summary(net, i, t) if i is not None else []
    ix = _evidence_index(store, net)
    # Provenance of organisations and tags: file:line of every record that says so.
    said: dict[tuple[int, str, str], list[str]] = defaultdict(list)
    for cid in (a_id, b_id):
        for where, rec in ix.records_of(store, net, cid):
            for o in rec.orgs:
                said[(cid, "org", normalise_org(o))].append(where)
            for tg in rec.tags:
                said[(cid, "tag", fold_text(tg))].append(where)
    evidence: list[dict[str, Any]] = []
    org_counted = i is not None and t.parts["organisation"][i] > 0
    sizes = _org_sizes(net)
    for name, current in _shared_orgs(a, b):
        norm = normalise_org(name)
        prov = sorted(set(said[(a_id, "org", norm)] + said[(b_id, "org", norm)]))
        ev: dict[str, Any] = {"kind": "organisation", "name": name, "current": current, "provenance": prov}
        units = _shared_units(a, b, name)
        if units:
            ev["units"] = units
        if not org_counted and sizes.get(norm, 0) > net.model.size_ref and net.model.assumed_cap:
            ev["counted"] = False
            ev["why_not"] = (f"{sizes[norm]} of your contacts are there; inside an organisation that large each "
                             f"person keeps only as many links as people there are seen to know, best first")
        evidence.append(ev)
    shared = ix.shared(store, a_id, b_id, net.model.broadcast_cap)
    meetings = [ev.items[0] for ev in shared["meeting"]]
    if meetings:
        count = int(t.counts["meeting"][i]) if i is not None else len(meetings)
        evidence.append({
            "kind": "meeting", "count": count, "first": meetings[0].when[:10], "last": meetings[-1].when[:10],
            "recent": [{"date": m.when[:10], "title": m.title, "size": len(m.participants), "provenance": _where(m)}
                       for m in meetings[-3:][::-1]],
        })
    if shared["thread"]:
        msgs = sorted((m for ev in shared["thread"] for m in ev.items), key=lambda m: m.when)
        count = int(t.counts["thread"][i]) if i is not None else len(shared["thread"])
        evidence.append({
            "kind": "thread", "count": count, "messages": len(msgs), "last": msgs[-1].when[:10],
            "recent": [{"date": m.when[:10], "subject": m.title, "provenance": _where(m)} for m in msgs[-3:][::-1]],
        })
    for ev in summary:
        if ev["kind"] in ("domain", "related", "manual"):
            evidence.append(ev)
    ta = {fold_text(x): x for x in a.tags}
    for key in sorted(set(ta) & {fold_text(x) for x in b.tags}):
        verdict = net.labels.get(key)
        ev = {"kind": "tag", "tag": ta[key],
              "provenance": sorted(set(said[(a_id, "tag", key)] + said[(b_id, "tag", key)]))}
        if verdict is not None and not verdict.get("counts", True):
            ev |= {"counted": False, "why_not": verdict.get("reason", "")}
        evidence.append(ev)
    for ev in evidence:
        ev["basis"] = _basis_of(ev["kind"])
    contributions = {}
    strength = 0.0
    if i is not None:
        scales = {"meeting": net.model.meeting_scale, "thread": net.model.thread_scale}
        for k in KINDS:
            x = float(t.parts[k][i]) / scales.get(k, 1.0)
            if x > 0:
                contributions[k] = round(float(-np.expm1(-x)), 4)
        strength = float(t.strength[i])
    counted = [e for e in evidence if e.get("counted", True)]
    return {
        "a": a_id, "b": b_id, "a_name": a.name, "b_name": b.name,
        "strength": round(strength, 4),
        "basis": basis(counted) if counted else None,
        "words": tie_words(evidence) if counted else "",
        "in_graph": bool(np.any((net.ties.a == lo) & (net.ties.b == hi))),
        "suppressed": i is None and bool(counted),
        "as_of": net.as_of.day.isoformat(),
        "evidence": evidence,
        "contributions": contributions,
    }
