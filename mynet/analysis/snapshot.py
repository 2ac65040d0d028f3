"""The analysis of a workspace in one object: groups, measures, bridges, shape.

Computes everything the views need from the tie graph, caches it in the
workspace keyed by a digest of everything it reads (:func:`cache_inputs`: the
ties, the contacts' attributes, the settings, and whom you have any warmth
with), keeps group ids stable across runs and applies the user's group names
(cheap, so applied on every load and never part of the key).
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import asdict, dataclass, field
from typing import Any, Callable, Mapping

import numpy as np

from ..evidence.network import AsOf, Network, load_network
from ..lazy import lazy_module
from ..people.mailpeople import not_employer_domains
from ..people.normalise import email_domain, fold_text, is_real_org, is_webmail, normalise_org
from ..settings import SettingsGroup, setting
from ..store import Store
from .bridges import group_bridges, group_links, single_points_of_access
from .centrality import EXACT_LIMIT, SAMPLES, contact_measures
from .groups import detect_groups, match_groups, suggest_label
from .structure import network_summary

nx = lazy_module("networkx")

__all__ = ["AnalysisModel", "GroupInfo", "Analysis", "tie_graph", "analyse", "cache_inputs", "inputs_digest",
           "load_analysis", "contact_attrs", "stamped_analysis", "stored_analysis", "stamped_group_of",
           "apply_user_decisions", "compute_analysis", "cache_key", "STEPS", "DONE"]

CACHE_KEY = "analysis:v3"  # v2: rows; v3: roles in our own words
STATE_KEY = "groups_state"


@dataclass
class AnalysisModel(SettingsGroup, group="analysis"):
    """Settings of the analysis (``mynet settings analysis.resolution=1.5``)."""

    resolution: float = setting(1.0, "group size: above 1 finds more, smaller groups", low=0, low_open=True)
    min_group_size: int = setting(3, "smaller fragments are shown as unclustered", low=1)
    seed: int = setting(0, "seed of every random choice (the same seed gives the same answer)", low=0)
    exact_limit: int = setting(EXACT_LIMIT, "betweenness is exact up to this many contacts, estimated above", low=0)
    samples: int = setting(SAMPLES, "most source contacts of the betweenness estimate above that size (it stops "
                           "earlier once its top 10% is expected to agree 92% with exact values)", low=64)
    backend: str = setting("auto", "Louvain implementation: python-louvain, igraph, or auto (python-louvain up to "
                           "20,000 contacts)", choices=("auto", "louvain", "igraph"))


@dataclass
class GroupInfo:
    id: int
    name: str  # the user's name, else the suggested label
    label: str  # the suggested label
    share: float  # share of members behind the label
    user_named: bool
    size: int
    members: list[int]
    warm: int = 0  # members you are warm with (warmth >= 0.3)
    warm_share: float = 0.0


@dataclass
class Analysis:
    """Everything computed about the shape of the network at one version of the ties."""

    fingerprint: str
    modularity: float
    resolution: float
    groups: list[GroupInfo]
    group_of: dict[int, int | None]
    measures: dict[int, dict[str, Any]]
    measures_info: dict[str, Any]
    bridges: list[dict[str, Any]]
    links: list[dict[str, Any]]
    access: list[dict[str, Any]]
    summary: dict[str, Any]
    events: list[dict[str, Any]] = field(default_factory=list)

    def group(self, gid: int) -> GroupInfo | None:
        return next((g for g in self.groups if g.id == gid), None)

    def to_json(self) -> dict[str, Any]:
        d = asdict(self)
        d["group_of"] = {str(k): v for k, v in self.group_of.items()}
        d["measures"] = {str(k): v for k, v in self.measures.items()}
        return d

    @classmethod
    def from_json(cls, d: dict[str, Any]) -> "Analysis":
        d = dict(d)
        d["groups"] = [GroupInfo(**g) for g in d["groups"]]
        d["group_of"] = {int(k): v for k, v in d["group_of"].items()}
        d["measures"] = {int(k): v for k, v in d["measures"].items()}
        return cls(**d)


def tie_graph(net: Network) -> nx.Graph:
    """The tie graph (you excluded): every contact a node, ties weighted by strength."""
    G = nx.Graph()
    G.add_nodes_from(sorted(c.id for c in net.contacts))
    t = net.ties
    order = np.lexsort((t.b, t.a))
    G.add_weighted_edges_from((int(t.a[i]), int(t.b[i]), float(t.strength[i])) for i in order)
    return G


def contact_attrs(net: Network,
                  extra_webmail: frozenset[str] | set[str] = frozenset()) -> dict[str, dict[int, list[str]]]:
    """Per contact: organisations (current and past), tags, work mail domains, places."""
    extra = set(extra_webmail)
    orgs, tags, domains, places = {}, {}, {}, {}
    labels = getattr(net, "labels", {}) or {}
    for c in net.contacts:
        orgs[c.id] = [o for o in c.orgs + c.past_orgs if is_real_org(normalise_org(o))]
        # only labels that count as evidence name a group (never "follow up" or "VIP")
        tags[c.id] = [t for t in c.tags if labels.get(fold_text(t), {}).get("counts", True)]
        domains[c.id] = sorted({email_domain(e)
                                for e in c.emails} - {""} - {d for d in map(email_domain, c.emails)
                                                             if is_webmail(d, extra)})
        places[c.id] = list(c.localities)
    return {"organisation": orgs, "tag": tags, "domain": domains, "place": places}


def cache_inputs(store: Store, net: Network, model: AnalysisModel) -> dict[str, Any]:
    """Everything the analysis reads, by name: the cache key is a digest of exactly this.

    The computation takes its inputs from here too (see :func:`compute_analysis`), so nothing it
    reads can be left out of the key. A new input is one more entry.
    """
    t = net.ties
    return {
        "ties": (t.a, t.b, np.round(t.strength, 9)),
        "settings": asdict(model),
        "contacts": [[c.id, c.orgs, c.past_orgs, c.tags, c.emails, c.localities]
                     for c in sorted(net.contacts, key=lambda c: c.id)],
        # Webmail, relay and archive domains say nothing of a group (they never name one).
        "webmail": sorted(not_employer_domains(store)),
        # Labels that do not count as evidence never name a group.
        "labels": sorted(k for k, v in (getattr(net, "labels", {}) or {}).items() if not v.get("counts", True)),
        # Single points of access add you to the graph, tied to everyone you have any warmth with.
        "warm": sorted(cid for cid, w in net.warmth.items() if w.warmth > 0),
    }


def inputs_digest(inputs: Mapping[str, Any]) -> str:
    """A digest of :func:`cache_inputs` (arrays by their bytes, the rest as sorted JSON)."""
    h = hashlib.sha1()
    for name in sorted(inputs):
        h.update(name.encode() + b"\0")
        value = inputs[name]
        parts = value if isinstance(value, tuple) else (value,)
        for part in parts:
            if isinstance(part, np.ndarray):
                h.update(str(part.dtype).encode() + np.ascontiguousarray(part).tobytes())
            else:
                h.update(json.dumps(part, sort_keys=True, default=_default).encode())
            h.update(b"\1")
    return h.hexdigest()


def _first(values: list[str], fold) -> str | None:
    return fold(values[0]) if values else None


#: The steps of a fresh analysis, in order (each named to ``progress`` as it starts; then :data:`DONE`).
DONE = "done"
STEPS = ("tie graph", "groups", "measures (betweenness, closeness, constraint)", "bridges between groups",
         "network shape")


def compute_analysis(store: Store, net: Network, model: AnalysisModel, inputs: Mapping[str, Any],
                     progress: Callable[[str], None] | None = None) -> Analysis:
    step = progress or (lambda _s: None)
    fp = inputs_digest(inputs)
    step(STEPS[0])
    G = tie_graph(net)
    backend = model.backend
    if backend == "auto":
        # python-louvain is the reference implementation; igraph's multilevel (the same method in C) is
        # about ten times faster and keeps 50,000 contacts within the time budget (benchmarks/bench_groups.py).
        backend = "louvain" if G.number_of_nodes() <= 20_000 and model.resolution >= 1 else "igraph"
    step(STEPS[1])
    gr = detect_groups(G, resolution=model.resolution, seed=model.seed, min_size=model.min_group_size,
                       backend=backend)
    state = json.loads(store.meta(STATE_KEY, "{}") or "{}")
    previous = {int(k): set(v) for k, v in state.get("groups", {}).items()}
    mapping, events = match_groups(previous, gr.as_sets(), next_id=int(state.get("next_id", 1)))
    groups = {mapping[g]: sorted(m) for g, m in gr.groups.items()}
    group_of = {int(v): (mapping[g] if g is not None else None) for v, g in gr.membership.items()}
    step(STEPS[2])
    # Last run's roles: a person keeps theirs while still meeting its keep level (hysteresis).
    previous_roles = {int(k): v for k, v in state.get("roles", {}).items()}
    measures, info = contact_measures(G, group_of, seed=model.seed, exact_limit=model.exact_limit,
                                      samples=model.samples, previous_roles=previous_roles)
    measures = {int(k): {mk: (None if isinstance(mv, float) and not np.isfinite(mv) else mv) for mk, mv in m.items()}
                for k, m in measures.items()}
    sets = {g: set(m) for g, m in groups.items()}
    attrs = contact_attrs(net, set(inputs["webmail"]))
    infos = []
    for gid in sorted(groups, key=lambda g: (-len(groups[g]), g)):
        label, share = suggest_label(groups[gid], attrs)
        infos.append(GroupInfo(gid, label, label, round(float(share), 4), False, len(groups[gid]), groups[gid]))
    step(STEPS[3])
    links = [dict(v, a=int(g), b=int(h)) for (g, h), v in sorted(group_links(G, sets).items())]
    links = [{k: (sorted(map(int, v)) if isinstance(v, (set, frozenset)) else v) for k, v in link.items()}
             for link in links]
    bridges = group_bridges(G, sets, limit=200)
    observed = net.ties.observed()
    row = {(int(x), int(y)): i for i, (x, y) in enumerate(zip(net.ties.a, net.ties.b))}
    for b in bridges:
        i = row.get((min(b["a"], b["b"]), max(b["a"], b["b"])))
        b["basis"] = "observed" if i is not None and observed[i] else "assumed"
    access = single_points_of_access(G, sets, ego_ties={cid: 1.0 for cid in inputs["warm"]})
    flat = {
        "organisation": {v: _first(x, normalise_org) for v, x in attrs["organisation"].items() if x},
        "domain": {v: x[0] for v, x in attrs["domain"].items() if x},
        "tag": {v: _first(x, fold_text) for v, x in attrs["tag"].items() if x},
    }
    step(STEPS[4])
    summary = network_summary(G, group_of, flat, seed=model.seed)
    step(DONE)
    new_state = {"groups": {str(g): m for g, m in groups.items()},
                 "roles": {str(k): m["role"] for k, m in sorted(measures.items())},
                 "next_id": max([int(state.get("next_id", 1)), *[g + 1 for g in groups]])}
    # A look at a past day never renumbers today's groups; a read-only workspace keeps them from the next
    # writable run on.
    if not _looking_back(net) and not store.read_only:
        with store.transaction():
            store.set_meta(STATE_KEY, json.dumps(new_state))
    return Analysis(fp, float(gr.modularity), model.resolution, infos, group_of, measures, _jsonable(info),
                    _jsonable(bridges), _jsonable(links), _jsonable(access), _jsonable(summary), _jsonable(events))


def _jsonable(x: Any) -> Any:
    """Plain JSON types (numpy scalars, tuples, sets; NaN and infinities become None)."""
    return _finite(json.loads(json.dumps(x, default=_default, allow_nan=True)))


def _finite(x: Any) -> Any:
    if isinstance(x, float):
        return x if np.isfinite(x) else None
    if isinstance(x, dict):
        return {k: _finite(v) for k, v in x.items()}
    if isinstance(x, list):
        return [_finite(v) for v in x]
    return x


def _default(o: Any) -> Any:
    if isinstance(o, (np.integer,)):
        return int(o)
    if isinstance(o, (np.floating,)):
        return float(o)
    if isinstance(o, (set, frozenset, tuple)):
        return sorted(o) if isinstance(o, (set, frozenset)) else list(o)
    if isinstance(o, np.ndarray):
        return o.tolist()
    raise TypeError(type(o))


def _looking_back(net: Network) -> bool:
    """Whether the network leaves out interactions after a past day (``mynet ... --as-of``)."""
    as_of = getattr(net, "as_of", None)
    return bool(as_of is not None and as_of.cut)


def cache_key(net: Network) -> str:
    """The analysis cache entry of this network: one for now, one per past day looked at."""
    return CACHE_KEY + (f":{net.as_of.day.isoformat()}" if _looking_back(net) else "")


def _stamp(version: int, when: AsOf) -> str:
    """Where an analysis was last found current: the code's key, the data version, the day and whether it is cut.

    Every input of :func:`cache_inputs` is fixed by these: the ties, contacts, labels and settings by the
    data version (every import, decision and setting bumps it), your warmth by the day looked from.
    """
    return f"{CACHE_KEY}|{version}|{when.day.isoformat()}|{int(when.cut)}"


def _save(store: Store, key: str, a: Analysis, stamp: str) -> None:
    head = {k: v for k, v in a.to_json().items() if k not in ("groups", "group_of", "measures")}
    members = set(a.group_of) | set(a.measures)
    store.put_analysis(key, a.fingerprint, stamp, head, [asdict(g) for g in a.groups],
                       ((c, a.group_of.get(c), a.measures.get(c, {})) for c in sorted(members)))


def stored_analysis(store: Store, key: str, *, measures: bool = True) -> Analysis | None:
    """The analysis kept under ``key`` whatever it was computed from (the caller checks it), or None.

    ``measures=False`` leaves every contact's measures out (``measures`` is then empty).
    """
    head = store.analysis_head(key)
    if head is None:
        return None
    groups = [GroupInfo(**g) for g in store.analysis_groups(key)]
    return Analysis(groups=groups, group_of=store.analysis_group_of(key),
                    measures=store.analysis_measures(key) if measures else {}, **head)


def stamped_analysis(store: Store, when: AsOf, *, measures: bool = True) -> Analysis | None:
    """The kept analysis of the day ``when`` if it was found current at this data version and day, else None.

    Neither the ties nor the digest of :func:`cache_inputs` are needed: :func:`analyse` checked that
    digest at this same stamp (see :func:`_stamp`). Your group names are not applied here.
    """
    key = cache_key(Network.looking_from(when))
    kept = store.analysis_stamp(key)
    if kept is None or kept[1] != _stamp(store.data_version, when):
        return None
    return stored_analysis(store, key, measures=measures)


def stamped_group_of(store: Store, when: AsOf, ids: list[int]) -> dict[int, int | None] | None:
    """The groups of ``ids`` (None: unclustered) from the kept analysis, when it is current (see above)."""
    key = cache_key(Network.looking_from(when))
    kept = store.analysis_stamp(key)
    if kept is None or kept[1] != _stamp(store.data_version, when):
        return None
    found = store.analysis_group_of(key, ids)
    return {c: found.get(c) for c in ids}


def analyse(store: Store, net: Network | None = None, *, force: bool = False,
            progress: Callable[[str], None] | None = None, measures: bool = True) -> Analysis:
    """The analysis, from the workspace when nothing it reads has changed (see :func:`cache_inputs`).

    ``progress`` is called with each step's name (:data:`STEPS`) when the analysis is computed afresh.
    ``measures=False`` lets a kept analysis be read without the per-contact measures (``measures`` empty).
    """
    net = net or load_network(store)
    key = cache_key(net)
    version = getattr(net, "data_version", None)
    # The stamp is written only for a network loaded at the workspace's current data version.
    stamp = _stamp(version, net.as_of) if version is not None and version == store.data_version else ""
    kept = None if force else store.analysis_stamp(key)
    if kept is not None and stamp and kept[1] == stamp:  # its digest was found current at this stamp
        result = stored_analysis(store, key, measures=measures)
        if result is not None:
            apply_user_decisions(store, net, result)
            return result
    model = AnalysisModel.from_settings(store.setting("analysis", {}))
    inputs = cache_inputs(store, net, model)
    fp = inputs_digest(inputs)
    result = None
    if not force:
        if kept is not None and kept[0] == fp:
            result = stored_analysis(store, key)
            if result is not None and stamp and kept[1] != stamp:
                store.set_analysis_stamp(key, stamp)
    if result is None:
        result = compute_analysis(store, net, model, inputs, progress)
        _save(store, key, result, stamp)
    apply_user_decisions(store, net, result)
    return result


load_analysis = analyse


def apply_user_decisions(store: Store, net: Network, a: Analysis) -> None:
    """Group names and warm shares: cheap, applied on every load (never cached)."""
    names = {}
    for row in store.decisions("group_name"):
        names[int(row["a"])] = row["value"]
    for g in a.groups:
        if names.get(g.id):
            g.name, g.user_named = names[g.id], True
        else:
            g.name, g.user_named = g.label, False
        g.warm = sum(1 for m in g.members if net.warmth.get(m) and net.warmth[m].warmth >= 0.3)
        g.warm_share = round(g.warm / g.size, 4) if g.size else 0.0
