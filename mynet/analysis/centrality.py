"""Per-contact measures over the tie graph: position, reach, brokerage and role.

All functions take an undirected :class:`networkx.Graph` ``G`` first. Nodes are
contact ids; the edge attribute ``weight`` is the tie strength in (0, 1]
(higher = stronger; a missing attribute counts as 1.0). Self-loops are ignored.

Two readings of a strength are used, and each function says which:

* as a *strength* (higher = closer): strength, PageRank, constraint, effective size;
* as a *distance* for shortest paths: **distance = 1 / weight** (betweenness,
  harmonic closeness). ``-ln(weight)`` was not chosen because it makes a tie of
  strength 1 a path of length 0, so a graph with all strengths 1 would have no
  well-defined shortest paths.

Nodes are sorted before anything is built, so results do not depend on the
insertion order of ``G``; every random choice is drawn from ``seed``.
"""

from __future__ import annotations

import math
from collections.abc import Hashable, Mapping
from typing import Any

import numpy as np

from ..lazy import lazy_module
from .estimate import adaptive_pivots
from .sparse_graph import Prepared, degree_arrays, from_arrays, prepare_graph  # noqa: F401  (re-exported)
from .spectral import eigenvector_centrality, eigenvector_values, pagerank, pagerank_values  # noqa: F401  (re-exported)

sp = lazy_module("scipy.sparse")
csgraph = lazy_module("scipy.sparse.csgraph")

__all__ = [
    "ROLES", "ROLE_THRESHOLDS", "betweenness", "clustering", "constraint", "contact_measures", "contact_role",
    "degree_strength", "effective_size", "eigenvector_centrality", "harmonic_closeness", "pagerank",
    "participation_coefficient",
    "structural_holes", "within_module_degree",
]

#: Thresholds for :func:`contact_role`, each an absolute value of the person's own position (no quantile
#: of everyone, so a merge elsewhere cannot move them). ``hub_z`` and the P cut-offs are the published
#: values of Guimerà & Amaral (2005): hubs have z >= 2.5; hubs with P <= 0.30 keep their ties in their
#: own module (R5), above it they reach others (R6/R7); non-hubs with P > 0.62 spread their ties over
#: modules (R3/R4). The broker and edge rules, the ratio guards and every ``keep_`` and ``switch_`` level
#: (the hysteresis against last run's role, see :func:`contact_role`) are our own rules of thumb.
ROLE_THRESHOLDS: dict[str, float] = {
    "hub_z": 2.5, "hub_p": 0.30, "gateway_p": 0.62,  # published (Guimerà & Amaral 2005)
    "broker_betweenness": 0.03, "broker_constraint": 0.30, "edge_z": -1.0,  # our own
    # our own guard for tight groups, where a tiny spread makes z jump: a centre has at least 1.5 times the
    # group's average number of ties inside it, a person on the edge at most half of it
    "hub_ratio": 1.5, "edge_ratio": 0.5,
    # our own hysteresis: a person keeps last run's role down to its keep level, and moves to another role
    # only past its switch level (beyond the entry level)
    "keep_hub_z": 2.0, "keep_hub_ratio": 1.3, "keep_hub_p_band": 0.05, "keep_gateway_p": 0.55,
    "keep_broker_betweenness": 0.02, "keep_broker_constraint": 0.35, "keep_edge_z": -0.75, "keep_edge_ratio": 0.6,
    "switch_hub_z": 3.0, "switch_hub_ratio": 1.7, "switch_gateway_p": 0.68, "switch_broker_betweenness": 0.04,
    "switch_broker_constraint": 0.25, "switch_edge_z": -1.25, "switch_edge_ratio": 0.4,
}

#: Betweenness and closeness are exact up to this many contacts (see :func:`contact_measures`).
EXACT_LIMIT = 5000
#: Most pivot sources of the estimate above :data:`EXACT_LIMIT` (see :mod:`.estimate`). Our graphs needed
#: about 45% of their contacts as pivots for the target (measured at 5,000 and 10,000), so 8,192 should
#: reach it up to about 18,000 contacts; above, the estimate stops there and states the agreement it has.
SAMPLES = 8192

#: Every role :func:`contact_role` gives, in the order of its rules (the README lists the same).
ROLES = ("no ties", "centre of a group", "centre across groups", "centre", "go-between", "broker", "on the edge",
         "member")

# Row blocks for the structural-hole products are sized so that one block's
# two-step neighbourhood holds about this many entries (bounds peak memory).
_BLOCK_BUDGET = 4_000_000


def pivot_sample(n: int, k: int, seed) -> np.ndarray:
    return np.sort(np.random.default_rng(seed).choice(n, size=k, replace=False))


def degree_strength(G, weight: str | None = "weight") -> dict[Any, tuple[int, float]]:
    """Degree (number of ties) and strength (sum of tie strengths) of every node.

    Parameters
    ----------
    G : networkx.Graph
    weight : str or None
        Edge attribute holding the tie strength; None counts every tie as 1.

    Returns
    -------
    dict
        node -> (degree, strength).
    """
    prep = prepare_graph(G, weight)
    deg, strength = degree_arrays(prep)
    return {v: (int(deg[i]), float(strength[i])) for i, v in enumerate(prep.nodes)}


def betweenness_values(prep: Prepared, pivots: np.ndarray | None) -> np.ndarray:
    n = prep.n
    if n <= 2 or prep.w.size == 0:
        return np.zeros(n)
    g = prep.graph
    dist = (1.0 / prep.w).tolist()
    if pivots is None:
        raw = np.asarray(g.betweenness(directed=False, weights=dist), dtype=float)
        return 2.0 * raw / ((n - 1) * (n - 2))
    # igraph's source-subset form counts sum_{s in S} delta_s(v) / 2 on undirected graphs.
    raw = np.asarray(g.betweenness(directed=False, weights=dist, sources=pivots.tolist()), dtype=float)
    return 2.0 * raw * n / (len(pivots) * (n - 1) * (n - 2))


def betweenness(G, weight: str | None = "weight", *, k: int | None = None, seed=0) -> dict[Any, float]:
    """Shortest-path betweenness, normalised as networkx's ``betweenness_centrality``.

    Path lengths use **distance = 1 / weight**. The value is the sum over ordered
    pairs (s, t) of the share of shortest s-t paths through the node, divided by
    (n - 1)(n - 2), which equals ``nx.betweenness_centrality(G, weight=d,
    normalized=True)`` with ``d = 1/weight``.

    Note for networkx users: networkx reads ``weight`` as a *length* (a heavier
    edge is a longer step); here ``weight`` is a tie *strength* and its length is
    its inverse, so a strong tie is a short step. Passing the same graph to
    ``nx.betweenness_centrality(G, weight="weight")`` gives different values.

    Parameters
    ----------
    G : networkx.Graph
    weight : str or None
        Tie strength attribute (length = 1 / strength); None makes every tie length 1.
    k : int or None
        None for the exact value (Brandes 2001); otherwise the number of pivot
        sources drawn uniformly without replacement, and the estimate is the
        pivot dependencies scaled by n / k (Brandes & Pich 2007).
    seed : int or numpy Generator
        Seed for the pivot draw.

    Returns
    -------
    dict
        node -> betweenness.

    References
    ----------
    .. [1] Freeman, L. C. (1977). A set of measures of centrality based on
       betweenness. Sociometry 40(1), 35-41.
    .. [2] Brandes, U. (2001). A faster algorithm for betweenness centrality.
       J. Math. Sociol. 25(2), 163-177.
    .. [3] Brandes, U. & Pich, C. (2007). Centrality estimation in large
       networks. Int. J. Bifurcation and Chaos 17(7), 2303-2318.
    """
    prep = prepare_graph(G, weight)
    pivots = None if k is None or k >= prep.n else pivot_sample(prep.n, k, seed)
    return dict(zip(prep.nodes, betweenness_values(prep, pivots).tolist()))


def _harmonic(prep: Prepared, pivots: np.ndarray | None) -> np.ndarray:
    n = prep.n
    if n <= 1:
        return np.zeros(n)
    if pivots is None:
        g = prep.graph
        vals = g.harmonic_centrality(weights=(1.0 / prep.w).tolist(), normalized=True)
        return np.nan_to_num(np.asarray(vals, dtype=float))
    D = sp.csr_array((1.0 / prep.W.data, prep.W.indices, prep.W.indptr), shape=prep.W.shape)
    dist = csgraph.dijkstra(D, directed=True, indices=pivots)  # D is symmetric
    dist[np.arange(len(pivots)), pivots] = np.inf  # a pivot's distance to itself does not count
    with np.errstate(divide="ignore"):
        inv = 1.0 / dist
    counts = np.full(n, float(len(pivots)))
    counts[pivots] -= 1.0
    with np.errstate(invalid="ignore", divide="ignore"):
        est = inv.sum(axis=0) / counts
    return np.nan_to_num(est)


def harmonic_closeness(G, weight: str | None = "weight", *, k: int | None = None, seed=0) -> dict[Any, float]:
    """Harmonic closeness: mean of 1 / distance to every other node (0 when unreachable).

    Distances are shortest paths with **distance = 1 / weight**. The sum of
    inverse distances is divided by n - 1, so the value equals
    ``nx.harmonic_centrality(G, distance=d)[v] / (n - 1)`` and stays defined on
    disconnected graphs.

    Parameters
    ----------
    G : networkx.Graph
    weight : str or None
    k : int or None
        None for the exact value; otherwise the mean inverse distance is
        estimated from ``k`` uniformly drawn pivot sources (Eppstein & Wang 2004),
        which on an undirected graph is the mean of 1/d(s, v) over pivots s != v.
    seed : int or numpy Generator

    Returns
    -------
    dict
        node -> harmonic closeness in [0, max strength].

    References
    ----------
    .. [1] Marchiori, M. & Latora, V. (2000). Harmony in the small-world.
       Physica A 285(3-4), 539-546.
    .. [2] Eppstein, D. & Wang, J. (2004). Fast approximation of centrality.
       J. Graph Algorithms Appl. 8(1), 39-45.
    """
    prep = prepare_graph(G, weight)
    pivots = None if k is None or k >= prep.n else pivot_sample(prep.n, k, seed)
    return dict(zip(prep.nodes, _harmonic(prep, pivots).tolist()))


def clustering_values(prep: Prepared) -> np.ndarray:
    if prep.n == 0:
        return np.zeros(0)
    return np.asarray(prep.graph.transitivity_local_undirected(mode="zero"), dtype=float)


def clustering(G) -> dict[Any, float]:
    """Unweighted local clustering: the share of pairs of a node's contacts who are tied.

    The unweighted form was chosen because it reads plainly ("how many of my
    contacts know each other") and does not depend on the strongest tie of the
    whole network, as the weighted form in networkx does. Equals
    ``nx.clustering(G)``; nodes with fewer than two ties get 0.

    Parameters
    ----------
    G : networkx.Graph

    Returns
    -------
    dict
        node -> clustering coefficient in [0, 1].

    References
    ----------
    .. [1] Watts, D. J. & Strogatz, S. H. (1998). Collective dynamics of
       'small-world' networks. Nature 393, 440-442.
    """
    prep = prepare_graph(G, None)
    return dict(zip(prep.nodes, clustering_values(prep).tolist()))


def _row_blocks(A: sp.csr_array, budget: int) -> list[tuple[int, int]]:
    """Row ranges whose two-step neighbourhood sizes add up to about ``budget``."""
    deg = np.diff(A.indptr).astype(np.int64)
    ones = sp.csr_array((np.ones(A.nnz), A.indices, A.indptr), shape=A.shape)
    work = np.rint(ones @ deg.astype(float)).astype(np.int64) + 1
    cum = np.cumsum(work)
    blocks, start = [], 0
    while start < len(deg):
        base = cum[start - 1] if start else 0
        stop = max(int(np.searchsorted(cum, base + budget, side="right")), start + 1)
        blocks.append((start, min(stop, len(deg))))
        start = stop
    return blocks


def _masked(product: sp.csr_array, pattern: sp.csr_array) -> np.ndarray:
    """Values of ``product`` at the stored positions of ``pattern`` (0 where absent)."""
    product = sp.csr_array(product)
    product.sum_duplicates()
    product.sort_indices()
    ncols = np.int64(pattern.shape[1])
    pkeys = np.repeat(np.arange(product.shape[0], dtype=np.int64), np.diff(product.indptr)) * ncols + product.indices
    qkeys = np.repeat(np.arange(pattern.shape[0], dtype=np.int64), np.diff(pattern.indptr)) * ncols + pattern.indices
    if pkeys.size == 0:
        return np.zeros(qkeys.size)
    pos = np.minimum(np.searchsorted(pkeys, qkeys), pkeys.size - 1)
    return np.where(pkeys[pos] == qkeys, product.data[pos], 0.0)


def _structural_holes(prep: Prepared, budget: int = _BLOCK_BUDGET) -> tuple[np.ndarray, np.ndarray]:
    n = prep.n
    W = prep.W
    deg, strength = degree_arrays(prep)
    rowmax = W.max(axis=1).toarray().ravel() if n else np.zeros(0)
    inv_s = np.divide(1.0, strength, out=np.zeros(n), where=strength > 0)
    inv_m = np.divide(1.0, rowmax, out=np.zeros(n), where=rowmax > 0)
    P = sp.csr_array(sp.diags_array(inv_s) @ W)
    P.sort_indices()
    cons = np.zeros(n)
    redund = np.zeros(n)
    for a, b in _row_blocks(W, budget):
        PB = P[a:b]
        if PB.nnz == 0:
            continue
        rows = np.repeat(np.arange(b - a), np.diff(PB.indptr))
        direct = PB.data
        indirect = _masked(PB @ P, PB)  # sum_q p_vq p_qw on the ties (v, w)
        cons[a:b] = np.bincount(rows, (direct + indirect) ** 2, minlength=b - a)
        # sum_q p_vq m_wq with m_wq = w_wq / max_x w_wx (Burt's redundancy of w for v)
        red = _masked(PB @ W, PB) * inv_m[PB.indices]
        redund[a:b] = np.bincount(rows, red, minlength=b - a)
    eff = deg - redund
    isolated = deg == 0
    cons[isolated] = np.nan
    eff[isolated] = np.nan
    return cons, eff


def structural_holes(G, weight: str | None = "weight", *,
                     block_budget: int = _BLOCK_BUDGET) -> tuple[dict[Any, float], dict[Any, float]]:
    """Burt's constraint and effective size of every node, vectorised with scipy.sparse.

    With p_vw = w_vw / sum_x w_vx (share of v's tie strength spent on w) and
    m_wq = w_wq / max_x w_wx:

    * constraint c(v) = sum_{w in N(v)} (p_vw + sum_q p_vq p_qw)^2;
    * effective size e(v) = sum_{w in N(v)} (1 - sum_q p_vq m_wq).

    These are the definitions (and values) of ``nx.constraint`` and
    ``nx.effective_size``; with ``weight=None`` the effective size reduces to
    Borgatti's n - 2t/n. Rows are processed in blocks whose two-step
    neighbourhood holds about a few million entries, which bounds memory.
    Isolated nodes get NaN (undefined), as in networkx.

    Parameters
    ----------
    G : networkx.Graph
    weight : str or None
        Tie strength attribute; None counts every tie as 1.
    block_budget : int
        About how many two-step entries one block of rows may hold.

    Returns
    -------
    (dict, dict)
        node -> constraint, node -> effective size.

    References
    ----------
    .. [1] Burt, R. S. (1992). Structural Holes: The Social Structure of
       Competition. Harvard University Press.
    .. [2] Borgatti, S. P. (1997). Structural holes: unpacking Burt's
       redundancy measures. Connections 20(1), 35-38.
    """
    prep = prepare_graph(G, weight)
    cons, eff = _structural_holes(prep, block_budget)
    return dict(zip(prep.nodes, cons.tolist())), dict(zip(prep.nodes, eff.tolist()))


def constraint(G, weight: str | None = "weight") -> dict[Any, float]:
    """Burt's constraint of every node; see :func:`structural_holes`.

    References
    ----------
    .. [1] Burt, R. S. (1992). Structural Holes. Harvard University Press.
    """
    return structural_holes(G, weight)[0]


def effective_size(G, weight: str | None = "weight") -> dict[Any, float]:
    """Burt's effective size of every node; see :func:`structural_holes`.

    References
    ----------
    .. [1] Burt, R. S. (1992). Structural Holes. Harvard University Press.
    """
    return structural_holes(G, weight)[1]


def module_labels(nodes: list, groups: Mapping | None) -> np.ndarray:
    """Integer module of each node; unclustered nodes (None or absent) each form their own module."""
    if groups is None:
        return np.zeros(len(nodes), dtype=np.int64)
    codes: dict[Hashable, int] = {}
    labels = np.empty(len(nodes), dtype=np.int64)
    for i, v in enumerate(nodes):
        g = groups.get(v)
        key = ("group", g) if g is not None else ("alone", i)
        labels[i] = codes.setdefault(key, len(codes))
    return labels


def _module_degrees(prep: Prepared, labels: np.ndarray, weighted: bool) -> sp.csr_array:
    """k_is: ties (or strength) from node i into module s, as an n x modules sparse matrix."""
    n = prep.n
    A = prep.W if weighted else sp.csr_array((np.ones(prep.W.nnz), prep.W.indices, prep.W.indptr), shape=prep.W.shape)
    M = sp.csr_array((np.ones(n), (np.arange(n), labels)), shape=(n, int(labels.max()) + 1 if n else 0))
    return sp.csr_array(A @ M)


def _participation(K: sp.csr_array) -> np.ndarray:
    k = np.asarray(K.sum(axis=1)).ravel()
    sq = np.asarray(K.multiply(K).sum(axis=1)).ravel()
    with np.errstate(invalid="ignore", divide="ignore"):
        p = 1.0 - sq / (k * k)
    return np.where(k > 0, p, 0.0)


def _within_z(K: sp.csr_array, labels: np.ndarray) -> np.ndarray:
    n = len(labels)
    kappa = np.asarray(K[np.arange(n), labels]).ravel() if n else np.zeros(0)
    count = np.bincount(labels, minlength=K.shape[1]).astype(float)
    mean = np.bincount(labels, kappa, minlength=K.shape[1]) / np.maximum(count, 1)
    var = np.bincount(labels, (kappa - mean[labels]) ** 2, minlength=K.shape[1]) / np.maximum(count, 1)
    sd = np.sqrt(var)[labels]
    return np.divide(kappa - mean[labels], sd, out=np.zeros(n), where=sd > 0)


def _within_ratio(K: sp.csr_array, labels: np.ndarray) -> np.ndarray:
    """kappa_i over the mean kappa of i's group (1 where the mean is 0)."""
    n = len(labels)
    kappa = np.asarray(K[np.arange(n), labels]).ravel() if n else np.zeros(0)
    count = np.bincount(labels, minlength=K.shape[1]).astype(float)
    mean = (np.bincount(labels, kappa, minlength=K.shape[1]) / np.maximum(count, 1))[labels]
    return np.divide(kappa, mean, out=np.ones(n), where=mean > 0)


def participation_coefficient(G, groups: Mapping | None, weight: str | None = None) -> dict[Any, float]:
    """Participation coefficient P_i = 1 - sum_s (k_is / k_i)^2.

    k_is counts i's ties into group s (or their strength when ``weight`` is
    given) and k_i all of i's ties. P is 0 when all ties stay in one group and
    near 1 when they spread evenly over many. An unclustered node (group None
    or absent) counts as a group of its own; a node without ties gets 0.

    Parameters
    ----------
    G : networkx.Graph
    groups : mapping or None
        node -> group id or None. None puts every node in one group (P = 0).
    weight : str or None
        None (default, as published) counts ties.

    Returns
    -------
    dict
        node -> P in [0, 1).

    References
    ----------
    .. [1] Guimerà, R. & Amaral, L. A. N. (2005). Functional cartography of
       complex metabolic networks. Nature 433, 895-900.
    """
    prep = prepare_graph(G, weight)
    labels = module_labels(prep.nodes, groups)
    return dict(zip(prep.nodes, _participation(_module_degrees(prep, labels, weight is not None)).tolist()))


def within_module_degree(G, groups: Mapping | None, weight: str | None = None) -> dict[Any, float]:
    """Within-module degree z-score z_i = (kappa_i - mean_s) / sd_s.

    kappa_i is the number of i's ties inside its own group s; mean_s and sd_s
    (population standard deviation) are taken over the members of s. Where
    sd_s = 0 (all members alike, or a group of one) z is 0, the usual
    convention for this undefined case. Unclustered nodes are groups of one;
    ``groups=None`` makes z the degree z-score over the whole network.

    Parameters
    ----------
    G : networkx.Graph
    groups : mapping or None
    weight : str or None

    Returns
    -------
    dict
        node -> z.

    References
    ----------
    .. [1] Guimerà, R. & Amaral, L. A. N. (2005). Functional cartography of
       complex metabolic networks. Nature 433, 895-900.
    """
    prep = prepare_graph(G, weight)
    labels = module_labels(prep.nodes, groups)
    return dict(zip(prep.nodes, _within_z(_module_degrees(prep, labels, weight is not None), labels).tolist()))


def contact_role(m: Mapping[str, float], *, grouped: bool = True, previous: str | None = None,
                 ratio: float | None = None) -> str:
    """Name a contact's role in plain words from their own measures.

    Rules, first match wins (thresholds in :data:`ROLE_THRESHOLDS`, all absolute):

    1. "no ties": no tie to any other contact.
    2. z >= 2.5 (Guimerà & Amaral's hub threshold) and at least 1.5 times the group's
       average number of ties inside it: "centre of a group" when P <= 0.30, else
       "centre across groups" (their R5 vs R6/R7). Without groups: "centre".
    3. P > 0.62 (their non-hub cut-off for ties spread over modules, R3/R4): "go-between".
    4. betweenness >= 0.03 (on the shortest way between at least 3% of the pairs of
       other contacts) and constraint <= 0.30 (few of their contacts know each other):
       "broker" (own rule of thumb).
    5. one tie, or z <= -1 with at most half the group's average number of ties inside it
       (own rule of thumb): "on the edge".
    6. otherwise "member".

    With ``previous`` (last run's role of the same person), that role is kept while the
    person still meets its keep level (``keep_`` thresholds, a little short of the entry ones),
    and another role is taken only past its switch level (``switch_``, a little beyond): a role
    changes only when the person's own position clearly does.

    Parameters
    ----------
    m : mapping
        Needs degree, betweenness, constraint, participation, within_z.
    grouped : bool
        Whether groups were given.
    previous : str or None
        Last run's role of this person.
    ratio : float or None
        The person's ties inside their group over the group's average (None: not checked).

    Returns
    -------
    str

    References
    ----------
    .. [1] Guimerà, R. & Amaral, L. A. N. (2005). Functional cartography of
       complex metabolic networks. Nature 433, 895-900.
    .. [2] Burt, R. S. (1992). Structural Holes. Harvard University Press.
    """
    if m["degree"] == 0:
        return "no ties"
    z, p, c, b = m["within_z"], m["participation"], m["constraint"], m["betweenness"]
    r = 1.0 if ratio is None else ratio
    hubs = ROLES[1:4]

    def level(name: str, *roles: str) -> float:
        """The level of a rule for this person: keep (had the role), switch (had another), else enter."""
        if previous is None:
            return ROLE_THRESHOLDS[name]
        return ROLE_THRESHOLDS[("keep_" if previous in roles else "switch_") + name]

    if z >= level("hub_z", *hubs) and (ratio is None or r >= level("hub_ratio", *hubs)):
        if not grouped:
            return "centre"
        if previous in hubs[:2] and abs(p - ROLE_THRESHOLDS["hub_p"]) <= ROLE_THRESHOLDS["keep_hub_p_band"]:
            return previous
        return "centre of a group" if p <= ROLE_THRESHOLDS["hub_p"] else "centre across groups"
    if p > level("gateway_p", "go-between"):
        return "go-between"
    if (c is not None and not math.isnan(c) and b >= level("broker_betweenness", "broker")
            and c <= level("broker_constraint", "broker")):
        return "broker"
    if m["degree"] == 1 or (z <= level("edge_z", "on the edge")
                            and (ratio is None or r <= level("edge_ratio", "on the edge"))):
        return "on the edge"
    return "member"


def contact_measures(G, groups: Mapping | None = None, *, seed=0, exact_limit: int = EXACT_LIMIT,
                     samples: int = SAMPLES, previous_roles: Mapping | None = None
                     ) -> tuple[dict[Any, dict], dict[str, Any]]:
    """Every per-contact measure in one pass over a shared sparse representation.

    Per node: ``degree``, ``strength`` (sum of tie strengths), ``betweenness``
    and ``closeness`` (harmonic; both on distance = 1/weight), ``pagerank``
    (weighted), ``eigenvector`` (weighted, per connected component, 1 for the
    most central contact of each; see :func:`eigenvector_centrality`),
    ``clustering`` (unweighted), ``constraint`` and
    ``effective_size`` (weighted by tie strength; NaN for isolated nodes),
    ``participation`` and ``within_z`` (counting ties, unweighted), ``role``.

    Betweenness and closeness are exact when G has at most ``exact_limit``
    nodes. Above it both come from the same pivot sources (Brandes & Pich
    2007; Eppstein & Wang 2004), drawn stratified by group and in rounds until
    the expected share of the true top 10% by betweenness that the estimate
    also ranks there reaches 92% (the stated error; see :mod:`.estimate`) or
    ``samples`` pivots are used; when the target would take more than 70% of
    the contacts as pivots and 70% of the contacts are at most ``samples``,
    the exact values are computed instead.

    Parameters
    ----------
    G : networkx.Graph
    groups : mapping or None
        node -> group id, None for unclustered nodes (each a group of one).
    seed : int or numpy Generator
    exact_limit : int
    samples : int
        Most pivots of the estimate.
    previous_roles : mapping or None
        node -> last run's role (see :func:`contact_role`: a role is kept while its keep level holds).

    Returns
    -------
    measures : dict
        node -> {measure name: value}.
    info : dict
        ``betweenness_sampled`` (bool), ``betweenness_samples`` (number of
        source nodes used: n when exact), ``betweenness_agreement`` (the
        expected share of the true top 10% kept; 1.0 when exact), ``closeness_sampled``, ``distance``
        ("1/weight"), ``clustering`` ("unweighted"), ``role_thresholds`` (the absolute
        cut-offs of the roles).

    References
    ----------
    .. [1] Brandes, U. & Pich, C. (2007). Centrality estimation in large
       networks. Int. J. Bifurcation and Chaos 17(7), 2303-2318.
    .. [2] Burt, R. S. (1992). Structural Holes. Harvard University Press.
    .. [3] Guimerà, R. & Amaral, L. A. N. (2005). Functional cartography of
       complex metabolic networks. Nature 433, 895-900.
    .. [4] Marchiori, M. & Latora, V. (2000). Harmony in the small-world.
       Physica A 285, 539-546.
    """
    prep = prepare_graph(G, "weight")
    n = prep.n
    labels = module_labels(prep.nodes, groups)
    bet, pivots, agreement = None, None, 1.0
    if n > exact_limit:
        bet, pivots, agreement = adaptive_pivots(lambda p: betweenness_values(prep, p), labels, seed, max(1, samples))
    sampled = bet is not None
    if not sampled:
        bet, pivots, agreement = betweenness_values(prep, None), None, 1.0
    deg, strength = degree_arrays(prep)
    clo = _harmonic(prep, pivots)
    pr = pagerank_values(prep, 0.85, 1e-10, 1000)
    eig = eigenvector_values(prep)
    clu = clustering_values(prep)
    cons, eff = _structural_holes(prep)
    K = _module_degrees(prep, labels, weighted=False)
    part = _participation(K)
    wz = _within_z(K, labels)
    ratio = _within_ratio(K, labels)

    cols = {"degree": deg.astype(int), "strength": strength, "betweenness": bet, "closeness": clo, "pagerank": pr,
            "eigenvector": eig,
            "clustering": clu, "constraint": cons, "effective_size": eff, "participation": part, "within_z": wz}
    cols = {name: col.tolist() for name, col in cols.items()}
    measures: dict[Any, dict] = {}
    for i, v in enumerate(prep.nodes):
        m = {name: col[i] for name, col in cols.items()}
        m["role"] = contact_role(m, grouped=groups is not None, previous=(previous_roles or {}).get(v),
                                 ratio=float(ratio[i]))
        measures[v] = m
    info = {"betweenness_sampled": sampled, "betweenness_samples": len(pivots) if sampled else n,
            "betweenness_agreement": round(agreement, 4),
            "closeness_sampled": sampled, "distance": "1/weight", "clustering": "unweighted",
            "role_thresholds": dict(ROLE_THRESHOLDS)}
    return measures, info
