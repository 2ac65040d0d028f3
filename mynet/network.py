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

from .errors import MynetError
from .model import Contact, Interaction
from .normalise import email_domain, fold_text, is_webmail, normalise_email, normalise_name, normalise_org
from .store import Store
from .mailpeople import evidence_interactions, me_emails, not_employer_domains
from .ties import KINDS, OBSERVED_KINDS, EventIndex, TieModel, TieTable, disparity_filter, infer_ties
from .warmth import Warmth, WarmthModel, compute_warmth

__all__ = ["Network", "AsOf", "resolve_as_of", "load_network", "load_warmth", "describe", "tie_words", "explain_tie",
           "evidence_summary", "basis", "tie_decisions", "label_decisions", "anchor_key", "contact_of_key"]

TIES_CACHE = "ties:v2"
#: Days without any interaction after which mynet measures warmth at your newest interaction by default.
STALE_DAYS = 365


@dataclass(frozen=True)
class AsOf:
    """The day the analysis looks from: evidence dated after it is left out, warmth is measured on it.

    ``cut`` is true when some interactions are dated after ``day`` (so the ties
    differ from the full ones); ``note`` is one line saying why mynet chose the
    day itself ("" when you chose it or it is today).
    """

    day: date
    cut: bool = False
    note: str = ""
    explicit: bool = False


def _newest_interaction(store: Store) -> date | None:
    row = store.conn.execute(
        "SELECT max(substr(json_extract(data, '$.when'), 1, 10)) FROM interactions "
        "WHERE coalesce(json_extract(data, '$.bulk'), 0) = 0"
    ).fetchone()
    try:
        return date.fromisoformat(row[0]) if row and row[0] else None
    except ValueError:
        return None


def resolve_as_of(store: Store, as_of: date | str | None = None, *, today: date | None = None) -> AsOf:
    """The day to analyse at: ``as_of`` if given, else today, else your newest interaction when it is stale.

    When your newest meeting or message is more than :data:`STALE_DAYS` days
    old, measuring warmth today would make everyone look dormant; the newest
    interaction's day is used instead and ``note`` says so.

    Raises
    ------
    MynetError
        When ``as_of`` is not a date written YYYY-MM-DD.
    """
    today = today or date.today()
    newest = _newest_interaction(store)
    if as_of is not None and as_of != "":
        if isinstance(as_of, str):
            try:
                as_of = date.fromisoformat(as_of.strip())
            except ValueError as exc:
                raise MynetError(f"an as-of date is written YYYY-MM-DD, got {as_of!r}") from exc
        return AsOf(as_of, newest is not None and newest > as_of, "", True)
    if newest is not None and (today - newest).days > STALE_DAYS:
        return AsOf(newest, False, f"Your newest meeting or message is from {newest.isoformat()}, more than a year ago: "
                                   "warmth is measured at that date (--as-of DATE to choose another).")
    return AsOf(today)


def _before(interactions: list[Interaction], day: date) -> list[Interaction]:
    """The interactions dated on or before ``day`` (undated ones are kept)."""
    cut = day.isoformat()
    return [it for it in interactions if not it.when or it.when[:10] <= cut]


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
    as_of: AsOf = field(default_factory=lambda: AsOf(date.today()))
    labels: dict[str, dict[str, Any]] = field(default_factory=dict)  # folded label -> verdict (mynet.labels)

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


def label_decisions(store: Store) -> dict[str, str]:
    """Your verdicts on labels: folded label -> "count" or "ignore" (the latest decision wins)."""
    out: dict[str, str] = {}
    for row in store.decisions("label"):
        if row["value"] in ("count", "ignore"):
            out[row["a"]] = row["value"]
        else:
            out.pop(row["a"], None)
    return out


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


def load_network(store: Store, *, today: date | None = None, as_of: AsOf | date | str | None = None) -> Network:
    """Contacts, ties and warmth for the workspace, from the cache when it is current.

    Parameters
    ----------
    store : Store
    today : date, optional
        Today's date (tests freeze it); default the system's.
    as_of : AsOf, date or str, optional
        Look from this day: meetings and messages dated after it are left out
        and warmth is measured on it. Default: see :func:`resolve_as_of`.
    """
    when = as_of if isinstance(as_of, AsOf) else resolve_as_of(store, as_of, today=today)
    contacts = store.contacts()
    by_id = {c.id: c for c in contacts}
    model = TieModel.from_settings(store.setting("tie_model", {}))
    wmodel = WarmthModel.from_settings(store.setting("warmth_model", {}))
    me = _me_emails(store)
    manual, notes, suppressed, ratings = tie_decisions(store)
    key = TIES_CACHE + (f":{when.day.isoformat()}" if when.cut else "")
    cached = store.cached(key)
    interactions: list[Interaction] | None = None
    if cached is not None:
        all_ties = TieTable.from_json(cached)
    else:
        interactions = evidence_interactions(store)
        if when.cut:
            interactions = _before(interactions, when.day)
        all_ties = infer_ties(
            contacts, interactions, me, model,
            related=_related_pairs(store, contacts), manual=manual, suppressed=suppressed,
            extra_webmail=not_employer_domains(store),
            label_decisions=label_decisions(store),
        )
        store.put_cache(key, all_ties.to_json())
    warmth = load_warmth(store, contacts, today=when.day, interactions=interactions, ratings=ratings)
    mask = all_ties.strength >= model.min_strength
    if all_ties.manual is not None:
        mask |= all_ties.manual
    ties = all_ties.select(mask)
    if model.backbone_alpha > 0:
        keep = disparity_filter(ties, model.backbone_alpha)
        if ties.manual is not None:
            keep |= ties.manual
        ties = ties.select(keep)
    labels = {v["key"]: v for v in all_ties.labels}
    return Network(contacts, by_id, all_ties, ties, warmth, model, wmodel, me, notes, when, labels)


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
    sizes = getattr(net, "_org_sizes", None)
    if sizes is None:
        sizes = defaultdict(int)
        for c in net.contacts:
            for o in {normalise_org(x) for x in c.orgs + c.past_orgs} - {""}:
                sizes[o] += 1
        net._org_sizes = sizes  # type: ignore[attr-defined]
    return sizes


def _basis_of(kind: str) -> str:
    return "observed" if kind in OBSERVED_KINDS or kind == "manual" else "assumed"


def evidence_summary(net: Network, i: int, table: TieTable | None = None) -> list[dict[str, Any]]:
    """Short evidence for row ``i`` of a tie table (for listings and ``--json``).

    Every item says whether it is ``observed`` or ``assumed`` (its ``basis``);
    meetings and threads are counted by :func:`mynet.ties.infer_ties` over
    :func:`mynet.ties.evidence_events`, the same events :func:`explain_tie` lists.
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
    """Records per contact and the shared-event index, built once per loaded network."""

    records: dict[int, list[tuple[str, Any]]]
    events: EventIndex


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
    if net.as_of.cut:
        interactions = _before(interactions, net.as_of.day)
    ix = _EvidenceIndex(dict(records), EventIndex(net.contacts, interactions))
    net._evidence_ix = ix  # type: ignore[attr-defined]
    return ix


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
        for where, rec in ix.records.get(cid, []):
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
    shared = ix.events.shared(a_id, b_id, net.model.broadcast_cap)
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
        ev = {"kind": "tag", "tag": ta[key], "provenance": sorted(set(said[(a_id, "tag", key)] + said[(b_id, "tag", key)]))}
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
