"""Assumed evidence inside a large organisation: no complete clique crowding out what was observed.

The remedies are measured on the sample scenario's ground truth (``pytest -s`` prints the table); the default
(each person keeps their best three assumed-only links inside an organisation of more than ten people) must break
every complete clique while keeping the scenario's figures.
"""

from __future__ import annotations

import itertools

import pytest
from conftest import import_sample, person_of

from mynet.analysis.groups import normalised_mutual_information
from mynet.analysis.snapshot import analyse, tie_graph
from mynet.evidence.network import load_network
from mynet.evidence.ties import TieModel, infer_ties
from mynet.model import Contact, Interaction

ME = "you@example.org"

REMEDIES = [
    ("none", {"assumed_cap": 0}),
    ("best 3 per person and organisation", {"assumed_cap": 3}),
    ("best 10 per person and organisation (default)", {}),
    ("best 20 per person and organisation", {"assumed_cap": 20}),
    ("organisations > 10 only with other evidence", {"assumed_cap": 0, "org_alone_max": 10}),
    ("size weight (10/n)^1 instead of ^0.5", {"assumed_cap": 0, "size_exponent": 1.0}),
]


@pytest.fixture(scope="module")
def sample(tmp_path_factory):
    return import_sample(tmp_path_factory.mktemp("remedies") / "ws.sqlite")


def figures(store, truth, person) -> dict:
    net = load_network(store)
    true = {frozenset((t["a"], t["b"])) for t in truth["ties"]}
    # People found in mail belong to the cluster the ground truth gives them.
    clusters = [set(c["members"]) | {f["id"] for f in truth["found_people"] if name in f["clusters"]}
                for name, c in truth["clusters"].items()]
    pred = {frozenset((person.get(int(a)), person.get(int(b)))) for a, b in zip(net.ties.a, net.ties.b)}
    a = analyse(store, net, force=True)
    people = {p["id"]: p for p in truth["people"] + truth["found_people"]}
    t, p = {}, {}
    for c, pid in person.items():
        if len(people[pid]["clusters"]) == 1 and a.group_of.get(c) is not None:
            t[c], p[c] = people[pid]["clusters"][0], a.group_of[c]
    G = tie_graph(net)
    dens = [G.subgraph(g.members).number_of_edges() / (g.size * (g.size - 1) / 2) for g in a.groups if g.size >= 10]
    top = a.bridges[:15]
    return {
        "ties": len(pred),
        "recall": len(pred & true) / len(true),
        "plausible": sum(1 for q in pred if q in true or any(q <= c for c in clusters)) / len(pred),
        "precision": len(pred & true) / len(pred),
        "nmi": normalised_mutual_information(t, p),
        "max_density": max(dens),
        "bridges_seen": sum(b["basis"] == "observed" for b in top) / len(top),
        "bridges_true": sum(frozenset((person.get(b["a"]), person.get(b["b"]))) in true for b in top) / len(top),
    }


def test_remedies_measured_on_the_sample_and_the_default_breaks_every_clique(sample):
    store, truth = sample
    person = person_of(store, truth)
    rows = {}
    try:
        for name, cfg in REMEDIES:
            store.set_setting("tie_model", cfg)
            rows[name] = figures(store, truth, person)
    finally:
        store.set_setting("tie_model", {})
    print(f"\n{'remedy':46} {'ties':>5} {'recall':>6} {'plaus.':>6} {'prec.':>6} {'NMI':>6} {'dens.':>6} "
          f"{'br.seen':>7} {'br.true':>7}")
    for name, f in rows.items():
        print(f"{name:46} {f['ties']:5} {f['recall']:6.3f} {f['plausible']:6.3f} {f['precision']:6.3f} "
              f"{f['nmi']:6.3f} {f['max_density']:6.2f} {f['bridges_seen']:7.2f} {f['bridges_true']:7.2f}")
    none, default = rows["none"], rows["best 10 per person and organisation (default)"]
    assert none["max_density"] == 1.0  # without a remedy a large organisation is one complete clique
    assert default["max_density"] < 0.99
    assert default["precision"] > 1.5 * none["precision"]  # far fewer ties that are not true
    assert default["recall"] >= none["recall"] - 0.01
    assert default["bridges_true"] > none["bridges_true"]  # the bridges list is no longer crowded out
    assert default["nmi"] >= 0.7  # groups follow teams more than whole employers, but stay recognisable


def test_the_workflow_labels_of_the_sample_never_count(sample):
    store, truth = sample
    net = load_network(store)
    from mynet.people.normalise import fold_text

    judged = {k: v for k, v in net.labels.items()}
    assert truth["workflow_labels"]
    for label in truth["workflow_labels"]:
        assert judged[fold_text(label)]["counts"] is False, label
    assert all(judged[k]["counts"] for k in ("rowing", "masters crew", "aldermoor", "speaker"))


def team_world():
    """One organisation of 30 people in three teams of ten that meet weekly; nobody has a department on file."""
    cs = [Contact(id=i, name=f"P{i}", emails=[f"p{i}@big.example"], orgs=["Bigco"]) for i in range(1, 31)]
    its = []
    for k in range(12):
        for team in range(3):
            ids = range(1 + 10 * team, 11 + 10 * team)
            its.append(Interaction(kind="meeting", source="c.ics", index=len(its), line=1,
                                   when=f"2026-0{1 + k % 9}-0{1 + team}T10:00:00+00:00", key=f"m{len(its)}",
                                   participants=sorted([f"p{i}@big.example" for i in ids] + [ME])))
    return cs, its


def test_a_large_organisation_is_no_longer_one_clique_and_its_teams_show():
    import networkx as nx

    from mynet.analysis.groups import detect_groups

    cs, its = team_world()
    domain_off = {"domain": 0.0}
    with_cap = infer_ties(cs, its, {ME}, TieModel(**domain_off))
    without = infer_ties(cs, its, {ME}, TieModel(assumed_cap=0, **domain_off))
    assert len(without) == 30 * 29 // 2  # every pair of the organisation: one complete clique

    def team(i):
        return (i - 1) // 10

    cross_with = [(int(a), int(b)) for a, b in zip(with_cap.a, with_cap.b) if team(int(a)) != team(int(b))]
    assert len(cross_with) < 300 and not with_cap.observed()[[team(int(a)) != team(int(b))
                                                              for a, b in zip(with_cap.a, with_cap.b)]].any()
    # each person chose at most ten of their assumed-only links; a link stays when either end chose it
    assert max(sum(1 for p in cross_with if i in p) for i in range(1, 31)) <= 20
    G = nx.Graph()
    G.add_weighted_edges_from((int(a), int(b), float(s)) for a, b, s in zip(with_cap.a, with_cap.b, with_cap.strength))
    found = detect_groups(G, seed=0).as_sets()
    assert sorted(sorted(g) for g in found.values()) == [list(range(1 + 10 * t, 11 + 10 * t)) for t in range(3)]


def test_the_limit_prefers_departments_and_is_the_same_on_every_run():
    cs = [Contact(id=i, name=f"P{i}", emails=[f"p{i}@mail{i}.example"], orgs=["Bigco"]) for i in range(1, 31)]
    t = infer_ties(cs, [], {ME}, TieModel())
    assert len(t) < 30 * 29 // 2  # nothing to choose by: a stable sample of ten per person stands for the rest
    again = infer_ties(list(reversed(cs)), [], {ME}, TieModel())
    assert sorted(zip(t.a.tolist(), t.b.tolist())) == sorted(zip(again.a.tolist(), again.b.tolist()))
    # A shared department makes links better: each person keeps their department first.
    for c in cs:
        c.org_units = [["Bigco", "Team A" if c.id <= 6 else "Team B"]]
    t = infer_ties(cs, [], {ME}, TieModel())
    pairs = {(int(a), int(b)) for a, b in zip(t.a, t.b)}
    assert {(a, b) for a, b in itertools.combinations(range(1, 7), 2)} <= pairs
    assert all(sum(1 for p in pairs if i in p and p[0] > 6 and p[1] > 6) >= 10 for i in range(7, 31))
    # Team B (24 people, 23 department mates each) chose only department mates: every link across the two
    # departments was chosen by its Team A end, which had five places left after its five department mates.
    across = [p for p in pairs if (p[0] <= 6) != (p[1] <= 6)]
    assert all(sum(1 for p in across if i in p) == 5 for i in range(1, 7))
