"""Time and memory of groups and bridges beside plain networkx and igraph on a large synthetic network.

A script, not a test: it prints figures and asserts nothing.

    python benchmarks/bench_groups.py          # 10,000 contacts, 200,000 ties
    python benchmarks/bench_groups.py --big    # 50,000 contacts, 1,000,000 ties

The graph is a seeded planted partition: block sizes drawn from a Pareto law
(mean about 100 contacts), 60% of ties drawn inside a block with strength
Beta(4, 2), 40% between random contacts with strength Beta(1.5, 4), so the
between-block ties are many, weak and mostly local bridges (a hard case for
span computation). Each call runs in a forked child process: seconds are
wall-clock, memory is the growth of the child's peak resident size over its
size at the start (Linux VmHWM, reset through /proc/self/clear_refs), which
sees igraph's and scipy's C allocations as well as Python's.

Baselines: networkx ``louvain_communities`` and igraph ``community_multilevel``
on the same graph; neighbourhood overlap by a plain per-tie networkx loop and
``networkx.local_bridges(with_span=True)`` on a subset of ties, extrapolated
linearly to all of them (said so in the output).
"""

from __future__ import annotations

import argparse
import multiprocessing as mp
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from mynet.analysis.bridges import (
    group_bridges,
    group_links,
    local_bridges,
    neighbourhood_overlap,
    single_points_of_access,
)
from mynet.analysis.groups import detect_groups


def planted_graph(n: int, m: int, *, mean_block: int = 100, p_in: float = 0.6, seed: int = 0) -> nx.Graph:
    """A weighted planted-partition graph with exactly ``m`` distinct ties on contacts ``1..n``."""
    rng = np.random.default_rng(seed)
    nb = max(1, n // mean_block)
    probs = rng.pareto(2.0, nb) + 1.0
    block = np.sort(rng.choice(nb, size=n, p=probs / probs.sum()))
    starts = np.searchsorted(block, np.arange(nb))
    ends = np.searchsorted(block, np.arange(nb), side="right")
    keys = np.empty(0, dtype=np.int64)
    weights = np.empty(0)
    while len(keys) < m:
        k = int((m - len(keys)) * 1.3) + 10
        k_in = int(k * p_in)
        u = rng.integers(0, n, k_in)
        b = block[u]
        v = starts[b] + (rng.random(k_in) * (ends[b] - starts[b])).astype(np.int64)
        uu = np.concatenate([u, rng.integers(0, n, k - k_in)])
        vv = np.concatenate([v, rng.integers(0, n, k - k_in)])
        w = np.concatenate([rng.beta(4, 2, k_in), rng.beta(1.5, 4, k - k_in)])
        keep = uu != vv
        lo, hi, w = np.minimum(uu, vv)[keep], np.maximum(uu, vv)[keep], w[keep]
        perm = rng.permutation(len(lo))
        keys = np.concatenate([keys, (lo * n + hi)[perm]])
        weights = np.concatenate([weights, w[perm]])
        _, first = np.unique(keys, return_index=True)
        first.sort()
        keys, weights = keys[first], weights[first]
    keys, weights = keys[:m], np.clip(weights[:m], 0.01, 1.0).round(4)
    G = nx.Graph()
    G.add_nodes_from(range(1, n + 1))
    G.add_weighted_edges_from(zip((keys // n + 1).tolist(), (keys % n + 1).tolist(), weights.tolist()))
    return G


def _status(field: str) -> int:
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith(field + ":"):
                return int(line.split()[1])  # kB
    return 0


def _child(fn, conn):
    try:
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")  # reset the peak resident size (Linux >= 4.0)
        reset = True
    except OSError:
        reset = False
    base = _status("VmRSS")
    t0 = time.perf_counter()
    summary = fn()
    seconds = time.perf_counter() - t0
    extra = max(0, _status("VmHWM") - base) / 1024.0 if reset else float("nan")
    conn.send((seconds, extra, summary))
    conn.close()


def measure(fn):
    """Run ``fn`` in a forked child: (seconds, extra peak MB, its summary)."""
    ctx = mp.get_context("fork")
    parent, child = ctx.Pipe(duplex=False)
    proc = ctx.Process(target=_child, args=(fn, child))
    proc.start()
    result = parent.recv()
    proc.join()
    return result


def row(label: str, seconds: float, mb: float, note: str = "") -> None:
    print(f"  {label:<48} {seconds:8.2f} s  {mb:8.0f} MB  {note}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--big", "--large", action="store_true", help="50,000 contacts, 1,000,000 ties")
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--skip-slow-baselines", action="store_true", help="skip networkx louvain on --big")
    args = ap.parse_args()
    n, m = (50_000, 1_000_000) if args.big else (10_000, 200_000)

    t0 = time.perf_counter()
    G = planted_graph(n, m, seed=args.seed)
    print(f"graph: {n:,} contacts, {G.number_of_edges():,} ties, planted partition (seed {args.seed}); "
          f"built in {time.perf_counter() - t0:.1f} s")
    print(f"  {'call':<48} {'time':>10}  {'peak +':>11}")

    print("groups")
    results = {}
    for backend in ("louvain", "igraph"):
        def run(b=backend):
            res = detect_groups(G, seed=args.seed, backend=b)
            return res.modularity, len(res.groups), len(res.unclustered)

        sec, mb, (q, k, un) = measure(run)
        results[backend] = sec
        label = "python-louvain" if backend == "louvain" else "igraph"
        row(f"detect_groups backend={backend!r} ({label})", sec, mb, f"Q={q:.4f}, {k} groups, {un} unclustered")

    if not (args.big and args.skip_slow_baselines):
        def nx_louvain():
            comms = nx.community.louvain_communities(G, weight="weight", seed=args.seed)
            return nx.community.modularity(G, comms, weight="weight"), len(comms)

        sec, mb, (q, k) = measure(nx_louvain)
        row("networkx louvain_communities", sec, mb, f"Q={q:.4f}, {k} communities")

    def ig_raw():
        import igraph as ig

        index = {v: i for i, v in enumerate(G)}
        g = ig.Graph(n=len(index), edges=[(index[u], index[v]) for u, v in G.edges()])
        g.es["weight"] = [w for _, _, w in G.edges(data="weight")]
        t = time.perf_counter()
        cl = g.community_multilevel(weights="weight")
        return cl.modularity, len(cl), time.perf_counter() - t

    sec, mb, (q, k, inner) = measure(ig_raw)
    row("igraph community_multilevel (+ conversion)", sec, mb,
        f"Q={q:.4f}, {k} communities; {inner:.2f} s without conversion")

    print("measures")
    groups = detect_groups(G, seed=args.seed, backend="igraph")
    rng = np.random.default_rng(args.seed)
    ego = {int(v): float(rng.uniform(0.1, 1.0)) for v in rng.choice(np.arange(1, n + 1), size=150, replace=False)}
    sec_ov, mb, k = measure(lambda: len(neighbourhood_overlap(G)))
    row("neighbourhood_overlap (all ties)", sec_ov, mb, f"{k:,} ties")

    edges = list(G.edges())
    sample = [edges[i] for i in rng.choice(len(edges), size=2000, replace=False)]

    def plain_loop():
        out = {}
        for u, v in sample:
            nu, nv = set(G[u]), set(G[v])
            den = len(nu | nv) - 2
            out[(u, v)] = len(nu & nv) / den if den > 0 else 0.0
        return len(out)

    sec, mb, _ = measure(plain_loop)
    row("plain networkx loop, 2,000 ties", sec, mb, f"extrapolated to all ties: {sec * len(edges) / 2000:.1f} s")

    def run_local_bridges():
        spans = local_bridges(G)
        return len(spans), int(np.isinf(list(spans.values())).sum())

    sec_lb, mb, lb = measure(run_local_bridges)
    row("local_bridges (with spans)", sec_lb, mb, f"{lb[0]:,} local bridges, {lb[1]:,} of span inf")

    def nx_spans(limit=10):
        t = time.perf_counter()
        count = 0
        for _ in nx.local_bridges(G, with_span=True):
            count += 1
            if count == limit:
                break
        return count, time.perf_counter() - t

    sec, mb, (count, inner) = measure(nx_spans)
    row(f"networkx local_bridges, first {count} spans", sec, mb,
        f"extrapolated to {lb[0]:,}: {inner / max(count, 1) * lb[0]:.0f} s")

    sec_all, mb, k = measure(lambda: len(group_bridges(G, groups)))
    row("group_bridges (all, with spans)", sec_all, mb, f"{k:,} ties between groups")
    sec_gb, mb, k = measure(lambda: len(group_bridges(G, groups, limit=100)))
    row("group_bridges (limit=100)", sec_gb, mb, "spans for the 100 returned only")
    sec_gl, mb, k = measure(lambda: len(group_links(G, groups)))
    row("group_links", sec_gl, mb, f"{k:,} pairs of groups")
    sec_sp, mb, k = measure(lambda: len(single_points_of_access(G, groups, ego_ties=ego)))
    row("single_points_of_access (you + 150 contacts)", sec_sp, mb, f"{k:,} people")
    for backend in ("louvain", "igraph"):
        total = results[backend] + sec_gb + sec_gl + sec_sp
        print(f"  groups ({backend}) + group_bridges(limit=100) + group_links + single_points_of_access: {total:.1f} s")


if __name__ == "__main__":
    main()
