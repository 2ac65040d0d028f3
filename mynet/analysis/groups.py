"""Groups: Louvain communities of the tie graph, with stable identity and suggested labels.

Three steps, each a plain function:

* :func:`detect_groups` finds communities (Louvain) and keeps those of at least
  ``min_size`` contacts as groups; smaller fragments and isolates are
  *unclustered*, never one-person groups. Group ids are local to one run.
* :func:`match_groups` carries stable ids over from the previous run by optimal
  Jaccard matching, so a group the user named keeps its name when a few
  members come and go, and reports splits and merges.
* :func:`suggest_label` proposes a label from what most members share
  (organisation, tag, e-mail domain, locality).

References
----------
.. [1] V. D. Blondel, J.-L. Guillaume, R. Lambiotte, E. Lefebvre, "Fast unfolding
   of communities in large networks", J. Stat. Mech. P10008 (2008).
.. [2] M. E. J. Newman, M. Girvan, "Finding and evaluating community structure
   in networks", Phys. Rev. E 69, 026113 (2004).
.. [3] J. Reichardt, S. Bornholdt, "Statistical mechanics of community
   detection", Phys. Rev. E 74, 016110 (2006).
.. [4] L. Danon, A. Díaz-Guilera, J. Duch, A. Arenas, "Comparing community
   structure identification", J. Stat. Mech. P09008 (2005).
"""

from __future__ import annotations

import math
import random
from collections import Counter, defaultdict
from collections.abc import Hashable, Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..lazy import lazy_module
from ..people.normalise import GENERIC_TAGS, fold_text, is_real_org, is_webmail, normalise_org

nx = lazy_module("networkx")
sp = lazy_module("scipy.sparse")
optimize = lazy_module("scipy.optimize")

__all__ = [
    "GroupResult",
    "group_ref",
    "parse_group_ref",
    "detect_groups",
    "match_groups",
    "normalised_mutual_information",
    "sorted_nodes",
    "suggest_label",
]

BACKENDS = ("louvain", "igraph")


def group_ref(gid: int | None) -> str:
    """How a group is referred to everywhere: ``G7`` (its stable id), ``no group`` for none."""
    return "no group" if gid is None else f"G{int(gid)}"


def parse_group_ref(text: str | int) -> int | None:
    """The group id in ``"G7"``, ``"g7"`` or ``"7"``; None when it is neither."""
    t = str(text).strip()
    if t[:1] in ("G", "g"):
        t = t[1:]
    return int(t) if t.isdigit() else None


@dataclass(frozen=True)
class GroupResult:
    """The groups found in one run of :func:`detect_groups`.

    Attributes
    ----------
    groups : dict of int to frozenset
        Group id -> members, for communities of at least ``min_size`` contacts.
        Ids are ``0, 1, ...`` by decreasing size, ties broken by the smallest
        member, so they depend only on the partition (local to this run: use
        :func:`match_groups` for ids that last across runs).
    membership : dict
        Every node -> its group id, or ``None`` when unclustered.
    partition : dict
        Every node -> its raw community index as the algorithm found it,
        fragments included. Groups keep their id here; fragments follow them
        (``len(groups), ...``) in the same order.
    modularity : float
        Newman-Girvan modularity (resolution 1) of ``partition`` on the
        weighted graph; 0.0 for a graph without ties.
    resolution, seed, backend, min_size
        The settings of the run.
    """

    groups: dict[int, frozenset]
    membership: dict[Hashable, int | None]
    partition: dict[Hashable, int]
    modularity: float
    resolution: float
    seed: int
    backend: str
    min_size: int

    @property
    def unclustered(self) -> frozenset:
        """Nodes in no group (isolates and fragments smaller than ``min_size``)."""
        return frozenset(v for v, g in self.membership.items() if g is None)

    def as_sets(self) -> dict[int, set]:
        """Group id -> set of members, the form :func:`match_groups` takes."""
        return {g: set(m) for g, m in self.groups.items()}


def sorted_nodes(nodes: Iterable[Hashable]) -> list:
    """Nodes in a deterministic order: natural order, else by type name and text.

    Contact ids are ints and sort naturally; mixed node types (never made by
    mynet) fall back to ordering by ``(type name, repr)``.
    """
    nodes = list(nodes)
    try:
        return sorted(nodes)
    except TypeError:
        return sorted(nodes, key=lambda v: (type(v).__name__, repr(v)))


def edge_arrays(G: nx.Graph, weight: str | None = "weight"):
    """Sorted nodes and the edges as index arrays ``i < j`` in lexicographic order.

    Self-loops are dropped (a contact has no tie to themself). Weights (all 1
    when ``weight`` is None, 1 where the attribute is missing) must be finite
    and positive.
    """
    nodes = sorted_nodes(G.nodes)
    index = {v: k for k, v in enumerate(nodes)}
    adj = G._adj  # plain dicts: iterating them is several times faster than G.edges(data=...)
    counts = np.fromiter((len(nbrs) for nbrs in adj.values()), dtype=np.int64, count=len(adj))
    total = int(counts.sum())
    rows = np.repeat(np.fromiter((index[u] for u in adj), dtype=np.int64, count=len(adj)), counts)
    # (list comprehensions are faster than generators here)
    cols = np.array([index[v] for nbrs in adj.values() for v in nbrs], dtype=np.int64).reshape(total)
    if weight is None:
        w = np.ones(total)
    else:
        try:
            w = np.array(
                [d.get(weight, 1.0) for nbrs in adj.values() for d in nbrs.values()], dtype=float
            ).reshape(total)
        except (TypeError, ValueError) as exc:
            raise ValueError(f"every tie needs a positive finite {weight!r}: {exc}") from None
    # Each tie appears once from each end (a self-loop once); keep i < j.
    keep = rows < cols
    iu, iv, w = rows[keep], cols[keep], w[keep]
    k = len(w)
    if k and not (np.all(np.isfinite(w)) and np.all(w > 0)):
        raise ValueError(f"every tie needs a positive finite {weight!r}; found {w[~(np.isfinite(w) & (w > 0))][:3]}")
    order = np.lexsort((iv, iu))
    return nodes, iu[order], iv[order], w[order]


def _canonical_graph(nodes: list, lo: np.ndarray, hi: np.ndarray, w: np.ndarray) -> nx.Graph:
    """A fresh graph with nodes and edges added in sorted order and only ``weight`` kept."""
    H = nx.Graph()
    H.add_nodes_from(nodes)
    H.add_weighted_edges_from(zip([nodes[i] for i in lo.tolist()], [nodes[j] for j in hi.tolist()], w.tolist()))
    return H


def _modularity(n: int, lo: np.ndarray, hi: np.ndarray, w: np.ndarray, labels: np.ndarray) -> float:
    """Newman-Girvan modularity ``sum_c [L_c / m - (k_c / 2m)^2]`` (weighted, resolution 1)."""
    m = float(w.sum())
    if m <= 0:
        return 0.0
    k = np.bincount(lo, weights=w, minlength=n) + np.bincount(hi, weights=w, minlength=n)
    nc = int(labels.max()) + 1 if n else 0
    inside = labels[lo] == labels[hi]
    L = np.bincount(labels[lo[inside]], weights=w[inside], minlength=nc)
    K = np.bincount(labels, weights=k, minlength=nc)
    return float(L.sum() / m - np.sum((K / (2.0 * m)) ** 2))


def _run_igraph(n: int, lo, hi, w, resolution: float, seed: int) -> np.ndarray:
    import igraph as ig

    g = ig.Graph(n=n, edges=list(zip(lo.tolist(), hi.tolist())), directed=False)
    g.es["weight"] = w.tolist()
    # igraph draws from Python's random module by default; give it a private,
    # seeded generator for the call and put the default back afterwards.
    ig.set_random_number_generator(random.Random(seed))
    try:
        clustering = g.community_multilevel(weights="weight", resolution=resolution)
    finally:
        ig.set_random_number_generator(random)
    return np.asarray(clustering.membership, dtype=np.int64)


def detect_groups(
    G: nx.Graph,
    *,
    resolution: float = 1.0,
    seed: int = 0,
    min_size: int = 3,
    backend: str = "louvain",
) -> GroupResult:
    """Find groups of contacts by Louvain modularity optimisation.

    The graph is first rebuilt with sorted nodes and sorted edges, so the
    result depends only on the graph and ``seed``, never on insertion order.

    Parameters
    ----------
    G : networkx.Graph
        Undirected; nodes are contact ids, edge attribute ``weight`` is the tie
        strength (positive; missing means 1). Self-loops are ignored.
    resolution : float, default 1.0
        The resolution ``gamma`` of the quality
        ``sum_c [L_c / m - gamma (k_c / 2m)^2]`` (Reichardt & Bornholdt 2006),
        the convention of networkx's ``louvain_communities`` and igraph's
        ``community_multilevel``: above 1 gives more, smaller groups; below 1
        fewer, larger ones. Must be positive; with ``backend="louvain"`` it
        must be at least 1 (see Notes).
    seed : int, default 0
        Seed of the random node order.
    min_size : int, default 3
        Communities with fewer contacts are unclustered (group ``None``).
    backend : {"louvain", "igraph"}, default "louvain"
        ``"louvain"`` runs python-louvain's ``best_partition``; ``"igraph"``
        runs igraph's ``community_multilevel`` (C code, about seven times
        faster: on a synthetic 50,000-contact, 1,000,000-tie graph 3.5 s
        against 25 s on two cores, same modularity; see
        ``benchmarks/bench_groups.py``). Use it for networks of more than a
        few thousand contacts.

    Returns
    -------
    GroupResult

    Raises
    ------
    ValueError
        For an unknown backend, a non-positive resolution, resolution below 1
        with ``backend="louvain"``, or a tie without a positive finite weight.

    Notes
    -----
    The two libraries do not treat ``resolution`` alike. networkx (3.6) and
    igraph (1.0) optimise ``sum_c [L_c/m - gamma (k_c/2m)^2]`` with
    ``gamma = resolution`` throughout. python-louvain 0.16 is inconsistent: its
    node moves use the same convention (``resolution`` multiplies the
    null-model term in the gain, since its pull request 92), but the quality
    that decides whether to aggregate to the next level is
    ``sum_c [resolution * L_c/m - (k_c/2m)^2]`` (``__modularity``), where
    ``resolution`` runs the opposite way (the Markov time of Lambiotte,
    Delvenne & Barahona, its pre-0.16 meaning). Above 1 both say "smaller
    groups" and python-louvain agrees with networkx in practice (on the karate
    club graph: 8 communities at 2, 17 at 5, in both); below 1 python-louvain
    stops after its first level and returns *more*, smaller groups (karate
    club at 0.5: 8 against networkx's 2), the opposite of networkx. So this
    function refuses ``resolution < 1`` with python-louvain; use
    ``backend="igraph"`` for coarser groups.

    ``modularity`` is always the plain Newman-Girvan value (resolution 1) of
    the raw partition, computed here with numpy; it agrees with
    ``community_louvain.modularity`` and ``networkx.community.modularity``
    (tested).

    References
    ----------
    .. [1] V. D. Blondel, J.-L. Guillaume, R. Lambiotte, E. Lefebvre, "Fast
       unfolding of communities in large networks", J. Stat. Mech. P10008 (2008).
    .. [2] M. E. J. Newman, M. Girvan, "Finding and evaluating community
       structure in networks", Phys. Rev. E 69, 026113 (2004).
    .. [3] J. Reichardt, S. Bornholdt, "Statistical mechanics of community
       detection", Phys. Rev. E 74, 016110 (2006).

    Examples
    --------
    >>> import networkx as nx
    >>> G = nx.Graph()
    >>> G.add_weighted_edges_from([(1, 2, 1.0), (2, 3, 1.0), (1, 3, 1.0), (4, 5, 1.0), (5, 6, 1.0), (4, 6, 1.0),
    ...                            (3, 4, 0.1)])
    >>> sorted(sorted(m) for m in detect_groups(G).groups.values())
    [[1, 2, 3], [4, 5, 6]]
    """
    if backend not in BACKENDS:
        raise ValueError(f"backend must be one of {BACKENDS}, not {backend!r}")
    if not (resolution > 0 and math.isfinite(resolution)):
        raise ValueError(f"resolution must be a positive number, not {resolution!r}")
    if backend == "louvain" and resolution < 1:
        raise ValueError(
            "python-louvain 0.16 stops after its first level when resolution < 1 and returns smaller "
            "groups, not larger ones; use backend='igraph' for resolution below 1"
        )
    if G.is_directed() or G.is_multigraph():
        raise ValueError("detect_groups needs an undirected simple graph (networkx.Graph)")

    nodes, lo, hi, w = edge_arrays(G)
    n = len(nodes)
    if len(lo) == 0:
        raw = np.arange(n, dtype=np.int64)
    elif backend == "igraph":
        raw = _run_igraph(n, lo, hi, w, resolution, seed)
    else:
        import community as community_louvain

        H = _canonical_graph(list(range(n)), lo, hi, w)
        part = community_louvain.best_partition(H, weight="weight", resolution=resolution, random_state=seed)
        raw = np.fromiter((part[i] for i in range(n)), dtype=np.int64, count=n)

    # Deterministic ids: by decreasing size, then smallest member (nodes are
    # sorted, so the smallest index is the smallest member).
    members: dict[int, list[int]] = defaultdict(list)
    for i, c in enumerate(raw.tolist()):
        members[c].append(i)
    ordered = sorted(members.values(), key=lambda ms: (-len(ms), ms[0]))
    labels = np.empty(n, dtype=np.int64)
    groups: dict[int, frozenset] = {}
    for new_id, ms in enumerate(ordered):
        labels[ms] = new_id
        if len(ms) >= min_size:
            groups[new_id] = frozenset(nodes[i] for i in ms)
    partition = {nodes[i]: int(labels[i]) for i in range(n)}
    membership = {v: (c if c in groups else None) for v, c in partition.items()}
    return GroupResult(
        groups=groups,
        membership=membership,
        partition=partition,
        modularity=_modularity(n, lo, hi, w, labels),
        resolution=float(resolution),
        seed=seed,
        backend=backend,
        min_size=min_size,
    )


def match_groups(
    previous: Mapping[int, Iterable[Hashable]],
    current: Mapping[int, Iterable[Hashable]],
    *,
    min_jaccard: float = 0.3,
    min_share: float = 0.25,
    next_id: int | None = None,
) -> tuple[dict[int, int], list[dict[str, Any]]]:
    """Give the groups of this run the stable ids of the previous run.

    Previous and current groups are paired by the assignment that maximises
    the total Jaccard overlap ``|P & C| / |P | C|`` (linear_sum_assignment);
    a pair whose overlap is below ``min_jaccard`` is not a match. Matched
    current groups take the previous id; the others get fresh ids above every
    id seen so far, so an id is never reused.

    Parameters
    ----------
    previous : mapping of int to set of node
        Stable id -> members, as stored after the previous run.
    current : mapping of int to set of node
        Local id -> members, e.g. ``GroupResult.as_sets()``.
    min_jaccard : float, default 0.3
        Smallest overlap that still counts as the same group.
    min_share : float, default 0.25
        For the events: a part of a previous group counts when it holds at
        least this share of that group's members (and at least 2 of them).
    next_id : int, optional
        The smallest id that may be issued (the caller's high-water mark,
        so ids of groups that vanished before ``previous`` are not reused).
        Fresh ids start at ``max(next_id, max(previous) + 1, 1)``.

    Returns
    -------
    mapping : dict of int to int
        Current local id -> stable id.
    events : list of dict
        Plain data, in this order:

        * ``{"kind": "split", "from": p, "into": [s, ...]}``: two or more
          current groups (stable ids, sorted) each hold a part of previous group
          ``p``, and together they hold more than half of its members;
        * ``{"kind": "merge", "from": [p, ...], "into": s}``: current group
          ``s`` holds a part of two or more previous groups;
        * ``{"kind": "new", "id": s}``: a current group with a fresh id;
        * ``{"kind": "ended", "id": p}``: a previous group matched by none.

    Examples
    --------
    >>> mapping, events = match_groups({7: {1, 2, 3, 4}}, {0: {1, 2, 3, 5}, 1: {8, 9, 10}})
    >>> mapping
    {0: 7, 1: 8}
    >>> events
    [{'kind': 'new', 'id': 8}]
    """
    prev_ids = sorted(previous)
    cur_ids = sorted(current)
    prev = [set(previous[p]) for p in prev_ids]
    cur = [set(current[c]) for c in cur_ids]
    # Overlaps |P & C| of every pair at once: incidence matrices, one product.
    index: dict = {}
    for ms in (*prev, *cur):
        for v in ms:
            index.setdefault(v, len(index))

    def incidence(sets: list[set]) -> sp.csr_matrix:
        rows = np.repeat(np.arange(len(sets)), [len(ms) for ms in sets])
        cols = np.fromiter((index[v] for ms in sets for v in ms), dtype=np.int64, count=len(rows))
        return sp.csr_matrix((np.ones(len(rows)), (rows, cols)), shape=(len(sets), max(1, len(index))))

    inter = (incidence(prev) @ incidence(cur).T).toarray()
    size_p = np.array([len(ms) for ms in prev], dtype=float)
    size_c = np.array([len(ms) for ms in cur], dtype=float)
    union = size_p[:, None] + size_c[None, :] - inter
    J = np.divide(inter, union, out=np.zeros_like(inter), where=union > 0)

    mapping: dict[int, int] = {}
    if prev_ids and cur_ids:
        rows, cols = optimize.linear_sum_assignment(J, maximize=True)
        for r, c in zip(rows.tolist(), cols.tolist()):
            if J[r, c] >= min_jaccard and J[r, c] > 0:
                mapping[cur_ids[c]] = prev_ids[r]
    fresh = max([next_id if next_id is not None else 1, (max(prev_ids) + 1) if prev_ids else 1, 1])
    new_ids = []
    for c in cur_ids:
        if c not in mapping:
            mapping[c] = fresh
            new_ids.append(fresh)
            fresh += 1

    # Parts: previous group p has a part in current group c when c holds at
    # least min_share of p's members (and at least two of them).
    events: list[dict[str, Any]] = []
    sources: dict[int, list[int]] = defaultdict(list)
    for r, p in enumerate(prev_ids):
        size = size_p[r]
        held = []
        for col, c in enumerate(cur_ids):
            k = int(inter[r, col])
            if k >= 2 and k >= min_share * size:
                held.append((c, k))
                sources[c].append(p)
        if len(held) >= 2 and sum(k for _, k in held) > size / 2:
            events.append({"kind": "split", "from": p, "into": sorted(mapping[c] for c, _ in held)})
    for c in cur_ids:
        if len(sources[c]) >= 2:
            events.append({"kind": "merge", "from": sorted(sources[c]), "into": mapping[c]})
    events.extend({"kind": "new", "id": s} for s in new_ids)
    matched_prev = {mapping[c] for c in cur_ids} & set(prev_ids)
    events.extend({"kind": "ended", "id": p} for p in prev_ids if p not in matched_prev)
    return mapping, events


# Attribute kinds by name: how a value is folded for counting and shown.
def _attr_kind(name: str) -> str:
    n = name.lower()
    if "org" in n or "employer" in n or "compan" in n:
        return "organisation"
    if "tag" in n or "categor" in n or "label" in n:
        return "tag"
    if "domain" in n or "mail" in n:
        return "domain"
    return "place"


def _fold(kind: str, value: str) -> str:
    """The counting key of a value, or "" for a value that says nothing about a group."""
    if kind == "organisation":
        key = normalise_org(value)
        return key if is_real_org(key) else ""  # "Retired", "Freelance", ...
    if kind == "domain":
        key = value.strip().lstrip("@").lower()
        return "" if is_webmail(key) else key
    key = fold_text(value)
    return "" if kind == "tag" and key in GENERIC_TAGS else key


def _wording(kind: str, shown: str, count: int, total: int) -> str:
    tail = f"({count} of {total})"
    if kind == "organisation":
        return f"mostly {shown} {tail}"
    if kind == "tag":
        return f"tag: {shown} {tail}"
    if kind == "domain":
        return f"@{shown.strip().lstrip('@').lower()} {tail}"
    return f"{shown} {tail}"


def suggest_label(
    members: Iterable[Hashable],
    attrs: Mapping[str, Mapping[Hashable, Sequence[str]]],
    *,
    min_share: float = 0.4,
) -> tuple[str, float]:
    """A label for a group from the value most of its members share.

    Each member counts once per value (an organisation held now and in the
    past counts once). Values are compared folded (case, accents and
    punctuation; organisations also without "The" and legal forms, see
    :func:`mynet.people.normalise.normalise_org`; domains lower-cased) and shown in
    the members' most common original spelling (ties: the first in code-point
    order). Values that say nothing about a group are skipped: placeholder
    employers (:func:`mynet.people.normalise.is_real_org`), generic address-book
    labels (``GENERIC_TAGS``) and public webmail domains.

    Parameters
    ----------
    members : iterable of node
    attrs : mapping of str to mapping of node to list of str
        Attribute name -> node -> values. The name sets the wording: names
        with "org", "employer" or "company" give ``"mostly Quillon Labs (14 of
        19)"``; "tag", "category" or "label" give ``"tag: climbing club (9 of
        11)"``; "domain" or "mail" give ``"@velvane.example (6 of 8)"``; any
        other name (a locality) gives ``"Brightwater (5 of 7)"``.
    min_share : float, default 0.4
        Below this share of the members, no single value names the group and
        the label is ``"mixed: A, B"`` from the two most common values held by
        at least two members (``"mixed"`` when there is none).

    Returns
    -------
    label : str
    share : float
        Share of members holding the best value (0.0 when none holds any).
        Ties go to the larger count, then the attribute listed first in
        ``attrs``, then the folded value in alphabetical order.

    Raises
    ------
    ValueError
        When ``members`` is empty.

    Examples
    --------
    >>> suggest_label([1, 2, 3], {"organisations": {1: ["Quillon Labs"], 2: ["quillon labs, inc."], 3: []}})
    ('mostly Quillon Labs (2 of 3)', 0.6666666666666666)
    """
    people = list(dict.fromkeys(members))
    total = len(people)
    if total == 0:
        raise ValueError("cannot label an empty group")
    candidates = []  # (-count, attr order, folded, kind, shown)
    for order, (name, by_node) in enumerate(attrs.items()):
        kind = _attr_kind(name)
        counts: Counter[str] = Counter()
        spellings: dict[str, Counter[str]] = defaultdict(Counter)
        for v in people:
            seen = set()
            for raw in by_node.get(v, ()) or ():
                if not raw or not str(raw).strip():
                    continue
                key = _fold(kind, str(raw))
                if not key:
                    continue
                spellings[key][str(raw).strip()] += 1
                if key not in seen:
                    seen.add(key)
                    counts[key] += 1
        for key, count in counts.items():
            shown = min(spellings[key].items(), key=lambda kv: (-kv[1], kv[0]))[0]
            candidates.append((-count, order, key, kind, shown))
    if not candidates:
        return "mixed", 0.0
    candidates.sort()
    best = candidates[0]
    count = -best[0]
    share = count / total
    if share >= min_share:
        return _wording(best[3], best[4], count, total), share
    shown_names = []
    for c in candidates:
        if -c[0] < 2 or len(shown_names) == 2:
            break
        name = f"@{c[4].lower().lstrip('@')}" if c[3] == "domain" else c[4]
        if name not in shown_names:
            shown_names.append(name)
    return ("mixed: " + ", ".join(shown_names) if shown_names else "mixed"), share


def normalised_mutual_information(a: Mapping[Hashable, Hashable], b: Mapping[Hashable, Hashable]) -> float:
    """Normalised mutual information of two partitions of the same nodes.

    ``NMI = 2 I(A; B) / (H(A) + H(B))`` (the arithmetic-mean normalisation of
    Danon et al. 2005); 1 when the partitions are the same up to renaming,
    and defined as 1 when both have a single community.

    Parameters
    ----------
    a, b : mapping of node to community label
        Must cover the same nodes.

    References
    ----------
    .. [1] L. Danon, A. Díaz-Guilera, J. Duch, A. Arenas, "Comparing community
       structure identification", J. Stat. Mech. P09008 (2005).
    """
    if set(a) != set(b):
        raise ValueError("the two partitions must cover the same nodes")
    nodes = list(a)
    if not nodes:
        raise ValueError("empty partitions")
    _, la = np.unique(np.array([str((type(a[v]).__name__, a[v])) for v in nodes]), return_inverse=True)
    _, lb = np.unique(np.array([str((type(b[v]).__name__, b[v])) for v in nodes]), return_inverse=True)
    n = len(nodes)
    joint = np.zeros((la.max() + 1, lb.max() + 1))
    np.add.at(joint, (la, lb), 1.0)
    p = joint / n
    pa, pb = p.sum(axis=1), p.sum(axis=0)
    nz = p > 0
    mi = float(np.sum(p[nz] * np.log(p[nz] / np.outer(pa, pb)[nz])))
    ha = float(-np.sum(pa * np.log(pa)))
    hb = float(-np.sum(pb * np.log(pb)))
    if ha + hb == 0:
        return 1.0
    return max(0.0, 2.0 * mi / (ha + hb))
