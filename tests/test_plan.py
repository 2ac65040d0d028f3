"""The plan (mynet.analysis.plan.cover) against a brute-force optimum of the same objective.

The objective, in order: the most targets opened, the fewest people asked, the largest score sum;
nobody opens more than ``capacity`` targets. The reference enumerates every set of people by
increasing size and solves the assignment of each set with networkx's minimum-cost maximum flow
(``max_flow_min_cost``), an implementation independent of the plan's linear assignment.
The greedy's guarantee (Wolsey 1982, Theorem 1; Chvátal 1979 for plain set cover): it reaches the
largest number of targets opened, and asks at most H(capacity) times the fewest people.
"""

from __future__ import annotations

import itertools
import random
import shutil

import networkx as nx
import pytest

from mynet.analysis.plan import assign, cover, greedy_bound

SCALE = 10**6


def flow_value(options, people, capacity):
    """(targets opened, score sum) of the best assignment to ``people``, by min-cost max flow."""
    g = nx.DiGraph()
    for p in people:
        g.add_edge("s", ("p", p), capacity=capacity, weight=0)
    for t, opts in options.items():
        g.add_edge(("t", t), "z", capacity=1, weight=0)
        for p, s in opts.items():
            if p in people and s > 0:
                g.add_edge(("p", p), ("t", t), capacity=1, weight=-round(s * SCALE))
    if "s" not in g or "z" not in g:
        return 0, 0.0
    flow = nx.max_flow_min_cost(g, "s", "z")
    opened = sum(flow["s"].values())
    cost = nx.cost_of_flow(g, flow)
    return opened, -cost / SCALE


def brute_force(options, capacity):
    """The optimum of the objective: (opened, people asked, best score sum for that many people)."""
    people = sorted({p for opts in options.values() for p in opts})
    most, _ = flow_value(options, people, capacity)
    if most == 0:
        return 0, 0, 0.0
    can_open = {p: {t for t, opts in options.items() if p in opts} for p in people}
    for size in range(-(-most // capacity), len(people) + 1):  # fewer people cannot open `most` targets
        best = None
        for subset in itertools.combinations(people, size):
            if len(set().union(*(can_open[p] for p in subset))) < most:
                continue  # cannot open that many whatever the assignment
            opened, score = flow_value(options, set(subset), capacity)
            if opened == most and (best is None or score > best):
                best = score
        if best is not None:
            return most, size, best
    raise AssertionError("unreachable")


def check_against_brute_force(options, capacity):
    plan = cover(options, capacity)
    opened, fewest, best_score = brute_force(options, capacity)
    assert plan.opened == opened  # the greedy reaches every target any plan can open
    assert fewest <= len(plan.order) <= greedy_bound(capacity) * fewest + 1e-9  # Wolsey 1982 bound
    # For the people it chose, the assignment is the best one (independent min-cost flow).
    _, score_for_set = flow_value(options, set(plan.order), capacity)
    assert plan.score == pytest.approx(score_for_set, abs=1e-5)
    if len(plan.order) == fewest:
        assert plan.score <= best_score + 1e-5
    counts = {}
    for t, p in plan.assignment.items():
        assert p in options[t]  # only people who can open it
        counts[p] = counts.get(p, 0) + 1
    assert max(counts.values(), default=0) <= capacity
    return plan, (opened, fewest, best_score)


def random_options(seed, n_targets, n_people):
    rng = random.Random(seed)
    out = {}
    for t in range(n_targets):
        chosen = rng.sample(range(n_people), rng.randint(0, min(4, n_people)))
        out[f"t{t}"] = {p: round(rng.uniform(0.05, 1.0), 4) for p in chosen}
    return out


@pytest.mark.parametrize("seed", range(40))
def test_cover_matches_brute_force_on_random_instances(seed):
    rng = random.Random(1000 + seed)
    options = random_options(seed, rng.randint(1, 8), rng.randint(2, 7))
    check_against_brute_force(options, rng.choice([1, 2, 3]))


def test_capacity_moves_a_target_to_the_only_other_person():
    # A could open both; with one introduction each, B must take t1 so that A can open t2.
    options = {"t1": {1: 0.9, 2: 0.2}, "t2": {1: 0.8}}
    plan = cover(options, capacity=1)
    assert plan.assignment == {"t1": 2, "t2": 1}
    assert cover(options, capacity=2).assignment == {"t1": 1, "t2": 1}


def test_greedy_prefers_the_person_opening_more_doors_then_the_warmer():
    options = {"a": {1: 0.3, 2: 0.9}, "b": {1: 0.3}, "c": {1: 0.3, 3: 0.9}}
    plan = cover(options, capacity=3)
    assert plan.order == [1]  # one ask opens all three: fewer asks beat warmer ones
    # Equal gains: the larger score sum wins, then the smaller id.
    assert cover({"a": {5: 0.4, 4: 0.4}}, 3).order == [4]
    assert cover({"a": {5: 0.5, 4: 0.4}}, 3).order == [5]


def test_cover_is_deterministic_whatever_the_order_of_the_options():
    options = random_options(7, 8, 6)
    first = cover(options, 2)
    shuffled = dict(reversed(list(options.items())))
    again = cover({t: dict(reversed(list(o.items()))) for t, o in shuffled.items()}, 2)
    assert first.order == again.order and first.assignment == again.assignment


def test_assign_and_bound_edges():
    assert assign({}, [1], 2) == ({}, 0.0)
    assert assign({"t": {1: 0.5}}, [], 2) == ({}, 0.0)
    assert greedy_bound(1) == 1.0 and greedy_bound(3) == pytest.approx(1 + 1 / 2 + 1 / 3)
    with pytest.raises(ValueError):
        cover({"t": {1: 0.5}}, 0)


# -- the sample scenario -------------------------------------------------------------------------------

def add_open_targets(ws, size):
    """Add the sample's organisations (3 to 12 people, by name) until ``size`` of them have a route to open."""
    from collections import Counter

    orgs = Counter(o for c in ws.network().contacts for o in c.orgs)
    for name in sorted(o for o, n in orgs.items() if 3 <= n <= 12):
        ws.add_target(org=name)
    rows = ws.targets()
    keep = [r["id"] for r in rows if r["state"] == "open"][:size]
    assert len(keep) == size, f"the sample has fewer than {size} organisations with a route"
    for r in rows:
        if r["id"] not in keep:
            ws.remove_target(r["id"])
    return keep


@pytest.fixture(scope="module")
def sample_file(tmp_path_factory):
    from conftest import import_sample

    path = tmp_path_factory.mktemp("plan") / "ws.sqlite"
    store, _truth = import_sample(path)
    store.close()
    return path


@pytest.fixture
def ws(sample_file, tmp_path):
    import mynet

    path = tmp_path / "ws.sqlite"
    shutil.copy(sample_file, path)
    w = mynet.open_workspace(path)
    yield w
    w.close()


def sample_options(ws, per_target):
    from mynet.workspace.planning import target_overview

    states, _ = target_overview(ws.store, ws.network())
    return {s.row["id"]: {r.first: r.rank for r in s.routes.routes[:per_target]}
            for s in states if s.state == "open"}


@pytest.mark.parametrize("size,capacity,per_target", [(4, 1, 4), (6, 2, 4), (8, 3, 3), (8, 2, 3)])
def test_sample_plan_against_brute_force(ws, size, capacity, per_target):
    """On the sample scenario, lists of up to 8 organisations: the greedy plan against the optimum."""
    add_open_targets(ws, size)
    options = sample_options(ws, per_target)
    assert len(options) == size
    plan, (opened, fewest, _best) = check_against_brute_force(options, capacity)
    print(f"\n{size} targets, at most {capacity} each: greedy asks {len(plan.order)} people for {plan.opened} "
          f"targets; the fewest possible is {fewest} for {opened}")


def test_workspace_plan_is_the_cover_of_every_route_and_deterministic(ws):
    add_open_targets(ws, 6)
    p1 = ws.plan(max_per_person=2)
    p2 = ws.plan(max_per_person=2)
    assert p1 == p2
    full = sample_options(ws, per_target=10**6)
    reference = cover(full, 2)
    assert [a["person"] for a in p1["asks"]] == reference.order
    assert {t["target"]: a["person"] for a in p1["asks"] for t in a["targets"]} == reference.assignment
    assert p1["objective"]["opened"] == 6 and p1["objective"]["people"] == len(reference.order)
    assert all(len(a["targets"]) <= 2 for a in p1["asks"])
