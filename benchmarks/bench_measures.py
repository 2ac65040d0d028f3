"""Time and memory of the per-contact measures beside plain networkx on a large synthetic network.

A script, not a test: it prints figures and asserts nothing.

    python benchmarks/bench_measures.py            # 10,000 contacts, about 200,000 ties
    python benchmarks/bench_measures.py --large    # 50,000 contacts, about 1,000,000 ties

The graph is an LFR benchmark graph (Lancichinetti, Fortunato & Radicchi 2008,
``nx.LFR_benchmark_graph``) with its planted communities as groups, falling back
to a seeded planted-partition graph if LFR generation fails. Tie strengths are
uniform in (0, 1]. Seconds are wall-clock without tracing; peak memory is the
tracemalloc peak of a second, traced run of the same call (numpy and scipy
report their buffers to tracemalloc; igraph's C heap is not seen, so the
process's peak resident size is printed too).

networkx baselines: betweenness with k pivots (default 256, as ours); constraint
and effective size on a small subset of nodes, extrapolated linearly to all
nodes (networkx's per-node path; its nodes=None sparse shortcut is timed too
where it fits in memory); pagerank and clustering in full; harmonic closeness
from a few sources, extrapolated to all n sources.
"""

from __future__ import annotations

import argparse
import resource
import sys
import time
import tracemalloc
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from mynet.analysis.centrality import contact_measures
from mynet.analysis.structure import network_summary


def build_graph(n: int, seed: int) -> tuple[nx.Graph, dict, str]:
    t0 = time.perf_counter()
    try:
        L = nx.LFR_benchmark_graph(n, tau1=2.5, tau2=1.5, mu=0.1, average_degree=32, max_degree=200,
                                   min_community=40, max_community=400, seed=seed, max_iters=2000)
        comms = sorted({frozenset(L.nodes[v]["community"]) for v in L}, key=min)
        G = nx.Graph()
        G.add_nodes_from(sorted(L))
        G.add_edges_from((u, v) for u, v in L.edges if u != v)
        kind = "LFR benchmark graph"
    except nx.ExceededMaxIterations:
        size = 100
        G0 = nx.planted_partition_graph(n // size, size, 0.3, 2.0 / n, seed=seed)
        comms = [frozenset(range(i, i + size)) for i in range(0, n, size)]
        G = nx.Graph(G0)
        kind = "planted-partition graph (LFR failed)"
    groups = {v: i for i, c in enumerate(comms) for v in c}
    rng = np.random.default_rng(seed)
    for u, v in sorted(G.edges):
        w = float(1.0 - rng.random())  # uniform in (0, 1]
        G[u][v]["weight"] = w
        G[u][v]["distance"] = 1.0 / w
    return G, groups, f"{kind}, built in {time.perf_counter() - t0:.1f} s"


def timed(fn, *args, **kw):
    t0 = time.perf_counter()
    out = fn(*args, **kw)
    return out, time.perf_counter() - t0


def traced_peak(fn, *args, **kw) -> float:
    tracemalloc.start()
    tracemalloc.reset_peak()
    fn(*args, **kw)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return peak / 2**20


def row(name: str, seconds: float, peak: float | None = None, note: str = "") -> None:
    mem = f"{peak:8.0f} MiB" if peak is not None else " " * 12
    print(f"  {name:<46} {seconds:9.2f} s {mem}  {note}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--large", action="store_true", help="50,000 contacts instead of 10,000")
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--nx-k", type=int, default=256, help="pivots for networkx betweenness (0 skips it)")
    ap.add_argument("--nx-subset", type=int, default=10, help="nodes for networkx constraint/effective size")
    ap.add_argument("--skip-nx", action="store_true", help="time only mynet")
    args = ap.parse_args()
    n = 50_000 if args.large else 10_000

    G, groups, how = build_graph(n, args.seed)
    n, m = G.number_of_nodes(), G.number_of_edges()
    print(f"graph: {n} contacts, {m} ties, {len(set(groups.values()))} groups; {how}")
    print(f"  {'call':<46} {'time':>11} {'peak':>12}")

    print("mynet")
    (measures, info), t = timed(contact_measures, G, groups, seed=args.seed)
    row("contact_measures (all per-contact measures)", t, traced_peak(contact_measures, G, groups, seed=args.seed),
        f"betweenness sampled={info['betweenness_sampled']} from {info['betweenness_samples']} pivots")
    roles: dict[str, int] = {}
    for mm in measures.values():
        roles[mm["role"]] = roles.get(mm["role"], 0) + 1
    summary, t = timed(network_summary, G, groups, seed=args.seed)
    row("network_summary", t, traced_peak(network_summary, G, groups, seed=args.seed),
        f"sigma={summary['small_world']['sigma']:.2f}, path from {summary['path_sources']} BFS sources")

    if not args.skip_nx:
        print("networkx")
        if args.nx_k:
            _, t = timed(nx.betweenness_centrality, G, k=args.nx_k, weight="distance", seed=args.seed)
            peak = traced_peak(nx.betweenness_centrality, G, k=8, weight="distance", seed=args.seed)
            row(f"betweenness_centrality(k={args.nx_k}, weight=1/w)", t, peak, "peak from a traced k=8 run")
        nodes = sorted(G)[: args.nx_subset]
        _, t = timed(nx.constraint, G, nodes=nodes, weight="weight")
        row(f"constraint, {len(nodes)} nodes -> x{n // len(nodes)}", t * n / len(nodes), None,
            f"measured {t:.1f} s, extrapolated")
        _, t = timed(nx.effective_size, G, nodes=nodes, weight="weight")
        row(f"effective_size, {len(nodes)} nodes -> x{n // len(nodes)}", t * n / len(nodes), None,
            f"measured {t:.1f} s, extrapolated")
        if n <= 20_000:
            _, t = timed(nx.constraint, G, weight="weight")
            row("constraint(nodes=None) [networkx sparse path]", t, traced_peak(nx.constraint, G, weight="weight"))
        _, t = timed(nx.pagerank, G, weight="weight")
        row("pagerank", t)
        _, t = timed(nx.clustering, G)
        row("clustering (unweighted)", t)
        src = nodes[:4]
        _, t = timed(nx.harmonic_centrality, G, sources=src, distance="distance")
        row(f"harmonic_centrality, {len(src)} sources -> all {n}", t * n / len(src), None,
            f"measured {t:.1f} s, extrapolated")
    print(f"roles: {dict(sorted(roles.items(), key=lambda kv: -kv[1]))}")
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"process peak resident size: {rss:.0f} MiB (includes the networkx graph itself)")


if __name__ == "__main__":
    main()
