"""The workspace object: what a notebook gets, checked against the command line's own results and networkx."""

from __future__ import annotations

import json
import os
import re
from pathlib import Path

import networkx as nx
import pytest

import mynet
from mynet.cli import main
from mynet.errors import AmbiguousError, NotFoundError, WorkspaceError
from mynet.settings import SettingError

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = ROOT / "sample_contacts"


def readme_python_example() -> str:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    section = text[text.index("## Use from Python"):]
    return re.search(r"```python\n(.*?)```", section, re.S).group(1)


def test_the_readme_example_runs_on_the_sample_scenario(tmp_path, capsys):
    for f in SAMPLE.iterdir():
        if f.suffix in (".vcf", ".csv", ".ics", ".mbox"):
            (tmp_path / f.name).symlink_to(f)
    here = os.getcwd()
    os.chdir(tmp_path)
    try:
        exec(compile(readme_python_example(), "README.md", "exec"), {"__name__": "readme"})
    finally:
        os.chdir(here)
    out = capsys.readouterr().out
    assert re.search(r"^\d+ contacts$", out, re.M)
    assert "you -> " in out  # an intro path into Velvane Robotics
    assert (tmp_path / "network.sqlite").stat().st_mode & 0o077 == 0


@pytest.fixture(scope="module")
def sample_ws(tmp_path_factory):
    from conftest import import_sample

    store, _truth = import_sample(tmp_path_factory.mktemp("api") / "ws.sqlite")
    store.close()
    ws = mynet.open_workspace(store.path, create=False)
    yield ws
    ws.close()


def cli_json(ws, capsys, *args):
    capsys.readouterr()
    assert main(["--workspace", str(ws.path), *args, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_frames_hold_the_network(sample_ws):
    frames = sample_ws.frames()
    contacts, ties, groups, measures = (frames[k] for k in ("contacts", "ties", "groups", "measures"))
    net = sample_ws.network()
    assert len(contacts) == len(net.contacts) and contacts.index.name == "id"
    assert len(ties) == len(net.ties)
    assert set(ties.basis) <= {"observed", "assumed"} and (ties.basis == "observed").any()
    assert ties.strength.is_monotonic_decreasing
    assert all(isinstance(e, list) and e for e in ties.evidence)
    # each tie's words are what `mynet ties` says of it
    assert (ties.words != "").all()
    assert groups["size"].sum() == sum(1 for g in sample_ws.analysis(net).group_of.values() if g is not None)
    assert set(measures.index) == set(contacts.index)
    assert {"betweenness", "eigenvector", "role", "group"} <= set(measures.columns)


def test_graph_has_every_attribute_and_matches_the_tie_table(sample_ws):
    G = sample_ws.graph()
    net = sample_ws.network()
    assert G.number_of_nodes() == len(net.contacts) and G.number_of_edges() == len(net.ties)
    a, b = int(net.ties.a[0]), int(net.ties.b[0])
    assert G.edges[a, b]["weight"] == pytest.approx(float(net.ties.strength[0]))
    assert {"basis", "evidence", "meetings", "overlap"} <= set(G.edges[a, b])
    assert {"label", "warmth", "role"} <= set(G.nodes[a])
    # networkx's own measure on the graph we hand out: weighted degree is the sum of tie strengths
    # (networkx.Graph.degree with weight=); the same number mynet reports as "strength" per contact
    measures = {m["id"]: m for m in sample_ws.measures(net=net)}
    for node, strength in list(G.degree(weight="weight"))[:20]:
        assert measures[node]["strength"] == pytest.approx(strength, abs=1e-6)
    assert nx.is_frozen(G) is False  # a plain graph the notebook may change


def test_rows_are_what_the_commands_print_as_json(sample_ws, capsys):
    rows = sample_ws.contacts()
    printed = cli_json(sample_ws, capsys, "contacts")
    assert [r["id"] for r in rows] == [p["id"] for p in printed]
    assert [round(r["warmth"], 4) for r in rows] == [p["warmth"] for p in printed]
    assert [r["group"] for r in rows] == [p["group"] for p in printed]
    ties = sample_ws.ties()
    printed = cli_json(sample_ws, capsys, "ties")
    assert [(t["a"], t["b"], t["basis"]) for t in ties] == [(p["a"], p["b"], p["basis"]) for p in printed]
    assert ties.total == len(ties)
    groups = cli_json(sample_ws, capsys, "groups")["groups"]
    assert sample_ws.groups() == groups
    assert sample_ws.audit() == cli_json(sample_ws, capsys, "audit")["findings"]
    labels = sample_ws.labels()
    assert labels == cli_json(sample_ws, capsys, "tags")


def test_reach_and_explain(sample_ws, capsys):
    result = sample_ws.reach(org="Velvane Robotics", k=3)
    assert result.paths and result.targets.kind == "organisation"
    assert result.paths == cli_json(sample_ws, capsys, "reach", "--org", "Velvane Robotics", "-k", "3")
    t = sample_ws.ties(limit=1)[0]
    ex = sample_ws.explain(t["a"], t["b"])
    assert ex["strength"] == pytest.approx(t["strength"], abs=1e-4) and ex["in_graph"]
    assert ex["basis"] == t["basis"] and ex["words"].startswith(t["words"].split(",")[0].split(";")[0])


def test_as_of_looks_from_a_past_day(sample_ws):
    past = sample_ws.as_of("2024-01-01")
    assert past.explicit and past.cut
    assert len(sample_ws.ties(as_of="2024-01-01")) <= len(sample_ws.ties())
    assert sample_ws.network("2024-01-01").as_of.day.isoformat() == "2024-01-01"


def test_people_find_and_errors(sample_ws):
    c = sample_ws.people()[0]
    assert sample_ws.find(c.id).id == c.id == sample_ws.find(str(c.id)).id
    assert sample_ws.person(c.id).name == c.name
    with pytest.raises(NotFoundError):
        sample_ws.find("nobody at all like this")
    dup = [p for p in sample_ws.people() if p.name.split()[0] == c.name.split()[0]]
    if len(dup) > 1:
        with pytest.raises(AmbiguousError):
            sample_ws.find(c.name.split()[0])


def test_settings_are_typed(tmp_path):
    with mynet.open_workspace(tmp_path / "ws.sqlite") as ws:
        assert ws.setting("tie_model.min_strength") == ws.settings()["tie_model.min_strength"]
        assert ws.set_setting("analysis.resolution", 1.5) == 1.5
        assert ws.setting("analysis.resolution") == 1.5
        assert ws.set_setting("webmail_domains", ["mail.example", "post.example"]) == ["mail.example", "post.example"]
        with pytest.raises(SettingError, match="analysis.seed takes a whole number"):
            ws.set_setting("analysis.seed", "2.5")
        with pytest.raises(SettingError, match="unknown setting"):
            ws.setting("analysis.resolutoin")
        assert "analysis.resolution" in ws.settings_schema()


def test_decisions_through_the_object(tmp_path):
    card = ("BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Ana Lind\r\nORG:Quillon "
            "Labs\r\nEMAIL:ana@quillon.example\r\nEND:VCARD\r\n"
            "BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Tom Reyes\r\nORG:Quillon "
            "Labs\r\nEMAIL:tom@quillon.example\r\nEND:VCARD\r\n"
            "BEGIN:VCARD\r\nVERSION:3.0\r\nFN:Bo Ek\r\nEMAIL:bo@velvane.example\r\nEND:VCARD\r\n")
    (tmp_path / "a.vcf").write_text(card, encoding="utf-8")
    with mynet.open_workspace(tmp_path / "ws.sqlite") as ws:
        report = ws.import_files([tmp_path / "a.vcf"])
        assert report.contacts_after == 3 and ws.sources()[0]["kind"] == "vcard"
        ana, bo = ws.find("Ana Lind"), ws.find("bo@velvane.example")
        ws.tie(ana.id, bo.id, note="same rowing crew")
        assert any({t["a"], t["b"]} == {ana.id, bo.id} and t["basis"] == "observed" for t in ws.ties())
        ws.untie(ana.id, bo.id)
        assert not any({t["a"], t["b"]} == {ana.id, bo.id} for t in ws.ties())
        ws.rate(bo.id, 0.9)
        assert next(r for r in ws.contacts(with_groups=False) if r["id"] == bo.id)["warmth"] == pytest.approx(0.9)
        merged = ws.merge([ana.id, bo.id])
        assert len(merged.record_ids) == 2
        parts = ws.unmerge(merged.id)
        assert len(parts) == 2
        ws.apart(parts[0].id, parts[1].id)
        assert not ws.suggestions()
        gone = ws.forget(ws.find("Tom Reyes").id)
        assert gone["records"] == 1 and len(ws.people()) == 2


def test_missing_workspace_is_not_created_when_told_so(tmp_path):
    with pytest.raises(WorkspaceError, match="no workspace"):
        mynet.open_workspace(tmp_path / "none.sqlite", create=False)
    assert not (tmp_path / "none.sqlite").exists()
