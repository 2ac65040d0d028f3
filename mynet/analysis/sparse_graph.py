"""The sparse form of a tie graph shared by the measures: sorted nodes, edges once each, weight matrix.

Built once per call from a networkx Graph (or arrays) so that every measure
works on the same numpy/scipy (and igraph) representation.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from ..lazy import lazy_module
from .groups import sorted_nodes

ig = lazy_module("igraph")
nx = lazy_module("networkx")
sp = lazy_module("scipy.sparse")

__all__ = ["Prepared", "prepare_graph", "from_arrays", "degree_arrays"]


@dataclass
class Prepared:
    """Sorted nodes, undirected edge list (i < j, once each) and the symmetric weight matrix."""

    nodes: list
    src: np.ndarray
    dst: np.ndarray
    w: np.ndarray
    W: sp.csr_array

    @property
    def n(self) -> int:
        return len(self.nodes)

    @cached_property
    def graph(self) -> ig.Graph:
        """The same edges as an igraph Graph (edge i is (src[i], dst[i]))."""
        g = ig.Graph(n=self.n)
        g.add_edges(np.column_stack([self.src, self.dst]))  # from numpy: no per-edge Python objects
        return g


def prepare_graph(G, weight: str | None = "weight") -> Prepared:
    if G.is_directed() or G.is_multigraph():
        raise nx.NetworkXNotImplemented("contact measures need an undirected simple Graph")
    nodes = sorted_nodes(G)  # mixed node types: still deterministic
    index = {v: i for i, v in enumerate(nodes)}
    src, dst, w = [], [], []
    for u, v, d in G.edges(data=True):
        if u == v:
            continue
        i, j = index[u], index[v]
        src.append(min(i, j))
        dst.append(max(i, j))
        w.append(1.0 if weight is None else float(d.get(weight, 1.0)))
    return from_arrays(nodes, np.asarray(src, dtype=np.int64), np.asarray(dst, dtype=np.int64),
                       np.asarray(w, dtype=float))


def from_arrays(nodes: list, src_a: np.ndarray, dst_a: np.ndarray, w_a: np.ndarray) -> Prepared:
    """Build from undirected edges given once each as index pairs with src < dst."""
    if w_a.size and not (np.all(np.isfinite(w_a)) and np.all(w_a > 0)):
        raise ValueError("tie strengths must be positive finite numbers")
    order = np.lexsort((dst_a, src_a))
    src_a, dst_a, w_a = src_a[order], dst_a[order], w_a[order]
    n = len(nodes)
    both = (np.concatenate([src_a, dst_a]), np.concatenate([dst_a, src_a]))
    W = sp.coo_array((np.concatenate([w_a, w_a]), both), shape=(n, n)).tocsr()
    W.sort_indices()
    return Prepared(nodes, src_a, dst_a, w_a, W)


def degree_arrays(prep: Prepared) -> tuple[np.ndarray, np.ndarray]:
    """Degree (number of ties) and strength (sum of tie strengths) per node."""
    deg = np.diff(prep.W.indptr).astype(float)
    strength = np.asarray(prep.W.sum(axis=1)).ravel()
    return deg, strength
