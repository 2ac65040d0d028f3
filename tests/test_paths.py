"""Intro paths (mynet.analysis.intro_search) checked against networkx and against brute force.

References used below:
- networkx ``shortest_path`` (Dijkstra 1959) on step costs -ln(strength): the best path.
- networkx ``shortest_simple_paths`` (Yen 1971, "Finding the k shortest loopless paths in a
  network", Management Science 17(11)): the k best paths, filtered for distinct first
  intermediaries.
- networkx ``all_simple_paths(cutoff=...)``: brute-force enumeration for the hop limit.
"""

from __future__ import annotations

import math
import random

import networkx as nx
import pytest

from mynet.analysis.intro_search import IntroPath, PathIndex, best_per_target, build_index, direct_route, find_paths

YOU = -1  # the ego node in the reference graphs (never a contact id)


# --------------------------------------------------------------------------- helpers


def random_case(seed: int, n: int = 18, m: int = 40, n_warm: int = 7, ones: bool = False):
    """A seeded random tie graph with random strengths and random warmth on some contacts."""
    rng = random.Random(seed)
    g = nx.gnm_random_graph(n, m, seed=seed)
    for u, v in g.edges:
        g.edges[u, v]["weight"] = 1.0 if ones and rng.random() < 0.3 else round(rng.uniform(0.05, 1.0), 6)
    warm = {c: round(rng.uniform(0.05, 1.0), 6) for c in rng.sample(range(n), n_warm)}
    return g, warm


def ego_graph(g: nx.Graph, warmth: dict[int, float], targets=(), avoid=(), min_strength=0.0) -> nx.DiGraph:
    """The reference graph: ties plus you, costs -ln(strength), your direct ties to targets removed.

    Directed so that nothing ever enters you; avoided people and weak steps are dropped.
    """
    h = nx.DiGraph()
    h.add_nodes_from(c for c in g.nodes if c not in avoid)
    for u, v, s in g.edges(data="weight"):
        if u in avoid or v in avoid or s < min_strength:
            continue
        h.add_edge(u, v, cost=-math.log(s), strength=s)
        h.add_edge(v, u, cost=-math.log(s), strength=s)
    h.add_node(YOU)
    for c, w in warmth.items():
        if w > 0 and w >= min_strength and c not in avoid and c not in targets:
            h.add_edge(YOU, c, cost=-math.log(w), strength=w)
    return h


def path_score(h: nx.DiGraph, path: list[int]) -> float:
    return math.prod(h.edges[a, b]["strength"] for a, b in zip(path, path[1:]))


def brute_paths(g, warmth, targets, hops, avoid=(), min_strength=0.0):
    """Every valid intro path (as (score, nodes without you)) by exhaustive enumeration."""
    h = ego_graph(g, warmth, targets, avoid, min_strength)
    out = []
    for t in targets:
        if t not in h:
            continue
        for p in nx.all_simple_paths(h, YOU, t, cutoff=hops + 1):
            if any(x in targets for x in p[1:-1]):
                continue  # a path ends at the first target it reaches
            out.append((path_score(h, p), p[1:]))
    return out


def best_per_first(paths):
    """Best path per first intermediary, best first."""
    best: dict[int, tuple[float, list[int]]] = {}
    for s, p in paths:
        if p[0] not in best or s > best[p[0]][0]:
            best[p[0]] = (s, p)
    return sorted(best.values(), key=lambda x: -x[0])


def assert_same(got: list[IntroPath], want: list[tuple[float, list[int]]]):
    """Same scores in order; same node lists where the score is distinct from its neighbours'."""
    assert [p.score for p in got] == pytest.approx([s for s, _ in want], rel=1e-9)
    scores = [s for s, _ in want]
    for i, (s, nodes) in enumerate(want):
        if all(abs(s - o) > 1e-9 for j, o in enumerate(scores) if j != i):
            assert list(got[i].nodes) == nodes


def check_path(p: IntroPath, idx: PathIndex, warmth, max_int=None, avoid=(), min_strength=0.0):
    """Internal consistency of one path."""
    assert len(p.nodes) >= 2 and p.nodes[-1] == p.target
    assert len(set(p.nodes)) == len(p.nodes)
    assert p.strengths[0] == warmth[p.nodes[0]]
    for (a, b), s in zip(zip(p.nodes, p.nodes[1:]), p.strengths[1:]):
        assert s == idx.edge_strength(idx.pos(a), idx.pos(b)) > 0
    assert p.score == pytest.approx(math.prod(p.strengths), rel=1e-12)
    assert p.strengths[p.weakest_step] == min(p.strengths)
    assert not set(p.nodes) & set(avoid)
    assert min(p.strengths) >= min_strength
    if max_int is not None:
        assert len(p.nodes) - 1 <= max_int


# --------------------------------------------------------------------------- hand-computed


def test_hand_computed_two_routes():
    # hand-computed: you -0.9- A -0.5- T scores 0.9 * 0.5 = 0.45;
    #                you -0.6- B -0.9- T scores 0.6 * 0.9 = 0.54, so B comes first.
    A, B, T = 1, 2, 3
    g = nx.Graph()
    g.add_edge(A, T, weight=0.5)
    g.add_edge(B, T, weight=0.9)
    idx = build_index(g, {A: 0.9, B: 0.6})
    got = find_paths(idx, {T})
    assert [p.nodes for p in got] == [(B, T), (A, T)]
    assert [p.score for p in got] == pytest.approx([0.54, 0.45])
    assert got[0].strengths == (0.6, 0.9) and got[0].weakest_step == 0
    assert got[1].weakest_step == 1
    assert got[0].to_dict() == {
        "score": pytest.approx(0.54),
        "path": [B, T],
        "steps": [{"from": "you", "to": B, "strength": 0.6}, {"from": B, "to": T, "strength": 0.9}],
        "target": T,
        "weakest": 0,
    }


def test_hand_computed_distinct_second():
    # hand-computed:
    #   you -0.9- A -0.9- C -0.9- T : 0.9 * 0.9 * 0.9 = 0.729
    #   you -0.8- B -0.9- C -0.9- T : 0.8 * 0.9 * 0.9 = 0.648  (second person C again)
    #   you -0.8- B -0.5- D -0.8- T : 0.8 * 0.5 * 0.8 = 0.32   (B's alternative through D)
    A, B, C, D, T = 1, 2, 3, 4, 9
    g = nx.Graph()
    g.add_weighted_edges_from([(A, C, 0.9), (C, T, 0.9), (B, C, 0.9), (B, D, 0.5), (D, T, 0.8)])
    idx = build_index(g, {A: 0.9, B: 0.8})
    same = find_paths(idx, {T}, distinct_second=False)
    assert [p.nodes for p in same] == [(A, C, T), (B, C, T)]
    assert [p.score for p in same] == pytest.approx([0.729, 0.648])
    spread = find_paths(idx, {T}, distinct_second=True)
    assert [p.nodes for p in spread] == [(A, C, T), (B, D, T)]
    assert [p.score for p in spread] == pytest.approx([0.729, 0.32])
    # Without D there is no alternative, so the repeated second person is admitted.
    g.remove_node(D)
    idx = build_index(g, {A: 0.9, B: 0.8})
    assert [p.nodes for p in find_paths(idx, {T})] == [(A, C, T), (B, C, T)]


def test_ties_broken_by_node_id():
    # hand-computed: both routes score 0.5 * 0.5 = 0.25; the smaller id comes first.
    g = nx.Graph()
    g.add_weighted_edges_from([(7, 9, 0.5), (4, 9, 0.5)])
    idx = build_index(g, {7: 0.5, 4: 0.5})
    assert [p.nodes for p in find_paths(idx, {9})] == [(4, 9), (7, 9)]


# --------------------------------------------------------------------------- against networkx


@pytest.mark.parametrize("seed", range(12))
def test_best_path_matches_networkx_shortest_path(seed):
    g, warm = random_case(seed)
    idx = build_index(g, warm)
    for t in range(0, 18, 3):
        h = ego_graph(g, warm, {t})  # reference: nx.shortest_path (Dijkstra) on -ln(strength)
        try:
            ref = nx.shortest_path(h, YOU, t, weight="cost")
        except nx.NetworkXNoPath:
            assert find_paths(idx, {t}, max_intermediaries=None) == []
            continue
        got = find_paths(idx, {t}, k=1, max_intermediaries=None)
        assert got[0].score == pytest.approx(path_score(h, ref), rel=1e-9)
        check_path(got[0], idx, warm)


@pytest.mark.parametrize("seed", range(10))
def test_k_paths_match_yen_distinct_first(seed):
    g, warm = random_case(seed, n=14, m=26, n_warm=6)
    idx = build_index(g, warm)
    k = 4
    for t in (0, 5, 11):
        h = ego_graph(g, warm, {t})
        want: list[tuple[float, list[int]]] = []
        seen: set[int] = set()
        if nx.has_path(h, YOU, t):
            # reference: nx.shortest_simple_paths (Yen 1971), first path per first intermediary
            for p in nx.shortest_simple_paths(h, YOU, t, weight="cost"):
                if p[1] not in seen:
                    seen.add(p[1])
                    want.append((path_score(h, p), p[1:]))
                    if len(want) == k:
                        break
        got = find_paths(idx, {t}, k=k, max_intermediaries=None, distinct_second=False)
        assert_same(got, want)


@pytest.mark.parametrize("seed", range(10))
@pytest.mark.parametrize("hops", [1, 2, 3])
def test_hop_limit_matches_brute_force(seed, hops):
    g, warm = random_case(seed, ones=seed % 3 == 0)
    idx = build_index(g, warm)
    for t in (1, 8, 15):
        # reference: nx.all_simple_paths(cutoff=hops + 1), best per first intermediary
        want = best_per_first(brute_paths(g, warm, {t}, hops))[:5]
        got = find_paths(idx, {t}, k=5, max_intermediaries=hops, distinct_second=False)
        assert_same(got, want)
        for p in got:
            check_path(p, idx, warm, max_int=hops)


@pytest.mark.parametrize("seed", range(8))
def test_targets_avoid_and_min_strength_match_brute_force(seed):
    rng = random.Random(100 + seed)
    g, warm = random_case(seed, n=20, m=45, n_warm=9)
    idx = build_index(g, warm)
    for _ in range(4):
        targets = set(rng.sample(range(20), rng.randint(1, 4)))
        avoid = set(rng.sample(range(20), 2)) - targets
        ms = rng.choice([0.0, 0.2, 0.4])
        for hops in (1, 2, 3):
            # reference: nx.all_simple_paths, interiors free of targets, avoided and weak steps dropped
            want = best_per_first(brute_paths(g, warm, targets, hops, avoid, ms))[:6]
            got = find_paths(idx, targets, k=6, max_intermediaries=hops, avoid=avoid, min_strength=ms,
                             distinct_second=False)
            assert_same(got, want)
            for p in got:
                check_path(p, idx, warm, max_int=hops, avoid=avoid, min_strength=ms)
                assert p.target in targets and not set(p.nodes[:-1]) & targets


@pytest.mark.parametrize("seed", range(10))
@pytest.mark.parametrize("hops", [1, 2, 3, None])
def test_first_only_contacts_match_brute_force(seed, hops):
    # reference: nx.all_simple_paths, dropping paths with a first-only contact after the first step
    rng = random.Random(300 + seed)
    g, warm = random_case(seed, n=12, m=24, n_warm=7)
    idx = build_index(g, warm)
    first_only = set(rng.sample(sorted(warm), 3)) | {rng.randrange(12)}
    for t in (0, 6, 11):
        every = brute_paths(g, warm, {t}, 12 if hops is None else hops)
        allowed = [(s, p) for s, p in every if not set(p[1:-1]) & first_only]
        want = best_per_first(allowed)[:6]
        got = find_paths(idx, {t}, k=6, max_intermediaries=hops, distinct_second=False, first_only=first_only)
        assert_same(got, want)
        for p in got:
            check_path(p, idx, warm, max_int=hops)
            assert not set(p.nodes[1:-1]) & first_only


def greedy_distinct_second(paths, k):
    """The documented rule by brute force: best path with a new first and a new second person
    (or none), then, when none is left, best path with a new first person; result sorted."""
    paths = sorted(paths, key=lambda x: -x[0])
    chosen, firsts, seconds = [], set(), set()
    for strict in (True, False):
        while len(chosen) < k:
            pick = next(
                (
                    (s, p)
                    for s, p in paths
                    if p[0] not in firsts and (not strict or len(p) < 3 or p[1] not in seconds)
                ),
                None,
            )
            if pick is None:
                break
            chosen.append(pick)
            firsts.add(pick[1][0])
            if strict and len(pick[1]) >= 3:
                seconds.add(pick[1][1])
    return sorted(chosen, key=lambda x: -x[0])


@pytest.mark.parametrize("seed", range(12))
def test_distinct_second_greedy_matches_brute_force(seed):
    # With at most 2 intermediaries the rule is exact: compare with an exhaustive greedy.
    g, warm = random_case(seed, n=16, m=40, n_warm=8)
    idx = build_index(g, warm)
    for t in (2, 9, 13):
        want = greedy_distinct_second(brute_paths(g, warm, {t}, 2), 4)
        got = find_paths(idx, {t}, k=4, max_intermediaries=2, distinct_second=True)
        assert [p.score for p in got] == pytest.approx([s for s, _ in want], rel=1e-9)
        firsts = [p.first for p in got]
        assert len(set(firsts)) == len(firsts)


@pytest.mark.parametrize("hops", [None, 3])
def test_distinct_second_deeper_paths_are_valid(hops):
    for seed in range(10):
        g, warm = random_case(seed, n=25, m=60, n_warm=10, ones=True)
        idx = build_index(g, warm)
        got = find_paths(idx, {3, 17}, k=6, max_intermediaries=hops, distinct_second=True)
        assert len({p.first for p in got}) == len(got)
        assert [p.score for p in got] == sorted((p.score for p in got), reverse=True)
        for p in got:
            check_path(p, idx, warm, max_int=hops)


# --------------------------------------------------------------------------- rules


def chain_graph(with_3: bool = True):
    # you -0.9- A(1) -0.8- T1(10) -0.9- T2(11); you -0.7- B(2) -0.6- T2; optionally A -0.9- 3 -0.95- T2
    g = nx.Graph()
    g.add_weighted_edges_from([(1, 10, 0.8), (10, 11, 0.9), (2, 11, 0.6)])
    if with_3:
        g.add_weighted_edges_from([(1, 3, 0.9), (3, 11, 0.95)])
    return g, {1: 0.9, 2: 0.7}


def test_path_ends_at_first_target():
    g, warm = chain_graph(with_3=False)
    idx = build_index(g, warm)
    got = find_paths(idx, {10, 11}, max_intermediaries=3)
    # hand-computed: A stops at T1 (0.9 * 0.8 = 0.72), B reaches T2 (0.7 * 0.6 = 0.42)
    assert [p.nodes for p in got] == [(1, 10), (2, 11)]
    assert [p.score for p in got] == pytest.approx([0.72, 0.42])
    # Grouped by target, A's only way to T2 runs through T1, so T2 lists B alone.
    grouped = best_per_target(idx, {10, 11}, k=2, max_intermediaries=3)
    assert {t: [p.nodes for p in ps] for t, ps in grouped.items()} == {10: [(1, 10)], 11: [(2, 11)]}
    # Asked for T2 alone, the route through T1 is fine: 0.9 * 0.8 * 0.9 = 0.648.
    assert [p.nodes for p in find_paths(idx, {11}, max_intermediaries=3)] == [(1, 10, 11), (2, 11)]


def test_best_per_target_orders_by_score():
    g, warm = chain_graph()
    idx = build_index(g, warm)
    grouped = best_per_target(idx, {10, 11, 999}, k=2)  # 999 is not a contact: skipped
    # hand-computed: T1 via A 0.9 * 0.8 = 0.72; T2 via A-3 0.9 * 0.9 * 0.95 = 0.7695, via B 0.42
    assert list(grouped) == [11, 10]
    assert [p.nodes for p in grouped[11]] == [(1, 3, 11), (2, 11)]
    assert [p.score for p in grouped[11]] == pytest.approx([0.7695, 0.42])
    assert [p.nodes for p in grouped[10]] == [(1, 10)]  # B's way to T1 would run through T2


def test_avoid_and_min_strength_and_hop_limit():
    g, warm = chain_graph()
    idx = build_index(g, warm)
    # hand-computed: avoiding 3, A's route is 0.9 * 0.8 * 0.9 = 0.648 > B's 0.42
    assert [p.nodes for p in find_paths(idx, {11}, avoid={3})] == [(1, 10, 11), (2, 11)]
    assert find_paths(idx, {11}, avoid={3, 2, 10}) == []
    # B's step 0.6 is below 0.65; A's route via 3 has steps 0.9, 0.9, 0.95
    assert [p.nodes for p in find_paths(idx, {11}, min_strength=0.65)] == [(1, 3, 11)]
    # a step exactly at min_strength is kept (only steps *below* it are dropped)
    assert [p.nodes for p in find_paths(idx, {11}, min_strength=0.6)] == [(1, 3, 11), (2, 11)]
    assert [p.nodes for p in find_paths(idx, {11}, max_intermediaries=1)] == [(2, 11)]
    assert find_paths(idx, {11}, min_strength=0.96) == []  # every warmth is below it
    assert find_paths(idx, {11}, avoid={11}) == []


def test_distinct_first_intermediaries():
    g, warm = random_case(3, n=40, m=160, n_warm=15)
    idx = build_index(g, warm)
    got = find_paths(idx, {0}, k=10, max_intermediaries=3)
    assert len(got) == 10
    assert len({p.first for p in got}) == 10


def test_no_path_gives_empty_list():
    g = nx.Graph()
    g.add_weighted_edges_from([(1, 2, 0.5), (3, 4, 0.5)])
    idx = build_index(g, {1: 0.8})
    assert find_paths(idx, {4}) == []
    assert find_paths(idx, {12345}) == []
    assert find_paths(idx, set()) == []
    assert find_paths(idx, {2}, k=0) == []
    assert best_per_target(idx, {4}) == {4: []}


def test_direct_warm_tie_still_gets_intro_paths():
    g = nx.Graph()
    g.add_weighted_edges_from([(1, 5, 0.7)])
    idx = build_index(g, {1: 0.9, 5: 0.3})
    got = find_paths(idx, {5})
    assert [p.nodes for p in got] == [(1, 5)]  # never the direct tie itself
    assert direct_route(idx, 5) == 0.3
    assert direct_route(idx, 1) == 0.9
    assert direct_route(idx, 2) is None


def test_strength_one_ties_are_edges():
    # Cost -ln(1) = 0 must still count as a tie (not as a missing entry).
    g = nx.Graph()
    g.add_weighted_edges_from([(1, 2, 1.0), (2, 3, 1.0), (3, 4, 0.5)])
    idx = build_index(g, {1: 1.0})
    for hops in (None, 3):
        got = find_paths(idx, {4}, max_intermediaries=hops)
        assert [p.nodes for p in got] == [(1, 2, 3, 4)]
        assert got[0].score == 0.5
    assert find_paths(idx, {4}, max_intermediaries=2) == []


def test_invalid_input():
    g = nx.Graph()
    g.add_edge(1, 2, weight=1.5)
    with pytest.raises(ValueError, match=r"\(0, 1\]"):
        build_index(g, {})
    g = nx.Graph()
    g.add_edge(1, 2)
    with pytest.raises(ValueError, match="weight"):
        build_index(g, {})
    g.edges[1, 2]["weight"] = 0.5
    with pytest.raises(ValueError, match="warmth"):
        build_index(g, {1: 2.0})
    idx = build_index(g, {1: 0.5})
    with pytest.raises(ValueError):
        find_paths(idx, {2}, k=-1)
    with pytest.raises(ValueError):
        find_paths(idx, {2}, max_intermediaries=0)


def test_index_from_arrays_matches_graph():
    g, warm = random_case(5, n=30, m=70, n_warm=10)
    a = build_index(g, warm)
    edges = list(g.edges(data="weight"))
    b = PathIndex(list(g.nodes), [u for u, _, _ in edges], [v for _, v, _ in edges], [s for _, _, s in edges], warm)
    assert (a.costs != b.costs).nnz == 0
    for t in (0, 7):
        assert find_paths(a, {t}) == find_paths(b, {t})
