"""Observed vs assumed evidence: every tie says which; views word assumed-only ties as "may know"; reach prefers
observed routes; ties, why, the TUI and the report count shared meetings and threads alike."""

from __future__ import annotations

import json
from datetime import date

import numpy as np
import pytest
from davis_ics import davis_email, davis_graph, davis_workspace
from networkx.algorithms import bipartite

from mynet.analysis.intro_routes import Targets, reach
from mynet.cli import main
from mynet.evidence.explain import evidence_summary, explain_tie, tie_words
from mynet.evidence.network import Network, load_network
from mynet.evidence.ties import EventIndex, TieModel, evidence_events, infer_ties
from mynet.evidence.warmth import Warmth, WarmthModel
from mynet.model import Contact, Interaction
from mynet.store import Store
from mynet.workspace import Workspace
from mynet.workspace.importing import import_paths
from mynet.workspace.people import set_me

ME = "you@example.org"


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def person(i, name, orgs=(), tags=()):
    return Contact(id=i, name=name, emails=[f"p{i}@mail{i}.example"], orgs=list(orgs), tags=list(tags))


def meeting(k, ids, when="2026-03-02T10:00:00+00:00"):
    return Interaction(kind="meeting", source="cal.ics", index=k, line=k + 1, when=when, key=f"e{k}",
                       participants=sorted([f"p{i}@mail{i}.example" for i in ids] + [ME]))


def message(k, thread, sender, to, when="2026-03-02T10:00:00+00:00"):
    parts = sorted({sender, *to})
    return Interaction(kind="message", source="mail.mbox", index=k, line=10 * k + 1, when=when, key=f"<m{k}>",
                       thread=thread, sender=sender, participants=parts, title=f"subject {k}")


def network(contacts, interactions, warmth: dict[int, float], model: TieModel | None = None) -> Network:
    model = model or TieModel()
    t = infer_ties(contacts, interactions, {ME}, model)
    ties = t.select(t.strength >= model.min_strength)
    w = {c.id: Warmth(c.id, warmth=warmth.get(c.id, 0.0), last="2026-03-02" if warmth.get(c.id) else None)
         for c in contacts}
    return Network(contacts, {c.id: c for c in contacts}, t, ties, w, model, WarmthModel(), {ME})


# -- basis -------------------------------------------------------------------------------------------------
def test_davis_co_attendance_is_observed_and_a_shared_domain_alone_is_assumed(tmp_path):
    # Davis Southern Women (Davis, Gardner & Gardner 1941; shipped with networkx): co-attendance at a social
    # event is a real, observed tie. Every pair networkx's bipartite projection links must come out observed;
    # the invented shared mail domain (@davis.example) links the other pairs, and those are only assumed.
    G = davis_graph()
    women = sorted(G.graph["top"])
    projected = bipartite.weighted_projected_graph(G, women)
    store = davis_workspace(tmp_path)
    net = load_network(store)
    name = {c.id: next(w for w in women if davis_email(w) in c.emails) for c in net.contacts}
    t = net.all_ties
    observed = t.observed()
    for i in range(len(t)):
        pair = (name[int(t.a[i])], name[int(t.b[i])])
        assert (t.basis(i) == "observed") == projected.has_edge(*pair) == bool(observed[i])
        ev = evidence_summary(net, i, t)
        assert {e["basis"] for e in ev} >= {"assumed"}  # the shared domain is there for every pair
    assert observed.sum() == projected.number_of_edges() and (~observed).sum() > 0


def test_assumed_only_ties_read_may_know_everywhere(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "200")
    rows = ["Name,Email,Company", "Ana Lind,ana@a.example,Quillon Labs", "Bo Ek,bo@b.example,Quillon Labs",
            "Cy Moss,cy@c.example,Velvane"]
    (tmp_path / "people.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    ws = str(tmp_path / "ws.sqlite")
    assert run(capsys, "--workspace", ws, "import", str(tmp_path / "people.csv"))[0] == 0
    code, out, _ = run(capsys, "--workspace", ws, "ties")
    assert code == 0 and "may know (both at Quillon Labs)" in out
    code, out, _ = run(capsys, "--workspace", ws, "ties", "--json")
    (tie,) = json.loads(out)
    assert tie["basis"] == "assumed" and tie["evidence"][0]["basis"] == "assumed"
    code, out, _ = run(capsys, "--workspace", ws, "why", "Ana Lind", "Bo Ek", "--json")
    assert json.loads(out)["basis"] == "assumed" and json.loads(out)["words"] == "may know (both at Quillon Labs)"
    code, out, _ = run(capsys, "--workspace", ws, "why", "Ana Lind", "Bo Ek")
    assert "may know each other" in out
    # Your own word is observed evidence: the same pair then reads plainly.
    assert run(capsys, "--workspace", ws, "tie", "Ana Lind", "Bo Ek", "--note", "rowed together")[0] == 0
    code, out, _ = run(capsys, "--workspace", ws, "ties", "--json")
    assert json.loads(out)[0]["basis"] == "observed"
    code, out, _ = run(capsys, "--workspace", ws, "ties")
    assert "may know" not in out and "both at Quillon Labs; you said they know each other: rowed together" in out


def test_tie_words_and_export_basis(tmp_path):
    cs = [person(1, "A", ["Quillon"]), person(2, "B", ["Quillon"]), person(3, "C")]
    net = network(cs, [meeting(0, [2, 3])], {})
    words = {(int(a), int(b)): tie_words(evidence_summary(net, i))
             for i, (a, b) in enumerate(zip(net.ties.a, net.ties.b))}
    assert words[(1, 2)] == "may know (both at Quillon)"
    assert words[(2, 3)] == "1 meeting together"


# -- reach ---------------------------------------------------------------------------------------------------
def equal_routes():
    """you -> 1 -> 9 (1 and 9 only share an organisation) and you -> 2 -> 9 (a tie you declared), same scores."""
    cs = [person(1, "Ana", ["Orsolan"]), person(2, "Bo"), person(9, "Tess", ["Orsolan"])]
    model = TieModel()
    t = infer_ties(cs, [], {ME}, model, manual={(2, 9): 0.3})
    assert t.strength[0] == pytest.approx(t.strength[1])  # org_current 0.3 in a small organisation = 0.3
    w = {1: Warmth(1, warmth=0.6, last="2026-03-01"), 2: Warmth(2, warmth=0.6, last="2026-03-01"), 9: Warmth(9)}
    return Network(cs, {c.id: c for c in cs}, t, t, w, model, WarmthModel(), {ME})


def test_at_equal_score_the_observed_route_ranks_first_and_the_ask_is_honest():
    net = equal_routes()
    res = reach(net, Targets("person", "Tess", [9]), k=2)
    assert [p["path"] for p in res.paths] == [[2, 9], [1, 9]]  # 1 < 2: by id alone Ana's route would come first
    assert res.paths[0]["score"] == pytest.approx(res.paths[1]["score"])
    observed, assumed = res.paths
    assert observed["assumed_steps"] == 0 and [s["basis"] for s in observed["steps"]] == ["observed", "observed"]
    assert assumed["assumed_steps"] == 1 and assumed["steps"][1]["basis"] == "assumed"
    assert assumed["steps"][1]["why"] == "may know (both at Orsolan)"
    assert "they may not know each other" in assumed["ask"] and "may not" not in observed["ask"]


def test_no_path_says_why():
    cs = [person(1, "Ana"), person(2, "Bo"), person(3, "Cy"), person(4, "Di"), person(9, "Tess")]
    # Tess has no ties at all.
    net = network(cs, [meeting(0, [1, 2])], {1: 0.6})
    res = reach(net, Targets("person", "Tess", [9]))
    assert not res.paths and "Tess has no ties to anyone else" in res.why_none
    # A chain 1 - 2 - 3 - 9: three introductions away, more than the default two.
    net = network(cs, [meeting(0, [1, 2]), meeting(1, [2, 3]), meeting(2, [3, 4]), meeting(3, [4, 9])], {1: 0.6})
    res = reach(net, Targets("person", "Tess", [9]), max_intermediaries=2)
    assert not res.paths and "--max-intermediaries 4" in res.why_none
    # Nobody warm at all.
    net = network(cs, [meeting(0, [1, 9])], {})
    res = reach(net, Targets("person", "Tess", [9]))
    assert not res.paths and "no recorded contact with anyone" in res.why_none
    # Ties only among themselves: cut off from the people you know, and only assumed.
    cs2 = cs + [person(8, "Ulla", ["Velvane"])]
    cs2[4] = person(9, "Tess", ["Velvane"])
    net = network(cs2, [meeting(0, [1, 2])], {1: 0.6})
    res = reach(net, Targets("person", "Tess", [9]))
    assert not res.paths and "Nobody you know connects to Tess" in res.why_none
    assert "rest only on something they share" in res.why_none


def test_cli_reach_without_path_prints_the_reason(tmp_path, capsys):
    (tmp_path / "p.csv").write_text("Name,Email\nAna Lind,ana@a.example\nTess Ray,tess@t.example\n", encoding="utf-8")
    ws = str(tmp_path / "ws.sqlite")
    run(capsys, "--workspace", ws, "import", str(tmp_path / "p.csv"))
    code, out, _ = run(capsys, "--workspace", ws, "reach", "--to", "Tess Ray")
    assert code == 0 and "No intro path found" in out and "no recorded contact with anyone" in out


# -- one count everywhere ------------------------------------------------------------------------------------
A, B, C = "p1@mail1.example", "p2@mail2.example", "p3@mail3.example"


def counting_fixture():
    """Threads where the pair never shares a single message, and one thread larger than the broadcast cap."""
    crowd = [f"x{k}@crowd.example" for k in range(60)]
    its = [
        # A writes to you, B answers in the same thread: one thread both are in (no message holds both).
        message(0, "<t1>", A, [ME]), message(1, "<t1>", B, [ME]),
        # A and B in one message of a second thread.
        message(2, "<t2>", A, [B, ME]),
        # a thread of 63 people: above the broadcast cap (50), it counts for nothing anywhere.
        message(3, "<t3>", A, [B, ME, *crowd]),
        meeting(4, [1, 2]), meeting(5, [1, 2, 3]),
    ]
    cs = [person(1, "Ana"), person(2, "Bo"), person(3, "Cy")]
    return cs, its


def test_explanation_lists_exactly_the_events_the_tie_counts():
    cs, its = counting_fixture()
    model = TieModel()
    t = infer_ties(cs, its, {ME}, model)
    index = EventIndex(cs, its)
    for i in range(len(t)):
        shared = index.shared(int(t.a[i]), int(t.b[i]), model.broadcast_cap)
        assert len(shared["meeting"]) == t.counts["meeting"][i]
        assert len(shared["thread"]) == t.counts["thread"][i]
    i = int(np.nonzero((t.a == 1) & (t.b == 2))[0][0])
    assert t.counts["thread"][i] == 2 and t.counts["meeting"][i] == 2
    assert [e.kind for e in evidence_events(its)].count("thread") == 3


def counting_workspace(tmp_path):
    cs, its = counting_fixture()
    people = tmp_path / "people.csv"
    people.write_text("Name,Email\n" + "".join(f"{c.name},{c.emails[0]}\n" for c in cs), encoding="utf-8")
    mbox = tmp_path / "mail.mbox"
    lines = []
    for it in its:
        if it.kind != "message":
            continue
        to = [p for p in it.participants if p != it.sender]
        lines += [f"From {it.sender} Mon Mar  2 10:00:00 2026", f"From: {it.sender}", f"To: {', '.join(to)}",
                  "Date: Mon, 02 Mar 2026 10:00:00 +0000", f"Subject: {it.title}", f"Message-ID: {it.key}"]
        if it.thread != it.key and it.index in (1,):
            lines += ["In-Reply-To: <m0>", "References: <m0>"]
        lines += ["", "(no body)", ""]
    mbox.write_text("\n".join(lines), encoding="utf-8")
    cal = tmp_path / "cal.ics"
    ev = []
    for k, ids in ((4, [1, 2]), (5, [1, 2, 3])):
        ev += ["BEGIN:VEVENT", f"UID:e{k}@t.example", "DTSTAMP:20260301T000000Z", f"DTSTART:2026030{k - 2}T100000Z",
               "DURATION:PT1H", f"SUMMARY:Meeting {k}", f"ORGANIZER:mailto:{ME}"]
        ev += [f"ATTENDEE:mailto:p{i}@mail{i}.example" for i in ids] + ["END:VEVENT"]
    cal.write_text("\r\n".join(["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//t//t//EN", *ev, "END:VCALENDAR", ""]),
                   encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    set_me(store, [ME], ["Robin Avenell"])
    import_paths(store, [people, mbox, cal])
    return store


def test_ties_why_tui_and_report_count_alike(tmp_path, capsys):
    store = counting_workspace(tmp_path)
    ws = str(store.path)
    code, out, _ = run(capsys, "--workspace", ws, "ties", "--json")
    listed = {(t["a"], t["b"]): {e["kind"]: e.get("count") for e in t["evidence"]} for t in json.loads(out)}
    assert listed, "the fixture should give ties"
    net = load_network(store)
    from mynet.report.data import collect
    from mynet.tui.data import load_snapshot

    snap = load_snapshot(store.path)
    for (a, b), counts in listed.items():
        code, out, _ = run(capsys, "--workspace", ws, "why", str(a), str(b), "--json")
        why = {e["kind"]: e for e in json.loads(out)["evidence"]}
        for kind in ("meeting", "thread"):
            assert counts.get(kind) == (why[kind]["count"] if kind in why else None), (a, b, kind)
        ex = snap.explain(a, b)
        assert {e["kind"]: e.get("count") for e in ex["evidence"] if e["kind"] in ("meeting", "thread")} == \
            {k: v for k, v in counts.items() if k in ("meeting", "thread")}
        row = next(r for o, _s, r in snap.ties_of(a) if o == b)
        assert {e["kind"]: e.get("count") for e in evidence_summary(snap.net, row)
                if e["kind"] in ("meeting", "thread")} \
            == {k: v for k, v in counts.items() if k in ("meeting", "thread")}
    ids = {c.name: c.id for c in net.contacts}
    ab = listed[tuple(sorted((ids["Ana"], ids["Bo"])))]
    assert ab["thread"] == 2 and ab["meeting"] == 2  # the thread of 63 counts nowhere, the reply thread everywhere
    ex = explain_tie(store, net, ids["Ana"], ids["Bo"])
    thread = next(e for e in ex["evidence"] if e["kind"] == "thread")
    assert thread["messages"] == 3  # the three messages of the two counted threads
    data = collect(Workspace.over(store), today=date(2026, 3, 10))
    assert data.net.ties.counts["thread"].tolist() == net.ties.counts["thread"].tolist()
