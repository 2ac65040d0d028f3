"""Tie inference: co-occurrence products, the strength model, decisions, backbone."""

from __future__ import annotations

import math

import networkx as nx
import numpy as np
import pytest
from networkx.algorithms import bipartite

from mynet.evidence.ties import TieModel, cooccurrence, disparity_filter, incidence, infer_ties
from mynet.model import Contact, Interaction

ME = {"you@example.org"}


def person(i, name, orgs=(), past=(), emails=None, tags=()):
    return Contact(id=i, name=name, emails=emails if emails is not None else [f"p{i}@mail{i}.example"],
                   orgs=list(orgs), past_orgs=list(past), tags=list(tags))


def meeting(k, people, when="2026-01-10T10:00:00+00:00", bulk=False):
    return Interaction(kind="meeting", source="cal.ics", index=k, line=k + 1, when=when, key=f"e{k}",
                       participants=sorted(people), bulk=bulk)


def row(t, a, b):
    idx = np.nonzero((t.a == min(a, b)) & (t.b == max(a, b)))[0]
    return int(idx[0]) if idx.size else None


def test_projection_matches_networkx_on_davis():
    # Davis Southern Women (Davis, Gardner & Gardner 1941), shipped with networkx: our sparse
    # products must equal networkx's weighted_projected_graph (shared-event counts) and
    # collaboration_weighted_projected_graph (Newman 2001 weights).
    G = nx.davis_southern_women_graph()
    women, events = sorted(G.graph["top"]), sorted(G.graph["bottom"])
    idx = {w: i for i, w in enumerate(women)}
    groups = [sorted(idx[w] for w in G[e]) for e in events]
    B = incidence(groups, len(women))
    counts = cooccurrence(B)
    newman = cooccurrence(B, 1.0 / (np.array([len(g) for g in groups]) - 1))
    P = bipartite.weighted_projected_graph(G, women)
    Q = bipartite.collaboration_weighted_projected_graph(G, women)
    assert counts.nnz == P.number_of_edges() and newman.nnz == Q.number_of_edges()
    for i, j, v in zip(counts.row, counts.col, counts.data):
        assert P[women[i]][women[j]]["weight"] == v
    for i, j, v in zip(newman.row, newman.col, newman.data):
        assert Q[women[i]][women[j]]["weight"] == pytest.approx(v)


def test_meeting_strength_follows_newman_weights():
    cs = [person(1, "A"), person(2, "B"), person(3, "C")]
    evs = [meeting(0, ["p1@mail1.example", "p2@mail2.example"]),  # a pair meeting: weight 1
           meeting(1, ["p1@mail1.example", "p2@mail2.example", "p3@mail3.example", "you@example.org"])]  # 1/3 each
    t = infer_ties(cs, evs, ME)
    m = TieModel()
    i = row(t, 1, 2)
    assert t.counts["meeting"][i] == 2
    assert t.parts["meeting"][i] == pytest.approx(1 + 1 / 3)
    assert t.strength[i] == pytest.approx(1 - math.exp(-(4 / 3) / m.meeting_scale))
    assert t.strength[row(t, 1, 3)] == pytest.approx(1 - math.exp(-(1 / 3) / m.meeting_scale))


def test_broadcast_event_creates_no_tie():
    cs = [person(i, f"P{i}") for i in range(1, 101)]
    allhands = meeting(0, [c.emails[0] for c in cs] + ["you@example.org"])
    t = infer_ties(cs, [allhands], ME)
    assert len(t) == 0
    small = TieModel(broadcast_cap=200)
    t = infer_ties(cs, [allhands], ME, small)
    assert len(t) == 100 * 99 // 2 and t.strength.max() < 0.01


def test_strength_is_monotone_and_multiplex():
    base = [person(1, "A", ["Quillon Labs"]), person(2, "B", ["Quillon Labs Inc."])]
    t0 = infer_ties(base, [], ME)
    one = infer_ties(base, [meeting(0, ["p1@mail1.example", "p2@mail2.example", "you@example.org"])], ME)
    two = infer_ties(base, [meeting(k, ["p1@mail1.example", "p2@mail2.example", "you@example.org"]) for k in range(2)],
                     ME)
    s0, s1, s2 = t0.strength[0], one.strength[0], two.strength[0]
    assert 0 < s0 < s1 < s2 < 1
    # Two kinds combine as a noisy-OR: 1 - (1 - s_org)(1 - s_meet).
    only_meet = infer_ties([person(1, "A"), person(2, "B")],
                           [meeting(0, ["p1@mail1.example", "p2@mail2.example", "you@example.org"])], ME)
    assert s1 == pytest.approx(1 - (1 - s0) * (1 - only_meet.strength[0]))


def test_large_organisations_weigh_less():
    small = [person(i, f"S{i}", ["Tiny Co"]) for i in range(1, 5)]
    big = [person(i, f"B{i}", ["Huge Corp"]) for i in range(10, 110)]
    t = infer_ties(small + big, [], ME)
    big_pairs = t.strength[t.a >= 10]  # (each person keeps their best ten links there: see test_assumed_evidence)
    assert big_pairs.size and t.strength[row(t, 1, 2)] > big_pairs.max() > 0
    capped = infer_ties(big, [], ME, TieModel(group_cap=50))
    assert len(capped) == 0


def test_past_organisation_is_weaker_than_current():
    cs = [person(1, "A", ["Quillon Labs"]), person(2, "B", ["Quillon Labs"]), person(3, "C", [], ["Quillon Labs"])]
    t = infer_ties(cs, [], ME)
    assert t.strength[row(t, 1, 2)] > t.strength[row(t, 1, 3)] > 0


def test_domain_counts_only_without_org_and_webmail_never():
    cs = [person(1, "A", emails=["a@velvane.example"]), person(2, "B", emails=["b@velvane.example"]),
          person(3, "C", emails=["c@gmail.com"]), person(4, "D", emails=["d@gmail.com"])]
    t = infer_ties(cs, [], ME)
    assert row(t, 1, 2) is not None and row(t, 3, 4) is None


def test_manual_and_suppressed_ties():
    cs = [person(1, "A", ["Quillon Labs"]), person(2, "B", ["Quillon Labs"]), person(3, "C")]
    t = infer_ties(cs, [], ME, manual={(1, 3): 0.0}, suppressed=[(1, 2)])
    assert row(t, 1, 2) is None
    i = row(t, 1, 3)
    assert t.strength[i] == pytest.approx(TieModel().manual) and t.manual[i]


def test_tags_and_related():
    cs = [person(1, "A", tags=["climbing club"]), person(2, "B", tags=["Climbing Club"]), person(3, "C")]
    t = infer_ties(cs, [], ME, related=[(1, 3)])
    assert t.parts["tag"][row(t, 1, 2)] > 0
    assert t.parts["related"][row(t, 1, 3)] > 0


def test_threads_count_once_per_thread_and_bulk_is_ignored():
    cs = [person(1, "A"), person(2, "B")]
    msgs = [Interaction(kind="message", source="m.mbox", index=k, line=1, when="2026-01-01", key=f"m{k}", thread="t1",
                        sender="p1@mail1.example",
                        participants=["p1@mail1.example", "p2@mail2.example", "you@example.org"])
            for k in range(4)]
    msgs.append(Interaction(kind="message", source="m.mbox", index=9, line=1, when="2026-01-01", key="b", thread="t9",
                            participants=["p1@mail1.example", "p2@mail2.example"], bulk=True))
    t = infer_ties(cs, msgs, ME)
    assert t.counts["thread"][0] == 1 and t.parts["thread"][0] == pytest.approx(0.5)


def test_disparity_filter_keeps_dominant_ties():
    # A hand-computed star: node 0 has one heavy tie (0.9) and five light ones (0.05 each).
    # p_heavy = 0.9/1.15, alpha = (1 - p)^(k-1) = (0.25/1.15)^5 ~ 4.8e-4 < 0.05: kept;
    # p_light = 0.05/1.15, alpha = (1 - 0.0435)^5 ~ 0.80: dropped for node 0, but each light
    # tie is the only tie of its leaf (k = 1), and such ties are kept (Serrano et al. 2009).
    from mynet.evidence.ties import TieTable

    a = np.zeros(6, dtype=np.int64)
    b = np.arange(1, 7, dtype=np.int64)
    s = np.array([0.9, 0.05, 0.05, 0.05, 0.05, 0.05])
    table = TieTable(a, b, s, {}, {}, None)
    assert disparity_filter(table, 0.05).all()
    # Add a second tie to every light leaf so they are no longer protected by k = 1.
    a2 = np.concatenate([a, b[1:]])
    b2 = np.concatenate([b, b[1:] + 10])
    s2 = np.concatenate([s, np.full(5, 0.05)])
    keep = disparity_filter(TieTable(a2, b2, s2, {}, {}, None), 0.05)
    assert keep[0] and not keep[1:6].any()


def test_disparity_filter_serrano_worked_by_hand():
    # Serrano, Boguna & Vespignani 2009, eq. 2: alpha_ij = 1 - (k - 1) * integral_0^p (1 - x)^(k - 2) dx
    # = (1 - p_ij)^(k - 1), with p_ij = w_ij / s_i. Worked by hand for node 0 with k = 3 ties of
    # 0.5, 0.25, 0.25 (s = 1): alpha = 0.5^2 = 0.25 for the 0.5 tie and 0.75^2 = 0.5625 for the others.
    # Node 1 has k = 2 ties of 0.5 each: alpha = 0.5^1 = 0.5 for both. Node 11 has one tie: kept.
    from mynet.evidence.ties import TieTable

    a = np.array([0, 0, 0, 1, 2, 3], dtype=np.int64)
    b = np.array([1, 2, 3, 11, 12, 13], dtype=np.int64)
    s = np.array([0.5, 0.25, 0.25, 0.5, 0.25, 0.25])
    table = TieTable(a, b, s, {}, {}, None)
    # At a significance of 0.3 the 0-1 tie is significant for node 0 (0.25 < 0.3); at 0.2 for nobody
    # (an exponent k instead of k - 1 would give 0.125 < 0.2 and keep it).
    assert disparity_filter(table, 0.3).tolist() == [True, False, False, True, True, True]
    assert disparity_filter(table, 0.2).tolist() == [False, False, False, True, True, True]
    assert disparity_filter(table, 0.6).tolist() == [True] * 6  # 0.5625 < 0.6: all significant


def test_placeholders_and_generic_tags_are_no_evidence():
    cs = [person(1, "A", ["Retired"], tags=["Work"]), person(2, "B", ["retired"], tags=["work"]),
          person(3, "C", ["Freelance"]), person(4, "D", ["Freelance"])]
    assert len(infer_ties(cs, [], ME)) == 0
    # A tag most of the address book carries is a filing habit, not a circle.
    many = [person(i, f"P{i}", tags=["Imported 2019" if i <= 25 else "rowing"]) for i in range(1, 31)]
    t = infer_ties(many, [], ME)
    assert len(t) == 5 * 4 // 2  # only the 5 rowers (17%), not the 25 (83%) carrying the import label
