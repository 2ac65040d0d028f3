"""What mynet found, as plain rows: contacts with your warmth, ties with their evidence, groups, measures,
intro paths, the audit and the explanation of one tie.

Each result takes ``as_of`` (the day to look from: see :func:`mynet.evidence.network.resolve_as_of`)
and, to share one loaded network between calls, ``net`` (from :meth:`ResultsMixin.network`).
"""

from __future__ import annotations

import re
from collections import Counter, defaultdict
from datetime import date
from typing import TYPE_CHECKING, Any, Iterable

from ..analysis.audit import audit, ego_brokerage
from ..analysis.intro_routes import ReachResult, reach, resolve_targets
from ..analysis.snapshot import (
    Analysis,
    analyse,
    apply_user_decisions,
    cache_key,
    stamped_analysis,
    stamped_group_of,
    stored_analysis,
    tie_graph,
)
from ..errors import NotFoundError
from ..evidence.explain import basis, evidence_summary, explain_tie, tie_words
from ..evidence.network import AsOf, Network, load_network, load_warmth, resolve_as_of, warmth_cache_key
from ..evidence.warmth import Warmth, unlisted_people
from ..model import SORTS, Contact
from ..people.mailpeople import evidence_interactions, me_emails
from ..people.normalise import normalise_email
from ..store import Store
from .frames import network_frames, network_graph
from .people import search_contacts
from .settings import stored_value

if TYPE_CHECKING:
    import networkx as nx
    import pandas as pd

__all__ = ["ResultsMixin", "Rows", "contact_fields", "SORTS"]

Day = AsOf | date | str | None


_MONTH = re.compile(r"^(\d{4})-(\d{2})")


class Rows(list):
    """A list of result rows that also says how many there were before a ``limit`` (``total``)."""

    total: int = 0


def contact_fields(c: Contact, extra: dict[str, Any] | None = None) -> dict[str, Any]:
    """One contact as a row: id, name, emails, phones, orgs, past_orgs, titles, tags, localities, sources (file names).

    These names are the scripting contract of ``mynet contacts --json`` and ``mynet show --json``: keep them.
    """
    out = {
        "id": c.id,
        "name": c.name,
        "emails": c.emails,
        "phones": c.phones,
        "orgs": c.orgs,
        "past_orgs": c.past_orgs,
        "titles": c.titles,
        "tags": c.tags,
        "localities": c.localities,
        "sources": sorted({s.rsplit("/", 1)[-1] for s in c.sources}),
    }
    if extra:
        out.update(extra)
    return out


def _warmth_fields(c: Contact, warmth: dict[int, Warmth]) -> dict[str, Any]:
    w = warmth.get(c.id)
    return {"warmth": float(w.warmth) if w else 0.0, "last_interaction": w.last if w else None,
            "tier": w.tier if w else "none"}


class ResultsMixin:
    """Results (part of :class:`~mynet.workspace.Workspace`)."""

    store: Store

    # -- the network and its analysis ------------------------------------------------
    def as_of(self, day: Day = None, *, today: date | None = None) -> AsOf:
        """The day to look from: ``day`` if given, else today, else your newest interaction when that is stale.

        Raises
        ------
        MynetError
            When ``day`` is not a date written YYYY-MM-DD.
        """
        return day if isinstance(day, AsOf) else resolve_as_of(self.store, day, today=today)

    def network(self, as_of: Day = None, *, today: date | None = None) -> Network:
        """Contacts, ties and your warmth seen from a day (cached in the workspace)."""
        return load_network(self.store, today=today, as_of=as_of)

    def analysis(self, net: Network | None = None, *, as_of: Day = None, force: bool = False,
                 measures: bool = True) -> Analysis:
        """Groups, measures, bridges and the shape of the network (cached until something it reads changes).

        Without ``net``, an analysis found current at this data version and day is read
        without loading the network (``measures=False`` then leaves the per-contact
        measures out, for a caller that shows only groups).
        """
        if net is None and not force:
            when = self.as_of(as_of)
            kept = stamped_analysis(self.store, when, measures=measures)
            if kept is not None:
                apply_user_decisions(self.store, Network.looking_from(when, warmth=self.warmth(when)), kept)
                return kept
            net = self.network(when)
        return analyse(self.store, net or self.network(as_of), force=force, progress=getattr(self, "progress", None),
                       measures=measures)

    def analysis_is_cached(self, net: Network) -> bool:
        """Whether the analysis of ``net`` was computed before (it may still need recomputing if inputs changed)."""
        return self.store.analysis_stamp(cache_key(net)) is not None

    def cached_analysis(self, as_of: Day = None, *, today: date | None = None) -> tuple[AsOf, Analysis] | None:
        """The groups as last analysed, straight from the cache, with your names applied; None when not cached.

        For a first screen at once: the ties are not loaded and nothing is checked
        against them (:meth:`analysis` does that).
        """
        when = self.as_of(as_of, today=today)
        analysis = stored_analysis(self.store, cache_key(Network.looking_from(when)))
        warmth = self.store.cached(warmth_cache_key(when.day))
        if analysis is None or warmth is None:
            return None
        light = Network.looking_from(when, warmth={int(k): Warmth(**v) for k, v in warmth.items()})
        apply_user_decisions(self.store, light, analysis)
        return when, analysis

    def warmth(self, as_of: Day = None) -> dict[int, Warmth]:
        """Your warmth to every contact on the day looked from."""
        return load_warmth(self.store, today=self.as_of(as_of).day)

    # -- rows ------------------------------------------------------------------------------
    def contacts(self, *, search: str | None = None, sort: str = "id", limit: int = 0, as_of: Day = None,
                 with_groups: bool = True, net: Network | None = None) -> Rows:
        """Your contacts as rows (:func:`contact_fields` plus warmth, last_interaction, tier and group).

        ``sort`` is one of :data:`SORTS`; ``search`` keeps those whose name, e-mail, phone,
        organisation, title, tag or place contains it; ``with_groups=False`` skips the
        analysis (``group`` is then left out). Without ``net``, groups are those of the
        network seen from today (or from your newest interaction when that is stale).
        """
        page = not search and sort == "id" and limit > 0
        people = self.store.contacts(limit=limit) if page else self.store.contacts()
        if search:
            people = search_contacts(people, search)
        warmth = net.warmth if net is not None else self.warmth(as_of)
        if sort == "name":
            people.sort(key=lambda c: (c.name.casefold(), c.id))
        elif sort == "warmth":
            people.sort(key=lambda c: (-warmth[c.id].warmth, c.id))
        elif sort == "last":
            people.sort(key=lambda c: (warmth[c.id].last or "", c.id), reverse=True)
        total = self.store.contact_count() if page else len(people)
        if limit:
            people = people[:limit]
        groups = self._groups_of([c.id for c in people], net, as_of) if with_groups else None
        rows = Rows(contact_fields(c, _warmth_fields(c, warmth) | ({"group": groups.get(c.id)} if groups is not None
                                                                    else {}))
                    for c in people)
        rows.total = total
        return rows

    def _groups_of(self, ids: list[int], net: Network | None, as_of: Day) -> dict[int, int | None]:
        """The groups of the contacts ``ids``: a look-up in the kept analysis when it is current."""
        if net is None:
            found = stamped_group_of(self.store, self.as_of(as_of), ids)
            if found is not None:
                return found
        return self.analysis(net, as_of=as_of, measures=False).group_of

    def unlisted(self) -> list[dict[str, Any]]:
        """People you met or wrote with who are not in your address book, seen often enough to matter.

        "Often enough" is the setting ``warmth_model.unlisted_threshold``.
        """
        threshold = stored_value(self.store.settings(), "warmth_model.unlisted_threshold")
        return unlisted_people(self.store.contacts(), evidence_interactions(self.store), me_emails(self.store),
                               threshold)

    def ties(self, *, all_pairs: bool = False, of: int | None = None, limit: int = 0, as_of: Day = None,
             net: Network | None = None) -> Rows:
        """Ties between your contacts, strongest first: a, b, a_name, b_name, strength, basis, words, evidence.

        ``all_pairs`` lists every pair with any evidence (no threshold, no backbone filter);
        ``of`` keeps the ties of one contact. ``basis`` is "observed" when something
        happened (a meeting, a thread, a card naming the other, your word), else
        "assumed"; ``words`` says the tie in plain words.
        """
        net = net or self.network(as_of)
        t = net.all_ties if all_pairs else net.ties
        order = t.order()
        if of is not None:
            order = order[(t.a[order] == of) | (t.b[order] == of)]
        rows = Rows()
        rows.total = len(order)
        for i in order[:limit] if limit else order:
            ev = evidence_summary(net, int(i), t)
            a, b = int(t.a[i]), int(t.b[i])
            rows.append({"a": a, "b": b, "a_name": net.name(a), "b_name": net.name(b),
                         "strength": float(t.strength[i]), "basis": basis(ev), "words": tie_words(ev), "evidence": ev})
        return rows

    def labels(self, *, net: Network | None = None) -> list[dict[str, Any]]:
        """Every label your contacts carry, most used first: label, uses, counts, why, rule, decision."""
        net = net or self.network()
        found = sorted(net.labels.values(), key=lambda v: (-v["uses"], v["key"]))
        return [{"label": v["label"], "uses": v["uses"], "counts": v["counts"], "why": v["reason"], "rule": v["rule"],
                 "decision": v.get("decision")} for v in found]

    def groups(self, *, as_of: Day = None, net: Network | None = None) -> list[dict[str, Any]]:
        """The groups, largest first: id, name, label, user_named, size, warm, members."""
        a = self.analysis(net, as_of=as_of, measures=False)
        return [{"id": g.id, "name": g.name, "label": g.label, "user_named": g.user_named, "size": g.size,
                 "warm": g.warm, "members": g.members} for g in a.groups]

    def measures(self, *, as_of: Day = None, net: Network | None = None) -> list[dict[str, Any]]:
        """Every contact's measures by id: name, group, role, degree, strength, betweenness, constraint..."""
        net = net or self.network(as_of)
        a = self.analysis(net)
        return [{"id": c, "name": net.name(c), "group": a.group_of.get(c)} | m for c, m in sorted(a.measures.items())]

    def reach(self, *, to: str | int | None = None, org: str | None = None, tag: str | None = None,
              domain: str | None = None, k: int = 5, max_intermediaries: int = 2, avoid: Iterable[str | int] = (),
              min_strength: float = 0.0, as_of: Day = None, net: Network | None = None) -> ReachResult:
        """The warmest chains of introductions to a person (``to``), an organisation, a tag or a mail domain.

        Give exactly one target. ``avoid`` names people (ids, names or addresses) never to go through.
        Someone you asked recently (an open or declined ask, :meth:`held_back`) comes after others:
        such a path carries ``held_back`` (asked_on, state, factor, about).
        """
        net = net or self.network(as_of)
        targets = resolve_targets(net, to=None if to is None else str(to), org=org, tag=tag, domain=domain,
                                  find_contact=self.find)
        avoid_ids = {self.find(a).id for a in avoid}
        return reach(net, targets, k=k, max_intermediaries=max_intermediaries, avoid=avoid_ids,
                     min_strength=min_strength, groups=self.analysis(net, measures=False).group_of,
                     hold=self.held_back())  # type: ignore[attr-defined]

    def audit(self, *, as_of: Day = None, net: Network | None = None,
              analysis: Analysis | None = None) -> list[dict[str, Any]]:
        """Findings about the shape of your network, most useful first.

        Raises
        ------
        NotFoundError
            When there is nothing to audit (no contacts yet).
        """
        net = net or self.network(as_of)
        if not net.contacts:
            raise NotFoundError("there is nothing to audit yet: import your contacts first (mynet import FILE)")
        return audit(net, analysis or self.analysis(net), today=net.as_of.day, ego=self._ego(net))

    def _ego(self, net: Network) -> dict[str, float]:
        """Your own brokerage (:func:`ego_brokerage`), kept for this data version and day."""
        key = f"ego:v1:{net.as_of.day.isoformat()}:{int(net.as_of.cut)}"
        current = net.data_version is not None and net.data_version == self.store.data_version
        kept = self.store.cached(key) if current else None
        if kept is None:
            kept = ego_brokerage(tie_graph(net), {cid: w.warmth for cid, w in net.warmth.items()})
            if current:
                self.store.put_cache(key, kept)
        return kept

    def explain(self, a: int, b: int, *, as_of: Day = None, net: Network | None = None) -> dict[str, Any]:
        """Every piece of evidence for the tie between two contacts, with the file and line it came from."""
        return explain_tie(self.store, net or self.network(as_of), a, b)

    def graph(self, as_of: Day = None) -> nx.Graph:
        """The tie graph with every contact's and every tie's attributes (see :func:`.frames.network_graph`)."""
        net = self.network(as_of)
        return network_graph(net, self.analysis(net))

    def frames(self, as_of: Day = None) -> dict[str, pd.DataFrame]:
        """The network as pandas DataFrames: ``contacts``, ``ties``, ``groups`` and ``measures``.

        * contacts: one row per contact, indexed by id (the columns of :meth:`contacts`:
          names, addresses and organisations as lists, warmth, tier, last_interaction, group);
        * ties: one row per tie, strongest first: a, b, a_name, b_name, strength,
          basis ("observed" or "assumed"), words, evidence (a list of items), the
          amount of each kind of evidence, meetings, threads and manual;
        * groups: one row per group, indexed by id: name, label, user_named, size, warm, members;
        * measures: one row per contact, indexed by id: name, group, role, degree,
          strength, betweenness, closeness, eigenvector, pagerank, clustering,
          constraint, effective_size, participation, within_z.
        """
        net = self.network(as_of)
        analysis = self.analysis(net)
        return network_frames(net, analysis, self.contacts(net=net))

    def timeline(self, net: Network | None = None) -> list[dict[str, Any]]:
        """Per month: meetings, messages and the distinct contacts in them (bulk mail left out); counts only."""
        net = net or self.network()
        of = {e: c.id for c in net.contacts for e in c.emails}
        meetings: Counter = Counter()
        messages: Counter = Counter()
        people: dict[str, set[int]] = defaultdict(set)
        for it in evidence_interactions(self.store):
            m = _MONTH.match(it.when or "")
            if not m or it.bulk:
                continue
            month = f"{m.group(1)}-{m.group(2)}"
            (meetings if it.kind == "meeting" else messages)[month] += 1
            for p in it.participants:
                cid = of.get(normalise_email(p))
                if cid is not None:
                    people[month].add(cid)
        months = sorted(set(meetings) | set(messages))
        if not months:
            return []
        y, mo = map(int, months[0].split("-"))
        last = months[-1]
        out = []
        while True:
            key = f"{y:04d}-{mo:02d}"
            out.append({"month": key, "meetings": meetings[key], "messages": messages[key], "people": len(people[key])})
            if key >= last:
                break
            y, mo = (y + 1, 1) if mo == 12 else (y, mo + 1)
        return out
