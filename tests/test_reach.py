"""Reach (mynet.analysis.intro_routes): the whole ranked list checked against brute force on random graphs.

Reference: every intro path with at most two intermediaries enumerated by networkx
``all_simple_paths(cutoff=3)`` on the graph with you added, then the documented rules
applied to that list by hand: a path ends at the first target it reaches, someone you
are warm with (warmth >= WARM_ENOUGH) is never a later intermediary, one path per first
intermediary and, where possible, a new second intermediary (greedy, best first).
"""

from __future__ import annotations

import math
import random
from datetime import date

import networkx as nx
import numpy as np
import pytest
from test_paths import greedy_distinct_second  # the documented distinct-second rule, by brute force

from mynet.analysis.intro_routes import WARM_ENOUGH, Targets, reach
from mynet.evidence.network import Network
from mynet.evidence.ties import KINDS, TieModel, TieTable
from mynet.evidence.warmth import Warmth, WarmthModel
from mynet.model import Contact

YOU = -1


def make_network(g: nx.Graph, warmth: dict[int, float], last: dict[int, str] | None = None) -> Network:
    """A Network over a plain weighted graph: every tie a manual one, warmth as given."""
    contacts = [Contact(id=c, name=f"P{c}") for c in sorted(g.nodes)]
    edges = sorted((min(u, v), max(u, v), s) for u, v, s in g.edges(data="weight"))
    n = len(edges)
    table = TieTable(
        np.asarray([a for a, _, _ in edges], dtype=np.int64),
        np.asarray([b for _, b, _ in edges], dtype=np.int64),
        np.asarray([s for _, _, s in edges], dtype=float),
        {k: np.zeros(n) for k in KINDS},
        {k: np.zeros(n, dtype=np.int64) for k in ("meeting", "thread")},
        np.ones(n, dtype=bool),
    )
    warm = {c: Warmth(c, warmth=w, computed=w, rated=w, last=(last or {}).get(c)) for c, w in warmth.items()}
    return Network(contacts, {c.id: c for c in contacts}, table, table, warm, TieModel(), WarmthModel(), set())


def random_case(seed: int):
    rng = random.Random(seed)
    n = rng.randint(8, 16)
    g = nx.gnm_random_graph(n, rng.randint(n, 3 * n), seed=seed)
    for u, v in g.edges:
        g.edges[u, v]["weight"] = round(rng.uniform(0.05, 1.0), 6)
    # Warmth on about half of the contacts, both sides of WARM_ENOUGH.
    warm = {c: round(rng.uniform(0.05, 1.0), 6) for c in rng.sample(range(n), rng.randint(2, n // 2 + 1))}
    return g, warm


def brute_paths(g: nx.Graph, warmth: dict[int, float], targets: set[int], hops: int = 2):
    """Every allowed intro path as (score, nodes without you), by exhaustive enumeration."""
    h = nx.DiGraph()
    for u, v, s in g.edges(data="weight"):
        h.add_edge(u, v, strength=s)
        h.add_edge(v, u, strength=s)
    h.add_nodes_from(g.nodes)
    for c, w in warmth.items():
        if w > 0 and c not in targets:
            h.add_edge(YOU, c, strength=w)
    out = []
    for t in sorted(targets):
        for p in nx.all_simple_paths(h, YOU, t, cutoff=hops + 1):
            inner = p[1:-1]
            if any(x in targets for x in inner):
                continue  # a path ends at the first target it reaches
            if any(warmth.get(x, 0) >= WARM_ENOUGH for x in inner[1:]):
                continue  # a warm contact is asked directly, never reached through someone
            out.append((math.prod(h.edges[a, b]["strength"] for a, b in zip(p, p[1:])), p[1:]))
    return out


def same_ranking(got: list[dict], want: list[tuple[float, list[int]]]):
    """Same length and scores in order; same people wherever a score is not shared."""
    assert len(got) == len(want)
    assert [p["score"] for p in got] == pytest.approx([round(s, 6) for s, _ in want], abs=2e-6)
    scores = [s for s, _ in want]
    for i, (s, nodes) in enumerate(want):
        if all(abs(s - o) > 1e-6 for j, o in enumerate(scores) if j != i):
            assert got[i]["path"] == nodes


def test_a_detour_never_hides_a_good_path():
    # ties A-B 0.9, B-T 0.9, A-C 0.8, C-T 0.8; your warmth A 0.9, B 0.5.
    # hand-computed: you-A-B-T (0.729) is a detour through B, whom you know; without it
    # A's best is you-A-C-T = 0.9 * 0.8 * 0.8 = 0.576, above you-B-T = 0.5 * 0.9 = 0.45.
    A, B, C, T = 1, 2, 3, 4
    g = nx.Graph()
    g.add_weighted_edges_from([(A, B, 0.9), (B, T, 0.9), (A, C, 0.8), (C, T, 0.8)])
    net = make_network(g, {A: 0.9, B: 0.5})
    res = reach(net, Targets("person", "T", [T]), k=5)
    assert [p["path"] for p in res.paths] == [[A, C, T], [B, T]]
    assert [p["score"] for p in res.paths] == pytest.approx([0.576, 0.45])


@pytest.mark.parametrize("block", range(4))
def test_whole_ranked_list_matches_brute_force(block):
    # 4 blocks x 60 seeded random graphs = 240 graphs, two queries each (a person, a set of people).
    for seed in range(60 * block, 60 * (block + 1)):
        g, warm = random_case(seed)
        net = make_network(g, warm)
        rng = random.Random(1000 + seed)
        n = g.number_of_nodes()
        person = rng.randrange(n)
        group = sorted(rng.sample(range(n), rng.randint(2, 4)))
        for members in ([person], group):
            res = reach(net, Targets("person" if len(members) == 1 else "organisation", "q", members), k=50)
            insiders = {m for m in members if len(members) > 1 and warm.get(m, 0) >= WARM_ENOUGH}
            outsiders = set(members) - insiders or set(members)
            want = greedy_distinct_second(brute_paths(g, warm, outsiders), 50)
            same_ranking(res.paths, want)
            if len(outsiders) > 1:
                best = {t: max((s for s, p in brute_paths(g, warm, outsiders) if p[-1] == t), default=None)
                        for t in outsiders}
                got = {e["target"]: e["best"]["score"] for e in res.per_target}
                assert got == pytest.approx({t: round(s, 6) for t, s in best.items() if s is not None}, abs=2e-6)
                assert set(res.unreachable) == {t for t, s in best.items() if s is None}


def test_known_target_comes_first_and_the_paths_are_alternatives():
    A, T = 1, 2
    g = nx.Graph()
    g.add_weighted_edges_from([(A, T, 0.9)])
    net = make_network(g, {A: 0.9, T: 0.6}, last={T: date.today().isoformat()})
    res = reach(net, Targets("person", "T", [T]), k=5)
    assert res.known and res.known["target"] == T and res.known["warmth"] == pytest.approx(0.6)
    assert [p["path"] for p in res.paths] == [[A, T]]
    # A weak or dormant direct tie is no way in of its own: it is shown for comparison only.
    net = make_network(g, {A: 0.9, T: 0.2})
    assert reach(net, Targets("person", "T", [T])).known is None


def test_cli_says_you_know_the_target_before_the_alternatives(tmp_path, capsys):
    from mynet.cli import main

    people = tmp_path / "people.csv"
    people.write_text("Name,Email,Company\nAna Lind,ana@quillon.example,Quillon Labs\n"
                      "Bo Ek,bo@quillon.example,Quillon Labs\nCy Moss,cy@quillon.example,Quillon Labs\n",
                      encoding="utf-8")
    ws = str(tmp_path / "ws.sqlite")
    assert main(["--workspace", ws, "import", str(people)]) == 0
    assert main(["--workspace", ws, "rate", "Ana Lind", "0.9"]) == 0
    assert main(["--workspace", ws, "rate", "Cy Moss", "0.6"]) == 0
    capsys.readouterr()
    assert main(["--workspace", ws, "reach", "--to", "Cy Moss"]) == 0
    lines = [line for line in capsys.readouterr().out.splitlines() if line.strip()]
    assert lines[1].startswith("You already know Cy Moss (warmth 0.60")
    assert lines[2].startswith("Alternatives, each through someone else")
    assert lines[3].startswith("1. you -> Ana Lind -> Cy Moss")


def test_reach_takes_today_for_dormancy():
    # warmth_model.dormant_days defaults to 365: last contact 2020-01-10 is recent on 2020-06-01, dormant in 2022.
    A, T = 1, 2
    g = nx.Graph()
    g.add_weighted_edges_from([(A, T, 0.9)])
    net = make_network(g, {A: 0.9, T: 0.6}, last={T: "2020-01-10"})
    early = reach(net, Targets("person", "T", [T]), today=date(2020, 6, 1))
    late = reach(net, Targets("person", "T", [T]), today=date(2022, 1, 1))
    assert early.known is not None and not early.direct[0]["dormant"]
    assert late.known is None and late.direct[0]["dormant"]
