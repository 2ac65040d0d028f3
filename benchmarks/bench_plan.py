"""Time the plan: the greedy cover of targets by first people, and the route table behind it.

Run from the project root: ``python benchmarks/bench_plan.py [--targets 40] [--people 300]``.

1. The cover alone (:func:`mynet.analysis.plan.cover`) on a seeded random instance (each target
   openable by 5 to 40 of the people, scores uniform in [0.01, 1]), against the same greedy written
   plainly with networkx: every gain evaluated by ``max_flow_min_cost`` on the person-target network.
   Both must choose the same number of people; the figures are the time of each and their ratio.
2. The route table of a target list on 10,000 contacts / ~200,000 ties with 300 warm contacts
   (the graph of ``bench_paths.py``): one search per target (:func:`routes_to`), then the cover.

Prints figures only; asserts nothing.
"""

from __future__ import annotations

import argparse
import random
import time

import networkx as nx
import numpy as np

from mynet.analysis.intro_routes import Targets
from mynet.analysis.intro_search import build_index
from mynet.analysis.plan import cover

SCALE = 10**6


def instance(n_targets: int, n_people: int, seed: int) -> dict:
    rng = random.Random(seed)
    return {t: {p: round(rng.uniform(0.01, 1.0), 4) for p in rng.sample(range(n_people), rng.randint(5, 40))}
            for t in range(n_targets)}


def nx_value(options: dict, people: list[int], capacity: int) -> tuple[int, float]:
    g = nx.DiGraph()
    for p in people:
        g.add_edge("s", ("p", p), capacity=capacity, weight=0)
    for t, opts in options.items():
        g.add_edge(("t", t), "z", capacity=1, weight=0)
        for p, s in opts.items():
            if p in people:
                g.add_edge(("p", p), ("t", t), capacity=1, weight=-round(s * SCALE))
    if "s" not in g:
        return 0, 0.0
    flow = nx.max_flow_min_cost(g, "s", "z")
    return sum(flow["s"].values()), round(-nx.cost_of_flow(g, flow) / SCALE, 6)


def nx_greedy(options: dict, capacity: int) -> list[int]:
    """The plan's greedy (gain, then score sum, then smaller id), every value by networkx min-cost flow."""
    people = sorted({p for o in options.values() for p in o})
    most = nx_value(options, people, capacity)[0]
    chosen: list[int] = []
    current = (0, 0.0)
    while current[0] < most:
        best = None
        for p in people:
            if p in chosen:
                continue
            v = nx_value(options, chosen + [p], capacity)
            if v[0] > current[0] and (best is None or (v[0], v[1], -p) > best[0]):
                best = ((v[0], v[1], -p), p, v)
        chosen.append(best[1])
        current = best[2]
    return chosen


def bench_cover(n_targets: int, n_people: int, capacity: int, seed: int) -> None:
    options = instance(n_targets, n_people, seed)
    t0 = time.perf_counter()
    plan = cover(options, capacity)
    ours = time.perf_counter() - t0
    t0 = time.perf_counter()
    ref = nx_greedy(options, capacity)
    theirs = time.perf_counter() - t0
    print(f"cover, {n_targets} targets x {n_people} people, at most {capacity} each:")
    print(f"  mynet (linear assignment): {ours:8.3f} s, {len(plan.order)} people asked, {plan.opened} opened")
    print(f"  networkx min-cost flow   : {theirs:8.3f} s, {len(ref)} people asked (before the pruning pass)")
    print(f"  ratio networkx / mynet   : {theirs / max(ours, 1e-9):8.1f}x")


def bench_routes(n_targets: int, seed: int) -> None:
    from mynet.analysis.intro_search import find_paths
    from mynet.analysis.target_routes import Route

    rng = np.random.default_rng(seed)
    n, m = 10_000, 200_000
    g = nx.gnm_random_graph(n, m, seed=seed)
    for (u, v), s in zip(g.edges, rng.uniform(0.05, 1.0, size=g.number_of_edges())):
        g.edges[u, v]["weight"] = float(s)
    warm_ids = rng.choice(n, size=300, replace=False)
    warmth = {int(c): float(w) for c, w in zip(warm_ids, rng.uniform(0.05, 1.0, size=300))}
    index = build_index(g, warmth)
    targets = [Targets("organisation", f"org {i}", [int(x) for x in rng.choice(n, size=8, replace=False)])
               for i in range(n_targets)]
    t0 = time.perf_counter()
    options = {}
    for i, t in enumerate(targets):
        # The search routes_to runs (one path per first person); the network wrapper is left out here.
        paths = find_paths(index, t.members, k=index.n, distinct_second=False)
        routes = [Route(p.first, p.score, p.score, p.nodes, False) for p in paths if index.warmth[index.pos(p.first)]
                  >= 0.3]
        options[i] = {r.first: r.rank for r in routes}
    search = time.perf_counter() - t0
    t0 = time.perf_counter()
    plan = cover(options, 3)
    cov = time.perf_counter() - t0
    print(f"route table, {n_targets} targets of 8 people each, 10,000 contacts / {g.number_of_edges():,} ties:")
    print(f"  searches: {search:.2f} s ({search / n_targets * 1000:.0f} ms per target); cover: {cov:.2f} s; "
          f"{len(plan.order)} people asked for {plan.opened} targets")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--targets", type=int, default=40)
    ap.add_argument("--people", type=int, default=300)
    ap.add_argument("--seed", type=int, default=0)
    args = ap.parse_args()
    bench_cover(args.targets, args.people, 3, args.seed)
    bench_routes(args.targets, args.seed)


if __name__ == "__main__":
    main()
