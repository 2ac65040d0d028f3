"""Ties through the whole pipeline: imported calendars, decisions across re-imports, the sample scenario."""

from __future__ import annotations

import json

import pytest
from davis_ics import davis_email, davis_graph, davis_workspace
from networkx.algorithms import bipartite

from mynet.cli import main
from mynet.evidence.explain import explain_tie
from mynet.evidence.network import load_network
from mynet.store import Store
from mynet.workspace.decisions import add_tie, rate_contact, remove_tie
from mynet.workspace.importing import import_paths
from mynet.workspace.people import set_me


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture
def davis_ws(tmp_path):
    return davis_workspace(tmp_path)


def test_davis_meeting_counts_and_newman_weights_match_networkx(davis_ws):
    # Davis Southern Women (Davis, Gardner & Gardner 1941; networkx dataset) written as an .ics file:
    # after import, the meeting count of every pair equals networkx's weighted_projected_graph and
    # the meeting weight equals collaboration_weighted_projected_graph (Newman 2001).
    G = davis_graph()
    women = sorted(G.graph["top"])
    counts = bipartite.weighted_projected_graph(G, women)
    newman = bipartite.collaboration_weighted_projected_graph(G, women)
    net = load_network(davis_ws)
    by_email = {c.emails[0]: c.id for c in net.contacts}
    name_of = {by_email[davis_email(w)]: w for w in women}
    t = net.all_ties
    seen = set()
    for i in range(len(t)):
        if not t.counts["meeting"][i]:
            continue  # a pair tied only by the shared invented domain @davis.example
        u, v = name_of[int(t.a[i])], name_of[int(t.b[i])]
        assert t.counts["meeting"][i] == counts[u][v]["weight"]
        assert t.parts["meeting"][i] == pytest.approx(newman[u][v]["weight"])
        seen.add(frozenset((u, v)))
    assert seen == {frozenset(e) for e in counts.edges()}


def test_why_explains_with_provenance(davis_ws):
    net = load_network(davis_ws)
    by_email = {c.emails[0]: c.id for c in net.contacts}
    a, b = by_email[davis_email("Evelyn Jefferson")], by_email[davis_email("Theresa Anderson")]
    ex = explain_tie(davis_ws, net, a, b)
    meet = next(e for e in ex["evidence"] if e["kind"] == "meeting")
    G = davis_graph()
    shared = set(G["Evelyn Jefferson"]) & set(G["Theresa Anderson"])  # E2-E6, E8, E9 in the dataset
    assert meet["count"] == len(shared) == 7
    # The test file dates event Ek on 2024-01-08 + 7(k-1) days, so the last shared one (E9) is 2024-03-04.
    assert meet["last"] == "2024-03-04" and meet["first"] == "2024-01-15"
    assert all(r["provenance"].startswith("davis.ics:") for r in meet["recent"])
    assert ex["strength"] > 0 and "meeting" in ex["contributions"]


def test_tie_untie_rate_survive_reimport(tmp_path, capsys):
    people = tmp_path / "people.csv"
    people.write_text("Name,Email,Company\nAna Lind,ana@q.example,Quillon Labs\nTom Reyes,tom@q.example,Quillon Labs\n"
                      "Bo Ek,bo@v.example,Velvane\n", encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    set_me(store, ["you@example.org"], ["Robin Vale"])
    import_paths(store, [people])
    ids = {c.name: c.id for c in store.contacts()}
    ana, tom, bo = ids["Ana Lind"], ids["Tom Reyes"], ids["Bo Ek"]
    net = load_network(store)
    assert len(net.ties) == 1  # Ana and Tom share Quillon Labs
    remove_tie(store, ana, tom)
    add_tie(store, ana, bo, "rowed together", 0.7)
    rate_contact(store, tom, 0.9)
    # The file changes (a new person, an edited row) and is imported again.
    people.write_text("Name,Email,Company\nAna Lind,ana@q.example,Quillon Labs\nTom Reyes,tom@q.example,Quillon Labs "
                      "Ltd\n"
                      "Bo Ek,bo@v.example,Velvane\nDee Olsen,dee@q.example,Quillon Labs\n", encoding="utf-8")
    import_paths(store, [people])
    net = load_network(store)
    pairs = {(int(a), int(b)): float(s) for a, b, s in zip(net.ties.a, net.ties.b, net.ties.strength)}
    assert (min(ana, tom), max(ana, tom)) not in pairs
    assert pairs[(min(ana, bo), max(ana, bo))] == pytest.approx(0.7)
    assert net.warmth[tom].warmth == 0.9 and net.warmth[tom].rated == 0.9
    code, out, _ = run(capsys, "--workspace", str(tmp_path / "ws.sqlite"), "why", "Ana Lind", "Bo Ek")
    assert code == 0 and "you said they know each other: rowed together" in out
    code, out, _ = run(capsys, "--workspace", str(tmp_path / "ws.sqlite"), "ties", "--json")
    listed = json.loads(out)
    manual = next(t for t in listed if {t["a"], t["b"]} == {ana, bo})
    assert manual["evidence"] == [{"kind": "manual", "note": "rowed together", "basis": "observed"}]
    assert manual["basis"] == "observed"
    assert all(set(t) >= {"a", "b", "strength", "evidence"} for t in listed)
