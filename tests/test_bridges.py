"""Bridges: neighbourhood overlap, local bridges, links between groups, single points of access."""

from __future__ import annotations

import math
import random

import networkx as nx
import pytest

from mynet.analysis import bridges_sparse
from mynet.analysis.bridges import (
    EGO,
    group_bridges,
    group_links,
    local_bridges,
    neighbourhood_overlap,
    single_points_of_access,
)
from mynet.analysis.groups import detect_groups


def random_graphs(count: int, max_n: int = 40):
    for seed in range(count):
        rnd = random.Random(seed)
        n = rnd.randint(2, max_n)
        G = nx.gnm_random_graph(n, rnd.randint(0, 3 * n), seed=seed)
        G = nx.relabel_nodes(G, {v: v + 1 for v in G})  # contact ids start at 1
        for _, _, d in G.edges(data=True):
            d["weight"] = rnd.uniform(0.05, 1.0)
        yield seed, G


def direct_overlap(G: nx.Graph) -> dict:
    """Onnela et al. (2007), PNAS 104(18): O_ij = |N(i) & N(j)| / (|N(i) | N(j)| - 2), 0 if undefined."""
    out = {}
    for u, v in G.edges():
        a, b = min(u, v), max(u, v)
        nu, nv = set(G[a]) - {a}, set(G[b]) - {b}
        den = len(nu | nv) - 2
        out[(a, b)] = len(nu & nv) / den if den > 0 else 0.0
    return out


def hand_graph() -> nx.Graph:
    """Two triangles {1,2,3} and {4,5,6} joined by 3-4, a detour 2-7-5, a leaf 9 on 1.

        9 - 1 - 2 - 7
             \\ |    \\
               3 --- 4 - 5     (4-5-6 a triangle, 5-7 the detour's end)
    """
    G = nx.Graph()
    G.add_weighted_edges_from(
        [(1, 2, 0.9), (2, 3, 0.9), (1, 3, 0.9), (4, 5, 0.8), (5, 6, 0.8), (4, 6, 0.8)]
        + [(3, 4, 0.5), (2, 7, 0.3), (7, 5, 0.3), (1, 9, 0.6)]
    )
    return G


# --- Neighbourhood overlap ---------------------------------------------------


def test_overlap_hand_example():
    G = hand_graph()
    ov = neighbourhood_overlap(G)
    # Hand-computed with Onnela et al. (2007): tie 1-2, N(1) = {2,3,9}, N(2) = {1,3,7}:
    # common {3}, union minus the two ends = {3, 7, 9} -> 1/3.
    assert ov[(1, 2)] == pytest.approx(1 / 3)
    # Tie 4-5, N(4) = {3,5,6}, N(5) = {4,6,7}: common {6}, others {3, 6, 7} -> 1/3.
    assert ov[(4, 5)] == pytest.approx(1 / 3)
    # Tie 5-6: N(6) = {4,5}; common {4}, others {4, 7} -> 1/2.
    assert ov[(5, 6)] == pytest.approx(1 / 2)
    # Local bridges have overlap 0; the leaf tie 1-9 has overlap 0 too.
    assert ov[(3, 4)] == ov[(2, 7)] == ov[(1, 9)] == 0.0
    assert len(ov) == G.number_of_edges()
    # An isolated tie: denominator 0 -> 0.
    assert neighbourhood_overlap(nx.Graph([(5, 8)])) == {(5, 8): 0.0}


def test_overlap_matches_direct_computation():
    for seed, G in random_graphs(80):
        got = neighbourhood_overlap(G)
        want = direct_overlap(G)
        assert got.keys() == want.keys(), seed
        for k in want:
            assert got[k] == pytest.approx(want[k], abs=1e-12), (seed, k)


def test_overlap_blocks_give_the_same_answer(monkeypatch):
    # Force many small row blocks of A @ A (and of the span checks).
    G = nx.relabel_nodes(nx.gnm_random_graph(120, 600, seed=4), lambda v: v + 1)
    whole = neighbourhood_overlap(G)
    spans = local_bridges(G)
    monkeypatch.setattr(bridges_sparse, "_BLOCK_NNZ", 40)
    assert neighbourhood_overlap(G) == whole
    assert local_bridges(G) == spans


def test_overlap_ignores_self_loops_and_insertion_order():
    G = hand_graph()
    H = nx.Graph()
    H.add_edges_from(reversed([(v, u, d) for u, v, d in G.edges(data=True)]))
    H.add_edge(3, 3, weight=1.0)
    assert neighbourhood_overlap(H) == neighbourhood_overlap(G)


# --- Local bridges -------------------------------------------------------------


def test_local_bridges_hand_computed():
    # By hand: 3-4 has no common neighbour and, without it, 3-2-7-5-4 (4 hops);
    # 2-7 and 7-5 likewise (2-3-4-5-7 and 7-2-3-4-5); 1-9 is a leaf tie (inf).
    assert local_bridges(hand_graph()) == {(3, 4): 4.0, (2, 7): 4.0, (5, 7): 4.0, (1, 9): math.inf}


def test_local_bridges_cycle():
    # networkx docs example for local_bridges: every tie of a 9-cycle is a
    # local bridge of span 8.
    G = nx.relabel_nodes(nx.cycle_graph(9), lambda v: v + 1)
    assert local_bridges(G) == {(min(u, v), max(u, v)): 8.0 for u, v in G.edges()}


def test_local_bridges_match_networkx():
    # networkx.local_bridges(G, with_span=True) with its default weight=None
    # counts hops, whatever the edge weights: our answer must be the same.
    for seed, G in random_graphs(150):
        want = {(min(u, v), max(u, v)): float(s) for u, v, s in nx.local_bridges(G, with_span=True)}
        assert local_bridges(G) == want, seed


def test_networkx_weighted_span_adds_weights():
    # What networkx does with weight="weight": detection ignores weights, but
    # the span becomes the sum of the attribute along the detour, a distance.
    # Tie strengths are not distances, so local_bridges never does this.
    G = hand_graph()
    weighted = {(min(u, v), max(u, v)): s for u, v, s in nx.local_bridges(G, with_span=True, weight="weight")}
    assert set(weighted) == set(local_bridges(G))
    assert weighted[(3, 4)] == pytest.approx(0.9 + 0.3 + 0.3 + 0.8)  # 3-2-7-5-4


# --- Groups: bridges and links ------------------------------------------------


GROUPS = {0: {1, 2, 3}, 1: {4, 5, 6}}


def test_group_bridges_hand_graph():
    # Only 3-4 joins the two groups (7 and 9 are unclustered).
    rows = group_bridges(hand_graph(), GROUPS)
    assert rows == [
        {
            "a": 3,
            "b": 4,
            "groups": (0, 1),
            "strength": 0.5,
            "overlap": 0.0,
            "local_bridge": True,
            "span": 4.0,
            "ties_between": 1,
            "score": 1.0,  # 0.5 / 1 tie * 2 for a local bridge
        }
    ]


def test_group_bridges_ranking():
    # Groups A = {1..4} (a clique) and B = {5..8} (a clique), C = {9, 10, 11}.
    G = nx.Graph()
    for block in ([1, 2, 3, 4], [5, 6, 7, 8], [9, 10, 11]):
        G.add_weighted_edges_from((u, v, 1.0) for i, u in enumerate(block) for v in block[i + 1 :])
    # A-B: three ties; 1-5 and 2-5 share neighbours, 4-8 is a local bridge.
    G.add_weighted_edges_from([(1, 5, 0.9), (2, 5, 0.4), (4, 8, 0.3)])
    # B-C: one weak tie, the only one.
    G.add_weighted_edges_from([(7, 9, 0.2)])
    groups = {0: {1, 2, 3, 4}, 1: {5, 6, 7, 8}, 2: {9, 10, 11}}
    rows = group_bridges(G, groups)
    assert [(r["a"], r["b"]) for r in rows] == [(7, 9), (1, 5), (4, 8), (2, 5)]
    by = {(r["a"], r["b"]): r for r in rows}
    assert by[(7, 9)]["score"] == pytest.approx(0.2 * 2)  # sole tie, local bridge
    assert by[(1, 5)]["score"] == pytest.approx(0.9 / 3)
    assert by[(4, 8)]["score"] == pytest.approx(0.3 / 3 * 2) and by[(4, 8)]["span"] == 3.0
    assert by[(2, 5)]["local_bridge"] is False and by[(2, 5)]["span"] is None
    assert by[(1, 5)]["overlap"] == pytest.approx(direct_overlap(G)[(1, 5)])
    assert by[(7, 9)]["groups"] == (1, 2)
    # Any int ids work (stable ids from match_groups need not start at 0).
    renamed = group_bridges(G, {40: groups[0], -3: groups[1], 7: groups[2]})
    assert [(r["a"], r["b"], r["groups"])
            for r in renamed] == [(7, 9, (-3, 7)), (1, 5, (40, -3)), (4, 8, (40, -3)), (2, 5, (40, -3))]


def test_group_bridges_accepts_a_group_result():
    G = nx.les_miserables_graph()
    G = nx.relabel_nodes(G, {v: k + 1 for k, v in enumerate(sorted(G))})
    res = detect_groups(G)
    rows = group_bridges(G, res)
    assert rows and rows == group_bridges(G, res.as_sets())
    for r in rows:
        ga, gb = res.membership[r["a"]], res.membership[r["b"]]
        assert r["groups"] == (ga, gb) and ga != gb
    assert [r["score"] for r in rows] == sorted((r["score"] for r in rows), reverse=True)


def test_group_bridges_limit_gives_the_head_of_the_full_list():
    # With a limit, spans are computed for the returned ties only (3-hop
    # paths counted per tie rather than per row block): same answer.
    for seed, G in random_graphs(40, max_n=60):
        nodes = sorted(G)
        groups = {k: set(nodes[k::3]) for k in range(3)}
        full = group_bridges(G, groups)
        for k in (0, 1, 5, len(full) + 3):
            assert group_bridges(G, groups, limit=k) == full[:k], (seed, k)


def test_three_hop_counts_agree():
    from mynet.analysis.groups import edge_arrays

    for seed, G in random_graphs(40, max_n=60):
        nodes, lo, hi, _ = edge_arrays(G, weight=None)
        A = bridges_sparse.adjacency_matrix(len(nodes), lo, hi)
        _, common, paths3 = bridges_sparse.common_neighbours(A, lo, hi, squares=True)
        bare = common == 0
        rows = bridges_sparse.paths3_rows(A, lo[bare], hi[bare])
        assert rows.tolist() == paths3[bare].tolist(), seed


def test_group_links_hand_graph():
    G = hand_graph()
    G.add_edge(2, 6, weight=0.25)
    links = group_links(G, GROUPS)
    assert list(links) == [(0, 1)]
    rec = links[(0, 1)]
    assert rec["ties"] == 2
    assert rec["strength"] == pytest.approx(0.75)
    assert rec["density"] == pytest.approx(2 / 9)
    assert rec["carriers"] == ([2, 3], [4, 6])
    # Orientation follows the pair (g < h) even when a tie is stored the other way.
    assert group_links(G, {0: {4, 5, 6}, 1: {1, 2, 3}})[(0, 1)]["carriers"] == ([4, 6], [2, 3])


def test_group_links_match_a_plain_loop():
    G = nx.les_miserables_graph()
    G = nx.relabel_nodes(G, {v: k + 1 for k, v in enumerate(sorted(G))})
    res = detect_groups(G, seed=0)
    want: dict = {}
    for u, v, w in G.edges(data="weight"):
        g, h = res.membership[u], res.membership[v]
        if g is None or h is None or g == h:
            continue
        if g > h:
            g, h, u, v = h, g, v, u
        rec = want.setdefault((g, h), {"ties": 0, "strength": 0.0, "carriers": (set(), set())})
        rec["ties"] += 1
        rec["strength"] += w
        rec["carriers"][0].add(u)
        rec["carriers"][1].add(v)
    got = group_links(G, res)
    assert list(got) == sorted(want)
    for key, rec in want.items():
        g, h = key
        assert got[key]["ties"] == rec["ties"]
        assert got[key]["strength"] == pytest.approx(rec["strength"])
        assert got[key]["density"] == pytest.approx(rec["ties"] / (len(res.groups[g]) * len(res.groups[h])))
        assert got[key]["carriers"] == tuple(sorted(c) for c in rec["carriers"])


def test_groups_must_be_disjoint():
    with pytest.raises(ValueError, match="two groups"):
        group_links(hand_graph(), {0: {1, 2}, 1: {2, 3}})


# --- Single points of access -----------------------------------------------------


def joined_triangles() -> nx.Graph:
    """Triangles {1,2,3} and {5,6,7}; contact 4 alone joins them (3 - 4 - 5)."""
    G = nx.Graph()
    G.add_edges_from([(1, 2), (2, 3), (1, 3), (5, 6), (6, 7), (5, 7), (3, 4), (4, 5)])
    return G


TRIANGLES = {0: {1, 2, 3}, 1: {5, 6, 7}}


def test_single_points_without_ego():
    # By hand: 4 is the only outside contact of each triangle; 3 and 5 are the
    # only members with ties out of their triangle.
    got = single_points_of_access(joined_triangles(), TRIANGLES)
    assert got == [
        {"person": 4, "member_of": None, "groups": [0, 1], "cut_off": [1, 2, 3, 5, 6, 7]},
        {"person": 3, "member_of": 0, "groups": [0], "cut_off": [1, 2]},
        {"person": 5, "member_of": 1, "groups": [1], "cut_off": [6, 7]},
    ]


def test_single_points_with_ego():
    G = joined_triangles()
    # You know 1 only: everyone hangs on 1, then on 3, 4, 5 in turn (by hand).
    got = single_points_of_access(G, TRIANGLES, ego_ties={1: 0.8})
    assert got == [
        {"person": 1, "member_of": 0, "groups": [0, 1], "cut_off": [2, 3, 4, 5, 6, 7]},
        {"person": 3, "member_of": 0, "groups": [1], "cut_off": [4, 5, 6, 7]},
        {"person": 4, "member_of": None, "groups": [1], "cut_off": [5, 6, 7]},
        {"person": 5, "member_of": 1, "groups": [1], "cut_off": [6, 7]},
    ]
    # You also know 6: a cycle you - 1 - 3 - 4 - 5 - 6 - you; nobody is a single point.
    assert single_points_of_access(G, TRIANGLES, ego_ties={1: 0.8, 6: 0.5}) == []
    # A warmth of 0 is no tie.
    assert single_points_of_access(G, TRIANGLES, ego_ties={1: 0.8, 6: 0.0}) == got


def test_single_member_gateway_of_a_group():
    # Group 0's ties out (to 10 and to 11) all leave from its member 2; by the
    # same token 2 is the only outside contact of group 1, so 2 alone gives
    # access to both (by hand).
    G = nx.Graph([(1, 2), (2, 3), (1, 3), (2, 10), (2, 11), (10, 11), (11, 12), (10, 12)])
    got = single_points_of_access(G, {0: {1, 2, 3}, 1: {10, 11, 12}})
    assert got == [{"person": 2, "member_of": 0, "groups": [0, 1], "cut_off": [1, 3, 10, 11, 12]}]
    # With 12 also tied to 20, who knows 21 and 22, group 1 has a second way
    # out; 2 remains the single point of group 0 only.
    G.add_edges_from([(12, 20), (20, 21), (21, 22), (20, 22)])
    got = single_points_of_access(G, {0: {1, 2, 3}, 1: {10, 11, 12}, 2: {20, 21, 22}})
    assert {"person": 2, "member_of": 0, "groups": [0], "cut_off": [1, 3]} in got


def test_ego_id_is_reserved():
    G = nx.Graph([(0, 1), (1, 2)])
    with pytest.raises(ValueError, match="stands for you"):
        single_points_of_access(G, {}, ego_ties={1: 1.0})


def brute_cut_from_ego(G: nx.Graph, ego_ties: dict) -> dict:
    H = G.copy()
    H.add_node(EGO)
    H.add_edges_from((EGO, v) for v, w in ego_ties.items() if w > 0)
    reach = nx.node_connected_component(H, EGO)
    out = {}
    for p in nx.articulation_points(H):
        if p == EGO:
            continue
        K = H.copy()
        K.remove_node(p)
        cut = reach - nx.node_connected_component(K, EGO) - {p}
        if cut:
            out[p] = cut
    return out


def brute_cut_from_largest(G: nx.Graph) -> dict:
    out = {}
    for p in nx.articulation_points(G):
        rest = nx.node_connected_component(G, p) - {p}
        parts = sorted(nx.connected_components(G.subgraph(rest)), key=lambda c: (-len(c), min(c)))
        cut = set().union(*parts[1:])
        if cut:
            out[p] = cut
    return out


def test_cut_off_sets_match_brute_force():
    # Brute force: remove each articulation point (networkx.articulation_points)
    # and search again. No groups, so only the articulation check speaks.
    for seed, G in random_graphs(120):
        rnd = random.Random(seed)
        ego = {v: rnd.choice([0.0, 0.4, 1.0]) for v in rnd.sample(sorted(G), min(3, len(G)))}
        got = {e["person"]: set(e["cut_off"]) for e in single_points_of_access(G, {}, ego_ties=ego)}
        assert got == brute_cut_from_ego(G, ego), seed
        got = {e["person"]: set(e["cut_off"]) for e in single_points_of_access(G, {})}
        assert got == brute_cut_from_largest(G), seed
