"""Sparse and search helpers of :mod:`mynet.analysis.bridges`: common neighbours and spans.

Common neighbours of every tie come from ``A @ A`` read at the ties, in row
blocks of bounded size; spans of local bridges from the same product (3 hops),
a product of 2-hop balls (4 hops) and a bidirectional search beyond.
"""

from __future__ import annotations

import math
from collections.abc import Hashable, Mapping

import numpy as np

from ..lazy import lazy_module

nx = lazy_module("networkx")
sp = lazy_module("scipy.sparse")

# Budget of entries of one block of A @ A (memory of one chunk, ~12 bytes each).
_BLOCK_NNZ = 4_000_000


def adjacency_matrix(n: int, lo: np.ndarray, hi: np.ndarray) -> sp.csr_matrix:
    ones = np.ones(len(lo), dtype=np.int32)
    A = sp.csr_matrix(
        (np.concatenate([ones, ones]), (np.concatenate([lo, hi]), np.concatenate([hi, lo]))), shape=(n, n)
    )
    A.sum_duplicates()
    A.sort_indices()
    return A


def _lookup(keys: np.ndarray, data: np.ndarray, want: np.ndarray) -> np.ndarray:
    """``data`` at the positions of ``want`` in the sorted ``keys`` (0 where absent)."""
    pos = np.searchsorted(keys, want)
    inside = pos < len(keys)
    hit = np.zeros(len(want), dtype=bool)
    hit[inside] = keys[pos[inside]] == want[inside]
    out = np.zeros(len(want), dtype=np.int64)
    out[hit] = data[pos[hit]]
    return out


def common_neighbours(
    A: sp.csr_matrix, lo: np.ndarray, hi: np.ndarray, *, squares: bool = False
) -> tuple[np.ndarray, np.ndarray, np.ndarray | None]:
    """Degrees and, for each edge ``(lo[e], hi[e])``, the number of common neighbours.

    Computes ``P = A @ A`` block by block of rows (each block sized to hold
    about ``_BLOCK_NNZ`` entries) and reads it only at the edges (masked by
    the block of ``A`` first, unless ``squares`` needs more of it). With
    ``squares``, also counts for each edge without a common neighbour the
    paths ``lo - a - b - hi`` of three hops avoiding the edge itself, read off
    the same block: ``sum_{b in N(hi)} P[lo, b] - k_lo - k_hi + 1`` (the
    walks through the edge are ``a = hi`` for every ``b``, and ``b = lo`` for
    every ``a``, counted once together). Such an edge has span 3 exactly when
    this count is positive.
    """
    n = A.shape[0]
    deg = np.diff(A.indptr).astype(np.int64)
    common = np.zeros(len(lo), dtype=np.int64)
    paths3 = np.zeros(len(lo), dtype=np.int64) if squares else None
    if len(lo) == 0:
        return deg, common, paths3
    # Cost of row i of A @ A: the sum of its neighbours' degrees.
    cost = np.cumsum(A @ deg)
    # Edges are sorted by lo, so each row block owns a contiguous run of edges.
    start = 0
    while start < n:
        base = cost[start - 1] if start else 0
        stop = int(np.searchsorted(cost, base + _BLOCK_NNZ, side="right"))
        stop = min(n, max(stop, start + 1))
        e0, e1 = (int(x) for x in np.searchsorted(lo, [start, stop]))
        if e1 > e0:
            block = A[start:stop]
            P = block @ A
            r = lo[e0:e1] - start
            if not squares:
                # Keep P only at the ties (elementwise product with the block of A): no sort of P needed.
                P = P.multiply(block).tocsr()
            P.sum_duplicates()
            P.sort_indices()
            keys = np.repeat(np.arange(stop - start, dtype=np.int64), np.diff(P.indptr)) * n + P.indices
            common[e0:e1] = _lookup(keys, P.data, r * n + hi[e0:e1])
            if squares:
                bare = np.flatnonzero(common[e0:e1] == 0)
                if len(bare):
                    far = hi[e0:e1][bare]
                    lens = deg[far]
                    owner = np.repeat(np.arange(len(bare)), lens)
                    # positions of the neighbours of each far end in A.indices
                    offs = np.arange(lens.sum()) - np.repeat(np.cumsum(lens) - lens, lens)
                    cols = A.indices[np.repeat(A.indptr[far], lens) + offs]
                    walks = _lookup(keys, P.data, r[bare][owner] * n + cols)
                    total = np.bincount(owner, weights=walks, minlength=len(bare)).astype(np.int64)
                    near = lo[e0:e1][bare]
                    paths3[e0 + bare] = total - deg[near] - deg[far] + 1
        start = stop
    return deg, common, paths3


def paths3_rows(A: sp.csr_matrix, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """For given ties ``u - v`` without common neighbours, the 3-hop paths joining them.

    The same count as ``common_neighbours(..., squares=True)``, one row per
    tie: ``rowsum((A[u] @ A) * A[v]) - k_u - k_v + 1``. Cheaper when only a
    few ties need a span.
    """
    out = np.zeros(len(u), dtype=np.int64)
    deg = np.diff(A.indptr).astype(np.int64)
    cost = np.cumsum((A @ deg)[u])
    start = 0
    while start < len(u):
        base = cost[start - 1] if start else 0
        stop = min(len(u), max(int(np.searchsorted(cost, base + _BLOCK_NNZ, side="right")), start + 1))
        walks = (A[u[start:stop]] @ A).multiply(A[v[start:stop]]).sum(axis=1)
        out[start:stop] = np.asarray(walks).ravel().astype(np.int64)
        start = stop
    return out - deg[u] - deg[v] + 1


def _two_step_meets(A: sp.csr_matrix, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """For ties ``u - v`` known to have span above 3: whether the span is 4.

    Row by row, the 2-hop walks from ``u`` whose first step is not the tie
    itself, and the same from ``v``; the span is 4 exactly when they reach a
    common node. (Walks from ``u`` can only come back to ``u``, never reach
    ``v``, since there is no common neighbour and no 3-hop path; likewise
    from ``v``; so no other correction is needed.)
    """
    out = np.zeros(len(u), dtype=bool)
    reach = A @ np.diff(A.indptr)
    cost = np.cumsum(reach[u] + reach[v])
    start = 0
    while start < len(u):
        base = cost[start - 1] if start else 0
        stop = min(len(u), max(int(np.searchsorted(cost, base + _BLOCK_NNZ, side="right")), start + 1))
        rows = np.arange(stop - start)
        balls = []
        for x, y in ((u[start:stop], v[start:stop]), (v[start:stop], u[start:stop])):
            first = A[x].tocsr()
            hidden = sp.csr_matrix((np.ones(len(x), dtype=first.dtype), (rows, y)), shape=first.shape)
            first = first - first.multiply(hidden)
            balls.append(first @ A)
        out[start:stop] = balls[0].multiply(balls[1]).getnnz(axis=1) > 0
        start = stop
    return out


def bridge_spans(G: nx.Graph, A: sp.csr_matrix, nodes: list, lo: np.ndarray, hi: np.ndarray,
                 paths3: np.ndarray) -> np.ndarray:
    """Span of each given tie without common neighbours.

    3 when a 3-hop path exists (``paths3 > 0``), 4 when the 2-hop balls of
    both ends meet (sparse products, :func:`_two_step_meets`), else a
    bidirectional search (:func:`_span`), which also finds ``inf`` at once
    for a tie to a contact with no other tie.
    """
    out = np.full(len(lo), 3.0)
    rest = np.flatnonzero(paths3 <= 0)
    four = _two_step_meets(A, lo[rest], hi[rest])
    out[rest[four]] = 4.0
    adj = G._adj  # the plain dict of dicts: its key views intersect in C
    for e in rest[~four].tolist():
        out[e] = _span(adj, nodes[lo[e]], nodes[hi[e]])
    return out


def _span(adj: Mapping, u: Hashable, v: Hashable) -> float:
    """Hops from ``u`` to ``v`` once the tie ``u - v`` is removed (inf if none).

    Bidirectional breadth-first search expanding the smaller frontier (the
    plain dict-of-dicts adjacency ``G._adj`` is passed for speed). Its two
    balls stay disjoint until the first meeting,
    and before it ``dist(u, v) > du + dv``; a meeting while growing one side
    by a layer gives a path of at most ``du + dv + 1`` hops, so the first
    meeting gives the exact distance and the search stops there.
    """
    dist_u = {u: 0}
    dist_v = {v: 0}
    front_u, front_v = [u], [v]
    du = dv = 0
    while front_u and front_v:
        if len(front_u) <= len(front_v):
            front, dist, other, here, end_a, end_b = front_u, dist_u, dist_v, du, u, v
        else:
            front, dist, other, here, end_a, end_b = front_v, dist_v, dist_u, dv, v, u
        nxt: list = []
        step = here + 1
        for x in front:
            new = adj[x].keys() - dist.keys()
            if x == end_a:
                new.discard(end_b)  # the hidden tie
            if not new:
                continue
            meet = new & other.keys()
            if meet:
                return float(step + other[next(iter(meet))])
            dist.update(dict.fromkeys(new, step))
            nxt.extend(new)
        if front is front_u:
            front_u, du = nxt, du + 1
        else:
            front_v, dv = nxt, dv + 1
    return math.inf
