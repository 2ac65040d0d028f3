"""Where to draw each contact: groups as discs around a circle, members inside their disc.

A group-aware layout of our own: every group gets a disc whose area grows
with its members (radius ``sqrt(size)``), the discs are placed around a
circle in the order given, just far enough apart that no two overlap, and
the members of each group are placed inside its disc by the seeded
force-directed layout of networkx (Fruchterman & Reingold 1991) on the ties
within the group. Contacts without a group go into a disc of their own,
spread on a sunflower spiral (Vogel 1979) since they have few ties to
follow. Everything is deterministic for a given ``seed``.

References
----------
.. [1] T. M. J. Fruchterman and E. M. Reingold, "Graph drawing by
   force-directed placement", Software: Practice and Experience 21(11) (1991).
.. [2] H. Vogel, "A better way to construct the sunflower head",
   Mathematical Biosciences 44 (1979).
"""

from __future__ import annotations

import math
from typing import Hashable, Sequence

import numpy as np

from ..lazy import lazy_module

nx = lazy_module("networkx")

__all__ = ["place_discs", "group_layout", "sunflower"]

GAP = 1.0


def place_discs(radii: Sequence[float], gap: float = GAP) -> np.ndarray:
    """Centres of discs of the given radii around a circle, none overlapping.

    Angles are shared out in proportion to ``radius + gap / 2``; the circle's
    radius is then the smallest for which every pair of discs is at least
    ``gap`` apart.

    Returns
    -------
    ndarray of shape (len(radii), 2)
    """
    r = np.asarray(radii, dtype=float)
    n = len(r)
    if n == 0:
        return np.zeros((0, 2))
    if n == 1:
        return np.zeros((1, 2))
    share = (r + gap / 2) / (r + gap / 2).sum()
    theta = 2 * math.pi * (np.cumsum(share) - share / 2) + math.pi / 2
    need = 0.0
    for i in range(n):
        for j in range(i + 1, n):
            d = abs(theta[i] - theta[j]) % (2 * math.pi)
            d = min(d, 2 * math.pi - d)
            need = max(need, (r[i] + r[j] + gap) / (2 * math.sin(d / 2)))
    return np.column_stack([need * np.cos(theta), need * np.sin(theta)])


def sunflower(n: int) -> np.ndarray:
    """``n`` points spread evenly over the unit disc (Vogel's spiral)."""
    if n <= 0:
        return np.zeros((0, 2))
    k = np.arange(n) + 0.5
    rad = np.sqrt(k / n)
    ang = k * math.pi * (3 - math.sqrt(5))
    return np.column_stack([rad * np.cos(ang), rad * np.sin(ang)])


def _inside(G: nx.Graph, members: list[Hashable], seed: int) -> np.ndarray:
    """Positions of ``members`` in the unit disc, from their ties (sunflower when they have none)."""
    n = len(members)
    if n == 1:
        return np.zeros((1, 2))
    H = G.subgraph(members)
    if H.number_of_edges() == 0:
        return sunflower(n)
    pos = nx.spring_layout(H, seed=seed, weight="weight", iterations=60)
    xy = np.array([pos[m] for m in members], dtype=float)
    xy -= np.median(xy, axis=0)
    return _even_out(xy)


def _even_out(xy: np.ndarray, keep: float = 0.25) -> np.ndarray:
    """Spread points over the unit disc by the rank of their distance from the centre.

    A force-directed layout of a group with a few loosely tied members packs
    the rest into a clump; replacing each distance by ``sqrt(rank / n)`` (the
    radius that gives an even spread over the disc), blended with ``keep`` of
    the original distance, keeps every point's direction and the order of
    distances while using the whole disc.
    """
    n = len(xy)
    r = np.sqrt((xy ** 2).sum(axis=1))
    far = r.max()
    if far <= 0:
        return sunflower(n)
    rank = np.empty(n)
    rank[np.lexsort((np.arange(n), r))] = np.arange(n)
    target = (1 - keep) * np.sqrt((rank + 0.5) / n) + keep * r / far
    scale = np.divide(target, r, out=np.zeros(n), where=r > 0)
    return xy * scale[:, None]


def group_layout(
    G: nx.Graph, blocks: Sequence[tuple[Hashable, list[Hashable]]], *, seed: int = 0, fill: float = 0.88
) -> tuple[dict[Hashable, tuple[float, float]], dict[Hashable, tuple[float, float, float]]]:
    """Positions of every contact and the disc of every block.

    Parameters
    ----------
    G : networkx.Graph
        The tie graph (weights are tie strengths).
    blocks : sequence of (key, members)
        The groups in drawing order; the key ``None`` marks contacts without a
        group (spread on a sunflower instead of by their ties).
    seed : int, default 0
    fill : float, default 0.88
        Share of a disc's radius the members may use.

    Returns
    -------
    positions : dict of node to (x, y)
    discs : dict of key to (x, y, radius)
    """
    radii = [max(1.0, math.sqrt(len(m))) for _k, m in blocks]
    centres = place_discs(radii)
    pos: dict[Hashable, tuple[float, float]] = {}
    discs: dict[Hashable, tuple[float, float, float]] = {}
    for (key, members), (cx, cy), r in zip(blocks, centres, radii):
        members = sorted(members)
        xy = sunflower(len(members)) if key is None else _inside(G, members, seed)
        for m, (x, y) in zip(members, xy * r * fill):
            pos[m] = (float(cx + x), float(cy + y))
        discs[key] = (float(cx), float(cy), float(r))
    return pos, discs
