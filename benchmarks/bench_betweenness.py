"""How stable is the broker cut? Top-10% betweenness from the estimate beside the exact values.

A script, not a test: it prints figures and asserts nothing.

    python benchmarks/bench_betweenness.py            # co-occurrence graphs of 5,000 and 10,000 contacts, LFR 5,000
    python benchmarks/bench_betweenness.py --quick    # 5,000 contacts only
    python benchmarks/bench_betweenness.py --sizes 10000 --no-lfr --skip-nx

Who holds the network together is ranked by betweenness, so what matters is the *overlap*: the share
of the exact top 10% (ties by node) that an estimate also ranks in its top 10%. For each graph:

* exact: igraph's Brandes betweenness over every source (what mynet uses up to 5,000 contacts);
* before: 256 uniform pivots (the old default above 2,000 contacts), Brandes & Pich 2007;
* networkx: ``betweenness_centrality(k=256)``, the plain library estimate, for comparison;
* after (defaults): what ``contact_measures`` now does at that size (exact up to 5,000 contacts;
  above, the stratified adaptive estimate, or exact values when the estimate would cost more);
* after (estimate forced): the stratified adaptive estimate alone, with its stated expected
  agreement beside the measured one.

Graphs: ties from the co-occurrence benchmark's generator (``bench_ties.make_events``: circles of
10-60 people, event sizes mostly 2-6), thresholded at the default minimum strength, with Louvain
groups; and an LFR benchmark graph (Lancichinetti, Fortunato & Radicchi 2008, via networkx) with
its planted communities. Seconds are wall-clock on a shared machine: compare within one run.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import bench_analysis  # noqa: E402
import bench_measures  # noqa: E402

from mynet.analysis.centrality import (  # noqa: E402
    betweenness_values,
    contact_measures,
    module_labels,
    pivot_sample,
    prepare_graph,
)
from mynet.analysis.estimate import adaptive_pivots  # noqa: E402
from mynet.analysis.groups import detect_groups  # noqa: E402


def top(values: np.ndarray, share: float = 0.10) -> set[int]:
    k = int(np.ceil(share * len(values)))
    return set(np.lexsort((np.arange(len(values)), -values))[:k].tolist())


def overlap(exact_top: set[int], values: np.ndarray) -> float:
    return len(exact_top & top(values)) / len(exact_top)


def timed(fn):
    t = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t


def row(label: str, seconds: float, ov: float, note: str = "") -> None:
    print(f"  {label:<44} {seconds:8.1f} s   top-10% overlap {ov:6.1%}  {note}")


def run(name: str, G: nx.Graph, groups: dict, seeds: int, with_nx: bool = True) -> None:
    prep = prepare_graph(G, "weight")
    n = prep.n
    print(f"{name}: {n} contacts, {G.number_of_edges()} ties, {len(set(groups.values()))} groups")
    exact, t = timed(lambda: betweenness_values(prep, None))
    T = top(exact)
    row("exact (all sources)", t, 1.0)
    labels = module_labels(prep.nodes, groups)
    for seed in range(seeds):
        est, t = timed(lambda: betweenness_values(prep, pivot_sample(n, 256, seed)))
        row(f"before: 256 uniform pivots, seed {seed}", t, overlap(T, est))
    for seed in range(min(seeds, 1) if with_nx else 0):
        H = nx.Graph()
        H.add_nodes_from(G)
        H.add_edges_from((u, v, {"d": 1.0 / w}) for u, v, w in G.edges(data="weight"))
        ref, t = timed(lambda: nx.betweenness_centrality(H, k=256, weight="d", seed=seed))
        row(f"networkx betweenness_centrality(k=256), seed {seed}", t,
            overlap(T, np.array([ref[v] for v in prep.nodes])))
    for seed in range(seeds):
        (measures, info), t = timed(lambda: contact_measures(G, groups, seed=seed))
        got = np.array([measures[v]["betweenness"] for v in prep.nodes])
        how = (f"estimate from {info['betweenness_samples']} pivots, stated {info['betweenness_agreement']:.1%}"
               if info["betweenness_sampled"] else "exact values")
        row(f"after: contact_measures defaults, seed {seed}", t, overlap(T, got), f"({how}; all measures)")
    for seed in range(seeds):
        (est, pivots, stated), t = timed(lambda: adaptive_pivots(lambda p: betweenness_values(prep, p), labels, seed, n,
                                                                 exact_share=1.0))
        row(f"after: stratified adaptive estimate, seed {seed}", t, overlap(T, est),
            f"({len(pivots)} pivots = {len(pivots) / n:.0%} of contacts; stated {stated:.1%})")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="5,000 contacts only")
    ap.add_argument("--seeds", type=int, default=2)
    ap.add_argument("--sizes", default="", help="comma-separated co-occurrence sizes (default 5000,10000)")
    ap.add_argument("--no-lfr", action="store_true", help="skip the LFR graph")
    ap.add_argument("--skip-nx", action="store_true", help="skip networkx's estimate (slow)")
    args = ap.parse_args()
    sizes = [int(x) for x in args.sizes.split(",") if x] or ([5_000] if args.quick else [5_000, 10_000])
    for n in sizes:
        G = bench_analysis.graph(n, 10 * n)
        groups = detect_groups(G).membership
        run(f"co-occurrence graph ({n // 1000}k contacts, {10 * n} events)", G, groups, args.seeds, not args.skip_nx)
    if not args.no_lfr:
        G, groups, how = bench_measures.build_graph(5_000, 7)
        G = nx.Graph((u, v, {"weight": w}) for u, v, w in G.edges(data="weight"))
        run(f"{how.split(',')[0]} (5k)", G, groups, args.seeds, not args.skip_nx)


if __name__ == "__main__":
    main()
