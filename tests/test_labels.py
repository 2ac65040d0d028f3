"""Labels: only those that name a circle of people are evidence; workflow labels are told by wording and by use;
your decision per label wins and survives re-imports."""

from __future__ import annotations

import json

import numpy as np
import pytest

from mynet.cli import main
from mynet.evidence.labels import judge_labels, usage_verdict, workflow_wording
from mynet.evidence.ties import TieModel, infer_ties
from mynet.model import Contact, Interaction

ME = "you@example.org"


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("label", [
    "follow up", "Follow-up", "FOLLOW UP!", "to call", "To call back", "met at booth", "Met at Tidewater 2025",
    "VIP", "Favourites", "favorites", "dinner", "Dinner 2025", "hot lead", "Christmas card list", "coffee",
    "à rappeler", "Nachfassen", "Wiedervorlage", "seguimiento", "da chiamare", "terugbellen", "Favoris",
])
def test_workflow_wording(label):
    assert workflow_wording(label)


@pytest.mark.parametrize("label", [
    "Rowing", "Masters crew", "Novice squad", "Committee", "Class of 2012", "Aldermoor", "Lantern", "speaker",
    "Neighbours", "Family", "Chess club", "Platform team", "workshop: data contracts", "Tech leads",
])
def test_affiliation_wording_is_not_workflow(label):
    assert not workflow_wording(label)


def person(i, org="", tags=()):
    return Contact(id=i, name=f"P{i}", emails=[f"p{i}@mail{i}.example"], orgs=[org] if org else [], tags=list(tags))


def meeting(k, ids):
    return Interaction(kind="meeting", source="cal.ics", index=k, line=k + 1, when="2026-03-02T10:00:00+00:00",
                       key=f"e{k}", participants=sorted([f"p{i}@mail{i}.example" for i in ids] + [ME]))


def pair_of(t, a, b):
    hit = np.nonzero((t.a == min(a, b)) & (t.b == max(a, b)))[0]
    return int(hit[0]) if hit.size else None


def spread_world(label="Batch Q3", club="Rowing", with_meetings=True):
    """Six organisations of three colleagues who meet in their teams; a label put on one person of each
    (people who share nothing else); a club whose members meet on Saturdays."""
    cs, its = [], []
    orgs = ["Alder", "Birch", "Cedar", "Dogwood", "Elm", "Fir"]
    for o, org in enumerate(orgs):
        ids = [10 * o + k for k in range(1, 4)]
        for k, i in enumerate(ids):
            tags = [label] if k == 0 else []
            tags += [club] if k == 1 and o < 4 else []
            cs.append(person(i, f"{org} Ltd", tags))
        if with_meetings:
            its.append(meeting(o, ids))
    if with_meetings:
        its.append(meeting(99, [10 * o + 2 for o in range(4)]))  # the club's Saturday outing
    return cs, its


def test_usage_tells_a_cross_cutting_label_from_a_circle():
    cs, its = spread_world()
    t = infer_ties(cs, its, {ME}, TieModel())
    verdict = {v["key"]: v for v in t.labels}
    assert verdict["batch q3"]["counts"] is False and verdict["batch q3"]["rule"] == "usage"
    assert "6 organisations" in verdict["batch q3"]["reason"]
    assert verdict["rowing"]["counts"] is True and verdict["rowing"]["rule"] == "circle"
    assert pair_of(t, 1, 11) is None or t.parts["tag"][pair_of(t, 1, 11)] == 0  # no tie from the workflow label
    assert t.parts["tag"][pair_of(t, 2, 12)] > 0  # the club label still counts


def test_without_anything_observed_usage_does_not_judge():
    # An address book alone: nothing shows whom anyone meets, so a cross-cutting label is given the benefit of
    # the doubt (only its wording could condemn it).
    cs, its = spread_world(with_meetings=False)
    t = infer_ties(cs, its, {ME}, TieModel())
    verdict = {v["key"]: v for v in t.labels}
    assert verdict["batch q3"]["counts"] is True and verdict["rowing"]["counts"] is True


def test_workflow_labels_give_no_tie_and_your_decision_wins():
    cs = [person(1, "Alder", ["follow up", "Rowing"]), person(2, "Birch", ["follow up", "Rowing"]),
          person(3, "Cedar", ["VIP"]), person(4, "Dogwood", ["VIP"])]
    t = infer_ties(cs, [], {ME}, TieModel())
    assert pair_of(t, 3, 4) is None
    assert t.parts["tag"][pair_of(t, 1, 2)] > 0
    rowing_only = t.strength[pair_of(t, 1, 2)]
    t2 = infer_ties(cs, [], {ME}, TieModel(), label_decisions={"follow up": "count", "vip": "count"})
    assert pair_of(t2, 3, 4) is not None and t2.strength[pair_of(t2, 1, 2)] > rowing_only
    t3 = infer_ties(cs, [], {ME}, TieModel(), label_decisions={"rowing": "ignore"})
    assert pair_of(t3, 1, 2) is None
    assert {v["key"]: v["rule"] for v in t3.labels} == {"follow up": "wording", "rowing": "you", "vip": "wording"}


def test_judge_labels_rules_in_order():
    groups = {"work": [0, 1, 2], "everyone": list(range(30)), "follow up": [0, 1], "solo": [3], "crew": [4, 5]}
    shown = {"work": "Work", "everyone": "Everyone", "follow up": "Follow up", "solo": "Solo", "crew": "Crew"}
    v = judge_labels(groups, shown, 40, orgs=[frozenset()] * 40, seen=np.zeros(40, dtype=bool), linked=None,
                     decisions={"crew": "ignore"})
    assert [(k, v[k].counts, v[k].rule) for k in sorted(v)] == [
        ("crew", False, "you"), ("everyone", False, "common"), ("follow up", False, "wording"),
        ("solo", True, "few"), ("work", False, "generic")]
    assert v["everyone"].uses == 30 and "75%" in v["everyone"].reason


def test_usage_verdict_needs_enough_to_go_on():
    orgs = [frozenset({f"o{i}"}) for i in range(8)]
    seen = np.ones(8, dtype=bool)
    assert usage_verdict([0, 1, 2], orgs, seen, 0) is None  # too few uses
    assert usage_verdict([0, 1, 2, 3], orgs, np.zeros(8, dtype=bool), 0) is None  # nobody seen elsewhere
    same = [frozenset({"one"})] * 8
    assert usage_verdict([0, 1, 2, 3], same, seen, 0) is None  # one organisation: not "unrelated organisations"
    counts, why = usage_verdict([0, 1, 2, 3], orgs, seen, 0)
    assert not counts and "4 organisations" in why
    assert usage_verdict([0, 1, 2, 3], orgs, seen, 3)[0] is True  # half of the pairs linked otherwise


def test_tags_command_lists_counts_and_keeps_decisions_across_reimport(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "200")
    rows = ["Name,Email,Company,Tags", "Ana Lind,ana@a.example,Alder,Rowing; follow up",
            "Bo Ek,bo@b.example,Birch,Rowing; follow up", "Cy Moss,cy@c.example,Cedar,VIP"]
    csv = tmp_path / "people.csv"
    csv.write_text("\n".join(rows) + "\n", encoding="utf-8")
    ws = str(tmp_path / "ws.sqlite")
    assert run(capsys, "--workspace", ws, "import", str(csv))[0] == 0
    code, out, _ = run(capsys, "--workspace", ws, "tags", "--json")
    listed = {x["label"]: x for x in json.loads(out)}
    assert {k: (v["uses"], v["counts"]) for k, v in listed.items()} == {
        "Rowing": (2, True), "follow up": (2, False), "VIP": (1, False)}
    assert listed["follow up"]["rule"] == "wording" and listed["follow up"]["why"]
    code, out, _ = run(capsys, "--workspace", ws, "ties")
    assert "follow up" not in out and "both tagged 'Rowing'" in out
    assert run(capsys, "--workspace", ws, "tags", "ignore", "ROWING")[0] == 0
    assert run(capsys, "--workspace", ws, "tags", "count", "Follow-up")[0] == 0
    csv.write_text("\n".join(rows + ["Di Park,di@d.example,Dogwood,follow up"]) + "\n", encoding="utf-8")
    assert run(capsys, "--workspace", ws, "import", str(csv))[0] == 0  # a re-import keeps your decisions
    code, out, _ = run(capsys, "--workspace", ws, "tags", "--json")
    listed = {x["label"]: x for x in json.loads(out)}
    assert (listed["Rowing"]["counts"], listed["Rowing"]["decision"]) == (False, "ignore")
    assert (listed["follow up"]["counts"], listed["follow up"]["uses"]) == (True, 3)
    code, out, _ = run(capsys, "--workspace", ws, "ties")
    assert "'Rowing'" not in out and "both tagged 'follow up'" in out
    code, out, _ = run(capsys, "--workspace", ws, "why", "Ana Lind", "Bo Ek")
    assert "both tagged 'Rowing' (not counted: you said to ignore it)" in out
    assert run(capsys, "--workspace", ws, "tags", "auto", "rowing")[0] == 0
    code, out, _ = run(capsys, "--workspace", ws, "tags", "--json")
    assert next(x for x in json.loads(out) if x["label"] == "Rowing")["counts"] is True
    code, _, err = run(capsys, "--workspace", ws, "tags", "ignore", "Rowin")
    assert code == 4 and "did you mean 'Rowing'" in err


def test_a_workflow_label_never_names_a_group(tmp_path):
    from mynet.analysis.snapshot import analyse
    from mynet.store import Store
    from mynet.workspace.importing import import_paths

    rows = ["Name,Email,Tags"] + [f"P{i} Q,p{i}@x{i}.example,follow up" for i in range(5)]
    (tmp_path / "p.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    ev = []
    for k in range(3):  # the five meet three times: an observed group, whose most shared label is "follow up"
        ev += ["BEGIN:VEVENT", f"UID:m{k}@t.example", "DTSTAMP:20260301T000000Z", f"DTSTART:2026030{k + 2}T100000Z",
               "DURATION:PT1H", "SUMMARY:Sync", f"ORGANIZER:mailto:{ME}"]
        ev += [f"ATTENDEE:mailto:p{i}@x{i}.example" for i in range(5)] + ["END:VEVENT"]
    (tmp_path / "c.ics").write_text("\r\n".join(["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//t//t//EN", *ev,
                                                  "END:VCALENDAR", ""]), encoding="utf-8")
    store = Store(tmp_path / "ws.sqlite")
    import_paths(store, [tmp_path / "p.csv", tmp_path / "c.ics"])
    a = analyse(store)
    assert len(a.groups) == 1 and "follow up" not in a.groups[0].label.lower()
