"""Time intro-path queries at 10,000 contacts / ~200,000 ties (the aim: < 0.1 s per query).

Run from the project root: ``python benchmarks/bench_paths.py [--yen-queries N]``.

A seeded random tie graph (networkx ``gnm_random_graph``, strengths uniform in
[0.05, 1]) with your warmth on 300 random contacts. Each query asks for the top 5
intro paths (at most 2 intermediaries) to one random target. The reference is
networkx ``shortest_simple_paths`` (Yen 1971) on the same graph with you added,
keeping the first path per first intermediary that respects the hop limit; it is
slow, so it runs on a few queries only and stops after ``--yen-seconds`` each.
Prints figures only; asserts nothing.
"""

from __future__ import annotations

import argparse
import math
import random
import statistics
import time

import networkx as nx
import numpy as np

from mynet.analysis.intro_search import build_index, find_paths

YOU = -1


def make_graph(n: int, m: int, n_warm: int, seed: int):
    rng = np.random.default_rng(seed)
    g = nx.gnm_random_graph(n, m, seed=seed)
    strengths = rng.uniform(0.05, 1.0, size=g.number_of_edges())
    for (u, v), s in zip(g.edges, strengths):
        g.edges[u, v]["weight"] = float(s)
    warm_ids = rng.choice(n, size=n_warm, replace=False)
    warmth = {int(c): float(w) for c, w in zip(warm_ids, rng.uniform(0.05, 1.0, size=n_warm))}
    return g, warmth


def yen_reference(g: nx.Graph, warmth: dict[int, float], target: int, k: int, hops: int, budget: float):
    """First path per distinct first intermediary, by Yen's algorithm, with and without the hop limit.

    Returns ``(limited, unlimited, enumerated, seconds, seconds_to_unlimited)`` where each
    list holds up to k ``(score, nodes)`` pairs, best first.
    """
    h = nx.DiGraph()
    for u, v, s in g.edges(data="weight"):
        c = -math.log(s)
        h.add_edge(u, v, cost=c)
        h.add_edge(v, u, cost=c)
    for c, w in warmth.items():
        if c != target:
            h.add_edge(YOU, c, cost=-math.log(w))
    limited: list[tuple[float, list[int]]] = []
    unlimited: list[tuple[float, list[int]]] = []
    seen_l: set[int] = set()
    seen_u: set[int] = set()
    start = time.perf_counter()
    enumerated = 0
    unlimited_secs = None
    for p in nx.shortest_simple_paths(h, YOU, target, weight="cost"):
        enumerated += 1
        score = math.exp(-sum(h.edges[a, b]["cost"] for a, b in zip(p, p[1:])))
        if p[1] not in seen_u and len(unlimited) < k:
            seen_u.add(p[1])
            unlimited.append((score, p[1:]))
            if len(unlimited) == k:
                unlimited_secs = time.perf_counter() - start
        if len(p) - 2 <= hops and p[1] not in seen_l and len(limited) < k:
            seen_l.add(p[1])
            limited.append((score, p[1:]))
        if (len(limited) == k and len(unlimited) == k) or time.perf_counter() - start > budget:
            break
    total = time.perf_counter() - start
    return limited, unlimited, enumerated, total, unlimited_secs or total


def _agree(ours, ref) -> str:
    if not ref:
        return "n/a (Yen found none)"
    ok = len(ours) >= len(ref) and all(math.isclose(p.score, s, rel_tol=1e-9) for p, (s, _) in zip(ours, ref))
    return f"{ok} on the first {len(ref)}"


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--contacts", type=int, default=10_000)
    ap.add_argument("--ties", type=int, default=200_000)
    ap.add_argument("--warm", type=int, default=300)
    ap.add_argument("--queries", type=int, default=50)
    ap.add_argument("--yen-queries", type=int, default=3)
    ap.add_argument("--yen-seconds", type=float, default=60.0)
    ap.add_argument("--seed", type=int, default=7)
    args = ap.parse_args()

    t0 = time.perf_counter()
    g, warmth = make_graph(args.contacts, args.ties, args.warm, args.seed)
    t1 = time.perf_counter()
    index = build_index(g, warmth)
    t2 = time.perf_counter()
    print(f"graph: {g.number_of_nodes()} contacts, {g.number_of_edges()} ties, {len(warmth)} warm; "
          f"generated in {t1 - t0:.2f} s, index built in {(t2 - t1) * 1000:.0f} ms")

    rng = random.Random(args.seed)
    targets = rng.sample(range(args.contacts), args.queries)
    find_paths(index, {targets[0]})  # warm-up
    for label, hops, distinct in [("k=5, <=2 intermediaries", 2, True),
                                  ("k=5, <=2 intermediaries, distinct_second=False", 2, False),
                                  ("k=5, <=3 intermediaries", 3, True),
                                  ("k=5, no hop limit (Dijkstra)", None, True)]:
        times = []
        found = 0
        for t in targets:
            s = time.perf_counter()
            res = find_paths(index, {t}, k=5, max_intermediaries=hops, distinct_second=distinct)
            times.append(time.perf_counter() - s)
            found += len(res)
        ms = [x * 1000 for x in times]
        print(f"find_paths {label}: median {statistics.median(ms):.2f} ms, mean {statistics.mean(ms):.2f} ms, "
              f"max {max(ms):.2f} ms per query over {len(ms)} targets ({found / len(ms):.1f} paths each)")

    org = set(rng.sample(range(args.contacts), 40))
    s = time.perf_counter()
    res = find_paths(index, org, k=5)
    print(f"find_paths to a set of 40 targets: {(time.perf_counter() - s) * 1000:.2f} ms ({len(res)} paths)")

    if args.yen_queries:
        print(f"reference: networkx shortest_simple_paths (Yen), first path per first intermediary, "
              f"{args.yen_seconds:.0f} s budget per query")
    for t in targets[: args.yen_queries]:
        s = time.perf_counter()
        lim = find_paths(index, {t}, k=5, max_intermediaries=2, distinct_second=False)
        lim_ms = (time.perf_counter() - s) * 1000
        s = time.perf_counter()
        unl = find_paths(index, {t}, k=5, max_intermediaries=None, distinct_second=False)
        unl_ms = (time.perf_counter() - s) * 1000
        ref_l, ref_u, enumerated, secs, secs_u = yen_reference(g, warmth, t, 5, 2, args.yen_seconds)
        yen_ms, yen_u_ms = secs * 1000, secs_u * 1000
        print(f"  target {t}: Yen ran {yen_ms:.0f} ms, {enumerated} paths ({yen_ms / enumerated:.0f} ms per path)")
        cmp_u = "=" if len(ref_u) == 5 else ">="
        print(f"    no hop limit: ours {unl_ms:.1f} ms, Yen {yen_u_ms:.0f} ms for {len(ref_u)} of 5; "
              f"ratio {cmp_u} {yen_u_ms / unl_ms:.0f}x; scores agree: {_agree(unl, ref_u)}")
        cmp_l = "=" if len(ref_l) == 5 else ">="
        print(f"    <=2 intermediaries: ours {lim_ms:.2f} ms, Yen {yen_ms:.0f} ms for {len(ref_l)} of 5; "
              f"ratio {cmp_l} {yen_ms / lim_ms:.0f}x; scores agree: {_agree(lim, ref_l)}")


if __name__ == "__main__":
    main()
