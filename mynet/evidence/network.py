"""The network as the analysis sees it: contacts, ties with their evidence, your warmth, at one day.

Loads the inputs from the workspace and computes ties and warmth (cached in the
workspace under the current data version). Explaining a tie in words and with
its provenance is :mod:`mynet.evidence.explain`.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass, field
from datetime import date
from typing import Any

import numpy as np

from ..errors import MynetError
from ..model import Contact, Interaction
from ..people.mailpeople import evidence_interactions, me_emails, not_employer_domains
from ..people.normalise import normalise_email, normalise_name
from ..store import Store
from .introductions import AskModel, Introduction, apply_introductions
from .ties import TieModel, TieTable, disparity_filter, infer_ties
from .warmth import Warmth, WarmthModel, compute_warmth

__all__ = ["Network", "in_words", "AsOf", "resolve_as_of", "load_network", "load_warmth", "interactions_until",
           "tie_decisions", "label_decisions", "anchor_key", "contact_of_key", "TIES_CACHE", "warmth_cache_key",
           "introductions"]

TIES_CACHE = "ties:v3"
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
    day = store.newest_interaction_day()
    try:
        return date.fromisoformat(day) if day else None
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
        return AsOf(newest, False,
                    f"Your newest meeting or message is from {newest.isoformat()}, more than a year ago: "
                                   "warmth is measured at that date (--as-of DATE to choose another).")
    return AsOf(today)


def interactions_until(interactions: list[Interaction], day: date) -> list[Interaction]:
    """The interactions dated on or before ``day`` (undated ones are kept)."""
    cut = day.isoformat()
    return [it for it in interactions if not it.when or it.when[:10] <= cut]


def in_words(name: str) -> str:
    """A contact's name as a sentence says it: a card with no name but an address or a number is
    "the person at ADDRESS" or "the person with phone NUMBER", never a bare address."""
    text = (name or "").strip()
    if "@" in text and " " not in text:
        return f"the person at {text}"
    if text and all(ch.isdigit() or ch in "+-() ./" for ch in text) and sum(ch.isdigit() for ch in text) >= 5:
        return f"the person with phone {text}"
    return text or "someone without a name"


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
    labels: dict[str, dict[str, Any]] = field(default_factory=dict)  # folded label -> verdict (mynet.evidence.labels)
    #: Filled on first use by :mod:`mynet.evidence.explain` (contacts per organisation; records and shared events).
    org_sizes: dict[str, int] | None = field(default=None, repr=False, compare=False)
    evidence_index: Any = field(default=None, repr=False, compare=False)
    #: The workspace's data version the network was loaded at (None: not loaded from a workspace).
    data_version: int | None = field(default=None, repr=False, compare=False)

    def name(self, cid: int) -> str:
        c = self.by_id.get(cid)
        return c.name if c else f"#{cid}"

    def said(self, cid: int) -> str:
        """How a sentence refers to a contact: their name, else "the person at ADDRESS" (see :func:`in_words`)."""
        c = self.by_id.get(cid)
        return in_words(c.name) if c else "someone no longer among your contacts"

    @classmethod
    def looking_from(cls, when: AsOf, *, warmth: dict[int, Warmth] | None = None) -> "Network":
        """A network with no contacts or ties, seen from ``when`` (and your ``warmth`` when given).

        Enough to find what was cached for that day (the analysis's key, your names
        of its groups and their warm counts) without loading the ties.
        """
        none = TieTable(np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64), np.zeros(0))
        return cls([], {}, none, none, dict(warmth or {}), TieModel(), WarmthModel(), set(), as_of=when)


def anchor_key(store: Store, contact_id: int) -> str:
    """A stable record key standing for a contact in a decision."""
    keys = store.keys_of(contact_id)
    return keys[0] if keys else f"contact:{contact_id}"


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


def warmth_cache_key(day: date) -> str:
    """Where your warmth measured on ``day`` is cached."""
    return f"warmth:v1:{day.isoformat()}"


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
    wkey = warmth_cache_key(today)
    wcached = store.cached(wkey)
    if wcached is not None:
        return _with_introductions(store, {int(k): Warmth(**v) for k, v in wcached.items()}, today)
    if contacts is None:
        contacts = store.contacts()
    if ratings is None:
        ratings = tie_decisions(store)[3]
    if interactions is None:
        interactions = evidence_interactions(store)
    wmodel = WarmthModel.from_settings(store.setting("warmth_model", {}))
    warmth = compute_warmth(contacts, interactions, _me_emails(store), ratings, wmodel, today)
    store.put_cache(wkey, {str(k): v.to_dict() for k, v in warmth.items()})
    return _with_introductions(store, warmth, today)


def introductions(store: Store) -> list[Introduction]:
    """The asks you closed as introduced, resolved to current contact ids (:mod:`.introductions`)."""
    rows = [a for a in store.asks() if a["outcome"] == "introduced" and a["closed_on"]]
    if not rows:
        return []
    cmap = store.contact_map()
    anchors = {t["id"]: t["anchor"] for t in store.targets()}
    out = []
    for a in rows:
        person = a["person"] or anchors.get(a["target_id"], "")
        out.append(Introduction(contact_of_key(cmap, a["via"]), contact_of_key(cmap, person) if person else None,
                                date.fromisoformat(a["closed_on"][:10])))
    return out


def _with_introductions(store: Store, warmth: dict[int, Warmth], today: date) -> dict[int, Warmth]:
    intros = introductions(store)
    if not intros:
        return warmth
    wmodel = WarmthModel.from_settings(store.setting("warmth_model", {}))
    return apply_introductions(warmth, intros, today=today, half_life_days=wmodel.half_life_days,
                               model=AskModel.from_settings(store.setting("asks", {})))


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
    version = store.data_version
    contacts = store.contacts()
    by_id = {c.id: c for c in contacts}
    model = TieModel.from_settings(store.setting("tie_model", {}))
    wmodel = WarmthModel.from_settings(store.setting("warmth_model", {}))
    me = _me_emails(store)
    manual, notes, suppressed, ratings = tie_decisions(store)
    key = TIES_CACHE + (f":{when.day.isoformat()}" if when.cut else "")
    cached = store.blob(key, store.data_version)
    interactions: list[Interaction] | None = None
    if cached is not None:
        all_ties = TieTable.from_bytes(cached)
    else:
        interactions = evidence_interactions(store)
        if when.cut:
            interactions = interactions_until(interactions, when.day)
        all_ties = infer_ties(
            contacts, interactions, me, model,
            related=_related_pairs(store, contacts), manual=manual, suppressed=suppressed,
            extra_webmail=not_employer_domains(store),
            label_decisions=label_decisions(store),
        )
        store.put_blob(key, all_ties.to_bytes(), store.data_version)
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
    return Network(contacts, by_id, all_ties, ties, warmth, model, wmodel, me, notes, when, labels,
                   data_version=version)
