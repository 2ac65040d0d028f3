"""Bridges: the ties that hold groups together, and the people the network hangs on.

* :func:`neighbourhood_overlap`: Onnela's overlap of every tie, vectorised.
* :func:`local_bridges`: ties whose ends share no neighbour, with their span.
* :func:`group_bridges`: ties between two different groups, ranked.
* :func:`group_links`: per pair of groups, how many ties and who carries them.
* :func:`single_points_of_access`: the people through whom alone you reach a
  group or a part of your network.

Ties are keyed ``(a, b)`` with ``a < b`` (contact ids sort naturally).
Groups are given as a mapping ``group id -> members`` or as a
:class:`mynet.analysis.groups.GroupResult`.

References
----------
.. [1] M. S. Granovetter, "The strength of weak ties", Am. J. Sociol. 78(6),
   1360-1380 (1973).
.. [2] J.-P. Onnela, J. Saramäki, J. Hyvönen, G. Szabó, D. Lazer, K. Kaski,
   J. Kertész, A.-L. Barabási, "Structure and tie strengths in mobile
   communication networks", PNAS 104(18), 7332-7336 (2007).
.. [3] J. Hopcroft, R. Tarjan, "Algorithm 447: efficient algorithms for graph
   manipulation", Commun. ACM 16(6), 372-378 (1973).
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Hashable, Iterable, Mapping
from typing import Any

import numpy as np

from ..lazy import lazy_module
from .bridges_sparse import adjacency_matrix, bridge_spans, common_neighbours, paths3_rows
from .groups import edge_arrays, sorted_nodes

nx = lazy_module("networkx")

__all__ = [
    "EGO",
    "group_bridges",
    "group_links",
    "local_bridges",
    "neighbourhood_overlap",
    "single_points_of_access",
]

EGO = 0  # the user's node in single_points_of_access; never a contact id

def neighbourhood_overlap(G: nx.Graph) -> dict[tuple, float]:
    """Onnela's neighbourhood overlap of every tie.

    ``O_ij = n_ij / ((k_i - 1) + (k_j - 1) - n_ij)``, where ``n_ij`` is the
    number of common neighbours: the share of the two ends' other contacts
    that they share, ``|N(i) & N(j)| / (|N(i) | N(j)| - 2)``. 0 when the
    denominator is 0 (a tie whose ends have no other tie). Weights are not
    used. A tie with low overlap is a weak-tie bridge in Granovetter's sense;
    overlap 0 means a local bridge.

    Parameters
    ----------
    G : networkx.Graph
        Undirected; self-loops are ignored.

    Returns
    -------
    dict of (a, b) to float
        One entry per tie, ``a < b``.

    Notes
    -----
    Common neighbours are read off the sparse product ``A @ A`` at the
    positions of the ties, computed in blocks of rows so memory stays bounded
    (see ``benchmarks/bench_groups.py`` for times).

    References
    ----------
    .. [1] J.-P. Onnela et al., "Structure and tie strengths in mobile
       communication networks", PNAS 104(18), 7332-7336 (2007).
    .. [2] M. S. Granovetter, "The strength of weak ties", Am. J. Sociol.
       78(6), 1360-1380 (1973).
    """
    nodes, lo, hi, _ = edge_arrays(G, weight=None)
    deg, common, _ = common_neighbours(adjacency_matrix(len(nodes), lo, hi), lo, hi)
    denom = deg[lo] + deg[hi] - 2 - common
    with np.errstate(divide="ignore", invalid="ignore"):
        ov = np.where(denom > 0, common / np.maximum(denom, 1), 0.0)
    return {(nodes[i], nodes[j]): float(o) for i, j, o in zip(lo.tolist(), hi.tolist(), ov.tolist())}


def local_bridges(G: nx.Graph) -> dict[tuple, float]:
    """Ties whose ends have no common neighbour, with their span.

    The span is the number of hops between the two ends once the tie itself
    is removed (``inf`` when nothing else joins them); it is at least 3.
    Weights are not used: the same answer as
    ``networkx.local_bridges(G, with_span=True)`` with its default
    ``weight=None`` (tested). networkx runs a Dijkstra search per local
    bridge, about 0.2 s each on a 10,000-contact, 200,000-tie graph with
    85,000 local bridges (hours in all); here common neighbours and detours
    of 3 and 4 hops come from sparse products, and only longer spans from a
    bidirectional breadth-first search that stops at the first meeting (2 s
    in all on that graph; ``benchmarks/bench_groups.py``).
    networkx's ``weight`` argument, when given, would add up the attribute
    as a distance along the path; for tie strengths (larger = closer) that
    is meaningless, so no weighted span is offered.

    Parameters
    ----------
    G : networkx.Graph

    Returns
    -------
    dict of (a, b) to float
        Local bridge ``(a, b)``, ``a < b`` -> span (an int as float, or inf).

    References
    ----------
    .. [1] M. S. Granovetter, "The strength of weak ties", Am. J. Sociol.
       78(6), 1360-1380 (1973).
    .. [2] D. Easley, J. Kleinberg, *Networks, Crowds, and Markets*, ch. 3,
       Cambridge University Press (2010).
    """
    nodes, lo, hi, _ = edge_arrays(G, weight=None)
    A = adjacency_matrix(len(nodes), lo, hi)
    _, common, paths3 = common_neighbours(A, lo, hi, squares=True)
    bare = common == 0
    spans = bridge_spans(G, A, nodes, lo[bare], hi[bare], paths3[bare])
    return {(nodes[i], nodes[j]): float(x) for i, j, x in zip(lo[bare].tolist(), hi[bare].tolist(), spans.tolist())}


def _group_sets(groups: Any) -> dict[int, frozenset]:
    groups = getattr(groups, "groups", groups)
    return {g: frozenset(m) for g, m in groups.items()}


def _membership(groups: Mapping[int, frozenset]) -> dict[Hashable, int]:
    member_of: dict[Hashable, int] = {}
    for g in sorted(groups):
        for v in groups[g]:
            if v in member_of:
                raise ValueError(f"{v!r} is in two groups ({member_of[v]} and {g})")
            member_of[v] = g
    return member_of


def group_links(G: nx.Graph, groups: Any) -> dict[tuple[int, int], dict[str, Any]]:
    """The ties between each pair of groups, for a group-to-group map.

    Parameters
    ----------
    G : networkx.Graph
        Edge attribute ``weight`` is the strength (missing means 1).
    groups : mapping of int to set of node, or GroupResult
        Disjoint groups; unclustered contacts are simply absent.

    Returns
    -------
    dict of (g, h) to dict
        For each pair ``g < h`` with at least one tie: ``ties`` (count),
        ``strength`` (sum of strengths), ``density`` (``ties / (|g| |h|)``)
        and ``carriers``, a pair of sorted lists: the members of ``g`` with a
        tie into ``h``, and the members of ``h`` with a tie into ``g``.
    """
    sets = _group_sets(groups)
    member_of = _membership(sets)
    nodes, lo, hi, w = edge_arrays(G)
    ids, gid = _dense_groups(sets, member_of, nodes)
    sel = (gid[lo] >= 0) & (gid[hi] >= 0) & (gid[lo] != gid[hi])
    ga, gb, na, nb, ws = gid[lo[sel]], gid[hi[sel]], lo[sel], hi[sel], w[sel]
    flip = ga > gb  # orient every tie from the group with the smaller id
    g1, g2 = np.where(flip, gb, ga), np.where(flip, ga, gb)
    n1, n2 = np.where(flip, nb, na), np.where(flip, na, nb)
    pairs, inv = np.unique(g1 * len(ids) + g2, return_inverse=True)
    ties = np.bincount(inv, minlength=len(pairs))
    strength = np.bincount(inv, weights=ws, minlength=len(pairs))

    def carriers(ends: np.ndarray) -> list[list]:
        both = np.unique(inv * len(nodes) + ends)  # distinct (pair, contact), sorted
        owner, who = both // len(nodes), both % len(nodes)
        cuts = np.searchsorted(owner, np.arange(len(pairs) + 1))
        return [[nodes[i] for i in who[cuts[k] : cuts[k + 1]].tolist()] for k in range(len(pairs))]

    side1, side2 = carriers(n1), carriers(n2)
    out = {}
    for k, key in enumerate(pairs.tolist()):
        g, h = ids[key // len(ids)], ids[key % len(ids)]
        out[(g, h)] = {
            "ties": int(ties[k]),
            "strength": float(strength[k]),
            "density": int(ties[k]) / (len(sets[g]) * len(sets[h])),
            "carriers": (side1[k], side2[k]),
        }
    return out


def _dense_groups(sets: Mapping[int, frozenset], member_of: Mapping, nodes: list) -> tuple[list, np.ndarray]:
    """Group ids in order, and each node's group as a dense index (-1 when unclustered)."""
    ids = sorted(sets)
    dense = {g: k for k, g in enumerate(ids)}
    return ids, np.array([dense.get(member_of.get(v), -1) for v in nodes], dtype=np.int64)


def group_bridges(G: nx.Graph, groups: Any, *, limit: int | None = None) -> list[dict[str, Any]]:
    """Ties between two different groups, the ones that matter most first.

    A tie that is the only one between its two groups matters more than one
    of fifty; a strong one more than a weak one; a local bridge (its ends
    share no neighbour, so nothing else joins them nearby) more than one
    inside a dense mesh. The score is our own rule of thumb, not a published
    measure::

        score = strength / ties_between(g, h) * (2 if local bridge else 1)

    and ties with equal score come in order of lower neighbourhood overlap
    (Onnela et al. 2007; low overlap = a weak-tie bridge in Granovetter's
    1973 sense), then ``(a, b)``.

    Parameters
    ----------
    G : networkx.Graph
    groups : mapping of int to set of node, or GroupResult
    limit : int, optional
        Return only the first ``limit`` ties. The ranking does not need
        spans, so they are then computed for those ties only (most of the
        cost on a large network).

    Returns
    -------
    list of dict
        Each with ``a``, ``b`` (``a < b``), ``groups`` (group of ``a``, group
        of ``b``), ``strength``, ``overlap``, ``local_bridge`` (bool), ``span``
        (hops without this tie, ``inf`` if none; ``None`` unless a local
        bridge), ``ties_between`` and ``score``.

    References
    ----------
    .. [1] M. S. Granovetter, "The strength of weak ties", Am. J. Sociol.
       78(6), 1360-1380 (1973).
    .. [2] J.-P. Onnela et al., "Structure and tie strengths in mobile
       communication networks", PNAS 104(18), 7332-7336 (2007).
    """
    sets = _group_sets(groups)
    member_of = _membership(sets)
    nodes, lo, hi, w = edge_arrays(G)
    A = adjacency_matrix(len(nodes), lo, hi)
    whole = limit is None
    deg, common, paths3 = common_neighbours(A, lo, hi, squares=whole)
    denom = deg[lo] + deg[hi] - 2 - common
    overlap = np.where(denom > 0, common / np.maximum(denom, 1), 0.0)
    ids, gid = _dense_groups(sets, member_of, nodes)  # dense indices, so any int ids work
    idx = np.flatnonzero((gid[lo] >= 0) & (gid[hi] >= 0) & (gid[lo] != gid[hi]))
    if len(idx) == 0:
        return []
    g_lo, g_hi = gid[lo[idx]], gid[hi[idx]]
    pair_key = np.minimum(g_lo, g_hi) * len(ids) + np.maximum(g_lo, g_hi)
    _, inverse, counts = np.unique(pair_key, return_inverse=True, return_counts=True)
    n_between = counts[inverse]
    is_lb = common[idx] == 0
    score = w[idx] / n_between * np.where(is_lb, 2.0, 1.0)
    # best first: score down, overlap up, then the pair (edges are already in (lo, hi) order)
    ranked = np.lexsort((np.arange(len(idx)), overlap[idx], -score))
    if not whole:
        ranked = ranked[: max(0, limit)]
    e = idx[ranked]
    span = np.full(len(ranked), np.nan)
    lb = np.flatnonzero(is_lb[ranked])
    u, v = lo[e[lb]], hi[e[lb]]
    span[lb] = bridge_spans(G, A, nodes, u, v, paths3[e[lb]] if whole else paths3_rows(A, u, v))
    columns = zip(
        lo[e].tolist(),
        hi[e].tolist(),
        g_lo[ranked].tolist(),
        g_hi[ranked].tolist(),
        w[e].tolist(),
        overlap[e].tolist(),
        is_lb[ranked].tolist(),
        span.tolist(),
        n_between[ranked].tolist(),
        score[ranked].tolist(),
    )
    out = [
        {
            "a": nodes[i],
            "b": nodes[j],
            "groups": (ids[gi], ids[gj]),
            "strength": st,
            "overlap": ov,
            "local_bridge": lb_,
            "span": sp_ if lb_ else None,
            "ties_between": nb,
            "score": sc,
        }
        for i, j, gi, gj, st, ov, lb_, sp_, nb, sc in columns
    ]
    return out


def _dfs_cuts(roots: Iterable[Hashable], neighbours) -> tuple[list, dict, dict, dict, list]:
    """Iterative depth-first search (Hopcroft & Tarjan) from each root in turn.

    Returns the preorder, the preorder index and subtree size of every node
    reached, for each node the children whose subtree it separates from the
    root side (``low[child] >= tin[node]``), and the roots actually used (one
    per component reached, in preorder).
    """
    order: list = []
    tin: dict = {}
    low: dict = {}
    size: dict = {}
    separated: dict = defaultdict(list)
    started: list = []
    for root in roots:
        if root in tin:
            continue
        started.append(root)
        tin[root] = low[root] = len(order)
        order.append(root)
        stack = [(root, None, iter(neighbours(root)))]
        while stack:
            x, parent, it = stack[-1]
            for y in it:
                if y == x:
                    continue
                if y not in tin:
                    tin[y] = low[y] = len(order)
                    order.append(y)
                    stack.append((y, x, iter(neighbours(y))))
                    break
                if y != parent and tin[y] < low[x]:
                    low[x] = tin[y]
            else:
                stack.pop()
                size[x] = len(order) - tin[x]
                if parent is not None:
                    low[parent] = min(low[parent], low[x])
                    if low[x] >= tin[parent]:
                        separated[parent].append(x)
    return order, tin, size, separated, started


def single_points_of_access(
    G: nx.Graph,
    groups: Any,
    ego_ties: Mapping[Hashable, float] | None = None,
) -> list[dict[str, Any]]:
    """People through whom alone a group, or a part of the network, is reached.

    Two checks, merged per person:

    * **groups**: a group whose ties to everyone outside it (and to you, when
      ``ego_ties`` is given) all leave from a single member, or all arrive at
      a single outside contact. That person alone gives access to the group;
      without them the rest of the group (for a member) or the whole group
      (for an outside contact) is cut off.
    * **articulation points**: with ``ego_ties``, you are added as node
      :data:`EGO` (0) tied to every contact of positive warmth, and for each
      articulation point (a person whose removal disconnects the graph) the
      contacts that could no longer be reached from you are cut off. Without
      ``ego_ties``, the cut-off contacts are those no longer joined to the
      largest remaining part of that person's component (ties of size go to
      the part with the smallest contact). A group all of whose other members
      are cut off is one that person alone gives access to.

    Parameters
    ----------
    G : networkx.Graph
        Undirected; weights are not used.
    groups : mapping of int to set of node, or GroupResult
    ego_ties : mapping of node to float, optional
        Your own warmth to each contact; contacts with warmth > 0 are tied to
        you. Node 0 must not be a contact when this is given.

    Returns
    -------
    list of dict
        One entry per person: ``person``, ``member_of`` (their group or
        ``None``), ``groups`` (sorted ids of the groups they alone give access
        to) and ``cut_off`` (sorted contacts cut off without them); the most
        cut off first, then by person.

    Notes
    -----
    Articulation points and the parts they cut off come from one depth-first
    search with low points (Hopcroft & Tarjan 1973), the method of
    ``networkx.articulation_points``, in linear time: the subtree of a
    child ``c`` of ``p`` in the search tree is cut off from the root when
    ``low[c] >= tin[p]``.

    References
    ----------
    .. [1] J. Hopcroft, R. Tarjan, "Algorithm 447: efficient algorithms for
       graph manipulation", Commun. ACM 16(6), 372-378 (1973).
    """
    sets = _group_sets(groups)
    member_of = _membership(sets)
    ego_set: set = set()
    if ego_ties is not None:
        if EGO in G:
            raise ValueError(f"node {EGO} stands for you and cannot be a contact when ego_ties is given")
        ego_set = {v for v, warmth in ego_ties.items() if v in G and warmth and warmth > 0}
    ego_list = sorted_nodes(ego_set)
    adj = G._adj

    def neighbours(x):
        if ego_ties is not None and x == EGO:
            return ego_list
        if x in ego_set:
            return [*adj[x], EGO]
        return adj[x]

    found: dict[Hashable, dict[str, set]] = defaultdict(lambda: {"groups": set(), "cut_off": set()})

    # Groups reached through one member or one outside contact.
    for g in sorted(sets):
        S = sets[g]
        inside, outside = set(), set()
        for v in S & adj.keys():
            for y in neighbours(v):
                if y not in S and y != v:
                    inside.add(v)
                    outside.add(y)
        if not inside:
            continue
        if len(inside) == 1 and len(S) > 1:
            (p,) = inside
            found[p]["groups"].add(g)
            found[p]["cut_off"] |= S - {p}
        if len(outside) == 1:
            (x,) = outside
            if not (ego_ties is not None and x == EGO):
                found[x]["groups"].add(g)
                found[x]["cut_off"] |= set(S)

    # Articulation points.
    roots = [EGO] if ego_ties is not None else sorted_nodes(G.nodes)
    order, tin, size, separated, started = _dfs_cuts(roots, neighbours)
    # Each component is one block of the preorder, starting at its root.
    blocks = [(tin[r], size[r]) for r in started]
    block_starts = [b[0] for b in blocks]

    def subtree(c) -> list:
        return order[tin[c] : tin[c] + size[c]]

    for p, children in separated.items():
        if ego_ties is not None:
            if p == EGO:
                continue
            cut = [v for c in children for v in subtree(c)]
        else:
            k = int(np.searchsorted(block_starts, tin[p], side="right")) - 1
            s0, n0 = blocks[k]
            if tin[p] == s0 and len(children) < 2:
                continue  # a root with a single child cuts nothing off
            below = sum(size[c] for c in children)
            rest = n0 - 1 - below  # the part holding the root (0 when p is the root)
            pieces = [(size[c], c) for c in children] + ([(rest, None)] if rest > 0 else [])
            biggest = max(t[0] for t in pieces)
            tied = [t for t in pieces if t[0] == biggest]
            if len(tied) == 1:
                keep = tied[0][1]
            elif any(c is None for _, c in tied):
                keep = None  # the root side holds the component's smallest contact
            else:
                keep = min((c for _, c in tied), key=lambda c: _sort_key(min(subtree(c), key=_sort_key)))
            cut = [v for _, c in pieces if c is not None and c != keep for v in subtree(c)]
            if keep is not None and rest > 0:
                gone = {v for c in children for v in subtree(c)}
                gone.add(p)
                cut.extend(v for v in order[s0 : s0 + n0] if v not in gone)
        if cut:
            found[p]["cut_off"].update(cut)

    for p, rec in found.items():
        rec["cut_off"].discard(p)
        for g in sorted(sets):
            others = sets[g] - {p}
            if others and others <= rec["cut_off"]:
                rec["groups"].add(g)

    entries = [
        {
            "person": p,
            "member_of": member_of.get(p),
            "groups": sorted(rec["groups"]),
            "cut_off": sorted_nodes(rec["cut_off"]),
        }
        for p, rec in found.items()
        if rec["cut_off"]
    ]
    entries.sort(key=lambda e: (-len(e["cut_off"]), _sort_key(e["person"])))
    return entries


def _sort_key(v: Hashable):
    return (0, v, "") if isinstance(v, (int, float)) and not isinstance(v, bool) else (1, type(v).__name__, repr(v))
