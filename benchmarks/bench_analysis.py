"""The whole analysis step on co-occurrence ties: groups + every per-contact measure + bridges.

Run: python benchmarks/bench_analysis.py [--big]

Ties come from the co-occurrence benchmark's generator (bench_ties.make_events: sizes mostly 2-6, a heavy tail
to 200) at 10,000 contacts / 100,000 events (and 50,000 / 500,000 with --big), thresholded at the default minimum
strength. Prints seconds per step beside the plain networkx calls where those finish in reasonable time
(networkx louvain_communities; networkx betweenness with k=256 sampled sources on the 10,000 graph).
"""

from __future__ import annotations

import argparse
import resource
import sys
import time
from pathlib import Path

import networkx as nx

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import bench_ties  # noqa: E402

from mynet.analysis.bridges import group_bridges, group_links  # noqa: E402
from mynet.analysis.centrality import contact_measures  # noqa: E402
from mynet.analysis.groups import detect_groups  # noqa: E402
from mynet.evidence.ties import TieModel, infer_ties  # noqa: E402
from mynet.model import Contact, Interaction  # noqa: E402


def graph(n: int, e: int) -> nx.Graph:
    events = bench_ties.make_events(n, e)
    contacts = [Contact(id=i + 1, name=f"P{i}", emails=[f"p{i}@x.example"]) for i in range(n)]
    inter = [Interaction(kind="meeting", source="b.ics", index=k, line=1, when="2026-01-01", key=str(k),
                         participants=[f"p{i}@x.example" for i in ev]) for k, ev in enumerate(events)]
    model = TieModel()
    t = infer_ties(contacts, inter, set(), model)
    keep = t.strength >= model.min_strength
    G = nx.Graph()
    G.add_nodes_from(range(1, n + 1))
    G.add_weighted_edges_from(zip(t.a[keep].tolist(), t.b[keep].tolist(), t.strength[keep].tolist()))
    return G


def timed(label: str, fn):
    t = time.perf_counter()
    out = fn()
    print(f"  {label:<44} {time.perf_counter() - t:7.2f} s")
    return out


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--big", action="store_true")
    args = ap.parse_args()
    for n, e in [(10_000, 100_000)] + ([(50_000, 500_000)] if args.big else []):
        G = graph(n, e)
        print(f"{n} contacts, {G.number_of_edges()} ties (strength >= 0.05)")
        t0 = time.perf_counter()
        backend = "louvain" if n <= 20_000 else "igraph"
        gr = timed(f"mynet detect_groups ({backend})", lambda: detect_groups(G, backend=backend))
        measures, info = timed("mynet contact_measures (all measures)", lambda: contact_measures(G, gr.membership))
        sets = gr.as_sets()
        timed("mynet group_bridges (top 200) + group_links",
              lambda: (group_bridges(G, sets, limit=200), group_links(G, sets)))
        total = time.perf_counter() - t0
        print(f"  {'mynet total':<44} {total:7.2f} s   (betweenness sampled: {info['betweenness_sampled']}, "
              f"{info['betweenness_samples']} sources); peak RSS "
              f"{resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MiB")
        if n <= 10_000:
            timed("networkx louvain_communities (plain)", lambda: nx.community.louvain_communities(G, seed=0))
            timed("networkx betweenness k=256 (plain)",
                  lambda: nx.betweenness_centrality(G, k=256, seed=0, weight="weight"))


if __name__ == "__main__":
    main()
