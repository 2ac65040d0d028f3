"""Walk-based centralities: eigenvector centrality (per connected component) and PageRank.

Both read a tie's weight as a *strength* (higher = closer). Nodes are sorted before
anything is built, so the results do not depend on insertion order.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..lazy import lazy_module
from .sparse_graph import Prepared, degree_arrays, prepare_graph

nx = lazy_module("networkx")
sp = lazy_module("scipy.sparse")
csgraph = lazy_module("scipy.sparse.csgraph")
splinalg = lazy_module("scipy.sparse.linalg")

__all__ = ["eigenvector_centrality", "pagerank"]

# Components up to this size are solved densely (exact eigendecomposition); larger ones with ARPACK.
_DENSE = 200


def eigenvector_values(prep: Prepared) -> np.ndarray:
    n = prep.n
    out = np.zeros(n)
    if n == 0 or prep.W.nnz == 0:
        return out
    count, labels = csgraph.connected_components(prep.W, directed=False)
    order = np.argsort(labels, kind="stable")
    bounds = np.flatnonzero(np.r_[True, labels[order][1:] != labels[order][:-1], True])
    W = sp.csr_array(prep.W)
    for a, b in zip(bounds[:-1], bounds[1:]):
        members = order[a:b]
        if len(members) < 2:
            continue  # an isolated contact: no tie, centrality 0
        A = W[members][:, members]
        if len(members) <= _DENSE:
            vals, vecs = np.linalg.eigh(A.toarray())
            x = vecs[:, -1]
        else:
            start = np.asarray(A.sum(axis=1)).ravel() + 1.0  # a fixed start keeps the result deterministic
            vals, vecs = splinalg.eigsh(A.astype(float), k=1, which="LA", v0=start, tol=1e-12, maxiter=10_000)
            x = vecs[:, 0]
        x = np.abs(x)  # the Perron vector of a connected component has one sign
        out[members] = x / x.max()
    return out


def eigenvector_centrality(G, weight: str | None = "weight") -> dict[Any, float]:
    """Weighted eigenvector centrality, computed in each connected component and scaled to 1 there.

    A contact's score is proportional to the strength-weighted sum of their contacts'
    scores: it is high for someone tied strongly to people who are themselves well
    tied, not merely for someone with many ties. The score is the principal eigenvector
    of the weighted adjacency matrix of the contact's own connected component (the
    Perron vector, Bonacich 1972), scaled so that the most central contact of each
    component has 1; contacts without ties get 0. Per component, because on a
    disconnected network the whole-graph eigenvector puts every smaller component at 0.

    On a connected graph it equals ``nx.eigenvector_centrality_numpy(G, weight=...)``
    divided by its maximum, and igraph's ``eigenvector_centrality(scale=True)``.

    Parameters
    ----------
    G : networkx.Graph
    weight : str or None
        Tie strength attribute; None counts every tie as 1.

    Returns
    -------
    dict
        node -> score in [0, 1].

    References
    ----------
    .. [1] Bonacich, P. (1972). Factoring and weighting approaches to status
       scores and clique identification. J. Math. Sociol. 2(1), 113-120.
    .. [2] Newman, M. E. J. (2010). Networks: An Introduction, section 7.2.
       Oxford University Press.
    """
    prep = prepare_graph(G, weight)
    return dict(zip(prep.nodes, eigenvector_values(prep).tolist()))


def pagerank_values(prep: Prepared, alpha: float, tol: float, max_iter: int) -> np.ndarray:
    n = prep.n
    if n == 0:
        return np.zeros(0)
    _, strength = degree_arrays(prep)
    dangling = strength == 0
    inv = np.zeros(n)
    inv[~dangling] = 1.0 / strength[~dangling]
    WT = prep.W.T.tocsr()
    x = np.full(n, 1.0 / n)
    for _ in range(max_iter):
        last = x
        x = alpha * (WT @ (last * inv)) + (alpha * last[dangling].sum() + (1.0 - alpha)) / n
        if np.abs(x - last).sum() < n * tol:
            return x
    raise nx.PowerIterationFailedConvergence(max_iter)


def pagerank(G, alpha: float = 0.85, weight: str | None = "weight", *, tol: float = 1e-10,
             max_iter: int = 1000) -> dict[Any, float]:
    """Weighted PageRank by power iteration (same model as ``nx.pagerank``).

    A walker follows a tie with probability proportional to its strength and
    jumps to a uniformly chosen node with probability 1 - alpha; nodes without
    ties jump uniformly. Iterates until the L1 change is below ``n * tol``.

    Parameters
    ----------
    G : networkx.Graph
    alpha : float
        Damping factor.
    weight : str or None
    tol : float
    max_iter : int

    Returns
    -------
    dict
        node -> PageRank (sums to 1).

    References
    ----------
    .. [1] Page, L., Brin, S., Motwani, R. & Winograd, T. (1999). The PageRank
       citation ranking: bringing order to the web. Stanford InfoLab.
    """
    prep = prepare_graph(G, weight)
    return dict(zip(prep.nodes, pagerank_values(prep, alpha, tol, max_iter).tolist()))


