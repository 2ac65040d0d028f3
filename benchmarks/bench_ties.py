"""Co-occurrence -> ties at scale: mynet's sparse products beside networkx's bipartite projection.

Run:  python benchmarks/bench_ties.py            (10,000 contacts / 100,000 events, plus 50,000 / 500,000)
      python benchmarks/bench_ties.py --quick    (10,000 only)

Each measurement runs in a fresh subprocess so that peak memory (ru_maxrss) is its own.
Event sizes: mostly 2-6 people, with a heavy tail up to 200 (a seeded Zipf-like draw); attendees mostly
come from one circle of 10-60 people (see make_events).
"""

from __future__ import annotations

import argparse
import json
import resource
import subprocess
import sys
import time

import numpy as np


def make_events(n_contacts: int, n_events: int, seed: int = 7):
    """Seeded events over contacts who mostly meet within their own circle.

    Contacts fall into circles of 10-60 people (teams, clubs); 90% of events draw their attendees from one
    circle, the rest from anyone. Sizes are mostly 2-6 with a heavy tail to 200 (1% of events).
    """
    rng = np.random.default_rng(seed)
    sizes = np.where(rng.random(n_events) < 0.99, rng.integers(2, 7, n_events),
                     np.minimum(200, 6 + rng.zipf(1.8, n_events)))
    bounds = [0]
    while bounds[-1] < n_contacts:
        bounds.append(min(n_contacts, bounds[-1] + int(rng.integers(10, 61))))
    circles = [np.arange(a, b) for a, b in zip(bounds, bounds[1:])]
    which = rng.integers(0, len(circles), n_events)
    local = rng.random(n_events) < 0.9
    events = []
    for s, c, loc in zip(sizes, which, local):
        pool = circles[c] if loc and len(circles[c]) >= s else None
        if pool is None:
            events.append(np.unique(rng.choice(n_contacts, size=int(s), replace=False)))
        else:
            events.append(np.unique(rng.choice(pool, size=int(s), replace=False)))
    return events


def run_mynet(n_contacts: int, n_events: int) -> dict:
    from mynet.evidence.ties import TieModel, infer_ties
    from mynet.model import Contact, Interaction

    events = make_events(n_contacts, n_events)
    t0 = time.perf_counter()
    contacts = [Contact(id=i + 1, name=f"P{i}", emails=[f"p{i}@x.example"]) for i in range(n_contacts)]
    inter = [Interaction(kind="meeting", source="b.ics", index=k, line=1, when="2026-01-01", key=str(k),
                         participants=[f"p{i}@x.example" for i in ev]) for k, ev in enumerate(events)]
    t1 = time.perf_counter()
    table = infer_ties(contacts, inter, set(), TieModel(broadcast_cap=200))
    t2 = time.perf_counter()
    return {"what": "mynet infer_ties", "contacts": n_contacts, "events": n_events, "ties": len(table),
            "build_objects_s": round(t1 - t0, 2), "tie_step_s": round(t2 - t1, 2),
            "peak_mib": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1)}


def run_scipy(n_contacts: int, n_events: int) -> dict:
    import scipy.sparse as sp

    events = make_events(n_contacts, n_events)
    t0 = time.perf_counter()
    rows = np.concatenate(events)
    cols = np.repeat(np.arange(len(events)), [len(e) for e in events])
    B = sp.csr_matrix((np.ones(len(rows)), (rows, cols)), shape=(n_contacts, len(events)))
    w = 1.0 / (np.array([len(e) for e in events]) - 1.0)
    C = sp.triu((B @ sp.diags(w)) @ B.T, k=1)
    t1 = time.perf_counter()
    return {"what": "bare scipy product", "contacts": n_contacts, "events": n_events, "ties": int(C.nnz),
            "tie_step_s": round(t1 - t0, 2),
            "peak_mib": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1)}


def run_networkx(n_contacts: int, n_events: int) -> dict:
    import networkx as nx
    from networkx.algorithms import bipartite

    events = make_events(n_contacts, n_events)
    t0 = time.perf_counter()
    G = nx.Graph()
    people = [("p", i) for i in range(n_contacts)]
    G.add_nodes_from(people, bipartite=0)
    for k, ev in enumerate(events):
        G.add_edges_from((("p", int(i)), ("e", k)) for i in ev)
    P = bipartite.collaboration_weighted_projected_graph(G, people)
    t1 = time.perf_counter()
    return {"what": "networkx collaboration_weighted_projected_graph", "contacts": n_contacts, "events": n_events,
            "ties": P.number_of_edges(), "tie_step_s": round(t1 - t0, 2),
            "peak_mib": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1)}


def in_subprocess(kind: str, n: int, e: int, timeout: float) -> dict:
    code = (f"import json, sys; sys.path.insert(0, 'benchmarks'); import bench_ties as b; "
            f"print(json.dumps(b.run_{kind}({n}, {e})))")
    try:
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=timeout, check=True)
        return json.loads(out.stdout.strip().splitlines()[-1])
    except subprocess.TimeoutExpired:
        return {"what": kind, "contacts": n, "events": e, "tie_step_s": f">{timeout:.0f} (stopped)"}


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true")
    args = ap.parse_args()
    sizes = [(10_000, 100_000)] + ([] if args.quick else [(50_000, 500_000)])
    for n, e in sizes:
        rows = [in_subprocess("mynet", n, e, 600), in_subprocess("scipy", n, e, 600),
                in_subprocess("networkx", n, e, 120 if n > 10_000 else 600)]
        for r in rows:
            print(json.dumps(r))
        nx_s = rows[2]["tie_step_s"]
        if isinstance(nx_s, float):
            print(f"  -> at {n} contacts mynet is {nx_s / max(rows[0]['tie_step_s'], 1e-9):.0f}x faster than the "
                  f"networkx projection")
        else:
            print(f"  -> at {n} contacts the networkx projection did not finish ({nx_s} s)")


if __name__ == "__main__":
    main()
