"""Network-level structure (mynet.analysis.structure) against networkx and hand-computed values."""

from __future__ import annotations

import itertools
import math

import networkx as nx
import numpy as np
import pytest

from mynet.analysis.structure import (
    attribute_assortativity,
    average_path_length,
    degree_assortativity,
    ei_index,
    network_ei_index,
    network_summary,
    small_world,
)


@pytest.fixture
def karate() -> tuple[nx.Graph, dict]:
    # Zachary's karate club (Zachary 1977), as shipped by networkx, with the recorded 'club' factions.
    G = nx.karate_club_graph()
    return G, {v: G.nodes[v]["club"] for v in G}


def test_summary_of_karate_matches_networkx(karate):
    G, clubs = karate
    s = network_summary(G, clubs, seed=1)
    assert (s["nodes"], s["ties"], s["components"], s["largest_component"]) == (34, 78, 1, 34)
    assert s["density"] == pytest.approx(nx.density(G))
    assert s["average_clustering"] == pytest.approx(nx.average_clustering(G))
    assert s["average_path_length"] == pytest.approx(nx.average_shortest_path_length(G))
    assert s["path_length_sampled"] is False
    assert s["degree_assortativity"] == pytest.approx(nx.degree_assortativity_coefficient(G))
    assert s["homophily"]["group"] == pytest.approx(nx.attribute_assortativity_coefficient(G, "club"))
    assert s["groups"] == 2 and s["unclustered"] == 0
    sw = s["small_world"]
    assert set(sw) >= {"C", "L", "C_random", "L_random", "sigma"}
    assert sw["sigma"] == pytest.approx((sw["C"] / sw["C_random"]) / (sw["L"] / sw["L_random"]))


def test_karate_factions_look_inward(karate):
    # Zachary 1977: the club split along the lines of friendship, so the recorded factions should
    # hold most of their members' ties inside: E-I index < 0 for both (Krackhardt & Stern 1988).
    # Checked by counting: of the 78 ties, 67 lie inside a faction (35 Mr. Hi, 32 Officer) and 11
    # cross, so E-I = (11 - 35)/46 for Mr. Hi, (11 - 32)/43 for Officer and (11 - 67)/78 overall.
    G, clubs = karate
    ei = ei_index(G, clubs)
    assert ei["Mr. Hi"] < 0 and ei["Officer"] < 0
    assert ei["Mr. Hi"] == pytest.approx((11 - 35) / 46)
    assert ei["Officer"] == pytest.approx((11 - 32) / 43)
    assert network_ei_index(G, clubs) == pytest.approx((11 - 67) / 78)


def test_ei_index_hand_computed():
    G = nx.Graph([(1, 2), (1, 3), (1, 4), (2, 3), (1, 5), (5, 6), (5, 7), (6, 7), (4, 6), (7, 8)])
    nx.set_edge_attributes(G, 0.5, "weight")
    G[1][5]["weight"] = 1.0
    groups = {1: "A", 2: "A", 3: "A", 4: "A", 5: "B", 6: "B", 7: "B", 8: None}
    ei = ei_index(G, groups)
    # Hand-computed: A has I = 4 (1-2, 1-3, 1-4, 2-3), E = 2 (1-5, 4-6) -> (2 - 4)/6 = -1/3.
    # B has I = 3 (5-6, 5-7, 6-7), E = 3 (1-5, 4-6, and 7-8 to the unclustered 8) -> 0.
    assert ei == {"A": pytest.approx(-1 / 3), "B": pytest.approx(0.0)}
    # Whole network: 7 internal, 3 external of 10 ties -> (3 - 7)/10 = -0.4.
    assert network_ei_index(G, groups) == pytest.approx(-0.4)
    # Weighted: A has I = 4 x 0.5 = 2, E = 1.0 + 0.5 = 1.5 -> -0.5/3.5 = -1/7.
    assert ei_index(G, groups, weight="weight")["A"] == pytest.approx(-1 / 7)
    # A group with no ties is undefined.
    G.add_node(9)
    assert math.isnan(ei_index(G, {**groups, 9: "C"})["C"])


def test_components_and_path_length_on_the_largest():
    G = nx.path_graph(6)  # largest component: 6 nodes
    G.add_edges_from([(10, 11), (11, 12)])
    G.add_node(20)
    s = network_summary(G)
    assert (s["components"], s["largest_component"]) == (3, 6)
    assert s["average_path_length"] == pytest.approx(nx.average_shortest_path_length(nx.path_graph(6)))
    assert s["density"] == pytest.approx(nx.density(G))


def test_sampled_path_length_is_close_to_exact():
    G = nx.connected_watts_strogatz_graph(1000, 8, 0.1, seed=3)
    exact = average_path_length(G, path_samples=2000)
    est = average_path_length(G, path_samples=200, seed=5)
    assert exact["sampled"] is False and exact["length"] == pytest.approx(nx.average_shortest_path_length(G))
    assert est["sampled"] is True and est["sources"] == 200
    assert est["length"] == pytest.approx(exact["length"], rel=0.02)


def test_small_world_on_a_watts_strogatz_graph():
    # Watts & Strogatz 1998: a ring lattice with a few rewired ties keeps the lattice's clustering
    # but gets the random graph's short paths, so sigma = (C/C_r)/(L/L_r) is well above 1.
    G = nx.connected_watts_strogatz_graph(1000, 10, 0.05, seed=11)
    sw = small_world(G, seed=11)
    assert sw["C"] > 10 * sw["C_random"]
    assert sw["L"] < 2 * sw["L_random"]
    assert sw["sigma"] > 1  # measured about 36
    assert sw["sigma_low"] > 1 and sw["verdict"] == "small world"  # every one of the random graphs agrees


def test_sigma_is_averaged_over_an_ensemble_of_random_graphs():
    # Florentine families (Padgett & Ansell 1993, shipped by networkx): with one random graph, sigma
    # ranged from 0.35 to 4.0 over seeds 0-29 (median 0.85; seed 0 gave 2.62, enough to call it a small
    # world). Averaged over 20 G(n, m) graphs (Humphries & Gurney 2008) it stays near 1 at every seed
    # (measured 0.87-1.42), and the spread over the single graphs straddles 1: no verdict either way.
    G = nx.florentine_families_graph()
    runs = [small_world(G, seed=s) for s in range(30)]
    assert all(r["ensemble"] == 20 for r in runs)
    sigmas = [r["sigma"] for r in runs]
    assert 0.75 <= min(sigmas) and max(sigmas) <= 1.6
    assert {r["verdict"] for r in runs} == {"unclear"}
    assert all(r["sigma_low"] < 1 < r["sigma_high"] for r in runs)
    r = runs[0]
    assert r["sigma"] == pytest.approx((r["C"] / r["C_random"]) / (r["L"] / r["L_random"]))


def test_audit_words_claim_a_small_world_only_when_the_whole_range_does():
    from mynet.analysis.audit import small_world_words

    base = {"sigma": 2.6, "ensemble": 20}
    assert small_world_words(base | {"sigma_low": 1.2, "sigma_high": 3.5,
                                     "verdict": "small world"}).startswith("a small world")
    unclear = small_world_words(base | {"sigma_low": 0.6, "sigma_high": None, "verdict": "unclear"})
    assert unclear.startswith("too close to a random network") and "from 0.6 upwards over 20" in unclear
    assert small_world_words(base | {"sigma_low": 0.3, "sigma_high": 0.9,
                                     "verdict": "not a small world"}).startswith("not a")


def test_small_world_of_a_random_graph_is_about_one():
    # A G(n, m) graph compared with another G(n, m) graph: sigma should be 1 up to sampling noise.
    # Tolerance: over 30 seeds at n = 2000, m = 20000 we measured sigma from 0.929 to 1.094
    # (mean 1.017, sd 0.039), so |sigma - 1| < 0.15 is about 3.5 sd.
    G = nx.gnm_random_graph(2000, 20000, seed=21)
    sw = small_world(G, seed=22)
    assert abs(sw["sigma"] - 1) < 0.15
    # This graph's clustering happens to lie above all 20 random graphs' (sigma 1.06, measured), which a
    # random graph does about 1 time in 21: the verdict is a test at about that level. Of 100 other random
    # graphs (120 nodes, 480 ties) it called 6 a small world (measured), 3 of the 20 below.
    calls = [small_world(nx.gnm_random_graph(120, 480, seed=s), seed=s + 100)["verdict"] for s in range(20)]
    assert calls.count("small world") <= 3
    assert sw["C_random"] == pytest.approx(20 / 2000, rel=0.3)  # the analytic k/n, as a sanity check


def test_random_reference_graph_is_a_gnm_graph():
    from mynet.analysis.structure import random_gnm

    for n, m in ((50, 1000), (300, 900), (1000, 20000)):  # dense (over half the pairs) and sparse
        R = random_gnm(n, m, np.random.default_rng(n))
        keys = R.src * n + R.dst
        assert len(R.src) == m and len(np.unique(keys)) == m and np.all(R.src < R.dst)
    # Every pair equally likely: over many draws of G(6, 3) each of the 15 pairs appears ~ 3/15 of the time.
    counts = np.zeros(15)
    rng = np.random.default_rng(0)
    a, b = np.triu_indices(6, k=1)
    index = {(int(i), int(j)): k for k, (i, j) in enumerate(zip(a, b))}
    for _ in range(3000):
        R = random_gnm(6, 3, rng)
        for i, j in zip(R.src.tolist(), R.dst.tolist()):
            counts[index[(i, j)]] += 1
    assert np.allclose(counts / 3000, 0.2, atol=0.03)


def test_homophily_leaves_out_nodes_without_the_attribute():
    G = nx.gnm_random_graph(200, 900, seed=8)
    rng = np.random.default_rng(8)
    orgs = {v: f"org{int(rng.integers(4))}.example" for v in G if rng.random() < 0.8}
    # Make ties favour the same organisation so r is clearly positive.
    by_org: dict[str, list[int]] = {}
    for v, o in sorted(orgs.items()):
        by_org.setdefault(o, []).append(v)
    for members in by_org.values():
        G.add_edges_from(itertools.pairwise(members))
    H = G.subgraph(orgs).copy()
    nx.set_node_attributes(H, orgs, "organisation")
    ref = nx.attribute_assortativity_coefficient(H, "organisation")
    assert attribute_assortativity(G, orgs) == pytest.approx(ref)
    s = network_summary(G, attrs={"organisation": orgs, "tag": {v: "x" for v in G}})
    assert s["homophily"]["organisation"] == pytest.approx(ref) and ref > 0
    assert math.isnan(s["homophily"]["tag"])  # one category only: undefined


def test_degree_assortativity_matches_networkx():
    for seed in range(3):
        G = nx.barabasi_albert_graph(300, 3, seed=seed)
        assert degree_assortativity(G) == pytest.approx(nx.degree_assortativity_coefficient(G))


def test_summary_is_deterministic_for_a_seed():
    G = nx.connected_watts_strogatz_graph(800, 6, 0.1, seed=2)
    a = network_summary(G, seed=4, path_samples=100)
    b = network_summary(G, seed=4, path_samples=100)
    assert a == b and a["path_length_sampled"] is True and a["path_sources"] == 100
