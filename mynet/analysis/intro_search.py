"""Intro paths: the warmest chains of introductions from you to a person or an organisation.

The model is your network with you at the centre. Your own tie to a contact has a
*warmth* in (0, 1]; the tie between two contacts has a *strength* in (0, 1]. An
intro path ``you -> m1 -> ... -> target`` has at least one intermediary, and its
score is the product of its step strengths (the first step being your warmth to
``m1``). The best path is therefore the shortest path under the step cost
``-ln(strength)``.

Method
------
One query runs a single multi-source search *from the target set* over the tie
graph without you, which gives, for every contact at once, the cost of its best
continuation to the nearest target. Each contact ``m`` you have a warm tie to is
then a candidate first intermediary with score ``warmth(m) * exp(-dist(m))``, and
the top ``k`` candidates (one path per first intermediary) are the answer.

* With a hop limit (``max_intermediaries=h``, the default 2) the search is a
  Bellman-Ford relaxation limited to ``h - 1`` layers, vectorised with numpy over
  the compressed sparse rows (CSR) of costs, followed by one "pull" step over the
  rows of the candidate first intermediaries. Layer ``l`` holds the best cost
  over walks of at most ``l`` steps; it is exact for simple paths because step
  costs are non-negative, so removing a cycle never makes a walk dearer nor
  longer, and a value is only replaced by a strictly smaller one (so the stored
  chains never revisit a node). Dijkstra with ``min_only`` would not bound the
  number of steps, hence the layered form.
* Without a hop limit (``max_intermediaries=None``) the search is
  :func:`scipy.sparse.csgraph.dijkstra` with ``indices=targets, min_only=True``.

Targets are sources of the search and are never relaxed *through*: a path ends at
the first target it reaches, so no target is an intermediary of another's path.

Contacts who may only open a path
---------------------------------
``first_only`` names contacts who may be the first intermediary but never a later
one (the reach rule: someone you already know warmly is asked directly, never
reached through somebody else). The search never relaxes through them, exactly as
through an avoided contact, so every contact's best continuation is already free
of them; they remain candidates for the first step. Filtering finished paths
instead would be wrong: a contact whose *best* path has such a detour would lose
its good detour-free path along with it.

Distinct second intermediaries
------------------------------
With ``distinct_second=True`` the ``k`` paths are chosen greedily, best first:
the next path is the best path whose first intermediary is not yet used *and*
whose second intermediary (when it has one) is not yet the second intermediary
of a chosen path; the best path of a first intermediary may be replaced by its
best alternative through another second person (a neighbour whose own best
continuation does not come back through the first intermediary). Only when no
such path is left are paths with a repeated second intermediary admitted, again
best first. The returned list is sorted by score. Candidate scores can only fall
as the used set grows, so the greedy choice is made lazily from a heap.

Determinism: contacts are indexed in increasing id order. Equal scores among
candidates go to the smaller first intermediary id, and each step of a path picks
the smaller node id among equal-cost continuations, preferring fewer steps (in the
hop-limited search); without a hop limit the steps after the second person follow
the predecessors of scipy's Dijkstra, which are deterministic for a given index.

References
----------
.. [1] E. W. Dijkstra, "A note on two problems in connexion with graphs",
   Numerische Mathematik 1, 269-271 (1959).
.. [2] R. Bellman, "On a routing problem", Quarterly of Applied Mathematics 16,
   87-90 (1958).
.. [3] J. Y. Yen, "Finding the k shortest loopless paths in a network",
   Management Science 17(11), 712-716 (1971) (the reference the tests compare to).
"""

from __future__ import annotations

import heapq
import math
from dataclasses import dataclass
from typing import Any, Iterable, Mapping

import numpy as np

from ..lazy import lazy_module

nx = lazy_module("networkx")
sp = lazy_module("scipy.sparse")
csgraph = lazy_module("scipy.sparse.csgraph")

__all__ = ["IntroPath", "PathIndex", "build_index", "find_paths", "best_per_target", "direct_route"]


@dataclass(frozen=True)
class IntroPath:
    """One chain of introductions from you to a target.

    Attributes
    ----------
    score : float
        Product of the step strengths, in (0, 1].
    nodes : tuple of int
        Contact ids from the first intermediary to the target (you are implicit).
    strengths : tuple of float
        One strength per step; the first is your warmth to ``nodes[0]``.
    target : int
        The target reached (``nodes[-1]``).
    weakest_step : int
        Index into ``strengths`` of the weakest step (the earliest one on a tie).
    """

    score: float
    nodes: tuple[int, ...]
    strengths: tuple[float, ...]
    target: int
    weakest_step: int

    @property
    def first(self) -> int:
        """The first intermediary (the contact you ask)."""
        return self.nodes[0]

    @property
    def second(self) -> int | None:
        """The second intermediary, or None for a path ``you -> m1 -> target``."""
        return self.nodes[1] if len(self.nodes) >= 3 else None

    def to_dict(self) -> dict[str, Any]:
        """A JSON-ready view of the path.

        Returns
        -------
        dict
            ``{"score", "path", "steps", "target", "weakest"}`` where ``path`` lists the
            contact ids from the first intermediary to the target, ``steps`` is a list of
            ``{"from": "you" | id, "to": id, "strength": float}`` and ``weakest`` is the
            index of the weakest step.
        """
        froms: list[Any] = ["you", *self.nodes[:-1]]
        steps = [
            {"from": f, "to": t, "strength": s} for f, t, s in zip(froms, self.nodes, self.strengths)
        ]
        return {
            "score": self.score,
            "path": list(self.nodes),
            "steps": steps,
            "target": self.target,
            "weakest": self.weakest_step,
        }


class PathIndex:
    """The tie graph compiled once for fast intro-path queries.

    Parameters
    ----------
    ids : array_like of int
        Contact ids, any order (tie ends and the keys of ``warmth`` are added, so this
        only needs to name contacts without ties).
    src, dst : array_like of int
        The ends of each tie, as contact ids (each undirected tie once).
    strength : array_like of float
        Strength of each tie, in (0, 1].
    warmth : mapping of int to float
        Your warmth to each contact, in [0, 1]; 0 or absent means no tie.

    Attributes
    ----------
    ids : numpy.ndarray
        Sorted contact ids; the position of an id is its row in the matrices.
    costs : scipy.sparse.csr_matrix
        Symmetric matrix of step costs ``-ln(strength)`` (explicit zeros are ties of
        strength 1).
    strengths : numpy.ndarray
        Strength of each stored entry of ``costs`` (same order as ``costs.data``).
    warmth : numpy.ndarray
        Your warmth per row (0 where you have no tie).

    Raises
    ------
    ValueError
        On a strength outside (0, 1], a warmth outside [0, 1], a self tie, or ``src``,
        ``dst`` and ``strength`` of different lengths.
    """

    def __init__(self, ids: Iterable[int], src: Iterable[int], dst: Iterable[int], strength: Iterable[float],
                 warmth: Mapping[int, float]):
        src = _as_array(src, np.int64)
        dst = _as_array(dst, np.int64)
        w = _as_array(strength, np.float64)
        if not (len(src) == len(dst) == len(w)):
            raise ValueError("src, dst and strength must have the same length")
        all_ids = np.unique(np.concatenate([_as_array(ids, np.int64), src, dst, _as_array(list(warmth), np.int64)]))
        if len(w) and not (np.all(w > 0) and np.all(w <= 1)):
            raise ValueError("every tie strength must be in (0, 1]")
        if np.any(src == dst):
            raise ValueError("a contact cannot have a tie to itself")
        n = len(all_ids)
        i = np.searchsorted(all_ids, src)
        j = np.searchsorted(all_ids, dst)
        rows = np.concatenate([i, j])
        cols = np.concatenate([j, i])
        vals = np.concatenate([w, w])
        # Sort by (row, col); a duplicated pair keeps its strongest value.
        order = np.lexsort((-vals, cols, rows))
        rows, cols, vals = rows[order], cols[order], vals[order]
        keep = np.ones(len(rows), dtype=bool)
        keep[1:] = (rows[1:] != rows[:-1]) | (cols[1:] != cols[:-1])
        rows, cols, vals = rows[keep], cols[keep], vals[keep]
        indptr = np.concatenate([[0], np.cumsum(np.bincount(rows, minlength=n))]).astype(np.int64)
        self.ids = all_ids
        self.n = n
        self.indptr = indptr
        self.indices = cols.astype(np.int64)
        self.strengths = vals
        self.cost_data = -np.log(vals)
        self.costs = sp.csr_matrix((self.cost_data, self.indices, self.indptr), shape=(n, n))
        self.rows = np.repeat(np.arange(n), np.diff(indptr))  # row of each stored entry
        warm = np.zeros(n)
        for cid, value in warmth.items():
            value = float(value)
            if not (0.0 <= value <= 1.0):
                raise ValueError(f"warmth of contact {cid} must be in [0, 1], got {value}")
            warm[np.searchsorted(all_ids, cid)] = value
        self.warmth = warm
        self._pos = {int(c): k for k, c in enumerate(all_ids)}

    @classmethod
    def from_graph(cls, ties: nx.Graph, warmth: Mapping[int, float]) -> "PathIndex":
        """Build the index from a networkx graph of ties.

        Parameters
        ----------
        ties : networkx.Graph
            Nodes are contact ids (int), edge attribute ``weight`` is the tie strength.
            You are not a node of this graph.
        warmth : mapping of int to float
            Your warmth to each contact (0 or absent: no tie).

        Returns
        -------
        PathIndex
        """
        src: list[int] = []
        dst: list[int] = []
        w: list[float] = []
        for u, v, s in ties.edges(data="weight"):
            if s is None:
                raise ValueError(f"the tie {u}-{v} has no 'weight' (its strength)")
            src.append(u)
            dst.append(v)
            w.append(s)
        return cls(list(ties.nodes), src, dst, w, warmth)

    def pos(self, contact: int) -> int | None:
        """Row of a contact id, or None when it is not in the index."""
        return self._pos.get(int(contact))

    def edge_strength(self, a: int, b: int) -> float:
        """Strength of the tie between two rows (0.0 when there is none)."""
        lo, hi = self.indptr[a], self.indptr[a + 1]
        k = lo + np.searchsorted(self.indices[lo:hi], b)
        if k < hi and self.indices[k] == b:
            return float(self.strengths[k])
        return 0.0

    def __repr__(self) -> str:
        return f"PathIndex({self.n} contacts, {len(self.indices) // 2} ties, {int(np.count_nonzero(self.warmth))} warm)"


def build_index(ties: nx.Graph, warmth: Mapping[int, float]) -> PathIndex:
    """Compile a tie graph and your warmth into a :class:`PathIndex` (see :meth:`PathIndex.from_graph`)."""
    return PathIndex.from_graph(ties, warmth)


def direct_route(index: PathIndex, target: int) -> float | None:
    """Your own (cold or warm) direct tie to a target, for comparison with intro paths.

    Parameters
    ----------
    index : PathIndex
    target : int
        Contact id.

    Returns
    -------
    float or None
        Your warmth to the target, or None when you have no tie to it.
    """
    p = index.pos(target)
    if p is None or index.warmth[p] <= 0:
        return None
    return float(index.warmth[p])


class _Search:
    """The result of one search from a target set: best continuation per node."""

    def __init__(self, index: PathIndex, targets: np.ndarray, node_ok: np.ndarray, edge_ok: np.ndarray,
                 hops: int | None):
        # node_ok: who may lie on a continuation (after the first intermediary), targets aside.
        self.index = index
        self.is_target = np.zeros(index.n, dtype=bool)
        self.is_target[targets] = True
        self.hops = hops
        if hops is None:
            self._dijkstra(targets, node_ok, edge_ok)
        else:
            self._layers(targets, node_ok, edge_ok, hops - 1)

    def _dijkstra(self, targets, node_ok, edge_ok):
        ix = self.index
        node_ok = node_ok | self.is_target
        keep = edge_ok & node_ok[ix.rows] & node_ok[ix.indices]
        if keep.all():
            g = ix.costs
        else:
            # Build the masked CSR directly so that zero costs (strength 1) stay explicit edges.
            counts = np.bincount(ix.rows[keep], minlength=ix.n)
            indptr = np.concatenate([[0], np.cumsum(counts)])
            g = sp.csr_matrix((ix.cost_data[keep], ix.indices[keep], indptr), shape=(ix.n, ix.n))
        dist, pred, _ = csgraph.dijkstra(g, directed=True, indices=targets, min_only=True, return_predecessors=True)
        self.dist = dist
        self.pred = pred  # next hop towards the nearest target; -9999 at targets and unreached

    def _layers(self, targets, node_ok, edge_ok, layers):
        ix = self.index
        d = np.full(ix.n, np.inf)
        d[targets] = 0.0
        setat = np.zeros(ix.n, dtype=np.int16)
        self.nxt = [None]
        self.setat = [setat.copy()]
        self.dists = [d.copy()]
        frontier = np.asarray(targets, dtype=np.int64)
        relaxable = node_ok & ~self.is_target
        for layer in range(1, layers + 1):
            nxt = np.full(ix.n, -1, dtype=np.int64)
            if len(frontier):
                src, eidx = _row_edges(ix.indptr, frontier)
                dst = ix.indices[eidx]
                m = edge_ok[eidx] & relaxable[dst]
                src, dst, cand = src[m], dst[m], d[src[m]] + ix.cost_data[eidx[m]]
                order = np.lexsort((src, cand, dst))
                src, dst, cand = src[order], dst[order], cand[order]
                first = np.ones(len(dst), dtype=bool)
                first[1:] = dst[1:] != dst[:-1]
                src, dst, cand = src[first], dst[first], cand[first]
                better = cand < d[dst]
                src, dst, cand = src[better], dst[better], cand[better]
                d = d.copy()
                d[dst] = cand
                nxt[dst] = src
                setat[dst] = layer
                frontier = dst
            self.nxt.append(nxt)
            self.setat.append(setat.copy())
            self.dists.append(d)
        self.dist = d

    def chain(self, u: int) -> list[int] | None:
        """Rows from ``u`` to its nearest target using at most ``hops - 1`` steps (None if none).

        This is the part of a path after its first intermediary.
        """
        if self.is_target[u]:
            return [u]
        out = [u]
        if self.hops is None:
            if not np.isfinite(self.dist[u]):
                return None
            while not self.is_target[u]:
                u = int(self.pred[u])
                out.append(u)
            return out
        layer = self.hops - 1
        if not np.isfinite(self.dists[layer][u]):
            return None
        while not self.is_target[u]:
            j = int(self.setat[layer][u])
            u = int(self.nxt[j][u])
            layer = j - 1
            out.append(u)
        return out


def _as_array(values, dtype) -> np.ndarray:
    if isinstance(values, np.ndarray):
        return values.astype(dtype, copy=False)
    return np.asarray(list(values), dtype=dtype)


def _row_edges(indptr: np.ndarray, rows: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For the given rows, the row of each stored entry and the entry's index into the CSR arrays."""
    starts = indptr[rows]
    counts = indptr[rows + 1] - starts
    total = int(counts.sum())
    src = np.repeat(rows, counts)
    offsets = np.repeat(starts - np.concatenate([[0], np.cumsum(counts)[:-1]]), counts)
    return src, offsets + np.arange(total)


def _rows_of(index: PathIndex, contacts: Iterable[int]) -> list[int]:
    return [p for p in (index.pos(c) for c in contacts) if p is not None]


def _prepare(index: PathIndex, targets: Iterable[int], avoid: Iterable[int], min_strength: float,
             first_only: Iterable[int] = ()):
    """Target rows, who may be on a path at all, who may be beyond its first step, usable ties."""
    node_ok = np.ones(index.n, dtype=bool)
    node_ok[_rows_of(index, avoid)] = False
    rows = sorted({p for p in _rows_of(index, targets) if node_ok[p]})
    later_ok = node_ok.copy()
    later_ok[_rows_of(index, first_only)] = False
    edge_ok = index.strengths >= min_strength
    return np.asarray(rows, dtype=np.int64), node_ok, later_ok, edge_ok


def find_paths(
    index: PathIndex,
    targets: Iterable[int],
    *,
    k: int = 5,
    max_intermediaries: int | None = 2,
    avoid: Iterable[int] = (),
    min_strength: float = 0.0,
    distinct_second: bool = True,
    first_only: Iterable[int] = (),
) -> list[IntroPath]:
    """The top ``k`` intro paths to a target (or any of a set), with distinct first intermediaries.

    Parameters
    ----------
    index : PathIndex
        The compiled tie graph and your warmth.
    targets : iterable of int
        Contact ids to reach; a path ends at the first target it reaches. Ids not in
        the index (and avoided ones) are ignored.
    k : int, default 5
        Number of paths wanted (each with a different first intermediary).
    max_intermediaries : int or None, default 2
        Most people between you and the target (a path has at most
        ``max_intermediaries + 1`` steps); None for no limit.
    avoid : iterable of int, default ()
        Contacts who must not appear on any path.
    min_strength : float, default 0.0
        Steps (your warmth included) weaker than this are not used.
    distinct_second : bool, default True
        Prefer paths whose second intermediaries differ as well (see the module notes
        for the greedy rule).
    first_only : iterable of int, default ()
        Contacts who may be the first intermediary of a path but never a later one
        (applied inside the search; see the module notes).

    Returns
    -------
    list of IntroPath
        Best first; empty when no target can be reached. Your own direct tie to a
        target is never a path here (see :func:`direct_route`).

    Raises
    ------
    ValueError
        When ``k`` is negative or ``max_intermediaries`` is below 1.

    Notes
    -----
    One search from the targets gives every contact's best continuation; each warm
    contact ``m`` then scores ``warmth(m) * exp(-dist(m))``. Cost per query: the
    layered relaxation touches the ties of the nodes within ``max_intermediaries - 1``
    steps of the targets, then the rows of your warm contacts.
    """
    if k < 0:
        raise ValueError("k must be >= 0")
    if max_intermediaries is not None and max_intermediaries < 1:
        raise ValueError("max_intermediaries must be >= 1 (or None for no limit)")
    rows, node_ok, later_ok, edge_ok = _prepare(index, targets, avoid, min_strength, first_only)
    if k == 0 or len(rows) == 0:
        return []
    search = _Search(index, rows, later_ok, edge_ok, max_intermediaries)
    # The d values that a second step may lean on: one layer fewer than the full budget.
    lean = search.dist if max_intermediaries is None else search.dists[max_intermediaries - 1]
    warm = index.warmth
    cand = np.flatnonzero((warm > 0) & (warm >= min_strength) & node_ok & ~search.is_target)
    if len(cand) == 0:
        return []
    # Pull step: each candidate's best continuation over its own row (an upper bound on its score).
    src, eidx = _row_edges(index.indptr, cand)
    nbr = index.indices[eidx]
    total = lean[nbr] + index.cost_data[eidx]
    total[~(edge_ok[eidx] & (later_ok[nbr] | search.is_target[nbr]))] = np.inf
    best = np.full(index.n, np.inf)
    np.minimum.at(best, src, total)
    bound = warm[cand] * np.exp(-best[cand])
    bounds = {int(m): float(b) for b, m in zip(bound, cand) if b > 0}
    picked = _greedy(index, search, lean, later_ok, edge_ok, bounds, k, distinct_second)
    paths = [_make_path(index, m, chain) for m, chain in picked]
    paths.sort(key=lambda p: (-p.score, [index.pos(x) for x in p.nodes]))
    return paths


def _greedy(index, search, lean, node_ok, edge_ok, bounds, k, distinct_second):
    """Lazy greedy choice of first intermediaries (see the module notes).

    ``bounds`` maps each candidate row to an upper bound on its score; ``node_ok`` says who
    may follow the first intermediary. The heap holds
    ``(-score, m, version, chain)``; an entry is fresh (its score exact under the current
    banned set) when its version equals the number of times that set has grown.
    """
    chosen: list[tuple[int, list[int]]] = []
    used_second: set[int] = set()
    waiting = list(bounds)
    for strict in ([True, False] if distinct_second else [False]):
        heap = [(-bounds[m], m, -1, None) for m in waiting]
        heapq.heapify(heap)
        waiting = []
        version = 0
        while heap and len(chosen) < k:
            neg, m, ver, chain = heapq.heappop(heap)
            if ver == version:
                chosen.append((m, chain))
                if strict and len(chain) >= 3:
                    used_second.add(chain[1])
                    version += 1
                continue
            chain = _best_from(index, search, lean, node_ok, edge_ok, m, used_second if strict else set())
            if chain is None:
                waiting.append(m)  # may still serve in the relaxed pass
                continue
            score = index.warmth[m] * math.exp(-_chain_cost(index, chain))
            heapq.heappush(heap, (-score, m, version, chain))
        waiting.extend(m for _, m, _, _ in heap)
    return chosen


def _best_from(index, search, lean, node_ok, edge_ok, m, banned_second):
    """Best simple chain of rows from first intermediary ``m`` to a target, or None.

    The second node must not be in ``banned_second`` (targets are always allowed) and its
    own continuation must not come back through ``m``.
    """
    lo, hi = index.indptr[m], index.indptr[m + 1]
    nbr = index.indices[lo:hi]
    total = lean[nbr] + index.cost_data[lo:hi]
    ok = edge_ok[lo:hi] & (node_ok[nbr] | search.is_target[nbr]) & np.isfinite(total)
    if banned_second:
        ok &= ~np.isin(nbr, list(banned_second)) | search.is_target[nbr]
    nbr, total = nbr[ok], total[ok]
    for j in np.lexsort((nbr, total)):
        rest = search.chain(int(nbr[j]))
        if rest is not None and m not in rest:
            return [m, *rest]
    return None


def _chain_cost(index: PathIndex, chain: list[int]) -> float:
    return float(sum(-math.log(index.edge_strength(a, b)) for a, b in zip(chain, chain[1:])))


def _make_path(index: PathIndex, m: int, chain: list[int]) -> IntroPath:
    strengths = [float(index.warmth[m])] + [index.edge_strength(a, b) for a, b in zip(chain, chain[1:])]
    nodes = tuple(int(index.ids[r]) for r in chain)
    weakest = min(range(len(strengths)), key=lambda s: (strengths[s], s))
    return IntroPath(
        score=math.prod(strengths),
        nodes=nodes,
        strengths=tuple(strengths),
        target=nodes[-1],
        weakest_step=weakest,
    )


def best_per_target(
    index: PathIndex,
    targets: Iterable[int],
    *,
    k: int = 1,
    max_intermediaries: int | None = 2,
    avoid: Iterable[int] = (),
    min_strength: float = 0.0,
    distinct_second: bool = True,
    first_only: Iterable[int] = (),
) -> dict[int, list[IntroPath]]:
    """The best intro paths to each target of a set, for a listing grouped by target.

    Parameters
    ----------
    index : PathIndex
    targets : iterable of int
        Contact ids (e.g. everyone at one organisation). Ids not in the index are skipped.
    k : int, default 1
        Paths per target.
    max_intermediaries, avoid, min_strength, distinct_second, first_only
        As in :func:`find_paths`.

    Returns
    -------
    dict of int to list of IntroPath
        One entry per known, non-avoided target, ordered by the score of its best path
        (targets without a path last, by id). A path to one target never passes through
        another target of the set (it would have reached that one first).
    """
    wanted = sorted({int(t) for t in targets if index.pos(t) is not None} - {int(a) for a in avoid})
    avoid_set = {int(a) for a in avoid}
    out: dict[int, list[IntroPath]] = {}
    for t in wanted:
        others = set(wanted) - {t}
        out[t] = find_paths(
            index,
            {t},
            k=k,
            max_intermediaries=max_intermediaries,
            avoid=avoid_set | others,
            min_strength=min_strength,
            distinct_second=distinct_second,
            first_only=first_only,
        )
    order = sorted(out, key=lambda t: (0, -out[t][0].score, t) if out[t] else (1, 0.0, t))
    return {t: out[t] for t in order}
